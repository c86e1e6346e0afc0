//! One name for one figure in every format (the project's rule): a table
//! header is the plain words of the JSON key it shows (`motor load %` for
//! `motor_load`); a figure the JSON has at two paths is equal at both. The
//! rule and the wording are the project's own.

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

/// The CSV has `net_pull_kn` (the pass's) and `machine.net_pull_kn` (the
/// block's, as every `machine.blocks[]` key is `machine.KEY`): two JSON
/// paths for one figure, equal on every block, so a reader may take either.
#[test]
fn the_csv_net_pull_of_a_block_is_its_passs() {
    let text = stdout(&coldpass(&["check", MACHINE_DEMO, "--format", "csv"]));
    let mut rows = csv::Reader::from_reader(text.as_bytes());
    let header: Vec<String> = rows.headers().unwrap().iter().map(String::from).collect();
    let at = |k: &str| {
        header
            .iter()
            .position(|h| h == k)
            .unwrap_or_else(|| panic!("{k} in {header:?}"))
    };
    let (pass, block) = (at("net_pull_kn"), at("machine.net_pull_kn"));
    let j = json(&coldpass(&["check", MACHINE_DEMO, "--format", "json"]));
    let blocks = j["machine"]["blocks"].as_array().unwrap();
    let mut seen = 0;
    for row in rows.records().map(Result::unwrap) {
        if row[block].is_empty() {
            continue; // an anneal row
        }
        assert_eq!(row[pass], row[block], "step {}", &row[0]);
        seen += 1;
    }
    assert_eq!(seen, blocks.len());
    // The JSON, at full precision: the same number under both paths.
    for b in blocks {
        let p = j["passes"]
            .as_array()
            .unwrap()
            .iter()
            .find(|p| p["step"] == b["step"])
            .unwrap();
        assert_eq!(p["net_pull_kn"], b["net_pull_kn"], "step {}", b["step"]);
    }
}
