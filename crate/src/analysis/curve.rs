//! The seats–votes curve (SPEC 2.2): seats of the axis parties A and B under an extra
//! uniform margin shift `s` toward A for every group, and the "swing to majority": the
//! shift at which A, or B, reaches a majority.
//!
//! A's seats never fall as `s` grows (A only gains votes, B only loses them), so the
//! swing to majority is found by bisection.
//!
//! ```
//! use stratamap::{analysis::curve::seats_votes, model::tally::Shifts};
//! let ds = stratamap::testdata::two_groups_no_poll();
//! let c = seats_votes(&ds, &Shifts::zero(&ds), 15.0, 1.0);
//! assert_eq!(c.shifts.len(), 31);
//! assert_eq!(c.seats_a[15], 2); // no extra shift: the scenario itself
//! // Alder reaches 3 seats once it overturns Birch's 6.9-point lead in Xe.
//! let at = c.a_majority_at.unwrap();
//! assert!((at - 90.0 / 13.0).abs() < 0.01);
//! ```

use crate::dataset::Dataset;
use crate::model::tally::{tally_into, Shifts, Tally};
use serde::Serialize;

/// Largest extra shift searched for the swing to majority, points.
pub const SEARCH_LIMIT: f64 = 100.0;
/// Precision of the swing to majority, points.
pub const PRECISION: f64 = 0.001;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Curve {
    /// Extra uniform margin shift toward A, points.
    pub shifts: Vec<f64>,
    pub seats_a: Vec<u64>,
    pub seats_b: Vec<u64>,
    /// Smallest extra shift at which A holds a majority (within `PRECISION`); `None` if none
    /// within ±`SEARCH_LIMIT`.
    pub a_majority_at: Option<f64>,
    /// Largest extra shift at which B holds a majority.
    pub b_majority_at: Option<f64>,
}

/// The curve for shifts from `-range` to `range` in steps of `step` points.
pub fn seats_votes(ds: &Dataset, shifts: &Shifts, range: f64, step: f64) -> Curve {
    let [a, b] = ds.axis;
    let range = range.abs();
    let step = if step > 0.0 { step } else { 1.0 };
    let n = (2.0 * range / step).round() as usize;
    let mut t = Tally::default();
    let mut out = Curve {
        shifts: Vec::with_capacity(n + 1),
        seats_a: Vec::with_capacity(n + 1),
        seats_b: Vec::with_capacity(n + 1),
        a_majority_at: None,
        b_majority_at: None,
    };
    for i in 0..=n {
        let s = -range + i as f64 * step;
        tally_into(ds, shifts, s, None, &mut t);
        out.shifts.push(s);
        out.seats_a.push(t.seats[a]);
        out.seats_b.push(t.seats[b]);
    }
    let majority = u64::from(ds.majority);
    let mut has = |party: usize, s: f64| {
        tally_into(ds, shifts, s, None, &mut t);
        t.seats[party] >= majority
    };
    // A: the threshold where "has a majority" turns true as s rises.
    out.a_majority_at = threshold(|s| has(a, s), false);
    out.b_majority_at = threshold(|s| has(b, s), true);
    out
}

/// Bisection on a monotone predicate over [−LIMIT, LIMIT]. `falling`: true at low s.
fn threshold(mut p: impl FnMut(f64) -> bool, falling: bool) -> Option<f64> {
    let (mut lo, mut hi) = (-SEARCH_LIMIT, SEARCH_LIMIT);
    // `inside(s)`: the majority holds at s.
    let (at_lo, at_hi) = (p(lo), p(hi));
    if falling {
        if !at_lo {
            return None;
        }
        if at_hi {
            return Some(hi);
        }
    } else {
        if !at_hi {
            return None;
        }
        if at_lo {
            return Some(lo);
        }
    }
    while hi - lo > PRECISION {
        let mid = 0.5 * (lo + hi);
        if p(mid) != falling {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    Some(if falling { lo } else { hi })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::testdata::two_groups_no_poll;

    #[test]
    fn birch_majority_threshold() {
        // Birch needs y (2 seats): Alder leads there by 35 votes; a shift s toward Alder
        // changes the gap by 1250·2·s/200 = 12.5·s, so Birch wins y for s < −35/12.5 = −2.8.
        let ds = two_groups_no_poll();
        let c = seats_votes(&ds, &Shifts::zero(&ds), 20.0, 0.5);
        let at = c.b_majority_at.unwrap();
        assert!((at + 2.8).abs() < 0.01, "{at}");
        // Monotone: A never loses seats as the shift grows.
        assert!(c.seats_a.windows(2).all(|w| w[0] <= w[1]));
        assert!(c.seats_b.windows(2).all(|w| w[0] >= w[1]));
        assert_eq!(*c.seats_b.first().unwrap(), 4);
    }
}
