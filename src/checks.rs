//! The design checks: each judged at its own bore and stroke (the project's contract),
//! with pass/fail, a margin in the check's own unit (mm for geometry, otherwise a ratio
//! minus one; positive when passing) and a one-line reason.

use std::f64::consts::PI;

use serde::Serialize;

use crate::actuation;
use crate::design::Operating;
use crate::segment::{Segment, SegmentError, SegmentState};

/// Unit of a check's margin.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub enum MarginUnit {
    /// Millimetres of clearance or stroke.
    Mm,
    /// Capacity over demand, minus one.
    Ratio,
}

impl MarginUnit {
    /// Unit label.
    pub fn label(self) -> &'static str {
        match self {
            MarginUnit::Mm => "mm",
            MarginUnit::Ratio => "ratio",
        }
    }
}

/// One check of a design.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Check {
    /// Short stable id: `fit`, `reach`, `hold`, `static`, `fatigue`, `actuator`, `stroke`, `hub`.
    pub id: &'static str,
    /// What is checked, in words.
    pub title: &'static str,
    /// Whether the check passes.
    pub pass: bool,
    /// Margin in `unit`; `None` where it cannot be formed (e.g. the bore is out of reach).
    pub margin: Option<f64>,
    /// Unit of the margin.
    pub unit: MarginUnit,
    /// One line saying why.
    pub reason: String,
    /// Bore the check is judged at, mm (none for the hub check).
    pub bore_mm: Option<f64>,
    /// Stroke the check is judged at, mm.
    pub stroke_mm: Option<f64>,
}

/// Every check of a segment, in a fixed order.
pub fn run(seg: &Segment) -> Vec<Check> {
    let d = &seg.design;
    // The set stroke under displacement control; under force control each bore has its
    // own operating stroke (`actuation::operating_state`).
    let set_op = match d.operating() {
        Operating::Stroke(s) => Some(s),
        _ => None,
    };
    let small = seg.bore_smallest_mm;
    let large = seg.bore_largest_mm;
    let max_stroke = seg.max_stroke_mm();
    let mut out = Vec::with_capacity(8);

    // 1. Fits when relaxed, at the smallest bore.
    let need = seg.relaxed_diameter_mm() + 1.0;
    let fit_margin = small - need;
    out.push(Check {
        id: "fit",
        title: "passes the smallest bore when relaxed",
        pass: fit_margin >= 0.0,
        margin: Some(fit_margin),
        unit: MarginUnit::Mm,
        reason: format!(
            "relaxed diameter {:.2} mm (plates {:.2} mm, strips {:.2} mm) + 1 mm clearance vs smallest bore {:.2} mm",
            seg.relaxed_diameter_mm(),
            d.end_plate_diameter_mm,
            seg.outer_diameter_mm(0.0),
            small
        ),
        bore_mm: Some(small),
        stroke_mm: Some(0.0),
    });

    // 2. Reaches the wall at the largest bore within the actuator's stroke.
    let large_path = seg.at_bore(large);
    let reach = match &large_path {
        Ok(p) => match p.first_contact_stroke_mm() {
            Some(fc) => Check {
                id: "reach",
                title: "reaches the wall at the largest bore",
                pass: actuation::travel_at_mm(p, fc) <= max_stroke,
                margin: Some(max_stroke - actuation::travel_at_mm(p, fc)),
                unit: MarginUnit::Mm,
                reason: match p.stress_limit_stroke_mm().ok().filter(|&s| s < fc) {
                    Some(s) => format!(
                        "first contact at {fc:.3} mm stroke{} vs actuator maximum {max_stroke:.3} mm; the strips reach their stress limit at {s:.3} mm, before they touch the wall",
                        actuation::travel_note(p, fc)
                    ),
                    None => format!(
                        "first contact at {fc:.3} mm stroke{} vs actuator maximum {max_stroke:.3} mm",
                        actuation::travel_note(p, fc)
                    ),
                },
                bore_mm: Some(large),
                stroke_mm: Some(fc),
            },
            None => Check {
                id: "reach",
                title: "reaches the wall at the largest bore",
                pass: false,
                margin: None,
                unit: MarginUnit::Mm,
                reason: format!(
                    "bore {large:.2} mm is out of reach: the strips can reach at most {:.2} mm",
                    seg.largest_reachable_bore_mm()
                ),
                bore_mm: Some(large),
                stroke_mm: None,
            },
        },
        Err(e) => no_state(
            "reach",
            "reaches the wall at the largest bore",
            MarginUnit::Mm,
            large,
            None,
            e,
        ),
    };
    out.push(reach);

    // 3. Holding force at the largest bore at the operating stroke.
    let required = d.duty.holding_force_n * d.duty.safety_factor;
    let hold = match &large_path {
        Ok(p) => {
            let operating = actuation::operating_state(p);
            let (op, s) = (operating.stroke_mm, operating.state);
            match s.holding_force_n {
                Some(h) if required > 0.0 => Check {
                    id: "hold",
                    title: "holds the required load at the largest bore",
                    pass: h >= required,
                    margin: Some(h / required - 1.0),
                    unit: MarginUnit::Ratio,
                    reason: format!(
                        "holding force {h:.2} N ({}) vs {:.2} N x safety factor {:.2} = {required:.2} N",
                        s.phase, d.duty.holding_force_n, d.duty.safety_factor
                    ),
                    bore_mm: Some(large),
                    stroke_mm: op,
                },
                Some(h) => Check {
                    id: "hold",
                    title: "holds the required load at the largest bore",
                    pass: true,
                    margin: None,
                    unit: MarginUnit::Ratio,
                    reason: format!("no holding force required; the segment holds {h:.2} N"),
                    bore_mm: Some(large),
                    stroke_mm: op,
                },
                None => beyond(
                    "hold",
                    "holds the required load at the largest bore",
                    large,
                    op,
                    &s,
                ),
            }
        }
        Err(e) => no_state(
            "hold",
            "holds the required load at the largest bore",
            MarginUnit::Ratio,
            large,
            set_op,
            e,
        ),
    };
    out.push(hold);

    // 4-7 at the smallest bore and the operating stroke.
    match seg.at_bore(small) {
        Ok(p) => {
            let operating = actuation::operating_state(&p);
            let (op, s) = (operating.stroke_mm, &operating.state);
            out.push(stress_check(seg, s, small, op, true));
            out.push(stress_check(seg, s, small, op, false));
            out.push(actuator_check(seg, s, small, op));
            out.push(match (op, operating.travel_mm) {
                (Some(op), Some(travel)) => {
                    let limit = p.limit_stroke_mm();
                    let margin = (max_stroke - travel).min(limit - op);
                    let pass = travel <= max_stroke && op < limit;
                    Check {
                        id: "stroke",
                        title: "operating stroke within the actuator and short of the limit",
                        pass,
                        margin: Some(margin),
                        unit: MarginUnit::Mm,
                        reason: format!(
                            "operating {op:.3} mm{} vs actuator maximum {max_stroke:.3} mm and model limit {limit:.3} mm ({})",
                            actuation::travel_note(&p, op),
                            p.limit_reason().describe()
                        ),
                        bore_mm: Some(small),
                        stroke_mm: Some(op),
                    }
                }
                _ => Check {
                    unit: MarginUnit::Mm,
                    ..beyond(
                        "stroke",
                        "operating stroke within the actuator and short of the limit",
                        small,
                        op,
                        s,
                    )
                },
            });
        }
        Err(e) => {
            for (id, title, unit) in [
                (
                    "static",
                    "static stress at the smallest bore",
                    MarginUnit::Ratio,
                ),
                (
                    "fatigue",
                    "fatigue (Goodman, zero-to-peak) at the smallest bore",
                    MarginUnit::Ratio,
                ),
                (
                    "actuator",
                    "actuator force or torque within rating",
                    MarginUnit::Ratio,
                ),
                (
                    "stroke",
                    "operating stroke within the actuator and short of the limit",
                    MarginUnit::Mm,
                ),
            ] {
                out.push(no_state(id, title, unit, small, set_op, &e));
            }
        }
    }

    // 8. Strips clear each other on the hub.
    let n = f64::from(d.strip.count);
    let room = 2.0 * d.mount_radius_mm * (PI / n).tan();
    out.push(Check {
        id: "hub",
        title: "strips clear each other on the hub",
        pass: d.strip.width_mm <= room,
        margin: Some(room - d.strip.width_mm),
        unit: MarginUnit::Mm,
        reason: format!(
            "strip width {:.2} mm vs room 2 r tan(pi/N) = {room:.2} mm for {} strips at radius {:.2} mm",
            d.strip.width_mm, d.strip.count, d.mount_radius_mm
        ),
        bore_mm: None,
        stroke_mm: Some(0.0),
    });
    // 9. Stable at the operating point: only for force control or a compliant drive.
    if d.uses_actuation() {
        out.push(actuation::stable_check(seg));
    }
    out
}

fn stress_check(
    seg: &Segment,
    s: &SegmentState,
    bore: f64,
    op: Option<f64>,
    is_static: bool,
) -> Check {
    let (id, title) = if is_static {
        ("static", "static stress at the smallest bore")
    } else {
        (
            "fatigue",
            "fatigue (Goodman, zero-to-peak) at the smallest bore",
        )
    };
    let (Some(stress), Some(fos)) = (
        s.max_stress_mpa,
        if is_static {
            s.static_safety_factor
        } else {
            s.fatigue_safety_factor
        },
    ) else {
        return beyond(id, title, bore, op, s);
    };
    let reason = if is_static {
        format!(
            "peak stress {stress:.1} MPa vs 0.75 x tensile = {:.1} MPa: factor of safety {fos:.3}",
            seg.static_allowable_mpa
        )
    } else {
        format!(
            "peak {stress:.1} MPa, zero-to-peak, vs fatigue strength {:.1} MPa at {} cycles and tensile {:.0} MPa: Goodman factor of safety {fos:.3}",
            seg.fatigue_strength_mpa,
            grouped_count(seg.design.duty.cycles),
            seg.material.tensile_strength_mpa
        )
    };
    Check {
        id,
        title,
        pass: fos >= 1.0,
        margin: Some(fos - 1.0),
        unit: MarginUnit::Ratio,
        reason,
        bore_mm: Some(bore),
        stroke_mm: op,
    }
}

fn actuator_check(seg: &Segment, s: &SegmentState, bore: f64, op: Option<f64>) -> Check {
    let title = "actuator force or torque within rating";
    let Some(reading) = s.actuator else {
        return beyond("actuator", title, bore, op, s);
    };
    let rating = seg.actuator_effort_rating();
    let need = reading.effort;
    let margin = if need > 0.0 {
        rating / need - 1.0
    } else {
        f64::INFINITY
    };
    let unit = reading.effort_unit;
    Check {
        id: "actuator",
        title,
        pass: need <= rating,
        margin: margin.is_finite().then_some(margin),
        unit: MarginUnit::Ratio,
        reason: format!("needs {need:.3} {unit} vs rating {rating:.3} {unit}"),
        bore_mm: Some(bore),
        stroke_mm: op,
    }
}

fn beyond(
    id: &'static str,
    title: &'static str,
    bore: f64,
    op: Option<f64>,
    s: &SegmentState,
) -> Check {
    Check {
        id,
        title,
        pass: false,
        margin: None,
        unit: MarginUnit::Ratio,
        reason: s
            .reason
            .clone()
            .unwrap_or_else(|| "no state at the operating stroke".to_string()),
        bore_mm: Some(bore),
        stroke_mm: op,
    }
}

fn no_state(
    id: &'static str,
    title: &'static str,
    unit: MarginUnit,
    bore: f64,
    op: Option<f64>,
    e: &SegmentError,
) -> Check {
    Check {
        id,
        title,
        pass: false,
        margin: None,
        unit,
        reason: e.to_string(),
        bore_mm: Some(bore),
        stroke_mm: op,
    }
}

/// Index of the check that limits the design: the failing check with the most negative
/// ratio margin (or the first failing one), else the passing ratio check with the least margin.
pub fn limiting(checks: &[Check]) -> Option<usize> {
    let key = |c: &Check| c.margin.unwrap_or(f64::NEG_INFINITY);
    let pick = |pass: bool| {
        checks
            .iter()
            .enumerate()
            .filter(|(_, c)| c.pass == pass && (c.unit == MarginUnit::Ratio || !pass))
            .min_by(|a, b| key(a.1).total_cmp(&key(b.1)))
            .map(|(i, _)| i)
    };
    pick(false).or_else(|| pick(true))
}

/// Whether every check passes.
pub fn all_pass(checks: &[Check]) -> bool {
    checks.iter().all(|c| c.pass)
}

/// Geometry cautions beside the checks: at each of the smallest, nominal and largest bore,
/// whether the strips at the operating stroke leave the room between the plates (swing
/// behind an end plate or cross themselves), which the model does not prevent. Empty when
/// they do not. Not a check of the contract: the checks judge the mechanics note's model;
/// these say where its states stop being physical.
pub fn geometry_cautions(seg: &Segment) -> Vec<String> {
    [
        ("smallest", seg.bore_smallest_mm),
        ("nominal", seg.bore_nominal_mm),
        ("largest", seg.bore_largest_mm),
    ]
    .iter()
    .filter_map(|&(label, bore)| {
        let path = seg.at_bore(bore).ok()?;
        let op = actuation::operating_stroke_mm(&path)?;
        let (onset, kind) = path.overlap_mm(op)?;
        Some(format!(
            "at the {label} bore ({bore:.3} mm) and the operating stroke ({op:.3} mm) {}, from {onset:.3} mm of stroke on: states there are not physical",
            kind.describe()
        ))
    })
    .collect()
}

/// A whole count with its digits in groups of three, space-separated (`1 000 000`), as
/// ISO 80000-1 writes large numbers.
pub fn grouped_count(n: u64) -> String {
    let digits = n.to_string();
    let mut out = String::new();
    for (i, c) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i).is_multiple_of(3) {
            out.push(' ');
        }
        out.push(c);
    }
    out
}
