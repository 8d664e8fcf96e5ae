//! The sheet's bench page, printed when measurements are given (`sheet --measured`): the
//! measured points over the model (diameter, and pull and slip force, against measured
//! stroke, one model curve per bore of the file), the residuals per measured column, and,
//! when factors were fitted (`--fit`), their values with standard errors and
//! correlations and the residuals after the fit. The numbers come from
//! [`crate::calibrate`]; this module lays them out.

use super::Section;
use super::draw::{Block, GREY, INK, RED, Rgb};
use super::font::Weight;
use super::format::{NONE, fixed, sig, units};
use super::plot::{Item, Pen, Plot};
use crate::analysis::Analysis;
use crate::bench_data::{BenchData, Quantity};
use crate::calibrate::{self, Calibration, Factor, Factors, QuantityResiduals};
use crate::units::Quantity::Length;

const BODY: f32 = 8.5;
const SMALL: f32 = 7.5;
const BLUE: Rgb = (20, 70, 170);
const ORANGE: Rgb = (210, 110, 0);
const GREEN: Rgb = (0, 120, 50);

/// Strokes along each model curve.
const CURVE_POINTS: usize = 120;

/// Measurements to print beside a design.
#[derive(Clone, Debug)]
pub struct Measured {
    /// How the file is named on the sheet (its path as given).
    pub label: String,
    /// The rows.
    pub data: BenchData,
    /// Factors to fit (empty: residuals only).
    pub fit: Vec<Factor>,
}

/// The page's title.
pub const TITLE: &str = "Bench measurements against the model";

/// Residuals as the page prints them: RMS and the largest with their unit, 3 decimals.
pub fn residual_cells(q: &QuantityResiduals) -> [String; 5] {
    let s = q.summary();
    let u = q.quantity.unit();
    [
        q.quantity.column().to_string(),
        s.points.to_string(),
        format!("{} {u}", fixed(s.rms, 3)),
        format!("{} {u}", signed(s.max_signed, 3)),
        format!(
            "line {}, stroke {}",
            s.max_line,
            fixed(
                units().to_display(Length, s.max_stroke_mm),
                units().decimals(Length, 3)
            )
        ),
    ]
}

/// `v` to `decimals` places with its sign: `+1.039`, `−0.026`.
fn signed(v: f64, decimals: usize) -> String {
    let s = fixed(v, decimals);
    if v > 0.0 && !s.chars().all(|c| c == '0' || c == '.') {
        format!("+{s}")
    } else {
        s
    }
}

/// A plain table: a bold header, then rows; columns at the given widths.
fn table(header: &[&str], widths: &[f32], rows: &[Vec<String>]) -> Block {
    let mut b = Block::new();
    let lead = 1.35 * BODY;
    let total: f32 = widths.iter().sum();
    let mut y = BODY;
    let put = |b: &mut Block, cells: &[String], y: f32, weight: Weight| {
        let mut x = 0.0;
        for (cell, w) in cells.iter().zip(widths) {
            let text = super::fit(cell, w - 4.0, BODY, weight);
            b.text(x, y, BODY, weight, text);
            x += w;
        }
    };
    let head: Vec<String> = header.iter().map(|h| (*h).to_string()).collect();
    put(&mut b, &head, y, Weight::Bold);
    b.line([0.0, y + 3.0], [total, y + 3.0], 0.5, INK);
    for r in rows {
        y += lead;
        put(&mut b, r, y, Weight::Regular);
    }
    b.height = y + 6.0;
    b
}

fn text_block(width: f32, size: f32, color: Rgb, text: &str) -> Block {
    let mut b = Block::new();
    let end = b.paragraph(0.0, size, width, size, Weight::Regular, color, text);
    b.height = end;
    b
}

fn heading(width: f32, sub: Option<&str>) -> Block {
    let mut b = Block::new();
    match sub {
        None => {
            b.text(0.0, 11.0, 11.0, Weight::Bold, TITLE);
            b.line([0.0, 15.0], [width, 15.0], 0.8, INK);
            b.height = 22.0;
        }
        Some(s) => {
            b.text(0.0, 10.0, 9.0, Weight::Bold, s);
            b.height = 14.0;
        }
    }
    b
}

/// The bench section (one page as a rule): built from the design's analysis and the
/// measurements.
pub(super) fn section(a: &Analysis, m: &Measured, width: f32) -> Section {
    let design = &a.segment.design;
    let mut blocks = Vec::new();
    let mut first = heading(width, None);
    let calibration = match design.calibration {
        Some(c) => format!(
            "with its calibration (modulus factor {}, stroke offset {} mm)",
            fixed(c.modulus_factor, 4),
            fixed(c.stroke_offset_mm, 3)
        ),
        None => "without calibration".to_string(),
    };
    let intro = text_block(
        width,
        BODY,
        INK,
        &format!(
            "Measurements: {} ({} rows). Model: the design as it stands, {calibration}. Strokes are as measured; the model's stroke is the measured stroke plus the offset. Residuals are measured minus model.",
            m.label,
            m.data.rows.len()
        ),
    );
    let h = first.height;
    first.append(&intro, 0.0, h);
    first.height += intro.height;
    blocks.push(first);

    let nominal = Factors::nominal(design);
    let before = calibrate::residuals(design, &m.data, &nominal);
    blocks.push(diameter_plot(a, m, width));
    blocks.push(force_plot(a, m, width));
    blocks.push(heading(width, Some("Residuals, measured minus model")));
    match &before {
        Ok(r) => blocks.push(residual_table(r, width)),
        Err(e) => blocks.push(text_block(width, BODY, RED, &format!("No residuals: {e}"))),
    }
    if !m.fit.is_empty() {
        let names: Vec<&str> = m.fit.iter().map(|f| f.key()).collect();
        blocks.push(heading(
            width,
            Some(&format!("Fitted factors ({})", names.join(", "))),
        ));
        match calibrate::calibrate(design, &m.data, &m.fit) {
            Ok(c) => {
                blocks.push(fitted_table(&c, width));
                if c.fitted.len() > 1 {
                    blocks.push(correlation_table(&c, width));
                }
                if let Ok(after) = calibrate::residuals(design, &m.data, &c.factors) {
                    blocks.push(heading(width, Some("Residuals with the fitted factors")));
                    blocks.push(residual_table(&after, width));
                }
            }
            Err(e) => blocks.push(text_block(width, BODY, RED, &format!("No fit: {e}"))),
        }
    }
    blocks.push(text_block(
        width,
        SMALL,
        GREY,
        "Fitted factors describe this prototype on this bench; check them against a second test before relying on them. Caution: loaded strips store energy and can snap, the end plates pinch; test behind a guard and follow local codes and licensed practice.",
    ));
    Section {
        title: TITLE.to_string(),
        blocks,
    }
}

/// The title of the short section a calibrated design prints.
pub const CALIBRATION_TITLE: &str = "Bench calibration in this design";

/// When the design carries a bench calibration, a short section saying so and what it
/// changes (printed with or without measurements); `None` otherwise.
pub(super) fn calibration_section(a: &Analysis, width: f32) -> Option<Section> {
    let c = a.segment.design.calibration?;
    let mut b = heading(width, None);
    b.marks.clear();
    b.text(0.0, 11.0, 11.0, Weight::Bold, CALIBRATION_TITLE);
    b.line([0.0, 15.0], [width, 15.0], 0.8, INK);
    let body = text_block(
        width,
        BODY,
        INK,
        &format!(
            "The design carries factors fitted to bench measurements of a prototype. Modulus factor {} on Young's modulus: the model uses E' = {} GPa (the material's value times the factor), so every force and the bending stress scale with it. Stroke offset {} mm: the model's stroke is a measured stroke plus the offset; it applies where bench measurements are compared with the model, and the design's own strokes are counted from straight strips. Fitted factors describe one prototype on one bench: confirm them by a second test.",
            fixed(c.modulus_factor, 4),
            sig(a.segment.modulus_pa * 1e-9, 4),
            signed(c.stroke_offset_mm, 3),
        ),
    );
    let h = b.height;
    b.append(&body, 0.0, h);
    b.height += body.height;
    Some(Section {
        title: CALIBRATION_TITLE.to_string(),
        blocks: vec![b],
    })
}

fn residual_table(all: &[QuantityResiduals], width: f32) -> Block {
    let widths = [0.24, 0.1, 0.18, 0.18, 0.30].map(|f| f * width);
    let rows: Vec<Vec<String>> = all.iter().map(|q| residual_cells(q).to_vec()).collect();
    table(
        &[
            "column",
            "points",
            "RMS",
            "largest",
            &format!("where (stroke in {})", units().unit(Length)),
        ],
        &widths,
        &rows,
    )
}

fn unit_of(f: Factor) -> &'static str {
    match f {
        Factor::Offset | Factor::Length => " mm",
        Factor::Modulus | Factor::Friction => "",
    }
}

fn fitted_table(c: &Calibration, width: f32) -> Block {
    let widths = [0.34, 0.33, 0.33].map(|f| f * width);
    let rows: Vec<Vec<String>> = c
        .fitted
        .iter()
        .map(|f| {
            let u = unit_of(f.factor);
            vec![
                f.factor.key().to_string(),
                format!("{}{u}", fixed(f.value, 5)),
                format!("{}{u}", sig(f.standard_error, 3)),
            ]
        })
        .collect();
    table(&["factor", "value", "standard error"], &widths, &rows)
}

fn correlation_table(c: &Calibration, width: f32) -> Block {
    let n = c.fitted.len();
    let first = 0.28 * width;
    let rest = (width - first) / n as f32;
    let mut widths = vec![first];
    widths.extend(std::iter::repeat_n(rest, n));
    let mut header: Vec<&str> = vec!["correlation"];
    header.extend(c.fitted.iter().map(|f| f.factor.key()));
    let rows: Vec<Vec<String>> = c
        .fitted
        .iter()
        .zip(&c.correlation)
        .map(|(f, row)| {
            let mut cells = vec![f.factor.key().to_string()];
            cells.extend(row.iter().map(|r| signed(*r, 3)));
            cells
        })
        .collect();
    table(&header, &widths, &rows)
}

/// A range over every value, padded by 5 % either side.
fn padded(values: impl Iterator<Item = f64>) -> (f64, f64) {
    let (lo, hi) = values
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), v| {
            (l.min(v), h.max(v))
        });
    let pad = 0.05 * (hi - lo).abs().max(1e-6);
    (lo - pad, hi + pad)
}

/// One plot of measured quantities against measured stroke: for each bore of the file
/// and each quantity measured there, the model's curve and the points.
fn plot(
    a: &Analysis,
    m: &Measured,
    width: f32,
    title: &str,
    y_label: &str,
    quantities: &[(Quantity, &str, Rgb)],
) -> Block {
    let nominal = a.segment.bore_nominal_mm;
    let mut items = Vec::new();
    let (mut xs, mut ys) = (Vec::new(), Vec::new());
    let curves = calibrate::model_curves(&a.segment, &m.data, CURVE_POINTS);
    for (i, c) in curves.iter().enumerate() {
        for &(q, what, color) in quantities {
            let pts = c.measured(nominal, &m.data, q);
            if pts.is_empty() {
                continue;
            }
            let curve: Vec<(f64, Option<f64>)> = c
                .samples
                .iter()
                .map(|s| (s.stroke_mm, s.value(q)))
                .collect();
            xs.extend(curve.iter().map(|c| c.0));
            ys.extend(curve.iter().filter_map(|c| c.1));
            xs.extend(pts.iter().map(|p| p.0));
            ys.extend(pts.iter().map(|p| p.1));
            let pen = if i == 0 {
                Pen::solid(color, 1.0)
            } else {
                Pen::dashed(color, 1.0, &[3.0, 2.0])
            };
            let bore = format!("bore {} mm", fixed(c.bore_mm, 2));
            items.push(Item::series(format!("model {what}, {bore}"), pen, curve));
            items.push(Item::Points {
                label: format!("measured {what}, {bore}"),
                color,
                points: pts,
            });
        }
    }
    if items.is_empty() {
        return text_block(
            width,
            BODY,
            GREY,
            &format!("{title}: {NONE} (nothing measured that this plot shows)"),
        );
    }
    Plot {
        title: title.to_string(),
        x_label: "measured stroke (mm)".to_string(),
        y_label: y_label.to_string(),
        x_range: padded(xs.into_iter()),
        y_range: padded(ys.into_iter()),
        items,
    }
    .layout(width, 100.0)
}

fn diameter_plot(a: &Analysis, m: &Measured, width: f32) -> Block {
    plot(
        a,
        m,
        width,
        "Diameter over the strips against measured stroke",
        "diameter (mm)",
        &[(Quantity::OuterDiameter, "diameter", BLUE)],
    )
}

fn force_plot(a: &Analysis, m: &Measured, width: f32) -> Block {
    plot(
        a,
        m,
        width,
        "Forces against measured stroke",
        "force (N)",
        &[
            (Quantity::ActuatorForce, "pull", ORANGE),
            (Quantity::SlipForce, "slip force", GREEN),
        ],
    )
}
