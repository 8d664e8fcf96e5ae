//! Scatter: what the shop's tolerances do to every check. Reads the design file's
//! tolerances as distributions (`spec`), samples a model of the segment (`model`, a
//! plug-in) by Monte Carlo (JCGM 101:2008) and by the law of propagation (JCGM 100:2008,
//! section 5), and reports per check the failures, the probability of failure with its
//! Wilson 95 % interval, margin percentiles and standard deviations, a histogram of the
//! governing margin, the worst-case corner and the sensitivities (`stats` holds the
//! statistics). Each check stays at its own bore and stroke; the bore tolerance is judged
//! at its ends already, so the scatter varies the strips, the hub, the material and the
//! friction only.
//!
//! Reproducible: sample `i` draws from its own stream, keyed by `(seed, i)`, and the
//! samples are gathered in index order, so any thread count gives the same numbers. The
//! run goes in chunks (a first one of [`FIRST_CHUNK`] samples for an early estimate), with
//! a progress callback and a cancel flag between and within them.

pub mod command;
pub mod model;
pub mod shared;
pub mod spec;
pub mod stats;

use std::sync::atomic::{AtomicBool, Ordering};

use rayon::prelude::*;
use serde::Serialize;

use crate::checks::MarginUnit;
use crate::design::Design;
use crate::segment::SegmentError;

pub use model::{CentredModel, CheckInfo, MarginModel, Outcome};
pub use shared::SharedModel;
pub use spec::{DistributionKind, Input, SampleInputs, ScatterSpec, Spread, Tolerance};
pub use stats::{Histogram, Z_95, wilson_interval};

/// Samples in the first chunk, after which the progress callback sees a first estimate.
pub const FIRST_CHUNK: usize = 256;

/// Samples in each later chunk.
pub const CHUNK: usize = 2048;

/// Bins of the governing-margin histogram.
pub const HISTOGRAM_BINS: usize = 40;

/// Central-difference step of the law of propagation, as a fraction of each input's
/// standard uncertainty: small against the tolerance (the truncation error of a cubic law
/// is `(h/x)^2/3`), large against the solver's rounding.
pub const PROPAGATION_STEP: f64 = 0.01;

/// Why a scatter run gave no report.
#[derive(Debug, thiserror::Error)]
pub enum ScatterError {
    /// A value of the scatter section outside its range.
    #[error("scatter.{field} = {value} is outside the allowed range: {allowed}")]
    OutOfRange {
        /// The field, as in the file.
        field: &'static str,
        /// The value given.
        value: f64,
        /// The allowed range in words.
        allowed: String,
    },
    /// A tolerance so wide that at the end of its draws the design is refused.
    #[error(
        "scatter.{field}: the draws reach {bound} (the tolerance's bound), where the design is refused: {source}; make the tolerance smaller"
    )]
    TooWide {
        /// The tolerance, as in the file.
        field: &'static str,
        /// The value (deviation, modulus factor or friction) at which it is refused.
        bound: f64,
        /// Why the design is refused there.
        source: SegmentError,
    },
    /// The design itself cannot be evaluated.
    #[error("{0}")]
    Design(SegmentError),
    /// A sample could not be evaluated (not expected once the bounds are checked).
    #[error("scatter sample {index}: {source}")]
    Sample {
        /// Index of the sample.
        index: u64,
        /// Why.
        source: SegmentError,
    },
    /// The cancel flag was raised.
    #[error("the scatter run was cancelled")]
    Cancelled,
}

/// The statistics of one check.
#[derive(Clone, Debug, PartialEq)]
pub struct CheckStats {
    /// The check's id.
    pub id: &'static str,
    /// Unit of its margin.
    pub unit: MarginUnit,
    /// The outcome at the centre of the distributions (the design itself when the
    /// friction range, if any, is centred on the design's friction).
    pub centre: Outcome,
    /// Samples in which the check fails.
    pub failures: u64,
    /// `failures / samples`.
    pub probability_of_failure: f64,
    /// Wilson score interval at 95 %.
    pub wilson_95: [f64; 2],
    /// 1st percentile of the margin (`None`: no margin there).
    pub margin_p01: Option<f64>,
    /// Median margin.
    pub margin_p50: Option<f64>,
    /// 99th percentile of the margin.
    pub margin_p99: Option<f64>,
    /// Least and greatest margin over the samples, as [`Outcome::value`] reads them
    /// (`-inf`: some sample failed without a margin).
    pub margin_range: (f64, f64),
    /// Sample standard deviation of the margin (`None` when a sample has no margin).
    pub margin_sd_monte_carlo: Option<f64>,
    /// Law-of-propagation standard deviation `sqrt(sum (c_j u_j)^2)`, `c_j` by central
    /// differences; indicative only where the worst strip governs (a kink at the centre).
    pub margin_sd_propagation: Option<f64>,
}

/// One check's margin at its worst-case corner.
#[derive(Clone, Debug, PartialEq)]
pub struct WorstCase {
    /// The check's id.
    pub id: &'static str,
    /// Its outcome with every input at the end of its tolerance in the harmful
    /// direction (per strip), the direction taken from that input alone at each end, then,
    /// for a check that couples the strips ([`MarginModel::strips_interact`]), each
    /// per-strip input turned to its other end where that is more harmful with the rest at
    /// the corner (strips that differ move the hub).
    pub outcome: Outcome,
}

/// One tolerance alone at each end (every strip together), and one check's margin.
#[derive(Clone, Debug, PartialEq)]
pub struct Sensitivity {
    /// The tolerance's field name (`thickness_mm`, ..., `friction`).
    pub input: &'static str,
    /// The check's id.
    pub id: &'static str,
    /// Margin with the input at the low end (`None`: no margin there).
    pub margin_low: Option<f64>,
    /// Margin with the input at the high end.
    pub margin_high: Option<f64>,
}

/// Everything a scatter run gives.
#[derive(Clone, Debug, PartialEq)]
pub struct ScatterReport {
    /// Samples the statistics rest on (fewer than `requested` in an early estimate).
    pub samples: u64,
    /// Samples asked for.
    pub requested: u64,
    /// The seed.
    pub seed: u64,
    /// How the tolerances were read.
    pub distribution: DistributionKind,
    /// Per check, in the order of `checks::run`.
    pub checks: Vec<CheckStats>,
    /// Per check, its worst-case corner.
    pub worst_case: Vec<WorstCase>,
    /// Per tolerance that scatters and per check.
    pub sensitivities: Vec<Sensitivity>,
    /// Histogram of each sample's governing margin: the margin of the check the
    /// `checks::limiting` rule picks for that sample (units as that check's).
    pub governing: Histogram,
    /// How often each check governed, in check order.
    pub governing_counts: Vec<(&'static str, u64)>,
}

/// Cancel flag and progress callback of a run.
#[derive(Default)]
pub struct Control<'a> {
    /// Raised by another thread to stop the run.
    pub cancel: Option<&'a AtomicBool>,
    /// Called on the running thread after each chunk with the report so far.
    pub progress: Option<&'a mut dyn FnMut(&ScatterReport)>,
}

/// Runs a design's scatter with the load-sharing model ([`SharedModel`]), to the end.
pub fn run(design: &Design, spec: &ScatterSpec) -> Result<ScatterReport, ScatterError> {
    run_with(design, spec, Control::default())
}

/// Runs a design's scatter with the load-sharing model ([`SharedModel`]), with a cancel
/// flag and progress.
pub fn run_with(
    design: &Design,
    spec: &ScatterSpec,
    control: Control<'_>,
) -> Result<ScatterReport, ScatterError> {
    let model = SharedModel::new(design).map_err(ScatterError::Design)?;
    run_model(&model, spec, control)
}

/// What is known before sampling: the centre, the corners, the sensitivities and the
/// law of propagation.
struct Deterministic {
    centre: Vec<Outcome>,
    worst_case: Vec<WorstCase>,
    sensitivities: Vec<Sensitivity>,
    sd_propagation: Vec<Option<f64>>,
}

/// Runs the scatter of any model: validates the spec, checks that the design loads at
/// the bounds of every draw, computes the deterministic parts, then samples.
pub fn run_model<M: MarginModel>(
    model: &M,
    spec: &ScatterSpec,
    mut control: Control<'_>,
) -> Result<ScatterReport, ScatterError> {
    spec.validate()?;
    let det = deterministic(model, spec)?;
    let n = model.strips();
    let friction = model.design_friction();
    // At most `MAX_SAMPLES`, so it fits any `usize`.
    let total = spec.samples as usize;
    let cancel = control.cancel;
    let cancelled = || cancel.is_some_and(|c| c.load(Ordering::Relaxed));
    let mut done: Vec<Vec<Outcome>> = Vec::with_capacity(total);
    let mut start = 0;
    while start < total {
        if cancelled() {
            return Err(ScatterError::Cancelled);
        }
        let end = (start + if start == 0 { FIRST_CHUNK } else { CHUNK }).min(total);
        let chunk: Result<Vec<Vec<Outcome>>, ScatterError> = (start..end)
            .into_par_iter()
            .map(|i| {
                let i = i as u64;
                if cancelled() {
                    return Err(ScatterError::Cancelled);
                }
                let x = spec.draw(n, friction, i);
                model
                    .evaluate(&x)
                    .map_err(|source| ScatterError::Sample { index: i, source })
            })
            .collect();
        done.extend(chunk?);
        start = end;
        if start < total
            && let Some(progress) = control.progress.as_mut()
        {
            progress(&summarise(model.checks(), spec, &det, &done));
        }
    }
    let report = summarise(model.checks(), spec, &det, &done);
    if let Some(progress) = control.progress.as_mut() {
        progress(&report);
    }
    Ok(report)
}

/// The centre, the validity of the bounds, sensitivities, corners and propagation.
fn deterministic<M: MarginModel>(
    model: &M,
    spec: &ScatterSpec,
) -> Result<Deterministic, ScatterError> {
    let n = model.strips();
    let friction = model.design_friction();
    let spread = |t| spec.spread(t, friction);
    let centre_x = SampleInputs::centre(n, spread(Tolerance::Friction).centre);
    let eval = |x: &SampleInputs| model.evaluate(x);
    let centre = eval(&centre_x).map_err(ScatterError::Design)?;
    let active = spec.active();
    // Every tolerance alone, all strips together, at the bounds of its draws: the design
    // must load there, so that no sample is refused.
    for &t in &active {
        let s = spread(t);
        for bound in [s.bounds.0, s.bounds.1] {
            let x = set_all(&centre_x, t, n, bound);
            eval(&x).map_err(|source| ScatterError::TooWide {
                field: t.name(),
                bound,
                source,
            })?;
        }
    }
    let checks = model.checks();
    // Sensitivities: each tolerance alone at each end, every strip together.
    let mut sensitivities = Vec::new();
    for &t in &active {
        let s = spread(t);
        let low = eval(&set_all(&centre_x, t, n, s.centre - s.half_width))
            .map_err(ScatterError::Design)?;
        let high = eval(&set_all(&centre_x, t, n, s.centre + s.half_width))
            .map_err(ScatterError::Design)?;
        for (k, info) in checks.iter().enumerate() {
            sensitivities.push(Sensitivity {
                input: t.name(),
                id: info.id,
                margin_low: low[k].margin,
                margin_high: high[k].margin,
            });
        }
    }
    // Each scalar input alone at each end (per strip): the harmful direction, per check.
    let inputs: Vec<(Input, Spread)> = active
        .iter()
        .flat_map(|&t| t.inputs(n).into_iter().map(move |i| (i, spread(t))))
        .collect();
    let ends: Vec<(Vec<Outcome>, Vec<Outcome>)> = inputs
        .par_iter()
        .map(|&(input, s)| {
            let low = eval(&centre_x.moved(input, -s.half_width))?;
            let high = eval(&centre_x.moved(input, s.half_width))?;
            Ok((low, high))
        })
        .collect::<Result<_, SegmentError>>()
        .map_err(ScatterError::Design)?;
    let worst_case = checks
        .par_iter()
        .enumerate()
        .map(|(k, info)| {
            let mut x = centre_x.clone();
            let mut signs = Vec::with_capacity(inputs.len());
            for (&(input, s), (low, high)) in inputs.iter().zip(&ends) {
                let delta = if high[k].value() < low[k].value() {
                    s.half_width
                } else {
                    -s.half_width
                };
                signs.push(delta);
                x = x.moved(input, delta);
            }
            let mut out = eval(&x)?;
            // Strips that differ move the hub, so a strip's harmful end can depend on the
            // others': for a check that couples the strips, one pass turns each per-strip
            // input to its other end where that is more harmful with the rest at the corner.
            if n > 1 && model.strips_interact(k) {
                for (&(input, _), &delta) in inputs.iter().zip(&signs) {
                    if !input.per_strip() {
                        continue;
                    }
                    let turned = x.moved(input, -2.0 * delta);
                    let o = eval(&turned)?;
                    if o[k].value() < out[k].value() {
                        x = turned;
                        out = o;
                    }
                }
            }
            Ok(WorstCase {
                id: info.id,
                outcome: out[k],
            })
        })
        .collect::<Result<Vec<_>, SegmentError>>()
        .map_err(ScatterError::Design)?;
    // Law of propagation: c_j by central differences, u_j the standard uncertainty.
    let diffs: Vec<Vec<f64>> = inputs
        .par_iter()
        .map(|&(input, s)| {
            let u = s.standard_uncertainty;
            let h = PROPAGATION_STEP * u;
            let plus = eval(&centre_x.moved(input, h))?;
            let minus = eval(&centre_x.moved(input, -h))?;
            Ok((0..checks.len())
                .map(|k| (plus[k].value() - minus[k].value()) / (2.0 * h) * u)
                .collect())
        })
        .collect::<Result<_, SegmentError>>()
        .map_err(ScatterError::Design)?;
    let sd_propagation = (0..checks.len())
        .map(|k| {
            let c = centre[k].value();
            let sum: f64 = diffs.iter().map(|d| d[k] * d[k]).sum();
            (c.is_finite() && sum.is_finite()).then(|| sum.sqrt())
        })
        .collect();
    Ok(Deterministic {
        centre,
        worst_case,
        sensitivities,
        sd_propagation,
    })
}

/// The centre with every input of a tolerance set to `value` (a deviation in mm, the
/// modulus factor, or the friction coefficient).
fn set_all(centre: &SampleInputs, t: Tolerance, strips: usize, value: f64) -> SampleInputs {
    let mut x = centre.clone();
    match t {
        Tolerance::Thickness => x.thickness_mm = vec![value; strips],
        Tolerance::Width => x.width_mm = vec![value; strips],
        Tolerance::FreeLength => x.free_length_mm = vec![value; strips],
        Tolerance::MountRadius => x.mount_radius_mm = value,
        Tolerance::Modulus => x.modulus_factor = value,
        Tolerance::Friction => x.friction = value,
    }
    x
}

/// The statistics of the samples so far.
fn summarise(
    checks: &[CheckInfo],
    spec: &ScatterSpec,
    det: &Deterministic,
    samples: &[Vec<Outcome>],
) -> ScatterReport {
    let n = samples.len() as u64;
    let stats = checks
        .iter()
        .enumerate()
        .map(|(k, info)| {
            let mut values: Vec<f64> = samples.iter().map(|s| s[k].value()).collect();
            let failures = samples.iter().filter(|s| !s[k].pass).count() as u64;
            let sd = stats::sample_sd(&values);
            values.sort_by(f64::total_cmp);
            let q = |p| stats::quantile_sorted(&values, p).filter(|v| v.is_finite());
            CheckStats {
                id: info.id,
                unit: info.unit,
                centre: det.centre[k],
                failures,
                probability_of_failure: if n > 0 {
                    failures as f64 / n as f64
                } else {
                    0.0
                },
                wilson_95: wilson_interval(failures, n, Z_95),
                margin_p01: q(0.01),
                margin_p50: q(0.50),
                margin_p99: q(0.99),
                margin_range: (
                    values.first().copied().unwrap_or(f64::NAN),
                    values.last().copied().unwrap_or(f64::NAN),
                ),
                margin_sd_monte_carlo: sd,
                margin_sd_propagation: det.sd_propagation[k],
            }
        })
        .collect();
    let mut counts = vec![0u64; checks.len()];
    let governing: Vec<f64> = samples
        .iter()
        .map(|s| match limiting(checks, s) {
            Some(k) => {
                counts[k] += 1;
                s[k].value()
            }
            None => f64::INFINITY,
        })
        .collect();
    ScatterReport {
        samples: n,
        requested: spec.samples,
        seed: spec.seed,
        distribution: spec.distribution,
        checks: stats,
        worst_case: det.worst_case.clone(),
        sensitivities: det.sensitivities.clone(),
        governing: Histogram::new(&governing, HISTOGRAM_BINS),
        governing_counts: checks.iter().map(|c| c.id).zip(counts).collect(),
    }
}

/// The index of the governing check of one sample, by the rule of `checks::limiting`:
/// the failing check with the least margin (a missing margin least of all), else the
/// passing ratio check with the least margin.
pub fn limiting(checks: &[CheckInfo], outcomes: &[Outcome]) -> Option<usize> {
    let key = |o: &Outcome| o.margin.unwrap_or(f64::NEG_INFINITY);
    let pick = |pass: bool| {
        checks
            .iter()
            .zip(outcomes)
            .enumerate()
            .filter(|(_, (c, o))| o.pass == pass && (c.unit == MarginUnit::Ratio || !pass))
            .min_by(|a, b| key(a.1.1).total_cmp(&key(b.1.1)))
            .map(|(i, _)| i)
    };
    pick(false).or_else(|| pick(true))
}

#[derive(Serialize)]
struct JsonReport<'a> {
    samples: u64,
    seed: u64,
    checks: Vec<JsonCheck<'a>>,
    worst_case: Vec<JsonWorst<'a>>,
    sensitivities: Vec<JsonSensitivity<'a>>,
}

#[derive(Serialize)]
struct JsonCheck<'a> {
    id: &'a str,
    failures: u64,
    probability_of_failure: f64,
    wilson_95: [f64; 2],
    margin_p01: Option<f64>,
    margin_p50: Option<f64>,
    margin_p99: Option<f64>,
    margin_sd_monte_carlo: Option<f64>,
    margin_sd_propagation: Option<f64>,
}

#[derive(Serialize)]
struct JsonWorst<'a> {
    id: &'a str,
    margin: Option<f64>,
}

#[derive(Serialize)]
struct JsonSensitivity<'a> {
    input: &'a str,
    id: &'a str,
    margin_low: Option<f64>,
    margin_high: Option<f64>,
}

impl ScatterReport {
    /// The contract's JSON object (`samples, seed, checks, worst_case, sensitivities`),
    /// keys in that order, numbers at full round-trip precision, a missing margin as
    /// `null`: the same file, samples and seed give the same bytes.
    pub fn to_json(&self) -> String {
        let doc = JsonReport {
            samples: self.samples,
            seed: self.seed,
            checks: self
                .checks
                .iter()
                .map(|c| JsonCheck {
                    id: c.id,
                    failures: c.failures,
                    probability_of_failure: c.probability_of_failure,
                    wilson_95: c.wilson_95,
                    margin_p01: c.margin_p01,
                    margin_p50: c.margin_p50,
                    margin_p99: c.margin_p99,
                    margin_sd_monte_carlo: c.margin_sd_monte_carlo,
                    margin_sd_propagation: c.margin_sd_propagation,
                })
                .collect(),
            worst_case: self
                .worst_case
                .iter()
                .map(|w| JsonWorst {
                    id: w.id,
                    margin: w.outcome.margin,
                })
                .collect(),
            sensitivities: self
                .sensitivities
                .iter()
                .map(|s| JsonSensitivity {
                    input: s.input,
                    id: s.id,
                    margin_low: s.margin_low,
                    margin_high: s.margin_high,
                })
                .collect(),
        };
        // Serialising plain structs of numbers and strings cannot fail.
        serde_json::to_string(&doc).unwrap_or_default()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks;
    use crate::segment::Segment;

    #[test]
    fn limiting_rule_matches_the_checks() {
        // The governing check is the one `checks::limiting` picks (the project's rule),
        // on a passing and on a failing design.
        let mut failing = Design::default();
        failing.duty.holding_force_n = 500.0;
        for d in [Design::default(), failing] {
            let seg = Segment::new(&d).expect("valid");
            let list = checks::run(&seg);
            let info: Vec<CheckInfo> = list
                .iter()
                .map(|c| CheckInfo {
                    id: c.id.as_str(),
                    unit: c.unit(),
                })
                .collect();
            let out: Vec<Outcome> = list.iter().map(Outcome::from).collect();
            assert_eq!(limiting(&info, &out), checks::limiting(&list));
        }
    }
}
