//! `spanwright section` (being built).

/// Arguments of `spanwright section`.
#[derive(Debug, clap::Args)]
pub struct Args {}

/// Runs the subcommand.
pub fn run(_args: Args, _ctx: &super::Context) -> anyhow::Result<std::process::ExitCode> {
    anyhow::bail!("`spanwright section` is not available yet")
}
