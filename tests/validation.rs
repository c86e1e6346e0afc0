//! The validation table: every case of tests/validation/cases.yaml (published
//! worked examples, each source named there and in the case's schedule file)
//! computed with every method, printed as a table (run with `--nocapture`),
//! each method held to the error measured on it, and the defaults (governing
//! method, shear factor m derived from mu) checked against the table they
//! were chosen from (README, "Validation"; docs/physics.md, "Validation
//! table and defaults").

use coldpass::pass::{self, PreparedPass};
use coldpass::schedule::{self, ScheduleFile, Step};
use coldpass::{Die, DrawPass, FlowLaw, Method, Settings};
use serde::Deserialize;

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct Cases {
    cases: Vec<Case>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(dead_code)]
struct Case {
    id: String,
    file: String,
    source: String,
    basis: String,
    read_from: String,
    quantity: String,
    published: f64,
    published_method: String,
    die_given: bool,
    assumed: Vec<String>,
}

/// A column of the table: a method, and for the upper bound the shear factor rule.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Column {
    Method(Method),
    /// The upper bound with m = min(1, sqrt(3) mu), the rule before the table.
    UpperBoundSqrt3Mu,
}

const COLUMNS: [(Column, &str); 8] = [
    (Column::Method(Method::Ideal), "ideal"),
    (Column::Method(Method::Efficiency), "efficiency"),
    (Column::Method(Method::Sachs), "sachs"),
    (Column::Method(Method::Siebel), "siebel"),
    (Column::Method(Method::Redundant), "redundant"),
    (Column::Method(Method::UpperBound), "upper-bound"),
    (Column::UpperBoundSqrt3Mu, "ub m=sqrt3 mu"),
    (Column::Method(Method::Max), "max"),
];

fn dir() -> String {
    concat!(env!("CARGO_MANIFEST_DIR"), "/tests/validation").to_string()
}

fn cases() -> Vec<Case> {
    let path = format!("{}/cases.yaml", dir());
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{path}: {e}"));
    serde_yaml::from_str::<Cases>(&text)
        .unwrap_or_else(|e| panic!("{path}: {e}"))
        .cases
}

/// The law, the one pass and the finish speed of a case's schedule.
fn load(case: &Case) -> (ScheduleFile, FlowLaw, DrawPass) {
    let path = format!("{}/{}", dir(), case.file);
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{path}: {e}"));
    let file = schedule::parse(&text).unwrap_or_else(|e| panic!("{path}: {e}"));
    let [Step::Draw(step)] = file.passes.as_slice() else {
        panic!("{path}: a validation case is one draw pass");
    };
    let die = file.die_for(&step.die, 0.0).unwrap();
    let pass = DrawPass {
        entry_diameter_mm: file.start.diameter.mm(),
        exit_diameter_mm: step.exit.mm(),
        strain_before: file.start.strain,
        back_tension_mpa: step.back_tension_mpa.unwrap_or(0.0),
        die,
    };
    let law = file.material.flow.clone();
    (file, law, pass)
}

fn column_die(die: &Die, column: Column) -> Die {
    let mut d = *die;
    if column == Column::UpperBoundSqrt3Mu {
        d.friction_factor = Some((3f64.sqrt() * die.friction).min(1.0));
    }
    d
}

fn method_of(column: Column) -> Method {
    match column {
        Column::Method(m) => m,
        Column::UpperBoundSqrt3Mu => Method::UpperBound,
    }
}

/// The draw ratio of `column` for a pass of area reduction `r` from `pass`'s entry size.
fn draw_ratio(law: &FlowLaw, pass: &DrawPass, column: Column, r: f64) -> f64 {
    let p = DrawPass {
        exit_diameter_mm: pass.entry_diameter_mm * (1.0 - r).sqrt(),
        die: column_die(&pass.die, column),
        ..*pass
    };
    let m = coldpass::analyse_pass(law, &p, &Settings::default()).unwrap();
    m.draw_ratio(method_of(column)).unwrap()
}

/// The case's quantity by `column`, or `None` when the method cannot answer
/// (efficiency without an efficiency).
fn compute(case: &Case, column: Column) -> Option<f64> {
    let (file, law, pass) = load(case);
    let method = method_of(column);
    if method == Method::Efficiency && pass.die.efficiency.is_none() {
        return None;
    }
    if case.quantity == "max_reduction" {
        // Bisection on the reduction at draw ratio 1 (the drawn section at its flow stress).
        let (mut lo, mut hi) = (1e-4, 0.99);
        assert!(draw_ratio(&law, &pass, column, hi) > 1.0, "{}", case.id);
        for _ in 0..80 {
            let mid = 0.5 * (lo + hi);
            if draw_ratio(&law, &pass, column, mid) < 1.0 {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        return Some(0.5 * (lo + hi));
    }
    let prepared = PreparedPass::new(&law, &pass, &Settings::default()).unwrap();
    let stress = prepared
        .stress_mpa(&column_die(&pass.die, column), method)
        .unwrap();
    let force = pass::force_kn(stress, pass.exit_diameter_mm);
    Some(match case.quantity.as_str() {
        "draw_stress_mpa" => stress,
        "force_kn" => force,
        "power_kw" => pass::power_kw(
            force,
            file.line
                .as_ref()
                .expect("a power case has a line")
                .finish_speed_m_s,
        ),
        other => panic!("{}: unknown quantity {other}", case.id),
    })
}

/// A case with its value by each column and its error, percent (`None`
/// where the method cannot answer or the case does not score it).
type Row = (Case, Vec<Option<f64>>, Vec<Option<f64>>);

/// Error of each case by each column, percent; `None` where not scored.
fn table() -> Vec<Row> {
    cases()
        .into_iter()
        .map(|case| {
            let values: Vec<Option<f64>> =
                COLUMNS.iter().map(|(c, _)| compute(&case, *c)).collect();
            let errors = COLUMNS
                .iter()
                .zip(&values)
                .map(|((c, _), v)| {
                    let scored = case.die_given || !method_of(*c).depends_on_angle();
                    v.filter(|_| scored)
                        .map(|v| 100.0 * (v / case.published - 1.0))
                })
                .collect();
            (case, values, errors)
        })
        .collect()
}

fn print_table(rows: &[Row]) {
    let mut head = "| case | basis | quantity | published |".to_string();
    for (_, name) in COLUMNS {
        head.push_str(&format!(" {name} |"));
    }
    eprintln!("{head}");
    eprintln!("|{}", "---|".repeat(4 + COLUMNS.len()));
    for (case, values, errors) in rows {
        let mut line = format!(
            "| {} | {} | {} | {} |",
            case.id, case.basis, case.quantity, case.published
        );
        for (v, e) in values.iter().zip(errors) {
            line.push_str(&match (v, e) {
                (Some(v), Some(e)) => format!(" {v:.4} ({e:+.1} %) |"),
                (Some(v), None) => format!(" {v:.4} (not scored) |"),
                _ => " n/a |".to_string(),
            });
        }
        eprintln!("{line}");
    }
}

/// Mean and largest absolute error of column `j` over the scored cases, percent.
fn summary(rows: &[Row], j: usize) -> (f64, f64, usize) {
    let errs: Vec<f64> = rows.iter().filter_map(|r| r.2[j]).map(f64::abs).collect();
    let n = errs.len();
    let mean = errs.iter().sum::<f64>() / n.max(1) as f64;
    (mean, errs.iter().cloned().fold(0.0, f64::max), n)
}

#[test]
fn every_method_is_held_to_its_measured_error_on_the_validation_table() {
    let rows = table();
    print_table(&rows);
    // Measured on this table (the README's "Validation" section): mean and
    // largest absolute error per column, percent, each bound a little above.
    let bounds: [(&str, f64, f64, usize); 8] = [
        ("ideal", 32.5, 41.0, 5),
        ("efficiency", 0.1, 0.1, 1),
        ("sachs", 11.5, 26.0, 4),
        ("siebel", 20.0, 29.0, 4),
        ("redundant", 5.0, 12.5, 4),
        ("upper-bound", 11.0, 13.5, 4),
        ("ub m=sqrt3 mu", 23.5, 31.5, 4),
        ("max", 20.0, 29.0, 4),
    ];

    for (j, (_, name)) in COLUMNS.iter().enumerate() {
        let (mean, max, n) = summary(&rows, j);
        eprintln!("{name}: mean |error| {mean:.2} %, largest {max:.2} % over {n} cases");
    }
    for (j, (_, name)) in COLUMNS.iter().enumerate() {
        let (mean, max, n) = summary(&rows, j);
        let (bname, bmean, bmax, bn) = bounds[j];
        assert_eq!(bname, *name);
        assert_eq!(n, bn, "{name}: scored cases");
        assert!(
            mean <= bmean,
            "{name}: mean |error| {mean:.2} % above {bmean} %"
        );
        assert!(
            max <= bmax,
            "{name}: largest |error| {max:.2} % above {bmax} %"
        );
    }
}

#[test]
fn the_default_method_is_the_closest_on_the_validation_table() {
    // The default governing method (src/schedule.rs DEFAULT_METHOD) is the
    // physical method (one that sees the die) with the lowest mean |error|.
    let rows = table();
    let physical = [
        Method::Sachs,
        Method::Siebel,
        Method::Redundant,
        Method::UpperBound,
        Method::Max,
    ];
    let best = physical
        .iter()
        .map(|&m| {
            let j = COLUMNS
                .iter()
                .position(|(c, _)| *c == Column::Method(m))
                .unwrap();
            (m, summary(&rows, j).0)
        })
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .unwrap();
    assert_eq!(schedule::DEFAULT_METHOD, best.0, "{best:?}");
}

#[test]
fn the_derived_shear_factor_beats_sqrt3_mu_on_the_validation_table() {
    // m derived from mu (Die::shear_factor) against the former min(1, sqrt(3) mu).
    let rows = table();
    let j_ub = COLUMNS
        .iter()
        .position(|(c, _)| *c == Column::Method(Method::UpperBound))
        .unwrap();
    let j_old = COLUMNS
        .iter()
        .position(|(c, _)| *c == Column::UpperBoundSqrt3Mu)
        .unwrap();
    let (derived, old) = (summary(&rows, j_ub).0, summary(&rows, j_old).0);
    assert!(
        derived < old,
        "derived m {derived:.2} % vs sqrt(3) mu {old:.2} %"
    );
    let die = Die::new(6.0, 0.09).unwrap();
    assert!((die.shear_factor().0 - pass::DERIVED_SHEAR_FACTOR_PER_MU * 0.09).abs() < 1e-15);
}

#[test]
fn every_case_names_its_source_and_basis() {
    for case in cases() {
        assert!(
            case.source.len() > 40 && case.source.contains(','),
            "{}",
            case.id
        );
        assert!(
            matches!(case.basis.as_str(), "published" | "from memory"),
            "{}",
            case.id
        );
        assert!(
            !case.assumed.is_empty(),
            "{}: say what was assumed",
            case.id
        );
        let text = std::fs::read_to_string(format!("{}/{}", dir(), case.file)).unwrap();
        assert!(
            text.contains(&case.id),
            "{}: the file names its case",
            case.file
        );
    }
}
