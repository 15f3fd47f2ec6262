//! IEC 62471:2006 clause 6 risk groups for continuous-wave lamps.
//!
//! A hazard's group is the first of Exempt, RG1, RG2 whose time base (from the set's data,
//! clause 6.1) the exposure at the assessment distance does not exceed; otherwise RG3. This is
//! the same as comparing with the Table 6.1 emission limits, which are the clause 4.3 limits at
//! those time bases with the fields of view of those times. The assessment distance is 200 mm,
//! or for lamps for general lighting the distance at which the lamp gives 500 lx, not less than
//! 200 mm (IEC 62471:2006 cl. 5.2).
//!
//! A hazard's time bases carry their status and source, and a group may have a field of view of
//! its own at its time base (`[[hazard.risk_groups.field_of_view]]`): the IEC 62471 Exempt
//! blue-light group is evaluated with 0.1 rad at 10⁴ s, where the exposure field of view reaches
//! 0.11 rad, the stricter of the two candidates. When the exposure check of a report and the
//! risk-group check use different durations or fields of view, the classification says which
//! each used ([`explain_exposure_check`]).
//!
//! The blue-light threshold illuminance E_thr = 1 W·m⁻² / K_B,v (K_B,v the spectrum's blue-light
//! hazard efficacy of luminous radiation, CIE e-ILV 17-26-061) and the threshold distance follow
//! IEC TR 62778:2014, which IEC 62471-7:2023 has replaced; the 62471-7 revised exposure times and
//! assessment distances are not encoded.

use uom::si::length::meter;

use super::evaluate::{Exposure, HazardResult, Verdict, assess, short};
use super::set::{GROUP_NAMES, Hazard, LimitSet, Provenance, RiskGroupBases};
use super::weighting::find_weighting;
use crate::base::error::{Error, Result};
use crate::base::quantity::{Angle, Length, SiValue, Time};
use crate::cornea::geometry::{Corneal, Geometry, subtense};
use crate::spectrum::photometry::photopic;
use crate::spectrum::{Measure, Spectrum};

/// IEC 62471 risk groups, in increasing order of hazard.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum RiskGroup {
    /// No photobiological hazard.
    Exempt,
    /// No hazard under normal behavioural limitations.
    Rg1,
    /// No hazard owing to the aversion response to bright light or thermal discomfort.
    Rg2,
    /// Hazardous even for momentary or brief exposure.
    Rg3,
}

impl RiskGroup {
    /// The name as IEC 62471 writes it.
    pub const fn name(self) -> &'static str {
        match self {
            RiskGroup::Exempt => "Exempt",
            RiskGroup::Rg1 => "RG1",
            RiskGroup::Rg2 => "RG2",
            RiskGroup::Rg3 => "RG3",
        }
    }
}

/// The group of one hazard.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct HazardGroup {
    /// Hazard id.
    pub id: String,
    /// Hazard name.
    pub name: String,
    /// The group, or `None` when not assessed or not applicable.
    pub group: Option<RiskGroup>,
    /// True when `group` is only a lower bound (the spectrum covers part of the band and the
    /// measured band alone already exceeds the lower groups' limits).
    pub lower_bound: bool,
    /// Why there is no group, or why it is a lower bound ("not assessed: …", "not applicable: …").
    pub reason: Option<String>,
    /// True when the hazard does not apply (so it does not make the overall group a lower bound).
    pub not_applicable: bool,
    /// Exposure ÷ limit at the Exempt, RG1 and RG2 time bases.
    pub ratios: [Option<f64>; 3],
    /// Time bases, s.
    pub time_bases_s: [f64; 3],
    /// Status and source of the time bases.
    pub time_bases: Provenance,
    /// Averaging field of view used at each time base evaluated, rad.
    pub fields_of_view_rad: [Option<f64>; 3],
    /// Status and source of each of those fields of view.
    pub field_of_view_provenance: [Option<Provenance>; 3],
    /// Values the evaluation rests on that are from memory (time bases, limits, fields of view).
    pub from_memory: Vec<String>,
    /// Values the evaluation used that are the stricter of candidates, with why.
    pub stricter_choices: Vec<String>,
}

/// A source that can be placed at any distance: a spectral intensity (a small source, with an
/// optional size), or a spectral radiance with its size.
#[derive(Debug, Clone, PartialEq)]
pub struct MovableSource {
    /// Spectral radiant intensity or spectral radiance.
    pub spectrum: Spectrum,
    /// Source diameter (required for a radiance).
    pub size: Option<Length>,
    /// Filters that are part of the lamp system (applied at every distance).
    pub filters: Vec<crate::cornea::filter::Filter>,
}

impl MovableSource {
    fn geometry_at(&self, d: Length) -> Result<Geometry> {
        match (self.spectrum.measure(), self.size) {
            (Measure::Intensity, size) => {
                Ok(Geometry::Intensity { distance: d, incidence: Angle::from_si(0.0), size })
            }
            (Measure::Radiance, Some(s)) => Ok(Geometry::Extended { subtense: subtense(s, d)? }),
            (Measure::Radiance, None) => {
                Err(Error::input("a radiance source needs its size to be placed at a distance"))
            }
            (m, _) => Err(Error::input(format!(
                "risk groups need a source that can be moved: a spectral intensity or a radiance with its size, not a spectral {}",
                m.name()
            ))),
        }
    }

    /// What arrives at distance `d`, through the lamp system's filters.
    pub fn at(&self, d: Length) -> Result<Corneal> {
        let placed = crate::cornea::PlacedSource {
            spectrum: self.spectrum.clone(),
            geometry: self.geometry_at(d)?,
            size: self.size,
            distance: Some(d),
            assumption: None,
        };
        crate::cornea::at_cornea(&placed, &self.filters)
    }

    fn illuminance_at(&self, d: Length) -> Result<f64> {
        Ok(photopic(&self.at(d)?.irradiance).raw)
    }
}

/// A risk-group classification.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Classification {
    /// Assessment distance.
    pub distance: Length,
    /// Why that distance.
    pub distance_basis: String,
    /// Illuminance at the assessment distance, lx.
    pub illuminance_lx: f64,
    /// Per hazard.
    pub hazards: Vec<HazardGroup>,
    /// The highest group of the assessed hazards.
    pub overall: Option<RiskGroup>,
    /// Hazards that could not be grouped (so `overall` is a lower bound when not empty).
    pub not_assessed: Vec<String>,
    /// Blue-light hazard efficacy of luminous radiation K_B,v, W/lm.
    pub blue_efficacy_w_per_lm: Option<f64>,
    /// Threshold illuminance E_thr = 1 W/m² / K_B,v, lx.
    pub e_thr_lx: Option<f64>,
    /// Distance beyond which the blue-light group is at most RG1, when it is worse at the
    /// assessment distance.
    pub threshold_distance: Option<Length>,
    /// Notes.
    pub notes: Vec<String>,
}

/// K_B,v = ∫E_λ B(λ) dλ / E_v (W/lm) of a spectrum, over B's 300–700 nm (None if B is not fully
/// covered or there is no light).
pub fn blue_light_efficacy(spectrum: &Spectrum) -> Option<f64> {
    let b = find_weighting("B")?;
    let e = spectrum.to_energy();
    let (x, cov) = e.weighted(&b.curve);
    let v = photopic(&e).raw;
    (cov.is_complete() && v > 0.0).then(|| x / v)
}

fn groups_at(set: &LimitSet, source: &MovableSource, d: Length) -> Result<Vec<HazardGroup>> {
    let c = source.at(d)?;
    Ok(set.hazards.iter().filter_map(|h| h.risk_groups.as_ref().map(|rg| hazard_group(h, rg, &c))).collect())
}

/// The group of one hazard: evaluated at the Exempt, RG1 and RG2 time bases in turn until it is
/// within one; a check that cannot be made after the lower groups were exceeded on the measured
/// band alone leaves a lower bound.
fn hazard_group(h: &Hazard, rg: &RiskGroupBases, c: &Corneal) -> HazardGroup {
    const GROUPS: [RiskGroup; 3] = [RiskGroup::Exempt, RiskGroup::Rg1, RiskGroup::Rg2];
    let mut g = HazardGroup {
        id: h.id.clone(),
        name: h.name.clone(),
        group: None,
        lower_bound: false,
        reason: None,
        not_applicable: false,
        ratios: [None; 3],
        time_bases_s: rg.time_bases_s,
        time_bases: rg.provenance.clone(),
        fields_of_view_rad: [None; 3],
        field_of_view_provenance: [None, None, None],
        from_memory: Vec::new(),
        stricter_choices: Vec::new(),
    };
    if rg.provenance.is_from_memory() {
        g.from_memory.push(format!("risk-group time bases ({})", rg.provenance.source));
    }
    for (i, &t) in rg.time_bases_s.iter().enumerate() {
        let e = Exposure::of(c, Time::from_si(t), false);
        let r = assess(h, &e, rg.field_of_view[i].as_ref());
        g.fields_of_view_rad[i] = r.field_of_view_rad;
        g.field_of_view_provenance[i].clone_from(&r.field_of_view_provenance);
        merge_per_group(&mut g.from_memory, &r.from_memory, i);
        merge_per_group(&mut g.stricter_choices, &r.stricter_choices, i);
        match &r.verdict {
            Verdict::Within => {
                g.ratios[i] = r.ratio;
                g.group = Some(GROUPS[i]);
                return g;
            }
            // Exceeds at this time base (a lower bound ≥ 1 included): a higher group.
            Verdict::Exceeds => g.ratios[i] = r.ratio,
            other => {
                g.not_applicable = matches!(other, Verdict::NotApplicable(_));
                g.reason = Some(other.text());
                // Already past the lower groups on the measured band alone: at least GROUPS[i].
                if i > 0 {
                    g.group = Some(GROUPS[i]);
                    g.lower_bound = true;
                }
                return g;
            }
        }
    }
    g.group = Some(RiskGroup::Rg3);
    g
}

/// Adds the values `new` of the evaluation at time base `i` to `list`, once each; values of the
/// hazard as a whole are not tied to a time base.
fn merge_per_group(list: &mut Vec<String>, new: &[String], i: usize) {
    for x in new {
        let whole = x.starts_with("hazard definition") || x.starts_with("weighting");
        let x = if whole { x.clone() } else { format!("{}: {x}", GROUP_NAMES[i]) };
        if !list.contains(&x) {
            list.push(x);
        }
    }
}

fn worst_blue(groups: &[HazardGroup]) -> Option<RiskGroup> {
    groups.iter().filter(|g| g.id.starts_with("blue-light")).filter_map(|g| g.group).max()
}

/// The assessment distance and why: 200 mm, or for general lighting the distance giving
/// 500 lx, not below 200 mm (IEC 62471 cl. 5.2).
fn assessment_distance(source: &MovableSource, general_lighting: bool) -> Result<(Length, String)> {
    let d200 = Length::new::<meter>(0.2);
    if !general_lighting {
        return Ok((d200, "200 mm (IEC 62471 cl. 5.2)".to_string()));
    }
    // Find the distance with 500 lx (illuminance falls with distance), not below 200 mm.
    if source.illuminance_at(d200)? <= 500.0 {
        return Ok((d200, "general lighting: 500 lx is not reached beyond 200 mm, so 200 mm".to_string()));
    }
    let (mut lo, mut hi) = (0.2f64, 0.4f64);
    while source.illuminance_at(Length::new::<meter>(hi))? > 500.0 && hi < 1e6 {
        lo = hi;
        hi *= 2.0;
    }
    for _ in 0..80 {
        let mid = 0.5 * (lo + hi);
        if source.illuminance_at(Length::new::<meter>(mid))? > 500.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Ok((
        Length::new::<meter>(hi),
        "general lighting: the distance giving 500 lx (IEC 62471 cl. 5.2)".to_string(),
    ))
}

/// The distance beyond `distance` where the blue-light group falls to RG1 or below, or
/// `None` (with a note) if it does not within 100 km.
fn blue_threshold_distance(
    set: &LimitSet,
    source: &MovableSource,
    distance: Length,
    notes: &mut Vec<String>,
) -> Result<Option<Length>> {
    let ok = |d: f64| -> Result<bool> {
        Ok(worst_blue(&groups_at(set, source, Length::new::<meter>(d))?).is_none_or(|g| g <= RiskGroup::Rg1))
    };
    let (mut lo, mut hi) = (distance.get::<meter>(), distance.get::<meter>() * 2.0);
    while !ok(hi)? && hi < 1e5 {
        lo = hi;
        hi *= 2.0;
    }
    if !ok(hi)? {
        notes.push("the blue-light group stays above RG1 out to 100 km".to_string());
        return Ok(None);
    }
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if ok(mid)? {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    Ok(Some(Length::new::<meter>(hi)))
}

/// Classifies `source` against the risk-group data of `set`.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] if the set has no risk-group data or the source cannot be
/// placed at a distance.
pub fn classify(set: &LimitSet, source: &MovableSource, general_lighting: bool) -> Result<Classification> {
    if set.hazards.iter().all(|h| h.risk_groups.is_none()) {
        return Err(Error::input(format!(
            "the set '{}' has no risk-group time bases; risk groups are defined by IEC 62471 (set iec62471-2006)",
            set.id
        )));
    }
    let (distance, basis) = assessment_distance(source, general_lighting)?;
    let hazards = groups_at(set, source, distance)?;
    let overall = hazards.iter().filter_map(|g| g.group).max();
    let not_assessed: Vec<String> = hazards
        .iter()
        .filter(|g| (g.group.is_none() || g.lower_bound) && !g.not_applicable)
        .map(|g| format!("{} ({})", g.name, g.reason.clone().unwrap_or_default()))
        .collect();
    let c = source.at(distance)?;
    let kbv = blue_light_efficacy(&c.irradiance);
    let mut notes = vec![
        "E_thr and the threshold distance follow IEC TR 62778:2014, withdrawn and replaced by IEC 62471-7:2023; \
         the revised exposure times and assessment distances of IEC 62471-7 are not encoded"
            .to_string(),
    ];
    let threshold_distance = if worst_blue(&hazards).is_some_and(|g| g > RiskGroup::Rg1) {
        blue_threshold_distance(set, source, distance, &mut notes)?
    } else {
        None
    };
    if !not_assessed.is_empty() {
        notes.push("some hazards could not be grouped, so the overall group is a lower bound".to_string());
    }
    if !source.filters.is_empty() {
        notes.push(format!(
            "filters included as part of the lamp system: {}",
            source.filters.iter().map(|f| f.label().to_string()).collect::<Vec<_>>().join(", ")
        ));
    }
    Ok(Classification {
        illuminance_lx: photopic(&c.irradiance).raw,
        distance,
        distance_basis: basis,
        hazards,
        overall,
        not_assessed,
        blue_efficacy_w_per_lm: kbv,
        e_thr_lx: kbv.map(|k| 1.0 / k),
        threshold_distance,
        notes,
    })
}

/// " with a 100 mrad field of view (status)", " with no field-of-view averaging", or nothing
/// when neither check averages (`any` false).
fn field_text(rad: Option<f64>, p: Option<&Provenance>, any: bool) -> String {
    match (rad, p) {
        (Some(g), Some(p)) => format!(" with a {} mrad field of view ({})", short(g * 1e3), p.tag()),
        (Some(g), None) => format!(" with a {} mrad field of view", short(g * 1e3)),
        (None, _) if any => " with no field-of-view averaging".to_string(),
        (None, _) => String::new(),
    }
}

/// Adds a note to `c` for every hazard whose exposure check (the `exposure` results, for
/// `duration_s` as the source is placed) and risk-group check used a different duration or
/// field of view, saying which each used and what each found. The exposure verdict answers
/// whether this exposure is within the limit; the group classifies the lamp at the assessment
/// distance over the standard's time bases, so the two can differ (e.g. a blue-light exposure
/// of 8 h exceeds the limit while the lamp is RG1, or Exempt at 10⁴ s).
pub fn explain_exposure_check(c: &mut Classification, exposure: &[HazardResult], duration_s: f64) {
    let distance_mm = c.distance.get::<meter>() * 1e3;
    for g in &c.hazards {
        let (Some(group), false) = (g.group, g.lower_bound) else { continue };
        let Some(r) = exposure.iter().find(|r| r.id == g.id) else { continue };
        let verdict = match (&r.verdict, r.ratio) {
            (Verdict::Within | Verdict::Exceeds, Some(x)) => {
                format!("{} (ratio {})", r.verdict.text(), short(x))
            }
            _ => continue,
        };
        // The time base that decided the group (RG3: exceeded up to the RG2 time base).
        let decisive = match group {
            RiskGroup::Exempt => 0,
            RiskGroup::Rg1 => 1,
            RiskGroup::Rg2 | RiskGroup::Rg3 => 2,
        };
        let same_time = (g.time_bases_s[decisive] - duration_s).abs() <= 1e-9 * duration_s;
        let same_field = match (g.fields_of_view_rad[decisive], r.field_of_view_rad) {
            (Some(a), Some(b)) => (a - b).abs() <= 1e-12,
            (a, b) => a.is_none() && b.is_none(),
        };
        if same_time && same_field {
            continue;
        }
        let any = r.field_of_view_rad.is_some() || g.fields_of_view_rad.iter().any(Option::is_some);
        let steps: Vec<String> = (0..=decisive)
            .filter_map(|i| {
                let x = g.ratios[i]?;
                let found = if x > 1.0 { "exceeds" } else { "within" };
                Some(format!(
                    "the {} time base {} s{}: {found} (ratio {})",
                    GROUP_NAMES[i],
                    short(g.time_bases_s[i]),
                    field_text(g.fields_of_view_rad[i], g.field_of_view_provenance[i].as_ref(), any),
                    short(x)
                ))
            })
            .collect();
        c.notes.push(format!(
            "{}: the exposure check used t = {}{} as the source is placed: {verdict}; the risk-group check at \
             {} mm used {}, so {}. The exposure verdict says whether this exposure is within the limit; the \
             group classifies the lamp at the standard's time bases",
            g.name,
            crate::base::units::duration_text(duration_s),
            field_text(r.field_of_view_rad, r.field_of_view_provenance.as_ref(), any),
            short(distance_mm),
            steps.join("; "),
            group.name()
        ));
    }
}
