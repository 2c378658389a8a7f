//! `spanwright report` (being built).

/// Arguments of `spanwright report`.
#[derive(Debug, clap::Args)]
pub struct Args {}

/// Runs the subcommand.
pub fn run(_args: Args, _ctx: &super::Context) -> anyhow::Result<std::process::ExitCode> {
    anyhow::bail!("`spanwright report` is not available yet")
}
