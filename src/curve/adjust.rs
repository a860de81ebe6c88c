//! Named curve parameters and their derivatives, for fitting.
//!
//! Every analytic model exposes its own parameters under the names its curve-file keys use
//! (`well_depth`, `width`, `r_e`, `force_constant`), with dV/dp for Hellmann-Feynman
//! derivatives of the levels. A tabulated curve has no parameters of its own; it is adjusted by
//! [`Adjusted`], a smooth two-parameter correction of our design:
//!
//! ```text
//!   V_adj(r) = L + s [V(r - d) - L]
//! ```
//!
//! with L the curve's dissociation limit (0 when it has none), `depth_scale` s scaling the well
//! depth about the limit and `r_shift` d moving the curve along r. The asymptote and the shape
//! are kept, so a scan whose depth and equilibrium distance are slightly off (the usual
//! shortcomings of an ab initio curve) can be brought onto measured levels with two numbers
//! whose meaning is plain.

use super::PotentialCurve;
use crate::units::Dimension;
use std::sync::Arc;

/// One named parameter of a curve, in atomic units.
#[derive(Debug, Clone, PartialEq)]
pub struct CurveParameter {
    /// The curve-file key.
    pub name: &'static str,
    pub value: f64,
    /// What it measures (None for a pure number).
    pub dimension: Option<Dimension>,
}

/// Why a curve could not take new parameter values.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ParameterError {
    #[error("this curve has no adjustable parameters")]
    NotAdjustable,
    #[error("{name} = {value:e} is outside its allowed range ({allowed})")]
    OutOfRange {
        name: &'static str,
        value: f64,
        allowed: &'static str,
    },
    #[error("expected {expected} parameter values, got {got}")]
    WrongCount { expected: usize, got: usize },
}

/// Check a value count and positivity of the named entries.
pub(super) fn check_values(
    names: &[&'static str],
    values: &[f64],
    positive: &[&'static str],
) -> Result<(), ParameterError> {
    if names.len() != values.len() {
        return Err(ParameterError::WrongCount {
            expected: names.len(),
            got: values.len(),
        });
    }
    for (name, value) in names.iter().zip(values) {
        if !value.is_finite() || (positive.contains(name) && *value <= 0.0) {
            return Err(ParameterError::OutOfRange {
                name,
                value: *value,
                allowed: if positive.contains(name) {
                    "finite and positive"
                } else {
                    "finite"
                },
            });
        }
    }
    Ok(())
}

/// A curve scaled in depth and shifted in r: V_adj(r) = L + s [V(r - d) - L].
#[derive(Debug, Clone)]
pub struct Adjusted {
    pub base: Arc<dyn PotentialCurve>,
    pub depth_scale: f64,
    pub r_shift: f64,
}

const ADJUSTED_NAMES: [&str; 2] = ["depth_scale", "r_shift"];

impl Adjusted {
    /// The base curve unchanged (s = 1, d = 0).
    pub fn identity(base: Arc<dyn PotentialCurve>) -> Adjusted {
        Adjusted {
            base,
            depth_scale: 1.0,
            r_shift: 0.0,
        }
    }

    fn anchor(&self) -> f64 {
        self.base.limit().unwrap_or(0.0)
    }
}

impl PotentialCurve for Adjusted {
    fn value(&self, r: f64) -> f64 {
        let anchor = self.anchor();
        anchor + self.depth_scale * (self.base.value(r - self.r_shift) - anchor)
    }
    fn derivative(&self, r: f64) -> f64 {
        self.depth_scale * self.base.derivative(r - self.r_shift)
    }
    fn second_derivative(&self, r: f64) -> f64 {
        self.depth_scale * self.base.second_derivative(r - self.r_shift)
    }
    fn limit(&self) -> Option<f64> {
        self.base.limit()
    }
    fn well_range(&self) -> (f64, f64) {
        let (lo, hi) = self.base.well_range();
        (lo + self.r_shift, hi + self.r_shift)
    }
    fn long_range_power(&self) -> Option<f64> {
        self.base.long_range_power()
    }
    fn is_piecewise(&self) -> bool {
        self.base.is_piecewise()
    }
    fn describe(&self) -> String {
        format!(
            "{}; depth scaled by {:.9} about the limit, shifted by {:.6e} bohr",
            self.base.describe(),
            self.depth_scale,
            self.r_shift
        )
    }
    fn parameters(&self) -> Vec<CurveParameter> {
        vec![
            CurveParameter {
                name: ADJUSTED_NAMES[0],
                value: self.depth_scale,
                dimension: None,
            },
            CurveParameter {
                name: ADJUSTED_NAMES[1],
                value: self.r_shift,
                dimension: Some(Dimension::Length),
            },
        ]
    }
    fn with_parameters(&self, values: &[f64]) -> Result<Arc<dyn PotentialCurve>, ParameterError> {
        check_values(&ADJUSTED_NAMES, values, &["depth_scale"])?;
        Ok(Arc::new(Adjusted {
            base: Arc::clone(&self.base),
            depth_scale: values[0],
            r_shift: values[1],
        }))
    }
    /// dV/ds = V(r - d) - L; dV/dd = -s V'(r - d).
    fn parameter_derivative(&self, index: usize, r: f64) -> f64 {
        match index {
            0 => self.base.value(r - self.r_shift) - self.anchor(),
            1 => -self.depth_scale * self.base.derivative(r - self.r_shift),
            _ => f64::NAN,
        }
    }
    fn model_name(&self) -> &'static str {
        self.base.model_name()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::curve::{Harmonic, LennardJones, Morse};

    /// dV/dp from the trait against a central difference of V over p (common practice).
    fn check_derivatives(curve: &dyn PotentialCurve, radii: &[f64]) {
        let parameters = curve.parameters();
        assert!(!parameters.is_empty());
        let values: Vec<f64> = parameters.iter().map(|p| p.value).collect();
        for index in 0..values.len() {
            let step = 1e-6 * values[index].abs().max(1e-3);
            let shifted = |delta: f64| {
                let mut moved = values.clone();
                moved[index] += delta;
                curve.with_parameters(&moved).unwrap()
            };
            let (up, down) = (shifted(step), shifted(-step));
            for &r in radii {
                let numeric = (up.value(r) - down.value(r)) / (2.0 * step);
                let analytic = curve.parameter_derivative(index, r);
                let scale = numeric.abs().max(1e-6);
                assert!(
                    (numeric - analytic).abs() < 1e-6 * scale,
                    "{} d/d{} at r = {r}: {analytic} vs {numeric}",
                    curve.model_name(),
                    parameters[index].name
                );
            }
        }
    }

    #[test]
    fn parameter_derivatives_match_differences() {
        let radii = [1.1, 1.4, 2.0, 3.5];
        check_derivatives(&Morse::new(0.17, 1.0, 1.4), &radii);
        check_derivatives(&Harmonic::new(0.5, 1.4), &radii);
        check_derivatives(&LennardJones::new(0.01, 1.5, 12.0, 6.0), &radii);
        let base: Arc<dyn PotentialCurve> = Arc::new(Morse::new(0.17, 1.0, 1.4));
        let adjusted = Adjusted::identity(base)
            .with_parameters(&[1.05, 0.02])
            .unwrap();
        check_derivatives(adjusted.as_ref(), &radii);
    }

    #[test]
    fn refuses_non_physical_values() {
        let morse = Morse::new(0.17, 1.0, 1.4);
        assert!(matches!(
            morse.with_parameters(&[-0.1, 1.0, 1.4]),
            Err(ParameterError::OutOfRange {
                name: "well_depth",
                ..
            })
        ));
        assert!(matches!(
            morse.with_parameters(&[0.1]),
            Err(ParameterError::WrongCount { .. })
        ));
    }
}
