//! The charts (src/report/svg.rs for check and design, src/report/risk.rs
//! for risk), read back from their SVG: the draw-ratio chart has one slot
//! per pass and no empty slot after the last step, and the HTML page's
//! inline schedule chart follows `--units` (axis labels and values).

mod common;

use common::{coldpass, stderr, stdout};

const STEEL: &str = "schedules-demo/steel-multiblock.yaml";
const RISK_DEMO: &str = "schedules-demo/steel-multiblock-scatter.yaml";

// NIST Special Publication 811 (2008), Appendix B.8 and B.9.
/// 1 psi = 6.894 757 E+03 Pa, so 1 ksi = 6.894 757 MPa.
const MPA_PER_KSI: f64 = 6.894_757;
/// 1 ft/min = 5.08 E-03 m/s (exact).
const M_S_PER_FT_MIN: f64 = 5.08e-3;

/// The value of attribute `name` in an SVG element's text.
fn attr(element: &str, name: &str) -> Option<f64> {
    let key = format!(" {name}=\"");
    let at = element.find(&key)? + key.len();
    element[at..].split('"').next()?.parse().ok()
}

/// Every element `<tag .../>` (or opening `<tag ...>`) of the SVG.
fn elements<'a>(svg: &'a str, tag: &str) -> Vec<&'a str> {
    let open = format!("<{tag} ");
    svg.match_indices(&open)
        .map(|(i, _)| {
            let end = svg[i..].find('>').unwrap();
            &svg[i..i + end]
        })
        .collect()
}

/// Every `<text>` element: its attributes and its content, trimmed.
fn texts(svg: &str) -> Vec<(&str, String)> {
    svg.match_indices("<text ")
        .map(|(i, _)| {
            let open_end = i + svg[i..].find('>').unwrap();
            let close = open_end + svg[open_end..].find("</text>").unwrap();
            (
                &svg[i..open_end],
                svg[open_end + 1..close].trim().to_string(),
            )
        })
        .collect()
}

/// The light vertical grid lines of the topmost chart (the draw ratio):
/// their x, and the x where that chart's horizontal grid lines end.
fn top_chart_grid(svg: &str) -> (Vec<f64>, f64) {
    let lines = elements(svg, "line");
    let vertical: Vec<(f64, f64, f64)> = lines
        .iter()
        .filter_map(|l| {
            let (x1, x2) = (attr(l, "x1")?, attr(l, "x2")?);
            (x1 == x2).then(|| (x1, attr(l, "y1").unwrap(), attr(l, "y2").unwrap()))
        })
        .collect();
    let top = vertical.iter().map(|v| v.2).fold(f64::INFINITY, f64::min);
    let (y1, y2) = vertical
        .iter()
        .find(|v| v.2 == top)
        .map(|v| (v.1, v.2))
        .unwrap();
    let xs: Vec<f64> = vertical
        .iter()
        .filter(|v| v.1 == y1 && v.2 == y2)
        .map(|v| v.0)
        .collect();
    let right = lines
        .iter()
        .filter_map(|l| {
            let (a, b) = (attr(l, "y1")?, attr(l, "y2")?);
            (a == b && a <= y1 && a >= y2).then(|| attr(l, "x2").unwrap())
        })
        .fold(0.0, f64::max);
    (xs, right)
}

/// One grid line per step, evenly spaced, and the plot ending half a slot
/// past the last one (the bar's half-width and its gap), not a slot or more.
fn one_slot_per_step(svg: &str, steps: usize, what: &str) {
    let (xs, right) = top_chart_grid(svg);
    assert_eq!(xs.len(), steps, "{what}: grid lines at {xs:?}");
    let slot = (xs[steps - 1] - xs[0]) / (steps - 1) as f64;
    let past = right - xs[steps - 1];
    assert!(
        (past - slot / 2.0).abs() <= 2.0,
        "{what}: the plot ends {past} px past the last step, a slot is {slot} px"
    );
}

fn run(args: &[&str]) -> String {
    let o = coldpass(args);
    assert!(
        matches!(o.status.code(), Some(0) | Some(3)),
        "{}",
        stderr(&o)
    );
    stdout(&o)
}

fn plot(args: &[&str]) -> String {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("chart.svg");
    let p = path.to_str().unwrap();
    run(&[args, &["--plot", p]].concat());
    std::fs::read_to_string(&path).unwrap()
}

#[test]
fn the_draw_ratio_chart_has_no_empty_slot_after_the_last_step() {
    one_slot_per_step(&plot(&["check", STEEL]), 7, "check steel");
    // 25 draws and an anneal: 26 steps.
    one_slot_per_step(
        &plot(&["check", "tests/data/ux-25-passes.yaml"]),
        26,
        "check 25 passes",
    );
    let design = run(&[
        "design",
        "schedules-demo/design-steel-ratio.yaml",
        "--format",
        "json",
    ]);
    let steps = serde_json::from_str::<serde_json::Value>(&design).unwrap()["schedule"]["passes"]
        .as_array()
        .map(|p| p.len())
        .expect("design's passes");
    one_slot_per_step(
        &plot(&["design", "schedules-demo/design-steel-ratio.yaml"]),
        steps,
        "design",
    );
    one_slot_per_step(
        &plot(&["risk", RISK_DEMO, "--samples", "500"]),
        7,
        "risk fan",
    );
}

#[test]
fn the_warn_and_max_labels_sit_inside_the_plot() {
    let svg = plot(&["check", STEEL]);
    let (_, right) = top_chart_grid(&svg);
    for label in ["warn 0.65", "max 0.8"] {
        let (el, _) = texts(&svg)
            .into_iter()
            .find(|(_, t)| t == label)
            .unwrap_or_else(|| panic!("{label} missing"));
        assert!(el.contains("text-anchor=\"end\""), "{el}");
        assert!(attr(el, "x").unwrap() <= right, "{el}");
    }
}

/// The inline chart of a check page.
fn page_chart(units: &str) -> String {
    let page = run(&["check", STEEL, "--units", units, "--format", "html"]);
    let start = page.find("<svg").expect("an inline chart");
    let end = page[start..].find("</svg>").unwrap() + start;
    page[start..end].to_string()
}

/// The flow-stress value at the pixel height of the last pass's exit point,
/// read off the flow chart's y-axis tick labels.
fn last_exit_on_axis(svg: &str) -> f64 {
    let exits: Vec<(f64, f64)> = elements(svg, "circle")
        .iter()
        .filter(|c| attr(c, "r") == Some(4.0))
        .map(|c| (attr(c, "cx").unwrap(), attr(c, "cy").unwrap()))
        .collect();
    let (_, cy) = exits
        .iter()
        .copied()
        .fold((0.0, 0.0), |a, b| if b.0 > a.0 { b } else { a });
    // The flow chart's y ticks: right-aligned numbers left of the plot whose
    // span includes the exit point (the draw-ratio chart lies above it).
    let ticks: Vec<(f64, f64)> = texts(svg)
        .into_iter()
        .filter(|(el, t)| {
            el.contains("text-anchor=\"end\"")
                && attr(el, "x").is_some_and(|x| x < 80.0)
                && t.parse::<f64>().is_ok()
        })
        .map(|(el, t)| (attr(el, "y").unwrap(), t.parse::<f64>().unwrap()))
        .filter(|&(y, _)| y > cy - 400.0 && y < cy + 400.0)
        .collect();
    // Two ticks bracketing the point, from the same axis (values rise upward).
    let below = ticks
        .iter()
        .filter(|t| t.0 >= cy)
        .min_by(|a, b| a.0.total_cmp(&b.0))
        .unwrap();
    let above = ticks
        .iter()
        .filter(|t| t.0 < cy && t.1 > below.1)
        .max_by(|a, b| a.0.total_cmp(&b.0))
        .unwrap();
    below.1 + (above.1 - below.1) * (below.0 - cy) / (below.0 - above.0)
}

#[test]
fn the_pages_chart_follows_us_units() {
    let si = page_chart("si");
    let us = page_chart("us");
    let labels = |svg: &str| -> Vec<String> { texts(svg).into_iter().map(|t| t.1).collect() };
    let (si_l, us_l) = (labels(&si), labels(&us));
    assert!(si_l.iter().any(|t| t == "flow stress, MPa"), "{si_l:?}");
    assert!(us_l.iter().any(|t| t == "flow stress, ksi"), "{us_l:?}");
    assert!(us_l.iter().any(|t| t == "wire temperature, F"), "{us_l:?}");
    for t in &us_l {
        assert!(!t.contains("MPa") && !t.contains("m/s"), "{t}");
        assert!(!t.ends_with(" C") && !t.ends_with(", C"), "{t}");
    }
    // The temperature limit: F = C x 9/5 + 32.
    let limit_c: f64 = si_l
        .iter()
        .find_map(|t| t.strip_prefix("limit ")?.strip_suffix(" C")?.parse().ok())
        .expect("the SI limit");
    let limit_f = format!("limit {:.0} F", limit_c * 9.0 / 5.0 + 32.0);
    assert!(us_l.contains(&limit_f), "{limit_f} not in {us_l:?}");
    // The running speed in the load chart's title.
    let m_s: f64 = si_l
        .iter()
        .find_map(|t| {
            t.strip_prefix("Motor load per block at ")?
                .strip_suffix(" m/s")?
                .parse()
                .ok()
        })
        .expect("the SI speed");
    let title = format!("Motor load per block at {:.0} ft/min", m_s / M_S_PER_FT_MIN);
    assert!(us_l.contains(&title), "{title} not in {us_l:?}");
    // The last exit's flow stress, read off each axis, is check's figure in
    // MPa and in ksi (to within a pixel of the ~300 px axis).
    let check: serde_json::Value =
        serde_json::from_str(&run(&["check", STEEL, "--format", "json"])).unwrap();
    let mpa = check["passes"]
        .as_array()
        .unwrap()
        .iter()
        .rev()
        .find_map(|p| p["flow_stress_exit_mpa"].as_f64())
        .unwrap();
    let (on_si, on_us) = (last_exit_on_axis(&si), last_exit_on_axis(&us));
    assert!(
        (on_si - mpa).abs() <= 0.01 * mpa,
        "SI axis {on_si}, check {mpa}"
    );
    let ksi = mpa / MPA_PER_KSI;
    assert!(
        (on_us - ksi).abs() <= 0.01 * ksi,
        "US axis {on_us}, check {ksi} ksi"
    );
}

/// `--plot` writes the same chart the page draws, in the units asked for:
/// check and design both (a chart left in MPa under `--units us` would
/// carry an SI axis beside a US table).
#[test]
fn the_plot_file_follows_us_units() {
    let labels = |svg: &str| -> Vec<String> { texts(svg).into_iter().map(|t| t.1).collect() };
    for args in [
        &["check", STEEL][..],
        &["design", "schedules-demo/design-steel-machine.yaml"][..],
    ] {
        let si = labels(&plot(&[args, &["--units", "si"]].concat()));
        let us = labels(&plot(&[args, &["--units", "us"]].concat()));
        assert!(
            si.iter().any(|t| t == "flow stress, MPa"),
            "{args:?}: {si:?}"
        );
        assert!(
            us.iter().any(|t| t == "flow stress, ksi"),
            "{args:?}: {us:?}"
        );
        assert!(!us.iter().any(|t| t.contains("MPa")), "{args:?}: {us:?}");
    }
}

/// Every chart a report writes carries the whole caution (both of its
/// sentences), inside the picture: check, check on a machine, design and risk.
#[test]
fn every_chart_carries_the_whole_caution_inside_the_picture() {
    for args in [
        &["check", "schedules-demo/copper-building-wire.yaml"][..],
        &["check", STEEL][..],
        &["design", "schedules-demo/design-copper-temper.yaml"][..],
        &["risk", RISK_DEMO, "--samples", "500"][..],
    ] {
        let svg = plot(args);
        let height: f64 = svg
            .split("height=\"")
            .nth(1)
            .and_then(|t| t.split('"').next())
            .and_then(|t| t.parse().ok())
            .expect("the picture's height");
        let lines: Vec<(f64, String)> = texts(&svg)
            .into_iter()
            .map(|(el, t)| (attr(el, "y").unwrap_or(0.0), t))
            .collect();
        for part in [
            "Planning estimates only",
            "whips when it breaks",
            "licensed practice govern",
        ] {
            let (y, _) = lines
                .iter()
                .find(|(_, t)| t.contains(part))
                .unwrap_or_else(|| panic!("{args:?}: no '{part}' in the chart"));
            assert!(
                *y + 13.0 <= height,
                "{args:?}: '{part}' at y {y} is cut off (height {height})"
            );
        }
    }
}
