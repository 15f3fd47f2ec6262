//! CSV: the retinal spectral irradiance (`retidose retina --retinal-spectrum`), the sampled
//! time course (`retidose bleach --time-course`) and the `retidose assess` table.

use std::fmt::Write;

use retidose::assess::Assessment;
use retidose::housing::pass::PositionRow;
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
    h.push_str(",melanopic_photons_per_m2_per_night,flags\n");
    h
}

/// Formats the numbers of a chunk of rows: ryu's shortest round-trip text, with the last text
/// of each column kept, so a value repeated down a column (a uniform leak or event) is copied,
/// not formatted again.
struct Numbers {
    ryu: ryu::Buffer,
    last: Vec<(u64, [u8; 32], u8)>,
}

impl Numbers {
    fn new() -> Numbers {
        Numbers { ryu: ryu::Buffer::new(), last: Vec::new() }
    }

    /// Appends `,` and the number in column `col` to `buf`: empty for a missing value (NaN),
    /// `inf` for a time never reached.
    fn put(&mut self, buf: &mut Vec<u8>, col: usize, v: f64) {
        buf.push(b',');
        if v.is_nan() {
            return;
        }
        if v.is_infinite() {
            buf.extend_from_slice(b"inf");
            return;
        }
        if self.last.len() <= col {
            self.last.resize(col + 1, (f64::NAN.to_bits(), [0; 32], 0));
        }
        let (bits, text, len) = &mut self.last[col];
        if *bits != v.to_bits() {
            let t = self.ryu.format_finite(v).as_bytes();
            *bits = v.to_bits();
            *len = t.len() as u8;
            text[..t.len()].copy_from_slice(t);
        }
        buf.extend_from_slice(&text[..*len as usize]);
    }
}

/// What every row of one room shares.
struct RowContext {
    scenario: String,
    racks: Vec<String>,
    events: usize,
    columns: usize,
}

/// Appends one position's row to `buf`.
fn row(buf: &mut Vec<u8>, num: &mut Numbers, cx: &RowContext, p: &PositionRow) {
    buf.extend_from_slice(cx.scenario.as_bytes());
    buf.push(b',');
    buf.extend_from_slice(cx.racks[p.rack].as_bytes());
    for v in [p.shelf, p.column] {
        buf.push(b',');
        buf.extend_from_slice(itoa::Buffer::new().format(v).as_bytes());
    }
    buf.push(b',');
    buf.extend_from_slice(basis_word(p.basis).as_bytes());
    let ratio = p.reading_lux / p.model_lux;
    let mut col = 0;
    let mut put = |buf: &mut Vec<u8>, v: f64| {
        num.put(buf, col, v);
        col += 1;
    };
    for v in
        [p.model_lux, p.calibrated_lux, p.reading_lux, ratio, p.room_lux, p.cage_lux, p.rod_rate, p.opic[3]]
    {
        put(buf, v);
    }
    for v in [p.light_bleach, p.recovery_90_s, p.leak_lux, p.leak_rod_rate, p.leak_melanopsin, p.leak_bleach]
    {
        put(buf, v);
    }
    for e in &p.events[..cx.events] {
        for v in [e.room_lux, e.rod_rate, e.melanopsin, e.peak_bleach, e.recovery_s] {
            put(buf, v);
        }
    }
    for _ in cx.events..cx.columns {
        buf.extend_from_slice(b",,,,,");
    }
    put(buf, p.melanopic_dose);
    buf.push(b',');
    for (k, f) in p.flags.names().enumerate() {
        if k > 0 {
            buf.push(b' ');
        }
        buf.extend_from_slice(f.as_bytes());
    }
    buf.push(b'\n');
}

/// Rows formatted per chunk on every core, then written in order.
const FORMAT_CHUNK: usize = 2048;

/// One row per cage position of every room, streamed: each block of rows is computed and
/// formatted on every core, in a thread of its own, while this thread writes the block before
/// it, in position order. Two blocks are in flight at most, so memory does not grow with the
/// number of positions.
fn position_rows(all: &[Assessment], w: &mut dyn std::io::Write) -> std::io::Result<()> {
    let columns = all.iter().filter_map(|a| a.room.as_ref()).map(|r| r.events.len()).max().unwrap_or(0);
    w.write_all(position_header(columns).as_bytes())?;
    for a in all {
        let Some(room) = &a.room else { continue };
        let cx = RowContext {
            scenario: csv_field(&a.name),
            racks: room.racks.iter().map(|r| csv_field(&r.id)).collect(),
            events: room.events.len(),
            columns,
        };
        write_room(&room.rows.0, &cx, w)?;
    }
    Ok(())
}

/// Computes and formats `plan`'s rows in a helper thread; writes them here, in order.
fn write_room(
    plan: &retidose::housing::pass::Plan,
    cx: &RowContext,
    w: &mut dyn std::io::Write,
) -> std::io::Result<()> {
    use rayon::prelude::*;
    let (full, filled) = std::sync::mpsc::sync_channel::<Vec<Vec<u8>>>(1);
    let (empty, recycled) = std::sync::mpsc::channel::<Vec<Vec<u8>>>();
    std::thread::scope(|scope| {
        scope.spawn(move || {
            retidose::housing::summary::stream(plan, |rows| {
                let mut bufs = recycled.try_recv().unwrap_or_default();
                bufs.resize_with(rows.len().div_ceil(FORMAT_CHUNK), Vec::new);
                bufs.par_iter_mut().zip(rows.par_chunks(FORMAT_CHUNK)).for_each(|(buf, chunk)| {
                    buf.clear();
                    let mut num = Numbers::new();
                    for p in chunk {
                        row(buf, &mut num, cx, p);
                    }
                });
                // The writer stopped (an error): stop computing.
                full.send(bufs).map_err(|_| ())
            })
        });
        for bufs in filled {
            bufs.iter().try_for_each(|b| w.write_all(b))?;
            let _ = empty.send(bufs);
        }
        Ok(())
    })
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
