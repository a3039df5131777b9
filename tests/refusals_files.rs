//! The catalogue of runs refused for the files they read and write, and of
//! the promises about files kept by runs that succeed: nothing lost,
//! nothing overwritten, nothing read that should not be.
//!
//! Each refused case runs the built binary in a fresh folder; the case's
//! files are made first, then the folder is hashed, and after the run it
//! must hold exactly the same files with the same bytes. Each case asserts
//! the exit status and the words of the message (which name the flag, the
//! file or the row at fault). The numbers in the comments are the items of
//! the issue the case checks.

mod common;

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use common::bin;

/// A small chain whose solves take milliseconds.
const CHAIN: &str = "[chain]\nbonds = 4\n[grid]\npoints = 200\n[levels]\ncount = 4\n";

/// A domain with a table term reading `table.csv`.
const TABLED: &str = "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 200\n[levels]\ncount = 3\n[[term]]\nshape = \"table\"\nfile = \"table.csv\"\n";

const TABLE: &str = "x,V\n0,0\n5,-1\n10,0\n";

/// A two-bond polymer cell.
const CELL: &str = "[chain]\nbonds = 6\nalternation = 1.0\n[grid]\nspacing = 0.05\n";

/// A measured series for `fit`.
const DATA: &str = "chain.bonds,wavelength_nm\n4,330\n6,420\n8,510\n";

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("chainwell-files-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// Every entry under `dir` (recursively), with the bytes of regular files,
/// the target of links and a tag for anything else.
fn snapshot(dir: &Path) -> BTreeMap<String, Vec<u8>> {
    let mut out = BTreeMap::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(d) = stack.pop() {
        for e in std::fs::read_dir(&d).unwrap() {
            let p = e.unwrap().path();
            let rel = p.strip_prefix(dir).unwrap().display().to_string();
            let m = std::fs::symlink_metadata(&p).unwrap();
            let content = if m.file_type().is_symlink() {
                let mut v = b"link:".to_vec();
                v.extend(
                    std::fs::read_link(&p)
                        .unwrap()
                        .display()
                        .to_string()
                        .bytes(),
                );
                v
            } else if m.is_dir() {
                stack.push(p.clone());
                b"folder".to_vec()
            } else if m.is_file() {
                std::fs::read(&p).unwrap()
            } else {
                b"special".to_vec()
            };
            out.insert(rel, content);
        }
    }
    out
}

fn run_in(dir: &Path, args: &[String]) -> Output {
    Command::new(bin())
        .current_dir(dir)
        .args(args)
        .output()
        .unwrap()
}

fn args(words: &[&str]) -> Vec<String> {
    words.iter().map(|s| s.to_string()).collect()
}

/// A sweep document of `CHAIN` over `chain.bonds=2:5`, made in `dir` as
/// `name` (with `extra` flags, e.g. a shard).
fn sweep_doc(dir: &Path, name: &str, extra: &[&str]) {
    std::fs::write(dir.join("sweep_in.toml"), CHAIN).unwrap();
    let mut a = args(&[
        "sweep",
        "sweep_in.toml",
        "--vary",
        "chain.bonds=2:5",
        "--json",
        "--save",
        name,
    ]);
    a.extend(args(extra));
    let out = run_in(dir, &a);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

/// Edits the JSON document at `path`.
fn tamper(path: &Path, f: impl FnOnce(&mut serde_json::Value)) {
    let mut doc: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    f(&mut doc);
    std::fs::write(path, serde_json::to_string_pretty(&doc).unwrap()).unwrap();
}

fn mkfifo(path: &Path) {
    let ok = Command::new("mkfifo").arg(path).status().unwrap().success();
    assert!(ok, "mkfifo {}", path.display());
}

/// One refused run.
struct Case {
    name: &'static str,
    /// Makes the case's files in the folder and returns the command line.
    setup: fn(&Path) -> Vec<String>,
    /// The exit status wanted.
    exit: i32,
    /// Words the message must hold.
    says: &'static [&'static str],
    /// Words it must not hold (content of a file that is not a table).
    never: &'static [&'static str],
}

const CASES: &[Case] = &[
    // 1. An output that is one of the run's inputs.
    Case {
        name: "sweep_save_over_its_input",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            args(&[
                "sweep",
                "in.toml",
                "--vary",
                "chain.bonds=2,3",
                "--save",
                "in.toml",
            ])
        },
        exit: 2,
        says: &["--save in.toml", "the input file"],
        never: &[],
    },
    Case {
        name: "sweep_csv_over_its_input",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            args(&[
                "sweep",
                "in.toml",
                "--vary",
                "chain.bonds=2,3",
                "--csv",
                "./in.toml",
            ])
        },
        exit: 2,
        says: &["--csv ./in.toml", "the input file"],
        never: &[],
    },
    Case {
        name: "sweep_csv_over_its_table",
        setup: |d| {
            std::fs::write(d.join("tp.toml"), TABLED).unwrap();
            std::fs::write(d.join("table.csv"), TABLE).unwrap();
            args(&[
                "sweep",
                "tp.toml",
                "--vary",
                "grid.points=100,120",
                "--csv",
                "table.csv",
            ])
        },
        exit: 2,
        says: &["--csv table.csv", "a table the input reads"],
        never: &[],
    },
    Case {
        name: "bands_csv_over_its_input",
        setup: |d| {
            std::fs::write(d.join("pc.toml"), CELL).unwrap();
            args(&["bands", "pc.toml", "--csv", "pc.toml"])
        },
        exit: 2,
        says: &["--csv pc.toml", "the input file"],
        never: &[],
    },
    Case {
        name: "merge_csv_over_a_part",
        setup: |d| {
            sweep_doc(d, "p1.json", &["--shard", "1/2"]);
            sweep_doc(d, "p2.json", &["--shard", "2/2"]);
            args(&["merge", "p1.json", "p2.json", "--csv", "p1.json"])
        },
        exit: 2,
        says: &["--csv p1.json", "a merge part"],
        never: &[],
    },
    Case {
        name: "fit_save_over_its_data",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            std::fs::write(d.join("d.csv"), DATA).unwrap();
            args(&[
                "fit",
                "in.toml",
                "--data",
                "d.csv",
                "--free",
                "chain.alternation",
                "--set",
                "chain.alternation=0.5",
                "--save",
                "d.csv",
            ])
        },
        exit: 2,
        says: &["--save d.csv", "--data"],
        never: &[],
    },
    Case {
        name: "solve_plot_over_its_input",
        setup: |d| {
            std::fs::write(d.join("in.svg"), CHAIN).unwrap();
            args(&["solve", "in.svg", "--plot", "in.svg"])
        },
        exit: 2,
        says: &["--plot in.svg", "the input file"],
        never: &[],
    },
    Case {
        name: "solve_plot_through_a_link_to_its_input",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            std::os::unix::fs::symlink("in.toml", d.join("fig.svg")).unwrap();
            args(&["solve", "in.toml", "--plot", "fig.svg"])
        },
        exit: 2,
        says: &["--plot fig.svg", "the input file"],
        never: &[],
    },
    Case {
        name: "solve_csv_folder_holding_its_table",
        setup: |d| {
            std::fs::write(d.join("in.toml"), TABLED.replace("table.csv", "levels.csv")).unwrap();
            std::fs::write(d.join("levels.csv"), TABLE).unwrap();
            args(&["solve", "in.toml", "--csv", "."])
        },
        exit: 2,
        says: &["--csv ./levels.csv", "a table the input reads"],
        never: &[],
    },
    Case {
        name: "two_outputs_one_file",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            args(&[
                "sweep",
                "in.toml",
                "--vary",
                "chain.bonds=2,3",
                "--save",
                "out.json",
                "--csv",
                "out.json",
            ])
        },
        exit: 2,
        says: &["--csv out.json", "--save out.json"],
        never: &[],
    },
    // 3. Bands too large for memory: refused before allocating, saying
    // what to change.
    Case {
        name: "bands_cell_too_fine_for_memory",
        setup: |d| {
            std::fs::write(d.join("pc.toml"), CELL).unwrap();
            args(&["bands", "pc.toml", "--set", "grid.spacing=0.0001"])
        },
        exit: 1,
        says: &[" GB", "coarser grid.spacing"],
        never: &[],
    },
    Case {
        name: "bands_too_many_kpoints_for_memory",
        setup: |d| {
            std::fs::write(d.join("pc.toml"), CELL).unwrap();
            args(&["bands", "pc.toml", "--kpoints", "1000000000"])
        },
        exit: 1,
        says: &[" GB", "fewer --kpoints"],
        never: &[],
    },
    // 4. Endless, huge or special files where a file is expected.
    Case {
        name: "table_is_dev_zero",
        setup: |d| {
            std::fs::write(d.join("in.toml"), TABLED.replace("table.csv", "/dev/zero")).unwrap();
            args(&["solve", "in.toml"])
        },
        exit: 2,
        says: &["in.toml:10:8", "character device"],
        never: &[],
    },
    Case {
        name: "input_is_a_fifo",
        setup: |d| {
            mkfifo(&d.join("in.toml"));
            args(&["solve", "in.toml"])
        },
        exit: 2,
        says: &["in.toml", "FIFO"],
        never: &[],
    },
    Case {
        name: "data_is_dev_urandom",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            args(&[
                "fit",
                "in.toml",
                "--data",
                "/dev/urandom",
                "--free",
                "chain.alternation",
                "--set",
                "chain.alternation=0.5",
            ])
        },
        exit: 2,
        says: &["/dev/urandom", "character device"],
        never: &[],
    },
    Case {
        name: "resume_from_dev_zero",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            args(&[
                "sweep",
                "in.toml",
                "--vary",
                "chain.bonds=2,3",
                "--resume",
                "/dev/zero",
                "--save",
                "s.json",
            ])
        },
        exit: 2,
        says: &["/dev/zero", "character device"],
        never: &[],
    },
    Case {
        name: "merge_part_is_a_fifo",
        setup: |d| {
            mkfifo(&d.join("part.json"));
            args(&["merge", "part.json"])
        },
        exit: 2,
        says: &["part.json", "FIFO"],
        never: &[],
    },
    Case {
        name: "input_larger_than_the_cap",
        setup: |d| {
            let f = std::fs::File::create(d.join("huge.toml")).unwrap();
            // A sparse file: no disk is used.
            f.set_len(257 * 1024 * 1024).unwrap();
            args(&["solve", "huge.toml"])
        },
        exit: 2,
        says: &["huge.toml", "256 MiB"],
        never: &[],
    },
    Case {
        name: "table_that_is_another_kind_of_file",
        setup: |d| {
            std::fs::write(d.join("in.toml"), TABLED.replace("table.csv", "notes.txt")).unwrap();
            std::fs::write(d.join("notes.txt"), "secret:x:0:0:do not show\nmore\n").unwrap();
            args(&["solve", "in.toml"])
        },
        exit: 2,
        says: &["notes.txt:1:1", "no column named `x`"],
        never: &["secret", "do not show"],
    },
    // 5. Rows of --resume and merge checked against the case they claim.
    Case {
        name: "resume_row_relabelled",
        setup: |d| {
            sweep_doc(d, "s.json", &[]);
            tamper(&d.join("s.json"), |doc| {
                doc["complete"] = false.into();
                doc["rows"][1]["case"] = 3.into();
                let rows = doc["rows"].as_array_mut().unwrap();
                rows.truncate(2);
            });
            args(&[
                "sweep",
                "sweep_in.toml",
                "--vary",
                "chain.bonds=2:5",
                "--resume",
                "s.json",
            ])
        },
        exit: 2,
        says: &[
            "s.json: row 2 (case 3)",
            "chain.bonds = 3",
            "chain.bonds = 4",
        ],
        never: &[],
    },
    Case {
        name: "resume_row_without_levels",
        setup: |d| {
            sweep_doc(d, "s.json", &[]);
            tamper(&d.join("s.json"), |doc| {
                doc["rows"][2]["levels"] = serde_json::json!([]);
            });
            args(&[
                "sweep",
                "sweep_in.toml",
                "--vary",
                "chain.bonds=2:5",
                "--resume",
                "s.json",
            ])
        },
        exit: 2,
        says: &["s.json: row 3 (case 3)", "no levels"],
        never: &[],
    },
    Case {
        name: "merge_row_duplicated",
        setup: |d| {
            sweep_doc(d, "s.json", &[]);
            tamper(&d.join("s.json"), |doc| {
                let rows = doc["rows"].as_array_mut().unwrap();
                let first = rows[0].clone();
                rows.push(first);
            });
            args(&["merge", "s.json"])
        },
        exit: 2,
        says: &["s.json: row 5 (case 1)", "twice"],
        never: &[],
    },
    Case {
        name: "merge_row_of_another_shard",
        setup: |d| {
            sweep_doc(d, "p1.json", &["--shard", "1/2"]);
            tamper(&d.join("p1.json"), |doc| {
                doc["rows"][0]["case"] = 2.into();
                doc["rows"][0]["value"] = 3.into();
            });
            args(&["merge", "p1.json"])
        },
        exit: 2,
        says: &["p1.json: row 1 (case 2)", "shard 1/2"],
        never: &[],
    },
    Case {
        name: "merge_of_an_edited_input_text",
        setup: |d| {
            sweep_doc(d, "s.json", &[]);
            tamper(&d.join("s.json"), |doc| {
                doc["input"]["text"] = "[chain]\nbonds = 9\n".into();
            });
            args(&["merge", "s.json"])
        },
        exit: 2,
        says: &["s.json", "input_digest"],
        never: &[],
    },
    // 7. A second run saving to the same file.
    Case {
        name: "second_sweep_saving_to_a_locked_file",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            std::fs::write(d.join("s.json.lock"), "12345\n").unwrap();
            args(&[
                "sweep",
                "in.toml",
                "--vary",
                "chain.bonds=2,3",
                "--save",
                "s.json",
            ])
        },
        exit: 2,
        says: &["s.json", "another run (process 12345)", "s.json.lock"],
        never: &[],
    },
    // 8. Refused before any work.
    Case {
        name: "plot_into_a_missing_folder",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            args(&["solve", "in.toml", "--plot", "nodir/x.png"])
        },
        exit: 2,
        says: &["--plot nodir/x.png", "the folder nodir does not exist"],
        never: &["tmp"],
    },
    Case {
        name: "sweep_csv_into_a_missing_folder",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            args(&[
                "sweep",
                "in.toml",
                "--vary",
                "chain.bonds=2,3",
                "--csv",
                "nodir/s.csv",
            ])
        },
        exit: 2,
        says: &["--csv nodir/s.csv", "does not exist"],
        never: &[],
    },
    Case {
        name: "csv_folder_that_is_a_file",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            std::fs::write(d.join("out"), "mine").unwrap();
            args(&["solve", "in.toml", "--csv", "out"])
        },
        exit: 2,
        says: &["--csv out", "not a folder"],
        never: &[],
    },
    Case {
        name: "sweep_case_with_too_many_electrons",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            args(&["sweep", "in.toml", "--vary", "levels.electrons=2,40"])
        },
        exit: 2,
        says: &["--vary levels.electrons=2,40", "levels.electrons"],
        never: &[],
    },
    // 11. A request the tool would otherwise quietly cut down.
    Case {
        name: "converge_more_grids_than_the_grid_allows",
        setup: |d| {
            std::fs::write(d.join("in.toml"), CHAIN).unwrap();
            args(&["converge", "in.toml", "--grids", "60"])
        },
        exit: 2,
        says: &["--grids 60", "--grids 5 or fewer"],
        never: &[],
    },
    Case {
        name: "merge_with_set",
        setup: |d| {
            sweep_doc(d, "s.json", &[]);
            args(&["merge", "s.json", "--set", "chain.bonds=3"])
        },
        exit: 2,
        says: &["--set has nothing to change"],
        never: &[],
    },
];

fn run_case(case: &Case, root: &Path) -> Option<String> {
    let dir = root.join(case.name);
    std::fs::create_dir_all(&dir).unwrap();
    let argv = (case.setup)(&dir);
    let before = snapshot(&dir);
    let out = run_in(&dir, &argv);
    let err = String::from_utf8_lossy(&out.stderr).into_owned();
    let mut faults = Vec::new();
    if out.status.code() != Some(case.exit) {
        faults.push(format!(
            "exit status {:?}, want {}",
            out.status.code(),
            case.exit
        ));
    }
    if !err.starts_with("error: ") {
        faults.push("message does not start with `error: `".into());
    }
    for w in case.says {
        if !err.contains(w) {
            faults.push(format!("message does not say `{w}`"));
        }
    }
    for w in case.never {
        if err.contains(w) {
            faults.push(format!("message says `{w}`"));
        }
    }
    if err.contains("panicked") {
        faults.push("panicked".into());
    }
    if !out.stdout.is_empty() {
        faults.push("printed on stdout".into());
    }
    let after = snapshot(&dir);
    if after != before {
        let changed: Vec<_> = after
            .keys()
            .chain(before.keys())
            .filter(|k| after.get(*k) != before.get(*k))
            .collect();
        faults.push(format!("the folder changed: {changed:?}"));
    }
    let _ = std::fs::remove_dir_all(&dir);
    (!faults.is_empty()).then(|| format!("{}: {}\n{err}", case.name, faults.join("; ")))
}

#[test]
fn every_file_refusal_names_its_cause_and_changes_nothing() {
    let mut names: Vec<_> = CASES.iter().map(|c| c.name).collect();
    names.sort_unstable();
    names.dedup();
    assert_eq!(names.len(), CASES.len(), "case names repeat");
    let root = scratch("catalogue");
    let failures: Vec<String> = CASES.iter().filter_map(|c| run_case(c, &root)).collect();
    let _ = std::fs::remove_dir_all(&root);
    assert!(
        failures.is_empty(),
        "{} of {} cases failed:\n\n{}",
        failures.len(),
        CASES.len(),
        failures.join("\n")
    );
}

fn ok(out: &Output) {
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

/// Item 2 of the issue: writes go through links to their target, keep the target's
/// permissions, and write devices in place.
#[test]
fn writes_follow_links_keep_modes_and_spare_devices() {
    use std::os::unix::fs::{FileTypeExt, PermissionsExt};
    let d = scratch("links");
    std::fs::write(d.join("in.toml"), CHAIN).unwrap();
    std::fs::create_dir(d.join("figs")).unwrap();
    std::fs::write(d.join("figs/fig.svg"), "old").unwrap();
    std::os::unix::fs::symlink("figs/fig.svg", d.join("link.svg")).unwrap();
    std::fs::write(d.join("s.csv"), "old").unwrap();
    std::fs::set_permissions(d.join("s.csv"), std::fs::Permissions::from_mode(0o600)).unwrap();
    ok(&run_in(
        &d,
        &args(&["solve", "in.toml", "--plot", "link.svg"]),
    ));
    assert!(std::fs::symlink_metadata(d.join("link.svg"))
        .unwrap()
        .file_type()
        .is_symlink());
    assert!(std::fs::read_to_string(d.join("figs/fig.svg"))
        .unwrap()
        .contains("<svg"));
    ok(&run_in(
        &d,
        &args(&[
            "sweep",
            "in.toml",
            "--vary",
            "chain.bonds=2,3",
            "--csv",
            "s.csv",
        ]),
    ));
    let mode = std::fs::metadata(d.join("s.csv"))
        .unwrap()
        .permissions()
        .mode()
        & 0o777;
    assert_eq!(mode, 0o600);
    assert!(std::fs::read_to_string(d.join("s.csv"))
        .unwrap()
        .starts_with("case,"));
    ok(&run_in(
        &d,
        &args(&[
            "sweep",
            "in.toml",
            "--vary",
            "chain.bonds=2,3",
            "--csv",
            "/dev/null",
            "--save",
            "/dev/null",
        ]),
    ));
    assert!(std::fs::metadata("/dev/null")
        .unwrap()
        .file_type()
        .is_char_device());
    // Nothing else appeared: no temporary or lock file is left.
    let mut names: Vec<String> = std::fs::read_dir(&d)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    assert_eq!(names, ["figs", "in.toml", "link.svg", "s.csv"]);
    std::fs::remove_dir_all(&d).unwrap();
}

/// Item 6 of the issue: shards run in different folders (node-local scratch) merge into the
/// document of the unsharded run.
#[test]
fn shards_from_different_folders_merge() {
    let root = scratch("shards");
    for i in 1..=2 {
        let d = root.join(format!("node{i}"));
        std::fs::create_dir_all(&d).unwrap();
        std::fs::write(d.join("in.toml"), CHAIN).unwrap();
        // Each shard names its input by another path, as tasks on
        // node-local scratch do.
        let shard = format!("{i}/2");
        let input = format!("node{i}/in.toml");
        let part = format!("node{i}/part.json");
        ok(&run_in(
            &root,
            &args(&[
                "sweep",
                &input,
                "--vary",
                "chain.bonds=2:5",
                "--shard",
                &shard,
                "--save",
                &part,
                "--json",
            ]),
        ));
    }
    let merged = run_in(
        &root,
        &args(&["merge", "node1/part.json", "node2/part.json", "--json"]),
    );
    ok(&merged);
    let whole = run_in(
        &root.join("node1"),
        &args(&["sweep", "in.toml", "--vary", "chain.bonds=2:5", "--json"]),
    );
    ok(&whole);
    let m: serde_json::Value = serde_json::from_slice(&merged.stdout).unwrap();
    let w: serde_json::Value = serde_json::from_slice(&whole.stdout).unwrap();
    assert_eq!(m["rows"], w["rows"]);
    assert_eq!(m["input_digest"], w["input_digest"]);
    assert_eq!(m["complete"], true);
    std::fs::remove_dir_all(&root).unwrap();
}

/// Item 7 of the issue: SIGTERM stops a sweep like Ctrl-C: the finished cases are saved and
/// `--resume` finishes the study; no lock is left behind.
#[test]
fn sigterm_keeps_the_finished_cases() {
    let d = scratch("sigterm");
    // Cases of a few tenths of a second each on one thread.
    std::fs::write(
        d.join("in.toml"),
        "[chain]\nbonds = 10\n[grid]\npoints = 60000\n[levels]\ncount = 6\n",
    )
    .unwrap();
    let sweep = |extra: &[&str]| {
        let mut a = args(&[
            "sweep",
            "in.toml",
            "--vary",
            "chain.alternation=0:3:0.1",
            "--json",
        ]);
        a.extend(args(extra));
        a
    };
    let child = Command::new(bin())
        .current_dir(&d)
        .env("RAYON_NUM_THREADS", "1")
        .args(sweep(&["--save", "s.json"]))
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    // Wait for the first checkpoint, then stop the run as a scheduler does.
    let start = std::time::Instant::now();
    while !d.join("s.json").exists() && start.elapsed().as_secs() < 120 {
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    let killed = Command::new("kill")
        .args(["-TERM", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(killed.success());
    let out = child.wait_with_output().unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    let doc: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let saved: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(d.join("s.json")).unwrap()).unwrap();
    let rows = saved["rows"].as_array().unwrap().len();
    if doc["complete"] == false {
        assert_eq!(out.status.code(), Some(1), "{err}");
        assert!(
            err.contains("interrupted") && err.contains("--resume s.json"),
            "{err}"
        );
        assert_eq!(saved["complete"], false);
    }
    assert!(rows >= 1, "{err}");
    assert_eq!(doc["rows"], saved["rows"]);
    assert!(!d.join("s.json.lock").exists());
    let resumed = run_in(&d, &sweep(&["--resume", "s.json"]));
    ok(&resumed);
    let full: serde_json::Value = serde_json::from_slice(&resumed.stdout).unwrap();
    assert_eq!(full["rows"].as_array().unwrap().len(), 31);
    assert_eq!(full["complete"], true);
    std::fs::remove_dir_all(&d).unwrap();
}

/// Item 7 of the issue: a checkpoint that cannot be written loses no row: the document is
/// printed and the message says where it could not be written.
#[test]
fn a_failed_save_prints_the_document() {
    let d = scratch("fullsave");
    std::fs::write(d.join("in.toml"), CHAIN).unwrap();
    // /dev/full refuses every write with "no space left on device".
    let out = run_in(
        &d,
        &args(&[
            "sweep",
            "in.toml",
            "--vary",
            "chain.bonds=2:5",
            "--save",
            "/dev/full",
        ]),
    );
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{err}");
    assert!(
        err.contains("cannot write /dev/full") && err.contains("printed on stdout"),
        "{err}"
    );
    let doc: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(doc["rows"].as_array().unwrap().len(), 4);
    std::fs::remove_dir_all(&d).unwrap();
}

/// Item 9 of the issue: a set of CSV files that cannot all be written leaves the old set.
#[test]
fn solve_csv_set_is_replaced_whole_or_not_at_all() {
    let d = scratch("csvset");
    std::fs::write(d.join("in.toml"), CHAIN).unwrap();
    ok(&run_in(&d, &args(&["solve", "in.toml", "--csv", "out"])));
    let old = snapshot(&d.join("out"));
    assert_eq!(old.len(), 4, "{:?}", old.keys());
    // A folder in the way of one file of the set.
    std::fs::remove_file(d.join("out/spectrum.csv")).unwrap();
    std::fs::create_dir(d.join("out/spectrum.csv")).unwrap();
    std::fs::write(d.join("out/spectrum.csv/keep"), "mine").unwrap();
    let before = snapshot(&d);
    let out = run_in(
        &d,
        &args(&["solve", "in.toml", "--csv", "out", "--set", "chain.bonds=6"]),
    );
    assert_ne!(out.status.code(), Some(0));
    assert_eq!(snapshot(&d), before);
    std::fs::remove_dir_all(&d).unwrap();
}

/// Item 11 of the issue: a byte-order mark before the header of `fit --data` (as spreadsheet
/// programs write) is accepted, as it is in tables.
#[test]
fn a_bom_in_fit_data_is_accepted() {
    let d = scratch("bom");
    std::fs::write(
        d.join("in.toml"),
        "[chain]\nbonds = 4\n[grid]\npoints = 300\n",
    )
    .unwrap();
    std::fs::write(d.join("d.csv"), format!("\u{feff}{DATA}")).unwrap();
    let out = run_in(
        &d,
        &args(&[
            "fit",
            "in.toml",
            "--data",
            "d.csv",
            "--free",
            "chain.end_extension",
            "--set",
            "chain.end_extension=1.4",
            "--json",
        ]),
    );
    ok(&out);
    std::fs::remove_dir_all(&d).unwrap();
}
