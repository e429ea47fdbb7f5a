//! Building datasets from what analysts have: raking an electorate from per-district
//! margins and a groups table ([`rake`], on [`ipf`]), and the example dataset that
//! `stratamap template` writes ([`template`]).
//!
//! Depends on [`crate::dataset`] (file formats and checks) and [`crate::model`] (the
//! tally that checks a raked electorate reproduces the results); nothing below depends
//! on it.

pub mod ipf;
pub mod rake;
pub mod template;
