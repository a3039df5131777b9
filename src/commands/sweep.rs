//! `chainwell sweep`: one solve per case of a grid of `--vary` values.

use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use super::CommandError;
use crate::study::cases::{CaseGrid, Shard, Vary};
use crate::study::checkpoint::{self, Saver};
use crate::study::sweep::{self, Hooks, SweepError, SweepResult, SweepRow, SweepSpec};
use crate::study::{merge, render};

/// Options of `chainwell sweep`.
#[derive(Debug, Clone, Default)]
pub struct SweepOptions {
    /// `--set` overrides.
    pub overrides: Vec<crate::input::Override>,
    /// `--vary` flags as written.
    pub vary: Vec<String>,
    /// `--shard I/N`.
    pub shard: Option<String>,
    /// Print JSON instead of a table.
    pub json: bool,
    /// `--csv FILE`: tidy long CSV.
    pub csv: Option<PathBuf>,
    /// `--save FILE`: the document, kept up to date while the sweep runs.
    pub save: Option<PathBuf>,
    /// `--resume FILE`: continue the sweep saved there (and keep saving to it).
    pub resume: Option<PathBuf>,
    /// `--plot`: figures `levels` (default), `gap`, `wavelength` against
    /// the first varied key.
    pub figure: super::figure::FigureOptions,
}

/// What a command prints, and how it ends.
#[derive(Debug)]
pub struct Outcome {
    /// Text for stdout.
    pub stdout: String,
    /// Lines for stderr.
    pub warnings: Vec<String>,
    /// Set when the command stopped early (Ctrl-C): the output above is
    /// what was finished, and this is the error to exit with.
    pub failure: Option<CommandError>,
}

/// Seconds between progress saves.
pub const SAVE_EVERY: Duration = Duration::from_secs(5);

/// Seconds of running after which a progress bar appears.
pub const BAR_AFTER: Duration = Duration::from_secs(1);

/// Maps a failed case to a command error, locating input faults.
fn case_error(spec: &SweepSpec, e: SweepError) -> CommandError {
    match e {
        SweepError::Input(i) => CommandError::Input(i),
        SweepError::Document(m) => CommandError::Usage(m),
        SweepError::Solve {
            case,
            label,
            source,
        } => {
            let c = spec.grid.case(case);
            match sweep::load_case(spec, &c) {
                Ok((model, text)) => match super::solve::solve_error(&model, &text, source) {
                    CommandError::Input(i) => {
                        let mut i = sweep::vary_error(i, spec, &c);
                        if !i.location.file.starts_with("--vary") {
                            i.message = format!("case {label}: {}", i.message);
                        }
                        CommandError::Input(i)
                    }
                    CommandError::Compute(m) => CommandError::Compute(format!("case {label}: {m}")),
                    other => other,
                },
                Err(i) => CommandError::Input(i),
            }
        }
    }
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
        result.to_json_text()
    } else {
        render::sweep_table(result)
    }
}

/// Writes the CSV file, when asked.
pub fn write_csv(result: &SweepResult, csv: Option<&Path>) -> Result<(), CommandError> {
    if let Some(path) = csv {
        crate::output::write_atomic(path, render::sweep_csv(result).as_bytes())
            .map_err(|e| CommandError::Compute(format!("cannot write {}: {e}", path.display())))?;
    }
    Ok(())
}

/// Runs `chainwell sweep`.
pub fn run(path: &Path, opts: &SweepOptions) -> Result<Outcome, CommandError> {
    if opts.vary.is_empty() {
        return Err(CommandError::Usage(
            "sweep needs at least one --vary KEY=START:STOP[:STEP] or --vary KEY=V1,V2,...".into(),
        ));
    }
    let usage = |e: crate::study::cases::CaseError| CommandError::Usage(e.to_string());
    let varies = opts
        .vary
        .iter()
        .map(|v| Vary::parse(v))
        .collect::<Result<Vec<_>, _>>()
        .map_err(usage)?;
    let grid = CaseGrid::new(varies).map_err(usage)?;
    let shard = opts
        .shard
        .as_deref()
        .map(Shard::parse)
        .transpose()
        .map_err(usage)?;
    let spec = SweepSpec {
        path: path.to_path_buf(),
        overrides: opts.overrides.clone(),
        grid,
        shard,
    };
    let prepared = sweep::prepare(&spec).map_err(|e| case_error(&spec, e))?;
    let mut done: Vec<SweepRow> = Vec::new();
    if let Some(file) = &opts.resume {
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
        done = previous
            .rows
            .into_iter()
            .filter(|r| shard.is_none_or(|s| s.takes(r.case)) && r.case <= prepared.header.cases)
            .collect();
    }
    let saver = opts
        .save
        .as_deref()
        .or(opts.resume.as_deref())
        .map(|p| Saver::new(p, SAVE_EVERY));
    let stop = checkpoint::interrupt_flag();
    let interactive =
        (!opts.json || std::io::stdout().is_terminal()) && std::io::stderr().is_terminal();
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
    let header = prepared.header.clone();
    let save_error = std::sync::Mutex::new(None::<String>);
    let on_row = |rows: &[SweepRow], _total: usize| {
        if interactive && bar.is_hidden() && started.elapsed() > BAR_AFTER {
            bar.set_draw_target(ProgressDrawTarget::stderr());
        }
        bar.set_position(rows.len() as u64);
        if let Some(s) = &saver {
            let r = s.save(false, || {
                let mut sorted = rows.to_vec();
                sorted.sort_by_key(|r| r.case);
                SweepResult {
                    header: header.clone(),
                    rows: sorted,
                    complete: false,
                }
                .to_json_text()
            });
            if let Err(e) = r {
                *save_error.lock().unwrap_or_else(|p| p.into_inner()) =
                    Some(format!("cannot write {}: {e}", s.path().display()));
            }
        }
    };
    let hooks = Hooks {
        stop: Some(stop),
        on_row: Some(&on_row),
    };
    let result = sweep::run(&prepared, done, &hooks).map_err(|e| case_error(&spec, e));
    bar.finish_and_clear();
    let result = result?;
    if let Some(m) = save_error.into_inner().unwrap_or_else(|p| p.into_inner()) {
        return Err(CommandError::Compute(m));
    }
    if let Some(s) = &saver {
        s.save(true, || result.to_json_text()).map_err(|e| {
            CommandError::Compute(format!("cannot write {}: {e}", s.path().display()))
        })?;
    }
    write_csv(&result, opts.csv.as_deref())?;
    if opts.figure.path.is_some() && !result.rows.is_empty() {
        let kind = opts.figure.kind(&["levels", "gap", "wavelength"])?;
        opts.figure.render(&super::figure::sweep(&result, kind))?;
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
        stdout: render(&result, opts.json),
        warnings: collect_warnings(&result),
        failure,
    })
}
