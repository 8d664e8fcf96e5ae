//! Hostile input, bounded: any bytes into the design reader, any numbers (NaN, infinities,
//! negatives, zero, 1e300, denormals) into every numeric field and into the solver entry
//! points. Every input must end in a result or a typed error, never a panic; every solve in
//! the library has an iteration bound, so each call returns.

use bowgrip::analysis;
use bowgrip::design::{self, Actuator, Design, DesignError, Ends};
use bowgrip::elastica::Path;
use bowgrip::segment::Segment;
use proptest::prelude::*;

/// The sample designs' text, the seeds of the mutation test.
const SAMPLE_TEXTS: [&str; 3] = [
    include_str!("../../sample-designs/riser-climber-2in-sch40.ron"),
    include_str!("../../sample-designs/duct-anchor-150mm-stainless.ron"),
    include_str!("../../sample-designs/drain-crawler-anchor-100mm.ron"),
];

/// Numbers that break naive code.
fn nasty() -> impl Strategy<Value = f64> {
    prop_oneof![
        Just(f64::NAN),
        Just(f64::INFINITY),
        Just(f64::NEG_INFINITY),
        Just(0.0),
        Just(-0.0),
        Just(-1.0),
        Just(1e300),
        Just(-1e300),
        Just(f64::MIN_POSITIVE / 8.0), // denormal
        Just(1e-300),
        -1e6f64..1e6,
        0.0f64..2.0,
    ]
}

/// Sets the `i`-th numeric field of a design to `v` (cycling over all of them).
fn poke(d: &mut Design, i: usize, v: f64) {
    match i % 16 {
        0 => {
            d.strip.count = if v.is_finite() {
                v.abs().min(1e9) as u32
            } else {
                0
            }
        }
        1 => d.strip.free_length_mm = v,
        2 => d.strip.width_mm = v,
        3 => d.strip.thickness_mm = v,
        4 => d.mount_radius_mm = v,
        5 => d.end_plate_diameter_mm = v,
        6 => d.bore.diameter_mm = v,
        7 => d.bore.minus_mm = v,
        8 => d.bore.plus_mm = v,
        9 => d.friction = v,
        10 => d.operating_stroke_mm = Some(v),
        11 => d.duty.holding_force_n = v,
        12 => d.duty.safety_factor = v,
        13 => {
            d.actuator = Actuator::Direct {
                max_force_n: v,
                max_stroke_mm: 10.0,
                stiffness_n_per_mm: None,
            };
        }
        14 => {
            d.actuator = Actuator::LeadScrew {
                lead_mm: 1.0,
                efficiency: v,
                max_torque_nm: 1.0,
                max_turns: 5.0,
                stiffness_n_per_mm: None,
            };
        }
        _ => {
            d.actuator = Actuator::Spool {
                radius_mm: v,
                max_torque_nm: 1.0,
                max_angle_deg: 360.0,
                stiffness_n_per_mm: None,
            };
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, rng_seed: proptest::test_runner::RngSeed::Fixed(256), failure_persistence: None, ..ProptestConfig::default() })]

    #[test]
    fn any_bytes_parse_to_a_design_or_an_error(bytes in prop::collection::vec(any::<u8>(), 0..400)) {
        let text = String::from_utf8_lossy(&bytes);
        if let Ok(d) = design::parse(&text) {
            // Whatever parses is valid, so it can be analysed.
            let _ = analysis::analyse(&d);
        }
    }

    #[test]
    fn mutated_sample_files_load_and_round_trip_or_are_refused_inside_the_text(
        sample in 0usize..3,
        edits in prop::collection::vec((0usize..4000, 0usize..4, "[(),:0-9a-zA-Z_.\" /e-]{0,6}"), 1..4),
    ) {
        // Issue 10, item 7: seeded from the valid sample files, each mutated by a few
        // deletions, insertions and replacements; whatever comes out must either load,
        // validate and round-trip exactly, or be refused at a line and column inside the
        // text (or, with no position, name a field that the text does not spell out).
        let mut text = SAMPLE_TEXTS[sample].to_string();
        for (at, kind, insert) in edits {
            let at = (0..=at.min(text.len())).rev().find(|&i| text.is_char_boundary(i)).unwrap_or(0);
            let end = (at..=(at + 3).min(text.len())).rev().find(|&i| text.is_char_boundary(i)).unwrap_or(at);
            match kind {
                0 => text.replace_range(at..end, ""),
                1 => text.insert_str(at, &insert),
                _ => text.replace_range(at..end, &insert),
            }
        }
        match design::parse(&text) {
            Ok(d) => {
                prop_assert!(d.validate().is_ok());
                let written = design::to_ron(&d).map_err(|e| TestCaseError::fail(e.to_string()))?;
                prop_assert_eq!(design::parse(&written).ok(), Some(d.clone()));
                let _ = analysis::analyse(&d);
            }
            Err(e) => match e.position() {
                Some((line, column)) => {
                    let lines: Vec<&str> = text.split('\n').collect();
                    prop_assert!(line >= 1 && line <= lines.len(), "{} for {} lines", e, lines.len());
                    let width = lines[line - 1].chars().count();
                    prop_assert!(column >= 1 && column <= width + 1, "{} on a line of {} chars", e, width);
                }
                None => {
                    let field = match e.kind() {
                        DesignError::OutOfRange { field, .. } | DesignError::Invalid { field, .. } => field.clone(),
                        DesignError::UnknownGrade { .. } => "strip.material".to_string(),
                        DesignError::UnknownPipe { .. } => "bore.pipe".to_string(),
                        other => return Err(TestCaseError::fail(format!("no position: {other}"))),
                    };
                    prop_assert!(design::locate(&text, &field).is_none(), "{} is written but not placed: {}", field, e);
                }
            },
        }
    }

    #[test]
    fn any_numbers_in_any_fields_are_refused_or_analysed(
        pokes in prop::collection::vec((0usize..16, nasty()), 1..4),
        hinged in any::<bool>(),
    ) {
        let mut d = Design::default();
        d.strip.ends = if hinged { Ends::Hinged } else { Ends::Clamped };
        for (i, v) in pokes {
            poke(&mut d, i, v);
        }
        match Segment::new(&d) {
            Err(e) => prop_assert!(!e.to_string().is_empty()),
            Ok(_) => {
                let a = analysis::analyse(&d).expect("a valid design analyses");
                for s in &a.curve {
                    for v in [s.axial_force_per_strip_n, s.contact_force_per_strip_n, s.max_stress_mpa].into_iter().flatten() {
                        prop_assert!(v.is_finite());
                    }
                }
            }
        }
    }

    #[test]
    fn solver_entry_points_take_any_numbers(gap in nasty(), stroke in nasty(), target in nasty(), hinged in any::<bool>()) {
        let ends = if hinged { Ends::Hinged } else { Ends::Clamped };
        match Path::new(ends, gap) {
            Err(_) => prop_assert!(!(gap > bowgrip::elastica::MIN_GAP && gap.is_finite())),
            Ok(p) => {
                let s = p.state(stroke);
                if s.phase.has_state() {
                    prop_assert!(s.axial.is_finite() && s.contact.is_finite() && s.energy.is_finite());
                }
                let _ = p.stroke_for_contact(target);
                let _ = p.stroke_for_linear(1.0, 0.01, target);
                let _ = p.shape(stroke, 8);
            }
        }
    }
}
