//! `--units us` on the machine tables (temperature and strength, per block,
//! machine summary) and on fit's tables: every figure converted, the unit in
//! every header, JSON unchanged (its keys name SI units, as for check).
//! Each shown figure is checked against the JSON's SI figure converted with
//! NIST SP 811 (2008) Appendix B's printed factors: 1 ft/min = 5.08 E-03 m/s,
//! 1 lbf = 4.448 222 N, 1 hp = 7.456 999 E+02 W, 1 psi = 6.894 757 E+03 Pa,
//! t/F = 1.8 t/C + 32.

mod common;

use assert_cmd::Command;
use common::{root, stdout};
use serde_json::Value;

const STEEL: &str = "schedules-demo/steel-multiblock.yaml";
const MACHINE: &str = "machines/harrow-lane-dry-7.yaml";
const COPPER_RECORD: &str = "schedules-demo/tensile-copper-rod.csv";

fn run(args: &[&str]) -> String {
    let o = Command::cargo_bin("coldpass")
        .unwrap()
        .current_dir(root(""))
        .env("COLUMNS", "200")
        .args(args)
        .output()
        .unwrap();
    stdout(&o)
}

/// The rows of the table after the line starting with `heading`: its header
/// words per column (joined by spaces) and its cells.
fn table_after(text: &str, heading: &str) -> (Vec<String>, Vec<Vec<String>>) {
    let mut lines = text
        .lines()
        .skip_while(|l| !l.starts_with(heading))
        .skip(1)
        .skip_while(|l| !l.starts_with('┌'));
    let split = |l: &str| -> Vec<String> {
        l.trim_matches('│')
            .split('│')
            .map(|c| c.trim().to_string())
            .collect()
    };
    let mut header: Vec<String> = Vec::new();
    let mut rows = Vec::new();
    let mut in_header = true;
    for l in lines.by_ref() {
        if l.starts_with('┌') {
            continue;
        }
        if l.starts_with('├') {
            in_header = false;
            continue;
        }
        if l.starts_with('└') || !l.starts_with('│') {
            break;
        }
        let cells = split(l);
        if in_header {
            if header.is_empty() {
                header = cells;
            } else {
                for (h, c) in header.iter_mut().zip(cells) {
                    if !c.is_empty() {
                        h.push(' ');
                        h.push_str(&c);
                    }
                }
            }
        } else {
            rows.push(cells);
        }
    }
    (header, rows)
}

fn json(args: &[&str]) -> Value {
    let mut all = args.to_vec();
    all.extend_from_slice(&["--format", "json"]);
    serde_json::from_str(&run(&all)).unwrap()
}

fn close(got: &str, want: f64, half_last_digit: f64, what: &str) {
    let g: f64 = got.parse().unwrap_or_else(|_| panic!("{what}: {got:?}"));
    assert!(
        (g - want).abs() <= half_last_digit + 1e-9,
        "{what}: shown {g}, want {want}"
    );
}

#[test]
fn the_block_table_in_us_units_names_and_converts_every_unit() {
    let args = ["check", STEEL, "--machine", MACHINE];
    let j = json(&args);
    let mut us_args = args.to_vec();
    us_args.extend_from_slice(&["--units", "us"]);
    let text = run(&us_args);
    let (header, rows) = table_after(&text, "Machine: ");
    assert_eq!(
        header,
        [
            "block",
            "step",
            "capstan rpm",
            "surface speed ft/min",
            "slip %",
            "net pull lbf",
            "net power hp",
            "motor load %",
            "wire temperature in F",
            "wire temperature out F",
        ],
        "{text}"
    );
    let blocks = j["machine"]["blocks"].as_array().unwrap();
    assert_eq!(rows.len(), blocks.len());
    for (row, b) in rows.iter().zip(blocks) {
        let f = |k: &str| b[k].as_f64().unwrap();
        close(&row[2], f("capstan_rpm"), 0.5, "rpm");
        close(&row[3], f("surface_speed_m_s") / 5.08e-3, 0.5, "ft/min");
        close(&row[5], f("net_pull_kn") * 1e3 / 4.448_222, 0.5, "lbf");
        close(&row[6], f("net_power_kw") * 1e3 / 745.6999, 0.05, "hp");
        close(&row[7], 100.0 * f("motor_load"), 0.05, "motor load %");
        close(
            &row[8],
            f("wire_temperature_in_c") * 1.8 + 32.0,
            0.5,
            "F in",
        );
        close(
            &row[9],
            f("wire_temperature_out_c") * 1.8 + 32.0,
            0.5,
            "F out",
        );
    }
    // The temperature and strength table: F and ksi.
    let (header, rows) = table_after(&text, "Wire temperature and strength");
    assert_eq!(
        header,
        [
            "step",
            "wire temperature entry F",
            "wire temperature F",
            "wire temperature no cooling F",
            "entry yield ksi",
            "tensile strength ksi",
        ]
    );
    let p = &j["passes"][6];
    let f = |k: &str| p[k].as_f64().unwrap();
    close(
        &rows[6][3],
        f("wire_temperature_no_cooling_c") * 1.8 + 32.0,
        0.5,
        "no cooling F",
    );
    close(
        &rows[6][5],
        f("tensile_strength_mpa") / 6.894_757,
        0.05,
        "ksi",
    );
    // The machine summary: the attainable speed in ft/min (and m/s).
    let v = j["summary"]["attainable_speed_m_s"].as_f64().unwrap();
    let line = text
        .lines()
        .find(|l| l.contains("attainable speed") && l.contains("ft/min"))
        .unwrap_or_else(|| panic!("{text}"));
    let shown = line
        .split('│')
        .nth(2)
        .unwrap()
        .split_whitespace()
        .next()
        .unwrap();
    close(shown, v / 5.08e-3, 0.5, "attainable ft/min");
    assert!(
        text.contains("total motor load") && text.contains(" hp "),
        "{text}"
    );
}

#[test]
fn units_change_neither_the_json_of_check_nor_of_fit() {
    let args = ["check", STEEL, "--machine", MACHINE];
    let mut us = args.to_vec();
    us.extend_from_slice(&["--units", "us"]);
    assert_eq!(json(&args), json(&us));
    let fit = ["fit", COPPER_RECORD];
    assert_eq!(json(&fit), json(&["fit", COPPER_RECORD, "--units", "us"]));
}

#[test]
fn the_fit_table_in_us_units_shows_ksi_with_the_keys_names() {
    let j = json(&["fit", COPPER_RECORD]);
    let text = run(&["fit", COPPER_RECORD, "--units", "us"]);
    let (header, rows) = table_after(&text, "  Note:");
    assert_eq!(
        header,
        [
            "law",
            "parameters ± std error",
            "RMS ksi",
            "R^2",
            "AIC",
            "UTS from law ksi",
            "stress ksi at reach strain",
            "converged",
        ],
        "{text}"
    );
    let fits = j["fits"].as_array().unwrap();
    let hollomon = fits.iter().find(|f| f["law"] == "hollomon").unwrap();
    let row = rows
        .iter()
        .find(|r| r[0].starts_with("hollomon"))
        .expect("hollomon row");
    close(
        &row[2],
        hollomon["rms_mpa"].as_f64().unwrap() / 6.894_757,
        0.0005,
        "RMS ksi",
    );
    // The parameter keeps its key's name, with its value in ksi beside it.
    let k = hollomon["params"]["k_mpa"].as_f64().unwrap();
    let want = format!("({:.3}", k / 6.894_757);
    assert!(
        text.contains("k_mpa = ") && text.contains(&want),
        "{want} in {text}"
    );
    let strength = text
        .lines()
        .find(|l| l.starts_with("  tensile strength"))
        .unwrap();
    assert!(
        strength.contains(" ksi |") && !strength.contains("MPa"),
        "{strength}"
    );
}

#[test]
fn the_fit_page_and_chart_follow_the_units() {
    let si = run(&["fit", COPPER_RECORD, "--format", "html"]);
    let us = run(&["fit", COPPER_RECORD, "--format", "html", "--units", "us"]);
    assert!(si.contains("true stress, MPa") && si.contains("<th>RMS MPa</th>"));
    assert!(us.contains("true stress, ksi") && us.contains("<th>RMS ksi</th>"));
    assert!(!us.contains("true stress, MPa"));
    // The summary's UTS in ksi: the JSON's MPa over 6.894757 (SP 811).
    let j = json(&["fit", COPPER_RECORD]);
    let uts = j["uts_mpa"].as_f64().unwrap() / 6.894_757;
    assert!(us.contains(&format!("{uts:.1} ksi")), "{uts:.1} ksi");
}

#[test]
fn the_check_page_shows_the_block_table_in_the_units_asked() {
    let args = ["check", STEEL, "--machine", MACHINE, "--format", "html"];
    let si = run(&args);
    let mut us_args = args.to_vec();
    us_args.extend_from_slice(&["--units", "us"]);
    let us = run(&us_args);
    for h in [
        "net pull kN",
        "net power kW",
        "surface speed m/s",
        "wire temperature out C",
    ] {
        assert!(si.contains(&format!("<th>{h}</th>")), "{h}");
    }
    for h in [
        "net pull lbf",
        "net power hp",
        "surface speed ft/min",
        "wire temperature out F",
    ] {
        assert!(us.contains(&format!("<th>{h}</th>")), "{h}");
    }
}
