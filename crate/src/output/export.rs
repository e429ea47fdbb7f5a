//! The tally as CSV (SPEC 4, `stratamap tally`), shared by the command line and the
//! page's export: one row per district in GeoJSON order, every number unrounded in its
//! shortest round-trip form. When any district shares its seats proportionally, the
//! seats each party won there follow the votes as `seats_<party>` columns.

use crate::dataset::Dataset;
use crate::model::scenario::fmt_number;
use crate::model::tally::Tally;

/// The CSV text, header `district,name,seats,winner,margin,turnout,votes_<party>…`, then
/// `seats_<party>…` when [`Dataset::has_proportional`].
pub fn tally_csv(ds: &Dataset, t: &Tally) -> String {
    let with_seats = ds.has_proportional();
    let mut w = csv::WriterBuilder::new()
        .terminator(csv::Terminator::Any(b'\n'))
        .from_writer(Vec::new());
    let mut header: Vec<String> = ["district", "name", "seats", "winner", "margin", "turnout"]
        .iter()
        .map(|s| s.to_string())
        .collect();
    header.extend(ds.parties.iter().map(|p| format!("votes_{}", p.id)));
    if with_seats {
        header.extend(ds.parties.iter().map(|p| format!("seats_{}", p.id)));
    }
    // Writing to a Vec cannot fail.
    let _ = w.write_record(&header);
    for (d, district) in ds.districts.iter().enumerate() {
        let mut row = vec![
            district.id.clone(),
            district.name.clone(),
            district.seats.to_string(),
            t.winner[d].map_or("tie".to_string(), |k| ds.parties[k].id.clone()),
            fmt_number(t.margin[d]),
            fmt_number(t.turnout_percent(d)),
        ];
        row.extend(t.district_votes(d).iter().map(|v| fmt_number(*v)));
        if with_seats {
            let split = t.district_seats(d).unwrap_or_default();
            row.extend(
                (0..ds.party_count()).map(|k| split.get(k).copied().unwrap_or(0).to_string()),
            );
        }
        let _ = w.write_record(&row);
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::tally::{tally, Shifts};

    #[test]
    fn tiny_baseline_csv() {
        let ds = crate::testdata::two_groups_no_poll();
        let csv = tally_csv(&ds, &tally(&ds, &Shifts::zero(&ds)));
        let lines: Vec<&str> = csv.lines().collect();
        assert_eq!(
            lines[0],
            "district,name,seats,winner,margin,turnout,votes_a,votes_b,votes_c"
        );
        assert_eq!(lines[2], "y,Ypo,2,a,2.8,50,580,545,125");
        assert!(
            lines[1].starts_with("x,Xe,1,b,6.923076923076923,65,540,630,130"),
            "{}",
            lines[1]
        );
        assert_eq!(lines.len(), 4);
    }

    #[test]
    fn seats_columns_when_proportional() {
        let ds = crate::testdata::proportional();
        let csv = tally_csv(&ds, &tally(&ds, &Shifts::zero(&ds)));
        let lines: Vec<&str> = csv.lines().collect();
        assert_eq!(
            lines[0],
            "district,name,seats,winner,margin,turnout,votes_a,votes_b,votes_c,seats_a,seats_b,seats_c"
        );
        assert!(lines[1].ends_with(",540,630,130,0,1,0"), "{}", lines[1]);
        assert_eq!(lines[2], "y,Ypo,5,a,2.8,50,580,545,125,3,2,0");
        assert!(lines[3].ends_with(",0,1,0"), "{}", lines[3]);
        // Its CSVW metadata describes the seat columns.
        let s = crate::model::scenario::Scenario::default_for(&ds);
        let meta: serde_json::Value = serde_json::from_str(&crate::output::publish::csvw_metadata(
            &ds, &s, lines[0], "t.csv",
        ))
        .unwrap();
        let cols = meta["tableSchema"]["columns"].as_array().unwrap();
        assert_eq!(cols[9]["name"], "seats_a");
        assert_eq!(cols[9]["datatype"], "integer");
        assert_eq!(cols[9]["dc:description"], "Seats won by Alder");
    }
}
