//! Monte Carlo over turnout and polling scenarios (SPEC 2.4).
//!
//! Each run draws, from a seeded PCG-64 generator (`rand_pcg::Pcg64`, a named algorithm
//! whose output is fixed across versions and machines), in this order: the systematic
//! margin error b ~ N(0, margin_sd); the common turnout factor c ~ N(0, 1); then per group
//! z_g ~ N(0, 1) and, when the scenario starts from the poll, the sampling error
//! e_g ~ N(0, SE_g) of the group's A−B margin; then per district η_d ~ N(0, district_sd).
//! Group turnout error u_g = turnout_sd · (√ρ·c + √(1−ρ)·z_g). The run tallies
//! Δτ_g + u_g and Δμ_g + e_g + b + η_d. Normal draws use rand_distr's `StandardNormal`.
//!
//! ```
//! use stratamap::{analysis::simulate::simulate, model::scenario::Scenario};
//! let ds = stratamap::testdata::two_groups();
//! let s = Scenario::parse_strict("runs=500&seed=7", &ds).unwrap();
//! let a = simulate(&ds, &s, 500);
//! let b = simulate(&ds, &s, 500);
//! assert_eq!(a, b); // the same seed gives the same numbers
//! let p: f64 = a.districts[1].win_probability.iter().sum::<f64>() + a.districts[1].tie_probability;
//! assert!((p - 1.0).abs() < 1e-12);
//! ```

use crate::analysis::moe::poll_margin_se;
use crate::analysis::tipping::tipping_point_with;
use crate::dataset::Dataset;
use crate::model::scenario::Scenario;
use crate::model::tally::{tally_into, Shifts, Tally};
use rand::SeedableRng;
use rand_distr::{Distribution, StandardNormal};
use rand_pcg::Pcg64;
use serde::Serialize;

/// Seat distribution of one party.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SeatStats {
    pub mean: f64,
    pub p05: u64,
    pub p50: u64,
    pub p95: u64,
    /// `histogram[s]`: runs in which the party won s seats.
    pub histogram: Vec<u32>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PartyResult {
    pub majority_probability: f64,
    pub seats: SeatStats,
    /// Nationwide share, percent: 5th, 50th and 95th percentiles.
    pub share_p05: f64,
    pub share_p50: f64,
    pub share_p95: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DistrictResult {
    /// Per party, in manifest order.
    pub win_probability: Vec<f64>,
    pub tie_probability: f64,
    pub tipping_point_probability: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Simulation {
    pub runs: u32,
    pub seed: u64,
    pub parties: Vec<PartyResult>,
    pub districts: Vec<DistrictResult>,
    /// Share of runs in which no party reached the majority.
    pub no_majority_probability: f64,
}

fn normal(rng: &mut Pcg64) -> f64 {
    StandardNormal.sample(rng)
}

/// Percentile (nearest rank) of sorted values.
fn percentile<T: Copy>(sorted: &[T], q: f64) -> Option<T> {
    if sorted.is_empty() {
        return None;
    }
    let rank = (q * sorted.len() as f64).ceil().max(1.0) as usize;
    sorted.get(rank.min(sorted.len()) - 1).copied()
}

/// Run `runs` simulations of the scenario (its seed and spreads).
pub fn simulate(ds: &Dataset, s: &Scenario, runs: u32) -> Simulation {
    let (k_count, g_count, d_count) = (ds.party_count(), ds.group_count(), ds.district_count());
    let base = Shifts::from_scenario(ds, s);
    let se: Vec<f64> = if s.from_poll(ds) {
        poll_margin_se(ds).map_or(vec![0.0; g_count], |v| {
            v.into_iter().map(|x| x * 100.0).collect()
        })
    } else {
        vec![0.0; g_count]
    };
    let rho = s.turnout_corr.clamp(0.0, 1.0);
    let (wc, wz) = (rho.sqrt(), (1.0 - rho).sqrt());
    let total_seats = ds.total_seats() as usize;

    let mut rng = Pcg64::seed_from_u64(s.seed);
    let mut shifts = base.clone();
    let mut eta = vec![0.0; d_count];
    let mut t = Tally::default();
    let mut order = Vec::new();
    let mut wins = vec![0u32; d_count * k_count];
    let mut ties = vec![0u32; d_count];
    let mut tipping = vec![0u32; d_count];
    let mut hist = vec![vec![0u32; total_seats + 1]; k_count];
    let mut majorities = vec![0u32; k_count];
    let mut no_majority = 0u32;
    let mut shares: Vec<Vec<f64>> = vec![Vec::with_capacity(runs as usize); k_count];

    for _ in 0..runs {
        let b = normal(&mut rng) * s.margin_sd;
        let c = normal(&mut rng);
        for (g, &se_g) in se.iter().enumerate() {
            let z = normal(&mut rng);
            let e = if se_g > 0.0 {
                normal(&mut rng) * se_g
            } else {
                0.0
            };
            shifts.turnout[g] = base.turnout[g] + s.turnout_sd * (wc * c + wz * z);
            shifts.margin[g] = base.margin[g] + e + b;
        }
        for x in eta.iter_mut() {
            *x = normal(&mut rng) * s.district_sd;
        }
        tally_into(ds, &shifts, 0.0, Some(&eta), &mut t);
        for d in 0..d_count {
            match t.winner[d] {
                Some(k) => wins[d * k_count + k] += 1,
                None => ties[d] += 1,
            }
        }
        if let Some(d) = tipping_point_with(ds, &t, &mut order) {
            tipping[d] += 1;
        }
        for k in 0..k_count {
            hist[k][(t.seats[k] as usize).min(total_seats)] += 1;
        }
        match t.majority_party {
            Some(k) => majorities[k] += 1,
            None => no_majority += 1,
        }
        for (k, v) in t.shares().into_iter().enumerate() {
            shares[k].push(v * 100.0);
        }
    }

    let r = f64::from(runs.max(1));
    let parties = (0..k_count)
        .map(|k| {
            let h = &hist[k];
            let mut seats_sorted = Vec::with_capacity(runs as usize);
            for (n, &count) in h.iter().enumerate() {
                seats_sorted.extend(std::iter::repeat_n(n as u64, count as usize));
            }
            let mean = seats_sorted.iter().sum::<u64>() as f64 / r;
            let mut sh = std::mem::take(&mut shares[k]);
            sh.sort_by(f64::total_cmp);
            PartyResult {
                majority_probability: f64::from(majorities[k]) / r,
                seats: SeatStats {
                    mean,
                    p05: percentile(&seats_sorted, 0.05).unwrap_or(0),
                    p50: percentile(&seats_sorted, 0.5).unwrap_or(0),
                    p95: percentile(&seats_sorted, 0.95).unwrap_or(0),
                    histogram: h.clone(),
                },
                share_p05: percentile(&sh, 0.05).unwrap_or(0.0),
                share_p50: percentile(&sh, 0.5).unwrap_or(0.0),
                share_p95: percentile(&sh, 0.95).unwrap_or(0.0),
            }
        })
        .collect();
    let districts = (0..d_count)
        .map(|d| DistrictResult {
            win_probability: (0..k_count)
                .map(|k| f64::from(wins[d * k_count + k]) / r)
                .collect(),
            tie_probability: f64::from(ties[d]) / r,
            tipping_point_probability: f64::from(tipping[d]) / r,
        })
        .collect();
    Simulation {
        runs,
        seed: s.seed,
        parties,
        districts,
        no_majority_probability: f64::from(no_majority) / r,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn percentiles_nearest_rank() {
        let v: Vec<u64> = (1..=20).collect();
        assert_eq!(percentile(&v, 0.05), Some(1));
        assert_eq!(percentile(&v, 0.5), Some(10));
        assert_eq!(percentile(&v, 0.95), Some(19));
        assert_eq!(percentile::<u64>(&[], 0.5), None);
    }

    #[test]
    fn seeds_differ() {
        let ds = crate::testdata::two_groups();
        let mut s = Scenario::default_for(&ds);
        let a = simulate(&ds, &s, 200);
        s.seed += 1;
        let b = simulate(&ds, &s, 200);
        assert_ne!(a.districts, b.districts);
        let hist_total: u32 = a.parties[0].seats.histogram.iter().sum();
        assert_eq!(hist_total, 200);
    }
}
