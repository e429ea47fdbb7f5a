//! The simulation against the normal distribution: with only district noise and no
//! clamping, P(A wins d) in a two-party district is Φ(margin_d / district_sd) (SPEC 2.4),
//! with Φ from a reference library (statrs).

use statrs::distribution::{ContinuousCDF, Normal};
use stratamap::analysis::simulate::simulate;
use stratamap::dataset::{Dataset, Sources};
use stratamap::model::scenario::Scenario;

const MANIFEST: &str = r##"{"title": "Two parties", "source": "Test data",
  "parties": [{"id": "a", "name": "A", "color": "#226677"}, {"id": "b", "name": "B", "color": "#aa7722"}],
  "groups": [{"id": "g", "name": "Everyone"}], "districts": "d.geojson", "electorate": "e.csv"}"##;

fn square(i: usize) -> String {
    let x = i as f64;
    format!(
        r#"{{"type":"Feature","properties":{{"id":"d{i}","name":"D{i}"}},"geometry":{{"type":"Polygon","coordinates":[[[{x},0],[{},0],[{},1],[{x},1],[{x},0]]]}}}}"#,
        x + 1.0,
        x + 1.0
    )
}

#[test]
fn district_noise_matches_phi() {
    // A−B margins in points: share of A = 0.5 + m/200.
    let margins = [1.0, -2.0, 4.0, 0.0, 6.5];
    let features: Vec<String> = (0..margins.len()).map(square).collect();
    let districts = format!(
        r#"{{"type":"FeatureCollection","features":[{}]}}"#,
        features.join(",")
    );
    let mut electorate = String::from("district,group,eligible,turnout,a,b\n");
    for (i, m) in margins.iter().enumerate() {
        let a = 0.5 + m / 200.0;
        electorate += &format!("d{i},g,1000,0.6,{a},{}\n", 1.0 - a);
    }
    let ds = Dataset::from_sources(&Sources {
        manifest: MANIFEST,
        districts: &districts,
        electorate: &electorate,
        poll: None,
    })
    .unwrap();
    let sd = 3.0;
    let s = Scenario::parse_strict(
        "turnout_sd=0&margin_sd=0&district_sd=3&seed=11&runs=20000",
        &ds,
    )
    .unwrap();
    let runs = 20_000;
    let sim = simulate(&ds, &s, runs);
    let phi = Normal::new(0.0, 1.0).unwrap();
    for (d, m) in margins.iter().enumerate() {
        let want = phi.cdf(m / sd);
        let got = sim.districts[d].win_probability[0];
        // Four standard errors of a proportion from 20,000 runs.
        let tol = 4.0 * (want * (1.0 - want) / runs as f64).sqrt() + 1e-9;
        assert!(
            (got - want).abs() < tol.max(0.004),
            "district {d}: {got} vs Φ = {want}"
        );
    }
    let total: u32 = sim.parties[0].seats.histogram.iter().sum();
    assert_eq!(total, runs);
}

#[test]
fn zero_spreads_reproduce_the_tally() {
    let ds = stratamap::testdata::two_groups();
    let s = Scenario::parse_strict("start=baseline&turnout_sd=0&margin_sd=0&district_sd=0", &ds)
        .unwrap();
    let sim = simulate(&ds, &s, 50);
    // The baseline tally: b, a, b win; seats 2 and 2 of 4 (majority 3): nobody, every run.
    assert_eq!(sim.districts[0].win_probability, vec![0.0, 1.0, 0.0]);
    assert_eq!(sim.districts[1].win_probability, vec![1.0, 0.0, 0.0]);
    assert_eq!(sim.no_majority_probability, 1.0);
    assert_eq!(sim.parties[0].seats.p50, 2);
    assert_eq!(sim.districts[1].tipping_point_probability, 1.0);
}
