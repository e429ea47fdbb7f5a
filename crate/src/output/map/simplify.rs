//! Outline simplification in SVG units: Ramer–Douglas–Peucker (geo's
//! [`Simplify`]), never leaving a ring too small to be one.
//!
//! [`simplify_shared`] simplifies a whole map at once and keeps its topology: every
//! stretch of boundary between two junctions (an *arc*, as in a topological map) is
//! simplified once, and each district that uses it takes the same result, so neighbours
//! still meet exactly (no gaps, no overlapping slivers). [`SimplifyOutline`] works on one
//! geometry alone, ring by ring.

use std::collections::HashMap;

use geo::{Coord, LineString, MultiPolygon, Polygon, Simplify};

/// Default tolerance in SVG user units: detail finer than a quarter of a unit
/// (well under a screen pixel at the usual sizes) is dropped.
pub const DEFAULT_EPSILON: f64 = 0.25;

/// Fewest coordinates of a closed ring (a triangle plus its closing point).
pub const MIN_RING_COORDS: usize = 4;

/// Simplifies the outlines of a polygonal geometry.
///
/// Each ring (exterior and holes) is simplified on its own: points closer
/// than `epsilon` to the previous point kept are dropped, then
/// Ramer–Douglas–Peucker runs at tolerance `epsilon`; a ring that would drop below
/// [`MIN_RING_COORDS`] coordinates is kept as it was. A non-positive or
/// non-finite `epsilon` leaves the geometry unchanged.
///
/// ```
/// use geo::{polygon, Area};
/// use stratamap::output::map::simplify::SimplifyOutline;
/// // A square whose bottom edge carries points 0.1 units off the line.
/// let square = polygon![
///     (x: 0.0, y: 0.0), (x: 2.0, y: 0.1), (x: 4.0, y: 0.0), (x: 6.0, y: -0.1),
///     (x: 10.0, y: 0.0), (x: 10.0, y: 10.0), (x: 0.0, y: 10.0),
/// ];
/// let simple = square.simplify_outline(0.25);
/// assert_eq!(simple.exterior().0.len(), 5);
/// assert!((simple.unsigned_area() - square.unsigned_area()).abs() < 1.0);
/// ```
pub trait SimplifyOutline {
    /// The simplified geometry.
    fn simplify_outline(&self, epsilon: f64) -> Self;
}

/// Drops each point closer than `tolerance` to the last point kept (the first
/// and last points are always kept). A linear pre-pass (common practice before
/// Ramer–Douglas–Peucker) that makes dense sub-pixel outlines cheap to simplify.
fn radial_filter(ring: &LineString<f64>, tolerance: f64) -> LineString<f64> {
    let coords = &ring.0;
    let Some((&last, inner)) = coords.split_last() else {
        return ring.clone();
    };
    let tol2 = tolerance * tolerance;
    let mut kept: Vec<Coord<f64>> = Vec::with_capacity(coords.len());
    for &c in inner {
        match kept.last() {
            Some(p) if (c.x - p.x).powi(2) + (c.y - p.y).powi(2) < tol2 => {}
            _ => kept.push(c),
        }
    }
    kept.push(last);
    LineString::new(kept)
}

fn simplify_ring(ring: &LineString<f64>, epsilon: f64) -> LineString<f64> {
    if !(epsilon.is_finite() && epsilon > 0.0) || ring.0.len() <= MIN_RING_COORDS {
        return ring.clone();
    }
    let simple = radial_filter(ring, epsilon).simplify(epsilon);
    if simple.0.len() < MIN_RING_COORDS {
        ring.clone()
    } else {
        simple
    }
}

impl SimplifyOutline for Polygon<f64> {
    fn simplify_outline(&self, epsilon: f64) -> Self {
        Polygon::new(
            simplify_ring(self.exterior(), epsilon),
            self.interiors()
                .iter()
                .map(|r| simplify_ring(r, epsilon))
                .collect(),
        )
    }
}

impl SimplifyOutline for MultiPolygon<f64> {
    fn simplify_outline(&self, epsilon: f64) -> Self {
        MultiPolygon::new(self.iter().map(|p| p.simplify_outline(epsilon)).collect())
    }
}

/// A vertex's identity: the exact bits of its coordinates. Neighbours that share a
/// vertex in the input share these bits after the same projection.
type VertexKey = (u64, u64);

fn vertex_key(c: Coord<f64>) -> VertexKey {
    // Adding 0.0 makes -0 and 0 the same vertex.
    ((c.x + 0.0).to_bits(), (c.y + 0.0).to_bits())
}

/// The distinct neighbours of one vertex over all rings: up to two, then "more".
#[derive(Clone, Copy, Default)]
struct Neighbours {
    seen: [Option<u32>; 2],
    more: bool,
}

impl Neighbours {
    fn add(&mut self, v: u32) {
        match self.seen {
            [Some(a), _] if a == v => {}
            [_, Some(b)] if b == v => {}
            [None, _] => self.seen[0] = Some(v),
            [_, None] => self.seen[1] = Some(v),
            _ => self.more = true,
        }
    }

    /// A vertex where boundaries meet or end: not exactly two distinct neighbours.
    fn is_junction(&self) -> bool {
        self.more || self.seen[1].is_none()
    }
}

/// Where an arc lives in a ring and in which direction it is stored.
struct ArcUse {
    arc: usize,
    forward: bool,
}

/// Simplifies every arc of `points` (vertex ids in order) with tolerance `epsilon`,
/// keeping both ends; a closed arc keeps its farthest point too, so it stays a ring.
fn simplify_arc(points: &[Coord<f64>], epsilon: f64) -> Vec<Coord<f64>> {
    if points.len() <= 2 {
        return points.to_vec();
    }
    let (first, last) = (points[0], points[points.len() - 1]);
    if first == last {
        let far = (1..points.len() - 1)
            .max_by(|&a, &b| {
                let d = |i: usize| (points[i].x - first.x).hypot(points[i].y - first.y);
                d(a).total_cmp(&d(b))
            })
            .unwrap_or(1);
        let mut out = simplify_arc(&points[..=far], epsilon);
        out.pop();
        out.extend(simplify_arc(&points[far..], epsilon));
        return out;
    }
    let line = radial_filter(&LineString::new(points.to_vec()), epsilon);
    line.simplify(epsilon).0
}

/// Simplifies a whole map's outlines (in SVG units) so that neighbours still share
/// their boundaries exactly.
///
/// Rings are cut into arcs at junctions, vertices with other than two distinct
/// neighbours over all rings (where three districts meet, or where a shared boundary
/// reaches the coast); a ring with no junction is cut at its smallest vertex, so a loop
/// shared by a hole and an island is cut at the same place on both. Each arc is
/// simplified once (radial filter, then Ramer–Douglas–Peucker at `epsilon`, both ends
/// kept) and every ring that uses it, in either direction, takes the result. A ring
/// that would fall below [`MIN_RING_COORDS`] coordinates keeps its arcs unsimplified,
/// and so do its neighbours along those arcs. Vertices are matched by their exact
/// coordinates: districts that share edges in the input share them here. A
/// non-positive or non-finite `epsilon` leaves the shapes unchanged.
///
/// ```
/// use geo::{polygon, CoordsIter, MultiPolygon};
/// use stratamap::output::map::simplify::simplify_shared;
/// // Two squares whose shared edge x = 10 wiggles by 0.1 units.
/// let west = polygon![(x: 0.0, y: 0.0), (x: 10.0, y: 0.0), (x: 10.1, y: 3.0), (x: 9.9, y: 6.0),
///                     (x: 10.0, y: 10.0), (x: 0.0, y: 10.0)];
/// let east = polygon![(x: 10.0, y: 0.0), (x: 20.0, y: 0.0), (x: 20.0, y: 10.0), (x: 10.0, y: 10.0),
///                     (x: 9.9, y: 6.0), (x: 10.1, y: 3.0)];
/// let out = simplify_shared(&[MultiPolygon::new(vec![west]), MultiPolygon::new(vec![east])], 0.25);
/// // The wiggle is gone from both, and both still run straight from (10, 0) to (10, 10).
/// assert_eq!(out[0].coords_count(), 5);
/// assert_eq!(out[1].coords_count(), 5);
/// ```
pub fn simplify_shared(shapes: &[MultiPolygon<f64>], epsilon: f64) -> Vec<MultiPolygon<f64>> {
    if !(epsilon.is_finite() && epsilon > 0.0) {
        return shapes.to_vec();
    }
    // 1. Vertex ids, and every ring as an open list of ids.
    let mut ids: HashMap<VertexKey, u32> = HashMap::new();
    let mut coords: Vec<Coord<f64>> = Vec::new();
    let mut rings: Vec<Vec<u32>> = Vec::new();
    // For each shape, for each polygon: the indices of its rings in `rings`.
    let mut layout: Vec<Vec<Vec<usize>>> = Vec::with_capacity(shapes.len());
    for shape in shapes {
        let mut polygons = Vec::with_capacity(shape.0.len());
        for polygon in shape {
            let mut indices = Vec::with_capacity(1 + polygon.interiors().len());
            for ring in std::iter::once(polygon.exterior()).chain(polygon.interiors()) {
                let mut ring_ids: Vec<u32> = Vec::with_capacity(ring.0.len());
                for &c in &ring.0 {
                    let next = ids.len() as u32;
                    let id = *ids.entry(vertex_key(c)).or_insert_with(|| {
                        coords.push(c);
                        next
                    });
                    if ring_ids.last() != Some(&id) {
                        ring_ids.push(id);
                    }
                }
                while ring_ids.len() > 1 && ring_ids.first() == ring_ids.last() {
                    ring_ids.pop();
                }
                indices.push(rings.len());
                rings.push(ring_ids);
            }
            polygons.push(indices);
        }
        layout.push(polygons);
    }

    // 2. Junctions.
    let mut neighbours = vec![Neighbours::default(); coords.len()];
    for ring in &rings {
        let n = ring.len();
        for i in 0..n {
            let v = ring[i] as usize;
            neighbours[v].add(ring[(i + n - 1) % n]);
            neighbours[v].add(ring[(i + 1) % n]);
        }
    }
    let mut junction: Vec<bool> = neighbours.iter().map(Neighbours::is_junction).collect();
    for ring in &rings {
        if !ring.is_empty() && !ring.iter().any(|&v| junction[v as usize]) {
            let smallest = ring
                .iter()
                .copied()
                .min_by(|&a, &b| {
                    let (ca, cb) = (coords[a as usize], coords[b as usize]);
                    ca.x.total_cmp(&cb.x).then(ca.y.total_cmp(&cb.y))
                })
                .unwrap_or(ring[0]);
            junction[smallest as usize] = true;
        }
    }

    // 3. Arcs: each stored once, in the direction whose first two ids are smaller.
    let mut arc_ids: HashMap<(u32, u32), usize> = HashMap::new();
    let mut arcs: Vec<Vec<u32>> = Vec::new();
    let mut ring_arcs: Vec<Vec<ArcUse>> = Vec::with_capacity(rings.len());
    for ring in &rings {
        let n = ring.len();
        let mut uses = Vec::new();
        if n < 3 {
            ring_arcs.push(uses);
            continue;
        }
        let start = (0..n).find(|&i| junction[ring[i] as usize]).unwrap_or(0);
        let mut i = start;
        loop {
            let mut arc = vec![ring[i]];
            let mut j = (i + 1) % n;
            loop {
                arc.push(ring[j]);
                if junction[ring[j] as usize] || j == start {
                    break;
                }
                j = (j + 1) % n;
            }
            let m = arc.len();
            let forward = (arc[0], arc[1]) <= (arc[m - 1], arc[m - 2]);
            let key = if forward {
                (arc[0], arc[1])
            } else {
                (arc[m - 1], arc[m - 2])
            };
            let index = *arc_ids.entry(key).or_insert_with(|| {
                if !forward {
                    arc.reverse();
                }
                arcs.push(arc);
                arcs.len() - 1
            });
            uses.push(ArcUse {
                arc: index,
                forward,
            });
            i = j;
            if i == start {
                break;
            }
        }
        ring_arcs.push(uses);
    }

    // 4. Simplify each arc once; rings that would collapse keep their arcs whole.
    let points =
        |arc: &[u32]| -> Vec<Coord<f64>> { arc.iter().map(|&v| coords[v as usize]).collect() };
    let mut keep = vec![false; arcs.len()];
    let mut simple: Vec<Vec<Coord<f64>>> = arcs
        .iter()
        .map(|a| simplify_arc(&points(a), epsilon))
        .collect();
    let build = |uses: &[ArcUse], simple: &[Vec<Coord<f64>>]| -> Vec<Coord<f64>> {
        let mut out: Vec<Coord<f64>> = Vec::new();
        for u in uses {
            let arc = &simple[u.arc];
            let mut pts: Vec<Coord<f64>> = if u.forward {
                arc.clone()
            } else {
                arc.iter().rev().copied().collect()
            };
            if !out.is_empty() {
                pts.remove(0);
            }
            out.append(&mut pts);
        }
        out
    };
    for _ in 0..4 {
        let mut changed = false;
        for uses in &ring_arcs {
            if uses.is_empty() {
                continue;
            }
            let ring = build(uses, &simple);
            // `ring` is closed (first == last); MIN_RING_COORDS counts the closing point.
            if ring.len() < MIN_RING_COORDS {
                for u in uses {
                    if !keep[u.arc] {
                        keep[u.arc] = true;
                        simple[u.arc] = points(&arcs[u.arc]);
                        changed = true;
                    }
                }
            }
        }
        if !changed {
            break;
        }
    }

    // 5. The shapes again, ring by ring.
    let ring_of = |r: usize| -> LineString<f64> {
        if ring_arcs[r].is_empty() {
            let mut c: Vec<Coord<f64>> = rings[r].iter().map(|&v| coords[v as usize]).collect();
            if let Some(&first) = c.first() {
                c.push(first);
            }
            LineString::new(c)
        } else {
            LineString::new(build(&ring_arcs[r], &simple))
        }
    };
    layout
        .iter()
        .map(|polygons| {
            MultiPolygon::new(
                polygons
                    .iter()
                    .map(|indices| {
                        Polygon::new(
                            ring_of(indices[0]),
                            indices[1..].iter().map(|&r| ring_of(r)).collect(),
                        )
                    })
                    .collect(),
            )
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use geo::Area;

    /// A 100 × 80 rectangle whose edges carry a point every 0.05 units, each
    /// nudged off the edge by up to ±0.05 (sub-pixel noise).
    fn noisy_rectangle() -> Polygon<f64> {
        let corners: [(f64, f64); 4] = [(0.0, 0.0), (100.0, 0.0), (100.0, 80.0), (0.0, 80.0)];
        let mut coords = Vec::new();
        let mut k = 0u32;
        for i in 0..4 {
            let (a, b) = (corners[i], corners[(i + 1) % 4]);
            let len: f64 = (b.0 - a.0).hypot(b.1 - a.1);
            let steps = (len / 0.05) as usize;
            let (nx, ny) = (-(b.1 - a.1) / len, (b.0 - a.0) / len);
            for s in 0..steps {
                let t = s as f64 / steps as f64;
                k = k.wrapping_mul(1_103_515_245).wrapping_add(12_345);
                let off = if s == 0 {
                    0.0
                } else {
                    ((k >> 16) % 1000) as f64 / 1000.0 * 0.1 - 0.05
                };
                coords.push(Coord {
                    x: a.0 + (b.0 - a.0) * t + nx * off,
                    y: a.1 + (b.1 - a.1) * t + ny * off,
                });
            }
        }
        Polygon::new(LineString::new(coords), vec![])
    }

    #[test]
    fn collinear_sub_pixel_points_are_dropped_and_area_kept() {
        let poly = noisy_rectangle();
        let before = poly.exterior().0.len();
        assert!(before > 7000, "{before}");
        let simple = poly.simplify_outline(DEFAULT_EPSILON);
        let after = simple.exterior().0.len();
        assert!(after < 50, "{before} -> {after}");
        let (a0, a1) = (poly.unsigned_area(), simple.unsigned_area());
        assert!((a1 - a0).abs() / a0 < 0.01, "area {a0} -> {a1}");
    }

    #[test]
    fn tiny_rings_are_kept_whole() {
        // A hole and an island far smaller than epsilon: RDP would reduce them to
        // a line; they are kept with all their points instead.
        let tiny = LineString::from(vec![
            (5.0, 5.0),
            (5.1, 5.0),
            (5.1, 5.1),
            (5.05, 5.12),
            (5.0, 5.1),
            (5.0, 5.0),
        ]);
        let outer = LineString::from(vec![(0.0, 0.0), (10.0, 0.0), (10.0, 10.0), (0.0, 10.0)]);
        let poly = Polygon::new(outer, vec![tiny.clone()]);
        let simple = poly.simplify_outline(DEFAULT_EPSILON);
        assert_eq!(simple.interiors()[0], tiny);
        assert!(simple.exterior().0.len() >= MIN_RING_COORDS);
        let island = MultiPolygon::new(vec![Polygon::new(tiny.clone(), vec![])]);
        assert_eq!(
            island.simplify_outline(DEFAULT_EPSILON).0[0].exterior(),
            &tiny
        );
    }

    #[test]
    fn bad_epsilon_leaves_geometry_alone() {
        let poly = noisy_rectangle();
        assert_eq!(poly.simplify_outline(f64::NAN), poly);
        assert_eq!(poly.simplify_outline(-1.0), poly);
    }

    /// A `n` × `n` grid of 10 × 10 districts whose inner edges wiggle (64 points each,
    /// up to ±0.4 units off the line); the outside is straight.
    fn wiggly_grid(n: usize) -> Vec<MultiPolygon<f64>> {
        let mut seed = 7u64;
        let mut noise = move || {
            seed = seed
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            ((seed >> 33) as f64 / (1u64 << 31) as f64) * 0.8 - 0.4
        };
        let corner = |i: usize, j: usize| Coord {
            x: i as f64 * 10.0,
            y: j as f64 * 10.0,
        };
        // Edge lines from the smaller corner to the larger, made once each.
        type Corner = (usize, usize);
        let mut lines: HashMap<(Corner, Corner), Vec<Coord<f64>>> = HashMap::new();
        let mut line = |a: Corner, b: Corner| -> Vec<Coord<f64>> {
            let (lo, hi, flip) = if a < b { (a, b, false) } else { (b, a, true) };
            let inner = !(lo.0 == hi.0 && (lo.0 == 0 || lo.0 == n))
                && !(lo.1 == hi.1 && (lo.1 == 0 || lo.1 == n));
            let pts = lines.entry((lo, hi)).or_insert_with(|| {
                let (p, q) = (corner(lo.0, lo.1), corner(hi.0, hi.1));
                (0..=64)
                    .map(|s| {
                        let t = s as f64 / 64.0;
                        let off = if inner && s > 0 && s < 64 {
                            noise()
                        } else {
                            0.0
                        };
                        // Offsets across the edge (edges are axis-parallel).
                        let (nx, ny) = if p.x == q.x { (off, 0.0) } else { (0.0, off) };
                        Coord {
                            x: p.x + (q.x - p.x) * t + nx,
                            y: p.y + (q.y - p.y) * t + ny,
                        }
                    })
                    .collect()
            });
            let mut out = pts.clone();
            if flip {
                out.reverse();
            }
            out
        };
        let mut shapes = Vec::new();
        for i in 0..n {
            for j in 0..n {
                let corners = [(i, j), (i + 1, j), (i + 1, j + 1), (i, j + 1)];
                let mut ring: Vec<Coord<f64>> = Vec::new();
                for k in 0..4 {
                    let mut l = line(corners[k], corners[(k + 1) % 4]);
                    l.pop();
                    ring.extend(l);
                }
                ring.push(ring[0]);
                shapes.push(MultiPolygon::new(vec![Polygon::new(
                    LineString::new(ring),
                    vec![],
                )]));
            }
        }
        shapes
    }

    /// How many rings use each undirected segment.
    fn segment_uses(shapes: &[MultiPolygon<f64>]) -> HashMap<(VertexKey, VertexKey), usize> {
        let mut uses = HashMap::new();
        for shape in shapes {
            for polygon in shape {
                for l in polygon.exterior().lines() {
                    let (a, b) = (vertex_key(l.start), vertex_key(l.end));
                    *uses.entry(if a < b { (a, b) } else { (b, a) }).or_insert(0) += 1;
                }
            }
        }
        uses
    }

    /// Every segment inside the grid is used by exactly two districts; only those on
    /// the straight outside are used once.
    fn shared_edges_problems(shapes: &[MultiPolygon<f64>], size: f64) -> usize {
        let on_outside = |c: Coord<f64>| c.x == 0.0 || c.y == 0.0 || c.x == size || c.y == size;
        segment_uses(shapes)
            .iter()
            .filter(|((a, b), &n)| {
                let (a, b) = (
                    Coord {
                        x: f64::from_bits(a.0),
                        y: f64::from_bits(a.1),
                    },
                    Coord {
                        x: f64::from_bits(b.0),
                        y: f64::from_bits(b.1),
                    },
                );
                let outside = on_outside(a) && on_outside(b) && (a.x == b.x || a.y == b.y);
                if outside {
                    n != 1
                } else {
                    n != 2
                }
            })
            .count()
    }

    #[test]
    fn shared_edges_stay_shared_after_simplification() {
        let grid = wiggly_grid(6);
        assert_eq!(
            shared_edges_problems(&grid, 60.0),
            0,
            "the input shares its edges"
        );
        let simple = simplify_shared(&grid, DEFAULT_EPSILON);
        assert_eq!(simple.len(), grid.len());
        assert_eq!(
            shared_edges_problems(&simple, 60.0),
            0,
            "simplified districts still meet"
        );
        // No gaps or overlaps: the areas still add up to the whole grid.
        let total: f64 = simple.iter().map(|s| s.unsigned_area()).sum();
        assert!((total - 3600.0).abs() < 1e-9, "{total}");
        // It did simplify: 64 points an edge before, far fewer after.
        let before: usize = grid.iter().map(|s| s.0[0].exterior().0.len()).sum();
        let after: usize = simple.iter().map(|s| s.0[0].exterior().0.len()).sum();
        assert!(after * 2 < before, "{before} -> {after}");
        // Each district's area moves by less than the tolerance times its perimeter.
        for (a, b) in grid.iter().zip(&simple) {
            assert!((a.unsigned_area() - b.unsigned_area()).abs() < DEFAULT_EPSILON * 40.0);
        }
        // Ring by ring, the same tolerance opens gaps between neighbours: the check
        // above is one that simplification can fail.
        let alone: Vec<MultiPolygon<f64>> = grid
            .iter()
            .map(|s| s.simplify_outline(DEFAULT_EPSILON))
            .collect();
        assert!(shared_edges_problems(&alone, 60.0) > 0);
    }

    #[test]
    fn shared_simplification_keeps_holes_islands_and_tiny_rings() {
        // A district with a hole, an island filling that hole exactly (a loop with no
        // junction), and a tiny triangle far smaller than the tolerance.
        let outer = LineString::from(vec![(0.0, 0.0), (30.0, 0.0), (30.0, 30.0), (0.0, 30.0)]);
        let hole: Vec<(f64, f64)> = (0..80)
            .map(|k| {
                let t = k as f64 / 80.0 * std::f64::consts::TAU;
                let r = 8.0 + 0.05 * (7.0 * t).sin();
                (15.0 + r * t.cos(), 15.0 + r * t.sin())
            })
            .collect();
        let ring = LineString::from(hole.clone());
        let mut reversed = hole.clone();
        reversed.reverse();
        let donut = MultiPolygon::new(vec![Polygon::new(outer, vec![ring])]);
        let island = MultiPolygon::new(vec![Polygon::new(LineString::from(reversed), vec![])]);
        let tiny = MultiPolygon::new(vec![polygon_of(&[
            (50.0, 50.0),
            (50.1, 50.0),
            (50.05, 50.1),
        ])]);
        let out = simplify_shared(&[donut, island, tiny.clone()], DEFAULT_EPSILON);
        let hole_after: Vec<VertexKey> = out[0].0[0].interiors()[0]
            .0
            .iter()
            .map(|&c| vertex_key(c))
            .collect();
        let mut island_after: Vec<VertexKey> = out[1].0[0]
            .exterior()
            .0
            .iter()
            .map(|&c| vertex_key(c))
            .collect();
        island_after.reverse();
        assert_eq!(
            hole_after, island_after,
            "the hole and the island are the same ring"
        );
        assert!(
            hole_after.len() < 60 && hole_after.len() >= MIN_RING_COORDS,
            "{}",
            hole_after.len()
        );
        assert_eq!(
            out[2], tiny,
            "a ring smaller than the tolerance is kept whole"
        );
        // A bad tolerance changes nothing.
        let grid = wiggly_grid(2);
        assert_eq!(simplify_shared(&grid, f64::NAN), grid);
        assert_eq!(simplify_shared(&grid, 0.0), grid);
        assert!(simplify_shared(&[], 1.0).is_empty());
    }

    fn polygon_of(points: &[(f64, f64)]) -> Polygon<f64> {
        Polygon::new(LineString::from(points.to_vec()), vec![])
    }
}
