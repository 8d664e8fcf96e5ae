//! The designer's fitting helper, a search over one design variable (thickness, strip
//! count, free length, mount radius or operating stroke): find the values at which every
//! check passes and offer one of them, either where the segment just holds the required
//! load at the largest bore (the least material, the shortest stroke) or in the middle of
//! the passing range, rounded to a step the designer works in; or say which check stands
//! in the way. The range searched is the file's plausible range ([`design::limits`]),
//! narrowed only where the rest of the design makes values meaningless. A scan with the
//! cheap [`checks::run`], then bisection at the edges. No GUI types: the app runs it on a
//! worker thread.

use crate::checks::{self, Check, CheckId};
use crate::design::{self, Design, Operating};
use crate::segment::Segment;

/// Samples in the first scan.
const SCAN_POINTS: usize = 241;
/// Bisection steps at an edge (the bracket shrinks by 2^-40).
const BISECTION_STEPS: usize = 40;

/// The variable to fit.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FitVar {
    /// Strip thickness, mm.
    Thickness,
    /// Number of strips.
    Count,
    /// Strip free length, mm.
    FreeLength,
    /// Mount radius, mm.
    MountRadius,
    /// Operating stroke, mm.
    OperatingStroke,
}

impl FitVar {
    /// All variables in menu order.
    pub const ALL: [FitVar; 5] = [
        FitVar::Thickness,
        FitVar::Count,
        FitVar::FreeLength,
        FitVar::MountRadius,
        FitVar::OperatingStroke,
    ];

    /// Menu label.
    pub fn label(self) -> &'static str {
        match self {
            FitVar::Thickness => "strip thickness",
            FitVar::Count => "number of strips",
            FitVar::FreeLength => "free length",
            FitVar::MountRadius => "mount radius",
            FitVar::OperatingStroke => "operating stroke",
        }
    }

    /// The field's path in the design file (its row of [`design::limits`]).
    pub fn field(self) -> &'static str {
        match self {
            FitVar::Thickness => "strip.thickness_mm",
            FitVar::Count => "strip.count",
            FitVar::FreeLength => "strip.free_length_mm",
            FitVar::MountRadius => "mount_radius_mm",
            FitVar::OperatingStroke => "operating_stroke_mm",
        }
    }

    /// Unit of the value.
    pub fn unit(self) -> &'static str {
        match self {
            FitVar::Count => "strips",
            _ => "mm",
        }
    }

    /// The variable's value in a design.
    pub fn get(self, d: &Design) -> f64 {
        match self {
            FitVar::Thickness => d.strip.thickness_mm,
            FitVar::Count => f64::from(d.strip.count),
            FitVar::FreeLength => d.strip.free_length_mm,
            FitVar::MountRadius => d.mount_radius_mm,
            FitVar::OperatingStroke => set_stroke_mm(d),
        }
    }

    /// A copy of `d` with the variable set to `v` (a count rounded to whole strips within
    /// the file's range).
    pub fn with(self, d: &Design, v: f64) -> Design {
        let mut out = d.clone();
        match self {
            FitVar::Thickness => out.strip.thickness_mm = v,
            FitVar::Count => {
                let (lo, hi) = design::limit(self.field()).map_or((3.0, 64.0), |l| (l.min, l.max));
                out.strip.count = v.round().clamp(lo, hi) as u32;
            }
            FitVar::FreeLength => out.strip.free_length_mm = v,
            FitVar::MountRadius => out.mount_radius_mm = v,
            FitVar::OperatingStroke => out.set_operating(Operating::Stroke(v)),
        }
        out
    }

    /// The range searched and whether it is scanned on a log scale: the field's plausible
    /// range in [`design::limits`] for this design, narrowed where the rest of the design
    /// rules values out (a strip no thicker than it is wide, a free length longer than
    /// the operating stroke, a mount radius inside the bore, a stroke the actuator gives
    /// and the model covers at the smallest bore).
    pub fn range(self, d: &Design) -> (f64, f64, bool) {
        let (lo, hi) = design::limit(self.field()).map_or((0.0, 0.0), |l| (l.min, l.max_for(d)));
        let bore = d.bore.nominal_mm().unwrap_or(d.bore.diameter_mm);
        match self {
            FitVar::Thickness => (lo, hi.min(d.strip.width_mm), true),
            FitVar::Count => (lo, hi, false),
            FitVar::FreeLength => (lo.max(1.01 * set_stroke_mm(d)), hi, true),
            FitVar::MountRadius => (lo, hi.min(0.5 * bore), true),
            FitVar::OperatingStroke => {
                let reach = Segment::new(d)
                    .ok()
                    .map(|seg| {
                        // Through a compliant drive the maximum is of travel.
                        seg.at_bore(seg.bore_smallest_mm)
                            .map_or(seg.max_stroke_mm(), |p| crate::actuation::sweep_end_mm(&p))
                    })
                    .unwrap_or(f64::INFINITY);
                (lo, hi.min(reach), false)
            }
        }
    }
}

/// The set stroke under displacement control, mm; 0 under force control (where the stroke
/// follows from the pull at each bore).
fn set_stroke_mm(d: &Design) -> f64 {
    match d.operating() {
        Operating::Stroke(s) => s,
        Operating::Pull(_) | Operating::Torque(_) => 0.0,
    }
}

/// Where in the passing range the fit lands.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum FitAim {
    /// Where the segment just holds the required load at the largest bore.
    #[default]
    HoldingEdge,
    /// The middle of the passing range around that edge (geometric middle on a log
    /// scale), the most room to either side.
    Centre,
}

/// What to fit and how.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FitRequest {
    /// The variable.
    pub var: FitVar,
    /// Where to land.
    pub aim: FitAim,
    /// Round the value to a multiple of this, in the variable's unit (`None` or not above
    /// zero: no rounding; a count is always whole). The rounded value is the nearest
    /// multiple that still passes every check, if there is one.
    pub step: Option<f64>,
}

/// What the fit found.
#[derive(Clone, Debug, PartialEq)]
pub enum FitOutcome {
    /// A value at which every check passes.
    Found {
        /// The value in the variable's unit.
        value: f64,
        /// The design with that value.
        design: Box<Design>,
        /// The passing range the value was taken from, in the variable's unit.
        passing: (f64, f64),
        /// Every check at that value (its margins).
        checks: Vec<Check>,
        /// Rounding to the step asked for left no passing value; this is the value
        /// unrounded.
        unrounded: bool,
    },
    /// No value in the range passes every check; the message says what stands in the way.
    Blocked(String),
}

impl FitOutcome {
    /// The holding margin of a found value (ratio minus one).
    pub fn hold_margin(&self) -> Option<f64> {
        match self {
            FitOutcome::Found { checks, .. } => checks
                .iter()
                .find(|c| c.id == CheckId::Hold)
                .and_then(|c| c.margin),
            FitOutcome::Blocked(_) => None,
        }
    }
}

struct Sample {
    value: f64,
    checks: Option<Vec<Check>>,
}

impl Sample {
    fn at(var: FitVar, base: &Design, value: f64) -> Sample {
        let d = var.with(base, value);
        let checks = Segment::new(&d).ok().map(|seg| checks::run(&seg));
        Sample {
            value: var.get(&d),
            checks,
        }
    }
    fn all_pass(&self) -> bool {
        self.checks.as_deref().is_some_and(checks::all_pass)
    }
    fn check(&self, id: CheckId) -> Option<&Check> {
        self.checks.as_ref()?.iter().find(|c| c.id == id)
    }
    fn holds(&self) -> bool {
        self.check(CheckId::Hold).is_some_and(|c| c.pass)
    }
}

/// Fits `var` to the holding edge, unrounded (see the module note).
pub fn fit(design: &Design, var: FitVar) -> FitOutcome {
    fit_with(
        design,
        &FitRequest {
            var,
            aim: FitAim::HoldingEdge,
            step: None,
        },
    )
}

/// Fits as `request` asks (see the module note).
pub fn fit_with(design: &Design, request: &FitRequest) -> FitOutcome {
    let var = request.var;
    let (lo, hi, log) = var.range(design);
    if hi.partial_cmp(&lo) != Some(std::cmp::Ordering::Greater) {
        return FitOutcome::Blocked(format!(
            "the {} has no room to vary here ({lo:.3} to {hi:.3} {})",
            var.label(),
            var.unit()
        ));
    }
    let values: Vec<f64> = if var == FitVar::Count {
        (lo as u32..=hi as u32).map(f64::from).collect()
    } else {
        (0..SCAN_POINTS)
            .map(|i| {
                let t = i as f64 / (SCAN_POINTS - 1) as f64;
                if log {
                    (lo.ln() + t * (hi.ln() - lo.ln())).exp()
                } else {
                    lo + t * (hi - lo)
                }
            })
            .collect()
    };
    let samples: Vec<Sample> = values.iter().map(|&v| Sample::at(var, design, v)).collect();
    // The passing sample nearest the holding boundary: least holding margin.
    let hold_margin = |s: &Sample| {
        s.check(CheckId::Hold)
            .and_then(|c| c.margin)
            .unwrap_or(f64::INFINITY)
    };
    let best = samples
        .iter()
        .enumerate()
        .filter(|(_, s)| s.all_pass())
        .min_by(|a, b| hold_margin(a.1).total_cmp(&hold_margin(b.1)));
    let Some((i, _)) = best else {
        return blocked(var, &samples, lo, hi);
    };
    // The run of passing samples around it, each end refined towards its failing
    // neighbour.
    let first = (0..=i).rev().take_while(|&j| samples[j].all_pass()).last();
    let last = (i..samples.len())
        .take_while(|&j| samples[j].all_pass())
        .last();
    let (first, last) = (first.unwrap_or(i), last.unwrap_or(i));
    let edge = |inside: usize, outside: Option<usize>| {
        let mut good = samples[inside].value;
        if var == FitVar::Count {
            return good;
        }
        if let Some(mut bad) = outside.and_then(|j| samples.get(j)).map(|s| s.value) {
            for _ in 0..BISECTION_STEPS {
                let mid = 0.5 * (good + bad);
                if Sample::at(var, design, mid).all_pass() {
                    good = mid;
                } else {
                    bad = mid;
                }
            }
        }
        good
    };
    let passing = (
        edge(first, first.checked_sub(1)),
        edge(last, Some(last + 1)),
    );
    // The holding edge is the end of the passing range nearest the sample that holds
    // with the least margin.
    let holding_edge = if i - first <= last - i {
        passing.0
    } else {
        passing.1
    };
    let target = match request.aim {
        FitAim::HoldingEdge => holding_edge,
        FitAim::Centre if log && passing.0 > 0.0 => (passing.0 * passing.1).sqrt(),
        FitAim::Centre => 0.5 * (passing.0 + passing.1),
    };
    let step = request.step.filter(|s| s.is_finite() && *s > 0.0);
    let (value, unrounded) = match step.filter(|_| var != FitVar::Count) {
        None => (target, false),
        Some(step) => match rounded(var, design, target, step, passing) {
            Some(v) => (v, false),
            None => (target, true),
        },
    };
    let fitted = var.with(design, value);
    let s = Sample::at(var, design, value);
    FitOutcome::Found {
        value: var.get(&fitted),
        design: Box::new(fitted),
        passing,
        checks: s.checks.unwrap_or_default(),
        unrounded,
    }
}

/// The multiple of `step` nearest `target` at which every check passes, looking outwards
/// from `target` over the multiples inside `passing` (and one beyond each end).
fn rounded(
    var: FitVar,
    design: &Design,
    target: f64,
    step: f64,
    passing: (f64, f64),
) -> Option<f64> {
    let lo = (passing.0 / step).floor() as i64;
    let hi = (passing.1 / step).ceil() as i64;
    if hi - lo > 10_000 {
        // Far finer than the range: the nearest multiple is as good as the target.
        return Some((target / step).round() * step);
    }
    let mut candidates: Vec<i64> = (lo..=hi).collect();
    candidates.sort_by(|a, b| {
        ((*a as f64) * step - target)
            .abs()
            .total_cmp(&((*b as f64) * step - target).abs())
    });
    candidates
        .into_iter()
        .map(|k| k as f64 * step)
        .filter(|v| *v > 0.0)
        .find(|&v| Sample::at(var, design, v).all_pass())
}

fn blocked(var: FitVar, samples: &[Sample], lo: f64, hi: f64) -> FitOutcome {
    let unit = var.unit();
    let holding: Vec<&Sample> = samples.iter().filter(|s| s.holds()).collect();
    if holding.is_empty() {
        let best = samples
            .iter()
            .filter_map(|s| s.check(CheckId::Hold).map(|c| (s.value, c)))
            .filter(|(_, c)| c.margin.is_some())
            .max_by(|a, b| {
                a.1.margin
                    .unwrap_or(f64::NEG_INFINITY)
                    .total_cmp(&b.1.margin.unwrap_or(f64::NEG_INFINITY))
            });
        let tail = match best {
            Some((v, c)) => format!(" The closest is at {v:.4} {unit}: {}.", c.reason),
            None => " The holding force could not be formed anywhere in that range.".to_string(),
        };
        return FitOutcome::Blocked(format!(
            "No {} from {lo:.4} to {hi:.4} {unit} holds the required load at the largest bore.{tail}",
            var.label()
        ));
    }
    // Where holding is met, name the check that fails most often.
    let mut tally: Vec<(CheckId, usize, String)> = Vec::new();
    for s in &holding {
        for c in s.checks.iter().flatten().filter(|c| !c.pass) {
            match tally.iter_mut().find(|t| t.0 == c.id) {
                Some(t) => t.1 += 1,
                None => tally.push((c.id, 1, format!("at {:.4} {unit}: {}", s.value, c.reason))),
            }
        }
    }
    tally.sort_by_key(|t| std::cmp::Reverse(t.1));
    let (from, to) = (holding[0].value, holding[holding.len() - 1].value);
    match tally.first() {
        Some((id, _, example)) => FitOutcome::Blocked(format!(
            "The load is held for {} from {from:.4} to {to:.4} {unit}, but there the check \"{}\" fails ({example}).",
            var.label(),
            id.title()
        )),
        None => FitOutcome::Blocked(format!("No sampled {} passes every check.", var.label())),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn found(o: FitOutcome) -> (f64, Box<Design>, (f64, f64), Vec<Check>, bool) {
        match o {
            FitOutcome::Found {
                value,
                design,
                passing,
                checks,
                unrounded,
            } => (value, design, passing, checks, unrounded),
            FitOutcome::Blocked(why) => panic!("{why}"),
        }
    }

    #[test]
    fn thickness_fit_lands_on_the_holding_boundary() {
        // The demo passes every check with holding to spare, so a thinner strip exists
        // that just holds; bisection leaves the holding margin near zero from above.
        let d = Design::default();
        let out = fit(&d, FitVar::Thickness);
        let m = out.hold_margin().unwrap_or(f64::NAN);
        let (value, design, passing, checks, _) = found(out);
        let seg = Segment::new(&design).unwrap_or_else(|e| panic!("{e}"));
        assert!(checks::all_pass(&checks::run(&seg)));
        assert!(checks::all_pass(&checks));
        assert!(value < d.strip.thickness_mm, "{value}");
        assert!((0.0..1e-6).contains(&m), "holding margin {m}");
        assert_eq!(value, passing.0);
    }

    #[test]
    fn centred_and_rounded_fits_pass_with_room() {
        // Centre: inside the passing range, away from both ends; rounding to 0.01 mm gives
        // a multiple of the step that still passes, with its margins reported.
        let d = Design::default();
        let request = FitRequest {
            var: FitVar::Thickness,
            aim: FitAim::Centre,
            step: Some(0.01),
        };
        let (value, _, passing, checks, unrounded) = found(fit_with(&d, &request));
        assert!(!unrounded);
        assert!(
            passing.0 < value && value < passing.1,
            "{value} in {passing:?}"
        );
        assert!(
            ((value / 0.01).round() * 0.01 - value).abs() < 1e-12,
            "{value}"
        );
        assert!(checks::all_pass(&checks));
        assert!(checks.iter().all(|c| c.margin.is_none_or(|m| m >= 0.0)));
    }

    #[test]
    fn blocked_fit_names_the_check_in_the_way() {
        // Far too much load: nothing holds it, and the message says so.
        let mut d = Design::default();
        d.duty.holding_force_n = 1e6;
        match fit(&d, FitVar::OperatingStroke) {
            FitOutcome::Blocked(why) => assert!(why.contains("holds the required load"), "{why}"),
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn counts_are_whole_and_within_the_files_range() {
        // The file allows 3 to 64 strips (design::limits); the helper never leaves that.
        let d = FitVar::Count.with(&Design::default(), 7.4);
        assert_eq!(d.strip.count, 7);
        assert_eq!(FitVar::Count.with(&Design::default(), 2.0).strip.count, 3);
        assert_eq!(FitVar::Count.with(&Design::default(), 99.0).strip.count, 64);
        let (lo, hi, _) = FitVar::Count.range(&Design::default());
        assert_eq!((lo, hi), (3.0, 64.0));
        for v in FitVar::ALL {
            assert!(design::limit(v.field()).is_some(), "{}", v.field());
        }
    }
}
