//! The load-sharing model a scatter run samples: strips that differ put the hub
//! off-centre even with no radial load (the method note), so each sample is judged with
//! its own per-strip thickness, width and free length in the load-sharing model, with its
//! own modulus, mount radius and friction, each check at its own bore and stroke.
//!
//! The rule: a sample whose strips are all alike is the changed design itself, judged by
//! `checks::run` (exactly the nominal checks at zero tolerances; the load-sharing checks
//! when the design uses them). A sample whose strips differ takes the centred checks of
//! its segment (one run per distinct strip, the worst strip governing the fit, hub,
//! stability and bend), and the load-sharing checks (reach, holding, static, fatigue,
//! actuator, stroke, top strip) with `Loading.deviations` set to its strips: by default
//! found near the nominal design's loaded states (`sharing::NearPlan`: Broyden steps from
//! the nominal hub offset, each strip re-solved at every step, strokes by short fixed-point
//! or secant searches, the general solver where those do not settle); or, for the tests,
//! solved in full ([`SharedModel::exact`]).

use crate::checks::{self, Check, CheckId};
use crate::design::Design;
use crate::segment::{Segment, SegmentError};
use crate::sharing::{self, NearCounts, NearPlan, StripDeviation};

use super::model::{CentredModel, CheckInfo, MarginModel, Outcome, combine_worst};
use super::spec::SampleInputs;

/// The model in words, for the command's text, the app's window and the sheet.
pub const MODEL_WORDS: &str = "load sharing, each strip with its own thickness, width and free length (strips that differ put the hub off-centre), found near the nominal design's loaded states (held to the full solve within 1e-7 on ratio margins and 2e-5 mm on strokes in the tests)";

/// How the load-sharing checks of a sample with unequal strips are found.
#[derive(Debug)]
enum Solve {
    /// Near the nominal design's states.
    Near(Box<NearPlan>),
    /// In full, every state and stroke from scratch (slow: for checking the near path).
    Exact,
}

/// The load-sharing margin model.
#[derive(Debug)]
pub struct SharedModel {
    centred: CentredModel,
    solve: Solve,
    counts: NearCounts,
}

/// The checks that load sharing judges; the others come from the centred checks of each
/// strip, the worst governing.
const SHARED: [CheckId; 7] = [
    CheckId::Reach,
    CheckId::Hold,
    CheckId::Static,
    CheckId::Fatigue,
    CheckId::Actuator,
    CheckId::Stroke,
    CheckId::TopStrip,
];

impl SharedModel {
    /// The model of a design, unequal strips found near the nominal states.
    pub fn new(design: &Design) -> Result<SharedModel, SegmentError> {
        let centred = CentredModel::new(design)?;
        let seg = Segment::new(design)?;
        let plan = NearPlan::new(
            &seg,
            &sharing::loading_of(design),
            sharing::design_uses_sharing(design),
        );
        Ok(SharedModel {
            centred,
            solve: Solve::Near(Box::new(plan)),
            counts: NearCounts::default(),
        })
    }

    /// The model with every state and stroke of unequal strips solved in full (for the
    /// tests: the reference the near path is held to).
    pub fn exact(design: &Design) -> Result<SharedModel, SegmentError> {
        Ok(SharedModel {
            centred: CentredModel::new(design)?,
            solve: Solve::Exact,
            counts: NearCounts::default(),
        })
    }

    /// The design the model varies.
    pub fn design(&self) -> &Design {
        self.centred.design()
    }

    /// States balanced near the nominal ones, and states or strokes handed to the general
    /// solver, so far (over every thread).
    pub fn counts(&self) -> (u64, u64) {
        use std::sync::atomic::Ordering;
        (
            self.counts.near.load(Ordering::Relaxed),
            self.counts.fallbacks.load(Ordering::Relaxed),
        )
    }

    /// The load-sharing checks of a sample with the strips' `deviations`, on its segment
    /// with nominal strips (its own modulus, hub and friction).
    fn shared_checks(&self, seg: &Segment, deviations: &[StripDeviation]) -> Vec<Check> {
        let mut list = checks::run_centred(seg);
        match &self.solve {
            Solve::Near(plan) => plan.amend(seg, deviations, &mut list, &self.counts),
            Solve::Exact => {
                let loading = sharing::Loading {
                    deviations: deviations.to_vec(),
                    ..sharing::loading_of(&seg.design)
                };
                sharing::checks::amend_loading(seg, &loading, &mut list);
            }
        }
        list
    }
}

impl MarginModel for SharedModel {
    fn checks(&self) -> &[CheckInfo] {
        self.centred.checks()
    }

    fn strips(&self) -> usize {
        self.centred.strips()
    }

    fn design_friction(&self) -> f64 {
        self.centred.design_friction()
    }

    fn strips_interact(&self, k: usize) -> bool {
        self.checks()
            .get(k)
            .is_some_and(|info| SHARED.iter().any(|c| c.as_str() == info.id))
    }

    fn evaluate(&self, x: &SampleInputs) -> Result<Vec<Outcome>, SegmentError> {
        let n = self.strips();
        if n == 0 || x.strips_alike() {
            return self.centred.evaluate(x);
        }
        let seg = self.centred.segment(x, (0.0, 0.0, 0.0))?;
        let deviations: Vec<StripDeviation> = (0..n)
            .map(|i| {
                let (t, w, l) = x.strip(i);
                StripDeviation {
                    thickness_mm: t,
                    width_mm: w,
                    free_length_mm: l,
                }
            })
            .collect();
        let shared = self.shared_checks(&seg, &deviations);
        // The centred checks of each distinct strip, and the bend with its rim and length.
        let mut distinct: Vec<((f64, f64, f64), Vec<Check>)> = Vec::new();
        for i in 0..n {
            let key = x.strip(i);
            if distinct.iter().any(|(k, _)| *k == key) {
                continue;
            }
            let s = self.centred.segment(x, key)?;
            let mut list = checks::run_centred(&s);
            list.extend(sharing::checks::bend(&s));
            distinct.push((key, list));
        }
        let missing = Outcome {
            pass: false,
            margin: None,
        };
        let find = |list: &[Check], id: &str| {
            list.iter()
                .find(|c| c.id.as_str() == id)
                .map_or(missing, Outcome::from)
        };
        Ok(self
            .checks()
            .iter()
            .map(|info| {
                if SHARED.iter().any(|c| c.as_str() == info.id) {
                    find(&shared, info.id)
                } else {
                    let per: Vec<Outcome> =
                        distinct.iter().map(|(_, l)| find(l, info.id)).collect();
                    combine_worst(&per)
                }
            })
            .collect())
    }
}
