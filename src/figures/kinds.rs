//! The figure kinds: what each shows and how it is laid out.

use super::{drawing, padded, Figure, FigureError, Look, INK, PALETTE};
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;

/// An axis frame with labels in the house style; returns the chart to draw on.
fn frame<'a, DB: DrawingBackend>(
    area: &'a DrawingArea<DB, Shift>,
    look: &Look,
    x: (f64, f64),
    y: (f64, f64),
    labels: (&str, &str),
) -> Result<ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>, FigureError> {
    frame_with(area, look, x, y, labels, false)
}

/// As [`frame`]; with `integer_x` only whole-number x ticks are labelled (quantum numbers).
fn frame_with<'a, DB: DrawingBackend>(
    area: &'a DrawingArea<DB, Shift>,
    look: &Look,
    x: (f64, f64),
    y: (f64, f64),
    labels: (&str, &str),
    integer_x: bool,
) -> Result<ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>, FigureError> {
    let points = |p: f64| look.scaled(p).round() as u32;
    let mut chart = ChartBuilder::on(area)
        .margin(points(8.0))
        .x_label_area_size(points(26.0))
        .y_label_area_size(points(44.0))
        .build_cartesian_2d(x.0..x.1, y.0..y.1)
        .map_err(drawing)?;
    chart
        .configure_mesh()
        .disable_mesh()
        .x_desc(labels.0)
        .y_desc(labels.1)
        .x_labels(6)
        .y_labels(6)
        .x_label_formatter(&|v| {
            if integer_x && (v - v.round()).abs() > 1e-9 {
                String::new()
            } else {
                tick(*v)
            }
        })
        .y_label_formatter(&|v| tick(*v))
        .label_style(look.text(look.tick_px))
        .axis_desc_style(look.text(look.label_px))
        .axis_style(INK.stroke_width(look.line_px))
        .draw()
        .map_err(drawing)?;
    Ok(chart)
}

/// A tick label: at most 4 significant digits, no trailing zeros, exponent form for very
/// large or small magnitudes.
fn tick(value: f64) -> String {
    if value == 0.0 {
        return "0".into();
    }
    let magnitude = value.abs();
    if !(1e-4..1e6).contains(&magnitude) {
        return format!("{value:.2e}");
    }
    let decimals = (2 - magnitude.log10().floor() as i32).max(0) as usize;
    let text = format!("{value:.decimals$}");
    if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        text
    }
}

/// A dashed horizontal line from x.0 to x.1 at height y.
fn dashed<DB: DrawingBackend>(
    chart: &mut ChartContext<DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
    x: (f64, f64),
    y: f64,
    style: ShapeStyle,
) -> Result<(), FigureError> {
    let dashes = 60;
    let width = (x.1 - x.0) / f64::from(dashes);
    chart
        .draw_series((0..dashes).step_by(2).map(|k| {
            let start = x.0 + width * f64::from(k);
            PathElement::new(vec![(start, y), (start + width, y)], style)
        }))
        .map_err(drawing)?;
    Ok(())
}

/// One level drawn on the curve figure.
#[derive(Debug, Clone, PartialEq)]
pub struct DrawnLevel {
    pub v: u32,
    pub energy: f64,
    pub inner: f64,
    pub outer: f64,
    /// (r, psi) with psi already scaled into energy units about the level line.
    pub wavefunction: Vec<(f64, f64)>,
}

/// The curve with its levels drawn between their turning points and their wavefunctions on
/// the level lines; the dissociation limit dashed.
#[derive(Debug, Clone, PartialEq)]
pub struct CurveFigure {
    pub curve: Vec<(f64, f64)>,
    pub levels: Vec<DrawnLevel>,
    pub limit: Option<f64>,
    pub x_range: (f64, f64),
    pub y_range: (f64, f64),
    pub x_label: String,
    pub y_label: String,
}

impl Figure for CurveFigure {
    fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        look: &Look,
    ) -> Result<(), FigureError> {
        let mut chart = frame(
            root,
            look,
            self.x_range,
            self.y_range,
            (&self.x_label, &self.y_label),
        )?;
        let line = look.line_px;
        let inside = |&(x, y): &(f64, f64)| {
            (self.x_range.0..=self.x_range.1).contains(&x) && y <= self.y_range.1
        };
        chart
            .draw_series(LineSeries::new(
                self.curve.iter().copied().filter(inside),
                INK.stroke_width(line),
            ))
            .map_err(drawing)?;
        if let Some(limit) = self.limit.filter(|l| *l <= self.y_range.1) {
            dashed(&mut chart, self.x_range, limit, INK.stroke_width(line))?;
            let x = self.x_range.1 - 0.02 * (self.x_range.1 - self.x_range.0);
            let gap = 0.015 * (self.y_range.1 - self.y_range.0);
            chart
                .draw_series(std::iter::once(Text::new(
                    "dissociation limit".to_string(),
                    (x, limit + gap),
                    look.text(look.tick_px)
                        .pos(plotters::style::text_anchor::Pos::new(
                            plotters::style::text_anchor::HPos::Right,
                            plotters::style::text_anchor::VPos::Bottom,
                        )),
                )))
                .map_err(drawing)?;
        }
        for (k, level) in self.levels.iter().enumerate() {
            let colour = PALETTE[k % PALETTE.len()];
            chart
                .draw_series(std::iter::once(PathElement::new(
                    vec![(level.inner, level.energy), (level.outer, level.energy)],
                    colour.mix(0.6).stroke_width(line),
                )))
                .map_err(drawing)?;
            chart
                .draw_series(LineSeries::new(
                    level.wavefunction.iter().copied().filter(inside),
                    colour.stroke_width(line),
                ))
                .map_err(drawing)?;
        }
        Ok(())
    }
}

/// q(v', v'') as a map with a colour scale, optionally with the values in the cells.
#[derive(Debug, Clone, PartialEq)]
pub struct FranckCondonFigure {
    pub upper: Vec<u32>,
    pub lower: Vec<u32>,
    /// q[upper index][lower index].
    pub values: Vec<Vec<f64>>,
    pub show_values: bool,
}

/// The house map scale: near-white to navy through the palette's blues, t in [0, 1].
fn map_colour(t: f64) -> RGBColor {
    let anchors = [
        (247.0, 251.0, 255.0),
        (86.0, 180.0, 233.0),
        (0.0, 114.0, 178.0),
        (8.0, 37.0, 84.0),
    ];
    let t = t.clamp(0.0, 1.0) * (anchors.len() - 1) as f64;
    let k = (t.floor() as usize).min(anchors.len() - 2);
    let f = t - k as f64;
    let (a, b) = (anchors[k], anchors[k + 1]);
    let mix = |p: f64, q: f64| (p + (q - p) * f).round() as u8;
    RGBColor(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
}

impl Figure for FranckCondonFigure {
    fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        look: &Look,
    ) -> Result<(), FigureError> {
        if self.upper.is_empty() || self.lower.is_empty() {
            return Err(FigureError::Empty("no bands".into()));
        }
        let (width, _) = root.dim_in_pixel();
        let bar_width = look.scaled(64.0).round() as u32;
        let (map_area, bar_area) = root.split_horizontally(width.saturating_sub(bar_width));
        let highest = self
            .values
            .iter()
            .flatten()
            .fold(0.0f64, |m, &q| m.max(q))
            .max(1e-300);
        let (n_low, n_up) = (self.lower.len() as f64, self.upper.len() as f64);
        let lower = self.lower.clone();
        let upper = self.upper.clone();
        let points = |p: f64| look.scaled(p).round() as u32;
        let mut chart = ChartBuilder::on(&map_area)
            .margin(points(8.0))
            .x_label_area_size(points(24.0))
            .y_label_area_size(points(30.0))
            .build_cartesian_2d(-0.5..n_low - 0.5, -0.5..n_up - 0.5)
            .map_err(drawing)?;
        let index_label = |values: &[u32], x: f64| {
            let k = x.round();
            if (x - k).abs() < 1e-6 && k >= 0.0 && (k as usize) < values.len() {
                values[k as usize].to_string()
            } else {
                String::new()
            }
        };
        chart
            .configure_mesh()
            .disable_mesh()
            .x_desc("v'' (lower)")
            .y_desc("v' (upper)")
            .x_labels(self.lower.len().min(20))
            .y_labels(self.upper.len().min(20))
            .x_label_formatter(&|x| index_label(&lower, *x))
            .y_label_formatter(&|y| index_label(&upper, *y))
            .label_style(look.text(look.tick_px))
            .axis_desc_style(look.text(look.label_px))
            .axis_style(INK.stroke_width(look.line_px))
            .draw()
            .map_err(drawing)?;
        for (i, row) in self.values.iter().enumerate() {
            for (k, &q) in row.iter().enumerate() {
                let (x, y) = (k as f64, i as f64);
                chart
                    .draw_series(std::iter::once(Rectangle::new(
                        [(x - 0.5, y - 0.5), (x + 0.5, y + 0.5)],
                        map_colour(q / highest).filled(),
                    )))
                    .map_err(drawing)?;
                if self.show_values {
                    let ink = if q / highest > 0.5 { WHITE } else { INK };
                    chart
                        .draw_series(std::iter::once(Text::new(
                            format!("{q:.2}"),
                            (x, y),
                            ("sans-serif", look.scaled(6.0))
                                .into_font()
                                .color(&ink)
                                .pos(plotters::style::text_anchor::Pos::new(
                                    plotters::style::text_anchor::HPos::Center,
                                    plotters::style::text_anchor::VPos::Center,
                                )),
                        )))
                        .map_err(drawing)?;
                }
            }
        }
        // The colour bar: q from 0 to its largest value.
        let mut bar = ChartBuilder::on(&bar_area)
            .margin_top(points(8.0))
            .margin_bottom(points(32.0))
            .margin_right(points(4.0))
            .y_label_area_size(points(40.0))
            .build_cartesian_2d(0.0..1.0, 0.0..highest)
            .map_err(drawing)?;
        bar.configure_mesh()
            .disable_mesh()
            .disable_x_axis()
            .y_desc("q(v', v'')")
            .y_labels(5)
            .y_label_formatter(&|v| tick(*v))
            .label_style(look.text(look.tick_px))
            .axis_desc_style(look.text(look.label_px))
            .axis_style(INK.stroke_width(look.line_px))
            .draw()
            .map_err(drawing)?;
        let steps = 100;
        bar.draw_series((0..steps).map(|k| {
            let (a, b) = (
                highest * k as f64 / steps as f64,
                highest * (k + 1) as f64 / steps as f64,
            );
            Rectangle::new(
                [(0.0, a), (1.0, b)],
                map_colour(k as f64 / (steps - 1) as f64).filled(),
            )
        }))
        .map_err(drawing)?;
        Ok(())
    }
}

/// One residual: its level (the upper one of a transition), obs - calc, its uncertainty,
/// and its group (the isotopologue tag).
#[derive(Debug, Clone, PartialEq)]
pub struct ResidualPoint {
    pub v: u32,
    pub j: u32,
    pub residual: f64,
    pub uncertainty: f64,
    pub group: String,
}

/// obs - calc with error bars against v and, when several J were measured, against J beside
/// it; one colour per group, with a key when there are several; the zero line dashed.
#[derive(Debug, Clone, PartialEq)]
pub struct ResidualFigure {
    pub points: Vec<ResidualPoint>,
    pub y_label: String,
}

impl ResidualFigure {
    fn panel<DB: DrawingBackend>(
        &self,
        area: &DrawingArea<DB, Shift>,
        look: &Look,
        x_of: &dyn Fn(&ResidualPoint) -> f64,
        x_label: &str,
        with_key: bool,
    ) -> Result<(), FigureError> {
        let x = padded(self.points.iter().map(x_of))
            .ok_or_else(|| FigureError::Empty("no residuals".into()))?;
        let y = padded(
            self.points
                .iter()
                .flat_map(|p| [p.residual - p.uncertainty, p.residual + p.uncertainty, 0.0]),
        )
        .unwrap_or((-1.0, 1.0));
        let mut chart = frame_with(area, look, x, y, (x_label, &self.y_label), true)?;
        let thin = (look.line_px / 2).max(1);
        dashed(&mut chart, x, 0.0, INK.mix(0.7).stroke_width(thin))?;
        let mut groups: Vec<&str> = self.points.iter().map(|p| p.group.as_str()).collect();
        groups.sort_unstable();
        groups.dedup();
        let radius = look.scaled(2.0).round() as i32;
        for (k, group) in groups.iter().enumerate() {
            let colour = PALETTE[k % PALETTE.len()];
            let members: Vec<&ResidualPoint> =
                self.points.iter().filter(|p| p.group == *group).collect();
            chart
                .draw_series(members.iter().map(|p| {
                    PathElement::new(
                        vec![
                            (x_of(p), p.residual - p.uncertainty),
                            (x_of(p), p.residual + p.uncertainty),
                        ],
                        colour.mix(0.5).stroke_width(thin),
                    )
                }))
                .map_err(drawing)?;
            chart
                .draw_series(
                    members
                        .iter()
                        .map(|p| Circle::new((x_of(p), p.residual), radius, colour.filled())),
                )
                .map_err(drawing)?
                .label(group.to_string())
                .legend(move |(px, py)| Circle::new((px, py), radius, colour.filled()));
        }
        if with_key && groups.len() > 1 {
            chart
                .configure_series_labels()
                .label_font(look.text(look.tick_px))
                .border_style(INK.mix(0.3))
                .background_style(WHITE.mix(0.9))
                .position(SeriesLabelPosition::LowerRight)
                .draw()
                .map_err(drawing)?;
        }
        Ok(())
    }
}

impl Figure for ResidualFigure {
    fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        look: &Look,
    ) -> Result<(), FigureError> {
        let several_j = self.points.iter().any(|p| p.j != self.points[0].j);
        let by_v = |p: &ResidualPoint| f64::from(p.v);
        let by_j = |p: &ResidualPoint| f64::from(p.j);
        if several_j {
            let panels = root.split_evenly((1, 2));
            self.panel(&panels[0], look, &by_v, "v", false)?;
            self.panel(&panels[1], look, &by_j, "J", true)
        } else {
            self.panel(root, look, &by_v, "v", true)
        }
    }
}

/// The LeRoy-Bernstein view beside the Birge-Sponer view.
#[derive(Debug, Clone, PartialEq)]
pub struct NearLimitFigure {
    /// (v, (D - E)^((n-2)/(2n))) of the levels used.
    pub transformed: Vec<(f64, f64)>,
    /// The fitted line: (v_D, slope); y = slope (v_D - v).
    pub line: (f64, f64),
    pub transformed_label: String,
    /// (v + 1/2, Delta G).
    pub spacings: Vec<(f64, f64)>,
    pub spacing_label: String,
}

impl Figure for NearLimitFigure {
    fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        look: &Look,
    ) -> Result<(), FigureError> {
        let panels = root.split_evenly((1, 2));
        let radius = look.scaled(2.2).round() as i32;
        let line = look.line_px;
        let (v_d, slope) = self.line;
        let x = padded(self.transformed.iter().map(|p| p.0).chain([v_d]))
            .ok_or_else(|| FigureError::Empty("no levels".into()))?;
        let y = padded(self.transformed.iter().map(|p| p.1).chain([0.0])).unwrap_or((0.0, 1.0));
        let mut left = frame(&panels[0], look, x, y, ("v", &self.transformed_label))?;
        left.draw_series(LineSeries::new(
            [x.0, v_d].map(|v| (v, slope * (v_d - v))),
            PALETTE[1].stroke_width(line),
        ))
        .map_err(drawing)?;
        left.draw_series(
            self.transformed
                .iter()
                .map(|&p| Circle::new(p, radius, PALETTE[0].filled())),
        )
        .map_err(drawing)?;
        let x = padded(self.spacings.iter().map(|p| p.0))
            .ok_or_else(|| FigureError::Empty("fewer than two levels".into()))?;
        let y = padded(self.spacings.iter().map(|p| p.1).chain([0.0])).unwrap_or((0.0, 1.0));
        let mut right = frame(&panels[1], look, x, y, ("v + 1/2", &self.spacing_label))?;
        right
            .draw_series(LineSeries::new(
                self.spacings.iter().copied(),
                PALETTE[0].mix(0.5).stroke_width(line),
            ))
            .map_err(drawing)?;
        right
            .draw_series(
                self.spacings
                    .iter()
                    .map(|&p| Circle::new(p, radius, PALETTE[0].filled())),
            )
            .map_err(drawing)?;
        Ok(())
    }
}

/// The broadened profile upward and the stick spectrum mirrored downward, both scaled to a
/// peak of 1, so neither hides the other.
#[derive(Debug, Clone, PartialEq)]
pub struct SpectrumFigure {
    pub sticks: Vec<(f64, f64)>,
    pub profile: Vec<(f64, f64)>,
    pub x_label: String,
}

impl Figure for SpectrumFigure {
    fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        look: &Look,
    ) -> Result<(), FigureError> {
        let x = padded(self.sticks.iter().chain(&self.profile).map(|p| p.0))
            .ok_or_else(|| FigureError::Empty("no lines".into()))?;
        let has_profile = !self.profile.is_empty();
        let y = if has_profile {
            (-1.1, 1.1)
        } else {
            (0.0, 1.08)
        };
        let label = if has_profile {
            "relative intensity (profile up, lines down)"
        } else {
            "relative intensity"
        };
        let mut chart = frame(root, look, x, y, (&self.x_label, label))?;
        let thin = (look.line_px / 2).max(1);
        let sign = if has_profile { -1.0 } else { 1.0 };
        chart
            .draw_series(self.sticks.iter().map(|&(position, intensity)| {
                PathElement::new(
                    vec![(position, 0.0), (position, sign * intensity)],
                    PALETTE[0].stroke_width(thin),
                )
            }))
            .map_err(drawing)?;
        let peak = self.profile.iter().map(|p| p.1).fold(0.0f64, f64::max);
        if peak > 0.0 {
            chart
                .draw_series(LineSeries::new(
                    self.profile.iter().map(|&(x, y)| (x, y / peak)),
                    PALETTE[1].stroke_width(thin),
                ))
                .map_err(drawing)?;
            chart
                .draw_series(std::iter::once(PathElement::new(
                    vec![(x.0, 0.0), (x.1, 0.0)],
                    INK.stroke_width(thin),
                )))
                .map_err(drawing)?;
        }
        Ok(())
    }
}
