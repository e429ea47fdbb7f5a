//! A scenario and its findings in sentences a reader understands, shared by the SVG map,
//! the CSVW metadata, the scenario JSON, the command line and the page.
//!
//! Numbers are rounded for reading ([`points`]: one decimal, no trailing `.0`); the
//! exact values stay in the CSV and the scenario string.
//!
//! ```
//! use stratamap::model::scenario::Scenario;
//! use stratamap::output::words::{points, scenario_sentences};
//! let ds = stratamap::testdata::two_groups_no_poll();
//! let s = Scenario::parse_strict("turnout=young:4&margin=old:-3", &ds).unwrap();
//! let lines = scenario_sentences(&ds, &s);
//! assert_eq!(lines[1], "Young: turnout 4 points higher.");
//! assert_eq!(
//!     lines[2],
//!     "Old: Alder's lead over Birch 3 points lower (1.5 points of vote share move from Alder to Birch)."
//! );
//! assert_eq!(points(1.2999999999999998), "1.3");
//! ```

use crate::analysis::reach::{Aim, Move, Reach};
use crate::dataset::Dataset;
use crate::model::scenario::Scenario;

/// A number of points for reading: rounded to one decimal, without a trailing `.0` and
/// without floating-point noise.
pub fn points(v: f64) -> String {
    round_text(v, 1)
}

pub use crate::dataset::round_text;

/// "1 point" or "2.5 points".
pub fn points_phrase(v: f64) -> String {
    let p = points(v.abs());
    if p == "1" {
        "1 point".to_string()
    } else {
        format!("{p} points")
    }
}

/// The one line that defines the tipping point where it is shown.
pub const TIPPING_DEFINITION: &str = "Tipping point: the district that gives the party with most seats its majority, counting its districts from its safest to its closest.";

/// The one line that says what a margin shift means, shown once beside the sliders.
pub fn lead_explained(ds: &Dataset) -> String {
    let [a, b] = ds.axis;
    let (a, b) = (&ds.parties[a].name, &ds.parties[b].name);
    format!(
        "A margin shift moves {a}'s lead over {b}: 2 points of lead is 1 point of vote share moving from one to the other."
    )
}

/// What the starting point stands for.
pub fn start_sentence(ds: &Dataset, s: &Scenario) -> String {
    if s.from_poll(ds) {
        "Starting point: each group's turnout as the dataset gives it, with its preferences as the current poll measures them.".to_string()
    } else {
        "Starting point: each group's turnout and preferences as the dataset gives them, district by district.".to_string()
    }
}

/// The margin change of one slider in words, e.g. "Alder's lead over Birch 3 points
/// higher (1.5 points of vote share move from Birch to Alder)".
fn margin_words(ds: &Dataset, v: f64) -> String {
    let [a, b] = ds.axis;
    let (a, b) = (&ds.parties[a].name, &ds.parties[b].name);
    let (dir, from, to) = if v > 0.0 {
        ("higher", b, a)
    } else {
        ("lower", a, b)
    };
    format!(
        "{a}'s lead over {b} {} {dir} ({} of vote share move from {from} to {to})",
        points_phrase(v),
        points_phrase(v / 2.0)
    )
}

fn turnout_words(v: f64) -> String {
    format!(
        "turnout {} {}",
        points_phrase(v),
        if v > 0.0 { "higher" } else { "lower" }
    )
}

/// The scenario as sentences: the starting point, then one sentence per slider that is
/// not at zero (every group first, then groups in manifest order).
pub fn scenario_sentences(ds: &Dataset, s: &Scenario) -> Vec<String> {
    let mut out = vec![start_sentence(ds, s)];
    let mut line = |who: &str, t: f64, m: f64| {
        let mut parts = Vec::new();
        if t != 0.0 {
            parts.push(turnout_words(t));
        }
        if m != 0.0 {
            parts.push(margin_words(ds, m));
        }
        if !parts.is_empty() {
            out.push(format!("{who}: {}.", parts.join("; ")));
        }
    };
    line("Every group", s.turnout_all, s.margin_all);
    for (g, group) in ds.groups.iter().enumerate() {
        line(
            &group.name,
            s.turnout.get(g).copied().unwrap_or(0.0),
            s.margin.get(g).copied().unwrap_or(0.0),
        );
    }
    if out.len() == 1 {
        out.push("No group's turnout or preference is shifted.".to_string());
    }
    out
}

/// What it would take for one group, as one sentence.
pub fn reach_sentence(ds: &Dataset, r: &Reach) -> String {
    let who = if r.group.is_some() {
        "this group's"
    } else {
        "every group's"
    };
    let party = &ds.parties[r.aim.party()].name;
    let outcome = match r.aim {
        Aim::Wins(_) => format!("{party} would win a majority"),
        Aim::Loses(_) => format!("{party} would lose its majority"),
    };
    let turnout = |m: Move| {
        format!(
            "{who} turnout {} by {}",
            if m.change > 0.0 { "rose" } else { "fell" },
            points_phrase(m.change)
        )
    };
    let margin = |m: Move| {
        let [a, b] = ds.axis;
        let toward = if m.change > 0.0 { a } else { b };
        format!(
            "{who} lead moved {} toward {}",
            points_phrase(m.change),
            ds.parties[toward].name
        )
    };
    let not = |what: &str| {
        let verb = match r.aim {
            Aim::Wins(_) => "win it",
            Aim::Loses(_) => "make it lose it",
        };
        format!("no {what} change in {} alone would {verb}", who_alone(r))
    };
    match (r.turnout, r.margin) {
        (Some(t), Some(m)) => format!("{outcome} if {}, or if {}.", turnout(t), margin(m)),
        (Some(t), None) => format!("{outcome} if {}; {}.", turnout(t), not("lead")),
        (None, Some(m)) => format!("{outcome} if {}; {}.", margin(m), not("turnout")),
        (None, None) => {
            let verb = match r.aim {
                Aim::Wins(_) => "give",
                Aim::Loses(_) => "cost",
            };
            let what = match r.aim {
                Aim::Wins(_) => format!("{party} a majority"),
                Aim::Loses(_) => format!("{party} its majority"),
            };
            format!(
                "Not within reach: no change in {} alone would {verb} {what}.",
                who_alone(r)
            )
        }
    }
}

fn who_alone(r: &Reach) -> &'static str {
    if r.group.is_some() {
        "this group"
    } else {
        "every group together"
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::reach::what_it_takes;
    use crate::model::tally::{tally, Shifts};
    use crate::testdata::two_groups_no_poll;

    #[test]
    fn numbers_for_reading() {
        assert_eq!(points(18.0), "18");
        assert_eq!(points(-4.375), "-4.4");
        assert_eq!(points(-0.04), "0");
        assert_eq!(points(1.2999999999999998), "1.3");
        assert_eq!(round_text(0.1 + 0.2, 2), "0.3");
        assert_eq!(points_phrase(-1.0), "1 point");
        assert_eq!(points_phrase(2.25), "2.3 points");
    }

    #[test]
    fn sentences_of_a_scenario() {
        let ds = two_groups_no_poll();
        let s = Scenario::default_for(&ds);
        assert_eq!(
            scenario_sentences(&ds, &s),
            vec![
                start_sentence(&ds, &s),
                "No group's turnout or preference is shifted.".to_string()
            ]
        );
        let s = Scenario::parse_strict("turnout=all:-2&margin=all:1", &ds).unwrap();
        assert_eq!(
            scenario_sentences(&ds, &s)[1],
            "Every group: turnout 2 points lower; Alder's lead over Birch 1 point higher (0.5 points of vote share move from Birch to Alder)."
        );
    }

    #[test]
    fn sentences_of_what_it_takes() {
        let ds = two_groups_no_poll();
        let s = Scenario::default_for(&ds);
        let t = tally(&ds, &Shifts::from_scenario(&ds, &s));
        let all = what_it_takes(&ds, &s, &t);
        let text: Vec<String> = all.iter().map(|r| reach_sentence(&ds, r)).collect();
        // Old voters, Birch: the lead can do it, turnout cannot (see reach.rs).
        assert!(text.contains(
            &"Birch would win a majority if this group's lead moved 7.8 points toward Birch; no turnout change in this group alone would win it."
                .to_string()
        ), "{text:#?}");
        assert!(text.contains(
            &"Alder would win a majority if this group's turnout rose by 30 points, or if this group's lead moved 18 points toward Alder."
                .to_string()
        ), "{text:#?}");
    }
}
