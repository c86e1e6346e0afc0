//! The schedule chart (plotters, SVG backend): draw ratio per pass against
//! the warn and max lines, and flow stress against the total strain drawn,
//! with each pass's exit and each anneal marked; on a machine, the motor
//! load per block against 100 % and the wire temperature in and out of each
//! die against the limit. The caution runs along the foot. Stress, speed
//! and temperature are drawn in the report's units (`--units`), each axis
//! and title naming its unit.

use anyhow::Result;
use coldpass::evaluation::{ScheduleReport, StepKind};
use coldpass::machine::MachineRun;
use coldpass::schedule::ScheduleFile;
use plotters::prelude::*;

use super::chart::{
    anneal_line, bar, caution_foot, count_mesh, err, framed, legend, level_lines, limit_lines,
    page_title, whole_number, Area, Frame, CAUTION_FOOT_PX, HALF, OK, OVER, WARN, WIDE,
};
use super::units::{Quantity, Units};

/// Draws the chart of a checked schedule with its stresses, speeds and
/// temperatures in `units` (MPa or ksi, m/s or ft/min, C or F; the factors
/// of [`Quantity::convert`], NIST SP 811); draw ratios and loads in % are
/// pure numbers and stay as they are.
pub fn schedule_in(rep: &ScheduleReport, file: &ScheduleFile, units: Units) -> Result<Vec<u8>> {
    let mut buf = String::new();
    {
        let height = if rep.machine.is_some() { 1120 } else { 780 };
        let root = SVGBackend::with_string(&mut buf, (960, height)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let title = page_title(&rep.title);
        let root = root
            .titled(
                &format!("{title}  (method: {})", rep.method),
                ("sans-serif", 20),
            )
            .map_err(err)?;
        let (body, foot) = root.split_vertically(root.dim_in_pixel().1 - CAUTION_FOOT_PX);
        let (upper, lower) = body.split_vertically(350);
        draw_ratios(rep, &upper)?;
        match &rep.machine {
            Some(m) => {
                let (flow, machine) = lower.split_vertically(386);
                draw_flow(rep, file, &flow, units)?;
                let (load, heat) = machine.split_horizontally(480);
                draw_load(m, &load, units)?;
                draw_heat(m, &heat, units)?;
            }
            None => draw_flow(rep, file, &lower, units)?,
        }
        caution_foot(&foot, &rep.caution)?;
        root.present().map_err(err)?;
    }
    Ok(buf.into_bytes())
}

fn draw_ratios(rep: &ScheduleReport, area: &Area<'_>) -> Result<()> {
    let n = rep.passes.len() as f64;
    let top = rep
        .passes
        .iter()
        .filter_map(|r| r.draw_ratio)
        .fold(rep.draw_ratio_max, f64::max)
        * 1.4;
    // One slot per pass and no more: the warn and max lines are labelled
    // over the last slot, so no empty, unlabelled slot follows the last step.
    let mut chart = framed(
        area,
        "Draw ratio per pass (drawing stress / exit flow stress)",
        16,
        WIDE,
        0.5f64..n + 0.5,
        0f64..top,
    )?;
    // Only the step numbers: no tick between steps.
    count_mesh(
        &mut chart,
        "step",
        "draw ratio",
        rep.passes.len() + 1,
        &|x| whole_number(*x, n),
    )?;
    for r in rep.passes.iter().filter(|r| r.kind == StepKind::Anneal) {
        let x = r.step as f64;
        anneal_line(&mut chart, x, top, (x + 0.08, top * 0.95))?;
    }
    let status = |d: f64| {
        if d > rep.draw_ratio_max {
            OVER
        } else if d > rep.draw_ratio_warn {
            WARN
        } else {
            OK
        }
    };
    let points: Vec<(f64, f64, RGBColor)> = rep
        .passes
        .iter()
        .filter_map(|r| r.draw_ratio.map(|d| (r.step as f64, d, status(d))))
        .collect();
    chart
        .draw_series(
            points
                .iter()
                .map(|&(x, y, c)| bar(x, y, c.mix(0.85).filled())),
        )
        .map_err(err)?;
    // The warn and max lines are labelled at the right end, over the bars, so
    // the legend only has to explain the bar colours.
    level_lines(
        &mut chart,
        limit_lines(rep.draw_ratio_warn, rep.draw_ratio_max),
        n + 0.5,
        n + 0.48,
        top * 0.01,
    )?;
    // Legend entries for the three bar colours (empty series carry the labels).
    for (colour, label) in [
        (OK, "within limits"),
        (WARN, "near the limit"),
        (OVER, "over the limit"),
    ] {
        chart
            .draw_series(std::iter::empty::<Rectangle<(f64, f64)>>())
            .map_err(err)?
            .label(label)
            .legend(move |(x, y)| Rectangle::new([(x, y - 5), (x + 12, y + 5)], colour.filled()));
    }
    legend(&mut chart, SeriesLabelPosition::UpperLeft)
}

fn draw_flow(
    rep: &ScheduleReport,
    file: &ScheduleFile,
    area: &Area<'_>,
    units: Units,
) -> Result<()> {
    // x: total strain drawn since the start (never reset); y: flow stress in `units`.
    let stress = |mpa: f64| Quantity::Stress.convert(mpa, units);
    let mut segments: Vec<Vec<(f64, f64)>> = Vec::new();
    let mut exits: Vec<(f64, f64, usize)> = Vec::new();
    let mut anneals: Vec<f64> = Vec::new();
    let mut law = &file.material.flow;
    let mut x = 0.0;
    for r in &rep.passes {
        match r.kind {
            StepKind::Anneal => {
                law = file.annealed_law();
                anneals.push(x);
            }
            StepKind::Draw => {
                let e = r.pass_strain.unwrap_or(0.0);
                let seg: Vec<(f64, f64)> = (0..=24)
                    .map(|k| {
                        let t = e * k as f64 / 24.0;
                        (x + t, stress(law.stress_mpa(r.strain_before + t)))
                    })
                    .collect();
                segments.push(seg);
                x += e;
                exits.push((x, stress(r.flow_stress_exit_mpa), r.step));
            }
        }
    }
    let ymax = segments.iter().flatten().map(|p| p.1).fold(0.0, f64::max) * 1.12;
    let xmax = x.max(1e-6) * 1.03;
    let mut chart = framed(
        area,
        "Flow stress against total strain drawn",
        16,
        Frame {
            x_labels: 40,
            ..WIDE
        },
        0f64..xmax,
        0f64..ymax.max(1.0),
    )?;
    chart
        .configure_mesh()
        .x_desc("total true strain drawn from the start")
        .y_desc(format!("flow stress, {}", Quantity::Stress.label(units)))
        .y_label_formatter(&|y| format!("{:.0}", y))
        .light_line_style(WHITE.mix(0.0))
        .draw()
        .map_err(err)?;
    for &a in &anneals {
        anneal_line(&mut chart, a, ymax, (a + xmax * 0.005, ymax * 0.06))?;
    }
    for (i, seg) in segments.into_iter().enumerate() {
        let s = chart
            .draw_series(LineSeries::new(seg, OK.stroke_width(2)))
            .map_err(err)?;
        if i == 0 {
            s.label("flow stress through the die")
                .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], OK.stroke_width(2)));
        }
    }
    let steps_to_label = if exits.len() > 20 { 2 } else { 1 };
    chart
        .draw_series(
            exits
                .iter()
                .map(|&(x, y, _)| Circle::new((x, y), 4, BLACK.filled())),
        )
        .map_err(err)?
        .label("pass exit")
        .legend(|(x, y)| Circle::new((x + 9, y), 4, BLACK.filled()));
    chart
        .draw_series(
            exits
                .iter()
                .enumerate()
                .filter(|(i, _)| i % steps_to_label == 0)
                .map(|(_, &(x, y, step))| {
                    Text::new(
                        format!("{step}"),
                        (x, y + ymax * 0.05),
                        ("sans-serif", 12).into_font(),
                    )
                }),
        )
        .map_err(err)?;
    legend(&mut chart, SeriesLabelPosition::LowerRight)
}

/// Motor load per block (bars, coloured against 100 %).
fn draw_load(m: &MachineRun, area: &Area<'_>, units: Units) -> Result<()> {
    let n = m.blocks.len() as f64;
    let top = m
        .blocks
        .iter()
        .map(|b| 100.0 * b.motor_load)
        .fold(100.0, f64::max)
        * 1.2;
    let bottom = m
        .blocks
        .iter()
        .map(|b| 100.0 * b.motor_load)
        .fold(0.0, f64::min);
    let mut chart = framed(
        area,
        &format!(
            "Motor load per block at {:.*} {}",
            Quantity::Speed.decimals(2, units),
            Quantity::Speed.convert(m.running_speed_m_s, units),
            Quantity::Speed.label(units)
        ),
        15,
        HALF,
        0.5f64..n + 0.5,
        bottom..top,
    )?;
    count_mesh(
        &mut chart,
        "block",
        "load, % of rating",
        m.blocks.len() + 1,
        &|x| whole_number(*x, n),
    )?;
    chart
        .draw_series(DashedLineSeries::new(
            vec![(0.5, 100.0), (n + 0.5, 100.0)],
            10,
            5,
            OVER.stroke_width(2),
        ))
        .map_err(err)?
        .label("motor rating (100 %)")
        .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], OVER.stroke_width(2)));
    chart
        .draw_series(m.blocks.iter().map(|b| {
            let x = b.block as f64;
            let y = 100.0 * b.motor_load;
            let c = if b.motor_load > 1.0 { OVER } else { OK };
            bar(x, y, c.mix(0.85).filled())
        }))
        .map_err(err)?;
    legend(&mut chart, SeriesLabelPosition::UpperLeft)
}

/// Wire temperature into and out of each block's die, against the limit.
fn draw_heat(m: &MachineRun, area: &Area<'_>, units: Units) -> Result<()> {
    let n = m.blocks.len() as f64;
    let temp = |c: f64| Quantity::Temperature.convert(c, units);
    let unit = Quantity::Temperature.label(units);
    let limit = m.wire_temperature_max_c.map(temp);
    let hottest = m
        .blocks
        .iter()
        .map(|b| temp(b.wire_temperature_out_c))
        .fold(limit.unwrap_or(temp(0.0)), f64::max);
    let coolest = m
        .blocks
        .iter()
        .map(|b| temp(b.wire_temperature_in_c))
        .fold(f64::INFINITY, f64::min)
        .min(temp(0.0));
    let mut chart = framed(
        area,
        &format!(
            "Wire temperature, cooling {:.0} % between dies",
            100.0 * m.cooling_between_dies
        ),
        15,
        HALF,
        0.5f64..n + 0.5,
        coolest..hottest * 1.2 + 1.0,
    )?;
    count_mesh(
        &mut chart,
        "block",
        &format!("wire temperature, {unit}"),
        m.blocks.len() + 1,
        &|x| whole_number(*x, n),
    )?;
    if let Some(t) = limit {
        chart
            .draw_series(DashedLineSeries::new(
                vec![(0.5, t), (n + 0.5, t)],
                10,
                5,
                OVER.stroke_width(2),
            ))
            .map_err(err)?
            .label(match units {
                Units::Si => format!("limit {t} {unit}"),
                Units::Us => format!("limit {} {unit}", super::fixed(Some(t), 0)),
            })
            .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], OVER.stroke_width(2)));
    }
    // A sawtooth: up through each die, down through the cooling to the next.
    let saw: Vec<(f64, f64)> = m
        .blocks
        .iter()
        .flat_map(|b| {
            let x = b.block as f64;
            [
                (x - 0.3, temp(b.wire_temperature_in_c)),
                (x + 0.3, temp(b.wire_temperature_out_c)),
            ]
        })
        .collect();
    chart
        .draw_series(LineSeries::new(saw, WARN.stroke_width(2)))
        .map_err(err)?
        .label("in -> out of each die")
        .legend(|(x, y)| PathElement::new(vec![(x, y), (x + 18, y)], WARN.stroke_width(2)));
    chart
        .draw_series(m.blocks.iter().map(|b| {
            Circle::new(
                (b.block as f64 + 0.3, temp(b.wire_temperature_out_c)),
                3,
                BLACK.filled(),
            )
        }))
        .map_err(err)?;
    legend(&mut chart, SeriesLabelPosition::UpperLeft)
}
