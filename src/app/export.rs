//! Plain-text exports of the app's results: the force-stroke curve and the
//! stroke-against-bore window as CSV (the same columns as the command line: the state
//! names for the curve, the bore rows for the window), and any plot as a small SVG of
//! polylines written by hand, or as a PNG cut from a screenshot (a minimal encoder:
//! stored deflate blocks, no compression).

use std::fmt::Write as _;

use crate::segment::{BORE_ROW_COLUMNS, BoreRow, STATE_COLUMNS, SegmentState};

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

/// CRC-32 (ISO 3309 / ITU-T V.42, the polynomial PNG uses) of `bytes`.
pub fn crc32(bytes: &[u8]) -> u32 {
    let mut crc = 0xffff_ffff_u32;
    for &b in bytes {
        crc ^= u32::from(b);
        for _ in 0..8 {
            crc = if crc & 1 != 0 {
                (crc >> 1) ^ 0xedb8_8320
            } else {
                crc >> 1
            };
        }
    }
    !crc
}

/// Adler-32 (RFC 1950) of `bytes`.
pub fn adler32(bytes: &[u8]) -> u32 {
    let (mut a, mut b) = (1u32, 0u32);
    for &x in bytes {
        a = (a + u32::from(x)) % 65521;
        b = (b + a) % 65521;
    }
    (b << 16) | a
}

/// An RGBA image, 8 bits per channel, rows top to bottom, as a PNG file (RFC 2083):
/// one IDAT chunk holding a zlib stream of stored (uncompressed) deflate blocks.
pub fn png_rgba(width: u32, height: u32, rgba: &[u8]) -> Vec<u8> {
    let row = width as usize * 4;
    let mut raw = Vec::with_capacity((row + 1) * height as usize);
    for r in rgba.chunks(row.max(1)).take(height as usize) {
        raw.push(0); // filter type: none
        raw.extend_from_slice(r);
    }
    let mut z = vec![0x78, 0x01];
    let blocks: Vec<&[u8]> = if raw.is_empty() {
        vec![&[][..]]
    } else {
        raw.chunks(65_535).collect()
    };
    for (i, block) in blocks.iter().enumerate() {
        z.push(u8::from(i + 1 == blocks.len()));
        let len = block.len() as u16;
        z.extend_from_slice(&len.to_le_bytes());
        z.extend_from_slice(&(!len).to_le_bytes());
        z.extend_from_slice(block);
    }
    z.extend_from_slice(&adler32(&raw).to_be_bytes());
    let mut out = b"\x89PNG\r\n\x1a\n".to_vec();
    let mut chunk = |kind: &[u8; 4], data: &[u8]| {
        out.extend_from_slice(&(data.len() as u32).to_be_bytes());
        let start = out.len();
        out.extend_from_slice(kind);
        out.extend_from_slice(data);
        let crc = crc32(&out[start..]);
        out.extend_from_slice(&crc.to_be_bytes());
    };
    let mut ihdr = Vec::with_capacity(13);
    ihdr.extend_from_slice(&width.to_be_bytes());
    ihdr.extend_from_slice(&height.to_be_bytes());
    ihdr.extend_from_slice(&[8, 6, 0, 0, 0]); // 8-bit RGBA, deflate, adaptive filters, no interlace
    chunk(b"IHDR", &ihdr);
    chunk(b"IDAT", &z);
    chunk(b"IEND", &[]);
    out
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
    fn checksums_match_published_values() {
        // Every PNG ends with the IEND chunk, whose CRC over "IEND" is AE 42 60 82
        // (PNG specification, RFC 2083, the fixed trailer of every file).
        assert_eq!(crc32(b"IEND"), 0xae42_6082);
        // The CRC-32 check value for "123456789" is CBF43926 (the standard check
        // value of the ISO-HDLC CRC, e.g. in the Greg Cook CRC catalogue).
        assert_eq!(crc32(b"123456789"), 0xcbf4_3926);
        // Adler-32 of "Wikipedia" is 0x11E60398 (worked example in the Wikipedia
        // article on Adler-32).
        assert_eq!(adler32(b"Wikipedia"), 0x11e6_0398);
    }

    #[test]
    fn png_has_signature_header_and_stored_blocks() {
        let (w, h) = (300u32, 200u32);
        let px = vec![200u8; (w * h * 4) as usize];
        let png = png_rgba(w, h, &px);
        assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n");
        assert_eq!(&png[12..16], b"IHDR");
        assert_eq!(u32::from_be_bytes([png[16], png[17], png[18], png[19]]), w);
        // Raw size (1 + 4 w) h plus zlib's 2 + 4 bytes and 5 bytes per stored block.
        let raw = (1 + 4 * w as usize) * h as usize;
        let blocks = raw.div_ceil(65_535);
        let idat = u32::from_be_bytes([png[33], png[34], png[35], png[36]]) as usize;
        assert_eq!(idat, raw + 6 + 5 * blocks);
        assert!(png.ends_with(&[0, 0, 0, 0, b'I', b'E', b'N', b'D', 0xae, 0x42, 0x60, 0x82]));
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
