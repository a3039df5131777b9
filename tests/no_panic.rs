//! No panic anywhere on input: random documents, mutated documents and raw
//! bytes go through reading, overrides, checking, a small solve and the
//! reports, and each ends in a JSON document or a clean error message.
//!
//! The path is the fuzz target's (`fuzz/fuzz_targets/exercise.rs`, compiled
//! here so that the target keeps building); solves use at most 40 unknowns.

#[path = "../fuzz/fuzz_targets/exercise.rs"]
mod exercise;

use std::path::{Path, PathBuf};

use proptest::prelude::*;
use proptest::sample::select;

fn potentials_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("potentials")
}

/// Runs one document (and its `--set` lines) and checks the outcome is a
/// JSON document or an error message.
fn check(text: &str, sets: &[String]) -> Result<(), TestCaseError> {
    let mut data = text.as_bytes().to_vec();
    if !sets.is_empty() {
        data.push(0);
        data.extend_from_slice(sets.join("\n").as_bytes());
    }
    check_bytes(&data)
}

fn check_bytes(data: &[u8]) -> Result<(), TestCaseError> {
    match exercise::exercise_in(data, &potentials_dir()) {
        Ok(json) => {
            let doc: serde_json::Value = serde_json::from_str(&json)
                .map_err(|e| TestCaseError::fail(format!("JSON does not parse: {e}")))?;
            prop_assert_eq!(&doc["format"], "chainwell.solve/1");
        }
        Err(message) => {
            prop_assert!(message.starts_with("error: "), "{}", message);
            prop_assert!(message.len() > "error: ".len(), "{}", message);
        }
    }
    Ok(())
}

// ---- random documents from the input's own keys ----

/// A number as TOML text: mostly plausible, sometimes extreme or not finite.
fn number() -> impl Strategy<Value = String> {
    prop_oneof![
        6 => (0.05f64..20.0).prop_map(|x| format!("{x:?}")),
        3 => (-3i64..50).prop_map(|n| n.to_string()),
        1 => any::<f64>().prop_map(|x| if x.is_finite() { format!("{x:e}") } else { "nan".into() }),
        2 => select(vec![
            "0", "-1", "0.0", "-0.0", "nan", "-nan", "inf", "-inf", "1e308", "-1e308", "1e-308",
            "5e-324", "9223372036854775807", "-9223372036854775808", "4.9e-324", "1e20",
        ])
        .prop_map(String::from),
    ]
}

/// Words the input uses, and some it does not.
fn word() -> impl Strategy<Value = String> {
    select(vec![
        "walls",
        "periodic",
        "step",
        "ripple",
        "harmonic",
        "morse",
        "gauss",
        "linear",
        "table",
        "formula",
        "cubic",
        "hold",
        "eV",
        "meV",
        "hartree",
        "cm-1",
        "kJ/mol",
        "angstrom",
        "nm",
        "bohr",
        "numerov",
        "finite-difference",
        "gaussian",
        "lorentzian",
        "tabulated_profile.csv",
        "missing.csv",
        "x",
        "sin(x)",
        "1/(x-5)",
        "a*x^2 - b",
        "sqrt(x)",
        "ln(x)",
        "(",
        "x^x^x",
        "exp(x*x)",
        "min(x, 3)",
        "max(x)",
        "",
        "é",
        "1e999",
    ])
    .prop_map(|w| format!("{w:?}"))
}

/// A TOML value of any kind.
fn value() -> impl Strategy<Value = String> {
    prop_oneof![
        7 => number(),
        3 => word(),
        1 => any::<bool>().prop_map(|b| b.to_string()),
        1 => Just("[1, 2]".to_string()),
        1 => Just("{ a = 1 }".to_string()),
    ]
}

/// What a key takes.
#[derive(Clone, Copy, Debug)]
enum Kind {
    Num,
    Int,
    Words(&'static [&'static str]),
    Bool,
}

use Kind::{Bool, Int, Num, Words};

const SHAPES: &[&str] = &[
    "step", "ripple", "harmonic", "morse", "gauss", "linear", "table", "formula", "wobble",
];
const EXPRESSIONS: &[&str] = &[
    "x",
    "sin(x)",
    "1/(x-5)",
    "a*x^2 - b",
    "sqrt(x)",
    "ln(x)",
    "(",
    "x^x^x",
    "exp(x*x)",
    "min(x, 3)",
    "max(x)",
    "",
    "c * cos(2*pi*x/b)^2",
    "-x^2",
    "2x",
];

/// A value for a key of this kind: usually of the right kind, sometimes any.
fn typed(kind: Kind) -> BoxedStrategy<String> {
    let right = match kind {
        Num => number().boxed(),
        Int => prop_oneof![
            8 => (1i64..45).prop_map(|n| n.to_string()),
            2 => select(vec!["0", "-1", "2", "4", "6", "8", "9223372036854775807", "-9223372036854775808"])
                .prop_map(String::from),
            1 => number(),
        ]
        .boxed(),
        Words(w) => select(w.to_vec()).prop_map(|w| format!("{w:?}")).boxed(),
        Bool => any::<bool>().prop_map(|b| b.to_string()).boxed(),
    };
    prop_oneof![30 => right, 1 => value()].boxed()
}

/// `key = value` lines for some of `keys`, each with probability `p` (and
/// now and then a stray key).
fn entries(keys: &'static [(&'static str, Kind)], p: f64) -> BoxedStrategy<String> {
    let lines: Vec<BoxedStrategy<Option<String>>> = keys
        .iter()
        .map(|&(k, kind)| {
            prop::option::weighted(p, typed(kind))
                .prop_map(move |v| v.map(|v| format!("{k} = {v}\n")))
                .boxed()
        })
        .collect();
    (lines, prop::option::weighted(0.02, value()))
        .prop_map(|(lines, stray)| {
            let mut s: String = lines.into_iter().flatten().collect();
            if let Some(v) = stray {
                s.push_str(&format!("stray = {v}\n"));
            }
            s
        })
        .boxed()
}

/// A `[name]` table with some of its keys.
fn section(
    name: &'static str,
    keys: &'static [(&'static str, Kind)],
    p: f64,
) -> BoxedStrategy<String> {
    entries(keys, p)
        .prop_map(move |body| format!("[{name}]\n{body}"))
        .boxed()
}

const TERM_KEYS: &[(&str, Kind)] = &[
    ("from", Num),
    ("to", Num),
    ("height", Num),
    ("amplitude", Num),
    ("period", Num),
    ("phase", Num),
    ("center", Num),
    ("stiffness", Num),
    ("depth", Num),
    ("range", Num),
    ("width", Num),
    ("slope", Num),
    ("origin", Num),
    (
        "file",
        Words(&[
            "tabulated_profile.csv",
            "missing.csv",
            "../potentials/tabulated_profile.csv",
            "",
        ]),
    ),
    ("interpolation", Words(&["linear", "cubic", "spline"])),
    ("outside", Words(&["hold", "keep"])),
    ("expression", Words(EXPRESSIONS)),
];

/// A `[[term]]` whose keys are mostly the ones its shape takes.
fn term() -> impl Strategy<Value = String> {
    let constants =
        || prop::collection::btree_map(select(vec!["a", "b", "c", "x", "sin"]), number(), 0..4);
    let keys_of = |shape: &str| -> &'static [(&'static str, Kind)] {
        let pick = |names: &[&str]| -> &'static [(&'static str, Kind)] {
            let v: Vec<_> = TERM_KEYS
                .iter()
                .copied()
                .filter(|(k, _)| names.contains(k))
                .collect();
            Box::leak(v.into_boxed_slice())
        };
        match shape {
            "step" => pick(&["from", "to", "height"]),
            "ripple" => pick(&["amplitude", "period", "phase", "from", "to"]),
            "harmonic" => pick(&["center", "stiffness"]),
            "morse" => pick(&["center", "depth", "range"]),
            "gauss" => pick(&["center", "height", "width"]),
            "linear" => pick(&["slope", "origin", "from", "to"]),
            "table" => pick(&["file", "interpolation", "outside"]),
            "formula" => pick(&["expression"]),
            _ => TERM_KEYS,
        }
    };
    select(SHAPES.to_vec())
        .prop_flat_map(move |shape| {
            (
                Just(shape),
                prop_oneof![9 => entries(keys_of(shape), 0.85), 1 => entries(TERM_KEYS, 0.3)],
                prop::option::weighted(if shape == "formula" { 0.7 } else { 0.05 }, constants()),
            )
        })
        .prop_map(|(shape, body, constants)| {
            let mut s = format!("[[term]]\nshape = \"{shape}\"\n{body}");
            if let Some(c) = constants {
                s.push_str("[term.constants]\n");
                for (k, v) in c {
                    s.push_str(&format!("{k} = {v}\n"));
                }
            }
            s
        })
}

fn site() -> impl Strategy<Value = String> {
    entries(&[("atom", Int), ("height", Num), ("width", Num)], 0.9)
        .prop_map(|body| format!("[[chain.site]]\n{body}"))
}

/// A document: a domain or a chain (usually one of them), other tables
/// sometimes, terms, and `--set` overrides.
fn document() -> impl Strategy<Value = (String, Vec<String>)> {
    let place = prop_oneof![
        5 => section("domain", &[("from", Num), ("to", Num), ("boundary", Words(&["walls", "periodic", "open"]))], 0.9),
        3 => (
            section("chain", &[
                ("bond_length", Num), ("end_extension", Num), ("alternation", Num),
                ("end_cap_height", Num), ("end_cap_width", Num),
            ], 0.5),
            prop::option::weighted(0.95, typed(Int)),
            prop::collection::vec(site(), 0..3),
        )
            .prop_map(|(c, bonds, sites)| {
                let bonds = bonds.map(|b| format!("bonds = {b}\n")).unwrap_or_default();
                c.replacen('\n', &format!("\n{bonds}"), 1) + &sites.concat()
            }),
        1 => Just(String::new()),
    ];
    let optional = |s: BoxedStrategy<String>| prop::option::weighted(0.4, s);
    let sets = prop::collection::vec(
        (
            select(vec![
                "grid.points",
                "levels.count",
                "levels.electrons",
                "domain.to",
                "chain.bonds",
                "term.1.height",
                "term.1.shape",
                "particle.mass",
                "grid.order",
                "levels.first",
                "term.2.expression",
                "chain.site.1.atom",
                "units.energy",
                "grid",
            ]),
            prop_oneof![3 => number(), 1 => value(), 1 => Just("walls".to_string())],
        )
            .prop_map(|(k, v)| format!("{k}={v}")),
        0..3,
    );
    (
        prop::option::weighted(0.2, word()),
        place,
        optional(section(
            "units",
            &[
                ("length", Words(&["angstrom", "nm", "bohr", "furlong"])),
                (
                    "energy",
                    Words(&["eV", "meV", "hartree", "cm-1", "kJ/mol", "K"]),
                ),
            ],
            0.5,
        )),
        optional(section("particle", &[("mass", Num)], 0.9)),
        optional(section(
            "grid",
            &[
                ("points", Int),
                ("spacing", Num),
                ("tolerance", Num),
                ("order", Int),
                (
                    "scheme",
                    Words(&["finite-difference", "numerov", "spectral"]),
                ),
                ("max_points", Int),
            ],
            0.3,
        )),
        optional(section(
            "levels",
            &[
                ("count", Int),
                ("first", Int),
                ("below", Num),
                ("electrons", Int),
            ],
            0.4,
        )),
        optional(section(
            "spectrum",
            &[
                ("shape", Words(&["gaussian", "lorentzian", "voigt"])),
                ("width", Num),
                ("all_pairs", Bool),
            ],
            0.5,
        )),
        prop::collection::vec(term(), 0..3),
        prop_oneof![3 => Just(vec![]), 1 => sets],
    )
        .prop_map(
            |(title, place, units, particle, grid, levels, spectrum, terms, sets)| {
                let mut s = String::new();
                if let Some(t) = title {
                    s.push_str(&format!("title = {t}\n"));
                }
                for part in [units, particle, Some(place), grid, levels, spectrum]
                    .into_iter()
                    .flatten()
                {
                    s.push_str(&part);
                }
                s.push_str(&terms.concat());
                (s, sets)
            },
        )
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2500))]

    #[test]
    fn random_documents_never_panic((text, sets) in document()) {
        check(&text, &sets)?;
    }
}

// ---- mutated valid documents ----

/// Valid documents to mutate: the curated inputs and a few small ones.
fn bases() -> Vec<String> {
    let mut docs: Vec<String> = std::fs::read_dir(potentials_dir())
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "toml"))
        // The long chain asks for levels 991..1010, more than the capped
        // grids of these cases hold; it is run by tests/potentials.rs.
        .filter(|p| p.file_name().is_none_or(|n| n != "long_chain.toml"))
        .map(|p| std::fs::read_to_string(p).unwrap())
        .collect();
    docs.sort();
    docs.push("[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 30\n[levels]\ncount = 4\nelectrons = 4\n".into());
    docs.push("[chain]\nbonds = 6\nalternation = 0.4\n[[chain.site]]\natom = 3\nheight = -1.0\n[grid]\npoints = 35\n".into());
    docs.push("[domain]\nfrom = -5.0\nto = 5.0\nboundary = \"periodic\"\n[grid]\npoints = 24\n[levels]\nbelow = 3.0\n[[term]]\nshape = \"formula\"\nexpression = \"a * cos(x)^2 - b\"\n[term.constants]\na = 1.5\nb = 0.5\n".into());
    docs
}

/// One edit of a document's characters.
#[derive(Debug, Clone)]
enum Edit {
    Delete { at: usize, len: usize },
    Insert { at: usize, text: &'static str },
    DropLine { line: usize },
    CopyLine { from: usize, to: usize },
}

fn edit() -> impl Strategy<Value = Edit> {
    let tokens = select(vec![
        "=",
        "[",
        "]",
        "[[term]]\n",
        "[grid]\n",
        "\n",
        "\"",
        "'",
        "nan",
        "inf",
        "-",
        "0",
        "1e308",
        "-1e308",
        "x",
        "(",
        ")",
        "/ 0",
        "#",
        "{",
        "}",
        ",",
        ".",
        "é",
        "\u{0}",
        "\t",
        "points = 3\n",
        "count = 999\n",
        "electrons = 99\n",
        "order = 8\n",
        "shape = \"step\"\n",
        "9999999999",
        "[[chain.site]]\natom = 1\nheight = 1e308\n",
        "[levels]\nbelow = 1e300\n",
        "spacing = 1e-300\n",
        "expression = \"1/x\"\n",
    ]);
    prop_oneof![
        (any::<usize>(), 1usize..8).prop_map(|(at, len)| Edit::Delete { at, len }),
        (any::<usize>(), tokens).prop_map(|(at, text)| Edit::Insert { at, text }),
        any::<usize>().prop_map(|line| Edit::DropLine { line }),
        (any::<usize>(), any::<usize>()).prop_map(|(from, to)| Edit::CopyLine { from, to }),
    ]
}

fn apply(text: &str, edit: &Edit) -> String {
    let chars: Vec<char> = text.chars().collect();
    let mut lines: Vec<&str> = text.split_inclusive('\n').collect();
    let n = chars.len().max(1);
    match edit {
        Edit::Delete { at, len } => {
            let a = at % n;
            let b = (a + len).min(chars.len());
            chars[..a.min(chars.len())]
                .iter()
                .chain(&chars[b..])
                .collect()
        }
        Edit::Insert { at, text } => {
            let a = (at % (chars.len() + 1)).min(chars.len());
            let mut s: String = chars[..a].iter().collect();
            s.push_str(text);
            s.extend(&chars[a..]);
            s
        }
        Edit::DropLine { line } if !lines.is_empty() => {
            lines.remove(line % lines.len());
            lines.concat()
        }
        Edit::CopyLine { from, to } if !lines.is_empty() => {
            let l = lines[from % lines.len()];
            let at = to % (lines.len() + 1);
            lines.insert(at, l);
            lines.concat()
        }
        _ => text.to_string(),
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2500))]

    #[test]
    fn mutated_documents_never_panic(
        base in select(bases()),
        edits in prop::collection::vec(edit(), 0..5),
    ) {
        let text = edits.iter().fold(base, |t, e| apply(&t, e));
        check(&text, &[])?;
    }

    #[test]
    fn raw_bytes_never_panic(data in prop::collection::vec(any::<u8>(), 0..300)) {
        // The fuzz target's own entry point, tables looked up in ".".
        if let Err(message) = exercise::exercise(&data) {
            prop_assert!(message.starts_with("error: "), "{}", message);
        }
    }
}

/// The mutations start from documents that solve, so they reach the solve.
#[test]
fn the_bases_solve() {
    for base in bases() {
        check(&base, &[]).unwrap();
        assert!(
            exercise::exercise_in(base.as_bytes(), &potentials_dir()).is_ok(),
            "{base}"
        );
    }
}

/// A chain 2e20 Å long with a linear term ending inside it once panicked
/// with an overflow while the grid was aligned with the term's end.
#[test]
fn a_huge_chain_with_a_jump_is_refused_not_a_panic() {
    let text = "[chain]\nbonds = 1\nend_extension = 1e20\n\n[[term]]\nshape = \"linear\"\nslope = 0.1\nto = 1e20\n";
    check(text, &[]).unwrap();
    for sets in [
        vec!["grid.tolerance=1e-6".to_string()],
        vec!["grid.spacing=0.01".to_string()],
    ] {
        check(text, &sets).unwrap();
    }
}
