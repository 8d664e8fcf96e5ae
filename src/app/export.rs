//! Plain-text exports of the app's results: the force-stroke curve and the
//! stroke-against-bore window as CSV (the same columns as the command line: the state
//! names for the curve, the bore rows for the window), and any plot as a small SVG of
//! polylines written by hand.

use std::fmt::Write as _;

use crate::segment::{BoreRow, SegmentState};

/// Columns of the curve CSV: the first twelve state names.
pub const CURVE_COLUMNS: [&str; 12] = [
    "stroke_mm",
    "phase",
    "axial_force_per_strip_n",
    "contact_force_per_strip_n",
    "actuator_force_n",
    "radial_force_n",
    "holding_force_n",
    "outer_diameter_mm",
    "flat_length_mm",
    "max_stress_mpa",
    "first_contact_stroke_mm",
    "line_contact_stroke_mm",
];

/// Columns of the window CSV.
pub const WINDOW_COLUMNS: [&str; 6] = [
    "bore_mm",
    "first_contact_stroke_mm",
    "holding_stroke_mm",
    "stress_limit_stroke_mm",
    "line_contact_stroke_mm",
    "limit_stroke_mm",
];

fn cell(v: Option<f64>) -> String {
    v.map(|x| x.to_string()).unwrap_or_default()
}

/// The curve as CSV with a header row; an empty cell where a quantity does not exist.
pub fn curve_csv(curve: &[SegmentState]) -> String {
    let mut out = CURVE_COLUMNS.join(",");
    out.push('\n');
    for s in curve {
        let cells = [
            s.stroke_mm.to_string(),
            s.phase.to_string(),
            cell(s.axial_force_per_strip_n),
            cell(s.contact_force_per_strip_n),
            cell(s.actuator_force_n),
            cell(s.radial_force_n),
            cell(s.holding_force_n),
            cell(s.outer_diameter_mm),
            cell(s.flat_length_mm),
            cell(s.max_stress_mpa),
            cell(s.first_contact_stroke_mm),
            cell(s.line_contact_stroke_mm),
        ];
        out.push_str(&cells.join(","));
        out.push('\n');
    }
    out
}

/// The window rows as CSV with a header row.
pub fn window_csv(rows: &[BoreRow]) -> String {
    let mut out = WINDOW_COLUMNS.join(",");
    out.push('\n');
    for r in rows {
        let cells = [
            r.bore_mm.to_string(),
            cell(r.first_contact_stroke_mm),
            cell(r.holding_stroke_mm),
            cell(r.stress_limit_stroke_mm),
            cell(r.line_contact_stroke_mm),
            cell(r.limit_stroke_mm),
        ];
        out.push_str(&cells.join(","));
        out.push('\n');
    }
    out
}

/// One named polyline of a plot; breaks in the data are separate `runs`.
#[derive(Clone, Debug)]
pub struct SvgSeries {
    /// Legend text.
    pub name: String,
    /// `#rrggbb`.
    pub color: String,
    /// Each run is drawn as one polyline.
    pub runs: Vec<Vec<[f64; 2]>>,
}

/// A simple line chart as SVG: frame, axis labels with units, min/max tick values,
/// polylines and a legend. Non-finite points are skipped.
pub fn svg_chart(title: &str, x_label: &str, y_label: &str, series: &[SvgSeries]) -> String {
    let (w, h, ml, mr, mt, mb) = (720.0, 440.0, 70.0, 200.0, 40.0, 50.0);
    let pts = series
        .iter()
        .flat_map(|s| s.runs.iter().flatten())
        .filter(|p| p[0].is_finite() && p[1].is_finite());
    let (mut x0, mut x1, mut y0, mut y1) = (
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    );
    for p in pts {
        x0 = x0.min(p[0]);
        x1 = x1.max(p[0]);
        y0 = y0.min(p[1]);
        y1 = y1.max(p[1]);
    }
    if !(x0.is_finite() && x1.is_finite()) {
        (x0, x1, y0, y1) = (0.0, 1.0, 0.0, 1.0);
    }
    if x1 - x0 <= 0.0 {
        x1 = x0 + 1.0;
    }
    if y1 - y0 <= 0.0 {
        y1 = y0 + 1.0;
    }
    let (pw, ph) = (w - ml - mr, h - mt - mb);
    let sx = |x: f64| ml + (x - x0) / (x1 - x0) * pw;
    let sy = |y: f64| mt + ph - (y - y0) / (y1 - y0) * ph;
    let mut s = String::new();
    let _ = writeln!(
        s,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}" font-family="sans-serif" font-size="12">"#
    );
    let _ = writeln!(s, r#"<rect width="{w}" height="{h}" fill="white"/>"#);
    let _ = writeln!(
        s,
        r#"<text x="{ml}" y="24" font-size="15">{}</text>"#,
        esc(title)
    );
    let _ = writeln!(
        s,
        r#"<rect x="{ml}" y="{mt}" width="{pw}" height="{ph}" fill="none" stroke="black"/>"#
    );
    let _ = writeln!(
        s,
        r#"<text x="{}" y="{}" text-anchor="middle">{}</text>"#,
        ml + pw / 2.0,
        h - 12.0,
        esc(x_label)
    );
    let _ = writeln!(
        s,
        r#"<text transform="translate(16 {}) rotate(-90)" text-anchor="middle">{}</text>"#,
        mt + ph / 2.0,
        esc(y_label)
    );
    for (v, x, anchor) in [(x0, ml, "start"), (x1, ml + pw, "end")] {
        let _ = writeln!(
            s,
            r#"<text x="{x}" y="{}" text-anchor="{anchor}">{}</text>"#,
            mt + ph + 16.0,
            tick(v)
        );
    }
    for (v, y) in [(y0, mt + ph), (y1, mt + 10.0)] {
        let _ = writeln!(
            s,
            r#"<text x="{}" y="{y}" text-anchor="end">{}</text>"#,
            ml - 4.0,
            tick(v)
        );
    }
    for (i, ser) in series.iter().enumerate() {
        for run in &ser.runs {
            let path: Vec<String> = run
                .iter()
                .filter(|p| p[0].is_finite() && p[1].is_finite())
                .map(|p| format!("{:.2},{:.2}", sx(p[0]), sy(p[1])))
                .collect();
            if path.len() >= 2 {
                let _ = writeln!(
                    s,
                    r#"<polyline fill="none" stroke="{}" stroke-width="1.6" points="{}"/>"#,
                    ser.color,
                    path.join(" ")
                );
            }
        }
        let ly = mt + 14.0 + 18.0 * i as f64;
        let lx = w - mr + 12.0;
        let _ = writeln!(
            s,
            r#"<line x1="{lx}" y1="{ly}" x2="{}" y2="{ly}" stroke="{}" stroke-width="3"/><text x="{}" y="{}">{}</text>"#,
            lx + 18.0,
            ser.color,
            lx + 24.0,
            ly + 4.0,
            esc(&ser.name)
        );
    }
    s.push_str("</svg>\n");
    s
}

fn tick(v: f64) -> String {
    let a = v.abs();
    if a != 0.0 && !(1e-3..1e5).contains(&a) {
        format!("{v:.3e}")
    } else {
        format!("{v:.4}")
            .trim_end_matches('0')
            .trim_end_matches('.')
            .to_string()
    }
}

fn esc(t: &str) -> String {
    t.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn window_csv_leaves_missing_cells_empty() {
        let rows = [BoreRow {
            bore_mm: 70.5,
            first_contact_stroke_mm: Some(1.25),
            holding_stroke_mm: None,
            stress_limit_stroke_mm: None,
            line_contact_stroke_mm: Some(2.0),
            limit_stroke_mm: Some(2.5),
        }];
        let csv = window_csv(&rows);
        let lines: Vec<&str> = csv.lines().collect();
        assert_eq!(lines[0], WINDOW_COLUMNS.join(","));
        assert_eq!(lines[1], "70.5,1.25,,,2,2.5");
    }

    #[test]
    fn svg_has_one_polyline_per_run_and_escapes_text() {
        let series = [SvgSeries {
            name: "a<b".into(),
            color: "#112233".into(),
            runs: vec![
                vec![[0.0, 0.0], [1.0, 2.0]],
                vec![[2.0, 1.0], [3.0, f64::NAN], [4.0, 0.5]],
            ],
        }];
        let svg = svg_chart("t", "x, mm", "y, N", &series);
        assert_eq!(svg.matches("<polyline").count(), 2);
        assert!(svg.contains("a&lt;b"));
        assert!(!svg.contains("NaN"));
    }
}
