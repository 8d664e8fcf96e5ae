//! The printable sizing sheet: a PDF that reads like an engineering calculation, to be
//! reviewed, signed and filed with the drawings. It holds a title block with sign-off
//! boxes, every input with its unit, the material with its sources, the stiffness model,
//! the results at the smallest, nominal and largest bore, every check with its margin,
//! vector plots, a side and an end view to scale, the model's assumptions and limits,
//! references and the safety cautions.
//!
//! The sheet is laid out in two steps: sections are built as measured blocks
//! (`sections`, with the plots in `plots` and the drawings in `views`), then placed on pages (`paginate`), breaking to a new page before a
//! section that would not fit. [`layout`] returns where everything landed, so tests can
//! hold every section and every text line inside the printable area; [`render`] writes
//! the same layout to PDF with krilla, the text real and selectable, the two embedded
//! faces subset.

mod bench;
mod draw;
mod font;
mod format;
mod map_page;
mod operating;
mod plot;
mod plots;
mod scatter;
mod sections;
mod views;

use krilla::Document;
use krilla::metadata::Metadata;
use krilla::page::PageSettings;
use sha2::{Digest, Sha256};

use crate::analysis;
use crate::design::Design;
use draw::{Block, GREY, INK, Mark};
use font::Weight;

pub use bench::{CALIBRATION_TITLE, Measured, TITLE as BENCH_TITLE};
pub use format::{civil_from_days, utc_stamp};

/// Paper size of the sheet.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum Paper {
    /// ISO A4, 210 x 297 mm.
    #[default]
    A4,
    /// US Letter, 8.5 x 11 in.
    Letter,
}

impl Paper {
    /// Width and height in PDF points (1/72 in).
    pub fn size_pt(self) -> (f32, f32) {
        match self {
            Paper::A4 => (595.276, 841.89),
            Paper::Letter => (612.0, 792.0),
        }
    }

    /// Name as printed.
    pub fn name(self) -> &'static str {
        match self {
            Paper::A4 => "A4",
            Paper::Letter => "Letter",
        }
    }
}

/// Margin on every side, points (15 mm).
pub const MARGIN_PT: f32 = 42.52;
/// Height of the running header on every page, inside the top margin's printable area.
const HEADER_PT: f32 = 30.0;
/// Height of the running footer, inside the printable area.
const FOOTER_PT: f32 = 22.0;
/// Space between sections.
const GAP_PT: f32 = 14.0;

/// Where one section (or one part of a section split over pages) landed.
#[derive(Clone, Debug, PartialEq)]
pub struct SectionExtent {
    /// The section's title.
    pub title: String,
    /// Page number, from 1.
    pub page: usize,
    /// Top edge, points from the top of the page.
    pub top_pt: f32,
    /// Bottom edge, points from the top of the page.
    pub bottom_pt: f32,
}

/// Where one line of text landed.
#[derive(Clone, Debug, PartialEq)]
pub struct TextExtent {
    /// Page number, from 1.
    pub page: usize,
    /// Left edge, points.
    pub left_pt: f32,
    /// Right edge (left plus the measured advance), points.
    pub right_pt: f32,
    /// Baseline, points from the top of the page.
    pub baseline_pt: f32,
    /// Font size, points.
    pub size_pt: f32,
    /// The text.
    pub text: String,
}

/// The laid-out sheet: page size, printable area and where everything landed.
#[derive(Clone, Debug)]
pub struct SheetLayout {
    /// Paper used.
    pub paper: Paper,
    /// Page width, points.
    pub page_width_pt: f32,
    /// Page height, points.
    pub page_height_pt: f32,
    /// Printable area `[left, top, right, bottom]` in points from the top left.
    pub printable_pt: [f32; 4],
    /// Number of pages.
    pub pages: usize,
    /// Every section part, in order.
    pub sections: Vec<SectionExtent>,
    /// Every line of text, in order.
    pub texts: Vec<TextExtent>,
    placed: Vec<Vec<Mark>>,
}

impl SheetLayout {
    /// The box `[left, top, right, bottom]` (points from the page's top left) of every
    /// line and filled area on the sheet, with its page number from 1; a mark under a
    /// clip is cut to the clip, as it prints.
    pub fn drawing_extents(&self) -> Vec<(usize, [f32; 4])> {
        let mut out = Vec::new();
        for (i, marks) in self.placed.iter().enumerate() {
            let mut clips: Vec<[f32; 4]> = Vec::new();
            for m in marks {
                let points = match m {
                    Mark::Line { points, .. } | Mark::Area { points, .. } => points,
                    Mark::Clip(r) => {
                        let r = clips.last().map_or(*r, |c| {
                            [
                                r[0].max(c[0]),
                                r[1].max(c[1]),
                                r[2].min(c[2]),
                                r[3].min(c[3]),
                            ]
                        });
                        clips.push(r);
                        continue;
                    }
                    Mark::Unclip => {
                        clips.pop();
                        continue;
                    }
                    Mark::Text { .. } => continue,
                };
                let mut b = points.iter().fold(
                    [
                        f32::INFINITY,
                        f32::INFINITY,
                        f32::NEG_INFINITY,
                        f32::NEG_INFINITY,
                    ],
                    |b, [x, y]| [b[0].min(*x), b[1].min(*y), b[2].max(*x), b[3].max(*y)],
                );
                if let Some(c) = clips.last() {
                    b = [
                        b[0].max(c[0]),
                        b[1].max(c[1]),
                        b[2].min(c[2]),
                        b[3].min(c[3]),
                    ];
                    if b[0] > b[2] || b[1] > b[3] {
                        continue; // wholly clipped away
                    }
                }
                out.push((i + 1, b));
            }
        }
        out
    }
}

/// Everything the sections print that is not in the analysis itself.
pub(crate) struct SheetMeta {
    file_label: String,
    hash16: String,
    version: &'static str,
    date: String,
    paper: Paper,
}

/// A section: a title and blocks kept together when they fit a page. A section taller
/// than a page breaks between its blocks.
pub(crate) struct Section {
    title: String,
    blocks: Vec<Block>,
}

/// First 16 hex digits of the SHA-256 of `bytes`.
pub fn content_hash16(bytes: &[u8]) -> String {
    let digest = Sha256::digest(bytes);
    digest.iter().take(8).map(|b| format!("{b:02x}")).collect()
}

/// Title of the first closing section (assumptions, references, cautions follow it):
/// the optional parts go before it, or at the end if it is not found.
const CLOSING_FIRST: &str = "Model, assumptions and limits";

/// What the sheet holds beyond its fixed sections.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct SheetOptions {
    /// A design-map page over these two axes (across, up).
    pub map: Option<(crate::map::AxisSpec, crate::map::AxisSpec)>,
    /// Units of every number printed (metric by default); the inputs also give the file's
    /// own SI value beside an inch value.
    pub units: crate::units::UnitSystem,
}

/// Lays the sheet out (with the given date text) without writing the PDF.
pub fn layout_dated(
    design: &Design,
    file_label: &str,
    file_bytes: &[u8],
    paper: Paper,
    date: &str,
) -> anyhow::Result<SheetLayout> {
    layout_with(
        design,
        file_label,
        file_bytes,
        paper,
        date,
        None,
        &SheetOptions::default(),
    )
}

/// Lays the sheet out with every optional part: bench measurements when `measured` is
/// given, and the parts `options` asks for (with the given date text).
pub fn layout_with(
    design: &Design,
    file_label: &str,
    file_bytes: &[u8],
    paper: Paper,
    date: &str,
    measured: Option<&Measured>,
    options: &SheetOptions,
) -> anyhow::Result<SheetLayout> {
    font::faces()?;
    // Every number laid out below is in the chosen units, until this returns.
    let _units = format::use_units(options.units);
    let analysis = analysis::analyse(design)
        .map_err(|e| anyhow::anyhow!("cannot print a sheet for {file_label}: {e}"))?;
    let meta = SheetMeta {
        file_label: file_label.to_string(),
        hash16: content_hash16(file_bytes),
        version: env!("CARGO_PKG_VERSION"),
        date: date.to_string(),
        paper,
    };
    let (w, h) = paper.size_pt();
    let printable = [MARGIN_PT, MARGIN_PT, w - MARGIN_PT, h - MARGIN_PT];
    let content_w = printable[2] - printable[0];
    let mut sections = sections::build(&analysis, &meta, content_w);
    // Optional parts go before the closing text sections (assumptions, references, cautions).
    let mut extra = Vec::new();
    extra.extend(bench::calibration_section(&analysis, content_w));
    if let Some(m) = measured {
        extra.push(bench::section(&analysis, m, content_w));
    }
    if let Some(spec) = &design.scatter {
        extra.push(scatter::section(design, spec, content_w)?);
    }
    if let Some((x, y)) = &options.map {
        extra.push(map_page::section(design, x, y, content_w)?);
    }
    let at = sections
        .iter()
        .position(|s| s.title == CLOSING_FIRST)
        .unwrap_or(sections.len());
    sections.splice(at..at, extra);
    Ok(paginate(
        sections, &meta, &analysis, paper, printable, design,
    ))
}

/// Lays the sheet out, dated now (UTC).
pub fn layout(
    design: &Design,
    file_label: &str,
    file_bytes: &[u8],
    paper: Paper,
) -> anyhow::Result<SheetLayout> {
    layout_dated(design, file_label, file_bytes, paper, &format::now_utc())
}

/// Renders the sheet for `design` to PDF bytes. `file_label` names the design file and
/// `file_bytes` are its contents (hashed on the sheet).
pub fn render(
    design: &Design,
    file_label: &str,
    file_bytes: &[u8],
    paper: Paper,
) -> anyhow::Result<Vec<u8>> {
    render_with(
        design,
        file_label,
        file_bytes,
        paper,
        None,
        &SheetOptions::default(),
    )
}

/// Renders the sheet with every optional part (see [`layout_with`]), dated now (UTC).
pub fn render_with(
    design: &Design,
    file_label: &str,
    file_bytes: &[u8],
    paper: Paper,
    measured: Option<&Measured>,
    options: &SheetOptions,
) -> anyhow::Result<Vec<u8>> {
    let laid = layout_with(
        design,
        file_label,
        file_bytes,
        paper,
        &format::now_utc(),
        measured,
        options,
    )?;
    write_pdf(&laid, design)
}

/// Writes a laid-out sheet to PDF bytes.
pub fn write_pdf(laid: &SheetLayout, design: &Design) -> anyhow::Result<Vec<u8>> {
    let mut document = Document::new();
    let title = if design.title.trim().is_empty() {
        "bowgrip sizing sheet".to_string()
    } else {
        design.title.clone()
    };
    document.set_metadata(
        Metadata::new()
            .title(title)
            .creator(format!("bowgrip {}", env!("CARGO_PKG_VERSION")))
            .description("Sizing calculation of a bowed-strip expanding segment".to_string()),
    );
    for marks in &laid.placed {
        let settings = PageSettings::from_wh(laid.page_width_pt, laid.page_height_pt)
            .ok_or_else(|| anyhow::anyhow!("invalid page size"))?;
        let mut page = document.start_page_with(settings);
        let mut surface = page.surface();
        draw::emit(&mut surface, marks)?;
        surface.finish();
        page.finish();
    }
    document
        .finish()
        .map_err(|e| anyhow::anyhow!("the PDF could not be written: {e:?}"))
}

fn paginate(
    sections: Vec<Section>,
    meta: &SheetMeta,
    analysis: &analysis::Analysis,
    paper: Paper,
    printable: [f32; 4],
    design: &Design,
) -> SheetLayout {
    let (w, h) = paper.size_pt();
    let [left, top, right, bottom] = printable;
    let body_top = |page: usize| if page == 0 { top } else { top + HEADER_PT };
    let body_bottom = bottom - FOOTER_PT;
    let mut pages: Vec<Vec<Mark>> = vec![Vec::new()];
    let mut extents = Vec::new();
    let mut y = body_top(0);
    for section in sections {
        let total: f32 = section.blocks.iter().map(|b| b.height).sum();
        let page_room = body_bottom - body_top(pages.len());
        let fresh = y <= body_top(pages.len() - 1) + 0.5;
        if y + total > body_bottom && !fresh && total <= page_room {
            pages.push(Vec::new());
            y = body_top(pages.len() - 1);
        }
        let mut part_top = y;
        for block in &section.blocks {
            let fresh = y <= body_top(pages.len() - 1) + 0.5;
            if y + block.height > body_bottom && !fresh {
                extents.push(SectionExtent {
                    title: section.title.clone(),
                    page: pages.len(),
                    top_pt: part_top,
                    bottom_pt: y,
                });
                pages.push(Vec::new());
                y = body_top(pages.len() - 1);
                part_top = y;
            }
            let page = pages.len() - 1;
            pages[page].extend(block.marks.iter().map(|m| m.shifted(left, y)));
            y += block.height;
        }
        extents.push(SectionExtent {
            title: section.title.clone(),
            page: pages.len(),
            top_pt: part_top,
            bottom_pt: y,
        });
        y += GAP_PT;
    }
    let count = pages.len();
    for (i, marks) in pages.iter_mut().enumerate() {
        let mut frame = Block::new();
        let cw = right - left;
        if i > 0 {
            let title = if design.title.trim().is_empty() {
                "(untitled design)"
            } else {
                design.title.trim()
            };
            let title = fit(title, cw - 120.0, 8.5, Weight::Bold);
            frame.text_raw(0.0, 9.0, 8.5, Weight::Bold, INK, title);
            frame.text_right(
                cw,
                9.0,
                8.5,
                Weight::Bold,
                format!("Sheet {} of {count}", i + 1),
            );
            // The hash always prints; a long path loses its leading folders.
            let hash = format!("  ·  SHA-256 {}", meta.hash16);
            let room = cw - 150.0 - draw::text_width(&hash, 7.5, Weight::Regular);
            let file = fit_start(&meta.file_label, room, 7.5, Weight::Regular) + &hash;
            frame.text_raw(0.0, 20.0, 7.5, Weight::Regular, GREY, file);
            let d = format!("bowgrip {}  ·  {}", meta.version, meta.date);
            let dw = draw::text_width(&d, 7.5, Weight::Regular);
            frame.text_in(cw - dw, 20.0, 7.5, Weight::Regular, GREY, d);
            frame.line([0.0, 24.0], [cw, 24.0], 0.6, INK);
        }
        let fy = bottom - top - FOOTER_PT + 8.0;
        frame.line([0.0, fy], [cw, fy], 0.4, GREY);
        let verdict = if crate::checks::all_pass(&analysis.checks) {
            "All checks pass."
        } else {
            "CHECKS FAIL: see the check table."
        };
        frame.text_in(
            0.0,
            fy + 10.0,
            7.0,
            Weight::Regular,
            GREY,
            format!(
                "Strips store spring energy and can snap; end plates pinch. Model results: confirm by test and local codes. {verdict}"
            ),
        );
        frame.text_right(
            cw,
            fy + 10.0,
            7.0,
            Weight::Regular,
            format!("{} of {count}", i + 1),
        );
        marks.extend(frame.marks.iter().map(|m| m.shifted(left, top)));
        // The title block prints "Sheet 1 of N" once the count is known.
        for m in marks.iter_mut() {
            if let Mark::Text { text, .. } = m
                && text.contains(sections::PAGE_COUNT_SLOT)
            {
                *text = text.replace(sections::PAGE_COUNT_SLOT, &count.to_string());
            }
        }
    }
    let texts = pages
        .iter()
        .enumerate()
        .flat_map(|(i, marks)| {
            marks.iter().filter_map(move |m| match m {
                Mark::Text {
                    x,
                    y,
                    size,
                    weight,
                    text,
                    ..
                } if !text.is_empty() => Some(TextExtent {
                    page: i + 1,
                    left_pt: *x,
                    right_pt: x + draw::text_width(text, *size, *weight),
                    baseline_pt: *y,
                    size_pt: *size,
                    text: text.clone(),
                }),
                _ => None,
            })
        })
        .collect();
    SheetLayout {
        paper,
        page_width_pt: w,
        page_height_pt: h,
        printable_pt: printable,
        pages: count,
        sections: extents,
        texts,
        placed: pages,
    }
}

/// `text` shortened with an ellipsis at its end to fit `width`.
pub(crate) fn fit(text: &str, width: f32, size: f32, weight: Weight) -> String {
    shorten(text, width, size, weight, false)
}

/// `text` shortened with an ellipsis at its start to fit `width`: for paths, whose end
/// (the file name) matters most.
pub(crate) fn fit_start(text: &str, width: f32, size: f32, weight: Weight) -> String {
    shorten(text, width, size, weight, true)
}

/// The longest part of `text` that fits `width` with an ellipsis where the rest was cut:
/// at the start when `cut_start`, else at the end. One pass over the characters (widths
/// add up glyph by glyph), so a title of any length costs time linear in its length.
fn shorten(text: &str, width: f32, size: f32, weight: Weight, cut_start: bool) -> String {
    if draw::text_width(text, size, weight) <= width {
        return text.to_string();
    }
    let chars: Vec<char> = text.chars().collect();
    let with_ellipsis = |keep: usize| {
        if cut_start {
            format!("…{}", String::from_iter(&chars[chars.len() - keep..]))
        } else {
            format!("{}…", String::from_iter(&chars[..keep]))
        }
    };
    let room = width - draw::text_width("…", size, weight);
    let mut used = 0.0f32;
    let mut keep = 0usize;
    let mut buf = [0u8; 4];
    let ordered: Box<dyn Iterator<Item = &char>> = if cut_start {
        Box::new(chars.iter().rev())
    } else {
        Box::new(chars.iter())
    };
    for c in ordered {
        let w = draw::text_width(c.encode_utf8(&mut buf), size, weight);
        if used + w > room {
            break;
        }
        used += w;
        keep += 1;
    }
    // The sum char by char may round differently from the width of the whole string:
    // step back while the result measures too wide (a step or two at most).
    let mut shortened = with_ellipsis(keep);
    while keep > 0 && draw::text_width(&shortened, size, weight) > width {
        keep -= 1;
        shortened = with_ellipsis(keep);
    }
    shortened
}

#[cfg(test)]
mod shorten_tests {
    use super::*;

    #[test]
    fn a_very_long_title_is_cut_once_to_the_longest_fit() {
        // Issue 11, item 9: 100,000 characters through the shortening (one pass; the
        // earlier search measured every candidate length, quadratic in the length).
        let title: String = "Anchor W".repeat(12_500);
        assert_eq!(title.chars().count(), 100_000);
        for cut_start in [false, true] {
            let short = shorten(&title, 300.0, 8.5, Weight::Bold, cut_start);
            let width = draw::text_width(&short, 8.5, Weight::Bold);
            assert!(width <= 300.0, "{width}");
            let kept = short.chars().count() - 1;
            assert!(kept > 10, "{short}");
            // One more character would not fit: the longest part that does.
            let longer = if cut_start {
                let tail: String = title
                    .chars()
                    .skip(title.chars().count() - kept - 1)
                    .collect();
                format!("…{tail}")
            } else {
                let head: String = title.chars().take(kept + 1).collect();
                format!("{head}…")
            };
            assert!(draw::text_width(&longer, 8.5, Weight::Bold) > 300.0);
            if cut_start {
                assert!(short.starts_with('…') && title.ends_with(&short[3..]));
            } else {
                assert!(short.ends_with('…') && title.starts_with(&short[..short.len() - 3]));
            }
        }
        assert_eq!(fit("short", 300.0, 8.5, Weight::Bold), "short");
    }
}
