//! `coldpass check` as a user meets it: exit status, formats, files written
//! whole or not at all, and clear errors for bad input.

mod common;

use common::{coldpass, demo_schedules, root, stderr, stdout};

const COPPER: &str = "schedules-demo/copper-building-wire.yaml";
const OVER: &str = "schedules-demo/copper-rod-breakdown-over.yaml";

fn bad_copy(dir: &tempfile::TempDir, from: &str, to: &str) -> String {
    let text = std::fs::read_to_string(root(COPPER)).unwrap();
    assert!(text.contains(from), "the demo holds {from:?}");
    let path = dir.path().join("bad.yaml");
    std::fs::write(&path, text.replacen(from, to, 1)).unwrap();
    path.to_string_lossy().into_owned()
}

#[test]
fn a_schedule_within_limits_exits_zero_and_carries_the_caution() {
    let o = coldpass(&["check", COPPER]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    assert!(out.contains("Caution: Planning estimates only"));
    assert!(out.contains("machine maker's limits, local codes and licensed practice"));
    assert!(out.contains("AWG 14"));
}

#[test]
fn a_schedule_over_its_limit_exits_three() {
    // Over by the conservative envelope (`max`); by the default method
    // (redundant, chosen from the validation table) the demo is near its limit.
    let o = coldpass(&["check", OVER, "--method", "max"]);
    assert_eq!(o.status.code(), Some(3));
    assert!(stdout(&o).contains("over-draw-limit"));
}

#[test]
fn every_demo_checks_with_status_zero_or_three() {
    for f in demo_schedules() {
        let o = coldpass(&["check", f.to_str().unwrap()]);
        assert!(
            matches!(o.status.code(), Some(0 | 3)),
            "{}: {}",
            f.display(),
            stderr(&o)
        );
    }
}

#[test]
fn json_keys_are_the_contract() {
    let o = coldpass(&["check", COPPER, "--format", "json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let p = &v["passes"][0];
    for key in [
        "step",
        "kind",
        "entry_diameter_mm",
        "exit_diameter_mm",
        "area_reduction",
        "pass_strain",
        "strain_before",
        "strain_after",
        "flow_stress_exit_mpa",
        "mean_flow_stress_mpa",
        "delta",
        "semi_angle_deg",
        "optimum_semi_angle_deg",
        "draw_stress_mpa",
        "governing_draw_stress_mpa",
        "draw_ratio",
        "force_kn",
        "exit_speed_m_s",
        "power_kw",
        "temperature_rise_c",
        "flags",
    ] {
        assert!(p.get(key).is_some(), "passes[0] lacks {key}");
    }
    for key in [
        "ideal",
        "efficiency",
        "sachs",
        "siebel",
        "redundant",
        "upper_bound",
    ] {
        assert!(
            p["draw_stress_mpa"].get(key).is_some(),
            "draw_stress_mpa lacks {key}"
        );
    }
    assert_eq!(p["kind"], "draw");
    let s = &v["summary"];
    for key in [
        "total_area_reduction",
        "total_strain",
        "draw_passes",
        "anneals",
        "worst_draw_ratio",
        "final_flow_stress_mpa",
        "throughput_kg_h",
        "total_power_kw",
        "verdict",
    ] {
        assert!(s.get(key).is_some(), "summary lacks {key}");
    }
    assert_eq!(s["verdict"], "ok");
}

#[test]
fn csv_has_one_row_per_step_with_the_json_names() {
    let o = coldpass(&[
        "check",
        "schedules-demo/stainless-spring.yaml",
        "--format",
        "csv",
    ]);
    let text = stdout(&o);
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let header = r.headers().unwrap().clone();
    assert!(header.iter().any(|h| h == "draw_ratio"));
    assert!(header.iter().any(|h| h == "draw_stress_mpa.upper_bound"));
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(rows.len(), 16);
    let kind = header.iter().position(|h| h == "kind").unwrap();
    assert_eq!(rows.iter().filter(|row| &row[kind] == "anneal").count(), 2);
}

#[test]
fn yaml_output_parses() {
    let o = coldpass(&["check", COPPER, "--format", "yaml"]);
    let v: serde_yaml::Value = serde_yaml::from_slice(&o.stdout).unwrap();
    assert!(v["passes"].as_sequence().unwrap().len() == 13);
}

#[test]
fn method_option_overrides_the_file() {
    let o = coldpass(&["check", COPPER, "--method", "ideal", "--format", "json"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(v["method"], "ideal");
    assert_eq!(v["method_source"], "command line");
    let p = &v["passes"][0];
    assert_eq!(
        p["governing_draw_stress_mpa"],
        p["draw_stress_mpa"]["ideal"]
    );
}

#[test]
fn the_default_method_is_said_in_the_report() {
    let o = coldpass(&["check", OVER]);
    assert!(stdout(&o).contains("governing method: redundant (the default"));
}

#[test]
fn fails_with_usage_status_on_an_unknown_method() {
    let o = coldpass(&["check", COPPER, "--method", "fastest"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("upper-bound"));
}

#[test]
fn plot_and_output_files_are_written_whole() {
    let dir = tempfile::tempdir().unwrap();
    let svg = dir.path().join("chart.svg");
    let json = dir.path().join("report.json");
    let o = coldpass(&[
        "check",
        COPPER,
        "--plot",
        svg.to_str().unwrap(),
        "--format",
        "json",
        "--output",
        json.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.starts_with("<svg") && text.trim_end().ends_with("</svg>"));
    assert!(text.contains("Draw ratio per pass"));
    let _: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&json).unwrap()).unwrap();
    // Nothing else (no temporary file) is left beside them.
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 2);
}

#[test]
fn bad_input_writes_no_file() {
    let dir = tempfile::tempdir().unwrap();
    let bad = bad_copy(&dir, "exit: 6.15", "exit: 7.5");
    let svg = dir.path().join("chart.svg");
    let o = coldpass(&["check", &bad, "--plot", svg.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    assert!(!svg.exists());
    assert!(o.stdout.is_empty());
}

#[test]
fn fails_naming_the_key_when_an_exit_is_not_below_its_entry() {
    let dir = tempfile::tempdir().unwrap();
    let o = coldpass(&["check", &bad_copy(&dir, "exit: 6.15", "exit: 7.5")]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("passes[1].exit") && e.contains("7.5 mm") && e.contains("below its entry"),
        "{e}"
    );
}

#[test]
fn fails_naming_an_unknown_gauge() {
    let dir = tempfile::tempdir().unwrap();
    let o = coldpass(&["check", &bad_copy(&dir, "\"AWG 10\"", "\"AWG 99\"")]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("AWG 99") && e.contains("AWG 0000") && e.contains("line"),
        "{e}"
    );
}

#[test]
fn fails_naming_a_negative_start_diameter() {
    let dir = tempfile::tempdir().unwrap();
    let o = coldpass(&["check", &bad_copy(&dir, "diameter: 8.0", "diameter: -8")]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("diameter") && e.contains("-8") && e.contains("greater than 0"),
        "{e}"
    );
}

#[test]
fn fails_naming_an_unknown_key_with_line_and_column() {
    let dir = tempfile::tempdir().unwrap();
    let o = coldpass(&[
        "check",
        &bad_copy(
            &dir,
            "  friction: 0.05\n",
            "  friction: 0.05\n  frition: 0.1\n",
        ),
    ]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("unknown field `frition`") && e.contains("line 17 column 3"),
        "{e}"
    );
    assert!(e.contains("bad.yaml"), "{e}");
}

#[test]
fn fails_when_the_method_needs_a_key_the_file_lacks() {
    let dir = tempfile::tempdir().unwrap();
    let bad = bad_copy(&dir, "  efficiency: 0.65\n", "");
    let o = coldpass(&["check", &bad, "--method", "efficiency"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stderr(&o).contains("dies.efficiency is missing"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn fails_naming_a_friction_out_of_range() {
    let dir = tempfile::tempdir().unwrap();
    let o = coldpass(&["check", &bad_copy(&dir, "friction: 0.05", "friction: 0.9")]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("friction") && e.contains("0.9") && e.contains("[0, 0.5]"),
        "{e}"
    );
}

#[test]
fn fails_on_a_missing_file_naming_it() {
    let o = coldpass(&["check", "no-such-schedule.yaml"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("no-such-schedule.yaml"));
}

#[test]
fn a_broken_pipe_ends_quietly() {
    use std::io::Read;
    use std::process::{Command, Stdio};
    let mut child = Command::new(assert_cmd::cargo::cargo_bin("coldpass"))
        .current_dir(root(""))
        .args([
            "check",
            "schedules-demo/stainless-spring.yaml",
            "--format",
            "csv",
        ])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // Close the reading end before coldpass writes, as `| head -c0` would:
    // its write then fails with a broken pipe.
    drop(child.stdout.take());
    let status = child.wait().unwrap();
    let mut err = String::new();
    child
        .stderr
        .take()
        .unwrap()
        .read_to_string(&mut err)
        .unwrap();
    assert!(!err.contains("panicked"), "{err}");
    assert!(status.code().is_some_and(|c| c == 0), "{status:?} {err}");
}

#[test]
fn fails_with_usage_status_when_the_chart_is_not_named_svg() {
    let dir = tempfile::tempdir().unwrap();
    let png = dir.path().join("chart.png");
    let o = coldpass(&["check", COPPER, "--plot", png.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("must end in .svg"), "{}", stderr(&o));
    assert!(!png.exists());
}

#[test]
fn back_tension_above_the_entry_flow_stress_is_over() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root(OVER)).unwrap();
    let path = dir.path().join("bt.yaml");
    std::fs::write(
        &path,
        text.replace("back_tension_mpa: 120", "back_tension_mpa: 900"),
    )
    .unwrap();
    let o = coldpass(&["check", path.to_str().unwrap(), "--format", "json"]);
    assert_eq!(o.status.code(), Some(3));
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let flags = v["passes"][4]["flags"].as_array().unwrap();
    assert!(
        flags.iter().any(|f| f == "back-tension-over-yield"),
        "{flags:?}"
    );
    // The pass before, at 100 MPa on wire of about 380 MPa, is not flagged for it.
    let before = v["passes"][3]["flags"].as_array().unwrap();
    assert!(!before.iter().any(|f| f == "back-tension-over-yield"));
}

#[test]
fn fails_naming_an_empty_file() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("empty.yaml");
    std::fs::write(&path, "# nothing here\n").unwrap();
    let o = coldpass(&["check", path.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("the file is empty"));
}

#[test]
fn fails_pointing_a_design_file_to_the_design_command() {
    let o = coldpass(&["check", "schedules-demo/design-copper-temper.yaml"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stderr(&o).contains("run `coldpass design`"),
        "{}",
        stderr(&o)
    );
}
