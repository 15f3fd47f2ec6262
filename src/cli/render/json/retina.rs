//! The JSON document of `retidose retina` (schema `retidose.retina/1`).

use retidose::base::quantity::{SiValue, as_td_f64};
use retidose::retina::report::{RetinaReport, SourceAtEye};
use serde_json::{Value, json};
use uom::si::illuminance::lux;
use uom::si::length::millimeter;

use super::{coverage_json, photometric_json, pretty, si_json, value_json};
use crate::cli::render::CAUTION;

/// The JSON document for a retinal assessment (schema `retidose.retina/1`).
pub fn document(r: &RetinaReport) -> String {
    let sources: Vec<Value> = r.sources.iter().map(source).collect();
    let doc = json!({
        "schema": "retidose.retina/1",
        "species": r.species.name(),
        "pupil": {
            "diameter_mm": r.pupil.diameter.get::<millimeter>(),
            "area_mm2": r.pupil.area_mm2(),
            "basis": r.pupil.basis,
            "status": r.pupil.status.name(),
        },
        "collecting_area_mm2": r.collecting_area_mm2,
        "nodal_distance_mm": r.nodal_distance.get::<millimeter>(),
        "filters": r.filters,
        "sources": sources,
        "total_corneal_illuminance": photometric_json(&r.total_illuminance),
        "human_alpha_opic": r.human_alpha_opic.iter().map(|a| json!({
            "name": a.name,
            "quantity": value_json(a.quantity.as_ref().map(|q| q.si_with_unit())),
            "edi": value_json(a.edi.as_ref().map(|e| e.si_with_unit())),
            "der": a.der,
            "reconstructed": a.reconstructed,
            "coverage": coverage_json(&a.coverage),
        })).collect::<Vec<_>>(),
        "species_alpha_opic": r.species_opic.iter().map(|s| json!({
            "channel": s.channel,
            "lambda_max_nm": s.lambda_max_nm,
            "photon_irradiance_per_m2_s": s.photon_irradiance.si(),
            "equivalent_daylight_lx": s.equivalent_daylight.get::<lux>(),
            "method": "retidose: lens-filtered Govardovskii template, peak 1, photon basis, relative to CIE D65; not a CIE quantity",
            "coverage": coverage_json(&s.coverage),
        })).collect::<Vec<_>>(),
        "notes": r.notes,
        "caution": CAUTION,
    });
    pretty(&doc)
}

/// One source at the eye: at the cornea, the radiance seen and, if known, at the retina.
fn source(s: &SourceAtEye) -> Value {
    json!({
        "label": s.label,
        "corneal_irradiance": si_json(s.irradiance.si_with_unit()),
        "corneal_photon_irradiance": si_json(s.photon_irradiance.si_with_unit()),
        "corneal_illuminance": photometric_json(&s.illuminance),
        "seen_radiance": s.radiance.map(|l| si_json(l.si_with_unit())),
        "seen_luminance": s.luminance.as_ref().map(photometric_json),
        "radiance_derived": s.radiance_derived,
        "subtense_rad": s.subtense.map(|a| a.si()),
        "notes": s.notes,
        "retina": s.retinal.as_ref().map(|ret| json!({
            "irradiance": si_json(ret.irradiance.si_with_unit()),
            "photon_irradiance_per_um2_s": ret.photon_irradiance.si_with_unit().0 * 1e-12,
            "photopic_td": as_td_f64(ret.trolands.photopic),
            "scotopic_td": as_td_f64(ret.trolands.scotopic),
            "photopic_effective_td_barten": as_td_f64(ret.trolands.photopic_effective_barten),
            "photopic_effective_td_integral": as_td_f64(ret.trolands.photopic_effective_integral),
            "image_size_um": ret.image_size.map(|l| l.si() * 1e6),
            "catch": ret.catch.iter().map(|c| json!({
                "receptor": c.receptor,
                "lambda_max_nm": c.lambda_max_nm,
                "r_star_per_receptor_per_s": c.rate.si(),
                "coverage": coverage_json(&c.coverage),
                "from_memory": c.from_memory,
                "troland_routes": c.troland_routes.iter().map(|t| json!({
                    "name": t.name,
                    "factor_r_star_per_scot_td": t.factor,
                    "r_star_per_receptor_per_s": t.rate.si(),
                    "source": t.source,
                })).collect::<Vec<_>>(),
            })).collect::<Vec<_>>(),
            // The library's record, serialised as it is (SI units: R*/rod/s as 1/s).
            "rod_rate_recommended": ret.rod_rate,
        })),
    })
}
