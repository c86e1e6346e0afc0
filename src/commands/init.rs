//! `coldpass init schedule|design|machine FILE`: writes a commented starter
//! file that checks (or designs) clean, and never overwrites an existing file.

use std::path::PathBuf;

use anyhow::{bail, Result};
use clap::{Args, ValueEnum};

use super::EXIT_OK;
use crate::output;

/// Which starter file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Starter {
    /// A pass schedule for `coldpass check`.
    Schedule,
    /// A design file for `coldpass design`.
    Design,
    /// A machine file for `coldpass check --machine`.
    Machine,
}

/// Arguments of `coldpass init`.
#[derive(Debug, Args)]
pub struct InitArgs {
    /// Which starter file to write.
    #[arg(value_enum)]
    pub kind: Starter,
    /// Where to write it (default: schedule.yaml, design.yaml or machine.yaml here; a
    /// folder gets that name inside it; a file name must end in .yaml or .yml);
    /// an existing file is never overwritten.
    #[arg(value_parser = super::options::starter_path)]
    pub file: Option<PathBuf>,
}

/// The starter text of `kind` (the files under `templates/`).
pub fn starter(kind: Starter) -> &'static str {
    match kind {
        Starter::Schedule => include_str!("../../templates/schedule.yaml"),
        Starter::Design => include_str!("../../templates/design.yaml"),
        Starter::Machine => include_str!("../../templates/machine.yaml"),
    }
}

/// Runs `coldpass init`.
pub fn run(args: &InitArgs) -> Result<u8> {
    let default_name = match args.kind {
        Starter::Schedule => "schedule.yaml",
        Starter::Design => "design.yaml",
        Starter::Machine => "machine.yaml",
    };
    // A folder gets the starter under its default name, as `cp` would.
    let path = match &args.file {
        Some(p) if p.is_dir() => p.join(default_name),
        Some(p) => p.clone(),
        None => PathBuf::from(default_name),
    };
    if path.exists() {
        bail!(
            "'{}' already exists; init never overwrites a file: name another (coldpass init {} NEW.yaml)",
            path.display(),
            match args.kind {
                Starter::Schedule => "schedule",
                Starter::Design => "design",
                Starter::Machine => "machine",
            }
        );
    }
    output::write_new_file(&path, starter(args.kind).as_bytes())?;
    eprintln!("wrote '{}'", path.display());
    Ok(EXIT_OK)
}
