//! The sheet's scatter section, printed when the design file has a `scatter` section:
//! the tolerances drawn, per check the probability of failing with its 95 % Wilson
//! interval, the margin percentiles, the Monte Carlo and law-of-propagation standard
//! deviations and the worst-case corner; a histogram of the governing margin; and the
//! largest sensitivities. The numbers are [`crate::scatter`]'s, the same as
//! `bowgrip scatter` prints for the file.

use super::Section;
use super::draw::{Block, GREY, INK, LIGHT, RED, Rgb};
use super::font::Weight;
use super::sections::section as titled;
use crate::design::Design;
use crate::scatter::command::{
    distribution_words, margin_text, percent, sd_text, sensitivities_of, tolerance_words,
};
use crate::scatter::{self, ScatterReport, ScatterSpec, Tolerance};

/// Title of the section.
pub const TITLE: &str = "Scatter: the shop's tolerances";

const SIZE: f32 = 7.0;
const ROW_PT: f32 = 11.0;

/// The scatter section of `design` with the tolerances `spec`; refused with the run's
/// own message (a tolerance too wide for the design, say).
pub(crate) fn section(design: &Design, spec: &ScatterSpec, width: f32) -> anyhow::Result<Section> {
    let report =
        scatter::run(design, spec).map_err(|e| anyhow::anyhow!("the scatter section: {e}"))?;
    Ok(titled(
        TITLE,
        width,
        vec![
            intro(spec, &report, width),
            table(&report, width),
            histogram(&report, width),
            sensitivities(&report, width),
        ],
    ))
}

fn intro(spec: &ScatterSpec, r: &ScatterReport, width: f32) -> Block {
    let mut b = Block::new();
    let drawn: Vec<String> = Tolerance::ALL
        .iter()
        .filter_map(|&t| tolerance_words(spec, t))
        .collect();
    let text = format!(
        "Drawn: {}. Tolerances read as {}; {} Monte Carlo samples (JCGM 101:2008), seed {}. Each check stays at its own bore and stroke; the model: {}.",
        if drawn.is_empty() {
            "nothing (every tolerance is zero)".to_string()
        } else {
            drawn.join("; ")
        },
        distribution_words(r.distribution),
        r.samples,
        r.seed,
        crate::scatter::shared::MODEL_WORDS
    );
    b.height = b.paragraph(0.0, 10.0, width, 8.0, Weight::Regular, INK, &text) + 2.0;
    b
}

/// Column widths as shares of the width, and the heads.
const HEADS: [(&str, f32); 10] = [
    ("check", 0.07),
    ("P(fail)", 0.07),
    ("95 % Wilson", 0.15),
    ("nominal", 0.10),
    ("p01", 0.10),
    ("p50", 0.10),
    ("p99", 0.10),
    ("sd MC", 0.095),
    ("sd prop.", 0.095),
    ("worst case", 0.12),
];

fn table(r: &ScatterReport, width: f32) -> Block {
    let mut b = Block::new();
    let mut y = 10.0;
    let cols: Vec<(f32, f32)> = HEADS
        .iter()
        .scan(0.0, |x, (_, share)| {
            let w = share * width;
            let at = *x;
            *x += w;
            Some((at, w))
        })
        .collect();
    let cell = |b: &mut Block, k: usize, y: f32, text: String, weight: Weight, color: Rgb| {
        let (x, w) = cols[k];
        if k == 0 {
            b.text_in(x, y, SIZE, weight, color, text);
        } else {
            b.text_anchored(x + w - 3.0, 1.0, y, SIZE, weight, color, text);
        }
    };
    for (k, (h, _)) in HEADS.iter().enumerate() {
        cell(&mut b, k, y, (*h).to_string(), Weight::Bold, INK);
    }
    b.line([0.0, y + 3.0], [width, y + 3.0], 0.5, INK);
    y += ROW_PT + 1.0;
    for (c, w) in r.checks.iter().zip(&r.worst_case) {
        let m = |v: Option<f64>| margin_text(v, c.unit);
        let sd = |v: Option<f64>| sd_text(v, c.unit);
        let fails = if c.failures > 0 { RED } else { INK };
        let cells = [
            (c.id.to_string(), INK),
            (percent(c.probability_of_failure), fails),
            (
                format!("{} to {}", percent(c.wilson_95[0]), percent(c.wilson_95[1])),
                INK,
            ),
            (m(c.centre.margin), INK),
            (m(c.margin_p01), INK),
            (m(c.margin_p50), INK),
            (m(c.margin_p99), INK),
            (sd(c.margin_sd_monte_carlo), INK),
            (sd(c.margin_sd_propagation), INK),
            (
                format!(
                    "{} {}",
                    m(w.outcome.margin),
                    if w.outcome.pass { "pass" } else { "FAIL" }
                ),
                if w.outcome.pass { INK } else { RED },
            ),
        ];
        for (k, (text, color)) in cells.into_iter().enumerate() {
            cell(&mut b, k, y, text, Weight::Regular, color);
        }
        b.line([0.0, y + 3.0], [width, y + 3.0], 0.3, LIGHT);
        y += ROW_PT;
    }
    y = b.paragraph(
        0.0,
        y + 4.0,
        width,
        7.0,
        Weight::Regular,
        GREY,
        &format!(
            "Margins: clearance or stroke in {}, or capacity over demand minus one in per cent. 95 % Wilson: the score interval of the probability of failing (E. B. Wilson, JASA 1927). sd MC: standard deviation over the samples; sd prop.: law of propagation, JCGM 100:2008 section 5, sensitivities by central differences. Worst case: every input at the end of its tolerance in the harmful direction.",
            super::format::units().length_words()
        ),
    );
    b.height = y;
    b
}

/// Bars of the governing margin's histogram, failing bins in red.
fn histogram(r: &ScatterReport, width: f32) -> Block {
    let mut b = Block::new();
    let h = &r.governing;
    b.text(
        0.0,
        10.0,
        8.0,
        Weight::Bold,
        // The bins are in the checks' own units; in inches say that a length stays in mm.
        if super::format::units().is_metric() {
            "Governing margin of each sample (its check's unit)"
        } else {
            "Governing margin of each sample (its check's unit: mm for a clearance or stroke, per unit for a ratio)"
        },
    );
    let (top, height) = (16.0, 70.0);
    let left = 30.0;
    let w = (width - left).min(360.0);
    let most = h.counts.iter().copied().max().unwrap_or(0).max(1) as f32;
    let n = h.counts.len().max(1) as f32;
    for (i, &count) in h.counts.iter().enumerate() {
        let (a, bb) = h.bin_edges(i);
        let bar = height * count as f32 / most;
        let colour = if 0.5 * (a + bb) < 0.0 { RED } else { GREY };
        let x = left + w * i as f32 / n;
        if bar > 0.0 {
            b.fill_rect(x, top + height - bar, w / n * 0.9, bar, colour);
        }
    }
    b.line([left, top + height], [left + w, top + height], 0.5, INK);
    b.text_right(
        left - 3.0,
        top + 7.0,
        7.0,
        Weight::Regular,
        format!("{most}"),
    );
    b.text_right(left - 3.0, top + height, 7.0, Weight::Regular, "0");
    b.text_in(
        left,
        top + height + 10.0,
        7.0,
        Weight::Regular,
        INK,
        format!("{:+.3}", h.lo),
    );
    b.text_anchored(
        left + w,
        1.0,
        top + height + 10.0,
        7.0,
        Weight::Regular,
        INK,
        format!("{:+.3}", h.hi),
    );
    let governs: Vec<String> = r
        .governing_counts
        .iter()
        .filter(|(_, n)| *n > 0)
        .map(|(id, n)| format!("{id} {n}"))
        .collect();
    b.text_in(
        left,
        top + height + 21.0,
        7.0,
        Weight::Regular,
        GREY,
        format!("samples per bin; governing check: {}", governs.join(", ")),
    );
    b.height = top + height + 26.0;
    b
}

/// The largest sensitivities of each check (three at most).
fn sensitivities(r: &ScatterReport, width: f32) -> Block {
    let mut b = Block::new();
    let mut y = 12.0;
    b.text(
        0.0,
        y,
        8.0,
        Weight::Bold,
        "Largest sensitivities: each tolerance alone at the ends of its range, every strip together",
    );
    y += ROW_PT + 1.0;
    for c in &r.checks {
        for s in sensitivities_of(r, c.id).into_iter().take(3) {
            b.text(0.0, y, SIZE, Weight::Regular, c.id);
            b.text(0.12 * width, y, SIZE, Weight::Regular, s.input);
            b.text(
                0.34 * width,
                y,
                SIZE,
                Weight::Regular,
                format!(
                    "margin {} at the low end, {} at the high end (nominal {})",
                    margin_text(s.margin_low, c.unit),
                    margin_text(s.margin_high, c.unit),
                    margin_text(c.centre.margin, c.unit)
                ),
            );
            y += ROW_PT;
        }
    }
    y = b.paragraph(
        0.0,
        y + 3.0,
        width,
        7.0,
        Weight::Regular,
        GREY,
        "Tolerance tables do not hold every strip: coatings, edge burrs and wall finish add scatter no table states. Confirm by test and defer to local codes.",
    );
    b.height = y;
    b
}
