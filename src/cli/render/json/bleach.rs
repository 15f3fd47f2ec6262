//! The JSON documents of `retidose bleach`: a bleaching run (schema `retidose.bleach/1`), its
//! time course (`retidose.time-course/1`) and a rod flash response (`retidose.rod-response/1`).

use retidose::pigment::bleach::{BleachReport, FlashResponse, Recovery};
use retidose::pigment::kinetics::Pigment;
use serde_json::{Value, json};

use super::pretty;
use crate::cli::render::CAUTION;

/// The JSON document of a bleaching run (schema `retidose.bleach/1`).
pub fn document(r: &BleachReport) -> String {
    let doc = json!({
        "schema": "retidose.bleach/1",
        "receptor": r.receptor,
        "model": r.model.name(),
        "level_unit": r.level_unit.symbol(),
        "parameters": { "tau0_s": r.constants.tau0_s, "v_per_min": r.constants.v_per_s * 60.0, "k_m": r.constants.k_m },
        "from_memory": r.from_memory,
        "total_s": r.total_s,
        "steps": r.steps,
        "phases": r.phases.iter().map(|p| json!({
            "name": p.name, "steps": p.steps, "level": p.level, "end_bleached": p.end,
            "max_end_bleached": p.max_end, "steady_state_bleached": p.steady_state,
        })).collect::<Vec<_>>(),
        "end_bleached": r.summary.end,
        "peak_bleached": r.summary.peak,
        "peak_time_s": r.summary.peak_s,
        "mean_bleached": r.summary.mean,
        "lights_off": r.lights_off,
        "recoveries_s": r.recoveries.iter().map(recovery).collect::<Vec<_>>(),
        "recovery_s": r.recoveries.last().map(recovery),
        "saturation": r.saturation,
        "thresholds": r.thresholds.iter().map(|t| json!({
            "basis": t.basis,
            "within_0_1_log_min": t.to_within_0_1_log_min,
            "curve_min_log": t.curve,
        })).collect::<Vec<_>>(),
        "notes": r.notes,
        "caution": CAUTION,
    });
    pretty(&doc)
}

/// One recovery as JSON (seconds; null when not reached).
pub fn recovery(r: &Recovery) -> Value {
    json!({
        "after_step": r.after_step,
        "from_s": r.from_s,
        "bleached_at_start": r.bleached_at_start,
        "to_90_percent": r.to_90_s,
        "to_95_percent": r.to_95_s,
        "to_99_percent": r.to_99_s,
        "past_end": r.past_end,
    })
}

/// The sampled time course as JSON.
pub fn time_course(r: &BleachReport) -> String {
    pretty(
        &json!({ "schema": "retidose.time-course/1", "receptor": r.receptor, "model": r.model.name(), "time_s_bleached": r.time_course }),
    )
}

/// A rod flash response as JSON.
pub fn flash(p: &Pigment, r: &FlashResponse) -> String {
    pretty(&json!({
        "schema": "retidose.rod-response/1",
        "receptor": p.id,
        "flash_r_star_per_rod": r.phi,
        "amplification_per_s2": r.amplification,
        "effective_delay_s": r.delay_s,
        "t_half_s": r.t_half_s,
        "t_95_s": r.t_95_s,
        "saturating": r.saturating,
        "curve_s_fraction": r.curve,
        "basis": r.basis,
        "caution": CAUTION,
    }))
}
