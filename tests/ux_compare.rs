//! `coldpass compare A B`: per step the figures of both files as `check`
//! gives them and the change B - A; the two summaries; a design file is
//! designed first.

mod common;

use common::{coldpass, stderr, stdout};

fn json(args: &[&str]) -> serde_json::Value {
    let out = coldpass(args);
    assert!(out.status.success(), "{}", stderr(&out));
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn each_side_is_what_check_reports_and_the_change_is_b_minus_a() {
    let a = "schedules-demo/copper-building-wire.yaml";
    let b = "schedules-demo/copper-rod-breakdown-over.yaml";
    let cmp = json(&["compare", a, b, "--format", "json"]);
    let ja = json(&["check", a, "--format", "json"]);
    let out_b = coldpass(&["check", b, "--format", "json"]);
    let jb: serde_json::Value = serde_json::from_slice(&out_b.stdout).unwrap();
    let passes = cmp["passes"].as_array().unwrap();
    assert_eq!(passes.len(), 13, "the longer schedule's steps");
    for (i, p) in passes.iter().enumerate() {
        for (side, j) in [("first", &ja), ("second", &jb)] {
            match j["passes"].get(i) {
                Some(step) => {
                    for key in [
                        "exit_diameter_mm",
                        "area_reduction",
                        "draw_ratio",
                        "power_kw",
                        "wire_temperature_c",
                        "flags",
                    ] {
                        assert_eq!(p[side][key], step[key], "step {} {side} {key}", i + 1);
                    }
                }
                None => assert!(p[side].is_null()),
            }
        }
        if let (Some(x), Some(y)) = (
            p["first"]["draw_ratio"].as_f64(),
            p["second"]["draw_ratio"].as_f64(),
        ) {
            assert_eq!(p["difference"]["draw_ratio"].as_f64().unwrap(), y - x);
        }
    }
    // Step 4 of B is over the draw limit and A's is not: the flags differ.
    assert_eq!(passes[3]["difference"]["flags_differ"], true);
    assert_eq!(cmp["summary"]["first"], ja["summary"]);
    assert_eq!(cmp["summary"]["second"], jb["summary"]);
}

#[test]
fn the_table_shows_both_summaries_and_the_caution() {
    let out = coldpass(&[
        "compare",
        "schedules-demo/stainless-spring.yaml",
        "schedules-demo/steel-multiblock.yaml",
    ]);
    assert_eq!(out.status.code(), Some(0));
    let text = stdout(&out);
    assert!(text.contains("14 / 2") && text.contains("7 / 0"), "{text}");
    assert!(text.contains("Caution:"));
}

#[test]
fn a_design_file_is_designed_then_compared() {
    let d = "schedules-demo/design-copper-temper.yaml";
    let cmp = json(&[
        "compare",
        "schedules-demo/copper-building-wire.yaml",
        d,
        "--format",
        "json",
    ]);
    let designed = json(&["design", d, "--format", "json"]);
    assert_eq!(cmp["summary"]["second"], designed["schedule"]["summary"]);
}
