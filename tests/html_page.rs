//! The report page through the binary, without a browser: check, design and
//! fit each write one self-contained page (no outside file or script) with
//! the summary before the passes, every step a row, the chart inline, the
//! caution last; user text is escaped; US units name theirs.

mod common;

use common::{coldpass, stdout};

fn page(args: &[&str]) -> String {
    let out = coldpass(args);
    assert!(
        matches!(out.status.code(), Some(0 | 3)),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    stdout(&out)
}

fn self_contained(html: &str) {
    assert!(html.starts_with("<!DOCTYPE html>"));
    assert!(!html.contains("<script"), "no script");
    assert!(!html.contains("<link"), "no outside stylesheet");
    assert!(!html.contains("src=\"http"), "no outside file");
    assert!(html.contains("<svg"), "the chart is inline");
    assert!(html.contains("@media print"), "print stylesheet");
    let caution = html.rfind("Caution: ").expect("caution");
    assert!(
        caution > html.rfind("</table>").unwrap(),
        "caution after the tables"
    );
}

#[test]
fn check_page_puts_the_summary_first_and_every_step_in_the_pass_table() {
    let path = "schedules-demo/copper-rod-breakdown-over.yaml";
    // Over by the conservative envelope (see check_cli), so both markings show.
    let html = page(&["check", path, "--method", "max", "--format", "html"]);
    self_contained(&html);
    let json: serde_json::Value = serde_json::from_str(&stdout(&coldpass(&[
        "check", path, "--method", "max", "--format", "json",
    ])))
    .unwrap();
    assert!(html.find("Summary").unwrap() < html.find("<table class=\"passes\">").unwrap());
    let passes = html.split("<table class=\"passes\">").nth(1).unwrap();
    let passes = passes.split("</table>").next().unwrap();
    let steps = json["passes"].as_array().unwrap();
    assert_eq!(passes.matches("<tr class=").count(), steps.len());
    // Each flagged pass says so in words: OVER when a flag is over a limit, else WARN.
    let over_flags = [
        "over-draw-limit",
        "anneal-due",
        "too-hot",
        "over-block-power",
        "back-tension-over-yield",
    ];
    let (mut over, mut warn) = (0, 0);
    for step in steps {
        let flags: Vec<&str> = step["flags"]
            .as_array()
            .map(|a| a.iter().filter_map(|f| f.as_str()).collect())
            .unwrap_or_default();
        if flags.iter().any(|f| over_flags.contains(f)) {
            over += 1;
        } else if !flags.is_empty() {
            warn += 1;
        }
    }
    assert!(over > 0, "the demo is over on purpose");
    assert_eq!(passes.matches(">OVER</td>").count(), over, "{passes}");
    assert_eq!(passes.matches(">WARN</td>").count(), warn, "{passes}");
    let title = json["title"].as_str().unwrap();
    assert!(html.contains(&format!("<h1>{title}</h1>")));
}

#[test]
fn a_title_with_markup_is_escaped() {
    let dir = tempfile::tempdir().unwrap();
    let text =
        std::fs::read_to_string(common::root("schedules-demo/stainless-spring.yaml")).unwrap();
    let text = text
        .lines()
        .map(|l| {
            if l.starts_with("title:") {
                r#"title: "<script>alert('x')</script> & <b>bold</b>""#.to_string()
            } else {
                l.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join("\n");
    let p = dir.path().join("s.yaml");
    std::fs::write(&p, text).unwrap();
    let html = page(&["check", p.to_str().unwrap(), "--format", "html"]);
    assert!(!html.contains("<script"), "the title's script is markup");
    assert!(!html.contains("<b>bold"), "the title's markup is markup");
    assert!(html.contains("&lt;script&gt;alert('x')&lt;/script&gt; &amp; &lt;b&gt;bold&lt;/b&gt;"));
}

#[test]
fn design_page_shows_the_runs_and_the_anneals() {
    let html = page(&[
        "design",
        "schedules-demo/design-copper-temper.yaml",
        "--format",
        "html",
    ]);
    self_contained(&html);
    assert!(html.contains("Schedule design"));
    assert!(html.contains("Runs between anneals"));
}

#[test]
fn fit_page_shows_every_law() {
    let out = coldpass(&[
        "fit",
        "schedules-demo/tensile-copper-rod.csv",
        "--format",
        "html",
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let html = stdout(&out);
    self_contained(&html);
    for law in ["hollomon", "ludwik", "swift", "voce"] {
        assert!(html.contains(&format!("<td>{law}")), "{law} missing");
    }
}

#[test]
fn us_units_on_the_page_name_theirs() {
    let html = page(&[
        "check",
        "schedules-demo/copper-building-wire.yaml",
        "--format",
        "html",
        "--units",
        "us",
    ]);
    for h in [
        "<th>exit in</th>",
        "<th>exit flow ksi</th>",
        "<th>force lbf</th>",
        "<th>power hp</th>",
        "<th>wire temperature F</th>",
    ] {
        assert!(html.contains(h), "{h} missing");
    }
}

#[test]
fn a_schedule_on_a_machine_names_the_machine_under_the_title() {
    let html = page(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--format",
        "html",
    ]);
    let json: serde_json::Value = serde_json::from_str(&stdout(&coldpass(&[
        "check",
        "schedules-demo/steel-multiblock.yaml",
        "--format",
        "json",
    ])))
    .unwrap();
    let name = json["machine"]["name"]
        .as_str()
        .expect("the demo runs on a machine");
    let facts = html.split("<dl class=\"facts\">").nth(1).unwrap();
    let facts = facts.split("</dl>").next().unwrap();
    assert!(
        facts.contains("<dt>Machine</dt>") && facts.contains(name),
        "{facts}"
    );
    let v = json["summary"]["attainable_speed_m_s"].as_f64().unwrap();
    assert!(facts.contains(&format!("{v:.2} m/s")), "{facts}");
}

/// The catalogue page says what the `*` on a speed means (the table does),
/// and a summary's values, words with a figure here and there, are one
/// left-aligned column: only a column of figures alone is right-aligned.
#[test]
fn catalogue_page_explains_the_star_and_summaries_read_as_one_column() {
    let html = page(&["check", "schedules-demo/", "--format", "html"]);
    assert!(html.contains("26.00 *"), "the machine speed is marked");
    assert!(
        html.contains("* at the speed the machine allows"),
        "the mark is explained"
    );
    assert!(html.contains("whips when it breaks"), "the whole caution");

    let html = page(&[
        "compare",
        "schedules-demo/steel-multiblock.yaml",
        "schedules-demo/copper-building-wire.yaml",
        "--format",
        "html",
    ]);
    // "1.577" (total strain) sits among words in the summary: left-aligned.
    let summary = &html[html.find("<h2>Summary").expect("summary")..];
    assert!(
        summary.contains("<td>1.577</td>"),
        "{}",
        &summary[..2000.min(summary.len())]
    );
    // The pass table's figures stay right-aligned.
    assert!(html.contains("<td class=\"n\">4.850</td>"));
}
