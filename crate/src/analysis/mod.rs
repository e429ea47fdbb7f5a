//! Analyses that read a tally: the tipping point, the seats–votes curve, the shift
//! plane, sampling error and the simulation.
//!
//! Depends on [`crate::dataset`] and [`crate::model`]; never on outputs or facades.

pub mod curve;
pub mod moe;
pub mod moe_effect;
pub mod plane;
pub mod reach;
pub mod simulate;
pub mod tipping;
