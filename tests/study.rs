//! Studies through the command line: sweeps, shards and merge, resume,
//! fits and targets.

mod common;

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use serde_json::Value;

use common::bin;

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("chainwell-study-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn run(args: &[&str]) -> Output {
    Command::new(bin()).args(args).output().unwrap()
}

fn run_ok(args: &[&str]) -> Output {
    let out = run(args);
    assert!(
        out.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

fn json(out: &Output) -> Value {
    serde_json::from_slice(&out.stdout).unwrap()
}

const IDEAL_CHAIN: &str = "[chain]\nbonds = 4\nbond_length = 1.40\nend_extension = 1.40\n[grid]\npoints = 400\norder = 8\n";

const ALTERNATING_CHAIN: &str =
    "[chain]\nbonds = 5\nalternation = 1.0\n[grid]\npoints = 600\norder = 8\n";

#[test]
fn ideal_box_gaps_follow_the_closed_form() {
    let d = scratch("ideal");
    let input = write(&d, "chain.toml", IDEAL_CHAIN);
    let doc = json(&run_ok(&[
        "sweep",
        input.to_str().unwrap(),
        "--vary",
        "chain.bonds=2:8",
        "--json",
    ]));
    assert_eq!(doc["format"], "chainwell.sweep/1");
    assert_eq!(doc["key"], "chain.bonds");
    assert_eq!(doc["complete"], true);
    let rows = doc["rows"].as_array().unwrap();
    assert_eq!(rows.len(), 7);
    // E_n = n^2 h^2 / (8 m L^2) = (hbar^2 / 2m) (n pi / L)^2 (closed form).
    let t = common::t_e();
    for (i, row) in rows.iter().enumerate() {
        let bonds = 2 + i;
        assert_eq!(row["value"], bonds);
        let electrons = bonds + 1;
        let length = bonds as f64 * 1.40 + 2.0 * 1.40;
        let unit = t * (std::f64::consts::PI / length).powi(2);
        // Even N: HOMO N/2, LUMO N/2 + 1, gap (N + 1) h^2 / (8 m L^2)
        // (closed form). Odd N: the HOMO (N+1)/2 holds one electron and
        // the LUMO is the level above it (the README's rule), so N + 2.
        let factor = if electrons % 2 == 0 {
            electrons + 1
        } else {
            electrons + 2
        };
        let expected = factor as f64 * unit;
        let gap = row["occupancy"]["gap"].as_f64().unwrap();
        assert!(
            (gap / expected - 1.0).abs() < 1e-8,
            "bonds {bonds}: gap {gap}, closed form {expected}"
        );
        // The row's levels are solve's objects, with the box limit.
        assert_eq!(row["levels"][0]["n"], 1);
        assert!(row["levels"][0]["box_energy"].as_f64().is_some());
    }
}

#[test]
fn alternation_makes_the_gap_of_long_chains_level_off() {
    let d = scratch("level-off");
    let input = write(&d, "chain.toml", ALTERNATING_CHAIN);
    let gaps = |alternation: &str| -> Vec<f64> {
        let doc = json(&run_ok(&[
            "sweep",
            input.to_str().unwrap(),
            "--set",
            &format!("chain.alternation={alternation}"),
            "--vary",
            "chain.bonds=5:61:8",
            "--json",
        ]));
        doc["rows"]
            .as_array()
            .unwrap()
            .iter()
            .map(|r| r["occupancy"]["gap"].as_f64().unwrap())
            .collect()
    };
    let rippled = gaps("1.0");
    let ideal = gaps("0.0");
    assert_eq!(rippled.len(), 8);
    // Both fall with length ...
    assert!(rippled.windows(2).all(|w| w[1] < w[0]), "{rippled:?}");
    assert!(ideal.windows(2).all(|w| w[1] < w[0]), "{ideal:?}");
    // ... but the ideal box's goes to zero like 1/L (closed form) while the
    // rippled chain's stays near the band gap of the infinite chain, about
    // the ripple's amplitude 2|V_G| = 1 eV for V = A cos(Gx) in the
    // nearly-free-electron picture (Ashcroft & Mermin, Solid State Physics,
    // eq. 9.27); 0.9 eV leaves room for the finite chain's excess.
    let last = rippled[rippled.len() - 1];
    assert!(last > 0.9, "{rippled:?}");
    assert!(ideal[ideal.len() - 1] < 0.35, "{ideal:?}");
    // Extrapolate the last two chains to infinite length as if the gap fell
    // like 1/L (the ideal box's law, closed form): the box's limit is about
    // zero, the rippled chain's stays finite. (A gapped chain approaches its
    // limit faster, like 1/L^2, so this estimate is a lower bound.)
    let n = rippled.len();
    let length = |bonds: usize| (bonds as f64 + 2.0) * 1.40;
    let (l1, l2) = (length(53), length(61));
    let limit = |g: &[f64]| (g[n - 1] * l2 - g[n - 2] * l1) / (l2 - l1);
    assert!(limit(&ideal).abs() < 0.05, "{ideal:?}");
    assert!(limit(&rippled) > 0.8, "{rippled:?}");
}

#[test]
fn sharded_runs_merged_equal_the_unsharded_run_for_any_thread_count() {
    let d = scratch("shards");
    let input = write(&d, "chain.toml", IDEAL_CHAIN);
    let base = [
        "sweep",
        input.to_str().unwrap(),
        "--set",
        "grid.points=300",
        "--vary",
        "chain.bonds=2:6",
        "--vary",
        "chain.alternation=0,0.7",
        "--json",
    ];
    let whole = |threads: &str| {
        let out = Command::new(bin())
            .args(base)
            .env("RAYON_NUM_THREADS", threads)
            .output()
            .unwrap();
        assert!(out.status.success());
        out.stdout
    };
    let one = whole("1");
    assert_eq!(one, whole("3"), "the thread count changed the output");
    let doc: Value = serde_json::from_slice(&one).unwrap();
    assert_eq!(
        doc["keys"],
        serde_json::json!(["chain.bonds", "chain.alternation"])
    );
    assert_eq!(doc["rows"].as_array().unwrap().len(), 10);
    assert_eq!(doc["rows"][1]["values"], serde_json::json!([2, 0.7]));
    let mut parts = Vec::new();
    for i in 1..=3 {
        let mut args = base.to_vec();
        let shard = format!("{i}/3");
        args.extend(["--shard", &shard]);
        let out = run_ok(&args);
        let p = d.join(format!("part{i}.json"));
        std::fs::write(&p, &out.stdout).unwrap();
        parts.push(p.display().to_string());
    }
    // In any order.
    let merged = run_ok(&["merge", &parts[2], &parts[0], &parts[1], "--json"]);
    assert_eq!(
        String::from_utf8_lossy(&merged.stdout),
        String::from_utf8_lossy(&one)
    );
    // A missing shard is named, not silently dropped.
    let out = run(&["merge", &parts[0], &parts[1]]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("in none of the parts"));
}

#[test]
fn resume_finishes_an_incomplete_document_into_the_full_one() {
    let d = scratch("resume");
    let input = write(&d, "chain.toml", IDEAL_CHAIN);
    let args = [
        "sweep",
        input.to_str().unwrap(),
        "--vary",
        "chain.bonds=2:7",
        "--json",
    ];
    let full = run_ok(&args).stdout;
    // What Ctrl-C leaves: some rows, "complete": false.
    let mut partial: Value = serde_json::from_slice(&full).unwrap();
    let rows = partial["rows"].as_array_mut().unwrap();
    rows.retain(|r| r["case"] == 2 || r["case"] == 5);
    partial["complete"] = Value::Bool(false);
    let saved = d.join("saved.json");
    std::fs::write(&saved, serde_json::to_string_pretty(&partial).unwrap()).unwrap();
    let mut resumed = args.to_vec();
    resumed.extend(["--resume", saved.to_str().unwrap()]);
    let out = run_ok(&resumed);
    assert_eq!(out.stdout, full);
    // The file is brought up to date, whole.
    assert_eq!(std::fs::read(&saved).unwrap(), full);
    // A file from another sweep is refused.
    let other = [
        "sweep",
        input.to_str().unwrap(),
        "--vary",
        "chain.bonds=2:9",
        "--resume",
        saved.to_str().unwrap(),
    ];
    let out = run(&other);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("another sweep"));
}

#[test]
fn tidy_csv_has_one_line_per_case_and_level() {
    let d = scratch("csv");
    let input = write(&d, "chain.toml", IDEAL_CHAIN);
    let csv = d.join("out.csv");
    let out = run_ok(&[
        "sweep",
        input.to_str().unwrap(),
        "--vary",
        "chain.bonds=3,5",
        "--set",
        "levels.count=6",
        "--csv",
        csv.to_str().unwrap(),
    ]);
    // The table goes to stdout.
    assert!(String::from_utf8_lossy(&out.stdout).contains("gap/eV"));
    let text = std::fs::read_to_string(&csv).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(
        lines[0],
        "case,chain.bonds,n,energy (eV),occupied,homo,lumo,gap (eV),wavelength (nm)"
    );
    assert_eq!(lines.len(), 1 + 2 * 6);
    // Case 1: 4 electrons fill levels 1 and 2.
    let cells: Vec<&str> = lines[2].split(',').collect();
    assert_eq!(&cells[..3], &["1", "3", "2"]);
    assert_eq!(cells[4], "2");
    assert_eq!(lines[3].split(',').nth(4), Some("0"));
}

#[test]
fn bad_vary_flags_are_usage_errors_naming_the_flag_or_key() {
    let d = scratch("bad");
    let input = write(&d, "chain.toml", IDEAL_CHAIN);
    let i = input.to_str().unwrap();
    for (flag, needle) in [
        ("chain.bondz=2:5", "bondz"),
        ("chain.bonds=8:2", "--vary chain.bonds=8:2"),
        ("chain.bonds=1:100000000", "--vary chain.bonds=1:100000000"),
        ("chain.bonds=2:x", "`x` is not a number"),
    ] {
        let out = run(&["sweep", i, "--vary", flag]);
        assert_eq!(out.status.code(), Some(2), "{flag}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(err.contains(needle), "{flag}: {err}");
        assert!(out.stdout.is_empty());
    }
    // A grid of millions from two modest flags.
    let out = run(&[
        "sweep",
        i,
        "--vary",
        "chain.bonds=1:5000",
        "--vary",
        "grid.points=100:5000",
    ]);
    assert_eq!(out.status.code(), Some(2));
    // A value the checker refuses names the flag and the case.
    let out = run(&["sweep", i, "--vary", "chain.bonds=0,2"]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("--vary chain.bonds=0,2"), "{err}");
    // A case the solve refuses (too few levels for the electrons it asks
    // for) names the flag and the case, exit 2, and prints nothing on stdout.
    let out = run(&[
        "sweep",
        i,
        "--set",
        "levels.count=3",
        "--vary",
        "levels.electrons=2,6",
        "--json",
    ]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("--vary levels.electrons=2,6 (case levels.electrons=6)"),
        "{err}"
    );
    assert!(out.stdout.is_empty());
}

/// A series made by chainwell with known values, then invented noise added.
fn synthetic_series(d: &Path, input: &Path) -> PathBuf {
    let doc = json(&run_ok(&[
        "sweep",
        input.to_str().unwrap(),
        "--set",
        "chain.alternation=1.1",
        "--set",
        "chain.end_extension=1.6",
        "--vary",
        "chain.bonds=3:13:2",
        "--json",
    ]));
    // Invented noise of about 2 nm (common practice, no source).
    let noise = [1.3, -0.8, 0.4, -1.9, 0.9, -0.2];
    let mut text = String::from("# invented test data\nchain.bonds,wavelength_nm,uncertainty\n");
    for (row, e) in doc["rows"].as_array().unwrap().iter().zip(noise) {
        let w = row["occupancy"]["wavelength_nm"].as_f64().unwrap();
        text.push_str(&format!("{},{},2.0\n", row["value"], w + e));
    }
    write(d, "series.csv", &text)
}

const FIT_CHAIN: &str = "[chain]\nbonds = 5\nalternation = 0.9\nend_extension = 1.4\n[grid]\nspacing = 0.08\norder = 6\n";

#[test]
fn fit_recovers_known_values_within_their_uncertainties() {
    let d = scratch("fit");
    let input = write(&d, "chain.toml", FIT_CHAIN);
    let data = synthetic_series(&d, &input);
    let doc = json(&run_ok(&[
        "fit",
        input.to_str().unwrap(),
        "--data",
        data.to_str().unwrap(),
        "--free",
        "chain.alternation,chain.end_extension",
        "--bounds",
        "chain.alternation=0:3",
        "--json",
    ]));
    assert_eq!(doc["format"], "chainwell.fit/1");
    let truth = [1.1, 1.6]; // the values the data were made with
    for (p, t) in doc["parameters"].as_array().unwrap().iter().zip(truth) {
        let v = p["value"].as_f64().unwrap();
        let s = p["uncertainty"].as_f64().unwrap();
        // Two standard errors: the fixed noise draw is one sample.
        assert!(
            (v - t).abs() < 2.0 * s,
            "{}: {v} ± {s}, truth {t}",
            p["key"]
        );
        // And the uncertainty is informative, not huge.
        assert!(s > 0.0 && s < 0.1 * t, "{}: {s}", p["key"]);
    }
    let c = &doc["correlation"];
    assert_eq!(c[0][0], 1.0);
    assert_eq!(c[0][1], c[1][0]);
    assert!(c[0][1].as_f64().unwrap().abs() < 1.0);
    let rows = doc["rows"].as_array().unwrap();
    assert_eq!(rows.len(), 6);
    let rms = (rows
        .iter()
        .map(|r| (r["model"].as_f64().unwrap() - r["observed"].as_f64().unwrap()).powi(2))
        .sum::<f64>()
        / 6.0)
        .sqrt();
    assert!((doc["rms"].as_f64().unwrap() - rms).abs() < 1e-9);
    // The noise is about 1.2 nm rms, so a good fit leaves about that.
    assert!(rms < 2.0, "{rms}");
}

#[test]
fn fit_refuses_a_key_the_data_do_not_determine() {
    let d = scratch("undetermined");
    let input = write(&d, "chain.toml", FIT_CHAIN);
    let data = write(
        &d,
        "series.csv",
        "chain.bonds,gap\n3,3.9\n5,3.0\n7,2.5\n9,2.2\n",
    );
    // An end cap of zero width changes nothing, whatever its height.
    let out = run(&[
        "fit",
        input.to_str().unwrap(),
        "--data",
        data.to_str().unwrap(),
        "--free",
        "chain.alternation,chain.end_cap_height",
    ]);
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("do not determine chain.end_cap_height"),
        "{err}"
    );
    // A whole-number key cannot be free.
    let out = run(&[
        "fit",
        input.to_str().unwrap(),
        "--data",
        data.to_str().unwrap(),
        "--free",
        "grid.order",
    ]);
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn target_finds_the_alternation_for_a_wanted_wavelength() {
    let d = scratch("target");
    let input = write(&d, "chain.toml", FIT_CHAIN);
    let i = input.to_str().unwrap();
    let doc = json(&run_ok(&[
        "fit",
        i,
        "--set",
        "chain.bonds=11",
        "--target",
        "wavelength_nm=550",
        "--free",
        "chain.alternation",
        "--bounds",
        "chain.alternation=0:3",
        "--json",
    ]));
    let a = doc["parameters"][0]["value"].as_f64().unwrap();
    assert!(a > 0.0 && a < 3.0);
    // Check it independently with solve.
    let out = run_ok(&[
        "solve",
        i,
        "--set",
        "chain.bonds=11",
        "--set",
        &format!("chain.alternation={a:?}"),
        "--json",
    ]);
    let w = json(&out)["occupancy"]["wavelength_nm"].as_f64().unwrap();
    assert!((w - 550.0).abs() < 1e-6, "{w}");
    // Out of reach: a clear message, exit 2.
    let out = run(&[
        "fit",
        i,
        "--set",
        "chain.bonds=11",
        "--target",
        "wavelength_nm=250",
        "--free",
        "chain.alternation",
        "--bounds",
        "chain.alternation=0:3",
    ]);
    assert_eq!(out.status.code(), Some(2));
    assert!(
        String::from_utf8_lossy(&out.stderr).contains("no value of chain.alternation in [0, 3]")
    );
}
