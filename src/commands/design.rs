//! `coldpass design` (in progress).

use std::path::PathBuf;

use anyhow::{bail, Result};
use clap::Args;

/// Arguments of `coldpass design`.
#[derive(Debug, Args)]
pub struct DesignArgs {
    /// Input file.
    pub file: PathBuf,
}

/// Runs `coldpass design`.
pub fn run(args: &DesignArgs) -> Result<u8> {
    bail!(
        "'{}': coldpass design is not built yet",
        args.file.display()
    )
}
