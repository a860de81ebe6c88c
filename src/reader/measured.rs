//! Reading measured levels: CSV with a header naming each column's unit.
//!
//! ```text
//! # comment lines start with '#'
//! v,J,energy_cm-1,uncertainty_cm-1,tag
//! 0,0,0.0000,0.0010,main
//! 1,0,883.0004,0.0010,main
//! ```
//! Columns: `v`, `J`, the energy (`<name>_<unit>`), its standard uncertainty (same dimension),
//! and an optional free-text `tag` (an isotopologue label, a source). Energies are on the zero
//! the user states when comparing (see [`crate::compare::EnergyZero`]).

use super::InputError;
use crate::units::{self, Dimension};

/// One measured level, energies in hartree.
#[derive(Debug, Clone, PartialEq)]
pub struct MeasuredLevel {
    pub v: u32,
    pub j: u32,
    pub energy: f64,
    pub uncertainty: f64,
    pub tag: Option<String>,
    /// Line of the file, for messages.
    pub line: usize,
}

/// Parse the text of a measured-levels file. `file` names it in messages.
pub fn parse_measured(text: &str, file: &str) -> Result<Vec<MeasuredLevel>, InputError> {
    let ((header_line, header), rows) =
        super::data_lines(text, file, "v,J,energy_cm-1,uncertainty_cm-1")?;
    let cells: Vec<&str> = header.split(',').map(str::trim).collect();
    let wrong_header = || {
        InputError::at(
            file,
            header_line,
            format!("the header '{header}' must be 'v,J,energy_<unit>,uncertainty_<unit>' with an optional ',tag'"),
        )
    };
    if !(4..=5).contains(&cells.len()) || cells[0] != "v" || cells[1] != "J" {
        return Err(wrong_header());
    }
    let unit_of = |cell: &str| {
        let unit = cell
            .split_once('_')
            .map(|(_, u)| u)
            .ok_or_else(wrong_header)?;
        units::parse_unit(unit, Dimension::Energy)
            .map_err(|e| InputError::at(file, header_line, format!("'{cell}': {e}")))
    };
    let (energy_unit, uncertainty_unit) = (unit_of(cells[2])?, unit_of(cells[3])?);
    let has_tag = cells.len() == 5;
    let mut levels: Vec<MeasuredLevel> = Vec::new();
    for (line, row) in rows {
        let cells: Vec<&str> = row.split(',').map(str::trim).collect();
        if cells.len() != 4 + usize::from(has_tag) {
            return Err(InputError::at(
                file,
                line,
                format!(
                    "expected {} cells, found {}",
                    4 + usize::from(has_tag),
                    cells.len()
                ),
            ));
        }
        let quantum = |k: usize, name: &str| -> Result<u32, InputError> {
            cells[k].parse().map_err(|_| {
                InputError::at(
                    file,
                    line,
                    format!("{name} = '{}' is not a whole number >= 0", cells[k]),
                )
            })
        };
        let number = |k: usize, name: &str| -> Result<f64, InputError> {
            let value: f64 = cells[k].parse().map_err(|_| {
                InputError::at(file, line, format!("{name} '{}' is not a number", cells[k]))
            })?;
            if value.is_finite() {
                Ok(value)
            } else {
                Err(InputError::at(
                    file,
                    line,
                    format!("{name} '{}' is not finite", cells[k]),
                ))
            }
        };
        let (v, j) = (quantum(0, "v")?, quantum(1, "J")?);
        let energy = energy_unit.to_atomic(number(2, "energy")?);
        let uncertainty = uncertainty_unit.to_atomic(number(3, "uncertainty")?);
        if uncertainty <= 0.0 {
            return Err(InputError::at(
                file,
                line,
                "the uncertainty must be positive (it weights the comparison)",
            ));
        }
        let tag = has_tag
            .then(|| cells[4].to_string())
            .filter(|t| !t.is_empty());
        if let Some(first) = levels.iter().find(|l| l.v == v && l.j == j && l.tag == tag) {
            return Err(InputError::at(
                file,
                line,
                format!("(v, J) = ({v}, {j}) is assigned twice (lines {} and {line}); keep one, or tag them differently", first.line),
            ));
        }
        levels.push(MeasuredLevel {
            v,
            j,
            energy,
            uncertainty,
            tag,
            line,
        });
    }
    if levels.is_empty() {
        return Err(InputError::in_file(
            file,
            "no measured levels after the header",
        ));
    }
    Ok(levels)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_units_and_rejects_duplicates() {
        let text = "v,J,energy_cm-1,uncertainty_cm-1\n0,0,0,0.01\n1,0,883,0.01\n";
        let levels = parse_measured(text, "m.csv").unwrap();
        assert_eq!(levels.len(), 2);
        let err = parse_measured(
            "v,J,energy_cm-1,uncertainty_cm-1\n0,0,0,0.01\n0,0,1,0.01\n",
            "m.csv",
        )
        .unwrap_err();
        assert!(err.to_string().contains("lines 2 and 3"), "{err}");
    }
}
