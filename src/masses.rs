//! Nuclide masses and the reduced mass of a pair.
//!
//! Atomic (neutral-atom) masses are the AME2020 evaluation: W.J. Huang et al., Chinese Phys. C
//! 45, 030002 (2021) and M. Wang et al., Chinese Phys. C 45, 030003 (2021), file mass.mas20,
//! experimental values only (every stable nuclide and the long-lived ones are among them). The
//! table is `data/ame2020_atomic_masses.csv`, made from the published file by
//! `tools/extract_ame2020.py`, and compiled into the program.
//!
//! Masses are returned in electron masses (the library's internal unit, see [`crate::units`]).

use crate::units::{self, Dimension};
use std::sync::OnceLock;
use thiserror::Error;

const AME2020_TABLE: &str = include_str!("../data/ame2020_atomic_masses.csv");

/// One nuclide of the AME2020 table.
#[derive(Debug, Clone, PartialEq)]
pub struct Nuclide {
    /// Proton number.
    pub protons: u32,
    /// Mass number.
    pub mass_number: u32,
    /// Element symbol, e.g. "Cl".
    pub element: String,
    /// Neutral-atom mass in u.
    pub mass_dalton: f64,
    /// Standard uncertainty of the mass, u.
    pub uncertainty_dalton: f64,
}

impl Nuclide {
    /// The usual label, e.g. "35Cl".
    pub fn label(&self) -> String {
        format!("{}{}", self.mass_number, self.element)
    }
}

/// Problems naming an atom or a mass.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum MassError {
    #[error("unknown nuclide '{0}'; write the mass number then the element, for example '1H', '2H' (or 'D'), '35Cl', '133Cs', or give an explicit mass such as '34.96885 u'")]
    UnknownNuclide(String),
    #[error("the AME2020 table has no experimental mass for {0}; give the mass explicitly, for example '{1}'")]
    NoMass(String, String),
    #[error("mass '{0}' must be positive")]
    NotPositive(String),
    #[error(transparent)]
    Unit(#[from] units::UnitError),
}

fn table() -> &'static [Nuclide] {
    static TABLE: OnceLock<Vec<Nuclide>> = OnceLock::new();
    TABLE.get_or_init(|| {
        AME2020_TABLE
            .lines()
            .filter(|l| !l.starts_with('#') && !l.starts_with('Z'))
            .filter_map(|line| {
                let cells: Vec<&str> = line.split(',').collect();
                Some(Nuclide {
                    protons: cells.first()?.parse().ok()?,
                    mass_number: cells.get(1)?.parse().ok()?,
                    element: cells.get(2)?.to_string(),
                    mass_dalton: cells.get(3)?.parse::<f64>().ok()? * 1e-6,
                    uncertainty_dalton: cells.get(4)?.parse::<f64>().ok()? * 1e-6,
                })
            })
            .collect()
    })
}

/// Split a nuclide label into mass number and element: "35Cl", "Cl35", "Cl-35", "H2" is not
/// accepted (ambiguous with the molecule); "D" and "T" are 2H and 3H.
fn parse_label(text: &str) -> Option<(u32, String)> {
    let text = text.trim();
    match text {
        "D" => return Some((2, "H".into())),
        "T" => return Some((3, "H".into())),
        _ => {}
    }
    let digits_first = text.chars().take_while(|c| c.is_ascii_digit()).count();
    if digits_first > 0 {
        let number = text[..digits_first].parse().ok()?;
        let element = text[digits_first..].trim_start_matches('-').trim();
        return (!element.is_empty()).then(|| (number, element.to_string()));
    }
    let (element, number) = text.split_once('-')?;
    Some((number.trim().parse().ok()?, element.trim().to_string()))
}

/// Look up a nuclide by its usual label ("1H", "2H", "D", "35Cl", "Cl-35", "133Cs").
///
/// ```
/// let cl = rungs::masses::nuclide("35Cl").unwrap();
/// assert_eq!(cl.mass_dalton, 34.968852694); // AME2020
/// ```
pub fn nuclide(label: &str) -> Result<Nuclide, MassError> {
    let (mass_number, element) =
        parse_label(label).ok_or_else(|| MassError::UnknownNuclide(label.trim().to_string()))?;
    let element_known = table()
        .iter()
        .any(|n| n.element.eq_ignore_ascii_case(&element));
    if !element_known {
        return Err(MassError::UnknownNuclide(label.trim().to_string()));
    }
    table()
        .iter()
        .find(|n| n.mass_number == mass_number && n.element.eq_ignore_ascii_case(&element))
        .cloned()
        .ok_or_else(|| {
            MassError::NoMass(
                format!("{mass_number}{element}"),
                format!("{mass_number}.0 u"),
            )
        })
}

/// An atom of the pair: a nuclide from the table or an explicit mass.
#[derive(Debug, Clone, PartialEq)]
pub struct Atom {
    /// What the user called it ("35Cl", or the mass text for an explicit mass).
    pub label: String,
    /// Neutral-atom mass, electron masses.
    pub mass: f64,
    /// The nuclide, when the atom was named by one (homonuclear tests compare these).
    pub nuclide: Option<(u32, u32)>,
}

impl Atom {
    /// Read an atom: a nuclide label, or a mass with its unit ("34.96885 u", "5.8e-26 kg").
    pub fn parse(text: &str) -> Result<Atom, MassError> {
        let text = text.trim();
        if text
            .chars()
            .next()
            .is_some_and(|c| c.is_ascii_digit() || c == '-' || c == '.')
            && text.contains(|c: char| c.is_whitespace())
        {
            let mass = units::parse_quantity(text, Dimension::Mass)?;
            if mass <= 0.0 {
                return Err(MassError::NotPositive(text.to_string()));
            }
            return Ok(Atom {
                label: text.to_string(),
                mass,
                nuclide: None,
            });
        }
        match nuclide(text) {
            Ok(n) => Ok(Atom {
                label: n.label(),
                mass: units::from_dalton(n.mass_dalton),
                nuclide: Some((n.protons, n.mass_number)),
            }),
            // "12.5u" with no space: try it as a mass before giving up.
            Err(e) => match units::parse_quantity(text, Dimension::Mass) {
                Ok(mass) if mass > 0.0 => Ok(Atom {
                    label: text.to_string(),
                    mass,
                    nuclide: None,
                }),
                Ok(_) => Err(MassError::NotPositive(text.to_string())),
                Err(_) => Err(e),
            },
        }
    }
}

/// Reduced mass of two bodies, mu = m1 m2 / (m1 + m2).
pub fn reduced_mass(mass_a: f64, mass_b: f64) -> f64 {
    mass_a * mass_b / (mass_a + mass_b)
}

/// The two atoms of a diatomic and its charge.
#[derive(Debug, Clone, PartialEq)]
pub struct Pair {
    pub first: Atom,
    pub second: Atom,
    /// Molecular charge in units of e (+1 for a cation: one electron fewer).
    pub charge: i32,
}

impl Pair {
    pub fn new(first: Atom, second: Atom, charge: i32) -> Pair {
        Pair {
            first,
            second,
            charge,
        }
    }

    /// A neutral pair from two atom texts (nuclide labels or masses with units).
    ///
    /// ```
    /// let pair = rungs::masses::Pair::neutral("1H", "35Cl").unwrap();
    /// assert_eq!(pair.label(), "1H-35Cl");
    /// ```
    pub fn neutral(first: &str, second: &str) -> Result<Pair, MassError> {
        Ok(Pair::new(Atom::parse(first)?, Atom::parse(second)?, 0))
    }

    /// Reduced mass for nuclear motion, electron masses.
    ///
    /// Neutral: mu = M_a M_b / (M_a + M_b) with neutral-atom masses, which is the usual
    /// convention for Born-Oppenheimer curves (electrons follow the nuclei). For a molecular
    /// ion of charge q the total mass lacks q electrons, and the charge-modified reduced mass
    /// mu = M_a M_b / (M_a + M_b - q m_e) is used (J.K.G. Watson, J. Mol. Spectrosc. 80, 411
    /// (1980); recalled from memory).
    pub fn reduced_mass(&self) -> f64 {
        let (a, b) = (self.first.mass, self.second.mass);
        a * b / (a + b - f64::from(self.charge))
    }

    /// True when both atoms are the same nuclide (a homonuclear isotopologue).
    pub fn is_homonuclear(&self) -> bool {
        match (self.first.nuclide, self.second.nuclide) {
            (Some(a), Some(b)) => a == b,
            _ => false,
        }
    }

    /// "1H-35Cl", with the charge when there is one.
    pub fn label(&self) -> String {
        let charge = match self.charge {
            0 => String::new(),
            1 => "+".into(),
            -1 => "-".into(),
            q if q > 0 => format!("{q}+"),
            q => format!("{}-", -q),
        };
        format!("{}-{}{}", self.first.label, self.second.label, charge)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_in_several_spellings() {
        assert_eq!(parse_label("35Cl"), Some((35, "Cl".into())));
        assert_eq!(parse_label("Cl-35"), Some((35, "Cl".into())));
        assert_eq!(parse_label("D"), Some((2, "H".into())));
        assert_eq!(nuclide("cl-35").unwrap().mass_number, 35);
        assert!(matches!(nuclide("35Xx"), Err(MassError::UnknownNuclide(_))));
        assert!(matches!(nuclide("999Cl"), Err(MassError::NoMass(..))));
    }

    #[test]
    fn explicit_masses() {
        let a = Atom::parse("2.0 u").unwrap();
        assert!((units::to_dalton(a.mass) - 2.0).abs() < 1e-12);
        assert!(Atom::parse("12.5u").is_ok());
        assert!(matches!(
            Atom::parse("-1 u"),
            Err(MassError::NotPositive(_))
        ));
    }
}
