//! What travels with an export: the CSV on the Web metadata of the tally's CSV, the
//! scenario as JSON and what it would take as CSV (SPEC 2.5, 4). The command line and
//! the page call the same functions, so their files agree.
//!
//! The metadata follows the W3C Recommendation "Metadata Vocabulary for Tabular Data"
//! (J. Tennison, G. Kellogg, eds., 17 December 2015): a table description with `url`,
//! `tableSchema.columns` (`name`, `titles`, `datatype`, `dc:description`), and common
//! properties for the table (`dc:title`, `dc:source`, `dc:description` for the
//! scenario in words, `rdfs:comment` for the caution). The scenario string is kept as the
//! `rdf:value` of the `prov:wasGeneratedBy` activity (PROV-O, W3C Recommendation, 2013),
//! whose prefixes are in the CSVW context. The CSV itself keeps exactly its columns.

use crate::analysis::reach::{Move, Reach};
use crate::dataset::Dataset;
use crate::model::scenario::{fmt_number, Scenario};
use crate::output::words::{reach_sentence, scenario_sentences};
use serde_json::{json, Value};

/// The CSVW description of one column of the tally's CSV, from its name.
fn column(ds: &Dataset, name: &str) -> Value {
    let party = |prefix: &str| {
        name.strip_prefix(prefix)
            .and_then(|id| ds.parties.iter().find(|p| p.id == id))
            .map(|p| p.name.clone())
    };
    let (datatype, description) = match name {
        "district" => ("string", "District id, as in the map file".to_string()),
        "name" => ("string", "District name".to_string()),
        "seats" => ("integer", "Seats the district elects".to_string()),
        "winner" => (
            "string",
            "Id of the party with most votes, or \"tie\"".to_string(),
        ),
        "margin" => (
            "double",
            "Lead of the winner over the second party, points of the votes cast".to_string(),
        ),
        "turnout" => (
            "double",
            "Votes cast as a percentage of the eligible".to_string(),
        ),
        _ => {
            if let Some(p) = party("votes_") {
                ("double", format!("Votes for {p} (not rounded)"))
            } else if let Some(p) = party("seats_") {
                ("integer", format!("Seats won by {p}"))
            } else {
                ("string", String::new())
            }
        }
    };
    let mut c = json!({"name": name, "titles": name, "datatype": datatype});
    if !description.is_empty() {
        c["dc:description"] = json!(description);
    }
    c
}

/// CSVW metadata (JSON-LD) for a tally CSV written to `csv_url` (relative to the
/// metadata file), for the CSV's header line `header`.
pub fn csvw_metadata(ds: &Dataset, s: &Scenario, header: &str, csv_url: &str) -> String {
    let columns: Vec<Value> = header
        .trim_end_matches(['\r', '\n'])
        .split(',')
        .map(|name| column(ds, name))
        .collect();
    let words = scenario_sentences(ds, s).join(" ");
    let meta = json!({
        "@context": ["http://www.w3.org/ns/csvw", {"@language": "en"}],
        "url": csv_url,
        "dc:title": format!("{}: one row per district for a scenario", ds.title),
        "dc:source": ds.source,
        "dc:description": words,
        "rdfs:comment": crate::CAUTION,
        "prov:wasGeneratedBy": {
            "@type": "prov:Activity",
            "rdfs:label": "stratamap tally with the scenario string",
            "rdf:value": s.to_query(ds),
        },
        "dialect": {"header": true, "encoding": "utf-8", "lineTerminators": ["\n"]},
        "tableSchema": {
            "columns": columns,
            "primaryKey": "district",
        },
    });
    serde_json::to_string_pretty(&meta).unwrap_or_default() + "\n"
}

/// The scenario as JSON: every value, the canonical string, the share link when the
/// page gives its address, the sentences, and the dataset's title, source and caution.
pub fn scenario_json(ds: &Dataset, s: &Scenario, link: Option<&str>) -> String {
    let per_group = |v: &[f64]| -> serde_json::Map<String, Value> {
        ds.groups
            .iter()
            .zip(v)
            .map(|(g, x)| (g.id.clone(), json!(x)))
            .collect()
    };
    let out = json!({
        "title": ds.title,
        "source": ds.source,
        "scenario": s.to_query(ds),
        "link": link,
        "start": if s.from_poll(ds) { "poll" } else { "baseline" },
        "turnout": {"all": s.turnout_all, "groups": per_group(&s.turnout)},
        "margin": {
            "toward": ds.parties[ds.axis[0]].id,
            "against": ds.parties[ds.axis[1]].id,
            "all": s.margin_all,
            "groups": per_group(&s.margin),
        },
        "runs": s.runs,
        "seed": s.seed,
        "turnout_sd": s.turnout_sd,
        "margin_sd": s.margin_sd,
        "district_sd": s.district_sd,
        "turnout_corr": s.turnout_corr,
        "embed": s.embed,
        "show": s.show.as_ref().map(|v| {
            v.iter().map(|&g| ds.groups[g].id.clone()).collect::<Vec<_>>()
        }),
        "in_words": scenario_sentences(ds, s),
        "caution": crate::CAUTION,
    });
    serde_json::to_string_pretty(&out).unwrap_or_default() + "\n"
}

/// What it would take as CSV (`stratamap tally --what-it-takes`): header
/// `group,party,outcome,turnout_change,turnout_value,margin_change,margin_value,sentence`;
/// a change is empty when not within reach. `group` is a group id or `all`.
pub fn reach_csv(ds: &Dataset, reach: &[Reach]) -> String {
    let mut w = csv::WriterBuilder::new()
        .terminator(csv::Terminator::Any(b'\n'))
        .from_writer(Vec::new());
    let _ = w.write_record([
        "group",
        "party",
        "outcome",
        "turnout_change",
        "turnout_value",
        "margin_change",
        "margin_value",
        "sentence",
    ]);
    let cells = |m: Option<Move>| match m {
        Some(m) => [fmt_number(m.change), fmt_number(m.value)],
        None => [String::new(), String::new()],
    };
    for r in reach {
        let group = r.group.map_or("all", |g| ds.groups[g].id.as_str());
        let [tc, tv] = cells(r.turnout);
        let [mc, mv] = cells(r.margin);
        let _ = w.write_record([
            group,
            &ds.parties[r.aim.party()].id,
            r.aim.outcome(),
            &tc,
            &tv,
            &mc,
            &mv,
            &reach_sentence(ds, r),
        ]);
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::reach::what_it_takes;
    use crate::model::tally::{tally, Shifts};
    use crate::output::export::tally_csv;
    use crate::testdata::two_groups;

    #[test]
    fn metadata_describes_every_column() {
        let ds = two_groups();
        let s = Scenario::parse_strict("turnout=young:4", &ds).unwrap();
        let csv = tally_csv(&ds, &tally(&ds, &Shifts::from_scenario(&ds, &s)));
        let header = csv.lines().next().unwrap();
        let meta: Value = serde_json::from_str(&csvw_metadata(&ds, &s, header, "t.csv")).unwrap();
        assert_eq!(meta["@context"][0], "http://www.w3.org/ns/csvw");
        assert_eq!(meta["url"], "t.csv");
        assert_eq!(meta["dc:source"], "Hand-made test data");
        assert_eq!(meta["rdfs:comment"], crate::CAUTION);
        assert_eq!(meta["prov:wasGeneratedBy"]["rdf:value"], "turnout=young:4");
        let cols = meta["tableSchema"]["columns"].as_array().unwrap();
        let names: Vec<&str> = cols.iter().map(|c| c["name"].as_str().unwrap()).collect();
        assert_eq!(names, header.split(',').collect::<Vec<_>>());
        assert_eq!(cols[2]["datatype"], "integer");
        assert_eq!(cols[6]["datatype"], "double");
        assert_eq!(cols[6]["dc:description"], "Votes for Alder (not rounded)");
        assert!(meta["dc:description"]
            .as_str()
            .unwrap()
            .contains("Young: turnout 4 points higher."));
    }

    #[test]
    fn scenario_json_has_every_value() {
        let ds = two_groups();
        let s =
            Scenario::parse_strict("start=baseline&margin=all:2,old:-1.5&runs=10", &ds).unwrap();
        let v: Value = serde_json::from_str(&scenario_json(&ds, &s, Some("https://x/?a"))).unwrap();
        assert_eq!(
            v["scenario"],
            "start=baseline&margin=all:2,old:-1.5&runs=10"
        );
        assert_eq!(v["start"], "baseline");
        assert_eq!(v["margin"]["all"], 2.0);
        assert_eq!(v["margin"]["groups"]["old"], -1.5);
        assert_eq!(v["margin"]["toward"], "a");
        assert_eq!(v["turnout"]["groups"]["young"], 0.0);
        assert_eq!(v["runs"], 10);
        assert_eq!(v["link"], "https://x/?a");
        assert_eq!(v["title"], "Tiny test land");
        assert_eq!(v["caution"], crate::CAUTION);
    }

    #[test]
    fn reach_as_csv() {
        let ds = crate::testdata::two_groups_no_poll();
        let s = Scenario::default_for(&ds);
        let t = tally(&ds, &Shifts::from_scenario(&ds, &s));
        let text = reach_csv(&ds, &what_it_takes(&ds, &s, &t));
        let mut r = csv::Reader::from_reader(text.as_bytes());
        let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
        assert_eq!(rows.len(), 6);
        // Old voters, Birch: the lead can do it, turnout cannot (hand-worked in reach.rs).
        let old_b = rows
            .iter()
            .find(|x| &x[0] == "old" && &x[1] == "b")
            .unwrap();
        assert_eq!(&old_b[2], "wins_majority");
        assert_eq!((&old_b[3], &old_b[4]), ("", ""));
        assert_eq!((&old_b[5], &old_b[6]), ("-7.78", "-7.78"));
    }
}
