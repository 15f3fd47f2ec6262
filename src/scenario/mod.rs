//! Scenario text to typed values: subjects, sources, filters and schedules as written in a file
//! or on the command line.

pub mod bleach;
pub mod retina;
