//! Regression tests: numbers that are not results never reach a report
//! (issue 15). Physical ranges are in `schedule.rs` with their sources
//! (CRC Handbook, from memory; common practice).

mod common;

use common::{coldpass, root, stderr, stdout};

const COPPER: &str = "schedules-demo/copper-building-wire.yaml";
const DESIGN: &str = "schedules-demo/design-copper-temper.yaml";

fn edited(dir: &tempfile::TempDir, demo: &str, from: &str, to: &str) -> String {
    let text = std::fs::read_to_string(root(demo)).unwrap();
    assert!(text.contains(from), "the demo holds {from:?}");
    let path = dir.path().join("edited.yaml");
    std::fs::write(&path, text.replacen(from, to, 1)).unwrap();
    path.to_string_lossy().into_owned()
}

fn refused(cmd: &str, demo: &str, from: &str, to: &str, words: &[&str]) {
    let dir = tempfile::tempdir().unwrap();
    let file = edited(&dir, demo, from, to);
    for format in ["table", "json", "csv"] {
        let o = coldpass(&[cmd, &file, "--format", format]);
        assert_eq!(o.status.code(), Some(1), "{to}: {}", stdout(&o));
        assert!(stdout(&o).is_empty(), "no report: {}", stdout(&o));
        let e = stderr(&o);
        for w in words {
            assert!(e.contains(w), "{to}: missing {w:?} in {e}");
        }
    }
}

#[test]
fn a_density_of_5e_324_is_refused_with_its_range_not_printed_as_inf() {
    refused(
        "check",
        COPPER,
        "density_kg_m3: 8940",
        "density_kg_m3: 5e-324",
        &["material.density_kg_m3", "5e-324", "[100, 30000]"],
    );
}

#[test]
fn a_specific_heat_of_5e_324_is_refused_with_its_range() {
    refused(
        "check",
        COPPER,
        "specific_heat_j_kg_k: 385",
        "specific_heat_j_kg_k: 5e-324",
        &["material.specific_heat_j_kg_k", "[50, 5000]"],
    );
}

#[test]
fn a_start_strain_near_the_float_limit_is_refused_not_reported_as_strain_to_inf() {
    refused(
        "check",
        COPPER,
        "  diameter: 8.0\n",
        "  diameter: 8.0\n  strain: 1e308\n",
        &["start.strain", "[0, 20]"],
    );
}

#[test]
fn a_pass_exit_of_1e_300_mm_is_refused_with_the_diameter_range() {
    refused(
        "check",
        COPPER,
        "  - exit: 7.0",
        "  - exit: 1e-300",
        &["passes[0].exit", "[0.001, 1000]"],
    );
}

#[test]
fn a_finishing_speed_of_1e308_is_refused_with_its_range() {
    refused(
        "check",
        COPPER,
        "finish_speed_m_s: 20",
        "finish_speed_m_s: 1e308",
        &["line.finish_speed_m_s", "(0, 500]"],
    );
}

#[test]
fn a_wire_temperature_limit_below_ambient_is_refused_when_the_design_is_read() {
    // The wire enters every die at ambient (25 C by default) and only warms.
    let t = std::time::Instant::now();
    refused(
        "design",
        DESIGN,
        "wire_temperature_max_c: 150",
        "wire_temperature_max_c: 20",
        &["limits.wire_temperature_max_c", "above the ambient 25 C"],
    );
    assert!(t.elapsed() < std::time::Duration::from_secs(20));
}

#[test]
fn no_demo_report_holds_a_non_finite_number() {
    for demo in common::demo_schedules() {
        let file = demo.to_str().unwrap();
        for format in ["table", "json", "yaml", "csv"] {
            let o = coldpass(&["check", file, "--format", format]);
            let out = stdout(&o).to_lowercase();
            // (JSON `null` is a figure that does not apply, such as an
            // anneal's draw stress; the final guard refuses non-finite ones.)
            for bad in ["inf", "nan"] {
                let hits = out
                    .split(|c: char| !c.is_ascii_alphanumeric())
                    .filter(|w| *w == bad)
                    .count();
                assert_eq!(hits, 0, "{file} {format} prints {bad}");
            }
        }
    }
}

#[test]
fn a_report_figure_that_overflows_is_refused_by_name_not_printed() {
    // A yield stress of 1e305 MPa is finite and positive, so it passes the
    // law's checks; the adiabatic temperature rise beta * sigma * eps /
    // (rho c) then exceeds f64::MAX (about 1.8e308) and the final guard
    // names it instead of printing inf (or null in JSON).
    let dir = tempfile::tempdir().unwrap();
    let file = edited(
        &dir,
        COPPER,
        "  flow: {law: voce, sigma0_mpa: 80, saturation_mpa: 470, eps_c: 0.8}",
        "  flow: {law: perfectly-plastic, yield_mpa: 1e305}",
    );
    for format in ["table", "json", "csv"] {
        let o = coldpass(&["check", &file, "--format", format]);
        assert_eq!(o.status.code(), Some(1), "{}", stdout(&o));
        assert!(stdout(&o).is_empty());
        let e = stderr(&o);
        assert!(
            e.contains("passes[0].temperature_rise_c") && e.contains("inf"),
            "{e}"
        );
    }
}
