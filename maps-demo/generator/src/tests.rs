//! Properties of the committed demo, checked on the files as written.

use std::collections::{BTreeMap, BTreeSet};
use std::sync::OnceLock;

use geo::{Area, Coord, Distance, Euclidean, Line, MultiPolygon, Point};

use crate::demo::{self, Demo};
use crate::geometry::{self, COORD_SCALE};
use crate::model::{Dataset, SHARE_UNITS};

fn demo() -> &'static Demo {
    static DEMO: OnceLock<Demo> = OnceLock::new();
    DEMO.get_or_init(|| demo::build(demo::DEFAULT_SEED).expect("the demo builds"))
}

fn is_id(s: &str) -> bool {
    (1..=32).contains(&s.len())
        && s.bytes()
            .all(|b| b.is_ascii_lowercase() || b.is_ascii_digit() || b == b'_' || b == b'-')
}

#[test]
fn same_seed_same_bytes_other_seed_other_data() {
    let again = demo::build(demo::DEFAULT_SEED).unwrap();
    assert_eq!(
        again.dataset.files().unwrap(),
        demo().dataset.files().unwrap()
    );
    let other = demo::build(demo::DEFAULT_SEED + 1).unwrap();
    assert_ne!(
        other.dataset.electorate_csv().unwrap(),
        demo().dataset.electorate_csv().unwrap()
    );
    assert_ne!(other.dataset.title, demo().dataset.title);
}

#[test]
fn electorate_rows_are_complete_and_sum_to_one() {
    let ds = &demo().dataset;
    let text = ds.electorate_csv().unwrap();
    let mut reader = csv::Reader::from_reader(text.as_bytes());
    let header: Vec<String> = reader.headers().unwrap().iter().map(String::from).collect();
    let mut expected = vec!["district", "group", "eligible", "turnout"];
    expected.extend(ds.parties.iter().map(|p| p.id.as_str()));
    assert_eq!(header, expected);
    let mut eligible_by_district: BTreeMap<String, f64> = BTreeMap::new();
    let mut pairs = BTreeSet::new();
    let mut rows = 0;
    for record in reader.records() {
        let record = record.unwrap();
        rows += 1;
        assert!(pairs.insert((record[0].to_string(), record[1].to_string())));
        let eligible: f64 = record[2].parse().unwrap();
        let turnout: f64 = record[3].parse().unwrap();
        assert!((0.0..=1.0).contains(&turnout), "turnout {turnout}");
        let shares: Vec<f64> = (4..record.len())
            .map(|i| record[i].parse().unwrap())
            .collect();
        assert!(shares.iter().all(|s| (0.0..=1.0).contains(s)));
        let sum: f64 = shares.iter().sum();
        assert!((sum - 1.0).abs() < 1e-9, "row {rows} sums to {sum}");
        for field in 3..record.len() {
            let decimals = record[field].split('.').nth(1).map_or(0, str::len);
            assert_eq!(decimals, 4, "row {rows} field {field}: {}", &record[field]);
        }
        *eligible_by_district
            .entry(record[0].to_string())
            .or_default() += eligible;
    }
    assert_eq!(rows, ds.districts.len() * ds.groups.len());
    for d in &ds.districts {
        assert!(
            eligible_by_district[&d.id] > 0.0,
            "{} has no one eligible",
            d.id
        );
    }
}

#[test]
fn enough_districts_with_good_ids_names_and_seats() {
    let ds = &demo().dataset;
    assert!(ds.districts.len() >= 80);
    let ids: BTreeSet<&str> = ds.districts.iter().map(|d| d.id.as_str()).collect();
    let names: BTreeSet<&str> = ds.districts.iter().map(|d| d.name.as_str()).collect();
    assert_eq!(ids.len(), ds.districts.len());
    assert_eq!(names.len(), ds.districts.len());
    for id in ds
        .districts
        .iter()
        .map(|d| d.id.as_str())
        .chain(ds.groups.iter().map(|g| g.id.as_str()))
        .chain(ds.parties.iter().map(|p| p.id.as_str()))
    {
        assert!(is_id(id), "bad id {id}");
        assert_ne!(id, "all");
    }
    assert!((8..=12).contains(&ds.groups.len()));
    assert_eq!(ds.parties.len(), 3);
    let multi = ds.districts.iter().filter(|d| d.seats > 1).count();
    assert!(multi >= 3, "{multi} multi-seat districts");
    assert!(ds.districts.iter().all(|d| (1..=3).contains(&d.seats)));
    // The multi-seat districts are the most populous ones.
    let mut population: Vec<(u64, u32)> = ds
        .districts
        .iter()
        .enumerate()
        .map(|(i, d)| {
            let n: u64 = ds
                .rows
                .iter()
                .filter(|r| r.district == i)
                .map(|r| r.eligible)
                .sum();
            (n, d.seats)
        })
        .collect();
    population.sort_by_key(|p| std::cmp::Reverse(p.0));
    let top: Vec<u32> = population.iter().take(multi).map(|p| p.1).collect();
    assert!(
        top.iter().filter(|&&s| s > 1).count() * 10 >= multi * 8,
        "{top:?}"
    );
}

#[test]
fn districts_cover_the_coastline_without_overlap() {
    let demo = demo();
    let total: f64 = demo
        .dataset
        .districts
        .iter()
        .map(|d| d.geometry.unsigned_area())
        .sum();
    let ratio = total / demo.coastline.unsigned_area();
    assert!(
        (ratio - 1.0).abs() < 0.01,
        "districts cover {ratio} of the land"
    );
}

#[test]
fn shapes_are_valid_rounded_and_counter_clockwise() {
    let ds = &demo().dataset;
    for d in &ds.districts {
        geometry::check_shape(&d.geometry).unwrap_or_else(|e| panic!("{}: {e}", d.id));
        for p in &d.geometry.0 {
            for c in p
                .exterior()
                .0
                .iter()
                .chain(p.interiors().iter().flat_map(|r| r.0.iter()))
            {
                for v in [c.x, c.y] {
                    let units = v * COORD_SCALE;
                    assert!(
                        (units - units.round()).abs() < 1e-6,
                        "{v} has more than 5 decimals"
                    );
                }
            }
        }
    }
    let island = ds
        .districts
        .iter()
        .filter(|d| d.geometry.0.len() > 1)
        .count();
    assert!(
        island >= 1,
        "the offshore island joins a district as a MultiPolygon"
    );
    // The GeoJSON reads back with the same number of features and properties.
    let text = ds.districts_geojson().unwrap();
    let collection: geojson::FeatureCollection = text.parse().unwrap();
    assert_eq!(collection.features.len(), ds.districts.len());
    for (f, d) in collection.features.iter().zip(&ds.districts) {
        let props = f.properties.as_ref().unwrap();
        assert_eq!(props["id"], d.id.as_str());
        assert_eq!(props["name"], d.name.as_str());
        assert_eq!(props["seats"], d.seats);
        assert_eq!(props["region"], d.region.as_deref().unwrap());
    }
}

fn edge_owners(ds: &Dataset) -> BTreeMap<geometry::Edge, Vec<usize>> {
    let mut edges: BTreeMap<geometry::Edge, Vec<usize>> = BTreeMap::new();
    for (i, d) in ds.districts.iter().enumerate() {
        for p in &d.geometry.0 {
            for line in p.exterior().lines() {
                edges
                    .entry(geometry::to_edge(line.start, line.end))
                    .or_default()
                    .push(i);
            }
        }
    }
    edges
}

#[test]
fn neighbours_share_edges_and_lone_edges_lie_on_the_coast() {
    let demo = demo();
    let coast: Vec<Line<f64>> = demo
        .coastline
        .0
        .iter()
        .flat_map(|p| p.exterior().lines())
        .collect();
    let coast_distance = |c: Coord<f64>| {
        coast
            .iter()
            .map(|l| Euclidean.distance(&Point::from(c), l))
            .fold(f64::MAX, f64::min)
    };
    let mut shared = 0;
    for (&(a, b), owners) in &edge_owners(&demo.dataset) {
        assert!(
            owners.len() <= 2,
            "edge {a:?}-{b:?} is used {} times",
            owners.len()
        );
        if owners.len() == 2 {
            assert_ne!(owners[0], owners[1]);
            shared += 1;
            continue;
        }
        let mid = Coord {
            x: (a.0 + b.0) as f64 / 2.0 / COORD_SCALE,
            y: (a.1 + b.1) as f64 / 2.0 / COORD_SCALE,
        };
        assert!(
            coast_distance(mid) < 3e-5,
            "edge {a:?}-{b:?} of one district only is inland ({} degrees from the coast)",
            coast_distance(mid)
        );
    }
    assert!(
        shared > demo.dataset.districts.len(),
        "{shared} shared edges"
    );
}

#[test]
fn regions_are_few_and_contiguous() {
    let ds = &demo().dataset;
    let names: Vec<&str> = ds
        .districts
        .iter()
        .map(|d| d.region.as_deref().unwrap())
        .collect();
    let distinct: BTreeSet<&str> = names.iter().copied().collect();
    assert!((4..=6).contains(&distinct.len()), "{distinct:?}");
    let index: Vec<usize> = names
        .iter()
        .map(|n| distinct.iter().position(|d| d == n).unwrap())
        .collect();
    let shapes: Vec<MultiPolygon<f64>> = ds.districts.iter().map(|d| d.geometry.clone()).collect();
    let neighbours = demo::adjacency(&shapes);
    for (r, name) in distinct.iter().enumerate() {
        let parts = demo::components_of(&index, &neighbours, r);
        assert_eq!(parts.len(), 1, "region {name} is in {} pieces", parts.len());
    }
}

#[test]
fn the_baseline_is_close() {
    let ds = &demo().dataset;
    let tally = ds.tally(&vec![0.0; ds.groups.len()]).unwrap();
    let majority = ds.majority();
    assert!(
        tally.leader_seats().abs_diff(majority) <= 3,
        "leader {} seats, majority {majority}",
        tally.leader_seats()
    );
    assert!(
        tally.close_districts(3.0) >= 5,
        "{} close districts",
        tally.close_districts(3.0)
    );
    // Both axis parties win seats, and so does the third party.
    assert!(tally.seats.iter().all(|&s| s > 0), "{:?}", tally.seats);
}

#[test]
fn the_poll_is_plausible_and_differs_from_the_baseline() {
    let ds = &demo().dataset;
    assert_eq!(ds.poll.len(), ds.groups.len());
    let respondents: u32 = ds.poll.iter().map(|p| p.sample_size).sum();
    assert!(
        (1_500..=2_500).contains(&respondents),
        "{respondents} respondents"
    );
    for p in &ds.poll {
        assert!((60..=400).contains(&p.sample_size), "{}", p.sample_size);
        assert!((120..=180).contains(&p.design_effect));
        assert_eq!(p.shares.iter().sum::<u32>(), crate::model::POLL_UNITS);
    }
    let swing = ds.poll_swing().unwrap();
    let moved = swing.iter().filter(|s| s.abs() >= 1.0).count();
    assert!(moved * 2 >= swing.len(), "poll swings {swing:?}");
    assert!(
        swing.iter().all(|s| s.abs() <= 8.0),
        "poll swings {swing:?}"
    );
}

#[test]
fn presets_name_known_groups_only() {
    let ds = &demo().dataset;
    let groups: BTreeSet<&str> = ds.groups.iter().map(|g| g.id.as_str()).collect();
    assert!((2..=3).contains(&ds.presets.len()));
    for preset in &ds.presets {
        for pair in preset.scenario.split('&') {
            let (key, value) = pair.split_once('=').unwrap();
            match key {
                "turnout" | "margin" => {
                    for item in value.split(',') {
                        let (group, points) = item.split_once(':').unwrap();
                        assert!(group == "all" || groups.contains(group), "{group}");
                        let points: f64 = points.parse().unwrap();
                        assert!((-100.0..=100.0).contains(&points));
                    }
                }
                "start" => assert!(value == "poll" || value == "baseline"),
                other => panic!("unexpected key {other}"),
            }
        }
    }
}

#[test]
fn turnout_is_lower_for_the_young() {
    let ds = &demo().dataset;
    let mean = |g: &str| {
        let gi = ds.groups.iter().position(|x| x.id == g).unwrap();
        let rows: Vec<_> = ds.rows.iter().filter(|r| r.group == gi).collect();
        rows.iter().map(|r| f64::from(r.turnout)).sum::<f64>()
            / rows.len() as f64
            / f64::from(SHARE_UNITS)
    };
    assert!(mean("a18_29_nodeg") + 0.1 < mean("a60_74_nodeg"));
}

#[test]
fn benchmark_mode_never_overwrites_the_demo() {
    let dir = std::env::temp_dir().join(format!("stratamap-demo-guard-{}", std::process::id()));
    demo().dataset.write_to(&dir).unwrap();
    assert!(crate::check_bench_target(&dir).is_err());
    let size = crate::bench::BenchSize {
        districts: 20,
        groups: 3,
        parties: 2,
        shapes: crate::bench::Shapes::Irregular,
        vertices: 40,
    };
    let fresh = dir.join("bench");
    assert!(crate::check_bench_target(&fresh).is_ok());
    crate::bench::build(1, size)
        .unwrap()
        .write_to(&fresh)
        .unwrap();
    assert!(crate::check_bench_target(&fresh).is_ok());
    std::fs::remove_dir_all(&dir).unwrap();
}
