//! Help and shell: `--help` lists the allowed values and the exit codes;
//! completions and the man page come from the same definitions; `init`
//! writes starter files that check clean and never overwrites one.

mod common;

use assert_cmd::Command;
use common::{coldpass, stderr, stdout};

#[test]
fn help_lists_the_methods_formats_units_and_exit_codes() {
    let top = stdout(&coldpass(&["--help"]));
    for code in [
        "0  every figure",
        "1  bad input",
        "2  bad usage",
        "3  a checked schedule",
    ] {
        assert!(top.contains(code), "{code} missing:\n{top}");
    }
    let check = stdout(&coldpass(&["check", "--help"]));
    assert!(
        check.contains("3  a checked schedule"),
        "check --help gives the exit codes"
    );
    for value in [
        "ideal",
        "efficiency",
        "sachs",
        "siebel",
        "redundant",
        "upper-bound",
        "max",
    ] {
        assert!(check.contains(value), "method {value} missing:\n{check}");
    }
    for value in ["table", "json", "yaml", "csv", "html", "si", "us"] {
        assert!(check.contains(value), "{value} missing:\n{check}");
    }
    let bad = coldpass(&[
        "check",
        "schedules-demo/stainless-spring.yaml",
        "--method",
        "slab",
    ]);
    assert_eq!(bad.status.code(), Some(2));
    assert!(stderr(&bad).contains("upper-bound"), "{}", stderr(&bad));
}

#[test]
fn completions_name_every_subcommand_and_option() {
    for shell in ["bash", "zsh", "fish", "elvish", "powershell"] {
        let out = coldpass(&["completions", shell]);
        assert_eq!(out.status.code(), Some(0), "{shell}");
        let text = stdout(&out);
        for word in [
            "check", "design", "fit", "compare", "init", "method", "units",
        ] {
            assert!(text.contains(word), "{shell}: {word} missing");
        }
        // The shells that complete values offer the method names.
        if ["bash", "zsh", "fish"].contains(&shell) {
            assert!(
                text.contains("upper-bound"),
                "{shell}: method values missing"
            );
        }
    }
    assert_eq!(coldpass(&["completions", "tcsh"]).status.code(), Some(2));
}

#[test]
fn the_man_page_is_roff_with_every_subcommand() {
    let text = stdout(&coldpass(&["man"]));
    assert!(
        text.starts_with(".ie") || text.contains(".TH coldpass"),
        "{}",
        &text[..200.min(text.len())]
    );
    for sub in [
        "coldpass-check",
        "coldpass-design",
        "coldpass-compare",
        "coldpass-fit",
    ] {
        assert!(text.contains(&format!(".TH {sub}")), "{sub} missing");
    }
    assert!(text.contains("Exit status"));
}

#[test]
fn init_writes_starters_that_check_clean_and_never_overwrites() {
    let dir = tempfile::tempdir().unwrap();
    let run = |args: &[&str]| {
        Command::cargo_bin("coldpass")
            .unwrap()
            .current_dir(dir.path())
            .args(args)
            .output()
            .unwrap()
    };
    assert_eq!(run(&["init", "schedule"]).status.code(), Some(0));
    let check = run(&["check", "schedule.yaml", "--format", "json"]);
    assert_eq!(check.status.code(), Some(0), "{}", stderr(&check));
    let j: serde_json::Value = serde_json::from_slice(&check.stdout).unwrap();
    assert_eq!(
        j["summary"]["verdict"], "ok",
        "the starter is clean, not just within limits"
    );

    assert_eq!(run(&["init", "design", "d.yaml"]).status.code(), Some(0));
    let design = run(&["design", "d.yaml", "--format", "json"]);
    assert_eq!(design.status.code(), Some(0), "{}", stderr(&design));

    // A second init refuses, naming the file, and leaves it as it was.
    std::fs::write(dir.path().join("schedule.yaml"), "mine").unwrap();
    let again = run(&["init", "schedule"]);
    assert_eq!(again.status.code(), Some(1));
    assert!(
        stderr(&again).contains("'schedule.yaml' already exists"),
        "{}",
        stderr(&again)
    );
    assert_eq!(
        std::fs::read_to_string(dir.path().join("schedule.yaml")).unwrap(),
        "mine"
    );
}
