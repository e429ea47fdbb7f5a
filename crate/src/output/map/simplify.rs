//! Outline simplification in SVG units: Ramer–Douglas–Peucker (geo's
//! [`Simplify`]) ring by ring, never leaving a ring too small to be one.

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
}
