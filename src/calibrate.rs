//! Bench measurements against the model, and the fit of correction factors. Owns the
//! prediction of each measured quantity at a row of a measurement file, the residuals
//! (measured minus model) and their summaries, the nonlinear least-squares engine and the
//! calibration fit built on it.
//!
//! The engine ([`least_squares`]) is generic over any [`Residuals`] model. It runs the
//! Levenberg-Marquardt method of the `levenberg-marquardt` crate (a port of MINPACK's
//! `lmder`) with a central-difference Jacobian, and reports standard errors from
//! `cov = s^2 (J^T J)^-1` at the solution, `s^2 = SSR / (n - p)`, with the correlation
//! matrix. Parameters outside their bounds (or where the model has no value) count as a
//! failed trial step, so the method shortens its step and stays inside.
//!
//! The calibration fits any subset of four factors, always kept in the order
//! modulus factor, stroke offset, effective free length, friction ([`Factor::ALL`]):
//! - the modulus factor multiplies `E` (so `E'` and the bending stiffness `B`: forces scale
//!   with it, shapes do not);
//! - the stroke offset is added to the measured stroke to give the model's stroke;
//! - the effective free length replaces the strip's free length;
//! - the friction coefficient turns the radial force into the slip force
//!   (`slip_force_n = friction x radial force`).
//!
//! When several measured columns are fitted together, each is weighted by the inverse of
//! its own residual RMS from a first pass (so millimetres and newtons count alike), and the
//! fit is run again from there. This module does no I/O and knows no front end.

use std::fmt;

use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt};
use nalgebra::{DMatrix, DVector, Dyn, Owned};
use serde::Serialize;

use crate::bench_data::{BenchData, Measurement, Quantity};
use crate::design::Design;
use crate::elastica::Phase;
use crate::segment::{BorePath, Segment, SegmentError};

// ---------------------------------------------------------------------------------------
// The engine.

/// A model to fit: a fixed number of residuals as a function of the parameters.
pub trait Residuals {
    /// The residuals at `params`; `None` where the model has no value there.
    fn residuals(&self, params: &[f64]) -> Option<Vec<f64>>;

    /// A typical size of parameter `index`: the difference step is relative to the larger
    /// of it and the parameter's value, so a parameter near zero still gets a usable step.
    fn typical(&self, _index: usize) -> f64 {
        0.0
    }
}

/// Why a least-squares fit gave no answer.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum FitError {
    /// Fewer residuals than parameters, or no parameters.
    #[error(
        "{points} points cannot fix {parameters} parameters (need more points than parameters)"
    )]
    TooFewPoints {
        /// Number of residuals.
        points: usize,
        /// Number of parameters.
        parameters: usize,
    },
    /// The model has no value at the starting point (or the start is outside its bounds).
    #[error("the model cannot be evaluated at the starting values")]
    BadStart,
    /// The Levenberg-Marquardt iteration stopped without converging.
    #[error("the least-squares iteration did not converge: {reason}")]
    NoConvergence {
        /// What the iteration reported.
        reason: String,
    },
    /// `J^T J` is singular at the solution: the data do not fix parameter `index`.
    #[error("parameter {index} is not fixed by the data (the Jacobian is rank deficient)")]
    Singular {
        /// Index of the parameter most involved in the rank deficiency.
        index: usize,
    },
}

/// A converged least-squares fit.
#[derive(Clone, Debug, PartialEq)]
pub struct Fit {
    /// Fitted parameters.
    pub params: Vec<f64>,
    /// Standard errors, `sqrt(diag(cov))`.
    pub standard_errors: Vec<f64>,
    /// Covariance `s^2 (J^T J)^-1`.
    pub covariance: Vec<Vec<f64>>,
    /// Correlation matrix, `cov_ij / (se_i se_j)`.
    pub correlation: Vec<Vec<f64>>,
    /// Residuals at the solution.
    pub residuals: Vec<f64>,
    /// Sum of squared residuals.
    pub residual_sum_of_squares: f64,
    /// `n - p`.
    pub degrees_of_freedom: usize,
    /// Model evaluations used by the iteration (Jacobian evaluations not counted).
    pub evaluations: usize,
}

/// Bounds on the parameters, inclusive: `(low, high)` for each.
pub type Bounds = [(f64, f64)];

/// Relative step of the central differences, about the cube root of the machine epsilon
/// (the step that balances truncation and rounding error; common practice, e.g. Press et
/// al., Numerical Recipes, section 5.7).
const DIFF_STEP: f64 = 6e-6;

/// Most model evaluations the iteration may use.
const MAX_EVALUATIONS: usize = 2000;

/// Relative tolerance on the reduction of the sum of squares and on the step. Tighter than
/// MINPACK's suggested square root of the machine precision: on ill-conditioned problems
/// (NIST's Thurber) that stops some digits short of the minimum.
const TOLERANCE: f64 = 1e-12;

/// Condition number of the column-scaled Jacobian beyond which a parameter counts as not
/// fixed by the data.
const MAX_CONDITION: f64 = 1e10;

fn inside(params: &[f64], bounds: Option<&Bounds>) -> bool {
    bounds.is_none_or(|b| {
        params
            .iter()
            .zip(b)
            .all(|(p, (lo, hi))| (*lo..=*hi).contains(p))
    })
}

fn evaluate<M: Residuals + ?Sized>(
    model: &M,
    params: &[f64],
    bounds: Option<&Bounds>,
    count: usize,
) -> Option<Vec<f64>> {
    if !inside(params, bounds) {
        return None;
    }
    model
        .residuals(params)
        .filter(|r| r.len() == count && r.iter().all(|v| v.is_finite()))
}

/// The central-difference Jacobian of the residuals at `params`, one-sided where a
/// neighbour lies outside the bounds or where the model has no value. `None` when
/// neither side can be evaluated for some parameter.
fn jacobian<M: Residuals + ?Sized>(
    model: &M,
    params: &[f64],
    bounds: Option<&Bounds>,
    at: &[f64],
) -> Option<DMatrix<f64>> {
    let m = at.len();
    let n = params.len();
    let mut jac = DMatrix::zeros(m, n);
    let mut p = params.to_vec();
    for j in 0..n {
        let x = params[j];
        let size = x.abs().max(model.typical(j));
        let h = DIFF_STEP * if size > 0.0 { size } else { 1.0 };
        p[j] = x + h;
        let plus = evaluate(model, &p, bounds, m);
        p[j] = x - h;
        let minus = evaluate(model, &p, bounds, m);
        p[j] = x;
        let column: Vec<f64> = match (plus, minus) {
            (Some(a), Some(b)) => a.iter().zip(&b).map(|(a, b)| (a - b) / (2.0 * h)).collect(),
            (Some(a), None) => a.iter().zip(at).map(|(a, r)| (a - r) / h).collect(),
            (None, Some(b)) => at.iter().zip(&b).map(|(r, b)| (r - b) / h).collect(),
            (None, None) => return None,
        };
        jac.set_column(j, &DVector::from_vec(column));
    }
    Some(jac)
}

/// The problem as the `levenberg-marquardt` crate sees it.
struct Problem<'a, M: Residuals + ?Sized> {
    model: &'a M,
    bounds: Option<&'a Bounds>,
    params: DVector<f64>,
    /// Residuals at `params`, when the model has them.
    current: Option<Vec<f64>>,
    /// Residual norm at the last point that could be evaluated.
    last_norm: f64,
    count: usize,
}

impl<M: Residuals + ?Sized> LeastSquaresProblem<f64, Dyn, Dyn> for Problem<'_, M> {
    type ResidualStorage = Owned<f64, Dyn>;
    type JacobianStorage = Owned<f64, Dyn, Dyn>;
    type ParameterStorage = Owned<f64, Dyn>;

    fn set_params(&mut self, x: &DVector<f64>) {
        self.params.copy_from(x);
        self.current = evaluate(self.model, self.params.as_slice(), self.bounds, self.count);
        if let Some(r) = &self.current {
            self.last_norm = r.iter().map(|v| v * v).sum::<f64>().sqrt();
        }
    }

    fn params(&self) -> DVector<f64> {
        self.params.clone()
    }

    fn residuals(&self) -> Option<DVector<f64>> {
        match &self.current {
            Some(r) => Some(DVector::from_column_slice(r)),
            // A trial step into a region without a value: a residual vector far larger
            // than the last one, so the step is refused and the trust region shrinks.
            None => {
                let big = 1e6 * (self.last_norm + 1.0) / (self.count as f64).sqrt();
                Some(DVector::from_element(self.count, big))
            }
        }
    }

    fn jacobian(&self) -> Option<DMatrix<f64>> {
        let at = self.current.as_ref()?;
        jacobian(self.model, self.params.as_slice(), self.bounds, at)
    }
}

/// Fits `model` by nonlinear least squares from `start`, keeping the parameters within
/// `bounds` when given, and reports the parameters with their standard errors.
pub fn least_squares<M: Residuals + ?Sized>(
    model: &M,
    start: &[f64],
    bounds: Option<&Bounds>,
) -> Result<Fit, FitError> {
    let n = start.len();
    let first = model.residuals(start).ok_or(FitError::BadStart)?;
    let m = first.len();
    if n == 0 || m <= n {
        return Err(FitError::TooFewPoints {
            points: m,
            parameters: n,
        });
    }
    if evaluate(model, start, bounds, m).is_none() {
        return Err(FitError::BadStart);
    }
    let mut problem = Problem {
        model,
        bounds,
        params: DVector::from_column_slice(start),
        current: None,
        last_norm: 0.0,
        count: m,
    };
    problem.set_params(&DVector::from_column_slice(start));
    let (problem, report) = LevenbergMarquardt::new()
        .with_ftol(TOLERANCE)
        .with_xtol(TOLERANCE)
        .with_gtol(0.0)
        .with_patience(MAX_EVALUATIONS / (n + 1))
        .minimize(problem);
    if !report.termination.was_successful() {
        return Err(FitError::NoConvergence {
            reason: format!("{:?}", report.termination),
        });
    }
    let params = problem.params.as_slice().to_vec();
    let residuals = evaluate(model, &params, bounds, m).ok_or(FitError::NoConvergence {
        reason: "the model has no value at the final parameters".to_string(),
    })?;
    let jac = jacobian(model, &params, bounds, &residuals).ok_or(FitError::NoConvergence {
        reason: "no Jacobian at the final parameters".to_string(),
    })?;
    let ssr: f64 = residuals.iter().map(|r| r * r).sum();
    let dof = m - n;
    let covariance = covariance(&jac, ssr / dof as f64)?;
    let standard_errors: Vec<f64> = (0..n).map(|i| covariance[(i, i)].sqrt()).collect();
    let correlation = (0..n)
        .map(|i| {
            (0..n)
                .map(|j| covariance[(i, j)] / (standard_errors[i] * standard_errors[j]))
                .collect()
        })
        .collect();
    Ok(Fit {
        params,
        standard_errors,
        covariance: (0..n)
            .map(|i| (0..n).map(|j| covariance[(i, j)]).collect())
            .collect(),
        correlation,
        residuals,
        residual_sum_of_squares: ssr,
        degrees_of_freedom: dof,
        evaluations: report.number_of_evaluations,
    })
}

/// `s2 (J^T J)^-1` through the singular value decomposition of the column-scaled
/// Jacobian (better conditioned than forming `J^T J`).
fn covariance(jac: &DMatrix<f64>, s2: f64) -> Result<DMatrix<f64>, FitError> {
    let n = jac.ncols();
    let scale: Vec<f64> = (0..n).map(|j| jac.column(j).norm()).collect();
    if let Some(index) = scale.iter().position(|s| !(*s > 0.0 && s.is_finite())) {
        return Err(FitError::Singular { index });
    }
    let mut scaled = jac.clone();
    for (j, s) in scale.iter().enumerate() {
        scaled.column_mut(j).scale_mut(1.0 / s);
    }
    let svd = scaled.svd(false, true);
    let v_t = svd.v_t.as_ref().ok_or(FitError::Singular { index: 0 })?;
    let sv = &svd.singular_values;
    let largest = sv.max();
    let (k, smallest) = sv.argmin();
    if !(smallest > 0.0 && largest / smallest < MAX_CONDITION) {
        // The parameter that leans most on the weakest direction.
        let index = (0..n)
            .max_by(|&a, &b| v_t[(k, a)].abs().total_cmp(&v_t[(k, b)].abs()))
            .unwrap_or(0);
        return Err(FitError::Singular { index });
    }
    let mut cov = DMatrix::zeros(n, n);
    for i in 0..n {
        for j in 0..n {
            let c: f64 = (0..n)
                .map(|k| v_t[(k, i)] * v_t[(k, j)] / (sv[k] * sv[k]))
                .sum();
            cov[(i, j)] = s2 * c / (scale[i] * scale[j]);
        }
    }
    Ok(cov)
}

// ---------------------------------------------------------------------------------------
// Factors.

/// A correction factor the calibration can fit.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Factor {
    /// Multiplies Young's modulus.
    Modulus,
    /// Added to the measured stroke to give the model's stroke, mm.
    Offset,
    /// Effective free length of the strips, mm.
    Length,
    /// Static friction coefficient, strip on wall.
    Friction,
}

impl Factor {
    /// Every factor, in the order of reports and of the correlation matrix.
    pub const ALL: [Factor; 4] = [
        Factor::Modulus,
        Factor::Offset,
        Factor::Length,
        Factor::Friction,
    ];

    /// The key in reports (`fitted` in `compare --json`).
    pub fn key(self) -> &'static str {
        match self {
            Factor::Modulus => "modulus_factor",
            Factor::Offset => "stroke_offset_mm",
            Factor::Length => "free_length_mm",
            Factor::Friction => "friction",
        }
    }

    /// The name on the command line (`--fit modulus,offset,length,friction`).
    pub fn option_name(self) -> &'static str {
        match self {
            Factor::Modulus => "modulus",
            Factor::Offset => "offset",
            Factor::Length => "length",
            Factor::Friction => "friction",
        }
    }

    /// Reads a command-line name.
    pub fn from_option_name(name: &str) -> Option<Factor> {
        Factor::ALL.into_iter().find(|f| f.option_name() == name)
    }
}

impl fmt::Display for Factor {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.key())
    }
}

/// Values of all four factors: the design's own (see [`Factors::nominal`]) or fitted ones.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct Factors {
    /// Multiplies Young's modulus (1: the material's value).
    pub modulus_factor: f64,
    /// Added to the measured stroke to give the model's stroke, mm (0: none).
    pub stroke_offset_mm: f64,
    /// Free length of the strips, mm.
    pub free_length_mm: f64,
    /// Friction coefficient, strip on wall.
    pub friction: f64,
}

impl Factors {
    /// The design as it stands: its calibration's modulus factor and stroke offset (1 and
    /// 0 without one), its free length and friction.
    pub fn nominal(design: &Design) -> Factors {
        Factors {
            modulus_factor: design.modulus_factor(),
            stroke_offset_mm: design.stroke_offset_mm(),
            free_length_mm: design.strip.free_length_mm,
            friction: design.friction,
        }
    }

    /// The value of one factor.
    pub fn get(&self, f: Factor) -> f64 {
        match f {
            Factor::Modulus => self.modulus_factor,
            Factor::Offset => self.stroke_offset_mm,
            Factor::Length => self.free_length_mm,
            Factor::Friction => self.friction,
        }
    }

    /// Sets one factor.
    pub fn set(&mut self, f: Factor, value: f64) {
        match f {
            Factor::Modulus => self.modulus_factor = value,
            Factor::Offset => self.stroke_offset_mm = value,
            Factor::Length => self.free_length_mm = value,
            Factor::Friction => self.friction = value,
        }
    }
}

/// The range a fitted factor must stay in, inclusive, for a design: modulus factor 0.2 to
/// 5 (the design file's range), stroke offset within a quarter of the free length either
/// way (and within the file's 100 mm), free length from half to one and a half times the
/// design's (within the file's 5 to 2000 mm), friction 0.01 to 2 (the file's range). A
/// fit that ends on one of these is refused, so a fitted value can always be applied.
pub fn bounds(design: &Design, f: Factor) -> (f64, f64) {
    let l = design.strip.free_length_mm;
    match f {
        Factor::Modulus => (0.2, 5.0),
        Factor::Offset => {
            let most = (0.25 * l).min(100.0);
            (-most, most)
        }
        Factor::Length => ((0.5 * l).max(5.0), (1.5 * l).min(2000.0)),
        Factor::Friction => (0.01, 2.0),
    }
}

/// The design with the factors applied, as "apply" writes it: the free length and the
/// friction replaced, and the modulus factor and stroke offset in its `calibration`
/// (which stays as it was, `None` included, when they equal the design's own).
pub fn design_with(design: &Design, factors: &Factors) -> Design {
    let mut d = design.clone();
    d.strip.free_length_mm = factors.free_length_mm;
    d.friction = factors.friction;
    let own = (design.modulus_factor(), design.stroke_offset_mm());
    if (factors.modulus_factor, factors.stroke_offset_mm) != own {
        d.calibration = Some(crate::design::Calibration {
            modulus_factor: factors.modulus_factor,
            stroke_offset_mm: factors.stroke_offset_mm,
        });
    }
    d
}

/// The segment with the factors applied: [`design_with`] resolved by [`Segment::new`],
/// which multiplies `E` by the modulus factor (so `E'` and `B = E' b t^3 / 12` with it;
/// the allowables, which come from strengths, do not change). The stroke offset is
/// applied by the caller to each measured stroke.
pub fn segment_with(design: &Design, factors: &Factors) -> Result<Segment, SegmentError> {
    Segment::new(&design_with(design, factors))
}

// ---------------------------------------------------------------------------------------
// Predictions and residuals.

/// Why the model has no prediction for a row.
#[derive(Clone, Debug, PartialEq)]
pub enum NoPrediction {
    /// The relaxed segment does not fit the row's bore.
    NoClearance {
        /// The row's bore, mm.
        bore_mm: f64,
    },
    /// The model's stroke (measured plus offset) is negative.
    NegativeStroke {
        /// The model's stroke, mm.
        stroke_mm: f64,
    },
    /// The model's stroke is past where the model stops in that bore.
    BeyondLimit {
        /// The model's stroke, mm.
        stroke_mm: f64,
        /// Where the model stops, mm.
        limit_stroke_mm: f64,
        /// Why it stops there.
        reason: &'static str,
    },
}

impl fmt::Display for NoPrediction {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            NoPrediction::NoClearance { bore_mm } => write!(
                f,
                "the relaxed segment does not fit a {bore_mm} mm bore, so the model has no state"
            ),
            NoPrediction::NegativeStroke { stroke_mm } => write!(
                f,
                "the model's stroke (measured plus offset) is {stroke_mm} mm; it must be >= 0"
            ),
            NoPrediction::BeyondLimit {
                stroke_mm,
                limit_stroke_mm,
                reason,
            } => write!(
                f,
                "the model's stroke {stroke_mm} mm is beyond its limit at {limit_stroke_mm:.3} mm in that bore ({reason})"
            ),
        }
    }
}

/// Why residuals or a calibration could not be had.
#[derive(Debug, thiserror::Error)]
pub enum CalibrationError {
    /// The design (with the factors applied) is not acceptable.
    #[error(transparent)]
    Segment(#[from] SegmentError),
    /// The model has no value for a measured row.
    #[error("line {line}: stroke_mm = {stroke_mm}: {why}")]
    NoPrediction {
        /// Line of the row in the measurement file.
        line: usize,
        /// The row's measured stroke, mm.
        stroke_mm: f64,
        /// Why.
        why: NoPrediction,
    },
    /// No factor was asked for.
    #[error("no factor to fit; choose from modulus, offset, length, friction")]
    NothingToFit,
    /// A factor cannot be told from the measured columns.
    #[error("{factor} cannot be fitted from these measurements: {reason}")]
    NotIdentifiable {
        /// The factor.
        factor: Factor,
        /// What is missing.
        reason: String,
    },
    /// Fewer measured values than factors to fit.
    #[error(
        "{points} measured values cannot fix {factors} factors (need more values than factors)"
    )]
    TooFewPoints {
        /// Measured values available.
        points: usize,
        /// Factors asked for.
        factors: usize,
    },
    /// The fit ended on the edge of a factor's allowed range: the data want a value the
    /// model does not consider plausible.
    #[error(
        "{factor} ran to the edge of its allowed range ({value:.6} against {low} to {high}); the model and the measurements disagree more than these factors can explain"
    )]
    AtBound {
        /// The factor.
        factor: Factor,
        /// Where the fit ended.
        value: f64,
        /// Lower end of the range.
        low: f64,
        /// Upper end of the range.
        high: f64,
    },
    /// The least-squares engine gave no answer.
    #[error("the fit failed: {0}")]
    Fit(FitError),
}

/// The model's value of a quantity at a state: the diameter over the strips, the pull on
/// the plates, or the slip force `friction x radial force` (the holding force).
fn predicted(path: &BorePath<'_>, stroke_mm: f64, q: Quantity) -> Result<f64, NoPrediction> {
    if stroke_mm < 0.0 {
        return Err(NoPrediction::NegativeStroke { stroke_mm });
    }
    if stroke_mm > path.limit_stroke_mm() || path.strip_state(stroke_mm).phase == Phase::BeyondLimit
    {
        return Err(NoPrediction::BeyondLimit {
            stroke_mm,
            limit_stroke_mm: path.limit_stroke_mm(),
            reason: path.limit_reason().name(),
        });
    }
    let s = path.state(stroke_mm);
    let value = match q {
        Quantity::OuterDiameter => s.outer_diameter_mm,
        Quantity::ActuatorForce => s.actuator_force_n,
        Quantity::SlipForce => s.holding_force_n,
    };
    value.ok_or(NoPrediction::BeyondLimit {
        stroke_mm,
        limit_stroke_mm: path.limit_stroke_mm(),
        reason: path.limit_reason().name(),
    })
}

/// One measured value beside the model's.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Residual {
    /// Line of the row in the measurement file.
    pub line: usize,
    /// Measured stroke, mm.
    pub stroke_mm: f64,
    /// Bore of the row, mm.
    pub bore_mm: f64,
    /// Measured value.
    pub measured: f64,
    /// The model's value.
    pub predicted: f64,
}

impl Residual {
    /// Measured minus predicted.
    pub fn residual(&self) -> f64 {
        self.measured - self.predicted
    }
}

/// The residuals of one measured quantity.
#[derive(Clone, Debug, PartialEq)]
pub struct QuantityResiduals {
    /// The quantity.
    pub quantity: Quantity,
    /// One per row that measured it, in file order.
    pub points: Vec<Residual>,
}

/// Summary of one quantity's residuals (measured minus model).
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct ResidualSummary {
    /// Root mean square.
    pub rms: f64,
    /// Largest absolute residual.
    pub max: f64,
    /// Number of measured values.
    pub points: usize,
    /// The largest one's signed value (measured minus model).
    pub max_signed: f64,
    /// The line of the row where the largest one is.
    pub max_line: usize,
    /// The measured stroke of that row, mm.
    pub max_stroke_mm: f64,
}

impl QuantityResiduals {
    /// RMS, largest and where it is.
    pub fn summary(&self) -> ResidualSummary {
        let n = self.points.len();
        let rms = (self
            .points
            .iter()
            .map(|p| p.residual().powi(2))
            .sum::<f64>()
            / n.max(1) as f64)
            .sqrt();
        let worst = self
            .points
            .iter()
            .max_by(|a, b| a.residual().abs().total_cmp(&b.residual().abs()));
        ResidualSummary {
            rms,
            max: worst.map_or(0.0, |p| p.residual().abs()),
            points: n,
            max_signed: worst.map_or(0.0, Residual::residual),
            max_line: worst.map_or(0, |p| p.line),
            max_stroke_mm: worst.map_or(0.0, |p| p.stroke_mm),
        }
    }
}

/// Paths of one segment at the bores the rows name, set up once each.
struct Paths<'a> {
    segment: &'a Segment,
    paths: Vec<(f64, Result<BorePath<'a>, NoPrediction>)>,
}

impl<'a> Paths<'a> {
    fn new(segment: &'a Segment) -> Paths<'a> {
        Paths {
            segment,
            paths: Vec::new(),
        }
    }

    fn bore_of(&self, row: &Measurement) -> f64 {
        row.bore_mm.unwrap_or(self.segment.bore_nominal_mm)
    }

    fn at(&mut self, bore_mm: f64) -> Result<&BorePath<'a>, NoPrediction> {
        let index = match self.paths.iter().position(|(b, _)| *b == bore_mm) {
            Some(i) => i,
            None => {
                let path = self
                    .segment
                    .at_bore(bore_mm)
                    .map_err(|_| NoPrediction::NoClearance { bore_mm });
                self.paths.push((bore_mm, path));
                self.paths.len() - 1
            }
        };
        self.paths[index].1.as_ref().map_err(Clone::clone)
    }
}

/// Measured against predicted for every measured value, per quantity (only quantities the
/// file measured), with `factors` applied.
pub fn residuals(
    design: &Design,
    data: &BenchData,
    factors: &Factors,
) -> Result<Vec<QuantityResiduals>, CalibrationError> {
    let seg = segment_with(design, factors)?;
    let mut paths = Paths::new(&seg);
    let mut out: Vec<QuantityResiduals> = data
        .quantities()
        .into_iter()
        .map(|quantity| QuantityResiduals {
            quantity,
            points: Vec::new(),
        })
        .collect();
    for row in &data.rows {
        let bore_mm = paths.bore_of(row);
        let stroke = row.stroke_mm + factors.stroke_offset_mm;
        for qr in &mut out {
            let Some(measured) = row.value(qr.quantity) else {
                continue;
            };
            let fail = |why| CalibrationError::NoPrediction {
                line: row.line,
                stroke_mm: row.stroke_mm,
                why,
            };
            let path = paths.at(bore_mm).map_err(fail)?;
            let predicted = predicted(path, stroke, qr.quantity).map_err(fail)?;
            qr.points.push(Residual {
                line: row.line,
                stroke_mm: row.stroke_mm,
                bore_mm,
                measured,
                predicted,
            });
        }
    }
    Ok(out)
}

/// The model at one stroke, as measured (the model's stroke less the design's offset).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ModelSample {
    /// Measured stroke, mm.
    pub stroke_mm: f64,
    /// Diameter over the strips, mm.
    pub outer_diameter_mm: Option<f64>,
    /// Pull on the end plates, N.
    pub actuator_force_n: Option<f64>,
    /// Slip force (the holding force), N.
    pub slip_force_n: Option<f64>,
}

impl ModelSample {
    /// The model's value of a measured quantity.
    pub fn value(&self, q: Quantity) -> Option<f64> {
        match q {
            Quantity::OuterDiameter => self.outer_diameter_mm,
            Quantity::ActuatorForce => self.actuator_force_n,
            Quantity::SlipForce => self.slip_force_n,
        }
    }
}

/// The model along the measured strokes at one bore of a measurement file.
#[derive(Clone, Debug, PartialEq)]
pub struct ModelCurve {
    /// The bore, mm.
    pub bore_mm: f64,
    /// Evenly spaced strokes over the measured ones there (5 % of their span beyond either
    /// end), within the model's range.
    pub samples: Vec<ModelSample>,
}

impl ModelCurve {
    /// The measured points of `q` at this curve's bore: `(measured stroke, value)`.
    pub fn measured(
        &self,
        design_nominal_mm: f64,
        data: &BenchData,
        q: Quantity,
    ) -> Vec<(f64, f64)> {
        data.rows
            .iter()
            .filter(|r| r.bore_mm.unwrap_or(design_nominal_mm) == self.bore_mm)
            .filter_map(|r| r.value(q).map(|v| (r.stroke_mm, v)))
            .collect()
    }
}

/// The design's model (with its calibration) at each bore of the file, in the file's
/// order, over the strokes measured there: for plotting the measurements over the model.
/// A bore the relaxed segment does not fit has no curve.
pub fn model_curves(segment: &Segment, data: &BenchData, points: usize) -> Vec<ModelCurve> {
    let offset = segment.design.stroke_offset_mm();
    let nominal = segment.bore_nominal_mm;
    let mut bores: Vec<f64> = Vec::new();
    for r in &data.rows {
        let b = r.bore_mm.unwrap_or(nominal);
        if !bores.contains(&b) {
            bores.push(b);
        }
    }
    let points = points.max(2);
    bores
        .into_iter()
        .filter_map(|bore_mm| {
            let path = segment.at_bore(bore_mm).ok()?;
            let (lo, hi) = data
                .rows
                .iter()
                .filter(|r| r.bore_mm.unwrap_or(nominal) == bore_mm)
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), r| {
                    (l.min(r.stroke_mm), h.max(r.stroke_mm))
                });
            let pad = 0.05 * (hi - lo).max(0.1);
            let from = (lo - pad + offset).max(0.0);
            let to = (hi + pad + offset).min(path.limit_stroke_mm());
            if to.partial_cmp(&from) != Some(std::cmp::Ordering::Greater) {
                return None;
            }
            let samples = (0..points)
                .map(|i| {
                    let s = from + (to - from) * i as f64 / (points - 1) as f64;
                    let st = path.state(s);
                    ModelSample {
                        stroke_mm: s - offset,
                        outer_diameter_mm: st.outer_diameter_mm,
                        actuator_force_n: st.actuator_force_n,
                        slip_force_n: st.holding_force_n,
                    }
                })
                .collect();
            Some(ModelCurve { bore_mm, samples })
        })
        .collect()
}

// ---------------------------------------------------------------------------------------
// The calibration fit.

/// A fitted factor.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct FittedFactor {
    /// Which factor.
    #[serde(skip)]
    pub factor: Factor,
    /// Its fitted value.
    pub value: f64,
    /// Its standard error.
    pub standard_error: f64,
}

/// The result of a calibration.
#[derive(Clone, Debug, PartialEq)]
pub struct Calibration {
    /// The fitted factors, in [`Factor::ALL`] order.
    pub fitted: Vec<FittedFactor>,
    /// Correlation between the fitted factors, same order.
    pub correlation: Vec<Vec<f64>>,
    /// All four factors after the fit (unfitted ones at their nominal values).
    pub factors: Factors,
    /// Weight scale of each quantity: its residual RMS from the first pass (the value the
    /// residuals were divided by), in the quantity's unit; one entry per measured
    /// quantity.
    pub scales: Vec<(Quantity, f64)>,
    /// Model evaluations of the final pass.
    pub evaluations: usize,
}

/// The model the engine fits: weighted residuals of every measured value.
struct CalibrationModel<'a> {
    design: &'a Design,
    data: &'a BenchData,
    chosen: &'a [Factor],
    nominal: Factors,
    /// Divisor of each quantity's residuals.
    scales: Vec<(Quantity, f64)>,
}

impl CalibrationModel<'_> {
    fn factors(&self, params: &[f64]) -> Factors {
        let mut f = self.nominal;
        for (factor, value) in self.chosen.iter().zip(params) {
            f.set(*factor, *value);
        }
        f
    }

    fn scale(&self, q: Quantity) -> f64 {
        self.scales
            .iter()
            .find(|(k, _)| *k == q)
            .map_or(1.0, |(_, s)| *s)
    }
}

impl Residuals for CalibrationModel<'_> {
    fn typical(&self, index: usize) -> f64 {
        match self.chosen.get(index) {
            // A stroke offset sits near zero: one percent of the free length.
            Some(Factor::Offset) => 0.01 * self.nominal.free_length_mm,
            _ => 0.0,
        }
    }

    fn residuals(&self, params: &[f64]) -> Option<Vec<f64>> {
        let all = residuals(self.design, self.data, &self.factors(params)).ok()?;
        Some(
            all.iter()
                .flat_map(|qr| {
                    let s = self.scale(qr.quantity);
                    qr.points.iter().map(move |p| p.residual() / s)
                })
                .collect(),
        )
    }
}

/// Checks that each chosen factor can be told from the measured columns.
fn identifiable(data: &BenchData, chosen: &[Factor]) -> Result<(), CalibrationError> {
    let has = |q| data.count(q) > 0;
    let fits = |f| chosen.contains(&f);
    let refuse = |factor, reason: &str| {
        Err(CalibrationError::NotIdentifiable {
            factor,
            reason: reason.to_string(),
        })
    };
    if fits(Factor::Modulus) {
        if !has(Quantity::ActuatorForce) && !has(Quantity::SlipForce) {
            return refuse(
                Factor::Modulus,
                "diameters do not depend on the modulus; measure actuator_force_n or slip_force_n",
            );
        }
        if !has(Quantity::ActuatorForce) && fits(Factor::Friction) {
            return refuse(
                Factor::Modulus,
                "with friction fitted too, slip forces alone cannot separate the two (both scale them); measure actuator_force_n as well",
            );
        }
    }
    if fits(Factor::Friction) && !has(Quantity::SlipForce) {
        return refuse(
            Factor::Friction,
            "friction shows only in pull-out tests; measure slip_force_n",
        );
    }
    Ok(())
}

/// Fits the chosen factors to the measurements, starting from the design's own values.
pub fn calibrate(
    design: &Design,
    data: &BenchData,
    fit: &[Factor],
) -> Result<Calibration, CalibrationError> {
    let chosen: Vec<Factor> = Factor::ALL
        .into_iter()
        .filter(|f| fit.contains(f))
        .collect();
    if chosen.is_empty() {
        return Err(CalibrationError::NothingToFit);
    }
    identifiable(data, &chosen)?;
    let nominal = Factors::nominal(design);
    // Residuals at the start: refuses rows the model has nothing for, with their line.
    let start_residuals = residuals(design, data, &nominal)?;
    let points: usize = start_residuals.iter().map(|q| q.points.len()).sum();
    if points <= chosen.len() {
        return Err(CalibrationError::TooFewPoints {
            points,
            factors: chosen.len(),
        });
    }
    if chosen.contains(&Factor::Friction)
        && start_residuals
            .iter()
            .filter(|q| q.quantity == Quantity::SlipForce)
            .all(|q| q.points.iter().all(|p| p.predicted == 0.0))
    {
        return Err(CalibrationError::NotIdentifiable {
            factor: Factor::Friction,
            reason: "every pull-out row is at a stroke where the strips do not touch the wall"
                .to_string(),
        });
    }
    let bound_list: Vec<(f64, f64)> = chosen.iter().map(|f| bounds(design, *f)).collect();
    let start: Vec<f64> = chosen.iter().map(|f| nominal.get(*f)).collect();
    // First pass: each quantity scaled by a typical size of its values (1 % of the
    // largest), which only matters when several are fitted together.
    let first_scales: Vec<(Quantity, f64)> = start_residuals
        .iter()
        .map(|q| {
            let size = q
                .points
                .iter()
                .map(|p| p.measured.abs().max(p.predicted.abs()))
                .fold(0.0, f64::max);
            (q.quantity, (0.01 * size).max(1e-9))
        })
        .collect();
    let mut model = CalibrationModel {
        design,
        data,
        chosen: &chosen,
        nominal,
        scales: first_scales,
    };
    let mut fit = run_fit(&model, &chosen, &start, &bound_list)?;
    if start_residuals.len() > 1 {
        // Second pass: weights from the first pass's residual RMS of each quantity.
        let after = residuals(design, data, &model.factors(&fit.params))?;
        model.scales = after
            .iter()
            .zip(&model.scales)
            .map(|(q, (_, first))| (q.quantity, q.summary().rms.max(1e-9 * first)))
            .collect();
        let restart = fit.params.clone();
        fit = run_fit(&model, &chosen, &restart, &bound_list)?;
    }
    for ((factor, value), (low, high)) in chosen.iter().zip(&fit.params).zip(&bound_list) {
        let margin = 1e-3 * (high - low);
        if *value <= low + margin || *value >= high - margin {
            return Err(CalibrationError::AtBound {
                factor: *factor,
                value: *value,
                low: *low,
                high: *high,
            });
        }
    }
    Ok(Calibration {
        fitted: chosen
            .iter()
            .zip(fit.params.iter().zip(&fit.standard_errors))
            .map(|(factor, (value, se))| FittedFactor {
                factor: *factor,
                value: *value,
                standard_error: *se,
            })
            .collect(),
        correlation: fit.correlation,
        factors: model.factors(&fit.params),
        scales: model.scales,
        evaluations: fit.evaluations,
    })
}

fn run_fit(
    model: &CalibrationModel<'_>,
    chosen: &[Factor],
    start: &[f64],
    bounds: &Bounds,
) -> Result<Fit, CalibrationError> {
    least_squares(model, start, Some(bounds)).map_err(|e| match e {
        FitError::Singular { index } => CalibrationError::NotIdentifiable {
            factor: chosen.get(index).copied().unwrap_or(Factor::Modulus),
            reason: "the measurements do not separate it from the other fitted factors (they move the predictions alike)".to_string(),
        },
        other => CalibrationError::Fit(other),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// y = a exp(b x): a textbook exponential fitted to exact data.
    struct Exponential {
        x: Vec<f64>,
        y: Vec<f64>,
    }

    impl Residuals for Exponential {
        fn residuals(&self, p: &[f64]) -> Option<Vec<f64>> {
            Some(
                self.x
                    .iter()
                    .zip(&self.y)
                    .map(|(x, y)| y - p[0] * (p[1] * x).exp())
                    .collect(),
            )
        }
    }

    #[test]
    fn recovers_exact_parameters() {
        let x: Vec<f64> = (0..10).map(|i| f64::from(i) * 0.3).collect();
        let y = x.iter().map(|x| 2.0 * (-0.7 * x).exp()).collect();
        let fit = least_squares(&Exponential { x, y }, &[1.0, -0.1], None).expect("converges");
        assert!((fit.params[0] - 2.0).abs() < 1e-9, "{:?}", fit.params);
        assert!((fit.params[1] + 0.7).abs() < 1e-9, "{:?}", fit.params);
    }

    #[test]
    fn too_few_points_and_rank_deficiency_are_errors() {
        let model = Exponential {
            x: vec![1.0, 2.0],
            y: vec![1.0, 2.0],
        };
        assert_eq!(
            least_squares(&model, &[1.0, 0.1], None),
            Err(FitError::TooFewPoints {
                points: 2,
                parameters: 2
            })
        );
        // Every x zero: y = a whatever b is, so b is not fixed.
        let flat = Exponential {
            x: vec![0.0; 5],
            y: vec![1.0, 1.1, 0.9, 1.0, 1.05],
        };
        assert!(matches!(
            least_squares(&flat, &[1.0, 0.1], None),
            Err(FitError::Singular { index: 1 })
        ));
    }

    #[test]
    fn bounds_keep_the_iteration_inside() {
        let x: Vec<f64> = (0..10).map(f64::from).collect();
        let y = x.iter().map(|x| 3.0 * (-0.2 * x).exp()).collect();
        let bounds = [(0.0, 2.5), (-1.0, 0.0)];
        // The best fit wants a = 3, outside: the iteration stays within a <= 2.5.
        let fit = least_squares(&Exponential { x, y }, &[1.0, -0.1], Some(&bounds));
        if let Ok(fit) = fit {
            assert!(fit.params[0] <= 2.5, "{:?}", fit.params);
        }
    }
}
