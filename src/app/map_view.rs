//! The design map window: two numeric inputs of the design on the axes, every design of
//! the grid coloured by its limiting check (lighter where every check passes), the line
//! where the smallest margin is zero, the current design marked. Hovering a cell shows
//! every check's margin there; a click moves the design to that cell as one undoable
//! edit. The grid is computed by [`crate::map`] on a thread of its own, coarse to fine,
//! with a progress bar; a change of the design or of the axes cancels the run and starts
//! a new one, and the first coarse picture shows after a few hundred designs.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

use egui::{Color32, Context, RichText, Ui};
use egui_plot::{Line, MarkerShape, Plot, PlotImage, PlotPoint, PlotPoints, PlotTransform, Points};

use super::inputs::{error_color, fmt_value};
use super::{Command, Gesture, GripApp};
use crate::design::Design;
use crate::map::palette::{self, Rgb};
use crate::map::{self, AxisSpec, Cell, DesignMap, MapError, MapSpec};
use crate::units::Quantity;

/// Points per axis of a new map (whole-number fields get no more than their span holds).
pub const DEFAULT_POINTS: usize = 41;

/// The fields on the axes when the window first opens.
const DEFAULT_FIELDS: (&str, &str) = ("strip.thickness_mm", "strip.free_length_mm");

/// Least time between two pictures sent from the worker (a finished level is always sent).
const PUBLISH_EVERY: Duration = Duration::from_millis(80);

/// What the worker thread shares with the window.
#[derive(Default)]
struct Shared {
    /// The map so far, when a new picture is waiting.
    picture: Option<DesignMap>,
    /// Designs evaluated and designs in the grid.
    done: usize,
    total: usize,
    /// Set when the run ended: `Ok` complete, `Err` with the reason.
    outcome: Option<Result<(), String>>,
}

/// A running (or finished) map: the request, its cancel flag and what it shares.
struct Job {
    spec: MapSpec,
    cancel: Arc<AtomicBool>,
    shared: Arc<Mutex<Shared>>,
}

impl Drop for Job {
    fn drop(&mut self) {
        self.cancel.store(true, Ordering::Relaxed);
    }
}

/// The map window's state. The axes the user chose stay when the design changes; only a
/// range the new design no longer admits is set again around its values.
#[derive(Default)]
pub struct MapView {
    /// Whether the window is open.
    pub open: bool,
    /// The axes asked for.
    axes: Option<(AxisSpec, AxisSpec)>,
    /// The design the running or shown map was made for.
    for_design: Option<Design>,
    job: Option<Job>,
    /// The picture on show.
    map: Option<DesignMap>,
    progress: (usize, usize),
    finished: bool,
    /// Why there is no map (a refused axis, a design that cannot be analysed).
    error: Option<String>,
    texture: Option<egui::TextureHandle>,
    texture_stale: bool,
    /// The plot's transform last frame (where each cell was drawn).
    transform: Option<PlotTransform>,
}

impl MapView {
    /// The map on show, complete or not.
    pub fn map(&self) -> Option<&DesignMap> {
        self.map.as_ref()
    }

    /// Whether the map on show is complete and made for `design`.
    pub fn is_complete_for(&self, design: &Design) -> bool {
        self.finished
            && self.for_design.as_ref() == Some(design)
            && self.map.as_ref().is_some_and(DesignMap::is_complete)
    }

    /// Why there is no map, if there is none.
    pub fn error(&self) -> Option<&str> {
        self.error.as_deref()
    }

    /// The axes asked for.
    pub fn axes(&self) -> Option<&(AxisSpec, AxisSpec)> {
        self.axes.as_ref()
    }

    /// Sets the axes (the map restarts at the next frame).
    pub fn set_axes(&mut self, x: AxisSpec, y: AxisSpec) {
        self.axes = Some((x, y));
        self.for_design = None;
    }

    /// What the sizing sheet adds for this window: a map page over its axes while the
    /// window is open and its axes are accepted.
    pub fn sheet_options(&self) -> crate::sheet::SheetOptions {
        crate::sheet::SheetOptions {
            map: self
                .axes
                .clone()
                .filter(|_| self.open && self.error.is_none()),
            ..Default::default()
        }
    }

    /// Where the centre of cell `(ix, iy)` was drawn last frame, in screen points.
    pub fn cell_screen_pos(&self, ix: usize, iy: usize) -> Option<egui::Pos2> {
        let t = self.transform.as_ref()?;
        let map = self.map.as_ref()?;
        let (x, y) = (*map.x.values.get(ix)?, *map.y.values.get(iy)?);
        Some(t.position_from_point(&PlotPoint::new(x, y)))
    }

    fn stop(&mut self) {
        self.job = None;
    }

    /// Starts a map of `design` on the axes asked for (defaults the first time; a range
    /// the design no longer admits is set again around its values).
    fn restart(&mut self, design: &Design, ctx: &Context) {
        self.stop();
        self.for_design = Some(design.clone());
        self.finished = false;
        self.progress = (0, 0);
        let axes = self.axes.clone().or_else(|| {
            Some((
                AxisSpec::around(design, DEFAULT_FIELDS.0, DEFAULT_POINTS)?,
                AxisSpec::around(design, DEFAULT_FIELDS.1, DEFAULT_POINTS)?,
            ))
        });
        let Some((x, y)) = axes else {
            self.error = Some("this design has no fields the map can vary".to_string());
            return;
        };
        let spec = match MapSpec::new(design, &x, &y) {
            Ok(spec) => Ok(spec),
            Err(
                first @ (MapError::OutOfRange { .. }
                | MapError::Range { .. }
                | MapError::UnknownField { .. }),
            ) => {
                // The design moved: the old ranges may reach outside its limits now, or a
                // field may be gone (another actuator or material): that axis goes back
                // to its default field.
                let known: Vec<&str> = map::fields(design).iter().map(|r| r.field).collect();
                // The asked field if the design still has it, else the first default
                // the other axis does not use.
                let field = |asked: &str, other: &str| {
                    if known.contains(&asked) {
                        asked.to_string()
                    } else if DEFAULT_FIELDS.0 != other {
                        DEFAULT_FIELDS.0.to_string()
                    } else {
                        DEFAULT_FIELDS.1.to_string()
                    }
                };
                let xf = field(&x.field, &y.field);
                let yf = field(&y.field, &xf);
                let again = (
                    AxisSpec::around(design, &xf, x.points),
                    AxisSpec::around(design, &yf, y.points),
                );
                match again {
                    (Some(x2), Some(y2)) => MapSpec::new(design, &x2, &y2)
                        .inspect(|_| self.axes = Some((x2.clone(), y2.clone())))
                        .map_err(|_| first),
                    _ => Err(first),
                }
            }
            Err(e) => Err(e),
        };
        let spec = match spec {
            Ok(spec) => spec,
            Err(e) => {
                self.axes = Some((x, y));
                self.error = Some(e.to_string());
                self.map = None;
                return;
            }
        };
        if self.axes.is_none() {
            self.axes = Some((x, y));
        }
        self.error = None;
        if self
            .map
            .as_ref()
            .is_some_and(|m| m.x.values != spec.x.values || m.y.values != spec.y.values)
        {
            // Another grid: the old picture would sit in the wrong places.
            self.map = None;
        }
        let cancel = Arc::new(AtomicBool::new(false));
        let shared = Arc::new(Mutex::new(Shared {
            total: spec.cell_count(),
            ..Shared::default()
        }));
        let job = Job {
            spec: spec.clone(),
            cancel: Arc::clone(&cancel),
            shared: Arc::clone(&shared),
        };
        let ctx = ctx.clone();
        std::thread::spawn(move || work(&spec, &cancel, &shared, &ctx));
        self.job = Some(job);
    }

    /// Takes what the worker sent since the last frame.
    fn poll(&mut self) {
        let Some(job) = &self.job else { return };
        let Ok(mut shared) = job.shared.lock() else {
            self.error = Some("the map's worker stopped unexpectedly".to_string());
            self.job = None;
            return;
        };
        if let Some(picture) = shared.picture.take() {
            self.map = Some(picture);
            self.texture_stale = true;
        }
        self.progress = (shared.done, shared.total);
        match shared.outcome.take() {
            Some(Ok(())) => self.finished = true,
            Some(Err(why)) => self.error = Some(why),
            None => {}
        }
    }

    fn running(&self) -> bool {
        self.job.is_some() && !self.finished && self.error.is_none()
    }
}

/// The worker: computes the map, sending a picture at most every [`PUBLISH_EVERY`] and at
/// the end of every level, and asks the window to repaint.
fn work(spec: &MapSpec, cancel: &AtomicBool, shared: &Mutex<Shared>, ctx: &Context) {
    let mut last_sent: Option<Instant> = None;
    let mut last_level = None;
    let result = spec.compute(cancel, &mut |p| {
        let level = p.map.complete_stride();
        let due = last_sent.is_none_or(|t| t.elapsed() >= PUBLISH_EVERY);
        let send = level != last_level || due;
        if let Ok(mut s) = shared.lock() {
            s.done = p.done;
            if send {
                s.picture = Some(p.map.clone());
            }
        }
        if send {
            last_sent = Some(Instant::now());
            last_level = level;
            ctx.request_repaint();
        }
    });
    let outcome = match result {
        Ok(map) => {
            if let Ok(mut s) = shared.lock() {
                s.done = s.total;
                s.picture = Some(map);
            }
            Ok(())
        }
        Err(MapError::Cancelled) => return,
        Err(e) => Err(e.to_string()),
    };
    if let Ok(mut s) = shared.lock() {
        s.outcome = Some(outcome);
    }
    ctx.request_repaint();
}

fn colour(c: Rgb) -> Color32 {
    Color32::from_rgb(c.r, c.g, c.b)
}

/// The map window, when open: restarts the map when the design or the axes changed,
/// takes the worker's progress, draws, and records a click as an edit.
pub fn window(app: &mut GripApp, ctx: &Context) {
    let view = &mut app.map_view;
    if !view.open {
        view.stop();
        return;
    }
    let design = app.doc.design.clone();
    if view.for_design.as_ref() != Some(&design) {
        view.restart(&design, ctx);
    }
    view.poll();
    let mut open = true;
    let mut moved: Option<(Design, String)> = None;
    egui::Window::new("Design map")
        .open(&mut open)
        .default_size([780.0, 700.0])
        .show(ctx, |ui| {
            moved = app.map_view.ui(ui, &design);
        });
    let view = &mut app.map_view;
    view.open = open;
    if !open {
        view.stop();
    } else if view.running() {
        ctx.request_repaint_after(PUBLISH_EVERY);
    }
    if let Some((design, words)) = moved {
        app.push(Command::Edit(Box::new(design), Gesture::Done));
        app.say(format!("Design moved to {words} (Ctrl+Z undoes it)."));
    }
}

impl MapView {
    /// The window's contents; returns the design a click moved to, with words for it.
    fn ui(&mut self, ui: &mut Ui, design: &Design) -> Option<(Design, String)> {
        self.axes_ui(ui, design);
        let (done, total) = self.progress;
        if let Some(err) = &self.error {
            ui.label(RichText::new(err).color(error_color(ui)));
        } else if total > 0 {
            let fraction = done as f32 / total as f32;
            let text = if self.finished {
                format!("{total} designs, every one checked")
            } else {
                format!("checking designs: {done} of {total}")
            };
            ui.add(egui::ProgressBar::new(fraction).text(text))
                .on_hover_text("The map is computed coarse to fine: every 16th row and column first, then finer.");
        }
        let moved = self.plot_ui(ui);
        self.legend_ui(ui);
        ui.label(
            RichText::new(
                "Lighter cells: every check passes there. Hover a cell for every margin; click it to move the design there (one undoable edit). A design aid only: confirm by test and defer to local codes.",
            )
            .small(),
        );
        moved
    }

    /// The axis pickers: a field and its range for each axis.
    fn axes_ui(&mut self, ui: &mut Ui, design: &Design) {
        let Some((mut x, mut y)) = self.axes.clone() else {
            return;
        };
        let fields = map::fields(design);
        let (x_field, y_field) = (x.field.clone(), y.field.clone());
        egui::Grid::new("map-axes").num_columns(5).show(ui, |ui| {
            for (name, axis, other) in [("Across", &mut x, y_field), ("Up", &mut y, x_field)] {
                let name_label = ui.label(name);
                let label = format!("{name} field");
                egui::ComboBox::from_id_salt(&label)
                    .selected_text(field_words(axis.field.as_str()))
                    .width(260.0)
                    .show_ui(ui, |ui| {
                        for row in &fields {
                            if row.field == other {
                                continue;
                            }
                            let picked = row.field == axis.field;
                            if ui
                                .selectable_label(picked, field_words(row.field))
                                .clicked()
                                && !picked
                                && let Some(a) = AxisSpec::around(design, row.field, DEFAULT_POINTS)
                            {
                                *axis = a;
                            }
                        }
                    })
                    .response
                    .labelled_by(name_label.id)
                    .on_hover_text(format!("{label}: the input on this axis"));
                let unit = fields
                    .iter()
                    .find(|r| r.field == axis.field)
                    .map_or("", |r| r.unit);
                let whole = matches!(axis.field.as_str(), "strip.count" | "duty.cycles");
                let speed =
                    ((axis.to - axis.from).abs() / 200.0).max(if whole { 1.0 } else { 1e-4 });
                // In inches a length (force, stress) shows and takes the display unit; the
                // axis itself stays in the field's unit.
                let u = super::units();
                let shown_q = Quantity::of_metric_unit(unit).filter(|_| !u.is_metric());
                for (what, v) in [("from", &mut axis.from), ("to", &mut axis.to)] {
                    let mut drag = egui::DragValue::new(v)
                        .speed(speed)
                        .prefix(format!("{what} "));
                    if let Some(q) = shown_q {
                        drag = drag
                            .suffix(format!(" {}", u.unit(q)))
                            .custom_formatter(move |v, _| fmt_value(u.to_display(q, v)))
                            .custom_parser(move |s| {
                                s.trim().parse::<f64>().ok().map(|x| u.from_display(q, x))
                            });
                    } else if !unit.is_empty() {
                        drag = drag.suffix(format!(" {unit}"));
                    }
                    if whole {
                        drag = drag.fixed_decimals(0);
                    }
                    ui.add(drag).on_hover_text(format!(
                        "{name} axis, {what}: {} value of the range, in {}",
                        if what == "from" { "first" } else { "last" },
                        if shown_q.is_some() {
                            "the chosen units"
                        } else {
                            "the field's unit"
                        }
                    ));
                }
                ui.add(
                    egui::DragValue::new(&mut axis.points)
                        .range(1..=map::MAX_POINTS)
                        .clamp_existing_to_range(false)
                        .prefix("points "),
                )
                .on_hover_text(format!(
                    "{name} axis: number of designs along it, 2 to {}",
                    map::MAX_POINTS
                ));
                ui.end_row();
            }
        });
        ui.horizontal(|ui| {
            if ui
                .button("Ranges around the design")
                .on_hover_text("Set both ranges to half to one and a half times the design's values, within the allowed ranges.")
                .clicked()
            {
                if let Some(a) = AxisSpec::around(design, &x.field, x.points) {
                    x = a;
                }
                if let Some(a) = AxisSpec::around(design, &y.field, y.points) {
                    y = a;
                }
            }
        });
        if self.axes.as_ref() != Some(&(x.clone(), y.clone())) {
            self.set_axes(x, y);
        }
    }

    /// The map itself; returns the design a click moved to.
    fn plot_ui(&mut self, ui: &mut Ui) -> Option<(Design, String)> {
        let Some(map) = &self.map else {
            ui.add_space(8.0);
            if self.error.is_none() {
                ui.label("The first picture comes after a few hundred designs.");
            }
            return None;
        };
        if self.texture_stale || self.texture.is_none() {
            let image = picture(map);
            match &mut self.texture {
                Some(t) => t.set(image, egui::TextureOptions::NEAREST),
                None => {
                    self.texture = Some(ui.ctx().load_texture(
                        "design-map",
                        image,
                        egui::TextureOptions::NEAREST,
                    ));
                }
            }
            self.texture_stale = false;
        }
        let Some(texture) = &self.texture else {
            return None;
        };
        let (cx, wx) = span(&map.x.values);
        let (cy, wy) = span(&map.y.values);
        let ink = ui.visuals().strong_text_color();
        let zero = map.zero_line();
        let current = [map.x.current, map.y.current];
        let height = (ui.available_height() - 70.0).max(240.0);
        let plot = Plot::new("design-map-plot").height(height);
        // In inches the axes of a length (force, stress) field are numbered in the display
        // units over the grid's own values.
        let plot = if super::units().is_metric() {
            plot.x_axis_label(map.x.label()).y_axis_label(map.y.label())
        } else {
            super::outputs::display_axes(
                plot,
                (map.x.field, Quantity::of_metric_unit(map.x.unit)),
                (map.y.field, Quantity::of_metric_unit(map.y.unit)),
            )
        };
        let shown = plot
            .allow_drag(false)
            .allow_zoom(false)
            .allow_scroll(false)
            .allow_boxed_zoom(false)
            .allow_double_click_reset(false)
            .show_x(false)
            .show_y(false)
            .show_grid(false)
            .default_x_bounds(cx - 0.5 * wx, cx + 0.5 * wx)
            .default_y_bounds(cy - 0.5 * wy, cy + 0.5 * wy)
            .show(ui, |p| {
                p.add(PlotImage::new(
                    "limiting check",
                    texture.id(),
                    PlotPoint::new(cx, cy),
                    [wx as f32, wy as f32],
                ));
                for run in &zero {
                    p.add(
                        Line::new("smallest margin zero", PlotPoints::new(run.clone()))
                            .color(ink)
                            .width(2.5),
                    );
                }
                p.add(
                    Points::new("current design", PlotPoints::new(vec![current]))
                        .shape(MarkerShape::Circle)
                        .filled(false)
                        .radius(7.0)
                        .color(ink),
                );
                p.add(
                    Points::new("current design", PlotPoints::new(vec![current]))
                        .shape(MarkerShape::Plus)
                        .radius(7.0)
                        .color(ink),
                );
            });
        let transform = shown.transform;
        self.transform = Some(transform);
        let response = shown.response;
        let under = |pos: egui::Pos2| {
            let v = transform.value_from_position(pos);
            nearest(map, v.x, v.y)
        };
        let hovered = response.hover_pos().and_then(under);
        let clicked = response
            .clicked()
            .then(|| response.interact_pointer_pos().and_then(under))
            .flatten();
        if let Some((ix, iy)) = hovered {
            let cell = map.shown(ix, iy).cloned();
            let (xv, yv) = (map.x.values[ix], map.y.values[iy]);
            let (xl, yl) = (axis_value(&map.x, xv), axis_value(&map.y, yv));
            response.on_hover_ui_at_pointer(|ui| {
                ui.label(RichText::new(format!("{xl}, {yl}")).strong());
                match &cell {
                    Some(c) => cell_ui(ui, c, c.x != xv || c.y != yv),
                    None => {
                        ui.label("not yet computed");
                    }
                }
            });
        }
        let (ix, iy) = clicked?;
        let job = self.job.as_ref()?;
        let design = job.spec.design_at(ix, iy).ok()?;
        let words = format!(
            "{}, {}",
            axis_value(&map.x, map.x.values[ix]),
            axis_value(&map.y, map.y.values[iy])
        );
        Some((design, words))
    }

    /// The legend: every check's colour, id and meaning; the zero line and the marker.
    fn legend_ui(&self, ui: &mut Ui) {
        let Some(map) = &self.map else { return };
        let Some(first) = map.cells().next() else {
            return;
        };
        let limiting: Vec<&str> = map.cells().filter_map(|c| c.limiting).collect();
        ui.horizontal_wrapped(|ui| {
            ui.label(RichText::new("Limiting check:").strong());
            for c in &first.checks {
                let seen = limiting.contains(&c.id);
                let (rect, _) = ui.allocate_exact_size(egui::vec2(22.0, 12.0), egui::Sense::hover());
                let base = palette::check_colour(c.id);
                let left = egui::Rect::from_min_max(rect.min, egui::pos2(rect.center().x, rect.max.y));
                let right = egui::Rect::from_min_max(egui::pos2(rect.center().x, rect.min.y), rect.max);
                ui.painter().rect_filled(left, 0.0, colour(base));
                ui.painter().rect_filled(right, 0.0, colour(base.lighter(0.5)));
                let text = RichText::new(c.id);
                ui.label(if seen { text } else { text.weak() })
                    .on_hover_text(format!(
                        "{}: {}. Dark: it fails there; light: every check passes and it has the least margin.{}",
                        c.id,
                        c.title,
                        if seen { "" } else { " It limits no cell of this map." }
                    ));
            }
            let ink = ui.visuals().text_color();
            ui.add_space(8.0);
            let (rect, _) = ui.allocate_exact_size(egui::vec2(22.0, 12.0), egui::Sense::hover());
            ui.painter().line_segment(
                [rect.left_center(), rect.right_center()],
                egui::Stroke::new(2.0, ink),
            );
            ui.label("smallest margin zero");
            let (rect, _) = ui.allocate_exact_size(egui::vec2(16.0, 16.0), egui::Sense::hover());
            let c = rect.center();
            ui.painter().circle_stroke(c, 6.0, egui::Stroke::new(1.0, ink));
            ui.painter().line_segment([c - egui::vec2(7.0, 0.0), c + egui::vec2(7.0, 0.0)], egui::Stroke::new(1.0, ink));
            ui.painter().line_segment([c - egui::vec2(0.0, 7.0), c + egui::vec2(0.0, 7.0)], egui::Stroke::new(1.0, ink));
            ui.label("current design");
        });
    }
}

/// The grid as an image, one pixel per cell, the top row the largest `y`.
fn picture(map: &DesignMap) -> egui::ColorImage {
    let (nx, ny) = (map.x.len(), map.y.len());
    let mut pixels = Vec::with_capacity(nx * ny);
    for row in 0..ny {
        let iy = ny - 1 - row;
        for ix in 0..nx {
            pixels.push(match map.shown(ix, iy) {
                Some(c) => colour(palette::cell_colour(c.limiting, c.pass)),
                None => Color32::TRANSPARENT,
            });
        }
    }
    egui::ColorImage::new([nx, ny], pixels)
}

/// Centre and width of the band the cells of an axis cover (each cell a step wide).
fn span(values: &[f64]) -> (f64, f64) {
    let (Some(&first), Some(&last)) = (values.first(), values.last()) else {
        return (0.0, 1.0);
    };
    if values.len() < 2 || first == last {
        let w = (0.1 * first.abs()).max(1e-3);
        return (first, w);
    }
    let step = (last - first) / (values.len() - 1) as f64;
    (0.5 * (first + last), (last - first + step).abs())
}

/// The cell nearest to `(x, y)`, if `(x, y)` lies within the map.
fn nearest(map: &DesignMap, x: f64, y: f64) -> Option<(usize, usize)> {
    let pick = |values: &[f64], v: f64| -> Option<usize> {
        let (cx, w) = span(values);
        if (v - cx).abs() > 0.5 * w {
            return None;
        }
        values
            .iter()
            .enumerate()
            .min_by(|a, b| (a.1 - v).abs().total_cmp(&(b.1 - v).abs()))
            .map(|(i, _)| i)
    };
    Some((pick(&map.x.values, x)?, pick(&map.y.values, y)?))
}

/// A field for the pickers: what it is, then its path in the file.
fn field_words(field: &str) -> String {
    match crate::design::limit(field) {
        Some(row) if row.unit.is_empty() => format!("{} ({field})", row.meaning),
        Some(row) => {
            let u = super::units();
            let unit = Quantity::of_metric_unit(row.unit)
                .filter(|_| !u.is_metric())
                .map_or(row.unit, |q| u.unit(q));
            format!("{}, {unit} ({field})", row.meaning)
        }
        None => field.to_string(),
    }
}

/// `strip.thickness_mm = 0.25 mm`.
fn axis_value(axis: &map::Axis, v: f64) -> String {
    let u = super::units();
    match Quantity::of_metric_unit(axis.unit) {
        _ if axis.unit.is_empty() => format!("{} = {}", axis.field, fmt_value(v)),
        Some(q) if !u.is_metric() => format!(
            "{} = {} {}",
            axis.field,
            fmt_value(u.to_display(q, v)),
            u.unit(q)
        ),
        _ => format!("{} = {} {}", axis.field, fmt_value(v), axis.unit),
    }
}

/// Hover contents for a cell: the limiting check and every check's margin with its unit.
fn cell_ui(ui: &mut Ui, cell: &Cell, approximate: bool) {
    if approximate {
        ui.label(RichText::new("(still coarse: the nearest computed design)").weak());
    }
    ui.label(match (cell.limiting, cell.pass) {
        (Some(id), true) => format!("every check passes; least margin: {id}"),
        (Some(id), false) => format!("fails; limiting check: {id}"),
        (None, _) => "no check limits this design".to_string(),
    });
    egui::Grid::new("map-cell").num_columns(3).show(ui, |ui| {
        for c in &cell.checks {
            ui.label(c.id);
            ui.label(if c.pass { "pass" } else { "FAIL" });
            ui.label(
                c.margin
                    .and_then(|m| c.unit.margin_text(m))
                    .map(|t| super::units().prose(&t))
                    .map_or_else(
                        || "no margin (no state to judge)".to_string(),
                        |t| format!("margin {t}"),
                    ),
            );
            ui.end_row();
        }
    });
}
