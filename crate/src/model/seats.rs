//! How a district's seats are shared among the parties (DEVELOPERS.md, "The model"):
//! the winner takes all, or one of three proportional rules.
//!
//! - [`SeatRule::Winner`]: the party with most votes takes every seat (the tally decides
//!   that itself, with its tie rule; [`allocate`] is for the proportional rules);
//! - [`SeatRule::Dhondt`]: highest averages with divisors 1, 2, 3, …;
//! - [`SeatRule::SainteLague`]: highest averages with divisors 1, 3, 5, …;
//! - [`SeatRule::Hare`]: largest remainders with the Hare quota, the votes of the parties
//!   at or above the threshold divided by the seats.
//!
//! Under the proportional rules a party with less than `threshold` percent of the
//! district's votes cast gets no seat; a party exactly at the threshold stays in (within
//! 1e-9 of the votes cast, the tally's tolerance). When two quotients (or remainders)
//! for the last seat are within 1e-9 of the votes cast of each other, the seat goes to
//! the party with more votes, then to the earlier party in the manifest, and
//! [`Allocation::last_seat_tie`] says so. Quotients and remainders are compared in
//! votes.
//!
//! ```
//! use stratamap::model::seats::{allocate, SeatRule};
//! // Votes of four parties, 8 seats, no threshold.
//! let votes = [100_000.0, 80_000.0, 30_000.0, 20_000.0];
//! let mut seats = [0u32; 4];
//! allocate(SeatRule::Dhondt, 8, &votes, 0.0, &mut seats);
//! assert_eq!(seats, [4, 3, 1, 0]);
//! allocate(SeatRule::SainteLague, 8, &votes, 0.0, &mut seats);
//! assert_eq!(seats, [3, 3, 1, 1]);
//! allocate(SeatRule::Hare, 8, &votes, 0.0, &mut seats);
//! assert_eq!(seats, [3, 3, 1, 1]);
//! // A 10% threshold leaves the last party (8.7%) out.
//! let a = allocate(SeatRule::SainteLague, 8, &votes, 10.0, &mut seats);
//! assert_eq!(seats, [4, 3, 1, 0]);
//! assert!(!a.last_seat_tie);
//! ```

pub use crate::dataset::SeatRule;

/// Tolerance of the tie rule and the threshold, as a fraction of the votes cast.
pub const TIE_TOLERANCE: f64 = 1e-9;

/// What an allocation found besides the seats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Allocation {
    /// Seats given out: all of them, or none when no party reached the threshold (or
    /// nobody voted).
    pub allocated: u32,
    /// The last seat went by the tie rule (more votes, then the earlier party).
    pub last_seat_tie: bool,
}

/// Share `seats` among the parties with `votes` under a proportional `rule`, leaving out
/// parties under `threshold` percent of the votes cast; `out[k]` receives party k's seats.
/// Under [`SeatRule::Winner`] the party with most votes takes all (ties by the same rule
/// as the last seat; the tally handles winner districts itself).
///
/// `out` must be as long as `votes`. Nothing is allocated on the heap.
pub fn allocate(
    rule: SeatRule,
    seats: u32,
    votes: &[f64],
    threshold: f64,
    out: &mut [u32],
) -> Allocation {
    out.iter_mut().for_each(|s| *s = 0);
    let cast: f64 = votes.iter().sum();
    if seats == 0 || !cast.is_finite() || cast <= 0.0 || out.len() < votes.len() {
        return Allocation::default();
    }
    let tol = TIE_TOLERANCE * cast;
    let bar = if rule.is_proportional() {
        threshold / 100.0 * cast - tol
    } else {
        0.0
    };
    // A party is in when it reaches the threshold and has a vote.
    let is_in = |v: f64| v > 0.0 && v >= bar;
    if !votes.iter().any(|&v| is_in(v)) {
        return Allocation::default();
    }
    match rule {
        SeatRule::Winner => {
            let mut tie = false;
            let best = pick(votes, tol, &mut tie, |k| {
                is_in(votes[k]).then_some(votes[k])
            });
            if let Some(k) = best {
                out[k] = seats;
            }
            Allocation {
                allocated: seats,
                last_seat_tie: tie,
            }
        }
        SeatRule::Dhondt | SeatRule::SainteLague => {
            let step = if rule == SeatRule::Dhondt { 1.0 } else { 2.0 };
            let mut tie = false;
            for n in 0..seats {
                let mut this_tie = false;
                let best = pick(votes, tol, &mut this_tie, |k| {
                    is_in(votes[k]).then(|| votes[k] / (1.0 + step * f64::from(out[k])))
                });
                // `pick` finds a party: some party is in, and its quotient is positive.
                if let Some(k) = best {
                    out[k] += 1;
                }
                if n + 1 == seats {
                    tie = this_tie;
                }
            }
            Allocation {
                allocated: seats,
                last_seat_tie: tie,
            }
        }
        SeatRule::Hare => hare(seats, votes, tol, is_in, out),
    }
}

/// Largest remainders with the Hare quota over the parties that are in.
fn hare(
    seats: u32,
    votes: &[f64],
    tol: f64,
    is_in: impl Fn(f64) -> bool,
    out: &mut [u32],
) -> Allocation {
    let counted: f64 = votes.iter().filter(|&&v| is_in(v)).sum();
    let quota = counted / f64::from(seats);
    let mut given: u64 = 0;
    for (k, &v) in votes.iter().enumerate() {
        if is_in(v) {
            // v / quota ≤ seats, so this fits in u32.
            out[k] = (v * f64::from(seats) / counted)
                .floor()
                .min(f64::from(seats)) as u32;
            given += u64::from(out[k]);
        }
    }
    let remainder = |k: usize, out: &[u32]| votes[k] - f64::from(out[k]) * quota;
    // Rounding could in theory give one seat too many: take it back from the smallest
    // remainder.
    while given > u64::from(seats) {
        let smallest = (0..votes.len())
            .filter(|&k| out[k] > 0)
            .min_by(|&i, &j| remainder(i, out).total_cmp(&remainder(j, out)));
        match smallest {
            Some(k) => {
                out[k] -= 1;
                given -= 1;
            }
            None => break,
        }
    }
    let left = u64::from(seats) - given;
    // Each party gets at most one of the seats left, largest remainder first.
    let mut extra = [false; crate::model::tally::MAX_PARTIES];
    let mut extra_vec = Vec::new();
    let extra: &mut [bool] = if votes.len() <= extra.len() {
        &mut extra[..votes.len()]
    } else {
        extra_vec.resize(votes.len(), false);
        &mut extra_vec
    };
    let mut tie = false;
    for n in 0..left {
        let mut this_tie = false;
        let snapshot: &[u32] = out;
        let best = pick(votes, tol, &mut this_tie, |k| {
            (is_in(votes[k]) && !extra[k]).then(|| remainder(k, snapshot))
        });
        match best {
            Some(k) => {
                extra[k] = true;
                out[k] += 1;
            }
            None => break,
        }
        if n + 1 == left {
            tie = this_tie;
        }
    }
    Allocation {
        allocated: out.iter().sum(),
        last_seat_tie: tie,
    }
}

/// The party with the highest `score` (`None`: not a candidate). Scores within `tol`
/// of the highest are level: the party with more votes wins, then the earlier one;
/// `tie` is set when more than one party was level.
fn pick(
    votes: &[f64],
    tol: f64,
    tie: &mut bool,
    score: impl Fn(usize) -> Option<f64>,
) -> Option<usize> {
    let mut top = f64::NEG_INFINITY;
    for k in 0..votes.len() {
        if let Some(s) = score(k) {
            top = top.max(s);
        }
    }
    if top == f64::NEG_INFINITY {
        return None;
    }
    let mut best: Option<usize> = None;
    let mut level = 0;
    for k in 0..votes.len() {
        match score(k) {
            Some(s) if s >= top - tol => {
                level += 1;
                // Strictly more votes wins; equal votes keep the earlier party.
                if best.is_none_or(|b| votes[k] > votes[b]) {
                    best = Some(k);
                }
            }
            _ => {}
        }
    }
    *tie = level > 1;
    best
}

#[cfg(test)]
mod tests {
    use super::*;

    fn run(rule: SeatRule, seats: u32, votes: &[f64], threshold: f64) -> (Vec<u32>, bool) {
        let mut out = vec![0; votes.len()];
        let a = allocate(rule, seats, votes, threshold, &mut out);
        assert_eq!(a.allocated, out.iter().sum::<u32>());
        (out, a.last_seat_tie)
    }

    /// For All Practical Purposes (COMAP, 10th edition, W. H. Freeman, 2015), chapter 14,
    /// example 14: the first 30 seats of a parliament by D'Hondt, votes Whigs 5,525,381,
    /// Tories 3,470,152, Liberals 3,864,226, Centrists 201,203. The book's table gives the
    /// Whigs 13 seats, the Tories 8, the Liberals 9 and the Centrists none.
    #[test]
    fn dhondt_textbook_thirty_seats() {
        let votes = [5_525_381.0, 3_470_152.0, 3_864_226.0, 201_203.0];
        let (seats, tie) = run(SeatRule::Dhondt, 30, &votes, 0.0);
        assert_eq!(seats, vec![13, 8, 9, 0]);
        assert!(!tie);
    }

    /// For All Practical Purposes (COMAP, 10th edition, 2015), chapter 14, example 9: a
    /// 100-seat parliament by the Hare (Hamilton) largest remainders. First election:
    /// lower quotas 42, 26, 29, 1 (98 seats), the two left to the Tories and Liberals:
    /// 42, 27, 30, 1. The repeat election: the largest fractions are the Whigs' and the
    /// Centrists': 43, 26, 29, 2 (the book's population paradox).
    #[test]
    fn hare_textbook_hundred_seats() {
        let first = [5_525_381.0, 3_470_152.0, 3_864_226.0, 201_203.0];
        assert_eq!(run(SeatRule::Hare, 100, &first, 0.0).0, vec![42, 27, 30, 1]);
        let repeat = [5_657_564.0, 3_507_464.0, 3_885_693.0, 201_049.0];
        assert_eq!(
            run(SeatRule::Hare, 100, &repeat, 0.0).0,
            vec![43, 26, 29, 2]
        );
    }

    /// N. R. Miller, "Election inversions under proportional representation",
    /// Scandinavian Political Studies 38(1), 2015, p. 16: 35 seats, votes A 503, B 304,
    /// C 193. Sainte-Laguë gives 17, 11, 7 (A falls short of half the seats with half the
    /// votes). D'Hondt, by hand: the last seat is B's eleventh, 304/11 = 27.64, just ahead
    /// of C's seventh, 193/7 = 27.57 (A's eighteenth, 503/18 = 27.94, came before): 18,
    /// 11, 6.
    #[test]
    fn sainte_lague_published_thirty_five_seats() {
        let votes = [503.0, 304.0, 193.0];
        assert_eq!(
            run(SeatRule::SainteLague, 35, &votes, 0.0).0,
            vec![17, 11, 7]
        );
        assert_eq!(run(SeatRule::Dhondt, 35, &votes, 0.0).0, vec![18, 11, 6]);
    }

    /// Worked by hand (the module's example): votes 100,000, 80,000, 30,000, 20,000.
    /// Sainte-Laguë quotients: A 100000, 33333, 20000, 14286; B 80000, 26667, 16000;
    /// C 30000, 10000; D 20000, 6667. The sixth seat is A's 20,000 against D's 20,000:
    /// exactly level. With 6 seats that is the last seat, and it goes to A (more votes);
    /// with 7 seats both get one and there is no tie for the last seat.
    #[test]
    fn tie_for_the_last_seat_goes_to_more_votes() {
        let votes = [100_000.0, 80_000.0, 30_000.0, 20_000.0];
        let (seats, tie) = run(SeatRule::SainteLague, 6, &votes, 0.0);
        assert_eq!(seats, vec![3, 2, 1, 0]);
        assert!(tie);
        let (seats, tie) = run(SeatRule::SainteLague, 7, &votes, 0.0);
        assert_eq!(seats, vec![3, 2, 1, 1]);
        assert!(!tie);
        // Within the tolerance (1e-9 of the 230,000 votes cast) is level too.
        let nudged = [100_000.0, 80_000.0, 30_000.0, 20_000.0 + 1e-5];
        let (seats, tie) = run(SeatRule::SainteLague, 6, &nudged, 0.0);
        assert_eq!(seats, vec![3, 2, 1, 0]);
        assert!(tie);
        // Beyond it, D's larger quotient wins.
        let nudged = [100_000.0, 80_000.0, 30_000.0, 20_000.0 + 1e-3];
        assert_eq!(
            run(SeatRule::SainteLague, 6, &nudged, 0.0).0,
            vec![2, 2, 1, 1]
        );
    }

    /// Equal votes, equal quotients: the earlier party in the manifest.
    #[test]
    fn tie_with_equal_votes_goes_to_the_earlier_party() {
        for rule in [SeatRule::Dhondt, SeatRule::SainteLague, SeatRule::Hare] {
            let (seats, tie) = run(rule, 3, &[10.0, 20.0, 20.0], 0.0);
            // D'Hondt: 20 (b), 20 (c), then 10 (a) against b's and c's 10: level three
            // ways; a, b and c have 10, 20, 20 votes: b wins, then c… the last seat
            // goes to b, the earlier of the two with 20 votes.
            match rule {
                SeatRule::Dhondt => assert_eq!(seats, vec![0, 2, 1], "{rule:?}"),
                // Sainte-Laguë: 20, 20, then 10 against 6.7 and 6.7: a.
                SeatRule::SainteLague => assert_eq!(seats, vec![1, 1, 1], "{rule:?}"),
                // Hare quota 50/3: quotas 0.6, 1.2, 1.2: 0 + 1 + 1, the last seat to
                // a's remainder 10 against 3.3 and 3.3.
                _ => assert_eq!(seats, vec![1, 1, 1], "{rule:?}"),
            }
            assert_eq!(tie, rule == SeatRule::Dhondt, "{rule:?}");
        }
        // Hare: two equal remainders for one seat.
        let (seats, tie) = run(SeatRule::Hare, 1, &[30.0, 30.0, 40.0], 0.0);
        assert_eq!(seats, vec![0, 0, 1]);
        assert!(!tie);
        let (seats, tie) = run(SeatRule::Hare, 2, &[40.0, 40.0, 20.0], 0.0);
        // Quota 50: 0.8, 0.8, 0.4: remainders 40, 40, 20: a and b.
        assert_eq!(seats, vec![1, 1, 0]);
        assert!(!tie);
        let (seats, tie) = run(SeatRule::Hare, 1, &[40.0, 40.0, 20.0], 0.0);
        assert_eq!(seats, vec![1, 0, 0]);
        assert!(tie);
    }

    /// Threshold 5% of 1,000 votes is 50: a party with 49 is out, 50 stays in.
    #[test]
    fn threshold_excludes_below_and_keeps_exactly_at() {
        let votes = [601.0, 300.0, 50.0, 49.0];
        for rule in [SeatRule::Dhondt, SeatRule::SainteLague, SeatRule::Hare] {
            let (seats, _) = run(rule, 20, &votes, 5.0);
            assert!(seats[2] > 0, "{rule:?}: {seats:?}");
            assert_eq!(seats[3], 0, "{rule:?}: {seats:?}");
        }
        // Hare's quota counts only the parties in: (601 + 300 + 50) / 20 = 47.55.
        // 601 → 12.64, 300 → 6.31, 50 → 1.05: 12 + 6 + 1, the last seat to 601's 0.64.
        assert_eq!(run(SeatRule::Hare, 20, &votes, 5.0).0, vec![13, 6, 1, 0]);
        // Without the threshold: quota 50: 12.02, 6, 1, 0.98: 12 + 6 + 1 + 0, the last
        // to the fourth party's 0.98.
        assert_eq!(run(SeatRule::Hare, 20, &votes, 0.0).0, vec![12, 6, 1, 1]);
        // A threshold no party reaches: no seat is given.
        let mut out = [0; 3];
        let a = allocate(SeatRule::Dhondt, 5, &[34.0, 33.0, 33.0], 40.0, &mut out);
        assert_eq!((a.allocated, out), (0, [0, 0, 0]));
        // The threshold does not apply to the winner rule.
        let a = allocate(SeatRule::Winner, 5, &[34.0, 33.0, 33.0], 40.0, &mut out);
        assert_eq!((a.allocated, out), (5, [5, 0, 0]));
    }

    #[test]
    fn nothing_to_share() {
        let mut out = [7; 2];
        assert_eq!(
            allocate(SeatRule::Hare, 3, &[0.0, 0.0], 0.0, &mut out),
            Allocation::default()
        );
        assert_eq!(out, [0, 0]);
        // A party without a vote gets no seat even when seats are left over.
        assert_eq!(run(SeatRule::Dhondt, 4, &[10.0, 0.0], 0.0).0, vec![4, 0]);
        assert_eq!(run(SeatRule::Hare, 4, &[10.0, 0.0], 0.0).0, vec![4, 0]);
    }

    #[test]
    fn ids_round_trip() {
        for r in SeatRule::ALL {
            assert_eq!(SeatRule::from_id(r.id()), Some(r));
        }
        assert_eq!(
            SeatRule::expected(),
            r#""winner", "dhondt", "sainte_lague" or "hare""#
        );
    }
}
