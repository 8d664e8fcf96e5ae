//! Bench data and calibration: the least-squares engine on NIST's reference datasets, the
//! recovery of known factors from synthetic bench data, malformed measurement files, the
//! sample bench file, and the `compare` command.
//!
//! Sources:
//! - NIST Statistical Reference Datasets (StRD), nonlinear regression: the `.dat` files in
//!   `tests/reference/nist/` (copies of NIST's files, see the README there), parsed here;
//!   certified parameters and standard deviations come from the files themselves.
//! - Synthetic data: made by the model with known factors plus seeded normal noise; the
//!   expectations are those of least squares with normal errors (an estimate lies within
//!   two standard errors of the truth in about 95 % of cases; standard errors go as
//!   `1 / sqrt(n)`; common practice, e.g. JCGM 100:2008 and any regression text).

use std::fs;
use std::path::{Path, PathBuf};

use assert_cmd::Command;
use bowgrip::bench_data::{self, BenchData, Measurement, Quantity};
use bowgrip::calibrate::{self, CalibrationError, Factor, Factors, Residuals};
use bowgrip::design::{self, Design};

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

// ---------------------------------------------------------------------------------------
// NIST StRD.

/// One NIST StRD nonlinear-regression file.
struct Nist {
    starts: [Vec<f64>; 2],
    certified: Vec<f64>,
    certified_sd: Vec<f64>,
    certified_ssr: f64,
    x: Vec<f64>,
    y: Vec<f64>,
}

fn numbers(line: &str) -> Vec<f64> {
    line.split_whitespace()
        .filter_map(|w| w.parse::<f64>().ok())
        .collect()
}

/// Reads the parameter lines (`b1 = start1 start2 certified sd`), the residual sum of
/// squares and the data block (`y x` pairs after the second line starting `Data:`).
fn read_nist(name: &str) -> Nist {
    let path = root()
        .join("tests/reference/nist")
        .join(format!("{name}.dat"));
    let text = fs::read_to_string(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    let mut starts = [Vec::new(), Vec::new()];
    let (mut certified, mut certified_sd) = (Vec::new(), Vec::new());
    let mut certified_ssr = f64::NAN;
    let (mut x, mut y) = (Vec::new(), Vec::new());
    let mut data_headers = 0;
    for line in text.lines() {
        let t = line.trim();
        if t.starts_with("Data:") {
            data_headers += 1;
            continue;
        }
        if data_headers >= 2 {
            let v = numbers(t);
            if v.len() == 2 {
                y.push(v[0]);
                x.push(v[1]);
            }
            continue;
        }
        if let Some(rest) = t.strip_prefix("Residual Sum of Squares:") {
            certified_ssr = numbers(rest)[0];
        }
        let is_param = t.starts_with('b') && t.contains('=');
        if is_param {
            let v = numbers(t.split_once('=').map_or("", |p| p.1));
            assert_eq!(v.len(), 4, "{name}: parameter line {t:?}");
            starts[0].push(v[0]);
            starts[1].push(v[1]);
            certified.push(v[2]);
            certified_sd.push(v[3]);
        }
    }
    assert!(!x.is_empty() && certified_ssr.is_finite(), "{name}: parsed");
    Nist {
        starts,
        certified,
        certified_sd,
        certified_ssr,
        x,
        y,
    }
}

/// `y - f(b, x)` for one of NIST's model functions.
struct NistModel<'a> {
    data: &'a Nist,
    f: fn(&[f64], f64) -> f64,
}

impl Residuals for NistModel<'_> {
    fn residuals(&self, b: &[f64]) -> Option<Vec<f64>> {
        Some(
            self.data
                .x
                .iter()
                .zip(&self.data.y)
                .map(|(&x, &y)| y - (self.f)(b, x))
                .collect(),
        )
    }
}

/// Fits a dataset from both of NIST's starting points and holds the results to the
/// certified values: parameters to 6 significant digits, standard deviations to 3
/// (relative differences of at most 1e-6 and 1e-3; the StRD's "log relative error"
/// measure, NIST StRD nonlinear regression background notes), residual sum of squares to 6.
fn check_nist(name: &str, f: fn(&[f64], f64) -> f64) {
    let data = read_nist(name);
    let model = NistModel { data: &data, f };
    for (k, start) in data.starts.iter().enumerate() {
        let fit = calibrate::least_squares(&model, start, None)
            .unwrap_or_else(|e| panic!("{name} from start {}: {e}", k + 1));
        for i in 0..start.len() {
            let (p, c) = (fit.params[i], data.certified[i]);
            assert!(
                ((p - c) / c).abs() <= 1e-6,
                "{name} start {}: b{} = {p:e}, certified {c:e}",
                k + 1,
                i + 1
            );
            let (s, cs) = (fit.standard_errors[i], data.certified_sd[i]);
            assert!(
                ((s - cs) / cs).abs() <= 1e-3,
                "{name} start {}: sd(b{}) = {s:e}, certified {cs:e}",
                k + 1,
                i + 1
            );
        }
        let ssr = fit.residual_sum_of_squares;
        assert!(
            ((ssr - data.certified_ssr) / data.certified_ssr).abs() <= 1e-6,
            "{name} start {}: SSR {ssr:e}, certified {:e}",
            k + 1,
            data.certified_ssr
        );
    }
}

#[test]
fn nist_misra1a_lower_difficulty() {
    // NIST StRD Misra1a (lower difficulty): y = b1 (1 - exp(-b2 x)).
    check_nist("Misra1a", |b, x| b[0] * (1.0 - (-b[1] * x).exp()));
}

#[test]
fn nist_thurber_higher_difficulty() {
    // NIST StRD Thurber (higher difficulty): a cubic over a cubic in x.
    check_nist("Thurber", |b, x| {
        let (x2, x3) = (x * x, x * x * x);
        (b[0] + b[1] * x + b[2] * x2 + b[3] * x3) / (1.0 + b[4] * x + b[5] * x2 + b[6] * x3)
    });
}

#[test]
fn nist_eckerle4_higher_difficulty() {
    // NIST StRD Eckerle4 (higher difficulty): y = (b1/b2) exp(-((x - b3)/b2)^2 / 2).
    check_nist("Eckerle4", |b, x| {
        (b[0] / b[1]) * (-0.5 * ((x - b[2]) / b[1]).powi(2)).exp()
    });
}

// ---------------------------------------------------------------------------------------
// Synthetic bench data.

/// splitmix64 (S. Vigna's generator, common practice for seeding): reproducible on every
/// machine, and the Box-Muller transform for standard normal draws.
struct Noise(u64);

impl Noise {
    fn uniform(&mut self) -> f64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^= z >> 31;
        ((z >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }

    fn normal(&mut self) -> f64 {
        let (u, v) = (self.uniform(), self.uniform());
        (-2.0 * u.ln()).sqrt() * (2.0 * std::f64::consts::PI * v).cos()
    }
}

fn riser() -> Design {
    let path = root().join("sample-designs/riser-climber-2in-sch40.ron");
    design::load(&path).unwrap_or_else(|e| panic!("{}", e.in_file(&path)))
}

/// The factors the synthetic data (and the sample bench file) are made with.
fn truth(design: &Design) -> Factors {
    Factors {
        modulus_factor: 0.93,
        stroke_offset_mm: 0.12,
        free_length_mm: design.strip.free_length_mm - 2.5,
        friction: 0.36,
    }
}

/// Noise levels: diameter 0.02 mm, forces 1 N (invented bench resolution).
const SIGMA_DIAMETER_MM: f64 = 0.02;
const SIGMA_FORCE_N: f64 = 1.0;

/// A bore far larger than the segment: the strips never touch, as on a bench in free air.
const FREE_AIR_BORE_MM: f64 = 1000.0;

/// Synthetic rows, `per_block` strokes in each of two blocks: in free air (diameter and
/// pull) from 0.4 to 6 mm, and in the design's nominal bore (pull and slip force) from
/// 1.1 to 1.75 mm, between first contact (about 0.92 mm with these factors) and the
/// model's limit (about 1.8 mm). Values are the model's with `truth` applied plus
/// normal noise; with `noise = false` they are exact.
fn synthetic(design: &Design, per_block: usize, seed: u64, noise: bool) -> BenchData {
    let f = truth(design);
    let seg = calibrate::segment_with(design, &f).expect("truth segment");
    let mut rng = Noise(seed);
    let mut draw = |sigma: f64| if noise { sigma * rng.normal() } else { 0.0 };
    let mut rows = Vec::new();
    let free = seg.at_bore(FREE_AIR_BORE_MM).expect("free air");
    let bore = seg.at_bore(seg.bore_nominal_mm).expect("nominal bore");
    let step = |i: usize, a: f64, b: f64| a + (b - a) * i as f64 / (per_block - 1) as f64;
    for i in 0..per_block {
        let stroke = step(i, 0.4, 6.0);
        let s = free.state(stroke + f.stroke_offset_mm);
        assert_eq!(s.phase, bowgrip::elastica::Phase::Free, "stroke {stroke}");
        rows.push(Measurement {
            line: rows.len() + 2,
            stroke_mm: stroke,
            bore_mm: Some(FREE_AIR_BORE_MM),
            outer_diameter_mm: s.outer_diameter_mm.map(|v| v + draw(SIGMA_DIAMETER_MM)),
            actuator_force_n: s.actuator_force_n.map(|v| v + draw(SIGMA_FORCE_N)),
            slip_force_n: None,
        });
    }
    for i in 0..per_block {
        let stroke = step(i, 1.1, 1.75);
        let s = bore.state(stroke + f.stroke_offset_mm);
        assert!(
            s.contact_force_per_strip_n.is_some_and(|c| c > 0.0),
            "stroke {stroke}"
        );
        rows.push(Measurement {
            line: rows.len() + 2,
            stroke_mm: stroke,
            bore_mm: None,
            outer_diameter_mm: None,
            actuator_force_n: s.actuator_force_n.map(|v| v + draw(SIGMA_FORCE_N)),
            slip_force_n: s.holding_force_n.map(|v| v + draw(SIGMA_FORCE_N)),
        });
    }
    BenchData {
        rows,
        decimal_comma: false,
    }
}

#[test]
fn synthetic_data_without_noise_gives_the_factors_back() {
    // Exact data made with known factors: the fit must return them (to the iteration's
    // tolerance), and the residuals vanish.
    let d = riser();
    let data = synthetic(&d, 12, 1, false);
    let c = calibrate::calibrate(&d, &data, &Factor::ALL).expect("fit");
    let t = truth(&d);
    for f in &c.fitted {
        let want = t.get(f.factor);
        assert!(
            (f.value - want).abs() <= 1e-5 * want.abs().max(1.0),
            "{}: {} against {want}",
            f.factor,
            f.value
        );
    }
}

#[test]
fn synthetic_factors_are_recovered_within_two_standard_errors() {
    // Least squares with normal noise: each estimate within two standard errors of the
    // truth (95 % each; fixed seeds, so the outcome is reproducible). Three seeds.
    let d = riser();
    let t = truth(&d);
    for seed in [11, 12, 13] {
        let data = synthetic(&d, 20, seed, true);
        let c = calibrate::calibrate(&d, &data, &Factor::ALL)
            .unwrap_or_else(|e| panic!("seed {seed}: {e}"));
        assert_eq!(c.fitted.len(), 4);
        for f in &c.fitted {
            let want = t.get(f.factor);
            assert!(
                f.standard_error > 0.0 && (f.value - want).abs() <= 2.0 * f.standard_error,
                "seed {seed}: {} = {} +/- {}, truth {want}",
                f.factor,
                f.value,
                f.standard_error
            );
        }
        // The correlation matrix: unit diagonal, symmetric, entries within [-1, 1].
        for i in 0..4 {
            assert!((c.correlation[i][i] - 1.0).abs() < 1e-9);
            for j in 0..4 {
                assert!((c.correlation[i][j] - c.correlation[j][i]).abs() < 1e-9);
                assert!(c.correlation[i][j].abs() <= 1.0 + 1e-9);
            }
        }
    }
}

/// Keeps only one measured column of synthetic data.
fn only(data: &BenchData, q: Quantity) -> BenchData {
    BenchData {
        rows: data
            .rows
            .iter()
            .filter(|r| r.value(q).is_some())
            .map(|r| Measurement {
                outer_diameter_mm: (q == Quantity::OuterDiameter)
                    .then_some(r.outer_diameter_mm)
                    .flatten(),
                actuator_force_n: (q == Quantity::ActuatorForce)
                    .then_some(r.actuator_force_n)
                    .flatten(),
                slip_force_n: (q == Quantity::SlipForce)
                    .then_some(r.slip_force_n)
                    .flatten(),
                ..r.clone()
            })
            .collect(),
        decimal_comma: false,
    }
}

#[test]
fn standard_errors_shrink_as_one_over_root_n() {
    // Four times the points over the same strokes: about half the standard error
    // (1/sqrt(4)). One measured column per fit, so the standard error is s (J^T J)^-1/2
    // with one noise estimate s, which itself scatters by some 10 % at these counts,
    // hence the band. Stiffness, offset and length from the pulls; friction from the
    // pull-out forces (the other factors at their true values there).
    let d = riser();
    let (few, many) = (synthetic(&d, 15, 21, true), synthetic(&d, 60, 22, true));
    let pull = [Factor::Modulus, Factor::Offset, Factor::Length];
    let mut t = truth(&d);
    t.friction = d.friction;
    let mut with_truth = d.clone();
    with_truth.strip.free_length_mm = t.free_length_mm;
    for (q, fit, design) in [
        (Quantity::ActuatorForce, &pull[..], &d),
        (Quantity::SlipForce, &[Factor::Friction][..], &with_truth),
    ] {
        let a = calibrate::calibrate(design, &only(&few, q), fit).expect("15 a block");
        let b = calibrate::calibrate(design, &only(&many, q), fit).expect("60 a block");
        for (a, b) in a.fitted.iter().zip(&b.fitted) {
            let ratio = b.standard_error / a.standard_error;
            assert!(
                (0.4..=0.6).contains(&ratio),
                "{}: {} -> {} (ratio {ratio})",
                a.factor,
                a.standard_error,
                b.standard_error
            );
        }
    }
}

#[test]
fn factors_the_columns_cannot_tell_are_refused() {
    let d = riser();
    let data = synthetic(&d, 8, 3, true);
    // Diameters alone: the modulus does not change a shape (the model is displacement
    // driven, forces scale with E and shapes do not: Timoshenko and Gere, the elastica).
    let diameters_only = BenchData {
        rows: data
            .rows
            .iter()
            .filter(|r| r.outer_diameter_mm.is_some())
            .map(|r| Measurement {
                actuator_force_n: None,
                ..r.clone()
            })
            .collect(),
        decimal_comma: false,
    };
    assert!(matches!(
        calibrate::calibrate(&d, &diameters_only, &[Factor::Modulus]),
        Err(CalibrationError::NotIdentifiable {
            factor: Factor::Modulus,
            ..
        })
    ));
    assert!(matches!(
        calibrate::calibrate(&d, &diameters_only, &[Factor::Friction]),
        Err(CalibrationError::NotIdentifiable {
            factor: Factor::Friction,
            ..
        })
    ));
    // Slip forces alone: friction and modulus both scale them (slip = mu N F, F ~ E).
    let slip_only = BenchData {
        rows: data
            .rows
            .iter()
            .filter(|r| r.slip_force_n.is_some())
            .map(|r| Measurement {
                actuator_force_n: None,
                ..r.clone()
            })
            .collect(),
        decimal_comma: false,
    };
    assert!(matches!(
        calibrate::calibrate(&d, &slip_only, &[Factor::Modulus, Factor::Friction]),
        Err(CalibrationError::NotIdentifiable { .. })
    ));
    assert!(matches!(
        calibrate::calibrate(&d, &data, &[]),
        Err(CalibrationError::NothingToFit)
    ));
}

#[test]
fn nominal_factors_leave_the_model_as_it_is() {
    // Without calibration nothing changes: the nominal factors give the segment exactly
    // as `Segment::new` makes it (bit for bit), so every existing output stays.
    let d = riser();
    let seg = bowgrip::segment::Segment::new(&d).expect("segment");
    let same = calibrate::segment_with(&d, &Factors::nominal(&d)).expect("segment");
    assert_eq!(seg, same);
}

// ---------------------------------------------------------------------------------------
// The design field `calibration`.

/// The riser sample's text with a calibration line added before the closing parenthesis.
fn riser_text_with(calibration: &str) -> String {
    let path = root().join("sample-designs/riser-climber-2in-sch40.ron");
    let text = fs::read_to_string(&path).expect("read sample");
    let end = text.rfind(')').expect("closing parenthesis");
    format!("{}    {calibration},\n{}", &text[..end], &text[end..])
}

#[test]
fn calibration_field_round_trips_and_is_written_only_when_present() {
    // The contract: `calibration: Some((modulus_factor, stroke_offset_mm))`, each optional.
    let text = riser_text_with("calibration: Some((modulus_factor: 0.93, stroke_offset_mm: 0.12))");
    let d = design::parse(&text).unwrap_or_else(|e| panic!("{e}"));
    let c = d.calibration.expect("calibration read");
    assert_eq!((c.modulus_factor, c.stroke_offset_mm), (0.93, 0.12));
    let written = design::to_ron(&d).expect("writes");
    assert!(
        written.contains("calibration: Some((") && written.contains("modulus_factor: 0.93"),
        "{written}"
    );
    assert_eq!(design::parse(&written).expect("reads back"), d);
    // Each optional: the one left out takes its neutral value.
    let only_offset = design::parse(&riser_text_with(
        "calibration: Some((stroke_offset_mm: -0.3))",
    ))
    .expect("offset only");
    assert_eq!(only_offset.modulus_factor(), 1.0);
    assert_eq!(only_offset.stroke_offset_mm(), -0.3);
    // Absent: nothing written, so a file without it saves as it was.
    let plain = riser();
    assert_eq!(plain.calibration, None);
    assert!(
        !design::to_ron(&plain)
            .expect("writes")
            .contains("calibration")
    );
    // In place: a changed factor is replaced where it is written, the comments stay.
    let mut changed = d.clone();
    changed.calibration = Some(design::Calibration {
        modulus_factor: 0.95,
        ..c
    });
    let saved = design::save_text(Some(&text), &changed).expect("plans a save");
    assert!(!saved.loses_layout());
    assert!(saved.text().contains("// Sample design (invented)"));
    assert!(saved.text().contains("modulus_factor: 0.95"));
    assert_eq!(design::parse(saved.text()).expect("reads back"), changed);
    // Added to a file that has none: written after its last field, the comments stay.
    let original = fs::read_to_string(root().join("sample-designs/riser-climber-2in-sch40.ron"))
        .expect("read sample");
    let mut calibrated = riser();
    calibrated.calibration = Some(c);
    calibrated.friction = 0.37;
    let saved = design::save_text(Some(&original), &calibrated).expect("plans a save");
    assert!(!saved.loses_layout(), "{saved:?}");
    assert!(saved.text().contains("// Sample design (invented)"));
    assert!(saved.text().contains("friction: 0.37"));
    assert_eq!(design::parse(saved.text()).expect("reads back"), calibrated);
    // Taken out again: a structural change, the whole design is written (after a prompt).
    let removed = design::save_text(Some(saved.text()), &riser()).expect("plans a save");
    assert!(removed.loses_layout());
    assert_eq!(
        design::parse(removed.text())
            .expect("reads back")
            .calibration,
        None
    );
}

#[test]
fn calibration_values_outside_their_range_are_refused_where_written() {
    // The limits table's rows, printed in the message with the allowed range.
    for (line, field, range) in [
        (
            "calibration: Some((modulus_factor: 7.0))",
            "calibration.modulus_factor",
            "0.2 to 5",
        ),
        (
            "calibration: Some((stroke_offset_mm: -150.0))",
            "calibration.stroke_offset_mm",
            "-100 to 100 mm",
        ),
    ] {
        let text = riser_text_with(line);
        let e = design::parse(&text).expect_err("out of range");
        let (l, c) = e.position().unwrap_or_else(|| panic!("no position: {e}"));
        let at_line = text.lines().nth(l - 1).expect("line exists");
        assert!(
            at_line.contains(field.rsplit('.').next().unwrap_or(field)),
            "{e}"
        );
        assert!(c > 1, "{e}");
        let msg = e.to_string();
        assert!(msg.contains(field) && msg.contains(range), "{msg}");
        assert!(design::limit(field).is_some());
    }
    // An unknown name inside is refused too.
    assert!(design::parse(&riser_text_with("calibration: Some((stiffness: 1.0))")).is_err());
}

#[test]
fn a_calibrated_design_predicts_the_factor_adjusted_model() {
    // The design's modulus factor multiplies E: every force of the model scales by it
    // (the elastica is displacement driven, forces go as the bending stiffness B = E I:
    // Timoshenko and Gere, Theory of Elastic Stability, the elastica), shapes do not.
    let plain = riser();
    let factor = 0.93;
    let mut calibrated = plain.clone();
    calibrated.calibration = Some(design::Calibration {
        modulus_factor: factor,
        stroke_offset_mm: 0.12,
    });
    let a = bowgrip::analysis::analyse(&plain).expect("plain");
    let b = bowgrip::analysis::analyse(&calibrated).expect("calibrated");
    assert_eq!(a.curve.len(), b.curve.len());
    for (p, q) in a.curve.iter().zip(&b.curve) {
        assert_eq!(p.stroke_mm, q.stroke_mm);
        assert_eq!(p.outer_diameter_mm, q.outer_diameter_mm);
        for (x, y) in [
            (p.actuator_force_n, q.actuator_force_n),
            (p.holding_force_n, q.holding_force_n),
            (p.radial_force_n, q.radial_force_n),
        ] {
            if let (Some(x), Some(y)) = (x, y) {
                assert!((y - factor * x).abs() <= 1e-9 * x.abs().max(1.0), "{x} {y}");
            } else {
                assert_eq!(x.is_some(), y.is_some());
            }
        }
    }
    // The residuals of the calibrated design are those of the plain design with the same
    // factors given to the fit's model (measured stroke + offset = model stroke).
    let bench = bench_data::load(&root().join(SAMPLE_BENCH)).expect("sample bench file");
    let factors = Factors {
        modulus_factor: factor,
        stroke_offset_mm: 0.12,
        ..Factors::nominal(&plain)
    };
    assert_eq!(Factors::nominal(&calibrated), factors);
    let via_design = calibrate::residuals(&calibrated, &bench, &Factors::nominal(&calibrated))
        .expect("residuals");
    let via_factors = calibrate::residuals(&plain, &bench, &factors).expect("residuals");
    assert_eq!(via_design, via_factors);
    // And by hand: each prediction is the state of the scaled segment at stroke + offset.
    let seg = calibrate::segment_with(&plain, &factors).expect("segment");
    for q in &via_design {
        for p in &q.points {
            let s = seg
                .at_bore(p.bore_mm)
                .expect("path")
                .state(p.stroke_mm + 0.12);
            let want = match q.quantity {
                Quantity::OuterDiameter => s.outer_diameter_mm,
                Quantity::ActuatorForce => s.actuator_force_n,
                Quantity::SlipForce => s.holding_force_n,
            };
            assert_eq!(Some(p.predicted), want, "line {}", p.line);
        }
    }
    // Applying the factors as "apply" does: free length and friction into their own
    // fields, the other two into `calibration`.
    let applied = calibrate::design_with(&plain, &truth(&plain));
    assert_eq!(applied.strip.free_length_mm, truth(&plain).free_length_mm);
    assert_eq!(applied.friction, 0.36);
    assert_eq!(
        applied.calibration,
        Some(design::Calibration {
            modulus_factor: 0.93,
            stroke_offset_mm: 0.12
        })
    );
    assert_eq!(Factors::nominal(&applied), truth(&plain));
    applied.validate().expect("applied factors are in range");
}

// ---------------------------------------------------------------------------------------
// Malformed measurement files.

fn refused_at(text: &str) -> ((usize, usize), String) {
    match bench_data::parse(text) {
        Ok(_) => panic!("accepted: {text:?}"),
        Err(e) => (e.position().unwrap_or((0, 0)), e.to_string()),
    }
}

#[test]
fn malformed_measurement_files_are_refused_with_line_and_column() {
    // The issue: "Refuse a malformed file with line and column". Positions 1-based, in
    // characters.
    let cases: &[(&str, (usize, usize), &str)] = &[
        // An unknown column name, where it starts.
        ("stroke_mm, force\n1,2\n", (1, 12), "unknown column"),
        // No stroke column.
        ("outer_diameter_mm\n40\n", (1, 1), "stroke_mm"),
        // A repeated column.
        (
            "stroke_mm,slip_force_n,slip_force_n\n1,2,3\n",
            (1, 24),
            "twice",
        ),
        // A word where a number belongs (line 4 after a comment and a blank line).
        (
            "# log\nstroke_mm,actuator_force_n\n\n1.0,twelve\n",
            (4, 5),
            "not a number",
        ),
        // Too few fields: the column just past the last one.
        (
            "stroke_mm,outer_diameter_mm,actuator_force_n\n1.0,40.2\n",
            (2, 9),
            "expected 3 fields",
        ),
        // A decimal comma the file did not declare.
        (
            "stroke_mm,outer_diameter_mm\n1,5,40\n",
            (2, 5),
            "decimal comma",
        ),
        // A value out of its range, and a non-finite one.
        ("stroke_mm,slip_force_n\n-0.5,3\n", (2, 1), "allowed range"),
        ("stroke_mm,slip_force_n\n0.5,inf\n", (2, 5), "not a number"),
        // The directive after the header.
        (
            "stroke_mm,slip_force_n\n# decimal: comma\n1;2\n",
            (2, 1),
            "before the header",
        ),
        // Header only.
        ("stroke_mm,slip_force_n\n", (2, 1), "no data rows"),
    ];
    for (text, at, needle) in cases {
        let (pos, msg) = refused_at(text);
        assert_eq!(pos, *at, "{text:?}: {msg}");
        assert!(msg.contains(needle), "{text:?}: {msg:?} lacks {needle:?}");
    }
}

#[test]
fn oversized_and_non_regular_files_are_refused() {
    let dir = tempfile::tempdir().expect("temp dir");
    let big = dir.path().join("big.csv");
    let mut text = String::from("stroke_mm,slip_force_n\n");
    while (text.len() as u64) <= bench_data::MAX_FILE_BYTES {
        text.push_str("1.0,2.0\n");
    }
    fs::write(&big, &text).expect("write");
    assert!(matches!(
        bench_data::load(&big),
        Err(bench_data::BenchError::TooLarge { .. })
    ));
    assert!(matches!(
        bench_data::load(dir.path()),
        Err(bench_data::BenchError::NotAFile { .. })
    ));
}

// ---------------------------------------------------------------------------------------
// The sample bench file.

const SAMPLE_BENCH: &str = "sample-designs/riser-climber-2in-sch40.bench.csv";

/// The sample's text: the synthetic rows (8 strokes a block, seed 2026) as CSV, rounded
/// to the resolution of the invented bench (0.001 mm, 0.01 N).
fn sample_text(design: &Design) -> String {
    let t = truth(design);
    let data = synthetic(design, 8, 2026, true);
    let mut s = format!(
        "# Invented bench data for sample-designs/riser-climber-2in-sch40.ron, not a\n\
         # measurement. Made by bowgrip's model with known factors: modulus factor {},\n\
         # stroke offset {} mm, free length {} mm, friction {}; plus seeded normal noise\n\
         # (standard deviation {SIGMA_DIAMETER_MM} mm on diameters, {SIGMA_FORCE_N} N on forces;\n\
         # tests/suite/calibration.rs writes and checks it). Rows with bore_mm = {FREE_AIR_BORE_MM}\n\
         # stand for free air (calipers over the strips); the others are in the riser's\n\
         # nominal bore.\n\
         # Caution: loaded strips store energy and can snap, the end plates pinch fingers;\n\
         # test behind a guard, and follow local codes and licensed practice.\n\
         stroke_mm,outer_diameter_mm,actuator_force_n,slip_force_n,bore_mm\n",
        t.modulus_factor, t.stroke_offset_mm, t.free_length_mm, t.friction
    );
    let cell = |v: Option<f64>, d: usize| v.map(|v| format!("{v:.d$}")).unwrap_or_default();
    for r in &data.rows {
        s.push_str(&format!(
            "{:.3},{},{},{},{}\n",
            r.stroke_mm,
            cell(r.outer_diameter_mm, 3),
            cell(r.actuator_force_n, 2),
            cell(r.slip_force_n, 2),
            cell(r.bore_mm, 1),
        ));
    }
    s
}

#[test]
fn sample_bench_file_is_what_its_header_says() {
    // The header states the factors and the noise the file was made with; made again
    // here, every value agrees to within its rounding (half a unit of the last digit) and
    // a margin for changes in the solver's last digits. BOWGRIP_WRITE_SAMPLE=1 writes it.
    let d = riser();
    let want = sample_text(&d);
    let path = root().join(SAMPLE_BENCH);
    if std::env::var_os("BOWGRIP_WRITE_SAMPLE").is_some() {
        fs::write(&path, &want).expect("write sample");
    }
    let have = bench_data::load(&path).unwrap_or_else(|e| panic!("{}", e.in_file(&path)));
    let made = bench_data::parse(&want).expect("generated text parses");
    assert_eq!(have.rows.len(), made.rows.len());
    for (a, b) in have.rows.iter().zip(&made.rows) {
        for q in Quantity::ALL {
            match (a.value(q), b.value(q)) {
                (Some(x), Some(y)) => assert!((x - y).abs() <= 0.006, "line {}: {x} {y}", a.line),
                (x, y) => assert_eq!(x, y, "line {}", a.line),
            }
        }
    }
    let text = fs::read_to_string(&path).expect("read sample");
    assert!(text.contains("Invented") && text.contains("Caution:"));
}

// ---------------------------------------------------------------------------------------
// The command.

fn bowgrip() -> Command {
    Command::new(env!("CARGO_BIN_EXE_bowgrip"))
}

fn s(p: &Path) -> &str {
    p.to_str().expect("utf-8 path")
}

#[test]
fn compare_json_has_the_contract_keys() {
    // The contract: `fitted` ({value, standard_error} per factor key), `correlation`
    // (matrix in the order modulus, offset, length, friction), `residuals` ({rms, max,
    // points} per measured column).
    let design = root().join("sample-designs/riser-climber-2in-sch40.ron");
    let bench = root().join(SAMPLE_BENCH);
    let out = bowgrip()
        .args(["compare", s(&design), "--measured", s(&bench)])
        .args(["--fit", "friction,modulus", "--json"])
        .output()
        .expect("run");
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("one JSON object");
    let fitted = v["fitted"].as_object().expect("fitted");
    let keys: Vec<&str> = fitted.keys().map(String::as_str).collect();
    assert_eq!(keys.len(), 2);
    for key in ["modulus_factor", "friction"] {
        assert!(fitted[key]["value"].is_f64() && fitted[key]["standard_error"].is_f64());
    }
    assert_eq!(
        v["correlation_order"],
        serde_json::json!(["modulus_factor", "friction"])
    );
    let corr = v["correlation"].as_array().expect("matrix");
    assert_eq!(corr.len(), 2);
    for column in ["outer_diameter_mm", "actuator_force_n", "slip_force_n"] {
        let r = &v["residuals"][column];
        assert!(r["rms"].is_f64() && r["max"].is_f64(), "{column}: {r}");
        // Diameters and slip forces in one block of 8 rows each, pulls in both.
        let want = if column == "actuator_force_n" { 16 } else { 8 };
        assert_eq!(r["points"], want, "{column}");
    }
}

#[test]
fn compare_table_and_bad_input() {
    let design = root().join("sample-designs/riser-climber-2in-sch40.ron");
    let bench = root().join(SAMPLE_BENCH);
    let out = bowgrip()
        .args(["compare", s(&design), "--measured", s(&bench)])
        .output()
        .expect("run");
    assert_eq!(out.status.code(), Some(0));
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("outer_diameter_mm") && text.contains("Caution"),
        "{text}"
    );

    // Bad input: exit 2 and one line on stderr (the project's contract), naming the place.
    let dir = tempfile::tempdir().expect("temp dir");
    let bad = dir.path().join("bad.csv");
    fs::write(&bad, "stroke_mm,actuator_force_n\n1.0,x\n").expect("write");
    for args in [
        vec!["compare", s(&design), "--measured", s(&bad)],
        vec![
            "compare",
            s(&design),
            "--measured",
            s(&bench),
            "--fit",
            "stiffness",
        ],
        vec!["compare", s(&design), "--measured", s(dir.path())],
    ] {
        let out = bowgrip().args(&args).output().expect("run");
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
        assert!(out.stdout.is_empty(), "{args:?}");
        assert_eq!(err.lines().count(), 1, "{args:?}: {err}");
    }
    let out = bowgrip()
        .args(["compare", s(&design), "--measured", s(&bad)])
        .output()
        .expect("run");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("bad.csv:2:5:"), "{err}");

    // A calibrated design: the table names its calibration, and the residuals are those
    // of the model with it.
    let calibrated = dir.path().join("calibrated.ron");
    fs::write(
        &calibrated,
        riser_text_with("calibration: Some((modulus_factor: 0.93, stroke_offset_mm: 0.12))"),
    )
    .expect("write");
    let out = bowgrip()
        .args(["compare", s(&calibrated), "--measured", s(&bench), "--json"])
        .output()
        .expect("run");
    assert_eq!(out.status.code(), Some(0));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).expect("JSON");
    let d = design::load(&calibrated).expect("loads");
    let data = bench_data::load(&bench).expect("bench");
    let want = calibrate::residuals(&d, &data, &Factors::nominal(&d)).expect("residuals");
    for q in &want {
        let rms = v["residuals"][q.quantity.column()]["rms"]
            .as_f64()
            .expect("rms");
        let exact = q.summary().rms;
        assert!((rms - exact).abs() <= 1e-12 * exact, "{rms} {exact}");
    }
    let out = bowgrip()
        .args(["compare", s(&calibrated), "--measured", s(&bench)])
        .output()
        .expect("run");
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("calibration: modulus factor 0.93, stroke offset 0.12 mm"),
        "{text}"
    );
}

// ---------------------------------------------------------------------------------------
// The sheet's bench page.

/// All text of a PDF by lopdf, whitespace collapsed (as `sheet.rs` reads sheets).
fn pdf_text(pdf: &[u8]) -> String {
    let doc = lopdf::Document::load_mem(pdf).expect("the sheet parses as PDF");
    let pages: Vec<u32> = doc.get_pages().keys().copied().collect();
    let text = doc.extract_text(&pages).expect("text extracts");
    text.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// A number as the sheet prints it: fixed decimals, a true minus sign.
fn printed(v: f64, decimals: usize) -> String {
    format!("{v:.decimals$}").replace('-', "\u{2212}")
}

/// A signed number as the sheet prints it: `+1.039`, `\u{2212}0.026`.
fn printed_signed(v: f64, decimals: usize) -> String {
    format!("{v:+.decimals$}").replace('-', "\u{2212}")
}

#[test]
fn sheet_with_measurements_prints_the_bench_page_and_its_residuals() {
    let design_path = root().join("sample-designs/riser-climber-2in-sch40.ron");
    let bench = root().join(SAMPLE_BENCH);
    let dir = tempfile::tempdir().expect("temp dir");
    let out = dir.path().join("sheet.pdf");
    let run = bowgrip()
        .args([
            "sheet",
            s(&design_path),
            "-o",
            s(&out),
            "--measured",
            s(&bench),
        ])
        .args(["--fit", "modulus,friction"])
        .output()
        .expect("run");
    assert_eq!(
        run.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&run.stderr)
    );
    let text = pdf_text(&fs::read(&out).expect("sheet written"));
    assert!(
        text.contains(bowgrip::sheet::BENCH_TITLE),
        "the page is there"
    );
    // The residuals of calibrate, printed to 3 decimals with their unit, and where.
    let d = riser();
    let data = bench_data::load(&bench).expect("bench");
    let before = calibrate::residuals(&d, &data, &Factors::nominal(&d)).expect("residuals");
    let fit = calibrate::calibrate(&d, &data, &[Factor::Modulus, Factor::Friction]).expect("fit");
    for q in &before {
        let sm = q.summary();
        let unit = q.quantity.unit();
        for want in [
            format!("{} {unit}", printed(sm.rms, 3)),
            format!("{} {unit}", printed_signed(sm.max_signed, 3)),
            format!(
                "line {}, stroke {}",
                sm.max_line,
                printed(sm.max_stroke_mm, 3)
            ),
        ] {
            assert!(text.contains(&want), "sheet lacks {want:?}");
        }
    }
    for f in &fit.fitted {
        assert!(
            text.contains(&printed(f.value, 5)),
            "sheet lacks {} {}",
            f.factor,
            f.value
        );
    }
    assert!(text.contains("Caution"));

    // Without --measured, no such page; a malformed file is refused (exit 2, one line).
    let plain = dir.path().join("plain.pdf");
    let run = bowgrip()
        .args(["sheet", s(&design_path), "-o", s(&plain)])
        .output()
        .expect("run");
    assert_eq!(run.status.code(), Some(0));
    assert!(!pdf_text(&fs::read(&plain).expect("written")).contains(bowgrip::sheet::BENCH_TITLE));
    let bad = dir.path().join("bad.csv");
    fs::write(&bad, "stroke_mm,actuator_force_n\n1.0,x\n").expect("write");
    let refused = dir.path().join("refused.pdf");
    let run = bowgrip()
        .args([
            "sheet",
            s(&design_path),
            "-o",
            s(&refused),
            "--measured",
            s(&bad),
        ])
        .output()
        .expect("run");
    let err = String::from_utf8_lossy(&run.stderr);
    assert_eq!(run.status.code(), Some(2), "{err}");
    assert!(err.contains("bad.csv:2:5:"), "{err}");
    assert!(!refused.exists(), "nothing written");

    // A calibrated design's sheet says so, with the modulus the model used; a design
    // without calibration prints no such section.
    let mut calibrated = d.clone();
    calibrated.calibration = Some(design::Calibration {
        modulus_factor: 0.93,
        stroke_offset_mm: 0.12,
    });
    let pdf = bowgrip::sheet::render(&calibrated, "c.ron", b"c", bowgrip::sheet::Paper::A4)
        .expect("renders");
    let text = pdf_text(&pdf);
    let e_used = bowgrip::segment::Segment::new(&calibrated)
        .expect("segment")
        .modulus_pa
        * 1e-9;
    assert!(text.contains(bowgrip::sheet::CALIBRATION_TITLE));
    assert!(text.contains("Modulus factor 0.9300"), "{text}");
    assert!(
        text.contains(&format!("E' = {:.1} GPa", e_used)),
        "{e_used}"
    );
    let pdf =
        bowgrip::sheet::render(&d, "d.ron", b"d", bowgrip::sheet::Paper::A4).expect("renders");
    assert!(!pdf_text(&pdf).contains(bowgrip::sheet::CALIBRATION_TITLE));
}
