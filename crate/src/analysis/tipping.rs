//! The tipping-point district (SPEC 2.2): order districts by the seat-leading party's
//! margin over its nearest rival, best first, and add up seats until the majority.
//!
//! It is defined only when every district's winner takes all its seats: where some
//! district shares its seats proportionally, no single district turns the majority, and
//! [`tipping_point`] gives `None` ([`why_none`] says why, for the reader).
//!
//! ```
//! use stratamap::{analysis::tipping::tipping_point, model::tally::{tally, Shifts}};
//! let ds = stratamap::testdata::two_groups_no_poll();
//! let t = tally(&ds, &Shifts::zero(&ds));
//! // Birch leads on votes with 2 seats each; its best districts: z, x, then y.
//! assert_eq!(tipping_point(&ds, &t), Some(1));
//! ```

use crate::dataset::Dataset;
use crate::model::tally::Tally;

/// The party that leads on seats (more votes break a tie, then manifest order).
pub fn seat_leader(t: &Tally) -> Option<usize> {
    (0..t.seats.len()).max_by(|&i, &j| {
        t.seats[i]
            .cmp(&t.seats[j])
            .then(t.national_votes[i].total_cmp(&t.national_votes[j]))
            .then(j.cmp(&i))
    })
}

/// The seat leader's lead over its nearest rival in district `d`, as a share of votes cast.
fn lead(t: &Tally, d: usize, leader: usize) -> f64 {
    let v = t.district_votes(d);
    let rival = v
        .iter()
        .enumerate()
        .filter(|(k, _)| *k != leader)
        .map(|(_, x)| *x)
        .fold(f64::NEG_INFINITY, f64::max);
    if t.cast[d] > 0.0 && rival.is_finite() {
        (v[leader] - rival) / t.cast[d]
    } else {
        0.0
    }
}

/// Why a dataset has no tipping point whatever the scenario, or `None` when it can
/// have one.
///
/// ```
/// use stratamap::analysis::tipping::why_none;
/// let ds = stratamap::testdata::two_groups_no_poll();
/// assert_eq!(why_none(&ds), None);
/// ```
pub fn why_none(ds: &Dataset) -> Option<&'static str> {
    ds.has_proportional().then_some(
        "No tipping point: it is defined only where each district's winner takes all its \
         seats, and this dataset shares some districts' seats proportionally.",
    )
}

/// The tipping-point district, or `None` where the seats cannot reach the majority or
/// some district is proportional ([`why_none`]).
pub fn tipping_point(ds: &Dataset, t: &Tally) -> Option<usize> {
    let mut order = Vec::new();
    tipping_point_with(ds, t, &mut order)
}

/// [`tipping_point`] reusing a buffer (for simulations).
pub fn tipping_point_with(ds: &Dataset, t: &Tally, order: &mut Vec<(f64, usize)>) -> Option<usize> {
    if ds.has_proportional() {
        return None;
    }
    let leader = seat_leader(t)?;
    if ds.total_seats() < u64::from(ds.majority) {
        return None;
    }
    order.clear();
    order.extend((0..ds.district_count()).map(|d| (lead(t, d, leader), d)));
    // Best first; equal leads keep the districts' order.
    order.sort_by(|x, y| y.0.total_cmp(&x.0).then(x.1.cmp(&y.1)));
    let mut seats = 0u64;
    for &(_, d) in order.iter() {
        seats += u64::from(ds.districts[d].seats);
        if seats >= u64::from(ds.majority) {
            return Some(d);
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::scenario::Scenario;
    use crate::model::tally::{tally, Shifts};
    use crate::testdata::two_groups_no_poll;

    #[test]
    fn tipping_follows_the_leader() {
        let ds = two_groups_no_poll();
        // margin=all:10: Alder takes x (605 to 565) and y: 3 seats. Its leads: y
        // (580 + 62.5 − (545 − 62.5))/1250 = 12.8 %, x 40/1300 = 3.1 %, z far behind.
        // y's 2 seats, then x's 1 reach the majority of 3 at x.
        let s = Scenario::parse_strict("margin=all:10", &ds).unwrap();
        let t = tally(&ds, &Shifts::from_scenario(&ds, &s));
        assert_eq!(seat_leader(&t), Some(0));
        assert_eq!(tipping_point(&ds, &t), Some(0));
    }

    #[test]
    fn none_when_majority_is_out_of_reach() {
        let mut ds = two_groups_no_poll();
        ds.majority = 5;
        let t = tally(&ds, &Shifts::zero(&ds));
        assert_eq!(tipping_point(&ds, &t), None);
    }
}
