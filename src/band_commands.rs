//! The band commands of the CLI: `franck-condon` (between two curves) and `dipole` (infrared
//! bands within one curve). Argument parsing and output only; the physics is in
//! `rungs::bands`.

use crate::{
    bad_input, display_units, load_curve, quantity, quantum_range, solver_failure, write_output,
    CurveArgs, OutputArgs,
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

/// The highest bound v of a curve at J.
fn highest_bound(setup: &CurveSetup, j: u32) -> Result<u32> {
    let problem = RadialProblem::new(setup.curve.as_ref(), setup.pair.reduced_mass(), j);
    let set = rungs::solver::solve(&problem, &SolverSettings::default())
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
    let load = |path: &PathBuf| {
        load_curve(&CurveArgs {
            curve: Some(path.clone()),
            model: None,
            atoms: args.atoms.clone(),
            charge: None,
        })
    };
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
    let offset = match &args.term_energy {
        Some(text) => {
            let t_e = quantity(text, Dimension::Energy, "--term-energy")?;
            let minimum = |s: &CurveSetup| {
                rungs::curve::find_well(s.curve.as_ref())
                    .map(|w| w.v_min)
                    .map_err(|e| bad_input(format!("{}: {e}", s.source)))
            };
            t_e - (minimum(&upper)? - minimum(&lower)?)
        }
        None => 0.0,
    };
    let mut solved = solve_on_shared_grid(
        &[
            (
                RadialProblem::new(upper.curve.as_ref(), mu, args.j_upper),
                Some(range_upper.1),
            ),
            (
                RadialProblem::new(lower.curve.as_ref(), mu, args.j_lower),
                Some(range_lower.1),
            ),
        ],
        &SolverSettings::default(),
    )
    .map_err(|e| solver_failure(&format!("{} and {}", upper.source, lower.source), e))?;
    let notes = grid_notes(&solved, &["upper", "lower"]);
    let lower_levels = restrict(solved.pop().expect("two solved"), range_lower);
    let upper_levels = restrict(solved.pop().expect("two solved"), range_upper);
    let set = bands(&upper_levels, &lower_levels, offset, moment.as_ref(), false);
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
        band_tables(&set, &title, units, args.output.format, range_lower),
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
    let top = highest_bound(&setup, 0)?;
    let range_lower = v_range(&args.v_lower, (0, 1), "--v-lower", top, "curve")?;
    let range_upper = v_range(&args.v_upper, (1, 5), "--v-upper", top, "curve")?;
    let mu = setup.pair.reduced_mass();
    let highest = range_upper.1.max(range_lower.1);
    let mut solved = solve_on_shared_grid(
        &[(
            RadialProblem::new(setup.curve.as_ref(), mu, 0),
            Some(highest),
        )],
        &SolverSettings::default(),
    )
    .map_err(|e| solver_failure(&setup.source, e))?;
    let notes = grid_notes(&solved, &["curve"]);
    let levels = solved.pop().expect("one solved");
    let mut set = bands(&levels, &levels, 0.0, Some(&dipole), true);
    let within = |v: u32, r: (u32, u32)| (r.0..=r.1).contains(&v);
    set.bands
        .retain(|b| within(b.v_upper, range_upper) && within(b.v_lower, range_lower));
    set.lifetimes.retain(|(v, _)| within(*v, range_upper));
    let title = format!(
        "infrared bands of {} from {}",
        setup.pair.label(),
        args.dipole.display()
    );
    let mut tables = vec![bands_table(&set, &title, units, false)];
    if !set.lifetimes.is_empty() {
        tables.push(lifetimes_table(&set, (0, highest)));
    }
    print(tables, notes, &args.output)?;
    Ok(ExitCode::SUCCESS)
}
