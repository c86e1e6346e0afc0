//! The pieces every chart shares (plotters, SVG backend): the colours, the
//! error every drawing call maps to, the page title, the axis of whole step
//! or block numbers, the dashed level lines labelled over the last bar, the
//! legend box and a bar. `svg.rs` (the schedule) and `risk.rs` (the fan
//! chart) draw with them, so the two charts look alike.

use anyhow::{anyhow, Result};
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Within the limits (bars), the median and band (risk).
pub const OK: RGBColor = RGBColor(31, 119, 180);
/// Near a limit; the warn line.
pub const WARN: RGBColor = RGBColor(230, 145, 20);
/// Over a limit; the max line.
pub const OVER: RGBColor = RGBColor(200, 30, 30);
/// Anneals and the caution.
pub const GREY: RGBColor = RGBColor(150, 150, 150);
/// The break line of the risk chart.
pub const DARK_GREY: RGBColor = RGBColor(110, 110, 110);

/// A drawing area of an SVG chart.
pub type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;

/// A chart on `f64` axes.
pub type Chart<'a, 'b> =
    ChartContext<'a, SVGBackend<'b>, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

/// The error of a drawing call, in the words every chart uses.
pub fn err<E: std::fmt::Display>(e: E) -> anyhow::Error {
    anyhow!("drawing the chart: {e}")
}

/// The page's title: the file's, or `Schedule` when it has none.
pub fn page_title(title: &str) -> String {
    if title.is_empty() {
        "Schedule".to_string()
    } else {
        title.to_string()
    }
}

/// The label of `x` on an axis of whole numbers 1..=n: the number at a
/// whole `x`, nothing between them or past `n` (the label room).
pub fn whole_number(x: f64, n: f64) -> String {
    let k = x.round();
    if (x - k).abs() < 1e-6 && k >= 1.0 && k <= n {
        format!("{k:.0}")
    } else {
        String::new()
    }
}

/// The mesh of a chart whose x axis counts steps or blocks: `labels` tick
/// places, each labelled by `label`, and no light grid.
pub fn count_mesh(
    chart: &mut Chart<'_, '_>,
    x_desc: &str,
    y_desc: &str,
    labels: usize,
    label: &dyn Fn(&f64) -> String,
) -> Result<()> {
    chart
        .configure_mesh()
        .x_desc(x_desc)
        .y_desc(y_desc)
        .x_labels(labels)
        .x_label_formatter(label)
        .light_line_style(WHITE.mix(0.0))
        .draw()
        .map_err(err)
}

/// Dashed horizontal lines at each `(level, colour, label)` from x = 0.5 to
/// `x_end`, each labelled with its right end at `(label_x, level + label_dy)`
/// (so a label sits inside the plot, over the last slot, and needs no empty
/// slot of its own past the last step). Draw them after the bars so that a
/// tall bar cannot hide a label.
pub fn level_lines(
    chart: &mut Chart<'_, '_>,
    levels: Vec<(f64, RGBColor, String)>,
    x_end: f64,
    label_x: f64,
    label_dy: f64,
) -> Result<()> {
    for (level, colour, label) in levels {
        chart
            .draw_series(DashedLineSeries::new(
                vec![(0.5, level), (x_end, level)],
                10,
                5,
                colour.stroke_width(2),
            ))
            .map_err(err)?;
        chart
            .draw_series(std::iter::once(Text::new(
                label,
                (label_x, level + label_dy),
                ("sans-serif", 13)
                    .into_font()
                    .color(&colour)
                    .pos(Pos::new(HPos::Right, VPos::Bottom)),
            )))
            .map_err(err)?;
    }
    Ok(())
}

/// The warn and max lines of the draw ratio, for [`level_lines`].
pub fn limit_lines(warn: f64, max: f64) -> Vec<(f64, RGBColor, String)> {
    vec![
        (warn, WARN, format!("warn {warn}")),
        (max, OVER, format!("max {max}")),
    ]
}

/// A dashed vertical grey line at `x` from 0 to `top`, labelled `anneal` at `label_at`.
pub fn anneal_line(
    chart: &mut Chart<'_, '_>,
    x: f64,
    top: f64,
    label_at: (f64, f64),
) -> Result<()> {
    chart
        .draw_series(DashedLineSeries::new(
            vec![(x, 0.0), (x, top)],
            6,
            4,
            GREY.stroke_width(2),
        ))
        .map_err(err)?;
    chart
        .draw_series(std::iter::once(Text::new(
            "anneal",
            label_at,
            ("sans-serif", 13).into_font().color(&GREY),
        )))
        .map_err(err)?;
    Ok(())
}

/// The legend box at `position`.
pub fn legend<'a, 'b: 'a>(chart: &mut Chart<'a, 'b>, position: SeriesLabelPosition) -> Result<()> {
    chart
        .configure_series_labels()
        .position(position)
        .background_style(WHITE.mix(0.85))
        .border_style(BLACK)
        .draw()
        .map_err(err)
}

/// A bar 0.6 wide centred on `x`, from 0 to `y`.
pub fn bar(x: f64, y: f64, fill: ShapeStyle) -> Rectangle<(f64, f64)> {
    Rectangle::new([(x - 0.3, 0.0), (x + 0.3, y)], fill)
}

/// The margin and label areas of a chart, px.
#[derive(Debug, Clone, Copy)]
pub struct Frame {
    /// Margin round the chart.
    pub margin: u32,
    /// Height of the x labels' area.
    pub x_labels: u32,
    /// Width of the y labels' area.
    pub y_labels: u32,
}

/// A chart across the page.
pub const WIDE: Frame = Frame {
    margin: 12,
    x_labels: 36,
    y_labels: 56,
};

/// A chart in half the page's width.
pub const HALF: Frame = Frame {
    margin: 10,
    x_labels: 34,
    y_labels: 48,
};

/// A chart on `area` with `caption` (`caption_px` high) in `frame`, over
/// `x` and `y`.
pub fn framed<'a, 'b>(
    area: &'a Area<'b>,
    caption: &str,
    caption_px: u32,
    frame: Frame,
    x: std::ops::Range<f64>,
    y: std::ops::Range<f64>,
) -> Result<Chart<'a, 'b>> {
    ChartBuilder::on(area)
        .caption(caption, ("sans-serif", caption_px))
        .margin(frame.margin)
        .x_label_area_size(frame.x_labels)
        .y_label_area_size(frame.y_labels)
        .build_cartesian_2d(x, y)
        .map_err(err)
}

/// Height of the strip the caution takes at the foot of a chart, px.
pub const CAUTION_FOOT_PX: u32 = 40;

/// The caution along the foot of a chart, in two lines (it is wider than
/// the chart in one), large and dark enough to read on a print: every
/// chart a report writes carries it, as every table does.
pub fn caution_foot(foot: &Area<'_>, caution: &str) -> Result<()> {
    let (first, rest) = match caution.split_once(". ") {
        Some((a, b)) => (format!("{a}."), b.to_string()),
        None => (caution.to_string(), String::new()),
    };
    for (k, line) in [first, rest].into_iter().enumerate() {
        foot.draw(&Text::new(
            line,
            (8, 4 + 16 * k as i32),
            ("sans-serif", 13).into_font().color(&DARK_GREY),
        ))
        .map_err(err)?;
    }
    Ok(())
}
