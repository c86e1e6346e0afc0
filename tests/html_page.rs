//! The report page through the binary, without a browser: check, design and
//! fit each write one self-contained page (no outside file or script) with
//! the summary before the passes, every step a row, the chart inline, the
//! caution last; user text is escaped; US units name theirs; the design
//! page's die list and anneal windows and a machine page's temperature and
//! block tables show the JSON's figures under the table's headers.

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

/// The table under the heading that starts with `heading` on `html`: the
/// heading in full, the header cells and the body rows' cells (as text).
fn page_table(html: &str, heading: &str) -> (String, Vec<String>, Vec<Vec<String>>) {
    let at = html
        .find(&format!("<h2>{heading}"))
        .unwrap_or_else(|| panic!("no table headed {heading:?}"));
    let rest = &html[at + 4..];
    let title = rest[..rest.find("</h2>").unwrap()].to_string();
    let t = &rest[rest.find("<table").unwrap()..];
    let t = &t[..t.find("</table>").unwrap()];
    let cells = |row: &str, tag: &str| -> Vec<String> {
        row.split(&format!("<{tag}"))
            .skip(1)
            // `<th` also opens `<thead`: a cell's tag ends there or has attributes.
            .filter(|c| c.starts_with('>') || c.starts_with(' '))
            .map(|c| {
                let c = &c[c.find('>').unwrap() + 1..];
                c[..c.find(&format!("</{tag}>")).unwrap()].to_string()
            })
            .collect()
    };
    let (head, body) = t.split_once("<tbody>").expect("a table body");
    let rows = body.split("<tr").skip(1).map(|r| cells(r, "td")).collect();
    (title, cells(head, "th"), rows)
}

/// Decimals a figure is shown to.
fn decimals(cell: &str) -> usize {
    cell.split_once('.').map_or(0, |(_, d)| d.len())
}

/// `cell` shows `want` rounded to its decimals (half a unit in the last
/// place, and a hair for the binary representation).
fn shows(cell: &str, want: f64, what: &str) {
    let got: f64 = cell
        .parse()
        .unwrap_or_else(|_| panic!("{what}: {cell:?} is not a figure"));
    let tol = 0.5 * 10f64.powi(-(decimals(cell) as i32)) + 1e-9;
    assert!(
        (got - want).abs() <= tol,
        "{what}: page shows {cell}, JSON gives {want}"
    );
}

fn json_of(args: &[&str]) -> serde_json::Value {
    common::json(&coldpass(args))
}

// The inch is 25.4 mm exactly; 1 psi = 6894.757293168 Pa; F = 1.8 C + 32
// (NIST SP 811, B.8 and B.9).
const MM_PER_INCH: f64 = 25.4;
const MPA_PER_KSI: f64 = 6.894_757_293_168;

/// The design page's die list and anneals: the design table's headings and
/// headers (SI and US), every figure the JSON's `design.dies[]` and
/// `design.anneals[]` (with `window_mm`) rounded as shown, sizes to the die
/// room's decimals (3 without rounding, 2 on a 0.01 mm step; one more in
/// inches), one die per draw pass in all, and each temper anneal inside its
/// window (as the design summary documents it).
#[test]
fn design_page_lists_the_dies_and_the_anneal_windows_as_the_json() {
    for (path, si_decimals) in [
        ("schedules-demo/design-copper-temper.yaml", 3),
        ("schedules-demo/design-copper-die-room.yaml", 2),
    ] {
        let json = json_of(&["design", path, "--format", "json"]);
        let d = &json["design"];
        for (units, per_mm, lu) in [("si", 1.0, "mm"), ("us", 1.0 / MM_PER_INCH, "in")] {
            let html = page(&["design", path, "--format", "html", "--units", units]);
            self_contained(&html);
            let what = format!("{path} --units {units}");
            // The die list.
            let (title, header, rows) = page_table(&html, "Die list");
            let rounding = d["die_rounding"].as_str().unwrap_or(
                "sizes to 3 decimals, in full in JSON: set target.die_step_mm or target.die_sizes_mm to round",
            );
            assert_eq!(title, format!("Die list ({rounding})"), "{what}");
            assert_eq!(
                header,
                [
                    format!("die {lu}"),
                    "semi-angle deg".into(),
                    format!("land {lu}"),
                    "count".into()
                ],
                "{what}"
            );
            let dies = d["dies"].as_array().unwrap();
            assert_eq!(rows.len(), dies.len(), "{what}: one row per die");
            let mut count = 0;
            for (row, die) in rows.iter().zip(dies) {
                let size = &row[0];
                let want_dec = si_decimals + usize::from(units == "us");
                assert_eq!(decimals(size), want_dec, "{what}: die size {size}");
                shows(size, die["size_mm"].as_f64().unwrap() * per_mm, &what);
                shows(&row[1], die["semi_angle_deg"].as_f64().unwrap(), &what);
                shows(
                    &row[2],
                    die["land_length_mm"].as_f64().unwrap() * per_mm,
                    &what,
                );
                assert_eq!(row[3], die["count"].to_string(), "{what}");
                count += die["count"].as_u64().unwrap();
            }
            assert_eq!(count, d["draw_passes"].as_u64().unwrap(), "{what}");
            // The anneals, each with its window when it has one.
            let anneals = d["anneals"].as_array().unwrap();
            assert!(!anneals.is_empty(), "both demos anneal");
            let (_, header, rows) = page_table(&html, "Anneals");
            assert_eq!(
                header,
                [
                    "step".to_string(),
                    format!("diameter {lu}"),
                    "reason".into(),
                    "strain before".into(),
                    format!("window min {lu}"),
                    format!("window max {lu}")
                ],
                "{what}"
            );
            assert_eq!(rows.len(), anneals.len(), "{what}");
            for (row, a) in rows.iter().zip(anneals) {
                assert_eq!(row[0], a["step"].to_string(), "{what}");
                shows(&row[1], a["diameter_mm"].as_f64().unwrap() * per_mm, &what);
                assert_eq!(row[2], a["reason"].as_str().unwrap(), "{what}");
                shows(&row[3], a["strain_before"].as_f64().unwrap(), &what);
                match a.get("window_mm") {
                    Some(w) => {
                        assert_eq!(
                            a["reason"], "temper",
                            "{what}: only a temper anneal has a window"
                        );
                        shows(&row[4], w["min_mm"].as_f64().unwrap() * per_mm, &what);
                        shows(&row[5], w["max_mm"].as_f64().unwrap() * per_mm, &what);
                        let at: f64 = row[1].parse().unwrap();
                        let (lo, hi): (f64, f64) =
                            (row[4].parse().unwrap(), row[5].parse().unwrap());
                        assert!(
                            lo <= at && at <= hi,
                            "{what}: anneal {at} outside {lo}-{hi}"
                        );
                    }
                    None => assert_eq!(&row[4..], ["-", "-"], "{what}"),
                }
            }
        }
    }
    // A design that needs no anneal says so, as the table does.
    let html = page(&[
        "design",
        "schedules-demo/design-steel-machine.yaml",
        "--format",
        "html",
    ]);
    assert!(html.contains("<li>Anneals: none needed</li>"));
    assert!(!html.contains("<h2>Anneals"));
}

/// On a machine (in the file or by `--machine`), the check page shows the
/// check table's temperature and strength table, the block table and the
/// machine summary, under the table's headings and headers (SI and US), every
/// figure the JSON's `passes[]` and `machine.blocks[]` rounded as shown. Off
/// a machine the temperature table stays off the page (the pass table
/// carries the wire temperature), so a 25-pass page prints on two sheets.
#[test]
fn machine_page_shows_the_temperature_and_block_tables_as_the_json() {
    let path = "schedules-demo/steel-multiblock.yaml";
    for machine in [
        &[][..],
        &["--machine", "machines/harrow-lane-dry-7.yaml"][..],
    ] {
        let json = json_of(&[&["check", path, "--format", "json"][..], machine].concat());
        let draws: Vec<&serde_json::Value> = json["passes"]
            .as_array()
            .unwrap()
            .iter()
            .filter(|p| p["kind"] == "draw")
            .collect();
        let blocks = json["machine"]["blocks"].as_array().expect("on a machine");
        let c_to_f = |c: f64| 1.8 * c + 32.0;
        for units in ["si", "us"] {
            let html = page(
                &[
                    &["check", path, "--format", "html", "--units", units][..],
                    machine,
                ]
                .concat(),
            );
            self_contained(&html);
            let us = units == "us";
            let (t, s) = if us { ("F", "ksi") } else { ("C", "MPa") };
            let temp = |c: f64| if us { c_to_f(c) } else { c };
            let stress = |m: f64| if us { m / MPA_PER_KSI } else { m };
            let what = format!("{path} {machine:?} --units {units}");
            let (_, header, rows) = page_table(&html, "Wire temperature and strength");
            assert_eq!(
                header,
                [
                    "step".to_string(),
                    format!("wire temperature entry {t}"),
                    format!("wire temperature {t}"),
                    format!("wire temperature no cooling {t}"),
                    format!("entry yield {s}"),
                    format!("tensile strength {s}"),
                ],
                "{what}"
            );
            assert_eq!(rows.len(), draws.len(), "{what}: one row per draw");
            for (row, p) in rows.iter().zip(&draws) {
                assert_eq!(row[0], p["step"].to_string(), "{what}");
                let f = |k: &str| p[k].as_f64().unwrap_or_else(|| panic!("{k}"));
                shows(&row[1], temp(f("wire_temperature_entry_c")), &what);
                shows(&row[2], temp(f("wire_temperature_c")), &what);
                shows(&row[3], temp(f("wire_temperature_no_cooling_c")), &what);
                shows(&row[4], stress(f("entry_yield_mpa")), &what);
                shows(&row[5], stress(f("tensile_strength_mpa")), &what);
            }
            // The block table, headed by the machine's name.
            let name = json["machine"]["name"].as_str().unwrap();
            let (title, header, rows) = page_table(&html, "Machine: ");
            assert!(title.contains(name), "{what}: {title}");
            let (v, pull, kw) = if us {
                ("ft/min", "lbf", "hp")
            } else {
                ("m/s", "kN", "kW")
            };
            assert_eq!(
                header[..8],
                [
                    "block".to_string(),
                    "step".into(),
                    "capstan rpm".into(),
                    format!("surface speed {v}"),
                    "slip %".into(),
                    format!("net pull {pull}"),
                    format!("net power {kw}"),
                    "motor load %".into(),
                ],
                "{what}"
            );
            assert_eq!(rows.len(), blocks.len(), "{what}: one row per block");
            // 1 ft = 0.3048 m, 1 lbf = 4.4482216152605 N, 1 hp = 745.69987158227 W (NIST SP 811).
            for (row, b) in rows.iter().zip(blocks) {
                let f = |k: &str| b[k].as_f64().unwrap_or_else(|| panic!("{k}"));
                assert_eq!(row[0], b["block"].to_string(), "{what}");
                assert_eq!(row[1], b["step"].to_string(), "{what}");
                shows(&row[2], f("capstan_rpm"), &what);
                let speed = f("surface_speed_m_s");
                shows(
                    &row[3],
                    if us { speed * 60.0 / 0.3048 } else { speed },
                    &what,
                );
                shows(&row[4], 100.0 * f("slip"), &what);
                let pull = f("net_pull_kn");
                shows(
                    &row[5],
                    if us {
                        pull * 1000.0 / 4.448_221_615_260_5
                    } else {
                        pull
                    },
                    &what,
                );
                let power = f("net_power_kw");
                shows(
                    &row[6],
                    if us {
                        power * 1000.0 / 745.699_871_582_27
                    } else {
                        power
                    },
                    &what,
                );
                shows(&row[7], 100.0 * f("motor_load"), &what);
                shows(&row[8], temp(f("wire_temperature_in_c")), &what);
                shows(&row[9], temp(f("wire_temperature_out_c")), &what);
            }
            assert!(html.contains("<h2>Machine summary</h2>"), "{what}");
        }
    }
    let html = page(&["check", "tests/data/ux-25-passes.yaml", "--format", "html"]);
    assert!(
        !html.contains("Wire temperature and strength"),
        "off a machine"
    );
}
