//! The recording scene: a plotters drawing backend that keeps what the
//! figure kinds draw (lines, rectangles, circles, polygons, text) as
//! primitives in pixel coordinates, for the SVG, PNG and PDF writers to
//! render each in its own way.
//!
//! Coordinates: plotters addresses whole pixels; the scene takes pixel
//! `(i, j)` to be the square `[i, i + 1) x [j, j + 1)`, so a stroke through
//! pixel centres lies at `i + 0.5` and a one-pixel line is sharp in the
//! raster, and a filled rectangle covers its last row and column.
//!
//! Text is laid out with the shipped face ([`super::font`]) both when
//! plotters asks how large a label is and when it is drawn, so the space
//! that plotters reserves for a label is the space the label takes.

use super::font::{self, Line};
use super::style::Rgb;
use plotters_backend::text_anchor::{HPos, VPos};
use plotters_backend::{
    BackendColor, BackendCoord, BackendStyle, BackendTextStyle, DrawingBackend, DrawingErrorKind,
    FontTransform,
};
use ttf_parser::Face;

/// A colour with its opacity (0..=1).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Ink {
    pub rgb: Rgb,
    pub alpha: f64,
}

impl Ink {
    fn of(c: BackendColor) -> Ink {
        Ink {
            rgb: Rgb(c.rgb.0, c.rgb.1, c.rgb.2),
            alpha: c.alpha.clamp(0.0, 1.0),
        }
    }
}

/// A point in pixels, y down.
pub(super) type P = (f64, f64);

/// A label placed on the canvas.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct Label {
    /// The text as given.
    pub text: String,
    /// Type size, pixels per em.
    pub size: f64,
    pub ink: Ink,
    /// The anchor point.
    pub pos: P,
    /// The anchor's place in the box, as fractions of its width (0 left,
    /// 0.5 centre, 1 right) and of its height (0 top, 1 bottom).
    pub align: (f64, f64),
    /// Quarter turns clockwise on the page (plotters' `Rotate90` is 1).
    pub turns: u8,
}

/// An affine map `X = a gx + c gy + e`, `Y = b gx + d gy + f` from font
/// units (y up) of a line's start to canvas pixels (y down).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Affine {
    pub a: f64,
    pub b: f64,
    pub c: f64,
    pub d: f64,
    pub e: f64,
    pub f: f64,
}

impl Affine {
    pub fn apply(&self, gx: f64, gy: f64) -> P {
        (
            self.a * gx + self.c * gy + self.e,
            self.b * gx + self.d * gy + self.f,
        )
    }
}

impl Label {
    /// The laid-out glyphs and the map from font units to the canvas, as
    /// plotters places text: the anchor picks a point of the unrotated
    /// box (advance wide, ascender to descender high), then the box turns
    /// about the anchor.
    pub fn placed(&self, face: &Face<'_>) -> (Line, Affine) {
        let line = font::layout(face, &self.text);
        let (upem, asc, desc) = font::metrics(face);
        let s = self.size / upem;
        let (w, h) = (line.advance * s, (asc - desc) * s);
        let dx = -self.align.0 * w;
        let dy = -self.align.1 * h;
        // Rotation rows (plotters' FontTransform::transform).
        let [[r00, r01], [r10, r11]] = match self.turns % 4 {
            0 => [[1.0, 0.0], [0.0, 1.0]],
            1 => [[0.0, -1.0], [1.0, 0.0]],
            2 => [[-1.0, 0.0], [0.0, -1.0]],
            _ => [[0.0, 1.0], [-1.0, 0.0]],
        };
        let base = dy + asc * s;
        let m = Affine {
            a: r00 * s,
            b: r10 * s,
            c: -r01 * s,
            d: -r11 * s,
            e: r00 * dx + r01 * base + self.pos.0,
            f: r10 * dx + r11 * base + self.pos.1,
        };
        (line, m)
    }

    /// The box `[x0, y0, x1, y1]` on the canvas that the glyph outlines of
    /// this label cover (ink, descenders included), `None` for blank text.
    pub fn ink_box(&self, face: &Face<'_>) -> Option<[f64; 4]> {
        let (line, m) = self.placed(face);
        let mut out: Option<[f64; 4]> = None;
        for g in &line.glyphs {
            let Some([x0, y0, x1, y1]) = font::outline(face, g.id).1 else {
                continue;
            };
            for (gx, gy) in [(x0, y0), (x0, y1), (x1, y0), (x1, y1)] {
                let (x, y) = m.apply(g.pen + gx, gy);
                out = Some(match out {
                    None => [x, y, x, y],
                    Some(b) => [b[0].min(x), b[1].min(y), b[2].max(x), b[3].max(y)],
                });
            }
        }
        out
    }
}

/// One drawn primitive.
#[derive(Debug, Clone, PartialEq)]
pub(super) enum Item {
    /// An open polyline, stroked.
    Path { pts: Vec<P>, ink: Ink, width: f64 },
    /// An axis-aligned rectangle, filled or stroked.
    Rect {
        from: P,
        to: P,
        ink: Ink,
        width: f64,
        fill: bool,
    },
    /// A circle, filled or stroked.
    Circle {
        c: P,
        r: f64,
        ink: Ink,
        width: f64,
        fill: bool,
    },
    /// A closed polygon, filled.
    Polygon { pts: Vec<P>, ink: Ink },
    /// A line of text.
    Text(Label),
}

/// The recorded figure: canvas size and primitives in drawing order.
#[derive(Debug, Clone)]
pub(super) struct Scene {
    pub w: u32,
    pub h: u32,
    pub items: Vec<Item>,
    pub face: &'static Face<'static>,
}

/// The scene never fails to record.
#[derive(Debug)]
pub(super) struct Never;

impl std::fmt::Display for Never {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str("scene error")
    }
}

impl std::error::Error for Never {}

type Res = Result<(), DrawingErrorKind<Never>>;

fn centre((x, y): BackendCoord) -> P {
    (f64::from(x) + 0.5, f64::from(y) + 0.5)
}

impl Scene {
    /// An empty scene of `w` by `h` pixels.
    pub fn new(w: u32, h: u32, face: &'static Face<'static>) -> Scene {
        Scene {
            w,
            h,
            items: Vec::new(),
            face,
        }
    }

    /// Every label with the box its glyphs cover on the canvas.
    pub fn label_boxes(&self) -> Vec<(&str, [f64; 4])> {
        self.items
            .iter()
            .filter_map(|i| match i {
                Item::Text(l) => l.ink_box(self.face).map(|b| (l.text.as_str(), b)),
                _ => None,
            })
            .collect()
    }
}

/// The plotters backend that records into a [`Scene`].
pub(super) struct Recorder<'a>(pub &'a mut Scene);

impl DrawingBackend for Recorder<'_> {
    type ErrorType = Never;

    fn get_size(&self) -> (u32, u32) {
        (self.0.w, self.0.h)
    }

    fn ensure_prepared(&mut self) -> Res {
        Ok(())
    }

    fn present(&mut self) -> Res {
        Ok(())
    }

    fn draw_pixel(&mut self, p: BackendCoord, color: BackendColor) -> Res {
        if color.alpha > 0.0 {
            let from = (f64::from(p.0), f64::from(p.1));
            self.0.items.push(Item::Rect {
                from,
                to: (from.0 + 1.0, from.1 + 1.0),
                ink: Ink::of(color),
                width: 0.0,
                fill: true,
            });
        }
        Ok(())
    }

    fn draw_line<S: BackendStyle>(&mut self, from: BackendCoord, to: BackendCoord, s: &S) -> Res {
        self.draw_path([from, to], s)
    }

    fn draw_rect<S: BackendStyle>(
        &mut self,
        ul: BackendCoord,
        br: BackendCoord,
        s: &S,
        fill: bool,
    ) -> Res {
        if s.color().alpha == 0.0 {
            return Ok(());
        }
        let (from, to) = if fill {
            let (x0, x1) = (ul.0.min(br.0), ul.0.max(br.0));
            let (y0, y1) = (ul.1.min(br.1), ul.1.max(br.1));
            (
                (f64::from(x0), f64::from(y0)),
                (f64::from(x1) + 1.0, f64::from(y1) + 1.0),
            )
        } else {
            (centre(ul), centre(br))
        };
        self.0.items.push(Item::Rect {
            from,
            to,
            ink: Ink::of(s.color()),
            width: f64::from(s.stroke_width()),
            fill,
        });
        Ok(())
    }

    fn draw_path<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        path: I,
        s: &S,
    ) -> Res {
        let pts: Vec<P> = path.into_iter().map(centre).collect();
        if s.color().alpha > 0.0 && pts.len() >= 2 {
            self.0.items.push(Item::Path {
                pts,
                ink: Ink::of(s.color()),
                width: f64::from(s.stroke_width()),
            });
        }
        Ok(())
    }

    fn draw_circle<S: BackendStyle>(&mut self, c: BackendCoord, r: u32, s: &S, fill: bool) -> Res {
        if s.color().alpha > 0.0 {
            self.0.items.push(Item::Circle {
                c: centre(c),
                r: f64::from(r),
                ink: Ink::of(s.color()),
                width: f64::from(s.stroke_width()),
                fill,
            });
        }
        Ok(())
    }

    fn fill_polygon<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(
        &mut self,
        vert: I,
        s: &S,
    ) -> Res {
        let pts: Vec<P> = vert.into_iter().map(centre).collect();
        if s.color().alpha > 0.0 && pts.len() >= 3 {
            self.0.items.push(Item::Polygon {
                pts,
                ink: Ink::of(s.color()),
            });
        }
        Ok(())
    }

    fn draw_text<T: BackendTextStyle>(&mut self, text: &str, s: &T, pos: BackendCoord) -> Res {
        if s.color().alpha == 0.0 || text.trim().is_empty() {
            return Ok(());
        }
        let anchor = s.anchor();
        let turns = match s.transform() {
            FontTransform::None => 0,
            FontTransform::Rotate90 => 1,
            FontTransform::Rotate180 => 2,
            FontTransform::Rotate270 => 3,
        };
        self.0.items.push(Item::Text(Label {
            text: text.to_string(),
            size: s.size(),
            ink: Ink::of(s.color()),
            pos: (f64::from(pos.0), f64::from(pos.1)),
            align: (
                match anchor.h_pos {
                    HPos::Left => 0.0,
                    HPos::Center => 0.5,
                    HPos::Right => 1.0,
                },
                match anchor.v_pos {
                    VPos::Top => 0.0,
                    VPos::Center => 0.5,
                    VPos::Bottom => 1.0,
                },
            ),
            turns,
        }));
        Ok(())
    }

    fn estimate_text_size<T: BackendTextStyle>(
        &self,
        text: &str,
        s: &T,
    ) -> Result<(u32, u32), DrawingErrorKind<Never>> {
        let (w, h) = font::text_size(self.0.face, text, s.size());
        Ok((w.ceil() as u32, h.ceil() as u32))
    }

    fn blit_bitmap(&mut self, _: BackendCoord, _: (u32, u32), _: &[u8]) -> Res {
        // No figure blits bitmaps; a scene has no raster to copy into.
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    fn label(turns: u8, h: f64, v: f64) -> Label {
        Label {
            text: "Ag".into(),
            size: 20.0,
            ink: Ink {
                rgb: Rgb(0, 0, 0),
                alpha: 1.0,
            },
            pos: (100.0, 50.0),
            align: (h, v),
            turns,
        }
    }

    #[test]
    fn anchors_and_turns_place_the_box() {
        let face = font::face().unwrap();
        let (w, h) = font::text_size(face, "Ag", 20.0);
        // Left-top anchor, no turn: ink inside [x, x + w] x [y, y + h].
        let b = label(0, 0.0, 0.0).ink_box(face).unwrap();
        assert!(b[0] >= 100.0 && b[2] <= 100.0 + w, "{b:?}");
        assert!(b[1] >= 50.0 && b[3] <= 50.0 + h, "{b:?}");
        // Bottom anchor: the descender of g ends above the anchor line.
        let b = label(0, 0.5, 1.0).ink_box(face).unwrap();
        assert!(b[3] <= 50.0 + 1e-9 && b[3] > 50.0 - 0.3 * h, "{b:?}");
        // A quarter turn anticlockwise (Rotate270, the left axis title)
        // with the top anchored at x = 100: the text lies right of it and
        // reads upwards, centred on y = 50.
        let b = label(3, 0.5, 0.0).ink_box(face).unwrap();
        assert!(b[0] >= 100.0 && b[2] <= 100.0 + h, "{b:?}");
        assert_abs_diff_eq!((b[1] + b[3]) / 2.0, 50.0, epsilon = 0.1 * w);
        let (_, m) = label(3, 0.0, 0.0).placed(face);
        let (x0, y0) = m.apply(0.0, 0.0);
        let (x1, y1) = m.apply(1000.0, 0.0);
        assert_abs_diff_eq!(x0, x1, epsilon = 1e-9);
        assert!(y1 < y0, "reads upwards");
    }
}
