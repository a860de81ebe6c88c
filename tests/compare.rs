//! Computed against measured levels on the shipped demo (invented data from Morse's formula).

use rungs::compare::{compare, EnergyZero};
use rungs::reader::{parse_measured, read_curve_file, PairOverride};
use rungs::solver::{solve, RadialProblem, SolverSettings};
use rungs::units::{from_wavenumber, to_wavenumber};
use std::path::Path;

#[test]
fn demo_measurements_are_reproduced_and_the_stray_line_is_listed() {
    // curves/demo_measured_levels.csv holds T(v) = 900 v - 8.5 (v^2 + v) cm-1 for J = 0, the
    // exact Morse term values (Morse 1929) of curves/demo_morse.toml, written to 1e-6 cm-1.
    let setup = read_curve_file(
        Path::new("curves/demo_morse.toml"),
        &PairOverride::default(),
    )
    .unwrap();
    let text = std::fs::read_to_string("curves/demo_measured_levels.csv").unwrap();
    let measured = parse_measured(&text, "demo").unwrap();
    let set = solve(
        &RadialProblem::new(setup.curve.as_ref(), setup.pair.reduced_mass(), 0),
        &SolverSettings::default(),
    )
    .unwrap();
    let comparison = compare(
        &measured,
        std::slice::from_ref(&set),
        EnergyZero::LowestLevel,
    )
    .unwrap();
    assert_eq!(comparison.residuals.len(), 11);
    for r in &comparison.residuals {
        // Rounding to 1e-6 cm-1 in the file plus the solver's 1e-6 cm-1 tolerance.
        assert!(
            to_wavenumber(r.obs_minus_calc).abs() < 2e-6,
            "v={}",
            r.measured.v
        );
    }
    assert_eq!(comparison.unassigned.len(), 1);
    assert_eq!(
        (comparison.unassigned[0].v, comparison.unassigned[0].line),
        (60, 18)
    );
    assert_eq!(comparison.computed_not_measured, set.levels.len() - 11);
}

#[test]
fn energy_zeros_shift_the_calculated_values() {
    // The same level on the three zeros differs by G(0) (zero-point: 900/2 - 8.5/4 cm-1,
    // Morse 1929) and by D_e (from the curve's own constants: 900^2 / (4 * 8.5) cm-1).
    let setup = read_curve_file(
        Path::new("curves/demo_morse.toml"),
        &PairOverride::default(),
    )
    .unwrap();
    let set = solve(
        &RadialProblem::new(setup.curve.as_ref(), setup.pair.reduced_mass(), 0),
        &SolverSettings::default(),
    )
    .unwrap();
    let measured = parse_measured("v,J,energy_cm-1,uncertainty_cm-1\n1,0,0,1\n", "m").unwrap();
    let calc = |zero| {
        compare(&measured, std::slice::from_ref(&set), zero)
            .unwrap()
            .residuals[0]
            .computed
    };
    let zero_point = from_wavenumber(450.0 - 8.5 / 4.0);
    let depth = from_wavenumber(900.0 * 900.0 / 34.0);
    assert!(
        (calc(EnergyZero::CurveMinimum) - calc(EnergyZero::LowestLevel) - zero_point).abs()
            < from_wavenumber(1e-6)
    );
    assert!(
        (calc(EnergyZero::CurveMinimum) - calc(EnergyZero::DissociationLimit) - depth).abs()
            < from_wavenumber(1e-6)
    );
}
