//! The `chainwell.converge/1` document and its table.

use std::fmt::Write;

use serde_json::{json, Value};

use super::envelope::{constants, program};
use crate::input::Model;
use crate::study::converge::Convergence;

/// The `chainwell.converge/1` document.
pub fn converge_document(model: &Model, conv: &Convergence) -> Value {
    let u = &model.units;
    json!({
        "format": "chainwell.converge/1",
        "program": program(),
        "constants": constants(),
        "units": u.to_json(),
        "points": conv.points,
        "spacings": conv.spacings.iter().map(|h| u.length_out(*h)).collect::<Vec<_>>(),
        "expected_order": conv.expected_order,
        "scheme_order": conv.scheme_order,
        "limited_by": conv.limited_by.map(|l| l.describe()),
        "roundoff_floor": u.energy_out(conv.roundoff_floor),
        "levels": conv.rows.iter().map(|r| json!({
            "n": r.n,
            "energies": r.energies.iter().map(|e| u.energy_out(*e)).collect::<Vec<_>>(),
            "orders": r.orders,
            "extrapolated": u.energy_out(r.extrapolated),
            "errors": r.errors.iter().map(|e| u.energy_out(*e)).collect::<Vec<_>>(),
            "short_of_expected_order": r.short,
            "expected": r.expected,
            "limited_by": r.limited_by.map(|l| l.describe()),
        })).collect::<Vec<_>>(),
    })
}

/// The table `chainwell converge` prints without `--json`.
pub fn converge_table(model: &Model, conv: &Convergence) -> String {
    let u = &model.units;
    let e = u.energy.label();
    let mut s = String::new();
    let _ = writeln!(
        s,
        "grids (points): {}; expected order {}{}; round-off floor {:.1e} {e}",
        conv.points
            .iter()
            .map(|p| p.to_string())
            .collect::<Vec<_>>()
            .join(", "),
        conv.expected_order,
        conv.limited_by.map_or(String::new(), |l| format!(
            " (the scheme's is {}, held down by {})",
            conv.scheme_order,
            l.describe()
        )),
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
            "\nlevels {} converge slower than order {}: the grids are too coarse for them (not yet in the asymptotic range) or near round-off",
            short.join(", "),
            conv.expected_order
        );
    }
    crate::report::no_negative_zero(&s)
}
