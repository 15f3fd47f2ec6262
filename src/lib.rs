//! retidose: from a lamp spectrum to what reaches the eye, and how that compares with
//! published data.
//!
//! The library holds the computation as pure functions over plain data; the `retidose`
//! binary parses arguments, calls it and renders the results. The modules follow the light:
//!
//! 1. [`base`]: quantities and units, constants, sampled curves, errors, embedded tables;
//! 2. [`spectrum`]: a spectrum from a file, a generator or a built-in lamp, scaled to a
//!    measurement, with photometry;
//! 3. [`weighting`]: CIE S 026 α-opic action spectra, photopigment templates, ocular media;
//! 4. [`cornea`]: a source placed before the eye, through every filter in the path;
//! 5. [`retina`]: eye models, pupils, retinal irradiance, trolands and the catch per receptor;
//! 6. [`pigment`]: bleaching and regeneration over a schedule;
//! 7. [`limits`]: published exposure limits and risk groups;
//! 8. [`housing`]: guidance for animal housing and surveys of cage positions;
//! 9. [`scenario`]: scenario text resolved into typed values, once;
//! 10. [`assess`]: a resolved scenario through the stages into one report structure.
//!
//! ```
//! use retidose::base::units::parse_illuminance;
//! use retidose::spectrum::{photometry::photopic, scale::{ScaleTarget, scale_to}, source::resolve};
//! let a = resolve("cie:A", None)?;
//! let e = scale_to(&a, ScaleTarget::Illuminance(parse_illuminance("300 lx")?))?;
//! let lux = photopic(&e).value.unwrap().si_value();
//! assert!((lux - 300.0).abs() < 1e-9);
//! # Ok::<(), retidose::Error>(())
//! ```

#![warn(clippy::print_stdout, clippy::print_stderr)]

pub mod assess;
pub mod base;
pub mod compare;
pub mod cornea;
pub mod housing;
pub mod limits;
pub mod pigment;
pub mod retina;
pub mod scenario;
pub mod spectrum;
pub mod uncertainty;
pub mod weighting;

pub use base::error::{Error, ErrorKind, Result};
