//! The `chainwell` command line: the subcommands and their flags, parsed by
//! clap and handed to the command layer ([`cli`]).

mod cli;

use std::process::ExitCode;

use clap::{Parser, Subcommand};

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
    Solve(cli::solve::SolveArgs),
    /// The levels on grids whose spacing halves, with the observed order of
    /// convergence; flags levels whose order falls short of the scheme's.
    #[command(
        after_help = "Example:\n  chainwell converge potentials/harmonic_well.toml --grids 4"
    )]
    Converge(cli::converge::ConvergeArgs),
    /// Energy bands of the infinite chain: one cell with the Bloch condition.
    #[command(
        after_help = "Examples:\n  chainwell bands potentials/polymer_cell.toml\n  chainwell bands potentials/polymer_cell.toml --finite 5:41:4 --json\n  chainwell bands potentials/polymer_cell.toml --kpoints 81 --csv bands.csv"
    )]
    Bands(cli::bands::BandsArgs),
    /// Write a commented input to start from (box, chain, ring, wells,
    /// table, formula, polymer); without KIND, list them.
    #[command(
        after_help = "Examples:\n  chainwell starter\n  chainwell starter chain -o my_chain.toml"
    )]
    Starter(cli::starter::StarterArgs),
    /// Print a shell completion script (bash, zsh, fish, elvish, powershell).
    #[command(
        after_help = "Example:\n  chainwell completions bash > ~/.local/share/bash-completion/completions/chainwell"
    )]
    Completions {
        /// The shell.
        shell: clap_complete::Shell,
    },
    /// One solve per value of one or more input keys (a series of chains,
    /// a parameter scan).
    #[command(
        after_help = "Examples:\n  chainwell sweep potentials/alternating_chain.toml --vary chain.bonds=2:30:2\n  chainwell sweep potentials/alternating_chain.toml --vary chain.alternation=0,0.5,1 --vary chain.bonds=5:21:4 --json\n  chainwell sweep potentials/alternating_chain.toml --vary chain.bonds=2:200 --shard 3/8 --save part3.json --json\n\nCtrl-C stops after the running cases; with --save FILE the finished cases are kept there,\nmarked \"complete\": false, and --resume FILE continues."
    )]
    Sweep(cli::sweep::SweepArgs),
    /// Input values fitted to a measured series, or the value that gives a wanted quantity.
    #[command(
        after_help = "Examples:\n  chainwell fit potentials/alternating_chain.toml --data potentials/demo_series.csv --free chain.alternation,chain.end_extension\n  chainwell fit potentials/alternating_chain.toml --target wavelength_nm=550 --free chain.alternation --bounds chain.alternation=0:3\n\nData: a CSV whose header names the varied key, the observed quantity (gap, wavelength_nm,\nhomo, lumo or energy.N) and optionally `uncertainty`; lines starting with # are comments."
    )]
    Fit(cli::fit::FitArgs),
    /// Join the JSON documents of a sharded sweep into the unsharded one.
    #[command(
        after_help = "Example:\n  chainwell merge part1.json part2.json part3.json --json > sweep.json"
    )]
    Merge(cli::merge::MergeArgs),
}

fn run(command: Command) -> Result<(), cli::CommandError> {
    match command {
        Command::Solve(a) => cli::solve::run(a),
        Command::Converge(a) => cli::converge::run(a),
        Command::Bands(a) => cli::bands::run(a),
        Command::Starter(a) => cli::starter::run(a),
        Command::Completions { shell } => {
            let mut cmd = <Cli as clap::CommandFactory>::command();
            let mut buf = Vec::new();
            clap_complete::generate(shell, &mut cmd, "chainwell", &mut buf);
            Ok(cli::Outcome::printed(
                String::from_utf8_lossy(&buf).into_owned(),
                vec![],
            ))
        }
        Command::Sweep(a) => cli::sweep::run(a),
        Command::Fit(a) => cli::fit::run(a),
        Command::Merge(a) => cli::merge::run(a),
    }?
    .finish()
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            let _ = e.print();
            return ExitCode::from(if e.use_stderr() { 2 } else { 0 });
        }
    };
    match run(cli.command) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("{e}");
            ExitCode::from(e.exit_code())
        }
    }
}
