//! SVG path data for polygonal geometries: absolute move/line/close commands,
//! holes and parts in one path, to be filled with `fill-rule="evenodd"`.

use geo::{Coord, LineString, MultiPolygon, Polygon};
use svg::node::element::path::Data;
use svg::node::Value;

/// Coordinates are rounded to this step (user units).
pub const PRECISION: f64 = 0.1;

/// Writes a geometry as SVG path data (`d`).
///
/// Every ring becomes `M x,y L x,y … z` with absolute coordinates rounded to
/// [`PRECISION`]; points that round onto the previous one are skipped, as is
/// each ring's repeated closing point (the `z` closes it). Coordinates that
/// are not finite are left out. Holes and parts share the path, so it must be
/// filled with `fill-rule="evenodd"`.
///
/// ```
/// use geo::polygon;
/// use stratamap::output::map::path::ToPathData;
/// let square = polygon![(x: 0.0, y: 0.0), (x: 10.04, y: 0.0), (x: 10.04, y: 10.0), (x: 0.0, y: 10.0)];
/// assert_eq!(square.to_path_data(), "M0,0 L10,0 L10,10 L0,10 z");
/// ```
pub trait ToPathData {
    /// The path data string.
    fn to_path_data(&self) -> String;
}

fn round(v: f64) -> f64 {
    // Adding 0.0 turns a rounded -0 into 0.
    (v / PRECISION).round() * PRECISION + 0.0
}

fn append_ring(mut data: Data, ring: &LineString<f64>) -> Data {
    let mut coords: Vec<Coord<f64>> = Vec::with_capacity(ring.0.len());
    for c in &ring.0 {
        if !(c.x.is_finite() && c.y.is_finite()) {
            continue;
        }
        let r = Coord {
            x: round(c.x),
            y: round(c.y),
        };
        if coords.last() != Some(&r) {
            coords.push(r);
        }
    }
    if coords.len() > 1 && coords.first() == coords.last() {
        coords.pop();
    }
    let Some((first, rest)) = coords.split_first() else {
        return data;
    };
    data = data.move_to((first.x, first.y));
    for c in rest {
        data = data.line_to((c.x, c.y));
    }
    data.close()
}

fn append_polygon(data: Data, polygon: &Polygon<f64>) -> Data {
    polygon
        .interiors()
        .iter()
        .fold(append_ring(data, polygon.exterior()), append_ring)
}

fn finish(data: Data) -> String {
    String::from(Value::from(data))
}

impl ToPathData for Polygon<f64> {
    fn to_path_data(&self) -> String {
        finish(append_polygon(Data::new(), self))
    }
}

impl ToPathData for MultiPolygon<f64> {
    fn to_path_data(&self) -> String {
        finish(self.iter().fold(Data::new(), append_polygon))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use geo::polygon;

    #[test]
    fn holes_and_parts_share_one_path() {
        let outer = LineString::from(vec![(0.0, 0.0), (10.0, 0.0), (10.0, 10.0), (0.0, 10.0)]);
        let hole = LineString::from(vec![(2.0, 2.0), (2.0, 4.0), (4.0, 4.0)]);
        let island = polygon![(x: 20.0, y: 0.0), (x: 21.0, y: 0.0), (x: 21.0, y: 1.0)];
        let mp = MultiPolygon::new(vec![Polygon::new(outer, vec![hole]), island]);
        assert_eq!(
            mp.to_path_data(),
            "M0,0 L10,0 L10,10 L0,10 z M2,2 L2,4 L4,4 z M20,0 L21,0 L21,1 z"
        );
    }

    #[test]
    fn coordinates_are_rounded_to_a_tenth() {
        let p = polygon![(x: 1.04, y: 2.06), (x: 3.333, y: -0.04), (x: 123.45678, y: 7.0)];
        let d = p.to_path_data();
        assert_eq!(d, "M1,2.1 L3.3,0 L123.5,7 z");
        // The string must read back as the same commands.
        let parsed = Data::parse(&d).unwrap();
        assert_eq!(parsed.len(), 4);
    }

    #[test]
    fn repeated_and_non_finite_points_are_skipped() {
        let ring = LineString::from(vec![
            (0.0, 0.0),
            (0.01, 0.02),
            (f64::NAN, 1.0),
            (5.0, 0.0),
            (5.0, f64::INFINITY),
            (5.0, 5.0),
        ]);
        let p = Polygon::new(ring, vec![]);
        assert_eq!(p.to_path_data(), "M0,0 L5,0 L5,5 z");
        assert_eq!(MultiPolygon::<f64>::new(vec![]).to_path_data(), "");
    }
}
