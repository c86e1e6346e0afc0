//! Everyday comforts through the binary: the catalogue of several schedules,
//! CSV rounding and the summary CSV, a UTF-8 byte-order mark, and a CSV file
//! given to check.

mod common;

use common::{coldpass, root, stderr, stdout};

fn json_of(args: &[&str]) -> serde_json::Value {
    serde_json::from_str(&stdout(&coldpass(args))).unwrap()
}

#[test]
fn a_folder_gives_one_row_per_product_matching_each_check() {
    // By the conservative envelope copper-rod-breakdown-over is over (see
    // check_cli): the worst status is 3.
    let out = coldpass(&[
        "check",
        "schedules-demo",
        "--method",
        "max",
        "--format",
        "json",
    ]);
    assert_eq!(out.status.code(), Some(3), "{}", stderr(&out));
    let cat: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let products = cat["products"].as_array().unwrap();
    let demos = common::demo_schedules();
    assert_eq!(
        products.len(),
        demos.len(),
        "design and flow-block files are left out"
    );
    for (p, path) in products.iter().zip(&demos) {
        let rel = format!(
            "schedules-demo/{}",
            path.file_name().unwrap().to_string_lossy()
        );
        assert_eq!(p["file"], rel);
        let one = json_of(&["check", &rel, "--method", "max", "--format", "json"]);
        let s = &one["summary"];
        for key in [
            "verdict",
            "draw_passes",
            "anneals",
            "worst_draw_ratio",
            "worst_step",
            "throughput_t_per_shift",
            "total_power_kw",
        ] {
            assert_eq!(p[key], s[key], "{rel}: {key}");
        }
        let last_draw = one["passes"]
            .as_array()
            .unwrap()
            .iter()
            .rev()
            .find(|r| r["kind"] == "draw")
            .unwrap();
        assert_eq!(p["finish_speed_m_s"], last_draw["exit_speed_m_s"], "{rel}");
    }
    // The whole caution, safety words included, as on every check report.
    let caution = cat["caution"].as_str().unwrap();
    assert!(caution.contains("confirm"), "{caution}");
    assert!(caution.contains("whips when it breaks"), "{caution}");
}

#[test]
fn a_file_that_cannot_be_checked_is_a_row_and_makes_the_status_one() {
    let out = coldpass(&[
        "check",
        "schedules-demo/stainless-spring.yaml",
        "schedules-demo/tensile-copper-rod.csv",
        "--format",
        "csv",
    ]);
    assert_eq!(out.status.code(), Some(1));
    let text = stdout(&out);
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let header = r.headers().unwrap().clone();
    let col = |k: &str| header.iter().position(|h| h == k).unwrap();
    let rows: Vec<csv::StringRecord> = r.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), 2);
    assert_eq!(&rows[0][col("verdict")], "ok");
    assert_eq!(&rows[1][col("verdict")], "error");
    assert!(
        rows[1][col("error")].contains("coldpass fit"),
        "{:?}",
        rows[1]
    );
}

#[test]
fn the_catalogue_table_is_one_line_per_product() {
    let out = coldpass(&[
        "check",
        "schedules-demo/stainless-spring.yaml",
        "schedules-demo/steel-multiblock.yaml",
    ]);
    assert_eq!(out.status.code(), Some(0));
    let text = stdout(&out);
    assert_eq!(
        text.lines().filter(|l| l.contains(".yaml ")).count(),
        2,
        "{text}"
    );
    assert!(text.contains("warn") && text.contains("Caution:"));
    // steel-multiblock runs on its machine: its speed is the attainable one, marked.
    let steel = text
        .lines()
        .find(|l| l.contains("steel-multiblock.yaml"))
        .unwrap();
    assert!(steel.contains(" *"), "{steel}");
}

#[test]
fn csv_figures_carry_six_significant_digits() {
    let path = "schedules-demo/stainless-spring.yaml";
    let csv_text = stdout(&coldpass(&["check", path, "--format", "csv"]));
    let json = json_of(&["check", path, "--format", "json"]);
    let mut r = csv::Reader::from_reader(csv_text.as_bytes());
    let header = r.headers().unwrap().clone();
    let col = header.iter().position(|h| h == "draw_ratio").unwrap();
    for (row, step) in r
        .records()
        .map(Result::unwrap)
        .zip(json["passes"].as_array().unwrap())
    {
        let Some(full) = step["draw_ratio"].as_f64() else {
            continue;
        };
        let cell = &row[col];
        let digits = cell.trim_start_matches(['-', '0', '.']).replace('.', "");
        assert!(digits.len() <= 6, "{cell}");
        // Rounded, not truncated: within half a unit in the sixth digit.
        let v: f64 = cell.parse().unwrap();
        let unit = 10f64.powi(full.abs().log10().floor() as i32 - 5);
        assert!(
            (v - full).abs() <= 0.5 * unit * (1.0 + 1e-9),
            "{cell} vs {full}"
        );
    }
}

/// Every figure of the CSV, the machine and temperature columns included, is
/// rounded: a machine schedule's CSV once printed `62.12634449563879`.
#[test]
fn every_csv_figure_on_a_machine_carries_at_most_six_significant_digits() {
    let path = "schedules-demo/steel-multiblock.yaml";
    let text = stdout(&coldpass(&["check", path, "--format", "csv"]));
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let header = r.headers().unwrap().clone();
    assert!(header.iter().any(|h| h == "machine.capstan_rpm"));
    let mut figures = 0;
    for row in r.records().map(Result::unwrap) {
        for (h, cell) in header.iter().zip(row.iter()) {
            if cell.parse::<f64>().is_err() {
                continue;
            }
            figures += 1;
            let digits = cell
                .trim_start_matches('-')
                .replace('.', "")
                .trim_start_matches('0')
                .trim_end_matches('0')
                .len();
            assert!(digits <= 6, "{h} = {cell}");
        }
    }
    assert!(figures > 7 * 40, "{figures}");
    // Every figure of a block in the JSON's `machine.blocks` is a column,
    // under the same name with `machine.` before it, and equal to it.
    let json = json_of(&["check", path, "--format", "json"]);
    let mut rows = csv::Reader::from_reader(text.as_bytes());
    let first = rows.records().next().unwrap().unwrap();
    let block = &json["machine"]["blocks"][0];
    for (key, value) in block.as_object().unwrap() {
        if matches!(
            key.as_str(),
            "block" | "step" | "capstan_diameter_mm" | "max_surface_speed_m_s"
        ) {
            continue; // `block` is its own column; the others are the machine file's own figures
        }
        let col = format!("machine.{key}");
        let i = header
            .iter()
            .position(|h| h == col)
            .unwrap_or_else(|| panic!("{col} missing"));
        let v: f64 = first[i].parse().unwrap();
        let full = value.as_f64().unwrap();
        assert!(
            (v - full).abs() <= 1e-5 * full.abs().max(1e-9),
            "{col}: {v} vs {full}"
        );
    }
}

/// The summary CSV carries the machine's answer too: the attainable speed,
/// the block and limit that bind and the tonnes per shift at that speed.
#[test]
fn the_summary_csv_on_a_machine_gives_the_attainable_speed() {
    let path = "schedules-demo/steel-multiblock.yaml";
    let text = stdout(&coldpass(&["check", path, "--format", "csv", "--summary"]));
    let json = json_of(&["check", path, "--format", "json"]);
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let header = r.headers().unwrap().clone();
    let row = r.records().next().unwrap().unwrap();
    let cell = |key: &str| {
        let i = header
            .iter()
            .position(|h| h == key)
            .unwrap_or_else(|| panic!("{key}"));
        row[i].to_string()
    };
    for key in [
        "attainable_speed_m_s",
        "attainable_t_per_shift",
        "tensile_strength_mpa",
    ] {
        let v: f64 = cell(key).parse().unwrap();
        let full = json["summary"][key].as_f64().unwrap();
        assert!(
            (v - full).abs() <= 1e-5 * full.abs(),
            "{key}: {v} vs {full}"
        );
    }
    assert_eq!(
        cell("binding_block"),
        json["summary"]["binding_block"].to_string()
    );
    assert_eq!(
        cell("binding_limit"),
        json["summary"]["binding_limit"].as_str().unwrap()
    );
}

#[test]
fn the_summary_csv_is_one_row_of_the_summary_keys() {
    let path = "schedules-demo/copper-building-wire.yaml";
    let text = stdout(&coldpass(&["check", path, "--format", "csv", "--summary"]));
    let json = json_of(&["check", path, "--format", "json"]);
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let header = r.headers().unwrap().clone();
    let rows: Vec<csv::StringRecord> = r.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), 1);
    for key in [
        "throughput_t_per_shift",
        "total_power_kw",
        "worst_draw_ratio",
    ] {
        let i = header.iter().position(|h| h == key).unwrap();
        let v: f64 = rows[0][i].parse().unwrap();
        let full = json["summary"][key].as_f64().unwrap();
        assert!(
            (v - full).abs() <= 1e-5 * full.abs(),
            "{key}: {v} vs {full}"
        );
    }
    assert_eq!(header.iter().next_back(), Some("caution"));
}

#[test]
fn a_byte_order_mark_is_accepted() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("bom.yaml");
    let mut bytes = vec![0xEF, 0xBB, 0xBF];
    bytes.extend(std::fs::read(root("schedules-demo/stainless-spring.yaml")).unwrap());
    std::fs::write(&p, bytes).unwrap();
    let with = coldpass(&["check", p.to_str().unwrap(), "--format", "json"]);
    assert_eq!(with.status.code(), Some(0), "{}", stderr(&with));
    let without = coldpass(&[
        "check",
        "schedules-demo/stainless-spring.yaml",
        "--format",
        "json",
    ]);
    assert_eq!(with.stdout, without.stdout);
}

#[test]
fn fails_in_one_line_when_check_is_given_a_csv_file() {
    for args in [
        vec!["check", "schedules-demo/tensile-copper-rod.csv"],
        vec!["design", "schedules-demo/tensile-copper-rod.csv"],
    ] {
        let out = coldpass(&args);
        assert_eq!(out.status.code(), Some(1));
        let e = stderr(&out);
        assert_eq!(e.lines().count(), 1, "{e}");
        assert!(e.contains("CSV") && e.contains("coldpass fit"), "{e}");
    }
}

/// `--summary` changes only the CSV: with another format, or on design (whose
/// CSV has no summary form yet), it is refused as bad usage (exit 2) instead
/// of being silently ignored.
#[test]
fn summary_without_csv_is_refused_as_bad_usage() {
    for args in [
        vec!["check", "schedules-demo/steel-multiblock.yaml", "--summary"],
        vec![
            "check",
            "schedules-demo/steel-multiblock.yaml",
            "--summary",
            "--format",
            "json",
        ],
        vec![
            "compare",
            "schedules-demo/steel-multiblock.yaml",
            "schedules-demo/stainless-spring.yaml",
            "--summary",
        ],
        vec![
            "design",
            "schedules-demo/design-steel-ratio.yaml",
            "--format",
            "csv",
            "--summary",
        ],
    ] {
        let out = coldpass(&args);
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        let err = stderr(&out);
        assert!(err.contains("--summary"), "{err}");
        assert!(out.stdout.is_empty(), "{args:?}");
    }
    let ok = coldpass(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--summary",
        "--format",
        "csv",
    ]);
    assert_eq!(ok.status.code(), Some(0), "{}", stderr(&ok));
}

/// A coldpass file given in the wrong place is named for what it is, in one
/// line, with where it goes: a machine file or a fitted law given as the
/// schedule, a schedule or a tensile CSV given as the machine (the CSV was
/// once pasted whole into the message), and a machine file with a
/// byte-order mark is read as a schedule's is.
#[test]
fn a_file_of_another_kind_is_named_for_what_it_is() {
    let cases: &[(&[&str], &str)] = &[
        (
            &["check", "machines/harrow-lane-dry-7.yaml"],
            "it looks like a machine file",
        ),
        (
            &["design", "machines/harrow-lane-dry-7.yaml"],
            "give it with --machine",
        ),
        (
            &["check", "schedules-demo/copper-rod-law.yaml"],
            "paste its blocks under `material:`",
        ),
        (
            &[
                "check",
                "schedules-demo/steel-multiblock.yaml",
                "--machine",
                "schedules-demo/stainless-spring.yaml",
            ],
            "is not a machine file: it looks like a schedule",
        ),
        (
            &[
                "check",
                "schedules-demo/steel-multiblock.yaml",
                "--machine",
                "schedules-demo/tensile-copper-rod.csv",
            ],
            "is not a machine file: it looks like a CSV table",
        ),
    ];
    for (args, words) in cases {
        let out = coldpass(args);
        assert_eq!(out.status.code(), Some(1), "{args:?}");
        let err = stderr(&out);
        assert!(err.contains(words), "{args:?}: {err}");
        assert_eq!(err.trim_end().lines().count(), 1, "one line: {err}");
        assert!(err.len() < 400, "short: {err}");
    }
    let dir = tempfile::tempdir().unwrap();
    let m = dir.path().join("bom-machine.yaml");
    let mut bytes = vec![0xEF, 0xBB, 0xBF];
    bytes.extend(std::fs::read(root("machines/harrow-lane-dry-7.yaml")).unwrap());
    std::fs::write(&m, bytes).unwrap();
    let with = coldpass(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--machine",
        m.to_str().unwrap(),
        "--format",
        "json",
    ]);
    assert_eq!(with.status.code(), Some(0), "{}", stderr(&with));
}

/// A folder's YAML files that are not schedules are named on standard error
/// (the report on standard output stays clean for a program to read).
#[test]
fn a_catalogue_of_a_folder_names_the_files_it_left_out() {
    let out = coldpass(&["check", "schedules-demo/", "--format", "json"]);
    let err = stderr(&out);
    assert!(
        err.contains("left out of the catalogue") && err.contains("design-copper-temper.yaml"),
        "{err}"
    );
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert!(j["products"]
        .as_array()
        .unwrap()
        .iter()
        .all(|p| !p["file"].as_str().unwrap().contains("design-")));
}
