//! The band commands of the CLI: `franck-condon` (between two curves) and `dipole` (infrared
//! bands within one curve). Argument parsing and output only; the physics is in
//! `rungs::bands`.

use crate::{
    bad_input, display_units, load_curve, quantity, quantum_range, solver_failure, write_output,
    CurveArgs, FigureArgs, OutputArgs,
};
use anyhow::{bail, Result};
use clap::Args;
use rungs::bands::{bands, BandSet};
use rungs::reader::{read_dipole_file, CurveSetup};
use rungs::report::tables::{bands_table, franck_condon_matrix, lifetimes_table};
use rungs::report::{render_all, Format, Table};
use rungs::solver::{solve_on_shared_grid, RadialProblem, SharedLevels, SolverSettings};
use rungs::units::{from_wavenumber, to_wavenumber, Dimension};
use std::path::PathBuf;
use std::process::ExitCode;

#[derive(Args)]
pub struct FranckCondonArgs {
    /// The lower electronic state's curve file.
    #[arg(long)]
    lower: PathBuf,
    /// The upper electronic state's curve file (the same nuclei).
    #[arg(long)]
    upper: PathBuf,
    /// T_e: the upper curve's minimum above the lower's, e.g. '15000 cm-1'. Without it the
    /// two curves' energies are taken on one absolute scale.
    #[arg(long)]
    term_energy: Option<String>,
    /// Upper levels v' (default 0-10, fewer if fewer are bound).
    #[arg(long)]
    v_upper: Option<String>,
    /// Lower levels v'' (default 0-3, fewer if fewer are bound).
    #[arg(long)]
    v_lower: Option<String>,
    /// J of the upper levels.
    #[arg(long, default_value_t = 0)]
    j_upper: u32,
    /// J of the lower levels.
    #[arg(long, default_value_t = 0)]
    j_lower: u32,
    /// Electronic transition-moment function (dipole file: TOML or CSV points) for
    /// transition moments, Einstein A coefficients, oscillator strengths and lifetimes.
    #[arg(long)]
    moment: Option<PathBuf>,
    /// The two atoms, replacing both files'.
    #[arg(long, num_args = 2, value_names = ["FIRST", "SECOND"])]
    atoms: Option<Vec<String>>,
    /// Write q(v', v'') in the cells of the figure's map.
    #[arg(long)]
    figure_values: bool,
    #[command(flatten)]
    figure: FigureArgs,
    #[command(flatten)]
    output: OutputArgs,
}

#[derive(Args)]
pub struct DipoleArgs {
    #[command(flatten)]
    curve: CurveArgs,
    /// Dipole-moment function: a TOML file with [dipole] (polynomial or points) or a CSV of
    /// points 'r_angstrom,dipole_debye'.
    #[arg(long)]
    dipole: PathBuf,
    /// Upper levels v' (default 1-5, fewer if fewer are bound).
    #[arg(long)]
    v_upper: Option<String>,
    /// Lower levels v'' (default 0-1).
    #[arg(long)]
    v_lower: Option<String>,
    /// J of the upper levels (with --j-lower: rovibrational matrix elements <v'J'|mu|v''J''>).
    #[arg(long, default_value_t = 0)]
    j_upper: u32,
    /// J of the lower levels.
    #[arg(long, default_value_t = 0)]
    j_lower: u32,
    #[command(flatten)]
    output: OutputArgs,
}

/// A v range from an option, or the default clipped to the bound levels.
fn v_range(
    given: &Option<String>,
    default: (u32, u32),
    option: &str,
    highest_bound: u32,
    which: &str,
) -> Result<(u32, u32)> {
    match given {
        Some(text) => {
            let (lo, hi) = quantum_range(text, option)?;
            if hi > highest_bound {
                bail!(bad_input(format!(
                    "{option} {text}: the {which} binds v = 0..{highest_bound} only; ask for at most {highest_bound}"
                )));
            }
            Ok((lo, hi))
        }
        None => Ok((default.0.min(highest_bound), default.1.min(highest_bound))),
    }
}

/// A curve file, with the atoms replaced when given.
fn load_file(path: &std::path::Path, atoms: Option<Vec<String>>) -> Result<CurveSetup> {
    load_curve(&CurveArgs {
        curve: Some(path.to_path_buf()),
        model: None,
        atoms,
        charge: None,
    })
}

/// The shift of the upper energies: T_e - (V_upper,min - V_lower,min) with T_e given, else 0
/// (the two curves on one absolute scale).
fn term_offset(term_energy: Option<&str>, upper: &CurveSetup, lower: &CurveSetup) -> Result<f64> {
    let Some(text) = term_energy else {
        return Ok(0.0);
    };
    let t_e = quantity(text, Dimension::Energy, "--term-energy")?;
    let minimum = |s: &CurveSetup| {
        rungs::curve::find_well(s.curve.as_ref())
            .map(|w| w.v_min)
            .map_err(|e| bad_input(format!("{}: {e}", s.source)))
    };
    Ok(t_e - (minimum(upper)? - minimum(lower)?))
}

/// The highest bound v of a curve at J.
fn highest_bound(setup: &CurveSetup, j: u32) -> Result<u32> {
    let problem = RadialProblem::new(setup.curve.as_ref(), setup.pair.reduced_mass(), j);
    let set = rungs::solver::solve(&problem, &SolverSettings::default().with_distortion(false))
        .map_err(|e| solver_failure(&setup.source, e))?;
    Ok(set.levels.last().map_or(0, |l| l.v))
}

/// Keep the levels (and wavefunctions) with v in `range`.
fn restrict(mut shared: SharedLevels, range: (u32, u32)) -> SharedLevels {
    let keep = |v: u32| (range.0..=range.1).contains(&v);
    shared.levels.levels.retain(|l| keep(l.v));
    shared.wavefunctions.retain(|w| keep(w.v));
    shared
}

/// A note when the shared grid and Numerov disagree on an energy by more than 1e-4 cm-1.
fn grid_notes(solved: &[SharedLevels], names: &[&str]) -> Vec<String> {
    solved
        .iter()
        .zip(names)
        .filter(|(s, _)| s.grid_disagreement > from_wavenumber(1e-4))
        .map(|(s, name)| {
            format!(
                "WARNING: on the shared grid the {name} levels differ from the certified ones by up to {:.2e} cm-1; the overlaps may be less accurate than usual",
                to_wavenumber(s.grid_disagreement)
            )
        })
        .collect()
}

fn print(mut tables: Vec<Table>, notes: Vec<String>, output: &OutputArgs) -> Result<()> {
    if let Some(first) = tables.first_mut() {
        first.notes.extend(notes);
    }
    write_output(
        &render_all(&tables, output.format),
        output.output.as_deref(),
    )
}

pub fn franck_condon(args: FranckCondonArgs) -> Result<ExitCode> {
    let units = display_units(&args.output)?;
    let load = |path: &PathBuf| load_file(path, args.atoms.clone());
    let (lower, upper) = (load(&args.lower)?, load(&args.upper)?);
    let mu = lower.pair.reduced_mass();
    if (upper.pair.reduced_mass() - mu).abs() > 1e-9 * mu {
        bail!(bad_input(format!(
            "the curves are for different nuclei: {} ({}) and {} ({}); give the same atoms, or --atoms for both",
            lower.pair.label(),
            lower.source,
            upper.pair.label(),
            upper.source
        )));
    }
    let top_lower = highest_bound(&lower, args.j_lower)?;
    let top_upper = highest_bound(&upper, args.j_upper)?;
    let range_lower = v_range(&args.v_lower, (0, 3), "--v-lower", top_lower, "lower curve")?;
    let range_upper = v_range(
        &args.v_upper,
        (0, 10),
        "--v-upper",
        top_upper,
        "upper curve",
    )?;
    let moment = args
        .moment
        .as_deref()
        .map(read_dipole_file)
        .transpose()
        .map_err(|e| bad_input(e.to_string()))?;
    let offset = term_offset(args.term_energy.as_deref(), &upper, &lower)?;
    let mut solved = solve_on_shared_grid(
        &[
            (
                RadialProblem::new(upper.curve.as_ref(), mu, args.j_upper),
                Some(range_upper.1),
            ),
            (
                RadialProblem::new(lower.curve.as_ref(), mu, args.j_lower),
                // A lifetime sums the emission to every lower level, whatever is shown.
                Some(if moment.is_some() {
                    top_lower
                } else {
                    range_lower.1
                }),
            ),
        ],
        &SolverSettings::default(),
    )
    .map_err(|e| solver_failure(&format!("{} and {}", upper.source, lower.source), e))?;
    let notes = grid_notes(&solved, &["upper", "lower"]);
    let every_lower = solved.pop().expect("two solved");
    let upper_levels = restrict(solved.pop().expect("two solved"), range_upper);
    let lower_levels = restrict(every_lower.clone(), range_lower);
    let mut set = bands(&upper_levels, &lower_levels, offset, moment.as_ref(), false);
    set.lifetimes = bands(&upper_levels, &every_lower, offset, moment.as_ref(), false).lifetimes;
    args.figure
        .save(&rungs::figures::builders::franck_condon_figure(
            &set,
            args.figure_values,
        ))?;
    let title = format!(
        "Franck-Condon factors of {}: {} (J' = {}) <- {} (J'' = {})",
        lower.pair.label(),
        upper.source,
        args.j_upper,
        lower.source,
        args.j_lower
    );
    let mut notes = notes;
    notes.push(match &args.term_energy {
        Some(t) => format!("band origins with T_e = {t}"),
        None => {
            "band origins on the curves' common absolute energy scale (no --term-energy)".into()
        }
    });
    print(
        band_tables(&set, &title, units, args.output.format, (0, top_lower)),
        notes,
        &args.output,
    )?;
    Ok(ExitCode::SUCCESS)
}

/// The matrix for people (with the long table after it), the long table for scripts, and
/// the lifetimes when there are any.
fn band_tables(
    set: &BandSet,
    title: &str,
    units: rungs::report::tables::DisplayUnits,
    format: Format,
    lower_range: (u32, u32),
) -> Vec<Table> {
    let mut tables = Vec::new();
    if format == Format::Table {
        tables.push(franck_condon_matrix(set, title));
    }
    tables.push(bands_table(set, title, units, true));
    if !set.lifetimes.is_empty() {
        tables.push(lifetimes_table(set, lower_range));
    }
    tables
}

pub fn dipole(args: DipoleArgs) -> Result<ExitCode> {
    let setup = load_curve(&args.curve)?;
    let units = display_units(&args.output)?;
    if setup.pair.is_homonuclear() {
        bail!(bad_input(format!(
            "{} is homonuclear: its dipole moment vanishes by symmetry, so vibrational bands within one electronic state are infrared-inactive (no dipole table is made; quadrupole and Raman transitions are outside this tool)",
            setup.pair.label()
        )));
    }
    let dipole = read_dipole_file(&args.dipole).map_err(|e| bad_input(e.to_string()))?;
    let top = highest_bound(&setup, args.j_upper.max(args.j_lower))?;
    let range_lower = v_range(&args.v_lower, (0, 1), "--v-lower", top, "curve")?;
    let range_upper = v_range(&args.v_upper, (1, 5), "--v-upper", top, "curve")?;
    let mu = setup.pair.reduced_mass();
    let highest = range_upper.1.max(range_lower.1);
    let same_j = args.j_upper == args.j_lower;
    // One J: one problem, bands v' > v''. Two J: both on one grid, every pair (v' = v'' is
    // then a pure rotational transition).
    let problems: Vec<(RadialProblem, Option<u32>)> = [args.j_upper, args.j_lower]
        .iter()
        .take(if same_j { 1 } else { 2 })
        .map(|&j| {
            (
                RadialProblem::new(setup.curve.as_ref(), mu, j),
                Some(highest),
            )
        })
        .collect();
    let mut solved = solve_on_shared_grid(&problems, &SolverSettings::default())
        .map_err(|e| solver_failure(&setup.source, e))?;
    let notes = grid_notes(&solved, &["upper", "lower"]);
    let lower = solved.pop().expect("one solved");
    let upper = solved.pop().unwrap_or_else(|| lower.clone());
    let mut set = bands(&upper, &lower, 0.0, Some(&dipole), same_j);
    let within = |v: u32, r: (u32, u32)| (r.0..=r.1).contains(&v);
    set.bands
        .retain(|b| within(b.v_upper, range_upper) && within(b.v_lower, range_lower));
    set.lifetimes.retain(|(v, _)| within(*v, range_upper));
    let title = format!(
        "infrared bands of {} (J' = {}, J'' = {}) from {}",
        setup.pair.label(),
        args.j_upper,
        args.j_lower,
        args.dipole.display()
    );
    let mut tables = vec![bands_table(&set, &title, units, false)];
    if !same_j {
        tables[0].notes.push(format!(
            "J' = {} and J'' = {}: the moments are between the two radial functions; the A and f columns use the rotationless formula, and a single line's values take the Hoenl-London factor S/(2J'+1) (see rungs spectrum)",
            args.j_upper, args.j_lower
        ));
    }
    if !set.lifetimes.is_empty() {
        tables.push(lifetimes_table(&set, (0, highest)));
    }
    print(tables, notes, &args.output)?;
    Ok(ExitCode::SUCCESS)
}

#[derive(Args)]
pub struct SpectrumArgs {
    /// The lower state's curve file.
    #[arg(long)]
    lower: PathBuf,
    /// The upper state's curve file; without it, the infrared spectrum within the lower
    /// curve (needs --dipole).
    #[arg(long, requires = "term_energy")]
    upper: Option<PathBuf>,
    /// T_e of the upper curve above the lower, e.g. '14000 cm-1'.
    #[arg(long)]
    term_energy: Option<String>,
    /// Electronic transition-moment function (else a constant moment: Franck-Condon factors).
    #[arg(long, conflicts_with = "dipole")]
    moment: Option<PathBuf>,
    /// Dipole-moment function of the lower curve, for an infrared spectrum.
    #[arg(long)]
    dipole: Option<PathBuf>,
    /// Temperature of the lower-state populations, e.g. '300 K'.
    #[arg(long, default_value = "300 K")]
    temperature: String,
    /// Upper levels v' (default 0-5 electronic, 1-3 infrared).
    #[arg(long)]
    v_upper: Option<String>,
    /// Lower levels v'' (default 0-1).
    #[arg(long)]
    v_lower: Option<String>,
    /// Highest J'' (default: where the populations of v'' = 0 fall below 1e-5 of their peak).
    #[arg(long)]
    j_max: Option<u32>,
    /// Lines weaker than this fraction of the strongest are left out.
    #[arg(long, default_value_t = 1e-4)]
    cutoff: f64,
    /// Write the broadened profile (CSV, uniform in wavenumber) to this file.
    #[arg(long, value_name = "FILE")]
    profile: Option<PathBuf>,
    /// Line shape of the profile.
    #[arg(long, default_value = "gaussian", value_parser = ["gaussian", "lorentzian", "voigt"])]
    shape: String,
    /// Full width at half maximum (the Gaussian part for voigt), e.g. '0.5 cm-1'.
    #[arg(long, default_value = "1 cm-1")]
    fwhm: String,
    /// The Lorentzian full width for voigt.
    #[arg(long)]
    lorentzian_fwhm: Option<String>,
    /// Step of the profile's axis (default a tenth of the narrowest width).
    #[arg(long)]
    step: Option<String>,
    #[command(flatten)]
    figure: FigureArgs,
    #[command(flatten)]
    output: OutputArgs,
}

pub fn spectrum(args: SpectrumArgs) -> Result<ExitCode> {
    use rungs::spectrum::{broaden, simulate, Profile};
    let units = display_units(&args.output)?;
    let load = |path: &PathBuf| load_file(path, None);
    let lower = load(&args.lower)?;
    let upper = args.upper.as_ref().map(load).transpose()?;
    let mu = lower.pair.reduced_mass();
    let infrared = upper.is_none();
    if infrared && args.dipole.is_none() {
        bail!(bad_input(
            "an infrared spectrum (no --upper) needs --dipole FILE; an electronic one needs --upper and --term-energy"
        ));
    }
    if infrared && lower.pair.is_homonuclear() {
        bail!(bad_input(format!(
            "{} is homonuclear: no infrared spectrum within one electronic state (the dipole vanishes by symmetry)",
            lower.pair.label()
        )));
    }
    if let Some(upper) = &upper {
        if (upper.pair.reduced_mass() - mu).abs() > 1e-9 * mu {
            bail!(bad_input(format!(
                "the curves are for different nuclei: {} and {}",
                lower.pair.label(),
                upper.pair.label()
            )));
        }
    }
    let upper_setup = upper.as_ref().unwrap_or(&lower);
    let function = args
        .moment
        .as_ref()
        .or(args.dipole.as_ref())
        .map(|p| read_dipole_file(p))
        .transpose()
        .map_err(|e| bad_input(e.to_string()))?;
    let kelvin = quantity(&args.temperature, Dimension::Energy, "--temperature")?
        / rungs::spectrum::thermal_energy(1.0);
    let solve_j = |setup: &CurveSetup, j: u32, highest: Option<u32>| {
        rungs::solver::solve(
            &RadialProblem::new(setup.curve.as_ref(), mu, j),
            &SolverSettings::default()
                .with_highest_v(highest)
                .with_distortion(false),
        )
    };
    // Every bound J = 0 level of the lower curve: its highest v bounds --v-lower, and its
    // levels set the populations below.
    let ground = solve_j(&lower, 0, None).map_err(|e| solver_failure(&lower.source, e))?;
    let top_lower = ground.levels.last().map_or(0, |l| l.v);
    let top_upper = highest_bound(upper_setup, 0)?;
    let range_lower = v_range(&args.v_lower, (0, 1), "--v-lower", top_lower, "lower curve")?;
    let default_upper = if infrared { (1, 3) } else { (0, 5) };
    let range_upper = v_range(
        &args.v_upper,
        default_upper,
        "--v-upper",
        top_upper,
        "upper curve",
    )?;
    let offset = term_offset(args.term_energy.as_deref(), upper_setup, &lower)?;
    // Band strengths from the J = 0 wavefunctions on one grid.
    let problems: Vec<(RadialProblem, Option<u32>)> = if infrared {
        vec![(
            RadialProblem::new(lower.curve.as_ref(), mu, 0),
            Some(range_upper.1.max(range_lower.1)),
        )]
    } else {
        vec![
            (
                RadialProblem::new(upper_setup.curve.as_ref(), mu, 0),
                Some(range_upper.1),
            ),
            (
                RadialProblem::new(lower.curve.as_ref(), mu, 0),
                Some(range_lower.1),
            ),
        ]
    };
    let mut shared = solve_on_shared_grid(&problems, &SolverSettings::default())
        .map_err(|e| solver_failure(&lower.source, e))?;
    let low_shared = shared.pop().expect("one solved");
    let up_shared = shared.pop().unwrap_or_else(|| low_shared.clone());
    let band_set = bands(&up_shared, &low_shared, offset, function.as_ref(), infrared);
    let within = |v: u32, r: (u32, u32)| (r.0..=r.1).contains(&v);
    let strength = |v_upper: u32, v_lower: u32| {
        band_set
            .bands
            .iter()
            .find(|b| b.v_upper == v_upper && b.v_lower == v_lower)
            .filter(|_| within(v_upper, range_upper) && within(v_lower, range_lower))
            .map(|b| b.moment.map_or(b.franck_condon, |m| m * m))
    };
    // Rotational levels, J solved in parallel: the lower vibrational levels with a Boltzmann
    // factor above 1e-8 (for the populations) and at least the v'' asked for; J up to j_max,
    // or where (2J + 1) exp(-B J(J+1)/kT) of v'' = 0 falls below 1e-5 of its peak.
    let kt = rungs::spectrum::thermal_energy(kelvin);
    let populated = ground
        .levels
        .iter()
        .take_while(|l| (-(l.energy - ground.levels[0].energy) / kt).exp() > 1e-8)
        .last()
        .map_or(0, |l| l.v)
        .max(range_lower.1);
    let j_max = args.j_max.unwrap_or_else(|| {
        let b = ground.levels[0].rotational_constant;
        let weight = |j: f64| (2.0 * j + 1.0) * (-b * j * (j + 1.0) / kt).exp();
        let j_peak = (0.5 * (kt / b).sqrt()).floor();
        let peak = weight(j_peak);
        (j_peak as u32..100_000)
            .find(|&j| weight(f64::from(j)) < 1e-5 * peak)
            .unwrap_or(100_000)
    });
    use rayon::prelude::*;
    let solve_range = |setup: &CurveSetup, top_j: u32, highest: u32| {
        let solved: Vec<_> = (0..=top_j)
            .into_par_iter()
            .map(|j| solve_j(setup, j, Some(highest)))
            .collect();
        let mut sets = Vec::new();
        for result in solved {
            match result {
                Ok(set) => sets.push(set),
                Err(rungs::solver::SolverError::NothingBound { .. }) => break,
                Err(e) => return Err(solver_failure(&setup.source, e)),
            }
        }
        Ok(sets)
    };
    let lower_sets = solve_range(&lower, j_max, populated)?;
    let j_top = lower_sets.last().map_or(0, |s| s.j) + 1;
    let upper_sets = solve_range(upper_setup, j_top, range_upper.1)?;
    let lines = simulate(
        &lower_sets,
        &upper_sets,
        &strength,
        offset,
        kelvin,
        args.cutoff,
    )
    .map_err(|e| bad_input(e.to_string()))?;
    let mut tables = vec![rungs::report::tables::lines_table(
        &lines,
        &format!(
            "simulated {} spectrum of {} at {kelvin} K",
            if infrared { "infrared" } else { "electronic" },
            lower.pair.label()
        ),
        units,
    )];
    tables[0].notes.push(format!(
        "lower levels v'' = 0..{populated}, J'' = 0..{} hold the populations (the rest have Boltzmann factors below 1e-8 or 1e-5 of the peak); band strengths |M|^2 {}",
        j_top - 1,
        if function.is_some() { "from the moment function" } else { "taken as the Franck-Condon factors (constant electronic moment)" }
    ));
    let mut profile_points = None;
    if args.profile.is_some() || args.figure.figure.is_some() {
        let width = |text: &str, option: &str| quantity(text, Dimension::Energy, option);
        let fwhm = width(&args.fwhm, "--fwhm")?;
        let profile = match args.shape.as_str() {
            "lorentzian" => Profile::Lorentzian { fwhm },
            "voigt" => Profile::Voigt {
                gaussian_fwhm: fwhm,
                lorentzian_fwhm: width(
                    args.lorentzian_fwhm.as_deref().ok_or_else(|| {
                        bad_input("--shape voigt needs --lorentzian-fwhm, e.g. '0.2 cm-1'")
                    })?,
                    "--lorentzian-fwhm",
                )?,
            },
            _ => Profile::Gaussian { fwhm },
        };
        let step = match &args.step {
            Some(text) => quantity(text, Dimension::Energy, "--step")?,
            None => profile.narrowest() / 10.0,
        };
        let (first, last) = (lines[0].position, lines[lines.len() - 1].position);
        let margin = 10.0 * fwhm;
        let points = ((last - first + 2.0 * margin) / step).ceil() as usize + 1;
        if points > 5_000_000 {
            bail!(bad_input(format!(
                "the profile would need {points} points; give a coarser --step or fewer bands"
            )));
        }
        let axis: Vec<f64> = (0..points)
            .map(|i| first - margin + i as f64 * step)
            .collect();
        let values = broaden(&lines, profile, &axis).map_err(|e| bad_input(e.to_string()))?;
        if let Some(path) = &args.profile {
            let table = rungs::report::tables::profile_table(&axis, &values, units);
            std::fs::write(path, table.render(Format::Csv))
                .map_err(|e| anyhow::anyhow!("cannot write '{}': {e}", path.display()))?;
        }
        profile_points = Some((axis, values));
    }
    args.figure
        .save(&rungs::figures::builders::spectrum_figure(
            &lines,
            profile_points
                .as_ref()
                .map(|(axis, values)| (axis.as_slice(), values.as_slice())),
            units,
        ))?;
    write_output(
        &render_all(&tables, args.output.format),
        args.output.output.as_deref(),
    )?;
    Ok(ExitCode::SUCCESS)
}
