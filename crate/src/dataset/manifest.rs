//! The manifest, `dataset.json` (SPEC 1.1).

use super::seat_rule::{parse_rule, parse_threshold};
use super::{is_valid_id, shown_value, Group, Party, Preset, SeatRule, MANIFEST};
use crate::error::{shown, Collector, Location};
use serde::Serialize;
use serde_json::{Map, Value};

/// The file names a manifest gives, relative to the manifest.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Files {
    pub districts: String,
    pub electorate: String,
    pub poll: Option<String>,
}

pub(crate) struct Manifest {
    pub title: String,
    pub source: String,
    pub parties: Vec<Party>,
    pub axis: [usize; 2],
    pub groups: Vec<Group>,
    pub files: Files,
    pub majority: Option<u32>,
    pub seat_rule: SeatRule,
    pub threshold: f64,
    pub presets: Vec<Preset>,
}

/// The files that a manifest names, so that a caller knows what to fetch.
///
/// ```
/// let f = stratamap::dataset::manifest_files(
///     r#"{"districts":"map.geojson","electorate":"e.csv","poll":"p.csv"}"#).unwrap();
/// assert_eq!(f.poll.as_deref(), Some("p.csv"));
/// ```
pub fn manifest_files(text: &str) -> Result<Files, crate::error::DatasetError> {
    let mut c = Collector::new(MANIFEST);
    let obj = root(text, &mut c);
    let files = obj.as_ref().and_then(|o| files(o, &mut c));
    let mut err = crate::error::DatasetError::default();
    match files {
        Some(f) if c.is_empty() => Ok(f),
        _ => {
            c.drain_into(&mut err);
            Err(err)
        }
    }
}

fn root(text: &str, c: &mut Collector) -> Option<Map<String, Value>> {
    match serde_json::from_str::<Value>(super::without_bom(text)) {
        Ok(Value::Object(o)) => Some(o),
        Ok(_) => {
            c.push(
                Location::File,
                None,
                "expected a JSON object at the top level",
            );
            None
        }
        Err(e) => {
            c.push(
                Location::LineColumn(e.line(), e.column()),
                None,
                format!("not valid JSON: {e}"),
            );
            None
        }
    }
}

fn string(o: &Map<String, Value>, key: &str, path: &str, c: &mut Collector) -> Option<String> {
    match o.get(key) {
        Some(Value::String(s)) if !s.trim().is_empty() => Some(s.clone()),
        Some(Value::String(_)) => {
            c.push(Location::File, Some(path), "expected a non-empty string");
            None
        }
        Some(_) => {
            c.push(Location::File, Some(path), "expected a string");
            None
        }
        None => {
            c.push(Location::File, Some(path), "is required");
            None
        }
    }
}

fn file_name(o: &Map<String, Value>, key: &str, c: &mut Collector) -> Option<String> {
    let s = string(o, key, key, c)?;
    match file_name_problem(&s) {
        None => Some(s),
        Some(why) => {
            c.push(
                Location::File,
                Some(key),
                format!("{why}, found {}", shown(&s)),
            );
            None
        }
    }
}

/// Longest file name a manifest may give, in characters.
pub const MAX_FILE_NAME_CHARS: usize = 255;

/// Why a file name that a manifest gives is refused, if it is. A dataset reads only files
/// in its own folder or below it: names are relative paths of plain segments joined by
/// `/`, never absolute, never `.` or `..`, and free of what a path or an address would
/// treat specially (`\`, `:`, `?`, `#`, `%`, control characters). The page resolves the
/// same names against the manifest's address, so they cannot leave its folder there
/// either (`%2e%2e` is `..` to a URL parser, `a:` a scheme).
///
/// ```
/// use stratamap::dataset::file_name_problem;
/// assert_eq!(file_name_problem("maps/districts.geojson"), None);
/// assert!(file_name_problem("../secret.csv").is_some());
/// assert!(file_name_problem("/etc/hosts").is_some());
/// assert!(file_name_problem("https://elsewhere/e.csv").is_some());
/// ```
pub fn file_name_problem(name: &str) -> Option<&'static str> {
    if name.chars().count() > MAX_FILE_NAME_CHARS {
        return Some("expected a file name of at most 255 characters");
    }
    if name.starts_with('/') {
        return Some(
            "expected a path relative to the manifest's folder, not an absolute path: \
             a dataset reads only the files in its own folder",
        );
    }
    if name
        .chars()
        .any(|ch| ch.is_control() || matches!(ch, '\\' | ':' | '?' | '#' | '%'))
    {
        return Some(
            "expected a relative path of plain names joined by /, without \\, :, ?, #, % \
             or control characters",
        );
    }
    if name.split('/').any(|seg| seg == "..") {
        return Some("expected a file in the manifest's folder or below it: \"..\" would leave it");
    }
    if name.split('/').any(|seg| seg.is_empty() || seg == ".") {
        return Some("expected a relative path without empty or \".\" parts");
    }
    None
}

fn files(o: &Map<String, Value>, c: &mut Collector) -> Option<Files> {
    let districts = file_name(o, "districts", c);
    let electorate = file_name(o, "electorate", c);
    let poll = match o.get("poll") {
        None | Some(Value::Null) => None,
        Some(_) => Some(file_name(o, "poll", c)?),
    };
    Some(Files {
        districts: districts?,
        electorate: electorate?,
        poll,
    })
}

fn color_ok(s: &str) -> bool {
    s.len() == 7 && s.starts_with('#') && s[1..].bytes().all(|b| b.is_ascii_hexdigit())
}

fn id_list<T>(
    o: &Map<String, Value>,
    key: &str,
    range: (usize, usize),
    c: &mut Collector,
    mut make: impl FnMut(&Map<String, Value>, String, String, &str, &mut Collector) -> Option<T>,
) -> Vec<T> {
    let mut out = Vec::new();
    let Some(v) = o.get(key) else {
        c.push(Location::File, Some(key), "is required");
        return out;
    };
    let Value::Array(items) = v else {
        c.push(Location::File, Some(key), "expected an array");
        return out;
    };
    if items.len() < range.0 || items.len() > range.1 {
        c.push(
            Location::File,
            Some(key),
            format!(
                "expected {} to {} entries, found {}",
                range.0,
                range.1,
                items.len()
            ),
        );
    }
    let mut seen: Vec<String> = Vec::new();
    for (i, item) in items.iter().enumerate() {
        let path = format!("{key}[{i}]");
        let Value::Object(item) = item else {
            c.push(Location::File, Some(&path), "expected an object");
            continue;
        };
        let id = string(item, "id", &format!("{path}.id"), c);
        let name = string(item, "name", &format!("{path}.name"), c);
        let (Some(id), Some(name)) = (id, name) else {
            continue;
        };
        if !is_valid_id(&id) {
            c.push(
                Location::File,
                Some(&format!("{path}.id")),
                format!(
                    "expected an id of 1 to 32 characters from a-z 0-9 _ -, found {}",
                    shown(&id)
                ),
            );
            continue;
        }
        if seen.contains(&id) {
            c.push(
                Location::File,
                Some(&format!("{path}.id")),
                format!("id {} is used twice", shown(&id)),
            );
            continue;
        }
        seen.push(id.clone());
        if let Some(t) = make(item, id, name, &path, c) {
            out.push(t);
        }
    }
    out
}

pub(crate) fn parse(text: &str) -> Result<Manifest, Collector> {
    let mut c = Collector::new(MANIFEST);
    let Some(o) = root(text, &mut c) else {
        return Err(c);
    };
    let title = string(&o, "title", "title", &mut c);
    let source = string(&o, "source", "source", &mut c);
    let files = files(&o, &mut c);

    let parties = id_list(&o, "parties", (2, 12), &mut c, |item, id, name, path, c| {
        let color = string(item, "color", &format!("{path}.color"), c)?;
        if !color_ok(&color) {
            c.push(
                Location::File,
                Some(&format!("{path}.color")),
                format!("expected a colour as #rrggbb, found {}", shown(&color)),
            );
            return None;
        }
        Some(Party {
            id,
            name,
            color: color.to_ascii_lowercase(),
        })
    });
    let groups = id_list(&o, "groups", (1, 64), &mut c, |_, id, name, path, c| {
        if id == "all" {
            c.push(
                Location::File,
                Some(&format!("{path}.id")),
                "the id \"all\" is reserved for the shift that applies to every group",
            );
            return None;
        }
        Some(Group { id, name })
    });

    let axis = match o.get("axis") {
        None | Some(Value::Null) => Some([0, 1]),
        Some(Value::Array(a)) if a.len() == 2 => {
            let mut idx = [0usize; 2];
            let mut ok = true;
            for (i, v) in a.iter().enumerate() {
                let pos = v
                    .as_str()
                    .and_then(|s| parties.iter().position(|p| p.id == s));
                match pos {
                    Some(p) => idx[i] = p,
                    None => {
                        ok = false;
                        c.push(
                            Location::File,
                            Some(&format!("axis[{i}]")),
                            format!("expected the id of a party, found {}", shown_value(v)),
                        );
                    }
                }
            }
            if ok && idx[0] == idx[1] {
                c.push(
                    Location::File,
                    Some("axis"),
                    "expected two different parties",
                );
                ok = false;
            }
            ok.then_some(idx)
        }
        Some(_) => {
            c.push(
                Location::File,
                Some("axis"),
                "expected an array of two party ids",
            );
            None
        }
    };

    let majority = match o.get("majority") {
        None | Some(Value::Null) => Some(None),
        Some(v) => match v.as_u64() {
            Some(m) if m >= 1 && m <= u64::from(u32::MAX) => Some(Some(m as u32)),
            _ => {
                c.push(
                    Location::File,
                    Some("majority"),
                    format!(
                        "expected a whole number of seats, at least 1, found {}",
                        shown_value(v)
                    ),
                );
                None
            }
        },
    };

    let seat_rule = match o.get("seat_rule") {
        None | Some(Value::Null) => Some(SeatRule::Winner),
        Some(v) => parse_rule(v)
            .map_err(|m| c.push(Location::File, Some("seat_rule"), m))
            .ok(),
    };
    let threshold = match o.get("threshold") {
        None | Some(Value::Null) => Some(0.0),
        Some(v) => parse_threshold(v)
            .map_err(|m| c.push(Location::File, Some("threshold"), m))
            .ok(),
    };

    let mut presets = Vec::new();
    match o.get("presets") {
        None | Some(Value::Null) => {}
        Some(Value::Array(items)) => {
            for (i, item) in items.iter().enumerate() {
                let path = format!("presets[{i}]");
                let Value::Object(item) = item else {
                    c.push(Location::File, Some(&path), "expected an object");
                    continue;
                };
                let name = string(item, "name", &format!("{path}.name"), &mut c);
                let scenario = match item.get("scenario") {
                    Some(Value::String(s)) => Some(s.clone()),
                    _ => {
                        c.push(
                            Location::File,
                            Some(&format!("{path}.scenario")),
                            "expected a scenario string",
                        );
                        None
                    }
                };
                if let (Some(name), Some(scenario)) = (name, scenario) {
                    presets.push(Preset { name, scenario });
                }
            }
        }
        Some(_) => c.push(Location::File, Some("presets"), "expected an array"),
    }

    match (title, source, files, axis, majority, seat_rule, threshold) {
        (
            Some(title),
            Some(source),
            Some(files),
            Some(axis),
            Some(majority),
            Some(seat_rule),
            Some(threshold),
        ) if c.is_empty() => Ok(Manifest {
            title,
            source,
            parties,
            axis,
            groups,
            files,
            majority,
            seat_rule,
            threshold,
            presets,
        }),
        _ => Err(c),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn problems(text: &str) -> Vec<String> {
        match parse(text) {
            Ok(_) => vec![],
            Err(c) => {
                let mut e = crate::error::DatasetError::default();
                c.drain_into(&mut e);
                e.lines()
            }
        }
    }

    #[test]
    fn names_each_bad_field() {
        let p = problems(
            r##"{"title":"t","source":"s","districts":"d","electorate":"e",
            "parties":[{"id":"A","name":"x","color":"#000000"},{"id":"b","name":"y","color":"red"}],
            "groups":[{"id":"all","name":"g"}], "majority": 0}"##,
        );
        assert!(p.iter().any(|l| l.contains("field parties[0].id")), "{p:?}");
        assert!(
            p.iter().any(|l| l.contains("field parties[1].color")),
            "{p:?}"
        );
        assert!(p
            .iter()
            .any(|l| l.contains("field groups[0].id") && l.contains("reserved")));
        assert!(p.iter().any(|l| l.contains("field majority")));
        assert!(p.iter().all(|l| l.starts_with("dataset.json")));
    }

    #[test]
    fn seat_rule_and_threshold() {
        let base = r##"{"title":"t","source":"s","districts":"d","electorate":"e",
            "parties":[{"id":"a","name":"x","color":"#000000"},{"id":"b","name":"y","color":"#FFFFFF"}],
            "groups":[{"id":"g","name":"g"}] MORE}"##;
        let m = parse(&base.replace("MORE", "")).ok().unwrap();
        assert_eq!((m.seat_rule, m.threshold), (SeatRule::Winner, 0.0));
        let m = parse(&base.replace("MORE", r#","seat_rule":"sainte_lague","threshold":4"#))
            .ok()
            .unwrap();
        assert_eq!((m.seat_rule, m.threshold), (SeatRule::SainteLague, 4.0));
        let p = problems(&base.replace("MORE", r#","seat_rule":"pr","threshold":-2"#));
        assert_eq!(
            p,
            vec![
                r#"dataset.json, field seat_rule: expected "winner", "dhondt", "sainte_lague" or "hare", found "pr""#,
                "dataset.json, field threshold: expected a percentage of the district's votes from 0 to 50, found -2",
            ]
        );
    }

    #[test]
    fn syntax_error_has_line_and_column() {
        let p = problems("{\n  \"title\": ,\n}");
        assert_eq!(p.len(), 1);
        assert!(p[0].starts_with("dataset.json line 2 column"), "{p:?}");
    }

    #[test]
    fn axis_defaults_and_validates() {
        let base = r##"{"title":"t","source":"s","districts":"d","electorate":"e",
            "parties":[{"id":"a","name":"x","color":"#000000"},{"id":"b","name":"y","color":"#FFFFFF"},
                       {"id":"c","name":"z","color":"#123456"}],
            "groups":[{"id":"g","name":"g"}] AXIS}"##;
        let m = parse(&base.replace("AXIS", "")).ok().unwrap();
        assert_eq!(m.axis, [0, 1]);
        assert_eq!(m.parties[1].color, "#ffffff");
        let m = parse(&base.replace("AXIS", r#","axis":["c","a"]"#))
            .ok()
            .unwrap();
        assert_eq!(m.axis, [2, 0]);
        let p = problems(&base.replace("AXIS", r#","axis":["c","q"]"#));
        assert!(p[0].contains("axis[1]"), "{p:?}");
    }
}
