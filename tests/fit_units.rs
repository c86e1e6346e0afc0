//! `coldpass fit` reads records as test machines export them: units from the
//! header (ksi, psi, N/mm2, lbf, kN, in, percent), semicolon and tab
//! separators with decimal commas; several specimens as a set; options
//! checked against their ranges; no output over an input.
//!
//! Unit factors: 1 lbf = 4.4482216152605 N and 1 in = 25.4 mm exactly (NIST
//! SP 811, from memory), so 1 ksi = 6.894757293168 MPa.

mod common;

use common::{coldpass, root, stderr, stdout};
use serde_json::Value;
use tempfile::TempDir;

const COPPER: &str = "schedules-demo/tensile-copper-rod.csv";
const STEEL: &str = "schedules-demo/tensile-steel-rod.csv";
const LBF_N: f64 = 4.448_221_615_260_5;

fn json_of(args: &[&str]) -> Value {
    let mut a = args.to_vec();
    a.extend(["--format", "json"]);
    let o = coldpass(&a);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    serde_json::from_str(&stdout(&o)).unwrap()
}

/// The data rows of a demo record, split at commas.
fn rows(rel: &str) -> Vec<Vec<f64>> {
    std::fs::read_to_string(root(rel))
        .unwrap()
        .lines()
        .filter(|l| !l.starts_with('#'))
        .skip(1)
        .map(|l| l.split(',').map(|c| c.parse().unwrap()).collect())
        .collect()
}

fn write(dir: &TempDir, name: &str, text: &str) -> String {
    let p = dir.path().join(name);
    std::fs::write(&p, text).unwrap();
    p.to_str().unwrap().to_string()
}

fn close(what: &str, a: f64, b: f64, rel: f64) {
    assert!((a - b).abs() <= rel * b.abs(), "{what}: {a} vs {b}");
}

#[test]
fn a_ksi_header_is_read_as_ksi() {
    // Issue 11: `Stress (ksi)` was read as MPa (E 17 GPa for copper).
    let dir = TempDir::new().unwrap();
    let ksi = LBF_N * 1000.0 / (25.4 * 25.4);
    let mut text = String::from("Strain,Stress (ksi)\n");
    for r in rows(COPPER) {
        text.push_str(&format!("{},{:.12}\n", r[0], r[1] / ksi));
    }
    let f = write(&dir, "ksi.csv", &text);
    let mpa = json_of(&["fit", COPPER]);
    let got = json_of(&["fit", &f]);
    assert!(got["columns"].as_str().unwrap().contains("(ksi)"));
    for key in ["youngs_modulus_gpa", "yield_mpa", "uts_mpa"] {
        close(
            key,
            got[key].as_f64().unwrap(),
            mpa[key].as_f64().unwrap(),
            1e-9,
        );
    }
}

#[test]
fn semicolons_with_decimal_commas_and_tabs_read_as_commas_do() {
    let dir = TempDir::new().unwrap();
    let mut semi =
        String::from("# exported\n\"Engineering strain\";\"Engineering stress (N/mm2)\"\n");
    let mut tab = String::from("Engineering strain\tEngineering stress (MPa)\n");
    for r in rows(COPPER) {
        semi.push_str(&format!("{};{}\n", r[0], r[1]).replace('.', ","));
        tab.push_str(&format!("{}\t{}\n", r[0], r[1]));
    }
    let want = json_of(&["fit", COPPER]);
    for (name, text) in [("semi.csv", semi), ("tab.csv", tab)] {
        let f = write(&dir, name, &text);
        let got = json_of(&["fit", &f]);
        for key in [
            "youngs_modulus_gpa",
            "yield_mpa",
            "uts_mpa",
            "fitted_points",
        ] {
            assert_eq!(got[key], want[key], "{name} {key}");
        }
        assert_eq!(got["best"], want["best"], "{name}");
    }
}

#[test]
fn force_in_lbf_and_extension_in_inches_give_the_metric_result() {
    let dir = TempDir::new().unwrap();
    let mut text = String::from("Time (s),Extension (in),Load (lbf)\n");
    for r in rows(STEEL) {
        text.push_str(&format!(
            "{},{:.12},{:.12}\n",
            r[0],
            r[1] / 25.4,
            r[2] * 1000.0 / LBF_N
        ));
    }
    let f = write(&dir, "imperial.csv", &text);
    let geometry = ["--gauge-length-mm", "50", "--diameter-mm", "5.5"];
    let mut a = vec!["fit", STEEL];
    a.extend(geometry);
    let want = json_of(&a);
    let mut b = vec!["fit", f.as_str()];
    b.extend(geometry);
    let got = json_of(&b);
    let cols = got["columns"].as_str().unwrap();
    assert!(cols.contains("(lbf)") && cols.contains("(in)"), "{cols}");
    for key in ["youngs_modulus_gpa", "yield_mpa", "uts_mpa"] {
        close(
            key,
            got[key].as_f64().unwrap(),
            want[key].as_f64().unwrap(),
            1e-9,
        );
    }
}

#[test]
fn reach_strain_and_shear_modulus_out_of_range_are_refused_with_the_range() {
    // Issue 15: 1e308 printed 309-digit numbers and inf.
    for (flag, value, allowed) in [
        ("--reach-strain", "1e308", "(0, 10]"),
        ("--reach-strain", "0", "(0, 10]"),
        ("--shear-modulus-gpa", "1e308", "[1, 300]"),
    ] {
        let o = coldpass(&["fit", COPPER, flag, value]);
        assert_eq!(o.status.code(), Some(1), "{flag} {value}");
        let e = stderr(&o);
        assert!(e.contains(flag) && e.contains(allowed), "{e}");
    }
}

#[test]
fn a_stress_scaled_by_1e300_is_refused_naming_the_unit() {
    let dir = TempDir::new().unwrap();
    let mut text = String::from("strain,stress\n");
    for r in rows(COPPER) {
        text.push_str(&format!("{},{:e}\n", r[0], r[1] * 1e300));
    }
    let f = write(&dir, "huge.csv", &text);
    let o = coldpass(&["fit", &f]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("20000 MPa"), "{}", stderr(&o));
}

#[test]
fn the_report_is_never_written_over_the_record() {
    let dir = TempDir::new().unwrap();
    let f = write(
        &dir,
        "copy.csv",
        &std::fs::read_to_string(root(COPPER)).unwrap(),
    );
    let before = std::fs::read_to_string(&f).unwrap();
    let o = coldpass(&["fit", &f, "-o", &f]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("is the input file"), "{}", stderr(&o));
    assert_eq!(std::fs::read_to_string(&f).unwrap(), before);
}

#[test]
fn several_specimens_give_the_set_law_with_its_scatter() {
    // Three specimens: the demo copper with its stresses scaled by
    // k (1 + c e) for (k, c) = (0.97, 0), (1.00, 0.05), (1.04, -0.04) (demo values). The set's flow_scatter sd is the sample
    // standard deviation (n - 1) of the three fits' parameters, and its mean
    // the law written.
    let dir = TempDir::new().unwrap();
    let mut files = Vec::new();
    for (i, (k, c)) in [(0.97, 0.0), (1.0, 0.05), (1.04, -0.04)].iter().enumerate() {
        let mut text = String::from("strain,stress (MPa)\n");
        for r in rows(COPPER) {
            text.push_str(&format!("{},{:.6}\n", r[0], r[1] * k * (1.0 + c * r[0])));
        }
        files.push(write(&dir, &format!("s{i}.csv"), &text));
    }
    let law = dir.path().join("law.yaml");
    let mut a: Vec<&str> = vec!["fit"];
    a.extend(files.iter().map(String::as_str));
    let report = json_of(&a);
    let specimens = report["specimens"].as_array().unwrap();
    assert_eq!(specimens.len(), 3);
    let name = report["set"]["law"].as_str().unwrap().to_string();
    a.extend(["--emit-law", law.to_str().unwrap()]);
    let o = coldpass(&a);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let y: serde_yaml::Value =
        serde_yaml::from_str(&std::fs::read_to_string(&law).unwrap()).unwrap();
    assert_eq!(y["flow"]["law"].as_str().unwrap(), name);
    assert_eq!(y["flow_scatter"]["specimens"].as_u64(), Some(3));
    let sd = y["flow_scatter"]["sd"].as_mapping().unwrap();
    for (key, v) in sd {
        let key = key.as_str().unwrap();
        let vals: Vec<f64> = specimens
            .iter()
            .map(|s| {
                s["fits"]
                    .as_array()
                    .unwrap()
                    .iter()
                    .find(|f| f["law"] == name.as_str())
                    .unwrap()["params"][key]
                    .as_f64()
                    .unwrap()
            })
            .collect();
        let m = vals.iter().sum::<f64>() / 3.0;
        let s = (vals.iter().map(|x| (x - m).powi(2)).sum::<f64>() / 2.0).sqrt();
        close(key, v.as_f64().unwrap(), s, 1e-3);
        close(key, y["flow"][key].as_f64().unwrap(), m, 1e-5);
    }
    let corr = y["flow_scatter"]["correlation"].as_sequence().unwrap();
    assert!(!corr.is_empty());
    for c in corr {
        assert_eq!(c["between"].as_sequence().unwrap().len(), 2);
        assert!(c["r"].as_f64().unwrap().abs() <= 1.0);
    }
    assert!(y["flow_valid_to_strain"].as_f64().unwrap() > 0.4);
}

#[test]
fn drawn_wire_points_set_the_strain_the_emitted_law_is_good_for() {
    // An 8 mm rod drawn to 2.5 mm: strain 2 ln(8/2.5) = 2.3263; the law is
    // written as good to that strain (flow_valid_to_strain).
    let dir = TempDir::new().unwrap();
    let law = dir.path().join("law.yaml");
    let o = coldpass(&[
        "fit",
        COPPER,
        "--drawn-wire",
        "8.0:2.5:420",
        "--drawn-point",
        "1.2:390",
        "--emit-law",
        law.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).contains("With the drawn-wire points"));
    let y: serde_yaml::Value =
        serde_yaml::from_str(&std::fs::read_to_string(&law).unwrap()).unwrap();
    close(
        "flow_valid_to_strain",
        y["flow_valid_to_strain"].as_f64().unwrap(),
        2.0 * (8.0f64 / 2.5).ln(),
        1e-4,
    );
    assert_eq!(y["flow_scatter"]["specimens"].as_u64(), Some(1));
    // A bad drawn point names the option and what is allowed.
    let o = coldpass(&["fit", COPPER, "--drawn-wire", "2.5:8.0:420"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        stderr(&o).contains("--drawn-wire '2.5:8.0:420'"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn no_chart_is_written_when_the_report_cannot_be() {
    // Issue 15: side outputs were written although the run failed.
    let dir = TempDir::new().unwrap();
    let plot = dir.path().join("chart.svg");
    let report = dir.path().join("no-such-folder").join("r.txt");
    let o = coldpass(&[
        "fit",
        COPPER,
        "--plot",
        plot.to_str().unwrap(),
        "-o",
        report.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("does not exist"), "{}", stderr(&o));
    assert!(!plot.exists());
}
