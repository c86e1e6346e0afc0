//! `coldpass compare A B`: per step the figures of both files as `check`
//! gives them and the change B - A; the two summaries; a design file is
//! designed first.

mod common;

use common::{coldpass, stderr, stdout};

fn json(args: &[&str]) -> serde_json::Value {
    let out = coldpass(args);
    assert!(out.status.success(), "{}", stderr(&out));
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn each_side_is_what_check_reports_and_the_change_is_b_minus_a() {
    let a = "schedules-demo/copper-building-wire.yaml";
    let b = "schedules-demo/copper-rod-breakdown-over.yaml";
    let cmp = json(&["compare", a, b, "--format", "json"]);
    let ja = json(&["check", a, "--format", "json"]);
    let out_b = coldpass(&["check", b, "--format", "json"]);
    let jb: serde_json::Value = serde_json::from_slice(&out_b.stdout).unwrap();
    let passes = cmp["passes"].as_array().unwrap();
    assert_eq!(passes.len(), 13, "the longer schedule's steps");
    for (i, p) in passes.iter().enumerate() {
        for (side, j) in [("first", &ja), ("second", &jb)] {
            match j["passes"].get(i) {
                Some(step) => {
                    for key in [
                        "exit_diameter_mm",
                        "area_reduction",
                        "draw_ratio",
                        "power_kw",
                        "wire_temperature_c",
                        "flags",
                    ] {
                        assert_eq!(p[side][key], step[key], "step {} {side} {key}", i + 1);
                    }
                }
                None => assert!(p[side].is_null()),
            }
        }
        if let (Some(x), Some(y)) = (
            p["first"]["draw_ratio"].as_f64(),
            p["second"]["draw_ratio"].as_f64(),
        ) {
            assert_eq!(p["difference"]["draw_ratio"].as_f64().unwrap(), y - x);
        }
    }
    // Step 4 of B is over the draw limit and A's is not: the flags differ.
    assert_eq!(passes[3]["difference"]["flags_differ"], true);
    assert_eq!(cmp["summary"]["first"], ja["summary"]);
    assert_eq!(cmp["summary"]["second"], jb["summary"]);
}

#[test]
fn the_table_shows_both_summaries_and_the_caution() {
    let out = coldpass(&[
        "compare",
        "schedules-demo/stainless-spring.yaml",
        "schedules-demo/steel-multiblock.yaml",
    ]);
    assert_eq!(out.status.code(), Some(0));
    let text = stdout(&out);
    assert!(text.contains("14 / 2") && text.contains("7 / 0"), "{text}");
    assert!(text.contains("Caution:"));
}

#[test]
fn a_design_file_is_designed_then_compared() {
    let d = "schedules-demo/design-copper-temper.yaml";
    let cmp = json(&[
        "compare",
        "schedules-demo/copper-building-wire.yaml",
        d,
        "--format",
        "json",
    ]);
    let designed = json(&["design", d, "--format", "json"]);
    assert_eq!(cmp["summary"]["second"], designed["schedule"]["summary"]);
}

const A: &str = "schedules-demo/copper-building-wire.yaml";
const B: &str = "schedules-demo/copper-rod-breakdown-over.yaml";

fn csv_rows(args: &[&str]) -> Vec<Vec<String>> {
    let out = coldpass(args);
    assert!(out.status.success(), "{}", stderr(&out));
    let mut r = csv::ReaderBuilder::new()
        .has_headers(false)
        .from_reader(&out.stdout[..]);
    r.records()
        .map(|rec| rec.unwrap().iter().map(str::to_string).collect())
        .collect()
}

/// `v` to six significant digits, as check's CSV writes figures (written
/// here from the definition: round the mantissa, read it back).
fn six(v: f64) -> f64 {
    format!("{v:.5e}").parse().unwrap()
}

#[test]
fn the_csv_has_the_json_names_and_figures_row_by_row() {
    let cmp = json(&["compare", A, B, "--format", "json"]);
    let rows = csv_rows(&["compare", A, B, "--format", "csv"]);
    let header = &rows[0];
    assert_eq!(header[0], "step");
    assert_eq!(header.last().unwrap(), "caution");
    let passes = cmp["passes"].as_array().unwrap();
    assert_eq!(rows.len() - 1, passes.len());
    for (row, p) in rows[1..].iter().zip(passes) {
        for (name, cell) in header.iter().zip(row) {
            let value = match name.split_once('.') {
                Some((side, key)) => &p[side][key],
                None if name == "step" => &p["step"],
                None => {
                    assert!(cell.starts_with("Planning estimates only"), "{cell}");
                    continue;
                }
            };
            match value {
                serde_json::Value::Number(n) => {
                    let got: f64 = cell.parse().unwrap();
                    assert_eq!(got, six(n.as_f64().unwrap()), "{name}: {cell}");
                }
                serde_json::Value::Array(flags) => {
                    let names: Vec<&str> = flags.iter().map(|f| f.as_str().unwrap()).collect();
                    assert_eq!(cell, &names.join(";"), "{name}");
                }
                serde_json::Value::Bool(b) => assert_eq!(cell, &b.to_string(), "{name}"),
                serde_json::Value::Null => assert_eq!(cell, "", "{name}"),
                other => panic!("{name}: {other}"),
            }
        }
    }
}

#[test]
fn the_summary_csv_has_one_row_per_file_with_checks_summary_columns() {
    let rows = csv_rows(&["compare", A, B, "--format", "csv", "--summary"]);
    let check_a = csv_rows(&["check", A, "--format", "csv", "--summary"]);
    assert_eq!(rows.len(), 3);
    assert_eq!(rows[0][..2], ["side", "file"]);
    assert_eq!(rows[0][2..], check_a[0][..], "the same columns as check's");
    assert_eq!(rows[1][..2], ["first", A]);
    assert_eq!(rows[1][2..], check_a[1][..], "the same figures as check's");
    assert_eq!(rows[2][0], "second");
}

#[test]
fn the_page_holds_every_step_marks_flagged_rows_in_words_and_names_both_files() {
    let out = coldpass(&["compare", A, B, "--format", "html"]);
    assert!(out.status.success(), "{}", stderr(&out));
    let page = stdout(&out);
    assert!(page.starts_with("<!DOCTYPE html>"), "{}", &page[..100]);
    // The pass table's headers: check's words and units, then A or B.
    for h in [
        "exit mm A",
        "exit mm B",
        "draw ratio B - A",
        "power kW A",
        "flags A / B",
    ] {
        assert!(page.contains(&format!("<th>{h}</th>")), "{h}");
    }
    // One row per step of the longer schedule (13), plus the summary rows.
    let steps = (1..=13)
        .filter(|i| page.contains(&format!("><td class=\"n\">{i}</td>")))
        .count();
    assert_eq!(steps, 13);
    // B's step 4 is over its draw limit: the row says so in words.
    assert!(page.contains("OVER"), "an over row is marked in words");
    assert!(page.contains(A) && page.contains(B));
    assert!(page.contains("Caution:"));
    // US units reach the page's headers too.
    let us = stdout(&coldpass(&[
        "compare", A, B, "--format", "html", "--units", "us",
    ]));
    assert!(us.contains("<th>exit in A</th>") && us.contains("<th>power hp B</th>"));
}

/// The side-by-side summary answers the planner's question for both files:
/// the attainable speed, the block and limit that bind and tonnes per shift
/// at that speed (from each file's own check), and it keeps A and B beside
/// each other at 80 columns by wrapping long values.
#[test]
fn the_summary_gives_the_attainable_speed_side_by_side_at_80_columns() {
    let a = "schedules-demo/steel-multiblock.yaml";
    let b = "schedules-demo/copper-building-wire.yaml";
    let out = assert_cmd::Command::cargo_bin("coldpass")
        .unwrap()
        .current_dir(common::root(""))
        .env("COLUMNS", "80")
        .args(["compare", a, b])
        .output()
        .unwrap();
    let text = stdout(&out);
    assert!(text.lines().all(|l| l.chars().count() <= 80), "{text}");
    let check = json(&["check", a, "--format", "json"]);
    let speed = check["summary"]["attainable_speed_m_s"].as_f64().unwrap();
    let block = check["summary"]["binding_block"].as_u64().unwrap();
    let row = |label: &str| {
        text.lines()
            .find(|l| l.starts_with(&format!("│ {label} ")))
            .unwrap_or_else(|| panic!("{label} missing:\n{text}"))
            .to_string()
    };
    assert!(row("attainable speed").contains(&format!("{speed:.2} m/s")));
    assert!(row("binding block and limit").contains(&format!("block {block}, motor-rating")));
    // B has no machine: said, not left blank, on the same line as A.
    assert!(row("tonnes per shift at it").contains("- (no machine)"));
    // Side by side: one header row names both.
    assert!(
        text.lines()
            .any(|l| l.contains("│ A ") && l.contains("│ B ")),
        "{text}"
    );
}

/// `--columns` and `--wide` shape compare's table as they shape check's (they
/// were silently ignored): the picked quantities only, each as A and B; the
/// wide set at 120 columns still fits, cut into panels led by the step.
#[test]
fn columns_and_wide_pick_the_compared_quantities() {
    let run = |extra: &[&str]| {
        let mut args = vec![
            "compare",
            "schedules-demo/steel-multiblock.yaml",
            "schedules-demo/stainless-spring.yaml",
        ];
        args.extend_from_slice(extra);
        assert_cmd::Command::cargo_bin("coldpass")
            .unwrap()
            .current_dir(common::root(""))
            .env("COLUMNS", "120")
            .args(&args)
            .output()
            .unwrap()
    };
    let picked = stdout(&run(&["--columns", "step,flow_stress_exit_mpa"]));
    let passes = &picked[picked.find("Passes").unwrap()..picked.find("Summary").unwrap()];
    assert!(passes.contains("MPa"), "{passes}");
    assert!(
        !passes.contains("ratio"),
        "only the picked quantity:\n{passes}"
    );
    assert!(
        !passes.contains("flags"),
        "flags only when picked:\n{passes}"
    );
    // Step 1's exit flow stress of each file, as check reports it.
    let fa = json(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--format",
        "json",
    ]);
    let fb = json(&[
        "check",
        "schedules-demo/stainless-spring.yaml",
        "--format",
        "json",
    ]);
    let row = passes.lines().find(|l| l.starts_with("│ 1 ")).unwrap();
    for f in [&fa, &fb] {
        let v = f["passes"][0]["flow_stress_exit_mpa"].as_f64().unwrap();
        assert!(row.contains(&format!(" {v:.0} ")), "{row}");
    }

    let wide = stdout(&run(&["--wide"]));
    assert!(wide.lines().all(|l| l.chars().count() <= 120), "{wide}");
    assert!(wide.contains("force") && wide.contains("Delta"), "{wide}");

    // The page takes the same pick.
    let page = stdout(&run(&["--columns", "step,force_kn", "--format", "html"]));
    assert!(page.contains("<th>force kN A</th>") && page.contains("<th>force kN B</th>"));
    assert!(!page.contains("draw ratio A") && !page.contains("flags A / B"));

    let bad = run(&["--columns", "bogus"]);
    assert_eq!(bad.status.code(), Some(1));
    assert!(stderr(&bad).contains("no column is named 'bogus'"));
}

/// `--plot` has no chart to draw for two schedules: it is refused as bad
/// usage (exit 2) naming what to do instead, and no file is written (it was
/// once accepted and silently ignored).
#[test]
fn compare_refuses_plot_and_writes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let svg = dir.path().join("x.svg");
    let o = common::coldpass(&[
        "compare",
        "schedules-demo/copper-building-wire.yaml",
        "schedules-demo/steel-multiblock.yaml",
        "--plot",
        svg.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2), "{}", common::stderr(&o));
    assert!(
        common::stderr(&o).contains("--plot"),
        "{}",
        common::stderr(&o)
    );
    assert!(!svg.exists());
}
