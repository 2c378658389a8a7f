//! `spanwright draft` (being built).

/// Arguments of `spanwright draft`.
#[derive(Debug, clap::Args)]
pub struct Args {}

/// Runs the subcommand.
pub fn run(_args: Args, _ctx: &super::Context) -> anyhow::Result<std::process::ExitCode> {
    anyhow::bail!("`spanwright draft` is not available yet")
}
