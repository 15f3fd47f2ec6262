//! What every stage shares: quantities and units, physical constants, sampled curves, errors,
//! the TOML error formatter and the embedded reference tables with their provenance.

pub mod constants;
pub mod curve;
pub mod data;
pub mod error;
pub mod inputs;
pub mod quantity;
pub mod toml_errors;
pub mod units;
