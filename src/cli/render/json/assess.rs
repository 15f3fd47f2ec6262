//! The JSON document of `retidose assess` (schema `retidose.assessment/1`).

use retidose::assess::{Assessment, GuidanceBasis};
use retidose::base::quantity::{SiValue, as_td_f64};
use retidose::limits::Verdict;
use serde_json::{Value, json};

use crate::cli::render::verdict_word;

/// The JSON document (schema `retidose.assessment/1`; an array when several scenarios ran).
pub fn document(all: &[Assessment]) -> String {
    let docs: Vec<Value> = all.iter().map(one_json).collect();
    let v = if docs.len() == 1 { docs.into_iter().next().unwrap_or(Value::Null) } else { Value::Array(docs) };
    let mut s = serde_json::to_string_pretty(&v).unwrap_or_default();
    s.push('\n');
    s
}

/// One assessment as JSON.
fn one_json(a: &Assessment) -> Value {
    json!({
        "schema": "retidose.assessment/1",
        "name": a.name,
        "title": a.title,
        "cautions": a.cautions,
        "provenance": a.provenance.iter().map(|p| json!({"role": p.role, "document": p.document, "edition": p.edition, "status": p.status})).collect::<Vec<_>>(),
        "sources": a.retina.as_ref().map(|r| r.sources.iter().map(|s| json!({
            "label": s.label,
            "corneal_illuminance_lx": s.illuminance.value.map(|v| v.si_value()),
            "photopic_td": s.retinal.as_ref().map(|x| as_td_f64(x.trolands.photopic)),
            "scotopic_td": s.retinal.as_ref().map(|x| as_td_f64(x.trolands.scotopic)),
            "catch": s.retinal.as_ref().map(|x| x.catch.iter().map(|c| json!({"receptor": c.receptor, "r_star_per_receptor_per_s": c.rate.si()})).collect::<Vec<_>>()),
        })).collect::<Vec<_>>()),
        "species_alpha_opic": a.retina.as_ref().map(|r| r.species_opic.iter().map(|c| json!({
            "channel": c.channel, "photon_irradiance_per_m2_s": c.photon_irradiance.si(), "equivalent_daylight_lx": c.equivalent_daylight.si(),
        })).collect::<Vec<_>>()),
        "pupils": a.pupils.as_ref().map(|p| json!({
            "light_mm": p.light.diameter.get::<uom::si::length::millimeter>(), "light_basis": p.light.basis,
            "dark_mm": p.dark.as_ref().map(|d| d.diameter.get::<uom::si::length::millimeter>()),
            "dark_basis": p.dark.as_ref().map(|d| d.basis.clone()), "dark_rule": p.dark_basis,
        })),
        "steps": a.steps.iter().map(|s| json!({
            "name": s.name, "phase": s.phase, "on": s.on, "duration_s": s.duration.si(),
            "pupil_mm": s.pupil.diameter.get::<uom::si::length::millimeter>(),
            "room_illuminance_lx": s.room_illuminance.get::<uom::si::illuminance::lux>(),
            "illuminance_at_eye_lx": s.illuminance.get::<uom::si::illuminance::lux>(),
            "melanopic_edi_lx": s.melanopic_edi.map(|e| e.get::<uom::si::illuminance::lux>()),
            "rod_r_star_per_rod_per_s": s.rod_rate.map(|r| r.get::<uom::si::frequency::hertz>()),
            "pigment_level": s.level,
        })).collect::<Vec<_>>(),
        "bleach": a.bleach.as_ref().map(|b| json!({
            "receptor": b.receptor, "model": b.model.name(),
            "phases": b.phases.iter().map(|p| json!({"name": p.name, "level": p.level, "end_bleached": p.end, "steady_state_bleached": p.steady_state})).collect::<Vec<_>>(),
            "peak_bleached": b.summary.peak, "mean_bleached": b.summary.mean, "end_bleached": b.summary.end,
            "recovery_90_s": b.recoveries.last().and_then(|r| r.to_90_s), "recovery_99_s": b.recoveries.last().and_then(|r| r.to_99_s),
            "lights_off": b.lights_off, "recoveries": b.recoveries.iter().map(super::bleach::recovery).collect::<Vec<_>>(),
            "threshold_within_0_1_log_min": b.thresholds.first().and_then(|t| t.to_within_0_1_log_min),
        })),
        "limits": a.limits.iter().map(|(src, l)| json!({
            "source": src, "set": l.set_id, "duration_s": l.duration.si(),
            "hazards": l.hazards.iter().map(|h| json!({
                "id": h.id, "name": h.name, "clause": h.clause, "ratio": h.ratio,
                "verdict": verdict_word(&h.verdict), "reason": match &h.verdict { Verdict::NotAssessed(r) | Verdict::NotApplicable(r) => Some(r.clone()), _ => None },
                "from_memory": h.from_memory,
            })).collect::<Vec<_>>(),
            "risk_group": match &l.classification { Some(Ok(c)) => json!({"overall": c.overall.map(|g| g.name()), "distance_m": c.distance.si(), "e_thr_lx": c.e_thr_lx, "lower_bound": !c.not_assessed.is_empty()}), Some(Err(e)) => json!({"not_assessed": e}), None => Value::Null },
        })).collect::<Vec<_>>(),
        "guidance": a.guidance.iter().map(|g| { let f = &g.flag; json!({"set": f.set, "rule": f.rule, "phase": g.phase.name(), "step": match &g.basis { GuidanceBasis::Step(s) => Some(s), GuidanceBasis::Survey { .. } => None }, "survey_positions_outside": match g.basis { GuidanceBasis::Survey { outside, .. } => Some(outside), GuidanceBasis::Step(_) => None }, "value_lx": f.value_lx, "raised": f.raised, "message": f.message}) }).collect::<Vec<_>>(),
        "evidence": a.evidence.iter().map(|e| json!({"name": e.name, "value": e.value, "source": e.source})).collect::<Vec<_>>(),
        "survey": a.survey.as_ref().map(|s| json!({
            "shelves": s.shelves, "columns": s.columns, "mode": s.mode, "max_over_min": finite(s.max_over_min), "flagged": s.flagged,
            "positions": s.positions.iter().map(|p| json!({
                "shelf": p.position.shelf, "column": p.position.column,
                "room_lux": p.room_lux, "cage_lux": p.cage_lux, "dark_room_lux": p.dark_room_lux,
                "rod_r_star_per_s": p.rod_rate, "opic_photon_irradiance": {"rod": p.opic[0], "m_cone": p.opic[1], "uv_cone": p.opic[2], "melanopsin": p.opic[3]},
                "dark_rod_r_star_per_s": p.dark_rod_rate, "light_bleach": p.light_bleach, "dark_bleach": p.dark_bleach,
                "recovery_90_s": p.recovery_90_s, "flags": p.flags,
            })).collect::<Vec<_>>(),
        })),
        "not_assessed": a.not_assessed,
        "limit_exceeded": a.limit_exceeded,
        "flag_raised": a.flag_raised,
    })
}

/// A finite number, or null.
fn finite(x: f64) -> Value {
    if x.is_finite() { json!(x) } else { Value::Null }
}
