//! Load sharing near a nominal design, for a scatter run: the checks of a segment whose
//! strips differ a little (each its own thickness, width and free length), found from the
//! nominal design's loaded states rather than from scratch. The nominal states (hub offset
//! at the operating stroke, the hub's stiffness matrix there, the bore-level strokes) are
//! found once per run ([`NearPlan`]). Per sample and case:
//! - the hub offset at the operating stroke: Broyden's method from the nominal offset and
//!   stiffness, every step re-evaluating each strip exactly at its own gap (so a strip that
//!   meets or leaves the wall is solved, never linearised), until the force balance is
//!   within the general solver's tolerance (or 1e-10 of the forces, whichever is larger);
//!   a hub that would rest on its rim, a strip past its limit, or no convergence within
//!   [`NEAR_ITER`] steps takes the general solver instead (counted as a fallback);
//! - the first strip's contact (the hub still centred, or on its rest under a load):
//!   exactly as the general solver finds it;
//! - the lift-off stroke under a load: the stroke at which the strips carry the load with
//!   the hub at its rest position, a safeguarded secant from the nominal lift-off (the hub
//!   sliding along the wall as it rises changes it only to second order);
//! - the segment's limit and the last strip's contact: the fixed point
//!   `s = min_i limit_i(gap_i(d(s)))` (resp. `max_i first-contact_i`), two steps from the
//!   nominal stroke, `d(s)` balanced as above.
//!
//! The checks are then formed by the same code as the full load-sharing checks
//! (`checks::amend_by`, `BoreCases::point_from`). Mechanics only: no GUI, PDF or file code.

use std::sync::atomic::{AtomicU64, Ordering};

use crate::checks::Check;
use crate::elastica::{LimitReason, Path};
use crate::segment::Segment;

use super::checks::{Judged, amend_by, operating_stroke_at};
use super::entry::{BoreCases, CaseChoice, SharingChecks, bend_passage};
use super::{BoreStrokes, Judge, LoadedBore, Loading, SharedState, SharingError, SolveFailure};

/// Broyden steps at most before the general solver takes over.
pub const NEAR_ITER: usize = 30;

/// Relative force tolerance of the Broyden balance (of the load plus the strips' forces).
const NEAR_TOL: f64 = 1e-10;

/// How far short of a predicted root the stroke searches step, as a fraction of it (twice
/// the searches' own tolerance).
const SHORT_OF_ROOT: f64 = 2e-10;

/// Steps of the limit and last-contact searches at most.
const FIXED_STEPS: usize = 40;

/// Levels of halving the stroke step when a balance is followed along the stroke.
const FOLLOW_DEPTH: usize = 1;

/// Broyden steps in a row that had to be halved before the balance is taken to lie at or
/// past a strip's limit.
const HELD_STEPS: usize = 2;

/// Halvings of a Broyden step that takes a strip past its limit.
const HALVINGS: usize = 4;

/// Secant steps of the lift-off stroke at most.
const SECANT_ITER: usize = 60;

/// How often the near path solved a state itself and how often it handed over to the
/// general solver (thread-safe counters; the results do not depend on them).
#[derive(Debug, Default)]
pub struct NearCounts {
    /// Loaded states balanced near the nominal one.
    pub near: AtomicU64,
    /// States or strokes that took the general solver.
    pub fallbacks: AtomicU64,
}

impl NearCounts {
    fn near(&self) {
        self.near.fetch_add(1, Ordering::Relaxed);
    }
    fn fallback(&self) {
        self.fallbacks.fetch_add(1, Ordering::Relaxed);
    }
}

/// One case of the nominal design at one bore.
#[derive(Clone, Debug)]
struct NearCase {
    /// Nominal hub offset at the operating stroke, mm.
    offset: [f64; 2],
    /// `d (sum F_i u_i) / d offset` there, N/mm (`None`: the hub rests or the state is
    /// beyond the limit; samples take the general solver).
    stiffness: Option<[[f64; 2]; 2]>,
    /// The nominal bore-level strokes (`None`: not found).
    strokes: Option<BoreStrokes>,
}

/// The nominal design's loaded states, found once per run.
#[derive(Clone, Debug)]
pub struct NearPlan {
    loading: Loading,
    small: Vec<NearCase>,
    large: Vec<NearCase>,
    /// Whether the checks need the last strip's contact (the `top-strip` check).
    want_last: bool,
}

impl NearPlan {
    /// The plan of the nominal segment under `loading` (its deviations are ignored).
    pub fn new(seg: &Segment, loading: &Loading, want_last: bool) -> NearPlan {
        let loading = Loading {
            deviations: Vec::new(),
            ..loading.clone()
        };
        let at = |bore: f64| -> Vec<NearCase> {
            let op = operating_stroke_at(seg, bore);
            let Ok(cases) = BoreCases::with_loading(seg, &loading, bore, CaseChoice::default())
            else {
                return Vec::new();
            };
            cases
                .each()
                .map(|(_, _, lb)| {
                    let strokes = lb.strokes().ok();
                    let state = op.and_then(|op| lb.state(op).ok());
                    let (offset, stiffness) = match state {
                        Some(st) if !st.beyond_limit && !st.on_support => (
                            st.hub_offset_mm,
                            lb.stiffness(st.stroke_mm, st.hub_offset_mm),
                        ),
                        _ => ([0.0, 0.0], None),
                    };
                    NearCase {
                        offset,
                        stiffness,
                        strokes,
                    }
                })
                .collect()
        };
        NearPlan {
            small: at(seg.bore_smallest_mm),
            large: at(seg.bore_largest_mm),
            loading,
            want_last,
        }
    }

    /// Amends the centred checks of `seg` (a sample: the nominal design with its own
    /// modulus, hub and friction) for strips with the deviations `deviations`, by
    /// [`super::checks::amend_loading`]'s rules, the states and strokes found near the
    /// nominal ones.
    pub fn amend(
        &self,
        seg: &Segment,
        deviations: &[super::StripDeviation],
        checks: &mut Vec<Check>,
        counts: &NearCounts,
    ) {
        let loading = Loading {
            deviations: deviations.to_vec(),
            ..self.loading.clone()
        };
        amend_by(seg, &loading, checks, |small, large, op_small, op_large| {
            let (small_states, small_strokes) =
                self.bore(small, &self.small, op_small, true, counts)?;
            let (large_states, large_strokes) =
                self.bore(large, &self.large, op_large, false, counts)?;
            let sharing = SharingChecks {
                stress: small.point_from(
                    op_small,
                    Judge::HighestStress,
                    &small_states,
                    &small_strokes,
                )?,
                holding: large.point_from(
                    op_large,
                    Judge::LeastHolding,
                    &large_states,
                    &large_strokes,
                )?,
                top_strip: large.point_from(
                    op_large,
                    Judge::FewestInContact,
                    &large_states,
                    &large_strokes,
                )?,
                bend: bend_passage(seg),
            };
            let list = |cases: &BoreCases<'_>, strokes: &[BoreStrokes]| {
                cases
                    .each()
                    .zip(strokes)
                    .map(|((c, a, _), s)| (c, a, Ok(*s)))
                    .collect()
            };
            Ok(Judged {
                sharing,
                small_strokes: list(small, &small_strokes),
                large_strokes: list(large, &large_strokes),
            })
        });
    }

    /// Every case's state at `op` and its strokes at one bore.
    fn bore(
        &self,
        cases: &BoreCases<'_>,
        plan: &[NearCase],
        op: f64,
        small: bool,
        counts: &NearCounts,
    ) -> Result<(Vec<SharedState>, Vec<BoreStrokes>), SharingError> {
        let mut states = Vec::new();
        let mut strokes = Vec::new();
        for (k, (_, _, lb)) in cases.each().enumerate() {
            let case = plan.get(k);
            let (st, s) = lb.near_case(case, op, small, self.want_last, counts)?;
            states.push(st);
            strokes.push(s);
        }
        Ok((states, strokes))
    }
}

impl LoadedBore<'_> {
    /// The state at `op` and the bore-level strokes of one case, near the nominal `case`.
    fn near_case(
        &self,
        case: Option<&NearCase>,
        op: f64,
        small: bool,
        want_last: bool,
        counts: &NearCounts,
    ) -> Result<(SharedState, BoreStrokes), SharingError> {
        let exact = |counts: &NearCounts| -> Result<(SharedState, BoreStrokes), SharingError> {
            counts.fallback();
            Ok((self.state(op)?, self.strokes()?))
        };
        let (Some(case), Some(nominal), None) = (
            case.filter(|c| c.stiffness.is_some()),
            case.and_then(|c| c.strokes),
            self.centred.as_ref(),
        ) else {
            return exact(counts);
        };
        let k = case.stiffness.unwrap_or([[0.0; 2]; 2]);
        let Some(st) = self.balance_near(op, case.offset, k)? else {
            return exact(counts);
        };
        counts.near();
        let d = st.hub_offset_mm;
        let first = self.first_contact_mm();
        let lift_off = match first {
            None => None,
            Some(first) if self.loading.radial_load_n == 0.0 => Some(first),
            Some(first) => match nominal.lift_off_stroke_mm {
                Some(s0) => match self.lift_off_near(s0, first)? {
                    Some(s) => Some(s),
                    None => return exact(counts),
                },
                None => return exact(counts),
            },
        };
        // The limit where it matters: the stroke check at the smallest bore, or an
        // operating stroke near the nominal limit.
        let (limit, limit_strip, limit_reason) = if small || op >= 0.8 * nominal.limit_stroke_mm {
            match self.limit_near(d, k, op, nominal.limit_stroke_mm)? {
                Some(l) => l,
                None => return exact(counts),
            }
        } else {
            (
                nominal.limit_stroke_mm,
                nominal.limit_strip,
                nominal.limit_reason,
            )
        };
        let last = match (want_last && !small, nominal.last_strip_contact_stroke_mm) {
            (true, Some(s0)) => match self.last_near(d, k, s0, limit)? {
                Some(s) => Some(s),
                None => return exact(counts),
            },
            (true, None) => None,
            // Not read by any check.
            (false, _) => nominal.last_strip_contact_stroke_mm,
        };
        let strokes = BoreStrokes {
            first_strip_contact_stroke_mm: first,
            lift_off_stroke_mm: lift_off,
            last_strip_contact_stroke_mm: last,
            limit_stroke_mm: limit,
            limit_strip,
            limit_reason,
        };
        // Past the limit the state is beyond it, as `LoadedBore::state` has it.
        let st = if op <= limit * (1.0 + 1e-9) {
            st
        } else {
            self.beyond(op, d, st.evaluations)
        };
        Ok((st, strokes))
    }

    /// The hub's stiffness `d (sum F_i u_i) / d offset` at `d`, N/mm, by central
    /// differences (`None` where a strip is past its limit nearby).
    pub(super) fn stiffness(&self, stroke_mm: f64, d: [f64; 2]) -> Option<[[f64; 2]; 2]> {
        let h = 1e-6 * self.bore_mm;
        let mut k = [[0.0; 2]; 2];
        for j in 0..2 {
            let mut plus = d;
            let mut minus = d;
            plus[j] += h;
            minus[j] -= h;
            let a = self.eval(plus, stroke_mm, false).ok()?;
            let b = self.eval(minus, stroke_mm, false).ok()?;
            if a.is_beyond() || b.is_beyond() {
                return None;
            }
            for (row, (fa, fb)) in k.iter_mut().zip(a.force.iter().zip(&b.force)) {
                row[j] = (fa - fb) / (2.0 * h);
            }
        }
        Some(k)
    }

    /// Whether the rim, centred at `d`, clears the wall (the hub does not rest).
    fn clears_wall(&self, d: [f64; 2]) -> bool {
        let rim = self.rim_radius_mm;
        let top = self.bore.inner_parallel(0.0, rim)[0];
        let bottom = self.bore.inner_parallel(std::f64::consts::PI, rim)[0];
        d[0] < top && d[0] > bottom && d[1].abs() <= self.reach_z(d[0])
    }

    /// The balanced state at `stroke_mm` by Broyden's method from `start` with the
    /// Jacobian `k`, each strip evaluated exactly at every step; `None` when it does not
    /// settle, a strip is past its limit, or the hub would rest on its rim.
    pub(super) fn balance_near(
        &self,
        stroke_mm: f64,
        start: [f64; 2],
        k: [[f64; 2]; 2],
    ) -> Result<Option<SharedState>, SolveFailure> {
        self.balance_from(stroke_mm, start, k, NEAR_TOL)
    }

    /// [`Self::balance_near`] to the general solver's own force tolerance (or `rel` of the
    /// load and the forces, when that is larger).
    pub(super) fn balance_from(
        &self,
        stroke_mm: f64,
        start: [f64; 2],
        k: [[f64; 2]; 2],
        rel: f64,
    ) -> Result<Option<SharedState>, SolveFailure> {
        let w = self.loading.radial_load_n;
        let mut d = start;
        let mut j = k;
        let mut held = 0usize;
        let mut e = self.eval(d, stroke_mm, false)?;
        for it in 0..NEAR_ITER {
            if e.is_beyond() {
                return Ok(None);
            }
            let all_free = e.strips.iter().all(|(_, s)| s.contact == 0.0);
            if w == 0.0 && all_free {
                // Nothing acts on the hub: the general solver leaves it centred.
                return Ok((d == [0.0, 0.0])
                    .then(|| self.assemble_eval(stroke_mm, d, &e, [0.0, 0.0], it + 1)));
            }
            let r = [e.force[0] + w, e.force[1]];
            let sum: f64 = e
                .strips
                .iter()
                .zip(&self.places)
                .map(|((_, s), p)| s.contact * self.classes[p.class].force_unit_n)
                .sum();
            let tol = self.tolerance_n(&e).max(rel * (w + sum));
            if r[0].hypot(r[1]) <= tol {
                if !self.clears_wall(d) {
                    // The hub would rest on its rim: the general solver's case.
                    return Ok(None);
                }
                return Ok(Some(self.assemble_eval(
                    stroke_mm,
                    d,
                    &e,
                    [0.0, 0.0],
                    it + 1,
                )));
            }
            let det = j[0][0] * j[1][1] - j[0][1] * j[1][0];
            if !(det.is_finite() && det != 0.0) {
                return Ok(None);
            }
            let dx = [
                -(j[1][1] * r[0] - j[0][1] * r[1]) / det,
                -(-j[1][0] * r[0] + j[0][0] * r[1]) / det,
            ];
            // A step that takes a strip past its limit is halved (the balance lies short
            // of it when it exists).
            let mut dx = dx;
            let mut next = [d[0] + dx[0], d[1] + dx[1]];
            let mut en = self.eval(next, stroke_mm, false)?;
            let mut halved = false;
            for _ in 0..HALVINGS {
                if !en.is_beyond() {
                    break;
                }
                halved = true;
                dx = [0.5 * dx[0], 0.5 * dx[1]];
                next = [d[0] + dx[0], d[1] + dx[1]];
                en = self.eval(next, stroke_mm, false)?;
            }
            if en.is_beyond() {
                return Ok(None);
            }
            // Halved again and again: the balance lies at or past a strip's limit.
            held = if halved { held + 1 } else { 0 };
            if held > HELD_STEPS {
                return Ok(None);
            }
            let rn = [en.force[0] + w, en.force[1]];
            // Broyden's update: J += (dr - J dx) dx^T / |dx|^2.
            let dd = dx[0] * dx[0] + dx[1] * dx[1];
            if dd > 0.0 {
                for i in 0..2 {
                    let jdx = j[i][0] * dx[0] + j[i][1] * dx[1];
                    let c = (rn[i] - r[i] - jdx) / dd;
                    j[i][0] += c * dx[0];
                    j[i][1] += c * dx[1];
                }
            }
            d = next;
            e = en;
        }
        Ok(None)
    }

    /// The balance at `s_to` followed from the balance `d_from` at `s_from`: directly, or
    /// through the middle stroke, `depth` levels deep.
    fn balance_follow(
        &self,
        s_from: f64,
        d_from: [f64; 2],
        s_to: f64,
        k: [[f64; 2]; 2],
        depth: usize,
    ) -> Result<Option<SharedState>, SolveFailure> {
        if let Some(st) = self.balance_near(s_to, d_from, k)? {
            return Ok(Some(st));
        }
        if depth == 0 {
            return Ok(None);
        }
        let mid = 0.5 * (s_from + s_to);
        match self.balance_follow(s_from, d_from, mid, k, depth - 1)? {
            Some(m) => self.balance_follow(mid, m.hub_offset_mm, s_to, k, depth - 1),
            None => Ok(None),
        }
    }

    /// The first strip's contact with the hub at its rest (centred with no load), mm: as
    /// the general solver finds it.
    fn first_contact_mm(&self) -> Option<f64> {
        let rest = self.rest_offset();
        (0..self.places.len())
            .filter_map(|i| {
                let l = self.classes[self.places[i].class].length_mm;
                self.path_at(i, rest)
                    .ok()?
                    .first_contact_stroke()
                    .map(|s| s * l)
            })
            .min_by(f64::total_cmp)
    }

    /// The lift-off stroke near `s0`: where the rest support's push, with the hub resting
    /// where the strips' pull along the wall balances, falls to zero. `None`: not found (a strip past
    /// its limit on the way, or no crossing within the steps).
    fn lift_off_near(&self, s0: f64, first: f64) -> Result<Option<f64>, SolveFailure> {
        let phi = std::cell::Cell::new(std::f64::consts::PI);
        let f = |s: f64| -> Result<Option<f64>, SolveFailure> {
            Ok(self.wall_push(s, phi.get())?.map(|(push, at)| {
                phi.set(at);
                push
            }))
        };
        // Bracket: the balance falls from `w` (before contact) as the strips push.
        let Some(f0) = f(s0)? else {
            return Ok(None);
        };
        let (mut a, mut fa, mut b, mut fb);
        if f0 > 0.0 {
            (a, fa) = (s0, f0);
            let mut step = 0.02 * s0.max(1e-9);
            loop {
                let s = a + step;
                let Some(v) = f(s)? else { return Ok(None) };
                if v <= 0.0 {
                    (b, fb) = (s, v);
                    break;
                }
                (a, fa) = (s, v);
                step *= 2.0;
                if step > s0 {
                    return Ok(None);
                }
            }
        } else {
            (b, fb) = (s0, f0);
            let mut step = 0.02 * s0.max(1e-9);
            loop {
                let s = (b - step).max(first);
                let Some(v) = f(s)? else { return Ok(None) };
                if v > 0.0 {
                    (a, fa) = (s, v);
                    break;
                }
                if s <= first {
                    // The strips carry the load at first contact already.
                    return Ok(Some(first));
                }
                (b, fb) = (s, v);
                step *= 2.0;
            }
        }
        // Illinois false position on [a, b]: f(a) > 0 >= f(b).
        let mut side = 0i8;
        for _ in 0..SECANT_ITER {
            if b - a <= 1e-10 * b.abs().max(1e-300) {
                return Ok(Some(b));
            }
            let x = a - fa * (b - a) / (fb - fa);
            let x = if x > a && x < b { x } else { 0.5 * (a + b) };
            let Some(v) = f(x)? else { return Ok(None) };
            if v > 0.0 {
                (a, fa) = (x, v);
                if side == 1 {
                    fb *= 0.5;
                }
                side = 1;
            } else {
                (b, fb) = (x, v);
                if v == 0.0 {
                    return Ok(Some(x));
                }
                if side == -1 {
                    fa *= 0.5;
                }
                side = -1;
            }
        }
        Ok(Some(b))
    }

    /// The push of the rest support on the hub at stroke `s`, N, with the hub resting
    /// where the strips' pull along the wall balances (normal angle `phi` of the contact
    /// point, a secant search from `phi0`), as the general solver's wall solve has it;
    /// `None` when a strip is past its limit there or the search does not settle.
    fn wall_push(&self, s: f64, phi0: f64) -> Result<Option<(f64, f64)>, SolveFailure> {
        let w = self.loading.radial_load_n;
        let rim = self.rim_radius_mm;
        let at = |phi: f64| -> Result<Option<(f64, f64)>, SolveFailure> {
            let e = self.eval(self.bore.inner_parallel(phi, rim), s, false)?;
            if e.is_beyond() {
                return Ok(None);
            }
            let r = [e.force[0] + w, e.force[1]];
            let (sn, cs) = phi.sin_cos();
            Ok(Some((-r[0] * sn + r[1] * cs, -(r[0] * cs + r[1] * sn))))
        };
        let Some((mut t0, mut push)) = at(phi0)? else {
            return Ok(None);
        };
        let mut p0 = phi0;
        let mut p1 = phi0 + 1e-4;
        for _ in 0..SECANT_ITER {
            if t0.abs() <= 1e-11 * w {
                return Ok(Some((push, p0)));
            }
            let Some((t1, push1)) = at(p1)? else {
                return Ok(None);
            };
            if t1.abs() <= 1e-11 * w || (p1 - p0).abs() <= 1e-14 {
                return Ok(Some((push1, p1)));
            }
            if t1 == t0 {
                return Ok(None);
            }
            let next = p1 - t1 * (p1 - p0) / (t1 - t0);
            (p0, t0, push) = (p1, t1, push1);
            p1 = next;
        }
        Ok(None)
    }

    /// The least over the strips of each one's own limit at its gap at offset `d`, mm,
    /// with the strip and the reason.
    fn strip_limits(&self, d: [f64; 2]) -> Option<(f64, usize, LimitReason)> {
        (0..self.places.len())
            .filter_map(|i| {
                let l = self.classes[self.places[i].class].length_mm;
                let lim = self.path_at(i, d).ok()?.limit();
                Some((lim.stroke * l, i, lim.reason))
            })
            .min_by(|a, b| a.0.total_cmp(&b.0))
    }

    /// The root of `phi(s) = G(d(s)) - s` near `start`, `d(s)` the hub offset balanced at
    /// stroke `s` and `G` a stroke the strips give at that offset (`None`: no balance, or
    /// `G` not found there, which counts as `phi < 0`): Illinois false position once
    /// bracketed, secant or fixed-point steps until then. Returns the root with `G`'s
    /// extra value, at the end of the final bracket `valid_end` picks (`true`: where
    /// `phi > 0`), or `None` when it does not settle within [`FIXED_STEPS`].
    fn stroke_root<T: Copy>(
        &self,
        start: f64,
        d_start: [f64; 2],
        k: [[f64; 2]; 2],
        g: &dyn Fn([f64; 2]) -> Option<(f64, T)>,
        valid_end: bool,
    ) -> Result<Option<(f64, T)>, SolveFailure> {
        struct Point<T> {
            s: f64,
            phi: Option<f64>,
            d: [f64; 2],
            t: Option<T>,
        }
        // Valid balances so far: the guess at a new stroke is the line through the two
        // nearest, and a balance that cannot be reached from there is followed from the
        // nearest in two to four steps.
        let valid = std::cell::RefCell::new(vec![(start, d_start)]);
        let eval = |s: f64, _d: [f64; 2]| -> Result<Point<T>, SolveFailure> {
            let (from, guess) = {
                let mut v = valid.borrow().clone();
                v.sort_by(|a, b| (a.0 - s).abs().total_cmp(&(b.0 - s).abs()));
                let from = v[0];
                let guess = match v.get(1) {
                    Some(&(s1, d1)) if s1 != from.0 => {
                        let f = (s - from.0) / (from.0 - s1);
                        [
                            from.1[0] + f * (from.1[0] - d1[0]),
                            from.1[1] + f * (from.1[1] - d1[1]),
                        ]
                    }
                    _ => from.1,
                };
                (from, guess)
            };
            let mut found = self.balance_near(s, guess, k)?;
            if found.is_none() {
                found = self.balance_follow(from.0, from.1, s, k, FOLLOW_DEPTH)?;
            }
            let Some(st) = found else {
                return Ok(Point {
                    s,
                    phi: None,
                    d: guess,
                    t: None,
                });
            };
            valid.borrow_mut().push((s, st.hub_offset_mm));
            let at = g(st.hub_offset_mm);
            Ok(Point {
                s,
                phi: at.map(|(v, _)| v - s),
                d: st.hub_offset_mm,
                t: at.map(|(_, t)| t),
            })
        };
        let mut lo: Option<Point<T>> = None;
        let mut lo_prev: Option<(f64, f64)> = None;
        let mut hi: Option<Point<T>> = None;
        let mut side = 0i8;
        let (mut f_lo, mut f_hi) = (0.0, 0.0);
        let mut x = start;
        let mut d = d_start;
        for _ in 0..FIXED_STEPS {
            let p = eval(x, d)?;
            // Settled from one side: the stroke moves by no more than the searches' 1e-10.
            if let (Some(phi), Some(t)) = (p.phi, p.t)
                && phi.abs() <= 1e-10 * p.s.abs()
                && (phi > 0.0 || !valid_end)
            {
                return Ok(Some((p.s, t)));
            }
            match p.phi {
                Some(phi) if phi > 0.0 => {
                    if let Some(l) = &lo {
                        lo_prev = l.phi.map(|f| (l.s, f));
                    }
                    f_lo = phi;
                    if side == 1 {
                        f_hi *= 0.5;
                    }
                    side = 1;
                    lo = Some(p);
                }
                Some(0.0) => return Ok(p.t.map(|t| (p.s, t))),
                _ => {
                    f_hi = p.phi.unwrap_or(f64::NAN);
                    if side == -1 {
                        f_lo *= 0.5;
                    }
                    side = -1;
                    hi = Some(p);
                }
            }
            x = match (&lo, &hi) {
                (Some(a), Some(b)) => {
                    if b.s - a.s <= 1e-10 * b.s.abs() {
                        let end = if valid_end { a } else { b };
                        return Ok(end.t.or(a.t).map(|t| (end.s, t)));
                    }
                    let inside = |v: f64| v > a.s && v < b.s;
                    let secant = a.s - f_lo * (b.s - a.s) / (f_hi - f_lo);
                    let extrapolated = lo_prev
                        .map(|(s0, f0)| a.s - f_lo * (a.s - s0) / (f_lo - f0))
                        .filter(|v| inside(*v));
                    if f_hi.is_finite() && inside(secant) {
                        secant
                    } else if let Some(v) = extrapolated {
                        // Just short of the predicted root: at the limit itself a strip
                        // sits on its own limit and rounding can put the balance past it.
                        (v * (1.0 - SHORT_OF_ROOT)).max(0.5 * (a.s + v))
                    } else {
                        0.5 * (a.s + b.s)
                    }
                }
                (Some(a), None) => {
                    let fixed = a.s + f_lo;
                    lo_prev
                        .map(|(s0, f0)| a.s - f_lo * (a.s - s0) / (f_lo - f0))
                        .filter(|v| v.is_finite() && *v > a.s)
                        .map(|v| (v * (1.0 - SHORT_OF_ROOT)).max(0.5 * (a.s + v)))
                        .unwrap_or(fixed)
                }
                (None, Some(b)) => match b.phi {
                    Some(phi) => b.s + phi,
                    None => return Ok(None),
                },
                (None, None) => return Ok(None),
            };
            d = match (&lo, &hi) {
                (Some(a), Some(b)) if b.phi.is_some() && (x - b.s).abs() < (x - a.s).abs() => b.d,
                (Some(a), _) => a.d,
                (None, Some(b)) => b.d,
                (None, None) => d,
            };
        }
        Ok(None)
    }

    /// The segment's limit near the nominal one: the root of
    /// `s = min_i limit_i(gap_i(d(s)))` from the operating stroke (where the offset is
    /// `d_op`), the last stroke with a state.
    fn limit_near(
        &self,
        d_op: [f64; 2],
        k: [[f64; 2]; 2],
        op: f64,
        _nominal: f64,
    ) -> Result<Option<(f64, usize, LimitReason)>, SolveFailure> {
        let g = |d: [f64; 2]| self.strip_limits(d).map(|(s, i, r)| (s, (i, r)));
        match g(d_op) {
            Some((s, _)) if s > op => {}
            // The limit lies before the operating stroke: the general solver finds it.
            _ => return Ok(None),
        }
        Ok(self
            .stroke_root(op, d_op, k, &g, true)?
            .map(|(s, (i, r))| (s, i, r)))
    }

    /// The last strip's contact near the nominal `s0`: the root of
    /// `s = max_i first_contact_i(gap_i(d(s)))`; `None` past `limit` or where it is not
    /// found.
    fn last_near(
        &self,
        d_op: [f64; 2],
        k: [[f64; 2]; 2],
        s0: f64,
        limit: f64,
    ) -> Result<Option<f64>, SolveFailure> {
        let g = |d: [f64; 2]| -> Option<(f64, ())> {
            (0..self.places.len())
                .map(|i| {
                    let l = self.classes[self.places[i].class].length_mm;
                    self.path_at(i, d)
                        .ok()
                        .and_then(|p: Path| p.first_contact_stroke())
                        .map(|s| s * l)
                })
                .try_fold(f64::NEG_INFINITY, |m, s| s.map(|s| m.max(s)))
                .map(|s| (s, ()))
        };
        Ok(self
            .stroke_root(s0.min(limit), d_op, k, &g, false)?
            .map(|(s, ())| s)
            .filter(|&s| s <= limit))
    }
}
