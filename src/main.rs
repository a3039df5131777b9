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

/// Figure options, shared by every command.
#[derive(clap::Args, Debug, Clone, Default)]
struct PlotArgs {
    /// Draw a figure into FILE (.svg or .png).
    #[arg(long, value_name = "FILE")]
    plot: Option<PathBuf>,
    /// Which figure, where the command draws more than one.
    #[arg(long, value_name = "KIND")]
    figure: Option<String>,
    /// Figure size: WxH in pixels (1200x800) or WxHcm (16x10cm).
    #[arg(long, value_name = "SIZE")]
    size: Option<String>,
    /// Dots per inch for sizes in cm (default 300).
    #[arg(long)]
    dpi: Option<f64>,
    /// Type size in points (default 12).
    #[arg(long, value_name = "PT")]
    font_pt: Option<f64>,
    /// Line width in points (default 1.2).
    #[arg(long, value_name = "PT")]
    line_pt: Option<f64>,
    /// Energy window LO:HI, input energy units.
    #[arg(long, value_name = "LO:HI", allow_hyphen_values = true)]
    energy_window: Option<String>,
    /// Horizontal window LO:HI, in the figure's x unit.
    #[arg(long, value_name = "LO:HI", allow_hyphen_values = true)]
    x_window: Option<String>,
    /// Levels to show, e.g. 1,2,5.
    #[arg(long, value_name = "N,N,...")]
    levels: Option<String>,
}

impl PlotArgs {
    fn options(self) -> commands::figure::FigureOptions {
        commands::figure::FigureOptions {
            path: self.plot,
            kind: self.figure,
            size: self.size,
            dpi: self.dpi,
            font_pt: self.font_pt,
            line_pt: self.line_pt,
            energy_window: self.energy_window,
            x_window: self.x_window,
            levels: self.levels,
        }
    }
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
        /// Skip the error estimate (two coarser solves) when only speed matters.
        #[arg(long)]
        no_estimate: bool,
        /// Figures: states (default), density, spectrum.
        #[command(flatten)]
        plot: PlotArgs,
    },
    /// The levels on grids whose spacing halves, with the observed order of
    /// convergence; flags levels whose order falls short of the scheme's.
    #[command(
        after_help = "Example:\n  chainwell converge potentials/harmonic_well.toml --grids 4"
    )]
    Converge {
        /// The input file (TOML); its grid is the finest.
        input: PathBuf,
        /// Override an input value: KEY=VALUE.
        #[arg(long = "set", value_name = "KEY=VALUE")]
        set: Vec<String>,
        /// Number of grids (at least 3).
        #[arg(long, default_value_t = 4)]
        grids: usize,
        /// Print one JSON document on stdout.
        #[arg(long)]
        json: bool,
        /// Figure: errors (error against spacing, log-log).
        #[command(flatten)]
        plot: PlotArgs,
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
        /// Figure: bands (E against k, gaps shaded, finite chains beside).
        #[command(flatten)]
        plot: PlotArgs,
    },
    /// Write a commented input to start from (box, chain, ring, wells,
    /// table, formula, polymer); without KIND, list them.
    #[command(
        after_help = "Examples:\n  chainwell starter\n  chainwell starter chain -o my_chain.toml"
    )]
    Starter {
        /// The kind of system.
        kind: Option<String>,
        /// Write to FILE instead of stdout.
        #[arg(short, long, value_name = "FILE")]
        output: Option<PathBuf>,
        /// Replace FILE if it exists.
        #[arg(long)]
        force: bool,
    },
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
        /// Figure options (see `chainwell solve --help`).
        #[command(flatten)]
        plot: PlotArgs,
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
        /// Figure options (see `chainwell solve --help`).
        #[command(flatten)]
        plot: PlotArgs,
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
        Command::Starter {
            kind,
            output,
            force,
        } => print_stdout(&commands::starter::run(
            kind.as_deref(),
            output.as_deref(),
            force,
        )?),
        Command::Completions { shell } => {
            let mut cmd = <Cli as clap::CommandFactory>::command();
            let mut buf = Vec::new();
            clap_complete::generate(shell, &mut cmd, "chainwell", &mut buf);
            print_stdout(&String::from_utf8_lossy(&buf))
        }
        Command::Solve {
            input,
            set,
            json,
            no_timing,
            csv,
            no_estimate,
            plot,
        } => {
            let opts = commands::solve::SolveOptions {
                overrides: commands::parse_overrides(&set)?,
                json,
                no_timing,
                csv_dir: csv,
                no_estimate,
                figure: plot.options(),
            };
            let (out, warnings) = commands::solve::run(&input, &opts)?;
            for w in warnings {
                eprintln!("warning: {w}");
            }
            print_stdout(&out)
        }
        Command::Converge {
            input,
            set,
            grids,
            json,
            plot,
        } => {
            let opts = commands::converge::ConvergeOptions {
                overrides: commands::parse_overrides(&set)?,
                grids,
                json,
                figure: plot.options(),
            };
            print_stdout(&commands::converge::run(&input, &opts)?)
        }
        Command::Bands {
            input,
            set,
            kpoints,
            json,
            csv,
            finite,
            no_timing,
            plot,
        } => {
            let opts = commands::bands::BandsOptions {
                overrides: commands::parse_overrides(&set)?,
                kpoints,
                json,
                csv,
                finite,
                no_timing,
                figure: plot.options(),
            };
            let (out, warnings) = commands::bands::run(&input, &opts)?;
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
            plot,
        } => {
            let opts = commands::sweep::SweepOptions {
                overrides: commands::parse_overrides(&set)?,
                vary,
                shard,
                json,
                csv,
                save,
                resume,
                figure: plot.options(),
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
            plot,
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
                figure: plot.options(),
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
