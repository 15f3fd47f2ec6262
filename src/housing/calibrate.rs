//! Fitting the luminaire model to lux readings by linear least squares.
//!
//! The model is linear in the luminaire intensities: at reading position i the model gives
//! Σⱼ sⱼ aᵢⱼ, where aᵢⱼ is the illuminance luminaire j gives there as written (its intensity,
//! the inverse-square and cosine laws and the shelf shading) and sⱼ is the scale to find.
//! One scale for all: s = Σ mᵢyᵢ / Σ mᵢ² with mᵢ = Σⱼ aᵢⱼ. One scale per luminaire: the normal
//! equations (AᵀA) s = Aᵀy, solved by Gaussian elimination with partial pivoting.

use crate::base::error::{Error, Result};
use crate::housing::room::Calibration;

/// The fit's outcome.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Fit {
    /// How the model was fitted.
    pub mode: Calibration,
    /// Scale per luminaire (the same value for all with one scale).
    pub scales: Vec<f64>,
    /// Readings used.
    pub readings: usize,
    /// Root-mean-square residual (reading − fitted model), lx.
    pub rms_residual_lx: f64,
    /// Largest absolute residual, lx.
    pub max_residual_lx: f64,
    /// Root-mean-square residual of the model as written, lx (for comparison).
    pub rms_before_lx: f64,
}

/// Fits `mode` to `rows` (each the per-luminaire illuminances aᵢⱼ at one reading) and the
/// readings `y`, lx.
///
/// # Errors
/// [`crate::ErrorKind::InvalidInput`] when the readings cannot determine the scales (all model
/// values zero, luminaires the readings cannot tell apart, a negative scale), saying what to
/// change.
pub fn fit(mode: Calibration, rows: &[Vec<f64>], y: &[f64]) -> Result<Fit> {
    let m = rows.first().map_or(0, Vec::len);
    let scales = match mode {
        Calibration::None => vec![1.0; m],
        Calibration::OneScale => vec![one_scale(rows, y)?; m],
        Calibration::PerLuminaire => per_luminaire(rows, y, m)?,
    };
    let n = y.len().max(1) as f64;
    let rms = |s: &[f64]| (residuals(rows, y, s).iter().map(|r| r * r).sum::<f64>() / n).sqrt();
    Ok(Fit {
        mode,
        readings: y.len(),
        rms_residual_lx: rms(&scales),
        max_residual_lx: residuals(rows, y, &scales).iter().map(|r| r.abs()).fold(0.0, f64::max),
        rms_before_lx: rms(&vec![1.0; m]),
        scales,
    })
}

/// Reading − model with scales `s`, per reading.
fn residuals(rows: &[Vec<f64>], y: &[f64], s: &[f64]) -> Vec<f64> {
    rows.iter().zip(y).map(|(a, yi)| yi - a.iter().zip(s).map(|(x, k)| x * k).sum::<f64>()).collect()
}

fn one_scale(rows: &[Vec<f64>], y: &[f64]) -> Result<f64> {
    let (mut my, mut mm) = (0.0, 0.0);
    for (a, yi) in rows.iter().zip(y) {
        let mi: f64 = a.iter().sum();
        my += mi * yi;
        mm += mi * mi;
    }
    if mm <= 0.0 {
        return Err(Error::input(
            "the luminaires give no light at any position with a reading, so no scale can be fitted",
        ));
    }
    Ok(my / mm)
}

fn per_luminaire(rows: &[Vec<f64>], y: &[f64], m: usize) -> Result<Vec<f64>> {
    let mut ata = vec![vec![0.0; m + 1]; m];
    for (a, yi) in rows.iter().zip(y) {
        for j in 0..m {
            for k in 0..m {
                ata[j][k] += a[j] * a[k];
            }
            ata[j][m] += a[j] * yi;
        }
    }
    let s = solve(ata).ok_or_else(|| {
        Error::input(format!(
            "the {} readings cannot tell the {m} luminaires apart (the fit is singular); take readings under each \
             luminaire or use calibrate = \"one-scale\"",
            y.len()
        ))
    })?;
    if let Some(j) = s.iter().position(|v| *v < 0.0) {
        return Err(Error::input(format!(
            "the best fit gives luminaire {} a negative scale ({:.3}), which is not physical; the readings do not \
             separate the luminaires well: use calibrate = \"one-scale\" or add readings",
            j + 1,
            s[j]
        )));
    }
    Ok(s)
}

/// Solves the augmented system `a` (m rows of m + 1) by Gaussian elimination with partial
/// pivoting; `None` when singular.
fn solve(mut a: Vec<Vec<f64>>) -> Option<Vec<f64>> {
    let m = a.len();
    let scale = a.iter().enumerate().map(|(i, r)| r[i].abs()).fold(0.0, f64::max);
    for c in 0..m {
        let p = (c..m).max_by(|&i, &j| a[i][c].abs().total_cmp(&a[j][c].abs()))?;
        if a[p][c].abs() <= 1e-12 * scale || scale == 0.0 {
            return None;
        }
        a.swap(c, p);
        let pivot = a[c].clone();
        for row in a.iter_mut().skip(c + 1) {
            let f = row[c] / pivot[c];
            for (x, p) in row.iter_mut().zip(&pivot).skip(c) {
                *x -= f * p;
            }
        }
    }
    let mut x = vec![0.0; m];
    for c in (0..m).rev() {
        let s: f64 = (c + 1..m).map(|k| a[c][k] * x[k]).sum();
        x[c] = (a[c][m] - s) / a[c][c];
    }
    Some(x)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recovers_known_scales_from_exact_readings() {
        let rows = vec![vec![100.0, 10.0], vec![50.0, 60.0], vec![5.0, 120.0], vec![30.0, 30.0]];
        let s = [0.8, 1.25];
        let y: Vec<f64> = rows.iter().map(|a| a[0] * s[0] + a[1] * s[1]).collect();
        let f = fit(Calibration::PerLuminaire, &rows, &y).unwrap();
        assert!((f.scales[0] - 0.8).abs() < 1e-12 && (f.scales[1] - 1.25).abs() < 1e-12, "{f:?}");
        assert!(f.rms_residual_lx < 1e-9);
        let one = fit(Calibration::OneScale, &rows, &y).unwrap();
        assert!(one.rms_residual_lx > 1.0 && one.rms_residual_lx < one.rms_before_lx);
    }

    #[test]
    fn luminaires_the_readings_cannot_separate_are_an_error() {
        let rows = vec![vec![10.0, 10.0], vec![20.0, 20.0]];
        let e = fit(Calibration::PerLuminaire, &rows, &[5.0, 10.0]).unwrap_err();
        assert!(e.to_string().contains("one-scale"), "{e}");
    }
}
