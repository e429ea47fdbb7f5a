//! Sampling error (SPEC 2.3), with the published formulas:
//! the standard error of a proportion inflated by Kish's design effect, the standard
//! error of a difference of two shares from one sample (multinomial covariance), a
//! weighted composite of independent group estimates, and Kish's design effect of weights.
//!
//! ```
//! use stratamap::analysis::moe::{moe95, share_se};
//! // 1,000 respondents, p = 0.5: about ±3.1 points.
//! let m = moe95(share_se(0.5, 1000.0, 1.0)) * 100.0;
//! assert!((m - 3.099).abs() < 0.001);
//! ```

use crate::dataset::Dataset;
use crate::model::tally::{shifted_turnout, transfer, Shifts, Tally};

/// The 97.5th percentile of the standard normal distribution, for 95% intervals.
pub const Z95: f64 = 1.959_963_984_540_054;

/// Standard error of a share `p` from `n` respondents with design effect `deff`:
/// sqrt(D · p(1−p) / n).
pub fn share_se(p: f64, n: f64, deff: f64) -> f64 {
    if n <= 0.0 {
        return f64::INFINITY;
    }
    (deff * p * (1.0 - p) / n).max(0.0).sqrt()
}

/// Standard error of the margin p_a − p_b from one sample:
/// sqrt(D · (p_a + p_b − (p_a − p_b)²) / n).
pub fn margin_se(pa: f64, pb: f64, n: f64, deff: f64) -> f64 {
    if n <= 0.0 {
        return f64::INFINITY;
    }
    (deff * (pa + pb - (pa - pb) * (pa - pb)) / n)
        .max(0.0)
        .sqrt()
}

/// Standard error of Σ_g w_g p_g from independent groups: sqrt(Σ_g w_g² SE_g²).
pub fn composite_se(weights: &[f64], ses: &[f64]) -> f64 {
    weights
        .iter()
        .zip(ses)
        .map(|(w, s)| w * w * s * s)
        .sum::<f64>()
        .sqrt()
}

/// 95% margin of error from a standard error: 1.96 · SE.
pub fn moe95(se: f64) -> f64 {
    Z95 * se
}

/// Kish's design effect of weights: n Σw² / (Σw)². 1 for equal weights.
pub fn kish_design_effect(weights: &[f64]) -> f64 {
    let n = weights.len() as f64;
    let s: f64 = weights.iter().sum();
    let s2: f64 = weights.iter().map(|w| w * w).sum();
    if s == 0.0 {
        return f64::NAN;
    }
    n * s2 / (s * s)
}

/// Kish's effective sample size: n / D = (Σw)² / Σw².
pub fn effective_n(weights: &[f64]) -> f64 {
    weights.len() as f64 / kish_design_effect(weights)
}

/// Rule of thumb (common practice): the 95% margin of error at p = 0.5 is about 1/√n.
pub fn rule_of_thumb(n: f64) -> f64 {
    1.0 / n.sqrt()
}

/// 95% margin of error, in points, of each group's A−B margin in the poll.
pub fn poll_margin_moe(ds: &Dataset) -> Option<Vec<f64>> {
    let poll = ds.poll.as_ref()?;
    let k_count = ds.party_count();
    let [a, b] = ds.axis;
    Some(
        (0..ds.group_count())
            .map(|g| {
                let p = &poll.shares[g * k_count..(g + 1) * k_count];
                moe95(margin_se(
                    p[a],
                    p[b],
                    poll.sample_size[g],
                    poll.design_effect[g],
                )) * 100.0
            })
            .collect(),
    )
}

/// Standard error of each group's A−B margin in the poll (as a fraction): the sampling
/// error the simulation draws from.
pub fn poll_margin_se(ds: &Dataset) -> Option<Vec<f64>> {
    poll_margin_moe(ds).map(|v| v.into_iter().map(|m| m / 100.0 / Z95).collect())
}

/// 95% margin of error, in points, of each nationwide party share under the scenario's
/// group weights: composite of the poll's group estimates.
pub fn national_share_moe(ds: &Dataset, t: &Tally) -> Option<Vec<f64>> {
    let poll = ds.poll.as_ref()?;
    let w = t.group_weights();
    let k_count = ds.party_count();
    Some(
        (0..k_count)
            .map(|k| {
                let ses: Vec<f64> = (0..ds.group_count())
                    .map(|g| {
                        share_se(
                            poll.shares[g * k_count + k],
                            poll.sample_size[g],
                            poll.design_effect[g],
                        )
                    })
                    .collect();
                moe95(composite_se(&w, &ses)) * 100.0
            })
            .collect(),
    )
}

/// 95% margin of error, in points, of district `d`'s lead (winner over runner-up): the
/// composite over the district's groups, weighted by their share of its voters, of each
/// group's sampling error of the difference of those two parties' shares.
pub fn district_moe(ds: &Dataset, shifts: &Shifts, t: &Tally, d: usize) -> Option<f64> {
    let poll = ds.poll.as_ref()?;
    let (Some(j), Some(k)) = crate::model::tally::top_two(t.district_votes(d)) else {
        return None;
    };
    let cast = t.cast[d];
    if cast <= 0.0 {
        return None;
    }
    let (k_count, g_count) = (ds.party_count(), ds.group_count());
    let [a, b] = ds.axis;
    let mut var = 0.0;
    for g in 0..g_count {
        let c = d * g_count + g;
        let n = ds.cells.eligible[c];
        if n <= 0.0 {
            continue;
        }
        // The cell's shares after the shifts, as `tally::cell` gives them, for j and k only.
        let s = &ds.cells.shares[c * k_count..(c + 1) * k_count];
        let (turnout, _) = shifted_turnout(ds.cells.turnout[c], shifts.turnout[g]);
        let (x, _) = transfer(s[a], s[b], shifts.margin[g]);
        let share = |p: usize| {
            s[p] + if p == a {
                x
            } else if p == b {
                -x
            } else {
                0.0
            }
        };
        let w = n * turnout / cast;
        let se = margin_se(
            share(j),
            share(k),
            poll.sample_size[g],
            poll.design_effect[g],
        );
        var += w * w * se * se;
    }
    Some(moe95(var.sqrt()) * 100.0)
}

/// How many districts (and their seats) have a lead smaller than their margin of error.
pub fn within_moe(ds: &Dataset, shifts: &Shifts, t: &Tally) -> Option<(usize, u64)> {
    ds.poll.as_ref()?;
    let (mut n, mut seats) = (0, 0);
    for d in 0..ds.district_count() {
        if let Some(m) = district_moe(ds, shifts, t, d) {
            if t.margin[d] < m {
                n += 1;
                seats += u64::from(ds.districts[d].seats);
            }
        }
    }
    Some((n, seats))
}

#[cfg(test)]
mod tests {
    use super::*;
    use statrs::distribution::{ContinuousCDF, Normal};

    /// The 1.96 quantile against a reference library (statrs).
    #[test]
    fn z95_matches_statrs() {
        let n = Normal::new(0.0, 1.0).unwrap();
        assert!((n.inverse_cdf(0.975) - Z95).abs() < 1e-9);
        assert!((Z95 - 1.96).abs() < 1e-4);
    }

    /// Common practice: ±3.1 points at n = 1,000, p = 0.5 (1.96 · sqrt(0.25/1000) = 0.03099).
    #[test]
    fn standard_formula_at_n_1000() {
        let m = moe95(share_se(0.5, 1000.0, 1.0)) * 100.0;
        assert!((m - 3.1).abs() < 0.01, "{m}");
        // A design effect of 2 halves the effective sample: √2 wider.
        let m2 = moe95(share_se(0.5, 1000.0, 2.0)) * 100.0;
        assert!((m2 / m - 2f64.sqrt()).abs() < 1e-12);
    }

    /// Common practice: the 95% margin of error at p = 0.5 is about 1/√n — about 10
    /// points at n = 100 and 1 point at n = 10,000 (1.96·0.5 = 0.98 of it).
    #[test]
    fn rule_of_thumb_at_100_and_10000() {
        for (n, want) in [(100.0, 10.0), (10_000.0, 1.0)] {
            let exact = moe95(share_se(0.5, n, 1.0)) * 100.0;
            assert!((rule_of_thumb(n) * 100.0 - want).abs() < 1e-9);
            assert!((exact - want).abs() / want < 0.03, "{exact} vs {want}");
        }
    }

    /// Kish's design effect on a worked weight vector: w = (1, 1, 2, 4):
    /// Σw = 8, Σw² = 1 + 1 + 4 + 16 = 22, D = 4·22/64 = 1.375, effective n = 4/1.375 = 2.909…
    #[test]
    fn kish_worked_example() {
        let w = [1.0, 1.0, 2.0, 4.0];
        assert!((kish_design_effect(&w) - 1.375).abs() < 1e-12);
        assert!((effective_n(&w) - 64.0 / 22.0).abs() < 1e-12);
        assert_eq!(kish_design_effect(&[3.0; 10]), 1.0);
    }

    /// The margin's SE from the multinomial covariance: Var(pa − pb) = (pa + pb − (pa − pb)²)/n.
    /// At pa = pb = 0.5 (two parties) it is twice the share's SE.
    #[test]
    fn margin_se_two_party_is_twice_share_se() {
        let m = margin_se(0.5, 0.5, 1000.0, 1.0);
        assert!((m - 2.0 * share_se(0.5, 1000.0, 1.0)).abs() < 1e-12);
        // Three parties, pa 0.4, pb 0.35: (0.75 − 0.0025)/500.
        let m3 = margin_se(0.4, 0.35, 500.0, 1.0);
        assert!((m3 - (0.7475f64 / 500.0).sqrt()).abs() < 1e-12);
    }

    #[test]
    fn composite_of_equal_groups() {
        // Two equal groups with the same SE: sqrt(2 · 0.25 · s²) = s/√2.
        let s = composite_se(&[0.5, 0.5], &[0.02, 0.02]);
        assert!((s - 0.02 / 2f64.sqrt()).abs() < 1e-12);
    }

    #[test]
    fn dataset_moes() {
        let ds = crate::testdata::two_groups();
        let m = poll_margin_moe(&ds).unwrap();
        // young: pa 0.55, pb 0.35, n 400, D 1.5: 1.96·sqrt(1.5·(0.9 − 0.04)/400).
        assert!((m[0] - Z95 * (1.5f64 * 0.86 / 400.0).sqrt() * 100.0).abs() < 1e-9);
        let sh = Shifts::zero(&ds);
        let t = crate::model::tally::tally(&ds, &sh);
        // z has only young voters: its MOE is the young group's margin SE with z's shares.
        let z = district_moe(&ds, &sh, &t, 2).unwrap();
        let want = moe95(margin_se(0.95, 0.03, 400.0, 1.5)) * 100.0;
        assert!((z - want).abs() < 1e-9, "{z} {want}");
        let (n, seats) = within_moe(&ds, &sh, &t).unwrap();
        // x: lead 6.92 points over an MOE of 6.39 (young 500/1300 of the voters with
        // 1.5·(0.9 − 0.09)/400, old 800/1300 with 1.2·(0.9 − 0.09)/600): outside.
        let x = district_moe(&ds, &sh, &t, 0).unwrap();
        let wy: f64 = 500.0 / 1300.0;
        let wo: f64 = 800.0 / 1300.0;
        let want =
            Z95 * (wy * wy * 1.5 * 0.81 / 400.0 + wo * wo * 1.2 * 0.81 / 600.0).sqrt() * 100.0;
        assert!((x - want).abs() < 1e-9 && (x - 6.39).abs() < 0.01, "{x}");
        // y: lead 2.8 points under an MOE of about 7.8: inside (2 seats). z is far outside.
        assert_eq!((n, seats), (1, 2));
    }
}
