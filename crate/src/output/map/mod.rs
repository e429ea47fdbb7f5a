//! The district map: projection, simplification, label anchors and SVG.
//!
//! [`layout`] is run once per dataset: it projects the districts' lon/lat
//! outlines with an Albers equal-area conic fitted to their extent
//! ([`projection`]), scales them into an SVG viewport, simplifies them below a
//! pixel ([`simplify`]), writes one path per district ([`path`]) and finds a
//! point inside each ([`anchor`]). [`svg`] then draws a [`MapLayout`] with
//! fills, names and, for a standalone picture, title, legend and footer
//! ([`render`]). Every algorithm takes plain `geo` geometries.

pub mod anchor;
pub mod path;
pub mod projection;
pub mod render;
pub mod simplify;

pub use anchor::LabelAnchor;
pub use path::ToPathData;
pub use projection::{Albers, Fit};
pub use render::{svg, SvgOptions, NEUTRAL_FILL, TIE_FILL, TIE_PATTERN_ID};
pub use simplify::SimplifyOutline;

use geo::{Coord, CoordsIter, LineString, MultiPolygon, Polygon, Rect};

/// A map laid out in SVG user units (origin top left, y down).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct MapLayout {
    /// Viewport width.
    pub width: f64,
    /// Viewport height.
    pub height: f64,
    /// SVG path data (`d`) per district, in input order; fill with `evenodd`.
    pub paths: Vec<String>,
    /// A point inside each district, in input order (the viewport's centre for
    /// a district with no usable coordinates).
    pub anchors: Vec<(f64, f64)>,
}

/// Bounding box of the finite coordinates.
fn finite_bounds<'a>(coords: impl Iterator<Item = Coord<f64>> + 'a) -> Option<Rect<f64>> {
    let mut bounds: Option<(Coord<f64>, Coord<f64>)> = None;
    for c in coords.filter(|c| c.x.is_finite() && c.y.is_finite()) {
        bounds = Some(match bounds {
            None => (c, c),
            Some((lo, hi)) => (
                Coord {
                    x: lo.x.min(c.x),
                    y: lo.y.min(c.y),
                },
                Coord {
                    x: hi.x.max(c.x),
                    y: hi.y.max(c.y),
                },
            ),
        });
    }
    bounds.map(|(lo, hi)| Rect::new(lo, hi))
}

/// Applies `f` to every coordinate, dropping those that are (or become) not finite.
fn map_finite(
    shape: &MultiPolygon<f64>,
    f: impl Fn(Coord<f64>) -> Coord<f64>,
) -> MultiPolygon<f64> {
    let ring = |r: &LineString<f64>| -> LineString<f64> {
        r.0.iter()
            .filter(|c| c.x.is_finite() && c.y.is_finite())
            .map(|&c| f(c))
            .filter(|c| c.x.is_finite() && c.y.is_finite())
            .collect()
    };
    MultiPolygon::new(
        shape
            .iter()
            .map(|p| Polygon::new(ring(p.exterior()), p.interiors().iter().map(ring).collect()))
            .collect(),
    )
}

/// Lays out district shapes (lon/lat, degrees, in order) in an SVG viewport
/// `width` user units wide; the height follows from the projected extent.
///
/// The projection is [`Albers::for_extent`] of all districts together, fitted
/// with [`Fit`]; outlines are simplified with
/// [`simplify::DEFAULT_EPSILON`] in SVG units; anchors are computed on the
/// simplified shapes, the ones that are drawn. Empty input gives an empty map; coordinates
/// that are not finite are ignored.
///
/// ```
/// use geo::{polygon, MultiPolygon};
/// use stratamap::output::map::layout;
/// let west = polygon![(x: 0.0, y: 0.0), (x: 1.0, y: 0.0), (x: 1.0, y: 1.0), (x: 0.0, y: 1.0)];
/// let east = polygon![(x: 1.0, y: 0.0), (x: 2.0, y: 0.0), (x: 2.0, y: 1.0), (x: 1.0, y: 1.0)];
/// let map = layout(&[MultiPolygon::new(vec![west]), MultiPolygon::new(vec![east])], 800.0);
/// assert_eq!(map.width, 800.0);
/// assert!(map.height > 380.0 && map.height < 440.0); // about twice as wide as tall
/// assert_eq!(map.paths.len(), 2);
/// assert!(map.paths[0].starts_with('M'));
/// assert!(map.anchors[0].0 < map.anchors[1].0); // west is drawn left of east
/// ```
pub fn layout(shapes: &[MultiPolygon<f64>], width: f64) -> MapLayout {
    let lonlat = finite_bounds(shapes.iter().flat_map(|s| s.coords_iter()));
    let projected: Vec<MultiPolygon<f64>> = match lonlat {
        Some(extent) => {
            let albers = Albers::for_extent(extent);
            shapes
                .iter()
                .map(|s| map_finite(s, |c| albers.project(c.x, c.y)))
                .collect()
        }
        None => shapes.iter().map(|_| MultiPolygon::new(vec![])).collect(),
    };
    let fit = Fit::new(
        finite_bounds(projected.iter().flat_map(|s| s.coords_iter())),
        width,
    );
    let centre = (fit.width / 2.0, fit.height / 2.0);
    let fitted: Vec<MultiPolygon<f64>> = projected
        .iter()
        .map(|s| map_finite(s, |c| fit.apply(c)))
        .collect();
    let mut paths = Vec::with_capacity(shapes.len());
    let mut anchors = Vec::with_capacity(shapes.len());
    for drawn in simplify::simplify_shared(&fitted, simplify::DEFAULT_EPSILON) {
        anchors.push(
            drawn
                .label_anchor()
                .filter(|a| a.x.is_finite() && a.y.is_finite())
                .map_or(centre, |a| (a.x, a.y)),
        );
        paths.push(drawn.to_path_data());
    }
    MapLayout {
        width: fit.width,
        height: fit.height,
        paths,
        anchors,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use geo::{polygon, Area, Contains, Point};

    fn square(lon: f64, lat: f64, size: f64) -> MultiPolygon<f64> {
        MultiPolygon::new(vec![polygon![
            (x: lon, y: lat), (x: lon + size, y: lat),
            (x: lon + size, y: lat + size), (x: lon, y: lat + size),
        ]])
    }

    /// Reads a path written by [`ToPathData`] back into polygons (one per ring).
    fn rings(d: &str) -> Vec<Polygon<f64>> {
        d.split('M')
            .filter(|s| !s.trim().is_empty())
            .map(|ring| {
                let coords: Vec<(f64, f64)> = ring
                    .trim_end_matches(['z', ' '])
                    .split(" L")
                    .map(|p| {
                        let (x, y) = p.trim().split_once(',').unwrap();
                        (x.parse().unwrap(), y.parse().unwrap())
                    })
                    .collect();
                Polygon::new(LineString::from(coords), vec![])
            })
            .collect()
    }

    #[test]
    fn empty_input_gives_empty_map() {
        let map = layout(&[], 800.0);
        assert_eq!((map.width, map.height), (800.0, 400.0));
        assert!(map.paths.is_empty() && map.anchors.is_empty());
    }

    #[test]
    fn one_district_fills_the_width_within_the_margin() {
        let map = layout(&[square(30.0, -10.0, 2.0)], 800.0);
        let ring = &rings(&map.paths[0])[0];
        let xs: Vec<f64> = ring.exterior().0.iter().map(|c| c.x).collect();
        let min = xs.iter().cloned().fold(f64::INFINITY, f64::min);
        let max = xs.iter().cloned().fold(f64::NEG_INFINITY, f64::max);
        assert!(
            (min - 20.0).abs() < 0.11 && (max - 780.0).abs() < 0.11,
            "{min} {max}"
        );
        let (ax, ay) = map.anchors[0];
        assert!(ring.contains(&Point::new(ax, ay)));
    }

    #[test]
    fn degenerate_shapes_do_not_panic() {
        // Zero-height extent (all on one parallel), a single point, non-finite
        // coordinates, an empty district and a very wide longitude span.
        let flat = MultiPolygon::new(vec![
            polygon![(x: 0.0, y: 5.0), (x: 3.0, y: 5.0), (x: 6.0, y: 5.0)],
        ]);
        let point = MultiPolygon::new(vec![polygon![(x: 1.0, y: 1.0)]]);
        let nan = MultiPolygon::new(vec![polygon![
            (x: f64::NAN, y: 0.0), (x: 1.0, y: f64::INFINITY), (x: 2.0, y: 2.0), (x: 3.0, y: 2.0), (x: 3.0, y: 3.0),
        ]]);
        let empty = MultiPolygon::new(vec![]);
        let wide = square(-179.0, -89.0, 358.0);
        let cases: Vec<Vec<MultiPolygon<f64>>> = vec![
            vec![flat.clone()],
            vec![point.clone()],
            vec![nan.clone()],
            vec![empty.clone()],
            vec![wide.clone()],
            vec![flat, point, nan, empty, wide],
        ];
        for shapes in cases {
            for width in [800.0, 0.0, -5.0, f64::NAN, 1e-300] {
                let map = layout(&shapes, width);
                assert_eq!(map.paths.len(), shapes.len());
                assert_eq!(map.anchors.len(), shapes.len());
                assert!(map.width.is_finite() && map.width > 0.0);
                assert!(map.height.is_finite() && map.height > 0.0);
                for (x, y) in &map.anchors {
                    assert!(x.is_finite() && y.is_finite());
                }
                for d in &map.paths {
                    assert!(!d.contains("NaN") && !d.contains("inf"), "{d}");
                }
            }
        }
    }

    #[test]
    fn layout_keeps_relative_areas() {
        // Equal lon/lat boxes at different latitudes have sphere areas in the
        // ratio of (sin φ2 − sin φ1); the equal-area layout must keep it.
        let low = square(10.0, 0.0, 1.0);
        let high = square(10.0, 40.0, 1.0);
        let map = layout(&[low, high], 800.0);
        let area = |d: &str| rings(d)[0].unsigned_area();
        let ratio = area(&map.paths[1]) / area(&map.paths[0]);
        let expected = (41f64.to_radians().sin() - 40f64.to_radians().sin())
            / (1f64.to_radians().sin() - 0f64.to_radians().sin());
        assert!(
            (ratio / expected - 1.0).abs() < 0.01,
            "{ratio} vs {expected}"
        );
    }

    #[test]
    fn anchors_are_inside_drawn_concave_districts() {
        let c = MultiPolygon::new(vec![polygon![
            (x: 0.0, y: 0.0), (x: 10.0, y: 0.0), (x: 10.0, y: 2.0), (x: 2.0, y: 2.0),
            (x: 2.0, y: 8.0), (x: 10.0, y: 8.0), (x: 10.0, y: 10.0), (x: 0.0, y: 10.0),
        ]]);
        let map = layout(&[c], 500.0);
        let drawn = &rings(&map.paths[0])[0];
        let (x, y) = map.anchors[0];
        assert!(
            drawn.contains(&Point::new(x, y)),
            "{:?} not in {:?}",
            (x, y),
            drawn
        );
    }

    #[test]
    fn many_districts_lay_out() {
        // A 60 × 50 grid of districts with 200-point outlines.
        let mut shapes = Vec::new();
        for i in 0..60 {
            for j in 0..50 {
                let (lon, lat) = (i as f64 * 0.2, 40.0 + j as f64 * 0.2);
                let ring: Vec<(f64, f64)> = (0..200)
                    .map(|k| {
                        let t = k as f64 / 200.0 * std::f64::consts::TAU;
                        (lon + 0.1 + 0.09 * t.cos(), lat + 0.1 + 0.09 * t.sin())
                    })
                    .collect();
                shapes.push(MultiPolygon::new(vec![Polygon::new(
                    LineString::from(ring),
                    vec![],
                )]));
            }
        }
        let map = layout(&shapes, 800.0);
        assert_eq!(map.paths.len(), 3000);
        // Each circle is about 12 units across: simplification must drop most points.
        let points: usize = map
            .paths
            .iter()
            .map(|d| d.matches(['M', 'L']).count())
            .sum();
        assert!(points < 3000 * 40, "{points}");
        assert!(map.paths.iter().all(|d| d.matches(['M', 'L']).count() >= 3));
    }
}
