//! Scatter with unequal strips through load sharing: the near path (states and strokes
//! found from the nominal design's) against the full load-sharing solve on seeded shop
//! samples, unloaded and loaded; a hand-checkable pair of unequal opposite strips (force
//! balance); zero tolerances on a loaded design give its nominal checks.

use bowgrip::checks::{self, MarginUnit};
use bowgrip::design::{self, Design};
use bowgrip::scatter::{
    self, DistributionKind, MarginModel, Outcome, SampleInputs, ScatterSpec, SharedModel,
};
use bowgrip::segment::Segment;
use bowgrip::sharing::{Loading, StripDeviation};

fn twelve_strips() -> Design {
    let mut d = Design::default();
    d.strip.count = 12;
    d
}

fn drain() -> Design {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs/drain-crawler-horizontal-150mm.ron");
    design::load(&path).expect("the drain sample loads")
}

/// Shop tolerances (invented, of the size strip stock is bought to).
fn shop(samples: u64) -> ScatterSpec {
    ScatterSpec {
        thickness_mm: 0.005,
        width_mm: 0.05,
        free_length_mm: 0.2,
        mount_radius_mm: 0.05,
        modulus_percent: 3.0,
        friction: Some((0.25, 0.35)),
        distribution: DistributionKind::Normal3Sigma,
        samples,
        seed: 5,
    }
}

/// Agreement of the near path with the full solve, in each margin's unit. States: both
/// balance the hub to 1e-10 of the forces or better, so ratio margins agree to about that
/// (1e-7 leaves room for the strip solver's own rounding through the stress formulas).
/// Strokes (reach, stroke, top strip; mm): both find them to 1e-10 of the stroke, and
/// 2e-5 mm is a thousandth of the spread the shop tolerances give them.
fn tolerance(unit: MarginUnit) -> f64 {
    match unit {
        MarginUnit::Ratio => 1e-7,
        _ => 2e-5,
    }
}

/// How much later than the full solve the near path may put the segment's limit (the
/// `stroke` check), mm. The full solve judges each stroke on its own: near a strip's limit
/// it can find no trial hub offset with every strip short of its limit and report the
/// limit early, where the near path follows the balance along the stroke. That is seen on
/// an unloaded round bore, where turning every strip by half a pitch (the two clockings)
/// cannot change anything and the full solve's limits still differ by up to 5e-4 mm on
/// these samples. The near path is never earlier than the full solve (to the tolerance).
const FULL_SOLVE_EARLY_MM: f64 = 1e-3;

/// The near path and the full solve on `samples` seeded samples: every check's verdict
/// and margin (common practice: a fast path is held to the slow one it replaces).
fn near_matches_full(design: &Design, samples: u64) {
    let near = SharedModel::new(design).expect("valid");
    let full = SharedModel::exact(design).expect("valid");
    let spec = shop(samples);
    for i in 0..samples {
        let x: SampleInputs = spec.draw(near.strips(), near.design_friction(), i);
        assert!(!x.strips_alike(), "sample {i} has unequal strips");
        let a = near.evaluate(&x).expect("near path");
        let b = full.evaluate(&x).expect("full solve");
        for ((info, a), b) in near.checks().iter().zip(&a).zip(&b) {
            let what = format!("sample {i}, check {}: near {a:?}, full {b:?}", info.id);
            assert_eq!(a.margin.is_some(), b.margin.is_some(), "{what}");
            if let (Some(m), Some(n)) = (a.margin, b.margin) {
                let tol = tolerance(info.unit);
                if info.id == "stroke" {
                    assert!(m >= n - tol && m <= n + FULL_SOLVE_EARLY_MM, "{what}");
                } else {
                    assert!((m - n).abs() <= tol, "{what}");
                }
            }
            // The verdicts agree unless the margin is within the tolerance of zero.
            if a.margin.is_none_or(|m| m.abs() > tolerance(info.unit)) {
                assert_eq!(a.pass, b.pass, "{what}");
            }
        }
    }
    let (solved, _) = near.counts();
    assert!(solved > 0, "the near path solved states itself");
}

#[test]
fn near_path_matches_the_full_solve_on_an_unloaded_twelve_strip_design() {
    near_matches_full(&twelve_strips(), 16);
}

#[test]
fn near_path_matches_the_full_solve_on_the_loaded_drain_sample() {
    // Loaded (80 N), out of round, a bend, the top strips off the wall at the operating
    // stroke: strips meet and leave the wall from one sample to the next.
    near_matches_full(&drain(), 16);
}

#[test]
fn two_unequal_opposite_strips_balance_on_the_hub() {
    // Newton's first law on the hub (the mechanics note, "Load sharing": sum F_i u_i = W
    // with W = 0): four strips, the top one 0.01 mm thicker. The side strips push along the
    // horizontal and mirror each other, so the vertical balance leaves the top and bottom
    // contact forces equal in size; the thicker strip is stiffer, so the hub moves away
    // from it (down) until its gap grows enough.
    let mut d = Design::default();
    d.strip.count = 4;
    let seg = Segment::new(&d).expect("valid");
    let stroke = 1.8;
    let bore = seg.bore_nominal_mm;
    let mut deviations = vec![StripDeviation::default(); 4];
    deviations[0].thickness_mm = 0.01;
    let loading = Loading {
        deviations,
        ..Loading::default()
    };
    let unequal = seg
        .loaded_at_bore(bore, &loading)
        .expect("sets up")
        .state(stroke)
        .expect("solves");
    let centred = seg
        .loaded_at_bore(bore, &Loading::default())
        .expect("sets up")
        .state(stroke)
        .expect("solves");
    assert!(!unequal.beyond_limit && !centred.beyond_limit);
    let s = &unequal.strips;
    assert!((s[0].clock_deg - 0.0).abs() < 1e-9 && (s[2].clock_deg - 180.0).abs() < 1e-9);
    assert!(
        s.iter().all(|r| r.contact_force_n > 0.0),
        "every strip grips"
    );
    // Away from the thicker strip: down, and on the vertical line by symmetry.
    assert!(
        unequal.hub_offset_mm[0] < 0.0,
        "{:?}",
        unequal.hub_offset_mm
    );
    assert!(unequal.hub_offset_mm[1].abs() < 1e-9);
    // |F_top| = |F_bottom| to the solver's force tolerance.
    let (top, bottom) = (s[0].contact_force_n, s[2].contact_force_n);
    assert!((top - bottom).abs() <= 1e-9 * top, "{top} vs {bottom}");
    // The thicker strip's larger gap and the thinner one's smaller gap: their gaps
    // straddle the centred gap.
    let g = centred.strips[0].gap_mm;
    assert!(
        s[0].gap_mm > g && s[2].gap_mm < g,
        "{} {} {g}",
        s[0].gap_mm,
        s[2].gap_mm
    );
    // Each strip's stress lies between the centred segments of its own kind and of the
    // other kind (the thicker strip pushes less than a segment of thick strips would, the
    // thinner more than one of thin strips): the per-strip stresses straddle the centred
    // ones.
    let mut thick = d.clone();
    thick.strip.thickness_mm += 0.01;
    let thick_seg = Segment::new(&thick).expect("valid");
    let thick_centred = thick_seg
        .loaded_at_bore(bore, &Loading::default())
        .expect("sets up")
        .state(stroke)
        .expect("solves");
    let (lo, hi) = (
        centred.strips[0].max_stress_mpa,
        thick_centred.strips[0].max_stress_mpa,
    );
    let (lo, hi) = (lo.min(hi), lo.max(hi));
    for r in [&s[0], &s[2]] {
        assert!(
            r.max_stress_mpa > lo && r.max_stress_mpa < hi,
            "{} not within ({lo}, {hi})",
            r.max_stress_mpa
        );
    }
}

#[test]
fn zero_tolerances_on_a_loaded_design_give_its_nominal_checks() {
    // Common practice: with nothing scattering, every sample is the design itself, so each
    // check's percentiles are its nominal margin (`check --json`), load sharing included.
    let design = drain();
    let spec = ScatterSpec {
        samples: 3,
        ..ScatterSpec::default()
    };
    let nominal = checks::run(&Segment::new(&design).expect("valid"));
    let model = SharedModel::new(&design).expect("valid");
    let want: Vec<Outcome> = nominal.iter().map(Outcome::from).collect();
    for index in [0, 2] {
        let x = spec.draw(model.strips(), design.friction, index);
        assert_eq!(
            model.evaluate(&x).expect("evaluates"),
            want,
            "sample {index}"
        );
    }
    let report = scatter::run(&design, &spec).expect("runs");
    for (c, n) in report.checks.iter().zip(&nominal) {
        assert_eq!(c.id, n.id.as_str());
        if let Some(m) = n.margin {
            assert_eq!([c.margin_p01, c.margin_p50, c.margin_p99], [Some(m); 3]);
        }
    }
}
