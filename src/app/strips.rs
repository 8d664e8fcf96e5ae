//! The app's load-sharing parts (issue 17): the checks on the loaded strips computed on a
//! worker thread (the centred results show at once; these follow within a fraction of a
//! second and replace the checks they change), the end view with each strip's contact
//! force drawn as an arrow to scale and the hub's offset visible (its exaggeration
//! stated), the per-strip table, and the strokes at which the first strip touches, the
//! strips lift the hub off its rest and the last strip touches, marked on the plots.

use std::sync::mpsc::{self, Receiver, TryRecvError};

use egui::{Color32, Pos2, RichText, Stroke, Ui, Vec2};
use egui_plot::{LineStyle, VLine};

use super::GripApp;
use crate::analysis::Analysis;
use crate::checks::{self, Check};
use crate::design::Design;
use crate::elastica::Phase;
use crate::segment::Segment;
use crate::sharing::{self, CaseChoice, Judge, LoadedPoint, Loading, SharedState};
use crate::units::Quantity;

const C_ARROW: Color32 = Color32::from_rgb(220, 60, 60);
const C_CREST: Color32 = Color32::from_rgb(230, 140, 20);
const C_PLATE: Color32 = Color32::from_rgb(70, 110, 170);
const C_MARK: Color32 = Color32::from_rgb(0, 150, 200);

/// What the worker computes for one design.
pub struct LoadedView {
    /// Every check, load sharing included.
    pub checks: Vec<Check>,
    /// Index of the limiting check.
    pub limiting: Option<usize>,
    /// The governing state (highest stress) at the nominal bore and the operating stroke,
    /// or why there is none.
    pub point: Result<LoadedPoint, String>,
    /// The same case's full state (crest heights for the end view).
    pub state: Option<SharedState>,
    /// The same case along the stroke at the nominal bore, for the force and stress plots
    /// (empty without a governing case).
    pub curve: Vec<LoadedCurvePoint>,
}

/// One stroke of the governing case's curve: segment totals over the loaded strips.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LoadedCurvePoint {
    /// Stroke, mm.
    pub stroke_mm: f64,
    /// Holding force, `mu sum F_i` over the strips in contact, N.
    pub holding_force_n: f64,
    /// Pull on the end plates, `sum P_i`, N.
    pub actuator_force_n: f64,
    /// The worst strip's peak stress, MPa.
    pub max_stress_mpa: f64,
}

/// Strokes of the loaded curve: it costs one loaded state each (tens of microseconds for
/// equal strips), so a few milliseconds on the worker.
const LOADED_CURVE_POINTS: usize = 160;

/// The governing case along the stroke at `bore`, from rest to the first of the loaded
/// limit and the actuator's maximum stroke. A state the solver cannot find, or one with a
/// strip off the wall (its totals are not all known), is a point of NaNs, where the drawn
/// line breaks.
fn loaded_curve(seg: &Segment, bore: f64, case: &Loading) -> Vec<LoadedCurvePoint> {
    let Ok(loaded) = seg.loaded_at_bore(bore, case) else {
        return Vec::new();
    };
    let end = loaded
        .strokes()
        .map_or(0.0, |s| s.limit_stroke_mm)
        .min(seg.max_stroke_mm());
    if end.is_nan() || end <= 0.0 {
        return Vec::new();
    }
    (0..=LOADED_CURVE_POINTS)
        .map(|k| {
            let stroke = end * k as f64 / LOADED_CURVE_POINTS as f64;
            let known = loaded.state(stroke).ok().filter(|st| {
                !st.beyond_limit
                    && st.totals.strips_off_wall == 0
                    && st.totals.max_stress_mpa.is_finite()
            });
            match known {
                Some(st) => LoadedCurvePoint {
                    stroke_mm: stroke,
                    holding_force_n: st.totals.holding_force_n,
                    actuator_force_n: st.totals.actuator_force_n,
                    max_stress_mpa: st.totals.max_stress_mpa,
                },
                None => LoadedCurvePoint {
                    stroke_mm: stroke,
                    holding_force_n: f64::NAN,
                    actuator_force_n: f64::NAN,
                    max_stress_mpa: f64::NAN,
                },
            }
        })
        .collect()
}

/// The worker: at most one computation runs; an edit made meanwhile waits for it.
#[derive(Default)]
pub struct SharingWork {
    shown_for: Option<Design>,
    view: Option<LoadedView>,
    running: Option<(Design, Receiver<LoadedView>)>,
    queued: Option<Design>,
}

impl SharingWork {
    /// Asks for the load-sharing results of `design` (nothing for a design without the
    /// load-sharing fields).
    pub fn request(&mut self, design: &Design) {
        if !sharing::design_uses_sharing(design) {
            self.queued = None;
            return;
        }
        if self.shown_for.as_ref() == Some(design) {
            self.queued = None;
            return;
        }
        match &self.running {
            Some((d, _)) if d == design => self.queued = None,
            Some(_) => self.queued = Some(design.clone()),
            None => self.spawn(design.clone()),
        }
    }

    fn spawn(&mut self, design: Design) {
        let (tx, rx) = mpsc::channel();
        let work = design.clone();
        let started = std::thread::Builder::new()
            .name("bowgrip-load-sharing".into())
            .spawn(move || {
                let _ = tx.send(compute(&work));
            });
        match started {
            Ok(_) => self.running = Some((design, rx)),
            // No thread to be had: compute here, late rather than never.
            Err(_) => {
                self.view = Some(compute(&design));
                self.shown_for = Some(design);
            }
        }
    }

    /// Takes a finished result (`block`: waits for it); true when one arrived.
    fn poll(&mut self, block: bool) -> bool {
        let Some((design, rx)) = &self.running else {
            return false;
        };
        let got = if block {
            rx.recv().map_err(|_| TryRecvError::Disconnected)
        } else {
            rx.try_recv()
        };
        match got {
            Ok(view) => {
                self.shown_for = Some(design.clone());
                self.view = Some(view);
                self.running = None;
                if let Some(next) = self.queued.take()
                    && self.shown_for.as_ref() != Some(&next)
                {
                    self.spawn(next);
                }
                true
            }
            Err(TryRecvError::Empty) => false,
            Err(TryRecvError::Disconnected) => {
                // The worker died (a panic): no view; the next edit tries again.
                self.running = None;
                self.shown_for = None;
                self.view = None;
                false
            }
        }
    }

    /// The view of `design`, when it is ready.
    pub fn view_for(&self, design: &Design) -> Option<&LoadedView> {
        self.view
            .as_ref()
            .filter(|_| self.shown_for.as_ref() == Some(design))
    }

    /// Whether a computation is running or waiting.
    pub fn busy(&self) -> bool {
        self.running.is_some() || self.queued.is_some()
    }
}

/// Everything the app shows of load sharing for one design (runs on the worker).
pub fn compute(design: &Design) -> LoadedView {
    let seg = match Segment::new(design) {
        Ok(s) => s,
        Err(e) => {
            return LoadedView {
                checks: Vec::new(),
                limiting: None,
                point: Err(e.to_string()),
                state: None,
                curve: Vec::new(),
            };
        }
    };
    let list = checks::run(&seg);
    let limiting = checks::limiting(&list);
    let bore = seg.bore_nominal_mm;
    let op = sharing::checks::operating_stroke_at(&seg, bore);
    let point = match op {
        Some(op) => {
            sharing::loaded_point(&seg, bore, op, CaseChoice::default(), Judge::HighestStress)
                .map_err(|e| e.to_string())
        }
        None => Err("the actuator's set pull is never reached at the nominal bore".to_string()),
    };
    let case = point.as_ref().ok().map(|p| {
        (
            p.stroke_mm,
            Loading {
                clocking: p.clocking,
                major_axis: p.major_axis,
                ..sharing::loading_of(design)
            },
        )
    });
    let state = case
        .as_ref()
        .and_then(|(stroke, case)| seg.loaded_at_bore(bore, case).ok()?.state(*stroke).ok());
    let curve = case
        .as_ref()
        .map_or_else(Vec::new, |(_, case)| loaded_curve(&seg, bore, case));
    LoadedView {
        checks: list,
        limiting,
        point,
        state,
        curve,
    }
}

/// Once a frame: takes a finished result and puts its checks into the analysis of the same
/// design; keeps the frames coming while the worker runs.
pub fn poll_ui(app: &mut GripApp, ctx: &egui::Context) {
    if app.sharing.poll(false) {
        apply_view(app);
    }
    if app.sharing.busy() {
        ctx.request_repaint_after(std::time::Duration::from_millis(30));
    }
}

/// Waits for the worker (and any computation queued behind it) and takes its result.
pub fn wait(app: &mut GripApp) {
    while app.sharing.running.is_some() {
        if app.sharing.poll(true) {
            apply_view(app);
        }
    }
}

/// Puts the view's checks into the analysis when both are of the shown design.
fn apply_view(app: &mut GripApp) {
    if app.analysis_error.is_none()
        && let Some(view) = app.sharing.view_for(&app.doc.design)
        && let Some(a) = app.analysis.as_mut()
        && a.segment.design == app.doc.design
        && !view.checks.is_empty()
    {
        a.checks = view.checks.clone();
        a.limiting = view.limiting;
    }
}

/// After a fresh centred analysis: the load-sharing checks of this design, at once when
/// they are known, else from the worker.
pub fn after_analysis(app: &mut GripApp) {
    app.sharing.request(&app.doc.design);
    apply_view(app);
}

/// A line under the verdict while the loaded checks are being computed.
pub fn status_ui(app: &GripApp, ui: &mut Ui) {
    if sharing::design_uses_sharing(&app.doc.design)
        && app.sharing.view_for(&app.doc.design).is_none()
    {
        ui.horizontal(|ui| {
            ui.spinner();
            ui.label(
                RichText::new(
                    "Load sharing: computing the checks on the loaded strips; the checks shown are the centred ones until then.",
                )
                .small(),
            );
        });
    }
}

/// The governing loaded point of the shown design, when ready.
pub fn loaded_point(app: &GripApp) -> Option<&LoadedPoint> {
    app.sharing
        .view_for(&app.doc.design)
        .and_then(|v| v.point.as_ref().ok())
}

/// The new strokes at the nominal bore, for the plots: name and stroke, mm.
pub fn stroke_marks(app: &GripApp) -> Vec<(&'static str, f64)> {
    let Some(p) = loaded_point(app) else {
        return Vec::new();
    };
    [
        ("first strip touches", p.first_strip_contact_stroke_mm),
        ("strips lift the hub", p.lift_off_stroke_mm),
        ("last strip touches", p.last_strip_contact_stroke_mm),
    ]
    .into_iter()
    .filter_map(|(n, s)| s.map(|s| (n, s)))
    .collect()
}

/// The governing case's curve at the nominal bore, when ready (empty otherwise).
pub fn loaded_curve_of(app: &GripApp) -> &[LoadedCurvePoint] {
    app.sharing
        .view_for(&app.doc.design)
        .map_or(&[], |v| v.curve.as_slice())
}

/// Draws the new strokes as vertical lines on a stroke plot.
pub fn add_marks(p: &mut egui_plot::PlotUi<'_>, marks: &[(&'static str, f64)]) {
    let styles = [
        LineStyle::dotted_dense(),
        LineStyle::dashed_dense(),
        LineStyle::dotted_loose(),
    ];
    for (i, &(name, x)) in marks.iter().enumerate() {
        p.add(
            VLine::new(name, x)
                .color(C_MARK)
                .style(styles[i % styles.len()]),
        );
    }
}

/// The per-strip table under the operating state (nominal bore, governing case).
pub fn table_ui(app: &GripApp, ui: &mut Ui) {
    if !sharing::design_uses_sharing(&app.doc.design) {
        return;
    }
    ui.separator();
    ui.strong("Per strip, nominal bore, operating stroke")
        .on_hover_text("Load sharing: each strip at its own gap with the hub off centre. The case shown is the one with the highest worst-strip stress over the strip-or-gap clocking on the load line and (for an out-of-round bore) the major axis along or across the load.");
    let Some(view) = app.sharing.view_for(&app.doc.design) else {
        ui.horizontal(|ui| {
            ui.spinner();
            ui.label("computing…");
        });
        return;
    };
    let p = match &view.point {
        Ok(p) => p,
        Err(e) => {
            ui.label(RichText::new(e).color(ui.visuals().error_fg_color));
            return;
        }
    };
    let u = super::units();
    ui.label(RichText::new(u.prose(&p.governing)).small());
    let stroke =
        |v: Option<f64>| v.map_or_else(|| "none".to_string(), |s| u.format(Quantity::Length, s, 3));
    let len = u.unit(Quantity::Length);
    let offset = |v: f64| u.to_display(Quantity::Length, v);
    egui::Grid::new("loaded-strokes")
        .num_columns(2)
        .striped(true)
        .show(ui, |ui| {
            let mut row = |k: &str, v: String, tip: &str| {
                ui.label(k).on_hover_text(tip);
                ui.label(v);
                ui.end_row();
            };
            row(
                "hub offset",
                format!(
                    "y {:+.3} {len}, z {:+.3} {len}",
                    offset(p.hub_offset_mm[0]),
                    offset(p.hub_offset_mm[1])
                ),
                "The hub's offset from the bore's centre; y up, so a weight gives y below zero.",
            );
            row(
                "first strip touches",
                stroke(p.first_strip_contact_stroke_mm),
                "Stroke at which the first strip touches the wall.",
            );
            row(
                "strips lift the hub",
                stroke(p.lift_off_stroke_mm),
                "Stroke at which the strips carry all of the radial load and lift the hub off its rest (the relaxed rim on the wall).",
            );
            row(
                "last strip touches",
                stroke(p.last_strip_contact_stroke_mm),
                "Stroke at which every strip touches the wall; none: the top strips never touch before the model's limit.",
            );
        });
    if p.strips.is_empty() {
        ui.label("A strip is past its own limit at this stroke: no per-strip state.");
        return;
    }
    egui::ScrollArea::horizontal()
        .id_salt("strip-table")
        .show(ui, |ui| {
            egui::Grid::new("strips")
                .num_columns(6)
                .striped(true)
                .show(ui, |ui| {
                    let heads = [
                        ("clock, deg".to_string(), "Clock angle from the top, clockwise looking along the bore."),
                        (format!("gap, {len}"), "Gap from the relaxed strip's outer edges to the wall at this hub offset."),
                        ("phase".to_string(), "free, point contact, line contact, or off the wall (past its own limit while the hub rests on its rim; the rim carries the load)."),
                        (format!("contact, {}", u.unit(Quantity::Force)), "Force of the strip on the wall."),
                        (format!("axial, {}", u.unit(Quantity::Force)), "Axial compression of the strip (its share of the actuator pull)."),
                        (format!("stress, {}", u.unit(Quantity::Stress)), "Peak stress of the strip, bending plus axial."),
                    ];
                    for (head, tip) in heads {
                        ui.label(RichText::new(head).strong()).on_hover_text(tip);
                    }
                    ui.end_row();
                    let num = |q: Quantity, v: f64, d: usize| {
                        if v.is_finite() {
                            u.number(q, v, d)
                        } else {
                            "n/a".to_string()
                        }
                    };
                    for r in &p.strips {
                        ui.label(format!("{:.1}", r.clock_deg));
                        ui.label(num(Quantity::Length, r.gap_mm, 3));
                        ui.label(if r.phase.has_state() {
                            r.phase.to_string()
                        } else {
                            "off the wall".to_string()
                        });
                        ui.label(num(Quantity::Force, r.contact_force_n, 2));
                        ui.label(num(Quantity::Force, r.axial_force_n, 2));
                        ui.label(num(Quantity::Stress, r.max_stress_mpa, 1));
                        ui.end_row();
                    }
                });
        });
}

/// The end view under load sharing: the bore (to scale, out of round as given), the hub
/// and its plates at their offset (exaggerated and said so), each strip at its clock angle,
/// and its contact force as an arrow on the wall, to a stated scale. Returns false (drawing
/// nothing) when there is no loaded state to draw.
pub fn end_view_ui(ui: &mut Ui, a: &Analysis, view: Option<&LoadedView>, size: Vec2) -> bool {
    let Some(view) = view else {
        return false;
    };
    let (Ok(p), Some(st)) = (&view.point, &view.state) else {
        return false;
    };
    if st.strips.is_empty() {
        return false;
    }
    let d = &a.segment.design;
    let (resp, painter) = ui.allocate_painter(size, egui::Sense::hover());
    let rect = resp.rect.shrink(8.0);
    let fg = ui.visuals().text_color();
    let r = 0.5 * p.bore_mm;
    let o = d.bore.out_of_round_mm;
    let (major, minor) = (r + 0.25 * o, r - 0.25 * o);
    let (ay, az) = match p.major_axis {
        sharing::MajorAxis::Vertical => (major, minor),
        sharing::MajorAxis::Horizontal => (minor, major),
    };
    let text_h = 30.0;
    let area = rect.with_max_y(rect.max.y - text_h);
    let reach = 1.3 * major;
    let px = (area.width().min(area.height()) as f64 / (2.0 * reach)) as f32;
    let centre = area.center();
    // y up, z to the right; clock angle from the top, clockwise: (cos, sin) = (y, z).
    let at = |y: f64, z: f64| Pos2::new(centre.x + z as f32 * px, centre.y - y as f32 * px);
    let wall: Vec<Pos2> = (0..120)
        .map(|i| {
            let t = std::f64::consts::TAU * i as f64 / 120.0;
            at(ay * t.cos(), az * t.sin())
        })
        .collect();
    painter.add(egui::Shape::closed_line(
        wall,
        Stroke::new(2.0, fg.gamma_multiply(0.8)),
    ));
    let off = p.hub_offset_mm;
    let k = sharing::offset_exaggeration(off[0].hypot(off[1]), r);
    let hub = [k * off[0], k * off[1]];
    let plate_r = if d.end_plate_diameter_mm > 0.0 {
        0.5 * d.end_plate_diameter_mm
    } else {
        d.mount_radius_mm - d.strip.thickness_mm
    };
    painter.circle_filled(
        at(hub[0], hub[1]),
        plate_r as f32 * px,
        C_PLATE.gamma_multiply(0.3),
    );
    painter.circle_filled(at(hub[0], hub[1]), 2.5, fg);
    painter.circle_filled(at(0.0, 0.0), 1.5, fg.gamma_multiply(0.6));
    let fmax = st
        .strips
        .iter()
        .map(|s| s.contact_force_n)
        .filter(|f| f.is_finite())
        .fold(0.0, f64::max);
    // Arrows: the longest is a quarter of the bore's radius.
    let mm_per_n = if fmax > 0.0 { 0.25 * r / fmax } else { 0.0 };
    let (b, t) = (d.strip.width_mm, d.strip.thickness_mm.max(0.02));
    for s in &st.strips {
        let th = s.clock_deg.to_radians();
        let u = [th.cos(), th.sin()];
        let v = [-th.sin(), th.cos()];
        let face = d.mount_radius_mm + 0.5 * t;
        // The crest: on the drawn wall for a strip in contact, at its height when free.
        let touching = matches!(s.phase, Phase::PointContact | Phase::LineContact);
        let rise = if touching {
            sharing::wall_travel_mm([hub[0] + face * u[0], hub[1] + face * u[1]], u, ay, az)
        } else if s.crest_height_mm.is_finite() {
            s.crest_height_mm
        } else {
            0.0
        };
        let color = if s.phase.has_state() {
            C_CREST
        } else {
            fg.gamma_multiply(0.4)
        };
        for (radius, col) in [
            (d.mount_radius_mm, fg.gamma_multiply(0.35)),
            (d.mount_radius_mm + rise, color),
        ] {
            let pts: Vec<Pos2> = [
                (-0.5 * b, -0.5 * t),
                (0.5 * b, -0.5 * t),
                (0.5 * b, 0.5 * t),
                (-0.5 * b, 0.5 * t),
            ]
            .iter()
            .map(|&(w, h)| {
                let rr = radius + h;
                at(hub[0] + rr * u[0] + w * v[0], hub[1] + rr * u[1] + w * v[1])
            })
            .collect();
            painter.add(egui::Shape::convex_polygon(pts, col, Stroke::NONE));
        }
        if touching && s.contact_force_n > 0.0 {
            let base_r = d.mount_radius_mm + rise + 0.5 * t;
            let base = at(hub[0] + base_r * u[0], hub[1] + base_r * u[1]);
            let len = (s.contact_force_n * mm_per_n) as f32 * px;
            let dir = Vec2::new(u[1] as f32, -u[0] as f32);
            painter.arrow(base, dir * len, Stroke::new(2.0, C_ARROW));
        }
    }
    let u = super::units();
    let (oy, oz, len) = (
        u.to_display(Quantity::Length, off[0]),
        u.to_display(Quantity::Length, off[1]),
        u.unit(Quantity::Length),
    );
    let note1 = if k > 1.0 {
        format!("hub y {oy:+.3} z {oz:+.3} {len}, drawn {k:.0} x")
    } else {
        format!("hub y {oy:+.3} z {oz:+.3} {len}, to scale")
    };
    let note2 = if fmax > 0.0 {
        u.prose(&format!("arrows: 10 mm = {:.1} N", 10.0 / mm_per_n))
    } else {
        "no strip touches the wall".to_string()
    };
    for (i, note) in [note1, note2].into_iter().enumerate() {
        painter.text(
            Pos2::new(rect.center().x, rect.max.y - 15.0 * (1 - i) as f32),
            egui::Align2::CENTER_BOTTOM,
            note,
            egui::FontId::proportional(10.0),
            fg.gamma_multiply(0.75),
        );
    }
    resp.on_hover_text(u.prose(&format!(
        "Seen along the bore at the nominal bore {:.2} mm and the operating stroke, {}. Orange: strip crests (grey: off the wall); red arrows: each strip's contact force on the wall, to scale (10 mm of bore = {:.1} N, the longest {fmax:.1} N); dot: the hub, its offset (y {:+.3} mm, z {:+.3} mm) drawn {k:.0} x larger than it is so that it shows.",
        p.bore_mm,
        p.governing,
        if mm_per_n > 0.0 { 10.0 / mm_per_n } else { 0.0 },
        off[0],
        off[1]
    )));
    true
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The loaded curves drawn on the force and stress plots are the governing case's own
    /// states along the stroke (the same loaded bore the per-strip table shows), in rising
    /// stroke, and run at least to the operating stroke. The horizontal drain sample, 80 N
    /// on 8 strips in an oval bore.
    #[test]
    fn the_loaded_curve_is_the_governing_case_along_the_stroke() {
        let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("sample-designs/drain-crawler-horizontal-150mm.ron");
        let design = crate::design::load(&path).expect("the sample loads");
        let view = compute(&design);
        let point = view.point.as_ref().expect("a governing point");
        assert!(view.curve.len() > 100, "{}", view.curve.len());
        assert!(
            view.curve
                .windows(2)
                .all(|w| w[0].stroke_mm < w[1].stroke_mm)
        );
        let seg = Segment::new(&design).expect("valid");
        let case = Loading {
            clocking: point.clocking,
            major_axis: point.major_axis,
            ..sharing::loading_of(&design)
        };
        let at_op = loaded_curve(&seg, seg.bore_nominal_mm, &case);
        let loaded = seg
            .loaded_at_bore(seg.bore_nominal_mm, &case)
            .expect("a loaded bore");
        // The curve's points are states of that loaded bore (NaN where there is none).
        for q in at_op
            .iter()
            .filter(|q| q.max_stress_mpa.is_finite())
            .step_by(40)
        {
            let s = loaded.state(q.stroke_mm).expect("a state");
            assert_eq!(q.holding_force_n, s.totals.holding_force_n);
            assert_eq!(q.max_stress_mpa, s.totals.max_stress_mpa);
        }
        let last = view.curve.last().expect("points");
        assert!(
            last.stroke_mm >= point.stroke_mm,
            "{} vs {}",
            last.stroke_mm,
            point.stroke_mm
        );
    }
}
