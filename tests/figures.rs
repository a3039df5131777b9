//! Every command's `--plot` draws a well-formed SVG and a PNG of the asked
//! size, with the shipped font and no system font library.

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
    let pdf = dir.join("figure.pdf");
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
