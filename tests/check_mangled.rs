//! No panic on any file: mangled versions of every demo file (truncated,
//! lines dropped, values replaced by absurd ones) must give a result or a
//! clear error, never a panic.

mod common;

use coldpass::evaluation::{evaluate, EvaluateOptions};
use coldpass::schedule;

fn try_file(text: &str) {
    match schedule::parse(text).map(|file| evaluate(&file, &EvaluateOptions::default())) {
        Ok(Ok(rep)) => {
            for p in &rep.passes {
                assert!(p.strain_after.is_finite() && p.flow_stress_exit_mpa.is_finite());
            }
        }
        Ok(Err(e)) | Err(e) => assert!(!e.to_string().is_empty()),
    }
}

#[test]
fn mangled_demo_files_never_panic() {
    let absurd = [
        "-1",
        "0",
        "1e309",
        "-1e-300",
        ".nan",
        ".inf",
        "abc",
        "[]",
        "{}",
        "~",
        "\"AWG 0000\"",
        "99999999",
    ];
    for f in common::demo_schedules() {
        let text = std::fs::read_to_string(&f).unwrap();
        // Truncated at many byte positions (on character boundaries).
        for cut in (0..text.len()).step_by(37) {
            if text.is_char_boundary(cut) {
                try_file(&text[..cut]);
            }
        }
        let lines: Vec<&str> = text.lines().collect();
        for i in 0..lines.len() {
            // One line dropped.
            let mut v = lines.clone();
            v.remove(i);
            try_file(&v.join("\n"));
            // The value on one line replaced by an absurd one.
            if let Some((key, _)) = lines[i].split_once(": ") {
                for a in absurd {
                    let mut v: Vec<String> = lines.iter().map(|s| s.to_string()).collect();
                    v[i] = format!("{key}: {a}");
                    try_file(&v.join("\n"));
                }
            }
        }
    }
}
