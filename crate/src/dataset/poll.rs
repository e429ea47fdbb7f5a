//! The optional poll CSV (SPEC 1.4): per group, a nationwide estimate of vote shares.

use super::table::{self, field};
use super::Poll;
use crate::error::{shown, Collector, Location};

/// Largest design effect accepted (a larger one almost certainly is a typo).
const MAX_DESIGN_EFFECT: f64 = 100.0;

pub(crate) fn parse(
    file: &str,
    text: &str,
    groups: &[&str],
    parties: &[&str],
) -> Result<Poll, Collector> {
    let mut c = Collector::new(file);
    let (ng, nk) = (groups.len(), parties.len());
    let mut poll = Poll {
        sample_size: vec![0.0; ng],
        design_effect: vec![1.0; ng],
        shares: vec![0.0; ng * nk],
    };
    let mut seen: Vec<Option<usize>> = vec![None; ng];
    table::read(
        text,
        &mut c,
        &["group", "sample_size"],
        &["design_effect"],
        parties,
        |row, rec, cols, c| {
            let gid = field(rec, cols.fixed[0].unwrap_or(usize::MAX));
            let g = groups.iter().position(|x| *x == gid);
            if g.is_none() {
                c.push(
                    Location::Row(row),
                    Some("group"),
                    format!("no group with id {} in the manifest", shown(gid)),
                );
            }
            let n = table::number_in(
                rec,
                cols.fixed[1].unwrap_or(usize::MAX),
                "sample_size",
                row,
                (1.0, 1e9, "a whole number of respondents, at least 1"),
                c,
            );
            let n = match n {
                Some(v) if v.fract() != 0.0 => {
                    c.push(
                        Location::Row(row),
                        Some("sample_size"),
                        format!("expected a whole number of respondents, found {v}"),
                    );
                    None
                }
                other => other,
            };
            let deff = match cols.fixed[2] {
                Some(col) if !field(rec, col).is_empty() => table::number_in(
                    rec,
                    col,
                    "design_effect",
                    row,
                    (1.0, MAX_DESIGN_EFFECT, "a design effect of at least 1"),
                    c,
                ),
                _ => Some(1.0),
            };
            let shares = table::shares(rec, cols, parties, row, c);
            let Some(g) = g else { return };
            if let Some(first) = seen[g] {
                c.push(
                    Location::Row(row),
                    Some("group"),
                    format!("group {} was already given in row {first}", shown(gid)),
                );
                return;
            }
            seen[g] = Some(row);
            if let (Some(n), Some(d), Some(s)) = (n, deff, shares) {
                poll.sample_size[g] = n;
                poll.design_effect[g] = d;
                poll.shares[g * nk..(g + 1) * nk].copy_from_slice(&s);
            }
        },
    );
    if c.is_empty() {
        for (g, id) in groups.iter().enumerate() {
            if seen[g].is_none() {
                c.push(
                    Location::File,
                    Some("group"),
                    format!(
                        "no row for group {}: the poll needs an estimate for every group",
                        shown(id)
                    ),
                );
            }
        }
    }
    if c.is_empty() {
        Ok(poll)
    } else {
        Err(c)
    }
}

#[cfg(test)]
mod tests {
    use super::parse;

    #[test]
    fn reads_poll_with_and_without_design_effect() {
        let p = parse(
            "p.csv",
            "group,sample_size,a,b,design_effect\ng,400,0.5,0.5,1.5\nh,100,0.3,0.7,\n",
            &["g", "h"],
            &["a", "b"],
        )
        .ok()
        .unwrap();
        assert_eq!(p.sample_size, vec![400.0, 100.0]);
        assert_eq!(p.design_effect, vec![1.5, 1.0]);
        assert_eq!(p.shares, vec![0.5, 0.5, 0.3, 0.7]);
    }

    #[test]
    fn rejects_bad_rows() {
        let Err(c) = parse(
            "p.csv",
            "group,sample_size,a,b,design_effect\ng,40.5,0.5,0.5,0.9\n",
            &["g", "h"],
            &["a", "b"],
        ) else {
            panic!("accepted")
        };
        let mut e = crate::error::DatasetError::default();
        c.drain_into(&mut e);
        let l = e.lines();
        assert!(
            l.iter()
                .any(|s| s.starts_with("p.csv row 2, field sample_size")),
            "{l:?}"
        );
        assert!(
            l.iter()
                .any(|s| s.starts_with("p.csv row 2, field design_effect")),
            "{l:?}"
        );
    }
}
