//! The design map (issue #15, contract "Map"): every cell is what `check` gives for that
//! design, refused fields and ranges exit 2 naming what is allowed, whole-number fields
//! step by whole numbers, a one-point grid is the design itself, the zero line follows a
//! boundary known in closed form, and the run goes coarse to fine and can be cancelled.

use std::f64::consts::PI;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};

use assert_cmd::Command;
use bowgrip::checks;
use bowgrip::design::{self, Design};
use bowgrip::map::palette::{self, Rgb};
use bowgrip::map::{AxisSpec, Cell, MapError, MapSpec};
use bowgrip::segment::Segment;
use tempfile::TempDir;

fn axis(text: &str) -> AxisSpec {
    text.parse().unwrap_or_else(|e| panic!("{text}: {e}"))
}

fn spec(base: &Design, x: &str, y: &str) -> MapSpec {
    MapSpec::new(base, &axis(x), &axis(y)).unwrap_or_else(|e| panic!("{x} / {y}: {e}"))
}

/// What `check` makes of a design: written as a file, read back, resolved and checked.
fn checked(design: &Design) -> Cell {
    let text = design::to_ron(design).expect("design writes as RON");
    let read = design::parse(&text).unwrap_or_else(|e| panic!("{e}"));
    let seg = Segment::new(&read).unwrap_or_else(|e| panic!("{e}"));
    Cell::from_checks(f64::NAN, f64::NAN, &checks::run(&seg))
}

/// Cells compared bit for bit (the contract: "each row equals what `check --json` gives").
fn assert_same_verdict(cell: &Cell, want: &Cell, at: &str) {
    assert_eq!(cell.limiting, want.limiting, "{at}");
    assert_eq!(
        cell.limiting_margin.map(f64::to_bits),
        want.limiting_margin.map(f64::to_bits),
        "{at}"
    );
    assert_eq!(cell.pass, want.pass, "{at}");
    assert_eq!(cell.checks.len(), want.checks.len(), "{at}");
    for (a, b) in cell.checks.iter().zip(&want.checks) {
        assert_eq!((a.id, a.pass), (b.id, b.pass), "{at}");
        assert_eq!(
            a.margin.map(f64::to_bits),
            b.margin.map(f64::to_bits),
            "{at} {}",
            a.id
        );
    }
}

#[test]
fn every_cell_is_the_check_of_its_design() {
    // Contract, map: each cell equals `check` of that design. The expected design is built
    // by setting the two struct fields directly, not through the map's generic setter.
    let base = Design::default();
    let spec = spec(
        &base,
        "strip.thickness_mm:0.15:0.4:11",
        "strip.count:4:16:13",
    );
    let map = spec.compute_all().unwrap_or_else(|e| panic!("{e}"));
    assert!(map.is_complete());
    assert_eq!(map.cells().count(), 11 * 13);
    let (mut passing, mut failing) = (0, 0);
    for iy in 0..13 {
        for ix in 0..11 {
            let cell = map.cell(ix, iy).expect("computed");
            let mut d = base.clone();
            d.strip.thickness_mm = spec.x.values[ix];
            d.strip.count = 4 + u32::try_from(iy).expect("small");
            assert_eq!(spec.design_at(ix, iy).ok().as_ref(), Some(&d));
            assert_eq!(
                (cell.x, cell.y),
                (d.strip.thickness_mm, f64::from(d.strip.count))
            );
            assert_same_verdict(cell, &checked(&d), &format!("cell ({ix}, {iy})"));
            if cell.pass {
                passing += 1;
            } else {
                failing += 1;
            }
        }
    }
    // The span is wide enough to hold both verdicts, so the comparison covers both.
    assert!(passing > 0 && failing > 0, "{passing} pass, {failing} fail");
}

#[test]
fn fields_inside_enum_variants_are_set_where_the_file_names_them() {
    // The file's dotted names: `actuator.max_torque_nm` is the field of the `LeadScrew`
    // variant, `duty.cycles` a whole number (design-file table in the README).
    let base = Design::default();
    let spec = spec(
        &base,
        "actuator.max_torque_nm:0.2:1.2:3",
        "duty.cycles:1000:1000000:4",
    );
    let map = spec.compute_all().unwrap_or_else(|e| panic!("{e}"));
    for iy in 0..4 {
        for ix in 0..3 {
            let mut d = base.clone();
            if let design::Actuator::LeadScrew { max_torque_nm, .. } = &mut d.actuator {
                *max_torque_nm = spec.x.values[ix];
            }
            d.duty.cycles = spec.y.values[iy] as u64;
            assert_eq!(spec.design_at(ix, iy).ok().as_ref(), Some(&d));
            let cell = map.cell(ix, iy).expect("computed");
            assert_same_verdict(cell, &checked(&d), &format!("cell ({ix}, {iy})"));
        }
    }
    assert_eq!(
        spec.y.values,
        vec![1000.0, 334_000.0, 667_000.0, 1_000_000.0]
    );
}

#[test]
fn whole_number_fields_step_by_whole_numbers() {
    // Issue #15: "whole-number fields take whole steps". 3 to 17 in 6 points cannot be
    // spaced evenly by whole numbers; each point is rounded to the nearest whole number.
    let base = Design::default();
    let spec = spec(&base, "strip.count:3:17:6", "friction:0.2:0.4:2");
    assert!(spec.x.whole && !spec.y.whole);
    assert_eq!(spec.x.values, vec![3.0, 6.0, 9.0, 11.0, 14.0, 17.0]);
    for w in spec.x.values.windows(2) {
        let step = w[1] - w[0];
        assert!(step >= 1.0 && step.fract() == 0.0, "{w:?}");
    }
    let d = spec.design_at(3, 1).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!((d.strip.count, d.friction), (11, 0.4));
    // More points than whole numbers in the span, or a fractional end: refused.
    for bad in ["strip.count:3:7:6", "strip.count:3.5:7:3"] {
        let e = MapSpec::new(&base, &axis(bad), &axis("friction:0.2:0.4:2"));
        assert!(
            matches!(e, Err(MapError::Points { .. } | MapError::Range { .. })),
            "{bad}: {e:?}"
        );
    }
}

#[test]
fn a_one_point_grid_is_the_design() {
    // Issue #15: "the map of a one-point grid equals the design".
    let base = Design::default();
    let spec = spec(
        &base,
        "strip.thickness_mm:0.25:0.25:1",
        "strip.count:10:10:1",
    );
    let map = spec.compute_all().unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(map.cells().count(), 1);
    let cell = map.cell(0, 0).expect("computed");
    assert_eq!((cell.x, cell.y), (0.25, 10.0));
    assert_eq!(spec.design_at(0, 0).ok().as_ref(), Some(&base));
    assert_same_verdict(cell, &checked(&base), "the one cell");
    assert!(map.zero_line().is_empty());
}

#[test]
fn refused_axes_name_what_is_allowed() {
    let base = Design::default();
    let ok = axis("friction:0.2:0.4:3");
    let refuse = |x: &str| match MapSpec::new(&base, &axis(x), &ok) {
        Ok(_) => panic!("{x} was accepted"),
        Err(e) => e,
    };
    // An unknown field, and a custom-material field on a graded design: the allowed
    // fields are listed (README design-file table: the file's dotted names).
    for field in [
        "strip.thick_mm",
        "strip.material.youngs_modulus_gpa",
        "title",
    ] {
        let e = refuse(&format!("{field}:1:2:3"));
        let text = e.to_string();
        assert!(matches!(e, MapError::UnknownField { .. }), "{text}");
        for name in [
            "strip.thickness_mm",
            "strip.count",
            "duty.holding_force_n",
            "actuator.lead_mm",
        ] {
            assert!(text.contains(name), "{text} lacks {name}");
        }
        assert!(!text.contains("actuator.max_force_n"), "{text}");
    }
    // Outside `design::limits()`: strip.thickness_mm is 0.02 to 5 mm (README table).
    let e = refuse("strip.thickness_mm:0.01:0.3:5").to_string();
    assert!(
        e.contains("0.02 to 5 mm") && e.contains("strip.thickness_mm"),
        "{e}"
    );
    // Too many points, and two ends for one point.
    assert!(matches!(
        refuse("friction:0.1:0.5:201"),
        MapError::Points { .. }
    ));
    assert!(matches!(
        refuse("strip.width_mm:8:12:1"),
        MapError::Range { .. }
    ));
    // The same field twice.
    assert!(matches!(
        MapSpec::new(&base, &ok, &ok),
        Err(MapError::SameField { .. })
    ));
    // A bound tied to another field, judged at the grid's corners: the operating stroke
    // may not exceed the free length (README table), which a 20 mm strip breaks at 30 mm.
    let e = MapSpec::new(
        &base,
        &axis("strip.free_length_mm:20:100:5"),
        &axis("operating_stroke_mm:1:30:5"),
    );
    let Err(e) = e else {
        panic!("corner (20, 30) was accepted")
    };
    let text = e.to_string();
    assert!(matches!(e, MapError::OutOfRange { .. }), "{text}");
    assert!(
        text.contains("operating_stroke_mm = 30 mm") && text.contains("0 to 20 mm"),
        "{text}"
    );
}

#[test]
fn the_nominal_bore_is_not_a_field_when_a_pipe_sets_it() {
    // README: `bore.diameter_mm` is ignored when `pipe` is given.
    let file = sample("riser-climber-2in-sch40.ron");
    let base = design::load(&file).unwrap_or_else(|e| panic!("{e}"));
    let e = MapSpec::new(
        &base,
        &axis("bore.diameter_mm:50:55:3"),
        &axis("friction:0.2:0.4:3"),
    );
    assert!(matches!(e, Err(MapError::UnknownField { .. })), "{e:?}");
    assert!(
        bowgrip::map::fields(&Design::default())
            .iter()
            .any(|r| r.field == "bore.diameter_mm")
    );
}

#[test]
fn the_zero_line_follows_the_hub_clearance() {
    // Contract: the strips clear each other on the hub while b <= 2 r_m tan(pi / N). For
    // the demo's ten strips on a 27 mm mount radius that is 54 tan(18 deg) =
    // 54 sqrt(25 - 10 sqrt 5) / 5 = 17.5457 mm (tan 18 deg in closed form). The end-plate
    // diameter (10 to 50 mm, under the strips' relaxed diameter) changes no verdict, so the
    // line is the vertical x = 17.5457 across the whole plane; the hub margin is linear in
    // the width, so interpolation puts it there to rounding.
    let room = 54.0 * (25.0 - 10.0 * 5f64.sqrt()).sqrt() / 5.0;
    assert!((room - 54.0 * (PI / 10.0).tan()).abs() < 1e-12);
    // Wider strips are stiffer: a stronger screw (invented, 2 N m) keeps the actuator
    // check passing across the span, so the hub is the only check that turns.
    let mut base = Design::default();
    if let design::Actuator::LeadScrew { max_torque_nm, .. } = &mut base.actuator {
        *max_torque_nm = 2.0;
    }
    let spec = spec(
        &base,
        "strip.width_mm:15:18.5:8",
        "end_plate_diameter_mm:10:50:5",
    );
    let map = spec.compute_all().unwrap_or_else(|e| panic!("{e}"));
    for cell in map.cells() {
        let failing: Vec<&str> = cell
            .checks
            .iter()
            .filter(|c| !c.pass)
            .map(|c| c.id)
            .collect();
        let want: Vec<&str> = if cell.x > room { vec!["hub"] } else { vec![] };
        assert_eq!(failing, want, "width {}", cell.x);
    }
    let lines = map.zero_line();
    assert_eq!(lines.len(), 1, "{lines:?}");
    let line = &lines[0];
    assert_eq!(line.len(), 5, "{line:?}");
    for p in line {
        assert!((p[0] - room).abs() < 1e-9, "{p:?} vs {room}");
    }
    let mut ys: Vec<f64> = line.iter().map(|p| p[1]).collect();
    ys.sort_by(f64::total_cmp);
    assert_eq!(ys, vec![10.0, 20.0, 30.0, 40.0, 50.0]);
}

#[test]
fn the_map_goes_coarse_to_fine_and_stops_when_cancelled() {
    // Issue #15: a first coarse picture quickly, computed with progress, cancelled when
    // the design changes.
    let base = Design::default();
    let spec = spec(
        &base,
        "strip.thickness_mm:0.15:0.4:40",
        "strip.free_length_mm:60:120:40",
    );
    let never = AtomicBool::new(false);
    let mut reports: Vec<(usize, Option<usize>)> = Vec::new();
    let mut first_picture = None;
    let map = spec
        .compute(&never, &mut |p| {
            reports.push((p.done, p.map.complete_stride()));
            if first_picture.is_none() && p.map.complete_stride().is_some() {
                // Once a level is complete, every cell has something to show.
                let all = (0..40).all(|iy| (0..40).all(|ix| p.map.shown(ix, iy).is_some()));
                first_picture = Some((p.done, all));
            }
        })
        .unwrap_or_else(|e| panic!("{e}"));
    // Stride 16 on 40 points: rows and columns 0, 16, 32, so 9 cells make the first picture.
    assert_eq!(first_picture, Some((9, true)));
    assert!(reports.windows(2).all(|w| w[0].0 < w[1].0));
    assert_eq!(reports.last(), Some(&(1600, Some(1))));
    assert_eq!(map.cells().count(), 1600);

    let cancel = AtomicBool::new(false);
    let mut calls = 0;
    let stopped = spec.compute(&cancel, &mut |_| {
        calls += 1;
        cancel.store(true, Ordering::Relaxed);
    });
    assert!(matches!(stopped, Err(MapError::Cancelled)), "{stopped:?}");
    assert_eq!(calls, 1);
}

#[test]
fn palette_is_the_okabe_ito_set() {
    // M. Okabe and K. Ito, "Color Universal Design (CUD)", J*Fly 2008; the same RGB values
    // in B. Wong, Nature Methods 8 (2011) 441, figure 2.
    let published: [(u8, u8, u8); 8] = [
        (0, 0, 0),
        (230, 159, 0),
        (86, 180, 233),
        (0, 158, 115),
        (240, 228, 66),
        (0, 114, 178),
        (213, 94, 0),
        (204, 121, 167),
    ];
    for ((_, c), (r, g, b)) in palette::OKABE_ITO.iter().zip(published) {
        assert_eq!(*c, Rgb { r, g, b });
    }
    // Every check of a design has its own colour from the set.
    let seg = Segment::new(&Design::default()).unwrap_or_else(|e| panic!("{e}"));
    let ids: Vec<&str> = checks::run(&seg).iter().map(|c| c.id.as_str()).collect();
    let colours: Vec<Rgb> = ids.iter().map(|id| palette::check_colour(id)).collect();
    for (id, c) in ids.iter().zip(&colours) {
        assert!(palette::OKABE_ITO.iter().any(|(_, k)| k == c), "{id}");
    }
    for (i, a) in colours.iter().enumerate() {
        assert!(
            !colours[i + 1..].contains(a),
            "{} shares its colour",
            ids[i]
        );
    }
    assert_eq!(palette::cell_colour(Some("hold"), false), colours[2]);
    assert_eq!(
        palette::cell_colour(Some("hub"), true),
        Rgb {
            r: 128,
            g: 128,
            b: 128
        }
    );
}

// ---------------------------------------------------------------------------------------
// The real binary.

fn sample(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join(name)
}

fn bowgrip(args: &[&str]) -> (Option<i32>, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_bowgrip"))
        .args(args)
        .output()
        .expect("run bowgrip");
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn write(dir: &TempDir, name: &str, design: &Design) -> PathBuf {
    let path = dir.path().join(name);
    std::fs::write(&path, design::to_ron(design).expect("design writes as RON"))
        .expect("write design");
    path
}

fn text(p: &Path) -> &str {
    p.to_str().expect("utf-8 path")
}

/// The `margin` of check `id` in `check --json` output, read from the text with Rust's
/// exact float parser (serde_json's default parser may be one unit in the last place off,
/// and the comparison here is bit for bit).
fn json_margin(out: &str, id: &str) -> Option<f64> {
    let at = out.find(&format!("\"id\":\"{id}\""))?;
    let start = out[..at].rfind('{')?;
    let end = at + out[at..].find('}')?;
    let object = &out[start..end];
    let value = object.split("\"margin\":").nth(1)?;
    let value: String = value
        .chars()
        .take_while(|c| *c != ',' && *c != '}')
        .collect();
    if value == "null" {
        return None;
    }
    Some(
        value
            .parse()
            .unwrap_or_else(|e| panic!("margin {value:?}: {e}")),
    )
}

#[test]
fn map_csv_rows_equal_check_json_of_their_designs() {
    // Contract, map: columns exactly `x, y, limiting, limiting_margin, pass`, and each row
    // equals what `check --json` gives for that design (`limiting`, its `margin`, `pass`).
    let dir = tempfile::tempdir().expect("temporary directory");
    let base = Design::default();
    let file = write(&dir, "demo.ron", &base);
    let (code, out, err) = bowgrip(&[
        "map",
        text(&file),
        "--x",
        "strip.thickness_mm:0.15:0.4:6",
        "--y",
        "duty.holding_force_n:10:200:4",
        "--csv",
    ]);
    assert_eq!(code, Some(0), "{err}");
    let mut lines = out.lines();
    assert_eq!(lines.next(), Some("x,y,limiting,limiting_margin,pass"));
    let rows: Vec<Vec<&str>> = lines.map(|l| l.split(',').collect()).collect();
    assert_eq!(rows.len(), 24);
    let mut verdicts = Vec::new();
    // Corners and inner cells (row 2 is the demo thickness at half its load), through
    // `check --json`.
    for k in [0, 2, 5, 9, 14, 23] {
        let row = &rows[k];
        assert_eq!(row.len(), 5, "{row:?}");
        let mut d = base.clone();
        d.strip.thickness_mm = row[0].parse().expect("x");
        d.duty.holding_force_n = row[1].parse().expect("y");
        let cell_file = write(&dir, &format!("cell{k}.ron"), &d);
        let (code, out, err) = bowgrip(&["check", text(&cell_file), "--json"]);
        let v: serde_json::Value =
            serde_json::from_str(&out).unwrap_or_else(|e| panic!("{e}: {err}"));
        let pass = v["pass"].as_bool().expect("pass");
        assert_eq!(code, Some(if pass { 0 } else { 1 }));
        let limiting = v["limiting"].as_str().unwrap_or("");
        assert_eq!(row[2], limiting, "row {k}");
        let margin = json_margin(&out, limiting);
        let csv_margin = (!row[3].is_empty()).then(|| row[3].parse::<f64>().expect("margin"));
        assert_eq!(
            csv_margin.map(f64::to_bits),
            margin.map(f64::to_bits),
            "row {k}"
        );
        assert_eq!(row[4], pass.to_string(), "row {k}");
        verdicts.push(pass);
    }
    assert!(
        verdicts.contains(&true) && verdicts.contains(&false),
        "{verdicts:?}"
    );
}

#[test]
fn map_json_and_table_carry_the_axes() {
    let file = sample("duct-anchor-150mm-stainless.ron");
    let args = |extra: &[&'static str]| {
        let mut a = vec![
            "map",
            text(&file),
            "--x",
            "friction:0.1:0.5:5",
            "--y",
            "strip.count:6:12:7",
        ];
        a.extend_from_slice(extra);
        a.into_iter().map(str::to_string).collect::<Vec<String>>()
    };
    let (code, out, err) = bowgrip(
        &args(&["--json"])
            .iter()
            .map(String::as_str)
            .collect::<Vec<_>>(),
    );
    assert_eq!(code, Some(0), "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(v["x"]["field"], "friction");
    assert_eq!(v["y"]["values"].as_array().map(Vec::len), Some(7));
    let cells = v["cells"].as_array().expect("cells");
    assert_eq!(cells.len(), 35);
    for key in ["x", "y", "limiting", "limiting_margin", "pass", "margins"] {
        assert!(cells[0].get(key).is_some(), "{key} missing in {}", cells[0]);
    }
    let (code, out, err) = bowgrip(&args(&[]).iter().map(String::as_str).collect::<Vec<_>>());
    assert_eq!(code, Some(0), "{err}");
    assert!(out.contains("x: friction from 0.1 to 0.5"), "{out}");
    assert!(out.contains("Caution"), "{out}");
    assert_eq!(
        out.lines().filter(|l| l.contains(" | ")).count(),
        7,
        "{out}"
    );
}

#[test]
fn map_refusals_exit_2_with_one_line() {
    // README: bad input exits 2 with one line on stderr saying what and the allowed range.
    let file = sample("duct-anchor-150mm-stainless.ron");
    let f = text(&file);
    for (x, needles) in [
        (
            "strip.thick:0.1:0.2:3",
            &[
                "strip.thick",
                "allowed",
                "strip.thickness_mm",
                "strip.count",
            ][..],
        ),
        (
            "strip.thickness_mm:0.01:0.3:3",
            &["strip.thickness_mm", "0.02 to 5 mm"][..],
        ),
        ("strip.thickness_mm:0.1:0.3:500", &["500", "1 to 200"][..]),
        ("strip.thickness_mm:0.1:0.3", &["FIELD:FROM:TO:N"][..]),
        ("strip.count:2.5:9:3", &["whole"][..]),
    ] {
        let (code, out, err) = bowgrip(&["map", f, "--x", x, "--y", "friction:0.2:0.4:3", "--csv"]);
        assert_eq!(code, Some(2), "{x}: {err}");
        assert!(out.is_empty(), "{x}: {out}");
        assert_eq!(err.lines().count(), 1, "{x}: {err}");
        for n in needles {
            assert!(err.contains(n), "{x}: {err:?} lacks {n:?}");
        }
    }
}

// ---------------------------------------------------------------------------------------
// The sheet's map page.

#[test]
fn the_sheet_has_a_map_page_when_asked() {
    // Issue #15: an optional sheet page with the map of two chosen inputs. The page is the
    // map module's map (held equal to `check` above): its count of passing designs is the
    // map's, and every line of it lies inside the printable area.
    use bowgrip::sheet::{self, Paper, SheetOptions};
    let design = Design::default();
    let (x, y) = (
        axis("strip.thickness_mm:0.15:0.35:9"),
        axis("strip.count:6:14:9"),
    );
    let map = MapSpec::new(&design, &x, &y)
        .and_then(|s| s.compute_all())
        .unwrap_or_else(|e| panic!("{e}"));
    let passing = map.cells().filter(|c| c.pass).count();
    let options = SheetOptions {
        map: Some((x.clone(), y.clone())),
        ..SheetOptions::default()
    };
    for paper in [Paper::A4, Paper::Letter] {
        let plain = sheet::layout_dated(&design, "demo.ron", b"demo", paper, "2026-01-01")
            .unwrap_or_else(|e| panic!("{e}"));
        let laid = sheet::layout_with(
            &design,
            "demo.ron",
            b"demo",
            paper,
            "2026-01-01",
            None,
            &options,
        )
        .unwrap_or_else(|e| panic!("{e}"));
        let title = "Design map: strip.count against strip.thickness_mm";
        assert!(!plain.sections.iter().any(|s| s.title == title));
        let Some(page) = laid.sections.iter().find(|s| s.title == title) else {
            panic!("no map section on {paper:?}");
        };
        // Before the closing sections, which stay last.
        assert_eq!(
            laid.sections.last().map(|s| s.title.as_str()),
            Some("Safety cautions")
        );
        let texts: Vec<&str> = laid
            .texts
            .iter()
            .filter(|t| t.page == page.page)
            .map(|t| t.text.as_str())
            .collect();
        let count = format!("Every check passes in {passing} of 81 designs");
        assert!(texts.iter().any(|t| t.starts_with(&count)), "{texts:?}");
        assert!(texts.contains(&"hold"), "the legend names the checks");
        let [left, top, right, bottom] = laid.printable_pt;
        for t in laid.texts.iter().filter(|t| t.page == page.page) {
            assert!(
                t.left_pt >= left - 0.5 && t.right_pt <= right + 0.5,
                "{:?} runs outside the page width",
                t.text
            );
            assert!(
                t.baseline_pt >= top && t.baseline_pt <= bottom,
                "{:?}",
                t.text
            );
        }
        for (p, b) in laid.drawing_extents() {
            if p == page.page {
                assert!(
                    b[0] >= left - 0.5
                        && b[2] <= right + 0.5
                        && b[1] >= top - 0.5
                        && b[3] <= bottom + 0.5,
                    "a mark {b:?} leaves the printable area"
                );
            }
        }
    }
}

#[test]
fn sheet_map_options_write_the_page_and_refuse_bad_axes() {
    // README: bad input exits 2 with one line naming what is allowed; a good pair of axes
    // writes a PDF.
    let dir = TempDir::new().expect("temp dir");
    let file = write(&dir, "demo.ron", &Design::default());
    let pdf = dir.path().join("demo.pdf");
    let (code, _, err) = bowgrip(&[
        "sheet",
        text(&file),
        "-o",
        text(&pdf),
        "--map-x",
        "strip.thickness_mm:0.2:0.3:5",
        "--map-y",
        "friction:0.2:0.4:5",
    ]);
    assert_eq!(code, Some(0), "{err}");
    let bytes = std::fs::read(&pdf).expect("the sheet is written");
    assert!(bytes.starts_with(b"%PDF"));
    let (code, _, err) = bowgrip(&[
        "sheet",
        text(&file),
        "-o",
        text(&dir.path().join("bad.pdf")),
        "--map-x",
        "strip.thick:0.2:0.3:5",
        "--map-y",
        "friction:0.2:0.4:5",
    ]);
    assert_eq!(code, Some(2), "{err}");
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(err.contains("strip.thickness_mm"), "{err}");
    assert!(!dir.path().join("bad.pdf").exists());
    // One axis alone is refused by the command line.
    let (code, _, err) = bowgrip(&[
        "sheet",
        text(&file),
        "-o",
        text(&pdf),
        "--map-x",
        "strip.thickness_mm:0.2:0.3:5",
    ]);
    assert_eq!(code, Some(2), "{err}");
    assert!(err.contains("--map-y"), "{err}");
}
