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
        "0    every figure",
        "1    bad input",
        "2    bad usage",
        "3    a checked schedule",
        "130  stopped",
    ] {
        assert!(top.contains(code), "{code} missing:\n{top}");
    }
    let check = stdout(&coldpass(&["check", "--help"]));
    assert!(
        check.contains("3    a pass over a limit"),
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

/// Every subcommand's `--help` ends with its own exit codes, each code the
/// command can return (risk's 3 is a target missed, not a limit; design has
/// no 3; init's 1 is an existing file).
#[test]
fn every_subcommand_help_gives_its_own_exit_codes() {
    let cases: &[(&str, &[&str])] = &[
        (
            "check",
            &[
                "0    every pass",
                "1    bad input",
                "2    bad usage",
                "3    a pass over",
                "130  stopped",
            ],
        ),
        (
            "design",
            &[
                "0    a design",
                "1    bad input, or no design",
                "130  stopped",
            ],
        ),
        (
            "fit",
            &[
                "0    the record was fitted",
                "1    bad input",
                "130  stopped",
            ],
        ),
        (
            "compare",
            &["0    both files", "1    bad input", "130  stopped"],
        ),
        (
            "risk",
            &[
                "0    done",
                "3    the schedule's break probability",
                "130  stopped",
            ],
        ),
        ("init", &["0    written", "1    the file exists already"]),
        ("completions", &["0    printed", "2    bad usage"]),
        ("man", &["0    printed", "2    bad usage"]),
    ];
    for (sub, codes) in cases {
        let help = stdout(&coldpass(&[sub, "--help"]));
        assert!(help.contains("Exit status:"), "{sub}:\n{help}");
        for code in *codes {
            assert!(help.contains(code), "{sub}: {code} missing:\n{help}");
        }
        if *sub == "design" {
            assert!(!help.contains("\n  3 "), "design never exits 3:\n{help}");
        }
    }
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

    // The starter machine runs the starter schedule clean at its finish speed.
    assert_eq!(run(&["init", "machine"]).status.code(), Some(0));
    let on = run(&[
        "check",
        "schedule.yaml",
        "--machine",
        "machine.yaml",
        "--format",
        "json",
    ]);
    assert_eq!(on.status.code(), Some(0), "{}", stderr(&on));
    let j: serde_json::Value = serde_json::from_slice(&on.stdout).unwrap();
    assert_eq!(j["summary"]["verdict"], "ok");
    let fast = j["summary"]["attainable_speed_m_s"].as_f64().unwrap();
    assert!(fast >= 10.0, "the starter's 10 m/s is attainable: {fast}");

    assert_eq!(run(&["init", "design", "d.yaml"]).status.code(), Some(0));
    let design = run(&["design", "d.yaml", "--format", "json"]);
    assert_eq!(design.status.code(), Some(0), "{}", stderr(&design));
    let j: serde_json::Value = serde_json::from_slice(&design.stdout).unwrap();
    assert_eq!(
        j["schedule"]["summary"]["verdict"], "ok",
        "the starter design is clean too, not just within limits: {}",
        j["schedule"]["passes"]
    );

    // A folder gets the starter under its default name.
    std::fs::create_dir(dir.path().join("starters")).unwrap();
    assert_eq!(run(&["init", "machine", "starters"]).status.code(), Some(0));
    assert!(dir.path().join("starters/machine.yaml").is_file());

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
