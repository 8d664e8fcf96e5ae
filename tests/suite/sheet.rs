//! The sizing sheet: the PDF parses (lopdf), its text is real and carries the solver's
//! numbers as printed, the page count and page size match the paper, and every section and
//! every line of text lies inside the printable area, for passing, failing and no-state
//! designs on A4 and Letter.

use bowgrip::analysis::{BoreCase, analyse};
use bowgrip::design::{self, Actuator, Design, PipeRef};
use bowgrip::segment::Segment;
use bowgrip::sheet::{self, Paper, SheetLayout};
use sha2::{Digest, Sha256};

/// Paper sizes in PDF points (1/72 in): ISO 216 A4 is 210 x 297 mm, ANSI/ASME Y14.1
/// Letter 8.5 x 11 in.
const A4_PT: (f32, f32) = (210.0 / 25.4 * 72.0, 297.0 / 25.4 * 72.0);
const LETTER_PT: (f32, f32) = (612.0, 792.0);

fn sample(name: &str) -> (Design, String) {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join(name);
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    (
        design::parse(&text).unwrap_or_else(|e| panic!("{name}: {e}")),
        text,
    )
}

/// The bore the relaxed strips' edges just touch (gap zero), mm.
fn touching_bore_mm(d: &Design) -> f64 {
    Segment::new(d).expect("segment").bore_for_gap_mm(0.0)
}

/// Designs that exercise every branch of the sheet: passing, failing checks, a bore with no
/// state, a pipe bore with a spool, a direct pull.
fn designs() -> Vec<(String, Design)> {
    let with = |change: &dyn Fn(&mut Design)| {
        let mut d = Design::default();
        change(&mut d);
        d
    };
    let mut out = vec![("default".to_string(), Design::default())];
    out.push((
        "failing".to_string(),
        with(&|d| {
            // Just over the strips' corner diameter: states exist, but the relaxed segment
            // lacks the 1 mm clearance the fit check asks for.
            d.title = "Too small a bore: the fit check fails".to_string();
            d.bore.diameter_mm = touching_bore_mm(d) + 0.6;
        }),
    ));
    // The geometry caution must show on the sheet.
    out.push(("wide-gap".to_string(), crate::shared::wide_gap_design()));
    out.push((
        "no-state".to_string(),
        with(&|d| {
            // Below the strips' corner diameter at every bore of the band: no state.
            d.title = "Relaxed strips do not fit the bore".to_string();
            d.bore.diameter_mm = touching_bore_mm(d) - 1.0;
        }),
    ));
    out.push((
        "out-of-reach".to_string(),
        with(&|d| {
            d.title = "Bore beyond the reach of the strips".to_string();
            d.bore.diameter_mm = Segment::new(d)
                .expect("segment")
                .largest_reachable_bore_mm()
                + 5.0;
        }),
    ));
    out.push((
        "pipe-spool".to_string(),
        with(&|d| {
            d.title = "A very long design title that has to wrap over more than one line in the title block of the \
                       sheet, and then some more words to be sure it is cut cleanly rather than running off the page"
                .to_string();
            d.bore.pipe = Some(PipeRef {
                nps: "2-1/2".to_string(),
                schedule: "40".to_string(),
            });
            d.actuator = Actuator::Spool {
                radius_mm: 6.0,
                max_torque_nm: 1.5,
                max_angle_deg: 90.0,
                stiffness_n_per_mm: None,
            };
        }),
    ));
    out.push((
        "direct".to_string(),
        with(&|d| {
            d.actuator = Actuator::Direct {
                max_force_n: 300.0,
                max_stroke_mm: 4.0,
                stiffness_n_per_mm: None,
            };
        }),
    ));
    for name in [
        "drain-crawler-anchor-100mm.ron",
        "duct-anchor-150mm-stainless.ron",
        "riser-climber-2in-sch40.ron",
    ] {
        if std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("sample-designs")
            .join(name)
            .exists()
        {
            out.push((name.to_string(), sample(name).0));
        }
    }
    out
}

/// All text of a PDF by lopdf (no external tools), whitespace collapsed to single spaces.
fn pdf_text(pdf: &[u8]) -> (usize, String) {
    let doc = lopdf::Document::load_mem(pdf).expect("the sheet parses as PDF");
    let pages: Vec<u32> = doc.get_pages().keys().copied().collect();
    let text = doc.extract_text(&pages).expect("text extracts");
    (
        pages.len(),
        text.split_whitespace().collect::<Vec<_>>().join(" "),
    )
}

fn media_box(pdf: &[u8]) -> Vec<(f32, f32)> {
    let doc = lopdf::Document::load_mem(pdf).expect("parses");
    doc.get_pages()
        .values()
        .map(|id| {
            let page = doc.get_dictionary(*id).expect("page dictionary");
            let mb = page
                .get(b"MediaBox")
                .and_then(|o| o.as_array())
                .expect("MediaBox on each page");
            let n: Vec<f32> = mb
                .iter()
                .map(|o| {
                    o.as_float()
                        .or_else(|_| o.as_i64().map(|v| v as f32))
                        .expect("number")
                })
                .collect();
            (n[2] - n[0], n[3] - n[1])
        })
        .collect()
}

#[test]
fn content_hash_is_sha256_and_dates_are_civil() {
    // FIPS 180-2, appendix B.1: SHA-256("abc") = ba7816bf 8f01cfea 414140de 5dae2223 ...
    assert_eq!(sheet::content_hash16(b"abc"), "ba7816bf8f01cfea");
    // 2000-03-01 follows 2000-02-29 (Gregorian leap rule); 11 017 days after 1970-01-01.
    assert_eq!(sheet::civil_from_days(11_017), (2000, 3, 1));
    // 1 000 000 000 s after the epoch: 2001-09-09 01:46:40 UTC (widely quoted).
    assert_eq!(sheet::utc_stamp(1_000_000_000), "2001-09-09 01:46 UTC");
}

#[test]
fn pdf_parses_with_the_paper_size_and_the_laid_out_page_count() {
    let d = Design::default();
    let bytes = design::to_ron(&d).expect("writes RON");
    for (paper, size) in [(Paper::A4, A4_PT), (Paper::Letter, LETTER_PT)] {
        let laid = sheet::layout(&d, "demo.ron", bytes.as_bytes(), paper).expect("lays out");
        let pdf = sheet::render(&d, "demo.ron", bytes.as_bytes(), paper).expect("renders");
        assert!(pdf.starts_with(b"%PDF-"));
        let (pages, text) = pdf_text(&pdf);
        assert_eq!(pages, laid.pages, "{paper:?}");
        // The default design fits in six sheets on either paper (regression check of the
        // layout: one page for title, result and inputs, then checks and material, results,
        // the stroke window with the views, the force curves, the text sections).
        assert!((5..=8).contains(&pages), "{paper:?}: {pages} pages");
        assert!(
            text.contains(&format!("1 of {pages}")),
            "{paper:?}: page x of y"
        );
        for (w, h) in media_box(&pdf) {
            assert!(
                (w - size.0).abs() < 0.5 && (h - size.1).abs() < 0.5,
                "{paper:?}: {w} x {h}"
            );
        }
        // Subset fonts keep the file small (two faces of ~400 kB each before subsetting).
        assert!(pdf.len() < 300_000, "{paper:?}: {} bytes", pdf.len());
    }
}

#[test]
fn extracted_text_carries_the_solver_values_as_printed() {
    let d = Design::default();
    let bytes = design::to_ron(&d).expect("writes RON");
    let pdf = sheet::render(&d, "demo.ron", bytes.as_bytes(), Paper::A4).expect("renders");
    let (_, text) = pdf_text(&pdf);
    let a = analyse(&d).expect("analyses");
    let nominal = a
        .bores
        .iter()
        .find(|b| b.case == BoreCase::Nominal)
        .expect("nominal bore");
    let state = nominal
        .operating
        .as_ref()
        .expect("a state at the nominal bore");
    // The solver's numbers, formatted as the sheet prints them (mm to 3 decimals, factors
    // to 3 decimals, stresses to 1 decimal).
    let mut expect = vec![
        format!(
            "{:.3} mm",
            nominal.row.first_contact_stroke_mm.expect("first contact")
        ),
        format!("{:.3} mm", nominal.row.limit_stroke_mm.expect("limit")),
        format!("{:.3}", state.static_safety_factor.expect("static factor")),
        format!(
            "{:.3}",
            state.fatigue_safety_factor.expect("fatigue factor")
        ),
        format!("{:.1} MPa", state.max_stress_mpa.expect("stress")),
        format!("{:.1} MPa", a.segment.static_allowable_mpa),
        format!("{:.3} mm", a.segment.bore_smallest_mm),
        format!("{:.3} mm", a.segment.bore_largest_mm),
    ];
    // The file's content hash, computed here with sha2 directly.
    let digest = Sha256::digest(bytes.as_bytes());
    expect.push(digest.iter().take(8).map(|b| format!("{b:02x}")).collect());
    expect.push(format!("bowgrip {}", env!("CARGO_PKG_VERSION")));
    expect.push(d.title.clone());
    for label in [
        "Calculated by",
        "Checked by",
        "Approved by",
        "Signature",
        "Date",
    ] {
        expect.push(label.to_string());
    }
    for c in &a.checks {
        expect.push(format!("[{}]", c.id));
    }
    expect.push(a.segment.stiffness_used.name().to_string());
    expect.push(a.segment.material.name.clone());
    for phrase in [
        "Stored spring energy",
        "Pinch points",
        "confined-space",
        "local codes",
        "Timoshenko",
        "Carlson",
        "Goodman",
        "ASME B36.10M",
    ] {
        expect.push(phrase.to_string());
    }
    for e in &expect {
        assert!(text.contains(e.as_str()), "sheet text lacks {e:?}");
    }
    // A value that is not on the sheet is not found (the search can fail).
    assert!(!text.contains("123456.789 mm"));
}

fn assert_inside(name: &str, laid: &SheetLayout) {
    let [left, top, right, bottom] = laid.printable_pt;
    let tol = 0.5;
    assert!(!laid.sections.is_empty(), "{name}: no sections");
    for s in &laid.sections {
        assert!(s.page >= 1 && s.page <= laid.pages, "{name}: {s:?}");
        assert!(
            s.top_pt >= top - tol && s.bottom_pt <= bottom + tol && s.bottom_pt >= s.top_pt,
            "{name}: section off the page: {s:?}"
        );
    }
    for t in &laid.texts {
        assert!(
            t.left_pt >= left - tol
                && t.right_pt <= right + tol
                && t.baseline_pt - t.size_pt >= top - tol
                && t.baseline_pt <= bottom + tol,
            "{name}: text outside the printable area on page {}: {:?} at x {}..{}, y {}",
            t.page,
            t.text,
            t.left_pt,
            t.right_pt,
            t.baseline_pt
        );
    }
    // Every line and filled area (rules, plot frames, the side and end views) lies inside
    // the printable area as well.
    for (page, [l, t, r, b]) in laid.drawing_extents() {
        assert!(
            l >= left - tol && t >= top - tol && r <= right + tol && b <= bottom + tol,
            "{name}: drawing outside the printable area on page {page}: x {l}..{r}, y {t}..{b}"
        );
    }
    // No two lines of text on one baseline run into each other (table cells, legends,
    // tick labels, title-block fields).
    for (i, a) in laid.texts.iter().enumerate() {
        for b in &laid.texts[i + 1..] {
            let same_line = a.page == b.page
                && (a.baseline_pt - b.baseline_pt).abs() < 0.5 * a.size_pt.min(b.size_pt);
            let overlap = a.left_pt < b.right_pt - tol && b.left_pt < a.right_pt - tol;
            assert!(
                !(same_line && overlap),
                "{name}: {:?} runs into {:?} on page {}",
                a.text,
                b.text,
                a.page
            );
        }
    }
    // Sections do not overlap on a page.
    for w in laid.sections.windows(2) {
        if w[0].page == w[1].page {
            assert!(
                w[1].top_pt >= w[0].bottom_pt - tol,
                "{name}: {:?} overlaps {:?}",
                w[1],
                w[0]
            );
        }
    }
}

#[test]
fn every_section_and_line_fits_the_printable_area_on_both_papers() {
    for (name, d) in designs() {
        let bytes = design::to_ron(&d).expect("writes RON");
        for paper in [Paper::A4, Paper::Letter] {
            let laid = sheet::layout_dated(
                &d,
                &format!("{name}.ron"),
                bytes.as_bytes(),
                paper,
                "2026-01-01 00:00 UTC",
            )
            .unwrap_or_else(|e| panic!("{name}: {e}"));
            assert_eq!((laid.page_width_pt, laid.page_height_pt), paper.size_pt());
            assert_inside(&format!("{name} on {paper:?}"), &laid);
            // Each section fits one page, so none is split: the sheet breaks to a new page
            // before a section that would not fit.
            for s in &laid.sections {
                let parts = laid.sections.iter().filter(|o| o.title == s.title).count();
                assert_eq!(
                    parts, 1,
                    "{name} on {paper:?}: {} is split over pages",
                    s.title
                );
            }
            // Every section is on the sheet once at least.
            for title in [
                "Title block",
                "Result",
                "Inputs",
                "Checks",
                "Material and stiffness model",
                "Safety cautions",
            ] {
                assert!(
                    laid.sections.iter().any(|s| s.title == title),
                    "{name}: no {title}"
                );
            }
        }
    }
}

#[test]
fn a_long_file_path_keeps_its_file_name_and_hash() {
    let (d, text) = sample("riser-climber-2in-sch40.ron");
    let path = format!("/{}/riser-climber-2in-sch40.ron", "deep-folder/".repeat(12));
    let laid = sheet::layout_dated(
        &d,
        &path,
        text.as_bytes(),
        Paper::A4,
        "2026-01-01 00:00 UTC",
    )
    .unwrap_or_else(|e| panic!("{e}"));
    let hash = sheet::content_hash16(text.as_bytes());
    // The title block and every running header name the file; a path too long for the
    // field loses its leading folders (an ellipsis marks the cut), never the name or hash.
    let naming: Vec<&str> = laid
        .texts
        .iter()
        .filter(|t| t.text.contains("riser-climber-2in-sch40.ron"))
        .map(|t| t.text.as_str())
        .collect();
    assert_eq!(naming.len(), laid.pages, "{naming:?}");
    for t in &naming {
        assert!(t.starts_with('…'), "{t}");
    }
    let headers = naming.iter().filter(|t| t.ends_with(&hash)).count();
    assert_eq!(headers, laid.pages - 1, "{naming:?}");
    assert_inside("long path", &laid);
}

#[test]
fn failing_and_no_state_designs_render_and_say_so() {
    let all = designs();
    let pick = |n: &str| {
        all.iter()
            .find(|(name, _)| name == n)
            .map(|(_, d)| d.clone())
            .expect("design")
    };
    let failing = pick("failing");
    let pdf = sheet::render(&failing, "failing.ron", b"x", Paper::A4)
        .expect("a failing design still renders");
    let (_, text) = pdf_text(&pdf);
    assert!(text.contains("CHECKS FAIL"), "{text}");
    let a = analyse(&failing).expect("analyses");
    let fit = a
        .checks
        .iter()
        .find(|c| c.id == bowgrip::checks::CheckId::Fit)
        .expect("fit check");
    assert!(!fit.pass, "the test design must fail the fit check");

    let no_state = pick("no-state");
    let a = analyse(&no_state).expect("loads and analyses");
    assert!(
        a.bores.iter().any(|b| b.operating.is_err()),
        "the test design must have a bore with no state"
    );
    let pdf = sheet::render(&no_state, "no-state.ron", b"y", Paper::Letter)
        .expect("a no-state design still renders");
    let (_, text) = pdf_text(&pdf);
    assert!(
        text.contains("No model state at the smallest bore"),
        "{text}"
    );
    assert!(text.contains("no state"));
}

#[test]
fn an_invalid_design_is_refused_with_the_reason() {
    let mut d = Design::default();
    d.strip.thickness_mm = f64::NAN;
    let err = sheet::render(&d, "bad.ron", b"", Paper::A4).expect_err("NaN thickness is refused");
    let msg = err.to_string();
    assert!(
        msg.contains("bad.ron") && msg.contains("strip.thickness_mm"),
        "{msg}"
    );
}

#[test]
fn geometry_cautions_reach_the_first_page_and_the_checks() {
    let all = designs();
    let wide = all
        .iter()
        .find(|(name, _)| name == "wide-gap")
        .map(|(_, d)| d.clone())
        .expect("design");
    let a = analyse(&wide).expect("analyses");
    assert!(
        !a.cautions.is_empty(),
        "the test design must raise a caution"
    );
    let pdf = sheet::render(&wide, "wide.ron", b"w", Paper::A4).expect("renders");
    let (_, text) = pdf_text(&pdf);
    assert!(
        text.contains("Geometry caution: at the smallest bore"),
        "{text}"
    );
    assert!(
        text.contains("Geometry cautions (beside the checks"),
        "{text}"
    );
    // The default design has none.
    let pdf = sheet::render(&Design::default(), "d.ron", b"d", Paper::A4).expect("renders");
    assert!(!pdf_text(&pdf).1.contains("Geometry caution"));
}

/// Issue 16, item 6: the material section prints what a checker can act on, never
/// "from memory": a stainless grade's strengths as the typical minimums of ASTM A666 with
/// the mill certificate to confirm them against (the honest notes stay in the data file).
#[test]
fn material_values_say_their_basis_in_plain_words() {
    let (d, text) = sample("duct-anchor-150mm-stainless.ron");
    let pdf = sheet::render(&d, "duct.ron", text.as_bytes(), Paper::A4).expect("renders");
    let (_, printed) = pdf_text(&pdf);
    let flat = printed.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(!flat.contains("from memory"), "{flat}");
    assert!(
        flat.contains("typical minimum, ASTM A666 type 301 full hard"),
        "{flat}"
    );
    assert!(
        flat.contains("confirm against the mill certificate"),
        "{flat}"
    );
}

/// The sheet gives the usable stroke range as numbers, with what bounds
/// each end, and says plainly where there is none. The numbers are the solver's inverse
/// queries at the two ends of the tolerance band (holding at the largest bore; the stress
/// limit, the model's limit or the actuator's travel at the smallest), each of which
/// `inverse_queries` feeds back to the forward solution.
#[test]
fn the_usable_stroke_range_is_printed_with_its_bounds() {
    let d = Design::default();
    let seg = Segment::new(&d).expect("segment");
    let large = seg.at_bore(seg.bore_largest_mm).expect("fits");
    let small = seg.at_bore(seg.bore_smallest_mm).expect("fits");
    let from = large.holding_stroke_mm().ok().expect("holds");
    let to = [
        small.stress_limit_stroke_mm().ok().unwrap_or(f64::INFINITY),
        small.limit_stroke_mm(),
        seg.max_stroke_mm(),
    ]
    .into_iter()
    .fold(f64::INFINITY, f64::min);
    assert!(from < to, "the demo has a usable range: {from} to {to}");
    let pdf = sheet::render(&d, "d.ron", b"d", Paper::A4).expect("renders");
    let (_, text) = pdf_text(&pdf);
    let line = format!(
        "Usable stroke {from:.3} to {to:.3} mm across the bore tolerance ({:.3} mm): from where the required load is held at the largest bore ({:.3} mm) up to",
        to - from,
        seg.bore_largest_mm
    );
    assert!(text.contains(&line), "{line}\n{text}");

    // Far more load than the strips can hold: no range, said plainly with the reason.
    let mut heavy = Design::default();
    heavy.duty.holding_force_n = 5000.0;
    let pdf = sheet::render(&heavy, "h.ron", b"h", Paper::A4).expect("renders");
    let (_, text) = pdf_text(&pdf);
    assert!(
        text.contains("No usable stroke across the bore tolerance: ")
            && !text.contains("Usable stroke "),
        "{text}"
    );
}

/// The inputs section prints the load-sharing inputs a design gives (radial load,
/// out-of-roundness, bend, plate thickness) with their units, as the sample's header states
/// them; a design without them prints none of these rows.
#[test]
fn the_inputs_name_the_load_sharing_fields_when_given() {
    let (d, text) = sample("drain-crawler-horizontal-150mm.ron");
    let pdf = sheet::render(&d, "drain.ron", text.as_bytes(), Paper::A4).expect("renders");
    let flat = pdf_text(&pdf)
        .1
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ");
    for needle in [
        "Radial load on the strips (straight down)",
        "80.00 N",
        "Out of round (largest - smallest diameter)",
        "bend of 750 mm centreline radius",
        "End-plate thickness (each)",
    ] {
        assert!(flat.contains(needle), "{needle}");
    }
    let (plain, text) = sample("riser-climber-2in-sch40.ron");
    let pdf = sheet::render(&plain, "riser.ron", text.as_bytes(), Paper::A4).expect("renders");
    let flat = pdf_text(&pdf).1;
    assert!(!flat.contains("Radial load on the strips"));
    assert!(!flat.contains("Out of round"));
}

/// Issue 16, item 10: the sheet explains the dip of the peak-stress curve where it draws it.
#[test]
fn the_stress_plot_explains_its_dip() {
    let (d, text) = sample("riser-climber-2in-sch40.ron");
    let pdf = sheet::render(&d, "riser.ron", text.as_bytes(), Paper::A4).expect("renders");
    let flat = pdf_text(&pdf)
        .1
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ");
    assert!(
        flat.contains("The peak stress dips just after first contact, and that is physics"),
        "{flat}"
    );
}

/// `--units in`: the sheet in inch, pound-force and ksi. Each input shows the file's own
/// value beside the inch value; the plots' axes are in inches; every design still fits the
/// printable area on both papers; and metric (the default) is the sheet as before.
#[test]
fn the_sheet_in_inches_converts_every_number_and_traces_the_inputs() {
    use bowgrip::units::UnitSystem;
    let inch = sheet::SheetOptions {
        units: UnitSystem::Inch,
        ..sheet::SheetOptions::default()
    };
    let lay = |d: &Design, paper, options: &sheet::SheetOptions| {
        sheet::layout_with(d, "d.ron", b"d", paper, "2026-01-01", None, options)
            .unwrap_or_else(|e| panic!("{e}"))
    };
    let d = Design::default();
    let laid = lay(&d, Paper::A4, &inch);
    let texts: Vec<&str> = laid.texts.iter().map(|t| t.text.as_str()).collect();
    // The demo's 0.25 mm strip: 0.25 / 25.4 = 0.00984 in (NIST SP 811 (2008), Appendix
    // B: 1 in = 25.4 mm exactly), to four decimals, with the file's value beside it.
    assert!(
        texts.contains(&"0.0098 in (0.25 mm in the file)"),
        "{texts:?}"
    );
    assert!(texts.contains(&"stroke (in)") && texts.contains(&"force (lbf)"));
    assert!(texts.contains(&"stress (ksi)"), "{texts:?}");
    // No number is left in mm, N or MPa except the file's own values (the design's title
    // and file name are printed as written).
    for t in texts.iter().filter(|t| !d.title.contains(**t)) {
        let words: Vec<&str> = t.split_whitespace().collect();
        for w in words.windows(2) {
            let number = w[0]
                .trim_start_matches(['(', '−', '+'])
                .parse::<f64>()
                .is_ok();
            let metric = ["mm", "N", "MPa", "mm,", "N,", "MPa,", "mm)", "N)"].contains(&w[1]);
            assert!(
                !(number && metric) || t.contains("in the file"),
                "left in metric: {t:?}"
            );
        }
    }
    // The nominal bore in the results, 3 decimals of a mm / 25.4 printed to 4 decimals of
    // an inch (NIST SP 811 Appendix B).
    let seg = Segment::new(&d).expect("segment");
    let bore_in = format!("{:.4} in", seg.bore_nominal_mm / 25.4);
    assert!(texts.iter().any(|t| t.contains(&bore_in)), "{bore_in}");
    for (name, d) in designs() {
        for paper in [Paper::A4, Paper::Letter] {
            assert_inside(&format!("{name} in inches"), &lay(&d, paper, &inch));
        }
    }
    // The design-map page numbers its axes in inches too: the demo's thickness axis
    // from 0.2 to 0.3 mm is 0.0079 to 0.0118 in (25.4 mm per inch, NIST SP 811), ticked
    // every 0.0005 in.
    let axis = |t: &str| bowgrip::map::command::axis_spec(t).unwrap_or_else(|e| panic!("{e}"));
    let with_map = sheet::SheetOptions {
        map: Some((
            axis("strip.thickness_mm:0.2:0.3:3"),
            axis("strip.count:8:12:3"),
        )),
        units: UnitSystem::Inch,
    };
    let laid = lay(&d, Paper::A4, &with_map);
    let texts: Vec<&str> = laid.texts.iter().map(|t| t.text.as_str()).collect();
    assert!(
        texts.contains(&"across: strip.thickness_mm (in)"),
        "{texts:?}"
    );
    assert!(texts.contains(&"up: strip.count"), "{texts:?}");
    assert!(texts.contains(&"0.0100"), "an inch tick: {texts:?}");
    // Metric is the default: the options' default lays out what the plain call does.
    let metric = lay(&d, Paper::A4, &sheet::SheetOptions::default());
    let plain = sheet::layout_dated(&d, "d.ron", b"d", Paper::A4, "2026-01-01").expect("lays out");
    let lines = |l: &SheetLayout| l.texts.iter().map(|t| t.text.clone()).collect::<Vec<_>>();
    assert_eq!(lines(&metric), lines(&plain));
    assert!(!lines(&metric).iter().any(|t| t.contains(" in the file")));
}
