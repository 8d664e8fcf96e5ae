//! The embedded data tables (strip grades, pipe sizes, friction pairs) against the
//! standards and handbook rules they quote, plus the table invariants the mechanics rely on.

use std::collections::HashSet;

use bowgrip::{friction, material, pipe};

/// ksi to MPa: 1 ksi = 6.894757 MPa (exact definition via lbf and inch, rounded).
const MPA_PER_KSI: f64 = 6.894_757;

// ---------------------------------------------------------------- pipe sizes

#[test]
fn pipe_spot_checks_against_b36_10m() {
    // ASME B36.10M, metric columns (from memory; the values the brief quotes).
    let nps2 = pipe::find("2", "40").expect("NPS 2 Sch 40");
    assert_eq!(nps2.outside_diameter_mm, 60.3);
    assert_eq!(nps2.wall_mm, 3.91);
    assert!(
        (nps2.inside_diameter_mm() - 52.5).abs() < 0.05,
        "NPS 2 Sch 40 ID 52.5 mm"
    );
    assert_eq!(pipe::find("2", "80").map(|p| p.wall_mm), Some(5.54));

    let nps4 = pipe::find("4", "40").expect("NPS 4 Sch 40");
    assert_eq!((nps4.outside_diameter_mm, nps4.wall_mm), (114.3, 6.02));

    let nps12 = pipe::find("12", "40").expect("NPS 12 Sch 40");
    assert_eq!((nps12.outside_diameter_mm, nps12.wall_mm), (323.8, 10.31));
    assert_eq!(pipe::find("12", "80").map(|p| p.wall_mm), Some(17.48));

    // NPS 1-1/2 under both spellings; ID = 48.3 - 2 x 3.68 = 40.94 mm.
    let nps1_5 = pipe::find("1 1/2", "40").expect("NPS 1 1/2 Sch 40");
    assert_eq!(nps1_5.nps, "1-1/2");
    assert!((nps1_5.inside_diameter_mm() - 40.94).abs() < 1e-9);
}

/// ASME B36.10M inch columns (from memory): OD in, Sch 40 wall in, Sch 80 wall in, and the
/// Schedule 10S wall of ASME B36.19M in. The metric columns are these converted at
/// 25.4 mm/in and rounded (OD to 0.1 mm, walls to 0.01 mm).
#[allow(clippy::approx_constant)] // 0.318 in is a wall thickness, not 1/pi
const INCH_TABLE: [(&str, f64, f64, f64, f64); 15] = [
    ("1/2", 0.840, 0.109, 0.147, 0.083),
    ("3/4", 1.050, 0.113, 0.154, 0.083),
    ("1", 1.315, 0.133, 0.179, 0.109),
    ("1-1/4", 1.660, 0.140, 0.191, 0.109),
    ("1-1/2", 1.900, 0.145, 0.200, 0.109),
    ("2", 2.375, 0.154, 0.218, 0.109),
    ("2-1/2", 2.875, 0.203, 0.276, 0.120),
    ("3", 3.500, 0.216, 0.300, 0.120),
    ("3-1/2", 4.000, 0.226, 0.318, 0.120),
    ("4", 4.500, 0.237, 0.337, 0.120),
    ("5", 5.563, 0.258, 0.375, 0.134),
    ("6", 6.625, 0.280, 0.432, 0.134),
    ("8", 8.625, 0.322, 0.500, 0.148),
    ("10", 10.750, 0.365, 0.594, 0.165),
    ("12", 12.750, 0.406, 0.688, 0.180),
];

#[test]
fn pipe_metric_table_is_the_inch_table_converted() {
    for (nps, od_in, w40_in, w80_in, w10_in) in INCH_TABLE {
        for (schedule, wall_in) in [("10", w10_in), ("40", w40_in), ("80", w80_in)] {
            let row = pipe::find(nps, schedule)
                .unwrap_or_else(|| panic!("NPS {nps} Sch {schedule} missing"));
            // 10.750 in = 273.05 mm and 12.750 in = 323.85 mm sit on a rounding boundary;
            // the standard prints 273.0 and 323.8, hence 0.051 rather than 0.05.
            assert!(
                (row.outside_diameter_mm - od_in * 25.4).abs() <= 0.051,
                "NPS {nps} OD {} mm vs {od_in} in",
                row.outside_diameter_mm
            );
            assert!(
                (row.wall_mm - wall_in * 25.4).abs() <= 0.005 + 1e-9,
                "NPS {nps} Sch {schedule} wall {} mm vs {wall_in} in",
                row.wall_mm
            );
        }
    }
    assert_eq!(
        pipe::table().len(),
        INCH_TABLE.len() * 3,
        "no rows beyond the inch table"
    );
}

#[test]
fn pipe_rows_carry_sources_and_lists_follow_size_order() {
    let mut seen = HashSet::new();
    for row in pipe::table() {
        assert!(
            !row.source.trim().is_empty(),
            "NPS {} Sch {}: no source",
            row.nps,
            row.schedule
        );
        assert!(
            seen.insert((row.nps.as_str(), row.schedule.as_str())),
            "duplicate {row:?}"
        );
        assert!(
            row.wall_mm > 0.0 && row.inside_diameter_mm() > 0.0,
            "{row:?}"
        );
        if row.schedule == "10" {
            // The brief: a Sch 10 value borrowed from B36.19M must name it.
            assert!(
                row.source.contains("B36.19M"),
                "NPS {} Sch 10 source",
                row.nps
            );
        }
    }
    let sizes: Vec<&str> = INCH_TABLE.iter().map(|r| r.0).collect();
    assert_eq!(pipe::nps_list(), sizes);
    assert_eq!(pipe::schedules_for("3-1/2"), vec!["10", "40", "80"]);
    assert!(pipe::find("2", "160").is_none());
    assert!(pipe::find("2.5", "40").is_none());
}

// ---------------------------------------------------------------- strip grades

#[test]
fn required_grades_are_present() {
    for id in [
        "carbon-1095-44hrc",
        "carbon-1095-50hrc",
        "ss301-half-hard",
        "ss301-full-hard",
        "17-7ph-ch900",
    ] {
        let m = material::find(id).unwrap_or_else(|| panic!("grade {id} missing"));
        assert_eq!(m.id, id);
    }
    assert!(material::find("no-such-grade").is_none());
    let ids = material::ids();
    assert_eq!(ids.len(), material::library().len());
    assert_eq!(
        ids.iter().collect::<HashSet<_>>().len(),
        ids.len(),
        "ids unique"
    );
}

#[test]
fn grades_are_physically_consistent() {
    for m in material::library() {
        let id = &m.id;
        assert!(
            id.chars()
                .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-'),
            "{id}: kebab-case"
        );
        assert!(m.yield_strength_mpa > 0.0, "{id}: yield > 0");
        assert!(
            m.tensile_strength_mpa > m.yield_strength_mpa,
            "{id}: tensile > yield"
        );
        assert!(m.endurance_limit_mpa > 0.0, "{id}: endurance > 0");
        assert!(
            m.endurance_limit_mpa < m.tensile_strength_mpa,
            "{id}: endurance < tensile"
        );
        assert!(
            m.poisson_ratio > 0.0 && m.poisson_ratio < 0.5,
            "{id}: 0 < nu < 0.5"
        );
        // Steels: 190-210 GPa is the usual handbook span (common practice).
        assert!(
            (185.0..=215.0).contains(&m.youngs_modulus_gpa),
            "{id}: modulus"
        );
        let s = &m.sources;
        for (what, src) in [
            ("modulus", &s.modulus),
            ("poisson", &s.poisson),
            ("tensile", &s.tensile),
            ("yield", &s.yield_strength),
            ("endurance", &s.endurance),
        ] {
            assert!(!src.trim().is_empty(), "{id}: no {what} source");
        }
        assert!(
            !m.name.trim().is_empty() && !m.note.trim().is_empty(),
            "{id}: name, note"
        );
    }
}

#[test]
fn ss301_matches_astm_a666_minimums() {
    // ASTM A666, type 301 (from memory of the mechanical-property table):
    // 1/2 hard 150 ksi tensile / 110 ksi yield, printed as 1035 / 760 MPa;
    // full hard 185 ksi / 140 ksi, printed as 1275 / 965 MPa.
    for (id, tensile_ksi, yield_ksi, tensile_mpa, yield_mpa) in [
        ("ss301-half-hard", 150.0, 110.0, 1035.0, 760.0),
        ("ss301-full-hard", 185.0, 140.0, 1275.0, 965.0),
    ] {
        let m = material::find(id).expect(id);
        assert_eq!(m.tensile_strength_mpa, tensile_mpa, "{id} tensile");
        assert_eq!(m.yield_strength_mpa, yield_mpa, "{id} yield");
        // The standard rounds the conversion to 5 MPa.
        assert!(
            (tensile_ksi * MPA_PER_KSI - tensile_mpa).abs() <= 2.5,
            "{id}"
        );
        assert!((yield_ksi * MPA_PER_KSI - yield_mpa).abs() <= 2.5, "{id}");
        assert!(m.sources.tensile.contains("A666") && m.sources.yield_strength.contains("A666"));
    }
}

#[test]
fn endurance_values_follow_the_stated_shigley_estimate() {
    // Shigley, Mechanical Engineering Design, ch. 6: Se' = 0.5 Su (Su <= 1400 MPa), else
    // 700 MPa; surface factor ka = 4.51 Su^-0.265 (machined or cold-drawn, MPa). The
    // table states it used this estimate for every grade and rounded to 5 MPa.
    for m in material::library() {
        let su = m.tensile_strength_mpa;
        let se_prime = if su <= 1400.0 { 0.5 * su } else { 700.0 };
        let se = se_prime * 4.51 * su.powf(-0.265);
        assert!(
            (m.endurance_limit_mpa - se).abs() <= 2.5,
            "{}: table {} MPa, estimate {se:.1} MPa",
            m.id,
            m.endurance_limit_mpa
        );
        assert!(
            m.sources.endurance.contains("Shigley"),
            "{}: endurance source",
            m.id
        );
    }
}

#[test]
fn custom_material_is_marked_as_user_entry() {
    let m = material::custom("test strip", 200.0, 0.3, 1400.0, 1200.0, 450.0);
    assert_eq!(m.sources.modulus, "user entry");
    assert_eq!(m.sources.endurance, "user entry");
    assert_eq!(m.youngs_modulus_gpa, 200.0);
    assert!(
        material::find(&m.id).is_none(),
        "a custom grade is not in the library"
    );
}

// ---------------------------------------------------------------- friction pairs

#[test]
fn friction_table_rows_are_plausible_and_sourced() {
    let rows = friction::table();
    assert!((6..=10).contains(&rows.len()));
    let mut ids = HashSet::new();
    for p in rows {
        assert!(ids.insert(p.id.as_str()), "duplicate id {}", p.id);
        // Static coefficients of metal on pipe materials lie well inside (0, 1)
        // (common practice).
        assert!(
            p.static_coefficient > 0.0 && p.static_coefficient < 1.0,
            "{}",
            p.id
        );
        assert!(!p.source.trim().is_empty(), "{}: no source", p.id);
        assert!(
            p.note.contains("measured"),
            "{}: note must say to measure",
            p.id
        );
        assert_eq!(friction::find(&p.id), Some(p));
    }
    // Oil lowers friction: the oiled pair must be below the dry one (common practice).
    let dry = friction::find("steel-on-mild-steel-dry").expect("dry pair");
    let oiled = friction::find("steel-on-mild-steel-oiled").expect("oiled pair");
    assert!(oiled.static_coefficient < dry.static_coefficient);
    assert!(friction::find("steel-on-ice").is_none());
}
