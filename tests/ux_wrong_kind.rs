//! A file given to the wrong command is named for what it is, by the
//! command actually run, with what that command reads and where the file
//! goes instead (one line, exit 1). The wording is the project's own.

mod common;

use common::{coldpass, stderr};

const RECORD: &str = "schedules-demo/tensile-copper-rod.csv";

/// One line, exit 1, and every one of `words`.
fn says(args: &[&str], words: &[&str]) -> String {
    let o = coldpass(args);
    let e = stderr(&o);
    assert_eq!(o.status.code(), Some(1), "{args:?}: {e}");
    assert_eq!(e.trim_end().lines().count(), 1, "{args:?}: one line: {e}");
    for w in words {
        assert!(e.contains(w), "{args:?}: missing {w:?} in {e}");
    }
    e
}

#[test]
fn a_csv_file_is_refused_by_the_command_that_was_run() {
    for (args, not, reads) in [
        (
            vec!["check", RECORD],
            "not a schedule file:",
            "coldpass check reads a schedule file in YAML",
        ),
        (
            vec!["design", RECORD],
            "not a design file:",
            "coldpass design reads a design file in YAML",
        ),
        (
            vec!["risk", RECORD],
            "not a schedule or design file:",
            "coldpass risk reads a schedule or design file in YAML with a `scatter:` block",
        ),
        (
            vec![
                "compare",
                "schedules-demo/copper-building-wire.yaml",
                RECORD,
            ],
            "not a schedule or design file:",
            "coldpass compare reads two schedule or design files in YAML",
        ),
        (
            vec![
                "compare",
                RECORD,
                "schedules-demo/copper-building-wire.yaml",
            ],
            "not a schedule or design file:",
            "coldpass compare reads two schedule or design files in YAML",
        ),
    ] {
        let e = says(
            &args,
            &[
                "tensile-copper-rod.csv",
                "looks like a CSV table",
                not,
                reads,
                "coldpass fit",
            ],
        );
        // No other command is spoken of as the reader.
        assert!(!e.contains("check and design read"), "{e}");
    }
}

#[test]
fn fit_given_a_yaml_file_names_it_and_what_fit_reads() {
    for (file, what, goes) in [
        (
            "schedules-demo/copper-building-wire.yaml",
            "looks like a schedule file (YAML, with `passes:`)",
            "coldpass check FILE",
        ),
        (
            "schedules-demo/design-steel-ratio.yaml",
            "looks like a design file (YAML, with `target:`)",
            "coldpass design FILE",
        ),
        (
            "machines/harrow-lane-dry-7.yaml",
            "looks like a machine file",
            "--machine FILE",
        ),
    ] {
        let e = says(
            &["fit", file],
            &[
                file,
                what,
                "not a tensile record",
                "coldpass fit reads a tensile record as CSV",
                goes,
            ],
        );
        // The message is about the kind of file, not a missing column.
        assert!(!e.contains("no column header"), "{e}");
    }
}

#[test]
fn fit_given_a_schedule_under_another_name_still_knows_it() {
    // Told by its first line (`title: ...`), not by its name.
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("mill.txt");
    std::fs::copy(common::root("schedules-demo/copper-building-wire.yaml"), &p).unwrap();
    says(
        &["fit", p.to_str().unwrap()],
        &[
            "mill.txt",
            "looks like a schedule file",
            "not a tensile record",
        ],
    );
    // A CSV named .yaml is told its name, and what fit found in it.
    let q = dir.path().join("record.yaml");
    std::fs::write(&q, "a,b\n1,2\n").unwrap();
    says(
        &["fit", q.to_str().unwrap()],
        &[
            "is named as a YAML file",
            "reads a tensile record as CSV",
            "'a', 'b'",
        ],
    );
}

#[test]
fn a_record_with_units_after_colons_in_its_header_is_still_read() {
    // `strain: fraction,stress: MPa` is one `key:` line, then numbers: a
    // header row, not a YAML file.
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("r.csv");
    let text = std::fs::read_to_string(common::root(RECORD)).unwrap();
    let body: Vec<&str> = text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
        .skip(1)
        .collect();
    std::fs::write(
        &p,
        format!("strain: fraction,stress: MPa\n{}\n", body.join("\n")),
    )
    .unwrap();
    let o = coldpass(&["fit", p.to_str().unwrap(), "--format", "json"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}
