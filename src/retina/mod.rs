//! From the cornea to the retina: eye models, pupils, retinal irradiance and trolands, and the
//! photon catch per receptor.

pub mod catch;
pub mod eye;
pub mod optics;
pub mod pupil;
pub mod report;
