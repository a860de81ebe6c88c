//! What a curve and a pair of nuclei imply before any level is solved: the well, the harmonic
//! constants at its bottom, a WKB count of bound levels, and turning points.
//!
//! Formulas (atomic units, hbar = 1): omega_e = sqrt(k / mu) with k = V''(r_e);
//! B_e = 1 / (2 mu r_e^2); harmonic zero-point energy omega_e / 2; the WKB (Bohr-Sommerfeld)
//! vibrational index at energy E, v(E) + 1/2 = (1/pi) int sqrt(2 mu (E - V)) dr between the
//! turning points, whose value at the dissociation limit, v_D, gives floor(v_D) + 1 bound
//! levels (exact for the Morse curve). Knows nothing of solvers or reports.

use crate::curve::{find_well, turning_points_with, PotentialCurve, ShapeError, Well};
use crate::masses::Pair;

/// The facts `survey` reports. Energies hartree, lengths bohr, masses m_e.
#[derive(Debug, Clone, PartialEq)]
pub struct Survey {
    pub reduced_mass: f64,
    pub well: Well,
    pub limit: Option<f64>,
    /// D_e = limit - V(r_e).
    pub well_depth: Option<f64>,
    /// Harmonic energy omega_e = sqrt(k / mu).
    pub omega_e: f64,
    /// B_e = 1 / (2 mu r_e^2).
    pub rotational_constant: f64,
    pub harmonic_zero_point: f64,
    /// WKB v_D (the vibrational index at the limit, v_D + 1/2 = phase integral / pi).
    pub wkb_index_at_limit: Option<f64>,
    /// floor(v_D) + 1.
    pub wkb_level_count: Option<u32>,
    /// Turning points (inner, outer) at the requested energy above the minimum.
    pub turning_points: Option<(f64, Option<f64>, Option<f64>)>,
    pub homonuclear: bool,
}

/// (1/pi) int sqrt(2 mu (E - V)) dr over the allowed region, for E below the limit
/// (turning points r1 < r2) or at the limit (r2 = infinity, handled by r = r_e / u).
pub fn phase_integral_over_pi(
    curve: &dyn PotentialCurve,
    reduced_mass: f64,
    energy: f64,
    r1: f64,
    r2: Option<f64>,
    r_e: f64,
) -> f64 {
    let momentum = |r: f64| (2.0 * reduced_mass * (energy - curve.value(r)).max(0.0)).sqrt();
    // Midpoint rule in theta with r = a + (b - a)(1 - cos theta)/2: smooth at sqrt endpoints.
    let between = |a: f64, b: f64, panels: usize| {
        let dtheta = std::f64::consts::PI / panels as f64;
        (0..panels)
            .map(|i| {
                let theta = (i as f64 + 0.5) * dtheta;
                let r = a + 0.5 * (b - a) * (1.0 - theta.cos());
                momentum(r) * 0.5 * (b - a) * theta.sin() * dtheta
            })
            .sum::<f64>()
    };
    let integral = match r2 {
        Some(r2) => between(r1, r2, 20000),
        None => {
            // Inner half with the endpoint substitution (the integrand's sqrt is at r1 only,
            // so use the half-range map), outer part with u = r_e / r on (0, 1].
            let inner = {
                let panels = 20000;
                let dtheta = 0.5 * std::f64::consts::PI / panels as f64;
                (0..panels)
                    .map(|i| {
                        let theta = (i as f64 + 0.5) * dtheta;
                        let r = r1 + (r_e - r1) * (1.0 - theta.cos());
                        momentum(r) * (r_e - r1) * theta.sin() * dtheta
                    })
                    .sum::<f64>()
            };
            let panels = 200000;
            let du = 1.0 / panels as f64;
            let outer: f64 = (0..panels)
                .map(|i| {
                    let u = (i as f64 + 0.5) * du;
                    momentum(r_e / u) * r_e / (u * u) * du
                })
                .sum();
            inner + outer
        }
    };
    integral / std::f64::consts::PI
}

/// Survey a curve for a pair; `energy_above_minimum` asks for turning points there.
pub fn survey(
    curve: &dyn PotentialCurve,
    pair: &Pair,
    energy_above_minimum: Option<f64>,
) -> Result<Survey, ShapeError> {
    let mu = pair.reduced_mass();
    let well = find_well(curve)?;
    let limit = curve.limit();
    let omega_e = (well.force_constant / mu).sqrt();
    let potential = |r: f64| curve.value(r);
    let far = 1e4 * well.r_min;
    let wkb_index_at_limit = limit.map(|l| {
        let (inner, _) = turning_points_with(&potential, well.r_min, l, 1e-6 * well.r_min, far);
        phase_integral_over_pi(
            curve,
            mu,
            l,
            inner.unwrap_or(1e-6 * well.r_min),
            None,
            well.r_min,
        ) - 0.5
    });
    let turning_points = energy_above_minimum.map(|e| {
        let (inner, outer) = turning_points_with(
            &potential,
            well.r_min,
            well.v_min + e,
            1e-6 * well.r_min,
            far,
        );
        (e, inner, outer)
    });
    Ok(Survey {
        reduced_mass: mu,
        well,
        limit,
        well_depth: limit.map(|l| l - well.v_min),
        omega_e,
        rotational_constant: 1.0 / (2.0 * mu * well.r_min * well.r_min),
        harmonic_zero_point: 0.5 * omega_e,
        wkb_index_at_limit,
        wkb_level_count: wkb_index_at_limit.map(|v| if v < 0.0 { 0 } else { v.floor() as u32 + 1 }),
        turning_points,
        homonuclear: pair.is_homonuclear(),
    })
}
