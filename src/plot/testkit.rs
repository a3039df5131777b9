//! Test helpers: temporary directories, SVG element counting, PNG size.

use super::{render, Figure, Style};
use std::path::PathBuf;
use std::sync::atomic::{AtomicU64, Ordering};

static COUNTER: AtomicU64 = AtomicU64::new(0);

/// A fresh empty directory under the system temporary directory.
pub fn tmpdir(tag: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!(
        "plot-test-{tag}-{}-{}",
        std::process::id(),
        COUNTER.fetch_add(1, Ordering::Relaxed)
    ));
    std::fs::create_dir_all(&d).unwrap();
    d
}

/// The `points` (polyline) or `y1` (line) of each element whose stroke is
/// `colour`, as (tag, first y) pairs.
pub fn stroked(svg: &str, colour: &str) -> Vec<(String, f64)> {
    let doc = roxmltree::Document::parse(svg).expect("well-formed SVG");
    doc.descendants()
        .filter(|n| n.attribute("stroke") == Some(colour))
        .map(|n| {
            let tag = n.tag_name().name().to_string();
            let y = match tag.as_str() {
                "polyline" => n
                    .attribute("points")
                    .and_then(|p| p.split_whitespace().next())
                    .and_then(|p| p.split(',').nth(1))
                    .and_then(|y| y.parse().ok())
                    .unwrap_or(f64::NAN),
                "line" => n
                    .attribute("y1")
                    .and_then(|y| y.parse().ok())
                    .unwrap_or(f64::NAN),
                _ => f64::NAN,
            };
            (tag, y)
        })
        .collect()
}

/// Number of distinct y values among horizontal polylines of `colour`.
pub fn distinct_rows(svg: &str, colour: &str) -> usize {
    let mut ys: Vec<i64> = stroked(svg, colour)
        .into_iter()
        .filter(|(t, y)| t == "polyline" && y.is_finite())
        .map(|(_, y)| y.round() as i64)
        .collect();
    ys.sort_unstable();
    ys.dedup();
    ys.len()
}

/// Count of elements with tag `tag` and attribute `attr` equal to `value`.
pub fn count(svg: &str, tag: &str, attr: &str, value: &str) -> usize {
    let doc = roxmltree::Document::parse(svg).expect("well-formed SVG");
    doc.descendants()
        .filter(|n| n.tag_name().name() == tag && n.attribute(attr) == Some(value))
        .count()
}

/// Width and height of PNG bytes.
pub fn png_size(bytes: &[u8]) -> (u32, u32) {
    let dec = png::Decoder::new(bytes);
    let reader = dec.read_info().expect("valid PNG");
    let info = reader.info();
    (info.width, info.height)
}

/// Renders `fig` to `<tag>.svg` and `<tag>.png` in a temporary directory,
/// checks that the PNG has the requested size, and returns the SVG text.
/// With `PLOT_SAMPLES=<dir>` set both files are also copied there.
pub fn render_both(fig: &Figure, style: &Style, tag: &str) -> String {
    let d = tmpdir(tag);
    let svg_path = d.join(format!("{tag}.svg"));
    let png_path = d.join(format!("{tag}.png"));
    render(fig, style, &svg_path).expect("SVG render");
    render(fig, style, &png_path).expect("PNG render");
    let svg = std::fs::read_to_string(&svg_path).unwrap();
    let png = std::fs::read(&png_path).unwrap();
    let (w, h, _) = style.size.pixels().unwrap();
    assert_eq!(png_size(&png), (w, h));
    roxmltree::Document::parse(&svg).expect("well-formed SVG");
    if let Ok(dir) = std::env::var("PLOT_SAMPLES") {
        std::fs::write(PathBuf::from(&dir).join(format!("{tag}.png")), &png).unwrap();
        std::fs::write(PathBuf::from(&dir).join(format!("{tag}.svg")), &svg).unwrap();
    }
    std::fs::remove_dir_all(&d).unwrap();
    svg
}
