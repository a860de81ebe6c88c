//! Property tests of the level solver on curves drawn at random from the families users bring:
//! Lennard-Jones (n, 6) wells from just above their first level to reduced strength 10^4,
//! -C3/r^3 and -C4/r^4 tails, Morse wells holding 1-5 and 200+ levels, a double well with a
//! barrier, and points tables of these, with random masses and J.
//!
//! Every count and energy of the production method (Numerov, its count by the zeros of the
//! solution at the limit) is held against the mapped sinc-DVR reference, whose own convergence
//! is shown on each case: the reference is computed on its automatic grid, on a grid with twice
//! the points and in a box twice as long, and its uncertainty is what those changes show. A
//! level passes when the two differ by no more than the two error bars together; the counts
//! must agree, except that the reference box (sized for a level bound by 1e-8 of the depth) may
//! miss a level the production count finds bound by less than that. Morse wells are also held
//! against Morse's exact levels and count (Phys. Rev. 34, 57 (1929)).
//!
//! CI runs a few thousand cases; `cargo test --release --test property -- --ignored` runs ten
//! times as many (the result of its last run is in docs/benchmarks.md).

use proptest::prelude::*;
use rungs::curve::{
    InnerWall, LennardJones, Morse, OuterTail, PotentialCurve, SplineEnd, TabulatedCurve,
};
use rungs::solver::dvr::{reference_energies, DVR_BOX_BINDING};
use rungs::solver::{solve, LevelStatus, RadialProblem, SolverError, SolverSettings};

/// A Morse well with a Gaussian barrier inside it (our own test curve): a double well whose
/// levels lie in either well and above the barrier.
#[derive(Debug, Clone, Copy)]
struct BarrierWell {
    morse: Morse,
    height: f64,
    centre: f64,
    width: f64,
}

impl BarrierWell {
    fn bump(&self, r: f64) -> (f64, f64, f64) {
        let t = (r - self.centre) / self.width;
        let g = self.height * (-t * t).exp();
        let d1 = -2.0 * t / self.width * g;
        let d2 = (4.0 * t * t - 2.0) / (self.width * self.width) * g;
        (g, d1, d2)
    }
}

impl PotentialCurve for BarrierWell {
    fn value(&self, r: f64) -> f64 {
        self.morse.value(r) + self.bump(r).0
    }
    fn derivative(&self, r: f64) -> f64 {
        self.morse.derivative(r) + self.bump(r).1
    }
    fn second_derivative(&self, r: f64) -> f64 {
        self.morse.second_derivative(r) + self.bump(r).2
    }
    fn limit(&self) -> Option<f64> {
        self.morse.limit()
    }
    fn well_range(&self) -> (f64, f64) {
        self.morse.well_range()
    }
    fn describe(&self) -> String {
        format!("{self:?}")
    }
    fn model_name(&self) -> &'static str {
        "barrier-well"
    }
}

/// The configuration of a family: `base` cases from a fixed seed in CI (a run that passes
/// passes again), ten times as many from a random seed for the sweep (RUNGS_LARGE_SWEEP set).
fn cases(base: u32) -> ProptestConfig {
    if std::env::var_os("RUNGS_LARGE_SWEEP").is_some() {
        ProptestConfig::with_cases(10 * base)
    } else {
        ProptestConfig {
            rng_seed: proptest::test_runner::RngSeed::Fixed(20261205),
            ..ProptestConfig::with_cases(base)
        }
    }
}

/// Hold the production solver against the reference on one curve (the reference at its
/// usual density and twice that, and in a box twice as long).
fn check(curve: &dyn PotentialCurve, mu: f64, j: u32) -> Result<(), TestCaseError> {
    check_against(curve, mu, j, Smoothness::Analytic)
}

/// How smooth a curve is, which decides what its energies are held against.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Smoothness {
    /// Analytic: the sinc-DVR converges exponentially and is the reference.
    Analytic,
    /// A points table: a cubic spline, continuous only to its second derivative and joined
    /// to its extrapolations with a slope mismatch, on which the sinc-DVR converges
    /// algebraically and erratically (1e-10 of the depth up and down between densities 1, 2
    /// and 4 while Numerov on fixed grids agrees with itself to 1e-13), so a table's count is
    /// held against the DVR and its energies against Numerov on fixed grids (a check of the
    /// error estimate across grids, each within its bar).
    Table,
}

fn check_against(
    curve: &dyn PotentialCurve,
    mu: f64,
    j: u32,
    smoothness: Smoothness,
) -> Result<(), TestCaseError> {
    let densities = [1.0, 2.0];
    let problem = RadialProblem::new(curve, mu, j);
    let settings = SolverSettings::default().with_distortion(false);
    let reference =
        |density: f64, box_factor| reference_energies(&problem, &settings, density, box_factor);
    let all: Result<Vec<_>, _> = densities.iter().map(|&d| reference(d, 1.0)).collect();
    let (all, longer) = match (all, reference(densities[0], 2.0)) {
        (Ok(all), Ok(longer)) => (all, longer),
        // A reference too large to build: nothing to hold against.
        (Err(SolverError::DvrTooLarge { .. }), _) | (_, Err(SolverError::DvrTooLarge { .. })) => {
            return Err(TestCaseError::reject("reference too large"))
        }
        // A curve without a well, or nothing bound: both methods must refuse alike.
        (Err(e), _) | (_, Err(e)) => {
            let production = solve(&problem, &settings);
            prop_assert!(
                production.is_err(),
                "reference refused ({e}) but Numerov solved"
            );
            return Ok(());
        }
    };
    let rounding = all
        .iter()
        .map(|r| r.rounding)
        .fold(longer.rounding, f64::max);
    let finest = &all[all.len() - 1].energies;
    let base = &all[0].energies;
    let longer = &longer.energies;
    let limit = curve.limit().expect("every family has a limit");
    let reference_count = finest.iter().filter(|&&e| e < limit).count();
    let set = match solve(&problem, &settings) {
        Ok(set) => set,
        Err(SolverError::NothingBound { .. }) => {
            prop_assert_eq!(reference_count, 0, "Numerov found nothing bound");
            return Ok(());
        }
        Err(e) => return Err(TestCaseError::fail(format!("Numerov failed: {e}"))),
    };
    let count = set.audit.bound_levels;
    prop_assert_eq!(set.levels.len(), count, "the table and the count disagree");
    let depth = limit - set.curve_minimum;
    // The reference box may miss only levels bound by less than it is sized for.
    prop_assert!(
        reference_count <= count,
        "reference {reference_count} > Numerov {count}"
    );
    for level in &set.levels[reference_count..] {
        prop_assert!(
            limit - level.energy < DVR_BOX_BINDING * depth,
            "v = {} (bound by {:e} of the depth) missing from the reference",
            level.v,
            (limit - level.energy) / depth
        );
    }
    if smoothness == Smoothness::Table {
        return check_on_fixed_grids(&problem, &set);
    }
    for (v, level) in set.levels.iter().enumerate().take(reference_count) {
        let reference = finest[v];
        let spread = all
            .iter()
            .map(|r| (r.energies[v] - reference).abs())
            .fold(0.0, f64::max);
        let uncertainty = spread + (base[v] - longer[v]).abs() + rounding;
        let difference = (level.energy - reference).abs();
        match level.status {
            LevelStatus::Unresolved => prop_assert!(
                reference > level.energy - level.error_estimate - uncertainty,
                "unresolved v = {v} claims too narrow an interval"
            ),
            _ => prop_assert!(
                difference <= level.error_estimate + uncertainty,
                "v = {v} of {count}: Numerov {:.15e} +- {:.2e}, reference {:.15e} +- {:.2e} (difference {:.2e}, depth {:.3e})",
                level.energy,
                level.error_estimate,
                reference,
                uncertainty,
                difference,
                depth
            ),
        }
    }
    Ok(())
}

/// Morse's exact levels and count (Phys. Rev. 34, 57 (1929)) against the solver, J = 0.
fn check_morse_exact(morse: &Morse, mu: f64) -> Result<(), TestCaseError> {
    let set = solve(
        &RadialProblem::new(morse, mu, 0),
        &SolverSettings::default(),
    )
    .unwrap();
    prop_assert_eq!(set.levels.len() as u32, morse.exact_level_count(mu));
    for level in &set.levels {
        let exact = morse.exact_level(level.v, mu);
        prop_assert!(
            (level.energy - exact).abs() <= level.error_estimate,
            "v = {}: {:e} off Morse's exact level, error estimate {:e}",
            level.v,
            level.energy - exact,
            level.error_estimate
        );
    }
    Ok(())
}

/// A table's levels against Numerov on fixed grids (steps 0.02 and 0.005 bohr, each
/// Richardson-extrapolated over three halvings): every level within both error bars.
fn check_on_fixed_grids(
    problem: &RadialProblem,
    set: &rungs::solver::LevelSet,
) -> Result<(), TestCaseError> {
    for step in [0.02, 0.005] {
        let settings = SolverSettings::default()
            .with_distortion(false)
            .with_grid(None, Some(step));
        let fixed = match solve(problem, &settings) {
            Ok(fixed) => fixed,
            // A step too coarse for this curve's wall: the automatic grid is the check then.
            Err(SolverError::UnderResolved { .. } | SolverError::StepTooCoarse { .. }) => continue,
            Err(e) => return Err(TestCaseError::fail(format!("fixed step {step}: {e}"))),
        };
        for (level, other) in set.levels.iter().zip(&fixed.levels) {
            if level.status == LevelStatus::Unresolved || other.status == LevelStatus::Unresolved {
                continue;
            }
            let difference = (level.energy - other.energy).abs();
            prop_assert!(
                difference <= level.error_estimate + other.error_estimate,
                "v = {}: {:.15e} +- {:.2e} against {:.15e} +- {:.2e} at step {step}",
                level.v,
                level.energy,
                level.error_estimate,
                other.energy,
                other.error_estimate
            );
        }
    }
    Ok(())
}

fn lennard_jones(n: f64, m: f64, eps: f64, sigma: f64, strength: f64) -> (LennardJones, f64) {
    // B = 2 mu eps sigma^2 (hbar = 1).
    let mu = strength / (2.0 * eps * sigma * sigma);
    (LennardJones::from_sigma(eps, sigma, n, m), mu)
}

fn rotation() -> impl Strategy<Value = u32> {
    prop_oneof![4 => Just(0u32), 1 => Just(1u32), 1 => Just(2u32), 1 => 3u32..12]
}

proptest! {
    #![proptest_config(cases(700))]
    #[test]
    fn lennard_jones_n_6(
        n in prop::sample::select(vec![8.0, 10.0, 12.0, 14.0]),
        log_eps in -5.0f64..-2.0,
        sigma in 4.0f64..9.0,
        log_strength in 0.7f64..4.0,
        j in rotation(),
    ) {
        let (curve, mu) = lennard_jones(n, 6.0, 10f64.powf(log_eps), sigma, 10f64.powf(log_strength));
        check(&curve, mu, j)?;
    }
}

proptest! {
    #![proptest_config(cases(200))]
    #[test]
    fn slow_tails(
        (n, m) in prop::sample::select(vec![(12.0, 3.0), (12.0, 4.0), (10.0, 4.0), (8.0, 3.0)]),
        log_eps in -5.0f64..-2.0,
        sigma in 4.0f64..9.0,
        log_strength in 0.7f64..3.5,
        j in rotation(),
    ) {
        let (curve, mu) = lennard_jones(n, m, 10f64.powf(log_eps), sigma, 10f64.powf(log_strength));
        check(&curve, mu, j)?;
    }
}

proptest! {
    #![proptest_config(cases(400))]
    #[test]
    fn morse_few_levels(
        lambda in 0.55f64..5.5,
        log_depth in -4.0f64..-0.7,
        r_e in 2.0f64..6.0,
        steepness in 6.0f64..12.0,
        j in rotation(),
    ) {
        // lambda = sqrt(2 mu D) / a sets the count, floor(lambda - 1/2) + 1 for J = 0; a r_e >= 6
        // keeps the wall at r = 0 far above the well, so the whole-line levels apply.
        let depth = 10f64.powf(log_depth);
        let width = steepness / r_e;
        let mu = (lambda * width).powi(2) / (2.0 * depth);
        let morse = Morse::new(depth, width, r_e);
        check(&morse, mu, j)?;
        if j == 0 {
            check_morse_exact(&morse, mu)?;
        }
    }
}

proptest! {
    #![proptest_config(cases(12))]
    #[test]
    fn morse_many_levels(
        lambda in 200.6f64..260.0,
        r_e in 4.0f64..7.0,
    ) {
        // Held against Morse's exact levels (J = 0): the dense reference of 230 levels would
        // take seconds a case.
        let (depth, width) = (0.06, 1.2);
        let mu = (lambda * width).powi(2) / (2.0 * depth);
        check_morse_exact(&Morse::new(depth, width, r_e), mu)?;
    }
}

proptest! {
    #![proptest_config(cases(250))]
    #[test]
    fn double_well(
        depth in 0.01f64..0.05,
        width in 0.6f64..1.2,
        r_e in 3.0f64..5.0,
        height in 0.2f64..0.8,
        offset in 0.3f64..1.0,
        spread in 0.2f64..0.5,
        log_mu in 3.0f64..4.3,
        j in rotation(),
    ) {
        let curve = BarrierWell {
            morse: Morse::new(depth, width, r_e),
            height: height * depth,
            centre: r_e + offset / width,
            width: spread / width,
        };
        check(&curve, 10f64.powf(log_mu), j)?;
    }
}

proptest! {
    #![proptest_config(cases(250))]
    #[test]
    fn points_tables(
        family in 0usize..3,
        points in 60usize..250,
        log_eps in -4.5f64..-2.5,
        sigma in 4.0f64..8.0,
        log_strength in 1.0f64..3.5,
        j in rotation(),
    ) {
        // A table of a Lennard-Jones 12-6 or 12-4 curve, or a Morse curve, from 0.7 sigma (far
        // up the wall) out to 10 sigma (deep in the tail), joined to its exact limit by the
        // matching tail: the joins' slope mismatches are then negligible. (A table cut where
        // its levels still live is joined with a kink, which no error estimate on grids can
        // see; issue 17 makes the joins smooth and flags such tables.)
        let eps = 10f64.powf(log_eps);
        let (analytic, mu, outer): (Box<dyn PotentialCurve>, f64, OuterTail) = match family {
            0 | 1 => {
                let m = if family == 0 { 6.0 } else { 4.0 };
                let (curve, mu) = lennard_jones(12.0, m, eps, sigma, 10f64.powf(log_strength));
                (Box::new(curve), mu, OuterTail::InversePower { powers: vec![m], coefficients: None })
            }
            _ => {
                let width = 6.0 / sigma;
                let mu = (10f64.powf(log_strength).sqrt() * width).powi(2) / (2.0 * eps);
                (Box::new(Morse::new(eps, width, sigma)), mu, OuterTail::Exponential)
            }
        };
        let (lo, hi) = (0.7 * sigma, 10.0 * sigma);
        let table: Vec<(f64, f64)> = (0..points)
            .map(|k| {
                let r = lo * (hi / lo).powf(k as f64 / (points - 1) as f64);
                (r, analytic.value(r))
            })
            .collect();
        let curve = TabulatedCurve::new(
            table,
            SplineEnd::NotAKnot,
            InnerWall::Exponential,
            outer,
            analytic.limit(),
        )
        .map_err(|e| TestCaseError::reject(e.to_string()))?;
        check_against(&curve, mu, j, Smoothness::Table)?;
    }
}
