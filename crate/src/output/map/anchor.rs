//! Label anchors: a point inside a district, where a label or marker goes.

use geo::{Area, BoundingRect, Coord, MultiPolygon, Polygon};

/// A point inside the geometry: the midpoint of the longest stretch inside the
/// shape (even–odd rule, holes excluded) of a few horizontal scanlines across it,
/// unlike the centroid, which can fall outside a concave shape. For a multipolygon
/// it is taken in its largest part by area. `None` for an empty geometry.
///
/// A scanline is used rather than a topological predicate so that no input, not
/// even a self-intersecting ring from an analyst's file, can make it fail.
///
/// ```
/// use geo::{polygon, Contains, Point};
/// use stratamap::output::map::anchor::LabelAnchor;
/// let l_shape = polygon![
///     (x: 0.0, y: 0.0), (x: 10.0, y: 0.0), (x: 10.0, y: 2.0),
///     (x: 2.0, y: 2.0), (x: 2.0, y: 10.0), (x: 0.0, y: 10.0),
/// ];
/// let anchor = l_shape.label_anchor().unwrap();
/// assert!(l_shape.contains(&Point::from(anchor)));
/// ```
pub trait LabelAnchor {
    /// The anchor point, in the geometry's own coordinates.
    fn label_anchor(&self) -> Option<Coord<f64>>;
}

impl LabelAnchor for Polygon<f64> {
    fn label_anchor(&self) -> Option<Coord<f64>> {
        if self.exterior().0.is_empty() {
            return None;
        }
        let rect = self.bounding_rect()?;
        let (y0, h) = (rect.min().y, rect.height());
        if !(y0.is_finite() && h.is_finite()) {
            return None;
        }
        // Scanlines through the middle first, then further out; a tiny offset keeps
        // them off vertices that sit on round numbers.
        let mut best: Option<(f64, Coord<f64>)> = None;
        let mut xs: Vec<f64> = Vec::new();
        for f in [0.5, 0.375, 0.625, 0.25, 0.75, 0.125, 0.875] {
            let y = y0 + h * (f + 1.234_567e-7);
            xs.clear();
            for ring in std::iter::once(self.exterior()).chain(self.interiors()) {
                for l in ring.lines() {
                    let (p, q) = (l.start, l.end);
                    if (p.y > y) != (q.y > y) {
                        let x = p.x + (y - p.y) * (q.x - p.x) / (q.y - p.y);
                        if x.is_finite() {
                            xs.push(x);
                        }
                    }
                }
            }
            xs.sort_by(f64::total_cmp);
            for pair in xs.chunks_exact(2) {
                let width = pair[1] - pair[0];
                if best.is_none_or(|(w, _)| width > w) {
                    best = Some((
                        width,
                        Coord {
                            x: 0.5 * (pair[0] + pair[1]),
                            y,
                        },
                    ));
                }
            }
        }
        match best {
            Some((_, c)) => Some(c),
            // Degenerate (zero height): any point of the outline.
            None => self
                .exterior()
                .0
                .first()
                .copied()
                .filter(|c| c.x.is_finite() && c.y.is_finite()),
        }
    }
}

impl LabelAnchor for MultiPolygon<f64> {
    fn label_anchor(&self) -> Option<Coord<f64>> {
        let mut parts: Vec<(f64, &Polygon<f64>)> =
            self.iter().map(|p| (p.unsigned_area(), p)).collect();
        // Largest first; a stable sort keeps input order among equals.
        parts.sort_by(|a, b| b.0.total_cmp(&a.0));
        parts.into_iter().find_map(|(_, p)| p.label_anchor())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use geo::{polygon, Centroid, Contains, LineString, Point};

    fn c_shape() -> Polygon<f64> {
        polygon![
            (x: 0.0, y: 0.0), (x: 10.0, y: 0.0), (x: 10.0, y: 2.0), (x: 2.0, y: 2.0),
            (x: 2.0, y: 8.0), (x: 10.0, y: 8.0), (x: 10.0, y: 10.0), (x: 0.0, y: 10.0),
        ]
    }

    #[test]
    fn anchor_inside_c_shape_whose_centroid_is_outside() {
        let c = c_shape();
        let centroid = c.centroid().unwrap();
        assert!(
            !c.contains(&centroid),
            "precondition: centroid {centroid:?} outside"
        );
        let anchor = c.label_anchor().unwrap();
        assert!(c.contains(&Point::from(anchor)), "anchor {anchor:?}");
    }

    #[test]
    fn multipolygon_anchor_is_in_largest_part() {
        let small = polygon![(x: 100.0, y: 0.0), (x: 101.0, y: 0.0), (x: 101.0, y: 1.0), (x: 100.0, y: 1.0)];
        let mp = MultiPolygon::new(vec![small.clone(), c_shape()]);
        let anchor = mp.label_anchor().unwrap();
        assert!(c_shape().contains(&Point::from(anchor)), "{anchor:?}");
        assert!(!small.contains(&Point::from(anchor)));
    }

    #[test]
    fn anchor_avoids_holes() {
        // A square with a hole covering its middle row.
        let outer = LineString::from(vec![(0.0, 0.0), (9.0, 0.0), (9.0, 9.0), (0.0, 9.0)]);
        let hole = LineString::from(vec![(1.0, 4.0), (8.0, 4.0), (8.0, 5.0), (1.0, 5.0)]);
        let p = Polygon::new(outer, vec![hole]);
        let anchor = p.label_anchor().unwrap();
        assert!(p.contains(&Point::from(anchor)), "{anchor:?}");
    }

    #[test]
    fn empty_geometries_have_no_anchor() {
        assert_eq!(MultiPolygon::<f64>::new(vec![]).label_anchor(), None);
        let empty = Polygon::new(LineString::new(vec![]), vec![]);
        assert_eq!(empty.label_anchor(), None);
    }

    #[test]
    fn self_intersecting_rings_do_not_panic() {
        // Scrambled vertex orders give bow-ties and overlaps; the loader does not
        // check ring validity, so the anchor must cope with any of them.
        let mut state: u64 = 0x9E37_79B9_7F4A_7C15;
        let mut next = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state % 20) as f64 / 2.0
        };
        for _ in 0..2000 {
            let n = 3 + (next() as usize % 9);
            let ring: Vec<(f64, f64)> = (0..n).map(|_| (next(), next())).collect();
            let hole: Vec<(f64, f64)> = (0..4).map(|_| (next(), next())).collect();
            let p = Polygon::new(LineString::from(ring), vec![LineString::from(hole)]);
            if let Some(a) = p.label_anchor() {
                assert!(a.x.is_finite() && a.y.is_finite());
            }
        }
    }
}
