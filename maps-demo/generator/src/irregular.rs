//! Realistic district boundaries for large benchmark datasets: Voronoi cells on a jittered
//! hexagonal lattice, every edge replaced by an irregular line that both neighbours share
//! exactly (the line is drawn once per edge, then used forwards by one district and backwards
//! by the other), about a chosen number of vertices per district, inside a rough outline.
//!
//! Shapes are built in the local plane of [`Frame`] (degrees of latitude in both
//! directions), then rounded and snapped to longitude/latitude by [`Snapper`].

use std::collections::{BTreeMap, HashMap};
use std::f64::consts::{PI, TAU};

use geo::{
    BoundingRect, Contains, Coord, LineString, MultiPoint, MultiPolygon, Point, Polygon, Rect,
    Validation, Voronoi, VoronoiClip, VoronoiParams,
};
use rand::RngExt;
use rand_pcg::Pcg64;

use crate::geometry::{Frame, Snapper};

/// Distance between neighbouring district centres, in degrees of latitude (about 6.7 km).
pub const SPACING: f64 = 0.06;

/// Number of sine terms in each edge's wiggle.
const WIGGLE_TERMS: usize = 14;

/// Largest sideways swing of an edge's first term, as a fraction of its length.
const WIGGLE: f64 = 0.11;

/// A Voronoi vertex in units of 1e-9 degrees (the cells computed separately for two
/// neighbours agree on it far closer than that).
type Key = (i64, i64);

fn key(c: Coord<f64>) -> Key {
    ((c.x * 1e9).round() as i64, (c.y * 1e9).round() as i64)
}

/// Merges keys within one unit of a key seen before (floating-point noise).
#[derive(Default)]
struct KeySnap {
    known: HashMap<Key, Key>,
}

impl KeySnap {
    fn snap(&mut self, c: Coord<f64>) -> Key {
        let k = key(c);
        if let Some(&known) = self.known.get(&k) {
            return known;
        }
        for dx in -2..=2 {
            for dy in -2..=2 {
                if let Some(&known) = self.known.get(&(k.0 + dx, k.1 + dy)) {
                    self.known.insert(k, known);
                    return known;
                }
            }
        }
        self.known.insert(k, k);
        k
    }
}

/// The shape of one edge's wiggle: sine terms that vanish at both ends, so the line
/// always starts and ends at the Voronoi vertices.
#[derive(Debug, Clone)]
struct Wiggle {
    terms: Vec<f64>,
}

impl Wiggle {
    fn draw(rng: &mut Pcg64) -> Self {
        let terms = (1..=WIGGLE_TERMS)
            .map(|k| {
                let k = k as f64;
                let sign = if rng.random_bool(0.5) { 1.0 } else { -1.0 };
                sign * WIGGLE * rng.random_range(0.4..1.0) / k.powf(1.6)
            })
            .collect();
        Self { terms }
    }

    /// Sideways offset at `t` in [0, 1], as a fraction of the edge's length.
    fn at(&self, t: f64) -> f64 {
        self.terms
            .iter()
            .enumerate()
            .map(|(k, a)| a * ((k + 1) as f64 * PI * t).sin())
            .sum()
    }
}

/// An edge's line from its smaller vertex key to its larger one, end points included.
fn edge_line(
    a: Coord<f64>,
    b: Coord<f64>,
    wiggle: &Wiggle,
    damping: f64,
    segments: usize,
) -> Vec<Coord<f64>> {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    // The left normal, scaled by the length: offsets are fractions of the length.
    let (nx, ny) = (-dy, dx);
    (0..=segments)
        .map(|s| {
            let t = s as f64 / segments as f64;
            let off = if s == 0 || s == segments {
                0.0
            } else {
                wiggle.at(t) * damping
            };
            Coord {
                x: a.x + dx * t + nx * off,
                y: a.y + dy * t + ny * off,
            }
        })
        .collect()
}

/// Rough outline of the country: the kept sites are those with the smallest
/// `distance / radius(angle)`.
struct Outline {
    harmonics: Vec<(f64, f64, f64)>,
    rx: f64,
    ry: f64,
}

impl Outline {
    fn invent(rng: &mut Pcg64, area: f64) -> Self {
        let aspect = rng.random_range(1.1..1.5);
        let rx = (area * aspect / PI).sqrt();
        let harmonics = (2..=7)
            .map(|k| {
                let k = f64::from(k);
                (
                    k,
                    0.09 / k.powf(0.7) * rng.random_range(0.3..1.0),
                    rng.random_range(0.0..TAU),
                )
            })
            .collect();
        Self {
            harmonics,
            rx,
            ry: rx / aspect,
        }
    }

    fn depth(&self, c: Coord<f64>) -> f64 {
        let (u, v) = (c.x / self.rx, c.y / self.ry);
        let theta = v.atan2(u);
        let radius: f64 = 1.0
            + self
                .harmonics
                .iter()
                .map(|(k, a, phase)| a * (k * theta + phase).cos())
                .sum::<f64>();
        u.hypot(v) / radius.max(0.3)
    }
}

/// `count` districts with irregular shared boundaries of about `vertices` vertices each,
/// in longitude/latitude around (`lon0`, `lat0`), rounded to 5 decimals, exteriors
/// counter-clockwise. Every shape is valid (checked); the same generator state gives
/// the same shapes.
pub fn districts(
    rng: &mut Pcg64,
    count: usize,
    vertices: usize,
    lon0: f64,
    lat0: f64,
) -> Result<Vec<MultiPolygon<f64>>, String> {
    if count == 0 {
        return Err("at least one district is needed".into());
    }
    if !(12..=5_000).contains(&vertices) {
        return Err(format!("--vertices must be 12 to 5000, not {vertices}"));
    }
    let row_step = SPACING * 3f64.sqrt() / 2.0;
    let outline = Outline::invent(rng, count as f64 * SPACING * row_step);
    // Sites on a jittered hexagonal lattice over the outline's box and a margin.
    let (half_w, half_h) = (
        outline.rx * 1.7 + 2.0 * SPACING,
        outline.ry * 1.7 + 2.0 * SPACING,
    );
    let mut sites = Vec::new();
    let rows = (2.0 * half_h / row_step).ceil() as i64;
    let cols = (2.0 * half_w / SPACING).ceil() as i64;
    for j in 0..=rows {
        for i in 0..=cols {
            let shift = if j % 2 == 0 { 0.0 } else { SPACING / 2.0 };
            sites.push(Coord {
                x: -half_w + i as f64 * SPACING + shift + rng.random_range(-0.22..0.22) * SPACING,
                y: -half_h + j as f64 * row_step + rng.random_range(-0.22..0.22) * SPACING,
            });
        }
    }
    if sites.len() < count + 8 {
        return Err("too few lattice sites for the districts asked for".into());
    }
    let mut order: Vec<usize> = (0..sites.len()).collect();
    order.sort_by(|&a, &b| outline.depth(sites[a]).total_cmp(&outline.depth(sites[b])));
    let mut kept: Vec<usize> = order[..count].to_vec();
    // North to south, then west to east, so ids read like a map.
    kept.sort_by(|&a, &b| {
        let (ra, rb) = (
            ((sites[a].y - half_h) / row_step).round(),
            ((sites[b].y - half_h) / row_step).round(),
        );
        rb.total_cmp(&ra).then(sites[a].x.total_cmp(&sites[b].x))
    });
    let clip = Rect::new(
        Coord {
            x: -half_w - SPACING,
            y: -half_h - SPACING,
        },
        Coord {
            x: half_w + SPACING,
            y: half_h + SPACING,
        },
    );
    let points = MultiPoint::from(sites.iter().map(|&c| Point::from(c)).collect::<Vec<_>>());
    let clip_polygon = clip.to_polygon();
    let cells = points
        .voronoi_cells_with_params(VoronoiParams::new().clip(VoronoiClip::Polygon(&clip_polygon)))
        .map_err(|e| format!("Voronoi cells: {e}"))?;
    let cells = match_sites(&sites, cells, SPACING)?;

    // Each kept cell as a ring of snapped vertex keys (counter-clockwise, open).
    let mut snap = KeySnap::default();
    let mut corners: HashMap<Key, Coord<f64>> = HashMap::new();
    let mut rings: Vec<Vec<Key>> = Vec::with_capacity(count);
    for &s in &kept {
        let cell = cells[s]
            .as_ref()
            .ok_or_else(|| format!("site {s} has no Voronoi cell"))?;
        let ring = cell.exterior();
        let mut keys: Vec<Key> = Vec::with_capacity(ring.0.len());
        for &c in &ring.0 {
            let k = snap.snap(c);
            corners.entry(k).or_insert(c);
            if keys.last() != Some(&k) {
                keys.push(k);
            }
        }
        while keys.len() > 1 && keys.first() == keys.last() {
            keys.pop();
        }
        if keys.len() < 3 {
            return Err("a Voronoi cell collapsed".into());
        }
        if signed_area(&keys.iter().map(|k| corners[k]).collect::<Vec<_>>()) < 0.0 {
            keys.reverse();
        }
        rings.push(keys);
    }

    // One wiggle per edge, drawn in the order edges are first met (deterministic).
    let mean_edge = SPACING / 3f64.sqrt();
    let per_edge = (vertices as f64 / 6.0).max(2.0);
    let mut wiggles: BTreeMap<(Key, Key), (Wiggle, usize)> = BTreeMap::new();
    let mut edge_order: Vec<(Key, Key)> = Vec::new();
    for ring in &rings {
        for w in 0..ring.len() {
            let (a, b) = (ring[w], ring[(w + 1) % ring.len()]);
            let e = if a < b { (a, b) } else { (b, a) };
            if let std::collections::btree_map::Entry::Vacant(slot) = wiggles.entry(e) {
                let (ca, cb) = (corners[&e.0], corners[&e.1]);
                let len = (cb.x - ca.x).hypot(cb.y - ca.y);
                let segments =
                    ((len / mean_edge * per_edge).round() as usize).clamp(1, 4 * vertices);
                slot.insert((Wiggle::draw(rng), segments));
                edge_order.push(e);
            }
        }
    }

    // Build, check, and calm the edges of any district that came out invalid.
    let frame = Frame::new(lon0, lat0);
    let mut damping: HashMap<(Key, Key), f64> = HashMap::new();
    for _round in 0..8 {
        let mut lines: HashMap<(Key, Key), Vec<Coord<f64>>> =
            HashMap::with_capacity(edge_order.len());
        for e in &edge_order {
            let (wiggle, segments) = &wiggles[e];
            let d = damping.get(e).copied().unwrap_or(1.0);
            let segments = if d == 0.0 { 1 } else { *segments };
            lines.insert(
                *e,
                edge_line(corners[&e.0], corners[&e.1], wiggle, d, segments),
            );
        }
        let mut snapper = Snapper::new();
        let mut shapes = Vec::with_capacity(count);
        let mut bad: Vec<usize> = Vec::new();
        for (d, ring) in rings.iter().enumerate() {
            let mut coords: Vec<Coord<f64>> = Vec::new();
            for w in 0..ring.len() {
                let (a, b) = (ring[w], ring[(w + 1) % ring.len()]);
                let line = if a < b {
                    &lines[&(a, b)]
                } else {
                    &lines[&(b, a)]
                };
                let forward = a < b;
                let n = line.len();
                // Each edge without its last point; the next edge starts there.
                for s in 0..n - 1 {
                    coords.push(if forward { line[s] } else { line[n - 1 - s] });
                }
            }
            coords.push(coords[0]);
            let polygon = Polygon::new(LineString::new(coords), vec![]);
            let shape = snapper.shape(&MultiPolygon::new(vec![polygon]), |c| frame.to_lonlat(c));
            if shape.0.len() != 1 || !shape.is_valid() {
                bad.push(d);
            }
            shapes.push(shape);
        }
        if bad.is_empty() {
            return Ok(shapes);
        }
        for d in bad {
            let ring = &rings[d];
            for w in 0..ring.len() {
                let (a, b) = (ring[w], ring[(w + 1) % ring.len()]);
                let e = if a < b { (a, b) } else { (b, a) };
                let v = damping.entry(e).or_insert(1.0);
                *v = if *v < 0.2 { 0.0 } else { *v * 0.5 };
            }
        }
    }
    Err("could not make valid irregular districts".into())
}

fn signed_area(ring: &[Coord<f64>]) -> f64 {
    let n = ring.len();
    (0..n)
        .map(|i| {
            let (a, b) = (ring[i], ring[(i + 1) % n]);
            a.x * b.y - b.x * a.y
        })
        .sum::<f64>()
        / 2.0
}

/// The cell holding each of `sites` (spaced about `spacing` apart), found with a bucket
/// grid instead of testing every site against every cell.
fn match_sites(
    sites: &[Coord<f64>],
    cells: Vec<Polygon<f64>>,
    spacing: f64,
) -> Result<Vec<Option<Polygon<f64>>>, String> {
    let cell_of = |c: Coord<f64>| {
        (
            (c.x / spacing).floor() as i64,
            (c.y / spacing).floor() as i64,
        )
    };
    let mut buckets: HashMap<(i64, i64), Vec<usize>> = HashMap::new();
    for (i, &s) in sites.iter().enumerate() {
        buckets.entry(cell_of(s)).or_default().push(i);
    }
    let mut by_site: Vec<Option<Polygon<f64>>> = vec![None; sites.len()];
    for cell in cells {
        let bounds = cell.bounding_rect().ok_or("an empty Voronoi cell")?;
        let (lo, hi) = (cell_of(bounds.min()), cell_of(bounds.max()));
        let mut found = None;
        'search: for bx in lo.0..=hi.0 {
            for by in lo.1..=hi.1 {
                for &i in buckets.get(&(bx, by)).map(Vec::as_slice).unwrap_or(&[]) {
                    if cell.contains(&Point::from(sites[i])) {
                        found = Some(i);
                        break 'search;
                    }
                }
            }
        }
        // Pieces of cells cut by the clip box, far outside the districts, may hold none.
        if let Some(site) = found {
            if by_site[site].replace(cell).is_some() {
                return Err(format!("two Voronoi cells hold site {site}"));
            }
        }
    }
    Ok(by_site)
}

#[cfg(test)]
mod tests {
    use super::*;
    use geo::{Area, CoordsIter};
    use rand::SeedableRng;
    use std::collections::HashMap;

    type Segment = ((i64, i64), (i64, i64));

    fn segments(shape: &MultiPolygon<f64>) -> Vec<Segment> {
        let mut out = Vec::new();
        for p in &shape.0 {
            for l in p.exterior().lines() {
                let a = (
                    (l.start.x * 1e5).round() as i64,
                    (l.start.y * 1e5).round() as i64,
                );
                let b = (
                    (l.end.x * 1e5).round() as i64,
                    (l.end.y * 1e5).round() as i64,
                );
                out.push(if a < b { (a, b) } else { (b, a) });
            }
        }
        out
    }

    #[test]
    fn districts_are_valid_irregular_and_share_their_edges() {
        let mut rng = Pcg64::seed_from_u64(3);
        let shapes = districts(&mut rng, 120, 200, -158.0, -27.0).unwrap();
        assert_eq!(shapes.len(), 120);
        let mut uses: HashMap<Segment, u32> = HashMap::new();
        let mut total_vertices = 0;
        for s in &shapes {
            crate::geometry::check_shape(s).unwrap();
            total_vertices += s.coords_count() - 1;
            for e in segments(s) {
                *uses.entry(e).or_default() += 1;
            }
        }
        let mean = total_vertices as f64 / 120.0;
        assert!(
            (150.0..=250.0).contains(&mean),
            "{mean} vertices per district"
        );
        // No segment is used by more than two districts; most are used by exactly two
        // (the shared inland edges); the rest are the outline.
        assert!(uses.values().all(|&n| n <= 2));
        let shared = uses.values().filter(|&&n| n == 2).count();
        let single = uses.values().filter(|&&n| n == 1).count();
        assert!(shared > 3 * single, "shared {shared}, outline {single}");
        // Irregular: the boundary is far longer than the straight Voronoi edges would be
        // (a hexagon of side s has perimeter 6s; these wiggle).
        let perimeter: f64 = shapes
            .iter()
            .flat_map(|s| s.0.iter().flat_map(|p| p.exterior().lines()))
            .map(|l| (l.dx()).hypot(l.dy()))
            .sum::<f64>()
            / 120.0;
        assert!(
            perimeter > 6.0 * SPACING / 3f64.sqrt() * 1.02,
            "{perimeter}"
        );
        // No overlaps: the areas add up to the union's, up to rounding.
        let sum: f64 = shapes.iter().map(|s| s.unsigned_area()).sum();
        let union = shapes
            .iter()
            .skip(1)
            .fold(shapes[0].clone(), |acc, s| geo::BooleanOps::union(&acc, s));
        assert!(
            (union.unsigned_area() - sum).abs() / sum < 1e-6,
            "{} vs {sum}",
            union.unsigned_area()
        );
        // One piece without holes: the districts form one country.
        assert_eq!(union.0.len(), 1);
    }

    #[test]
    fn same_seed_same_shapes() {
        let a = districts(&mut Pcg64::seed_from_u64(8), 40, 60, 0.0, 0.0).unwrap();
        let b = districts(&mut Pcg64::seed_from_u64(8), 40, 60, 0.0, 0.0).unwrap();
        assert_eq!(a, b);
    }
}
