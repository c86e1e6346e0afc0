//! Tables for people (tabled). The default view is the figures a person reads
//! first, one table that fits the terminal (120 columns for a 25-pass
//! schedule); `--wide` gives every column in three tables (passes, drawing
//! stress by method, line figures); `--columns` picks columns by JSON key.
//! Then the summary, the notes (wrapped to the width) and the caution.

use coldpass::evaluation::{ScheduleReport, StepKind, StepReport, Verdict};
use tabled::builder::Builder;
use tabled::settings::object::Columns;
use tabled::settings::peaker::PriorityMax;
use tabled::settings::{Alignment, Style, Width};

use super::columns::{self, Column};
use super::units::{Quantity, Units};

/// Which pass columns a table shows.
#[derive(Debug, Clone, Default)]
pub enum View {
    /// The figures read first ([`columns::FIRST`]), fitted to the width.
    #[default]
    First,
    /// Every column, in three tables.
    Wide,
    /// These columns (JSON keys), in one table.
    Pick(Vec<String>),
}

/// How a table report is laid out.
#[derive(Debug, Clone)]
pub struct TableOptions {
    /// Which pass columns.
    pub view: View,
    /// Units of every figure.
    pub units: Units,
    /// Width to fit, in characters (the terminal's, else 120).
    pub width: usize,
}

impl Default for TableOptions {
    fn default() -> Self {
        TableOptions {
            view: View::First,
            units: Units::Si,
            width: 120,
        }
    }
}

/// The width to fit: `COLUMNS` when set, else the terminal's when standard
/// output is one, else 120.
pub fn terminal_width() -> usize {
    if let Some(n) = std::env::var("COLUMNS")
        .ok()
        .and_then(|s| s.trim().parse::<usize>().ok())
        .filter(|&n| n >= 40)
    {
        return n;
    }
    terminal_size::terminal_size_of(std::io::stdout())
        .map(|(w, _)| usize::from(w.0))
        .filter(|&n| n >= 40)
        .unwrap_or(120)
}

/// A sharp table of `header` over `rows`: the first column and `text_cols`
/// left, the rest right. With `width`, a table wider than it is cut into
/// panels of whole columns, one under the other, each led by the first
/// column (the step, law or block) so that every row can be read across; a
/// header word or a figure is never broken. Only a panel of one column
/// beside the first that is still too wide has its cells wrapped, at words.
/// Shared by every table report.
pub fn build(
    header: Vec<String>,
    rows: Vec<Vec<String>>,
    width: Option<usize>,
    text_cols: &[usize],
) -> String {
    let all: Vec<usize> = (0..header.len()).collect();
    let render = |cols: &[usize], wrap: Option<usize>| -> String {
        let mut b = Builder::default();
        let pick = |r: &[String]| -> Vec<String> {
            cols.iter()
                .map(|&i| r.get(i).cloned().unwrap_or_default())
                .collect()
        };
        b.push_record(pick(&header));
        for r in &rows {
            b.push_record(pick(r));
        }
        let mut t = b.build();
        t.with(Style::sharp());
        t.modify(Columns::new(1..), Alignment::right());
        for (at, i) in cols.iter().enumerate() {
            if text_cols.contains(i) {
                t.modify(Columns::new(at..=at), Alignment::left());
            }
        }
        if let Some(w) = wrap {
            t.with(
                Width::wrap(w)
                    .keep_words(true)
                    .priority(PriorityMax::right()),
            );
        }
        t.to_string()
    };
    let Some(w) = width else {
        return render(&all, None);
    };
    let whole = render(&all, None);
    if widest(&whole) <= w || all.len() < 2 {
        return if widest(&whole) <= w {
            whole
        } else {
            render(&all, Some(w))
        };
    }
    panels(all.len(), w, |cols| widest(&render(cols, None)))
        .iter()
        .map(|cols| {
            let t = render(cols, None);
            if widest(&t) <= w {
                t
            } else {
                render(cols, Some(w))
            }
        })
        .collect::<Vec<_>>()
        .join("\n\n")
}

/// The widest line of `text`, in characters.
pub fn widest(text: &str) -> usize {
    text.lines().map(|l| l.chars().count()).max().unwrap_or(0)
}

/// Columns `1..n` laid into panels led by column 0, in order, each as many
/// columns as keep its width (`width_of`) within `width`; a panel holds at
/// least one column beside the first.
pub fn panels(n: usize, width: usize, width_of: impl Fn(&[usize]) -> usize) -> Vec<Vec<usize>> {
    let mut out = Vec::new();
    let mut panel = vec![0];
    for c in 1..n {
        panel.push(c);
        if panel.len() > 2 && width_of(&panel) > width {
            panel.pop();
            out.push(std::mem::replace(&mut panel, vec![0, c]));
        }
    }
    out.push(panel);
    out
}

/// A header with each word on its own line, so that a column is as wide as
/// its figures (the words are the same, only the layout changes).
pub fn stack(header: &str) -> String {
    header.replace(' ', "\n")
}

/// Whether column `c` has text in any of `steps` (a die size given as text,
/// or an anneal row); an empty `die size` column is left out.
fn has_text(c: &Column, steps: &[&StepReport], units: Units) -> bool {
    c.key != "die_size" || steps.iter().any(|r| !c.cell(r, units).is_empty())
}

/// A table of `cols` over the steps. `stacked` puts each header word on its
/// own line, so that a column is as wide as its figures; `drop_empty` leaves
/// out an empty `die size` column (not when the reader picked it).
fn pass_table(
    cols: &[&Column],
    steps: &[&StepReport],
    opts: &TableOptions,
    stacked: bool,
    drop_empty: bool,
) -> String {
    let cols: Vec<&Column> = cols
        .iter()
        .copied()
        .filter(|c| !drop_empty || has_text(c, steps, opts.units))
        .collect();
    let header = cols
        .iter()
        .map(|c| {
            let h = c.header(opts.units);
            if stacked {
                stack(&h)
            } else {
                h
            }
        })
        .collect();
    let rows = steps
        .iter()
        .map(|r| {
            cols.iter()
                .map(|c| match c.key {
                    // One flag a line keeps the column as wide as the longest flag.
                    "flags" if stacked => columns::flags(r, "\n"),
                    _ => c.cell(r, opts.units),
                })
                .collect()
        })
        .collect();
    let text_cols: Vec<usize> = cols
        .iter()
        .enumerate()
        .filter(|(_, c)| matches!(c.key, "die_size" | "flags"))
        .map(|(i, _)| i)
        .collect();
    // Fitted to the width in every view: a table wider than the terminal is
    // cut into panels of whole columns (`--wide` too: every column, in panels).
    build(header, rows, Some(opts.width), &text_cols)
}

/// Wraps `text` to `width` characters at spaces, indenting continuation lines
/// by `indent`; the leading spaces of `text` are kept on its first line.
pub fn wrap(text: &str, width: usize, indent: &str) -> String {
    let mut out = String::new();
    let mut line: String = text.chars().take_while(|c| *c == ' ').collect();
    for word in text.split_whitespace() {
        let len = line.chars().count();
        if !line.trim().is_empty() && len + 1 + word.chars().count() > width {
            out.push_str(&line);
            out.push('\n');
            line = indent.to_string();
        } else if len > 0 && !line.ends_with(' ') {
            line.push(' ');
        }
        line.push_str(word);
    }
    out.push_str(&line);
    out
}

/// `text` with every line longer than `width` wrapped at words: continuation
/// lines keep the line's indent, two more under a `- ` list item.
pub fn wrap_long_lines(text: &str, width: usize) -> String {
    let mut out = String::new();
    for l in text.lines() {
        if l.chars().count() > width {
            let lead: String = l.chars().take_while(|c| *c == ' ').collect();
            let more = if l.trim_start().starts_with("- ") {
                "  "
            } else {
                ""
            };
            out.push_str(&wrap(l, width, &format!("{lead}{more}")));
        } else {
            out.push_str(l);
        }
        out.push('\n');
    }
    if !text.ends_with('\n') {
        out.pop();
    }
    out
}

/// A figure with its unit, or a dash and why there is none.
fn with_unit(x: Option<f64>, q: Quantity, digits: usize, units: Units, why_none: &str) -> String {
    match x {
        Some(v) => format!(
            "{} {}",
            super::fixed(Some(q.convert(v, units)), q.decimals(digits, units)),
            q.label(units)
        ),
        None => format!("- ({why_none})"),
    }
}

/// The verdict in words.
pub fn verdict_words(v: Verdict) -> &'static str {
    match v {
        Verdict::Ok => "ok: every pass within the limits",
        Verdict::Warn => "warn: within the limits, with warnings (see flags)",
        Verdict::Over => "over: at least one pass over a limit (see flags)",
    }
}

/// The summary as (label, value) rows, shared by the table and the HTML page.
pub fn summary_rows(rep: &ScheduleReport, units: Units) -> Vec<(String, String)> {
    let s = &rep.summary;
    let len = |mm: f64| {
        format!(
            "{} {}",
            super::fixed(
                Some(Quantity::Length.convert(mm, units)),
                Quantity::Length.decimals(3, units)
            ),
            Quantity::Length.label(units)
        )
    };
    let worst = match (s.worst_draw_ratio, s.worst_step) {
        (Some(r), Some(step)) => format!("{r:.3} at step {step}"),
        _ => "-".into(),
    };
    let stress = with_unit(
        Some(s.final_flow_stress_mpa),
        Quantity::Stress,
        0,
        units,
        "",
    );
    // On a machine with no finish speed the throughput is the machine's, at
    // the attainable speed: say where it is rather than only that it is not here.
    let no_line = if s.attainable_t_per_shift.is_some() {
        "- (no line.finish_speed_m_s: at the attainable speed, see the machine summary)"
    } else {
        "- (no line block)"
    };
    let mass = match units {
        Units::Si => match (s.throughput_kg_h, s.throughput_t_per_shift) {
            (Some(kg), Some(t)) => format!("{kg:.0} kg/h, {t:.1} t per shift"),
            _ => no_line.into(),
        },
        // Pounds (avoirdupois, 0.453 592 37 kg exact) and short tons of 2000 lb.
        Units::Us => match (s.throughput_kg_h, s.throughput_t_per_shift) {
            (Some(kg), Some(t)) => format!(
                "{:.0} lb/h, {:.1} short tons per shift ({t:.1} t)",
                kg / coldpass::size::quantity::KG_PER_POUND,
                t * 1000.0 / coldpass::size::quantity::KG_PER_POUND / 2000.0
            ),
            _ => no_line.into(),
        },
    };
    vec![
        (
            "start -> finish".into(),
            format!(
                "{} -> {}",
                len(s.start_diameter_mm),
                len(s.finish_diameter_mm)
            ),
        ),
        (
            "total area reduction".into(),
            format!("{:.1} %", 100.0 * s.total_area_reduction),
        ),
        ("total strain".into(), format!("{:.3}", s.total_strain)),
        (
            "draw passes / anneals".into(),
            format!("{} / {}", s.draw_passes, s.anneals),
        ),
        ("worst draw ratio".into(), worst),
        (
            "finished flow stress".into(),
            format!("{stress} at strain {:.3} since anneal", s.final_strain),
        ),
        ("throughput".into(), mass),
        (
            "time per coil".into(),
            match s.coil_time_min {
                Some(m) => format!("{m:.1} min"),
                None => "- (no line.coil_mass_kg)".into(),
            },
        ),
        (
            "total power".into(),
            with_unit(s.total_power_kw, Quantity::Power, 1, units, "no line block"),
        ),
        ("verdict".into(), verdict_words(s.verdict).into()),
    ]
}

/// The heading lines: title, material, governing method.
fn heading(rep: &ScheduleReport) -> String {
    let mut out = String::new();
    if !rep.title.is_empty() {
        out.push_str(&format!("{}\n", rep.title));
    }
    if !rep.material.is_empty() {
        out.push_str(&format!("Material: {}\n", rep.material));
    }
    out.push_str(&format!(
        "Governing method: {} ({}); draw ratio warn {} / max {}\n\n",
        rep.method, rep.method_source, rep.draw_ratio_warn, rep.draw_ratio_max
    ));
    out
}

const WIDE_PASSES: &[&str] = &[
    "step",
    "die_size",
    "exit_diameter_mm",
    "area_reduction",
    "cumulative_reduction",
    "elongation",
    "pass_strain",
    "strain_after",
    "flow_stress_exit_mpa",
    "delta",
    "semi_angle_deg",
    "optimum_semi_angle_deg",
    "governing_draw_stress_mpa",
    "draw_ratio",
    "flags",
];

const WIDE_METHODS: &[&str] = &[
    "step",
    "mean_flow_stress_mpa",
    "draw_stress_mpa.ideal",
    "draw_stress_mpa.efficiency",
    "draw_stress_mpa.sachs",
    "draw_stress_mpa.siebel",
    "draw_stress_mpa.redundant",
    "draw_stress_mpa.upper_bound",
    "back_tension_mpa",
    "friction",
    "friction_factor",
];

const WIDE_LINE: &[&str] = &[
    "step",
    "entry_diameter_mm",
    "force_kn",
    "net_pull_kn",
    "exit_speed_m_s",
    "power_kw",
    "temperature_rise_c",
    "wire_temperature_c",
];

/// The whole human-readable report of a schedule.
pub fn schedule(rep: &ScheduleReport, opts: &TableOptions) -> Result<String, String> {
    let mut out = wrap_long_lines(&heading(rep), opts.width);
    let all: Vec<&StepReport> = rep.passes.iter().collect();
    let draws: Vec<&StepReport> = rep
        .passes
        .iter()
        .filter(|r| r.kind == StepKind::Draw)
        .collect();
    match &opts.view {
        View::First => {
            out.push_str("Passes\n");
            out.push_str(&pass_table(
                &columns::fixed_set(columns::FIRST),
                &all,
                opts,
                true,
                true,
            ));
            out.push('\n');
            out.push_str(&wrap(
                "(--wide for every column: strains, Delta, drawing stress by method, force, speed)",
                opts.width,
                " ",
            ));
            out.push_str("\n\n");
        }
        View::Wide => {
            out.push_str("Passes\n");
            out.push_str(&pass_table(
                &columns::fixed_set(WIDE_PASSES),
                &all,
                opts,
                false,
                true,
            ));
            out.push_str(&format!(
                "\n\nDrawing stress by method, {}\n",
                Quantity::Stress.label(opts.units)
            ));
            out.push_str(&pass_table(
                &columns::fixed_set(WIDE_METHODS),
                &draws,
                opts,
                false,
                true,
            ));
            out.push_str("\n\nLine\n");
            out.push_str(&pass_table(
                &columns::fixed_set(WIDE_LINE),
                &draws,
                opts,
                false,
                true,
            ));
            out.push_str("\n\n");
        }
        View::Pick(keys) => {
            let cols = columns::pick(keys)?;
            out.push_str("Passes\n");
            out.push_str(&pass_table(&cols, &all, opts, true, false));
            out.push_str("\n\n");
        }
    }

    out.push_str(&super::machine::table(rep, opts.width, opts.units));
    let mut b = Builder::default();
    for (k, v) in summary_rows(rep, opts.units) {
        b.push_record([k, v]);
    }
    let mut t = b.build();
    t.with(Style::sharp());
    t.with(
        Width::wrap(opts.width)
            .keep_words(true)
            .priority(PriorityMax::right()),
    );
    out.push_str("Summary\n");
    out.push_str(&t.to_string());
    out.push('\n');
    if !rep.notes.is_empty() {
        out.push_str("\nNotes\n");
        for n in &rep.notes {
            out.push_str(&wrap(&format!("- {n}"), opts.width, "  "));
            out.push('\n');
        }
    }
    out.push('\n');
    out.push_str(&wrap(&format!("Caution: {}", rep.caution), opts.width, ""));
    out.push('\n');
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn panels_keep_columns_whole_in_order_led_by_the_first() {
        // Columns of widths 10 (the lead), 20, 20, 30, 50 against 60: each
        // panel's width is the sum of its columns.
        let w = [10, 20, 20, 30, 50];
        let width_of = |cols: &[usize]| cols.iter().map(|&c| w[c]).sum::<usize>();
        let p = panels(5, 60, width_of);
        assert_eq!(p, vec![vec![0, 1, 2], vec![0, 3], vec![0, 4]]);
        // A column wider than the width alone still gets a panel of its own.
        assert_eq!(panels(3, 25, width_of), vec![vec![0, 1], vec![0, 2]]);
    }

    #[test]
    fn a_table_wider_than_the_width_is_cut_into_panels_of_whole_words() {
        let header = ["step", "wire\ntemperature\nC", "draw\nstress\nMPa", "flags"]
            .map(String::from)
            .to_vec();
        let rows = vec![vec![
            "1".into(),
            "35".into(),
            "39".into(),
            "near-draw-limit".into(),
        ]];
        let t = build(header, rows, Some(30), &[3]);
        assert!(t.lines().all(|l| l.chars().count() <= 30), "{t}");
        for word in ["temperature", "stress", "near-draw-limit"] {
            assert!(t.contains(word), "{word} in {t}");
        }
        assert!(t.matches("step").count() >= 2, "the lead repeats: {t}");
    }

    #[test]
    fn wrap_keeps_words_and_width() {
        let text = "the quick brown fox jumps over the lazy dog";
        let w = wrap(text, 12, "  ");
        assert!(w.lines().all(|l| l.chars().count() <= 12), "{w}");
        assert_eq!(w.split_whitespace().collect::<Vec<_>>().join(" "), text);
        assert!(w.lines().skip(1).all(|l| l.starts_with("  ")));
        let w = wrap("  - the quick brown fox", 12, "    ");
        assert_eq!(w, "  - the\n    quick\n    brown\n    fox");
    }
}
