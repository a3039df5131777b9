//! Readable tables for the terminal.

use std::fmt::Write;

use crate::input::Model;
use crate::solve::Solution;

/// The table `chainwell solve` prints without `--json`.
pub fn solve_table(model: &Model, sol: &Solution) -> String {
    let u = &model.units;
    let e = u.energy.label();
    let l = u.length.label();
    let mut s = String::new();
    if let Some(t) = &model.title {
        let _ = writeln!(s, "{t}");
    }
    let _ = writeln!(
        s,
        "grid: {} points, spacing {:.6} {l}, order {}, {:?}; box length {:.6} {l}",
        sol.grid.points,
        u.length_out(sol.grid.spacing),
        model.grid.order,
        model.grid.scheme,
        u.length_out(sol.box_length)
    );
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "{:>5}  {:>18}  {:>5}  {:>18}  {:>10}",
        "n",
        format!("energy ({e})"),
        "nodes",
        format!("box ({e})"),
        "ratio"
    );
    for lv in &sol.levels {
        let (b, r) = match lv.box_energy {
            Some(b) => (
                format!("{:>18.10}", u.energy_out(b)),
                format!("{:>10.6}", lv.energy / b),
            ),
            None => (format!("{:>18}", "-"), format!("{:>10}", "-")),
        };
        let _ = writeln!(
            s,
            "{:>5}  {:>18.10}  {:>5}  {b}  {r}",
            lv.n,
            u.energy_out(lv.energy),
            lv.nodes
        );
    }
    if let Some(groups) = crate::solve::ring_degeneracies(sol) {
        ring_note(&mut s, model, &groups);
    }
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "eigenpairs: {} (residual ratio {:.3}, orthogonality ratio {:.3}); solve {:.3} s",
        sol.diagnostics.method,
        sol.diagnostics.residual_ratio,
        sol.diagnostics.orthogonality_ratio,
        sol.timing.solve_s
    );
    s
}

/// Plain-language lines on the degenerate levels of a ring.
fn ring_note(s: &mut String, model: &Model, groups: &[crate::bands::Degeneracy]) {
    let u = &model.units;
    let degenerate: Vec<_> = groups.iter().filter(|g| g.is_degenerate()).collect();
    let _ = writeln!(s);
    if degenerate.is_empty() {
        let _ = writeln!(
            s,
            "ring: no degenerate levels among those computed (something breaks the ring's symmetry)"
        );
        return;
    }
    let _ = writeln!(
        s,
        "ring: {} of the {} groups of levels are degenerate (on a ring, states running either way round share an energy):",
        degenerate.len(),
        groups.len()
    );
    for g in degenerate {
        let list = g
            .levels
            .iter()
            .map(|n| n.to_string())
            .collect::<Vec<_>>()
            .join(", ");
        let _ = writeln!(
            s,
            "  levels {list}: {:.10} {e} (split by {:.1e} {e})",
            u.energy_out(g.energy),
            u.energy_out(g.spread),
            e = u.energy.label()
        );
    }
    if groups.last().is_some_and(|g| !g.is_degenerate()) && groups.len() > 1 {
        let _ = writeln!(
            s,
            "  (the highest computed level may be one of a pair whose partner was not computed)"
        );
    }
}
