//! Physical constants and unit conversion at the edges of the program.
//!
//! **Internal unit system: Hartree atomic units.** Energies are in hartree (E_h), lengths in
//! bohr (a_0), masses in electron masses (m_e), so that hbar = m_e = e = 1. Every number inside
//! the library is in these units; text with a unit ("2990.9 cm-1", "1.27 angstrom") is turned
//! into atomic units here, once, when it is read, and back into the user's unit when printed.
//!
//! Constants are the CODATA 2018 recommended values as carried by the `physical_constants`
//! crate (generated from the NIST table of CODATA 2018; Tiesinga et al., Rev. Mod. Phys. 93,
//! 025010 (2021)). This module knows nothing of curves, solvers or reports.

use std::fmt;
use thiserror::Error;

/// CODATA 2018 values used by the project (SI unless stated).
pub mod codata {
    /// Speed of light in vacuum, m s^-1 (exact).
    pub const SPEED_OF_LIGHT: f64 = physical_constants::SPEED_OF_LIGHT_IN_VACUUM;
    /// Planck constant, J s (exact).
    pub const PLANCK: f64 = physical_constants::PLANCK_CONSTANT;
    /// Boltzmann constant, J K^-1 (exact).
    pub const BOLTZMANN: f64 = physical_constants::BOLTZMANN_CONSTANT;
    /// Avogadro constant, mol^-1 (exact).
    pub const AVOGADRO: f64 = physical_constants::AVOGADRO_CONSTANT;
    /// Elementary charge, C (exact).
    pub const ELEMENTARY_CHARGE: f64 = physical_constants::ELEMENTARY_CHARGE;
    /// Hartree energy, J.
    pub const HARTREE: f64 = physical_constants::HARTREE_ENERGY;
    /// Hartree energy as a wavenumber, m^-1.
    pub const HARTREE_PER_METRE: f64 = physical_constants::HARTREE_INVERSE_METER_RELATIONSHIP;
    /// Hartree energy as a frequency, Hz.
    pub const HARTREE_HERTZ: f64 = physical_constants::HARTREE_HERTZ_RELATIONSHIP;
    /// Bohr radius, m.
    pub const BOHR: f64 = physical_constants::BOHR_RADIUS;
    /// Electron mass, kg.
    pub const ELECTRON_MASS: f64 = physical_constants::ELECTRON_MASS;
    /// Electron mass in unified atomic mass units (u).
    pub const ELECTRON_MASS_IN_U: f64 = physical_constants::ELECTRON_MASS_IN_U;
    /// Atomic unit of electric dipole moment (e a_0), C m.
    pub const DIPOLE_AU: f64 = physical_constants::ATOMIC_UNIT_OF_ELECTRIC_DIPOLE_MOM;
    /// Atomic unit of time (hbar / E_h), s.
    pub const TIME_AU: f64 = physical_constants::ATOMIC_UNIT_OF_TIME;
    /// Fine-structure constant alpha; the speed of light is 1/alpha in atomic units.
    pub const FINE_STRUCTURE: f64 = physical_constants::FINE_STRUCTURE_CONSTANT;
}

/// Hartree per cm^-1.
pub const HARTREE_PER_WAVENUMBER: f64 = 100.0 / codata::HARTREE_PER_METRE;
/// Bohr per angstrom.
pub const BOHR_PER_ANGSTROM: f64 = 1e-10 / codata::BOHR;
/// Electron masses per unified atomic mass unit.
pub const ELECTRON_MASSES_PER_DALTON: f64 = 1.0 / codata::ELECTRON_MASS_IN_U;

/// Convert a wavenumber in cm^-1 to hartree.
pub fn from_wavenumber(cm1: f64) -> f64 {
    cm1 * HARTREE_PER_WAVENUMBER
}

/// Convert hartree to a wavenumber in cm^-1.
pub fn to_wavenumber(hartree: f64) -> f64 {
    hartree / HARTREE_PER_WAVENUMBER
}

/// Convert angstrom to bohr.
pub fn from_angstrom(angstrom: f64) -> f64 {
    angstrom * BOHR_PER_ANGSTROM
}

/// Convert bohr to angstrom.
pub fn to_angstrom(bohr: f64) -> f64 {
    bohr / BOHR_PER_ANGSTROM
}

/// Convert unified atomic mass units (u, Da) to electron masses.
pub fn from_dalton(dalton: f64) -> f64 {
    dalton * ELECTRON_MASSES_PER_DALTON
}

/// Convert electron masses to unified atomic mass units.
pub fn to_dalton(electron_masses: f64) -> f64 {
    electron_masses / ELECTRON_MASSES_PER_DALTON
}

/// What a quantity measures; each has its own set of accepted units.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Dimension {
    Energy,
    Length,
    InverseLength,
    Mass,
    ForceConstant,
    DipoleMoment,
}

impl fmt::Display for Dimension {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let name = match self {
            Dimension::Energy => "energy",
            Dimension::Length => "length",
            Dimension::InverseLength => "inverse length",
            Dimension::Mass => "mass",
            Dimension::ForceConstant => "force constant",
            Dimension::DipoleMoment => "dipole moment",
        };
        f.write_str(name)
    }
}

/// A unit: its canonical name, the spellings accepted for it, and the size of one of it in
/// atomic units of its dimension.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Unit {
    pub name: &'static str,
    pub aliases: &'static [&'static str],
    pub dimension: Dimension,
    /// One of this unit, in atomic units.
    pub in_atomic_units: f64,
}

impl Unit {
    /// Convert a value in this unit into atomic units.
    pub fn to_atomic(&self, value: f64) -> f64 {
        value * self.in_atomic_units
    }
    /// Convert a value in atomic units into this unit.
    pub fn from_atomic(&self, value: f64) -> f64 {
        value / self.in_atomic_units
    }
}

impl fmt::Display for Unit {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name)
    }
}

const fn unit(
    name: &'static str,
    aliases: &'static [&'static str],
    dimension: Dimension,
    in_atomic_units: f64,
) -> Unit {
    Unit {
        name,
        aliases,
        dimension,
        in_atomic_units,
    }
}

/// The unit a quantity of each dimension is written in when the user chose none: cm-1,
/// angstrom, 1/angstrom, u, N/m, debye (the customary units of the trade).
pub fn customary_unit(dimension: Dimension) -> &'static Unit {
    let name = match dimension {
        Dimension::Energy => "cm-1",
        Dimension::Length => "angstrom",
        Dimension::InverseLength => "1/angstrom",
        Dimension::Mass => "u",
        Dimension::ForceConstant => "N/m",
        Dimension::DipoleMoment => "debye",
    };
    parse_unit(name, dimension).expect("the customary units are in the unit table")
}

/// Every unit the program reads or writes.
///
/// Energies: k_B T for `K`, h nu for `MHz`/`GHz`; molar energies per mole of molecules.
pub const UNITS: &[Unit] = &[
    unit(
        "cm-1",
        &["cm^-1", "1/cm", "cm**-1"],
        Dimension::Energy,
        HARTREE_PER_WAVENUMBER,
    ),
    unit(
        "hartree",
        &["Eh", "E_h", "au_energy"],
        Dimension::Energy,
        1.0,
    ),
    unit(
        "eV",
        &["ev"],
        Dimension::Energy,
        codata::ELEMENTARY_CHARGE / codata::HARTREE,
    ),
    unit(
        "kJ/mol",
        &["kj/mol"],
        Dimension::Energy,
        1e3 / (codata::AVOGADRO * codata::HARTREE),
    ),
    unit(
        "kcal/mol",
        &[],
        Dimension::Energy,
        4184.0 / (codata::AVOGADRO * codata::HARTREE),
    ),
    unit(
        "K",
        &["kelvin"],
        Dimension::Energy,
        codata::BOLTZMANN / codata::HARTREE,
    ),
    unit("MHz", &[], Dimension::Energy, 1e6 / codata::HARTREE_HERTZ),
    unit("GHz", &[], Dimension::Energy, 1e9 / codata::HARTREE_HERTZ),
    unit(
        "angstrom",
        &["A", "Å", "Angstrom", "ang"],
        Dimension::Length,
        BOHR_PER_ANGSTROM,
    ),
    unit("bohr", &["a0", "a_0", "au_length"], Dimension::Length, 1.0),
    unit("nm", &[], Dimension::Length, 10.0 * BOHR_PER_ANGSTROM),
    unit("pm", &[], Dimension::Length, 0.01 * BOHR_PER_ANGSTROM),
    unit(
        "1/angstrom",
        &["angstrom^-1", "A^-1", "1/A", "angstrom-1", "A-1"],
        Dimension::InverseLength,
        1.0 / BOHR_PER_ANGSTROM,
    ),
    unit(
        "1/bohr",
        &["bohr^-1", "bohr-1", "1/a0"],
        Dimension::InverseLength,
        1.0,
    ),
    unit(
        "u",
        &["Da", "amu"],
        Dimension::Mass,
        ELECTRON_MASSES_PER_DALTON,
    ),
    unit("kg", &[], Dimension::Mass, 1.0 / codata::ELECTRON_MASS),
    unit("m_e", &["me"], Dimension::Mass, 1.0),
    unit(
        "N/m",
        &["J/m^2"],
        Dimension::ForceConstant,
        codata::BOHR * codata::BOHR / codata::HARTREE,
    ),
    unit(
        "mdyn/angstrom",
        &["mdyn/A", "mdyn/Å"],
        Dimension::ForceConstant,
        100.0 * codata::BOHR * codata::BOHR / codata::HARTREE,
    ),
    unit(
        "hartree/bohr^2",
        &["Eh/a0^2", "hartree/bohr2"],
        Dimension::ForceConstant,
        1.0,
    ),
    unit(
        "debye",
        &["D"],
        Dimension::DipoleMoment,
        1e-21 / codata::SPEED_OF_LIGHT / codata::DIPOLE_AU,
    ),
    unit(
        "e*a0",
        &["ea0", "e a0", "au_dipole"],
        Dimension::DipoleMoment,
        1.0,
    ),
];

/// Problems reading a unit or a quantity.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum UnitError {
    #[error("unknown {dimension} unit '{text}'; accepted: {accepted}")]
    Unknown {
        text: String,
        dimension: Dimension,
        accepted: String,
    },
    #[error("'{text}' is a {found} unit where a {expected} unit is needed; accepted: {accepted}")]
    WrongDimension {
        text: String,
        found: Dimension,
        expected: Dimension,
        accepted: String,
    },
    #[error("'{text}' has no unit; write the number followed by a {dimension} unit, for example '{example}'")]
    Missing {
        text: String,
        dimension: Dimension,
        example: String,
    },
    #[error("'{text}' does not start with a number; write for example '{example}'")]
    NotANumber { text: String, example: String },
    #[error("'{text}' is not a finite number")]
    NotFinite { text: String },
}

/// The accepted spellings of units of one dimension, for error messages and help text.
pub fn accepted_units(dimension: Dimension) -> String {
    UNITS
        .iter()
        .filter(|u| u.dimension == dimension)
        .map(|u| u.name)
        .collect::<Vec<_>>()
        .join(", ")
}

fn example_for(dimension: Dimension) -> &'static str {
    match dimension {
        Dimension::Energy => "2990.9 cm-1",
        Dimension::Length => "1.2746 angstrom",
        Dimension::InverseLength => "1.87 1/angstrom",
        Dimension::Mass => "1.00782503 u",
        Dimension::ForceConstant => "516 N/m",
        Dimension::DipoleMoment => "1.1 debye",
    }
}

fn find_unit(text: &str) -> Option<&'static Unit> {
    let text = text.trim();
    UNITS
        .iter()
        .find(|u| u.name == text || u.aliases.contains(&text))
        .or_else(|| {
            // Case-insensitive second chance, except where case carries meaning (K, D, A, u).
            UNITS.iter().find(|u| {
                u.name.len() > 2 && u.name.eq_ignore_ascii_case(text)
                    || u.aliases
                        .iter()
                        .any(|a| a.len() > 2 && a.eq_ignore_ascii_case(text))
            })
        })
}

/// Look up a unit of the given dimension by name or alias.
///
/// ```
/// use rungs::units::{parse_unit, Dimension};
/// let unit = parse_unit("cm-1", Dimension::Energy).unwrap();
/// assert!((unit.to_atomic(219474.6313632) - 1.0).abs() < 1e-12);
/// ```
pub fn parse_unit(text: &str, dimension: Dimension) -> Result<&'static Unit, UnitError> {
    match find_unit(text) {
        Some(u) if u.dimension == dimension => Ok(u),
        Some(u) => Err(UnitError::WrongDimension {
            text: text.trim().to_string(),
            found: u.dimension,
            expected: dimension,
            accepted: accepted_units(dimension),
        }),
        None => Err(UnitError::Unknown {
            text: text.trim().to_string(),
            dimension,
            accepted: accepted_units(dimension),
        }),
    }
}

/// Split "1.5e-3 hartree" into the number and the unit text: the longest leading piece that
/// reads as a number is the number.
fn split_number(text: &str) -> Option<(f64, &str)> {
    let text = text.trim();
    let mut best = None;
    for (end, _) in text.char_indices().skip(1).chain([(text.len(), ' ')]) {
        if let Ok(value) = text[..end].parse::<f64>() {
            best = Some((value, &text[end..]));
        }
    }
    best
}

/// Read a quantity written as a number and a unit, and return it in atomic units.
///
/// ```
/// use rungs::units::{parse_quantity, Dimension};
/// let r_e = parse_quantity("1.27455 angstrom", Dimension::Length).unwrap();
/// assert!((r_e - 2.4085504).abs() < 1e-6); // bohr (1.27455 / 0.529177210903)
/// ```
pub fn parse_quantity(text: &str, dimension: Dimension) -> Result<f64, UnitError> {
    let example = example_for(dimension).to_string();
    let (value, unit_text) = split_number(text).ok_or_else(|| UnitError::NotANumber {
        text: text.trim().to_string(),
        example: example.clone(),
    })?;
    if !value.is_finite() {
        return Err(UnitError::NotFinite {
            text: text.trim().to_string(),
        });
    }
    if unit_text.trim().is_empty() {
        return Err(UnitError::Missing {
            text: text.trim().to_string(),
            dimension,
            example,
        });
    }
    Ok(parse_unit(unit_text, dimension)?.to_atomic(value))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_dimension_has_a_customary_unit() {
        for dimension in [
            Dimension::Energy,
            Dimension::Length,
            Dimension::InverseLength,
            Dimension::Mass,
            Dimension::ForceConstant,
            Dimension::DipoleMoment,
        ] {
            assert_eq!(customary_unit(dimension).dimension, dimension);
        }
    }

    #[test]
    fn every_unit_is_found_by_its_name_and_aliases() {
        for u in UNITS {
            assert_eq!(parse_unit(u.name, u.dimension).unwrap().name, u.name);
            for alias in u.aliases {
                assert_eq!(parse_unit(alias, u.dimension).unwrap().name, u.name);
            }
        }
    }

    #[test]
    fn numbers_glued_to_units_split() {
        assert_eq!(split_number("1.5eV"), Some((1.5, "eV")));
        assert_eq!(split_number("2cm-1"), Some((2.0, "cm-1")));
        assert_eq!(split_number("-1e-3 hartree"), Some((-1e-3, " hartree")));
        assert_eq!(split_number("cm-1"), None);
    }

    #[test]
    fn bad_quantities_say_what_to_write() {
        let missing = parse_quantity("2990.9", Dimension::Energy).unwrap_err();
        assert!(missing.to_string().contains("2990.9 cm-1"));
        let wrong = parse_quantity("3 angstrom", Dimension::Energy).unwrap_err();
        assert!(matches!(wrong, UnitError::WrongDimension { .. }));
        let unknown = parse_quantity("3 furlongs", Dimension::Length).unwrap_err();
        assert!(unknown.to_string().contains("angstrom, bohr, nm, pm"));
        assert!(matches!(
            parse_quantity("NaN cm-1", Dimension::Energy),
            Err(UnitError::NotFinite { .. })
        ));
    }
}
