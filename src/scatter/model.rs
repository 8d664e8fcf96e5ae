//! The model a scatter run samples, as a plug-in: a function from one sample's inputs
//! (per-strip deviations, hub, modulus, friction) to the outcome of every check. The
//! centred model here holds the hub on the axis and judges each strip as the segment
//! would be if every strip were like it; for a sample whose strips are all alike that is
//! exactly `checks::run` on the changed design. The load-sharing model (`shared`:
//! strips that differ put the hub off-centre), which a run uses, plugs in through the same
//! trait and keeps this one for samples whose strips are alike.

use crate::checks::{self, Check, MarginUnit};
use crate::design::Design;
use crate::segment::{Segment, SegmentError};

use super::spec::SampleInputs;

/// A check's id and margin unit, as `checks::run` gives them.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct CheckInfo {
    /// The check's id (`fit`, `reach`, `hold`, ...).
    pub id: &'static str,
    /// Unit of its margin.
    pub unit: MarginUnit,
}

/// What one check gives for one sample.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Outcome {
    /// Whether the check passes.
    pub pass: bool,
    /// Its margin; `None` where none can be formed.
    pub margin: Option<f64>,
}

impl Outcome {
    /// The margin as a number for ordering: a missing margin is `-inf` on a failing check
    /// (no state to judge) and `+inf` on a passing one (nothing to judge against).
    pub fn value(&self) -> f64 {
        match self.margin {
            Some(m) => m,
            None if self.pass => f64::INFINITY,
            None => f64::NEG_INFINITY,
        }
    }
}

impl From<&Check> for Outcome {
    fn from(c: &Check) -> Self {
        Outcome {
            pass: c.pass,
            margin: c.margin,
        }
    }
}

/// A model a scatter run can sample. `evaluate` must be a pure function of its inputs
/// (the same inputs give the same outcomes on any thread), in the order of `checks`.
pub trait MarginModel: Sync {
    /// The checks, in the order `evaluate` returns them.
    fn checks(&self) -> &[CheckInfo];
    /// Number of strips (the length of the per-strip inputs).
    fn strips(&self) -> usize;
    /// The design's friction coefficient (the centre when the scatter gives no range).
    fn design_friction(&self) -> f64;
    /// The outcome of every check for one sample.
    fn evaluate(&self, inputs: &SampleInputs) -> Result<Vec<Outcome>, SegmentError>;
    /// Whether check `k` couples the strips (one strip's harmful end can depend on the
    /// others', as when strips that differ move the hub); the worst-case corner then
    /// looks at each per-strip input's other end as well. Default: no.
    fn strips_interact(&self, _k: usize) -> bool {
        false
    }
}

/// The centred model: hub on the axis, each strip judged on its own geometry.
#[derive(Clone, Debug)]
pub struct CentredModel {
    design: Design,
    checks: Vec<CheckInfo>,
}

/// One strip's `(thickness, width, free length)` deviations, mm.
type StripDeviation = (f64, f64, f64);

/// How per-strip outcomes make the segment's.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Combine {
    /// The worst strip governs (fit, reach, stress, stroke, hub, and any other check).
    Worst,
    /// The strips' holding forces add: the margin `mu sum F_i / required - 1` is the mean
    /// of the per-strip margins `mu N F_i / required - 1`.
    Mean,
    /// The strips' pulls add: the effort is the mean of the per-strip efforts
    /// `rating / (1 + m_i)`, so `1 + m = 1 / mean(1 / (1 + m_i))`.
    Harmonic,
}

fn combine_rule(id: &str) -> Combine {
    match id {
        "hold" => Combine::Mean,
        "actuator" => Combine::Harmonic,
        _ => Combine::Worst,
    }
}

impl CentredModel {
    /// The model of a design; refuses a design `Segment::new` refuses.
    pub fn new(design: &Design) -> Result<CentredModel, SegmentError> {
        let seg = Segment::new(design)?;
        let checks = checks::run(&seg)
            .iter()
            .map(|c| CheckInfo {
                id: c.id.as_str(),
                unit: c.unit(),
            })
            .collect();
        Ok(CentredModel {
            design: design.clone(),
            checks,
        })
    }

    /// The design the model varies.
    pub fn design(&self) -> &Design {
        &self.design
    }

    /// The segment of the design with every strip moved by `(dt, dw, dl)` mm, the hub
    /// and friction of `x`, and the modulus scaled by `x.modulus_factor` (through `E'`
    /// and `B` together, which is all the mechanics reads of it).
    pub fn segment(
        &self,
        x: &SampleInputs,
        strip: (f64, f64, f64),
    ) -> Result<Segment, SegmentError> {
        let mut d = self.design.clone();
        d.mount_radius_mm += x.mount_radius_mm;
        d.friction = x.friction;
        d.strip.thickness_mm += strip.0;
        d.strip.width_mm += strip.1;
        d.strip.free_length_mm += strip.2;
        let mut seg = Segment::new(&d)?;
        seg.modulus_pa *= x.modulus_factor;
        seg.bending_stiffness_nm2 *= x.modulus_factor;
        Ok(seg)
    }

    fn one_strip(
        &self,
        x: &SampleInputs,
        strip: (f64, f64, f64),
    ) -> Result<Vec<Outcome>, SegmentError> {
        let seg = self.segment(x, strip)?;
        let list = checks::run(&seg);
        let positional = list.len() == self.checks.len()
            && list
                .iter()
                .zip(&self.checks)
                .all(|(c, i)| c.id.as_str() == i.id);
        Ok(if positional {
            list.iter().map(Outcome::from).collect()
        } else {
            self.checks
                .iter()
                .map(|info| {
                    list.iter().find(|c| c.id.as_str() == info.id).map_or(
                        Outcome {
                            pass: false,
                            margin: None,
                        },
                        Outcome::from,
                    )
                })
                .collect()
        })
    }
}

impl MarginModel for CentredModel {
    fn checks(&self) -> &[CheckInfo] {
        &self.checks
    }

    fn strips(&self) -> usize {
        self.design.strip.count as usize
    }

    fn design_friction(&self) -> f64 {
        self.design.friction
    }

    fn evaluate(&self, x: &SampleInputs) -> Result<Vec<Outcome>, SegmentError> {
        let n = self.strips();
        if n == 0 || x.strips_alike() {
            let first = if n == 0 { (0.0, 0.0, 0.0) } else { x.strip(0) };
            return self.one_strip(x, first);
        }
        // Strips with identical deviations are judged once.
        let mut distinct: Vec<(StripDeviation, Vec<Outcome>, usize)> = Vec::new();
        for i in 0..n {
            let key = x.strip(i);
            match distinct.iter_mut().find(|(k, _, _)| *k == key) {
                Some(entry) => entry.2 += 1,
                None => {
                    let out = self.one_strip(x, key)?;
                    distinct.push((key, out, 1));
                }
            }
        }
        Ok(self
            .checks
            .iter()
            .enumerate()
            .map(|(k, info)| {
                let per: Vec<(Outcome, usize)> =
                    distinct.iter().map(|(_, o, w)| (o[k], *w)).collect();
                combine(combine_rule(info.id), &per, n)
            })
            .collect())
    }
}

/// The worst of several outcomes (every one must pass; the least margin).
pub(super) fn combine_worst(per: &[Outcome]) -> Outcome {
    let with: Vec<(Outcome, usize)> = per.iter().map(|o| (*o, 1)).collect();
    combine(Combine::Worst, &with, per.len())
}

/// The segment's outcome from the per-strip ones, each with its multiplicity.
fn combine(rule: Combine, per: &[(Outcome, usize)], n: usize) -> Outcome {
    let all_pass = per.iter().all(|(o, _)| o.pass);
    if rule == Combine::Worst {
        let worst = per
            .iter()
            .map(|(o, _)| o.value())
            .fold(f64::INFINITY, f64::min);
        return Outcome {
            pass: all_pass,
            margin: worst.is_finite().then_some(worst),
        };
    }
    if per.iter().any(|(o, _)| o.margin.is_none() && !o.pass) {
        return Outcome {
            pass: false,
            margin: None,
        };
    }
    let n = n as f64;
    let margin = match rule {
        Combine::Mean => {
            let with: Vec<(f64, usize)> = per
                .iter()
                .filter_map(|(o, w)| o.margin.map(|m| (m, *w)))
                .collect();
            (!with.is_empty()).then(|| with.iter().map(|(m, w)| m * *w as f64).sum::<f64>() / n)
        }
        _ => {
            // A strip with no margin (no effort needed) adds no effort.
            let inv: f64 = per
                .iter()
                .filter_map(|(o, w)| o.margin.map(|m| *w as f64 / (1.0 + m)))
                .sum::<f64>()
                / n;
            (inv > 0.0).then(|| 1.0 / inv - 1.0)
        }
    };
    Outcome {
        pass: margin.is_none_or(|m| m >= 0.0),
        margin,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn alike_strips_give_the_checks_themselves() {
        // The centred model with every strip alike is the segment model itself (the
        // mechanics note: all strips alike share the load equally).
        let d = Design::default();
        let model = CentredModel::new(&d).expect("valid");
        let x = SampleInputs::centre(model.strips(), d.friction);
        let got = model.evaluate(&x).expect("evaluates");
        let seg = Segment::new(&d).expect("valid");
        let want: Vec<Outcome> = checks::run(&seg).iter().map(Outcome::from).collect();
        assert_eq!(got, want);
    }

    #[test]
    fn combining_by_hand() {
        // Worked by hand: holding margins 0.5 (one strip) and 0.2 (three strips) of four
        // average to (0.5 + 0.6) / 4 = 0.275; efforts rating/1.5 and 3 x rating/1.2 of four
        // strips give 1 + m = 4 / (1/1.5 + 3/1.2) = 1.263157...; the worst of 0.5 and
        // 0.2 is 0.2.
        let a = Outcome {
            pass: true,
            margin: Some(0.5),
        };
        let b = Outcome {
            pass: true,
            margin: Some(0.2),
        };
        let per = [(a, 1), (b, 3)];
        let mean = combine(Combine::Mean, &per, 4).margin.unwrap_or(f64::NAN);
        assert!((mean - 0.275).abs() < 1e-15);
        let harm = combine(Combine::Harmonic, &per, 4)
            .margin
            .unwrap_or(f64::NAN);
        assert!((harm - (4.0 / (1.0 / 1.5 + 3.0 / 1.2) - 1.0)).abs() < 1e-15);
        assert_eq!(combine(Combine::Worst, &per, 4).margin, Some(0.2));
        let none_fail = Outcome {
            pass: false,
            margin: None,
        };
        let with_fail = [(a, 3), (none_fail, 1)];
        assert_eq!(combine(Combine::Mean, &with_fail, 4), none_fail);
        assert_eq!(combine(Combine::Worst, &with_fail, 4), none_fail);
    }
}
