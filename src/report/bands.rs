//! The `chainwell.bands/1` document, its table and its tidy CSV.

use std::fmt::Write;

use serde_json::{json, Map, Value};

use super::envelope::{constants, input_echo, program, CONSTANTS_KEY};
use crate::bands::BandEdge;
use crate::input::{Model, SourceText};
use crate::pipeline::cell::CellSource;
use crate::study::bands::BandsResult;

/// A wavevector in 1/Å, in 1/(input length unit).
fn k_out(model: &Model, k: f64) -> f64 {
    k * model.units.length.in_angstrom()
}

fn edge_json(model: &Model, e: &BandEdge) -> Value {
    json!({
        "band": e.band,
        "energy": model.units.energy_out(e.energy),
        "k": k_out(model, e.k),
        "effective_mass": e.effective_mass,
    })
}

/// The `chainwell.bands/1` document.
pub fn bands_document(
    model: &Model,
    source: &SourceText,
    r: &BandsResult,
    with_timing: bool,
) -> Value {
    let u = &model.units;
    let mut doc = Map::new();
    doc.insert("format".into(), json!("chainwell.bands/1"));
    doc.insert("program".into(), program());
    doc.insert(CONSTANTS_KEY.into(), constants());
    let mut units = u.to_json();
    if let Value::Object(m) = &mut units {
        m.insert(
            "wavevector".into(),
            json!(format!("1/{}", u.length.label())),
        );
        m.insert("effective_mass".into(), json!("electron masses"));
    }
    doc.insert("units".into(), units);
    doc.insert(
        "cell".into(),
        json!({
            "source": r.cell.source,
            "from": u.length_out(r.cell.from),
            "period": u.length_out(r.cell.period),
            "points": r.cell.points(),
            "spacing": u.length_out(r.cell.spacing()),
            "order": r.cell.order,
            "electrons_per_cell": r.cell.electrons_per_cell,
        }),
    );
    let k: Vec<f64> = r.structure.k.iter().map(|&k| k_out(model, k)).collect();
    doc.insert("k".into(), json!(k));
    let bands: Vec<Vec<f64>> = r
        .structure
        .bands
        .iter()
        .map(|b| b.iter().map(|&e| u.energy_out(e)).collect())
        .collect();
    doc.insert("bands".into(), json!(bands));
    let edges: Vec<Value> = r
        .edges
        .iter()
        .map(|(bottom, top)| {
            json!({"band": bottom.band, "bottom": edge_json(model, bottom), "top": edge_json(model, top)})
        })
        .collect();
    doc.insert("edges".into(), json!(edges));
    let gaps: Vec<Value> = r
        .gaps
        .iter()
        .map(|g| {
            json!({
                "below": g.below,
                "above": g.above,
                "size": u.energy_out(g.size),
                "direct": g.direct,
                "lower_edge": edge_json(model, &g.lower_edge),
                "upper_edge": edge_json(model, &g.upper_edge),
            })
        })
        .collect();
    doc.insert("gaps".into(), json!(gaps));
    if let Some(f) = &r.filling {
        doc.insert(
            "filling".into(),
            json!({
                "electrons_per_cell": f.electrons_per_cell,
                "filled_bands": f.filled_bands,
                "half_filled": f.half_filled,
                "gap": f.gap.map(|g| u.energy_out(g)),
                "wavelength_nm": f.gap.filter(|g| *g > 0.0).map(|g| crate::constants::hc_ev_nm() / g),
            }),
        );
    }
    if !r.finite.is_empty() {
        let band_gap = r.filling.as_ref().and_then(|f| f.gap);
        let rows: Vec<Value> = r
            .finite
            .iter()
            .map(|c| {
                json!({
                    "bonds": c.bonds,
                    "box_length": super::derived(u.length_out(c.box_length)),
                    "points": c.points,
                    "homo": c.homo,
                    "lumo": c.lumo,
                    "homo_energy": u.energy_out(c.homo_energy),
                    "lumo_energy": u.energy_out(c.lumo_energy),
                    "gap": u.energy_out(c.gap),
                    "gap_minus_band_gap": band_gap.map(|b| u.energy_out(c.gap - b)),
                })
            })
            .collect();
        doc.insert(
            "finite".into(),
            json!({"band_gap": band_gap.map(|g| u.energy_out(g)), "chains": rows}),
        );
    }
    doc.insert("warnings".into(), json!(r.warnings));
    if with_timing {
        doc.insert("timing".into(), json!({"total_s": r.total_s}));
    }
    doc.insert("input".into(), input_echo(model, source));
    Value::Object(doc)
}

/// Tidy CSV of the bands: one row per wavevector and band, units in the
/// header.
pub fn bands_csv(model: &Model, r: &BandsResult) -> String {
    let u = &model.units;
    let mut s = format!(
        "k (1/{}),band,energy ({})\n",
        u.length.label(),
        u.energy.label()
    );
    for (i, &k) in r.structure.k.iter().enumerate() {
        for (b, band) in r.structure.bands.iter().enumerate() {
            let _ = writeln!(s, "{},{},{}", k_out(model, k), b + 1, u.energy_out(band[i]));
        }
    }
    s
}

fn mass_text(m: Option<f64>) -> String {
    match m {
        None => "-".to_string(),
        Some(m) if m.abs() >= 0.01 => format!("{m:.5}"),
        Some(m) => format!("{m:.3e}"),
    }
}

/// "band 1" or "bands 1-3".
fn band_range(filled: usize) -> String {
    if filled == 1 {
        "band 1".to_string()
    } else {
        format!("bands 1-{filled}")
    }
}

/// The table `chainwell bands` prints without `--json`.
pub fn bands_table(model: &Model, r: &BandsResult) -> String {
    let u = &model.units;
    let e = u.energy.label();
    let l = u.length.label();
    let kl = format!("1/{l}");
    let mut s = String::new();
    if let Some(t) = &model.title {
        let _ = writeln!(s, "{}", crate::input::escape_control(t));
    }
    let what = match r.cell.source {
        CellSource::Chain => "the chain's repeat unit (2 bonds)",
        CellSource::Domain => "the domain",
    };
    let _ = writeln!(
        s,
        "cell: {what}, from {:.6} to {:.6} {l} (period {:.6} {l}); {} points, spacing {:.6} {l}, order {}",
        u.length_out(r.cell.from),
        u.length_out(r.cell.from + r.cell.period),
        u.length_out(r.cell.period),
        r.cell.points(),
        u.length_out(r.cell.spacing()),
        r.cell.order
    );
    let kmax = r.structure.k.last().copied().unwrap_or(0.0);
    let _ = writeln!(
        s,
        "{} wavevectors from 0 to pi/period = {:.6} {kl}",
        r.structure.k.len(),
        k_out(model, kmax)
    );
    let _ = writeln!(s);
    let _ = writeln!(s, "band edges (m*: effective mass in electron masses)");
    let _ = writeln!(
        s,
        "{:>5}  {:>14}  {:>12}  {:>10}  {:>14}  {:>12}  {:>10}",
        "band",
        format!("bottom ({e})"),
        format!("k ({kl})"),
        "m*",
        format!("top ({e})"),
        format!("k ({kl})"),
        "m*"
    );
    for (bottom, top) in &r.edges {
        let _ = writeln!(
            s,
            "{:>5}  {:>14.8}  {:>12.6}  {:>10}  {:>14.8}  {:>12.6}  {:>10}",
            bottom.band,
            u.energy_out(bottom.energy),
            k_out(model, bottom.k),
            mass_text(bottom.effective_mass),
            u.energy_out(top.energy),
            k_out(model, top.k),
            mass_text(top.effective_mass)
        );
    }
    let _ = writeln!(s);
    if r.gaps.is_empty() {
        let _ = writeln!(s, "gaps: none (consecutive bands touch or overlap)");
    } else {
        let _ = writeln!(s, "gaps");
        let _ = writeln!(
            s,
            "{:>6}  {:>14}  {:>16}  {:>16}  {:>8}",
            "bands",
            format!("size ({e})"),
            format!("lower at k ({kl})"),
            format!("upper at k ({kl})"),
            "direct"
        );
        for g in &r.gaps {
            let _ = writeln!(
                s,
                "{:>6}  {:>14.8}  {:>16.6}  {:>16.6}  {:>8}",
                format!("{}-{}", g.below, g.above),
                u.energy_out(g.size),
                k_out(model, g.lower_edge.k),
                k_out(model, g.upper_edge.k),
                if g.direct { "yes" } else { "no" }
            );
        }
    }
    if let Some(f) = &r.filling {
        let _ = writeln!(s);
        let line = match (f.half_filled, f.gap) {
            (true, _) => format!(
                "{} electrons per cell fill {} band(s) and half of the next: no gap (a metal in this model)",
                f.electrons_per_cell, f.filled_bands
            ),
            (false, Some(g)) if g > 0.0 => format!(
                "{} electrons per cell fill {}: the gap above is {:.6} {e} ({:.1} nm), the HOMO-LUMO gap of the infinite chain",
                f.electrons_per_cell,
                band_range(f.filled_bands),
                u.energy_out(g),
                crate::constants::hc_ev_nm() / g
            ),
            (false, Some(_)) => format!(
                "{} electrons per cell fill {}; the next band touches or overlaps it: no gap",
                f.electrons_per_cell,
                band_range(f.filled_bands)
            ),
            (false, None) => format!(
                "{} electrons per cell fill {}; the band above was not computed",
                f.electrons_per_cell,
                band_range(f.filled_bands)
            ),
        };
        let _ = writeln!(s, "{line}");
    }
    if !r.finite.is_empty() {
        finite_table(&mut s, model, r);
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "bands ({e})");
    let _ = write!(s, "{:>12}", format!("k ({kl})"));
    for b in 1..=r.structure.bands.len() {
        let _ = write!(s, "  {:>12}", format!("band {b}"));
    }
    let _ = writeln!(s);
    for (i, &k) in r.structure.k.iter().enumerate() {
        let _ = write!(s, "{:>12.6}", k_out(model, k));
        for band in &r.structure.bands {
            let _ = write!(s, "  {:>12.6}", u.energy_out(band[i]));
        }
        let _ = writeln!(s);
    }
    crate::report::no_negative_zero(&s)
}

fn finite_table(s: &mut String, model: &Model, r: &BandsResult) {
    let u = &model.units;
    let e = u.energy.label();
    let l = u.length.label();
    let band_gap = r.filling.as_ref().and_then(|f| f.gap);
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "finite chains (one pi electron per atom) beside the infinite chain"
    );
    if let Some((top, bottom)) = r.filling.as_ref().and_then(|f| f.edges.as_ref()) {
        let _ = writeln!(
            s,
            "infinite chain: top of band {} {:.6} {e}, bottom of band {} {:.6} {e}, gap {:.6} {e}",
            top.band,
            u.energy_out(top.energy),
            bottom.band,
            u.energy_out(bottom.energy),
            u.energy_out(band_gap.unwrap_or(bottom.energy - top.energy))
        );
    }
    let _ = writeln!(
        s,
        "{:>6}  {:>12}  {:>10}  {:>14}  {:>14}  {:>14}  {:>16}",
        "bonds",
        format!("box ({l})"),
        "HOMO n",
        format!("HOMO ({e})"),
        format!("LUMO ({e})"),
        format!("gap ({e})"),
        format!("minus band gap")
    );
    for c in &r.finite {
        let excess = band_gap.map_or_else(
            || "-".to_string(),
            |b| format!("{:.6}", u.energy_out(c.gap - b)),
        );
        let _ = writeln!(
            s,
            "{:>6}  {:>12.4}  {:>10}  {:>14.6}  {:>14.6}  {:>14.6}  {:>16}",
            c.bonds,
            u.length_out(c.box_length),
            c.homo,
            u.energy_out(c.homo_energy),
            u.energy_out(c.lumo_energy),
            u.energy_out(c.gap),
            excess
        );
    }
}
