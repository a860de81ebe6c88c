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
use super::{choice, parse_toml, InputError, Origin};
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
    let document = parse_toml(text, name)?;
    let origin = Origin {
        name: name.to_string(),
        text: Some(text),
        section: "dipole",
        base_dir: base_dir.to_path_buf(),
    };
    let Some(toml::Value::Table(dipole)) = document.get("dipole") else {
        return Err(InputError::in_file(
            name,
            "no [dipole] section; see `rungs dipole --help` for the format",
        ));
    };
    origin.check_keys(
        dipole,
        &[
            "form",
            "r_ref",
            "unit",
            "length_unit",
            "coefficients",
            "file",
        ],
        "[dipole]",
    )?;
    let polynomial = choice(
        &origin,
        dipole,
        "form",
        &[("polynomial", true), ("points", false)],
    )?
    .unwrap_or(true);
    if !polynomial {
        let file = origin.string(dipole, "file")?.ok_or_else(|| {
            origin.error(Some("form"), "form = \"points\" needs file = \"...csv\"")
        })?;
        let path = base_dir.join(file);
        let data = std::fs::read_to_string(&path).map_err(|e| {
            origin.error(
                Some("file"),
                format!("cannot read points file '{}': {e}", path.display()),
            )
        })?;
        return points(&data, &path.display().to_string());
    }
    let unit_of = |key: &str, default: &str, dimension: Dimension| {
        units::parse_unit(origin.string(dipole, key)?.unwrap_or(default), dimension)
            .map_err(|e| origin.error(Some(key), format!("'{key}': {e}")))
    };
    let dipole_unit = unit_of("unit", "debye", Dimension::DipoleMoment)?;
    let length_unit = unit_of("length_unit", "angstrom", Dimension::Length)?;
    let r_ref = origin
        .quantity(dipole, "r_ref", Dimension::Length)?
        .ok_or_else(|| origin.error(None, "a polynomial needs r_ref = \"1.5 angstrom\""))?;
    let coefficients = origin
        .numbers(dipole, "coefficients")?
        .filter(|c| !c.is_empty())
        .ok_or_else(|| {
            origin.error(
                Some("coefficients"),
                "a polynomial needs coefficients = [c0, c1, ...]",
            )
        })?;
    // c_k in unit / length_unit^k -> e a_0 / bohr^k.
    let coefficients = coefficients
        .iter()
        .enumerate()
        .map(|(k, c)| dipole_unit.to_atomic(*c) / length_unit.to_atomic(1.0).powi(k as i32))
        .collect();
    Ok(DipoleFunction::Polynomial {
        r_ref,
        coefficients,
    })
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
