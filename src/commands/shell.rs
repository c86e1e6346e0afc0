//! `coldpass completions SHELL` and `coldpass man`: generated from the same
//! clap definitions as the parser (clap_complete, clap_mangen), so they
//! cannot drift from the options.

use std::path::PathBuf;

use anyhow::Result;
use clap::Args;
use clap_complete::Shell;

use super::EXIT_OK;
use crate::output;

/// Arguments of `coldpass completions`.
#[derive(Debug, Args)]
pub struct CompletionsArgs {
    /// The shell to complete for.
    #[arg(value_enum)]
    pub shell: Shell,
}

/// Arguments of `coldpass man`.
#[derive(Debug, Args)]
pub struct ManArgs {
    /// Write the page to this file instead of standard output (e.g. coldpass.1).
    #[arg(long, short = 'o', value_name = "FILE")]
    pub output: Option<PathBuf>,
}

/// Prints the completion script of `shell`.
pub fn completions(args: &CompletionsArgs, mut cli: clap::Command) -> Result<u8> {
    let mut buf = Vec::new();
    clap_complete::generate(args.shell, &mut cli, "coldpass", &mut buf);
    let mut outputs = output::Outputs::new(&[]);
    outputs.report(None, buf);
    outputs.write()?;
    Ok(EXIT_OK)
}

/// Prints the man page: the top-level page, then one section per subcommand.
pub fn man(args: &ManArgs, cli: clap::Command) -> Result<u8> {
    let mut buf = Vec::new();
    clap_mangen::Man::new(cli.clone()).render(&mut buf)?;
    for sub in cli.get_subcommands().filter(|s| s.get_name() != "help") {
        let sub = sub
            .clone()
            .name(format!("coldpass-{}", sub.get_name()))
            .version(cli.get_version().unwrap_or_default().to_string());
        buf.extend_from_slice(b"\n");
        clap_mangen::Man::new(sub).render(&mut buf)?;
    }
    let mut outputs = output::Outputs::new(&[]);
    outputs.report(args.output.as_deref(), buf);
    outputs.write()?;
    Ok(EXIT_OK)
}
