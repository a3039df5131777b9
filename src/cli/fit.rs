//! `chainwell fit`: fitted input values from a measured series, or (with
//! `--target`) the value of one key that gives a wanted quantity.

use std::path::PathBuf;

use chainwell::input::{Document, Override};
use chainwell::report;
use chainwell::study::checkpoint::{self, Saver};
use chainwell::study::fit::{self, Data, FitError, FitProgress, FitSpec, Free};
use chainwell::study::quantity::Quantity;
use chainwell::study::runner::Runner;
use chainwell::study::target::{self, TargetError, TargetSpec};
use serde_json::{json, Value};

use super::figure::FigureArgs;
use super::{json_text, parse_overrides, CommandError, Outcome, Plan};

/// Flags of `chainwell fit`.
#[derive(clap::Args, Debug)]
pub struct FitArgs {
    /// The input file (TOML).
    pub input: PathBuf,
    /// The measured series (CSV).
    #[arg(long, value_name = "FILE.csv")]
    pub data: Option<PathBuf>,
    /// The keys to adjust, comma-separated; start values come from the input or --set.
    #[arg(long, value_name = "KEY[,KEY...]")]
    pub free: Vec<String>,
    /// Bounds of a free key: KEY=LO:HI (either side may be left empty).
    #[arg(long, value_name = "KEY=LO:HI")]
    pub bounds: Vec<String>,
    /// Solve for the one free key that gives QUANTITY=VALUE (e.g. wavelength_nm=550).
    #[arg(long, value_name = "QUANTITY=VALUE")]
    pub target: Option<String>,
    /// Override an input value: KEY=VALUE.
    #[arg(long = "set", value_name = "KEY=VALUE")]
    pub set: Vec<String>,
    /// Print one JSON document on stdout.
    #[arg(long)]
    pub json: bool,
    /// Also write the JSON document to FILE (the best values so far when interrupted).
    #[arg(long, value_name = "FILE")]
    pub save: Option<PathBuf>,
    /// Start from the values of an earlier (interrupted) fit saved in FILE.
    #[arg(long, value_name = "FILE")]
    pub resume: Option<PathBuf>,
    /// Figure options (see `chainwell solve --help`).
    #[command(flatten)]
    pub plot: FigureArgs,
}

/// A `--bounds` flag: key, lower and upper bound.
type Bound = (String, Option<f64>, Option<f64>);

fn parse_bounds(flags: &[String]) -> Result<Vec<Bound>, CommandError> {
    flags
        .iter()
        .map(|f| {
            let bad = || CommandError::Usage(format!("--bounds {f}: expected KEY=LO:HI (either side may be empty), e.g. chain.alternation=0:3"));
            let (k, r) = f.split_once('=').ok_or_else(bad)?;
            let (lo, hi) = r.split_once(':').ok_or_else(bad)?;
            let num = |t: &str| -> Result<Option<f64>, CommandError> {
                let t = t.trim();
                if t.is_empty() {
                    Ok(None)
                } else {
                    t.parse::<f64>().ok().filter(|x| x.is_finite()).map(Some).ok_or_else(bad)
                }
            };
            let (lo, hi) = (num(lo)?, num(hi)?);
            if let (Some(a), Some(b)) = (lo, hi) {
                if a >= b {
                    return Err(CommandError::Usage(format!("--bounds {f}: LO must be below HI")));
                }
            }
            Ok((k.trim().to_string(), lo, hi))
        })
        .collect()
}

fn frees(
    args: &FitArgs,
    document: &Document,
    overrides: &[Override],
    resume: &[(String, f64)],
) -> Result<Vec<Free>, CommandError> {
    let bounds = parse_bounds(&args.bounds)?;
    let keys: Vec<String> = args
        .free
        .iter()
        .flat_map(|f| f.split(','))
        .map(|k| k.trim().to_string())
        .filter(|k| !k.is_empty())
        .collect();
    if keys.is_empty() {
        return Err(CommandError::Usage(
            "fit needs --free KEY[,KEY...]: the input keys to adjust".into(),
        ));
    }
    for (k, _, _) in &bounds {
        if !keys.contains(k) {
            return Err(CommandError::Usage(format!(
                "--bounds {k}=...: {k} is not among the --free keys"
            )));
        }
    }
    let mut out = Vec::new();
    for (i, key) in keys.iter().enumerate() {
        if keys[..i].contains(key) {
            return Err(CommandError::Usage(format!(
                "--free {key}: the key is named twice"
            )));
        }
        let (start, integer) = match fit::start_value(document, overrides, key)? {
            Some(v) => v,
            None => {
                return Err(CommandError::Usage(format!(
                    "--free {key}: the input gives no number for {key}; give a start value with --set {key}=VALUE"
                )))
            }
        };
        if integer {
            return Err(CommandError::Usage(format!(
                "--free {key}: {key} takes whole numbers and cannot be fitted; vary it with `chainwell sweep` instead"
            )));
        }
        let start = resume
            .iter()
            .find(|(k, _)| k == key)
            .map_or(start, |(_, v)| *v);
        let (lower, upper) = bounds
            .iter()
            .find(|(k, _, _)| k == key)
            .map_or((None, None), |(_, a, b)| (*a, *b));
        if lower.is_some_and(|l| start < l) || upper.is_some_and(|u| start > u) {
            return Err(CommandError::Usage(format!(
                "--free {key}: the start value {start} lies outside --bounds; change it with --set {key}=VALUE"
            )));
        }
        out.push(Free {
            key: key.clone(),
            start,
            lower,
            upper,
        });
    }
    Ok(out)
}

fn text(doc: &Value) -> String {
    json_text(doc).unwrap_or_default()
}

fn eval_error(e: fit::EvalError) -> CommandError {
    match e {
        fit::EvalError::Input(i) => CommandError::Input(i),
        other => CommandError::Compute(other.to_string()),
    }
}

fn resume_values(args: &FitArgs) -> Result<Vec<(String, f64)>, CommandError> {
    let Some(file) = &args.resume else {
        return Ok(vec![]);
    };
    let bad = |m: String| CommandError::Usage(format!("--resume {}: {m}", file.display()));
    let bytes =
        chainwell::files::read_capped(file).map_err(|e| bad(format!("cannot read: {e}")))?;
    let text = String::from_utf8(bytes)
        .map_err(|_| bad(format!("not a {} document (not UTF-8 text)", fit::FORMAT)))?;
    let doc: Value = serde_json::from_str(&text).map_err(|e| bad(format!("not JSON: {e}")))?;
    if doc["format"] != fit::FORMAT {
        return Err(bad(format!("not a {} document", fit::FORMAT)));
    }
    doc["parameters"]
        .as_array()
        .ok_or_else(|| bad("no `parameters`".into()))?
        .iter()
        .map(|p| {
            Ok((
                p["key"].as_str().unwrap_or_default().to_string(),
                p["value"]
                    .as_f64()
                    .ok_or_else(|| bad("a parameter has no value".into()))?,
            ))
        })
        .collect()
}

/// Runs `chainwell fit`.
pub fn run(args: FitArgs) -> Result<Outcome, CommandError> {
    let overrides = parse_overrides(&args.set)?;
    let figure = args.plot.check(&["fit"])?;
    let document = Document::open(&args.input)?;
    let (base, source) = document.model(&overrides)?;
    let units = base.units.to_json();
    let mut plan = Plan::new();
    plan.document(&args.input, &document);
    if let Some(d) = &args.data {
        plan.input("--data", d);
    }
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
    plan.output("--plot", figure.as_ref().map(|f| f.path.as_path()));
    if args.save.is_none() {
        if let Some(r) = &args.resume {
            chainwell::files::check_output("--resume", r).map_err(CommandError::Usage)?;
        }
    }
    plan.check()?;
    let resume = resume_values(&args)?;
    let free = frees(&args, &document, &overrides, &resume)?;
    let stop = checkpoint::interrupt_flag();
    let save_path = args.save.as_deref().or(args.resume.as_deref());
    let _lock = save_path
        .map(chainwell::output::Lock::acquire)
        .transpose()
        .map_err(CommandError::Usage)?;
    let saver = save_path.map(|p| Saver::new(p, std::time::Duration::ZERO));
    let save = |doc: &Value| -> Result<(), CommandError> {
        if let Some(s) = &saver {
            s.save(true, || text(doc)).map_err(|e| {
                CommandError::Compute(format!("cannot write {}: {e}", s.path().display()))
            })?;
        }
        Ok(())
    };
    if let Some(t) = &args.target {
        if args.data.is_some() {
            return Err(CommandError::Usage("--target and --data cannot be combined: a target solves for one value, a fit matches a series".into()));
        }
        let bad = || {
            CommandError::Usage(format!(
                "--target {t}: expected QUANTITY=VALUE, e.g. wavelength_nm=550"
            ))
        };
        let (q, v) = t.split_once('=').ok_or_else(bad)?;
        let quantity =
            Quantity::parse(q).map_err(|e| CommandError::Usage(format!("--target {t}: {e}")))?;
        let target: f64 = v
            .trim()
            .parse()
            .ok()
            .filter(|x: &f64| x.is_finite())
            .ok_or_else(bad)?;
        let [f] = free.as_slice() else {
            return Err(CommandError::Usage(format!(
                "--target needs exactly one --free key, not {}",
                free.len()
            )));
        };
        let (Some(lo), Some(hi)) = (f.lower, f.upper) else {
            return Err(CommandError::Usage(format!(
                "--target needs both bounds of {0}: --bounds {0}=LO:HI",
                f.key
            )));
        };
        let spec = TargetSpec {
            document,
            overrides: overrides.clone(),
            key: f.key.clone(),
            bounds: (lo, hi),
            quantity,
            target,
            tolerance: 1e-10 * (hi - lo),
        };
        let r = target::solve_target(&spec, Some(stop)).map_err(|e| match e {
            TargetError::Eval { key, at, source } => match *source {
                fit::EvalError::Input(i) => CommandError::Input(i),
                s => CommandError::Compute(format!("{key}={at}: {s}")),
            },
            e @ TargetError::Unreachable { .. } => CommandError::Usage(e.to_string()),
            e => CommandError::Compute(e.to_string()),
        })?;
        let input = json!({"file": source.name, "text": source.text, "overrides": source.overrides, "bounds": [lo, hi]});
        let doc = report::target::target_document(&r, &units, &input);
        save(&doc)?;
        let stdout = if args.json {
            text(&doc)
        } else {
            report::target::target_table(&r)
        };
        return Ok(Outcome::printed(stdout, vec![]));
    }
    let data_path = args.data.as_ref().ok_or_else(|| {
        CommandError::Usage("fit needs --data FILE.csv (or --target QUANTITY=VALUE)".into())
    })?;
    let data = Data::read(data_path).map_err(|e| {
        CommandError::Usage(e.to_string().trim_start_matches("error: ").to_string())
    })?;
    if let Some(f) = free.iter().find(|f| data.keys.contains(&f.key)) {
        return Err(CommandError::Usage(format!(
            "--free {0}: {0} is a column of the data (each row sets it)",
            f.key
        )));
    }
    let input = json!({
        "file": source.name, "text": source.text, "overrides": source.overrides,
        "data": data.file, "free": free.iter().map(|f| json!({"key": f.key, "start": f.start, "lower": f.lower, "upper": f.upper})).collect::<Vec<_>>(),
    });
    let spec = FitSpec {
        document,
        overrides,
        data,
        free,
    };
    let render_progress = |p: &FitProgress| {
        text(&report::fit::fit_progress_document(
            &spec, p, &units, &input,
        ))
    };
    let mut runner = Runner::new().with_stop(stop);
    if let Some(s) = &saver {
        runner = runner.with_checkpoint(s, &render_progress);
    }
    match fit::fit(&spec, &runner) {
        Ok(r) => {
            let doc = report::fit::fit_document(&r, &units, &input);
            save(&doc)?;
            if let Some(plan) = &figure {
                let energy = units["energy"].as_str().unwrap_or("eV");
                let length = units["length"].as_str().unwrap_or("angstrom");
                plan.render(&report::figure::fit(&r, length, energy))?;
            }
            let stdout = if args.json {
                text(&doc)
            } else {
                report::fit::fit_table(&r)
            };
            Ok(Outcome::printed(stdout, r.warnings.clone()))
        }
        Err(FitError::Interrupted { best, evaluations }) => {
            let progress = FitProgress { best, evaluations };
            let doc = report::fit::fit_progress_document(&spec, &progress, &units, &input);
            save(&doc)?;
            let place = saver
                .as_ref()
                .map(|s| {
                    format!(
                        "; best values so far saved to {0}, continue with --resume {0}",
                        s.path().display()
                    )
                })
                .unwrap_or_else(|| {
                    "; rerun with --save FILE to keep the best values so far".into()
                });
            Ok(Outcome {
                stdout: if args.json { text(&doc) } else { String::new() },
                warnings: vec![],
                failure: Some(CommandError::Compute(format!(
                    "interrupted after {evaluations} model evaluations{place}"
                ))),
            })
        }
        Err(FitError::Start(e)) => Err(match eval_error(*e) {
            CommandError::Compute(m) => CommandError::Compute(format!("at the start values: {m}")),
            other => other,
        }),
        Err(FitError::Eval { at, source }) => Err(match eval_error(*source) {
            CommandError::Input(mut i) => {
                i.message = format!("at {at}: {}", i.message);
                CommandError::Input(i)
            }
            CommandError::Compute(m) => CommandError::Compute(format!("at {at}: {m}")),
            other => other,
        }),
        Err(e @ FitError::TooFewRows { .. }) => Err(CommandError::Usage(e.to_string())),
        Err(e) => Err(CommandError::Compute(e.to_string())),
    }
}
