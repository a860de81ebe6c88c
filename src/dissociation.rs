//! Near dissociation: the LeRoy-Bernstein analysis of the highest levels of a curve whose tail
//! is -C_n / r^n (R.J. LeRoy and R.B. Bernstein, J. Chem. Phys. 52, 3869 (1970)):
//!
//! ```text
//!   D - E(v) = [ (v_D - v) H_n ]^(2n/(n-2)),
//!   H_n = (n-2)/2 * sqrt(2 pi / mu) * Gamma(1 + 1/n) / ( Gamma(1/2 + 1/n) C_n^(1/n) )
//! ```
//!
//! (atomic units, hbar = 1). H_n follows from the WKB condition v + 1/2 = (1/pi) int p dr:
//! near the limit dv/d(D - E) = -(mu/pi) int dr/p is dominated by the tail, where with
//! r = r_t y the integral is r_t (2 mu (D - E))^(-1/2) (1/n) B(1/2 + 1/n, 1/2); integrating in
//! D - E gives the form above. The tests check it by recovering the C_6 of a Lennard-Jones curve. v_D is the effective vibrational index at the
//! limit; floor(v_D) + 1 levels are bound. The fit: for a trial limit D the transformed
//! energies (D - E)^((n-2)/(2n)) are linear in v, which fixes v_D and H_n by least squares;
//! D is chosen by golden-section search to minimise the residual of the energies.
//! Knows nothing of files or reports; hartree and bohr inside.

use crate::constants::{linear_least_squares, polynomial_fit};

/// The result of a LeRoy-Bernstein fit.
#[derive(Debug, Clone, PartialEq)]
pub struct LeRoyBernstein {
    pub power: f64,
    /// The dissociation limit D, hartree.
    pub limit: f64,
    /// v_D, the (non-integer) vibrational index at the limit.
    pub v_at_limit: f64,
    /// C_n implied by H_n, hartree bohr^n.
    pub dispersion_coefficient: f64,
    /// RMS of the fitted energies, hartree.
    pub rms_residual: f64,
    /// floor(v_D) + 1.
    pub bound_levels: u32,
    /// The levels above the highest one used.
    pub predicted: Vec<PredictedLevel>,
    /// Standard errors of the limit (hartree), v_D and C_n (hartree bohr^n): the statistical
    /// part from the covariance s^2 (J^T J)^-1 of the three-parameter fit (s^2 = RSS / (N - 3))
    /// and the systematic part from shifting the window (see [`leroy_bernstein`]).
    pub limit_error: f64,
    pub v_at_limit_error: f64,
    pub dispersion_coefficient_error: f64,
}

/// A level the fit predicts above the highest one used.
#[derive(Debug, Clone, PartialEq)]
pub struct PredictedLevel {
    pub v: u32,
    /// D - E, hartree.
    pub binding: f64,
    /// Its standard error propagated from (v_D, H_n) and their covariance, hartree.
    pub binding_error: f64,
}

/// Problems with a LeRoy-Bernstein fit.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum NearDissociationError {
    #[error("the LeRoy-Bernstein fit needs at least 4 levels, {0} given")]
    TooFewLevels(usize),
    #[error("the power n of the tail must be above 2, found {0}")]
    PowerTooSmall(f64),
    #[error("the levels do not behave as levels of a -C_n/r^n tail (the fit did not converge)")]
    NoFit,
}

/// H_n for a given C_n (see the module formula).
pub fn h_n(power: f64, dispersion_coefficient: f64, reduced_mass: f64) -> f64 {
    let n = power;
    (n - 2.0) / 2.0
        * (2.0 * std::f64::consts::PI / reduced_mass).sqrt()
        * libm::tgamma(1.0 + 1.0 / n)
        / (libm::tgamma(0.5 + 1.0 / n) * dispersion_coefficient.powf(1.0 / n))
}

/// Fit (v, E) pairs (the highest levels of one J, energies in hartree).
///
/// The standard errors combine two parts in quadrature: the statistical one of the fit (see
/// [`LeRoyBernstein::limit_error`]) and, with five or more levels, the change when the deepest
/// level is left out. The LeRoy-Bernstein form is exact only in the limit, so levels further
/// down bend the fit systematically; the residual scatter alone misses that (on a
/// Lennard-Jones curve it understated the error of the predicted levels about tenfold), and the
/// shift of the window measures part of it. What remains is larger still: on the
/// Lennard-Jones test (tests/constants.rs) the three predicted levels missed the solver's by
/// 4 to 10 of these combined errors, so they are a lower bound and are reported as one.
pub fn leroy_bernstein(
    levels: &[(u32, f64)],
    power: f64,
    reduced_mass: f64,
) -> Result<LeRoyBernstein, NearDissociationError> {
    let mut fit = fit_window(levels, power, reduced_mass)?;
    if levels.len() >= 5 {
        let deepest = levels
            .iter()
            .enumerate()
            .min_by(|a, b| a.1 .1.total_cmp(&b.1 .1))
            .map_or(0, |(i, _)| i);
        let shallower: Vec<(u32, f64)> = levels
            .iter()
            .enumerate()
            .filter(|&(i, _)| i != deepest)
            .map(|(_, l)| *l)
            .collect();
        if let Ok(other) = fit_window(&shallower, power, reduced_mass) {
            let combine = |stat: f64, a: f64, b: f64| stat.hypot(a - b);
            fit.limit_error = combine(fit.limit_error, fit.limit, other.limit);
            fit.v_at_limit_error = combine(fit.v_at_limit_error, fit.v_at_limit, other.v_at_limit);
            fit.dispersion_coefficient_error = combine(
                fit.dispersion_coefficient_error,
                fit.dispersion_coefficient,
                other.dispersion_coefficient,
            );
            for level in &mut fit.predicted {
                let other_binding = other
                    .predicted
                    .iter()
                    .find(|p| p.v == level.v)
                    .map_or(0.0, |p| p.binding);
                level.binding_error = combine(level.binding_error, level.binding, other_binding);
            }
        }
    }
    Ok(fit)
}

/// One LeRoy-Bernstein fit of the given levels, with its statistical errors only.
fn fit_window(
    levels: &[(u32, f64)],
    power: f64,
    reduced_mass: f64,
) -> Result<LeRoyBernstein, NearDissociationError> {
    if levels.len() < 4 {
        return Err(NearDissociationError::TooFewLevels(levels.len()));
    }
    if power <= 2.0 {
        return Err(NearDissociationError::PowerTooSmall(power));
    }
    let exponent = (power - 2.0) / (2.0 * power);
    let v: Vec<f64> = levels.iter().map(|l| f64::from(l.0)).collect();
    let top = levels.iter().map(|l| l.1).fold(f64::NEG_INFINITY, f64::max);
    let span = top - levels.iter().map(|l| l.1).fold(f64::INFINITY, f64::min);
    // For a trial limit: the line through the transformed energies and the energy residual.
    let trial = |limit: f64| -> Option<(f64, f64, f64)> {
        let y: Vec<f64> = levels
            .iter()
            .map(|l| (limit - l.1).powf(exponent))
            .collect();
        let line = polynomial_fit(&v, &y, 1).ok()?;
        let (a, b) = (line.coefficients[0], line.coefficients[1]);
        if b >= 0.0 {
            return None;
        }
        let (hn, v_d) = (-b, -a / b);
        let rss: f64 = levels
            .iter()
            .map(|&(vv, e)| {
                let model = limit - (((v_d - f64::from(vv)) * hn).max(0.0)).powf(1.0 / exponent);
                (e - model).powi(2)
            })
            .sum();
        Some((rss, hn, v_d))
    };
    let cost = |limit: f64| trial(limit).map_or(f64::INFINITY, |t| t.0);
    // Golden-section search for the limit above the highest level, on a log scale of D - E_top.
    let (mut lo, mut hi) = ((1e-8 * span).ln(), (10.0 * span).ln());
    let golden = 0.5 * (5f64.sqrt() - 1.0);
    for _ in 0..200 {
        let c = hi - golden * (hi - lo);
        let d = lo + golden * (hi - lo);
        if cost(top + c.exp()) < cost(top + d.exp()) {
            hi = d;
        } else {
            lo = c;
        }
    }
    let limit = top + (0.5 * (lo + hi)).exp();
    let (rss, hn, v_at_limit) = trial(limit).ok_or(NearDissociationError::NoFit)?;
    if !rss.is_finite() {
        return Err(NearDissociationError::NoFit);
    }
    // C_n from H_n: invert h_n (it goes as C_n^(-1/n)).
    let unit = h_n(power, 1.0, reduced_mass);
    let dispersion_coefficient = (unit / hn).powf(power);
    let highest = levels.iter().map(|l| l.0).max().unwrap_or(0);
    let bound_levels = v_at_limit.floor() as u32 + 1;
    // Uncertainties: the Jacobian of E(v) = D - [(v_D - v) H]^q, q = 2n/(n-2), in (D, v_D, H).
    let q = 1.0 / exponent;
    let slopes = |vv: f64| {
        let x = ((v_at_limit - vv) * hn).max(0.0);
        let common = q * x.powf(q - 1.0);
        (common * hn, common * (v_at_limit - vv))
    };
    let jacobian = faer::Mat::from_fn(levels.len(), 3, |i, k| {
        let (d_vd, d_h) = slopes(f64::from(levels[i].0));
        [1.0, -d_vd, -d_h][k]
    });
    let residuals: Vec<f64> = levels
        .iter()
        .map(|&(vv, e)| e - (limit - (((v_at_limit - f64::from(vv)) * hn).max(0.0)).powf(q)))
        .collect();
    let covariance = linear_least_squares(&jacobian, &residuals)
        .map(|f| f.covariance)
        .unwrap_or_else(|_| vec![vec![f64::NAN; 3]; 3]);
    let predicted = (highest + 1..bound_levels)
        .map(|vv| {
            let (d_vd, d_h) = slopes(f64::from(vv));
            let variance = d_vd * d_vd * covariance[1][1]
                + 2.0 * d_vd * d_h * covariance[1][2]
                + d_h * d_h * covariance[2][2];
            PredictedLevel {
                v: vv,
                binding: ((v_at_limit - f64::from(vv)) * hn).powf(q),
                binding_error: variance.max(0.0).sqrt(),
            }
        })
        .collect();
    Ok(LeRoyBernstein {
        power,
        limit,
        v_at_limit,
        dispersion_coefficient,
        rms_residual: (rss / levels.len() as f64).sqrt(),
        bound_levels,
        predicted,
        limit_error: covariance[0][0].sqrt(),
        v_at_limit_error: covariance[1][1].sqrt(),
        // C_n = (H_n(C=1) / H)^n, so dC/C = n dH/H.
        dispersion_coefficient_error: power * dispersion_coefficient * covariance[2][2].sqrt() / hn,
    })
}
