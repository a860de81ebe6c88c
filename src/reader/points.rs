//! Reading a table of curve points: CSV with a header naming each column's unit.
//!
//! ```text
//! # comment lines start with '#'
//! r_angstrom,energy_cm-1
//! 0.90,21543.2
//! 1.00,8411.0
//! ```
//! The header cells are `<anything>_<unit>`: the text after the first underscore is the unit
//! (a length unit for the first column, an energy unit for the second).

use super::InputError;
use crate::units::{self, Dimension, Unit};

/// Points read from a file, in atomic units, sorted by r, with any warnings raised.
#[derive(Debug, Clone)]
pub struct PointTable {
    /// (r in bohr, V in hartree), strictly increasing r.
    pub points: Vec<(f64, f64)>,
    /// Things the user should know that did not stop the reading (unsorted input, ...).
    pub warnings: Vec<String>,
}

fn header_unit(
    cell: &str,
    dimension: Dimension,
    file: &str,
    line: usize,
) -> Result<&'static Unit, InputError> {
    let example = match dimension {
        Dimension::Length => "r_angstrom",
        Dimension::DipoleMoment => "dipole_debye",
        _ => "energy_cm-1",
    };
    let unit_text = cell.split_once('_').map(|(_, u)| u).ok_or_else(|| {
        InputError::at(
            file,
            line,
            format!(
                "header cell '{cell}' names no unit; write the column as '{example}' (accepted {dimension} units: {})",
                units::accepted_units(dimension)
            ),
        )
    })?;
    units::parse_unit(unit_text, dimension)
        .map_err(|e| InputError::at(file, line, format!("header cell '{cell}': {e}")))
}

/// Parse the text of a points file (r and energy). `file` names it in messages.
pub fn parse_points(text: &str, file: &str) -> Result<PointTable, InputError> {
    parse_function_points(text, file, Dimension::Energy)
}

/// Parse a two-column table of r and a function of r of the given dimension (an energy for
/// curves, a dipole moment for dipole functions), units in the header.
pub fn parse_function_points(
    text: &str,
    file: &str,
    dimension: Dimension,
) -> Result<PointTable, InputError> {
    let example = match dimension {
        Dimension::DipoleMoment => "r_angstrom,dipole_debye",
        _ => "r_angstrom,energy_cm-1",
    };
    let ((header_line, header), rows) = super::data_lines(text, file, example)?;
    let cells: Vec<&str> = header.split(',').map(str::trim).collect();
    if cells.len() != 2 {
        return Err(InputError::at(
            file,
            header_line,
            format!(
                "the header has {} columns; it needs exactly two, r and the {dimension}, for example '{example}'",
                cells.len()
            ),
        ));
    }
    let r_unit = header_unit(cells[0], Dimension::Length, file, header_line)?;
    let v_unit = header_unit(cells[1], dimension, file, header_line)?;
    let mut points: Vec<(f64, f64, usize)> = Vec::new();
    for (line, row) in rows {
        let cells: Vec<&str> = row.split(',').map(str::trim).collect();
        if cells.len() != 2 {
            return Err(InputError::at(
                file,
                line,
                format!(
                    "expected 2 comma-separated numbers (r, {dimension}), found {} cells",
                    cells.len()
                ),
            ));
        }
        let mut numbers = [0.0; 2];
        for (k, cell) in cells.iter().enumerate() {
            let value: f64 = cell.parse().map_err(|_| {
                InputError::at(
                    file,
                    line,
                    format!("'{cell}' is not a number; fix or remove the row"),
                )
            })?;
            if !value.is_finite() {
                return Err(InputError::at(
                    file,
                    line,
                    format!("'{cell}' is not a finite number; remove the row or give its value"),
                ));
            }
            numbers[k] = value;
        }
        let r = r_unit.to_atomic(numbers[0]);
        if r <= 0.0 {
            return Err(InputError::at(
                file,
                line,
                format!(
                    "r = {} {} is not positive; internuclear distances are > 0",
                    numbers[0], r_unit
                ),
            ));
        }
        points.push((r, v_unit.to_atomic(numbers[1]), line));
    }
    if points.len() < 4 {
        return Err(InputError::in_file(
            file,
            format!(
                "{} points found; a spline needs at least 4 (add points, ideally 20 or more across the well)",
                points.len()
            ),
        ));
    }
    let mut warnings = Vec::new();
    if points.windows(2).any(|w| w[1].0 < w[0].0) {
        warnings.push(format!(
            "{file}: the points are not in increasing r; they were sorted"
        ));
        points.sort_by(|a, b| a.0.total_cmp(&b.0));
    }
    if let Some(w) = points.windows(2).find(|w| w[1].0 == w[0].0) {
        return Err(InputError::at(
            file,
            w[1].2,
            format!(
                "r = {} {} appears twice (lines {} and {}); keep one of the two rows",
                r_unit.from_atomic(w[0].0),
                r_unit,
                w[0].2.min(w[1].2),
                w[0].2.max(w[1].2)
            ),
        ));
    }
    Ok(PointTable {
        points: points.into_iter().map(|(r, v, _)| (r, v)).collect(),
        warnings,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_units_from_the_header_and_sorts() {
        let table = parse_points(
            "# x\nr_bohr,E_hartree\n2,0.1\n1,0.5\n3,0.2\n4,0.3\n",
            "t.csv",
        )
        .unwrap();
        assert_eq!(table.points[0], (1.0, 0.5));
        assert_eq!(table.warnings.len(), 1);
    }

    #[test]
    fn duplicate_rows_name_both_lines() {
        let err = parse_points("r_bohr,E_hartree\n1,0\n2,1\n1,3\n4,4\n", "t.csv").unwrap_err();
        assert!(err.to_string().contains("lines 2 and 4"), "{err}");
    }
}
