//! `coldpass check` (in progress).

use std::path::PathBuf;

use anyhow::{bail, Result};
use clap::Args;

/// Arguments of `coldpass check`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// Input file.
    pub file: PathBuf,
}

/// Runs `coldpass check`.
pub fn run(args: &CheckArgs) -> Result<u8> {
    bail!("'{}': coldpass check is not built yet", args.file.display())
}
