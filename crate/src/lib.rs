//! stratamap's core: datasets, the scenario string, the tally and everything derived
//! from it. It knows nothing of the browser or the terminal; the WebAssembly facade
//! (`wasm`) and the command line (`main.rs`) sit on top of it.
//!
//! The folders are layers, and dependencies point one way, downwards in this list:
//!
//! - [`error`]: problems with their file, row or feature and field;
//! - [`dataset`]: the input formats, validated into flat district × group arrays;
//! - [`model`]: the scenario string and the tally kernel;
//! - [`analysis`]: what reads a tally (tipping point, curve, plane, sampling error,
//!   simulation);
//! - [`build`]: datasets built from what analysts have (raking, the example dataset);
//!   beside `analysis`, on `dataset` and `model`;
//! - [`output`]: shading, CSV and the SVG map;
//! - [`facade`]: the long-lived engine and its WebAssembly binding; the command line
//!   (`main.rs`) sits beside it.

pub mod analysis;
pub mod build;
pub mod dataset;
pub mod error;
pub mod facade;
pub mod model;
pub mod output;

#[doc(hidden)]
pub mod testdata;

/// The caution that every view and export carries.
pub const CAUTION: &str = "A scenario, not a forecast: these results follow from the shifts chosen, not from a prediction. Official results come from the election authorities.";
