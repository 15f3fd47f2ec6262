//! Animal housing: guidance sets for housing light and surveys of cage positions on a rack.

pub mod guidance;
pub mod survey;
