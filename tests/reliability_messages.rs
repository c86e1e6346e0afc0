//! Regression tests: every parser error in the file's own words (issue 15):
//! the key as written, the value cut to about 60 characters, what is
//! allowed, and no internal type name. The wording is the project's own.

mod common;

use common::{coldpass, root, stderr};

const COPPER: &str = "schedules-demo/copper-building-wire.yaml";

/// Internal words a message must never show.
const INTERNAL: [&str; 10] = [
    "FlowLawSpec",
    "SizeText",
    "AnnealText",
    "ScheduleFile",
    "u128",
    "u32",
    "f64",
    "untagged enum",
    "tagged enum",
    "YAML tag starting with",
];

fn message_for(from: &str, to: &str) -> String {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root(COPPER)).unwrap();
    assert!(text.contains(from), "the demo holds {from:?}");
    let path = dir.path().join("bad.yaml");
    std::fs::write(&path, text.replacen(from, to, 1)).unwrap();
    let o = coldpass(&["check", path.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1), "{to}");
    let e = stderr(&o);
    for w in INTERNAL {
        assert!(!e.contains(w), "{to}: internal word {w:?} in {e}");
    }
    assert_eq!(e.lines().count(), 1, "one line: {e}");
    e
}

fn says(from: &str, to: &str, words: &[&str]) {
    let e = message_for(from, to);
    for w in words {
        assert!(e.contains(w), "{to}: missing {w:?} in {e}");
    }
}

const LAW: &str = "  flow: {law: voce, sigma0_mpa: 80, saturation_mpa: 470, eps_c: 0.8}";

#[test]
fn a_method_given_as_a_list_lists_the_method_names() {
    says(
        "  method: upper-bound",
        "  method: [max]",
        &[
            "limits.method",
            "`limits.method` = [max]: allowed one of",
            "`upper-bound`",
            "`max`",
            "line 21",
        ],
    );
}

#[test]
fn a_hexadecimal_friction_is_shown_as_written_and_explained() {
    says(
        "  friction: 0.05",
        "  friction: 0x10",
        &["`dies.friction` = 0x10: allowed", "hexadecimal", "decimal"],
    );
}

#[test]
fn a_quoted_number_is_told_to_lose_its_quotes() {
    says(
        "  friction: 0.05",
        "  friction: \"0.05\"",
        &["without quotes"],
    );
}

#[test]
fn a_whole_number_too_large_for_any_integer_is_named_without_u128() {
    says(
        LAW,
        "  flow: {law: hollomon, k_mpa: 99999999999999999999999999, n: 0.3}",
        &[
            "material.flow.k_mpa",
            "99999999999999999999999999",
            "far outside",
        ],
    );
    says(
        "  - exit: 7.0",
        "  - exit: 99999999999999999999999999",
        &["passes[0].exit", "far outside"],
    );
}

#[test]
fn a_bad_exit_is_named_exit_not_diameter() {
    says(
        "  - exit: 7.0",
        "  - exit: -7.0",
        &["`passes[0].exit` = -7: allowed"],
    );
    says(
        "  - exit: 7.0",
        "  - exit: \"seven\"",
        &["passes[0].exit", "seven", "AWG 10"],
    );
}

#[test]
fn a_list_where_a_diameter_goes_lists_the_diameter_forms() {
    says(
        "  - exit: 7.0",
        "  - exit: [7]",
        &[
            "passes[0].exit",
            "[7]",
            "a number of mm",
            "\"8 mm\"",
            "AWG 10",
        ],
    );
}

#[test]
fn a_flow_law_given_as_a_tag_or_a_list_says_what_a_law_is() {
    says(LAW, "  flow: !voce {}", &["YAML tag", "`!voce`", "line 10"]);
    says(
        LAW,
        "  flow: [1, 2]",
        &["material.flow", "a list is not a flow law", "hollomon"],
    );
}

#[test]
fn an_unknown_law_and_a_missing_key_name_the_law_block() {
    says(
        LAW,
        "  flow: {law: vocey}",
        &["`material.flow.law` = vocey: allowed one of", "`voce`"],
    );
    says(
        LAW,
        "  flow: {law: voce, sigma0_mpa: 80}",
        &["material.flow", "`saturation_mpa` is missing"],
    );
}

#[test]
fn an_empty_value_says_none_is_given() {
    says(
        "  friction: 0.05",
        "  friction:",
        &["`dies.friction` = nothing: allowed a number"],
    );
}

#[test]
fn a_multi_megabyte_bad_string_is_cut_not_echoed() {
    // (A 50 MB file is refused by its size: tests/reliability_inputs.rs.)
    let long = "x".repeat(2 * 1024 * 1024);
    let e = message_for("  - exit: 7.0", &format!("  - exit: \"{long}\""));
    assert!(e.len() < 1000, "message of {} bytes", e.len());
    assert!(e.contains("characters)"), "{e}");
}

#[test]
fn an_unknown_key_of_megabytes_is_cut() {
    let long = "k".repeat(2 * 1024 * 1024);
    let e = message_for(
        "  friction: 0.05",
        &format!("  friction: 0.05\n  {long}: 1"),
    );
    assert!(e.len() < 1000, "message of {} bytes", e.len());
}

#[test]
fn check_on_a_csv_says_it_is_not_a_schedule_in_one_line() {
    let o = coldpass(&["check", "schedules-demo/tensile-copper-rod.csv"]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert_eq!(e.lines().count(), 1, "{e}");
    assert!(e.contains("not a schedule file") && e.len() < 400, "{e}");
}

#[test]
fn two_documents_in_one_file_are_explained() {
    says("passes:", "---\npasses:", &["more than one YAML document"]);
}

#[test]
fn alias_repetition_is_refused_in_the_files_words() {
    // Nested aliases ("billion laughs") inside a flow law, which the parser
    // holds whole before it reads the law's keys; it stops them at a
    // hundred times the file's events.
    let mut law = String::from("  flow: {a0: &a0 [1, 1, 1, 1, 1, 1, 1, 1, 1, 1]");
    for i in 1..9 {
        let prev = format!("*a{}", i - 1);
        let list = [prev.as_str(); 10].join(", ");
        law.push_str(&format!(", a{i}: &a{i} [{list}]"));
    }
    law.push_str(", law: voce, sigma0_mpa: 80, saturation_mpa: 470, eps_c: 0.8}");
    let t = std::time::Instant::now();
    says(LAW, &law, &["material.flow", "aliases", "anchors"]);
    assert!(t.elapsed() < std::time::Duration::from_secs(20));
}

#[test]
fn an_alias_to_no_anchor_is_named() {
    says(
        "  friction: 0.05",
        "  friction: *nowhere",
        &["*nowhere", "no anchor"],
    );
}

#[test]
fn a_multi_megabyte_bad_cell_in_a_tensile_record_is_not_echoed_whole() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root("schedules-demo/tensile-copper-rod.csv")).unwrap();
    let mut lines: Vec<String> = text.lines().map(str::to_string).collect();
    let k = lines.len() / 2;
    lines[k] = format!("0.1,{}", "9".repeat(2 * 1024 * 1024) + "x");
    let path = dir.path().join("bad.csv");
    std::fs::write(&path, lines.join("\n")).unwrap();
    let o = coldpass(&["fit", path.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(e.len() < 4000, "message of {} bytes", e.len());
    // The cell is named by its line and column and shown cut short.
    assert!(e.contains("not a number") && e.contains("line "), "{e}");
}

#[test]
fn a_number_key_holding_the_word_sizetext_is_not_taken_for_a_diameter() {
    // Found by the schedule_yaml fuzz target: the classification looked for
    // the internal type name anywhere in the message, the value included.
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root(COPPER)).unwrap();
    let path = dir.path().join("bad.yaml");
    std::fs::write(
        &path,
        text.replacen(
            "wire_temperature_max_c: 150",
            "wire_temperature_max_c: 150SizeText",
            1,
        ),
    )
    .unwrap();
    let o = coldpass(&["check", path.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("limits.wire_temperature_max_c") && e.contains("a number"),
        "{e}"
    );
    assert!(!e.contains("diameter"), "{e}");
}

/// The one shape of a bad-value message (issue 13): `` `key.path` = value:
/// allowed ... ``, the path whole (`dies.friction`, never `dies: `friction``)
/// and "allowed" said once (a bad gauge used to read "is not allowed: is
/// not a known wire gauge").
fn reads_key_value_allowed(from: &str, to: &str, start: &str) {
    let e = message_for(from, to);
    let said = e.split_once("': ").map_or(e.as_str(), |x| x.1);
    assert!(
        said.starts_with(start),
        "{to}: wanted {start:?}, got {said}"
    );
    assert_eq!(e.matches("allowed").count(), 1, "{to}: {e}");
    assert!(!e.contains("is not allowed"), "{to}: {e}");
}

#[test]
fn every_bad_value_reads_key_path_equals_value_allowed() {
    for (from, to, start) in [
        // Ranges checked after reading (they used to print `dies: `friction``).
        (
            "  friction: 0.05",
            "  friction: 5",
            "`dies.friction` = 5: allowed in [0, 0.5]",
        ),
        (
            "  ambient_c: 25",
            "  ambient_c: 9999",
            "`limits.ambient_c` = 9999: allowed in [-50, 100]",
        ),
        (
            "  density_kg_m3: 8940",
            "  density_kg_m3: 5",
            "`material.density_kg_m3` = 5: allowed in [100, 30000]",
        ),
        (
            "  - exit: 6.15",
            "  - exit: 6.15\n    semi_angle_deg: 50",
            "`passes[1].semi_angle_deg` (step 2) = 50: allowed in (0, 45)",
        ),
        // A flow law's parameter, inside its block.
        (
            LAW,
            "  flow: {law: voce, sigma0_mpa: 80, saturation_mpa: 470, eps_c: -0.8}",
            "`material.flow.eps_c` = -0.8: allowed greater than 0",
        ),
        // Gauges and sizes.
        (
            "  - exit: 7.0",
            "  - exit: \"AWG 99\"",
            "`passes[0].exit` = \"AWG 99\": allowed AWG 0000 (4/0) to AWG 56",
        ),
        (
            "  - exit: 7.0",
            "  - exit: \"SWG 51\"",
            "`passes[0].exit` = \"SWG 51\": allowed SWG 7/0 to SWG 50",
        ),
        (
            "  diameter: 8.0",
            "  diameter: seven",
            "`start.diameter` = \"seven\": allowed a number of mm",
        ),
        // Types and names.
        (
            "  method: upper-bound",
            "  method: maxx",
            "`limits.method` = maxx: allowed one of `ideal`",
        ),
        (
            "  friction: 0.05",
            "  friction: [0.05]",
            "`dies.friction` = [0.05]: allowed a number",
        ),
        // Units in values.
        (
            "  ambient_c: 25",
            "  ambient_c: 77 X",
            "`limits.ambient_c` = \"77 X\": `X` is not a unit of a temperature; allowed a number of C, or a number and one of C, F, K",
        ),
        (
            "  block_power_kw: 55",
            "  block_power_kw: 2 kN",
            "`line.block_power_kw` = \"2 kN\": kN is the unit of a force, where a power is needed; allowed a number of kW",
        ),
        (
            "  finish_speed_m_s: 20",
            "  finish_speed_m_s: fast",
            "`line.finish_speed_m_s` = \"fast\": it does not start with a number; allowed a number of m/s, or a number and one of m/s, m/min, ft/min, ft/s",
        ),
    ] {
        reads_key_value_allowed(from, to, start);
    }
}

#[test]
fn a_bad_unit_in_a_machine_file_names_the_key_and_the_units() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root("machines/harrow-lane-dry-7.yaml")).unwrap();
    let path = dir.path().join("m.yaml");
    std::fs::write(
        &path,
        text.replacen("motor_kw: 22,", "motor_kw: 30 hpp,", 1),
    )
    .unwrap();
    let o = coldpass(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--machine",
        path.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(1));
    let e = stderr(&o);
    assert!(
        e.contains("`blocks[0].motor_kw` = \"30 hpp\": `hpp` is not a unit of a power; allowed a number of kW, or a number and one of kW, W, hp, PS"),
        "{e}"
    );
    std::fs::write(&path, text.replacen("motor_kw: 22,", "motor_kw: -3,", 1)).unwrap();
    let o = coldpass(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--machine",
        path.to_str().unwrap(),
    ]);
    let e = stderr(&o);
    assert!(
        e.contains("`blocks[0].motor_kw` (block 1) = -3: allowed in (0, 100000]"),
        "{e}"
    );
}

/// A machine's temperature limit at or below the schedule's ambient would
/// flag every die too hot; it is refused, as the schedule's own limit is,
/// naming the key, the value and the ambient it must exceed, and no report
/// is written.
#[test]
fn a_machine_temperature_limit_below_ambient_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(common::root("machines/harrow-lane-dry-7.yaml")).unwrap();
    let cold = text.replace("wire_temperature_max_c: 150", "wire_temperature_max_c: 20");
    assert_ne!(cold, text, "the demo machine gives a limit");
    let m = dir.path().join("cold.yaml");
    std::fs::write(&m, cold).unwrap();
    let out_file = dir.path().join("report.txt");
    let out = common::coldpass(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--machine",
        m.to_str().unwrap(),
        "-o",
        out_file.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(1));
    let err = common::stderr(&out);
    assert!(
        err.contains("`wire_temperature_max_c` = 20") && err.contains("above the ambient 25 C"),
        "{err}"
    );
    assert!(!out_file.exists(), "no report written");
}

/// A machine file's missing key says what the key holds, and a wrong key
/// lists the keys allowed there, in the schedule messages' words.
#[test]
fn a_machine_file_missing_or_wrong_key_says_what_is_allowed() {
    let dir = tempfile::tempdir().unwrap();
    let cases = [
        (
            "name: x\nkind: slip\nblocks: []\n",
            "the key `cooling_between_dies` is missing: the fraction of the heat",
        ),
        (
            "name: x\nkind: non-slip\ncooling_between_dies: 0.5\nblocks:\n - {capstan_diameter_mm: 400, max_capstan_rpm: 300}\n",
            "blocks[0]: the key `motor_kw` is missing: the motor rating",
        ),
        (
            "name: x\nkind: non-slip\ncooling_between_dies: 0.5\nblocks:\n - {capstan_diameter_mm: 400, motor_kW: 3}\n",
            "unknown field `motor_kW`: the keys here are `capstan_diameter_mm`, `motor_kw`",
        ),
    ];
    for (i, (text, words)) in cases.iter().enumerate() {
        let m = dir.path().join(format!("m{i}.yaml"));
        std::fs::write(&m, text).unwrap();
        let e = refused_on_machine(&m);
        assert!(e.contains(words), "{e}");
    }
}

/// `check` of the steel demo on the machine file `m`: refused as bad input
/// (exit 1), its message returned.
fn refused_on_machine(m: &std::path::Path) -> String {
    let out = coldpass(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--machine",
        m.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(1), "{}", stderr(&out));
    stderr(&out)
}

/// A range for a quantity with a unit shows the unit after the range, and
/// after the value too where the key does not name it (a diameter may be
/// written in inches and is checked in mm). The ranges are those of
/// src/schedule/ranges.rs; the wording is the project's own.
#[test]
fn a_range_message_shows_its_unit() {
    for (from, to, start) in [
        (
            "  diameter: 8.0",
            "  diameter: 0.0001",
            "`start.diameter` = 0.0001 mm: allowed in [0.001, 1000] mm",
        ),
        // 0.00002 in = 0.000508 mm (25.4 mm to the inch, exact by definition).
        (
            "  diameter: 8.0",
            "  diameter: \"0.00002 in\"",
            "`start.diameter` = 0.000508 mm: allowed in [0.001, 1000] mm",
        ),
        (
            "  - exit: 7.0",
            "  - exit: 2000",
            "`passes[0].exit` = 2000 mm: allowed in [0.001, 1000] mm",
        ),
        (
            "  density_kg_m3: 8940",
            "  density_kg_m3: 5",
            "`material.density_kg_m3` = 5: allowed in [100, 30000] kg/m^3",
        ),
        (
            "  ambient_c: 25",
            "  ambient_c: 9999",
            "`limits.ambient_c` = 9999: allowed in [-50, 100] C",
        ),
        (
            "  finish_speed_m_s: 20",
            "  finish_speed_m_s: 900",
            "`line.finish_speed_m_s` = 900: allowed in (0, 500] m/s",
        ),
        (
            "  - exit: 6.15",
            "  - exit: 6.15\n    semi_angle_deg: 50",
            "`passes[1].semi_angle_deg` (step 2) = 50: allowed in (0, 45) deg",
        ),
        (
            "  wire_temperature_max_c: 150",
            "  wire_temperature_max_c: 10",
            "`limits.wire_temperature_max_c` = 10: allowed in (25, 2000] C (above the ambient",
        ),
        // A plain number keeps a plain range.
        (
            "  friction: 0.05",
            "  friction: 5",
            "`dies.friction` = 5: allowed in [0, 0.5]",
        ),
    ] {
        reads_key_value_allowed(from, to, start);
    }
    // The machine file's ranges read the same way.
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root("machines/harrow-lane-dry-7.yaml")).unwrap();
    let path = dir.path().join("m.yaml");
    for (from, to, says) in [
        (
            "motor_kw: 22,",
            "motor_kw: 200000,",
            "`blocks[0].motor_kw` (block 1) = 200000: allowed in (0, 100000] kW",
        ),
        (
            "capstan_diameter_mm: 600,",
            "capstan_diameter_mm: 9000,",
            "`blocks[0].capstan_diameter_mm` (block 1) = 9000: allowed in (0, 5000] mm",
        ),
        // A one-sided rule names the unit too.
        (
            "dancer_back_tension_mpa: 40}",
            "dancer_back_tension_mpa: -5}",
            "`blocks[1].dancer_back_tension_mpa` (block 2) = -5: allowed 0 MPa or greater",
        ),
    ] {
        std::fs::write(&path, text.replacen(from, to, 1)).unwrap();
        let e = refused_on_machine(&path);
        assert!(e.contains(says), "{to}: {e}");
    }
}

/// A record whose header line is long junk (binary read as text) gets a
/// message that names the file and a few shortened headers, not a page of
/// them: 30 headers of 100 characters give 12 of at most 40, "and 18 more".
#[test]
fn a_record_of_long_junk_headers_gets_a_short_message() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("junk.csv");
    let head: Vec<String> = (0..30)
        .map(|i| format!("{i:02}{}", "x".repeat(98)))
        .collect();
    std::fs::write(&p, format!("{}\n1,2\n", head.join(","))).unwrap();
    let o = coldpass(&["fit", p.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let e = stderr(&o);
    assert!(e.len() < 1000, "message of {} bytes: {e}", e.len());
    assert!(e.contains("junk.csv") && e.contains("and 18 more"), "{e}");
    assert!(e.contains(&format!("'00{}...'", "x".repeat(38))), "{e}");
}
