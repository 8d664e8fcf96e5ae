//! The results: the verdict panel (checks with margins, the limiting one marked, the
//! state at the operating stroke, the safety cautions button) and the central plots
//! (stroke against bore, forces and stress against stroke at the nominal bore, the strip
//! to scale from the side and from the end). Everything is drawn from the cached
//! analysis; nothing here solves.

use egui::{Color32, Pos2, RichText, Stroke, Ui, Vec2};
use egui_plot::{FilledArea, HLine, Legend, Line, LineStyle, Plot, PlotPoints, Span, VLine};

use super::GripApp;
use super::export::SvgSeries;
use super::inputs::error_color;
use crate::analysis::{Analysis, BoreCase};
use crate::checks::MarginUnit;
use crate::segment::SegmentState;

/// A curve of a plot: legend name, colour, and its runs (a missing value breaks a run).
pub struct Curve {
    pub name: &'static str,
    pub color: Color32,
    pub runs: Vec<Vec<[f64; 2]>>,
}

impl Curve {
    /// Splits `(x, Option<y>)` samples into runs.
    fn from_samples(
        name: &'static str,
        color: Color32,
        samples: impl Iterator<Item = (f64, Option<f64>)>,
    ) -> Curve {
        let mut runs: Vec<Vec<[f64; 2]>> = vec![Vec::new()];
        for (x, y) in samples {
            match y.filter(|v| v.is_finite()) {
                Some(y) => runs.last_mut().map_or((), |r| r.push([x, y])),
                None if runs.last().is_some_and(|r| !r.is_empty()) => runs.push(Vec::new()),
                None => {}
            }
        }
        runs.retain(|r| !r.is_empty());
        Curve { name, color, runs }
    }

    /// For the SVG export.
    pub fn to_svg(&self) -> SvgSeries {
        let [r, g, b, _] = self.color.to_array();
        SvgSeries {
            name: self.name.to_string(),
            color: format!("#{r:02x}{g:02x}{b:02x}"),
            runs: self.runs.clone(),
        }
    }

    fn add_to(&self, plot: &mut egui_plot::PlotUi<'_>) {
        for run in &self.runs {
            plot.line(
                Line::new(self.name, PlotPoints::new(run.clone()))
                    .color(self.color)
                    .width(2.0),
            );
        }
    }
}

const C_CONTACT: Color32 = Color32::from_rgb(0, 150, 200);
const C_HOLD: Color32 = Color32::from_rgb(40, 170, 80);
const C_STRESS: Color32 = Color32::from_rgb(220, 60, 60);
const C_LINE: Color32 = Color32::from_rgb(170, 90, 210);
const C_LIMIT: Color32 = Color32::from_rgb(120, 120, 120);
const C_ACT: Color32 = Color32::from_rgb(230, 140, 20);
const C_STEEL: Color32 = Color32::from_rgb(70, 110, 170);

/// Curves of the stroke-against-bore plot.
pub fn window_curves(a: &Analysis) -> Vec<Curve> {
    let w = &a.window;
    vec![
        Curve::from_samples(
            "first contact",
            C_CONTACT,
            w.iter().map(|r| (r.bore_mm, r.first_contact_stroke_mm)),
        ),
        Curve::from_samples(
            "holds load x SF",
            C_HOLD,
            w.iter().map(|r| (r.bore_mm, r.holding_stroke_mm)),
        ),
        Curve::from_samples(
            "stress limit",
            C_STRESS,
            w.iter().map(|r| (r.bore_mm, r.stress_limit_stroke_mm)),
        ),
        Curve::from_samples(
            "line contact begins",
            C_LINE,
            w.iter().map(|r| (r.bore_mm, r.line_contact_stroke_mm)),
        ),
        Curve::from_samples(
            "model limit",
            C_LIMIT,
            w.iter().map(|r| (r.bore_mm, r.limit_stroke_mm)),
        ),
    ]
}

/// Curves of the force plot.
pub fn force_curves(a: &Analysis) -> Vec<Curve> {
    let c = &a.curve;
    vec![
        Curve::from_samples(
            "radial force",
            C_CONTACT,
            c.iter().map(|s| (s.stroke_mm, s.radial_force_n)),
        ),
        Curve::from_samples(
            "holding force",
            C_HOLD,
            c.iter().map(|s| (s.stroke_mm, s.holding_force_n)),
        ),
        Curve::from_samples(
            "actuator pull",
            C_ACT,
            c.iter().map(|s| (s.stroke_mm, s.actuator_force_n)),
        ),
    ]
}

/// Curves of the stress plot.
pub fn stress_curves(a: &Analysis) -> Vec<Curve> {
    vec![Curve::from_samples(
        "peak stress",
        C_STRESS,
        a.curve.iter().map(|s| (s.stroke_mm, s.max_stress_mpa)),
    )]
}

fn fmt_margin(m: Option<f64>, unit: MarginUnit) -> String {
    match (m, unit) {
        (None, _) => "no margin".to_string(),
        (Some(m), MarginUnit::Mm) => format!("{m:+.3} mm"),
        (Some(m), MarginUnit::Ratio) => format!("{m:+.3} ({:+.1} %)", 100.0 * m),
    }
}

/// The right panel: checks, the operating state, cautions.
pub fn verdict_ui(app: &mut GripApp, ui: &mut Ui) {
    egui::ScrollArea::vertical().auto_shrink([false, false]).show(ui, |ui| {
        if let Some(err) = &app.analysis_error {
            ui.label(RichText::new(format!("The design as edited cannot be analysed: {err}. Showing the last valid design.")).color(error_color(ui)));
        }
        let Some(a) = &app.analysis else {
            ui.label("No analysis yet.");
            return;
        };
        let failed = a.checks.iter().filter(|c| !c.pass).count();
        let (text, color) = if failed == 0 { ("Every check passes".to_string(), C_HOLD) } else { (format!("{failed} of {} checks fail", a.checks.len()), error_color(ui)) };
        ui.heading(RichText::new(text).color(color));
        ui.label(RichText::new("Each check is judged at its own bore and stroke; margin is capacity over demand minus one, or mm.").small());
        ui.separator();
        for (i, c) in a.checks.iter().enumerate() {
            let limiting = a.limiting == Some(i);
            let mark = if c.pass { "[ok]" } else { "[FAIL]" };
            let col = if c.pass { C_HOLD } else { error_color(ui) };
            let frame = if limiting {
                egui::Frame::group(ui.style()).stroke(Stroke::new(2.0, C_ACT))
            } else {
                egui::Frame::NONE.inner_margin(4.0)
            };
            frame.show(ui, |ui| {
                let head = format!("{mark} {}{}", c.title, if limiting { "   [limiting]" } else { "" });
                let where_ = match (c.bore_mm, c.stroke_mm) {
                    (Some(b), Some(s)) => format!("judged at bore {b:.3} mm, stroke {s:.3} mm"),
                    (Some(b), None) => format!("judged at bore {b:.3} mm"),
                    (None, _) => "judged on the hub at rest".to_string(),
                };
                ui.label(RichText::new(head).color(col).strong()).on_hover_text(where_);
                ui.label(format!("{}: margin {}", if c.pass { "pass" } else { "FAIL" }, fmt_margin(c.margin, c.unit)));
                ui.label(RichText::new(&c.reason).small());
            });
        }
        ui.separator();
        ui.strong("At the operating stroke, nominal bore");
        if let Some(b) = a.bores.iter().find(|b| b.case == BoreCase::Nominal) {
            match &b.operating {
                Ok(s) => state_table(ui, s),
                Err(e) => {
                    ui.label(RichText::new(e).color(error_color(ui)));
                }
            }
        }
        ui.separator();
        let energy = a.bores.iter().filter_map(|b| b.operating.as_ref().ok()).filter_map(|s| s.strain_energy_j).fold(0.0_f64, f64::max);
        ui.label(RichText::new(format!("Caution: the strips store up to {energy:.3} J at the operating stroke and can snap or spring out when released or broken.")).color(C_ACT));
        if ui.button("Safety cautions").on_hover_text("Hazards of building and using bowed-strip segments.").clicked() {
            app.dialogs.show_cautions = true;
        }
    });
}

fn state_table(ui: &mut Ui, s: &SegmentState) {
    let num = |v: Option<f64>, unit: &str, digits: usize| {
        v.map_or_else(|| "n/a".to_string(), |x| format!("{x:.digits$} {unit}"))
    };
    egui::Grid::new("state").num_columns(2).striped(true).show(ui, |ui| {
        let mut row = |k: &str, v: String, tip: &str| {
            ui.label(k).on_hover_text(tip);
            ui.label(v);
            ui.end_row();
        };
        row("phase", s.phase.to_string(), "free, point contact at the crest, line contact (a flat run on the wall), or beyond the model's limit");
        row("radial force", num(s.radial_force_n, "N", 2), "total force of all strips on the wall");
        row("holding force", num(s.holding_force_n, "N", 2), "friction x radial force: the axial load the segment holds");
        row("actuator pull", num(s.actuator_force_n, "N", 2), "pull on the end plates, N x axial force per strip");
        if let Some(r) = s.actuator {
            row("actuator reads", format!("{:.3} {} at {:.3} {}", r.effort, r.effort_unit, r.position, r.position_unit), "the actuator's own effort and position");
        }
        row("peak stress", num(s.max_stress_mpa, "MPa", 1), "bending plus axial stress at the peak curvature");
        row("static factor", num(s.static_safety_factor, "", 3), "0.75 x tensile strength / peak stress");
        row("fatigue factor", num(s.fatigue_safety_factor, "", 3), "Goodman, zero-to-peak cycles");
        row("flat run", num(s.flat_length_mm, "mm", 2), "length of strip lying on the wall");
        row("over the strips", num(s.outer_diameter_mm, "mm", 2), "diameter over the strip corners at the crest");
        row("stored energy", num(s.strain_energy_j, "J", 4), "strain energy in all strips");
        row("model limit", format!("{:.3} mm ({})", s.limit_stroke_mm, s.limit_reason), "stroke where the model stops in this bore");
    });
}

/// The central area: four cells.
pub fn results_ui(app: &mut GripApp, ui: &mut Ui) {
    let Some(a) = &app.analysis else {
        ui.label("No analysis to show.");
        return;
    };
    let avail = ui.available_size();
    let cell = Vec2::new((avail.x - 12.0) / 2.0, (avail.y - 40.0) / 2.0);
    ui.horizontal(|ui| {
        ui.vertical(|ui| {
            ui.set_width(cell.x);
            ui.strong("Stroke against bore").on_hover_text("For each bore: the stroke at first contact, where the load is held, where stress reaches its allowable, where line contact begins and where the model stops. The shaded band is the bore tolerance; the green fill is the usable window.");
            window_plot(ui, a, cell.y - 20.0);
            // Heading, axes and plot: what the PNG export cuts out.
            app.plot_rects[0] = Some(ui.min_rect());
        });
        ui.vertical(|ui| {
            ui.set_width(cell.x);
            ui.strong(format!("Forces against stroke at the nominal bore, {:.2} mm", a.segment.bore_nominal_mm)).on_hover_text("Shaded: the free, point-contact and line-contact phases.");
            force_plot(ui, a, cell.y - 20.0);
            // Heading, axes and plot: what the PNG export cuts out.
            app.plot_rects[1] = Some(ui.min_rect());
        });
    });
    ui.horizontal(|ui| {
        ui.vertical(|ui| {
            ui.set_width(cell.x);
            ui.strong("Peak stress against stroke (nominal bore)").on_hover_text("Dashed: the static (0.75 x tensile) and the fatigue (Goodman, zero-to-peak) allowables.");
            stress_plot(ui, a, cell.y - 20.0);
            // Heading, axes and plot: what the PNG export cuts out.
            app.plot_rects[2] = Some(ui.min_rect());
        });
        ui.vertical(|ui| {
            ui.set_width(cell.x);
            let (stroke, shape, note) = match &app.fallback_shape {
                Some((s, shape)) => (*s, shape.as_slice(), format!(" (operating stroke is past the limit; drawn at {s:.3} mm)")),
                None => (a.segment.design.operating_stroke_mm, a.shape_mm.as_slice(), String::new()),
            };
            ui.strong(format!("To scale at {stroke:.3} mm stroke{note}")).on_hover_text("Left: one strip in its meridional plane between the bore walls, the end plates, and the flat run on the wall in bold. Right: the ring of strips seen along the axis inside the bore.");
            let h = cell.y - 20.0;
            let w = ui.available_width();
            // A long strip reads better with the end view below it, a short one beside it.
            let d = &a.segment.design;
            let long = d.strip.free_length_mm * 1.15 > 1.4 * a.segment.bore_nominal_mm;
            if long {
                let side_h = (h * 0.66).min(w * 1.1 * a.segment.bore_nominal_mm as f32 / (d.strip.free_length_mm as f32 * 1.15));
                side_view(ui, a, shape, Vec2::new(w, side_h));
                end_view(ui, a, Vec2::new(w, (h - side_h - 6.0).max(40.0)));
            } else {
                ui.horizontal(|ui| {
                    side_view(ui, a, shape, Vec2::new(w * 0.62, h));
                    end_view(ui, a, Vec2::new(w * 0.36, h));
                });
            }
        });
    });
}

fn legend() -> Legend {
    Legend::default()
        .position(egui_plot::Corner::LeftTop)
        .background_alpha(0.6)
        .text_style(egui::TextStyle::Small)
        .follow_insertion_order(true)
}

/// Colour of the operating-stroke marker: the text colour, so it reads on both themes.
fn marker(ui: &Ui) -> Color32 {
    ui.visuals().text_color()
}

fn window_plot(ui: &mut Ui, a: &Analysis, height: f32) {
    let seg = &a.segment;
    let curves = window_curves(a);
    let hold = &a.window;
    let mark = marker(ui);
    Plot::new("window-plot")
        .height(height)
        .legend(legend())
        .x_axis_label("bore diameter, mm")
        .y_axis_label("stroke, mm")
        .label_formatter(|hover| {
            let (name, p) = match hover {
                egui_plot::HoverPosition::NearDataPoint {
                    plot_name,
                    position,
                    ..
                } => (*plot_name, *position),
                egui_plot::HoverPosition::Elsewhere { position } => ("", *position),
            };
            Some(format!("{name}\nbore {:.3} mm\nstroke {:.3} mm", p.x, p.y))
        })
        .show(ui, |p| {
            p.add(
                Span::new("bore tolerance", seg.bore_smallest_mm..=seg.bore_largest_mm)
                    .fill(C_STEEL.gamma_multiply(0.18)),
            );
            // Usable window: holding reached, below stress limit, model limit and actuator travel.
            let max_stroke = seg.max_stroke_mm();
            let mut xs = Vec::new();
            let mut lo = Vec::new();
            let mut hi = Vec::new();
            let flush = |xs: &mut Vec<f64>,
                         lo: &mut Vec<f64>,
                         hi: &mut Vec<f64>,
                         p: &mut egui_plot::PlotUi<'_>| {
                if xs.len() >= 2 {
                    p.add(
                        FilledArea::new("usable window", xs, lo, hi)
                            .fill_color(C_HOLD.gamma_multiply(0.25)),
                    );
                }
                xs.clear();
                lo.clear();
                hi.clear();
            };
            for r in hold {
                let top = [r.stress_limit_stroke_mm, r.limit_stroke_mm]
                    .iter()
                    .flatten()
                    .fold(max_stroke, |m, v| m.min(*v));
                match r.holding_stroke_mm.filter(|h| *h < top) {
                    Some(h) => {
                        xs.push(r.bore_mm);
                        lo.push(h);
                        hi.push(top);
                    }
                    None => flush(&mut xs, &mut lo, &mut hi, p),
                }
            }
            flush(&mut xs, &mut lo, &mut hi, p);
            for c in &curves {
                c.add_to(p);
            }
            marker_or_note(
                p,
                "actuator max travel",
                max_stroke,
                [right_of(&curves), top_of(&curves)],
                C_ACT,
                "mm",
            );
            p.add(
                HLine::new("operating stroke", seg.design.operating_stroke_mm)
                    .color(mark)
                    .style(LineStyle::dashed_dense())
                    .width(1.5),
            );
            p.add(VLine::new("nominal bore", seg.bore_nominal_mm).color(C_STEEL));
        });
}

/// Highest value over the curves.
fn top_of(curves: &[Curve]) -> f64 {
    curves
        .iter()
        .flat_map(|c| c.runs.iter().flatten())
        .map(|p| p[1])
        .fold(0.0, f64::max)
}

/// Rightmost x over the curves.
fn right_of(curves: &[Curve]) -> f64 {
    let x = curves
        .iter()
        .flat_map(|c| c.runs.iter().flatten())
        .map(|p| p[0])
        .fold(f64::NEG_INFINITY, f64::max);
    if x.is_finite() { x } else { 0.0 }
}

/// A dashed horizontal marker at `value`, or, when it lies far above the curves (it
/// would flatten them), a note at the top edge saying where it is.
fn marker_or_note(
    p: &mut egui_plot::PlotUi<'_>,
    name: &str,
    value: f64,
    [right, top]: [f64; 2],
    color: Color32,
    unit: &str,
) {
    if value <= 1.4 * top || top <= 0.0 {
        p.add(
            HLine::new(name, value)
                .color(color)
                .style(LineStyle::dashed_loose()),
        );
    } else {
        let at = egui_plot::PlotPoint::new(right, top * 1.08);
        p.add(
            egui_plot::Text::new(
                name,
                at,
                RichText::new(format!("{name} {value:.2} {unit}: above the plot"))
                    .color(color)
                    .small(),
            )
            .anchor(egui::Align2::RIGHT_BOTTOM),
        );
    }
}

fn phase_spans(p: &mut egui_plot::PlotUi<'_>, a: &Analysis, mark: Color32) {
    let (Some(first), Some(last)) = (a.curve.first(), a.curve.last()) else {
        return;
    };
    let end = last.stroke_mm;
    let fc = first.first_contact_stroke_mm.unwrap_or(end).min(end);
    let lc = first.line_contact_stroke_mm.unwrap_or(end).min(end);
    let grey = Color32::from_gray(128);
    p.add(Span::new("free", 0.0..=fc).fill(grey.gamma_multiply(0.06)));
    if lc > fc {
        p.add(Span::new("point contact", fc..=lc).fill(C_CONTACT.gamma_multiply(0.10)));
    }
    if end > lc {
        p.add(Span::new("line contact", lc..=end).fill(C_LINE.gamma_multiply(0.12)));
    }
    p.add(
        VLine::new("operating stroke", a.segment.design.operating_stroke_mm)
            .color(mark)
            .style(LineStyle::dashed_dense()),
    );
}

fn force_plot(ui: &mut Ui, a: &Analysis, height: f32) {
    let seg = &a.segment;
    let curves = force_curves(a);
    let curve = &a.curve;
    let mark = marker(ui);
    Plot::new("force-plot")
        .height(height)
        .legend(legend())
        .x_axis_label("stroke, mm")
        .y_axis_label("force, N")
        .label_formatter(move |hover| {
            let (name, p) = match hover {
                egui_plot::HoverPosition::NearDataPoint {
                    plot_name,
                    position,
                    ..
                } => (*plot_name, *position),
                egui_plot::HoverPosition::Elsewhere { position } => ("", *position),
            };
            let near = curve.iter().min_by(|x, y| {
                (x.stroke_mm - p.x)
                    .abs()
                    .total_cmp(&(y.stroke_mm - p.x).abs())
            });
            let act = near
                .and_then(|s| s.actuator)
                .map(|r| {
                    format!(
                        "\nactuator {:.3} {} at {:.3} {}",
                        r.effort, r.effort_unit, r.position, r.position_unit
                    )
                })
                .unwrap_or_default();
            Some(format!("{name}\nstroke {:.3} mm\n{:.2} N{act}", p.x, p.y))
        })
        .show(ui, |p| {
            phase_spans(p, a, mark);
            for c in &curves {
                c.add_to(p);
            }
            let need = seg.design.duty.holding_force_n * seg.design.duty.safety_factor;
            p.add(
                HLine::new("load x safety factor", need)
                    .color(C_HOLD)
                    .style(LineStyle::dashed_loose()),
            );
            marker_or_note(
                p,
                "actuator rating as pull",
                seg.max_pull_n(),
                [right_of(&curves), top_of(&curves).max(need)],
                C_ACT,
                "N",
            );
        });
}

fn stress_plot(ui: &mut Ui, a: &Analysis, height: f32) {
    let seg = &a.segment;
    let curves = stress_curves(a);
    let mark = marker(ui);
    Plot::new("stress-plot")
        .height(height)
        .legend(legend())
        .x_axis_label("stroke, mm")
        .y_axis_label("stress, MPa")
        .label_formatter(|hover| {
            let (name, p) = match hover {
                egui_plot::HoverPosition::NearDataPoint {
                    plot_name,
                    position,
                    ..
                } => (*plot_name, *position),
                egui_plot::HoverPosition::Elsewhere { position } => ("", *position),
            };
            Some(format!("{name}\nstroke {:.3} mm\n{:.1} MPa", p.x, p.y))
        })
        .include_y(0.0)
        .show(ui, |p| {
            phase_spans(p, a, mark);
            for c in &curves {
                c.add_to(p);
            }
            p.add(
                HLine::new("static allowable", seg.static_allowable_mpa)
                    .color(C_STRESS)
                    .style(LineStyle::dashed_loose()),
            );
            p.add(
                HLine::new("fatigue allowable", seg.fatigue_allowable_mpa)
                    .color(C_LINE)
                    .style(LineStyle::dashed_loose()),
            );
        });
}

/// Maps model coordinates (mm) to the screen with one scale for both axes.
struct Scale {
    origin: Pos2,
    px_per_mm: f32,
}

impl Scale {
    fn fit(rect: egui::Rect, x: (f64, f64), y: (f64, f64)) -> Scale {
        let sx = rect.width() as f64 / (x.1 - x.0).max(1e-9);
        let sy = rect.height() as f64 / (y.1 - y.0).max(1e-9);
        let s = sx.min(sy) as f32;
        let cx = 0.5 * (x.0 + x.1) as f32;
        let cy = 0.5 * (y.0 + y.1) as f32;
        Scale {
            origin: rect.center() - Vec2::new(cx * s, -cy * s),
            px_per_mm: s,
        }
    }
    fn p(&self, x: f64, y: f64) -> Pos2 {
        Pos2::new(
            self.origin.x + x as f32 * self.px_per_mm,
            self.origin.y - y as f32 * self.px_per_mm,
        )
    }
}

fn side_view(ui: &mut Ui, a: &Analysis, shape: &[[f64; 2]], size: Vec2) {
    let (resp, painter) = ui.allocate_painter(size, egui::Sense::hover());
    let rect = resp.rect.shrink(12.0);
    let d = &a.segment.design;
    let fg = ui.visuals().text_color();
    let r_wall = 0.5 * a.segment.bore_nominal_mm;
    let chord = shape.last().map_or(d.strip.free_length_mm, |p| p[0]);
    let plate_r = if d.end_plate_diameter_mm > 0.0 {
        0.5 * d.end_plate_diameter_mm
    } else {
        d.mount_radius_mm
    };
    let plate_w = (0.04 * d.strip.free_length_mm).max(1.0);
    let scale = Scale::fit(
        rect.with_max_y(rect.max.y - 14.0),
        (-plate_w - 2.0, chord + plate_w + 2.0),
        (-r_wall * 1.08, r_wall * 1.08),
    );
    // Walls.
    let wall = Stroke::new(2.0, fg.gamma_multiply(0.8));
    for sgn in [1.0, -1.0] {
        painter.line_segment(
            [
                scale.p(-plate_w - 2.0, sgn * r_wall),
                scale.p(chord + plate_w + 2.0, sgn * r_wall),
            ],
            wall,
        );
    }
    painter.text(
        scale.p(chord * 0.5, r_wall) + Vec2::new(0.0, -4.0),
        egui::Align2::CENTER_BOTTOM,
        format!("bore {:.2} mm", 2.0 * r_wall),
        egui::FontId::proportional(11.0),
        fg,
    );
    // Axis.
    painter.add(egui::Shape::dashed_line(
        &[
            scale.p(-plate_w - 2.0, 0.0),
            scale.p(chord + plate_w + 2.0, 0.0),
        ],
        Stroke::new(1.0, fg.gamma_multiply(0.4)),
        6.0,
        4.0,
    ));
    // End plates.
    for x0 in [-plate_w, chord] {
        let r = egui::Rect::from_two_pos(scale.p(x0, plate_r), scale.p(x0 + plate_w, -plate_r));
        painter.rect_filled(r, 1.0, C_STEEL.gamma_multiply(0.45));
    }
    if shape.len() < 2 {
        painter.text(
            rect.center(),
            egui::Align2::CENTER_CENTER,
            "no shape: beyond the model's limit",
            egui::FontId::proportional(13.0),
            fg,
        );
        return;
    }
    // Strip and its mirror; the part on the wall (flat run) in bold.
    let on_wall = r_wall - 0.5 * d.strip.thickness_mm;
    let gap_top = a
        .bores
        .iter()
        .find(|b| b.case == BoreCase::Nominal)
        .and_then(|b| b.operating.as_ref().ok())
        .map_or(on_wall, |s| d.mount_radius_mm + s.gap_mm);
    let t_px = (d.strip.thickness_mm as f32 * scale.px_per_mm).max(1.5);
    for sgn in [1.0, -1.0] {
        let pts: Vec<Pos2> = shape.iter().map(|p| scale.p(p[0], sgn * p[1])).collect();
        painter.add(egui::Shape::line(pts, Stroke::new(t_px, C_ACT)));
        for w in shape.windows(2) {
            let tol = 1e-4 * d.strip.free_length_mm;
            if w[0][1] >= gap_top - tol && w[1][1] >= gap_top - tol {
                painter.line_segment(
                    [
                        scale.p(w[0][0], sgn * w[0][1]),
                        scale.p(w[1][0], sgn * w[1][1]),
                    ],
                    Stroke::new(t_px + 3.0, C_STRESS),
                );
            }
        }
    }
    painter.text(
        rect.left_bottom(),
        egui::Align2::LEFT_BOTTOM,
        format!("{:.2} px/mm; red: on the wall", scale.px_per_mm),
        egui::FontId::proportional(10.0),
        fg.gamma_multiply(0.7),
    );
}

fn end_view(ui: &mut Ui, a: &Analysis, size: Vec2) {
    let (resp, painter) = ui.allocate_painter(size, egui::Sense::hover());
    let rect = resp.rect.shrink(8.0);
    let d = &a.segment.design;
    let fg = ui.visuals().text_color();
    let r_wall = 0.5 * a.segment.bore_nominal_mm;
    let scale = Scale::fit(
        rect.with_max_y(rect.max.y - 14.0),
        (-r_wall * 1.05, r_wall * 1.05),
        (-r_wall * 1.05, r_wall * 1.05),
    );
    let c = scale.p(0.0, 0.0);
    painter.circle_stroke(
        c,
        r_wall as f32 * scale.px_per_mm,
        Stroke::new(2.0, fg.gamma_multiply(0.8)),
    );
    let plate_r = if d.end_plate_diameter_mm > 0.0 {
        0.5 * d.end_plate_diameter_mm
    } else {
        d.mount_radius_mm - d.strip.thickness_mm
    };
    painter.circle_filled(
        c,
        plate_r as f32 * scale.px_per_mm,
        C_STEEL.gamma_multiply(0.35),
    );
    let crest = a
        .bores
        .iter()
        .find(|b| b.case == BoreCase::Nominal)
        .and_then(|b| b.operating.as_ref().ok())
        .and_then(|s| s.crest_height_mm)
        .unwrap_or(0.0);
    let n = d.strip.count;
    let (b, t) = (d.strip.width_mm, d.strip.thickness_mm.max(0.02));
    for (radius, color) in [
        (d.mount_radius_mm, fg.gamma_multiply(0.35)),
        (d.mount_radius_mm + crest, C_ACT),
    ] {
        for i in 0..n {
            let th = std::f64::consts::TAU * f64::from(i) / f64::from(n);
            let (s, co) = th.sin_cos();
            // Corners of a b x t rectangle, tangential width, radial thickness.
            let pts: Vec<Pos2> = [
                (-0.5 * b, -0.5 * t),
                (0.5 * b, -0.5 * t),
                (0.5 * b, 0.5 * t),
                (-0.5 * b, 0.5 * t),
            ]
            .iter()
            .map(|&(u, v)| {
                let rr = radius + v;
                scale.p(rr * co - u * s, rr * s + u * co)
            })
            .collect();
            painter.add(egui::Shape::convex_polygon(pts, color, Stroke::NONE));
        }
    }
    painter.text(
        rect.center_bottom(),
        egui::Align2::CENTER_BOTTOM,
        format!("{n} strips {b} x {} mm", d.strip.thickness_mm),
        egui::FontId::proportional(10.0),
        fg.gamma_multiply(0.7),
    );
}
