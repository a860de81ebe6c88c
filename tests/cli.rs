//! The command line end to end on the shipped (invented) examples.

use assert_cmd::Command;

fn run(args: &[&str]) -> (i32, String, String) {
    let output = Command::cargo_bin("rungs")
        .unwrap()
        .args(args)
        .output()
        .unwrap();
    (
        output.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&output.stdout).to_string(),
        String::from_utf8_lossy(&output.stderr).to_string(),
    )
}

/// Run a command that must be refused as bad input (exit 2, no panic) with every one of
/// `expected` in its message.
fn refused(args: &[&str], expected: &[&str]) {
    let (code, _, stderr) = run(args);
    assert_eq!(code, 2, "{args:?}: {stderr}");
    assert!(!stderr.contains("panicked"), "{stderr}");
    for text in expected {
        assert!(stderr.contains(text), "{args:?}: no '{text}' in {stderr}");
    }
}

/// The value column of the row named `name` in a quantity,value,... CSV.
fn csv_value(csv: &str, name: &str) -> f64 {
    let line = csv
        .lines()
        .find(|l| l.starts_with(&format!("{name},")))
        .unwrap();
    line.split(',').nth(1).unwrap().parse().unwrap()
}

#[test]
fn constants_of_the_demo_morse() {
    // curves/demo_morse.toml is a Morse curve given by omega_e = 900 and omega_e x_e = 8.5 cm-1;
    // for a Morse curve G(v) is exactly quadratic (Morse 1929), so the fit gives them back.
    let (code, stdout, stderr) = run(&[
        "constants",
        "curves/demo_morse.toml",
        "--v-range",
        "0-20",
        "--format",
        "csv",
    ]);
    assert_eq!(code, 0, "{stderr}");
    let value = |name: &str| csv_value(&stdout, name);
    assert!((value("omega_e") - 900.0).abs() < 1e-6);
    assert!((value("omega_e_x_e") - 8.5).abs() < 1e-6);
}

#[test]
fn levels_table_csv_and_json_carry_the_same_numbers() {
    let (_, csv, _) = run(&[
        "levels",
        "curves/demo_morse.toml",
        "--vmax",
        "3",
        "--format",
        "csv",
    ]);
    let (_, json, _) = run(&[
        "levels",
        "curves/demo_morse.toml",
        "--vmax",
        "3",
        "--format",
        "json",
    ]);
    let json: serde_json::Value = serde_json::from_str(&json).unwrap();
    let first_csv: f64 = csv
        .lines()
        .nth(1)
        .unwrap()
        .split(',')
        .nth(2)
        .unwrap()
        .parse()
        .unwrap();
    assert_eq!(json["rows"][0]["energy_cm-1"].as_f64(), Some(first_csv));
}

#[test]
fn wavefunctions_are_written_for_the_chosen_levels() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("psi.csv");
    let (code, _, stderr) = run(&[
        "levels",
        "curves/demo_morse.toml",
        "--wavefunctions",
        path.to_str().unwrap(),
        "--v",
        "0,2",
    ]);
    assert_eq!(code, 0, "{stderr}");
    let text = std::fs::read_to_string(&path).unwrap();
    assert!(text.starts_with("v,r_angstrom,psi_angstrom^-1/2"));
    let levels: std::collections::BTreeSet<&str> = text
        .lines()
        .skip(1)
        .map(|l| l.split(',').next().unwrap())
        .collect();
    assert_eq!(levels.into_iter().collect::<Vec<_>>(), vec!["0", "2"]);
    // A v beyond the bound levels is refused.
    let (code, _, stderr) = run(&[
        "levels",
        "curves/demo_morse.toml",
        "--wavefunctions",
        path.to_str().unwrap(),
        "--v",
        "500",
    ]);
    assert_eq!(code, 2, "{stderr}");
}

#[test]
fn bad_measured_files_are_refused_with_their_line() {
    let dir = tempfile::tempdir().unwrap();
    let write = |name: &str, text: &str| {
        let path = dir.path().join(name);
        std::fs::write(&path, text).unwrap();
        path.to_str().unwrap().to_string()
    };
    let duplicate = write(
        "dup.csv",
        "v,J,energy_cm-1,uncertainty_cm-1\n0,0,0,0.01\n1,0,883,0.01\n1,0,884,0.01\n",
    );
    let no_unit = write("nounit.csv", "v,J,energy,uncertainty\n0,0,0,0.01\n");
    let zero_uncertainty = write("zero.csv", "v,J,energy_cm-1,uncertainty_cm-1\n0,0,0,0\n");
    for (file, expected) in [
        (&duplicate, "lines 3 and 4"),
        (&no_unit, "line 1"),
        (&zero_uncertainty, "must be positive"),
    ] {
        refused(
            &["compare", "curves/demo_morse.toml", "--measured", file],
            &[expected],
        );
    }
}

#[test]
fn near_limit_on_the_demo_points() {
    // curves/demo_points.csv was made (invented) from a curve whose tail is -C6/r^6 with
    // C6 = 2.0e7 cm-1 angstrom^6 = 4146.4 hartree bohr^6 (CODATA 2018 conversion); the
    // LeRoy-Bernstein fit of the top levels recovers it within a few per cent and agrees with
    // the solver's count.
    let (code, stdout, stderr) = run(&["near-limit", "curves/demo_points.toml", "--format", "csv"]);
    assert_eq!(code, 0, "{stderr}");
    let value = |name: &str| csv_value(&stdout, name);
    let c6 = 2.0e7 / 219474.6313632 * (1.0 / 0.529177210903f64).powi(6);
    assert!(((value("C_6") - c6) / c6).abs() < 0.05);
    assert_eq!(
        value("bound_levels_leroy_bernstein"),
        value("bound_levels_solver")
    );
    // The same from a file of (invented) measured levels, with no curve: the molecule from
    // --atoms, the power from --power. The file holds the curve's top levels, so the count
    // and C6 must agree with the curve's.
    let (code, measured, stderr) = run(&[
        "near-limit",
        "--measured",
        "curves/demo_near_limit_levels.csv",
        "--atoms",
        "39K",
        "133Cs",
        "--power",
        "6",
        "--format",
        "csv",
    ]);
    assert_eq!(code, 0, "{stderr}");
    let from_file = |name: &str| csv_value(&measured, name);
    assert_eq!(
        from_file("bound_levels_leroy_bernstein"),
        value("bound_levels_solver")
    );
    assert!(((from_file("C_6") - c6) / c6).abs() < 0.05);
}

/// The parameter rows of the JSON parameters table of `rungs fit`.
fn fitted_parameter(json: &serde_json::Value, name: &str) -> (f64, f64) {
    let row = json[0]["rows"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["parameter"] == name)
        .unwrap();
    (
        row["fitted"].as_f64().unwrap(),
        row["standard_error"].as_f64().unwrap_or(f64::NAN),
    )
}

#[test]
fn fit_of_two_isotopologues_from_transitions_and_written_curve() {
    // curves/demo_measured_lines.csv holds lines of 7LiF and 6LiF computed on the Morse curve
    // of curves/demo_morse.toml (D_e = 23823.529411788 cm-1, a = 1.6073398010 1/angstrom,
    // r_e = 1.56 angstrom; from omega_e = 900, omega_e x_e = 8.5 cm-1 by D_e = omega_e^2 /
    // (4 omega_e x_e)), rounded to 1e-4 cm-1. A fit from the guess a few per cent away must
    // land within 4 of its standard errors of them (a 4-sigma bound, common practice).
    let dir = tempfile::tempdir().unwrap();
    let written = dir.path().join("fitted.toml");
    let written_text = written.to_str().unwrap();
    let (code, stdout, stderr) = run(&[
        "fit",
        "curves/demo_morse_guess.toml",
        "--measured",
        "curves/demo_measured_lines.csv",
        "--vary",
        "well_depth,width,r_e",
        "--isotopologue",
        "6LiF=6Li,19F",
        "--isotopologue",
        "7LiF=7Li,19F",
        "--format",
        "json",
        "--write-curve",
        written_text,
    ]);
    assert_eq!(code, 0, "{stderr}");
    let json: serde_json::Value = serde_json::from_str(&stdout).unwrap();
    for (name, truth) in [
        ("well_depth", 23823.529411788),
        ("width", 1.6073398010),
        ("r_e", 1.56),
    ] {
        let (value, error) = fitted_parameter(&json, name);
        assert!(
            (value - truth).abs() < 4.0 * error,
            "{name}: {value} +- {error}, truth {truth}"
        );
    }
    // The written curve reproduces the lines of both isotopologues: compare it with them.
    let compare = |isotopologues: &[&str]| {
        let mut args = vec![
            "compare",
            written_text,
            "--measured",
            "curves/demo_measured_lines.csv",
            "--format",
            "json",
        ];
        args.extend_from_slice(isotopologues);
        let (code, stdout, stderr) = run(&args);
        assert_eq!(code, 0, "{stderr}");
        let json: serde_json::Value = serde_json::from_str(&stdout).unwrap();
        json["rows"]
            .as_array()
            .unwrap()
            .iter()
            .map(|r| r["obs_minus_calc_cm-1"].as_f64().unwrap().abs())
            .fold(0.0, f64::max)
    };
    let worst = compare(&[
        "--isotopologue",
        "6LiF=6Li,19F",
        "--isotopologue",
        "7LiF=7Li,19F",
    ]);
    // Within the lines' stated uncertainty (0.001 cm-1, invented with the demo file).
    assert!(worst < 1e-3, "{worst}");
    // Without the mapping every line is taken as 7LiF (and said so): the 6LiF lines miss by
    // tens of cm-1 (the isotope shift of the 1-0 band, about 54 cm-1 here).
    assert!(compare(&[]) > 10.0);
}

#[test]
fn fit_refusals() {
    let base = [
        "fit",
        "curves/demo_morse_guess.toml",
        "--measured",
        "curves/demo_measured_lines.csv",
    ];
    let with = |extra: &[&str]| {
        let mut args = base.to_vec();
        args.extend_from_slice(extra);
        run(&args)
    };
    let refused_fit = |extra: &[&str], expected: &[&str]| {
        let mut args = base.to_vec();
        args.extend_from_slice(extra);
        refused(&args, expected);
    };
    refused_fit(
        &["--vary", "depth"],
        &["no parameter 'depth'", "well_depth, width, r_e"],
    );
    refused_fit(
        &["--vary", "width", "--isotopologue", "6LiF"],
        &["TAG=FIRST,SECOND"],
    );
    // Stopped early: the table is printed as not converged, and the exit code says so.
    let (code, stdout, stderr) = with(&["--vary", "well_depth,width", "--max-evaluations", "2"]);
    assert_eq!(code, 3, "{stderr}");
    assert!(stdout.contains("FIT NOT CONVERGED"), "{stdout}");
    assert!(stderr.contains("did not converge"), "{stderr}");
}

#[test]
fn franck_condon_and_dipole_on_the_demo_curves() {
    // The invented demo curves: q sums over v' for v'' = 0 approach 1 when enough upper
    // levels are listed (closure; common practice), and every band has an A coefficient.
    let (code, stdout, stderr) = run(&[
        "franck-condon",
        "--lower",
        "curves/demo_morse.toml",
        "--upper",
        "curves/demo_upper.toml",
        "--term-energy",
        "14000 cm-1",
        "--v-upper",
        "0-25",
        "--v-lower",
        "0",
        "--moment",
        "curves/demo_transition_moment.toml",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "{stderr}");
    let json: serde_json::Value = serde_json::from_str(&stdout).unwrap();
    let rows = json[0]["rows"].as_array().unwrap();
    let sum: f64 = rows
        .iter()
        .map(|r| r["franck_condon"].as_f64().unwrap())
        .sum();
    assert!((sum - 1.0).abs() < 1e-6, "{sum}");
    assert!(rows
        .iter()
        .all(|r| r["einstein_A_s-1"].as_f64().unwrap() > 0.0));
    // 0-0 origin: T_e + G'(0) - G''(0) = 14000 + 300 - 1.25 - (450 - 2.125) cm-1 from the
    // Morse terms G(0) = omega_e/2 - omega_e x_e/4 of both (demo constants).
    let origin = rows[0]["origin_cm-1"].as_f64().unwrap();
    assert!(
        (origin - (14000.0 + 298.75 - 447.875)).abs() < 1e-6,
        "{origin}"
    );

    let (code, stdout, stderr) = run(&[
        "dipole",
        "curves/demo_morse.toml",
        "--dipole",
        "curves/demo_dipole.toml",
        "--format",
        "csv",
    ]);
    assert_eq!(code, 0, "{stderr}");
    assert!(stdout.starts_with("# infrared bands"), "{stdout}");
    assert!(!stdout.contains("franck_condon"));
    // J' = 1 <- J'' = 0 within v = 0: a pure rotational line at E(0, 1) - E(0, 0) (from
    // `rungs levels`), its moment the v = 0 average of mu(r), near mu(r_e) = 6.3 debye (the demo
    // dipole function's value at its r_ref).
    let (code, stdout, stderr) = run(&[
        "dipole",
        "curves/demo_morse.toml",
        "--dipole",
        "curves/demo_dipole.toml",
        "--j-upper",
        "1",
        "--j-lower",
        "0",
        "--v-upper",
        "0",
        "--v-lower",
        "0",
        "--format",
        "csv",
    ]);
    assert_eq!(code, 0, "{stderr}");
    let row: Vec<f64> = stdout
        .lines()
        .find(|l| l.starts_with("0,0,"))
        .unwrap()
        .split(',')
        .map(|x| x.parse().unwrap())
        .collect();
    let (_, levels, _) = run(&[
        "levels",
        "curves/demo_morse.toml",
        "--j",
        "0-1",
        "--format",
        "csv",
    ]);
    let energy = |j: &str| -> f64 {
        levels
            .lines()
            .find(|l| l.starts_with(&format!("0,{j},")))
            .unwrap()
            .split(',')
            .nth(2)
            .unwrap()
            .parse()
            .unwrap()
    };
    assert!(
        (row[2] - (energy("1") - energy("0"))).abs() < 1e-6,
        "{}",
        row[2]
    );
    assert!((row[3] - 6.3).abs() < 0.1, "{}", row[3]);
}

#[test]
fn band_refusals() {
    let (lower, upper) = ("curves/demo_morse.toml", "curves/demo_upper.toml");
    refused(
        &[
            "franck-condon",
            "--lower",
            lower,
            "--upper",
            "curves/h2_born_oppenheimer.toml",
        ],
        &["different nuclei"],
    );
    // A range beyond the bound levels.
    refused(
        &[
            "franck-condon",
            "--lower",
            lower,
            "--upper",
            upper,
            "--v-upper",
            "0-500",
        ],
        &["binds v = 0.."],
    );
    // Homonuclear: infrared-inactive by symmetry, said plainly.
    refused(
        &[
            "dipole",
            "curves/h2_born_oppenheimer.toml",
            "--dipole",
            "curves/demo_dipole.toml",
        ],
        &["infrared-inactive"],
    );
    // A dipole function in an unknown unit.
    let dir = tempfile::tempdir().unwrap();
    let bad = dir.path().join("bad_dipole.toml");
    std::fs::write(
        &bad,
        "[dipole]\nr_ref = \"1.5 angstrom\"\nunit = \"statC cm\"\ncoefficients = [1.0]\n",
    )
    .unwrap();
    refused(
        &["dipole", lower, "--dipole", bad.to_str().unwrap()],
        &["line 3", "debye"],
    );
}

#[test]
fn spectrum_lines_and_profile() {
    // Every profile shape has unit area (checked in src/spectrum.rs), so the area under the
    // written profile equals the sum of the line intensities, up to the Gaussian tails beyond
    // the axis ends (none here: 10 widths of margin).
    let dir = tempfile::tempdir().unwrap();
    let profile = dir.path().join("profile.csv");
    let (code, stdout, stderr) = run(&[
        "spectrum",
        "--lower",
        "curves/demo_morse.toml",
        "--dipole",
        "curves/demo_dipole.toml",
        "--v-upper",
        "1",
        "--v-lower",
        "0",
        "--temperature",
        "300 K",
        "--fwhm",
        "0.5 cm-1",
        "--profile",
        profile.to_str().unwrap(),
        "--format",
        "csv",
    ]);
    assert_eq!(code, 0, "{stderr}");
    let total: f64 = stdout
        .lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with("v_upper") && !l.is_empty())
        .map(|l| l.split(',').nth(7).unwrap().parse::<f64>().unwrap())
        .sum();
    let text = std::fs::read_to_string(&profile).unwrap();
    let points: Vec<(f64, f64)> = text
        .lines()
        .skip(1)
        .map(|l| {
            let c: Vec<f64> = l.split(',').map(|x| x.parse().unwrap()).collect();
            (c[0], c[2])
        })
        .collect();
    let step = points[1].0 - points[0].0;
    let area: f64 = points.iter().map(|p| p.1).sum::<f64>() * step;
    assert!((area / total - 1.0).abs() < 1e-6, "{area} vs {total}");
    // Both branches are there, the R branch at higher wavenumber than the P branch.
    assert!(stdout.contains(",R,") && stdout.contains(",P,"));
}
