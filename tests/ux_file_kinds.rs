//! An option that writes a file of one fixed kind refuses a name with
//! another extension as bad usage (exit 2, as clap refuses other bad
//! values), naming the option, the value and the allowed extensions, and
//! writes nothing. The rule is the project's own (a `.txt` name holding
//! YAML, or a `.json` name holding CSV, misleads whoever opens it).

mod common;

use std::path::Path;

use common::{coldpass, stderr};

/// Runs `args` (in a fresh folder, the output names relative to it) and
/// checks the refusal: exit 2, the message's words, and an empty folder.
fn refused(args: &[&str], words: &[&str]) {
    let dir = tempfile::tempdir().unwrap();
    let args: Vec<String> = args
        .iter()
        .map(|a| a.replace("{dir}", dir.path().to_str().unwrap()))
        .collect();
    let args: Vec<&str> = args.iter().map(String::as_str).collect();
    let o = coldpass(&args);
    let e = stderr(&o);
    assert_eq!(o.status.code(), Some(2), "{args:?}: {e}");
    for w in words {
        assert!(e.contains(w), "{args:?}: missing {w:?} in {e}");
    }
    let left: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
    assert!(left.is_empty(), "{args:?}: wrote {left:?}");
}

#[test]
fn emit_schedule_takes_yaml_names_only() {
    refused(
        &[
            "design",
            "schedules-demo/design-steel-ratio.yaml",
            "--emit-schedule",
            "{dir}/out.txt",
            "-o",
            "{dir}/report.txt",
        ],
        &["--emit-schedule", "out.txt", ".yaml or .yml"],
    );
}

#[test]
fn keep_samples_takes_csv_names_only() {
    refused(
        &[
            "risk",
            "schedules-demo/steel-multiblock-scatter.yaml",
            "--samples",
            "50",
            "--keep-samples",
            "{dir}/samples.json",
            "-o",
            "{dir}/report.txt",
        ],
        &["--keep-samples", "samples.json", ".csv"],
    );
}

#[test]
fn emit_law_takes_yaml_names_only() {
    refused(
        &[
            "fit",
            "schedules-demo/tensile-copper-rod.csv",
            "--emit-law",
            "{dir}/law.json",
        ],
        &["--emit-law", "law.json", ".yaml or .yml"],
    );
}

#[test]
fn init_takes_a_yaml_name_or_a_folder() {
    refused(
        &["init", "schedule", "{dir}/start.txt"],
        &["start.txt", ".yaml or .yml", "existing folder"],
    );
    // A name without an extension that is not a folder is refused too.
    refused(
        &["init", "machine", "{dir}/machine"],
        &["machine", ".yaml or .yml"],
    );
}

#[test]
fn the_allowed_extensions_are_taken_in_any_case() {
    let dir = tempfile::tempdir().unwrap();
    let at = |n: &str| dir.path().join(n).to_str().unwrap().to_string();
    let (emitted, samples, law, starter) =
        (at("e.YML"), at("s.CSV"), at("law.Yaml"), at("start.yml"));
    let ok = |args: &[&str]| {
        let o = coldpass(args);
        assert!(
            matches!(o.status.code(), Some(0) | Some(3)),
            "{args:?}: {}",
            stderr(&o)
        );
    };
    ok(&[
        "design",
        "schedules-demo/design-steel-ratio.yaml",
        "--emit-schedule",
        &emitted,
    ]);
    ok(&[
        "risk",
        "schedules-demo/steel-multiblock-scatter.yaml",
        "--samples",
        "50",
        "--keep-samples",
        &samples,
    ]);
    ok(&[
        "fit",
        "schedules-demo/tensile-copper-rod.csv",
        "--emit-law",
        &law,
    ]);
    ok(&["init", "design", &starter]);
    for p in [&emitted, &samples, &law, &starter] {
        assert!(Path::new(p).exists(), "{p} written");
    }
}
