//! SVG from a recorded [`Scene`]: every label is drawn as the outlines of
//! its glyphs (a `path` carrying the text in `aria-label`), so the file
//! names no font and looks the same wherever it is opened.

use super::font::{self, Seg};
use super::scene::{Affine, Ink, Item, Label, Scene, P};
use std::fmt::Write;

/// A coordinate with two decimals, trailing zeros dropped, never `-0`.
pub(super) fn num(v: f64) -> String {
    let s = format!("{v:.2}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" {
        "0".into()
    } else {
        s.to_string()
    }
}

fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            c => out.push(c),
        }
    }
    out
}

/// The paint of a closed shape: filled with `ink`, or outlined in it with
/// a stroke of `width`.
fn look(fill: bool, ink: Ink, width: f64) -> String {
    if fill {
        paint("fill", ink)
    } else {
        format!(
            r#" fill="none"{} stroke-width="{}""#,
            paint("stroke", ink),
            num(width)
        )
    }
}

fn paint(kind: &str, ink: Ink) -> String {
    let mut s = format!(r#" {kind}="{}""#, ink.rgb.hex());
    if ink.alpha < 1.0 {
        let _ = write!(s, r#" {kind}-opacity="{}""#, num(ink.alpha));
    }
    s
}

fn points(pts: &[P]) -> String {
    pts.iter()
        .map(|(x, y)| format!("{},{}", num(*x), num(*y)))
        .collect::<Vec<_>>()
        .join(" ")
}

/// The path data of a label: every glyph outline mapped to the canvas with
/// absolute commands only, so every number pair is a point on the canvas.
fn label_path(scene: &Scene, l: &Label) -> String {
    let (line, m): (_, Affine) = l.placed(scene.face);
    let mut d = String::new();
    for g in &line.glyphs {
        let at = |x: f64, y: f64| {
            let (x, y) = m.apply(g.pen + x, y);
            format!("{} {}", num(x), num(y))
        };
        for seg in font::outline(scene.face, g.id).0 {
            let _ = match seg {
                Seg::Move(x, y) => write!(d, "M{}", at(x, y)),
                Seg::Line(x, y) => write!(d, "L{}", at(x, y)),
                Seg::Quad(x1, y1, x, y) => write!(d, "Q{} {}", at(x1, y1), at(x, y)),
                Seg::Cubic(x1, y1, x2, y2, x, y) => {
                    write!(d, "C{} {} {}", at(x1, y1), at(x2, y2), at(x, y))
                }
                Seg::Close => write!(d, "Z"),
            };
        }
    }
    d
}

/// Writes the scene as a standalone SVG document.
pub(super) fn write(scene: &Scene) -> String {
    let mut out = String::new();
    let (w, h) = (scene.w, scene.h);
    let _ = writeln!(
        out,
        r#"<svg width="{w}" height="{h}" viewBox="0 0 {w} {h}" xmlns="http://www.w3.org/2000/svg">"#
    );
    for item in &scene.items {
        let _ = match item {
            Item::Path { pts, ink, width } => writeln!(
                out,
                r#"<polyline fill="none"{} stroke-width="{}" stroke-linejoin="round" points="{}"/>"#,
                paint("stroke", *ink),
                num(*width),
                points(pts)
            ),
            Item::Rect {
                from,
                to,
                ink,
                width,
                fill,
            } => {
                let look = look(*fill, *ink, *width);
                writeln!(
                    out,
                    r#"<rect x="{}" y="{}" width="{}" height="{}"{look}/>"#,
                    num(from.0.min(to.0)),
                    num(from.1.min(to.1)),
                    num((to.0 - from.0).abs()),
                    num((to.1 - from.1).abs())
                )
            }
            Item::Circle {
                c,
                r,
                ink,
                width,
                fill,
            } => {
                let look = look(*fill, *ink, *width);
                writeln!(
                    out,
                    r#"<circle cx="{}" cy="{}" r="{}"{look}/>"#,
                    num(c.0),
                    num(c.1),
                    num(*r)
                )
            }
            Item::Polygon { pts, ink } => writeln!(
                out,
                r#"<polygon{} points="{}"/>"#,
                paint("fill", *ink),
                points(pts)
            ),
            Item::Text(l) => writeln!(
                out,
                r#"<path class="text" aria-label="{}"{} d="{}"/>"#,
                escape(&l.text),
                paint("fill", l.ink),
                label_path(scene, l)
            ),
        };
    }
    out.push_str("</svg>\n");
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_are_short_and_never_negative_zero() {
        assert_eq!(num(1.0), "1");
        assert_eq!(num(-0.001), "0");
        assert_eq!(num(2.504), "2.5");
        assert_eq!(num(-3.25), "-3.25");
        assert_eq!(escape(r#"a<b & "c""#), "a&lt;b &amp; &quot;c&quot;");
    }
}
