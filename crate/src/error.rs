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
    pub fn new(
        file: &str,
        location: Location,
        field: Option<&str>,
        message: impl Into<String>,
    ) -> Self {
        Problem {
            file: file.to_string(),
            location,
            field: field.map(str::to_string),
            message: message.into(),
        }
    }
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
            file: file.to_string(),
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
