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
    /// One solve per value of one or more input keys (a series of chains,
    /// a parameter scan).
    #[command(
        after_help = "Examples:\n  chainwell sweep potentials/alternating_chain.toml --vary chain.bonds=2:30:2\n  chainwell sweep potentials/alternating_chain.toml --vary chain.alternation=0,0.5,1 --vary chain.bonds=5:21:4 --json\n  chainwell sweep potentials/alternating_chain.toml --vary chain.bonds=2:200 --shard 3/8 --save part3.json --json\n\nCtrl-C stops after the running cases; with --save FILE the finished cases are kept there,\nmarked \"complete\": false, and --resume FILE continues."
    )]
    Sweep {
        /// The input file (TOML).
        input: PathBuf,
        /// A key and its values: KEY=START:STOP[:STEP] or KEY=V1,V2,... (repeat for a grid).
        #[arg(long = "vary", value_name = "KEY=VALUES")]
        vary: Vec<String>,
        /// Override an input value: KEY=VALUE (e.g. grid.points=20000).
        #[arg(long = "set", value_name = "KEY=VALUE")]
        set: Vec<String>,
        /// Run only cases I, I+N, I+2N, ... (I = 1..N), for job arrays; join with `chainwell merge`.
        #[arg(long, value_name = "I/N")]
        shard: Option<String>,
        /// Print one JSON document on stdout.
        #[arg(long)]
        json: bool,
        /// Also write a tidy CSV (one line per case and level).
        #[arg(long, value_name = "FILE")]
        csv: Option<PathBuf>,
        /// Keep the JSON document in FILE, updated while the sweep runs.
        #[arg(long, value_name = "FILE")]
        save: Option<PathBuf>,
        /// Continue the interrupted sweep saved in FILE (and keep saving to it).
        #[arg(long, value_name = "FILE")]
        resume: Option<PathBuf>,
    },
    /// Input values fitted to a measured series, or the value that gives a wanted quantity.
    #[command(
        after_help = "Examples:\n  chainwell fit potentials/alternating_chain.toml --data potentials/demo_series.csv --free chain.alternation,chain.end_extension\n  chainwell fit potentials/alternating_chain.toml --target wavelength_nm=550 --free chain.alternation --bounds chain.alternation=0:3\n\nData: a CSV whose header names the varied key, the observed quantity (gap, wavelength_nm,\nhomo, lumo or energy.N) and optionally `uncertainty`; lines starting with # are comments."
    )]
    Fit {
        /// The input file (TOML).
        input: PathBuf,
        /// The measured series (CSV).
        #[arg(long, value_name = "FILE.csv")]
        data: Option<PathBuf>,
        /// The keys to adjust, comma-separated; start values come from the input or --set.
        #[arg(long, value_name = "KEY[,KEY...]")]
        free: Vec<String>,
        /// Bounds of a free key: KEY=LO:HI (either side may be left empty).
        #[arg(long, value_name = "KEY=LO:HI")]
        bounds: Vec<String>,
        /// Solve for the one free key that gives QUANTITY=VALUE (e.g. wavelength_nm=550).
        #[arg(long, value_name = "QUANTITY=VALUE")]
        target: Option<String>,
        /// Override an input value: KEY=VALUE.
        #[arg(long = "set", value_name = "KEY=VALUE")]
        set: Vec<String>,
        /// Print one JSON document on stdout.
        #[arg(long)]
        json: bool,
        /// Also write the JSON document to FILE (the best values so far when interrupted).
        #[arg(long, value_name = "FILE")]
        save: Option<PathBuf>,
        /// Start from the values of an earlier (interrupted) fit saved in FILE.
        #[arg(long, value_name = "FILE")]
        resume: Option<PathBuf>,
    },
    /// Join the JSON documents of a sharded sweep into the unsharded one.
    #[command(
        after_help = "Example:\n  chainwell merge part1.json part2.json part3.json --json > sweep.json"
    )]
    Merge {
        /// The shards' JSON documents.
        #[arg(required = true)]
        files: Vec<PathBuf>,
        /// Accepted for symmetry with the other commands; ignored.
        #[arg(long = "set", value_name = "KEY=VALUE")]
        set: Vec<String>,
        /// Print one JSON document on stdout.
        #[arg(long)]
        json: bool,
        /// Also write a tidy CSV (one line per case and level).
        #[arg(long, value_name = "FILE")]
        csv: Option<PathBuf>,
    },
}

fn finish(outcome: commands::sweep::Outcome) -> Result<(), CommandError> {
    for w in &outcome.warnings {
        eprintln!("warning: {w}");
    }
    print_stdout(&outcome.stdout)?;
    match outcome.failure {
        Some(e) => Err(e),
        None => Ok(()),
    }
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
        Command::Sweep {
            input,
            vary,
            set,
            shard,
            json,
            csv,
            save,
            resume,
        } => {
            let opts = commands::sweep::SweepOptions {
                overrides: commands::parse_overrides(&set)?,
                vary,
                shard,
                json,
                csv,
                save,
                resume,
            };
            finish(commands::sweep::run(&input, &opts)?)
        }
        Command::Fit {
            input,
            data,
            free,
            bounds,
            target,
            set,
            json,
            save,
            resume,
        } => {
            let opts = commands::fit::FitOptions {
                overrides: commands::parse_overrides(&set)?,
                data,
                free,
                bounds,
                target,
                json,
                save,
                resume,
            };
            finish(commands::fit::run(&input, &opts)?)
        }
        Command::Merge {
            files,
            set,
            json,
            csv,
        } => {
            if !set.is_empty() {
                return Err(CommandError::Usage(
                    "merge joins finished documents; --set has nothing to change there".into(),
                ));
            }
            print_stdout(&commands::merge::run(&files, json, csv.as_deref())?)
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
