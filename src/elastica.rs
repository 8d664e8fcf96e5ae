//! One strip as an inextensible Euler elastica between two end plates, with a straight bore
//! wall at gap `g` in its meridional plane: free bulge, point contact at the crest, line
//! contact (a flat run on the wall), and the limit where the model stops.
//!
//! Everything here is nondimensional: lengths are divided by the free length `L`, forces
//! by `B / L^2`, energy by `B / L`, curvature multiplied by `L`. Each arc is the elastica
//! with an inclined end resultant in Legendre form (modulus `k = sin(alpha / 2)`, phase
//! `phi`; Timoshenko and Gere, Theory of Elastic Stability, 1961, section 2.7, for the free
//! strip), and the phase equations below write the crest, the stroke and the forces of
//! each phase from it. The model stops where [`LimitReason`] says: the flat run buckles
//! as a column, the flat run closes past the fold of line contact (`k` = 0.4897, where
//! `c sin(alpha) / l` peaks at 0.64214), the chord closes, the axial force vanishes, or
//! the strips leave the wall. Clamped and
//! hinged strips share one geometry: a clamped half strip is two hinged half strips of half
//! the length, point-mirrored about the inflection, so at the same `g / L` and `delta / L`
//! the hinged strip has the same shape parameters with `lambda` halved (forces and energy
//! divided by four, curvature by two). The tests hold both to their own small-gap laws.
//!
//! The path for one gap (`Path::new`) is followed from rest with a parameter that is
//! monotonic along it: the modulus `k` in the free phase and in line contact, the stroke
//! itself (two-equation Newton in `k` and the plate phase `phi0`) in point contact.

use std::f64::consts::{FRAC_PI_2, PI};

use serde::{Deserialize, Serialize};

use crate::elliptic;

/// End fixity of the strips at the plates (a design file writes `Clamped` or `Hinged`).
#[derive(Default, Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum Ends {
    /// Slope zero at both plates (the usual bolted strip).
    #[default]
    Clamped,
    /// Moment-free ends.
    Hinged,
}

impl Ends {
    /// Name for tables and the sheet.
    pub fn name(self) -> &'static str {
        match self {
            Ends::Clamped => "clamped",
            Ends::Hinged => "hinged",
        }
    }
}

/// Phase of the strip at a stroke. Serialised by its [`Phase::name`] (kebab-case).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Phase {
    /// No contact: the strip bows freely.
    Free,
    /// The crest touches the wall at one point.
    PointContact,
    /// A flat run of the strip lies on the wall.
    LineContact,
    /// Past the limit of the model: no state is reported.
    BeyondLimit,
    /// Short of the limit, but the solver failed to find the state at this stroke: no
    /// state is reported (a failure of the solver, not a limit of the model).
    SolveFailed,
}

impl Phase {
    /// The name used in files, tables and JSON (`free`, `point-contact`, ...).
    pub fn name(self) -> &'static str {
        match self {
            Phase::Free => "free",
            Phase::PointContact => "point-contact",
            Phase::LineContact => "line-contact",
            Phase::BeyondLimit => "beyond-limit",
            Phase::SolveFailed => "solve-failed",
        }
    }

    /// Whether a state of this phase carries forces, stresses and a shape (free, point or
    /// line contact), rather than none (beyond the limit, or a failed solve).
    pub fn has_state(self) -> bool {
        matches!(self, Phase::Free | Phase::PointContact | Phase::LineContact)
    }
}

impl std::fmt::Display for Phase {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.pad(self.name())
    }
}

/// Why the model stops along a path. Serialised by its [`LimitReason::name`] (kebab-case).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum LimitReason {
    /// The flat run, a column under the axial force, reaches its buckling load and can lift
    /// off the wall (the strip may snap to a two-lobe shape).
    FlatRunBuckling,
    /// Past the fold of line contact the flat run shrinks back to zero length.
    FlatRunCloses,
    /// The end plates would meet or cross (chord `L - stroke <= 0`).
    ChordClosed,
    /// The axial force falls to zero: the plates no longer need pulling.
    AxialForceVanishes,
    /// The solver could not follow the branch further (no continuous solution found).
    BranchLost,
    /// On a point-contact branch without line contact (g/L above about 0.32) the contact
    /// force falls back to zero: the strips leave the wall (the wall cannot pull).
    #[serde(rename = "strips-leave-wall")]
    LeavesWall,
}

impl LimitReason {
    /// One-line explanation for tables, the app and the sheet.
    pub fn describe(self) -> &'static str {
        match self {
            LimitReason::FlatRunBuckling => {
                "flat run on the wall reaches its column buckling load and can snap off the wall"
            }
            LimitReason::FlatRunCloses => {
                "flat run shrinks back to zero past the fold of line contact"
            }
            LimitReason::ChordClosed => "end plates would meet (strip chord reaches zero)",
            LimitReason::AxialForceVanishes => "axial force per strip falls to zero",
            LimitReason::BranchLost => "solver lost the continuous solution branch",
            LimitReason::LeavesWall => {
                "the strips leave the wall: the contact force falls back to zero"
            }
        }
    }

    /// Short machine name for CSV and JSON.
    pub fn name(self) -> &'static str {
        match self {
            LimitReason::FlatRunBuckling => "flat-run-buckling",
            LimitReason::FlatRunCloses => "flat-run-closes",
            LimitReason::ChordClosed => "chord-closed",
            LimitReason::AxialForceVanishes => "axial-force-vanishes",
            LimitReason::BranchLost => "branch-lost",
            LimitReason::LeavesWall => "strips-leave-wall",
        }
    }
}

impl std::fmt::Display for LimitReason {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.pad(self.name())
    }
}

/// Where the strip's centreline leaves the room between the end plates. The model lets
/// the strip pass through the plates and through itself (it has no such contact), so a
/// state showing one of these is not physical: a caution, not a limit.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum Overlap {
    /// Part of the strip swings behind the plane of an end plate.
    BehindPlate,
    /// The two halves of the strip cross each other at the mid-plane.
    HalvesCross,
}

impl Overlap {
    /// One-line explanation for tables, the app and the sheet.
    pub fn describe(self) -> &'static str {
        match self {
            Overlap::BehindPlate => {
                "part of each strip swings behind the plane of an end plate (the model lets it pass through the plate)"
            }
            Overlap::HalvesCross => {
                "the two halves of each strip cross at the mid-plane (the model lets the strip pass through itself)"
            }
        }
    }

    /// Short machine name for CSV and JSON.
    pub fn name(self) -> &'static str {
        match self {
            Overlap::BehindPlate => "behind-plate",
            Overlap::HalvesCross => "halves-cross",
        }
    }
}

/// Why a path could not be set up at all.
#[derive(Clone, Copy, Debug, PartialEq, thiserror::Error)]
pub enum PathError {
    /// The gap to the wall is zero or negative: the relaxed strip already touches or cuts
    /// the bore, so the model has no state.
    #[error("the relaxed strip does not clear the bore (gap {gap:e} L <= 1e-12 L)")]
    NoClearance {
        /// Nondimensional gap.
        gap: f64,
    },
    /// The gap is not a finite number.
    #[error("the gap to the wall is not a finite number")]
    NotFinite,
}

/// The answer of an inverse query (the least stroke at which a measure reaches a value).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum StrokeQuery {
    /// The least stroke (nondimensional in [`Path`], mm in the segment's queries).
    Found(f64),
    /// The value is not reached before the model's limit (or the bore is out of reach).
    NotReached,
    /// The value is reached, but the root finder lost the bracket around the crossing.
    BracketLost,
    /// A solve needed on the way failed (no state found where one should exist).
    SolveFailed,
}

impl StrokeQuery {
    /// The stroke when found, `None` otherwise (an empty table cell).
    pub fn ok(self) -> Option<f64> {
        match self {
            StrokeQuery::Found(x) => Some(x),
            _ => None,
        }
    }

    /// The found stroke mapped by `f` (e.g. into mm); the other outcomes as they are.
    pub fn map(self, f: impl FnOnce(f64) -> f64) -> StrokeQuery {
        match self {
            StrokeQuery::Found(x) => StrokeQuery::Found(f(x)),
            other => other,
        }
    }

    /// A found value passed on to `f`; the other outcomes as they are.
    fn and_then(self, f: impl FnOnce(f64) -> StrokeQuery) -> StrokeQuery {
        match self {
            StrokeQuery::Found(x) => f(x),
            other => other,
        }
    }

    /// One line saying why no stroke was found (`None` when one was).
    pub fn describe(self) -> Option<&'static str> {
        match self {
            StrokeQuery::Found(_) => None,
            StrokeQuery::NotReached => Some("not reached before the model's limit"),
            StrokeQuery::BracketLost => {
                Some("the solver lost the bracket around the crossing (no stroke reported)")
            }
            StrokeQuery::SolveFailed => {
                Some("the solver failed on the way to the crossing (no stroke reported)")
            }
        }
    }
}

/// State of one strip (nondimensional).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct StripState {
    /// Phase at this stroke.
    pub phase: Phase,
    /// Stroke `delta / L`.
    pub stroke: f64,
    /// Elliptic modulus `k = sin(alpha / 2)` of the solution.
    pub k: f64,
    /// Phase `phi0` at the plate (point contact) or 0.
    pub phi0: f64,
    /// Length of each free arc `l / L` (line contact) or 0.5.
    pub arc: f64,
    /// Axial compression per strip, `P L^2 / B`.
    pub axial: f64,
    /// Wall contact force per strip, `F L^2 / B`.
    pub contact: f64,
    /// Crest height above the strip's rest line, `h / L`.
    pub crest_height: f64,
    /// Length of the flat run on the wall, `(L - 2 l) / L`.
    pub flat_length: f64,
    /// Peak magnitude of curvature, `kappa_max L`.
    pub kappa_max: f64,
    /// Strain energy of the strip, `U L / B`.
    pub energy: f64,
}

// ---------------------------------------------------------------------------------------
// Forward-mode dual numbers with two partials, so Newton steps have exact Jacobians.

#[derive(Clone, Copy, Debug)]
struct D {
    v: f64,
    d: [f64; 2],
}

impl D {
    fn c(v: f64) -> D {
        D { v, d: [0.0, 0.0] }
    }
    fn var(v: f64, i: usize) -> D {
        let mut d = [0.0, 0.0];
        d[i] = 1.0;
        D { v, d }
    }
    fn chain(self, v: f64, dv: f64) -> D {
        D {
            v,
            d: [self.d[0] * dv, self.d[1] * dv],
        }
    }
    fn sqrt(self) -> D {
        let r = self.v.sqrt();
        self.chain(r, 0.5 / r)
    }
    fn sq(self) -> D {
        self * self
    }
}

impl std::ops::Add for D {
    type Output = D;
    fn add(self, o: D) -> D {
        D {
            v: self.v + o.v,
            d: [self.d[0] + o.d[0], self.d[1] + o.d[1]],
        }
    }
}
impl std::ops::Sub for D {
    type Output = D;
    fn sub(self, o: D) -> D {
        D {
            v: self.v - o.v,
            d: [self.d[0] - o.d[0], self.d[1] - o.d[1]],
        }
    }
}
impl std::ops::Mul for D {
    type Output = D;
    fn mul(self, o: D) -> D {
        D {
            v: self.v * o.v,
            d: [
                self.d[0] * o.v + self.v * o.d[0],
                self.d[1] * o.v + self.v * o.d[1],
            ],
        }
    }
}
impl std::ops::Div for D {
    type Output = D;
    fn div(self, o: D) -> D {
        let q = self.v / o.v;
        D {
            v: q,
            d: [
                (self.d[0] - q * o.d[0]) / o.v,
                (self.d[1] - q * o.d[1]) / o.v,
            ],
        }
    }
}
impl std::ops::Mul<D> for f64 {
    type Output = D;
    fn mul(self, o: D) -> D {
        D {
            v: self * o.v,
            d: [self * o.d[0], self * o.d[1]],
        }
    }
}
impl std::ops::Sub<D> for f64 {
    type Output = D;
    fn sub(self, o: D) -> D {
        D {
            v: self - o.v,
            d: [-o.d[0], -o.d[1]],
        }
    }
}

/// Complete integrals `(K, E)` of a dual modulus (AGM only; cheaper than `complete_d`).
fn complete_ke_d(k: D) -> (D, D) {
    let ke = elliptic::complete(k.v);
    let (dk, de) = elliptic::complete_dk(k.v, ke);
    (k.chain(ke.0, dk), k.chain(ke.1, de))
}

/// `c sin(alpha) / l` from `(K, E)` alone, for the onset and closing searches.
fn reach_d(k: D) -> D {
    let (kk, ee) = complete_ke_d(k);
    let kp = (1.0 - k.sq()).sqrt();
    (2.0 * (ee / kk) - D::c(1.0)) * (2.0 * (k * kp))
}

/// Complete integrals `(K, E, D)` of a dual modulus, `D = (K - E) / k^2`.
fn complete_d(k: D) -> (D, D, D) {
    let ked = elliptic::complete3(k.v);
    let (dk, de) = elliptic::complete_dk(k.v, (ked.0, ked.1));
    let dd = elliptic::complete_d_dk(k.v, ked);
    (k.chain(ked.0, dk), k.chain(ked.1, de), k.chain(ked.2, dd))
}

/// Incomplete integrals `(F, E, D)` at `|phi| <= pi/2` of a dual phase and modulus, with
/// `sin phi` and `cos phi` as duals (one trigonometric evaluation for all of them).
fn incomplete_d(phi: D, k: D) -> ((D, D, D), (D, D)) {
    let set = elliptic::incomplete_set(phi.v, k.v);
    let (s, delta) = (set.sin, set.delta);
    let mix = |v: f64, by_phi: f64, by_k: f64| D {
        v,
        d: [
            phi.d[0] * by_phi + k.d[0] * by_k,
            phi.d[1] * by_phi + k.d[1] * by_k,
        ],
    };
    let (f, e, d) = set.fed;
    let (fk, ek, dk) = set.fed_dk;
    (
        (
            mix(f, 1.0 / delta, fk),
            mix(e, delta, ek),
            mix(d, s * s / delta, dk),
        ),
        (phi.chain(s, set.cos), phi.chain(set.cos, -s)),
    )
}

// ---------------------------------------------------------------------------------------
// The three phases of a clamped strip as functions of their parameters. `scale` converts
// to the end condition: forces and energy times `scale^2`... see `EndScale`.

/// Force, energy and curvature factors of an end condition relative to clamped.
#[derive(Clone, Copy, Debug)]
struct EndScale {
    force: f64,
    curvature: f64,
}

impl EndScale {
    fn of(ends: Ends) -> EndScale {
        match ends {
            Ends::Clamped => EndScale {
                force: 1.0,
                curvature: 1.0,
            },
            Ends::Hinged => EndScale {
                force: 0.25,
                curvature: 0.5,
            },
        }
    }
}

/// Free phase at modulus `k` (clamped form): `(stroke, axial, crest, kappa_max, energy)`.
/// Differences such as `K - E` are formed from `D = (K - E)/k^2` so that small gaps keep
/// full relative precision.
fn free_d(k: D) -> [D; 5] {
    let (kk, _, dc) = complete_d(k);
    let k2 = k.sq();
    let stroke = 2.0 * (k2 * dc / kk);
    let lam = 4.0 * kk;
    let axial = lam.sq();
    let crest = k / kk;
    let kappa = 2.0 * (k * lam);
    let energy = 8.0 * (lam * (k2 * (kk - dc)));
    [stroke, axial, crest, kappa, energy]
}

/// Point-contact quantities at `(k, phi0)` (clamped form).
#[derive(Clone, Copy, Debug)]
struct PointQ {
    crest: D,
    stroke: D,
    axial: D,
    contact: D,
    kappa: D,
    energy: D,
}

fn point_d(k: D, phi0: D) -> PointQ {
    let (kk, _, dc) = complete_d(k);
    let ((f0, _, d0), (sin0, cos0)) = incomplete_d(phi0, k);
    let span = kk - f0; // K - F(phi0)
    let k2 = k.sq();
    let lam = 4.0 * span;
    // (K - F0) - (E - E0) = k^2 (D - D0): xi = 1/2 - k^2 (D - D0) / (K - F0).
    let ddiff = dc - d0;
    let xi = D::c(0.5) - k2 * ddiff / span;
    let eta = k * cos0 / span;
    let s = D::c(0.0) - k * sin0; // sin(psi / 2)
    let c = (1.0 - s.sq()).sqrt();
    let sin_psi = 2.0 * (s * c);
    let cos_psi = 1.0 - 2.0 * s.sq();
    let crest = xi * sin_psi + eta * cos_psi;
    // 1/2 - x_half = s^2 + k^2 (D - D0) cos(psi) / (K - F0) + eta sin(psi): all terms >= 0.
    let shortening = s.sq() + k2 * ddiff * cos_psi / span + eta * sin_psi;
    let q = lam.sq();
    PointQ {
        crest,
        stroke: 2.0 * shortening,
        axial: q * cos_psi,
        contact: 2.0 * (q * sin_psi),
        kappa: 2.0 * (k * lam),
        // (E - E0) - k'^2 (K - F0) = k^2 ((K - F0) - (D - D0)).
        energy: 8.0 * (lam * (k2 * (span - ddiff))),
    }
}

/// Line-contact quantities at modulus `k` and gap `g` (clamped form).
#[derive(Clone, Copy, Debug)]
struct LineQ {
    arc: D,
    stroke: D,
    axial: D,
    contact: D,
    kappa: D,
    energy: D,
}

/// `c sin(alpha) / l` of a free arc in line contact: its peak 0.64214 at k = 0.4897 bounds
/// the gaps that line contact can start at. Returns `(reach, K, D)`.
fn line_reach_d(k: D) -> (D, D, D) {
    let (kk, _, dc) = complete_d(k);
    let kp = (1.0 - k.sq()).sqrt();
    let sin_a = 2.0 * (k * kp);
    let chord_ratio = 1.0 - 2.0 * (k.sq() * dc / kk); // 2E/K - 1
    (chord_ratio * sin_a, kk, dc)
}

fn line_d(k: D, gap: f64) -> LineQ {
    let (reach, kk, dc) = line_reach_d(k);
    let k2 = k.sq();
    let kp = (1.0 - k2).sqrt();
    let sin_a = 2.0 * (k * kp);
    let cos_a = 1.0 - 2.0 * k2;
    let arc = D::c(gap) / reach;
    let lam = 4.0 * kk / arc;
    let q = lam.sq();
    LineQ {
        arc,
        // 2 l (1 - (c/l) cos(alpha)) = 4 l k^2 (1 + D cos(alpha) / K).
        stroke: 4.0 * (arc * k2 * (D::c(1.0) + dc * cos_a / kk)),
        axial: q * cos_a,
        contact: 2.0 * (q * sin_a),
        kappa: 2.0 * (k * lam),
        energy: 16.0 * (lam * (k2 * (kk - dc))),
    }
}

/// The flat-run buckling margin `P (L - 2l)^2 - 4 pi^2` (clamped form) in line contact at
/// modulus `k`, in plain arithmetic for scans that want only its sign.
fn line_buckling_margin(k: f64, gap: f64) -> f64 {
    let (kk, _, dc) = elliptic::complete3(k);
    let k2 = k * k;
    let reach = (1.0 - 2.0 * k2 * dc / kk) * 2.0 * k * ((1.0 - k) * (1.0 + k)).sqrt();
    let arc = gap / reach;
    let lam = 4.0 * kk / arc;
    let flat = 1.0 - 2.0 * arc;
    lam * lam * (1.0 - 2.0 * k2) * flat * flat - 4.0 * PI * PI
}

// ---------------------------------------------------------------------------------------
// Scalar root finding with iteration bounds.

/// Smallest gap (over L) with a state: below it the strip is taken to touch the wall.
pub const MIN_GAP: f64 = 1e-12;

/// Below this gap (over L) the flat run buckles before line contact reaches its fold. The
/// crossover itself lies between g/L 0.19 and 0.20 (about 0.195); the shortcut stops short
/// of it, and `flat_run_buckles_before_the_fold_below_the_shortcut_gap` holds both.
const BUCKLES_BEFORE_FOLD: f64 = 0.18;

/// Below this gap (over L) the strip never swings behind a plate nor crosses itself before
/// the model's limit (`no_overlap_below_the_shortcut_gap` holds it on a grid up to 0.19;
/// the first cases appear at about 0.195).
const NO_OVERLAP_BELOW: f64 = 0.18;

/// Iteration bound of every Newton solve here.
const MAX_NEWTON: usize = 60;

/// Safeguarded Newton on `[lo, hi]` when the signs at the ends are already known
/// (`rising`: negative at `lo`, positive at `hi`). Once a Newton step is below
/// `sqrt(tol)`, quadratic convergence puts the next iterate within `tol`, so it stops there.
fn newton_signed(
    mut lo: f64,
    mut hi: f64,
    rising: bool,
    x0: f64,
    tol: f64,
    mut f: impl FnMut(f64) -> (f64, f64),
) -> Option<f64> {
    let mut x = x0.clamp(lo, hi);
    let quadratic = tol.sqrt();
    for _ in 0..MAX_NEWTON {
        let (fx, dfx) = f(x);
        if fx == 0.0 {
            return Some(x);
        }
        if !fx.is_finite() {
            return None;
        }
        if (fx > 0.0) == rising {
            hi = x;
        } else {
            lo = x;
        }
        let newton = x - fx / dfx;
        let scale = 1.0 + x.abs();
        let next = if newton > lo && newton < hi && newton.is_finite() {
            // Relative to x itself: small moduli (small gaps) need their own digits.
            if (newton - x).abs() <= quadratic * x.abs() {
                return Some(newton);
            }
            newton
        } else {
            0.5 * (lo + hi)
        };
        if (next - x).abs() <= tol * scale || hi - lo <= tol * scale {
            return Some(next);
        }
        x = next;
    }
    Some(x)
}

/// When the `roots` crate's Newton-Raphson is done: a step below `sqrt(1e-15) |x|` leaves
/// the next iterate within rounding (convergence is quadratic), and a residual within
/// `1e-15` of the target's size is a root. Leaving the bracket ends the search at once.
struct NewtonSettled<'a> {
    y_scale: f64,
    left_bracket: &'a std::cell::Cell<bool>,
}

impl roots::Convergency<f64> for NewtonSettled<'_> {
    fn is_root_found(&mut self, y: f64) -> bool {
        y.abs() <= 1e-15 * self.y_scale
    }
    fn is_converged(&mut self, x1: f64, x2: f64) -> bool {
        (x1 - x2).abs() <= 3e-8 * x1.abs().max(x2.abs())
    }
    fn is_iteration_limit_reached(&mut self, iter: usize) -> bool {
        iter >= MAX_NEWTON || self.left_bracket.get()
    }
}

/// Brent's method converges only superlinearly, so it runs to rounding in `x`.
struct BrentSettled {
    y_scale: f64,
}

impl roots::Convergency<f64> for BrentSettled {
    fn is_root_found(&mut self, y: f64) -> bool {
        y.abs() <= 1e-15 * self.y_scale
    }
    fn is_converged(&mut self, x1: f64, x2: f64) -> bool {
        (x1 - x2).abs() <= 1e-15 * (1.0 + x1.abs().max(x2.abs()))
    }
    fn is_iteration_limit_reached(&mut self, iter: usize) -> bool {
        iter >= MAX_NEWTON
    }
}

/// An inverse query `f(x) = 0` on `[lo, hi]`, where `f` (value and exact derivative) changes
/// sign across the bracket: Newton-Raphson from `seed` with the `roots` crate, and its
/// Brent method on the bracket if Newton leaves it or does not settle. `y_scale` is the
/// size of the target value, for the residual test. `Found` holds the root in `x`.
fn inverse_query(
    lo: f64,
    hi: f64,
    seed: f64,
    y_scale: f64,
    f: impl Fn(f64) -> (f64, f64),
) -> StrokeQuery {
    let left_bracket = std::cell::Cell::new(false);
    // roots asks for the value and then the derivative at the same x: evaluate once.
    let last = std::cell::Cell::new((f64::NAN, f64::NAN, f64::NAN));
    let eval = |x: f64| {
        let (lx, v, d) = last.get();
        if lx == x {
            return (v, d);
        }
        if !(x >= lo && x <= hi) {
            left_bracket.set(true);
            return (f64::NAN, f64::NAN);
        }
        let (v, d) = f(x);
        last.set((x, v, d));
        (v, d)
    };
    let y_scale = y_scale.abs().max(f64::MIN_POSITIVE);
    let mut newton = NewtonSettled {
        y_scale,
        left_bracket: &left_bracket,
    };
    let found = roots::find_root_newton_raphson(
        seed.clamp(lo, hi),
        |x| eval(x).0,
        |x| eval(x).1,
        &mut newton,
    );
    if let Ok(x) = found
        && x >= lo
        && x <= hi
        && !left_bracket.get()
    {
        return StrokeQuery::Found(x);
    }
    let mut brent = BrentSettled { y_scale };
    brent_query(roots::find_root_brent(lo, hi, |x| f(x).0, &mut brent))
}

/// The outcome of a Brent search as a query's answer: no sign change across the bracket
/// is a lost bracket, anything else that finds no finite root a failed solve.
fn brent_query(found: Result<f64, roots::SearchError>) -> StrokeQuery {
    match found {
        Ok(x) if x.is_finite() => StrokeQuery::Found(x),
        Err(roots::SearchError::NoBracketing) => StrokeQuery::BracketLost,
        _ => StrokeQuery::SolveFailed,
    }
}

/// Solves the modulus at which `E/K = 1/2`. Signs known: the stroke is below 1 at
/// k = 0.5 and above it at k = 0.999999.
fn solve_k_chord_closed() -> Option<f64> {
    newton_signed(0.5, 0.999_999, true, 0.9, 1e-15, |k| {
        let [stroke, ..] = free_d(D::var(k, 0));
        (stroke.v - 1.0, stroke.d[0])
    })
}

/// Solves the modulus of the free strip's highest crest. Signs known: the crest still
/// rises at k = 0.3 and already falls at k = 0.99.
fn solve_k_highest_crest() -> Option<f64> {
    newton_signed(0.3, 0.99, false, 0.8, 1e-15, |k| {
        let h = 1e-6;
        let d1 = |k: f64| free_d(D::var(k, 0))[2].d[0];
        (d1(k), (d1(k + h) - d1(k - h)) / (2.0 * h))
    })
}

/// Solves the modulus of the fold of line contact. Signs known: the reach still rises at
/// k = 0.3 and already falls at k = 0.65.
fn solve_k_line_fold() -> Option<f64> {
    newton_signed(0.3, 0.65, false, 0.49, 1e-15, |k| {
        let h = 1e-6;
        let d1 = |k: f64| line_reach_d(D::var(k, 0)).0.d[0];
        (d1(k), (d1(k + h) - d1(k - h)) / (2.0 * h))
    })
}

/// Modulus at which `E/K = 1/2`: the free strip's chord closes (`X = 0`). Solved once;
/// the unit test `family_constants_solve` holds that the solve succeeds.
fn k_chord_closed() -> f64 {
    use std::sync::OnceLock;
    static K: OnceLock<f64> = OnceLock::new();
    *K.get_or_init(|| solve_k_chord_closed().expect("the chord-closing modulus solves"))
}

/// Modulus of the free strip's highest crest, where `d(k/K)/dk = 0` (`E = 2 k'^2 K`).
fn k_highest_crest() -> f64 {
    use std::sync::OnceLock;
    static K: OnceLock<f64> = OnceLock::new();
    *K.get_or_init(|| solve_k_highest_crest().expect("the highest-crest modulus solves"))
}

/// Modulus of the fold of line contact, where `c sin(alpha) / l` peaks (0.4897).
pub fn k_line_fold() -> f64 {
    use std::sync::OnceLock;
    static K: OnceLock<f64> = OnceLock::new();
    *K.get_or_init(|| solve_k_line_fold().expect("the line-contact fold modulus solves"))
}

/// Largest gap a free strip can reach: `max over k of k / K(k)` (about 0.4 L).
pub fn max_reachable_gap() -> f64 {
    use std::sync::OnceLock;
    static G: OnceLock<f64> = OnceLock::new();
    *G.get_or_init(|| {
        let k = k_highest_crest();
        k / elliptic::ellip_k(k)
    })
}

/// Largest gap at which line contact can begin: `max c sin(alpha) / (2 l)` at `l = L/2`.
pub fn max_line_contact_gap() -> f64 {
    use std::sync::OnceLock;
    static G: OnceLock<f64> = OnceLock::new();
    *G.get_or_init(|| 0.5 * line_reach_d(D::c(k_line_fold())).0.v)
}

/// The point-contact branch tabulated once per process, as seeds for the two-equation
/// Newton solve: over gaps `0 ..= G_MAX` and `w = sqrt(t)`, where `t` is the stroke's
/// fraction of the way from first contact to line-contact onset, it holds
/// `u = phi0 / (-pi/2)` and `k / k1` (`k1`: first-contact modulus). Both vary smoothly
/// (`u` about 3.3 t near first contact, the gap entering as g^2), so 4-point Lagrange
/// interpolation in each direction gives seeds within about 1e-4, which saves a Newton
/// step against a fitted formula. Clamped and hinged strips share the geometry, so one
/// table serves both. Built by this solver itself, marching each gap from first contact;
/// an entry it cannot solve stays NaN and is counted in `failed` (a unit test holds that
/// none fails), and a seed that would use it is `None` (the caller's fitted seed).
struct BranchTable {
    u: Vec<f64>,
    ratio: Vec<f64>,
    /// Contact force over its value at line-contact onset (rises from 0 to 1 along `w`).
    contact: Vec<f64>,
    /// Entries the build could not solve.
    failed: usize,
}

impl BranchTable {
    const G_MAX: f64 = 0.3;
    const GAPS: usize = 33;
    const WS: usize = 31;

    fn build() -> BranchTable {
        let mut u = vec![f64::NAN; Self::GAPS * Self::WS];
        let mut ratio = vec![f64::NAN; Self::GAPS * Self::WS];
        let mut contact = vec![f64::NAN; Self::GAPS * Self::WS];
        let mut failed = 0;
        for i in 0..Self::GAPS {
            // The first row stands for the small-gap limit (g^2 = 1e-8 of the scale).
            let gap = (Self::G_MAX * i as f64 / (Self::GAPS - 1) as f64).max(1e-4);
            let Ok(path) = Path::new(Ends::Clamped, gap) else {
                failed += Self::WS;
                continue;
            };
            let (Some((k1, d1)), Some((ks, ds))) = (path.first_contact, path.line_onset) else {
                failed += Self::WS;
                continue;
            };
            let row = i * Self::WS;
            let f_onset = line_d(D::c(ks), gap).contact.v;
            let fitted = |t: f64| fitted_point_seed(fitted_u_of_stroke(t), k1, ks);
            let mut prev: [(f64, f64); 2] = [(k1, 0.0), (k1, 0.0)];
            for j in 0..Self::WS {
                let w = j as f64 / (Self::WS - 1) as f64;
                let solved = if j == 0 {
                    Some((k1, 0.0))
                } else if j == Self::WS - 1 {
                    Some((ks, -FRAC_PI_2))
                } else {
                    let t = w * w;
                    // Extrapolate from the two previous columns (the first from the formula).
                    let guess = if j == 1 {
                        fitted(t)
                    } else {
                        (2.0 * prev[1].0 - prev[0].0, 2.0 * prev[1].1 - prev[0].1)
                    };
                    let goal = PointGoal::Stroke(d1 + t * (ds - d1));
                    path.solve_point(goal, guess)
                        .or_else(|| path.solve_point(goal, fitted(t)))
                        .or_else(|| path.march_point(goal, d1 + t * (ds - d1)))
                };
                let Some((k, phi0)) = solved else {
                    failed += 1;
                    // The next guess extrapolates from the fitted formula instead.
                    prev = [prev[1], fitted(w * w)];
                    continue;
                };
                u[row + j] = phi0 / -FRAC_PI_2;
                ratio[row + j] = k / k1;
                contact[row + j] = match j {
                    0 => 0.0,
                    _ if j == Self::WS - 1 => 1.0,
                    _ => point_d(D::c(k), D::c(phi0)).contact.v / f_onset,
                };
                prev = [prev[1], (k, phi0)];
            }
        }
        BranchTable {
            u,
            ratio,
            contact,
            failed,
        }
    }

    /// Seed `(u, k / k1)` where the contact force is the fraction `r` of its value at
    /// line-contact onset, `None` beyond the table: the contact column, interpolated to
    /// the gap, is inverted for `w` (it rises along the branch), then [`BranchTable::seed`].
    fn seed_for_contact(&self, gap: f64, r: f64) -> Option<(f64, f64)> {
        if !(gap > 0.0 && gap <= Self::G_MAX && (0.0..=1.0).contains(&r)) {
            return None;
        }
        let x = gap / Self::G_MAX * (Self::GAPS - 1) as f64;
        let (i0, wx) = lagrange4(x, Self::GAPS);
        // The contact column at this gap, node by node.
        let column = |j: usize| -> f64 {
            wx.iter()
                .enumerate()
                .map(|(a, wa)| wa * self.contact[(i0 + a) * Self::WS + j])
                .sum()
        };
        // Nodes around r by bisection (0 at the first node, 1 at the last) ...
        let (mut a, mut b) = (0, Self::WS - 1);
        while b - a > 1 {
            let m = (a + b) / 2;
            if column(m) < r {
                a = m;
            } else {
                b = m;
            }
        }
        // ... then the local cubic through four nodes, inverted by roots' Brent method.
        let j0 = a.saturating_sub(1).min(Self::WS - 4);
        let c: [f64; 4] = std::array::from_fn(|m| column(j0 + m));
        if !c.iter().all(|v| v.is_finite()) {
            return None;
        }
        let at = |y: f64| -> f64 {
            let w = lagrange4_weights(y - j0 as f64);
            (0..4).map(|m| w[m] * c[m]).sum::<f64>() - r
        };
        let mut brent = BrentSettled { y_scale: 1.0 };
        let y = brent_query(roots::find_root_brent(a as f64, b as f64, at, &mut brent))
            .ok()
            .unwrap_or(a as f64);
        let w = y.clamp(a as f64, b as f64) / (Self::WS - 1) as f64;
        self.seed(gap, w * w)
    }

    /// Seed `(u, k / k1)` at gap `gap` and stroke fraction `t`, `None` beyond the table.
    fn seed(&self, gap: f64, t: f64) -> Option<(f64, f64)> {
        if !(gap > 0.0 && gap <= Self::G_MAX && (0.0..=1.0).contains(&t)) {
            return None;
        }
        let x = gap / Self::G_MAX * (Self::GAPS - 1) as f64;
        let y = t.sqrt() * (Self::WS - 1) as f64;
        let (i0, wx) = lagrange4(x, Self::GAPS);
        let (j0, wy) = lagrange4(y, Self::WS);
        let mut out = (0.0, 0.0);
        for (a, wa) in wx.iter().enumerate() {
            let row = (i0 + a) * Self::WS + j0;
            for (b, wb) in wy.iter().enumerate() {
                out.0 += wa * wb * self.u[row + b];
                out.1 += wa * wb * self.ratio[row + b];
            }
        }
        (out.0.is_finite() && out.1.is_finite()).then_some(out)
    }
}

/// The fitted point-contact branch, for seeds beyond the branch table: `u = phi0 / (-pi/2)`
/// at the stroke fraction `t` from first contact to line onset is close to `1 - (1-t)^2`.
fn fitted_u_of_stroke(t: f64) -> f64 {
    1.0 - (1.0 - t) * (1.0 - t)
}

/// The fitted dip of the modulus along the point branch, `(k - ks)/(k1 - ks) =
/// (1-u)^3 - 0.68 u (1-u)` (fitted to solved branches from g/L = 0.05 to 0.2), as the seed
/// `(k, phi0)` at `u = phi0 / (-pi/2)` between the end moduli `k1` and `ks`.
fn fitted_point_seed(u: f64, k1: f64, ks: f64) -> (f64, f64) {
    let f = (1.0 - u).powi(3) - 0.68 * u * (1.0 - u);
    (ks + (k1 - ks) * f, -FRAC_PI_2 * u)
}

/// First index and weights of 4-point Lagrange interpolation at `x` on the grid `0..n`.
fn lagrange4(x: f64, n: usize) -> (usize, [f64; 4]) {
    let i0 = (x.floor() as isize - 1).clamp(0, n as isize - 4) as usize;
    (i0, lagrange4_weights(x - i0 as f64))
}

/// Weights of the cubic through the nodes 0, 1, 2, 3 at `x`.
fn lagrange4_weights(x: f64) -> [f64; 4] {
    let (a, b, c, d) = (x, x - 1.0, x - 2.0, x - 3.0);
    [
        -b * c * d / 6.0,
        a * c * d / 2.0,
        -a * b * d / 2.0,
        a * b * c / 6.0,
    ]
}

fn branch_table() -> &'static BranchTable {
    use std::sync::OnceLock;
    static TABLE: OnceLock<BranchTable> = OnceLock::new();
    TABLE.get_or_init(BranchTable::build)
}

/// The reach `c sin(alpha) / l` where the axial force of line contact vanishes
/// (`k = 1/sqrt 2`); a constant of the elastica family.
fn reach_at_axial_zero() -> f64 {
    use std::sync::OnceLock;
    static R: OnceLock<f64> = OnceLock::new();
    *R.get_or_init(|| reach_d(D::c(std::f64::consts::FRAC_1_SQRT_2)).v)
}

/// Seed for the first-contact modulus from the series `k = x (1 + x^2/4 + 17 x^4/64)`,
/// `x = pi g / 2` (inverting `k / K(k) = g` with `K` from DLMF 19.5.1).
fn first_contact_series(gap: f64) -> f64 {
    let x = FRAC_PI_2 * gap;
    x * (1.0 + x * x * (0.25 + 17.0 / 64.0 * x * x))
}

/// Seed for the line-onset modulus from `reach = 2k (1 - 3k^2/2 + k^4/4) + O(k^7)`, inverted.
fn line_onset_series(gap: f64) -> f64 {
    gap * (1.0 + gap * gap * (1.5 + 6.5 * gap * gap))
}

/// First contact at `gap`: the free crest height `k / K` reaches the gap. Signs known:
/// the crest is 0 < g at k = 0 and the highest crest > g at its modulus. Returns the
/// modulus and the stroke there (carried along to the root).
fn solve_first_contact(gap: f64, seed: f64) -> Option<(f64, f64)> {
    let mut stroke = Carried::NONE;
    let k1 = newton_signed(0.0, k_highest_crest(), true, seed, 1e-15, |k| {
        let [s, _, crest, _, _] = free_d(D::var(k, 0));
        stroke.record(k, s);
        (crest.v - gap, crest.d[0])
    })?;
    let d1 = stroke.at(k1).unwrap_or_else(|| free_d(D::c(k1))[0].v);
    Some((k1, d1))
}

/// Line-contact onset at `gap`: `c sin(alpha) / l = 2 g` on the rising side of the fold.
/// Signs known: the reach is 0 < 2g at k = 0 and peaks above 2g at the fold (for gaps
/// below [`max_line_contact_gap`]). Returns the modulus and the stroke there: at the onset
/// `l = L/2`, so the stroke is `2 k^2 (1 + D cos(alpha) / K)`.
fn solve_line_onset(gap: f64, seed: f64) -> Option<(f64, f64)> {
    let mut stroke = Carried::NONE;
    let ks = newton_signed(0.0, k_line_fold(), true, seed, 1e-15, |k| {
        let kd = D::var(k, 0);
        let (r, kk, dc) = line_reach_d(kd);
        let k2 = kd.sq();
        let cos_a = 1.0 - 2.0 * k2;
        stroke.record(k, 2.0 * (k2 * (D::c(1.0) + dc * cos_a / kk)));
        (r.v - 2.0 * gap, r.d[0])
    })?;
    let ds = stroke
        .at(ks)
        .unwrap_or_else(|| line_d(D::c(ks), gap).stroke.v);
    Some((ks, ds))
}

/// First-contact and line-onset moduli against the gap, solved once per process at 65
/// gaps each and interpolated (4-point Lagrange) as Newton seeds: within about 1e-9, so
/// that one evaluation usually settles a path's set-up, where the series seeds lose
/// digits at large gaps. The ranges stop short of the folds (the highest crest near
/// g/L 0.40, the line-contact fold at 0.32), where the moduli turn with a square root.
struct ModulusTable {
    first_contact: Vec<f64>,
    line_onset: Vec<f64>,
}

impl ModulusTable {
    const POINTS: usize = 65;
    const FIRST_CONTACT_MAX: f64 = 0.36;
    const LINE_ONSET_MAX: f64 = 0.30;

    fn build() -> ModulusTable {
        let column =
            |g_max: f64, series: fn(f64) -> f64, solve: fn(f64, f64) -> Option<(f64, f64)>| {
                (0..Self::POINTS)
                    .map(|i| {
                        let gap = g_max * i as f64 / (Self::POINTS - 1) as f64;
                        if i == 0 {
                            return 0.0;
                        }
                        solve(gap, series(gap)).map_or(f64::NAN, |(k, _)| k)
                    })
                    .collect()
            };
        ModulusTable {
            first_contact: column(
                Self::FIRST_CONTACT_MAX,
                first_contact_series,
                solve_first_contact,
            ),
            line_onset: column(Self::LINE_ONSET_MAX, line_onset_series, solve_line_onset),
        }
    }

    fn at(values: &[f64], g_max: f64, gap: f64) -> Option<f64> {
        if !(gap > 0.0 && gap <= g_max) {
            return None;
        }
        let (i0, w) = lagrange4(gap / g_max * (Self::POINTS - 1) as f64, Self::POINTS);
        let k: f64 = (0..4).map(|m| w[m] * values[i0 + m]).sum();
        k.is_finite().then_some(k)
    }

    fn first_contact(&self, gap: f64) -> Option<f64> {
        Self::at(&self.first_contact, Self::FIRST_CONTACT_MAX, gap)
    }

    fn line_onset(&self, gap: f64) -> Option<f64> {
        Self::at(&self.line_onset, Self::LINE_ONSET_MAX, gap)
    }
}

fn modulus_table() -> &'static ModulusTable {
    use std::sync::OnceLock;
    static TABLE: OnceLock<ModulusTable> = OnceLock::new();
    TABLE.get_or_init(ModulusTable::build)
}

/// A by-product of a Newton solve carried to its root: the value and slope of a second
/// quantity at the last point the solve evaluated, extended linearly to the root. The
/// solves stop once a step is below `sqrt(1e-15)` relative, so the neglected quadratic
/// term is at rounding level; further away, `at` declines and the caller evaluates.
#[derive(Clone, Copy, Debug)]
struct Carried {
    x: f64,
    v: f64,
    dv: f64,
}

impl Carried {
    const NONE: Carried = Carried {
        x: f64::NAN,
        v: f64::NAN,
        dv: f64::NAN,
    };

    fn record(&mut self, x: f64, q: D) {
        *self = Carried {
            x,
            v: q.v,
            dv: q.d[0],
        };
    }

    fn at(self, x: f64) -> Option<f64> {
        let h = x - self.x;
        (h.abs() <= 1e-7 * x.abs() && self.v.is_finite() && self.dv.is_finite())
            .then_some(self.v + self.dv * h)
    }
}

// ---------------------------------------------------------------------------------------
// The path for one gap.

/// A solved point on the point-contact branch.
#[derive(Clone, Copy, Debug, PartialEq)]
struct PointNode {
    k: f64,
    phi0: f64,
    stroke: f64,
}

/// The whole path of one strip at one gap: phase boundaries and the limit. Cheap to build;
/// states and inverse queries solve from it.
#[derive(Clone, Debug, PartialEq)]
pub struct Path {
    ends: Ends,
    scale_force: f64,
    scale_curvature: f64,
    gap: f64,
    /// Free-phase modulus and stroke at first contact (`None`: the gap is unreachable).
    first_contact: Option<(f64, f64)>,
    /// Line-contact onset modulus and stroke (`None`: line contact never begins).
    line_onset: Option<(f64, f64)>,
    /// The solver failed to find first contact although the gap is within reach.
    branch_lost: bool,
    /// Where the model stops, with the line-contact modulus there (when the limit lies in
    /// line contact); found on first use, since states before line contact do not need it.
    limit_cache: std::cell::OnceCell<(Limit, Option<f64>)>,
    /// Where the forces peak, found on first use.
    peaks_cache: std::cell::OnceCell<Peaks>,
}

/// The end of the model along a path.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Limit {
    /// Stroke `delta / L` where the model stops.
    pub stroke: f64,
    /// Why it stops.
    pub reason: LimitReason,
    /// Phase just before the limit.
    pub phase: Phase,
}

/// Strokes where the forces peak along a path (nondimensional), if they do before the limit.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Peaks {
    /// Stroke of the largest axial force.
    pub axial: Option<f64>,
    /// Stroke of the largest contact force.
    pub contact: Option<f64>,
}

/// Golden-section search for the maximum of a unimodal `f` on `[lo, hi]`.
fn golden_max(mut lo: f64, mut hi: f64, f: impl Fn(f64) -> f64) -> f64 {
    let ratio = 0.5 * (5.0_f64.sqrt() - 1.0);
    let mut x1 = hi - ratio * (hi - lo);
    let mut x2 = lo + ratio * (hi - lo);
    let (mut f1, mut f2) = (f(x1), f(x2));
    for _ in 0..100 {
        if hi - lo <= 1e-12 * (1.0 + hi.abs()) {
            break;
        }
        if f1 < f2 {
            lo = x1;
            x1 = x2;
            f1 = f2;
            x2 = lo + ratio * (hi - lo);
            f2 = f(x2);
        } else {
            hi = x2;
            x2 = x1;
            f2 = f1;
            x1 = hi - ratio * (hi - lo);
            f1 = f(x1);
        }
    }
    0.5 * (lo + hi)
}

/// What a point-contact Newton solve pins besides the gap.
#[derive(Clone, Copy, Debug)]
enum PointGoal {
    Stroke(f64),
    /// `wk * kappa + wp * axial + wf * contact = value` (clamped-form quantities).
    Linear {
        wk: f64,
        wp: f64,
        wf: f64,
        value: f64,
    },
}

impl Path {
    /// Sets up the path at nondimensional gap `gap = g / L` for the end condition `ends`.
    pub fn new(ends: Ends, gap: f64) -> Result<Path, PathError> {
        if !gap.is_finite() {
            return Err(PathError::NotFinite);
        }
        // Below 1e-12 L the strip touches the wall for every practical purpose (and the
        // strokes, of order g^2, would underflow).
        if gap <= MIN_GAP {
            return Err(PathError::NoClearance { gap });
        }
        let scale = EndScale::of(ends);
        let mut path = Path {
            ends,
            scale_force: scale.force,
            scale_curvature: scale.curvature,
            gap,
            first_contact: None,
            line_onset: None,
            branch_lost: false,
            limit_cache: std::cell::OnceCell::new(),
            peaks_cache: std::cell::OnceCell::new(),
        };
        if gap >= max_reachable_gap() {
            return Ok(path);
        }
        let seeds = modulus_table();
        let seed = seeds
            .first_contact(gap)
            .unwrap_or_else(|| first_contact_series(gap));
        let Some((k1, d1)) = solve_first_contact(gap, seed) else {
            path.branch_lost = true;
            return Ok(path);
        };
        path.first_contact = Some((k1, d1));
        if gap < max_line_contact_gap() {
            let seed = seeds
                .line_onset(gap)
                .unwrap_or_else(|| line_onset_series(gap));
            path.line_onset = solve_line_onset(gap, seed);
        }
        Ok(path)
    }

    /// The limit with its line-contact modulus, computed once.
    fn limit_data(&self) -> (Limit, Option<f64>) {
        *self
            .limit_cache
            .get_or_init(|| match (self.first_contact, self.line_onset) {
                (None, _) => {
                    let reason = if self.branch_lost {
                        LimitReason::BranchLost
                    } else {
                        LimitReason::ChordClosed
                    };
                    (
                        Limit {
                            stroke: 1.0,
                            reason,
                            phase: Phase::Free,
                        },
                        None,
                    )
                }
                (Some(_), Some((ks, _))) => {
                    let (limit, k) = self.line_limit(ks);
                    (limit, Some(k))
                }
                (Some(_), None) => (self.point_limit_without_line(), None),
            })
    }

    /// Nondimensional gap `g / L`.
    pub fn gap(&self) -> f64 {
        self.gap
    }

    /// End condition.
    pub fn ends(&self) -> Ends {
        self.ends
    }

    /// Stroke at first contact, `None` when the gap is beyond the highest free crest.
    pub fn first_contact_stroke(&self) -> Option<f64> {
        self.first_contact.map(|(_, d)| d)
    }

    /// Stroke at which line contact begins, `None` when it never does.
    pub fn line_contact_stroke(&self) -> Option<f64> {
        self.line_onset.map(|(_, d)| d)
    }

    /// Where the model stops.
    pub fn limit(&self) -> Limit {
        self.limit_data().0
    }

    /// The limit in line contact, scanning `k` upward from the onset `ks`.
    fn line_limit(&self, ks: f64) -> (Limit, f64) {
        let gap = self.gap;
        let k_fold = k_line_fold();
        // Conditions, each negative before and crossing zero at its limit.
        let buckling = |k: f64| {
            let q = line_d(D::var(k, 0), gap);
            let flat = 1.0 - 2.0 * q.arc;
            // P (L - 2l)^2 - 4 pi^2, clamped form (the hinged forms differ by the same factor).
            let v = q.axial * flat.sq() - D::c(4.0 * PI * PI);
            (v.v, v.d[0])
        };
        let chord = |k: f64| {
            let q = line_d(D::var(k, 0), gap);
            (q.stroke.v - 1.0, q.stroke.d[0])
        };
        // Usual case (g/L below about 0.195): the margin rises from the onset and is
        // positive at the fold, so the first crossing lies before the fold. Below
        // `BUCKLES_BEFORE_FOLD` (0.18, held by a test down a fine grid of gaps) that is
        // known without evaluating the fold.
        let at_fold = if gap < BUCKLES_BEFORE_FOLD {
            f64::INFINITY
        } else {
            line_buckling_margin(k_fold, gap)
        };
        if at_fold >= 0.0 {
            // Seed from the small-gap law: buckling at l = L/3, where k is about 1.5 ks.
            // Signs known: at the onset the flat run has no length (margin -4 pi^2).
            let seed = (1.5 * ks).min(0.5 * (ks + k_fold));
            let mut carried = Carried::NONE;
            let kb = if at_fold == 0.0 {
                k_fold
            } else {
                newton_signed(ks, k_fold, true, seed, 1e-15, |k| {
                    let q = line_d(D::var(k, 0), gap);
                    carried.record(k, q.stroke);
                    let flat = 1.0 - 2.0 * q.arc;
                    let v = q.axial * flat.sq() - D::c(4.0 * PI * PI);
                    (v.v, v.d[0])
                })
                .unwrap_or(k_fold)
            };
            let stroke = carried
                .at(kb)
                .unwrap_or_else(|| line_d(D::c(kb), gap).stroke.v);
            if stroke < 1.0 {
                let limit = Limit {
                    stroke,
                    reason: LimitReason::FlatRunBuckling,
                    phase: Phase::LineContact,
                };
                return (limit, kb);
            }
        }
        // The flat run closes again where the reach falls back to 2 g beyond the fold.
        // Signs known: the reach peaks above 2 g at the fold (line contact began) and
        // falls to 0 as k -> 1.
        // The reach does not depend on the gap, so its values at the fold and where the
        // axial force vanishes (cos(alpha) = 1 - 2k^2 = 0) are constants: when 2 g is below
        // the latter, the axial force vanishes first and no solve is needed; otherwise
        // the closing lies between the two, seeded by a straight line between them.
        let k_axial = std::f64::consts::FRAC_1_SQRT_2;
        let (r_fold, r_axial) = (2.0 * max_line_contact_gap(), reach_at_axial_zero());
        let k_close = if 2.0 * gap <= r_axial {
            1.0
        } else {
            let seed = k_fold + (k_axial - k_fold) * (r_fold - 2.0 * gap) / (r_fold - r_axial);
            newton_signed(k_fold, k_axial, false, seed, 1e-15, |k| {
                let r = reach_d(D::var(k, 0));
                (r.v - 2.0 * gap, r.d[0])
            })
            .unwrap_or(k_axial)
        };
        let k_end = k_close.min(k_axial);
        // The stroke rises with k, so the chord can only close at the end of the range.
        let chord_at_end = chord(k_end).0;
        let chord_closes = chord_at_end >= 0.0;
        // Signs known: the chord condition is the onset stroke minus one at `ks`.
        let ds = self.line_onset.map_or(0.0, |(_, ds)| ds);
        let k_chord = if chord_at_end == 0.0 {
            Some(k_end)
        } else if chord_closes && ds < 1.0 {
            newton_signed(ks, k_end, true, k_end, 1e-15, chord)
        } else {
            None
        };
        let stop = k_chord.unwrap_or(k_end);
        // Otherwise the margin may still peak above zero before the fold: sample, then
        // refine. Past the fold both the flat run and the axial force shrink, so the
        // margin only falls there (a test holds this on a grid of gaps): the samples
        // need not go past the fold. Plain arithmetic: only the sign is wanted.
        const SAMPLES: usize = 12;
        let scan_end = stop.min(k_fold);
        let mut prev = ks;
        for i in 1..=SAMPLES {
            // Denser sampling near the onset, where the flat run grows fastest.
            let t = i as f64 / SAMPLES as f64;
            let k = ks + (scan_end - ks) * t * t;
            if line_buckling_margin(k, gap) >= 0.0 {
                // Signs known: negative at the previous sample (or the onset), not at `k`.
                let kb = newton_signed(prev, k, true, 0.5 * (prev + k), 1e-15, buckling).unwrap_or(k);
                let stroke = line_d(D::c(kb), gap).stroke.v;
                return (
                    Limit {
                        stroke,
                        reason: LimitReason::FlatRunBuckling,
                        phase: Phase::LineContact,
                    },
                    kb,
                );
            }
            prev = k;
        }
        if let Some(kc) = k_chord {
            let stroke = line_d(D::c(kc), gap).stroke.v;
            return (
                Limit {
                    stroke,
                    reason: LimitReason::ChordClosed,
                    phase: Phase::LineContact,
                },
                kc,
            );
        }
        let reason = if k_close < k_axial {
            LimitReason::FlatRunCloses
        } else {
            LimitReason::AxialForceVanishes
        };
        // The chord condition at k_end was the stroke there, minus one.
        let stroke = chord_at_end + 1.0;
        (
            Limit {
                stroke,
                reason,
                phase: Phase::LineContact,
            },
            k_end,
        )
    }

    /// The limit on a point-contact branch that never reaches line contact: march in
    /// stroke until the axial force vanishes, the chord closes or the strips leave the wall.
    fn point_limit_without_line(&self) -> Limit {
        self.march_without_line().0
    }

    /// Marches a point branch without line contact from first contact to its limit,
    /// recording where the axial and the contact force peak on the way.
    fn march_without_line(&self) -> (Limit, Peaks) {
        let mut peaks = Peaks {
            axial: None,
            contact: None,
        };
        let Some((k1, d1)) = self.first_contact else {
            return (
                Limit {
                    stroke: 1.0,
                    reason: LimitReason::BranchLost,
                    phase: Phase::Free,
                },
                peaks,
            );
        };
        let lost = |stroke| Limit {
            stroke,
            reason: LimitReason::BranchLost,
            phase: Phase::PointContact,
        };
        let mut node = PointNode {
            k: k1,
            phi0: 0.0,
            stroke: d1,
        };
        let mut prev: Option<PointNode> = None;
        let first = point_d(D::c(k1), D::c(0.0));
        let (mut last_axial, mut last_contact) = (first.axial.v, 0.0);
        let mut step = 0.01 * (1.0 - d1).max(0.05);
        for _ in 0..4_000 {
            let target = (node.stroke + step).min(1.0);
            let h = target - node.stroke;
            let guess = match prev {
                Some(p) => {
                    let r = h / (node.stroke - p.stroke);
                    (
                        node.k + r * (node.k - p.k),
                        node.phi0 + r * (node.phi0 - p.phi0),
                    )
                }
                None => (node.k * 0.98, -0.2 * h.sqrt().min(0.3)),
            };
            let Some((k, phi0)) = self.solve_point(PointGoal::Stroke(target), guess) else {
                if step < 1e-9 {
                    return (lost(node.stroke), peaks);
                }
                step *= 0.5;
                continue;
            };
            let q = point_d(D::c(k), D::c(phi0));
            let next = PointNode {
                k,
                phi0,
                stroke: target,
            };
            // The wall cannot pull: where the contact force falls back to zero (the crest
            // of the free strip drops below the gap again, near g/L 0.39 to 0.40) the
            // strips leave the wall, and the model stops there.
            if q.contact.v <= 0.0 {
                if peaks.axial.is_none() && q.axial.v < last_axial {
                    peaks.axial = Some(self.point_peak(prev.unwrap_or(node), next, |q| q.axial.v));
                }
                if peaks.contact.is_none() {
                    peaks.contact =
                        Some(self.point_peak(prev.unwrap_or(node), next, |q| q.contact.v));
                }
                let leaves = self.bisect_point(node, next, |q| q.contact.v > 0.0);
                let axial_gone = (q.axial.v <= 0.0)
                    .then(|| self.bisect_point(node, next, |q| q.axial.v > 0.0))
                    .filter(|&s| s < leaves);
                let (stroke, reason) = match axial_gone {
                    Some(s) => (s, LimitReason::AxialForceVanishes),
                    None => (leaves, LimitReason::LeavesWall),
                };
                return (
                    Limit {
                        stroke,
                        reason,
                        phase: Phase::PointContact,
                    },
                    peaks,
                );
            }
            if q.axial.v <= 0.0 {
                let stroke = self.bisect_point(node, next, |q| q.axial.v > 0.0);
                return (
                    Limit {
                        stroke,
                        reason: LimitReason::AxialForceVanishes,
                        phase: Phase::PointContact,
                    },
                    peaks,
                );
            }
            if peaks.axial.is_none() && q.axial.v < last_axial {
                peaks.axial = Some(self.point_peak(prev.unwrap_or(node), next, |q| q.axial.v));
            }
            if peaks.contact.is_none() && q.contact.v < last_contact {
                peaks.contact = Some(self.point_peak(prev.unwrap_or(node), next, |q| q.contact.v));
            }
            if target >= 1.0 {
                return (
                    Limit {
                        stroke: 1.0,
                        reason: LimitReason::ChordClosed,
                        phase: Phase::PointContact,
                    },
                    peaks,
                );
            }
            last_axial = q.axial.v;
            last_contact = q.contact.v;
            prev = Some(node);
            node = next;
            step = (step * 1.5).min(0.02);
        }
        (lost(node.stroke), peaks)
    }

    /// Bisects the stroke between two point nodes for the last stroke where `keep` holds.
    fn bisect_point(
        &self,
        mut lo: PointNode,
        mut hi: PointNode,
        keep: impl Fn(&PointQ) -> bool,
    ) -> f64 {
        for _ in 0..60 {
            if hi.stroke - lo.stroke < 1e-13 {
                break;
            }
            let mid = 0.5 * (lo.stroke + hi.stroke);
            let guess = (0.5 * (lo.k + hi.k), 0.5 * (lo.phi0 + hi.phi0));
            let Some((k, phi0)) = self.solve_point(PointGoal::Stroke(mid), guess) else {
                break;
            };
            let node = PointNode {
                k,
                phi0,
                stroke: mid,
            };
            if keep(&point_d(D::c(k), D::c(phi0))) {
                lo = node;
            } else {
                hi = node;
            }
        }
        lo.stroke
    }

    /// Golden-section search for the stroke of the largest `measure` between two nodes.
    fn point_peak(&self, a: PointNode, b: PointNode, measure: impl Fn(&PointQ) -> f64) -> f64 {
        let span = b.stroke - a.stroke;
        let at = |s: f64| {
            let t = (s - a.stroke) / span;
            let guess = (a.k + t * (b.k - a.k), a.phi0 + t * (b.phi0 - a.phi0));
            self.solve_point(PointGoal::Stroke(s), guess)
                .map(|(k, p)| measure(&point_d(D::c(k), D::c(p))))
                .unwrap_or(f64::NEG_INFINITY)
        };
        golden_max(a.stroke, b.stroke, at)
    }

    /// Strokes where the axial force and the contact force peak along the path before the
    /// limit (`None`: each rises all the way). A falling axial force means negative actuator
    /// stiffness; a falling contact force means more stroke loosens the grip.
    pub fn peaks(&self) -> Peaks {
        *self.peaks_cache.get_or_init(|| {
            let Some(_) = self.first_contact else {
                return Peaks {
                    axial: None,
                    contact: None,
                };
            };
            let Some((ks, ds)) = self.line_onset else {
                return self.march_without_line().1;
            };
            let kl = self.limit_data().1.unwrap_or(ks);
            let gap = self.gap;
            // In the point phase both forces rise to the onset (checked by the tests); scan
            // line contact in k, where everything is explicit.
            let peak_of = |pick: fn(&LineQ) -> f64| {
                const N: usize = 24;
                let ks_list: Vec<f64> = (0..=N)
                    .map(|i| ks + (kl - ks) * i as f64 / N as f64)
                    .collect();
                let vals: Vec<f64> = ks_list
                    .iter()
                    .map(|&k| pick(&line_d(D::c(k), gap)))
                    .collect();
                let (imax, _) =
                    vals.iter()
                        .enumerate()
                        .fold(
                            (0, f64::NEG_INFINITY),
                            |acc, (i, &v)| if v > acc.1 { (i, v) } else { acc },
                        );
                // Refine around the largest sample; a peak just short of the limit shows as
                // the last sample being largest, so refine there too and keep an interior
                // maximum only.
                let lo = ks_list[imax.saturating_sub(1)];
                let hi = ks_list[(imax + 1).min(N)];
                let k = golden_max(lo, hi, |k| pick(&line_d(D::c(k), gap)));
                if k >= kl - 1e-9 * kl || pick(&line_d(D::c(k), gap)) <= vals[N] {
                    return None;
                }
                Some(line_d(D::c(k), gap).stroke.v.max(ds))
            };
            Peaks {
                axial: peak_of(|q| q.axial.v),
                contact: peak_of(|q| q.contact.v),
            }
        })
    }

    /// Two-equation Newton on `(k, phi0)`: crest on the wall plus `goal`, with a
    /// backtracking line search on the scaled residual so that it stays on the branch.
    fn solve_point(&self, goal: PointGoal, guess: (f64, f64)) -> Option<(f64, f64)> {
        self.solve_point_q(goal, guess)
            .map(|(k, phi0, _)| (k, phi0))
    }

    /// As [`Path::solve_point`], also returning the quantities at the solution.
    fn solve_point_q(&self, goal: PointGoal, guess: (f64, f64)) -> Option<(f64, f64, PointQ)> {
        let gap = self.gap;
        let residual = |k: f64, phi0: f64| {
            let q = point_d(D::var(k, 0), D::var(phi0, 1));
            let r1 = q.crest - D::c(gap);
            let r2 = match goal {
                PointGoal::Stroke(s) => q.stroke - D::c(s),
                PointGoal::Linear { wk, wp, wf, value } => {
                    wk * q.kappa + wp * q.axial + wf * q.contact - D::c(value)
                }
            };
            (r1, r2, q)
        };
        let inside =
            |k: f64, phi0: f64| k > 0.0 && k < 1.0 && (-FRAC_PI_2 - 0.6..=0.6).contains(&phi0);
        let (mut k, mut phi0) = guess;
        if !inside(k, phi0) {
            return None;
        }
        let (mut r1, mut r2, mut q) = residual(k, phi0);
        // Once a full Newton step is below sqrt(1e-15) (relative in k, absolute in phi0),
        // quadratic convergence leaves the new iterate within rounding: stop there, with
        // its quantities already in hand.
        let quadratic = 3e-8;
        for _ in 0..MAX_NEWTON {
            let det = r1.d[0] * r2.d[1] - r1.d[1] * r2.d[0];
            if !det.is_finite() || det == 0.0 {
                return None;
            }
            // Newton correction for residuals (a, b) with this Jacobian.
            let (j1, j2) = (r1.d, r2.d);
            let correction = |a: f64, b: f64| {
                (
                    -(a * j2[1] - b * j1[1]) / det,
                    -(b * j1[0] - a * j2[0]) / det,
                )
            };
            let (dk, dp) = correction(r1.v, r2.v);
            if dk.abs() < 1e-15 * (1.0 + k) && dp.abs() < 1e-14 {
                return Some((k, phi0, q));
            }
            // Size of a correction: k relative to itself, phi0 in radians.
            let k_scale = k;
            let size = |dk: f64, dp: f64| (dk / k_scale).hypot(dp);
            let full = size(dk, dp);
            // Damped Newton with the natural monotonicity test (Deuflhard, Newton Methods
            // for Nonlinear Problems, 2004, section 3.3): a trial step is taken when the
            // simplified correction there, with this Jacobian, is smaller than this one.
            // It does not depend on how the two residuals are scaled.
            let mut t = (0.3 / dp.abs()).min(0.5 * k / dk.abs()).min(1.0);
            let mut accepted = false;
            for _ in 0..30 {
                let (kn, pn) = (k + t * dk, phi0 + t * dp);
                if inside(kn, pn) {
                    let (n1, n2, nq) = residual(kn, pn);
                    let (sk, sp) = correction(n1.v, n2.v);
                    if size(sk, sp) <= (1.0 - 0.25 * t) * full || full < 1e-14 {
                        k = kn;
                        phi0 = pn;
                        r1 = n1;
                        r2 = n2;
                        q = nq;
                        accepted = true;
                        break;
                    }
                }
                t *= 0.5;
            }
            if !accepted {
                return None;
            }
            if t == 1.0 && dk.abs() <= quadratic * k && dp.abs() <= quadratic {
                return Some((k, phi0, q));
            }
        }
        None
    }

    /// Guess for `(k, phi0)` at a point-contact stroke: from the branch table, or beyond it
    /// `phi0` from a shape fitted to the branch between its ends, and `k` from a fitted dip
    /// between the end moduli
    /// (`(k - ks)/(k1 - ks) = (1-u)^3 - 0.68 u (1-u)` with `u = phi0 / (-pi/2)`, fitted to
    /// solved branches from g/L = 0.05 to 0.2), or from the gap equation when `refine`.
    fn point_guess(&self, stroke: f64, refine: bool) -> (f64, f64) {
        let (k1, d1) = self.first_contact.unwrap_or((0.0, 0.0));
        let (phi0, k_fit) = match self.line_onset {
            Some((ks, ds)) => {
                let t = ((stroke - d1) / (ds - d1)).clamp(0.0, 1.0);
                match branch_table().seed(self.gap, t) {
                    Some((u, ratio)) => (-FRAC_PI_2 * u, k1 * ratio),
                    None => {
                        let (k, phi0) = fitted_point_seed(fitted_u_of_stroke(t), k1, ks);
                        (phi0, k)
                    }
                }
            }
            None => (
                -FRAC_PI_2 * ((stroke - d1) / (1.0 - d1)).clamp(0.0, 1.0).sqrt(),
                0.8 * k1,
            ),
        };
        if !refine {
            return (k_fit, phi0);
        }
        let gap = self.gap;
        // Signs not known here (a seed only): roots' Newton, then Brent if there is a bracket.
        let k = inverse_query(1e-3 * k1, k1.max(1e-300) * 1.05, k_fit, gap, |k| {
            let q = point_d(D::var(k, 0), D::c(phi0));
            (q.crest.v - gap, q.crest.d[0])
        })
        .ok()
        .unwrap_or(k_fit);
        (k, phi0)
    }

    /// Guess for `(k, phi0)` where the contact force is the fraction `r` of its value at
    /// line-contact onset: from the branch table, or beyond it from the fit
    /// `F / F_onset = u (0.63 + 0.37 u)` with `u = phi0 / (-pi/2)`, inverted.
    fn point_guess_contact(&self, r: f64) -> Option<(f64, f64)> {
        let (k1, _) = self.first_contact?;
        let (ks, _) = self.line_onset?;
        let r = r.clamp(0.0, 1.0);
        if let Some((u, ratio)) = branch_table().seed_for_contact(self.gap, r) {
            return Some((k1 * ratio, -FRAC_PI_2 * u));
        }
        let u = ((0.3969 + 1.48 * r).sqrt() - 0.63) / 0.74;
        Some(fitted_point_seed(u, k1, ks))
    }

    /// Solves the point phase at `stroke`, by Newton from a guess and, failing that, by
    /// marching from first contact.
    fn point_at(&self, stroke: f64) -> Option<(f64, f64)> {
        self.point_at_q(stroke).map(|(k, phi0, _)| (k, phi0))
    }

    /// As [`Path::point_at`], also returning the quantities at the solution.
    fn point_at_q(&self, stroke: f64) -> Option<(f64, f64, PointQ)> {
        let goal = PointGoal::Stroke(stroke);
        if let Some(sol) = self
            .solve_point_q(goal, self.point_guess(stroke, false))
            .or_else(|| self.solve_point_q(goal, self.point_guess(stroke, true)))
        {
            return Some(sol);
        }
        let (k, phi0) = self.march_point(goal, stroke)?;
        Some((k, phi0, point_d(D::c(k), D::c(phi0))))
    }

    /// Marches the point branch in stroke from first contact to `stroke`, then solves `goal`.
    fn march_point(&self, goal: PointGoal, stroke: f64) -> Option<(f64, f64)> {
        let (k1, d1) = self.first_contact?;
        let mut node = PointNode {
            k: k1,
            phi0: 0.0,
            stroke: d1,
        };
        let mut prev: Option<PointNode> = None;
        let total = stroke - d1;
        let mut step = total / 16.0;
        for _ in 0..400 {
            if node.stroke >= stroke - 1e-15 {
                break;
            }
            let target = (node.stroke + step).min(stroke);
            let h = target - node.stroke;
            let guess = match prev {
                Some(p) => {
                    let r = h / (node.stroke - p.stroke);
                    (
                        node.k + r * (node.k - p.k),
                        node.phi0 + r * (node.phi0 - p.phi0),
                    )
                }
                None => (
                    node.k * 0.99,
                    -(h / total.max(1e-300)).sqrt().min(1.0) * 0.5,
                ),
            };
            match self.solve_point(PointGoal::Stroke(target), guess) {
                Some((k, phi0)) => {
                    prev = Some(node);
                    node = PointNode {
                        k,
                        phi0,
                        stroke: target,
                    };
                    step *= 1.3;
                }
                None => {
                    step *= 0.3;
                    if step < 1e-12 * (1.0 + total) {
                        return None;
                    }
                }
            }
        }
        match goal {
            PointGoal::Stroke(_) => Some((node.k, node.phi0)),
            other => self.solve_point(other, (node.k, node.phi0)),
        }
    }

    /// Solves the free phase at `stroke`: `2 (1 - E/K) = stroke`.
    fn free_k(&self, stroke: f64) -> Option<f64> {
        if stroke <= 0.0 {
            return Some(0.0);
        }
        // Without contact the free phase runs to the chord closing; bracket past it.
        let hi = self.first_contact.map(|(k, _)| k).unwrap_or(0.999_999);
        // Signs known: no stroke at k = 0, and the phase ends at or past `stroke` (first
        // contact, or a chord beyond closing). Seed from stroke = k^2 (1 + k^2/8) + O(k^6).
        let seed = (stroke.sqrt() * (1.0 - stroke / 16.0)).min(0.9 * hi);
        newton_signed(0.0, hi, true, seed, 1e-15, |k| {
            let s = free_d(D::var(k, 0))[0];
            (s.v - stroke, s.d[0])
        })
    }

    /// Solves line contact at `stroke` for `k`.
    fn line_k(&self, stroke: f64) -> Option<f64> {
        let (ks, ds) = self.line_onset?;
        let (limit, hi) = self.limit_data();
        let hi = hi?;
        let gap = self.gap;
        // Signs known: the stroke rises with k from the onset to the limit, and the phase
        // puts `stroke` between them. Seed by straight-line interpolation in stroke.
        let t = ((stroke - ds) / (limit.stroke - ds)).clamp(0.0, 1.0);
        let seed = ks + (hi - ks) * if t.is_finite() { t } else { 0.0 };
        newton_signed(ks, hi, true, seed, 1e-15, |k| {
            let s = line_d(D::var(k, 0), gap).stroke;
            (s.v - stroke, s.d[0])
        })
    }

    /// The phase the path is in at `stroke`. The limit is found only for strokes that can
    /// reach it (past line-contact onset, or past first contact without line contact).
    pub fn phase_at(&self, stroke: f64) -> Phase {
        // NaN and negative strokes have no state.
        if stroke.is_nan() || stroke < 0.0 {
            return Phase::BeyondLimit;
        }
        let tentative = match (self.first_contact, self.line_onset) {
            (Some((_, d1)), _) if stroke <= d1 => return Phase::Free,
            (Some(_), Some((_, ds))) if stroke < ds => return Phase::PointContact,
            (None, _) => Phase::Free,
            (Some(_), Some(_)) => Phase::LineContact,
            (Some(_), None) => Phase::PointContact,
        };
        if stroke > self.limit().stroke {
            Phase::BeyondLimit
        } else {
            tentative
        }
    }

    /// A stroke that misses the limit by rounding (e.g. after a mm round trip) is the limit.
    fn snap_to_limit(&self, stroke: f64) -> f64 {
        if self.phase_at(stroke) != Phase::BeyondLimit || !stroke.is_finite() {
            return stroke;
        }
        let limit = self.limit().stroke;
        if stroke > limit && stroke <= limit * (1.0 + 1e-12) {
            limit
        } else {
            stroke
        }
    }

    /// State of the strip at `stroke` (nondimensional). Past the limit the phase is
    /// `BeyondLimit` and the force and stress fields are NaN.
    pub fn state(&self, stroke: f64) -> StripState {
        let stroke = self.snap_to_limit(stroke);
        let phase = self.phase_at(stroke);
        let solved = match phase {
            Phase::Free => self.free_k(stroke).map(|k| self.free_state(k, stroke)),
            Phase::PointContact => self
                .point_at_q(stroke)
                .map(|(k, p, q)| self.point_state_of(k, p, &q, stroke)),
            Phase::LineContact => self.line_k(stroke).map(|k| self.line_state(k, stroke)),
            Phase::BeyondLimit | Phase::SolveFailed => return no_state(Phase::BeyondLimit, stroke),
        };
        solved.unwrap_or_else(|| no_state(Phase::SolveFailed, stroke))
    }

    fn free_state(&self, k: f64, stroke: f64) -> StripState {
        let [_, axial, crest, kappa, energy] = free_d(D::c(k));
        StripState {
            phase: Phase::Free,
            stroke,
            k,
            phi0: 0.0,
            arc: 0.5,
            axial: axial.v * self.scale_force,
            contact: 0.0,
            crest_height: crest.v,
            flat_length: 0.0,
            kappa_max: kappa.v * self.scale_curvature,
            energy: energy.v * self.scale_force,
        }
    }

    fn point_state_of(&self, k: f64, phi0: f64, q: &PointQ, stroke: f64) -> StripState {
        StripState {
            phase: Phase::PointContact,
            stroke,
            k,
            phi0,
            arc: 0.5,
            axial: q.axial.v * self.scale_force,
            contact: q.contact.v * self.scale_force,
            crest_height: self.gap,
            flat_length: 0.0,
            kappa_max: q.kappa.v * self.scale_curvature,
            energy: q.energy.v * self.scale_force,
        }
    }

    fn line_state(&self, k: f64, stroke: f64) -> StripState {
        let q = line_d(D::c(k), self.gap);
        StripState {
            phase: Phase::LineContact,
            stroke,
            k,
            phi0: -FRAC_PI_2,
            arc: q.arc.v,
            axial: q.axial.v * self.scale_force,
            contact: q.contact.v * self.scale_force,
            crest_height: self.gap,
            flat_length: 1.0 - 2.0 * q.arc.v,
            kappa_max: q.kappa.v * self.scale_curvature,
            energy: q.energy.v * self.scale_force,
        }
    }

    /// The answer when no contact stroke exists: the gap is beyond reach, or the solver
    /// failed to find first contact.
    fn no_contact(&self) -> StrokeQuery {
        if self.branch_lost {
            StrokeQuery::SolveFailed
        } else {
            StrokeQuery::NotReached
        }
    }

    /// A found stroke past the limit is not reached.
    fn within_limit(&self, stroke: f64) -> StrokeQuery {
        if stroke <= self.limit().stroke {
            StrokeQuery::Found(stroke)
        } else {
            StrokeQuery::NotReached
        }
    }

    /// Least stroke at which the contact force per strip reaches `contact`
    /// (nondimensional, this end condition); [`StrokeQuery`] says why there is none.
    pub fn stroke_for_contact(&self, contact: f64) -> StrokeQuery {
        if contact.is_nan() || contact <= 0.0 {
            return match self.first_contact_stroke() {
                Some(d1) => StrokeQuery::Found(d1),
                None => self.no_contact(),
            };
        }
        self.stroke_for_goal(contact, 0.0, 0.0, 1.0)
    }

    /// Least stroke at which `wk * kappa_max + wp * axial` (this end condition's values)
    /// reaches `value`; [`StrokeQuery`] says why there is none. Used for the stress limit.
    pub fn stroke_for_linear(&self, wk: f64, wp: f64, value: f64) -> StrokeQuery {
        // Free phase first: the combination rises with k from zero.
        let (wk_c, wp_c) = (wk * self.scale_curvature, wp * self.scale_force);
        let eval_free = |k: f64| {
            let [_, axial, _, kappa, _] = free_d(D::var(k, 0));
            let m = wk_c * kappa + wp_c * axial;
            (m.v - value, m.d[0])
        };
        let k_end = self
            .first_contact
            .map(|(k, _)| k)
            .unwrap_or(k_chord_closed());
        let at_end = eval_free(k_end).0;
        if at_end >= 0.0 {
            // Straight-line seed between the unloaded strip (kappa 0, axial 4 pi^2) and k_end.
            let at_rest = wp_c * 4.0 * PI * PI - value;
            let seed = if at_rest < 0.0 {
                k_end * at_rest / (at_rest - at_end)
            } else {
                0.0
            };
            return inverse_query(0.0, k_end, seed, value, eval_free)
                .and_then(|k| self.within_limit(free_d(D::c(k))[0].v));
        }
        if self.first_contact.is_none() {
            return self.no_contact();
        }
        self.stroke_for_goal(value, wk, wp, 0.0)
    }

    /// Least contact-phase stroke where `wk kappa + wp axial + wf contact` (weights on this
    /// end condition's values) reaches `value`. Each phase is taken as rising.
    fn stroke_for_goal(&self, value: f64, wk: f64, wp: f64, wf: f64) -> StrokeQuery {
        let Some((k1, d1)) = self.first_contact else {
            return self.no_contact();
        };
        let measure = |s: &StripState| wk * s.kappa_max + wp * s.axial + wf * s.contact;
        // The phase ends are known in closed form: no solve needed to evaluate them.
        let m1 = measure(&self.free_state(k1, d1));
        if m1 >= value {
            return StrokeQuery::Found(d1);
        }
        // Clamped-form weights for the phase equations.
        let (sk, sp, sf) = (
            wk * self.scale_curvature,
            wp * self.scale_force,
            wf * self.scale_force,
        );
        let point_end = match self.line_onset {
            Some((_, ds)) => ds,
            None => {
                // Without line contact the contact force can peak before the limit (g/L
                // above about 0.32): a contact value is then first reached before the peak.
                let limit = self.limit().stroke;
                match self.peaks().contact {
                    Some(peak) if wf != 0.0 && peak < limit => peak,
                    _ => limit,
                }
            }
        };
        let m_end = match self.line_onset {
            Some((ks, ds)) => measure(&self.line_state(ks, ds)),
            None => {
                let end = self.state(point_end);
                if !end.phase.has_state() {
                    return StrokeQuery::SolveFailed;
                }
                measure(&end)
            }
        };
        if m_end >= value {
            let goal = PointGoal::Linear {
                wk: sk,
                wp: sp,
                wf: sf,
                value,
            };
            let t = ((value - m1) / (m_end - m1)).clamp(0.0, 1.0);
            let guess_stroke = d1 + t * (point_end - d1);
            let contact_only = wk == 0.0 && wp == 0.0;
            let first_guess = if contact_only {
                self.point_guess_contact(t)
                    .unwrap_or_else(|| self.point_guess(guess_stroke, false))
            } else {
                self.point_guess(guess_stroke, false)
            };
            // A solution counts only on the branch: plate phase between 0 and -pi/2, stroke
            // within the point phase (the measure can dip after first contact, and the
            // two-equation solve can then land on the family's unphysical extension).
            let on_branch = |(_, phi0, q): (f64, f64, PointQ)| {
                let stroke = q.stroke.v;
                let slack = 1e-12 * (1.0 + point_end);
                let ok = (-FRAC_PI_2 - 1e-9..=1e-9).contains(&phi0)
                    && stroke >= d1 - slack
                    && stroke <= point_end + slack;
                ok.then_some(stroke.clamp(d1, point_end))
            };
            let direct = self
                .solve_point_q(goal, first_guess)
                .and_then(on_branch)
                .or_else(|| {
                    self.point_at(guess_stroke)
                        .and_then(|guess| self.solve_point_q(goal, guess))
                        .and_then(on_branch)
                });
            let stroke = match direct {
                Some(stroke) => StrokeQuery::Found(stroke),
                // Fallback: the measure along the branch, by stroke, with roots' Brent
                // method (one crossing: below the value at first contact, at or above it
                // at the end of the phase).
                None => {
                    let along = |stroke: f64| measure(&self.state(stroke)) - value;
                    let mut brent = BrentSettled {
                        y_scale: value.abs().max(f64::MIN_POSITIVE),
                    };
                    brent_query(roots::find_root_brent(d1, point_end, along, &mut brent))
                }
            };
            return stroke.and_then(|s| self.within_limit(s));
        }
        let Some((ks, _)) = self.line_onset else {
            return StrokeQuery::NotReached;
        };
        let Some(kl) = self.limit_data().1 else {
            return StrokeQuery::SolveFailed;
        };
        let gap = self.gap;
        let eval_line = |k: f64| {
            let q = line_d(D::var(k, 0), gap);
            let m = sk * q.kappa + sp * q.axial + sf * q.contact;
            (m.v - value, m.d[0])
        };
        let at_onset = m_end - value;
        let at_limit = eval_line(kl).0;
        let bracket = if at_limit >= 0.0 {
            Some((ks, kl, at_onset, at_limit))
        } else {
            self.first_crossing_in_line(ks, kl, at_onset, |k| eval_line(k).0)
        };
        let Some((lo, hi, at_lo, at_hi)) = bracket else {
            return StrokeQuery::NotReached;
        };
        // Straight-line seed between the bracket's ends (below and at or above the value).
        let seed = lo + (hi - lo) * at_lo / (at_lo - at_hi);
        inverse_query(lo, hi, seed, value, eval_line)
            .map(|k| line_d(D::c(k), gap).stroke.v.min(self.limit().stroke))
    }

    /// A bracket `(lo, hi, f(lo), f(hi))` in line contact around the first modulus where `f`
    /// reaches zero, when `f` falls short at the limit `kl`: a measure such as the contact
    /// force can peak inside line contact (at large gaps) and fall back. Scans, and refines
    /// the largest sample by golden section so that a narrow peak is not missed. `None`
    /// when `f` stays below zero all the way.
    fn first_crossing_in_line(
        &self,
        ks: f64,
        kl: f64,
        at_onset: f64,
        f: impl Fn(f64) -> f64,
    ) -> Option<(f64, f64, f64, f64)> {
        const SAMPLES: usize = 24;
        let mut prev = (ks, at_onset);
        let mut best = prev;
        for i in 1..SAMPLES {
            let k = ks + (kl - ks) * i as f64 / SAMPLES as f64;
            let v = f(k);
            if v >= 0.0 {
                return Some((prev.0, k, prev.1, v));
            }
            if v > best.1 {
                best = (k, v);
            }
            prev = (k, v);
        }
        let step = (kl - ks) / SAMPLES as f64;
        let (a, b) = ((best.0 - step).max(ks), (best.0 + step).min(kl));
        let k_peak = golden_max(a, b, &f);
        let at_peak = f(k_peak);
        if at_peak < 0.0 {
            return None;
        }
        let below = (a, f(a));
        Some((below.0, k_peak, below.1, at_peak))
    }

    /// Whether the strip at `stroke` leaves the room between the plates ([`Overlap`]),
    /// judged on its centreline at 64 points a span with a tolerance of 1e-9 L. Below
    /// `NO_OVERLAP_BELOW` (g/L 0.18) the model stops (flat-run buckling) before either
    /// happens, which a test holds on a grid of gaps and strokes, so those paths are not
    /// drawn at all.
    pub fn overlap_at(&self, stroke: f64) -> Option<Overlap> {
        if self.gap < NO_OVERLAP_BELOW || self.phase_at(stroke) == Phase::BeyondLimit {
            return None;
        }
        self.overlap_of(stroke, 64)
    }

    fn overlap_of(&self, stroke: f64, n: usize) -> Option<Overlap> {
        let points = self.shape(stroke, n);
        let half_chord = 0.5 * (1.0 - stroke);
        let first_half = &points[..points.len() / 2];
        let tol = 1e-9;
        if first_half.iter().any(|p| p[0] > half_chord + tol) {
            Some(Overlap::HalvesCross)
        } else if first_half.iter().any(|p| p[0] < -tol) {
            Some(Overlap::BehindPlate)
        } else {
            None
        }
    }

    /// The least stroke up to `stroke` from which the strip overlaps as at `stroke`
    /// (bisection to 1e-9 L), with the kind; `None` when it does not overlap at `stroke`.
    pub fn overlap_onset(&self, stroke: f64) -> Option<(f64, Overlap)> {
        let kind = self.overlap_at(stroke)?;
        let (mut lo, mut hi) = (
            self.first_contact_stroke().unwrap_or(0.0).min(stroke),
            stroke,
        );
        for _ in 0..60 {
            if hi - lo <= 1e-9 {
                break;
            }
            let mid = 0.5 * (lo + hi);
            if self.overlap_of(mid, 64) == Some(kind) {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        Some((hi, kind))
    }

    /// Points `(x, y)` along the whole strip (nondimensional; `x` from the first plate,
    /// `y` outward from the rest line), `n` per span, for drawing the side view.
    pub fn shape(&self, stroke: f64, n: usize) -> Vec<[f64; 2]> {
        let s = self.state(stroke);
        let n = n.max(4);
        let hinged = self.ends == Ends::Hinged;
        let k = s.k;
        let ke = elliptic::complete(k);
        // One span of the elliptic family from phi_a to phi_b, rotated by psi, starting at
        // the origin; `lam` only scales.
        let span = |phi_a: f64, phi_b: f64, psi: f64, lam: f64, out: &mut Vec<[f64; 2]>| {
            let at = |phi: f64| {
                let (f, e) = elliptic::incomplete_with(phi, k, ke);
                let xi = (2.0 * e - f) / lam;
                let eta = -2.0 * k * phi.cos() / lam;
                (xi, eta)
            };
            let (x0, y0) = at(phi_a);
            let (sp, cp) = psi.sin_cos();
            for i in 0..=n {
                let phi = phi_a + (phi_b - phi_a) * i as f64 / n as f64;
                let (xi, eta) = at(phi);
                let (dx, dy) = (xi - x0, eta - y0);
                out.push([dx * cp - dy * sp, dx * sp + dy * cp]);
            }
        };
        let mut half = Vec::with_capacity(2 * n + 2);
        let chord = match s.phase {
            Phase::BeyondLimit | Phase::SolveFailed => return Vec::new(),
            Phase::Free => {
                let lam = if hinged { 2.0 * ke.0 } else { 4.0 * ke.0 };
                let (a, b) = if hinged {
                    (FRAC_PI_2, 1.5 * PI)
                } else {
                    (0.0, 2.0 * PI)
                };
                span(a, b, 0.0, lam, &mut half);
                return half;
            }
            Phase::PointContact => {
                let (f0, _) = elliptic::incomplete(s.phi0, k);
                let psi = -2.0 * (k * s.phi0.sin()).asin();
                let lam = if hinged {
                    2.0 * (ke.0 - f0)
                } else {
                    4.0 * (ke.0 - f0)
                };
                let a = if hinged { FRAC_PI_2 } else { s.phi0 };
                span(a, PI - s.phi0, psi, lam, &mut half);
                1.0 - stroke
            }
            Phase::LineContact => {
                let alpha = 2.0 * k.asin();
                let lam = if hinged {
                    2.0 * ke.0 / s.arc
                } else {
                    4.0 * ke.0 / s.arc
                };
                let a = if hinged { FRAC_PI_2 } else { -FRAC_PI_2 };
                span(a, 1.5 * PI, alpha, lam, &mut half);
                1.0 - stroke
            }
        };
        let mut all = half.clone();
        for p in half.iter().rev() {
            all.push([chord - p[0], p[1]]);
        }
        all
    }
}

/// A state without a solution (`BeyondLimit` or `SolveFailed`): force and stress fields NaN.
fn no_state(phase: Phase, stroke: f64) -> StripState {
    StripState {
        phase,
        stroke,
        k: f64::NAN,
        phi0: f64::NAN,
        arc: f64::NAN,
        axial: f64::NAN,
        contact: f64::NAN,
        crest_height: f64::NAN,
        flat_length: f64::NAN,
        kappa_max: f64::NAN,
        energy: f64::NAN,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Files, tables and JSON read the same names through serde as through `name()`.
    #[test]
    fn serde_names_are_the_table_names() {
        for p in [
            Phase::Free,
            Phase::PointContact,
            Phase::LineContact,
            Phase::BeyondLimit,
            Phase::SolveFailed,
        ] {
            assert_eq!(serde_json::to_string(&p).ok(), Some(format!("\"{}\"", p.name())));
            assert_eq!(p.to_string(), p.name());
        }
        for r in [
            LimitReason::FlatRunBuckling,
            LimitReason::FlatRunCloses,
            LimitReason::ChordClosed,
            LimitReason::AxialForceVanishes,
            LimitReason::BranchLost,
            LimitReason::LeavesWall,
        ] {
            assert_eq!(serde_json::to_string(&r).ok(), Some(format!("\"{}\"", r.name())));
            assert_eq!(r.to_string(), r.name());
        }
        assert_eq!(LimitReason::LeavesWall.name(), "strips-leave-wall");
        assert_eq!(Phase::SolveFailed.name(), "solve-failed");
    }

    /// The constants of the elastica family solve (no fallback hides a failed solve), and
    /// each satisfies its own equation.
    #[test]
    fn family_constants_solve() {
        let kc = solve_k_chord_closed().expect("chord-closing modulus");
        let (kk, ee) = elliptic::complete(kc);
        assert!((ee / kk - 0.5).abs() < 1e-13, "E/K = {}", ee / kk);
        let kh = solve_k_highest_crest().expect("highest-crest modulus");
        assert!(free_d(D::var(kh, 0))[2].d[0].abs() < 1e-9);
        let kf = solve_k_line_fold().expect("line-fold modulus");
        // Mechanics note, section 4: the fold at k = 0.4897.
        assert!((kf - 0.4897).abs() < 1e-4, "{kf}");
    }

    /// The seed tables built once per process solve every entry: a failed build fails
    /// here rather than hiding behind a fitted or series seed.
    #[test]
    fn seed_tables_build_without_failures() {
        let branch = BranchTable::build();
        assert_eq!(branch.failed, 0, "branch-table entries not solved");
        assert!(
            branch.u.iter().chain(&branch.ratio).chain(&branch.contact).all(|v| v.is_finite())
        );
        let moduli = ModulusTable::build();
        for (name, column) in [
            ("first contact", &moduli.first_contact),
            ("line onset", &moduli.line_onset),
        ] {
            assert!(
                column.iter().all(|k| k.is_finite()),
                "{name}: a modulus-table entry did not solve"
            );
        }
    }

    /// The shortcut in `line_limit`: below `BUCKLES_BEFORE_FOLD` the buckling margin is
    /// already positive at the fold, on a fine grid of gaps (the crossover lies at about
    /// g/L = 0.195).
    #[test]
    fn flat_run_buckles_before_the_fold_below_the_shortcut_gap() {
        let k_fold = k_line_fold();
        let margin = |gap: f64| {
            let q = line_d(D::c(k_fold), gap);
            q.axial.v * (1.0 - 2.0 * q.arc.v).powi(2) - 4.0 * PI * PI
        };
        for i in 1..=2000 {
            let gap = BUCKLES_BEFORE_FOLD * i as f64 / 2000.0;
            assert!(margin(gap) > 0.0, "gap {gap}: margin {}", margin(gap));
        }
        // ... and the crossover itself lies between 0.19 and 0.2.
        assert!(margin(0.19) > 0.0 && margin(0.2) < 0.0);
    }

    /// Newton-Raphson from a poor seed on `atan` overshoots out of the bracket (it diverges
    /// from |x - root| > 1.39); the query must then fall back to Brent on the bracket.
    #[test]
    fn inverse_query_falls_back_to_brent_when_newton_leaves_the_bracket() {
        let f = |x: f64| ((x - 0.25).atan(), 1.0 / (1.0 + (x - 0.25).powi(2)));
        let root = inverse_query(-5.0, 5.0, -2.0, 1.0, f).ok().unwrap();
        assert!((root - 0.25).abs() < 1e-14, "{root}");
        // From a good seed Newton itself settles, to rounding.
        let root = inverse_query(-5.0, 5.0, 0.5, 1.0, f).ok().unwrap();
        assert!((root - 0.25).abs() < 1e-15, "{root}");
        // No sign change: the bracket is lost, and said so.
        assert_eq!(
            inverse_query(1.0, 5.0, 2.0, 1.0, f),
            StrokeQuery::BracketLost
        );
    }

    /// The tabulated seeds lie within 1.5e-4 of the solved branch between the table's nodes
    /// (in `u = phi0 / (-pi/2)` and relative `k`), across gaps and strokes.
    #[test]
    fn branch_table_seeds_are_close() {
        let (mut worst_u, mut worst_k) = (0.0_f64, 0.0_f64);
        for i in 0..47 {
            let gap = 0.002 + 0.296 * i as f64 / 46.0;
            let path = Path::new(Ends::Clamped, gap).unwrap();
            let (k1, d1) = path.first_contact.unwrap();
            let (_, ds) = path.line_onset.unwrap();
            for j in 1..40 {
                let t = j as f64 / 40.0;
                let s = path.state(d1 + t * (ds - d1));
                let (u, ratio) = branch_table().seed(gap, t).unwrap();
                worst_u = worst_u.max((u - s.phi0 / -FRAC_PI_2).abs());
                worst_k = worst_k.max((ratio * k1 / s.k - 1.0).abs());
            }
        }
        assert!(
            worst_u < 1.5e-4 && worst_k < 1.5e-4,
            "u {worst_u:e}, k {worst_k:e}"
        );
        // Seeds by contact-force fraction, against the solved state at that force.
        let (mut worst_u, mut worst_k) = (0.0_f64, 0.0_f64);
        for i in 0..23 {
            let gap = 0.004 + 0.29 * i as f64 / 22.0;
            let path = Path::new(Ends::Clamped, gap).unwrap();
            let (k1, _) = path.first_contact.unwrap();
            let (ks, _) = path.line_onset.unwrap();
            let f_onset = line_d(D::c(ks), gap).contact.v;
            for j in 1..20 {
                let r = j as f64 / 20.0;
                let stroke = path.stroke_for_contact(r * f_onset).ok().unwrap();
                let s = path.state(stroke);
                let (u, ratio) = branch_table().seed_for_contact(gap, r).unwrap();
                worst_u = worst_u.max((u - s.phi0 / -FRAC_PI_2).abs());
                worst_k = worst_k.max((ratio * k1 / s.k - 1.0).abs());
            }
        }
        assert!(
            worst_u < 1.5e-4 && worst_k < 1.5e-4,
            "by contact: u {worst_u:e}, k {worst_k:e}"
        );
        assert!(branch_table().seed(0.31, 0.5).is_none());
    }

    /// The overlap shortcut: below `NO_OVERLAP_BELOW` no state up to the limit swings
    /// behind a plate or crosses itself, for either end condition.
    #[test]
    fn no_overlap_below_the_shortcut_gap() {
        for ends in [Ends::Clamped, Ends::Hinged] {
            for i in 1..=40 {
                let gap = 0.19 * i as f64 / 40.0;
                let path = Path::new(ends, gap).unwrap();
                let limit = path.limit().stroke;
                for j in 0..=40 {
                    let stroke = limit * j as f64 / 40.0;
                    assert_eq!(
                        path.overlap_of(stroke, 64),
                        None,
                        "{ends:?} g/L {gap} stroke {stroke}"
                    );
                }
            }
        }
    }

    /// Large gaps do overlap before the limit: clamped strips swing behind the plate and
    /// later cross at the mid-plane, hinged ones swing behind the hinge plane early. The
    /// bounds are this solver's; the independent mpmath solution (tests/reference) saw
    /// the same for clamped strips at g/L >= 0.2: behind the plate from about
    /// delta/L = 0.5, halves crossing near 0.8.
    #[test]
    fn large_gaps_overlap_before_the_limit() {
        let clamped = Path::new(Ends::Clamped, 0.25).unwrap();
        let (onset, kind) = clamped.overlap_onset(0.95).unwrap();
        assert_eq!(kind, Overlap::HalvesCross);
        assert!(onset > 0.6 && onset < 0.9, "{onset}");
        // Behind the plate comes first, from about delta/L = 0.64.
        let (behind, kind) = clamped.overlap_onset(0.7).unwrap();
        assert_eq!(kind, Overlap::BehindPlate);
        assert!(behind > 0.55 && behind < 0.7, "{behind}");
        let hinged = Path::new(Ends::Hinged, 0.25).unwrap();
        let (onset, kind) = hinged.overlap_onset(0.5).unwrap();
        assert_eq!(kind, Overlap::BehindPlate);
        assert!(onset > 0.25 && onset < 0.4, "{onset}");
        // Just before the onset there is none.
        assert_eq!(hinged.overlap_at(onset - 1e-6), None);
    }

    /// What the limit scan relies on: from g/L = 0.195 (where the fold comes first) to the
    /// largest gap with line contact, the buckling margin only falls past the fold, and
    /// the plain-arithmetic margin agrees with the dual-number one.
    #[test]
    fn buckling_margin_falls_past_the_fold() {
        let k_fold = k_line_fold();
        for i in 0..=40 {
            let gap = 0.19 + (max_line_contact_gap() - 0.1905) * i as f64 / 40.0;
            let path = Path::new(Ends::Clamped, gap).unwrap();
            let (_, kl) = path.limit_data();
            let k_end = kl.unwrap().max(k_fold);
            let mut last = f64::INFINITY;
            for j in 0..=200 {
                let k = k_fold + (k_end - k_fold) * j as f64 / 200.0;
                let m = line_buckling_margin(k, gap);
                assert!(
                    m <= last + 1e-9,
                    "g/L {gap}: margin rises past the fold at k {k}"
                );
                last = m;
                let q = line_d(D::c(k), gap);
                let dual = q.axial.v * (1.0 - 2.0 * q.arc.v).powi(2) - 4.0 * PI * PI;
                assert!(
                    (m - dual).abs() <= 1e-10 * (1.0 + dual.abs()),
                    "{m} vs {dual}"
                );
            }
        }
    }

    /// The modulus seeds lie within 1e-7 (relative) of the solved moduli between the
    /// table's nodes up to g/L = 0.2, and within 2e-5 up to the table's ends, where the
    /// moduli steepen towards their folds.
    #[test]
    fn modulus_table_seeds_are_close() {
        let table = modulus_table();
        let (mut worst1, mut worst_s) = (0.0_f64, 0.0_f64);
        let (mut small1, mut small_s) = (0.0_f64, 0.0_f64);
        for i in 1..400 {
            let gap = 0.36 * i as f64 / 400.0 + 1e-4;
            if let Some(seed) = table.first_contact(gap) {
                let (k1, _) = solve_first_contact(gap, first_contact_series(gap)).unwrap();
                worst1 = worst1.max((seed / k1 - 1.0).abs());
                if gap <= 0.2 {
                    small1 = small1.max((seed / k1 - 1.0).abs());
                }
            }
            if let Some(seed) = table.line_onset(gap) {
                let (ks, _) = solve_line_onset(gap, line_onset_series(gap)).unwrap();
                worst_s = worst_s.max((seed / ks - 1.0).abs());
                if gap <= 0.2 {
                    small_s = small_s.max((seed / ks - 1.0).abs());
                }
            }
        }
        assert!(small1 < 1e-7 && small_s < 1e-7, "{small1:e} {small_s:e}");
        assert!(worst1 < 2e-5 && worst_s < 2e-5, "{worst1:e} {worst_s:e}");
        assert!(table.first_contact(0.37).is_none() && table.line_onset(0.31).is_none());
    }

    /// Strokes carried to a Newton root agree with a fresh evaluation there.
    #[test]
    fn carried_strokes_match_fresh_evaluations() {
        for &gap in &[1e-6, 1e-3, 0.02, 0.08, 0.15, 0.19, 0.25, 0.3] {
            let path = Path::new(Ends::Clamped, gap).unwrap();
            let (k1, d1) = path.first_contact.unwrap();
            let fresh = free_d(D::c(k1))[0].v;
            assert!(
                (d1 - fresh).abs() <= 2e-15 * fresh,
                "gap {gap}: {d1} vs {fresh}"
            );
            let (ks, ds) = path.line_onset.unwrap();
            let fresh = line_d(D::c(ks), gap).stroke.v;
            assert!(
                (ds - fresh).abs() <= 2e-15 * fresh,
                "gap {gap}: {ds} vs {fresh}"
            );
            let (limit, kl) = path.limit_data();
            let fresh = line_d(D::c(kl.unwrap()), gap).stroke.v;
            assert!(
                (limit.stroke - fresh).abs() <= 2e-15 * fresh,
                "gap {gap}: {} vs {fresh}",
                limit.stroke
            );
        }
    }
}
