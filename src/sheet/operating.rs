//! The sheet's side of actuation ([`crate::actuation`]): how the operating point is given
//! (a stroke, a pull or a torque, and the drive's stiffness), the operating stroke and the
//! actuator travel at the three bores, and the operating stroke across the bore window
//! under force control. Designs with a rigid drive and a set stroke print as before.

use super::format as f;
use crate::actuation::Drive;
use crate::analysis::{Analysis, BoreResult};
use crate::design::Operating;

/// The rows of the inputs' "Operating stroke and duty" group that say how the operating
/// point is set, before the duty rows. A set stroke prints as before.
pub fn input_pairs(a: &Analysis) -> Vec<(String, String)> {
    let seg = &a.segment;
    let drive = Drive::of(seg);
    let mut rows = Vec::new();
    match drive.operating {
        Operating::Stroke(op) => {
            rows.push(("Operating stroke δ".to_string(), f::file_mm(op)));
            let reading = seg.actuator_reading(op, 0.0);
            if reading.position_unit != "mm" {
                rows.push((
                    "Operating stroke at the actuator".to_string(),
                    f::in_unit(reading.position, reading.position_unit),
                ));
            }
        }
        Operating::Pull(p) => {
            rows.push((
                "Operating point set by".to_string(),
                "pull (force control)".to_string(),
            ));
            rows.push(("Set pull on the plates".to_string(), f::file_newton(p)));
        }
        Operating::Torque(t) => {
            rows.push((
                "Operating point set by".to_string(),
                "torque (force control)".to_string(),
            ));
            rows.push((
                "Set torque".to_string(),
                f::from_file(t, "N m", f::in_unit(t, "N m")),
            ));
            if let Some(p) = drive.set_pull_n {
                rows.push(("Pull it sets on the plates".to_string(), f::newton(p)));
            }
        }
    }
    if let Some(k) = drive.stiffness_n_per_mm {
        rows.push((
            "Drive stiffness k_c (in series)".to_string(),
            f::from_file(k, "N/mm", f::in_unit(k, "N/mm")),
        ));
    }
    rows
}

/// The heading of the results at the operating point of the three bores.
pub fn band_title(a: &Analysis) -> String {
    match Drive::of(&a.segment) {
        Drive {
            operating: Operating::Stroke(op),
            ..
        } => format!("At the operating stroke {}", f::mm(op)),
        Drive {
            set_pull_n: Some(p),
            ..
        } => format!(
            "At the operating point: the stroke where the pull reaches {}",
            f::newton(p)
        ),
        _ => "At the operating point".to_string(),
    }
}

/// The per-bore rows under that heading: the operating stroke under force control, the
/// actuator travel through a compliant drive (none for a rigid, stroke-set design).
pub fn bore_rows(a: &Analysis, r: &BoreResult) -> Vec<(&'static str, String)> {
    let drive = Drive::of(&a.segment);
    let mut rows = Vec::new();
    let state = r.operating.as_ref();
    if drive.is_force_controlled() {
        rows.push((
            "Operating stroke δ",
            match state {
                Ok(s) => f::mm(s.stroke_mm),
                Err(_) => "not reached".to_string(),
            },
        ));
    }
    if drive.stiffness_n_per_mm.is_some() {
        rows.push((
            "Actuator travel (δ + pull / k_c)",
            match state {
                Ok(s) => f::mm_opt(s.actuator_force_n.map(|p| drive.travel_mm(s.stroke_mm, p))),
                Err(_) => f::NONE.to_string(),
            },
        ));
    }
    rows
}

/// Under force control, the operating stroke across the bore window (`None` where the set
/// pull is never reached); empty under displacement control.
pub fn window_series(a: &Analysis) -> Vec<(f64, Option<f64>)> {
    a.operating_window
        .iter()
        .map(|w| (w.bore_mm, w.stroke_mm))
        .collect()
}

/// Why the side view has no operating stroke: the set pull is never reached at the
/// nominal bore.
pub fn unreached_note(a: &Analysis) -> Option<String> {
    if a.nominal_operating_stroke_mm().is_some() {
        return None;
    }
    a.bores
        .iter()
        .find(|b| b.case == crate::analysis::BoreCase::Nominal)
        .and_then(|b| b.operating.as_ref().err().cloned())
}
