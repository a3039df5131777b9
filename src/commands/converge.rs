//! `chainwell converge`: the levels on a sequence of grids, their observed
//! order of convergence, and the levels whose order falls short.

use std::fmt::Write;
use std::path::Path;

use serde_json::json;

use super::solve::solve_error;
use super::CommandError;
use crate::eigen::EigenParams;
use crate::input::{self, Model, Override};
use crate::report;
use crate::study::converge::{self, Convergence};

/// Options of `chainwell converge`.
#[derive(Debug, Clone)]
pub struct ConvergeOptions {
    /// `--set` overrides.
    pub overrides: Vec<Override>,
    /// Number of grids (at least 3), the finest being the input's.
    pub grids: usize,
    /// Print JSON instead of a table.
    pub json: bool,
    /// `--plot`: error against spacing on log-log axes.
    pub figure: super::figure::FigureOptions,
}

/// Runs the study and returns the model and its result.
pub fn study(path: &Path, opts: &ConvergeOptions) -> Result<(Model, Convergence), CommandError> {
    let (model, source) = input::load(path, &opts.overrides)?;
    let conv = converge::converge(&model, opts.grids, &EigenParams::default())
        .map_err(|e| solve_error(&model, &source, e))?;
    Ok((model, conv))
}

/// Runs `chainwell converge` and returns the text for stdout.
pub fn run(path: &Path, opts: &ConvergeOptions) -> Result<String, CommandError> {
    let (model, conv) = study(path, opts)?;
    opts.figure.kind(&["errors"])?;
    opts.figure
        .render(&super::figure::converge(&model, &conv))?;
    let u = &model.units;
    if opts.json {
        let doc = json!({
            "format": "chainwell.converge/1",
            "program": report::json::program(),
            "units": u.to_json(),
            "points": conv.points,
            "spacings": conv.spacings.iter().map(|h| u.length_out(*h)).collect::<Vec<_>>(),
            "expected_order": conv.expected_order,
            "roundoff_floor": u.energy_out(conv.roundoff_floor),
            "levels": conv.rows.iter().map(|r| json!({
                "n": r.n,
                "energies": r.energies.iter().map(|e| u.energy_out(*e)).collect::<Vec<_>>(),
                "orders": r.orders,
                "extrapolated": u.energy_out(r.extrapolated),
                "errors": r.errors.iter().map(|e| u.energy_out(*e)).collect::<Vec<_>>(),
                "short_of_expected_order": r.short,
            })).collect::<Vec<_>>(),
        });
        let mut s =
            serde_json::to_string_pretty(&doc).map_err(|e| CommandError::Compute(e.to_string()))?;
        s.push('\n');
        return Ok(s);
    }
    let e = u.energy.label();
    let mut s = String::new();
    let _ = writeln!(
        s,
        "grids (points): {}; expected order {}; round-off floor {:.1e} {e}",
        conv.points
            .iter()
            .map(|p| p.to_string())
            .collect::<Vec<_>>()
            .join(", "),
        conv.expected_order,
        u.energy_out(conv.roundoff_floor)
    );
    for r in &conv.rows {
        let _ = writeln!(
            s,
            "\nlevel {}{}",
            r.n,
            if r.short {
                "   <- order falls short"
            } else {
                ""
            }
        );
        let _ = writeln!(
            s,
            "  {:>8}  {:>12}  {:>20}  {:>10}  {:>6}",
            "points",
            "spacing",
            format!("energy ({e})"),
            "error",
            "order"
        );
        for (i, en) in r.energies.iter().enumerate() {
            let order = if i >= 2 {
                r.orders[i - 2].map_or("-".to_string(), |q| format!("{q:.2}"))
            } else {
                String::new()
            };
            let _ = writeln!(
                s,
                "  {:>8}  {:>12.6e}  {:>20.12}  {:>10.2e}  {:>6}",
                conv.points[i],
                u.length_out(conv.spacings[i]),
                u.energy_out(*en),
                u.energy_out(r.errors[i]),
                order
            );
        }
        let _ = writeln!(s, "  extrapolated {:.12} {e}", u.energy_out(r.extrapolated));
    }
    let short: Vec<String> = conv
        .rows
        .iter()
        .filter(|r| r.short)
        .map(|r| r.n.to_string())
        .collect();
    if !short.is_empty() {
        let _ = writeln!(
            s,
            "\nlevels {} converge slower than order {}: a jump in the potential or a grid too coarse for them",
            short.join(", "),
            conv.expected_order
        );
    }
    Ok(s)
}
