//! `target.prefer: speed` (issue 8): on a machine the design tries every
//! strategy at the machine's pass count and keeps the one of highest
//! attainable speed. Checked against `check --machine` on each strategy's
//! emitted schedule, an evaluation made apart from the design's choice.

use std::path::{Path, PathBuf};

mod common;

use common::{coldpass, json, root};

const MACHINE: &str = "machines/harrow-lane-dry-7.yaml";

/// The steel machine demo with `strategy` (and `extra` target lines), the
/// machine path made absolute so that the copy reads it from anywhere.
fn variant(dir: &Path, name: &str, strategy: &str, extra: &str) -> PathBuf {
    let text = std::fs::read_to_string(root("schedules-demo/design-steel-machine.yaml")).unwrap();
    assert!(text.contains("  strategy: equal-ratio\n"));
    let text = text
        .replace(
            "../machines/harrow-lane-dry-7.yaml",
            root(MACHINE).to_str().unwrap(),
        )
        .replace(
            "  strategy: equal-ratio\n",
            &format!("  strategy: {strategy}\n{extra}"),
        );
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

/// The attainable speed `check --machine` reports for the schedule `file`'s
/// design emits, with the design's own JSON.
fn checked_speed(dir: &Path, file: &Path) -> (f64, serde_json::Value) {
    let emitted = dir.join(format!(
        "{}.emitted.yaml",
        file.file_stem().unwrap().to_str().unwrap()
    ));
    let d = coldpass(&[
        "design",
        file.to_str().unwrap(),
        "--format",
        "json",
        "--emit-schedule",
        emitted.to_str().unwrap(),
    ]);
    assert_eq!(
        d.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&d.stderr)
    );
    let c = coldpass(&[
        "check",
        emitted.to_str().unwrap(),
        "--machine",
        MACHINE,
        "--format",
        "json",
    ]);
    let report = json(&c);
    let v = report["summary"]["attainable_speed_m_s"]
        .as_f64()
        .unwrap_or_else(|| panic!("{report}"));
    (v, json(&d))
}

#[test]
fn prefer_speed_keeps_the_fastest_strategy_as_check_reports_it() {
    let dir = tempfile::tempdir().unwrap();
    let mut each = Vec::new();
    for s in ["equal-ratio", "equal-strain", "tapered"] {
        let f = variant(dir.path(), &format!("{s}.yaml"), s, "");
        each.push((s, checked_speed(dir.path(), &f).0));
    }
    for own in ["equal-ratio", "equal-strain", "tapered"] {
        let f = variant(
            dir.path(),
            &format!("fast-{own}.yaml"),
            own,
            "  prefer: speed\n",
        );
        let (v, d) = checked_speed(dir.path(), &f);
        for (s, w) in &each {
            assert!(v >= *w, "prefer speed from {own}: {v} m/s under {s}'s {w}");
        }
        // Each strategy's design is ok on the demo, so the speed alone decides.
        assert_eq!(d["schedule"]["summary"]["verdict"], "ok");
        // The speed is reported, the same as check's, and the note names
        // every strategy's speed.
        let reported = d["design"]["attainable_speed_m_s"].as_f64().unwrap();
        assert!((reported / v - 1.0).abs() < 1e-12, "{reported} vs {v}");
        let notes = d["design"]["notes"].to_string();
        assert!(notes.contains("target.prefer speed:"), "{notes}");
        for (s, _) in &each {
            assert!(notes.contains(s), "{s}: {notes}");
        }
    }
    // The demo's strategies differ in speed, so the choice is not vacuous.
    let lo = each.iter().map(|e| e.1).fold(f64::INFINITY, f64::min);
    let hi = each.iter().map(|e| e.1).fold(0.0, f64::max);
    assert!(hi > lo * 1.01, "{each:?}");
}

#[test]
fn prefer_strategy_is_the_default_and_changes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let plain = variant(dir.path(), "plain.yaml", "equal-ratio", "");
    let said = variant(
        dir.path(),
        "said.yaml",
        "equal-ratio",
        "  prefer: strategy\n",
    );
    let a = coldpass(&["design", plain.to_str().unwrap(), "--format", "json"]);
    let b = coldpass(&["design", said.to_str().unwrap(), "--format", "json"]);
    assert_eq!(a.status.code(), Some(0));
    assert_eq!(a.stdout, b.stdout);
}

#[test]
fn prefer_speed_without_a_machine_names_the_key() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root("schedules-demo/design-steel-ratio.yaml")).unwrap();
    let p = dir.path().join("no-machine.yaml");
    std::fs::write(&p, format!("{}\n  prefer: speed\n", text.trim_end())).unwrap();
    let o = coldpass(&["design", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("target.prefer"), "{err}");
    assert!(err.contains("machine"), "{err}");
    assert!(o.stdout.is_empty());
    // An unknown value names the ones allowed.
    std::fs::write(&p, format!("{}\n  prefer: fast\n", text.trim_end())).unwrap();
    let o = coldpass(&["design", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("strategy") && err.contains("speed"), "{err}");
}
