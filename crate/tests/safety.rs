//! The command line on input meant to trip it: file names that leave the dataset's
//! folder, control characters and escape sequences, very long values, counts that would
//! overflow a sum. Each is refused with a message that names where the problem is, is
//! safe to print on a terminal and stays short.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use stratamap::testdata;

/// A fresh folder holding `parent/data/` (the dataset) and `parent/secret.txt` beside it.
fn layout(name: &str) -> (PathBuf, PathBuf) {
    let parent =
        std::env::temp_dir().join(format!("stratamap-safety-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&parent);
    let data = parent.join("data");
    std::fs::create_dir_all(&data).unwrap();
    std::fs::write(
        parent.join("secret.txt"),
        "district,group,eligible,turnout,a,b,c\nTOP-SECRET-LINE,young,1,0.5,0.5,0.5,0\n",
    )
    .unwrap();
    for (f, text) in [
        ("dataset.json", testdata::MANIFEST),
        ("districts.geojson", testdata::DISTRICTS),
        ("electorate.csv", testdata::ELECTORATE),
        ("poll.csv", testdata::POLL),
    ] {
        std::fs::write(data.join(f), text).unwrap();
    }
    (parent, data)
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

/// Bytes that would act on a terminal: every control character but the line feed.
fn acting_bytes(text: &str) -> Vec<char> {
    text.chars()
        .filter(|c| c.is_control() && *c != '\n')
        .collect()
}

#[test]
fn file_names_outside_the_folder_are_refused_without_reading_them() {
    let (parent, data) = layout("outside");
    let secret = parent.join("secret.txt");
    let manifest = |electorate: &str| {
        testdata::MANIFEST.replace(
            "\"electorate\": \"electorate.csv\"",
            &format!("\"electorate\": {}", serde_json::json!(electorate)),
        )
    };
    for name in [
        "../secret.txt".to_string(),
        "sub/../../secret.txt".to_string(),
        s(&secret).to_string(),
        "C:/secret.txt".to_string(),
        "file:///etc/hostname".to_string(),
        "%2e%2e/secret.txt".to_string(),
        "./electorate.csv".to_string(),
        "a//electorate.csv".to_string(),
    ] {
        std::fs::write(data.join("dataset.json"), manifest(&name)).unwrap();
        for cmd in ["check", "tally"] {
            let o = run(&[cmd, s(&data)]);
            let err = stderr(&o);
            assert_eq!(o.status.code(), Some(1), "{name}: {err}");
            assert!(
                err.contains("dataset.json, field electorate:"),
                "{name}: {err}"
            );
            assert!(err.contains("expected"), "{name}: {err}");
            assert!(
                !err.contains("TOP-SECRET"),
                "{name}: the file's content leaked: {err}"
            );
        }
    }
    // The message says why, in words a reader can act on.
    std::fs::write(data.join("dataset.json"), manifest("../secret.txt")).unwrap();
    let err = stderr(&run(&["check", s(&data)]));
    assert!(err.contains("\"..\" would leave it"), "{err}");
    std::fs::write(data.join("dataset.json"), manifest(s(&secret))).unwrap();
    let err = stderr(&run(&["check", s(&data)]));
    assert!(err.contains("not an absolute path"), "{err}");
}

#[cfg(unix)]
#[test]
fn a_link_that_leads_out_of_the_folder_is_refused() {
    let (parent, data) = layout("link");
    std::fs::remove_file(data.join("electorate.csv")).unwrap();
    std::os::unix::fs::symlink(parent.join("secret.txt"), data.join("electorate.csv")).unwrap();
    let o = run(&["check", s(&data)]);
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(1), "{err}");
    assert!(
        err.contains("electorate.csv: is outside the dataset's folder"),
        "{err}"
    );
    assert!(!err.contains("TOP-SECRET"), "{err}");
    // A link that stays inside the folder is fine.
    std::fs::write(data.join("real.csv"), testdata::ELECTORATE).unwrap();
    std::fs::remove_file(data.join("electorate.csv")).unwrap();
    std::os::unix::fs::symlink(data.join("real.csv"), data.join("electorate.csv")).unwrap();
    let o = run(&["check", s(&data)]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

#[cfg(unix)]
#[test]
fn devices_and_oversized_files_are_not_read() {
    let (_parent, data) = layout("device");
    // A folder where a file should be.
    std::fs::remove_file(data.join("poll.csv")).unwrap();
    std::fs::create_dir(data.join("poll.csv")).unwrap();
    let err = stderr(&run(&["check", s(&data)]));
    assert!(
        err.contains("poll.csv: expected a file, found a folder"),
        "{err}"
    );
    // A sparse file just over the limit: refused from its size, without reading it.
    std::fs::remove_dir(data.join("poll.csv")).unwrap();
    let f = std::fs::File::create(data.join("poll.csv")).unwrap();
    f.set_len(stratamap::dataset::MAX_FILE_BYTES + 1).unwrap();
    let started = std::time::Instant::now();
    let err = stderr(&run(&["check", s(&data)]));
    assert!(
        err.contains(
            "poll.csv: is 104857601 bytes long; a dataset's files may be at most 104857600 bytes"
        ),
        "{err}"
    );
    assert!(started.elapsed().as_secs() < 20, "refused without reading");
}

#[test]
fn control_characters_in_a_scenario_are_escaped() {
    let (_parent, data) = layout("controls");
    for scenario in [
        "turnout=young:\u{1b}[2J\u{1b}[H",
        "margin=%00:1",
        "runs=\u{7}\u{8}\u{7f}",
        "\u{1b}]0;title\u{7}=1",
        "start=\u{202e}lloP",
        "margin=all:1\r\nseed=2",
    ] {
        let o = run(&["tally", s(&data), "--scenario", scenario]);
        let err = stderr(&o);
        assert_eq!(o.status.code(), Some(1), "{scenario:?}: {err}");
        assert!(err.contains("the scenario is refused"), "{err}");
        assert_eq!(
            acting_bytes(&err),
            Vec::<char>::new(),
            "{scenario:?} echoed raw: {err:?}"
        );
        assert!(
            err.contains("\\u{") || err.contains("\\r\\n"),
            "{scenario:?}: the escape is shown: {err}"
        );
    }
    // A percent-encoded escape is decoded first, then escaped all the same.
    let err = stderr(&run(&[
        "tally",
        s(&data),
        "--scenario",
        "turnout=young:%1B%5B2J",
    ]));
    assert!(err.contains(r#""young:\u{1b}[2J" is not allowed"#), "{err}");
}

#[test]
fn control_characters_in_files_are_escaped() {
    let (_parent, data) = layout("file-controls");
    let electorate = testdata::ELECTORATE.replace("x,old", "x\u{1b}[31m\u{0},old");
    std::fs::write(data.join("electorate.csv"), electorate).unwrap();
    let manifest = testdata::MANIFEST.replace("\"id\": \"a\"", "\"id\": \"a\\u001b[2J\"");
    let o = run(&["check", s(&data)]);
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        err.contains(
            r#"electorate.csv row 3, field district: no district with id "x\u{1b}[31m\u{0}""#
        ),
        "{err}"
    );
    assert_eq!(acting_bytes(&err), Vec::<char>::new(), "{err:?}");
    std::fs::write(data.join("dataset.json"), manifest).unwrap();
    let err = stderr(&run(&["check", s(&data)]));
    assert!(err.contains(r#"field parties[0].id: expected an id of 1 to 32 characters from a-z 0-9 _ -, found "a\u{1b}[2J""#), "{err}");
    assert_eq!(acting_bytes(&err), Vec::<char>::new(), "{err:?}");
    // A column name is a field: escaped too.
    let header = testdata::ELECTORATE.replacen("turnout", "turn\u{1b}[8mout", 1);
    std::fs::write(data.join("electorate.csv"), header).unwrap();
    std::fs::write(data.join("dataset.json"), testdata::MANIFEST).unwrap();
    let err = stderr(&run(&["check", s(&data)]));
    assert!(
        err.contains("field turn\\u{1b}[8mout: unknown column"),
        "{err}"
    );
    assert_eq!(acting_bytes(&err), Vec::<char>::new(), "{err:?}");
}

#[test]
fn long_values_are_cut_saying_so() {
    let (_parent, data) = layout("long");
    let scenario = format!("turnout=young:{}", "7".repeat(130_000));
    let o = run(&["tally", s(&data), "--scenario", &scenario]);
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(1));
    assert!(err.len() < 1_500, "the message is {} bytes", err.len());
    assert!(
        err.contains(
            "… (cut: 130006 characters in all) is not allowed; expected points from -100 to 100"
        ),
        "{err}"
    );
    let key = "k".repeat(10_000);
    let err = stderr(&run(&[
        "tally",
        s(&data),
        "--scenario",
        &format!("{key}=1"),
    ]));
    assert!(
        err.contains("… (cut: 10000 characters in all): unknown key"),
        "{err}"
    );
    assert!(err.len() < 1_500, "{}", err.len());

    // A 5 MB field in a CSV file.
    let huge = "9".repeat(5 << 20);
    let electorate = testdata::ELECTORATE.replace("x,old,1000", &format!("x,old,{huge}x"));
    std::fs::write(data.join("electorate.csv"), electorate).unwrap();
    let o = run(&["check", s(&data)]);
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        err.contains(
            "electorate.csv row 3, field eligible: expected a finite number, found \"9999"
        ),
        "{err}"
    );
    assert!(
        err.contains(&format!("(cut: {} characters in all)", (5 << 20) + 1)),
        "{err}"
    );
    assert!(err.len() < 1_500, "the message is {} bytes", err.len());
}

#[test]
fn eligible_counts_that_would_overflow_a_sum_are_refused() {
    let (_parent, data) = layout("overflow");
    // Each count is finite; their sum, and the votes, would not be.
    let electorate = testdata::ELECTORATE
        .replace("x,young,1000", "x,young,1.7e308")
        .replace("x,old,1000", "x,old,1.7e308");
    std::fs::write(data.join("electorate.csv"), electorate).unwrap();
    for cmd in ["check", "tally"] {
        let o = run(&[cmd, s(&data)]);
        let err = stderr(&o);
        assert_eq!(o.status.code(), Some(1), "{cmd}: {err}");
        assert!(err.contains("electorate.csv row 2, field eligible: the eligible counts add up to more than 1,000,000,000,000,000 by this row"), "{err}");
        assert!(o.stdout.is_empty());
    }
    // Just under the limit is a valid dataset whose tally is finite everywhere.
    let electorate = testdata::ELECTORATE.replace("x,young,1000", "x,young,999999999990000");
    std::fs::write(data.join("electorate.csv"), electorate).unwrap();
    let o = run(&["tally", s(&data)]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let csv = String::from_utf8(o.stdout).unwrap();
    for line in csv.lines().skip(1) {
        for field in line.split(',').skip(4) {
            let v: f64 = field.parse().unwrap();
            assert!(v.is_finite(), "{line}");
        }
    }
}

#[test]
fn byte_order_marks_are_read_past() {
    let (_parent, data) = layout("bom");
    let plain = run(&["tally", s(&data)]);
    for f in [
        "dataset.json",
        "districts.geojson",
        "electorate.csv",
        "poll.csv",
    ] {
        let text = std::fs::read_to_string(data.join(f)).unwrap();
        std::fs::write(data.join(f), format!("\u{feff}{text}")).unwrap();
    }
    let bom = run(&["tally", s(&data)]);
    assert_eq!(bom.status.code(), Some(0), "{}", stderr(&bom));
    assert_eq!(bom.stdout, plain.stdout);
}

#[test]
fn runs_0_means_no_simulation() {
    let (_parent, data) = layout("runs0");
    let o = run(&["simulate", s(&data), "--scenario", "runs=0"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["runs"], 0);
    assert_eq!(v["scenario"], "runs=0");
    assert_eq!(v["no_majority_runs"], 0);
    for p in v["parties"].as_array().unwrap() {
        assert_eq!(p["majority_runs"], 0);
        assert!(p["seats"].is_null() && p["share"].is_null(), "{p}");
    }
    let districts = v["districts"].as_array().unwrap();
    assert_eq!(districts.len(), 3);
    for d in districts {
        assert_eq!(d["tipping_runs"], 0);
        assert!(
            d["runs_won"].as_object().unwrap().values().all(|n| n == 0),
            "{d}"
        );
    }
    assert_eq!(v["caution"], stratamap::CAUTION);
    // The tally takes it too (its own output has no simulation in it).
    let o = run(&["tally", s(&data), "--scenario", "runs=0"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    // One more than the limit is still refused.
    let o = run(&["simulate", s(&data), "--scenario", "runs=100001"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("expected a whole number from 0 to 100000"));
}
