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

// ---------------------------------------------------------------------------------------
// The design file's scatter section, the `scatter` command, the sheet and the app.

/// A design file with a commented scatter section (invented shop values).
const WITH_SCATTER: &str = r#"// Demo with the shop's tolerances.
Design(
    format: 1,
    title: "Demo with tolerances",
    strip: (count: 10, free_length_mm: 90.0, width_mm: 12.0, thickness_mm: 0.25,
        material: Grade("ss301-full-hard")),
    mount_radius_mm: 27.0,
    end_plate_diameter_mm: 56.0,
    bore: (diameter_mm: 70.0, minus_mm: 0.3, plus_mm: 0.3),
    friction: 0.3,
    actuator: LeadScrew(lead_mm: 1.0, efficiency: 0.3, max_torque_nm: 0.8, max_turns: 8.0),
    operating_stroke_mm: 1.8,
    duty: (holding_force_n: 20.0, safety_factor: 2.0, cycles: 10000),
    scatter: Some((
        thickness_mm: 0.005, // stock tolerance, keep this comment
        modulus_percent: 3.0,
        friction: (0.25, 0.35),
        samples: 300,
        seed: 5,
    )),
)
"#;

#[test]
fn the_scatter_section_reads_with_defaults_and_saves_in_place() {
    // The project's contract: every tolerance optional (0), Normal3Sigma, samples and
    // seed as given; written only when present; an in-place save keeps the comments.
    let d = bowgrip::design::parse(WITH_SCATTER).unwrap_or_else(|e| panic!("{e}"));
    let spec = d.scatter.clone().unwrap_or_else(|| panic!("no scatter"));
    assert_eq!(spec.thickness_mm, 0.005);
    assert_eq!(spec.width_mm, 0.0);
    assert_eq!(spec.friction, Some((0.25, 0.35)));
    assert_eq!(spec.distribution, DistributionKind::Normal3Sigma);
    assert_eq!((spec.samples, spec.seed), (300, 5));
    // Nominal results do not depend on it.
    let mut plain = d.clone();
    plain.scatter = None;
    let seg = |d: &Design| checks::run(&Segment::new(d).unwrap_or_else(|e| panic!("{e}")));
    assert_eq!(seg(&d), seg(&plain));
    // Written only when present.
    let text = bowgrip::design::to_ron(&plain).unwrap_or_else(|e| panic!("{e}"));
    assert!(!text.contains("scatter"), "{text}");
    let text = bowgrip::design::to_ron(&d).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(bowgrip::design::parse(&text).ok(), Some(d.clone()));
    // An edited tolerance goes in place.
    let mut edited = d.clone();
    if let Some(s) = edited.scatter.as_mut() {
        s.thickness_mm = 0.01;
    }
    let saved =
        bowgrip::design::save_text(Some(WITH_SCATTER), &edited).unwrap_or_else(|e| panic!("{e}"));
    assert!(!saved.loses_layout());
    assert!(
        saved
            .text()
            .contains("thickness_mm: 0.01, // stock tolerance, keep this comment")
    );
    assert_eq!(bowgrip::design::parse(saved.text()).ok(), Some(edited));
}

#[test]
fn a_bad_scatter_value_is_refused_at_its_line_and_column() {
    // Project rule 5: what was wrong, where (line:column), and the allowed range.
    let bad = WITH_SCATTER.replace("modulus_percent: 3.0", "modulus_percent: 40.0");
    let e = bowgrip::design::parse(&bad).expect_err("refused");
    let line = bad
        .lines()
        .position(|l| l.contains("modulus_percent"))
        .map(|i| i + 1);
    assert_eq!(e.position().map(|p| p.0), line, "{e}");
    let text = e.to_string();
    assert!(
        text.contains("scatter.modulus_percent") && text.contains("0 to 25 percent"),
        "{text}"
    );
    let bad = WITH_SCATTER.replace("friction: (0.25, 0.35)", "friction: (0.35, 0.25)");
    let e = bowgrip::design::parse(&bad).expect_err("refused");
    assert!(e.position().is_some(), "{e}");
    assert!(e.to_string().contains("scatter.friction"), "{e}");
    let bad = WITH_SCATTER.replace("samples: 300", "samples: 0");
    let e = bowgrip::design::parse(&bad).expect_err("refused");
    assert!(e.to_string().contains("1 to 1000000"), "{e}");
}

fn bowgrip_cli(args: &[&str]) -> (Option<i32>, Vec<u8>, String) {
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_bowgrip"))
        .args(args)
        .output()
        .unwrap_or_else(|e| panic!("{e}"));
    (
        out.status.code(),
        out.stdout,
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

#[test]
fn scatter_command_prints_the_contract_json_byte_for_byte() {
    // The project's contract: `bowgrip scatter FILE [--samples N] [--seed S] --json`,
    // the same file, samples and seed give byte-identical output; the numbers are the
    // library's run of the file's section.
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let file = dir.path().join("tol.ron");
    std::fs::write(&file, WITH_SCATTER).unwrap_or_else(|e| panic!("{e}"));
    let f = file.to_str().unwrap_or_else(|| panic!("path"));
    let args = ["scatter", f, "--samples", "200", "--seed", "9", "--json"];
    let (code, a, err) = bowgrip_cli(&args);
    assert_eq!(code, Some(0), "{err}");
    let (_, b, _) = bowgrip_cli(&args);
    assert_eq!(a, b, "same file, samples and seed: same bytes");
    let d = bowgrip::design::parse(WITH_SCATTER).unwrap_or_else(|e| panic!("{e}"));
    let spec = ScatterSpec {
        samples: 200,
        seed: 9,
        ..d.scatter.clone().unwrap_or_default()
    };
    let want = scatter::run(&d, &spec)
        .unwrap_or_else(|e| panic!("{e}"))
        .to_json();
    assert_eq!(String::from_utf8_lossy(&a).trim_end(), want);
    let (_, other, _) = bowgrip_cli(&["scatter", f, "--samples", "200", "--seed", "10", "--json"]);
    assert_ne!(a, other, "another seed, other numbers");
    // The file's own samples and seed without options.
    let (_, own, _) = bowgrip_cli(&["scatter", f, "--json"]);
    let v: serde_json::Value = serde_json::from_slice(&own).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(
        (v["samples"].as_u64(), v["seed"].as_u64()),
        (Some(300), Some(5))
    );
    // CSV: a header and one row per check; tables for people carry the caution.
    let (code, csv, _) = bowgrip_cli(&["scatter", f, "--samples", "50", "--csv"]);
    assert_eq!(code, Some(0));
    let csv = String::from_utf8_lossy(&csv).to_string();
    assert_eq!(csv.lines().next(), Some(scatter::command::CSV_COLUMNS));
    assert_eq!(
        csv.lines().count(),
        1 + checks::run(&Segment::new(&d).unwrap_or_else(|e| panic!("{e}"))).len()
    );
    let (code, table, _) = bowgrip_cli(&["scatter", f, "--samples", "50"]);
    assert_eq!(code, Some(0));
    let table = String::from_utf8_lossy(&table).to_string();
    assert!(
        table.contains("P(fail)") && table.contains("Caution"),
        "{table}"
    );
}

#[test]
fn scatter_command_refusals_exit_2_with_one_line() {
    // README: bad input exits 2 with one line saying what and the allowed range.
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let plain = dir.path().join("plain.ron");
    std::fs::write(
        &plain,
        bowgrip::design::to_ron(&Design::default()).unwrap_or_default(),
    )
    .unwrap_or_else(|e| panic!("{e}"));
    let (code, out, err) = bowgrip_cli(&["scatter", plain.to_str().unwrap_or(""), "--json"]);
    assert_eq!(code, Some(2), "{err}");
    assert!(out.is_empty());
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(
        err.contains("no scatter section") && err.contains("scatter: Some(("),
        "{err}"
    );
    let file = dir.path().join("tol.ron");
    std::fs::write(&file, WITH_SCATTER).unwrap_or_else(|e| panic!("{e}"));
    let (code, _, err) = bowgrip_cli(&["scatter", file.to_str().unwrap_or(""), "--samples", "0"]);
    assert_eq!(code, Some(2), "{err}");
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(
        err.contains("samples") && err.contains("1 to 1000000"),
        "{err}"
    );
}

#[test]
fn the_sheet_has_a_scatter_section_when_the_file_has_tolerances() {
    // Issue #13: a sheet section for scatter; its numbers are the library's.
    use bowgrip::sheet::{self, Paper};
    let d = bowgrip::design::parse(WITH_SCATTER).unwrap_or_else(|e| panic!("{e}"));
    let mut plain = d.clone();
    plain.scatter = None;
    let title = "Scatter: the shop's tolerances";
    let without = sheet::layout_dated(&plain, "t.ron", b"t", Paper::A4, "2026-01-01")
        .unwrap_or_else(|e| panic!("{e}"));
    assert!(!without.sections.iter().any(|s| s.title == title));
    let laid = sheet::layout_dated(&d, "t.ron", b"t", Paper::A4, "2026-01-01")
        .unwrap_or_else(|e| panic!("{e}"));
    let Some(part) = laid.sections.iter().find(|s| s.title == title) else {
        panic!("no scatter section");
    };
    let report =
        scatter::run(&d, &d.scatter.clone().unwrap_or_default()).unwrap_or_else(|e| panic!("{e}"));
    let pages: Vec<usize> = laid
        .sections
        .iter()
        .filter(|s| s.title == title)
        .map(|s| s.page)
        .collect();
    let texts: Vec<&str> = laid
        .texts
        .iter()
        .filter(|t| pages.contains(&t.page))
        .map(|t| t.text.as_str())
        .collect();
    let hold = report
        .checks
        .iter()
        .find(|c| c.id == "hold")
        .unwrap_or_else(|| panic!("hold"));
    let p50 = scatter::command::margin_text(hold.margin_p50, hold.unit);
    assert!(texts.contains(&p50.as_str()), "{p50} not in {texts:?}");
    assert!(part.page >= 1);
    let [left, _, right, _] = laid.printable_pt;
    for t in laid.texts.iter().filter(|t| pages.contains(&t.page)) {
        assert!(
            t.left_pt >= left - 0.5 && t.right_pt <= right + 0.5,
            "{:?}",
            t.text
        );
    }
}

#[test]
fn the_app_scatter_window_runs_off_the_ui_thread_and_edits_are_undoable() {
    // Issue #13: the app runs the scatter off the UI thread and shows the library's
    // report for the design on show; adding tolerances is one undoable edit.
    use bowgrip::app::{Command, Gesture, GripApp};
    use egui_kittest::Harness;
    use egui_kittest::kittest::Queryable;
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = Harness::builder()
        .with_size([1500.0, 940.0])
        .build_ui_state(
            |ui, app: &mut GripApp| app.ui(ui),
            GripApp::new(state.path().to_path_buf(), None),
        );
    h.run();
    h.get_by_label("Tools").click();
    h.run();
    h.get_by_label("Scatter…").click();
    h.run_steps(2);
    assert!(h.state().scatter_view().open);
    let d0 = h.state().design().clone();
    h.get_by_label("Add tolerances").click();
    // The run starts on its worker, which asks for repaints: frames, not a settled UI.
    h.run_steps(2);
    assert!(
        h.state().design().scatter.is_some(),
        "one edit adds the section"
    );
    // Fewer samples, so a debug build finishes quickly.
    let mut d = h.state().design().clone();
    if let Some(s) = d.scatter.as_mut() {
        s.samples = 300;
        s.friction = Some((0.25, 0.35));
    }
    h.state_mut()
        .push(Command::Edit(Box::new(d.clone()), Gesture::Done));
    let mut done = false;
    for _ in 0..6000 {
        h.step();
        let app = h.state();
        if let Some(e) = app.scatter_view().error() {
            panic!("{e}");
        }
        if app.scatter_view().is_complete_for(app.design()) {
            done = true;
            break;
        }
        std::thread::sleep(std::time::Duration::from_millis(10));
    }
    assert!(done, "the run never completed");
    h.run();
    let want =
        scatter::run(&d, &d.scatter.clone().unwrap_or_default()).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(h.state().scatter_view().report(), Some(&want));
    assert!(h.query_by_label_contains("300 samples, seed 1").is_some());
    // Two undo steps: the sample count, then the section itself.
    for _ in 0..2 {
        h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
        h.run_steps(2);
    }
    assert_eq!(*h.state().design(), d0);
}
