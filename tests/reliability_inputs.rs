//! Regression tests for unbounded work on hostile input (issue 15): devices,
//! endless or oversized files and deep nesting end quickly with a clear error.
//! The limits are the project's own (README, "Limits"); no outside reference.

mod common;

use std::path::Path;
use std::time::{Duration, Instant};

use common::{coldpass, stderr};

const COPPER: &str = "schedules-demo/copper-building-wire.yaml";
const DESIGN: &str = "schedules-demo/design-copper-temper.yaml";
const TENSILE: &str = "schedules-demo/tensile-copper-rod.csv";

/// A wall-clock bound far above what the check needs (milliseconds), far
/// below what the old code took (seconds to never): not a speed target, a
/// guard against endless reads.
const PROMPT: Duration = Duration::from_secs(20);

fn fails_promptly(args: &[&str], words: &[&str]) {
    let t = Instant::now();
    let o = coldpass(args);
    assert!(t.elapsed() < PROMPT, "{args:?} took {:?}", t.elapsed());
    assert_eq!(o.status.code(), Some(1), "{args:?}: {}", stderr(&o));
    let e = stderr(&o);
    for w in words {
        assert!(e.contains(w), "{args:?}: missing {w:?} in {e}");
    }
    assert_eq!(e.lines().count(), 1, "one line: {e}");
}

#[test]
fn check_of_dev_zero_ends_at_once_saying_it_is_not_text() {
    if Path::new("/dev/zero").exists() {
        fails_promptly(&["check", "/dev/zero"], &["/dev/zero", "not text"]);
    }
}

#[test]
fn check_design_and_fit_of_dev_urandom_end_at_once() {
    if !Path::new("/dev/urandom").exists() {
        return;
    }
    fails_promptly(&["check", "/dev/urandom"], &["/dev/urandom", "not text"]);
    fails_promptly(&["design", "/dev/urandom"], &["/dev/urandom", "not text"]);
    // fit reads its record through the same bounded reader (commands/fit.rs).
    // fit streams a record (up to 1 GiB) from a regular file only.
    fails_promptly(
        &["fit", "/dev/urandom"],
        &["/dev/urandom", "not a regular file"],
    );
}

#[test]
fn a_file_over_sixteen_mib_is_refused_before_it_is_read() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("huge.yaml");
    let f = std::fs::File::create(&path).unwrap();
    // A sparse file: its size is what is checked, nothing is read.
    f.set_len(16 * 1024 * 1024 + 1).unwrap();
    let p = path.to_str().unwrap();
    fails_promptly(&["check", p], &["16777217 bytes", "at most 16777216 bytes"]);
}

#[test]
fn an_endless_stream_is_cut_at_sixteen_mib() {
    // `yes`-like text through a pipe has no size to check beforehand.
    let dir = tempfile::tempdir().unwrap();
    let fifo = dir.path().join("endless.yaml");
    if std::process::Command::new("mkfifo")
        .arg(&fifo)
        .status()
        .map_or(true, |s| !s.success())
    {
        return;
    }
    let writer_path = fifo.clone();
    let writer = std::thread::spawn(move || {
        use std::io::Write;
        if let Ok(mut f) = std::fs::OpenOptions::new().write(true).open(&writer_path) {
            let block = "title: x\n".repeat(1024);
            while f.write_all(block.as_bytes()).is_ok() {}
        }
    });
    fails_promptly(
        &["check", fifo.to_str().unwrap()],
        &["more than 16777216 bytes"],
    );
    writer.join().unwrap();
}

#[test]
fn a_folder_given_as_the_file_is_named_as_a_folder() {
    // `check FOLDER` is the catalogue (tests/ux_cli.rs); design takes one file.
    fails_promptly(&["design", "schedules-demo"], &["is a folder"]);
}

#[test]
fn a_title_of_100000_nested_brackets_is_refused_before_parsing() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(common::root(COPPER)).unwrap();
    let deep = format!("title: {}{}", "[".repeat(100_000), "]".repeat(100_000));
    let text: String = text
        .lines()
        .map(|l| {
            if l.starts_with("title:") {
                deep.clone()
            } else {
                l.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join("\n");
    let path = dir.path().join("deep.yaml");
    std::fs::write(&path, text).unwrap();
    fails_promptly(
        &["check", path.to_str().unwrap()],
        &["nested more than 32 levels", "line 5"],
    );
}

#[test]
fn deep_block_nesting_by_dashes_is_refused_before_parsing() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("dashes.yaml");
    std::fs::write(&path, format!("passes:\n  {}x\n", "- ".repeat(100_000))).unwrap();
    fails_promptly(
        &["design", path.to_str().unwrap()],
        &["nested more than 32 levels"],
    );
}

#[test]
fn the_demo_inputs_still_read() {
    for args in [
        vec!["check", COPPER],
        vec!["design", DESIGN],
        vec!["fit", TENSILE],
    ] {
        let o = coldpass(&args);
        assert_eq!(o.status.code(), Some(0), "{args:?}: {}", stderr(&o));
    }
}
