//! Reading a dipole-moment function: a TOML file with a `[dipole]` section, or a CSV of points.
//!
//! ```toml
//! [dipole]
//! form = "polynomial"          # mu(r) = sum_k c_k (r - r_ref)^k
//! r_ref = "1.56 angstrom"
//! unit = "debye"               # the unit of mu
//! length_unit = "angstrom"     # c_k is in unit / length_unit^k
//! coefficients = [6.3, 2.1, -0.4]
//! ```
//!
//! or `form = "points"` with `file = "dipole.csv"` (relative to the TOML file), or the CSV
//! itself: a header `r_<length unit>,dipole_<dipole unit>` and rows of numbers.

use super::points::parse_function_points;
use super::InputError;
use crate::curve::DipoleFunction;
use crate::units::{self, Dimension};
use std::path::Path;

/// Read a dipole function from a file (`.csv`: points; otherwise TOML).
pub fn read_dipole_file(path: &Path) -> Result<DipoleFunction, InputError> {
    let name = path.display().to_string();
    let text = std::fs::read_to_string(path)
        .map_err(|e| InputError::in_file(&name, format!("cannot read the dipole file: {e}")))?;
    if path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("csv"))
    {
        return points(&text, &name);
    }
    let base_dir = path.parent().unwrap_or(Path::new("."));
    parse_dipole_toml(&text, &name, base_dir)
}

fn points(text: &str, name: &str) -> Result<DipoleFunction, InputError> {
    let table = parse_function_points(text, name, Dimension::DipoleMoment)?;
    Ok(DipoleFunction::from_points(&table.points))
}

/// Parse the TOML text of a dipole file; `base_dir` resolves a points file.
pub fn parse_dipole_toml(
    text: &str,
    name: &str,
    base_dir: &Path,
) -> Result<DipoleFunction, InputError> {
    let document: toml::Table = toml::from_str(text)
        .map_err(|e| InputError::in_file(name, format!("not valid TOML: {}", e.message())))?;
    let line_of = |key: &str| {
        text.lines()
            .position(|l| l.trim_start().starts_with(key))
            .map(|i| i + 1)
    };
    let error = |key: &str, message: String| InputError {
        source_name: name.to_string(),
        line: line_of(key),
        message,
    };
    let Some(toml::Value::Table(dipole)) = document.get("dipole") else {
        return Err(InputError::in_file(
            name,
            "no [dipole] section; see `rungs dipole --help` for the format",
        ));
    };
    let text_of = |key: &str| -> Result<Option<&str>, InputError> {
        match dipole.get(key) {
            None => Ok(None),
            Some(toml::Value::String(s)) => Ok(Some(s.as_str())),
            Some(other) => Err(error(key, format!("'{key}' must be text, found {other}"))),
        }
    };
    for key in dipole.keys() {
        if ![
            "form",
            "r_ref",
            "unit",
            "length_unit",
            "coefficients",
            "file",
        ]
        .contains(&key.as_str())
        {
            return Err(error(
                key,
                format!("unknown key '{key}' in [dipole]; known: form, r_ref, unit, length_unit, coefficients, file"),
            ));
        }
    }
    match text_of("form")?.unwrap_or("polynomial") {
        "points" => {
            let file = text_of("file")?
                .ok_or_else(|| error("form", "form = \"points\" needs file = \"...csv\"".into()))?;
            let path = base_dir.join(file);
            let data = std::fs::read_to_string(&path).map_err(|e| {
                error(
                    "file",
                    format!("cannot read points file '{}': {e}", path.display()),
                )
            })?;
            points(&data, &path.display().to_string())
        }
        "polynomial" => {
            let dipole_unit =
                units::parse_unit(text_of("unit")?.unwrap_or("debye"), Dimension::DipoleMoment)
                    .map_err(|e| error("unit", format!("'unit': {e}")))?;
            let length_unit = units::parse_unit(
                text_of("length_unit")?.unwrap_or("angstrom"),
                Dimension::Length,
            )
            .map_err(|e| error("length_unit", format!("'length_unit': {e}")))?;
            let r_ref = units::parse_quantity(
                text_of("r_ref")?.ok_or_else(|| {
                    error("form", "a polynomial needs r_ref = \"1.5 angstrom\"".into())
                })?,
                Dimension::Length,
            )
            .map_err(|e| error("r_ref", format!("'r_ref': {e}")))?;
            let coefficients =
                match dipole.get("coefficients") {
                    Some(toml::Value::Array(items)) if !items.is_empty() => items
                        .iter()
                        .enumerate()
                        .map(|(k, item)| {
                            let value = match item {
                                toml::Value::Integer(i) => *i as f64,
                                toml::Value::Float(x) if x.is_finite() => *x,
                                other => {
                                    return Err(error(
                                        "coefficients",
                                        format!(
                                            "coefficient {k} must be a plain number, found {other}"
                                        ),
                                    ))
                                }
                            };
                            // c_k in unit / length_unit^k -> e a_0 / bohr^k.
                            Ok(dipole_unit.to_atomic(value)
                                / length_unit.to_atomic(1.0).powi(k as i32))
                        })
                        .collect::<Result<Vec<_>, _>>()?,
                    _ => {
                        return Err(error(
                            "coefficients",
                            "a polynomial needs coefficients = [c0, c1, ...]".into(),
                        ))
                    }
                };
            Ok(DipoleFunction::Polynomial {
                r_ref,
                coefficients,
            })
        }
        other => Err(error(
            "form",
            format!("form = '{other}' is not one of: polynomial, points"),
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn polynomial_in_debye_and_angstrom() {
        let text = "[dipole]\nform = \"polynomial\"\nr_ref = \"1.0 angstrom\"\nunit = \"debye\"\nlength_unit = \"angstrom\"\ncoefficients = [1.0, 2.0]\n";
        let mu = parse_dipole_toml(text, "d.toml", Path::new(".")).unwrap();
        let debye = units::parse_unit("debye", Dimension::DipoleMoment).unwrap();
        let at = units::from_angstrom(1.5);
        assert!((debye.from_atomic(mu.value(at)) - 2.0).abs() < 1e-12);
    }

    #[test]
    fn unknown_unit_is_named() {
        let text =
            "[dipole]\nr_ref = \"1.0 angstrom\"\nunit = \"statcoulomb\"\ncoefficients = [1.0]\n";
        let err = parse_dipole_toml(text, "d.toml", Path::new(".")).unwrap_err();
        assert!(err.to_string().contains("debye"), "{err}");
        assert_eq!(err.line, Some(3));
    }
}
