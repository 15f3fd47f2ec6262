//! From a placed source to the cornea: geometry (inverse-square and cosine laws, extended
//! sources) and the filters in the light path.

pub mod filter;
pub mod geometry;
