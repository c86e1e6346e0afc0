//! The SVG chart of the record and every fitted law.

use super::*;

pub(super) const COLOURS: [RGBColor; 8] = [
    RGBColor(120, 120, 120),
    RGBColor(140, 86, 75),
    RGBColor(31, 119, 180),
    RGBColor(255, 127, 14),
    RGBColor(44, 160, 44),
    RGBColor(214, 39, 40),
    RGBColor(148, 103, 189),
    RGBColor(23, 190, 207),
];

pub(super) fn colour(law: FitLaw) -> RGBColor {
    let i = FitLaw::ALL.iter().position(|l| *l == law).unwrap_or(0);
    COLOURS[i % COLOURS.len()]
}

/// SVG chart: true stress against true plastic strain, the data and every
/// plastic-strain law; with a reach strain, a second panel runs each law out
/// to it, dashed past the end of the test. The stress axis in `units` (MPa,
/// or ksi in US units), as the table beside it.
pub fn svg(r: &FitReport, src: &Source, units: Units) -> Result<String> {
    let mut buf = String::new();
    {
        // The run-out panel reaches the schedule's strain or the farthest drawn point.
        let far = r
            .drawn
            .iter()
            .map(|d| d.strain * 1.05)
            .fold(r.reach_strain.unwrap_or(0.0), f64::max);
        let wide = far > r.strain_to();
        let size = if wide { (1200, 620) } else { (760, 620) };
        // The caution in as many lines as the width needs, so none runs off the edge.
        let caution = wrap_words(CAUTION, (size.0 as usize - 32) / CAUTION_CHAR_PX);
        let foot_px = 14 + 16 * caution.len() as u32;
        let root = SVGBackend::with_string(&mut buf, size).into_drawing_area();
        root.fill(&WHITE).map_err(plot_err)?;
        let (top, rest) = root.split_vertically(44);
        let (body, foot) = rest.split_vertically(size.1 - 44 - foot_px);
        top.draw(&Text::new(
            format!("True stress vs true plastic strain: {}", src.file),
            (16, 14),
            ("sans-serif", 20).into_font(),
        ))
        .map_err(plot_err)?;
        for (i, line) in caution.iter().enumerate() {
            foot.draw(&Text::new(
                line.as_str(),
                (16, 6 + 16 * i as i32),
                ("sans-serif", 12).into_font().color(&RGBColor(90, 90, 90)),
            ))
            .map_err(plot_err)?;
        }
        let laws: Vec<&LawFit> = r
            .fits
            .iter()
            .filter(|f| !f.law.is_total_strain_form() && f.flow_law.is_some())
            .collect();
        if wide {
            let (left, right) = body.split_horizontally(size.0 / 2);
            panel(&left, r, &laws, r.strain_to() * 1.05, false, units)?;
            panel(&right, r, &laws, far, true, units)?;
        } else {
            panel(&body, r, &laws, r.strain_to() * 1.05, false, units)?;
        }
        root.present().map_err(plot_err)?;
    }
    Ok(buf)
}

/// A generous width of one character of the 12-point caution, px (the
/// drawn font is narrower; this leaves room for a wider one).
pub(super) const CAUTION_CHAR_PX: usize = 6;

/// `text` broken at spaces into lines of at most `width` characters (a
/// longer word stands alone on its line).
pub(super) fn wrap_words(text: &str, width: usize) -> Vec<String> {
    let mut lines: Vec<String> = Vec::new();
    for word in text.split_whitespace() {
        match lines.last_mut() {
            Some(line) if line.chars().count() + 1 + word.chars().count() <= width => {
                line.push(' ');
                line.push_str(word);
            }
            _ => lines.push(word.to_string()),
        }
    }
    lines
}

/// Fewest pixels between the centres of two data dots drawn: closer points
/// are left out so that each dot drawn can be seen.
pub(super) const DOT_GAP_PX: i32 = 10;

pub(super) fn plot_err<E: std::fmt::Debug>(e: E) -> anyhow::Error {
    anyhow::anyhow!("drawing the chart: {e:?}")
}

pub(super) fn panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    r: &FitReport,
    laws: &[&LawFit],
    x_max: f64,
    reach: bool,
    units: Units,
) -> Result<()>
where
    DB::ErrorType: 'static,
{
    // Every stress is drawn in the chosen unit: MPa times `k`.
    let k = Quantity::Stress.convert(1.0, units);
    let end = r.strain_to();
    let samples = 240;
    let curve = |f: &LawFit, a: f64, b: f64| -> Vec<(f64, f64)> {
        let law = f.flow_law.as_ref();
        (0..=samples)
            .map(|i| {
                let x = a + (b - a) * i as f64 / samples as f64;
                (x, k * law.map_or(0.0, |l| l.stress_mpa(x)))
            })
            .collect()
    };
    let x0 = if reach {
        0.0
    } else {
        r.strain_from().min(end) * 0.0
    };
    let mut y_max = k * r.true_stress_mpa.iter().copied().fold(0.0, f64::max);
    if reach {
        // Scale to the hardening laws; the straight line runs off the top
        // (its label in the legend says so by its absence beyond the edge).
        for f in laws.iter().filter(|f| f.law != FitLaw::Linear) {
            if let Some(s) = f.stress_at_reach_mpa {
                y_max = y_max.max(k * s);
            }
        }
    }
    for d in r.drawn.iter().filter(|d| d.strain <= x_max) {
        y_max = y_max.max(k * d.tensile_strength_mpa);
    }
    let y_max = (y_max * 1.12).max(1.0);
    let curve = |f: &LawFit, a: f64, b: f64| -> Vec<(f64, f64)> {
        curve(f, a, b)
            .into_iter()
            .take_while(|p| p.1 <= y_max)
            .collect()
    };
    let caption = if reach {
        format!(
            "Run out to the schedule's strain {} (dashed past the test)",
            sig(x_max, 3)
        )
    } else {
        "Fitted range: data (dots) and laws".to_string()
    };
    let mut chart = ChartBuilder::on(area)
        .caption(caption, ("sans-serif", 16))
        .margin(12)
        // room for the half of the last x tick label that lies past the axis end
        .margin_right(30)
        .x_label_area_size(44)
        .y_label_area_size(62)
        .build_cartesian_2d(x0..x_max, 0.0..y_max)
        .map_err(plot_err)?;
    chart
        .configure_mesh()
        .x_desc("true plastic strain")
        .y_desc(format!("true stress, {}", Quantity::Stress.label(units)))
        .y_label_formatter(&|v| format!("{v:.0}"))
        .label_style(("sans-serif", 13))
        .axis_desc_style(("sans-serif", 15))
        .light_line_style(RGBColor(236, 236, 236))
        .draw()
        .map_err(plot_err)?;
    for f in laws {
        let c = colour(f.law);
        let style = ShapeStyle::from(&c).stroke_width(2);
        let solid_to = end.min(x_max);
        let label = if Some(f.law) == r.best {
            format!("{} (best)", f.law)
        } else {
            f.law.to_string()
        };
        chart
            .draw_series(LineSeries::new(curve(f, 0.0, solid_to), style))
            .map_err(plot_err)?
            .label(label)
            .legend(move |(x, y)| {
                PathElement::new(
                    vec![(x, y), (x + 20, y)],
                    ShapeStyle::from(&c).stroke_width(2),
                )
            });
        if reach && x_max > end {
            chart
                .draw_series(DashedLineSeries::new(curve(f, end, x_max), 8, 5, style))
                .map_err(plot_err)?;
        }
    }
    // The best law's confidence band: +-2 standard errors of its predicted
    // stress (delta method on the covariance; assumes the law is right).
    if let Some(best) = r.best.and_then(|b| r.fit(b)) {
        let c = colour(best.law);
        let n = 120;
        let pts: Vec<(f64, f64, f64)> = (0..=n)
            .filter_map(|i| {
                let x = x_max * (i as f64 / n as f64).max(1e-4);
                best.stress_with_error_mpa(x)
                    .map(|(f, se)| (x, k * f, k * se))
            })
            .collect();
        if !pts.is_empty() {
            let mut poly: Vec<(f64, f64)> = pts
                .iter()
                .map(|&(x, f, se)| (x, (f + 2.0 * se).min(y_max)))
                .collect();
            poly.extend(
                pts.iter()
                    .rev()
                    .map(|&(x, f, se)| (x, (f - 2.0 * se).clamp(0.0, y_max))),
            );
            chart
                .draw_series(std::iter::once(Polygon::new(poly, c.mix(0.18).filled())))
                .map_err(plot_err)?
                .label(format!("{} ±2 std errors (law assumed right)", best.law))
                .legend(move |(x, y)| {
                    Rectangle::new([(x, y - 4), (x + 20, y + 4)], c.mix(0.18).filled())
                });
        }
    }
    // With drawn-wire points: their best law (black, dashed) and the points (triangles).
    if let Some(wd) = r.best_with_drawn.and_then(|b| r.drawn_fit(b)) {
        let black = ShapeStyle::from(&BLACK).stroke_width(2);
        chart
            .draw_series(DashedLineSeries::new(curve(wd, 0.0, x_max), 6, 4, black))
            .map_err(plot_err)?
            .label(format!("{} with drawn-wire points", wd.law))
            .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], black));
        let inside: Vec<(f64, f64)> = r
            .drawn
            .iter()
            .map(|d| (d.strain, k * d.tensile_strength_mpa))
            .filter(|&(x, y)| x <= x_max && y <= y_max)
            .collect();
        chart
            .draw_series(
                inside
                    .iter()
                    .map(|&p| TriangleMarker::new(p, 6, BLACK.filled())),
            )
            .map_err(plot_err)?
            .label("drawn-wire tensile strength")
            .legend(|(x, y)| TriangleMarker::new((x + 10, y), 6, BLACK.filled()));
    }
    // The data over the laws, a white rim round each dot so that it stands
    // out on a curve, thinned to one dot per few pixels along the record.
    let mut dots = Vec::new();
    let mut last: Option<(i32, i32)> = None;
    for (&x, y) in r
        .plastic_strain
        .iter()
        .zip(r.true_stress_mpa.iter().map(|s| k * s))
    {
        if !(x0..=x_max).contains(&x) || !(0.0..=y_max).contains(&y) {
            continue;
        }
        let at = chart.backend_coord(&(x, y));
        let far = last.is_none_or(|(lx, ly)| {
            let (dx, dy) = (at.0 - lx, at.1 - ly);
            dx * dx + dy * dy >= DOT_GAP_PX * DOT_GAP_PX
        });
        if far {
            dots.push((x, y));
            last = Some(at);
        }
    }
    let ink = RGBColor(20, 20, 20);
    let label = if dots.len() < r.plastic_strain.len() {
        format!(
            "data ({} points, {} drawn)",
            r.plastic_strain.len(),
            dots.len()
        )
    } else {
        format!("data ({} points)", r.plastic_strain.len())
    };
    chart
        .draw_series(dots.iter().map(|&p| {
            EmptyElement::at(p)
                + Circle::new((0, 0), 3, WHITE.filled())
                + Circle::new((0, 0), 2, ink.filled())
        }))
        .map_err(plot_err)?
        .label(label)
        .legend(move |(x, y)| {
            EmptyElement::at((x + 10, y))
                + Circle::new((0, 0), 3, WHITE.filled())
                + Circle::new((0, 0), 2, ink.filled())
        });
    if reach {
        let grey = ShapeStyle::from(&RGBColor(60, 60, 60)).stroke_width(1);
        chart
            .draw_series(DashedLineSeries::new(
                vec![(end, 0.0), (end, y_max)],
                3,
                3,
                grey,
            ))
            .map_err(plot_err)?;
        chart
            .draw_series(std::iter::once(Text::new(
                format!(" end of test, {}", sig(end, 3)),
                (end, y_max * 0.04),
                ("sans-serif", 13).into_font(),
            )))
            .map_err(plot_err)?;
    }
    chart
        .configure_series_labels()
        .position(if reach {
            SeriesLabelPosition::UpperLeft
        } else {
            SeriesLabelPosition::LowerRight
        })
        .background_style(WHITE.mix(0.85))
        .border_style(RGBColor(180, 180, 180))
        .label_font(("sans-serif", 13))
        .draw()
        .map_err(plot_err)?;
    Ok(())
}
