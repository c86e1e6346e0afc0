//! `coldpass check A.yaml B.yaml ...` or `coldpass check FOLDER`: one
//! summary row per product, for a planner with a week of products. Exits with
//! the worst status: 1 when any file could not be checked, else 3 when any is
//! over a limit, else 0.

use std::path::{Path, PathBuf};

use anyhow::{bail, Context, Result};
use coldpass::evaluation::{evaluate_on, EvaluateOptions};
use coldpass::schedule;

use super::check::CheckArgs;
use super::{EXIT_OK, EXIT_OVER};
use crate::output;
use crate::report::catalogue::{self, Product};

/// Exit status when a file could not be read or checked.
const EXIT_BAD: u8 = 1;

/// The schedule files `args` names: each file as given; for a folder, its
/// YAML files that hold a top-level `passes:` list (design and flow-block
/// files are left out), sorted by name.
pub fn files(args: &CheckArgs) -> Result<Vec<PathBuf>> {
    let mut out = Vec::new();
    for p in std::iter::once(&args.file).chain(&args.more) {
        if p.is_dir() {
            let yaml: Vec<PathBuf> = std::fs::read_dir(p)
                .with_context(|| format!("reading folder '{}'", p.display()))?
                .filter_map(|e| e.ok().map(|e| e.path()))
                .filter(|f| {
                    f.extension().and_then(|e| e.to_str()).is_some_and(|e| {
                        e.eq_ignore_ascii_case("yaml") || e.eq_ignore_ascii_case("yml")
                    })
                })
                .collect();
            let (mut found, mut left): (Vec<PathBuf>, Vec<PathBuf>) =
                yaml.into_iter().partition(|f| {
                    crate::input::read_text(f)
                        .is_ok_and(|t| t.lines().any(|l| l.starts_with("passes:")))
                });
            if !left.is_empty() {
                // Said on standard error, so the report's formats stay clean:
                // a planner sees which files of the folder are not in it.
                left.sort();
                let names: Vec<String> = left
                    .iter()
                    .map(|f| {
                        f.file_name()
                            .map(|n| n.to_string_lossy().into_owned())
                            .unwrap_or_default()
                    })
                    .collect();
                eprintln!(
                    "note: left out of the catalogue, no `passes:` list (design, law or machine files): {}",
                    names.join(", ")
                );
            }
            if found.is_empty() {
                bail!(
                    "folder '{}' holds no schedule file (a .yaml file with a `passes:` list)",
                    p.display()
                );
            }
            found.sort();
            out.extend(found);
        } else {
            out.push(p.clone());
        }
    }
    Ok(out)
}

/// Checks one file as `check FILE` would, on `--machine` or the machine its
/// `machine:` key names (relative to that file).
fn check_one(path: &Path, args: &CheckArgs) -> Product {
    let name = path.display().to_string();
    let result = (|| -> Result<_> {
        let text = super::check::read_schedule_text(path, super::check::Reader::Check)?;
        let file = schedule::parse(&text).with_context(|| format!("reading schedule '{name}'"))?;
        let machine = super::check::machine_of(path, args.machine.as_deref(), &file)?;
        evaluate_on(
            &file,
            &EvaluateOptions {
                method: args.method,
            },
            machine.as_ref().map(|(_, m)| m),
        )
        .with_context(|| format!("checking schedule '{name}'"))
    })();
    match result {
        Ok(rep) => Product::checked(name, &rep),
        Err(e) => Product::failed(name, format!("{e:#}")),
    }
}

/// Runs the catalogue: every file checked, one row each, the worst status.
pub fn run(args: &CheckArgs) -> Result<u8> {
    if args.report.plot.is_some() {
        bail!("--plot draws one schedule's chart; give one file to draw it, not several");
    }
    let paths = files(args)?;
    let products: Vec<Product> = paths.iter().map(|p| check_one(p, args)).collect();
    let body = catalogue::render(&products, args.report.format, &args.view.look())?;
    let inputs: Vec<&Path> = paths.iter().map(PathBuf::as_path).collect();
    let mut outputs = output::Outputs::new(&inputs);
    outputs.report(args.report.output.as_deref(), body);
    outputs.write()?;
    Ok(if products.iter().any(|p| p.error.is_some()) {
        EXIT_BAD
    } else if products.iter().any(|p| p.over) {
        EXIT_OVER
    } else {
        EXIT_OK
    })
}
