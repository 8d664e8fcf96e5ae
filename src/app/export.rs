//! Plain-text exports of the app's results: the force-stroke curve and the
//! stroke-against-bore window as CSV (the same columns as the command line: the state
//! names for the curve, the bore rows for the window), and any plot as a small SVG of
//! polylines written by hand, or as a PNG cut from a screenshot (encoded by the `png`
//! crate).

use std::fmt::Write as _;

use crate::segment::{BORE_ROW_COLUMNS, BoreRow, STATE_COLUMNS, SegmentState};
use crate::ticks;

/// Columns of the curve CSV: the first twelve state names.
pub const CURVE_COLUMNS: [&str; 12] = STATE_COLUMNS;

/// Columns of the window CSV.
pub const WINDOW_COLUMNS: [&str; 6] = BORE_ROW_COLUMNS;

/// The curve as CSV with a header row; an empty cell where a quantity does not exist.
pub fn curve_csv(curve: &[SegmentState]) -> String {
    let mut out = CURVE_COLUMNS.join(",");
    out.push('\n');
    for s in curve {
        out.push_str(&s.csv_cells().join(","));
        out.push('\n');
    }
    out
}

/// The window rows as CSV with a header row.
pub fn window_csv(rows: &[BoreRow]) -> String {
    let mut out = WINDOW_COLUMNS.join(",");
    out.push('\n');
    for r in rows {
        out.push_str(&r.csv_line());
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
    /// Drawn dashed: a reference line (operating stroke, tolerance ends, allowables).
    pub dashed: bool,
    /// Drawn as a lightly filled area, each run a closed outline: the bore tolerance band
    /// and the usable stroke window. Areas go under the grid and the curves.
    pub shaded: bool,
}

impl SvgSeries {
    /// A dashed straight reference line from `a` to `b`.
    pub fn reference(name: &str, color: &str, a: [f64; 2], b: [f64; 2]) -> SvgSeries {
        SvgSeries {
            name: name.to_string(),
            color: color.to_string(),
            runs: vec![vec![a, b]],
            dashed: true,
            shaded: false,
        }
    }

    /// A shaded area; each run is one closed outline.
    pub fn area(name: &str, color: &str, runs: Vec<Vec<[f64; 2]>>) -> SvgSeries {
        SvgSeries {
            name: name.to_string(),
            color: color.to_string(),
            runs,
            dashed: false,
            shaded: true,
        }
    }
}

/// The span of the finite points of `series`, `[x0, x1, y0, y1]`; `None` when there are none.
pub fn span(series: &[SvgSeries]) -> Option<[f64; 4]> {
    let mut out = [
        f64::INFINITY,
        f64::NEG_INFINITY,
        f64::INFINITY,
        f64::NEG_INFINITY,
    ];
    for p in series.iter().flat_map(|s| s.runs.iter().flatten()) {
        if p[0].is_finite() && p[1].is_finite() {
            out = [
                out[0].min(p[0]),
                out[1].max(p[0]),
                out[2].min(p[1]),
                out[3].max(p[1]),
            ];
        }
    }
    (out[0] <= out[1]).then_some(out)
}

/// A simple line chart as SVG: frame, axis labels with units, grid lines and tick values
/// at round steps ([`crate::ticks`]), polylines and a legend. Non-finite points are
/// skipped.
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
    // The finite points of a run in page coordinates.
    let points = |run: &[[f64; 2]]| -> Vec<String> {
        run.iter()
            .filter(|p| p[0].is_finite() && p[1].is_finite())
            .map(|p| format!("{:.2},{:.2}", sx(p[0]), sy(p[1])))
            .collect()
    };
    // Shaded areas first, so that the grid and the curves stay readable over them.
    for ser in series.iter().filter(|s| s.shaded) {
        for run in &ser.runs {
            let path = points(run);
            if path.len() >= 3 {
                let _ = writeln!(
                    s,
                    r#"<polygon fill="{}" stroke="none" points="{}"/>"#,
                    pale(&ser.color),
                    path.join(" ")
                );
            }
        }
    }
    // Grid lines and labels at round values (the one tick generator of every plot).
    let (xt, xd) = ticks::ticks(x0, x1, 7);
    for v in xt {
        let x = sx(v);
        let _ = writeln!(
            s,
            r##"<line x1="{x:.2}" y1="{mt}" x2="{x:.2}" y2="{}" stroke="#d8d8d8" stroke-width="0.6"/><text x="{x:.2}" y="{}" text-anchor="middle">{v:.xd$}</text>"##,
            mt + ph,
            mt + ph + 16.0
        );
    }
    let (yt, yd) = ticks::ticks(y0, y1, 6);
    for v in yt {
        let y = sy(v);
        let _ = writeln!(
            s,
            r##"<line x1="{ml}" y1="{y:.2}" x2="{}" y2="{y:.2}" stroke="#d8d8d8" stroke-width="0.6"/><text x="{}" y="{:.2}" text-anchor="end">{v:.yd$}</text>"##,
            ml + pw,
            ml - 4.0,
            y + 4.0
        );
    }
    for (i, ser) in series.iter().enumerate() {
        for run in ser.runs.iter().filter(|_| !ser.shaded) {
            let path = points(run);
            if path.len() >= 2 {
                let _ = writeln!(
                    s,
                    r#"<polyline fill="none" stroke="{}" stroke-width="1.6"{} points="{}"/>"#,
                    ser.color,
                    if ser.dashed {
                        r#" stroke-dasharray="6 4""#
                    } else {
                        ""
                    },
                    path.join(" ")
                );
            }
        }
        let ly = mt + 14.0 + 18.0 * i as f64;
        let lx = w - mr + 12.0;
        if ser.shaded {
            let _ = writeln!(
                s,
                r#"<rect x="{lx}" y="{}" width="18" height="10" fill="{}" stroke="{}" stroke-width="0.6"/><text x="{}" y="{}">{}</text>"#,
                ly - 5.0,
                pale(&ser.color),
                ser.color,
                lx + 24.0,
                ly + 4.0,
                esc(&ser.name)
            );
        } else {
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
    }
    s.push_str("</svg>\n");
    s
}

/// `#rrggbb` a quarter of the way from white to the colour: shaded areas are solid pale
/// fills (not transparency), so every SVG reader shows them alike.
fn pale(color: &str) -> String {
    let channel = |i: usize| {
        color
            .get(i..i + 2)
            .and_then(|h| u8::from_str_radix(h, 16).ok())
            .map_or(255, |c| {
                (255.0 - 0.25 * (255.0 - f64::from(c))).round() as u8
            })
    };
    format!("#{:02x}{:02x}{:02x}", channel(1), channel(3), channel(5))
}

fn esc(t: &str) -> String {
    t.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
}

/// An RGBA image, 8 bits per channel, rows top to bottom, as a compressed PNG file
/// (through the `png` crate, which eframe already builds).
pub fn png_rgba(width: u32, height: u32, rgba: &[u8]) -> Result<Vec<u8>, png::EncodingError> {
    let mut out = Vec::new();
    let mut encoder = png::Encoder::new(&mut out, width, height);
    encoder.set_color(png::ColorType::Rgba);
    encoder.set_depth(png::BitDepth::Eight);
    encoder.set_compression(png::Compression::Balanced);
    let mut writer = encoder.write_header()?;
    writer.write_image_data(rgba)?;
    writer.finish()?;
    Ok(out)
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

    /// The file decodes back to the same pixels (the `png` crate's own decoder) and is
    /// compressed: a flat-colour plot background takes far less than its raw size.
    #[test]
    fn png_decodes_to_the_same_pixels_and_is_compressed() {
        let (w, h) = (300u32, 200u32);
        let px: Vec<u8> = (0..w * h * 4)
            .map(|i| if i % 97 == 0 { 40 } else { 200 })
            .collect();
        let bytes = png_rgba(w, h, &px).expect("encodes");
        assert_eq!(
            &bytes[..8],
            b"\x89PNG\r\n\x1a\n",
            "PNG signature (RFC 2083)"
        );
        assert!(bytes.len() < px.len() / 4, "{} bytes", bytes.len());
        let mut reader = png::Decoder::new(std::io::Cursor::new(bytes))
            .read_info()
            .expect("decodes");
        let mut back = vec![0; reader.output_buffer_size().expect("size")];
        let info = reader.next_frame(&mut back).expect("frame");
        assert_eq!((info.width, info.height), (w, h));
        assert_eq!(info.color_type, png::ColorType::Rgba);
        assert_eq!(&back[..info.buffer_size()], &px[..]);
        // A wrong buffer length is an error, not a broken file.
        assert!(png_rgba(w, h, &px[..100]).is_err());
    }

    #[test]
    fn svg_has_one_polyline_per_run_and_escapes_text() {
        let series = [SvgSeries {
            shaded: false,
            dashed: false,
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
        // Ticks at round values across x from 0 to 4 (steps of 0.5), not the data's ends.
        assert!(
            svg.contains(">0.5</text>") && svg.contains(">2.0</text>"),
            "{svg}"
        );
    }
}
