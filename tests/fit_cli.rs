//! `coldpass fit` as a user meets it: the demo records, every output, and
//! bad input that ends with status 1, a message naming what and where, and
//! nothing written.

mod common;

use common::{coldpass, root, stderr, stdout};
use tempfile::TempDir;

const COPPER: &str = "schedules-demo/tensile-copper-rod.csv";
const STEEL: &str = "schedules-demo/tensile-steel-rod.csv";
const ALUMINIUM: &str = "schedules-demo/tensile-aluminium-rod.csv";

/// The demo copper record with its text changed by `edit`, in a temp folder.
fn edited(dir: &TempDir, edit: impl Fn(Vec<String>) -> Vec<String>) -> String {
    let text = std::fs::read_to_string(root(COPPER)).unwrap();
    let lines = edit(text.lines().map(str::to_string).collect());
    let path = dir.path().join("record.csv");
    std::fs::write(&path, lines.join("\n") + "\n").unwrap();
    path.to_string_lossy().into_owned()
}

fn written(dir: &TempDir, text: &str) -> String {
    let path = dir.path().join("record.csv");
    std::fs::write(&path, text).unwrap();
    path.to_string_lossy().into_owned()
}

/// Runs `fit` on `file` asking for every output, expects status 1 with
/// `words` in the message, and checks that no file was written.
fn fails_writing_nothing(dir: &TempDir, file: &str, extra: &[&str], words: &[&str]) {
    let out = dir.path().join("report.json");
    let plot = dir.path().join("chart.svg");
    let law = dir.path().join("law.yaml");
    let mut args = vec![
        "fit",
        file,
        "--format",
        "json",
        "-o",
        out.to_str().unwrap(),
        "--plot",
        plot.to_str().unwrap(),
        "--emit-law",
        law.to_str().unwrap(),
    ];
    args.extend_from_slice(extra);
    let o = coldpass(&args);
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(1), "stderr: {err}");
    for w in words {
        assert!(err.contains(w), "expected {w:?} in: {err}");
    }
    for p in [&out, &plot, &law] {
        assert!(!p.exists(), "{} was written", p.display());
    }
    let left: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n != "record.csv")
        .collect();
    assert!(left.is_empty(), "left behind: {left:?}");
}

/// Data line `k` (0-based, after the comment lines and the header) of the demo copper record.
fn data_line(lines: &[String], k: usize) -> usize {
    let header = lines.iter().position(|l| !l.starts_with('#')).unwrap();
    header + 1 + k
}

#[test]
fn fails_on_a_non_numeric_cell_naming_its_line_and_column() {
    let dir = TempDir::new().unwrap();
    let file = edited(&dir, |mut l| {
        let i = data_line(&l, 100);
        let strain = l[i].split(',').next().unwrap().to_string();
        l[i] = format!("{strain},12..5");
        l
    });
    let line = {
        let text = std::fs::read_to_string(&file).unwrap();
        let lines: Vec<String> = text.lines().map(str::to_string).collect();
        data_line(&lines, 100) + 1
    };
    fails_writing_nothing(
        &dir,
        &file,
        &[],
        &[
            &format!("line {line}"),
            "column 'Engineering stress (MPa)'",
            "'12..5' is not a number",
        ],
    );
}

#[test]
fn a_strain_that_steps_back_is_dropped_with_a_warning_not_refused() {
    // Issue 11: raw exports step back within noise; a lab drops the point.
    let dir = TempDir::new().unwrap();
    let file = edited(&dir, |mut l| {
        let i = data_line(&l, 200);
        l.swap(i, i + 1);
        l
    });
    let o = coldpass(&["fit", &file]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    assert!(
        out.contains("1 point(s) whose strain stepped back within the noise were dropped"),
        "{out}"
    );
}

#[test]
fn fails_on_a_negative_stress() {
    let dir = TempDir::new().unwrap();
    let file = edited(&dir, |mut l| {
        let i = data_line(&l, 50);
        let strain = l[i].split(',').next().unwrap().to_string();
        l[i] = format!("{strain},-3.5");
        l
    });
    fails_writing_nothing(
        &dir,
        &file,
        &[],
        &["point 51", "`stress` = -3.5", "must be 0 or greater"],
    );
}

#[test]
fn fails_on_a_record_that_stops_before_maximum_load() {
    let dir = TempDir::new().unwrap();
    let file = edited(&dir, |l| {
        let end = data_line(&l, 300);
        l[..end].to_vec()
    });
    fails_writing_nothing(
        &dir,
        &file,
        &[],
        &["never reaches a maximum load", "falls by less than 1 %"],
    );
}

#[test]
fn fails_on_a_record_that_never_yields() {
    // A brittle record: straight up to fracture, then the load falls.
    let dir = TempDir::new().unwrap();
    let mut text = String::from("strain,stress\n");
    for i in 0..40 {
        let e = i as f64 * 0.0001;
        text.push_str(&format!("{e:.5},{:.2}\n", 200_000.0 * e));
    }
    text.push_str("0.00400,10.0\n");
    let file = written(&dir, &text);
    fails_writing_nothing(&dir, &file, &[], &["never yields", "0.2 % offset line"]);
}

#[test]
fn fails_on_too_few_points_in_the_plastic_range() {
    let dir = TempDir::new().unwrap();
    let mut text = String::from("strain,stress\n");
    for i in 0..30 {
        let e = i as f64 * 0.00005;
        text.push_str(&format!("{e:.6},{:.3}\n", 200_000.0 * e));
    }
    // three points past yield, then the load falls
    text.push_str("0.010000,310\n0.050000,330\n0.100000,340\n0.110000,300\n");
    let file = written(&dir, &text);
    fails_writing_nothing(
        &dir,
        &file,
        &[],
        &[
            "the plastic range (0.2 % proof strength to maximum load) has 3 points",
            "at least 8 are needed",
        ],
    );
}

#[test]
fn fails_on_a_sparse_record_naming_the_short_elastic_range_in_good_grammar() {
    // The demo copper record cut to every 40th line, as a new user did: the
    // file has 12 points, none of them in the modulus band (10 % to 40 % of
    // the yield strength). The message used to say "the record has 1 points".
    let dir = TempDir::new().unwrap();
    let file = edited(&dir, |l| {
        let header = data_line(&l, 0);
        l.iter()
            .enumerate()
            .filter(|(i, _)| *i < header || (i + 1) % 40 == 0)
            .map(|(_, x)| x.clone())
            .collect()
    });
    fails_writing_nothing(
        &dir,
        &file,
        &[],
        &[
            "the elastic range",
            "has 0 points: at least 5 are needed",
            "Young's modulus",
        ],
    );
}

#[test]
fn fails_when_no_column_is_found_and_lists_the_columns() {
    let dir = TempDir::new().unwrap();
    let file = written(&dir, "elongation,reading\n0,0\n0.1,10\n");
    fails_writing_nothing(
        &dir,
        &file,
        &[],
        &["'elongation', 'reading'", "--strain-col"],
    );
}

#[test]
fn fails_on_a_force_record_without_its_gauge_length() {
    let dir = TempDir::new().unwrap();
    let text = std::fs::read_to_string(root(STEEL)).unwrap();
    let file = written(&dir, &text);
    fails_writing_nothing(
        &dir,
        &file,
        &["--diameter-mm", "5.5"],
        &["--gauge-length-mm"],
    );
}

#[test]
fn fits_the_copper_record_with_the_caution_and_the_extrapolation() {
    let o = coldpass(&["fit", COPPER, "--reach-strain", "3.5"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    // Lines are wrapped to the width: read the words.
    let out = out.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(out.contains("Best by AIC: swift"), "{out}");
    assert!(out.contains("planning estimates to confirm by trial"));
    assert!(out.contains("machine maker's limits, local codes and licensed practice"));
    assert!(out.contains("the schedule reaches 3.500"), "{out}");
}

#[test]
fn json_carries_the_keys_the_issue_names() {
    let o = coldpass(&[
        "fit",
        STEEL,
        "--gauge-length-mm",
        "50",
        "--diameter-mm",
        "5.5",
        "--format",
        "json",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    for key in [
        "best",
        "youngs_modulus_gpa",
        "yield_mpa",
        "uts_mpa",
        "uniform_strain",
        "caution",
    ] {
        assert!(!v[key].is_null(), "{key}");
    }
    let fits = v["fits"].as_array().unwrap();
    assert_eq!(fits.len(), 8);
    for f in fits {
        for key in [
            "law",
            "params",
            "std_errors",
            "rms_mpa",
            "r2",
            "aic",
            "converged",
        ] {
            assert!(!f[key].is_null(), "{key} in {f}");
        }
    }
    // Force read in kN from the header: the steel rod's stresses are hundreds of MPa.
    let uts = v["uts_mpa"].as_f64().unwrap();
    assert!((300.0..500.0).contains(&uts), "UTS {uts}");
}

#[test]
fn a_percent_header_is_read_as_percent() {
    let o = coldpass(&["fit", ALUMINIUM, "--format", "yaml"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_yaml::Value = serde_yaml::from_str(&stdout(&o)).unwrap();
    // Young's modulus of aluminium is about 69 GPa (common practice).
    let e = v["youngs_modulus_gpa"].as_f64().unwrap();
    assert!((60.0..80.0).contains(&e), "E = {e} GPa");
}

#[test]
fn csv_has_one_row_per_fit_each_carrying_the_caution_in_its_last_column() {
    // Like the check and design CSVs: no comment line a CSV reader would choke on.
    let o = coldpass(&["fit", COPPER, "--format", "csv"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    let mut reader = csv::Reader::from_reader(out.as_bytes());
    let head = reader.headers().unwrap().clone();
    assert!(out.starts_with("law,strain,best,points,rms_mpa"), "{out}");
    assert_eq!(head.iter().next_back(), Some("caution"));
    let rows: Vec<csv::StringRecord> = reader.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), 8);
    for row in &rows {
        assert_eq!(row.len(), head.len());
        let caution = row.iter().next_back().unwrap();
        assert!(
            caution.starts_with("Caution:") && caution.contains("licensed practice"),
            "{caution}"
        );
    }
}

#[test]
fn the_table_names_the_reach_column_by_its_strain_not_as_a_stress() {
    // "stress at 3.20 MPa" read as a stress of 3.20 MPa.
    let o = coldpass(&["fit", COPPER, "--reach-strain", "3.2"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    // The header is stacked word by word: read the reach column down.
    let head: Vec<Vec<&str>> = out
        .lines()
        .skip_while(|l| !l.starts_with('┌'))
        .skip(1)
        .take_while(|l| !l.starts_with('├'))
        .map(|l| l.split('│').map(str::trim).collect())
        .collect();
    let col = head[0].iter().position(|c| *c == "stress").expect(&out);
    let words: Vec<&str> = head
        .iter()
        .map(|cells| cells[col])
        .filter(|w| !w.is_empty())
        .collect();
    assert_eq!(words.join(" "), "stress MPa at strain 3.20", "{out}");
    assert!(!out.contains("stress at 3.20 MPa"), "{out}");
}

#[test]
fn the_emitted_law_pastes_into_a_schedule() {
    let dir = TempDir::new().unwrap();
    let law = dir.path().join("law.yaml");
    let plot = dir.path().join("chart.svg");
    let o = coldpass(&[
        "fit",
        COPPER,
        "--reach-strain",
        "3.2",
        "--emit-law",
        law.to_str().unwrap(),
        "--plot",
        plot.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    #[derive(serde::Deserialize)]
    struct Block {
        flow: coldpass::FlowLaw,
    }
    let text = std::fs::read_to_string(&law).unwrap();
    let block: Block = serde_yaml::from_str(&text).unwrap();
    assert_eq!(block.flow.name(), "swift");
    let svg = std::fs::read_to_string(&plot).unwrap();
    assert!(svg.starts_with("<svg") && svg.contains("swift (best)"));

    // Paste it into the demo copper schedule in place of its own law.
    let schedule =
        std::fs::read_to_string(root("schedules-demo/copper-building-wire.yaml")).unwrap();
    let flow_line = schedule
        .lines()
        .find(|l| l.trim_start().starts_with("flow:"))
        .unwrap();
    let indent = &flow_line[..flow_line.len() - flow_line.trim_start().len()];
    // The `flow:` and `flow_scatter:` blocks (the risk analysis reads the
    // scatter's shape); `flow_valid_to_strain` waits for the schedule model
    // to read it.
    let mut keep = false;
    let block_text: String = text
        .lines()
        .filter(|l| !l.starts_with('#'))
        .filter(|l| {
            if !l.starts_with(' ') {
                keep = l.starts_with("flow:") || l.starts_with("flow_scatter:");
            }
            keep
        })
        .map(|l| format!("{indent}{l}\n"))
        .collect();
    assert!(block_text.contains("flow_scatter:"), "{block_text}");
    let pasted = schedule.replacen(&format!("{flow_line}\n"), &block_text, 1);
    let path = dir.path().join("schedule.yaml");
    std::fs::write(&path, pasted).unwrap();
    let o = coldpass(&["check", path.to_str().unwrap()]);
    assert!(
        matches!(o.status.code(), Some(0) | Some(3)),
        "{}",
        stderr(&o)
    );
}

/// The `--reach-strain` of the README's `coldpass fit` command for the demo copper record.
fn readme_reach_strain() -> String {
    let readme = std::fs::read_to_string(root("README.md")).unwrap();
    let command = readme
        .lines()
        .find(|l| l.contains(&format!("fit {COPPER}")))
        .expect("the README shows a fit command for the demo copper record");
    let mut words = command.split_whitespace();
    words.find(|w| *w == "--reach-strain");
    words
        .next()
        .expect("the README's fit command gives --reach-strain")
        .to_string()
}

/// One `<text>` of an SVG: x, anchor, font size (px) and its characters.
struct SvgText {
    x: f64,
    anchor: String,
    font_px: f64,
    chars: usize,
    /// Turned a quarter (the y-axis title): it spans one line height across,
    /// from x (the text hangs below its anchor by 0.76 em).
    rotated: bool,
    text: String,
}

fn attr<'a>(tag: &'a str, name: &str) -> Option<&'a str> {
    let start = tag.find(&format!(" {name}=\""))? + name.len() + 3;
    let len = tag[start..].find('"')?;
    Some(&tag[start..start + len])
}

fn svg_width(svg: &str) -> f64 {
    let tag = &svg[..svg.find('>').unwrap()];
    attr(tag, "width").unwrap().parse().unwrap()
}

fn svg_texts(svg: &str) -> Vec<SvgText> {
    svg.split("<text")
        .skip(1)
        .map(|piece| {
            let (tag, rest) = piece.split_once('>').unwrap();
            let body = rest[..rest.find("</text>").unwrap()].trim();
            let text = body
                .replace("&apos;", "'")
                .replace("&quot;", "\"")
                .replace("&lt;", "<")
                .replace("&gt;", ">")
                .replace("&amp;", "&");
            SvgText {
                x: attr(tag, "x").unwrap().parse().unwrap(),
                anchor: attr(tag, "text-anchor").unwrap_or("start").to_string(),
                font_px: attr(tag, "font-size").unwrap().parse().unwrap(),
                chars: text.chars().count(),
                rotated: attr(tag, "transform").is_some_and(|t| t.starts_with("rotate")),
                text,
            }
        })
        .collect()
}

/// The fit chart of the demo steel record (one panel) and of the copper
/// record with a reach strain (two panels).
fn demo_plots(dir: &TempDir) -> Vec<(&'static str, String)> {
    let runs: [(&str, &[&str]); 2] = [
        (
            "steel, one panel",
            &[STEEL, "--gauge-length-mm", "50", "--diameter-mm", "5.5"],
        ),
        ("copper, two panels", &[COPPER, "--reach-strain", "3.2"]),
    ];
    runs.iter()
        .map(|(name, args)| {
            let plot = dir.path().join("chart.svg");
            let mut all = vec!["fit"];
            all.extend_from_slice(args);
            all.extend_from_slice(&["--plot", plot.to_str().unwrap()]);
            let o = coldpass(&all);
            assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
            (*name, std::fs::read_to_string(&plot).unwrap())
        })
        .collect()
}

#[test]
fn every_text_of_the_fit_plots_lies_inside_the_picture() {
    // The one-panel chart ran its caution footer off the right edge. Each
    // text is taken at 0.6 em a character, wider than the drawn sans-serif.
    let dir = TempDir::new().unwrap();
    for (name, svg) in demo_plots(&dir) {
        let width = svg_width(&svg);
        let texts = svg_texts(&svg);
        assert!(
            texts.iter().any(|t| t.text.starts_with("Caution:")),
            "{name}"
        );
        for t in texts {
            let w = t.chars as f64 * 0.6 * t.font_px;
            let (left, right) = match t.anchor.as_str() {
                _ if t.rotated => (t.x, t.x + t.font_px),
                "middle" => (t.x - w / 2.0, t.x + w / 2.0),
                "end" => (t.x - w, t.x),
                _ => (t.x, t.x + w),
            };
            assert!(
                left >= 0.0 && right <= width,
                "{name}: '{}' spans {left:.0} to {right:.0} px of {width}",
                t.text
            );
        }
    }
}

#[test]
fn the_fit_plots_draw_the_data_as_dots_that_can_be_seen_over_the_laws() {
    // The data were 1 px dots under 2 px law curves: now each dot is at least
    // 2 px with a wider white rim, drawn after the curves, thinned so that
    // they do not merge, and the legend says how many were drawn.
    let dir = TempDir::new().unwrap();
    for (name, svg) in demo_plots(&dir) {
        let circles: Vec<(usize, f64, String)> = svg
            .match_indices("<circle")
            .map(|(at, _)| {
                let tag = &svg[at..at + svg[at..].find('>').unwrap()];
                (
                    at,
                    attr(tag, "r").unwrap().parse().unwrap(),
                    attr(tag, "fill").unwrap().to_string(),
                )
            })
            .collect();
        let dots: Vec<usize> = (1..circles.len())
            .filter(|&i| circles[i].2 != "#FFFFFF")
            .collect();
        assert!(
            (20..=400).contains(&dots.len()),
            "{name}: {} dots",
            dots.len()
        );
        for &i in &dots {
            let (rim, dot) = (&circles[i - 1], &circles[i]);
            assert!(dot.1 >= 2.0, "{name}: a dot of radius {}", dot.1);
            assert!(
                rim.2 == "#FFFFFF" && rim.1 > dot.1,
                "{name}: a dot without its rim"
            );
        }
        // The six laws' curves (2 px) of the first panel come before its first dot.
        let first_dot = circles[dots[0]].0;
        let curves = svg[..first_dot]
            .split("<polyline")
            .filter(|p| p.contains("stroke-width=\"2\""))
            .count();
        assert!(curves >= 6, "{name}: {curves} curves before the first dot");
        assert!(
            svg.contains(" drawn)"),
            "{name}: the legend says how many were drawn"
        );
    }
}

#[test]
fn the_committed_demo_law_is_what_the_readme_fit_command_writes() {
    // A user running the README's command gets the committed file.
    let reach = readme_reach_strain();
    let dir = TempDir::new().unwrap();
    let law = dir.path().join("law.yaml");
    let o = coldpass(&[
        "fit",
        COPPER,
        "--reach-strain",
        &reach,
        "--emit-law",
        law.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let fresh = std::fs::read_to_string(&law).unwrap();
    let committed = std::fs::read_to_string(root("schedules-demo/copper-rod-law.yaml")).unwrap();
    assert_eq!(
        fresh, committed,
        "regenerate schedules-demo/copper-rod-law.yaml"
    );
}

#[test]
fn a_chosen_law_is_emitted_instead_of_the_best() {
    let dir = TempDir::new().unwrap();
    let law = dir.path().join("law.yaml");
    let o = coldpass(&[
        "fit",
        COPPER,
        "--law",
        "elastic-linear",
        "--emit-law",
        law.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = std::fs::read_to_string(&law).unwrap();
    assert!(
        text.contains("law: linear") && text.contains("elastic strain"),
        "{text}"
    );
}

#[test]
fn true_data_are_fitted_as_given() {
    // True stress and plastic strain from Kalpakjian & Schmid's annealed
    // copper, K = 315 MPa, n = 0.54 (published, Table 2.3): Hollomon gives them back.
    let dir = TempDir::new().unwrap();
    let mut text = String::from("true plastic strain,true stress MPa\n");
    for i in 1..=40 {
        let e = i as f64 * 0.01;
        text.push_str(&format!("{e:.4},{:.4}\n", 315.0 * f64::powf(e, 0.54)));
    }
    let file = written(&dir, &text);
    let o = coldpass(&["fit", &file, "--data", "true", "--format", "json"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    assert!(v["youngs_modulus_gpa"].is_null());
    let h = v["fits"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["law"] == "hollomon")
        .unwrap();
    assert!((h["params"]["n"].as_f64().unwrap() - 0.54).abs() < 1e-4);
    assert!((h["params"]["k_mpa"].as_f64().unwrap() - 315.0).abs() < 0.05);
    assert_eq!(
        v["fits"].as_array().unwrap().len(),
        6,
        "no total-strain forms for true data"
    );
}

#[test]
fn a_strength_coefficient_outside_the_shear_modulus_range_is_a_warning_not_a_refusal() {
    // K mostly between G/1000 and G/100 (common practice, docs/physics.md);
    // copper's G is about 45 GPa (common practice), so G = 10 GPa puts K = 300 MPa above G/100.
    let o = coldpass(&["fit", COPPER, "--shear-modulus-gpa", "10"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).contains("outside G/1000 to G/100 (10.0 to 100.0 MPa)"));
    let o = coldpass(&["fit", COPPER, "--shear-modulus-gpa", "45"]);
    assert!(!stdout(&o).contains("outside G/1000 to G/100"));
}

#[test]
fn a_bad_option_value_reads_flag_equals_value_allowed() {
    // The one shape of a bad-value message (issue 13), for options too.
    let o = coldpass(&["fit", COPPER, "--reach-strain", "50"]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("`--reach-strain` = 50: allowed in (0, 10]"),
        "{e}"
    );
    let o = coldpass(&["fit", COPPER, "--shear-modulus-gpa", "1000"]);
    let e = stderr(&o);
    assert!(
        e.contains("`--shear-modulus-gpa` = 1000: allowed in [1, 300]"),
        "{e}"
    );
}
