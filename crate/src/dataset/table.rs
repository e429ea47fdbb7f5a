//! What the two CSV files share: reading records with the `csv` crate, mapping the
//! header to columns, and reading checked numbers from fields.

use super::parse_number;
use crate::error::{Collector, Location};

/// Column positions found in a header.
pub(crate) struct Columns {
    /// Position of each named fixed column (None if optional and absent).
    pub fixed: Vec<Option<usize>>,
    /// Position of each party's column, in manifest order.
    pub parties: Vec<usize>,
}

/// Read a CSV text; calls `row` with the 1-based row number (header = 1) and record.
/// Records that the CSV reader rejects (unequal lengths, bad UTF-8) are reported.
pub(crate) fn read(
    text: &str,
    c: &mut Collector,
    required: &[&str],
    optional: &[&str],
    parties: &[&str],
    mut row: impl FnMut(usize, &csv::StringRecord, &Columns, &mut Collector),
) {
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(true)
        .flexible(false)
        .from_reader(super::without_bom(text).as_bytes());
    let headers = match reader.headers() {
        Ok(h) => h.clone(),
        Err(e) => {
            c.push(
                Location::Row(1),
                None,
                format!("cannot read the header: {e}"),
            );
            return;
        }
    };
    let Some(cols) = columns(&headers, c, required, optional, parties) else {
        return;
    };
    for (i, rec) in reader.records().enumerate() {
        let r = i + 2;
        match rec {
            Ok(rec) => row(r, &rec, &cols, c),
            Err(e) => c.push(
                Location::Row(r),
                None,
                format!("cannot read this row: {}", reason(&e)),
            ),
        }
    }
}

fn reason(e: &csv::Error) -> String {
    match e.kind() {
        csv::ErrorKind::UnequalLengths {
            expected_len, len, ..
        } => format!("expected {expected_len} fields like the header, found {len}"),
        _ => e.to_string(),
    }
}

fn columns(
    headers: &csv::StringRecord,
    c: &mut Collector,
    required: &[&str],
    optional: &[&str],
    parties: &[&str],
) -> Option<Columns> {
    let names: Vec<&str> = headers.iter().map(str::trim).collect();
    let mut ok = true;
    for (i, n) in names.iter().enumerate() {
        if names[..i].contains(n) {
            c.push(Location::Row(1), Some(n), "this column appears twice");
            ok = false;
        } else if !required.contains(n) && !optional.contains(n) && !parties.contains(n) {
            c.push(
                Location::Row(1),
                Some(n),
                format!(
                    "unknown column; expected {}, a party id ({}){}",
                    required.join(", "),
                    parties.join(", "),
                    if optional.is_empty() {
                        String::new()
                    } else {
                        format!(" or {}", optional.join(", "))
                    }
                ),
            );
            ok = false;
        }
    }
    let find = |n: &str| names.iter().position(|h| *h == n);
    let mut fixed = Vec::new();
    for n in required {
        let p = find(n);
        if p.is_none() {
            c.push(Location::Row(1), Some(n), "this column is missing");
            ok = false;
        }
        fixed.push(p);
    }
    for n in optional {
        fixed.push(find(n));
    }
    let mut party_cols = Vec::new();
    for p in parties {
        match find(p) {
            Some(i) => party_cols.push(i),
            None => {
                c.push(
                    Location::Row(1),
                    Some(p),
                    "every party needs a column of vote shares; this one is missing",
                );
                ok = false;
            }
        }
    }
    ok.then_some(Columns {
        fixed,
        parties: party_cols,
    })
}

/// The field at `col`, trimmed.
pub(crate) fn field(rec: &csv::StringRecord, col: usize) -> &str {
    rec.get(col).unwrap_or("").trim()
}

/// An allowed range and how to say it: (low, high, "what was expected").
pub(crate) type Bounds<'a> = (f64, f64, &'a str);

/// A number in `[lo, hi]` from a field, or a problem naming row and column.
pub(crate) fn number_in(
    rec: &csv::StringRecord,
    col: usize,
    name: &str,
    row: usize,
    (lo, hi, what): Bounds,
    c: &mut Collector,
) -> Option<f64> {
    match parse_number(field(rec, col)) {
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

/// Read the party share columns of a row and check that they sum to 1 within 0.005.
pub(crate) fn shares(
    rec: &csv::StringRecord,
    cols: &Columns,
    party_ids: &[&str],
    row: usize,
    c: &mut Collector,
) -> Option<Vec<f64>> {
    let mut out = Vec::with_capacity(party_ids.len());
    let mut ok = true;
    for (k, &col) in cols.parties.iter().enumerate() {
        match number_in(
            rec,
            col,
            party_ids[k],
            row,
            (0.0, 1.0, "a vote share in [0, 1]"),
            c,
        ) {
            Some(v) => out.push(v),
            None => ok = false,
        }
    }
    if !ok {
        return None;
    }
    let sum: f64 = out.iter().sum();
    if (sum - 1.0).abs() > SHARE_SUM_TOLERANCE {
        c.push(
            Location::Row(row),
            Some(&party_ids.join("+")),
            format!(
                "vote shares must sum to 1 within {SHARE_SUM_TOLERANCE}; they sum to {}",
                super::number::round_text(sum, 4)
            ),
        );
        return None;
    }
    Some(out)
}

/// How far a row's shares may sum from 1 (SPEC 1.3).
pub const SHARE_SUM_TOLERANCE: f64 = 0.005;
