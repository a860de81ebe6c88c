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
//!
//! Measured transitions are the other form: the upper level, the lower level, the
//! wavenumber (or energy) of the transition E(v, J) - E(v_lower, J_lower), and its uncertainty.
//!
//! ```text
//! v,J,v_lower,J_lower,transition_cm-1,uncertainty_cm-1
//! 1,1,0,0,885.1234,0.0005
//! ```

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
    /// For a measured transition: the lower level (v, J); `energy` is then E(v, J) minus the
    /// energy of this level.
    pub lower: Option<(u32, u32)>,
}

impl MeasuredLevel {
    /// "v=3 J=1", or "v=3 J=1 <- v=0 J=0" for a transition.
    pub fn label(&self) -> String {
        match self.lower {
            Some((v, j)) => format!("v={} J={} <- v={v} J={j}", self.v, self.j),
            None => format!("v={} J={}", self.v, self.j),
        }
    }
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
            format!("the header '{header}' must be 'v,J,energy_<unit>,uncertainty_<unit>' (levels) or 'v,J,v_lower,J_lower,transition_<unit>,uncertainty_<unit>' (transitions), with an optional ',tag'"),
        )
    };
    let transitions = cells.len() >= 4 && cells[2] == "v_lower" && cells[3] == "J_lower";
    let value_column = if transitions { 4 } else { 2 };
    let columns = value_column + 2;
    if !(columns..=columns + 1).contains(&cells.len()) || cells[0] != "v" || cells[1] != "J" {
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
    let energy_unit = unit_of(cells[value_column])?;
    let uncertainty_unit = unit_of(cells[value_column + 1])?;
    let has_tag = cells.len() == columns + 1;
    let mut levels: Vec<MeasuredLevel> = Vec::new();
    for (line, row) in rows {
        let cells: Vec<&str> = row.split(',').map(str::trim).collect();
        if cells.len() != columns + usize::from(has_tag) {
            return Err(InputError::at(
                file,
                line,
                format!(
                    "expected {} cells, found {}",
                    columns + usize::from(has_tag),
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
        let lower = if transitions {
            Some((quantum(2, "v_lower")?, quantum(3, "J_lower")?))
        } else {
            None
        };
        if lower == Some((v, j)) {
            return Err(InputError::at(
                file,
                line,
                "a transition needs two different levels",
            ));
        }
        let energy = energy_unit.to_atomic(number(value_column, "energy")?);
        let uncertainty = uncertainty_unit.to_atomic(number(value_column + 1, "uncertainty")?);
        if uncertainty <= 0.0 {
            return Err(InputError::at(
                file,
                line,
                "the uncertainty must be positive (it weights the comparison)",
            ));
        }
        let tag = has_tag
            .then(|| cells[columns].to_string())
            .filter(|t| !t.is_empty());
        if let Some(first) = levels
            .iter()
            .find(|l| l.v == v && l.j == j && l.lower == lower && l.tag == tag)
        {
            return Err(InputError::at(
                file,
                line,
                format!(
                    "{} is assigned twice (lines {} and {line}); keep one, or tag them differently",
                    first.label(),
                    first.line
                ),
            ));
        }
        levels.push(MeasuredLevel {
            v,
            j,
            energy,
            uncertainty,
            tag,
            line,
            lower,
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

    #[test]
    fn reads_transitions() {
        let text =
            "v,J,v_lower,J_lower,transition_cm-1,uncertainty_cm-1,tag\n1,1,0,0,885.1,0.01,a\n";
        let lines = parse_measured(text, "t.csv").unwrap();
        assert_eq!(lines[0].lower, Some((0, 0)));
        assert_eq!(lines[0].label(), "v=1 J=1 <- v=0 J=0");
        let err = parse_measured(
            "v,J,v_lower,J_lower,transition_cm-1,uncertainty_cm-1\n1,1,1,1,0,0.01\n",
            "t.csv",
        )
        .unwrap_err();
        assert!(err.to_string().contains("line 2"), "{err}");
    }
}
