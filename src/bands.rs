//! Vibrational bands between the levels of two curves (an electronic transition) or within one
//! curve (infrared): overlaps and Franck-Condon factors, r-centroids, band origins, transition
//! moments, Einstein A coefficients, oscillator strengths and radiative lifetimes.
//!
//! All integrals are sums over the shared sinc-DVR grid of
//! [`crate::solver::solve_on_shared_grid`] with its quadrature weights w_i (exact for the DVR
//! basis; [`crate::solver::Wavefunction::overlap_with`]):
//!
//! ```text
//!   <v'|v''>        = sum_i w_i psi'_i psi''_i              q(v', v'') = <v'|v''>^2
//!   r-centroid      = <v'|r|v''> / <v'|v''>
//!   M(v', v'')      = <v'|mu(r)|v''>
//!   A(v' -> v'')    = 4 omega^3 |M|^2 / (3 c^3)             (atomic units; omega = E' - E'')
//!   f(v'' -> v')    = (2/3) omega |M|^2                     (absorption, atomic units)
//!   tau(v')         = 1 / sum_v'' A(v' -> v'')
//! ```
//!
//! The A coefficient is the usual spontaneous-emission rate of a two-level system
//! (A = omega^3 |M|^2 / (3 pi eps_0 hbar c^3) in SI; for example A. Thorne, *Spectrophysics*,
//! or P.F. Bernath, *Spectra of Atoms and Molecules*, ch. 5; recalled from memory), which in
//! customary units is A = 3.136189e-7 nu^3 |M|^2 s^-1 with nu in cm-1 and M in debye; the tests
//! check that number. These are rotationless (J' = J'' = 0 wavefunctions) band values; line
//! values follow with Hoenl-London factors (see [`crate::spectrum`]). Energies in hartree.

use crate::curve::DipoleFunction;
use crate::solver::SharedLevels;
use crate::units::codata;

/// One band v' - v''.
#[derive(Debug, Clone, PartialEq)]
pub struct Band {
    pub v_upper: u32,
    pub v_lower: u32,
    /// <v'|v''>, with the sign convention of the wavefunctions (positive innermost lobe).
    pub overlap: f64,
    /// q(v', v'') = <v'|v''>^2.
    pub franck_condon: f64,
    /// <v'|r|v''> / <v'|v''>, bohr; None where the overlap nearly vanishes (|<v'|v''>| below
    /// 1e-8), as the ratio is then meaningless.
    pub r_centroid: Option<f64>,
    /// E(v') + offset - E(v''), hartree.
    pub origin: f64,
    /// <v'|mu|v''>, e a_0, when a dipole function was given.
    pub moment: Option<f64>,
    /// A(v' -> v''), s^-1, when a dipole function was given and the origin is positive.
    pub einstein_a: Option<f64>,
    /// f(v'' -> v'), absorption oscillator strength, with the same conditions.
    pub oscillator_strength: Option<f64>,
}

/// Bands between two sets of levels, with the sums a user needs to judge them.
#[derive(Debug, Clone, PartialEq)]
pub struct BandSet {
    pub bands: Vec<Band>,
    /// For each v'': sum over the v' computed of q(v', v'') (1 when every upper level that
    /// overlaps is bound and computed; the rest lies in the upper continuum).
    pub lower_sums: Vec<(u32, f64)>,
    /// For each v': sum over the v'' computed of q(v', v'').
    pub upper_sums: Vec<(u32, f64)>,
    /// For each v' with at least one band of positive origin: tau = 1 / sum A, seconds, over
    /// the lower levels computed.
    pub lifetimes: Vec<(u32, f64)>,
}

/// A(v' -> v'') in s^-1 for a transition energy `omega` (hartree) and moment `moment` (e a_0).
pub fn einstein_a(omega: f64, moment: f64) -> f64 {
    let c = 1.0 / codata::FINE_STRUCTURE;
    4.0 * omega.powi(3) * moment * moment / (3.0 * c.powi(3)) / codata::TIME_AU
}

/// Bands between `upper` and `lower` (the same set for bands within one curve, where only
/// v' > v'' is kept), the upper energies shifted by `offset` (hartree).
pub fn bands(
    upper: &SharedLevels,
    lower: &SharedLevels,
    offset: f64,
    dipole: Option<&DipoleFunction>,
    within_one_curve: bool,
) -> BandSet {
    let mut bands = Vec::new();
    for (up_level, up) in upper.levels.levels.iter().zip(&upper.wavefunctions) {
        for (low_level, low) in lower.levels.levels.iter().zip(&lower.wavefunctions) {
            if within_one_curve && up_level.v <= low_level.v {
                continue;
            }
            let integral = |f: &dyn Fn(f64) -> f64| -> f64 { up.overlap_with(low, f) };
            let overlap = integral(&|_| 1.0);
            let r_centroid = (overlap.abs() > 1e-8).then(|| integral(&|r| r) / overlap);
            let origin = up_level.energy + offset - low_level.energy;
            let moment = dipole.map(|mu| integral(&|r| mu.value(r)));
            let emitting = moment.filter(|_| origin > 0.0);
            bands.push(Band {
                v_upper: up_level.v,
                v_lower: low_level.v,
                overlap,
                franck_condon: overlap * overlap,
                r_centroid,
                origin,
                moment,
                einstein_a: emitting.map(|m| einstein_a(origin, m)),
                oscillator_strength: emitting.map(|m| 2.0 / 3.0 * origin * m * m),
            });
        }
    }
    let sum_over = |key: &dyn Fn(&Band) -> u32, levels: &SharedLevels| -> Vec<(u32, f64)> {
        levels
            .levels
            .levels
            .iter()
            .map(|l| {
                let total = bands
                    .iter()
                    .filter(|b| key(b) == l.v)
                    .map(|b| b.franck_condon)
                    .sum();
                (l.v, total)
            })
            .collect()
    };
    let lower_sums = sum_over(&|b| b.v_lower, lower);
    let upper_sums = sum_over(&|b| b.v_upper, upper);
    let lifetimes = upper
        .levels
        .levels
        .iter()
        .filter_map(|l| {
            let total: f64 = bands
                .iter()
                .filter(|b| b.v_upper == l.v)
                .filter_map(|b| b.einstein_a)
                .sum();
            (total > 0.0).then(|| (l.v, 1.0 / total))
        })
        .collect();
    BandSet {
        bands,
        lower_sums,
        upper_sums,
        lifetimes,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::{from_wavenumber, parse_unit, Dimension};

    #[test]
    fn einstein_a_in_customary_units() {
        // A = 3.136189e-7 nu^3 |M|^2 s^-1 (nu in cm-1, M in debye): the customary form of the
        // two-level emission rate (recalled from memory; 64 pi^4 / (3 h) in CGS units).
        let debye = parse_unit("debye", Dimension::DipoleMoment).unwrap();
        let a = einstein_a(from_wavenumber(1000.0), debye.to_atomic(1.0));
        assert!((a / (3.136189e-7 * 1e9) - 1.0).abs() < 1e-6, "{a}");
    }
}
