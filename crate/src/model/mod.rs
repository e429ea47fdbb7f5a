//! The model: the scenario string and the tally kernel that every analysis reads.
//!
//! Depends on [`crate::dataset`] only.

pub mod scenario;
pub mod seats;
pub mod tally;
