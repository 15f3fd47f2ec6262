//! retidose: from a lamp spectrum to what reaches the eye, and how that compares with
//! published data.
//!
//! The library holds the computation as pure functions over plain data; the `retidose`
//! binary parses arguments, calls it and renders the results. The pipeline so far:
//!
//! 1. a [`spectrum::Spectrum`] from a file ([`reader`]), a generator ([`generate`]) or a
//!    built-in lamp ([`source`]), optionally scaled to a measurement ([`scale`]);
//! 2. photometry ([`photometry`]: V(λ), V′(λ), S/P, efficacy) and CIE S 026 α-opic
//!    quantities ([`alpha_opic`]);
//! 3. one report structure ([`spectrum_report`]) that every renderer reads.
//!
//! Every table the computation uses is embedded ([`data`]) with its source and status.
//!
//! ```
//! use retidose::{scale::{ScaleTarget, scale_to}, source::resolve, photometry::photopic, units::parse_illuminance};
//! let a = resolve("cie:A", None)?;
//! let e = scale_to(&a, ScaleTarget::Illuminance(parse_illuminance("300 lx")?))?;
//! let lux = photopic(&e).value.unwrap().si_value();
//! assert!((lux - 300.0).abs() < 1e-9);
//! # Ok::<(), retidose::Error>(())
//! ```

#![warn(clippy::print_stdout, clippy::print_stderr)]
#![warn(missing_docs)]
#![forbid(unsafe_code)]

pub mod alpha_opic;
pub mod assessment;
pub mod bleach;
pub mod bleach_scenario;
pub mod catch;
pub mod constants;
pub mod curve;
pub mod data;
pub mod error;
pub mod eye;
pub mod filter;
pub mod generate;
pub mod geometry;
pub mod guidance;
pub mod kinetics;
pub mod lens;
pub mod limits;
pub mod limits_report;
pub mod photometry;
pub mod pupil;
pub mod quantity;
pub mod reader;
pub mod retina;
pub mod retina_report;
pub mod retina_scenario;
pub mod scale;
pub mod schedule;
pub mod source;
pub mod spectrum;
pub mod spectrum_report;
pub mod survey;
pub mod template;
pub mod toml_errors;
pub mod units;

pub use error::{Error, ErrorKind, Result};
