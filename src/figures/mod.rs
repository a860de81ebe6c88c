//! Figures for reports: SVG or PNG (chosen by the file extension), drawn with plotters.
//!
//! Text is set in DejaVu Sans, compiled into the program (the `dejavu` crate) and rasterised by
//! ab_glyph, so a machine with no font packages still renders every label; SVG files carry
//! their labels as text. The house style: white background, thin dark axes, the Okabe-Ito
//! colour-blind-safe palette (M. Okabe and K. Ito, "Color Universal Design" (2008)) for lines
//! and markers, a light-to-dark blue scale for maps, axis labels with units. Sizes are given
//! in inches and dots per inch, with presets for a journal column and for slides; font sizes
//! are in points and scale with the DPI. Each figure is a plain data struct filled by
//! [`builders`] from results (display units already applied) and drawn by [`Figure::draw`].
//! Knows nothing of how the numbers were made.

pub mod builders;
mod kinds;

pub use kinds::{
    CurveFigure, DrawnLevel, FranckCondonFigure, NearLimitFigure, ResidualFigure, ResidualPoint,
    SpectrumFigure,
};

use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::Path;

/// Size and resolution of a figure.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FigureSize {
    pub width_inches: f64,
    pub height_inches: f64,
    pub dpi: f64,
    /// Size of axis labels in points (tick labels are 5/6 of it).
    pub font_points: f64,
}

impl FigureSize {
    /// One journal column: 3.4 x 2.6 inches at 300 dpi.
    pub const COLUMN: FigureSize = FigureSize {
        width_inches: 3.4,
        height_inches: 2.6,
        dpi: 300.0,
        font_points: 9.0,
    };
    /// A slide: 10 x 5.6 inches at 150 dpi.
    pub const SLIDE: FigureSize = FigureSize {
        width_inches: 10.0,
        height_inches: 5.6,
        dpi: 150.0,
        font_points: 16.0,
    };

    /// Width and height in pixels.
    pub fn pixels(&self) -> (u32, u32) {
        (
            (self.width_inches * self.dpi).round() as u32,
            (self.height_inches * self.dpi).round() as u32,
        )
    }

    /// Pixels of a length in points (1/72 inch).
    pub fn points(&self, points: f64) -> f64 {
        points * self.dpi / 72.0
    }
}

/// Problems drawing or writing a figure.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum FigureError {
    #[error("'{0}': the figure file must end in .svg or .png")]
    Extension(String),
    #[error("the figure size {0}x{1} pixels is outside 100..20000 per side; check the width, height and DPI")]
    Size(u32, u32),
    #[error("drawing the figure failed: {0}")]
    Draw(String),
    #[error("there is nothing to draw: {0}")]
    Empty(String),
}

/// The Okabe-Ito palette without its black and its yellow (too pale for thin lines on white),
/// in the order lines use it.
pub const PALETTE: [RGBColor; 6] = [
    RGBColor(0, 114, 178),   // blue
    RGBColor(213, 94, 0),    // vermillion
    RGBColor(0, 158, 115),   // bluish green
    RGBColor(230, 159, 0),   // orange
    RGBColor(86, 180, 233),  // sky blue
    RGBColor(204, 121, 167), // reddish purple
];

/// Dark grey for axes, the curve and text.
pub const INK: RGBColor = RGBColor(34, 34, 34);

/// Type sizes and line widths of one figure, in pixels.
#[derive(Debug, Clone, Copy)]
pub struct Look {
    pub size: FigureSize,
    pub label_px: f64,
    pub tick_px: f64,
    pub line_px: u32,
}

impl Look {
    fn new(size: FigureSize) -> Look {
        Look {
            size,
            label_px: size.points(size.font_points),
            tick_px: size.points(size.font_points * 5.0 / 6.0),
            line_px: size.points(size.font_points / 9.0).round().max(1.0) as u32,
        }
    }

    /// Pixels of a layout length given in points for 9-point type, scaled with the type size.
    pub fn scaled(&self, points: f64) -> f64 {
        self.size.points(points * self.size.font_points / 9.0)
    }

    /// The text style at `px` pixels.
    pub fn text(&self, px: f64) -> TextStyle<'static> {
        ("sans-serif", px).into_font().color(&INK)
    }
}

/// A figure that can draw itself on any plotters backend.
pub trait Figure {
    fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        look: &Look,
    ) -> Result<(), FigureError>;
}

/// Convert a plotters error.
pub(crate) fn drawing<E: std::error::Error + Send + Sync>(
    error: plotters::drawing::DrawingAreaErrorKind<E>,
) -> FigureError {
    FigureError::Draw(error.to_string())
}

fn register_font() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(|| {
        // The bundled font always parses; a failure would leave only missing labels.
        let _ = plotters::style::register_font(
            "sans-serif",
            FontStyle::Normal,
            dejavu::sans::regular(),
        );
    });
}

/// Draw `figure` into `path` (.svg or .png) at `size`.
pub fn save(figure: &impl Figure, path: &Path, size: FigureSize) -> Result<(), FigureError> {
    register_font();
    let (width, height) = size.pixels();
    if !(100..=20000).contains(&width) || !(100..=20000).contains(&height) {
        return Err(FigureError::Size(width, height));
    }
    let look = Look::new(size);
    let extension = path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase);
    match extension.as_deref() {
        Some("svg") => {
            let root = SVGBackend::new(path, (width, height)).into_drawing_area();
            root.fill(&WHITE).map_err(drawing)?;
            figure.draw(&root, &look)?;
            root.present().map_err(drawing)
        }
        Some("png") => {
            let root = BitMapBackend::new(path, (width, height)).into_drawing_area();
            root.fill(&WHITE).map_err(drawing)?;
            figure.draw(&root, &look)?;
            root.present().map_err(drawing)
        }
        _ => Err(FigureError::Extension(path.display().to_string())),
    }
}

/// A padded range around values (5% each side; a unit span around a single value).
pub(crate) fn padded(values: impl Iterator<Item = f64>) -> Option<(f64, f64)> {
    let (lo, hi) = values
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
            (a.min(v), b.max(v))
        });
    if !lo.is_finite() {
        return None;
    }
    let span = if hi > lo { hi - lo } else { lo.abs().max(1.0) };
    Some((lo - 0.05 * span, hi + 0.05 * span))
}
