//! A tiny hand-made dataset for examples and tests. The arithmetic of its tally is
//! worked by hand in `tally.rs`'s tests.

use crate::dataset::{Dataset, Sources};

pub const MANIFEST: &str = r##"{
  "title": "Tiny test land",
  "source": "Hand-made test data",
  "parties": [
    {"id": "a", "name": "Alder", "color": "#1b7f79"},
    {"id": "b", "name": "Birch", "color": "#c8871e"},
    {"id": "c", "name": "Cedar", "color": "#7a4d8c"}
  ],
  "groups": [{"id": "young", "name": "Young"}, {"id": "old", "name": "Old"}],
  "districts": "districts.geojson",
  "electorate": "electorate.csv",
  "poll": "poll.csv",
  "presets": [{"name": "Young surge", "scenario": "turnout=young:10"}]
}"##;

pub const DISTRICTS: &str = r#"{"type": "FeatureCollection", "features": [
  {"type": "Feature", "properties": {"id": "x", "name": "Xe", "region": "west"},
   "geometry": {"type": "Polygon", "coordinates": [[[0,0],[1,0],[1,1],[0,1],[0,0]]]}},
  {"type": "Feature", "properties": {"id": "y", "name": "Ypo", "seats": 2, "region": "east"},
   "geometry": {"type": "Polygon", "coordinates": [[[1,0],[2,0],[2,1],[1,1],[1,0]]]}},
  {"type": "Feature", "properties": {"id": "z", "name": "Zu", "region": "east"},
   "geometry": {"type": "Polygon", "coordinates": [[[2,0],[3,0],[3,1],[2,1],[2,0]]]}}
]}"#;

pub const ELECTORATE: &str = "district,group,eligible,turnout,a,b,c
x,young,1000,0.5,0.6,0.3,0.1
x,old,1000,0.8,0.3,0.6,0.1
y,young,2000,0.4,0.5,0.4,0.1
y,old,500,0.9,0.4,0.5,0.1
z,young,100,0.95,0.02,0.95,0.03
";

pub const POLL: &str = "group,sample_size,a,b,c,design_effect
young,400,0.55,0.35,0.10,1.5
old,600,0.35,0.55,0.10,1.2
";

/// The tiny dataset with its poll.
pub fn two_groups() -> Dataset {
    Dataset::from_sources(&Sources {
        manifest: MANIFEST,
        districts: DISTRICTS,
        electorate: ELECTORATE,
        poll: Some(POLL),
    })
    .expect("the test dataset is valid")
}

/// The tiny dataset without its poll.
pub fn two_groups_no_poll() -> Dataset {
    let manifest = MANIFEST.replace("\"poll\": \"poll.csv\",", "");
    Dataset::from_sources(&Sources {
        manifest: &manifest,
        districts: DISTRICTS,
        electorate: ELECTORATE,
        poll: None,
    })
    .expect("the test dataset is valid")
}

/// The tiny dataset (without its poll) with proportional seats: D'Hondt by default with
/// a 5% threshold, Ypo electing 5 seats, Xe keeping the winner rule. Worked by hand in
/// `tally.rs`'s tests.
pub fn proportional() -> Dataset {
    let manifest = MANIFEST.replace(
        "\"poll\": \"poll.csv\",",
        "\"seat_rule\": \"dhondt\", \"threshold\": 5,",
    );
    let districts = DISTRICTS
        .replace(
            "\"name\": \"Xe\",",
            "\"name\": \"Xe\", \"seat_rule\": \"winner\",",
        )
        .replace("\"seats\": 2,", "\"seats\": 5,");
    Dataset::from_sources(&Sources {
        manifest: &manifest,
        districts: &districts,
        electorate: ELECTORATE,
        poll: None,
    })
    .expect("the proportional test dataset is valid")
}
