//! Designs that several test modules use (invented scenarios, not products).

use bowgrip::design::{Design, Ends};

/// An invented wide-gap segment: 60 mm hinged strips on a 36 mm mount radius in a 100 mm
/// bore. Gap by the edge-contact formula, `sqrt(50^2 - 4^2) - 0.1 - 36 = 13.74` mm, so
/// g/L = 0.229, where a hinged strip swings behind its hinge plane from about
/// delta/L = 0.3 (this solver; see the elastica unit tests). At the operating stroke of
/// 27 mm (delta/L = 0.45) it does, so the design carries geometry cautions.
pub fn wide_gap_design() -> Design {
    let mut d = Design {
        title: "Wide gap: strips swing behind the plates".to_string(),
        mount_radius_mm: 36.0,
        end_plate_diameter_mm: 70.0,
        operating_stroke_mm: Some(27.0),
        ..Design::default()
    };
    d.strip.free_length_mm = 60.0;
    d.strip.width_mm = 8.0;
    d.strip.thickness_mm = 0.2;
    d.strip.ends = Ends::Hinged;
    d.bore.diameter_mm = 100.0;
    d
}
