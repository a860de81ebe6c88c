//! Helpers shared by the integration tests and the benches.
#![allow(dead_code)]

use rungs::curve::Morse;
use rungs::masses::Pair;
use rungs::units::{from_angstrom, from_wavenumber};

/// Reduced mass (m_e) of a neutral pair named by nuclide labels.
pub fn mu_of(first: &str, second: &str) -> f64 {
    Pair::neutral(first, second).unwrap().reduced_mass()
}

/// A Morse curve from handbook constants (omega_e, omega_e x_e in cm-1, r_e in angstrom) for a
/// pair, with its reduced mass.
pub fn handbook_morse(
    omega_e: f64,
    omega_e_x_e: f64,
    r_e: f64,
    first: &str,
    second: &str,
) -> (Morse, f64) {
    let mu = mu_of(first, second);
    let morse = Morse::from_spectroscopic(
        from_wavenumber(omega_e),
        from_wavenumber(omega_e_x_e),
        from_angstrom(r_e),
        mu,
    );
    (morse, mu)
}

/// HCl from Huber & Herzberg (1979) (tests/data/diatomic_constants.csv, row S2):
/// omega_e = 2990.9463, omega_e x_e = 52.8186 cm-1, r_e = 1.27455 angstrom.
pub fn hcl_morse() -> (Morse, f64) {
    handbook_morse(2990.9463, 52.8186, 1.27455, "1H", "35Cl")
}

/// H2-like Morse from Huber & Herzberg: omega_e = 4401.213, omega_e x_e = 121.336 cm-1,
/// r_e = 0.74144 angstrom (tests/data/diatomic_constants.csv): 18 levels.
pub fn h2_morse() -> (Morse, f64) {
    handbook_morse(4401.213, 121.336, 0.74144, "1H", "1H")
}

/// I2-like Morse from Huber & Herzberg: omega_e = 214.502, omega_e x_e = 0.6147 cm-1,
/// r_e = 2.6663 angstrom (tests/data/diatomic_constants.csv): 174 levels.
pub fn i2_morse() -> (Morse, f64) {
    handbook_morse(214.502, 0.6147, 2.6663, "127I", "127I")
}
