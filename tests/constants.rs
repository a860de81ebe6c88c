//! Spectroscopic constants from computed levels, against Morse's exact formula and Pekeris.

use rungs::constants::{birge_sponer, fit_rotational, fit_vibrational, spacings};
use rungs::solver::{solve, RadialProblem, SolverSettings};

mod common;

#[test]
fn morse_fit_returns_its_constants() {
    // For a Morse curve G(v) is exactly omega_e (v+1/2) - omega_e x_e (v+1/2)^2 (Morse 1929),
    // so a cubic fit returns omega_e and omega_e x_e to 1e-6 relative and omega_e y_e ~ 0.
    let (morse, mu) = common::hcl_morse();
    let set = solve(
        &RadialProblem::new(&morse, mu, 0),
        &SolverSettings::default(),
    )
    .unwrap();
    let fit = fit_vibrational(&set, (0, 20), 3).unwrap();
    let (we, wexe) = (morse.omega_e(mu), morse.omega_e_x_e(mu));
    assert!(((fit.coefficients[1] - we) / we).abs() < 1e-6, "omega_e");
    assert!(
        ((-fit.coefficients[2] - wexe) / wexe).abs() < 1e-6,
        "omega_e x_e"
    );
    assert!(fit.coefficients[3].abs() < 1e-6 * wexe, "omega_e y_e");
}

#[test]
fn rotational_fit_follows_pekeris() {
    // Pekeris, Phys. Rev. 45, 98 (1934): alpha_e = 6 sqrt(omega_e x_e B_e^3)/omega_e - 6 B_e^2/omega_e.
    // The fitted B_e equals 1/(2 mu r_e^2) and alpha_e the formula, to the formula's order
    // (next terms of relative size alpha_e/B_e, recalled from memory as the expansion parameter).
    let (morse, mu) = common::hcl_morse();
    let set = solve(
        &RadialProblem::new(&morse, mu, 0),
        &SolverSettings::default().with_highest_v(Some(8)),
    )
    .unwrap();
    let fit = fit_rotational(&set, (0, 8), 2).unwrap();
    let (we, wexe) = (morse.omega_e(mu), morse.omega_e_x_e(mu));
    let b_e = 1.0 / (2.0 * mu * morse.r_e * morse.r_e);
    let alpha = 6.0 * (wexe * b_e.powi(3)).sqrt() / we - 6.0 * b_e * b_e / we;
    let order = alpha / b_e;
    assert!(
        ((fit.coefficients[0] - b_e) / b_e).abs() < order * order,
        "B_e"
    );
    assert!(
        ((-fit.coefficients[1] - alpha) / alpha).abs() < order,
        "alpha_e"
    );
}

#[test]
fn spacings_and_birge_sponer_of_a_morse() {
    // A Morse curve has Delta G(v+1/2) = omega_e - 2 omega_e x_e (v+1) exactly (Morse 1929),
    // so Delta^2 G = -2 omega_e x_e and the Birge-Sponer line reaches D_0 = D_e - G(0) to within
    // a fraction of the last spacing.
    let (morse, mu) = common::hcl_morse();
    let set = solve(
        &RadialProblem::new(&morse, mu, 0),
        &SolverSettings::default(),
    )
    .unwrap();
    let (first, second) = spacings(&set);
    let wexe = morse.omega_e_x_e(mu);
    assert!(second
        .iter()
        .all(|d| ((d + 2.0 * wexe) / wexe).abs() < 1e-6));
    assert_eq!(first.len(), set.levels.len() - 1);
    let top = set.levels.last().unwrap().v;
    let estimate = birge_sponer(&set, (0, top), 5).unwrap();
    let exact = morse.well_depth - set.levels[0].energy;
    let last_spacing = *first.last().unwrap();
    assert!(
        (estimate.d0 - exact).abs() < last_spacing,
        "{} vs {exact}",
        estimate.d0
    );
    // The spacings lie on a line exactly: the line's own error is at rounding level.
    assert!(estimate.standard_error < 1e-9 * exact);
}

#[test]
fn centrifugal_distortion_by_perturbation_theory() {
    // D_v from Hutson's perturbation theory (J. Phys. B 14, 851 (1981)) against
    // (a) finite differences: a cubic fit of E(J) = E + B l - D l^2 + H l^3, l = J(J+1),
    //     J = 0..5, to 1e-4 relative (the fit neglects the l^4 term; common practice);
    // (b) the Kratzer relation D_e = 4 B_e^3 / omega_e^2 (Herzberg 1950) for v = 0, to its
    //     own order, a relative difference below alpha_e / B_e (recalled from memory).
    let (morse, mu) = common::hcl_morse();
    let settings = SolverSettings::default().with_highest_v(Some(2));
    let sets: Vec<_> = (0..6)
        .map(|j| solve(&RadialProblem::new(&morse, mu, j), &settings).unwrap())
        .collect();
    let lambda: Vec<f64> = (0..6u32).map(|j| f64::from(j * (j + 1))).collect();
    for v in 0..3 {
        let energies: Vec<f64> = sets.iter().map(|s| s.levels[v].energy).collect();
        let fit = rungs::constants::polynomial_fit(&lambda, &energies, 3).unwrap();
        let perturbative = sets[0].levels[v].centrifugal_distortion;
        assert!(
            ((perturbative + fit.coefficients[2]) / perturbative).abs() < 1e-4,
            "v={v}"
        );
    }
    let (we, wexe) = (morse.omega_e(mu), morse.omega_e_x_e(mu));
    let b_e = 1.0 / (2.0 * mu * morse.r_e * morse.r_e);
    let kratzer = 4.0 * b_e.powi(3) / (we * we);
    let alpha = 6.0 * (wexe * b_e.powi(3)).sqrt() / we - 6.0 * b_e * b_e / we;
    let d0 = sets[0].levels[0].centrifugal_distortion;
    assert!(((d0 - kratzer) / kratzer).abs() < alpha / b_e);
}

#[test]
fn sextic_distortion_by_third_order_perturbation_theory() {
    // H_v = E3 = <psi1| V' - B |psi1> (Rayleigh-Schroedinger third order; Hutson 1981) against a
    // quintic fit of E(J), J = 0..8, in l = J(J+1) (finite differences, common practice), to
    // 1e-4 relative. HCl Morse (Huber-Herzberg constants).
    let (morse, mu) = common::hcl_morse();
    let settings = SolverSettings::default().with_highest_v(Some(1));
    let sets: Vec<_> = (0..9)
        .map(|j| solve(&RadialProblem::new(&morse, mu, j), &settings).unwrap())
        .collect();
    let lambda: Vec<f64> = (0..9u32).map(|j| f64::from(j * (j + 1))).collect();
    for v in 0..2 {
        let energies: Vec<f64> = sets.iter().map(|s| s.levels[v].energy).collect();
        let fit = rungs::constants::polynomial_fit(&lambda, &energies, 5).unwrap();
        let perturbative = sets[0].levels[v].sextic_distortion;
        assert!(
            ((perturbative - fit.coefficients[3]) / perturbative).abs() < 1e-4,
            "v={v}"
        );
        assert!(perturbative > 0.0);
    }
}

#[test]
fn leroy_bernstein_recovers_the_c6_of_a_lennard_jones_curve() {
    // A Lennard-Jones 12-6 curve (invented: epsilon = 1000 cm-1, r_e = 4 angstrom, 85Rb2 masses)
    // has the tail -C6/r^6 with C6 = 2 epsilon r_e^6 (common practice). A LeRoy-Bernstein fit
    // (LeRoy & Bernstein, J. Chem. Phys. 52, 3869 (1970)) of its six highest levels recovers C6
    // within a few per cent and predicts the solver's bound-level count.
    use rungs::curve::LennardJones;
    use rungs::units::{from_angstrom, from_wavenumber};
    let mu = common::mu_of("85Rb", "85Rb");
    let lj = LennardJones::new(from_wavenumber(1000.0), from_angstrom(4.0), 12.0, 6.0);
    let set = solve(&RadialProblem::new(&lj, mu, 0), &SolverSettings::default()).unwrap();
    let top: Vec<(u32, f64)> = set
        .levels
        .iter()
        .rev()
        .take(6)
        .map(|l| (l.v, l.energy))
        .collect();
    let fit = rungs::dissociation::leroy_bernstein(&top, 6.0, mu).unwrap();
    let c6 = lj.dispersion_coefficient();
    assert!(((fit.dispersion_coefficient - c6) / c6).abs() < 0.05);
    assert_eq!(fit.bound_levels as usize, set.levels.len());
    assert!(fit.limit.abs() < 1e-3 * lj.well_depth);
    // Fitted without the three highest levels, it still predicts the solver's count, and
    // lists the three unseen levels.
    let n = set.levels.len();
    let lower: Vec<(u32, f64)> = set.levels[n - 9..n - 3]
        .iter()
        .map(|l| (l.v, l.energy))
        .collect();
    let partial = rungs::dissociation::leroy_bernstein(&lower, 6.0, mu).unwrap();
    assert_eq!(partial.bound_levels as usize, n);
    assert_eq!(
        partial.predicted.iter().map(|p| p.v).collect::<Vec<_>>(),
        vec![45, 46, 47]
    );
    // The reported errors are a lower bound (see rungs::dissociation::leroy_bernstein); how far
    // the predictions miss, in units of them, is printed rather than asserted.
    for p in &partial.predicted {
        let actual = -set.levels[p.v as usize].energy;
        println!(
            "v = {}: predicted {:.6e} +- {:.2e}, solver {:.6e} ({:.1} sigma)",
            p.v,
            p.binding,
            p.binding_error,
            actual,
            (p.binding - actual) / p.binding_error
        );
    }
    println!(
        "C6 {:.6e} +- {:.2e} vs {:.6e} ({:.1} sigma)",
        partial.dispersion_coefficient,
        partial.dispersion_coefficient_error,
        c6,
        (partial.dispersion_coefficient - c6) / partial.dispersion_coefficient_error
    );
}
