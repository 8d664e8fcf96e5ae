//! Bench measurements in the app: opening a measurement file (File menu, typed path or
//! the desktop's dialog, or a `.csv` dropped on the window), its points over the model
//! (a diameter-against-stroke and a force-against-stroke plot in the bench window, and
//! the points measured in the nominal bore over the main force plot), the residuals per
//! measured column, and the calibrate dialog: pick the factors, fit them off the UI
//! thread, read values, standard errors and correlations, and apply them to the design
//! as one undoable edit.
//!
//! The numbers come from [`crate::calibrate`]; this module only draws and keeps the
//! measurement file and the fit's outcome. A file that does not read changes nothing:
//! the status line says where it went wrong, in words, with its line and column.

use std::path::{Path, PathBuf};
use std::sync::mpsc::{self, Receiver, TryRecvError};

use egui::{Color32, Context, RichText, Ui};
use egui_plot::{Legend, Line, LineStyle, MarkerShape, Plot, PlotPoints, Points};

use super::inputs::error_color;
use super::{Command, Gesture, GripApp};
use crate::bench_data::{self, BenchData, BenchError, Quantity};
use crate::calibrate::{self, Calibration, Factor, Factors, ModelCurve, QuantityResiduals};
use crate::design::Design;
use crate::units::{Quantity as UnitKind, UnitSystem};

const C_DIAMETER: Color32 = Color32::from_rgb(0, 114, 178);
const C_PULL: Color32 = Color32::from_rgb(230, 140, 20);
const C_SLIP: Color32 = Color32::from_rgb(40, 170, 80);

/// Strokes along each model curve in the bench plots.
const CURVE_POINTS: usize = 160;

/// A measurement file as opened.
struct Loaded {
    path: PathBuf,
    data: BenchData,
}

/// Residuals and model curves for one design (redone when the design changes).
struct Cache {
    design: Design,
    residuals: Result<Vec<QuantityResiduals>, String>,
    curves: Vec<ModelCurve>,
    /// The design's nominal bore, mm (rows without `bore_mm` were measured there).
    nominal_mm: f64,
}

/// A fit running on its own thread.
struct Job {
    design: Design,
    rx: Receiver<Result<Calibration, String>>,
}

/// What the last fit gave, against the design it was run on.
struct Outcome {
    design: Design,
    result: Result<Calibration, String>,
    /// Residuals with the fitted factors.
    after: Option<Vec<QuantityResiduals>>,
}

/// The bench window, the typed-path window and the calibrate dialog.
#[derive(Default)]
pub struct BenchPanel {
    file: Option<Loaded>,
    cache: Option<Cache>,
    show: bool,
    path_box: Option<(String, Option<String>)>,
    show_calibrate: bool,
    /// Chosen factors, in [`Factor::ALL`] order.
    chosen: [bool; 4],
    job: Option<Job>,
    outcome: Option<Outcome>,
}

/// What a factor is, for the dialog.
fn factor_label(f: Factor) -> (&'static str, &'static str, &'static str) {
    match f {
        Factor::Modulus => (
            "modulus factor",
            "",
            "Multiplies Young's modulus: clamp compliance, width curvature and the real stock all show up as an effective stiffness. Needs measured pulls or slip forces. Applied into the design's calibration.",
        ),
        Factor::Offset => (
            "stroke offset",
            "mm",
            "Added to each measured stroke to give the model's stroke: where the bench's zero sits against straight strips. Applied into the design's calibration.",
        ),
        Factor::Length => (
            "effective free length",
            "mm",
            "The strip length that behaves as free between the clamps. Applying it edits the strip's free length.",
        ),
        Factor::Friction => (
            "friction",
            "",
            "Strip-on-wall friction coefficient, from pull-out tests (needs slip_force_n). Applying it edits the design's friction.",
        ),
    }
}

/// Plain words for a refused measurement file: `line L, column C: what was wrong`.
fn plain_error(path: &Path, e: &BenchError) -> String {
    match e {
        BenchError::Syntax {
            line,
            column,
            message,
        } => format!(
            "{}: line {line}, column {column}: {message}",
            path.display()
        ),
        other => other.to_string(),
    }
}

impl BenchPanel {
    /// The model curves and residuals for `design`, unless they are already for it.
    pub(super) fn refresh(&mut self, design: &Design) {
        let Some(file) = &self.file else {
            self.cache = None;
            return;
        };
        if self.cache.as_ref().is_some_and(|c| c.design == *design) {
            return;
        }
        let factors = Factors::nominal(design);
        let residuals = calibrate::residuals(design, &file.data, &factors)
            .map_err(|e| format!("{}: {e}", file.path.display()));
        let seg = crate::segment::Segment::new(design).ok();
        self.cache = Some(Cache {
            design: design.clone(),
            residuals,
            curves: seg
                .as_ref()
                .map(|s| calibrate::model_curves(s, &file.data, CURVE_POINTS))
                .unwrap_or_default(),
            nominal_mm: seg.map_or(f64::NAN, |s| s.bore_nominal_mm),
        });
    }

    /// The measured points at the nominal bore, at the model's stroke (measured + the
    /// design's offset): `(name, colour, points)` for the main force plot.
    pub(super) fn nominal_force_points(
        &self,
        design: &Design,
        nominal_bore_mm: f64,
    ) -> Vec<Overlay> {
        let Some(file) = &self.file else {
            return Vec::new();
        };
        let offset = design.stroke_offset_mm();
        let at_nominal = |b: Option<f64>| b.is_none_or(|b| (b - nominal_bore_mm).abs() < 1e-9);
        [
            ("measured pull (bench)", C_PULL, Quantity::ActuatorForce),
            ("measured slip force (bench)", C_SLIP, Quantity::SlipForce),
        ]
        .into_iter()
        .filter_map(|(name, color, q)| {
            let pts: Vec<[f64; 2]> = file
                .data
                .rows
                .iter()
                .filter(|r| at_nominal(r.bore_mm))
                .filter_map(|r| r.value(q).map(|v| [r.stroke_mm + offset, v]))
                .collect();
            (!pts.is_empty()).then_some((name, color, pts))
        })
        .collect()
    }
}

/// Measured points drawn over a plot of the main window: legend name, colour, points.
pub type Overlay = (&'static str, Color32, Vec<[f64; 2]>);

/// Draws measured points over one of the main window's plots.
pub fn overlay_ui(plot: &mut egui_plot::PlotUi<'_>, overlay: &[Overlay]) {
    for (name, color, pts) in overlay {
        points(plot, (*name).to_string(), *color, pts.clone());
    }
}

// ---------------------------------------------------------------------------------------
// The state API (the windows, the menu and the tests go through it).

impl GripApp {
    /// Opens a measurement file and shows the bench window. A file that does not read
    /// changes nothing; the status line says why, with line and column.
    pub fn open_measurements(&mut self, path: &Path) -> bool {
        let path = super::state::absolute(path);
        match bench_data::load(&path) {
            Ok(data) => {
                let rows = data.rows.len();
                self.bench.file = Some(Loaded {
                    path: path.clone(),
                    data,
                });
                self.bench.cache = None;
                self.bench.outcome = None;
                // A fit still running is for the old file: its answer is dropped.
                self.bench.job = None;
                self.bench.show = true;
                self.bench.refresh(&self.doc.design);
                self.say(format!(
                    "Opened the measurements {} ({rows} rows).",
                    path.display()
                ));
                true
            }
            Err(e) => {
                self.fail(format!(
                    "Could not read the measurement file; nothing was changed. {}",
                    plain_error(&path, &e)
                ));
                false
            }
        }
    }

    /// The measurements open, if any.
    pub fn measurements(&self) -> Option<&BenchData> {
        self.bench.file.as_ref().map(|f| &f.data)
    }

    /// Residuals of the open measurements against the design as it stands (with its
    /// calibration), or why there are none.
    pub fn measured_residuals(&self) -> Option<Result<&[QuantityResiduals], &str>> {
        self.bench.cache.as_ref().map(|c| match &c.residuals {
            Ok(r) => Ok(r.as_slice()),
            Err(e) => Err(e.as_str()),
        })
    }

    /// Starts fitting `factors` to the open measurements on a thread of its own.
    pub fn start_calibration(&mut self, factors: &[Factor]) {
        let Some(file) = &self.bench.file else {
            self.fail("Open a measurement file first (File, Open measurements).".to_string());
            return;
        };
        let design = self.doc.design.clone();
        let data = file.data.clone();
        let chosen: Vec<Factor> = factors.to_vec();
        let (tx, rx) = mpsc::channel();
        let for_thread = design.clone();
        std::thread::spawn(move || {
            let result =
                calibrate::calibrate(&for_thread, &data, &chosen).map_err(|e| e.to_string());
            // The receiver may be gone (a new fit or a new file); nothing to do then.
            let _ = tx.send(result);
        });
        self.bench.outcome = None;
        self.bench.job = Some(Job { design, rx });
    }

    /// Whether a fit is running.
    pub fn is_calibrating(&self) -> bool {
        self.bench.job.is_some()
    }

    /// Waits for the running fit (tests; the window polls instead).
    pub fn wait_for_calibration(&mut self) {
        if let Some(job) = self.bench.job.take() {
            let result = job
                .rx
                .recv()
                .unwrap_or_else(|_| Err("the fit stopped without an answer".to_string()));
            self.finish_calibration(job.design, result);
        }
    }

    /// The last fit's result, if one has finished.
    pub fn calibration_outcome(&self) -> Option<Result<&Calibration, &str>> {
        self.bench.outcome.as_ref().map(|o| match &o.result {
            Ok(c) => Ok(c),
            Err(e) => Err(e.as_str()),
        })
    }

    /// Writes the last fit's factors into the design: one undoable edit. The fitted free
    /// length and friction edit `strip.free_length_mm` and `friction`; the modulus factor
    /// and stroke offset go into `calibration`. Refused (with the reason in the status
    /// line) when the design changed since the fit or the result would not validate.
    pub fn apply_calibration(&mut self) -> bool {
        let Some(Outcome {
            design,
            result: Ok(c),
            ..
        }) = &self.bench.outcome
        else {
            self.fail("No fitted factors to apply: run a fit first.".to_string());
            return false;
        };
        if *design != self.doc.design {
            self.fail("The design changed since the fit; fit again before applying.".to_string());
            return false;
        }
        let mut factors = Factors::nominal(&self.doc.design);
        for f in &c.fitted {
            factors.set(f.factor, f.value);
        }
        let applied = calibrate::design_with(&self.doc.design, &factors);
        if let Err(e) = applied.validate() {
            self.fail(format!("The fitted factors were not applied: {e}"));
            return false;
        }
        self.push(Command::Edit(Box::new(applied), Gesture::Done));
        self.say("Applied the fitted factors to the design (Undo takes them back).".to_string());
        true
    }

    fn finish_calibration(&mut self, design: Design, result: Result<Calibration, String>) {
        let after = match (&result, &self.bench.file) {
            (Ok(c), Some(file)) => calibrate::residuals(&design, &file.data, &c.factors).ok(),
            _ => None,
        };
        self.bench.outcome = Some(Outcome {
            design,
            result,
            after,
        });
    }

    /// Files dropped on the window: a `.csv` opens as measurements, a `.ron` as a design
    /// (asking first when there are unsaved changes); anything else is named and left.
    pub fn open_dropped(&mut self, paths: Vec<PathBuf>) {
        for path in paths {
            let ext = path
                .extension()
                .map(|e| e.to_string_lossy().to_ascii_lowercase())
                .unwrap_or_default();
            match ext.as_str() {
                "csv" => {
                    self.open_measurements(&path);
                }
                "ron" => self.push(Command::Open(path)),
                _ => self.fail(format!(
                    "{} was not opened: drop a design (.ron) or bench measurements (.csv).",
                    path.display()
                )),
            }
        }
    }
}

// ---------------------------------------------------------------------------------------
// Drawing.

/// Under the strip inputs, when the design carries a bench calibration: what it does,
/// and a button that takes it out (one undoable edit).
pub fn calibration_note_ui(ui: &mut Ui, d: &Design, out: &mut Vec<Command>) {
    let Some(c) = d.calibration else { return };
    ui.horizontal_wrapped(|ui| {
        ui.label(
            RichText::new(super::units().prose(&format!(
                "Bench calibration: modulus factor {:.4} on E; stroke offset {:+.4} mm (model stroke = measured stroke + offset).",
                c.modulus_factor, c.stroke_offset_mm
            )))
            .small(),
        )
        .on_hover_text("Fitted to bench measurements and written into the design file as `calibration`. The modulus factor scales every force and the bending stress; the offset applies where measured strokes meet the model (bench comparisons).");
        if ui
            .small_button("Remove")
            .on_hover_text("Take the calibration out of the design (Undo puts it back).")
            .clicked()
        {
            let mut next = d.clone();
            next.calibration = None;
            out.push(Command::Edit(Box::new(next), Gesture::Done));
        }
    });
}

/// The File menu's entries for measurements.
pub fn file_menu_ui(app: &mut GripApp, ui: &mut Ui) {
    if ui
        .button("Open measurements (CSV)…")
        .on_hover_text("Bench measurements of a built segment: stroke_mm and any of outer_diameter_mm, actuator_force_n, slip_force_n, bore_mm. Dropping a .csv on the window opens it too.")
        .clicked()
    {
        let dir = app
            .bench
            .file
            .as_ref()
            .map(|f| f.path.clone())
            .or_else(|| app.doc.path.clone())
            .and_then(|p| p.parent().map(|d| format!("{}/", d.display())))
            .unwrap_or_default();
        app.bench.path_box = Some((dir, None));
    }
    if app.bench.file.is_some() && ui.button("Bench measurements and calibration…").clicked() {
        app.bench.show = true;
    }
}

/// Takes files dropped on the window this frame.
pub fn take_dropped(app: &mut GripApp, ctx: &Context) {
    let paths: Vec<PathBuf> = ctx.input(|i| {
        i.raw
            .dropped_files
            .iter()
            .map(|f| f.path().to_path_buf())
            .collect()
    });
    if !paths.is_empty() {
        app.open_dropped(paths);
    }
}

/// The bench windows, drawn over the panels.
pub fn windows(app: &mut GripApp, ctx: &Context) {
    poll(app, ctx);
    path_window(app, ctx);
    bench_window(app, ctx);
    calibrate_window(app, ctx);
}

fn poll(app: &mut GripApp, ctx: &Context) {
    let Some(job) = &app.bench.job else { return };
    match job.rx.try_recv() {
        Ok(result) => {
            if let Some(job) = app.bench.job.take() {
                app.finish_calibration(job.design, result);
            }
        }
        Err(TryRecvError::Empty) => {
            ctx.request_repaint_after(std::time::Duration::from_millis(50));
        }
        Err(TryRecvError::Disconnected) => {
            if let Some(job) = app.bench.job.take() {
                app.finish_calibration(
                    job.design,
                    Err("the fit stopped without an answer".to_string()),
                );
            }
        }
    }
}

fn path_window(app: &mut GripApp, ctx: &Context) {
    let Some((mut text, mut note)) = app.bench.path_box.take() else {
        return;
    };
    let mut keep = true;
    let mut go = false;
    egui::Window::new("Open measurements").collapsible(false).show(ctx, |ui| {
        ui.horizontal(|ui| {
            let label = ui.label("Path");
            let resp = ui
                .add(egui::TextEdit::singleline(&mut text).desired_width(380.0))
                .labelled_by(label.id)
                .on_hover_text("Type the measurement file's path (.csv).");
            go |= resp.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter));
        });
        if let Some(n) = &note {
            ui.label(RichText::new(n).small());
        }
        ui.horizontal(|ui| {
            go |= ui.button("Open").clicked();
            if ui
                .button("Browse…")
                .on_hover_text("Use the desktop's file dialog, if one is available.")
                .clicked()
            {
                let picked = if app.system_dialogs {
                    rfd::FileDialog::new()
                        .add_filter("bench measurements", &["csv"])
                        .pick_file()
                } else {
                    None
                };
                match picked {
                    Some(p) => {
                        text = p.display().to_string();
                        go = true;
                    }
                    None => {
                        note = Some("No file dialog answered (none is available here, or it was closed): type the path above.".to_string());
                    }
                }
            }
            if ui.button("Cancel").clicked() {
                keep = false;
            }
        });
    });
    if go && !text.trim().is_empty() {
        // A file that does not read keeps the window open, with the reason below.
        if app.open_measurements(Path::new(text.trim())) {
            keep = false;
        } else {
            note = app.status.as_ref().map(|s| s.text.clone());
        }
    }
    if keep {
        app.bench.path_box = Some((text, note));
    }
}

fn bench_window(app: &mut GripApp, ctx: &Context) {
    if app.bench.file.is_none() {
        return;
    }
    let mut open = app.bench.show;
    let mut calibrate = false;
    let mut close_file = false;
    egui::Window::new("Bench measurements")
        .open(&mut open)
        .default_width(760.0)
        .default_height(640.0)
        .vscroll(true)
        .show(ctx, |ui| {
            let (Some(file), Some(cache)) = (&app.bench.file, &app.bench.cache) else {
                return;
            };
            let d = &app.doc.design;
            ui.label(format!(
                "{} ({} rows). Model: the design as it stands{}.",
                file.path.display(),
                file.data.rows.len(),
                match d.calibration {
                    Some(c) => super::units().prose(&format!(
                        ", with its calibration (modulus factor {:.4}, stroke offset {:+.4} mm)",
                        c.modulus_factor, c.stroke_offset_mm
                    )),
                    None => ", without calibration".to_string(),
                }
            ));
            ui.label(
                RichText::new(super::units().prose(&format!(
                    "Strokes as measured; the model's stroke is the measured stroke plus the offset ({:+.4} mm).",
                    d.stroke_offset_mm()
                )))
                .small(),
            );
            ui.horizontal(|ui| {
                calibrate = ui
                    .button("Calibrate…")
                    .on_hover_text("Fit correction factors to these measurements.")
                    .clicked();
                close_file = ui
                    .button("Close the measurements")
                    .on_hover_text("Stop showing this file; the design is not touched.")
                    .clicked();
            });
            ui.add_space(4.0);
            ui.strong("Residuals, measured minus model").on_hover_text(
                "Per measured column: how many values, their root mean square, the largest (with its sign) and the row where it is.",
            );
            match &cache.residuals {
                Ok(r) => residual_table_ui(ui, "bench-residuals", r),
                Err(e) => {
                    ui.label(RichText::new(format!("No residuals: {e}")).color(error_color(ui)));
                }
            }
            ui.add_space(6.0);
            let w = ui.available_width();
            let h = 230.0;
            ui.strong("Diameter over the strips against measured stroke");
            diameter_plot_ui(ui, &file.data, cache, w, h);
            ui.strong("Forces against measured stroke");
            force_plot_ui(ui, &file.data, cache, w, h);
            ui.label(
                RichText::new("Caution: loaded strips store energy and can snap, the end plates pinch; test behind a guard and follow local codes and licensed practice.")
                    .small(),
            );
        });
    app.bench.show = open;
    if calibrate {
        app.bench.show_calibrate = true;
    }
    if close_file {
        app.bench = BenchPanel::default();
    }
}

/// The residuals table: one row per measured column.
fn residual_table_ui(ui: &mut Ui, id: &str, all: &[QuantityResiduals]) {
    egui::Grid::new(id).striped(true).show(ui, |ui| {
        for h in ["column", "points", "RMS", "largest", "where"] {
            ui.strong(h);
        }
        ui.end_row();
        for q in all {
            let s = q.summary();
            let u = q.quantity.unit();
            ui.label(q.quantity.column());
            ui.label(s.points.to_string());
            let shown = |t: String| super::units().prose(&t);
            ui.label(shown(format!("{:.3} {u}", s.rms)));
            ui.label(shown(format!("{:+.3} {u}", s.max_signed)));
            ui.label(shown(format!(
                "line {}, stroke {:.3} mm",
                s.max_line, s.max_stroke_mm
            )));
            ui.end_row();
        }
    });
}

fn bore_name(bore_mm: f64) -> String {
    super::units().prose(&format!("bore {bore_mm:.2} mm"))
}

fn model_line(
    plot: &mut egui_plot::PlotUi<'_>,
    name: String,
    color: Color32,
    dashed: bool,
    pts: Vec<[f64; 2]>,
) {
    if pts.is_empty() {
        return;
    }
    let mut line = Line::new(name, PlotPoints::new(pts))
        .color(color)
        .width(1.5);
    if dashed {
        line = line.style(LineStyle::dashed_dense());
    }
    plot.line(line);
}

fn points(plot: &mut egui_plot::PlotUi<'_>, name: String, color: Color32, pts: Vec<[f64; 2]>) {
    if pts.is_empty() {
        return;
    }
    plot.points(
        Points::new(name, PlotPoints::new(pts))
            .shape(MarkerShape::Circle)
            .radius(3.5)
            .filled(true)
            .color(color),
    );
}

/// A bench plot against measured stroke; in inches its axes are in the display units
/// (the data stay in mm and N).
fn bench_plot(id: &str, y: (&str, UnitKind), width: f32, height: f32) -> Plot<'static> {
    let plot = Plot::new(id.to_string())
        .width(width)
        .height(height)
        .legend(
            Legend::default()
                .position(egui_plot::Corner::LeftTop)
                .background_alpha(0.6)
                .text_style(egui::TextStyle::Small)
                .follow_insertion_order(true),
        )
        .x_axis_label("measured stroke, mm")
        .y_axis_label(format!("{}, {}", y.0, UnitSystem::Metric.unit(y.1)));
    if super::units().is_metric() {
        plot
    } else {
        super::outputs::display_axes(
            plot,
            ("measured stroke", Some(UnitKind::Length)),
            (y.0, Some(y.1)),
        )
    }
}

fn diameter_plot_ui(ui: &mut Ui, data: &BenchData, cache: &Cache, w: f32, h: f32) {
    bench_plot(
        "bench-diameter",
        ("diameter over the strips", UnitKind::Length),
        w,
        h,
    )
    .show(ui, |p| {
        for (i, c) in cache.curves.iter().enumerate() {
            curve_and_points(
                p,
                c,
                i,
                data,
                cache.nominal_mm,
                Quantity::OuterDiameter,
                "diameter",
                C_DIAMETER,
            );
        }
    });
}

fn force_plot_ui(ui: &mut Ui, data: &BenchData, cache: &Cache, w: f32, h: f32) {
    bench_plot("bench-force", ("force", UnitKind::Force), w, h).show(ui, |p| {
        for (i, c) in cache.curves.iter().enumerate() {
            curve_and_points(
                p,
                c,
                i,
                data,
                cache.nominal_mm,
                Quantity::ActuatorForce,
                "pull",
                C_PULL,
            );
            curve_and_points(
                p,
                c,
                i,
                data,
                cache.nominal_mm,
                Quantity::SlipForce,
                "slip force",
                C_SLIP,
            );
        }
    });
}

/// The model's curve of `q` at one bore and the points measured there (nothing when
/// nothing was measured); the first bore's curve solid, the others dashed.
#[allow(clippy::too_many_arguments)]
fn curve_and_points(
    p: &mut egui_plot::PlotUi<'_>,
    c: &ModelCurve,
    index: usize,
    data: &BenchData,
    nominal_mm: f64,
    q: Quantity,
    what: &str,
    color: Color32,
) {
    let pts: Vec<[f64; 2]> = c
        .measured(nominal_mm, data, q)
        .into_iter()
        .map(|(x, y)| [x, y])
        .collect();
    if pts.is_empty() {
        return;
    }
    let model: Vec<[f64; 2]> = c
        .samples
        .iter()
        .filter_map(|s| s.value(q).map(|v| [s.stroke_mm, v]))
        .collect();
    let b = bore_name(c.bore_mm);
    model_line(p, format!("model {what}, {b}"), color, index > 0, model);
    points(p, format!("measured {what}, {b}"), color, pts);
}

fn calibrate_window(app: &mut GripApp, ctx: &Context) {
    if app.bench.file.is_none() {
        return;
    }
    let mut open = app.bench.show_calibrate;
    let mut run: Option<Vec<Factor>> = None;
    let mut apply = false;
    egui::Window::new("Calibrate against the bench")
        .open(&mut open)
        .default_width(560.0)
        .show(ctx, |ui| {
            ui.label("Pick the factors to fit to the measurements (least squares; each measured column weighted by its own scatter).");
            ui.horizontal_wrapped(|ui| {
                for (i, f) in Factor::ALL.into_iter().enumerate() {
                    let (name, _, tip) = factor_label(f);
                    ui.checkbox(&mut app.bench.chosen[i], name).on_hover_text(tip);
                }
            });
            let chosen: Vec<Factor> = Factor::ALL
                .into_iter()
                .zip(app.bench.chosen)
                .filter_map(|(f, on)| on.then_some(f))
                .collect();
            ui.horizontal(|ui| {
                let busy = app.bench.job.is_some();
                if ui
                    .add_enabled(!busy && !chosen.is_empty(), egui::Button::new("Fit"))
                    .on_hover_text("Fit the chosen factors, starting from the design's own values.")
                    .clicked()
                {
                    run = Some(chosen.clone());
                }
                if busy {
                    ui.spinner();
                    ui.label("fitting…");
                }
            });
            let Some(o) = &app.bench.outcome else {
                return;
            };
            ui.separator();
            match &o.result {
                Err(e) => {
                    ui.label(RichText::new(format!("No fit: {e}")).color(error_color(ui)));
                }
                Ok(c) => {
                    fitted_ui(ui, c);
                    if let Some(after) = &o.after {
                        ui.add_space(4.0);
                        ui.strong("Residuals with the fitted factors");
                        residual_table_ui(ui, "bench-residuals-after", after);
                    }
                    ui.add_space(4.0);
                    let same = o.design == app.doc.design;
                    let resp = ui.add_enabled(same, egui::Button::new("Apply to the design"));
                    let resp = if same {
                        resp.on_hover_text("One edit (Undo takes it back): modulus factor and stroke offset into the design's calibration, free length and friction into their own fields.")
                    } else {
                        resp.on_disabled_hover_text("The design changed since this fit; fit again to apply.")
                    };
                    apply = resp.clicked();
                    ui.label(RichText::new("Fitted factors describe this prototype on this bench; check them against a second test before relying on them.").small());
                }
            }
        });
    app.bench.show_calibrate = open;
    if let Some(factors) = run {
        app.start_calibration(&factors);
    }
    if apply {
        app.apply_calibration();
    }
}

/// Fitted values with standard errors, and the correlation matrix.
fn fitted_ui(ui: &mut Ui, c: &Calibration) {
    ui.strong("Fitted values").on_hover_text(
        "Each value with its standard error, from the Jacobian at the solution: cov = s^2 (J^T J)^-1.",
    );
    egui::Grid::new("bench-fitted")
        .striped(true)
        .show(ui, |ui| {
            for h in ["factor", "value", "standard error"] {
                ui.strong(h);
            }
            ui.end_row();
            for f in &c.fitted {
                let (name, unit, tip) = factor_label(f.factor);
                let u = if unit.is_empty() {
                    String::new()
                } else {
                    format!(" {unit}")
                };
                ui.label(name).on_hover_text(tip);
                ui.label(super::units().prose(&format!("{:.5}{u}", f.value)));
                ui.label(super::units().prose(&format!("± {:.5}{u}", f.standard_error)));
                ui.end_row();
            }
        });
    if c.fitted.len() > 1 {
        ui.add_space(4.0);
        ui.strong("Correlation").on_hover_text(
            "Between the fitted factors: near +1 or -1, the data hardly tell the two apart.",
        );
        egui::Grid::new("bench-correlation")
            .striped(true)
            .show(ui, |ui| {
                ui.label("");
                for f in &c.fitted {
                    ui.strong(factor_label(f.factor).0);
                }
                ui.end_row();
                for (f, row) in c.fitted.iter().zip(&c.correlation) {
                    ui.strong(factor_label(f.factor).0);
                    for r in row {
                        ui.label(format!("{r:+.3}"));
                    }
                    ui.end_row();
                }
            });
    }
}
