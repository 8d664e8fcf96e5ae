//! The point-contact branch: the two-equation damped Newton solve in `(k, phi0)` (crest on the
//! wall plus a stroke or a linear goal), its seeds from the branch table or the fitted
//! formulas, and marching from first contact when a direct solve fails.

use std::f64::consts::FRAC_PI_2;

use super::*;

impl Path {
    /// Two-equation Newton on `(k, phi0)`: crest on the wall plus `goal`, with a
    /// backtracking line search on the scaled residual so that it stays on the branch.
    pub(super) fn solve_point(&self, goal: PointGoal, guess: (f64, f64)) -> Option<(f64, f64)> {
        self.solve_point_q(goal, guess)
            .map(|(k, phi0, _)| (k, phi0))
    }

    /// As [`Path::solve_point`], also returning the quantities at the solution.
    pub(super) fn solve_point_q(
        &self,
        goal: PointGoal,
        guess: (f64, f64),
    ) -> Option<(f64, f64, PointQ)> {
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
    pub(super) fn point_guess(&self, stroke: f64, refine: bool) -> (f64, f64) {
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
    pub(super) fn point_guess_contact(&self, r: f64) -> Option<(f64, f64)> {
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
    pub(super) fn point_at(&self, stroke: f64) -> Option<(f64, f64)> {
        self.point_at_q(stroke).map(|(k, phi0, _)| (k, phi0))
    }

    /// As [`Path::point_at`], also returning the quantities at the solution.
    pub(super) fn point_at_q(&self, stroke: f64) -> Option<(f64, f64, PointQ)> {
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
    pub(super) fn march_point(&self, goal: PointGoal, stroke: f64) -> Option<(f64, f64)> {
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
}
