//! Helpers shared by the integration tests: datasets built in memory.

#![allow(dead_code)]

use geo::{polygon, MultiPolygon};
use stratamap::dataset::{Cells, Dataset, District, Files, Group, Party, SeatRule};

/// A dataset from flat arrays; shares per cell are normalised to sum to 1.
pub fn synthetic(d_count: usize, g_count: usize, k_count: usize, values: &[f64]) -> Dataset {
    let mut it = values.iter().copied().cycle();
    let mut next = move || it.next().unwrap_or(0.5);
    let n_cells = d_count * g_count;
    let mut cells = Cells {
        eligible: Vec::with_capacity(n_cells),
        turnout: Vec::with_capacity(n_cells),
        shares: Vec::with_capacity(n_cells * k_count),
    };
    for _ in 0..n_cells {
        cells.eligible.push((next() * 10_000.0).floor() + 1.0);
        cells.turnout.push(next());
        let raw: Vec<f64> = (0..k_count).map(|_| next() + 0.01).collect();
        let sum: f64 = raw.iter().sum();
        cells.shares.extend(raw.iter().map(|r| r / sum));
    }
    let districts = (0..d_count)
        .map(|d| {
            let x = d as f64;
            District {
                id: format!("d{d}"),
                name: format!("District {d}"),
                seats: 1 + (d % 3) as u32,
                region: None,
                shape: MultiPolygon(vec![polygon![
                    (x: x, y: 0.0), (x: x + 1.0, y: 0.0), (x: x + 1.0, y: 1.0), (x: x, y: 1.0)
                ]]),
                seat_rule: SeatRule::Winner,
                threshold: 0.0,
            }
        })
        .collect::<Vec<_>>();
    let total: u32 = districts.iter().map(|d| d.seats).sum();
    Dataset {
        title: "Synthetic".into(),
        source: "Generated in the test".into(),
        parties: (0..k_count)
            .map(|k| Party {
                id: format!("p{k}"),
                name: format!("Party {k}"),
                color: "#336699".into(),
            })
            .collect(),
        axis: [0, 1],
        groups: (0..g_count)
            .map(|g| Group {
                id: format!("g{g}"),
                name: format!("Group {g}"),
            })
            .collect(),
        districts,
        majority: total / 2 + 1,
        seat_rule: SeatRule::Winner,
        threshold: 0.0,
        presets: vec![],
        cells,
        poll: None,
        files: Files {
            districts: "districts.geojson".into(),
            electorate: "electorate.csv".into(),
            poll: None,
        },
    }
}
