//! Animal housing: guidance sets for housing light, and surveys of a holding room's racks.
//!
//! The flow: [`room`] (the resolved room) → [`readings`] (meter readings matched to positions)
//! → [`calibrate`] (the luminaire model fitted to them) → [`survey::plan`] (per-rack figures
//! per lux, computed once) → [`pass`] (one position, plain arithmetic) → [`summary`] (per-rack
//! figures on every core, and the rows streamed) → [`lever`] (the one dimming factor).

pub mod calibrate;
pub mod guidance;
pub mod lever;
pub mod pass;
pub mod readings;
pub mod room;
pub mod summary;
pub mod survey;
