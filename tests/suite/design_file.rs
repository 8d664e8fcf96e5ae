//! The RON design file against the project's file-format issue and docs/contract.md
//! ("Bad input versus a failing design", "Files"): round trips, the issue's literal, pipe
//! bores, every refusal with its message, and atomic saving.

use std::fs;
use std::path::{Path, PathBuf};

use bowgrip::design::{
    self, Actuator, Bore, Design, DesignError, Ends, MaterialChoice, Operating, PipeRef, Stiffness,
};
use proptest::prelude::*;

const SAMPLES: [&str; 4] = [
    "riser-climber-2in-sch40.ron",
    "duct-anchor-150mm-stainless.ron",
    "drain-crawler-anchor-100mm.ron",
    "water-main-tractor-torque-screw.ron",
];

fn sample_path(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join(name)
}

/// The design literal of the file-format issue, with a grade id from the material table.
const ISSUE_LITERAL: &str = r#"Design(
    format: 1,
    title: "...",
    strip: (count: 6, free_length_mm: 60.0, width_mm: 6.0, thickness_mm: 0.3,
            material: Grade("carbon-1095-50hrc"),
            ends: Clamped,
            stiffness: Auto),
    mount_radius_mm: 20.0,
    end_plate_diameter_mm: 40.0,
    bore: (diameter_mm: 58.6, minus_mm: 0.0, plus_mm: 0.0),
    friction: 0.3,
    actuator: Direct(max_force_n: 1000.0, max_stroke_mm: 10.0),
    operating_stroke_mm: 4.0,
    duty: (holding_force_n: 40.0, safety_factor: 2.0, cycles: 100000),
)
"#;

/// The issue literal with one piece of text replaced (which must occur exactly once).
fn literal_with(from: &str, to: &str) -> String {
    assert_eq!(
        ISSUE_LITERAL.matches(from).count(),
        1,
        "{from:?} must occur once"
    );
    ISSUE_LITERAL.replace(from, to)
}

fn parse_err(text: &str) -> DesignError {
    match design::parse(text) {
        Ok(d) => panic!("expected a refusal, got {d:?}"),
        Err(e) => e,
    }
}

/// 1-based (line, column) of the first occurrence of `needle` in `text`.
fn position_of(text: &str, needle: &str) -> (usize, usize) {
    let at = text
        .find(needle)
        .unwrap_or_else(|| panic!("{needle:?} not in text"));
    let before = &text[..at];
    let line = before.matches('\n').count() + 1;
    let column = before.chars().rev().take_while(|&c| c != '\n').count() + 1;
    (line, column)
}

/// 1-based (line, column) of the value in the first `key: value` entry spelled `entry`.
fn value_position(text: &str, entry: &str) -> (usize, usize) {
    let (line, column) = position_of(text, entry);
    let offset = entry.find(": ").map_or(0, |i| i + 2);
    (line, column + entry[..offset].chars().count())
}

// ---------------------------------------------------------------- round trips

#[test]
fn default_design_is_valid_and_round_trips() {
    let d = Design::default();
    d.validate()
        .unwrap_or_else(|e| panic!("default design refused: {e}"));
    let text = design::to_ron(&d).unwrap_or_else(|e| panic!("{e}"));
    assert!(
        text.starts_with("Design("),
        "top-level struct is named: {text}"
    );
    let back = design::parse(&text).unwrap_or_else(|e| panic!("{e}\n{text}"));
    assert_eq!(back, d);
    // Stable: writing the loaded design again gives the same bytes.
    assert_eq!(
        design::to_ron(&back).unwrap_or_else(|e| panic!("{e}")),
        text
    );
}

#[test]
fn every_sample_loads_and_round_trips() {
    for name in SAMPLES {
        let path = sample_path(name);
        let d = design::load(&path).unwrap_or_else(|e| panic!("{}", e.in_file(&path)));
        let text = design::to_ron(&d).unwrap_or_else(|e| panic!("{e}"));
        let back = design::parse(&text).unwrap_or_else(|e| panic!("{name}: {e}\n{text}"));
        assert_eq!(back, d, "{name}");
        assert_eq!(
            design::to_ron(&back).unwrap_or_else(|e| panic!("{e}")),
            text,
            "{name}"
        );
        assert!(!d.title.is_empty(), "{name} has a title");
    }
}

#[test]
fn samples_carry_a_header_and_a_caution() {
    // Brief: each sample starts with a `//` header saying what it is for and what it is
    // expected to pass or fail; project rules: user-facing files show the cautions.
    for name in SAMPLES {
        let text = fs::read_to_string(sample_path(name)).unwrap_or_else(|e| panic!("{name}: {e}"));
        assert!(
            text.starts_with("// "),
            "{name} opens with a comment header"
        );
        assert!(
            text.contains("Expected:"),
            "{name} states its expected outcome"
        );
        assert!(
            text.contains("Caution:"),
            "{name} carries the safety caution"
        );
    }
}

fn arbitrary_design() -> impl Strategy<Value = Design> {
    // Any finite numbers, including awkward ones (subnormal, huge, many digits): the
    // writer must give them back bit for bit. Validation is not the point here.
    let num = prop_oneof![
        any::<f64>().prop_filter("finite", |v| v.is_finite()),
        0.0..1e4f64
    ];
    (
        (
            1u32..100,
            num.clone(),
            num.clone(),
            num.clone(),
            any::<bool>(),
        ),
        (
            num.clone(),
            num.clone(),
            num.clone(),
            num.clone(),
            any::<bool>(),
        ),
        (num.clone(), num.clone(), num.clone(), 0u8..3, any::<u64>()),
        ".{0,12}",
    )
        .prop_map(
            |((count, l, b, t, hinged), (rm, dp, d, mu, pipe), (a, s, h, kind, cycles), title)| {
                let mut design = Design {
                    title,
                    ..Design::default()
                };
                design.strip.count = count;
                design.strip.free_length_mm = l;
                design.strip.width_mm = b;
                design.strip.thickness_mm = t;
                if hinged {
                    design.strip.ends = Ends::Hinged;
                    design.strip.stiffness = Stiffness::Beam;
                    design.strip.material = MaterialChoice::Custom {
                        name: "custom \"quoted\" \\ name".into(),
                        youngs_modulus_gpa: l,
                        poisson_ratio: b,
                        tensile_strength_mpa: t,
                        yield_strength_mpa: rm,
                        endurance_limit_mpa: dp,
                    };
                }
                design.mount_radius_mm = rm;
                design.end_plate_diameter_mm = dp;
                design.bore = Bore {
                    diameter_mm: d,
                    minus_mm: a,
                    plus_mm: s,
                    pipe: pipe.then(|| PipeRef {
                        nps: "1-1/2".into(),
                        schedule: "80".into(),
                    }),
                    ..design.bore.clone()
                };
                design.friction = mu;
                design.actuator = match kind {
                    0 => Actuator::Direct {
                        max_force_n: a,
                        max_stroke_mm: s,
                        stiffness_n_per_mm: None,
                    },
                    1 => Actuator::Spool {
                        radius_mm: a,
                        max_torque_nm: s,
                        max_angle_deg: h,
                        stiffness_n_per_mm: None,
                    },
                    _ => Actuator::LeadScrew {
                        lead_mm: a,
                        efficiency: s,
                        max_torque_nm: h,
                        max_turns: mu,
                        stiffness_n_per_mm: None,
                    },
                };
                // Every spelling of the operating point, and a drive stiffness or none.
                match cycles % 4 {
                    0 => design.operating_stroke_mm = Some(h),
                    1 => design.operating = Some(Operating::Stroke(h)),
                    2 => design.operating = Some(Operating::Pull(h)),
                    _ => design.operating = Some(Operating::Torque(h)),
                }
                if design.operating.is_some() {
                    design.operating_stroke_mm = None;
                }
                if (cycles >> 2) % 2 == 1 {
                    design.actuator.set_stiffness_n_per_mm(Some(d));
                }
                design.duty.holding_force_n = h;
                design.duty.cycles = cycles;
                design
            },
        )
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, rng_seed: proptest::test_runner::RngSeed::Fixed(64), ..ProptestConfig::default() })]
    #[test]
    fn any_design_round_trips_exactly(d in arbitrary_design()) {
        let text = design::to_ron(&d).unwrap_or_else(|e| panic!("{e}"));
        // Read as the design reader reads: optional fields written as bare values.
        let back: Design = ron::Options::default()
            .with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
            .from_str(&text)
            .map_err(|e| TestCaseError::fail(format!("{e}\n{text}")))?;
        prop_assert_eq!(back, d);
    }
}

// ---------------------------------------------------------------- what loads

#[test]
fn issue_literal_loads_unchanged() {
    let d = design::parse(ISSUE_LITERAL).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(d.format, 1);
    assert_eq!(d.title, "...");
    assert_eq!(d.strip.count, 6);
    assert_eq!(
        (
            d.strip.free_length_mm,
            d.strip.width_mm,
            d.strip.thickness_mm
        ),
        (60.0, 6.0, 0.3)
    );
    assert_eq!(
        d.strip.material,
        MaterialChoice::Grade("carbon-1095-50hrc".into())
    );
    assert_eq!(
        (d.strip.ends, d.strip.stiffness),
        (Ends::Clamped, Stiffness::Auto)
    );
    assert_eq!((d.mount_radius_mm, d.end_plate_diameter_mm), (20.0, 40.0));
    assert_eq!(
        d.bore,
        Bore {
            diameter_mm: 58.6,
            minus_mm: 0.0,
            plus_mm: 0.0,
            pipe: None,
            out_of_round_mm: 0.0,
            bend: None,
        }
    );
    assert_eq!(d.friction, 0.3);
    assert_eq!(
        d.actuator,
        Actuator::Direct {
            max_force_n: 1000.0,
            max_stroke_mm: 10.0,
            stiffness_n_per_mm: None,
        }
    );
    assert_eq!(d.operating_stroke_mm, Some(4.0));
    assert_eq!(
        (d.duty.holding_force_n, d.duty.safety_factor, d.duty.cycles),
        (40.0, 2.0, 100_000)
    );
    // The literal's bore without a pipe is written back without a `pipe` field.
    assert!(!design::to_ron(&d).unwrap_or_default().contains("pipe"));
}

#[test]
fn issue_alternatives_load() {
    // The alternatives the issue lists in its comments.
    let custom = literal_with(
        r#"Grade("carbon-1095-50hrc")"#,
        r#"Custom(name: "test strip", youngs_modulus_gpa: 200.0, poisson_ratio: 0.3,
            tensile_strength_mpa: 1700.0, yield_strength_mpa: 1500.0, endurance_limit_mpa: 600.0)"#,
    );
    let d = design::parse(&custom).unwrap_or_else(|e| panic!("{e}"));
    assert!(matches!(
        d.strip.material,
        MaterialChoice::Custom {
            youngs_modulus_gpa: 200.0,
            endurance_limit_mpa: 600.0,
            ..
        }
    ));

    let hinged = literal_with(
        "ends: Clamped,\n            stiffness: Auto",
        "ends: Hinged, stiffness: Plate",
    );
    let d = design::parse(&hinged).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(
        (d.strip.ends, d.strip.stiffness),
        (Ends::Hinged, Stiffness::Plate)
    );

    let defaults = literal_with("ends: Clamped,\n            stiffness: Auto", "")
        .replace("    title: \"...\",\n", "");
    let d = design::parse(&defaults).unwrap_or_else(|e| panic!("{e}\n{defaults}"));
    assert_eq!(
        (d.strip.ends, d.strip.stiffness),
        (Ends::Clamped, Stiffness::Auto)
    );
    assert_eq!(d.title, "");

    for (actuator, expected) in [
        (
            "Spool(radius_mm: 8.0, max_torque_nm: 2.0, max_angle_deg: 720.0)",
            Actuator::Spool {
                radius_mm: 8.0,
                max_torque_nm: 2.0,
                max_angle_deg: 720.0,
                stiffness_n_per_mm: None,
            },
        ),
        (
            "LeadScrew(lead_mm: 2.0, efficiency: 0.4, max_torque_nm: 1.5, max_turns: 10.0)",
            Actuator::LeadScrew {
                lead_mm: 2.0,
                efficiency: 0.4,
                max_torque_nm: 1.5,
                max_turns: 10.0,
                stiffness_n_per_mm: None,
            },
        ),
    ] {
        let text = literal_with("Direct(max_force_n: 1000.0, max_stroke_mm: 10.0)", actuator);
        let d = design::parse(&text).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(d.actuator, expected);
    }
}

#[test]
fn pipe_bore_loads_as_inside_diameter() {
    // contract.md "Files": bore = OD - 2 x nominal wall, tolerances still apply.
    // NPS 2 Sch 40: OD 60.3 mm, wall 3.91 mm (ASME B36.10M, from memory) -> 52.48 mm.
    let text = literal_with(
        "bore: (diameter_mm: 58.6, minus_mm: 0.0, plus_mm: 0.0)",
        r#"bore: (minus_mm: 0.2, plus_mm: 0.4, pipe: Some((nps: "2", schedule: "40")))"#,
    );
    let d = design::parse(&text).unwrap_or_else(|e| panic!("{e}"));
    let nominal = d.bore.nominal_mm().unwrap_or_else(|e| panic!("{e}"));
    assert!((nominal - 52.48).abs() < 1e-9, "{nominal}");
    let smallest = d.bore.smallest_mm().unwrap_or_else(|e| panic!("{e}"));
    let largest = d.bore.largest_mm().unwrap_or_else(|e| panic!("{e}"));
    assert!((smallest - 52.28).abs() < 1e-9, "{smallest}");
    assert!((largest - 52.88).abs() < 1e-9, "{largest}");

    // The pipe takes precedence over a diameter also given.
    let both = text.replace("bore: (", "bore: (diameter_mm: 58.6, ");
    let d = design::parse(&both).unwrap_or_else(|e| panic!("{e}"));
    assert!((d.bore.nominal_mm().unwrap_or(f64::NAN) - 52.48).abs() < 1e-9);

    // A bore without a pipe is its diameter, minus and plus the tolerances.
    let plain = literal_with("minus_mm: 0.0, plus_mm: 0.0", "minus_mm: 0.1, plus_mm: 0.5");
    let d = design::parse(&plain).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(d.bore.nominal_mm().ok(), Some(58.6));
    assert!((d.bore.smallest_mm().unwrap_or(f64::NAN) - 58.5).abs() < 1e-12);
    assert!((d.bore.largest_mm().unwrap_or(f64::NAN) - 59.1).abs() < 1e-12);
}

#[test]
fn failing_designs_still_load() {
    // contract.md "Bad input versus a failing design": what a check judges still loads.
    let big_plate = literal_with("end_plate_diameter_mm: 40.0", "end_plate_diameter_mm: 90.0");
    assert!(
        design::parse(&big_plate).is_ok(),
        "end plate larger than 2 x mount radius"
    );
    let long_stroke = literal_with("operating_stroke_mm: 4.0", "operating_stroke_mm: 30.0");
    assert!(
        design::parse(&long_stroke).is_ok(),
        "stroke beyond the actuator's 10 mm"
    );
    let no_reach = literal_with("mount_radius_mm: 20.0", "mount_radius_mm: 40.0");
    assert!(design::parse(&no_reach).is_ok(), "hub larger than the bore");
    let sf_one = literal_with("safety_factor: 2.0", "safety_factor: 1.0");
    assert!(design::parse(&sf_one).is_ok(), "safety factor 1.0 is valid");
    let cycles_float = literal_with("cycles: 100000", "cycles: 1e6");
    assert_eq!(
        design::parse(&cycles_float).map(|d| d.duty.cycles).ok(),
        Some(1_000_000)
    );
}

// ---------------------------------------------------------------- refusals

#[test]
fn syntax_error_gives_line_and_column() {
    // A missing comma after the friction value: ron stops at the next field name.
    let text = literal_with("friction: 0.3,", "friction: 0.3");
    let e = parse_err(&text);
    let DesignError::Syntax { line, column, .. } = &e else {
        panic!("expected Syntax, got {e:?}");
    };
    assert_eq!(*line, position_of(&text, "actuator").0, "{e}");
    assert!(*column >= 1);
    assert!(
        e.to_string().starts_with(&format!("{line}:{column}: ")),
        "{e}"
    );
    assert!(
        e.in_file(Path::new("design.ron"))
            .starts_with(&format!("design.ron:{line}:{column}: ")),
        "{e}"
    );
}

#[test]
fn unknown_field_is_refused_by_name() {
    let text = literal_with("width_mm: 6.0,", "width_mm: 6.0, colour_code: 3,");
    let e = parse_err(&text);
    let DesignError::Syntax { line, .. } = &e else {
        panic!("expected Syntax, got {e:?}");
    };
    assert_eq!(*line, position_of(&text, "colour_code").0);
    assert!(e.to_string().contains("colour_code"), "{e}");

    // Also at the top level and inside an actuator variant.
    let top = literal_with("friction: 0.3,", "friction: 0.3, lubricant: \"oil\",");
    assert!(matches!(parse_err(&top), DesignError::Syntax { .. }));
    let variant = literal_with(
        "max_stroke_mm: 10.0",
        "max_stroke_mm: 10.0, speed_mm_s: 5.0",
    );
    let e = parse_err(&variant);
    assert!(
        matches!(e, DesignError::Syntax { .. }) && e.to_string().contains("speed_mm_s"),
        "{e}"
    );
}

#[test]
fn missing_field_is_named() {
    let text = literal_with("    friction: 0.3,\n", "");
    let e = parse_err(&text);
    assert!(matches!(e, DesignError::Syntax { .. }), "{e:?}");
    assert!(e.to_string().contains("friction"), "{e}");
}

#[test]
fn unknown_format_names_the_supported_one() {
    // A later format with fields this version does not know: the format is named, not
    // the fields.
    let future = literal_with("format: 1,", "format: 2,\n    coating: \"zinc\",");
    assert!(
        matches!(
            parse_err(&future).kind(),
            DesignError::UnknownFormat { found: 2 }
        ),
        "{future}"
    );
    let text = literal_with("format: 1,", "format: 2,");
    let e = parse_err(&text);
    assert!(
        matches!(e.kind(), DesignError::UnknownFormat { found: 2 }),
        "{e:?}"
    );
    // Issue 11, item 11: it carries line:column.
    assert_eq!(e.position(), Some(value_position(&text, "format: 2")));
    let message = e.to_string();
    assert!(
        message.contains('2') && message.contains("format 1"),
        "{message}"
    );
}

/// Asserts an OutOfRange refusal for `field`, at the value of the `key: value` `entry`,
/// whose message names the field and the range.
fn assert_out_of_range(text: &str, entry: &str, field: &str, range: &str) -> f64 {
    let e = parse_err(text);
    let DesignError::OutOfRange {
        field: f,
        value,
        line,
        column,
        ..
    } = &e
    else {
        panic!("expected OutOfRange for {field}, got {e:?}");
    };
    assert_eq!(f, field);
    let (l, c) = value_position(text, entry);
    assert_eq!((*line, *column), (Some(l), Some(c)), "{e}");
    let message = e.to_string();
    assert!(
        message.starts_with(&format!("{l}:{c}: {field} = ")),
        "{message}"
    );
    assert!(message.contains(range), "{message} should state {range}");
    *value
}

#[test]
fn nan_is_refused_with_position_and_range() {
    let text = literal_with("thickness_mm: 0.3", "thickness_mm: NaN");
    let value = assert_out_of_range(
        &text,
        "thickness_mm: NaN",
        "strip.thickness_mm",
        "0.02 to 5 mm",
    );
    assert!(value.is_nan());
    assert!(parse_err(&text).to_string().contains("not a finite number"));
}

#[test]
fn infinity_is_refused() {
    let text = literal_with("friction: 0.3", "friction: inf");
    let value = assert_out_of_range(&text, "friction: inf", "friction", "0.01 to 2");
    assert!(value.is_infinite());
    let text = literal_with("holding_force_n: 40.0", "holding_force_n: -inf");
    assert_out_of_range(
        &text,
        "holding_force_n: -inf",
        "duty.holding_force_n",
        "0 to 1e7 N",
    );
}

#[test]
fn negative_length_is_refused() {
    let text = literal_with("free_length_mm: 60.0", "free_length_mm: -60.0");
    let value = assert_out_of_range(
        &text,
        "free_length_mm: -60.0",
        "strip.free_length_mm",
        "5 to 2000 mm",
    );
    assert_eq!(value, -60.0);
}

#[test]
fn zero_thickness_is_refused_with_the_full_message() {
    let text = literal_with("thickness_mm: 0.3", "thickness_mm: 0.0");
    assert_out_of_range(
        &text,
        "thickness_mm: 0.0",
        "strip.thickness_mm",
        "0.02 to 5 mm",
    );
    let (l, c) = value_position(&text, "thickness_mm: 0.0");
    assert_eq!(
        parse_err(&text).in_file(Path::new("design.ron")),
        format!(
            "design.ron:{l}:{c}: strip.thickness_mm = 0 mm is outside the allowed range 0.02 to 5 mm"
        )
    );
    // The brief's example message, value 7 mm.
    let text = literal_with("thickness_mm: 0.3", "thickness_mm: 7");
    let (l, c) = value_position(&text, "thickness_mm: 7");
    assert_eq!(
        parse_err(&text).in_file(Path::new("design.ron")),
        format!(
            "design.ron:{l}:{c}: strip.thickness_mm = 7 mm is outside the allowed range 0.02 to 5 mm"
        )
    );
}

#[test]
fn strip_count_outside_3_to_64_is_refused() {
    let text = literal_with("count: 6", "count: 65");
    let value = assert_out_of_range(&text, "count: 65", "strip.count", "3 to 64");
    assert_eq!(value, 65.0);
    // Issue 11, item 11: two strips gave a hub margin of 6.5e19 mm (2 r tan(pi/2)); the
    // range starts at three.
    let text = literal_with("count: 6", "count: 2");
    assert_out_of_range(&text, "count: 2", "strip.count", "3 to 64");
    assert!(design::parse(&literal_with("count: 6", "count: 64")).is_ok());
    assert!(design::parse(&literal_with("count: 6", "count: 3")).is_ok());
}

#[test]
fn nested_and_relative_limits_are_refused_where_they_are() {
    // A custom material value: the path runs through the variant.
    let custom = literal_with(
        r#"Grade("carbon-1095-50hrc")"#,
        r#"Custom(name: "x", youngs_modulus_gpa: 200.0, poisson_ratio: 0.7,
            tensile_strength_mpa: 1700.0, yield_strength_mpa: 1500.0, endurance_limit_mpa: 600.0)"#,
    );
    assert_out_of_range(
        &custom,
        "poisson_ratio: 0.7",
        "strip.material.poisson_ratio",
        "0 to 0.5",
    );
    // Efficiency from 0.01 (issue 11, item 11: 5e-324 needed an infinite torque); 1 is
    // allowed.
    let screw = literal_with(
        "Direct(max_force_n: 1000.0, max_stroke_mm: 10.0)",
        "LeadScrew(lead_mm: 2.0, efficiency: 0.0, max_torque_nm: 1.5, max_turns: 10.0)",
    );
    assert_out_of_range(
        &screw,
        "efficiency: 0.0",
        "actuator.efficiency",
        "0.01 to 1",
    );
    let tiny = screw.replace("efficiency: 0.0", "efficiency: 5e-324");
    assert_out_of_range(
        &tiny,
        "efficiency: 5e-324",
        "actuator.efficiency",
        "0.01 to 1",
    );
    assert!(parse_err(&tiny).to_string().contains("= 5e-324 is outside"));
    assert!(design::parse(&screw.replace("efficiency: 0.0", "efficiency: 1.0")).is_ok());
    // Actuator ratings from a millionth, below a billion.
    let weak = literal_with("max_force_n: 1000.0", "max_force_n: 0.0");
    assert_out_of_range(
        &weak,
        "max_force_n: 0.0",
        "actuator.max_force_n",
        "from 1e-6, less than 1e9 N",
    );
    // Tolerances up to a quarter of the bore: 0.25 x 58.6 = 14.65 mm.
    let loose = literal_with("minus_mm: 0.0", "minus_mm: 15.0");
    assert_out_of_range(&loose, "minus_mm: 15.0", "bore.minus_mm", "0 to 14.65 mm");
    // Operating stroke up to the free length (60 mm).
    let far = literal_with("operating_stroke_mm: 4.0", "operating_stroke_mm: 61.0");
    assert_out_of_range(
        &far,
        "operating_stroke_mm: 61.0",
        "operating_stroke_mm",
        "0 to 60 mm",
    );
    // Cycles from 1.
    let none = literal_with("cycles: 100000", "cycles: 0");
    assert_out_of_range(&none, "cycles: 0", "duty.cycles", "1 to 1e12");
    // A safety factor below 1.
    let low = literal_with("safety_factor: 2.0", "safety_factor: 0.9");
    assert_out_of_range(&low, "safety_factor: 0.9", "duty.safety_factor", "1 to 100");
}

#[test]
fn unknown_grade_lists_the_known_ones() {
    let text = literal_with("carbon-1095-50hrc", "unobtainium-9");
    let e = parse_err(&text);
    // Issue 11, item 11: at the material's line and column.
    assert_eq!(e.position(), Some(position_of(&text, "Grade(")));
    let DesignError::UnknownGrade { id, known } = e.kind() else {
        panic!("expected UnknownGrade, got {e:?}");
    };
    assert_eq!(id, "unobtainium-9");
    // Grade ids the material table promises (file-format brief).
    for grade in [
        "carbon-1095-44hrc",
        "carbon-1095-50hrc",
        "ss301-half-hard",
        "ss301-full-hard",
        "17-7ph-ch900",
    ] {
        assert!(
            known.iter().any(|k| k == grade),
            "{grade} missing from {known:?}"
        );
    }
    let message = e.to_string();
    assert!(
        message.contains("unobtainium-9") && message.contains("ss301-full-hard"),
        "{message}"
    );
}

#[test]
fn unknown_pipe_is_refused() {
    let text = literal_with(
        "bore: (diameter_mm: 58.6, minus_mm: 0.0, plus_mm: 0.0)",
        r#"bore: (pipe: Some((nps: "2", schedule: "999")))"#,
    );
    let e = parse_err(&text);
    assert!(
        matches!(e.kind(), DesignError::UnknownPipe { nps, schedule } if nps == "2" && schedule == "999"),
        "{e:?}"
    );
    assert_eq!(e.position(), Some(position_of(&text, "Some((")));
    let message = e.to_string();
    assert!(
        message.contains("bore.pipe") && message.contains("999"),
        "{message}"
    );
}

#[test]
fn inconsistent_custom_material_is_invalid() {
    let text = literal_with(
        r#"Grade("carbon-1095-50hrc")"#,
        r#"Custom(name: "x", youngs_modulus_gpa: 200.0, poisson_ratio: 0.3,
            tensile_strength_mpa: 1000.0, yield_strength_mpa: 1500.0, endurance_limit_mpa: 600.0)"#,
    );
    let e = parse_err(&text);
    assert!(
        matches!(e.kind(), DesignError::Invalid { field, .. } if field == "strip.material.yield_strength_mpa"),
        "{e:?}"
    );
    // Issue 11, item 11: at the yield strength's value.
    assert_eq!(
        e.position(),
        Some(value_position(&text, "yield_strength_mpa: 1500.0"))
    );
}

// ---------------------------------------------------------------- saving

#[test]
fn save_atomic_writes_a_file_that_loads_back() {
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let path = dir.path().join("design.ron");
    let first = Design::default();
    design::save_atomic(&path, &first).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(design::load(&path).ok(), Some(first.clone()));

    // Overwriting replaces the content and leaves no temporary file behind.
    let mut second = first.clone();
    second.title = "second".into();
    design::save_atomic(&path, &second).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(design::load(&path).ok(), Some(second));
    let names: Vec<_> = fs::read_dir(dir.path())
        .unwrap_or_else(|e| panic!("{e}"))
        .filter_map(|entry| entry.ok().map(|e| e.file_name()))
        .collect();
    assert_eq!(names, vec![std::ffi::OsString::from("design.ron")]);
}

#[test]
fn save_into_a_missing_directory_fails_with_io() {
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let path = dir.path().join("no-such-dir").join("design.ron");
    let e = match design::save_atomic(&path, &Design::default()) {
        Ok(()) => panic!("saved into a missing directory"),
        Err(e) => e,
    };
    assert!(
        matches!(&e, DesignError::Write(w) if w.path() == path),
        "{e:?}"
    );
    assert!(e.to_string().starts_with("cannot write "), "{e}");
    assert!(!path.exists());
}

#[test]
fn failed_saves_leave_the_old_file_intact() {
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let old = dir.path().join("design.ron");
    fs::write(&old, ISSUE_LITERAL).unwrap_or_else(|e| panic!("{e}"));

    // A path under a regular file: its parent cannot hold files (root ignores
    // permission bits, so this stands in for a read-only place).
    let under_file = old.join("inner.ron");
    let e = design::save_atomic(&under_file, &Design::default()).err();
    assert!(matches!(e, Some(DesignError::Write(_))), "{e:?}");

    // A directory as the target: the rename over it fails; its content stays.
    let target_dir = dir.path().join("folder.ron");
    fs::create_dir(&target_dir).unwrap_or_else(|e| panic!("{e}"));
    fs::write(target_dir.join("keep.txt"), "keep").unwrap_or_else(|e| panic!("{e}"));
    let e = design::save_atomic(&target_dir, &Design::default()).err();
    assert!(matches!(e, Some(DesignError::Write(_))), "{e:?}");
    assert_eq!(
        fs::read_to_string(target_dir.join("keep.txt"))
            .ok()
            .as_deref(),
        Some("keep")
    );

    // The old file is byte-for-byte unchanged and no temporary file is left.
    assert_eq!(
        fs::read_to_string(&old).ok().as_deref(),
        Some(ISSUE_LITERAL)
    );
    let mut names: Vec<_> = fs::read_dir(dir.path())
        .unwrap_or_else(|e| panic!("{e}"))
        .filter_map(|entry| {
            entry
                .ok()
                .map(|e| e.file_name().to_string_lossy().into_owned())
        })
        .collect();
    names.sort();
    assert_eq!(
        names,
        vec!["design.ron".to_string(), "folder.ron".to_string()]
    );
}

#[test]
fn reading_a_missing_file_fails_with_io() {
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let path = dir.path().join("absent.ron");
    let e = design::load(&path).err();
    assert!(matches!(&e, Some(DesignError::Io { .. })), "{e:?}");
    let message = e.map(|e| e.to_string()).unwrap_or_default();
    assert!(
        message.starts_with("cannot read ") && message.contains("absent.ron"),
        "{message}"
    );
}

// ---------------------------------------------------------------- bounded loading (issue 11, items 7 and 8)

#[test]
fn deep_nesting_is_refused_before_the_parser_runs() {
    // The issue's 30,000-level file and its 100,000 nested fields (about 300 KB). The
    // refusal comes from one linear pre-scan; no time is asserted (project rules).
    let deep = format!("{}{}", "(".repeat(30_000), ")".repeat(30_000));
    let e = parse_err(&deep);
    assert_eq!(e.position(), Some((1, 65)), "{e}");
    assert!(e.to_string().contains("deeper than 64 levels"), "{e}");
    let fields = format!("Design({}{})", "a:(".repeat(100_000), ")".repeat(100_000));
    let e = parse_err(&fields);
    assert!(e.to_string().contains("deeper than 64 levels"), "{e}");
    // Brackets in strings and comments do not count.
    let quoted = literal_with(
        "title: \"...\"",
        &format!("title: \"{}\" // {}", "(".repeat(100), "[".repeat(100)),
    );
    assert!(!parse_err(&quoted).to_string().contains("deeper"));
}

#[test]
fn a_file_over_a_mebibyte_is_refused_unread() {
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let path = dir.path().join("huge.ron");
    // A sparse 64 MB file (the issue's size): refused from its size alone.
    let file = fs::File::create(&path).unwrap_or_else(|e| panic!("{e}"));
    file.set_len(64 << 20).unwrap_or_else(|e| panic!("{e}"));
    let e = design::load(&path).err();
    assert!(
        matches!(&e, Some(DesignError::TooLarge { max_bytes, .. }) if *max_bytes == design::MAX_FILE_BYTES),
        "{e:?}"
    );
    let message = e.map(|e| e.to_string()).unwrap_or_default();
    assert!(
        message.contains("huge.ron") && message.contains("at most 1048576 bytes"),
        "{message}"
    );
    // Exactly at the limit is still read (and refused only as text).
    file.set_len(design::MAX_FILE_BYTES)
        .unwrap_or_else(|e| panic!("{e}"));
    assert!(!matches!(
        design::load(&path),
        Err(DesignError::TooLarge { .. })
    ));
}

#[cfg(unix)]
#[test]
fn devices_fifos_and_folders_are_refused_unopened() {
    let e = design::load(Path::new("/dev/zero")).err();
    assert!(
        matches!(&e, Some(DesignError::NotAFile { what, .. }) if what.contains("device")),
        "{e:?}"
    );
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let e = design::load(dir.path()).err();
    assert!(
        e.as_ref()
            .is_some_and(|e| e.to_string().ends_with("is a folder, not a design file")),
        "{e:?}"
    );
    // A FIFO would block the reader for ever; it is refused without being opened.
    let fifo = dir.path().join("pipe.ron");
    let made = std::process::Command::new("mkfifo").arg(&fifo).status();
    if made.is_ok_and(|s| s.success()) {
        let e = design::load(&fifo).err();
        assert!(
            e.as_ref().is_some_and(|e| e
                .to_string()
                .contains("a named pipe (FIFO), not a design file")),
            "{e:?}"
        );
    }
}

#[test]
fn a_byte_order_mark_is_skipped() {
    // Issue 11, item 11 (UTF-8 files from some editors start with U+FEFF).
    let text = format!("\u{feff}{ISSUE_LITERAL}");
    assert_eq!(design::parse(&text).ok(), design::parse(ISSUE_LITERAL).ok());
}

#[test]
fn bytes_that_are_not_utf8_are_refused_where_they_are() {
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let path = dir.path().join("latin1.ron");
    let mut bytes = ISSUE_LITERAL.as_bytes().to_vec();
    let at = ISSUE_LITERAL.find("\"...\"").unwrap_or(0) + 1;
    bytes[at] = 0xE9;
    fs::write(&path, bytes).unwrap_or_else(|e| panic!("{e}"));
    let e = design::load(&path).err();
    assert_eq!(e.as_ref().and_then(DesignError::position), Some((3, 13)));
    assert!(e.is_some_and(|e| e.to_string().contains("not UTF-8")));
}

// ---------------------------------------------------------------- messages (issue 11, item 11)

#[test]
fn a_decimal_count_asks_for_a_whole_number() {
    let text = literal_with("count: 6", "count: 10.0");
    let e = parse_err(&text);
    assert_eq!(e.position(), Some(value_position(&text, "count: 10.0")));
    assert!(
        e.to_string()
            .contains("strip.count = 10.0: a whole number is expected"),
        "{e}"
    );
}

#[test]
fn a_number_with_a_unit_asks_for_a_plain_number() {
    let text = literal_with("free_length_mm: 60.0", "free_length_mm: 90mm");
    let e = parse_err(&text);
    assert_eq!(
        e.position(),
        Some(value_position(&text, "free_length_mm: 90mm"))
    );
    assert!(
        e.to_string()
            .contains("strip.free_length_mm = 90mm: a plain number is expected"),
        "{e}"
    );
}

#[test]
fn an_unclosed_string_is_reported_where_it_opens() {
    // The closing quote of the title is missing: the string swallows the next lines up to
    // the grade's first quote, and the parser stops several lines later.
    let text = literal_with("title: \"...\",", "title: \"...,");
    let e = parse_err(&text);
    assert_eq!(
        e.position(),
        Some(value_position(&text, "title: \"...,")),
        "{e}"
    );
    assert!(e.to_string().contains("closing quote is missing"), "{e}");
    // Never closed at all, at the end of the text.
    let cut = &ISSUE_LITERAL[..ISSUE_LITERAL.find("...").unwrap_or(0)];
    let e = parse_err(cut);
    assert_eq!(e.position(), Some(value_position(cut, "title: \"")));
    assert!(e.to_string().contains("never closed"), "{e}");
}

#[test]
fn far_too_many_cycles_are_out_of_range_not_unwhole() {
    let text = literal_with("cycles: 100000", "cycles: 1e20");
    let message = parse_err(&text).to_string();
    assert!(
        message.contains("duty.cycles = 1e20 is outside the allowed range 1 to 1e12"),
        "{message}"
    );
    let half = literal_with("cycles: 100000", "cycles: 1.5");
    assert!(parse_err(&half).to_string().contains("not a whole number"));
}

#[test]
fn tiny_and_huge_values_print_without_hundreds_of_digits() {
    // show_number: shortest round-trip text for ordinary magnitudes, exponents past them.
    assert_eq!(design::show_number(14.65), "14.65");
    assert_eq!(design::show_number(1e-300), "1e-300");
    assert_eq!(design::show_number(6.5e19), "6.5e19");
    assert_eq!(design::show_number(1e12), "1e12");
    assert_eq!(design::show_number(-0.0), "0");
    let text = literal_with("thickness_mm: 0.3", "thickness_mm: 1e-300");
    let message = parse_err(&text).to_string();
    assert!(message.contains("= 1e-300 mm is outside"), "{message}");
    assert!(message.len() < 200, "{message}");
}

#[test]
fn a_title_over_the_limit_is_refused_with_the_limit() {
    // Issue 11, item 9: the limit stands in design::limits().
    assert_eq!(design::MAX_TITLE_CHARS, 200);
    assert!(design::limit("title").is_some());
    let long = "x".repeat(201);
    let text = literal_with("title: \"...\"", &format!("title: \"{long}\""));
    assert_out_of_range(
        &text,
        &format!("title: \"{long}\""),
        "title",
        "0 to 200 characters",
    );
    let fits = literal_with("title: \"...\"", &format!("title: \"{}\"", "é".repeat(200)));
    assert!(design::parse(&fits).is_ok());
}

// ---------------------------------------------------------------- keeping comments (issue 11, item 4)

/// The lines of `text` that hold a comment.
fn comment_lines(text: &str) -> Vec<&str> {
    text.lines().filter(|l| l.contains("//")).collect()
}

#[test]
fn saving_an_opened_sample_keeps_every_comment() {
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    for name in SAMPLES {
        let original =
            fs::read_to_string(sample_path(name)).unwrap_or_else(|e| panic!("{name}: {e}"));
        let mut d = design::parse(&original).unwrap_or_else(|e| panic!("{name}: {e}"));
        d.friction = 0.27;
        d.strip.thickness_mm *= 1.1;
        d.title = format!("{} (edited)", d.title);
        let plan = design::save_text(Some(&original), &d).unwrap_or_else(|e| panic!("{e}"));
        let design::SaveText::InPlace(text) = &plan else {
            panic!("{name}: not edited in place: {plan:?}");
        };
        let path = dir.path().join(name);
        bowgrip::atomic::write(&path, text.as_bytes()).unwrap_or_else(|e| panic!("{e}"));
        let saved = fs::read_to_string(&path).unwrap_or_else(|e| panic!("{e}"));
        // Every comment line survives, byte for byte (none of them held an edited value).
        for line in comment_lines(&original) {
            assert!(saved.contains(line), "{name}: lost {line:?}");
        }
        assert_eq!(saved.lines().count(), original.lines().count(), "{name}");
        // A file with a pipe size is saved with the bore that size gives (issue 16, item 5);
        // a file that leaves the field out keeps it out (the riser sample).
        let mut expected = d.clone();
        if expected.bore.pipe.is_some()
            && (original.contains(" diameter_mm:") || original.contains("(diameter_mm:"))
        {
            expected.bore.diameter_mm =
                expected.bore.nominal_mm().unwrap_or_else(|e| panic!("{e}"));
        }
        assert_eq!(
            design::load(&path).ok(),
            Some(expected),
            "{name} reads back"
        );
    }
}

/// Issue 16, item 5: the demo (70 mm bore) switched to NPS 3 Schedule 40 is saved with the
/// bore that pipe size gives, not the demo's stale 70 mm. NPS 3 Sch 40: OD 88.9 mm, wall
/// 5.49 mm (ASME B36.10M), bore 88.9 - 2 x 5.49 = 77.92 mm.
#[test]
fn a_pipe_size_is_saved_with_its_own_bore() {
    let mut d = Design::default();
    d.bore.pipe = Some(design::PipeRef {
        nps: "3".to_string(),
        schedule: "40".to_string(),
    });
    let plan = design::save_text(None, &d).unwrap_or_else(|e| panic!("{e}"));
    let saved = design::parse(plan.text()).unwrap_or_else(|e| panic!("{e}"));
    assert!(
        (saved.bore.diameter_mm - 77.92).abs() < 1e-9,
        "{}",
        saved.bore.diameter_mm
    );
    assert!(
        !plan.text().contains("diameter_mm: 70.0"),
        "{}",
        plan.text()
    );
    // The bore the checks use is the pipe's either way.
    assert_eq!(saved.bore.nominal_mm().ok(), d.bore.nominal_mm().ok());
}

#[test]
fn a_structural_change_is_rewritten_and_says_so_first() {
    let original = fs::read_to_string(sample_path(SAMPLES[0])).unwrap_or_else(|e| panic!("{e}"));
    let mut d = design::parse(&original).unwrap_or_else(|e| panic!("{e}"));
    d.actuator = Actuator::Direct {
        max_force_n: 500.0,
        max_stroke_mm: 12.0,
        stiffness_n_per_mm: None,
    };
    let plan = design::save_text(Some(&original), &d).unwrap_or_else(|e| panic!("{e}"));
    assert!(plan.loses_layout(), "{plan:?}");
    let design::SaveText::Whole {
        text,
        why: Some(why),
    } = &plan
    else {
        panic!("{plan:?}");
    };
    assert!(why.why.contains("structure"), "{why:?}");
    let mut expected = d.clone();
    expected.bore.diameter_mm = d.bore.nominal_mm().unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(design::parse(text).ok(), Some(expected));
    // A new file has nothing to lose.
    let fresh = design::save_text(None, &Design::default()).unwrap_or_else(|e| panic!("{e}"));
    assert!(!fresh.loses_layout());
    // A value the file leaves to its default has no place to go either.
    let mut hinged = design::parse(
        ISSUE_LITERAL
            .replace("            ends: Clamped,\n", "")
            .as_str(),
    )
    .unwrap_or_else(|e| panic!("{e}"));
    hinged.strip.ends = Ends::Hinged;
    let without = ISSUE_LITERAL.replace("            ends: Clamped,\n", "");
    let e = design::edit_in_place(&without, &hinged).err();
    assert!(e.is_some_and(|r| r.why.contains("strip.ends")));
}

// ---------------------------------------------------------------- saving over links and locked files (issue 11, item 5)

#[cfg(unix)]
#[test]
fn saving_over_a_link_writes_its_target_and_keeps_the_link() {
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let real = dir.path().join("real.ron");
    fs::write(&real, ISSUE_LITERAL).unwrap_or_else(|e| panic!("{e}"));
    let link = dir.path().join("link.ron");
    std::os::unix::fs::symlink(&real, &link).unwrap_or_else(|e| panic!("{e}"));
    let mut d = design::load(&link).unwrap_or_else(|e| panic!("{e}"));
    d.friction = 0.4;
    design::save_atomic(&link, &d).unwrap_or_else(|e| panic!("{e}"));
    let meta = fs::symlink_metadata(&link).unwrap_or_else(|e| panic!("{e}"));
    assert!(meta.file_type().is_symlink(), "the link stays a link");
    assert_eq!(design::load(&real).ok(), Some(d));
}

#[test]
fn a_read_only_file_is_refused_and_the_app_keeps_the_design_unsaved() {
    use bowgrip::app::{Command, Gesture, GripApp};
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let path = dir.path().join("locked.ron");
    fs::write(&path, ISSUE_LITERAL).unwrap_or_else(|e| panic!("{e}"));
    let mut perms = fs::metadata(&path)
        .unwrap_or_else(|e| panic!("{e}"))
        .permissions();
    perms.set_readonly(true);
    fs::set_permissions(&path, perms).unwrap_or_else(|e| panic!("{e}"));

    let mut app = GripApp::new(dir.path().join("state"), Some(path.clone()));
    let mut edited = app.design().clone();
    edited.friction = 0.35;
    app.push(Command::Edit(Box::new(edited.clone()), Gesture::Done));
    app.push(Command::Save);
    app.apply();
    let status = app.status().cloned().unwrap_or_else(|| panic!("no status"));
    assert!(status.is_error, "{status:?}");
    assert!(status.text.contains("read-only"), "{}", status.text);
    assert!(app.is_dirty(), "the design stays open and unsaved");
    assert_eq!(*app.design(), edited);
    assert_eq!(
        fs::read_to_string(&path).ok().as_deref(),
        Some(ISSUE_LITERAL),
        "the file is untouched"
    );
}
