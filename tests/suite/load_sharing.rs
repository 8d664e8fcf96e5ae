//! Load sharing and bends: the centred regression on the samples, the linear ring of springs,
//! the hub's force balance, the edge-contact gap in an ellipse, and the bend passage rule.

use std::f64::consts::PI;
use std::path::Path as FsPath;

use bowgrip::bend::{self, Bend};
use bowgrip::design::{self, Design};
use bowgrip::elastica::{Path, Phase};
use bowgrip::segment::Segment;
use bowgrip::sharing::{self, Clocking, Judge, Loading, MajorAxis, StripDeviation};

fn sample(name: &str) -> Design {
    let path = FsPath::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join(name);
    design::load(&path).expect("sample loads")
}

const SAMPLES: [&str; 3] = [
    "drain-crawler-anchor-100mm.ron",
    "duct-anchor-150mm-stainless.ron",
    "riser-climber-2in-sch40.ron",
];

fn close(a: f64, b: f64, rel: f64) -> bool {
    (a - b).abs() <= rel * b.abs().max(1e-300)
}

#[test]
fn no_load_round_equal_strips_is_the_centred_model() {
    // Regression (mechanics note, "Load sharing": with W = 0, a round bore and identical
    // strips d = 0 and every result equals the centred model exactly), on the three samples
    // at the three bores, for strokes across the whole path: the general solver to 1e-12,
    // the short-circuit exactly.
    for name in SAMPLES {
        let seg = Segment::new(&sample(name)).expect("sample is valid");
        for bore in [
            seg.bore_smallest_mm,
            seg.bore_nominal_mm,
            seg.bore_largest_mm,
        ] {
            let centred = seg.at_bore(bore).expect("fits");
            let loaded = seg.loaded_at_bore(bore, &Loading::default()).expect("fits");
            assert!(loaded.is_centred());
            let strokes = loaded.strokes().expect("strokes");
            assert_eq!(
                strokes.first_strip_contact_stroke_mm,
                centred.first_contact_stroke_mm()
            );
            assert_eq!(strokes.limit_stroke_mm, centred.limit_stroke_mm());
            let limit = centred.limit_stroke_mm();
            // Up to just short of the limit: the general solver's gap differs from the
            // centred one by rounding, so the limit itself may fall either side.
            for j in 0..=12 {
                let stroke = limit * (j as f64 / 12.0).min(1.0 - 1e-9);
                let want = centred.state(stroke);
                assert_eq!(loaded.segment_state(stroke).expect("state"), want);
                let general = loaded.solve_state(stroke).expect("solves");
                assert_eq!(general.hub_offset_mm, [0.0, 0.0], "{name} {bore} {stroke}");
                assert!(!general.beyond_limit);
                let t = &general.totals;
                let pairs = [
                    (t.actuator_force_n, want.actuator_force_n),
                    (t.radial_force_n, want.radial_force_n),
                    (t.holding_force_n, want.holding_force_n),
                    (t.max_stress_mpa, want.max_stress_mpa),
                    (t.static_safety_factor, want.static_safety_factor),
                    (t.fatigue_safety_factor, want.fatigue_safety_factor),
                    (t.mean_axial_force_per_strip_n, want.axial_force_per_strip_n),
                    (
                        t.mean_contact_force_per_strip_n,
                        want.contact_force_per_strip_n,
                    ),
                    (t.strain_energy_j, want.strain_energy_j),
                ];
                for (got, want) in pairs {
                    let want = want.expect("a state within the limit");
                    assert!(
                        (got - want).abs() <= 1e-12 * want.abs().max(1e-9),
                        "{name} {bore} {stroke}: {got} vs {want}"
                    );
                }
                for s in &general.strips {
                    assert!((s.gap_mm - want.gap_mm).abs() <= 1e-12 * want.gap_mm);
                    assert_eq!(s.phase, want.phase);
                    let f = want.contact_force_per_strip_n.expect("state");
                    assert!((s.contact_force_n - f).abs() <= 1e-12 * f.max(1e-9));
                    let p = want.axial_force_per_strip_n.expect("state");
                    assert!((s.axial_force_n - p).abs() <= 1e-12 * p.abs().max(1e-9));
                }
            }
        }
    }
}

/// An invented narrow-strip segment for the ring-of-springs check (a demo, not a product):
/// `count` strips 5 mm wide on a 27 mm mount radius in a 70 mm bore.
fn ring_design(count: u32) -> Design {
    let mut d = Design::default();
    d.strip.count = count;
    d.strip.width_mm = 5.0;
    d.strip.thickness_mm = 0.2;
    d.mount_radius_mm = 27.0;
    d.end_plate_diameter_mm = 56.0;
    d.bore.diameter_mm = 70.0;
    d
}

#[test]
fn small_load_follows_the_linear_ring_of_springs() {
    // Linear ring of springs (mechanics note, "Load sharing"; the load-distribution
    // analysis of rolling bearings, Harris and Kotzalas, Rolling Bearing Analysis, from
    // memory): every strip in contact, a small load W down (theta_W = 180 deg). Strip i's
    // gap closes by e cos(theta_i - theta_W) + (b / 2 rho) e |sin(theta_i - theta_W)|,
    // rho = sqrt(R^2 - b^2/4), so it gains k_g times that, k_g = -dF/dg by a central
    // difference of the strip solver. The balance gives
    // e = W / (k_g (sum c_i^2 + (b / 2 rho) sum |s_i| c_i)), c_i, s_i the cosine and sine
    // of theta_i - theta_W, with sum c_i^2 = N/2 for N >= 3. For even N the edge sum
    // vanishes (opposite strips cancel) and e = 2 W / (N k_g), the note's narrow-strip law.
    // For odd N it does not vanish (e.g. N = 3, a strip at the bottom: sum |s| c =
    // sqrt(3)/2), so the check there uses the balance with the edge sum written out.
    for count in 3..=24 {
        let d = ring_design(count);
        let seg = Segment::new(&d).expect("valid ring design");
        let bore = d.bore.diameter_mm;
        let centred = seg.at_bore(bore).expect("fits");
        let stroke = 0.5
            * (centred.first_contact_stroke_mm().expect("reach")
                + centred.line_contact_stroke_mm().expect("line contact"));
        let l = d.strip.free_length_mm;
        let unit = seg.bending_stiffness_nm2 / (l * 1e-3).powi(2);
        let force_at = |g: f64| {
            Path::new(d.strip.ends, g / l)
                .expect("gap")
                .state(stroke / l)
                .contact
                * unit
        };
        let g = seg.gap_mm(bore);
        let h = 1e-5 * g;
        let k_g = -(force_at(g + h) - force_at(g - h)) / (2.0 * h);
        let f0 = force_at(g);
        assert!(k_g > 0.0 && f0 > 0.0);
        let r = 0.5 * bore;
        let b = d.strip.width_mm;
        let beta = b / (2.0 * (r * r - 0.25 * b * b).sqrt());
        let n = f64::from(count);
        let e_target = 1e-5 * g;
        let w = 0.5 * n * k_g * e_target;
        for clocking in [Clocking::Strip, Clocking::Gap] {
            let loading = Loading {
                radial_load_n: w,
                clocking,
                ..Loading::default()
            };
            let loaded = seg.loaded_at_bore(bore, &loading).expect("fits");
            let st = loaded.state(stroke).expect("solves");
            assert!(!st.on_support && !st.beyond_limit);
            assert_eq!(st.totals.strips_in_contact, count as usize);
            let angles: Vec<f64> = st
                .strips
                .iter()
                .map(|s| s.clock_deg.to_radians() - PI)
                .collect();
            let sum_cc: f64 = angles.iter().map(|a| a.cos().powi(2)).sum();
            let sum_sc: f64 = angles.iter().map(|a| a.sin().abs() * a.cos()).sum();
            assert!((sum_cc - 0.5 * n).abs() < 1e-12);
            let e = w / (k_g * (sum_cc + beta * sum_sc));
            if count % 2 == 0 {
                assert!(close(e, 2.0 * w / (n * k_g), 1e-12));
            }
            let offset = -st.hub_offset_mm[0];
            assert!(
                close(offset, e, 1e-3),
                "N = {count} {clocking:?}: offset {offset} vs {e}"
            );
            assert!(st.hub_offset_mm[1].abs() <= 1e-9 * e);
            for (s, a) in st.strips.iter().zip(&angles) {
                let want = k_g * e * (a.cos() + beta * a.sin().abs());
                let got = s.contact_force_n - f0;
                assert!(
                    (got - want).abs() <= 1e-3 * 2.0 * w / n,
                    "N = {count} {clocking:?} strip at {}: {got} vs {want}",
                    s.clock_deg
                );
            }
        }
    }
}

/// Checks the hub's force balance and the support's sign at one state.
fn check_balance(st: &sharing::SharedState, w: f64, what: &str) {
    if st.beyond_limit {
        return;
    }
    // Mechanics note, "Load sharing": sum F_i u_i = W + S, W straight down.
    let mut f = [0.0, 0.0];
    for s in &st.strips {
        let a = s.clock_deg.to_radians();
        f[0] += s.contact_force_n * a.cos();
        f[1] += s.contact_force_n * a.sin();
    }
    let s = st.totals.support_reaction_n;
    let res = [f[0] + w - s[0], f[1] - s[1]];
    assert!(
        res[0].hypot(res[1]) <= 1e-9 * w,
        "{what}: residual {res:?} of load {w}"
    );
    // The support only pushes the hub away from the wall, towards the bore's centre.
    let d = st.hub_offset_mm;
    assert!(
        s[0] * d[0] + s[1] * d[1] <= 0.0,
        "{what}: support {s:?} pulls"
    );
    if !st.on_support {
        assert_eq!(s, [0.0, 0.0]);
    }
}

#[test]
fn force_balance_holds_and_the_support_never_pulls() {
    // Mechanics note, "Load sharing": the hub's equilibrium; the rest support acts only
    // pushing away from the wall. Residual below 1e-9 of the load at every reported state.
    let seg = Segment::new(&sample("drain-crawler-anchor-100mm.ron")).expect("valid");
    for bore in [seg.bore_smallest_mm, seg.bore_largest_mm] {
        for w in [20.0, 300.0, 3000.0] {
            for o in [0.0, 1.5] {
                for (clocking, major_axis) in sharing::cases(&Loading {
                    out_of_round_mm: o,
                    ..Loading::default()
                }) {
                    let loading = Loading {
                        radial_load_n: w,
                        out_of_round_mm: o,
                        major_axis,
                        clocking,
                        deviations: Vec::new(),
                    };
                    let loaded = seg.loaded_at_bore(bore, &loading).expect("fits");
                    let strokes = loaded.strokes().expect("strokes");
                    let limit = strokes.limit_stroke_mm;
                    let mut rested = false;
                    let mut carried = false;
                    for j in 0..=10 {
                        let stroke = limit * j as f64 / 10.0;
                        let st = loaded.state(stroke).expect("solves");
                        let what = format!(
                            "bore {bore} W {w} o {o} {clocking:?} {major_axis:?} stroke {stroke}"
                        );
                        check_balance(&st, w, &what);
                        assert!(!st.beyond_limit, "{what}");
                        rested |= st.on_support;
                        carried |= !st.on_support;
                    }
                    assert!(rested, "the relaxed segment rests on its rim");
                    let lift = strokes.lift_off_stroke_mm;
                    if let Some(lift) = lift {
                        assert!(carried);
                        assert!(lift >= strokes.first_strip_contact_stroke_mm.expect("reach"));
                        let after = loaded.state(lift).expect("solves");
                        assert!(!after.on_support, "lifted off at {lift}");
                    }
                }
            }
        }
    }
}

#[test]
fn edge_gap_is_the_intersection_with_the_ellipse() {
    // Mechanics note, "Load sharing": the gap is the least outward travel h at which an
    // outer-face edge d + (r_m + t/2 + h) u +/- (b/2) v lies on the ellipse with diameters
    // D + o/2 and D - o/2. Written out here: with p0 = d + (r_m + t/2) u +/- (b/2) v and
    // semi-axes A (along y), B (along z), (p0y + h uy)^2 / A^2 + (p0z + h uz)^2 / B^2 = 1,
    // i.e. qa h^2 + qb h + qc = 0 with qa = uy^2/A^2 + uz^2/B^2,
    // qb = 2 (p0y uy / A^2 + p0z uz / B^2), qc = p0y^2/A^2 + p0z^2/B^2 - 1; the outward root
    // (-qb + sqrt(qb^2 - 4 qa qc)) / (2 qa); the gap is the smaller over the two edges.
    let seg = Segment::new(&sample("drain-crawler-anchor-100mm.ron")).expect("valid");
    let s = &seg.design.strip;
    let face = seg.design.mount_radius_mm + 0.5 * s.thickness_mm;
    let half_b = 0.5 * s.width_mm;
    let bore = 100.0;
    for (o, axis) in [
        (0.0, MajorAxis::Vertical),
        (2.0, MajorAxis::Vertical),
        (2.0, MajorAxis::Horizontal),
        (7.5, MajorAxis::Horizontal),
    ] {
        let loading = Loading {
            out_of_round_mm: o,
            major_axis: axis,
            radial_load_n: 1.0,
            ..Loading::default()
        };
        let loaded = seg.loaded_at_bore(bore, &loading).expect("fits");
        let (big, small) = (0.5 * (bore + 0.5 * o), 0.5 * (bore - 0.5 * o));
        let (a, b) = match axis {
            MajorAxis::Vertical => (big, small),
            MajorAxis::Horizontal => (small, big),
        };
        for d in [[0.0, 0.0], [-3.0, 0.0], [1.2, -2.5], [-6.0, 4.0]] {
            let gaps = loaded.gaps_mm(d);
            for (gap, deg) in gaps.iter().zip(loaded.clock_deg()) {
                let th = deg.to_radians();
                let (u, v) = ([th.cos(), th.sin()], [-th.sin(), th.cos()]);
                let hand = [1.0, -1.0]
                    .map(|sign| {
                        let p0 = [
                            d[0] + face * u[0] + sign * half_b * v[0],
                            d[1] + face * u[1] + sign * half_b * v[1],
                        ];
                        let qa = u[0] * u[0] / (a * a) + u[1] * u[1] / (b * b);
                        let qb = 2.0 * (p0[0] * u[0] / (a * a) + p0[1] * u[1] / (b * b));
                        let qc = p0[0] * p0[0] / (a * a) + p0[1] * p0[1] / (b * b) - 1.0;
                        (-qb + (qb * qb - 4.0 * qa * qc).sqrt()) / (2.0 * qa)
                    })
                    .into_iter()
                    .fold(f64::INFINITY, f64::min);
                assert!(
                    (gap - hand).abs() < 1e-9,
                    "o {o} {axis:?} d {d:?} strip at {deg}: {gap} vs {hand}"
                );
            }
        }
        if o == 0.0 {
            // Centred and round: the mechanics note's sqrt(R^2 - b^2/4) - t/2 - r_m.
            for gap in loaded.gaps_mm([0.0, 0.0]) {
                assert!((gap - seg.gap_mm(bore)).abs() < 1e-12);
            }
        }
    }
}

#[test]
fn weight_sags_the_hub_and_loads_the_bottom_strips() {
    // Mechanics note, "Load sharing" (and issue 17's description): under a weight the hub
    // sags (y < 0), the bottom strip presses harder than the top one, the strips lift the
    // hub off its rest after the first strip touches, and the last strip touches after
    // that. Ordering checks of the model's own statements (common practice of the trade).
    let seg = Segment::new(&sample("drain-crawler-anchor-100mm.ron")).expect("valid");
    let bore = seg.bore_largest_mm;
    let loading = Loading {
        radial_load_n: 40.0,
        ..Loading::default()
    };
    let loaded = seg.loaded_at_bore(bore, &loading).expect("fits");
    let strokes = loaded.strokes().expect("strokes");
    let first = strokes.first_strip_contact_stroke_mm.expect("reach");
    let lift = strokes.lift_off_stroke_mm.expect("lifts off");
    assert!(first < lift);
    if let Some(last) = strokes.last_strip_contact_stroke_mm {
        assert!(lift <= last && last <= strokes.limit_stroke_mm);
    }
    let centred = seg.at_bore(bore).expect("fits");
    assert!(first < centred.first_contact_stroke_mm().expect("reach"));
    let st = loaded
        .state(0.5 * (lift + strokes.limit_stroke_mm))
        .expect("state");
    assert!(st.hub_offset_mm[0] < 0.0);
    let bottom = st
        .strips
        .iter()
        .find(|s| (s.clock_deg - 180.0).abs() < 1e-9)
        .expect("a strip at the bottom");
    let top = st
        .strips
        .iter()
        .find(|s| s.clock_deg.abs() < 1e-9)
        .expect("a strip at the top");
    assert!(bottom.contact_force_n > top.contact_force_n);
    assert!(bottom.gap_mm < top.gap_mm);
    // The governing case by stress names a case and is at least as bad as each case.
    let g = sharing::governing(&seg, &loading, bore, st.stroke_mm, Judge::HighestStress)
        .expect("cases solve");
    assert!(g.reason.contains("governing case"));
    for (clocking, major_axis) in sharing::cases(&loading) {
        let case = Loading {
            clocking,
            major_axis,
            ..loading.clone()
        };
        let s = seg
            .loaded_at_bore(bore, &case)
            .expect("fits")
            .state(st.stroke_mm)
            .expect("state");
        assert!(s.totals.max_stress_mpa <= g.state.totals.max_stress_mpa);
    }
}

#[test]
fn bad_loading_is_refused_with_its_range() {
    // Project rule (common practice): bad input gives one line naming the field and range.
    let seg = Segment::new(&sample("drain-crawler-anchor-100mm.ron")).expect("valid");
    let bad = |l: Loading| {
        seg.loaded_at_bore(100.0, &l)
            .map(|_| ())
            .expect_err("refused")
            .to_string()
    };
    let msg = bad(Loading {
        radial_load_n: -1.0,
        ..Loading::default()
    });
    assert!(
        msg.contains("duty.radial_load_n") && msg.contains("0 to 10000000"),
        "{msg}"
    );
    let msg = bad(Loading {
        out_of_round_mm: 20.0,
        ..Loading::default()
    });
    assert!(
        msg.contains("bore.out_of_round_mm") && msg.contains("0 to 10"),
        "{msg}"
    );
    let msg = bad(Loading {
        deviations: vec![StripDeviation::default(); 3],
        ..Loading::default()
    });
    assert!(msg.contains("3 given for 8 strips"), "{msg}");
}

#[test]
fn bend_rule_against_hand_values() {
    // Mechanics note, "Bends": a rigid body passes while
    // (l_r/2)^2 + (R_b - D/2 + d_r)^2 <= (R_b + D/2)^2 (plane geometry, common practice);
    // elbow radii 1.5 x NPS (long) and 1.0 x NPS (short), ASME B16.9 (from memory).
    // Worked by hand: NPS 4 schedule 40, bore D = 114.3 - 2 x 6.02 = 102.26 mm (ASME
    // B36.10M), rigid length l_r = 150 + 2 x 5 = 160 mm, rim d_r = 80 mm.
    // Long radius: R_b = 1.5 x 4 x 25.4 = 152.4; R_b + D/2 = 203.53, squared 41424.4609;
    // minus 80^2 = 35024.4609, root 187.148232; minus R_b - D/2 = 101.27 gives the largest
    // rim 85.878232 mm: passes with 5.878232 mm to spare.
    // Short radius: R_b = 101.6; 152.73^2 = 23326.4529; minus 6400 = 16926.4529, root
    // 130.101702; minus 50.47 gives 79.631702 mm: an 80 mm rim jams, 0.368298 mm too big.
    let bore = 114.3 - 2.0 * 6.02;
    let long = bend::passage(Bend::LongRadius, Some("4"), bore, 80.0, 160.0).expect("judged");
    assert!(long.passes);
    assert!((long.centreline_radius_mm - 152.4).abs() < 1e-9);
    assert!((long.largest_rim_diameter_mm - 85.878232).abs() < 1e-6);
    assert!((long.margin_mm - 5.878232).abs() < 1e-6);
    let short = bend::passage(Bend::ShortRadius, Some("4"), bore, 80.0, 160.0).expect("judged");
    assert!(!short.passes);
    assert!((short.margin_mm + 0.368298).abs() < 1e-6);
    assert!(short.reason.contains("jams"));
    // A radius given in mm; an elbow by NPS without a pipe size is refused in one line.
    let by_mm = bend::passage(Bend::RadiusMm(152.4), None, bore, 80.0, 160.0).expect("judged");
    assert!((by_mm.margin_mm - long.margin_mm).abs() < 1e-12);
    let err = bend::passage(Bend::LongRadius, None, bore, 80.0, 160.0).expect_err("no NPS");
    assert!(err.to_string().contains("bore.bend"));
}

#[test]
fn unequal_strips_balance_by_nested_roots() {
    // Mechanics note, "Load sharing": the hub's equilibrium with unequal strips (a
    // two-component offset). Residual below 1e-9 of the load at every reported state, the
    // support only pushing. The deviations are invented (a few per cent of the strip).
    let seg = Segment::new(&sample("drain-crawler-anchor-100mm.ron")).expect("valid");
    let n = seg.design.strip.count as usize;
    let deviations: Vec<StripDeviation> = (0..n)
        .map(|i| StripDeviation {
            thickness_mm: [0.012, -0.008, 0.0, 0.015, -0.01, 0.004, -0.014, 0.009][i % 8],
            width_mm: [0.05, -0.1, 0.08, 0.0, -0.04, 0.1, 0.02, -0.06][i % 8],
            free_length_mm: [0.3, -0.2, 0.0, 0.1, -0.3, 0.25, -0.1, 0.05][i % 8],
        })
        .collect();
    let mut reported = 0;
    for bore in [seg.bore_smallest_mm, seg.bore_largest_mm] {
        for w in [20.0, 300.0] {
            for o in [0.0, 1.0] {
                let loading = Loading {
                    radial_load_n: w,
                    out_of_round_mm: o,
                    deviations: deviations.clone(),
                    ..Loading::default()
                };
                let loaded = seg.loaded_at_bore(bore, &loading).expect("fits");
                let limit = loaded.strokes().expect("strokes").limit_stroke_mm;
                for j in 0..=10 {
                    let stroke = limit * j as f64 / 10.0;
                    let st = loaded.state(stroke).expect("solves");
                    let what = format!("unequal: bore {bore} W {w} o {o} stroke {stroke}");
                    check_balance(&st, w, &what);
                    if !st.beyond_limit {
                        reported += 1;
                    }
                }
            }
        }
    }
    assert!(reported >= 60, "only {reported} states reported");
}

#[test]
fn nested_roots_agree_with_the_symmetric_solve() {
    // Cross-check of two independent solves of the same equilibrium (mechanics note, "Load
    // sharing"): a strip deviation far below the rounding of any output takes the general
    // two-component solve; it must land on the symmetric one-component answer.
    let seg = Segment::new(&sample("drain-crawler-anchor-100mm.ron")).expect("valid");
    let n = seg.design.strip.count as usize;
    let mut tiny = vec![StripDeviation::default(); n];
    tiny[1].thickness_mm = 1e-12;
    let bore = seg.bore_largest_mm;
    for w in [20.0, 300.0] {
        let base = Loading {
            radial_load_n: w,
            out_of_round_mm: 0.8,
            ..Loading::default()
        };
        let sym = seg.loaded_at_bore(bore, &base).expect("fits");
        let general = seg
            .loaded_at_bore(
                bore,
                &Loading {
                    deviations: tiny.clone(),
                    ..base.clone()
                },
            )
            .expect("fits");
        let limit = sym.strokes().expect("strokes").limit_stroke_mm;
        for j in 1..=9 {
            let stroke = limit * j as f64 / 10.0;
            let a = sym.state(stroke).expect("solves");
            let b = general.state(stroke).expect("solves");
            let what = format!("W {w} stroke {stroke}");
            assert_eq!(a.on_support, b.on_support, "{what}");
            for k in 0..2 {
                assert!(
                    (a.hub_offset_mm[k] - b.hub_offset_mm[k]).abs() <= 1e-6,
                    "{what}: {:?} vs {:?}",
                    a.hub_offset_mm,
                    b.hub_offset_mm
                );
            }
            for (sa, sb) in a.strips.iter().zip(&b.strips) {
                assert!(
                    (sa.contact_force_n - sb.contact_force_n).abs() <= 1e-6 * w,
                    "{what}: {} vs {}",
                    sa.contact_force_n,
                    sb.contact_force_n
                );
            }
        }
    }
}

/// The drain-crawler sample's text with the load-sharing fields written in.
fn with_sharing_fields() -> String {
    let text = std::fs::read_to_string(
        FsPath::new(env!("CARGO_MANIFEST_DIR"))
            .join("sample-designs")
            .join("drain-crawler-anchor-100mm.ron"),
    )
    .expect("sample reads");
    let text = text.replace(
        "bore: (diameter_mm: 100.0, minus_mm: 0.5, plus_mm: 1.0),",
        "bore: (diameter_mm: 100.0, minus_mm: 0.5, plus_mm: 1.0, out_of_round_mm: 1.5,\n        bend: Some(RadiusMm(250.0))),\n    end_plate_thickness_mm: 6.0,",
    );
    assert!(
        text.contains("end_plate_thickness_mm"),
        "sample layout changed"
    );
    text.replace("cycles:", "radial_load_n: 120.0,\n        cycles:")
}

#[test]
fn sharing_fields_read_write_and_stay_out_when_absent() {
    // Contract (docs/contract.md, "New fields and outputs"): the fields are optional and
    // a file without them gives exactly today's results; here, today's text on a rewrite.
    let plain = sample("drain-crawler-anchor-100mm.ron");
    assert_eq!(plain.duty.radial_load_n, 0.0);
    assert_eq!(plain.bore.out_of_round_mm, 0.0);
    assert_eq!(plain.bore.bend, None);
    assert_eq!(plain.end_plate_thickness_mm, 0.0);
    let whole = design::to_ron(&plain).expect("writes");
    for key in [
        "radial_load_n",
        "out_of_round_mm",
        "bend",
        "end_plate_thickness_mm",
    ] {
        assert!(!whole.contains(key), "{key} written for a file without it");
    }
    let text = with_sharing_fields();
    let d = design::parse(&text).expect("loads");
    assert_eq!(d.duty.radial_load_n, 120.0);
    assert_eq!(d.bore.out_of_round_mm, 1.5);
    assert_eq!(d.bore.bend, Some(Bend::RadiusMm(250.0)));
    assert_eq!(d.end_plate_thickness_mm, 6.0);
    // Round trip through the whole writer.
    let back = design::parse(&design::to_ron(&d).expect("writes")).expect("reads back");
    assert_eq!(back, d);
    for bend in [Bend::LongRadius, Bend::ShortRadius] {
        let e = Design {
            bore: design::Bore {
                bend: Some(bend),
                ..d.bore.clone()
            },
            ..d.clone()
        };
        let ron = design::to_ron(&e).expect("writes");
        assert_eq!(design::parse(&ron).expect("reads back"), e);
    }
    // In place: a changed value is replaced where it is written, comments kept.
    let mut e = d.clone();
    e.duty.radial_load_n = 80.0;
    e.bore.out_of_round_mm = 0.75;
    e.end_plate_thickness_mm = 4.0;
    e.bore.bend = Some(Bend::RadiusMm(300.0));
    let edited = design::edit_in_place(&text, &e).expect("in place");
    assert!(edited.contains("// Sample design (invented)"));
    assert!(edited.contains("radial_load_n: 80.0"));
    assert!(edited.contains("RadiusMm(300.0)"));
    assert_eq!(design::parse(&edited).expect("reads"), e);
    // Adding a field the file does not write is a whole rewrite, said so.
    let mut f = plain.clone();
    f.duty.radial_load_n = 50.0;
    let save = design::save_text(Some(&whole), &f).expect("save text");
    assert_eq!(design::parse(save.text()).expect("reads"), f);
}

#[test]
fn sharing_fields_out_of_range_say_where_and_the_range() {
    // Contract: duty.radial_load_n 0 to 1e7 N, bore.out_of_round_mm 0 to a tenth of the
    // bore; the message names the field, its line and the allowed range in one line.
    let text = with_sharing_fields();
    for (from, to, field, range) in [
        (
            "radial_load_n: 120.0",
            "radial_load_n: -1.0",
            "duty.radial_load_n",
            "0 to 1e7 N",
        ),
        (
            "radial_load_n: 120.0",
            "radial_load_n: 2e7",
            "duty.radial_load_n",
            "0 to 1e7 N",
        ),
        (
            "out_of_round_mm: 1.5",
            "out_of_round_mm: 10.5",
            "bore.out_of_round_mm",
            "0 to 10 mm",
        ),
        (
            "RadiusMm(250.0)",
            "RadiusMm(0.0)",
            "bore.bend",
            "1 to 100000 mm",
        ),
        (
            "end_plate_thickness_mm: 6.0",
            "end_plate_thickness_mm: -2.0",
            "end_plate_thickness_mm",
            "0 to 1000 mm",
        ),
    ] {
        let bad = text.replace(from, to);
        let err = design::parse(&bad).expect_err("out of range");
        let msg = err.to_string();
        assert!(msg.contains(field), "{msg}");
        assert!(err.position().is_some(), "{field}: no position in {msg}");
        assert!(msg.contains(range), "{field}: {msg}");
        assert!(!msg.contains('\n'), "{msg}");
    }
}

#[test]
fn design_entry_gives_the_governing_case_and_its_check_inputs() {
    // Issue 17 / contract ("New fields and outputs"): both clockings and both major axes
    // are judged and the worse governs; without the new fields the entry gives the centred
    // model's state (mechanics note, "Load sharing": W = 0, round, equal strips).
    let plain = sample("drain-crawler-anchor-100mm.ron");
    assert!(!sharing::design_uses_sharing(&plain));
    let seg = Segment::new(&plain).expect("valid");
    let bore = seg.bore_largest_mm;
    let stroke = seg.design.operating().value();
    let centred = seg.at_bore(bore).expect("fits").state(stroke);
    let p = sharing::loaded_point(
        &seg,
        bore,
        stroke,
        sharing::CaseChoice::default(),
        Judge::HighestStress,
    )
    .expect("solves");
    assert_eq!(p.segment_state, centred);
    assert_eq!(p.hub_offset_mm, [0.0, 0.0]);

    let mut heavy = plain.clone();
    // 100 N: the hub lifts off its rim before any strip reaches its limit in all four
    // cases (at 150 N the bottom strip's flat run reaches its limit first; see
    // `no_state_is_reported_past_the_segments_limit`).
    heavy.duty.radial_load_n = 100.0;
    heavy.bore.out_of_round_mm = 1.0;
    assert!(sharing::design_uses_sharing(&heavy));
    let seg = Segment::new(&heavy).expect("valid");
    // Well inside the model at both bores (the sample's operating stroke is past it at the
    // smallest bore).
    let stroke = 0.6
        * seg
            .at_bore(seg.bore_smallest_mm)
            .expect("fits")
            .limit_stroke_mm();
    let loading = sharing::loading_of(&heavy);
    let checks = sharing::checks_at(&seg, stroke).expect("solves");
    // The stress case is the worst over the four cases, each solved on its own.
    let mut worst = f64::NEG_INFINITY;
    for (clocking, major_axis) in sharing::cases(&loading) {
        let one = sharing::loaded_point(
            &seg,
            seg.bore_smallest_mm,
            stroke,
            sharing::CaseChoice {
                clocking: Some(clocking),
                major_axis: Some(major_axis),
            },
            Judge::HighestStress,
        )
        .expect("solves");
        assert_eq!((one.clocking, one.major_axis), (clocking, major_axis));
        let c = one.checks.expect("within the limit");
        worst = worst.max(c.worst_strip_stress_mpa);
        // Holding is friction times the contact forces summed over the strips.
        let sum: f64 = one.strips.iter().map(|s| s.contact_force_n).sum();
        assert!((c.holding_force_n - heavy.friction * sum).abs() <= 1e-9 * c.holding_force_n);
        assert_eq!(one.strips.len(), heavy.strip.count as usize);
    }
    let s = checks.stress.checks.as_ref().expect("within the limit");
    assert_eq!(s.worst_strip_stress_mpa, worst);
    assert!(checks.stress.governing.contains("governing case"));
    assert!(
        checks.stress.hub_offset_mm[0] < 0.0,
        "a weight sags the hub"
    );
    // The top strip: free exactly when its row says so.
    let t = &checks.top_strip;
    let c = t.checks.as_ref().expect("within the limit");
    let top = t
        .strips
        .iter()
        .map(|s| s.clock_deg.to_radians().cos())
        .fold(f64::NEG_INFINITY, f64::max);
    let touching = t
        .strips
        .iter()
        .filter(|s| s.clock_deg.to_radians().cos() >= top - 1e-9)
        .all(|s| s.contact_force_n > 0.0);
    assert_eq!(c.top_strip_touches, touching);
    assert!(checks.bend.is_none());
}

#[test]
fn design_bend_uses_the_rim_and_the_rigid_length() {
    // Mechanics note, "Bends", with the hand values of `bend_rule_against_hand_values`:
    // NPS 4 schedule 40 (bore 102.26 mm, ASME B36.10M), rigid length 150 + 2 x 5 = 160 mm,
    // rim 80 mm (the end plates): long radius passes with 5.878232 mm to spare.
    let mut d = sample("drain-crawler-anchor-100mm.ron");
    d.bore.pipe = Some(design::PipeRef {
        nps: "4".into(),
        schedule: "40".into(),
    });
    d.bore.minus_mm = 0.0;
    d.strip.free_length_mm = 150.0;
    d.end_plate_thickness_mm = 5.0;
    d.end_plate_diameter_mm = 80.0;
    d.bore.bend = Some(Bend::LongRadius);
    let seg = Segment::new(&d).expect("valid");
    assert!(seg.relaxed_diameter_mm() <= 80.0);
    let pass = sharing::bend_passage(&seg)
        .expect("a bend is given")
        .expect("judged");
    assert!(pass.passes);
    assert!(
        (pass.margin_mm - 5.878232).abs() < 1e-6,
        "{}",
        pass.margin_mm
    );
}

/// `point --json` on a design with a radial load (contract, "New fields and outputs"): the
/// state's keys stay, `axial_force_per_strip_n` and `contact_force_per_strip_n` are the means
/// over the strips and `max_stress_mpa` the worst strip's; `hub_offset_mm` is `[y, z]` with
/// `y < 0` under a weight; `strips` has one object per strip in order of clock angle from the
/// top, with the contract's keys; the three bore-level strokes are present. Without a load the
/// output has none of the new keys (checked on the sample itself).
#[test]
fn point_json_reports_the_hub_offset_and_every_strip() {
    let sample = FsPath::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join("riser-climber-2in-sch40.ron");
    let text = std::fs::read_to_string(&sample).unwrap_or_else(|e| panic!("{e}"));
    let loaded = text.replace(
        "holding_force_n: 24.5,",
        // 20 N: the hub lifts off its rest within the limit (at 40 N it does not).
        "holding_force_n: 24.5, radial_load_n: 20.0,",
    );
    assert_ne!(loaded, text, "the sample's duty line moved");
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let file = dir.path().join("loaded.ron");
    std::fs::write(&file, &loaded).unwrap_or_else(|e| panic!("{e}"));
    let run = |path: &FsPath, extra: &[&str]| -> serde_json::Value {
        let out = assert_cmd::Command::cargo_bin("bowgrip")
            .unwrap_or_else(|e| panic!("{e}"))
            .arg("point")
            .arg(path)
            .args(["--stroke-mm", "1.3", "--json"])
            .args(extra)
            .output()
            .unwrap_or_else(|e| panic!("{e}"));
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        serde_json::from_slice(&out.stdout).unwrap_or_else(|e| panic!("{e}"))
    };
    let v = run(&file, &[]);
    let hub = v["hub_offset_mm"]
        .as_array()
        .expect("hub_offset_mm is [y, z]");
    assert_eq!(hub.len(), 2);
    assert!(
        hub[0].as_f64().is_some_and(|y| y < 0.0),
        "a weight lowers the hub: {hub:?}"
    );
    let strips = v["strips"].as_array().expect("strips");
    assert_eq!(strips.len(), 12);
    let f = |s: &serde_json::Value, k: &str| s[k].as_f64().unwrap_or_else(|| panic!("{k}: {s}"));
    let clocks: Vec<f64> = strips.iter().map(|s| f(s, "clock_deg")).collect();
    assert!(clocks.windows(2).all(|w| w[0] < w[1]), "{clocks:?}");
    for s in strips {
        for key in [
            "gap_mm",
            "contact_force_n",
            "axial_force_n",
            "max_stress_mpa",
        ] {
            f(s, key);
        }
        assert!(s["phase"].is_string());
    }
    let mean = |k: &str| strips.iter().map(|s| f(s, k)).sum::<f64>() / 12.0;
    let close = |a: f64, b: f64| (a - b).abs() <= 1e-9 * b.abs().max(1.0);
    assert!(close(
        f(&v, "contact_force_per_strip_n"),
        mean("contact_force_n")
    ));
    assert!(close(
        f(&v, "axial_force_per_strip_n"),
        mean("axial_force_n")
    ));
    let worst = strips
        .iter()
        .map(|s| f(s, "max_stress_mpa"))
        .fold(f64::MIN, f64::max);
    assert!(close(f(&v, "max_stress_mpa"), worst));
    // The bottom strips press harder than the top ones (the weight hangs on them).
    assert!(f(&strips[6], "contact_force_n") > f(&strips[0], "contact_force_n"));
    for key in [
        "first_strip_contact_stroke_mm",
        "lift_off_stroke_mm",
        "last_strip_contact_stroke_mm",
    ] {
        assert!(v.get(key).is_some(), "{key} missing");
    }
    // The options pick one case; both parse.
    let gap = run(&file, &["--clocking", "gap", "--major-axis", "horizontal"]);
    assert_eq!(gap["strips"].as_array().map(Vec::len), Some(12));
    // Without a load the sample's output has none of the new keys.
    let plain = run(&sample, &[]);
    assert!(plain.get("hub_offset_mm").is_none() && plain.get("strips").is_none());
}

#[test]
fn a_strip_past_its_limit_while_the_hub_rests_leaves_the_wall() {
    // mechanics.md, "Load sharing": the rest support (the relaxed rim) carries what the
    // strips do not. A 40 N load on the riser sample rests the hub on its rim, 5 mm low, so
    // the strips nearest the bottom sit at about 1.4 mm from the wall and reach their own
    // flat-run limit (at about 9 g^2 / 2L = 0.08 mm of stroke, Timoshenko and Gere, chapter
    // 1, as in the note) long before the strips lift the hub. Those strips have left the
    // wall (their flat run buckled away) while the rim carries the load: a state, not the
    // segment's limit. Once the strips lift the hub (their gaps open again) every strip has
    // a state, and the limit, the lift-off and the last contact lie further on.
    let seg = Segment::new(&sample("riser-climber-2in-sch40.ron")).expect("valid");
    let w = 40.0;
    for bore in [seg.bore_smallest_mm, seg.bore_largest_mm] {
        for clocking in [Clocking::Strip, Clocking::Gap] {
            let loading = Loading {
                radial_load_n: w,
                clocking,
                ..Loading::default()
            };
            let loaded = seg.loaded_at_bore(bore, &loading).expect("fits");
            let strokes = loaded.strokes().expect("strokes");
            let what = format!("bore {bore} {clocking:?}");
            assert!(strokes.limit_stroke_mm > 1.5, "{what}: {strokes:?}");
            let lift = strokes.lift_off_stroke_mm.expect("the strips lift the hub");
            assert!(lift < 0.3, "{what}: lift-off at {lift}");
            let last = strokes
                .last_strip_contact_stroke_mm
                .expect("the last strip touches");
            assert!(last > lift && last < strokes.limit_stroke_mm, "{what}");
            // Between first contact and lift-off: resting states, some with strips off
            // the wall; each balances, and an off-wall strip is one nearer the wall than
            // with the hub centred, with no force, pull or stress.
            let first = strokes.first_strip_contact_stroke_mm.expect("reach");
            let mut seen_off = false;
            for j in 1..40 {
                let stroke = first + (lift - first) * j as f64 / 40.0;
                let st = loaded.state(stroke).expect("solves");
                let at = format!("{what} stroke {stroke}");
                assert!(!st.beyond_limit, "{at}");
                check_balance(&st, w, &at);
                let off: Vec<usize> = (0..st.strips.len())
                    .filter(|&i| st.strips[i].phase == Phase::BeyondLimit)
                    .collect();
                assert_eq!(off.len(), st.totals.strips_off_wall, "{at}");
                if off.is_empty() {
                    continue;
                }
                seen_off = true;
                assert!(st.on_support, "{at}: off the wall only while resting");
                assert!(st.totals.support_reaction_n[0] > 0.0, "{at}");
                let centred = loaded.gaps_mm([0.0, 0.0]);
                for &i in &off {
                    let s = &st.strips[i];
                    assert_eq!(s.contact_force_n, 0.0, "{at}");
                    assert!(s.clock_deg.to_radians().cos() < 0.0, "{at}: below the hub");
                    assert!(s.gap_mm < centred[i], "{at}");
                    assert!(s.max_stress_mpa.is_nan() && s.axial_force_n.is_nan());
                }
                let row = loaded.segment_state(stroke).expect("state");
                assert!(row.max_stress_mpa.is_none() && row.actuator_force_n.is_none());
                assert!(row.holding_force_n.is_some());
                assert!(row.reason.is_some_and(|r| r.contains("off the wall")));
            }
            assert!(
                seen_off,
                "{what}: the bottom strips leave the wall on the way"
            );
            // From 0.3 mm to 1.5 mm every strip has a state.
            for j in 0..=12 {
                let stroke = 0.3 + 0.1 * j as f64;
                let st = loaded.state(stroke).expect("solves");
                assert!(!st.beyond_limit, "{what} stroke {stroke}");
                assert!(!st.on_support, "{what} stroke {stroke}");
                assert!(st.strips.iter().all(|s| s.phase.has_state()));
                check_balance(&st, w, &format!("{what} stroke {stroke}"));
            }
        }
    }
}

#[test]
fn no_state_is_reported_past_the_segments_limit() {
    // mechanics.md, "Load sharing": the segment's limit is the first stroke at which any
    // strip reaches its own limit with the strips carrying the load (a strip past its limit
    // while the rim carries the load has left the wall; see the test above). Every state
    // past the limit must say so, with no strip results (the model's own definition, not a
    // number to match). A 150 N load on the drain-crawler sample at its smallest bore.
    let seg = Segment::new(&sample("drain-crawler-anchor-100mm.ron")).expect("valid");
    let loading = Loading {
        radial_load_n: 150.0,
        clocking: Clocking::Gap,
        ..Loading::default()
    };
    let loaded = seg
        .loaded_at_bore(seg.bore_smallest_mm, &loading)
        .expect("fits");
    let limit = loaded.strokes().expect("strokes").limit_stroke_mm;
    let at_limit = loaded.state(limit).expect("solves");
    assert!(
        !at_limit.beyond_limit,
        "the limit stroke itself has a state"
    );
    for j in 1..=20 {
        let stroke = limit * (1.0 + 0.02 * j as f64);
        let st = loaded.state(stroke).expect("solves");
        assert!(
            st.beyond_limit,
            "a state at {stroke} mm past the limit {limit} mm"
        );
        assert!(st.strips.is_empty());
        let row = loaded.segment_state(stroke).expect("solves");
        assert_eq!(row.phase, bowgrip::elastica::Phase::BeyondLimit);
    }
}

#[test]
fn horizontal_drain_sample_loses_its_top_strips_at_the_largest_bore() {
    // Issue 17: the sample of a horizontal drain crawler whose top strips lose contact at
    // the largest bore. Its `check` (contract, "New fields and outputs": check ids
    // `top-strip` and `bend`) names the segment gripping on part of its strips without
    // failing it, since holding passes; the bend check is there because the file gives a
    // bend. The per-strip state says the same: the top strip is free there, the bottom one
    // grips (mechanics note, "Load sharing": the weight hangs on the bottom strips).
    let d = sample("drain-crawler-horizontal-150mm.ron");
    assert!(sharing::design_uses_sharing(&d));
    let seg = Segment::new(&d).expect("valid");
    let list = bowgrip::checks::run(&seg);
    let find = |id: &str| {
        list.iter()
            .find(|c| c.id.as_str() == id)
            .unwrap_or_else(|| panic!("no {id} check in {list:?}"))
    };
    let top = find("top-strip");
    assert_eq!(top.bore_mm, Some(seg.bore_largest_mm));
    assert!(top.pass, "{top:?}");
    assert!(top.reason.contains("grips on"), "{}", top.reason);
    assert!(top.reason.contains("does not touch"), "{}", top.reason);
    let hold = find("hold");
    assert!(
        hold.pass && hold.reason.contains("strips in contact"),
        "{hold:?}"
    );
    assert!(find("bend").pass);
    assert!(find("reach").reason.contains("lift the hub"));
    assert_eq!(list.len(), 10);
    let op = d.operating_stroke_mm.expect("the sample sets a stroke");
    let checks = sharing::checks_at(&seg, op).expect("solves");
    let t = &checks.top_strip;
    let inputs = t.checks.as_ref().expect("within the limit");
    assert!(!inputs.top_strip_touches);
    assert!(inputs.strips_in_contact < inputs.strips);
    let top_row = &t.strips[0];
    assert_eq!(top_row.clock_deg, 0.0, "clock order starts at the top");
    assert_eq!(top_row.phase, Phase::Free);
    let bottom = t
        .strips
        .iter()
        .find(|s| (s.clock_deg - 180.0).abs() < 1e-9)
        .expect("a strip at the bottom in the governing case");
    assert!(bottom.contact_force_n > 0.0);
}

#[test]
fn centred_designs_keep_the_eight_checks() {
    // Contract, "New fields and outputs": a file without the new fields gives exactly
    // today's results: the same eight checks, no top-strip or bend.
    for name in SAMPLES {
        let seg = Segment::new(&sample(name)).expect("valid");
        let ids: Vec<&str> = bowgrip::checks::run(&seg)
            .iter()
            .map(|c| c.id.as_str())
            .collect();
        assert_eq!(
            ids,
            [
                "fit", "reach", "hold", "static", "fatigue", "actuator", "stroke", "hub"
            ],
            "{name}"
        );
    }
}

#[test]
fn loaded_checks_read_the_worst_strip_and_the_strips_in_contact() {
    // Issue 17, "Checks": holding sums friction over the strips in contact (the least over
    // the cases at the largest bore), static and fatigue are judged on the worst strip (the
    // highest over the cases at the smallest bore); the bend check comes only with a bend.
    let mut d = sample("riser-climber-2in-sch40.ron");
    d.duty.radial_load_n = 40.0;
    let seg = Segment::new(&d).expect("valid");
    let list = bowgrip::checks::run(&seg);
    assert!(list.iter().all(|c| c.id.as_str() != "bend"));
    let op = d.operating_stroke_mm.expect("the sample sets a stroke");
    let loading = sharing::loading_of(&d);
    let mut least_hold = f64::INFINITY;
    let mut worst_static = f64::INFINITY;
    for (clocking, major_axis) in sharing::cases(&loading) {
        let case = Loading {
            clocking,
            major_axis,
            ..loading.clone()
        };
        let large = seg
            .loaded_at_bore(seg.bore_largest_mm, &case)
            .expect("fits")
            .state(op)
            .expect("solves");
        let sum: f64 = large
            .strips
            .iter()
            .filter(|s| s.contact_force_n > 0.0)
            .map(|s| s.contact_force_n)
            .sum();
        least_hold = least_hold.min(d.friction * sum);
        let small = seg
            .loaded_at_bore(seg.bore_smallest_mm, &case)
            .expect("fits")
            .state(op)
            .expect("solves");
        for s in &small.strips {
            worst_static = worst_static.min(s.static_safety_factor);
        }
    }
    let need = d.duty.holding_force_n * d.duty.safety_factor;
    let hold = list.iter().find(|c| c.id.as_str() == "hold").expect("hold");
    let m = hold.margin.expect("a margin");
    assert!(
        (m - (least_hold / need - 1.0)).abs() <= 1e-9,
        "{m} vs {least_hold}"
    );
    let st = list
        .iter()
        .find(|c| c.id.as_str() == "static")
        .expect("static");
    let m = st.margin.expect("a margin");
    assert!(
        (m - (worst_static - 1.0)).abs() <= 1e-9,
        "{m} vs {worst_static}"
    );
    assert!(st.reason.contains("worst strip"));
    // With a bend, a bend check.
    d.bore.bend = Some(Bend::RadiusMm(500.0));
    let seg = Segment::new(&d).expect("valid");
    let list = bowgrip::checks::run(&seg);
    let bend = list
        .iter()
        .find(|c| c.id.as_str() == "bend")
        .expect("a bend check");
    assert_eq!(bend.unit(), bowgrip::checks::MarginUnit::Mm);
}

#[test]
fn point_csv_lists_every_strip() {
    // Contract, "New fields and outputs": `point --csv` prints the strips, one row per strip
    // in order of clock angle from the top, with the columns of the JSON `strips` objects.
    let file = FsPath::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join("drain-crawler-horizontal-150mm.ron");
    let out = assert_cmd::Command::cargo_bin("bowgrip")
        .unwrap_or_else(|e| panic!("{e}"))
        .arg("point")
        .arg(&file)
        .args(["--stroke-mm", "2.0", "--csv"])
        .output()
        .unwrap_or_else(|e| panic!("{e}"));
    assert!(out.status.success());
    let text = String::from_utf8_lossy(&out.stdout);
    let mut lines = text.lines();
    assert_eq!(
        lines.next(),
        Some("clock_deg,gap_mm,phase,contact_force_n,axial_force_n,max_stress_mpa")
    );
    let rows: Vec<Vec<&str>> = lines.map(|l| l.split(',').collect()).collect();
    assert_eq!(rows.len(), 8);
    let clocks: Vec<f64> = rows
        .iter()
        .map(|r| r[0].parse().expect("clock_deg"))
        .collect();
    assert!(clocks.windows(2).all(|w| w[0] < w[1]), "{clocks:?}");
    for r in &rows {
        assert_eq!(r.len(), 6);
        assert!(
            ["free", "point-contact", "line-contact"].contains(&r[2]),
            "{r:?}"
        );
    }
}

#[test]
fn unequal_strips_also_leave_the_wall_while_the_hub_rests() {
    // As `a_strip_past_its_limit_while_the_hub_rests_leaves_the_wall`, with strips that
    // differ by a few micrometres of thickness (invented deviations): the nested roots and
    // the rest on the wall give the same picture (mechanics note, "Load sharing": the rest
    // support carries what the strips do not; unequal strips need both components of d).
    let seg = Segment::new(&sample("riser-climber-2in-sch40.ron")).expect("valid");
    let w = 40.0;
    let loading = Loading {
        radial_load_n: w,
        deviations: (0..12)
            .map(|i| StripDeviation {
                thickness_mm: 0.002 * (f64::from(i) - 5.5) / 5.5,
                ..StripDeviation::default()
            })
            .collect(),
        ..Loading::default()
    };
    let loaded = seg
        .loaded_at_bore(seg.bore_smallest_mm, &loading)
        .expect("fits");
    let strokes = loaded.strokes().expect("strokes");
    assert!(strokes.limit_stroke_mm > 1.5, "{strokes:?}");
    let lift = strokes.lift_off_stroke_mm.expect("the strips lift the hub");
    let first = strokes.first_strip_contact_stroke_mm.expect("reach");
    let mut seen_off = false;
    for j in 1..20 {
        let stroke = first + (lift - first) * j as f64 / 20.0;
        let st = loaded.state(stroke).expect("solves");
        assert!(!st.beyond_limit, "stroke {stroke}");
        check_balance(&st, w, &format!("unequal, stroke {stroke}"));
        if st.totals.strips_off_wall > 0 {
            seen_off = true;
            assert!(st.on_support);
        }
    }
    assert!(seen_off, "the bottom strips leave the wall on the way");
    for j in 0..=12 {
        let stroke = 0.3 + 0.1 * j as f64;
        let st = loaded.state(stroke).expect("solves");
        assert!(!st.beyond_limit && !st.on_support, "stroke {stroke}");
        check_balance(&st, w, &format!("unequal, stroke {stroke}"));
    }
}

/// Under load sharing, reach is judged at the stroke where the strips lift the hub, and
/// through a compliant drive (springs in series, common practice) the actuator's maximum is
/// of travel there, `stroke + pull / k`, as in the centred reach check: the horizontal
/// drain sample given a 40 N/mm cord. Its margin is the maximum less that travel, and the
/// reason gives the travel; with the rigid cord the margin is the maximum less the stroke.
#[test]
fn loaded_reach_counts_the_drive_travel() {
    let rigid = sample("drain-crawler-horizontal-150mm.ron");
    let mut soft = rigid.clone();
    let design::Actuator::Spool {
        stiffness_n_per_mm, ..
    } = &mut soft.actuator
    else {
        panic!("the drain sample has a spool")
    };
    *stiffness_n_per_mm = Some(40.0);
    let reach = |d: &Design| {
        let seg = Segment::new(d).unwrap_or_else(|e| panic!("{e}"));
        let c = bowgrip::checks::run(&seg)
            .into_iter()
            .find(|c| c.id == bowgrip::checks::CheckId::Reach)
            .expect("a reach check");
        (seg, c)
    };
    let (seg, r) = reach(&rigid);
    let at = r.stroke_mm.expect("the lift-off stroke");
    assert!((r.margin.expect("margin") - (seg.max_stroke_mm() - at)).abs() < 1e-12);
    let (seg, s) = reach(&soft);
    let at = s.stroke_mm.expect("the lift-off stroke");
    let path = seg.at_bore(seg.bore_largest_mm).expect("a bore path");
    let travel = bowgrip::actuation::travel_at_mm(&path, at);
    assert!(travel > at + 1.0, "{travel} vs {at}");
    assert!((s.margin.expect("margin") - (seg.max_stroke_mm() - travel)).abs() < 1e-12);
    assert!(s.reason.contains("actuator travel"), "{}", s.reason);
}
