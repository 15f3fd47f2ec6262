//! The wording of a room survey, shared by every format: per rack, in sentences, what falls
//! outside the guidance range and by how much, what the dark phase receives and from what, the
//! evidence beside it, and the one dimming lever.

use retidose::housing::guidance::Evidence;
use retidose::housing::lever::Lever;
use retidose::housing::pass::RackBounds;
use retidose::housing::summary::Extremes;
use retidose::housing::survey::{NotCompared, RackResult, RoomResult};
use retidose::scenario::Pigmentation;

use uom::si::luminous_intensity::candela;
use uom::si::time::second;

use super::num;

/// A duration as a person writes it ("45 s", "12 min", "1 h 30 min"), or "never" when the
/// dark-phase light holds more bleach than the target.
pub fn duration(s: f64) -> String {
    if s.is_finite() {
        super::duration(s)
    } else {
        "never (the dark-phase light holds more bleach)".to_string()
    }
}

/// "shelf 2, column 3" of a global position index.
pub fn place(room: &RoomResult, index: usize) -> String {
    let plan = &room.rows.0;
    let r = plan.rack_of(index);
    let (s, c) = plan.room.racks[r].shelf_column(index - plan.racks[r].offset);
    format!("shelf {s}, column {c}")
}

/// What lives on a rack, in words.
pub fn animals(r: &RackResult) -> String {
    let p = match r.animals.pigmentation {
        Pigmentation::Albino => "albino",
        Pigmentation::Pigmented => "pigmented",
    };
    let plural = match r.animals.species {
        retidose::retina::eye::Species::Mouse => "mice",
        retidose::retina::eye::Species::Rat => "rats",
        retidose::retina::eye::Species::Human => "people",
    };
    format!("{p} {plural}")
}

fn range_text(b: &RackBounds) -> String {
    match (b.lower, b.upper) {
        (Some(l), Some(u)) => format!("{}–{} lx", num(l.lx), num(u.lx)),
        (Some(l), None) => format!("at least {} lx", num(l.lx)),
        (None, Some(u)) => format!("at most {} lx", num(u.lx)),
        (None, None) => String::new(),
    }
}

/// The light-phase sentence of a rack.
fn light_sentence(room: &RoomResult, r: &RackResult) -> String {
    let s = &r.summary;
    let b = &r.bounds;
    let spread = format!("{}–{} lx", num(s.room_lux.min), num(s.room_lux.max));
    if b.lower.is_none() && b.upper.is_none() {
        return format!(
            "Light phase: room light at cage level {spread}; no numeric guidance range applies to {} (the NRC Guide's \
             range is for animals susceptible to phototoxic retinopathy, such as albinos).",
            animals(r)
        );
    }
    let mut parts = Vec::new();
    if let (Some(l), true) = (b.lower, s.below > 0) {
        parts.push(format!(
            "{} below {} lx (the dimmest {} lx at {}, {}× too dim)",
            s.below,
            num(l.lx),
            num(s.room_lux.min),
            place(room, s.room_lux.min_at),
            num(l.lx / s.room_lux.min)
        ));
    }
    if let (Some(u), true) = (b.upper, s.above > 0) {
        parts.push(format!(
            "{} above {} lx (the brightest {} lx at {}, {}× too bright)",
            s.above,
            num(u.lx),
            num(s.room_lux.max),
            place(room, s.room_lux.max_at),
            num(s.room_lux.max / u.lx)
        ));
    }
    if parts.is_empty() {
        format!(
            "Light phase: all {} positions within the guidance range {} ({spread}).",
            s.positions,
            range_text(b)
        )
    } else {
        format!(
            "Light phase: of {} positions, {}; the guidance range is {}.",
            s.positions,
            parts.join("; "),
            range_text(b)
        )
    }
}

fn max_at(room: &RoomResult, e: &Extremes) -> String {
    if e.max_at == usize::MAX || e.min == e.max {
        String::new()
    } else {
        format!(" (at {})", place(room, e.max_at))
    }
}

/// The dark-phase sentences of a rack: the leak and each event.
fn dark_sentences(room: &RoomResult, r: &RackResult) -> Vec<String> {
    let s = &r.summary;
    let mut out = Vec::new();
    if s.leak_lux.max > 0.0 {
        out.push(format!(
            "Dark phase, leak: up to {} lx at cage level{}, rod up to {} R*/rod/s, melanopsin up to {} photons/cm²/s; \
             it holds up to {} % of the rod pigment bleached.",
            num(s.leak_lux.max),
            max_at(room, &s.leak_lux),
            num(s.leak_rod_rate.max),
            num(s.leak_melanopsin.max * 1e-4),
            num(100.0 * s.leak_bleach.max)
        ));
    } else {
        out.push("Dark phase, leak: none given.".to_string());
    }
    for (ev, e) in room.events.iter().zip(&s.events) {
        let (name, start, dur) = (&ev.name, ev.start.get::<second>(), ev.duration.get::<second>());
        out.push(format!(
            "Dark phase, event '{name}' ({} from {} after lights-off, every night): up to {} lx at cage level{}, rod up \
             to {} R*/rod/s, melanopsin up to {} photons/cm²/s; it bleaches up to {} % of the rod pigment, and its \
             extra bleach falls to a tenth within {}.",
            duration(dur),
            duration(start),
            num(e.room_lux.max),
            max_at(room, &e.room_lux),
            num(e.rod_rate.max),
            num(e.melanopsin.max * 1e-4),
            num(100.0 * e.peak_bleach.max),
            duration(e.recovery_s.max)
        ));
    }
    for (ev, sl) in room.events.iter().zip(&r.safelights) {
        let Some(sl) = sl else { continue };
        let t = num(sl.target.get::<uom::si::frequency::hertz>());
        out.push(if sl.leak_exceeds {
            format!(
                "Brightest '{}' within {t} R*/rod/s: none; the leak alone gives up to {} R*/rod/s.",
                ev.name,
                num(s.leak_rod_rate.max)
            )
        } else {
            format!(
                "Brightest '{}' within {t} R*/rod/s at every cage (with the leak): up to {} lx at cage level, {}× the \
                 light as written.",
                ev.name,
                num(sl.brightest_lux),
                num(sl.scale)
            )
        });
    }
    out.push(format!(
        "Melanopsin-weighted photon exposure per night: up to {} photons/cm² (leak and events).",
        num(s.melanopic_dose.max * 1e-4)
    ));
    out
}

/// The evidence beside a rack, in words, compared where it is like for like.
fn evidence_sentences(room: &RoomResult, r: &RackResult, evidence: &[Evidence]) -> Vec<String> {
    r.evidence
        .iter()
        .map(|c| {
            let e = &evidence[c.evidence];
            let whom = match (e.species, &e.light) {
                (Some(sp), Some(l)) => format!("{}s, {l}", sp.name()),
                (Some(sp), None) => format!("{}s", sp.name()),
                (None, _) => "species not stated".to_string(),
            };
            let cmp = match (c.not_compared, &c.ratios) {
                (Some(NotCompared::OtherSpecies), _) => {
                    format!("not compared: found in another species than the {}", animals(r))
                }
                (Some(NotCompared::NoFigure), _) | (None, None) => {
                    "not compared: it gives no illuminance".to_string()
                }
                (None, Some((leak, events))) => {
                    let mut t =
                        format!("the leak here is {}× its {} lx", num(*leak), num(e.lux.unwrap_or(0.0)));
                    for (ev, x) in room.events.iter().zip(events) {
                        t.push_str(&format!(
                            "; '{}' is {}× in lux but lasts {}, while the evidence is continuous light",
                            ev.name,
                            num(*x),
                            duration(ev.duration.get::<second>())
                        ));
                    }
                    t
                }
            };
            format!("Evidence, not a limit — {} ({whom}; {}): {}; {cmp}.", e.name, e.source, e.value)
        })
        .collect()
}

/// The lever sentence.
fn lever_sentence(room: &RoomResult, l: &Lever) -> String {
    let n = l.in_range_after + l.stay_below + l.stay_above;
    let change = if (l.factor - 1.0).abs() < 1e-9 {
        "leaving the luminaires as they are".to_string()
    } else if l.factor < 1.0 {
        format!("dimming every luminaire to {} % of its output", num(100.0 * l.factor))
    } else {
        format!("raising every luminaire to {} % of its output", num(100.0 * l.factor))
    };
    let mut t = format!(
        "Lever: {change} brings {} of {n} positions into range (now {}).",
        l.in_range_after, l.in_range_now
    );
    let at: Vec<String> = [8, 14, 20, 26]
        .iter()
        .filter_map(|&k| l.dimming.get(k))
        .map(|(f, c)| format!("{c} at ×{}", num(*f)))
        .collect();
    let dim = if at.is_empty() {
        String::new()
    } else {
        format!(
            " In range with every luminaire scaled: {} (the CSV has {} factors from ×0.1 to ×10).",
            at.join(", "),
            l.dimming.len()
        )
    };
    if l.stay_below + l.stay_above > 0 {
        t.push_str(&format!(
            " {} stay out even then (the rack's own spread is {}× against the range's {}×):",
            l.stay_below + l.stay_above,
            num(l.spread),
            num(l.range_ratio)
        ));
        for w in &l.worst {
            let fix = if !w.needs.is_finite() {
                "gets no light: move it or light it".to_string()
            } else if w.needs > 1.0 {
                format!("needs {}× more light: a higher shelf or less shading above it", num(w.needs))
            } else {
                format!("needs a shade passing at most {} %, or a lower shelf", num(100.0 * w.needs))
            };
            t.push_str(&format!(" {} ({} lx) {fix};", place(room, w.index), num(w.lux)));
        }
        t.pop();
        t.push('.');
    }
    t.push_str(&dim);
    t
}

/// Every sentence about a rack, in reading order.
pub fn rack_sentences(room: &RoomResult, r: &RackResult, evidence: &[Evidence]) -> Vec<String> {
    let mut out = vec![light_sentence(room, r)];
    if let Some(l) = &r.lever {
        out.push(lever_sentence(room, l));
    }
    out.extend(dark_sentences(room, r));
    out.extend(evidence_sentences(room, r, evidence));
    out
}

/// The room's heading sentence: racks, luminaires, readings and the fit.
pub fn room_sentences(room: &RoomResult) -> Vec<String> {
    let (light, dark, days) =
        (room.cycle.light.get::<second>(), room.cycle.dark.get::<second>(), room.cycle.days);
    let mut out = vec![format!(
        "{} positions on {} rack(s); {} luminaire(s); {} light : {} dark, {days} day(s), {} event(s) each night.",
        room.positions,
        room.racks.len(),
        room.luminaires.len(),
        duration(light),
        duration(dark),
        room.events.len()
    )];
    if let Some(r) = &room.readings {
        out.push(format!("Readings: {} positions from {}.", r.positions, r.file));
    }
    if let Some(f) = &room.fit {
        let scales: Vec<String> = room
            .luminaires
            .iter()
            .map(|l| format!("{} {} cd × {}", l.id, num(l.intensity.get::<candela>()), num(l.scale)))
            .collect();
        out.push(format!(
            "Calibration ({}, {} readings): {}; residual RMS {} lx (before {} lx), largest {} lx. Positions without a \
             reading are predicted by the calibrated model.",
            match f.mode {
                retidose::housing::room::Calibration::None => "none: the model as written",
                retidose::housing::room::Calibration::OneScale => "one scale for all luminaires",
                retidose::housing::room::Calibration::PerLuminaire => "one scale per luminaire",
            },
            f.readings,
            scales.join(", "),
            num(f.rms_residual_lx),
            num(f.rms_before_lx),
            num(f.max_residual_lx)
        ));
    }
    out
}

/// One cell of a rack map.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Cell {
    /// Room lux at cage level used.
    pub lux: f64,
    /// Its flags.
    pub flags: retidose::housing::pass::Flags,
    /// Where the lux comes from.
    pub basis: retidose::housing::pass::Basis,
}

/// Racks wider or taller than this get no map (the CSV has every position).
pub const MAP_COLUMNS: u32 = 12;
/// See [`MAP_COLUMNS`].
pub const MAP_SHELVES: u32 = 40;

/// The cells of every rack small enough to map (`None` for the others), each from one pass
/// over that rack's own positions (a map holds at most [`MAP_COLUMNS`] × [`MAP_SHELVES`]
/// cells); index `(shelf − 1) × columns + column − 1`.
pub fn rack_cells(room: &RoomResult) -> Vec<Option<Vec<Option<Cell>>>> {
    let plan = &room.rows.0;
    room.racks
        .iter()
        .zip(&plan.racks)
        .map(|(r, rp)| {
            (r.columns <= MAP_COLUMNS && r.shelves <= MAP_SHELVES).then(|| {
                let mut cells = vec![None; (r.shelves * r.columns) as usize];
                let mut rows = Vec::with_capacity(rp.len);
                plan.rows_into(rp.offset..rp.offset + rp.len, &mut rows);
                for p in &rows {
                    cells[((p.shelf - 1) * r.columns + p.column - 1) as usize] =
                        Some(Cell { lux: p.room_lux, flags: p.flags, basis: p.basis });
                }
                cells
            })
        })
        .collect()
}
