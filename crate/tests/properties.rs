//! Property tests of the core: monotonicity of the margin shift, shares and turnout in
//! range, round-tripping scenario strings, and no panic on any input.

mod common;

use proptest::prelude::*;
use stratamap::dataset::{Dataset, Sources};
use stratamap::model::scenario::Scenario;
use stratamap::model::tally::{cell, tally, tally_into, tally_reference, Shifts, Tally};
use stratamap::testdata;

fn dataset_strategy() -> impl Strategy<Value = Dataset> {
    (
        1usize..7,
        1usize..5,
        2usize..5,
        prop::collection::vec(0.0f64..1.0, 16..64),
    )
        .prop_map(|(d, g, k, v)| common::synthetic(d, g, k, &v))
}

fn shifts_for(ds: &Dataset, t: &[f64], m: &[f64]) -> Shifts {
    let g = ds.group_count();
    Shifts {
        turnout: (0..g).map(|i| t[i % t.len()]).collect(),
        margin: (0..g).map(|i| m[i % m.len()]).collect(),
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// Moving A's margin shift up never lowers A's lead over B in any district, nor A's seats.
    #[test]
    fn margin_shift_is_monotone(
        ds in dataset_strategy(),
        t in prop::collection::vec(-100.0f64..100.0, 1..5),
        m in prop::collection::vec(-100.0f64..100.0, 1..5),
        group in 0usize..4,
        delta in 0.0f64..60.0,
    ) {
        let [a, b] = ds.axis;
        let before_shifts = shifts_for(&ds, &t, &m);
        let mut after_shifts = before_shifts.clone();
        let g = group % ds.group_count();
        after_shifts.margin[g] = (after_shifts.margin[g] + delta).min(100.0);
        let before = tally(&ds, &before_shifts);
        let after = tally(&ds, &after_shifts);
        for d in 0..ds.district_count() {
            let lead0 = before.district_votes(d)[a] - before.district_votes(d)[b];
            let lead1 = after.district_votes(d)[a] - after.district_votes(d)[b];
            prop_assert!(lead1 >= lead0 - 1e-7 * before.cast[d].max(1.0), "district {d}: {lead0} -> {lead1}");
        }
        prop_assert!(after.seats[a] >= before.seats[a]);
    }

    /// Shares stay in [0, 1] and sum to 1; turnout stays in [0, 1] after the clamp.
    #[test]
    fn cells_stay_in_range(
        ds in dataset_strategy(),
        t in prop::collection::vec(-100.0f64..100.0, 1..5),
        m in prop::collection::vec(-100.0f64..100.0, 1..5),
        extra in -50.0f64..50.0,
    ) {
        let sh = shifts_for(&ds, &t, &m);
        for d in 0..ds.district_count() {
            for g in 0..ds.group_count() {
                let c = cell(&ds, &sh, d, g, extra);
                prop_assert!((0.0..=1.0).contains(&c.turnout));
                let sum: f64 = c.shares.iter().sum();
                prop_assert!((sum - 1.0).abs() < 1e-9, "sum {sum}");
                for s in &c.shares {
                    prop_assert!((-1e-12..=1.0 + 1e-12).contains(s), "share {s}");
                }
            }
        }
        let tl = tally(&ds, &sh);
        let shares: f64 = tl.shares().iter().sum();
        prop_assert!(tl.total_cast() == 0.0 || (shares - 1.0).abs() < 1e-9);
        for d in 0..ds.district_count() {
            prop_assert!(tl.turnout_percent(d) <= 100.0 + 1e-9 && tl.turnout_percent(d) >= 0.0);
        }
    }

    /// The fast tally (one compiled loop per party count) agrees with the cell-by-cell
    /// reference, with empty cells, any axis and extra shifts per district.
    #[test]
    fn fast_tally_matches_reference(
        ds in (1usize..9, 1usize..6, 2usize..7, prop::collection::vec(0.0f64..1.0, 16..64))
            .prop_map(|(d, g, k, v)| common::synthetic(d, g, k, &v)),
        empty in prop::collection::vec(any::<bool>(), 1..13),
        axis in (0usize..6, 1usize..6),
        t in prop::collection::vec(-100.0f64..100.0, 1..5),
        m in prop::collection::vec(-100.0f64..100.0, 1..5),
        uniform in -40.0f64..40.0,
        per_district in prop::option::of(prop::collection::vec(-40.0f64..40.0, 1..9)),
    ) {
        let mut ds = ds;
        let k = ds.party_count();
        ds.axis = [axis.0 % k, (axis.0 + axis.1 % (k - 1).max(1)) % k];
        prop_assume!(ds.axis[0] != ds.axis[1]);
        // Every fourth cell (by the mask) has nobody eligible, as a missing CSV pair does.
        for (c, n) in ds.cells.eligible.iter_mut().enumerate() {
            if empty[c % empty.len()] && c % 4 == 0 {
                *n = 0.0;
            }
        }
        let sh = shifts_for(&ds, &t, &m);
        let extras = per_district.map(|p| (0..ds.district_count()).map(|d| p[d % p.len()]).collect::<Vec<_>>());
        let (mut fast, mut slow) = (Tally::default(), Tally::default());
        tally_into(&ds, &sh, uniform, extras.as_deref(), &mut fast);
        tally_reference(&ds, &sh, uniform, extras.as_deref(), &mut slow);
        prop_assert_eq!(fast.turnout_clamped, slow.turnout_clamped);
        prop_assert_eq!(fast.margin_limited, slow.margin_limited);
        prop_assert_eq!(&fast.eligible, &slow.eligible);
        for d in 0..ds.district_count() {
            let tol = 1e-9 * slow.cast[d].max(1.0);
            for (x, y) in fast.district_votes(d).iter().zip(slow.district_votes(d)) {
                prop_assert!((x - y).abs() <= tol, "district {d}: {x} vs {y}");
            }
            // Winners agree unless the race is a tie to within rounding.
            if slow.margin[d] > 1e-6 {
                prop_assert_eq!(fast.winner[d], slow.winner[d]);
            }
        }
        for (x, y) in fast.group_cast.iter().zip(&slow.group_cast).chain(fast.group_ab.iter().zip(&slow.group_ab)) {
            prop_assert!((x - y).abs() <= 1e-9 * y.abs().max(1.0), "{x} vs {y}");
        }
        if slow.margin.iter().all(|m| *m > 1e-6) {
            prop_assert_eq!(&fast.seats, &slow.seats);
            prop_assert_eq!(fast.majority_party, slow.majority_party);
        }
    }

    /// A scenario written canonically parses back to itself, and writing is idempotent.
    #[test]
    fn scenario_round_trips(
        turnout in prop::collection::vec((0usize..3, -10000i32..=10000), 0..4),
        margin in prop::collection::vec((0usize..3, -10000i32..=10000), 0..4),
        baseline in any::<bool>(),
        runs in prop::option::of(0u32..=100_000),
        seed in 0u64..(1u64 << 53),
        sd in 0u32..=2500,
        corr in 0u32..=100,
    ) {
        let ds = testdata::two_groups();
        let id = |i: usize| ["all", "young", "old"][i];
        let list = |v: &[(usize, i32)]| v.iter().map(|(g, p)| format!("{}:{}", id(*g), *p as f64 / 100.0)).collect::<Vec<_>>().join(",");
        let q = format!(
            "turnout={}&margin={}&start={}&seed={seed}&margin_sd={}&turnout_corr={}{}",
            list(&turnout), list(&margin), if baseline { "baseline" } else { "poll" },
            sd as f64 / 100.0, corr as f64 / 100.0,
            runs.map(|r| format!("&runs={r}")).unwrap_or_default(),
        );
        let p = Scenario::parse(&q, &ds);
        // Only "given twice" messages may appear (a group drawn twice).
        prop_assert!(p.messages.iter().all(|m| m.message.contains("twice")), "{:?}", p.messages);
        let canonical = p.scenario.to_query(&ds);
        let back = Scenario::parse_strict(&canonical, &ds);
        prop_assert!(back.is_ok(), "{canonical}: {:?}", back);
        let back = back.unwrap();
        prop_assert_eq!(&back, &p.scenario);
        prop_assert_eq!(back.to_query(&ds), canonical);
    }

    /// No scenario string makes the parser panic.
    #[test]
    fn any_scenario_string_is_safe(q in ".{0,200}") {
        let ds = testdata::two_groups();
        let p = Scenario::parse(&q, &ds);
        let _ = p.scenario.to_query(&ds);
    }

    /// No file text makes loading panic: random bytes, and valid files cut or altered.
    #[test]
    fn any_dataset_text_is_safe(
        junk in ".{0,300}",
        which in 0usize..4,
        cut in 0.0f64..1.0,
        pos in 0.0f64..1.0,
        byte in prop::sample::select(vec!["", "\"", ",", "-", "9", "\n", "]", "{", "1e999", "NaN", "\u{0}"]),
    ) {
        let mut files = [
            testdata::MANIFEST.to_string(),
            testdata::DISTRICTS.to_string(),
            testdata::ELECTORATE.to_string(),
            testdata::POLL.to_string(),
        ];
        let f = &mut files[which];
        let mut cut_at = (f.len() as f64 * cut) as usize;
        while !f.is_char_boundary(cut_at) { cut_at -= 1; }
        let mut at = (cut_at as f64 * pos) as usize;
        while !f.is_char_boundary(at) { at -= 1; }
        f.truncate(cut_at);
        f.insert_str(at, byte);
        let _ = Dataset::from_sources(&Sources {
            manifest: &files[0], districts: &files[1], electorate: &files[2], poll: Some(&files[3]),
        });
        let _ = Dataset::from_sources(&Sources {
            manifest: testdata::MANIFEST, districts: &junk, electorate: &junk, poll: Some(&junk),
        });
        let _ = stratamap::dataset::manifest_files(&junk);
    }
}
