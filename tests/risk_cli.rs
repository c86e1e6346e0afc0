//! `coldpass risk` from the command line: formats, chart, exit status,
//! byte-identical output for a seed across thread counts, and bad input.

mod common;

use assert_cmd::Command;
use common::{coldpass, root, stderr, stdout};

const DEMO: &str = "schedules-demo/steel-multiblock-scatter.yaml";

fn with_threads(threads: &str, args: &[&str]) -> std::process::Output {
    Command::cargo_bin("coldpass")
        .unwrap()
        .current_dir(root(""))
        .env("RAYON_NUM_THREADS", threads)
        .args(args)
        .output()
        .unwrap()
}

#[test]
fn the_demo_names_its_weakest_pass_and_what_drives_it() {
    let o = coldpass(&["risk", DEMO, "--samples", "4000"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let t = stdout(&o);
    assert!(t.contains("weakest pass: step 4"), "{t}");
    assert!(t.contains("driven most by friction"), "{t}");
    assert!(t.contains("not a forecast of breaks per tonne"), "{t}");
    assert!(t.contains("Caution: Planning estimates only"), "{t}");
}

#[test]
fn the_same_seed_gives_byte_identical_output_on_one_thread_and_on_two() {
    for format in ["json", "csv", "table"] {
        let args = [
            "risk",
            DEMO,
            "--samples",
            "6000",
            "--seed",
            "9",
            "--format",
            format,
        ];
        let one = with_threads("1", &args);
        let two = with_threads("2", &args);
        assert_eq!(one.status.code(), Some(0));
        assert_eq!(one.stdout, two.stdout, "{format}");
        assert_eq!(
            one.stdout,
            with_threads("2", &args).stdout,
            "{format}, again"
        );
    }
}

/// The same keys and values, numbers compared as f64 to a part in 1e15.
fn assert_same(at: &str, a: &serde_json::Value, b: &serde_json::Value) {
    use serde_json::Value as V;
    match (a, b) {
        (V::Object(x), V::Object(y)) => {
            assert_eq!(
                x.keys().collect::<Vec<_>>(),
                y.keys().collect::<Vec<_>>(),
                "{at}"
            );
            for (k, v) in x {
                assert_same(&format!("{at}.{k}"), v, &y[k]);
            }
        }
        (V::Array(x), V::Array(y)) => {
            assert_eq!(x.len(), y.len(), "{at}");
            for (i, (u, w)) in x.iter().zip(y).enumerate() {
                assert_same(&format!("{at}[{i}]"), u, w);
            }
        }
        // The YAML writer may drop the last of 17 digits.
        (V::Number(x), V::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap(), y.as_f64().unwrap());
            assert!(
                (x - y).abs() <= 1e-15 * x.abs().max(y.abs()),
                "{at}: {x} vs {y}"
            );
        }
        _ => assert_eq!(a, b, "{at}"),
    }
}

#[test]
fn json_yaml_and_csv_carry_the_same_names() {
    let json = stdout(&coldpass(&[
        "risk",
        DEMO,
        "--samples",
        "1000",
        "--format",
        "json",
    ]));
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    let yaml = stdout(&coldpass(&[
        "risk",
        DEMO,
        "--samples",
        "1000",
        "--format",
        "yaml",
    ]));
    let y: serde_json::Value = serde_yaml::from_str(&yaml).unwrap();
    assert_same("", &v, &y);
    let csv = stdout(&coldpass(&[
        "risk",
        DEMO,
        "--samples",
        "1000",
        "--format",
        "csv",
    ]));
    let header: Vec<&str> = csv.lines().next().unwrap().split(',').collect();
    let pass = &v["passes"][0];
    for key in header.iter().filter(|k| pass.get(**k).is_some()) {
        assert!(pass.get(*key).is_some(), "{key}");
    }
    for key in [
        "break_probability",
        "draw_ratio_p95",
        "main_driver",
        "caution",
        "scope",
    ] {
        assert!(header.contains(&key), "{key} in the CSV header");
    }
    assert_eq!(
        csv.lines().count(),
        1 + v["passes"].as_array().unwrap().len()
    );
    assert_eq!(v["summary"]["weakest_step"], 4);
}

#[test]
fn plot_writes_a_fan_chart_and_break_bars() {
    let dir = tempfile::tempdir().unwrap();
    let svg = dir.path().join("risk.svg");
    let o = coldpass(&[
        "risk",
        DEMO,
        "--samples",
        "1000",
        "--plot",
        svg.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.starts_with("<svg"));
    assert!(text.contains("5-95 % band") && text.contains("Break probability per pass"));
}

#[test]
fn a_break_probability_over_the_target_exits_3() {
    // The demo with more friction (0.12): pass 4 breaks in a few % of samples.
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root(DEMO)).unwrap();
    let file = dir.path().join("s.yaml");
    // The copy lives elsewhere: its machine is named by its full path.
    let machine = root("machines/harrow-lane-dry-7.yaml");
    std::fs::write(
        &file,
        text.replace("  friction: 0.09\n", "  friction: 0.12\n")
            .replace(
                "machine: ../machines/harrow-lane-dry-7.yaml",
                &format!("machine: '{}'", machine.display()),
            ),
    )
    .unwrap();
    let o = coldpass(&[
        "risk",
        file.to_str().unwrap(),
        // 10,000 samples put 10 beyond a 0.001 target: enough to place the margin.
        "--samples",
        "10000",
        "--target-probability",
        "0.001",
    ]);
    assert_eq!(o.status.code(), Some(3), "{}", stdout(&o));
    assert!(
        stdout(&o).contains("verdict: over-target"),
        "{}",
        stdout(&o)
    );
    assert!(
        stdout(&o).contains("lower every pass's draw ratio by"),
        "{}",
        stdout(&o)
    );
}

#[test]
fn a_target_too_small_for_the_samples_is_warned_about() {
    let o = coldpass(&[
        "risk",
        DEMO,
        "--samples",
        "4000",
        "--target-probability",
        "0.00001",
    ]);
    assert!(
        stdout(&o).contains("too few to place the margin"),
        "{}",
        stdout(&o)
    );
}

#[test]
fn a_design_file_is_designed_first() {
    let o = coldpass(&[
        "risk",
        "schedules-demo/design-steel-ratio.yaml",
        "--samples",
        "200",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).contains("nothing scatters"));
}

fn bad(scatter: &str) -> (i32, String, bool) {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root("schedules-demo/steel-multiblock.yaml")).unwrap();
    let file = dir.path().join("s.yaml");
    std::fs::write(&file, format!("{text}scatter:\n{scatter}\n")).unwrap();
    let out = dir.path().join("out.json");
    let o = coldpass(&[
        "risk",
        file.to_str().unwrap(),
        "--samples",
        "100",
        "-o",
        out.to_str().unwrap(),
    ]);
    (o.status.code().unwrap(), stderr(&o), out.exists())
}

#[test]
fn a_per_die_scatter_without_between_dies_is_refused_naming_the_key() {
    let (code, err, written) = bad("  friction: {distribution: normal, sd: 0.01}");
    assert_eq!(code, 1);
    assert!(err.contains("scatter.friction.between_dies"), "{err}");
    assert!(!written);
}

#[test]
fn a_uniform_scatter_with_an_sd_is_refused() {
    let (code, err, _) = bad("  semi_angle_deg: {distribution: uniform, sd: 0.5, between_dies: 0}");
    assert_eq!(code, 1);
    assert!(
        err.contains("scatter.semi_angle_deg.sd") && err.contains("tolerance"),
        "{err}"
    );
}

#[test]
fn an_unknown_distribution_or_key_is_refused() {
    let (code, err, _) = bad("  friction: {distribution: weibull, sd: 0.01, between_dies: 0}");
    assert_eq!(code, 1);
    assert!(
        err.contains("weibull") && err.contains("truncated-normal"),
        "{err}"
    );
    let (code, err, _) = bad("  humidity: {distribution: normal, sd: 1}");
    assert_eq!(code, 1);
    assert!(err.contains("humidity"), "{err}");
}

#[test]
fn a_flow_scatter_naming_a_key_the_law_lacks_is_refused() {
    let (code, err, _) = bad("  flow: {sd: {saturation_mpa: 10}}");
    assert_eq!(code, 1);
    assert!(
        err.contains("saturation_mpa") && err.contains("k_mpa, n"),
        "{err}"
    );
}

#[test]
fn zero_samples_or_a_target_outside_zero_to_one_is_refused() {
    // Bad option values are bad usage (exit 2), as `--samples abc` is.
    let o = coldpass(&["risk", DEMO, "--samples", "0"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("--samples"), "{}", stderr(&o));
    let o = coldpass(&["risk", DEMO, "--target-probability", "1.5"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(
        stderr(&o).contains("--target-probability"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn samples_the_model_refuses_are_counted_and_warned_about() {
    // Normal friction of sd 0.05 about 0.07 goes below 0 in about 8 % of
    // samples (Phi(-1.4)); the model refuses those.
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root("schedules-demo/steel-multiblock.yaml")).unwrap();
    let file = dir.path().join("s.yaml");
    std::fs::write(
        &file,
        format!(
            "{text}scatter:\n  friction: {{distribution: normal, sd: 0.05, between_dies: 1}}\n"
        ),
    )
    .unwrap();
    // The copy names its machine relative to the demo folder: give it here.
    let machine = root("machines/harrow-lane-dry-7.yaml");
    let o = coldpass(&[
        "risk",
        file.to_str().unwrap(),
        "--machine",
        machine.to_str().unwrap(),
        "--samples",
        "2000",
        "--format",
        "json",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    let refused = v["summary"]["samples_refused"].as_u64().unwrap();
    // Phi(-0.07/0.05) = 0.0808 (normal table); a Latin hypercube of 2000
    // hits it to within a sample or two.
    assert!(
        (refused as f64 / 2000.0 - 0.0808).abs() < 0.002,
        "{refused}"
    );
    assert!(stdout(&o).contains("narrow or truncate the scatter"));
}

#[test]
fn ctrl_c_stops_the_run_and_writes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("risk.json");
    let svg = dir.path().join("risk.svg");
    let child = std::process::Command::new(assert_cmd::cargo::cargo_bin("coldpass"))
        .current_dir(root(""))
        .args([
            "risk",
            DEMO,
            "--samples",
            "50000000",
            "--format",
            "json",
            "-o",
            out.to_str().unwrap(),
            "--plot",
            svg.to_str().unwrap(),
        ])
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    std::thread::sleep(std::time::Duration::from_millis(1500));
    let sent = std::process::Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(sent.success());
    let o = child.wait_with_output().unwrap();
    assert_eq!(o.status.code(), Some(130), "{}", stderr(&o));
    assert!(stderr(&o).contains("nothing was written"), "{}", stderr(&o));
    assert!(!out.exists() && !svg.exists());
    // No temporary file left beside the targets either.
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
}

#[test]
fn kept_samples_count_the_same_over_warn_passes_as_the_report() {
    // The CSV is an independent record of the run: counting its draw ratios
    // over the warn line must give the report's probability exactly.
    let dir = tempfile::tempdir().unwrap();
    let csv_path = dir.path().join("samples.csv");
    let csv_arg = csv_path.to_str().unwrap();
    let o = coldpass(&[
        "risk",
        DEMO,
        "--samples",
        "3000",
        "--format",
        "json",
        "--keep-samples",
        csv_arg,
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let rep: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    let mut r = csv::Reader::from_path(&csv_path).unwrap();
    let header = r.headers().unwrap().clone();
    assert_eq!(&header[0], "sample");
    assert!(header.iter().any(|h| h == "step4.friction"), "{header:?}");
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(rows.len(), 3000);
    let warn = rep["draw_ratio_warn"].as_f64().unwrap();
    for p in rep["passes"].as_array().unwrap() {
        let step = p["step"].as_u64().unwrap();
        let col = header
            .iter()
            .position(|h| h == format!("step{step}.draw_ratio"))
            .unwrap();
        let over = rows
            .iter()
            .filter(|row| row[col].parse::<f64>().unwrap() > warn)
            .count();
        // Six significant digits in the file: a ratio within 5e-7 of the line could round across it.
        let near = rows
            .iter()
            .filter(|row| (row[col].parse::<f64>().unwrap() - warn).abs() < 1e-6)
            .count();
        let p_over = p["over_warn_probability"].as_f64().unwrap() * 3000.0;
        assert!(
            (over as f64 - p_over).abs() <= near as f64 + 1e-9,
            "step {step}: {over} rows over warn, report {p_over}"
        );
    }
    // Every sample index once, in order.
    for (i, row) in rows.iter().enumerate() {
        assert_eq!(row[0].parse::<usize>().unwrap(), i);
    }
}

#[test]
fn kept_samples_into_a_folder_that_does_not_exist_write_nothing_at_all() {
    let dir = tempfile::tempdir().unwrap();
    let report = dir.path().join("report.json");
    let o = coldpass(&[
        "risk",
        DEMO,
        "--samples",
        "500",
        "-o",
        report.to_str().unwrap(),
        "--keep-samples",
        dir.path().join("missing/samples.csv").to_str().unwrap(),
    ]);
    assert_ne!(o.status.code(), Some(0));
    assert!(stderr(&o).contains("--keep-samples"), "{}", stderr(&o));
    assert!(
        !report.exists(),
        "the report was written although the samples were not"
    );
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
}

/// A target the samples cannot reach (fewer than 10 samples' worth of tail:
/// 1 sample for a 0.001 target) places no margin and claims neither side of
/// the target: the verdict says the samples are too few.
#[test]
fn too_few_samples_for_the_target_place_no_margin() {
    let o = coldpass(&[
        "risk",
        DEMO,
        "--samples",
        "1",
        "--target-probability",
        "0.001",
        "--format",
        "json",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let v: serde_json::Value = serde_json::from_str(&stdout(&o)).unwrap();
    let s = &v["summary"];
    assert_eq!(s["verdict"], "too-few-samples", "{s}");
    assert!(s["draw_ratio_scale_for_target"].is_null(), "{s}");
}
