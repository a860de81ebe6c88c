//! Computed against measured levels: match by (v, J), residuals obs - calc, their RMS and the
//! weighted dimensionless standard deviation sqrt( sum ((obs - calc)/u)^2 / N ) (common
//! practice in spectroscopic fitting). Measured levels with no computed counterpart are
//! returned as unassigned, never dropped. Knows nothing of files or reports; hartree inside.

use crate::curve::PotentialCurve;
use crate::reader::MeasuredLevel;
use crate::solver::{self, LevelSet, RadialProblem, SolverError, SolverSettings};

/// A species sharing the curve: the tag its measured lines carry, and its reduced mass.
#[derive(Debug, Clone, PartialEq)]
pub struct Isotopologue {
    /// The measured-file tag that selects it; None for lines without a (known) tag.
    pub tag: Option<String>,
    /// A label for reports ("7Li-19F").
    pub label: String,
    /// Reduced mass, m_e.
    pub reduced_mass: f64,
}

/// The energy zero of the measured values.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum EnergyZero {
    /// Relative to the lowest level (v = 0 of the lowest J computed): term values.
    #[default]
    LowestLevel,
    /// Relative to the minimum of the curve.
    CurveMinimum,
    /// Relative to the dissociation limit (bound levels negative).
    DissociationLimit,
}

/// One matched level.
#[derive(Debug, Clone, PartialEq)]
pub struct Residual {
    pub measured: MeasuredLevel,
    /// The computed level on the measured energy zero, hartree.
    pub computed: f64,
    pub obs_minus_calc: f64,
    /// (obs - calc) / uncertainty.
    pub normalised: f64,
}

/// The outcome of a comparison.
#[derive(Debug, Clone, PartialEq)]
pub struct Comparison {
    pub residuals: Vec<Residual>,
    /// Measured levels with no computed level of the same (v, J).
    pub unassigned: Vec<MeasuredLevel>,
    /// Computed levels (in the J values measured) with no measurement.
    pub computed_not_measured: usize,
    /// Root-mean-square of obs - calc, hartree (0 with no residual).
    pub rms: f64,
    /// sqrt(mean(((obs - calc)/u)^2)).
    pub weighted_deviation: f64,
}

/// Problems comparing.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CompareError {
    #[error(transparent)]
    Solver(#[from] SolverError),
    #[error("the energy zero 'limit' needs a curve with a dissociation limit")]
    NoLimit,
    #[error("the energy zero 'lowest' needs the lowest level (v = 0) of the lowest J, which was not computed")]
    NoLowestLevel,
}

/// Compare lines of several isotopologues of one curve: each line (see [`species_of`]) against
/// the levels solved with its own reduced mass, each on its own energy zero. The first
/// isotopologue takes the untagged lines. A J with no bound level leaves its lines unassigned.
pub fn compare_isotopologues(
    curve: &dyn PotentialCurve,
    measured: &[MeasuredLevel],
    isotopologues: &[Isotopologue],
    zero: EnergyZero,
    settings: &SolverSettings,
) -> Result<Comparison, CompareError> {
    let tags: Vec<Option<&str>> = isotopologues.iter().map(|s| s.tag.as_deref()).collect();
    let owner = species_of(measured, &tags);
    let mut calc: Vec<Option<f64>> = vec![None; measured.len()];
    let mut computed_not_measured = 0;
    for (index, isotopologue) in isotopologues.iter().enumerate() {
        let members: Vec<usize> = (0..measured.len()).filter(|&i| owner[i] == index).collect();
        if members.is_empty() {
            continue;
        }
        let lines: Vec<MeasuredLevel> = members.iter().map(|&i| measured[i].clone()).collect();
        let mut js: Vec<u32> = lines
            .iter()
            .flat_map(|m| [m.j].into_iter().chain(m.lower.map(|(_, j)| j)))
            .chain([0])
            .collect();
        js.sort_unstable();
        js.dedup();
        let mut sets = Vec::new();
        for j in js {
            let problem = RadialProblem::new(curve, isotopologue.reduced_mass, j);
            match solver::solve(&problem, settings) {
                Ok(set) => sets.push(set),
                Err(SolverError::NothingBound { .. }) => {}
                Err(e) => return Err(e.into()),
            }
        }
        let part = compare(&lines, &sets, zero)?;
        computed_not_measured += part.computed_not_measured;
        // compare keeps the order of its lines, unassigned ones left out.
        let mut residuals = part.residuals.iter().peekable();
        for (&i, line) in members.iter().zip(&lines) {
            if residuals.peek().is_some_and(|r| r.measured == *line) {
                calc[i] = residuals.next().map(|r| r.computed);
            }
        }
    }
    let mut comparison = compare_with(measured, |i, _| calc[i]);
    comparison.computed_not_measured = computed_not_measured;
    Ok(comparison)
}

/// Which species each measured line belongs to: the index of the tag in `tags` equal to the
/// line's tag, or 0 (the curve's own molecule) for untagged lines and tags not listed.
pub fn species_of(measured: &[MeasuredLevel], tags: &[Option<&str>]) -> Vec<usize> {
    measured
        .iter()
        .map(|m| {
            tags.iter()
                .position(|t| t.is_some() && *t == m.tag.as_deref())
                .unwrap_or(0)
        })
        .collect()
}

/// Compare measured levels (or transitions) with computed level sets (one per J).
pub fn compare(
    measured: &[MeasuredLevel],
    sets: &[LevelSet],
    zero: EnergyZero,
) -> Result<Comparison, CompareError> {
    let find = |v: u32, j: u32| {
        sets.iter()
            .filter(|s| s.j == j)
            .flat_map(|s| &s.levels)
            .find(|l| l.v == v)
            .map(|l| l.energy)
    };
    let offset = match zero {
        EnergyZero::LowestLevel => sets
            .iter()
            .min_by_key(|s| s.j)
            .and_then(|s| s.levels.first())
            .filter(|l| l.v == 0)
            .map(|l| l.energy)
            .ok_or(CompareError::NoLowestLevel)?,
        EnergyZero::CurveMinimum => sets.first().map_or(0.0, |s| s.curve_minimum),
        EnergyZero::DissociationLimit => sets
            .first()
            .and_then(|s| s.limit)
            .ok_or(CompareError::NoLimit)?,
    };
    let mut comparison = compare_with(measured, |_, m| {
        let upper = find(m.v, m.j)?;
        match m.lower {
            Some((v, j)) => Some(upper - find(v, j)?),
            None => Some(upper - offset),
        }
    });
    let measured_js: Vec<u32> = measured
        .iter()
        .flat_map(|m| std::iter::once(m.j).chain(m.lower.map(|(_, j)| j)))
        .collect();
    let is_measured = |v: u32, j: u32| {
        measured
            .iter()
            .any(|m| (m.v == v && m.j == j) || m.lower == Some((v, j)))
    };
    comparison.computed_not_measured = sets
        .iter()
        .filter(|s| measured_js.contains(&s.j))
        .flat_map(|s| s.levels.iter().map(move |l| (l.v, s.j)))
        .filter(|(v, j)| !is_measured(*v, *j))
        .count();
    Ok(comparison)
}

/// Compare measured values with what `calc` computes for each (given its index and itself) on
/// the same energy zero (None: no computed counterpart, listed as unassigned).
/// `computed_not_measured` is left at 0.
pub fn compare_with(
    measured: &[MeasuredLevel],
    calc: impl Fn(usize, &MeasuredLevel) -> Option<f64>,
) -> Comparison {
    let mut residuals = Vec::new();
    let mut unassigned = Vec::new();
    for (index, level) in measured.iter().enumerate() {
        match calc(index, level) {
            Some(computed) => {
                let obs_minus_calc = level.energy - computed;
                residuals.push(Residual {
                    measured: level.clone(),
                    computed,
                    obs_minus_calc,
                    normalised: obs_minus_calc / level.uncertainty,
                });
            }
            None => unassigned.push(level.clone()),
        }
    }
    let n = residuals.len().max(1) as f64;
    let rms = (residuals
        .iter()
        .map(|r| r.obs_minus_calc.powi(2))
        .sum::<f64>()
        / n)
        .sqrt();
    let weighted_deviation =
        (residuals.iter().map(|r| r.normalised.powi(2)).sum::<f64>() / n).sqrt();
    Comparison {
        residuals,
        unassigned,
        computed_not_measured: 0,
        rms,
        weighted_deviation,
    }
}
