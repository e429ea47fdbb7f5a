//! Outputs: the map's shading steps and palette, the CSV export and the SVG map.
//!
//! Depends on [`crate::dataset`], [`crate::model`] and [`crate::analysis`].

pub mod export;
pub mod map;
pub mod publish;
pub mod shading;
pub mod won;
pub mod words;
