//! The `scatter` section of a design file (tolerances, distribution, sample count, seed)
//! and the draws it stands for: one sample's inputs, reproducible from the seed and the
//! sample's index alone, whatever the thread that draws it.

use chacha20::ChaCha20Rng;
use chacha20::rand_core::{Rng, SeedableRng};
use serde::{Deserialize, Serialize};

use super::ScatterError;
use crate::design;

/// How a tolerance is read as a distribution.
#[derive(Default, Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum DistributionKind {
    /// Normal, the tolerance at three standard deviations (common practice for a capable
    /// process): `u = tolerance / 3`.
    #[default]
    Normal3Sigma,
    /// Uniform over the tolerance, the rectangular distribution of the GUM
    /// (JCGM 100:2008, 4.3.7): `u = tolerance / sqrt(3)`.
    Uniform,
}

/// The scatter section: each tolerance plus or minus about the design's value (0: none).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ScatterSpec {
    /// Strip thickness tolerance, drawn for each strip on its own, mm.
    #[serde(default)]
    pub thickness_mm: f64,
    /// Strip width tolerance, each strip on its own, mm.
    #[serde(default)]
    pub width_mm: f64,
    /// Free-length tolerance, each strip on its own, mm.
    #[serde(default)]
    pub free_length_mm: f64,
    /// Mount-radius tolerance (one value for the hub), mm.
    #[serde(default)]
    pub mount_radius_mm: f64,
    /// Young's modulus tolerance, percent (one value for the coil).
    #[serde(default)]
    pub modulus_percent: f64,
    /// Friction coefficient range `(min, max)`, one value for the pipe; `None` keeps the
    /// design's friction.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub friction: Option<(f64, f64)>,
    /// How the tolerances are read.
    #[serde(default)]
    pub distribution: DistributionKind,
    /// Number of Monte Carlo samples.
    #[serde(default = "default_samples")]
    pub samples: u64,
    /// Seed of the random streams.
    #[serde(default = "default_seed")]
    pub seed: u64,
}

fn default_samples() -> u64 {
    10_000
}

fn default_seed() -> u64 {
    1
}

impl Default for ScatterSpec {
    fn default() -> Self {
        ScatterSpec {
            thickness_mm: 0.0,
            width_mm: 0.0,
            free_length_mm: 0.0,
            mount_radius_mm: 0.0,
            modulus_percent: 0.0,
            friction: None,
            distribution: DistributionKind::Normal3Sigma,
            samples: default_samples(),
            seed: default_seed(),
        }
    }
}

/// Most samples one run takes.
pub const MAX_SAMPLES: u64 = 1_000_000;

/// Largest modulus tolerance, percent (normal draws reach twice it).
pub const MAX_MODULUS_PERCENT: f64 = 25.0;

/// Normal draws beyond this many standard deviations are drawn again, so every sample
/// lies within twice the tolerance (a truncation the statistics cannot see: 2e-9 of the
/// mass).
pub const NORMAL_BOUND_SD: f64 = 6.0;

/// Redraws before a draw is clamped to its bound (each redraw is rarer than 1 in 700
/// for any range the checks accept).
const MAX_REDRAWS: usize = 64;

/// One sample's inputs: per-strip deviations from the design, mm, in strip order, the hub
/// and material deviations, and the friction coefficient itself.
#[derive(Clone, Debug, PartialEq)]
pub struct SampleInputs {
    /// Thickness deviation of each strip, mm.
    pub thickness_mm: Vec<f64>,
    /// Width deviation of each strip, mm.
    pub width_mm: Vec<f64>,
    /// Free-length deviation of each strip, mm.
    pub free_length_mm: Vec<f64>,
    /// Mount-radius deviation, mm.
    pub mount_radius_mm: f64,
    /// Factor on Young's modulus (1: nominal).
    pub modulus_factor: f64,
    /// Friction coefficient.
    pub friction: f64,
}

impl SampleInputs {
    /// No deviation on `strips` strips, at friction `friction`.
    pub fn centre(strips: usize, friction: f64) -> SampleInputs {
        SampleInputs {
            thickness_mm: vec![0.0; strips],
            width_mm: vec![0.0; strips],
            free_length_mm: vec![0.0; strips],
            mount_radius_mm: 0.0,
            modulus_factor: 1.0,
            friction,
        }
    }

    /// Whether every strip has the same deviations (the centred model is then exact).
    pub fn strips_alike(&self) -> bool {
        let same = |v: &[f64]| v.windows(2).all(|w| w[0] == w[1]);
        same(&self.thickness_mm) && same(&self.width_mm) && same(&self.free_length_mm)
    }

    /// The deviations `(thickness, width, free length)` of strip `i`, mm.
    pub fn strip(&self, i: usize) -> (f64, f64, f64) {
        (
            self.thickness_mm[i],
            self.width_mm[i],
            self.free_length_mm[i],
        )
    }

    /// These inputs with one input moved by `delta` (mm, modulus factor, or friction).
    pub fn moved(&self, input: Input, delta: f64) -> SampleInputs {
        let mut x = self.clone();
        match input {
            Input::Thickness(i) => x.thickness_mm[i] += delta,
            Input::Width(i) => x.width_mm[i] += delta,
            Input::FreeLength(i) => x.free_length_mm[i] += delta,
            Input::MountRadius => x.mount_radius_mm += delta,
            Input::Modulus => x.modulus_factor += delta,
            Input::Friction => x.friction += delta,
        }
        x
    }
}

/// One scalar input of the law of propagation: per-strip inputs are separate inputs.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Input {
    /// Thickness of strip `i`.
    Thickness(usize),
    /// Width of strip `i`.
    Width(usize),
    /// Free length of strip `i`.
    FreeLength(usize),
    /// Mount radius.
    MountRadius,
    /// Modulus factor.
    Modulus,
    /// Friction coefficient.
    Friction,
}

impl Input {
    /// Whether the input belongs to one strip (thickness, width or free length).
    pub fn per_strip(self) -> bool {
        matches!(
            self,
            Input::Thickness(_) | Input::Width(_) | Input::FreeLength(_)
        )
    }
}

/// A file-level tolerance, as the sensitivities name it: per-strip ones move every strip
/// together.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Tolerance {
    /// `thickness_mm`.
    Thickness,
    /// `width_mm`.
    Width,
    /// `free_length_mm`.
    FreeLength,
    /// `mount_radius_mm`.
    MountRadius,
    /// `modulus_percent`.
    Modulus,
    /// `friction`.
    Friction,
}

impl Tolerance {
    /// Every tolerance, in the order of the file and of the outputs.
    pub const ALL: [Tolerance; 6] = [
        Tolerance::Thickness,
        Tolerance::Width,
        Tolerance::FreeLength,
        Tolerance::MountRadius,
        Tolerance::Modulus,
        Tolerance::Friction,
    ];

    /// The field name in the scatter section (the `input` of the sensitivities).
    pub fn name(self) -> &'static str {
        match self {
            Tolerance::Thickness => "thickness_mm",
            Tolerance::Width => "width_mm",
            Tolerance::FreeLength => "free_length_mm",
            Tolerance::MountRadius => "mount_radius_mm",
            Tolerance::Modulus => "modulus_percent",
            Tolerance::Friction => "friction",
        }
    }

    /// The scalar inputs this tolerance moves, for `strips` strips.
    pub fn inputs(self, strips: usize) -> Vec<Input> {
        match self {
            Tolerance::Thickness => (0..strips).map(Input::Thickness).collect(),
            Tolerance::Width => (0..strips).map(Input::Width).collect(),
            Tolerance::FreeLength => (0..strips).map(Input::FreeLength).collect(),
            Tolerance::MountRadius => vec![Input::MountRadius],
            Tolerance::Modulus => vec![Input::Modulus],
            Tolerance::Friction => vec![Input::Friction],
        }
    }
}

/// A tolerance read as a symmetric distribution about a centre.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Spread {
    /// Centre of the distribution (0 for deviations, 1 for the modulus factor, the
    /// middle of the friction range).
    pub centre: f64,
    /// Half-width of the tolerance, in the input's unit.
    pub half_width: f64,
    /// Standard uncertainty `u` of the distribution.
    pub standard_uncertainty: f64,
    /// Bound of every draw: `[lo, hi]`.
    pub bounds: (f64, f64),
}

impl ScatterSpec {
    /// Refuses negative, non-finite or oversized values (a clear line naming the field
    /// and the allowed range). Whether the design still loads at the ends of the draws is
    /// checked against the design, by [`super::run_model`].
    pub fn validate(&self) -> Result<(), ScatterError> {
        for (field, value) in [
            ("thickness_mm", self.thickness_mm),
            ("width_mm", self.width_mm),
            ("free_length_mm", self.free_length_mm),
            ("mount_radius_mm", self.mount_radius_mm),
        ] {
            if !(value.is_finite() && value >= 0.0) {
                return Err(ScatterError::OutOfRange {
                    field,
                    value,
                    allowed: "0 mm or more (a tolerance, plus or minus)".to_string(),
                });
            }
        }
        let m = self.modulus_percent;
        if !(m.is_finite() && (0.0..=MAX_MODULUS_PERCENT).contains(&m)) {
            return Err(ScatterError::OutOfRange {
                field: "modulus_percent",
                value: m,
                allowed: format!("0 to {MAX_MODULUS_PERCENT} percent"),
            });
        }
        if let Some((lo, hi)) = self.friction {
            let (fmin, fmax) = friction_limits();
            for (field, value) in [("friction.min", lo), ("friction.max", hi)] {
                if !(value.is_finite() && value >= fmin && value <= fmax) {
                    return Err(ScatterError::OutOfRange {
                        field,
                        value,
                        allowed: format!("{fmin} to {fmax}, as the design's friction"),
                    });
                }
            }
            if lo > hi {
                return Err(ScatterError::OutOfRange {
                    field: "friction.min",
                    value: lo,
                    allowed: format!("at most friction.max = {hi}"),
                });
            }
        }
        if !(1..=MAX_SAMPLES).contains(&self.samples) {
            return Err(ScatterError::OutOfRange {
                field: "samples",
                value: self.samples as f64,
                allowed: format!("1 to {MAX_SAMPLES}, whole"),
            });
        }
        Ok(())
    }

    /// The distribution of one tolerance; `design_friction` is the centre when the file
    /// gives no friction range.
    pub fn spread(&self, tolerance: Tolerance, design_friction: f64) -> Spread {
        let (centre, half_width, field_bounds) = match tolerance {
            Tolerance::Thickness => (0.0, self.thickness_mm, None),
            Tolerance::Width => (0.0, self.width_mm, None),
            Tolerance::FreeLength => (0.0, self.free_length_mm, None),
            Tolerance::MountRadius => (0.0, self.mount_radius_mm, None),
            Tolerance::Modulus => (1.0, self.modulus_percent / 100.0, None),
            Tolerance::Friction => match self.friction {
                Some((lo, hi)) => (0.5 * (lo + hi), 0.5 * (hi - lo), Some(friction_limits())),
                None => (design_friction, 0.0, None),
            },
        };
        let (u, reach) = match self.distribution {
            DistributionKind::Normal3Sigma => {
                (half_width / 3.0, half_width / 3.0 * NORMAL_BOUND_SD)
            }
            DistributionKind::Uniform => (half_width / 3.0_f64.sqrt(), half_width),
        };
        let mut bounds = (centre - reach, centre + reach);
        if let Some((fmin, fmax)) = field_bounds {
            bounds = (bounds.0.max(fmin), bounds.1.min(fmax));
        }
        Spread {
            centre,
            half_width,
            standard_uncertainty: u,
            bounds,
        }
    }

    /// The tolerances that scatter (non-zero), in [`Tolerance::ALL`] order.
    pub fn active(&self) -> Vec<Tolerance> {
        Tolerance::ALL
            .into_iter()
            .filter(|&t| self.spread(t, 0.0).half_width > 0.0)
            .collect()
    }

    /// The inputs of sample `index` for `strips` strips. Its random stream is the ChaCha20
    /// stream number `index` under the key expanded from the seed, so it depends on
    /// `(seed, index)` alone. Draw order, fixed: for each strip thickness, width, free
    /// length; then mount radius, modulus, friction. Every draw is made, tolerance or not.
    pub fn draw(&self, strips: usize, design_friction: f64, index: u64) -> SampleInputs {
        let mut rng = ChaCha20Rng::seed_from_u64(self.seed);
        rng.set_stream(index);
        let s = |t| self.spread(t, design_friction);
        let (th, wi, fl) = (
            s(Tolerance::Thickness),
            s(Tolerance::Width),
            s(Tolerance::FreeLength),
        );
        let mut x = SampleInputs::centre(0, design_friction);
        for _ in 0..strips {
            x.thickness_mm.push(self.one(&mut rng, &th));
            x.width_mm.push(self.one(&mut rng, &wi));
            x.free_length_mm.push(self.one(&mut rng, &fl));
        }
        x.mount_radius_mm = self.one(&mut rng, &s(Tolerance::MountRadius));
        x.modulus_factor = self.one(&mut rng, &s(Tolerance::Modulus));
        x.friction = self.one(&mut rng, &s(Tolerance::Friction));
        x
    }

    /// One draw from a spread, redrawn while outside its bounds (at most
    /// `MAX_REDRAWS` times, then clamped).
    fn one(&self, rng: &mut ChaCha20Rng, spread: &Spread) -> f64 {
        let mut v = spread.centre;
        for _ in 0..MAX_REDRAWS {
            v = match self.distribution {
                DistributionKind::Normal3Sigma => {
                    spread.centre + spread.standard_uncertainty * standard_normal(rng)
                }
                DistributionKind::Uniform => {
                    spread.centre + spread.half_width * (2.0 * unit_uniform(rng) - 1.0)
                }
            };
            if v >= spread.bounds.0 && v <= spread.bounds.1 {
                return v;
            }
        }
        v.clamp(spread.bounds.0, spread.bounds.1)
    }
}

/// A uniform draw from `[0, 1)`: the top 53 bits of the next 64-bit word.
fn unit_uniform(rng: &mut ChaCha20Rng) -> f64 {
    (rng.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
}

/// A standard normal draw by the polar method (G. Marsaglia and T. A. Bray, "A
/// convenient method for generating normal variables", SIAM Review 6 (1964) 260-264): a
/// point uniform in the unit disc, `z = u sqrt(-2 ln s / s)`. The pair's second value is
/// not kept, so each draw's words are fixed by its place in the stream. The acceptance
/// rate is pi/4; after 64 rejections in a row (odds below 1e-42) it gives 0.
fn standard_normal(rng: &mut ChaCha20Rng) -> f64 {
    for _ in 0..64 {
        let u = 2.0 * unit_uniform(rng) - 1.0;
        let v = 2.0 * unit_uniform(rng) - 1.0;
        let s = u * u + v * v;
        if s > 0.0 && s < 1.0 {
            return u * (-2.0 * s.ln() / s).sqrt();
        }
    }
    0.0
}

/// The design file's friction range.
fn friction_limits() -> (f64, f64) {
    design::limit("friction").map_or((0.01, 2.0), |l| (l.min, l.max))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ron_options() -> ron::Options {
        ron::Options::default().with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
    }

    #[test]
    fn defaults_of_the_contract() {
        // The project's contract: every tolerance optional (0), Normal3Sigma, 10,000
        // samples, seed 1.
        let s: ScatterSpec = ron_options()
            .from_str("(thickness_mm: 0.01)")
            .expect("parses");
        assert_eq!(s.thickness_mm, 0.01);
        assert_eq!(s.width_mm, 0.0);
        assert_eq!(s.friction, None);
        assert_eq!(s.distribution, DistributionKind::Normal3Sigma);
        assert_eq!((s.samples, s.seed), (10_000, 1));
        let full: ScatterSpec = ron_options()
            .from_str(
                "(thickness_mm: 0.01, width_mm: 0.05, free_length_mm: 0.2, mount_radius_mm: 0.05, \
                 modulus_percent: 3.0, friction: (0.2, 0.4), distribution: Uniform, \
                 samples: 500, seed: 7)",
            )
            .expect("parses");
        assert_eq!(full.friction, Some((0.2, 0.4)));
        assert_eq!(full.distribution, DistributionKind::Uniform);
        assert!(
            ron_options()
                .from_str::<ScatterSpec>("(thicknes_mm: 0.01)")
                .is_err()
        );
    }

    #[test]
    fn standard_uncertainties() {
        // JCGM 100:2008 4.3.7: a rectangular distribution of half-width a has u = a/sqrt(3);
        // the normal reading puts the tolerance at 3 u (common practice).
        let mut s = ScatterSpec {
            thickness_mm: 0.03,
            friction: Some((0.2, 0.5)),
            ..ScatterSpec::default()
        };
        let t = s.spread(Tolerance::Thickness, 0.3);
        assert!((t.standard_uncertainty - 0.01).abs() < 1e-15);
        assert!((t.bounds.1 - 0.06).abs() < 1e-15);
        let f = s.spread(Tolerance::Friction, 0.3);
        assert!((f.centre - 0.35).abs() < 1e-15 && (f.standard_uncertainty - 0.05).abs() < 1e-15);
        s.distribution = DistributionKind::Uniform;
        let t = s.spread(Tolerance::Thickness, 0.3);
        assert!((t.standard_uncertainty - 0.03 / 3.0_f64.sqrt()).abs() < 1e-15);
        assert_eq!(t.bounds, (-0.03, 0.03));
    }

    #[test]
    fn normal_and_uniform_draws_have_their_moments() {
        // Common practice: the sample mean of n draws lies within 4 standard errors of the
        // true mean, and the sample variance within 4 sqrt(2/n) (normal) of its value;
        // a uniform on [0, 1) has mean 1/2 and variance 1/12.
        let mut rng = ChaCha20Rng::seed_from_u64(5);
        let n = 20_000;
        let z: Vec<f64> = (0..n).map(|_| standard_normal(&mut rng)).collect();
        let mean = z.iter().sum::<f64>() / n as f64;
        let var = z.iter().map(|x| (x - mean) * (x - mean)).sum::<f64>() / (n - 1) as f64;
        assert!(mean.abs() < 4.0 / (n as f64).sqrt(), "{mean}");
        assert!((var - 1.0).abs() < 4.0 * (2.0 / n as f64).sqrt(), "{var}");
        let r: Vec<f64> = (0..n).map(|_| unit_uniform(&mut rng)).collect();
        let mean = r.iter().sum::<f64>() / n as f64;
        assert!(
            (mean - 0.5).abs() < 4.0 * (1.0 / 12.0 / n as f64).sqrt(),
            "{mean}"
        );
        assert!(r.iter().all(|&x| (0.0..1.0).contains(&x)));
    }

    #[test]
    fn refuses_bad_values_with_the_range() {
        // Common practice: a clear line naming the field and the allowed range.
        let s = ScatterSpec {
            thickness_mm: -0.01,
            ..ScatterSpec::default()
        };
        let e = s.validate().expect_err("negative tolerance").to_string();
        assert!(
            e.contains("scatter.thickness_mm") && e.contains("0 mm or more"),
            "{e}"
        );
        let s = ScatterSpec {
            friction: Some((0.5, 0.2)),
            ..ScatterSpec::default()
        };
        assert!(s.validate().is_err());
        let s = ScatterSpec {
            samples: 0,
            ..ScatterSpec::default()
        };
        assert!(
            s.validate()
                .expect_err("no samples")
                .to_string()
                .contains("samples")
        );
    }
}
