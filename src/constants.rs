//! Spectroscopic constants from computed (or measured) levels: spacings, Dunham-type
//! polynomial fits of G(v) and B_v in (v + 1/2), and the Birge-Sponer extrapolation.
//!
//! Fits (G. Herzberg, "Spectra of Diatomic Molecules" (1950), ch. III; J.L. Dunham, Phys. Rev.
//! 41, 721 (1932)):
//!
//! ```text
//!   G(v) = G_0 + omega_e (v+1/2) - omega_e x_e (v+1/2)^2 + omega_e y_e (v+1/2)^3 + ...
//!   B_v  = B_e - alpha_e (v+1/2) + gamma_e (v+1/2)^2 + ...
//! ```
//!
//! solved as linear least squares by QR (faer), with standard errors from the residual
//! variance and (A^T A)^-1 = R^-1 R^-T. Knows nothing of files or reports; energies in hartree.

use crate::solver::LevelSet;
use faer::linalg::solvers::SolveLstsq;
use faer::Mat;

/// A least-squares polynomial fit y = sum_k c_k x^k.
#[derive(Debug, Clone, PartialEq)]
pub struct PolynomialFit {
    /// c_0 .. c_order.
    pub coefficients: Vec<f64>,
    /// Standard errors of the coefficients (zero when the fit is exact: points = terms).
    pub standard_errors: Vec<f64>,
    /// Root-mean-square residual.
    pub rms_residual: f64,
    pub points: usize,
}

/// Problems fitting.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum FitError {
    #[error("a fit of order {order} needs at least {needed} levels, {found} given; lower the order or widen the v range")]
    TooFewPoints {
        order: usize,
        needed: usize,
        found: usize,
    },
    #[error("the fit is singular (repeated v values?)")]
    Singular,
}

/// A linear least-squares solution of A c ~ y.
#[derive(Debug, Clone, PartialEq)]
pub struct LinearFit {
    pub coefficients: Vec<f64>,
    /// s^2 (A^T A)^-1 with s^2 = RSS / (N - P) (zero when N = P: an exact fit).
    pub covariance: Vec<Vec<f64>>,
    /// Residual sum of squares.
    pub rss: f64,
}

impl LinearFit {
    pub fn standard_errors(&self) -> Vec<f64> {
        (0..self.coefficients.len())
            .map(|k| self.covariance[k][k].sqrt())
            .collect()
    }
}

/// Solve A c ~ y by QR (faer), with the covariance from the residual variance and
/// (A^T A)^-1 = R^-1 R^-T. Also the covariance of a nonlinear fit at its minimum when A is
/// the Jacobian there (the Gauss-Newton linearisation; common practice).
// The triangular inverse below reads best with explicit indices.
#[allow(clippy::needless_range_loop)]
pub fn linear_least_squares(design: &Mat<f64>, y: &[f64]) -> Result<LinearFit, FitError> {
    let (n, terms) = (design.nrows(), design.ncols());
    let rhs = Mat::from_fn(n, 1, |i, _| y[i]);
    let qr = design.qr();
    let solution = qr.solve_lstsq(&rhs);
    let coefficients: Vec<f64> = (0..terms).map(|k| solution[(k, 0)]).collect();
    let r = qr.thin_R();
    let largest = (0..terms).fold(0.0f64, |m, k| m.max(r[(k, k)].abs()));
    if coefficients.iter().any(|c| !c.is_finite())
        || (0..terms).any(|k| r[(k, k)].abs() <= 1e-13 * largest)
    {
        return Err(FitError::Singular);
    }
    let rss: f64 = (0..n)
        .map(|i| {
            let model: f64 = (0..terms).map(|k| design[(i, k)] * coefficients[k]).sum();
            (y[i] - model).powi(2)
        })
        .sum();
    let variance = if n > terms {
        rss / (n - terms) as f64
    } else {
        0.0
    };
    let mut r_inv = vec![vec![0.0; terms]; terms];
    for col in 0..terms {
        for row in (0..=col).rev() {
            let identity = if row == col { 1.0 } else { 0.0 };
            let sum: f64 = (row + 1..=col).map(|k| r[(row, k)] * r_inv[k][col]).sum();
            r_inv[row][col] = (identity - sum) / r[(row, row)];
        }
    }
    let covariance = (0..terms)
        .map(|a| {
            (0..terms)
                .map(|b| variance * (0..terms).map(|j| r_inv[a][j] * r_inv[b][j]).sum::<f64>())
                .collect()
        })
        .collect();
    Ok(LinearFit {
        coefficients,
        covariance,
        rss,
    })
}

/// Least-squares polynomial of the given order through (x, y).
pub fn polynomial_fit(x: &[f64], y: &[f64], order: usize) -> Result<PolynomialFit, FitError> {
    let terms = order + 1;
    let n = x.len();
    if n < terms {
        return Err(FitError::TooFewPoints {
            order,
            needed: terms,
            found: n,
        });
    }
    // Scale x to [-1, 1]-ish for conditioning; unscale the coefficients afterwards.
    let scale = x.iter().fold(0.0f64, |m, v| m.max(v.abs())).max(1e-300);
    let design = Mat::from_fn(n, terms, |i, k| (x[i] / scale).powi(k as i32));
    let fit = linear_least_squares(&design, y)?;
    let errors = fit.standard_errors();
    Ok(PolynomialFit {
        coefficients: (0..terms)
            .map(|k| fit.coefficients[k] / scale.powi(k as i32))
            .collect(),
        standard_errors: (0..terms)
            .map(|k| errors[k] / scale.powi(k as i32))
            .collect(),
        rms_residual: (fit.rss / n as f64).sqrt(),
        points: n,
    })
}

/// Delta^2 G(v+1) = Delta G(v+3/2) - Delta G(v+1/2), hartree.
pub fn spacings(set: &LevelSet) -> (Vec<f64>, Vec<f64>) {
    let first: Vec<f64> = set
        .levels
        .windows(2)
        .map(|w| w[1].energy - w[0].energy)
        .collect();
    let second = first.windows(2).map(|w| w[1] - w[0]).collect();
    (first, second)
}

/// Least-squares polynomial in (v + 1/2) of one quantity of the levels with v in `v_range`.
fn fit_in_v(
    set: &LevelSet,
    v_range: (u32, u32),
    order: usize,
    quantity: impl Fn(&crate::solver::Level) -> f64,
) -> Result<PolynomialFit, FitError> {
    let chosen: Vec<_> = set
        .levels
        .iter()
        .filter(|l| l.v >= v_range.0 && l.v <= v_range.1)
        .collect();
    let x: Vec<f64> = chosen.iter().map(|l| f64::from(l.v) + 0.5).collect();
    let y: Vec<f64> = chosen.iter().map(|l| quantity(l)).collect();
    polynomial_fit(&x, &y, order)
}

/// Fit G(v) over `v_range` with a polynomial of `order` in (v + 1/2). Returns the fit; the
/// spectroscopic constants are omega_e = c_1, omega_e x_e = -c_2, omega_e y_e = c_3.
pub fn fit_vibrational(
    set: &LevelSet,
    v_range: (u32, u32),
    order: usize,
) -> Result<PolynomialFit, FitError> {
    fit_in_v(set, v_range, order, |l| l.energy)
}

/// Fit B_v over `v_range` with a polynomial of `order` in (v + 1/2): B_e = c_0,
/// alpha_e = -c_1, gamma_e = c_2.
pub fn fit_rotational(
    set: &LevelSet,
    v_range: (u32, u32),
    order: usize,
) -> Result<PolynomialFit, FitError> {
    fit_in_v(set, v_range, order, |l| l.rotational_constant)
}

/// A Birge-Sponer estimate of the dissociation energy from v = 0.
#[derive(Debug, Clone, PartialEq)]
pub struct BirgeSponer {
    /// D_0, hartree.
    pub d0: f64,
    /// Its standard error from the fitted line's covariance (the statistical part only: the
    /// straight-line model itself is an assumption, usually the larger error).
    pub standard_error: f64,
    /// The spacings Delta G(v + 1/2) the line was fitted to, as (first v, last v) of their lower
    /// levels.
    pub fitted: (u32, u32),
    /// The line's root-mean-square residual, hartree.
    pub line_rms: f64,
}

/// Why a Birge-Sponer estimate cannot be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum BirgeSponerError {
    #[error("the curve has no dissociation limit, so there is nothing for the Birge-Sponer line to reach")]
    NoLimit,
    #[error("the Birge-Sponer line needs at least 2 spacings (--birge-sponer-points {0})")]
    TooFewPoints(usize),
    #[error("the v range holds {0} levels; the Birge-Sponer line needs at least 3")]
    TooFewLevels(usize),
    #[error(
        "the fitted spacings do not fall toward the limit (slope >= 0), so they never reach zero"
    )]
    NotFalling,
}

/// Birge-Sponer estimate of the dissociation energy from v = 0 (hartree) over the levels with
/// v in `v_range`: E(top) - E(0) up to the highest level in the range, plus the area under the
/// straight line fitted to its last `tail_points` spacings Delta G(v+1/2) (against u = v + 1)
/// from there to where the line reaches zero (R.T. Birge and H. Sponer, Phys. Rev. 28, 259
/// (1926)). The standard error propagates the line's covariance through the area, A(a, b) =
/// a (u0 - f) + b (u0^2 - f^2)/2 with u0 = -a/b, f the last u plus 1/2, by its gradient
/// (dA/da = u0 - f, dA/db = (f^2 - u0^2)/2; the delta method, common practice).
pub fn birge_sponer(
    set: &LevelSet,
    v_range: (u32, u32),
    tail_points: usize,
) -> Result<BirgeSponer, BirgeSponerError> {
    if set.limit.is_none() {
        return Err(BirgeSponerError::NoLimit);
    }
    if tail_points < 2 {
        return Err(BirgeSponerError::TooFewPoints(tail_points));
    }
    let chosen: Vec<&crate::solver::Level> = set
        .levels
        .iter()
        .filter(|l| l.v >= v_range.0 && l.v <= v_range.1)
        .collect();
    if chosen.len() < 3 {
        return Err(BirgeSponerError::TooFewLevels(chosen.len()));
    }
    let delta: Vec<f64> = chosen
        .windows(2)
        .map(|w| w[1].energy - w[0].energy)
        .collect();
    let used = tail_points.min(delta.len());
    let start = delta.len() - used;
    let lower_v = |k: usize| chosen[k].v;
    let x: Vec<f64> = (start..delta.len())
        .map(|k| f64::from(lower_v(k)) + 1.0)
        .collect();
    let design = Mat::from_fn(used, 2, |i, k| if k == 0 { 1.0 } else { x[i] });
    let line =
        linear_least_squares(&design, &delta[start..]).map_err(|_| BirgeSponerError::NotFalling)?;
    let (a, b) = (line.coefficients[0], line.coefficients[1]);
    if b >= 0.0 {
        return Err(BirgeSponerError::NotFalling);
    }
    let ground = set.levels[0].energy;
    let observed = chosen[chosen.len() - 1].energy - ground;
    let last_u = f64::from(chosen[chosen.len() - 1].v);
    let from = last_u + 0.5;
    let u_zero = -a / b;
    let (area, gradient) = if u_zero > from {
        // The unseen spacings at u = last + 1, last + 2, ... summed by the midpoint rule, i.e.
        // the area under the line from last + 1/2 to its zero.
        (
            a * (u_zero - from) + 0.5 * b * (u_zero * u_zero - from * from),
            [u_zero - from, 0.5 * (from * from - u_zero * u_zero)],
        )
    } else {
        (0.0, [0.0, 0.0])
    };
    let variance: f64 = (0..2)
        .map(|i| {
            (0..2)
                .map(|j| gradient[i] * line.covariance[i][j] * gradient[j])
                .sum::<f64>()
        })
        .sum();
    Ok(BirgeSponer {
        d0: observed + area,
        standard_error: variance.max(0.0).sqrt(),
        fitted: (lower_v(start), lower_v(delta.len() - 1)),
        line_rms: (line.rss / used as f64).sqrt(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fits_a_known_polynomial_exactly() {
        let x: Vec<f64> = (0..20).map(|v| f64::from(v) + 0.5).collect();
        let y: Vec<f64> = x
            .iter()
            .map(|t| 3.0 + 2000.0 * t - 15.0 * t * t + 0.02 * t * t * t)
            .collect();
        let fit = polynomial_fit(&x, &y, 3).unwrap();
        for (c, expected) in fit.coefficients.iter().zip([3.0, 2000.0, -15.0, 0.02]) {
            assert!(
                (c - expected).abs() < 1e-8 * expected.abs().max(1.0),
                "{c} vs {expected}"
            );
        }
        assert!(fit.standard_errors.iter().all(|e| *e < 1e-8));
    }

    #[test]
    fn standard_errors_of_a_straight_line() {
        // y = 1 + 2x with residuals +-0.1 alternating: slope error from the textbook formula
        // sigma / sqrt(sum (x - mean)^2), sigma^2 = RSS / (n - 2) (common practice).
        let x: Vec<f64> = (0..10).map(f64::from).collect();
        let y: Vec<f64> = x
            .iter()
            .enumerate()
            .map(|(i, t)| 1.0 + 2.0 * t + if i % 2 == 0 { 0.1 } else { -0.1 })
            .collect();
        let fit = polynomial_fit(&x, &y, 1).unwrap();
        let mean = 4.5;
        let sxx: f64 = x.iter().map(|t| (t - mean) * (t - mean)).sum();
        let residual: Vec<f64> = x
            .iter()
            .zip(&y)
            .map(|(t, v)| v - fit.coefficients[0] - fit.coefficients[1] * t)
            .collect();
        let sigma = (residual.iter().map(|r| r * r).sum::<f64>() / 8.0).sqrt();
        assert!((fit.standard_errors[1] - sigma / sxx.sqrt()).abs() < 1e-12);
    }
}
