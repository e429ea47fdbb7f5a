//! The shift plane (SPEC 2.2): per group, how much its weight in the electorate changed
//! (x, points) and how much its A−B margin changed (y, points), against the baseline.
//! The quadrant tells which axis party gains and whether the group grows or shrinks.
//!
//! ```
//! use stratamap::{analysis::plane::shift_plane, model::{scenario::Scenario, tally::{tally, Shifts}}};
//! let ds = stratamap::testdata::two_groups_no_poll();
//! let base = tally(&ds, &Shifts::zero(&ds));
//! let s = Scenario::parse_strict("margin=old:4", &ds).unwrap();
//! let p = shift_plane(&base, &tally(&ds, &Shifts::from_scenario(&ds, &s)));
//! assert!(p[0].x.abs() < 1e-9 && p[0].y.abs() < 1e-9);
//! assert!((p[1].y - 4.0).abs() < 1e-9); // no limit bit: the margin moved by exactly 4
//! ```

use crate::model::tally::Tally;
use serde::Serialize;

#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct PlanePoint {
    /// Weight change, points (w'_g − w_g) × 100.
    pub x: f64,
    /// A−B margin change, points.
    pub y: f64,
}

/// One point per group.
pub fn shift_plane(baseline: &Tally, scenario: &Tally) -> Vec<PlanePoint> {
    let (w0, w1) = (baseline.group_weights(), scenario.group_weights());
    let (m0, m1) = (baseline.group_margins(), scenario.group_margins());
    (0..w0.len())
        .map(|g| PlanePoint {
            x: (w1[g] - w0[g]) * 100.0,
            y: m1[g] - m0[g],
        })
        .collect()
}
