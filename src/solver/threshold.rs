//! How many levels lie below the dissociation limit, from the solution at the limit itself.
//!
//! Sturm's oscillation theorem for the radial equation: the number of levels below an energy E
//! equals the number of zeros on (0, infinity) of the solution at E that vanishes at the inner
//! wall (e.g. R. Courant and D. Hilbert, "Methods of Mathematical Physics" I (1953), ch. VI;
//! at E = the limit this is the node-counting form of Levinson's theorem). The count needs no
//! box: it holds a level bound by any amount, however far its wavefunction reaches, which a
//! count of a finite box cannot.
//!
//! In x = ln r with psi = r^(1/2) phi (the Liouville transformation of [`super::mapping`] with
//! r = e^x, whose Schwarzian term is 1/4) the equation at the limit L reads
//!
//! ```text
//!   phi'' = w(x) phi,   w = 2 mu r^2 (V(r) - L) + J(J+1) - Omega^2 + 1/4,
//! ```
//!
//! uniform in x, so the well and a tail reaching 10^10 bohr take a few thousand Numerov points.
//! Far out, where 2 mu r^2 (V - L) has died away, w tends to a constant lambda^2 and
//! phi = a e^(lambda x) + b e^(-lambda x): u = r^(1/2) phi = a r^(1/2 + lambda) + b r^(1/2 - lambda)
//! (for J = 0, lambda = 1/2 and u = a r + b, whose zero -b/a is the scattering length). One more
//! zero lies beyond the last point exactly when -b/a > 1 there; it belongs to a level bound by
//! very little. The count is repeated with the step halved until two steps agree.
//!
//! A tail that does not fall faster than r^-2 changes the picture: an attractive -C/r tail (a
//! Coulomb or Kratzer curve) or a -C/r^2 tail with 2 mu C > (J(J+1) - Omega^2 + 1/4) holds
//! infinitely many levels; a weaker r^-2 tail only changes lambda.

use super::RadialProblem;

/// Decay (int kappa dr) from the inner turning point at the limit to where the count starts.
const WALL_DECAY: f64 = 30.0;
/// The far form is taken once |2 mu r^2 (V - L)| is below this fraction of lambda^2.
const FAR_FRACTION: f64 = 1e-4;
/// Largest radius the far form is sought to, bohr.
const FARTHEST: f64 = 1e15;
/// Points per local wavelength (in x) of the first count.
const POINTS_PER_WAVELENGTH: f64 = 24.0;
/// Halvings of the step tried before the count is declared unsettled.
const MAX_HALVINGS: usize = 4;

/// What the tail at the limit allows.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum TailClass {
    /// The tail falls off fast enough for a finite number of levels.
    Finite,
    /// An attractive tail as slow as r^-1, or r^-2 beyond the critical strength: infinitely
    /// many levels accumulate at the limit. `power` is the tail's power (1 or 2).
    Infinite { power: u32 },
}

/// The number of levels below the limit, from the zero-energy solution.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ThresholdCount {
    pub levels: usize,
    /// Where the far form was taken, bohr.
    pub far_radius: f64,
    /// The count is certain: the two finest steps agree, and the far form's balance a/b lies
    /// clear of zero by ten times its change between them. When it does not, a level may sit at
    /// the limit itself, bound (or not) by less than the count can resolve.
    pub settled: bool,
}

/// Classify the tail of `problem`'s effective curve at `limit` by s(r) = 2 mu r^2 (V - L) far
/// from the well: s shrinks for tails faster than r^-2, tends to a constant for r^-2 and grows
/// for r^-1.
pub fn classify_tail(problem: &RadialProblem, limit: f64, r_well: f64) -> TailClass {
    let lambda_squared = angular_term(problem);
    let s = |r: f64| 2.0 * problem.reduced_mass * r * r * (problem.curve.value(r) - limit);
    // Far enough out that the well's own shape no longer shows: 1e4 and 4e4 times r_e.
    let (near, far) = (1e4 * r_well, 4e4 * r_well);
    let (s_near, s_far) = (s(near), s(far));
    if !(s_near.is_finite() && s_far.is_finite()) {
        return TailClass::Finite;
    }
    // -C/r: s = -2 mu C r grows fourfold per step (3.5 allows for the next term).
    if s_far < 0.0 && s_far < 3.5 * s_near.min(0.0) && s_far.abs() > lambda_squared {
        return TailClass::Infinite { power: 1 };
    }
    // -C/r^2: s tends to a constant; infinitely many levels once it outweighs lambda^2.
    let steady = (s_far - s_near).abs() <= 0.1 * s_far.abs();
    if steady && s_far + lambda_squared < 0.0 {
        return TailClass::Infinite { power: 2 };
    }
    TailClass::Finite
}

/// J(J+1) - Omega^2 + 1/4: lambda^2 of the far form when the tail falls faster than r^-2.
fn angular_term(problem: &RadialProblem) -> f64 {
    2.0 * problem.reduced_mass * problem.centrifugal_strength() + 0.25
}

/// The number of levels of `problem` below `limit` (a curve with a finite tail, see
/// [`classify_tail`]), counting from the inner turning point `inner_turning` at the limit.
pub fn count_below_limit(
    problem: &RadialProblem,
    limit: f64,
    inner_turning: f64,
) -> ThresholdCount {
    let mu = problem.reduced_mass;
    let angular = angular_term(problem);
    let w = |x: f64| {
        let r = x.exp();
        2.0 * mu * r * r * (problem.curve.value(r) - limit) + angular
    };
    let start = wall_start(problem, limit, inner_turning).ln();
    let settled_far = |x: f64| (w(x) - angular).abs() <= FAR_FRACTION * angular;
    let mut far = (inner_turning * 4.0).ln();
    while far < FARTHEST.ln() && !(settled_far(far) && settled_far(far + 2.0)) {
        far += 0.5;
    }
    // The step: POINTS_PER_WAVELENGTH at the largest local wavenumber sqrt(-w), sampled on 4000
    // points; no coarser than 1/20 of a unit of x, and the Numerov factor h^2 w / 12 kept below
    // 1/2 at the wall.
    let samples = 4000;
    let largest = (0..=samples)
        .map(|k| -w(start + (far - start) * k as f64 / samples as f64))
        .fold(0.0f64, f64::max);
    let mut step =
        (2.0 * std::f64::consts::PI / (POINTS_PER_WAVELENGTH * largest.sqrt())).min(0.05);
    let wall = w(start).max(0.0);
    if wall > 0.0 {
        step = step.min((6.0 / wall).sqrt());
    }
    let mut previous = march_at_limit(&w, start, far, step);
    let mut settled = false;
    for _ in 0..MAX_HALVINGS {
        step *= 0.5;
        let finer = march_at_limit(&w, start, far, step);
        let change = (finer.balance - previous.balance).abs();
        settled = finer.count() == previous.count() && finer.balance.abs() > 10.0 * change;
        previous = finer;
        if settled {
            break;
        }
    }
    ThresholdCount {
        levels: previous.count(),
        far_radius: far.exp(),
        settled,
    }
}

/// Where the count starts: inward from the inner turning point until the decay integral
/// int sqrt(2 mu (V_eff - L)) dr reaches [`WALL_DECAY`], or r has fallen to 1/1000 of it.
fn wall_start(problem: &RadialProblem, limit: f64, inner_turning: f64) -> f64 {
    let dr = 1e-3 * inner_turning;
    let mut r = inner_turning;
    let mut decay = 0.0;
    while decay < WALL_DECAY && r - dr > dr {
        let excess = problem.effective(r - dr) - limit;
        if !excess.is_finite() {
            break;
        }
        decay += (2.0 * problem.reduced_mass * excess.max(0.0)).sqrt() * dr;
        r -= dr;
    }
    r
}

/// The zero-energy solution on one grid: its zeros up to the far point, and the balance a/b
/// of its far form a e^(lambda t) + b e^(-lambda t) (t = x - x_far).
#[derive(Debug, Clone, Copy)]
struct LimitMarch {
    zeros: usize,
    balance: f64,
}

impl LimitMarch {
    /// The zeros on (start, infinity): one more lies beyond the far point (at
    /// e^(2 lambda t) = -b/a, t > 0) exactly when -1 < a/b < 0.
    fn count(&self) -> usize {
        self.zeros + usize::from(self.balance > -1.0 && self.balance < 0.0)
    }
}

/// March phi'' = w phi from phi(start) = 0 to `far` by Numerov's scheme with step `step`,
/// counting sign changes, and fit the far form through the last two points
/// (lambda^2 = w(far)).
fn march_at_limit(w: &impl Fn(f64) -> f64, start: f64, far: f64, step: f64) -> LimitMarch {
    let n = ((far - start) / step).ceil() as usize;
    let h2_12 = step * step / 12.0;
    // Y = (1 - h^2 w / 12) phi; Y_{i+1} = (2 + h^2 w_i / f_i) Y_i - Y_{i-1}.
    let (mut y_previous, mut y) = (0.0f64, 1e-30f64);
    let (mut phi_previous, mut phi) = (0.0f64, 0.0f64);
    let mut zeros = 0;
    let mut sign = 0.0f64;
    for i in 1..=n {
        let wi = w(start + step * i as f64);
        let factor = 1.0 - h2_12 * wi;
        phi_previous = phi;
        phi = y / factor;
        if phi != 0.0 {
            if sign != 0.0 && phi.signum() != sign {
                zeros += 1;
            }
            sign = phi.signum();
        }
        let next = (2.0 + 12.0 * h2_12 * wi / factor) * y - y_previous;
        (y_previous, y) = (y, next);
        if y.abs() > 1e100 {
            y_previous *= 1e-100;
            y *= 1e-100;
            phi *= 1e-100;
        }
    }
    let lambda = w(start + step * n as f64).max(0.0).sqrt();
    // phi(t) = a e^(lambda t) + b e^(-lambda t) with phi(0) = phi_n, phi(-h) = phi_(n-1).
    let (grow, shrink) = ((lambda * step).exp(), (-lambda * step).exp());
    let a = (phi * grow - phi_previous) / (grow - shrink);
    let b = phi - a;
    LimitMarch {
        zeros,
        balance: a / b,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::curve::{LennardJones, Morse};

    #[test]
    fn morse_count_is_exact() {
        // Morse, Phys. Rev. 34, 57 (1929): floor(lambda - 1/2) + 1 levels for J = 0, with
        // lambda = sqrt(2 mu D) / a. Curves with lambda just above and below a half-integer.
        for (depth, mu) in [(0.17, 918.0), (0.02, 5000.0), (0.001, 1000.0), (0.1, 3e4)] {
            // r_e = 3 bohr, a = 1/bohr: the inner turning point at the limit is r_e - ln 2.
            let morse = Morse::new(depth, 1.0, 3.0);
            let problem = RadialProblem::new(&morse, mu, 0);
            let count = count_below_limit(&problem, depth, 3.0 - 2f64.ln());
            assert!(count.settled);
            assert_eq!(
                count.levels as u32,
                morse.exact_level_count(mu),
                "{depth} {mu}"
            );
        }
    }

    #[test]
    fn a_level_bound_by_1e_minus_12_of_the_depth_is_counted() {
        // Morse with lambda = 10.5 + 1e-5: the last level, v = 10, has lambda - v - 1/2 = 1e-5
        // and binding a^2 (lambda - v - 1/2)^2 / (2 mu) = 1e-10 / (2 mu), 1e-12 of the depth
        // here (Morse's formula); a box count would need a box of thousands of bohr.
        let mu = 1000.0;
        let lambda: f64 = 10.5 + 1e-5;
        let depth = lambda * lambda / (2.0 * mu);
        let morse = Morse::new(depth, 1.0, 3.0);
        let problem = RadialProblem::new(&morse, mu, 0);
        let count = count_below_limit(&problem, depth, 2.5);
        assert_eq!((count.levels, count.settled), (11, true));
        // Just below the half-integer the eleventh level is gone.
        let depth = (10.5f64 - 1e-5).powi(2) / (2.0 * mu);
        let morse = Morse::new(depth, 1.0, 3.0);
        let count = count_below_limit(&RadialProblem::new(&morse, mu, 0), depth, 2.5);
        assert_eq!((count.levels, count.settled), (10, true));
    }

    #[test]
    fn tails_are_classified() {
        let lj = LennardJones::new(1e-3, 7.0, 12.0, 6.0);
        let problem = RadialProblem::new(&lj, 3e4, 0);
        assert_eq!(classify_tail(&problem, 0.0, 7.0), TailClass::Finite);
        // Kratzer (Lennard-Jones with powers 2, 1): a -2 D r_e / r tail.
        let kratzer = LennardJones::new(1e-3, 2.0, 2.0, 1.0);
        let problem = RadialProblem::new(&kratzer, 3e4, 0);
        assert_eq!(
            classify_tail(&problem, 0.0, 2.0),
            TailClass::Infinite { power: 1 }
        );
        // Powers (3, 2): a -3 D r_e^2 / r^2 tail; 2 mu C = 2 * 3e4 * 3e-3 * 4 = 720 > 1/4.
        let inverse_square = LennardJones::new(1e-3, 2.0, 3.0, 2.0);
        let problem = RadialProblem::new(&inverse_square, 3e4, 0);
        assert_eq!(
            classify_tail(&problem, 0.0, 2.0),
            TailClass::Infinite { power: 2 }
        );
    }
}
