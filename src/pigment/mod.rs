//! Photopigment bleaching and regeneration: kinetic models solved exactly per step, schedules
//! of steps, and the bleach report with recovery and threshold estimates.

pub mod bleach;
pub mod course;
pub mod flash;
pub mod kinetics;
pub mod schedule;
pub mod threshold;
