//! Regression tests: outputs never clobber an input, another output, a
//! device, a read-only file or a hard link; side outputs wait for the whole
//! run; a closed pipe keeps the verdict; a signal leaves no temporary file
//! (issue 15). The behaviour is the project's own choice, documented in
//! src/output.rs and the README ("Limits"); no outside reference.

mod common;

use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};

use common::{coldpass, root, stderr};

const COPPER: &str = "schedules-demo/copper-building-wire.yaml";
const OVER: &str = "schedules-demo/copper-rod-breakdown-over.yaml";
const DESIGN: &str = "schedules-demo/design-copper-temper.yaml";
const TENSILE: &str = "schedules-demo/tensile-copper-rod.csv";

fn copy(dir: &tempfile::TempDir, demo: &str, name: &str) -> PathBuf {
    let p = dir.path().join(name);
    fs::copy(root(demo), &p).unwrap();
    p
}

fn s(p: &Path) -> &str {
    p.to_str().unwrap()
}

fn fails(args: &[&str], words: &[&str]) {
    let o = coldpass(args);
    assert_eq!(o.status.code(), Some(1), "{args:?}: {}", stderr(&o));
    let e = stderr(&o);
    for w in words {
        assert!(e.contains(w), "{args:?}: missing {w:?} in {e}");
    }
}

fn no_temporaries(dir: &Path) {
    let left: Vec<_> = fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".tmp"))
        .collect();
    assert!(left.is_empty(), "temporary files left: {left:?}");
}

#[test]
fn check_with_o_onto_its_input_refuses_and_keeps_the_input() {
    let dir = tempfile::tempdir().unwrap();
    let input = copy(&dir, COPPER, "s.yaml");
    let before = fs::read(&input).unwrap();
    fails(
        &["check", s(&input), "-o", s(&input)],
        &["is the input file"],
    );
    // The same file by another spelling.
    let other = format!("{}/./s.yaml", dir.path().display());
    fails(&["check", s(&input), "-o", &other], &["is the input file"]);
    assert_eq!(fs::read(&input).unwrap(), before);
}

#[test]
fn fit_with_o_onto_its_record_refuses_and_keeps_the_record() {
    let dir = tempfile::tempdir().unwrap();
    let input = copy(&dir, TENSILE, "a.csv");
    let before = fs::read(&input).unwrap();
    fails(&["fit", s(&input), "-o", s(&input)], &["is the input file"]);
    assert_eq!(fs::read(&input).unwrap(), before);
}

#[test]
fn design_emitting_its_schedule_onto_the_design_file_refuses() {
    let dir = tempfile::tempdir().unwrap();
    let input = copy(&dir, DESIGN, "d.yaml");
    let before = fs::read(&input).unwrap();
    fails(
        &["design", s(&input), "--emit-schedule", s(&input)],
        &["--emit-schedule", "is the input file"],
    );
    assert_eq!(fs::read(&input).unwrap(), before);
}

#[test]
fn plot_and_report_onto_the_same_file_refuse_and_write_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("r.svg");
    fails(
        &["check", COPPER, "--plot", s(&out), "-o", s(&out)],
        &["also the file for --plot"],
    );
    assert!(!out.exists());
}

#[test]
fn side_outputs_are_not_written_when_the_report_cannot_be() {
    let dir = tempfile::tempdir().unwrap();
    let plot = dir.path().join("p.svg");
    let bad = dir.path().join("nodir").join("r.txt");
    fails(
        &["check", COPPER, "--plot", s(&plot), "-o", s(&bad)],
        &["does not exist"],
    );
    assert!(!plot.exists(), "check wrote its chart");
    let emit = dir.path().join("e.yaml");
    fails(
        &[
            "design",
            DESIGN,
            "--plot",
            s(&plot),
            "--emit-schedule",
            s(&emit),
            "-o",
            s(&bad),
        ],
        &["does not exist"],
    );
    assert!(
        !plot.exists() && !emit.exists(),
        "design wrote side outputs"
    );
    let law = dir.path().join("law.yaml");
    fails(
        &[
            "fit",
            TENSILE,
            "--plot",
            s(&plot),
            "--emit-law",
            s(&law),
            "-o",
            s(&bad),
        ],
        &["does not exist"],
    );
    assert!(!plot.exists() && !law.exists(), "fit wrote side outputs");
    no_temporaries(dir.path());
}

#[test]
fn a_device_given_to_o_is_refused_and_left_a_device() {
    for dev in ["/dev/null", "/dev/stdout"] {
        if !Path::new(dev).exists() {
            continue;
        }
        let before = fs::symlink_metadata(dev).unwrap().file_type();
        fails(&["check", COPPER, "-o", dev], &[dev, "regular files only"]);
        assert_eq!(fs::symlink_metadata(dev).unwrap().file_type(), before);
    }
}

#[test]
fn a_read_only_file_is_not_replaced() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("ro.txt");
    fs::write(&out, "keep me").unwrap();
    let mut perm = fs::metadata(&out).unwrap().permissions();
    perm.set_readonly(true);
    fs::set_permissions(&out, perm).unwrap();
    fails(&["check", COPPER, "-o", s(&out)], &["read-only"]);
    assert_eq!(fs::read_to_string(&out).unwrap(), "keep me");
}

#[cfg(unix)]
#[test]
fn a_hard_linked_file_is_refused_so_the_link_is_not_broken() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("a.txt");
    let b = dir.path().join("b.txt");
    fs::write(&a, "old").unwrap();
    fs::hard_link(&a, &b).unwrap();
    fails(&["check", COPPER, "-o", s(&b)], &["2 hard links"]);
    assert_eq!(fs::read_to_string(&a).unwrap(), "old");
    assert_eq!(fs::read_to_string(&b).unwrap(), "old");
}

#[cfg(unix)]
#[test]
fn a_symlink_is_written_through_to_its_file_and_stays_a_link() {
    let dir = tempfile::tempdir().unwrap();
    let real = dir.path().join("real.txt");
    let link = dir.path().join("link.txt");
    fs::write(&real, "old").unwrap();
    std::os::unix::fs::symlink(&real, &link).unwrap();
    let o = coldpass(&["check", COPPER, "-o", s(&link)]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(fs::symlink_metadata(&link)
        .unwrap()
        .file_type()
        .is_symlink());
    assert!(fs::read_to_string(&real).unwrap().contains("Caution"));
    no_temporaries(dir.path());
}

#[cfg(unix)]
#[test]
fn a_dangling_symlink_is_refused_and_left_dangling() {
    let dir = tempfile::tempdir().unwrap();
    let link = dir.path().join("dangling.txt");
    std::os::unix::fs::symlink(dir.path().join("nowhere.txt"), &link).unwrap();
    fails(
        &["check", COPPER, "-o", s(&link)],
        &["symbolic link", "does not exist"],
    );
    assert!(fs::symlink_metadata(&link)
        .unwrap()
        .file_type()
        .is_symlink());
    assert!(!dir.path().join("nowhere.txt").exists());
}

#[cfg(unix)]
#[test]
fn a_symlink_to_the_input_is_the_input() {
    let dir = tempfile::tempdir().unwrap();
    let input = copy(&dir, COPPER, "s.yaml");
    let link = dir.path().join("l.yaml");
    std::os::unix::fs::symlink(&input, &link).unwrap();
    fails(
        &["check", s(&input), "-o", s(&link)],
        &["is the input file"],
    );
}

#[test]
fn a_closed_pipe_keeps_the_over_limit_status_3() {
    for _ in 0..10 {
        let mut child = Command::new(env!("CARGO_BIN_EXE_coldpass"))
            .current_dir(root(""))
            .args(["check", OVER, "--format", "json"])
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .unwrap();
        drop(child.stdout.take());
        let o = child.wait_with_output().unwrap();
        assert_eq!(
            o.status.code(),
            Some(3),
            "{}",
            String::from_utf8_lossy(&o.stderr)
        );
    }
}

#[cfg(unix)]
#[test]
fn sigterm_and_sigint_leave_no_temporary_file_behind() {
    // A big report (a 4 MB title on every CSV row) keeps the run busy long
    // enough for the signal to land during the parse, render or write.
    let dir = tempfile::tempdir().unwrap();
    let text = fs::read_to_string(root(COPPER)).unwrap();
    let title = format!("title: \"{}\"", "ab ".repeat(1_400_000));
    let text: String = text
        .lines()
        .map(|l| {
            if l.starts_with("title:") {
                title.clone()
            } else {
                l.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join("\n");
    let input = dir.path().join("big.yaml");
    fs::write(&input, text).unwrap();
    let out = dir.path().join("out.csv");
    for (signal, delay_ms) in [("TERM", 50), ("INT", 200), ("TERM", 400), ("INT", 800)] {
        let mut child = Command::new(env!("CARGO_BIN_EXE_coldpass"))
            .args(["check", s(&input), "--format", "csv", "-o", s(&out)])
            .stderr(Stdio::null())
            .spawn()
            .unwrap();
        std::thread::sleep(std::time::Duration::from_millis(delay_ms));
        let _ = Command::new("kill")
            .args([&format!("-{signal}"), &child.id().to_string()])
            .status();
        let status = child.wait().unwrap();
        // Either the signal arrived (130) or the run had already finished (0).
        assert!(matches!(status.code(), Some(130) | Some(0)), "{status:?}");
        no_temporaries(dir.path());
    }
}
