//! The results: the verdict panel (checks with margins, the limiting one marked, the
//! state at the operating stroke, the safety cautions button) and the central plots
//! (stroke against bore, forces and stress against stroke at the nominal bore, the strip
//! to scale from the side and from the end). Everything is drawn from the cached
//! analysis; nothing here solves.

use egui::{Color32, Pos2, RichText, Stroke, Ui, Vec2};
use egui_plot::{
    AxisHints, FilledArea, HLine, Legend, Line, LineStyle, Plot, PlotPoints, Span, VLine,
};

use super::export::SvgSeries;
use super::inputs::error_color;
use super::{Command, GripApp};
use crate::analysis::{Analysis, BoreCase, SideShape};
use crate::quantities::STATE_FIELDS;
use crate::segment::SegmentState;
use crate::ticks;
use crate::units::Quantity;

use super::units;

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
            dashed: false,
            shaded: false,
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

/// A curve's legend name, colour and value at a row (a missing value breaks the curve).
type CurveSpec<T> = (&'static str, Color32, fn(&T) -> Option<f64>);

/// A curve for each spec, sampled at `x` over `rows`.
fn curves_of<T>(rows: &[T], x: fn(&T) -> f64, specs: &[CurveSpec<T>]) -> Vec<Curve> {
    specs
        .iter()
        .map(|&(name, color, y)| {
            Curve::from_samples(name, color, rows.iter().map(|r| (x(r), y(r))))
        })
        .collect()
}

/// Curves of the stroke-against-bore plot.
pub fn window_curves(a: &Analysis) -> Vec<Curve> {
    curves_of(
        &a.window,
        |r| r.bore_mm,
        &[
            ("first contact", C_CONTACT, |r| r.first_contact_stroke_mm),
            ("holds load x SF", C_HOLD, |r| r.holding_stroke_mm),
            ("stress limit", C_STRESS, |r| r.stress_limit_stroke_mm),
            ("line contact begins", C_LINE, |r| r.line_contact_stroke_mm),
            ("model limit", C_LIMIT, |r| r.limit_stroke_mm),
        ],
    )
}

/// Curves of the force plot.
pub fn force_curves(a: &Analysis) -> Vec<Curve> {
    curves_of(
        &a.curve,
        |s| s.stroke_mm,
        &[
            ("radial force", C_CONTACT, |s| s.radial_force_n),
            ("holding force", C_HOLD, |s| s.holding_force_n),
            ("actuator pull", C_ACT, |s| s.actuator_force_n),
        ],
    )
}

/// Curves of the stress plot.
pub fn stress_curves(a: &Analysis) -> Vec<Curve> {
    curves_of(
        &a.curve,
        |s| s.stroke_mm,
        &[("peak stress", C_STRESS, |s| s.max_stress_mpa)],
    )
}

/// The right panel: checks, the operating state, cautions.
pub fn verdict_ui(app: &mut GripApp, ui: &mut Ui) {
    egui::ScrollArea::vertical().auto_shrink([false, false]).show(ui, |ui| {
        if let Some(err) = &app.analysis_error {
            ui.label(RichText::new(units().prose(&format!("The design as edited cannot be analysed: {err}. Showing the last valid design."))).color(error_color(ui)));
        }
        let Some(a) = &app.analysis else {
            ui.label("No analysis yet.");
            return;
        };
        let failed = a.checks.iter().filter(|c| !c.pass).count();
        let (text, color) = if failed == 0 { ("Every check passes".to_string(), C_HOLD) } else { (format!("{failed} of {} checks fail", a.checks.len()), error_color(ui)) };
        ui.heading(RichText::new(text).color(color));
        super::strips::status_ui(app, ui);
        ui.label(RichText::new(format!("Each check is judged at its own bore and stroke; margin is capacity over demand minus one in per cent, or {} of room.", units().length_words())).small());
        // The stored-energy caution sits at the top, where it is seen without scrolling.
        let stored = a.max_strain_energy_j().map_or_else(|| "store spring energy when bowed".to_string(), |e| units().prose(&format!("store up to {e:.3} J at the operating stroke")));
        ui.label(RichText::new(format!("Caution: the strips {stored} and can snap or spring out when released or broken.")).color(C_ACT));
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
                let head = format!("{mark} {}{}", c.title(), if limiting { "   [limiting]" } else { "" });
                let where_ = match (c.bore_mm, c.stroke_mm) {
                    (Some(b), Some(s)) => units().prose(&format!("judged at bore {b:.3} mm, stroke {s:.3} mm")),
                    (Some(b), None) => units().prose(&format!("judged at bore {b:.3} mm")),
                    (None, _) => "judged on the hub at rest".to_string(),
                };
                ui.label(RichText::new(head).color(col).strong()).on_hover_text(where_);
                let none = if c.pass { "no margin in this check's terms" } else { "no margin (no state to judge)" };
                ui.label(format!("{}: {}", if c.pass { "pass" } else { "FAIL" }, c.margin_text_in(units()).map_or_else(|| none.to_string(), |m| format!("margin {m}"))));
                ui.label(RichText::new(units().prose(&c.reason)).small());
            });
        }
        if let Some(u) = a.usable_stroke() {
            ui.separator();
            let mut text = units().prose(&u.describe());
            text[..1].make_ascii_uppercase();
            let col = if u.range_mm().is_some() {
                C_HOLD
            } else if u.is_problem() {
                error_color(ui)
            } else {
                ui.visuals().text_color()
            };
            ui.label(RichText::new(text).color(col)).on_hover_text(
                "The strokes at which every bore of the tolerance band works: the segment holds the required load at the largest bore and stays within the stress limit, the model's limit and the actuator's travel at the smallest. The green fill of the stroke-against-bore plot shows the window bore by bore.",
            );
        }
        if !a.cautions.is_empty() {
            ui.separator();
            ui.label(RichText::new("Geometry caution").color(error_color(ui)).strong()).on_hover_text(
                "Not one of the checks: the model lets a strip pass through the end plates and through itself, so states past this point are not physical. Shorten the operating stroke or narrow the gap to the wall.",
            );
            for c in &a.cautions {
                ui.label(RichText::new(units().prose(c)).color(error_color(ui)).small());
            }
        }
        ui.separator();
        ui.strong("At the operating stroke, nominal bore");
        if let Some(b) = a.bores.iter().find(|b| b.case == BoreCase::Nominal) {
            match &b.operating {
                Ok(s) => state_table_ui(ui, s),
                Err(e) => {
                    ui.label(RichText::new(units().prose(e)).color(error_color(ui)));
                }
            }
        }
        super::strips::table_ui(app, ui);
        ui.separator();
        if ui.button("Safety cautions").on_hover_text("Hazards of building and using bowed-strip segments.").clicked() {
            app.push(Command::ShowCautions);
        }
    });
}

fn state_table_ui(ui: &mut Ui, s: &SegmentState) {
    egui::Grid::new("state").num_columns(2).striped(true).show(ui, |ui| {
        let mut row = |k: &str, v: String, tip: &str| {
            ui.label(k).on_hover_text(tip);
            ui.label(v);
            ui.end_row();
        };
        row("phase", s.phase.to_string(), "free, point contact at the crest, line contact (a flat run on the wall), beyond the model's limit, or a failed solve");
        let u = units();
        for f in &STATE_FIELDS {
            let text = match (f.get)(s) {
                Some(_) if !f.unit.is_empty() => format!("{} {}", f.number_in(s, "n/a", u), f.unit_in(u)),
                _ => f.number_in(s, "n/a", u),
            };
            row(f.label, text, f.meaning);
        }
        if let Some(r) = s.actuator {
            row("actuator reads", u.prose(&r.describe()), "the actuator's own effort and position");
        }
        row("model limit", u.prose(&format!("{:.3} mm ({})", s.limit_stroke_mm, s.limit_reason)), "stroke where the model stops in this bore");
    });
}

/// The central area: four cells.
pub fn results_ui(app: &mut GripApp, ui: &mut Ui) {
    let Some(a) = &app.analysis else {
        ui.label("No analysis to show.");
        return;
    };
    let seg = &a.segment;
    let avail = ui.available_size();
    let cell = Vec2::new((avail.x - 12.0) / 2.0, (avail.y - 40.0) / 2.0);
    let plot_h = cell.y - 20.0;
    let window = window_curves(a);
    let forces = force_curves(a);
    let need = seg.required_holding_force_n();
    let travel = Marker {
        name: "actuator max travel",
        value: seg.max_stroke_mm(),
        // Through a compliant drive the marker is a curve of stroke, below the travel.
        level: super::drive::travel_limit_top_mm(a).unwrap_or(seg.max_stroke_mm()),
        unit: "mm",
        top: top_of(&window),
    };
    let rating = Marker {
        name: "actuator rating as pull",
        value: seg.max_pull_n(),
        level: seg.max_pull_n(),
        unit: "N",
        top: top_of(&forces).max(need),
    };
    let marks = super::strips::stroke_marks(app);
    let loaded_curve = super::strips::loaded_curve_of(app).to_vec();
    let loaded = app.sharing.view_for(&app.doc.design);
    let bench = app
        .bench
        .nominal_force_points(&seg.design, seg.bore_nominal_mm);
    let [window_rect, force_rect, stress_rect] = &mut app.plot_rects;
    ui.horizontal(|ui| {
        plot_cell_ui(
            ui,
            cell.x,
            window_rect,
            "Stroke against bore",
            &format!("For each bore: the stroke at first contact, where the load is held, where stress reaches its allowable, where line contact begins and where the model stops. The shaded band is the bore tolerance; the green fill is the usable window.{}", if a.travel_limit_window.is_empty() { "" } else { "\n\nThe drive stretches (travel = stroke + pull / stiffness), so the actuator's maximum travel is drawn as the stroke at which each bore's travel reaches it." }),
            travel.note(),
            |ui| window_plot_ui(ui, a, &window, &travel, plot_h),
        );
        plot_cell_ui(
            ui,
            cell.x,
            force_rect,
            &units().prose(&format!("Forces against stroke at the nominal bore, {:.2} mm", seg.bore_nominal_mm)),
            "Shaded: the free, point-contact and line-contact phases (named when there is room; hover for the phase at a stroke).\n\nWith a radial load, an out-of-round bore or a bend, the dashed curves are the governing load-sharing case at the nominal bore: the strips' summed holding force and pull with the hub off-centre (the solid ones are the centred model).",
            rating.note().filter(|_| !a.curve.is_empty()),
            |ui| force_plot_ui(ui, a, &forces, &rating, need, plot_h, &marks, &bench, &loaded_curve),
        );
    });
    ui.horizontal(|ui| {
        plot_cell_ui(
            ui,
            cell.x,
            stress_rect,
            &units().prose(&format!("Peak stress against stroke at the nominal bore, {:.2} mm", seg.bore_nominal_mm)),
            "Dashed: the static (0.75 x tensile) and the fatigue (Goodman, zero-to-peak) allowables. Shaded: the contact phases, as in the force plot.\n\nThe curve dips just after first contact, and that is physics, not a numerical fault: as the wall takes load, the peak curvature leaves the crest and the plates for points between them, and at first it falls before it rises again. Linear beam-column theory of a clamped strut pressed at mid-span shows the same dip.\n\nWith a radial load, an out-of-round bore or a bend, the dashed curve is the worst strip of the governing load-sharing case at the nominal bore: while the hub rests on its rim, the strips below it are pressed into a smaller gap and their stress rises fast until the strips lift the hub.",
            Some("dip after first contact: physical, see heading".to_string()),
            |ui| stress_plot_ui(ui, a, plot_h, &marks, &loaded_curve),
        );
        ui.vertical(|ui| {
            ui.set_width(cell.x);
            let shape = a.side_shape();
            let heading = match (shape.is_operating(), a.nominal_operating_stroke_mm()) {
                (true, Some(op)) => units().prose(&format!("To scale at {op:.3} mm stroke")),
                (false, Some(op)) => units().prose(&format!("To scale, strips relaxed: no state at the {op:.3} mm operating stroke")),
                (_, None) => "To scale, strips relaxed: the set pull is never reached at the nominal bore".to_string(),
            };
            ui.add(egui::Label::new(RichText::new(&heading).strong()).truncate()).on_hover_text(format!("{heading}\n\nLeft: one strip in its meridional plane between the bore walls, the end plates, and the flat run on the wall in bold. Right: the ring of strips seen along the axis inside the bore."));
            let h = plot_h;
            let w = ui.available_width();
            // A long strip reads better with the end view below it, a short one beside it.
            let d = &seg.design;
            let long = d.strip.free_length_mm * 1.15 > 1.4 * seg.bore_nominal_mm;
            if long {
                // Under load sharing the end view carries the force arrows: give it more room.
                let side_share = if loaded.is_some() { 0.45 } else { 0.66 };
                let side_h = (h * side_share).min(w * 1.1 * seg.bore_nominal_mm as f32 / (d.strip.free_length_mm as f32 * 1.15));
                side_view_ui(ui, a, &shape, Vec2::new(w, side_h));
                let size = Vec2::new(w, (h - side_h - 6.0).max(40.0));
                if !super::strips::end_view_ui(ui, a, loaded, size) {
                    end_view_ui(ui, a, size);
                }
            } else {
                ui.horizontal(|ui| {
                    side_view_ui(ui, a, &shape, Vec2::new(w * 0.62, h));
                    let size = Vec2::new(w * 0.36, h);
                    if !super::strips::end_view_ui(ui, a, loaded, size) {
                        end_view_ui(ui, a, size);
                    }
                });
            }
        });
    });
    apply_stroke_drag(app, ui.ctx());
}

/// Applies a drag of the operating-stroke line as an edit of the design's stroke: ongoing
/// while the button is held, one undo step when it is released. A stroke the design file
/// would refuse is not applied.
fn apply_stroke_drag(app: &mut GripApp, ctx: &egui::Context) {
    let Some(drag) = ctx.data_mut(|d| d.remove_temp::<StrokeDrag>(stroke_drag_id())) else {
        return;
    };
    let mut next = app.design().clone();
    next.set_operating(crate::design::Operating::Stroke(drag.stroke_mm));
    if next != *app.design() && next.validate().is_ok() {
        app.push(Command::Edit(Box::new(next), super::Gesture::Ongoing));
    }
    if drag.done {
        app.push(Command::EndGesture);
    }
}

/// One plot cell: the heading (its explanation on hover) with, right-aligned, a note
/// naming what lies above the plotted range, then the plot. Records the cell's rectangle
/// (heading, axes and plot), which the PNG export cuts out.
fn plot_cell_ui(
    ui: &mut Ui,
    width: f32,
    rect: &mut Option<egui::Rect>,
    title: &str,
    tip: &str,
    note: Option<String>,
    plot: impl FnOnce(&mut Ui),
) {
    ui.vertical(|ui| {
        ui.set_width(width);
        ui.horizontal(|ui| {
            // The heading never widens the cell: on a narrow window it is shortened, and
            // the whole of it is in the tooltip.
            ui.set_max_width(width);
            ui.add(egui::Label::new(RichText::new(title).strong()).truncate())
                .on_hover_text(format!("{title}\n\n{tip}"));
            if let Some(note) = note {
                ui.with_layout(egui::Layout::right_to_left(egui::Align::Min), |ui| {
                    ui.add(egui::Label::new(RichText::new(&note).small().color(C_ACT)).truncate())
                        .on_hover_text(note);
                });
            }
        });
        plot(ui);
        *rect = Some(ui.min_rect());
    });
}

/// A rating drawn as a dashed line across a plot, unless it lies far above the curves
/// (it would squeeze them flat); then the cell's heading names it instead.
struct Marker {
    name: &'static str,
    value: f64,
    /// Height at which it is drawn (its value, or for a curve its highest point).
    level: f64,
    unit: &'static str,
    /// Highest value the plot shows without the marker.
    top: f64,
}

impl Marker {
    fn off_scale(&self) -> bool {
        self.top > 0.0 && self.level > 1.4 * self.top
    }

    fn note(&self) -> Option<String> {
        self.off_scale().then(|| {
            units().prose(&format!(
                "{} {:.2} {}: above the plotted range",
                self.name, self.value, self.unit
            ))
        })
    }

    fn add_to(&self, p: &mut egui_plot::PlotUi<'_>) {
        if !self.off_scale() {
            p.add(
                HLine::new(self.name, self.value)
                    .color(C_ACT)
                    .style(LineStyle::dashed_loose()),
            );
        }
    }
}

/// A shaded band across a plot. Its name is written in the band only where it fits, so
/// a narrow band is never labelled with a cut-off word.
struct Band {
    name: &'static str,
    range: (f64, f64),
    fill: Color32,
}

impl Band {
    fn add_to(&self, p: &mut egui_plot::PlotUi<'_>) {
        // Unnamed: the plot would otherwise print the name cut to the band's width.
        p.add(Span::new("", self.range.0..=self.range.1).fill(self.fill));
    }
}

/// Space between a band label and the band's edges, points.
const BAND_LABEL_PAD: f32 = 4.0;

/// Writes each band's name at the top of the band, right-aligned, where it fits between
/// the band's edges and stays clear of the legend in the top-left corner.
fn band_labels_ui(ui: &Ui, t: &egui_plot::PlotTransform, bands: &[Band], legend: &[&str]) {
    let frame = *t.frame();
    let painter = ui.painter().with_clip_rect(frame);
    let font = egui::TextStyle::Small.resolve(ui.style());
    let color = ui.visuals().text_color().gamma_multiply(0.8);
    let width = |s: &str| {
        painter
            .layout_no_wrap(s.to_string(), font.clone(), color)
            .size()
            .x
    };
    // The legend's swatch and padding take about two line heights beside the text.
    let legend_w = legend.iter().map(|s| width(s)).fold(0.0, f32::max) + 2.5 * font.size;
    for b in bands {
        let left = t.position_from_point_x(b.range.0).max(frame.left());
        let right = t.position_from_point_x(b.range.1).min(frame.right());
        let galley = painter.layout_no_wrap(b.name.to_string(), font.clone(), color);
        let x = right - BAND_LABEL_PAD - galley.size().x;
        if x < left + BAND_LABEL_PAD || x < frame.left() + legend_w + BAND_LABEL_PAD {
            continue;
        }
        painter.galley(Pos2::new(x, frame.top() + BAND_LABEL_PAD), galley, color);
    }
}

/// Grid spacing below which the plots draw no grid line, points.
const GRID_MIN_PX: f32 = 8.0;
/// Spacing of tick labels, points: hidden below the first, faded up to the second.
const X_LABEL_PX: egui::Rangef = egui::Rangef {
    min: 28.0,
    max: 34.0,
};
const Y_LABEL_PX: egui::Rangef = egui::Rangef {
    min: 20.0,
    max: 30.0,
};

/// Grid lines on a 1-2-5 series with the labelled lines at least `label_px` points apart
/// (the plot's own powers of ten leave a narrow range with a single labelled tick).
/// The plot's data stay in the file's units; `factor` (file units per displayed unit) puts
/// the lines at round values of the displayed unit.
fn grid_125(
    label_px: f32,
    factor: f64,
) -> impl Fn(egui_plot::GridInput) -> Vec<egui_plot::GridMark> {
    egui_plot::uniform_grid_spacer(move |input| {
        let min = input.base_step_size / factor * f64::from(label_px / GRID_MIN_PX);
        let (label, lead) = if min.is_finite() && min > 0.0 {
            ticks::nice_step(min)
        } else {
            let span = (input.bounds.1 - input.bounds.0).abs();
            (
                if span.is_finite() && span > 0.0 {
                    span
                } else {
                    1.0
                },
                1.0,
            )
        };
        let fine = label / if lead == 2.0 { 4.0 } else { 5.0 };
        // Labelled lines are all of one weight, so their labels share one number of decimals.
        [fine * factor, label * factor, label * factor]
    })
}

/// The tick labels of an axis whose data are in the file's units, shown in the display
/// units: the value and the step divided by `factor` (1 in metric).
fn tick_label_in(
    factor: f64,
) -> impl Fn(egui_plot::GridMark, &std::ops::RangeInclusive<f64>) -> String {
    move |mark, range| {
        tick_label(
            egui_plot::GridMark {
                value: mark.value / factor,
                step_size: mark.step_size / factor,
            },
            range,
        )
    }
}

/// An axis title in the display units: `stroke, mm` or `stroke, in`.
fn axis_title(name: &str, q: Quantity) -> String {
    format!("{name}, {}", units().unit(q))
}

/// A tick label with as many decimals as its step needs.
fn tick_label(mark: egui_plot::GridMark, _range: &std::ops::RangeInclusive<f64>) -> String {
    let decimals = ticks::decimals(mark.step_size);
    format!("{:.decimals$}", mark.value)
}

/// A plot with the app's legend, grid and axis labels. The data are in the file's units
/// (mm, N, MPa); the axes are labelled, gridded and numbered in the display units of the
/// quantities `xq` and `yq`.
fn plot_frame<'a>(
    id: &str,
    (x_name, xq): (&str, Quantity),
    (y_name, yq): (&str, Quantity),
    height: f32,
) -> Plot<'a> {
    let plot = Plot::new(id)
        .height(height)
        .legend(
            Legend::default()
                .position(egui_plot::Corner::LeftTop)
                .background_alpha(0.6)
                .text_style(egui::TextStyle::Small)
                .follow_insertion_order(true),
        )
        .grid_spacing(egui::Rangef::new(GRID_MIN_PX, 300.0));
    display_axes(plot, (x_name, Some(xq)), (y_name, Some(yq)))
}

/// A plot's axes titled, gridded at round values and numbered in the display units of
/// `xq` and `yq` (`None`: a pure number, the title as given), over data in the file's
/// units (mm, N, MPa).
pub(super) fn display_axes<'a>(
    plot: Plot<'a>,
    (x_name, xq): (&str, Option<Quantity>),
    (y_name, yq): (&str, Option<Quantity>),
) -> Plot<'a> {
    let factor = |q: Option<Quantity>| q.map_or(1.0, |q| units().from_display(q, 1.0));
    let title =
        |name: &str, q: Option<Quantity>| q.map_or(name.to_string(), |q| axis_title(name, q));
    let (fx, fy) = (factor(xq), factor(yq));
    let (x_label, y_label) = (title(x_name, xq), title(y_name, yq));
    plot.custom_x_axes(vec![
        AxisHints::new_x()
            .label(x_label)
            .formatter(tick_label_in(fx))
            .label_spacing(X_LABEL_PX),
    ])
    .custom_y_axes(vec![
        AxisHints::new_y()
            .label(y_label)
            .formatter(tick_label_in(fy))
            .label_spacing(Y_LABEL_PX),
    ])
    .x_grid_spacer(grid_125(X_LABEL_PX.max, fx))
    .y_grid_spacer(grid_125(Y_LABEL_PX.max, fy))
}

/// The item name and the point under the pointer.
fn hovered<'h>(hover: &egui_plot::HoverPosition<'h>) -> (&'h str, egui_plot::PlotPoint) {
    match hover {
        egui_plot::HoverPosition::NearDataPoint {
            plot_name,
            position,
            ..
        } => (plot_name, *position),
        egui_plot::HoverPosition::Elsewhere { position } => ("", *position),
    }
}

/// Hover text of the plots against stroke: the item, the stroke, the value, the phase at
/// that stroke and, when asked, the actuator's own reading there.
/// The frame of a plot against stroke at the nominal bore: fixed in place (the operating
/// line is dragged instead), its hover reading the value under the pointer (`value`
/// writes it in the file's unit; the display units convert it) and the state of `curve`
/// at that stroke (`actuator`: with the actuator's reading).
fn stroke_plot_frame<'a>(
    id: &str,
    y_axis: (&str, Quantity),
    height: f32,
    curve: &'a [SegmentState],
    value: fn(f64) -> String,
    actuator: bool,
) -> Plot<'a> {
    plot_frame(id, ("stroke", Quantity::Length), y_axis, height)
        .allow_drag(false)
        .label_formatter(move |hover| {
            let (_, p) = hovered(hover);
            Some(stroke_hover(
                curve,
                hover,
                units().prose(&value(p.y)),
                actuator,
            ))
        })
}

fn stroke_hover(
    curve: &[SegmentState],
    hover: &egui_plot::HoverPosition<'_>,
    value: String,
    actuator: bool,
) -> String {
    let (name, p) = hovered(hover);
    let near = curve.iter().min_by(|x, y| {
        (x.stroke_mm - p.x)
            .abs()
            .total_cmp(&(y.stroke_mm - p.x).abs())
    });
    let phase = near.map_or(String::new(), |s| {
        format!("\n{}", s.phase.name().replace('-', " "))
    });
    let act = near
        .and_then(|s| s.actuator.filter(|_| actuator))
        .map(|r| {
            format!(
                "\nactuator {:.3} {} at {:.3} {}",
                r.effort, r.effort_unit, r.position, r.position_unit
            )
        })
        .unwrap_or_default();
    units().prose(&format!(
        "{name}\nstroke {:.3} mm\n{value}{phase}{act}",
        p.x
    ))
}

/// Colour of the operating-stroke marker: the text colour, so it reads on both themes.
fn marker(visuals: &egui::Visuals) -> Color32 {
    visuals.text_color()
}

fn window_plot_ui(ui: &mut Ui, a: &Analysis, curves: &[Curve], travel: &Marker, height: f32) {
    let seg = &a.segment;
    let usable = a.usable_window_mm();
    let mark = marker(ui.visuals());
    let tolerance = (seg.bore_smallest_mm, seg.bore_largest_mm);
    let bands = [Band {
        name: "bore tolerance",
        range: tolerance,
        fill: C_STEEL.gamma_multiply(0.18),
    }];
    let shown = plot_frame(
        "window-plot",
        ("bore diameter", Quantity::Length),
        ("stroke", Quantity::Length),
        height,
    )
    .label_formatter(move |hover| {
        let (name, p) = hovered(hover);
        let within = if (tolerance.0..=tolerance.1).contains(&p.x) {
            "\nwithin the bore tolerance"
        } else {
            ""
        };
        Some(units().prose(&format!(
            "{name}\nbore {:.3} mm\nstroke {:.3} mm{within}",
            p.x, p.y
        )))
    })
    .show(ui, |p| {
        for b in &bands {
            b.add_to(p);
        }
        // Usable window: holding reached, below stress limit, model limit and actuator travel.
        for run in &usable {
            if run.len() >= 2 {
                let xs: Vec<f64> = run.iter().map(|r| r[0]).collect();
                let lo: Vec<f64> = run.iter().map(|r| r[1]).collect();
                let hi: Vec<f64> = run.iter().map(|r| r[2]).collect();
                p.add(
                    FilledArea::new("usable window", &xs, &lo, &hi)
                        .fill_color(C_HOLD.gamma_multiply(0.25)),
                );
            }
        }
        for c in curves {
            c.add_to(p);
        }
        if !super::drive::travel_limit_marker(p, a, travel.name, C_ACT) {
            travel.add_to(p);
        }
        super::drive::operating_marker(p, a, mark);
        p.add(VLine::new("nominal bore", seg.bore_nominal_mm).color(C_STEEL));
    });
    let mut legend: Vec<&str> = curves.iter().map(|c| c.name).collect();
    legend.extend([
        "usable window",
        travel.name,
        "operating stroke",
        "nominal bore",
    ]);
    band_labels_ui(ui, &shown.transform, &bands, &legend);
}

/// Highest value over the curves.
fn top_of(curves: &[Curve]) -> f64 {
    curves
        .iter()
        .flat_map(|c| c.runs.iter().flatten())
        .map(|p| p[1])
        .fold(0.0, f64::max)
}

/// The free, point-contact and line-contact phases along the force-stroke curve.
fn phase_bands(a: &Analysis) -> Vec<Band> {
    let (Some(first), Some(last)) = (a.curve.first(), a.curve.last()) else {
        return Vec::new();
    };
    let end = last.stroke_mm;
    let fc = first.first_contact_stroke_mm.unwrap_or(end).min(end);
    let lc = first.line_contact_stroke_mm.unwrap_or(end).min(end);
    let grey = Color32::from_gray(128);
    let mut bands = vec![Band {
        name: "free",
        range: (0.0, fc),
        fill: grey.gamma_multiply(0.06),
    }];
    if lc > fc {
        bands.push(Band {
            name: "point contact",
            range: (fc, lc),
            fill: C_CONTACT.gamma_multiply(0.10),
        });
    }
    if end > lc {
        bands.push(Band {
            name: "line contact",
            range: (lc, end),
            fill: C_LINE.gamma_multiply(0.12),
        });
    }
    bands
}

/// The phase bands and the operating stroke, behind a plot against stroke.
fn phase_backdrop(p: &mut egui_plot::PlotUi<'_>, a: &Analysis, bands: &[Band], mark: Color32) {
    for b in bands {
        b.add_to(p);
    }
    if let Some(op) = a.nominal_operating_stroke_mm() {
        p.add(
            VLine::new("operating stroke", op)
                .color(mark)
                .style(LineStyle::dashed_dense()),
        );
    }
}

/// In place of a plot against stroke when the nominal bore has no curve: says why, in the
/// plot's space.
fn no_curve_ui(ui: &mut Ui, a: &Analysis, height: f32) {
    let size = Vec2::new(ui.available_width(), height);
    ui.allocate_ui_with_layout(size, egui::Layout::centered_and_justified(egui::Direction::TopDown), |ui| {
        ui.label(
            RichText::new(units().prose(&format!(
                "No curve: the relaxed segment does not fit the nominal bore, {:.2} mm, so the model has no state there.",
                a.segment.bore_nominal_mm
            )))
            .color(error_color(ui)),
        );
    });
}

// The plot's inputs are each a different overlay; bundling them would only rename them.
#[allow(clippy::too_many_arguments)]
fn force_plot_ui(
    ui: &mut Ui,
    a: &Analysis,
    curves: &[Curve],
    rating: &Marker,
    need: f64,
    height: f32,
    marks: &[(&'static str, f64)],
    bench: &[super::bench::Overlay],
    loaded: &[super::strips::LoadedCurvePoint],
) {
    if a.curve.is_empty() {
        no_curve_ui(ui, a, height);
        return;
    }
    let curve = &a.curve;
    let mark = marker(ui.visuals());
    let bands = phase_bands(a);
    let shown = stroke_plot_frame(
        "force-plot",
        ("force", Quantity::Force),
        height,
        curve,
        |y| format!("{y:.2} N"),
        true,
    )
    .show(ui, |p| {
        phase_backdrop(p, a, &bands, mark);
        for c in curves {
            c.add_to(p);
        }
        p.add(
            HLine::new("load x safety factor", need)
                .color(C_HOLD)
                .style(LineStyle::dashed_loose()),
        );
        rating.add_to(p);
        super::strips::add_marks(p, marks);
        super::bench::overlay_ui(p, bench);
        loaded_line(p, LOADED_HOLD, C_HOLD, loaded, |q| q.holding_force_n);
        loaded_line(p, LOADED_PULL, C_ACT, loaded, |q| q.actuator_force_n);
    });
    let mut legend: Vec<&str> = curves.iter().map(|c| c.name).collect();
    legend.extend(["operating stroke", "load x safety factor", rating.name]);
    if !loaded.is_empty() {
        legend.extend([LOADED_HOLD, LOADED_PULL]);
    }
    legend.extend(marks.iter().map(|m| m.0));
    band_labels_ui(ui, &shown.transform, &bands, &legend);
    drag_operating_line_ui(ui, &shown, a, "force");
}

/// Legend names of the load-sharing curves (the governing case at the nominal bore).
const LOADED_HOLD: &str = "holding force, loaded";
const LOADED_PULL: &str = "actuator pull, loaded";
const LOADED_STRESS: &str = "peak stress, worst loaded strip";

/// One quantity of the governing loaded case along the stroke, dashed in its centred
/// curve's colour; nothing when there is no loaded curve.
fn loaded_line(
    p: &mut egui_plot::PlotUi<'_>,
    name: &'static str,
    color: Color32,
    loaded: &[super::strips::LoadedCurvePoint],
    value: impl Fn(&super::strips::LoadedCurvePoint) -> f64,
) {
    // Runs of known states; a missing state (NaN) breaks the line.
    let points: Vec<[f64; 2]> = loaded.iter().map(|q| [q.stroke_mm, value(q)]).collect();
    for run in points.split(|q| !q[1].is_finite()).filter(|r| r.len() >= 2) {
        p.line(
            Line::new(name, PlotPoints::new(run.to_vec()))
                .color(color)
                .width(1.5)
                .style(LineStyle::dashed_dense()),
        );
    }
}

fn stress_plot_ui(
    ui: &mut Ui,
    a: &Analysis,
    height: f32,
    marks: &[(&'static str, f64)],
    loaded: &[super::strips::LoadedCurvePoint],
) {
    if a.curve.is_empty() {
        no_curve_ui(ui, a, height);
        return;
    }
    let seg = &a.segment;
    let curves = stress_curves(a);
    let curve = &a.curve;
    let mark = marker(ui.visuals());
    let bands = phase_bands(a);
    let shown = stroke_plot_frame(
        "stress-plot",
        ("stress", Quantity::Stress),
        height,
        curve,
        |y| format!("{y:.1} MPa"),
        false,
    )
    .include_y(0.0)
    .show(ui, |p| {
        phase_backdrop(p, a, &bands, mark);
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
        super::strips::add_marks(p, marks);
        loaded_line(p, LOADED_STRESS, C_STRESS, loaded, |q| q.max_stress_mpa);
    });
    let mut legend: Vec<&str> = curves.iter().map(|c| c.name).collect();
    legend.extend(["operating stroke", "static allowable", "fatigue allowable"]);
    if !loaded.is_empty() {
        legend.push(LOADED_STRESS);
    }
    legend.extend(marks.iter().map(|m| m.0));
    band_labels_ui(ui, &shown.transform, &bands, &legend);
    drag_operating_line_ui(ui, &shown, a, "stress");
}

/// A stroke asked for by dragging the operating-stroke line of a plot against stroke.
#[derive(Clone, Copy, Debug, Default)]
struct StrokeDrag {
    stroke_mm: f64,
    /// The button was released: the gesture ends (one undo step for the whole drag).
    done: bool,
}

/// Where a drag of the operating-stroke line leaves its request for `results_ui`.
fn stroke_drag_id() -> egui::Id {
    egui::Id::unique("operating-stroke-drag")
}

/// Lets the user drag the dashed operating-stroke line of a plot against stroke, when the
/// design sets a stroke (under a set pull or torque the stroke follows from the pull):
/// the cursor shows a horizontal resize within 6 px of the line, a drag that starts there
/// moves it, and the stroke under the pointer is left for `results_ui` to apply.
fn drag_operating_line_ui(ui: &Ui, shown: &egui_plot::PlotResponse<()>, a: &Analysis, plot: &str) {
    let Some(op) = a.nominal_operating_stroke_mm() else {
        return;
    };
    if !matches!(
        a.segment.design.operating(),
        crate::design::Operating::Stroke(_)
    ) {
        return;
    }
    let resp = &shown.response;
    let line_x = shown
        .transform
        .position_from_point(&egui_plot::PlotPoint::new(op, 0.0))
        .x;
    let near = |pos: Pos2| (pos.x - line_x).abs() <= 6.0 && resp.rect.contains(pos);
    let grab = resp.id.with(plot).with("grabbed");
    let ctx = ui.ctx();
    let mut grabbed = ctx.data(|d| d.get_temp::<bool>(grab)).unwrap_or(false);
    if resp.drag_started() && resp.interact_pointer_pos().is_some_and(near) {
        grabbed = true;
    }
    if grabbed || resp.hover_pos().is_some_and(near) {
        ctx.set_cursor_icon(egui::CursorIcon::ResizeHorizontal);
    }
    if grabbed {
        let done = resp.drag_stopped() || !resp.dragged();
        if let Some(pos) = resp.interact_pointer_pos().or(resp.hover_pos()) {
            let stroke_mm = shown.transform.value_from_position(pos).x.max(0.0);
            ctx.data_mut(|d| d.insert_temp(stroke_drag_id(), StrokeDrag { stroke_mm, done }));
        }
        if done {
            grabbed = false;
        }
    }
    ctx.data_mut(|d| d.insert_temp(grab, grabbed));
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

fn side_view_ui(ui: &mut Ui, a: &Analysis, drawn: &SideShape<'_>, size: Vec2) {
    let shape = drawn.points();
    let (resp, painter) = ui.allocate_painter(size, egui::Sense::hover());
    let rect = resp.rect.shrink(12.0);
    let d = &a.segment.design;
    let fg = ui.visuals().text_color();
    let r_wall = 0.5 * a.segment.bore_nominal_mm;
    let chord = shape.last().map_or(d.strip.free_length_mm, |p| p[0]);
    let plate_r = a.segment.drawn_plate_radius_mm();
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
        units().prose(&format!("bore {:.2} mm", 2.0 * r_wall)),
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
    if !drawn.is_operating() {
        // The strips as built, straight at the mount radius, with a word on why.
        let relaxed = Stroke::new(
            (d.strip.thickness_mm as f32 * scale.px_per_mm).max(1.5),
            fg.gamma_multiply(0.5),
        );
        for sgn in [1.0, -1.0] {
            let pts: Vec<Pos2> = shape.iter().map(|p| scale.p(p[0], sgn * p[1])).collect();
            painter.add(egui::Shape::line(pts, relaxed));
        }
        let why = if a.curve.is_empty() {
            "no state: the relaxed strips do not fit this bore"
        } else {
            "no state at the operating stroke (see the checks); strips drawn relaxed"
        };
        let galley = painter.layout_no_wrap(why.to_string(), egui::FontId::proportional(13.0), fg);
        let at = egui::Align2::CENTER_CENTER.anchor_size(rect.center(), galley.size());
        // On the panel's colour, so the axis line does not run through the words.
        painter.rect_filled(at.expand(3.0), 2.0, ui.visuals().panel_fill);
        painter.galley(at.min, galley, fg);
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
        format!(
            "drawn at {:.2} px/{}; red: flat run on the wall",
            f64::from(scale.px_per_mm) * units().from_display(Quantity::Length, 1.0),
            units().unit(Quantity::Length)
        ),
        egui::FontId::proportional(10.0),
        fg.gamma_multiply(0.7),
    );
}

fn end_view_ui(ui: &mut Ui, a: &Analysis, size: Vec2) {
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
    let view = a.end_view();
    painter.circle_filled(
        c,
        view.plate_radius_mm as f32 * scale.px_per_mm,
        C_STEEL.gamma_multiply(0.35),
    );
    let crest = view.at_crest.iter().map(|(_, q)| (q, C_ACT));
    for (quads, color) in std::iter::once((&view.at_plates, fg.gamma_multiply(0.35))).chain(crest) {
        for q in quads {
            let pts: Vec<Pos2> = q.iter().map(|p| scale.p(p[0], p[1])).collect();
            painter.add(egui::Shape::convex_polygon(pts, color, Stroke::NONE));
        }
    }
    let (n, b) = (d.strip.count, d.strip.width_mm);
    painter.text(
        rect.center_bottom(),
        egui::Align2::CENTER_BOTTOM,
        if units().is_metric() {
            format!("{n} strips, {b} x {} mm", d.strip.thickness_mm)
        } else {
            format!(
                "{n} strips, {} x {} in",
                units().number(Quantity::Length, b, 3),
                units().number(Quantity::Thickness, d.strip.thickness_mm, 3)
            )
        },
        egui::FontId::proportional(10.0),
        fg.gamma_multiply(0.7),
    );
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tick_labels_carry_the_decimals_of_their_step() {
        let tick =
            |value, step_size| tick_label(egui_plot::GridMark { value, step_size }, &(0.0..=1.0));
        assert_eq!(tick(99.5, 0.5), "99.5");
        assert_eq!(tick(100.0, 0.5), "100.0");
        assert_eq!(tick(2000.0, 200.0), "2000");
        assert_eq!(tick(0.25, 0.05), "0.25");
        assert_eq!(tick(3.0, 1.0), "3");
    }
}
