//! The one helper CLI tests go through.
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::Output;

use assert_cmd::Command;

/// Path of a file under the crate root.
pub fn root(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(rel)
}

/// Runs `coldpass` with `args` from the crate root and returns its output.
pub fn coldpass(args: &[&str]) -> Output {
    Command::cargo_bin("coldpass")
        .expect("the coldpass binary is built for tests")
        .current_dir(root(""))
        .args(args)
        .output()
        .expect("coldpass runs")
}

/// Standard output as text.
pub fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

/// Standard error as text.
pub fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

/// The demo schedule files (the YAML files under schedules-demo/ with a
/// top-level `passes:` list), sorted by name.
pub fn demo_schedules() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(root("schedules-demo"))
        .expect("schedules-demo/ exists")
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "yaml"))
        .filter(|p| {
            let text = std::fs::read_to_string(p).unwrap();
            text.lines().any(|l| l.starts_with("passes:"))
        })
        .collect();
    v.sort();
    v
}

/// Standard output parsed as JSON; a panic that shows both streams if it is not.
pub fn json(o: &Output) -> serde_json::Value {
    serde_json::from_slice(&o.stdout).unwrap_or_else(|e| {
        panic!(
            "not JSON ({e}): {}{}",
            String::from_utf8_lossy(&o.stdout),
            String::from_utf8_lossy(&o.stderr)
        )
    })
}
