//! The report page in a real browser (Debian's chromium, headless): printed
//! to PDF a 25-pass schedule takes at most two landscape pages, A4 and
//! Letter; a screenshot is not blank; nothing overflows the page's width; the
//! DOM holds every pass row; a title holding `<script>` is shown, not run;
//! and the chart's smallest text is 11 px or more in a 1280-pixel window.
//!
//! In CI (`CI=1` or `COLDPASS_REQUIRE_BROWSER=1`, as `.ci/run` sets) a missing
//! browser fails the test; on a developer machine without one it is skipped,
//! saying so. The browser is found as `$COLDPASS_CHROMIUM`, else `chromium`,
//! `chromium-browser` or `google-chrome` on the PATH.

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;

use common::{coldpass, root};

const P25: &str = "tests/data/ux-25-passes.yaml";

fn find_browser() -> Option<PathBuf> {
    if let Some(p) = std::env::var_os("COLDPASS_CHROMIUM") {
        return Some(PathBuf::from(p));
    }
    let path = std::env::var_os("PATH")?;
    ["chromium", "chromium-browser", "google-chrome"]
        .iter()
        .flat_map(|name| std::env::split_paths(&path).map(move |dir| dir.join(name)))
        .find(|p| p.is_file())
}

fn required() -> bool {
    ["CI", "COLDPASS_REQUIRE_BROWSER"]
        .iter()
        .any(|k| std::env::var(k).is_ok_and(|v| !v.is_empty() && v != "0" && v != "false"))
}

/// The browser, or `None` (with a message) when the test may be skipped.
fn browser() -> Option<PathBuf> {
    match find_browser() {
        Some(b) => Some(b),
        None if required() => panic!(
            "no chromium found (CI=1 or COLDPASS_REQUIRE_BROWSER=1 is set, so the browser test must run): install it with `apt-get install -y chromium` or set COLDPASS_CHROMIUM"
        ),
        None => {
            eprintln!(
                "SKIPPED: the browser test needs chromium (apt-get install -y chromium, or set COLDPASS_CHROMIUM); none found on this machine"
            );
            None
        }
    }
}

/// Runs headless chromium on `page` with `extra` arguments and a fresh profile.
fn run_browser(browser: &Path, dir: &Path, page: &Path, extra: &[String]) -> String {
    let profile = tempfile::tempdir_in(dir).unwrap();
    let out = Command::new(browser)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--disable-dev-shm-usage",
            "--hide-scrollbars",
        ])
        .arg(format!("--user-data-dir={}", profile.path().display()))
        .args(extra)
        .arg(format!("file://{}", page.display()))
        .output()
        .expect("chromium runs");
    assert!(
        out.status.success(),
        "chromium failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).into_owned()
}

/// Writes the page of `schedule` into `dir`.
fn page_of(schedule: &Path, dir: &Path, name: &str) -> PathBuf {
    let page = dir.join(name);
    let out = coldpass(&[
        "check",
        schedule.to_str().unwrap(),
        "--format",
        "html",
        "-o",
        page.to_str().unwrap(),
    ]);
    assert!(matches!(out.status.code(), Some(0 | 3)), "{out:?}");
    page
}

/// Pages of a PDF as Chromium (Skia) writes it: the page tree's `/Count`,
/// cross-checked against the number of `/Type /Page` objects.
fn pdf_pages(pdf: &[u8]) -> usize {
    let text = String::from_utf8_lossy(pdf);
    let objects = text
        .match_indices("/Type /Page")
        .filter(|(i, _)| !text[i + 11..].starts_with('s'))
        .count();
    let count = text
        .split("/Count ")
        .skip(1)
        .filter_map(|s| {
            s.split(|c: char| !c.is_ascii_digit())
                .next()
                .and_then(|n| n.parse::<usize>().ok())
        })
        .max()
        .unwrap_or(0);
    assert_eq!(objects, count, "page objects and /Count disagree");
    count
}

#[test]
fn a_25_pass_page_prints_on_two_landscape_pages_a4_and_letter() {
    let Some(browser) = browser() else { return };
    let dir = tempfile::tempdir().unwrap();
    let letter = page_of(&root(P25), dir.path(), "letter.html");
    // The page asks for landscape on the printer's paper (Chromium prints
    // Letter); the A4 copy names the paper, as a printer set to A4 would.
    let html = std::fs::read_to_string(&letter).unwrap();
    assert!(
        html.contains("@page { size: landscape;"),
        "print rule present"
    );
    let a4 = dir.path().join("a4.html");
    std::fs::write(
        &a4,
        html.replace("@page { size: landscape;", "@page { size: A4 landscape;"),
    )
    .unwrap();
    for (page, paper) in [(&letter, "Letter"), (&a4, "A4")] {
        let pdf = dir.path().join(format!("{paper}.pdf"));
        run_browser(
            &browser,
            dir.path(),
            page,
            &[
                "--no-pdf-header-footer".into(),
                format!("--print-to-pdf={}", pdf.display()),
            ],
        );
        let bytes = std::fs::read(&pdf).unwrap();
        let n = pdf_pages(&bytes);
        assert!((1..=2).contains(&n), "{paper}: {n} pages");
        // Landscape: the MediaBox is wider than tall (Letter 792 x 612 pt, A4 842 x 595 pt).
        let text = String::from_utf8_lossy(&bytes);
        let mb = text.split("/MediaBox [").nth(1).expect("MediaBox");
        let v: Vec<f64> = mb
            .split(']')
            .next()
            .unwrap()
            .split_whitespace()
            .filter_map(|x| x.parse().ok())
            .collect();
        assert!(v[2] - v[0] > v[3] - v[1], "{paper} not landscape: {v:?}");
        let want = if paper == "A4" { 842.0 } else { 792.0 };
        assert!((v[2] - v[0] - want).abs() < 1.5, "{paper} width {v:?}");
    }
}

#[test]
fn the_screenshot_is_not_blank_and_nothing_overflows() {
    let Some(browser) = browser() else { return };
    let dir = tempfile::tempdir().unwrap();
    let page = page_of(&root(P25), dir.path(), "page.html");
    let png = dir.path().join("shot.png");
    run_browser(
        &browser,
        dir.path(),
        &page,
        &[
            "--window-size=1280,1600".into(),
            format!("--screenshot={}", png.display()),
        ],
    );
    let decoder = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(&png).unwrap()));
    let mut reader = decoder.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size().unwrap()];
    let info = reader.next_frame(&mut buf).unwrap();
    let channels = info.color_type.samples();
    let pixels = buf[..info.buffer_size()].chunks(channels);
    let total = (info.width * info.height) as usize;
    let inked = pixels
        .filter(|p| p.iter().take(3).any(|&c| c < 200))
        .count();
    // Text, table rules, the verdict banner and the chart ink a fair part of
    // the screen; a blank or failed page inks none.
    assert!(
        inked * 100 > total * 3,
        "screenshot nearly blank: {inked} of {total} pixels inked"
    );

    // Overflow: a copy of the page with a script that measures the widths
    // after layout and writes them into the DOM, read back by --dump-dom.
    let html = std::fs::read_to_string(&page).unwrap();
    let probe = r#"<script>
const d = document.documentElement;
const wraps = [...document.querySelectorAll('.wrap, table, figure, svg')]
  .filter(e => e.getBoundingClientRect().right > d.clientWidth + 1).length;
document.body.setAttribute('data-overflow', (d.scrollWidth > d.clientWidth ? 'page ' : '') + wraps);
</script></body>"#;
    let measured = dir.path().join("measured.html");
    std::fs::write(&measured, html.replace("</body>", probe)).unwrap();
    for width in [1280, 1024] {
        let dom = run_browser(
            &browser,
            dir.path(),
            &measured,
            &[format!("--window-size={width},900"), "--dump-dom".into()],
        );
        assert!(
            dom.contains(r#"data-overflow="0""#),
            "something is wider than a {width}-pixel window: {}",
            dom.split("data-overflow=")
                .nth(1)
                .map_or("no probe", |s| &s[..20.min(s.len())])
        );
    }
}

#[test]
fn the_dom_holds_every_pass_row_and_a_script_title_does_not_run() {
    let Some(browser) = browser() else { return };
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(root(P25)).unwrap();
    let title = r#"Line 7 <script>document.title='RAN';document.body.setAttribute('data-ran','yes')</script><img src=x onerror="document.body.setAttribute('data-ran','img')">"#;
    let yaml = text
        .lines()
        .map(|l| {
            if l.starts_with("title:") {
                // A JSON string is a YAML string, quotes and all.
                format!("title: {}", serde_json::to_string(title).unwrap())
            } else {
                l.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join("\n");
    let schedule = dir.path().join("script-title.yaml");
    std::fs::write(&schedule, yaml).unwrap();
    let page = page_of(&schedule, dir.path(), "page.html");
    let dom = run_browser(
        &browser,
        dir.path(),
        &page,
        &["--dump-dom".into(), "--virtual-time-budget=1000".into()],
    );
    assert!(!dom.contains("data-ran=\""), "a script in the title ran");
    assert!(!dom.contains("<title>RAN"), "a script in the title ran");
    assert!(!dom.contains("<script"), "the DOM holds a script element");
    assert!(
        dom.contains("Line 7 &lt;script&gt;"),
        "the title is shown as text"
    );

    // Every step is a row of the pass table: 25 draws and the anneal, each
    // with its exit diameter as the JSON gives it.
    let json: serde_json::Value =
        serde_json::from_slice(&coldpass(&["check", P25, "--format", "json"]).stdout).unwrap();
    let steps = json["passes"].as_array().unwrap();
    assert_eq!(steps.len(), 26);
    let passes = dom
        .split(r#"<table class="passes">"#)
        .nth(1)
        .expect("the pass table")
        .split("</table>")
        .next()
        .unwrap();
    let rows: Vec<&str> = passes.split("<tr").skip(2).collect();
    assert_eq!(rows.len(), steps.len(), "one row per step");
    for (row, step) in rows.iter().zip(steps) {
        let n = step["step"].as_u64().unwrap();
        assert!(row.contains(&format!(">{n}</td>")), "step {n}: {row}");
        let exit = step["exit_diameter_mm"].as_f64().unwrap();
        assert!(
            row.contains(&format!(">{exit:.3}</td>")),
            "step {n} exit: {row}"
        );
        let flagged = !step["flags"].as_array().unwrap().is_empty();
        let over = step["flags"].as_array().unwrap().iter().any(|f| {
            [
                "over-draw-limit",
                "anneal-due",
                "too-hot",
                "over-block-power",
                "back-tension-over-yield",
            ]
            .contains(&f.as_str().unwrap())
        });
        if over {
            assert!(
                row.contains(">OVER</td>") && row.starts_with(r#" class="over""#),
                "{row}"
            );
        } else if flagged {
            assert!(
                row.contains(">WARN</td>") && row.starts_with(r#" class="warn""#),
                "{row}"
            );
        }
    }
}

/// The chart's text on screen: the smallest text of the SVG (its font size
/// times the scale it is drawn at) is 11 px or more in a 1280-pixel window,
/// the check page's and a machine page's (whose chart is taller), and the
/// page still fits the window. 11 px is about the smallest screen text that
/// reads comfortably (common practice, from memory: browsers' minimum-font
/// settings and UI guidelines put body text at 12 px and up).
#[test]
fn chart_text_reads_at_11_px_on_a_1280_pixel_screen() {
    let Some(browser) = browser() else { return };
    let dir = tempfile::tempdir().unwrap();
    let probe = r#"<script>
let m = 1e9, n = 0;
for (const t of document.querySelectorAll('figure svg text')) {
  const px = parseFloat(getComputedStyle(t).fontSize) * t.ownerSVGElement.getScreenCTM().a;
  if (t.textContent.trim()) { m = Math.min(m, px); n++; }
}
document.body.setAttribute('data-chart-text', n + ' ' + m.toFixed(2));
</script></body>"#;
    for (schedule, name) in [
        (P25, "p25.html"),
        ("schedules-demo/steel-multiblock.yaml", "machine.html"),
    ] {
        let page = page_of(&root(schedule), dir.path(), name);
        let html = std::fs::read_to_string(&page).unwrap();
        let measured = dir.path().join(format!("measured-{name}"));
        std::fs::write(&measured, html.replace("</body>", probe)).unwrap();
        let dom = run_browser(
            &browser,
            dir.path(),
            &measured,
            &["--window-size=1280,900".into(), "--dump-dom".into()],
        );
        let got = dom
            .split(r#"data-chart-text=""#)
            .nth(1)
            .and_then(|s| s.split('"').next())
            .expect("the probe ran");
        let (n, px) = got.split_once(' ').unwrap();
        assert!(
            n.parse::<usize>().unwrap() > 20,
            "{schedule}: chart text found: {got}"
        );
        let px: f64 = px.parse().unwrap();
        assert!(
            px >= 11.0,
            "{schedule}: smallest chart text {px} px on screen"
        );
    }
}
