//! Errors are values: every problem with a dataset names the file, where in it, the field,
//! and what was expected (SPEC 1.5).

use std::fmt;

/// Where in a file a problem sits.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Location {
    /// The file as a whole.
    File,
    /// A CSV row, 1-based, the header being row 1.
    Row(usize),
    /// A GeoJSON feature, 0-based.
    Feature(usize),
    /// A JSON line and column (syntax errors), both 1-based.
    LineColumn(usize, usize),
}

/// One problem with one input file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Problem {
    /// The file's name as the manifest gives it (or `dataset.json`).
    pub file: String,
    pub location: Location,
    /// The field (CSV column, GeoJSON property, manifest key path), when one is to blame.
    pub field: Option<String>,
    /// What was expected, and what was found.
    pub message: String,
}

impl Problem {
    /// A problem; its file name, field and message pass through [`plain`], so whatever
    /// of the input they carry cannot reach a terminal or a page as control characters,
    /// and cannot make a message of megabytes.
    pub fn new(
        file: &str,
        location: Location,
        field: Option<&str>,
        message: impl Into<String>,
    ) -> Self {
        Problem {
            file: plain(file, SHOWN_CHARS),
            location,
            field: field.map(|f| plain(f, SHOWN_CHARS)),
            message: plain(&message.into(), MESSAGE_CHARS),
        }
    }
}

/// The most characters of a value from the input that a message quotes.
pub const SHOWN_CHARS: usize = 60;
/// The most characters of one message (the text around the quoted values included).
pub const MESSAGE_CHARS: usize = 400;

/// Whether a character would act rather than show: control characters (C0, DEL, C1) and
/// the invisible formatting ones that reorder or hide text (bidirectional overrides and
/// isolates, zero-width characters, the byte-order mark, line and paragraph separators).
fn acts(c: char) -> bool {
    c.is_control()
        || matches!(c, '\u{200b}'..='\u{200f}' | '\u{2028}'..='\u{202e}' | '\u{2060}'..='\u{2069}' | '\u{feff}')
}

/// Text from the input made safe to print: characters that act are written as `\u{…}`
/// escapes, and text longer than `max_chars` characters is cut, saying how long it was.
///
/// ```
/// use stratamap::error::plain;
/// assert_eq!(plain("a\u{1b}[2Jb", 60), "a\\u{1b}[2Jb");
/// assert_eq!(plain(&"x".repeat(100), 5), "xxxxx… (cut: 100 characters in all)");
/// ```
pub fn plain(text: &str, max_chars: usize) -> String {
    let mut out = String::with_capacity(text.len().min(max_chars * 2));
    for (count, c) in text.chars().enumerate() {
        if count == max_chars {
            let total = text.chars().count();
            out.push_str(&format!("… (cut: {total} characters in all)"));
            return out;
        }
        if acts(c) {
            out.push_str(&format!("\\u{{{:x}}}", c as u32));
        } else {
            out.push(c);
        }
    }
    out
}

/// A value from the input, quoted for a message: in double quotes, with quotes,
/// backslashes and characters that act escaped, and cut after [`SHOWN_CHARS`]
/// characters, saying how long it was.
///
/// ```
/// use stratamap::error::shown;
/// assert_eq!(shown("north\u{0}"), r#""north\u{0}""#);
/// let long = shown(&"9".repeat(130_000));
/// assert!(long.ends_with("… (cut: 130000 characters in all)"));
/// assert!(long.len() < 120);
/// ```
pub fn shown(value: &str) -> String {
    let cut = value.char_indices().nth(SHOWN_CHARS).map(|(i, _)| i);
    let head = &value[..cut.unwrap_or(value.len())];
    let mut out = String::from("\"");
    for c in head.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            c if acts(c) => out.push_str(&format!("\\u{{{:x}}}", c as u32)),
            c => out.push(c),
        }
    }
    out.push('"');
    if cut.is_some() {
        out.push_str(&format!(
            "… (cut: {} characters in all)",
            value.chars().count()
        ));
    }
    out
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file)?;
        match self.location {
            Location::File => {}
            Location::Row(r) => write!(f, " row {r}")?,
            Location::Feature(i) => write!(f, " feature {i}")?,
            Location::LineColumn(l, c) => write!(f, " line {l} column {c}")?,
        }
        if let Some(field) = &self.field {
            write!(f, ", field {field}")?;
        }
        write!(f, ": {}", self.message)
    }
}

/// Most problems listed for one file before the rest are only counted.
pub const MAX_PROBLEMS_PER_FILE: usize = 25;

/// All the problems found in a dataset. Loading collects them all (capped per file)
/// instead of stopping at the first.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct DatasetError {
    pub problems: Vec<Problem>,
    /// Problems found beyond the cap, per file: (file, how many more).
    pub more: Vec<(String, usize)>,
}

impl DatasetError {
    pub fn is_empty(&self) -> bool {
        self.problems.is_empty() && self.more.is_empty()
    }

    /// Every problem message, one per line.
    pub fn lines(&self) -> Vec<String> {
        let mut out: Vec<String> = self.problems.iter().map(|p| p.to_string()).collect();
        for (file, n) in &self.more {
            out.push(format!("{file}: … and {n} more problems"));
        }
        out
    }
}

impl fmt::Display for DatasetError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.lines().join("\n"))
    }
}

impl std::error::Error for DatasetError {}

/// Collects the problems of one file, keeping at most [`MAX_PROBLEMS_PER_FILE`].
#[derive(Debug)]
pub(crate) struct Collector {
    file: String,
    problems: Vec<Problem>,
    extra: usize,
}

impl Collector {
    pub fn new(file: &str) -> Self {
        Collector {
            file: plain(file, SHOWN_CHARS),
            problems: Vec::new(),
            extra: 0,
        }
    }

    pub fn push(&mut self, location: Location, field: Option<&str>, message: impl Into<String>) {
        if self.problems.len() < MAX_PROBLEMS_PER_FILE {
            self.problems
                .push(Problem::new(&self.file, location, field, message));
        } else {
            self.extra += 1;
        }
    }

    pub fn is_empty(&self) -> bool {
        self.problems.is_empty() && self.extra == 0
    }

    pub fn drain_into(self, error: &mut DatasetError) {
        error.problems.extend(self.problems);
        if self.extra > 0 {
            error.more.push((self.file, self.extra));
        }
    }
}
