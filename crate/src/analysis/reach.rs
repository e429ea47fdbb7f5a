//! What it would take (SPEC 2.5, DEVELOPERS.md "What it would take"): for each group,
//! and for every group at once (`all`), the smallest change of that one slider — its
//! turnout shift, and separately its margin shift — with every other value as it stands,
//! at which the majority changes hands.
//!
//! The aims: when a party holds a majority, its nearest rival winning one and the
//! holder losing it; when nobody does, each of the two parties with most seats winning
//! one. The search scans the slider's range outward from its current value in steps of
//! [`SCAN_STEP`] points, and bisects the first step at which the aim is met, on each
//! side, to [`BISECTION_TOLERANCE`]; the smaller change wins and is given rounded to
//! [`PRECISION`] (0.01 points). "Not within reach" (`None`) when no slider value in
//! [−100, 100] meets the aim.
//!
//! ```
//! use stratamap::analysis::reach::{what_it_takes, Aim};
//! use stratamap::model::scenario::Scenario;
//! use stratamap::model::tally::{tally, Shifts};
//! let ds = stratamap::testdata::two_groups_no_poll();
//! let s = Scenario::default_for(&ds);
//! let t = tally(&ds, &Shifts::from_scenario(&ds, &s));
//! let all = what_it_takes(&ds, &s, &t);
//! // Young voters' lead moving 18 points toward Alder overturns Birch's 90-vote lead in Xe.
//! let young = all.iter().find(|r| r.group == Some(0) && r.aim == Aim::Wins(0)).unwrap();
//! assert_eq!(young.margin.unwrap().change, 18.0);
//! ```

use crate::analysis::tipping::seat_leader;
use crate::dataset::Dataset;
use crate::model::scenario::{Scenario, MAX_POINTS};
use crate::model::tally::{tally_into, Shifts, Tally};
use serde::Serialize;

/// Step of the outward scan, points. A window in which the aim is met that is narrower
/// than this can be missed (the seats are not always monotone in a turnout shift).
pub const SCAN_STEP: f64 = 2.5;
/// Width at which the bisection stops, points.
pub const BISECTION_TOLERANCE: f64 = 0.001;
/// Precision of the reported change, points.
pub const PRECISION: f64 = 0.01;

/// What the majority would do.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(tag = "outcome", content = "party", rename_all = "snake_case")]
pub enum Aim {
    /// This party would reach a majority.
    Wins(usize),
    /// This party would lose the majority it holds.
    Loses(usize),
}

impl Aim {
    pub fn party(self) -> usize {
        match self {
            Aim::Wins(k) | Aim::Loses(k) => k,
        }
    }

    /// Whether a tally meets the aim.
    pub fn met(self, ds: &Dataset, t: &Tally) -> bool {
        let majority = u64::from(ds.majority);
        match self {
            Aim::Wins(k) => t.seats.get(k).is_some_and(|&s| s >= majority),
            Aim::Loses(k) => t.seats.get(k).is_none_or(|&s| s < majority),
        }
    }

    /// The name used in CSV and JSON: `wins_majority` or `loses_majority`.
    pub fn outcome(self) -> &'static str {
        match self {
            Aim::Wins(_) => "wins_majority",
            Aim::Loses(_) => "loses_majority",
        }
    }
}

/// Which slider moves.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Lever {
    Turnout,
    Margin,
}

/// A change of one slider that meets an aim.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Move {
    /// Change from the slider's current value, points (rounded to [`PRECISION`]).
    pub change: f64,
    /// The slider's value after the change, points, in [−100, 100].
    pub value: f64,
}

/// What it would take for one group (or all groups) and one aim.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Reach {
    /// The group, or `None` for the slider of every group (`all`).
    pub group: Option<usize>,
    pub aim: Aim,
    /// The turnout change, or `None`: not within reach.
    pub turnout: Option<Move>,
    /// The margin change (points toward axis party A), or `None`: not within reach.
    pub margin: Option<Move>,
}

/// The aims for a tally (see the module documentation).
pub fn aims(ds: &Dataset, t: &Tally) -> Vec<Aim> {
    if ds.party_count() < 2 {
        return Vec::new();
    }
    let rank = |skip: Option<usize>| {
        (0..ds.party_count())
            .filter(|&k| Some(k) != skip)
            .max_by(|&i, &j| {
                t.seats[i]
                    .cmp(&t.seats[j])
                    .then(t.national_votes[i].total_cmp(&t.national_votes[j]))
                    .then(j.cmp(&i))
            })
    };
    match t.majority_party {
        Some(holder) => rank(Some(holder))
            .map(|rival| vec![Aim::Wins(rival), Aim::Loses(holder)])
            .unwrap_or_default(),
        None => {
            let first = seat_leader(t).or_else(|| rank(None));
            let second = first.and_then(|f| rank(Some(f)));
            first.into_iter().chain(second).map(Aim::Wins).collect()
        }
    }
}

/// What it would take, for every group in manifest order and then `all`, for each of
/// [`aims`] of the tally `t` of scenario `s`.
pub fn what_it_takes(ds: &Dataset, s: &Scenario, t: &Tally) -> Vec<Reach> {
    let groups = (0..ds.group_count()).map(Some).chain(std::iter::once(None));
    groups.flat_map(|g| for_group(ds, s, t, g)).collect()
}

/// [`what_it_takes`] for one slider pair: group `g`, or `None` for all groups together
/// (the page computes one group at a time so that no single call blocks it for long).
pub fn for_group(ds: &Dataset, s: &Scenario, t: &Tally, group: Option<usize>) -> Vec<Reach> {
    if group.is_some_and(|g| g >= ds.group_count()) {
        return Vec::new();
    }
    let aims = aims(ds, t);
    let base = Shifts::from_scenario(ds, s);
    let mut scratch = Tally::default();
    let turnout = search(ds, s, &base, group, Lever::Turnout, &aims, &mut scratch);
    let margin = search(ds, s, &base, group, Lever::Margin, &aims, &mut scratch);
    aims.iter()
        .enumerate()
        .map(|(i, &aim)| Reach {
            group,
            aim,
            turnout: turnout[i],
            margin: margin[i],
        })
        .collect()
}

/// The slider's current value.
fn current(s: &Scenario, group: Option<usize>, lever: Lever) -> f64 {
    match (group, lever) {
        (None, Lever::Turnout) => s.turnout_all,
        (None, Lever::Margin) => s.margin_all,
        (Some(g), Lever::Turnout) => s.turnout.get(g).copied().unwrap_or(0.0),
        (Some(g), Lever::Margin) => s.margin.get(g).copied().unwrap_or(0.0),
    }
}

/// For one slider, the smallest change meeting each aim (`None`: not within reach).
pub fn search(
    ds: &Dataset,
    s: &Scenario,
    base: &Shifts,
    group: Option<usize>,
    lever: Lever,
    aims: &[Aim],
    scratch: &mut Tally,
) -> Vec<Option<Move>> {
    let now = current(s, group, lever);
    let mut shifts = base.clone();
    let met_at = |change: f64, shifts: &mut Shifts, scratch: &mut Tally| -> Vec<bool> {
        let target = match lever {
            Lever::Turnout => &mut shifts.turnout,
            Lever::Margin => &mut shifts.margin,
        };
        let from = match lever {
            Lever::Turnout => &base.turnout,
            Lever::Margin => &base.margin,
        };
        match group {
            Some(g) => target[g] = from[g] + change,
            None => {
                for (t, f) in target.iter_mut().zip(from) {
                    *t = f + change;
                }
            }
        }
        tally_into(ds, shifts, 0.0, None, scratch);
        aims.iter().map(|a| a.met(ds, scratch)).collect()
    };
    // For each aim and each direction (up, down): the last change that does not meet the
    // aim and the first that does.
    let mut brackets: Vec<[Option<(f64, f64)>; 2]> = vec![[None, None]; aims.len()];
    for (dir, sign) in [(0usize, 1.0f64), (1, -1.0)] {
        let limit = if sign > 0.0 {
            MAX_POINTS - now
        } else {
            now + MAX_POINTS
        };
        let mut prev = 0.0;
        let mut step = 1;
        while prev < limit {
            let dist = (step as f64 * SCAN_STEP).min(limit);
            let met = met_at(sign * dist, &mut shifts, scratch);
            for (i, m) in met.iter().enumerate() {
                if *m && brackets[i][dir].is_none() {
                    brackets[i][dir] = Some((prev, dist));
                }
            }
            if brackets.iter().all(|b| b[dir].is_some()) {
                break;
            }
            prev = dist;
            step += 1;
        }
    }
    (0..aims.len())
        .map(|i| {
            let mut best: Option<f64> = None;
            for (dir, sign) in [(0usize, 1.0f64), (1, -1.0)] {
                let Some((mut lo, mut hi)) = brackets[i][dir] else {
                    continue;
                };
                if best.is_some_and(|b| b.abs() <= lo) {
                    continue;
                }
                while hi - lo > BISECTION_TOLERANCE {
                    let mid = 0.5 * (lo + hi);
                    if met_at(sign * mid, &mut shifts, scratch)[i] {
                        hi = mid;
                    } else {
                        lo = mid;
                    }
                }
                if best.is_none_or(|b| hi < b.abs()) {
                    best = Some(sign * hi);
                }
            }
            best.map(|change| {
                let change = round_to_precision(change);
                Move {
                    change,
                    value: (now + change).clamp(-MAX_POINTS, MAX_POINTS),
                }
            })
        })
        .collect()
}

/// Rounded to [`PRECISION`], without floating-point noise (18.000000000000004 → 18).
fn round_to_precision(v: f64) -> f64 {
    let r = (v / PRECISION).round() / (1.0 / PRECISION);
    if r == 0.0 {
        0.0
    } else {
        r
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::curve::seats_votes;
    use crate::model::tally::tally;
    use crate::testdata::two_groups_no_poll;

    fn find(all: &[Reach], group: Option<usize>, aim: Aim) -> &Reach {
        all.iter()
            .find(|r| r.group == group && r.aim == aim)
            .unwrap_or_else(|| panic!("{group:?} {aim:?} missing"))
    }

    fn change(m: Option<Move>) -> Option<f64> {
        m.map(|m| m.change)
    }

    /// The tiny dataset at its baseline: Alder (a) 2 seats (Ypo, 2 seats, by 580 to 545),
    /// Birch (b) 2 seats (Xe by 630 to 540, Zu); 4 seats, majority 3, nobody holds it.
    /// Worked by hand (x = share moved from Birch to Alder = m/200 for a margin shift m;
    /// a turnout shift t adds N·t/100 voters):
    /// - Alder wins Xe when the young vote moves: 500 voters, gap 90, each point of
    ///   margin narrows it by 500·2/200 = 5 votes → m = 18; young turnout: +10 voters per
    ///   point at 0.6 − 0.3 → 3 votes a point → t = 30.
    ///   Old: 800 voters in Xe → 8 votes a point of margin → m = 11.25; old turnout falls:
    ///   −10 voters a point at 0.3 net for Birch → t = −30.
    /// - Birch wins Ypo (gap 35): young 800 voters → 8 a point → m = −4.375 (reported
    ///   −4.38); young turnout falls, 20 voters a point at 0.1 net → t = −17.5.
    ///   Old 450 voters → 4.5 a point → m = −7.78; old turnout can rise by 10 points at
    ///   most (0.9 → 1): 5 votes, short of 35 → not within reach.
    #[test]
    fn hand_worked_values_on_the_tiny_dataset() {
        let ds = two_groups_no_poll();
        let s = Scenario::default_for(&ds);
        let t = tally(&ds, &Shifts::from_scenario(&ds, &s));
        assert_eq!(aims(&ds, &t), vec![Aim::Wins(1), Aim::Wins(0)]);
        let all = what_it_takes(&ds, &s, &t);
        assert_eq!(all.len(), 3 * 2);
        let young_a = find(&all, Some(0), Aim::Wins(0));
        assert_eq!(change(young_a.margin), Some(18.0));
        assert_eq!(change(young_a.turnout), Some(30.0));
        let old_a = find(&all, Some(1), Aim::Wins(0));
        assert_eq!(change(old_a.margin), Some(11.25));
        assert_eq!(change(old_a.turnout), Some(-30.0));
        let young_b = find(&all, Some(0), Aim::Wins(1));
        assert_eq!(change(young_b.margin), Some(-4.38));
        assert_eq!(change(young_b.turnout), Some(-17.5));
        let old_b = find(&all, Some(1), Aim::Wins(1));
        assert_eq!(change(old_b.margin), Some(-7.78));
        assert_eq!(old_b.turnout, None);
    }

    #[test]
    fn every_group_at_once_agrees_with_the_swing_to_majority() {
        // The margin slider of every group is the seats–votes curve's uniform shift, so
        // its change must be the curve's swing to majority, for both axis parties.
        let ds = two_groups_no_poll();
        for q in [
            "",
            "turnout=young:6",
            "margin=old:-3",
            "turnout=all:-4&margin=young:2",
        ] {
            let s = Scenario::parse_strict(q, &ds).unwrap();
            let shifts = Shifts::from_scenario(&ds, &s);
            let t = tally(&ds, &shifts);
            let curve = seats_votes(&ds, &shifts, 20.0, 0.5);
            let all = what_it_takes(&ds, &s, &t);
            for r in all.iter().filter(|r| r.group.is_none()) {
                let expected = match r.aim {
                    Aim::Wins(0) => curve.a_majority_at,
                    Aim::Wins(1) => curve.b_majority_at,
                    _ => continue,
                };
                let (got, want) = (change(r.margin).unwrap(), expected.unwrap());
                assert!((got - want).abs() <= 0.01, "{q}: {got} vs {want}");
            }
        }
    }

    #[test]
    fn a_holder_can_lose_its_majority_before_the_rival_wins() {
        let ds = two_groups_no_poll();
        // Every group 10 points toward Alder: Alder 3 seats (Xe, Ypo), a majority.
        let s = Scenario::parse_strict("margin=all:10", &ds).unwrap();
        let t = tally(&ds, &Shifts::from_scenario(&ds, &s));
        assert_eq!(t.majority_party, Some(0));
        assert_eq!(aims(&ds, &t), vec![Aim::Wins(1), Aim::Loses(0)]);
        let all = what_it_takes(&ds, &s, &t);
        let every = |aim| change(find(&all, None, aim).margin).unwrap();
        // Back to where Alder held 2 seats: the swing to majority's 6.92 (90/13); Birch
        // wins once Ypo goes too, at −2.8.
        assert!((every(Aim::Loses(0)) - (90.0 / 13.0 - 10.0)).abs() <= 0.01);
        assert!((every(Aim::Wins(1)) - (-2.8 - 10.0)).abs() <= 0.01);
        for r in &all {
            if let Some(m) = r.margin {
                assert!((-100.0..=100.0).contains(&m.value));
            }
        }
    }

    #[test]
    fn rounding_has_no_noise() {
        assert_eq!(round_to_precision(18.000_000_4), 18.0);
        assert_eq!(round_to_precision(-4.3755), -4.38);
        assert_eq!(round_to_precision(-0.001), 0.0);
        assert_eq!(format!("{}", round_to_precision(0.1 + 0.2)), "0.3");
    }
}
