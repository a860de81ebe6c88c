//! A curve given as points: a cubic spline between the points, a repulsive wall fitted to the
//! innermost three points inward, and a long-range form toward the dissociation limit outward.

use super::{Adjusted, CubicSpline, CurveParameter, ParameterError, PotentialCurve, SplineEnd};
use crate::units::{to_angstrom, to_wavenumber};
use std::sync::Arc;

/// Inward extrapolation: V(r) = A + B f(r) through the three innermost points, with
/// f = exp(-s r) or r^-s, B > 0 and s > 0 (a repulsive wall).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum InnerWall {
    #[default]
    Exponential,
    InversePower,
}

/// Outward extrapolation toward the limit L.
#[derive(Debug, Clone, PartialEq)]
pub enum OuterTail {
    /// V(r) = L - sum_k C_k / r^(n_k). Coefficients given (hartree bohr^n) for the leading
    /// powers are kept; the rest are fitted through the outermost points (one point per fitted
    /// coefficient, one more when L is fitted).
    InversePower {
        powers: Vec<f64>,
        coefficients: Option<Vec<f64>>,
    },
    /// V(r) = L - A exp(-b r), fitted through the outermost two points (three when L is fitted).
    Exponential,
}

impl Default for OuterTail {
    fn default() -> Self {
        OuterTail::InversePower {
            powers: vec![6.0],
            coefficients: None,
        }
    }
}

/// Problems building a tabulated curve.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum TabulatedError {
    #[error("{found} points given; a spline needs at least 4 (6 or more recommended)")]
    TooFewPoints { found: usize },
    #[error("the points must have strictly increasing r; r = {r} bohr repeats or goes back")]
    NotIncreasing { r: f64 },
    #[error("point at r = {r} bohr is not finite")]
    NotFinite { r: f64 },
    #[error("the three innermost points (r = {r0:.4} .. {r2:.4} bohr) do not rise steeply enough inward for a repulsive {form} wall; add points further in, or choose the other inner_wall form")]
    WallNotRepulsive {
        form: &'static str,
        r0: f64,
        r2: f64,
    },
    #[error("the outermost points cannot be joined to the limit {limit:.8} hartree by the chosen tail: {why}; give the limit, more points further out, or another outer_tail form")]
    TailFit { limit: f64, why: String },
    #[error("the outer tail needs {needed} points for its fit but the table has {found}")]
    TailNeedsPoints { needed: usize, found: usize },
    #[error("the tail coefficients ({coefficients}) do not match the powers ({powers}) in number")]
    TailShape { powers: usize, coefficients: usize },
}

/// How well the extrapolations join the spline at the ends of the table.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct JoinReport {
    /// Innermost point, bohr.
    pub inner_r: f64,
    /// Wall minus spline value at the innermost point, hartree.
    pub inner_value_mismatch: f64,
    /// Wall minus spline slope at the innermost point, hartree/bohr.
    pub inner_slope_mismatch: f64,
    /// Outermost point, bohr.
    pub outer_r: f64,
    /// Tail minus spline value at the outermost point, hartree.
    pub outer_value_mismatch: f64,
    /// Tail minus spline slope at the outermost point, hartree/bohr.
    pub outer_slope_mismatch: f64,
}

#[derive(Debug, Clone, Copy, PartialEq)]
struct Wall {
    form: InnerWall,
    offset: f64,
    scale: f64,
    exponent: f64,
}

impl Wall {
    fn basis(&self, r: f64) -> (f64, f64, f64) {
        basis(self.form_is_exp(), r, self.exponent)
    }
    fn form_is_exp(&self) -> bool {
        self.form == InnerWall::Exponential
    }
    fn evaluate(&self, r: f64) -> (f64, f64, f64) {
        let (f, d1, d2) = self.basis(r);
        (
            self.offset + self.scale * f,
            self.scale * d1,
            self.scale * d2,
        )
    }
}

/// f(r; s) = exp(-s r) or r^-s, with its first and second derivatives in r.
fn basis(exponential: bool, r: f64, s: f64) -> (f64, f64, f64) {
    if exponential {
        let f = (-s * r).exp();
        (f, -s * f, s * s * f)
    } else {
        let f = r.powf(-s);
        (f, -s * f / r, s * (s + 1.0) * f / (r * r))
    }
}

/// Fit V = A + B f(r; s) exactly through three points: s from the ratio
/// (V1 - V2)/(V2 - V3) = (f1 - f2)/(f2 - f3), which increases monotonically with s, by bisection.
fn fit_three_points(exponential: bool, r: [f64; 3], v: [f64; 3]) -> Option<(f64, f64, f64)> {
    let target = (v[0] - v[1]) / (v[1] - v[2]);
    if !target.is_finite() || target <= 0.0 {
        return None;
    }
    let ratio = |s: f64| {
        let f: Vec<f64> = r.iter().map(|&x| basis(exponential, x, s).0).collect();
        (f[0] - f[1]) / (f[1] - f[2])
    };
    let (mut lo, mut hi) = (1e-6f64, 1e-6f64);
    while ratio(hi) < target {
        lo = hi;
        hi *= 2.0;
        if hi > 1e4 || !ratio(hi).is_finite() {
            return None;
        }
    }
    if ratio(lo) > target {
        return None;
    }
    for _ in 0..200 {
        let mid = (lo * hi).sqrt();
        if ratio(mid) < target {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-14 * hi {
            break;
        }
    }
    let s = 0.5 * (lo + hi);
    let f: Vec<f64> = r.iter().map(|&x| basis(exponential, x, s).0).collect();
    let b = (v[0] - v[1]) / (f[0] - f[1]);
    Some((v[0] - b * f[0], b, s))
}

#[derive(Debug, Clone, PartialEq)]
enum Tail {
    Powers {
        limit: f64,
        powers: Vec<f64>,
        coefficients: Vec<f64>,
    },
    Exponential {
        limit: f64,
        amplitude: f64,
        rate: f64,
    },
}

impl Tail {
    fn limit(&self) -> f64 {
        match self {
            Tail::Powers { limit, .. } | Tail::Exponential { limit, .. } => *limit,
        }
    }
    fn evaluate(&self, r: f64) -> (f64, f64, f64) {
        match self {
            Tail::Powers {
                limit,
                powers,
                coefficients,
            } => powers
                .iter()
                .zip(coefficients)
                .fold((*limit, 0.0, 0.0), |acc, (&n, &c)| {
                    let f = c * r.powf(-n);
                    (
                        acc.0 - f,
                        acc.1 + n * f / r,
                        acc.2 - n * (n + 1.0) * f / (r * r),
                    )
                }),
            Tail::Exponential {
                limit,
                amplitude,
                rate,
            } => {
                let f = amplitude * (-rate * r).exp();
                (limit - f, rate * f, -rate * rate * f)
            }
        }
    }
}

/// Solve a small dense linear system by Gaussian elimination with partial pivoting.
fn solve_small(mut a: Vec<Vec<f64>>, mut b: Vec<f64>) -> Option<Vec<f64>> {
    let n = b.len();
    for col in 0..n {
        let pivot = (col..n).max_by(|&i, &j| a[i][col].abs().total_cmp(&a[j][col].abs()))?;
        if a[pivot][col].abs() < 1e-300 {
            return None;
        }
        a.swap(col, pivot);
        b.swap(col, pivot);
        let pivot_row = a[col].clone();
        for row in col + 1..n {
            let factor = a[row][col] / pivot_row[col];
            for (target, source) in a[row].iter_mut().zip(&pivot_row).skip(col) {
                *target -= factor * source;
            }
            b[row] -= factor * b[col];
        }
    }
    let mut x = vec![0.0; n];
    for row in (0..n).rev() {
        let sum: f64 = (row + 1..n).map(|k| a[row][k] * x[k]).sum();
        x[row] = (b[row] - sum) / a[row][row];
    }
    x.iter().all(|v| v.is_finite()).then_some(x)
}

fn fit_tail(
    r: &[f64],
    v: &[f64],
    tail: &OuterTail,
    limit: Option<f64>,
) -> Result<Tail, TabulatedError> {
    let n = r.len();
    let guess_limit = limit.unwrap_or(v[n - 1]);
    let fail = |why: &str| TabulatedError::TailFit {
        limit: guess_limit,
        why: why.to_string(),
    };
    match tail {
        OuterTail::InversePower {
            powers,
            coefficients,
        } => {
            let known = coefficients.clone().unwrap_or_default();
            if known.len() > powers.len() {
                return Err(TabulatedError::TailShape {
                    powers: powers.len(),
                    coefficients: known.len(),
                });
            }
            // Coefficients given for the leading powers are kept; the remaining ones (and L
            // when not given) are fitted so that the tail passes through the outermost points.
            let free_powers = &powers[known.len()..];
            let unknowns = free_powers.len() + usize::from(limit.is_none());
            if unknowns > n {
                return Err(TabulatedError::TailNeedsPoints {
                    needed: unknowns,
                    found: n,
                });
            }
            let known_part = |x: f64| -> f64 {
                powers
                    .iter()
                    .zip(&known)
                    .map(|(&p, &c)| c * x.powf(-p))
                    .sum()
            };
            let mut solution = Vec::new();
            if unknowns > 0 {
                // Rows: V_i + known(r_i) - L_given = -sum_free C_k r_i^-n_k (+ L when fitted).
                let rows = (n - unknowns..n).collect::<Vec<_>>();
                let matrix = rows
                    .iter()
                    .map(|&i| {
                        let mut row: Vec<f64> =
                            free_powers.iter().map(|&p| -r[i].powf(-p)).collect();
                        if limit.is_none() {
                            row.push(1.0);
                        }
                        row
                    })
                    .collect();
                let rhs = rows
                    .iter()
                    .map(|&i| v[i] + known_part(r[i]) - limit.unwrap_or(0.0))
                    .collect();
                solution = solve_small(matrix, rhs).ok_or_else(|| fail("the fit is singular"))?;
            }
            let mut coefficients = known;
            coefficients.extend_from_slice(&solution[..free_powers.len().min(solution.len())]);
            let fitted_limit = limit.unwrap_or_else(|| solution[free_powers.len()]);
            Ok(Tail::Powers {
                limit: fitted_limit,
                powers: powers.clone(),
                coefficients,
            })
        }
        OuterTail::Exponential => match limit {
            Some(l) => {
                let (r1, r2) = (r[n - 2], r[n - 1]);
                let (g1, g2) = (l - v[n - 2], l - v[n - 1]);
                if g1 <= 0.0 || g2 <= 0.0 || g2 >= g1 {
                    return Err(fail(
                        "the last two points do not approach the limit from below",
                    ));
                }
                let rate = (g1 / g2).ln() / (r2 - r1);
                Ok(Tail::Exponential {
                    limit: l,
                    amplitude: g2 * (rate * r2).exp(),
                    rate,
                })
            }
            None => {
                if n < 3 {
                    return Err(TabulatedError::TailNeedsPoints {
                        needed: 3,
                        found: n,
                    });
                }
                let (a, b, s) = fit_three_points(
                    true,
                    [r[n - 3], r[n - 2], r[n - 1]],
                    [v[n - 3], v[n - 2], v[n - 1]],
                )
                .ok_or_else(|| fail("the last three points do not level off exponentially"))?;
                if b >= 0.0 {
                    return Err(fail(
                        "the last three points do not approach a limit from below",
                    ));
                }
                Ok(Tail::Exponential {
                    limit: a,
                    amplitude: -b,
                    rate: s,
                })
            }
        },
    }
}

/// A curve from points: not-a-knot (or natural) cubic spline inside the table, a fitted wall
/// inward, a long-range tail outward.
///
/// ```
/// use rungs::curve::{InnerWall, OuterTail, PotentialCurve, SplineEnd, TabulatedCurve};
/// // Points of a Morse curve (hartree, bohr); the tail fitted through the last two points.
/// let morse = |r: f64| 0.1 * (1.0 - (-(r - 2.0)).exp()).powi(2);
/// let points: Vec<(f64, f64)> = (0..40).map(|i| { let r = 1.2 + 0.2 * i as f64; (r, morse(r)) }).collect();
/// let curve = TabulatedCurve::new(points, SplineEnd::NotAKnot, InnerWall::Exponential,
///     OuterTail::Exponential, Some(0.1)).unwrap();
/// assert!((curve.value(2.05) - morse(2.05)).abs() < 1e-5);
/// ```
#[derive(Debug, Clone)]
pub struct TabulatedCurve {
    spline: CubicSpline,
    wall: Wall,
    tail: Tail,
    join: JoinReport,
}

impl TabulatedCurve {
    /// Build from points (r in bohr, V in hartree), strictly increasing in r.
    /// `limit` is V(infinity) in hartree, or None to fit it with the tail.
    pub fn new(
        points: Vec<(f64, f64)>,
        end: SplineEnd,
        inner: InnerWall,
        outer: OuterTail,
        limit: Option<f64>,
    ) -> Result<TabulatedCurve, TabulatedError> {
        if points.len() < 4 {
            return Err(TabulatedError::TooFewPoints {
                found: points.len(),
            });
        }
        for (i, &(r, v)) in points.iter().enumerate() {
            if !r.is_finite() || !v.is_finite() {
                return Err(TabulatedError::NotFinite { r });
            }
            if i > 0 && r <= points[i - 1].0 {
                return Err(TabulatedError::NotIncreasing { r });
            }
        }
        let (r, v): (Vec<f64>, Vec<f64>) = points.into_iter().unzip();
        let exponential = inner == InnerWall::Exponential;
        let (offset, scale, exponent) =
            fit_three_points(exponential, [r[0], r[1], r[2]], [v[0], v[1], v[2]])
                .filter(|&(_, b, _)| b > 0.0)
                .ok_or(TabulatedError::WallNotRepulsive {
                    form: if exponential {
                        "exponential"
                    } else {
                        "inverse-power"
                    },
                    r0: r[0],
                    r2: r[2],
                })?;
        let wall = Wall {
            form: inner,
            offset,
            scale,
            exponent,
        };
        let tail = fit_tail(&r, &v, &outer, limit)?;
        let spline = CubicSpline::new(r.clone(), v, end);
        let n = r.len();
        let (inner_spline, outer_spline) = (spline.evaluate(r[0]), spline.evaluate(r[n - 1]));
        let (inner_wall, outer_tail) = (wall.evaluate(r[0]), tail.evaluate(r[n - 1]));
        let join = JoinReport {
            inner_r: r[0],
            inner_value_mismatch: inner_wall.0 - inner_spline.0,
            inner_slope_mismatch: inner_wall.1 - inner_spline.1,
            outer_r: r[n - 1],
            outer_value_mismatch: outer_tail.0 - outer_spline.0,
            outer_slope_mismatch: outer_tail.1 - outer_spline.1,
        };
        Ok(TabulatedCurve {
            spline,
            wall,
            tail,
            join,
        })
    }

    /// Value and slope mismatch where the extrapolations meet the spline.
    pub fn join(&self) -> JoinReport {
        self.join
    }

    /// The table's r range, bohr.
    pub fn table_range(&self) -> (f64, f64) {
        let (x, _) = self.spline.knots();
        (x[0], x[x.len() - 1])
    }

    /// The fitted or given long-range coefficients (power n, C_n in hartree bohr^n).
    pub fn tail_coefficients(&self) -> Vec<(f64, f64)> {
        match &self.tail {
            Tail::Powers {
                powers,
                coefficients,
                ..
            } => powers
                .iter()
                .copied()
                .zip(coefficients.iter().copied())
                .collect(),
            Tail::Exponential { .. } => Vec::new(),
        }
    }

    fn evaluate(&self, r: f64) -> (f64, f64, f64) {
        let (lo, hi) = self.table_range();
        if r < lo {
            self.wall.evaluate(r)
        } else if r > hi {
            self.tail.evaluate(r)
        } else {
            self.spline.evaluate(r)
        }
    }
}

impl PotentialCurve for TabulatedCurve {
    fn value(&self, r: f64) -> f64 {
        self.evaluate(r).0
    }
    fn is_piecewise(&self) -> bool {
        true
    }
    fn derivative(&self, r: f64) -> f64 {
        self.evaluate(r).1
    }
    fn second_derivative(&self, r: f64) -> f64 {
        self.evaluate(r).2
    }
    fn limit(&self) -> Option<f64> {
        Some(self.tail.limit())
    }
    fn well_range(&self) -> (f64, f64) {
        self.table_range()
    }
    fn long_range_power(&self) -> Option<f64> {
        match &self.tail {
            Tail::Powers { powers, .. } => powers.first().copied(),
            Tail::Exponential { .. } => None,
        }
    }
    fn describe(&self) -> String {
        let (lo, hi) = self.table_range();
        format!(
            "points: {} from {:.4} to {:.4} angstrom, limit {:.6} cm-1",
            self.spline.knots().0.len(),
            to_angstrom(lo),
            to_angstrom(hi),
            to_wavenumber(self.tail.limit())
        )
    }
    fn model_name(&self) -> &'static str {
        "points"
    }
    /// A table is adjusted through [`Adjusted`]: `depth_scale` (1) and `r_shift` (0).
    fn parameters(&self) -> Vec<CurveParameter> {
        self.as_adjusted().parameters()
    }
    fn with_parameters(&self, values: &[f64]) -> Result<Arc<dyn PotentialCurve>, ParameterError> {
        self.as_adjusted().with_parameters(values)
    }
    /// As [`Adjusted`] at s = 1, d = 0: dV/ds = V(r) - L, dV/dd = -V'(r).
    fn parameter_derivative(&self, index: usize, r: f64) -> f64 {
        match index {
            0 => self.value(r) - self.tail.limit(),
            1 => -self.derivative(r),
            _ => f64::NAN,
        }
    }
}

impl TabulatedCurve {
    fn as_adjusted(&self) -> Adjusted {
        Adjusted::identity(Arc::new(self.clone()))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn three_point_fits_recover_their_forms() {
        let r = [1.0, 1.3, 1.8];
        let exp = |x: f64| 0.2 + 3.0 * (-2.5 * x).exp();
        let (a, b, s) = fit_three_points(true, r, r.map(exp)).unwrap();
        assert!((a - 0.2).abs() < 1e-9 && (b - 3.0).abs() < 1e-8 && (s - 2.5).abs() < 1e-9);
        let pow = |x: f64| -0.1 + 0.7 * x.powf(-9.0);
        let (a, b, s) = fit_three_points(false, r, r.map(pow)).unwrap();
        assert!((a + 0.1).abs() < 1e-9 && (b - 0.7).abs() < 1e-8 && (s - 9.0).abs() < 1e-8);
    }

    #[test]
    fn power_tail_with_fitted_limit() {
        let f = |x: f64| -1.0 - 6.5 * x.powi(-6);
        let r: Vec<f64> = (0..8).map(|i| 4.0 + f64::from(i)).collect();
        let v: Vec<f64> = r.iter().map(|&x| f(x)).collect();
        let tail = fit_tail(&r, &v, &OuterTail::default(), None).unwrap();
        assert!((tail.limit() + 1.0).abs() < 1e-12);
        assert!((tail.evaluate(30.0).0 - f(30.0)).abs() < 1e-15);
    }
}
