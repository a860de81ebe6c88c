//! Analytic curve models. Parameters are stored in atomic units (hartree, bohr, m_e).

use super::adjust::check_values;
use super::{CurveParameter, ParameterError, PotentialCurve};
use crate::units::{to_angstrom, to_wavenumber, Dimension};
use std::sync::Arc;

fn parameter(name: &'static str, value: f64, dimension: Dimension) -> CurveParameter {
    CurveParameter {
        name,
        value,
        dimension: Some(dimension),
    }
}

/// Harmonic oscillator V(r) = (k/2)(r - r_e)^2 (zero at the minimum, no dissociation limit).
///
/// k in hartree/bohr^2, r_e in bohr. From a harmonic wavenumber: k = mu omega^2 with
/// omega = 2 pi c omega_e (in atomic units hbar omega is the energy omega_e, so k = mu omega_e^2).
///
/// ```
/// use rungs::curve::{Harmonic, PotentialCurve};
/// let oscillator = Harmonic::new(0.5, 2.0);
/// assert_eq!(oscillator.value(3.0), 0.25);
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Harmonic {
    pub force_constant: f64,
    pub r_e: f64,
}

impl Harmonic {
    pub fn new(force_constant: f64, r_e: f64) -> Harmonic {
        Harmonic {
            force_constant,
            r_e,
        }
    }

    /// From the harmonic vibrational energy hbar omega (hartree) and the reduced mass (m_e):
    /// k = mu omega^2 (atomic units, hbar = 1).
    pub fn from_vibrational_energy(omega: f64, r_e: f64, reduced_mass: f64) -> Harmonic {
        Harmonic::new(reduced_mass * omega * omega, r_e)
    }
}

impl PotentialCurve for Harmonic {
    fn value(&self, r: f64) -> f64 {
        0.5 * self.force_constant * (r - self.r_e).powi(2)
    }
    fn derivative(&self, r: f64) -> f64 {
        self.force_constant * (r - self.r_e)
    }
    fn second_derivative(&self, _r: f64) -> f64 {
        self.force_constant
    }
    fn limit(&self) -> Option<f64> {
        None
    }
    fn well_range(&self) -> (f64, f64) {
        (0.3 * self.r_e, 2.0 * self.r_e)
    }
    fn describe(&self) -> String {
        format!(
            "harmonic: k = {:.6} hartree/bohr^2, r_e = {:.6} angstrom",
            self.force_constant,
            to_angstrom(self.r_e)
        )
    }
    fn model_name(&self) -> &'static str {
        "harmonic"
    }
    fn parameters(&self) -> Vec<CurveParameter> {
        vec![
            parameter(
                "force_constant",
                self.force_constant,
                Dimension::ForceConstant,
            ),
            parameter("r_e", self.r_e, Dimension::Length),
        ]
    }
    fn with_parameters(&self, values: &[f64]) -> Result<Arc<dyn PotentialCurve>, ParameterError> {
        check_values(&HARMONIC_NAMES, values, &HARMONIC_NAMES)?;
        Ok(Arc::new(Harmonic::new(values[0], values[1])))
    }
    /// dV/dk = (r - r_e)^2 / 2; dV/dr_e = -k (r - r_e).
    fn parameter_derivative(&self, index: usize, r: f64) -> f64 {
        match index {
            0 => 0.5 * (r - self.r_e).powi(2),
            1 => -self.force_constant * (r - self.r_e),
            _ => f64::NAN,
        }
    }
}

const HARMONIC_NAMES: [&str; 2] = ["force_constant", "r_e"];
const MORSE_NAMES: [&str; 3] = ["well_depth", "width", "r_e"];
const LENNARD_JONES_NAMES: [&str; 2] = ["well_depth", "r_e"];

/// Morse curve V(r) = D_e [1 - exp(-a (r - r_e))]^2 (P.M. Morse, Phys. Rev. 34, 57 (1929)),
/// zero at the minimum, dissociation limit D_e.
///
/// D_e in hartree, a in 1/bohr, r_e in bohr. Its exact levels on the whole line are
/// E_v = omega_e (v+1/2) - omega_e x_e (v+1/2)^2 with omega_e = a sqrt(2 D_e / mu) and
/// omega_e x_e = omega_e^2 / (4 D_e) (energies in hartree, hbar = 1).
///
/// ```
/// use rungs::curve::{Morse, PotentialCurve};
/// let morse = Morse::new(0.17, 1.0, 1.4);
/// assert!((morse.value(1.4)).abs() < 1e-15);
/// assert_eq!(morse.limit(), Some(0.17));
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Morse {
    pub well_depth: f64,
    pub width: f64,
    pub r_e: f64,
}

impl Morse {
    pub fn new(well_depth: f64, width: f64, r_e: f64) -> Morse {
        Morse {
            well_depth,
            width,
            r_e,
        }
    }

    /// From omega_e and omega_e x_e (both hartree): D_e = omega_e^2 / (4 omega_e x_e),
    /// a = omega_e sqrt(mu / (2 D_e)).
    pub fn from_spectroscopic(
        omega_e: f64,
        omega_e_x_e: f64,
        r_e: f64,
        reduced_mass: f64,
    ) -> Morse {
        let well_depth = omega_e * omega_e / (4.0 * omega_e_x_e);
        Morse::from_depth_and_omega(well_depth, omega_e, r_e, reduced_mass)
    }

    /// From D_e and omega_e (both hartree): a = omega_e sqrt(mu / (2 D_e)).
    pub fn from_depth_and_omega(
        well_depth: f64,
        omega_e: f64,
        r_e: f64,
        reduced_mass: f64,
    ) -> Morse {
        let width = omega_e * (reduced_mass / (2.0 * well_depth)).sqrt();
        Morse::new(well_depth, width, r_e)
    }

    /// Harmonic energy omega_e = a sqrt(2 D_e / mu), hartree.
    pub fn omega_e(&self, reduced_mass: f64) -> f64 {
        self.width * (2.0 * self.well_depth / reduced_mass).sqrt()
    }

    /// Anharmonicity omega_e x_e = omega_e^2 / (4 D_e), hartree.
    pub fn omega_e_x_e(&self, reduced_mass: f64) -> f64 {
        self.omega_e(reduced_mass).powi(2) / (4.0 * self.well_depth)
    }

    /// lambda = sqrt(2 mu D_e) / a; the bound levels are v = 0 .. floor(lambda - 1/2).
    pub fn lambda(&self, reduced_mass: f64) -> f64 {
        (2.0 * reduced_mass * self.well_depth).sqrt() / self.width
    }

    /// Exact level v on the whole line, hartree above the minimum (Morse 1929).
    pub fn exact_level(&self, v: u32, reduced_mass: f64) -> f64 {
        let x = f64::from(v) + 0.5;
        self.omega_e(reduced_mass) * x - self.omega_e_x_e(reduced_mass) * x * x
    }

    /// Exact number of bound levels, floor(lambda - 1/2) + 1 (Morse 1929).
    pub fn exact_level_count(&self, reduced_mass: f64) -> u32 {
        (self.lambda(reduced_mass) - 0.5).floor() as u32 + 1
    }
}

impl PotentialCurve for Morse {
    fn value(&self, r: f64) -> f64 {
        let x = (-self.width * (r - self.r_e)).exp();
        self.well_depth * (1.0 - x).powi(2)
    }
    fn derivative(&self, r: f64) -> f64 {
        let x = (-self.width * (r - self.r_e)).exp();
        2.0 * self.width * self.well_depth * x * (1.0 - x)
    }
    fn second_derivative(&self, r: f64) -> f64 {
        let x = (-self.width * (r - self.r_e)).exp();
        2.0 * self.width * self.width * self.well_depth * x * (2.0 * x - 1.0)
    }
    fn limit(&self) -> Option<f64> {
        Some(self.well_depth)
    }
    fn well_range(&self) -> (f64, f64) {
        (
            (self.r_e - 2.0 / self.width).max(0.2 * self.r_e),
            self.r_e + 4.0 / self.width,
        )
    }
    fn describe(&self) -> String {
        format!(
            "Morse: D_e = {:.6} cm-1, a = {:.6} 1/angstrom, r_e = {:.6} angstrom",
            to_wavenumber(self.well_depth),
            1.0 / to_angstrom(1.0 / self.width),
            to_angstrom(self.r_e)
        )
    }
    fn model_name(&self) -> &'static str {
        "morse"
    }
    fn parameters(&self) -> Vec<CurveParameter> {
        vec![
            parameter("well_depth", self.well_depth, Dimension::Energy),
            parameter("width", self.width, Dimension::InverseLength),
            parameter("r_e", self.r_e, Dimension::Length),
        ]
    }
    fn with_parameters(&self, values: &[f64]) -> Result<Arc<dyn PotentialCurve>, ParameterError> {
        check_values(&MORSE_NAMES, values, &MORSE_NAMES)?;
        Ok(Arc::new(Morse::new(values[0], values[1], values[2])))
    }
    /// With x = exp(-a (r - r_e)): dV/dD_e = (1 - x)^2, dV/da = 2 D_e (r - r_e) x (1 - x),
    /// dV/dr_e = -2 a D_e x (1 - x).
    fn parameter_derivative(&self, index: usize, r: f64) -> f64 {
        let x = (-self.width * (r - self.r_e)).exp();
        match index {
            0 => (1.0 - x).powi(2),
            1 => 2.0 * self.well_depth * (r - self.r_e) * x * (1.0 - x),
            2 => -2.0 * self.width * self.well_depth * x * (1.0 - x),
            _ => f64::NAN,
        }
    }
}

/// Lennard-Jones (n, m) curve with well depth epsilon at r_e, dissociation limit 0:
/// V(r) = epsilon / (n - m) [ m (r_e/r)^n - n (r_e/r)^m ],  n > m
/// (J.E. Lennard-Jones, Proc. R. Soc. Lond. A 106, 463 (1924); the 12-6 form is n = 12, m = 6).
/// The zero crossing sigma satisfies r_e = sigma (n/m)^(1/(n-m)); the tail is
/// -C_m / r^m with C_m = epsilon n r_e^m / (n - m).
///
/// ```
/// use rungs::curve::{LennardJones, PotentialCurve};
/// let lj = LennardJones::from_sigma(1.0e-3, 6.0, 12.0, 6.0);
/// assert!(lj.value(6.0).abs() < 1e-18); // V(sigma) = 0
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LennardJones {
    pub well_depth: f64,
    pub r_e: f64,
    pub repulsive_power: f64,
    pub attractive_power: f64,
}

impl LennardJones {
    pub fn new(well_depth: f64, r_e: f64, repulsive_power: f64, attractive_power: f64) -> Self {
        LennardJones {
            well_depth,
            r_e,
            repulsive_power,
            attractive_power,
        }
    }

    /// From the zero crossing sigma: r_e = sigma (n/m)^(1/(n-m)).
    pub fn from_sigma(well_depth: f64, sigma: f64, n: f64, m: f64) -> Self {
        LennardJones::new(well_depth, sigma * (n / m).powf(1.0 / (n - m)), n, m)
    }

    /// Long-range coefficient C_m = epsilon n r_e^m / (n - m), hartree bohr^m.
    pub fn dispersion_coefficient(&self) -> f64 {
        let (n, m) = (self.repulsive_power, self.attractive_power);
        self.well_depth * n * self.r_e.powf(m) / (n - m)
    }
}

impl PotentialCurve for LennardJones {
    fn value(&self, r: f64) -> f64 {
        let (n, m) = (self.repulsive_power, self.attractive_power);
        let s = self.r_e / r;
        self.well_depth / (n - m) * (m * s.powf(n) - n * s.powf(m))
    }
    fn derivative(&self, r: f64) -> f64 {
        let (n, m) = (self.repulsive_power, self.attractive_power);
        let s = self.r_e / r;
        self.well_depth * n * m / ((n - m) * r) * (s.powf(m) - s.powf(n))
    }
    fn second_derivative(&self, r: f64) -> f64 {
        let (n, m) = (self.repulsive_power, self.attractive_power);
        let s = self.r_e / r;
        self.well_depth * n * m / ((n - m) * r * r)
            * ((n + 1.0) * s.powf(n) - (m + 1.0) * s.powf(m))
    }
    fn limit(&self) -> Option<f64> {
        Some(0.0)
    }
    fn well_range(&self) -> (f64, f64) {
        (0.7 * self.r_e, 2.0 * self.r_e)
    }
    fn long_range_power(&self) -> Option<f64> {
        Some(self.attractive_power)
    }
    fn describe(&self) -> String {
        format!(
            "Lennard-Jones ({}, {}): epsilon = {:.6} cm-1, r_e = {:.6} angstrom",
            self.repulsive_power,
            self.attractive_power,
            to_wavenumber(self.well_depth),
            to_angstrom(self.r_e)
        )
    }
    fn model_name(&self) -> &'static str {
        "lennard-jones"
    }
    fn parameters(&self) -> Vec<CurveParameter> {
        vec![
            parameter("well_depth", self.well_depth, Dimension::Energy),
            parameter("r_e", self.r_e, Dimension::Length),
        ]
    }
    fn with_parameters(&self, values: &[f64]) -> Result<Arc<dyn PotentialCurve>, ParameterError> {
        check_values(&LENNARD_JONES_NAMES, values, &LENNARD_JONES_NAMES)?;
        Ok(Arc::new(LennardJones::new(
            values[0],
            values[1],
            self.repulsive_power,
            self.attractive_power,
        )))
    }
    /// dV/depsilon = V/epsilon; with s = r_e/r, dV/dr_e = epsilon n m (s^n - s^m) / ((n - m) r_e).
    fn parameter_derivative(&self, index: usize, r: f64) -> f64 {
        let (n, m) = (self.repulsive_power, self.attractive_power);
        let s = self.r_e / r;
        match index {
            0 => self.value(r) / self.well_depth,
            1 => self.well_depth * n * m * (s.powf(n) - s.powf(m)) / ((n - m) * self.r_e),
            _ => f64::NAN,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Central differences of the value, a check on the hand-derived derivatives.
    fn check_derivatives(curve: &dyn PotentialCurve, r: f64) {
        let h = 1e-4 * r;
        let d1 = (curve.value(r + h) - curve.value(r - h)) / (2.0 * h);
        let d2 = (curve.value(r + h) - 2.0 * curve.value(r) + curve.value(r - h)) / (h * h);
        let scale = curve.derivative(r).abs() + curve.second_derivative(r).abs() + 1e-12;
        assert!(
            (d1 - curve.derivative(r)).abs() < 1e-6 * scale,
            "{curve:?} at {r}"
        );
        assert!(
            (d2 - curve.second_derivative(r)).abs() < 1e-4 * scale,
            "{curve:?} at {r}"
        );
    }

    #[test]
    fn derivatives_agree_with_differences() {
        let curves: Vec<Box<dyn PotentialCurve>> = vec![
            Box::new(Harmonic::new(0.3, 2.0)),
            Box::new(Morse::new(0.1, 1.1, 2.4)),
            Box::new(LennardJones::new(1e-3, 7.0, 12.0, 6.0)),
            Box::new(LennardJones::new(1e-3, 7.0, 9.0, 4.0)),
        ];
        for curve in &curves {
            for r in [1.5, 2.4, 3.3, 6.5, 9.0] {
                check_derivatives(curve.as_ref(), r);
            }
        }
    }

    #[test]
    fn lennard_jones_minimum_and_tail() {
        let lj = LennardJones::new(2e-3, 7.0, 12.0, 6.0);
        assert!((lj.value(7.0) + 2e-3).abs() < 1e-18);
        assert!(lj.derivative(7.0).abs() < 1e-18);
        // 12-6: C6 = 2 epsilon r_e^6 (common practice)
        assert!((lj.dispersion_coefficient() - 2.0 * 2e-3 * 7f64.powi(6)).abs() < 1e-9);
    }
}
