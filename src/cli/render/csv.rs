//! CSV: the retinal spectral irradiance (`retidose retina --retinal-spectrum`), the sampled
//! time course (`retidose bleach --time-course`) and the `retidose assess` table.

use std::fmt::Write;

use retidose::assess::Assessment;
use retidose::pigment::bleach::BleachReport;
use retidose::retina::report::RetinaReport;

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

/// The per-position CSV of `assess` (`--format positions`): one row per cage position of every
/// scenario's room, streamed (the rows are written as they are computed).
///
/// # Errors
/// The writer's errors.
pub fn assessment_to(all: &[Assessment], w: &mut dyn std::io::Write) -> std::io::Result<()> {
    position_rows(all, w)
}

/// The per-position header; `events` event column groups.
fn position_header(events: usize) -> String {
    let mut h = String::from(
        "scenario,rack,shelf,column,basis,model_lux,calibrated_lux,reading_lux,reading_over_model,room_lux,cage_lux,\
         rod_r_star_per_s,melanopsin_photons_per_m2_s,light_bleach,recovery_90_s,leak_lux,leak_rod_r_star_per_s,\
         leak_melanopsin_photons_per_m2_s,leak_bleach",
    );
    for k in 1..=events {
        let _ = write!(
            h,
            ",event{k}_lux,event{k}_rod_r_star_per_s,event{k}_melanopsin_photons_per_m2_s,event{k}_peak_bleach,event{k}_recovery_s"
        );
    }
    h.push_str(
        ",melanopic_photons_per_m2_per_night,flags
",
    );
    h
}

/// A number for a data file: the shortest text that reads back to the same value; scientific
/// notation outside 10⁻⁴–10¹⁵; empty for a missing value (NaN); `inf` for a time never reached.
fn put(w: &mut dyn std::io::Write, v: f64) -> std::io::Result<()> {
    let a = v.abs();
    if v.is_nan() {
        Ok(())
    } else if v.is_infinite() {
        w.write_all(b"inf")
    } else if a == 0.0 || (1e-4..1e15).contains(&a) {
        write!(w, "{v}")
    } else {
        write!(w, "{v:e}")
    }
}

/// One row per cage position of every room, streamed.
fn position_rows(all: &[Assessment], w: &mut dyn std::io::Write) -> std::io::Result<()> {
    let events = all.iter().filter_map(|a| a.room.as_ref()).map(|r| r.events.len()).max().unwrap_or(0);
    w.write_all(position_header(events).as_bytes())?;
    for a in all {
        let Some(room) = &a.room else { continue };
        let name = csv_field(&a.name);
        let n = room.events.len();
        retidose::housing::summary::stream(&room.rows.0, |rows| {
            for p in rows {
                write!(
                    w,
                    "{name},{},{},{},{}",
                    csv_field(&room.racks[p.rack].id),
                    p.shelf,
                    p.column,
                    basis_word(p.basis)
                )?;
                let ratio = p.reading_lux / p.model_lux;
                for v in [
                    p.model_lux,
                    p.calibrated_lux,
                    p.reading_lux,
                    ratio,
                    p.room_lux,
                    p.cage_lux,
                    p.rod_rate,
                    p.opic[3],
                ] {
                    w.write_all(b",")?;
                    put(w, v)?;
                }
                for v in [
                    p.light_bleach,
                    p.recovery_90_s,
                    p.leak_lux,
                    p.leak_rod_rate,
                    p.leak_melanopsin,
                    p.leak_bleach,
                ] {
                    w.write_all(b",")?;
                    put(w, v)?;
                }
                for e in &p.events[..n] {
                    for v in [e.room_lux, e.rod_rate, e.melanopsin, e.peak_bleach, e.recovery_s] {
                        w.write_all(b",")?;
                        put(w, v)?;
                    }
                }
                for _ in n..events {
                    w.write_all(b",,,,,")?;
                }
                w.write_all(b",")?;
                put(w, p.melanopic_dose)?;
                w.write_all(b",")?;
                for (k, f) in p.flags.names().enumerate() {
                    w.write_all(if k == 0 { f.as_bytes() } else { b" " })?;
                    if k > 0 {
                        w.write_all(f.as_bytes())?;
                    }
                }
                w.write_all(
                    b"
",
                )?;
            }
            Ok::<(), std::io::Error>(())
        })?;
    }
    Ok(())
}

fn basis_word(b: retidose::housing::pass::Basis) -> &'static str {
    match b {
        retidose::housing::pass::Basis::Reading => "reading",
        retidose::housing::pass::Basis::Model => "model",
        retidose::housing::pass::Basis::Predicted => "predicted",
    }
}

/// A CSV field, quoted when it holds a comma, a quote or a newline.
/// User text is first neutralised against spreadsheet formulas ([`super::escape::csv_cell`]: a
/// leading `=`, `+`, `-`, `@`, tab or carriage return gets an apostrophe).
fn csv_field(s: &str) -> String {
    let s = super::escape::csv_cell(s);
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.into_owned()
    }
}
