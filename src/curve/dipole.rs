//! Dipole-moment functions mu(r): the permanent dipole of one electronic state (infrared
//! bands) or the transition moment between two (electronic bands). Atomic units inside: e a_0
//! for mu, bohr for r.

use super::{CubicSpline, SplineEnd};

/// mu(r), e a_0 with r in bohr.
#[derive(Debug, Clone)]
pub enum DipoleFunction {
    /// mu(r) = sum_k c_k (r - r_ref)^k, c_k in e a_0 / bohr^k.
    Polynomial { r_ref: f64, coefficients: Vec<f64> },
    /// A not-a-knot cubic spline through points (bohr, e a_0), held at its end values
    /// outside the table (where bound wavefunctions are negligible; extrapolating a cubic
    /// would invent structure).
    Points(CubicSpline),
}

impl DipoleFunction {
    /// A spline through (r, mu) points, r strictly increasing.
    pub fn from_points(points: &[(f64, f64)]) -> DipoleFunction {
        let (r, mu) = points.iter().copied().unzip();
        DipoleFunction::Points(CubicSpline::new(r, mu, SplineEnd::NotAKnot))
    }

    /// mu(r), e a_0.
    pub fn value(&self, r: f64) -> f64 {
        match self {
            DipoleFunction::Polynomial {
                r_ref,
                coefficients,
            } => coefficients
                .iter()
                .rev()
                .fold(0.0, |sum, c| sum * (r - r_ref) + c),
            DipoleFunction::Points(spline) => {
                let (x, _) = spline.knots();
                let clamped = r.clamp(x[0], x[x.len() - 1]);
                spline.evaluate(clamped).0
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn polynomial_and_points_agree_on_a_line() {
        let line = DipoleFunction::Polynomial {
            r_ref: 2.0,
            coefficients: vec![0.5, -0.25],
        };
        assert_eq!(line.value(3.0), 0.25);
        let points: Vec<(f64, f64)> = (0..6)
            .map(|i| 1.0 + f64::from(i))
            .map(|r| (r, line.value(r)))
            .collect();
        let spline = DipoleFunction::from_points(&points);
        assert!((spline.value(2.7) - line.value(2.7)).abs() < 1e-14);
        assert_eq!(spline.value(100.0), line.value(6.0));
    }
}
