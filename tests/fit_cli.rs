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
fn fails_on_strain_that_does_not_increase() {
    let dir = TempDir::new().unwrap();
    let file = edited(&dir, |mut l| {
        let i = data_line(&l, 200);
        l.swap(i, i + 1);
        l
    });
    fails_writing_nothing(
        &dir,
        &file,
        &[],
        &["point 202", "strain must increase", "is line"],
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
    fails_writing_nothing(&dir, &file, &[], &["plastic range", "at least 8"]);
}

#[test]
fn fails_when_no_column_is_found_and_lists_the_columns() {
    let dir = TempDir::new().unwrap();
    let file = written(&dir, "elongation,load\n0,0\n0.1,10\n");
    fails_writing_nothing(&dir, &file, &[], &["'elongation', 'load'", "--strain-col"]);
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
fn csv_has_one_row_per_fit_after_the_caution() {
    let o = coldpass(&["fit", COPPER, "--format", "csv"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    let mut lines = out.lines();
    assert!(lines.next().unwrap().starts_with("# Caution"));
    assert!(lines
        .next()
        .unwrap()
        .starts_with("law,strain,best,points,rms_mpa"));
    assert_eq!(lines.count(), 8);
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
    let block_text: String = text
        .lines()
        .filter(|l| !l.starts_with('#'))
        .map(|l| format!("{indent}{l}\n"))
        .collect();
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

#[test]
fn the_committed_demo_law_is_what_emit_law_writes() {
    let dir = TempDir::new().unwrap();
    let law = dir.path().join("law.yaml");
    let o = coldpass(&[
        "fit",
        COPPER,
        "--reach-strain",
        "3.5",
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
    // K mostly between G/1000 and G/100 (common practice, reference sheet);
    // copper's G is about 45 GPa (common practice), so G = 10 GPa puts K = 300 MPa above G/100.
    let o = coldpass(&["fit", COPPER, "--shear-modulus-gpa", "10"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).contains("outside G/1000 to G/100 (10.0 to 100.0 MPa)"));
    let o = coldpass(&["fit", COPPER, "--shear-modulus-gpa", "45"]);
    assert!(!stdout(&o).contains("outside G/1000 to G/100"));
}
