//! Datasets (SPEC 1): the manifest and the files it names, validated and held in flat
//! arrays indexed by (district, group) so that a tally is a few tight loops.
//!
//! Loading never panics and never stops at the first problem: every file's problems are
//! collected (capped per file) and returned together as a [`DatasetError`].

mod districts;
mod electorate;
mod manifest;
mod number;
mod poll;
mod seat_rule;
mod table;

use crate::error::{plain, shown, DatasetError, Location, Problem, SHOWN_CHARS};
use geo::MultiPolygon;

pub use districts::{MAX_DISTRICTS, MAX_GEOJSON_BYTES};
pub use electorate::MAX_TOTAL_ELIGIBLE;
pub use manifest::{file_name_problem, manifest_files, Files, MAX_FILE_NAME_CHARS};
pub(crate) use number::parse_number;
pub use number::round_text;
pub use seat_rule::{SeatRule, MAX_THRESHOLD};

/// A party on the ballot.
#[derive(Debug, Clone, PartialEq)]
pub struct Party {
    pub id: String,
    pub name: String,
    /// `#rrggbb`.
    pub color: String,
}

/// A group of voters (a stratum of the poll).
#[derive(Debug, Clone, PartialEq)]
pub struct Group {
    pub id: String,
    pub name: String,
}

/// A district: its shape in longitude/latitude and the seats it elects.
#[derive(Debug, Clone, PartialEq)]
pub struct District {
    pub id: String,
    pub name: String,
    pub seats: u32,
    pub region: Option<String>,
    pub shape: MultiPolygon<f64>,
    /// How its seats are shared: its own `seat_rule`, else the manifest's.
    pub seat_rule: SeatRule,
    /// Percent of its votes below which a party gets no seat under a proportional rule:
    /// its own `threshold`, else the manifest's.
    pub threshold: f64,
}

/// A named scenario shipped with the dataset.
#[derive(Debug, Clone, PartialEq)]
pub struct Preset {
    pub name: String,
    pub scenario: String,
}

/// A current poll: nationwide estimates per group.
#[derive(Debug, Clone, PartialEq)]
pub struct Poll {
    /// Unweighted respondents per group.
    pub sample_size: Vec<f64>,
    /// Kish's design effect per group (at least 1).
    pub design_effect: Vec<f64>,
    /// Vote shares, index `g * parties + k`.
    pub shares: Vec<f64>,
}

/// The electorate in flat arrays. Cell `c = d * groups + g`.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Cells {
    /// N_gd: eligible people.
    pub eligible: Vec<f64>,
    /// τ_gd: baseline turnout rate.
    pub turnout: Vec<f64>,
    /// π_gdk: baseline vote shares, index `c * parties + k`.
    pub shares: Vec<f64>,
}

/// The file texts of a dataset, as loaded by the command line or fetched by the page.
#[derive(Debug, Clone, Copy)]
pub struct Sources<'a> {
    pub manifest: &'a str,
    pub districts: &'a str,
    pub electorate: &'a str,
    pub poll: Option<&'a str>,
}

/// A validated dataset.
#[derive(Debug, Clone, PartialEq)]
pub struct Dataset {
    pub title: String,
    pub source: String,
    pub parties: Vec<Party>,
    /// Indices of the axis parties A and B (the pair the margin sliders move between).
    pub axis: [usize; 2],
    pub groups: Vec<Group>,
    pub districts: Vec<District>,
    /// Seats needed for a majority.
    pub majority: u32,
    /// The manifest's seat rule and threshold (each district may set its own).
    pub seat_rule: SeatRule,
    pub threshold: f64,
    pub presets: Vec<Preset>,
    pub cells: Cells,
    pub poll: Option<Poll>,
    /// The file names the manifest gives.
    pub files: Files,
}

/// Name of the manifest in messages.
pub const MANIFEST: &str = "dataset.json";

/// A JSON value from the input, quoted for a message: a string as [`shown`], anything
/// else in its JSON form, cut like any echoed value.
pub(crate) fn shown_value(v: &serde_json::Value) -> String {
    match v {
        serde_json::Value::String(s) => shown(s),
        other => plain(&other.to_string(), SHOWN_CHARS),
    }
}

/// Largest file a dataset may have, in bytes: the command line checks it before reading,
/// the page before and while it fetches.
pub const MAX_FILE_BYTES: u64 = 100 * 1024 * 1024;

/// The text after a UTF-8 byte-order mark, if the text starts with one (editors on some
/// systems write it; RFC 8259 lets a JSON reader ignore it, and CSV readers commonly do).
pub(crate) fn without_bom(text: &str) -> &str {
    text.strip_prefix('\u{feff}').unwrap_or(text)
}

/// Whether `s` is a valid id: `[a-z0-9_-]{1,32}`.
pub fn is_valid_id(s: &str) -> bool {
    !s.is_empty()
        && s.len() <= 32
        && s.bytes()
            .all(|b| b.is_ascii_lowercase() || b.is_ascii_digit() || b == b'_' || b == b'-')
}

impl Dataset {
    /// Validate a dataset from its file texts.
    ///
    /// ```
    /// use stratamap::dataset::{Dataset, Sources};
    /// let manifest = r##"{"title":"T","source":"S",
    ///   "parties":[{"id":"a","name":"A","color":"#112233"},{"id":"b","name":"B","color":"#445566"}],
    ///   "groups":[{"id":"g","name":"G"}],
    ///   "districts":"d.geojson","electorate":"e.csv"}"##;
    /// let districts = r#"{"type":"FeatureCollection","features":[{"type":"Feature",
    ///   "properties":{"id":"x","name":"X"},
    ///   "geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,0]]]}}]}"#;
    /// let electorate = "district,group,eligible,turnout,a,b\nx,g,100,0.5,0.6,0.4\n";
    /// let ds = Dataset::from_sources(&Sources { manifest, districts, electorate, poll: None }).unwrap();
    /// assert_eq!(ds.majority, 1);
    /// assert_eq!(ds.cells.eligible, vec![100.0]);
    /// ```
    pub fn from_sources(src: &Sources) -> Result<Dataset, DatasetError> {
        let mut error = DatasetError::default();
        let m = match manifest::parse(src.manifest) {
            Ok(m) => m,
            Err(c) => {
                c.drain_into(&mut error);
                return Err(error);
            }
        };
        let party_ids: Vec<&str> = m.parties.iter().map(|p| p.id.as_str()).collect();
        let group_ids: Vec<&str> = m.groups.iter().map(|g| g.id.as_str()).collect();

        let districts = districts::parse(
            &m.files.districts,
            src.districts,
            (m.seat_rule, m.threshold),
        );
        let districts = match districts {
            Ok(d) => Some(d),
            Err(c) => {
                c.drain_into(&mut error);
                None
            }
        };

        let cells = districts.as_ref().map(|ds| {
            let ids: Vec<&str> = ds.iter().map(|d| d.id.as_str()).collect();
            electorate::parse(
                &m.files.electorate,
                src.electorate,
                &ids,
                &group_ids,
                &party_ids,
            )
        });
        let cells = match cells {
            Some(Ok(c)) => Some(c),
            Some(Err(c)) => {
                c.drain_into(&mut error);
                None
            }
            None => None,
        };

        let poll = match (&m.files.poll, src.poll) {
            (Some(name), Some(text)) => match poll::parse(name, text, &group_ids, &party_ids) {
                Ok(p) => Some(p),
                Err(c) => {
                    c.drain_into(&mut error);
                    None
                }
            },
            (Some(name), None) => {
                error.problems.push(Problem::new(
                    name,
                    Location::File,
                    None,
                    "the manifest names this poll file but it was not provided",
                ));
                None
            }
            (None, _) => None,
        };

        let (Some(districts), Some(cells)) = (districts, cells) else {
            return Err(error);
        };
        if !error.is_empty() {
            return Err(error);
        }
        let total_seats: u64 = districts.iter().map(|d| u64::from(d.seats)).sum();
        let majority = match m.majority {
            Some(v) => v,
            None => u32::try_from(total_seats / 2 + 1).unwrap_or(u32::MAX),
        };
        let mut ds = Dataset {
            title: m.title,
            source: m.source,
            parties: m.parties,
            axis: m.axis,
            groups: m.groups,
            districts,
            majority,
            seat_rule: m.seat_rule,
            threshold: m.threshold,
            presets: m.presets,
            cells,
            poll,
            files: m.files,
        };
        // Presets are scenario strings: they must parse cleanly against this dataset.
        for (i, preset) in ds.presets.iter().enumerate() {
            let parsed = crate::model::scenario::Scenario::parse(&preset.scenario, &ds);
            for msg in parsed.messages {
                error.problems.push(Problem::new(
                    MANIFEST,
                    Location::File,
                    Some(&format!("presets[{i}].scenario")),
                    msg.to_string(),
                ));
            }
        }
        if !error.is_empty() {
            return Err(error);
        }
        ds.presets.shrink_to_fit();
        Ok(ds)
    }

    pub fn party_count(&self) -> usize {
        self.parties.len()
    }
    pub fn group_count(&self) -> usize {
        self.groups.len()
    }
    pub fn district_count(&self) -> usize {
        self.districts.len()
    }
    /// Total seats over all districts.
    pub fn total_seats(&self) -> u64 {
        self.districts.iter().map(|d| u64::from(d.seats)).sum()
    }
    /// Whether any district shares its seats by a proportional rule (then the tally
    /// keeps every district's seat split, the CSV has `seats_<party>` columns, and
    /// there is no tipping point).
    pub fn has_proportional(&self) -> bool {
        self.districts.iter().any(|d| d.seat_rule.is_proportional())
    }
    pub fn party_index(&self, id: &str) -> Option<usize> {
        self.parties.iter().position(|p| p.id == id)
    }
    pub fn group_index(&self, id: &str) -> Option<usize> {
        self.groups.iter().position(|g| g.id == id)
    }
}

#[cfg(not(target_arch = "wasm32"))]
mod fs;
#[cfg(not(target_arch = "wasm32"))]
pub use fs::load_path;
