//! The whole `assess` report as one tidy long CSV table: one row per figure, with the columns
//! `scenario,section,item,quantity,value,unit,status`, every scenario of the run in the same
//! table. Numbers are written as the shortest text that reads back to the same value (a data
//! file keeps its precision; the reports round to 4 significant digits). The per-position table
//! of a room is the separate `--format positions`.

use std::io::{self, Write};

use retidose::assess::Assessment;
use retidose::base::quantity::{SiValue, as_td_f64};
use retidose::limits::{TMax, Verdict};
use uom::si::frequency::hertz;
use uom::si::illuminance::lux;
use uom::si::length::meter;
use uom::si::time::second;

use super::escape::csv_cell;
use super::{summary_lines, verdict_word};

/// A value: a number, a text, or nothing.
enum Val<'a> {
    N(f64),
    T(&'a str),
}

/// Writes rows for one scenario.
struct Long<'w> {
    w: &'w mut dyn Write,
    scenario: String,
}

fn field(s: &str) -> String {
    let s = csv_cell(s);
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.into_owned()
    }
}

impl Long<'_> {
    fn row(
        &mut self,
        section: &str,
        item: &str,
        quantity: &str,
        value: Val<'_>,
        unit: &str,
        status: &str,
    ) -> io::Result<()> {
        let v = match value {
            Val::N(x) if x.is_nan() => String::new(),
            Val::N(x) if x.is_infinite() => "inf".to_string(),
            Val::N(x) if x == 0.0 || (1e-4..1e15).contains(&x.abs()) => format!("{x}"),
            Val::N(x) => format!("{x:e}"),
            Val::T(t) => field(t),
        };
        let (item, quantity, unit, status) = (field(item), field(quantity), field(unit), field(status));
        writeln!(self.w, "{},{section},{item},{quantity},{v},{unit},{status}", self.scenario)
    }

    fn num(&mut self, section: &str, item: &str, quantity: &str, v: f64, unit: &str) -> io::Result<()> {
        self.row(section, item, quantity, Val::N(v), unit, "")
    }
}

/// Writes the long table of every assessment.
///
/// # Errors
/// The writer's errors.
pub fn write(all: &[Assessment], w: &mut dyn Write) -> io::Result<()> {
    w.write_all(b"scenario,section,item,quantity,value,unit,status\n")?;
    for a in all {
        let mut l = Long { w: &mut *w, scenario: field(&a.name) };
        summary(&mut l, a)?;
        retina(&mut l, a)?;
        steps(&mut l, a)?;
        bleach(&mut l, a)?;
        limits(&mut l, a)?;
        guidance(&mut l, a)?;
        room(&mut l, a)?;
        for n in &a.not_assessed {
            l.row("not-assessed", n, "reason", Val::T(n), "", "not assessed")?;
        }
    }
    Ok(())
}

fn summary(l: &mut Long<'_>, a: &Assessment) -> io::Result<()> {
    let outcome = if a.limit_exceeded {
        "limit exceeded"
    } else if a.flag_raised {
        "guidance flag raised"
    } else {
        "no limit exceeded and no flag raised"
    };
    l.row("summary", "outcome", "outcome", Val::T(outcome), "", "")?;
    for (k, s) in summary_lines(a).iter().enumerate() {
        l.row("summary", &format!("sentence {}", k + 1), "text", Val::T(s), "", "")?;
    }
    Ok(())
}

fn retina(l: &mut Long<'_>, a: &Assessment) -> io::Result<()> {
    let Some(r) = &a.retina else { return Ok(()) };
    for s in &r.sources {
        let item = s.label.as_str();
        if let Some(v) = s.illuminance.value {
            l.num("retina", item, "corneal illuminance", v.si_value(), "lx")?;
        }
        if let Some(ret) = &s.retinal {
            l.num(
                "retina",
                item,
                "photopic retinal illuminance",
                as_td_f64(ret.trolands.photopic),
                "phot td",
            )?;
            l.num(
                "retina",
                item,
                "scotopic retinal illuminance",
                as_td_f64(ret.trolands.scotopic),
                "scot td",
            )?;
            for c in &ret.catch {
                l.num(
                    "retina",
                    item,
                    &format!("{} isomerisation rate", c.receptor),
                    c.rate.get::<hertz>(),
                    "R*/receptor/s",
                )?;
            }
        }
        for x in &s.human_alpha_opic {
            if let Some(e) = x.edi {
                l.num("retina", item, &format!("{} EDI", x.name), e.si_value(), "lx")?;
            }
        }
        for x in &s.species_opic {
            l.num(
                "retina",
                item,
                &format!("{} photon irradiance", x.channel),
                x.photon_irradiance.si(),
                "photons/m²/s",
            )?;
            l.num(
                "retina",
                item,
                &format!("{} equivalent daylight", x.channel),
                x.equivalent_daylight.get::<lux>(),
                "lx",
            )?;
        }
    }
    Ok(())
}

fn steps(l: &mut Long<'_>, a: &Assessment) -> io::Result<()> {
    for s in &a.steps {
        let item = s.name.as_str();
        l.num("step", item, "duration", s.duration.get::<second>(), "s")?;
        l.num("step", item, "room illuminance", s.room_illuminance.get::<lux>(), "lx")?;
        l.num("step", item, "illuminance at the eye", s.illuminance.get::<lux>(), "lx")?;
        if let Some(e) = s.melanopic_edi {
            l.num("step", item, "melanopic EDI", e.get::<lux>(), "lx")?;
        }
        if let Some(r) = s.rod_rate {
            l.num("step", item, "rod isomerisation rate", r.get::<hertz>(), "R*/rod/s")?;
        }
    }
    Ok(())
}

fn bleach(l: &mut Long<'_>, a: &Assessment) -> io::Result<()> {
    let Some(b) = &a.bleach else { return Ok(()) };
    let unit = b.level_unit.symbol();
    for p in &b.phases {
        l.num("bleach", &p.name, "level", p.level, unit)?;
        l.num("bleach", &p.name, "steady-state bleached fraction", p.steady_state, "1")?;
        l.num("bleach", &p.name, "bleached fraction at its end", p.end, "1")?;
    }
    l.num("bleach", "schedule", "peak bleached fraction", b.summary.peak, "1")?;
    l.num("bleach", "schedule", "time of the peak", b.summary.peak_s, "s")?;
    for r in &b.recoveries {
        let item = format!("after {}", r.after_step);
        for (q, v) in [
            ("time to 90 % regenerated", r.to_90_s),
            ("time to 95 %", r.to_95_s),
            ("time to 99 %", r.to_99_s),
        ] {
            match v {
                Some(t) => l.num("bleach", &item, q, t, "s")?,
                None => l.row("bleach", &item, q, Val::T("not reached"), "", "")?,
            }
        }
    }
    for t in &b.thresholds {
        if let Some(s) = t.to_within_0_1_log_min {
            l.num("bleach", &t.basis, "time to rod threshold within 0.1 log unit", s * 60.0, "s")?;
        }
    }
    Ok(())
}

fn limits(l: &mut Long<'_>, a: &Assessment) -> io::Result<()> {
    for set in &a.limits {
        let item = format!("{} / {}", set.source, set.set_id);
        for h in &set.hazards {
            let status = verdict_word(h);
            let q = |x: &str| format!("{}: {x}", h.name);
            if let Some(r) = h.ratio {
                l.row("limits", &item, &q("ratio to the limit"), Val::N(r), "1", status)?;
            }
            if let Some(r) = h.lower_bound_ratio {
                l.row("limits", &item, &q("lower bound of the ratio"), Val::N(r), "1", status)?;
            }
            if let (Some((e, u)), Some((lim, lu))) = (h.exposure, h.limit) {
                l.row("limits", &item, &q("exposure"), Val::N(e), u, status)?;
                l.row("limits", &item, &q("limit"), Val::N(lim), lu, status)?;
            }
            match &h.t_max {
                Some(TMax::Seconds(s)) => {
                    l.row("limits", &item, &q("maximum exposure time"), Val::N(*s), "s", status)?
                }
                Some(TMax::NotReached(u)) => {
                    l.row("limits", &item, &q("maximum exposure time"), Val::N(*u), "s", "not reached up to")?
                }
                Some(TMax::BelowRange(s)) => {
                    l.row("limits", &item, &q("maximum exposure time"), Val::N(*s), "s", "exceeded before")?
                }
                None => {}
            }
            if let Verdict::NotAssessed(r) | Verdict::NotApplicable(r) = &h.verdict {
                l.row("limits", &item, &q("reason"), Val::T(r), "", status)?;
            }
        }
        if let Some(Ok(c)) = &set.classification {
            let group = c.overall.map_or("not assessed", |g| g.name());
            l.row("limits", &item, "risk group", Val::T(group), "", "")?;
            l.num("limits", &item, "classification distance", c.distance.get::<meter>(), "m")?;
            if let Some(e) = c.e_thr_lx {
                l.num("limits", &item, "E_thr", e, "lx")?;
            }
            if let Some(d) = c.threshold_distance {
                l.num("limits", &item, "threshold distance", d.get::<meter>(), "m")?;
            }
            for g in &c.hazards {
                l.row(
                    "limits",
                    &item,
                    &format!("risk group of {}", g.name),
                    Val::T(g.group.map_or("not assessed", |x| x.name())),
                    "",
                    if g.lower_bound { "lower bound" } else { "" },
                )?;
            }
        }
    }
    Ok(())
}

fn guidance(l: &mut Long<'_>, a: &Assessment) -> io::Result<()> {
    for g in &a.guidance {
        let status = if g.flag.raised { "flag raised" } else { "within" };
        let item = format!("{} / {} / {}", g.flag.set, g.flag.name, super::basis_text(g));
        l.row("guidance", &item, "value compared", Val::N(g.flag.value_lx), "lx", status)?;
    }
    for b in &a.brightest {
        let bound = match &b.source {
            retidose::housing::guidance::BoundSource::Target => match b.bound {
                retidose::housing::guidance::StepQuantity::RodRate(_) => "rod_target".to_string(),
                _ => "edi_target".to_string(),
            },
            retidose::housing::guidance::BoundSource::Guidance { set, rule, .. } => format!("{set} / {rule}"),
        };
        let item = format!("step '{}' / {bound}", b.step);
        let status = if b.meets { "meets" } else { "above" };
        l.row("brightest", &item, "factor on the step's light", Val::N(b.factor), "1", status)?;
        l.row("brightest", &item, "brightest room illuminance", Val::N(b.brightest_room.si()), "lx", status)?;
    }
    Ok(())
}

fn room(l: &mut Long<'_>, a: &Assessment) -> io::Result<()> {
    let Some(room) = &a.room else { return Ok(()) };
    for lum in &room.luminaires {
        l.num("room", &lum.id, "intensity as written", lum.intensity.si(), "cd")?;
        l.num("room", &lum.id, "fitted scale", lum.scale, "1")?;
    }
    if let Some(f) = &room.fit {
        l.num("room", "calibration", "residual RMS", f.rms_residual_lx, "lx")?;
        l.num("room", "calibration", "largest residual", f.max_residual_lx, "lx")?;
        l.num("room", "calibration", "readings", f.readings as f64, "1")?;
    }
    for r in &room.racks {
        let s = &r.summary;
        let item = format!("rack {}", r.id);
        for (q, v, u) in [
            ("positions", s.positions as f64, "1"),
            ("positions below the range", s.below as f64, "1"),
            ("positions above the range", s.above as f64, "1"),
            ("positions with dark-phase light", s.dark_flagged as f64, "1"),
            ("lowest room illuminance at cage level", s.room_lux.min, "lx"),
            ("highest room illuminance at cage level", s.room_lux.max, "lx"),
            ("highest rod rate, light phase", s.rod_rate.max, "R*/rod/s"),
            ("highest steady bleach, light phase", s.light_bleach.max, "1"),
            ("longest time to 90 % after lights-off", s.recovery_90_s.max, "s"),
            ("highest leak at cage level", s.leak_lux.max, "lx"),
            ("highest rod rate from the leak", s.leak_rod_rate.max, "R*/rod/s"),
            ("highest melanopsin photon irradiance from the leak", s.leak_melanopsin.max, "photons/m²/s"),
            ("highest melanopsin-weighted photons per night", s.melanopic_dose.max, "photons/m²"),
        ] {
            l.num("room", &item, q, v, u)?;
        }
        for (ev, e) in room.events.iter().zip(&s.events) {
            let q = |x: &str| format!("{}: {x}", ev.name);
            l.num("room", &item, &q("highest room illuminance at cage level"), e.room_lux.max, "lx")?;
            l.num("room", &item, &q("highest rod rate"), e.rod_rate.max, "R*/rod/s")?;
            l.num(
                "room",
                &item,
                &q("highest melanopsin photon irradiance"),
                e.melanopsin.max,
                "photons/m²/s",
            )?;
            l.num("room", &item, &q("highest bleached fraction at its end"), e.peak_bleach.max, "1")?;
            l.num(
                "room",
                &item,
                &q("longest recovery to a tenth of its extra bleach"),
                e.recovery_s.max,
                "s",
            )?;
        }
        if let Some(lv) = &r.lever {
            l.num("room", &item, "lever: factor for every luminaire", lv.factor, "1")?;
            l.num("room", &item, "lever: positions in range now", lv.in_range_now as f64, "1")?;
            l.num("room", &item, "lever: positions in range at the factor", lv.in_range_after as f64, "1")?;
            for (f, n) in &lv.dimming {
                l.num(
                    "room",
                    &item,
                    &format!("positions in range with every luminaire at {}", super::num(*f)),
                    *n as f64,
                    "1",
                )?;
            }
        }
    }
    Ok(())
}
