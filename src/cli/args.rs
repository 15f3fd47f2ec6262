//! Argument groups shared by several commands: how to scale a spectrum to a measured value
//! ([`ScaleArgs`]), where the source is ([`PlaceArgs`]) and the output format ([`Format`]).

use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use retidose::base::units;
use retidose::scenario::retina::{FilterSpec, SourceSpec};
use retidose::spectrum::scale::ScaleTarget;

/// How to scale a spectrum to one measured value (at most one of these flags).
#[derive(Debug, Args)]
#[group(multiple = false)]
pub struct ScaleArgs {
    /// Scale to a measured illuminance, e.g. "300 lx" (makes a spectral irradiance)
    #[arg(long, allow_hyphen_values = true, value_name = "ILLUMINANCE")]
    illuminance: Option<String>,
    /// Scale to a measured luminance, e.g. "100 cd/m2" (makes a spectral radiance)
    #[arg(long, allow_hyphen_values = true, value_name = "LUMINANCE")]
    luminance: Option<String>,
    /// Scale to an irradiance over the sampled range, e.g. "2 W/m2"
    #[arg(long, allow_hyphen_values = true, value_name = "IRRADIANCE")]
    irradiance: Option<String>,
    /// Scale to a photon irradiance over the sampled range, e.g. "1e18 photons/m2/s" or "5 umol/m2/s"
    #[arg(long, allow_hyphen_values = true, value_name = "PHOTON_IRRADIANCE")]
    photon_irradiance: Option<String>,
    /// Scale to a radiance over the sampled range, e.g. "10 W/m2/sr"
    #[arg(long, allow_hyphen_values = true, value_name = "RADIANCE")]
    radiance: Option<String>,
    /// Scale to a luminous intensity, e.g. "2 cd" (makes a spectral radiant intensity)
    #[arg(long, allow_hyphen_values = true, value_name = "INTENSITY")]
    luminous_intensity: Option<String>,
    /// Scale to a luminous flux, e.g. "800 lm" (makes a spectral radiant flux)
    #[arg(long, allow_hyphen_values = true, value_name = "FLUX")]
    luminous_flux: Option<String>,
    /// Scale to a radiant flux over the sampled range, e.g. "5 mW"
    #[arg(long, allow_hyphen_values = true, value_name = "POWER")]
    radiant_flux: Option<String>,
}

impl ScaleArgs {
    /// The one measured value given, as (key, text).
    fn given(&self) -> Option<(&'static str, &str)> {
        [
            ("illuminance", &self.illuminance),
            ("luminance", &self.luminance),
            ("irradiance", &self.irradiance),
            ("photon_irradiance", &self.photon_irradiance),
            ("radiance", &self.radiance),
            ("luminous_intensity", &self.luminous_intensity),
            ("luminous_flux", &self.luminous_flux),
            ("radiant_flux", &self.radiant_flux),
        ]
        .into_iter()
        .find_map(|(k, v)| v.as_deref().map(|v| (k, v)))
    }

    /// The scaling target, if a measured value was given; an error names the flag.
    pub fn target(&self) -> Result<Option<ScaleTarget>> {
        self.given()
            .map(|(k, v)| ScaleTarget::parse(k, v).with_context(|| format!("--{}", k.replace('_', "-"))))
            .transpose()
    }
}

/// Where the source is, as seen by the eye (shared by `retina` and `limits check`).
#[derive(Debug, Args)]
pub struct PlaceArgs {
    /// at-eye, extended, intensity or flux (default: from the spectrum's measure)
    #[arg(long, value_name = "GEOMETRY")]
    geometry: Option<String>,
    /// Distance from the source to the eye
    #[arg(long, allow_hyphen_values = true, value_name = "LENGTH")]
    distance: Option<String>,
    /// Source diameter
    #[arg(long, allow_hyphen_values = true, value_name = "LENGTH")]
    size: Option<String>,
    /// Full angle subtended by the source
    #[arg(long, allow_hyphen_values = true, value_name = "ANGLE")]
    subtense: Option<String>,
    /// The light fills the field of view evenly (radiance = irradiance / π)
    #[arg(long)]
    full_field: bool,
    /// isotropic or lambertian (flux geometry)
    #[arg(long, value_name = "EMISSION")]
    emission: Option<String>,
    /// Angle from a Lambertian emitter's axis
    #[arg(long, allow_hyphen_values = true, value_name = "ANGLE")]
    emission_angle: Option<String>,
    /// Angle of incidence at the eye
    #[arg(long, allow_hyphen_values = true, value_name = "ANGLE")]
    incidence: Option<String>,
    /// A filter in the path: a transmittance ("0.65") or a transmittance file; repeatable
    #[arg(long, value_name = "FILTER")]
    pub filter: Vec<String>,
    /// State that the source emits nothing outside its measured range ("measured") or outside
    /// a range ("300-1100 nm"); recorded as an assumption in the report, never the default
    #[arg(long, value_name = "RANGE")]
    emission_range: Option<String>,
}

impl PlaceArgs {
    /// The source of `retina` and `limits check`: the spectrum, this placement and the scaling.
    pub fn source_spec(&self, spectrum: &str, scale: &ScaleArgs) -> SourceSpec {
        let mut src = SourceSpec {
            spectrum: spectrum.to_string(),
            geometry: self.geometry.clone(),
            distance: self.distance.clone(),
            size: self.size.clone(),
            subtense: self.subtense.clone(),
            full_field: self.full_field,
            emission: self.emission.clone(),
            emission_angle: self.emission_angle.clone(),
            incidence: self.incidence.clone(),
            emission_range: self.emission_range.clone(),
            ..SourceSpec::default()
        };
        if let Some((key, value)) = scale.given() {
            let v = Some(value.to_string());
            match key {
                "illuminance" => src.illuminance = v,
                "luminance" => src.luminance = v,
                "irradiance" => src.irradiance = v,
                "photon_irradiance" => src.photon_irradiance = v,
                "radiance" => src.radiance = v,
                "luminous_intensity" => src.luminous_intensity = v,
                "luminous_flux" => src.luminous_flux = v,
                _ => src.radiant_flux = v,
            }
        }
        src
    }

    /// The `--filter` values: a number is a flat transmittance, anything else a file.
    pub fn filter_specs(&self) -> Vec<FilterSpec> {
        self.filter
            .iter()
            .map(|f| {
                if units::parse_number(f).is_ok() {
                    FilterSpec { transmittance: Some(f.clone()), ..FilterSpec::default() }
                } else {
                    FilterSpec { file: Some(f.clone()), ..FilterSpec::default() }
                }
            })
            .collect()
    }
}

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// A table for the terminal
    Table,
    /// JSON with stable field names (documented in the README)
    Json,
}
