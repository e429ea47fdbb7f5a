//! Monte Carlo over turnout and polling scenarios (SPEC 2.4), in three stages that can
//! run in different places: **drawing** each run's errors, **accumulating** a block of
//! runs into a [`BlockResult`] (counts and per-run values, exact integers and floats),
//! and **summarising** the merged blocks into the [`Report`] that `stratamap simulate`
//! prints and the page downloads.
//!
//! # Blocks and seeds (part of the contract)
//!
//! Runs are grouped in blocks of [`BLOCK_SIZE`] = 250 runs: block `b` holds runs
//! `250·b … 250·b + 249` (the last block may be shorter). Block `b` draws from its own
//! PCG-64 generator (`rand_pcg::Pcg64`, the XSL-RR 128/64 LCG of O'Neill, 2014), made by
//! [`block_generator`]:
//!
//! ```text
//! hi    = splitmix64(seed)
//! lo    = splitmix64(hi XOR b)
//! state = hi · 2^64 + lo
//! Pcg64::new(state, 0x0a02_bdbf_7bb3_c0a7_ac28_fa16_a64a_bf96)   // rand_pcg's default stream
//! ```
//!
//! where `splitmix64` is the finaliser of Steele, Lea and Flood (2014, "Fast splittable
//! pseudorandom number generators"): `z = x + 0x9e3779b97f4a7c15; z = (z ^ z>>30) ·
//! 0xbf58476d1ce4e5b9; z = (z ^ z>>27) · 0x94d049bb133111eb; z ^ z>>31` (wrapping).
//! A block depends only on (seed, b), so any number of workers, taking blocks in any
//! order, give the same blocks; merging them in block order gives byte-identical
//! output. The first k blocks of a long simulation are exactly a simulation of k·250
//! runs with the same seed.
//!
//! # Draws
//!
//! Normal draws use Marsaglia's polar method (Marsaglia and Bray, 1964, "A convenient
//! method for generating normal variables", SIAM Review 6(3)) on uniforms
//! `(next_u64 >> 11) · 2^-53`, with the logarithm from the pure-Rust `libm` crate and
//! `sqrt` (exactly rounded by IEEE 754): the same bits on every platform, native or
//! WebAssembly. The second value of each pair is kept for the next draw within the
//! block. Each run draws, in this order: the shared margin error b ~ N(0, margin_sd);
//! the common turnout factor c ~ N(0, 1); then per group z_g ~ N(0, 1) and, when the
//! scenario starts from the poll, the sampling error e_g ~ N(0, SE_g) of the group's
//! A−B margin (SPEC 2.3, in points); then per district η_d ~ N(0, district_sd). A draw
//! whose spread is 0 is skipped. Group turnout error u_g = turnout_sd · (√ρ·c + √(1−ρ)·z_g).
//! The run tallies Δτ_g + u_g and Δμ_g + e_g + b + η_d (SPEC 2.2).
//!
//! ```
//! use stratamap::{analysis::simulate::simulate, model::scenario::Scenario};
//! let ds = stratamap::testdata::two_groups();
//! let s = Scenario::parse_strict("runs=500&seed=7", &ds).unwrap();
//! let a = simulate(&ds, &s, 500);
//! let b = simulate(&ds, &s, 500);
//! assert_eq!(a, b); // the same seed gives the same numbers
//! let y = &a.districts[1];
//! assert_eq!(y.runs_won.iter().map(|(_, n)| n).sum::<u32>(), 500);
//! ```

use crate::analysis::moe::poll_margin_se;
use crate::analysis::tipping::seat_leader;
use crate::dataset::Dataset;
use crate::model::scenario::Scenario;
use crate::model::tally::{tally_into, Shifts, Tally};
use rand::Rng;
use rand_pcg::Pcg64;
use serde::ser::{SerializeMap, Serializer};
use serde::Serialize;

/// Runs per block (part of the contract: the output names it as `block_size`).
pub const BLOCK_SIZE: u32 = 250;

/// Most runs a scenario may ask for (SPEC 3).
pub const MAX_RUNS: u32 = 100_000;

/// rand_pcg's default PCG-64 stream (its `Pcg64` documentation).
const STREAM: u128 = 0x0a02_bdbf_7bb3_c0a7_ac28_fa16_a64a_bf96;

/// SplitMix64's finaliser (Steele, Lea and Flood, 2014).
pub fn splitmix64(x: u64) -> u64 {
    let mut z = x.wrapping_add(0x9e37_79b9_7f4a_7c15);
    z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
    z ^ (z >> 31)
}

/// The generator of block `b` for `seed` (the rule in the module's documentation).
pub fn block_generator(seed: u64, block: u32) -> Pcg64 {
    let hi = splitmix64(seed);
    let lo = splitmix64(hi ^ u64::from(block));
    Pcg64::new((u128::from(hi) << 64) | u128::from(lo), STREAM)
}

/// Number of blocks for `runs` runs.
pub fn block_count(runs: u32) -> u32 {
    runs.div_ceil(BLOCK_SIZE)
}

/// Runs in block `b` of a simulation of `runs` runs (0 past the end).
pub fn runs_in_block(runs: u32, block: u32) -> u32 {
    runs.saturating_sub(block.saturating_mul(BLOCK_SIZE))
        .min(BLOCK_SIZE)
}

/// Standard normal draws, bit-identical on every platform (Marsaglia's polar method).
#[derive(Debug, Clone)]
pub struct Normals {
    rng: Pcg64,
    spare: Option<f64>,
}

impl Normals {
    pub fn new(rng: Pcg64) -> Normals {
        Normals { rng, spare: None }
    }

    /// Uniform in [0, 1) with 53 random bits.
    #[inline]
    fn uniform(&mut self) -> f64 {
        (self.rng.next_u64() >> 11) as f64 * (1.0 / 9_007_199_254_740_992.0)
    }

    /// One N(0, 1) draw.
    #[inline]
    pub fn draw(&mut self) -> f64 {
        if let Some(s) = self.spare.take() {
            return s;
        }
        loop {
            let u = 2.0 * self.uniform() - 1.0;
            let v = 2.0 * self.uniform() - 1.0;
            let s = u * u + v * v;
            if s < 1.0 && s > 0.0 {
                let f = (-2.0 * libm::log(s) / s).sqrt();
                self.spare = Some(v * f);
                return u * f;
            }
        }
    }
}

/// What a simulation needs from its dataset and scenario, computed once.
#[derive(Debug, Clone)]
pub struct Plan {
    pub runs: u32,
    pub seed: u64,
    base: Shifts,
    /// SE of each group's A−B margin in points (empty when not starting from the poll).
    se: Vec<f64>,
    turnout_sd: f64,
    margin_sd: f64,
    district_sd: f64,
    /// √ρ and √(1−ρ).
    corr: [f64; 2],
}

impl Plan {
    pub fn new(ds: &Dataset, s: &Scenario, runs: u32) -> Plan {
        let se = if s.from_poll(ds) {
            poll_margin_se(ds).map_or_else(Vec::new, |v| v.into_iter().map(|x| x * 100.0).collect())
        } else {
            Vec::new()
        };
        let rho = s.turnout_corr.clamp(0.0, 1.0);
        Plan {
            runs: runs.min(MAX_RUNS),
            seed: s.seed,
            base: Shifts::from_scenario(ds, s),
            se,
            turnout_sd: s.turnout_sd,
            margin_sd: s.margin_sd,
            district_sd: s.district_sd,
            corr: [rho.sqrt(), (1.0 - rho).sqrt()],
        }
    }

    pub fn block_count(&self) -> u32 {
        block_count(self.runs)
    }

    /// Draw one run's errors into `shifts` (per group) and `eta` (per district, points).
    pub fn draw(&self, normals: &mut Normals, shifts: &mut Shifts, eta: &mut [f64]) {
        let mut normal = |sd: f64| if sd > 0.0 { normals.draw() * sd } else { 0.0 };
        let b = normal(self.margin_sd);
        let c = normal(self.turnout_sd);
        let [wc, wz] = self.corr;
        for g in 0..self.base.turnout.len() {
            let z = normal(self.turnout_sd);
            let e = self.se.get(g).map_or(0.0, |&se| normal(se));
            shifts.turnout[g] = self.base.turnout[g] + wc * c + wz * z;
            shifts.margin[g] = self.base.margin[g] + e + b;
        }
        for x in eta.iter_mut() {
            *x = normal(self.district_sd);
        }
    }

    /// Run block `b`, calling `each` with every run's tally; returns how many runs it had.
    pub fn run_block_with(
        &self,
        ds: &Dataset,
        block: u32,
        scratch: &mut Scratch,
        mut each: impl FnMut(&Tally),
    ) -> u32 {
        let n = runs_in_block(self.runs, block);
        let mut normals = Normals::new(block_generator(self.seed, block));
        scratch.shifts.clone_from(&self.base);
        scratch.eta.clear();
        scratch.eta.resize(ds.district_count(), 0.0);
        for _ in 0..n {
            self.draw(&mut normals, &mut scratch.shifts, &mut scratch.eta);
            let eta = (self.district_sd > 0.0).then_some(&scratch.eta[..]);
            tally_into(ds, &scratch.shifts, 0.0, eta, &mut scratch.tally);
            each(&scratch.tally);
        }
        n
    }

    /// Run block `b` and accumulate it.
    pub fn run_block(&self, ds: &Dataset, block: u32, scratch: &mut Scratch) -> BlockResult {
        let (k_count, d_count) = (ds.party_count(), ds.district_count());
        let mut out = BlockResult::empty(block, k_count, d_count);
        let mut order = std::mem::take(&mut scratch.order);
        let n = self.run_block_with(ds, block, scratch, |t| {
            out.add_run(ds, t, &mut order);
        });
        scratch.order = order;
        out.runs = n;
        out
    }
}

/// Buffers reused from run to run and block to block.
#[derive(Debug, Default)]
pub struct Scratch {
    shifts: Shifts,
    eta: Vec<f64>,
    tally: Tally,
    order: Vec<(f64, usize)>,
}

/// One block's partial result: what the summary needs, merged by adding counts and
/// appending per-run values in block order.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct BlockResult {
    pub block: u32,
    pub runs: u32,
    /// Per district, K + 1 counts: runs won by each party, then tied runs.
    pub wins: Vec<u32>,
    /// Per district: runs in which it was the tipping point.
    pub tipping: Vec<u32>,
    /// K + 1 counts: runs in which each party had a majority, then runs with none.
    pub majority: Vec<u32>,
    /// Per run, K values: seats of each party.
    pub seats: Vec<u32>,
    /// Per run, K values: nationwide share of each party, percent.
    pub shares: Vec<f64>,
}

impl BlockResult {
    /// No runs yet.
    pub fn empty(block: u32, k_count: usize, d_count: usize) -> BlockResult {
        BlockResult {
            block,
            runs: 0,
            wins: vec![0; d_count * (k_count + 1)],
            tipping: vec![0; d_count],
            majority: vec![0; k_count + 1],
            seats: Vec::with_capacity(BLOCK_SIZE as usize * k_count),
            shares: Vec::with_capacity(BLOCK_SIZE as usize * k_count),
        }
    }

    fn add_run(&mut self, ds: &Dataset, t: &Tally, order: &mut Vec<(f64, usize)>) {
        let k_count = ds.party_count();
        for (d, w) in t.winner.iter().enumerate() {
            self.wins[d * (k_count + 1) + w.unwrap_or(k_count)] += 1;
        }
        if let Some(d) = tipping_point_fast(ds, t, order) {
            self.tipping[d] += 1;
        }
        self.majority[t.majority_party.unwrap_or(k_count)] += 1;
        self.seats.extend(
            t.seats
                .iter()
                .map(|&s| u32::try_from(s).unwrap_or(u32::MAX)),
        );
        let cast = t.total_cast();
        self.shares.extend(t.national_votes.iter().map(|v| {
            if cast > 0.0 {
                v / cast * 100.0
            } else {
                0.0
            }
        }));
    }

    /// Check that the arrays fit a dataset of `k_count` parties and `d_count` districts.
    pub fn fits(&self, k_count: usize, d_count: usize) -> bool {
        let r = self.runs as usize;
        self.wins.len() == d_count * (k_count + 1)
            && self.tipping.len() == d_count
            && self.majority.len() == k_count + 1
            && self.seats.len() == r * k_count
            && self.shares.len() == r * k_count
    }
}

/// The tipping point (SPEC 2.2, as [`crate::analysis::tipping::tipping_point`]) found by
/// a weighted selection instead of a full sort: districts ordered by the seat leader's
/// lead (best first, equal leads in GeoJSON order, a total order), the district at which
/// the seats first reach the majority.
pub fn tipping_point_fast(ds: &Dataset, t: &Tally, order: &mut Vec<(f64, usize)>) -> Option<usize> {
    // Defined for winner-takes-all districts only (`tipping::why_none`).
    if ds.has_proportional() {
        return None;
    }
    let leader = seat_leader(t)?;
    let majority = u64::from(ds.majority);
    if ds.total_seats() < majority {
        return None;
    }
    let k_count = ds.party_count();
    order.clear();
    order.extend((0..ds.district_count()).map(|d| {
        let v = &t.votes[d * k_count..(d + 1) * k_count];
        let rival = v
            .iter()
            .enumerate()
            .filter(|(k, _)| *k != leader)
            .map(|(_, x)| *x)
            .fold(f64::NEG_INFINITY, f64::max);
        let lead = if t.cast[d] > 0.0 && rival.is_finite() {
            (v[leader] - rival) / t.cast[d]
        } else {
            0.0
        };
        (lead, d)
    }));
    let before = |x: &(f64, usize), y: &(f64, usize)| y.0.total_cmp(&x.0).then(x.1.cmp(&y.1));
    let seats = |d: usize| u64::from(ds.districts[d].seats);
    // Invariant: the answer is in `order[lo..hi]`, and `need` more seats are wanted from
    // the districts there (those before `lo` are all ahead and already counted).
    let (mut lo, mut hi, mut need) = (0usize, order.len(), majority);
    while hi > lo {
        let part = &mut order[lo..hi];
        let mid = part.len() / 2;
        part.select_nth_unstable_by(mid, before);
        let ahead: u64 = part[..mid].iter().map(|&(_, d)| seats(d)).sum();
        let pivot = seats(part[mid].1);
        if ahead >= need {
            hi = lo + mid;
        } else if ahead + pivot >= need {
            return Some(part[mid].1);
        } else {
            need -= ahead + pivot;
            lo += mid + 1;
        }
    }
    None
}

/// Blocks merged in block order (blocks arriving early wait for the ones before them).
#[derive(Debug, Clone, Default)]
pub struct Merged {
    k_count: usize,
    d_count: usize,
    /// Blocks merged so far: 0 … next − 1.
    next: u32,
    runs: u32,
    wins: Vec<u32>,
    tipping: Vec<u32>,
    majority: Vec<u32>,
    seats: Vec<u32>,
    shares: Vec<f64>,
    waiting: std::collections::BTreeMap<u32, BlockResult>,
}

impl Merged {
    pub fn new(k_count: usize, d_count: usize) -> Merged {
        let e = BlockResult::empty(0, k_count, d_count);
        Merged {
            k_count,
            d_count,
            wins: e.wins,
            tipping: e.tipping,
            majority: e.majority,
            ..Merged::default()
        }
    }

    /// Runs merged so far (those of blocks 0 … [`Merged::blocks_done`] − 1).
    pub fn runs_done(&self) -> u32 {
        self.runs
    }

    pub fn blocks_done(&self) -> u32 {
        self.next
    }

    /// Add a block; it is merged once every block before it is. A block already merged
    /// or one whose arrays do not fit is refused (returns false).
    pub fn add(&mut self, block: BlockResult) -> bool {
        if block.block < self.next
            || self.waiting.contains_key(&block.block)
            || !block.fits(self.k_count, self.d_count)
        {
            return false;
        }
        self.waiting.insert(block.block, block);
        while let Some(b) = self.waiting.remove(&self.next) {
            self.merge(&b);
            self.next += 1;
        }
        true
    }

    fn merge(&mut self, b: &BlockResult) {
        self.runs += b.runs;
        for (x, y) in self.wins.iter_mut().zip(&b.wins) {
            *x += y;
        }
        for (x, y) in self.tipping.iter_mut().zip(&b.tipping) {
            *x += y;
        }
        for (x, y) in self.majority.iter_mut().zip(&b.majority) {
            *x += y;
        }
        self.seats.extend_from_slice(&b.seats);
        self.shares.extend_from_slice(&b.shares);
    }

    /// Runs won per district: K + 1 counts each (ties last).
    pub fn wins(&self) -> &[u32] {
        &self.wins
    }

    /// The summary (SPEC 4) of the runs merged so far, for `scenario` (the canonical
    /// scenario string whose runs these are).
    pub fn report(&self, labels: &Labels, seed: u64, scenario: String) -> Report {
        let (k_count, r) = (self.k_count, self.runs as usize);
        let parties = labels
            .parties
            .iter()
            .enumerate()
            .map(|(k, id)| {
                let mut seats: Vec<u32> = (0..r).map(|i| self.seats[i * k_count + k]).collect();
                seats.sort_unstable();
                let mut shares: Vec<f64> = (0..r).map(|i| self.shares[i * k_count + k]).collect();
                shares.sort_by(f64::total_cmp);
                let total: u64 = seats.iter().map(|&s| u64::from(s)).sum();
                PartyReport {
                    id: id.clone(),
                    majority_runs: self.majority[k],
                    seats: SeatReport {
                        mean: if r > 0 { total as f64 / r as f64 } else { 0.0 },
                        p05: percentile(&seats, 0.05).unwrap_or(0),
                        p50: percentile(&seats, 0.5).unwrap_or(0),
                        p95: percentile(&seats, 0.95).unwrap_or(0),
                        histogram: Histogram::of_sorted(&seats),
                    },
                    share: ShareReport {
                        p05: percentile(&shares, 0.05).unwrap_or(0.0),
                        p50: percentile(&shares, 0.5).unwrap_or(0.0),
                        p95: percentile(&shares, 0.95).unwrap_or(0.0),
                    },
                }
            })
            .collect();
        let districts = labels
            .districts
            .iter()
            .enumerate()
            .map(|(d, id)| {
                let w = &self.wins[d * (k_count + 1)..(d + 1) * (k_count + 1)];
                DistrictReport {
                    id: id.clone(),
                    runs_won: RunsWon(
                        labels
                            .parties
                            .iter()
                            .cloned()
                            .chain(std::iter::once("tie".to_string()))
                            .zip(w.iter().copied())
                            .collect(),
                    ),
                    tipping_runs: self.tipping[d],
                }
            })
            .collect();
        Report {
            runs: self.runs,
            seed,
            block_size: BLOCK_SIZE,
            scenario,
            no_majority_runs: self.majority[k_count],
            parties,
            districts,
            source: labels.source.clone(),
            caution: crate::CAUTION,
        }
    }
}

/// What a report names: party and district ids and the dataset's source line (so that
/// the blocks can be summarised where the dataset itself is not kept).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Labels {
    pub parties: Vec<String>,
    pub districts: Vec<String>,
    pub source: String,
}

impl Labels {
    pub fn of(ds: &Dataset) -> Labels {
        Labels {
            parties: ds.parties.iter().map(|p| p.id.clone()).collect(),
            districts: ds.districts.iter().map(|d| d.id.clone()).collect(),
            source: ds.source.clone(),
        }
    }
}

/// Percentile (nearest rank) of sorted values.
fn percentile<T: Copy>(sorted: &[T], q: f64) -> Option<T> {
    if sorted.is_empty() {
        return None;
    }
    let rank = (q * sorted.len() as f64).ceil().max(1.0) as usize;
    sorted.get(rank.min(sorted.len()) - 1).copied()
}

/// The simulation's summary, in the shape of SPEC 4 (field order is the output's).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Report {
    pub runs: u32,
    pub seed: u64,
    pub block_size: u32,
    pub scenario: String,
    pub no_majority_runs: u32,
    pub parties: Vec<PartyReport>,
    pub districts: Vec<DistrictReport>,
    pub source: String,
    pub caution: &'static str,
}

impl Report {
    /// The JSON that `stratamap simulate` prints: pretty, two-space indents, a final newline.
    pub fn to_json(&self) -> String {
        serde_json::to_string_pretty(self)
            .map_or_else(|e| format!("{{\"error\": \"{e}\"}}\n"), |t| t + "\n")
    }
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PartyReport {
    pub id: String,
    pub majority_runs: u32,
    pub seats: SeatReport,
    pub share: ShareReport,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SeatReport {
    pub mean: f64,
    pub p05: u32,
    pub p50: u32,
    pub p95: u32,
    pub histogram: Histogram,
}

/// Runs per bin of seats: bin i holds `start + i·width … start + (i+1)·width − 1` seats;
/// at most 200 bins of a whole number of seats each, from the fewest seats reached to
/// the most.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Histogram {
    pub start: u32,
    pub width: u32,
    pub counts: Vec<u32>,
}

/// Most bins of a seat histogram (SPEC 2.4).
pub const MAX_BINS: u32 = 200;

impl Histogram {
    fn of_sorted(seats: &[u32]) -> Histogram {
        let (Some(&lo), Some(&hi)) = (seats.first(), seats.last()) else {
            return Histogram {
                start: 0,
                width: 1,
                counts: Vec::new(),
            };
        };
        let span = hi - lo + 1;
        let width = span.div_ceil(MAX_BINS).max(1);
        let mut counts = vec![0u32; span.div_ceil(width) as usize];
        for &s in seats {
            counts[((s - lo) / width) as usize] += 1;
        }
        Histogram {
            start: lo,
            width,
            counts,
        }
    }
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ShareReport {
    pub p05: f64,
    pub p50: f64,
    pub p95: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DistrictReport {
    pub id: String,
    pub runs_won: RunsWon,
    pub tipping_runs: u32,
}

/// Runs won per party id (manifest order), then `tie`: a JSON object in that order.
#[derive(Debug, Clone, PartialEq)]
pub struct RunsWon(pub Vec<(String, u32)>);

impl RunsWon {
    pub fn iter(&self) -> impl Iterator<Item = &(String, u32)> {
        self.0.iter()
    }
}

impl Serialize for RunsWon {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut m = s.serialize_map(Some(self.0.len()))?;
        for (k, v) in &self.0 {
            m.serialize_entry(k, v)?;
        }
        m.end()
    }
}

/// Run `runs` simulations of the scenario on one thread, block by block; the scenario
/// string in the report is the scenario's canonical string with these runs.
pub fn simulate(ds: &Dataset, s: &Scenario, runs: u32) -> Report {
    let plan = Plan::new(ds, s, runs);
    let mut scratch = Scratch::default();
    let mut merged = Merged::new(ds.party_count(), ds.district_count());
    for b in 0..plan.block_count() {
        merged.add(plan.run_block(ds, b, &mut scratch));
    }
    merged.report(
        &Labels::of(ds),
        s.seed,
        scenario_with_runs(ds, s, plan.runs),
    )
}

/// The canonical scenario string of `s` with `runs` runs (what reproduces them).
pub fn scenario_with_runs(ds: &Dataset, s: &Scenario, runs: u32) -> String {
    let mut s = s.clone();
    s.runs = Some(runs);
    s.data = None;
    s.to_query(ds)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::tipping::tipping_point_with;
    use crate::model::tally::tally;

    #[test]
    fn percentiles_nearest_rank() {
        let v: Vec<u64> = (1..=20).collect();
        assert_eq!(percentile(&v, 0.05), Some(1));
        assert_eq!(percentile(&v, 0.5), Some(10));
        assert_eq!(percentile(&v, 0.95), Some(19));
        assert_eq!(percentile::<u64>(&[], 0.5), None);
    }

    #[test]
    fn seeds_differ_and_every_run_counts() {
        let ds = crate::testdata::two_groups();
        let mut s = Scenario::default_for(&ds);
        let a = simulate(&ds, &s, 600);
        s.seed += 1;
        let b = simulate(&ds, &s, 600);
        assert_ne!(a.districts, b.districts);
        for p in &a.parties {
            assert_eq!(p.seats.histogram.counts.iter().sum::<u32>(), 600);
        }
        for d in &a.districts {
            assert_eq!(d.runs_won.iter().map(|(_, n)| n).sum::<u32>(), 600);
        }
        let majorities: u32 = a.parties.iter().map(|p| p.majority_runs).sum();
        assert_eq!(majorities + a.no_majority_runs, 600);
    }

    /// Splitmix64's first outputs from state 0 are 0xe220a8397b1dcdaf, 0x6e789e6aa1b965f4
    /// (Vigna's reference splitmix64.c; from memory): the state advances by the golden
    /// gamma before each output, as `splitmix64(k · gamma)` does here.
    #[test]
    fn splitmix_matches_the_reference() {
        assert_eq!(splitmix64(0), 0xe220_a839_7b1d_cdaf);
        assert_eq!(splitmix64(0x9e37_79b9_7f4a_7c15), 0x6e78_9e6a_a1b9_65f4);
    }

    /// The generator's bits are pinned: a change of algorithm, seeding rule or draw order
    /// would silently change every shared link's numbers.
    #[test]
    fn draws_are_pinned() {
        let mut n = Normals::new(block_generator(20_261_201, 3));
        let v: Vec<u64> = (0..4).map(|_| n.draw().to_bits()).collect();
        let again: Vec<u64> = {
            let mut m = Normals::new(block_generator(20_261_201, 3));
            (0..4).map(|_| m.draw().to_bits()).collect()
        };
        assert_eq!(v, again);
        let other: Vec<u64> = {
            let mut m = Normals::new(block_generator(20_261_201, 4));
            (0..4).map(|_| m.draw().to_bits()).collect()
        };
        assert_ne!(v, other);
        assert_eq!(v, PINNED.to_vec(), "{v:#x?}");
    }

    /// Taken from this implementation natively; the WebAssembly build is checked against
    /// the command line's output byte for byte in the browser tests.
    const PINNED: [u64; 4] = [
        0x3fe1_cf6c_7076_7b6e,
        0xbfb7_b49e_522c_cd81,
        0x3fc3_315c_c072_ae49,
        0x3fe4_89b9_694e_f4b9,
    ];

    /// Standard normal moments and Φ(1) from 200,000 draws. Φ(1) = 0.841344746…
    /// (statrs' `Normal` is the reference in the integration tests; this value is from
    /// memory and agrees with it).
    #[test]
    fn normals_are_standard() {
        let mut n = Normals::new(block_generator(1, 0));
        let count = 200_000;
        let (mut sum, mut sq, mut below) = (0.0, 0.0, 0u32);
        for _ in 0..count {
            let x = n.draw();
            sum += x;
            sq += x * x;
            below += u32::from(x < 1.0);
        }
        let c = f64::from(count);
        let mean = sum / c;
        let var = sq / c - mean * mean;
        // Four standard errors: mean 1/√n, variance √(2/n), a proportion √(p(1−p)/n).
        assert!(mean.abs() < 4.0 / c.sqrt(), "mean {mean}");
        assert!((var - 1.0).abs() < 4.0 * (2.0 / c).sqrt(), "variance {var}");
        let p = 0.841_344_746;
        let got = f64::from(below) / c;
        assert!(
            (got - p).abs() < 4.0 * (p * (1.0 - p) / c).sqrt(),
            "Φ(1) {got}"
        );
    }

    #[test]
    fn blocks_split_the_runs() {
        assert_eq!(block_count(0), 0);
        assert_eq!(block_count(250), 1);
        assert_eq!(block_count(251), 2);
        assert_eq!(runs_in_block(600, 0), 250);
        assert_eq!(runs_in_block(600, 2), 100);
        assert_eq!(runs_in_block(600, 3), 0);
    }

    /// Blocks merged in any arrival order give the same report as one thread; the first
    /// two blocks of 600 runs are a simulation of 500.
    #[test]
    fn any_order_same_report() {
        let ds = crate::testdata::two_groups();
        let s = Scenario::parse_strict("seed=5&district_sd=4", &ds).unwrap();
        let one = simulate(&ds, &s, 600);
        let plan = Plan::new(&ds, &s, 600);
        let mut scratch = Scratch::default();
        let blocks: Vec<BlockResult> = (0..3)
            .map(|b| plan.run_block(&ds, b, &mut scratch))
            .collect();
        let mut m = Merged::new(3, 3);
        assert!(m.add(blocks[2].clone()));
        assert_eq!(m.runs_done(), 0);
        assert!(m.add(blocks[0].clone()));
        assert_eq!(m.runs_done(), 250);
        assert!(!m.add(blocks[0].clone()), "a block twice is refused");
        assert!(m.add(blocks[1].clone()));
        assert_eq!(m.runs_done(), 600);
        let q = scenario_with_runs(&ds, &s, 600);
        assert_eq!(m.report(&Labels::of(&ds), 5, q).to_json(), one.to_json());
        let mut first_two = Merged::new(3, 3);
        first_two.add(blocks[0].clone());
        first_two.add(blocks[1].clone());
        let q500 = scenario_with_runs(&ds, &s, 500);
        assert_eq!(
            first_two.report(&Labels::of(&ds), 5, q500).to_json(),
            simulate(&ds, &s, 500).to_json()
        );
    }

    #[test]
    fn a_block_that_does_not_fit_is_refused() {
        let mut m = Merged::new(3, 3);
        let mut b = BlockResult::empty(0, 3, 2);
        b.runs = 0;
        assert!(!m.add(b));
    }

    #[test]
    fn selection_finds_the_sorted_tipping_point() {
        let ds = crate::testdata::two_groups();
        let mut order = Vec::new();
        let mut order2 = Vec::new();
        for m in [-30.0, -10.0, -3.0, 0.0, 2.0, 7.0, 20.0] {
            let mut sh = Shifts::zero(&ds);
            sh.margin.iter_mut().for_each(|x| *x = m);
            let t = tally(&ds, &sh);
            assert_eq!(
                tipping_point_fast(&ds, &t, &mut order),
                tipping_point_with(&ds, &t, &mut order2),
                "margin shift {m}"
            );
        }
    }

    #[test]
    fn histogram_bins() {
        let h = Histogram::of_sorted(&[3, 3, 4, 7]);
        assert_eq!((h.start, h.width), (3, 1));
        assert_eq!(h.counts, vec![2, 1, 0, 0, 1]);
        let wide: Vec<u32> = (0..=450).collect();
        let h = Histogram::of_sorted(&wide);
        assert_eq!((h.start, h.width, h.counts.len()), (0, 3, 151));
        assert_eq!(h.counts.iter().sum::<u32>(), 451);
        assert!(Histogram::of_sorted(&[]).counts.is_empty());
    }
}
