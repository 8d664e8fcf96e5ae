//! The hub-offset solve and the bore-level strokes. Symmetric cases (equal strips, a strip
//! or a gap on the load line) keep the offset on the load line: a bracketed one-dimensional
//! root of the vertical force balance, which rises with the offset because a gap that
//! shrinks raises its force. Mirror pairs of strips share one strip solve. Unequal strips
//! take both components: nested bracketed roots (the horizontal balance inside, the
//! vertical outside), and on the rest support a bracketed root of the tangential balance
//! along the rim's reach. Every
//! loop has a bound and every failure a [`SolveFailure`].

use std::f64::consts::PI;

use crate::elastica::{Path, PathError, Phase, StripState};

use super::{BoreStrokes, LoadedBore, SharedState, SolveFailure, Totals};

/// Iteration bound of the one-dimensional root.
const MAX_ITER_1D: usize = 200;
/// Scan points along the stroke for the bore-level strokes.
const SCAN: usize = 24;
/// Bisection steps refining a bore-level stroke.
const BISECT: usize = 48;

/// On the wall at one normal angle: the tangential balance with the residual (`None` past
/// a limit), the hub offset and the evaluation.
type WallPoint = (Option<(f64, [f64; 2])>, [f64; 2], Eval);

/// The inner root's answer at one height.
struct Inner {
    z: f64,
    /// The full residual where every strip has a state.
    r: Option<[f64; 2]>,
    e: Eval,
    /// The balance needs the wall: `z` is at the end of the reach.
    clamped: bool,
}

/// The outer root's value at one height.
struct Outer {
    y: f64,
    g: f64,
    inner: Inner,
}

/// One evaluation of every strip at a hub offset.
pub(super) struct Eval {
    /// Gap and strip state per strip, in clock order (states are `BeyondLimit` for strips
    /// that touch or are past their limit).
    pub(super) strips: Vec<(f64, StripState)>,
    /// `sum F_i u_i`, N.
    pub(super) force: [f64; 2],
    /// Strips past their limit (or touching the wall at rest).
    pub(super) beyond: Vec<usize>,
}

impl Eval {
    pub(super) fn is_beyond(&self) -> bool {
        !self.beyond.is_empty()
    }
}

/// A strip state that is past the limit (or has no clearance).
fn beyond_state(stroke: f64) -> StripState {
    crate::elastica::no_state(Phase::BeyondLimit, stroke)
}

impl LoadedBore<'_> {
    /// The strip model of class `class` at gap `gap_mm` and stroke `stroke_mm`.
    pub(super) fn strip_at(
        &self,
        class: usize,
        gap_mm: f64,
        stroke_mm: f64,
    ) -> Result<StripState, PathError> {
        let l = self.classes[class].length_mm;
        let path = Path::new(self.segment.design.strip.ends, gap_mm / l)?;
        Ok(path.state(stroke_mm / l))
    }

    /// The strip's path at its gap at offset `d`.
    pub(super) fn path_at(&self, i: usize, d: [f64; 2]) -> Result<Path, PathError> {
        let l = self.classes[self.places[i].class].length_mm;
        Path::new(self.segment.design.strip.ends, self.gap_mm(i, d, false) / l)
    }

    /// Every strip at offset `d` (`folded`: symmetric case, mirror pairs solved once).
    pub(super) fn eval(
        &self,
        d: [f64; 2],
        stroke_mm: f64,
        folded: bool,
    ) -> Result<Eval, SolveFailure> {
        let n = self.places.len();
        let mut strips: Vec<(f64, StripState)> = Vec::with_capacity(n);
        let mut force = [0.0, 0.0];
        let mut beyond = Vec::new();
        for i in 0..n {
            let p = &self.places[i];
            let gap = self.gap_mm(i, d, folded);
            let reuse = folded
                .then(|| {
                    strips
                        .iter()
                        .zip(&self.places)
                        .find(|((g, _), q)| g.to_bits() == gap.to_bits() && q.class == p.class)
                        .map(|((_, s), _)| *s)
                })
                .flatten();
            let state = match reuse {
                Some(s) => s,
                None => match self.strip_at(p.class, gap, stroke_mm) {
                    Ok(s) => s,
                    Err(PathError::NoClearance { .. }) => beyond_state(stroke_mm),
                    Err(PathError::NotFinite) => {
                        return Err(SolveFailure::NotFinite {
                            strip: i,
                            stroke_mm,
                        });
                    }
                },
            };
            if state.phase == Phase::BeyondLimit {
                beyond.push(i);
            } else {
                let f = state.contact * self.classes[p.class].force_unit_n;
                if !f.is_finite() {
                    return Err(SolveFailure::NotFinite {
                        strip: i,
                        stroke_mm,
                    });
                }
                force[0] += f * p.u[0];
                force[1] += f * p.u[1];
            }
            strips.push((gap, state));
        }
        Ok(Eval {
            strips,
            force,
            beyond,
        })
    }

    /// The vertical balance `sum F_i u_iy + W` at offset `(y, 0)`: +inf / -inf when a strip
    /// above / below is past its limit (its force would be unbounded), NaN when a strip on
    /// the horizontal is (no offset along the load line helps).
    fn balance_y(&self, y: f64, stroke_mm: f64) -> Result<(f64, Eval), SolveFailure> {
        let e = self.eval([y, 0.0], stroke_mm, true)?;
        let w = self.loading.radial_load_n;
        if e.is_beyond() {
            let up = e.beyond.iter().all(|&i| self.places[i].u[0] > 1e-12);
            let down = e.beyond.iter().all(|&i| self.places[i].u[0] < -1e-12);
            let r = match (up, down) {
                (true, false) => f64::INFINITY,
                (false, true) => f64::NEG_INFINITY,
                _ => f64::NAN,
            };
            return Ok((r, e));
        }
        Ok((e.force[0] + w, e))
    }

    pub(super) fn beyond(&self, stroke_mm: f64, d: [f64; 2], evaluations: usize) -> SharedState {
        SharedState {
            stroke_mm,
            hub_offset_mm: d,
            on_support: false,
            beyond_limit: true,
            strips: Vec::new(),
            totals: Totals {
                actuator_force_n: 0.0,
                radial_force_n: 0.0,
                holding_force_n: 0.0,
                max_stress_mpa: 0.0,
                static_safety_factor: f64::INFINITY,
                fatigue_safety_factor: f64::INFINITY,
                mean_axial_force_per_strip_n: 0.0,
                mean_contact_force_per_strip_n: 0.0,
                support_reaction_n: [0.0, 0.0],
                strips_in_contact: 0,
                strips_off_wall: 0,
                worst_strip: 0,
                strain_energy_j: 0.0,
            },
            residual_n: [f64::NAN, f64::NAN],
            evaluations,
        }
    }

    /// The loaded state at a valid stroke.
    pub(super) fn solve(&self, stroke_mm: f64) -> Result<SharedState, SolveFailure> {
        if self.symmetric {
            self.solve_1d(stroke_mm)
        } else {
            self.solve_2d(stroke_mm)
        }
    }

    /// The strips' force units `B / L^2` summed, N: the scale of their forces.
    pub(super) fn force_scale_n(&self) -> f64 {
        self.places
            .iter()
            .map(|p| self.classes[p.class].force_unit_n)
            .sum()
    }

    /// Force tolerance: a fraction of the load, or of the strips' forces with no load.
    pub(super) fn tolerance_n(&self, e: &Eval) -> f64 {
        let w = self.loading.radial_load_n;
        if w > 0.0 {
            1e-11 * w
        } else {
            let sum: f64 = e
                .strips
                .iter()
                .zip(&self.places)
                .filter(|((_, s), _)| s.phase != Phase::BeyondLimit)
                .map(|((_, s), p)| s.contact * self.classes[p.class].force_unit_n)
                .sum();
            1e-12 * sum + f64::MIN_POSITIVE
        }
    }

    fn solve_1d(&self, stroke_mm: f64) -> Result<SharedState, SolveFailure> {
        let c = self.clearance_y_mm;
        let (y_lo, y_hi) = (-c, c);
        let w = self.loading.radial_load_n;
        let count = std::cell::Cell::new(0usize);
        let eval = |y: f64| {
            count.set(count.get() + 1);
            self.balance_y(y, stroke_mm)
        };
        // Bracket ends: offset and balance once evaluated.
        let mut lo: (f64, Option<f64>) = (y_lo, None);
        let mut hi: (f64, Option<f64>) = (y_hi, None);
        let mut prev: Option<(f64, f64)> = None;
        let mut y = 0.0_f64.clamp(y_lo, y_hi);
        // Offsets closer than this are one for the strip solver's rounding.
        let step_tol = 1e-13 * c.max(1e-300);
        let mut best: Option<(f64, f64)> = None;
        for _ in 0..MAX_ITER_1D {
            let (r, e) = eval(y)?;
            if r.is_finite() && best.is_none_or(|(_, b)| r.abs() < b) {
                best = Some((y, r.abs()));
            }
            if r.is_nan() {
                return self.rest_or_beyond(stroke_mm, [y, 0.0], count.get());
            }
            let all_free = !e.is_beyond() && e.strips.iter().all(|(_, s)| s.contact == 0.0);
            if w == 0.0 && all_free {
                // Nothing acts on the hub: it stays where it is put, centred.
                return Ok(self.assemble_eval(stroke_mm, [y, 0.0], &e, [0.0, 0.0], count.get()));
            }
            if r.is_finite() && r.abs() <= self.tolerance_n(&e) {
                return Ok(self.assemble_eval(stroke_mm, [y, 0.0], &e, [0.0, 0.0], count.get()));
            }
            // On the rest support, pushed against it.
            if y == y_lo && r >= 0.0 && r.is_finite() {
                return Ok(self.assemble_eval(stroke_mm, [y, 0.0], &e, [r, 0.0], count.get()));
            }
            if y == y_hi && r <= 0.0 && r.is_finite() {
                return Ok(self.assemble_eval(stroke_mm, [y, 0.0], &e, [r, 0.0], count.get()));
            }
            if r > 0.0 {
                hi = (y, Some(r));
            } else {
                lo = (y, Some(r));
            }
            // Next offset: secant (a finite-difference slope on the first step).
            let slope = match prev {
                Some((yp, rp)) if r.is_finite() && rp.is_finite() && y != yp => (r - rp) / (y - yp),
                _ if r.is_finite() => {
                    let h = 1e-7 * c.max(1e-6);
                    let yh = if y + h <= y_hi { y + h } else { y - h };
                    let (rh, _) = eval(yh)?;
                    (rh - r) / (yh - y)
                }
                _ => f64::NAN,
            };
            if r.is_finite() {
                prev = Some((y, r));
            }
            let newton = y - r / slope;
            let inside = |x: f64| x > lo.0 && x < hi.0;
            let next = if slope > 0.0 && newton.is_finite() && inside(newton) {
                newton
            } else if r > 0.0 && lo.1.is_none() {
                y_lo
            } else if r < 0.0 && hi.1.is_none() {
                y_hi
            } else {
                match (lo.1, hi.1) {
                    (Some(a), Some(b)) if a.is_finite() && b.is_finite() => {
                        // False position, kept off the ends.
                        let x = lo.0 - a * (hi.0 - lo.0) / (b - a);
                        let span = hi.0 - lo.0;
                        x.clamp(lo.0 + 0.05 * span, hi.0 - 0.05 * span)
                    }
                    _ => 0.5 * (lo.0 + hi.0),
                }
            };
            let tight = lo.1.is_some() && hi.1.is_some() && hi.0 - lo.0 <= step_tol;
            if (next - y).abs() <= step_tol || tight {
                // At the rounding floor: the best offset seen is the state, unless the
                // balance jumps there across a strip's limit (then there is no state).
                let across_limit =
                    lo.1.is_some_and(f64::is_infinite) || hi.1.is_some_and(f64::is_infinite);
                let at = match best {
                    Some((yb, rb)) if !across_limit || rb <= 100.0 * self.tolerance_n(&e) => yb,
                    _ => return self.rest_or_beyond(stroke_mm, [next, 0.0], count.get()),
                };
                let (_, e) = eval(at)?;
                return Ok(self.assemble_eval(stroke_mm, [at, 0.0], &e, [0.0, 0.0], count.get()));
            }
            y = next;
        }
        Err(SolveFailure::IterationLimit {
            stroke_mm,
            iterations: MAX_ITER_1D,
        })
    }

    /// Whether the strips past their limit in `e` (the hub on its rest) have left the wall
    /// rather than marking the segment's limit: each sits closer to the wall than with the
    /// hub centred and has a state at this stroke there, so it is past its limit only
    /// because the hub rests on its side, and comes back once the strips lift the hub.
    fn off_wall_allowed(&self, e: &Eval, stroke_mm: f64) -> bool {
        e.beyond.iter().all(|&i| {
            let gap_rest = e.strips[i].0;
            let gap_centre = self.gap_mm(i, [0.0, 0.0], false);
            let l = self.classes[self.places[i].class].length_mm;
            gap_rest < gap_centre
                && Path::new(self.segment.design.strip.ends, gap_centre / l)
                    .is_ok_and(|p| p.phase_at(stroke_mm / l).has_state())
        })
    }

    /// Symmetric cases with no balance short of a strip's limit: the hub on its rest, the
    /// strips past their own limit there off the wall (mechanics note, "Load sharing": the
    /// rest support carries what the strips do not), when the other strips push less than
    /// the load and those strips are past their limit only because the hub rests on their
    /// side ([`Self::off_wall_allowed`]); else the state is beyond the segment's limit.
    fn rest_or_beyond(
        &self,
        stroke_mm: f64,
        d: [f64; 2],
        evaluations: usize,
    ) -> Result<SharedState, SolveFailure> {
        let w = self.loading.radial_load_n;
        if w > 0.0 {
            let y = -self.clearance_y_mm;
            let e = self.eval([y, 0.0], stroke_mm, true)?;
            let r = e.force[0] + w;
            if r >= 0.0 && self.off_wall_allowed(&e, stroke_mm) {
                return Ok(self.assemble(
                    stroke_mm,
                    [y, 0.0],
                    &e.strips,
                    [r, 0.0],
                    evaluations + 1,
                ));
            }
        }
        Ok(self.beyond(stroke_mm, d, evaluations))
    }

    /// Unequal strips with no balance short of a strip's limit: the hub on the wall with
    /// strips off it, as [`Self::rest_or_beyond`], else beyond the limit.
    fn wall_or_beyond(
        &self,
        stroke_mm: f64,
        d: [f64; 2],
        evaluations: usize,
    ) -> Result<SharedState, SolveFailure> {
        if self.loading.radial_load_n > 0.0 {
            match self.solve_on_wall(stroke_mm, evaluations) {
                Ok(st) => return Ok(st),
                Err(SolveFailure::NoRestBalance { .. }) => {}
                Err(e) => return Err(e),
            }
        }
        Ok(self.beyond(stroke_mm, d, evaluations))
    }

    /// [`Self::wall_or_beyond`], after looking for a lifted balance (every strip short of
    /// its limit, the rim clear of the wall) from `best`, then from the centre, by Broyden
    /// steps (the hub's stiffness by central differences at the start): the nested roots
    /// can give up on a trial offset with strips past their limit on both sides while such
    /// a balance lies nearby, and the quasi-static path stays on it.
    fn lifted_or_wall(
        &self,
        stroke_mm: f64,
        d: [f64; 2],
        best: Option<[f64; 2]>,
        evaluations: usize,
    ) -> Result<SharedState, SolveFailure> {
        // From the best trial, else from the centre.
        for start in best.into_iter().chain(std::iter::once([0.0, 0.0])) {
            if let Some(k) = self.stiffness(stroke_mm, start)
                && let Some(st) = self.balance_from(stroke_mm, start, k, 1e-13)?
            {
                return Ok(st);
            }
        }
        self.wall_or_beyond(stroke_mm, d, evaluations)
    }

    pub(super) fn assemble_eval(
        &self,
        stroke_mm: f64,
        d: [f64; 2],
        e: &Eval,
        support: [f64; 2],
        evaluations: usize,
    ) -> SharedState {
        if e.is_beyond() {
            return self.beyond(stroke_mm, d, evaluations);
        }
        self.assemble(stroke_mm, d, &e.strips, support, evaluations)
    }

    /// Residual `sum F_i u_i + W` (the support's share) at offset `d`; `None` past a limit.
    pub(super) fn residual_2d(
        &self,
        d: [f64; 2],
        stroke_mm: f64,
    ) -> Result<(Option<[f64; 2]>, Eval), SolveFailure> {
        let e = self.eval(d, stroke_mm, false)?;
        if e.is_beyond() {
            return Ok((None, e));
        }
        let r = [e.force[0] + self.loading.radial_load_n, e.force[1]];
        Ok((Some(r), e))
    }

    /// Half the width along `z` of the rim centre's reach at height `y`, mm: the point of
    /// the inner parallel curve (convex while the rim is no larger than the wall's least
    /// radius of curvature, which the caller has checked) at that height, by bisection on
    /// its normal angle, whose height falls from the top (`phi = 0`) to the bottom.
    pub(super) fn reach_z(&self, y: f64) -> f64 {
        let rim = self.rim_radius_mm;
        let (mut lo, mut hi) = (0.0, PI);
        if y >= self.bore.inner_parallel(lo, rim)[0] || y <= self.bore.inner_parallel(hi, rim)[0] {
            return 0.0;
        }
        for _ in 0..BISECT + 16 {
            let mid = 0.5 * (lo + hi);
            if mid <= lo || mid >= hi {
                break;
            }
            if self.bore.inner_parallel(mid, rim)[0] > y {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        // The inner side of the bracket, so the rim clears the wall.
        let z = self.bore.inner_parallel(lo, rim)[1].min(self.bore.inner_parallel(hi, rim)[1]);
        z.max(0.0)
    }

    /// The force balance at `d` for the nested roots: the residual when every strip has a
    /// state, else +inf / -inf along component `comp` when all strips past their limit lie
    /// on its positive / negative side (NaN when they lie on both, or across it).
    fn signed_residual(
        &self,
        d: [f64; 2],
        stroke_mm: f64,
        comp: usize,
    ) -> Result<(f64, Option<[f64; 2]>, Eval), SolveFailure> {
        let (r, e) = self.residual_2d(d, stroke_mm)?;
        if let Some(r) = r {
            return Ok((r[comp], Some(r), e));
        }
        let v = self.beyond_sign(&e, comp);
        Ok((v, None, e))
    }

    /// Where the strips past their limit push along component `comp`: +inf / -inf when all
    /// of them that lie off the perpendicular line are on its positive / negative side, NaN
    /// when they lie on both sides or none is off it.
    fn beyond_sign(&self, e: &Eval, comp: usize) -> f64 {
        let off: Vec<f64> = e
            .beyond
            .iter()
            .map(|&i| self.places[i].u[comp])
            .filter(|u| u.abs() > 1e-12)
            .collect();
        if off.is_empty() {
            f64::NAN
        } else if off.iter().all(|&u| u > 0.0) {
            f64::INFINITY
        } else if off.iter().all(|&u| u < 0.0) {
            f64::NEG_INFINITY
        } else {
            f64::NAN
        }
    }

    /// Inner root: the `z` balancing the horizontal force at height `y`, from `z0`.
    fn inner_z(
        &self,
        y: f64,
        z0: f64,
        stroke_mm: f64,
        count: &mut usize,
    ) -> Result<Inner, SolveFailure> {
        let zm = self.reach_z(y);
        let z0 = z0.clamp(-zm, zm);
        *count += 1;
        let (f0, r0, e0) = self.signed_residual([y, z0], stroke_mm, 1)?;
        let tol = self.tolerance_n(&e0);
        let done = |z: f64, _f: f64, r: Option<[f64; 2]>, e: Eval, clamped: bool| Inner {
            z,
            r,
            e,
            clamped,
        };
        if f0.is_nan() || (f0.is_finite() && f0.abs() <= tol) {
            return Ok(done(z0, f0, r0, e0, false));
        }
        // The other end of the bracket: the reach's end on the side the balance points to.
        let z1 = if f0 > 0.0 { -zm } else { zm };
        if z1 == z0 {
            return Ok(done(z0, f0, r0, e0, true));
        }
        let mut z1 = z1;
        *count += 1;
        let (mut f1, mut r1, mut e1) = self.signed_residual([y, z1], stroke_mm, 1)?;
        // An end with no state (strips past their limit on both sides): draw it in.
        for _ in 0..BISECT {
            if !f1.is_nan() {
                break;
            }
            z1 = 0.5 * (z0 + z1);
            *count += 1;
            (f1, r1, e1) = self.signed_residual([y, z1], stroke_mm, 1)?;
        }
        if f1.is_nan() {
            return Ok(done(z1, f1, r1, e1, false));
        }
        if f1.signum() == f0.signum() {
            // No balance within the reach: the hub is pressed to the wall at this height.
            return Ok(done(z1, f1, r1, e1, true));
        }
        let ((mut a, mut fa), (mut b, mut fb)) = if z0 < z1 {
            ((z0, f0), (z1, f1))
        } else {
            ((z1, f1), (z0, f0))
        };
        let floor = 1e-15 * self.bore_mm;
        let mut side = 0i8;
        for _ in 0..MAX_ITER_1D {
            // Illinois false position; bisection while an end is past a limit.
            let z = if fa.is_finite() && fb.is_finite() {
                let x = a - fa * (b - a) / (fb - fa);
                if x > a && x < b { x } else { 0.5 * (a + b) }
            } else {
                0.5 * (a + b)
            };
            *count += 1;
            let (f, r, e) = self.signed_residual([y, z], stroke_mm, 1)?;
            if f.is_nan() || (f.is_finite() && f.abs() <= tol) {
                return Ok(done(z, f, r, e, false));
            }
            if b - a <= floor {
                // At the rounding floor with the balance jumping across a strip's limit:
                // no state at this height short of that strip's limit.
                let past = if fa.is_infinite() && f.signum() != fa.signum() {
                    Some(a)
                } else if fb.is_infinite() && f.signum() != fb.signum() {
                    Some(b)
                } else {
                    None
                };
                if let Some(zp) = past {
                    *count += 1;
                    let (fp, rp, ep) = self.signed_residual([y, zp], stroke_mm, 1)?;
                    return Ok(done(zp, fp, rp, ep, false));
                }
                return Ok(done(z, f, r, e, false));
            }
            if f.signum() == fa.signum() {
                a = z;
                fa = f;
                if side == -1 {
                    fb *= 0.5;
                }
                side = -1;
            } else {
                b = z;
                fb = f;
                if side == 1 {
                    fa *= 0.5;
                }
                side = 1;
            }
        }
        Err(SolveFailure::IterationLimit {
            stroke_mm,
            iterations: MAX_ITER_1D,
        })
    }

    /// Unequal strips: nested bracketed roots. For each height `y` the inner root finds the
    /// `z` that balances the horizontal force (it rises with `z`: a gap that shrinks raises
    /// its force); the outer root finds the `y` at which the vertical force balances at that
    /// `z`, which rises with `y` for the same reason. Both are Illinois false position, kept
    /// in their brackets, so kinks of the force sum (a strip's two edges tying) cannot stall
    /// them. A balance that needs the wall goes to the rest solve.
    fn solve_2d(&self, stroke_mm: f64) -> Result<SharedState, SolveFailure> {
        let mut count = 0usize;
        let w = self.loading.radial_load_n;
        let rim = self.rim_radius_mm;
        let curvature = self.bore.min_curvature_radius();
        if rim > curvature {
            return Err(SolveFailure::RimTooLargeForOvality {
                rim_mm: rim,
                curvature_mm: curvature,
            });
        }
        let cy = self.bore.clearance_y(rim).max(0.0);
        let mut z_prev = 0.0;
        // The offset with the least out-of-balance force seen where every strip has a
        // state: where a lifted balance is looked for when the nested roots give up.
        let best: std::cell::Cell<Option<([f64; 2], f64)>> = std::cell::Cell::new(None);
        let outer = |y: f64, z_prev: &mut f64, count: &mut usize| -> Result<Outer, SolveFailure> {
            let inner = self.inner_z(y, *z_prev, stroke_mm, count)?;
            *z_prev = inner.z;
            let g = match inner.r {
                Some(r) => {
                    let size = r[0].hypot(r[1]);
                    if best.get().is_none_or(|(_, b)| size < b) {
                        best.set(Some(([y, inner.z], size)));
                    }
                    r[0]
                }
                None => self.beyond_sign(&inner.e, 0),
            };
            Ok(Outer { y, g, inner })
        };
        let wall_or_beyond = |stroke_mm: f64, d: [f64; 2], count: usize| {
            self.lifted_or_wall(stroke_mm, d, best.get().map(|(b, _)| b), count)
        };
        let first = outer(0.0, &mut z_prev, &mut count)?;
        let all_free =
            first.inner.r.is_some() && first.inner.e.strips.iter().all(|(_, s)| s.contact == 0.0);
        if w == 0.0 && all_free {
            // Nothing acts on the hub: it stays where it is put, centred.
            return Ok(self.assemble_eval(
                stroke_mm,
                [0.0, 0.0],
                &first.inner.e,
                [0.0, 0.0],
                count,
            ));
        }
        let settle = |o: Outer, count: usize| -> Result<SharedState, SolveFailure> {
            let d = [o.y, o.inner.z];
            match o.inner.r {
                None => wall_or_beyond(stroke_mm, d, count),
                Some(_) if o.inner.clamped => self.solve_on_wall(stroke_mm, count),
                Some(r) => {
                    // At the rounding floor of the offset, a residual within the strip
                    // solver's own rounding of the forces (a millionth of a millionth of
                    // the strips' force unit `B / L^2`; the tolerance proper can fall
                    // below that when the strips barely touch) is the state.
                    let tol = self.tolerance_n(&o.inner.e);
                    let floor = 1e-10 * self.force_scale_n();
                    if r[0].hypot(r[1]) <= (2.0 * tol).max(floor) {
                        Ok(self.assemble_eval(stroke_mm, d, &o.inner.e, [0.0, 0.0], count))
                    } else {
                        Err(SolveFailure::Stalled {
                            stroke_mm,
                            residual_n: r[0].hypot(r[1]),
                        })
                    }
                }
            }
        };
        if first.g.is_nan() {
            return wall_or_beyond(stroke_mm, [0.0, first.inner.z], count);
        }
        let tol_of = |o: &Outer| self.tolerance_n(&o.inner.e);
        if first.g.is_finite() && first.g.abs() <= tol_of(&first) {
            return settle(first, count);
        }
        let y1 = if first.g > 0.0 { -cy } else { cy };
        let mut end = outer(y1, &mut z_prev, &mut count)?;
        // An end of the reach where strips on both sides are past their limit says
        // nothing of the balance in between: draw it in towards the first height until
        // the strips there have states (or no longer say which way the balance points).
        let mut y_end = y1;
        for _ in 0..BISECT {
            if !end.g.is_nan() {
                break;
            }
            y_end = 0.5 * (first.y + y_end);
            if (y_end - first.y).abs() <= 1e-12 * self.bore_mm {
                break;
            }
            end = outer(y_end, &mut z_prev, &mut count)?;
        }
        if end.g.is_nan() {
            return wall_or_beyond(stroke_mm, [end.y, end.inner.z], count);
        }
        if end.g.signum() == first.g.signum() {
            // The strips cannot balance the load anywhere in the reach: the hub rests.
            return self.solve_on_wall(stroke_mm, count);
        }
        let (mut a, mut b) = if first.y < end.y {
            (first, end)
        } else {
            (end, first)
        };
        let floor = 1e-15 * self.bore_mm;
        let mut side = 0i8;
        let (mut fa, mut fb) = (a.g, b.g);
        for _ in 0..MAX_ITER_1D {
            let y = if fa.is_finite() && fb.is_finite() {
                let x = a.y - fa * (b.y - a.y) / (fb - fa);
                if x > a.y && x < b.y {
                    x
                } else {
                    0.5 * (a.y + b.y)
                }
            } else {
                0.5 * (a.y + b.y)
            };
            let o = outer(y, &mut z_prev, &mut count)?;
            if o.g.is_nan() {
                return wall_or_beyond(stroke_mm, [o.y, o.inner.z], count);
            }
            if o.g.is_finite() && o.g.abs() <= tol_of(&o) {
                return settle(o, count);
            }
            if b.y - a.y <= floor {
                // At the rounding floor: a jump across a strip's limit is no state.
                if !(fa.is_finite() && fb.is_finite()) {
                    return wall_or_beyond(stroke_mm, [o.y, o.inner.z], count);
                }
                return settle(o, count);
            }
            if o.g.signum() == a.g.signum() {
                fa = o.g;
                a = o;
                if side == -1 {
                    fb *= 0.5;
                }
                side = -1;
            } else {
                fb = o.g;
                b = o;
                if side == 1 {
                    fa *= 0.5;
                }
                side = 1;
            }
        }
        Err(SolveFailure::IterationLimit {
            stroke_mm,
            iterations: MAX_ITER_1D,
        })
    }

    /// The hub resting on the wall: the rim's centre on the inner parallel curve at normal
    /// angle `phi`; the tangential balance is zero and the support pushes off the wall.
    fn solve_on_wall(
        &self,
        stroke_mm: f64,
        evaluations: usize,
    ) -> Result<SharedState, SolveFailure> {
        let count = std::cell::Cell::new(evaluations);
        let rim = self.rim_radius_mm;
        let curvature = self.bore.min_curvature_radius();
        if rim > curvature {
            return Err(SolveFailure::RimTooLargeForOvality {
                rim_mm: rim,
                curvature_mm: curvature,
            });
        }
        // On the wall, strips past their limit only because the hub rests on their side
        // have left it and carry nothing.
        let tangential = |phi: f64| -> Result<WallPoint, SolveFailure> {
            count.set(count.get() + 1);
            let d = self.bore.inner_parallel(phi, rim);
            let e = self.eval(d, stroke_mm, false)?;
            let r = (!e.is_beyond() || self.off_wall_allowed(&e, stroke_mm))
                .then(|| [e.force[0] + self.loading.radial_load_n, e.force[1]]);
            Ok((r.map(|r| (-r[0] * phi.sin() + r[1] * phi.cos(), r)), d, e))
        };
        // The hub rests where the net push on it, taken at the centre, points: under a
        // weight near the bottom (phi = pi). The tangential balance rises with phi there;
        // bracket it by widening steps.
        count.set(count.get() + 1);
        let centre = match self.residual_2d([0.0, 0.0], stroke_mm)?.0 {
            Some(r) if r[0] != 0.0 || r[1] != 0.0 => (-r[1]).atan2(-r[0]),
            _ => PI,
        };
        let mut lo = centre;
        let mut hi = centre;
        let mut found = false;
        for k in 1..=16 {
            let span = 0.05 * k as f64;
            let (a, b) = (centre - span, centre + span);
            let ta = tangential(a)?.0.map(|(t, _)| t);
            let tb = tangential(b)?.0.map(|(t, _)| t);
            if let (Some(ta), Some(tb)) = (ta, tb)
                && ta <= 0.0
                && tb >= 0.0
            {
                lo = a;
                hi = b;
                found = true;
                break;
            }
        }
        if !found {
            return Err(SolveFailure::NoRestBalance { stroke_mm });
        }
        let w = self.loading.radial_load_n.max(f64::MIN_POSITIVE);
        for _ in 0..MAX_ITER_1D {
            let mid = 0.5 * (lo + hi);
            let (t, d, e) = tangential(mid)?;
            let Some((t, r)) = t else {
                return Ok(self.beyond(stroke_mm, d, count.get()));
            };
            if t.abs() <= 1e-11 * w || hi - lo <= 1e-15 {
                let (s, c) = mid.sin_cos();
                let push = -(r[0] * c + r[1] * s);
                if push < 0.0 {
                    // The strips pull the hub off the wall here: they balance the load
                    // just inside the rest support's reach (near lift-off, where the
                    // nested roots can miss it). Balance it from here, else no state.
                    if let Some(k) = self.stiffness(stroke_mm, d)
                        && let Some(st) = self.balance_from(stroke_mm, d, k, 1e-13)?
                    {
                        return Ok(st);
                    }
                    // Within rounding of the load (the tangential balance's own tolerance
                    // times a thousand), the hub sits at the wall with no support: the
                    // strips lift it exactly here.
                    if push < -1e-8 * w {
                        return Err(SolveFailure::NoRestBalance { stroke_mm });
                    }
                }
                let push = push.max(0.0);
                let support = [-push * c, -push * s];
                return Ok(self.assemble(stroke_mm, d, &e.strips, support, count.get()));
            }
            if t > 0.0 {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        Err(SolveFailure::IterationLimit {
            stroke_mm,
            iterations: MAX_ITER_1D,
        })
    }

    /// The hub's position before any strip touches: on its rest under a load, else centred.
    pub(super) fn rest_offset(&self) -> [f64; 2] {
        if self.loading.radial_load_n > 0.0 {
            if self.symmetric {
                [-self.clearance_y_mm, 0.0]
            } else {
                self.bore.inner_parallel(PI, self.rim_radius_mm)
            }
        } else {
            [0.0, 0.0]
        }
    }

    /// The first stroke in `[lo, hi]` where `pred` holds, as a bracket `(false, true)`
    /// refined by bisection; `None` when it holds nowhere on the scan.
    fn first_true(
        &self,
        lo: f64,
        hi: f64,
        mut pred: impl FnMut(f64) -> Result<bool, SolveFailure>,
    ) -> Result<Option<(f64, f64)>, SolveFailure> {
        if pred(lo)? {
            return Ok(Some((lo, lo)));
        }
        let mut a = lo;
        for j in 1..=SCAN {
            let b = lo + (hi - lo) * j as f64 / SCAN as f64;
            if pred(b)? {
                let (mut x, mut y) = (a, b);
                for _ in 0..BISECT {
                    if y - x <= 1e-10 * hi.abs().max(1e-300) {
                        break;
                    }
                    let m = 0.5 * (x + y);
                    if pred(m)? {
                        y = m;
                    } else {
                        x = m;
                    }
                }
                return Ok(Some((x, y)));
            }
            a = b;
        }
        Ok(None)
    }

    pub(super) fn find_strokes(&self) -> Result<BoreStrokes, SolveFailure> {
        let n = self.places.len();
        let rest = self.rest_offset();
        let first = (0..n)
            .filter_map(|i| {
                let l = self.classes[self.places[i].class].length_mm;
                self.path_at(i, rest)
                    .ok()?
                    .first_contact_stroke()
                    .map(|s| s * l)
            })
            .min_by(f64::total_cmp);
        // The limit: scan up to well past the centred strips' limits, then the chord.
        let longest = self
            .classes
            .iter()
            .map(|k| k.length_mm)
            .fold(f64::INFINITY, f64::min);
        let centred_limit = (0..n)
            .filter_map(|i| {
                let l = self.classes[self.places[i].class].length_mm;
                self.path_at(i, [0.0, 0.0])
                    .ok()
                    .map(|p| p.limit().stroke * l)
            })
            .fold(0.0, f64::max);
        let top = 0.999 * longest;
        let upper = (2.0 * centred_limit).min(top);
        let start = first.unwrap_or(0.0);
        // Lift-off: the first stroke where the strips carry the whole load, unless a state
        // beyond the limit comes first (a lifted balance past it is not reached).
        let lift_off = match first {
            None => None,
            Some(first) if self.loading.radial_load_n == 0.0 => Some(first),
            Some(_) => {
                let mut event = |s: f64| self.solve(s).map(|st| st.beyond_limit || !st.on_support);
                let found = match self.first_true(start, upper, &mut event)? {
                    Some(b) => Some(b),
                    None => self.first_true(upper, top, &mut event)?,
                };
                match found {
                    Some((_, t)) if !self.solve(t)?.beyond_limit => Some(t),
                    _ => None,
                }
            }
        };
        // The limit: the first state beyond it, or, once the strips have lifted the hub, the
        // first that drops back onto the rim with strips off the wall (a strip reached its
        // own limit while the strips carried the load).
        let mut beyond = |s: f64| {
            self.solve(s).map(|st| {
                st.beyond_limit
                    || (lift_off.is_some_and(|l| s > l)
                        && st.on_support
                        && st.totals.strips_off_wall > 0)
            })
        };
        let from = lift_off.unwrap_or(start);
        let bracket = match self.first_true(from, upper.max(from), &mut beyond)? {
            Some(b) => Some(b),
            None => self.first_true(upper.max(from), top, &mut beyond)?,
        };
        let (limit_stroke_mm, limit_strip, limit_reason) = match bracket {
            Some((valid, _)) => {
                let st = self.solve(valid)?;
                let d = st.hub_offset_mm;
                // The strip closest to its own limit there.
                let (strip, reason) = (0..n)
                    .filter_map(|i| {
                        let l = self.classes[self.places[i].class].length_mm;
                        let lim = self.path_at(i, d).ok()?.limit();
                        Some((i, lim.stroke * l - valid, lim.reason))
                    })
                    .min_by(|a, b| a.1.total_cmp(&b.1))
                    .map(|(i, _, r)| (i, r))
                    .unwrap_or((0, crate::elastica::LimitReason::ChordClosed));
                (valid, strip, reason)
            }
            None => (top, 0, crate::elastica::LimitReason::ChordClosed),
        };
        let Some(first) = first else {
            return Ok(BoreStrokes {
                first_strip_contact_stroke_mm: None,
                lift_off_stroke_mm: None,
                last_strip_contact_stroke_mm: None,
                limit_stroke_mm,
                limit_strip,
                limit_reason,
            });
        };
        let upper = limit_stroke_mm.max(first);
        let last = self
            .first_true(first, upper, |s| {
                self.solve(s).map(|st| {
                    !st.beyond_limit
                        && st
                            .strips
                            .iter()
                            .all(|r| matches!(r.phase, Phase::PointContact | Phase::LineContact))
                })
            })?
            .map(|(_, t)| t);
        Ok(BoreStrokes {
            first_strip_contact_stroke_mm: Some(first),
            lift_off_stroke_mm: lift_off,
            last_strip_contact_stroke_mm: last,
            limit_stroke_mm,
            limit_strip,
            limit_reason,
        })
    }
}
