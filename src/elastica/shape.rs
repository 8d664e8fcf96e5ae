//! The strip's centreline at a stroke, for drawing, and the geometry cautions read from it:
//! where the strip swings behind an end plate or its halves cross (`Overlap`).

use std::f64::consts::{FRAC_PI_2, PI};

use super::*;
use crate::elliptic;

/// Below this gap (over L) the strip never swings behind a plate nor crosses itself before
/// the model's limit (`no_overlap_below_the_shortcut_gap` holds it on a grid up to 0.19;
/// the first cases appear at about 0.195).
pub(super) const NO_OVERLAP_BELOW: f64 = 0.18;

impl Path {
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

    pub(super) fn overlap_of(&self, stroke: f64, n: usize) -> Option<Overlap> {
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

#[cfg(test)]
mod tests {
    use super::*;

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
}
