//! Wavefunctions of several radial problems on one grid, for overlaps and matrix elements
//! between them (Franck-Condon factors, transition dipoles).
//!
//! Each problem is first solved by Numerov (certified energies and the level count). The grid
//! is then the union of what each problem's highest wanted level needs (its classical region
//! plus the decay of its tails, as in [`super::grid`]) at the finest of their steps, and every
//! problem is diagonalised there by the Colbert-Miller sinc-DVR. Sinc-DVR eigenvectors converge
//! exponentially with the step, so a sum over the shared points is an overlap integral to
//! near machine precision; no interpolation between grids is needed. The wavefunctions are
//! normalised to sum psi_i^2 h = 1 and positive on their innermost lobe.

use super::{
    dvr::{solve_dvr, DVR_POINTS_PER_WAVELENGTH},
    grid, solve, turning, well_facts, LevelSet, Method, RadialProblem, SolverError, SolverSettings,
    Wavefunction,
};

/// Levels of one problem, and its wavefunctions on the shared grid.
#[derive(Debug, Clone, PartialEq)]
pub struct SharedLevels {
    /// Numerov levels (the energies to report), v = 0 .. highest.
    pub levels: LevelSet,
    /// Sinc-DVR wavefunctions on the shared grid, same v order.
    pub wavefunctions: Vec<Wavefunction>,
    /// Largest |E_DVR - E_Numerov| over the levels, hartree: a check that the shared grid
    /// resolves every wavefunction.
    pub grid_disagreement: f64,
}

/// Extra margin (fraction of the finest automatic step) for the shared grid.
const SHARED_STEP_FACTOR: f64 = 0.8;

/// Solve each problem up to its highest v (None: every bound level) on one shared grid.
pub fn solve_on_shared_grid(
    problems: &[(RadialProblem, Option<u32>)],
    settings: &SolverSettings,
) -> Result<Vec<SharedLevels>, SolverError> {
    let mut numerov = Vec::with_capacity(problems.len());
    let (mut lo, mut hi, mut step) = (f64::INFINITY, 0.0f64, f64::INFINITY);
    for (problem, highest_v) in problems {
        let own = settings
            .clone()
            .with_method(Method::Numerov)
            .with_highest_v(*highest_v)
            .with_wavefunctions(false)
            .with_distortion(false);
        let set = solve(problem, &own)?;
        let facts = well_facts(problem, &own)?;
        let top = set.levels.last().map_or(facts.top, |l| l.energy);
        let (inner, outer) = turning(problem, &facts, top, settings.outer_cap);
        let own_step = grid::step_for(problem, top, facts.floor, DVR_POINTS_PER_WAVELENGTH);
        let (start, _) = grid::inner_bound(problem, top, inner, own_step, f64::INFINITY);
        lo = lo.min(start);
        hi = hi.max(grid::outer_bound(problem, top, outer, settings.outer_cap));
        step = step.min(own_step);
        numerov.push(set);
    }
    let shared = settings
        .clone()
        .with_method(Method::SincDvr)
        .with_wavefunctions(true)
        .with_grid(Some((lo, hi)), Some(SHARED_STEP_FACTOR * step));
    problems
        .iter()
        .zip(numerov)
        .map(|((problem, _), levels)| {
            let highest = levels.levels.last().map(|l| l.v);
            let facts = well_facts(problem, &shared)?;
            let dvr = solve_dvr(problem, &shared.clone().with_highest_v(highest), &facts)?;
            let grid_disagreement = levels
                .levels
                .iter()
                .zip(&dvr.levels)
                .map(|(a, b)| (a.energy - b.energy).abs())
                .fold(0.0, f64::max);
            if dvr.levels.len() < levels.levels.len() {
                return Err(SolverError::Bracket {
                    v: dvr.levels.len() as u32,
                    grid: format!("shared sinc-DVR grid {lo:.4} .. {hi:.4} bohr"),
                });
            }
            Ok(SharedLevels {
                levels,
                wavefunctions: dvr.wavefunctions,
                grid_disagreement,
            })
        })
        .collect()
}
