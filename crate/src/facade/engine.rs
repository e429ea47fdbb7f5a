//! The long-lived engine: one dataset, the current scenario and its tally, kept between
//! calls so that a slider move recomputes the tally into existing buffers and nothing
//! else. The WebAssembly facade is a thin wrapper around it; it is plain Rust, so the
//! command line and the tests use it too.

use crate::analysis::curve::{seats_votes, Curve};
use crate::analysis::moe;
use crate::analysis::plane::{shift_plane, PlanePoint};
use crate::analysis::reach::{self, Reach};
use crate::analysis::tipping::{tipping_point, why_none};
use crate::dataset::{Dataset, SeatRule};
use crate::model::scenario::{Message, Scenario, Start, MAX_POINTS};
use crate::model::tally::{cell, tally, tally_into, Shifts, Tally};
use crate::output::map::{self, MapLayout, SvgOptions};
use crate::output::shading;
use crate::output::{publish, words};

use serde::Serialize;

/// Width of the map in SVG user units.
pub const MAP_WIDTH: f64 = 800.0;
/// Range and step of the seats–votes curve, points.
pub const CURVE_RANGE: f64 = 20.0;
pub const CURVE_STEP: f64 = 0.5;

/// What the page shows beside the map after every change.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Summary {
    pub seats: Vec<u64>,
    pub tied_seats: u64,
    pub majority_party: Option<usize>,
    pub majority: u32,
    /// Nationwide shares, percent.
    pub shares: Vec<f64>,
    /// 95% margin of error of each share, points (only when starting from the poll).
    pub shares_moe: Option<Vec<f64>>,
    /// Votes cast as a percent of the eligible.
    pub turnout: f64,
    pub tipping: Option<usize>,
    /// Why there is no tipping point whatever the scenario (proportional districts).
    pub tipping_note: Option<&'static str>,
    /// Seats of proportional districts where no party reached the threshold.
    pub unfilled_seats: u64,
    /// Districts whose last seat went by the tie rule (more votes, then the earlier party).
    pub last_seat_ties: Vec<usize>,
    /// Whether some district shares its seats proportionally.
    pub proportional: bool,
    /// Districts whose winner differs from the starting point's.
    pub changed: Vec<usize>,
    /// Group weights, percent.
    pub weights: Vec<f64>,
    pub base_weights: Vec<f64>,
    pub within_moe: Option<WithinMoe>,
    pub turnout_clamped: u32,
    pub margin_limited: u32,
}

#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct WithinMoe {
    pub districts: usize,
    pub seats: u64,
}

/// One group's part in a district.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupPart {
    pub votes: Vec<f64>,
    pub cast: f64,
    /// Percent.
    pub turnout: f64,
}

/// Everything about one district.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DistrictDetail {
    pub id: String,
    pub name: String,
    pub seats: u32,
    pub region: Option<String>,
    /// The district's seat rule (`winner`, `dhondt`, `sainte_lague`, `hare`), a name for
    /// readers, and its threshold in percent (proportional rules only).
    pub seat_rule: SeatRule,
    pub seat_rule_name: &'static str,
    pub threshold: Option<f64>,
    /// Seats won per party, manifest order (all to the winner under the winner rule;
    /// none on a tie).
    pub seats_won: Vec<u32>,
    /// The last seat went by the tie rule.
    pub last_seat_tie: bool,
    #[serde(serialize_with = "index_or_minus_one")]
    pub winner: Option<usize>,
    #[serde(serialize_with = "index_or_minus_one")]
    pub runner_up: Option<usize>,
    pub margin: f64,
    pub turnout: f64,
    pub votes: Vec<f64>,
    pub cast: f64,
    pub moe: Option<f64>,
    #[serde(serialize_with = "index_or_minus_one")]
    pub start_winner: Option<usize>,
    pub groups: Vec<GroupPart>,
}

/// A party index, or -1 for none (a tie), as the page reads it.
fn index_or_minus_one<S: serde::Serializer>(v: &Option<usize>, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_i64(v.map_or(-1, |k| k as i64))
}

/// What it would take, as the page reads it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReachView {
    /// Group index, −1 for all groups together.
    pub group: i64,
    pub party: usize,
    /// `wins_majority` or `loses_majority`.
    pub outcome: &'static str,
    pub turnout: Option<reach::Move>,
    pub margin: Option<reach::Move>,
    pub sentence: String,
}

/// Sentences for the page.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Words {
    pub scenario: Vec<String>,
    pub start: String,
    pub lead: String,
    pub tipping: &'static str,
}

/// The engine.
pub struct Engine {
    ds: Dataset,
    scenario: Scenario,
    shifts: Shifts,
    tally: Tally,
    baseline: Tally,
    /// Tallies of the two starting points (zero sliders): from the poll, from the baseline.
    start_poll: Option<Tally>,
    start_baseline: Tally,
    layout: MapLayout,
}

impl Engine {
    /// Take a validated dataset; the map layout is built here, once.
    pub fn new(ds: Dataset) -> Engine {
        let scenario = Scenario::default_for(&ds);
        let zero = Shifts::zero(&ds);
        let baseline = tally(&ds, &zero);
        let start_poll = ds.poll.as_ref().map(|_| {
            let mut s = Scenario::default_for(&ds);
            s.start = Start::Poll;
            tally(&ds, &Shifts::from_scenario(&ds, &s))
        });
        let shapes: Vec<_> = ds.districts.iter().map(|d| d.shape.clone()).collect();
        let layout = map::layout(&shapes, MAP_WIDTH);
        let mut e = Engine {
            shifts: zero,
            tally: Tally::default(),
            start_baseline: baseline.clone(),
            baseline,
            start_poll,
            scenario,
            layout,
            ds,
        };
        e.recompute();
        e
    }

    pub fn dataset(&self) -> &Dataset {
        &self.ds
    }
    pub fn scenario(&self) -> &Scenario {
        &self.scenario
    }
    pub fn tally(&self) -> &Tally {
        &self.tally
    }
    pub fn shifts(&self) -> &Shifts {
        &self.shifts
    }
    pub fn layout(&self) -> &MapLayout {
        &self.layout
    }

    fn recompute(&mut self) {
        self.shifts = Shifts::from_scenario(&self.ds, &self.scenario);
        tally_into(&self.ds, &self.shifts, 0.0, None, &mut self.tally);
    }

    /// Replace the whole scenario from a string (lenient); returns the problems found.
    pub fn set_scenario(&mut self, query: &str) -> Vec<Message> {
        let parsed = Scenario::parse(query, &self.ds);
        self.scenario = parsed.scenario;
        self.scenario.data = None;
        self.recompute();
        parsed.messages
    }

    /// Set one group's turnout shift (`None`: the shift for all groups), clamped to ±100.
    pub fn set_turnout(&mut self, group: Option<usize>, points: f64) {
        let v = clamp_points(points);
        match group {
            None => self.scenario.turnout_all = v,
            Some(g) if g < self.ds.group_count() => self.scenario.turnout[g] = v,
            Some(_) => return,
        }
        self.recompute();
    }

    /// Set one group's margin shift (`None`: all groups), clamped to ±100.
    pub fn set_margin(&mut self, group: Option<usize>, points: f64) {
        let v = clamp_points(points);
        match group {
            None => self.scenario.margin_all = v,
            Some(g) if g < self.ds.group_count() => self.scenario.margin[g] = v,
            Some(_) => return,
        }
        self.recompute();
    }

    /// Start from the poll (when the dataset has one) or from the baseline.
    pub fn set_start(&mut self, from_poll: bool) {
        self.scenario.start = if from_poll && self.ds.poll.is_some() {
            Start::Poll
        } else {
            Start::Baseline
        };
        self.recompute();
    }

    /// The canonical scenario string (without `data`).
    pub fn scenario_query(&self) -> String {
        self.scenario.to_query(&self.ds)
    }

    fn start_tally(&self) -> &Tally {
        match (&self.start_poll, self.scenario.from_poll(&self.ds)) {
            (Some(t), true) => t,
            _ => &self.start_baseline,
        }
    }

    /// Palette index per district (see [`shading::palette`]).
    pub fn fills(&self) -> Vec<u16> {
        shading::fills(&self.ds, &self.tally)
    }

    pub fn summary(&self) -> Summary {
        let t = &self.tally;
        let pct = |v: Vec<f64>| v.into_iter().map(|x| x * 100.0).collect::<Vec<_>>();
        let from_poll = self.scenario.from_poll(&self.ds);
        let start = self.start_tally();
        let eligible: f64 = t.eligible.iter().sum();
        Summary {
            seats: t.seats.clone(),
            tied_seats: t.tied_seats,
            majority_party: t.majority_party,
            majority: self.ds.majority,
            shares: pct(t.shares()),
            shares_moe: if from_poll {
                moe::national_share_moe(&self.ds, t)
            } else {
                None
            },
            turnout: if eligible > 0.0 {
                t.total_cast() / eligible * 100.0
            } else {
                0.0
            },
            tipping: tipping_point(&self.ds, t),
            tipping_note: why_none(&self.ds),
            unfilled_seats: t.unfilled_seats,
            last_seat_ties: t.last_seat_ties.clone(),
            proportional: self.ds.has_proportional(),
            changed: (0..self.ds.district_count())
                .filter(|&d| t.winner[d] != start.winner[d])
                .collect(),
            weights: pct(t.group_weights()),
            base_weights: pct(self.baseline.group_weights()),
            within_moe: if from_poll {
                moe::within_moe(&self.ds, &self.shifts, t)
                    .map(|(districts, seats)| WithinMoe { districts, seats })
            } else {
                None
            },
            turnout_clamped: t.turnout_clamped,
            margin_limited: t.margin_limited,
        }
    }

    /// Details of district `d`, or `None` when there is no such district.
    pub fn district(&self, d: usize) -> Option<DistrictDetail> {
        let district = self.ds.districts.get(d)?;
        let t = &self.tally;
        let groups = (0..self.ds.group_count())
            .map(|g| {
                let c = cell(&self.ds, &self.shifts, d, g, 0.0);
                let cast = c.eligible * c.turnout;
                GroupPart {
                    votes: c.shares.iter().map(|s| s * cast).collect(),
                    cast,
                    turnout: c.turnout * 100.0,
                }
            })
            .collect();
        Some(DistrictDetail {
            id: district.id.clone(),
            name: district.name.clone(),
            seats: district.seats,
            region: district.region.clone(),
            seat_rule: district.seat_rule,
            seat_rule_name: district.seat_rule.name(),
            threshold: district
                .seat_rule
                .is_proportional()
                .then_some(district.threshold),
            seats_won: match t.district_seats(d) {
                Some(split) => split.to_vec(),
                None => (0..self.ds.party_count())
                    .map(|k| {
                        if t.winner[d] == Some(k) {
                            district.seats
                        } else {
                            0
                        }
                    })
                    .collect(),
            },
            last_seat_tie: t.last_seat_ties.contains(&d),
            winner: t.winner[d],
            runner_up: t.runner_up[d],
            margin: t.margin[d],
            turnout: t.turnout_percent(d),
            votes: t.district_votes(d).to_vec(),
            cast: t.cast[d],
            moe: if self.scenario.from_poll(&self.ds) {
                moe::district_moe(&self.ds, &self.shifts, t, d)
            } else {
                None
            },
            start_winner: self.start_tally().winner[d],
            groups,
        })
    }

    pub fn curve(&self) -> Curve {
        seats_votes(&self.ds, &self.shifts, CURVE_RANGE, CURVE_STEP)
    }

    pub fn plane(&self) -> Vec<PlanePoint> {
        shift_plane(&self.baseline, &self.tally)
    }

    pub fn tally_csv(&self) -> String {
        crate::output::export::tally_csv(&self.ds, &self.tally)
    }

    /// What it would take (SPEC 2.5) for every group, then all groups together.
    pub fn what_it_takes(&self) -> Vec<Reach> {
        reach::what_it_takes(&self.ds, &self.scenario, &self.tally)
    }

    /// [`Self::what_it_takes`] with a sentence each, for the page.
    pub fn what_it_takes_view(&self) -> Vec<ReachView> {
        self.views(self.what_it_takes())
    }

    /// What it would take for one group (`None`: all groups together), with sentences.
    pub fn what_it_takes_group(&self, group: Option<usize>) -> Vec<ReachView> {
        self.views(reach::for_group(
            &self.ds,
            &self.scenario,
            &self.tally,
            group,
        ))
    }

    fn views(&self, all: Vec<Reach>) -> Vec<ReachView> {
        all.into_iter()
            .map(|r| ReachView {
                group: r.group.map_or(-1, |g| g as i64),
                party: r.aim.party(),
                outcome: r.aim.outcome(),
                turnout: r.turnout,
                margin: r.margin,
                sentence: words::reach_sentence(&self.ds, &r),
            })
            .collect()
    }

    /// The scenario in sentences and the fixed explanations beside it.
    pub fn words(&self) -> Words {
        Words {
            scenario: self.scenario_sentences(),
            start: words::start_sentence(&self.ds, &self.scenario),
            lead: words::lead_explained(&self.ds),
            tipping: words::TIPPING_DEFINITION,
        }
    }

    /// [`Self::what_it_takes`] as CSV.
    pub fn what_it_takes_csv(&self) -> String {
        publish::reach_csv(&self.ds, &self.what_it_takes())
    }

    /// The CSV on the Web metadata of [`Self::tally_csv`], for a CSV saved as `csv_url`.
    pub fn tally_csvw(&self, csv_url: &str) -> String {
        let csv = self.tally_csv();
        let header = csv.lines().next().unwrap_or_default();
        publish::csvw_metadata(&self.ds, &self.scenario, header, csv_url)
    }

    /// The scenario as JSON, with the page's share link when there is one.
    pub fn scenario_json(&self, link: Option<&str>) -> String {
        publish::scenario_json(&self.ds, &self.scenario, link)
    }

    /// The scenario in sentences.
    pub fn scenario_sentences(&self) -> Vec<String> {
        words::scenario_sentences(&self.ds, &self.scenario)
    }

    /// The page's inline map: districts only, filled by the page.
    pub fn map_svg(&self) -> String {
        let names: Vec<String> = self.ds.districts.iter().map(|d| d.name.clone()).collect();
        map::svg(
            &self.layout,
            &SvgOptions {
                names: &names,
                fills: None,
                title: None,
                legend: Vec::new(),
                footer: Vec::new(),
                marker: None,
                standalone: false,
            },
        )
    }

    /// The map as a standalone SVG document for the current scenario, with title,
    /// legend, source line, caution and the scenario itself.
    pub fn render_svg(&self) -> String {
        let ds = &self.ds;
        let names: Vec<String> = ds.districts.iter().map(|d| d.name.clone()).collect();
        let palette = shading::palette(ds);
        let fills: Vec<String> = self
            .fills()
            .iter()
            .map(|&i| palette[i as usize].clone())
            .collect();
        let labels = shading::step_labels();
        let mut legend = Vec::new();
        for (k, p) in ds.parties.iter().enumerate() {
            for (s, label) in labels.iter().enumerate() {
                legend.push((
                    palette[k * shading::STEPS + s].clone(),
                    format!("{} ahead by {label}", p.name),
                ));
            }
        }
        legend.push((shading::TIE_FILL.to_string(), "tie".to_string()));
        let summary = self.summary();
        let seats: Vec<String> = ds
            .parties
            .iter()
            .zip(&summary.seats)
            .map(|(p, s)| format!("{} {s}", p.name))
            .collect();
        let seats_line = match summary.majority_party {
            Some(k) => format!(
                "Seats: {} of {}; a majority is {}: {} holds one.",
                seats.join(", "),
                ds.total_seats(),
                ds.majority,
                ds.parties[k].name,
            ),
            None => format!(
                "Seats: {}; a majority is {} of {}: no party holds one.",
                seats.join(", "),
                ds.majority,
                ds.total_seats()
            ),
        };
        let mut footer = vec![seats_line];
        if summary.proportional {
            footer.push(format!("Seat rules: {}.", seat_rules(ds)));
        }
        footer.extend(seat_notes(ds, &summary).into_iter().map(|n| n + "."));
        if let Some(n) = summary.tipping_note {
            footer.push(n.to_string());
        }
        footer.extend(words::scenario_sentences(ds, &self.scenario));
        if let Some(m) = &summary.shares_moe {
            let parts: Vec<String> = ds
                .parties
                .iter()
                .zip(summary.shares.iter().zip(m))
                .map(|(p, (s, e))| {
                    format!("{} {}% ± {}", p.name, words::points(*s), words::points(*e))
                })
                .collect();
            footer.push(format!(
                "Nationwide shares (95% margin of error from the poll): {}",
                parts.join(", ")
            ));
        }
        if let Some(d) = summary.tipping {
            footer.push(format!(
                "{} Here: {} (ringed on the map).",
                words::TIPPING_DEFINITION,
                ds.districts[d].name
            ));
        }
        footer.push(format!("Source: {}", ds.source));
        footer.push(crate::CAUTION.to_string());
        map::svg(
            &self.layout,
            &SvgOptions {
                names: &names,
                fills: Some(&fills),
                title: Some(&ds.title),
                legend,
                footer,
                marker: summary.tipping,
                standalone: true,
            },
        )
    }
}

/// How the districts share their seats, in a phrase: "winner takes all in 1 district,
/// D'Hondt in 2 districts (threshold 5%)".
pub fn seat_rules(ds: &Dataset) -> String {
    let mut parts: Vec<String> = Vec::new();
    for rule in SeatRule::ALL {
        let of_rule: Vec<_> = ds
            .districts
            .iter()
            .filter(|d| d.seat_rule == rule)
            .collect();
        if of_rule.is_empty() {
            continue;
        }
        let n = of_rule.len();
        let mut part = format!(
            "{} in {n} district{}",
            rule.name(),
            if n == 1 { "" } else { "s" }
        );
        if rule.is_proportional() {
            let mut thresholds: Vec<f64> = of_rule.iter().map(|d| d.threshold).collect();
            thresholds.sort_by(f64::total_cmp);
            thresholds.dedup();
            let list: Vec<String> = thresholds.iter().map(|t| format!("{t}%")).collect();
            part += &format!(" (threshold {})", list.join(" or "));
        }
        parts.push(part);
    }
    parts.join(", ")
}

/// Notes on seats that a reader needs beside the totals: seats nobody won for want of
/// votes over the threshold, and last seats decided by the tie rule.
pub fn seat_notes(ds: &Dataset, s: &Summary) -> Vec<String> {
    let mut out = Vec::new();
    if s.unfilled_seats > 0 {
        out.push(format!(
            "{} seat{} unfilled: no party reached the threshold there",
            s.unfilled_seats,
            if s.unfilled_seats == 1 { "" } else { "s" }
        ));
    }
    if !s.last_seat_ties.is_empty() {
        let names: Vec<&str> = s
            .last_seat_ties
            .iter()
            .filter_map(|&d| ds.districts.get(d).map(|x| x.name.as_str()))
            .collect();
        out.push(format!(
            "The last seat was level and went to the party with more votes (then the one listed first) in: {}",
            names.join(", ")
        ));
    }
    out
}

fn clamp_points(v: f64) -> f64 {
    if v.is_nan() {
        0.0
    } else {
        v.clamp(-MAX_POINTS, MAX_POINTS)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::testdata::two_groups;

    #[test]
    fn setters_match_the_string() {
        let mut e = Engine::new(two_groups());
        e.set_turnout(Some(0), 4.0);
        e.set_margin(None, -2.5);
        e.set_start(false);
        assert_eq!(
            e.scenario_query(),
            "start=baseline&turnout=young:4&margin=all:-2.5"
        );
        let mut f = Engine::new(two_groups());
        assert!(f.set_scenario(&e.scenario_query()).is_empty());
        assert_eq!(e.tally(), f.tally());
        e.set_margin(Some(9), 1.0); // no such group: ignored
        e.set_turnout(None, 1e9);
        assert_eq!(e.scenario().turnout_all, 100.0);
    }

    #[test]
    fn summary_and_detail() {
        let mut e = Engine::new(two_groups());
        e.set_start(false);
        let s = e.summary();
        assert_eq!(s.seats, vec![2, 2, 0]);
        assert!(s.changed.is_empty());
        assert!(s.shares_moe.is_none());
        e.set_margin(None, 10.0);
        let s = e.summary();
        assert_eq!(s.changed, vec![0]);
        assert_eq!(s.majority_party, Some(0));
        let d = e.district(1).unwrap();
        let sum: f64 = d.groups.iter().map(|g| g.votes[0]).sum();
        assert!((sum - d.votes[0]).abs() < 1e-9);
        assert!(e.district(3).is_none());
        e.set_start(true);
        assert!(e.summary().shares_moe.is_some());
        assert!(e.district(0).unwrap().moe.is_some());
        let d = e.district(1).unwrap();
        assert_eq!(d.seats_won, vec![2, 0, 0]);
        assert_eq!((d.seat_rule, d.threshold), (SeatRule::Winner, None));
        assert!(e.summary().tipping_note.is_none());
    }

    #[test]
    fn proportional_summary_and_detail() {
        let e = Engine::new(crate::testdata::proportional());
        let s = e.summary();
        assert_eq!(s.seats, vec![3, 4, 0]);
        assert_eq!(s.majority_party, Some(1));
        assert_eq!(s.tipping, None);
        assert!(s.tipping_note.unwrap().contains("proportionally"));
        assert!(s.proportional);
        let d = e.district(1).unwrap();
        assert_eq!(d.seats_won, vec![3, 2, 0]);
        assert_eq!(d.seat_rule, SeatRule::Dhondt);
        assert_eq!(d.threshold, Some(5.0));
        assert_eq!(e.district(0).unwrap().seats_won, vec![0, 1, 0]);
        // The standalone map says there is no tipping point and shows the seats.
        let svg = e.render_svg();
        assert!(svg.contains("Seats: Alder 3, Birch 4, Cedar 0"), "{svg}");
        assert!(svg.contains("No tipping point"), "{svg}");
        assert_eq!(
            seat_rules(e.dataset()),
            "winner takes all in 1 district, D'Hondt in 2 districts (threshold 5%)"
        );
    }

    #[test]
    fn what_it_takes_one_group_at_a_time_is_the_whole() {
        let mut e = Engine::new(two_groups());
        e.set_scenario("turnout=young:3");
        let whole = e.what_it_takes_view();
        let parts: Vec<ReachView> = [Some(0), Some(1), None]
            .into_iter()
            .flat_map(|g| e.what_it_takes_group(g))
            .collect();
        assert_eq!(whole, parts);
        assert!(e.what_it_takes_group(Some(7)).is_empty());
        assert!(whole.iter().all(|r| !r.sentence.is_empty()));
    }
}
