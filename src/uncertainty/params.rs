//! The from-memory parameters of an eye and a pigment table as Monte Carlo inputs: each with
//! its default range from the data file (`range` uniform or `u_rel` normal, with its basis),
//! read and written in SI so the figures can be recomputed with a changed value.

use crate::base::quantity::{Area, Frequency, Length, SiValue, Time};
use crate::pigment::kinetics::Pigment;
use crate::retina::eye::{Distribution, Eye, Media, Param, Status};

use super::figures::{InputName, Law, Var};

/// Where an eye parameter sits.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum EyeSlot {
    Nodal,
    MediaPlateau,
    IrisDiameter,
    IrisTransmittance,
    LambdaMax(usize),
    OpticalDensity(usize),
    Aperture(usize),
    QuantumEfficiency(usize),
    Melanopsin,
}

/// A parameter's law in SI from its spread, when it is from memory and has one.
fn law_of<T>(p: &Param<T>, si: impl Fn(&T) -> f64) -> Option<(f64, Law, String)> {
    if p.status != Status::FromMemory {
        return None;
    }
    let s = p.spread.as_ref()?;
    let nominal = si(&p.value);
    let (law, words) = match &s.distribution {
        Distribution::Uniform { low, high } => (
            Law::Uniform { low: si(low), high: si(high) },
            format!("uniform {}–{}", crate::base::units::sig4(si(low)), crate::base::units::sig4(si(high))),
        ),
        Distribution::Normal { relative } => (
            Law::Normal { mean: nominal, u: nominal * relative, positive: true },
            format!("normal, u = {} %", crate::base::units::sig4(100.0 * relative)),
        ),
    };
    Some((nominal, law, format!("{words} (SI units): {}", s.basis)))
}

fn var(key: String, found: Option<(f64, Law, String)>) -> Option<Var> {
    found.map(|(nominal, law, basis)| Var { name: InputName::Parameter(key), nominal, law, basis })
}

/// Every from-memory parameter of `eye` with a range, but the pupil table (the pupil in use is
/// drawn on its own), with where it sits.
pub(super) fn eye_vars(eye: &Eye) -> Vec<(EyeSlot, Var)> {
    let len = |l: &Length| l.si();
    let area = |a: &Area| a.si();
    let num = |x: &f64| *x;
    let mut out = Vec::new();
    let mut push = |slot, key: String, found| {
        if let Some(v) = var(format!("eye: {key}"), found) {
            out.push((slot, v));
        }
    };
    push(EyeSlot::Nodal, "nodal distance".into(), law_of(&eye.nodal_distance, len));
    if let Media::CutOff { plateau, .. } = &eye.media {
        push(EyeSlot::MediaPlateau, "media plateau transmittance".into(), law_of(plateau, num));
    }
    if let Some(iris) = &eye.iris {
        push(EyeSlot::IrisDiameter, "iris diameter".into(), law_of(&iris.diameter, len));
        push(
            EyeSlot::IrisTransmittance,
            "albino iris transmittance".into(),
            law_of(&iris.albino_transmittance, num),
        );
    }
    for (i, r) in eye.receptors.iter().enumerate() {
        push(EyeSlot::LambdaMax(i), format!("{} λmax", r.name), law_of(&r.lambda_max, len));
        push(
            EyeSlot::OpticalDensity(i),
            format!("{} optical density", r.name),
            law_of(&r.peak_optical_density, num),
        );
        push(EyeSlot::Aperture(i), format!("{} aperture area", r.name), law_of(&r.aperture_area, area));
        push(
            EyeSlot::QuantumEfficiency(i),
            format!("{} quantum efficiency", r.name),
            law_of(&r.quantum_efficiency, num),
        );
    }
    if let Some(m) = &eye.melanopsin {
        push(EyeSlot::Melanopsin, "melanopsin λmax".into(), law_of(m, len));
    }
    out
}

/// `eye` with the parameter at `slot` set to `si`.
pub(super) fn set_eye(eye: &mut Eye, slot: EyeSlot, si: f64) {
    match slot {
        EyeSlot::Nodal => eye.nodal_distance.value = Length::from_si(si),
        EyeSlot::MediaPlateau => {
            if let Media::CutOff { plateau, .. } = &mut eye.media {
                plateau.value = si;
            }
        }
        EyeSlot::IrisDiameter => {
            if let Some(i) = &mut eye.iris {
                i.diameter.value = Length::from_si(si);
            }
        }
        EyeSlot::IrisTransmittance => {
            if let Some(i) = &mut eye.iris {
                i.albino_transmittance.value = si;
            }
        }
        EyeSlot::LambdaMax(i) => eye.receptors[i].lambda_max.value = Length::from_si(si),
        EyeSlot::OpticalDensity(i) => eye.receptors[i].peak_optical_density.value = si,
        EyeSlot::Aperture(i) => eye.receptors[i].aperture_area.value = Area::from_si(si),
        EyeSlot::QuantumEfficiency(i) => eye.receptors[i].quantum_efficiency.value = si,
        EyeSlot::Melanopsin => {
            if let Some(m) = &mut eye.melanopsin {
                m.value = Length::from_si(si);
            }
        }
    }
}

/// Where a pigment parameter sits.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum PigmentSlot {
    QE,
    PerCell,
    Tau0,
    V,
    Km,
}

/// Every from-memory kinetic parameter of `p` with a range.
pub(super) fn pigment_vars(p: &Pigment) -> Vec<(PigmentSlot, Var)> {
    let num = |x: &f64| *x;
    let mut out = Vec::new();
    let mut push = |slot, key: &str, found| {
        if let Some(v) = var(format!("{}: {key}", p.id), found) {
            out.push((slot, v));
        }
    };
    if let Some(q) = &p.q_e {
        push(PigmentSlot::QE, "Q_e", law_of(q, num));
    }
    if let Some(n) = &p.pigment_per_cell {
        push(PigmentSlot::PerCell, "pigment per cell", law_of(n, num));
    }
    push(PigmentSlot::Tau0, "τ0", law_of(&p.tau0, |t: &Time| t.si()));
    push(PigmentSlot::V, "v", law_of(&p.v, |f: &Frequency| f.si()));
    push(PigmentSlot::Km, "K_m", law_of(&p.k_m, num));
    out
}

/// `p` with the parameter at `slot` set to `si`.
pub(super) fn set_pigment(p: &mut Pigment, slot: PigmentSlot, si: f64) {
    match slot {
        PigmentSlot::QE => {
            if let Some(q) = &mut p.q_e {
                q.value = si;
            }
        }
        PigmentSlot::PerCell => {
            if let Some(n) = &mut p.pigment_per_cell {
                n.value = si;
            }
        }
        PigmentSlot::Tau0 => p.tau0.value = Time::from_si(si),
        PigmentSlot::V => p.v.value = Frequency::from_si(si),
        PigmentSlot::Km => p.k_m.value = si,
    }
}
