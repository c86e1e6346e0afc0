//! Units written in the values of schedule and machine files (issue 13):
//! a file in US units checks exactly as the same file in the keys' own
//! units, converted by hand with the factors NIST Special Publication 811
//! (2008), Appendix B.8, prints: 1 ft/min = 5.08 E-03 m/s (exact), 1 hp
//! (550 ft lbf/s) = 7.456 999 E+02 W, 1 psi = 6.894 757 E+03 Pa, 1 in =
//! 2.54 E-02 m (exact), and t/C = (t/F - 32)/1.8 (B.9).

mod common;

use common::{coldpass, root, stdout};
use serde_json::Value;

const COPPER: &str = "schedules-demo/copper-building-wire.yaml";
const STEEL: &str = "schedules-demo/steel-multiblock.yaml";
const MACHINE: &str = "machines/harrow-lane-dry-7.yaml";

/// SP 811 prints its factors to seven digits (psi 6.894 757 E+03 Pa; ours,
/// from the exact pound and inch, is 6 894.757 293 Pa, 4.25e-8 higher; hp
/// 7.456 999 E+02 W against 745.699 872, 3.8e-8 lower), so the hand twins
/// are off by at most 4.25e-8 relative and so are the figures (achieved:
/// 4.25e-8 on the passes, 3.8e-8 on the machine blocks).
const SP811_DIGITS: f64 = 5e-8;

/// `text` with each `(from, to)` replaced once (each must be there).
fn edited(text: &str, edits: &[(&str, String)]) -> String {
    let mut t = text.to_string();
    for (from, to) in edits {
        assert!(t.contains(from), "the demo holds {from:?}");
        t = t.replacen(from, to, 1);
    }
    t
}

fn check_json(args: &[&str]) -> (Option<i32>, Value) {
    let mut all = vec!["check"];
    all.extend_from_slice(args);
    all.extend_from_slice(&["--format", "json"]);
    let o = coldpass(&all);
    let v: Value = serde_json::from_str(&stdout(&o))
        .unwrap_or_else(|e| panic!("{e}: {}", String::from_utf8_lossy(&o.stderr)));
    (o.status.code(), v)
}

/// Every number in `a` within `rel` (relative) of the same number in `b`.
fn same_figures(a: &Value, b: &Value, rel: f64, at: &str) {
    match (a, b) {
        (Value::Number(x), Value::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap(), y.as_f64().unwrap());
            assert!(
                (x - y).abs() <= rel * y.abs().max(1e-9),
                "{at}: {x} against {y}"
            );
        }
        (Value::Array(x), Value::Array(y)) => {
            assert_eq!(x.len(), y.len(), "{at}");
            for (i, (p, q)) in x.iter().zip(y).enumerate() {
                same_figures(p, q, rel, &format!("{at}[{i}]"));
            }
        }
        (Value::Object(x), Value::Object(y)) => {
            for (k, p) in x {
                if k == "title" || k == "notes" {
                    continue;
                }
                same_figures(p, &y[k], rel, &format!("{at}.{k}"));
            }
        }
        _ => assert_eq!(a, b, "{at}"),
    }
}

#[test]
fn a_schedule_in_us_units_checks_as_its_si_twin() {
    let text = std::fs::read_to_string(root(COPPER)).unwrap();
    // US values chosen round; their SI twins worked by hand with SP 811's
    // printed factors.
    let us = edited(
        &text,
        &[
            (
                "finish_speed_m_s: 20",
                "finish_speed_m_s: 4000 ft/min".into(),
            ),
            ("block_power_kw: 55", "block_power_kw: 70 hp".into()),
            ("ambient_c: 25", "ambient_c: 77 F".into()),
            (
                "wire_temperature_max_c: 150",
                "wire_temperature_max_c: \"302 °F\"".into(),
            ),
            (
                "  - exit: 6.15",
                "  - exit: 6.15\n    back_tension_mpa: 2 ksi".into(),
            ),
        ],
    );
    let si = edited(
        &text,
        &[
            // 4000 ft/min * 5.08e-3 = 20.32 m/s (exact).
            ("finish_speed_m_s: 20", "finish_speed_m_s: 20.32".into()),
            // 70 hp * 0.7456999 kW = 52.198993 kW.
            ("block_power_kw: 55", "block_power_kw: 52.198993".into()),
            // (77 - 32)/1.8 = 25 C; (302 - 32)/1.8 = 150 C (exact).
            ("ambient_c: 25", "ambient_c: 25".into()),
            (
                "wire_temperature_max_c: 150",
                "wire_temperature_max_c: 150".into(),
            ),
            // 2000 psi * 6.894757e3 Pa = 13.789514 MPa.
            (
                "  - exit: 6.15",
                "  - exit: 6.15\n    back_tension_mpa: 13.789514".into(),
            ),
        ],
    );
    let dir = tempfile::tempdir().unwrap();
    let (a, b) = (dir.path().join("us.yaml"), dir.path().join("si.yaml"));
    std::fs::write(&a, us).unwrap();
    std::fs::write(&b, si).unwrap();
    let (ca, ja) = check_json(&[a.to_str().unwrap()]);
    let (cb, jb) = check_json(&[b.to_str().unwrap()]);
    assert_eq!(ca, cb);
    same_figures(&ja["passes"], &jb["passes"], SP811_DIGITS, "passes");
    same_figures(&ja["summary"], &jb["summary"], SP811_DIGITS, "summary");
    assert!(
        (ja["passes"][1]["back_tension_mpa"].as_f64().unwrap() - 13.789_514).abs() < 1e-6,
        "{}",
        ja["passes"][1]
    );
}

#[test]
fn a_machine_in_us_units_runs_as_its_si_twin() {
    let text = std::fs::read_to_string(root(MACHINE)).unwrap();
    let us = edited(
        &text,
        &[
            // 600 mm = 23.622 047 in; written in inches as 600/25.4.
            (
                "capstan_diameter_mm: 600, motor_kw: 22,",
                format!("capstan_diameter_mm: {} in, motor_kw: 30 hp,", 600.0 / 25.4),
            ),
            (
                "wire_temperature_max_c: 150",
                "wire_temperature_max_c: 302 F".into(),
            ),
        ],
    );
    let si = edited(
        &text,
        &[
            // 30 hp * 0.7456999 kW = 22.370997 kW.
            (
                "capstan_diameter_mm: 600, motor_kw: 22,",
                "capstan_diameter_mm: 600, motor_kw: 22.370997,".into(),
            ),
            (
                "wire_temperature_max_c: 150",
                "wire_temperature_max_c: 150".into(),
            ),
        ],
    );
    let dir = tempfile::tempdir().unwrap();
    let (a, b) = (dir.path().join("us.yaml"), dir.path().join("si.yaml"));
    std::fs::write(&a, us).unwrap();
    std::fs::write(&b, si).unwrap();
    let (ca, ja) = check_json(&[STEEL, "--machine", a.to_str().unwrap()]);
    let (cb, jb) = check_json(&[STEEL, "--machine", b.to_str().unwrap()]);
    assert_eq!(ca, cb);
    assert!(ja["machine"].is_object(), "{ja}");
    same_figures(&ja["machine"], &jb["machine"], SP811_DIGITS, "machine");
    same_figures(&ja["summary"], &jb["summary"], SP811_DIGITS, "summary");
}

#[test]
fn plain_numbers_keep_the_keys_units() {
    // The contract: a file without units reads as before (the demo's own
    // figures, untouched).
    let (code, plain) = check_json(&[COPPER]);
    let text = std::fs::read_to_string(root(COPPER)).unwrap();
    let spelled = edited(
        &text,
        &[
            ("finish_speed_m_s: 20", "finish_speed_m_s: 20 m/s".into()),
            ("block_power_kw: 55", "block_power_kw: 55 kW".into()),
            ("ambient_c: 25", "ambient_c: 25 C".into()),
        ],
    );
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("s.yaml");
    std::fs::write(&p, spelled).unwrap();
    let (c2, with_units) = check_json(&[p.to_str().unwrap()]);
    assert_eq!(code, c2);
    same_figures(&with_units["passes"], &plain["passes"], 0.0, "passes");
    same_figures(&with_units["summary"], &plain["summary"], 0.0, "summary");
}

#[test]
fn a_design_file_in_us_units_designs_as_its_si_twin() {
    let text = std::fs::read_to_string(root("schedules-demo/design-copper-temper.yaml")).unwrap();
    let us = edited(
        &text,
        &[
            (
                "strength_mpa: {min: 380, max: 420}",
                "strength_mpa: {min: 55 ksi, max: 61 ksi}".into(),
            ),
            (
                "finish_speed_m_s: 20",
                "finish_speed_m_s: 4000 ft/min".into(),
            ),
        ],
    );
    let si = edited(
        &text,
        &[
            // 55 and 61 ksi * 6.894757 MPa = 379.211635 and 420.580177 MPa.
            (
                "strength_mpa: {min: 380, max: 420}",
                "strength_mpa: {min: 379.211635, max: 420.580177}".into(),
            ),
            ("finish_speed_m_s: 20", "finish_speed_m_s: 20.32".into()),
        ],
    );
    let dir = tempfile::tempdir().unwrap();
    let (a, b) = (dir.path().join("us.yaml"), dir.path().join("si.yaml"));
    std::fs::write(&a, us).unwrap();
    std::fs::write(&b, si).unwrap();
    let design = |p: &std::path::Path| -> (Option<i32>, Value) {
        let o = coldpass(&["design", p.to_str().unwrap(), "--format", "json"]);
        let v: Value = serde_json::from_str(&stdout(&o))
            .unwrap_or_else(|e| panic!("{e}: {}", String::from_utf8_lossy(&o.stderr)));
        (o.status.code(), v)
    };
    let (ca, ja) = design(&a);
    let (cb, jb) = design(&b);
    assert_eq!(ca, cb);
    assert_eq!(ca, Some(0), "{ja}");
    // The design aims inside the window: the window's 4.25e-8 (SP 811's
    // seven digits) reaches the figures unamplified.
    same_figures(
        &ja["schedule"]["summary"],
        &jb["schedule"]["summary"],
        SP811_DIGITS,
        "summary",
    );
    same_figures(
        &ja["schedule"]["passes"],
        &jb["schedule"]["passes"],
        SP811_DIGITS,
        "passes",
    );
}
