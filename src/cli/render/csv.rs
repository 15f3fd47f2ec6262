//! CSV: the retinal spectral irradiance (`retidose retina --retinal-spectrum`), the sampled
//! time course (`retidose bleach --time-course`) and the `retidose assess` table.

use std::fmt::Write;

use retidose::assess::Assessment;
use retidose::limits::{TMax, Verdict};
use retidose::pigment::bleach::BleachReport;
use retidose::retina::report::RetinaReport;

use super::verdict_word;

/// The retinal spectral irradiance of every source with a known radiance, as CSV.
pub fn retinal_spectrum(r: &RetinaReport) -> String {
    let mut o = String::from(
        "# retinal spectral irradiance written by retidose retina\n\
         source,wavelength_nm,retinal_irradiance_w_per_m2_nm,retinal_photons_per_um2_s_nm\n",
    );
    for s in &r.sources {
        let Some(ret) = &s.retinal else { continue };
        let e = &ret.spectral_irradiance;
        let q = e.to_photon();
        for ((w, v), p) in e.curve().wavelength_nm().iter().zip(e.curve().values()).zip(q.curve().values()) {
            let _ = writeln!(o, "\"{}\",{w},{v:e},{:e}", s.label.replace('"', "'"), p * 1e-12);
        }
    }
    o
}

/// The sampled time course as CSV.
pub fn time_course(r: &BleachReport) -> String {
    let mut o = format!(
        "# retidose bleach time course: {} ({} model)\ntime_s,bleached_fraction\n",
        r.receptor,
        r.model.name()
    );
    for (t, b) in &r.time_course {
        let _ = writeln!(o, "{t},{b}");
    }
    o
}

/// CSV: one row per cage position when there is a survey, otherwise one row per hazard.
pub fn assessment(all: &[Assessment]) -> String {
    let mut o = String::new();
    let survey = all.iter().any(|a| a.survey.is_some());
    if survey {
        survey_rows(&mut o, all);
    } else {
        hazard_rows(&mut o, all);
    }
    o
}

/// One row per cage position of every survey.
fn survey_rows(o: &mut String, all: &[Assessment]) {
    o.push_str("scenario,shelf,column,room_lux,cage_lux,dark_room_lux,rod_r_star_per_s,melanopsin_photons_per_m2_s,light_bleach,dark_bleach,recovery_90_s,flags\n");
    for a in all {
        for p in a.survey.iter().flat_map(|s| &s.positions) {
            let _ = writeln!(
                o,
                "{},{},{},{},{},{},{},{},{},{},{},{}",
                csv_field(&a.name),
                p.position.shelf,
                p.position.column,
                p.room_lux,
                p.cage_lux,
                p.dark_room_lux,
                p.rod_rate,
                p.opic[3],
                p.light_bleach,
                p.dark_bleach,
                p.recovery_90_s.map_or(String::new(), |x| x.to_string()),
                csv_field(&p.flags.join(" "))
            );
        }
    }
}

/// One row per hazard of every limits check.
fn hazard_rows(o: &mut String, all: &[Assessment]) {
    o.push_str("scenario,source,set,hazard,clause,ratio,t_max_s,verdict,reason\n");
    for a in all {
        for l in &a.limits {
            let src = &l.source;
            for h in &l.hazards {
                let reason = match &h.verdict {
                    Verdict::NotAssessed(r) | Verdict::NotApplicable(r) => r.clone(),
                    _ => String::new(),
                };
                let tm = match h.t_max {
                    Some(TMax::Seconds(s)) => s.to_string(),
                    _ => String::new(),
                };
                let _ = writeln!(
                    o,
                    "{},{},{},{},{},{},{},{},{}",
                    csv_field(&a.name),
                    csv_field(src),
                    l.set_id,
                    h.id,
                    csv_field(&h.clause),
                    h.ratio.map_or(String::new(), |r| r.to_string()),
                    tm,
                    verdict_word(h),
                    csv_field(&reason)
                );
            }
        }
    }
}

/// A CSV field, quoted when it holds a comma, a quote or a newline.
fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n']) { format!("\"{}\"", s.replace('"', "\"\"")) } else { s.to_string() }
}
