//! Fitting curve parameters to measured levels: recovery from exact Morse levels, coverage of
//! the reported standard errors under noise of known size, several isotopologues, a tabulated
//! curve adjusted by depth scale and r shift, and the refusals.

mod common;

use common::{hcl_morse, mu_of};
use rand::SeedableRng;
use rand_distr::{Distribution, Normal};
use rungs::compare::EnergyZero;
use rungs::curve::{InnerWall, Morse, OuterTail, PotentialCurve, SplineEnd, TabulatedCurve};
use rungs::fit::{fit, FitError, FitOutcome, FitRequest, Isotopologue};
use rungs::reader::MeasuredLevel;
use rungs::solver::{solve, RadialProblem, SolverSettings};
use rungs::units::from_wavenumber;
use std::sync::Arc;

fn level(v: u32, j: u32, energy: f64, uncertainty_cm: f64, tag: Option<&str>) -> MeasuredLevel {
    MeasuredLevel {
        v,
        j,
        energy,
        uncertainty: from_wavenumber(uncertainty_cm),
        tag: tag.map(str::to_string),
        line: 0,
        lower: None,
    }
}

/// Exact J = 0 Morse levels above the minimum (Morse 1929), v = 0..count.
fn exact_levels(morse: &Morse, mu: f64, count: u32, tag: Option<&str>) -> Vec<MeasuredLevel> {
    (0..count)
        .map(|v| level(v, 0, morse.exact_level(v, mu), 1e-3, tag))
        .collect()
}

fn isotopologue(tag: Option<&str>, first: &str, second: &str) -> Isotopologue {
    Isotopologue {
        tag: tag.map(str::to_string),
        label: format!("{first}-{second}"),
        reduced_mass: mu_of(first, second),
    }
}

fn request<'a>(
    curve: Arc<dyn PotentialCurve>,
    vary: &[&str],
    isotopologues: Vec<Isotopologue>,
    measured: &'a [MeasuredLevel],
    zero: EnergyZero,
) -> FitRequest<'a> {
    FitRequest {
        curve,
        vary: vary.iter().map(|s| s.to_string()).collect(),
        isotopologues,
        measured,
        zero,
        omega: 0,
        settings: SolverSettings::default(),
        max_evaluations: 200,
    }
}

fn value(outcome: &FitOutcome, name: &str) -> (f64, f64) {
    let p = outcome.parameters.iter().find(|p| p.name == name).unwrap();
    (p.value, p.standard_error)
}

fn quiet(_: rungs::fit::FitProgress) {}

/// Term values (relative to v = 0 of the first J) of levels v = 0..=highest_v at each J,
/// computed by the solver (its accuracy is checked against the Morse formula in
/// tests/levels.rs).
fn rotating_levels(
    curve: &dyn PotentialCurve,
    mu: f64,
    js: &[u32],
    highest_v: u32,
) -> Vec<MeasuredLevel> {
    let settings = SolverSettings::default().with_highest_v(Some(highest_v));
    let mut measured = Vec::new();
    let mut zero = None;
    for &j in js {
        let set = solve(&RadialProblem::new(curve, mu, j), &settings).unwrap();
        let origin = *zero.get_or_insert(set.levels[0].energy);
        for l in &set.levels {
            measured.push(level(l.v, j, l.energy - origin, 1e-3, None));
        }
    }
    measured
}

/// Fit HCl data (one isotopologue) and insist on convergence.
fn fit_hcl(
    curve: Arc<dyn PotentialCurve>,
    vary: &[&str],
    measured: &[MeasuredLevel],
    zero: EnergyZero,
) -> FitOutcome {
    let outcome = fit(
        &request(
            curve,
            vary,
            vec![isotopologue(None, "1H", "35Cl")],
            measured,
            zero,
        ),
        &quiet,
    )
    .unwrap();
    assert!(outcome.converged, "{}", outcome.termination);
    outcome
}

#[test]
fn recovers_morse_depth_and_width_from_exact_levels() {
    // HCl constants (Huber & Herzberg 1979, via tests/data/diatomic_constants.csv); exact
    // levels from the Morse formula; start 10% away in both parameters.
    let (truth, mu) = hcl_morse();
    let measured = exact_levels(&truth, mu, 15, None);
    let start = Morse::new(1.1 * truth.well_depth, 0.9 * truth.width, truth.r_e);
    let outcome = fit_hcl(
        Arc::new(start),
        &["well_depth", "width"],
        &measured,
        EnergyZero::CurveMinimum,
    );
    let (depth, _) = value(&outcome, "well_depth");
    let (width, _) = value(&outcome, "width");
    // 1e-7 relative: the recovery the issue asks for.
    assert!((depth / truth.well_depth - 1.0).abs() < 1e-7, "{depth}");
    assert!((width / truth.width - 1.0).abs() < 1e-7, "{width}");
    assert!(outcome.comparison.unassigned.is_empty());
    // Our own sanity bound: from 10% away, chi^2 must fall by at least a million.
    assert!(outcome.initial_chi_squared > 1e6 * outcome.chi_squared.max(1e-12));
}

#[test]
fn recovers_r_e_from_rotating_levels_on_the_lowest_level_zero() {
    // Levels at J = 0, 3, 6 computed by the solver on the true curve (its accuracy, 1e-6
    // cm-1, is checked against the Morse formula in tests/levels.rs); term values relative to
    // v = 0, J = 0 as measured data usually are. All three Morse parameters 10% away.
    let (truth, mu) = hcl_morse();
    let measured = rotating_levels(&truth, mu, &[0, 3, 6], 9);
    let start = Morse::new(0.9 * truth.well_depth, 1.1 * truth.width, 1.1 * truth.r_e);
    let outcome = fit_hcl(
        Arc::new(start),
        &["well_depth", "width", "r_e"],
        &measured,
        EnergyZero::LowestLevel,
    );
    for (name, true_value) in [
        ("well_depth", truth.well_depth),
        ("width", truth.width),
        ("r_e", truth.r_e),
    ] {
        let (fitted, _) = value(&outcome, name);
        assert!(
            (fitted / true_value - 1.0).abs() < 1e-7,
            "{name}: {fitted} vs {true_value}"
        );
    }
    assert_eq!(outcome.correlation.len(), 3);
    assert!((outcome.correlation[0][0] - 1.0).abs() < 1e-12);
}

#[test]
fn two_isotopologues_share_one_curve() {
    // H35Cl and D35Cl levels, each exact for its own reduced mass (AME2020 masses), in one fit.
    let (truth, mu_h) = hcl_morse();
    let mu_d = mu_of("2H", "35Cl");
    let mut measured = exact_levels(&truth, mu_h, 8, Some("HCl"));
    measured.extend(exact_levels(&truth, mu_d, 8, Some("DCl")));
    let start = Morse::new(1.1 * truth.well_depth, 0.9 * truth.width, truth.r_e);
    let outcome = fit(
        &request(
            Arc::new(start),
            &["well_depth", "width"],
            vec![
                isotopologue(Some("HCl"), "1H", "35Cl"),
                isotopologue(Some("DCl"), "2H", "35Cl"),
            ],
            &measured,
            EnergyZero::CurveMinimum,
        ),
        &quiet,
    )
    .unwrap();
    assert!(outcome.converged, "{}", outcome.termination);
    // 1e-7 relative as above; the rms bound is ten times the solver's per-level tolerance
    // (1e-6 cm-1, checked against the Morse formula in tests/levels.rs).
    assert!((value(&outcome, "well_depth").0 / truth.well_depth - 1.0).abs() < 1e-7);
    assert!((value(&outcome, "width").0 / truth.width - 1.0).abs() < 1e-7);
    assert!(outcome.comparison.rms < from_wavenumber(1e-5));
}

#[test]
fn standard_errors_cover_the_truth_under_known_noise() {
    // 100 trials (fixed seed): exact levels plus Gaussian noise of sigma = 0.05 cm-1, the same
    // sigma given as the uncertainty. A 1-sigma interval should hold the true value in about
    // 68% of trials (66% for Student's t with the 10 degrees of freedom here, since the errors
    // are scaled by the fitted variance); with 100 trials the binomial spread is
    // sqrt(0.68 * 0.32 / 100) = 4.7%, so the acceptance band [54%, 82%] is +-3 of those.
    // Found: 40 trials of this seed gave 85% (a 2.3-sigma fluctuation, which is why 100 are
    // used); 400 trials gave 66% and 68%.
    let (truth, mu) = hcl_morse();
    let clean = exact_levels(&truth, mu, 12, None);
    let noise = Normal::new(0.0, 0.05).unwrap();
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(20261202);
    let trials = 100;
    let mut covered = [0usize; 2];
    for _ in 0..trials {
        let measured: Vec<MeasuredLevel> = clean
            .iter()
            .map(|m| {
                let mut noisy = m.clone();
                noisy.energy += from_wavenumber(noise.sample(&mut rng));
                noisy.uncertainty = from_wavenumber(0.05);
                noisy
            })
            .collect();
        let outcome = fit_hcl(
            Arc::new(truth),
            &["well_depth", "width"],
            &measured,
            EnergyZero::CurveMinimum,
        );
        for (k, (name, true_value)) in [("well_depth", truth.well_depth), ("width", truth.width)]
            .into_iter()
            .enumerate()
        {
            let (fitted, error) = value(&outcome, name);
            if (fitted - true_value).abs() <= error {
                covered[k] += 1;
            }
        }
    }
    for (k, name) in ["well_depth", "width"].iter().enumerate() {
        let coverage = covered[k] as f64 / trials as f64;
        println!("coverage of the 1-sigma interval for {name}: {coverage:.3}");
        assert!((0.54..=0.82).contains(&coverage), "{name}: {coverage}");
    }
}

#[test]
fn tabulated_curve_adjusted_by_depth_scale_and_r_shift() {
    // Points from a Morse curve; "measured" levels from a Morse 3% deeper and 0.01 bohr
    // further out. V_adj = D + s (V - D) is exactly that curve (plus a constant) when
    // s = 1.03 and d = 0.01, so the fit must find them to the accuracy of the spline.
    let (base, mu) = hcl_morse();
    let points: Vec<(f64, f64)> = (0..=240)
        .map(|i| 1.2 + 0.025 * f64::from(i))
        .map(|r| (r, base.value(r)))
        .collect();
    let table = TabulatedCurve::new(
        points,
        SplineEnd::NotAKnot,
        InnerWall::Exponential,
        OuterTail::Exponential,
        Some(base.well_depth),
    )
    .unwrap();
    let truth = Morse::new(1.03 * base.well_depth, base.width, base.r_e + 0.01);
    let measured = rotating_levels(&truth, mu, &[0, 4, 8], 7);
    let outcome = fit_hcl(
        Arc::new(table),
        &["depth_scale", "r_shift"],
        &measured,
        EnergyZero::LowestLevel,
    );
    let (scale, scale_error) = value(&outcome, "depth_scale");
    let (shift, shift_error) = value(&outcome, "r_shift");
    println!("depth_scale {scale} +- {scale_error}, r_shift {shift} +- {shift_error}");
    // The spline of 241 points spaced 0.025 bohr interpolates this Morse to about 1e-7 of
    // its depth (our estimate from the cubic-spline error bound h^4 max|V^(4)| / 384, common
    // practice; tests/curve_input.rs checks coarser tables to 1e-4), far below what moves
    // the fitted values by 1e-5 (our bound, set before the first run).
    assert!((scale - 1.03).abs() < 1e-5, "{scale}");
    assert!((shift - 0.01).abs() < 1e-5, "{shift}");
}

#[test]
fn refusals_are_clear() {
    let (truth, mu) = hcl_morse();
    let measured = exact_levels(&truth, mu, 5, None);
    let iso = || vec![isotopologue(None, "1H", "35Cl")];
    let run = |vary: &[&str], max_evaluations: usize, data: &[MeasuredLevel]| {
        let mut r = request(
            Arc::new(Morse::new(
                1.1 * truth.well_depth,
                0.9 * truth.width,
                truth.r_e,
            )),
            vary,
            iso(),
            data,
            EnergyZero::CurveMinimum,
        );
        r.max_evaluations = max_evaluations;
        fit(&r, &quiet)
    };
    let err = run(&["depth"], 100, &measured).unwrap_err();
    assert!(matches!(err, FitError::UnknownParameter { .. }));
    assert!(err.to_string().contains("well_depth, width, r_e"), "{err}");
    assert!(matches!(
        run(&["width", "width"], 100, &measured),
        Err(FitError::DuplicateParameter(_))
    ));
    assert!(matches!(
        run(&["well_depth", "width", "r_e"], 100, &measured[..2]),
        Err(FitError::TooFewData { .. })
    ));
    let far = [level(400, 0, 1.0, 1e-3, None)];
    assert!(matches!(
        run(&["width"], 100, &far),
        Err(FitError::NothingAssigned)
    ));
    // Stopped after two evaluations: reported as not converged, never as a result.
    let stopped = run(&["well_depth", "width"], 2, &measured).unwrap();
    assert!(!stopped.converged);
    assert!(
        stopped.termination.contains("evaluation limit"),
        "{}",
        stopped.termination
    );
}

#[test]
fn adjusted_points_curve_is_written_and_read_back() {
    // The written file of a tabulated curve carries depth_scale and r_shift and points at the
    // original table from wherever it is written; reading it back gives the adjusted curve.
    use rungs::reader::{fitted_curve_file, read_curve_file, PairOverride};
    let setup = read_curve_file(
        std::path::Path::new("curves/demo_points.toml"),
        &PairOverride::default(),
    )
    .unwrap();
    let adjusted = setup.curve.with_parameters(&[1.02, 0.01]).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let text = fitted_curve_file(&setup, adjusted.as_ref(), dir.path(), "test").unwrap();
    let path = dir.path().join("adjusted.toml");
    std::fs::write(&path, text).unwrap();
    let back = read_curve_file(&path, &PairOverride::default()).unwrap();
    for r in [7.0, 8.5, 12.0, 30.0] {
        let (a, b) = (adjusted.value(r), back.curve.value(r));
        assert!(
            (a - b).abs() <= 1e-15 * a.abs().max(1e-6),
            "r = {r}: {a} vs {b}"
        );
    }
    assert_eq!(back.curve.parameters()[0].value, 1.02);
}
