//! The sheet's side and end views to a stated scale: one strip between the bore walls and
//! the end plates (relaxed when the operating stroke has no state), and the ring of strips
//! seen along the axis at the plates and at the crest.

use super::draw::{Block, GREY, INK, RED};
use super::font::Weight;
use super::format as f;
use super::sections::{BLUE, SHADE, SMALL, section, state_of};
use super::{Section, SheetMeta};
use crate::analysis::{Analysis, BoreCase};

/// Drawing scales offered, as (paper mm per model mm, label).
const SCALES: [(f32, &str); 12] = [
    (5.0, "5:1"),
    (2.0, "2:1"),
    (1.0, "1:1"),
    (0.5, "1:2"),
    (0.4, "1:2.5"),
    (0.2, "1:5"),
    (0.1, "1:10"),
    (0.05, "1:20"),
    (0.02, "1:50"),
    (0.01, "1:100"),
    (0.005, "1:200"),
    (0.002, "1:500"),
];
const PT_PER_MM: f32 = 72.0 / 25.4;

fn circle(cx: f32, cy: f32, r: f32) -> Vec<[f32; 2]> {
    (0..=96)
        .map(|i| {
            let t = 2.0 * std::f32::consts::PI * i as f32 / 96.0;
            [cx + r * t.cos(), cy + r * t.sin()]
        })
        .collect()
}

pub(super) fn views(a: &Analysis, meta: &SheetMeta, width: f32) -> Section {
    let seg = &a.segment;
    let d = &seg.design;
    let s = &d.strip;
    let op = a.nominal_operating_stroke_mm().unwrap_or(0.0);
    let bore_d = seg.bore_nominal_mm as f32;
    let big_r = 0.5 * bore_d;
    let l = s.free_length_mm as f32;
    let plate_t = (0.04 * l).max(1.0);
    // The walls and the axis run past the plates by this much at either end.
    let overhang = 0.12 * l;
    let side_w_mm = l + 2.0 * plate_t + 0.25 * l;
    let view_max_pt: f32 = 230.0;
    let side_box = 0.6 * width;
    let end_box = width - side_box - 12.0;
    // Each view takes the largest standard scale that fits its box.
    let pick = |fits: &dyn Fn(f32) -> bool| {
        SCALES
            .iter()
            .map(|(r, lab)| (r * PT_PER_MM, *lab))
            .find(|(sp, _)| fits(*sp))
            .unwrap_or((0.002 * PT_PER_MM, "1:500"))
    };
    let (scale_pt, scale_label) =
        pick(&|sp| side_w_mm * sp <= side_box && 1.15 * bore_d * sp <= view_max_pt);
    let (end_scale_pt, end_scale_label) =
        pick(&|sp| 1.15 * bore_d * sp <= view_max_pt.min(end_box));
    let view_h_pt = 1.15 * bore_d * scale_pt.max(end_scale_pt) + 10.0;
    let mut b = Block::new();
    let top = 14.0;
    let cy = top + 0.5 * view_h_pt;
    b.text(
        0.0,
        9.0,
        9.0,
        Weight::Bold,
        match super::operating::unreached_note(a) {
            None => format!(
                "Side view, section through two strips, at stroke {}, scale {scale_label}",
                f::mm(op)
            ),
            Some(_) => format!(
                "Side view, section through two strips, relaxed (the set pull is never reached in the nominal bore), scale {scale_label}"
            ),
        },
    );
    // Side view: x along the axis from the first end plate; the drawing, from the left
    // overhang to the right one, is centred in its box.
    let x0 = 0.5 * (side_box - side_w_mm * scale_pt) + (0.125 * l + plate_t) * scale_pt;
    let px = |x: f32| x0 + x * scale_pt;
    let py = |r: f32| cy - r * scale_pt;
    let chord = (l - op as f32).max(0.0);
    let ext = (overhang, chord + overhang);
    // Axis (dash-dot), bore walls with hatching on the wall side.
    b.polyline(
        vec![[px(-ext.0 - plate_t), cy], [px(ext.1 + plate_t), cy]],
        0.5,
        GREY,
        Some(vec![8.0, 2.0, 1.5, 2.0]),
    );
    for sign in [1.0f32, -1.0] {
        let yw = py(sign * big_r);
        b.line(
            [px(-ext.0 - plate_t), yw],
            [px(ext.1 + plate_t), yw],
            1.0,
            INK,
        );
        let mut x = px(-ext.0 - plate_t) + 3.0;
        while x < px(ext.1 + plate_t) - 3.0 {
            b.line([x, yw - sign * 0.0], [x + 3.0, yw - sign * 4.0], 0.4, GREY);
            x += 6.0;
        }
    }
    let drawn = a.side_shape();
    let plate_r = seg.drawn_plate_radius_mm() as f32;
    // Without a state the strips are drawn relaxed (straight at the mount radius, plates
    // at the free length), so the reader still sees the interference.
    let rm = d.mount_radius_mm as f32;
    let shape = drawn.points();
    let strip_color = if drawn.is_operating() { BLUE } else { GREY };
    {
        let chord = shape.last().map_or(chord, |p| p[0] as f32);
        for xp in [-plate_t, chord] {
            let pts = vec![
                [px(xp), py(plate_r)],
                [px(xp + plate_t), py(plate_r)],
                [px(xp + plate_t), py(-plate_r)],
                [px(xp), py(-plate_r)],
            ];
            b.marks.push(super::draw::Mark::Area {
                points: pts.clone(),
                color: SHADE,
            });
            b.marks.push(super::draw::Mark::Line {
                points: pts,
                width: 0.6,
                color: INK,
                dash: None,
                closed: true,
            });
        }
        let rmax = shape.iter().map(|p| p[1]).fold(f64::NEG_INFINITY, f64::max);
        let tw = (s.thickness_mm as f32 * scale_pt).max(0.9);
        for sign in [1.0f32, -1.0] {
            let pts: Vec<[f32; 2]> = shape
                .iter()
                .map(|p| [px(p[0] as f32), py(sign * p[1] as f32)])
                .collect();
            b.polyline(pts, tw, strip_color, None);
            // The flat run, where the strip lies on the wall.
            let flat: Vec<[f32; 2]> = shape
                .iter()
                .filter(|p| p[1] >= rmax - 1e-6 * s.free_length_mm)
                .map(|p| [px(p[0] as f32), py(sign * p[1] as f32)])
                .collect();
            if flat.len() >= 2 && drawn.is_operating() {
                b.polyline(flat, tw + 1.6, RED, None);
            }
        }
        // Relaxed strip, for comparison.
        b.polyline(
            vec![[px(0.0), py(rm)], [px(l), py(rm)]],
            0.5,
            GREY,
            Some(vec![2.0, 2.0]),
        );
    }
    let st = a.bore(BoreCase::Nominal).and_then(state_of);
    let mut ny = top + view_h_pt + 12.0;
    let mut note = |b: &mut Block, t: String| {
        ny = b.paragraph(0.0, ny, side_box, SMALL, Weight::Regular, INK, &t);
    };
    note(
        &mut b,
        format!(
            "Bore {} (walls hatched), chord between plates L − δ = {}, free length L = {}.",
            f::mm(bore_d as f64),
            f::mm(l as f64 - op),
            f::mm(l as f64)
        ),
    );
    if !drawn.is_operating() {
        ny = b.paragraph(
            0.0,
            ny,
            side_box,
            SMALL,
            Weight::Bold,
            RED,
            "No strip shape: the nominal bore has no model state at the operating stroke (see Results). Strips drawn relaxed.",
        );
    } else if let Some(s) = st {
        note(
            &mut b,
            format!(
                "Blue: strip centreline ({}); red: flat run on the wall {}; grey dashed: relaxed strip. End-plate thickness drawn schematically.",
                s.phase,
                f::mm_opt(s.flat_length_mm)
            ),
        );
    }
    // End view.
    let ex = side_box + 12.0 + 0.5 * end_box;
    b.text(
        side_box + 12.0,
        9.0,
        9.0,
        Weight::Bold,
        format!("End view, scale {end_scale_label}"),
    );
    b.polyline(circle(ex, cy, big_r * end_scale_pt), 1.0, INK, None);
    let end = a.end_view();
    b.polyline(
        circle(ex, cy, end.plate_radius_mm as f32 * end_scale_pt),
        0.5,
        GREY,
        Some(vec![3.0, 2.0]),
    );
    b.line(
        [ex - (big_r + 3.0) * end_scale_pt, cy],
        [ex + (big_r + 3.0) * end_scale_pt, cy],
        0.4,
        GREY,
    );
    b.line(
        [ex, cy - (big_r + 3.0) * end_scale_pt],
        [ex, cy + (big_r + 3.0) * end_scale_pt],
        0.4,
        GREY,
    );
    let n = s.count;
    let t = s.thickness_mm as f32;
    let crest = end.at_crest.as_ref().map(|c| (c.0, &c.1));
    let rings = std::iter::once((&end.at_plates, (90, 90, 90), 0.8f32))
        .chain(crest.map(|(_, quads)| (quads, BLUE, 1.6)));
    for (quads, color, w) in rings {
        for q in quads {
            let pts = q
                .iter()
                .map(|p| {
                    [
                        ex + p[0] as f32 * end_scale_pt,
                        cy - p[1] as f32 * end_scale_pt,
                    ]
                })
                .collect();
            b.marks.push(super::draw::Mark::Line {
                points: pts,
                width: w.max(t * end_scale_pt),
                color,
                dash: None,
                closed: true,
            });
        }
    }
    let mut ey = top + view_h_pt + 12.0;
    for line in [
        format!(
            "{n} strips, {} x {}, at r_m = {}.",
            f::mm(s.width_mm),
            f::mm(s.thickness_mm),
            f::mm(d.mount_radius_mm)
        ),
        if let Some((h, _)) = crest {
            format!("Grey: at the plates; blue: at the crest (+{}).", f::mm(h))
        } else {
            "Strips drawn at the plates only: no state at the operating stroke.".to_string()
        },
        if d.end_plate_diameter_mm > 0.0 {
            format!(
                "Dashed circle: end plate {}.",
                f::mm(d.end_plate_diameter_mm)
            )
        } else {
            format!(
                "Dashed circle: no plate size given, drawn at the mount radius {}.",
                f::mm(d.mount_radius_mm)
            )
        },
    ] {
        ey = b.paragraph(
            side_box + 12.0,
            ey,
            end_box,
            SMALL,
            Weight::Regular,
            INK,
            &line,
        );
    }
    let y = ny.max(ey);
    let y = b.paragraph(
        0.0,
        y + 2.0,
        width,
        SMALL,
        Weight::Bold,
        INK,
        &format!("Both views are to the scales stated when printed at 100 % on {} paper (do not scale from a resized print).", meta.paper.name()),
    );
    b.height = y - 6.0;
    section("Side view and end view", width, vec![b])
}
