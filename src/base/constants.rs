//! Physical and photometric constants, each with its source.

/// Planck constant h in J·s. Exact by the SI definition of 2019 (BIPM SI Brochure, 9th ed.).
pub const PLANCK_J_S: f64 = 6.626_070_15e-34;

/// Speed of light in vacuum c in m/s. Exact by the SI definition (BIPM SI Brochure, 9th ed.).
pub const SPEED_OF_LIGHT_M_PER_S: f64 = 299_792_458.0;

/// Boltzmann constant k in J/K. Exact by the SI definition of 2019 (BIPM SI Brochure, 9th ed.).
pub const BOLTZMANN_J_PER_K: f64 = 1.380_649e-23;

/// h·c in J·m, the product of two exact constants.
pub const PLANCK_TIMES_C_J_M: f64 = PLANCK_J_S * SPEED_OF_LIGHT_M_PER_S;

/// Second radiation constant c₂ = h·c/k in m·K, from the exact SI constants
/// (CODATA 2018/2022: 1.438 776 877… × 10⁻² m·K).
pub const SECOND_RADIATION_CONSTANT_M_K: f64 = PLANCK_J_S * SPEED_OF_LIGHT_M_PER_S / BOLTZMANN_J_PER_K;

/// Maximum luminous efficacy for photopic vision K_m in lm/W: 683 lm/W at 540 THz
/// (SI definition of the candela) evaluated at the V(λ) peak, 683.002 lm/W
/// (CIE e-ILV 17-21-092, "luminous efficacy", notes 2–3; CIE 018:2019).
pub const K_M_PHOTOPIC_LM_PER_W: f64 = 683.002;

/// Maximum luminous efficacy for scotopic vision K′_m in lm/W, 1700.06 lm/W
/// (CIE 018:2019; = 683 / V′(555.016 nm)).
pub const K_M_SCOTOPIC_LM_PER_W: f64 = 1700.06;
