//! The scenario string (SPEC 3): one parser and one canonical writer, shared by the page's
//! address bar, the presets and the command line.
//!
//! ```
//! # use stratamap::dataset::Dataset;
//! # let ds = stratamap::testdata::two_groups();
//! use stratamap::model::scenario::Scenario;
//! let parsed = Scenario::parse("margin=young:+2.5,all:-1&turnout=young: 4", &ds);
//! assert!(parsed.messages.is_empty());
//! let s = parsed.scenario;
//! assert_eq!(s.margin_all, -1.0);
//! assert_eq!(s.to_query(&ds), "turnout=young:4&margin=all:-1,young:2.5");
//! ```

use crate::dataset::Dataset;
use crate::error::{plain, shown, MESSAGE_CHARS, SHOWN_CHARS};
use serde::Serialize;
use std::fmt;

/// Where the scenario starts: the poll's estimates (with their swing) or the baseline.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Start {
    Poll,
    Baseline,
}

/// Defaults of the simulation settings (SPEC 3).
pub const DEFAULT_SEED: u64 = 20_261_201;
pub const DEFAULT_TURNOUT_SD: f64 = 3.0;
pub const DEFAULT_MARGIN_SD: f64 = 2.0;
pub const DEFAULT_DISTRICT_SD: f64 = 3.0;
pub const DEFAULT_TURNOUT_CORR: f64 = 0.5;
/// Largest seed: 2^53 − 1, the largest integer a JavaScript number holds exactly.
pub const MAX_SEED: u64 = (1 << 53) - 1;
pub const MAX_RUNS: u32 = 100_000;
/// Sliders' limit in points.
pub const MAX_POINTS: f64 = 100.0;

/// A complete scenario: the sliders and the simulation settings.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Scenario {
    /// The page's dataset URL (ignored by the engine).
    pub data: Option<String>,
    pub start: Start,
    /// Turnout shift for every group, points.
    pub turnout_all: f64,
    /// Turnout shift per group (dataset order), points.
    pub turnout: Vec<f64>,
    /// Margin shift toward axis A for every group, points.
    pub margin_all: f64,
    pub margin: Vec<f64>,
    /// Simulation runs; `None`: the caller chooses.
    pub runs: Option<u32>,
    pub seed: u64,
    pub turnout_sd: f64,
    pub margin_sd: f64,
    pub district_sd: f64,
    pub turnout_corr: f64,
    /// `embed=1`: the page's compact layout for an article's iframe (page only; the
    /// numbers do not depend on it).
    pub embed: bool,
    /// `show`: the groups whose sliders an embed shows, in dataset order; `None`: all
    /// (page only).
    pub show: Option<Vec<usize>>,
}

/// A problem with one key of a scenario string.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Message {
    pub key: String,
    pub message: String,
}

impl fmt::Display for Message {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}: {}", self.key, self.message)
    }
}

/// The outcome of a lenient parse: what applies, and what was wrong.
#[derive(Debug, Clone, PartialEq)]
pub struct Parsed {
    pub scenario: Scenario,
    pub messages: Vec<Message>,
}

/// Parse a plain decimal with an optional sign (a leading space is a `+` that form
/// decoding turned into a space). No exponents, hex, NaN or infinities.
pub fn parse_decimal(s: &str) -> Option<f64> {
    let body = s.strip_prefix(' ').map(|r| format!("+{r}"));
    let t = body.as_deref().unwrap_or(s);
    let digits = t.strip_prefix(['+', '-']).unwrap_or(t);
    if digits.is_empty() || digits.len() > 40 {
        return None;
    }
    let (int, frac) = match digits.split_once('.') {
        Some((i, f)) => (i, Some(f)),
        None => (digits, None),
    };
    let all_digits = |x: &str| x.bytes().all(|b| b.is_ascii_digit());
    let ok = all_digits(int)
        && frac.is_none_or(|f| all_digits(f) && !f.is_empty())
        && !(int.is_empty() && frac.is_none());
    if !ok {
        return None;
    }
    let v: f64 = t.parse().ok()?;
    // -0 is 0.
    Some(if v == 0.0 { 0.0 } else { v })
}

fn parse_integer(s: &str) -> Option<u64> {
    let t = s.strip_prefix([' ', '+']).unwrap_or(s);
    if t.is_empty() || t.len() > 16 || !t.bytes().all(|b| b.is_ascii_digit()) {
        return None;
    }
    t.parse().ok()
}

/// Shortest round-trip decimal form of a number (never an exponent).
pub fn fmt_number(v: f64) -> String {
    let v = if v == 0.0 { 0.0 } else { v };
    format!("{v}")
}

impl Scenario {
    /// The default scenario for a dataset: no shifts, starting from the poll when there is one.
    pub fn default_for(ds: &Dataset) -> Scenario {
        Scenario {
            data: None,
            start: if ds.poll.is_some() {
                Start::Poll
            } else {
                Start::Baseline
            },
            turnout_all: 0.0,
            turnout: vec![0.0; ds.group_count()],
            margin_all: 0.0,
            margin: vec![0.0; ds.group_count()],
            runs: None,
            seed: DEFAULT_SEED,
            turnout_sd: DEFAULT_TURNOUT_SD,
            margin_sd: DEFAULT_MARGIN_SD,
            district_sd: DEFAULT_DISTRICT_SD,
            turnout_corr: DEFAULT_TURNOUT_CORR,
            embed: false,
            show: None,
        }
    }

    /// Whether the scenario starts from the poll (it exists and was chosen).
    pub fn from_poll(&self, ds: &Dataset) -> bool {
        self.start == Start::Poll && ds.poll.is_some()
    }

    /// Effective turnout shift of group `g` in points (`all` plus the group's own).
    pub fn turnout_shift(&self, g: usize) -> f64 {
        self.turnout_all + self.turnout.get(g).copied().unwrap_or(0.0)
    }

    /// Slider margin shift of group `g` in points (`all` plus the group's own; without the poll's swing).
    pub fn margin_shift(&self, g: usize) -> f64 {
        self.margin_all + self.margin.get(g).copied().unwrap_or(0.0)
    }

    /// Lenient parse (the page): every valid key applies, every problem is a message.
    /// A bad entry of a list (`turnout`, `margin`) drops that entry only.
    pub fn parse(query: &str, ds: &Dataset) -> Parsed {
        let mut s = Scenario::default_for(ds);
        let mut messages = Vec::new();
        // A key or value from the link never reaches a terminal or a page raw: control
        // characters are escaped and long text is cut (crate::error::plain).
        let mut say = |key: &str, message: String| {
            messages.push(Message {
                key: plain(key, SHOWN_CHARS),
                message: plain(&message, MESSAGE_CHARS),
            })
        };
        let q = query.trim_start_matches('?');
        let mut seen: Vec<String> = Vec::new();
        for (key, value) in form_urlencoded::parse(q.as_bytes()) {
            let key = key.into_owned();
            if seen.contains(&key) {
                say(&key, "given more than once; the last value applies".into());
            } else {
                seen.push(key.clone());
            }
            let value = value.as_ref();
            match key.as_str() {
                "data" => s.data = Some(value.to_string()),
                "turnout" | "margin" => {
                    let mut all = 0.0;
                    let mut per = vec![0.0; ds.group_count()];
                    let mut given: Vec<String> = Vec::new();
                    for entry in value.split(',') {
                        if entry.is_empty() {
                            if value.is_empty() {
                                break;
                            }
                            say(&key, "an empty entry; expected group:points".into());
                            continue;
                        }
                        let Some((gid, pts)) = entry.split_once(':') else {
                            say(
                                &key,
                                format!("{} is not of the form group:points", shown(entry)),
                            );
                            continue;
                        };
                        let g = if gid == "all" {
                            None
                        } else {
                            match ds.group_index(gid) {
                                Some(g) => Some(g),
                                None => {
                                    say(&key, format!("unknown group {}", shown(gid)));
                                    continue;
                                }
                            }
                        };
                        let Some(v) = parse_decimal(pts).filter(|v| v.abs() <= MAX_POINTS) else {
                            say(
                                &key,
                                format!(
                                    "{} is not allowed; expected points from -100 to 100",
                                    shown(entry)
                                ),
                            );
                            continue;
                        };
                        if given.iter().any(|x| x == gid) {
                            say(
                                &key,
                                format!("group {} given twice; the last value applies", shown(gid)),
                            );
                        }
                        given.push(gid.to_string());
                        match g {
                            None => all = v,
                            Some(g) => per[g] = v,
                        }
                    }
                    if key == "turnout" {
                        s.turnout_all = all;
                        s.turnout = per;
                    } else {
                        s.margin_all = all;
                        s.margin = per;
                    }
                }
                "start" => match value {
                    "poll" if ds.poll.is_some() => s.start = Start::Poll,
                    "poll" => say(
                        &key,
                        "this dataset has no poll; the scenario starts from the baseline".into(),
                    ),
                    "baseline" => s.start = Start::Baseline,
                    other => say(
                        &key,
                        format!("{} is not allowed; expected poll or baseline", shown(other)),
                    ),
                },
                "runs" => match parse_integer(value).filter(|v| *v <= u64::from(MAX_RUNS)) {
                    Some(v) => s.runs = Some(v as u32),
                    None => say(
                        &key,
                        format!(
                            "{} is not allowed; expected a whole number from 0 to {MAX_RUNS}",
                            shown(value)
                        ),
                    ),
                },
                "seed" => match parse_integer(value).filter(|v| *v <= MAX_SEED) {
                    Some(v) => s.seed = v,
                    None => say(
                        &key,
                        format!(
                            "{} is not allowed; expected a whole number from 0 to {MAX_SEED}",
                            shown(value)
                        ),
                    ),
                },
                "turnout_sd" | "margin_sd" | "district_sd" | "turnout_corr" => {
                    let hi = if key == "turnout_corr" { 1.0 } else { 25.0 };
                    match parse_decimal(value).filter(|v| (0.0..=hi).contains(v)) {
                        Some(v) => match key.as_str() {
                            "turnout_sd" => s.turnout_sd = v,
                            "margin_sd" => s.margin_sd = v,
                            "district_sd" => s.district_sd = v,
                            _ => s.turnout_corr = v,
                        },
                        None => say(
                            &key,
                            format!(
                                "{} is not allowed; expected a number from 0 to {}",
                                shown(value),
                                fmt_number(hi)
                            ),
                        ),
                    }
                }
                "embed" => match value {
                    "1" => s.embed = true,
                    "0" => s.embed = false,
                    other => say(&key, format!("{other:?} is not allowed; expected 1 (or 0)")),
                },
                "show" => {
                    let mut groups = Vec::new();
                    for gid in value.split(',').filter(|g| !g.is_empty()) {
                        match ds.group_index(gid) {
                            Some(g) if !groups.contains(&g) => groups.push(g),
                            Some(_) => {}
                            None => say(&key, format!("unknown group {gid:?}")),
                        }
                    }
                    groups.sort_unstable();
                    s.show = (!groups.is_empty()).then_some(groups);
                }
                _ => say(&key, "unknown key; ignored".into()),
            }
        }
        Parsed {
            scenario: s,
            messages,
        }
    }

    /// Strict parse (the command line): any problem refuses the whole string.
    pub fn parse_strict(query: &str, ds: &Dataset) -> Result<Scenario, Vec<Message>> {
        let p = Scenario::parse(query, ds);
        if p.messages.is_empty() {
            Ok(p.scenario)
        } else {
            Err(p.messages)
        }
    }

    /// The canonical string: keys in a fixed order, defaults left out, groups in dataset
    /// order with `all` first, numbers in shortest round-trip form. `""` for the default.
    pub fn to_query(&self, ds: &Dataset) -> String {
        let mut parts: Vec<String> = Vec::new();
        if let Some(d) = &self.data {
            parts.push(format!(
                "data={}",
                form_urlencoded::byte_serialize(d.as_bytes()).collect::<String>()
            ));
        }
        let default_start = if ds.poll.is_some() {
            Start::Poll
        } else {
            Start::Baseline
        };
        if self.start != default_start {
            parts.push(
                match self.start {
                    Start::Poll => "start=poll",
                    Start::Baseline => "start=baseline",
                }
                .into(),
            );
        }
        for (key, all, per) in [
            ("turnout", self.turnout_all, &self.turnout),
            ("margin", self.margin_all, &self.margin),
        ] {
            let mut entries = Vec::new();
            if all != 0.0 {
                entries.push(format!("all:{}", fmt_number(all)));
            }
            for (g, v) in per.iter().enumerate() {
                if *v != 0.0 {
                    if let Some(group) = ds.groups.get(g) {
                        entries.push(format!("{}:{}", group.id, fmt_number(*v)));
                    }
                }
            }
            if !entries.is_empty() {
                parts.push(format!("{key}={}", entries.join(",")));
            }
        }
        if let Some(r) = self.runs {
            parts.push(format!("runs={r}"));
        }
        if self.seed != DEFAULT_SEED {
            parts.push(format!("seed={}", self.seed));
        }
        for (key, v, d) in [
            ("turnout_sd", self.turnout_sd, DEFAULT_TURNOUT_SD),
            ("margin_sd", self.margin_sd, DEFAULT_MARGIN_SD),
            ("district_sd", self.district_sd, DEFAULT_DISTRICT_SD),
            ("turnout_corr", self.turnout_corr, DEFAULT_TURNOUT_CORR),
        ] {
            if v != d {
                parts.push(format!("{key}={}", fmt_number(v)));
            }
        }
        if self.embed {
            parts.push("embed=1".into());
        }
        if let Some(show) = &self.show {
            let ids: Vec<&str> = show
                .iter()
                .filter_map(|&g| ds.groups.get(g).map(|x| x.id.as_str()))
                .collect();
            if !ids.is_empty() {
                parts.push(format!("show={}", ids.join(",")));
            }
        }
        parts.join("&")
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::testdata::two_groups;

    #[test]
    fn embed_and_show_round_trip() {
        let ds = two_groups();
        let p = Scenario::parse("show=old,young,old,nobody&embed=1&turnout=all:1", &ds);
        assert_eq!(p.scenario.show, Some(vec![0, 1]));
        assert!(p.scenario.embed);
        assert_eq!(p.messages.len(), 1);
        assert!(p.messages[0]
            .to_string()
            .contains("unknown group \"nobody\""));
        assert_eq!(
            p.scenario.to_query(&ds),
            "turnout=all:1&embed=1&show=young,old"
        );
        let p = Scenario::parse("embed=yes&show=", &ds);
        assert!(!p.scenario.embed && p.scenario.show.is_none());
        assert_eq!(p.messages.len(), 1);
    }

    #[test]
    fn decimals() {
        assert_eq!(parse_decimal("2.5"), Some(2.5));
        assert_eq!(parse_decimal("+2"), Some(2.0));
        assert_eq!(parse_decimal(" 2"), Some(2.0));
        assert_eq!(parse_decimal("-.5"), Some(-0.5));
        assert_eq!(parse_decimal("-0"), Some(0.0));
        assert_eq!(parse_decimal("3."), None);
        for bad in [
            "", "+", "-", "1e3", "0x10", "NaN", "inf", "1.2.3", "--1", "1,5", " -1", ".",
        ] {
            assert_eq!(parse_decimal(bad), None, "{bad:?}");
        }
    }

    #[test]
    fn plus_as_literal_or_space() {
        let ds = two_groups();
        let a = Scenario::parse("margin=young:%2B3", &ds).scenario;
        let b = Scenario::parse("margin=young:+3", &ds).scenario;
        assert_eq!(a.margin, vec![3.0, 0.0]);
        assert_eq!(a, b);
    }

    #[test]
    fn lenient_keeps_the_rest() {
        let ds = two_groups();
        let p = Scenario::parse(
            "turnout=young:500,old:3&margin=all:2,nobody:1&runs=7.5&colour=red&start=sideways",
            &ds,
        );
        assert_eq!(p.scenario.turnout, vec![0.0, 3.0]);
        assert_eq!(p.scenario.margin_all, 2.0);
        assert_eq!(p.scenario.runs, None);
        let keys: Vec<&str> = p.messages.iter().map(|m| m.key.as_str()).collect();
        assert_eq!(keys, vec!["turnout", "margin", "runs", "colour", "start"]);
        assert!(p.messages[0].message.contains("-100 to 100"));
        assert!(p.messages[1].message.contains("\"nobody\""));
        assert!(Scenario::parse_strict("turnout=young:500", &ds).is_err());
    }

    #[test]
    fn canonical_round_trip() {
        let ds = two_groups();
        let q = "start=baseline&turnout=all:-2,old:0.1&margin=young:-100&runs=5000&seed=9007199254740991&turnout_sd=0&turnout_corr=1";
        let s = Scenario::parse_strict(q, &ds).unwrap();
        assert_eq!(s.to_query(&ds), q);
        assert_eq!(Scenario::default_for(&ds).to_query(&ds), "");
        assert!(Scenario::parse_strict("seed=9007199254740992", &ds).is_err());
    }
}
