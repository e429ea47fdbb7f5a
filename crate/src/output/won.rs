//! The second map shading: each district in the colour of the party that won it in the
//! most simulated runs, stronger the larger that party's share of the runs, in the same
//! palette as the margin shading (index `k * STEPS + step`, ties last).
//!
//! ```
//! use stratamap::output::won::{runs_in_words, won_fills, won_step};
//! assert_eq!(won_step(95, 100), 3);
//! assert_eq!(won_step(50, 100), 0);
//! // Two parties and ties: district 0 won by party 1 in 8 of 10 runs.
//! assert_eq!(won_fills(&[2, 8, 0], 2, 10), vec![4 + 2]);
//! assert_eq!(runs_in_words(7012, 10_000), "in 7 of 10 runs");
//! ```

use crate::analysis::simulate::{Report, SeatReport, ShareReport};
use crate::output::shading::STEPS;
use serde::Serialize;

/// What the page says beside every simulated number.
pub const SIM_CAUTION: &str = "These are counts of simulated runs, not chances of the real result: the spread follows from the errors assumed here (turnout, poll and district), shown beside it. Other assumptions give other spreads.";

/// Districts listed as most often at the tipping point.
pub const TIPPING_LISTED: usize = 10;

/// Lower bounds of the steps above the first, as shares of the runs.
pub const WON_BOUNDS: [f64; 3] = [0.6, 0.75, 0.9];

/// The step of a district won in `won` of `runs` runs: 0 toss-up … `STEPS − 1`.
pub fn won_step(won: u32, runs: u32) -> usize {
    if runs == 0 {
        return 0;
    }
    let share = f64::from(won) / f64::from(runs);
    WON_BOUNDS.iter().take_while(|b| share >= **b).count()
}

/// Words for the steps, toss-up first (counts of runs, never probabilities).
pub fn won_step_labels() -> Vec<String> {
    vec![
        "toss-up: won in fewer than 6 of 10 runs".into(),
        "won in 6 of 10 runs or more".into(),
        "won in 3 of 4 runs or more".into(),
        "won in 9 of 10 runs or more".into(),
    ]
}

/// Palette index per district from its runs won (`k_count + 1` counts per district, tied
/// runs last): the party with most runs won (the earlier in the manifest on equal
/// counts) at its step; the tie fill where tied runs outnumber every party's.
pub fn won_fills(wins: &[u32], k_count: usize, runs: u32) -> Vec<u16> {
    let tie = (k_count * STEPS) as u16;
    wins.chunks_exact(k_count + 1)
        .map(|w| {
            let (k, &n) = w[..k_count]
                .iter()
                .enumerate()
                .rev()
                .max_by_key(|(_, n)| **n)
                .unwrap_or((0, &0));
            if runs == 0 || w[k_count] > n {
                tie
            } else {
                (k * STEPS + won_step(n, runs)) as u16
            }
        })
        .collect()
}

/// A count of runs in words, rounded to tenths: "in 7 of 10 runs"; "in every run",
/// "in none of the runs", and "in fewer than 1 of 10 runs" / "in more than 9 of 10
/// runs" near the ends, so that a rare outcome never reads as none or all.
pub fn runs_in_words(n: u32, runs: u32) -> String {
    if runs == 0 {
        return "in no runs yet".into();
    }
    if n == 0 {
        return "in none of the runs".into();
    }
    if n == runs {
        return "in every run".into();
    }
    let tenths = (f64::from(n) / f64::from(runs) * 10.0).round() as u32;
    match tenths {
        0 => "in fewer than 1 of 10 runs".into(),
        10 => "in more than 9 of 10 runs".into(),
        t => format!("in {t} of 10 runs"),
    }
}

/// The simulation as the page shows it: the report's numbers with words, the won
/// shading, and the districts most often at the tipping point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SimView {
    pub runs_done: u32,
    pub runs: u32,
    pub no_majority_runs: u32,
    pub no_majority_words: String,
    pub parties: Vec<PartyView>,
    /// Most often first (then GeoJSON order), at most [`TIPPING_LISTED`], none with 0 runs.
    pub tipping: Vec<TippingView>,
    /// Palette index per district for `map=won`.
    pub fills: Vec<u16>,
    pub won_labels: Vec<String>,
    pub caution: &'static str,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PartyView {
    pub majority_runs: u32,
    pub majority_words: String,
    pub seats: SeatReport,
    pub share: ShareReport,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TippingView {
    pub district: usize,
    pub runs: u32,
    pub words: String,
}

impl SimView {
    /// The view of a report, with its runs won per district (`k_count + 1` counts each).
    pub fn of(report: &Report, wins: &[u32], runs_asked: u32) -> SimView {
        let k_count = report.parties.len();
        let done = report.runs;
        let mut tipping: Vec<TippingView> = report
            .districts
            .iter()
            .enumerate()
            .filter(|(_, d)| d.tipping_runs > 0)
            .map(|(i, d)| TippingView {
                district: i,
                runs: d.tipping_runs,
                words: runs_in_words(d.tipping_runs, done),
            })
            .collect();
        tipping.sort_by(|a, b| b.runs.cmp(&a.runs).then(a.district.cmp(&b.district)));
        tipping.truncate(TIPPING_LISTED);
        SimView {
            runs_done: done,
            runs: runs_asked,
            no_majority_runs: report.no_majority_runs,
            no_majority_words: runs_in_words(report.no_majority_runs, done),
            parties: report
                .parties
                .iter()
                .map(|p| PartyView {
                    majority_runs: p.majority_runs,
                    majority_words: runs_in_words(p.majority_runs, done),
                    seats: p.seats.clone(),
                    share: p.share.clone(),
                })
                .collect(),
            tipping,
            fills: won_fills(wins, k_count, done),
            won_labels: won_step_labels(),
            caution: SIM_CAUTION,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn steps_and_ties() {
        assert_eq!(won_step(59, 100), 0);
        assert_eq!(won_step(60, 100), 1);
        assert_eq!(won_step(75, 100), 2);
        assert_eq!(won_step(90, 100), 3);
        // Party 0 and 1 level: the earlier party; tied runs most: the tie fill.
        assert_eq!(won_fills(&[5, 5, 0, 1, 2, 7], 2, 10), vec![0, 8]);
        assert_eq!(won_labels_len(), STEPS);
    }

    #[test]
    fn words_never_round_to_none_or_all() {
        assert_eq!(runs_in_words(0, 100), "in none of the runs");
        assert_eq!(runs_in_words(1, 100), "in fewer than 1 of 10 runs");
        assert_eq!(runs_in_words(99, 100), "in more than 9 of 10 runs");
        assert_eq!(runs_in_words(100, 100), "in every run");
        assert_eq!(runs_in_words(35, 100), "in 4 of 10 runs");
    }

    #[test]
    fn view_lists_tipping_districts_most_often_first() {
        let ds = crate::testdata::two_groups();
        let s = crate::model::scenario::Scenario::parse_strict("seed=4", &ds).unwrap();
        let r = crate::analysis::simulate::simulate(&ds, &s, 500);
        let wins: Vec<u32> = r
            .districts
            .iter()
            .flat_map(|d| d.runs_won.iter().map(|(_, n)| *n).collect::<Vec<_>>())
            .collect();
        let v = SimView::of(&r, &wins, 1000);
        assert_eq!((v.runs_done, v.runs), (500, 1000));
        assert!(v.tipping.windows(2).all(|w| w[0].runs >= w[1].runs));
        let total: u32 = r.districts.iter().map(|d| d.tipping_runs).sum();
        assert_eq!(v.tipping.iter().map(|t| t.runs).sum::<u32>(), total);
        assert_eq!(v.fills.len(), 3);
        assert_eq!(
            v.parties[0].majority_words,
            runs_in_words(r.parties[0].majority_runs, 500)
        );
    }

    fn won_labels_len() -> usize {
        won_step_labels().len()
    }
}
