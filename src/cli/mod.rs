//! The command line: clap arguments and one file per command.
//!
//! Exit codes (documented in `--help` and the README):
//! * 0: everything computed;
//! * 1: the request or a file could not be read or understood (one line on stderr);
//! * 2: the workbook was read but some process has a problem (listed), or
//!   `check`/`fmt --check` found a difference.

mod addresses;
mod atmosphere;
pub mod common;
mod diff;
pub mod eval;
pub mod explain;
mod files;
mod install;
mod reduce;
mod sweep;
mod table;

use clap::{Parser, Subcommand, ValueEnum};
use std::process::ExitCode;

/// The caution every front end carries.
pub const CAUTION: &str = "Results are engineering estimates from the models and data named in the \
README; they are not a substitute for the facility's procedures, local codes and licensed \
engineering review. Pressure, fuel, hot gas and rotating machinery can hurt people.";

/// A terminal workbook for compressible-flow stations.
///
/// Results are engineering estimates: they do not replace the facility's
/// procedures, local codes or licensed engineering review.
///
/// Without a command, opens the terminal workbook: `stationwise FILE`, or
/// `stationwise` alone for recent files and the demo templates.
#[derive(Debug, Parser)]
#[command(name = "stationwise", version, about, long_about = None, args_conflicts_with_subcommands = true, after_help = CAUTION)]
pub struct Cli {
    #[command(subcommand)]
    command: Option<Command>,
    /// Workbook to open in the terminal interface.
    file: Option<std::path::PathBuf>,
    /// Terminal: plain ASCII drawing (no box or braille characters).
    #[arg(long)]
    ascii: bool,
    /// Terminal: no colour (NO_COLOR in the environment does the same).
    #[arg(long)]
    no_color: bool,
    /// Terminal: start in US customary units.
    #[arg(long)]
    us: bool,
    /// Significant figures of numbers in text and CSV tables (JSON always
    /// carries the full round-trip value).
    /// Significant figures of numbers in text and CSV: tables default to 6,
    /// values in sentences to each quantity's display figures (5; 6 for
    /// pressures in kPa). JSON always carries the full round-trip value.
    #[arg(long, global = true, value_parser = clap::value_parser!(u8).range(1..=17))]
    precision: Option<u8>,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Print flow tables (isentropic, shocks, Rayleigh, Fanno) for any gas.
    Table(table::Args),
    /// Print the standard atmosphere (ISO 2533 / U.S. Standard Atmosphere 1976).
    Atmosphere(atmosphere::Args),
    /// Evaluate a workbook: stations, component figures, summary, problems.
    Eval(eval::Args),
    /// Parse, evaluate and compare stored results (for hooks and CI).
    Check(files::CheckArgs),
    /// Givens that changed and derived values that moved between two workbooks.
    Diff(diff::Args),
    /// Derived values over a range of one given.
    Sweep(sweep::Args),
    /// The relations and numbers behind a station's values.
    Explain(explain::Args),
    /// Start a workbook from a demo template.
    New(files::NewArgs),
    /// Rewrite workbooks in canonical form; --check only reports.
    Fmt(files::FmtArgs),
    /// Reduce recorded test scans through a workbook's channel map.
    Reduce(reduce::Args),
    /// Measurement uncertainty of a workbook's derived values.
    Uncertainty(reduce::UncArgs),
    /// Every path a workbook offers (givens and derived values) with its
    /// unit and current value.
    Addresses(addresses::Args),
    /// Print a shell completion script (bash, zsh, fish, elvish, powershell).
    Completions(install::CompletionArgs),
    /// Write man pages into a directory.
    Manual(install::ManualArgs),
}

/// Output format shared by the commands that print rows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum OutFormat {
    /// Aligned text.
    Text,
    /// Comma-separated values with a header of keys.
    Csv,
    /// JSON object with `rows`.
    Json,
}

impl From<OutFormat> for crate::report::Format {
    fn from(f: OutFormat) -> Self {
        match f {
            OutFormat::Text => crate::report::Format::Text,
            OutFormat::Csv => crate::report::Format::Csv,
            OutFormat::Json => crate::report::Format::Json,
        }
    }
}

/// Display unit set.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Units {
    /// SI units.
    Si,
    /// US customary units.
    Us,
}

impl From<Units> for crate::units::UnitSystem {
    fn from(u: Units) -> Self {
        match u {
            Units::Si => crate::units::UnitSystem::Si,
            Units::Us => crate::units::UnitSystem::Us,
        }
    }
}

/// A failure that ends a command: its message and exit code.
#[derive(Debug)]
pub struct Failure {
    /// One line for stderr.
    pub message: String,
    /// The exit code.
    pub code: u8,
}

impl Failure {
    /// A bad request or unreadable file (exit 1).
    pub fn bad(message: impl std::fmt::Display) -> Failure {
        Failure {
            message: message.to_string(),
            code: 1,
        }
    }
}

impl From<crate::book::BookError> for Failure {
    fn from(e: crate::book::BookError) -> Self {
        Failure::bad(e)
    }
}

/// Print a table to stdout in a format.
pub(crate) fn print_table(t: &crate::report::Table, format: OutFormat) -> Result<(), Failure> {
    let mut out = std::io::stdout().lock();
    crate::report::printer(format.into())
        .print(t, &mut out)
        .map_err(|e| Failure::bad(format!("cannot write the output: {e}")))
}

/// Parse arguments, run, map the outcome to an exit code.
pub fn run() -> ExitCode {
    // Usage errors exit 1 (a bad request), as documented; 2 is kept for
    // workbook problems. Help and version go to stdout with 0.
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let code = if e.use_stderr() { 1 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    if let Some(n) = cli.precision {
        crate::report::set_precision(n as usize);
    }
    let Some(command) = cli.command else {
        let opts = crate::tui::Options {
            ascii: cli.ascii,
            no_color: cli.no_color,
            us: cli.us,
        };
        return match crate::tui::run(cli.file.as_deref(), opts) {
            Ok(()) => ExitCode::SUCCESS,
            Err(e) => {
                // The terminal may be gone (a dropped session): a failed
                // write of the farewell line must not turn into a panic.
                use std::io::Write;
                let _ = writeln!(std::io::stderr(), "stationwise: {e}");
                ExitCode::from(1)
            }
        };
    };
    let result = match command {
        Command::Table(a) => table::run(a),
        Command::Atmosphere(a) => atmosphere::run(a),
        Command::Eval(a) => eval::run(a),
        Command::Check(a) => files::check(a),
        Command::Diff(a) => diff::run(a),
        Command::Sweep(a) => sweep::run(a),
        Command::Explain(a) => explain::run(a),
        Command::New(a) => files::new(a),
        Command::Fmt(a) => files::fmt(a),
        Command::Reduce(a) => reduce::run(a),
        Command::Uncertainty(a) => reduce::uncertainty(a),
        Command::Addresses(a) => addresses::run(a),
        Command::Completions(a) => install::completions(a),
        Command::Manual(a) => install::manual(a),
    };
    match result {
        Ok(code) => ExitCode::from(code),
        Err(f) => {
            eprintln!("stationwise: {}", f.message);
            ExitCode::from(f.code)
        }
    }
}
