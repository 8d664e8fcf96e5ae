//! Hostile input, bounded: any bytes into the design reader, any numbers (NaN, infinities,
//! negatives, zero, 1e300, denormals) into every numeric field and into the solver entry
//! points. Every input must end in a result or a typed error, never a panic; every solve in
//! the library has an iteration bound, so each call returns.

use bowgrip::analysis;
use bowgrip::design::{self, Actuator, Design, Ends};
use bowgrip::elastica::Path;
use bowgrip::segment::Segment;
use proptest::prelude::*;

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
        10 => d.operating_stroke_mm = v,
        11 => d.duty.holding_force_n = v,
        12 => d.duty.safety_factor = v,
        13 => {
            d.actuator = Actuator::Direct {
                max_force_n: v,
                max_stroke_mm: 10.0,
            };
        }
        14 => {
            d.actuator = Actuator::LeadScrew {
                lead_mm: 1.0,
                efficiency: v,
                max_torque_nm: 1.0,
                max_turns: 5.0,
            };
        }
        _ => {
            d.actuator = Actuator::Spool {
                radius_mm: v,
                max_torque_nm: 1.0,
                max_angle_deg: 360.0,
            };
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, failure_persistence: None, ..ProptestConfig::default() })]

    #[test]
    fn any_bytes_parse_to_a_design_or_an_error(bytes in prop::collection::vec(any::<u8>(), 0..400)) {
        let text = String::from_utf8_lossy(&bytes);
        if let Ok(d) = design::parse(&text) {
            // Whatever parses is valid, so it can be analysed.
            let _ = analysis::analyse(&d);
        }
    }

    #[test]
    fn mutated_design_text_never_panics(cut in 0usize..2000, insert in "[(),:0-9a-zA-Z_.\" -]{0,12}") {
        let text = design::to_ron(&Design::default());
        let at = cut.min(text.len());
        let at = (0..=at).rev().find(|&i| text.is_char_boundary(i)).unwrap_or(0);
        let mutated = format!("{}{}{}", &text[..at], insert, &text[at..]);
        if let Ok(d) = design::parse(&mutated) {
            prop_assert!(d.validate().is_ok());
            let _ = analysis::analyse(&d);
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
