//! `coldpass fit` (in progress).

use std::path::PathBuf;

use anyhow::{bail, Result};
use clap::Args;

/// Arguments of `coldpass fit`.
#[derive(Debug, Args)]
pub struct FitArgs {
    /// Input file.
    pub file: PathBuf,
}

/// Runs `coldpass fit`.
pub fn run(args: &FitArgs) -> Result<u8> {
    bail!("'{}': coldpass fit is not built yet", args.file.display())
}
