//! Reference method: the Colbert-Miller sinc-DVR in a mapped coordinate.
//!
//! The radial coordinate is stretched, r(x) = r_0 + L (e^((x - r_0)/L) - 1) on a grid uniform
//! in x ([`super::mapping`]): the step in r, h (1 + (r - r_0)/L), is nearly uniform well inside
//! r_0 + L and grows in proportion to r beyond it, so a wavefunction reaching 10^5 bohr from a well a few bohr wide needs hundreds
//! of points, not millions (a mapped Fourier grid in the sense of V. Kokoouline, O. Dulieu,
//! R. Kosloff and F. Masnou-Seeuws, J. Chem. Phys. 110, 9865 (1999); recalled from memory). The
//! map's scale L is chosen per curve to need the fewest points while the local step stays below
//! 2 pi / (P k(r)) everywhere, k(r) = sqrt(2 mu |E_top - V_eff(r)|), with P points per local
//! wavelength.
//!
//! With psi(r) = r'(x)^(1/2) phi(x) (the Liouville transformation of [`super::mapping`], whose
//! Schwarzian term for this map is the constant F = 1/(4 L^2)), the radial equation becomes
//! -phi''/(2 mu) + [r'^2 V_eff + F/(2 mu)] phi = E r'^2 phi, and with chi_i = r'_i sqrt(h) phi_i
//! the sinc-DVR of d^2/dx^2 (D.T. Colbert and W.H. Miller, J. Chem. Phys. 96, 1982 (1992),
//! eq. (A7)) gives the symmetric matrix
//!
//! ```text
//!   H_ij = T_ij / (r'_i r'_j) + delta_ij [V_eff(r_i) + F / (2 mu r'_i^2)],
//!   T_ij = 1/(2 mu h^2) (-1)^(i-j) * { pi^2/3 (i = j);  2/(i-j)^2 (i != j) },
//! ```
//!
//! diagonalised densely with faer (all eigenpairs, ascending). Then sum_i chi_i^2 = int psi^2 dr,
//! psi(r_i) = chi_i / sqrt(r'_i h), and an integral int psi_a f psi_b dr is sum_i chi_a,i f(r_i)
//! chi_b,i: overlaps between curves solved on one grid are plain dot products. The error
//! estimate of a level is its change between P and 1.25 P points per wavelength; the finer
//! result is reported. Cost O(N^3): a reference for tests and checks, and the common grid of
//! band calculations, not the production method.

use super::mapping::Stretch;
use super::{
    turning, CountAudit, CountMethod, Level, LevelSet, LevelStatus, Method, RadialProblem,
    SolverError, SolverSettings, Wavefunction, WellFacts,
};
use faer::{Mat, Side};

/// Largest matrix the reference path will build.
pub const MAX_DVR_POINTS: usize = 6000;
/// Points per local wavelength (sinc-DVR needs more than 2).
pub const DVR_POINTS_PER_WAVELENGTH: f64 = 4.0;
/// The reference box holds a level bound by this fraction of the depth (its tail decayed by
/// e^-30); a level bound by less may be missed, and the count says in which box it was made.
pub const DVR_BOX_BINDING: f64 = 1e-8;

/// A grid uniform in x under the stretch r(x) = s + L (e^((x - s)/L) - 1) ([`Stretch`]):
/// x_i = s + (i + 1) step, i = 0 .. points (psi vanishes at x = s and at x = s + (points + 1)
/// step, just outside).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MappedGrid {
    pub stretch: Stretch,
    /// The step in x, bohr.
    pub step: f64,
    pub points: usize,
}

impl MappedGrid {
    fn x(&self, i: usize) -> f64 {
        self.stretch.start + self.step * (i + 1) as f64
    }
    /// r_i, bohr.
    pub fn r(&self, i: usize) -> f64 {
        self.stretch.r(self.x(i))
    }
    /// dr/dx at point i.
    pub fn slope(&self, i: usize) -> f64 {
        self.stretch.at(self.x(i)).1
    }
    /// The quadrature weight of point i: int f dr = sum_i f(r_i) weight_i for smooth f that
    /// vanish at both ends.
    pub fn weight(&self, i: usize) -> f64 {
        self.slope(i) * self.step
    }
    /// Inner end of the grid (where psi vanishes), bohr.
    pub fn start(&self) -> f64 {
        self.stretch.start
    }
    /// Outer end of the grid (where psi vanishes), bohr.
    pub fn end(&self) -> f64 {
        self.stretch.r(self.x(self.points))
    }

    /// The grid over [start, end] whose local step h r'(x) stays below `local_step(r)`
    /// everywhere (sampled at 2000 radii spaced geometrically), with the scale L that needs
    /// the fewest points.
    pub fn fitted(start: f64, end: f64, local_step: &dyn Fn(f64) -> f64) -> MappedGrid {
        let samples = 2000;
        let span = end - start;
        // Distances from the start, geometric from 1e-6 of the span (where the step is finest).
        let radii: Vec<(f64, f64)> = (0..=samples)
            .map(|k| {
                let d = span * (1e-6f64).powf(1.0 - k as f64 / samples as f64);
                (d, local_step(start + d))
            })
            .collect();
        let points_for = |scale: f64| -> (f64, f64) {
            // h (scale + d) <= s(d) for every sample: h = min s / (scale + d).
            let step = radii
                .iter()
                .map(|(d, s)| s / (scale + d))
                .fold(f64::INFINITY, f64::min);
            let extent = (span / scale).ln_1p();
            (extent / step, step)
        };
        let (mut best_scale, mut best) = (span, points_for(span));
        let mut scale = 1e-6 * span;
        while scale < 1e3 * span {
            let candidate = points_for(scale);
            if candidate.0 < best.0 {
                (best_scale, best) = (scale, candidate);
            }
            scale *= 1.25;
        }
        // The same extent in a whole number of steps, none coarser than the best found (psi
        // vanishes at both ends).
        let points = best.0.ceil().max(8.0) as usize;
        let stretch = Stretch {
            start,
            scale: best_scale,
        };
        MappedGrid {
            stretch,
            step: (stretch.x_of(end) - start) / (points + 1) as f64,
            points,
        }
    }

    /// The same range with `factor` times the points.
    pub fn refined(&self, factor: f64) -> MappedGrid {
        let extent = self.step * (self.points + 1) as f64;
        let points = ((self.points + 1) as f64 * factor).ceil() as usize - 1;
        MappedGrid {
            step: extent / (points + 1) as f64,
            points,
            ..*self
        }
    }
}

/// Eigenpairs of one problem on one mapped grid.
pub struct DvrSolution {
    pub grid: MappedGrid,
    /// Ascending, hartree.
    pub energies: Vec<f64>,
    /// The rounding each energy may carry, hartree: the eigensolver is backward stable, its
    /// values exact for a matrix within about eps sqrt(N) ||H|| of H (a typical, not a worst,
    /// size), and ||H|| <= 3 max T_ii + max |V_ii| (the sinc kinetic matrix's largest
    /// eigenvalue is pi^2 / (2 mu h^2), three times its diagonal).
    pub rounding: f64,
    /// Column k holds chi of level k (sum_i chi_i^2 = 1); None when only energies were asked.
    vectors: Option<Mat<f64>>,
}

impl DvrSolution {
    /// Level k's wavefunction on the grid points, positive on its innermost lobe.
    pub fn wavefunction(&self, k: usize) -> Option<Wavefunction> {
        let vectors = self.vectors.as_ref()?;
        let grid = &self.grid;
        let mut psi: Vec<f64> = (0..grid.points)
            .map(|i| vectors[(i, k)] / (grid.slope(i) * grid.step).sqrt())
            .collect();
        let peak = psi.iter().fold(0.0f64, |m, p| m.max(p.abs()));
        if psi
            .iter()
            .find(|p| p.abs() > 1e-3 * peak)
            .is_some_and(|p| *p < 0.0)
        {
            psi.iter_mut().for_each(|p| *p = -*p);
        }
        Some(Wavefunction {
            v: k as u32,
            r: (0..grid.points).map(|i| grid.r(i)).collect(),
            psi,
            weights: (0..grid.points).map(|i| grid.weight(i)).collect(),
        })
    }

    /// <k| f(r) |k> = sum_i chi_i^2 f(r_i).
    fn expectation(&self, k: usize, f: impl Fn(f64) -> f64) -> f64 {
        let vectors = self.vectors.as_ref().expect("vectors were kept");
        (0..self.grid.points)
            .map(|i| vectors[(i, k)].powi(2) * f(self.grid.r(i)))
            .sum()
    }
}

/// Diagonalise `problem` on `grid`, with eigenvectors when `vectors`.
pub fn diagonalise(
    problem: &RadialProblem,
    grid: MappedGrid,
    vectors: bool,
) -> Result<DvrSolution, SolverError> {
    let n = grid.points;
    if n > MAX_DVR_POINTS {
        return Err(SolverError::DvrTooLarge {
            points: n,
            limit: MAX_DVR_POINTS,
        });
    }
    let mu = problem.reduced_mass;
    let kinetic = 1.0 / (2.0 * mu * grid.step * grid.step);
    let pi2_3 = std::f64::consts::PI.powi(2) / 3.0;
    let slopes: Vec<f64> = (0..n).map(|i| grid.slope(i)).collect();
    let schwarzian = grid.stretch.at(grid.stretch.start).2;
    let diagonal: Vec<f64> = (0..n)
        .map(|i| problem.effective(grid.r(i)) + schwarzian / (2.0 * mu * slopes[i] * slopes[i]))
        .collect();
    if let Some(i) = diagonal.iter().position(|v| !v.is_finite()) {
        return Err(SolverError::NotFinite { r: grid.r(i) });
    }
    let hamiltonian = Mat::from_fn(n, n, |i, j| {
        if i == j {
            kinetic * pi2_3 / (slopes[i] * slopes[i]) + diagonal[i]
        } else {
            let d = i as f64 - j as f64;
            let sign = if (i + j) % 2 == 0 { 1.0 } else { -1.0 };
            kinetic * sign * 2.0 / (d * d * slopes[i] * slopes[j])
        }
    });
    let largest_kinetic = (0..n)
        .map(|i| kinetic * pi2_3 / (slopes[i] * slopes[i]))
        .fold(0.0, f64::max);
    let largest_potential = diagonal.iter().fold(0.0f64, |m, v| m.max(v.abs()));
    let rounding = f64::EPSILON * (n as f64).sqrt() * (3.0 * largest_kinetic + largest_potential);
    let eigensolver = |e: faer::linalg::evd::EvdError| SolverError::Eigensolver(format!("{e:?}"));
    if vectors {
        let eigen = hamiltonian
            .self_adjoint_eigen(Side::Lower)
            .map_err(eigensolver)?;
        let values = eigen.S().column_vector();
        Ok(DvrSolution {
            grid,
            energies: (0..n).map(|i| values[i]).collect(),
            rounding,
            vectors: Some(eigen.U().to_owned()),
        })
    } else {
        let energies = hamiltonian
            .self_adjoint_eigenvalues(Side::Lower)
            .map_err(eigensolver)?;
        Ok(DvrSolution {
            grid,
            energies,
            rounding,
            vectors: None,
        })
    }
}

/// The automatic reference grid of `problem`: from where the wall has damped the highest level
/// sought by e^-30 to where a level bound by [`DVR_BOX_BINDING`] of the depth has (or the top
/// level's own tail, for a curve without a limit), at `points_per_wavelength` of
/// k(r) = sqrt(2 mu |E_top - V_eff(r)|) everywhere.
pub(super) fn automatic_grid(
    problem: &RadialProblem,
    facts: &WellFacts,
    cap: f64,
    points_per_wavelength: f64,
) -> MappedGrid {
    let (inner, _) = turning(problem, facts, facts.top, cap);
    let (start, _) = super::grid::inner_bound(problem, facts.top, inner, 1e-3, f64::INFINITY);
    let depth = facts.top - facts.floor;
    let probe = if facts.top_is_limit {
        facts.top - DVR_BOX_BINDING * depth
    } else {
        facts.top
    };
    let (_, outer) = turning(problem, facts, probe, cap);
    let end = super::grid::outer_bound(problem, probe, outer, cap);
    fitted_to(problem, facts.top, start, end, points_per_wavelength)
}

/// A mapped grid over [start, end] resolving `problem` up to `top`.
pub fn fitted_to(
    problem: &RadialProblem,
    top: f64,
    start: f64,
    end: f64,
    points_per_wavelength: f64,
) -> MappedGrid {
    let two_mu = 2.0 * problem.reduced_mass;
    let local_step = |r: f64| {
        let k = (two_mu * (top - problem.effective(r)).abs()).sqrt();
        2.0 * std::f64::consts::PI / (points_per_wavelength * k.max(1e-300))
    };
    MappedGrid::fitted(start, end, &local_step)
}

/// The reference energies of `problem` (ascending, hartree) with their rounding, on the
/// automatic grid with `density` times its points per wavelength and its box `box_factor`
/// times as long: for showing that the reference itself has converged (grid refined, box
/// lengthened).
pub fn reference_energies(
    problem: &RadialProblem,
    settings: &SolverSettings,
    density: f64,
    box_factor: f64,
) -> Result<DvrSolution, SolverError> {
    let facts = super::well_facts(problem, settings)?;
    let grid = automatic_grid(
        problem,
        &facts,
        settings.outer_cap,
        density * DVR_POINTS_PER_WAVELENGTH,
    );
    let end = grid.start() + box_factor * (grid.end() - grid.start());
    let grid = fitted_to(
        problem,
        facts.top,
        grid.start(),
        end,
        density * DVR_POINTS_PER_WAVELENGTH,
    );
    diagonalise(problem, grid, false)
}

pub(super) fn solve_dvr(
    problem: &RadialProblem,
    settings: &SolverSettings,
    facts: &WellFacts,
) -> Result<LevelSet, SolverError> {
    let cap = settings.outer_cap;
    let grid = match (settings.r_range, settings.step) {
        // A fixed step is kept everywhere (the map then stays uniform).
        (range, Some(step)) => {
            let (lo, hi) = range.unwrap_or_else(|| {
                let auto = automatic_grid(problem, facts, cap, DVR_POINTS_PER_WAVELENGTH);
                (auto.start(), auto.end())
            });
            MappedGrid::fitted(lo, hi, &|_| step)
        }
        (Some((lo, hi)), None) => fitted_to(problem, facts.top, lo, hi, DVR_POINTS_PER_WAVELENGTH),
        (None, None) => automatic_grid(problem, facts, cap, DVR_POINTS_PER_WAVELENGTH),
    };
    let first = diagonalise(problem, grid, false)?;
    let second = diagonalise(problem, grid.refined(1.25), true)?;
    let below_top = second.energies.iter().filter(|&&e| e < facts.top).count();
    let mut count = below_top;
    if let Some(v) = settings.highest_v {
        count = count.min(v as usize + 1);
    }
    if count == 0 {
        return Err(SolverError::NothingBound { j: problem.j });
    }
    let mut levels = Vec::with_capacity(count);
    let mut wavefunctions = Vec::new();
    for v in 0..count {
        let energy = second.energies[v];
        let error_estimate = (energy - first.energies[v]).abs();
        let mean_r = second.expectation(v, |r| r);
        let mean_inverse_r2 = second.expectation(v, |r| 1.0 / (r * r));
        let (inner, outer) = turning(problem, facts, energy, 10.0 * cap);
        levels.push(Level {
            v: v as u32,
            j: problem.j,
            energy,
            error_estimate: error_estimate + second.rounding,
            precision_floor: second.rounding,
            status: if error_estimate + second.rounding <= settings.tolerance {
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
            wavefunctions.push(second.wavefunction(v).expect("vectors were kept"));
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
            bound_levels: below_top,
            method: CountMethod::Box {
                outer: second.grid.end(),
            },
        },
        wavefunctions,
        tolerance: settings.tolerance,
    })
}
