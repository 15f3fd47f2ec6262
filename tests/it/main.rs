//! The one integration-test binary: every file beside this one is a module of it, so the
//! library and the test dependencies are linked once.

mod adaptation;
mod assess;
mod bad_input;
mod bleach_reference;
mod bleach_solve;
mod browser;
mod cli;
mod compare;
mod completeness;
mod consistency;
mod files;
mod fuzz;
mod hazard_oracle;
mod hostile_text;
mod limits_reference;
mod properties;
mod reference;
mod retina_reference;
mod rng;
mod room;
mod sweep;
mod terminal;
mod uncertainty;
mod verdicts;
mod write_safety;
