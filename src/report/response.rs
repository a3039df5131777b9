//! The static response in the documents: the `response` object of
//! `chainwell solve --json`, its lines in the readable table, and the
//! scaling exponents of a sweep (log–log slopes of α and γ against the box
//! length).
//!
//! Units, whatever the input's: α in Å³ (the polarizability volume
//! α / 4πε0) and atomic units, β and γ in atomic units and esu.

use std::fmt::Write;

use serde_json::{json, Map, Value};

use crate::input::Model;
use crate::observables::response::units;
use crate::pipeline::response::{Response, ResponseRecord};
use crate::pipeline::Solution;

/// The convention, as every document writes it.
pub const CONVENTION: &str =
    "E(F) = E0 - mu F - alpha F^2/2 - beta F^3/6 - gamma F^4/24, F along x";

/// Plain-language notes on a response.
pub fn notes(r: &Response) -> Vec<String> {
    let mut out = Vec::new();
    if r.values.beta_zero_by_symmetry {
        out.push(format!(
            "beta is zero: the potential is a mirror image of itself about the middle of the box (the series gave {:.3e} a.u., rounding)",
            r.values.beta_computed.map_or(0.0, units::beta_au)
        ));
    }
    if let Some(n) = r.singly_occupied {
        out.push(format!(
            "level {n} holds one electron: the response is that of independent electrons with a half-filled level"
        ));
    }
    out
}

/// The `response` object of the solve document (`None` without one).
pub fn response_json(model: &Model, sol: &Solution, with_timing: bool) -> Option<Value> {
    let r = sol.response.as_ref()?;
    let record = r.record(model, sol.box_length);
    let mut m = match serde_json::to_value(&record) {
        Ok(Value::Object(m)) => m,
        _ => Map::new(),
    };
    m.insert("convention".into(), json!(CONVENTION));
    m.insert("electrons".into(), json!(r.electrons));
    m.insert(
        "levels".into(),
        Value::Array(
            r.values
                .levels
                .iter()
                .map(|l| {
                    json!({
                        "n": l.n,
                        "electrons": l.electrons,
                        "alpha": units::alpha_angstrom3(l.alpha),
                        "beta": l.beta.map(units::beta_au),
                        "gamma": l.gamma.map(units::gamma_au),
                    })
                })
                .collect(),
        ),
    );
    if let Some((a, k)) = r.sum_over_states {
        m.insert(
            "sum_over_states".into(),
            json!({
                "alpha": units::alpha_angstrom3(a),
                "levels_used": k,
                "missing_fraction": 1.0 - a / r.values.alpha,
            }),
        );
    }
    m.insert("residual".into(), json!(r.values.residual));
    m.insert("notes".into(), json!(notes(r)));
    if with_timing {
        m.insert("seconds".into(), json!(r.seconds));
    }
    Some(Value::Object(m))
}

/// The response's lines of the readable table (empty without one).
pub fn response_lines(model: &Model, sol: &Solution) -> String {
    let Some(r) = &sol.response else {
        return String::new();
    };
    let rec = r.record(model, sol.box_length);
    let mut s = String::new();
    let _ = writeln!(s, "\nstatic response along x, {CONVENTION}:");
    let _ = writeln!(
        s,
        "  alpha = {:.6} A^3 ({:.6e} a.u.)",
        rec.alpha, rec.alpha_au
    );
    match (rec.beta, rec.beta_esu) {
        (Some(_), _) if rec.beta_zero_by_symmetry => {
            let _ = writeln!(s, "  beta  = 0 (mirror-symmetric potential)");
        }
        (Some(b), Some(e)) => {
            let _ = writeln!(s, "  beta  = {b:.6e} a.u. ({e:.4e} esu)");
        }
        _ => {}
    }
    if let (Some(g), Some(e)) = (rec.gamma, rec.gamma_esu) {
        let _ = writeln!(s, "  gamma = {g:.6e} a.u. ({e:.4e} esu)");
    }
    if let Some((a, k)) = r.sum_over_states {
        let _ = writeln!(
            s,
            "  sum over the {k} computed states gives alpha = {:.6} A^3 ({:.3} % short of the exact value)",
            units::alpha_angstrom3(a),
            100.0 * (1.0 - a / r.values.alpha)
        );
    }
    for n in notes(r) {
        let _ = writeln!(s, "  note: {n}");
    }
    s
}

/// Least-squares slope of `ln y` against `ln x` over the pairs with both
/// positive; `None` with fewer than two distinct `x`.
pub fn log_log_slope(points: &[(f64, f64)]) -> Option<f64> {
    let pts: Vec<(f64, f64)> = points
        .iter()
        .filter(|(x, y)| *x > 0.0 && *y > 0.0 && x.is_finite() && y.is_finite())
        .map(|(x, y)| (x.ln(), y.ln()))
        .collect();
    let k = pts.len() as f64;
    if pts.len() < 2 {
        return None;
    }
    let mx = pts.iter().map(|p| p.0).sum::<f64>() / k;
    let my = pts.iter().map(|p| p.1).sum::<f64>() / k;
    let sxx: f64 = pts.iter().map(|p| (p.0 - mx).powi(2)).sum();
    let sxy: f64 = pts.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum();
    (sxx > 0.0).then(|| sxy / sxx)
}

/// The scaling exponents of a sweep's responses: α ∝ L^a and |γ| ∝ L^g
/// with `L` the box length, fitted on a log–log scale over the rows (γ's
/// magnitude: a box's γ is negative).
pub fn scaling_json(records: &[&ResponseRecord]) -> Option<Value> {
    let alpha: Vec<(f64, f64)> = records.iter().map(|r| (r.box_length, r.alpha)).collect();
    let a = log_log_slope(&alpha)?;
    let gamma: Vec<(f64, f64)> = records
        .iter()
        .filter_map(|r| r.gamma.map(|g| (r.box_length, g.abs())))
        .collect();
    Some(json!({
        "against": "box_length",
        "alpha_exponent": a,
        "gamma_exponent": log_log_slope(&gamma),
        "rows": records.len(),
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_slope_of_a_power_law_is_its_exponent() {
        let pts: Vec<(f64, f64)> = [3.0, 5.0, 11.0]
            .iter()
            .map(|&x: &f64| (x, 2.5 * x.powf(3.2)))
            .collect();
        assert!((log_log_slope(&pts).unwrap() - 3.2).abs() < 1e-12);
        assert_eq!(log_log_slope(&[(2.0, 1.0)]), None);
        assert_eq!(log_log_slope(&[(2.0, 1.0), (2.0, 3.0)]), None);
    }
}
