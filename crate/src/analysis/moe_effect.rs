//! What a change the size of a group's margin of error does to the map: the group's
//! A−B margin moved by its poll's 95 % margin of error (SPEC 2.3), alone, each way, and
//! the districts (and seats) that change winner against the current tally.
//!
//! ```
//! use stratamap::analysis::moe_effect::moe_effects;
//! use stratamap::model::tally::{tally, Shifts};
//! let ds = stratamap::testdata::two_groups();
//! let sh = Shifts::zero(&ds);
//! let e = moe_effects(&ds, &sh, &tally(&ds, &sh)).unwrap();
//! assert_eq!(e.len(), 2);
//! assert!(e[0].moe > 0.0);
//! ```

use crate::analysis::moe::poll_margin_moe;
use crate::dataset::Dataset;
use crate::model::tally::{tally_into, Shifts, Tally};
use serde::Serialize;

/// Districts and seats that change winner.
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize)]
pub struct Flips {
    pub districts: usize,
    pub seats: u64,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MoeEffect {
    /// The group's 95 % margin of error of its A−B margin, points.
    pub moe: f64,
    /// Moving the group's margin by +moe (toward A) and by −moe (toward B).
    pub toward_a: Flips,
    pub toward_b: Flips,
    /// The same in a sentence.
    pub words: String,
}

fn flips(ds: &Dataset, now: &Tally, then: &Tally) -> Flips {
    let mut f = Flips::default();
    for (d, (x, y)) in now.winner.iter().zip(&then.winner).enumerate() {
        if x != y {
            f.districts += 1;
            f.seats += u64::from(ds.districts[d].seats);
        }
    }
    f
}

fn phrase(f: Flips, party: &str) -> String {
    match f.districts {
        0 => format!("no district would change hands toward {party}"),
        1 => format!(
            "1 district ({} seats) would change hands toward {party}",
            f.seats
        )
        .replace("(1 seats)", "(1 seat)"),
        n => format!(
            "{n} districts ({} seats) would change hands toward {party}",
            f.seats
        )
        .replace("(1 seats)", "(1 seat)"),
    }
}

/// Per group, what its margin of error does (`None` without a poll).
pub fn moe_effects(ds: &Dataset, shifts: &Shifts, now: &Tally) -> Option<Vec<MoeEffect>> {
    let moes = poll_margin_moe(ds)?;
    let [a, b] = ds.axis;
    let (pa, pb) = (&ds.parties[a].name, &ds.parties[b].name);
    let mut sh = shifts.clone();
    let mut t = Tally::default();
    let mut out = Vec::with_capacity(moes.len());
    for (g, &moe) in moes.iter().enumerate() {
        let mut each = [Flips::default(); 2];
        for (i, sign) in [1.0, -1.0].into_iter().enumerate() {
            sh.margin[g] = shifts.margin[g] + sign * moe;
            tally_into(ds, &sh, 0.0, None, &mut t);
            each[i] = flips(ds, now, &t);
        }
        sh.margin[g] = shifts.margin[g];
        let words = format!(
            "A change this size in this group alone: {} points toward {pa}, {}; as much toward {pb}, {}.",
            crate::dataset::round_text(moe, 1),
            phrase(each[0], pa),
            phrase(each[1], pb)
        );
        out.push(MoeEffect {
            moe,
            toward_a: each[0],
            toward_b: each[1],
            words,
        });
    }
    Some(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::tally::tally;

    /// Worked by hand on the tiny dataset from its baseline (b, a, b win). The young's
    /// margin of error: poll 0.55/0.35, n 400, D 1.5: z·√(1.5·(0.9 − 0.2²)/400) = 7.04
    /// points, so 0.0352 of share moves. Toward a: x's 500 young voters close 2·17.6 =
    /// 35.2 of b's 90-vote lead: x stays b. Toward b: y's 800 young voters take 2·28.2 =
    /// 56.3 votes off a's 35-vote lead: y (2 seats) goes to b. z is 92 points to b.
    #[test]
    fn young_moe_flips_y_toward_b() {
        let ds = crate::testdata::two_groups();
        let sh = Shifts::zero(&ds);
        let e = moe_effects(&ds, &sh, &tally(&ds, &sh)).unwrap();
        let young = &e[0];
        // z = 1.959964 (the 97.5th percentile of the standard normal, common practice).
        assert!(
            (young.moe - 1.959_963_984_540_054 * (1.5f64 * (0.9 - 0.04) / 400.0).sqrt() * 100.0)
                .abs()
                < 1e-9
        );
        assert_eq!(
            young.toward_a,
            Flips {
                districts: 0,
                seats: 0
            }
        );
        assert_eq!(
            young.toward_b,
            Flips {
                districts: 1,
                seats: 2
            }
        );
        assert!(young
            .words
            .contains("1 district (2 seats) would change hands toward Birch"));
    }
}
