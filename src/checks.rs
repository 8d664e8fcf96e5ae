//! The design checks: each judged at its own bore and stroke (docs/contract.md, "Checks:
//! where each is judged"),
//! with pass/fail, a margin in the check's own unit (mm for geometry, otherwise a ratio
//! minus one; positive when passing) and a one-line reason. [`CheckId`] names each check
//! and holds its title and unit in one place; [`Check::margin_text`] is the one way the
//! command line, the app and the sheet write a margin.

use std::f64::consts::PI;

use serde::{Serialize, Serializer};

use crate::actuation;
use crate::design::Operating;
use crate::segment::{Segment, SegmentError, SegmentState};
use crate::units::{Quantity, UnitSystem};

/// Unit of a check's margin (serialised as its label, `mm` or `ratio`).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
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

    /// A margin `m` in this unit as [`Check::margin_text`] writes it (`+0.125 mm`,
    /// `+42.0 %`); `None` when it is not finite.
    pub fn margin_text(self, m: f64) -> Option<String> {
        let m = Some(m).filter(|m| m.is_finite())?;
        Some(match self {
            MarginUnit::Mm => format!("{:+.3} mm", no_negative_zero(m, 3)),
            MarginUnit::Ratio => format!("{:+.1} %", no_negative_zero(100.0 * m, 1)),
        })
    }
}

/// Which check: the stable id (serialised in kebab-case, as `check --json` prints it) with,
/// in one place, its title and the unit of its margin.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum CheckId {
    /// The relaxed segment passes the smallest bore.
    Fit,
    /// The strips reach the wall at the largest bore within the actuator's stroke.
    Reach,
    /// The holding force at the largest bore meets the load times the safety factor.
    Hold,
    /// Static stress at the smallest bore.
    Static,
    /// Fatigue (Goodman, zero-to-peak) at the smallest bore.
    Fatigue,
    /// Actuator force or torque within its rating.
    Actuator,
    /// Operating stroke within the actuator and short of the model's limit.
    Stroke,
    /// Strips clear each other on the hub.
    Hub,
    /// Load sharing: the top strip still touches the wall at the operating stroke (only
    /// designs with a radial load or an out-of-round bore produce it).
    TopStrip,
    /// Load sharing: the relaxed segment passes the pipe's bend (only designs with a bend).
    Bend,
    /// Actuation: the operating point is stable (only designs operated by pull or torque).
    Stable,
}

impl CheckId {
    /// The eight checks every design gets, in the order [`run`] gives them.
    pub const BASIC: [CheckId; 8] = [
        CheckId::Fit,
        CheckId::Reach,
        CheckId::Hold,
        CheckId::Static,
        CheckId::Fatigue,
        CheckId::Actuator,
        CheckId::Stroke,
        CheckId::Hub,
    ];

    /// The stable id, as `check --json` prints it.
    pub fn as_str(self) -> &'static str {
        match self {
            CheckId::Fit => "fit",
            CheckId::Reach => "reach",
            CheckId::Hold => "hold",
            CheckId::Static => "static",
            CheckId::Fatigue => "fatigue",
            CheckId::Actuator => "actuator",
            CheckId::Stroke => "stroke",
            CheckId::Hub => "hub",
            CheckId::TopStrip => "top-strip",
            CheckId::Bend => "bend",
            CheckId::Stable => "stable",
        }
    }

    /// What is checked, in words.
    pub fn title(self) -> &'static str {
        match self {
            CheckId::Fit => "passes the smallest bore when relaxed",
            CheckId::Reach => "reaches the wall at the largest bore",
            CheckId::Hold => "holds the required load at the largest bore",
            CheckId::Static => "static stress at the smallest bore",
            CheckId::Fatigue => "fatigue (Goodman, zero-to-peak) at the smallest bore",
            CheckId::Actuator => "actuator force or torque within rating",
            CheckId::Stroke => "operating stroke within the actuator and short of the limit",
            CheckId::Hub => "strips clear each other on the hub",
            CheckId::TopStrip => "the top strip touches at the operating stroke",
            CheckId::Bend => "passes the bend when relaxed",
            CheckId::Stable => "stable at the operating point",
        }
    }

    /// Unit of the check's margin.
    pub fn unit(self) -> MarginUnit {
        match self {
            CheckId::Fit
            | CheckId::Reach
            | CheckId::Stroke
            | CheckId::Hub
            | CheckId::TopStrip
            | CheckId::Bend => MarginUnit::Mm,
            CheckId::Hold
            | CheckId::Static
            | CheckId::Fatigue
            | CheckId::Actuator
            | CheckId::Stable => MarginUnit::Ratio,
        }
    }
}

impl std::fmt::Display for CheckId {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.pad(self.as_str())
    }
}

/// One check of a design. Serialises as `check --json` prints it: `id, title, pass,
/// margin, unit, reason, bore_mm, stroke_mm`, the title and unit from the id.
#[derive(Clone, Debug, PartialEq)]
pub struct Check {
    /// Which check.
    pub id: CheckId,
    /// Whether the check passes.
    pub pass: bool,
    /// Margin in the id's unit; `None` where it cannot be formed (e.g. the bore is out of
    /// reach).
    pub margin: Option<f64>,
    /// One line saying why.
    pub reason: String,
    /// Bore the check is judged at, mm (none for the hub check).
    pub bore_mm: Option<f64>,
    /// Stroke the check is judged at, mm.
    pub stroke_mm: Option<f64>,
}

impl Check {
    /// What is checked, in words: `id.title()`, except for a static or fatigue check that
    /// a set pull or torque moved to the largest bore (its reason starts with
    /// [`JUDGED_AT_LARGEST`]), whose title names that bore.
    pub fn title(&self) -> &'static str {
        match self.id {
            CheckId::Static if self.reason.starts_with(JUDGED_AT_LARGEST) => {
                "static stress at the largest bore"
            }
            CheckId::Fatigue if self.reason.starts_with(JUDGED_AT_LARGEST) => {
                "fatigue (Goodman, zero-to-peak) at the largest bore"
            }
            _ => self.id.title(),
        }
    }

    /// Unit of the margin (`id.unit()`).
    pub fn unit(&self) -> MarginUnit {
        self.id.unit()
    }

    /// The margin in words, signed, `None` where no margin can be formed: a length margin
    /// in mm to 3 decimals (`+0.125 mm`), a ratio margin in per cent to 1 decimal
    /// (`+42.0 %`, for capacity 1.42 times the demand). The one margin formatter of the
    /// command line, the app and the sheet.
    pub fn margin_text(&self) -> Option<String> {
        self.unit().margin_text(self.margin?)
    }

    /// [`Check::margin_text`] in display units: a length margin in inches to 4 decimals
    /// (`+0.0049 in`) when `units` is inches; a ratio margin reads the same in both. In
    /// metric exactly `margin_text`.
    pub fn margin_text_in(&self, units: UnitSystem) -> Option<String> {
        match self.unit() {
            MarginUnit::Mm if !units.is_metric() => {
                let m = Some(self.margin?).filter(|m| m.is_finite())?;
                let shown = units.to_display(Quantity::Length, m);
                Some(format!(
                    "{:+.4} {}",
                    no_negative_zero(shown, 4),
                    units.unit(Quantity::Length)
                ))
            }
            _ => self.margin_text(),
        }
    }
}

/// `v`, or `0.0` where it rounds to zero at `decimals` places (so no `-0.000` prints).
fn no_negative_zero(v: f64, decimals: i32) -> f64 {
    if (v * 10f64.powi(decimals)).round() == 0.0 {
        0.0
    } else {
        v
    }
}

impl Serialize for Check {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        #[derive(Serialize)]
        struct Out<'a> {
            id: CheckId,
            title: &'static str,
            pass: bool,
            margin: Option<f64>,
            unit: MarginUnit,
            reason: &'a str,
            bore_mm: Option<f64>,
            stroke_mm: Option<f64>,
        }
        Out {
            id: self.id,
            title: self.title(),
            pass: self.pass,
            margin: self.margin,
            unit: self.unit(),
            reason: &self.reason,
            bore_mm: self.bore_mm,
            stroke_mm: self.stroke_mm,
        }
        .serialize(serializer)
    }
}

impl Check {
    /// A check of `id` judged at `bore_mm` and `stroke_mm`.
    pub(crate) fn new(
        id: CheckId,
        pass: bool,
        margin: Option<f64>,
        reason: String,
        bore_mm: Option<f64>,
        stroke_mm: Option<f64>,
    ) -> Check {
        Check {
            id,
            pass,
            margin,
            reason,
            bore_mm,
            stroke_mm,
        }
    }
}

/// Every check of a segment, in a fixed order: the centred checks, amended by load
/// sharing when the design uses it ([`crate::sharing::checks::amend`]).
pub fn run(seg: &Segment) -> Vec<Check> {
    let mut out = run_centred(seg);
    crate::sharing::checks::amend(seg, &mut out);
    out
}

/// The eight checks of the centred model (every strip carries the same share), in a fixed
/// order. Fast; the app shows these at once and the load-sharing ones when they are ready.
pub fn run_centred(seg: &Segment) -> Vec<Check> {
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
    let mut out = Vec::with_capacity(CheckId::BASIC.len());

    // 1. Fits when relaxed, at the smallest bore; in an out-of-round bore (an ellipse with
    //    diameters D + o/2 and D - o/2, the mechanics note) across its least diameter.
    let need = seg.relaxed_diameter_mm() + 1.0;
    let oval = d.bore.out_of_round_mm;
    let least = small - 0.5 * oval;
    let fit_margin = least - need;
    out.push(Check::new(
        CheckId::Fit,
        fit_margin >= 0.0,
        Some(fit_margin),
        if oval > 0.0 {
            format!(
                "relaxed diameter {:.2} mm (plates {:.2} mm, strips {:.2} mm) + 1 mm clearance vs the least diameter of the smallest bore, {:.2} mm ({:.2} mm less half the out-of-roundness {:.2} mm)",
                seg.relaxed_diameter_mm(),
                d.end_plate_diameter_mm,
                seg.outer_diameter_mm(0.0),
                least,
                small,
                oval
            )
        } else {
            format!(
                "relaxed diameter {:.2} mm (plates {:.2} mm, strips {:.2} mm) + 1 mm clearance vs smallest bore {:.2} mm",
                seg.relaxed_diameter_mm(),
                d.end_plate_diameter_mm,
                seg.outer_diameter_mm(0.0),
                small
            )
        },
        Some(small),
        Some(0.0),
    ));

    // 2. Reaches the wall at the largest bore within the actuator's stroke.
    let large_path = seg.at_bore(large);
    let reach = match &large_path {
        Ok(p) => match p.first_contact_stroke_mm() {
            Some(fc) => Check::new(
                CheckId::Reach,
                actuation::travel_at_mm(p, fc) <= max_stroke,
                Some(max_stroke - actuation::travel_at_mm(p, fc)),
                match p.stress_limit_stroke_mm().ok().filter(|&s| s < fc) {
                    Some(s) => format!(
                        "first contact at {fc:.3} mm stroke{} vs actuator maximum {max_stroke:.3} mm; the strips reach their stress limit at {s:.3} mm, before they touch the wall",
                        actuation::travel_note(p, fc)
                    ),
                    None => format!(
                        "first contact at {fc:.3} mm stroke{} vs actuator maximum {max_stroke:.3} mm",
                        actuation::travel_note(p, fc)
                    ),
                },
                Some(large),
                Some(fc),
            ),
            None => Check::new(
                CheckId::Reach,
                false,
                None,
                format!(
                    "bore {large:.2} mm is out of reach: the strips can reach at most {:.2} mm",
                    seg.largest_reachable_bore_mm()
                ),
                Some(large),
                None,
            ),
        },
        Err(e) => no_state(CheckId::Reach, large, None, e),
    };
    out.push(reach);

    // 3. Holding force at the largest bore at the operating stroke.
    let required = seg.required_holding_force_n();
    let hold = match &large_path {
        Ok(p) => {
            let operating = actuation::operating_state(p);
            let (op, s) = (operating.stroke_mm, operating.state);
            match s.holding_force_n {
                Some(h) if required > 0.0 => Check::new(
                    CheckId::Hold,
                    h >= required,
                    Some(h / required - 1.0),
                    format!(
                        "holding force {h:.2} N ({}) vs {:.2} N x safety factor {:.2} = {required:.2} N",
                        s.phase, d.duty.holding_force_n, d.duty.safety_factor
                    ),
                    Some(large),
                    op,
                ),
                Some(h) => Check::new(
                    CheckId::Hold,
                    true,
                    None,
                    format!("no holding force required; the segment holds {h:.2} N"),
                    Some(large),
                    op,
                ),
                None => beyond(CheckId::Hold, large, op, &s),
            }
        }
        Err(e) => no_state(CheckId::Hold, large, set_op, e),
    };
    out.push(hold);

    // 4-7 at the smallest bore and the operating stroke.
    match seg.at_bore(small) {
        Ok(p) => {
            let operating = actuation::operating_state(&p);
            let (op, s) = (operating.stroke_mm, &operating.state);
            for id in [CheckId::Static, CheckId::Fatigue] {
                let here = stress_check(seg, s, small, op, id);
                out.push(worse_under_set_pull(seg, here, large, id));
            }
            out.push(actuator_check(seg, s, small, op));
            out.push(match (op, operating.travel_mm) {
                (Some(op), Some(travel)) => {
                    let limit = p.limit_stroke_mm();
                    let margin = (max_stroke - travel).min(limit - op);
                    Check::new(
                        CheckId::Stroke,
                        travel <= max_stroke && op < limit,
                        Some(margin),
                        format!(
                            "operating {op:.3} mm{} vs actuator maximum {max_stroke:.3} mm and model limit {limit:.3} mm ({})",
                            actuation::travel_note(&p, op),
                            p.limit_reason().describe()
                        ),
                        Some(small),
                        Some(op),
                    )
                }
                _ => beyond(CheckId::Stroke, small, op, s),
            });
        }
        Err(e) => {
            for id in [
                CheckId::Static,
                CheckId::Fatigue,
                CheckId::Actuator,
                CheckId::Stroke,
            ] {
                out.push(no_state(id, small, set_op, &e));
            }
        }
    }

    // 8. Strips clear each other on the hub.
    let n = f64::from(d.strip.count);
    let room = 2.0 * d.mount_radius_mm * (PI / n).tan();
    out.push(Check::new(
        CheckId::Hub,
        d.strip.width_mm <= room,
        Some(room - d.strip.width_mm),
        format!(
            "strip width {:.2} mm vs room 2 r tan(pi/N) = {room:.2} mm for {} strips at radius {:.2} mm",
            d.strip.width_mm, d.strip.count, d.mount_radius_mm
        ),
        None,
        Some(0.0),
    ));
    // 9. Stable at the operating point: only for force control or a compliant drive.
    if d.uses_actuation() {
        out.push(actuation::stable_check(seg));
    }
    out
}

/// How the reason of a stress check moved to the largest bore begins (see
/// [`Check::title`]).
pub const JUDGED_AT_LARGEST: &str = "judged at the largest bore";

/// The static or the fatigue check (`id`) of the state `s`.
/// Under a set pull or torque the stroke is longest, and so the stress highest, in the
/// largest bore, not the smallest where a fixed stroke stresses the strips most. There the
/// stress checks are judged at whichever end of the bore tolerance gives the smaller margin,
/// and the reason says so; under a fixed stroke `at_smallest` is returned unchanged.
fn worse_under_set_pull(seg: &Segment, at_smallest: Check, large: f64, id: CheckId) -> Check {
    if !actuation::Drive::of(seg).is_force_controlled() {
        return at_smallest;
    }
    let Ok(p) = seg.at_bore(large) else {
        return at_smallest;
    };
    let o = actuation::operating_state(&p);
    let mut there = stress_check(seg, &o.state, large, o.stroke_mm, id);
    let worse = match (at_smallest.margin, there.margin) {
        (Some(a), Some(b)) => b < a,
        _ => at_smallest.pass && !there.pass,
    };
    if !worse {
        return at_smallest;
    }
    there.reason = format!(
        "{JUDGED_AT_LARGEST}, {large:.3} mm, not the smallest: under a set pull the stroke, and the stress, is largest there; {}",
        there.reason
    );
    there
}

fn stress_check(seg: &Segment, s: &SegmentState, bore: f64, op: Option<f64>, id: CheckId) -> Check {
    let is_static = id == CheckId::Static;
    let (Some(stress), Some(fos)) = (
        s.max_stress_mpa,
        if is_static {
            s.static_safety_factor
        } else {
            s.fatigue_safety_factor
        },
    ) else {
        return beyond(id, bore, op, s);
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
    Check::new(id, fos >= 1.0, Some(fos - 1.0), reason, Some(bore), op)
}

fn actuator_check(seg: &Segment, s: &SegmentState, bore: f64, op: Option<f64>) -> Check {
    let Some(reading) = s.actuator else {
        return beyond(CheckId::Actuator, bore, op, s);
    };
    let rating = seg.actuator_effort_rating();
    let need = reading.effort;
    let margin = if need > 0.0 {
        rating / need - 1.0
    } else {
        f64::INFINITY
    };
    let unit = reading.effort_unit;
    Check::new(
        CheckId::Actuator,
        need <= rating,
        margin.is_finite().then_some(margin),
        format!("needs {need:.3} {unit} vs rating {rating:.3} {unit}"),
        Some(bore),
        op,
    )
}

/// A check with no state to judge at the operating stroke (past the model's limit, or a
/// failed solve): the state's own reason.
fn beyond(id: CheckId, bore: f64, op: Option<f64>, s: &SegmentState) -> Check {
    Check::new(
        id,
        false,
        None,
        s.reason
            .clone()
            .unwrap_or_else(|| "no state at the operating stroke".to_string()),
        Some(bore),
        op,
    )
}

/// A check whose bore the relaxed segment does not fit.
fn no_state(id: CheckId, bore: f64, op: Option<f64>, e: &SegmentError) -> Check {
    Check::new(id, false, None, e.to_string(), Some(bore), op)
}

/// Index of the check that limits the design: the failing check with the most negative
/// ratio margin (or the first failing one), else the passing ratio check with the least margin.
pub fn limiting(checks: &[Check]) -> Option<usize> {
    let key = |c: &Check| c.margin.unwrap_or(f64::NEG_INFINITY);
    let pick = |pass: bool| {
        checks
            .iter()
            .enumerate()
            .filter(|(_, c)| c.pass == pass && (c.unit() == MarginUnit::Ratio || !pass))
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
/// they do not. Not one of the contract's checks: the checks judge the model of
/// docs/mechanics.md;
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
