//! `coldpass risk FILE`: the break probability of every pass when the
//! inputs scatter as the file's `scatter` block says.

use std::io::IsTerminal;
use std::path::PathBuf;
use std::sync::atomic::AtomicBool;
use std::sync::Arc;

use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use coldpass::design::{design, DesignOptions};
use coldpass::risk::{self, RiskError, RiskOptions, Sampling};
use coldpass::schedule;
use coldpass::Method;

use super::check::method_parser;
use super::{EXIT_OK, EXIT_OVER};
use crate::commands::options::ReportArgs;
use crate::report::units::Units;
use crate::{output, report};

/// Exit status when stopped by Ctrl-C (128 + SIGINT, the shell's convention).
pub const EXIT_INTERRUPTED: u8 = 130;

/// How samples are placed, as written on the command line.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SamplingArg {
    /// Latin hypercube: every one of N equal-probability strata of every input used once.
    LatinHypercube,
    /// Plain Monte Carlo.
    MonteCarlo,
}

/// Arguments of `coldpass risk`.
#[derive(Debug, Args)]
pub struct RiskArgs {
    /// The schedule file (YAML) with a `scatter` block; a design file is designed first.
    pub file: PathBuf,
    /// Number of samples (default: enough for a 1 % probability to within +-20 % at 95 %).
    #[arg(long, value_name = "N", default_value_t = risk::DEFAULT_SAMPLES,
          value_parser = clap::value_parser!(u64).range(1..=1_000_000_000))]
    pub samples: u64,
    /// Seed of the random streams: the same seed gives the same report whatever the thread count.
    #[arg(long, value_name = "S", default_value_t = 0)]
    pub seed: u64,
    /// How the samples are placed.
    #[arg(long, value_enum, default_value_t = SamplingArg::LatinHypercube)]
    pub sampling: SamplingArg,
    /// Break probability of the whole schedule to design for: the report gives
    /// the draw-ratio margin that reaches it, and the exit status is 3 when it is exceeded.
    #[arg(long, value_name = "P", value_parser = open_unit_interval)]
    pub target_probability: Option<f64>,
    /// Governing method, overriding the file's `limits.method`.
    #[arg(long, value_name = "NAME", value_parser = method_parser())]
    pub method: Option<Method>,
    /// Run the schedule on this machine file (YAML), overriding the file's
    /// `machine:`: each block's load is held to its own motor.
    #[arg(long, value_name = "FILE")]
    pub machine: Option<PathBuf>,
    /// Also write every sample (its drawn inputs and each pass's draw ratio,
    /// one row a sample) to this CSV file (the name must end in .csv);
    /// without it no sample is stored.
    #[arg(long, value_name = "FILE.csv", value_parser = crate::commands::options::samples_csv_path)]
    pub keep_samples: Option<PathBuf>,
    /// Units of the table and the HTML page: si (mm, MPa, m/s, kW) or us
    /// (in, ksi, ft/min, hp). JSON, YAML and CSV stay SI, as their keys say.
    #[arg(long, value_enum, default_value_t = Units::Si)]
    pub units: Units,
    #[command(flatten)]
    pub report: ReportArgs,
}

/// Runs `coldpass risk`: exit 0, or 3 when the schedule's break probability
/// is over `--target-probability`; 130 when stopped by Ctrl-C (nothing written).
pub fn run(args: &RiskArgs) -> Result<u8> {
    let name = args.file.display().to_string();
    let text = super::check::read_schedule_text(&args.file, super::check::Reader::Risk)?;
    let mut file = schedule::parse(&text).with_context(|| format!("reading schedule '{name}'"))?;
    if file.target.is_some() && file.passes.is_empty() {
        let scatter = file.scatter.clone();
        let d = design(
            &file,
            &DesignOptions {
                method: args.method,
            },
        )
        .with_context(|| format!("designing '{name}' before assessing its risk"))?;
        file = d.schedule;
        file.scatter = scatter;
    }
    let machine = super::check::machine_of(&args.file, args.machine.as_deref(), &file)?;
    let options = RiskOptions {
        samples: args.samples,
        seed: args.seed,
        sampling: match args.sampling {
            SamplingArg::LatinHypercube => Sampling::LatinHypercube,
            SamplingArg::MonteCarlo => Sampling::MonteCarlo,
        },
        method: args.method,
        target_probability: args.target_probability,
    };
    let cancel = Arc::new(AtomicBool::new(false));
    // The process's one signal handler (main.rs) sets this flag on the first
    // Ctrl-C; a second one ends the process.
    output::stop_on_interrupt(Arc::clone(&cancel));
    let bar = std::io::stderr().is_terminal().then(|| {
        let b = indicatif::ProgressBar::new(args.samples);
        b.set_style(
            indicatif::ProgressStyle::with_template(
                "{spinner} sampling [{bar:40}] {pos}/{len} samples ({per_sec}, {eta} left)",
            )
            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar())
            .progress_chars("=> "),
        );
        b
    });
    let progress = |done: u64| {
        if let Some(b) = &bar {
            b.set_position(done);
        }
    };
    let mut kept = match &args.keep_samples {
        Some(_) => Some(KeptSamples::new(
            &risk::sample_columns(&file)
                .with_context(|| format!("assessing the break risk of '{name}'"))?,
        )?),
        None => None,
    };
    let mut keep = |i: u64, values: &[f64], why: Option<&str>| {
        if let Some(k) = kept.as_mut() {
            k.add(i, values, why);
        }
    };
    let result = risk::assess_keeping(
        &file,
        &options,
        machine.as_ref().map(|(_, m)| m),
        &progress,
        &cancel,
        args.keep_samples
            .is_some()
            .then_some(&mut keep as risk::KeepSample<'_>),
    );
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
    let rep = match result {
        Err(RiskError::Cancelled) => {
            eprintln!("stopped by Ctrl-C before the end: nothing was written");
            return Ok(EXIT_INTERRUPTED);
        }
        r => r.with_context(|| format!("assessing the break risk of '{name}'"))?,
    };
    // Render everything before writing anything, so a failure leaves no partial output.
    let body = report::risk::render(&rep, args.report.format, args.units)?;
    let chart = match &args.report.plot {
        Some(_) => Some(report::risk::svg(&rep)?),
        None => None,
    };
    // Neither the schedule nor its machine file may be overwritten by an output.
    let mut inputs = vec![args.file.as_path()];
    if let Some((path, _)) = &machine {
        inputs.push(path.as_path());
    }
    let mut outputs = output::Outputs::new(&inputs);
    if let (Some(path), Some(svg)) = (&args.report.plot, chart) {
        outputs.file("--plot", path, svg);
    }
    if let (Some(path), Some(k)) = (&args.keep_samples, kept) {
        outputs.file("--keep-samples", path, k.finish()?);
    }
    outputs.report(args.report.output.as_deref(), body);
    outputs.write()?;
    Ok(if rep.is_over_target() {
        EXIT_OVER
    } else {
        EXIT_OK
    })
}

/// The `--keep-samples` CSV, built in memory and written with the report
/// (whole or not at all): a `sample` column, the model's columns, `refused`
/// (why the model refused the sample, empty when it did not) and the
/// caution on the first row. Figures to [`report::csv::SIGNIFICANT_DIGITS`]
/// digits, like every CSV; a figure the sample never reached is empty.
struct KeptSamples {
    writer: ::csv::Writer<Vec<u8>>,
    row: Vec<String>,
    first: bool,
    error: Option<String>,
}

impl KeptSamples {
    fn new(columns: &[String]) -> Result<Self> {
        let mut writer = ::csv::Writer::from_writer(Vec::new());
        let mut header = vec!["sample".to_string()];
        header.extend(columns.iter().cloned());
        header.push("refused".into());
        header.push("caution".into());
        writer.write_record(&header)?;
        Ok(Self {
            writer,
            row: Vec::with_capacity(header.len()),
            first: true,
            error: None,
        })
    }

    fn add(&mut self, index: u64, values: &[f64], why: Option<&str>) {
        self.row.clear();
        self.row.push(index.to_string());
        self.row.extend(values.iter().map(|&v| {
            if v.is_nan() {
                String::new()
            } else {
                report::csv::sig(v)
            }
        }));
        self.row.push(why.unwrap_or_default().to_string());
        self.row.push(if self.first {
            coldpass::evaluation::CAUTION.to_string()
        } else {
            String::new()
        });
        self.first = false;
        if let Err(e) = self.writer.write_record(&self.row) {
            self.error.get_or_insert(e.to_string());
        }
    }

    fn finish(self) -> Result<Vec<u8>> {
        if let Some(e) = self.error {
            anyhow::bail!("writing the kept samples: {e}");
        }
        self.writer
            .into_inner()
            .map_err(|e| anyhow::anyhow!("writing the kept samples: {e}"))
    }
}

/// `--target-probability`: a probability strictly between 0 and 1, refused
/// as bad usage (exit 2) otherwise, as clap refuses other bad values.
fn open_unit_interval(text: &str) -> Result<f64, String> {
    let p: f64 = text.trim().parse().map_err(|_| {
        format!("`{text}` is not a number: allowed a probability in (0, 1), e.g. 0.001")
    })?;
    if p > 0.0 && p < 1.0 {
        Ok(p)
    } else {
        Err(format!(
            "{p} is outside (0, 1): allowed a probability in (0, 1), e.g. 0.001"
        ))
    }
}
