//! The `chainwell` command line: parses flags and calls the library.

use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

use clap::{Parser, Subcommand};

use chainwell::commands::{self, CommandError};

/// Levels, wavefunctions and spectra of one-dimensional potentials for the
/// pi electrons of conjugated chains.
#[derive(Parser)]
#[command(name = "chainwell", version, about, long_about = None)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Levels and wavefunctions of one input file.
    #[command(
        after_help = "Examples:\n  chainwell solve potentials/ideal_box.toml\n  chainwell solve potentials/alternating_chain.toml --set chain.bonds=11 --json"
    )]
    Solve {
        /// The input file (TOML).
        input: PathBuf,
        /// Override an input value: KEY=VALUE (e.g. grid.points=20000).
        #[arg(long = "set", value_name = "KEY=VALUE")]
        set: Vec<String>,
        /// Print one JSON document on stdout.
        #[arg(long)]
        json: bool,
        /// Leave timings out of the JSON, so that runs compare byte for byte.
        #[arg(long)]
        no_timing: bool,
        /// Write levels.csv, wavefunctions.csv, transitions.csv and
        /// spectrum.csv into this folder.
        #[arg(long, value_name = "DIR")]
        csv: Option<PathBuf>,
    },
}

fn run(cli: Cli) -> Result<(), CommandError> {
    match cli.command {
        Command::Solve {
            input,
            set,
            json,
            no_timing,
            csv,
        } => {
            let opts = commands::solve::SolveOptions {
                overrides: commands::parse_overrides(&set)?,
                json,
                no_timing,
                csv_dir: csv,
            };
            let (out, warnings) = commands::solve::run(&input, &opts)?;
            for w in warnings {
                eprintln!("warning: {w}");
            }
            print_stdout(&out)
        }
    }
}

fn print_stdout(text: &str) -> Result<(), CommandError> {
    let mut stdout = std::io::stdout().lock();
    match stdout
        .write_all(text.as_bytes())
        .and_then(|_| stdout.flush())
    {
        Ok(()) => Ok(()),
        // A closed pipe (`| head`) is not an error of ours.
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        Err(e) => Err(CommandError::Compute(format!(
            "cannot write to stdout: {e}"
        ))),
    }
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let _ = e.print();
            return ExitCode::from(if e.use_stderr() { 2 } else { 0 });
        }
    };
    match run(cli) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("{e}");
            ExitCode::from(e.exit_code())
        }
    }
}
