//! The sheet's two faces (Liberation Sans regular and bold, SIL OFL 1.1, shipped in
//! `assets/fonts/` with their licence) and just enough TrueType reading to place text
//! exactly: the character map and the advance widths. Layout measures with the same
//! advances the PDF is written with, so a line that measures inside the margin prints
//! inside it. One glyph per character, no kerning and no ligatures, which also keeps
//! every word searchable as typed.

use std::collections::HashMap;
use std::sync::OnceLock;

use krilla::text::{Font, GlyphId, KrillaGlyph};

const REGULAR_TTF: &[u8] = include_bytes!("../../assets/fonts/LiberationSans-Regular.ttf");
const BOLD_TTF: &[u8] = include_bytes!("../../assets/fonts/LiberationSans-Bold.ttf");

/// Weight of a text run.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Weight {
    /// Body text.
    Regular,
    /// Headings, labels and verdicts.
    Bold,
}

/// One face: its metrics and the krilla font that embeds it.
pub struct Face {
    /// The embedded font (subset by krilla when the PDF is written).
    pub font: Font,
    units_per_em: f32,
    advances: Vec<u16>,
    cmap: HashMap<char, u16>,
}

/// Big-endian reads that fail softly on a short table.
fn u16_at(data: &[u8], at: usize) -> Option<u16> {
    Some(u16::from_be_bytes([*data.get(at)?, *data.get(at + 1)?]))
}

fn u32_at(data: &[u8], at: usize) -> Option<u32> {
    Some(u32::from_be_bytes([
        *data.get(at)?,
        *data.get(at + 1)?,
        *data.get(at + 2)?,
        *data.get(at + 3)?,
    ]))
}

/// The `(offset, length)` of a table by its tag.
fn table(data: &[u8], tag: &[u8; 4]) -> Option<(usize, usize)> {
    let count = usize::from(u16_at(data, 4)?);
    (0..count).find_map(|i| {
        let rec = 12 + 16 * i;
        (data.get(rec..rec + 4)? == tag)
            .then(|| {
                Some((
                    u32_at(data, rec + 8)? as usize,
                    u32_at(data, rec + 12)? as usize,
                ))
            })
            .flatten()
    })
}

/// Character map from a format 4 (BMP) or format 12 (full range) Windows Unicode subtable.
fn read_cmap(data: &[u8]) -> Option<HashMap<char, u16>> {
    let (base, _) = table(data, b"cmap")?;
    let count = usize::from(u16_at(data, base + 2)?);
    let mut best: Option<(u16, usize)> = None;
    for i in 0..count {
        let rec = base + 4 + 8 * i;
        let (platform, encoding) = (u16_at(data, rec)?, u16_at(data, rec + 2)?);
        let sub = base + u32_at(data, rec + 4)? as usize;
        let format = u16_at(data, sub)?;
        let unicode = (platform == 3 && (encoding == 1 || encoding == 10)) || platform == 0;
        if unicode && (format == 4 || format == 12) && best.is_none_or(|(f, _)| format > f) {
            best = Some((format, sub));
        }
    }
    let (format, sub) = best?;
    let mut map = HashMap::new();
    if format == 12 {
        let groups = u32_at(data, sub + 12)? as usize;
        for g in 0..groups {
            let at = sub + 16 + 12 * g;
            let (start, end, glyph) = (
                u32_at(data, at)?,
                u32_at(data, at + 4)?,
                u32_at(data, at + 8)?,
            );
            for code in start..=end.min(0x2_FFFF) {
                if let (Some(c), Ok(id)) =
                    (char::from_u32(code), u16::try_from(glyph + code - start))
                {
                    map.insert(c, id);
                }
            }
        }
    } else {
        let segs = usize::from(u16_at(data, sub + 6)? / 2);
        let ends = sub + 14;
        let starts = ends + 2 * segs + 2;
        let deltas = starts + 2 * segs;
        let ranges = deltas + 2 * segs;
        for s in 0..segs {
            let end = u16_at(data, ends + 2 * s)?;
            let start = u16_at(data, starts + 2 * s)?;
            let delta = u16_at(data, deltas + 2 * s)?;
            let range = usize::from(u16_at(data, ranges + 2 * s)?);
            for code in start..=end {
                if code == 0xFFFF {
                    break;
                }
                let glyph = if range == 0 {
                    code.wrapping_add(delta)
                } else {
                    let at = ranges + 2 * s + range + 2 * usize::from(code - start);
                    match u16_at(data, at)? {
                        0 => 0,
                        g => g.wrapping_add(delta),
                    }
                };
                if let Some(c) = char::from_u32(u32::from(code))
                    && glyph != 0
                {
                    map.insert(c, glyph);
                }
            }
        }
    }
    Some(map)
}

impl Face {
    fn parse(data: &'static [u8]) -> Option<Face> {
        let (head, _) = table(data, b"head")?;
        let units_per_em = f32::from(u16_at(data, head + 18)?);
        let (hhea, _) = table(data, b"hhea")?;
        let metrics = usize::from(u16_at(data, hhea + 34)?);
        let (hmtx, _) = table(data, b"hmtx")?;
        let advances = (0..metrics)
            .map(|i| u16_at(data, hmtx + 4 * i))
            .collect::<Option<Vec<u16>>>()?;
        let cmap = read_cmap(data)?;
        let font = Font::new(data.into(), 0)?;
        (units_per_em > 0.0 && !advances.is_empty()).then_some(Face {
            font,
            units_per_em,
            advances,
            cmap,
        })
    }

    fn glyph(&self, c: char) -> u16 {
        self.cmap
            .get(&c)
            .or_else(|| self.cmap.get(&'?'))
            .copied()
            .unwrap_or(0)
    }

    fn advance_em(&self, glyph: u16) -> f32 {
        let i = usize::from(glyph).min(self.advances.len() - 1);
        f32::from(self.advances[i]) / self.units_per_em
    }

    /// Whether the face has a glyph for `c`.
    #[cfg(test)]
    pub fn covers(&self, c: char) -> bool {
        self.cmap.contains_key(&c)
    }

    /// Width of `text` at `size_pt`, in points.
    pub fn width_pt(&self, text: &str, size_pt: f32) -> f32 {
        text.chars()
            .map(|c| self.advance_em(self.glyph(c)))
            .sum::<f32>()
            * size_pt
    }

    /// The glyph run for `text`, each glyph mapped back to its character for extraction.
    pub fn glyphs(&self, text: &str) -> Vec<KrillaGlyph> {
        text.char_indices()
            .map(|(i, c)| {
                let g = self.glyph(c);
                KrillaGlyph::new(
                    GlyphId::new(u32::from(g)),
                    self.advance_em(g),
                    0.0,
                    0.0,
                    0.0,
                    i..i + c.len_utf8(),
                    None,
                )
            })
            .collect()
    }
}

/// The two faces, parsed once. Both are embedded at build time, so failing here is a
/// build defect rather than anything a user did; it is reported as an error all the same.
pub fn faces() -> anyhow::Result<&'static (Face, Face)> {
    static FACES: OnceLock<Option<(Face, Face)>> = OnceLock::new();
    FACES
        .get_or_init(|| Some((Face::parse(REGULAR_TTF)?, Face::parse(BOLD_TTF)?)))
        .as_ref()
        .ok_or_else(|| {
            anyhow::anyhow!("the sheet's embedded fonts could not be read (a build defect)")
        })
}

/// The face for a weight.
pub fn face(weight: Weight) -> anyhow::Result<&'static Face> {
    let (regular, bold) = faces()?;
    Ok(match weight {
        Weight::Regular => regular,
        Weight::Bold => bold,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn faces_cover_the_sheet_symbols_and_digits_share_one_width() {
        let regular = face(Weight::Regular).expect("regular face");
        let bold = face(Weight::Bold).expect("bold face");
        for c in "0123456789 .,:;-+=()/%'<>[]* x^_ abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ°×≤≥−–σκνμδπ√·".chars() {
            assert!(regular.covers(c) && bold.covers(c), "missing glyph for {c:?}");
        }
        // Tabular figures: every digit has the same advance, so columns of numbers align.
        let w0 = regular.width_pt("0", 10.0);
        for d in "123456789".chars() {
            assert!((regular.width_pt(&d.to_string(), 10.0) - w0).abs() < 1e-4);
        }
        // Widths add up.
        let ab = regular.width_pt("ab", 10.0);
        assert!((ab - regular.width_pt("a", 10.0) - regular.width_pt("b", 10.0)).abs() < 1e-4);
    }
}
