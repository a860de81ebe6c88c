//! Fitting curve parameters to measured levels or transitions.
//!
//! Weighted nonlinear least squares: minimise chi^2 = sum_i ((obs_i - calc_i(p)) / u_i)^2 over
//! the chosen parameters p of the curve (see [`crate::curve::CurveParameter`]; a tabulated
//! curve is adjusted by the depth scale and r shift of [`crate::curve::Adjusted`]). The
//! minimiser is the Levenberg-Marquardt method of the `levenberg-marquardt` crate (a port of
//! MINPACK's lmder, with its trust region and parameter scaling).
//!
//! The Jacobian is not taken by finite differences: each level's derivative is the
//! Hellmann-Feynman expectation dE/dp = <psi| dV/dp |psi> (H. Hellmann, 1937; R.P. Feynman,
//! Phys. Rev. 56, 340 (1939)), exact for an exact eigenfunction, evaluated on the solver's
//! wavefunction by the trapezoidal rule. The energy zero of the data enters the same way: the
//! curve minimum moves by dV/dp at r_min (the envelope theorem), the limit by dV/dp far out.
//!
//! Several isotopologues share one curve: each measured line's tag names its isotopologue,
//! which carries its own reduced mass. Standard errors are the square roots of the diagonal
//! of s^2 (J^T W J)^-1 (by QR of the weighted Jacobian, [`crate::constants::linear_least_squares`]) with s^2 = chi^2 / (N - P), the usual scaling by the dimensionless
//! variance (for example P.R. Bevington and D.K. Robinson, *Data Reduction and Error Analysis
//! for the Physical Sciences*, ch. 8; common practice), so errors grow when the data scatter
//! more than their stated uncertainties claim. Trial steps where the curve cannot be built or a
//! fitted level is no longer bound count as very large residuals, so the minimiser shrinks its
//! step instead of failing. Knows nothing of files or reports.

use crate::compare::{compare_with, Comparison, EnergyZero};
use crate::curve::{find_well, PotentialCurve};
use crate::reader::MeasuredLevel;
use crate::solver::{self, LevelSet, RadialProblem, SolverError, SolverSettings};
use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt};
use nalgebra::{DMatrix, DVector, Dyn, Owned};
use rayon::prelude::*;
use std::collections::BTreeMap;
use std::sync::Arc;

pub use crate::compare::Isotopologue;

/// What to fit.
#[derive(Debug, Clone)]
pub struct FitRequest<'a> {
    pub curve: Arc<dyn PotentialCurve>,
    /// Names of the parameters to vary (curve-file keys); the others stay fixed.
    pub vary: Vec<String>,
    /// The first is the default, used for lines whose tag names no other.
    pub isotopologues: Vec<Isotopologue>,
    pub measured: &'a [MeasuredLevel],
    pub zero: EnergyZero,
    /// Omega of the electronic state (J starts at Omega).
    pub omega: u32,
    pub settings: SolverSettings,
    /// Most residual evaluations before giving up.
    pub max_evaluations: usize,
}

/// One parameter after the fit, atomic units.
#[derive(Debug, Clone, PartialEq)]
pub struct FittedParameter {
    pub name: &'static str,
    pub dimension: Option<crate::units::Dimension>,
    pub initial: f64,
    pub value: f64,
    /// NaN for a fixed parameter, or one the data do not determine.
    pub standard_error: f64,
    pub varied: bool,
}

/// The outcome of a fit.
#[derive(Debug, Clone)]
pub struct FitOutcome {
    pub curve: Arc<dyn PotentialCurve>,
    pub parameters: Vec<FittedParameter>,
    /// Correlation coefficients between the varied parameters, in their order.
    pub correlation: Vec<Vec<f64>>,
    /// Residuals at the fitted curve (unassigned lines listed, not dropped).
    pub comparison: Comparison,
    /// chi^2 = sum ((obs - calc)/u)^2 at the start and at the end.
    pub initial_chi_squared: f64,
    pub chi_squared: f64,
    pub degrees_of_freedom: usize,
    pub evaluations: usize,
    pub converged: bool,
    /// Why the minimiser stopped, in words.
    pub termination: String,
    /// Things the user should know (unconverged levels, undetermined parameters).
    pub warnings: Vec<String>,
}

/// Progress of a running fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FitProgress {
    pub evaluations: usize,
    /// chi^2 of the last evaluation (infinite when it failed).
    pub chi_squared: f64,
}

/// Why a fit could not start.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum FitError {
    #[error("the {model} curve has no parameter '{name}'; its parameters are: {available}")]
    UnknownParameter {
        name: String,
        model: &'static str,
        available: String,
    },
    #[error("the {model} curve has no adjustable parameters")]
    NotAdjustable { model: &'static str },
    #[error("no parameter to vary: name one or more of: {available}")]
    NothingToVary { available: String },
    #[error("'{0}' is named twice in the parameters to vary")]
    DuplicateParameter(String),
    #[error("{data} assigned measurements cannot determine {parameters} parameters; vary fewer or add data")]
    TooFewData { data: usize, parameters: usize },
    #[error("the starting curve cannot be solved: {0}")]
    Start(String),
    #[error("none of the measured lines matches a level bound on the starting curve; check v, J and the starting parameters")]
    NothingAssigned,
}

/// A level needed by the data: isotopologue index, v, J.
type LevelKey = (usize, u32, u32);

/// Energies and Hellmann-Feynman gradients of the levels the data need, at one curve.
struct Evaluation {
    levels: BTreeMap<LevelKey, (f64, Vec<f64>)>,
    /// The energy zero (and its gradient) for level data.
    zero: (f64, Vec<f64>),
    unconverged: Vec<LevelKey>,
}

/// Everything fixed during the fit.
struct Setup<'a> {
    request: &'a FitRequest<'a>,
    /// Indices (into the curve's parameters) of the varied ones.
    varied: Vec<usize>,
    all_values: Vec<f64>,
    /// Isotopologue index of each measured line.
    species: Vec<usize>,
    /// For each isotopologue, each J needed with the highest v.
    needed: Vec<(usize, u32, u32)>,
}

impl Setup<'_> {
    fn curve_at(&self, varied_values: &[f64]) -> Option<Arc<dyn PotentialCurve>> {
        let mut values = self.all_values.clone();
        for (k, &index) in self.varied.iter().enumerate() {
            values[index] = varied_values[k];
        }
        self.request.curve.with_parameters(&values).ok()
    }

    /// The levels line `i` needs: the upper, and the lower or the reference level.
    fn keys_of(&self, i: usize) -> (LevelKey, Option<LevelKey>) {
        let m = &self.request.measured[i];
        let s = self.species[i];
        let lower = match (m.lower, self.request.zero) {
            (Some((v, j)), _) => Some((s, v, j)),
            (None, EnergyZero::LowestLevel) => Some((s, 0, self.request.omega)),
            (None, _) => None,
        };
        ((s, m.v, m.j), lower)
    }

    fn evaluate(&self, curve: &dyn PotentialCurve) -> Result<Evaluation, SolverError> {
        let request = self.request;
        let solved: Vec<Result<LevelSet, SolverError>> = self
            .needed
            .par_iter()
            .map(|&(s, j, highest_v)| {
                let mut problem =
                    RadialProblem::new(curve, request.isotopologues[s].reduced_mass, j);
                problem.omega = request.omega;
                let settings = request
                    .settings
                    .clone()
                    .with_highest_v(Some(highest_v))
                    .with_wavefunctions(true)
                    .with_distortion(false);
                solver::solve(&problem, &settings)
            })
            .collect();
        let mut levels = BTreeMap::new();
        let mut unconverged = Vec::new();
        for (&(s, j, _), result) in self.needed.iter().zip(solved) {
            let set = match result {
                Ok(set) => set,
                Err(SolverError::NothingBound { .. }) => continue,
                Err(e) => return Err(e),
            };
            for (level, wavefunction) in set.levels.iter().zip(&set.wavefunctions) {
                let gradient = self
                    .varied
                    .iter()
                    .map(|&index| {
                        wavefunction.expectation(|r| curve.parameter_derivative(index, r))
                    })
                    .collect();
                if !level.converged() {
                    unconverged.push((s, level.v, j));
                }
                levels.insert((s, level.v, j), (level.energy, gradient));
            }
        }
        let at = |r: f64| -> Vec<f64> {
            self.varied
                .iter()
                .map(|&index| curve.parameter_derivative(index, r))
                .collect()
        };
        let zero = match request.zero {
            EnergyZero::CurveMinimum => {
                let well = find_well(curve)?;
                (well.v_min, at(well.r_min))
            }
            EnergyZero::DissociationLimit => (
                curve.limit().unwrap_or(f64::NAN),
                at(FAR_OUT * curve.well_range().1),
            ),
            EnergyZero::LowestLevel => (0.0, vec![0.0; self.varied.len()]),
        };
        Ok(Evaluation {
            levels,
            zero,
            unconverged,
        })
    }

    /// calc_i and d calc_i / dp, or None when a needed level is missing.
    fn computed(&self, evaluation: &Evaluation, i: usize) -> Option<(f64, Vec<f64>)> {
        let (upper, lower) = self.keys_of(i);
        let (e_up, g_up) = evaluation.levels.get(&upper)?;
        let (e_low, g_low) = match lower {
            Some(key) => evaluation.levels.get(&key)?,
            None => &evaluation.zero,
        };
        let gradient = g_up.iter().zip(g_low).map(|(a, b)| a - b).collect();
        Some((e_up - e_low, gradient))
    }
}

/// Where "far out" is for the derivative of the limit: this many times the well range's end.
const FAR_OUT: f64 = 1.0e4;
/// Residual given to a line at a trial curve that cannot be solved (rejects the trial step).
const FAILED_RESIDUAL: f64 = 1.0e10;

/// The least-squares problem handed to the minimiser.
struct Problem<'a, 'p> {
    setup: &'a Setup<'a>,
    /// Measured lines in the fit (assigned at the start).
    fitted: Vec<usize>,
    params: DVector<f64>,
    evaluation: Option<Evaluation>,
    evaluations: usize,
    progress: &'p (dyn Fn(FitProgress) + Sync),
}

impl Problem<'_, '_> {
    fn residual_values(&self) -> Option<Vec<f64>> {
        let evaluation = self.evaluation.as_ref()?;
        self.fitted
            .iter()
            .map(|&i| {
                let m = &self.setup.request.measured[i];
                self.setup
                    .computed(evaluation, i)
                    .map(|(calc, _)| (m.energy - calc) / m.uncertainty)
            })
            .collect()
    }
}

impl LeastSquaresProblem<f64, Dyn, Dyn> for Problem<'_, '_> {
    type ResidualStorage = Owned<f64, Dyn>;
    type JacobianStorage = Owned<f64, Dyn, Dyn>;
    type ParameterStorage = Owned<f64, Dyn>;

    fn set_params(&mut self, x: &DVector<f64>) {
        self.params.copy_from(x);
        self.evaluation = self
            .setup
            .curve_at(x.as_slice())
            .and_then(|curve| self.setup.evaluate(curve.as_ref()).ok());
        self.evaluations += 1;
        let chi_squared = self
            .residual_values()
            .map_or(f64::INFINITY, |r| r.iter().map(|x| x * x).sum());
        (self.progress)(FitProgress {
            evaluations: self.evaluations,
            chi_squared,
        });
    }

    fn params(&self) -> DVector<f64> {
        self.params.clone()
    }

    fn residuals(&self) -> Option<DVector<f64>> {
        let values = self
            .residual_values()
            .unwrap_or_else(|| vec![FAILED_RESIDUAL; self.fitted.len()]);
        Some(DVector::from_vec(values))
    }

    /// d r_i / d p = -(d calc_i / d p) / u_i.
    fn jacobian(&self) -> Option<DMatrix<f64>> {
        let evaluation = self.evaluation.as_ref()?;
        let n = self.setup.varied.len();
        let mut jacobian = DMatrix::zeros(self.fitted.len(), n);
        for (row, &i) in self.fitted.iter().enumerate() {
            let (_, gradient) = self.setup.computed(evaluation, i)?;
            let u = self.setup.request.measured[i].uncertainty;
            for k in 0..n {
                jacobian[(row, k)] = -gradient[k] / u;
            }
        }
        Some(jacobian)
    }
}

/// Fit the request's parameters to its measured lines.
pub fn fit(
    request: &FitRequest,
    progress: &(dyn Fn(FitProgress) + Sync),
) -> Result<FitOutcome, FitError> {
    let parameters = request.curve.parameters();
    let model = request.curve.model_name();
    if parameters.is_empty() {
        return Err(FitError::NotAdjustable { model });
    }
    let available = parameters
        .iter()
        .map(|p| p.name)
        .collect::<Vec<_>>()
        .join(", ");
    if request.vary.is_empty() {
        return Err(FitError::NothingToVary { available });
    }
    let mut varied = Vec::new();
    for name in &request.vary {
        let index = parameters
            .iter()
            .position(|p| p.name == name)
            .ok_or_else(|| FitError::UnknownParameter {
                name: name.clone(),
                model,
                available: available.clone(),
            })?;
        if varied.contains(&index) {
            return Err(FitError::DuplicateParameter(name.clone()));
        }
        varied.push(index);
    }
    let tags: Vec<Option<&str>> = request
        .isotopologues
        .iter()
        .map(|iso| iso.tag.as_deref())
        .collect();
    let species = crate::compare::species_of(request.measured, &tags);
    let mut highest: BTreeMap<(usize, u32), u32> = BTreeMap::new();
    let mut need = |s: usize, v: u32, j: u32| {
        let entry = highest.entry((s, j)).or_insert(v);
        *entry = (*entry).max(v);
    };
    for (m, &s) in request.measured.iter().zip(&species) {
        need(s, m.v, m.j);
        match (m.lower, request.zero) {
            (Some((v, j)), _) => need(s, v, j),
            (None, EnergyZero::LowestLevel) => need(s, 0, request.omega),
            _ => {}
        }
    }
    let setup = Setup {
        request,
        varied,
        all_values: parameters.iter().map(|p| p.value).collect(),
        species,
        needed: highest.into_iter().map(|((s, j), v)| (s, j, v)).collect(),
    };
    let start = setup
        .evaluate(request.curve.as_ref())
        .map_err(|e| FitError::Start(e.to_string()))?;
    let fitted: Vec<usize> = (0..request.measured.len())
        .filter(|&i| setup.computed(&start, i).is_some())
        .collect();
    if fitted.is_empty() {
        return Err(FitError::NothingAssigned);
    }
    if fitted.len() < setup.varied.len() {
        return Err(FitError::TooFewData {
            data: fitted.len(),
            parameters: setup.varied.len(),
        });
    }
    let initial: Vec<f64> = setup.varied.iter().map(|&i| setup.all_values[i]).collect();
    let problem = Problem {
        setup: &setup,
        fitted,
        params: DVector::from_vec(initial.clone()),
        evaluation: Some(start),
        evaluations: 1,
        progress,
    };
    let initial_chi_squared = chi_squared(&problem);
    let minimiser = LevenbergMarquardt::new().with_patience(patience(request, &setup));
    let (mut problem, report) = minimiser.minimize(problem);
    let best = problem.params.clone();
    problem.set_params(&best);
    let final_curve = setup
        .curve_at(best.as_slice())
        .expect("the minimiser returns a point it evaluated successfully");
    let final_chi_squared = chi_squared(&problem);
    let evaluation = problem
        .evaluation
        .as_ref()
        .ok_or_else(|| FitError::Start("the fitted curve cannot be solved".into()))?;
    let data = problem.fitted.len();
    let degrees_of_freedom = data - setup.varied.len();
    let mut warnings = Vec::new();
    let (errors, correlation) = covariance(&problem).unwrap_or_else(|| {
            warnings.push("standard errors are not available: the data do not determine the varied parameters independently (J^T W J is singular), or there are no more data than parameters; vary fewer parameters or add data".into());
            let n = setup.varied.len();
            (vec![f64::NAN; n], vec![vec![f64::NAN; n]; n])
        });
    for (k, &index) in setup.varied.iter().enumerate() {
        let value = best[k];
        if errors[k] > value.abs() {
            let name = parameters[index].name;
            warnings.push(format!(
                "{name}: its standard error exceeds its value, so the data barely constrain it{}; fix it or add data",
                if name == "r_e" || name == "r_shift" {
                    " (levels of one J measured from a level of the same J do not fix the position of the well; add levels of other J)"
                } else {
                    ""
                }
            ));
        }
    }
    for &(s, v, j) in &evaluation.unconverged {
        warnings.push(format!(
            "level v = {v}, J = {j} of {} did not meet the solver tolerance at the fitted curve",
            request.isotopologues[s].label
        ));
    }
    let fitted_parameters = final_curve
        .parameters()
        .into_iter()
        .enumerate()
        .map(|(index, p)| {
            let position = setup.varied.iter().position(|&i| i == index);
            FittedParameter {
                name: p.name,
                dimension: p.dimension,
                initial: setup.all_values[index],
                value: p.value,
                standard_error: position.map_or(f64::NAN, |k| errors[k]),
                varied: position.is_some(),
            }
        })
        .collect();
    let comparison = compare_with(request.measured, |i, _| {
        setup.computed(evaluation, i).map(|(calc, _)| calc)
    });
    Ok(FitOutcome {
        curve: final_curve,
        parameters: fitted_parameters,
        correlation,
        comparison,
        initial_chi_squared,
        chi_squared: final_chi_squared,
        degrees_of_freedom,
        evaluations: problem.evaluations,
        converged: report.termination.was_successful(),
        termination: describe_termination(&report.termination),
        warnings,
    })
}

/// The crate's patience counts evaluations per (parameters + 1).
fn patience(request: &FitRequest, setup: &Setup) -> usize {
    (request.max_evaluations / (setup.varied.len() + 1)).max(1)
}

fn chi_squared(problem: &Problem) -> f64 {
    problem
        .residual_values()
        .map_or(f64::INFINITY, |r| r.iter().map(|x| x * x).sum())
}

/// Standard errors and correlations from s^2 (J^T J)^-1 (J already weighted by 1/u), as the
/// covariance of the linearised problem at the minimum; None when J^T J is singular or no
/// degree of freedom is left.
fn covariance(problem: &Problem) -> Option<(Vec<f64>, Vec<Vec<f64>>)> {
    let jacobian = problem.jacobian()?;
    let residuals = problem.residual_values()?;
    if residuals.len() <= jacobian.ncols() {
        return None;
    }
    let design = faer::Mat::from_fn(jacobian.nrows(), jacobian.ncols(), |i, k| jacobian[(i, k)]);
    let linear = crate::constants::linear_least_squares(&design, &residuals).ok()?;
    let errors = linear.standard_errors();
    let correlation = linear
        .covariance
        .iter()
        .enumerate()
        .map(|(a, row)| {
            row.iter()
                .enumerate()
                .map(|(b, c)| c / (errors[a] * errors[b]))
                .collect()
        })
        .collect();
    Some((errors, correlation))
}

fn describe_termination(reason: &levenberg_marquardt::TerminationReason) -> String {
    use levenberg_marquardt::TerminationReason as Reason;
    match reason {
        Reason::ResidualsZero => "converged: the residuals vanish".into(),
        Reason::Orthogonal => {
            "converged: the residuals are orthogonal to the Jacobian (a minimum)".into()
        }
        Reason::Converged { ftol, xtol } => match (ftol, xtol) {
            (true, true) => "converged: chi^2 and the parameters stopped changing".into(),
            (true, false) => "converged: chi^2 stopped changing".into(),
            _ => "converged: the parameters stopped changing".into(),
        },
        Reason::LostPatience => {
            "not converged: the evaluation limit was reached; raise it or start closer".into()
        }
        Reason::NoImprovementPossible(what) => format!(
            "not converged: no further improvement possible ({what}); the data may not constrain the parameters"
        ),
        Reason::Numerical(what) => format!("not converged: numerical failure in {what}"),
        other => format!("not converged: {other:?}"),
    }
}
