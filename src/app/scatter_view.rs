//! The scatter window: the design file's shop tolerances (edited here as ordinary,
//! undoable edits) and what they do to every check. The run goes on a thread of its own
//! with a progress bar, a first estimate after the first chunk of samples, and a new run
//! whenever the design changes; the nominal results elsewhere in the app never wait for
//! it. Shows per check the probability of failing with its 95 % Wilson interval and the
//! margin percentiles, the Monte Carlo beside the law-of-propagation standard deviation,
//! the worst-case corner, a histogram of the governing margin and the sensitivities as a
//! sorted bar chart.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::{Arc, Mutex};
use std::time::Duration;

use egui::{Color32, Context, RichText, Ui};
use egui_plot::{Bar, BarChart, Plot};

use super::inputs::error_color;
use super::{Command, Gesture, GripApp, units};
use crate::checks::MarginUnit;
use crate::design::Design;
use crate::map::palette;
use crate::scatter::command::{
    distribution_words, margin_text, percent, sd_text, sensitivities_of,
};
use crate::scatter::{self, Control, DistributionKind, ScatterError, ScatterReport, ScatterSpec};
use crate::units::Quantity;

/// How often the window looks for news while a run goes on.
const POLL: Duration = Duration::from_millis(60);

#[derive(Default)]
struct Shared {
    report: Option<ScatterReport>,
    outcome: Option<Result<(), String>>,
}

struct Job {
    cancel: Arc<AtomicBool>,
    shared: Arc<Mutex<Shared>>,
}

impl Drop for Job {
    fn drop(&mut self) {
        self.cancel.store(true, Ordering::Relaxed);
    }
}

/// The scatter window's state.
#[derive(Default)]
pub struct ScatterView {
    /// Whether the window is open.
    pub open: bool,
    for_design: Option<Design>,
    job: Option<Job>,
    report: Option<ScatterReport>,
    finished: bool,
    error: Option<String>,
    /// The check whose sensitivities the bar chart shows.
    chart_check: Option<&'static str>,
}

impl ScatterView {
    /// The report on show (an early estimate while the run goes on).
    pub fn report(&self) -> Option<&ScatterReport> {
        self.report.as_ref()
    }

    /// Whether the report on show is the whole run for `design`.
    pub fn is_complete_for(&self, design: &Design) -> bool {
        self.finished && self.for_design.as_ref() == Some(design) && self.report.is_some()
    }

    /// Why there is no report, if there is none.
    pub fn error(&self) -> Option<&str> {
        self.error.as_deref()
    }

    fn restart(&mut self, design: &Design, ctx: &Context) {
        self.job = None;
        self.for_design = Some(design.clone());
        self.finished = false;
        self.error = None;
        let Some(spec) = design.scatter.clone() else {
            self.report = None;
            return;
        };
        let cancel = Arc::new(AtomicBool::new(false));
        let shared = Arc::new(Mutex::new(Shared::default()));
        self.job = Some(Job {
            cancel: Arc::clone(&cancel),
            shared: Arc::clone(&shared),
        });
        let design = design.clone();
        let ctx = ctx.clone();
        std::thread::spawn(move || work(&design, &spec, &cancel, &shared, &ctx));
    }

    fn poll(&mut self) {
        let Some(job) = &self.job else { return };
        let Ok(mut shared) = job.shared.lock() else {
            self.error = Some("the scatter run stopped unexpectedly".to_string());
            self.job = None;
            return;
        };
        if let Some(r) = shared.report.take() {
            self.report = Some(r);
        }
        match shared.outcome.take() {
            Some(Ok(())) => self.finished = true,
            Some(Err(why)) => {
                self.error = Some(why);
                self.report = None;
            }
            None => {}
        }
    }

    fn running(&self) -> bool {
        self.job.is_some() && !self.finished && self.error.is_none()
    }
}

fn work(
    design: &Design,
    spec: &ScatterSpec,
    cancel: &AtomicBool,
    shared: &Mutex<Shared>,
    ctx: &Context,
) {
    let mut progress = |r: &ScatterReport| {
        if let Ok(mut s) = shared.lock() {
            s.report = Some(r.clone());
        }
        ctx.request_repaint();
    };
    let result = scatter::run_with(
        design,
        spec,
        Control {
            cancel: Some(cancel),
            progress: Some(&mut progress),
        },
    );
    let outcome = match result {
        Ok(_) => Ok(()),
        Err(ScatterError::Cancelled) => return,
        Err(e) => Err(e.to_string()),
    };
    if let Ok(mut s) = shared.lock() {
        s.outcome = Some(outcome);
    }
    ctx.request_repaint();
}

/// The scatter window, when open.
pub fn window(app: &mut GripApp, ctx: &Context) {
    let view = &mut app.scatter_view;
    if !view.open {
        view.job = None;
        return;
    }
    let design = app.doc.design.clone();
    if view.for_design.as_ref() != Some(&design) {
        view.restart(&design, ctx);
    }
    view.poll();
    let mut open = true;
    let mut commands = Vec::new();
    egui::Window::new("Scatter")
        .open(&mut open)
        .default_size([820.0, 720.0])
        .vscroll(true)
        .show(ctx, |ui| {
            commands = app.scatter_view.ui(ui, &design);
        });
    let view = &mut app.scatter_view;
    view.open = open;
    if !open {
        view.job = None;
    } else if view.running() {
        ctx.request_repaint_after(POLL);
    }
    app.commands.extend(commands);
}

impl ScatterView {
    fn ui(&mut self, ui: &mut Ui, design: &Design) -> Vec<Command> {
        let commands = tolerances_ui(ui, design);
        ui.separator();
        if let Some(err) = &self.error {
            ui.label(RichText::new(format!("No scatter run: {err}")).color(error_color(ui)));
            return commands;
        }
        let Some(r) = &self.report else {
            if design.scatter.is_some() {
                ui.label("Drawing the first samples…");
            }
            return commands;
        };
        let fraction = r.samples as f32 / r.requested.max(1) as f32;
        let text = if self.finished {
            format!("{} samples, seed {}", r.samples, r.seed)
        } else {
            format!("first estimate: {} of {} samples", r.samples, r.requested)
        };
        ui.add(egui::ProgressBar::new(fraction).text(text)).on_hover_text(
            "Monte Carlo (JCGM 101:2008): every sample draws each tolerance from its distribution and runs every check.",
        );
        ui.label(
            RichText::new(format!(
                "Tolerances read as {}. The model: {}.",
                distribution_words(r.distribution),
                crate::scatter::shared::MODEL_WORDS
            ))
            .small(),
        );
        checks_table_ui(ui, r);
        ui.add_space(6.0);
        ui.columns(2, |cols| {
            histogram_ui(&mut cols[0], r);
            sensitivity_ui(&mut cols[1], r, &mut self.chart_check);
        });
        ui.label(
            RichText::new(
                "A design aid only: real stock, coatings and pipe walls vary beyond any tolerance table. Test the real segment in the real bore and defer to local codes.",
            )
            .small(),
        );
        commands
    }
}

/// The sensitivities of one check (picked in a list) as a sorted bar chart.
fn sensitivity_ui(ui: &mut Ui, r: &ScatterReport, chart_check: &mut Option<&'static str>) {
    ui.label(RichText::new("Sensitivities").strong()).on_hover_text(
            "Each tolerance alone at the low and the high end of its range (every strip together): the change of the check's margin from its centre value.",
        );
    let picked = chart_check
        .filter(|id| r.checks.iter().any(|c| c.id == *id))
        .or_else(|| {
            // The check with the smallest median margin among the ratio checks, else the first.
            r.checks
                .iter()
                .filter(|c| c.unit == MarginUnit::Ratio)
                .min_by(|a, b| {
                    a.margin_p50
                        .unwrap_or(f64::INFINITY)
                        .total_cmp(&b.margin_p50.unwrap_or(f64::INFINITY))
                })
                .or(r.checks.first())
                .map(|c| c.id)
        });
    let Some(id) = picked else { return };
    let label = ui.label("Check");
    egui::ComboBox::from_id_salt("scatter-sensitivity-check")
        .selected_text(id)
        .show_ui(ui, |ui| {
            for c in &r.checks {
                if ui.selectable_label(c.id == id, c.id).clicked() {
                    *chart_check = Some(c.id);
                }
            }
        })
        .response
        .labelled_by(label.id)
        .on_hover_text("The check whose margin the bars show");
    let unit = r
        .checks
        .iter()
        .find(|c| c.id == id)
        .map_or(MarginUnit::Ratio, |c| c.unit);
    let centre = r
        .checks
        .iter()
        .find(|c| c.id == id)
        .and_then(|c| c.centre.margin);
    let list = sensitivities_of(r, id);
    if list.is_empty() {
        ui.label("No tolerance moves this check's margin.");
        return;
    }
    let Some(centre) = centre else { return };
    // Ratio margins in per cent, as the table shows them; lengths in the display units.
    let scale = if unit == MarginUnit::Ratio {
        100.0
    } else {
        1.0 / units().from_display(Quantity::Length, 1.0)
    };
    let n = list.len();
    let mut low = Vec::new();
    let mut high = Vec::new();
    let mut names = Vec::new();
    for (k, s) in list.iter().enumerate() {
        // Largest effect at the top.
        let at = (n - 1 - k) as f64;
        names.push((at, s.input));
        if let Some(m) = s.margin_low {
            low.push(
                Bar::new(at + 0.18, scale * (m - centre))
                    .width(0.34)
                    .name(units().prose(&format!(
                        "{} low end: margin {}",
                        s.input,
                        margin_text(Some(m), unit)
                    ))),
            );
        }
        if let Some(m) = s.margin_high {
            high.push(
                Bar::new(at - 0.18, scale * (m - centre))
                    .width(0.34)
                    .name(units().prose(&format!(
                        "{} high end: margin {}",
                        s.input,
                        margin_text(Some(m), unit)
                    ))),
            );
        }
    }
    let unit_words = match unit {
        MarginUnit::Mm => format!("change of margin, {}", units().unit(Quantity::Length)),
        MarginUnit::Ratio => "change of margin, percentage points".to_string(),
    };
    let names_for_axis = names.clone();
    Plot::new("scatter-sensitivities")
        .height(200.0)
        .allow_drag(false)
        .allow_zoom(false)
        .allow_scroll(false)
        .allow_boxed_zoom(false)
        .x_axis_label(unit_words)
        .y_axis_formatter(move |mark, _| {
            names_for_axis
                .iter()
                .find(|(at, _)| (mark.value - at).abs() < 1e-6)
                .map_or(String::new(), |(_, name)| (*name).to_string())
        })
        .y_axis_min_width(90.0)
        .show(ui, |p| {
            p.add(
                BarChart::new("low end of the tolerance", low)
                    .horizontal()
                    .color(Color32::from_rgb(86, 180, 233)),
            );
            p.add(
                BarChart::new("high end of the tolerance", high)
                    .horizontal()
                    .color(Color32::from_rgb(213, 94, 0)),
            );
        });
    ui.label(
            RichText::new("Upper bar of each pair (sky blue): the tolerance's low end; lower bar (vermillion): its high end. Largest effect at the top.")
                .small(),
        );
}

/// The tolerances of the design's scatter section, edited in place; a design without one
/// gets a button that adds an empty section.
fn tolerances_ui(ui: &mut Ui, design: &Design) -> Vec<Command> {
    let mut commands = Vec::new();
    let Some(spec) = &design.scatter else {
        ui.label("This design has no scatter section: nothing is drawn yet.");
        if ui
            .button("Add tolerances")
            .on_hover_text("Adds a scatter section with a typical strip stock tolerance: thickness +/-0.01 mm.")
            .clicked()
        {
            let mut d = design.clone();
            d.scatter = Some(ScatterSpec {
                thickness_mm: 0.01,
                ..ScatterSpec::default()
            });
            commands.push(Command::Edit(Box::new(d), Gesture::Done));
        }
        return commands;
    };
    let mut edited = spec.clone();
    let mut dragging = false;
    let mut released = false;
    let mut track = |r: &egui::Response| {
        dragging |= r.dragged();
        released |= r.drag_stopped() || r.lost_focus();
    };
    egui::Grid::new("scatter-tolerances")
        .num_columns(4)
        .show(ui, |ui| {
            let mut row = |ui: &mut Ui, name: &str, v: &mut f64, unit: &str, max: f64, tip: &str| {
                let l = ui.label(name);
                // A length in the display units (the value itself stays in mm).
                let u = units();
                let length = unit == "mm" && !u.is_metric();
                let mut value = egui::DragValue::new(v)
                    .range(0.0..=max)
                    .clamp_existing_to_range(false)
                    .speed(max / 2000.0)
                    .prefix("+/- ");
                value = if length {
                    value
                        .suffix(format!(" {}", u.unit(Quantity::Length)))
                        .custom_formatter(move |v, _| {
                            format!("{:.5}", u.to_display(Quantity::Length, v))
                        })
                        .custom_parser(move |s| {
                            s.trim().parse::<f64>().ok().map(|x| u.from_display(Quantity::Length, x))
                        })
                } else {
                    value.suffix(format!(" {unit}"))
                };
                let tip = if length { u.prose(&tip.replace(", mm", "")) } else { tip.to_string() };
                let r = ui
                    .add(value)
                    .labelled_by(l.id)
                    .on_hover_text(tip);
                track(&r);
            };
            row(ui, "Thickness", &mut edited.thickness_mm, "mm", 1.0, "Strip thickness tolerance, plus or minus, drawn for each strip on its own, mm");
            row(ui, "Width", &mut edited.width_mm, "mm", 5.0, "Strip width tolerance, plus or minus, each strip on its own, mm");
            ui.end_row();
            row(ui, "Free length", &mut edited.free_length_mm, "mm", 10.0, "Free-length tolerance, plus or minus, each strip on its own, mm");
            row(ui, "Mount radius", &mut edited.mount_radius_mm, "mm", 5.0, "Mount-radius tolerance of the hub, plus or minus, mm");
            ui.end_row();
            row(ui, "Modulus", &mut edited.modulus_percent, "%", scatter::spec::MAX_MODULUS_PERCENT, "Young's modulus tolerance for the coil, plus or minus, percent");
            let l = ui.label("Friction");
            let mut ranged = edited.friction.is_some();
            let r = ui
                .checkbox(&mut ranged, "range")
                .labelled_by(l.id)
                .on_hover_text("Draw the friction coefficient from a range (one value for the pipe) instead of the design's value");
            track(&r);
            ui.end_row();
            if ranged {
                let (mut lo, mut hi) = edited.friction.unwrap_or((0.5 * design.friction, (1.5 * design.friction).min(2.0)));
                let l = ui.label("Friction from");
                let r = ui
                    .add(egui::DragValue::new(&mut lo).range(0.01..=2.0).clamp_existing_to_range(false).speed(0.002))
                    .labelled_by(l.id)
                    .on_hover_text("Lowest friction coefficient of the range (no unit)");
                track(&r);
                let l = ui.label("to");
                let r = ui
                    .add(egui::DragValue::new(&mut hi).range(0.01..=2.0).clamp_existing_to_range(false).speed(0.002))
                    .labelled_by(l.id)
                    .on_hover_text("Highest friction coefficient of the range (no unit)");
                track(&r);
                ui.end_row();
                edited.friction = Some((lo.min(hi), hi.max(lo)));
            } else {
                edited.friction = None;
            }
            let l = ui.label("Distribution");
            ui.horizontal(|ui| {
                for (kind, name, tip) in [
                    (DistributionKind::Normal3Sigma, "normal, 3 sigma", "Normal, the tolerance at three standard deviations (a capable process)"),
                    (DistributionKind::Uniform, "uniform", "Uniform over the tolerance (the GUM's rectangular distribution)"),
                ] {
                    let r = ui.radio_value(&mut edited.distribution, kind, name).on_hover_text(tip);
                    track(&r);
                }
            })
            .response
            .labelled_by(l.id);
            let l = ui.label("Samples");
            let r = ui
                .add(egui::DragValue::new(&mut edited.samples).range(1..=scatter::spec::MAX_SAMPLES).clamp_existing_to_range(false).speed(50.0))
                .labelled_by(l.id)
                .on_hover_text("Monte Carlo samples, 1 to 1,000,000 (10,000 by default)");
            track(&r);
            ui.end_row();
            let l = ui.label("Seed");
            let r = ui
                .add(egui::DragValue::new(&mut edited.seed).speed(1.0))
                .labelled_by(l.id)
                .on_hover_text("Seed of the random draws: the same seed gives the same numbers on any machine");
            track(&r);
            if ui.button("Remove tolerances").on_hover_text("Removes the scatter section from the design (undoable)").clicked() {
                let mut d = design.clone();
                d.scatter = None;
                commands.push(Command::Edit(Box::new(d), Gesture::Done));
            }
            ui.end_row();
        });
    if edited != *spec && commands.is_empty() {
        let mut d = design.clone();
        d.scatter = Some(edited);
        let gesture = if dragging {
            Gesture::Ongoing
        } else {
            Gesture::Done
        };
        commands.push(Command::Edit(Box::new(d), gesture));
    }
    if released {
        commands.push(Command::EndGesture);
    }
    commands
}

/// Per check: probability of failing with its Wilson interval, margin percentiles, the
/// two standard deviations and the worst-case corner.
fn checks_table_ui(ui: &mut Ui, r: &ScatterReport) {
    let heads = [
        ("check", "The check's id, as in the checks list"),
        ("P(fail)", "Share of samples in which the check fails"),
        (
            "95 % interval",
            "Wilson score interval of the probability of failing (E. B. Wilson, 1927)",
        ),
        ("nominal", "The margin at the centre of every tolerance"),
        ("p01", "1st percentile of the margin over the samples"),
        ("p50", "Median margin"),
        ("p99", "99th percentile of the margin"),
        (
            "sd Monte Carlo",
            "Standard deviation of the margin over the samples (JCGM 101:2008)",
        ),
        (
            "sd propagation",
            "Standard deviation by the law of propagation, sensitivities by central differences (JCGM 100:2008)",
        ),
        (
            "worst case",
            "The margin with every input at the harmful end of its tolerance",
        ),
    ];
    egui::Grid::new("scatter-checks")
        .striped(true)
        .num_columns(heads.len())
        .show(ui, |ui| {
            for (h, tip) in heads {
                ui.label(RichText::new(h).strong()).on_hover_text(tip);
            }
            ui.end_row();
            for (c, w) in r.checks.iter().zip(&r.worst_case) {
                let swatch = palette::check_colour(c.id);
                // The palette's black (the hub) would vanish on a dark theme: text colour.
                let id = RichText::new(c.id).strong();
                ui.label(if swatch == palette::OKABE_ITO[0].1 {
                    id
                } else {
                    id.color(Color32::from_rgb(swatch.r, swatch.g, swatch.b))
                });
                let p = RichText::new(percent(c.probability_of_failure));
                ui.label(if c.failures > 0 {
                    p.color(error_color(ui))
                } else {
                    p
                })
                .on_hover_text(format!("{} of {} samples fail", c.failures, r.samples));
                ui.label(format!(
                    "{} to {}",
                    percent(c.wilson_95[0]),
                    percent(c.wilson_95[1])
                ));
                let m = |v: Option<f64>| units().prose(&margin_text(v, c.unit));
                ui.label(m(c.centre.margin));
                ui.label(m(c.margin_p01));
                ui.label(m(c.margin_p50));
                ui.label(m(c.margin_p99));
                let sd = |v: Option<f64>| units().prose(&sd_text(v, c.unit));
                ui.label(sd(c.margin_sd_monte_carlo));
                ui.label(sd(c.margin_sd_propagation));
                let worst = RichText::new(m(w.outcome.margin));
                ui.label(if w.outcome.pass {
                    worst
                } else {
                    worst.color(error_color(ui))
                });
                ui.end_row();
            }
        });
    ui.label(
        RichText::new(format!(
            "Margins: clearance or stroke in {}, or capacity over demand minus one in per cent.",
            units().length_words()
        ))
        .small(),
    );
}

/// Histogram of each sample's governing margin, with how often each check governed.
fn histogram_ui(ui: &mut Ui, r: &ScatterReport) {
    ui.label(RichText::new("Governing margin").strong()).on_hover_text(
        "Each sample's margin of its governing check (the failing check with the least margin, else the passing ratio check with the least), in that check's own unit.",
    );
    let h = &r.governing;
    let bars: Vec<Bar> = (0..h.counts.len())
        .map(|i| {
            let (a, b) = h.bin_edges(i);
            Bar::new(0.5 * (a + b), h.counts[i] as f64)
                .width(((b - a) * 0.95).max(1e-9))
                .fill(if 0.5 * (a + b) < 0.0 {
                    Color32::from_rgb(213, 94, 0)
                } else {
                    Color32::from_rgb(0, 158, 115)
                })
                .name(format!(
                    "margin {a:+.3} to {b:+.3}: {} samples",
                    h.counts[i]
                ))
        })
        .collect();
    Plot::new("scatter-histogram")
        .height(200.0)
        .allow_drag(false)
        .allow_zoom(false)
        .allow_scroll(false)
        .allow_boxed_zoom(false)
        .x_axis_label(if units().is_metric() {
            "margin of the governing check (its unit)"
        } else {
            "margin of the governing check (its unit: mm for a clearance or stroke)"
        })
        .y_axis_label("samples")
        .show(ui, |p| {
            p.add(BarChart::new("samples", bars));
        });
    let governs: Vec<String> = r
        .governing_counts
        .iter()
        .filter(|(_, n)| *n > 0)
        .map(|(id, n)| format!("{id} {n}"))
        .collect();
    let mut extra = String::new();
    if h.failing_without_margin > 0 {
        extra.push_str(&format!(
            "; {} fail with no state to judge",
            h.failing_without_margin
        ));
    }
    ui.label(
        RichText::new(format!(
            "Governs: {}{extra}. Below zero (vermillion): failing samples.",
            governs.join(", ")
        ))
        .small(),
    );
}
