//! `chainwell sweep`: one solve per case of a grid of `--vary` values.

use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

use chainwell::input::Document;
use chainwell::report;
use chainwell::study::cases::{CaseError, CaseGrid, Shard, Vary};
use chainwell::study::checkpoint::{self, Saver};
use chainwell::study::data::Data;
use chainwell::study::merge;
use chainwell::study::quantity::Quantity;
use chainwell::study::runner::Runner;
use chainwell::study::sweep::{self, SweepError, SweepResult, SweepRow, SweepSpec};
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use super::figure::FigureArgs;
use super::{parse_overrides, CommandError, Outcome, Plan};

/// Flags of `chainwell sweep`.
#[derive(clap::Args, Debug)]
pub struct SweepArgs {
    /// The input file (TOML).
    pub input: PathBuf,
    /// A key and its values: KEY=START:STOP[:STEP] or KEY=V1,V2,... (repeat for a grid).
    #[arg(long = "vary", value_name = "KEY=VALUES")]
    pub vary: Vec<String>,
    /// Override an input value: KEY=VALUE (e.g. grid.points=20000).
    #[arg(long = "set", value_name = "KEY=VALUE")]
    pub set: Vec<String>,
    /// Run only cases I, I+N, I+2N, ... (I = 1..N), for job arrays; join with `chainwell merge`.
    #[arg(long, value_name = "I/N")]
    pub shard: Option<String>,
    /// Print one JSON document on stdout.
    #[arg(long)]
    pub json: bool,
    /// Also write a tidy CSV (one line per case and level).
    #[arg(long, value_name = "FILE")]
    pub csv: Option<PathBuf>,
    /// Keep the JSON document in FILE, updated while the sweep runs.
    #[arg(long, value_name = "FILE")]
    pub save: Option<PathBuf>,
    /// Continue the interrupted sweep saved in FILE (and keep saving to it).
    #[arg(long, value_name = "FILE")]
    pub resume: Option<PathBuf>,
    /// Measured values to draw on the figure: a CSV like fit data (the
    /// varied key, one quantity, optional uncertainty).
    #[arg(long, value_name = "FILE")]
    pub data: Option<PathBuf>,
    /// Figure options (see `chainwell solve --help`).
    #[command(flatten)]
    pub plot: FigureArgs,
}

/// The figure kind that shows the quantity of measured data.
fn kind_for(q: Quantity) -> &'static str {
    match q {
        Quantity::Gap => "gap",
        Quantity::WavelengthNm => "wavelength",
        _ => "levels",
    }
}

/// Reads `--data` and checks it against the figure and the varied key,
/// before any case runs; the figure kind follows the data's quantity
/// unless `--figure` names one.
fn measured(
    args: &SweepArgs,
    figure: &mut Option<super::figure::FigurePlan>,
    varies: &[Vary],
) -> Result<Option<Data>, CommandError> {
    let Some(path) = &args.data else {
        return Ok(None);
    };
    let Some(plan) = figure.as_mut() else {
        return Err(CommandError::Usage(format!(
            "--data {}: measured values are drawn on the figure; add --plot FILE",
            path.display()
        )));
    };
    let data = Data::read(path).map_err(|e| {
        CommandError::Usage(e.to_string().trim_start_matches("error: ").to_string())
    })?;
    let key = varies.first().map(|v| v.key.as_str()).unwrap_or_default();
    if data.key != key {
        return Err(CommandError::Usage(format!(
            "--data {}: its key column is {}, the figure's x axis is {key}",
            path.display(),
            data.key
        )));
    }
    let want = kind_for(data.quantity);
    if args.plot.figure.is_none() {
        plan.kind = want;
    } else if plan.kind != want {
        return Err(CommandError::Usage(format!(
            "--data {}: it holds {}, drawn on --figure {want}, not {}",
            path.display(),
            data.quantity.name(),
            plan.kind
        )));
    }
    Ok(Some(data))
}

/// Seconds between progress saves.
pub const SAVE_EVERY: Duration = Duration::from_secs(5);

/// Seconds of running after which a progress bar appears.
pub const BAR_AFTER: Duration = Duration::from_secs(1);

/// Maps a failed case to a command error, locating input faults.
fn case_error(spec: &SweepSpec, e: SweepError) -> CommandError {
    sweep::locate_error(spec, e).into()
}

/// A closed set of warnings: each distinct text once, with the first case
/// that gave it.
fn collect_warnings(result: &SweepResult) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    let mut seen: Vec<&str> = Vec::new();
    for row in &result.rows {
        for w in &row.warnings {
            if !seen.contains(&w.as_str()) {
                seen.push(w);
                let label = result
                    .header
                    .keys
                    .iter()
                    .zip(&row.values)
                    .map(|(k, v)| format!("{k}={}", v.toml_text()))
                    .collect::<Vec<_>>()
                    .join(" ");
                out.push(format!("case {label} (and maybe others): {w}"));
            }
        }
    }
    out
}

/// Renders a result as the command prints it.
pub fn render(result: &SweepResult, json: bool) -> String {
    if json {
        report::sweep::sweep_text(result)
    } else {
        report::sweep::sweep_table(result)
    }
}

/// Writes the CSV file, when asked.
pub fn write_csv(result: &SweepResult, csv: Option<&Path>) -> Result<(), CommandError> {
    if let Some(path) = csv {
        chainwell::output::write_atomic(path, report::sweep::sweep_csv(result).as_bytes())
            .map_err(|e| CommandError::Compute(format!("cannot write {}: {e}", path.display())))?;
    }
    Ok(())
}

/// Runs `chainwell sweep`.
pub fn run(args: SweepArgs) -> Result<Outcome, CommandError> {
    let overrides = parse_overrides(&args.set)?;
    let mut figure = args.plot.check(&["levels", "gap", "wavelength"])?;
    if args.vary.is_empty() {
        return Err(CommandError::Usage(
            "sweep needs at least one --vary KEY=START:STOP[:STEP] or --vary KEY=V1,V2,...".into(),
        ));
    }
    let usage = |e: CaseError| CommandError::Usage(e.to_string());
    let varies = args
        .vary
        .iter()
        .map(|v| Vary::parse(v))
        .collect::<Result<Vec<_>, _>>()
        .map_err(usage)?;
    let data = measured(&args, &mut figure, &varies)?;
    let grid = CaseGrid::new(varies).map_err(usage)?;
    let shard = args
        .shard
        .as_deref()
        .map(Shard::parse)
        .transpose()
        .map_err(usage)?;
    let spec = SweepSpec {
        document: Document::open(&args.input)?,
        overrides,
        grid,
        shard,
    };
    let prepared = sweep::prepare(&spec).map_err(|e| case_error(&spec, e))?;
    // The checkpoint: --save, else the --resume file itself (which is
    // then both read and rewritten, by design).
    let save_path = args.save.as_deref().or(args.resume.as_deref());
    let mut plan = Plan::new();
    plan.document(&args.input, &spec.document);
    if let Some(r) = &args.resume {
        plan.input("--resume", r);
    }
    match (&args.save, &args.resume) {
        (Some(s), Some(r)) if chainwell::files::same_file(s, r) => {}
        (Some(s), _) => {
            plan.output("--save", Some(s));
        }
        _ => {}
    }
    plan.output("--csv", args.csv.as_deref())
        .output("--plot", figure.as_ref().map(|f| f.path.as_path()));
    if args.save.is_none() {
        if let Some(r) = &args.resume {
            chainwell::files::check_output("--resume", r).map_err(CommandError::Usage)?;
        }
    }
    plan.check()?;
    let mut done: Vec<SweepRow> = Vec::new();
    if let Some(file) = &args.resume {
        let previous = SweepResult::read(file).map_err(CommandError::Usage)?;
        if let Some(what) = merge::differs(&previous.header, &prepared.header) {
            return Err(CommandError::Usage(format!(
                "--resume {}: the file is from another sweep ({what} differs)",
                file.display()
            )));
        }
        if previous.header.shard != prepared.header.shard {
            return Err(CommandError::Usage(format!(
                "--resume {}: the file is from another shard",
                file.display()
            )));
        }
        // Every row was checked against its case when the file was read.
        done = previous.rows;
    }
    // One run at a time saves to a file: a second is refused, not left to
    // overwrite the first one's rows.
    let _lock = save_path
        .map(chainwell::output::Lock::acquire)
        .transpose()
        .map_err(CommandError::Usage)?;
    let saver = save_path.map(|p| Saver::new(p, SAVE_EVERY));
    let interactive =
        (!args.json || std::io::stdout().is_terminal()) && std::io::stderr().is_terminal();
    let bar = ProgressBar::with_draw_target(
        Some(prepared.cases.len() as u64),
        ProgressDrawTarget::hidden(),
    );
    if let Ok(style) =
        ProgressStyle::with_template("{bar:40} {pos}/{len} cases, {elapsed} ({eta} left)")
    {
        bar.set_style(style);
    }
    let started = Instant::now();
    let progress = |finished: usize, _total: usize| {
        if interactive && bar.is_hidden() && started.elapsed() > BAR_AFTER {
            bar.set_draw_target(ProgressDrawTarget::stderr());
        }
        bar.set_position(finished as u64);
    };
    let render_doc = |r: &SweepResult| report::sweep::sweep_text(r);
    let mut runner = Runner::new()
        .with_stop(checkpoint::interrupt_flag())
        .with_progress(&progress);
    if let Some(s) = &saver {
        runner = runner.with_checkpoint(s, &render_doc);
    }
    let result = sweep::run(&prepared, done, &runner).map_err(|e| case_error(&spec, e));
    bar.finish_and_clear();
    let result = result?;
    // A checkpoint that could not be written loses nothing: the rows are
    // here, the final save is tried once more, and when it fails too the
    // document is printed for the user to keep.
    let mut warnings = collect_warnings(&result);
    if let Some(m) = runner.save_error() {
        warnings.push(format!("a progress save failed: {m}"));
    }
    if let Some(s) = &saver {
        if let Err(e) = s.save(true, || report::sweep::sweep_text(&result)) {
            return Ok(Outcome {
                stdout: report::sweep::sweep_text(&result),
                warnings,
                failure: Some(CommandError::Compute(format!(
                    "cannot write {}: {e}; the document of the {} finished cases is printed on stdout instead (keep it with > FILE and continue with --resume FILE)",
                    s.path().display(),
                    result.rows.len()
                ))),
            });
        }
    }
    write_csv(&result, args.csv.as_deref())?;
    if let Some(plan) = &figure {
        if !result.rows.is_empty() {
            plan.render(&report::figure::sweep(&result, plan.kind, data.as_ref()))?;
        }
    }
    let failure = (!result.complete).then(|| {
        let place = saver
            .as_ref()
            .map(|s| {
                format!(
                    "; saved to {0}, continue with --resume {0}",
                    s.path().display()
                )
            })
            .unwrap_or_else(|| "; rerun with --save FILE to keep the finished cases".into());
        CommandError::Compute(format!(
            "interrupted: {} of {} cases finished{place}",
            result.rows.len(),
            prepared.cases.len()
        ))
    });
    Ok(Outcome {
        stdout: render(&result, args.json),
        warnings,
        failure,
    })
}
