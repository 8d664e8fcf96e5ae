//! Where the model stops along a path and where the forces peak: the line-contact limit
//! (flat-run buckling, the flat run closing past the fold, the chord closing, the axial force
//! vanishing), and on point branches without line contact a march in stroke to the axial force
//! vanishing, the chord closing or the strips leaving the wall, recording the force peaks on
//! the way. Both are found on first use and kept in the path.

use std::f64::consts::PI;

use super::*;

/// Below this gap (over L) the flat run buckles before line contact reaches its fold. The
/// crossover itself lies between g/L 0.19 and 0.20 (about 0.195); the shortcut stops short
/// of it, and `flat_run_buckles_before_the_fold_below_the_shortcut_gap` holds both.
pub(super) const BUCKLES_BEFORE_FOLD: f64 = 0.18;

impl Path {
    /// The limit with its line-contact modulus, computed once.
    pub(super) fn limit_data(&self) -> (Limit, Option<f64>) {
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

    /// The limit in line contact, scanning `k` upward from the onset `ks`.
    pub(super) fn line_limit(&self, ks: f64) -> (Limit, f64) {
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
                let kb =
                    newton_signed(prev, k, true, 0.5 * (prev + k), 1e-15, buckling).unwrap_or(k);
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
    pub(super) fn point_limit_without_line(&self) -> Limit {
        self.march_without_line().0
    }

    /// Marches a point branch without line contact from first contact to its limit,
    /// recording where the axial and the contact force peak on the way.
    pub(super) fn march_without_line(&self) -> (Limit, Peaks) {
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
    pub(super) fn bisect_point(
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
    pub(super) fn point_peak(
        &self,
        a: PointNode,
        b: PointNode,
        measure: impl Fn(&PointQ) -> f64,
    ) -> f64 {
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
}

#[cfg(test)]
mod tests {
    use super::*;

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
