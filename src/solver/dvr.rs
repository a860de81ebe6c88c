//! Reference method: the Colbert-Miller sinc-DVR on a uniform grid (D.T. Colbert and
//! W.H. Miller, J. Chem. Phys. 96, 1982 (1992), eq. (A7) for the (-inf, inf) interval):
//!
//! ```text
//!   T_ij = 1/(2 mu h^2) (-1)^(i-j) * { pi^2/3        i = j
//!                                     { 2/(i-j)^2     i != j
//! ```
//!
//! H = T + diag(V_eff(r_i)) is diagonalised densely with faer (all eigenpairs, ascending).
//! The error estimate is the change of each level between steps h and 0.8 h; the finer result
//! is reported. Cost O(N^3): a reference for tests and checks, not for production.

use super::{
    expectations, grid::UniformGrid, turning, CountAudit, CountMethod, Level, LevelSet,
    LevelStatus, Method, RadialProblem, SolverError, SolverSettings, Wavefunction, WellFacts,
};
use faer::{Mat, Side};

/// Largest matrix the reference path will build.
pub const MAX_DVR_POINTS: usize = 6000;
/// Points per local wavelength at the bottom of the well (sinc-DVR needs more than 2).
pub(super) const DVR_POINTS_PER_WAVELENGTH: f64 = 4.0;

struct DvrSolution {
    energies: Vec<f64>,
    vectors: Mat<f64>,
    grid: UniformGrid,
}

fn diagonalise(problem: &RadialProblem, grid: UniformGrid) -> Result<DvrSolution, SolverError> {
    let n = grid.interior_points();
    if n > MAX_DVR_POINTS {
        return Err(SolverError::DvrTooLarge {
            points: n,
            limit: MAX_DVR_POINTS,
        });
    }
    let h = grid.step;
    let kinetic = 1.0 / (2.0 * problem.reduced_mass * h * h);
    let pi2_3 = std::f64::consts::PI.powi(2) / 3.0;
    let potential: Vec<f64> = (1..=n).map(|i| problem.effective(grid.r(i))).collect();
    if let Some(i) = potential.iter().position(|v| !v.is_finite()) {
        return Err(SolverError::NotFinite { r: grid.r(i + 1) });
    }
    let hamiltonian = Mat::from_fn(n, n, |i, j| {
        if i == j {
            kinetic * pi2_3 + potential[i]
        } else {
            let d = i as f64 - j as f64;
            let sign = if (i + j) % 2 == 0 { 1.0 } else { -1.0 };
            kinetic * sign * 2.0 / (d * d)
        }
    });
    let eigen = hamiltonian
        .self_adjoint_eigen(Side::Lower)
        .map_err(|e| SolverError::Eigensolver(format!("{e:?}")))?;
    let values = eigen.S().column_vector();
    let energies = (0..n).map(|i| values[i]).collect();
    Ok(DvrSolution {
        energies,
        vectors: eigen.U().to_owned(),
        grid,
    })
}

pub(super) fn solve_dvr(
    problem: &RadialProblem,
    settings: &SolverSettings,
    facts: &WellFacts,
) -> Result<LevelSet, SolverError> {
    let cap = settings.outer_cap;
    let auto_step = super::grid::step_for(
        problem,
        facts.step_energy,
        facts.floor,
        DVR_POINTS_PER_WAVELENGTH,
    );
    let step = settings.step.unwrap_or(auto_step);
    let (lo, hi) = match settings.r_range {
        Some(range) => range,
        None => {
            let (inner, _) = turning(problem, facts, facts.top, cap);
            let (start, _) =
                super::grid::inner_bound(problem, facts.top, inner, step, f64::INFINITY);
            // Box: what a level bound by 1e-4 of the depth needs.
            let probe = facts.top - 1e-4 * (facts.top - facts.floor);
            let (_, outer) = turning(problem, facts, probe, cap);
            (start, super::grid::outer_bound(problem, probe, outer, cap))
        }
    };
    let coarse = super::grid_over(lo, hi, step);
    let fine = super::grid_over(lo, hi, 0.8 * step);
    let first = diagonalise(problem, coarse)?;
    let second = diagonalise(problem, fine)?;
    let mut count = second.energies.iter().filter(|&&e| e < facts.top).count();
    if let Some(v) = settings.highest_v {
        count = count.min(v as usize + 1);
    }
    if count == 0 {
        return Err(SolverError::NothingBound { j: problem.j });
    }
    let grid = second.grid;
    let mut levels = Vec::with_capacity(count);
    let mut wavefunctions = Vec::new();
    for v in 0..count {
        let energy = second.energies[v];
        let error_estimate = (energy - first.energies[v]).abs();
        // DVR coefficients c_i = sqrt(h) psi(r_i).
        let mut psi: Vec<f64> = std::iter::once(0.0)
            .chain((0..grid.interior_points()).map(|i| second.vectors[(i, v)] / grid.step.sqrt()))
            .chain(std::iter::once(0.0))
            .collect();
        let peak = psi.iter().fold(0.0f64, |m, p| m.max(p.abs()));
        if psi
            .iter()
            .find(|p| p.abs() > 1e-3 * peak)
            .is_some_and(|p| *p < 0.0)
        {
            psi.iter_mut().for_each(|p| *p = -*p);
        }
        let (mean_r, mean_inverse_r2) = expectations(&grid, &psi);
        let (inner, outer) = turning(problem, facts, energy, 10.0 * cap);
        levels.push(Level {
            v: v as u32,
            j: problem.j,
            energy,
            error_estimate,
            status: if error_estimate <= settings.tolerance {
                LevelStatus::Converged
            } else {
                LevelStatus::NotConverged
            },
            inner_turning_point: inner,
            outer_turning_point: outer,
            mean_r,
            mean_inverse_r2,
            rotational_constant: mean_inverse_r2 / (2.0 * problem.reduced_mass),
            centrifugal_distortion: f64::NAN,
            sextic_distortion: f64::NAN,
        });
        if settings.keep_wavefunctions {
            wavefunctions.push(Wavefunction {
                v: v as u32,
                r: (0..=grid.intervals).map(|i| grid.r(i)).collect(),
                psi,
            });
        }
    }
    Ok(LevelSet {
        j: problem.j,
        reduced_mass: problem.reduced_mass,
        method: Method::SincDvr,
        curve_minimum: facts.curve_minimum,
        limit: problem.curve.limit(),
        levels,
        audit: CountAudit {
            bound_levels: second.energies.iter().filter(|&&e| e < facts.top).count(),
            method: CountMethod::Box { outer: hi },
        },
        wavefunctions,
        finest_grid: grid,
    })
}
