//! The command line on good and broken datasets and scenarios (SPEC 4).

use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use stratamap::testdata;

fn dir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("stratamap-cli-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// Write the tiny dataset, with `edit` applied to (file name, text).
fn write_dataset(name: &str, edit: impl Fn(&str, String) -> String) -> PathBuf {
    let d = dir(name);
    for (f, text) in [
        ("dataset.json", testdata::MANIFEST),
        ("districts.geojson", testdata::DISTRICTS),
        ("electorate.csv", testdata::ELECTORATE),
        ("poll.csv", testdata::POLL),
    ] {
        std::fs::write(d.join(f), edit(f, text.to_string())).unwrap();
    }
    d
}

fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_stratamap"))
        .args(args)
        .output()
        .unwrap()
}

fn s(p: &Path) -> &str {
    p.to_str().unwrap()
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

#[test]
fn check_prints_a_summary() {
    let d = write_dataset("ok", |_, t| t);
    let o = run(&["check", s(&d)]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = String::from_utf8(o.stdout).unwrap();
    assert!(out.contains("Tiny test land — valid"));
    assert!(out.contains("districts: 3 in 2 regions, 4 seats, majority 3"));
    assert!(out.contains("poll: 1000 respondents in 2 groups"));
    // The manifest's own path works too.
    let o = run(&["check", s(&d.join("dataset.json"))]);
    assert_eq!(o.status.code(), Some(0));
}

#[test]
fn tally_prints_the_hand_worked_rows() {
    let d = write_dataset("tally", |_, t| t);
    let o = run(&[
        "tally",
        s(&d),
        "--scenario",
        "start=baseline&margin=young:10",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = String::from_utf8(o.stdout).unwrap();
    let lines: Vec<&str> = out.lines().collect();
    assert_eq!(
        lines[0],
        "district,name,seats,winner,margin,turnout,votes_a,votes_b,votes_c"
    );
    // x: a 565, b 605 (worked in tally.rs): b by 40/1300 points.
    let x: Vec<&str> = lines[1].split(',').collect();
    assert_eq!(&x[..4], &["x", "Xe", "1", "b"]);
    assert!((x[4].parse::<f64>().unwrap() - 4000.0 / 1300.0).abs() < 1e-12);
    assert_eq!(x[6].parse::<f64>().unwrap(), 565.0);
    // The "+" of a sign may arrive as a space, and "?" may lead.
    let o2 = run(&[
        "tally",
        s(&d),
        "--scenario",
        "?start=baseline&margin=young:+10",
    ]);
    assert_eq!(o2.stdout, out.as_bytes());
    // The caution, source and clamp counts go to standard error (2 cells each, as
    // worked in tally.rs).
    let o3 = run(&[
        "tally",
        s(&d),
        "--scenario",
        "start=baseline&margin=old:-100&turnout=all:15",
    ]);
    let err = stderr(&o3);
    assert!(err.contains("not a forecast") && err.contains("source: Hand-made test data"));
    assert!(
        err.contains("turnout clamp to [0, 1] bit in 2 cells"),
        "{err}"
    );
    assert!(
        err.contains("limited to the share there in 2 cells"),
        "{err}"
    );
}

#[test]
fn render_writes_an_svg_with_caution_and_source() {
    let d = write_dataset("render", |_, t| t);
    let f = d.join("map.svg");
    let o = run(&["render", s(&d), "--scenario", "margin=all:1", "-o", s(&f)]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let svg = std::fs::read_to_string(&f).unwrap();
    assert!(svg.starts_with("<svg"));
    assert!(svg.contains("A scenario, not a forecast"));
    assert!(svg.contains("Hand-made test data"));
    assert!(svg.contains("Every group: Alder's lead over Birch 1 point higher"));
}

#[test]
fn broken_files_name_file_row_and_field() {
    let cases: [(&str, &str, &str, &str); 4] = [
        (
            "electorate.csv",
            "x,old,1000,0.8,",
            "x,old,1000,1.8,",
            "electorate.csv row 3, field turnout",
        ),
        (
            "poll.csv",
            "old,600",
            "old,6x0",
            "poll.csv row 3, field sample_size",
        ),
        (
            "districts.geojson",
            "\"seats\": 2",
            "\"seats\": -2",
            "districts.geojson feature 1, field seats",
        ),
        (
            "dataset.json",
            "#7a4d8c",
            "purple",
            "dataset.json, field parties[2].color",
        ),
    ];
    for (i, (file, from, to, want)) in cases.iter().enumerate() {
        let d = write_dataset(&format!("broken{i}"), |f, t| {
            if f == *file {
                t.replacen(from, to, 1)
            } else {
                t
            }
        });
        for args in [vec!["check", s(&d)], vec!["tally", s(&d)]] {
            let o = run(&args);
            assert_eq!(o.status.code(), Some(1), "{file}");
            assert!(stderr(&o).contains(want), "{file}: {}", stderr(&o));
        }
    }
    let o = run(&["check", "/nonexistent/stratamap"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("dataset.json: cannot read"));
}

#[test]
fn bad_scenarios_are_refused_naming_the_key() {
    let d = write_dataset("scen", |_, t| t);
    for (q, want) in [
        ("turnout=young:101", "turnout:"),
        ("margin=ghosts:2", "unknown group \"ghosts\""),
        ("seed=1.5", "seed:"),
        ("runs=1e3", "runs:"),
        ("colour=teal", "colour: unknown key"),
        ("data=other.json", "data:"),
    ] {
        let o = run(&["tally", s(&d), "--scenario", q]);
        assert_eq!(o.status.code(), Some(1), "{q}");
        assert!(stderr(&o).contains(want), "{q}: {}", stderr(&o));
        assert!(o.stdout.is_empty());
    }
}

#[test]
fn usage_errors_exit_2() {
    assert_eq!(run(&[]).status.code(), Some(2));
    assert_eq!(run(&["tally"]).status.code(), Some(2));
    assert_eq!(run(&["frobnicate", "x"]).status.code(), Some(2));
    assert_eq!(run(&["--help"]).status.code(), Some(0));
}

#[test]
fn simulate_prints_json_reproducibly() {
    let d = write_dataset("sim", |_, t| t);
    let q = "runs=300&seed=5&district_sd=2";
    let a = run(&["simulate", s(&d), "--scenario", q]);
    assert_eq!(a.status.code(), Some(0), "{}", stderr(&a));
    let b = run(&["simulate", s(&d), "--scenario", q]);
    assert_eq!(a.stdout, b.stdout);
    let v: serde_json::Value = serde_json::from_slice(&a.stdout).unwrap();
    assert_eq!(v["runs"], 300);
    assert_eq!(v["seed"], 5);
    assert_eq!(v["parties"][0]["id"], "a");
    assert_eq!(v["block_size"], 250);
    assert_eq!(v["scenario"], "runs=300&seed=5&district_sd=2");
    let won = &v["districts"][2]["runs_won"];
    let n: u64 = ["a", "b", "c", "tie"]
        .iter()
        .map(|k| won[k].as_u64().unwrap())
        .sum();
    assert_eq!(n, 300);
    let majorities: u64 = (0..3)
        .map(|k| v["parties"][k]["majority_runs"].as_u64().unwrap())
        .sum();
    assert_eq!(majorities + v["no_majority_runs"].as_u64().unwrap(), 300);
    let h = &v["parties"][0]["seats"]["histogram"];
    let counted: u64 = h["counts"]
        .as_array()
        .unwrap()
        .iter()
        .map(|c| c.as_u64().unwrap())
        .sum();
    assert_eq!(counted, 300);
    assert_eq!(v["source"], "Hand-made test data");
    assert!(v["caution"].as_str().unwrap().contains("not a forecast"));
    // runs=0 means no simulation (SPEC 3): tests/safety.rs checks what it prints.
    let o = run(&["simulate", s(&d), "--scenario", "runs=0"]);
    assert_eq!(o.status.code(), Some(0));
}

#[test]
fn what_it_takes_as_csv_matches_the_hand_worked_values() {
    // Worked by hand in the core's analysis/reach.rs: starting from the baseline, young
    // voters' lead moving 18 points toward Alder (or their turnout rising 30 points)
    // overturns Birch's 90-vote lead in Xe, giving Alder 3 of 4 seats.
    let d = write_dataset("reach", |_, t| t);
    let o = run(&[
        "tally",
        s(&d),
        "--scenario",
        "start=baseline",
        "--what-it-takes",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = String::from_utf8(o.stdout).unwrap();
    let mut r = csv::Reader::from_reader(out.as_bytes());
    assert_eq!(
        r.headers().unwrap().iter().collect::<Vec<_>>(),
        [
            "group",
            "party",
            "outcome",
            "turnout_change",
            "turnout_value",
            "margin_change",
            "margin_value",
            "sentence"
        ]
    );
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    let row = |g: &str, p: &str| {
        rows.iter()
            .find(|x| &x[0] == g && &x[1] == p)
            .unwrap_or_else(|| panic!("{g} {p}: {out}"))
            .clone()
    };
    let young_a = row("young", "a");
    assert_eq!(&young_a[2], "wins_majority");
    assert_eq!((&young_a[3], &young_a[5]), ("30", "18"));
    let old_b = row("old", "b");
    assert_eq!((&old_b[3], &old_b[5]), ("", "-7.78"));
    assert!(old_b[7].contains("no turnout change in this group alone"));
    // Every group at once: the seats–votes curve's swing to majority, 90/13 points.
    let all_a = row("all", "a");
    let v: f64 = all_a[5].parse().unwrap();
    assert!((v - 90.0 / 13.0).abs() <= 0.01, "{v}");
}

#[test]
fn metadata_describes_the_csv_with_caution_and_scenario() {
    let d = write_dataset("csvw", |_, t| t);
    let meta = d.join("t.csv-metadata.json");
    let o = run(&[
        "tally",
        s(&d),
        "--scenario",
        "turnout=young:4",
        "--metadata",
        s(&meta),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let csv = String::from_utf8(o.stdout).unwrap();
    let m: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&meta).unwrap()).unwrap();
    // W3C "Metadata Vocabulary for Tabular Data" (2015): a table description names its
    // CSV in `url` and lists its columns, in order, in `tableSchema.columns`.
    assert_eq!(m["@context"][0], "http://www.w3.org/ns/csvw");
    assert_eq!(m["url"], "t.csv");
    let names: Vec<&str> = m["tableSchema"]["columns"]
        .as_array()
        .unwrap()
        .iter()
        .map(|c| c["name"].as_str().unwrap())
        .collect();
    assert_eq!(names.join(","), csv.lines().next().unwrap());
    assert_eq!(m["rdfs:comment"], stratamap::CAUTION);
    assert_eq!(m["dc:source"], "Hand-made test data");
    assert_eq!(m["prov:wasGeneratedBy"]["rdf:value"], "turnout=young:4");
    assert!(m["dc:description"]
        .as_str()
        .unwrap()
        .contains("Young: turnout 4 points higher."));
}

#[test]
fn scenario_prints_json_and_render_writes_words() {
    let d = write_dataset("words", |_, t| t);
    let o = run(&["scenario", s(&d), "--scenario", "margin=old:-3"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["margin"]["groups"]["old"], -3.0);
    assert_eq!(v["title"], "Tiny test land");
    let svg = d.join("m.svg");
    let o = run(&[
        "render",
        s(&d),
        "--scenario",
        "margin=old:-3",
        "-o",
        s(&svg),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(
        text.contains("Old: Alder's lead over Birch 3 points lower"),
        "{text}"
    );
    assert!(
        !text.contains("margin=old"),
        "the raw string is not the words"
    );
    assert!(text.contains("a majority is 3"));
}

#[test]
fn help_explains_dataset_for_every_command() {
    for cmd in ["check", "tally", "simulate", "render", "scenario"] {
        let o = run(&[cmd, "--help"]);
        let out = String::from_utf8(o.stdout).unwrap();
        assert!(out.contains("folder holding dataset.json"), "{cmd}: {out}");
    }
}
