//! `coldpass design` through the binary: the demo designs, the round trip
//! through `--emit-schedule` and `check`, the temper anneal, and the errors.

use std::path::{Path, PathBuf};
use std::process::Output;

use assert_cmd::Command;

fn root(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)
}

fn coldpass(args: &[&str]) -> Output {
    Command::cargo_bin("coldpass")
        .unwrap()
        .current_dir(root(""))
        .args(args)
        .output()
        .unwrap()
}

fn json(o: &Output) -> serde_json::Value {
    serde_json::from_slice(&o.stdout).unwrap_or_else(|e| {
        panic!(
            "not JSON ({e}): {}{}",
            String::from_utf8_lossy(&o.stdout),
            String::from_utf8_lossy(&o.stderr)
        )
    })
}

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
    // Voce inverse (Voce 1948; form as in the reference sheet) at the middle
    // of the 380-420 MPa window: eps = -ec ln((ss - s)/(ss - s0)), and the
    // anneal sits at D_a = D_f exp(eps/2).
    let eps = -0.8 * ((470.0f64 - 400.0) / (470.0 - 80.0)).ln();
    let d_a = 1.2 * (eps / 2.0).exp();
    let got = temper[0]["diameter_mm"].as_f64().unwrap();
    assert!((got / d_a - 1.0).abs() < 1e-9, "{got} vs {d_a}");
    let finished = v["schedule"]["summary"]["final_flow_stress_mpa"]
        .as_f64()
        .unwrap();
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
            "draw-ratio limit binds",
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
        header.contains(",caution,") && header.ends_with("strategy,run,anneal_reason"),
        "{header}"
    );
    assert!(csv.lines().any(|l| l.trim_end().ends_with(",temper")));
    let table = String::from_utf8(coldpass(&["design", d]).stdout).unwrap();
    assert!(table.starts_with("Design: equal-ratio") && table.contains("(temper)"));
}
