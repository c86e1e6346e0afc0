//! Tables that fit: the default view fits 120 columns for a 25-pass schedule,
//! `--wide` gives every column, `--columns` picks by JSON key, notes wrap to
//! the width, and `--units us` converts every figure it shows and names the
//! unit in the header.

mod common;

use assert_cmd::Command;
use common::{coldpass, root, stderr, stdout};

const P25: &str = "tests/data/ux-25-passes.yaml";

/// Runs coldpass with `COLUMNS` set, as a terminal of that width would.
fn at_width(width: usize, args: &[&str]) -> std::process::Output {
    Command::cargo_bin("coldpass")
        .unwrap()
        .current_dir(root(""))
        .env("COLUMNS", width.to_string())
        .args(args)
        .output()
        .unwrap()
}

fn widest(text: &str) -> usize {
    text.lines().map(|l| l.chars().count()).max().unwrap_or(0)
}

fn json(path: &str) -> serde_json::Value {
    serde_json::from_str(&stdout(&coldpass(&["check", path, "--format", "json"]))).unwrap()
}

#[test]
fn the_default_table_of_a_25_pass_schedule_fits_120_columns() {
    let out = at_width(120, &["check", P25]);
    assert_eq!(
        out.status.code(),
        Some(3),
        "the layout schedule is over on purpose"
    );
    let text = stdout(&out);
    assert!(
        widest(&text) <= 120,
        "widest line {}:\n{text}",
        widest(&text)
    );
    // Every step is a row: 25 draws and the anneal.
    for step in 1..=26 {
        assert!(
            text.lines().any(|l| l.starts_with(&format!("│ {step} "))),
            "step {step} missing:\n{text}"
        );
    }
    // The figures read first are there, and the flags of the flagged passes.
    for word in [
        "reduction",
        "draw",
        "ratio",
        "power",
        "over-draw-limit",
        "near-draw-limit",
    ] {
        assert!(text.contains(word), "{word} missing");
    }
    assert!(text.contains("Caution:"));
}

#[test]
fn notes_and_the_caution_wrap_to_a_narrow_terminal() {
    let text = stdout(&at_width(80, &["check", P25]));
    let after_table = text.split("Notes\n").nth(1).expect("notes");
    assert!(widest(after_table) <= 80, "{after_table}");
    assert!(after_table.contains("Caution:"));
}

#[test]
fn wide_shows_every_column() {
    let text = stdout(&at_width(120, &["check", P25, "--wide"]));
    for header in [
        "semi-angle deg",
        "optimum deg",
        "elongation",
        "Delta",
        "sachs MPa",
        "upper-bound MPa",
        "force kN",
        "exit speed m/s",
        "temperature rise C",
        "entry mm",
    ] {
        assert!(
            text.contains(header),
            "{header} missing from --wide:\n{text}"
        );
    }
}

#[test]
fn columns_picks_by_json_key_and_names_the_allowed_keys_on_a_wrong_one() {
    let text = stdout(&at_width(
        120,
        &[
            "check",
            P25,
            "--columns",
            "step,exit_diameter_mm,draw_ratio",
        ],
    ));
    let header = text.lines().find(|l| l.starts_with("│ step")).unwrap();
    assert!(
        header.contains("exit") && header.contains("draw"),
        "{header}"
    );
    assert!(!header.contains("reduction"), "{header}");
    // The draw ratio of step 21 as the JSON has it, to three decimals.
    let j = json(P25);
    let r21 = j["passes"][20]["draw_ratio"].as_f64().unwrap();
    assert!(text.contains(&format!("{r21:.3}")), "{text}");

    let bad = coldpass(&["check", P25, "--columns", "step,speed"]);
    assert_eq!(bad.status.code(), Some(1));
    let e = stderr(&bad);
    assert!(e.contains("'speed'") && e.contains("exit_speed_m_s"), "{e}");
    assert_eq!(e.lines().count(), 1, "{e}");
}

#[test]
fn us_units_convert_every_figure_and_name_the_unit() {
    let j = json(P25);
    let text = stdout(&at_width(
        200,
        &[
            "check",
            P25,
            "--units",
            "us",
            "--columns",
            "step,exit_diameter_mm,flow_stress_exit_mpa,force_kn,exit_speed_m_s,power_kw,wire_temperature_c",
        ],
    ));
    for unit in ["in", "ksi", "lbf", "ft/min", "hp", "F"] {
        assert!(
            text.lines().any(|l| l.split(['│', ' ']).any(|w| w == unit)),
            "header unit {unit} missing:\n{text}"
        );
    }
    let row = text
        .lines()
        .find(|l| l.starts_with("│ 5 "))
        .expect("step 5 row");
    let cells: Vec<f64> = row
        .split('│')
        .filter_map(|c| c.trim().parse().ok())
        .collect();
    let p = &j["passes"][4];
    let f = |k: &str| p[k].as_f64().unwrap();
    // NIST SP 811 (2008) Appendix B: 1 in = 25.4 mm, 1 psi = 6.894 757 kPa,
    // 1 lbf = 4.448 222 N, 1 ft/min = 5.08e-3 m/s, 1 hp = 745.6999 W, F = 1.8 C + 32.
    let expect = [
        5.0,
        f("exit_diameter_mm") / 25.4,
        f("flow_stress_exit_mpa") / 6.894_757,
        f("force_kn") * 1000.0 / 4.448_222,
        f("exit_speed_m_s") / 5.08e-3,
        f("power_kw") * 1000.0 / 745.6999,
        f("wire_temperature_c") * 1.8 + 32.0,
    ];
    // Shown to 4, 1, 0, 0, 1 and 0 decimals: within half the last digit.
    let half = [0.0, 5e-5, 0.05, 0.5, 0.5, 0.05, 0.5];
    assert_eq!(cells.len(), expect.len(), "{row}");
    for ((got, want), tol) in cells.iter().zip(expect).zip(half) {
        assert!((got - want).abs() <= tol + 1e-9, "{got} vs {want} in {row}");
    }
}

/// The default table report of `args`, at 120 columns: every line fits 120
/// characters (counted as characters, not bytes).
fn fits_120(args: &[&str]) -> String {
    let out = at_width(120, args);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = stdout(&out);
    assert!(
        widest(&text) <= 120,
        "widest line {}:\n{text}",
        widest(&text)
    );
    assert!(text.contains("Caution:"), "{text}");
    text
}

#[test]
fn the_design_report_of_the_temper_demo_fits_120_columns() {
    let text = fits_120(&["design", "schedules-demo/design-copper-temper.yaml"]);
    // The wrapped anneal reason and notes keep every word, in order.
    let words = text.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(
        words.contains("an anneal anywhere from 2.1573 to 2.7291 mm lands in the window"),
        "{text}"
    );
    assert!(
        words.contains("the temper run could not sit at the aimed 400.0 MPa within the passes"),
        "{text}"
    );
}

#[test]
fn the_fit_report_of_the_copper_record_fits_120_columns() {
    let text = fits_120(&["fit", "schedules-demo/tensile-copper-rod.csv"]);
    // Every law is a row, with its parameters and standard errors.
    for law in [
        "perfectly-plastic",
        "linear",
        "hollomon",
        "ludwik",
        "swift (best)",
        "voce",
    ] {
        assert!(
            text.lines().any(|l| l.starts_with(&format!("│ {law} "))),
            "{law}:\n{text}"
        );
    }
    assert!(text.contains("hardening_modulus_mpa = 359.52"), "{text}");
    assert!(text.contains("± 3.1"), "{text}");
}

#[test]
fn the_risk_report_of_the_scatter_demo_fits_120_columns() {
    let text = fits_120(&["risk", "schedules-demo/steel-multiblock-scatter.yaml"]);
    for step in 1..=7 {
        assert!(
            text.lines().any(|l| l.starts_with(&format!("│ {step} "))),
            "step {step} missing:\n{text}"
        );
    }
    // The standard error sits under its probability, the words all there.
    assert!(text.contains("89.21") && text.contains("+- 0.31"), "{text}");
    let words = text.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(
        words.contains("--samples 137104 would bring it to +-20 %"),
        "{text}"
    );
}

#[test]
fn an_empty_die_size_column_is_left_out_and_a_given_one_kept() {
    // steel-multiblock gives no die as text and has no anneal: no die column.
    let text = stdout(&at_width(
        120,
        &["check", "schedules-demo/steel-multiblock.yaml"],
    ));
    assert!(!text.contains("│ die "), "{text}");
    let text = stdout(&at_width(
        120,
        &["check", "schedules-demo/steel-multiblock.yaml", "--wide"],
    ));
    assert!(!text.contains("│ die size "), "{text}");
    // Picked by name, it stays.
    let text = stdout(&at_width(
        120,
        &[
            "check",
            "schedules-demo/steel-multiblock.yaml",
            "--columns",
            "step,die_size",
        ],
    ));
    assert!(text.contains("│ die "), "{text}");
    // The 25-pass schedule has an anneal row, which names itself there.
    let text = stdout(&at_width(120, &["check", P25]));
    assert!(text.contains("│ die "), "{text}");
    assert!(text.contains("anneal"), "{text}");
}

/// The words and figures of a table report: split at spaces and at the
/// table's rules.
fn tokens(text: &str) -> std::collections::BTreeSet<String> {
    text.split(|c: char| c.is_whitespace() || "│┌┬┐├┼┤└┴┘─".contains(c))
        .filter(|t| !t.is_empty())
        .map(str::to_string)
        .collect()
}

/// At 60, 80 and 120 columns every line of the report fits, and every word
/// and figure is one the report shows at 250 columns, where nothing is cut:
/// a header word split across lines ("tempe" / "rature") or a figure broken
/// ("7." / "360") would be a new token.
fn fits_without_breaking_words(args: &[&str]) {
    let wide = stdout(&at_width(250, args));
    assert!(widest(&wide) <= 250, "{}", widest(&wide));
    let whole = tokens(&wide);
    for width in [60, 80, 120] {
        let text = stdout(&at_width(width, args));
        assert!(
            widest(&text) <= width,
            "{args:?} at {width}: a line of {}:\n{text}",
            widest(&text)
        );
        let broken: Vec<String> = tokens(&text).difference(&whole).cloned().collect();
        assert!(
            broken.is_empty(),
            "{args:?} at {width}: broken words {broken:?}:\n{text}"
        );
        assert!(text.contains("Caution:"), "{args:?} at {width}");
    }
}

#[test]
fn a_25_pass_check_fits_60_80_and_120_columns_with_whole_header_words() {
    fits_without_breaking_words(&["check", P25]);
    fits_without_breaking_words(&["check", P25, "--wide"]);
    fits_without_breaking_words(&[
        "check",
        P25,
        "--columns",
        "step,exit_diameter_mm,draw_ratio,power_kw,wire_temperature_c,flags",
    ]);
    // Every step is still a row at 60 columns (the panels repeat the step).
    let text = stdout(&at_width(60, &["check", P25]));
    for step in 1..=26 {
        assert!(
            text.lines().any(|l| l.starts_with(&format!("│ {step} "))),
            "step {step} missing:\n{text}"
        );
    }
}

#[test]
fn the_machine_tables_fit_60_80_and_120_columns_in_either_units() {
    let run = [
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--machine",
        "machines/harrow-lane-dry-7.yaml",
    ];
    fits_without_breaking_words(&run);
    let mut us = run.to_vec();
    us.extend_from_slice(&["--units", "us"]);
    fits_without_breaking_words(&us);
}

#[test]
fn fit_compare_and_the_catalogue_fit_60_80_and_120_columns() {
    fits_without_breaking_words(&["fit", "schedules-demo/tensile-copper-rod.csv"]);
    fits_without_breaking_words(&[
        "compare",
        "schedules-demo/copper-building-wire.yaml",
        "schedules-demo/copper-rod-breakdown-over.yaml",
    ]);
    fits_without_breaking_words(&[
        "check",
        "schedules-demo/copper-building-wire.yaml",
        "schedules-demo/stainless-spring.yaml",
        "schedules-demo/steel-multiblock.yaml",
        "schedules-demo/copper-line-3-speed.yaml",
    ]);
}

/// `--columns` is named by the JSON keys: every key a pass carries in the JSON
/// (nested keys joined by a dot) is a column, so a user who reads a key in
/// the JSON can ask the table for it (a machine schedule, so that `block`
/// and the carried temperatures are there).
#[test]
fn every_pass_key_of_the_json_is_a_column() {
    let j = json("schedules-demo/steel-multiblock.yaml");
    let pass = j["passes"][0].as_object().unwrap();
    let mut keys = Vec::new();
    for (k, v) in pass {
        match v {
            serde_json::Value::Object(inner) => {
                keys.extend(inner.keys().map(|i| format!("{k}.{i}")));
            }
            // `kind` is the row's own word (draw or anneal), not a figure.
            _ if k == "kind" => {}
            _ => keys.push(k.clone()),
        }
    }
    assert!(keys.len() > 30, "{keys:?}");
    for key in &keys {
        let out = at_width(
            120,
            &[
                "check",
                "schedules-demo/steel-multiblock.yaml",
                "--columns",
                &format!("step,{key}"),
            ],
        );
        assert_eq!(out.status.code(), Some(0), "{key}: {}", stderr(&out));
    }
    let out = at_width(
        120,
        &[
            "check",
            "schedules-demo/steel-multiblock.yaml",
            "--columns",
            "step,block,net_pull_kn,tensile_strength_mpa",
        ],
    );
    let text = stdout(&out);
    assert!(text.contains("net pull"), "{text}");
    // Block 7 carries die 7 on this machine.
    assert!(
        text.lines()
            .any(|l| l.starts_with("│ 7 ") && l.contains("│ 7 ")),
        "{text}"
    );
}
