//! `coldpass fit FILE.csv [FILE.csv ...]`: read tensile records, fit every
//! hardening law to each, then the set; write the report, the chart and the
//! chosen law.
//!
//! The record is read straight into two columns of numbers (no table of
//! strings is kept), with the separator (comma, semicolon, tab) found from
//! the header row and the units from the headers or the options.
//! Everything is built in memory first, so that on any error nothing is written.

use std::io::{BufRead, BufReader};
use std::path::{Path, PathBuf};

use anyhow::{anyhow, bail, Context, Result};
use clap::builder::{PossibleValuesParser, TypedValueParser};
use clap::{Args, ValueEnum};

use coldpass::fit::{
    self, DataKind, DrawnPoint, FitError, FitLaw, FitOptions, FitReport, MaterialClass,
};

use crate::commands::options::ReportArgs;
use crate::commands::EXIT_OK;
use crate::output;
use crate::report::fit as report;
use crate::report::units::Units;
use crate::report::Format;

/// Largest record file `fit` reads, bytes (about 50 million points): a
/// regular file is streamed, so it may be larger than the 16 MiB other
/// inputs are held to; a pipe or device is refused.
pub const MAX_RECORD_BYTES: u64 = 1 << 30;

mod args;
mod record;
use record::*;

pub use args::*;

/// Runs `coldpass fit`.
pub fn run(args: &FitArgs) -> Result<u8> {
    // Refused before the fit costs time (the shared writer checks again).
    let canon = |p: &Path| std::fs::canonicalize(p).unwrap_or_else(|_| p.to_path_buf());
    for (name, out) in [
        ("-o", args.report.output.as_deref()),
        ("--plot", args.report.plot.as_deref()),
        ("--emit-law", args.emit_law.as_deref()),
    ] {
        if let Some(out) = out.filter(|p| *p != Path::new("-")) {
            if let Some(input) = args.files.iter().find(|f| canon(f) == canon(out)) {
                bail!(
                    "{name} '{}' is the input file '{}'; writing it would destroy the input: choose another name",
                    out.display(),
                    input.display()
                );
            }
        }
    }
    let options = FitOptions {
        data: match args.data {
            DataArg::Engineering => DataKind::Engineering,
            DataArg::True => DataKind::True,
        },
        shear_modulus_gpa: args.shear_modulus_gpa,
        reach_strain: args.reach_strain,
        material: args.material.map(MaterialArg::class),
        drawn: drawn_points(args)?,
    };
    options.validate().map_err(|e| {
        let flag = match e.name.as_str() {
            "reach_strain" => "--reach-strain",
            "shear_modulus_gpa" => "--shear-modulus-gpa",
            _ => "option",
        };
        // The message shape of every bad value: `--flag` = value: allowed ...
        anyhow!(
            "`{flag}` = {}: {}",
            e.value,
            coldpass::schedule::rule_in_unit(&e.name, &e.allowed)
        )
    })?;
    let mut results = Vec::with_capacity(args.files.len());
    let mut sources = Vec::with_capacity(args.files.len());
    for path in &args.files {
        let record = read_record(args, path)?;
        let result = fit::fit_record_owned(record.strain, record.stress_mpa, &options)
            .map_err(|e| locate(e, path, &record.lines))?;
        results.push(result);
        sources.push(report::Source {
            file: path.display().to_string(),
            columns: record.columns,
        });
    }
    let set = report::Set::of(&results, args.law)?;
    let body = match args.report.format {
        Format::Table => report::table_all(&results, &sources, set.as_ref(), args.units),
        Format::Json => report::json_all(&results, &sources, set.as_ref())?,
        Format::Yaml => report::yaml_all(&results, &sources, set.as_ref())?,
        Format::Csv => report::csv_all(&results, &sources)?,
        Format::Html => match (&results[..], &sources[..]) {
            ([r], [src]) => crate::report::html::fit_page(r, src, args.units)?,
            _ => bail!(
                "--format html: the report page holds one record, and {} were given; give one file, or use --format table, json, yaml or csv for the set",
                results.len()
            ),
        },
    };
    let chart = match &args.report.plot {
        Some(_) => Some(report::svg(&results[0], &sources[0], args.units)?),
        None => None,
    };
    let law_file = match &args.emit_law {
        Some(_) => Some(emitted_law(args, &results, &sources, set.as_ref())?),
        None => None,
    };
    if let Some(text) = &law_file {
        // The law file feeds a schedule: no figure in it may be inf or NaN.
        let tree: serde_yaml::Value = serde_yaml::from_str(text)?;
        output::ensure_finite("law file", &tree)?;
    }
    // Everything is built: now write.
    let inputs: Vec<&Path> = args.files.iter().map(PathBuf::as_path).collect();
    let mut outputs = output::Outputs::new(&inputs);
    if let (Some(p), Some(bytes)) = (&args.report.plot, chart) {
        outputs.file("--plot", p, bytes.into_bytes());
    }
    if let (Some(p), Some(bytes)) = (&args.emit_law, law_file) {
        outputs.file("--emit-law", p, bytes.into_bytes());
    }
    outputs.report(args.report.output.as_deref(), body.into_bytes());
    outputs.write()?;
    Ok(EXIT_OK)
}

fn emitted_law(
    args: &FitArgs,
    results: &[FitReport],
    sources: &[report::Source],
    set: Option<&report::Set>,
) -> Result<String> {
    if let Some(set) = set {
        return report::set_law_yaml(set, results, sources);
    }
    let r = &results[0];
    let with_drawn = !r.drawn_fits.is_empty();
    let best = if with_drawn {
        r.best_with_drawn
    } else {
        r.best
    };
    let chosen = args.law.or(best).context(
        "no fitted law converged to a valid law for a schedule, so there is none to write",
    )?;
    let fit = if with_drawn && !chosen.is_total_strain_form() {
        r.drawn_fit(chosen)
    } else {
        r.fit(chosen)
    }
    .with_context(|| format!("the law '{chosen}' was not fitted to this record"))?;
    if !fit.converged && !args.allow_unconverged {
        bail!(
            "the fit of '{chosen}' did not converge ({} iterations): --emit-law does not write it; choose another --law, or give --allow-unconverged to write it anyway",
            fit.iterations
        );
    }
    report::law_yaml(r, fit, &sources[0])
}
