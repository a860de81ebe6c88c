//! Bound levels and wavefunctions of the radial Schroedinger equation
//!
//! ```text
//!   -1/(2 mu) psi'' + [V(r) + (J(J+1) - Omega^2) / (2 mu r^2)] psi = E psi
//! ```
//!
//! (atomic units). Two methods behind one interface: [`Method::Numerov`], the production method
//! (see [`numerov`] for why and how), and [`Method::SincDvr`], the Colbert-Miller sinc-DVR
//! (D.T. Colbert and W.H. Miller, J. Chem. Phys. 96, 1982 (1992)) as a dense reference.
//!
//! The grid is chosen automatically (see [`grid`]); the tails of weakly bound levels are
//! stretched (see [`mapping`]) so a level reaching hundreds of bohr needs thousands of points,
//! not hundreds of thousands. The user may fix the range and step (no stretch then). The
//! number of bound levels comes from a Sturm count at the limit, stated with the box that
//! established it. Levels are found in order of v, each seeded by extrapolating the ones below
//! it, and each carries its vibrational number v certified by its nodes (or Sturm counts), an
//! error estimate and a converged flag against the tolerance. This module knows nothing of
//! post-processing or reports.

pub mod dvr;
pub mod grid;
pub mod mapping;
pub mod numerov;
mod shared;
pub mod threshold;

pub use shared::{solve_on_shared_grid, SharedLevels};

use crate::curve::{find_well_with, turning_points_with, PotentialCurve, ShapeError};
use crate::units::from_wavenumber;
use grid::UniformGrid;
use numerov::{richardson, NumerovGrid};
use rayon::prelude::*;
use std::sync::OnceLock;

/// The radial problem: a curve, a reduced mass (m_e) and the rotational quantum numbers.
#[derive(Debug, Clone, Copy)]
pub struct RadialProblem<'a> {
    pub curve: &'a dyn PotentialCurve,
    pub reduced_mass: f64,
    pub j: u32,
    /// Projection of the electronic angular momentum on the axis (0 for Sigma states).
    pub omega: u32,
}

impl<'a> RadialProblem<'a> {
    pub fn new(curve: &'a dyn PotentialCurve, reduced_mass: f64, j: u32) -> Self {
        RadialProblem {
            curve,
            reduced_mass,
            j,
            omega: 0,
        }
    }

    /// (J(J+1) - Omega^2) / (2 mu), hartree bohr^2.
    pub fn centrifugal_strength(&self) -> f64 {
        let j = f64::from(self.j);
        let omega = f64::from(self.omega);
        (j * (j + 1.0) - omega * omega) / (2.0 * self.reduced_mass)
    }

    /// V_eff(r) = V(r) + (J(J+1) - Omega^2)/(2 mu r^2), hartree.
    pub fn effective(&self, r: f64) -> f64 {
        self.curve.value(r) + self.centrifugal_strength() / (r * r)
    }
}

/// Which method solves the radial equation.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Method {
    /// Numerov with Cooley correction, node and Sturm counts, and Richardson extrapolation.
    #[default]
    Numerov,
    /// Colbert-Miller sinc-DVR, dense eigensolver (reference; O(N^3)).
    SincDvr,
}

/// Tuning knobs. Energies in hartree, lengths in bohr.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct SolverSettings {
    pub method: Method,
    /// Energy tolerance each level must meet (default 1e-6 cm-1).
    pub tolerance: f64,
    /// Fixed grid range instead of the automatic one.
    pub r_range: Option<(f64, f64)>,
    /// Fixed grid step (the coarsest of the Richardson sequence for Numerov).
    pub step: Option<f64>,
    /// Highest v wanted (default: every bound level).
    pub highest_v: Option<u32>,
    /// Energy ceiling above the well floor, for curves with no dissociation limit (default:
    /// 20 levels of the harmonic estimate).
    pub ceiling: Option<f64>,
    /// Keep the wavefunctions.
    pub keep_wavefunctions: bool,
    /// Largest outer grid bound the automatic grid may use, bohr.
    pub outer_cap: f64,
    /// Compute D_v and H_v by perturbation theory (about 40% of the Numerov time; off, they
    /// are NaN).
    pub distortion: bool,
}

impl Default for SolverSettings {
    fn default() -> Self {
        SolverSettings {
            method: Method::Numerov,
            tolerance: from_wavenumber(1e-6),
            r_range: None,
            step: None,
            highest_v: None,
            ceiling: None,
            keep_wavefunctions: false,
            outer_cap: 1.0e6,
            distortion: true,
        }
    }
}

impl SolverSettings {
    pub fn with_method(mut self, method: Method) -> Self {
        self.method = method;
        self
    }
    pub fn with_tolerance(mut self, tolerance: f64) -> Self {
        self.tolerance = tolerance;
        self
    }
    pub fn with_wavefunctions(mut self, keep: bool) -> Self {
        self.keep_wavefunctions = keep;
        self
    }
    pub fn with_highest_v(mut self, v: Option<u32>) -> Self {
        self.highest_v = v;
        self
    }
    pub fn with_grid(mut self, r_range: Option<(f64, f64)>, step: Option<f64>) -> Self {
        self.r_range = r_range;
        self.step = step;
        self
    }
    pub fn with_ceiling(mut self, ceiling: Option<f64>) -> Self {
        self.ceiling = ceiling;
        self
    }
    pub fn with_distortion(mut self, distortion: bool) -> Self {
        self.distortion = distortion;
        self
    }
}

/// One bound level. Energies in hartree on the curve's own energy scale; lengths in bohr.
#[derive(Debug, Clone, PartialEq)]
pub struct Level {
    pub v: u32,
    pub j: u32,
    pub energy: f64,
    pub error_estimate: f64,
    /// The part of the error estimate that double-precision rounding alone leaves (of the
    /// recurrence and of the potential's values), hartree: no finer grid can remove it, so a
    /// tolerance below it cannot be met.
    pub precision_floor: f64,
    pub status: LevelStatus,
    pub inner_turning_point: f64,
    pub outer_turning_point: f64,
    /// `<r>`, bohr.
    pub mean_r: f64,
    /// <r^-2>, bohr^-2.
    pub mean_inverse_r2: f64,
    /// B_v = <1/(2 mu r^2)>, hartree.
    pub rotational_constant: f64,
    /// D_v, the centrifugal distortion constant (E = ... + B_v J(J+1) - D_v [J(J+1)]^2), hartree,
    /// by perturbation theory (Hutson 1981) about the J solved; NaN from the sinc-DVR reference
    /// and when [`SolverSettings::distortion`] is off.
    pub centrifugal_distortion: f64,
    /// H_v, the next term (+ H_v [J(J+1)]^3), hartree, by third-order perturbation theory;
    /// NaN as D_v.
    pub sextic_distortion: f64,
}

impl Level {
    /// The error estimate meets the tolerance.
    pub fn converged(&self) -> bool {
        self.status == LevelStatus::Converged
    }
}

/// How far a level could be certified.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LevelStatus {
    /// The error estimate meets the tolerance.
    Converged,
    /// The level was found, but its error estimate misses the tolerance.
    NotConverged,
    /// The count places the level below the limit, but no box up to the outer cap holds it
    /// below the limit: it lies between the limit and `2 error_estimate` below it, and
    /// `energy` is the middle of that interval, not a solution.
    Unresolved,
}

/// A wavefunction on its grid, normalised to int psi^2 dr = 1, positive on its innermost lobe,
/// with the grid's quadrature weights: int f(r) dr = sum_i f(r_i) weights_i for smooth f that
/// vanish at both ends (h r'(x_i) on a grid uniform in a coordinate x, a rule of the grid's
/// own order there).
#[derive(Debug, Clone, PartialEq)]
pub struct Wavefunction {
    pub v: u32,
    pub r: Vec<f64>,
    pub psi: Vec<f64>,
    pub weights: Vec<f64>,
}

impl Wavefunction {
    /// <psi| f(r) |psi>.
    pub fn expectation(&self, f: impl Fn(f64) -> f64) -> f64 {
        self.overlap_with(self, f)
    }

    /// <psi| f(r) |other> for a wavefunction on the same grid (for instance of another curve
    /// solved on a shared grid).
    pub fn overlap_with(&self, other: &Wavefunction, f: impl Fn(f64) -> f64) -> f64 {
        debug_assert_eq!(self.r.len(), other.r.len());
        self.r
            .iter()
            .zip(&self.weights)
            .zip(self.psi.iter().zip(&other.psi))
            .map(|((&r, w), (a, b))| w * a * b * f(r))
            .sum()
    }
}

/// How the number of bound levels was established.
#[derive(Debug, Clone, PartialEq)]
pub struct CountAudit {
    /// Levels below the dissociation limit (or the ceiling).
    pub bound_levels: usize,
    pub method: CountMethod,
}

/// The way a level count was made.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CountMethod {
    /// Zeros of the solution at the dissociation limit ([`threshold`]): no box limits it.
    /// `settled` is false when a level may sit at the limit itself, bound by less than the count
    /// resolves.
    ZeroEnergyNodes { far_radius: f64, settled: bool },
    /// Sturm count below the energy ceiling of a curve without a limit, or below the limit in
    /// a grid range the user fixed (which may hold fewer levels than the curve has).
    Box { outer: f64 },
    /// A tail as slow as r^-`tail_power` holds infinitely many levels: the count is the number
    /// asked for.
    Requested { tail_power: u32 },
}

/// Every level asked for at one J, with what is needed to interpret them.
#[derive(Debug, Clone, PartialEq)]
pub struct LevelSet {
    pub j: u32,
    pub reduced_mass: f64,
    pub method: Method,
    /// The minimum of V(r) (without the centrifugal term), hartree; energies "above the
    /// minimum" are measured from here.
    pub curve_minimum: f64,
    /// V(infinity), hartree, if the curve has one.
    pub limit: Option<f64>,
    pub levels: Vec<Level>,
    pub audit: CountAudit,
    pub wavefunctions: Vec<Wavefunction>,
    /// The tolerance the levels were solved to, hartree.
    pub tolerance: f64,
}

impl LevelSet {
    /// Levels not certified to the tolerance (missed it, or unresolved at the limit).
    pub fn unconverged(&self) -> impl Iterator<Item = &Level> {
        self.levels.iter().filter(|l| !l.converged())
    }
}

/// Problems solving.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SolverError {
    #[error(transparent)]
    Shape(#[from] ShapeError),
    #[error("no level is bound for J = {j}: the effective curve (with the centrifugal term) has no level below its dissociation limit; try a lower J")]
    NothingBound { j: u32 },
    #[error("the grid step {step:.4e} bohr is too coarse for the inner wall: the Numerov factor h^2 Q/12 nears 1 before the wavefunction has decayed; use a step below {suggested:.4e} bohr or move r_min outward")]
    StepTooCoarse { step: f64, suggested: f64 },
    #[error("the grid step {step:.4e} bohr gives fewer than 4 points per wavelength at the bottom of the well; use a step below {suggested:.4e} bohr")]
    UnderResolved { step: f64, suggested: f64 },
    #[error(
        "the grid range {lo:.4} .. {hi:.4} bohr does not contain the well at r = {r_e:.4} bohr"
    )]
    RangeMissesWell { lo: f64, hi: f64, r_e: f64 },
    #[error("the reference sinc-DVR would need a {points} x {points} matrix (more than {limit}); use the Numerov method or give a smaller r range")]
    DvrTooLarge { points: usize, limit: usize },
    #[error("the dense eigensolver failed: {0}")]
    Eigensolver(String),
    #[error("level v = {v} could not be bracketed on the grid ({grid}); the grid is probably too coarse")]
    Bracket { v: u32, grid: String },
    #[error("the curve is not finite at r = {r:.6} bohr, inside the grid")]
    NotFinite { r: f64 },
    #[error("the curve's tail falls off as slowly as 1/r^{power} and holds infinitely many levels below its limit (J = {j}); ask for the first ones with a highest v")]
    InfinitelyManyLevels { power: u32, j: u32 },
}

/// Facts about the effective well shared by both methods.
#[derive(Debug, Clone, Copy)]
struct WellFacts {
    /// Minimum of V_eff, hartree (absolute).
    floor: f64,
    r_floor: f64,
    /// Energy up to which levels are sought, absolute hartree.
    top: f64,
    /// True when `top` is the dissociation limit.
    top_is_limit: bool,
    curve_minimum: f64,
    /// The energy whose local wavelength sets the grid step: the top, but at least two
    /// harmonic quanta above the floor, so a shallow well (high J) is still resolved.
    step_energy: f64,
    /// hbar omega of the harmonic approximation at the floor, hartree.
    harmonic_quantum: f64,
}

fn well_facts(
    problem: &RadialProblem,
    settings: &SolverSettings,
) -> Result<WellFacts, SolverError> {
    let strength = problem.centrifugal_strength();
    // A curve whose own minimum lies at r = 0 (the centred oscillator) still has a well once
    // the centrifugal term is added: its energies are then measured from that well's floor.
    let bare = match crate::curve::find_well(problem.curve) {
        Err(ShapeError::NoWell { .. }) if problem.j > problem.omega => None,
        other => Some(other?),
    };
    let effective = find_well_with(problem.curve, &|r| {
        let r2 = r * r;
        (
            strength / r2,
            -2.0 * strength / (r2 * r),
            6.0 * strength / (r2 * r2),
        )
    })
    .map_err(|e| match e {
        ShapeError::NoWell { .. } | ShapeError::LimitBelowMinimum { .. } if problem.j > 0 => {
            SolverError::NothingBound { j: problem.j }
        }
        other => other.into(),
    })?;
    let curve_minimum = bare.map_or(effective.v_min, |b| b.v_min);
    let (top, top_is_limit) = match (problem.curve.limit(), settings.ceiling) {
        (_, Some(ceiling)) => (curve_minimum + ceiling, false),
        (Some(limit), None) => (limit, true),
        (None, None) => {
            let omega = (effective.force_constant / problem.reduced_mass).sqrt();
            (effective.v_min + 20.0 * omega, false)
        }
    };
    if top <= effective.v_min {
        return Err(SolverError::NothingBound { j: problem.j });
    }
    let top = top.min(problem.curve.limit().unwrap_or(f64::INFINITY));
    let quantum = (effective.force_constant.max(0.0) / problem.reduced_mass).sqrt();
    Ok(WellFacts {
        floor: effective.v_min,
        r_floor: effective.r_min,
        top,
        top_is_limit,
        curve_minimum,
        step_energy: top.max(effective.v_min + 2.0 * quantum),
        harmonic_quantum: quantum,
    })
}

/// Points per local wavelength of the coarsest Numerov grid (h, h/2, h/4 follow).
const NUMEROV_POINTS_PER_WAVELENGTH: f64 = 10.0;
/// A level stops after two Numerov grids when their Richardson step is below this fraction
/// of the tolerance.
const EARLY_EXIT: f64 = 0.1;
/// Cooley steps on one grid stop when the correction is below this fraction of the tolerance:
/// convergence is quadratic, so the energy kept (with the last correction applied) is far
/// closer, and a shot this close to the level changes <r> by a negligible fraction.
const COOLEY_FRACTION: f64 = 1e-2;
/// ... and below this fraction of the level's binding: a level bound by less than the tolerance
/// (near the limit of a slow tail) would otherwise keep rungs whose Cooley residue, not their
/// step, sets their differences, and the Richardson estimate would read that noise.
const COOLEY_BINDING_FRACTION: f64 = 1e-3;
/// Halvings of the coarsest step tried when a level misses the tolerance.
const MAX_REFINEMENTS: usize = 4;

/// Solve for the bound levels of one J.
///
/// ```
/// use rungs::curve::Morse;
/// use rungs::solver::{solve, RadialProblem, SolverSettings};
/// // A Morse curve in atomic units: D_e = 0.17 hartree, a = 1 / bohr, r_e = 1.4 bohr, mu = 918.
/// let morse = Morse::new(0.17, 1.0, 1.4);
/// let levels = solve(&RadialProblem::new(&morse, 918.0, 0), &SolverSettings::default()).unwrap();
/// let exact = morse.exact_level(0, 918.0);
/// assert!((levels.levels[0].energy - exact).abs() < 1e-10);
/// assert_eq!(levels.levels.len() as u32, morse.exact_level_count(918.0));
/// ```
pub fn solve(problem: &RadialProblem, settings: &SolverSettings) -> Result<LevelSet, SolverError> {
    let facts = well_facts(problem, settings)?;
    match settings.method {
        Method::Numerov => solve_numerov(problem, settings, &facts),
        Method::SincDvr => dvr::solve_dvr(problem, settings, &facts),
    }
}

/// The counting box and coarse grid: range, step, and the audit of the level count.
struct Counting {
    coarse: UniformGrid,
    audit: CountAudit,
    /// The counting box at a quarter of the coarse step: every level's grids (h, h/2, h/4
    /// over a prefix of the box) are subsamplings of it.
    lattice: NumerovGrid,
}

fn turning(problem: &RadialProblem, facts: &WellFacts, energy: f64, cap: f64) -> (f64, f64) {
    let (inner, outer) = turning_points_with(
        &|r| problem.effective(r),
        facts.r_floor,
        energy,
        1e-6 * facts.r_floor,
        cap,
    );
    (inner.unwrap_or(1e-6 * facts.r_floor), outer.unwrap_or(cap))
}

fn grid_over(start: f64, end: f64, step: f64) -> UniformGrid {
    let intervals = ((end - start) / step).ceil().max(4.0) as usize;
    UniformGrid {
        start,
        step: (end - start) / intervals as f64,
        intervals,
    }
}

/// The grid at the same start with a fixed `step` whose end reaches at least `end`.
fn covering(start: f64, end: f64, step: f64) -> UniformGrid {
    UniformGrid {
        start,
        step,
        intervals: ((end - start) / step).ceil().max(4.0) as usize,
    }
}

/// The Numerov data of a plain `grid`, tabulated and validated.
fn check_grid(
    problem: &RadialProblem,
    facts: &WellFacts,
    grid: &UniformGrid,
) -> Result<NumerovGrid, SolverError> {
    check_stretched_grid(problem, facts, grid, None)
}

/// The lowest energy (relative to the curve minimum) a grid must handle.
fn lowest_energy(facts: &WellFacts) -> f64 {
    facts.floor - facts.curve_minimum
}

/// As [`check_grid`], on a grid uniform in the stretched coordinate x when `stretch` is given
/// with the lowest energy (relative to the curve minimum) the grid must handle: a stretched
/// tail is built for energies near one level, not for the bottom of the well.
fn check_stretched_grid(
    problem: &RadialProblem,
    facts: &WellFacts,
    grid: &UniformGrid,
    stretch: Option<(&mapping::Stretch, f64)>,
) -> Result<NumerovGrid, SolverError> {
    let floor = facts.curve_minimum;
    let potential = |r: f64| problem.effective(r) - floor;
    match stretch {
        Some((stretch, lowest)) => {
            let numerov = NumerovGrid::stretched(*grid, problem.reduced_mass, stretch, &potential);
            check_factor(problem, facts, grid, finite(numerov)?, lowest)
        }
        None => {
            let numerov = NumerovGrid::new(*grid, problem.reduced_mass, &potential);
            check_factor(problem, facts, grid, finite(numerov)?, lowest_energy(facts))
        }
    }
}

/// A plain grid as a subsampling of a finer one it is aligned with, if it is.
fn on_lattice(lattice: &NumerovGrid, grid: &UniformGrid) -> Option<NumerovGrid> {
    let stride = (grid.step / lattice.grid.step).round();
    let aligned = grid.start == lattice.grid.start
        && stride >= 1.0
        && (grid.step - stride * lattice.grid.step).abs() <= 1e-12 * grid.step;
    aligned
        .then(|| lattice.subsample(stride as usize, grid.intervals))
        .flatten()
}

/// Refuse a grid where V_eff is not finite.
fn finite(numerov: NumerovGrid) -> Result<NumerovGrid, SolverError> {
    match numerov.first_non_finite() {
        Some(i) => Err(SolverError::NotFinite {
            r: numerov.radius(i),
        }),
        None => Ok(numerov),
    }
}

/// Refuse a grid whose Numerov factor 1 - h^2 Q/12 is not positive at energies from `lowest`
/// (relative to the curve minimum) up.
fn check_factor(
    problem: &RadialProblem,
    facts: &WellFacts,
    grid: &UniformGrid,
    numerov: NumerovGrid,
    lowest: f64,
) -> Result<NumerovGrid, SolverError> {
    if !numerov.factor_is_positive(lowest) {
        let wall = problem.effective(grid.start) - facts.floor;
        return Err(SolverError::StepTooCoarse {
            step: grid.step,
            suggested: (3.0 / (problem.reduced_mass * wall)).sqrt(),
        });
    }
    Ok(numerov)
}

fn counting_box(
    problem: &RadialProblem,
    settings: &SolverSettings,
    facts: &WellFacts,
) -> Result<Counting, SolverError> {
    let depth = facts.top - facts.floor;
    let auto_step = grid::step_for(
        problem,
        facts.step_energy,
        facts.floor,
        NUMEROV_POINTS_PER_WAVELENGTH,
    );
    let step = settings.step.unwrap_or(auto_step);
    if step > 5.0 * auto_step {
        return Err(SolverError::UnderResolved {
            step,
            suggested: auto_step,
        });
    }
    let cap = settings.outer_cap;
    let (inner_turning, _) = turning(problem, facts, facts.top, cap);
    if let Some((lo, hi)) = settings.r_range {
        if !(lo < facts.r_floor && facts.r_floor < hi) {
            return Err(SolverError::RangeMissesWell {
                lo,
                hi,
                r_e: facts.r_floor,
            });
        }
        let coarse = grid_over(lo, hi, step);
        let lattice = check_grid(problem, facts, &coarse.refined(4))?;
        let bound_levels = lattice.count_below(facts.top - facts.curve_minimum);
        return Ok(Counting {
            coarse,
            lattice,
            audit: CountAudit {
                bound_levels,
                method: CountMethod::Box { outer: hi },
            },
        });
    }
    let audit = if facts.top_is_limit {
        match threshold::classify_tail(problem, facts.top, facts.r_floor) {
            threshold::TailClass::Finite => {
                let count = threshold::count_below_limit(problem, facts.top, inner_turning);
                Some(CountAudit {
                    bound_levels: count.levels,
                    method: CountMethod::ZeroEnergyNodes {
                        far_radius: count.far_radius,
                        settled: count.settled,
                    },
                })
            }
            threshold::TailClass::Infinite { power } => match settings.highest_v {
                Some(v) => Some(CountAudit {
                    bound_levels: v as usize + 1,
                    method: CountMethod::Requested { tail_power: power },
                }),
                None => {
                    return Err(SolverError::InfinitelyManyLevels {
                        power,
                        j: problem.j,
                    });
                }
            },
        }
    } else {
        None
    };
    // The wall must be reached deep enough (decay target) before the Numerov factor limit
    // stops the grid; an automatic step is halved until it is, or, once it is an eighth of the
    // automatic step, until half the target is reached: a wall made by the centrifugal term
    // alone (psi ~ r^(J+1)) damps slowly, and halving for it drives the step into rounding;
    // what such a start leaves out is in each level's error (see finish_level).
    let mut step = step;
    let start = loop {
        let (start, decay) =
            grid::inner_bound(problem, facts.top, inner_turning, step, facts.floor);
        let enough = if step <= auto_step / 8.0 {
            0.5 * grid::DECAY_TARGET
        } else {
            grid::DECAY_TARGET
        };
        if decay >= enough {
            break start;
        }
        if settings.step.is_some() || step < 1e-3 * auto_step {
            return Err(SolverError::StepTooCoarse {
                step,
                suggested: 0.5 * step,
            });
        }
        step *= 0.5;
    };
    // The box a level bound by 1e-4 of the depth needs (1e-2 for a tail with infinitely many
    // levels, whose boxes grow level by level): the levels' grids are cut from its lattice
    // (the coarse grid halved twice), and each level's own box grows past it when needed.
    let probe_binding = match audit {
        Some(CountAudit {
            method: CountMethod::Requested { .. },
            ..
        }) => 1e-2,
        _ => 1e-4,
    };
    let probe = facts.top - probe_binding * depth;
    let (_, probe_outer) = turning(problem, facts, probe, cap);
    let end = grid::outer_bound(problem, probe, probe_outer, cap);
    let potential = |r: f64| problem.effective(r) - facts.curve_minimum;
    let coarse = covering(start, end, step);
    let coarse_numerov = check_grid(problem, facts, &coarse)?;
    let lattice = check_factor(
        problem,
        facts,
        &coarse.refined(4),
        finite(
            coarse_numerov
                .halved(None, &potential)
                .halved(None, &potential),
        )?,
        lowest_energy(facts),
    )?;
    // Below a ceiling the levels are counted in the box, on its finest grid.
    let audit = audit.unwrap_or_else(|| CountAudit {
        bound_levels: lattice.count_below(facts.top - facts.curve_minimum),
        method: CountMethod::Box {
            outer: coarse.end(),
        },
    });
    Ok(Counting {
        coarse,
        lattice,
        audit,
    })
}

/// Per-level result before assembly.
struct Solved {
    level: Level,
    wavefunction: Option<Wavefunction>,
}

fn solve_numerov(
    problem: &RadialProblem,
    settings: &SolverSettings,
    facts: &WellFacts,
) -> Result<LevelSet, SolverError> {
    let counting = counting_box(problem, settings, facts)?;
    let floor = facts.curve_minimum;
    let mut count = counting.audit.bound_levels;
    if let Some(v) = settings.highest_v {
        count = count.min(v as usize + 1);
    }
    if count == 0 {
        return Err(SolverError::NothingBound { j: problem.j });
    }
    let fixed_range = settings.r_range.is_some();
    let job = Job {
        problem,
        settings,
        facts,
        counting: &counting,
        fixed_range,
    };
    // Each level's first rung, in order of v, seeded by extrapolating the first-rung energies
    // below it (they share the step, so their discretisation error varies smoothly with v);
    // the rest of each ladder is handed to the thread pool as soon as its first rung is known,
    // so the other threads climb while this one opens the next.
    let solved: Vec<OnceLock<Result<Solved, SolverError>>> =
        (0..count).map(|_| OnceLock::new()).collect();
    rayon::scope(|scope| -> Result<(), SolverError> {
        let mut first_rungs: Vec<f64> = Vec::with_capacity(count);
        for (v, slot) in solved.iter().enumerate() {
            let (seed, lo) = first_rung_seed(facts, &first_rungs);
            let hi = facts.top - floor;
            // A seed at or past the top (the harmonic guess in a shallow well, or the
            // extrapolation near the limit) would size the box for a level at the limit:
            // halfway from the level below is a bound guess (the box grows if it is short).
            let seed = if seed < hi {
                seed
            } else if lo < hi {
                0.5 * (lo + hi)
            } else {
                // The level below converged above the top on its first rung: a guess bound by
                // 1e-6 of the depth (the box grows further if that is not enough).
                hi - 1e-6 * (hi - (facts.floor - floor))
            };
            // A seed is a guess: its box ends in the counting box (it may grow once the level
            // is known, see solve_one).
            let cap = counting.coarse.end();
            let ladder = open_ladder(&job, v, seed, (lo, hi), cap)?;
            first_rungs.push(ladder.rungs[0].energy);
            let job = &job;
            scope.spawn(move |_| {
                // (Each slot is set once, here.)
                let _ = slot.set(solve_one(job, v, ladder));
            });
        }
        Ok(())
    })?;
    let mut levels = Vec::with_capacity(count);
    let mut wavefunctions = Vec::new();
    for slot in solved {
        let s = slot
            .into_inner()
            .expect("every opened ladder was climbed")?;
        levels.push(s.level);
        wavefunctions.extend(s.wavefunction);
    }
    let audit = counting.audit.clone();
    Ok(LevelSet {
        j: problem.j,
        reduced_mass: problem.reduced_mass,
        method: Method::Numerov,
        curve_minimum: facts.curve_minimum,
        limit: problem.curve.limit(),
        levels,
        audit,
        wavefunctions,
        tolerance: settings.tolerance,
    })
}

/// What every level of one J shares.
struct Job<'a> {
    problem: &'a RadialProblem<'a>,
    settings: &'a SolverSettings,
    facts: &'a WellFacts,
    counting: &'a Counting,
    /// The user fixed the grid range: no box is sized per level and no tail stretched.
    fixed_range: bool,
}

/// The first-rung seed of the next level from the first-rung energies below it (relative to
/// the curve minimum): harmonic steps for v = 0 and 1, then linear and quadratic
/// extrapolation. Returns the seed and a lower bound for a bracket.
fn first_rung_seed(facts: &WellFacts, below: &[f64]) -> (f64, f64) {
    let floor = facts.floor - facts.curve_minimum;
    let quantum = facts.harmonic_quantum;
    match below {
        [] => (floor + 0.5 * quantum, floor),
        [e0] => (e0 + 2.0 * (e0 - floor), *e0),
        [e0, e1] => (2.0 * e1 - e0, *e1),
        [.., e0, e1, e2] => (3.0 * e2 - 3.0 * e1 + e0, *e2),
    }
}

/// Level v's box (sized by the `seed` energy, relative to the curve minimum, and ending by
/// `cap` at the latest) and its ladder with the first rung solved, Cooley steps from the seed
/// confirmed by the node count, or inside the `bracket` by Sturm counts when that fails.
fn open_ladder(
    job: &Job,
    v: usize,
    seed: f64,
    bracket: (f64, f64),
    cap: f64,
) -> Result<Ladder, SolverError> {
    let (problem, facts, counting) = (job.problem, job.facts, job.counting);
    let floor = facts.curve_minimum;
    let mut base = counting.coarse;
    let mut stretch = None;
    if !job.fixed_range {
        let guess = floor + seed;
        let (_, outer) = turning(problem, facts, guess, cap);
        let end = grid::outer_bound(problem, guess, outer, cap);
        base = covering(counting.coarse.start, end, counting.coarse.step);
        stretch = tail_stretch(problem, guess, &base);
    }
    // In x (the stretch starts where the box does, x = r there).
    let coarsest = match &stretch {
        Some(s) => covering(base.start, s.x_of(base.end()), base.step),
        None => base,
    };
    let mut ladder = Ladder {
        base,
        sized_for: seed,
        coarsest,
        stretch,
        rungs: Vec::new(),
        bracket,
        finest: None,
        before_finest: None,
    };
    ladder.climb(job, v, Some(seed))?;
    Ok(ladder)
}

/// Box growths a level may take before it is given up as unresolved.
const MAX_BOX_GROWTHS: usize = 24;

/// Climb a level's ladder until its estimate meets the tolerance. The box was sized from a
/// seed, inside the counting box, so once the level is known its box is checked:
///
/// - a level the count places below the limit that converged above it was pushed up by a box
///   too short for its tail: the ladder starts again in a box sized for a binding 16 times
///   smaller (a tail four times longer), up to the outer cap, where it is reported as
///   [`LevelStatus::Unresolved`];
/// - a bound level's box must hold its tail to the decay [`grid::DECAY_HELD`]: if it does not,
///   the ladder starts again in a box sized by the converged energy.
fn solve_one(job: &Job, v: usize, mut ladder: Ladder) -> Result<Solved, SolverError> {
    let (problem, facts) = (job.problem, job.facts);
    let floor = facts.curve_minimum;
    let cap = job.settings.outer_cap;
    let top = facts.top - floor;
    let mut solved = None;
    for _ in 0..MAX_BOX_GROWTHS {
        let level = loop {
            if let Some(level) = ladder.climb(job, v, None)? {
                break level;
            }
        };
        if job.fixed_range {
            return Ok(level);
        }
        let energy = level.level.energy - floor;
        if facts.top_is_limit && energy >= top {
            if ladder.base.end() >= cap {
                return Ok(unresolved(job, v, ladder.base.end()));
            }
            // This box holds a level bound by more than [`holdable_binding`] below the limit:
            // this one is bound by less, so the next box is sized for at most a quarter of that,
            // and for a sixteenth of the binding this one was sized for if that is less.
            let held = 0.25 * holdable_binding(problem, facts, ladder.base.end());
            let sized = top - ladder.sized_for;
            let binding = if sized > 0.0 {
                held.min(sized / 16.0)
            } else {
                held
            };
            let bracket = (top - 16.0 * binding, top);
            ladder = open_ladder(job, v, top - binding, bracket, cap)?;
            continue;
        }
        let outer = level.level.outer_turning_point;
        let held = grid::outer_bound_for(problem, level.level.energy, outer, cap, grid::DECAY_HELD);
        if held > ladder.base.end() && ladder.base.end() >= cap {
            // Capped short of the decay it should hold: the wall at the box's end lifts the
            // level by about 4 eps e^(-2 D) (eps its binding, D the decay integral to the
            // wall: the squared amplitude the wall meets, times its kinetic scale); that is
            // part of its error.
            let binding = top - energy;
            let decay = grid::decay_to(problem, level.level.energy, outer, ladder.base.end());
            let mut level = level;
            level.level.error_estimate += 4.0 * binding * (-2.0 * decay).exp();
            if level.level.error_estimate > job.settings.tolerance {
                level.level.status = LevelStatus::NotConverged;
            }
            return Ok(level);
        }
        if held > ladder.base.end() {
            // The first rung of the new box differs from the level by about what the first
            // rung of this one did: bracket it by a few times that (the grid's validity is
            // checked down to the bracket's foot).
            let spread = 4.0 * (ladder.rungs[0].energy - energy).abs();
            let bracket = (energy - spread, (energy + spread).min(top));
            ladder = open_ladder(job, v, energy, bracket, cap)?;
            solved = Some(level);
            continue;
        }
        return Ok(level);
    }
    Ok(solved.unwrap_or_else(|| unresolved(job, v, ladder.base.end())))
}

/// The least binding (hartree) a level may have and still be held below the limit by a box
/// reaching `reach` (bohr): its outer turning point must lie in the first half of the box past
/// the well, limit - V_eff(r_e + L/2) with L = reach - r_e (for a power-law tail the turning
/// point of a weakly bound level moves out as eps^(-1/n)), and its decay over the second half,
/// kappa L/2 with kappa = sqrt(2 mu eps), must reach 1, eps = 2 / (mu L^2) (for a short-range
/// tail a level reaches about its scattering length 1/kappa). A level the count places below
/// the limit that such a box pushed above it is bound by less than this.
fn holdable_binding(problem: &RadialProblem, facts: &WellFacts, reach: f64) -> f64 {
    let length = reach - facts.r_floor;
    let turning = facts.top - problem.effective(facts.r_floor + 0.5 * length);
    turning.max(2.0 / (problem.reduced_mass * length * length))
}

/// Level v, which the count places below the limit but no box up to `reach` (bohr) held
/// there: bound by less than [`holdable_binding`], reported as the middle of that interval with
/// half its width as the error.
fn unresolved(job: &Job, v: usize, reach: f64) -> Solved {
    let (problem, facts) = (job.problem, job.facts);
    let bound = holdable_binding(problem, facts, reach);
    let (inner, _) = turning(problem, facts, facts.top, reach);
    Solved {
        level: Level {
            v: v as u32,
            j: problem.j,
            energy: facts.top - 0.5 * bound,
            error_estimate: 0.5 * bound,
            precision_floor: 0.0,
            status: LevelStatus::Unresolved,
            inner_turning_point: inner,
            outer_turning_point: f64::NAN,
            mean_r: f64::NAN,
            mean_inverse_r2: f64::NAN,
            rotational_constant: f64::NAN,
            centrifugal_distortion: f64::NAN,
            sextic_distortion: f64::NAN,
        },
        wavefunction: None,
    }
}

/// Points per decay length 1/kappa in a stretched tail on the coarsest grid.
const TAIL_POINTS_PER_DECAY_LENGTH: f64 = 4.0;

/// The stretch for a level at `energy` in the box `base` ([`mapping`]), from the box's start:
/// its scale L is the least for which the stretched step h (1 + (r - s)/L) still gives, at
/// every r, the points per local wavelength 2 pi / k(r), k = sqrt(2 mu |E - V_eff(r)|), that the
/// plain step h gives at the bottom of the well (sampled at 2000 radii spaced geometrically), and
/// at the box's end still resolves the asymptotic decay length 1/kappa, kappa = sqrt(2 mu
/// (limit - E)), by TAIL_POINTS_PER_DECAY_LENGTH. In a power-law tail, where k falls off with r,
/// the step then grows from the well on; near a well it stays plain. None when the plain grid
/// would need fewer than about twice the points (a short tail).
fn tail_stretch(
    problem: &RadialProblem,
    energy: f64,
    base: &UniformGrid,
) -> Option<mapping::Stretch> {
    let limit = problem.curve.limit()?;
    let kappa = (2.0 * problem.reduced_mass * (limit - energy)).sqrt();
    // The plain step must resolve the decay for the stretch to coarsen it.
    let resolved = TAIL_POINTS_PER_DECAY_LENGTH * kappa * base.step;
    if kappa.is_nan() || kappa <= 0.0 || resolved >= 1.0 {
        return None;
    }
    let extent = base.end() - base.start;
    // The wavenumber the plain step resolves as the coarsest grid resolves the well's bottom.
    let resolvable = 2.0 * std::f64::consts::PI / (NUMEROV_POINTS_PER_WAVELENGTH * base.step);
    let samples = 2000;
    let local = (0..=samples)
        .map(|k| extent * (1e-6f64).powf(1.0 - k as f64 / samples as f64))
        .map(|d| {
            let wavenumber =
                (2.0 * problem.reduced_mass * (energy - problem.effective(base.start + d)).abs())
                    .sqrt();
            if wavenumber < resolvable {
                d / (resolvable / wavenumber - 1.0)
            } else {
                0.0
            }
        })
        .fold(0.0f64, f64::max);
    // h (1 + extent / L) <= 1 / (points kappa) at the end.
    let scale = local.max(resolved * extent / (1.0 - resolved));
    // Plain points extent / h against stretched (L / h) ln(1 + extent / L): 2.5 times as
    // many at extent = 4 L.
    (extent > 4.0 * scale).then_some(mapping::Stretch {
        start: base.start,
        scale,
    })
}

/// What a level gives on one grid of its Richardson ladder.
#[derive(Debug, Clone, Copy, Default)]
struct Rung {
    energy: f64,
    /// The leading discretisation error E_h - E predicted from the level on this grid
    /// ([`NumerovGrid::leading_error`]).
    leading_error: f64,
    mean_r: f64,
    mean_inverse_r2: f64,
    distortion: f64,
    sextic: f64,
    /// The energy's rounding ([`numerov::GridLevel::rounding`]).
    rounding: f64,
}

/// Level v on grids with steps h, h/2, h/4, ... over one box (`coarsest`'s range), each
/// rung seeded by the one before. After each new rung the estimate is formed from the last
/// rungs ([`ladder_estimate`]): three give a Richardson value whose error estimate is its last
/// step; two suffice when their one Richardson step is already far below the tolerance. A
/// step the user fixed is never refined: a level that misses the tolerance after three rungs
/// on it is reported as not converged.
struct Ladder {
    /// The box in r (before any stretch).
    base: UniformGrid,
    /// The energy (relative to the curve minimum) the box was sized for.
    sized_for: f64,
    /// The first rung's grid (uniform in x when stretched).
    coarsest: UniformGrid,
    stretch: Option<mapping::Stretch>,
    rungs: Vec<Rung>,
    /// Energies (relative to the curve minimum) the next rung's level lies between.
    bracket: (f64, f64),
    /// The last rung's level and grid.
    finest: Option<(numerov::GridLevel, NumerovGrid)>,
    /// The level and grid of the rung before the last.
    before_finest: Option<(numerov::GridLevel, NumerovGrid)>,
}

impl Ladder {
    /// Solve the next rung (the first from `seed`, relative to the curve minimum). Returns the
    /// level once the estimate meets the tolerance or the last rung allowed is reached.
    fn climb(
        &mut self,
        job: &Job,
        v: usize,
        seed: Option<f64>,
    ) -> Result<Option<Solved>, SolverError> {
        let (problem, settings, facts) = (job.problem, job.settings, job.facts);
        let last_rung = if settings.step.is_none() {
            MAX_REFINEMENTS + 2
        } else {
            2
        };
        let k = self.rungs.len();
        let g = self.coarsest.refined(1 << k);
        let (lo, hi) = self.bracket;
        let lattice = &job.counting.lattice;
        // A plain rung is a subsampling of the lattice when it lies on it; otherwise each rung
        // after the first is the one before with its step halved (only new points evaluated).
        let on_lattice = match self.stretch {
            None => on_lattice(lattice, &g),
            Some(_) => None,
        };
        let numerov = match (on_lattice, &self.stretch, &self.finest) {
            // (The lattice's values were all found finite when it was built.)
            (Some(subsample), _, _) => {
                check_factor(problem, facts, &g, subsample, lowest_energy(facts))?
            }
            (None, stretch, Some((_, previous))) => {
                let floor = facts.curve_minimum;
                let halved = previous.halved(stretch.as_ref(), &|r| problem.effective(r) - floor);
                let lowest = if stretch.is_some() {
                    lo
                } else {
                    lowest_energy(facts)
                };
                check_factor(problem, facts, &g, finite(halved)?, lowest)?
            }
            (None, stretch, None) => {
                check_stretched_grid(problem, facts, &g, stretch.as_ref().map(|s| (s, lo)))?
            }
        };
        // Seed: the rung before, moved by the change its leading error predicts (15/16 of it
        // goes when the step halves), to O(h^6).
        let seed = match self.rungs.as_slice() {
            [.., a] => Some(a.energy - 15.0 / 16.0 * a.leading_error),
            [] => seed,
        };
        let binding = match seed {
            Some(e) if facts.top_is_limit => (facts.top - facts.curve_minimum - e).abs(),
            _ => f64::INFINITY,
        };
        let cooley = (COOLEY_FRACTION * settings.tolerance).min(COOLEY_BINDING_FRACTION * binding);
        let level = numerov
            .solve_level(v, lo, hi, seed, cooley)
            .ok_or_else(|| SolverError::Bracket {
                v: v as u32,
                grid: format!("{:.4}..{:.4} bohr, step {:.3e}", g.start, g.end(), g.step),
            })?;
        let mut rung = Rung {
            energy: level.energy,
            rounding: level.rounding,
            ..Rung::default()
        };
        rung.leading_error = numerov.leading_error(level.energy, &level.phi);
        (rung.mean_r, rung.mean_inverse_r2) = numerov.expectations(&level.phi);
        self.rungs.push(rung);
        // Next grid: the level moves by O(h^4); bracket tightly, widened if needed.
        let shift = (hi - lo).min(1e-2 * (facts.top - facts.floor));
        self.bracket = (level.energy - shift, level.energy + shift);
        self.before_finest = self.finest.replace((level, numerov));
        let Some(mut estimate) = ladder_estimate(&self.rungs, settings.tolerance) else {
            return Ok(None);
        };
        estimate.error *= EXTRAPOLATION_SAFETY;
        if problem.curve.is_piecewise() {
            // The extrapolation past the leading-error correction rests on a smooth error
            // series that a spline does not have: the last change of the corrected energy
            // bounds what it could gain.
            let n = self.rungs.len();
            let corrected = |r: &Rung| r.energy - r.leading_error;
            let last_change = (corrected(&self.rungs[n - 1]) - corrected(&self.rungs[n - 2])).abs();
            estimate.error = estimate.error.max(last_change);
        }
        // Rounding bounds what any further rung could gain: climb while the estimate exceeds
        // both the tolerance and the rounding, then report both together.
        let rounding = rounding_floor(&self.rungs[self.rungs.len() - estimate.used..], facts);
        if estimate.error > settings.tolerance.max(rounding) && k < last_rung {
            return Ok(None);
        }
        estimate.error += rounding;
        estimate.rounding = rounding;
        if problem.curve.is_piecewise() {
            estimate.error += self.alignment_error(job, v)?;
            if estimate.error > settings.tolerance && k < last_rung {
                return Ok(None);
            }
        }
        let (level, numerov) = self.finest.take().expect("a rung was just solved");
        // D_v and H_v come from the two finest rungs only: solved there, once.
        if settings.distortion {
            let n = self.rungs.len();
            let (before_level, before_grid) = self
                .before_finest
                .as_ref()
                .expect("an estimate needs two rungs");
            (_, self.rungs[n - 2].distortion, self.rungs[n - 2].sextic) =
                before_grid.rotational_constants(before_level.energy, &before_level.phi);
            (_, self.rungs[n - 1].distortion, self.rungs[n - 1].sextic) =
                numerov.rotational_constants(level.energy, &level.phi);
        }
        Ok(Some(finish_level(
            job,
            v,
            &self.rungs,
            estimate,
            level,
            numerov,
        )))
    }
}

/// The factor on an extrapolation's own error estimate (its last step, or the disagreement of
/// two schemes) that is reported as its bound: the estimate measures the error of the value
/// before the last step, and the property test found levels (one of a near-degenerate
/// tunnelling pair, whose energy is not yet analytic in the step) where the extrapolated
/// value missed by 1.3 times it. A safety factor on an a posteriori estimate is common
/// practice in adaptive error control; 2 is our choice.
const EXTRAPOLATION_SAFETY: f64 = 2.0;

/// How many times its one-standard-deviation size the rounding a level carries is reported:
/// the recurrence's random walk ([`numerov::GridLevel::rounding`]) is a typical size, not a
/// bound, and the Richardson combination weighs the rungs by up to 1 + 1/15 + 1/63 (our own
/// allowance).
const ROUNDING_ALLOWANCE: f64 = 4.0;

/// The rounding in a level's energy from the rungs that made it: the recurrence's, and that of
/// the potential values, each about eps (|V_min| + |V - V_min|) (the curve's own values are
/// absolute; the grid stores them relative to its minimum), of the size of the level's energy.
fn rounding_floor(rungs: &[Rung], facts: &WellFacts) -> f64 {
    let recurrence = rungs.iter().map(|r| r.rounding).fold(0.0, f64::max);
    let energy = rungs.last().map_or(0.0, |r| r.energy.abs());
    ROUNDING_ALLOWANCE * (recurrence + f64::EPSILON * (facts.curve_minimum.abs() + energy))
}

impl Ladder {
    /// On a piecewise curve (a spline, whose third derivative jumps at its points) Numerov's
    /// error has a part g that depends on where the grid points fall against the knots, not
    /// smoothly on the step, which Richardson extrapolation cannot see. The finest rung is
    /// solved again on its grid shifted by a quarter, a half and three quarters of a step: g
    /// varies with the shift about a mean the series already holds, so the largest change of the
    /// corrected energy (E - L) among the shifts measures it (on a smooth curve the changes are
    /// of the order of the series' next term only).
    fn alignment_error(&self, job: &Job, v: usize) -> Result<f64, SolverError> {
        let (problem, facts) = (job.problem, job.facts);
        let Some((level, numerov)) = &self.finest else {
            return Ok(0.0);
        };
        let corrected = |grid: &NumerovGrid, level: &numerov::GridLevel| {
            level.energy - grid.leading_error(level.energy, &level.phi)
        };
        let reference = corrected(numerov, level);
        let floor = facts.curve_minimum;
        let potential = |r: f64| problem.effective(r) - floor;
        let (lo, hi) = self.bracket;
        let tolerance = COOLEY_FRACTION * job.settings.tolerance;
        let mut largest = 0.0f64;
        for fraction in [0.25, 0.5, 0.75] {
            let grid = numerov.grid;
            let shifted = UniformGrid {
                start: grid.start + fraction * grid.step,
                ..grid
            };
            let other = match &self.stretch {
                Some(stretch) => {
                    let built =
                        NumerovGrid::stretched(shifted, problem.reduced_mass, stretch, &potential);
                    check_factor(problem, facts, &shifted, finite(built)?, lo)?
                }
                None => check_grid(problem, facts, &shifted)?,
            };
            let Some(moved) = other.solve_level(v, lo, hi, Some(level.energy), tolerance) else {
                return Err(SolverError::Bracket {
                    v: v as u32,
                    grid: format!("{shifted:?} (shifted by {fraction} of a step)"),
                });
            };
            largest = largest.max((corrected(&other, &moved) - reference).abs());
        }
        Ok(largest)
    }
}

/// The Richardson value of a ladder and which rungs made it.
struct LadderEstimate {
    /// Rungs used: 2 (one Richardson step) or 3 (two).
    used: usize,
    energy: f64,
    error: f64,
    /// The part of the error that rounding alone leaves (set once the ladder stops).
    rounding: f64,
}

/// The best estimate from the last rungs of a ladder (None with a single rung, or with two
/// whose step is not yet small enough to stand alone).
///
/// Three rungs: the energies corrected by their leading error (E_h - L_h = E + b h^6 +
/// c h^8 and so on) are extrapolated with factors 63 and 255, and the plain energies as h^4,
/// h^6 ([`richardson`]). The corrected extrapolation is kept when the corrected values
/// converge as h^6 does (successive differences in a ratio near 2^6 = 64, between 48 and 85);
/// otherwise (stretched tails of the least-bound levels can leave part of the h^4 term; a level
/// near a barrier top mixes h^6 and h^8) the scheme with the smaller last step. The error is
/// that scheme's last step, and at least the two schemes' disagreement. Two rungs: one plain Richardson step, when it is below EARLY_EXIT of the
/// tolerance.
fn ladder_estimate(rungs: &[Rung], tolerance: f64) -> Option<LadderEstimate> {
    let energies: Vec<f64> = rungs.iter().map(|r| r.energy).collect();
    let n = energies.len();
    if n >= 3 {
        let last = &rungs[n - 3..];
        let corrected: Vec<f64> = last.iter().map(|r| r.energy - r.leading_error).collect();
        let ratio = (corrected[1] - corrected[0]) / (corrected[2] - corrected[1]);
        let with_correction = richardson_corrected([corrected[0], corrected[1], corrected[2]]);
        let plain = richardson([energies[n - 3], energies[n - 2], energies[n - 1]]);
        // The two schemes model the error differently, so the worse is off by at least their
        // disagreement, which the error covers. In the h^6 regime the corrected values are
        // kept; outside it neither can be trusted alone and the one whose last step is
        // smaller is kept. (A last step alone understates the error when the remainder after
        // h^6 does not yet fall as h^8: 7e-16 hartree on a 230-level Morse against a step of
        // 2e-16.)
        let (energy, step) = if (48.0..=85.0).contains(&ratio) || with_correction.1 < plain.1 {
            with_correction
        } else {
            plain
        };
        let mut error = step.max((plain.0 - with_correction.0).abs());
        // The plain energies must converge as h^4 (differences in a ratio near 16) for either
        // extrapolation to stand: a level of a near-degenerate pair (tunnelling in a double
        // well) moves non-analytically in h while its discretisation error is comparable with
        // the pair's splitting. Outside that regime the last change of the corrected energy
        // bounds what the extrapolation could gain.
        let plain_ratio = (energies[n - 2] - energies[n - 3]) / (energies[n - 1] - energies[n - 2]);
        if !(12.0..=20.0).contains(&plain_ratio) {
            error = error.max((corrected[2] - corrected[1]).abs());
        }
        let three = LadderEstimate {
            used: 3,
            energy,
            error,
            rounding: 0.0,
        };
        if error <= tolerance {
            return Some(three);
        }
        return Some(two_rung(&rungs[n - 2..], tolerance).unwrap_or(three));
    }
    (n == 2).then(|| two_rung(rungs, tolerance)).flatten()
}

/// Richardson extrapolation of corrected values at steps h, h/2, h/4 for an error series in
/// h^6, h^8: returns (extrapolated value, error estimate).
fn richardson_corrected(values: [f64; 3]) -> (f64, f64) {
    let first = values[1] + (values[1] - values[0]) / 63.0;
    let second = values[2] + (values[2] - values[1]) / 63.0;
    let best = second + (second - first) / 255.0;
    (best, (best - second).abs())
}

/// Two estimates from the last two rungs, when they agree within EARLY_EXIT of the tolerance:
/// one Richardson step, E_h/2 + (E_h/2 - E_h) / 15, and the finer rung corrected by its leading
/// error, E_h/2 - L_h/2. Both remove the h^4 term; they differ by what is left, so their
/// disagreement is the error (at least the kept one's own step). The one with the smaller step
/// (Richardson's, or the size of the correction) is kept. (A step alone was once the error:
/// far in a stretched tail the first rungs can converge faster than h^4, and the Richardson
/// step then overshoots by about itself.)
fn two_rung(rungs: &[Rung], tolerance: f64) -> Option<LadderEstimate> {
    let (coarse, fine) = (&rungs[0], &rungs[1]);
    let step = (fine.energy - coarse.energy) / 15.0;
    let richardson = fine.energy + step;
    let corrected = fine.energy - fine.leading_error;
    let (energy, own) = if fine.leading_error.abs() < step.abs() {
        (corrected, fine.leading_error.abs())
    } else {
        (richardson, step.abs())
    };
    let error = own.max((richardson - corrected).abs());
    (error <= EARLY_EXIT * tolerance).then_some(LadderEstimate {
        used: 2,
        energy,
        error,
        rounding: 0.0,
    })
}

/// The level from its ladder: the energy, <r> and <r^-2> extrapolated like the energy, D_v and
/// H_v from one Richardson step over the two finest rungs, turning points at the final energy.
fn finish_level(
    job: &Job,
    v: usize,
    rungs: &[Rung],
    estimate: LadderEstimate,
    level: numerov::GridLevel,
    finest: NumerovGrid,
) -> Solved {
    let (problem, settings, facts) = (job.problem, job.settings, job.facts);
    let n = rungs.len();
    let used = &rungs[n - estimate.used..];
    let extrapolate = |value: fn(&Rung) -> f64| -> f64 {
        match used {
            [a, b] => value(b) + (value(b) - value(a)) / 15.0,
            [a, b, c] => richardson([value(a), value(b), value(c)]).0,
            _ => unreachable!("two or three rungs"),
        }
    };
    let one_step = |value: fn(&Rung) -> f64| -> f64 {
        let (a, b) = (&rungs[n - 2], &rungs[n - 1]);
        value(b) + (value(b) - value(a)) / 15.0
    };
    let (centrifugal_distortion, sextic_distortion) = if settings.distortion {
        (one_step(|r| r.distortion), one_step(|r| r.sextic))
    } else {
        (f64::NAN, f64::NAN)
    };
    let mean_r = extrapolate(|r| r.mean_r);
    let inv_r2 = extrapolate(|r| r.mean_inverse_r2);
    let absolute = estimate.energy + facts.curve_minimum;
    // The grid starts at r_0 > 0 with psi(r_0) = 0 in place of psi(0) = 0. Moving a node-fixing
    // wall by dr moves a level by psi'^2 dr / (2 mu) (the Hellmann-Feynman theorem for the
    // boundary), so the wall left out, from 0 to r_0, shifts it by at most about
    // psi'(r_0)^2 r_0 / (2 mu) (psi growing as r^(J+1) from the origin): nothing for a
    // repulsive wall that has damped psi by e^-30, but not so for a wall made by the
    // centrifugal term alone (a curve without a repulsive core).
    let start = finest.radius(0);
    let slope = level.phi[1] / finest.grid.step;
    let wall = slope * slope * start / (2.0 * problem.reduced_mass);
    let estimate = LadderEstimate {
        error: estimate.error + wall,
        ..estimate
    };
    let (inner, outer) = turning(
        problem,
        facts,
        absolute,
        10.0 * finest.radius(finest.grid.intervals),
    );
    Solved {
        level: Level {
            v: v as u32,
            j: problem.j,
            energy: absolute,
            error_estimate: estimate.error,
            precision_floor: estimate.rounding,
            status: if estimate.error <= settings.tolerance {
                LevelStatus::Converged
            } else {
                LevelStatus::NotConverged
            },
            inner_turning_point: inner,
            outer_turning_point: outer,
            mean_r,
            mean_inverse_r2: inv_r2,
            rotational_constant: inv_r2 / (2.0 * problem.reduced_mass),
            centrifugal_distortion,
            sextic_distortion,
        },
        wavefunction: settings.keep_wavefunctions.then(|| {
            let (r, psi, weights) = finest.wavefunction(&level.phi);
            Wavefunction {
                v: v as u32,
                r,
                psi,
                weights,
            }
        }),
    }
}

/// Every bound (v, J): J = Omega, Omega + 1, ... until no level is bound, solved in parallel
/// in batches of J. Returns one [`LevelSet`] per J, in order.
pub fn solve_manifold(
    curve: &dyn PotentialCurve,
    reduced_mass: f64,
    omega: u32,
    settings: &SolverSettings,
) -> Result<Vec<LevelSet>, SolverError> {
    solve_manifold_with_progress(curve, reduced_mass, omega, settings, &|_, _| {})
}

/// As [`solve_manifold`], calling `progress(J, levels found)` after each J is solved (from
/// worker threads, in any order), for a progress display.
pub fn solve_manifold_with_progress(
    curve: &dyn PotentialCurve,
    reduced_mass: f64,
    omega: u32,
    settings: &SolverSettings,
    progress: &(dyn Fn(u32, usize) + Sync),
) -> Result<Vec<LevelSet>, SolverError> {
    let batch = 2 * rayon::current_num_threads().max(1) as u32;
    let mut sets = Vec::new();
    let mut first = omega;
    loop {
        let results: Vec<Result<LevelSet, SolverError>> = (first..first + batch)
            .into_par_iter()
            .map(|j| {
                let mut problem = RadialProblem::new(curve, reduced_mass, j);
                problem.omega = omega;
                let result = solve(&problem, settings);
                progress(j, result.as_ref().map_or(0, |set| set.levels.len()));
                result
            })
            .collect();
        for result in results {
            match result {
                Ok(set) => sets.push(set),
                Err(SolverError::NothingBound { .. }) if !sets.is_empty() => return Ok(sets),
                Err(e) => return Err(e),
            }
        }
        first += batch;
    }
}
