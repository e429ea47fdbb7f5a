//! Raking an electorate from margins, a groups table and results (the contributor
//! guide's "Building the electorate from marginals"), through the library and the
//! command line.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use stratamap::build::rake::{rake, Inputs, Raked, TOLERANCE};
use stratamap::model::tally::{tally, Shifts};

/// Three invented districts; dimensions age (3) × schooling (2); two regions.
const MARGINS: &str = "district,dimension,category,count
lowmere,age,y18_34,3200
lowmere,age,y35_59,4100
lowmere,age,y60,2700
lowmere,school,basic,6100
lowmere,school,higher,3900
harth,age,y18_34,1500
harth,age,y35_59,2600
harth,age,y60,2900
harth,school,basic,5400
harth,school,higher,1600
quillon,age,y18_34,2500
quillon,age,y35_59,2500
quillon,age,y60,1000
quillon,school,basic,2400
quillon,school,higher,3604
";

const GROUPS: &str = "group,age,school,eligible,turnout,fern,slate,other
yb,y18_34,basic,900,0.45,0.40,0.45,0.15
yh,y18_34,higher,600,0.62,0.58,0.30,0.12
mb,y35_59,basic,1400,0.58,0.35,0.55,0.10
mh,y35_59,higher,700,0.74,0.52,0.38,0.10
ob,y60,basic,1300,0.71,0.30,0.62,0.08
oh,y60,higher,300,0.82,0.45,0.47,0.08
";

const RESULTS: &str = "district,votes_cast,fern,slate,other
lowmere,6010,2650,2700,660
harth,4420,1500,2600,320
quillon,3650,1900,1350,400
";

fn inputs<'a>(margins: &'a str, groups: &'a str, results: Option<&'a str>) -> Inputs<'a> {
    let mut i = Inputs::new(("margins.csv", margins), ("groups.csv", groups));
    i.results = results.map(|r| ("results.csv", r).into());
    i
}

fn errors(i: &Inputs) -> Vec<String> {
    match rake(i) {
        Ok(_) => vec![],
        Err(e) => e.lines(),
    }
}

/// Each district's category sums against its margins, each dimension brought to the
/// district's common total (only quillon needs it: 6000 by age, 6004 by schooling).
fn check_margins(r: &Raked, margins: &str) {
    let ng = r.groups.len();
    let rows: Vec<Vec<&str>> = margins
        .lines()
        .skip(1)
        .map(|l| l.split(',').collect())
        .collect();
    for f in &rows {
        let d = r.districts.iter().position(|x| x == f[0]).unwrap();
        let j = r.dimensions.iter().position(|x| x.id == f[1]).unwrap();
        let k = r.dimensions[j]
            .categories
            .iter()
            .position(|x| x == f[2])
            .unwrap();
        let dim_total: f64 = rows
            .iter()
            .filter(|x| x[0] == f[0] && x[1] == f[1])
            .map(|x| x[3].parse::<f64>().unwrap())
            .sum();
        let total = r.reports[d].total;
        let want = f[3].parse::<f64>().unwrap() * total / dim_total;
        let got: f64 = (0..ng)
            .filter(|&g| r.groups[g].of[j] == k)
            .map(|g| r.eligible[d * ng + g])
            .sum();
        assert!(
            (got - want).abs() <= TOLERANCE * total,
            "{f:?}: {got} vs {want}"
        );
    }
}

#[test]
fn fits_every_margin_to_the_tolerance() {
    let r = rake(&inputs(MARGINS, GROUPS, None)).unwrap();
    assert_eq!(r.districts, ["lowmere", "harth", "quillon"]);
    assert_eq!(r.dimensions.len(), 2);
    check_margins(&r, MARGINS);
    for rep in &r.reports {
        assert!(rep.max_error <= TOLERANCE * rep.total, "{rep:?}");
        assert!(rep.iterations >= 1 && rep.iterations < 200, "{rep:?}");
    }
    // quillon's totals (6000 and 6004) were brought to their mean, 6002.
    assert_eq!(r.reports[2].total, 6002.0);
    assert!((r.reports[2].totals_adjusted - 2.0 / 6000.0).abs() < 1e-12);
    // Without results every district takes the groups' turnout and shares.
    assert_eq!(r.turnout[0], 0.45);
    assert_eq!(&r.shares[0..3], &[0.40, 0.45, 0.15]);
    assert!(r
        .report()
        .last()
        .unwrap()
        .contains("3 districts × 6 groups"));
}

#[test]
fn tally_reproduces_the_results() {
    let r = rake(&inputs(MARGINS, GROUPS, Some(RESULTS))).unwrap();
    check_margins(&r, MARGINS);
    // Load what was raked as any dataset is loaded (the CSV text and a manifest) and
    // tally it at the baseline: every party's votes in every district are the results.
    let ds = r.dataset(None).unwrap();
    let t = tally(&ds, &Shifts::zero(&ds));
    let want = [
        [2650.0, 2700.0, 660.0],
        [1500.0, 2600.0, 320.0],
        [1900.0, 1350.0, 400.0],
    ];
    for (d, w) in want.iter().enumerate() {
        for (k, v) in w.iter().enumerate() {
            let got = t.district_votes(d)[k];
            assert!(
                (got - v).abs() <= 1e-9 * v,
                "district {d} party {k}: {got} vs {v}"
            );
        }
        assert!((t.cast[d] - w.iter().sum::<f64>()).abs() <= 1e-9 * t.cast[d]);
    }
    let worst = r.check_with_tally(None).unwrap().unwrap();
    assert!(worst < 1e-6, "{worst}");
    // One logit shift per district: the order of the groups' turnout is kept.
    let ng = r.groups.len();
    for d in 0..3 {
        let tau = &r.turnout[d * ng..(d + 1) * ng];
        assert!(
            tau[0] < tau[1] && tau[2] < tau[3] && tau[4] < tau[5],
            "{tau:?}"
        );
        for g in 0..ng {
            let s: f64 = r.shares[(d * ng + g) * 3..(d * ng + g + 1) * 3]
                .iter()
                .sum();
            assert!((s - 1.0).abs() < 1e-9, "{s}");
        }
        assert!(r.reports[d].calibration.is_some());
    }
}

#[test]
fn zero_cells_stay_zero() {
    // No one in harth is 60 or over, and the groups table has no seed for people of 60
    // and over with higher schooling.
    let margins = MARGINS
        .replace("harth,age,y60,2900", "harth,age,y60,0")
        .replace("harth,age,y35_59,2600", "harth,age,y35_59,5500");
    let groups = GROUPS.replace("oh,y60,higher,300", "oh,y60,higher,0");
    let r = rake(&inputs(&margins, &groups, None)).unwrap();
    let ng = r.groups.len();
    for d in 0..3 {
        assert_eq!(r.eligible[d * ng + 5], 0.0, "oh in district {d}");
    }
    assert_eq!(r.eligible[ng + 4], 0.0);
    assert_eq!(r.eligible[ng + 5], 0.0);
    check_margins(&r, &margins);
}

#[test]
fn disagreeing_totals_are_a_clear_error() {
    let margins = MARGINS.replace("harth,school,higher,1600", "harth,school,higher,1700");
    let e = errors(&inputs(&margins, GROUPS, None));
    assert_eq!(e.len(), 1, "{e:?}");
    assert!(
        e[0].starts_with("margins.csv row 7, field count: district \"harth\": its dimensions' totals disagree by 1.408 % (age adds to 7000, school adds to 7100)"),
        "{e:?}"
    );
}

#[test]
fn an_empty_district_and_impossible_margins_are_errors() {
    let zero = "district,dimension,category,count\nn,age,y18_34,0\nn,age,y35_59,0\nn,age,y60,0\nn,school,basic,0\nn,school,higher,0\n";
    let e = errors(&inputs(zero, GROUPS, None));
    assert_eq!(
        e,
        ["margins.csv row 2, field count: district \"n\" has no eligible people in any category; every district needs some"]
    );
    // Only young people have higher schooling in the seed, and every district has more
    // people with higher schooling than young people: the fit cannot converge.
    let groups = GROUPS
        .replace("mh,y35_59,higher,700", "mh,y35_59,higher,0")
        .replace("oh,y60,higher,300", "oh,y60,higher,0");
    let e = errors(&inputs(MARGINS, &groups, None));
    assert_eq!(e.len(), 1, "{e:?}");
    assert!(e[0].starts_with("margins.csv: the fit did not come within 1e-9 of the total in 10000 iterations in 3 district(s): lowmere"), "{e:?}");
    assert!(e[0].contains("quillon"), "{e:?}");
    // A category with people but no seeded group at all.
    let groups = GROUPS
        .replace("ob,y60,basic,1300", "ob,y60,basic,0")
        .replace("oh,y60,higher,300", "oh,y60,higher,0");
    let e = errors(&inputs(MARGINS, &groups, None));
    assert!(e[0].starts_with("margins.csv row 4, field count: district \"lowmere\": 2700 people in dimension \"age\", category \"y60\", but no group"), "{e:?}");
}

#[test]
fn input_problems_name_file_row_and_field() {
    let margins = MARGINS.replace("harth,school,basic,5400", "harth,school,basic,-5")
        + "lowmere,age,y18_34,1\n";
    let e = errors(&inputs(&margins, GROUPS, None));
    assert!(e.contains(&"margins.csv row 10, field count: expected a count of eligible people, at least 0, found -5".to_string()), "{e:?}");
    assert!(e.iter().any(|l| l.starts_with("margins.csv row 17, field district+dimension+category: district \"lowmere\", dimension \"age\", category \"y18_34\" was already given in row 2")), "{e:?}");

    let groups = GROUPS
        .replace("mh,y35_59,higher", "mh,y35_59,tertiary")
        .replace("0.38,0.10", "0.48,0.10")
        + "ob2,y60,basic,1,0.5,0.5,0.5,0\n";
    let e = errors(&inputs(MARGINS, &groups, None));
    assert!(e.iter().any(|l| l.starts_with("groups.csv row 5, field school: expected a category of dimension \"school\" as the margins give them (basic, higher), found \"tertiary\"")), "{e:?}");
    assert!(e.iter().any(|l| l.starts_with("groups.csv row 8, field group: group \"ob2\" has the same categories as group \"ob\" (row 6)")), "{e:?}");

    let results = RESULTS.replace("harth,4420", "harth,4000");
    let e = errors(&inputs(MARGINS, GROUPS, Some(&results)));
    assert!(e[0].starts_with("results.csv row 3, field votes_cast: district \"harth\": votes_cast is 4000 but the parties' votes add up to 4420"), "{e:?}");

    let e = errors(&inputs(
        MARGINS,
        "group,age,eligible,turnout,fern,slate\n",
        None,
    ));
    assert_eq!(
        e,
        ["groups.csv row 1, field school: this column is missing"]
    );

    // More votes than people who may vote.
    let results = RESULTS.replace("quillon,3650,1900,1350,400", "quillon,6500,3000,3000,500");
    let e = errors(&inputs(MARGINS, GROUPS, Some(&results)));
    assert!(e[0].starts_with("results.csv, field votes_cast: district \"quillon\": 6500 votes cannot come from its 6002 eligible people"), "{e:?}");
}

#[test]
fn regional_seeds_need_the_map_and_apply_by_region() {
    let groups = "group,age,school,region,eligible,turnout,fern,slate,other
yb,y18_34,basic,hills,900,0.45,0.40,0.45,0.15
yh,y18_34,higher,hills,600,0.62,0.58,0.30,0.12
mb,y35_59,basic,hills,1400,0.58,0.35,0.55,0.10
mh,y35_59,higher,hills,700,0.74,0.52,0.38,0.10
ob,y60,basic,hills,1300,0.71,0.30,0.62,0.08
oh,y60,higher,hills,300,0.82,0.45,0.47,0.08
yb,y18_34,basic,coast,100,0.35,0.20,0.70,0.10
yh,y18_34,higher,coast,100,0.55,0.30,0.60,0.10
mb,y35_59,basic,coast,100,0.50,0.20,0.70,0.10
mh,y35_59,higher,coast,100,0.60,0.30,0.60,0.10
ob,y60,basic,coast,100,0.65,0.20,0.70,0.10
oh,y60,higher,coast,100,0.70,0.30,0.60,0.10
";
    let e = errors(&inputs(MARGINS, groups, None));
    assert!(
        e[0].starts_with(
            "groups.csv row 1, field region: regional seeds need the districts' GeoJSON"
        ),
        "{e:?}"
    );
    let square = r#"{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}"#;
    let map = format!(
        r#"{{"type":"FeatureCollection","features":[
        {{"type":"Feature","properties":{{"id":"quillon","name":"Quillon","region":"coast"}},"geometry":{square}}},
        {{"type":"Feature","properties":{{"id":"lowmere","name":"Lowmere","region":"hills"}},"geometry":{square}}},
        {{"type":"Feature","properties":{{"id":"harth","name":"Harth","region":"coast"}},"geometry":{square}}}]}}"#
    );
    let mut i = inputs(MARGINS, groups, None);
    i.districts = Some(("districts.geojson", map.as_str()).into());
    let r = rake(&i).unwrap();
    // The map's order, and the coast's turnout and shares in quillon.
    assert_eq!(r.districts, ["quillon", "lowmere", "harth"]);
    assert_eq!(r.turnout[0], 0.35);
    assert_eq!(r.turnout[6], 0.45);
    // The coast's seed is uniform, so quillon's cells are row × column / total.
    assert!(
        (r.eligible[0] - 2500.0 * 2400.0 / 6000.0 * (6002.0 / 6004.0)).abs() < 1e-6,
        "{}",
        r.eligible[0]
    );
    check_margins(&r, MARGINS);
}

// ---- the command line ----

fn dir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("stratamap-rake-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn run(args: &[&str], cwd: &Path) -> Output {
    Command::new(env!("CARGO_BIN_EXE_stratamap"))
        .args(args)
        .current_dir(cwd)
        .output()
        .unwrap()
}

#[test]
fn command_line_rakes_and_the_result_checks() {
    let d = dir("cli");
    std::fs::write(d.join("margins.csv"), MARGINS).unwrap();
    std::fs::write(d.join("groups.csv"), GROUPS).unwrap();
    std::fs::write(d.join("results.csv"), RESULTS).unwrap();
    let square = |x: f64| {
        format!(
            r#"{{"type":"Polygon","coordinates":[[[{x},0],[{},0],[{},1],[{x},1],[{x},0]]]}}"#,
            x + 1.0,
            x + 1.0
        )
    };
    let map = format!(
        r#"{{"type":"FeatureCollection","features":[
        {{"type":"Feature","properties":{{"id":"lowmere","name":"Lowmere"}},"geometry":{}}},
        {{"type":"Feature","properties":{{"id":"harth","name":"Harth","seats":2}},"geometry":{}}},
        {{"type":"Feature","properties":{{"id":"quillon","name":"Quillon"}},"geometry":{}}}]}}"#,
        square(0.0),
        square(1.0),
        square(2.0)
    );
    std::fs::create_dir_all(d.join("out")).unwrap();
    std::fs::write(d.join("out/districts.geojson"), map).unwrap();
    let o = run(
        &[
            "rake",
            "--margins",
            "margins.csv",
            "--groups",
            "groups.csv",
            "--results",
            "results.csv",
            "--districts",
            "out/districts.geojson",
            "--manifest",
            "out/dataset.json",
            "-o",
            "out/electorate.csv",
        ],
        &d,
    );
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(0), "{err}");
    assert!(o.stdout.is_empty());
    assert!(
        err.contains("stratamap: lowmere: 10000 eligible, "),
        "{err}"
    );
    assert!(err.contains("3 districts × 6 groups raked"), "{err}");
    assert!(err.contains("reproduces the results"), "{err}");
    let csv = std::fs::read_to_string(d.join("out/electorate.csv")).unwrap();
    assert!(csv.starts_with("district,group,eligible,turnout,fern,slate,other\nlowmere,yb,"));
    assert_eq!(csv.lines().count(), 1 + 3 * 6);
    let manifest = std::fs::read_to_string(d.join("out/dataset.json")).unwrap();
    assert!(
        manifest.contains("\"electorate\": \"electorate.csv\""),
        "{manifest}"
    );
    assert!(
        manifest.contains("\"districts\": \"districts.geojson\""),
        "{manifest}"
    );
    let o = run(&["check", "out"], &d);
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    // The command line's tally prints the results' votes.
    let o = run(&["tally", "out"], &d);
    let out = String::from_utf8(o.stdout).unwrap();
    let harth: Vec<&str> = out.lines().nth(2).unwrap().split(',').collect();
    assert_eq!(&harth[..4], &["harth", "Harth", "2", "slate"]);
    let votes: Vec<f64> = harth[6..9].iter().map(|v| v.parse().unwrap()).collect();
    for (v, w) in votes.iter().zip([1500.0, 2600.0, 320.0]) {
        assert!((v - w).abs() < 1e-6, "{v} vs {w}");
    }

    // A broken input: exit 1, the problem on standard error, nothing written.
    std::fs::write(
        d.join("bad.csv"),
        MARGINS.replace("harth,school,higher,1600", "harth,school,higher,1700"),
    )
    .unwrap();
    let o = run(
        &[
            "rake",
            "--margins",
            "bad.csv",
            "--groups",
            "groups.csv",
            "-o",
            "bad-out.csv",
        ],
        &d,
    );
    assert_eq!(o.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&o.stderr)
        .contains("bad.csv row 7, field count: district \"harth\""));
    assert!(!d.join("bad-out.csv").exists());
    // A usage error.
    let o = run(&["rake", "--margins", "margins.csv"], &d);
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn template_writes_a_dataset_that_checks() {
    let d = dir("template");
    let o = run(&["template", "example"], &d);
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    for f in [
        "dataset.json",
        "districts.geojson",
        "electorate.csv",
        "README.md",
    ] {
        assert!(d.join("example").join(f).is_file(), "{f}");
    }
    let o = run(&["check", "example"], &d);
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    let out = String::from_utf8(o.stdout).unwrap();
    assert!(
        out.contains("districts: 3 in 0 regions, 4 seats, majority 3"),
        "{out}"
    );
    // Nothing is replaced.
    let o = run(&["template", "example"], &d);
    assert_eq!(o.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&o.stderr).contains("already exists"));
}

/// The README's worked example, step by step, on the committed demo files: the demo's
/// districts carry regions, which a nationwide groups table ignores.
#[test]
fn readme_worked_example_rakes_the_demo_inputs() {
    let d = dir("readme");
    let demo = Path::new(env!("CARGO_MANIFEST_DIR")).join("../maps-demo");
    std::fs::create_dir_all(d.join("mydata")).unwrap();
    std::fs::copy(
        demo.join("districts.geojson"),
        d.join("mydata/districts.geojson"),
    )
    .unwrap();
    let raking = demo.join("raking");
    let p = |f: &str| raking.join(f).to_str().unwrap().to_string();
    let (m, g, r) = (p("margins.csv"), p("groups.csv"), p("results.csv"));
    let o = run(
        &[
            "rake",
            "--margins",
            &m,
            "--groups",
            &g,
            "--results",
            &r,
            "--districts",
            "mydata/districts.geojson",
            "--manifest",
            "mydata/dataset.json",
            "-o",
            "mydata/electorate.csv",
        ],
        &d,
    );
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(0), "{err}");
    assert!(err.contains("96 districts × 10 groups raked"), "{err}");
    let o = run(&["check", "mydata"], &d);
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    // The tally gives the results file's votes back in every district.
    let o = run(&["tally", "mydata"], &d);
    let out = String::from_utf8(o.stdout).unwrap();
    let results = std::fs::read_to_string(raking.join("results.csv")).unwrap();
    let header: Vec<&str> = out.lines().next().unwrap().split(',').collect();
    let col = |name: &str| header.iter().position(|h| *h == name).unwrap();
    for (row, want) in out.lines().skip(1).zip(results.lines().skip(1)) {
        let got: Vec<&str> = row.split(',').collect();
        let want: Vec<&str> = want.split(',').collect();
        assert_eq!(got[0], want[0]);
        for (k, party) in ["tideline", "ember", "orchard"].iter().enumerate() {
            let v: f64 = got[col(&format!("votes_{party}"))].parse().unwrap();
            let w: f64 = want[2 + k].parse().unwrap();
            assert!((v - w).abs() < 1e-6, "{} {party}: {v} vs {w}", want[0]);
        }
    }
}
