//! The sheet's two faces (Liberation Sans regular and bold, SIL OFL 1.1, shipped in
//! `assets/fonts/` with their licence) and the two tables that place text exactly, the
//! character map and the advance widths, read once with `skrifa` (the font reader krilla
//! itself uses). Layout measures with the same
//! advances the PDF is written with, so a line that measures inside the margin prints
//! inside it. One glyph per character, no kerning and no ligatures, which also keeps
//! every word searchable as typed.

use std::collections::HashMap;
use std::sync::OnceLock;

use krilla::text::{Font, GlyphId, KrillaGlyph};
use skrifa::MetadataProvider;
use skrifa::instance::{LocationRef, Size};

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

impl Face {
    fn parse(data: &'static [u8]) -> Option<Face> {
        let reader = skrifa::FontRef::new(data).ok()?;
        let face = reader.metrics(Size::unscaled(), LocationRef::default());
        let units_per_em = f32::from(face.units_per_em);
        let metrics = reader.glyph_metrics(Size::unscaled(), LocationRef::default());
        let glyphs = u32::from(face.glyph_count);
        let advances = (0..glyphs)
            .map(|g| {
                let units = metrics.advance_width(skrifa::GlyphId::new(g))?;
                // Unscaled advances are whole font units (TrueType `hmtx` stores u16).
                (units.fract() == 0.0 && (0.0..=f32::from(u16::MAX)).contains(&units))
                    .then_some(units as u16)
            })
            .collect::<Option<Vec<u16>>>()?;
        let cmap = reader
            .charmap()
            .mappings()
            .filter_map(|(code, glyph)| {
                let id = u16::try_from(glyph.to_u32()).ok()?;
                (id != 0).then_some((char::from_u32(code)?, id))
            })
            .collect::<HashMap<char, u16>>();
        let font = Font::new(data.into(), 0)?;
        (units_per_em > 0.0 && !advances.is_empty() && !cmap.is_empty()).then_some(Face {
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
        // Liberation Sans is metric-compatible with Helvetica: the advances read from the
        // font match the widths of Adobe's Core 14 AFM files (Helvetica.afm and
        // Helvetica-Bold.afm, in 1/1000 em; the widths are from memory of those files), to the
        // rounding of 2048 font units per em.
        for (c, regular_afm, bold_afm) in [
            (' ', 278.0, 278.0),
            ('a', 556.0, 556.0),
            ('0', 556.0, 556.0),
            ('i', 222.0, 278.0),
            ('m', 833.0, 889.0),
            ('W', 944.0, 944.0),
        ] {
            let text = c.to_string();
            assert!(
                (regular.width_pt(&text, 1000.0) - regular_afm).abs() < 0.5,
                "{c:?}"
            );
            assert!(
                (bold.width_pt(&text, 1000.0) - bold_afm).abs() < 0.5,
                "{c:?} bold"
            );
        }
        // Widths add up.
        let ab = regular.width_pt("ab", 10.0);
        assert!((ab - regular.width_pt("a", 10.0) - regular.width_pt("b", 10.0)).abs() < 1e-4);
    }
}
