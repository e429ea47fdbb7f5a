//! The demo's raking inputs (`maps-demo/raking/`): what an analyst would have instead of
//! the electorate's cells. Per district, the eligible counted by age band and by degree
//! separately; the ten groups nationwide (eligible, turnout and shares); and the
//! baseline's votes per district as "last election's results", from the core's tally.
//! `stratamap rake` turns them back into an electorate (the README's worked example).

use crate::model::{Dataset, SHARE_UNITS};
use std::fs;
use std::path::Path;

/// Folder under the dataset's folder.
pub const FOLDER: &str = "raking";

/// The age band and schooling category of a demo group id (`a18_29_deg`, `a18_29_nodeg`).
fn categories(group: &str) -> (&str, &str) {
    match group.rsplit_once('_') {
        Some((age, "deg")) => (age, "degree"),
        Some((age, _)) => (age, "no_degree"),
        None => (group, "no_degree"),
    }
}

fn rate(units: u32) -> f64 {
    f64::from(units) / f64::from(SHARE_UNITS)
}

/// A decimal with 4 places, trailing zeros dropped.
fn four(v: f64) -> String {
    let s = format!("{v:.4}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s.is_empty() || s == "-0" {
        "0".into()
    } else {
        s.to_string()
    }
}

pub fn margins_csv(ds: &Dataset) -> String {
    let mut out = String::from("district,dimension,category,count\n");
    for (d, district) in ds.districts.iter().enumerate() {
        let mut ages: Vec<(&str, u64)> = Vec::new();
        let mut school: Vec<(&str, u64)> = vec![("degree", 0), ("no_degree", 0)];
        for r in ds.rows.iter().filter(|r| r.district == d) {
            let (age, sch) = categories(&ds.groups[r.group].id);
            match ages.iter_mut().find(|(a, _)| *a == age) {
                Some((_, n)) => *n += r.eligible,
                None => ages.push((age, r.eligible)),
            }
            if let Some((_, n)) = school.iter_mut().find(|(s, _)| *s == sch) {
                *n += r.eligible;
            }
        }
        for (dim, list) in [("age", &ages), ("school", &school)] {
            for (cat, n) in list.iter() {
                out += &format!("{},{dim},{cat},{n}\n", district.id);
            }
        }
    }
    out
}

pub fn groups_csv(ds: &Dataset) -> String {
    let mut out = String::from("group,age,school,eligible,turnout");
    for p in &ds.parties {
        out += &format!(",{}", p.id);
    }
    out.push('\n');
    let k_count = ds.parties.len();
    for (g, group) in ds.groups.iter().enumerate() {
        let (mut n, mut voters) = (0.0, 0.0);
        let mut votes = vec![0.0; k_count];
        for r in ds.rows.iter().filter(|r| r.group == g) {
            let e = r.eligible as f64;
            let v = e * rate(r.turnout);
            n += e;
            voters += v;
            for (k, s) in r.shares.iter().enumerate() {
                votes[k] += v * rate(*s);
            }
        }
        // Shares to 4 decimals; the last party takes what rounding left, so they sum to 1.
        let mut shares: Vec<f64> = votes
            .iter()
            .map(|v| (v / voters * 1e4).round() / 1e4)
            .collect();
        let rest: f64 = shares[..k_count - 1].iter().sum();
        shares[k_count - 1] = ((1.0 - rest) * 1e4).round() / 1e4;
        let (age, school) = categories(&group.id);
        out += &format!("{},{age},{school},{n},{}", group.id, four(voters / n));
        for s in shares {
            out += &format!(",{}", four(s));
        }
        out.push('\n');
    }
    out
}

/// The baseline's votes per district, rounded to whole votes, from the core's tally.
pub fn results_csv(ds: &Dataset) -> Result<String, String> {
    let core = ds.core()?;
    let t = stratamap::model::tally::tally(&core, &stratamap::model::tally::Shifts::zero(&core));
    let mut out = String::from("district,votes_cast");
    for p in &ds.parties {
        out += &format!(",{}", p.id);
    }
    out.push('\n');
    for (d, district) in ds.districts.iter().enumerate() {
        let votes: Vec<u64> = t
            .district_votes(d)
            .iter()
            .map(|v| v.round() as u64)
            .collect();
        out += &format!("{},{}", district.id, votes.iter().sum::<u64>());
        for v in votes {
            out += &format!(",{v}");
        }
        out.push('\n');
    }
    Ok(out)
}

pub fn write_to(ds: &Dataset, dir: &Path) -> Result<(), String> {
    let dir = dir.join(FOLDER);
    fs::create_dir_all(&dir).map_err(|e| format!("creating {}: {e}", dir.display()))?;
    for (name, text) in [
        ("margins.csv", margins_csv(ds)),
        ("groups.csv", groups_csv(ds)),
        ("results.csv", results_csv(ds)?),
    ] {
        let p = dir.join(name);
        fs::write(&p, text).map_err(|e| format!("writing {}: {e}", p.display()))?;
    }
    Ok(())
}
