//! Map shading: a district is filled in its winner's colour, lighter the closer the
//! race, in a few ordered steps from near-even to safe; ties get a hatch pattern.
//!
//! ```
//! use stratamap::output::shading::{step, mix_with_white};
//! assert_eq!(step(0.5), 0);
//! assert_eq!(step(12.0), 3);
//! assert_eq!(step(1.96), 1); // shown as 2.0: "2 to 4.9 points"
//! assert_eq!(step(4.94), 1); // shown as 4.9
//! assert_eq!(step(1.95), 0); // stored as 1.94999…: shown as 1.9
//! assert_eq!(mix_with_white("#204060", 1.0), "#204060");
//! assert_eq!(mix_with_white("#000000", 0.5), "#808080");
//! ```

use crate::dataset::Dataset;
use crate::model::tally::Tally;

/// Upper bounds of the steps below the last, in points of margin.
pub const STEP_BOUNDS: [f64; 3] = [2.0, 5.0, 10.0];
/// How much of the party colour each step shows (the rest is white).
const STRENGTH: [f64; 4] = [0.32, 0.55, 0.78, 1.0];
/// The fill used for ties (a pattern defined in the map's `<defs>`).
pub const TIE_FILL: &str = "url(#sm-tie)";

/// Number of steps.
pub const STEPS: usize = STEP_BOUNDS.len() + 1;

/// Decimals of a margin as the page's table and the exports show it.
pub const SHOWN_DECIMALS: i32 = 1;

/// The step of a margin in points: 0 near-even … `STEPS − 1` safe. The margin is
/// classed as it is shown, rounded to [`SHOWN_DECIMALS`], so that a district the table
/// shows as "2.0" is shaded "2 to 4.9", never "under 2".
pub fn step(margin: f64) -> usize {
    // Rounded from the exact decimal value of the number, as the page's number format
    // does (so 1.95, stored as 1.94999…, is 1.9 in both).
    let shown: f64 = format!("{margin:.*}", SHOWN_DECIMALS as usize)
        .parse()
        .unwrap_or(margin);
    STEP_BOUNDS.iter().take_while(|b| shown >= **b).count()
}

/// Labels of the steps, near-even first; they do not overlap at the bounds ("2 to 4.9",
/// then "5 to 9.9"), in the margin's shown precision.
pub fn step_labels() -> Vec<String> {
    let below =
        |b: f64| crate::dataset::round_text(b - 10f64.powi(-SHOWN_DECIMALS), SHOWN_DECIMALS);
    let mut out = vec![format!("under {} points", STEP_BOUNDS[0])];
    for w in STEP_BOUNDS.windows(2) {
        out.push(format!("{} to {} points", w[0], below(w[1])));
    }
    out.push(format!(
        "{} points or more",
        STEP_BOUNDS[STEP_BOUNDS.len() - 1]
    ));
    out
}

/// `#rrggbb` mixed with white: `strength` 1 is the colour itself, 0 is white.
pub fn mix_with_white(color: &str, strength: f64) -> String {
    let c = |i: usize| u8::from_str_radix(color.get(i..i + 2).unwrap_or("00"), 16).unwrap_or(0);
    let m = |v: u8| (255.0 - (255.0 - f64::from(v)) * strength).round() as u8;
    format!("#{:02x}{:02x}{:02x}", m(c(1)), m(c(3)), m(c(5)))
}

/// Palette: index `k * STEPS + s` for party k at step s; the last entry is the tie fill.
pub fn palette(ds: &Dataset) -> Vec<String> {
    let mut out = Vec::with_capacity(ds.party_count() * STEPS + 1);
    for p in &ds.parties {
        for s in STRENGTH {
            out.push(mix_with_white(&p.color, s));
        }
    }
    out.push(TIE_FILL.to_string());
    out
}

/// Palette index of every district.
pub fn fills(ds: &Dataset, t: &Tally) -> Vec<u16> {
    let tie = (ds.party_count() * STEPS) as u16;
    (0..ds.district_count())
        .map(|d| match t.winner[d] {
            Some(k) => (k * STEPS + step(t.margin[d])) as u16,
            None => tie,
        })
        .collect()
}
