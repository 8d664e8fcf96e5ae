//! The app's side of actuation ([`crate::actuation`]): the operating stroke drawn on the
//! stroke-against-bore plot (a level line under displacement control, a curve across the
//! bores under force control), and there the actuator's maximum travel as a curve of
//! stroke through a compliant drive.

use egui::Color32;
use egui_plot::{HLine, Line, LineStyle, PlotPoints};

use crate::analysis::Analysis;
use crate::design::Operating;

/// Draws the operating stroke on the stroke-against-bore plot: the set stroke as a level
/// line, or under force control the stroke reaching the set pull at each bore (broken
/// where it is never reached).
pub fn operating_marker(p: &mut egui_plot::PlotUi<'_>, a: &Analysis, mark: Color32) {
    if let Operating::Stroke(s) = a.segment.design.operating() {
        p.add(
            HLine::new("operating stroke", s)
                .color(mark)
                .style(LineStyle::dashed_dense())
                .width(1.5),
        );
        return;
    }
    let mut run: Vec<[f64; 2]> = Vec::new();
    let mut runs = Vec::new();
    for w in &a.operating_window {
        match w.stroke_mm {
            Some(s) => run.push([w.bore_mm, s]),
            None if !run.is_empty() => runs.push(std::mem::take(&mut run)),
            None => {}
        }
    }
    if !run.is_empty() {
        runs.push(run);
    }
    for run in runs {
        p.line(
            Line::new("operating stroke", PlotPoints::new(run))
                .color(mark)
                .style(LineStyle::dashed_dense())
                .width(1.5),
        );
    }
}

/// Through a compliant drive, draws the actuator's maximum travel on the stroke-against-bore
/// plot as a curve: at each bore the stroke at which the travel reaches the maximum (broken
/// where it is not reached before the model's limit). Returns false, drawing nothing, for a
/// rigid drive, whose maximum is a level line of stroke.
pub fn travel_limit_marker(
    p: &mut egui_plot::PlotUi<'_>,
    a: &Analysis,
    name: &str,
    color: Color32,
) -> bool {
    if a.travel_limit_window.is_empty() {
        return false;
    }
    for run in runs(&a.travel_limit_window) {
        p.line(
            Line::new(name, PlotPoints::new(run))
                .color(color)
                .style(LineStyle::dashed_loose()),
        );
    }
    true
}

/// The unbroken runs of a curve of `(x, y)` with missing points.
fn runs(points: &[(f64, Option<f64>)]) -> Vec<Vec<[f64; 2]>> {
    let mut run = Vec::new();
    let mut runs = Vec::new();
    for &(x, y) in points {
        match y {
            Some(y) => run.push([x, y]),
            None if !run.is_empty() => runs.push(std::mem::take(&mut run)),
            None => {}
        }
    }
    if !run.is_empty() {
        runs.push(run);
    }
    runs
}

/// Highest stroke on the curve of the actuator's maximum travel, mm (`None` for a rigid
/// drive, or where the travel is never reached).
pub fn travel_limit_top_mm(a: &Analysis) -> Option<f64> {
    a.travel_limit_window
        .iter()
        .filter_map(|w| w.1)
        .reduce(f64::max)
}

/// Stiffness a drive gets when "Compliant drive" is switched on, N/mm: a stiff cord of a
/// few millimetres' give at a few hundred newtons, to start from.
pub const DEFAULT_STIFFNESS_N_PER_MM: f64 = 200.0;

/// After the actuator kind changes from `before` to `next.actuator`: keeps the drive's
/// stiffness, and a set torque becomes the same pull when the new kind has no spool or
/// screw to take a torque.
pub fn keep_drive(before: &crate::design::Design, next: &mut crate::design::Design) {
    next.actuator
        .set_stiffness_n_per_mm(before.actuator.stiffness_n_per_mm());
    if let Operating::Torque(t) = before.operating() {
        let pull = before.actuator.pull_n_at(t);
        next.set_operating(match next.actuator {
            crate::design::Actuator::Direct { .. } => Operating::Pull(pull),
            _ => Operating::Torque(next.actuator.reading(0.0, pull).effort),
        });
    }
}

/// Under the operating-point inputs: the mode, and at the smallest, nominal and largest
/// bore the operating stroke and the actuator travel (the same stroke everywhere under
/// displacement control; the travel differs from it through a compliant drive).
pub fn operating_summary_ui(ui: &mut egui::Ui, a: &Analysis) {
    let d = &a.segment.design;
    if !d.uses_actuation() {
        return;
    }
    let drive = crate::actuation::Drive::of(&a.segment);
    let mut lines = Vec::new();
    if let (Operating::Torque(_), Some(p)) = (drive.operating, drive.set_pull_n) {
        lines.push(format!("The set torque pulls the plates with {p:.1} N."));
    }
    for b in &a.bores {
        let text = match &b.operating {
            Ok(s) => {
                let travel = s
                    .actuator_force_n
                    .map_or(s.stroke_mm, |p| drive.travel_mm(s.stroke_mm, p));
                if drive.stiffness_n_per_mm.is_some() {
                    format!(
                        "{} bore {:.2} mm: stroke {:.3} mm, actuator travel {travel:.3} mm",
                        b.case.label(),
                        b.bore_mm,
                        s.stroke_mm
                    )
                } else {
                    format!(
                        "{} bore {:.2} mm: stroke {:.3} mm",
                        b.case.label(),
                        b.bore_mm,
                        s.stroke_mm
                    )
                }
            }
            Err(why) => format!("{} bore {:.2} mm: {why}", b.case.label(), b.bore_mm),
        };
        lines.push(text);
    }
    // Written in mm, N; shown in the display units.
    let text = super::units().prose(&lines.join("\n"));
    ui.label(egui::RichText::new(text).small())
        .on_hover_text("The operating point at each end of the bore tolerance and at the nominal bore. Under force control the stroke follows from the set pull; the actuator travel adds the drive's stretch, pull / stiffness.");
}
