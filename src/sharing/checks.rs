//! The design checks that load sharing changes or adds (issue 17; the contract's "Checks"
//! table and its last section). When a design uses a load-sharing field (a radial load, an
//! out-of-round bore or a bend), each check is judged at its own bore on the governing case
//! over clocking and major axis: reach becomes "the strips lift the hub off its rest within
//! the actuator's stroke" at the largest bore; holding sums friction over the strips in
//! contact at the largest bore; static stress, fatigue, the actuator and the operating
//! stroke are judged on the worst strip at the smallest bore; `top-strip` says whether the
//! top strip touches at the operating stroke (a segment gripping on only part of its strips
//! is named as such, and fails only when holding fails); `bend` says whether the relaxed
//! segment passes the bend. A design without those fields keeps the centred checks exactly.
//! Mechanics only: no GUI, PDF or file code.

use crate::checks::{Check, CheckId};
use crate::segment::Segment;

use super::entry::{
    BoreCases, CaseChoice, LoadedPoint, SharingChecks, checks_with, design_uses_sharing, loading_of,
};
use super::{BoreStrokes, Clocking, Loading, MajorAxis, SharingError};

/// Replaces the centred checks that load sharing changes and appends `top-strip` and (when
/// the design gives a bend) `bend`. Does nothing for a design without load-sharing fields,
/// so its checks stay exactly as they were.
pub fn amend(seg: &Segment, checks: &mut Vec<Check>) {
    if !design_uses_sharing(&seg.design) {
        return;
    }
    amend_loading(seg, &loading_of(&seg.design), checks);
}

/// [`amend`] under any loading (e.g. the design's with unequal strips), whether or not the
/// design uses a load-sharing field: every state and stroke solved in full.
pub fn amend_loading(seg: &Segment, loading: &Loading, checks: &mut Vec<Check>) {
    amend_by(seg, loading, checks, |small, large, op_small, op_large| {
        let l = checks_with(seg, small, large, op_small, op_large)?;
        Ok(Judged {
            small_strokes: case_strokes(small),
            large_strokes: case_strokes(large),
            sharing: l,
        })
    });
}

/// What the amended checks read: the three judged points and every case's strokes at the
/// smallest and the largest bore (in the order of [`BoreCases::each`]).
pub(crate) struct Judged {
    /// The judged points (stress, holding, top strip).
    pub sharing: SharingChecks,
    /// Strokes of each case at the smallest bore (or why there are none).
    pub small_strokes: CaseStrokes,
    /// Strokes of each case at the largest bore.
    pub large_strokes: CaseStrokes,
}

/// Each case's clocking, major axis and bore-level strokes (or why there are none).
pub(crate) type CaseStrokes = Vec<(Clocking, MajorAxis, Result<BoreStrokes, String>)>;

fn case_strokes(cases: &BoreCases<'_>) -> CaseStrokes {
    cases
        .each()
        .map(|(c, a, l)| (c, a, l.strokes().map_err(|e| e.to_string())))
        .collect()
}

/// [`amend`]'s rules with the judged points and strokes from `judge` (given the cases set
/// up at the smallest and the largest bore and the operating stroke at each).
pub(crate) fn amend_by(
    seg: &Segment,
    loading: &Loading,
    checks: &mut Vec<Check>,
    judge: impl FnOnce(&BoreCases<'_>, &BoreCases<'_>, f64, f64) -> Result<Judged, SharingError>,
) {
    let all = CaseChoice::default();
    let (op_small, op_large) = (
        operating_stroke_at(seg, seg.bore_smallest_mm),
        operating_stroke_at(seg, seg.bore_largest_mm),
    );
    let cases =
        BoreCases::with_loading(seg, loading, seg.bore_smallest_mm, all).and_then(|small| {
            let large = BoreCases::with_loading(seg, loading, seg.bore_largest_mm, all)?;
            Ok((small, large))
        });
    let loaded = match (&cases, op_small, op_large) {
        (Ok((small, large)), Some(op_small), Some(op_large)) => {
            judge(small, large, op_small, op_large).map_err(|e| e.to_string())
        }
        (Err(e), _, _) => Err(e.to_string()),
        _ => Err("the actuator's set pull is never reached at the smallest or the largest bore, so there is no operating stroke to judge".to_string()),
    };
    let unreached = op_small.is_none() || op_large.is_none();
    let replace = |checks: &mut Vec<Check>, new: Check| {
        if let Some(c) = checks.iter_mut().find(|c| c.id == new.id) {
            *c = new;
        }
    };
    match loaded {
        Ok(j) => {
            let l = &j.sharing;
            replace(checks, reach(seg, loading, &j.large_strokes));
            let hold = hold(seg, &l.holding);
            let hold_pass = hold.pass;
            replace(checks, hold);
            for c in stress_checks(seg, &l.stress) {
                replace(checks, c);
            }
            replace(checks, stroke(seg, loading, &l.stress, &j.small_strokes));
            checks.push(top_strip(&l.top_strip, hold_pass));
        }
        Err(e) => {
            // No operating stroke (the centred checks already say why), or no loaded
            // state: every check that needs one says why and fails.
            let why = if unreached {
                e
            } else {
                format!("load sharing could not be solved: {e}")
            };
            for c in checks.iter_mut().filter(|c| {
                !unreached
                    && matches!(
                        c.id,
                        CheckId::Reach
                            | CheckId::Hold
                            | CheckId::Static
                            | CheckId::Fatigue
                            | CheckId::Actuator
                            | CheckId::Stroke
                    )
            }) {
                c.pass = false;
                c.margin = None;
                c.reason = why.clone();
            }
            checks.push(Check {
                id: CheckId::TopStrip,
                pass: false,
                margin: None,
                reason: why,
                bore_mm: Some(seg.bore_largest_mm),
                stroke_mm: op_large,
            });
        }
    }
    if let Some(b) = bend(seg) {
        checks.push(b);
    }
}

/// The operating stroke at `bore_mm`, mm: the design's stroke, or under a set pull or
/// torque the stroke at which the centred model reaches it there (`None`: never). Under
/// load sharing the strips' pull is summed over unequal strips; the set pull is matched on
/// the centred curve, which the off-centre hub changes little while the strips carry the
/// load (not modelled further here).
pub fn operating_stroke_at(seg: &Segment, bore_mm: f64) -> Option<f64> {
    let path = seg.at_bore(bore_mm).ok()?;
    crate::actuation::operating_stroke_mm(&path)
}

/// The case in words: what sits on the load line and the major axis (when out of round).
fn case_words(loading: &Loading, clocking: Clocking, axis: MajorAxis) -> String {
    let what = match clocking {
        Clocking::Strip => "a strip",
        Clocking::Gap => "a gap",
    };
    if loading.out_of_round_mm > 0.0 {
        format!("{what} on the load line, major axis {}", axis.name())
    } else {
        format!("{what} on the load line")
    }
}

/// Reach under load sharing, at the largest bore: the strips must lift the hub off its rest
/// (carry all of the radial load) within the actuator's maximum stroke, in every case; with
/// no radial load, the first strip must touch. The worst case (the latest lift-off) governs.
fn reach(seg: &Segment, loading: &Loading, large_cases: &CaseStrokes) -> Check {
    let large = seg.bore_largest_mm;
    let max_stroke = seg.max_stroke_mm();
    let loaded = loading.radial_load_n > 0.0;
    let fail = |reason: String, stroke: Option<f64>| Check {
        id: CheckId::Reach,
        pass: false,
        margin: None,
        reason,
        bore_mm: Some(large),
        stroke_mm: stroke,
    };
    // The latest lift-off over the cases (`None` in a case: never, which governs).
    let mut worst: Option<(f64, String)> = None;
    for (clocking, axis, strokes) in large_cases {
        let words = case_words(loading, *clocking, *axis);
        let strokes: BoreStrokes = match strokes {
            Ok(s) => *s,
            Err(e) => return fail(format!("{words}: {e}"), None),
        };
        let Some(first) = strokes.first_strip_contact_stroke_mm else {
            return fail(
                format!(
                    "bore {large:.2} mm is out of reach: the strips can reach at most {:.2} mm ({words})",
                    seg.largest_reachable_bore_mm()
                ),
                None,
            );
        };
        let at = if loaded {
            strokes.lift_off_stroke_mm
        } else {
            Some(first)
        };
        let Some(at) = at else {
            return fail(
                format!(
                    "the strips do not lift the hub off its rest before the model's limit at {:.3} mm stroke ({words}; the first strip touches at {first:.3} mm)",
                    strokes.limit_stroke_mm
                ),
                None,
            );
        };
        if worst.as_ref().is_none_or(|(s, _)| at > *s) {
            worst = Some((at, words));
        }
    }
    let Some((at, words)) = worst else {
        return fail("no case to judge".into(), None);
    };
    let what = if loaded {
        format!(
            "the strips lift the hub off its rest (they carry all {:.2} N) at {at:.3} mm stroke",
            loading.radial_load_n
        )
    } else {
        format!("the first strip touches at {at:.3} mm stroke")
    };
    // Through a compliant drive the actuator's maximum is of travel, as in the centred
    // reach check (the pull from the centred curve at that stroke, as for the operating
    // stroke under a set pull); a rigid drive's travel is the stroke itself.
    let (travel, note) = match seg.at_bore(large) {
        Ok(p) => (
            crate::actuation::travel_at_mm(&p, at),
            crate::actuation::travel_note(&p, at),
        ),
        Err(_) => (at, String::new()),
    };
    Check {
        id: CheckId::Reach,
        pass: travel <= max_stroke,
        margin: Some(max_stroke - travel),
        reason: format!(
            "{what}{note} vs actuator maximum {max_stroke:.3} mm (worst case: {words})"
        ),
        bore_mm: Some(large),
        stroke_mm: Some(at),
    }
}

/// Beyond the limit, or strips off the wall: the reason a state cannot be judged.
fn no_judgement(p: &LoadedPoint) -> String {
    if p.beyond_limit {
        p.segment_state
            .reason
            .clone()
            .unwrap_or_else(|| "beyond the model's limit at the operating stroke".into())
    } else {
        p.segment_state
            .reason
            .clone()
            .unwrap_or_else(|| "no state at the operating stroke".into())
    }
}

/// Holding at the largest bore: friction times the contact forces summed over the strips
/// in contact, the case with the least holding.
/// A check of `id` at the point's bore and stroke that could not be judged there (the
/// reason says why); the judged checks start from it and fill in verdict and margin.
fn unjudged(id: CheckId, p: &LoadedPoint) -> Check {
    Check {
        id,
        pass: false,
        margin: None,
        reason: no_judgement(p),
        bore_mm: Some(p.bore_mm),
        stroke_mm: Some(p.stroke_mm),
    }
}

fn hold(seg: &Segment, p: &LoadedPoint) -> Check {
    let d = &seg.design;
    let required = seg.required_holding_force_n();
    let base = unjudged(CheckId::Hold, p);
    let Some(c) = &p.checks else {
        return base;
    };
    let h = c.holding_force_n;
    let over = format!(
        "summed over the {} of {} strips in contact",
        c.strips_in_contact, c.strips
    );
    if required > 0.0 {
        Check {
            pass: h >= required,
            margin: Some(h / required - 1.0),
            reason: format!(
                "holding force {h:.2} N {over} vs {:.2} N x safety factor {:.2} = {required:.2} N ({})",
                d.duty.holding_force_n, d.duty.safety_factor, p.governing
            ),
            ..base
        }
    } else {
        Check {
            pass: true,
            reason: format!("no holding force required; the segment holds {h:.2} N {over}"),
            ..base
        }
    }
}

/// Static stress, fatigue and the actuator at the smallest bore, on the worst strip of the
/// case with the highest stress.
fn stress_checks(seg: &Segment, p: &LoadedPoint) -> Vec<Check> {
    let s = &p.segment_state;
    let bore = Some(p.bore_mm);
    let stroke = Some(p.stroke_mm);
    let fail = |id: CheckId| Check {
        id,
        pass: false,
        margin: None,
        reason: no_judgement(p),
        bore_mm: bore,
        stroke_mm: stroke,
    };
    let (Some(c), Some(stress), Some(fs), Some(ff)) = (
        &p.checks,
        s.max_stress_mpa,
        s.static_safety_factor,
        s.fatigue_safety_factor,
    ) else {
        return vec![
            fail(CheckId::Static),
            fail(CheckId::Fatigue),
            fail(CheckId::Actuator),
        ];
    };
    let worst = format!("worst strip at {:.0} deg", c.worst_strip_clock_deg);
    let mut out = vec![
        Check {
            id: CheckId::Static,
            pass: fs >= 1.0,
            margin: Some(fs - 1.0),
            reason: format!(
                "{worst}: peak stress {stress:.1} MPa vs 0.75 x tensile = {:.1} MPa: factor of safety {fs:.3} ({})",
                seg.static_allowable_mpa, p.governing
            ),
            bore_mm: bore,
            stroke_mm: stroke,
        },
        Check {
            id: CheckId::Fatigue,
            pass: ff >= 1.0,
            margin: Some(ff - 1.0),
            reason: format!(
                "{worst}: peak {stress:.1} MPa, zero-to-peak, vs fatigue strength {:.1} MPa at {} cycles and tensile {:.0} MPa: Goodman factor of safety {ff:.3}",
                seg.fatigue_strength_mpa,
                crate::checks::grouped_count(seg.design.duty.cycles),
                seg.material.tensile_strength_mpa
            ),
            bore_mm: bore,
            stroke_mm: stroke,
        },
    ];
    out.push(match s.actuator {
        Some(reading) => {
            let rating = seg.actuator_effort_rating();
            let need = reading.effort;
            let margin = if need > 0.0 {
                rating / need - 1.0
            } else {
                f64::INFINITY
            };
            let unit = reading.effort_unit;
            Check {
                id: CheckId::Actuator,
                pass: need <= rating,
                margin: margin.is_finite().then_some(margin),
                reason: format!(
                    "needs {need:.3} {unit} (the strips' axial forces summed) vs rating {rating:.3} {unit}"
                ),
                bore_mm: bore,
                stroke_mm: stroke,
            }
        }
        None => fail(CheckId::Actuator),
    });
    out
}

/// The operating stroke at the smallest bore: within the actuator and short of the
/// segment's limit (the first strip to reach its own), the earliest limit over the cases.
fn stroke(seg: &Segment, loading: &Loading, p: &LoadedPoint, small_cases: &CaseStrokes) -> Check {
    let op = p.stroke_mm;
    let max_stroke = seg.max_stroke_mm();
    let mut limit = p.limit_stroke_mm;
    let mut words = String::from("the governing stress case");
    for (clocking, axis, strokes) in small_cases {
        if let Ok(s) = strokes
            && s.limit_stroke_mm < limit
        {
            limit = s.limit_stroke_mm;
            words = case_words(loading, *clocking, *axis);
        }
    }
    Check {
        id: CheckId::Stroke,
        pass: op <= max_stroke && op < limit,
        margin: Some((max_stroke - op).min(limit - op)),
        reason: format!(
            "operating {op:.3} mm vs actuator maximum {max_stroke:.3} mm and the segment's limit {limit:.3} mm, where the first strip reaches its own ({words})"
        ),
        bore_mm: Some(p.bore_mm),
        stroke_mm: Some(op),
    }
}

/// Whether the top strip touches at the operating stroke at the largest bore, in the case
/// with the fewest strips touching. A segment gripping on only part of its strips is named
/// as such and fails only when holding fails. Margin: the operating stroke minus the stroke
/// at which the last strip touches, mm, when the top strip touches; none when it does not.
fn top_strip(p: &LoadedPoint, hold_pass: bool) -> Check {
    let base = unjudged(CheckId::TopStrip, p);
    let Some(c) = &p.checks else {
        return base;
    };
    let last = p.last_strip_contact_stroke_mm;
    let margin = last.map(|s| p.stroke_mm - s);
    let last_words = match last {
        Some(s) => format!("the last strip touches at {s:.3} mm stroke"),
        None => "the last strip does not touch before the model's limit".to_string(),
    };
    if c.top_strip_touches {
        Check {
            pass: true,
            margin,
            reason: format!(
                "the top strip touches: {} of {} strips grip ({last_words})",
                c.strips_in_contact, c.strips
            ),
            ..base
        }
    } else {
        let held = if hold_pass {
            "holding passes, so this is not a failure"
        } else {
            "and holding fails"
        };
        // No margin: the stroke at which the top strip would touch lies past the operating
        // stroke, and a segment that holds is not failed for it.
        Check {
            pass: hold_pass,
            margin: None,
            reason: format!(
                "grips on {} of {} strips: the top strip does not touch the wall at the operating stroke ({last_words}); {held} ({})",
                c.strips_in_contact, c.strips, p.governing
            ),
            ..base
        }
    }
}

/// The bend check when the design gives a bend.
pub fn bend(seg: &Segment) -> Option<Check> {
    let result = super::entry::bend_passage(seg)?;
    let small = seg.bore_smallest_mm;
    Some(match result {
        Ok(b) => Check {
            id: CheckId::Bend,
            pass: b.passes,
            margin: Some(b.margin_mm),
            reason: b.reason,
            bore_mm: Some(small),
            stroke_mm: Some(0.0),
        },
        Err(e) => Check {
            id: CheckId::Bend,
            pass: false,
            margin: None,
            reason: e.to_string(),
            bore_mm: Some(small),
            stroke_mm: Some(0.0),
        },
    })
}
