//! The sheet's sections, each built as measured blocks at the content width: title block,
//! result summary, inputs, material and stiffness model, results at the three bores,
//! checks, the two plots, the side and end views, the model's assumptions and limits,
//! references and safety cautions. Numbers go through `format` only.

use super::draw::{Block, GREEN, GREY, INK, LIGHT, RED, Rgb, wrap, wrap_raw};
use super::font::Weight;
use super::format::{self as f, NONE};
use super::{Section, SheetMeta, fit, fit_start, plots, views};
use crate::analysis::{Analysis, BoreCase, BoreResult};
use crate::checks::{self, Check};
use crate::design::{Actuator, MaterialChoice, Stiffness};
use crate::elastica::Phase;
use crate::quantities::{STATE_FIELDS, UsableStroke};
use crate::segment::SegmentState;

/// Replaced by the page count once pagination knows it.
#[path = "strips.rs"]
mod strips;

pub const PAGE_COUNT_SLOT: &str = "\u{1}N\u{1}";

pub(super) const BODY: f32 = 8.5;
pub(super) const SMALL: f32 = 7.5;
const LEAD: f32 = 1.25;

pub(super) const BLUE: Rgb = (20, 70, 170);
pub(super) const ORANGE: Rgb = (210, 110, 0);
pub(super) const PURPLE: Rgb = (120, 40, 140);
pub(super) const BAND: Rgb = (215, 228, 245);
pub(super) const SHADE: Rgb = (238, 238, 238);
const WARN: Rgb = (255, 236, 200);
pub(super) const NO_FIT: Rgb = (248, 215, 215);

/// Builds every section.
pub fn build(a: &Analysis, meta: &SheetMeta, width: f32) -> Vec<Section> {
    let mut out = vec![
        title_block(a, meta, width),
        summary(a, width),
        inputs(a, width),
        check_table(a, width),
        material(a, width),
        bore_results(a, width),
        plots::window_plot(a, width),
        views::views(a, meta, width),
        plots::curve_plots(a, width),
    ];
    out.extend(strips::strips_section(a, width));
    out.extend(text_sections(width));
    out
}

fn heading(title: &str, width: f32) -> Block {
    let mut b = Block::new();
    b.text(0.0, 11.0, 11.0, Weight::Bold, title);
    b.line([0.0, 15.0], [width, 15.0], 0.8, INK);
    b.height = 22.0;
    b
}

pub(super) fn section(title: &str, width: f32, body: Vec<Block>) -> Section {
    let mut blocks = body;
    if let Some(first) = blocks.first_mut() {
        let h = heading(title, width);
        let mut joined = h.clone();
        joined.append(first, 0.0, h.height);
        joined.height = h.height + first.height;
        *first = joined;
    } else {
        blocks.push(heading(title, width));
    }
    Section {
        title: title.to_string(),
        blocks,
    }
}

/// A table column.
struct Col {
    width: f32,
    right: bool,
}

fn col(width: f32) -> Col {
    Col {
        width,
        right: false,
    }
}

fn rcol(width: f32) -> Col {
    Col { width, right: true }
}

/// A table row.
#[derive(Default)]
struct Row {
    cells: Vec<String>,
    bold: bool,
    shade: Option<Rgb>,
    colors: Vec<Option<Rgb>>,
}

fn row<S: Into<String>>(cells: impl IntoIterator<Item = S>) -> Row {
    Row {
        cells: cells.into_iter().map(Into::into).collect(),
        ..Row::default()
    }
}

/// A table with wrapped cells and a bold header row; `header` may be empty.
fn table(header: &[&str], cols: &[Col], rows: &[Row], size: f32) -> Block {
    let mut b = Block::new();
    let pad = 3.0;
    let lead = LEAD * size;
    let total: f32 = cols.iter().map(|c| c.width).sum();
    let mut y = 0.0;
    let draw_row = |b: &mut Block,
                    cells: &[String],
                    bold: bool,
                    shade: Option<Rgb>,
                    colors: &[Option<Rgb>],
                    y: &mut f32| {
        let weight = if bold { Weight::Bold } else { Weight::Regular };
        let wrapped: Vec<Vec<String>> = cols
            .iter()
            .enumerate()
            .map(|(i, c)| {
                wrap(
                    cells.get(i).map_or("", String::as_str),
                    c.width - 2.0 * pad,
                    size,
                    weight,
                )
            })
            .collect();
        let lines = wrapped.iter().map(Vec::len).max().unwrap_or(1).max(1);
        let h = lines as f32 * lead + 2.0 * pad - 1.0;
        if let Some(s) = shade {
            b.fill_rect(0.0, *y, total, h, s);
        }
        let mut x = 0.0;
        for (i, (c, ls)) in cols.iter().zip(&wrapped).enumerate() {
            let color = colors.get(i).copied().flatten().unwrap_or(INK);
            for (j, l) in ls.iter().enumerate() {
                let base = *y + pad + size * 0.9 + j as f32 * lead;
                let (at, anchor) = if c.right {
                    (x + c.width - pad, 1.0)
                } else {
                    (x + pad, 0.0)
                };
                b.text_anchored(at, anchor, base, size, weight, color, l.clone());
            }
            x += c.width;
        }
        *y += h;
        b.line([0.0, *y], [total, *y], 0.3, LIGHT);
    };
    if !header.is_empty() {
        let cells: Vec<String> = header.iter().map(|s| s.to_string()).collect();
        draw_row(&mut b, &cells, true, None, &[], &mut y);
        b.line([0.0, y], [total, y], 0.6, INK);
    }
    for r in rows {
        draw_row(&mut b, &r.cells, r.bold, r.shade, &r.colors, &mut y);
    }
    b.height = y + 2.0;
    b
}

/// A sub-heading inside a section.
fn subhead(b: &mut Block, y: &mut f32, text: &str) {
    *y += 4.0;
    b.text(0.0, *y + 9.0, 9.0, Weight::Bold, text);
    *y += 13.0;
}

fn title_block(a: &Analysis, meta: &SheetMeta, width: f32) -> Section {
    let mut b = Block::new();
    let d = &a.segment.design;
    b.text_in(
        6.0,
        12.0,
        8.0,
        Weight::Bold,
        GREY,
        "SIZING CALCULATION  ·  BOWED-STRIP EXPANDING SEGMENT",
    );
    let title = if d.title.trim().is_empty() {
        "(untitled design)".to_string()
    } else {
        d.title.trim().to_string()
    };
    let mut y = 28.0;
    for line in wrap_raw(&title, width - 12.0, 14.0, Weight::Bold)
        .into_iter()
        .take(3)
    {
        b.text_raw(6.0, y, 14.0, Weight::Bold, INK, line);
        y += 17.0;
    }
    y -= 6.0;
    b.line([0.0, y], [width, y], 0.6, INK);
    let half = 0.5 * width;
    let fields = [
        (
            "Design file",
            meta.file_label.clone(),
            "SHA-256 of the file (first 16 hex digits)",
            meta.hash16.clone(),
        ),
        (
            "Program",
            format!("bowgrip {}", meta.version),
            "Printed (UTC)",
            meta.date.clone(),
        ),
        (
            "Paper",
            meta.paper.name().to_string(),
            "Sheet",
            format!("1 of {PAGE_COUNT_SLOT}"),
        ),
    ];
    for (l1, v1, l2, v2) in fields {
        b.text_in(6.0, y + 9.0, 6.5, Weight::Regular, GREY, l1);
        // A long path loses its leading folders, never the file name.
        b.text_raw(
            6.0,
            y + 20.0,
            9.0,
            Weight::Bold,
            INK,
            fit_start(&v1, half - 12.0, 9.0, Weight::Bold),
        );
        b.text_in(half + 6.0, y + 9.0, 6.5, Weight::Regular, GREY, l2);
        b.text(
            half + 6.0,
            y + 20.0,
            9.0,
            Weight::Bold,
            fit(&v2, half - 12.0, 9.0, Weight::Bold),
        );
        b.line([half, y], [half, y + 25.0], 0.4, INK);
        y += 25.0;
        b.line([0.0, y], [width, y], 0.4, INK);
    }
    // Sign-off boxes.
    let cols = [0.22, 0.30, 0.30, 0.18].map(|f| f * width);
    let heads = ["", "Name", "Signature", "Date"];
    let mut x = 0.0;
    for (c, h) in cols.iter().zip(heads) {
        b.text_in(x + 6.0, y + 9.0, 6.5, Weight::Regular, GREY, h);
        x += c;
    }
    y += 12.0;
    for role in ["Calculated by", "Checked by", "Approved by"] {
        b.line([0.0, y], [width, y], 0.4, INK);
        b.text(6.0, y + 15.0, 9.0, Weight::Bold, role);
        y += 24.0;
    }
    let mut x = 0.0;
    for c in &cols[..3] {
        x += c;
        b.line([x, y - 72.0 - 12.0], [x, y], 0.4, INK);
    }
    b.rect(0.0, 0.0, width, y, 1.0, INK);
    b.height = y;
    Section {
        title: "Title block".to_string(),
        blocks: vec![b],
    }
}

pub(super) fn state_of(r: &BoreResult) -> Option<&SegmentState> {
    r.operating.as_ref().ok()
}

fn summary(a: &Analysis, width: f32) -> Section {
    let mut b = Block::new();
    let failed = a.checks.iter().filter(|c| !c.pass).count();
    let n = a.checks.len();
    let (text, color) = if failed == 0 {
        (format!("ALL {n} CHECKS PASS"), GREEN)
    } else {
        (
            format!("{failed} OF {n} CHECKS FAIL: THE DESIGN IS NOT ACCEPTABLE AS ENTERED"),
            RED,
        )
    };
    b.fill_rect(
        0.0,
        0.0,
        width,
        20.0,
        if failed == 0 { SHADE } else { WARN },
    );
    b.text_in(6.0, 14.0, 11.0, Weight::Bold, color, text);
    let mut y = 32.0;
    if let Some(i) = a.limiting
        && let Some(c) = a.checks.get(i)
    {
        let m = margin_text(c);
        y = b.paragraph(
            0.0,
            y,
            width,
            BODY,
            Weight::Regular,
            INK,
            &format!(
                "Limiting check: {} [{}], {}, margin {m}. Reason: {}.",
                c.title(),
                c.id,
                if c.pass { "passes" } else { "fails" },
                c.reason
            ),
        );
    }
    for r in &a.bores {
        if let Err(e) = &r.operating {
            y = b.paragraph(
                0.0,
                y,
                width,
                BODY,
                Weight::Bold,
                RED,
                &format!(
                    "No model state at the {} bore ({}): {e}.",
                    r.case.label(),
                    f::mm(r.bore_mm)
                ),
            ) + 2.0;
        } else if let Some(s) = state_of(r)
            && !s.phase.has_state()
        {
            let why = s.reason.clone().unwrap_or_default();
            let verb = if s.phase == Phase::SolveFailed {
                "gives no state:"
            } else {
                "is"
            };
            y = b.paragraph(
                0.0,
                y,
                width,
                BODY,
                Weight::Bold,
                RED,
                &format!(
                    "At the {} bore ({}) the operating stroke {verb} {why}.",
                    r.case.label(),
                    f::mm(r.bore_mm)
                ),
            ) + 2.0;
        }
    }
    for c in &a.cautions {
        y = b.paragraph(
            0.0,
            y,
            width,
            BODY,
            Weight::Bold,
            RED,
            &format!("Geometry caution: {c}."),
        ) + 2.0;
    }
    let d = &a.segment.design;
    if let Some(s) = a.bore(BoreCase::Nominal).and_then(state_of)
        && let (Some(h), Some(p)) = (s.holding_force_n, s.actuator_force_n)
    {
        let req = a.segment.required_holding_force_n();
        let act = s.actuator.map_or(String::new(), |r| {
            format!(", actuator effort {}", f::in_unit(r.effort, r.effort_unit))
        });
        y = b.paragraph(
            0.0,
            y,
            width,
            BODY,
            Weight::Regular,
            INK,
            &format!(
                "At the operating stroke {} in the nominal bore {}: {}, holding force {} against {} required ({} x safety factor {}), actuator pull {}{act}.",
                f::mm(s.stroke_mm),
                f::mm(a.segment.bore_nominal_mm),
                s.phase,
                f::newton(h),
                f::newton(req),
                f::newton(d.duty.holding_force_n),
                f::factor(d.duty.safety_factor),
                f::newton(p)
            ),
        );
    }
    if let Some(u) = a.usable_stroke() {
        let usable = !u.is_problem();
        y = b.paragraph(
            0.0,
            y + 2.0,
            width,
            BODY,
            if usable {
                Weight::Regular
            } else {
                Weight::Bold
            },
            if usable { INK } else { RED },
            &usable_text(&u),
        );
    }
    b.height = y - 4.0;
    section("Result", width, vec![b])
}

/// The usable stroke range in a sentence, with the sheet's number style.
pub(super) fn usable_text(u: &UsableStroke) -> String {
    cap(&format!("{}.", u.describe()))
}

/// A check's margin as [`Check::margin_text`] writes it, with the sheet's true minus sign.
fn margin_text(c: &Check) -> String {
    c.margin_text_in(f::units())
        .map_or_else(|| NONE.to_string(), |m| m.replace('-', "−"))
}

/// A two-column label/value list.
fn kv(rows: &[(String, String)], width: f32) -> Block {
    let lw = 0.5 * width;
    let rows: Vec<Row> = rows
        .iter()
        .map(|(k, v)| row([k.clone(), v.clone()]))
        .collect();
    table(&[], &[col(lw), rcol(width - lw)], &rows, BODY)
}

fn pair(k: &str, v: String) -> (String, String) {
    (k.to_string(), v)
}

fn inputs(a: &Analysis, width: f32) -> Section {
    let seg = &a.segment;
    let d = &seg.design;
    let s = &d.strip;
    let cw = 0.5 * width - 8.0;
    let mut left = Block::new();
    let mut y = 0.0;
    let group = |b: &mut Block, y: &mut f32, title: &str, rows: Vec<(String, String)>| {
        subhead(b, y, title);
        let t = kv(&rows, cw);
        b.append(&t, 0.0, *y);
        *y += t.height;
    };
    let grade = match &s.material {
        MaterialChoice::Grade(id) => format!("{id} (library)"),
        MaterialChoice::Custom { name, .. } => format!("{name} (custom entry)"),
    };
    let stiffness = match s.stiffness {
        Stiffness::Auto => "auto",
        Stiffness::Beam => "beam",
        Stiffness::Plate => "plate",
    };
    group(
        &mut left,
        &mut y,
        "Strips",
        vec![
            pair("Strip count N", s.count.to_string()),
            pair("Free length L", f::file_mm(s.free_length_mm)),
            pair("Width b", f::file_mm(s.width_mm)),
            pair("Thickness t", f::file_mm(s.thickness_mm)),
            pair("Grade", grade),
            pair("End fixity", s.ends.name().to_string()),
            pair("Stiffness setting", stiffness.to_string()),
        ],
    );
    group(
        &mut left,
        &mut y,
        "Hub and end plates",
        vec![
            pair(
                "Mount radius r_m (strip centreline)",
                f::file_mm(d.mount_radius_mm),
            ),
            pair("End-plate diameter", f::file_mm(d.end_plate_diameter_mm)),
        ],
    );
    let mut bore_rows = Vec::new();
    if let Some(p) = &d.bore.pipe {
        bore_rows.push(pair(
            "Pipe (ASME B36.10M)",
            format!("NPS {} schedule {}", p.nps, p.schedule),
        ));
        if let Some(size) = crate::pipe::find(&p.nps, &p.schedule) {
            bore_rows.push(pair("Outside diameter", f::mm(size.outside_diameter_mm)));
            bore_rows.push(pair("Nominal wall", f::mm(size.wall_mm)));
        }
        bore_rows.push(pair(
            "Nominal bore (OD - 2 x wall)",
            f::mm(seg.bore_nominal_mm),
        ));
    } else {
        bore_rows.push(pair("Nominal bore D", f::file_mm(seg.bore_nominal_mm)));
    }
    bore_rows.push(pair(
        "Tolerance minus / plus",
        format!(
            "{} / {}",
            f::file_mm(d.bore.minus_mm),
            f::file_mm(d.bore.plus_mm)
        ),
    ));
    bore_rows.push(pair(
        "Smallest / largest bore",
        format!(
            "{} / {}",
            f::mm(seg.bore_smallest_mm),
            f::mm(seg.bore_largest_mm)
        ),
    ));
    // The load-sharing inputs, when the design gives them (otherwise the rows stay out, so
    // designs without them print as before).
    if d.bore.out_of_round_mm > 0.0 {
        bore_rows.push(pair(
            "Out of round (largest - smallest diameter)",
            f::file_mm(d.bore.out_of_round_mm),
        ));
    }
    if let Some(bend) = d.bore.bend {
        bore_rows.push(pair("Bend to pass", bend.name()));
    }
    if d.end_plate_thickness_mm > 0.0 {
        bore_rows.push(pair(
            "End-plate thickness (each)",
            f::file_mm(d.end_plate_thickness_mm),
        ));
    }
    group(&mut left, &mut y, "Bore", bore_rows);
    left.height = y;

    let mut right = Block::new();
    let mut y = 0.0;
    group(
        &mut right,
        &mut y,
        "Friction",
        vec![pair(
            "Static friction coefficient μ (strip on wall)",
            f::factor(d.friction),
        )],
    );
    let act = match &d.actuator {
        Actuator::Direct {
            max_force_n,
            max_stroke_mm,
            ..
        } => vec![
            pair("Kind", "direct pull on the plates".to_string()),
            pair("Maximum force", f::file_newton(*max_force_n)),
            pair("Maximum stroke", f::file_mm(*max_stroke_mm)),
        ],
        Actuator::Spool {
            radius_mm,
            max_torque_nm,
            max_angle_deg,
            ..
        } => vec![
            pair("Kind", "cord on a spool".to_string()),
            pair("Spool radius r_s", f::file_mm(*radius_mm)),
            pair(
                "Maximum torque",
                f::from_file(*max_torque_nm, "N m", f::in_unit(*max_torque_nm, "N m")),
            ),
            pair("Maximum angle", f::in_unit(*max_angle_deg, "deg")),
            pair("Maximum stroke (r_s x angle)", f::mm(seg.max_stroke_mm())),
            pair("Maximum pull (torque / r_s)", f::newton(seg.max_pull_n())),
        ],
        Actuator::LeadScrew {
            lead_mm,
            efficiency,
            max_torque_nm,
            max_turns,
            ..
        } => vec![
            pair("Kind", "lead screw and nut".to_string()),
            pair("Lead", f::file_mm(*lead_mm)),
            pair("Screw efficiency", f::factor(*efficiency)),
            pair(
                "Maximum torque",
                f::from_file(*max_torque_nm, "N m", f::in_unit(*max_torque_nm, "N m")),
            ),
            pair("Maximum turns", f::in_unit(*max_turns, "turns")),
            pair("Maximum stroke (lead x turns)", f::mm(seg.max_stroke_mm())),
            pair(
                "Maximum pull (2π eff torque / lead)",
                f::newton(seg.max_pull_n()),
            ),
        ],
    };
    group(&mut right, &mut y, "Actuator", act);
    let mut duty = super::operating::input_pairs(a);
    duty.extend([
        pair(
            "Holding force to resist",
            f::file_newton(d.duty.holding_force_n),
        ),
        pair("Safety factor on holding", f::factor(d.duty.safety_factor)),
        pair(
            "Required holding force",
            f::newton(a.segment.required_holding_force_n()),
        ),
        pair("Grip-release cycles", f::count(d.duty.cycles)),
    ]);
    if d.duty.radial_load_n > 0.0 {
        duty.push(pair(
            "Radial load on the strips (straight down)",
            f::file_newton(d.duty.radial_load_n),
        ));
    }
    group(&mut right, &mut y, "Operating stroke and duty", duty);
    right.height = y;

    let mut b = Block::new();
    b.append(&left, 0.0, 0.0);
    b.append(&right, width - cw, 0.0);
    b.height = left.height.max(right.height);
    section("Inputs", width, vec![b])
}

fn material(a: &Analysis, width: f32) -> Section {
    let seg = &a.segment;
    let m = &seg.material;
    let src = &m.basis;
    let gpa = |v: f64| format!("{} GPa", f::sig(v, 4));
    let rows = vec![
        row([
            "Young's modulus E".to_string(),
            gpa(m.youngs_modulus_gpa),
            src.modulus.clone(),
        ]),
        row([
            "Poisson's ratio ν".to_string(),
            f::factor(m.poisson_ratio),
            src.poisson.clone(),
        ]),
        row([
            "Tensile strength Su".to_string(),
            f::mpa(m.tensile_strength_mpa),
            src.tensile.clone(),
        ]),
        row([
            "Yield strength Sy".to_string(),
            f::mpa(m.yield_strength_mpa),
            src.yield_strength.clone(),
        ]),
        row([
            "Endurance strength Se (10^6 cycles)".to_string(),
            f::mpa(m.endurance_limit_mpa),
            src.endurance.clone(),
        ]),
    ];
    let mut b = Block::new();
    let mut y = 0.0;
    y = b.paragraph(
        0.0,
        y + 9.0,
        width,
        BODY,
        Weight::Bold,
        INK,
        &format!("{} ({})", m.name, m.id),
    ) - 6.0;
    let t = table(
        &["Property", "Value", "Basis (confirm before release)"],
        &[col(0.27 * width), rcol(0.13 * width), col(0.60 * width)],
        &rows,
        SMALL,
    );
    b.append(&t, 0.0, y + 2.0);
    y += t.height + 4.0;
    if !m.note.trim().is_empty() {
        y = b.paragraph(
            0.0,
            y + 8.0,
            width,
            SMALL,
            Weight::Regular,
            GREY,
            &format!("Note: {}", m.note),
        ) - 4.0;
    }
    let b_nmm2 = seg.bending_stiffness_nm2 * 1e6;
    let cycles = f::count(seg.design.duty.cycles);
    let model = vec![
        pair(
            "Stiffness model used",
            seg.stiffness_used.name().to_string(),
        ),
        pair("Why", seg.stiffness_reason.clone()),
        pair("Bending modulus E'", gpa(seg.modulus_pa * 1e-9)),
        pair(
            "Bending stiffness B = E' b t³/12",
            f::bending_stiffness(b_nmm2),
        ),
        pair(
            "Static allowable 0.75 Su (common practice)",
            f::mpa(seg.static_allowable_mpa),
        ),
        pair(
            &format!("Fatigue strength at {cycles} cycles (Shigley S-N)"),
            f::mpa(seg.fatigue_strength_mpa),
        ),
        pair(
            "Peak stress at Goodman factor 1, zero-to-peak",
            f::mpa(seg.fatigue_allowable_mpa),
        ),
    ];
    let t = kv(&model, width);
    subhead(&mut b, &mut y, "Stiffness model and allowables");
    b.append(&t, 0.0, y);
    b.height = y + t.height;
    section("Material and stiffness model", width, vec![b])
}

fn bore_results(a: &Analysis, width: f32) -> Section {
    let seg = &a.segment;
    let cases: Vec<&BoreResult> = BoreCase::ALL.iter().filter_map(|c| a.bore(*c)).collect();
    let mut rows = Vec::new();
    let per = |name: &str, get: &dyn Fn(&BoreResult) -> String| {
        let mut cells = vec![name.to_string()];
        cells.extend(cases.iter().map(|r| get(r)));
        row(cells)
    };
    let gap = |r: &BoreResult| f::mm(seg.gap_mm(r.bore_mm));
    rows.push(per("Bore diameter", &|r| f::mm(r.bore_mm)));
    rows.push(per("Gap to the wall g (relaxed, edge contact)", &gap));
    rows.push(per("First-contact stroke", &|r| {
        f::mm_opt(r.row.first_contact_stroke_mm)
    }));
    rows.push(per("Stroke to reach the required holding force", &|r| {
        f::mm_opt(r.row.holding_stroke_mm)
    }));
    rows.push(per("Stroke where a stress factor falls to 1", &|r| {
        f::mm_opt(r.row.stress_limit_stroke_mm)
    }));
    rows.push(per("Line-contact onset stroke", &|r| {
        f::mm_opt(r.row.line_contact_stroke_mm)
    }));
    rows.push(per("Model limit stroke", &|r| {
        f::mm_opt(r.row.limit_stroke_mm)
    }));
    rows.push(per("Limit reason", &|r| match &r.operating {
        Ok(s) => s.limit_reason.to_string(),
        Err(_) => NONE.to_string(),
    }));
    let mut band = row([super::operating::band_title(a)]);
    band.bold = true;
    band.shade = Some(SHADE);
    rows.push(band);
    if let Some(first) = cases.first() {
        for (i, (name, _)) in super::operating::bore_rows(a, first).iter().enumerate() {
            rows.push(per(name, &|r| {
                super::operating::bore_rows(a, r)
                    .get(i)
                    .map_or_else(String::new, |c| c.1.clone())
            }));
        }
    }
    let mut phase = per("Phase", &|r| match &r.operating {
        Ok(s) => s.phase.to_string(),
        Err(_) => "no state".to_string(),
    });
    phase.colors = std::iter::once(None)
        .chain(cases.iter().map(|c| c.in_model().is_none().then_some(RED)))
        .collect();
    rows.push(phase);
    // A state quantity in each bore: its value, or in red why the model has none there.
    let state_row = |name: &str, get: &dyn Fn(&SegmentState) -> String| {
        let mut r = row(
            std::iter::once(name.to_string()).chain(cases.iter().map(|c| match &c.operating {
                Ok(s) if s.phase.has_state() => get(s),
                Ok(s) => s.phase.name().replace('-', " "),
                Err(_) => "no state".to_string(),
            })),
        );
        r.colors = std::iter::once(None)
            .chain(cases.iter().map(|c| c.in_model().is_none().then_some(RED)))
            .collect();
        r
    };
    for field in &STATE_FIELDS {
        let value = |s: &SegmentState| {
            (field.get)(s).map_or(NONE.to_string(), |v| match field.unit {
                "N" => f::newton(v),
                "mm" => f::mm(v),
                "MPa" => f::mpa(v),
                "J" => format!("{} J", f::sig(v, 3)),
                _ => f::factor(v),
            })
        };
        rows.push(state_row(field.sheet_label, &value));
    }
    if !matches!(seg.design.actuator, Actuator::Direct { .. }) {
        rows.push(state_row("Actuator position", &|s| {
            s.actuator.map_or(NONE.to_string(), |r| {
                f::in_unit(r.position, r.position_unit)
            })
        }));
        rows.push(state_row("Actuator torque", &|s| {
            s.actuator
                .map_or(NONE.to_string(), |r| f::in_unit(r.effort, r.effort_unit))
        }));
    }
    let lw = 0.37 * width;
    let vw = (width - lw) / 3.0;
    let heads: Vec<String> = std::iter::once("Quantity".to_string())
        .chain(cases.iter().map(|r| format!("{} bore", r.case.label())))
        .collect();
    let head_refs: Vec<&str> = heads.iter().map(String::as_str).collect();
    let t = table(
        &head_refs,
        &[col(lw), rcol(vw), rcol(vw), rcol(vw)],
        &rows,
        BODY,
    );
    let mut b = Block::new();
    b.append(&t, 0.0, 0.0);
    let mut y = t.height + 10.0;
    let mut notes: Vec<String> = Vec::new();
    for r in &cases {
        match &r.operating {
            Ok(s) => {
                notes.push(format!(
                    "{} bore: the model stops at {} because the {}.",
                    cap(r.case.label()),
                    f::mm(s.limit_stroke_mm),
                    s.limit_reason.describe()
                ));
            }
            Err(e) => notes.push(format!("{} bore: no state. {e}.", cap(r.case.label()))),
        }
    }
    for n in notes {
        y = b.paragraph(0.0, y, width, SMALL, Weight::Regular, INK, &n);
    }
    y = b.paragraph(
        0.0,
        y + 2.0,
        width,
        SMALL,
        Weight::Regular,
        GREY,
        "Forces are totals for the segment unless marked per strip. A dash: the quantity does not exist (bore out of reach, no line contact on the path, or no state).",
    );
    b.height = y - 6.0;
    section(
        "Results at the smallest, nominal and largest bore",
        width,
        vec![b],
    )
}

fn cap(s: &str) -> String {
    let mut c = s.chars();
    c.next().map_or_else(String::new, |first| {
        first.to_uppercase().collect::<String>() + c.as_str()
    })
}

fn check_table(a: &Analysis, width: f32) -> Section {
    let cols = [
        col(0.035 * width),
        col(0.2 * width),
        col(0.15 * width),
        rcol(0.13 * width),
        col(0.1 * width),
        col(0.385 * width),
    ];
    let mut rows = Vec::new();
    for (i, c) in a.checks.iter().enumerate() {
        let at = match (c.bore_mm, c.stroke_mm) {
            (Some(b), Some(s)) => format!("bore {} stroke {}", f::mm(b), f::mm(s)),
            (Some(b), None) => format!("bore {}", f::mm(b)),
            // Only the hub check has no bore: it is plane geometry at rest.
            (None, Some(s)) => format!("on the hub, stroke {}", f::mm(s)),
            (None, None) => NONE.to_string(),
        };
        let limiting = a.limiting == Some(i);
        let verdict = match (c.pass, limiting) {
            (true, false) => "PASS".to_string(),
            (false, false) => "FAIL".to_string(),
            (true, true) => "PASS (limiting)".to_string(),
            (false, true) => "FAIL (limiting)".to_string(),
        };
        let margin = margin_text(c);
        let mut r = row([
            (i + 1).to_string(),
            format!("{} [{}]", c.title(), c.id),
            at,
            margin,
            verdict,
            c.reason.clone(),
        ]);
        r.colors = vec![
            None,
            None,
            None,
            None,
            Some(if c.pass { GREEN } else { RED }),
            None,
        ];
        if limiting {
            r.shade = Some(SHADE);
            r.bold = true;
        }
        rows.push(r);
    }
    let t = table(
        &["#", "Check", "Judged at", "Margin", "Verdict", "Reason"],
        &cols,
        &rows,
        SMALL,
    );
    let mut b = Block::new();
    b.append(&t, 0.0, 0.0);
    let all = checks::all_pass(&a.checks);
    let y = b.paragraph(
        0.0,
        t.height + 8.0,
        width,
        SMALL,
        Weight::Regular,
        GREY,
        &format!(
            "Margins are in the check's own unit: {} for geometry, otherwise capacity over demand minus one, in per cent (+42.0 % is a capacity 1.42 times the demand). Positive passes. The limiting check (shaded) is the failing one with the least margin, or if all pass the passing ratio check with the least margin. Overall: {}.",
            f::units().length_words(),
            if all { "every check passes" } else { "at least one check fails" }
        ),
    );
    let mut y = y;
    if !a.cautions.is_empty() {
        y = b.paragraph(
            0.0,
            y,
            width,
            SMALL,
            Weight::Bold,
            RED,
            &format!(
                "Geometry cautions (beside the checks, which judge the model as stated): the model lets a strip pass through the end plates and through itself. {}.",
                a.cautions.iter().map(|c| cap(c)).collect::<Vec<_>>().join(". ")
            ),
        );
    }
    b.height = y - 6.0;
    section("Checks", width, vec![b])
}

const ASSUMPTIONS: [&str; 10] = [
    "Each strip is an inextensible Euler elastica in its own meridional plane: large rotations, small strains. Strips are straight at rest, identical, parallel to the axis at the plates, and share the load equally.",
    "Bending stiffness B = E' b t³/12 with E' = E for a narrow strip (beam) or E' = E/(1 − ν²) for a wide one (plate in cylindrical bending); automatic choice at b ≥ 10 t (common practice). The model used is stated in the material section.",
    "A strip flat across its width touches a round bore first with its two edges: the centreline gap is g = √(R² − b²/4) − t/2 − r_m, and the diameter over the strip corners at crest height h is 2 √((r_m + h + t/2)² + b²/4).",
    "Contact is frictionless as far as the shape goes; wall friction only sets the holding force μ N F (static coefficient times the total radial force). End fixity is clamped or hinged as entered.",
    "Phases along the stroke: free bowing, point contact at the crest, then line contact with a flat run on the wall. The closed-form elastica (incomplete elliptic integrals) is solved along the branch that is continuous from first contact.",
    "The model stops, and reports no state, at the first of: flat-run buckling (the flat run as a column under P, 4π²B/(L − 2l)² clamped, π²B/(L − 2l)² hinged), the flat run closing past the fold, the plates meeting, the axial force vanishing, the contact force peaking before line contact, or loss of the branch. Beyond it the strips may snap to another shape.",
    "Stress convention: σ = E' t κ_max/2 + P/(b t), the compression face at the point of peak curvature. Contact stresses, edge effects, residual stresses from forming and stress concentration at the clamps are not included.",
    "Static check: factor of safety 0.75 Su/σ (common practice for statically loaded flat springs).",
    "Fatigue check: zero-to-peak cycles on a Goodman line, n_f = 1/(σa/Sf + σm/Su) with σa = σm = σ/2; Sf is the endurance strength Se at 10^6 cycles and beyond, and below 10^6 a log-log line from 0.9 Su at 10^3 cycles (Shigley S-N approximation).",
    "Not modelled: wall deflection, bore ovality and roughness, temperature, corrosion, wear, dynamic loads, and anything outside the plausible ranges of the design file. Pipe bores use the nominal wall of ASME B36.10M; mill tolerances on wall thickness are not included and must be added to the bore tolerance by the designer.",
];

const REFERENCES: [&str; 7] = [
    "S. P. Timoshenko and J. M. Gere, Theory of Elastic Stability, 2nd ed., McGraw-Hill, 1961: the elastica (ch. 2), Euler loads, and beam-column theory (ch. 1).",
    "NIST Digital Library of Mathematical Functions, chapter 19: elliptic integrals (definitions and identities).",
    "B. C. Carlson, Numerical computation of real or complex elliptic integrals, Numerical Algorithms 10 (1995) 13-26: the symmetric integrals R_F and R_D used here.",
    "R. G. Budynas and J. K. Nisbett, Shigley's Mechanical Engineering Design: fatigue (S-N approximation, endurance estimate, Goodman line).",
    "ASME B36.10M, Welded and Seamless Wrought Steel Pipe: outside diameters and nominal walls by NPS and schedule.",
    "ASTM A666 (austenitic stainless strip, e.g. AISI 301 tempers) and ASTM A693 (precipitation-hardening stainless strip), as applicable to the grade entered.",
    "Material values are typical minimums of the named standard, typical handbook values or estimates, as the material section says beside each; confirm them against the mill certificate or a test before release.",
];

const SAFETY: [&str; 6] = [
    "Stored spring energy: bowed strips store elastic energy (see the results table). A strip that breaks, slips out of its clamp or snaps past the model's limit can release it suddenly. Wear eye protection; keep hands and faces out of line with the strips during assembly and tests.",
    "Snapping strips: do not operate beyond the model limit stroke; a strip past flat-run buckling can jump to a two-lobe shape and lose its grip at once.",
    "Pinch points: the end plates close by the stroke and the strips sweep outward; keep fingers clear of the plates and of the gap between strip and wall.",
    "In pipes and ducts: entry into or work on pipes brings confined-space and pressure hazards (stored pressure, flow, toxic or oxygen-poor atmosphere). Isolate, depressurise, vent and test before work, and follow the site's permit procedures.",
    "A holding device that slips can let equipment run away down a slope or a vertical pipe: provide an independent restraint where that matters.",
    "This sheet is a model calculation, not an approval. Confirm the design by test, and follow local codes, standards and licensed engineering practice; they take precedence over anything on this sheet.",
];

fn list_blocks(items: &[&str], width: f32, numbered: bool) -> Vec<Block> {
    items
        .iter()
        .enumerate()
        .map(|(i, t)| {
            let mut b = Block::new();
            let tag = if numbered {
                format!("{}.", i + 1)
            } else {
                "•".to_string()
            };
            b.text(0.0, BODY, BODY, Weight::Regular, tag);
            let y = b.paragraph(16.0, BODY, width - 16.0, BODY, Weight::Regular, INK, t);
            b.height = y - BODY * LEAD + 6.0;
            b
        })
        .collect()
}

fn text_sections(width: f32) -> Vec<Section> {
    vec![
        section(
            "Model, assumptions and limits",
            width,
            list_blocks(&ASSUMPTIONS, width, true),
        ),
        section("References", width, list_blocks(&REFERENCES, width, true)),
        section("Safety cautions", width, list_blocks(&SAFETY, width, false)),
    ]
}
