//! The electorate CSV (SPEC 1.3): one row per (district, group).

use super::table::{self, field};
use super::Cells;
use crate::error::{shown, Collector, Location};
use std::collections::HashMap;

/// Most eligible people a dataset may hold in all: 10^15, well below 2^53 (about
/// 9.007 × 10^15), so sums of votes stay finite and keep a precision far finer than one
/// voter, however the groups are cut. (The world has under 10^10 people.)
pub const MAX_TOTAL_ELIGIBLE: f64 = 1e15;
const MAX_TOTAL_ELIGIBLE_TEXT: &str = "1,000,000,000,000,000";

pub(crate) fn parse(
    file: &str,
    text: &str,
    districts: &[&str],
    groups: &[&str],
    parties: &[&str],
) -> Result<Cells, Collector> {
    let mut c = Collector::new(file);
    let (nd, ng, nk) = (districts.len(), groups.len(), parties.len());
    let mut cells = Cells {
        eligible: vec![0.0; nd * ng],
        turnout: vec![0.0; nd * ng],
        shares: vec![0.0; nd * ng * nk],
    };
    // A missing pair means 0 eligible; its shares stay an even split so they still sum to 1.
    for s in cells.shares.chunks_mut(nk.max(1)) {
        s.fill(1.0 / nk as f64);
    }
    let d_index: HashMap<&str, usize> =
        districts.iter().enumerate().map(|(i, d)| (*d, i)).collect();
    let g_index: HashMap<&str, usize> = groups.iter().enumerate().map(|(i, g)| (*g, i)).collect();
    let mut seen: HashMap<usize, usize> = HashMap::new();
    let mut rows = 0usize;
    let mut total = 0.0f64;
    let mut too_many = false;
    table::read(
        text,
        &mut c,
        &["district", "group", "eligible", "turnout"],
        &[],
        parties,
        |row, rec, cols, c| {
            rows += 1;
            let f = |i: usize| cols.fixed[i].unwrap_or(usize::MAX);
            let did = field(rec, f(0));
            let gid = field(rec, f(1));
            let d = d_index.get(did).copied();
            if d.is_none() {
                c.push(
                    Location::Row(row),
                    Some("district"),
                    format!("no district with id {} in the districts file", shown(did)),
                );
            }
            let g = g_index.get(gid).copied();
            if g.is_none() {
                c.push(
                    Location::Row(row),
                    Some("group"),
                    format!("no group with id {} in the manifest", shown(gid)),
                );
            }
            let eligible = table::number_in(
                rec,
                f(2),
                "eligible",
                row,
                (0.0, f64::MAX, "a count of eligible people, at least 0"),
                c,
            );
            let turnout = table::number_in(
                rec,
                f(3),
                "turnout",
                row,
                (0.0, 1.0, "a turnout rate in [0, 1]"),
                c,
            );
            let shares = table::shares(rec, cols, parties, row, c);
            let (Some(d), Some(g)) = (d, g) else { return };
            let cell = d * ng + g;
            if let Some(first) = seen.insert(cell, row) {
                c.push(
                    Location::Row(row),
                    Some("district+group"),
                    format!(
                        "district {} and group {} were already given in row {first}",
                        shown(did),
                        shown(gid)
                    ),
                );
                return;
            }
            if let (Some(e), Some(t), Some(s)) = (eligible, turnout, shares) {
                total += e;
                if total > MAX_TOTAL_ELIGIBLE && !too_many {
                    too_many = true;
                    c.push(
                        Location::Row(row),
                        Some("eligible"),
                        format!(
                            "the eligible counts add up to more than {} by this row; \
                             a dataset may hold at most that many people, so that every \
                             sum of votes stays finite and exact to a fraction of a voter",
                            MAX_TOTAL_ELIGIBLE_TEXT
                        ),
                    );
                }
                cells.eligible[cell] = e;
                cells.turnout[cell] = t;
                cells.shares[cell * nk..(cell + 1) * nk].copy_from_slice(&s);
            }
        },
    );
    if rows == 0 && c.is_empty() {
        c.push(
            Location::File,
            None,
            "expected at least one row after the header",
        );
    }
    if c.is_empty() {
        for (d, id) in districts.iter().enumerate() {
            if cells.eligible[d * ng..(d + 1) * ng]
                .iter()
                .all(|&e| e <= 0.0)
            {
                c.push(
                    Location::File,
                    Some("eligible"),
                    format!("district {} has no row with eligible > 0", shown(id)),
                );
            }
        }
    }
    if c.is_empty() {
        Ok(cells)
    } else {
        Err(c)
    }
}

#[cfg(test)]
mod tests {
    use super::parse;

    fn lines(text: &str) -> Vec<String> {
        match parse("e.csv", text, &["x", "y"], &["g", "h"], &["a", "b"]) {
            Ok(_) => vec![],
            Err(c) => {
                let mut e = crate::error::DatasetError::default();
                c.drain_into(&mut e);
                e.lines()
            }
        }
    }

    #[test]
    fn fills_flat_arrays() {
        let cells = parse(
            "e.csv",
            "district,group,eligible,turnout,b,a\nx,g,100,0.5,0.25,0.75\ny,h,10,1,1,0\n",
            &["x", "y"],
            &["g", "h"],
            &["a", "b"],
        )
        .ok()
        .unwrap();
        assert_eq!(cells.eligible, vec![100.0, 0.0, 0.0, 10.0]);
        assert_eq!(cells.turnout, vec![0.5, 0.0, 0.0, 1.0]);
        // Columns in any order are mapped to manifest order (a, b).
        assert_eq!(&cells.shares[0..2], &[0.75, 0.25]);
        assert_eq!(&cells.shares[6..8], &[0.0, 1.0]);
    }

    #[test]
    fn names_row_and_field() {
        let l = lines(
            "district,group,eligible,turnout,a,b\n\
             x,g,100,1.2,0.5,0.5\n\
             z,g,100,0.5,0.5,0.5\n\
             y,g,-1,0.5,0.5,0.5\n\
             y,h,10,0.5,0.6,0.5\n\
             x,g,100,0.5,0.5,0.5\n\
             y,h,1,0.5\n",
        );
        let want = [
            "e.csv row 2, field turnout: expected a turnout rate in [0, 1], found 1.2",
            "e.csv row 3, field district: no district with id \"z\" in the districts file",
            "e.csv row 4, field eligible: expected a count of eligible people, at least 0, found -1",
            "e.csv row 5, field a+b: vote shares must sum to 1 within 0.005; they sum to 1.1",
            "e.csv row 6, field district+group: district \"x\" and group \"g\" were already given in row 2",
            "e.csv row 7: cannot read this row: expected 6 fields like the header, found 4",
        ];
        for w in want {
            assert!(l.iter().any(|s| s == w), "missing {w:?} in {l:?}");
        }
    }

    #[test]
    fn header_problems() {
        let l = lines("district,group,eligible,turnout,a,c\n");
        assert!(l
            .iter()
            .any(|s| s.starts_with("e.csv row 1, field c: unknown column")));
        assert!(l
            .iter()
            .any(|s| s.starts_with("e.csv row 1, field b: every party")));
    }

    #[test]
    fn every_district_needs_voters() {
        let l =
            lines("district,group,eligible,turnout,a,b\nx,g,5,0.5,0.5,0.5\ny,g,0,0.5,0.5,0.5\n");
        assert_eq!(
            l,
            vec!["e.csv, field eligible: district \"y\" has no row with eligible > 0"]
        );
    }
}
