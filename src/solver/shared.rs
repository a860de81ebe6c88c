//! Wavefunctions of several radial problems on one grid, for overlaps and matrix elements
//! between them (Franck-Condon factors, transition dipoles).
//!
//! Each problem is first solved by Numerov (certified energies and the level count). The grid
//! is then one mapped sinc-DVR grid ([`super::dvr`]) over the union of what each problem's
//! highest wanted level needs (its classical region plus the decay of its tails, as in
//! [`super::grid`]), resolving every problem at [`SHARED_POINTS_PER_WAVELENGTH`], and every
//! problem is diagonalised there. Sinc-DVR eigenvectors converge exponentially with the step,
//! so the grid's quadrature, int f dr = sum_i f(r_i) w_i, gives overlap integrals to near
//! machine precision; no interpolation between grids is needed. The mapped grid keeps a level
//! near the dissociation limit, whose tail reaches hundreds of bohr, to a few hundred points.

use super::{
    dvr::{diagonalise, MappedGrid},
    grid, solve, turning, well_facts, LevelSet, Method, RadialProblem, SolverError, SolverSettings,
    Wavefunction,
};

/// Levels of one problem, and its wavefunctions on the shared grid.
#[derive(Debug, Clone, PartialEq)]
pub struct SharedLevels {
    /// Numerov levels (the energies to report), v = 0 .. highest.
    pub levels: LevelSet,
    /// Sinc-DVR wavefunctions on the shared grid, same v order (psi at the points r_i,
    /// normalised, positive on the innermost lobe; integrals between them by
    /// [`Wavefunction::overlap_with`]).
    pub wavefunctions: Vec<Wavefunction>,
    /// Largest |E_DVR - E_Numerov| over the levels, hartree: a check that the shared grid
    /// resolves every wavefunction.
    pub grid_disagreement: f64,
}

/// Points per local wavelength of the shared grid (the reference's 4, with a margin).
pub const SHARED_POINTS_PER_WAVELENGTH: f64 = 5.0;

/// Solve each problem up to its highest v (None: every bound level) on one shared grid.
pub fn solve_on_shared_grid(
    problems: &[(RadialProblem, Option<u32>)],
    settings: &SolverSettings,
) -> Result<Vec<SharedLevels>, SolverError> {
    let mut numerov = Vec::with_capacity(problems.len());
    // Each problem's top energy and the range its wavefunctions need.
    let mut needs = Vec::with_capacity(problems.len());
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
        let (start, _) = grid::inner_bound(problem, top, inner, 1e-3, f64::INFINITY);
        let end = grid::outer_bound(problem, top, outer, settings.outer_cap);
        needs.push((top, start, end));
        numerov.push(set);
    }
    let lo = needs.iter().map(|n| n.1).fold(f64::INFINITY, f64::min);
    let hi = needs.iter().map(|n| n.2).fold(0.0, f64::max);
    // The finest of the problems' local steps at every r, each problem only over the range its
    // wavefunctions need (beyond it they have decayed by e^-30 and set no step).
    let local_step = |r: f64| -> f64 {
        problems
            .iter()
            .zip(&needs)
            .filter(|(_, (_, start, end))| (*start..=*end).contains(&r))
            .map(|((problem, _), (top, _, _))| {
                let k = (2.0 * problem.reduced_mass * (top - problem.effective(r)).abs()).sqrt();
                2.0 * std::f64::consts::PI / (SHARED_POINTS_PER_WAVELENGTH * k.max(1e-300))
            })
            .fold(f64::INFINITY, f64::min)
    };
    let grid = MappedGrid::fitted(lo, hi, &local_step);
    problems
        .iter()
        .zip(numerov)
        .map(|((problem, _), levels)| {
            let dvr = diagonalise(problem, grid, true)?;
            let count = levels.levels.len();
            let grid_disagreement = levels
                .levels
                .iter()
                .zip(&dvr.energies)
                .map(|(a, b)| (a.energy - b).abs())
                .fold(0.0, f64::max);
            let wavefunctions = (0..count)
                .map(|k| Wavefunction {
                    v: levels.levels[k].v,
                    ..dvr.wavefunction(k).expect("vectors were kept")
                })
                .collect();
            Ok(SharedLevels {
                levels,
                wavefunctions,
                grid_disagreement,
            })
        })
        .collect()
}
