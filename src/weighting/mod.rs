//! Spectral weightings: CIE S 026 α-opic action spectra, photopigment templates and ocular
//! media.

pub mod alpha_opic;
pub mod lens;
pub mod template;
