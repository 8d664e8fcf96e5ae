//! The input panel: every number of the design as a slider and a typed field with its
//! unit, the choices (grade, ends, stiffness, bore form, actuator kind, friction pair) as
//! radio buttons and lists. It edits a copy of the design and returns commands; a value
//! that does not validate is not applied, and the field says why (the plausible-range
//! message of [`crate::design::limits`]) while the last valid design stays analysed.

use std::collections::HashMap;

use egui::{Color32, RichText, Ui};

use super::units;
use super::{Command, Gesture};
use crate::analysis::Analysis;
use crate::design::{self, Actuator, Design, Ends, MaterialChoice, Operating, PipeRef, Stiffness};
use crate::units::Quantity;
use crate::{friction, material, pipe};

/// One numeric row: what it edits and how its slider behaves.
#[derive(Clone, Copy)]
struct Row<'a> {
    /// Field path in the design file (for the limit table) or a key of the app's own.
    key: &'static str,
    label: &'a str,
    tip: &'a str,
    unit: &'a str,
    lo: f64,
    hi: f64,
    log: bool,
    integer: bool,
    /// Smallest positive value of a logarithmic slider that starts at 0.
    smallest: Option<f64>,
    /// The slider's span when this design sets it (the operating stroke: up to the strokes
    /// this design can reach), instead of the field's allowed range.
    span: Option<(f64, f64)>,
}

impl<'a> Row<'a> {
    fn new(
        key: &'static str,
        label: &'a str,
        unit: &'a str,
        lo: f64,
        hi: f64,
        tip: &'a str,
    ) -> Row<'a> {
        Row {
            key,
            label,
            tip,
            unit,
            lo,
            hi,
            log: false,
            integer: false,
            smallest: None,
            span: None,
        }
    }
    /// The slider runs over `lo..=hi`; the typed field still takes the allowed range.
    fn span(mut self, lo: f64, hi: f64) -> Self {
        self.span = Some((lo, hi));
        self
    }
    fn log(mut self) -> Self {
        self.log = true;
        self
    }
    /// A logarithmic slider from 0 whose first positive step is `v`.
    fn log_from(mut self, v: f64) -> Self {
        self.log = true;
        self.smallest = Some(v);
        self
    }
    fn integer(mut self) -> Self {
        self.integer = true;
        self
    }

    /// The kind of quantity, for the display units (`None`: shown as in the file).
    fn quantity(&self) -> Option<Quantity> {
        match self.unit {
            "mm" if self.key == "strip.thickness_mm" => Some(Quantity::Thickness),
            unit => Quantity::of_metric_unit(unit),
        }
    }

    /// The unit label in the display units.
    fn unit_shown(&self) -> &'a str {
        self.quantity().map_or(self.unit, |q| units().unit(q))
    }

    /// A file value (SI) in the display units.
    fn shown_of(&self, si: f64) -> f64 {
        self.quantity().map_or(si, |q| units().to_display(q, si))
    }

    /// A value in the display units back in the file's units.
    fn file_of(&self, shown: f64) -> f64 {
        self.quantity()
            .map_or(shown, |q| units().from_display(q, shown))
    }

    /// A file value as the typed field shows it: [`fmt_value`] of the shown value; a
    /// thickness in inches to four decimals (0.0100 in).
    fn text(&self, si: f64) -> String {
        let u = units();
        match self.quantity() {
            Some(Quantity::Thickness) if !u.is_metric() => {
                format!("{:.4}", u.to_display(Quantity::Thickness, si))
            }
            _ => fmt_value(self.shown_of(si)),
        }
    }

    /// The allowed range of a field in the display units, in the words of
    /// [`design::FieldLimit::range_text`] (which it is, in metric).
    fn allowed(&self, l: &design::FieldLimit, d: &Design) -> String {
        if units().is_metric() || self.quantity().is_none() {
            return allowed(l, d);
        }
        let (lo, hi) = (self.text(l.min), self.text(l.max_for(d)));
        let range = match (l.min_excluded, l.max_excluded) {
            (false, false) => format!("{lo} to {hi}"),
            (true, false) => format!("more than {lo}, up to {hi}"),
            (false, true) => format!("from {lo}, less than {hi}"),
            (true, true) => format!("more than {lo} and less than {hi}"),
        };
        format!("{range} {}", self.unit_shown())
    }
}

/// Where a row's number lives in the design; `None` when the design has no such number
/// (another actuator kind, a material from the table, a bore given as a pipe size).
type Field = fn(&mut Design) -> Option<&mut f64>;

/// The custom material's numbers: modulus, Poisson's ratio, tensile, yield and endurance
/// strength.
type CustomNumbers<'d> = (
    &'d mut f64,
    &'d mut f64,
    &'d mut f64,
    &'d mut f64,
    &'d mut f64,
);

fn custom_numbers(d: &mut Design) -> Option<CustomNumbers<'_>> {
    match &mut d.strip.material {
        MaterialChoice::Custom {
            youngs_modulus_gpa,
            poisson_ratio,
            tensile_strength_mpa,
            yield_strength_mpa,
            endurance_limit_mpa,
            ..
        } => Some((
            youngs_modulus_gpa,
            poisson_ratio,
            tensile_strength_mpa,
            yield_strength_mpa,
            endurance_limit_mpa,
        )),
        MaterialChoice::Grade(_) => None,
    }
}

/// The direct pull's numbers: maximum force and maximum stroke.
fn direct(d: &mut Design) -> Option<(&mut f64, &mut f64)> {
    match &mut d.actuator {
        Actuator::Direct {
            max_force_n,
            max_stroke_mm,
            ..
        } => Some((max_force_n, max_stroke_mm)),
        _ => None,
    }
}

/// The spool's numbers: radius, maximum torque and maximum angle.
fn spool(d: &mut Design) -> Option<(&mut f64, &mut f64, &mut f64)> {
    match &mut d.actuator {
        Actuator::Spool {
            radius_mm,
            max_torque_nm,
            max_angle_deg,
            ..
        } => Some((radius_mm, max_torque_nm, max_angle_deg)),
        _ => None,
    }
}

/// The lead screw's numbers: lead, efficiency, maximum torque and maximum turns.
fn lead_screw(d: &mut Design) -> Option<(&mut f64, &mut f64, &mut f64, &mut f64)> {
    match &mut d.actuator {
        Actuator::LeadScrew {
            lead_mm,
            efficiency,
            max_torque_nm,
            max_turns,
            ..
        } => Some((lead_mm, efficiency, max_torque_nm, max_turns)),
        _ => None,
    }
}

/// Typed text in a field, kept while it differs from the design (being typed, or refused).
#[derive(Clone, Debug)]
struct Typed {
    text: String,
    /// The design value the text was typed over.
    over: f64,
}

/// The input panel's own state (not persisted).
#[derive(Default)]
pub struct InputsPanel {
    typed: HashMap<&'static str, Typed>,
    errors: HashMap<&'static str, String>,
    /// Field of the gesture in progress.
    active: Option<&'static str>,
    /// Friction pair picked from the table, by id.
    friction_pair: Option<String>,
}

/// Formats a value for a typed field: whole numbers plainly, others to about five
/// significant digits.
pub fn fmt_value(v: f64) -> String {
    if !v.is_finite() {
        return v.to_string();
    }
    if v.fract() == 0.0 && v.abs() < 1e15 {
        return format!("{}", v as i64);
    }
    let digits = (4 - v.abs().log10().floor() as i32).clamp(0, 8) as usize;
    let s = format!("{v:.digits$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// Width of the label column of the numeric rows, points.
const LABEL_WIDTH: f32 = 118.0;

/// The slider's span: the field's allowed range (the same range the typed field and the
/// file accept), except where that range spans more than four decades (actuator ratings:
/// a millionth to a billion), where the row's own useful span is used, widened to show
/// the current value. Rows without a limit keep their own span.
fn slider_span(
    row: &Row<'_>,
    limit: Option<&design::FieldLimit>,
    d: &Design,
    value: f64,
) -> (f64, f64) {
    if let Some(span) = row.span {
        return span;
    }
    let Some(l) = limit else {
        return (row.lo, row.hi);
    };
    let (lo, hi) = (l.min, l.max_for(d));
    let decades = (hi / lo.max(row.lo).max(f64::MIN_POSITIVE)).log10();
    if row.log && decades > 4.0 {
        let lo = row.lo.max(lo).min(value.max(lo));
        let hi = row.hi.min(hi).max(value.min(hi));
        (lo, hi)
    } else {
        (lo, hi)
    }
}

/// An error line under a grid row, in plain words, wrapped to the panel's width. It takes
/// no width in the grid (it is painted from the label column to the panel's edge), so a
/// long message never pushes the sliders and fields to the right.
fn error_line_ui(ui: &mut Ui, left: f32, text: &str) {
    let right = ui.clip_rect().right() - 6.0;
    let font = egui::TextStyle::Small.resolve(ui.style());
    let galley = ui.painter().layout(
        text.to_string(),
        font,
        error_color(ui),
        (right - left).max(120.0),
    );
    let (rect, resp) =
        ui.allocate_exact_size(egui::vec2(0.0, galley.size().y), egui::Sense::hover());
    ui.painter()
        .galley(egui::pos2(left, rect.top()), galley, error_color(ui));
    // The accessibility tree and tests read the message as a label.
    resp.widget_info(|| egui::WidgetInfo::labeled(egui::Role::Label, true, text));
}

/// The plausible range of a field for this design, in words that say which ends are
/// allowed ("0.02 to 5 mm", "from 1e-6, less than 1e9 N"): the same text as every error
/// message ([`design::FieldLimit::range_text`]).
fn allowed(l: &design::FieldLimit, d: &Design) -> String {
    l.range_text(l.max_for(d))
}

impl InputsPanel {
    /// Forgets typed and refused entries (after undo or redo, the fields show the design).
    pub fn forget_entries(&mut self) {
        self.typed.clear();
        self.errors.clear();
        self.active = None;
    }

    /// Draws the panel and returns the commands it recorded.
    pub fn ui(&mut self, ui: &mut Ui, d: &Design, analysis: Option<&Analysis>) -> Vec<Command> {
        let mut out = Vec::new();
        egui::ScrollArea::vertical()
            .auto_shrink([false, false])
            .show(ui, |ui| {
                ui.heading("Design");
                self.title_ui(ui, d, &mut out);
                section_ui(ui, "Strips", |ui| self.strip_ui(ui, d, analysis, &mut out));
                section_ui(ui, "Hub and bore", |ui| self.bore_ui(ui, d, &mut out));
                section_ui(ui, "Actuator", |ui| {
                    self.actuator_ui(ui, d, analysis, &mut out)
                });
                section_ui(ui, "Load and friction", |ui| self.duty_ui(ui, d, &mut out));
                section_ui(ui, "Weight, out-of-round bore and bends", |ui| {
                    self.sharing_ui(ui, d, &mut out)
                });
                section_ui(ui, "Operating point", |ui| {
                    self.stroke_ui(ui, d, analysis, &mut out)
                });
            });
        out
    }

    fn title_ui(&mut self, ui: &mut Ui, d: &Design, out: &mut Vec<Command>) {
        ui.horizontal(|ui| {
            let label = ui.label("Title");
            let mut title = d.title.clone();
            let resp = ui
                .add(egui::TextEdit::singleline(&mut title).desired_width(f32::INFINITY))
                .labelled_by(label.id)
                .on_hover_text("Free text naming the design; printed on the sizing sheet.");
            if resp.changed() {
                let mut next = d.clone();
                next.title = title;
                out.push(Command::Edit(Box::new(next), Gesture::Ongoing));
            }
            if resp.lost_focus() {
                out.push(Command::EndGesture);
            }
        });
    }

    /// One numeric row in a 4-column grid: label, slider, typed field, unit; an error
    /// line under it when the last entry was refused.
    fn row_ui(
        &mut self,
        ui: &mut Ui,
        d: &Design,
        row: Row<'_>,
        value: f64,
        out: &mut Vec<Command>,
        set: impl Fn(&mut Design, f64),
    ) {
        let limit = design::limit(row.key);
        let tip = match limit {
            Some(l) => format!("{}\nAllowed: {}", units().prose(row.tip), row.allowed(l, d)),
            None => units().prose(row.tip),
        };
        // One label width in every section, so the sliders and fields line up down the panel.
        let label = ui
            .allocate_ui_with_layout(
                egui::vec2(LABEL_WIDTH, ui.spacing().interact_size.y),
                egui::Layout::left_to_right(egui::Align::Center),
                |ui| {
                    ui.set_min_width(LABEL_WIDTH);
                    ui.label(row.label)
                },
            )
            .inner
            .on_hover_text(&tip);
        // Slider, in the display units; only a move writes, converted back.
        let mut v = row.shown_of(value);
        let (lo, hi) = slider_span(&row, limit, d, value);
        let (lo, hi) = (row.shown_of(lo), row.shown_of(hi));
        let mut slider = egui::Slider::new(&mut v, lo..=hi)
            .show_value(false)
            .clamping(egui::SliderClamping::Never)
            .logarithmic(row.log);
        if row.log && lo <= 0.0 {
            let smallest = row.smallest.map_or(hi * 1e-4, |s| row.shown_of(s));
            slider = slider.smallest_positive(smallest);
        }
        if row.integer {
            slider = slider.integer();
        }
        let resp = ui.add(slider).labelled_by(label.id).on_hover_text(&tip);
        if resp.changed() {
            let gesture = if resp.dragged() {
                Gesture::Ongoing
            } else {
                Gesture::Done
            };
            self.take_gesture(row.key, out);
            let _ = self.propose(d, row, row.file_of(v), gesture, out, &set);
            self.typed.remove(row.key);
        }
        if resp.drag_stopped() {
            out.push(Command::EndGesture);
            self.active = None;
        }
        // Typed field.
        let shown = match self.typed.get(row.key) {
            Some(t) if t.over == value => t.text.clone(),
            _ => row.text(value),
        };
        let mut text = shown;
        let resp = ui
            .add_sized([88.0, 20.0], egui::TextEdit::singleline(&mut text))
            .labelled_by(label.id)
            .on_hover_text(&tip);
        if resp.changed() {
            self.typed.insert(
                row.key,
                Typed {
                    text: text.clone(),
                    over: value,
                },
            );
            self.take_gesture(row.key, out);
            match text.trim().parse::<f64>().map(|x| row.file_of(x)) {
                Ok(x) => {
                    if self.propose(d, row, x, Gesture::Ongoing, out, &set)
                        && let Some(t) = self.typed.get_mut(row.key)
                    {
                        // The text now stands for the new value; an undo that brings
                        // back the old one shows the old one.
                        t.over = x;
                    }
                }
                Err(_) => {
                    let allowed = limit
                        .map(|l| format!("; allowed {}", row.allowed(l, d)))
                        .unwrap_or_default();
                    self.errors.insert(
                        row.key,
                        format!("{} {:?} is not a number{allowed}", row.label, text.trim()),
                    );
                }
            }
        }
        if resp.lost_focus() {
            self.typed.remove(row.key);
            out.push(Command::EndGesture);
            self.active = None;
        }
        if row.unit.is_empty() {
            ui.label("–").on_hover_text("A pure number, without unit.");
        } else {
            ui.label(row.unit_shown());
        }
        ui.end_row();
        if let Some(err) = self.errors.get(row.key) {
            let kept = format!("{err}; kept {} {}", row.text(value), row.unit_shown());
            error_line_ui(ui, label.rect.left(), kept.trim_end());
            ui.end_row();
        }
    }

    /// Rows of plain numbers: each row whose field the design has, in order.
    fn rows_ui(
        &mut self,
        ui: &mut Ui,
        d: &Design,
        out: &mut Vec<Command>,
        rows: &[(Row<'_>, Field)],
    ) {
        let mut probe = d.clone();
        for &(row, field) in rows {
            let Some(value) = field(&mut probe).map(|v| *v) else {
                continue;
            };
            self.row_ui(ui, d, row, value, out, move |d, v| {
                if let Some(f) = field(d) {
                    *f = v;
                }
            });
        }
    }

    /// Ends the previous field's gesture when another field starts one.
    fn take_gesture(&mut self, key: &'static str, out: &mut Vec<Command>) {
        if self.active.is_some_and(|k| k != key) {
            out.push(Command::EndGesture);
        }
        self.active = Some(key);
    }

    /// Applies `v` to a copy of the design and records the edit when the copy validates;
    /// otherwise keeps the design and records, in the row's own words, what was refused.
    fn propose(
        &mut self,
        d: &Design,
        row: Row<'_>,
        v: f64,
        gesture: Gesture,
        out: &mut Vec<Command>,
        set: &impl Fn(&mut Design, f64),
    ) -> bool {
        let key = row.key;
        if row.integer && v.fract() != 0.0 {
            self.errors.insert(
                key,
                format!("{} {} is not a whole number", row.label, row.text(v)),
            );
            return false;
        }
        let mut next = d.clone();
        set(&mut next, v);
        match next.validate() {
            Ok(()) => {
                self.errors.remove(key);
                out.push(Command::Edit(Box::new(next), gesture));
                true
            }
            Err(e) => {
                let words = match design::limit(key) {
                    Some(l) if !l.admits(v, l.max_for(&next)) => format!(
                        "{} {} {} is outside {}",
                        row.label,
                        row.text(v),
                        row.unit_shown(),
                        row.allowed(l, &next)
                    )
                    .replace("  ", " "),
                    _ => units().prose(&e.to_string()),
                };
                self.errors.insert(key, words);
                false
            }
        }
    }

    fn choice(out: &mut Vec<Command>, d: &Design, change: impl FnOnce(&mut Design)) {
        let mut next = d.clone();
        change(&mut next);
        if next != *d {
            out.push(Command::Edit(Box::new(next), Gesture::Done));
        }
    }

    fn strip_ui(
        &mut self,
        ui: &mut Ui,
        d: &Design,
        analysis: Option<&Analysis>,
        out: &mut Vec<Command>,
    ) {
        let s = &d.strip;
        grid_ui(ui, "strip", |ui| {
            self.row_ui(
                ui,
                d,
                Row::new(
                    "strip.count",
                    "Strips",
                    "strips",
                    3.0,
                    64.0,
                    "Number of identical strips around the hub; they share the load equally.",
                )
                .integer(),
                f64::from(s.count),
                out,
                |d, v| d.strip.count = v.clamp(0.0, f64::from(u32::MAX)) as u32,
            );
            #[rustfmt::skip]
            let rows: &[(Row<'_>, Field)] = &[
                (Row::new("strip.free_length_mm", "Free length", "mm", 5.0, 2000.0, "Strip length between the end-plate clamps or hinges.").log(), |d| Some(&mut d.strip.free_length_mm)),
                (Row::new("strip.width_mm", "Width", "mm", 0.2, 200.0, "Strip width, tangential to the hub.").log(), |d| Some(&mut d.strip.width_mm)),
                (Row::new("strip.thickness_mm", "Thickness", "mm", 0.02, 5.0, "Strip thickness, radial. Stiffness goes with its cube, bending stress with it.").log(), |d| Some(&mut d.strip.thickness_mm)),
            ];
            self.rows_ui(ui, d, out, rows);
        });
        // Material.
        ui.horizontal(|ui| {
            let label = ui.label("Material");
            let current = match &s.material {
                MaterialChoice::Grade(id) => {
                    material::find(id).map_or(id.clone(), |m| m.name.clone())
                }
                MaterialChoice::Custom { name, .. } => format!("custom: {name}"),
            };
            let resp = egui::ComboBox::from_id_salt("grade")
                .selected_text(current)
                .width(250.0)
                .truncate()
                .show_ui(ui, |ui| {
                    for m in material::library() {
                        let on = matches!(&s.material, MaterialChoice::Grade(id) if *id == m.id);
                        if ui
                            .selectable_label(on, &m.name)
                            .on_hover_text(&m.note)
                            .clicked()
                            && !on
                        {
                            Self::choice(out, d, |n| {
                                n.strip.material = MaterialChoice::Grade(m.id.clone())
                            });
                        }
                    }
                    let custom = matches!(s.material, MaterialChoice::Custom { .. });
                    if ui.selectable_label(custom, "Custom values…").clicked() && !custom {
                        let base =
                            analysis
                                .map(|a| a.segment.material.clone())
                                .unwrap_or_else(|| {
                                    material::custom(
                                        "custom strip",
                                        193.0,
                                        0.3,
                                        1300.0,
                                        1000.0,
                                        400.0,
                                    )
                                });
                        Self::choice(out, d, |n| {
                            n.strip.material = MaterialChoice::Custom {
                                name: format!("custom ({})", base.name),
                                youngs_modulus_gpa: base.youngs_modulus_gpa,
                                poisson_ratio: base.poisson_ratio,
                                tensile_strength_mpa: base.tensile_strength_mpa,
                                yield_strength_mpa: base.yield_strength_mpa,
                                endurance_limit_mpa: base.endurance_limit_mpa,
                            }
                        });
                    }
                });
            resp.response.labelled_by(label.id).on_hover_text(
                "Strip grade from the built-in table (values with sources), or values you enter.",
            );
        });
        match &s.material {
            MaterialChoice::Grade(id) => {
                if let Some(m) = material::find(id) {
                    ui.label(
                        RichText::new(units().prose(&format!(
                            "E {} GPa, nu {}, tensile {} MPa, yield {} MPa, endurance {} MPa",
                            m.youngs_modulus_gpa,
                            m.poisson_ratio,
                            m.tensile_strength_mpa,
                            m.yield_strength_mpa,
                            m.endurance_limit_mpa
                        )))
                        .small(),
                    )
                    .on_hover_text(format!(
                        "Basis of each value:\nmodulus: {}\nPoisson: {}\ntensile: {}\nyield: {}\nendurance: {}",
                        m.basis.modulus,
                        m.basis.poisson,
                        m.basis.tensile,
                        m.basis.yield_strength,
                        m.basis.endurance
                    ));
                }
            }
            MaterialChoice::Custom { name, .. } => {
                ui.horizontal(|ui| {
                    let label = ui.label("Name");
                    let mut n = name.clone();
                    if ui
                        .text_edit_singleline(&mut n)
                        .labelled_by(label.id)
                        .on_hover_text("Name printed on the sizing sheet; must not be empty.")
                        .changed()
                    {
                        let mut next = d.clone();
                        if let MaterialChoice::Custom { name, .. } = &mut next.strip.material {
                            *name = n;
                        }
                        if let Err(e) = next.validate() {
                            self.errors.insert("strip.material.name", e.to_string());
                        } else {
                            self.errors.remove("strip.material.name");
                            out.push(Command::Edit(Box::new(next), Gesture::Ongoing));
                        }
                    }
                });
                if let Some(e) = self.errors.get("strip.material.name") {
                    ui.label(RichText::new(e).color(error_color(ui)).small());
                }
                grid_ui(ui, "custom-material", |ui| {
                    #[rustfmt::skip]
                    let rows: &[(Row<'_>, Field)] = &[
                        (Row::new("strip.material.youngs_modulus_gpa", "Young's modulus", "GPa", 10.0, 500.0, "Elastic modulus of the strip material."), |d| custom_numbers(d).map(|m| m.0)),
                        (Row::new("strip.material.poisson_ratio", "Poisson's ratio", "", 0.0, 0.5, "Used by the plate stiffness E/(1-nu^2)."), |d| custom_numbers(d).map(|m| m.1)),
                        (Row::new("strip.material.tensile_strength_mpa", "Tensile strength", "MPa", 1.0, 5000.0, "Ultimate tensile strength; 0.75 of it is the static allowable.").log(), |d| custom_numbers(d).map(|m| m.2)),
                        (Row::new("strip.material.yield_strength_mpa", "Yield strength", "MPa", 1.0, 5000.0, "Yield strength; must not exceed the tensile strength.").log(), |d| custom_numbers(d).map(|m| m.3)),
                        (Row::new("strip.material.endurance_limit_mpa", "Endurance strength", "MPa", 1.0, 5000.0, "Fully reversed endurance strength at 10^6 cycles and beyond.").log(), |d| custom_numbers(d).map(|m| m.4)),
                    ];
                    self.rows_ui(ui, d, out, rows);
                });
            }
        }
        ui.horizontal(|ui| {
            ui.label("Ends")
                .on_hover_text("How the strips are held at the end plates.");
            for (ends, name, tip) in [
                (
                    Ends::Clamped,
                    "Clamped",
                    "Slope zero at both plates (bolted or welded strip).",
                ),
                (
                    Ends::Hinged,
                    "Hinged",
                    "Moment-free ends (pins or thin flexures).",
                ),
            ] {
                if ui.radio(s.ends == ends, name).on_hover_text(tip).clicked() {
                    Self::choice(out, d, |n| n.strip.ends = ends);
                }
            }
        });
        ui.horizontal(|ui| {
            ui.label("Stiffness")
                .on_hover_text("Bending modulus: beam uses E, plate uses E/(1-nu^2).");
            for (st, name, tip) in [
                (
                    Stiffness::Auto,
                    "Auto",
                    "Plate when width >= 10 x thickness, else beam (common practice).",
                ),
                (Stiffness::Beam, "Beam", "Narrow strip: E' = E."),
                (
                    Stiffness::Plate,
                    "Plate",
                    "Wide strip in cylindrical bending: E' = E/(1-nu^2).",
                ),
            ] {
                if ui
                    .radio(s.stiffness == st, name)
                    .on_hover_text(tip)
                    .clicked()
                {
                    Self::choice(out, d, |n| n.strip.stiffness = st);
                }
            }
        });
        if let Some(a) = analysis {
            ui.label(
                RichText::new(format!(
                    "Using {}: {}",
                    a.segment.stiffness_used.name(),
                    a.segment.stiffness_reason
                ))
                .small(),
            );
        }
        super::bench::calibration_note_ui(ui, d, out);
    }

    fn bore_ui(&mut self, ui: &mut Ui, d: &Design, out: &mut Vec<Command>) {
        grid_ui(ui, "hub", |ui| {
            #[rustfmt::skip]
            let rows: &[(Row<'_>, Field)] = &[
                (Row::new("mount_radius_mm", "Mount radius", "mm", 0.5, 1000.0, "Radius of the strip centreline at the end plates.").log(), |d| Some(&mut d.mount_radius_mm)),
                (Row::new("end_plate_diameter_mm", "End-plate diameter", "mm", 0.0, 2000.0, "Outside diameter of the end plates; 0 when they are smaller than the strip ring.").log(), |d| Some(&mut d.end_plate_diameter_mm)),
            ];
            self.rows_ui(ui, d, out, rows);
        });
        let as_pipe = d.bore.pipe.is_some();
        ui.horizontal(|ui| {
            ui.label("Bore given as").on_hover_text("A diameter you type, or a pipe's inside diameter (OD - 2 x nominal wall, ASME B36.10M).");
            if ui
                .radio(!as_pipe, "Diameter")
                .on_hover_text(format!(
                    "Type the nominal bore diameter in {}.",
                    units().unit(Quantity::Length)
                ))
                .clicked()
                && as_pipe
            {
                let nominal = d.bore.nominal_mm().unwrap_or(d.bore.diameter_mm);
                Self::choice(out, d, |n| {
                    n.bore.pipe = None;
                    n.bore.diameter_mm = nominal;
                });
            }
            if ui
                .radio(as_pipe, "Pipe size")
                .on_hover_text("Pick an NPS and schedule; the nearest pipe to the typed bore is offered first.")
                .clicked()
                && !as_pipe
            {
                // Nearest pipe by inside diameter.
                let want = d.bore.diameter_mm;
                let nearest = pipe::table().iter().min_by(|a, b| (a.inside_diameter_mm() - want).abs().total_cmp(&(b.inside_diameter_mm() - want).abs()));
                if let Some(p) = nearest {
                    let pick = PipeRef { nps: p.nps.clone(), schedule: p.schedule.clone() };
                    let mut next = d.clone();
                    next.bore.pipe = Some(pick);
                    self.propose_whole(next, "bore.pipe", out);
                }
            }
        });
        if let Some(p) = &d.bore.pipe {
            ui.horizontal(|ui| {
                let label = ui.label("NPS");
                egui::ComboBox::from_id_salt("nps")
                    .selected_text(&p.nps)
                    .show_ui(ui, |ui| {
                        for nps in pipe::nps_list() {
                            if ui.selectable_label(p.nps == nps, nps).clicked() && p.nps != nps {
                                let schedules = pipe::schedules_for(nps);
                                let schedule = if schedules.contains(&p.schedule.as_str()) {
                                    p.schedule.clone()
                                } else {
                                    schedules
                                        .first()
                                        .map_or_else(String::new, |s| s.to_string())
                                };
                                let mut next = d.clone();
                                next.bore.pipe = Some(PipeRef {
                                    nps: nps.to_string(),
                                    schedule,
                                });
                                self.propose_whole(next, "bore.pipe", out);
                            }
                        }
                    })
                    .response
                    .labelled_by(label.id)
                    .on_hover_text("Nominal pipe size.");
                let label = ui.label("Schedule");
                egui::ComboBox::from_id_salt("schedule")
                    .selected_text(&p.schedule)
                    .show_ui(ui, |ui| {
                        for sch in pipe::schedules_for(&p.nps) {
                            if ui.selectable_label(p.schedule == sch, sch).clicked()
                                && p.schedule != sch
                            {
                                let mut next = d.clone();
                                next.bore.pipe = Some(PipeRef {
                                    nps: p.nps.clone(),
                                    schedule: sch.to_string(),
                                });
                                self.propose_whole(next, "bore.pipe", out);
                            }
                        }
                    })
                    .response
                    .labelled_by(label.id)
                    .on_hover_text("Pipe schedule (wall thickness class).");
            });
            if let Some(row) = pipe::find(&p.nps, &p.schedule) {
                ui.label(
                    RichText::new(units().prose(&format!(
                        "OD {} mm, wall {} mm: bore {:.2} mm",
                        row.outside_diameter_mm,
                        row.wall_mm,
                        row.inside_diameter_mm()
                    )))
                    .small(),
                )
                .on_hover_text(&row.source);
            }
            if let Some(e) = self.errors.get("bore.pipe") {
                ui.label(RichText::new(e).color(error_color(ui)).small());
            }
        }
        let nominal = d.bore.nominal_mm().unwrap_or(d.bore.diameter_mm);
        let tol_hi = (0.25 * nominal).min(10.0);
        grid_ui(ui, "bore", |ui| {
            #[rustfmt::skip]
            let rows: &[(Row<'_>, Field)] = &[
                (Row::new("bore.diameter_mm", "Bore diameter", "mm", 2.0, 2000.0, "Nominal inside diameter the segment grips.").log(), |d| d.bore.pipe.is_none().then_some(&mut d.bore.diameter_mm)),
                (Row::new("bore.minus_mm", "Bore minus", "mm", 0.0, tol_hi, "How far below nominal the bore may be; stress, actuator and stroke are judged at the smallest bore. The slider is logarithmic from 0.01 mm, so mill tolerances of tenths to a few millimetres take most of its track.").log_from(0.01), |d| Some(&mut d.bore.minus_mm)),
                (Row::new("bore.plus_mm", "Bore plus", "mm", 0.0, tol_hi, "How far above nominal the bore may be; reach and holding are judged at the largest bore. The slider is logarithmic from 0.01 mm, so mill tolerances of tenths to a few millimetres take most of its track.").log_from(0.01), |d| Some(&mut d.bore.plus_mm)),
            ];
            self.rows_ui(ui, d, out, rows);
        });
    }

    fn propose_whole(&mut self, next: Design, key: &'static str, out: &mut Vec<Command>) {
        match next.validate() {
            Ok(()) => {
                self.errors.remove(key);
                out.push(Command::Edit(Box::new(next), Gesture::Done));
            }
            Err(e) => {
                self.errors.insert(key, e.to_string());
            }
        }
    }

    fn actuator_ui(
        &mut self,
        ui: &mut Ui,
        d: &Design,
        analysis: Option<&Analysis>,
        out: &mut Vec<Command>,
    ) {
        let (pull_n, stroke_mm) = analysis.map_or((100.0, 10.0), |a| {
            (a.segment.max_pull_n(), a.segment.max_stroke_mm())
        });
        ui.horizontal(|ui| {
            ui.label("Kind").on_hover_text(
                "What draws the end plates together. Switching keeps the same pull and travel.",
            );
            let kinds: [(&str, &str, Actuator); 3] = [
                (
                    "Direct pull",
                    "A straight pull on the plates (cylinder, solenoid, cable).",
                    Actuator::Direct {
                        max_force_n: 0.0,
                        max_stroke_mm: 0.0,
                        stiffness_n_per_mm: None,
                    }
                    .rated_for(pull_n, stroke_mm),
                ),
                (
                    "Spool",
                    "A cord wound on a spool turned by a motor.",
                    Actuator::Spool {
                        radius_mm: 5.0,
                        max_torque_nm: 0.0,
                        max_angle_deg: 0.0,
                        stiffness_n_per_mm: None,
                    }
                    .rated_for(pull_n, stroke_mm),
                ),
                (
                    "Lead screw",
                    "A screw turning in a nut.",
                    Actuator::LeadScrew {
                        lead_mm: 1.0,
                        efficiency: 0.3,
                        max_torque_nm: 0.0,
                        max_turns: 0.0,
                        stiffness_n_per_mm: None,
                    }
                    .rated_for(pull_n, stroke_mm),
                ),
            ];
            for (name, tip, proto) in kinds {
                let on = std::mem::discriminant(&d.actuator) == std::mem::discriminant(&proto);
                if ui.radio(on, name).on_hover_text(tip).clicked() && !on {
                    let mut next = d.clone();
                    next.actuator = proto;
                    super::drive::keep_drive(d, &mut next);
                    self.propose_whole(next, "actuator", out);
                }
            }
        });
        // Only the rows of the kind chosen show.
        #[rustfmt::skip]
        let rows: &[(Row<'_>, Field)] = &[
            (Row::new("actuator.max_force_n", "Max pull", "N", 1.0, 1e5, "Largest pull the actuator delivers on the plates.").log(), |d| direct(d).map(|a| a.0)),
            (Row::new("actuator.max_stroke_mm", "Max travel", "mm", 0.1, 500.0, "Longest travel the actuator delivers.").log(), |d| direct(d).map(|a| a.1)),
            (Row::new("actuator.radius_mm", "Spool radius", "mm", 0.5, 100.0, "Radius at the cord.").log(), |d| spool(d).map(|a| a.0)),
            (Row::new("actuator.max_torque_nm", "Max torque", "N m", 1e-3, 100.0, "Largest torque at the spool.").log(), |d| spool(d).map(|a| a.1)),
            (Row::new("actuator.max_angle_deg", "Max rotation", "deg", 1.0, 7200.0, "Largest spool rotation.").log(), |d| spool(d).map(|a| a.2)),
            (Row::new("actuator.lead_mm", "Lead", "mm", 0.1, 20.0, "Advance per screw turn.").log(), |d| lead_screw(d).map(|a| a.0)),
            (Row::new("actuator.efficiency", "Efficiency", "", 0.05, 1.0, "Screw efficiency: torque = pull x lead / (2 pi x efficiency)."), |d| lead_screw(d).map(|a| a.1)),
            (Row::new("actuator.max_torque_nm", "Max torque", "N m", 1e-3, 100.0, "Largest torque at the screw.").log(), |d| lead_screw(d).map(|a| a.2)),
            (Row::new("actuator.max_turns", "Max turns", "turns", 0.1, 200.0, "Largest number of screw turns.").log(), |d| lead_screw(d).map(|a| a.3)),
            (Row::new("actuator.stiffness_n_per_mm", "Drive stiffness", "N/mm", 1.0, 1e6, "Series stiffness of the cord or drive between the actuator and the plates: the actuator travels stroke + pull / stiffness, and where the segment softens faster than this, a position-controlled drive lets it jump.").log(), drive_stiffness),
        ];
        let mut compliant = d.actuator.stiffness_n_per_mm().is_some();
        if ui
            .checkbox(&mut compliant, "Compliant drive")
            .on_hover_text("Off: the cord or drive is taken as rigid (travel = stroke). On: give its series stiffness; travel limits, spool angle and screw turns then count the travel, and the checks look for a jump under position control.")
            .changed()
        {
            let mut next = d.clone();
            next.actuator
                .set_stiffness_n_per_mm(compliant.then_some(super::drive::DEFAULT_STIFFNESS_N_PER_MM));
            self.propose_whole(next, "actuator", out);
        }
        grid_ui(ui, "actuator", |ui| self.rows_ui(ui, d, out, rows));
        if let Some(e) = self.errors.get("actuator") {
            ui.label(RichText::new(e).color(error_color(ui)).small());
        }
        ui.label(
            RichText::new(units().prose(&format!(
                "Delivers at most {pull_n:.1} N of pull over {stroke_mm:.2} mm of plate travel."
            )))
            .small(),
        );
    }

    /// The load-sharing inputs (issue 17): radial load, out-of-roundness, the bend and the
    /// end plates' thickness. Zero and "no bend" keep the centred model.
    fn sharing_ui(&mut self, ui: &mut Ui, d: &Design, out: &mut Vec<Command>) {
        let nominal = d.bore.nominal_mm().unwrap_or(d.bore.diameter_mm);
        grid_ui(ui, "sharing", |ui| {
            #[rustfmt::skip]
            let rows: &[(Row<'_>, Field)] = &[
                (Row::new("duty.radial_load_n", "Radial load", "N", 0.0, 1e4, "Radial load the segment carries through its strips, acting straight down: e.g. its share of the module's weight in a horizontal line. The hub sags, the bottom strips press harder and the top ones may not touch. 0: every strip carries the same share.").log(), |d| Some(&mut d.duty.radial_load_n)),
                (Row::new("bore.out_of_round_mm", "Out of round", "mm", 0.0, 0.1 * nominal, "Largest minus smallest bore diameter (pipe ovality within its standard's tolerance). The largest diameter is judged both along and across the load; the worse governs. 0: round."), |d| Some(&mut d.bore.out_of_round_mm)),
                (Row::new("end_plate_thickness_mm", "Plate thickness", "mm", 0.0, 50.0, "Thickness of each end plate. The relaxed segment is a rigid body of the free length plus both plates when it passes a bend."), |d| Some(&mut d.end_plate_thickness_mm)),
                (Row::new("bore.bend", "Bend radius", "mm", 1.0, 1e5, "Centreline radius of the bend the relaxed segment must pass.").log(), |d| match &mut d.bore.bend { Some(crate::bend::Bend::RadiusMm(r)) => Some(r), _ => None }),
            ];
            self.rows_ui(ui, d, out, rows);
        });
        ui.horizontal(|ui| {
            use crate::bend::Bend;
            let label = ui.label("Bend to pass");
            let name = |b: Option<Bend>| match b {
                None => "none (no bend check)",
                Some(Bend::LongRadius) => "long-radius elbow, 1.5 x NPS",
                Some(Bend::ShortRadius) => "short-radius elbow, 1.0 x NPS",
                Some(Bend::RadiusMm(_)) if !units().is_metric() => "a radius in inches",
                Some(Bend::RadiusMm(_)) => "a radius in mm",
            };
            let resp = egui::ComboBox::from_id_salt("bend")
                .selected_text(name(d.bore.bend))
                .width(220.0)
                .show_ui(ui, |ui| {
                    let radius = match d.bore.bend {
                        Some(Bend::RadiusMm(r)) => r,
                        _ => (3.0 * nominal).clamp(1.0, 1e5),
                    };
                    for choice in [
                        None,
                        Some(Bend::LongRadius),
                        Some(Bend::ShortRadius),
                        Some(Bend::RadiusMm(radius)),
                    ] {
                        let on = std::mem::discriminant(&d.bore.bend)
                            == std::mem::discriminant(&choice)
                            && match (d.bore.bend, choice) {
                                (Some(a), Some(b)) => {
                                    std::mem::discriminant(&a) == std::mem::discriminant(&b)
                                }
                                _ => true,
                            };
                        if ui.selectable_label(on, name(choice)).clicked() && !on {
                            Self::choice(out, d, |n| n.bore.bend = choice);
                        }
                    }
                });
            resp.response.labelled_by(label.id).on_hover_text(
                "A bend the relaxed segment must pass (the bend check). Butt-weld elbows take their radius from the pipe size (ASME B16.9: long radius 1.5 x NPS, short radius 1.0 x NPS, in inches), so they need the bore given as a pipe size.",
            );
        });
    }

    fn duty_ui(&mut self, ui: &mut Ui, d: &Design, out: &mut Vec<Command>) {
        grid_ui(ui, "duty", |ui| {
            #[rustfmt::skip]
            let rows: &[(Row<'_>, Field)] = &[
                (Row::new("duty.holding_force_n", "Load to hold", "N", 0.0, 1e5, "Axial force the segment must hold in the bore.").log(), |d| Some(&mut d.duty.holding_force_n)),
                (Row::new("duty.safety_factor", "Safety factor", "", 1.0, 10.0, "Factor on the load to hold; the holding check asks for load x factor."), |d| Some(&mut d.duty.safety_factor)),
                (Row::new("friction", "Wall friction", "", 0.01, 1.5, "Static friction coefficient, strip on wall. Measure it when you can."), |d| Some(&mut d.friction)),
            ];
            self.rows_ui(ui, d, out, rows);
            self.row_ui(
                ui,
                d,
                Row::new(
                    "duty.cycles",
                    "Cycles",
                    "cycles",
                    1.0,
                    1e9,
                    "Grip-release cycles over the life; sets the fatigue strength.",
                )
                .log()
                .integer(),
                d.duty.cycles as f64,
                out,
                |d, v| d.duty.cycles = v.max(0.0) as u64,
            );
        });
        ui.horizontal(|ui| {
            let label = ui.label("Typical pair");
            let picked = self.friction_pair.as_deref().and_then(friction::find);
            let text = picked.map_or("pick to fill in friction…".to_string(), |p| {
                p.name.clone()
            });
            egui::ComboBox::from_id_salt("friction-pair")
                .selected_text(text)
                .width(220.0)
                .truncate()
                .show_ui(ui, |ui| {
                    for p in friction::table() {
                        if ui
                            .selectable_label(
                                false,
                                format!("{} ({})", p.name, p.static_coefficient),
                            )
                            .on_hover_text(&p.note)
                            .clicked()
                        {
                            self.friction_pair = Some(p.id.clone());
                            Self::choice(out, d, |n| n.friction = p.static_coefficient);
                        }
                    }
                })
                .response
                .labelled_by(label.id)
                .on_hover_text(
                    "Typical static friction for common strip/bore pairs: rough guides only.",
                );
        });
        if let Some(p) = self.friction_pair.as_deref().and_then(friction::find) {
            let note = if p.static_coefficient == d.friction {
                format!("Source: {}", p.source)
            } else {
                format!("(edited since picking {}: {})", p.name, p.source)
            };
            ui.label(RichText::new(note).small());
        }
    }

    fn stroke_ui(
        &mut self,
        ui: &mut Ui,
        d: &Design,
        analysis: Option<&Analysis>,
        out: &mut Vec<Command>,
    ) {
        let l = d.strip.free_length_mm;
        let operating = d.operating();
        // Switching keeps the operating point at the nominal bore where the analysis has it.
        let nominal = analysis.and_then(|a| {
            a.bores
                .iter()
                .find(|b| b.case == crate::analysis::BoreCase::Nominal)
                .and_then(|b| b.operating.as_ref().ok())
        });
        let stroke_now = nominal.map_or(0.25 * l, |s| s.stroke_mm);
        let pull_now = nominal.and_then(|s| s.actuator_force_n).unwrap_or(100.0);
        let torque_now = nominal
            .and_then(|s| s.actuator)
            .filter(|r| r.effort_unit == "N m")
            .map_or(0.1, |r| r.effort);
        let direct = matches!(d.actuator, Actuator::Direct { .. });
        ui.horizontal(|ui| {
            ui.label("Set by").on_hover_text(
                "What the actuator holds at the operating point. Switching keeps the operating point at the nominal bore.",
            );
            let modes = [
                (
                    "Stroke",
                    "Displacement control: the plates are drawn together by a set stroke, the same in every bore.",
                    Operating::Stroke(stroke_now),
                ),
                (
                    "Pull",
                    "Force control: the actuator pulls with a set force (a spring, a pressure, a force-limited drive). In each bore the plates travel until the pull is reached, so the stroke differs across the bore tolerance.",
                    Operating::Pull(pull_now),
                ),
                (
                    "Torque",
                    "Force control through the spool or screw: a torque-limited motor. The torque sets the pull on the plates, and the stroke differs across the bore tolerance.",
                    Operating::Torque(torque_now),
                ),
            ];
            for (name, tip, proto) in modes {
                let on = std::mem::discriminant(&operating) == std::mem::discriminant(&proto);
                let enabled = !(direct && matches!(proto, Operating::Torque(_)));
                let tip = if enabled {
                    tip.to_string()
                } else {
                    format!("{tip}\nA direct pull has no spool or screw: choose a spool or a lead screw first.")
                };
                let resp = ui
                    .add_enabled(enabled, egui::RadioButton::new(on, name))
                    .on_hover_text(&tip)
                    .on_disabled_hover_text(&tip);
                if resp.clicked() && !on {
                    let mut next = d.clone();
                    next.set_operating(proto);
                    self.propose_whole(next, "operating", out);
                }
            }
        });
        if let Some(e) = self.errors.get("operating") {
            ui.label(RichText::new(e).color(error_color(ui)).small());
        }
        grid_ui(ui, "stroke", |ui| {
            match operating {
                Operating::Stroke(stroke) => {
                    let key = if d.operating.is_some() {
                        "operating.Stroke"
                    } else {
                        "operating_stroke_mm"
                    };
                    // The slider covers the strokes this design can use, so a pixel is a
                    // few hundredths of a millimetre rather than a millimetre of the free
                    // length: up to the smaller of the actuator's maximum and the largest
                    // of the three bores' model limits (and always the current value).
                    let reach = analysis
                        .map(|a| {
                            let limit = a
                                .bores
                                .iter()
                                .filter_map(|b| b.row.limit_stroke_mm)
                                .fold(0.0, f64::max);
                            limit.min(a.segment.max_stroke_mm())
                        })
                        .filter(|v| v.is_finite() && *v > 0.0)
                        .unwrap_or(l)
                        .max(stroke)
                        .min(l);
                    self.row_ui(
                        ui,
                        d,
                        Row::new(
                            key,
                            "Operating stroke",
                            "mm",
                            0.0,
                            l,
                            "End-plate travel at which the segment is meant to hold. The slider runs from 0 to the smaller of the actuator's maximum and the model's limit at the three bores; type any stroke up to the free length.",
                        )
                        .span(0.0, reach),
                        stroke,
                        out,
                        |d, v| d.set_operating(Operating::Stroke(v)),
                    );
                    self.stroke_at_actuator_ui(ui, d, analysis, stroke, out);
                }
                Operating::Pull(pull) => self.row_ui(
                    ui,
                    d,
                    Row::new(
                        "operating.Pull",
                        "Set pull",
                        "N",
                        1.0,
                        1e5,
                        "Pull the actuator holds on the end plates. In each bore the operating stroke is the first stroke where the strips resist this pull.",
                    )
                    .log(),
                    pull,
                    out,
                    |d, v| d.set_operating(Operating::Pull(v)),
                ),
                Operating::Torque(torque) => self.row_ui(
                    ui,
                    d,
                    Row::new(
                        "operating.Torque",
                        "Set torque",
                        "N m",
                        1e-3,
                        100.0,
                        "Torque the motor holds at the spool or screw; it sets the pull on the plates (spool: torque / radius; screw: 2 pi x efficiency x torque / lead).",
                    )
                    .log(),
                    torque,
                    out,
                    |d, v| d.set_operating(Operating::Torque(v)),
                ),
            }
        });
        if let Some(a) = analysis {
            super::drive::operating_summary_ui(ui, a);
        }
    }

    /// The operating stroke in the actuator's own unit (spool angle, screw turns). Through
    /// a compliant drive the actuator turns through the travel, stroke + pull / stiffness,
    /// at the nominal bore, and a typed rotation sets the first stroke whose travel reaches
    /// it ([`crate::actuation::stroke_at_travel_mm`]).
    fn stroke_at_actuator_ui(
        &mut self,
        ui: &mut Ui,
        d: &Design,
        analysis: Option<&Analysis>,
        stroke: f64,
        out: &mut Vec<Command>,
    ) {
        let l = d.strip.free_length_mm;
        let (key, label, unit, what) = match d.actuator {
            Actuator::Spool { .. } => (
                "operating.spool_angle_deg",
                "As spool angle",
                "deg",
                "spool rotation",
            ),
            Actuator::LeadScrew { .. } => (
                "operating.screw_turns",
                "As screw turns",
                "turns",
                "screw turns",
            ),
            Actuator::Direct { .. } => return,
        };
        let formula = match d.actuator {
            Actuator::Spool { .. } => "radius",
            _ => "lead",
        };
        // A plate travel in the actuator's own position unit, both ways.
        let act = d.actuator.clone();
        let position = |travel_mm: f64| act.reading(travel_mm, 0.0).position;
        if d.actuator.stiffness_n_per_mm().is_none() {
            let hi = position(l);
            let tip = at_actuator_tip(&format!("{what}: stroke / {formula}"), hi, unit);
            self.row_ui(
                ui,
                d,
                Row::new(key, label, unit, 0.0, hi, &tip),
                position(stroke),
                out,
                |d, v| d.set_operating(Operating::Stroke(act.stroke_mm_at(v))),
            );
            return;
        }
        // Through a compliant drive: the travel at the nominal bore, from the analysis of
        // this very design, else from the design itself.
        let own;
        let seg = match analysis.filter(|a| a.segment.design == *d) {
            Some(a) => Some(&a.segment),
            None => {
                own = crate::segment::Segment::new(d).ok();
                own.as_ref()
            }
        };
        let Some(path) = seg.and_then(|s| s.at_bore(s.bore_nominal_mm).ok()) else {
            ui.label(RichText::new(format!("{label}: not shown, the segment has no state at the nominal bore")).small())
                .on_hover_text("Through a compliant drive the actuator turns through the travel, stroke + pull / stiffness, and the pull needs a state at the nominal bore.");
            ui.end_row();
            return;
        };
        let limit = path.limit_stroke_mm();
        let travel = crate::actuation::travel_at_mm(&path, stroke);
        let hi = position(crate::actuation::travel_at_mm(&path, limit).max(travel));
        let tip = format!(
            "The operating stroke as {what} through the drive's stretch: (stroke + pull / stiffness) / {formula}, at the nominal bore {:.2} mm (actuator travel {travel:.3} mm now). A value typed here sets the first stroke whose travel reaches it.\nAllowed: 0 to {} {unit} (the travel at the model's limit)",
            path.bore_mm(),
            fmt_value(hi)
        );
        let unreached = std::cell::Cell::new(None);
        self.row_ui(
            ui,
            d,
            Row::new(key, label, unit, 0.0, hi, &tip),
            position(travel),
            out,
            |d, v| {
                let found = crate::actuation::stroke_at_travel_mm(&path, act.stroke_mm_at(v));
                if found.is_none() {
                    unreached.set(Some(v));
                }
                // NaN is refused by validation, so nothing changes when it is never reached.
                d.set_operating(Operating::Stroke(found.unwrap_or(f64::NAN)));
            },
        );
        if let Some(v) = unreached.get() {
            self.errors.insert(
                key,
                format!(
                    "{label} {} {unit} is never reached at the nominal bore: the drive's stretch keeps the travel below it up to the model's limit; allowed 0 to {} {unit}",
                    fmt_value(v),
                    fmt_value(hi)
                ),
            );
        }
    }
}

/// The drive's series stiffness, when the design gives one.
fn drive_stiffness(d: &mut Design) -> Option<&mut f64> {
    match &mut d.actuator {
        Actuator::Direct {
            stiffness_n_per_mm, ..
        }
        | Actuator::Spool {
            stiffness_n_per_mm, ..
        }
        | Actuator::LeadScrew {
            stiffness_n_per_mm, ..
        } => stiffness_n_per_mm.as_mut(),
    }
}

/// Tooltip of the operating stroke in the actuator's own unit; its range is the operating
/// stroke's (0 to the free length) in that unit.
fn at_actuator_tip(what: &str, hi: f64, unit: &str) -> String {
    format!(
        "The operating stroke as {what}.\nAllowed: 0 to {} {unit} (the free length)",
        fmt_value(hi)
    )
}

fn section_ui(ui: &mut Ui, title: &str, body: impl FnOnce(&mut Ui)) {
    egui::CollapsingHeader::new(RichText::new(title).strong())
        .default_open(true)
        .show(ui, body);
}

fn grid_ui(ui: &mut Ui, id: &str, body: impl FnOnce(&mut Ui)) {
    egui::Grid::new(id)
        .num_columns(4)
        .spacing([6.0, 4.0])
        .show(ui, body);
}

/// Red that reads on both themes.
pub fn error_color(on: &impl HasVisuals) -> Color32 {
    if on.visuals().dark_mode {
        Color32::from_rgb(255, 120, 110)
    } else {
        Color32::from_rgb(180, 20, 20)
    }
}

/// What knows the theme's visuals: a `Ui`, or the `Visuals` themselves (so a colour helper
/// takes no `Ui` of its own).
pub trait HasVisuals {
    /// The visuals in force.
    fn visuals(&self) -> &egui::Visuals;
}

impl HasVisuals for Ui {
    fn visuals(&self) -> &egui::Visuals {
        Ui::visuals(self)
    }
}

impl HasVisuals for egui::Visuals {
    fn visuals(&self) -> &egui::Visuals {
        self
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn allowed_ranges_say_which_ends_are_allowed() {
        let d = Design::default();
        let limit = |key| design::limit(key).unwrap_or_else(|| panic!("no limit for {key}"));
        // The design file's plausible ranges (design::limits): a closed range, an open
        // actuator rating, and an efficiency above zero up to one.
        assert_eq!(allowed(limit("strip.thickness_mm"), &d), "0.02 to 5 mm");
        assert_eq!(
            allowed(limit("actuator.max_force_n"), &d),
            "from 1e-6, less than 1e9 N"
        );
        assert_eq!(allowed(limit("actuator.efficiency"), &d), "0.01 to 1");
        // The bore tolerance's upper end follows the design: a quarter of the nominal bore.
        let nominal = d.bore.nominal_mm().unwrap_or(f64::NAN);
        assert_eq!(
            allowed(limit("bore.plus_mm"), &d),
            format!("0 to {} mm", fmt_value(0.25 * nominal))
        );
    }
}
