//! Figures from results: the choices of what to draw and where (ranges, scaling), in display
//! units.

use super::{
    CurveFigure, DrawnLevel, FigureError, FranckCondonFigure, NearLimitFigure, ResidualFigure,
    ResidualPoint, SpectrumFigure,
};
use crate::bands::BandSet;
use crate::compare::Comparison;
use crate::curve::PotentialCurve;
use crate::dissociation::LeRoyBernstein;
use crate::report::tables::DisplayUnits;
use crate::solver::LevelSet;
use crate::spectrum::Line;

/// About this many levels are drawn when the user names none.
const DEFAULT_LEVELS_DRAWN: f64 = 12.0;

/// The v drawn by default: from v = 0 up, each level at least 1/12 of the energy span above
/// the last one drawn, so the crowded levels near the limit do not squeeze the wavefunctions.
fn default_choice(set: &LevelSet) -> Vec<u32> {
    let (Some(first), Some(last)) = (set.levels.first(), set.levels.last()) else {
        return Vec::new();
    };
    let gap = (last.energy - first.energy) / DEFAULT_LEVELS_DRAWN;
    let mut chosen = vec![first.v];
    let mut previous = first.energy;
    for level in &set.levels[1..] {
        if level.energy - previous >= 0.999 * gap {
            chosen.push(level.v);
            previous = level.energy;
        }
    }
    chosen
}

/// The curve with levels and wavefunctions (or densities with `density`). `set` must hold the
/// wavefunctions of the chosen levels (solve with wavefunctions kept); `chosen` None draws a
/// default selection.
pub fn curve_figure(
    curve: &dyn PotentialCurve,
    set: &LevelSet,
    units: DisplayUnits,
    chosen: Option<&[u32]>,
    density: bool,
) -> Result<CurveFigure, FigureError> {
    let chosen: Vec<u32> = match chosen {
        Some(vs) => vs.to_vec(),
        None => default_choice(set),
    };
    let energy = |hartree: f64| units.energy.from_atomic(hartree - set.curve_minimum);
    let length = |bohr: f64| units.length.from_atomic(bohr);
    let drawn: Vec<_> = set
        .levels
        .iter()
        .filter(|l| chosen.contains(&l.v))
        .collect();
    if drawn.is_empty() {
        return Err(FigureError::Empty(format!(
            "none of the levels v = {chosen:?} is bound (v = 0..{} are)",
            set.levels.len().saturating_sub(1)
        )));
    }
    // Each wavefunction swings through 0.4 of the smaller gap to its drawn neighbours.
    let gaps: Vec<f64> = drawn
        .windows(2)
        .map(|w| energy(w[1].energy) - energy(w[0].energy))
        .collect();
    let amplitude_of = |k: usize| {
        let below = if k > 0 { gaps[k - 1] } else { f64::INFINITY };
        let above = gaps.get(k).copied().unwrap_or(f64::INFINITY);
        let gap = below.min(above);
        0.4 * if gap.is_finite() {
            gap
        } else {
            energy(drawn[0].energy)
        }
    };
    let amplitude = amplitude_of(drawn.len() - 1);
    let top_level = drawn.last().expect("not empty");
    let inner = drawn
        .iter()
        .map(|l| l.inner_turning_point)
        .fold(f64::INFINITY, f64::min);
    let well_width = top_level.outer_turning_point - inner;
    let r_floor = crate::curve::find_well(curve).map_or(inner, |w| w.r_min);
    // Levels near the limit reach far out; keep the well in view.
    let outer = top_level
        .outer_turning_point
        .min(r_floor + 4.0 * (r_floor - inner).max(0.1 * well_width));
    let x_range = (
        length(inner - 0.12 * (outer - inner)),
        length(outer + 0.12 * (outer - inner)),
    );
    let limit = set.limit.map(energy);
    let top = energy(top_level.energy) + amplitude;
    let top = match limit {
        Some(l) if l < 1.3 * top => top.max(l),
        _ => top,
    };
    let y_range = (-0.04 * top, 1.12 * top);
    let samples = 800;
    let curve_points = (0..=samples)
        .map(|k| {
            let r = inner - 0.12 * (outer - inner)
                + (outer - inner) * 1.24 * f64::from(k) / f64::from(samples);
            (length(r), energy(curve.value(r)))
        })
        .collect();
    let levels = drawn
        .iter()
        .enumerate()
        .map(|(k, level)| {
            let amplitude = amplitude_of(k);
            let wavefunction = set
                .wavefunctions
                .iter()
                .find(|w| w.v == level.v)
                .map(|w| {
                    let value = |p: f64| if density { p * p } else { p };
                    let peak = w.psi.iter().map(|&p| value(p).abs()).fold(0.0, f64::max);
                    w.r.iter()
                        .zip(&w.psi)
                        .filter(|(_, &p)| p.abs() > 1e-4 * peak.sqrt().max(peak))
                        .map(|(&r, &p)| {
                            (
                                length(r),
                                energy(level.energy) + amplitude * value(p) / peak,
                            )
                        })
                        .collect()
                })
                .unwrap_or_default();
            DrawnLevel {
                v: level.v,
                energy: energy(level.energy),
                inner: length(level.inner_turning_point),
                outer: length(level.outer_turning_point),
                wavefunction,
            }
        })
        .collect();
    Ok(CurveFigure {
        curve: curve_points,
        levels,
        limit,
        x_range,
        y_range,
        x_label: format!("r / {}", units.length.name),
        y_label: format!("energy above the minimum / {}", units.energy.name),
    })
}

/// The Franck-Condon map of a band set.
pub fn franck_condon_figure(set: &BandSet, show_values: bool) -> FranckCondonFigure {
    let upper: Vec<u32> = set.upper_sums.iter().map(|s| s.0).collect();
    let lower: Vec<u32> = set.lower_sums.iter().map(|s| s.0).collect();
    let values = upper
        .iter()
        .map(|&u| {
            lower
                .iter()
                .map(|&l| {
                    set.bands
                        .iter()
                        .find(|b| b.v_upper == u && b.v_lower == l)
                        .map_or(0.0, |b| b.franck_condon)
                })
                .collect()
        })
        .collect();
    FranckCondonFigure {
        upper,
        lower,
        values,
        show_values,
    }
}

/// obs - calc against v (and J), coloured by isotopologue tag, with the measured
/// uncertainties as error bars.
pub fn residual_figure(comparison: &Comparison, units: DisplayUnits) -> ResidualFigure {
    let e = |x: f64| units.energy.from_atomic(x);
    ResidualFigure {
        points: comparison
            .residuals
            .iter()
            .map(|r| ResidualPoint {
                v: r.measured.v,
                j: r.measured.j,
                residual: e(r.obs_minus_calc),
                uncertainty: e(r.measured.uncertainty),
                group: r.measured.tag.clone().unwrap_or_else(|| "measured".into()),
            })
            .collect(),
        y_label: format!("obs - calc / {}", units.energy.name),
    }
}

/// The LeRoy-Bernstein and Birge-Sponer views: `used` are the (v, E) levels fitted, `levels`
/// every (v, E) level known (for the spacings), hartree.
pub fn near_limit_figure(
    fit: &LeRoyBernstein,
    used: &[(u32, f64)],
    levels: &[(u32, f64)],
    reduced_mass: f64,
    units: DisplayUnits,
) -> NearLimitFigure {
    let n = fit.power;
    let exponent = (n - 2.0) / (2.0 * n);
    let size = units.energy.in_atomic_units;
    let transform = |binding: f64| (binding / size).max(0.0).powf(exponent);
    let slope =
        crate::dissociation::h_n(n, fit.dispersion_coefficient, reduced_mass) / size.powf(exponent);
    let mut sorted = levels.to_vec();
    sorted.sort_by_key(|l| l.0);
    let spacings = sorted
        .windows(2)
        .filter(|w| w[1].0 == w[0].0 + 1)
        .map(|w| {
            (
                f64::from(w[0].0) + 0.5,
                units.energy.from_atomic(w[1].1 - w[0].1),
            )
        })
        .collect();
    NearLimitFigure {
        transformed: used
            .iter()
            .map(|&(v, e)| (f64::from(v), transform(fit.limit - e)))
            .collect(),
        line: (fit.v_at_limit, slope),
        transformed_label: format!(
            "(D - E)^{exponent:.3} / {}^{exponent:.3}",
            units.energy.name
        ),
        spacings,
        spacing_label: format!("Delta G / {}", units.energy.name),
    }
}

/// Sticks and the broadened profile (axis in hartree).
pub fn spectrum_figure(
    lines: &[Line],
    profile: Option<(&[f64], &[f64])>,
    units: DisplayUnits,
) -> SpectrumFigure {
    let e = |x: f64| units.energy.from_atomic(x);
    SpectrumFigure {
        sticks: lines.iter().map(|l| (e(l.position), l.intensity)).collect(),
        profile: profile
            .map(|(axis, values)| axis.iter().zip(values).map(|(&x, &y)| (e(x), y)).collect())
            .unwrap_or_default(),
        x_label: format!("transition energy / {}", units.energy.name),
    }
}
