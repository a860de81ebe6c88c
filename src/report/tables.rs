//! Tables built from the results of the earlier stages, in the user's units.

use super::{Cell, Column, Table};
use crate::masses::Pair;
use crate::reader::CurveSetup;
use crate::solver::{CountMethod, LevelSet, LevelStatus, Method};
use crate::survey::Survey;
use crate::units::{to_dalton, Unit};

/// The units a user asked to see.
#[derive(Debug, Clone, Copy)]
pub struct DisplayUnits {
    pub energy: &'static Unit,
    pub length: &'static Unit,
}

impl DisplayUnits {
    fn e(&self, hartree: f64) -> Cell {
        Cell::Number(self.energy.from_atomic(hartree))
    }
    fn l(&self, bohr: f64) -> Cell {
        Cell::Number(self.length.from_atomic(bohr))
    }
    /// An energy, or a blank where it was not computed (NaN).
    fn opt_e(&self, hartree: f64) -> Cell {
        if hartree.is_nan() {
            Cell::Missing
        } else {
            self.e(hartree)
        }
    }
    fn opt_l(&self, bohr: Option<f64>) -> Cell {
        bohr.map_or(Cell::Missing, |b| self.l(b))
    }
}

/// Born-Oppenheimer and infrared notes that every curve report carries.
fn physics_notes(pair: &Pair) -> Vec<String> {
    let mut notes = vec![
        "the curve is taken as a Born-Oppenheimer (mass-independent) potential; adiabatic and nonadiabatic corrections are not included".to_string(),
    ];
    if pair.is_homonuclear() {
        notes.push(format!(
            "{} is homonuclear: it has no permanent dipole moment, so its vibration-rotation transitions within this electronic state are electric-dipole forbidden (infrared-inactive)",
            pair.label()
        ));
    }
    notes
}

/// The survey as a table of (quantity, value, unit) rows.
pub fn survey_table(survey: &Survey, setup: &CurveSetup, units: DisplayUnits) -> Table {
    let (eu, lu) = (units.energy.name, units.length.name);
    let mut rows: Vec<(String, Cell, String)> = vec![
        (
            "reduced_mass".into(),
            Cell::Number(to_dalton(survey.reduced_mass)),
            "u".into(),
        ),
        ("r_e".into(), units.l(survey.well.r_min), lu.into()),
        ("V_at_r_e".into(), units.e(survey.well.v_min), eu.into()),
        (
            "asymptote".into(),
            survey.limit.map_or(Cell::Missing, |l| units.e(l)),
            eu.into(),
        ),
        (
            "D_e".into(),
            survey.well_depth.map_or(Cell::Missing, |d| units.e(d)),
            eu.into(),
        ),
        (
            "force_constant".into(),
            Cell::Number(
                crate::units::parse_unit("N/m", crate::units::Dimension::ForceConstant)
                    .expect("N/m is a unit")
                    .from_atomic(survey.well.force_constant),
            ),
            "N/m".into(),
        ),
        ("omega_e".into(), units.e(survey.omega_e), eu.into()),
        ("B_e".into(), units.e(survey.rotational_constant), eu.into()),
        (
            "harmonic_zero_point".into(),
            units.e(survey.harmonic_zero_point),
            eu.into(),
        ),
        (
            "wkb_v_at_limit".into(),
            survey
                .wkb_index_at_limit
                .map_or(Cell::Missing, Cell::Number),
            "".into(),
        ),
        (
            "wkb_bound_levels".into(),
            survey
                .wkb_level_count
                .map_or(Cell::Missing, |n| Cell::Integer(n.into())),
            "".into(),
        ),
    ];
    if let Some((energy, inner, outer)) = survey.turning_points {
        rows.push((
            "turning_energy_above_minimum".into(),
            units.e(energy),
            eu.into(),
        ));
        rows.push(("turning_point_inner".into(), units.opt_l(inner), lu.into()));
        rows.push(("turning_point_outer".into(), units.opt_l(outer), lu.into()));
    }
    if let Some(join) = setup.join {
        rows.push(("join_inner_r".into(), units.l(join.inner_r), lu.into()));
        rows.push((
            "join_inner_value_mismatch".into(),
            units.e(join.inner_value_mismatch),
            eu.into(),
        ));
        rows.push((
            "join_inner_slope_mismatch".into(),
            units.e(units.length.to_atomic(join.inner_slope_mismatch)),
            format!("{eu}/{lu}"),
        ));
        rows.push(("join_outer_r".into(), units.l(join.outer_r), lu.into()));
        rows.push((
            "join_outer_value_mismatch".into(),
            units.e(join.outer_value_mismatch),
            eu.into(),
        ));
        rows.push((
            "join_outer_slope_mismatch".into(),
            units.e(units.length.to_atomic(join.outer_slope_mismatch)),
            format!("{eu}/{lu}"),
        ));
    }
    for (n, c) in &setup.tail_coefficients {
        rows.push((
            format!("tail_C{n}"),
            Cell::Number(*c),
            format!("hartree bohr^{n}"),
        ));
    }
    let mut notes = physics_notes(&setup.pair);
    notes.extend(setup.warnings.iter().cloned());
    Table {
        title: format!("{} | {}", setup.pair.label(), setup.curve.describe()),
        columns: vec![
            Column::new("quantity", 0),
            Column::new("value", 6),
            Column::new("unit", 0),
        ],
        rows: rows
            .into_iter()
            .map(|(q, v, u)| vec![Cell::Text(q), v, Cell::Text(u)])
            .collect(),
        notes,
    }
}

/// One row per level, with energies on four scales and the per-level diagnostics.
pub fn levels_table(sets: &[LevelSet], pair: &Pair, units: DisplayUnits) -> Table {
    let (eu, lu) = (units.energy.name, units.length.name);
    let columns = vec![
        Column::new("v", 0),
        Column::new("J", 0),
        Column::new(format!("energy_{eu}"), 6),
        Column::new(format!("above_minimum_{eu}"), 6),
        Column::new(format!("term_value_{eu}"), 6),
        Column::new(format!("binding_{eu}"), 6),
        Column::new(format!("spacing_{eu}"), 6),
        Column::new(format!("r_inner_{lu}"), 5),
        Column::new(format!("r_outer_{lu}"), 5),
        Column::new(format!("mean_r_{lu}"), 5),
        Column::new(format!("mean_r-2_{lu}-2"), 6),
        Column::new(format!("B_v_{eu}"), 6),
        Column::new(format!("D_v_{eu}"), 4),
        Column::new(format!("H_v_{eu}"), 4),
        Column::new(format!("error_{eu}"), 1),
        Column::new("converged", 0),
    ];
    let mut rows = Vec::new();
    let mut notes = physics_notes(pair);
    for set in sets {
        let ground = set.levels.first().map_or(0.0, |l| l.energy);
        for (k, level) in set.levels.iter().enumerate() {
            let spacing = set.levels.get(k + 1).map(|next| next.energy - level.energy);
            rows.push(vec![
                Cell::Integer(level.v.into()),
                Cell::Integer(level.j.into()),
                units.e(level.energy),
                units.e(level.energy - set.curve_minimum),
                units.e(level.energy - ground),
                set.limit
                    .map_or(Cell::Missing, |l| units.e(l - level.energy)),
                spacing.map_or(Cell::Missing, |s| units.e(s)),
                units.l(level.inner_turning_point),
                units.l(level.outer_turning_point),
                units.l(level.mean_r),
                Cell::Number(level.mean_inverse_r2 / units.length.from_atomic(1.0).powi(2)),
                units.e(level.rotational_constant),
                units.opt_e(level.centrifugal_distortion),
                units.opt_e(level.sextic_distortion),
                Cell::Error(units.energy.from_atomic(level.error_estimate)),
                Cell::Text(
                    match level.status {
                        LevelStatus::Converged => "yes",
                        LevelStatus::NotConverged => "NO",
                        LevelStatus::Unresolved => "UNRESOLVED",
                    }
                    .into(),
                ),
            ]);
        }
        notes.extend(count_notes(set, units));
    }
    Table {
        title: format!("bound levels of {}", pair.label()),
        columns,
        rows,
        notes,
    }
}

/// What the count of one J rests on, where its least-bound level lies, and which levels are
/// not certified.
fn count_notes(set: &LevelSet, units: DisplayUnits) -> Vec<String> {
    let (eu, lu) = (units.energy.name, units.length.name);
    let j = set.j;
    let n = set.audit.bound_levels;
    let levels = if n == 1 { "level" } else { "levels" };
    let method = match set.method {
        Method::Numerov => "Numerov (Cooley, Richardson)",
        Method::SincDvr => "sinc-DVR reference",
    };
    let mut notes = vec![match set.audit.method {
        CountMethod::ZeroEnergyNodes { far_radius, settled } => {
            let mut note = format!(
                "J = {j}: {n} bound {levels} below the dissociation limit, counted by the zeros of the solution at the limit followed to r = {:.3e} {lu} (no box limits this count; levels by {method})",
                units.length.from_atomic(far_radius)
            );
            if !settled {
                note += "; the count cannot tell whether one more level sits at the limit itself, bound by less than it resolves";
            }
            note
        }
        CountMethod::Box { outer } => format!(
            "J = {j}: {n} {levels} below the {} in the box to {:.2} {lu} (Sturm count; a box holds only levels whose tails fit in it; levels by {method})",
            if set.limit.is_some() { "dissociation limit" } else { "energy ceiling" },
            units.length.from_atomic(outer)
        ),
        CountMethod::Requested { tail_power } => format!(
            "J = {j}: the curve's 1/r^{tail_power} tail holds infinitely many levels below the limit; the first {n} are listed, as asked (levels by {method})"
        ),
    }];
    if let (Some(last), Some(limit)) = (set.levels.last(), set.limit) {
        if last.status != LevelStatus::Unresolved && set.levels.len() == n {
            notes.push(format!(
                "J = {j}: least-bound level v = {} lies {:.6e} {eu} below the limit",
                last.v,
                units.energy.from_atomic(limit - last.energy)
            ));
        }
    }
    let listed = |status: LevelStatus| -> String {
        set.levels
            .iter()
            .filter(|l| l.status == status)
            .map(|l| l.v.to_string())
            .collect::<Vec<_>>()
            .join(", ")
    };
    let missed = listed(LevelStatus::NotConverged);
    if !missed.is_empty() {
        notes.push(format!(
            "J = {j}: NOT CONVERGED to the tolerance: v = {missed} (see the error column; a larger --tolerance, or no fixed --step)"
        ));
    }
    let floor = set
        .levels
        .iter()
        .map(|l| l.precision_floor)
        .fold(0.0, f64::max);
    if floor > set.tolerance {
        notes.push(format!(
            "J = {j}: the tolerance {:.1e} {eu} is below what double precision reaches for these levels: rounding alone leaves up to {:.1e} {eu}; ask for at least that",
            units.energy.from_atomic(set.tolerance),
            units.energy.from_atomic(floor)
        ));
    }
    let unresolved = listed(LevelStatus::Unresolved);
    if !unresolved.is_empty() {
        notes.push(format!(
            "J = {j}: UNRESOLVED: v = {unresolved} lies below the limit by the count but so close to it that its tail outgrows every grid up to the outer cap; the row gives the interval it lies in (energy +- error), not a solution"
        ));
    }
    notes
}

/// Wavefunctions in long form: one row per grid point per level (each level keeps its own
/// grid), columns v, r and psi.
pub fn wavefunction_table(set: &LevelSet, units: DisplayUnits) -> Table {
    let lu = units.length.name;
    // psi in length^-1/2: psi_user = psi_bohr * sqrt(bohr per user unit).
    let scale = units.length.to_atomic(1.0).sqrt();
    let rows = set
        .wavefunctions
        .iter()
        .flat_map(|w| {
            w.r.iter().zip(&w.psi).map(move |(&r, &psi)| {
                vec![
                    Cell::Integer(w.v.into()),
                    units.l(r),
                    Cell::Number(psi * scale),
                ]
            })
        })
        .collect();
    Table {
        title: format!("wavefunctions, J = {}", set.j),
        columns: vec![
            Column::new("v", 0),
            Column::new(format!("r_{lu}"), 6),
            Column::new(format!("psi_{lu}^-1/2"), 8),
        ],
        rows,
        notes: vec!["normalised to int psi^2 dr = 1; sign: positive on the innermost lobe".into()],
    }
}

/// Fitted spectroscopic constants as (quantity, value, standard error, unit) rows.
/// `vibrational` is the G(v) fit, `rotational` the B_v fit (see [`crate::constants`]).
pub fn constants_table(
    vibrational: &crate::constants::PolynomialFit,
    rotational: Option<&crate::constants::PolynomialFit>,
    birge_sponer: Result<&crate::constants::BirgeSponer, &crate::constants::BirgeSponerError>,
    set: &LevelSet,
    pair: &Pair,
    units: DisplayUnits,
) -> Table {
    let eu = units.energy.name;
    let mut rows = Vec::new();
    let mut push = |name: &str, value: f64, error: f64| {
        rows.push(vec![
            Cell::Text(name.into()),
            units.e(value),
            units.e(error),
            Cell::Text(eu.into()),
        ]);
    };
    // G(v) = c0 + omega_e x - omega_e x_e x^2 + omega_e y_e x^3 + omega_e z_e x^4 (signs of the trade).
    let vib_names = [
        "G_offset",
        "omega_e",
        "omega_e_x_e",
        "omega_e_y_e",
        "omega_e_z_e",
    ];
    let vib_signs = [1.0, 1.0, -1.0, 1.0, 1.0];
    // Each coefficient under its name of the trade (with its sign), later ones numbered.
    let mut push_fit =
        |fit: &crate::constants::PolynomialFit, names: &[&str], signs: &[f64], prefix: &str| {
            for (k, (c, e)) in fit
                .coefficients
                .iter()
                .zip(&fit.standard_errors)
                .enumerate()
            {
                let name = names
                    .get(k)
                    .map_or_else(|| format!("{prefix}_coefficient_{k}"), |n| n.to_string());
                push(&name, signs.get(k).copied().unwrap_or(1.0) * c, *e);
            }
            push(&format!("{prefix}_fit_rms"), fit.rms_residual, 0.0);
        };
    push_fit(vibrational, &vib_names, &vib_signs, "G");
    if let Some(fit) = rotational {
        push_fit(fit, &["B_e", "alpha_e", "gamma_e"], &[1.0, -1.0, 1.0], "B");
    }
    let mut notes = vec![
        "G(v) = G_offset + omega_e (v+1/2) - omega_e_x_e (v+1/2)^2 + omega_e_y_e (v+1/2)^3 + ...; B_v = B_e - alpha_e (v+1/2) + gamma_e (v+1/2)^2".into(),
        "standard errors are statistical: from the fit's residuals, assuming the polynomial is right".into(),
    ];
    // The levels are known far better than any polynomial can follow them; a residual above
    // 1e-4 of omega_e is a visible failure of the expansion (our own threshold).
    let omega = vibrational
        .coefficients
        .get(1)
        .copied()
        .unwrap_or(0.0)
        .abs();
    if vibrational.rms_residual > 1e-4 * omega {
        notes.push(format!(
            "WARNING: the order-{} polynomial leaves an rms residual of {:.3e} {eu} against levels known to {:.1e} {eu}: G(v) is not such a polynomial over these levels, so its coefficients are fit parameters, not the curve's constants; narrow the v range (the expansion holds near the bottom of the well) or change the order",
            vibrational.coefficients.len() - 1,
            units.energy.from_atomic(vibrational.rms_residual),
            units.energy.from_atomic(set.levels.iter().map(|l| l.error_estimate).fold(0.0, f64::max)),
        ));
    }
    match birge_sponer {
        Ok(estimate) => {
            push("D_0_birge_sponer", estimate.d0, estimate.standard_error);
            notes.push(format!(
                "Birge-Sponer: a straight line through the spacings above v = {} .. {} (rms {:.3e} {eu}), extrapolated to zero; its standard error is the line's only",
                estimate.fitted.0,
                estimate.fitted.1,
                units.energy.from_atomic(estimate.line_rms)
            ));
            if let (Some(limit), Some(ground)) = (set.limit, set.levels.first()) {
                let own = limit - ground.energy;
                let miss = estimate.d0 - own;
                notes.push(format!(
                    "the curve's own D_0 (limit - E(v=0)) is {:.6} {eu}: the Birge-Sponer line misses it by {:+.3e} {eu}{}",
                    units.energy.from_atomic(own),
                    units.energy.from_atomic(miss),
                    if miss.abs() > 3.0 * estimate.standard_error {
                        " (WARNING: more than three standard errors; the spacings do not fall linearly to the limit)"
                    } else {
                        ""
                    }
                ));
            }
        }
        Err(why) => notes.push(format!("no Birge-Sponer D_0: {why}")),
    }
    Table {
        title: format!(
            "spectroscopic constants of {} from {} levels",
            pair.label(),
            vibrational.points
        ),
        columns: vec![
            Column::new("quantity", 0),
            Column::new("value", 8),
            Column::new("standard_error", 3),
            Column::new("unit", 0),
        ],
        rows,
        notes,
    }
}

/// Residuals obs - calc, one row per measured level; unassigned levels and the statistics go
/// into the notes (nothing is dropped silently).
pub fn comparison_table(
    comparison: &crate::compare::Comparison,
    pair: &Pair,
    units: DisplayUnits,
) -> Table {
    let eu = units.energy.name;
    let rows = comparison
        .residuals
        .iter()
        .map(|r| {
            vec![
                Cell::Integer(r.measured.v.into()),
                Cell::Integer(r.measured.j.into()),
                r.measured
                    .lower
                    .map_or(Cell::Missing, |(v, _)| Cell::Integer(v.into())),
                r.measured
                    .lower
                    .map_or(Cell::Missing, |(_, j)| Cell::Integer(j.into())),
                r.measured.tag.clone().map_or(Cell::Missing, Cell::Text),
                units.e(r.measured.energy),
                units.e(r.computed),
                units.e(r.obs_minus_calc),
                units.e(r.measured.uncertainty),
                Cell::Number(r.normalised),
            ]
        })
        .collect();
    let mut notes = vec![
        format!(
            "{} matched levels: rms(obs - calc) = {:.6e} {eu}, weighted deviation sqrt(mean(((obs - calc)/u)^2)) = {:.4}",
            comparison.residuals.len(),
            units.energy.from_atomic(comparison.rms),
            comparison.weighted_deviation
        ),
        format!("{} computed levels in the measured J values have no measurement", comparison.computed_not_measured),
    ];
    for level in &comparison.unassigned {
        notes.push(format!(
            "UNASSIGNED: measured {} on line {} has no computed counterpart (a level not bound on this curve?)",
            level.label(), level.line
        ));
    }
    Table {
        title: format!("measured against computed levels of {}", pair.label()),
        columns: vec![
            Column::new("v", 0),
            Column::new("J", 0),
            Column::new("v_lower", 0),
            Column::new("J_lower", 0),
            Column::new("tag", 0),
            Column::new(format!("observed_{eu}"), 6),
            Column::new(format!("calculated_{eu}"), 6),
            Column::new(format!("obs_minus_calc_{eu}"), 6),
            Column::new(format!("uncertainty_{eu}"), 6),
            Column::new("normalised_residual", 3),
        ],
        rows,
        notes,
    }
}

/// A LeRoy-Bernstein fit with the solver's own count beside it.
pub fn dissociation_table(
    fit: &crate::dissociation::LeRoyBernstein,
    used: usize,
    solver_count: Option<usize>,
    pair: &Pair,
    units: DisplayUnits,
) -> Table {
    let eu = units.energy.name;
    let energy_unit = || Cell::Text(eu.into());
    let plain = || Cell::Text(String::new());
    let optional = |x: f64| {
        if x.is_finite() {
            Cell::Number(x)
        } else {
            Cell::Missing
        }
    };
    let energy_error = |x: f64| optional(units.energy.from_atomic(x));
    let mut rows = vec![
        vec![
            Cell::Text("power_n".into()),
            Cell::Number(fit.power),
            Cell::Missing,
            plain(),
        ],
        vec![
            Cell::Text("limit".into()),
            units.e(fit.limit),
            energy_error(fit.limit_error),
            energy_unit(),
        ],
        vec![
            Cell::Text("v_at_limit".into()),
            Cell::Number(fit.v_at_limit),
            optional(fit.v_at_limit_error),
            plain(),
        ],
        vec![
            Cell::Text(format!("C_{}", fit.power)),
            Cell::Number(fit.dispersion_coefficient),
            optional(fit.dispersion_coefficient_error),
            Cell::Text(format!("hartree bohr^{}", fit.power)),
        ],
        vec![
            Cell::Text("fit_rms".into()),
            units.e(fit.rms_residual),
            Cell::Missing,
            energy_unit(),
        ],
        vec![
            Cell::Text("levels_used".into()),
            Cell::Integer(used as i64),
            Cell::Missing,
            plain(),
        ],
        vec![
            Cell::Text("bound_levels_leroy_bernstein".into()),
            Cell::Integer(fit.bound_levels.into()),
            Cell::Missing,
            plain(),
        ],
    ];
    if let Some(count) = solver_count {
        rows.push(vec![
            Cell::Text("bound_levels_solver".into()),
            Cell::Integer(count as i64),
            Cell::Missing,
            plain(),
        ]);
    }
    for level in &fit.predicted {
        rows.push(vec![
            Cell::Text(format!("predicted_binding_v{}", level.v)),
            units.e(level.binding),
            energy_error(level.binding_error),
            energy_unit(),
        ]);
    }
    let verdict = match solver_count {
        None => "fitted to measured levels; no curve was given to count its levels".to_string(),
        Some(count) if fit.bound_levels as usize == count => {
            "the LeRoy-Bernstein count agrees with the solver's".to_string()
        }
        Some(count) => format!(
            "the counts differ: trust the solver's {count} (an exact Sturm count on the curve itself, stable when its box is doubled); the LeRoy-Bernstein estimate assumes the pure -C_n/r^n form reaches down to the levels used"
        ),
    };
    Table {
        title: format!(
            "near dissociation: LeRoy-Bernstein fit of the highest levels of {}",
            pair.label()
        ),
        columns: vec![
            Column::new("quantity", 0),
            Column::new("value", 8),
            Column::new("standard_error", 3),
            Column::new("unit", 0),
        ],
        rows,
        notes: vec![
            verdict,
            "standard errors: the fit's own (s^2 (J^T J)^-1 in D, v_D, H_n) and the change when the deepest level used is left out, in quadrature; they are a LOWER BOUND: the LeRoy-Bernstein form is exact only at the limit, and on a Lennard-Jones test the predicted binding energies were off by 4-10 of these errors".into(),
            "the v_at_limit error tells how sure the count floor(v_D) + 1 is: within about one standard error of an integer, a level may be gained or lost".into(),
        ],
    }
}

/// A parameter value in display units: energies and lengths in the chosen units, inverse
/// lengths per chosen length unit, force constants in N/m; pure numbers as they are.
fn parameter_in_display(
    value: f64,
    dimension: Option<crate::units::Dimension>,
    units: DisplayUnits,
) -> (f64, String) {
    use crate::units::Dimension;
    match dimension {
        None => (value, String::new()),
        Some(Dimension::Energy) => (units.energy.from_atomic(value), units.energy.name.into()),
        Some(Dimension::Length) => (units.length.from_atomic(value), units.length.name.into()),
        Some(Dimension::InverseLength) => (
            value * units.length.in_atomic_units,
            format!("1/{}", units.length.name),
        ),
        Some(other) => {
            let unit = crate::units::customary_unit(other);
            (unit.from_atomic(value), unit.name.into())
        }
    }
}

/// The fitted parameters with standard errors, and how the fit ended.
pub fn fit_parameters_table(
    outcome: &crate::fit::FitOutcome,
    isotopologues: &[crate::fit::Isotopologue],
    units: DisplayUnits,
) -> Table {
    let rows = outcome
        .parameters
        .iter()
        .map(|p| {
            let (initial, unit) = parameter_in_display(p.initial, p.dimension, units);
            let (value, _) = parameter_in_display(p.value, p.dimension, units);
            let (error, _) = parameter_in_display(p.standard_error, p.dimension, units);
            vec![
                Cell::Text(p.name.to_string()),
                Cell::Text(unit),
                Cell::Number(initial),
                Cell::Number(value),
                if p.varied && error.is_finite() {
                    Cell::Number(error)
                } else {
                    Cell::Missing
                },
                Cell::Flag(p.varied),
            ]
        })
        .collect();
    let dof = outcome.degrees_of_freedom;
    let mut notes = vec![
        format!(
            "{} after {} evaluations; chi^2 {:.6e} -> {:.6e} with {dof} degrees of freedom (sqrt(chi^2/dof) = {:.4})",
            outcome.termination,
            outcome.evaluations,
            outcome.initial_chi_squared,
            outcome.chi_squared,
            (outcome.chi_squared / dof.max(1) as f64).sqrt()
        ),
        "standard errors: sqrt(diag(s^2 (J^T W J)^-1)), s^2 = chi^2/dof; derivatives by Hellmann-Feynman".into(),
    ];
    for iso in isotopologues {
        notes.push(format!(
            "isotopologue {}{}: reduced mass {:.9} u",
            iso.label,
            iso.tag
                .as_ref()
                .map_or(String::new(), |t| format!(" (tag '{t}')")),
            crate::units::to_dalton(iso.reduced_mass)
        ));
    }
    notes.extend(outcome.warnings.iter().map(|w| format!("WARNING: {w}")));
    Table {
        title: if outcome.converged {
            "fitted curve parameters".into()
        } else {
            "curve parameters: FIT NOT CONVERGED (last values)".into()
        },
        columns: vec![
            Column::new("parameter", 0),
            Column::new("unit", 0),
            Column::new("initial", 8),
            Column::new("fitted", 10),
            Column::new("standard_error", 3),
            Column::new("varied", 0),
        ],
        rows,
        notes,
    }
}

/// Correlation coefficients between the varied parameters.
pub fn correlation_table(outcome: &crate::fit::FitOutcome) -> Table {
    let names: Vec<&str> = outcome
        .parameters
        .iter()
        .filter(|p| p.varied)
        .map(|p| p.name)
        .collect();
    let rows = names
        .iter()
        .zip(&outcome.correlation)
        .map(|(name, row)| {
            std::iter::once(Cell::Text(name.to_string()))
                .chain(row.iter().map(|&c| Cell::Number(c)))
                .collect()
        })
        .collect();
    Table {
        title: "correlation of the varied parameters".into(),
        columns: std::iter::once(Column::new("parameter", 0))
            .chain(names.iter().map(|n| Column::new(*n, 4)))
            .collect(),
        rows,
        notes: Vec::new(),
    }
}

/// q(v', v'') as a matrix for people: a row per v', a column per v'', and the sums.
pub fn franck_condon_matrix(set: &crate::bands::BandSet, title: &str) -> Table {
    let lower: Vec<u32> = set.lower_sums.iter().map(|s| s.0).collect();
    let mut rows: Vec<Vec<Cell>> = set
        .upper_sums
        .iter()
        .map(|&(v_upper, sum)| {
            std::iter::once(Cell::Integer(v_upper.into()))
                .chain(lower.iter().map(|&v_lower| {
                    set.bands
                        .iter()
                        .find(|b| b.v_upper == v_upper && b.v_lower == v_lower)
                        .map_or(Cell::Missing, |b| Cell::Number(b.franck_condon))
                }))
                .chain([Cell::Number(sum)])
                .collect()
        })
        .collect();
    rows.push(
        std::iter::once(Cell::Text("sum".into()))
            .chain(set.lower_sums.iter().map(|s| Cell::Number(s.1)))
            .chain([Cell::Missing])
            .collect(),
    );
    Table {
        title: title.to_string(),
        columns: std::iter::once(Column::new("v'", 0))
            .chain(lower.iter().map(|v| Column::new(format!("v''={v}"), 5)))
            .chain([Column::new("sum", 5)])
            .collect(),
        rows,
        notes: vec![
            "rows v' (upper), columns v'' (lower); q(v', v'') = |<v'|v''>|^2; the bottom row sums over the v' listed (1 when no overlap is left in unlisted or continuum levels)".into(),
        ],
    }
}

/// Every band in long form: origins; between two curves overlaps, q and r-centroids (within
/// one curve, where the levels are orthogonal, these are left out); with a dipole function,
/// moments, A coefficients and oscillator strengths.
pub fn bands_table(
    set: &crate::bands::BandSet,
    title: &str,
    units: DisplayUnits,
    between_curves: bool,
) -> Table {
    let (eu, lu) = (units.energy.name, units.length.name);
    let with_moment = set.bands.iter().any(|b| b.moment.is_some());
    let rows = set
        .bands
        .iter()
        .map(|b| {
            let mut row = vec![
                Cell::Integer(b.v_upper.into()),
                Cell::Integer(b.v_lower.into()),
                units.e(b.origin),
            ];
            if between_curves {
                row.push(Cell::Number(b.overlap));
                row.push(Cell::Number(b.franck_condon));
                row.push(units.opt_l(b.r_centroid));
            }
            if with_moment {
                let number = |x: Option<f64>| x.map_or(Cell::Missing, Cell::Number);
                row.push(number(b.moment.map(|m| {
                    crate::units::customary_unit(crate::units::Dimension::DipoleMoment)
                        .from_atomic(m)
                })));
                row.push(number(b.einstein_a));
                row.push(number(b.oscillator_strength));
            }
            row
        })
        .collect();
    let mut columns = vec![
        Column::new("v_upper", 0),
        Column::new("v_lower", 0),
        Column::new(format!("origin_{eu}"), 4),
    ];
    if between_curves {
        columns.push(Column::new("overlap", 6));
        columns.push(Column::new("franck_condon", 6));
        columns.push(Column::new(format!("r_centroid_{lu}"), 5));
    }
    if with_moment {
        columns.push(Column::new("moment_debye", 6));
        columns.push(Column::new("einstein_A_s-1", 4));
        columns.push(Column::new("oscillator_strength", 4));
    }
    Table {
        title: title.to_string(),
        columns,
        rows,
        notes: vec![
            "overlap signs follow the wavefunctions' convention (positive innermost lobe); r_centroid is blank where the overlap is below 1e-8".into(),
            "rotationless (J' = J'' = 0) band values; A(v' -> v'') = 4 omega^3 |M|^2 / (3 c^3) (atomic units), f = (2/3) omega |M|^2".into(),
        ],
    }
}

/// Radiative lifetimes of the upper levels.
pub fn lifetimes_table(set: &crate::bands::BandSet, lower_range: (u32, u32)) -> Table {
    Table {
        title: "radiative lifetimes".into(),
        columns: vec![
            Column::new("v_upper", 0),
            Column::new("total_A_s-1", 4),
            Column::new("lifetime_s", 4),
        ],
        rows: set
            .lifetimes
            .iter()
            .map(|&(v, tau)| vec![Cell::Integer(v.into()), Cell::Number(1.0 / tau), Cell::Number(tau)])
            .collect(),
        notes: vec![format!(
            "summed over every bound lower level, v'' = {}..{}, whatever range is shown (emission into the lower curve's continuum is not included)",
            lower_range.0, lower_range.1
        )],
    }
}

/// Vacuum wavelength in nm of a transition energy in hartree.
fn wavelength_nm(hartree: f64) -> f64 {
    1e7 / crate::units::to_wavenumber(hartree)
}

/// Simulated lines.
pub fn lines_table(lines: &[crate::spectrum::Line], title: &str, units: DisplayUnits) -> Table {
    let eu = units.energy.name;
    Table {
        title: title.to_string(),
        columns: vec![
            Column::new("v_upper", 0),
            Column::new("J_upper", 0),
            Column::new("v_lower", 0),
            Column::new("J_lower", 0),
            Column::new("branch", 0),
            Column::new(format!("position_{eu}"), 4),
            Column::new("vacuum_wavelength_nm", 4),
            Column::new("relative_intensity", 5),
            Column::new("lower_population", 5),
        ],
        rows: lines
            .iter()
            .map(|l| {
                vec![
                    Cell::Integer(l.v_upper.into()),
                    Cell::Integer(l.j_upper.into()),
                    Cell::Integer(l.v_lower.into()),
                    Cell::Integer(l.j_lower.into()),
                    Cell::Text(format!("{:?}", l.branch)),
                    units.e(l.position),
                    Cell::Number(wavelength_nm(l.position)),
                    Cell::Number(l.intensity),
                    Cell::Number(l.lower_population),
                ]
            })
            .collect(),
        notes: vec!["relative absorption intensities (strongest line 1); see rungs::spectrum for the formula and what it leaves out".into()],
    }
}

/// A broadened profile on its axis.
pub fn profile_table(axis: &[f64], values: &[f64], units: DisplayUnits) -> Table {
    Table {
        title: "broadened spectrum".into(),
        columns: vec![
            Column::new(format!("position_{}", units.energy.name), 4),
            Column::new("vacuum_wavelength_nm", 4),
            Column::new(format!("intensity_per_{}", units.energy.name), 6),
        ],
        rows: axis
            .iter()
            .zip(values)
            .map(|(&x, &y)| {
                vec![
                    units.e(x),
                    Cell::Number(wavelength_nm(x)),
                    // Unit-area profiles: per hartree inside, per display unit outside.
                    Cell::Number(y * units.energy.in_atomic_units),
                ]
            })
            .collect(),
        notes: Vec::new(),
    }
}
