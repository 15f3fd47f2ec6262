//! Photobiological exposure limits as data: weighting functions and limit sets read from
//! `limits/` (embedded in the binary; users may load their own set), an engine that evaluates
//! a source against a set, and the IEC 62471 risk-group classification.
//!
//! A limit set is one document and edition. Each hazard names its weighting function, its
//! band, whether it limits an irradiance or a radiance, and its limits as piecewise segments in
//! exposure duration t: either a dose, ∫Q dt ≤ c·t^e·C_α^k, or a rate, Q ≤ c·t^e·C_α^k, with
//! C_α the source's angular subtense clamped to the hazard's range. Radiance hazards may have an
//! averaging field of view γ(t) = c·t^e. Every value carries its status.

pub mod report;
pub mod sweep;

mod evaluate;
mod risk;
mod set;
mod weighting;

pub use evaluate::{Exposure, HazardResult, TMax, Verdict, evaluate_set};
pub use risk::{
    Classification, HazardGroup, MovableSource, RiskGroup, blue_light_efficacy, classify,
    explain_exposure_check,
};
pub use set::{
    CAlpha, Condition, FieldOfView, Form, GROUP_NAMES, GroupFieldOfView, Hazard, LimitQuantity, LimitSet,
    MAX_LIMIT_S, Provenance, RiskGroupBases, STATUS_TAGS, Segment, builtin_sets, find_set, parse_set,
};
pub use weighting::{Weighting, builtin_weightings, find_weighting, parse_weighting};
