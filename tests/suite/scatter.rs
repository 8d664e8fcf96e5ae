//! Scatter: the law of propagation and Monte Carlo (JCGM 100:2008, JCGM 101:2008), the
//! Wilson interval, reproducibility over thread counts and seeds, zero tolerances, the
//! worst-case corner, progress and cancel, and the contract's JSON keys.

use std::sync::atomic::{AtomicBool, Ordering};

use bowgrip::checks::{self, MarginUnit};
use bowgrip::design::Design;
use bowgrip::scatter::{
    self, CentredModel, CheckInfo, Control, DistributionKind, MarginModel, Outcome, SampleInputs,
    ScatterError, ScatterSpec, Z_95, wilson_interval,
};
use bowgrip::segment::{Segment, SegmentError};

/// A stroke well inside the free phase of the demo design at every bore it is judged at
/// (first contact there is past 1 mm of stroke; the `free_phase_stroke_is_free` test
/// holds it to that).
const FREE_STROKE_MM: f64 = 0.5;

/// The demo design with a thickness tolerance alone, normal at three sigma.
fn thickness_spec(tolerance_mm: f64, samples: u64) -> ScatterSpec {
    ScatterSpec {
        thickness_mm: tolerance_mm,
        samples,
        ..ScatterSpec::default()
    }
}

/// Every tolerance at once (invented shop values).
fn all_tolerances(distribution: DistributionKind, samples: u64) -> ScatterSpec {
    ScatterSpec {
        thickness_mm: 0.005,
        width_mm: 0.05,
        free_length_mm: 0.2,
        mount_radius_mm: 0.05,
        modulus_percent: 3.0,
        friction: Some((0.25, 0.35)),
        distribution,
        samples,
        seed: 11,
    }
}

/// A plug-in model whose one output is strip 0's axial force at [`FREE_STROKE_MM`] in
/// the nominal bore, N: the quantity of the GUM example in the project's method note.
struct FreeAxialForce {
    centred: CentredModel,
    checks: [CheckInfo; 1],
}

impl FreeAxialForce {
    fn new(design: &Design) -> Self {
        FreeAxialForce {
            centred: CentredModel::new(design).expect("valid design"),
            checks: [CheckInfo {
                id: "axial",
                unit: MarginUnit::Ratio,
            }],
        }
    }
}

impl MarginModel for FreeAxialForce {
    fn checks(&self) -> &[CheckInfo] {
        &self.checks
    }
    fn strips(&self) -> usize {
        self.centred.strips()
    }
    fn design_friction(&self) -> f64 {
        self.centred.design_friction()
    }
    fn evaluate(&self, x: &SampleInputs) -> Result<Vec<Outcome>, SegmentError> {
        let seg = self.centred.segment(x, x.strip(0))?;
        let state = seg.at_bore(seg.bore_nominal_mm)?.state(FREE_STROKE_MM);
        assert_eq!(state.phase, bowgrip::elastica::Phase::Free);
        Ok(vec![Outcome {
            pass: true,
            margin: state.axial_force_per_strip_n,
        }])
    }
}

fn free_phase_design() -> Design {
    Design {
        operating_stroke_mm: Some(FREE_STROKE_MM),
        ..Design::default()
    }
}

#[test]
fn free_phase_stroke_is_free() {
    // Precondition of the two propagation tests (mechanics note: below first contact the
    // strip is in the free phase): the chosen stroke is short of first contact at every
    // bore the checks use.
    let seg = Segment::new(&free_phase_design()).expect("valid");
    for bore in [
        seg.bore_smallest_mm,
        seg.bore_nominal_mm,
        seg.bore_largest_mm,
    ] {
        let fc = seg
            .at_bore(bore)
            .expect("fits")
            .first_contact_stroke_mm()
            .expect("reachable");
        assert!(
            fc > 2.0 * FREE_STROKE_MM,
            "first contact {fc} mm at {bore} mm"
        );
    }
}

#[test]
fn propagation_free_axial_force_goes_with_thickness_cubed() {
    // JCGM 100:2008, 5.1.2: u_P = |dP/dt| u_t. In the free phase P = p(delta/L) B / L^2
    // with B = E' b t^3 / 12, so u_P / P = 3 u_t / t (the method note's example). With the
    // tolerance at three sigma u_t = 0.01 / 3 mm on t = 0.25 mm.
    let design = free_phase_design();
    let model = FreeAxialForce::new(&design);
    let spec = thickness_spec(0.01, 10_000);
    let report = scatter::run_model(&model, &spec, Control::default()).expect("runs");
    let c = &report.checks[0];
    let p = c.centre.margin.expect("a force");
    let u_t = 0.01 / 3.0;
    let want = 3.0 * u_t / 0.25;
    let got = c.margin_sd_propagation.expect("propagated") / p;
    assert!(
        (got / want - 1.0).abs() < 1e-6,
        "u_P/P = {got}, 3 u_t/t = {want}"
    );
    // JCGM 101:2008, 7.6 and 8: for a small tolerance the Monte Carlo standard deviation
    // agrees with the law of propagation within its own sampling uncertainty; for a
    // normal output the sample sd has a standard deviation sigma / sqrt(2 (n - 1))
    // (common practice). Allow three of those.
    let mc = c.margin_sd_monte_carlo.expect("finite samples");
    let u_prop = c.margin_sd_propagation.expect("propagated");
    let sampling = u_prop / (2.0 * (report.samples as f64 - 1.0)).sqrt();
    assert!(
        (mc - u_prop).abs() < 3.0 * sampling,
        "Monte Carlo sd {mc} vs propagated {u_prop} (sampling sd {sampling})"
    );
}

#[test]
fn propagation_through_the_checks_treats_strips_as_separate_inputs() {
    // The actuator check at the operating stroke in the free phase: its effort goes with
    // the sum of the strips' axial forces, each with t_i^3, so 1 + m = rating / effort
    // and, with N strips drawn on their own, u_m / (1 + m) = 3 u_t / (t sqrt(N))
    // (JCGM 100:2008, 5.1.2, one input per strip; the method note: the spread of a sum
    // over strips shrinks by sqrt(N)).
    let design = free_phase_design();
    let spec = thickness_spec(0.01, 2_000);
    let report = scatter::run(&design, &spec).expect("runs");
    let act = report
        .checks
        .iter()
        .find(|c| c.id == "actuator")
        .expect("an actuator check");
    let one_plus_m = 1.0 + act.centre.margin.expect("a margin");
    let n = f64::from(design.strip.count);
    let want = 3.0 * (0.01 / 3.0) / (0.25 * n.sqrt());
    let got = act.margin_sd_propagation.expect("propagated") / one_plus_m;
    assert!((got / want - 1.0).abs() < 1e-6, "{got} vs {want}");
}

#[test]
fn wilson_interval_by_hand() {
    // E. B. Wilson, JASA 22 (1927) 209-212: (p + z^2/2n -+ z sqrt(p(1-p)/n + z^2/4n^2)) /
    // (1 + z^2/n), z = 1.959964 (the normal 0.975 quantile).
    // 0 failures in 10,000: the upper end is (z^2/n) / (1 + z^2/n) = 3.8415e-4 / 1.000384
    // = 3.8400e-4, the lower end 0.
    let [lo, hi] = wilson_interval(0, 10_000, Z_95);
    assert_eq!(lo, 0.0);
    assert!((hi - 3.8400e-4).abs() < 1e-8, "{hi}");
    // 5 failures in 100, by hand: p = 0.05, z^2 = 3.841459, z^2/n = 0.03841459,
    // centre = (0.05 + 0.01920729) / 1.03841459 = 0.0666470, half-width
    // = 1.959964 sqrt(0.000475 + 0.00009603647) / 1.03841459 = 0.0468360 / 1.03841459
    // = 0.0451034; so [0.021544, 0.111750].
    let [lo, hi] = wilson_interval(5, 100, Z_95);
    assert!((lo - 0.021544).abs() < 1e-6, "{lo}");
    assert!((hi - 0.111750).abs() < 1e-6, "{hi}");
}

#[test]
fn same_seed_same_numbers_on_one_and_two_threads() {
    // The method note: the same seed gives the same numbers on every thread count.
    let design = Design::default();
    let spec = all_tolerances(DistributionKind::Normal3Sigma, 600);
    let on = |threads| {
        rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .expect("a pool")
            .install(|| scatter::run(&design, &spec))
            .expect("runs")
    };
    let one = on(1);
    let two = on(2);
    assert_eq!(one, two);
    assert_eq!(one.to_json(), two.to_json());
    // A different seed gives different draws, so different percentiles.
    let other = scatter::run(&design, &ScatterSpec { seed: 12, ..spec }).expect("runs");
    assert_ne!(other.to_json(), one.to_json());
    let p50 =
        |r: &scatter::ScatterReport| r.checks.iter().map(|c| c.margin_p50).collect::<Vec<_>>();
    assert_ne!(p50(&other), p50(&one));
}

#[test]
fn zero_tolerances_give_the_nominal_design_in_every_sample() {
    // Common practice: with nothing scattering, every sample is the design itself, so
    // every percentile is its margin and the spread is zero.
    let design = Design::default();
    let spec = ScatterSpec {
        samples: 300,
        ..ScatterSpec::default()
    };
    let nominal = checks::run(&Segment::new(&design).expect("valid"));
    let model = CentredModel::new(&design).expect("valid");
    for index in [0, 1, 299, 12_345] {
        let x = spec.draw(model.strips(), design.friction, index);
        let got = model.evaluate(&x).expect("evaluates");
        let want: Vec<Outcome> = nominal.iter().map(Outcome::from).collect();
        assert_eq!(got, want, "sample {index}");
    }
    let report = scatter::run(&design, &spec).expect("runs");
    assert_eq!(report.checks.len(), nominal.len());
    for (c, n) in report.checks.iter().zip(&nominal) {
        assert_eq!(c.id, n.id.as_str());
        assert_eq!(c.failures, if n.pass { 0 } else { 300 });
        if let Some(m) = n.margin {
            assert_eq!([c.margin_p01, c.margin_p50, c.margin_p99], [Some(m); 3]);
            assert_eq!(c.margin_sd_monte_carlo, Some(0.0));
            assert_eq!(c.margin_sd_propagation, Some(0.0));
        }
    }
    assert!(report.sensitivities.is_empty());
}

#[test]
fn worst_case_corner_is_no_better_than_any_sample() {
    // The method note: the worst-case corner puts every input at the end of its tolerance
    // in the harmful direction; with draws bounded by the tolerance (uniform, JCGM
    // 100:2008 4.3.7) and margins monotonic over so small a box, no sample can be worse.
    let design = Design::default();
    let spec = all_tolerances(DistributionKind::Uniform, 1_000);
    let report = scatter::run(&design, &spec).expect("runs");
    for (w, c) in report.worst_case.iter().zip(&report.checks) {
        assert_eq!(w.id, c.id);
        assert!(
            w.outcome.value() <= c.margin_range.0,
            "{}: corner {:?} vs least sample {}",
            c.id,
            w.outcome,
            c.margin_range.0
        );
    }
    // And the corner is strictly worse than the centre where anything moves the check.
    let hold = report
        .worst_case
        .iter()
        .find(|w| w.id == "hold")
        .expect("hold");
    let centre = report.checks.iter().find(|c| c.id == "hold").expect("hold");
    assert!(hold.outcome.value() < centre.centre.value());
}

#[test]
fn sensitivities_follow_the_physics_and_the_strip_count() {
    // Holding force goes with B (so with t^3 and E) and with friction (mechanics note:
    // friction x N x F); thicker, stiffer and rougher all hold more. Per-strip inputs are
    // separate in the law of propagation, so for a quantity averaged over the strips the
    // propagated sd is the all-strips-together one over sqrt(N) (the method note;
    // JCGM 100:2008, 5.1.2): to first order, sd x sqrt(N) = |high - low| / 2 x u / a.
    let design = Design::default();
    let spec = all_tolerances(DistributionKind::Normal3Sigma, 300);
    let report = scatter::run(&design, &spec).expect("runs");
    let row = |input: &str, id: &str| {
        report
            .sensitivities
            .iter()
            .find(|s| s.input == input && s.id == id)
            .expect("a row")
            .clone()
    };
    for input in ["thickness_mm", "modulus_percent", "friction"] {
        let r = row(input, "hold");
        assert!(r.margin_high > r.margin_low, "{input}: {r:?}");
    }
    // Order: the file's tolerances, then the checks' order.
    let inputs: Vec<&str> = report.sensitivities.iter().map(|s| s.input).collect();
    assert_eq!(inputs.first(), Some(&"thickness_mm"));
    assert_eq!(inputs.last(), Some(&"friction"));
    assert_eq!(report.sensitivities.len(), 6 * report.checks.len());

    let only_t = scatter::run(&design, &thickness_spec(0.005, 50)).expect("runs");
    let hold = only_t.checks.iter().find(|c| c.id == "hold").expect("hold");
    let r = only_t
        .sensitivities
        .iter()
        .find(|s| s.id == "hold")
        .expect("a row");
    let together = (r.margin_high.expect("m") - r.margin_low.expect("m")).abs() / 2.0 / 3.0;
    let n = f64::from(design.strip.count);
    let per_strip = hold.margin_sd_propagation.expect("propagated") * n.sqrt();
    assert!(
        (per_strip / together - 1.0).abs() < 0.02,
        "{per_strip} vs {together}"
    );
}

#[test]
fn json_has_the_contract_keys_and_repeats_byte_for_byte() {
    // The project's contract, scatter bullet: samples, seed, checks (id, failures,
    // probability_of_failure, wilson_95, margin_p01/p50/p99, margin_sd_monte_carlo,
    // margin_sd_propagation), worst_case (id, margin), sensitivities (input, id,
    // margin_low, margin_high); the same file, samples and seed give the same bytes.
    let design = Design::default();
    let spec = all_tolerances(DistributionKind::Normal3Sigma, 300);
    let a = scatter::run(&design, &spec).expect("runs").to_json();
    let b = scatter::run(&design, &spec).expect("runs").to_json();
    assert_eq!(a, b);
    let v: serde_json::Value = serde_json::from_str(&a).expect("valid JSON");
    let keys = |v: &serde_json::Value| -> Vec<String> {
        let mut k: Vec<String> = v.as_object().expect("an object").keys().cloned().collect();
        k.sort();
        k
    };
    let sorted = |list: &[&str]| {
        let mut k: Vec<String> = list.iter().map(|s| s.to_string()).collect();
        k.sort();
        k
    };
    assert_eq!(
        keys(&v),
        sorted(&["samples", "seed", "checks", "worst_case", "sensitivities"])
    );
    assert_eq!(v["samples"], 300);
    assert_eq!(v["seed"], 11);
    assert_eq!(
        keys(&v["checks"][0]),
        sorted(&[
            "id",
            "failures",
            "probability_of_failure",
            "wilson_95",
            "margin_p01",
            "margin_p50",
            "margin_p99",
            "margin_sd_monte_carlo",
            "margin_sd_propagation",
        ])
    );
    assert_eq!(
        v["checks"][0]["wilson_95"].as_array().map(Vec::len),
        Some(2)
    );
    assert_eq!(keys(&v["worst_case"][0]), sorted(&["id", "margin"]));
    assert_eq!(
        keys(&v["sensitivities"][0]),
        sorted(&["input", "id", "margin_low", "margin_high"])
    );
    // Keys in the contract's order in the text itself.
    let at = |k: &str| a.find(&format!("\"{k}\"")).expect("key present");
    assert!(at("samples") < at("seed") && at("seed") < at("checks"));
    assert!(at("checks") < at("worst_case") && at("worst_case") < at("sensitivities"));
}

#[test]
fn progress_gives_a_first_estimate_and_cancel_stops() {
    // Common practice for a background job: an early partial result, then the whole;
    // a raised flag stops the run with no report.
    let design = Design::default();
    let spec = all_tolerances(DistributionKind::Normal3Sigma, 600);
    let mut seen = Vec::new();
    let mut record = |r: &scatter::ScatterReport| seen.push(r.samples);
    let report = scatter::run_with(
        &design,
        &spec,
        Control {
            cancel: None,
            progress: Some(&mut record),
        },
    )
    .expect("runs");
    assert_eq!(seen, vec![scatter::FIRST_CHUNK as u64, 600]);
    assert_eq!(report.samples, 600);

    let flag = AtomicBool::new(false);
    let mut stop = |_: &scatter::ScatterReport| flag.store(true, Ordering::Relaxed);
    let err = scatter::run_with(
        &design,
        &ScatterSpec {
            samples: 3_000,
            ..spec
        },
        Control {
            cancel: Some(&flag),
            progress: Some(&mut stop),
        },
    )
    .expect_err("cancelled");
    assert!(matches!(err, ScatterError::Cancelled));
}

#[test]
fn too_wide_a_tolerance_is_refused_in_one_line() {
    // Project rule: bad input gets one line saying what, where and the allowed range.
    // A thickness tolerance of 0.2 mm on 0.25 mm, read at three sigma, has draws reaching
    // twice the tolerance, 0.25 - 0.4 = -0.15 mm, which the design file refuses.
    let design = Design::default();
    let err = scatter::run(&design, &thickness_spec(0.2, 10)).expect_err("refused");
    let text = err.to_string();
    assert!(matches!(
        err,
        ScatterError::TooWide {
            field: "thickness_mm",
            ..
        }
    ));
    assert!(
        text.contains("scatter.thickness_mm") && text.contains("strip.thickness_mm"),
        "{text}"
    );
    assert!(!text.contains('\n'));
    let err = scatter::run(
        &design,
        &ScatterSpec {
            modulus_percent: 40.0,
            ..ScatterSpec::default()
        },
    )
    .expect_err("refused");
    assert!(err.to_string().contains("0 to 25 percent"), "{err}");
}
