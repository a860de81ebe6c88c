//! Reading what the user gives: curve files (TOML), point tables (CSV), inline model
//! specifications from the command line, atoms and units. Produces a [`CurveSetup`] whose
//! numbers are all in atomic units. Knows nothing of solvers or reports.
//!
//! # Curve file format
//!
//! ```toml
//! title = "invented example"
//!
//! [molecule]
//! atoms = ["1H", "35Cl"]      # nuclide labels, or masses with units: "1.007825 u"
//! charge = 0                  # optional; +1 for a cation
//!
//! [curve]
//! model = "morse"             # harmonic | morse | lennard-jones | points
//! omega_e = "2990.946 cm-1"
//! omega_e_x_e = "52.8186 cm-1"
//! r_e = "1.27455 angstrom"
//!
//! [solver]                    # optional
//! tolerance = "1e-6 cm-1"
//! ```
//!
//! Keys of `[curve]` by model (every quantity is text with its unit):
//! - `harmonic`: `r_e` and one of `force_constant`, `omega_e`.
//! - `morse`: `r_e` and one of (`well_depth`, `width`), (`omega_e`, `omega_e_x_e`),
//!   (`well_depth`, `omega_e`).
//! - `lennard-jones`: `well_depth`, one of `r_e`, `sigma`; `repulsive_power` (default 12),
//!   `attractive_power` (default 6), plain numbers.
//! - `points`: `file` (CSV, relative to the curve file), `spline` (`not-a-knot` default, or
//!   `natural`), `inner_wall` (`exponential` default, or `inverse-power`), `limit` (the
//!   dissociation limit; fitted with the tail when absent), and a table `[curve.outer_tail]`
//!   with `form` (`inverse-power` default, or `exponential`), `powers` (default `[6]`) and
//!   optionally `coefficients_au` (C_n in hartree bohr^n; fitted when absent). Optional
//!   `depth_scale` (a plain number, default 1) and `r_shift` (a length, default 0) adjust the
//!   table as V(r) = L + s [V_table(r - d) - L] (see [`crate::curve::Adjusted`]); a fit of a
//!   tabulated curve writes them.
//!
//! [`fitted_curve_file`] writes a curve file back with new parameter values.

mod dipole;
mod measured;
mod points;

pub use dipole::{parse_dipole_toml, read_dipole_file};

pub use measured::{parse_measured, MeasuredLevel};
pub use points::{parse_function_points, parse_points, PointTable};

use crate::curve::{
    Adjusted, Harmonic, InnerWall, JoinReport, LennardJones, Morse, OuterTail, PotentialCurve,
    SplineEnd, TabulatedCurve,
};
use crate::masses::{Atom, Pair};
use crate::units::{self, Dimension};
use std::fmt;
use std::path::{Path, PathBuf};
use std::sync::Arc;

/// A problem in what the user gave: which file (or option), which line if known, and what to do.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub struct InputError {
    /// The file path, or the command-line option the text came from.
    pub source_name: String,
    pub line: Option<usize>,
    pub message: String,
}

impl fmt::Display for InputError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.line {
            Some(line) => write!(f, "{}, line {}: {}", self.source_name, line, self.message),
            None => write!(f, "{}: {}", self.source_name, self.message),
        }
    }
}

impl InputError {
    pub fn at(source_name: &str, line: usize, message: impl Into<String>) -> InputError {
        InputError {
            source_name: source_name.to_string(),
            line: Some(line),
            message: message.into(),
        }
    }
    pub fn in_file(source_name: &str, message: impl Into<String>) -> InputError {
        InputError {
            source_name: source_name.to_string(),
            line: None,
            message: message.into(),
        }
    }
}

/// A line of a text file with its 1-based number.
type NumberedLine<'t> = (usize, &'t str);

/// The numbered lines of a CSV text that carry data: blank lines and '#' comments skipped.
/// The first is the header; a missing header is an error telling what it should be.
fn data_lines<'t>(
    text: &'t str,
    file: &str,
    header_example: &str,
) -> Result<(NumberedLine<'t>, impl Iterator<Item = NumberedLine<'t>>), InputError> {
    let mut rows = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
    let header = rows.next().ok_or_else(|| {
        InputError::in_file(
            file,
            format!(
                "the file is empty; it needs a header such as '{header_example}' and data rows"
            ),
        )
    })?;
    Ok((header, rows))
}

/// Solver settings a curve file may carry, in atomic units; all optional.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct SolverHints {
    /// Energy tolerance, hartree.
    pub tolerance: Option<f64>,
    /// Grid range (inner, outer), bohr.
    pub r_range: Option<(f64, f64)>,
    /// Grid step, bohr.
    pub step: Option<f64>,
}

/// Everything needed downstream: the pair of atoms, the curve, and what was noticed on reading.
#[derive(Debug, Clone)]
pub struct CurveSetup {
    /// The file path, or "--model" for an inline model: named in later error messages.
    pub source: String,
    pub title: Option<String>,
    pub pair: Pair,
    pub curve: Arc<dyn PotentialCurve>,
    /// For tabulated curves: how the extrapolations join the table.
    pub join: Option<JoinReport>,
    /// Fitted long-range coefficients of a tabulated curve: (n, C_n in hartree bohr^n).
    pub tail_coefficients: Vec<(f64, f64)>,
    pub warnings: Vec<String>,
    pub solver: SolverHints,
    /// The curve file as read (for an inline model, the file it would be), and the folder its
    /// relative paths start from: what [`fitted_curve_file`] edits.
    pub document: toml::Table,
    pub base_dir: PathBuf,
}

/// Where a table of keys came from, for error messages.
struct Origin<'a> {
    name: String,
    text: Option<&'a str>,
    section: &'a str,
    base_dir: PathBuf,
}

impl Origin<'_> {
    /// The line of `key = ...` inside the origin's section, if the text is a file.
    fn line_of(&self, key: &str) -> Option<usize> {
        let text = self.text?;
        let mut in_section = self.section.is_empty();
        for (i, raw) in text.lines().enumerate() {
            let line = raw.trim();
            if line.starts_with('[') {
                in_section = line.trim_matches(|c| c == '[' || c == ']').trim() == self.section;
                continue;
            }
            if in_section {
                if let Some(rest) = line.strip_prefix(key) {
                    if rest.trim_start().starts_with('=') {
                        return Some(i + 1);
                    }
                }
            }
        }
        None
    }

    fn error(&self, key: Option<&str>, message: impl Into<String>) -> InputError {
        InputError {
            source_name: self.name.clone(),
            line: key.and_then(|k| self.line_of(k)),
            message: message.into(),
        }
    }

    fn string<'t>(&self, table: &'t toml::Table, key: &str) -> Result<Option<&'t str>, InputError> {
        match table.get(key) {
            None => Ok(None),
            Some(toml::Value::String(s)) => Ok(Some(s)),
            Some(other) => Err(self.error(
                Some(key),
                format!("'{key}' must be text in quotes, found {other}; for a quantity write the number and its unit, e.g. {key} = \"1.0 angstrom\""),
            )),
        }
    }

    fn quantity(
        &self,
        table: &toml::Table,
        key: &str,
        dimension: Dimension,
    ) -> Result<Option<f64>, InputError> {
        if let Some(toml::Value::Integer(_) | toml::Value::Float(_)) = table.get(key) {
            return Err(self.error(
                Some(key),
                format!(
                    "'{key}' has no unit; write it as text with its unit, for example {key} = \"{} {}\" (accepted: {})",
                    table[key],
                    units::accepted_units(dimension).split(", ").next().unwrap_or(""),
                    units::accepted_units(dimension)
                ),
            ));
        }
        self.string(table, key)?
            .map(|text| {
                units::parse_quantity(text, dimension)
                    .map_err(|e| self.error(Some(key), format!("'{key}': {e}")))
            })
            .transpose()
    }

    fn positive(
        &self,
        table: &toml::Table,
        key: &str,
        dimension: Dimension,
    ) -> Result<Option<f64>, InputError> {
        let value = self.quantity(table, key, dimension)?;
        if let Some(v) = value {
            if v <= 0.0 {
                return Err(self.error(Some(key), format!("'{key}' must be positive")));
            }
        }
        Ok(value)
    }

    /// A list of plain numbers, such as `powers = [6, 8]`.
    fn numbers(&self, table: &toml::Table, key: &str) -> Result<Option<Vec<f64>>, InputError> {
        match table.get(key) {
            None => Ok(None),
            Some(toml::Value::Array(items)) => items
                .iter()
                .map(|v| match v {
                    toml::Value::Integer(i) => Ok(*i as f64),
                    toml::Value::Float(x) if x.is_finite() => Ok(*x),
                    other => Err(self.error(
                        Some(key),
                        format!("'{key}' must hold plain numbers, found {other}"),
                    )),
                })
                .collect::<Result<Vec<_>, _>>()
                .map(Some),
            Some(other) => Err(self.error(
                Some(key),
                format!("'{key}' must be a list such as [6, 8], found {other}"),
            )),
        }
    }

    fn number(&self, table: &toml::Table, key: &str, default: f64) -> Result<f64, InputError> {
        match table.get(key) {
            None => Ok(default),
            Some(toml::Value::Integer(i)) => Ok(*i as f64),
            Some(toml::Value::Float(x)) if x.is_finite() => Ok(*x),
            Some(other) => Err(self.error(
                Some(key),
                format!("'{key}' must be a plain number, found {other}"),
            )),
        }
    }

    fn check_keys(
        &self,
        table: &toml::Table,
        allowed: &[&str],
        what: &str,
    ) -> Result<(), InputError> {
        for key in table.keys() {
            if !allowed.contains(&key.as_str()) {
                return Err(self.error(
                    Some(key),
                    format!(
                        "unknown key '{key}' for {what}; accepted keys: {}",
                        allowed.join(", ")
                    ),
                ));
            }
        }
        Ok(())
    }
}

/// Keys accepted in `[curve]` for each model.
const MODEL_KEYS: &[(&str, &[&str])] = &[
    ("harmonic", &["model", "r_e", "force_constant", "omega_e"]),
    (
        "morse",
        &[
            "model",
            "r_e",
            "well_depth",
            "width",
            "omega_e",
            "omega_e_x_e",
        ],
    ),
    (
        "lennard-jones",
        &[
            "model",
            "well_depth",
            "r_e",
            "sigma",
            "repulsive_power",
            "attractive_power",
        ],
    ),
    (
        "points",
        &[
            "model",
            "file",
            "spline",
            "inner_wall",
            "limit",
            "outer_tail",
            "depth_scale",
            "r_shift",
        ],
    ),
];

fn require(
    origin: &Origin,
    value: Option<f64>,
    key: &str,
    model: &str,
    needs: &str,
) -> Result<f64, InputError> {
    value.ok_or_else(|| origin.error(None, format!("model '{model}' needs '{key}' ({needs})")))
}

/// What a built curve brings with it besides itself.
struct BuiltCurve {
    curve: Arc<dyn PotentialCurve>,
    join: Option<JoinReport>,
    tail_coefficients: Vec<(f64, f64)>,
    warnings: Vec<String>,
}

fn analytic(curve: impl PotentialCurve + 'static) -> BuiltCurve {
    BuiltCurve {
        curve: Arc::new(curve),
        join: None,
        tail_coefficients: Vec::new(),
        warnings: Vec::new(),
    }
}

fn build_curve(
    table: &toml::Table,
    origin: &Origin,
    reduced_mass: f64,
) -> Result<BuiltCurve, InputError> {
    let model = origin.string(table, "model")?.ok_or_else(|| {
        origin.error(
            None,
            "the curve names no model; add model = \"morse\" (or harmonic, lennard-jones, points)",
        )
    })?;
    let model = model.trim().to_ascii_lowercase();
    let allowed = MODEL_KEYS
        .iter()
        .find(|(name, _)| *name == model)
        .map(|(_, keys)| *keys)
        .ok_or_else(|| {
            origin.error(
                Some("model"),
                format!(
                    "unknown model '{model}'; choose one of harmonic, morse, lennard-jones, points"
                ),
            )
        })?;
    origin.check_keys(table, allowed, &format!("model '{model}'"))?;
    let energy = |key| origin.positive(table, key, Dimension::Energy);
    let length = |key| origin.positive(table, key, Dimension::Length);
    match model.as_str() {
        "harmonic" => {
            let r_e = require(
                origin,
                length("r_e")?,
                "r_e",
                &model,
                "the equilibrium distance",
            )?;
            let k = match (
                origin.positive(table, "force_constant", Dimension::ForceConstant)?,
                energy("omega_e")?,
            ) {
                (Some(k), None) => k,
                (None, Some(omega)) => reduced_mass * omega * omega,
                _ => {
                    return Err(origin.error(
                        None,
                        "model 'harmonic' needs exactly one of 'force_constant' and 'omega_e'",
                    ))
                }
            };
            Ok(analytic(Harmonic::new(k, r_e)))
        }
        "morse" => {
            let r_e = require(
                origin,
                length("r_e")?,
                "r_e",
                &model,
                "the equilibrium distance",
            )?;
            let depth = energy("well_depth")?;
            let width = origin.positive(table, "width", Dimension::InverseLength)?;
            let omega = energy("omega_e")?;
            let anharmonicity = energy("omega_e_x_e")?;
            let morse = match (depth, width, omega, anharmonicity) {
                (Some(d), Some(a), None, None) => Morse::new(d, a, r_e),
                (None, None, Some(w), Some(wx)) => Morse::from_spectroscopic(w, wx, r_e, reduced_mass),
                (Some(d), None, Some(w), None) => Morse::from_depth_and_omega(d, w, r_e, reduced_mass),
                _ => {
                    return Err(origin.error(
                        None,
                        "model 'morse' needs r_e and one of: (well_depth, width), (omega_e, omega_e_x_e), (well_depth, omega_e)",
                    ))
                }
            };
            Ok(analytic(morse))
        }
        "lennard-jones" => {
            let depth = require(
                origin,
                energy("well_depth")?,
                "well_depth",
                &model,
                "epsilon",
            )?;
            let n = origin.number(table, "repulsive_power", 12.0)?;
            let m = origin.number(table, "attractive_power", 6.0)?;
            if !(n > m && m > 0.0) {
                return Err(origin.error(
                    Some("repulsive_power"),
                    format!("the powers must satisfy repulsive_power > attractive_power > 0, found {n} and {m}"),
                ));
            }
            let lj = match (length("r_e")?, length("sigma")?) {
                (Some(r_e), None) => LennardJones::new(depth, r_e, n, m),
                (None, Some(sigma)) => LennardJones::from_sigma(depth, sigma, n, m),
                _ => {
                    return Err(origin.error(
                        None,
                        "model 'lennard-jones' needs exactly one of 'r_e' and 'sigma'",
                    ))
                }
            };
            Ok(analytic(lj))
        }
        _ => build_points(table, origin),
    }
}

fn choice<T: Copy>(
    origin: &Origin,
    table: &toml::Table,
    key: &str,
    options: &[(&str, T)],
) -> Result<Option<T>, InputError> {
    origin
        .string(table, key)?
        .map(|text| {
            options
                .iter()
                .find(|(name, _)| *name == text.trim())
                .map(|(_, v)| *v)
                .ok_or_else(|| {
                    let names: Vec<_> = options.iter().map(|(n, _)| *n).collect();
                    origin.error(
                        Some(key),
                        format!("'{key}' = '{text}' is not one of: {}", names.join(", ")),
                    )
                })
        })
        .transpose()
}

fn build_points(table: &toml::Table, origin: &Origin) -> Result<BuiltCurve, InputError> {
    let file = origin.string(table, "file")?.ok_or_else(|| {
        origin.error(
            None,
            "model 'points' needs file = \"points.csv\" (r and energy columns)",
        )
    })?;
    let path = origin.base_dir.join(file);
    let text = std::fs::read_to_string(&path).map_err(|e| {
        origin.error(
            Some("file"),
            format!("cannot read points file '{}': {e}", path.display()),
        )
    })?;
    let table_name = path.display().to_string();
    let points = parse_points(&text, &table_name)?;
    let end = choice(
        origin,
        table,
        "spline",
        &[
            ("not-a-knot", SplineEnd::NotAKnot),
            ("natural", SplineEnd::Natural),
        ],
    )?
    .unwrap_or_default();
    let inner = choice(
        origin,
        table,
        "inner_wall",
        &[
            ("exponential", InnerWall::Exponential),
            ("inverse-power", InnerWall::InversePower),
        ],
    )?
    .unwrap_or_default();
    let limit = origin.quantity(table, "limit", Dimension::Energy)?;
    let outer = match table.get("outer_tail") {
        None => OuterTail::default(),
        Some(toml::Value::Table(tail)) => {
            let tail_origin = Origin {
                name: origin.name.clone(),
                text: origin.text,
                section: "curve.outer_tail",
                base_dir: origin.base_dir.clone(),
            };
            tail_origin.check_keys(
                tail,
                &["form", "powers", "coefficients_au"],
                "[curve.outer_tail]",
            )?;
            match choice(
                &tail_origin,
                tail,
                "form",
                &[("inverse-power", true), ("exponential", false)],
            )?
            .unwrap_or(true)
            {
                true => {
                    let powers = tail_origin
                        .numbers(tail, "powers")?
                        .unwrap_or_else(|| vec![6.0]);
                    if powers.is_empty() || powers.iter().any(|&p| p <= 0.0) {
                        return Err(tail_origin.error(
                            Some("powers"),
                            "'powers' must list positive numbers, e.g. [6, 8]",
                        ));
                    }
                    OuterTail::InversePower {
                        powers,
                        coefficients: tail_origin.numbers(tail, "coefficients_au")?,
                    }
                }
                false => OuterTail::Exponential,
            }
        }
        Some(other) => {
            return Err(origin.error(
                Some("outer_tail"),
                format!("'outer_tail' must be a table, found {other}"),
            ))
        }
    };
    let curve = TabulatedCurve::new(points.points, end, inner, outer, limit)
        .map_err(|e| InputError::in_file(&table_name, e.to_string()))?;
    let depth_scale = origin.number(table, "depth_scale", 1.0)?;
    let r_shift = origin.quantity(table, "r_shift", Dimension::Length)?;
    let join = Some(curve.join());
    let tail_coefficients = curve.tail_coefficients();
    let curve: Arc<dyn PotentialCurve> = if depth_scale != 1.0 || r_shift.is_some() {
        if depth_scale <= 0.0 {
            return Err(origin.error(Some("depth_scale"), "'depth_scale' must be positive"));
        }
        Arc::new(Adjusted {
            base: Arc::new(curve),
            depth_scale,
            r_shift: r_shift.unwrap_or(0.0),
        })
    } else {
        Arc::new(curve)
    };
    Ok(BuiltCurve {
        join,
        tail_coefficients,
        warnings: points.warnings,
        curve,
    })
}

fn parse_pair(
    atoms: &[String],
    charge: i32,
    origin: &Origin,
    key: Option<&str>,
) -> Result<Pair, InputError> {
    if atoms.len() != 2 {
        return Err(origin.error(
            key,
            format!(
                "a diatomic needs exactly two atoms, found {}; e.g. atoms = [\"1H\", \"35Cl\"]",
                atoms.len()
            ),
        ));
    }
    let parse = |text: &str| Atom::parse(text).map_err(|e| origin.error(key, e.to_string()));
    Ok(Pair::new(parse(&atoms[0])?, parse(&atoms[1])?, charge))
}

/// Overrides from the command line: the atoms and the charge replace the file's.
#[derive(Debug, Clone, Default)]
pub struct PairOverride {
    pub atoms: Option<Vec<String>>,
    pub charge: Option<i32>,
}

/// The TOML document of a file's text, or an error naming the file and the line at fault.
fn parse_toml(text: &str, name: &str) -> Result<toml::Table, InputError> {
    toml::from_str(text).map_err(|e: toml::de::Error| InputError {
        source_name: name.to_string(),
        line: e
            .span()
            .map(|span| text[..span.start.min(text.len())].lines().count().max(1)),
        message: format!("not valid TOML: {}", e.message()),
    })
}

/// Read a curve file (TOML) from disk.
pub fn read_curve_file(path: &Path, overrides: &PairOverride) -> Result<CurveSetup, InputError> {
    let name = path.display().to_string();
    let text = std::fs::read_to_string(path)
        .map_err(|e| InputError::in_file(&name, format!("cannot read the curve file: {e}")))?;
    let base_dir = path.parent().map(Path::to_path_buf).unwrap_or_default();
    parse_curve_file(&text, &name, &base_dir, overrides)
}

/// Parse the text of a curve file. `name` labels messages; `base_dir` resolves points files.
pub fn parse_curve_file(
    text: &str,
    name: &str,
    base_dir: &Path,
    overrides: &PairOverride,
) -> Result<CurveSetup, InputError> {
    let document = parse_toml(text, name)?;
    let top = Origin {
        name: name.to_string(),
        text: Some(text),
        section: "",
        base_dir: base_dir.to_path_buf(),
    };
    top.check_keys(
        &document,
        &["title", "note", "molecule", "curve", "solver"],
        "the top level",
    )?;
    let section = |key: &str| -> Result<Option<&toml::Table>, InputError> {
        match document.get(key) {
            None => Ok(None),
            Some(toml::Value::Table(t)) => Ok(Some(t)),
            Some(_) => Err(top.error(Some(key), format!("'{key}' must be a section [{key}]"))),
        }
    };
    let molecule_origin = Origin {
        section: "molecule",
        ..top_clone(&top)
    };
    let molecule = section("molecule")?;
    let file_atoms: Option<Vec<String>> = match molecule.and_then(|m| m.get("atoms")) {
        None => None,
        Some(toml::Value::Array(items)) => Some(
            items
                .iter()
                .map(|v| match v {
                    toml::Value::String(s) => Ok(s.clone()),
                    other => Err(molecule_origin.error(
                        Some("atoms"),
                        format!(
                            "atoms must be text such as \"35Cl\" or \"34.97 u\", found {other}"
                        ),
                    )),
                })
                .collect::<Result<_, _>>()?,
        ),
        Some(other) => {
            return Err(molecule_origin.error(
                Some("atoms"),
                format!("atoms must be a list of two, found {other}"),
            ))
        }
    };
    if let Some(m) = molecule {
        molecule_origin.check_keys(m, &["atoms", "charge"], "[molecule]")?;
    }
    let file_charge = match molecule.and_then(|m| m.get("charge")) {
        None => 0,
        Some(toml::Value::Integer(q)) => i32::try_from(*q)
            .map_err(|_| molecule_origin.error(Some("charge"), "charge is out of range"))?,
        Some(other) => {
            return Err(molecule_origin.error(
                Some("charge"),
                format!("charge must be a whole number, found {other}"),
            ))
        }
    };
    let atoms = overrides.atoms.clone().or(file_atoms).ok_or_else(|| {
        top.error(
            None,
            "no atoms given; add [molecule] atoms = [\"1H\", \"35Cl\"] or pass --atoms 1H 35Cl",
        )
    })?;
    let pair = parse_pair(
        &atoms,
        overrides.charge.unwrap_or(file_charge),
        &molecule_origin,
        overrides.atoms.is_none().then_some("atoms"),
    )?;
    let curve_origin = Origin {
        section: "curve",
        ..top_clone(&top)
    };
    let curve_table = section("curve")?.ok_or_else(|| {
        top.error(
            None,
            "the file has no [curve] section; add one with model = \"...\"",
        )
    })?;
    let built = build_curve(curve_table, &curve_origin, pair.reduced_mass())?;
    let solver = match section("solver")? {
        None => SolverHints::default(),
        Some(t) => {
            let o = Origin {
                section: "solver",
                ..top_clone(&top)
            };
            o.check_keys(t, &["tolerance", "r_min", "r_max", "step"], "[solver]")?;
            let r_min = o.positive(t, "r_min", Dimension::Length)?;
            let r_max = o.positive(t, "r_max", Dimension::Length)?;
            let r_range = match (r_min, r_max) {
                (Some(a), Some(b)) if a < b => Some((a, b)),
                (None, None) => None,
                _ => {
                    return Err(o.error(
                        Some("r_min"),
                        "give both r_min and r_max, with r_min < r_max",
                    ))
                }
            };
            SolverHints {
                tolerance: o.positive(t, "tolerance", Dimension::Energy)?,
                r_range,
                step: o.positive(t, "step", Dimension::Length)?,
            }
        }
    };
    let title = match document.get("title") {
        Some(toml::Value::String(s)) => Some(s.clone()),
        _ => None,
    };
    Ok(CurveSetup {
        source: name.to_string(),
        title,
        pair,
        curve: built.curve,
        join: built.join,
        tail_coefficients: built.tail_coefficients,
        warnings: built.warnings,
        solver,
        document,
        base_dir: base_dir.to_path_buf(),
    })
}

fn top_clone<'a>(origin: &Origin<'a>) -> Origin<'a> {
    Origin {
        name: origin.name.clone(),
        text: origin.text,
        section: origin.section,
        base_dir: origin.base_dir.clone(),
    }
}

/// Build a curve from an inline specification `MODEL:key=value,key=value`, e.g.
/// `morse:omega_e=2990.946 cm-1,omega_e_x_e=52.8186 cm-1,r_e=1.27455 angstrom`, and the atoms.
///
/// ```
/// let setup = rungs::reader::parse_inline_model(
///     "morse:omega_e=2990.946 cm-1,omega_e_x_e=52.8186 cm-1,r_e=1.27455 angstrom",
///     &["1H".to_string(), "35Cl".to_string()], 0).unwrap();
/// assert!(setup.curve.limit().is_some());
/// ```
pub fn parse_inline_model(
    spec: &str,
    atoms: &[String],
    charge: i32,
) -> Result<CurveSetup, InputError> {
    let origin = Origin {
        name: "--model".to_string(),
        text: None,
        section: "curve",
        base_dir: PathBuf::from("."),
    };
    let (model, rest) = spec.split_once(':').unwrap_or((spec, ""));
    let mut table = toml::Table::new();
    table.insert(
        "model".into(),
        toml::Value::String(model.trim().to_string()),
    );
    for item in rest.split(',').map(str::trim).filter(|s| !s.is_empty()) {
        let (key, value) = item.split_once('=').ok_or_else(|| {
            origin.error(None, format!("'{item}' is not key=value; write e.g. morse:well_depth=37000 cm-1,width=1.9 1/angstrom,r_e=1.27 angstrom"))
        })?;
        let value = value.trim();
        let parsed = if key.trim().ends_with("_power") {
            value.parse::<f64>().map(toml::Value::Float).map_err(|_| {
                origin.error(None, format!("'{}' must be a plain number", key.trim()))
            })?
        } else {
            toml::Value::String(value.to_string())
        };
        table.insert(key.trim().to_string(), parsed);
    }
    if table.get("model").and_then(|m| m.as_str()) == Some("points") {
        return Err(origin.error(
            None,
            "tabulated curves need a curve file; --model takes harmonic, morse or lennard-jones",
        ));
    }
    let pair = parse_pair(
        atoms,
        charge,
        &Origin {
            name: "--atoms".into(),
            ..top_clone(&origin)
        },
        None,
    )?;
    let built = build_curve(&table, &origin, pair.reduced_mass())?;
    let mut molecule = toml::Table::new();
    molecule.insert(
        "atoms".into(),
        toml::Value::Array(atoms.iter().cloned().map(toml::Value::String).collect()),
    );
    molecule.insert("charge".into(), toml::Value::Integer(charge.into()));
    let mut document = toml::Table::new();
    document.insert("molecule".into(), toml::Value::Table(molecule));
    document.insert("curve".into(), toml::Value::Table(table));
    Ok(CurveSetup {
        source: "--model".to_string(),
        title: None,
        pair,
        curve: built.curve,
        join: built.join,
        tail_coefficients: built.tail_coefficients,
        warnings: built.warnings,
        solver: SolverHints::default(),
        document,
        base_dir: PathBuf::from("."),
    })
}

/// Keys of `[curve]` that give an analytic model's parameters; a written file replaces them
/// all by the model's own parameter keys.
const PARAMETER_KEYS: &[&str] = &[
    "well_depth",
    "width",
    "r_e",
    "omega_e",
    "omega_e_x_e",
    "sigma",
    "force_constant",
    "depth_scale",
    "r_shift",
];

/// The text of `setup`'s curve file with the parameters of `curve` (the same model, new
/// values) written in, and `note` as its note. Every number is written in full precision
/// with its unit; a points file is referred to by a path that works from `out_dir`.
pub fn fitted_curve_file(
    setup: &CurveSetup,
    curve: &dyn PotentialCurve,
    out_dir: &Path,
    note: &str,
) -> Result<String, InputError> {
    let mut document = setup.document.clone();
    document.insert("note".into(), toml::Value::String(note.to_string()));
    let Some(toml::Value::Table(table)) = document.get_mut("curve") else {
        return Err(InputError::in_file(
            &setup.source,
            "the curve has no [curve] section",
        ));
    };
    table.retain(|key, _| !PARAMETER_KEYS.contains(&key));
    for parameter in curve.parameters() {
        let value = match parameter.dimension {
            None => toml::Value::Float(parameter.value),
            Some(dimension) => {
                let unit = units::customary_unit(dimension);
                toml::Value::String(format!("{} {unit}", unit.from_atomic(parameter.value)))
            }
        };
        table.insert(parameter.name.to_string(), value);
    }
    if let Some(toml::Value::String(file)) = table.get("file") {
        let path = setup.base_dir.join(file);
        let same_folder =
            std::fs::canonicalize(&setup.base_dir).ok() == std::fs::canonicalize(out_dir).ok();
        let written = if same_folder {
            PathBuf::from(file)
        } else {
            std::fs::canonicalize(&path).unwrap_or(path)
        };
        table.insert(
            "file".into(),
            toml::Value::String(written.display().to_string()),
        );
    }
    toml::to_string(&document)
        .map_err(|e| InputError::in_file(&setup.source, format!("cannot write TOML: {e}")))
}
