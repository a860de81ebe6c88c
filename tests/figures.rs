//! Every figure kind, from the shipped (invented) examples, to SVG and PNG: the PNG decodes,
//! has the requested size and is not blank; the SVG parses and carries its axis labels as
//! text; with font configuration hidden, PNG labels still render (the font is compiled in).

use assert_cmd::Command;
use std::path::Path;

/// Each figure: its name, the command that draws it (without --figure), and label texts the
/// SVG must contain.
fn cases() -> Vec<(&'static str, Vec<&'static str>, Vec<&'static str>)> {
    vec![
        (
            "levels",
            vec!["levels", "curves/demo_morse.toml"],
            vec!["r / angstrom", "energy above the minimum / cm-1"],
        ),
        (
            "franck_condon",
            vec![
                "franck-condon",
                "--lower",
                "curves/demo_morse.toml",
                "--upper",
                "curves/demo_upper.toml",
                "--term-energy",
                "14000 cm-1",
                "--figure-values",
            ],
            vec!["v'' (lower)", "v' (upper)"],
        ),
        (
            "residuals",
            vec![
                "compare",
                "curves/demo_morse.toml",
                "--measured",
                "curves/demo_measured_levels.csv",
            ],
            vec!["obs - calc / cm-1"],
        ),
        (
            "near_limit",
            vec!["near-limit", "curves/demo_points.toml"],
            vec!["Delta G / cm-1", "v + 1/2"],
        ),
        (
            "spectrum",
            vec![
                "spectrum",
                "--lower",
                "curves/demo_morse.toml",
                "--upper",
                "curves/demo_upper.toml",
                "--term-energy",
                "14000 cm-1",
                "--v-upper",
                "0-1",
                "--v-lower",
                "0",
            ],
            vec!["transition energy / cm-1"],
        ),
    ]
}

fn draw(args: &[&str], figure: &Path, environment: &[(&str, &str)]) {
    let mut command = Command::cargo_bin("rungs").unwrap();
    command
        .args(args)
        .args(["--figure", figure.to_str().unwrap()]);
    for (key, value) in environment {
        command.env(key, value);
    }
    let output = command.output().unwrap();
    assert!(
        output.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&output.stderr)
    );
}

/// Mean and variance of the grey levels of a PNG region (rows from..to).
fn grey_statistics(image: &image::GrayImage, rows: std::ops::Range<u32>) -> (f64, f64) {
    let values: Vec<f64> = rows
        .flat_map(|y| (0..image.width()).map(move |x| (x, y)))
        .map(|(x, y)| f64::from(image.get_pixel(x, y).0[0]))
        .collect();
    let mean = values.iter().sum::<f64>() / values.len() as f64;
    let variance = values.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / values.len() as f64;
    (mean, variance)
}

#[test]
fn every_figure_kind_renders_to_svg_and_png() {
    let dir = tempfile::tempdir().unwrap();
    for (name, args, labels) in cases() {
        let png = dir.path().join(format!("{name}.png"));
        draw(&args, &png, &[]);
        let image = image::open(&png).unwrap().to_luma8();
        // The column preset: 3.4 x 2.6 inches at 300 dpi.
        assert_eq!((image.width(), image.height()), (1020, 780), "{name}");
        // Our own threshold for "not blank": a plain white image has variance 0; any drawn
        // axes and curves put it in the hundreds or more.
        let (_, variance) = grey_statistics(&image, 0..image.height());
        assert!(variance > 100.0, "{name}: blank PNG (variance {variance})");

        let svg = dir.path().join(format!("{name}.svg"));
        draw(&args, &svg, &[]);
        let text = std::fs::read_to_string(&svg).unwrap();
        let document = roxmltree::Document::parse(&text).unwrap();
        let texts: Vec<String> = document
            .descendants()
            .filter(|n| n.has_tag_name("text"))
            .filter_map(|n| n.text().map(str::to_string))
            .collect();
        for label in labels {
            assert!(
                texts.iter().any(|t| t.contains(label)),
                "{name}: no '{label}' among {texts:?}"
            );
        }
    }
}

#[test]
fn labels_render_without_any_font_configuration() {
    // Fontconfig pointed at nothing: the compiled-in font still draws the x-axis label, the
    // only thing in the bottom 8% of the levels figure.
    let dir = tempfile::tempdir().unwrap();
    let empty = dir.path().join("fonts.conf");
    std::fs::write(&empty, "<?xml version=\"1.0\"?><fontconfig></fontconfig>").unwrap();
    let png = dir.path().join("levels.png");
    draw(
        &["levels", "curves/demo_morse.toml"],
        &png,
        &[
            ("FONTCONFIG_FILE", empty.to_str().unwrap()),
            ("FONTCONFIG_PATH", dir.path().to_str().unwrap()),
        ],
    );
    let image = image::open(&png).unwrap().to_luma8();
    let bottom = image.height() * 92 / 100..image.height();
    let (mean, variance) = grey_statistics(&image, bottom);
    // Our own threshold: an empty white band has mean 255 and variance 0; a drawn label
    // darkens some of its pixels.
    assert!(
        mean < 254.0 && variance > 10.0,
        "no label pixels: {mean}, {variance}"
    );
}

#[test]
fn figure_size_options_and_a_bad_extension() {
    let dir = tempfile::tempdir().unwrap();
    let png = dir.path().join("slide.png");
    let output = Command::cargo_bin("rungs")
        .unwrap()
        .args([
            "levels",
            "curves/demo_morse.toml",
            "--figure-size",
            "slide",
            "--dpi",
            "100",
        ])
        .args(["--figure", png.to_str().unwrap()])
        .output()
        .unwrap();
    assert!(output.status.success());
    let image = image::open(&png).unwrap();
    // The slide preset, 10 x 5.6 inches, at the 100 dpi asked for.
    assert_eq!((image.width(), image.height()), (1000, 560));
    let output = Command::cargo_bin("rungs")
        .unwrap()
        .args(["levels", "curves/demo_morse.toml", "--figure", "levels.pdf"])
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&output.stderr).contains(".svg or .png"));
}
