//! PDF from a recorded [`Scene`]: one page the size of the figure at its
//! resolution (pixels × 72 / dpi points), vector paths, and the labels as
//! real text in the shipped face, embedded as a TrueType font program
//! (`FontFile2`) reduced to the glyphs the page uses.
//!
//! The file follows ISO 32000-1:2008 (PDF 1.7): a composite font
//! (`Type0`, `Identity-H`) over a `CIDFontType2` whose CIDs are glyph ids
//! (9.7.4, `CIDToGIDMap /Identity`), widths in the `W` array (9.7.4.3), a
//! `ToUnicode` CMap so text can be searched and copied (9.10.3), streams
//! compressed with `FlateDecode` (7.4.4), and a cross-reference table
//! (7.5.4). Opacity below 1 goes through `ExtGState` `CA`/`ca` (11.6.4.4).

use super::font::{self, POSTSCRIPT_NAME};
use super::scene::{Ink, Item, Label, Scene, P};
use super::subset;
use super::svg::num;
use super::PlotError;
use std::collections::BTreeMap;
use std::fmt::Write;

/// Bézier handle length for a quarter circle of radius 1, 4 (√2 − 1) / 3
/// (the usual cubic approximation of a circular arc; common practice, no
/// source).
const KAPPA: f64 = 0.552_284_749_830_793_4;

fn deflate(data: &[u8]) -> Vec<u8> {
    miniz_oxide::deflate::compress_to_vec_zlib(data, 6)
}

/// Accumulates the page content and what it uses.
struct Page {
    ops: String,
    /// Glyph ids used, with the character each shows.
    glyphs: BTreeMap<u16, char>,
    /// Opacity values below 1, each with its graphics-state name index.
    alphas: Vec<u16>,
}

impl Page {
    fn alpha(&mut self, ink: Ink) -> Option<usize> {
        if ink.alpha >= 1.0 {
            return None;
        }
        let key = (ink.alpha * 1000.0).round() as u16;
        Some(match self.alphas.iter().position(|a| *a == key) {
            Some(i) => i,
            None => {
                self.alphas.push(key);
                self.alphas.len() - 1
            }
        })
    }

    fn colour(&mut self, ink: Ink, stroke: bool) {
        let c = |v: u8| num(f64::from(v) / 255.0);
        let op = if stroke { "RG" } else { "rg" };
        let _ = writeln!(
            self.ops,
            "{} {} {} {op}",
            c(ink.rgb.0),
            c(ink.rgb.1),
            c(ink.rgb.2)
        );
        if let Some(i) = self.alpha(ink) {
            let _ = writeln!(self.ops, "/GS{i} gs");
        }
    }

    fn poly(&mut self, pts: &[P], close: bool) {
        for (i, (x, y)) in pts.iter().enumerate() {
            let op = if i == 0 { "m" } else { "l" };
            let _ = writeln!(self.ops, "{} {} {op}", num(*x), num(*y));
        }
        if close {
            self.ops.push_str("h\n");
        }
    }

    fn circle(&mut self, (cx, cy): P, r: f64) {
        let k = KAPPA * r;
        let _ = writeln!(self.ops, "{} {} m", num(cx + r), num(cy));
        for (p1, p2, p3) in [
            ((cx + r, cy + k), (cx + k, cy + r), (cx, cy + r)),
            ((cx - k, cy + r), (cx - r, cy + k), (cx - r, cy)),
            ((cx - r, cy - k), (cx - k, cy - r), (cx, cy - r)),
            ((cx + k, cy - r), (cx + r, cy - k), (cx + r, cy)),
        ] {
            let _ = writeln!(
                self.ops,
                "{} {} {} {} {} {} c",
                num(p1.0),
                num(p1.1),
                num(p2.0),
                num(p2.1),
                num(p3.0),
                num(p3.1)
            );
        }
        self.ops.push_str("h\n");
    }

    fn text(&mut self, scene: &Scene, l: &Label) {
        let (line, m) = l.placed(scene.face);
        if line.glyphs.is_empty() {
            return;
        }
        let upem = font::metrics(scene.face).0;
        self.ops.push_str("q\n");
        self.colour(l.ink, false);
        let f = |v: f64| format!("{v:.5}");
        let _ = writeln!(
            self.ops,
            "BT /F1 1 Tf {} {} {} {} {} {} Tm",
            f(m.a * upem),
            f(m.b * upem),
            f(m.c * upem),
            f(m.d * upem),
            f(m.e),
            f(m.f)
        );
        self.ops.push('<');
        for g in &line.glyphs {
            self.glyphs.entry(g.id).or_insert(g.ch);
            let _ = write!(self.ops, "{:04X}", g.id);
        }
        self.ops.push_str("> Tj ET\nQ\n");
    }
}

/// The page content in pixel coordinates (the page's matrix turns y down
/// and scales pixels to points).
fn content(scene: &Scene, dpi: f64) -> Page {
    let mut p = Page {
        ops: String::new(),
        glyphs: BTreeMap::new(),
        alphas: Vec::new(),
    };
    let s = 72.0 / dpi;
    let _ = writeln!(
        p.ops,
        "{s:.6} 0 0 {:.6} 0 {:.4} cm 1 j",
        -s,
        f64::from(scene.h) * s
    );
    for item in &scene.items {
        match item {
            Item::Path { pts, ink, width } => {
                p.ops.push_str("q\n");
                p.colour(*ink, true);
                let _ = writeln!(p.ops, "{} w", num(*width));
                p.poly(pts, false);
                p.ops.push_str("S Q\n");
            }
            Item::Rect {
                from,
                to,
                ink,
                width,
                fill,
            } => {
                p.ops.push_str("q\n");
                p.colour(*ink, !fill);
                let corners = [*from, (to.0, from.1), *to, (from.0, to.1)];
                if !fill {
                    let _ = writeln!(p.ops, "{} w 0 j", num(*width));
                }
                p.poly(&corners, true);
                p.ops.push_str(if *fill { "f Q\n" } else { "S Q\n" });
            }
            Item::Circle {
                c,
                r,
                ink,
                width,
                fill,
            } => {
                p.ops.push_str("q\n");
                p.colour(*ink, !fill);
                if !fill {
                    let _ = writeln!(p.ops, "{} w", num(*width));
                }
                p.circle(*c, r.max(0.5));
                p.ops.push_str(if *fill { "f Q\n" } else { "S Q\n" });
            }
            Item::Polygon { pts, ink } => {
                p.ops.push_str("q\n");
                p.colour(*ink, false);
                p.poly(pts, true);
                p.ops.push_str("f Q\n");
            }
            Item::Text(l) => p.text(scene, l),
        }
    }
    p
}

/// A PDF file under construction: objects in order, their byte offsets.
struct Doc {
    bytes: Vec<u8>,
    offsets: Vec<usize>,
}

impl Doc {
    fn object(&mut self, body: &str) {
        self.offsets.push(self.bytes.len());
        let n = self.offsets.len();
        self.bytes
            .extend_from_slice(format!("{n} 0 obj\n{body}\nendobj\n").as_bytes());
    }

    fn stream(&mut self, dict: &str, data: &[u8]) {
        self.offsets.push(self.bytes.len());
        let n = self.offsets.len();
        self.bytes.extend_from_slice(
            format!(
                "{n} 0 obj\n<< {dict} /Length {} /Filter /FlateDecode >>\nstream\n",
                data.len()
            )
            .as_bytes(),
        );
        self.bytes.extend_from_slice(data);
        self.bytes.extend_from_slice(b"\nendstream\nendobj\n");
    }
}

/// The `ToUnicode` CMap taking each used glyph id to its character.
fn to_unicode(glyphs: &BTreeMap<u16, char>) -> String {
    let mut s = String::from(
        "/CIDInit /ProcSet findresource begin\n12 dict begin\nbegincmap\n\
         /CIDSystemInfo << /Registry (Adobe) /Ordering (UCS) /Supplement 0 >> def\n\
         /CMapName /Adobe-Identity-UCS def\n/CMapType 2 def\n\
         1 begincodespacerange\n<0000> <FFFF>\nendcodespacerange\n",
    );
    let pairs: Vec<(&u16, &char)> = glyphs.iter().collect();
    for chunk in pairs.chunks(100) {
        let _ = writeln!(s, "{} beginbfchar", chunk.len());
        for (id, ch) in chunk {
            let mut units = [0u16; 2];
            let hex: String = ch
                .encode_utf16(&mut units)
                .iter()
                .map(|u| format!("{u:04X}"))
                .collect();
            let _ = writeln!(s, "<{id:04X}> <{hex}>");
        }
        s.push_str("endbfchar\n");
    }
    s.push_str("endcmap\nCMapName currentdict /CMap defineresource pop\nend\nend\n");
    s
}

/// Writes the scene as a one-page PDF, `dpi` giving the page size.
pub(super) fn write(scene: &Scene, dpi: f64) -> Result<Vec<u8>, PlotError> {
    let face = scene.face;
    let page = content(scene, dpi);
    let s = 72.0 / dpi;
    let (wpt, hpt) = (f64::from(scene.w) * s, f64::from(scene.h) * s);
    let (upem, asc, desc) = font::metrics(face);
    let per_mille = |v: f64| format!("{:.1}", v * 1000.0 / upem);
    let ids: Vec<u16> = page.glyphs.keys().copied().collect();
    let program = subset::reduce(font::DEJAVU_SANS, &ids)?;
    // A reduced font's name carries a tag of six capitals (ISO 32000-1,
    // 9.6.4), here from an FNV-1a hash (Fowler, Noll and Vo) of the
    // glyphs it keeps.
    let tag: String = {
        let mut h: u64 = 0xcbf2_9ce4_8422_2325;
        for id in &ids {
            for b in id.to_be_bytes() {
                h = (h ^ u64::from(b)).wrapping_mul(0x0100_0000_01b3);
            }
        }
        (0..6)
            .map(|k| char::from(b'A' + ((h >> (8 * k)) % 26) as u8))
            .collect()
    };
    let name = format!("{tag}+{POSTSCRIPT_NAME}");

    let mut doc = Doc {
        bytes: b"%PDF-1.7\n%\xE2\xE3\xCF\xD3\n".to_vec(),
        offsets: Vec::new(),
    };
    // 1 catalog, 2 pages, 3 page, 4 content, 5 Type0, 6 CIDFont,
    // 7 descriptor, 8 font program, 9 ToUnicode, 10 info.
    doc.object("<< /Type /Catalog /Pages 2 0 R >>");
    doc.object("<< /Type /Pages /Kids [3 0 R] /Count 1 >>");
    let states: String = page
        .alphas
        .iter()
        .enumerate()
        .map(|(i, a)| {
            let a = f64::from(*a) / 1000.0;
            format!("/GS{i} << /Type /ExtGState /CA {a} /ca {a} >> ")
        })
        .collect();
    doc.object(&format!(
        "<< /Type /Page /Parent 2 0 R /MediaBox [0 0 {} {}] /Contents 4 0 R \
         /Resources << /Font << /F1 5 0 R >> /ExtGState << {states}>> >> >>",
        num(wpt),
        num(hpt)
    ));
    doc.stream("", &deflate(page.ops.as_bytes()));
    doc.object(&format!(
        "<< /Type /Font /Subtype /Type0 /BaseFont /{name} /Encoding /Identity-H \
         /DescendantFonts [6 0 R] /ToUnicode 9 0 R >>"
    ));
    let widths: String = ids
        .iter()
        .map(|id| {
            let adv = face
                .glyph_hor_advance(ttf_parser::GlyphId(*id))
                .unwrap_or(0);
            format!("{id} [{}] ", per_mille(f64::from(adv)))
        })
        .collect();
    doc.object(&format!(
        "<< /Type /Font /Subtype /CIDFontType2 /BaseFont /{name} \
         /CIDSystemInfo << /Registry (Adobe) /Ordering (Identity) /Supplement 0 >> \
         /FontDescriptor 7 0 R /DW 0 /W [{widths}] /CIDToGIDMap /Identity >>"
    ));
    let bb = face.global_bounding_box();
    let cap = f64::from(face.capital_height().unwrap_or(face.ascender()));
    doc.object(&format!(
        "<< /Type /FontDescriptor /FontName /{name} /Flags 32 \
         /FontBBox [{} {} {} {}] /ItalicAngle 0 /Ascent {} /Descent {} /CapHeight {} \
         /StemV 80 /FontFile2 8 0 R >>",
        per_mille(f64::from(bb.x_min)),
        per_mille(f64::from(bb.y_min)),
        per_mille(f64::from(bb.x_max)),
        per_mille(f64::from(bb.y_max)),
        per_mille(asc),
        per_mille(desc),
        per_mille(cap)
    ));
    doc.stream(&format!("/Length1 {}", program.len()), &deflate(&program));
    doc.stream("", &deflate(to_unicode(&page.glyphs).as_bytes()));
    doc.object("<< /Producer (chainwell) >>");

    let xref = doc.bytes.len();
    let n = doc.offsets.len() + 1;
    let mut tail = format!("xref\n0 {n}\n0000000000 65535 f \n");
    for off in &doc.offsets {
        let _ = writeln!(tail, "{off:010} 00000 n ");
    }
    let _ = write!(
        tail,
        "trailer\n<< /Size {n} /Root 1 0 R /Info 10 0 R >>\nstartxref\n{xref}\n%%EOF\n"
    );
    doc.bytes.extend_from_slice(tail.as_bytes());
    Ok(doc.bytes)
}
