//! Every command's `--plot` draws a well-formed SVG, a PNG of the asked
//! size and a PDF with the font embedded, with the shipped font and no
//! system font library; no label leaves the canvas, no axis title is an
//! input key or a column name, and the fit figure's residuals have the
//! sign of the fit document's.

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;

use common::bin;

fn potential(name: &str) -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("potentials")
        .join(name)
        .display()
        .to_string()
}

fn scratch() -> PathBuf {
    let d = std::env::temp_dir().join(format!("chainwell-figures-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// Runs chainwell with `args` plus `--plot FILE` for an SVG and a 640x480
/// PNG; returns the SVG text and the PNG's size.
fn draw(args: &[&str], name: &str) -> (String, (u32, u32)) {
    let dir = scratch();
    let svg = dir.join(format!("{name}.svg"));
    let png = dir.join(format!("{name}.png"));
    for (path, extra) in [(&svg, vec![]), (&png, vec!["--size", "640x480"])] {
        let mut a: Vec<&str> = args.to_vec();
        let p = path.to_str().unwrap();
        a.extend(["--plot", p]);
        a.extend(extra);
        let out = Command::new(bin()).args(&a).output().unwrap();
        assert!(
            out.status.success(),
            "{name}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
    let text = std::fs::read_to_string(&svg).unwrap();
    roxmltree::Document::parse(&text)
        .unwrap_or_else(|e| panic!("{name}: SVG not well formed: {e}"));
    let decoder = png::Decoder::new(std::fs::File::open(&png).unwrap());
    let reader = decoder.read_info().unwrap();
    let info = reader.info();
    (text, (info.width, info.height))
}

/// Level lines are drawn in a grey used for nothing else (#4D4D4D).
fn level_lines(svg: &str) -> usize {
    let doc = roxmltree::Document::parse(svg).unwrap();
    doc.descendants()
        .filter(|n| {
            n.attribute("stroke")
                .is_some_and(|s| s.eq_ignore_ascii_case("#4D4D4D"))
        })
        .count()
}

#[test]
fn solve_states_figure_draws_one_line_per_level() {
    let (svg, size) = draw(
        &[
            "solve",
            &potential("double_well.toml"),
            "--set",
            "grid.points=600",
            "--set",
            "levels.count=4",
        ],
        "states",
    );
    assert_eq!(size, (640, 480));
    assert!(level_lines(&svg) >= 4, "{}", level_lines(&svg));
    let (_, size) = draw(
        &[
            "solve",
            &potential("double_well.toml"),
            "--set",
            "grid.points=600",
            "--figure",
            "density",
        ],
        "density",
    );
    assert_eq!(size, (640, 480));
}

#[test]
fn solve_spectrum_figure() {
    let (svg, size) = draw(
        &[
            "solve",
            &potential("heteroatom_chain.toml"),
            "--set",
            "grid.points=600",
            "--figure",
            "spectrum",
        ],
        "spectrum",
    );
    assert_eq!(size, (640, 480));
    assert!(svg.contains("wavelength"));
}

#[test]
fn sweep_fit_bands_and_converge_figures() {
    let (svg, _) = draw(
        &[
            "sweep",
            &potential("alternating_chain.toml"),
            "--vary",
            "chain.bonds=3:9:2",
            "--set",
            "grid.points=300",
        ],
        "sweep",
    );
    assert!(level_lines(&svg) > 0);
    let (_, size) = draw(
        &[
            "fit",
            &potential("alternating_chain.toml"),
            "--data",
            &potential("demo_series.csv"),
            "--free",
            "chain.alternation",
            "--set",
            "grid.spacing=0.05",
            "--set",
            "chain.end_extension=1.6",
        ],
        "fit",
    );
    assert_eq!(size, (640, 480));
    let (_, size) = draw(
        &[
            "bands",
            &potential("polymer_cell.toml"),
            "--finite",
            "5:13:4",
        ],
        "bands",
    );
    assert_eq!(size, (640, 480));
    let (_, size) = draw(
        &[
            "converge",
            &potential("harmonic_well.toml"),
            "--set",
            "grid.points=200",
        ],
        "converge",
    );
    assert_eq!(size, (640, 480));
}

#[test]
fn sizes_in_centimetres_follow_the_dpi() {
    // 10.16 cm = 4 in; at 150 dpi that is 600 px.
    let dir = scratch();
    let png = dir.join("cm.png");
    let out = Command::new(bin())
        .args([
            "solve",
            &potential("ideal_box.toml"),
            "--set",
            "grid.points=200",
        ])
        .args([
            "--plot",
            png.to_str().unwrap(),
            "--size",
            "10.16x7.62cm",
            "--dpi",
            "150",
        ])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let reader = png::Decoder::new(std::fs::File::open(&png).unwrap())
        .read_info()
        .unwrap();
    assert_eq!((reader.info().width, reader.info().height), (600, 450));
}

#[test]
fn a_bad_plot_path_exits_2_and_writes_nothing() {
    let dir = scratch();
    let pdf = dir.join("figure.eps");
    let out = Command::new(bin())
        .args([
            "solve",
            &potential("ideal_box.toml"),
            "--set",
            "grid.points=200",
            "--plot",
        ])
        .arg(&pdf)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(!pdf.exists());
}

#[test]
fn the_binary_links_no_font_library() {
    // On a fresh machine there is no fontconfig or freetype; the figures use
    // the font shipped in assets/fonts. `ldd` lists the shared libraries.
    let Ok(out) = Command::new("ldd").arg(bin()).output() else {
        return; // no ldd on this system: nothing to inspect
    };
    let libs = String::from_utf8_lossy(&out.stdout).to_lowercase();
    assert!(!libs.is_empty());
    for lib in ["fontconfig", "freetype", "expat"] {
        assert!(!libs.contains(lib), "links {lib}:\n{libs}");
    }
}

/// The runs that draw every figure kind: (name, arguments).
fn every_kind() -> Vec<(&'static str, Vec<String>)> {
    let p = |n: &str| potential(n);
    let v = |a: &[&str]| a.iter().map(|s| s.to_string()).collect::<Vec<_>>();
    vec![
        (
            "states",
            v(&["solve", &p("ideal_box.toml"), "--set", "grid.points=300"]),
        ),
        (
            "density",
            v(&[
                "solve",
                &p("double_well.toml"),
                "--set",
                "grid.points=400",
                "--figure",
                "density",
            ]),
        ),
        (
            "spectrum",
            v(&[
                "solve",
                &p("alternating_chain.toml"),
                "--set",
                "grid.points=600",
                "--figure",
                "spectrum",
            ]),
        ),
        (
            "sweep",
            v(&[
                "sweep",
                &p("alternating_chain.toml"),
                "--vary",
                "chain.bonds=3:9:2",
                "--set",
                "grid.points=300",
            ]),
        ),
        (
            "gap",
            v(&[
                "sweep",
                &p("alternating_chain.toml"),
                "--vary",
                "chain.bonds=3:9:2",
                "--set",
                "grid.points=300",
                "--figure",
                "wavelength",
            ]),
        ),
        (
            "fit",
            v(&[
                "fit",
                &p("alternating_chain.toml"),
                "--data",
                &p("demo_series.csv"),
                "--free",
                "chain.alternation",
                "--set",
                "grid.spacing=0.05",
                "--set",
                "chain.end_extension=1.6",
            ]),
        ),
        (
            "bands",
            v(&["bands", &p("polymer_cell.toml"), "--finite", "5:13:4"]),
        ),
        (
            "converge",
            v(&[
                "converge",
                &p("harmonic_well.toml"),
                "--set",
                "grid.points=200",
            ]),
        ),
    ]
}

/// Runs chainwell with `args`, asserting success; returns stdout.
fn run(args: &[String]) -> String {
    let out = Command::new(bin()).args(args).output().unwrap();
    assert!(
        out.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).into_owned()
}

/// The labels of an SVG (their text) with the points of their glyph
/// outlines: label paths use absolute commands only, so the numbers of
/// `d` are x, y pairs on the canvas.
fn labels(svg: &str) -> Vec<(String, Vec<(f64, f64)>)> {
    let doc = roxmltree::Document::parse(svg).unwrap();
    doc.descendants()
        .filter(|n| n.attribute("class") == Some("text"))
        .map(|n| {
            let d = n.attribute("d").unwrap_or("");
            let nums: Vec<f64> = d
                .split(|c: char| c.is_ascii_alphabetic() || c.is_whitespace())
                .filter(|t| !t.is_empty())
                .map(|t| t.parse().unwrap())
                .collect();
            let pts = nums.chunks(2).map(|c| (c[0], c[1])).collect();
            (n.attribute("aria-label").unwrap_or("").to_string(), pts)
        })
        .collect()
}

fn canvas(svg: &str) -> (f64, f64) {
    let doc = roxmltree::Document::parse(svg).unwrap();
    let root = doc.root_element();
    let num = |a: &str| root.attribute(a).unwrap().parse::<f64>().unwrap();
    (num("width"), num("height"))
}

#[test]
fn no_label_of_any_figure_leaves_the_canvas() {
    let dir = scratch();
    for (name, args) in every_kind() {
        for (tag, size) in [
            ("wide", "1000x700"),
            ("small", "480x360"),
            ("print", "8.5x6cm"),
        ] {
            let path = dir.join(format!("inside-{name}-{tag}.svg"));
            let mut a = args.clone();
            a.extend([
                "--plot".into(),
                path.display().to_string(),
                "--size".into(),
                size.into(),
            ]);
            run(&a);
            let svg = std::fs::read_to_string(&path).unwrap();
            let (w, h) = canvas(&svg);
            let ls = labels(&svg);
            assert!(ls.len() > 4, "{name}: {} labels", ls.len());
            for (text, pts) in ls {
                for (x, y) in pts {
                    assert!(
                        (0.0..=w).contains(&x) && (0.0..=h).contains(&y),
                        "{name} {tag}: `{text}` reaches ({x}, {y}) outside {w} x {h}"
                    );
                }
            }
        }
    }
}

#[test]
fn axis_titles_are_words_with_units_not_keys() {
    let dir = scratch();
    // Input keys and column names the figures could show as they are.
    let raw = [
        "chain.bonds",
        "wavelength_nm",
        "chain.alternation",
        "energy_eV",
        "angstrom",
        "epsilon_",
        "x_",
        "gap (",
        "wavelength (",
        "residual (",
    ];
    let mut titles = Vec::new();
    for (name, args) in every_kind() {
        let path = dir.join(format!("titles-{name}.svg"));
        let mut a = args.clone();
        a.extend(["--plot".into(), path.display().to_string()]);
        run(&a);
        let svg = std::fs::read_to_string(&path).unwrap();
        let ls: Vec<String> = labels(&svg).into_iter().map(|l| l.0).collect();
        for l in &ls {
            for r in raw {
                assert!(!l.contains(r), "{name}: label `{l}` shows `{r}`");
            }
        }
        titles.push((name, ls));
    }
    let has = |name: &str, want: &str| {
        let ls = &titles.iter().find(|t| t.0 == name).unwrap().1;
        assert!(
            ls.iter().any(|l| l == want),
            "{name}: no `{want}` in {ls:?}"
        );
    };
    has("states", "position x (Å)");
    has("states", "energy E (eV)");
    has("spectrum", "wavelength λ (nm)");
    has("sweep", "bonds in the chain");
    has("gap", "λ_max (nm)");
    has("fit", "λ_max (nm)");
    has("fit", "bonds in the chain");
    has("bands", "wave vector k (Å⁻¹)");
    has("converge", "spacing h (Å)");
}

#[test]
fn pdf_is_valid_with_the_font_embedded() {
    let dir = scratch();
    let pdf = dir.join("states.pdf");
    run(&[
        "solve".into(),
        potential("ideal_box.toml"),
        "--set".into(),
        "grid.points=300".into(),
        "--plot".into(),
        pdf.display().to_string(),
        "--size".into(),
        "8.5x6cm".into(),
    ]);
    let b = std::fs::read(&pdf).unwrap();
    // Offsets count bytes: search the bytes, not decoded text.
    let find = |from: usize, pat: &[u8]| {
        b[from..]
            .windows(pat.len())
            .position(|w| w == pat)
            .map(|i| i + from)
    };
    let text = String::from_utf8_lossy(&b);
    assert!(b.starts_with(b"%PDF-1.7"));
    assert!(text.trim_end().ends_with("%%EOF"));
    // ISO 32000-1 7.5.4: every in-use xref entry points at its object.
    let sx = b.windows(9).rposition(|w| w == b"startxref").unwrap();
    let tail = std::str::from_utf8(&b[sx + 9..]).unwrap();
    let start: usize = tail.split_whitespace().next().unwrap().parse().unwrap();
    assert!(b[start..].starts_with(b"xref"));
    let table = std::str::from_utf8(&b[start..sx]).unwrap();
    let entries: Vec<&str> = table
        .lines()
        .skip(3)
        .take_while(|l| l.trim_end().ends_with(" n"))
        .collect();
    assert!(entries.len() >= 9, "{table}");
    for (i, e) in entries.iter().enumerate() {
        let off: usize = e[..10].parse().unwrap();
        let head = format!("{} 0 obj", i + 1);
        assert!(
            b[off..].starts_with(head.as_bytes()),
            "object {} at {off}",
            i + 1
        );
    }
    assert!(find(0, b"/FontFile2").is_some());
    assert!(text.contains("/FontFile2"));
    assert!(text.contains("/Subtype /CIDFontType2"));
    assert!(text.contains("/ToUnicode"));
    // 8.5 cm x 6 cm at 300 dpi is 1004 x 709 whole pixels of 72/300 pt.
    assert!(
        text.contains("/MediaBox [0 0 240.96 170.16]"),
        "{}",
        &text[..400]
    );
    // The embedded program is the shipped face reduced to the used glyphs.
    assert!(b.len() < 120_000, "{} bytes", b.len());
}

#[test]
fn png_is_antialiased() {
    let dir = scratch();
    let png_path = dir.join("aa.png");
    run(&[
        "solve".into(),
        potential("ideal_box.toml"),
        "--set".into(),
        "grid.points=300".into(),
        "--plot".into(),
        png_path.display().to_string(),
        "--size".into(),
        "640x480".into(),
    ]);
    let decoder = png::Decoder::new(std::fs::File::open(&png_path).unwrap());
    let mut reader = decoder.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).unwrap();
    let (w, h) = (info.width as usize, info.height as usize);
    assert_eq!(info.color_type, png::ColorType::Rgb);
    // Down the middle column, the curves and lines crossed are edged by
    // pixels between white and their ink: an aliased raster has only
    // white and the inks themselves.
    let px = |x: usize, y: usize| {
        let i = 3 * (y * w + x);
        (buf[i], buf[i + 1], buf[i + 2])
    };
    let mut shades = std::collections::BTreeSet::new();
    let mut edge = 0;
    for y in 0..h {
        let p = px(w / 2, y);
        if p != (255, 255, 255) {
            shades.insert(p);
            let (r, g, b) = p;
            // A pixel partly covered: lighter than any ink the figures use
            // (none is lighter than #E0E0E0 in all three channels).
            if r > 0xE0 || g > 0xE0 || b > 0xE0 {
                edge += 1;
            }
        }
    }
    assert!(shades.len() >= 8, "{shades:?}");
    assert!(edge >= 4, "{edge} partly covered pixels: {shades:?}");
}

#[test]
fn fit_residuals_have_the_documents_sign_and_a_key() {
    let dir = scratch();
    let svg_path = dir.join("fit-sign.svg");
    let json = run(&[
        "fit".into(),
        potential("alternating_chain.toml"),
        "--data".into(),
        potential("demo_series.csv"),
        "--free".into(),
        "chain.alternation".into(),
        "--set".into(),
        "grid.spacing=0.05".into(),
        "--set".into(),
        "chain.end_extension=1.6".into(),
        "--json".into(),
        "--plot".into(),
        svg_path.display().to_string(),
    ]);
    let doc: serde_json::Value = serde_json::from_str(&json).unwrap();
    let mut rows: Vec<(f64, f64)> = doc["rows"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| {
            (
                r["value"].as_f64().unwrap(),
                r["residual"].as_f64().unwrap(),
            )
        })
        .collect();
    rows.sort_by(|a, b| a.0.total_cmp(&b.0));
    // The model curve spans the data; a whole-number key stays on the
    // data's parity (odd bond counts here: 3, 5, ..., 17, every one).
    let curve = doc["curve"].as_array().unwrap();
    assert_eq!(curve.len(), rows.len(), "{} curve points", curve.len());
    assert_eq!(curve[0]["value"].as_f64(), Some(rows[0].0));
    assert_eq!(
        curve[curve.len() - 1]["value"].as_f64(),
        Some(rows[rows.len() - 1].0)
    );
    assert_eq!(doc["termination"], "converged");
    let svg = std::fs::read_to_string(&svg_path).unwrap();
    let parsed = roxmltree::Document::parse(&svg).unwrap();
    // The residual panel's zero line is the dashed grey (#888888).
    let zero_y: f64 = parsed
        .descendants()
        .find(|n| n.attribute("stroke") == Some("#888888"))
        .and_then(|n| n.attribute("points"))
        .and_then(|p| p.split_whitespace().next())
        .and_then(|p| p.split(',').nth(1))
        .unwrap()
        .parse()
        .unwrap();
    // Residual points: the filled circles of the points' colour below the
    // upper panel (the upper panel ends above the zero line's panel).
    let (_, h) = canvas(&svg);
    let mut res: Vec<(f64, f64)> = parsed
        .descendants()
        .filter(|n| n.tag_name().name() == "circle" && n.attribute("fill") == Some("#0072B2"))
        .map(|n| {
            let f = |a: &str| n.attribute(a).unwrap().parse::<f64>().unwrap();
            (f("cx"), f("cy"))
        })
        .filter(|(_, y)| *y > 0.7 * h)
        .collect();
    res.sort_by(|a, b| a.0.total_cmp(&b.0));
    assert_eq!(res.len(), rows.len());
    for ((_, r), (_, y)) in rows.iter().zip(&res) {
        if r.abs() > 0.5 {
            // SVG y grows downwards: a positive residual sits above zero.
            assert_eq!(
                *r > 0.0,
                *y < zero_y,
                "residual {r} drawn at y {y}, zero at {zero_y}"
            );
        }
    }
    let ls: Vec<String> = labels(&svg).into_iter().map(|l| l.0).collect();
    assert!(ls.iter().any(|l| l == "observed"), "{ls:?}");
    assert!(ls.iter().any(|l| l == "model"), "{ls:?}");
}

#[test]
fn measured_data_over_sweep_and_spectrum() {
    let dir = scratch();
    let data = dir.join("gaps.csv");
    // Invented demo values.
    std::fs::write(
        &data,
        "chain.bonds,gap,uncertainty\n3,3.9,0.1\n5,2.9,0.1\n7,2.4,0.1\n",
    )
    .unwrap();
    let svg = dir.join("sweep-measured.svg");
    let base = vec![
        "sweep".to_string(),
        potential("alternating_chain.toml"),
        "--vary".into(),
        "chain.bonds=3:9:2".into(),
        "--set".into(),
        "grid.points=300".into(),
        "--data".into(),
        data.display().to_string(),
    ];
    let mut a = base.clone();
    a.extend(["--plot".into(), svg.display().to_string()]);
    run(&a);
    let text = std::fs::read_to_string(&svg).unwrap();
    let ls: Vec<String> = labels(&text).into_iter().map(|l| l.0).collect();
    assert!(ls.iter().any(|l| l == "measured"), "{ls:?}");
    assert!(ls.iter().any(|l| l == "HOMO–LUMO gap (eV)"), "{ls:?}");
    // Data of another quantity than the asked figure, or without a
    // figure, is refused before any case runs.
    for extra in [vec!["--figure", "wavelength", "--plot", "x.svg"], vec![]] {
        let mut a = base.clone();
        a.extend(extra.iter().map(|s| s.to_string()));
        let out = Command::new(bin()).args(&a).output().unwrap();
        assert_eq!(out.status.code(), Some(2), "{a:?}");
    }

    let measured = dir.join("film.csv");
    std::fs::write(
        &measured,
        "energy (eV),absorbance\n2.0,0.05\n2.5,0.6\n3.0,0.3\n3.5,0.1\n",
    )
    .unwrap();
    let svg = dir.join("spectrum-measured.svg");
    run(&[
        "solve".into(),
        potential("alternating_chain.toml"),
        "--set".into(),
        "grid.points=600".into(),
        "--figure".into(),
        "spectrum".into(),
        "--spectrum-axis".into(),
        "energy".into(),
        "--measured-spectrum".into(),
        measured.display().to_string(),
        "--plot".into(),
        svg.display().to_string(),
    ]);
    let text = std::fs::read_to_string(&svg).unwrap();
    let ls: Vec<String> = labels(&text).into_iter().map(|l| l.0).collect();
    assert!(ls.iter().any(|l| l == "photon energy (eV)"), "{ls:?}");
    assert!(ls.iter().any(|l| l == "measured (scaled)"), "{ls:?}");
    std::fs::write(&measured, "energy (eV),absorbance\n2.0,0.05\n2.5,many\n").unwrap();
    let out = Command::new(bin())
        .args([
            "solve",
            &potential("alternating_chain.toml"),
            "--figure",
            "spectrum",
        ])
        .args([
            "--measured-spectrum",
            measured.to_str().unwrap(),
            "--plot",
            "y.svg",
        ])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("film.csv:3"), "{err}");
}

#[test]
fn amplitude_flag_is_checked_and_scales_the_waves() {
    let dir = scratch();
    let mut tops = Vec::new();
    for a in ["0.2", "0.8"] {
        let svg = dir.join(format!("amp-{a}.svg"));
        run(&[
            "solve".into(),
            potential("ideal_box.toml"),
            "--set".into(),
            "grid.points=300".into(),
            "--amplitude".into(),
            a.into(),
            "--plot".into(),
            svg.display().to_string(),
        ]);
        tops.push(std::fs::read_to_string(&svg).unwrap());
    }
    assert_ne!(tops[0], tops[1]);
    for bad in ["0", "-1", "6", "nan"] {
        let out = Command::new(bin())
            .args([
                "solve",
                &potential("ideal_box.toml"),
                "--amplitude",
                bad,
                "--plot",
                "z.svg",
            ])
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(2), "--amplitude {bad}");
    }
}
