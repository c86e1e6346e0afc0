//! `coldpass risk --units us` and risk's layout: every US figure the table
//! and the page show is the JSON's SI figure converted with the NIST SP 811
//! factors (written out here, not taken from the crate); JSON stays SI; and
//! every line of the table (title, headings, tables, notes) fits 60, 80 and
//! 120 columns, as `check`'s tables do (tests/ux_tables.rs).

mod common;

use std::process::Output;

use assert_cmd::Command;
use common::{root, stderr, stdout};

const DEMO: &str = "schedules-demo/steel-multiblock-scatter.yaml";

// NIST Special Publication 811 (2008), Appendix B.8 and B.9.
/// 1 in = 25.4 mm (exact).
const MM_PER_IN: f64 = 25.4;
/// 1 psi = 6.894 757 E+03 Pa, so 1 ksi = 6.894 757 MPa.
const MPA_PER_KSI: f64 = 6.894_757;
/// 1 ft/min = 5.08 E-03 m/s (exact).
const M_S_PER_FT_MIN: f64 = 5.08e-3;
/// 1 hp (550 ft lbf/s) = 7.456 999 E+02 W.
const W_PER_HP: f64 = 745.6999;

/// Runs coldpass with `COLUMNS` set, as a terminal of that width would.
fn at_width(width: usize, args: &[&str]) -> Output {
    Command::cargo_bin("coldpass")
        .unwrap()
        .current_dir(root(""))
        .env("COLUMNS", width.to_string())
        .args(args)
        .output()
        .unwrap()
}

fn ok(o: Output) -> String {
    assert!(
        matches!(o.status.code(), Some(0) | Some(3)),
        "{}",
        stderr(&o)
    );
    stdout(&o)
}

fn json(args: &[&str]) -> serde_json::Value {
    let mut a = args.to_vec();
    a.extend(["--format", "json"]);
    serde_json::from_str(&ok(at_width(120, &a))).unwrap()
}

/// The cells of a table line `│ a │ b │`, trimmed.
fn cells(line: &str) -> Vec<String> {
    let inner = line.trim().trim_start_matches('│').trim_end_matches('│');
    inner.split('│').map(|c| c.trim().to_string()).collect()
}

/// The figures in a text, in order, without their sign (`-0 to +0.02` gives 0, 0.02).
fn figures(text: &str) -> Vec<f64> {
    text.split(|c: char| !(c.is_ascii_digit() || c == '.' || c == 'e'))
        .filter(|t| t.chars().next().is_some_and(|c| c.is_ascii_digit()))
        .map(|t| t.trim_end_matches('.').parse::<f64>().unwrap())
        .collect()
}

/// `shown` is `si / factor` shown to 4 significant digits.
fn close_4_sig(shown: f64, si: f64, factor: f64, what: &str) {
    let want = si / factor;
    let tol = 5e-4 * want.abs() + 1e-15;
    assert!(
        (shown - want).abs() <= tol,
        "{what}: shown {shown}, {si} / {factor} = {want}"
    );
}

#[test]
fn us_units_convert_every_figure_the_table_shows_and_name_the_unit() {
    let args = ["risk", DEMO, "--samples", "2000"];
    let si = json(&args);
    // Wide enough for one table each, so every row is one line.
    let text = ok(at_width(400, &[&args[..], &["--units", "us"]].concat()));

    // The pass table: the exit diameter in inches, "in" under "exit".
    let passes = text.split("Passes (").nth(1).expect("pass table");
    let lines: Vec<&str> = passes.lines().collect();
    // lines[0] is the rest of the heading, lines[1] the top border.
    assert_eq!(cells(lines[2])[1], "exit", "{passes}");
    assert_eq!(cells(lines[3])[1], "in", "{passes}");
    let rows: Vec<Vec<String>> = lines
        .iter()
        .filter(|l| l.starts_with("│ ") && cells(l)[0].parse::<usize>().is_ok())
        .map(|l| cells(l))
        .collect();
    let json_passes = si["passes"].as_array().unwrap();
    assert_eq!(rows.len(), json_passes.len());
    for (row, p) in rows.iter().zip(json_passes) {
        assert_eq!(row[0], p["step"].to_string());
        let mm = p["exit_diameter_mm"].as_f64().unwrap();
        let shown: f64 = row[1].parse().unwrap();
        // Four decimals of an inch.
        assert!(
            (shown - mm / MM_PER_IN).abs() <= 0.5e-4 + 1e-12,
            "step {}: {shown} in for {mm} mm",
            row[0]
        );
        // Draw ratios are pure numbers: the same as in SI.
        assert_eq!(
            row[2].parse::<f64>().unwrap(),
            (p["draw_ratio"].as_f64().unwrap() * 1000.0).round() / 1000.0
        );
    }

    // The inputs that scatter: sd and limits in the unit their key names,
    // converted, with the US unit after them; relative and pure figures as in SI.
    let scatter = text.split("Inputs that scatter").nth(1).unwrap();
    let mut seen = 0;
    for input in si["scatter"].as_array().unwrap() {
        let name = input["input"].as_str().unwrap();
        let si_text = input["distribution"].as_str().unwrap();
        let line = scatter
            .lines()
            .find(|l| l.starts_with(&format!("│ {name} ")))
            .unwrap_or_else(|| panic!("{name} missing:\n{scatter}"));
        let shown = &cells(line)[1];
        let factor = if name.ends_with("_mm") {
            Some((MM_PER_IN, " in"))
        } else if name.ends_with("_mpa") {
            Some((MPA_PER_KSI, " ksi"))
        } else {
            None
        };
        match factor {
            Some((f, unit)) if !si_text.contains("cv ") || si_text.contains("within") => {
                assert!(shown.ends_with(unit), "{name}: {shown}");
                let (a, b) = (figures(shown), figures(si_text));
                assert_eq!(a.len(), b.len(), "{name}: {shown} / {si_text}");
                for (x, y) in a.into_iter().zip(b) {
                    close_4_sig(x, y, f, name);
                }
                seen += 1;
            }
            _ => assert_eq!(shown, si_text, "{name}"),
        }
    }
    // rod_diameter_mm, die_diameter_mm and flow.k_mpa on the demo.
    assert_eq!(seen, 3, "{scatter}");

    // The note's running speed, in ft/min.
    let note_si = si["notes"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(|n| n.as_str())
        .find(|n| n.contains(" m/s in every sample"))
        .expect("the machine's note");
    let m_s = figures(note_si.split("running at ").nth(1).unwrap())[0];
    let want = format!("running at {:.1} ft/min", m_s / M_S_PER_FT_MIN);
    assert!(text.contains(&want), "{want} missing:\n{text}");
    assert!(!text.contains(" m/s"), "{text}");
}

#[test]
fn json_yaml_and_csv_stay_si_whatever_the_units() {
    for format in ["json", "yaml", "csv"] {
        let args = ["risk", DEMO, "--samples", "1000", "--format", format];
        let si = ok(at_width(120, &args));
        let us = ok(at_width(120, &[&args[..], &["--units", "us"]].concat()));
        assert_eq!(si, us, "{format}");
    }
}

#[test]
fn the_page_shows_us_units_too() {
    let args = ["risk", DEMO, "--samples", "1000"];
    let si = json(&args);
    let page = ok(at_width(
        120,
        &[&args[..], &["--units", "us", "--format", "html"]].concat(),
    ));
    assert!(page.contains("exit in"), "no 'exit in' header");
    assert!(!page.contains("exit mm"));
    for p in si["passes"].as_array().unwrap() {
        let inch = p["exit_diameter_mm"].as_f64().unwrap() / MM_PER_IN;
        let cell = format!(">{inch:.4}<");
        assert!(page.contains(&cell), "{cell} missing");
    }
    assert!(page.contains("sd 0.001969 in"), "rod sd 0.05 mm / 25.4");
}

#[test]
fn a_line_limit_is_named_by_its_key_with_the_horsepower_beside_it() {
    // The demo without its machine: the line's block_power_kw governs.
    let text = std::fs::read_to_string(root(DEMO)).unwrap();
    let text: String = text
        .lines()
        .filter(|l| !l.starts_with("machine:"))
        .map(|l| format!("{l}\n"))
        .collect();
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("line.yaml");
    std::fs::write(&path, text).unwrap();
    let path = path.to_str().unwrap();
    let args = ["risk", path, "--samples", "1000"];
    let si = json(&args);
    let note = si["notes"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(|n| n.as_str())
        .find(|n| n.contains("line.block_power_kw"))
        .expect("the line's note")
        .to_string();
    let kw = figures(note.split("line.block_power_kw ").nth(1).unwrap())[0];
    let us = ok(at_width(400, &[&args[..], &["--units", "us"]].concat()));
    let want = format!(
        "line.block_power_kw {kw} kW ({:.2} hp)",
        kw * 1e3 / W_PER_HP
    );
    assert!(us.contains(&want), "{want} missing:\n{us}");
}

#[test]
fn every_line_of_the_risk_table_fits_60_80_and_120_columns() {
    for width in [60, 80, 120] {
        for extra in [
            &[][..],
            &["--units", "us"][..],
            &["--target-probability", "0.001"][..],
        ] {
            let args = [&["risk", DEMO, "--samples", "2000"][..], extra].concat();
            let text = ok(at_width(width, &args));
            for line in text.lines() {
                assert!(
                    line.chars().count() <= width,
                    "{width} columns, {extra:?}: {} characters in\n{line}\n{text}",
                    line.chars().count()
                );
            }
            for heading in ["Inputs that scatter", "Summary", "Notes", "Caution:"] {
                assert!(text.contains(heading), "{heading} at {width}");
            }
            // Every pass is a row of every panel, and the whole title is there.
            for step in 1..=7 {
                assert!(
                    text.lines().any(|l| l.starts_with(&format!("│ {step} "))),
                    "step {step} at {width}"
                );
            }
            let words: Vec<&str> = text.split_whitespace().collect();
            let title = "Demo mill, 5.5 mm low-carbon steel rod to 2.5 mm on a multi-block machine, with scatter";
            assert_eq!(words[..title.split_whitespace().count()].join(" "), title);
        }
    }
}
