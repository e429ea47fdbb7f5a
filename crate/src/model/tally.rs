//! The deterministic tally (SPEC 2.1–2.2): scenario shifts applied to every
//! (district, group) cell, then votes, winners, margins, seats and group weights.
//!
//! [`tally_into`] reuses a [`Tally`]'s buffers so that repeated recomputes (slider moves,
//! curves, simulation runs) allocate nothing.
//!
//! ```
//! use stratamap::model::{scenario::Scenario, tally::{tally, Shifts}};
//! let ds = stratamap::testdata::two_groups_no_poll();
//! let s = Scenario::parse("margin=all:10", &ds).scenario;
//! let t = tally(&ds, &Shifts::from_scenario(&ds, &s));
//! assert_eq!(t.seats, vec![3, 1, 0]);
//! assert_eq!(t.majority_party, Some(0));
//! ```

use crate::dataset::{Dataset, District};
use crate::model::scenario::Scenario;
use crate::model::seats::allocate;

/// Most parties a dataset may have (SPEC 1.1).
pub const MAX_PARTIES: usize = 12;

/// Effective shifts per group, in points, after `all` and (when starting from the poll)
/// the poll's swing are added.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Shifts {
    pub turnout: Vec<f64>,
    pub margin: Vec<f64>,
}

impl Shifts {
    /// No shift at all: the baseline.
    pub fn zero(ds: &Dataset) -> Shifts {
        Shifts {
            turnout: vec![0.0; ds.group_count()],
            margin: vec![0.0; ds.group_count()],
        }
    }

    /// The shifts a scenario asks for (SPEC 2.1).
    pub fn from_scenario(ds: &Dataset, s: &Scenario) -> Shifts {
        let swing = if s.from_poll(ds) {
            poll_swing(ds)
        } else {
            None
        };
        let g_count = ds.group_count();
        Shifts {
            turnout: (0..g_count).map(|g| s.turnout_shift(g)).collect(),
            margin: (0..g_count)
                .map(|g| s.margin_shift(g) + swing.as_ref().map_or(0.0, |w| w[g]))
                .collect(),
        }
    }
}

/// The poll's swing per group in points toward A: the poll's A−B margin minus the
/// baseline's nationwide A−B margin of that group (weighted by N·τ over districts).
pub fn poll_swing(ds: &Dataset) -> Option<Vec<f64>> {
    let poll = ds.poll.as_ref()?;
    let (k_count, g_count) = (ds.party_count(), ds.group_count());
    let [a, b] = ds.axis;
    let mut out = Vec::with_capacity(g_count);
    for g in 0..g_count {
        let (mut w, mut m) = (0.0, 0.0);
        for d in 0..ds.district_count() {
            let c = d * g_count + g;
            let v = ds.cells.eligible[c] * ds.cells.turnout[c];
            let s = &ds.cells.shares[c * k_count..(c + 1) * k_count];
            w += v;
            m += v * (s[a] - s[b]);
        }
        let base = if w > 0.0 { m / w } else { 0.0 };
        let p = &poll.shares[g * k_count..(g + 1) * k_count];
        out.push(((p[a] - p[b]) - base) * 100.0);
    }
    Some(out)
}

/// New turnout rate of a cell and whether the clamp to [0, 1] bit.
#[inline]
pub fn shifted_turnout(tau: f64, shift_points: f64) -> (f64, bool) {
    clamp_rate(tau + turnout_fraction(shift_points))
}

/// A turnout shift in points as a fraction of the eligible.
#[inline]
fn turnout_fraction(shift_points: f64) -> f64 {
    shift_points / 100.0
}

#[inline]
fn clamp_rate(t: f64) -> (f64, bool) {
    if t < 0.0 {
        (0.0, true)
    } else if t > 1.0 {
        (1.0, true)
    } else {
        (t, false)
    }
}

/// A margin shift in points as the share to move from B to A: half of it, since each
/// point moved changes the A−B margin by two.
#[inline]
fn move_fraction(shift_points: f64) -> f64 {
    shift_points / 200.0
}

/// Share moved from B to A in a cell for a margin shift (negative: from A to B), limited
/// to what is there, and whether the limit bit.
#[inline]
pub fn transfer(pa: f64, pb: f64, shift_points: f64) -> (f64, bool) {
    let x = move_fraction(shift_points);
    if x > pb {
        (pb, true)
    } else if -x > pa {
        (-pa, true)
    } else {
        (x, false)
    }
}

/// One cell under a scenario: turnout and shares after the shifts.
#[derive(Debug, Clone, PartialEq)]
pub struct Cell {
    pub eligible: f64,
    pub turnout: f64,
    pub shares: Vec<f64>,
}

/// The cell (district `d`, group `g`) after `shifts` (and an extra margin shift for the district).
pub fn cell(ds: &Dataset, shifts: &Shifts, d: usize, g: usize, extra_margin: f64) -> Cell {
    let (k_count, g_count) = (ds.party_count(), ds.group_count());
    let c = d * g_count + g;
    let [a, b] = ds.axis;
    let mut shares = ds.cells.shares[c * k_count..(c + 1) * k_count].to_vec();
    let (t, _) = shifted_turnout(ds.cells.turnout[c], shifts.turnout[g]);
    let (x, _) = transfer(shares[a], shares[b], shifts.margin[g] + extra_margin);
    shares[a] += x;
    shares[b] -= x;
    Cell {
        eligible: ds.cells.eligible[c],
        turnout: t,
        shares,
    }
}

/// What a tally finds. Per-district arrays are in GeoJSON order; `votes` is `d * parties + k`.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Tally {
    pub votes: Vec<f64>,
    /// T_d, votes cast.
    pub cast: Vec<f64>,
    /// Σ_g N_gd.
    pub eligible: Vec<f64>,
    /// Winning party, `None` for a tie (or no votes).
    pub winner: Vec<Option<usize>>,
    /// Second party (`None` when there is only one with votes… never for ≥ 2 parties).
    pub runner_up: Vec<Option<usize>>,
    /// (first − second) / T_d × 100.
    pub margin: Vec<f64>,
    /// Seats per party, summed over districts.
    pub seats: Vec<u64>,
    /// Seats of districts tied at the top (winner rule) or where nobody voted.
    pub tied_seats: u64,
    /// Seats per district and party, `d * parties + k`, under each district's seat rule.
    /// Kept only when some district is proportional ([`Dataset::has_proportional`]);
    /// empty otherwise (a winner district's seats all go to its winner).
    pub seat_split: Vec<u32>,
    /// Districts whose last seat was decided by the tie rule (more votes, then the
    /// earlier party), in GeoJSON order.
    pub last_seat_ties: Vec<usize>,
    /// Seats of proportional districts where no party reached the threshold.
    pub unfilled_seats: u64,
    pub majority_party: Option<usize>,
    /// Σ_d V_dk.
    pub national_votes: Vec<f64>,
    /// Σ_d N_gd τ'_gd per group.
    pub group_cast: Vec<f64>,
    /// Σ_d N_gd τ'_gd (π'_A − π'_B) per group.
    pub group_ab: Vec<f64>,
    /// Cells (with eligible > 0) where the turnout clamp bit.
    pub turnout_clamped: u32,
    /// Cells (with eligible > 0) where the margin limit bit.
    pub margin_limited: u32,
    /// Scratch per group: the turnout shift as a fraction, and the share to move from B
    /// to A before the limit.
    group_shift: Vec<[f64; 2]>,
    /// Scratch per group: the running `group_cast` and `group_ab`, side by side.
    group_sums: Vec<[f64; 2]>,
}

impl Tally {
    /// Votes of district `d`.
    pub fn district_votes(&self, d: usize) -> &[f64] {
        let k = self.national_votes.len();
        &self.votes[d * k..(d + 1) * k]
    }

    /// Seats of district `d` per party, when some district is proportional.
    pub fn district_seats(&self, d: usize) -> Option<&[u32]> {
        let k = self.national_votes.len();
        self.seat_split.get(d * k..(d + 1) * k)
    }

    /// Total votes cast nationwide.
    pub fn total_cast(&self) -> f64 {
        self.cast.iter().sum()
    }

    /// Nationwide share of each party, in [0, 1].
    pub fn shares(&self) -> Vec<f64> {
        let t = self.total_cast();
        self.national_votes
            .iter()
            .map(|v| if t > 0.0 { v / t } else { 0.0 })
            .collect()
    }

    /// Group weights w_g (share of the voters, by turnout), in [0, 1].
    pub fn group_weights(&self) -> Vec<f64> {
        let t: f64 = self.group_cast.iter().sum();
        self.group_cast
            .iter()
            .map(|v| if t > 0.0 { v / t } else { 0.0 })
            .collect()
    }

    /// Each group's nationwide A−B margin in points.
    pub fn group_margins(&self) -> Vec<f64> {
        self.group_cast
            .iter()
            .zip(&self.group_ab)
            .map(|(w, m)| if *w > 0.0 { m / w * 100.0 } else { 0.0 })
            .collect()
    }

    /// Turnout of district `d` in percent of its eligible people.
    pub fn turnout_percent(&self, d: usize) -> f64 {
        if self.eligible[d] > 0.0 {
            self.cast[d] / self.eligible[d] * 100.0
        } else {
            0.0
        }
    }
}

/// Tally a scenario.
pub fn tally(ds: &Dataset, shifts: &Shifts) -> Tally {
    let mut t = Tally::default();
    tally_into(ds, shifts, 0.0, None, &mut t);
    t
}

/// Tally into `out`, reusing its buffers. `uniform` is an extra margin shift (points toward
/// A) for every group and district; `per_district`, when given, one more per district.
///
/// The work is one pass over the district × group cells. It is compiled once per party
/// count (2 to 12, [`MAX_PARTIES`]) so that each cell's shares are a fixed-size array the
/// compiler can keep in registers; a hand-built dataset with another party count takes
/// [`tally_reference`], which says the same thing cell by cell.
pub fn tally_into(
    ds: &Dataset,
    shifts: &Shifts,
    uniform: f64,
    per_district: Option<&[f64]>,
    out: &mut Tally,
) {
    macro_rules! by_party_count {
        ($($k:literal)*) => {
            match ds.party_count() {
                $($k => tally_fixed::<$k>(ds, shifts, uniform, per_district, out),)*
                _ => tally_reference(ds, shifts, uniform, per_district, out),
            }
        };
    }
    by_party_count!(2 3 4 5 6 7 8 9 10 11 12);
}

/// Empty `out` for a dataset of this size, keeping its buffers.
fn prepare(ds: &Dataset, out: &mut Tally) {
    let (k_count, g_count, d_count) = (ds.party_count(), ds.group_count(), ds.district_count());
    reset(&mut out.votes, d_count * k_count);
    reset(&mut out.cast, d_count);
    reset(&mut out.eligible, d_count);
    reset(&mut out.margin, d_count);
    reset(&mut out.national_votes, k_count);
    reset(&mut out.group_cast, g_count);
    reset(&mut out.group_ab, g_count);
    out.winner.clear();
    out.winner.resize(d_count, None);
    out.runner_up.clear();
    out.runner_up.resize(d_count, None);
    out.seats.clear();
    out.seats.resize(k_count, 0);
    out.tied_seats = 0;
    out.seat_split.clear();
    if ds.has_proportional() {
        out.seat_split.resize(d_count * k_count, 0);
    }
    out.last_seat_ties.clear();
    out.unfilled_seats = 0;
    out.turnout_clamped = 0;
    out.margin_limited = 0;
    out.majority_party = None;
}

/// The extra margin shift of district `d`, in points.
#[inline]
fn extra_for(uniform: f64, per_district: Option<&[f64]>, d: usize) -> f64 {
    uniform + per_district.map_or(0.0, |p| p.get(d).copied().unwrap_or(0.0))
}

/// The tally for datasets of exactly `K` parties.
fn tally_fixed<const K: usize>(
    ds: &Dataset,
    shifts: &Shifts,
    uniform: f64,
    per_district: Option<&[f64]>,
    out: &mut Tally,
) {
    prepare(ds, out);
    let (g_count, d_count) = (ds.group_count(), ds.district_count());
    // The axis is valid for a loaded dataset; the bound also lets the compiler drop the
    // index checks in the loop below.
    let [a, b] = ds.axis.map(|i| i.min(K - 1));
    let cells = &ds.cells;
    let (shares, _) = cells.shares.as_chunks::<K>();
    // Per group: the turnout shift as a fraction and (recomputed only when the district's
    // extra shift changes) the share to move from B to A before the limit.
    out.group_shift.clear();
    out.group_shift
        .extend(shifts.turnout.iter().map(|&v| [turnout_fraction(v), 0.0]));
    out.group_sums.clear();
    out.group_sums.resize(g_count, [0.0; 2]);
    // The extra shift (as bits) that the moves were last computed for.
    let mut move_for: Option<u64> = None;
    for d in 0..d_count {
        let extra = extra_for(uniform, per_district, d);
        if move_for != Some(extra.to_bits()) {
            for (x, m) in out.group_shift.iter_mut().zip(&shifts.margin) {
                x[1] = move_fraction(m + extra);
            }
            move_for = Some(extra.to_bits());
        }
        let (lo, hi) = (d * g_count, (d + 1) * g_count);
        let row = district_row::<K>(
            &cells.eligible[lo..hi],
            &cells.turnout[lo..hi],
            &shares[lo..hi],
            &out.group_shift,
            &mut out.group_sums,
            [a, b],
        );
        let mut acc = row.votes;
        acc[a] += row.moved;
        acc[b] -= row.moved;
        out.turnout_clamped += row.clamped;
        out.margin_limited += row.limited;
        finish_district(ds, d, &acc, row.eligible, out);
    }
    for ((gc, gab), [w, m]) in out
        .group_cast
        .iter_mut()
        .zip(out.group_ab.iter_mut())
        .zip(&out.group_sums)
    {
        (*gc, *gab) = (*w, *m);
    }
    out.majority_party = out.seats.iter().position(|&s| s >= u64::from(ds.majority));
}

/// What one district's cells add up to, before the moved share is booked to A and B.
struct RowSums<const K: usize> {
    votes: [f64; K],
    moved: f64,
    eligible: f64,
    clamped: u32,
    limited: u32,
}

/// One district's cells: `n`, `tau` and `shares` per group, `shift` the per-group
/// turnout fraction and share to move, `sums` the running group totals.
#[inline(always)]
fn district_row<const K: usize>(
    n: &[f64],
    tau: &[f64],
    shares: &[[f64; K]],
    shift: &[[f64; 2]],
    sums: &mut [[f64; 2]],
    [a, b]: [usize; 2],
) -> RowSums<K> {
    let mut acc = [0.0f64; K];
    let (mut clamped, mut limited, mut empty) = (0u32, 0u32, 0u32);
    let (mut eligible, mut moved) = (0.0, 0.0);
    let rows = n
        .iter()
        .zip(tau)
        .zip(shares)
        .zip(shift)
        .zip(sums.iter_mut());
    // The loop stays straight: no branch, and cells with nobody eligible (n = 0, as loading
    // guarantees, never below) add nothing since their weight is 0. They are counted here
    // and taken out of the clamp counts below.
    for ((((&n, &tau), s), &[dt, x0]), sum) in rows {
        let raw = tau + dt;
        // `max` then `min` with constants are one instruction each; `clamp` compiles to
        // selects that the vectoriser pairs with the limit below, costing about a third
        // more instructions per cell (measured with callgrind).
        #[allow(clippy::manual_clamp)]
        let t = raw.max(0.0).min(1.0);
        let (pa, pb) = (s[a], s[b]);
        let x = if x0 > pb { pb } else { x0 };
        let x = if x < -pa { -pa } else { x };
        clamped += u32::from(t != raw);
        limited += u32::from(x != x0);
        empty += u32::from(n <= 0.0);
        eligible += n;
        let w = n * t;
        for k in 0..K {
            acc[k] += w * s[k];
        }
        moved += w * x;
        sum[0] += w;
        sum[1] += w * (pa - pb + 2.0 * x);
    }
    if empty > 0 {
        // Rare: SPEC counts only cells with someone eligible.
        for (((&n, &tau), s), &[dt, x0]) in n.iter().zip(tau).zip(shares).zip(shift) {
            if n <= 0.0 {
                clamped -= u32::from(clamp_rate(tau + dt).1);
                limited -= u32::from(x0 > s[b] || x0 < -s[a]);
            }
        }
    }
    RowSums {
        votes: acc,
        moved,
        eligible,
        clamped,
        limited,
    }
}

/// The tally cell by cell with [`cell`]'s rules, for any party count: slower, and the
/// yardstick the tests hold [`tally_into`] to.
pub fn tally_reference(
    ds: &Dataset,
    shifts: &Shifts,
    uniform: f64,
    per_district: Option<&[f64]>,
    out: &mut Tally,
) {
    prepare(ds, out);
    let (k_count, g_count) = (ds.party_count(), ds.group_count());
    let [a, b] = ds.axis;
    let mut acc = vec![0.0; k_count];
    for d in 0..ds.district_count() {
        let extra = extra_for(uniform, per_district, d);
        acc.iter_mut().for_each(|v| *v = 0.0);
        let mut eligible = 0.0;
        for g in 0..g_count {
            let c = d * g_count + g;
            let n = ds.cells.eligible[c];
            if n <= 0.0 {
                continue;
            }
            let s = &ds.cells.shares[c * k_count..(c + 1) * k_count];
            let (t, clamped) = shifted_turnout(ds.cells.turnout[c], shifts.turnout[g]);
            let (x, limited) = transfer(s[a], s[b], shifts.margin[g] + extra);
            out.turnout_clamped += u32::from(clamped);
            out.margin_limited += u32::from(limited);
            eligible += n;
            let w = n * t;
            for (k, v) in acc.iter_mut().enumerate() {
                let share = s[k]
                    + if k == a {
                        x
                    } else if k == b {
                        -x
                    } else {
                        0.0
                    };
                *v += w * share;
            }
            out.group_cast[g] += w;
            out.group_ab[g] += w * (s[a] + x - (s[b] - x));
        }
        finish_district(ds, d, &acc, eligible, out);
    }
    out.majority_party = out.seats.iter().position(|&s| s >= u64::from(ds.majority));
}

/// Store district `d`'s votes and decide its winner, margin and seats.
// Always inlined, so that for a fixed party count its loops unroll.
#[inline(always)]
fn finish_district(ds: &Dataset, d: usize, acc: &[f64], eligible: f64, out: &mut Tally) {
    let k_count = acc.len();
    let b = ds.axis[1].min(k_count.saturating_sub(1));
    let votes = &mut out.votes[d * k_count..(d + 1) * k_count];
    votes.copy_from_slice(acc);
    // Rounding can leave -1e-13 where B gave everything away.
    if let Some(v) = votes.get_mut(b) {
        *v = v.max(0.0);
    }
    let cast: f64 = votes.iter().sum();
    out.cast[d] = cast;
    out.eligible[d] = eligible;
    let (first, second) = top_two(votes);
    for (nv, v) in out.national_votes[..k_count].iter_mut().zip(votes.iter()) {
        *nv += v;
    }
    let (Some(f), Some(s)) = (first, second) else {
        return;
    };
    let lead = votes[f] - votes[s];
    out.runner_up[d] = Some(s);
    out.margin[d] = if cast > 0.0 { lead * 100.0 / cast } else { 0.0 };
    let district = &ds.districts[d];
    let leads = cast > 0.0 && lead > 1e-9 * cast;
    if leads {
        out.winner[d] = Some(f);
    }
    if district.seat_rule.is_proportional() {
        share_seats(district, d, k_count, out);
        return;
    }
    let seats = u64::from(district.seats);
    if leads {
        out.seats[f] += seats;
        if let Some(split) = out.seat_split.get_mut(d * k_count + f) {
            *split = district.seats;
        }
    } else {
        out.tied_seats += seats;
    }
}

/// District `d`'s seats under its proportional rule, from its votes in `out`.
// Kept out of line: winner-takes-all districts never come here.
#[inline(never)]
fn share_seats(district: &District, d: usize, k_count: usize, out: &mut Tally) {
    let range = d * k_count..(d + 1) * k_count;
    let (Some(votes), Some(split)) = (out.votes.get(range.clone()), out.seat_split.get_mut(range))
    else {
        return;
    };
    let a = allocate(
        district.seat_rule,
        district.seats,
        votes,
        district.threshold,
        split,
    );
    if a.allocated == 0 {
        if votes.iter().sum::<f64>() > 0.0 {
            out.unfilled_seats += u64::from(district.seats);
        } else {
            out.tied_seats += u64::from(district.seats);
        }
        return;
    }
    for (total, &s) in out.seats.iter_mut().zip(split.iter()) {
        *total += u64::from(s);
    }
    if a.last_seat_tie {
        out.last_seat_ties.push(d);
    }
}

fn reset(v: &mut Vec<f64>, n: usize) {
    v.clear();
    v.resize(n, 0.0);
}

/// Indices of the largest and second largest values (first index wins exact ties).
pub(crate) fn top_two(v: &[f64]) -> (Option<usize>, Option<usize>) {
    match v.len() {
        0 => (None, None),
        1 => (Some(0), None),
        _ => {
            let (mut first, mut second) = if v[1] > v[0] { (1, 0) } else { (0, 1) };
            for (k, &x) in v.iter().enumerate().skip(2) {
                if x > v[first] {
                    second = first;
                    first = k;
                } else if x > v[second] {
                    second = k;
                }
            }
            (Some(first), Some(second))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::scenario::Scenario;
    use crate::testdata::{two_groups, two_groups_no_poll};

    fn close(a: f64, b: f64) {
        assert!((a - b).abs() < 1e-9, "{a} != {b}");
    }

    fn run(q: &str) -> Tally {
        let ds = two_groups_no_poll();
        let s = Scenario::parse_strict(q, &ds).unwrap();
        tally(&ds, &Shifts::from_scenario(&ds, &s))
    }

    /// Baseline, worked by hand (N·τ·π per cell):
    /// x: young 1000·0.5 = 500 voters → a 300, b 150, c 50; old 1000·0.8 = 800 → a 240, b 480, c 80.
    ///    a 540, b 630, c 130, cast 1300: b wins by 90/1300 = 6.923… points.
    /// y: young 2000·0.4 = 800 → a 400, b 320, c 80; old 500·0.9 = 450 → a 180, b 225, c 45.
    ///    a 580, b 545, c 125, cast 1250: a wins by 35/1250 = 2.8 points (2 seats).
    /// z: young 100·0.95 = 95 → a 1.9, b 90.25, c 2.85 (no old row: 0 eligible).
    ///    b wins by (90.25 − 2.85)/95 = 92 points over c.
    /// Seats a 2, b 2 of 4; majority 3: nobody.
    #[test]
    fn baseline_by_hand() {
        let t = run("");
        for (got, want) in t
            .votes
            .iter()
            .zip([540.0, 630.0, 130.0, 580.0, 545.0, 125.0, 1.9, 90.25, 2.85])
        {
            close(*got, want);
        }
        assert_eq!(t.cast, vec![1300.0, 1250.0, 95.0]);
        assert_eq!(t.winner, vec![Some(1), Some(0), Some(1)]);
        // In z Cedar (2.85) is second to Birch, ahead of Alder (1.9).
        assert_eq!(t.runner_up, vec![Some(0), Some(1), Some(2)]);
        close(t.margin[0], 90.0 / 1300.0 * 100.0);
        close(t.margin[1], 2.8);
        close(t.margin[2], 92.0);
        assert_eq!(t.seats, vec![2, 2, 0]);
        assert_eq!(t.majority_party, None);
        close(t.turnout_percent(0), 65.0);
        close(t.turnout_percent(2), 95.0);
        // Group weights: young 500+800+95 = 1395, old 800+450 = 1250, of 2645.
        let w = t.group_weights();
        close(w[0], 1395.0 / 2645.0);
        close(t.shares()[0], 1121.9 / 2645.0);
        assert_eq!((t.turnout_clamped, t.margin_limited), (0, 0));
    }

    /// margin=young:10 moves 0.05 of share from b to a in every young cell:
    /// x young: a 0.65, b 0.25 → a 325 + 240 = 565, b 125 + 480 = 605: b by 40/1300.
    /// y young: a 0.55, b 0.35 → a 440 + 180 = 620, b 280 + 225 = 505: a by 115/1250.
    #[test]
    fn margin_shift_by_hand() {
        let t = run("margin=young:10");
        close(t.votes[0], 565.0);
        close(t.votes[1], 605.0);
        close(t.margin[0], 40.0 / 1300.0 * 100.0);
        close(t.margin[1], 115.0 / 1250.0 * 100.0);
        // The cell margin moved by exactly 10 points: young A−B nationwide was
        // (150 + 80 − 88.35)/1395, now (200 + 160 − 78.85)/1395.
        let m = t.group_margins();
        close(m[0], (200.0 + 160.0 - 78.85) / 1395.0 * 100.0);
    }

    /// margin=old:-100 wants 0.5 of share from a to b in old cells; x old has only 0.3 of a,
    /// y old 0.4: both limited (z has no old voters, so it does not count): 2 cells.
    /// turnout=all:15: y old 0.9 + 0.15 and z young 0.95 + 0.15 clamp to 1: 2 cells.
    #[test]
    fn clamp_and_limit_counts() {
        let t = run("margin=old:-100&turnout=all:15");
        assert_eq!(t.margin_limited, 2);
        assert_eq!(t.turnout_clamped, 2);
        // x: young 650 voters a 390 b 195 c 65; old 950 voters a 0 b 855 c 95.
        close(t.votes[0], 390.0);
        close(t.votes[1], 1050.0);
        close(
            t.turnout_percent(1),
            (2000.0 * 0.55 + 500.0) / 2500.0 * 100.0,
        );
    }

    #[test]
    fn a_tie_gives_seats_to_nobody() {
        // x: margin shift so that a and b are level: 90 votes behind; young cells there have 500
        // voters, old 800. Shift all by m: a gains 1300·m/200 and b loses as much: 90 = 13·m → m = 90/13.
        let ds = two_groups_no_poll();
        let mut s = Scenario::default_for(&ds);
        s.margin_all = 90.0 / 13.0;
        let t = tally(&ds, &Shifts::from_scenario(&ds, &s));
        assert_eq!(t.winner[0], None);
        assert_eq!(t.tied_seats, 1);
        assert!(t.margin[0] < 1e-9);
    }

    /// The poll's swing of the young: poll A−B 0.55 − 0.35 = 20 points; baseline young A−B
    /// weighted by N·τ: (500·0.3 + 800·0.1 + 95·(−0.93)) / 1395 = 141.65/1395.
    #[test]
    fn poll_swing_by_hand() {
        let ds = two_groups();
        let w = poll_swing(&ds).unwrap();
        close(w[0], 20.0 - 141.65 / 1395.0 * 100.0);
        // Old: poll −20; baseline (800·(−0.3) + 450·(−0.1)) / 1250 = −285/1250.
        close(w[1], -20.0 + 285.0 / 1250.0 * 100.0);
        let s = Scenario::default_for(&ds);
        let sh = Shifts::from_scenario(&ds, &s);
        close(sh.margin[0], w[0]);
        let base = Scenario::parse_strict("start=baseline&margin=young:1", &ds).unwrap();
        assert_eq!(Shifts::from_scenario(&ds, &base).margin, vec![1.0, 0.0]);
    }

    /// The proportional test dataset at baseline, by hand (votes as in `baseline_by_hand`):
    /// Xe (winner rule) goes to b. Ypo, 5 seats by D'Hondt, threshold 5% of 1250 = 62.5
    /// (c's 125 is in): quotients a 580, 290, 193.3; b 545, 272.5, 181.7; c 125: the
    /// five highest are 580 545 290 272.5 193.3: a 3, b 2. Zu, 1 seat by D'Hondt,
    /// threshold 4.75 of 95 votes: a (1.9) and c (2.85) are out, b takes it.
    /// Seats a 3, b 4 of 7; majority 4: b.
    #[test]
    fn proportional_by_hand() {
        let ds = crate::testdata::proportional();
        let t = tally(&ds, &Shifts::zero(&ds));
        assert_eq!(t.seats, vec![3, 4, 0]);
        assert_eq!(t.seat_split, vec![0, 1, 0, 3, 2, 0, 0, 1, 0]);
        assert_eq!(t.district_seats(1), Some(&[3, 2, 0][..]));
        assert_eq!(t.majority_party, Some(1));
        assert_eq!(t.winner, vec![Some(1), Some(0), Some(1)]);
        assert_eq!((t.tied_seats, t.unfilled_seats), (0, 0));
        assert!(t.last_seat_ties.is_empty());
        // The reference tally says the same.
        let mut r = Tally::default();
        tally_reference(&ds, &Shifts::zero(&ds), 0.0, None, &mut r);
        assert_eq!(
            (&r.seats, &r.seat_split, &r.winner, r.majority_party),
            (&t.seats, &t.seat_split, &t.winner, t.majority_party)
        );
        // The same district by largest remainders: quota 1250/5 = 250: a 2.32, b 2.18,
        // c 0.5: 2 + 2 + 0, the last seat to c's 0.5.
        let mut hare = ds.clone();
        hare.districts[1].seat_rule = crate::dataset::SeatRule::Hare;
        let t = tally(&hare, &Shifts::zero(&hare));
        assert_eq!(t.district_seats(1), Some(&[2, 2, 1][..]));
        // With a 10.5% threshold c (10%) is out: quota 1125/5 = 225: a 2.58, b 2.42:
        // 2 + 2, the last seat to a.
        hare.districts[1].threshold = 10.5;
        let t = tally(&hare, &Shifts::zero(&hare));
        assert_eq!(t.district_seats(1), Some(&[3, 2, 0][..]));
        assert_eq!(t.seats, vec![3, 4, 0]);
    }

    /// Winner-only datasets keep no seat split; a threshold nobody reaches leaves seats
    /// unfilled; a level last seat is reported.
    #[test]
    fn seat_split_only_when_proportional() {
        let ds = two_groups_no_poll();
        let t = tally(&ds, &Shifts::zero(&ds));
        assert!(t.seat_split.is_empty());
        assert_eq!(t.district_seats(0), None);

        let mut ds = crate::testdata::proportional();
        // Zu's 95 votes: b has 95%; a threshold of 50 in Ypo leaves everyone out.
        ds.districts[1].threshold = 50.0;
        let t = tally(&ds, &Shifts::zero(&ds));
        assert_eq!(t.unfilled_seats, 5);
        assert_eq!(t.district_seats(1), Some(&[0, 0, 0][..]));
        assert_eq!(t.seats, vec![0, 2, 0]);

        // Ypo with 2 seats under Sainte-Laguë after a shift that levels a and b:
        // margin=all:-2.8 moves 1250·0.014 = 17.5 votes: a 562.5, b 562.5: the first
        // seat is a (level, earlier party: a tie for a seat that is not the last), the
        // second b's 562.5 against a's 187.5.
        let mut ds = crate::testdata::proportional();
        ds.districts[1].seats = 1;
        ds.districts[1].seat_rule = crate::dataset::SeatRule::SainteLague;
        let s = Scenario::parse_strict("margin=all:-2.8", &ds).unwrap();
        let t = tally(&ds, &Shifts::from_scenario(&ds, &s));
        assert_eq!(t.winner[1], None, "level on votes");
        assert_eq!(t.district_seats(1), Some(&[1, 0, 0][..]));
        assert_eq!(t.last_seat_ties, vec![1]);
        assert_eq!(t.tied_seats, 0);
    }

    #[test]
    fn top_two_picks_first_on_ties() {
        assert_eq!(top_two(&[1.0, 3.0, 3.0]), (Some(1), Some(2)));
        assert_eq!(top_two(&[5.0, 1.0, 2.0]), (Some(0), Some(2)));
        assert_eq!(top_two(&[0.0, 0.0]), (Some(0), Some(1)));
    }
}
