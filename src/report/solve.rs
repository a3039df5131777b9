//! The `chainwell.solve/1` document: levels, filling, transitions, states,
//! diagnostics, warnings, timing and the input echo.

use serde_json::{json, Map, Value};

use super::envelope::{constants, input_echo, program, CONSTANTS_KEY};
use crate::input::{Model, SourceText};
use crate::pipeline::record::{level_records, occupancy_record};
use crate::pipeline::Solution;

/// The `levels` array.
pub fn levels(model: &Model, sol: &Solution) -> Value {
    serde_json::to_value(level_records(model, sol)).unwrap_or(Value::Null)
}

/// The `degeneracies` array of a ring: every computed level in one group
/// (`levels` 1-based, `energy` the group's mean, `spread` its splitting).
pub fn degeneracies(model: &Model, groups: &[crate::observables::Degeneracy]) -> Value {
    let u = &model.units;
    Value::Array(
        groups
            .iter()
            .map(|g| {
                json!({
                    "levels": g.levels,
                    "energy": u.energy_out(g.energy),
                    "spread": u.energy_out(g.spread),
                })
            })
            .collect(),
    )
}

/// The whole `chainwell.solve/1` document. `timing` can be left out so that
/// documents compare byte for byte across runs.
pub fn solve_document(
    model: &Model,
    source: &SourceText,
    sol: &Solution,
    with_timing: bool,
) -> Value {
    let u = &model.units;
    let expected = crate::pipeline::accuracy::expected(model, &sol.edges);
    let mut doc = Map::new();
    doc.insert("format".into(), json!("chainwell.solve/1"));
    doc.insert("program".into(), program());
    doc.insert(CONSTANTS_KEY.into(), constants());
    doc.insert("units".into(), u.to_json());
    doc.insert(
        "grid".into(),
        json!({
            "points": sol.grid.points,
            "spacing": u.length_out(sol.grid.spacing),
            "order": model.grid.order.get(),
            "scheme": model.grid.scheme,
            "boundary": sol.grid.boundary,
            "roundoff_floor": u.energy_out(sol.roundoff_floor),
            "jumps": sol.edges.positions.iter().map(|x| u.length_out(*x)).collect::<Vec<_>>(),
            "jumps_on_grid_points": sol.edges.aligned,
            "kinks": sol.edges.kinks.iter().map(|x| u.length_out(*x)).collect::<Vec<_>>(),
            "kinks_on_grid_points": sol.edges.kinks_aligned,
            "kinks_corrected": sol.edges.kinks_corrected,
            "weak_breaks": sol.edges.weak_breaks.iter().map(|x| u.length_out(*x)).collect::<Vec<_>>(),
            "weak_breaks_on_grid_points": sol.edges.weak_aligned,
            "expected_order": expected.order,
            "order_limited_by": expected.limited_by.map(|l| l.describe()),
            "refinement": sol.refinement,
        }),
    );
    doc.insert(
        "box_length".into(),
        json!(super::derived(u.length_out(sol.box_length))),
    );
    doc.insert("levels".into(), levels(model, sol));
    if let Some(groups) = crate::pipeline::ring_degeneracies(sol) {
        doc.insert("degeneracies".into(), degeneracies(model, &groups));
    }
    if let Some(occ) = &sol.occupancy {
        doc.insert("occupancy".into(), occupancy(model, occ));
    }
    if !sol.transitions.is_empty() || sol.occupancy.is_some() {
        doc.insert("transitions".into(), transitions(model, &sol.transitions));
    }
    if let Some(sr) = &sol.sum_rule {
        doc.insert(
            "sum_rule".into(),
            json!({"from": 1, "value": sr.value, "expected": sr.expected, "levels_used": sr.levels_used, "completeness": sr.completeness}),
        );
    }
    if let (Some(spec), Some(h)) = (&model.huckel, &sol.huckel) {
        doc.insert("huckel".into(), huckel(model, spec, h));
    }
    if let Some(r) = super::response::response_json(model, sol, with_timing) {
        doc.insert("response".into(), r);
    }
    doc.insert("states".into(), states(model, sol));
    doc.insert(
        "diagnostics".into(),
        serde_json::to_value(&sol.diagnostics).unwrap_or(Value::Null),
    );
    doc.insert("warnings".into(), json!(sol.warnings));
    if with_timing {
        doc.insert(
            "timing".into(),
            serde_json::to_value(sol.timing).unwrap_or(Value::Null),
        );
    }
    doc.insert("input".into(), input_echo(model, source));
    Value::Object(doc)
}

/// The `huckel` object: the tight-binding picture of the same atoms,
/// its parameters, `levels` (`n`, `energy`), `occupancy` and `transitions`
/// as for the continuum levels.
pub fn huckel(
    model: &Model,
    spec: &crate::observables::HuckelSpec,
    h: &crate::observables::Huckel,
) -> Value {
    let u = &model.units;
    let mut m = Map::new();
    m.insert("atoms".into(), json!(spec.atoms));
    m.insert("ring".into(), json!(spec.ring));
    m.insert("alpha".into(), json!(u.energy_out(spec.alpha)));
    m.insert("beta_double".into(), json!(u.energy_out(spec.beta_double)));
    m.insert("beta_single".into(), json!(u.energy_out(spec.beta_single)));
    m.insert(
        "shifts".into(),
        Value::Array(
            spec.shifts
                .iter()
                .map(|(a, d)| json!({"atom": a, "alpha": u.energy_out(*d)}))
                .collect(),
        ),
    );
    m.insert(
        "levels".into(),
        Value::Array(
            h.energies
                .iter()
                .enumerate()
                .map(|(i, e)| json!({"n": i + 1, "energy": u.energy_out(*e)}))
                .collect(),
        ),
    );
    if let Some(o) = &h.occupancy {
        m.insert("occupancy".into(), occupancy(model, o));
        m.insert("transitions".into(), transitions(model, &h.transitions));
    }
    Value::Object(m)
}

/// The `occupancy` object.
pub fn occupancy(model: &Model, o: &crate::observables::Occupancy) -> Value {
    serde_json::to_value(occupancy_record(model, o)).unwrap_or(Value::Null)
}

/// The `transitions` array.
pub fn transitions(model: &Model, list: &[crate::observables::Transition]) -> Value {
    let u = &model.units;
    Value::Array(
        list.iter()
            .map(|t| {
                let mut m = Map::new();
                m.insert("from".into(), json!(t.from));
                m.insert("to".into(), json!(t.to));
                m.insert("energy".into(), json!(u.energy_out(t.energy)));
                m.insert(
                    "wavelength_nm".into(),
                    json!(finite_or_null(t.wavelength_nm)),
                );
                m.insert("dipole".into(), json!(u.dipole_out(t.dipole)));
                m.insert("dipole_debye".into(), json!(t.dipole_debye));
                m.insert("strength".into(), json!(t.strength));
                m.insert("occupancy_factor".into(), json!(t.occupancy_factor));
                if let Some(b) = t.box_dipole {
                    m.insert("box_dipole".into(), json!(u.dipole_out(b)));
                }
                Value::Object(m)
            })
            .collect(),
    )
}

/// Per-level moments and classically allowed regions.
pub fn states(model: &Model, sol: &Solution) -> Value {
    let u = &model.units;
    Value::Array(
        sol.states
            .iter()
            .zip(&sol.levels)
            .map(|(s, l)| {
                json!({
                    "n": s.n,
                    "mean_x": u.length_out(s.mean_x),
                    "spread": u.length_out(s.spread),
                    "allowed": s.allowed.iter().map(|(a, b)| [u.length_out(*a), u.length_out(*b)]).collect::<Vec<_>>(),
                    "effective_length": l.effective_length.map(|x| u.length_out(x)),
                })
            })
            .collect(),
    )
}

fn finite_or_null(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}
