//! Computed against measured levels: match by (v, J), residuals obs - calc, their RMS and the
//! weighted dimensionless standard deviation sqrt( sum ((obs - calc)/u)^2 / N ) (common
//! practice in spectroscopic fitting). Measured levels with no computed counterpart are
//! returned as unassigned, never dropped. Knows nothing of files or reports; hartree inside.

use crate::reader::MeasuredLevel;
use crate::solver::LevelSet;

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
    #[error("the energy zero 'limit' needs a curve with a dissociation limit")]
    NoLimit,
    #[error("the energy zero 'lowest' needs the lowest level (v = 0) of the lowest J, which was not computed")]
    NoLowestLevel,
}

/// Compare measured levels with computed level sets (one per J).
pub fn compare(
    measured: &[MeasuredLevel],
    sets: &[LevelSet],
    zero: EnergyZero,
) -> Result<Comparison, CompareError> {
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
    let find = |v: u32, j: u32| {
        sets.iter()
            .filter(|s| s.j == j)
            .flat_map(|s| &s.levels)
            .find(|l| l.v == v)
    };
    let mut residuals = Vec::new();
    let mut unassigned = Vec::new();
    for level in measured {
        match find(level.v, level.j) {
            Some(computed) => {
                let calc = computed.energy - offset;
                let obs_minus_calc = level.energy - calc;
                residuals.push(Residual {
                    measured: level.clone(),
                    computed: calc,
                    obs_minus_calc,
                    normalised: obs_minus_calc / level.uncertainty,
                });
            }
            None => unassigned.push(level.clone()),
        }
    }
    let measured_js: Vec<u32> = measured.iter().map(|m| m.j).collect();
    let computed_not_measured = sets
        .iter()
        .filter(|s| measured_js.contains(&s.j))
        .flat_map(|s| s.levels.iter().map(move |l| (l.v, s.j)))
        .filter(|(v, j)| !measured.iter().any(|m| m.v == *v && m.j == *j))
        .count();
    let n = residuals.len().max(1) as f64;
    let rms = (residuals
        .iter()
        .map(|r| r.obs_minus_calc.powi(2))
        .sum::<f64>()
        / n)
        .sqrt();
    let weighted_deviation =
        (residuals.iter().map(|r| r.normalised.powi(2)).sum::<f64>() / n).sqrt();
    Ok(Comparison {
        residuals,
        unassigned,
        computed_not_measured,
        rms,
        weighted_deviation,
    })
}
