//! Uniform radial grids and the choice of their bounds and spacing.
//!
//! Bounds: inward, the grid starts where the WKB decay integral int kappa dr, kappa =
//! sqrt(2 mu (V_eff - E)), measured from the inner turning point of the highest energy sought
//! reaches [`DECAY_TARGET`] (the amplitude has fallen by e^-30), or earlier if the wall grows
//! so steep that the Numerov factor h^2 Q / 12 would exceed 1/2. Outward, a level at energy E
//! needs the same decay integral past its outer turning point. Spacing: a fixed number of
//! points per local de Broglie wavelength 2 pi / sqrt(2 mu (E - V_eff)) at the deepest point.

use super::RadialProblem;

/// Amplitude decay, as int kappa dr, demanded at both ends of a grid. e^-30 ~ 1e-13 in the
/// amplitude, 1e-26 in the probability: far below any energy tolerance.
pub const DECAY_TARGET: f64 = 30.0;

/// A uniform grid r_i = start + i * step, i = 0 ..= intervals, with psi = 0 at both ends.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct UniformGrid {
    pub start: f64,
    pub step: f64,
    pub intervals: usize,
}

impl UniformGrid {
    pub fn end(&self) -> f64 {
        self.start + self.step * self.intervals as f64
    }
    pub fn r(&self, i: usize) -> f64 {
        self.start + self.step * i as f64
    }
    /// The same range with the step divided by `factor`.
    pub fn refined(&self, factor: usize) -> UniformGrid {
        UniformGrid {
            start: self.start,
            step: self.step / factor as f64,
            intervals: self.intervals * factor,
        }
    }
    /// Interior points (where psi is unknown).
    pub fn interior_points(&self) -> usize {
        self.intervals.saturating_sub(1)
    }
}

/// Where the grid starts: inward from the inner turning point of `energy` until the decay
/// integral reaches the target, the Numerov factor limit is met, or r reaches `floor`.
/// Returns the start and the decay reached there (the target when it was reached, or infinite
/// at the floor, where nothing lies further in; short of the target, the step is too coarse
/// for the wall: a finer step lets the grid reach further in).
pub fn inner_bound(
    problem: &RadialProblem,
    energy: f64,
    inner_turning: f64,
    step: f64,
    v_floor: f64,
) -> (f64, f64) {
    let mu = problem.reduced_mass;
    let floor = 1e-3 * inner_turning;
    let mut r = inner_turning;
    let mut decay = 0.0;
    let dr = step.min(0.01 * inner_turning);
    while r - dr > floor {
        let next = r - dr;
        let excess = problem.effective(next) - energy;
        if excess.is_nan() {
            break;
        }
        // Keep h^2 * 2 mu (V - V_floor) / 12 below 1/2 for the coarsest step.
        if step * step * 2.0 * mu * (problem.effective(next) - v_floor) / 12.0 > 0.5 {
            break;
        }
        decay += (2.0 * mu * excess.max(0.0)).sqrt() * dr;
        r = next;
        if decay >= DECAY_TARGET {
            return (r, decay);
        }
    }
    (
        r,
        if r - dr <= floor {
            f64::INFINITY
        } else {
            decay
        },
    )
}

/// Decay integral a box already sized for a level must hold past the level's outer turning
/// point, once the level is known (its box was sized from a guess, with [`DECAY_TARGET`]).
/// e^-25 ~ 1e-11 in the amplitude: the wall then moves the level by a relative e^-50 ~ 1e-22
/// (the shift goes as the squared amplitude at the wall), so a box this short of the target
/// needs no regrowing.
pub const DECAY_HELD: f64 = 25.0;

/// Where a level at `energy` needs the grid to end: past its outer turning point until the
/// decay integral reaches [`DECAY_TARGET`], or `cap`.
pub fn outer_bound(problem: &RadialProblem, energy: f64, outer_turning: f64, cap: f64) -> f64 {
    outer_bound_for(problem, energy, outer_turning, cap, DECAY_TARGET)
}

/// Where the decay integral past `outer_turning` reaches `decay`, or `cap`.
pub fn outer_bound_for(
    problem: &RadialProblem,
    energy: f64,
    outer_turning: f64,
    cap: f64,
    decay_target: f64,
) -> f64 {
    decay_walk(problem, energy, outer_turning, cap, decay_target).0
}

/// The decay integral int kappa dr from `outer_turning` to `end` (stopping early once past
/// 60, far beyond any use).
pub fn decay_to(problem: &RadialProblem, energy: f64, outer_turning: f64, end: f64) -> f64 {
    decay_walk(problem, energy, outer_turning, end, 60.0).1
}

/// Walk outward from `outer_turning` until the decay integral reaches `target` or r reaches
/// `cap`: (where it stopped, the decay reached).
fn decay_walk(
    problem: &RadialProblem,
    energy: f64,
    outer_turning: f64,
    cap: f64,
    target: f64,
) -> (f64, f64) {
    let mu = problem.reduced_mass;
    let kappa_at = |r: f64| (2.0 * mu * (problem.effective(r) - energy).max(0.0)).sqrt();
    let mut r = outer_turning;
    let mut kappa = kappa_at(r);
    let mut decay = 0.0;
    while decay < target && r < cap {
        // Steps of half the decay length, at least 0.01 bohr, at most 5% of r; the integral by
        // the trapezoidal rule.
        let longest = 0.05 * r.max(1.0);
        let dr = if kappa > 0.0 {
            (0.5 / kappa).clamp(0.01f64.min(longest), longest)
        } else {
            longest
        };
        let next = kappa_at(r + dr);
        decay += 0.5 * (kappa + next) * dr;
        (r, kappa) = (r + dr, next);
    }
    (r.min(cap), decay)
}

/// Grid step giving `points_per_wavelength` at the largest local momentum below `energy`.
pub fn step_for(
    problem: &RadialProblem,
    energy: f64,
    v_floor: f64,
    points_per_wavelength: f64,
) -> f64 {
    let k_max = (2.0 * problem.reduced_mass * (energy - v_floor)).sqrt();
    2.0 * std::f64::consts::PI / (k_max * points_per_wavelength)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::curve::Morse;

    #[test]
    fn outer_bound_of_a_deep_level_is_near_its_turning_point() {
        let morse = Morse::new(0.18, 1.0, 1.4);
        let problem = RadialProblem::new(&morse, 918.0, 0);
        let end = outer_bound(&problem, 0.0227, 1.834, 176.0);
        assert!(end < 5.0, "{end}");
        // Starting exactly at the turning point, where kappa is nearly zero (a bug once).
        let turning = 1.4 - (1.0 - (0.0227f64 / 0.18).sqrt()).ln();
        let end = outer_bound(&problem, 0.0227, turning, 176.0);
        assert!(end < 5.0, "{end}");
    }

    #[test]
    fn held_bound_falls_short_of_the_target_by_the_missing_decay() {
        // Far past the well kappa is nearly its asymptotic value sqrt(2 mu (D - E)), so the
        // decay integral grows linearly (WKB, textbook): the bound for DECAY_HELD ends
        // (DECAY_TARGET - DECAY_HELD) / kappa before the bound for DECAY_TARGET. 5% allows
        // for kappa still above its asymptote there and for the integration steps of half a
        // decay length (our own allowance).
        let (depth, energy) = (0.18, 0.17);
        let morse = Morse::new(depth, 1.0, 1.4);
        let problem = RadialProblem::new(&morse, 918.0, 0);
        let turning = 1.4 - (1.0 - (energy / depth).sqrt()).ln();
        let target = outer_bound(&problem, energy, turning, 500.0);
        let held = outer_bound_for(&problem, energy, turning, 500.0, DECAY_HELD);
        let kappa = (2.0 * 918.0 * (depth - energy)).sqrt();
        let expected = (DECAY_TARGET - DECAY_HELD) / kappa;
        assert!(
            ((target - held) / expected - 1.0).abs() < 0.05,
            "{} {expected}",
            target - held
        );
    }
}
