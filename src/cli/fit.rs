//! `spanwright fit` (being built).

/// Arguments of `spanwright fit`.
#[derive(Debug, clap::Args)]
pub struct Args {}

/// Runs the subcommand.
pub fn run(_args: Args, _ctx: &super::Context) -> anyhow::Result<std::process::ExitCode> {
    anyhow::bail!("`spanwright fit` is not available yet")
}
