//! The command line: output formats, overrides, and exit statuses.

mod common;

use std::path::Path;
use std::process::Command;

use common::bin;

fn potential(name: &str) -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("potentials")
        .join(name)
        .display()
        .to_string()
}

fn scratch(name: &str) -> std::path::PathBuf {
    let d = std::env::temp_dir().join(format!("chainwell-cli-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

#[test]
fn solve_json_has_the_contract_keys() {
    let out = Command::new(bin())
        .args([
            "solve",
            &potential("ideal_box.toml"),
            "--json",
            "--set",
            "grid.points=300",
        ])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let doc: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(doc["format"], "chainwell.solve/1");
    assert_eq!(doc["units"]["energy"], "eV");
    assert_eq!(doc["units"]["length"], "angstrom");
    assert_eq!(doc["grid"]["points"], 300);
    assert_eq!(doc["grid"]["order"], 8);
    assert_eq!(doc["box_length"], 12.0);
    let levels = doc["levels"].as_array().unwrap();
    assert_eq!(levels.len(), 8);
    for (i, l) in levels.iter().enumerate() {
        assert_eq!(l["n"], i + 1);
        assert_eq!(l["nodes"], i);
        assert!(l["box_energy"].as_f64().unwrap() > 0.0);
    }
    let occ = &doc["occupancy"];
    assert_eq!(occ["homo"], 3);
    assert_eq!(occ["lumo"], 4);
    // wavelength_nm = hc / gap, hc = 1239.841 984 eV nm (CODATA 2022, exact).
    let gap = occ["gap"].as_f64().unwrap();
    let wl = occ["wavelength_nm"].as_f64().unwrap();
    assert!((wl * gap / 1_239.841_984 - 1.0).abs() < 1e-9);
    assert!(doc["transitions"]
        .as_array()
        .unwrap()
        .iter()
        .any(|t| t["from"] == 3 && t["to"] == 4));
    for key in ["residual_ratio", "orthogonality_ratio"] {
        assert!(doc["diagnostics"][key].is_number(), "{key}");
    }
    assert!(doc["warnings"].is_array());
    assert!(doc["timing"]["solve_s"].is_number());
    assert!(doc["timing"]["total_s"].is_number());
    assert!(doc["input"]["text"].as_str().unwrap().contains("[domain]"));
    assert_eq!(doc["program"]["name"], "chainwell");
}

#[test]
fn table_output_lists_levels_with_box_ratio() {
    let out = Command::new(bin())
        .args([
            "solve",
            &potential("ideal_box.toml"),
            "--set",
            "grid.points=300",
        ])
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("energy (eV)"), "{text}");
    assert!(text.contains("ratio"), "{text}");
}

/// Runs `solve` on an input written to a scratch file; returns (status,
/// stderr, path).
fn run_bad(name: &str, text: &str, extra: &[&str]) -> (i32, String, String) {
    let dir = scratch(name);
    let path = dir.join("in.toml");
    std::fs::write(&path, text).unwrap();
    let p = path.display().to_string();
    let mut args = vec!["solve", p.as_str()];
    args.extend_from_slice(extra);
    let out = Command::new(bin()).args(&args).output().unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stderr).into_owned(),
        p,
    )
}

const GOOD: &str = "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 50\n[levels]\ncount = 3\n";

#[test]
fn bad_inputs_exit_2_with_file_line_column_and_key() {
    let cases: &[(&str, &str, &str, &str)] = &[
        // (name, text, expected "line:col", expected key)
        ("unknown_key", "[domain]\nfrom = 0.0\nto = 10.0\nwidth = 3\n", ":4:1", "domain.width"),
        ("wrong_type", "[domain]\nfrom = 0.0\nto = \"ten\"\n", ":3:6", "domain.to"),
        ("negative_length", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\nspacing = -0.1\n", ":5:11", "grid.spacing"),
        ("empty_domain", "[domain]\nfrom = 5.0\nto = 5.0\n", ":3:6", "domain.to"),
        (
            "missing_table",
            "[domain]\nfrom = 0.0\nto = 10.0\n[[term]]\nshape = \"table\"\nfile = \"nope.csv\"\n",
            ":6:8",
            "term[1].file",
        ),
        (
            "bad_formula",
            "[domain]\nfrom = 0.0\nto = 10.0\n[[term]]\nshape = \"formula\"\nexpression = \"2 * sn(x)\"\n",
            ":6:19",
            "term[1].expression",
        ),
        ("bad_shape", "[domain]\nfrom = 0.0\nto = 10.0\n[[term]]\nshape = \"wobble\"\n", ":5:9", "term[1].shape"),
        ("bad_order", "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\norder = 5\n", ":5:9", "grid.order"),
        ("syntax", "[domain\nfrom = 0.0\n", ":1:", ""),
    ];
    for (name, text, at, key) in cases {
        let (code, err, path) = run_bad(name, text, &[]);
        assert_eq!(code, 2, "{name}: {err}");
        assert!(
            err.starts_with(&format!("error: {path}{at}")),
            "{name}: {err}"
        );
        assert!(
            err.contains(&format!("`{key}`")) || key.is_empty(),
            "{name}: {err}"
        );
        assert!(!err.contains("panicked"), "{name}: {err}");
    }
}

#[test]
fn bad_overrides_exit_2_naming_the_flag() {
    let (code, err, _) = run_bad("set_unknown", GOOD, &["--set", "grid.pointz=3"]);
    assert_eq!(code, 2);
    assert!(
        err.contains("--set grid.pointz=3") && err.contains("pointz"),
        "{err}"
    );
    let (code, err, _) = run_bad("set_type", GOOD, &["--set", "grid.points=many"]);
    assert_eq!(code, 2);
    assert!(err.contains("grid.points"), "{err}");
    let (code, err, _) = run_bad("set_form", GOOD, &["--set", "grid.points"]);
    assert_eq!(code, 2);
    assert!(err.contains("KEY=VALUE"), "{err}");
}

#[test]
fn missing_input_file_exits_2() {
    let out = Command::new(bin())
        .args(["solve", "/nonexistent/in.toml"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("/nonexistent/in.toml"));
}
