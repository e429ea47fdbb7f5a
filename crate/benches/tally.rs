//! Times the tally on a generated 3,000-district × 24-group × 4-party dataset.
//! Run with `cargo bench -p stratamap --bench tally`; it prints figures, asserts nothing.
//! `STRATAMAP_BENCH_REPS` sets the number of recomputes (2,000), and
//! `STRATAMAP_BENCH_DISTRICTS` the number of districts (3,000), and
//! `STRATAMAP_BENCH_RULE` the seat rule of every district (`winner`; a proportional rule
//! gives each district 5 seats).

use geo::{polygon, MultiPolygon};
use std::hint::black_box;
use std::time::Instant;
use stratamap::dataset::{Cells, Dataset, District, Files, Group, Party, SeatRule};
use stratamap::model::tally::{tally_into, Shifts, Tally};

fn dataset(d_count: usize, g_count: usize, k_count: usize, rule: SeatRule) -> Dataset {
    let seats = if rule.is_proportional() { 5 } else { 1 };
    // A small linear congruential sequence: reproducible numbers without a dependency.
    let mut state: u64 = 12345;
    let mut next = move || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    let mut cells = Cells::default();
    for _ in 0..d_count * g_count {
        cells.eligible.push(100.0 + next() * 5000.0);
        cells.turnout.push(0.3 + next() * 0.6);
        let raw: Vec<f64> = (0..k_count).map(|_| 0.05 + next()).collect();
        let s: f64 = raw.iter().sum();
        cells.shares.extend(raw.iter().map(|r| r / s));
    }
    Dataset {
        title: "bench".into(),
        source: "generated".into(),
        parties: (0..k_count)
            .map(|k| Party {
                id: format!("p{k}"),
                name: format!("P{k}"),
                color: "#336699".into(),
            })
            .collect(),
        axis: [0, 1],
        groups: (0..g_count)
            .map(|g| Group {
                id: format!("g{g}"),
                name: format!("G{g}"),
            })
            .collect(),
        districts: (0..d_count)
            .map(|d| District {
                id: format!("d{d}"),
                name: format!("D{d}"),
                seats,
                region: None,
                shape: MultiPolygon(vec![
                    polygon![(x: 0.0, y: 0.0), (x: 1.0, y: 0.0), (x: 1.0, y: 1.0)],
                ]),
                seat_rule: rule,
                threshold: 0.0,
            })
            .collect(),
        majority: (d_count * seats as usize / 2 + 1) as u32,
        seat_rule: rule,
        threshold: 0.0,
        presets: vec![],
        cells,
        poll: None,
        files: Files {
            districts: String::new(),
            electorate: String::new(),
            poll: None,
        },
    }
}

fn main() {
    let districts: usize = std::env::var("STRATAMAP_BENCH_DISTRICTS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(3000);
    let rule = std::env::var("STRATAMAP_BENCH_RULE")
        .ok()
        .and_then(|v| SeatRule::from_id(&v))
        .unwrap_or(SeatRule::Winner);
    let ds = dataset(districts, 24, 4, rule);
    let mut shifts = Shifts::zero(&ds);
    let mut t = Tally::default();
    tally_into(&ds, &shifts, 0.0, None, &mut t);
    let reps: usize = std::env::var("STRATAMAP_BENCH_REPS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(2000);
    let mut times = Vec::with_capacity(reps);
    for i in 0..reps {
        shifts.margin[i % 24] = (i % 40) as f64 - 20.0;
        shifts.turnout[(i + 7) % 24] = (i % 20) as f64 - 10.0;
        let start = Instant::now();
        tally_into(black_box(&ds), black_box(&shifts), 0.0, None, &mut t);
        times.push(start.elapsed().as_secs_f64() * 1e3);
        black_box(&t);
    }
    times.sort_by(f64::total_cmp);
    let p = |q: f64| times[((times.len() - 1) as f64 * q) as usize];
    println!(
        "tally {districts} districts x 24 groups x 4 parties, {}: p50 {:.3} ms, p95 {:.3} ms, min {:.3} ms ({reps} runs)",
        rule.id(),
        p(0.5),
        p(0.95),
        times[0]
    );
}
