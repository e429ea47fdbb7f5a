//! Raking: the district × group electorate built from what analysts have (the
//! contributor guide's "Building the electorate from marginals").
//!
//! Inputs, all CSV with a header row:
//! - `margins.csv`: `district,dimension,category,count`, one row per district,
//!   dimension and category: eligible people counted by one dimension at a time;
//! - `groups.csv`: `group,<dimension>…,eligible,turnout,<party id>…[,region]`, each group
//!   one combination of categories with its seed count, baseline turnout and shares
//!   (per region when a `region` column is present);
//! - `results.csv` (optional): `district,votes_cast,<party id>…`, the last election's votes;
//! - the districts' GeoJSON (optional; needed for regional seeds): the order of the
//!   districts and their `region`.
//!
//! Each district's table starts from its seed (the groups' counts) and is rescaled by
//! iterative proportional fitting ([`super::ipf`]) until every category's sum matches the
//! district's margin within [`TOLERANCE`] of the district's total. With results, the
//! district's turnout is calibrated by one shift of every group's turnout on the logit
//! scale, and its shares by raking the group × party vote table to the group totals and
//! the party results, so that the tally reproduces the results.
//!
//! ```
//! use stratamap::build::rake::{rake, Inputs};
//! let margins = "district,dimension,category,count\n\
//!     n,age,young,40\nn,age,old,60\nn,area,town,70\nn,area,farm,30\n";
//! let groups = "group,age,area,eligible,turnout,a,b\n\
//!     yt,young,town,1,0.5,0.6,0.4\nyf,young,farm,1,0.5,0.5,0.5\n\
//!     ot,old,town,1,0.7,0.4,0.6\nof,old,farm,1,0.7,0.3,0.7\n";
//! let r = rake(&Inputs::new(("margins.csv", margins), ("groups.csv", groups))).unwrap();
//! // A uniform seed: each cell is the product of its margins over the total.
//! assert!((r.eligible[0] - 40.0 * 70.0 / 100.0).abs() < 1e-6);
//! assert!(r.electorate_csv().starts_with("district,group,eligible,turnout,a,b\nn,yt,28"));
//! ```

use super::ipf;
use crate::dataset::{is_valid_id, parse_number, Dataset, District, Sources};
use crate::error::{Collector, DatasetError, Location};
use crate::model::scenario::fmt_number;
use serde_json::json;
use std::collections::HashMap;

/// Largest remaining margin error, as a fraction of the district's total.
pub const TOLERANCE: f64 = 1e-9;
/// Largest remaining error of the group × party vote table, as a fraction of the
/// district's votes (tighter than the margins: it decides how closely each group's
/// shares sum to 1).
pub const VOTES_TOLERANCE: f64 = 1e-12;
/// Most cycles over the dimensions before a district counts as not converged.
pub const MAX_ITERATIONS: usize = 10_000;
/// How far a district's dimension totals may disagree (0.1 %), relative to the largest.
pub const TOTALS_TOLERANCE: f64 = 0.001;
/// How far `votes_cast` may differ from the sum of the party votes (0.1 %).
pub const CAST_TOLERANCE: f64 = 0.001;

/// Colours for parties when nothing else is known: the eight colours of Okabe and Ito's
/// colour-blind-safe palette ("Color Universal Design", 2008), then four of Paul Tol's
/// "muted" scheme for datasets with more parties.
pub const PALETTE: [&str; 12] = [
    "#e69f00", "#56b4e9", "#009e73", "#f0e442", "#0072b2", "#d55e00", "#cc79a7", "#000000",
    "#882255", "#44aa99", "#999933", "#aa4499",
];

/// One input file: the name used in messages, and its text.
#[derive(Debug, Clone, Copy)]
pub struct Input<'a> {
    pub name: &'a str,
    pub text: &'a str,
}

impl<'a> From<(&'a str, &'a str)> for Input<'a> {
    fn from((name, text): (&'a str, &'a str)) -> Self {
        Input { name, text }
    }
}

/// What [`rake`] reads.
#[derive(Debug, Clone, Copy)]
pub struct Inputs<'a> {
    pub margins: Input<'a>,
    pub groups: Input<'a>,
    pub results: Option<Input<'a>>,
    /// The districts' GeoJSON: their order, and the region each takes its seed from.
    pub districts: Option<Input<'a>>,
}

impl<'a> Inputs<'a> {
    /// Margins and groups only.
    pub fn new(margins: impl Into<Input<'a>>, groups: impl Into<Input<'a>>) -> Self {
        Inputs {
            margins: margins.into(),
            groups: groups.into(),
            results: None,
            districts: None,
        }
    }
}

/// A dimension and its categories, in the order of their first row in the margins.
#[derive(Debug, Clone, PartialEq)]
pub struct Dimension {
    pub id: String,
    pub categories: Vec<String>,
}

/// A group: its id and its category (index) in each dimension.
#[derive(Debug, Clone, PartialEq)]
pub struct RakedGroup {
    pub id: String,
    pub of: Vec<usize>,
}

/// How the results were matched in one district.
#[derive(Debug, Clone, PartialEq)]
pub struct Calibration {
    /// The shift of every group's turnout on the logit scale.
    pub turnout_shift: f64,
    /// Cycles of the group × party raking.
    pub iterations: usize,
    /// Largest remaining |group votes − group total| after it, in votes.
    pub max_error: f64,
}

/// What the fit did in one district.
#[derive(Debug, Clone, PartialEq)]
pub struct DistrictReport {
    pub district: String,
    /// The district's total eligible (after its dimensions were brought to one total).
    pub total: f64,
    /// Largest relative change made to bring a dimension's total to the common total.
    pub totals_adjusted: f64,
    pub iterations: usize,
    /// Largest remaining |fitted − margin| over the district's categories, in people.
    pub max_error: f64,
    pub calibration: Option<Calibration>,
}

/// The raked electorate.
#[derive(Debug, Clone, PartialEq)]
pub struct Raked {
    pub dimensions: Vec<Dimension>,
    pub groups: Vec<RakedGroup>,
    pub parties: Vec<String>,
    pub districts: Vec<String>,
    /// Cell `d * groups + g`, as in the dataset's cells.
    pub eligible: Vec<f64>,
    pub turnout: Vec<f64>,
    /// Index `(d * groups + g) * parties + k`.
    pub shares: Vec<f64>,
    /// The party votes of the results (`d * parties + k`), when given.
    pub results: Option<Vec<f64>>,
    pub reports: Vec<DistrictReport>,
}

/// A group's row of `groups.csv`, for one region (or nationwide).
#[derive(Debug, Clone)]
struct Seed {
    eligible: f64,
    turnout: f64,
    shares: Vec<f64>,
}

struct Groups {
    parties: Vec<String>,
    groups: Vec<RakedGroup>,
    /// The seed per region name ("" when there is no region column): one entry per group.
    seeds: HashMap<String, Vec<Option<Seed>>>,
    regional: bool,
}

/// Per district, per dimension, per category: the count and its row.
type Counts = Vec<Vec<Vec<Option<(f64, usize)>>>>;

struct Margins {
    dimensions: Vec<Dimension>,
    districts: Vec<String>,
    /// Per district, per dimension, per category: (count, row).
    counts: Counts,
    /// Per district, the first row that names it.
    first_row: Vec<usize>,
}

fn finish<T>(c: Collector, value: Option<T>) -> Result<T, DatasetError> {
    let mut e = DatasetError::default();
    match value {
        Some(v) if c.is_empty() => Ok(v),
        _ => {
            c.drain_into(&mut e);
            Err(e)
        }
    }
}

fn headers(text: &str, c: &mut Collector) -> Option<Vec<String>> {
    let mut reader = csv::ReaderBuilder::new().from_reader(text.as_bytes());
    match reader.headers() {
        Ok(h) => Some(h.iter().map(|s| s.trim().to_string()).collect()),
        Err(e) => {
            c.push(
                Location::Row(1),
                None,
                format!("cannot read the header: {e}"),
            );
            None
        }
    }
}

/// Records after the header with their 1-based row numbers; unreadable rows reported.
fn records(text: &str, c: &mut Collector) -> Vec<(usize, csv::StringRecord)> {
    let mut reader = csv::ReaderBuilder::new().from_reader(text.as_bytes());
    let mut out = Vec::new();
    for (i, rec) in reader.records().enumerate() {
        match rec {
            Ok(r) => out.push((i + 2, r)),
            Err(e) => c.push(
                Location::Row(i + 2),
                None,
                match e.kind() {
                    csv::ErrorKind::UnequalLengths {
                        expected_len, len, ..
                    } => format!("cannot read this row: expected {expected_len} fields like the header, found {len}"),
                    _ => format!("cannot read this row: {e}"),
                },
            ),
        }
    }
    out
}

fn get(rec: &csv::StringRecord, col: usize) -> &str {
    rec.get(col).unwrap_or("").trim()
}

fn id_field(
    rec: &csv::StringRecord,
    col: usize,
    name: &str,
    row: usize,
    c: &mut Collector,
) -> Option<String> {
    let v = get(rec, col);
    if is_valid_id(v) {
        Some(v.to_string())
    } else {
        c.push(
            Location::Row(row),
            Some(name),
            format!("expected an id of 1 to 32 characters from a-z 0-9 _ -, found {v:?}"),
        );
        None
    }
}

fn number(
    rec: &csv::StringRecord,
    col: usize,
    name: &str,
    row: usize,
    (lo, hi, what): (f64, f64, &str),
    c: &mut Collector,
) -> Option<f64> {
    match parse_number(get(rec, col)) {
        Ok(v) if v >= lo && v <= hi => Some(v),
        Ok(v) => {
            c.push(
                Location::Row(row),
                Some(name),
                format!("expected {what}, found {v}"),
            );
            None
        }
        Err(e) => {
            c.push(Location::Row(row), Some(name), format!("{e} ({what})"));
            None
        }
    }
}

/// Column positions of `required` names in a header; missing and duplicate ones reported.
fn positions(header: &[String], required: &[&str], c: &mut Collector) -> Option<Vec<usize>> {
    let mut ok = true;
    for (i, h) in header.iter().enumerate() {
        if header[..i].contains(h) {
            c.push(Location::Row(1), Some(h), "this column appears twice");
            ok = false;
        }
    }
    let mut out = Vec::new();
    for r in required {
        match header.iter().position(|h| h == r) {
            Some(p) => out.push(p),
            None => {
                c.push(Location::Row(1), Some(r), "this column is missing");
                ok = false;
            }
        }
    }
    ok.then_some(out)
}

fn read_margins(input: Input) -> Result<Margins, DatasetError> {
    let mut c = Collector::new(input.name);
    let Some(header) = headers(input.text, &mut c) else {
        return finish(c, None);
    };
    let fixed = ["district", "dimension", "category", "count"];
    let cols = positions(&header, &fixed, &mut c);
    for h in &header {
        if !fixed.contains(&h.as_str()) {
            c.push(
                Location::Row(1),
                Some(h),
                "unknown column; expected district, dimension, category and count",
            );
        }
    }
    let Some(cols) = cols else {
        return finish(c, None);
    };
    let mut dimensions: Vec<Dimension> = Vec::new();
    let mut districts: Vec<String> = Vec::new();
    let mut first_row = Vec::new();
    let mut rows: Vec<(usize, usize, usize, usize, f64)> = Vec::new();
    for (row, rec) in records(input.text, &mut c) {
        let d = id_field(&rec, cols[0], "district", row, &mut c);
        let dim = id_field(&rec, cols[1], "dimension", row, &mut c);
        let cat = id_field(&rec, cols[2], "category", row, &mut c);
        let count = number(
            &rec,
            cols[3],
            "count",
            row,
            (0.0, f64::MAX, "a count of eligible people, at least 0"),
            &mut c,
        );
        if dim.as_deref() == Some("region") {
            c.push(
                Location::Row(row),
                Some("dimension"),
                "\"region\" names the column of regional seeds in the groups file; give the dimension another id",
            );
            continue;
        }
        let (Some(d), Some(dim), Some(cat), Some(count)) = (d, dim, cat, count) else {
            continue;
        };
        let di = match districts.iter().position(|x| *x == d) {
            Some(i) => i,
            None => {
                districts.push(d);
                first_row.push(row);
                districts.len() - 1
            }
        };
        let j = match dimensions.iter().position(|x| x.id == dim) {
            Some(j) => j,
            None => {
                dimensions.push(Dimension {
                    id: dim,
                    categories: vec![],
                });
                dimensions.len() - 1
            }
        };
        let k = match dimensions[j].categories.iter().position(|x| *x == cat) {
            Some(k) => k,
            None => {
                dimensions[j].categories.push(cat);
                dimensions[j].categories.len() - 1
            }
        };
        rows.push((row, di, j, k, count));
    }
    if rows.is_empty() && c.is_empty() {
        c.push(
            Location::File,
            None,
            "expected at least one row after the header",
        );
    }
    let mut counts: Counts = districts
        .iter()
        .map(|_| {
            dimensions
                .iter()
                .map(|dim| vec![None; dim.categories.len()])
                .collect()
        })
        .collect();
    for (row, d, j, k, count) in rows {
        let slot = &mut counts[d][j][k];
        if let Some((_, first)) = slot {
            c.push(
                Location::Row(row),
                Some("district+dimension+category"),
                format!(
                    "district {:?}, dimension {:?}, category {:?} was already given in row {first}",
                    districts[d], dimensions[j].id, dimensions[j].categories[k]
                ),
            );
        } else {
            *slot = Some((count, row));
        }
    }
    finish(
        c,
        Some(Margins {
            dimensions,
            districts,
            counts,
            first_row,
        }),
    )
}

fn read_groups(input: Input, dims: &[Dimension], c: &mut Collector) -> Option<Groups> {
    let header = headers(input.text, c)?;
    let mut required = vec!["group"];
    required.extend(dims.iter().map(|d| d.id.as_str()));
    required.extend(["eligible", "turnout"]);
    let cols = positions(&header, &required, c)?;
    let region_col = header.iter().position(|h| h == "region");
    let mut parties: Vec<String> = Vec::new();
    let mut party_cols: Vec<usize> = Vec::new();
    for (i, h) in header.iter().enumerate() {
        if required.contains(&h.as_str()) || h == "region" {
            continue;
        }
        if is_valid_id(h) && h != "all" {
            parties.push(h.clone());
            party_cols.push(i);
        } else {
            c.push(
                Location::Row(1),
                Some(h),
                "expected a party id (1 to 32 characters from a-z 0-9 _ -) or one of group, eligible, turnout, region and the dimensions of the margins",
            );
        }
    }
    if !(2..=12).contains(&parties.len()) {
        c.push(
            Location::Row(1),
            None,
            format!(
                "expected 2 to 12 party columns of vote shares after group, {}, eligible and turnout; found {} ({})",
                dims.iter().map(|d| d.id.as_str()).collect::<Vec<_>>().join(", "),
                parties.len(),
                parties.join(", ")
            ),
        );
        return None;
    }
    let mut groups: Vec<RakedGroup> = Vec::new();
    let mut group_rows: Vec<usize> = Vec::new();
    let mut seeds: HashMap<String, Vec<Option<Seed>>> = HashMap::new();
    let mut seed_rows: HashMap<(String, usize), usize> = HashMap::new();
    for (row, rec) in records(input.text, c) {
        let Some(id) = id_field(&rec, cols[0], "group", row, c) else {
            continue;
        };
        if id == "all" {
            c.push(
                Location::Row(row),
                Some("group"),
                "the id \"all\" is reserved for the shift that applies to every group",
            );
            continue;
        }
        let mut of = Vec::with_capacity(dims.len());
        for (j, dim) in dims.iter().enumerate() {
            let v = get(&rec, cols[1 + j]);
            match dim.categories.iter().position(|x| x == v) {
                Some(k) => of.push(k),
                None => c.push(
                    Location::Row(row),
                    Some(&dim.id),
                    format!(
                        "expected a category of dimension {:?} as the margins give them ({}), found {v:?}",
                        dim.id,
                        dim.categories.join(", ")
                    ),
                ),
            }
        }
        let n = dims.len();
        let eligible = number(
            &rec,
            cols[1 + n],
            "eligible",
            row,
            (0.0, f64::MAX, "a seed count of eligible people, at least 0"),
            c,
        );
        let turnout = number(
            &rec,
            cols[2 + n],
            "turnout",
            row,
            (0.0, 1.0, "a turnout rate in [0, 1]"),
            c,
        );
        let mut shares = Vec::with_capacity(parties.len());
        for (k, &col) in party_cols.iter().enumerate() {
            if let Some(v) = number(
                &rec,
                col,
                &parties[k],
                row,
                (0.0, 1.0, "a vote share in [0, 1]"),
                c,
            ) {
                shares.push(v);
            }
        }
        let region = match region_col {
            Some(col) => match id_field(&rec, col, "region", row, c) {
                Some(r) => r,
                None => continue,
            },
            None => String::new(),
        };
        if of.len() != n || shares.len() != parties.len() {
            continue;
        }
        let (Some(eligible), Some(turnout)) = (eligible, turnout) else {
            continue;
        };
        let sum: f64 = shares.iter().sum();
        if (sum - 1.0).abs() > crate::dataset::SHARE_SUM_TOLERANCE {
            c.push(
                Location::Row(row),
                Some(&parties.join("+")),
                format!(
                    "vote shares must sum to 1 within {}; they sum to {sum}",
                    crate::dataset::SHARE_SUM_TOLERANCE
                ),
            );
            continue;
        }
        let g = match groups.iter().position(|x| x.id == id) {
            Some(g) => {
                if groups[g].of != of {
                    c.push(
                        Location::Row(row),
                        Some("group"),
                        format!("group {id:?} has other categories in row {}", group_rows[g]),
                    );
                    continue;
                }
                g
            }
            None => {
                if let Some(other) = groups.iter().position(|x| x.of == of) {
                    c.push(
                        Location::Row(row),
                        Some("group"),
                        format!(
                            "group {id:?} has the same categories as group {:?} (row {}); each combination may appear once",
                            groups[other].id, group_rows[other]
                        ),
                    );
                    continue;
                }
                groups.push(RakedGroup { id: id.clone(), of });
                group_rows.push(row);
                groups.len() - 1
            }
        };
        if let Some(first) = seed_rows.insert((region.clone(), g), row) {
            c.push(
                Location::Row(row),
                Some(if region_col.is_some() {
                    "group+region"
                } else {
                    "group"
                }),
                format!("group {id:?} was already given in row {first}"),
            );
            continue;
        }
        let list = seeds.entry(region).or_default();
        if list.len() <= g {
            list.resize(g + 1, None);
        }
        list[g] = Some(Seed {
            eligible,
            turnout,
            shares,
        });
    }
    if groups.is_empty() && c.is_empty() {
        c.push(
            Location::File,
            None,
            "expected at least one group after the header",
        );
    }
    if groups.len() > 64 {
        c.push(
            Location::File,
            Some("group"),
            format!("expected 1 to 64 groups, found {}", groups.len()),
        );
    }
    for list in seeds.values_mut() {
        list.resize(groups.len(), None);
    }
    Some(Groups {
        parties,
        groups,
        seeds,
        regional: region_col.is_some(),
    })
}

/// Party votes per district of `results.csv`, in the order of `districts`.
fn read_results(
    input: Input,
    districts: &[String],
    parties: &[String],
    c: &mut Collector,
) -> Option<Vec<f64>> {
    let header = headers(input.text, c)?;
    let mut required = vec!["district", "votes_cast"];
    required.extend(parties.iter().map(String::as_str));
    for h in &header {
        if !required.contains(&h.as_str()) {
            c.push(
                Location::Row(1),
                Some(h),
                format!("unknown column; expected district, votes_cast and the parties of the groups file ({})", parties.join(", ")),
            );
        }
    }
    let cols = positions(&header, &required, c)?;
    let nk = parties.len();
    let mut votes = vec![f64::NAN; districts.len() * nk];
    let mut seen: HashMap<usize, usize> = HashMap::new();
    for (row, rec) in records(input.text, c) {
        let id = get(&rec, cols[0]);
        let Some(d) = districts.iter().position(|x| x == id) else {
            c.push(
                Location::Row(row),
                Some("district"),
                format!("no district {id:?} in the margins"),
            );
            continue;
        };
        if let Some(first) = seen.insert(d, row) {
            c.push(
                Location::Row(row),
                Some("district"),
                format!("district {id:?} was already given in row {first}"),
            );
            continue;
        }
        let cast = number(
            &rec,
            cols[1],
            "votes_cast",
            row,
            (0.0, f64::MAX, "a number of votes, at least 0"),
            c,
        );
        let mut v = Vec::with_capacity(nk);
        for (k, p) in parties.iter().enumerate() {
            if let Some(x) = number(
                &rec,
                cols[2 + k],
                p,
                row,
                (0.0, f64::MAX, "a number of votes, at least 0"),
                c,
            ) {
                v.push(x);
            }
        }
        let (Some(cast), true) = (cast, v.len() == nk) else {
            continue;
        };
        let sum: f64 = v.iter().sum();
        if sum <= 0.0 {
            c.push(
                Location::Row(row),
                Some("votes_cast"),
                format!("district {id:?} has no votes for any party; expected at least one vote"),
            );
            continue;
        }
        if (cast - sum).abs() > CAST_TOLERANCE * cast.max(sum) {
            c.push(
                Location::Row(row),
                Some("votes_cast"),
                format!(
                    "district {id:?}: votes_cast is {cast} but the parties' votes add up to {sum}; they must agree within 0.1 % (leave invalid ballots out, and give every party on the ballot a column)"
                ),
            );
            continue;
        }
        votes[d * nk..(d + 1) * nk].copy_from_slice(&v);
    }
    for (d, id) in districts.iter().enumerate() {
        if !seen.contains_key(&d) {
            c.push(
                Location::File,
                Some("district"),
                format!("district {id:?} has margins but no row of results"),
            );
        }
    }
    Some(votes)
}

/// The logistic function and its inverse, on a rate in (0, 1).
fn logit(p: f64) -> f64 {
    (p / (1.0 - p)).ln()
}
fn logistic(x: f64) -> f64 {
    1.0 / (1.0 + (-x).exp())
}

/// Turnout rate of a group after a logit shift: 0 and 1 stay as they are.
pub fn shifted_rate(tau: f64, shift: f64) -> f64 {
    if tau <= 0.0 || tau >= 1.0 {
        tau
    } else {
        logistic(logit(tau) + shift)
    }
}

/// The logit shift δ with Σ_g n_g · shifted_rate(τ_g, δ) = target, by bisection (the sum
/// rises with δ). `None` when the target lies outside what any shift reaches.
pub fn turnout_shift(n: &[f64], tau: &[f64], target: f64) -> Option<f64> {
    let voters = |delta: f64| -> f64 {
        n.iter()
            .zip(tau)
            .map(|(n, t)| n * shifted_rate(*t, delta))
            .sum()
    };
    let fixed: f64 = n
        .iter()
        .zip(tau)
        .filter(|(_, t)| **t >= 1.0)
        .map(|(n, _)| n)
        .sum();
    let reach: f64 = n
        .iter()
        .zip(tau)
        .filter(|(_, t)| **t > 0.0)
        .map(|(n, _)| n)
        .sum();
    let movable = n
        .iter()
        .zip(tau)
        .any(|(n, t)| *n > 0.0 && *t > 0.0 && *t < 1.0);
    let slack = 1e-12 * target.max(1.0);
    if !movable {
        return ((voters(0.0) - target).abs() <= slack).then_some(0.0);
    }
    if target <= fixed || target >= reach {
        return None;
    }
    let (mut lo, mut hi) = (-1.0f64, 1.0f64);
    while voters(lo) > target {
        lo *= 2.0;
        if lo < -1e3 {
            return None;
        }
    }
    while voters(hi) < target {
        hi *= 2.0;
        if hi > 1e3 {
            return None;
        }
    }
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        if voters(mid) < target {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let (vl, vh) = (voters(lo), voters(hi));
    Some(if (target - vl).abs() <= (vh - target).abs() {
        lo
    } else {
        hi
    })
}

/// Build the electorate. Every problem of every file is collected; nothing panics.
pub fn rake(inputs: &Inputs) -> Result<Raked, DatasetError> {
    let margins = read_margins(inputs.margins)?;
    let mut error = DatasetError::default();
    let mut gc = Collector::new(inputs.groups.name);
    let groups = read_groups(inputs.groups, &margins.dimensions, &mut gc);
    let groups = finish(gc, groups);
    let groups = groups?;

    // The districts' order and regions: the map's when given, else the margins'.
    let mut order: Vec<usize> = (0..margins.districts.len()).collect();
    let mut regions: Vec<String> = vec![String::new(); margins.districts.len()];
    match inputs.districts {
        Some(input) => match crate::dataset::parse_districts(
            input.name,
            input.text,
            (crate::dataset::SeatRule::Winner, 0.0),
        ) {
            Ok(list) => {
                let mut dc = Collector::new(input.name);
                order = map_order(&list, &margins, inputs.margins.name, &mut dc);
                for (d, id) in margins.districts.iter().enumerate() {
                    if let Some(r) = list
                        .iter()
                        .find(|x| x.id == *id)
                        .and_then(|x| x.region.clone())
                    {
                        // Only regional seeds look at the region.
                        if groups.regional {
                            regions[d] = r;
                        }
                    }
                }
                dc.drain_into(&mut error);
            }
            Err(c) => c.drain_into(&mut error),
        },
        None if groups.regional => {
            let mut c = Collector::new(inputs.groups.name);
            c.push(
                Location::Row(1),
                Some("region"),
                "regional seeds need the districts' GeoJSON (with a region property per district) to know each district's region",
            );
            c.drain_into(&mut error);
        }
        None => {}
    }
    if !error.is_empty() {
        return Err(error);
    }

    // Every district's region needs a seed for every group with margins to fill.
    let mut mc = Collector::new(inputs.margins.name);
    if groups.regional {
        let mut dc = Collector::new(inputs.districts.map_or("", |i| i.name));
        for (d, id) in margins.districts.iter().enumerate() {
            if !groups.seeds.contains_key(&regions[d]) {
                dc.push(
                    Location::File,
                    Some("region"),
                    format!(
                        "district {id:?} is in region {:?}, which has no rows in {}",
                        regions[d], inputs.groups.name
                    ),
                );
            }
        }
        dc.drain_into(&mut error);
        if !error.is_empty() {
            return Err(error);
        }
    }

    let parties = groups.parties.clone();
    let results = match inputs.results {
        Some(input) => {
            let mut rc = Collector::new(input.name);
            let r = read_results(input, &margins.districts, &parties, &mut rc);
            match finish(rc, r) {
                Ok(v) => Some(v),
                Err(e) => return Err(e),
            }
        }
        None => None,
    };

    let (ng, nk) = (groups.groups.len(), parties.len());
    let mut raked = Raked {
        dimensions: margins.dimensions.clone(),
        groups: groups.groups.clone(),
        parties: parties.clone(),
        districts: Vec::with_capacity(order.len()),
        eligible: Vec::with_capacity(order.len() * ng),
        turnout: Vec::with_capacity(order.len() * ng),
        shares: Vec::with_capacity(order.len() * ng * nk),
        results: results
            .as_ref()
            .map(|_| Vec::with_capacity(order.len() * nk)),
        reports: Vec::with_capacity(order.len()),
    };
    let mut stuck: Vec<String> = Vec::new();
    let dims: Vec<Vec<usize>> = (0..margins.dimensions.len())
        .map(|j| groups.groups.iter().map(|g| g.of[j]).collect())
        .collect();
    let dim_refs: Vec<&[usize]> = dims.iter().map(Vec::as_slice).collect();
    let mut rc = inputs.results.map(|i| Collector::new(i.name));
    for &d in &order {
        let id = &margins.districts[d];
        // Every region has seeds (checked above); a missing one is a district with none.
        let Some(seed_list) = groups.seeds.get(&regions[d]) else {
            continue;
        };
        let Some(targets) = district_margins(&margins, d, &mut mc) else {
            continue;
        };
        let totals: Vec<f64> = targets.iter().map(|t| t.iter().sum()).collect();
        let (lo, hi) = totals.iter().fold((f64::INFINITY, 0.0f64), |(lo, hi), &t| {
            (lo.min(t), hi.max(t))
        });
        if hi <= 0.0 {
            mc.push(
                Location::Row(margins.first_row[d]),
                Some("count"),
                format!("district {id:?} has no eligible people in any category; every district needs some"),
            );
            continue;
        }
        if hi - lo > TOTALS_TOLERANCE * hi {
            let parts: Vec<String> = margins
                .dimensions
                .iter()
                .zip(&totals)
                .map(|(dim, t)| format!("{} adds to {}", dim.id, fmt_number(*t)))
                .collect();
            mc.push(
                Location::Row(margins.first_row[d]),
                Some("count"),
                format!(
                    "district {id:?}: its dimensions' totals disagree by {:.3} % ({}); they must agree within 0.1 %",
                    (hi - lo) / hi * 100.0,
                    parts.join(", ")
                ),
            );
            continue;
        }
        // Bring every dimension to the mean of the totals.
        let total = totals.iter().sum::<f64>() / totals.len() as f64;
        let mut adjusted = 0.0f64;
        let targets: Vec<Vec<f64>> = targets
            .iter()
            .zip(&totals)
            .map(|(t, &sum)| {
                adjusted = adjusted.max((total / sum - 1.0).abs());
                t.iter().map(|x| x * total / sum).collect()
            })
            .collect();
        let seed: Vec<f64> = seed_list
            .iter()
            .map(|s| s.as_ref().map_or(0.0, |s| s.eligible))
            .collect();
        // A category with people but no group of it with a seed cannot be filled.
        let mut feasible = true;
        for (j, dim) in margins.dimensions.iter().enumerate() {
            for (k, cat) in dim.categories.iter().enumerate() {
                let seeded = (0..ng).any(|g| dims[j][g] == k && seed[g] > 0.0);
                if targets[j][k] > 0.0 && !seeded {
                    let row = margins.counts[d][j][k].map_or(margins.first_row[d], |x| x.1);
                    mc.push(
                        Location::Row(row),
                        Some("count"),
                        format!(
                            "district {id:?}: {} people in dimension {:?}, category {cat:?}, but no group of that category has a seed count above 0{}",
                            fmt_number(targets[j][k]),
                            dim.id,
                            if groups.regional { format!(" in region {:?}", regions[d]) } else { String::new() }
                        ),
                    );
                    feasible = false;
                }
            }
        }
        if !feasible {
            continue;
        }
        let target_refs: Vec<&[f64]> = targets.iter().map(Vec::as_slice).collect();
        let f = ipf::fit(
            &seed,
            &dim_refs,
            &target_refs,
            TOLERANCE * total,
            MAX_ITERATIONS,
        );
        if !f.converged {
            stuck.push(format!("{id} (largest error {:.3} people)", f.max_error));
            continue;
        }
        let mut report = DistrictReport {
            district: id.clone(),
            total,
            totals_adjusted: adjusted,
            iterations: f.iterations,
            max_error: f.max_error,
            calibration: None,
        };
        let base_tau: Vec<f64> = seed_list
            .iter()
            .map(|s| s.as_ref().map_or(0.0, |s| s.turnout))
            .collect();
        let base_shares: Vec<f64> = seed_list
            .iter()
            .flat_map(|s| match s {
                Some(s) => s.shares.clone(),
                None => vec![1.0 / nk as f64; nk],
            })
            .collect();
        let (tau, shares) = match &results {
            None => (base_tau, base_shares),
            Some(votes) => {
                let r = &votes[d * nk..(d + 1) * nk];
                let c = rc.as_mut().expect("results were read");
                match calibrate(id, &parties, &f.cells, &base_tau, &base_shares, r, c) {
                    Some((tau, shares, cal)) => {
                        report.calibration = Some(cal);
                        (tau, shares)
                    }
                    None => continue,
                }
            }
        };
        raked.districts.push(id.clone());
        raked.eligible.extend(&f.cells);
        raked.turnout.extend(tau);
        raked.shares.extend(shares);
        if let (Some(out), Some(votes)) = (raked.results.as_mut(), &results) {
            out.extend(&votes[d * nk..(d + 1) * nk]);
        }
        raked.reports.push(report);
    }
    if !stuck.is_empty() {
        mc.push(
            Location::File,
            None,
            format!(
                "the fit did not come within {TOLERANCE:e} of the total in {MAX_ITERATIONS} iterations in {} district(s): {}; their margins and the groups' zero seeds cannot all hold",
                stuck.len(),
                stuck.join(", ")
            ),
        );
    }
    mc.drain_into(&mut error);
    if let Some(c) = rc {
        c.drain_into(&mut error);
    }
    if error.is_empty() {
        Ok(raked)
    } else {
        Err(error)
    }
}

/// The map's district order; districts missing on either side are reported.
fn map_order(
    list: &[District],
    margins: &Margins,
    margins_name: &str,
    c: &mut Collector,
) -> Vec<usize> {
    let mut order = Vec::with_capacity(list.len());
    for (i, d) in list.iter().enumerate() {
        match margins.districts.iter().position(|x| *x == d.id) {
            Some(p) => order.push(p),
            None => c.push(
                Location::Feature(i),
                Some("id"),
                format!("district {:?} has no rows in {margins_name}", d.id),
            ),
        }
    }
    for id in &margins.districts {
        if !list.iter().any(|d| d.id == *id) {
            c.push(
                Location::File,
                Some("id"),
                format!("{margins_name} has district {id:?}, which is not in this map"),
            );
        }
    }
    order
}

/// District `d`'s targets per dimension and category; a missing row is a problem.
fn district_margins(m: &Margins, d: usize, c: &mut Collector) -> Option<Vec<Vec<f64>>> {
    let mut ok = true;
    let mut out = Vec::with_capacity(m.dimensions.len());
    for (j, dim) in m.dimensions.iter().enumerate() {
        let mut t = Vec::with_capacity(dim.categories.len());
        for (k, cat) in dim.categories.iter().enumerate() {
            match m.counts[d][j][k] {
                Some((v, _)) => t.push(v),
                None => {
                    c.push(
                        Location::File,
                        Some("category"),
                        format!(
                            "district {:?} has no row for dimension {:?}, category {cat:?}; give every category of every dimension (0 if nobody)",
                            m.districts[d], dim.id
                        ),
                    );
                    ok = false;
                }
            }
        }
        out.push(t);
    }
    ok.then_some(out)
}

/// Turnout and shares of one district calibrated to its party votes `r`: one logit shift
/// of every group's turnout so that the voters add up to the votes, then the group ×
/// party vote table raked to the groups' voters (rows) and the parties' votes (columns,
/// matched last, so exactly).
fn calibrate(
    id: &str,
    parties: &[String],
    n: &[f64],
    tau: &[f64],
    shares: &[f64],
    r: &[f64],
    c: &mut Collector,
) -> Option<(Vec<f64>, Vec<f64>, Calibration)> {
    let (ng, nk) = (n.len(), r.len());
    let cast: f64 = r.iter().sum();
    let eligible: f64 = n.iter().sum();
    let Some(shift) = turnout_shift(n, tau, cast) else {
        c.push(
            Location::File,
            Some("votes_cast"),
            format!(
                "district {id:?}: {} votes cannot come from its {} eligible people with the groups' turnout (a turnout of {:.2} %; groups at turnout 0 or 1 stay there)",
                fmt_number(cast),
                fmt_number(eligible),
                cast / eligible * 100.0
            ),
        );
        return None;
    };
    let new_tau: Vec<f64> = tau.iter().map(|t| shifted_rate(*t, shift)).collect();
    let voters: Vec<f64> = n.iter().zip(&new_tau).map(|(n, t)| n * t).collect();
    // The table's seed: each group's voters split by its baseline shares.
    let mut seed = Vec::with_capacity(ng * nk);
    for g in 0..ng {
        for k in 0..nk {
            seed.push(voters[g] * shares[g * nk + k]);
        }
    }
    for (k, &votes) in r.iter().enumerate() {
        if votes > 0.0 && (0..ng).all(|g| seed[g * nk + k] <= 0.0) {
            c.push(
                Location::File,
                Some(&parties[k]),
                format!(
                    "district {id:?}: party {:?} has {} votes but no share in any group with voters; give it a share above 0 in some group",
                    parties[k],
                    fmt_number(votes)
                ),
            );
            return None;
        }
    }
    let rows: Vec<usize> = (0..ng * nk).map(|i| i / nk).collect();
    let cols: Vec<usize> = (0..ng * nk).map(|i| i % nk).collect();
    // The rows' targets: the voters, brought to the votes' total (the shift matched it to
    // rounding).
    let sum_voters: f64 = voters.iter().sum();
    let row_targets: Vec<f64> = voters.iter().map(|v| v * cast / sum_voters).collect();
    let f = ipf::fit(
        &seed,
        &[&rows, &cols],
        &[&row_targets, r],
        VOTES_TOLERANCE * cast,
        MAX_ITERATIONS,
    );
    if !f.converged {
        c.push(
            Location::File,
            None,
            format!(
                "district {id:?}: the group × party votes did not fit within {VOTES_TOLERANCE:e} of the votes in {MAX_ITERATIONS} iterations (largest error {:.3} votes); the groups' zero shares rule out these results",
                f.max_error
            ),
        );
        return None;
    }
    let mut out = Vec::with_capacity(ng * nk);
    for g in 0..ng {
        let row = &f.cells[g * nk..(g + 1) * nk];
        let v: f64 = row.iter().sum();
        if v > 0.0 && voters[g] > 0.0 {
            // Shares of the group's voters: its row of the table over the voters that
            // the turnout gives it, so that N·τ·π is the table's cell and the parties'
            // votes add up to the results.
            out.extend(row.iter().map(|x| x / voters[g]));
        } else {
            out.extend_from_slice(&shares[g * nk..(g + 1) * nk]);
        }
    }
    Some((
        new_tau,
        out,
        Calibration {
            turnout_shift: shift,
            iterations: f.iterations,
            max_error: f.max_error,
        },
    ))
}

impl Raked {
    /// The electorate as `electorate.csv`: one row per district and group (also those
    /// with nobody eligible), numbers in shortest round-trip form.
    pub fn electorate_csv(&self) -> String {
        let mut w = csv::Writer::from_writer(Vec::new());
        let mut header = vec!["district", "group", "eligible", "turnout"];
        header.extend(self.parties.iter().map(String::as_str));
        let _ = w.write_record(&header);
        let (ng, nk) = (self.groups.len(), self.parties.len());
        for (d, did) in self.districts.iter().enumerate() {
            for (g, group) in self.groups.iter().enumerate() {
                let c = d * ng + g;
                let mut rec = vec![
                    did.clone(),
                    group.id.clone(),
                    fmt_number(self.eligible[c]),
                    fmt_number(self.turnout[c]),
                ];
                rec.extend(
                    self.shares[c * nk..(c + 1) * nk]
                        .iter()
                        .map(|v| fmt_number(*v)),
                );
                let _ = w.write_record(&rec);
            }
        }
        String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
    }

    /// A manifest for the raked electorate, to edit: names default to ids, colours come
    /// from [`PALETTE`], the groups carry their categories (`of`) and the dimensions are
    /// listed. `districts` and `electorate` are the file names it points to.
    pub fn manifest(&self, districts: &str, electorate: &str) -> String {
        let parties: Vec<_> = self
            .parties
            .iter()
            .enumerate()
            .map(|(k, p)| json!({"id": p, "name": p, "color": PALETTE[k % PALETTE.len()]}))
            .collect();
        let groups: Vec<_> = self
            .groups
            .iter()
            .map(|g| {
                let of: serde_json::Map<String, serde_json::Value> = self
                    .dimensions
                    .iter()
                    .zip(&g.of)
                    .map(|(dim, &k)| (dim.id.clone(), json!(dim.categories[k])))
                    .collect();
                json!({"id": g.id, "name": g.id, "of": of})
            })
            .collect();
        let dimensions: Vec<_> = self
            .dimensions
            .iter()
            .map(|d| {
                let cats: Vec<_> = d
                    .categories
                    .iter()
                    .map(|c| json!({"id": c, "name": c}))
                    .collect();
                json!({"id": d.id, "name": d.id, "categories": cats})
            })
            .collect();
        let m = json!({
            "title": "Raked dataset (edit this title)",
            "source": "Electorate raked by stratamap from per-district margins and a groups table (edit this line to name the sources)",
            "parties": parties,
            "groups": groups,
            "dimensions": dimensions,
            "districts": districts,
            "electorate": electorate,
        });
        serde_json::to_string_pretty(&m).unwrap_or_default() + "\n"
    }

    /// Load the raked electorate as a dataset, through the same loader as any dataset
    /// (the text of [`Raked::electorate_csv`] and of [`Raked::manifest`]), with the
    /// districts' GeoJSON when given, else a row of unit squares standing in for a map.
    pub fn dataset(&self, districts: Option<&str>) -> Result<Dataset, DatasetError> {
        let squares;
        let geojson = match districts {
            Some(text) => text,
            None => {
                let features: Vec<_> = self
                    .districts
                    .iter()
                    .enumerate()
                    .map(|(i, id)| {
                        let x = i as f64;
                        json!({"type": "Feature", "properties": {"id": id, "name": id},
                               "geometry": {"type": "Polygon", "coordinates":
                                   [[[x, 0.0], [x + 1.0, 0.0], [x + 1.0, 1.0], [x, 1.0], [x, 0.0]]]}})
                    })
                    .collect();
                squares = json!({"type": "FeatureCollection", "features": features}).to_string();
                &squares
            }
        };
        let electorate = self.electorate_csv();
        Dataset::from_sources(&Sources {
            manifest: &self.manifest("districts.geojson", "electorate.csv"),
            districts: geojson,
            electorate: &electorate,
            poll: None,
        })
    }

    /// The largest difference, in votes, between the tally of the raked electorate at
    /// the baseline and the results it was calibrated to (`None` without results).
    /// The tally is the project's own ([`crate::model::tally`]) on the dataset that
    /// [`Raked::dataset`] loads, so this checks what the page and the command line will show.
    pub fn check_with_tally(&self, districts: Option<&str>) -> Result<Option<f64>, DatasetError> {
        let Some(results) = &self.results else {
            return Ok(None);
        };
        let ds = self.dataset(districts)?;
        let t = crate::model::tally::tally(&ds, &crate::model::tally::Shifts::zero(&ds));
        let nk = self.parties.len();
        let mut worst: f64 = 0.0;
        for (d, district) in ds.districts.iter().enumerate() {
            let Some(r) = self.districts.iter().position(|x| *x == district.id) else {
                continue;
            };
            for (k, v) in t.district_votes(d).iter().enumerate() {
                worst = worst.max((v - results[r * nk + k]).abs());
            }
        }
        Ok(Some(worst))
    }

    /// The report: one line per district (iterations, largest remaining margin error and,
    /// with results, the turnout shift and the share fit), then a summary line.
    pub fn report(&self) -> Vec<String> {
        let mut out = Vec::with_capacity(self.reports.len() + 1);
        let mut worst: f64 = 0.0;
        for r in &self.reports {
            worst = worst.max(r.max_error / r.total);
            let mut line = format!(
                "{}: {} eligible, {} iteration{}, largest margin error {:.2e} people",
                r.district,
                fmt_number(r.total),
                r.iterations,
                if r.iterations == 1 { "" } else { "s" },
                r.max_error
            );
            if r.totals_adjusted > 0.0 {
                line += &format!(
                    " (dimension totals brought together by up to {:.4} %)",
                    r.totals_adjusted * 100.0
                );
            }
            if let Some(c) = &r.calibration {
                line += &format!(
                    "; turnout shifted by {:+.4} on the logit scale, shares fitted in {} iterations, largest error {:.2e} votes",
                    c.turnout_shift,
                    c.iterations,
                    c.max_error
                );
            }
            out.push(line);
        }
        out.push(format!(
            "{} districts × {} groups raked; largest margin error {:.3e} of a district's total (tolerance {TOLERANCE:e})",
            self.reports.len(),
            self.groups.len(),
            worst
        ));
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn logit_shift_hits_the_target() {
        let n = [100.0, 200.0, 50.0];
        let tau = [0.3, 0.6, 1.0];
        let s = turnout_shift(&n, &tau, 250.0).unwrap();
        let v: f64 = n
            .iter()
            .zip(&tau)
            .map(|(n, t)| n * shifted_rate(*t, s))
            .sum();
        assert!((v - 250.0).abs() < 1e-9, "{v}");
        // The group at 1 stays at 1; 50 voters are fixed, 350 the most.
        assert_eq!(shifted_rate(1.0, s), 1.0);
        assert!(turnout_shift(&n, &tau, 40.0).is_none());
        assert!(turnout_shift(&n, &tau, 350.0).is_none());
        // With no shift needed the shift is 0.
        let base: f64 = 30.0 + 120.0 + 50.0;
        assert!(turnout_shift(&n, &tau, base).unwrap().abs() < 1e-12);
    }
}
