//! The JSON document of `retidose limits check` (schema `retidose.limits/1`).

use retidose::base::quantity::SiValue;
use retidose::limits::report::{LIMITS_CAUTION, LimitsAssessment};
use retidose::limits::{TMax, Verdict};
use serde_json::{Value, json};

use super::{coverage_json, pretty};

/// The JSON document of a limits check (schema `retidose.limits/1`).
pub fn check(r: &LimitsAssessment) -> String {
    let classification = match &r.classification {
        None => Value::Null,
        Some(Err(e)) => json!({ "assessed": false, "reason": e }),
        Some(Ok(c)) => json!({
            "assessed": true,
            "distance_m": c.distance.si(),
            "distance_basis": c.distance_basis,
            "illuminance_lx": c.illuminance_lx,
            "hazards": c.hazards.iter().map(|g| json!({
                "id": g.id,
                "name": g.name,
                "group": g.group.map(|x| x.name()),
                "reason": g.reason,
                "not_applicable": g.not_applicable,
                "lower_bound": g.lower_bound,
                "ratios": g.ratios,
                "time_bases_s": g.time_bases_s,
                "time_bases": provenance_json(&g.time_bases),
                "fields_of_view_rad": g.fields_of_view_rad,
                "field_of_view_provenance": provenance_json(&g.field_of_view_provenance),
                "from_memory": g.from_memory,
                "stricter_choices": g.stricter_choices,
            })).collect::<Vec<_>>(),
            "overall": c.overall.map(|x| x.name()),
            "not_assessed": c.not_assessed,
            "blue_light_efficacy_w_per_lm": c.blue_efficacy_w_per_lm,
            "e_thr_lx": c.e_thr_lx,
            "threshold_distance_m": c.threshold_distance.map(|d| d.si()),
            "notes": c.notes,
        }),
    };
    let doc = json!({
        "schema": "retidose.limits/1",
        "caution": LIMITS_CAUTION,
        "set": { "id": r.set_id, "document": r.document, "edition": r.edition, "errata": r.errata },
        "source": r.source,
        "duration_s": r.duration.si(),
        "range_nm": [r.range_nm.0, r.range_nm.1],
        "hazards": r.hazards.iter().map(|h| json!({
            "id": h.id,
            "name": h.name,
            "clause": h.clause,
            "band_nm": [h.band_nm.0, h.band_nm.1],
            "weighted": h.weighted.map(|q| json!({ "value": q, "unit": h.quantity_unit })),
            "averaged": h.averaged.map(|q| json!({ "value": q, "unit": h.quantity_unit })),
            "field_of_view_rad": h.field_of_view_rad,
            "field_of_view_provenance": provenance_json(&h.field_of_view_provenance),
            "c_alpha": h.c_alpha,
            "c_alpha_provenance": provenance_json(&h.c_alpha_provenance),
            "exposure": h.exposure.map(|(x, u)| json!({ "value": x, "unit": u })),
            "limit": h.limit.map(|(x, u)| json!({ "value": x, "unit": u })),
            "ratio": h.ratio,
            "lower_bound_ratio": h.lower_bound_ratio,
            "partial_band": h.partial,
            "near_limit_on_coarse_spectrum": h.near_limit_on_coarse_spectrum,
            "t_max": t_max_json(&h.t_max),
            "verdict": verdict_json(&h.verdict),
            "coverage": h.coverage.as_ref().map(coverage_json),
            "from_memory": h.from_memory,
            "stricter_choices": h.stricter_choices,
            "limit_source": h.source,
        })).collect::<Vec<_>>(),
        "risk_group": classification,
        "notes": r.notes,
    });
    pretty(&doc)
}

/// A value's `{status, source, stricter_choice}` (or null, or a list of them).
fn provenance_json<T: serde::Serialize>(p: &T) -> Value {
    serde_json::to_value(p).unwrap_or(Value::Null)
}

/// The maximum exposure time: seconds, not reached, or below the range.
fn t_max_json(t: &Option<TMax>) -> Value {
    match t {
        None => Value::Null,
        Some(TMax::Seconds(s)) => json!({ "kind": "seconds", "seconds": s }),
        Some(TMax::NotReached(up)) => {
            json!({ "kind": "not-reached", "up_to_s": if up.is_finite() { json!(up) } else { Value::Null } })
        }
        Some(TMax::BelowRange(s)) => json!({ "kind": "below-range", "seconds": s }),
    }
}

/// A verdict, with the reason when not assessed or not applicable.
fn verdict_json(v: &Verdict) -> Value {
    match v {
        Verdict::Within => json!({ "kind": "within-limit" }),
        Verdict::Exceeds => json!({ "kind": "exceeds-limit" }),
        Verdict::NotAssessed(r) => json!({ "kind": "not-assessed", "reason": r }),
        Verdict::NotApplicable(r) => json!({ "kind": "not-applicable", "reason": r }),
    }
}
