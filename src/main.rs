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
    },
    /// Energy bands of the infinite chain: one cell with the Bloch condition.
    #[command(
        after_help = "Examples:\n  chainwell bands potentials/polymer_cell.toml\n  chainwell bands potentials/polymer_cell.toml --finite 5:41:4 --json\n  chainwell bands potentials/polymer_cell.toml --kpoints 81 --csv bands.csv"
    )]
    Bands {
        /// The input file (TOML): a [domain] is one cell; a [chain] gives its two-bond repeat unit.
        input: PathBuf,
        /// Override an input value: KEY=VALUE (e.g. chain.alternation=1.2).
        #[arg(long = "set", value_name = "KEY=VALUE")]
        set: Vec<String>,
        /// Wavevectors from 0 to pi/period (at least 2).
        #[arg(long, default_value_t = commands::bands::DEFAULT_KPOINTS)]
        kpoints: usize,
        /// Print one JSON document on stdout.
        #[arg(long)]
        json: bool,
        /// Also write the bands as CSV (one row per k and band) to FILE.
        #[arg(long, value_name = "FILE")]
        csv: Option<PathBuf>,
        /// Lay finite chains of these bond counts beside the band edges:
        /// START:STOP[:STEP] or N1,N2,...
        #[arg(long, value_name = "BONDS")]
        finite: Option<String>,
        /// Leave timings out of the JSON, so that runs compare byte for byte.
        #[arg(long)]
        no_timing: bool,
    },
}

fn run(cli: Cli) -> Result<(), CommandError> {
    match cli.command {
        Command::Solve {
            input,
            set,
            json,
            no_timing,
        } => {
            let opts = commands::solve::SolveOptions {
                overrides: commands::parse_overrides(&set)?,
                json,
                no_timing,
            };
            let (out, warnings) = commands::solve::run(&input, &opts)?;
            for w in warnings {
                eprintln!("warning: {w}");
            }
            print_stdout(&out)
        }
        Command::Bands {
            input,
            set,
            kpoints,
            json,
            csv,
            finite,
            no_timing,
        } => {
            let opts = commands::bands::BandsOptions {
                overrides: commands::parse_overrides(&set)?,
                kpoints,
                json,
                csv,
                finite,
                no_timing,
            };
            let (out, warnings) = commands::bands::run(&input, &opts)?;
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
