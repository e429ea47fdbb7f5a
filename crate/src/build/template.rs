//! The example dataset that `stratamap template DIR` writes: the fewest files and columns
//! a dataset needs, with a README that explains every field. It opens as it is, and is
//! meant to be edited into the analyst's own.

/// The manifest. JSON has no comments; the README explains each key.
pub const MANIFEST: &str = r##"{
  "title": "Example: three districts of an invented county",
  "source": "Invented example written by stratamap template; replace with where your figures come from",
  "parties": [
    {"id": "heron", "name": "Heron Party", "color": "#0072b2"},
    {"id": "lark", "name": "Lark Alliance", "color": "#e69f00"}
  ],
  "groups": [
    {"id": "under45", "name": "Under 45"},
    {"id": "over45", "name": "45 and over"}
  ],
  "districts": "districts.geojson",
  "electorate": "electorate.csv"
}
"##;

/// Three square districts in longitude/latitude, placed in open ocean.
pub const DISTRICTS: &str = r#"{
  "type": "FeatureCollection",
  "features": [
    {"type": "Feature",
     "properties": {"id": "north", "name": "North Weir", "seats": 1},
     "geometry": {"type": "Polygon", "coordinates": [[[-150.0, -30.0], [-149.9, -30.0], [-149.9, -29.9], [-150.0, -29.9], [-150.0, -30.0]]]}},
    {"type": "Feature",
     "properties": {"id": "middle", "name": "Middle Weir", "seats": 2},
     "geometry": {"type": "Polygon", "coordinates": [[[-150.0, -30.1], [-149.9, -30.1], [-149.9, -30.0], [-150.0, -30.0], [-150.0, -30.1]]]}},
    {"type": "Feature",
     "properties": {"id": "south", "name": "South Weir", "seats": 1},
     "geometry": {"type": "Polygon", "coordinates": [[[-150.0, -30.2], [-149.9, -30.2], [-149.9, -30.1], [-150.0, -30.1], [-150.0, -30.2]]]}}
  ]
}
"#;

/// One row per district and group: eligible people, baseline turnout and vote shares.
pub const ELECTORATE: &str = "district,group,eligible,turnout,heron,lark
north,under45,5200,0.55,0.58,0.42
north,over45,6100,0.71,0.44,0.56
middle,under45,9800,0.52,0.61,0.39
middle,over45,8700,0.69,0.47,0.53
south,under45,4300,0.49,0.40,0.60
south,over45,5900,0.74,0.35,0.65
";

/// What each file and column means.
pub const README: &str = "# An example stratamap dataset

Everything here is invented. Open it as it is, then edit it into your own election:

    stratamap check .
    stratamap tally . --scenario \"turnout=under45:5\"

or drop the three data files onto the page.

## dataset.json (the manifest)

- `title`, `source`: shown on the page and in every export. Say where the figures
  come from.
- `parties`: 2 to 12 of `{\"id\", \"name\", \"color\"}`. Ids are 1 to 32 characters of
  a-z, 0-9, `_` and `-`; colours are `#rrggbb`. The first two parties are the pair the
  margin sliders move between (set `\"axis\": [\"id1\", \"id2\"]` to pick others).
- `groups`: 1 to 64 groups of voters (`{\"id\", \"name\"}`); `all` is reserved.
  Groups made of categories (age band × schooling) may say so with `dimensions` and
  each group's `of`; see the README of stratamap.
- `districts`, `electorate`: the two files below. Optional: `poll` (a `poll.csv` with
  `group,sample_size,<party>…[,design_effect]`), `majority`, `seat_rule`, `threshold`
  and `presets`.

## districts.geojson

A GeoJSON FeatureCollection; each feature a Polygon or MultiPolygon in
longitude/latitude with properties `id` (unique), `name` and `seats` (at least 1;
default 1). Optional: `region`.

## electorate.csv

`district,group,eligible,turnout,<party id>…`, one row per district and group:

- `eligible`: people in that group and district who may vote;
- `turnout`: the baseline turnout rate, 0 to 1;
- one column per party: that group's baseline vote shares in that district, 0 to 1,
  summing to 1 (within 0.005).

A missing district and group pair means nobody eligible; every district needs at
least one row with someone eligible.

Only have counts per district by age and by schooling separately? `stratamap rake`
builds this file from them (see `stratamap rake --help`).
";

/// The files, by name.
pub const FILES: [(&str, &str); 4] = [
    ("dataset.json", MANIFEST),
    ("districts.geojson", DISTRICTS),
    ("electorate.csv", ELECTORATE),
    ("README.md", README),
];

#[cfg(test)]
mod tests {
    use crate::dataset::{Dataset, Sources};

    #[test]
    fn the_template_is_a_valid_dataset() {
        let ds = Dataset::from_sources(&Sources {
            manifest: super::MANIFEST,
            districts: super::DISTRICTS,
            electorate: super::ELECTORATE,
            poll: None,
        })
        .unwrap();
        assert_eq!(ds.district_count(), 3);
        assert_eq!(ds.total_seats(), 4);
    }
}
