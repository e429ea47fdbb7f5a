//! Large synthetic datasets for benchmarks: same format as the demo, simple shapes
//! (a jittered octagon in each cell of a lattice), any number of districts, groups and parties.

use geo::{BoundingRect, Coord, LineString, MultiPolygon, Polygon};
use rand::{RngExt, SeedableRng};
use rand_pcg::Pcg64;

use crate::geometry::{self, normal, Snapper};
use crate::model::{
    round_to_units, Dataset, District, Group, Party, PollRow, Preset, Row, POLL_UNITS, SHARE_UNITS,
};

/// Every benchmark manifest's source line starts with this; the generator only overwrites
/// a folder whose dataset it wrote in this mode.
pub const SOURCE_PREFIX: &str = "Synthetic benchmark data for stratamap";

/// Distinct colours with no red/blue pair.
const PALETTE: [&str; 12] = [
    "#1c8c8c", "#e3a21a", "#6a3d7c", "#7a8a2e", "#c46d9e", "#4f5d3a", "#d9c27a", "#8c5a3c",
    "#5fb0a0", "#9a9a9a", "#b5762a", "#3f3f5f",
];

/// How the benchmark's districts are drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Shapes {
    /// A jittered octagon in each cell of a lattice (8 vertices, no shared edges).
    Lattice,
    /// Voronoi cells with irregular shared edges ([`crate::irregular`]).
    Irregular,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct BenchSize {
    pub districts: usize,
    pub groups: usize,
    pub parties: usize,
    pub shapes: Shapes,
    /// About this many vertices per district (irregular shapes only).
    pub vertices: usize,
}

pub fn build(seed: u64, size: BenchSize) -> Result<Dataset, String> {
    if size.districts == 0 {
        return Err("--districts must be at least 1".into());
    }
    if !(1..=64).contains(&size.groups) {
        return Err(format!("--groups must be 1 to 64, not {}", size.groups));
    }
    if !(2..=PALETTE.len()).contains(&size.parties) {
        return Err(format!("--parties must be 2 to 12, not {}", size.parties));
    }
    let mut rng = Pcg64::seed_from_u64(seed);
    let cols = ((size.districts as f64 * 1.6).sqrt().ceil() as usize).max(1);
    let cell = 0.04;
    let (lon0, lat0) = (-160.0, -25.0);

    let parties: Vec<Party> = (0..size.parties)
        .map(|k| Party {
            id: format!("p{:02}", k + 1),
            name: format!("Party {}", k + 1),
            color: PALETTE[k].into(),
        })
        .collect();
    let groups: Vec<Group> = (0..size.groups)
        .map(|g| Group {
            id: format!("g{:02}", g + 1),
            name: format!("Group {}", g + 1),
        })
        .collect();

    let zones = 8;
    let shapes: Vec<MultiPolygon<f64>> = match size.shapes {
        Shapes::Lattice => {
            let mut snapper = Snapper::new();
            let mut shapes = Vec::with_capacity(size.districts);
            for d in 0..size.districts {
                let (col, row) = (d % cols, d / cols);
                let centre = Coord {
                    x: lon0 + (col as f64 + 0.5) * cell + rng.random_range(-0.003..0.003),
                    y: lat0 - (row as f64 + 0.5) * cell + rng.random_range(-0.003..0.003),
                };
                let ring: Vec<Coord<f64>> = (0..8)
                    .map(|i| {
                        let theta = std::f64::consts::TAU * f64::from(i) / 8.0;
                        let r = cell * rng.random_range(0.3..0.42);
                        Coord {
                            x: centre.x + r * theta.cos(),
                            y: centre.y + r * theta.sin(),
                        }
                    })
                    .collect();
                let shape = MultiPolygon::new(vec![Polygon::new(LineString::new(ring), vec![])]);
                shapes.push(snapper.shape(&shape, |c| c));
            }
            shapes
        }
        Shapes::Irregular => crate::irregular::districts(
            &mut rng,
            size.districts,
            size.vertices,
            lon0 + 2.0,
            lat0 - 2.0,
        )?,
    };
    // Zones: bands of latitude with about as many districts each.
    let mut by_lat: Vec<usize> = (0..shapes.len()).collect();
    let lat_of = |s: &MultiPolygon<f64>| s.bounding_rect().map_or(0.0, |r| r.center().y);
    by_lat.sort_by(|&a, &b| lat_of(&shapes[b]).total_cmp(&lat_of(&shapes[a])));
    let mut zone = vec![0; shapes.len()];
    for (rank, &d) in by_lat.iter().enumerate() {
        zone[d] = rank * zones / shapes.len() + 1;
    }
    let mut districts = Vec::with_capacity(size.districts);
    for (d, shape) in shapes.into_iter().enumerate() {
        geometry::check_shape(&shape).map_err(|e| format!("district {d}: {e}"))?;
        districts.push(District {
            id: format!("d{:05}", d + 1),
            name: format!("District {}", d + 1),
            seats: if d % 25 == 0 { 2 } else { 1 },
            region: Some(format!("Zone {}", zone[d])),
            geometry: shape,
        });
    }

    let party_base: Vec<f64> = (0..size.parties)
        .map(|k| if k < 2 { 0.0 } else { -1.0 - 0.3 * k as f64 })
        .collect();
    let group_lean: Vec<Vec<f64>> = (0..size.groups)
        .map(|_| (0..size.parties).map(|_| normal(&mut rng, 0.3)).collect())
        .collect();
    let group_turnout: Vec<f64> = (0..size.groups)
        .map(|_| rng.random_range(0.4..0.8))
        .collect();
    let mut rows = Vec::with_capacity(size.districts * size.groups);
    for (d, district) in districts.iter().enumerate() {
        let district_lean: Vec<f64> = (0..size.parties).map(|_| normal(&mut rng, 0.25)).collect();
        let district_turnout = normal(&mut rng, 0.04);
        let adults = 40_000.0 * f64::from(district.seats) * normal(&mut rng, 0.2).exp();
        for g in 0..size.groups {
            let weights: Vec<f64> = (0..size.parties)
                .map(|k| {
                    (party_base[k] + group_lean[g][k] + district_lean[k] + normal(&mut rng, 0.05))
                        .exp()
                })
                .collect();
            let turnout =
                (group_turnout[g] + district_turnout + normal(&mut rng, 0.02)).clamp(0.1, 0.95);
            rows.push(Row {
                district: d,
                group: g,
                eligible: (adults / size.groups as f64 * normal(&mut rng, 0.3).exp()).round()
                    as u64
                    + 1,
                turnout: (turnout * f64::from(SHARE_UNITS)).round() as u32,
                shares: round_to_units(&weights, SHARE_UNITS),
            });
        }
    }

    let mut dataset = Dataset {
        title: format!(
            "Synthetic benchmark: {} districts, {} groups, {} parties",
            size.districts, size.groups, size.parties
        ),
        source: format!(
            "{SOURCE_PREFIX} (generated by maps-demo/generator, seed {seed}); not a real country or election."
        ),
        parties,
        axis: [0, 1],
        groups,
        districts,
        rows,
        poll: Vec::new(),
        presets: vec![Preset {
            name: "First group turns out".into(),
            scenario: "turnout=g01:5".into(),
        }],
    };
    let shares = crate::demo::group_shares(&dataset);
    for (g, s) in shares.iter().enumerate() {
        let moved: Vec<f64> = s
            .iter()
            .map(|p| (p + normal(&mut rng, 0.02)).max(0.0))
            .collect();
        dataset.poll.push(PollRow {
            group: g,
            sample_size: rng.random_range(60..=400),
            shares: round_to_units(&moved, POLL_UNITS),
            design_effect: rng.random_range(120..=180),
        });
    }
    Ok(dataset)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bench_dataset_has_the_requested_size() {
        let size = BenchSize {
            districts: 300,
            groups: 24,
            parties: 4,
            shapes: Shapes::Lattice,
            vertices: 200,
        };
        let ds = build(9, size).unwrap();
        assert_eq!(ds.districts.len(), 300);
        assert_eq!(ds.groups.len(), 24);
        assert_eq!(ds.parties.len(), 4);
        assert_eq!(ds.rows.len(), 300 * 24);
        assert_eq!(ds.poll.len(), 24);
        for r in &ds.rows {
            assert_eq!(r.shares.iter().sum::<u32>(), SHARE_UNITS);
            assert!(r.eligible > 0);
        }
        assert_eq!(build(9, size).unwrap(), ds, "same seed, same data");
    }

    #[test]
    fn bench_sizes_out_of_range_are_refused() {
        let bad = BenchSize {
            districts: 10,
            groups: 65,
            parties: 4,
            shapes: Shapes::Lattice,
            vertices: 200,
        };
        assert!(build(1, bad).is_err());
        let bad = BenchSize {
            districts: 10,
            groups: 2,
            parties: 13,
            shapes: Shapes::Irregular,
            vertices: 200,
        };
        assert!(build(1, bad).is_err());
    }
}
