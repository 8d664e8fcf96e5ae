//! The sheet's plots: stroke against bore across the bore window (with the usable stroke
//! range in words beneath), and force and peak stress against stroke at the nominal bore.
//! Built from the analysis as measured blocks at the content width, like every section.

use super::Section;
use super::draw::{Block, GREEN, GREY, INK, RED};
use super::font::Weight;
use super::format as f;
use super::plot::{Item, Pen, Plot};
use super::sections::{BAND, BLUE, BODY, NO_FIT, ORANGE, PURPLE, SMALL, section, usable_text};
use crate::analysis::{Analysis, BoreCase};
use crate::segment::SegmentState;

fn finite_max(vals: impl IntoIterator<Item = f64>) -> f64 {
    vals.into_iter()
        .filter(|v| v.is_finite())
        .fold(f64::NEG_INFINITY, f64::max)
}

pub(super) fn window_plot(a: &Analysis, width: f32) -> Section {
    let seg = &a.segment;
    // Under force control the operating stroke is a curve across the bores.
    let op_curve = super::operating::window_series(a);
    let op = a.nominal_operating_stroke_mm().unwrap_or(0.0);
    let max_stroke = seg.max_stroke_mm();
    let w = &a.window;
    let series = |get: fn(&crate::segment::BoreRow) -> Option<f64>| {
        w.iter().map(|r| (r.bore_mm, get(r))).collect::<Vec<_>>()
    };
    // The frame shows the curves and the operating stroke; a far-away actuator maximum or
    // model limit is named in the legend instead of squeezing the curves flat.
    let shown = finite_max(
        w.iter()
            .flat_map(|r| {
                [
                    r.first_contact_stroke_mm,
                    r.holding_stroke_mm,
                    r.stress_limit_stroke_mm,
                    r.line_contact_stroke_mm,
                ]
            })
            .flatten()
            .chain([op])
            .chain(op_curve.iter().filter_map(|p| p.1)),
    );
    let limit_top = finite_max(w.iter().filter_map(|r| r.limit_stroke_mm));
    let shown = if limit_top <= 1.5 * shown {
        shown.max(limit_top)
    } else {
        shown
    };
    // Through a compliant drive the maximum is of travel, drawn as the stroke reaching it.
    let travel_curve = &a.travel_limit_window;
    let max_level = if travel_curve.is_empty() {
        max_stroke
    } else {
        finite_max(travel_curve.iter().filter_map(|p| p.1))
    };
    let shown = if max_level <= 1.5 * shown {
        shown.max(max_level)
    } else {
        shown
    };
    let ymax = if shown.is_finite() && shown > 0.0 {
        1.15 * shown
    } else {
        1.0
    };
    let no_fit = seg.bore_for_gap_mm(0.0);
    let above = |v: f64| if v > ymax { " (above the frame)" } else { "" };
    let plot = Plot {
        title: format!(
            "Strokes at which each event happens, {} bores across the window",
            a.window.len()
        ),
        x_label: "bore diameter (mm)".to_string(),
        y_label: "stroke (mm)".to_string(),
        x_range: a.window_mm,
        y_range: (0.0, ymax),
        items: vec![
            Item::Band {
                label: if no_fit > a.window_mm.0 {
                    format!(
                        "relaxed strips touch the wall: no state below {}",
                        f::mm(no_fit)
                    )
                } else {
                    String::new()
                },
                color: NO_FIT,
                x0: a.window_mm.0,
                x1: no_fit,
            },
            Item::Band {
                label: format!(
                    "bore tolerance {} to {}",
                    f::mm(seg.bore_smallest_mm),
                    f::mm(seg.bore_largest_mm)
                ),
                color: BAND,
                x0: seg.bore_smallest_mm,
                x1: seg.bore_largest_mm,
            },
            Item::VLine {
                label: String::new(),
                pen: Pen::solid(BLUE, 0.5),
                x: seg.bore_smallest_mm,
            },
            Item::VLine {
                label: String::new(),
                pen: Pen::solid(BLUE, 0.5),
                x: seg.bore_largest_mm,
            },
            Item::VLine {
                label: String::new(),
                pen: Pen::dashed(GREY, 0.5, &[1.0, 2.0]),
                x: seg.bore_nominal_mm,
            },
            if travel_curve.is_empty() {
                Item::HLine {
                    label: format!(
                        "actuator maximum {}{}",
                        f::mm(max_stroke),
                        above(max_stroke)
                    ),
                    pen: Pen::dashed(ORANGE, 1.0, &[5.0, 2.5]),
                    y: max_stroke,
                }
            } else {
                Item::series(
                    format!(
                        "actuator maximum travel {} (stroke reaching it){}",
                        f::mm(max_stroke),
                        above(max_level)
                    ),
                    Pen::dashed(ORANGE, 1.0, &[5.0, 2.5]),
                    travel_curve.clone(),
                )
            },
            if op_curve.is_empty() {
                Item::HLine {
                    label: format!("operating stroke {}", f::mm(op)),
                    pen: Pen::dashed(INK, 0.9, &[2.0, 2.0]),
                    y: op,
                }
            } else {
                Item::series(
                    "operating stroke (set pull reached)",
                    Pen::dashed(INK, 0.9, &[2.0, 2.0]),
                    op_curve,
                )
            },
            Item::series(
                "first contact",
                Pen::solid(INK, 1.2),
                series(|r| r.first_contact_stroke_mm),
            ),
            Item::series(
                "holding (required x SF)",
                Pen::solid(GREEN, 1.2),
                series(|r| r.holding_stroke_mm),
            ),
            Item::series(
                "stress limit (factor 1)",
                Pen::solid(RED, 1.2),
                series(|r| r.stress_limit_stroke_mm),
            ),
            Item::series(
                "line-contact onset",
                Pen::dashed(BLUE, 1.1, &[4.0, 1.5]),
                series(|r| r.line_contact_stroke_mm),
            ),
            Item::series(
                format!("model limit{}", above(limit_top)),
                Pen::dashed(PURPLE, 1.1, &[6.0, 1.5, 1.5, 1.5]),
                series(|r| r.limit_stroke_mm),
            ),
        ],
    };
    let mut b = plot.layout(width, 190.0);
    let y = b.paragraph(
        0.0,
        b.height + 6.0,
        width,
        SMALL,
        Weight::Regular,
        GREY,
        &format!(
            "A workable stroke lies above the holding curve and below the stress limit, the model limit and the actuator maximum, across the whole shaded tolerance band. {} Curves end where the quantity does not exist (bore out of reach or relaxed strips do not fit). Lines above the frame are clipped.",
            a.usable_stroke().map_or_else(String::new, |u| usable_text(&u))
        ),
    );
    b.height = y - 6.0;
    section("Stroke against bore", width, vec![b])
}

/// The operating stroke across a plot against stroke.
fn stroke_marker(op: f64) -> Item {
    Item::VLine {
        label: format!("operating stroke {}", f::mm(op)),
        pen: Pen::dashed(INK, 0.9, &[2.0, 2.0]),
        x: op,
    }
}

pub(super) fn curve_plots(a: &Analysis, width: f32) -> Section {
    let seg = &a.segment;
    let op = a.nominal_operating_stroke_mm().unwrap_or(0.0);
    let c = &a.curve;
    if c.is_empty() {
        let mut b = Block::new();
        let y = b.paragraph(
            0.0,
            9.0,
            width,
            BODY,
            Weight::Bold,
            RED,
            &format!(
                "No force-stroke curve: the relaxed segment does not fit the nominal bore {} (the model has no state there).",
                f::mm(seg.bore_nominal_mm)
            ),
        );
        b.height = y;
        return section(
            "Force and stress against stroke at the nominal bore",
            width,
            vec![b],
        );
    }
    let pts = |get: fn(&SegmentState) -> Option<f64>| {
        c.iter().map(|s| (s.stroke_mm, get(s))).collect::<Vec<_>>()
    };
    let x_end = c.last().map_or(1.0, |s| s.stroke_mm).max(op * 1.05);
    let required = a.segment.required_holding_force_n();
    let fmax = finite_max(
        c.iter()
            .flat_map(|s| [s.radial_force_n, s.actuator_force_n, s.holding_force_n])
            .flatten()
            .chain([required]),
    );
    let fmax = if fmax.is_finite() && fmax > 0.0 {
        1.1 * fmax
    } else {
        1.0
    };
    let pull = seg.max_pull_n();
    let pull_label = if pull <= fmax {
        format!("actuator maximum pull {}", f::newton(pull))
    } else {
        format!(
            "actuator maximum pull {} (above the frame)",
            f::newton(pull)
        )
    };
    let first = a.curve.first().and_then(|s| s.first_contact_stroke_mm);
    let mut items = vec![
        match a.nominal_operating_stroke_mm() {
            Some(op) => stroke_marker(op),
            None => Item::series("", Pen::solid(INK, 0.0), Vec::new()),
        },
        Item::HLine {
            label: format!("required holding {}", f::newton(required)),
            pen: Pen::dashed(GREEN, 1.0, &[5.0, 2.5]),
            y: required,
        },
        Item::HLine {
            label: pull_label,
            pen: Pen::dashed(ORANGE, 1.0, &[5.0, 2.5]),
            y: pull,
        },
        Item::series(
            "actuator pull N P",
            Pen::solid(ORANGE, 1.2),
            pts(|s| s.actuator_force_n),
        ),
        Item::series(
            "radial force N F",
            Pen::solid(BLUE, 1.2),
            pts(|s| s.radial_force_n),
        ),
        Item::series(
            "holding force μ N F",
            Pen::solid(GREEN, 1.2),
            pts(|s| s.holding_force_n),
        ),
        Item::series(
            "contact force per strip F",
            Pen::dashed(BLUE, 0.9, &[3.0, 1.5]),
            pts(|s| s.contact_force_per_strip_n),
        ),
    ];
    if let Some(fc) = first {
        items.insert(
            1,
            Item::VLine {
                label: format!("first contact {}", f::mm(fc)),
                pen: Pen::dashed(GREY, 0.7, &[1.0, 1.5]),
                x: fc,
            },
        );
    }
    if let Some(lim) = a
        .bore(BoreCase::Nominal)
        .and_then(|r| r.row.limit_stroke_mm)
    {
        let beyond = if lim > x_end {
            " (beyond the frame)"
        } else {
            ""
        };
        items.insert(
            1,
            Item::VLine {
                label: format!("model limit {}{beyond}", f::mm(lim)),
                pen: Pen::dashed(PURPLE, 1.0, &[6.0, 1.5, 1.5, 1.5]),
                x: lim,
            },
        );
    }
    let forces = Plot {
        title: format!(
            "Forces against stroke, nominal bore {}",
            f::mm(seg.bore_nominal_mm)
        ),
        x_label: "stroke (mm)".to_string(),
        y_label: "force (N)".to_string(),
        x_range: (0.0, x_end),
        y_range: (0.0, fmax),
        items,
    };
    let smax = finite_max(
        c.iter()
            .filter_map(|s| s.max_stress_mpa)
            .chain([seg.static_allowable_mpa, seg.fatigue_allowable_mpa]),
    );
    let stress = Plot {
        title: format!(
            "Peak stress against stroke, nominal bore {}",
            f::mm(seg.bore_nominal_mm)
        ),
        x_label: "stroke (mm)".to_string(),
        y_label: "stress (MPa)".to_string(),
        x_range: (0.0, x_end),
        y_range: (0.0, if smax.is_finite() { 1.1 * smax } else { 1.0 }),
        items: vec![
            match a.nominal_operating_stroke_mm() {
                Some(op) => stroke_marker(op),
                None => Item::series("", Pen::solid(INK, 0.0), Vec::new()),
            },
            Item::HLine {
                label: format!(
                    "static allowable 0.75 Su {}",
                    f::mpa(seg.static_allowable_mpa)
                ),
                pen: Pen::dashed(RED, 1.0, &[5.0, 2.5]),
                y: seg.static_allowable_mpa,
            },
            Item::HLine {
                label: format!(
                    "fatigue allowable (Goodman) {}",
                    f::mpa(seg.fatigue_allowable_mpa)
                ),
                pen: Pen::dashed(PURPLE, 1.0, &[2.0, 1.5]),
                y: seg.fatigue_allowable_mpa,
            },
            Item::series(
                "peak stress σ",
                Pen::solid(INK, 1.2),
                pts(|s| s.max_stress_mpa),
            ),
        ],
    };
    let mut b1 = forces.layout(width, 170.0);
    b1.height += 8.0;
    let mut b2 = stress.layout(width, 120.0);
    let end = c.last().map_or(0.0, |s| s.stroke_mm);
    let y = b2.paragraph(
        0.0,
        b2.height + 6.0,
        width,
        SMALL,
        Weight::Regular,
        GREY,
        &format!(
            "Curves run from 0 to {} (the smaller of the model limit and {}). Holding force is static friction times the radial force; it enters no shape calculation. The peak stress dips just after first contact, and that is physics, not a numerical fault: as the wall takes load, the peak curvature leaves the crest and the plates for points between them and at first falls (linear beam-column theory of a clamped strut pressed at mid-span shows the same dip).",
            f::mm(end),
            if a.travel_limit_window.is_empty() {
                "the actuator maximum stroke"
            } else {
                "the stroke at which the actuator travel, stroke + pull / drive stiffness, reaches its maximum"
            }
        ),
    );
    b2.height = y - 6.0;
    section(
        "Force and stress against stroke at the nominal bore",
        width,
        vec![b1, b2],
    )
}
