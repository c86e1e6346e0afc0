//! Property tests: random bytes and randomly mutated demo files fed to each
//! command's parser, through the library (schedule and design files, the
//! evaluation, the fit) and through the command line (check, design, fit,
//! which also covers the CSV reader of `fit`). Whatever the input: no panic,
//! an exit status in {0, 1, 3}, and an error is one clear line with no
//! internal type name. The coverage-guided targets in fuzz/ go deeper
//! (DEVELOPERS.md, "Fuzzing").

mod common;

use coldpass::evaluation::{evaluate, EvaluateOptions};
use coldpass::fit::{fit_record, DataKind, FitOptions};
use coldpass::schedule;
use proptest::prelude::*;

const INTERNAL: [&str; 6] = [
    "FlowLawSpec",
    "SizeText",
    "u128",
    "untagged enum",
    "tagged enum",
    "YAML tag starting",
];

fn demo(name: &str) -> String {
    std::fs::read_to_string(common::root(name)).unwrap()
}

/// A demo file with a few random edits: bytes replaced, inserted, removed,
/// or a span copied over another place.
fn mutated(text: String) -> impl Strategy<Value = String> {
    let len = text.len();
    prop::collection::vec((0..len.max(1), 0usize..4, any::<u8>(), 0..len.max(1)), 1..6).prop_map(
        move |edits| {
            let mut b = text.clone().into_bytes();
            for (at, kind, byte, other) in edits {
                let at = at.min(b.len().saturating_sub(1));
                match kind {
                    0 if !b.is_empty() => b[at] = byte,
                    1 => b.insert(at, byte),
                    2 if !b.is_empty() => {
                        b.remove(at);
                    }
                    _ => {
                        let other = other.min(b.len());
                        let span: Vec<u8> = b[other..(other + 16).min(b.len())].to_vec();
                        b.splice(at..at, span);
                    }
                }
            }
            String::from_utf8_lossy(&b).into_owned()
        },
    )
}

fn clean_error(e: &str) {
    assert!(!e.is_empty());
    assert!(e.len() < 2000, "message of {} bytes", e.len());
    for w in INTERNAL {
        assert!(!e.contains(w), "internal word {w:?} in {e}");
    }
}

fn parse_and_evaluate(text: &str) {
    match schedule::parse(text) {
        Ok(file) => {
            if !file.passes.is_empty() {
                if let Err(e) = evaluate(&file, &EvaluateOptions::default()) {
                    assert!(!e.to_string().is_empty());
                }
            }
        }
        Err(e) => clean_error(&e.to_string()),
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    #[test]
    fn random_bytes_never_panic_the_schedule_parser(bytes in prop::collection::vec(any::<u8>(), 0..2048)) {
        parse_and_evaluate(&String::from_utf8_lossy(&bytes));
    }

    #[test]
    fn mutated_schedules_never_panic_parser_or_evaluation(text in mutated(demo("schedules-demo/copper-building-wire.yaml"))) {
        parse_and_evaluate(&text);
    }

    #[test]
    fn mutated_design_files_never_panic_the_parser(text in mutated(demo("schedules-demo/design-copper-temper.yaml"))) {
        if let Err(e) = schedule::parse(&text) {
            clean_error(&e.to_string());
        }
    }

    #[test]
    fn random_records_never_panic_the_fit(
        points in prop::collection::vec((-1e3f64..1e3, -1e6f64..1e6), 0..200),
        engineering in any::<bool>(),
    ) {
        let (strain, stress): (Vec<f64>, Vec<f64>) = points.into_iter().unzip();
        let options = FitOptions {
            data: if engineering { DataKind::Engineering } else { DataKind::True },
            shear_modulus_gpa: None,
            reach_strain: None,
            ..FitOptions::default()
        };
        if let Err(e) = fit_record(&strain, &stress, &options) {
            prop_assert!(!e.to_string().is_empty());
        }
    }
}

proptest! {
    // Each case starts the binary: fewer cases.
    #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]

    #[test]
    fn random_bytes_through_each_command_end_cleanly(
        bytes in prop::collection::vec(any::<u8>(), 0..4096),
        command in prop::sample::select(vec!["check", "design", "fit"]),
    ) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("input");
        std::fs::write(&path, &bytes).unwrap();
        through_cli(command, path.to_str().unwrap());
    }

    #[test]
    fn mutated_tensile_records_through_fit_end_cleanly(text in mutated(demo("schedules-demo/tensile-copper-rod.csv"))) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("record.csv");
        std::fs::write(&path, text).unwrap();
        through_cli("fit", path.to_str().unwrap());
    }
}

fn through_cli(command: &str, file: &str) {
    let o = common::coldpass(&[command, file, "--format", "json"]);
    let code = o.status.code();
    assert!(matches!(code, Some(0 | 1 | 3)), "{command}: exit {code:?}");
    let e = common::stderr(&o);
    assert!(!e.contains("panicked"), "{command}: {e}");
    if code == Some(1) {
        assert!(e.starts_with("Error: "), "{command}: {e}");
        clean_error(&e);
    } else {
        let out = common::stdout(&o);
        assert!(
            !out.contains("Infinity") && !out.contains("NaN"),
            "{command}: {out}"
        );
    }
}
