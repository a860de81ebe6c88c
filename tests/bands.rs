//! Franck-Condon factors, transition moments and sum rules against closed forms.

use rungs::bands::bands;
use rungs::curve::{DipoleFunction, Harmonic, Morse, PotentialCurve};
use rungs::solver::{solve_on_shared_grid, RadialProblem, SharedLevels, SolverSettings};

/// Both curves on one shared grid, up to the highest v given.
fn shared(
    upper: &dyn PotentialCurve,
    lower: &dyn PotentialCurve,
    mu: f64,
    highest: [Option<u32>; 2],
) -> (SharedLevels, SharedLevels) {
    let mut solved = solve_on_shared_grid(
        &[
            (RadialProblem::new(upper, mu, 0), highest[0]),
            (RadialProblem::new(lower, mu, 0), highest[1]),
        ],
        &SolverSettings::default(),
    )
    .unwrap();
    let lower = solved.pop().unwrap();
    (solved.pop().unwrap(), lower)
}

/// case, omega1, omega2, d, m, n, closed form (if any), quadrature.
type ReferenceRow = (String, f64, f64, f64, u32, u32, Option<f64>, f64);

/// Rows of tests/data/fc_displaced_harmonic.csv (copied from the shared reference collection;
/// closed form exp(-S) S^(n-m) (m!/n!) [L_m^(n-m)(S)]^2 from standard texts, and quadrature).
fn reference_rows() -> Vec<ReferenceRow> {
    std::fs::read_to_string("tests/data/fc_displaced_harmonic.csv")
        .unwrap()
        .lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with("case"))
        .map(|l| {
            let c: Vec<&str> = l.split(',').collect();
            (
                c[0].to_string(),
                c[1].parse().unwrap(),
                c[2].parse().unwrap(),
                c[3].parse().unwrap(),
                c[4].parse().unwrap(),
                c[5].parse().unwrap(),
                c[6].parse().ok(),
                c[7].parse().unwrap(),
            )
        })
        .collect()
}

#[test]
fn displaced_harmonic_oscillators_match_the_closed_form() {
    // Units hbar = mu = 1 (atomic units with mu = 1 m_e): lower omega1 at r_e = 30 bohr, upper
    // omega2 at 30 + d, far enough from r = 0 that the radial problem is the full-line one. FC(m, n) = |<m|n'>|^2 with m in the lower and n in the upper oscillator.
    let rows = reference_rows();
    let mut checked = 0;
    let mut cases: Vec<(String, f64, f64, f64)> = Vec::new();
    for row in &rows {
        let key = (row.0.clone(), row.1, row.2, row.3);
        if !cases.contains(&key) {
            cases.push(key);
        }
    }
    for (case, w1, w2, d) in cases {
        let lower = Harmonic::new(w1 * w1, 30.0);
        let upper = Harmonic::new(w2 * w2, 30.0 + d);
        let (up, low) = shared(&upper, &lower, 1.0, [Some(9), Some(5)]);
        let set = bands(&up, &low, 0.0, None, false);
        for row in rows
            .iter()
            .filter(|r| r.0 == case && (r.1, r.2, r.3) == (w1, w2, d))
        {
            let band = set
                .bands
                .iter()
                .find(|b| b.v_lower == row.4 && b.v_upper == row.5)
                .unwrap();
            let expected = row.6.unwrap_or(row.7);
            assert!(
                (band.franck_condon - expected).abs() < 1e-8,
                "{case} d = {d} ({}, {}): {} vs {expected}",
                row.4,
                row.5,
                band.franck_condon
            );
            checked += 1;
        }
        // Unequal frequencies, 0-0: [2 sqrt(w w')/(w + w')] exp(-mu w w' d^2 / (hbar (w + w')))
        // (the closed form).
        let q00 = set
            .bands
            .iter()
            .find(|b| b.v_lower == 0 && b.v_upper == 0)
            .unwrap()
            .franck_condon;
        let closed = 2.0 * (w1 * w2).sqrt() / (w1 + w2) * (-w1 * w2 * d * d / (w1 + w2)).exp();
        assert!((q00 - closed).abs() < 1e-8, "{case}: {q00} vs {closed}");
    }
    assert!(checked > 40, "{checked}");
}

#[test]
fn harmonic_dipole_matrix_elements() {
    // <v|r - r_e|v+1> = sqrt((v+1) hbar / (2 mu omega)), zero for |dv| > 1 (textbook), with a
    // linear dipole function mu(r) = r - r_e (e a_0 per bohr). mu = 1000 m_e, omega = 0.01.
    let (mu, omega, r_e) = (1000.0, 0.01, 3.0);
    let oscillator = Harmonic::from_vibrational_energy(omega, r_e, mu);
    let linear = DipoleFunction::Polynomial {
        r_ref: r_e,
        coefficients: vec![0.0, 1.0],
    };
    let mut solved = solve_on_shared_grid(
        &[(RadialProblem::new(&oscillator, mu, 0), Some(6))],
        &SolverSettings::default(),
    )
    .unwrap();
    let levels = solved.pop().unwrap();
    let set = bands(&levels, &levels, 0.0, Some(&linear), true);
    for band in &set.bands {
        let m = band.moment.unwrap();
        let expected = if band.v_upper == band.v_lower + 1 {
            (f64::from(band.v_upper) / (2.0 * mu * omega)).sqrt()
        } else {
            0.0
        };
        assert!(
            (m.abs() - expected).abs() < 1e-8,
            "{} - {}: {m} vs {expected}",
            band.v_upper,
            band.v_lower
        );
    }
    // Within one curve only v' > v'' is listed, each pair once.
    assert_eq!(set.bands.len(), 7 * 6 / 2);
}

#[test]
fn sum_rules_for_a_deep_little_displaced_upper_well() {
    // Closure: sum over all v' of q(v', v'') = 1 when the upper well holds every level the
    // lower wavefunction projects on; and sum_v' q (E' - E'') = <v''| V_upper - V_lower |v''>
    // (r-centroid/sum-rule relations, common practice). Morse curves (mu = 10000 m_e), the
    // upper 3% narrower, 0.02 bohr further out and 0.05 hartree higher.
    let mu = 10000.0;
    let lower = Morse::new(0.15, 1.0, 3.0);
    let upper_morse = Morse::new(0.15, 0.97, 3.02);
    let shift = 0.05;
    let upper = rungs::curve::Adjusted {
        base: std::sync::Arc::new(upper_morse),
        depth_scale: 1.0,
        r_shift: 0.0,
    };
    let (up, low) = shared(&upper, &lower, mu, [Some(40), Some(2)]);
    let set = bands(&up, &low, shift, None, false);
    for &(v, sum) in &set.lower_sums {
        assert!((sum - 1.0).abs() < 1e-9, "v'' = {v}: sum of q = {sum}");
        let wavefunction = &low.wavefunctions[v as usize];
        let difference =
            wavefunction.expectation(|r| upper_morse.value(r) + shift - lower.value(r));
        let weighted: f64 = set
            .bands
            .iter()
            .filter(|b| b.v_lower == v)
            .map(|b| b.franck_condon * b.origin)
            .sum();
        assert!(
            (weighted - difference).abs() < 1e-6 * difference.abs(),
            "v'' = {v}: {weighted} vs {difference}"
        );
    }
}
