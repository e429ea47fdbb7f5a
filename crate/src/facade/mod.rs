//! The two facades over the core: the long-lived [`engine::Engine`] that the page and
//! the command line drive, and the wasm-bindgen layer over it (wasm32 only).
//!
//! Depends on everything below it; nothing in the core depends on it.

pub mod engine;
#[cfg(target_arch = "wasm32")]
mod wasm;
#[cfg(target_arch = "wasm32")]
mod wasm_sim;
