//! Bound levels checked against analytic solutions, published levels and the reference method.

use rungs::curve::{Harmonic, LennardJones, Morse, PotentialCurve};
use rungs::reader::{read_curve_file, PairOverride};
use rungs::solver::{
    solve, CountMethod, LevelSet, Method, RadialProblem, SolverError, SolverSettings,
};
use rungs::units::*;
use std::path::Path;

mod common;
use common::{h2_morse, hcl_morse, i2_morse, mu_of};

fn levels(curve: &dyn PotentialCurve, mu: f64, j: u32, settings: &SolverSettings) -> LevelSet {
    solve(&RadialProblem::new(curve, mu, j), settings).unwrap()
}

#[test]
fn harmonic_levels() {
    // E_v = hbar omega (v + 1/2) (textbook); omega_e = 2990.9463 cm-1, HCl-like.
    let mu = mu_of("1H", "35Cl");
    let omega = from_wavenumber(2990.9463);
    let oscillator = Harmonic::from_vibrational_energy(omega, from_angstrom(1.27455), mu);
    let set = levels(
        &oscillator,
        mu,
        0,
        &SolverSettings::default().with_highest_v(Some(5)),
    );
    assert_eq!(set.levels.len(), 6);
    for level in &set.levels {
        let exact = omega * (f64::from(level.v) + 0.5);
        assert!(
            ((level.energy - exact) / exact).abs() < 1e-8,
            "v={} {} {}",
            level.v,
            level.energy,
            exact
        );
        assert!(level.converged());
    }
}

/// Every level within 1e-6 cm-1 of Morse's exact formula and the exact count
/// (Morse, Phys. Rev. 34, 57 (1929); ../shared/reference/morse_exact.txt).
fn check_morse(morse: &Morse, mu: f64) -> LevelSet {
    let set = levels(morse, mu, 0, &SolverSettings::default());
    assert_eq!(
        set.levels.len() as u32,
        morse.exact_level_count(mu),
        "lambda {} audit {:?}",
        morse.lambda(mu),
        set.audit
    );
    assert_eq!(set.audit.bound_levels as u32, morse.exact_level_count(mu));
    for level in &set.levels {
        let error = to_wavenumber(level.energy - morse.exact_level(level.v, mu));
        assert!(error.abs() < 1e-6, "v={} error {error:e} cm-1", level.v);
        assert!(level.converged(), "v={}", level.v);
    }
    set
}

#[test]
fn morse_light_molecule() {
    // H2-like Morse from the Huber-Herzberg omega_e = 4401.213, omega_e x_e = 121.336 cm-1,
    // r_e = 0.74144 angstrom (tests/data/diatomic_constants.csv): 18 levels.
    let (morse, mu) = h2_morse();
    check_morse(&morse, mu);
}

#[test]
fn morse_heavy_molecule_over_a_hundred_levels() {
    // I2-like Morse from the Huber-Herzberg omega_e = 214.502, omega_e x_e = 0.6147 cm-1,
    // r_e = 2.6663 angstrom (tests/data/diatomic_constants.csv): 174 levels.
    let (morse, mu) = i2_morse();
    let set = check_morse(&morse, mu);
    assert!(set.levels.len() > 100);
}

#[test]
fn morse_last_level_barely_bound() {
    // lambda = 12.53: the last level v = 12 is bound by (lambda - 12.5)^2 E_a, i.e.
    // 0.03^2 / 12.53^2 = 5.7e-6 of D_e (< 1e-5), per the exact formula (Morse 1929).
    let mu = mu_of("1H", "1H");
    let (width, r_e): (f64, f64) = (1.0, 1.4);
    let lambda: f64 = 12.53;
    let well_depth = (lambda * width).powi(2) / (2.0 * mu);
    let morse = Morse::new(well_depth, width, r_e);
    assert!((morse.lambda(mu) - lambda).abs() < 1e-12);
    let set = check_morse(&morse, mu);
    let last = set.levels.last().unwrap();
    let binding = well_depth - last.energy;
    assert_eq!(last.v, 12);
    assert!(binding / well_depth < 1e-5 && binding > 0.0);
}

#[test]
fn rotational_constants_follow_pekeris() {
    // Pekeris, Phys. Rev. 45, 98 (1934): for a Morse curve
    // alpha_e = 6 sqrt(omega_e x_e B_e^3)/omega_e - 6 B_e^2/omega_e, B_v = B_e - alpha_e (v + 1/2)
    // to first order. HCl constants (Huber-Herzberg). The next term, gamma_e (v+1/2)^2, is of
    // order alpha_e^2 / B_e (Dunham's expansion; recalled from memory), which bounds the check.
    let (morse, mu) = hcl_morse();
    let set = levels(
        &morse,
        mu,
        0,
        &SolverSettings::default().with_highest_v(Some(3)),
    );
    let (we, wexe) = (morse.omega_e(mu), morse.omega_e_x_e(mu));
    let b_e = 1.0 / (2.0 * mu * morse.r_e * morse.r_e);
    let alpha = 6.0 * (wexe * b_e.powi(3)).sqrt() / we - 6.0 * b_e * b_e / we;
    for level in &set.levels {
        let x = f64::from(level.v) + 0.5;
        let pekeris = b_e - alpha * x;
        let next_order = alpha * alpha / b_e * x * x;
        let difference = (level.rotational_constant - pekeris).abs();
        assert!(
            difference < next_order,
            "v={} diff {:e} bound {:e}",
            level.v,
            to_wavenumber(difference),
            to_wavenumber(next_order)
        );
    }
}

#[test]
fn rotational_constant_is_the_energy_slope_in_j() {
    // Hellmann-Feynman: dE/d[J(J+1)] = <1/(2 mu r^2)> = B_v. With E(J) = B J(J+1) - D [J(J+1)]^2
    // (textbook), [E(2) - E(0)] / 6 = B - 6 D, so the difference from B_0 is about 6 D and is
    // bounded here by 10 D.
    let (morse, mu) = hcl_morse();
    let settings = SolverSettings::default().with_highest_v(Some(0));
    let e: Vec<f64> = (0..3)
        .map(|j| levels(&morse, mu, j, &settings).levels[0].energy)
        .collect();
    let b0 = levels(&morse, mu, 0, &settings).levels[0].rotational_constant;
    let slope = (e[2] - e[0]) / 6.0;
    // D_e(centrifugal) of HCl 5.3e-4 cm-1 (Huber-Herzberg): E(J) = B J(J+1) - D [J(J+1)]^2.
    assert!(
        (to_wavenumber(slope - b0)).abs() < 10.0 * 5.3e-4,
        "{}",
        to_wavenumber(slope - b0)
    );
}

#[test]
fn h2_born_oppenheimer_levels() {
    // Sims & Hagstrom (2006) points, tail L - C6/r^6 - C8/r^8 - C10/r^10: exactly 15 bound levels
    // for J = 0 and G(v) within 10 cm-1 of Roueff et al., A&A 630, A58 (2019)
    // (tests/data/h2_x_levels_j0.csv; the difference is the non-Born-Oppenheimer correction).
    let setup = read_curve_file(
        Path::new("curves/h2_born_oppenheimer.toml"),
        &PairOverride::default(),
    )
    .unwrap();
    let set = levels(
        setup.curve.as_ref(),
        setup.pair.reduced_mass(),
        0,
        &SolverSettings::default(),
    );
    assert_eq!(set.levels.len(), 15);
    assert_eq!(set.audit.bound_levels, 15);
    assert!(matches!(
        set.audit.method,
        CountMethod::ZeroEnergyNodes { settled: true, .. }
    ));
    let published = std::fs::read_to_string("tests/data/h2_x_levels_j0.csv").unwrap();
    let ground = set.levels[0].energy;
    for line in published
        .lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with('v'))
    {
        let (v, g) = line.split_once(',').unwrap();
        let v: usize = v.parse().unwrap();
        let g: f64 = g.parse().unwrap();
        let computed = to_wavenumber(set.levels[v].energy - ground);
        assert!((computed - g).abs() < 10.0, "v={v}: {computed} vs {g}");
    }
}

fn assert_methods_agree(curve: &dyn PotentialCurve, mu: f64) {
    let numerov = levels(curve, mu, 0, &SolverSettings::default());
    let dvr = levels(
        curve,
        mu,
        0,
        &SolverSettings::default().with_method(Method::SincDvr),
    );
    assert_eq!(numerov.levels.len(), dvr.levels.len());
    for (a, b) in numerov.levels.iter().zip(&dvr.levels) {
        // Each within its own estimate, plus the 1e-6 cm-1 tolerance each method promises.
        let allowed = a.error_estimate + b.error_estimate + from_wavenumber(2e-6);
        assert!(
            (a.energy - b.energy).abs() < allowed,
            "v={}: {:e} cm-1",
            a.v,
            to_wavenumber(a.energy - b.energy)
        );
    }
}

#[test]
fn methods_agree_on_test_curves() {
    let (morse, mu) = hcl_morse();
    assert_methods_agree(&morse, mu);
    // A Lennard-Jones 12-6 well (invented parameters: epsilon 500 cm-1, r_e 3.5 angstrom) with Ar-Ar masses.
    let lj = LennardJones::new(from_wavenumber(500.0), from_angstrom(3.5), 12.0, 6.0);
    assert_methods_agree(&lj, mu_of("40Ar", "40Ar"));
    let setup = read_curve_file(
        Path::new("curves/demo_morse.toml"),
        &PairOverride::default(),
    )
    .unwrap();
    assert_methods_agree(setup.curve.as_ref(), setup.pair.reduced_mass());
}

#[test]
fn solver_refuses_bad_problems() {
    let (morse, mu) = hcl_morse();
    // A J with no bound level.
    let err = solve(
        &RadialProblem::new(&morse, mu, 400),
        &SolverSettings::default(),
    )
    .unwrap_err();
    assert!(matches!(err, SolverError::NothingBound { j: 400 }), "{err}");
    // A curve with no well: a Morse turned upside down has no minimum.
    let hill = Morse::new(-0.1, 1.0, 2.4);
    assert!(solve(
        &RadialProblem::new(&hill, mu, 0),
        &SolverSettings::default()
    )
    .is_err());
    // A grid step far too coarse for the well.
    let coarse = SolverSettings::default().with_grid(None, Some(0.5));
    let err = solve(&RadialProblem::new(&morse, mu, 0), &coarse).unwrap_err();
    assert!(matches!(err, SolverError::UnderResolved { .. }), "{err}");
    // A range that misses the well.
    let off = SolverSettings::default().with_grid(Some((3.0, 9.0)), None);
    assert!(matches!(
        solve(&RadialProblem::new(&morse, mu, 0), &off).unwrap_err(),
        SolverError::RangeMissesWell { .. }
    ));
}

#[test]
fn shallow_high_j_well_is_resolved() {
    // Regression: near the top of the rotational manifold the effective well is shallow; the
    // step once came from the (small) well depth alone, the grid could not reach into the wall,
    // and a level was off by 1.6e-6 cm-1 while claiming 7e-8. Reference: the same level on a
    // fixed 0.005 angstrom step (a high-resolution solve, common practice), within the sum of
    // the two error estimates and the 1e-6 cm-1 tolerance.
    let setup = read_curve_file(
        Path::new("curves/demo_points.toml"),
        &PairOverride::default(),
    )
    .unwrap();
    let mu = setup.pair.reduced_mass();
    let auto = levels(setup.curve.as_ref(), mu, 384, &SolverSettings::default());
    let fine = levels(
        setup.curve.as_ref(),
        mu,
        384,
        &SolverSettings::default().with_grid(None, Some(from_angstrom(0.005))),
    );
    let (a, b) = (&auto.levels[0], &fine.levels[0]);
    assert!(a.converged() && b.converged());
    let allowed = a.error_estimate + b.error_estimate + from_wavenumber(1e-6);
    assert!(
        (a.energy - b.energy).abs() < allowed,
        "{:e} cm-1",
        to_wavenumber(a.energy - b.energy)
    );
}

#[test]
fn whole_manifold_of_h2_ends_where_nothing_is_bound() {
    // Every J of the H2 Born-Oppenheimer curve until none is bound; the count falls with J and
    // J = 0 has the 15 levels of the published curve (Roueff et al. 2019 list 15 for J = 0).
    // H2 binds rotational levels up to about J = 31 (recalled from memory), so more than 25
    // values of J must come back.
    let setup = read_curve_file(
        Path::new("curves/h2_born_oppenheimer.toml"),
        &PairOverride::default(),
    )
    .unwrap();
    let sets = rungs::solver::solve_manifold(
        setup.curve.as_ref(),
        setup.pair.reduced_mass(),
        0,
        &SolverSettings::default(),
    )
    .unwrap();
    assert_eq!(sets[0].levels.len(), 15);
    assert!(sets.len() > 25, "{} J values", sets.len());
    assert!(sets
        .windows(2)
        .all(|w| w[1].levels.len() <= w[0].levels.len()));
    assert!(sets.iter().all(|s| s.levels.iter().all(|l| l.converged())));
}

#[test]
fn distortion_constants_are_optional_and_change_no_energy() {
    // Leaving out D_v and H_v (for speed) must not move any level: the energies come from the
    // same grids either way.
    let (morse, mu) = hcl_morse();
    let problem = RadialProblem::new(&morse, mu, 0);
    let full = solve(&problem, &SolverSettings::default()).unwrap();
    let lean = solve(&problem, &SolverSettings::default().with_distortion(false)).unwrap();
    assert_eq!(full.levels.len(), lean.levels.len());
    for (a, b) in full.levels.iter().zip(&lean.levels) {
        assert_eq!(a.energy, b.energy);
        assert!(a.centrifugal_distortion.is_finite() && b.centrifugal_distortion.is_nan());
    }
}

#[test]
fn error_estimates_bound_the_true_errors() {
    // Against Morse's exact levels (Morse 1929): each level's reported error estimate is at
    // least its true error (up to a 1e-9 cm-1 rounding floor), whether it stopped after two
    // Numerov grids or needed three. Found when added: true/estimate at most 0.5 (I2-like),
    // 0.08 (HCl), 0.07 (H2-like).
    for ((morse, mu), tolerance) in [(h2_morse(), 1e-6), (hcl_morse(), 1e-6), (i2_morse(), 1e-5)] {
        let settings = SolverSettings::default()
            .with_tolerance(from_wavenumber(tolerance))
            .with_distortion(false);
        let set = solve(&RadialProblem::new(&morse, mu, 0), &settings).unwrap();
        for level in &set.levels {
            let error = (level.energy - morse.exact_level(level.v, mu)).abs();
            assert!(
                error <= level.error_estimate + from_wavenumber(1e-9),
                "v = {}: error {:.3e} above its estimate {:.3e} cm-1",
                level.v,
                to_wavenumber(error),
                to_wavenumber(level.error_estimate)
            );
        }
    }
}
