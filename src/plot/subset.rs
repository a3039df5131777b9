//! A TrueType font program reduced to the glyphs a page uses, for
//! embedding in PDF.
//!
//! Glyph ids are kept (so PDF's `CIDToGIDMap /Identity` still holds): the
//! outlines of unused glyphs are emptied in `glyf` and `loca` is rewritten
//! in its long format; the components of composite glyphs are kept with
//! them. Only the tables a PDF reader needs to draw TrueType glyphs are
//! kept (ISO 32000-1:2008, 9.9: `head`, `hhea`, `loca`, `maxp`, `cvt `,
//! `prep`, `glyf`, `hmtx`, `fpgm`), with `OS/2` and `name`. Table layout,
//! composite glyph flags and checksums follow the OpenType specification
//! 1.9 (table directory; `glyf` composite descriptions; `head`
//! `checksumAdjustment` = 0xB1B0AFBA − sum of the font).

use super::PlotError;
use std::collections::BTreeSet;

const KEEP: [&[u8; 4]; 11] = [
    b"OS/2", b"cvt ", b"fpgm", b"glyf", b"head", b"hhea", b"hmtx", b"loca", b"maxp", b"name",
    b"prep",
];

fn bad(what: &str) -> PlotError {
    PlotError::Font(format!("embedded font: {what}"))
}

fn u16_at(b: &[u8], at: usize) -> Result<u16, PlotError> {
    b.get(at..at + 2)
        .map(|s| u16::from_be_bytes([s[0], s[1]]))
        .ok_or_else(|| bad("truncated"))
}

fn u32_at(b: &[u8], at: usize) -> Result<u32, PlotError> {
    b.get(at..at + 4)
        .map(|s| u32::from_be_bytes([s[0], s[1], s[2], s[3]]))
        .ok_or_else(|| bad("truncated"))
}

/// A font table: its tag and bytes.
type Table<'a> = ([u8; 4], &'a [u8]);

/// The tables of a font file: tag and bytes.
fn tables(font: &[u8]) -> Result<Vec<Table<'_>>, PlotError> {
    let n = usize::from(u16_at(font, 4)?);
    (0..n)
        .map(|i| {
            let r = 12 + 16 * i;
            let tag: [u8; 4] = font
                .get(r..r + 4)
                .and_then(|t| t.try_into().ok())
                .ok_or_else(|| bad("table directory"))?;
            let off = u32_at(font, r + 8)? as usize;
            let len = u32_at(font, r + 12)? as usize;
            let data = font
                .get(off..off + len)
                .ok_or_else(|| bad("table outside the file"))?;
            Ok((tag, data))
        })
        .collect()
}

fn find<'a>(t: &[([u8; 4], &'a [u8])], tag: &[u8; 4]) -> Result<&'a [u8], PlotError> {
    t.iter()
        .find(|(g, _)| g == tag)
        .map(|(_, d)| *d)
        .ok_or_else(|| bad(&format!("no {} table", String::from_utf8_lossy(tag))))
}

/// The sum of big-endian u32 words, the last padded with zeros.
fn checksum(data: &[u8]) -> u32 {
    data.chunks(4).fold(0u32, |s, c| {
        let mut w = [0u8; 4];
        w[..c.len()].copy_from_slice(c);
        s.wrapping_add(u32::from_be_bytes(w))
    })
}

/// Glyph ids referred to by composite glyph `g` (empty for a simple one).
fn components(g: &[u8]) -> Result<Vec<u16>, PlotError> {
    let mut out = Vec::new();
    if g.len() < 10 || (u16_at(g, 0)? as i16) >= 0 {
        return Ok(out);
    }
    let mut at = 10;
    loop {
        let flags = u16_at(g, at)?;
        out.push(u16_at(g, at + 2)?);
        at += 4;
        at += if flags & 0x0001 != 0 { 4 } else { 2 };
        if flags & 0x0008 != 0 {
            at += 2;
        } else if flags & 0x0040 != 0 {
            at += 4;
        } else if flags & 0x0080 != 0 {
            at += 8;
        }
        if flags & 0x0020 == 0 {
            return Ok(out);
        }
    }
}

/// `font` with only glyphs `used` (and `.notdef` and their components)
/// keeping outlines, and only the tables a PDF reader needs.
pub(super) fn reduce(font: &[u8], used: &[u16]) -> Result<Vec<u8>, PlotError> {
    let t = tables(font)?;
    let head = find(&t, b"head")?;
    let maxp = find(&t, b"maxp")?;
    let loca = find(&t, b"loca")?;
    let glyf = find(&t, b"glyf")?;
    let count = usize::from(u16_at(maxp, 4)?);
    let long = u16_at(head, 50)? == 1;
    let offset = |i: usize| -> Result<usize, PlotError> {
        if long {
            Ok(u32_at(loca, 4 * i)? as usize)
        } else {
            Ok(2 * usize::from(u16_at(loca, 2 * i)?))
        }
    };
    let glyph = |i: usize| -> Result<&[u8], PlotError> {
        let (a, b) = (offset(i)?, offset(i + 1)?);
        glyf.get(a..b).ok_or_else(|| bad("glyph outside glyf"))
    };
    // The closure of the used glyphs under composite references.
    let mut keep: BTreeSet<u16> = BTreeSet::new();
    let mut todo: Vec<u16> = used.iter().copied().chain([0]).collect();
    while let Some(g) = todo.pop() {
        if usize::from(g) < count && keep.insert(g) {
            todo.extend(components(glyph(usize::from(g))?)?);
        }
    }
    let mut new_glyf = Vec::new();
    let mut new_loca = Vec::with_capacity(4 * (count + 1));
    for i in 0..count {
        new_loca.extend_from_slice(&(new_glyf.len() as u32).to_be_bytes());
        if keep.contains(&(i as u16)) {
            new_glyf.extend_from_slice(glyph(i)?);
            while new_glyf.len() % 4 != 0 {
                new_glyf.push(0);
            }
        }
    }
    new_loca.extend_from_slice(&(new_glyf.len() as u32).to_be_bytes());
    let mut new_head = head.to_vec();
    new_head
        .get_mut(8..12)
        .ok_or_else(|| bad("short head"))?
        .copy_from_slice(&[0; 4]);
    new_head[50..52].copy_from_slice(&1u16.to_be_bytes());

    let mut out_tables: Vec<([u8; 4], Vec<u8>)> = Vec::new();
    for tag in KEEP {
        let data = match tag {
            b"glyf" => new_glyf.clone(),
            b"loca" => new_loca.clone(),
            b"head" => new_head.clone(),
            _ => match find(&t, tag) {
                Ok(d) => d.to_vec(),
                Err(_) => continue,
            },
        };
        out_tables.push((*tag, data));
    }
    // KEEP is sorted by tag, as the directory must be.
    let n = out_tables.len() as u16;
    let pow = 1u16 << (15 - n.leading_zeros());
    let mut out = Vec::new();
    out.extend_from_slice(&0x0001_0000u32.to_be_bytes());
    out.extend_from_slice(&n.to_be_bytes());
    out.extend_from_slice(&(pow * 16).to_be_bytes());
    out.extend_from_slice(&(15 - n.leading_zeros() as u16).to_be_bytes());
    out.extend_from_slice(&(n * 16 - pow * 16).to_be_bytes());
    let mut at = 12 + 16 * out_tables.len();
    let mut body = Vec::new();
    let mut head_at = 0;
    for (tag, data) in &out_tables {
        out.extend_from_slice(tag);
        out.extend_from_slice(&checksum(data).to_be_bytes());
        out.extend_from_slice(&(at as u32).to_be_bytes());
        out.extend_from_slice(&(data.len() as u32).to_be_bytes());
        if tag == b"head" {
            head_at = at;
        }
        body.extend_from_slice(data);
        while body.len() % 4 != 0 {
            body.push(0);
        }
        at = 12 + 16 * out_tables.len() + body.len();
    }
    out.extend_from_slice(&body);
    let adjust = 0xB1B0_AFBAu32.wrapping_sub(checksum(&out));
    out[head_at + 8..head_at + 12].copy_from_slice(&adjust.to_be_bytes());
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plot::font::DEJAVU_SANS;
    use ttf_parser::{Face, GlyphId};

    #[test]
    fn keeps_used_glyphs_and_drops_the_rest() {
        let full = Face::parse(DEJAVU_SANS, 0).unwrap();
        let a = full.glyph_index('a').unwrap();
        let b = full.glyph_index('b').unwrap();
        // Å is a composite of A and the ring in DejaVu Sans (from memory):
        // its outline must survive through its components.
        let aring = full.glyph_index('Å').unwrap();
        let small = reduce(DEJAVU_SANS, &[a.0, aring.0]).unwrap();
        assert!(small.len() * 4 < DEJAVU_SANS.len(), "{}", small.len());
        let face = Face::parse(&small, 0).unwrap();
        assert_eq!(face.number_of_glyphs(), full.number_of_glyphs());
        for g in [a, aring] {
            assert_eq!(
                face.glyph_bounding_box(g),
                full.glyph_bounding_box(g),
                "{g:?}"
            );
        }
        assert!(full.glyph_bounding_box(b).is_some());
        assert!(face.glyph_bounding_box(b).is_none());
        assert_eq!(
            face.glyph_hor_advance(GlyphId(b.0)),
            full.glyph_hor_advance(b)
        );
        // OpenType: the whole font sums to 0xB1B0AFBA.
        assert_eq!(checksum(&small), 0xB1B0_AFBA);
    }
}
