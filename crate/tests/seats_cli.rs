//! The command line on a dataset whose districts share their seats proportionally
//! (tests/fixtures/proportional, an invented country).

use std::path::PathBuf;
use std::process::{Command, Output};

fn fixture() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/fixtures/proportional")
}

fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_stratamap"))
        .args(args)
        .output()
        .unwrap()
}

fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// A copy of the fixture with `edit` applied to (file name, text).
fn edited(name: &str, edit: impl Fn(&str, String) -> String) -> PathBuf {
    let d = std::env::temp_dir().join(format!("stratamap-seats-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    for f in ["dataset.json", "districts.geojson", "electorate.csv"] {
        let text = std::fs::read_to_string(fixture().join(f)).unwrap();
        std::fs::write(d.join(f), edit(f, text)).unwrap();
    }
    d
}

#[test]
fn check_lists_the_seat_rules() {
    let o = run(&["check", fixture().to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    assert!(out.contains("districts: 4 in 2 regions, 32 seats, majority 17"));
    assert!(
        out.contains(
            "seat rules: winner takes all in 1 district, D'Hondt in 1 district (threshold 5%), \
             Sainte-Laguë in 1 district (threshold 4%), largest remainders (Hare quota) in 1 \
             district (threshold 5%)"
        ),
        "{out}"
    );
}

/// Every district worked by hand from the electorate (N · τ · π per cell):
///
/// - Tidewater, 7 seats, D'Hondt (the manifest's), threshold 5% of 10,000 = 500: Moss
///   (440) is out. Quotients Heron 3800, 1900, 1266.7; Saltworks 3400, 1700; Lantern
///   2360, 1180: the seven highest give 3, 2, 2.
/// - Brackenfell, 20 seats, Sainte-Laguë, threshold 4% of 6,000 = 240: Moss has exactly
///   240 and stays in. Quotients (divisors 1, 3, 5, …): Lantern 2160 … 2160/13 = 166.2,
///   Heron 2100 … 2100/13 = 161.5 (the 20th), Saltworks 1500 … 1500/9 = 166.7, Moss
///   240: 7, 7, 5, 1; the 21st would be Lantern's 2160/15 = 144.
/// - Cairnholt, 4 seats, largest remainders, Hare quota 5000/4 = 1250: 1.28, 1.12,
///   1.2, 0.4: one each, the last seat to Moss's remainder 0.4.
/// - Lowmere, 1 seat, winner: Saltworks 1806 to Heron's 1785.
#[test]
fn tally_adds_seats_columns_worked_by_hand() {
    let o = run(&["tally", fixture().to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    let lines: Vec<&str> = out.lines().collect();
    assert_eq!(
        lines[0],
        "district,name,seats,winner,margin,turnout,votes_her,votes_salt,votes_lan,votes_moss,\
         seats_her,seats_salt,seats_lan,seats_moss"
    );
    let seats = |line: &str| -> Vec<u32> {
        line.rsplit(',')
            .take(4)
            .map(|v| v.parse().unwrap())
            .collect::<Vec<_>>()
            .into_iter()
            .rev()
            .collect()
    };
    assert!(lines[1].starts_with("tidewater,Tidewater,7,her,4,"));
    assert_eq!(seats(lines[1]), vec![3, 2, 2, 0]);
    assert!(lines[2].starts_with("brackenfell,Brackenfell,20,lan,1,60,2100,1500,2160,240,"));
    assert_eq!(seats(lines[2]), vec![7, 5, 7, 1]);
    assert_eq!(seats(lines[3]), vec![1, 1, 1, 1]);
    assert!(lines[4].starts_with("lowmere,Lowmere,1,salt,0.5,70,"));
    assert_eq!(seats(lines[4]), vec![0, 1, 0, 0]);
    assert_eq!(lines.len(), 5);
    assert!(stderr(&o).contains("A scenario, not a forecast"));
}

/// A higher threshold in Brackenfell leaves Moss out: its seat goes to Lantern's 144.
#[test]
fn threshold_from_the_district_property() {
    let d = edited("threshold", |f, t| {
        if f == "districts.geojson" {
            t.replace("\"threshold\": 4", "\"threshold\": 4.5")
        } else {
            t
        }
    });
    let o = run(&["tally", d.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    let row = out.lines().nth(2).unwrap();
    assert!(row.ends_with(",7,5,8,0"), "{row}");
}

#[test]
fn bad_seat_rules_are_refused_with_file_feature_and_field() {
    let d = edited("bad", |f, t| match f {
        "districts.geojson" => t.replace("\"seat_rule\": \"hare\"", "\"seat_rule\": \"droop\""),
        "dataset.json" => t.replace("\"threshold\": 5", "\"threshold\": 75"),
        _ => t,
    });
    let o = run(&["check", d.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    let err = stderr(&o);
    assert!(
        err.contains("dataset.json, field threshold: expected a percentage of the district's votes from 0 to 50, found 75"),
        "{err}"
    );
    // The manifest is read first: the districts are checked once it is valid.
    let d = edited("bad2", |f, t| match f {
        "districts.geojson" => t.replace("\"seat_rule\": \"hare\"", "\"seat_rule\": \"droop\""),
        _ => t,
    });
    let o = run(&["check", d.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    let err = stderr(&o);
    assert!(
        err.contains(r#"districts.geojson feature 2, field seat_rule: expected "winner", "dhondt", "sainte_lague" or "hare", found "droop""#),
        "{err}"
    );
}

/// The simulation counts seats under the same rules and reports no tipping point.
#[test]
fn simulate_uses_the_seat_rules() {
    let o = run(&[
        "simulate",
        fixture().to_str().unwrap(),
        "--scenario",
        "runs=200&seed=3",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    for d in v["districts"].as_array().unwrap() {
        let tipping = d
            .get("tipping_runs")
            .or_else(|| d.get("tipping_point_probability"))
            .and_then(|x| x.as_f64())
            .unwrap();
        assert_eq!(tipping, 0.0, "{d}");
    }
    // Every run shares all 32 seats: the mean seats add up to 32 (Moss takes one seat
    // in some runs, and Lantern or Heron in others).
    let total: f64 = v["parties"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| p["seats"]["mean"].as_f64().unwrap())
        .sum();
    assert!((total - 32.0).abs() < 1e-9, "{total}");
}
