//! The `rungs` command line: parses arguments, calls the library, prints. No physics here.
//!
//! Exit codes: 0 success; 1 a numerical failure; 2 bad input or usage; 3 results were printed
//! but at least one level missed the tolerance (marked in the output).

mod band_commands;

use anyhow::{bail, Context, Result};
use clap::{Args, Parser, Subcommand};
use rungs::reader::{self, CurveSetup, PairOverride};
use rungs::report::tables::{levels_table, survey_table, wavefunction_table, DisplayUnits};
use rungs::report::{Format, Table};
use rungs::solver::{self, LevelSet, Method, RadialProblem, SolverError, SolverSettings};
use rungs::units::{self, Dimension};
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

#[derive(Parser)]
#[command(
    name = "rungs",
    version,
    about = "Bound levels and spectroscopic quantities of diatomic potential-energy curves",
    long_about = "Bound levels and spectroscopic quantities of diatomic potential-energy curves.\n\n\
Give a curve file (TOML; see curves/ for invented examples) or an inline model with --model and --atoms.\n\
Every quantity carries its unit: \"2990.9 cm-1\", \"1.2746 angstrom\", \"34.96885 u\"."
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// The well, harmonic constants, a WKB level count and turning points of a curve.
    #[command(
        after_help = "Examples:\n  rungs inspect curves/demo_morse.toml\n  rungs inspect --model 'morse:omega_e=1500 cm-1,omega_e_x_e=20 cm-1,r_e=1.3 angstrom' --atoms 1H 35Cl --at '5000 cm-1'\n  rungs inspect curves/h2_born_oppenheimer.toml --format json"
    )]
    Inspect(InspectArgs),
    /// Every bound vibrational level (any J) with its diagnostics, and wavefunctions on request.
    #[command(
        after_help = "Examples:\n  rungs levels curves/demo_morse.toml\n  rungs levels curves/h2_born_oppenheimer.toml --j 0-5 --format csv\n  rungs levels curves/demo_morse.toml --all-j --energy-unit eV\n  rungs levels curves/demo_morse.toml --wavefunctions psi.csv --v 0,1,2\n  rungs levels curves/demo_morse.toml --figure levels.png --figure-size slide"
    )]
    Levels(Box<LevelsArgs>),
    /// Spectroscopic constants from the levels: omega_e, omega_e x_e, ..., B_e, alpha_e, ...
    /// by least squares over a v range, and a Birge-Sponer dissociation estimate.
    #[command(
        after_help = "Examples:\n  rungs constants curves/demo_morse.toml\n  rungs constants curves/h2_born_oppenheimer.toml --v-range 0-5 --order 3 --format json"
    )]
    Constants(ConstantsArgs),
    /// Computed against measured levels: obs - calc for each (v, J), RMS and weighted deviation.
    #[command(
        after_help = "Examples:\n  rungs compare curves/demo_morse.toml --measured curves/demo_measured_levels.csv\n  rungs compare curves/demo_morse.toml --measured curves/demo_measured_levels.csv --energy-zero lowest --format csv\n  rungs compare curves/demo_morse.toml --measured curves/demo_measured_levels.csv --figure residuals.svg"
    )]
    Compare(CompareArgs),
    /// Near dissociation: LeRoy-Bernstein fit of the highest levels (limit, v_D, C_n) and the
    /// levels it predicts, beside the solver's own count.
    #[command(
        after_help = "Examples:\n  rungs near-limit curves/demo_points.toml\n  rungs near-limit curves/demo_points.toml --power 6 --top 8 --figure near_limit.png\n  rungs near-limit --measured curves/demo_near_limit_levels.csv --atoms 39K 133Cs --power 6"
    )]
    NearLimit(NearLimitArgs),
    /// Fit curve parameters to measured levels or transitions (Levenberg-Marquardt with
    /// Hellmann-Feynman derivatives), with standard errors, correlations and residuals.
    #[command(
        after_help = "Examples:\n  rungs fit curves/demo_morse.toml --measured curves/demo_measured_levels.csv --vary well_depth,width\n  rungs fit curves/demo_morse.toml --measured curves/demo_measured_levels.csv --vary well_depth,width,r_e --write-curve fitted.toml --figure residuals.png\n  rungs fit curves/demo_morse_guess.toml --measured curves/demo_measured_lines.csv --vary well_depth,width,r_e --isotopologue 6LiF=6Li,19F --isotopologue 7LiF=7Li,19F\n\nParameters: morse well_depth, width, r_e; harmonic force_constant, r_e; lennard-jones\nwell_depth, r_e; points depth_scale, r_shift (V = L + s [V_table(r - d) - L])."
    )]
    Fit(FitArgs),
    /// Franck-Condon factors, overlaps, r-centroids and band origins between two curves, and
    /// with a transition-moment function Einstein A coefficients and lifetimes.
    #[command(
        after_help = "Examples:\n  rungs franck-condon --lower curves/demo_morse.toml --upper curves/demo_upper.toml --term-energy '14000 cm-1'\n  rungs franck-condon --lower curves/demo_morse.toml --upper curves/demo_upper.toml --term-energy '14000 cm-1' --v-upper 0-6 --v-lower 0-2 --moment curves/demo_transition_moment.toml --format csv\n  rungs franck-condon --lower curves/demo_morse.toml --upper curves/demo_upper.toml --term-energy '14000 cm-1' --figure fc.png --figure-values"
    )]
    FranckCondon(band_commands::FranckCondonArgs),
    /// Infrared bands within one curve from a dipole-moment function: transition moments,
    /// Einstein A coefficients, oscillator strengths and lifetimes.
    #[command(
        after_help = "Examples:\n  rungs dipole curves/demo_morse.toml --dipole curves/demo_dipole.toml\n  rungs dipole curves/demo_morse.toml --dipole curves/demo_dipole.toml --v-upper 1-4 --v-lower 0 --format json\n\nDipole file (TOML):\n  [dipole]\n  form = \"polynomial\"        # mu(r) = sum_k c_k (r - r_ref)^k\n  r_ref = \"1.56 angstrom\"\n  unit = \"debye\"\n  length_unit = \"angstrom\"   # c_k in debye / angstrom^k\n  coefficients = [6.3, 2.0, -0.5]\nor form = \"points\" with file = \"points.csv\" (header r_angstrom,dipole_debye)."
    )]
    Dipole(band_commands::DipoleArgs),
    /// A simulated absorption spectrum (P and R lines with Boltzmann populations) of an
    /// electronic band system or of infrared bands, with a broadened profile.
    #[command(
        after_help = "Examples:\n  rungs spectrum --lower curves/demo_morse.toml --upper curves/demo_upper.toml --term-energy '14000 cm-1' --temperature '500 K' --profile profile.csv\n  rungs spectrum --lower curves/demo_morse.toml --dipole curves/demo_dipole.toml --v-upper 1 --v-lower 0 --shape voigt --fwhm '0.3 cm-1' --lorentzian-fwhm '0.1 cm-1' --profile ir.csv --format csv\n  rungs spectrum --lower curves/demo_morse.toml --upper curves/demo_upper.toml --term-energy '14000 cm-1' --v-upper 0-2 --v-lower 0 --figure spectrum.svg"
    )]
    Spectrum(Box<band_commands::SpectrumArgs>),
    /// Print a shell completion script.
    #[command(
        after_help = "Examples:\n  rungs completions bash > ~/.local/share/bash-completion/completions/rungs\n  rungs completions zsh > ~/.zfunc/_rungs\n  rungs completions fish > ~/.config/fish/completions/rungs.fish"
    )]
    Completions {
        /// The shell.
        shell: clap_complete::Shell,
    },
}

#[derive(Args)]
struct CurveArgs {
    /// Curve file (TOML).
    curve: Option<PathBuf>,
    /// Inline analytic model instead of a file: MODEL:key=value,... e.g.
    /// 'morse:well_depth=37000 cm-1,width=1.9 1/angstrom,r_e=1.27 angstrom'.
    #[arg(long, conflicts_with = "curve")]
    model: Option<String>,
    /// The two atoms (nuclide labels such as 1H, D, 35Cl, or masses such as '34.97 u');
    /// replaces the file's.
    #[arg(long, num_args = 2, value_names = ["FIRST", "SECOND"])]
    atoms: Option<Vec<String>>,
    /// Molecular charge (+1 for a cation); replaces the file's.
    #[arg(long, allow_hyphen_values = true)]
    charge: Option<i32>,
}

/// Figure options shared by the analysis commands.
#[derive(Args)]
struct FigureArgs {
    /// Write the command's figure to this file (.svg or .png) beside its table.
    #[arg(long, value_name = "FILE")]
    figure: Option<PathBuf>,
    /// Figure size: column (3.4 x 2.6 in at 300 dpi) or slide (10 x 5.6 in at 150 dpi).
    #[arg(long, default_value = "column", value_parser = ["column", "slide"])]
    figure_size: String,
    /// Figure width in inches (replaces the preset's).
    #[arg(long)]
    figure_width: Option<f64>,
    /// Figure height in inches (replaces the preset's).
    #[arg(long)]
    figure_height: Option<f64>,
    /// Dots per inch of a PNG (and the pixel size of an SVG; replaces the preset's).
    #[arg(long)]
    dpi: Option<f64>,
}

impl FigureArgs {
    fn size(&self) -> rungs::figures::FigureSize {
        let preset = match self.figure_size.as_str() {
            "slide" => rungs::figures::FigureSize::SLIDE,
            _ => rungs::figures::FigureSize::COLUMN,
        };
        rungs::figures::FigureSize {
            width_inches: self.figure_width.unwrap_or(preset.width_inches),
            height_inches: self.figure_height.unwrap_or(preset.height_inches),
            dpi: self.dpi.unwrap_or(preset.dpi),
            font_points: preset.font_points,
        }
    }

    /// Draw `figure` into the requested file, if one was requested.
    fn save(&self, figure: &impl rungs::figures::Figure) -> Result<()> {
        match &self.figure {
            Some(path) => rungs::figures::save(figure, path, self.size())
                .map_err(|e| bad_input(format!("{}: {e}", path.display()))),
            None => Ok(()),
        }
    }
}

#[derive(Args)]
struct OutputArgs {
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    format: Format,
    /// Energy unit of the output (cm-1, eV, hartree, kJ/mol, kcal/mol, K, MHz, GHz).
    #[arg(long, default_value = "cm-1")]
    energy_unit: String,
    /// Length unit of the output (angstrom, bohr, nm, pm).
    #[arg(long, default_value = "angstrom")]
    length_unit: String,
    /// Write to this file instead of standard output ('-' for standard output).
    #[arg(long, short)]
    output: Option<PathBuf>,
}

#[derive(Args)]
struct InspectArgs {
    #[command(flatten)]
    curve: CurveArgs,
    /// Also give the classical turning points at this energy above the minimum, e.g. '5000 cm-1'.
    #[arg(long)]
    at: Option<String>,
    #[command(flatten)]
    output: OutputArgs,
}

#[derive(Args)]
struct LevelsArgs {
    #[command(flatten)]
    curve: CurveArgs,
    /// Rotational quantum number J, or a range such as 0-10.
    #[arg(long, default_value = "0", conflicts_with = "all_j")]
    j: String,
    /// Every J until no level is bound (the whole bound manifold).
    #[arg(long)]
    all_j: bool,
    /// No progress display.
    #[arg(long, short)]
    quiet: bool,
    /// Omega, the projection of electronic angular momentum (0 for Sigma states).
    #[arg(long, default_value_t = 0)]
    omega: u32,
    /// Highest v to report.
    #[arg(long)]
    vmax: Option<u32>,
    /// Tolerance each level must meet, e.g. '1e-6 cm-1' (default 1e-6 cm-1).
    #[arg(long)]
    tolerance: Option<String>,
    /// Method: numerov (production) or dvr (dense sinc-DVR reference).
    #[arg(long, default_value = "numerov", value_parser = ["numerov", "dvr"])]
    method: String,
    /// Fix the grid's inner end, e.g. '0.5 angstrom' (with --r-max).
    #[arg(long, requires = "r_max")]
    r_min: Option<String>,
    /// Fix the grid's outer end, e.g. '12 angstrom' (with --r-min).
    #[arg(long, requires = "r_min")]
    r_max: Option<String>,
    /// Fix the grid step (the coarsest of the Richardson sequence), e.g. '0.01 angstrom'.
    #[arg(long)]
    step: Option<String>,
    /// For curves without a dissociation limit: highest energy above the minimum sought.
    #[arg(long)]
    ceiling: Option<String>,
    /// Write the wavefunctions (CSV: v, r, psi) of the first J to this file.
    #[arg(long)]
    wavefunctions: Option<PathBuf>,
    /// Which v to write with --wavefunctions and to draw with --figure, e.g. 0,1,5 (default:
    /// all written, about a dozen drawn).
    #[arg(long, value_delimiter = ',')]
    v: Option<Vec<u32>>,
    /// Draw probability densities instead of wavefunctions in the figure.
    #[arg(long)]
    densities: bool,
    #[command(flatten)]
    figure: FigureArgs,
    #[command(flatten)]
    output: OutputArgs,
}

#[derive(Args)]
struct ConstantsArgs {
    #[command(flatten)]
    curve: CurveArgs,
    /// Levels used in the fits, e.g. 0-10 (default: all bound levels).
    #[arg(long)]
    v_range: Option<String>,
    /// Order of the G(v) polynomial in (v + 1/2).
    #[arg(long, default_value_t = 3)]
    order: usize,
    /// Order of the B_v polynomial in (v + 1/2).
    #[arg(long, default_value_t = 2)]
    rotation_order: usize,
    /// Spacings at the top used for the Birge-Sponer line.
    #[arg(long, default_value_t = 5)]
    birge_sponer_points: usize,
    #[command(flatten)]
    output: OutputArgs,
}

#[derive(Args)]
struct CompareArgs {
    #[command(flatten)]
    curve: CurveArgs,
    /// Lines tagged TAG belong to this isotopologue: TAG=FIRST,SECOND (atoms as in --atoms).
    /// Repeat for several. Untagged lines, and tags not named here, use the curve's molecule.
    #[arg(long, value_name = "TAG=FIRST,SECOND")]
    isotopologue: Vec<String>,
    /// Measured levels (CSV: v,J,energy_<unit>,uncertainty_<unit>[,tag]).
    #[arg(long)]
    measured: PathBuf,
    /// The zero of the measured energies: lowest (v = 0 of the lowest J: term values),
    /// minimum (the curve minimum) or limit (the dissociation limit).
    #[arg(long, default_value = "lowest", value_parser = ["lowest", "minimum", "limit"])]
    energy_zero: String,
    #[command(flatten)]
    figure: FigureArgs,
    #[command(flatten)]
    output: OutputArgs,
}

#[derive(Args)]
struct FitArgs {
    #[command(flatten)]
    curve: CurveArgs,
    /// Measured levels (CSV: v,J,energy_<unit>,uncertainty_<unit>[,tag]) or transitions
    /// (v,J,v_lower,J_lower,transition_<unit>,uncertainty_<unit>[,tag]).
    #[arg(long)]
    measured: PathBuf,
    /// The parameters to vary, by their curve-file names, comma-separated.
    #[arg(long, value_delimiter = ',', required = true)]
    vary: Vec<String>,
    /// Lines tagged TAG belong to this isotopologue: TAG=FIRST,SECOND (atoms as in --atoms).
    /// Repeat for several. Untagged lines, and tags not named here, use the curve's molecule.
    #[arg(long, value_name = "TAG=FIRST,SECOND")]
    isotopologue: Vec<String>,
    /// The zero of measured level energies: lowest (v = 0, J = Omega), minimum or limit.
    #[arg(long, default_value = "lowest", value_parser = ["lowest", "minimum", "limit"])]
    energy_zero: String,
    /// Omega of the electronic state.
    #[arg(long, default_value_t = 0)]
    omega: u32,
    /// Most evaluations of the levels before the fit gives up.
    #[arg(long, default_value_t = 200)]
    max_evaluations: usize,
    /// Write the fitted curve as a curve file.
    #[arg(long, value_name = "FILE")]
    write_curve: Option<PathBuf>,
    /// No progress display.
    #[arg(long)]
    quiet: bool,
    #[command(flatten)]
    figure: FigureArgs,
    #[command(flatten)]
    output: OutputArgs,
}

#[derive(Args)]
struct NearLimitArgs {
    #[command(flatten)]
    curve: CurveArgs,
    /// The power n of the long-range tail -C_n/r^n (default: the curve's, if it has one).
    #[arg(long)]
    power: Option<f64>,
    /// How many of the highest levels to fit (at least 4).
    #[arg(long, default_value_t = 6)]
    top: usize,
    /// Fit measured levels instead (CSV as for compare; the levels of the lowest J in the
    /// file). The curve, if given, supplies the molecule, the power and the solver's count
    /// beside; without one, give --atoms and --power.
    #[arg(long)]
    measured: Option<PathBuf>,
    #[command(flatten)]
    figure: FigureArgs,
    #[command(flatten)]
    output: OutputArgs,
}

/// An error whose exit code is 2 (bad input).
#[derive(Debug, thiserror::Error)]
#[error("{0}")]
struct BadInput(String);

fn bad_input(message: impl Into<String>) -> anyhow::Error {
    BadInput(message.into()).into()
}

fn load_curve(args: &CurveArgs) -> Result<CurveSetup> {
    let overrides = PairOverride {
        atoms: args.atoms.clone(),
        charge: args.charge,
    };
    let setup = match (&args.curve, &args.model) {
        (Some(path), None) => reader::read_curve_file(path, &overrides),
        (None, Some(spec)) => {
            let atoms = args
                .atoms
                .as_ref()
                .ok_or_else(|| bad_input("--model needs --atoms, e.g. --atoms 1H 35Cl"))?;
            reader::parse_inline_model(spec, atoms, args.charge.unwrap_or(0))
        }
        _ => {
            return Err(bad_input(
                "give a curve file, or --model with --atoms; see 'rungs help inspect'",
            ))
        }
    };
    let setup = setup.map_err(|e| bad_input(e.to_string()))?;
    for warning in &setup.warnings {
        eprintln!("warning: {warning}");
    }
    Ok(setup)
}

fn quantity(text: &str, dimension: Dimension, option: &str) -> Result<f64> {
    units::parse_quantity(text, dimension).map_err(|e| bad_input(format!("{option}: {e}")))
}

fn display_units(args: &OutputArgs) -> Result<DisplayUnits> {
    Ok(DisplayUnits {
        energy: units::parse_unit(&args.energy_unit, Dimension::Energy)
            .map_err(|e| bad_input(format!("--energy-unit: {e}")))?,
        length: units::parse_unit(&args.length_unit, Dimension::Length)
            .map_err(|e| bad_input(format!("--length-unit: {e}")))?,
    })
}

fn write_output(text: &str, path: Option<&Path>) -> Result<()> {
    match path {
        Some(p) if p != Path::new("-") => {
            std::fs::write(p, text).with_context(|| format!("cannot write '{}'", p.display()))
        }
        _ => {
            let mut out = std::io::stdout().lock();
            out.write_all(text.as_bytes())
                .context("cannot write to standard output")
        }
    }
}

fn print_table(table: &Table, args: &OutputArgs) -> Result<()> {
    write_output(&table.render(args.format), args.output.as_deref())
}

fn inspect(args: InspectArgs) -> Result<ExitCode> {
    let setup = load_curve(&args.curve)?;
    let units = display_units(&args.output)?;
    let at = args
        .at
        .as_deref()
        .map(|t| quantity(t, Dimension::Energy, "--at"))
        .transpose()?;
    let survey = rungs::survey::survey(setup.curve.as_ref(), &setup.pair, at)
        .map_err(|e| bad_input(format!("{}: {e}", setup.source)))?;
    print_table(&survey_table(&survey, &setup, units), &args.output)?;
    Ok(ExitCode::SUCCESS)
}

/// A quantum number or an inclusive range such as 0-10, from option `option`.
fn quantum_range(text: &str, option: &str) -> Result<(u32, u32)> {
    let parse = |t: &str| {
        t.trim().parse::<u32>().map_err(|_| {
            bad_input(format!(
                "{option}: '{text}' is not a number or a range such as 0-10"
            ))
        })
    };
    match text.split_once('-') {
        Some((a, b)) => {
            let (a, b) = (parse(a)?, parse(b)?);
            if a > b {
                bail!(bad_input(format!(
                    "{option}: the range {text} runs backwards"
                )));
            }
            Ok((a, b))
        }
        None => parse(text).map(|j| (j, j)),
    }
}

fn solver_settings(args: &LevelsArgs, setup: &CurveSetup) -> Result<SolverSettings> {
    let length = |t: &Option<String>, o: &str| {
        t.as_deref()
            .map(|t| quantity(t, Dimension::Length, o))
            .transpose()
    };
    let r_range = match (
        length(&args.r_min, "--r-min")?,
        length(&args.r_max, "--r-max")?,
    ) {
        (Some(a), Some(b)) if a < b => Some((a, b)),
        (Some(_), Some(_)) => return Err(bad_input("--r-min must be below --r-max")),
        _ => setup.solver.r_range,
    };
    let step = length(&args.step, "--step")?.or(setup.solver.step);
    let tolerance = args
        .tolerance
        .as_deref()
        .map(|t| quantity(t, Dimension::Energy, "--tolerance"))
        .transpose()?
        .or(setup.solver.tolerance);
    let ceiling = args
        .ceiling
        .as_deref()
        .map(|t| quantity(t, Dimension::Energy, "--ceiling"))
        .transpose()?;
    let method = if args.method == "dvr" {
        Method::SincDvr
    } else {
        Method::Numerov
    };
    let mut settings = SolverSettings::default()
        .with_method(method)
        .with_highest_v(args.vmax)
        .with_grid(r_range, step)
        .with_ceiling(ceiling)
        .with_wavefunctions(args.wavefunctions.is_some());
    if let Some(t) = tolerance {
        settings = settings.with_tolerance(t);
    }
    Ok(settings)
}

fn solver_failure(source: &str, error: SolverError) -> anyhow::Error {
    let error = match error {
        SolverError::Shape(_)
        | SolverError::NothingBound { .. }
        | SolverError::StepTooCoarse { .. }
        | SolverError::UnderResolved { .. }
        | SolverError::RangeMissesWell { .. }
        | SolverError::DvrTooLarge { .. }
        | SolverError::NotFinite { .. } => return bad_input(format!("{source}: {error}")),
        other => other,
    };
    anyhow::Error::new(error).context(format!("solving the levels of {source}"))
}

fn levels(args: LevelsArgs) -> Result<ExitCode> {
    let setup = load_curve(&args.curve)?;
    let units = display_units(&args.output)?;
    let settings = solver_settings(&args, &setup)?;
    let mu = setup.pair.reduced_mass();
    let solve_j = |j: u32| {
        let mut problem = RadialProblem::new(setup.curve.as_ref(), mu, j);
        problem.omega = args.omega;
        solver::solve(&problem, &settings)
    };
    let mut sets: Vec<LevelSet> = Vec::new();
    if args.all_j {
        // A spinner on standard error while J rises; hidden when standard error is not a
        // terminal (indicatif checks) or with --quiet.
        let bar = if args.quiet {
            indicatif::ProgressBar::hidden()
        } else {
            indicatif::ProgressBar::new_spinner()
        };
        bar.enable_steady_tick(std::time::Duration::from_millis(120));
        bar.set_message("solving J = 0");
        let total = std::sync::atomic::AtomicUsize::new(0);
        let on_j = |j: u32, found: usize| {
            let levels = total.fetch_add(found, std::sync::atomic::Ordering::Relaxed) + found;
            bar.set_message(format!("solved J = {j}, {levels} levels so far"));
            bar.tick();
        };
        let result = rungs::solver::solve_manifold_with_progress(
            setup.curve.as_ref(),
            mu,
            args.omega,
            &settings,
            &on_j,
        );
        bar.finish_and_clear();
        sets = result.map_err(|e| solver_failure(&setup.source, e))?;
    } else {
        let (first, last) = quantum_range(&args.j, "--j")?;
        for j in first..=last {
            match solve_j(j) {
                Ok(set) => sets.push(set),
                Err(SolverError::NothingBound { .. }) if j > first => break,
                Err(e) => return Err(solver_failure(&setup.source, e)),
            }
        }
    }
    if let (Some(path), Some(first)) = (&args.wavefunctions, sets.first_mut()) {
        if let Some(wanted) = &args.v {
            let available = first.levels.len() as u32;
            if let Some(missing) = wanted.iter().find(|&&v| v >= available) {
                return Err(bad_input(format!(
                    "--v {missing}: J = {} has bound levels v = 0..{} only",
                    first.j,
                    available.saturating_sub(1)
                )));
            }
            first.wavefunctions.retain(|w| wanted.contains(&w.v));
        }
        let table = wavefunction_table(first, units);
        write_output(&table.render(Format::Csv), Some(path))?;
    }
    if let Some(first) = sets.first() {
        if args.figure.figure.is_some() {
            // The first J again, with its wavefunctions, for the figure.
            let mut problem = RadialProblem::new(setup.curve.as_ref(), mu, first.j);
            problem.omega = args.omega;
            let with_waves = solver::solve(&problem, &settings.clone().with_wavefunctions(true))
                .map_err(|e| solver_failure(&setup.source, e))?;
            let figure = rungs::figures::builders::curve_figure(
                setup.curve.as_ref(),
                &with_waves,
                units,
                args.v.as_deref(),
                args.densities,
            )
            .map_err(|e| bad_input(format!("--figure: {e}")))?;
            args.figure.save(&figure)?;
        }
    }
    print_table(&levels_table(&sets, &setup.pair, units), &args.output)?;
    let unconverged = sets.iter().any(|s| s.unconverged().next().is_some());
    Ok(if unconverged {
        ExitCode::from(3)
    } else {
        ExitCode::SUCCESS
    })
}

fn constants(args: ConstantsArgs) -> Result<ExitCode> {
    let setup = load_curve(&args.curve)?;
    let units = display_units(&args.output)?;
    let mu = setup.pair.reduced_mass();
    let settings = SolverSettings::default();
    let set = solver::solve(&RadialProblem::new(setup.curve.as_ref(), mu, 0), &settings)
        .map_err(|e| solver_failure(&setup.source, e))?;
    let top = set.levels.last().map_or(0, |l| l.v);
    let range = match &args.v_range {
        Some(text) => {
            let (a, b) = quantum_range(text, "--v-range")?;
            if a > top {
                return Err(bad_input(format!(
                    "--v-range {text}: the curve binds v = 0..{top} only"
                )));
            }
            (a, b.min(top))
        }
        None => (0, top),
    };
    let fail = |e: rungs::constants::FitError| bad_input(format!("{}: {e}", setup.source));
    let vibrational = rungs::constants::fit_vibrational(&set, range, args.order).map_err(fail)?;
    let rotational = rungs::constants::fit_rotational(&set, range, args.rotation_order).ok();
    let birge = rungs::constants::birge_sponer(&set, range, args.birge_sponer_points);
    if let Err(e @ rungs::constants::BirgeSponerError::TooFewPoints(_)) = &birge {
        return Err(bad_input(e.to_string()));
    }
    let table = rungs::report::tables::constants_table(
        &vibrational,
        rotational.as_ref(),
        birge.as_ref(),
        &set,
        &setup.pair,
        units,
    );
    print_table(&table, &args.output)?;
    Ok(ExitCode::SUCCESS)
}

fn read_measured(path: &Path) -> Result<Vec<rungs::reader::MeasuredLevel>> {
    let name = path.display().to_string();
    let text = std::fs::read_to_string(path)
        .map_err(|e| bad_input(format!("{name}: cannot read: {e}")))?;
    rungs::reader::parse_measured(&text, &name).map_err(|e| bad_input(e.to_string()))
}

fn energy_zero(name: &str) -> rungs::compare::EnergyZero {
    use rungs::compare::EnergyZero;
    match name {
        "minimum" => EnergyZero::CurveMinimum,
        "limit" => EnergyZero::DissociationLimit,
        _ => EnergyZero::LowestLevel,
    }
}

/// The curve's molecule, then one isotopologue per `TAG=FIRST,SECOND` given.
fn isotopologues(
    setup: &CurveSetup,
    specs: &[String],
) -> Result<Vec<rungs::compare::Isotopologue>> {
    use rungs::compare::Isotopologue;
    let mut isotopologues = vec![Isotopologue {
        tag: None,
        label: setup.pair.label(),
        reduced_mass: setup.pair.reduced_mass(),
    }];
    for spec in specs {
        let wrong = || {
            bad_input(format!(
                "--isotopologue '{spec}': write TAG=FIRST,SECOND, e.g. 6LiF=6Li,19F"
            ))
        };
        let (tag, atoms) = spec.split_once('=').ok_or_else(wrong)?;
        let (first, second) = atoms.split_once(',').ok_or_else(wrong)?;
        let pair = rungs::masses::Pair::new(
            rungs::masses::Atom::parse(first)
                .map_err(|e| bad_input(format!("--isotopologue '{spec}': {e}")))?,
            rungs::masses::Atom::parse(second)
                .map_err(|e| bad_input(format!("--isotopologue '{spec}': {e}")))?,
            setup.pair.charge,
        );
        isotopologues.push(Isotopologue {
            tag: Some(tag.trim().to_string()),
            label: pair.label(),
            reduced_mass: pair.reduced_mass(),
        });
    }
    Ok(isotopologues)
}

fn compare(args: CompareArgs) -> Result<ExitCode> {
    let setup = load_curve(&args.curve)?;
    let units = display_units(&args.output)?;
    let measured = read_measured(&args.measured)?;
    let zero = energy_zero(&args.energy_zero);
    let species = isotopologues(&setup, &args.isotopologue)?;
    let comparison = rungs::compare::compare_isotopologues(
        setup.curve.as_ref(),
        &measured,
        &species,
        zero,
        &SolverSettings::default().with_distortion(false),
    )
    .map_err(|e| match e {
        rungs::compare::CompareError::Solver(e) => solver_failure(&setup.source, e),
        other => bad_input(format!("{}: {other}", setup.source)),
    })?;
    args.figure
        .save(&rungs::figures::builders::residual_figure(
            &comparison,
            units,
        ))?;
    let mut table = rungs::report::tables::comparison_table(&comparison, &setup.pair, units);
    if species.len() > 1 {
        table.notes.push(format!(
            "isotopologues: {}; untagged lines and other tags are {}",
            species[1..]
                .iter()
                .map(|s| format!("'{}' = {}", s.tag.as_deref().unwrap_or(""), s.label))
                .collect::<Vec<_>>()
                .join(", "),
            species[0].label
        ));
    } else if measured.iter().any(|m| m.tag.is_some()) {
        table.notes.push(format!(
            "every line, tagged or not, is compared as {}; give --isotopologue TAG=FIRST,SECOND for lines of other isotopologues",
            species[0].label
        ));
    }
    print_table(&table, &args.output)?;
    Ok(ExitCode::SUCCESS)
}

fn fit(args: FitArgs) -> Result<ExitCode> {
    use rungs::fit::{FitProgress, FitRequest};
    let setup = load_curve(&args.curve)?;
    let units = display_units(&args.output)?;
    let measured = read_measured(&args.measured)?;
    let isotopologues = isotopologues(&setup, &args.isotopologue)?;
    let request = FitRequest {
        curve: setup.curve.clone(),
        vary: args.vary.iter().map(|v| v.trim().to_string()).collect(),
        isotopologues: isotopologues.clone(),
        measured: &measured,
        zero: energy_zero(&args.energy_zero),
        omega: args.omega,
        settings: SolverSettings::default(),
        max_evaluations: args.max_evaluations,
    };
    let bar = if args.quiet {
        indicatif::ProgressBar::hidden()
    } else {
        indicatif::ProgressBar::new_spinner()
    };
    bar.enable_steady_tick(std::time::Duration::from_millis(120));
    let on_step = |p: FitProgress| {
        bar.set_message(format!(
            "fitting: evaluation {}, chi^2 = {:.6e}",
            p.evaluations, p.chi_squared
        ));
    };
    let result = rungs::fit::fit(&request, &on_step);
    bar.finish_and_clear();
    let outcome = result.map_err(|e| bad_input(format!("{}: {e}", args.measured.display())))?;
    args.figure
        .save(&rungs::figures::builders::residual_figure(
            &outcome.comparison,
            units,
        ))?;
    let mut residuals =
        rungs::report::tables::comparison_table(&outcome.comparison, &setup.pair, units);
    residuals.title = "residuals at the fitted curve".into();
    let tables = [
        rungs::report::tables::fit_parameters_table(&outcome, &isotopologues, units),
        rungs::report::tables::correlation_table(&outcome),
        residuals,
    ];
    write_output(
        &rungs::report::render_all(&tables, args.output.format),
        args.output.output.as_deref(),
    )?;
    if let Some(path) = &args.write_curve {
        let out_dir = path
            .parent()
            .filter(|p| !p.as_os_str().is_empty())
            .unwrap_or(Path::new("."));
        let note = format!(
            "fitted by rungs {} to {} ({}; chi^2 = {:.6e}, {} degrees of freedom)",
            env!("CARGO_PKG_VERSION"),
            args.measured.display(),
            outcome.termination,
            outcome.chi_squared,
            outcome.degrees_of_freedom
        );
        let text = reader::fitted_curve_file(&setup, outcome.curve.as_ref(), out_dir, &note)
            .map_err(|e| bad_input(e.to_string()))?;
        std::fs::write(path, text).with_context(|| format!("cannot write '{}'", path.display()))?;
    }
    if outcome.converged {
        Ok(ExitCode::SUCCESS)
    } else {
        eprintln!(
            "error: the fit did not converge: {}; the table shows the last values, not a result",
            outcome.termination
        );
        Ok(ExitCode::from(3))
    }
}

fn near_limit(args: NearLimitArgs) -> Result<ExitCode> {
    let units = display_units(&args.output)?;
    let has_curve = args.curve.curve.is_some() || args.curve.model.is_some();
    let setup = has_curve.then(|| load_curve(&args.curve)).transpose()?;
    let pair = match (&setup, &args.curve.atoms) {
        (Some(setup), _) => setup.pair.clone(),
        (None, Some(atoms)) => {
            let atom = |text: &str| {
                rungs::masses::Atom::parse(text).map_err(|e| bad_input(format!("--atoms: {e}")))
            };
            rungs::masses::Pair::new(
                atom(&atoms[0])?,
                atom(&atoms[1])?,
                args.curve.charge.unwrap_or(0),
            )
        }
        (None, None) => bail!(bad_input(
            "give a curve (file or --model), or --measured with --atoms and --power"
        )),
    };
    let source = setup
        .as_ref()
        .map_or_else(|| "--measured".to_string(), |s| s.source.clone());
    let power = args
        .power
        .or(setup.as_ref().and_then(|s| s.curve.long_range_power()))
        .ok_or_else(|| {
            bad_input(format!(
                "{source}: no inverse-power tail is known; give --power n"
            ))
        })?;
    let mu = pair.reduced_mass();
    let solved = setup
        .as_ref()
        .map(|setup| {
            solver::solve(
                &RadialProblem::new(setup.curve.as_ref(), mu, 0),
                &SolverSettings::default().with_distortion(false),
            )
            .map_err(|e| solver_failure(&setup.source, e))
        })
        .transpose()?;
    let mut levels: Vec<(u32, f64)> = match (&args.measured, &solved) {
        (Some(path), _) => {
            let measured = read_measured(path)?;
            if measured.iter().any(|m| m.lower.is_some()) {
                bail!(bad_input(format!(
                    "{}: near-limit needs level energies, not transitions",
                    path.display()
                )));
            }
            let lowest_j = measured.iter().map(|m| m.j).min().unwrap_or(0);
            measured
                .iter()
                .filter(|m| m.j == lowest_j)
                .map(|m| (m.v, m.energy))
                .collect()
        }
        (None, Some(set)) => set.levels.iter().map(|l| (l.v, l.energy)).collect(),
        (None, None) => unreachable!("a curve or measured levels were required above"),
    };
    levels.sort_by(|a, b| b.1.total_cmp(&a.1));
    let all_levels = levels.clone();
    levels.truncate(args.top);
    let fit = rungs::dissociation::leroy_bernstein(&levels, power, mu)
        .map_err(|e| bad_input(format!("{source}: {e}")))?;
    args.figure
        .save(&rungs::figures::builders::near_limit_figure(
            &fit,
            &levels,
            &all_levels,
            mu,
            units,
        ))?;
    let table = rungs::report::tables::dissociation_table(
        &fit,
        levels.len(),
        solved.as_ref().map(|set| set.levels.len()),
        &pair,
        units,
    );
    print_table(&table, &args.output)?;
    Ok(ExitCode::SUCCESS)
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Inspect(args) => inspect(args),
        Command::Levels(args) => levels(*args),
        Command::Constants(args) => constants(args),
        Command::Compare(args) => compare(args),
        Command::NearLimit(args) => near_limit(args),
        Command::Fit(args) => fit(args),
        Command::FranckCondon(args) => band_commands::franck_condon(args),
        Command::Dipole(args) => band_commands::dipole(args),
        Command::Spectrum(args) => band_commands::spectrum(*args),
        Command::Completions { shell } => {
            use clap::CommandFactory;
            clap_complete::generate(shell, &mut Cli::command(), "rungs", &mut std::io::stdout());
            Ok(ExitCode::SUCCESS)
        }
    };
    match result {
        Ok(code) => code,
        Err(error) => {
            eprintln!("error: {error}");
            for cause in error.chain().skip(1) {
                eprintln!("  caused by: {cause}");
            }
            if error.downcast_ref::<BadInput>().is_some() {
                ExitCode::from(2)
            } else {
                ExitCode::from(1)
            }
        }
    }
}
