//! stratamap's core: datasets, the scenario string, the tally and everything derived
//! from it. It knows nothing of the browser or the terminal; the WebAssembly facade
//! (`wasm`) and the command line (`main.rs`) sit on top of it.
//!
//! Dependencies point one way: `dataset` ← `scenario` ← `tally` ← (`tipping`, `curve`,
//! `plane`, `moe`, `export`, `map`) ← `engine` ← (`wasm`, the command line).

pub mod curve;
pub mod dataset;
pub mod engine;
pub mod error;
pub mod export;
pub mod map;
pub mod moe;
pub mod plane;
pub mod scenario;
pub mod shading;
pub mod simulate;
pub mod tally;
pub mod tipping;

#[doc(hidden)]
pub mod testdata;

#[cfg(target_arch = "wasm32")]
mod wasm;

/// The caution that every view and export carries.
pub const CAUTION: &str = "A scenario, not a forecast: these results follow from the shifts chosen, not from a prediction. Official results come from the election authorities.";
