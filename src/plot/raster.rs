//! PNG from a recorded [`Scene`]: the primitives and the glyph outlines
//! are filled and stroked with antialiasing by `tiny-skia` (pure Rust),
//! and the pixels encoded by `png` as 8-bit RGB with the resolution
//! recorded in a `pHYs` chunk.

use super::font::{self, Seg};
use super::scene::{Ink, Item, Label, Scene, P};
use super::PlotError;
use tiny_skia::{FillRule, LineCap, LineJoin, Paint, PathBuilder, Pixmap, Stroke, Transform};

fn paint(ink: Ink) -> Paint<'static> {
    let mut p = Paint::default();
    let a = (ink.alpha * 255.0).round().clamp(0.0, 255.0) as u8;
    p.set_color_rgba8(ink.rgb.0, ink.rgb.1, ink.rgb.2, a);
    p.anti_alias = true;
    p
}

fn stroke(width: f64) -> Stroke {
    Stroke {
        width: width.max(0.1) as f32,
        line_cap: LineCap::Butt,
        line_join: LineJoin::Round,
        ..Stroke::default()
    }
}

fn polyline(pts: &[P], close: bool) -> Option<tiny_skia::Path> {
    let mut pb = PathBuilder::new();
    let (first, rest) = pts.split_first()?;
    pb.move_to(first.0 as f32, first.1 as f32);
    for p in rest {
        pb.line_to(p.0 as f32, p.1 as f32);
    }
    if close {
        pb.close();
    }
    pb.finish()
}

fn glyphs(scene: &Scene, l: &Label) -> Option<tiny_skia::Path> {
    let (line, m) = l.placed(scene.face);
    let mut pb = PathBuilder::new();
    for g in &line.glyphs {
        let at = |x: f64, y: f64| {
            let (x, y) = m.apply(g.pen + x, y);
            (x as f32, y as f32)
        };
        for seg in font::outline(scene.face, g.id).0 {
            match seg {
                Seg::Move(x, y) => {
                    let (x, y) = at(x, y);
                    pb.move_to(x, y);
                }
                Seg::Line(x, y) => {
                    let (x, y) = at(x, y);
                    pb.line_to(x, y);
                }
                Seg::Quad(x1, y1, x, y) => {
                    let ((x1, y1), (x, y)) = (at(x1, y1), at(x, y));
                    pb.quad_to(x1, y1, x, y);
                }
                Seg::Cubic(x1, y1, x2, y2, x, y) => {
                    let ((x1, y1), (x2, y2), (x, y)) = (at(x1, y1), at(x2, y2), at(x, y));
                    pb.cubic_to(x1, y1, x2, y2, x, y);
                }
                Seg::Close => pb.close(),
            }
        }
    }
    pb.finish()
}

/// Renders the scene into RGB pixels (three bytes per pixel, rows top to
/// bottom) on white.
pub(super) fn pixels(scene: &Scene) -> Result<Vec<u8>, PlotError> {
    let mut pm = Pixmap::new(scene.w, scene.h)
        .ok_or_else(|| PlotError::BadSize(format!("{} x {} pixels", scene.w, scene.h)))?;
    pm.fill(tiny_skia::Color::WHITE);
    let id = Transform::identity();
    for item in &scene.items {
        match item {
            Item::Path { pts, ink, width } => {
                if let Some(p) = polyline(pts, false) {
                    pm.stroke_path(&p, &paint(*ink), &stroke(*width), id, None);
                }
            }
            Item::Rect {
                from,
                to,
                ink,
                width,
                fill,
            } => {
                let corners = [*from, (to.0, from.1), *to, (from.0, to.1)];
                if let Some(p) = polyline(&corners, true) {
                    if *fill {
                        pm.fill_path(&p, &paint(*ink), FillRule::Winding, id, None);
                    } else {
                        let mut s = stroke(*width);
                        s.line_join = LineJoin::Miter;
                        pm.stroke_path(&p, &paint(*ink), &s, id, None);
                    }
                }
            }
            Item::Circle {
                c,
                r,
                ink,
                width,
                fill,
            } => {
                if let Some(p) = PathBuilder::from_circle(c.0 as f32, c.1 as f32, r.max(0.5) as f32)
                {
                    if *fill {
                        pm.fill_path(&p, &paint(*ink), FillRule::Winding, id, None);
                    } else {
                        pm.stroke_path(&p, &paint(*ink), &stroke(*width), id, None);
                    }
                }
            }
            Item::Polygon { pts, ink } => {
                if let Some(p) = polyline(pts, true) {
                    pm.fill_path(&p, &paint(*ink), FillRule::Winding, id, None);
                }
            }
            Item::Text(l) => {
                if let Some(p) = glyphs(scene, l) {
                    pm.fill_path(&p, &paint(l.ink), FillRule::Winding, id, None);
                }
            }
        }
    }
    // Opaque white underneath: premultiplied RGBA equals plain RGBA.
    Ok(pm
        .data()
        .chunks_exact(4)
        .flat_map(|p| [p[0], p[1], p[2]])
        .collect())
}

/// Encodes RGB pixels as PNG with `dpi` in the `pHYs` chunk.
pub(super) fn encode(rgb: &[u8], w: u32, h: u32, dpi: f64) -> Result<Vec<u8>, PlotError> {
    let err = |e: png::EncodingError| PlotError::Encode(e.to_string());
    let mut out = Vec::new();
    {
        let mut enc = png::Encoder::new(&mut out, w, h);
        enc.set_color(png::ColorType::Rgb);
        enc.set_depth(png::BitDepth::Eight);
        let per_metre = (dpi / 0.0254).round() as u32;
        enc.set_pixel_dims(Some(png::PixelDimensions {
            xppu: per_metre,
            yppu: per_metre,
            unit: png::Unit::Meter,
        }));
        let mut wr = enc.write_header().map_err(err)?;
        wr.write_image_data(rgb).map_err(err)?;
        wr.finish().map_err(err)?;
    }
    Ok(out)
}
