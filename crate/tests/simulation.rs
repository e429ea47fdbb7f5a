//! The simulation (the core's `analysis::simulate`) against outside results:
//! the normal distribution (Φ from the statrs crate), the mean and variance of a sum of
//! independent Bernoulli trials (the Poisson-binomial distribution), and the sampling
//! error of a poll's A−B margin (SPEC 2.3 formula, with Kish's design effect).
//!
//! Tolerances are four standard errors of the estimate from the number of runs, so a
//! correct simulation fails about once in 15,000 checks and a wrong one fails at once.

use statrs::distribution::{ContinuousCDF, Normal};
use stratamap::analysis::simulate::{simulate, Plan, Scratch};
use stratamap::dataset::{Dataset, Sources};
use stratamap::model::scenario::Scenario;

fn manifest(poll: bool) -> String {
    format!(
        r##"{{"title": "Two parties", "source": "Test data",
  "parties": [{{"id": "a", "name": "A", "color": "#226677"}}, {{"id": "b", "name": "B", "color": "#aa7722"}}],
  "groups": [{{"id": "g", "name": "Everyone"}}], "districts": "d.geojson", "electorate": "e.csv"{}}}"##,
        if poll { r#", "poll": "p.csv""# } else { "" }
    )
}

fn square(i: usize, seats: u32) -> String {
    let x = i as f64;
    format!(
        r#"{{"type":"Feature","properties":{{"id":"d{i}","name":"D{i}","seats":{seats}}},"geometry":{{"type":"Polygon","coordinates":[[[{x},0],[{},0],[{},1],[{x},1],[{x},0]]]}}}}"#,
        x + 1.0,
        x + 1.0
    )
}

/// Two parties, one group; district i has A−B margin `margins[i]` points and `seats[i]` seats.
fn two_party(margins: &[f64], seats: &[u32], poll: Option<&str>) -> Dataset {
    let features: Vec<String> = (0..margins.len()).map(|i| square(i, seats[i])).collect();
    let districts = format!(
        r#"{{"type":"FeatureCollection","features":[{}]}}"#,
        features.join(",")
    );
    let mut electorate = String::from("district,group,eligible,turnout,a,b\n");
    for (i, m) in margins.iter().enumerate() {
        let a = 0.5 + m / 200.0;
        electorate += &format!("d{i},g,1000,0.6,{a},{}\n", 1.0 - a);
    }
    Dataset::from_sources(&Sources {
        manifest: &manifest(poll.is_some()),
        districts: &districts,
        electorate: &electorate,
        poll,
    })
    .unwrap()
}

fn phi(x: f64) -> f64 {
    Normal::new(0.0, 1.0).unwrap().cdf(x)
}

/// SPEC 2.4: with district noise alone and no clamping, A wins a two-party district in
/// a share Φ(margin / district_sd) of the runs (Φ from statrs).
#[test]
fn district_noise_matches_phi() {
    let margins = [1.0, -2.0, 4.0, 0.0, 6.5];
    let ds = two_party(&margins, &[1; 5], None);
    let sd = 3.0;
    let runs = 20_000;
    let s = Scenario::parse_strict("turnout_sd=0&margin_sd=0&district_sd=3&seed=11", &ds).unwrap();
    let sim = simulate(&ds, &s, runs);
    for (d, m) in margins.iter().enumerate() {
        let want = phi(m / sd);
        let got = f64::from(sim.districts[d].runs_won.0[0].1) / f64::from(runs);
        // Four standard errors of a proportion from `runs` runs.
        let tol = 4.0 * (want * (1.0 - want) / f64::from(runs)).sqrt();
        assert!(
            (got - want).abs() < tol,
            "district {d}: {got} vs Φ = {want} (±{tol})"
        );
    }
    let total: u32 = sim.parties[0].seats.histogram.counts.iter().sum();
    assert_eq!(total, runs);
}

/// With district noise alone, districts are independent, so A's seats are a sum of
/// independent Bernoulli trials weighted by seats (a Poisson-binomial distribution when
/// every weight is 1): mean Σ p·s, variance Σ p(1−p)·s² (e.g. Wang, 1993, "On the number
/// of successes in independent trials", Statistica Sinica 3; the weighted form follows
/// from the additivity of means and variances of independent variables, common practice).
/// The variance's tolerance uses the fourth cumulant, additive too:
/// κ4 of s·Bernoulli(p) = s⁴ p(1−p)(1 − 6p(1−p)); Var(sample variance) ≈ (κ4 + 2σ⁴)/R.
#[test]
fn seat_mean_and_variance_are_poisson_binomial() {
    let margins = [1.0, -2.0, 4.0, 0.0, 6.5, -5.0, 2.5];
    let seats = [1u32, 2, 3, 1, 4, 2, 1];
    let ds = two_party(&margins, &seats, None);
    let runs = 20_000u32;
    let s = Scenario::parse_strict("turnout_sd=0&margin_sd=0&district_sd=4&seed=3", &ds).unwrap();
    let sim = simulate(&ds, &s, runs);
    let (mut mean, mut var, mut k4) = (0.0, 0.0, 0.0);
    for (m, &st) in margins.iter().zip(&seats) {
        let p = phi(m / 4.0);
        let s = f64::from(st);
        mean += p * s;
        var += p * (1.0 - p) * s * s;
        k4 += s.powi(4) * p * (1.0 - p) * (1.0 - 6.0 * p * (1.0 - p));
    }
    let r = f64::from(runs);
    let a = &sim.parties[0].seats;
    assert!(
        (a.mean - mean).abs() < 4.0 * (var / r).sqrt(),
        "mean {} vs {mean}",
        a.mean
    );
    // The variance from the histogram (one bin per seat here: 14 seats at most).
    assert_eq!(a.histogram.width, 1);
    let sum_sq: f64 = a
        .histogram
        .counts
        .iter()
        .enumerate()
        .map(|(i, &c)| {
            let x = f64::from(a.histogram.start) + i as f64 - a.mean;
            f64::from(c) * x * x
        })
        .sum();
    let got_var = sum_sq / (r - 1.0);
    let tol = 4.0 * ((k4 + 2.0 * var * var) / r).sqrt();
    assert!(
        (got_var - var).abs() < tol,
        "variance {got_var} vs {var} (±{tol})"
    );
    // B takes every seat A does not (no ties with continuous noise).
    let b = &sim.parties[1].seats;
    assert!((a.mean + b.mean - 14.0).abs() < 1e-9);
}

/// The standard deviation over `runs` runs of the nationwide A−B margin (points) with
/// only the poll's sampling error (one group, so it is that group's margin).
fn margin_sd_from_poll(n: u32, deff: f64, runs: u32) -> f64 {
    let poll = format!("group,sample_size,a,b,design_effect\ng,{n},0.52,0.48,{deff}\n");
    let ds = two_party(&[2.0, -1.0, 0.5], &[1, 1, 1], Some(&poll));
    let s = Scenario::parse_strict("turnout_sd=0&margin_sd=0&district_sd=0&seed=9", &ds).unwrap();
    let plan = Plan::new(&ds, &s, runs);
    let mut scratch = Scratch::default();
    let mut values = Vec::new();
    for b in 0..plan.block_count() {
        plan.run_block_with(&ds, b, &mut scratch, |t| {
            let v = &t.national_votes;
            values.push((v[0] - v[1]) / t.total_cast() * 100.0);
        });
    }
    assert_eq!(values.len(), runs as usize);
    let m = values.iter().sum::<f64>() / values.len() as f64;
    let ss: f64 = values.iter().map(|x| (x - m) * (x - m)).sum();
    (ss / (values.len() as f64 - 1.0)).sqrt()
}

/// SPEC 2.3: SE of an A−B margin = √(D·(p_A + p_B − (p_A − p_B)²)/n) (the variance of a
/// difference of two multinomial shares, e.g. Kish, 1965, "Survey Sampling", with his
/// design effect D). So the simulated spread halves when the sample is 4× larger and
/// grows by √2 with a design effect of 2. The sample SD's relative standard error is
/// about 1/√(2R).
#[test]
fn sampling_error_shrinks_with_sample_size_and_grows_with_design_effect() {
    let runs = 8_000;
    let rel = 4.0 / (2.0 * f64::from(runs)).sqrt();
    let se = |n: f64, d: f64| (d * (1.0 - 0.04f64.powi(2)) / n).sqrt() * 100.0;
    let small = margin_sd_from_poll(400, 1.0, runs);
    let large = margin_sd_from_poll(1600, 1.0, runs);
    let weighted = margin_sd_from_poll(400, 2.0, runs);
    for (got, want) in [
        (small, se(400.0, 1.0)),
        (large, se(1600.0, 1.0)),
        (weighted, se(400.0, 2.0)),
    ] {
        assert!((got / want - 1.0).abs() < rel, "sd {got} vs SE {want}");
    }
    // Ratios of two independent estimates: relative errors add in quadrature.
    let rel2 = rel * 2f64.sqrt();
    assert!(
        (small / large / 2.0 - 1.0).abs() < rel2,
        "1/√n: {small} / {large}"
    );
    assert!(
        (weighted / small / 2f64.sqrt() - 1.0).abs() < rel2,
        "√D: {weighted} / {small}"
    );
}

/// Another seed gives other numbers, consistent with the first: each district's share
/// of runs won differs by less than four standard errors of a difference of two
/// independent proportions, √(2p(1−p)/R).
#[test]
fn another_seed_differs_but_agrees() {
    let ds = stratamap::testdata::two_groups();
    let runs = 4_000u32;
    let a = simulate(&ds, &Scenario::parse_strict("seed=1", &ds).unwrap(), runs);
    let b = simulate(&ds, &Scenario::parse_strict("seed=2", &ds).unwrap(), runs);
    assert_ne!(a.to_json(), b.to_json());
    let r = f64::from(runs);
    for (da, db) in a.districts.iter().zip(&b.districts) {
        for ((_, x), (_, y)) in da.runs_won.iter().zip(db.runs_won.iter()) {
            let (p, q) = (f64::from(*x) / r, f64::from(*y) / r);
            let pooled = (p + q) / 2.0;
            let tol = 4.0 * (2.0 * pooled * (1.0 - pooled) / r).sqrt() + 1.0 / r;
            assert!((p - q).abs() <= tol, "{}: {p} vs {q}", da.id);
        }
    }
}

#[test]
fn zero_spreads_reproduce_the_tally() {
    let ds = stratamap::testdata::two_groups();
    let s = Scenario::parse_strict("start=baseline&turnout_sd=0&margin_sd=0&district_sd=0", &ds)
        .unwrap();
    let sim = simulate(&ds, &s, 50);
    // The baseline tally: b, a, b win; seats 2 and 2 of 4 (majority 3): nobody, every run.
    let won = |d: usize| {
        sim.districts[d]
            .runs_won
            .0
            .iter()
            .map(|(_, n)| *n)
            .collect::<Vec<_>>()
    };
    assert_eq!(won(0), vec![0, 50, 0, 0]);
    assert_eq!(won(1), vec![50, 0, 0, 0]);
    assert_eq!(sim.no_majority_runs, 50);
    assert_eq!(sim.parties[0].seats.p50, 2);
    assert_eq!(sim.parties[0].seats.histogram.counts, vec![50]);
    assert_eq!(sim.districts[1].tipping_runs, 50);
}
