//! Sampled curves over wavelength and the one integration rule used everywhere.
//!
//! A [`Curve`] is a function of wavelength known at strictly increasing nodes (any spacing) and
//! taken as linear between them. Outside its first and last node it is **undefined**: nothing
//! here extrapolates.
//!
//! # Integration rule
//!
//! The integral of one curve, or of the product of two, is the trapezoid rule on the union of
//! the nodes that fall inside the integration interval, with each curve linearly interpolated
//! at the other's nodes, and the interval limited to where every curve involved is defined:
//!
//! ∫ f·g dλ ≈ Σᵢ ½ (λᵢ₊₁ − λᵢ) [f(λᵢ) g(λᵢ) + f(λᵢ₊₁) g(λᵢ₊₁)],  λᵢ ∈ nodes(f) ∪ nodes(g) ∪ {a, b}.
//!
//! The rule is symmetric, so `∫ f·g` and `∫ g·f` are the same number to the last bit. On a common
//! grid it is the plain trapezoid rule (the rule of `numpy.trapezoid`, which the colour-science
//! reference values use). It integrates a single piecewise-linear curve exactly.

use crate::base::error::{Error, Result};

/// A function of wavelength sampled at strictly increasing nodes (nm), linear between nodes.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Curve {
    wavelength_nm: Vec<f64>,
    value: Vec<f64>,
}

impl Curve {
    /// Builds a curve, checking that there are at least two nodes, that the wavelengths are
    /// finite, positive and strictly increasing, and that the values are finite.
    ///
    /// # Errors
    /// [`crate::ErrorKind::InvalidData`] naming the first offending node (1-based).
    pub fn new(wavelength_nm: Vec<f64>, value: Vec<f64>) -> Result<Self> {
        if wavelength_nm.len() != value.len() {
            return Err(Error::data(format!(
                "{} wavelengths but {} values",
                wavelength_nm.len(),
                value.len()
            )));
        }
        if wavelength_nm.len() < 2 {
            return Err(Error::data(format!(
                "a curve needs at least 2 samples, found {}",
                wavelength_nm.len()
            )));
        }
        for (i, (&w, &v)) in wavelength_nm.iter().zip(&value).enumerate() {
            if !w.is_finite() || w <= 0.0 {
                return Err(Error::data(format!(
                    "sample {}: wavelength {w} nm is not a positive finite number",
                    i + 1
                )));
            }
            if !v.is_finite() {
                return Err(Error::data(format!("sample {}: value {v} is not finite", i + 1)));
            }
            if i > 0 && w <= wavelength_nm[i - 1] {
                return Err(Error::data(format!(
                    "sample {}: wavelength {w} nm does not increase (previous {} nm); \
                     wavelengths must be strictly increasing",
                    i + 1,
                    wavelength_nm[i - 1]
                )));
            }
        }
        Ok(Curve { wavelength_nm, value })
    }

    /// The nodes, in nm.
    pub fn wavelength_nm(&self) -> &[f64] {
        &self.wavelength_nm
    }

    /// The values at the nodes.
    pub fn values(&self) -> &[f64] {
        &self.value
    }

    /// First and last node, in nm.
    pub fn range_nm(&self) -> (f64, f64) {
        (self.wavelength_nm[0], self.wavelength_nm[self.wavelength_nm.len() - 1])
    }

    /// Linear interpolation at `nm`; `None` outside the sampled range.
    pub fn at(&self, nm: f64) -> Option<f64> {
        let (lo, hi) = self.range_nm();
        if !(lo..=hi).contains(&nm) {
            return None;
        }
        let i = self.wavelength_nm.partition_point(|&w| w <= nm);
        if i == 0 {
            return Some(self.value[0]);
        }
        if i == self.wavelength_nm.len() {
            return Some(self.value[i - 1]);
        }
        Some(lerp(self.wavelength_nm[i - 1], self.value[i - 1], self.wavelength_nm[i], self.value[i], nm))
    }

    /// The same curve with every value multiplied by `factor`.
    #[must_use]
    pub fn scaled(&self, factor: f64) -> Curve {
        Curve {
            wavelength_nm: self.wavelength_nm.clone(),
            value: self.value.iter().map(|v| v * factor).collect(),
        }
    }

    /// The same nodes with values mapped by `f(wavelength_nm, value)`.
    #[must_use]
    pub fn map(&self, f: impl Fn(f64, f64) -> f64) -> Curve {
        Curve {
            wavelength_nm: self.wavelength_nm.clone(),
            value: self.wavelength_nm.iter().zip(&self.value).map(|(&w, &v)| f(w, v)).collect(),
        }
    }

    /// Integral over the whole sampled range (trapezoid rule, exact for the linear model).
    pub fn integral(&self) -> f64 {
        let (lo, hi) = self.range_nm();
        self.integral_over(lo, hi)
    }

    /// Integral over `[lo, hi]` limited to the sampled range; 0 when they do not overlap.
    pub fn integral_over(&self, lo: f64, hi: f64) -> f64 {
        integrate(&[self], lo, hi)
    }

    /// ∫ self·other over `[lo, hi]` limited to where both are defined (see the module's rule).
    pub fn product_integral_over(&self, other: &Curve, lo: f64, hi: f64) -> f64 {
        integrate(&[self, other], lo, hi)
    }

    /// ∫ self·other over the whole range where both are defined.
    pub fn product_integral(&self, other: &Curve) -> f64 {
        integrate(&[self, other], f64::NEG_INFINITY, f64::INFINITY)
    }

    /// The range where both curves are defined, if any.
    pub fn overlap_nm(&self, other: &Curve) -> Option<(f64, f64)> {
        let (a0, a1) = self.range_nm();
        let (b0, b1) = other.range_nm();
        let lo = a0.max(b0);
        let hi = a1.min(b1);
        (lo < hi).then_some((lo, hi))
    }

    /// `op(self, other)` on the union of both curves' nodes inside their overlap (each linearly
    /// interpolated): the product of a spectrum and a filter, or the sum of two spectra.
    /// `None` if the curves do not overlap.
    pub fn combined(&self, other: &Curve, op: impl Fn(f64, f64) -> f64) -> Option<Curve> {
        let (lo, hi) = self.overlap_nm(other)?;
        let mut w: Vec<f64> = self
            .wavelength_nm
            .iter()
            .chain(&other.wavelength_nm)
            .copied()
            .filter(|&x| x > lo && x < hi)
            .collect();
        w.push(lo);
        w.push(hi);
        w.sort_by(f64::total_cmp);
        w.dedup();
        let v = w.iter().map(|&x| op(self.at(x).unwrap_or(0.0), other.at(x).unwrap_or(0.0))).collect();
        Curve::new(w, v).ok()
    }

    /// The sum of two curves over the union of their ranges, each taken as zero outside its own
    /// range, on the union of their nodes. (Used to add the spectra of several sources, whose
    /// tabulated ranges may differ; callers report the ranges.)
    pub fn added_over_union(&self, other: &Curve) -> Curve {
        let mut w: Vec<f64> = self.wavelength_nm.iter().chain(&other.wavelength_nm).copied().collect();
        w.sort_by(f64::total_cmp);
        w.dedup();
        let v = w.iter().map(|&x| self.at(x).unwrap_or(0.0) + other.at(x).unwrap_or(0.0)).collect();
        Curve { wavelength_nm: w, value: v }
    }

    /// Values at the nodes of `grid_nm` (linear interpolation).
    ///
    /// # Errors
    /// [`crate::ErrorKind::NotCovered`] if a grid node lies outside the sampled range.
    pub fn resampled(&self, grid_nm: &[f64]) -> Result<Curve> {
        let (lo, hi) = self.range_nm();
        let value = grid_nm
            .iter()
            .map(|&w| {
                self.at(w).ok_or_else(|| {
                    Error::not_covered(format!(
                        "cannot resample at {w} nm: the curve covers {lo}–{hi} nm and is not extrapolated"
                    ))
                })
            })
            .collect::<Result<Vec<_>>>()?;
        Curve::new(grid_nm.to_vec(), value)
    }

    /// The index of the largest value (the first, on ties).
    pub fn peak_index(&self) -> usize {
        let mut best = 0;
        for (i, &v) in self.value.iter().enumerate() {
            if v > self.value[best] {
                best = i;
            }
        }
        best
    }
}

fn lerp(x0: f64, y0: f64, x1: f64, y1: f64, x: f64) -> f64 {
    if x == x0 {
        return y0;
    }
    if x == x1 {
        return y1;
    }
    y0 + (y1 - y0) * (x - x0) / (x1 - x0)
}

/// A cursor that interpolates one curve at increasing wavelengths in amortised O(1).
struct Cursor<'a> {
    curve: &'a Curve,
    i: usize,
}

impl Cursor<'_> {
    fn at(&mut self, nm: f64) -> f64 {
        let w = &self.curve.wavelength_nm;
        let v = &self.curve.value;
        while self.i + 1 < w.len() - 1 && w[self.i + 1] <= nm {
            self.i += 1;
        }
        lerp(w[self.i], v[self.i], w[self.i + 1], v[self.i + 1], nm)
    }
}

/// The module's integration rule for the product of `curves` over `[lo, hi]`.
fn integrate(curves: &[&Curve], lo: f64, hi: f64) -> f64 {
    let mut a = lo;
    let mut b = hi;
    for c in curves {
        let (c0, c1) = c.range_nm();
        a = a.max(c0);
        b = b.min(c1);
    }
    if a.partial_cmp(&b) != Some(std::cmp::Ordering::Less) {
        return 0.0;
    }
    // Next-node pointers into each curve, starting at the first node strictly above `a`.
    let mut next: Vec<usize> = curves.iter().map(|c| c.wavelength_nm.partition_point(|&w| w <= a)).collect();
    let mut cursors: Vec<Cursor<'_>> = curves.iter().map(|c| Cursor { curve: c, i: 0 }).collect();
    let mut product_at = |nm: f64| cursors.iter_mut().map(|c| c.at(nm)).product::<f64>();
    let mut x0 = a;
    let mut y0 = product_at(a);
    let mut sum = 0.0;
    loop {
        let mut x1 = b;
        for (c, &n) in curves.iter().zip(&next) {
            if let Some(&w) = c.wavelength_nm.get(n)
                && w < x1
            {
                x1 = w;
            }
        }
        for (c, n) in curves.iter().zip(next.iter_mut()) {
            while *n < c.wavelength_nm.len() && c.wavelength_nm[*n] <= x1 {
                *n += 1;
            }
        }
        let y1 = product_at(x1);
        sum += 0.5 * (x1 - x0) * (y0 + y1);
        if x1 >= b {
            break;
        }
        x0 = x1;
        y0 = y1;
    }
    sum
}

#[cfg(test)]
mod tests {
    use super::*;

    fn curve(w: &[f64], v: &[f64]) -> Curve {
        Curve::new(w.to_vec(), v.to_vec()).unwrap()
    }

    #[test]
    fn rejects_unsorted_duplicate_and_nonfinite() {
        assert!(Curve::new(vec![400.0, 400.0], vec![1.0, 1.0]).unwrap_err().message().contains("sample 2"));
        assert!(Curve::new(vec![500.0, 400.0], vec![1.0, 1.0]).is_err());
        assert!(Curve::new(vec![400.0, 500.0], vec![1.0, f64::NAN]).is_err());
        assert!(Curve::new(vec![400.0], vec![1.0]).is_err());
    }

    #[test]
    fn interpolates_linearly_and_never_extrapolates() {
        let c = curve(&[400.0, 500.0], &[0.0, 10.0]);
        assert_eq!(c.at(450.0), Some(5.0));
        assert_eq!(c.at(400.0), Some(0.0));
        assert_eq!(c.at(500.0), Some(10.0));
        assert_eq!(c.at(399.9), None);
        assert_eq!(c.at(500.1), None);
    }

    #[test]
    fn flat_spectrum_integrates_to_width_times_height() {
        // Analytic oracle: ∫ 2 dλ over 380–780 nm = 800.
        let w: Vec<f64> = (380..=780).map(f64::from).collect();
        let c = Curve::new(w.clone(), vec![2.0; w.len()]).unwrap();
        assert!((c.integral() - 800.0).abs() < 1e-9);
        assert!((c.integral_over(400.0, 500.5) - 201.0).abs() < 1e-9);
    }

    #[test]
    fn box_weighting_selects_its_band() {
        // Analytic oracle: a ramp S(λ) = λ against a box of 1 on 500–600 nm gives
        // ∫ λ dλ = (600² − 500²)/2 = 55 000 (the ramp is linear, so the rule is exact).
        let s = curve(&[300.0, 900.0], &[300.0, 900.0]);
        let boxw = curve(&[500.0, 600.0], &[1.0, 1.0]);
        assert!((s.product_integral(&boxw) - 55_000.0).abs() < 1e-6);
    }

    #[test]
    fn product_integral_is_symmetric_on_different_grids() {
        let a = curve(&[380.0, 385.0, 390.0, 400.0, 450.0], &[1.0, 2.0, 0.5, 3.0, 1.0]);
        let b = curve(&[381.0, 382.5, 397.0, 420.0, 440.0, 460.0], &[0.2, 0.4, 0.9, 0.1, 0.7, 0.3]);
        assert_eq!(a.product_integral(&b), b.product_integral(&a));
    }

    #[test]
    fn combining_uses_the_overlap_on_the_union_grid() {
        let a = curve(&[400.0, 500.0, 600.0], &[1.0, 2.0, 3.0]);
        let b = curve(&[450.0, 550.0, 700.0], &[10.0, 10.0, 10.0]);
        let p = a.combined(&b, |x, y| x * y).unwrap();
        assert_eq!(p.wavelength_nm(), &[450.0, 500.0, 550.0, 600.0]);
        assert_eq!(p.values(), &[15.0, 20.0, 25.0, 30.0]);
        assert!(a.combined(&curve(&[700.0, 800.0], &[1.0, 1.0]), |x, y| x + y).is_none());
    }

    #[test]
    fn resampling_outside_the_range_is_an_error() {
        let c = curve(&[400.0, 500.0], &[1.0, 1.0]);
        assert!(c.resampled(&[400.0, 450.0, 500.0]).is_ok());
        let err = c.resampled(&[390.0, 450.0]).unwrap_err();
        assert_eq!(err.kind(), crate::ErrorKind::NotCovered);
    }
}
