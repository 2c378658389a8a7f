//! Command-line interface. Each subcommand lives in its own file with an `Args` struct
//! and a `run` function that parses its arguments, asks the library, renders the
//! outcome and returns a [`Verdict`]. This file dispatches and maps every outcome to an
//! exit code in one place ([`exit_code`]):
//!
//! * 0: done;
//! * 1: a check failed: a part is not a valid solid, bodies meet, the rotor turns the
//!   wrong way, a part does not fit the printer, the safety factor is short;
//! * 2: bad input (file, key, option) or an I/O error.

use clap::{Parser, Subcommand};
use std::process::ExitCode;

/// Writes a line to standard output; a closed pipe (as with `| head`) ends the output
/// quietly instead of panicking.
macro_rules! outln {
    () => {
        $crate::cli::emit("\n")
    };
    ($($t:tt)*) => {
        $crate::cli::emit(&format!("{}\n", format_args!($($t)*)))
    };
}

mod build;
mod draft;
mod fit;
mod load;
mod progress;
mod report;
mod section;
mod segments;
mod variants;

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
    /// No progress bars or summaries; errors and safety cautions are still printed.
    #[arg(long, short, global = true)]
    quiet: bool,
    /// Worker threads for the parallel stages (default: every core). Output is the same
    /// on any number of threads.
    #[arg(long, global = true, value_name = "N", value_parser = clap::value_parser!(u16).range(1..=1024))]
    threads: Option<u16>,
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

/// How a command that ran to its end judged what it made.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Verdict {
    /// Everything asked for was made and passed its checks.
    Done,
    /// The command ran, but what it judged failed: does not fit, safety factor short.
    Failed,
}

/// Parses the command line, runs the subcommand and maps the outcome to an exit code.
pub fn main() -> ExitCode {
    let cli = Cli::parse();
    let ctx = Context { quiet: cli.quiet };
    // The whole command runs on a worker of the pool, so its parallel loops start
    // without handing work across from this thread.
    let ran =
        spanwright::parallel::run_on_pool(cli.threads.map(usize::from), || match cli.command {
            Command::Build(a) => build::run(a, &ctx),
            Command::Section(a) => section::run(a, &ctx),
            Command::Fit(a) => fit::run(a, &ctx),
            Command::Draft(a) => draft::run(a, &ctx),
            Command::Report(a) => report::run(a, &ctx),
        });
    let result = ran.unwrap_or_else(|e| Err(anyhow::Error::new(e).context("--threads")));
    ExitCode::from(exit_code(&result))
}

/// The one mapping from a command's result to an exit code (see the module docs). An
/// error is printed with its causes; it is a failed check when any error in its chain
/// says so (a part rejected by its checks, bodies meeting, a wrong rotation sense), else
/// bad input.
pub fn exit_code(result: &anyhow::Result<Verdict>) -> u8 {
    match result {
        Ok(Verdict::Done) => 0,
        Ok(Verdict::Failed) => EXIT_CHECK_FAILED,
        Err(e) => {
            eprintln!("error: {e}");
            for cause in e.chain().skip(1) {
                eprintln!("  caused by: {cause}");
            }
            if is_failed_check(e) {
                EXIT_CHECK_FAILED
            } else {
                EXIT_BAD_INPUT
            }
        }
    }
}

/// True when an error in the chain is a failed check rather than bad input.
fn is_failed_check(e: &anyhow::Error) -> bool {
    e.chain().any(|c| {
        c.downcast_ref::<spanwright::pipeline::PipelineError>()
            .is_some_and(spanwright::pipeline::PipelineError::is_failed_check)
            || c.downcast_ref::<spanwright::check::Rejected>().is_some()
    })
}

/// Writes text to standard output. Once the reader has gone (a closed pipe), further
/// output is dropped quietly; the exit code still tells the outcome.
pub fn emit(text: &str) {
    use std::io::Write;
    use std::sync::atomic::{AtomicBool, Ordering};
    static CLOSED: AtomicBool = AtomicBool::new(false);
    if CLOSED.load(Ordering::Relaxed) {
        return;
    }
    let mut out = std::io::stdout().lock();
    if out
        .write_all(text.as_bytes())
        .and_then(|()| out.flush())
        .is_err()
    {
        CLOSED.store(true, Ordering::Relaxed);
    }
}
