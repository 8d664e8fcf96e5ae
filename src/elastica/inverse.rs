//! Inverse queries: the least stroke at which the contact force, or a linear combination of
//! curvature and axial force (the stress), reaches a value. Each phase is searched in turn; the
//! answer is a `StrokeQuery` that says whether the stroke was found, is not reached before the
//! limit, or could not be found (bracket lost, solve failed).

use std::f64::consts::{FRAC_PI_2, PI};

use super::*;

impl Path {
    /// The answer when no contact stroke exists: the gap is beyond reach, or the solver
    /// failed to find first contact.
    pub(super) fn no_contact(&self) -> StrokeQuery {
        if self.branch_lost {
            StrokeQuery::SolveFailed
        } else {
            StrokeQuery::NotReached
        }
    }

    /// A found stroke past the limit is not reached.
    pub(super) fn within_limit(&self, stroke: f64) -> StrokeQuery {
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
    pub(super) fn stroke_for_goal(&self, value: f64, wk: f64, wp: f64, wf: f64) -> StrokeQuery {
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
    pub(super) fn first_crossing_in_line(
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
}
