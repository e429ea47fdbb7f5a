//! The districts' GeoJSON (SPEC 1.2), read with the `geojson` crate.

use super::seat_rule::{parse_rule, parse_threshold};
use super::{is_valid_id, shown_value, District, SeatRule};
use crate::error::{shown, Collector, Location};
use geo::{Coord, LineString, MultiPolygon, Polygon};
use geojson::{Feature, GeometryValue, PolygonType};
use serde_json::Value;

/// Largest number of seats one district may elect.
const MAX_SEATS: u64 = 100_000;

/// Largest districts file opened, in bytes (64 MiB). A map that size takes several
/// seconds to lay out and draw in a browser; anything larger should be simplified
/// first (to about 100 m, which no screen shows) rather than leave the page frozen.
pub const MAX_GEOJSON_BYTES: usize = 64 << 20;

/// Most districts in one dataset: past this the map's one element per district no
/// longer repaints at the speed of a slider.
pub const MAX_DISTRICTS: usize = 20_000;

fn megabytes(bytes: usize) -> String {
    format!("{:.1} MB", bytes as f64 / 1e6)
}

/// Read the districts; `defaults` are the manifest's seat rule and threshold, which a
/// district's own `seat_rule` and `threshold` properties override.
pub(crate) fn parse(
    file: &str,
    text: &str,
    defaults: (SeatRule, f64),
) -> Result<Vec<District>, Collector> {
    let mut c = Collector::new(file);
    if text.len() > MAX_GEOJSON_BYTES {
        c.push(
            Location::File,
            None,
            format!(
                "the file is {}; at most {} of GeoJSON can be opened. Simplify the boundaries \
                 first (to about 100 m, e.g. with a GIS tool), keeping neighbours' shared edges",
                megabytes(text.len()),
                megabytes(MAX_GEOJSON_BYTES)
            ),
        );
        return Err(c);
    }
    let root: Value = match serde_json::from_str(super::without_bom(text)) {
        Ok(v) => v,
        Err(e) => {
            c.push(
                Location::LineColumn(e.line(), e.column()),
                None,
                format!("not valid JSON: {e}"),
            );
            return Err(c);
        }
    };
    let is_collection = root.get("type").and_then(Value::as_str) == Some("FeatureCollection");
    let features = match root.get("features") {
        Some(Value::Array(f)) if is_collection => f,
        _ => {
            c.push(
                Location::File,
                Some("type"),
                "expected a GeoJSON FeatureCollection with a \"features\" array",
            );
            return Err(c);
        }
    };
    if features.len() > MAX_DISTRICTS {
        c.push(
            Location::File,
            Some("features"),
            format!(
                "{} districts; at most {MAX_DISTRICTS} can be shown on one map",
                features.len()
            ),
        );
        return Err(c);
    }
    if features.is_empty() {
        c.push(
            Location::File,
            Some("features"),
            "expected at least one district",
        );
        return Err(c);
    }
    let mut out: Vec<District> = Vec::with_capacity(features.len());
    let mut ids = std::collections::HashMap::new();
    for (i, raw) in features.iter().enumerate() {
        let at = Location::Feature(i);
        let feature: Feature = match serde_json::from_value(raw.clone()) {
            Ok(f) => f,
            Err(e) => {
                c.push(at, None, format!("not a valid GeoJSON Feature: {e}"));
                continue;
            }
        };
        let props = feature.properties.unwrap_or_default();
        let id = match props.get("id") {
            Some(Value::String(s)) if is_valid_id(s) => Some(s.clone()),
            Some(v) => {
                c.push(
                    at.clone(),
                    Some("id"),
                    format!(
                        "expected an id of 1 to 32 characters from a-z 0-9 _ -, found {}",
                        shown_value(v)
                    ),
                );
                None
            }
            None => {
                c.push(at.clone(), Some("id"), "is required (a string)");
                None
            }
        };
        if let Some(id) = &id {
            if let Some(first) = ids.insert(id.clone(), i) {
                c.push(
                    at.clone(),
                    Some("id"),
                    format!("id {} is already used by feature {first}", shown(id)),
                );
            }
        }
        let name = match props.get("name") {
            Some(Value::String(s)) if !s.trim().is_empty() => Some(s.clone()),
            _ => {
                c.push(at.clone(), Some("name"), "expected a non-empty string");
                None
            }
        };
        let seats = match props.get("seats") {
            None | Some(Value::Null) => Some(1),
            Some(v) => match v.as_u64().or_else(|| {
                v.as_f64()
                    .filter(|f| f.fract() == 0.0 && *f >= 1.0 && *f <= MAX_SEATS as f64)
                    .map(|f| f as u64)
            }) {
                Some(s) if (1..=MAX_SEATS).contains(&s) => Some(s as u32),
                _ => {
                    c.push(
                        at.clone(),
                        Some("seats"),
                        format!(
                            "expected a whole number of seats from 1 to {MAX_SEATS}, found {}",
                            shown_value(v)
                        ),
                    );
                    None
                }
            },
        };
        let region = match props.get("region") {
            None | Some(Value::Null) => Some(None),
            Some(Value::String(s)) => Some(Some(s.clone())),
            Some(v) => {
                c.push(
                    at.clone(),
                    Some("region"),
                    format!("expected a string, found {}", shown_value(v)),
                );
                None
            }
        };
        let seat_rule = match props.get("seat_rule") {
            None | Some(Value::Null) => Some(defaults.0),
            Some(v) => parse_rule(v)
                .map_err(|m| c.push(at.clone(), Some("seat_rule"), m))
                .ok(),
        };
        let threshold = match props.get("threshold") {
            None | Some(Value::Null) => Some(defaults.1),
            Some(v) => match parse_threshold(v) {
                Ok(_) if seat_rule == Some(SeatRule::Winner) => {
                    c.push(
                        at.clone(),
                        Some("threshold"),
                        "a threshold applies only under a proportional seat rule \
                         (\"dhondt\", \"sainte_lague\" or \"hare\"); this district's rule is \"winner\"",
                    );
                    None
                }
                Ok(t) => Some(t),
                Err(m) => {
                    c.push(at.clone(), Some("threshold"), m);
                    None
                }
            },
        };
        let shape = match feature.geometry.map(|g| g.value) {
            Some(GeometryValue::Polygon { coordinates }) => {
                polygon(&coordinates, &at, &mut c).map(|p| MultiPolygon(vec![p]))
            }
            Some(GeometryValue::MultiPolygon { coordinates }) => {
                let parts: Option<Vec<Polygon<f64>>> = coordinates
                    .iter()
                    .map(|p| polygon(p, &at, &mut c))
                    .collect();
                match parts {
                    Some(p) if !p.is_empty() => Some(MultiPolygon(p)),
                    Some(_) => {
                        c.push(
                            at.clone(),
                            Some("geometry"),
                            "a MultiPolygon with no polygons",
                        );
                        None
                    }
                    None => None,
                }
            }
            Some(_) => {
                c.push(
                    at.clone(),
                    Some("geometry"),
                    "expected a Polygon or MultiPolygon",
                );
                None
            }
            None => {
                c.push(at.clone(), Some("geometry"), "is missing");
                None
            }
        };
        if let (
            Some(id),
            Some(name),
            Some(seats),
            Some(region),
            Some(shape),
            Some(seat_rule),
            Some(threshold),
        ) = (id, name, seats, region, shape, seat_rule, threshold)
        {
            out.push(District {
                id,
                name,
                seats,
                region,
                shape,
                seat_rule,
                threshold,
            });
        }
    }
    if c.is_empty() {
        Ok(out)
    } else {
        Err(c)
    }
}

fn polygon(rings: &PolygonType, at: &Location, c: &mut Collector) -> Option<Polygon<f64>> {
    if rings.is_empty() {
        c.push(at.clone(), Some("geometry"), "a polygon with no rings");
        return None;
    }
    let mut out: Vec<LineString<f64>> = Vec::with_capacity(rings.len());
    for ring in rings {
        if ring.len() < 4 {
            c.push(
                at.clone(),
                Some("geometry"),
                format!("a ring needs at least 4 positions, found {}", ring.len()),
            );
            return None;
        }
        let mut coords = Vec::with_capacity(ring.len());
        for pos in ring {
            let p = pos.as_slice();
            if p.len() < 2 {
                c.push(
                    at.clone(),
                    Some("geometry"),
                    "a position needs longitude and latitude",
                );
                return None;
            }
            let (x, y) = (p[0], p[1]);
            if !(x.is_finite()
                && y.is_finite()
                && (-180.0..=180.0).contains(&x)
                && (-90.0..=90.0).contains(&y))
            {
                c.push(
                    at.clone(),
                    Some("geometry"),
                    format!("expected longitude in [-180, 180] and latitude in [-90, 90], found [{x}, {y}]"),
                );
                return None;
            }
            coords.push(Coord { x, y });
        }
        if coords.first() != coords.last() {
            c.push(
                at.clone(),
                Some("geometry"),
                "a ring must end where it starts (RFC 7946 §3.1.6)",
            );
            return None;
        }
        out.push(LineString(coords));
    }
    let exterior = out.remove(0);
    Some(Polygon::new(exterior, out))
}

#[cfg(test)]
mod tests {
    use super::{parse as parse_with, SeatRule};
    use crate::error::Collector;

    fn parse(file: &str, text: &str) -> Result<Vec<super::District>, Collector> {
        parse_with(file, text, (SeatRule::Winner, 0.0))
    }

    fn lines(text: &str) -> Vec<String> {
        match parse("d.geojson", text) {
            Ok(_) => vec![],
            Err(c) => {
                let mut e = crate::error::DatasetError::default();
                c.drain_into(&mut e);
                e.lines()
            }
        }
    }

    const SQUARE: &str = r#"{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}"#;

    #[test]
    fn reads_features_in_order() {
        let text = format!(
            r#"{{"type":"FeatureCollection","features":[
              {{"type":"Feature","properties":{{"id":"b","name":"B","seats":3,"region":"north"}},"geometry":{SQUARE}}},
              {{"type":"Feature","properties":{{"id":"a","name":"A"}},"geometry":{{"type":"MultiPolygon","coordinates":[[[[0,0],[1,0],[1,1],[0,0]]],[[[2,2],[3,2],[3,3],[2,2]]]]}}}}]}}"#
        );
        let d = parse("d.geojson", &text).ok().unwrap();
        assert_eq!(d[0].id, "b");
        assert_eq!(d[0].seats, 3);
        assert_eq!(d[0].region.as_deref(), Some("north"));
        assert_eq!(d[1].seats, 1);
        assert_eq!(d[1].shape.0.len(), 2);
    }

    #[test]
    fn names_feature_index_and_field() {
        let text = format!(
            r#"{{"type":"FeatureCollection","features":[
              {{"type":"Feature","properties":{{"id":"a","name":"A"}},"geometry":{SQUARE}}},
              {{"type":"Feature","properties":{{"id":"a","name":"A2","seats":0}},"geometry":{SQUARE}}},
              {{"type":"Feature","properties":{{"id":"c","name":"C"}},"geometry":{{"type":"Polygon","coordinates":[[[0,0],[1,0],[500,1],[0,0]]]}}}},
              {{"type":"Feature","properties":{{"id":"d","name":"D"}},"geometry":{{"type":"Point","coordinates":[0,0]}}}}]}}"#
        );
        let l = lines(&text);
        assert!(
            l.contains(
                &"d.geojson feature 1, field id: id \"a\" is already used by feature 0".to_string()
            ),
            "{l:?}"
        );
        assert!(l
            .iter()
            .any(|s| s.starts_with("d.geojson feature 1, field seats")));
        assert!(l
            .iter()
            .any(|s| s.starts_with("d.geojson feature 2, field geometry: expected longitude")));
        assert!(l
            .iter()
            .any(|s| s.starts_with("d.geojson feature 3, field geometry: expected a Polygon")));
    }

    #[test]
    fn seat_rules_override_the_manifest() {
        let text = format!(
            r#"{{"type":"FeatureCollection","features":[
              {{"type":"Feature","properties":{{"id":"a","name":"A","seats":5}},"geometry":{SQUARE}}},
              {{"type":"Feature","properties":{{"id":"b","name":"B","seat_rule":"winner"}},"geometry":{SQUARE}}},
              {{"type":"Feature","properties":{{"id":"c","name":"C","seats":4,"seat_rule":"hare","threshold":3.5}},"geometry":{SQUARE}}}]}}"#
        );
        let d = parse_with("d.geojson", &text, (SeatRule::Dhondt, 5.0))
            .ok()
            .unwrap();
        assert_eq!((d[0].seat_rule, d[0].threshold), (SeatRule::Dhondt, 5.0));
        assert_eq!(d[1].seat_rule, SeatRule::Winner);
        assert_eq!((d[2].seat_rule, d[2].threshold), (SeatRule::Hare, 3.5));
    }

    #[test]
    fn bad_seat_rules_and_thresholds_are_named() {
        let text = format!(
            r#"{{"type":"FeatureCollection","features":[
              {{"type":"Feature","properties":{{"id":"a","name":"A","seat_rule":"d'hondt"}},"geometry":{SQUARE}}},
              {{"type":"Feature","properties":{{"id":"b","name":"B","seat_rule":"dhondt","threshold":"5%"}},"geometry":{SQUARE}}},
              {{"type":"Feature","properties":{{"id":"c","name":"C","threshold":5}},"geometry":{SQUARE}}}]}}"#
        );
        let l = lines(&text);
        assert!(
            l.contains(&r#"d.geojson feature 0, field seat_rule: expected "winner", "dhondt", "sainte_lague" or "hare", found "d'hondt""#.to_string()),
            "{l:?}"
        );
        assert!(
            l.contains(&r#"d.geojson feature 1, field threshold: expected a percentage of the district's votes from 0 to 50, found "5%""#.to_string()),
            "{l:?}"
        );
        assert!(
            l.iter().any(|s| s.starts_with("d.geojson feature 2, field threshold: a threshold applies only under a proportional seat rule")),
            "{l:?}"
        );
    }

    #[test]
    fn rejects_non_collections() {
        assert!(lines(SQUARE)[0].contains("FeatureCollection"));
        assert!(lines("[").len() == 1);
    }

    #[test]
    fn oversized_maps_are_refused_with_the_limit_named() {
        // Padding after the JSON: the size is checked before anything is parsed.
        let big = format!("{{}}{}", " ".repeat(super::MAX_GEOJSON_BYTES));
        let l = lines(&big);
        assert_eq!(l.len(), 1, "{l:?}");
        assert!(
            l[0].contains("67.1 MB") && l[0].contains("at most 67.1 MB"),
            "{l:?}"
        );
        let feature = r#"{"type":"Feature","properties":{"id":"a","name":"A"},"geometry":null}"#;
        let many = format!(
            r#"{{"type":"FeatureCollection","features":[{}]}}"#,
            vec![feature; super::MAX_DISTRICTS + 1].join(",")
        );
        let l = lines(&many);
        assert_eq!(l.len(), 1, "{l:?}");
        assert!(l[0].contains("20001 districts; at most 20000"), "{l:?}");
    }
}
