//! The JSON document of `retidose spectrum` (schema `retidose.spectrum/1`).

use retidose::base::quantity::SiValue;
use retidose::spectrum::report::SpectrumReport;
use serde_json::json;

use super::{coverage_json, photometric_json, pretty, value_json};
use crate::cli::render::{CAUTION, basis_name};

/// The JSON document for one spectrum (schema `retidose.spectrum/1`, see the README).
pub fn document(r: &SpectrumReport) -> String {
    let doc = json!({
        "schema": "retidose.spectrum/1",
        "source": {
            "label": r.label,
            "provenance": r.provenance,
            "measure": r.measure.name(),
            "basis": basis_name(r.basis),
            "range_nm": [r.range_nm.0, r.range_nm.1],
            "samples": r.samples,
            "scaled_to": r.scaled_to.map(|t| t.describe()),
        },
        "radiant_total": value_json(r.radiometric.as_ref().map(|q| q.si_with_unit())),
        "photon_total": value_json(r.photon.as_ref().map(|q| q.si_with_unit())),
        "photopic": photometric_json(&r.photopic),
        "scotopic": photometric_json(&r.scotopic),
        "sp_ratio": r.sp_ratio,
        "luminous_efficacy_lm_per_w": r.luminous_efficacy.map(|k| k.si()),
        "peak_nm": r.peak_nm,
        "alpha_opic": r.alpha_opic.iter().map(|a| json!({
            "name": a.name,
            "quantity": value_json(a.quantity.as_ref().map(|q| q.si_with_unit())),
            "elr_mw_per_lm": a.elr.map(|e| e.si() * 1e3),
            "der": a.der,
            "edi": value_json(a.edi.as_ref().map(|e| e.si_with_unit())),
            "reconstructed": a.reconstructed,
            "coverage": coverage_json(&a.coverage),
        })).collect::<Vec<_>>(),
        "bands": r.bands.iter().map(|b| json!({
            "name": b.name,
            "band_nm": [b.band_nm.0, b.band_nm.1],
            "share": b.share,
            "coverage": coverage_json(&b.coverage),
        })).collect::<Vec<_>>(),
        "notes": r.notes,
        "caution": CAUTION,
    });
    pretty(&doc)
}
