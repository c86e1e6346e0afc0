//! One name for one figure in every format (the project's rule): a table
//! header is the plain words of the JSON key it shows (`motor load %` for
//! `motor_load`), and the CSV carries a figure once. The rule and the
//! wording are the project's own.

mod common;

use common::{coldpass, json, stdout};

const MACHINE_DEMO: &str = "schedules-demo/steel-multiblock.yaml";

/// The headers of the table whose first header cell is `first`: each
/// column's stacked words joined by a space (the table puts one word a line).
fn headers(text: &str, first: &str) -> Vec<String> {
    let lines: Vec<&str> = text.lines().collect();
    let start = lines
        .iter()
        .position(|l| l.split('│').nth(1).map(str::trim) == Some(first))
        .unwrap_or_else(|| panic!("no table starting with '{first}':\n{text}"));
    let mut cols: Vec<Vec<String>> = Vec::new();
    for l in &lines[start..] {
        if !l.starts_with('│') {
            break;
        }
        let cells: Vec<&str> = l.trim_matches('│').split('│').collect();
        cols.resize(cells.len(), Vec::new());
        for (c, cell) in cols.iter_mut().zip(cells) {
            if !cell.trim().is_empty() {
                c.push(cell.trim().to_string());
            }
        }
    }
    cols.into_iter().map(|c| c.join(" ")).collect()
}

#[test]
fn the_machine_tables_name_their_figures_by_their_keys() {
    let text = stdout(&coldpass(&["check", MACHINE_DEMO]));
    let blocks = headers(&text, "block");
    assert!(blocks.contains(&"motor load %".into()), "{blocks:?}");
    assert!(!blocks.contains(&"load %".into()), "{blocks:?}");
    // The temperature table: of the tables that start with `step`, the one
    // with the no-cooling bound.
    let all: Vec<Vec<String>> = text
        .split("\n\n")
        .filter(|t| t.lines().any(|l| l.starts_with("│ step │")))
        .map(|t| headers(t, "step"))
        .collect();
    let temperature = all
        .iter()
        .find(|h| h.iter().any(|w| w.contains("no cooling")))
        .unwrap_or_else(|| panic!("no temperature table: {all:?}"));
    for h in [
        "wire temperature entry C",
        "wire temperature C",
        "wire temperature no cooling C",
        "entry yield MPa",
        "tensile strength MPa",
    ] {
        assert!(temperature.contains(&h.into()), "{h} in {temperature:?}");
    }
    // The JSON keys these headers read.
    let j = json(&coldpass(&["check", MACHINE_DEMO, "--format", "json"]));
    for key in [
        "wire_temperature_entry_c",
        "wire_temperature_c",
        "wire_temperature_no_cooling_c",
    ] {
        assert!(j["passes"][0].get(key).is_some(), "{key}");
    }
    assert!(j["machine"]["blocks"][0].get("motor_load").is_some());
}

#[test]
fn the_risk_table_names_the_main_driver_as_its_key_does() {
    let text = stdout(&coldpass(&[
        "risk",
        "schedules-demo/steel-multiblock-scatter.yaml",
        "--samples",
        "200",
    ]));
    let h = headers(&text, "step");
    assert!(h.contains(&"main driver".into()), "{h:?}");
    assert!(!h.iter().any(|w| w.contains("driven")), "{h:?}");
}

#[test]
fn the_csv_carries_a_blocks_net_pull_once() {
    let o = coldpass(&["check", MACHINE_DEMO, "--format", "csv"]);
    let text = stdout(&o);
    let mut rows = csv::Reader::from_reader(text.as_bytes());
    let header: Vec<String> = rows.headers().unwrap().iter().map(String::from).collect();
    assert!(header.contains(&"net_pull_kn".into()), "{header:?}");
    assert!(
        !header.contains(&"machine.net_pull_kn".into()),
        "{header:?}"
    );
    let n = header.iter().position(|h| h == "net_pull_kn").unwrap();
    let step = header.iter().position(|h| h == "step").unwrap();
    // It was a duplicate: the block's net pull in the JSON is the pass's
    // (the same front pull less the same back pull held).
    let j = json(&coldpass(&["check", MACHINE_DEMO, "--format", "json"]));
    let blocks = j["machine"]["blocks"].as_array().unwrap();
    assert!(!blocks.is_empty());
    for b in blocks {
        let s = b["step"].as_u64().unwrap().to_string();
        let row = rows
            .records()
            .map(Result::unwrap)
            .find(|r| r[step] == s)
            .unwrap();
        let csv: f64 = row[n].parse().unwrap();
        let block = b["net_pull_kn"].as_f64().unwrap();
        let pass = j["passes"]
            .as_array()
            .unwrap()
            .iter()
            .find(|p| p["step"].as_u64() == b["step"].as_u64())
            .unwrap()["net_pull_kn"]
            .as_f64()
            .unwrap();
        assert_eq!(block, pass, "step {s}: block and pass net pull");
        // The CSV rounds to six significant digits.
        assert!((csv - block).abs() <= 1e-5 * block.abs(), "step {s}");
        rows = csv::Reader::from_reader(text.as_bytes());
    }
}
