//! Actuation as it is built: what sets the operating point and how the drive between the
//! actuator and the end plates gives. Under displacement control (`operating: Stroke`) the
//! operating stroke is fixed; under force control (`Pull`, or `Torque` through the spool or
//! screw) it is, at each bore, the first stroke where the total pull reaches the set pull,
//! and the state is stable only on the rising branch (past a pull peak the segment snaps
//! through). A cord or drive of stiffness `k_c` in series makes the actuator travel
//! `a = delta + P / k_c`; under a position-controlled drive the segment jumps where
//! `da / d delta` falls to zero, that is where its own stiffness `dP / d delta` reaches
//! `-k_c` (mechanics note, "Actuator modes and compliance").
//!
//! No I/O and no GUI: the checks, the command line, the app and the sheet read it.

use serde::Serialize;

use crate::checks::{Check, CheckId};
use crate::design::Operating;
use crate::segment::{BorePath, Segment, SegmentState};

/// The pull at a force-set operating point is found to this fraction of the set pull.
pub const PULL_TOLERANCE: f64 = 1e-11;

/// Most Brent iterations for one operating stroke (it settles in a few dozen).
const MAX_ITERATIONS: usize = 200;

/// Samples of the segment's stiffness between the pull peak and the limit when looking
/// for a snap through a compliant drive.
const SNAP_SAMPLES: usize = 96;

/// Step of the central difference for `dP / d delta`, as a fraction of the free length.
const SLOPE_STEP: f64 = 1e-6;

/// The drive as the design sets it: the operating mode, the set pull under force control
/// and the series stiffness.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct Drive {
    /// The operating point as the design gives it.
    pub operating: Operating,
    /// The set pull on the plates under force control, N (`None`: displacement control).
    pub set_pull_n: Option<f64>,
    /// Series stiffness of the cord or drive, N/mm (`None`: rigid).
    pub stiffness_n_per_mm: Option<f64>,
}

impl Drive {
    /// The drive of a segment's design.
    pub fn of(seg: &Segment) -> Drive {
        let operating = seg.design.operating();
        let set_pull_n = match operating {
            Operating::Stroke(_) => None,
            Operating::Pull(n) => Some(n),
            // Through the spool (`T / r_s`) or the screw (`2 pi eff T / lead`).
            Operating::Torque(t) => Some(seg.design.actuator.pull_n_at(t)),
        };
        Drive {
            operating,
            set_pull_n,
            stiffness_n_per_mm: seg.design.actuator.stiffness_n_per_mm(),
        }
    }

    /// `stroke`, `pull` or `torque`.
    pub fn mode_name(&self) -> &'static str {
        self.operating.mode_name()
    }

    /// Whether the actuator sets a pull (or torque) rather than a stroke.
    pub fn is_force_controlled(&self) -> bool {
        self.set_pull_n.is_some()
    }

    /// Actuator travel at an end-plate stroke and pull: `stroke + pull / k_c`, the stroke
    /// itself when the drive is rigid, mm.
    pub fn travel_mm(&self, stroke_mm: f64, pull_n: f64) -> f64 {
        match self.stiffness_n_per_mm {
            Some(k) => stroke_mm + pull_n / k,
            None => stroke_mm,
        }
    }
}

/// Why a set pull has no operating point at a bore.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub enum Unreached {
    /// The pull peaks below the set pull: past the peak the segment snaps through.
    PastPeak {
        /// The largest pull on the path, N.
        peak_pull_n: f64,
        /// Stroke of that peak, mm.
        peak_stroke_mm: f64,
    },
    /// The pull rises all the way to the model's limit and stays below the set pull.
    PastLimit {
        /// Pull at the limit, N.
        limit_pull_n: f64,
        /// Stroke of the limit, mm.
        limit_stroke_mm: f64,
    },
    /// The bore is beyond the strips' reach, so the segment never touches the wall.
    OutOfReach,
    /// The solver found no state on the way to the set pull.
    SolveFailed,
}

impl Unreached {
    /// One line for reasons and tables.
    pub fn describe(&self, set_pull_n: f64) -> String {
        match *self {
            Unreached::PastPeak {
                peak_pull_n,
                peak_stroke_mm,
            } => format!(
                "the set pull {set_pull_n:.2} N is never reached here: the pull peaks at {peak_pull_n:.2} N at {peak_stroke_mm:.3} mm of stroke, and past that the segment snaps through"
            ),
            Unreached::PastLimit {
                limit_pull_n,
                limit_stroke_mm,
            } => format!(
                "the set pull {set_pull_n:.2} N is never reached here: the pull is {limit_pull_n:.2} N at the model's limit, {limit_stroke_mm:.3} mm of stroke"
            ),
            Unreached::OutOfReach => format!(
                "the set pull {set_pull_n:.2} N draws the strips past their reach: the bore is beyond the highest crest"
            ),
            Unreached::SolveFailed => format!(
                "the solver failed on the way to the set pull {set_pull_n:.2} N: no operating point is reported"
            ),
        }
    }
}

/// The total pull on the plates at a stroke, N (`None` where there is no state).
pub fn pull_n(path: &BorePath, stroke_mm: f64) -> Option<f64> {
    path.state(stroke_mm).actuator_force_n
}

/// Where the pull peaks at this bore: `(stroke mm, pull N)`; `None` when it rises all
/// the way to the limit.
pub fn pull_peak(path: &BorePath) -> Option<(f64, f64)> {
    let stroke = path.axial_peak_stroke_mm()?;
    pull_n(path, stroke).map(|p| (stroke, p))
}

/// End of the rising branch and the pull there: the pull peak, else the model's limit.
fn rising_end(path: &BorePath) -> Option<(f64, f64, bool)> {
    if let Some((stroke, pull)) = pull_peak(path) {
        return Some((stroke, pull, true));
    }
    let limit = path.limit_stroke_mm();
    pull_n(path, limit).map(|p| (limit, p, false))
}

/// The first stroke at which the total pull reaches `set_pull_n`, solved on the rising
/// branch to [`PULL_TOLERANCE`] of the set pull with roots' Brent method (the pull rises
/// from the strips' buckling load at zero stroke to the peak or the limit). A set pull at
/// or below the buckling load leaves the strips straight: stroke 0.
pub fn stroke_for_pull_mm(path: &BorePath, set_pull_n: f64) -> Result<f64, Unreached> {
    let start = pull_n(path, 0.0).ok_or(Unreached::SolveFailed)?;
    if set_pull_n <= start {
        return Ok(0.0);
    }
    let (end, at_end, peak) = rising_end(path).ok_or(Unreached::SolveFailed)?;
    if at_end < set_pull_n {
        if path.first_contact_stroke_mm().is_none() && !peak {
            return Err(Unreached::OutOfReach);
        }
        return Err(if peak {
            Unreached::PastPeak {
                peak_pull_n: at_end,
                peak_stroke_mm: end,
            }
        } else {
            Unreached::PastLimit {
                limit_pull_n: at_end,
                limit_stroke_mm: end,
            }
        });
    }
    if at_end == set_pull_n {
        return Ok(end);
    }
    let f = |stroke: f64| pull_n(path, stroke).map_or(f64::NAN, |p| p - set_pull_n);
    let mut settle = PullSettled {
        tolerance: PULL_TOLERANCE * set_pull_n,
        x_scale: end,
    };
    match roots::find_root_brent(0.0, end, f, &mut settle) {
        Ok(stroke) if stroke.is_finite() => Ok(stroke.clamp(0.0, end)),
        _ => Err(Unreached::SolveFailed),
    }
}

/// Brent on the stroke: done when the pull is within the tolerance, or the bracket has
/// shrunk to rounding.
struct PullSettled {
    tolerance: f64,
    x_scale: f64,
}

impl roots::Convergency<f64> for PullSettled {
    fn is_root_found(&mut self, y: f64) -> bool {
        y.abs() <= self.tolerance
    }
    fn is_converged(&mut self, x1: f64, x2: f64) -> bool {
        (x1 - x2).abs() <= 1e-15 * self.x_scale
    }
    fn is_iteration_limit_reached(&mut self, iter: usize) -> bool {
        iter >= MAX_ITERATIONS
    }
}

/// The segment's own stiffness `dP / d delta` at a stroke, N/mm, by a central difference
/// (one-sided at the ends of the path); `None` where a state is missing.
pub fn segment_stiffness_n_per_mm(path: &BorePath, stroke_mm: f64) -> Option<f64> {
    let l = path.free_length_mm();
    let h = SLOPE_STEP * l;
    let limit = path.limit_stroke_mm();
    let lo = (stroke_mm - h).max(0.0);
    let hi = (stroke_mm + h).min(limit);
    if hi <= lo {
        return None;
    }
    Some((pull_n(path, hi)? - pull_n(path, lo)?) / (hi - lo))
}

/// Under a position-controlled drive through a series stiffness `k_c` (N/mm): the first
/// stroke past the pull peak where `d travel / d delta = 1 + (dP/d delta) / k_c` falls to
/// zero, where the segment jumps (its own stiffness reaches `-k_c`; Bazant and Cedolin,
/// Stability of Structures, from memory). `None` when it does not before the limit (the
/// pull rises all the way, or never falls that steeply).
pub fn snap_stroke_mm(path: &BorePath, stiffness_n_per_mm: f64) -> Option<f64> {
    let (peak, _) = pull_peak(path)?;
    let slope = |stroke: f64| segment_stiffness_n_per_mm(path, stroke);
    first_jump(slope, peak, path.limit_stroke_mm(), stiffness_n_per_mm)
}

/// On a pull curve with stiffness `slope(stroke)` (N/mm), the first stroke in
/// `(from, to]` where `1 + slope / k_c` falls to zero: sampled, then bisected to rounding.
/// `from` must lie where the travel still rises (the pull peak or before).
pub fn first_jump(
    slope: impl Fn(f64) -> Option<f64>,
    from: f64,
    to: f64,
    stiffness_n_per_mm: f64,
) -> Option<f64> {
    let rate = |stroke: f64| slope(stroke).map_or(f64::NAN, |s| 1.0 + s / stiffness_n_per_mm);
    let mut prev = from;
    for i in 1..=SNAP_SAMPLES {
        let stroke = from + (to - from) * i as f64 / SNAP_SAMPLES as f64;
        if rate(stroke) <= 0.0 {
            // Bisect between the last sample that still rose and this one.
            let (mut lo, mut hi) = (prev, stroke);
            for _ in 0..200 {
                let mid = 0.5 * (lo + hi);
                if mid <= lo || mid >= hi {
                    break;
                }
                if rate(mid) <= 0.0 {
                    hi = mid;
                } else {
                    lo = mid;
                }
            }
            return Some(hi);
        }
        prev = stroke;
    }
    None
}

/// The operating point at one bore: the stroke (or why there is none), the actuator
/// travel and the state there.
#[derive(Clone, Debug, PartialEq)]
pub struct OperatingState {
    /// The drive that sets it.
    pub drive: Drive,
    /// Bore diameter, mm.
    pub bore_mm: f64,
    /// End-plate stroke at the operating point, mm (`None`: a set pull never reached).
    pub stroke_mm: Option<f64>,
    /// Actuator travel there, mm: stroke + pull / stiffness (the stroke when rigid).
    pub travel_mm: Option<f64>,
    /// The state at the operating stroke; beyond the limit, with the reason, when a set
    /// pull is never reached.
    pub state: SegmentState,
    /// Why a set pull is never reached.
    pub unreached: Option<Unreached>,
}

/// The operating state at the bore of `path`: at the set stroke under displacement
/// control, at the first stroke reaching the set pull under force control.
pub fn operating_state(path: &BorePath) -> OperatingState {
    let drive = Drive::of(path.segment());
    let found = match (drive.operating, drive.set_pull_n) {
        (Operating::Stroke(s), _) => Ok(s),
        (_, Some(p)) => stroke_for_pull_mm(path, p),
        (_, None) => Ok(0.0),
    };
    match found {
        Ok(stroke) => {
            let state = path.state(stroke);
            // Through a compliant drive the travel needs the pull, which a state past the
            // limit does not have.
            let travel = match drive.stiffness_n_per_mm {
                None => Some(stroke),
                Some(_) => state.actuator_force_n.map(|p| drive.travel_mm(stroke, p)),
            };
            OperatingState {
                drive,
                bore_mm: path.bore_mm(),
                stroke_mm: Some(stroke),
                travel_mm: travel,
                state,
                unreached: None,
            }
        }
        Err(why) => {
            // Past the limit: the forces and stresses are missing, and the reason says why.
            let beyond = path.limit_stroke_mm() * (1.0 + 1e-6) + 1e-9;
            let mut state = path.state(beyond);
            state.stroke_mm = f64::NAN;
            state.reason = Some(why.describe(drive.set_pull_n.unwrap_or(0.0)));
            OperatingState {
                drive,
                bore_mm: path.bore_mm(),
                stroke_mm: None,
                travel_mm: None,
                state,
                unreached: Some(why),
            }
        }
    }
}

/// The operating stroke at the bore of `path`, mm: the set stroke, or the first stroke
/// reaching the set pull (`None` when it is never reached).
pub fn operating_stroke_mm(path: &BorePath) -> Option<f64> {
    match Drive::of(path.segment()) {
        Drive {
            operating: Operating::Stroke(s),
            ..
        } => Some(s),
        Drive {
            set_pull_n: Some(p),
            ..
        } => stroke_for_pull_mm(path, p).ok(),
        _ => None,
    }
}

/// Actuator travel at a stroke on this path, mm: `stroke + pull / k_c` (the stroke itself
/// when the drive is rigid or there is no state).
pub fn travel_at_mm(path: &BorePath, stroke_mm: f64) -> f64 {
    let drive = Drive::of(path.segment());
    match (drive.stiffness_n_per_mm, pull_n(path, stroke_mm)) {
        (Some(_), Some(p)) => drive.travel_mm(stroke_mm, p),
        _ => stroke_mm,
    }
}

/// Samples of the travel along the path when looking for the first stroke at which it
/// reaches a given travel.
const TRAVEL_SAMPLES: usize = 128;

/// The least stroke at which the actuator travel reaches `travel_mm` on this path, mm:
/// the travel itself through a rigid drive; through a compliant drive the first crossing
/// of `stroke + pull / k_c` (the travel may fall back past a pull peak), found by a sampled
/// scan over `[0, limit]` and then roots' Brent method in the bracketing step to 1e-12 of
/// the limit stroke. `None` when the travel does not reach it before the model's limit
/// (a crossing and recrossing between two samples, 1/128 of the limit apart, is not seen).
pub fn stroke_at_travel_mm(path: &BorePath, travel_mm: f64) -> Option<f64> {
    let limit = path.limit_stroke_mm();
    let Some(k) = Drive::of(path.segment()).stiffness_n_per_mm else {
        return (travel_mm <= limit).then_some(travel_mm.max(0.0));
    };
    // No state, no travel: NaN never reaches the target.
    let f = |stroke: f64| pull_n(path, stroke).map_or(f64::NAN, |p| stroke + p / k - travel_mm);
    if f(0.0) >= 0.0 {
        return Some(0.0);
    }
    let mut prev = 0.0;
    for i in 1..=TRAVEL_SAMPLES {
        let stroke = limit * i as f64 / TRAVEL_SAMPLES as f64;
        let y = f(stroke);
        if y >= 0.0 {
            if y == 0.0 {
                return Some(stroke);
            }
            let mut settle = TravelSettled {
                x_scale: limit,
                y_scale: travel_mm.abs().max(limit),
            };
            return match roots::find_root_brent(prev, stroke, f, &mut settle) {
                Ok(s) if s.is_finite() => Some(s.clamp(prev, stroke)),
                _ => Some(bisect_first(f, prev, stroke)),
            };
        }
        if !y.is_nan() {
            prev = stroke;
        }
    }
    None
}

/// Bisection of `f` from `lo` (below zero) to `hi` (at or above zero) to rounding: the
/// fallback when Brent stops without a root.
fn bisect_first(f: impl Fn(f64) -> f64, mut lo: f64, mut hi: f64) -> f64 {
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            break;
        }
        if f(mid) >= 0.0 {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    hi
}

/// Brent on the stroke for a travel: done when the bracket has shrunk to 1e-12 of the
/// limit stroke, or the travel is within rounding of the target.
struct TravelSettled {
    x_scale: f64,
    y_scale: f64,
}

impl roots::Convergency<f64> for TravelSettled {
    fn is_root_found(&mut self, y: f64) -> bool {
        y.abs() <= 1e-14 * self.y_scale
    }
    fn is_converged(&mut self, x1: f64, x2: f64) -> bool {
        (x1 - x2).abs() <= 1e-12 * self.x_scale
    }
    fn is_iteration_limit_reached(&mut self, iter: usize) -> bool {
        iter >= MAX_ITERATIONS
    }
}

/// Where a sweep at the bore of `path` ends, mm: the smaller of the model's limit and the
/// actuator's maximum, which through a compliant drive is a maximum of travel, so the
/// stroke where the travel first reaches it (contract, "`sweep` and `bores`").
pub fn sweep_end_mm(path: &BorePath) -> f64 {
    let limit = path.limit_stroke_mm();
    let max = path.segment().max_stroke_mm();
    match path.segment().design.actuator.stiffness_n_per_mm() {
        None => limit.min(max),
        Some(_) => stroke_at_travel_mm(path, max).map_or(limit, |s| s.min(limit)),
    }
}

/// The stroke at which the actuator reaches its maximum travel at each of `points`
/// equally spaced bores across `range_mm`: `(bore mm, stroke mm)`, the stroke `None` where
/// the travel stays short of the maximum up to the model's limit or the segment has no
/// state. Empty for a rigid drive, where the limit is the maximum stroke at every bore.
pub fn travel_limit_window(
    seg: &Segment,
    range_mm: (f64, f64),
    points: usize,
) -> Vec<(f64, Option<f64>)> {
    if seg.design.actuator.stiffness_n_per_mm().is_none() {
        return Vec::new();
    }
    let max = seg.max_stroke_mm();
    (0..points)
        .map(|i| {
            let t = i as f64 / (points.max(2) - 1) as f64;
            let bore_mm = range_mm.0 + t * (range_mm.1 - range_mm.0);
            let stroke = seg
                .at_bore(bore_mm)
                .ok()
                .and_then(|p| stroke_at_travel_mm(&p, max));
            (bore_mm, stroke)
        })
        .collect()
}

/// ` (actuator travel X mm)` after a stroke in a reason, when a compliant drive makes the
/// travel differ from the stroke; empty for a rigid drive.
pub fn travel_note(path: &BorePath, stroke_mm: f64) -> String {
    let travel = travel_at_mm(path, stroke_mm);
    if travel == stroke_mm {
        String::new()
    } else {
        format!(" (actuator travel {travel:.3} mm)")
    }
}

/// The operating state at a bore of a segment, or why the segment has no state there (the
/// relaxed segment does not fit).
pub fn operating_state_at(seg: &Segment, bore_mm: f64) -> Result<OperatingState, String> {
    seg.at_bore(bore_mm)
        .map(|p| operating_state(&p))
        .map_err(|e| e.to_string())
}

/// How the operating point stands against snapping at one bore.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct Stability {
    /// Bore diameter, mm.
    pub bore_mm: f64,
    /// The operating stroke, mm (`None`: a set pull never reached).
    pub stroke_mm: Option<f64>,
    /// Where the segment snaps: the pull peak under force control, the stroke where the
    /// travel stops rising under position control through a compliant drive, mm.
    pub snap_stroke_mm: Option<f64>,
    /// Whether the operating point is stable.
    pub stable: bool,
}

/// The stability of the operating point `op` at the bore of `path`.
pub fn stability(path: &BorePath, op: &OperatingState) -> Stability {
    let drive = op.drive;
    let snap = if drive.is_force_controlled() {
        pull_peak(path).map(|(s, _)| s)
    } else {
        drive
            .stiffness_n_per_mm
            .and_then(|k| snap_stroke_mm(path, k))
    };
    let stable = match (op.stroke_mm, snap) {
        (None, _) => false,
        (Some(_), None) => true,
        (Some(s), Some(at)) => s < at,
    };
    Stability {
        bore_mm: path.bore_mm(),
        stroke_mm: op.stroke_mm,
        snap_stroke_mm: snap,
        stable,
    }
}

/// The `stable` check ("stable at the operating point"): under force control the
/// operating point lies on the rising branch of the pull, short of its peak; under
/// position control through a compliant drive the stroke stays short of where the
/// segment jumps. Judged at the smallest and the largest bore; the worse one is reported.
/// The margin is a ratio, capacity over demand minus one: under force control the peak
/// pull (or, where the pull rises all the way, the pull at the model's limit) over the set
/// pull; under position control the snap stroke (or the limit stroke, where the travel
/// never stops rising) over the operating stroke.
pub fn stable_check(seg: &Segment) -> Check {
    let drive = Drive::of(seg);
    let mut worst: Option<Check> = None;
    for bore in [seg.bore_smallest_mm, seg.bore_largest_mm] {
        let check = match seg.at_bore(bore) {
            Err(e) => Check::new(
                CheckId::Stable,
                false,
                None,
                e.to_string(),
                Some(bore),
                None,
            ),
            Ok(path) => stable_at(&path, &drive),
        };
        let worse = match &worst {
            None => true,
            Some(w) => {
                (w.pass && !check.pass)
                    || (w.pass == check.pass
                        && check.margin.unwrap_or(f64::INFINITY)
                            < w.margin.unwrap_or(f64::INFINITY))
            }
        };
        if worse {
            worst = Some(check);
        }
    }
    worst.unwrap_or_else(|| {
        Check::new(
            CheckId::Stable,
            false,
            None,
            "no bore to judge".to_string(),
            None,
            None,
        )
    })
}

/// The `stable` check at the bore of one path.
fn stable_at(path: &BorePath, drive: &Drive) -> Check {
    let bore = path.bore_mm();
    let op = operating_state(path);
    let s = stability(path, &op);
    let set_pull = drive.set_pull_n.unwrap_or(0.0);
    let (margin, reason) = match (&op.unreached, s.stroke_mm, s.snap_stroke_mm) {
        (Some(why), _, _) => (
            match why {
                Unreached::PastPeak { peak_pull_n, .. } if set_pull > 0.0 => {
                    Some(peak_pull_n / set_pull - 1.0)
                }
                _ => None,
            },
            format!("at bore {bore:.3} mm {}", why.describe(set_pull)),
        ),
        (None, Some(st), Some(at)) if drive.is_force_controlled() => (
            pull_n(path, at)
                .filter(|_| set_pull > 0.0)
                .map(|peak| peak / set_pull - 1.0),
            format!(
                "at bore {bore:.3} mm the set pull is reached at {st:.3} mm of stroke, on the rising branch; the pull peaks at {at:.3} mm, past which the segment would snap through"
            ),
        ),
        (None, Some(st), None) if drive.is_force_controlled() => {
            let limit = path.limit_stroke_mm();
            let top = pull_n(path, limit);
            (
                top.filter(|_| set_pull > 0.0).map(|p| p / set_pull - 1.0),
                format!(
                    "at bore {bore:.3} mm the set pull is reached at {st:.3} mm of stroke; the pull rises all the way to the model's limit ({} N at {limit:.3} mm)",
                    top.map_or_else(|| "-".to_string(), |p| format!("{p:.2}"))
                ),
            )
        }
        (None, Some(st), Some(at)) => (
            (st > 0.0).then(|| at / st - 1.0),
            format!(
                "at bore {bore:.3} mm the drive's give ({:.3} N/mm) lets the segment jump at {at:.3} mm of stroke, where its own stiffness reaches minus the drive's; operating stroke {st:.3} mm",
                drive.stiffness_n_per_mm.unwrap_or(f64::INFINITY)
            ),
        ),
        (None, st, _) => {
            let limit = path.limit_stroke_mm();
            (
                st.filter(|&st| st > 0.0).map(|st| limit / st - 1.0),
                format!(
                    "at bore {bore:.3} mm the actuator travel keeps rising with the stroke up to the model's limit at {limit:.3} mm: no jump"
                ),
            )
        }
    };
    Check::new(
        CheckId::Stable,
        s.stable,
        margin,
        reason,
        Some(bore),
        s.stroke_mm,
    )
}

/// The operating state at a bore as the analysis keeps it: the state, or why there is
/// none (a set pull never reached).
pub fn operating_result(path: &BorePath) -> Result<SegmentState, String> {
    let op = operating_state(path);
    match op.stroke_mm {
        Some(_) => Ok(op.state),
        None => Err(op
            .state
            .reason
            .unwrap_or_else(|| "no operating point".to_string())),
    }
}

/// The operating point at one bore of a window.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct WindowPoint {
    /// Bore diameter, mm.
    pub bore_mm: f64,
    /// Operating stroke, mm (`None`: not reached, or no state at this bore).
    pub stroke_mm: Option<f64>,
    /// Actuator travel there, mm.
    pub travel_mm: Option<f64>,
}

/// Under force control, the operating stroke and travel at `points` equally spaced bores
/// across `range_mm`; empty under displacement control.
pub fn window(seg: &Segment, range_mm: (f64, f64), points: usize) -> Vec<WindowPoint> {
    if !Drive::of(seg).is_force_controlled() {
        return Vec::new();
    }
    (0..points)
        .map(|i| {
            let t = i as f64 / (points.max(2) - 1) as f64;
            let bore_mm = range_mm.0 + t * (range_mm.1 - range_mm.0);
            match seg.at_bore(bore_mm) {
                Ok(path) => {
                    let op = operating_state(&path);
                    WindowPoint {
                        bore_mm,
                        stroke_mm: op.stroke_mm,
                        travel_mm: op.travel_mm,
                    }
                }
                Err(_) => WindowPoint {
                    bore_mm,
                    stroke_mm: None,
                    travel_mm: None,
                },
            }
        })
        .collect()
}

impl crate::analysis::Analysis {
    /// The operating stroke at the nominal bore, mm: the set stroke under displacement
    /// control; under force control the stroke reaching the set pull there (`None` when
    /// it is never reached, or the segment has no state at the nominal bore).
    pub fn nominal_operating_stroke_mm(&self) -> Option<f64> {
        if let Operating::Stroke(s) = self.segment.design.operating() {
            return Some(s);
        }
        self.bores
            .iter()
            .find(|b| b.case == crate::analysis::BoreCase::Nominal)
            .and_then(|b| b.operating.as_ref().ok())
            .map(|s| s.stroke_mm)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::Design;

    fn segment_with(stiffness_n_per_mm: Option<f64>) -> Segment {
        let mut d = Design::default();
        d.actuator.set_stiffness_n_per_mm(stiffness_n_per_mm);
        Segment::new(&d).unwrap_or_else(|e| panic!("{e}"))
    }

    /// Springs in series (common practice): through a rigid drive the travel is the
    /// stroke, so the stroke reaching a travel is that travel, up to the model's limit.
    #[test]
    fn a_rigid_drive_reaches_a_travel_at_that_stroke() {
        let seg = segment_with(None);
        let path = seg
            .at_bore(seg.bore_nominal_mm)
            .unwrap_or_else(|e| panic!("{e}"));
        let limit = path.limit_stroke_mm();
        for t in [0.0, 0.1 * limit, 0.5 * limit, limit] {
            assert_eq!(stroke_at_travel_mm(&path, t), Some(t));
        }
        assert_eq!(stroke_at_travel_mm(&path, 1.01 * limit), None);
        // The sweep ends where it always did.
        assert_eq!(
            sweep_end_mm(&path),
            limit.min(seg.max_stroke_mm()),
            "rigid sweep end"
        );
    }

    /// Springs in series (common practice): travel = stroke + pull / k_c, so the stroke
    /// found for a travel gives that travel back.
    #[test]
    fn the_stroke_for_a_travel_gives_the_travel_back() {
        let seg = segment_with(Some(150.0));
        let path = seg
            .at_bore(seg.bore_nominal_mm)
            .unwrap_or_else(|e| panic!("{e}"));
        let limit = path.limit_stroke_mm();
        let start = travel_at_mm(&path, 0.0);
        let end = travel_at_mm(&path, limit);
        assert!(
            start > 0.0,
            "the buckling load stretches the drive: {start}"
        );
        // At or below the travel of the straight strips: no stroke needed.
        assert_eq!(stroke_at_travel_mm(&path, 0.5 * start), Some(0.0));
        for f in [0.1, 0.3, 0.6, 0.9, 0.99] {
            let target = start + f * (end - start);
            let Some(s) = stroke_at_travel_mm(&path, target) else {
                panic!("travel {target} mm is reached");
            };
            assert!((0.0..=limit).contains(&s));
            let back = travel_at_mm(&path, s);
            assert!(
                (back - target).abs() <= 1e-9 * target.max(1.0),
                "{back} vs {target}"
            );
        }
        assert_eq!(stroke_at_travel_mm(&path, 1.5 * end + 1.0), None);
    }

    /// Past a pull peak the travel through a soft drive falls back (Bazant and Cedolin,
    /// Stability of Structures, from memory: a softening structure behind a spring): the
    /// stroke for a travel is its first crossing, so no shorter stroke reaches it.
    #[test]
    fn the_stroke_for_a_travel_is_the_first_crossing() {
        let mut d = Design::default();
        d.bore.minus_mm = 0.0;
        d.bore.plus_mm = 0.0;
        d.end_plate_diameter_mm = 0.0;
        let seg = Segment::new(&d).unwrap_or_else(|e| panic!("{e}"));
        d.bore.diameter_mm = seg.bore_for_gap_mm(0.34 * d.strip.free_length_mm);
        d.actuator.set_stiffness_n_per_mm(Some(5.0));
        let seg = Segment::new(&d).unwrap_or_else(|e| panic!("{e}"));
        let path = seg
            .at_bore(seg.bore_nominal_mm)
            .unwrap_or_else(|e| panic!("{e}"));
        let Some((peak, _)) = pull_peak(&path) else {
            panic!("a gap of 0.34 L peaks");
        };
        let Some(snap) = snap_stroke_mm(&path, 5.0) else {
            panic!("a soft drive lets it jump");
        };
        assert!(snap > peak);
        // The travel at the snap, where it stops rising: reached first at the snap (to
        // rounding), and the travel just short of it first before.
        let top = travel_at_mm(&path, snap);
        let target = travel_at_mm(&path, 0.9 * snap);
        let Some(s) = stroke_at_travel_mm(&path, target) else {
            panic!("reached at 0.9 x snap");
        };
        assert!((travel_at_mm(&path, s) - target).abs() <= 1e-9 * target);
        for i in 0..2000 {
            let x = s * i as f64 / 2000.0;
            assert!(travel_at_mm(&path, x) < target + 1e-9, "{x} before {s}");
        }
        assert!(target < top);
    }
}
