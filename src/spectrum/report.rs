//! The assessment of one spectrum: everything `retidose spectrum` shows, as plain data.
//!
//! Renderers (terminal table, JSON) read this structure and nothing else.

use crate::base::quantity::LuminousEfficacy;
use crate::spectrum::photometry::{PhotometricResult, luminous_efficacy, photopic, scotopic, sp_ratio};
use crate::spectrum::scale::ScaleTarget;
use crate::spectrum::{Basis, Coverage, Measure, PhotonTotal, Radiometric, Spectrum};
use crate::weighting::alpha_opic::{AlphaOpicValue, action_spectra, alpha_opic};

/// A wavelength band and the share of the spectrum's radiant power in it.
#[derive(Debug, Clone)]
pub struct BandShare {
    /// Short name of the band.
    pub name: &'static str,
    /// The band, nm.
    pub band_nm: (f64, f64),
    /// Share of the radiant power within the spectrum's sampled range that falls in the band.
    pub share: Option<f64>,
    /// How much of the band the spectrum covers.
    pub coverage: Coverage,
}

/// The bands reported: UV (CIE: 100–400 nm), 400–500 nm (the blue region), visible
/// (380–780 nm, the CIE 018 span of V(λ) tables), IR (CIE: 780 nm–1 mm).
pub const BANDS: [(&str, (f64, f64)); 4] = [
    ("uv", (100.0, 400.0)),
    ("blue-400-500", (400.0, 500.0)),
    ("visible", (380.0, 780.0)),
    ("ir", (780.0, 1.0e6)),
];

/// Everything known about one spectrum.
#[derive(Debug, Clone)]
pub struct SpectrumReport {
    /// Name of the spectrum.
    pub label: String,
    /// Where it came from, if known.
    pub provenance: Option<String>,
    /// What it measures.
    pub measure: Measure,
    /// Basis of the input values.
    pub basis: Basis,
    /// Sampled range, nm.
    pub range_nm: (f64, f64),
    /// Number of samples.
    pub samples: usize,
    /// The measured quantity it was scaled to, if any.
    pub scaled_to: Option<ScaleTarget>,
    /// Radiant total over the sampled range.
    pub radiometric: Option<Radiometric>,
    /// Photon total over the sampled range.
    pub photon: Option<PhotonTotal>,
    /// Photopic luminous quantity.
    pub photopic: PhotometricResult,
    /// Scotopic luminous quantity.
    pub scotopic: PhotometricResult,
    /// S/P ratio.
    pub sp_ratio: Option<f64>,
    /// Luminous efficacy of radiation over the sampled range.
    pub luminous_efficacy: Option<LuminousEfficacy>,
    /// The five CIE S 026 α-opic quantities.
    pub alpha_opic: Vec<AlphaOpicValue>,
    /// Wavelength of the largest spectral value (energy basis), nm.
    pub peak_nm: f64,
    /// Shares of radiant power per band.
    pub bands: Vec<BandShare>,
    /// Cautions a reader must see next to the numbers.
    pub notes: Vec<String>,
}

/// Builds the report of `spectrum`; `scaled_to` records how it was scaled, if it was.
pub fn report(spectrum: &Spectrum, scaled_to: Option<ScaleTarget>) -> SpectrumReport {
    let energy = spectrum.to_energy();
    let bands = band_shares(&energy);
    let photopic = photopic(&energy);
    let scotopic = scotopic(&energy);
    let alpha = alpha_opic(&energy);
    let scaled_photopic = scaled_to.as_ref().is_some_and(ScaleTarget::is_photopic);
    let notes = notes(spectrum, scaled_photopic, &photopic, &scotopic, &alpha, &bands);
    SpectrumReport {
        label: spectrum.label().to_string(),
        provenance: spectrum.provenance().map(str::to_string),
        measure: spectrum.measure(),
        basis: spectrum.basis(),
        range_nm: spectrum.range_nm(),
        samples: spectrum.curve().wavelength_nm().len(),
        scaled_to,
        radiometric: spectrum.radiometric_total(),
        photon: spectrum.photon_total(),
        photopic,
        scotopic,
        sp_ratio: sp_ratio(&energy),
        luminous_efficacy: luminous_efficacy(&energy),
        alpha_opic: alpha,
        peak_nm: energy.peak_nm(),
        bands,
        notes,
    }
}

/// The share of the radiant power of `energy` (an energy-basis spectrum) in each of [`BANDS`].
fn band_shares(energy: &Spectrum) -> Vec<BandShare> {
    let total = energy.integral();
    BANDS
        .iter()
        .map(|&(name, band)| {
            let (v, coverage) = energy.band_integral(band);
            BandShare { name, band_nm: band, share: (total > 0.0).then(|| v / total), coverage }
        })
        .collect::<Vec<_>>()
}

/// The cautions of the report, in order: a relative spectrum, partial coverage of each
/// function and band, what the band shares are of, and the reconstructed melanopic function.
fn notes(
    spectrum: &Spectrum,
    scaled_photopic: bool,
    photopic: &PhotometricResult,
    scotopic: &PhotometricResult,
    alpha: &[AlphaOpicValue],
    bands: &[BandShare],
) -> Vec<String> {
    let mut notes = Vec::new();
    if spectrum.measure() == Measure::Relative {
        notes.push(
            "relative spectrum: only ratios (S/P, efficacy, ELR, DER, band shares) are meaningful; \
             give a measured value (--illuminance, --luminance, --irradiance, --photon-irradiance, --radiance) \
             for absolute quantities"
                .to_string(),
        );
    }
    let (lo, hi) = spectrum.range_nm();
    coverage_notes(&mut notes, (lo, hi), scaled_photopic, photopic, scotopic, alpha, bands);
    notes.push(format!(
        "band shares are of the power within the sampled {lo}–{hi} nm; power the lamp emits outside that range is not included"
    ));
    if let Some(note) = reconstruction_note() {
        notes.push(note);
    }
    notes
}

/// One note for each function or band (except IR) the spectrum, sampled over `range`, does
/// not fully cover.
fn coverage_notes(
    notes: &mut Vec<String>,
    (lo, hi): (f64, f64),
    scaled_photopic: bool,
    photopic: &PhotometricResult,
    scotopic: &PhotometricResult,
    alpha: &[AlphaOpicValue],
    bands: &[BandShare],
) {
    for (what, cov) in [("photopic V(λ)", photopic.coverage), ("scotopic V′(λ)", scotopic.coverage)] {
        if what.starts_with("photopic") && scaled_photopic {
            continue;
        }
        if cov.matters() {
            notes.push(format!(
                "{what} needs {}–{} nm; the spectrum covers {lo}–{hi} nm, so {:.3} % of the function's weight is missing \
                 and the value is a lower bound",
                cov.needed_nm.0,
                cov.needed_nm.1,
                100.0 * cov.uncovered_weight_share
            ));
        }
    }
    for a in alpha {
        if a.coverage.matters() {
            notes.push(format!(
                "{} needs {}–{} nm; the spectrum covers {lo}–{hi} nm ({:.3} % of the weight missing): a lower bound",
                a.name,
                a.coverage.needed_nm.0,
                a.coverage.needed_nm.1,
                100.0 * a.coverage.uncovered_weight_share
            ));
        }
    }
    for b in bands {
        if b.coverage.matters() && b.name != "ir" {
            notes.push(format!(
                "the {} band ({}–{} nm) is only partly covered by the spectrum ({lo}–{hi} nm): its share counts the covered part only",
                band_words(b.name),
                b.band_nm.0,
                b.band_nm.1
            ));
        }
    }
}

/// A band's key (`uv`, `blue-400-500`) as a reader names the band in a note.
fn band_words(key: &str) -> &str {
    match key {
        "uv" => "UV",
        "blue-400-500" => "blue",
        "ir" => "IR",
        other => other,
    }
}

/// The caution on a reconstructed α-opic function (the melanopic one), if there is one.
fn reconstruction_note() -> Option<String> {
    let mel = action_spectra().iter().find(|f| f.reconstructed)?;
    let dev = 100.0 * (mel.d65_elr.value / mel.published_d65_elr.value - 1.0);
    Some(format!(
        "the {} function is a reconstruction, not the normative CIE S 026 table (its D65 ELR differs from the \
         published {:.4} mW/lm, itself from memory, by {dev:+.2} %; the lens model it uses is from memory)",
        mel.name,
        mel.published_d65_elr.value * 1e3
    ))
}
