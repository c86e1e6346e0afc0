//! `coldpass design` through the binary: the demo designs, the round trip
//! through `--emit-schedule` and `check`, the temper anneal, and the errors.

use std::path::{Path, PathBuf};
use std::process::Output;

use assert_cmd::Command;

mod common;

use common::{coldpass, json, root};

fn demo_designs() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(root("schedules-demo"))
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| {
            p.file_name()
                .and_then(|n| n.to_str())
                .is_some_and(|n| n.starts_with("design-") && n.ends_with(".yaml"))
        })
        .collect();
    v.sort();
    v
}

#[test]
fn every_demo_design_is_reproduced_by_check_from_its_emitted_schedule() {
    let designs = demo_designs();
    assert!(designs.len() >= 2, "{designs:?}");
    let dir = tempfile::tempdir().unwrap();
    for d in designs {
        let out = dir.path().join(d.file_name().unwrap());
        let (ds, os) = (d.to_str().unwrap(), out.to_str().unwrap());
        let designed = coldpass(&["design", ds, "--format", "json", "--emit-schedule", os]);
        assert_eq!(designed.status.code(), Some(0), "{ds}");
        let checked = coldpass(&["check", os, "--format", "json"]);
        assert_eq!(checked.status.code(), Some(0), "{os}");
        assert_eq!(json(&designed)["schedule"], json(&checked), "{ds}");
        // The tables agree to the last printed digit too.
        let table_d = String::from_utf8(coldpass(&["design", ds]).stdout).unwrap();
        let table_c = String::from_utf8(coldpass(&["check", os]).stdout).unwrap();
        assert!(table_d.ends_with(&table_c), "{ds}");
        assert!(table_d.contains("Caution:"));
    }
}

#[test]
fn a_method_on_the_command_line_is_written_into_the_emitted_schedule() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("s.yaml");
    let os = out.to_str().unwrap();
    let d = "schedules-demo/design-steel-ratio.yaml";
    let designed = coldpass(&[
        "design",
        d,
        "--method",
        "sachs",
        "--format",
        "json",
        "--emit-schedule",
        os,
    ]);
    assert_eq!(designed.status.code(), Some(0));
    let checked = json(&coldpass(&["check", os, "--format", "json"]));
    let mut s = json(&designed)["schedule"].clone();
    assert_eq!(s["method"], "sachs");
    // Only where the method came from differs: the command line, then the file.
    s["method_source"] = checked["method_source"].clone();
    assert_eq!(s, checked);
}

#[test]
fn copper_demo_anneals_where_the_rest_lands_in_the_temper_window() {
    let v = json(&coldpass(&[
        "design",
        "schedules-demo/design-copper-temper.yaml",
        "--format",
        "json",
    ]));
    let design = &v["design"];
    let anneals = design["anneals"].as_array().unwrap();
    let temper: Vec<_> = anneals.iter().filter(|a| a["reason"] == "temper").collect();
    assert_eq!(temper.len(), 1, "{anneals:?}");
    // Voce inverse (Voce 1948; form as in the docs/physics.md) at the middle
    // of the 380-420 MPa window: eps = -ec ln((ss - s)/(ss - s0)), and the
    // anneal sits at D_a = D_f exp(eps/2).
    // Held to the 30 % heavy-reduction line, the fewest passes (15) put the
    // anneal inside the window's range, not at its middle: the anneal lies
    // between the diameters of the window's ends, and the finished flow
    // stress is the Voce law at the strain from it, sigma = ss - (ss - s0)
    // exp(-eps/ec) with eps = 2 ln(D_a/D_f).
    let at = |s: f64| 1.2 * (-0.8 * ((470.0f64 - s) / (470.0 - 80.0)).ln() / 2.0).exp();
    let got = temper[0]["diameter_mm"].as_f64().unwrap();
    assert!(at(380.0) <= got && got <= at(420.0), "{got}");
    let eps = 2.0 * (got / 1.2).ln();
    let sigma = 470.0 - (470.0 - 80.0) * (-eps / 0.8).exp();
    let finished = v["schedule"]["summary"]["final_flow_stress_mpa"]
        .as_f64()
        .unwrap();
    assert!(
        (finished / sigma - 1.0).abs() < 1e-9,
        "{finished} vs {sigma}"
    );
    assert!((380.0..=420.0).contains(&finished), "{finished}");
    assert!(v["schedule"]["caution"]
        .as_str()
        .unwrap()
        .contains("Planning estimates"));
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

const COPPER: &str = r#"
material:
  density_kg_m3: 8940
  specific_heat_j_kg_k: 385
  flow: {law: voce, sigma0_mpa: 80, saturation_mpa: 470, eps_c: 0.8}
start:
  diameter: 8.0
dies:
  semi_angles_deg: [6, 8]
  friction: 0.05
limits:
  draw_ratio_warn: 0.6
  draw_ratio_max: 0.7
"#;

#[test]
fn an_infeasible_design_names_the_binding_constraint_exits_1_and_writes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let cases = [
        // A window above the law's saturation (470 MPa).
        (
            "target:\n  diameter: 2.0\n  strength_mpa: {min: 480, max: 500}\n",
            "saturates at 470",
        ),
        // A window softer than the annealed stock (80 MPa).
        (
            "target:\n  diameter: 2.0\n  strength_mpa: {min: 40, max: 60}\n",
            "softer than the annealed",
        ),
        // Too few passes for the ratio limit.
        (
            "target:\n  diameter: 1.0\n  max_passes: 3\n",
            "target.max_passes 3 is too few",
        ),
    ];
    for (i, (target, words)) in cases.iter().enumerate() {
        let f = write(
            dir.path(),
            &format!("d{i}.yaml"),
            &format!("{COPPER}{target}"),
        );
        let out = dir.path().join(format!("out{i}.yaml"));
        let o = coldpass(&[
            "design",
            f.to_str().unwrap(),
            "--emit-schedule",
            out.to_str().unwrap(),
        ]);
        let err = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(1), "{err}");
        assert!(err.contains(words), "{err}");
        assert!(o.stdout.is_empty());
        assert!(!out.exists());
    }
}

#[test]
fn a_design_file_without_a_target_or_with_passes_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let f = write(dir.path(), "a.yaml", COPPER);
    let o = coldpass(&["design", f.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&o.stderr).contains("target"));
    let f = write(
        dir.path(),
        "b.yaml",
        &format!("{COPPER}target:\n  diameter: 2.0\n  strategy: fastest\n"),
    );
    let o = coldpass(&["design", f.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("fastest") && err.contains("equal-ratio"),
        "{err}"
    );
}

#[test]
fn every_format_carries_the_design_and_the_caution() {
    let d = "schedules-demo/design-copper-temper.yaml";
    let yaml = String::from_utf8(coldpass(&["design", d, "--format", "yaml"]).stdout).unwrap();
    assert!(
        yaml.starts_with("design:") && yaml.contains("\nschedule:") && yaml.contains("caution:")
    );
    let csv = String::from_utf8(coldpass(&["design", d, "--format", "csv"]).stdout).unwrap();
    let header = csv.lines().next().unwrap();
    assert!(
        header.ends_with(",strategy,run,anneal_reason,caution"),
        "{header}"
    );
    // The anneal row: its reason, then the caution (the last column, as in check's CSV).
    assert!(csv.lines().any(|l| l.contains(",temper,")));
    let table = String::from_utf8(coldpass(&["design", d]).stdout).unwrap();
    assert!(table.starts_with("Design: equal-ratio") && table.contains("(temper)"));
}

/// The copper demo with `max_passes` set to `n`, written to `dir`.
fn copper_demo_with_max_passes(dir: &Path, n: u32) -> PathBuf {
    let text = std::fs::read_to_string(root("schedules-demo/design-copper-temper.yaml")).unwrap();
    assert!(text.contains("max_passes: 30"));
    write(
        dir,
        &format!("max{n}.yaml"),
        &text.replace("max_passes: 30", &format!("max_passes: {n}")),
    )
}

/// Runs `design` with `--emit-schedule`; returns the output and whether the file was written.
fn design_emitting(file: &Path, dir: &Path) -> (Output, bool) {
    let out = dir.join(format!(
        "{}.out.yaml",
        file.file_stem().unwrap().to_str().unwrap()
    ));
    let o = coldpass(&[
        "design",
        file.to_str().unwrap(),
        "--emit-schedule",
        out.to_str().unwrap(),
    ]);
    (o, out.exists())
}

#[test]
fn too_few_max_passes_asks_for_the_passes_the_design_needs_not_an_infinite_ratio() {
    // With enough passes the demo design is 8 + 5 around its temper anneal;
    // fewer passes need more anneals (each softens the wire for heavier
    // passes). With 3 allowed the error asks for the least count any design
    // has; that count is then designed, and one fewer is refused.
    let dir = tempfile::tempdir().unwrap();
    let (o, written) = design_emitting(&copper_demo_with_max_passes(dir.path(), 3), dir.path());
    let err = String::from_utf8_lossy(&o.stderr).to_string();
    assert_eq!(o.status.code(), Some(1), "{err}");
    assert!(!written && o.stdout.is_empty());
    assert!(err.contains("target.max_passes 3 is too few"), "{err}");
    // Here the reduction limit, not the ratio limit, sets the counts.
    assert!(err.contains("target.reduction_max 0.35"), "{err}");
    for bad in [
        "inf",
        "NaN",
        " 0 passes",
        "draw ratio of",
        ", ;",
        "with 0 passes",
    ] {
        assert!(!err.contains(bad), "{bad:?} in {err}");
    }
    let needed: u32 = err
        .split("takes ")
        .nth(1)
        .and_then(|t| t.split(' ').next())
        .and_then(|t| t.parse().ok())
        .unwrap_or_else(|| panic!("{err}"));
    assert!(
        err.contains(&format!("allow at least {needed} (target.max_passes)")),
        "{err}"
    );
    let (o, _) = design_emitting(
        &copper_demo_with_max_passes(dir.path(), needed - 1),
        dir.path(),
    );
    assert_eq!(o.status.code(), Some(1));
    let (o, written) =
        design_emitting(&copper_demo_with_max_passes(dir.path(), needed), dir.path());
    assert_eq!(o.status.code(), Some(0));
    assert!(written);
    assert!(String::from_utf8_lossy(&o.stdout)
        .contains(&format!("{needed} draw passes (at most {needed})")));
    // With 13 the design still keeps every pass under the 30 % line check
    // flags heavy-reduction (it takes more anneals for it: softened wire
    // carries more strain a pass within the line).
    let (o, _) = design_emitting(&copper_demo_with_max_passes(dir.path(), 13), dir.path());
    let out = String::from_utf8_lossy(&o.stdout);
    assert!(out.contains("13 draw passes (at most 13), "), "{out}");
    assert!(!out.contains("heavy-reduction │"), "{out}");
}

#[test]
fn a_target_at_or_over_the_start_diameter_names_each_diameter_once() {
    let dir = tempfile::tempdir().unwrap();
    for (target, words) in [
        (
            "9",
            "target.diameter: 9 mm must be below start.diameter 8 mm",
        ),
        (
            "8.0",
            "target.diameter: 8 mm must be below start.diameter 8 mm",
        ),
        (
            "\"0.5 in\"",
            "target.diameter: 0.5 in (12.7000 mm) must be below start.diameter 8 mm",
        ),
    ] {
        let f = write(
            dir.path(),
            "big.yaml",
            &format!("{COPPER}target:\n  diameter: {target}\n"),
        );
        let (o, written) = design_emitting(&f, dir.path());
        let err = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(1), "{err}");
        assert!(!written);
        assert!(err.contains(words), "{err}");
        // No diameter is given twice (`9 mm (9 mm)`).
        assert!(!err.contains("(9 mm)") && !err.contains("(8 mm)"), "{err}");
    }
}

#[test]
fn each_refused_design_input_names_the_key_the_value_and_what_is_allowed() {
    let dir = tempfile::tempdir().unwrap();
    let t = "target:\n  diameter: 2.0\n";
    let cases: [(String, &[&str]); 5] = [
        (
            format!("{COPPER}{t}  strength_mpa: {{min: 40, max: 60}}\n"),
            &[
                "target.strength_mpa 40-60 MPa",
                "80.0 MPa",
                "at least 80.0 MPa",
            ],
        ),
        (
            format!("{COPPER}{t}  strength_mpa: {{min: 480, max: 500}}\n"),
            &[
                "target.strength_mpa 480-500 MPa",
                "470.0 MPa",
                "below 470.0 MPa",
            ],
        ),
        (
            format!("{COPPER}{t}  reduction_min: 0.3\n  reduction_max: 0.2\n"),
            &[
                "target.reduction_min",
                "0.3",
                "must not exceed reduction_max (0.2)",
            ],
        ),
        (
            format!(
                "{}{t}",
                COPPER.replace("semi_angles_deg: [6, 8]", "semi_angles_deg: []")
            ),
            &["dies.semi_angles_deg", "[]", "at least one angle"],
        ),
        (
            format!("{COPPER}{t}  max_passes: 0\n"),
            &["target.max_passes", "= 0", "[1, 200]"],
        ),
    ];
    for (i, (text, words)) in cases.iter().enumerate() {
        let f = write(dir.path(), &format!("refused{i}.yaml"), text);
        let (o, written) = design_emitting(&f, dir.path());
        let err = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(1), "{err}");
        assert!(!written && o.stdout.is_empty(), "{err}");
        for w in *words {
            assert!(err.contains(w), "{w:?} not in {err}");
        }
    }
}

#[test]
fn tapered_without_a_taper_is_designed_with_the_documented_default_and_says_so() {
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "tapered.yaml",
        &format!("{COPPER}target:\n  diameter: 2.0\n  strategy: tapered\n"),
    );
    let v = json(&coldpass(&[
        "design",
        f.to_str().unwrap(),
        "--format",
        "json",
    ]));
    assert_eq!(v["design"]["taper"], 0.9);
    let notes = v["design"]["notes"].to_string();
    assert!(
        notes.contains("taper 0.9 (the default; set target.taper)"),
        "{notes}"
    );
}

#[test]
fn the_temper_anneal_reports_the_window_of_anneal_sizes() {
    // Voce inverse (Voce 1948; docs/physics.md) at the window's ends,
    // 380 and 420 MPa: eps = -ec ln((ss - s)/(ss - s0)); an anneal at
    // D = D_f exp(eps/2) for any eps between lands in the window.
    let v = json(&coldpass(&[
        "design",
        "schedules-demo/design-copper-temper.yaml",
        "--format",
        "json",
    ]));
    let a = &v["design"]["anneals"][0];
    assert_eq!(a["reason"], "temper");
    let d = |s: f64| 1.2 * (-0.8 * ((470.0 - s) / (470.0f64 - 80.0)).ln() / 2.0).exp();
    let w = &a["window_mm"];
    assert!(
        (w["min_mm"].as_f64().unwrap() / d(380.0) - 1.0).abs() < 1e-9,
        "{w}"
    );
    assert!(
        (w["max_mm"].as_f64().unwrap() / d(420.0) - 1.0).abs() < 1e-9,
        "{w}"
    );
    let at = a["diameter_mm"].as_f64().unwrap();
    assert!(d(380.0) <= at && at <= d(420.0));
}

#[test]
fn dies_are_rounded_to_the_die_room_step_and_listed() {
    let v = json(&coldpass(&[
        "design",
        "schedules-demo/design-copper-die-room.yaml",
        "--format",
        "json",
    ]));
    let s = &v["design"];
    assert_eq!(s["draw_passes"], 11, "target.passes: 11");
    let dies = s["dies"].as_array().unwrap();
    let mut count = 0;
    for d in dies {
        let mm = d["size_mm"].as_f64().unwrap();
        // A multiple of 0.01 mm, written as such.
        assert!(((mm * 100.0).round() - mm * 100.0).abs() < 1e-9, "{mm}");
        assert!(
            format!("{mm}")
                .split('.')
                .nth(1)
                .is_none_or(|f| f.len() <= 2),
            "{mm}"
        );
        assert_eq!(d["land_length_mm"], 0.3);
        count += d["count"].as_u64().unwrap();
    }
    assert_eq!(count, 11);
    // The rounded schedule is what check evaluates, and it is within the limits.
    for r in v["schedule"]["passes"].as_array().unwrap() {
        assert!(r["flags"]
            .as_array()
            .unwrap()
            .iter()
            .all(|f| f != "over-draw-limit"));
    }
}

#[test]
fn a_pass_count_that_cannot_meet_the_limits_is_refused_with_the_least_that_can() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root("schedules-demo/design-copper-die-room.yaml")).unwrap();
    let f = write(
        dir.path(),
        "p5.yaml",
        &text.replace("passes: 11", "passes: 5"),
    );
    let (o, written) = design_emitting(&f, dir.path());
    let err = String::from_utf8_lossy(&o.stderr).to_string();
    assert_eq!(o.status.code(), Some(1), "{err}");
    assert!(!written);
    assert!(
        err.contains("target.passes 5 cannot meet every limit"),
        "{err}"
    );
    let least: u32 = err
        .split("set target.passes to ")
        .nth(1)
        .and_then(|t| t.split(' ').next())
        .and_then(|t| t.parse().ok())
        .unwrap_or_else(|| panic!("{err}"));
    assert!(least > 5);
    let f = write(
        dir.path(),
        "pl.yaml",
        &text.replace("passes: 11", &format!("passes: {least}")),
    );
    let (o, _) = design_emitting(&f, dir.path());
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    let f = write(
        dir.path(),
        "pm.yaml",
        &text.replace("passes: 11", &format!("passes: {}", least - 1)),
    );
    assert_eq!(design_emitting(&f, dir.path()).0.status.code(), Some(1));
}

#[test]
fn a_wire_temperature_limit_below_ambient_is_refused_without_a_search() {
    // Issue 15: every pass leaves the die above the ambient it entered at.
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "cold.yaml",
        &format!(
            "{}  wire_temperature_max_c: 20\ntarget:\n  diameter: 2.0\n  max_passes: 5\n",
            COPPER
        ),
    );
    let (o, written) = design_emitting(&f, dir.path());
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(1), "{err}");
    assert!(!written);
    assert!(
        err.contains("limits.wire_temperature_max_c")
            && err.contains("= 20")
            && err.contains("ambient 25 C"),
        "{err}"
    );
}

#[test]
fn one_ratio_over_the_whole_schedule_when_asked() {
    // Two cold-work anneals; with ratio_across: whole-schedule every pass of
    // every run is at one draw ratio (spread within the 0.5 % equal-ratio band).
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "whole.yaml",
        &(COPPER
            .replace(
                "flow: {law: voce, sigma0_mpa: 80, saturation_mpa: 470, eps_c: 0.8}",
                "flow: {law: voce, sigma0_mpa: 80, saturation_mpa: 470, eps_c: 0.8}\n  cold_work_limit: 2.0",
            )
            .replace("diameter: 8.0", "diameter: 10.0")
            + "target:\n  diameter: 0.87\n  reduction_max: 0.2\n  ratio_across: whole-schedule\n  max_passes: 40\n"),
    );
    let v = json(&coldpass(&[
        "design",
        f.to_str().unwrap(),
        "--format",
        "json",
    ]));
    let s = &v["design"];
    assert!(s["anneals"].as_array().unwrap().len() >= 2, "{s}");
    let spread = s["draw_ratio_spread"].as_f64().unwrap();
    assert!(spread <= 0.005, "{spread}");
    assert_eq!(s["ratio_across"], "whole-schedule");
}

/// Blocks in a machine file, counted from its text (one `capstan_diameter_mm` a block).
fn blocks_in(machine: &str) -> usize {
    std::fs::read_to_string(root(machine))
        .unwrap()
        .lines()
        .filter(|l| l.contains("capstan_diameter_mm"))
        .count()
}

#[test]
fn a_design_on_a_machine_takes_one_die_per_block_and_reports_the_speed_check_finds() {
    let blocks = blocks_in("machines/harrow-lane-dry-7.yaml");
    assert_eq!(blocks, 7);
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("designed.yaml");
    let d = designed_json_emitting("schedules-demo/design-steel-machine.yaml", &out);
    assert_eq!(d["design"]["draw_passes"], blocks);
    assert_eq!(d["design"]["anneals"].as_array().unwrap().len(), 0);
    // The emitted schedule names the machine by a path from its own folder,
    // so `check` finds it from any working directory (here the temp folder).
    let text = std::fs::read_to_string(&out).unwrap();
    let named = text.lines().find(|l| l.starts_with("machine:")).unwrap();
    assert!(
        dir.path()
            .join(named.trim_start_matches("machine:").trim())
            .is_file(),
        "{named}"
    );
    let checked = Command::cargo_bin("coldpass")
        .unwrap()
        .current_dir(dir.path())
        .args(["check", "designed.yaml", "--format", "json"])
        .output()
        .unwrap();
    assert_eq!(
        checked.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&checked.stderr)
    );
    let c = json(&checked);
    // The speed the design reports is the one check works out on the machine.
    let speed = d["design"]["attainable_speed_m_s"].as_f64().unwrap();
    assert!(speed > 0.0);
    assert_eq!(c["summary"]["attainable_speed_m_s"].as_f64(), Some(speed));
    assert_eq!(
        c["summary"]["attainable_t_per_shift"].as_f64(),
        d["design"]["attainable_t_per_shift"].as_f64()
    );
    // One die per block, in order, as check assigns them.
    assert_eq!(
        c["machine"]["blocks"].as_array().map(Vec::len),
        Some(blocks),
        "{}",
        c["machine"]
    );
}

#[test]
fn the_machine_option_designs_as_the_machine_key_does() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root("schedules-demo/design-steel-machine.yaml")).unwrap();
    let bare: String = text
        .lines()
        .filter(|l| !l.starts_with("machine:"))
        .map(|l| format!("{l}\n"))
        .collect();
    let f = write(dir.path(), "bare.yaml", &bare);
    let machine = root("machines/harrow-lane-dry-7.yaml");
    let by_option = coldpass(&[
        "design",
        f.to_str().unwrap(),
        "--machine",
        machine.to_str().unwrap(),
        "--format",
        "json",
    ]);
    let by_key = coldpass(&[
        "design",
        "schedules-demo/design-steel-machine.yaml",
        "--format",
        "json",
    ]);
    assert_eq!(by_option.status.code(), Some(0));
    assert_eq!(
        json(&by_option)["design"]["attainable_speed_m_s"],
        json(&by_key)["design"]["attainable_speed_m_s"]
    );
    assert_eq!(json(&by_option)["design"]["draw_passes"], 7);
    // Without a machine the same file is free to choose its pass count.
    let free = coldpass(&["design", f.to_str().unwrap(), "--format", "json"]);
    assert!(json(&free)["design"].get("attainable_speed_m_s").is_none());
}

#[test]
fn more_passes_than_the_machine_has_blocks_is_refused_naming_target_passes() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root("schedules-demo/design-steel-machine.yaml"))
        .unwrap()
        .replace("../machines/", &format!("{}/", root("machines").display()))
        .replace(
            "  strategy: equal-ratio",
            "  strategy: equal-ratio\n  passes: 8",
        );
    let f = write(dir.path(), "eight.yaml", &text);
    let o = coldpass(&["design", f.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("target.passes") && err.contains("8 passes") && err.contains("7 blocks"),
        "{err}"
    );
}

#[test]
fn a_slip_machine_design_keeps_a_small_positive_slip_on_every_capstan() {
    // Slip as the trade defines it: capstan surface speed against the wire
    // speed on it, s_j = 1 - v_j / V_j. With the last capstan at the finish
    // speed (no slip) and V_j = V_{j+1} / q_{j+1} (the cone step ratios), and
    // v_j = v_f (D_f / D_j)^2 (volume constancy), s_j = 1 - (D_f/D_j)^2
    // prod_{k>j} q_k: worked here from the emitted dies and the machine
    // file's step ratios, apart from the machine code.
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("slip.yaml");
    let d = designed_json_emitting("schedules-demo/design-copper-slip-machine.yaml", &out);
    let machine = std::fs::read_to_string(root("machines/northfield-wet-13.yaml")).unwrap();
    let steps: Vec<f64> = machine
        .lines()
        .filter(|l| l.contains("capstan_diameter_mm"))
        .map(|l| {
            l.split("step_ratio:").nth(1).map_or(1.0, |r| {
                r.trim().trim_end_matches('}').trim().parse().unwrap()
            })
        })
        .collect();
    assert_eq!(steps.len(), 13);
    let checked = coldpass(&["check", out.to_str().unwrap(), "--format", "json"]);
    assert_eq!(checked.status.code(), Some(0));
    let c = json(&checked);
    let exits: Vec<f64> = c["passes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| p["exit_diameter_mm"].as_f64().unwrap())
        .collect();
    assert_eq!(exits.len(), 13);
    let d_f = exits[12];
    // The machine file gives no slip_max: the documented default.
    let limit = 0.15;
    // The layout rule (docs/physics.md, design on a machine): dies 2-13 take
    // `ln q_k + delta`, `delta = -ln(1 - s_max) / (2 (N - 1))`, so capstan j
    // slips `1 - exp(-(N - j) delta)`; capstan 1 `1 - sqrt(1 - s_max)` =
    // 7.8046 % (hand-worked). No die room here, so the emitted dies keep it
    // to rounding (achieved 5.6e-16).
    let delta = -(1.0f64 - limit).ln() / (2.0 * 12.0);
    for j in 0..12 {
        let q: f64 = steps[j + 1..].iter().product();
        let s = 1.0 - (d_f / exits[j]).powi(2) * q;
        assert!(s > 0.005 && s < limit, "capstan {}: slip {s}", j + 1);
        let laid_out = -f64::exp_m1(-((12 - j) as f64) * delta);
        assert!(
            (s - laid_out).abs() < 1e-12,
            "capstan {}: slip {s}, laid out {laid_out}",
            j + 1
        );
        if j == 0 {
            assert!((s - 0.078_045_554).abs() < 1e-9, "capstan 1: {s}");
        }
        let reported = c["machine"]["blocks"][j]["slip"].as_f64().unwrap();
        assert!(
            (reported - s).abs() < 1e-9,
            "capstan {}: {reported} vs {s}",
            j + 1
        );
    }
    let notes = d["design"]["notes"].to_string();
    assert!(notes.contains("cone ratios set dies 2-13"), "{notes}");
}

/// The steel demo's die stock stops at 8 deg while pass 1's optimum is
/// above it, so check flags that pass angle-off-optimum; the design notes
/// name each such step with the optimum check reports for it, and every
/// step they name is one check flags with its optimum outside the stock.
#[test]
fn a_die_stock_short_of_the_optimum_is_named_in_the_notes() {
    let o = coldpass(&[
        "design",
        "schedules-demo/design-steel-ratio.yaml",
        "--format",
        "json",
    ]);
    let v = json(&o);
    let notes: Vec<String> = v["design"]["notes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|n| n.as_str().unwrap().to_string())
        .collect();
    let note = notes
        .iter()
        .find(|n| n.contains("outside the die stock"))
        .unwrap_or_else(|| panic!("{notes:?}"));
    let mut named = 0;
    for p in v["schedule"]["passes"].as_array().unwrap() {
        let flagged = p["flags"]
            .as_array()
            .is_some_and(|f| f.iter().any(|x| x == "angle-off-optimum"));
        let Some(opt) = p["optimum_semi_angle_deg"].as_f64() else {
            continue;
        };
        let words = format!("step {} ({opt:.1} deg)", p["step"]);
        if flagged && !(4.0..=8.0).contains(&opt) {
            assert!(note.contains(&words), "{words} not in {note}");
            named += 1;
        } else {
            assert!(!note.contains(&words), "{words} in {note}");
        }
    }
    assert!(named >= 1, "{note}");
}

/// `coldpass design DEMO --format json --emit-schedule OUT`, which must
/// succeed: its JSON.
fn designed_json_emitting(demo: &str, out: &Path) -> serde_json::Value {
    let d = coldpass(&[
        "design",
        demo,
        "--format",
        "json",
        "--emit-schedule",
        out.to_str().unwrap(),
    ]);
    assert_eq!(
        d.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&d.stderr)
    );
    json(&d)
}
