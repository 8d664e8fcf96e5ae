//! The sizing sheet's load-sharing section (issue 17), for a design that uses a radial
//! load, an out-of-round bore or a bend: the governing case at the nominal bore and the
//! operating stroke, the hub's offset and the strokes at which the first strip touches,
//! the strips lift the hub off its rest and the last strip touches; the per-strip table;
//! and the end view with each strip's contact force as an arrow to a stated scale and the
//! hub's offset drawn larger than it is (said so). The new checks themselves are in the
//! check table. A child of `sections`, whose table and layout helpers it uses.

use super::super::draw::{Block, GREY, INK, RED};
use super::super::font::Weight;
use super::{BLUE, BODY, ORANGE, SMALL, Section, col, rcol, row, section, table};
use crate::analysis::Analysis;
use crate::elastica::Phase;
use crate::sharing::{self, CaseChoice, Judge, Loading};
use crate::units::Quantity;

/// The section, or `None` for a design without load-sharing fields (its sheet stays as it
/// was).
pub fn strips_section(a: &Analysis, width: f32) -> Option<Section> {
    let seg = &a.segment;
    let d = &seg.design;
    if !sharing::design_uses_sharing(d) {
        return None;
    }
    let title = "Load sharing: per strip and end view";
    let bore = seg.bore_nominal_mm;
    let loaded = sharing::checks::operating_stroke_at(seg, bore)
        .ok_or_else(|| "the actuator's set pull is never reached at the nominal bore".to_string())
        .and_then(|op| {
            sharing::loaded_point(seg, bore, op, CaseChoice::default(), Judge::HighestStress)
                .map_err(|e| e.to_string())
        });
    let point = match loaded {
        Ok(p) => p,
        Err(e) => {
            let mut b = Block::new();
            let y = b.paragraph(
                0.0,
                10.0,
                width,
                BODY,
                Weight::Regular,
                RED,
                &format!("Load sharing could not be solved at the nominal bore: {e}"),
            );
            b.height = y + 4.0;
            return Some(section(title, width, vec![b]));
        }
    };
    let state = seg
        .loaded_at_bore(
            bore,
            &Loading {
                clocking: point.clocking,
                major_axis: point.major_axis,
                ..sharing::loading_of(d)
            },
        )
        .ok()
        .and_then(|l| l.state(point.stroke_mm).ok());
    let stroke = |v: Option<f64>| v.map_or_else(|| "none".to_string(), |s| format!("{s:.3} mm"));
    let mut intro = Block::new();
    let text = format!(
        "At the nominal bore {bore:.2} mm and the operating stroke {:.3} mm, with a radial load of {:.1} N straight down{}: {}. Hub offset y {:+.3} mm (up), z {:+.3} mm. The first strip touches at {}, the strips lift the hub off its rest at {}, the last strip touches at {}. Each strip is solved at its own gap; the relaxed rim carries what the strips do not.",
        point.stroke_mm,
        d.duty.radial_load_n,
        if d.bore.out_of_round_mm > 0.0 {
            format!(" and a bore {:.2} mm out of round", d.bore.out_of_round_mm)
        } else {
            String::new()
        },
        point.governing,
        point.hub_offset_mm[0],
        point.hub_offset_mm[1],
        stroke(point.first_strip_contact_stroke_mm),
        stroke(point.lift_off_stroke_mm),
        stroke(point.last_strip_contact_stroke_mm),
    );
    let y = intro.paragraph(0.0, 10.0, width, BODY, Weight::Regular, INK, &text);
    intro.height = y;
    let mut blocks = vec![intro];
    if point.strips.is_empty() {
        let mut b = Block::new();
        let y = b.paragraph(
            0.0,
            10.0,
            width,
            BODY,
            Weight::Regular,
            RED,
            "A strip is past its own limit at this stroke: no per-strip state.",
        );
        b.height = y + 4.0;
        blocks.push(b);
        return Some(section(title, width, blocks));
    }
    // The table on the left, the end view on the right.
    let table_w = (0.56 * width).min(300.0);
    let cols = [
        rcol(0.14 * table_w),
        rcol(0.15 * table_w),
        col(0.23 * table_w),
        rcol(0.16 * table_w),
        rcol(0.16 * table_w),
        rcol(0.16 * table_w),
    ];
    let units = super::super::format::units();
    let num = |q: Quantity, v: f64, digits: usize| {
        if v.is_finite() {
            units.number(q, v, digits)
        } else {
            "n/a".to_string()
        }
    };
    let rows: Vec<_> = point
        .strips
        .iter()
        .map(|r| {
            row([
                format!("{:.1}", r.clock_deg),
                num(Quantity::Length, r.gap_mm, 3),
                if r.phase.has_state() {
                    r.phase.to_string()
                } else {
                    "off the wall".to_string()
                },
                num(Quantity::Force, r.contact_force_n, 2),
                num(Quantity::Force, r.axial_force_n, 2),
                num(Quantity::Stress, r.max_stress_mpa, 1),
            ])
        })
        .collect();
    let gap = format!("gap, {}", units.unit(Quantity::Length));
    let contact = format!("contact, {}", units.unit(Quantity::Force));
    let axial = format!("axial, {}", units.unit(Quantity::Force));
    let stress = format!("stress, {}", units.unit(Quantity::Stress));
    let t = table(
        &["clock, deg", &gap, "phase", &contact, &axial, &stress],
        &cols,
        &rows,
        SMALL,
    );
    let view_w = width - table_w - 14.0;
    let side = view_w.min(t.height.max(150.0)).min(220.0);
    let mut both = Block::new();
    both.append(&t, 0.0, 4.0);
    let view = end_view(a, &point, state.as_ref(), side);
    both.append(&view, table_w + 14.0 + 0.5 * (view_w - side), 4.0);
    both.height = 4.0 + t.height.max(view.height) + 4.0;
    blocks.push(both);
    Some(section(title, width, blocks))
}

/// The end view in a square of `side` pt, with its caption below.
fn end_view(
    a: &Analysis,
    p: &sharing::LoadedPoint,
    st: Option<&sharing::SharedState>,
    side: f32,
) -> Block {
    let d = &a.segment.design;
    let mut b = Block::new();
    let r = 0.5 * p.bore_mm;
    let o = d.bore.out_of_round_mm;
    let (major, minor) = (r + 0.25 * o, r - 0.25 * o);
    let (ay, az) = match p.major_axis {
        sharing::MajorAxis::Vertical => (major, minor),
        sharing::MajorAxis::Horizontal => (minor, major),
    };
    // Room for the wall and the longest arrow (a quarter of the radius) outside it.
    let pt = (0.5 * side as f64 / (1.3 * major)) as f32;
    let (cx, cy) = (0.5 * side, 0.5 * side);
    // y up in the model, down on the page; z to the right.
    let at = |y: f64, z: f64| [cx + z as f32 * pt, cy - y as f32 * pt];
    let wall: Vec<[f32; 2]> = (0..=96)
        .map(|i| {
            let th = std::f64::consts::TAU * i as f64 / 96.0;
            at(ay * th.cos(), az * th.sin())
        })
        .collect();
    b.polyline(wall, 1.0, INK, None);
    let off = p.hub_offset_mm;
    let k = sharing::offset_exaggeration(off[0].hypot(off[1]), r);
    let hub = [k * off[0], k * off[1]];
    let plate_r = if d.end_plate_diameter_mm > 0.0 {
        0.5 * d.end_plate_diameter_mm
    } else {
        d.mount_radius_mm - d.strip.thickness_mm
    };
    let h = at(hub[0], hub[1]);
    b.polyline(
        circle(h[0], h[1], plate_r as f32 * pt),
        0.5,
        GREY,
        Some(vec![3.0, 2.0]),
    );
    b.line([h[0] - 3.0, h[1]], [h[0] + 3.0, h[1]], 0.6, INK);
    b.line([h[0], h[1] - 3.0], [h[0], h[1] + 3.0], 0.6, INK);
    let strips = st.map(|s| s.strips.as_slice()).unwrap_or(&[]);
    let fmax = p
        .strips
        .iter()
        .map(|s| s.contact_force_n)
        .filter(|f| f.is_finite())
        .fold(0.0, f64::max);
    let mm_per_n = if fmax > 0.0 { 0.25 * r / fmax } else { 0.0 };
    let (half_b, t) = (0.5 * d.strip.width_mm, d.strip.thickness_mm);
    let face = d.mount_radius_mm + 0.5 * t;
    for (i, row) in p.strips.iter().enumerate() {
        let th = row.clock_deg.to_radians();
        let u = [th.cos(), th.sin()];
        let v = [-th.sin(), th.cos()];
        let touching = matches!(row.phase, Phase::PointContact | Phase::LineContact);
        let rise = if touching {
            sharing::wall_travel_mm([hub[0] + face * u[0], hub[1] + face * u[1]], u, ay, az)
        } else {
            strips
                .get(i)
                .map(|s| s.crest_height_mm)
                .filter(|c| c.is_finite())
                .unwrap_or(0.0)
        };
        for (rc, color, w) in [
            (d.mount_radius_mm, GREY, 0.5),
            (
                d.mount_radius_mm + rise,
                if row.phase.has_state() { BLUE } else { GREY },
                1.2,
            ),
        ] {
            let corner = |s: f64, q: f64| {
                let rr = rc + q;
                at(hub[0] + rr * u[0] + s * v[0], hub[1] + rr * u[1] + s * v[1])
            };
            let mut pts = vec![
                corner(-half_b, -0.5 * t),
                corner(half_b, -0.5 * t),
                corner(half_b, 0.5 * t),
                corner(-half_b, 0.5 * t),
            ];
            pts.push(pts[0]);
            b.polyline(pts, w, color, None);
        }
        if touching && row.contact_force_n > 0.0 {
            let base_r = d.mount_radius_mm + rise + 0.5 * t;
            let len = row.contact_force_n * mm_per_n;
            let a0 = at(hub[0] + base_r * u[0], hub[1] + base_r * u[1]);
            let tip_r = base_r + len;
            let a1 = at(hub[0] + tip_r * u[0], hub[1] + tip_r * u[1]);
            b.line(a0, a1, 1.2, ORANGE);
            // Arrow head: two short strokes back from the tip.
            let head = (0.25 * len).min(0.06 * r);
            for s in [-1.0, 1.0] {
                let back = tip_r - head;
                let side_pt = at(
                    hub[0] + back * u[0] + s * 0.5 * head * v[0],
                    hub[1] + back * u[1] + s * 0.5 * head * v[1],
                );
                b.line(a1, side_pt, 1.2, ORANGE);
            }
        }
    }
    let caption = format!(
        "End view at the nominal bore, looking along it; clock angles from the top, clockwise. Arrows: each strip's contact force on the wall, 10 mm of bore = {:.1} N. {}",
        if mm_per_n > 0.0 { 10.0 / mm_per_n } else { 0.0 },
        if k > 1.0 {
            format!("The hub's offset is drawn {k:.0} x larger than it is, the rest to scale.")
        } else {
            "To scale.".to_string()
        }
    );
    let y = b.paragraph(
        0.0,
        side + 9.0,
        side,
        SMALL,
        Weight::Regular,
        GREY,
        &caption,
    );
    b.height = y;
    b
}

/// A closed circle of radius `r` pt around `(cx, cy)`, as a polyline.
fn circle(cx: f32, cy: f32, r: f32) -> Vec<[f32; 2]> {
    (0..=96)
        .map(|i| {
            let t = std::f32::consts::TAU * i as f32 / 96.0;
            [cx + r * t.cos(), cy + r * t.sin()]
        })
        .collect()
}
