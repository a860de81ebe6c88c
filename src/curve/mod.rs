//! Potential-energy curves: one trait for every curve, analytic models, and tabulated points
//! joined by a spline with extrapolations at both ends.
//!
//! All curves take r in bohr and return energies in hartree (see [`crate::units`]). This module
//! knows nothing of files, masses, solvers or reports.

mod adjust;
mod dipole;
mod models;
mod spline;
mod tabulated;

pub use adjust::{Adjusted, CurveParameter, ParameterError};
pub use dipole::DipoleFunction;
pub use models::{Harmonic, LennardJones, Morse};
pub use spline::{CubicSpline, SplineEnd};
pub use tabulated::{InnerWall, JoinReport, OuterTail, TabulatedCurve, TabulatedError};

/// A diatomic potential-energy curve V(r).
///
/// Implementors give the value and the first two derivatives (analytic where possible), the
/// dissociation limit V(r -> infinity) if the curve has one, and a range of r where the well
/// lies, used to start the search for the minimum.
pub trait PotentialCurve: Send + Sync + std::fmt::Debug {
    /// V(r), hartree; r in bohr.
    fn value(&self, r: f64) -> f64;
    /// dV/dr, hartree/bohr.
    fn derivative(&self, r: f64) -> f64;
    /// d^2V/dr^2, hartree/bohr^2.
    fn second_derivative(&self, r: f64) -> f64;
    /// V(infinity), hartree, or None for a curve that rises without bound (harmonic).
    fn limit(&self) -> Option<f64>;
    /// A range of r (bohr) that contains the minimum of the well.
    fn well_range(&self) -> (f64, f64);
    /// Outer r (bohr) beyond which the curve follows a long-range form -C_n/r^n, with n, if known.
    fn long_range_power(&self) -> Option<f64> {
        None
    }
    /// True for a curve made of pieces (a spline between points, joined to its extrapolations)
    /// whose higher derivatives jump: a grid method's error then depends on where its points
    /// fall, beyond what its error series in the step predicts. Analytic curves are smooth.
    fn is_piecewise(&self) -> bool {
        false
    }
    /// A one-line description with the parameters, in the curve's own units.
    fn describe(&self) -> String;
    /// The curve-file model name (`morse`, `points`, ...).
    fn model_name(&self) -> &'static str;
    /// The parameters a fit may vary, named by their curve-file keys (none by default).
    fn parameters(&self) -> Vec<CurveParameter> {
        Vec::new()
    }
    /// The same kind of curve with new values of every parameter (in [`Self::parameters`]
    /// order, atomic units).
    fn with_parameters(
        &self,
        _values: &[f64],
    ) -> Result<std::sync::Arc<dyn PotentialCurve>, ParameterError> {
        Err(ParameterError::NotAdjustable)
    }
    /// dV/dp at r for the parameter at `index` (hartree per parameter unit), the operator of
    /// the Hellmann-Feynman derivative dE/dp = <psi| dV/dp |psi>.
    fn parameter_derivative(&self, _index: usize, _r: f64) -> f64 {
        f64::NAN
    }
}

/// Where the well of a curve lies.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Well {
    /// Position of the minimum, bohr.
    pub r_min: f64,
    /// V at the minimum, hartree.
    pub v_min: f64,
    /// d^2V/dr^2 at the minimum (the harmonic force constant), hartree/bohr^2.
    pub force_constant: f64,
}

/// Problems with the shape of a curve.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ShapeError {
    #[error("the curve has no well: V(r) has no minimum between {lo:.4} and {hi:.4} bohr; check the sign of the energies and the model parameters")]
    NoWell { lo: f64, hi: f64 },
    #[error("the curve's minimum V = {v_min:.6e} hartree lies at or above its dissociation limit {limit:.6e} hartree, so nothing is bound; check the limit")]
    LimitBelowMinimum { v_min: f64, limit: f64 },
    #[error("V(r) is not finite at r = {r:.6} bohr")]
    NotFinite { r: f64 },
}

/// Find the minimum of V(r) + extra(r) in the curve's well range: a coarse scan, then
/// golden-section refinement, then a Newton polish on the derivative when it is available.
pub fn find_well_with(
    curve: &dyn PotentialCurve,
    extra: &dyn Fn(f64) -> (f64, f64, f64),
) -> Result<Well, ShapeError> {
    let (lo, mut hi) = curve.well_range();
    let total = |r: f64| curve.value(r) + extra(r).0;
    let samples = 400;
    // The scan, widened outward while its lowest value sits at its outer end (the well of the
    // effective curve moves out with J: far out for a Coulomb-like tail), up to 2^12 times.
    let (step, best) = {
        let mut widenings = 0;
        loop {
            let step = (hi - lo) / samples as f64;
            let mut best = (f64::INFINITY, 0usize);
            for i in 0..=samples {
                let r = lo + step * i as f64;
                let v = total(r);
                if !v.is_finite() {
                    return Err(ShapeError::NotFinite { r });
                }
                if v < best.0 {
                    best = (v, i);
                }
            }
            if best.1 == samples && widenings < 12 && curve.limit().is_none_or(|l| best.0 < l) {
                hi = lo + 2.0 * (hi - lo);
                widenings += 1;
                continue;
            }
            break (step, best);
        }
    };
    if best.1 == 0 || best.1 == samples {
        return Err(ShapeError::NoWell { lo, hi });
    }
    let (mut a, mut b) = (
        lo + step * (best.1 - 1) as f64,
        lo + step * (best.1 + 1) as f64,
    );
    let golden = 0.5 * (5f64.sqrt() - 1.0);
    while b - a > 1e-10 * (1.0 + a.abs()) {
        let c = b - golden * (b - a);
        let d = a + golden * (b - a);
        if total(c) < total(d) {
            b = d;
        } else {
            a = c;
        }
    }
    let mut r = 0.5 * (a + b);
    for _ in 0..8 {
        let slope = curve.derivative(r) + extra(r).1;
        let curvature = curve.second_derivative(r) + extra(r).2;
        if curvature <= 0.0 || !slope.is_finite() {
            break;
        }
        let step = slope / curvature;
        if step.abs() > 10.0 * (b - a).max(1e-8) {
            break;
        }
        r -= step;
        if step.abs() < 1e-14 * r.abs() {
            break;
        }
    }
    let force_constant = curve.second_derivative(r) + extra(r).2;
    let v_min = total(r);
    if let Some(limit) = curve.limit() {
        if v_min >= limit {
            return Err(ShapeError::LimitBelowMinimum { v_min, limit });
        }
    }
    Ok(Well {
        r_min: r,
        v_min,
        force_constant,
    })
}

/// Find the minimum of the curve itself.
pub fn find_well(curve: &dyn PotentialCurve) -> Result<Well, ShapeError> {
    find_well_with(curve, &|_| (0.0, 0.0, 0.0))
}

/// Classical turning points of a potential at energy `energy`: the innermost and the outermost
/// r where it crosses the energy, on either side of the minimum `r_min`, found by a scan in
/// steps of 3% of r (so the outer turning point of a double well's level is the outer well's,
/// not the barrier's), then bisection. A side with no crossing within `[r_floor, r_ceiling]`
/// gives None.
pub fn turning_points_with(
    potential: &dyn Fn(f64) -> f64,
    r_min: f64,
    energy: f64,
    r_floor: f64,
    r_ceiling: f64,
) -> (Option<f64>, Option<f64>) {
    // The last crossing from below the energy to above it on the way to `towards`.
    let crossing = |towards: f64| -> Option<f64> {
        let outward = towards > r_min;
        let mut last: Option<(f64, f64)> = None;
        let mut r = r_min;
        loop {
            let step = 0.03 * r.abs().max(0.01 * r_min.abs().max(0.1));
            let probe = if outward {
                (r + step).min(towards)
            } else {
                (r - step).max(towards)
            };
            let value = potential(probe);
            if !value.is_finite() {
                break;
            }
            if value >= energy && potential(r) < energy {
                last = Some((r, probe));
            }
            r = probe;
            if probe == towards {
                break;
            }
        }
        let (mut a, mut b) = last?;
        for _ in 0..200 {
            let m = 0.5 * (a + b);
            if potential(m) >= energy {
                b = m;
            } else {
                a = m;
            }
            if (b - a).abs() < 1e-13 * m.abs().max(1e-3) {
                break;
            }
        }
        Some(0.5 * (a + b))
    };
    (crossing(r_floor), crossing(r_ceiling))
}
