//! The phase equations of one strip, written once over dual numbers: the free bulge at modulus
//! `k`, point contact at `(k, phi0)` and line contact at `k` and the gap, each in clamped form
//! (`EndScale` turns them into the hinged strip's forces and curvature). Also the constants of
//! the elastica family that the paths need (the chord-closing and highest-crest moduli, the
//! fold of line contact, the largest reachable and line-contact gaps) and the one-unknown
//! solves that set a path up: first contact and line-contact onset, with their small-gap
//! series seeds.

use std::f64::consts::{FRAC_PI_2, PI};

use super::*;
use crate::elliptic;

/// Force, energy and curvature factors of an end condition relative to clamped.
#[derive(Clone, Copy, Debug)]
pub(super) struct EndScale {
    pub(super) force: f64,
    pub(super) curvature: f64,
}

impl EndScale {
    pub(super) fn of(ends: Ends) -> EndScale {
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
pub(super) fn free_d(k: D) -> [D; 5] {
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
pub(super) struct PointQ {
    pub(super) crest: D,
    pub(super) stroke: D,
    pub(super) axial: D,
    pub(super) contact: D,
    pub(super) kappa: D,
    pub(super) energy: D,
}

pub(super) fn point_d(k: D, phi0: D) -> PointQ {
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
pub(super) struct LineQ {
    pub(super) arc: D,
    pub(super) stroke: D,
    pub(super) axial: D,
    pub(super) contact: D,
    pub(super) kappa: D,
    pub(super) energy: D,
}

/// `c sin(alpha) / l` of a free arc in line contact: its peak 0.64214 at k = 0.4897 bounds
/// the gaps that line contact can start at. Returns `(reach, K, D)`.
pub(super) fn line_reach_d(k: D) -> (D, D, D) {
    let (kk, _, dc) = complete_d(k);
    let kp = (1.0 - k.sq()).sqrt();
    let sin_a = 2.0 * (k * kp);
    let chord_ratio = 1.0 - 2.0 * (k.sq() * dc / kk); // 2E/K - 1
    (chord_ratio * sin_a, kk, dc)
}

pub(super) fn line_d(k: D, gap: f64) -> LineQ {
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

/// `c sin(alpha) / l` from `(K, E)` alone, for the onset and closing searches.
pub(super) fn reach_d(k: D) -> D {
    let (kk, ee) = complete_ke_d(k);
    let kp = (1.0 - k.sq()).sqrt();
    (2.0 * (ee / kk) - D::c(1.0)) * (2.0 * (k * kp))
}

/// The flat-run buckling margin `P (L - 2l)^2 - 4 pi^2` (clamped form) in line contact at
/// modulus `k`, in plain arithmetic for scans that want only its sign.
pub(super) fn line_buckling_margin(k: f64, gap: f64) -> f64 {
    let (kk, _, dc) = elliptic::complete3(k);
    let k2 = k * k;
    let reach = (1.0 - 2.0 * k2 * dc / kk) * 2.0 * k * ((1.0 - k) * (1.0 + k)).sqrt();
    let arc = gap / reach;
    let lam = 4.0 * kk / arc;
    let flat = 1.0 - 2.0 * arc;
    lam * lam * (1.0 - 2.0 * k2) * flat * flat - 4.0 * PI * PI
}

/// Solves the modulus at which `E/K = 1/2`. Signs known: the stroke is below 1 at
/// k = 0.5 and above it at k = 0.999999.
pub(super) fn solve_k_chord_closed() -> Option<f64> {
    newton_signed(0.5, 0.999_999, true, 0.9, 1e-15, |k| {
        let [stroke, ..] = free_d(D::var(k, 0));
        (stroke.v - 1.0, stroke.d[0])
    })
}

/// Solves the modulus of the free strip's highest crest. Signs known: the crest still
/// rises at k = 0.3 and already falls at k = 0.99.
pub(super) fn solve_k_highest_crest() -> Option<f64> {
    newton_signed(0.3, 0.99, false, 0.8, 1e-15, |k| {
        let h = 1e-6;
        let d1 = |k: f64| free_d(D::var(k, 0))[2].d[0];
        (d1(k), (d1(k + h) - d1(k - h)) / (2.0 * h))
    })
}

/// Solves the modulus of the fold of line contact. Signs known: the reach still rises at
/// k = 0.3 and already falls at k = 0.65.
pub(super) fn solve_k_line_fold() -> Option<f64> {
    newton_signed(0.3, 0.65, false, 0.49, 1e-15, |k| {
        let h = 1e-6;
        let d1 = |k: f64| line_reach_d(D::var(k, 0)).0.d[0];
        (d1(k), (d1(k + h) - d1(k - h)) / (2.0 * h))
    })
}

/// Modulus at which `E/K = 1/2`: the free strip's chord closes (`X = 0`). Solved once;
/// the unit test `family_constants_solve` holds that the solve succeeds.
pub(super) fn k_chord_closed() -> f64 {
    use std::sync::OnceLock;
    static K: OnceLock<f64> = OnceLock::new();
    *K.get_or_init(|| solve_k_chord_closed().expect("the chord-closing modulus solves"))
}

/// Modulus of the free strip's highest crest, where `d(k/K)/dk = 0` (`E = 2 k'^2 K`).
pub(super) fn k_highest_crest() -> f64 {
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

/// The reach `c sin(alpha) / l` where the axial force of line contact vanishes
/// (`k = 1/sqrt 2`); a constant of the elastica family.
pub(super) fn reach_at_axial_zero() -> f64 {
    use std::sync::OnceLock;
    static R: OnceLock<f64> = OnceLock::new();
    *R.get_or_init(|| reach_d(D::c(std::f64::consts::FRAC_1_SQRT_2)).v)
}

/// Seed for the first-contact modulus from the series `k = x (1 + x^2/4 + 17 x^4/64)`,
/// `x = pi g / 2` (inverting `k / K(k) = g` with `K` from DLMF 19.5.1).
pub(super) fn first_contact_series(gap: f64) -> f64 {
    let x = FRAC_PI_2 * gap;
    x * (1.0 + x * x * (0.25 + 17.0 / 64.0 * x * x))
}

/// Seed for the line-onset modulus from `reach = 2k (1 - 3k^2/2 + k^4/4) + O(k^7)`, inverted.
pub(super) fn line_onset_series(gap: f64) -> f64 {
    gap * (1.0 + gap * gap * (1.5 + 6.5 * gap * gap))
}

/// First contact at `gap`: the free crest height `k / K` reaches the gap. Signs known:
/// the crest is 0 < g at k = 0 and the highest crest > g at its modulus. Returns the
/// modulus and the stroke there (carried along to the root).
pub(super) fn solve_first_contact(gap: f64, seed: f64) -> Option<(f64, f64)> {
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
pub(super) fn solve_line_onset(gap: f64, seed: f64) -> Option<(f64, f64)> {
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

#[cfg(test)]
mod tests {
    use super::*;

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
}
