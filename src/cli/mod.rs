//! Command-line interface. Each subcommand lives in its own file with an `Args` struct
//! and a `run` function; this file only dispatches and maps results to exit codes:
//! 0 success, 1 a check failed (does not fit, not watertight), 2 bad input or I/O error.

use clap::{Parser, Subcommand};

mod build;
mod draft;
mod fit;
mod progress;
mod report;
mod section;
use std::process::ExitCode;

/// Exit code for a failed check.
pub const EXIT_CHECK_FAILED: u8 = 1;
/// Exit code for bad input or an I/O error.
pub const EXIT_BAD_INPUT: u8 = 2;

#[derive(Parser)]
#[command(
    name = "spanwright",
    version,
    about = "Turns a rotor blade's design table into watertight, printable and machinable solids."
)]
struct Cli {
    /// No progress bars or summaries; errors are still printed.
    #[arg(long, short, global = true)]
    quiet: bool,
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Build a blade from a design file: loft, mesh, check, write STL/3MF/OBJ/STEP.
    Build(build::Args),
    /// Generate, convert and measure airfoil sections.
    Section(section::Args),
    /// Check whether parts fit a printer; find orientations and plate layouts.
    Fit(fit::Args),
    /// Draft a station table from optimum-rotor theory.
    Draft(draft::Args),
    /// Mass, section properties, stress estimate, pictures and reports.
    Report(report::Args),
}

/// Options every subcommand sees.
#[derive(Debug, Clone, Copy)]
pub struct Context {
    /// Suppress progress and summaries.
    pub quiet: bool,
}

/// Parses the command line, runs the subcommand and maps the outcome to an exit code.
pub fn main() -> ExitCode {
    let cli = Cli::parse();
    let ctx = Context { quiet: cli.quiet };
    let result = match cli.command {
        Command::Build(a) => build::run(a, &ctx),
        Command::Section(a) => section::run(a, &ctx),
        Command::Fit(a) => fit::run(a, &ctx),
        Command::Draft(a) => draft::run(a, &ctx),
        Command::Report(a) => report::run(a, &ctx),
    };
    match result {
        Ok(code) => code,
        Err(e) => {
            eprintln!("error: {e}");
            for cause in e.chain().skip(1) {
                eprintln!("  caused by: {cause}");
            }
            ExitCode::from(EXIT_BAD_INPUT)
        }
    }
}
