//! Readable tables for the terminal.

use std::fmt::Write;

use crate::input::Model;
use crate::pipeline::Solution;

/// The table `chainwell solve` prints without `--json`.
pub fn solve_table(model: &Model, sol: &Solution) -> String {
    let u = &model.units;
    let e = u.energy.label();
    let l = u.length.label();
    let mut s = String::new();
    if let Some(t) = &model.title {
        let _ = writeln!(s, "{}", crate::input::escape_control(t));
    }
    let _ = writeln!(
        s,
        "grid: {} points, spacing {:.6} {l}, order {}, {:?}; box length {:.6} {l}",
        sol.grid.points,
        u.length_out(sol.grid.spacing),
        model.grid.order,
        model.grid.scheme,
        super::derived(u.length_out(sol.box_length))
    );
    let _ = writeln!(s);
    if let Some(r) = &sol.refinement {
        let tried: Vec<String> = r.steps.iter().map(|s| s.points.to_string()).collect();
        let _ = writeln!(
            s,
            "refined to relative tolerance {:e}: grids of {} points",
            r.tolerance,
            tried.join(", ")
        );
    }
    let _ = writeln!(
        s,
        "{:>5}  {:>18}  {:>10}  {:>5}  {:>18}  {:>10}",
        "n",
        format!("energy ({e})"),
        "+-",
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
        let err = match lv.error_estimate {
            Some(x) => format!("{:>10.1e}", u.energy_out(x)),
            None => format!("{:>10}", "-"),
        };
        let _ = writeln!(
            s,
            "{:>5}  {:>18.10}  {err}  {:>5}  {b}  {r}",
            lv.n,
            u.energy_out(lv.energy),
            lv.nodes
        );
    }
    if let Some(o) = &sol.occupancy {
        let _ = writeln!(s);
        let _ = writeln!(s, "{}", occupancy_line(model, o));
        if let Some(x) = &o.lowest_allowed {
            let _ = writeln!(
                s,
                "open shell: no HOMO-LUMO gap; lowest allowed excitation {} -> {}: {:.6} {e}, wavelength {:.2} nm, strength {:.5}",
                x.from,
                x.to,
                u.energy_out(x.energy),
                x.wavelength_nm,
                x.strength
            );
        }
    }
    if !sol.transitions.is_empty() {
        let _ = writeln!(s);
        let _ = writeln!(
            s,
            "{:>4} {:>4}  {:>14}  {:>14}  {:>14}  {:>10}  {:>10}",
            "from",
            "to",
            format!("energy ({e})"),
            "wavelength (nm)",
            format!("dipole (e {l})"),
            "debye",
            "strength"
        );
        for t in &sol.transitions {
            let _ = writeln!(
                s,
                "{:>4} {:>4}  {:>14.6}  {:>14.2}  {:>14.6}  {:>10.4}  {:>10.5}",
                t.from,
                t.to,
                u.energy_out(t.energy),
                t.wavelength_nm,
                u.dipole_out(t.dipole),
                t.dipole_debye,
                t.strength
            );
        }
    }
    if let (Some(spec), Some(h)) = (&model.huckel, &sol.huckel) {
        huckel_section(&mut s, model, spec, h);
    }
    if let Some(sr) = &sol.sum_rule {
        let _ = writeln!(
            s,
            "\nThomas-Reiche-Kuhn sum for level 1 over the {} computed levels: {:.6} ({:.6} when complete: m_e/m; {:.2} % captured)",
            sr.levels_used, sr.value, sr.expected, 100.0 * sr.completeness
        );
    }
    s.push_str(&super::response::response_lines(model, sol));
    if let Some(groups) = crate::pipeline::ring_degeneracies(sol) {
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
    crate::report::no_negative_zero(&s)
}

/// The Hückel levels beside: parameters, levels near the frontier, the
/// filling and the strongest frontier transition.
fn huckel_section(
    s: &mut String,
    model: &Model,
    spec: &crate::observables::HuckelSpec,
    h: &crate::observables::Huckel,
) {
    let u = &model.units;
    let e = u.energy.label();
    let _ = writeln!(s);
    let betas = if spec.beta_double == spec.beta_single {
        format!("beta {} {e}", u.energy_out(spec.beta_double))
    } else {
        format!(
            "beta_double {} {e}, beta_single {} {e}",
            u.energy_out(spec.beta_double),
            u.energy_out(spec.beta_single)
        )
    };
    let _ = writeln!(
        s,
        "Hückel picture: {} atoms in a {}, alpha {} {e}, {betas}{}",
        spec.atoms,
        if spec.ring { "ring" } else { "chain" },
        u.energy_out(spec.alpha),
        if spec.shifts.is_empty() {
            String::new()
        } else {
            format!(", {} heteroatom shift(s)", spec.shifts.len())
        }
    );
    // The levels the continuum solve shows, or all of them.
    let (first, count) = model.levels.window();
    let shown = first.min(h.energies.len())..first.saturating_add(count).min(h.energies.len());
    let _ = writeln!(s, "{:>5}  {:>18}", "n", format!("energy ({e})"));
    for i in shown {
        let _ = writeln!(s, "{:>5}  {:>18.10}", i + 1, u.energy_out(h.energies[i]));
    }
    if let Some(o) = &h.occupancy {
        let _ = writeln!(s, "{}", occupancy_line(model, o));
        if let Some(x) = &o.lowest_allowed {
            let _ = writeln!(
                s,
                "open shell: lowest allowed excitation {} -> {}: {:.6} {e}, wavelength {:.2} nm",
                x.from,
                x.to,
                u.energy_out(x.energy),
                x.wavelength_nm
            );
        }
    }
}

/// The filling in one line, with the rule that set the electron count.
fn occupancy_line(model: &Model, o: &crate::observables::Occupancy) -> String {
    let u = &model.units;
    let e = u.energy.label();
    let rule = match (&model.chain, model.levels.electrons_given) {
        (Some(c), false) => {
            let charge = match c.charge {
                0 => String::new(),
                q => format!(", charge {q:+}"),
            };
            format!(
                " (counted from the chain: {} atoms giving {}{charge})",
                c.atoms(),
                c.contributions()
            )
        }
        (Some(_), true) => " (levels.electrons)".to_string(),
        (None, _) => String::new(),
    };
    let mut line = format!("{} electrons{rule}: HOMO {}", o.electrons, o.homo);
    if o.homo_group.len() > 1 {
        let _ = write!(
            line,
            " (degenerate with {}{})",
            o.homo_group
                .iter()
                .filter(|&&n| n != o.homo)
                .map(|n| n.to_string())
                .collect::<Vec<_>>()
                .join(", "),
            if o.open_shell { ", open shell" } else { "" }
        );
    }
    if let Some(so) = o.singly_occupied {
        let _ = write!(line, " (singly occupied: level {so})");
    }
    if let Some(l) = o.lumo {
        let _ = write!(line, ", LUMO {l}");
    }
    if let Some(g) = o.gap {
        let _ = write!(line, ", gap {:.6} {e}", u.energy_out(g));
    }
    if let Some(w) = o.wavelength_nm {
        let _ = write!(line, ", wavelength {w:.2} nm");
    }
    line
}

/// Plain-language lines on the degenerate levels of a ring.
fn ring_note(s: &mut String, model: &Model, groups: &[crate::observables::Degeneracy]) {
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
