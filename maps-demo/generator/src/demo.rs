//! The committed demo: an invented island country with Voronoi districts, five regions,
//! ten groups (age band × degree) and three parties, tuned so the baseline is close.

use std::collections::{BTreeMap, BTreeSet, VecDeque};

use geo::{BoundingRect, Centroid, Coord, MultiPolygon};
use rand::{RngExt, SeedableRng};
use rand_pcg::Pcg64;

use crate::geometry::{self, normal, Frame, Land, Snapper};
use crate::model::{
    round_to_units, Dataset, District, Group, Party, PollRow, Preset, Row, POLL_UNITS, SHARE_UNITS,
};
use crate::names::NameGen;

pub const DEFAULT_SEED: u64 = 4217;
pub const DISTRICT_COUNT: usize = 96;
pub const REGION_COUNT: usize = 5;

/// Centre of the invented country: open ocean in the South Pacific.
const LON0: f64 = -153.4;
const LAT0: f64 = -33.8;

const AGE_BANDS: [(&str, &str); 5] = [
    ("a18_29", "18–29"),
    ("a30_44", "30–44"),
    ("a45_59", "45–59"),
    ("a60_74", "60–74"),
    ("a75_plus", "75 and over"),
];
/// Share of adults in each age band, before the urban shift.
const AGE_MIX: [f64; 5] = [0.20, 0.26, 0.26, 0.18, 0.10];
/// Urban districts are younger: added to the age mix times urbanity.
const AGE_URBAN: [f64; 5] = [0.07, 0.04, -0.02, -0.05, -0.04];
/// Share with a degree in each age band, at average urbanity.
const DEGREE_SHARE: [f64; 5] = [0.40, 0.42, 0.32, 0.24, 0.16];
/// Baseline turnout by age band; a degree adds `DEGREE_TURNOUT`.
const AGE_TURNOUT: [f64; 5] = [0.47, 0.58, 0.68, 0.76, 0.71];
const DEGREE_TURNOUT: f64 = 0.08;
/// Logit of the first axis party against the second, by age band; a degree adds `DEGREE_LEAN`.
const AGE_LEAN: [f64; 5] = [0.50, 0.28, 0.0, -0.25, -0.42];
const DEGREE_LEAN: f64 = 0.35;
const URBAN_LEAN: f64 = 0.9;
/// Logit of the third party against the second, by age band.
const THIRD_AGE: [f64; 5] = [0.15, 0.1, 0.0, -0.1, -0.2];
const THIRD_BASE: f64 = -1.7;
const THIRD_STRONGHOLD: f64 = 1.6;

/// Everything the demo is made of, with the quantities the summary reports.
#[derive(Debug, Clone)]
pub struct Demo {
    pub dataset: Dataset,
    /// Coastline rings after rounding, longitude/latitude.
    pub coastline: MultiPolygon<f64>,
    /// Districts whose clipped cell came out in more than one piece (besides the island).
    pub split_cells: usize,
    /// The lean added to the first axis party to make the election close.
    pub lean: f64,
}

struct Latent {
    eligible: u64,
    turnout: u32,
    /// Logits of (A, C) against B, without the tuned national lean.
    lean_a: f64,
    lean_c: f64,
}

fn parties() -> Vec<Party> {
    vec![
        Party {
            id: "tideline".into(),
            name: "Tideline Union".into(),
            color: "#1c8c8c".into(),
        },
        Party {
            id: "ember".into(),
            name: "Ember Commonwealth".into(),
            color: "#e3a21a".into(),
        },
        Party {
            id: "orchard".into(),
            name: "Orchard Movement".into(),
            color: "#6a3d7c".into(),
        },
    ]
}

fn groups() -> Vec<Group> {
    let mut out = Vec::new();
    for (id, label) in AGE_BANDS {
        out.push(Group {
            id: format!("{id}_deg"),
            name: format!("Age {label}, degree"),
        });
        out.push(Group {
            id: format!("{id}_nodeg"),
            name: format!("Age {label}, no degree"),
        });
    }
    out
}

fn softmax3(a: f64, c: f64) -> [f64; 3] {
    // Order: A, B, C; B is the reference with logit 0.
    let m = a.max(c).max(0.0);
    let (ea, eb, ec) = ((a - m).exp(), (-m).exp(), (c - m).exp());
    let s = ea + eb + ec;
    [ea / s, eb / s, ec / s]
}

/// Districts linked by a shared boundary edge (identical rounded vertices).
pub fn adjacency(districts: &[MultiPolygon<f64>]) -> Vec<BTreeSet<usize>> {
    let mut edges: BTreeMap<geometry::Edge, BTreeSet<usize>> = BTreeMap::new();
    for (d, shape) in districts.iter().enumerate() {
        for p in &shape.0 {
            for ring in std::iter::once(p.exterior()).chain(p.interiors()) {
                for line in ring.lines() {
                    edges
                        .entry(geometry::to_edge(line.start, line.end))
                        .or_default()
                        .insert(d);
                }
            }
        }
    }
    let mut neighbours = vec![BTreeSet::new(); districts.len()];
    for owners in edges.values() {
        for &a in owners {
            for &b in owners {
                if a != b {
                    neighbours[a].insert(b);
                }
            }
        }
    }
    neighbours
}

/// Regions by nearest region centre (k-means on district centres), then any piece of a
/// region cut off from its main part is handed to the neighbouring region it touches most.
fn assign_regions(
    rng: &mut Pcg64,
    centres: &[Coord<f64>],
    neighbours: &[BTreeSet<usize>],
    k: usize,
) -> Vec<usize> {
    // Farthest-point start, then a few k-means steps.
    let mut seeds = vec![centres[rng.random_range(0..centres.len())]];
    while seeds.len() < k {
        let far = centres
            .iter()
            .copied()
            .max_by(|a, b| {
                let da = seeds.iter().map(|s| dist(*s, *a)).fold(f64::MAX, f64::min);
                let db = seeds.iter().map(|s| dist(*s, *b)).fold(f64::MAX, f64::min);
                da.total_cmp(&db)
            })
            .unwrap_or(seeds[0]);
        seeds.push(far);
    }
    let nearest = |seeds: &[Coord<f64>], c: Coord<f64>| {
        (0..seeds.len())
            .min_by(|&i, &j| dist(seeds[i], c).total_cmp(&dist(seeds[j], c)))
            .unwrap_or(0)
    };
    let mut region: Vec<usize> = centres.iter().map(|&c| nearest(&seeds, c)).collect();
    for _ in 0..8 {
        for (r, seed) in seeds.iter_mut().enumerate() {
            let members: Vec<Coord<f64>> = centres
                .iter()
                .zip(&region)
                .filter(|(_, &g)| g == r)
                .map(|(c, _)| *c)
                .collect();
            if !members.is_empty() {
                let n = members.len() as f64;
                *seed = Coord {
                    x: members.iter().map(|c| c.x).sum::<f64>() / n,
                    y: members.iter().map(|c| c.y).sum::<f64>() / n,
                };
            }
        }
        region = centres.iter().map(|&c| nearest(&seeds, c)).collect();
    }
    // Contiguity repair.
    loop {
        let mut moved = false;
        for r in 0..k {
            let components = components_of(&region, neighbours, r);
            if components.len() <= 1 {
                continue;
            }
            for component in components.iter().skip(1) {
                let mut touching: BTreeMap<usize, usize> = BTreeMap::new();
                for &d in component {
                    for &n in &neighbours[d] {
                        if region[n] != r {
                            *touching.entry(region[n]).or_default() += 1;
                        }
                    }
                }
                if let Some((&to, _)) = touching
                    .iter()
                    .max_by(|a, b| a.1.cmp(b.1).then(b.0.cmp(a.0)))
                {
                    for &d in component {
                        region[d] = to;
                    }
                    moved = true;
                }
            }
        }
        if !moved {
            break;
        }
    }
    region
}

/// The connected pieces of region `r`, largest first.
pub fn components_of(
    region: &[usize],
    neighbours: &[BTreeSet<usize>],
    r: usize,
) -> Vec<Vec<usize>> {
    let mut seen = vec![false; region.len()];
    let mut components = Vec::new();
    for start in 0..region.len() {
        if region[start] != r || seen[start] {
            continue;
        }
        let mut component = Vec::new();
        let mut queue = VecDeque::from([start]);
        seen[start] = true;
        while let Some(d) = queue.pop_front() {
            component.push(d);
            for &n in &neighbours[d] {
                if region[n] == r && !seen[n] {
                    seen[n] = true;
                    queue.push_back(n);
                }
            }
        }
        component.sort_unstable();
        components.push(component);
    }
    components.sort_by(|a, b| b.len().cmp(&a.len()).then(a[0].cmp(&b[0])));
    components
}

fn dist(a: Coord<f64>, b: Coord<f64>) -> f64 {
    (a.x - b.x).hypot(a.y - b.y)
}

/// Rows of the electorate with a given national lean added to the first axis party.
fn rows_with_lean(latent: &[Vec<Latent>], lean: f64) -> Vec<Row> {
    let mut rows = Vec::new();
    for (d, groups) in latent.iter().enumerate() {
        for (g, l) in groups.iter().enumerate() {
            let shares = softmax3(l.lean_a + lean, l.lean_c);
            rows.push(Row {
                district: d,
                group: g,
                eligible: l.eligible,
                turnout: l.turnout,
                shares: round_to_units(&shares, SHARE_UNITS),
            });
        }
    }
    rows
}

pub fn build(seed: u64) -> Result<Demo, String> {
    let mut rng = Pcg64::seed_from_u64(seed);
    let frame = Frame::new(LON0, LAT0);

    // Names first, so that changing the shapes does not rename the country.
    let mut names = NameGen::new();
    let country = names.country(&mut rng);
    let region_names: Vec<String> = (0..REGION_COUNT).map(|_| names.place(&mut rng)).collect();
    let district_names: Vec<String> = (0..DISTRICT_COUNT).map(|_| names.place(&mut rng)).collect();

    // Coastline, cities, district cells.
    let land = Land::invent(&mut rng);
    let bounds = land
        .mainland
        .bounding_rect()
        .ok_or("the coastline is empty")?;
    let mut cities: Vec<(Coord<f64>, f64)> = Vec::new();
    let city_weights = [1.0, 0.75, 0.55];
    while cities.len() < city_weights.len() {
        let c = Coord {
            x: rng.random_range(bounds.min().x * 0.7..bounds.max().x * 0.7),
            y: rng.random_range(bounds.min().y * 0.7..bounds.max().y * 0.7),
        };
        if land.contains(c) && cities.iter().all(|(o, _)| dist(*o, c) > 1.4) {
            cities.push((c, city_weights[cities.len()]));
        }
    }
    let sites = geometry::district_sites(&mut rng, &land, &cities, DISTRICT_COUNT, 0.12, 2)?;
    let cells = geometry::clip_cells(
        &geometry::voronoi_cells(&sites, geometry::padded(bounds, 0.5))?,
        &land,
    );
    let split_cells = cells.iter().filter(|c| c.0.len() > 1).count();

    // The island joins the district whose centre is nearest to it.
    let island_centre = land
        .island
        .centroid()
        .ok_or("the island has no centroid")?
        .0;
    let island_district = (0..sites.len())
        .min_by(|&i, &j| dist(sites[i], island_centre).total_cmp(&dist(sites[j], island_centre)))
        .ok_or("no districts")?;

    let mut snapper = Snapper::new();
    let to_lonlat = |c: Coord<f64>| frame.to_lonlat(c);
    let mut shapes: Vec<MultiPolygon<f64>> = Vec::with_capacity(cells.len());
    for (i, cell) in cells.iter().enumerate() {
        let mut shape = cell.clone();
        if i == island_district {
            shape.0.push(land.island.clone());
        }
        let shape = snapper.shape(&shape, to_lonlat);
        geometry::check_shape(&shape).map_err(|e| format!("district cell {i}: {e}"))?;
        shapes.push(shape);
    }
    let coastline = snapper.shape(
        &MultiPolygon::new(vec![land.mainland.clone(), land.island.clone()]),
        to_lonlat,
    );

    // Urbanity of each district: closeness to a city.
    let urbanity: Vec<f64> = sites
        .iter()
        .map(|&s| {
            cities
                .iter()
                .map(|(c, w)| w * (-dist(*c, s).powi(2) / (2.0 * 0.4f64.powi(2))).exp())
                .fold(0.0, f64::max)
                .min(1.0)
        })
        .collect();

    // Regions, ordered west to east.
    let neighbours = adjacency(&shapes);
    let region_raw = assign_regions(&mut rng, &sites, &neighbours, REGION_COUNT);
    let mut region_x: Vec<(f64, usize)> = (0..REGION_COUNT)
        .map(|r| {
            let xs: Vec<f64> = sites
                .iter()
                .zip(&region_raw)
                .filter(|(_, &g)| g == r)
                .map(|(s, _)| s.x)
                .collect();
            (xs.iter().sum::<f64>() / xs.len().max(1) as f64, r)
        })
        .collect();
    region_x.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
    let mut region_rank = [0usize; REGION_COUNT];
    for (rank, (_, r)) in region_x.iter().enumerate() {
        region_rank[*r] = rank;
    }
    let region: Vec<usize> = region_raw.iter().map(|&r| region_rank[r]).collect();

    // District order: by region, then in bands from north to south, west to east.
    let mut order: Vec<usize> = (0..sites.len()).collect();
    order.sort_by(|&i, &j| {
        let band = |k: usize| (-sites[k].y / 0.45).floor() as i64;
        region[i]
            .cmp(&region[j])
            .then(band(i).cmp(&band(j)))
            .then(sites[i].x.total_cmp(&sites[j].x))
    });

    // Seats: the most urban districts are the big multi-member ones.
    let mut by_urbanity: Vec<usize> = (0..sites.len()).collect();
    by_urbanity.sort_by(|&i, &j| urbanity[j].total_cmp(&urbanity[i]).then(i.cmp(&j)));
    let mut seats = vec![1u32; sites.len()];
    for (rank, &d) in by_urbanity.iter().enumerate() {
        seats[d] = match rank {
            0..=2 => 3,
            3..=10 => 2,
            _ => 1,
        };
    }

    // Regional character.
    let stronghold = rng.random_range(0..REGION_COUNT);
    let region_lean: Vec<f64> = (0..REGION_COUNT).map(|_| normal(&mut rng, 0.22)).collect();
    let region_third: Vec<f64> = (0..REGION_COUNT)
        .map(|r| {
            if r == stronghold {
                THIRD_STRONGHOLD
            } else {
                normal(&mut rng, 0.15)
            }
        })
        .collect();
    let region_turnout: Vec<f64> = (0..REGION_COUNT).map(|_| normal(&mut rng, 0.025)).collect();

    let groups = groups();
    let mut latent: Vec<Vec<Latent>> = Vec::with_capacity(sites.len());
    for &d in &order {
        let u = urbanity[d];
        let r = region[d];
        let adults =
            52_000.0 * f64::from(seats[d]) * (normal(&mut rng, 0.12)).exp() * (1.0 + 0.15 * u);
        let mut mix: Vec<f64> = (0..AGE_BANDS.len())
            .map(|a| ((AGE_MIX[a] + AGE_URBAN[a] * u) * normal(&mut rng, 0.08).exp()).max(0.02))
            .collect();
        let total: f64 = mix.iter().sum();
        mix.iter_mut().for_each(|m| *m /= total);
        let district_lean = normal(&mut rng, 0.2);
        let district_third = normal(&mut rng, 0.15);
        let district_turnout = normal(&mut rng, 0.03);
        let mut cells = Vec::with_capacity(groups.len());
        for a in 0..AGE_BANDS.len() {
            let degree = (DEGREE_SHARE[a] * (0.65 + 0.8 * u) * normal(&mut rng, 0.1).exp())
                .clamp(0.03, 0.85);
            for has_degree in [true, false] {
                let part = if has_degree { degree } else { 1.0 - degree };
                let eligible = (adults * mix[a] * part).round().max(1.0) as u64;
                let turnout = (AGE_TURNOUT[a]
                    + if has_degree { DEGREE_TURNOUT } else { 0.0 }
                    + region_turnout[r]
                    + district_turnout
                    + normal(&mut rng, 0.015))
                .clamp(0.15, 0.95);
                let lean_a = AGE_LEAN[a]
                    + if has_degree { DEGREE_LEAN } else { 0.0 }
                    + URBAN_LEAN * (u - 0.3)
                    + region_lean[r]
                    + district_lean
                    + normal(&mut rng, 0.05);
                let lean_c = THIRD_BASE
                    + THIRD_AGE[a]
                    + if has_degree { 0.1 } else { 0.0 }
                    + region_third[r]
                    + district_third
                    + normal(&mut rng, 0.05);
                cells.push(Latent {
                    eligible,
                    turnout: (turnout * f64::from(SHARE_UNITS)).round() as u32,
                    lean_a,
                    lean_c,
                });
            }
        }
        latent.push(cells);
    }

    let parties = parties();
    let districts: Vec<District> = order
        .iter()
        .enumerate()
        .map(|(n, &d)| District {
            id: format!("d{:02}", n + 1),
            name: district_names[n].clone(),
            seats: seats[d],
            region: Some(region_names[region[d]].clone()),
            geometry: shapes[d].clone(),
        })
        .collect();
    let mut dataset = Dataset {
        title: format!("{country} general election (invented demo)"),
        source: format!(
            "Invented demo data for stratamap (generated by maps-demo/generator, seed {seed}); \
             not a real country or election."
        ),
        parties,
        axis: [0, 1],
        groups,
        districts,
        rows: Vec::new(),
        poll: Vec::new(),
        presets: Vec::new(),
    };

    // Tune the national lean: the seat leader one short of a majority, as many close
    // districts as possible, and the smallest lean that does it.
    let majority = dataset.majority();
    let no_shift = vec![0.0; dataset.groups.len()];
    let mut best: Option<(u32, usize, f64)> = None;
    for step in -400..=400 {
        let lean = f64::from(step) * 0.002;
        dataset.rows = rows_with_lean(&latent, lean);
        let tally = dataset.tally(&no_shift)?;
        let miss = tally.leader_seats().abs_diff(majority - 1);
        let close = tally.close_districts(3.0);
        let better = match best {
            None => true,
            Some((m, c, l)) => {
                (miss, std::cmp::Reverse(close), lean.abs()) < (m, std::cmp::Reverse(c), l.abs())
            }
        };
        if better {
            best = Some((miss, close, lean));
        }
    }
    let (_, _, lean) = best.ok_or("no lean tried")?;
    dataset.rows = rows_with_lean(&latent, lean);

    // The poll: each group's nationwide baseline, moved a few points.
    let weights = group_weights(&dataset);
    let baseline = group_shares(&dataset);
    let young_factor = [0.8, 0.9, 1.0, 1.1, 1.05];
    for (g, shares) in baseline.iter().enumerate() {
        let swing = normal(&mut rng, 3.0).clamp(-6.0, 6.0) / 100.0;
        let third = normal(&mut rng, 1.2).clamp(-3.0, 3.0) / 100.0;
        let a = shares[0] + swing / 2.0 - third / 2.0;
        let b = shares[1] - swing / 2.0 - third / 2.0;
        let c = shares[2] + third;
        let sample = (2_000.0 * weights[g] * young_factor[g / 2] * normal(&mut rng, 0.12).exp())
            .round()
            .clamp(60.0, 400.0) as u32;
        let design_effect = rng.random_range(120..=180);
        dataset.poll.push(PollRow {
            group: g,
            sample_size: sample,
            shares: round_to_units(&[a.max(0.0), b.max(0.0), c.max(0.0)], POLL_UNITS),
            design_effect,
        });
    }

    let [a, b] = dataset.axis;
    let a_name = dataset.parties[a].name.clone();
    let b_name = dataset.parties[b].name.clone();
    dataset.presets = vec![
        Preset {
            name: "Young voters turn out: 8 points more under 30, 4 more from 30 to 44".into(),
            scenario: "turnout=a18_29_deg:8,a18_29_nodeg:8,a30_44_deg:4,a30_44_nodeg:4".into(),
        },
        Preset {
            name: "Older voters stay home: 5 points fewer from 60 to 74, 7 fewer over 75 (from the dataset's figures, not the poll)".into(),
            scenario: "turnout=a60_74_deg:-5,a60_74_nodeg:-5,a75_plus_deg:-7,a75_plus_nodeg:-7&start=baseline"
                .into(),
        },
        Preset {
            name: format!(
                "{b_name}'s lead 2 points better everywhere (1 point of vote share from {a_name}; from the dataset's figures, not the poll)"
            ),
            scenario: "margin=all:-2&start=baseline".into(),
        },
    ];

    Ok(Demo {
        dataset,
        coastline,
        split_cells,
        lean,
    })
}

/// Each group's share of baseline votes cast.
pub fn group_weights(ds: &Dataset) -> Vec<f64> {
    let mut w = vec![0.0; ds.groups.len()];
    for r in &ds.rows {
        w[r.group] += r.eligible as f64 * f64::from(r.turnout) / f64::from(SHARE_UNITS);
    }
    let total: f64 = w.iter().sum();
    w.iter().map(|x| x / total).collect()
}

/// Each group's nationwide baseline vote shares, weighted by votes cast.
pub fn group_shares(ds: &Dataset) -> Vec<Vec<f64>> {
    let np = ds.parties.len();
    let mut sums = vec![vec![0.0; np]; ds.groups.len()];
    let mut cast = vec![0.0; ds.groups.len()];
    for r in &ds.rows {
        let v = r.eligible as f64 * f64::from(r.turnout) / f64::from(SHARE_UNITS);
        cast[r.group] += v;
        for (k, &s) in r.shares.iter().enumerate() {
            sums[r.group][k] += v * f64::from(s) / f64::from(SHARE_UNITS);
        }
    }
    sums.iter()
        .zip(&cast)
        .map(|(s, c)| s.iter().map(|x| x / c.max(f64::MIN_POSITIVE)).collect())
        .collect()
}
