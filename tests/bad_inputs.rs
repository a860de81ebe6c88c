//! Every file in tests/inputs/bad/ must fail cleanly: exit code 2, a one-line message that
//! names the file and contains the text after `# expect:` in the file, and no panic.

use assert_cmd::Command;
use std::path::Path;

#[test]
fn every_bad_input_fails_with_its_message() {
    let mut checked = 0;
    let mut entries: Vec<_> = std::fs::read_dir("tests/inputs/bad")
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    entries.sort();
    for path in entries
        .iter()
        .filter(|p| p.extension().is_some_and(|e| e == "toml"))
    {
        let text = std::fs::read_to_string(path).unwrap();
        let expected = text
            .lines()
            .find_map(|l| l.strip_prefix("# expect: "))
            .unwrap_or_else(|| panic!("{} has no '# expect:' line", path.display()))
            .trim()
            .to_string();
        let output = Command::cargo_bin("rungs")
            .unwrap()
            .arg("inspect")
            .arg(path)
            .output()
            .unwrap();
        let stderr = String::from_utf8_lossy(&output.stderr);
        assert_eq!(
            output.status.code(),
            Some(2),
            "{}: {stderr}",
            path.display()
        );
        assert!(
            stderr.contains(&expected),
            "{}: expected '{expected}' in: {stderr}",
            path.display()
        );
        assert!(!stderr.contains("panicked"), "{}: {stderr}", path.display());
        let stem = path.file_stem().unwrap().to_string_lossy().to_string();
        assert!(
            stderr.contains(&stem) || stderr.contains(".csv"),
            "{}: message names no file: {stderr}",
            path.display()
        );
        checked += 1;
    }
    assert!(checked >= 15, "only {checked} bad inputs");
}

#[test]
fn line_numbers_point_at_the_fault() {
    let run = |file: &str| {
        let output = Command::cargo_bin("rungs")
            .unwrap()
            .arg("inspect")
            .arg(Path::new("tests/inputs/bad").join(file))
            .output()
            .unwrap();
        String::from_utf8_lossy(&output.stderr).to_string()
    };
    // omega_e = 2990.9 stands on line 6 of missing_unit.toml.
    assert!(
        run("missing_unit.toml").contains("line 6"),
        "{}",
        run("missing_unit.toml")
    );
    // 'abc' stands on line 4 of non_numeric.csv.
    assert!(run("non_numeric.toml").contains("non_numeric.csv, line 4"));
    // The repeated r = 0.7 stands on lines 4 and 5 of duplicate_r.csv.
    assert!(run("duplicate_r.toml").contains("lines 4 and 5"));
}
