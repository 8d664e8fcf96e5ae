//! The menu bar, the status line and the app's small windows: open and save-as with a
//! typed path (and the desktop's file dialog when one answers), the unsaved-changes
//! prompt, the recovery offer, the fitting helper, exports, the sizing sheet and the
//! safety cautions.

use std::path::{Path, PathBuf};
use std::sync::{Arc, Mutex};

use egui::{Context, RichText, Ui};

use super::inputs::{error_color, fmt_value};
use super::state::{PaperChoice, ThemeChoice};
use super::{Command, Gesture, GripApp, Pending, export, outputs};
use crate::design::{self, Design};
use crate::fit::{self, FitAim, FitOutcome, FitRequest, FitVar};
use crate::sheet::{self, Paper};
use crate::units::Quantity;

/// The safety cautions, shown in their own window and in short in the verdict panel.
pub const CAUTIONS: [&str; 6] = [
    "Bowed strips store spring energy. A strip that breaks, slips out of its clamp or is released suddenly can snap outward or fly: wear eye protection, keep hands clear, and release the actuator slowly.",
    "The end plates close on each other as the segment grips: they pinch fingers and cables. Never hold the segment by its strips or plates while it is being actuated.",
    "Work in pipes, ducts and vessels can be confined-space entry: follow your site's permit, gas testing, ventilation and rescue rules.",
    "A pipe may hold pressure, residues or flow. Isolate, vent and drain it before inserting or retrieving anything, and never rely on the segment to hold against pressure.",
    "Friction values and material data are typical figures, not guarantees: test the real strip in the real bore before relying on the grip.",
    "These results are a design aid only. Defer to local codes, standards and the judgement of a licensed professional engineer for anything that can hurt people or property.",
];

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum FileMode {
    Open,
    SaveAs,
}

struct FileBox {
    mode: FileMode,
    path: String,
    note: Option<String>,
}

/// The fitting helper's window: what to fit, the search running on its worker thread,
/// and the last answer with the design it was found for.
#[derive(Default)]
struct FitDialog {
    var: Option<FitVar>,
    aim: FitAim,
    /// The rounding step as typed, in the variable's unit (empty: no rounding).
    step: String,
    running: Option<FitJob>,
    result: Option<(Box<Design>, FitRequest, FitOutcome)>,
}

/// A search on its worker thread: the design it started from and where the answer comes.
struct FitJob {
    base: Box<Design>,
    request: FitRequest,
    answer: std::sync::mpsc::Receiver<FitOutcome>,
}

impl FitJob {
    /// Starts `request` on `base` on a thread of its own, so the window stays responsive.
    fn start(base: &Design, request: FitRequest, ctx: &Context) -> FitJob {
        let (send, answer) = std::sync::mpsc::channel();
        let design = base.clone();
        let ctx = ctx.clone();
        std::thread::spawn(move || {
            // The window may have been closed meanwhile; then nobody listens.
            let _ = send.send(fit::fit_with(&design, &request));
            ctx.request_repaint();
        });
        FitJob {
            base: Box::new(base.clone()),
            request,
            answer,
        }
    }
}

/// State of the small windows.
#[derive(Default)]
pub struct Dialogs {
    file_box: Option<FileBox>,
    pub show_cautions: bool,
    show_fit: bool,
    fit: FitDialog,
    show_export: bool,
    export_base: String,
    show_print: bool,
    /// What the last PNG export wrote, filled in by the screenshot callback.
    png_result: Arc<Mutex<Option<super::Status>>>,
    print_path: String,
    /// A sheet being written on a worker thread (the scatter and map pages take a while).
    print_job: Option<PrintJob>,
    /// The window should close now (the quit was confirmed).
    pub quit_requested: bool,
    /// The Help menu's windows.
    help: super::help::HelpWindows,
}

impl Dialogs {
    /// Opens the "open a design" window.
    pub fn open_open(&mut self, current: Option<&Path>) {
        let dir = current
            .and_then(Path::parent)
            .map(|p| p.display().to_string())
            .unwrap_or_default();
        let path = if dir.is_empty() {
            String::new()
        } else {
            format!("{dir}/")
        };
        self.file_box = Some(FileBox {
            mode: FileMode::Open,
            path,
            note: None,
        });
    }

    /// Opens the "save as" window, prefilled with the current file.
    pub fn open_save_as(&mut self, current: Option<&Path>) {
        let path = current.map_or_else(|| "untitled.ron".to_string(), |p| p.display().to_string());
        self.file_box = Some(FileBox {
            mode: FileMode::SaveAs,
            path,
            note: None,
        });
    }
}

/// The menu bar.
pub fn menu_bar_ui(app: &mut GripApp, ui: &mut Ui) {
    egui::Panel::top("menu").show(ui, |ui| {
        egui::MenuBar::new().ui(ui, |ui| {
            ui.menu_button("File", |ui| {
                if ui.button("New design            Ctrl+N").clicked() {
                    app.push(Command::New);
                }
                if ui.button("Open…                 Ctrl+O").clicked() {
                    app.dialogs.open_open(app.doc.path.as_deref());
                }
                if ui.button("Save                  Ctrl+S").clicked() {
                    app.push(Command::Save);
                }
                if ui.button("Save as…        Ctrl+Shift+S").clicked() {
                    app.dialogs.open_save_as(app.doc.path.as_deref());
                }
                super::bench::file_menu_ui(app, ui);
                ui.menu_button("Recent files", |ui| {
                    if app.session.recent.is_empty() {
                        ui.label("none yet");
                    }
                    for p in app.session.recent.clone() {
                        if ui.button(p.display().to_string()).clicked() {
                            app.push(Command::Open(p));
                        }
                    }
                });
                ui.separator();
                if ui.button("Quit                  Ctrl+Q").clicked() {
                    app.push(Command::Quit);
                }
            });
            ui.menu_button("Edit", |ui| {
                if ui
                    .add_enabled(
                        !app.doc.undo.is_empty() || app.doc.gesture_start.is_some(),
                        egui::Button::new("Undo   Ctrl+Z"),
                    )
                    .clicked()
                {
                    app.push(Command::Undo);
                }
                if ui
                    .add_enabled(!app.doc.redo.is_empty(), egui::Button::new("Redo   Ctrl+Y"))
                    .on_hover_text("Also Ctrl+Shift+Z")
                    .clicked()
                {
                    app.push(Command::Redo);
                }
            });
            ui.menu_button("Tools", |ui| {
                if ui.button("Fit one value…").clicked() {
                    app.dialogs.show_fit = true;
                }
                if ui
                    .button("Design map…")
                    .on_hover_text("Two inputs over a grid: where every check passes")
                    .clicked()
                {
                    app.map_view.open = true;
                }
                if ui
                    .button("Scatter…")
                    .on_hover_text("What the shop's tolerances do to every check")
                    .clicked()
                {
                    app.scatter_view.open = true;
                }
                if ui.button("Print sizing sheet…").clicked() {
                    app.dialogs.show_print = true;
                    app.dialogs.print_path = default_beside(app.doc.path.as_deref(), "pdf");
                }
                if ui.button("Export plots and tables…").clicked() {
                    app.dialogs.show_export = true;
                    let base = default_beside(app.doc.path.as_deref(), "ron");
                    app.dialogs.export_base = base.trim_end_matches(".ron").to_string();
                }
            });
            ui.menu_button("View", |ui| {
                for t in ThemeChoice::ALL {
                    if ui.radio(app.session.theme == t, t.label()).clicked() {
                        app.push(Command::SetTheme(t));
                    }
                }
                ui.separator();
                for u in crate::units::UnitSystem::ALL {
                    let label = format!("Units: {}", u.name());
                    if ui
                        .radio(app.session.units == u, label)
                        .on_hover_text(
                            "Units every number is shown, typed and printed in. The design file keeps millimetres, newtons and MPa.",
                        )
                        .clicked()
                    {
                        app.push(Command::SetUnits(u));
                    }
                }
            });
            let dialogs = &mut app.dialogs;
            super::help::help_menu_ui(&mut dialogs.help, &mut dialogs.show_cautions, ui);
        });
    });
}

/// `<design file>.<ext>` next to the design, or `untitled.<ext>` in the working directory.
fn default_beside(path: Option<&Path>, ext: &str) -> String {
    match path {
        Some(p) => p.with_extension(ext).display().to_string(),
        None => std::env::current_dir()
            .map(|d| d.join(format!("untitled.{ext}")).display().to_string())
            .unwrap_or_else(|_| format!("untitled.{ext}")),
    }
}

/// The status line.
pub fn status_bar_ui(app: &mut GripApp, ui: &mut Ui) {
    egui::Panel::bottom("status").show(ui, |ui| {
        ui.horizontal(|ui| {
            if app.doc.dirty {
                ui.label(RichText::new("* unsaved").strong()).on_hover_text(
                    "There are changes not yet saved; a recovery copy is kept every few seconds.",
                );
            }
            if let Some(s) = app.shown_status() {
                let text = RichText::new(&s.text);
                ui.label(if s.is_error {
                    text.color(error_color(ui))
                } else {
                    text
                });
            }
            ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
                if ui
                    .small_button("Safety cautions")
                    .on_hover_text("Hazards of building and using these segments")
                    .clicked()
                {
                    app.dialogs.show_cautions = true;
                }
                ui.label(
                    RichText::new("A design aid only: defer to local codes and licensed practice.")
                        .small(),
                );
            });
        });
    });
}

/// All windows, drawn over the panels.
pub fn windows(app: &mut GripApp, ctx: &Context) {
    let png = app
        .dialogs
        .png_result
        .lock()
        .ok()
        .and_then(|mut done| done.take());
    if let Some(status) = png {
        app.push(Command::Report(status));
    }
    file_window(app, ctx);
    guard_window(app, ctx);
    recovery_window(app, ctx);
    rewrite_window(app, ctx);
    fit_window(app, ctx);
    export_window(app, ctx);
    print_window(app, ctx);
    poll_print(app);
    let dialogs = &mut app.dialogs;
    super::help::help_windows(&mut dialogs.help, &mut dialogs.show_cautions, ctx);
    let mut open = app.dialogs.show_cautions;
    egui::Window::new("Safety cautions")
        .open(&mut open)
        .default_width(460.0)
        .show(ctx, |ui| {
            for c in CAUTIONS {
                ui.label(format!("• {c}"));
                ui.add_space(4.0);
            }
        });
    app.dialogs.show_cautions = open;
}

fn file_window(app: &mut GripApp, ctx: &Context) {
    let Some(mut fb) = app.dialogs.file_box.take() else {
        return;
    };
    let title = if fb.mode == FileMode::Open {
        "Open a design"
    } else {
        "Save the design as"
    };
    let mut keep = true;
    egui::Window::new(title).collapsible(false).show(ctx, |ui| {
        ui.horizontal(|ui| {
            let label = ui.label("Path");
            let resp = ui.add(egui::TextEdit::singleline(&mut fb.path).desired_width(380.0)).labelled_by(label.id).on_hover_text("Type the design file's path (.ron).");
            let enter = resp.lost_focus() && ui.input(|i| i.key_pressed(egui::Key::Enter));
            if enter {
                keep = !finish_file(app, &fb);
            }
        });
        if let Some(n) = &fb.note {
            ui.label(RichText::new(n).small());
        }
        ui.horizontal(|ui| {
            let go = if fb.mode == FileMode::Open { "Open" } else { "Save" };
            if ui.button(go).clicked() {
                keep = !finish_file(app, &fb);
            }
            if ui.button("Browse…").on_hover_text("Use the desktop's file dialog, if one is available.").clicked() {
                let picked = if app.system_dialogs {
                    let dialog = rfd::FileDialog::new().add_filter("bowgrip design", &["ron"]);
                    if fb.mode == FileMode::Open { dialog.pick_file() } else { dialog.save_file() }
                } else {
                    None
                };
                match picked {
                    Some(p) => {
                        fb.path = p.display().to_string();
                        keep = !finish_file(app, &fb);
                    }
                    None => fb.note = Some("No file dialog answered (none is available here, or it was closed): type the path above.".to_string()),
                }
            }
            if ui.button("Cancel").clicked() {
                keep = false;
            }
        });
    });
    if keep {
        app.dialogs.file_box = Some(fb);
    }
}

/// Records the open or save for the typed path; true when the window can close.
fn finish_file(app: &mut GripApp, fb: &FileBox) -> bool {
    let path = PathBuf::from(fb.path.trim());
    if fb.path.trim().is_empty() {
        return false;
    }
    match fb.mode {
        FileMode::Open => app.push(Command::Open(path)),
        FileMode::SaveAs => app.push(Command::SaveAs(path)),
    }
    true
}

fn guard_window(app: &mut GripApp, ctx: &Context) {
    let Some(pending) = app.guard.clone() else {
        return;
    };
    let what = match &pending {
        Pending::New => "starting a new design".to_string(),
        Pending::Open(p) => format!("opening {}", p.display()),
        Pending::Quit => "quitting".to_string(),
    };
    egui::Modal::new(egui::Id::unique("unsaved-changes")).show(ctx, |ui| {
        ui.heading("Unsaved changes");
        ui.label(format!(
            "{} has changes that are not saved. Discard them before {what}?",
            app.doc.file_label()
        ));
        ui.horizontal(|ui| {
            if let Some(path) = app.doc.path.clone() {
                if ui.button("Save, then continue").clicked() {
                    app.push(Command::SaveThen(path, pending.clone()));
                }
            } else if ui.button("Save as…").clicked() {
                app.push(Command::CancelPrompt);
                app.dialogs.open_save_as(None);
            }
            if ui.button("Discard changes").clicked() {
                app.push(Command::Discard(pending.clone()));
            }
            if ui.button("Cancel").clicked() {
                app.push(Command::CancelPrompt);
            }
        });
    });
}

fn recovery_window(app: &mut GripApp, ctx: &Context) {
    let Some(orphan) = &app.recovery_offer else {
        return;
    };
    let from = orphan.record.source.as_ref().map_or_else(
        || "an untitled design".to_string(),
        |p| p.display().to_string(),
    );
    let title: String = orphan
        .design
        .title
        .chars()
        .map(|c| if c.is_control() { ' ' } else { c })
        .collect();
    egui::Modal::new(egui::Id::unique("recovery")).show(ctx, |ui| {
        ui.heading("Recover unsaved work?");
        ui.label(format!(
            "A session that has ended left unsaved changes to {from} (\"{title}\"). A copy was kept. Restored, the work goes back to that file when you save it."
        ));
        ui.horizontal(|ui| {
            if ui.button("Restore it").clicked() {
                app.push(Command::Restore);
            }
            if ui.button("Discard the copy").clicked() {
                app.push(Command::DropRecovery);
            }
            if ui
                .button("Decide later")
                .on_hover_text("Keep the copy on disk and carry on; it is offered again at the next start.")
                .clicked()
            {
                app.push(Command::RecoveryLater);
            }
        });
    });
}

/// Asks before a save that writes the whole design over a file whose comments or layout
/// would go (the changed values could not be edited in place).
fn rewrite_window(app: &mut GripApp, ctx: &Context) {
    let Some((path, why, then)) = &app.rewrite_prompt else {
        return;
    };
    let (path, why, then) = (path.clone(), why.clone(), then.clone());
    egui::Modal::new(egui::Id::unique("rewrite-prompt")).show(ctx, |ui| {
        ui.heading("Rewrite the whole file?");
        ui.label(format!(
            "The changes cannot be written into {} value by value: {why}. Saving writes the whole design, and the file's comments and layout go.",
            path.display()
        ));
        ui.horizontal(|ui| {
            if ui.button("Save, rewriting the file").clicked() {
                app.push(Command::SaveRewriting(path.clone(), then.clone()));
            }
            if ui.button("Cancel").clicked() {
                app.push(Command::CancelPrompt);
            }
        });
    });
}

fn fit_window(app: &mut GripApp, ctx: &Context) {
    let mut open = app.dialogs.show_fit;
    // Over the plots, clear of the inputs it changes (left) and the checks (right).
    let at = ctx.content_rect().center_top() + egui::vec2(0.0, 60.0);
    egui::Window::new("Fit one value")
        .open(&mut open)
        .default_width(440.0)
        .pivot(egui::Align2::CENTER_TOP)
        .default_pos(at)
        .show(ctx, |ui| fit_ui(app, ui));
    app.dialogs.show_fit = open;
    if !open {
        // Closing drops a running search's answer (its thread ends on its own).
        app.dialogs.fit.running = None;
    }
}

fn fit_ui(app: &mut GripApp, ui: &mut Ui) {
    let dlg = &mut app.dialogs.fit;
    if let Some(job) = &dlg.running
        && let Ok(outcome) = job.answer.try_recv()
    {
        dlg.result = Some((job.base.clone(), job.request, outcome));
        dlg.running = None;
    }
    ui.label("Find a value of one input at which every check passes: where the segment just holds the load x safety factor at the largest bore, or the middle of the passing range.");
    let var = dlg.var.unwrap_or(FitVar::Thickness);
    // The values, and the step typed, in the display units; the search runs in mm.
    let u = super::units();
    let kind = |var: FitVar| match var {
        FitVar::Count => None,
        FitVar::Thickness => Some(Quantity::Thickness),
        _ => Some(Quantity::Length),
    };
    let q = kind(var);
    let unit = q.map_or(var.unit(), |q| u.unit(q));
    let show = move |var: FitVar, v: f64| match kind(var) {
        Some(Quantity::Thickness) if !u.is_metric() => {
            format!("{:.4}", u.to_display(Quantity::Thickness, v))
        }
        Some(q) => fmt_value(u.to_display(q, v)),
        None => fmt_value(v),
    };
    let busy = dlg.running.is_some();
    ui.add_enabled_ui(!busy, |ui| {
        ui.horizontal(|ui| {
            let label = ui.label("Vary");
            egui::ComboBox::from_id_salt("fit-var").selected_text(var.label()).show_ui(ui, |ui| {
                for v in FitVar::ALL {
                    if ui.selectable_label(v == var, v.label()).clicked() {
                        dlg.var = Some(v);
                        dlg.result = None;
                    }
                }
            }).response.labelled_by(label.id);
            ui.label(format!("now {} {unit}", show(var, var.get(&app.doc.design))));
        });
        ui.horizontal(|ui| {
            ui.label("Land");
            ui.radio_value(&mut dlg.aim, FitAim::HoldingEdge, "where it just holds")
                .on_hover_text("The value at which the holding margin at the largest bore is zero: the least material or stroke that works.");
            ui.radio_value(&mut dlg.aim, FitAim::Centre, "in the middle of the passing range")
                .on_hover_text("The middle of the range of values at which every check passes: the most room to either side.");
        });
        if var != FitVar::Count {
            ui.horizontal(|ui| {
                let label = ui.label("Round to");
                ui.add(egui::TextEdit::singleline(&mut dlg.step).desired_width(70.0).hint_text("none"))
                    .labelled_by(label.id)
                    .on_hover_text(if u.is_metric() {
                        "A step in mm (e.g. 0.01, or 0.05 for stock thicknesses): the value is rounded to the nearest multiple that still passes every check. Empty: no rounding."
                    } else {
                        "A step in inches (e.g. 0.001, or 0.0005 for stock thicknesses): the value is rounded to the nearest multiple that still passes every check. Empty: no rounding."
                    });
                ui.label(unit);
            });
        }
    });
    let step = dlg.step.trim();
    let parsed = if step.is_empty() || var == FitVar::Count {
        Ok(None)
    } else {
        match step.parse::<f64>() {
            Ok(v) if v.is_finite() && v > 0.0 => Ok(Some(q.map_or(v, |q| u.from_display(q, v)))),
            _ => Err(format!(
                "Round to: '{step}' is not a step above 0 {unit}; type e.g. {}, or leave it empty.",
                if u.is_metric() { "0.01" } else { "0.001" }
            )),
        }
    };
    if let Err(e) = &parsed {
        ui.label(RichText::new(e).color(error_color(ui)));
    }
    ui.horizontal(|ui| {
        if busy {
            ui.spinner();
            ui.label("Searching…");
            if ui.button("Cancel").clicked() {
                dlg.running = None;
            }
        } else if ui
            .add_enabled(parsed.is_ok(), egui::Button::new("Solve"))
            .clicked()
            && let Ok(step) = parsed
        {
            let request = FitRequest {
                var,
                aim: dlg.aim,
                step,
            };
            dlg.result = None;
            dlg.running = Some(FitJob::start(&app.doc.design, request, ui.ctx()));
        }
    });
    let Some((base, request, outcome)) = &dlg.result else {
        return;
    };
    let var = request.var;
    match outcome {
        FitOutcome::Found {
            value,
            design,
            passing,
            checks,
            unrounded,
        } => {
            ui.separator();
            let unit = kind(var).map_or(var.unit(), |q| u.unit(q));
            ui.label(format!(
                "{} = {} {unit}: every check passes (they pass from {} to {} {unit}).",
                var.label(),
                show(var, *value),
                show(var, passing.0),
                show(var, passing.1),
            ));
            if *unrounded {
                ui.label(
                    RichText::new(
                        "No multiple of the step passes every check; the value is unrounded.",
                    )
                    .color(error_color(ui)),
                );
            }
            ui.label(RichText::new("Margins at this value:").strong());
            egui::Grid::new("fit-margins")
                .num_columns(2)
                .striped(true)
                .show(ui, |ui| {
                    for c in checks {
                        ui.label(c.title());
                        ui.label(
                            c.margin_text_in(u)
                                .unwrap_or_else(|| "no margin".to_string()),
                        );
                        ui.end_row();
                    }
                });
            let current = **base == app.doc.design;
            if !current {
                ui.label(
                    RichText::new(
                        "The design has changed since this search: solve again to apply.",
                    )
                    .color(error_color(ui)),
                );
            }
            let design = design.clone();
            if ui
                .add_enabled(current, egui::Button::new("Apply"))
                .on_hover_text("Sets the value as one edit (Ctrl+Z undoes it).")
                .clicked()
            {
                app.push(Command::Edit(design, Gesture::Done));
                app.dialogs.fit.result = None;
            }
        }
        FitOutcome::Blocked(why) => {
            ui.label(RichText::new(u.prose(why)).color(error_color(ui)));
        }
    }
}

/// An export: button label, file ending, and the text to write.
type ExportJob<'a> = (&'static str, &'static str, Box<dyn Fn() -> String + 'a>);

/// The reference lines the app and the sheet draw on each plot, for its SVG export: the
/// operating stroke and the tolerance ends on the stroke-against-bore plot; the operating
/// stroke with the required holding force (forces) or the static and fatigue allowables
/// (stress). They span the curves' own range, so they never stretch the axes.
fn svg_references(
    a: &crate::analysis::Analysis,
    title: &str,
    curves: &[export::SvgSeries],
) -> Vec<export::SvgSeries> {
    let Some([x0, x1, y0, y1]) = export::span(curves) else {
        return Vec::new();
    };
    let seg = &a.segment;
    let op = a.nominal_operating_stroke_mm();
    let line = export::SvgSeries::reference;
    let mut out = Vec::new();
    if title.starts_with("Stroke against bore") {
        // The shaded areas the app and the sheet draw: the bore tolerance band over the
        // plot's height, and the usable strokes at each bore (between the holding curve and
        // the lowest of the stress limit, the model limit and the actuator maximum).
        if seg.bore_smallest_mm < x1 && seg.bore_largest_mm > x0 {
            let (b0, b1) = (seg.bore_smallest_mm.max(x0), seg.bore_largest_mm.min(x1));
            out.push(export::SvgSeries::area(
                "bore tolerance",
                "#6a6aa8",
                vec![vec![[b0, y0], [b1, y0], [b1, y1], [b0, y1]]],
            ));
        }
        let usable: Vec<Vec<[f64; 2]>> = a
            .usable_window_mm()
            .iter()
            .filter(|run| run.len() >= 2)
            .map(|run| {
                let low = run.iter().map(|p| [p[0], p[1].clamp(y0, y1)]);
                let high = run.iter().rev().map(|p| [p[0], p[2].clamp(y0, y1)]);
                low.chain(high).collect()
            })
            .collect();
        if !usable.is_empty() {
            out.push(export::SvgSeries::area("usable strokes", "#2e8b57", usable));
        }
        if let Some(op) = op.filter(|v| (y0..=y1).contains(v)) {
            out.push(line("operating stroke", "#444444", [x0, op], [x1, op]));
        }
        for (name, bore) in [
            ("smallest bore", seg.bore_smallest_mm),
            ("largest bore", seg.bore_largest_mm),
        ] {
            if (x0..=x1).contains(&bore) {
                out.push(line(name, "#6a6aa8", [bore, y0], [bore, y1]));
            }
        }
        return out;
    }
    if let Some(op) = op.filter(|v| (x0..=x1).contains(v)) {
        out.push(line("operating stroke", "#444444", [op, y0], [op, y1]));
    }
    let levels: Vec<(&str, f64, &str)> = if title.starts_with("Forces") {
        vec![(
            "load x safety factor",
            seg.required_holding_force_n(),
            "#2e8b57",
        )]
    } else {
        vec![
            ("static allowable", seg.static_allowable_mpa, "#c0392b"),
            ("fatigue allowable", seg.fatigue_allowable_mpa, "#8e44ad"),
        ]
    };
    for (name, v, color) in levels {
        if v.is_finite() && v <= 1.5 * y1 {
            out.push(line(name, color, [x0, v], [x1, v]));
        }
    }
    out
}

fn export_window(app: &mut GripApp, ctx: &Context) {
    let mut open = app.dialogs.show_export;
    let mut close_now = false;
    egui::Window::new("Export plots and tables")
        .open(&mut open)
        .default_width(460.0)
        .show(ctx, |ui| {
            ui.horizontal(|ui| {
                let label = ui.label("Files start with");
                ui.add(
                    egui::TextEdit::singleline(&mut app.dialogs.export_base).desired_width(320.0),
                )
                .labelled_by(label.id)
                .on_hover_text("Path prefix; each export adds its own ending.");
            });
            let Some(a) = app.analysis.as_ref() else {
                return;
            };
            let base = app.dialogs.export_base.trim().to_string();
            // The figures in the display units: the series are built in mm, N and MPa
            // and scaled once here, axis titles with them.
            let u = super::units();
            let svg = |title: &str,
                       (x, xq): (&str, Quantity),
                       (y, yq): (&str, Quantity),
                       curves: Vec<outputs::Curve>| {
                let mut series: Vec<_> = curves.iter().map(outputs::Curve::to_svg).collect();
                series.extend(svg_references(a, title, &series));
                let (fx, fy) = (u.from_display(xq, 1.0), u.from_display(yq, 1.0));
                for p in series.iter_mut().flat_map(|s| s.runs.iter_mut().flatten()) {
                    *p = [p[0] / fx, p[1] / fy];
                }
                let (x, y) = (
                    format!("{x}, {}", u.unit(xq)),
                    format!("{y}, {}", u.unit(yq)),
                );
                export::svg_chart(title, &x, &y, &series)
            };
            let jobs: [ExportJob<'_>; 5] = [
                (
                    "Stroke-bore plot (SVG)",
                    "-window.svg",
                    Box::new(|| {
                        svg(
                            "Stroke against bore",
                            ("bore diameter", Quantity::Length),
                            ("stroke", Quantity::Length),
                            outputs::window_curves(a),
                        )
                    }),
                ),
                (
                    "Force plot (SVG)",
                    "-forces.svg",
                    Box::new(|| {
                        svg(
                            "Forces against stroke, nominal bore",
                            ("stroke", Quantity::Length),
                            ("force", Quantity::Force),
                            outputs::force_curves(a),
                        )
                    }),
                ),
                (
                    "Stress plot (SVG)",
                    "-stress.svg",
                    Box::new(|| {
                        svg(
                            "Peak stress against stroke, nominal bore",
                            ("stroke", Quantity::Length),
                            ("stress", Quantity::Stress),
                            outputs::stress_curves(a),
                        )
                    }),
                ),
                (
                    "Force-stroke curve (CSV)",
                    "-curve.csv",
                    Box::new(|| u.csv_text(&export::curve_csv(&a.curve))),
                ),
                (
                    "Stroke-bore window (CSV)",
                    "-window.csv",
                    Box::new(|| u.csv_text(&export::window_csv(&a.window))),
                ),
            ];
            let mut report = Vec::new();
            let all = ui.button("Export all").clicked();
            for (label, ending, make) in &jobs {
                if ui.button(*label).clicked() || all {
                    let path = format!("{base}{ending}");
                    report.push(match crate::atomic::write(Path::new(&path), make().as_bytes()) {
                        Ok(()) => (format!("Wrote {path}."), false),
                        Err(e) => (format!("Could not write {path}: {e}"), true),
                    });
                }
            }
            // The jobs borrow the analysis; the report below goes through the app.
            drop(jobs);
            if !report.is_empty() {
                let failed = report.iter().any(|r| r.1);
                let text = report
                    .into_iter()
                    .map(|r| r.0)
                    .collect::<Vec<_>>()
                    .join(" ");
                app.push(Command::Report(super::Status {
                    text,
                    is_error: failed,
                }));
            }
            if ui
                .button("Plots as PNG (as on screen)")
                .on_hover_text("Closes this window, takes a screenshot of the next frame and cuts each plot out of it.")
                .clicked()
            {
                request_pngs(app.plot_rects, Arc::clone(&app.dialogs.png_result), ctx, &base);
                close_now = true;
            }
        });
    app.dialogs.show_export = open && !close_now;
}

/// Asks for a screenshot of the next frame; its callback cuts out the three plots and
/// writes them as `<base>-window.png`, `-forces.png`, `-stress.png`.
fn request_pngs(
    rects: [Option<egui::Rect>; 3],
    result: Arc<Mutex<Option<super::Status>>>,
    ctx: &Context,
    base: &str,
) {
    let targets: Vec<(String, egui::Rect)> = ["-window.png", "-forces.png", "-stress.png"]
        .iter()
        .zip(rects)
        .filter_map(|(ending, rect)| rect.map(|r| (format!("{base}{ending}"), r)))
        .collect();
    let ppp = ctx.pixels_per_point();
    let repaint = ctx.clone();
    ctx.request_screenshot(move |image| {
        let mut lines = Vec::new();
        let mut failed = false;
        for (path, rect) in targets {
            let written = crop_png(&image, rect, ppp)
                .ok_or_else(|| "the plot is not on screen".to_string())
                .and_then(|png| {
                    crate::atomic::write(Path::new(&path), &png).map_err(|e| e.to_string())
                });
            match written {
                Ok(()) => lines.push(format!("Wrote {path}.")),
                Err(e) => {
                    failed = true;
                    lines.push(format!("Could not write {path}: {e}"));
                }
            }
        }
        if let Ok(mut slot) = result.lock() {
            *slot = Some(super::Status {
                text: lines.join(" "),
                is_error: failed,
            });
        }
        repaint.request_repaint();
    });
}

/// The part of a screenshot under `rect` (in points) as PNG bytes; `None` when the rect
/// lies outside the image or the encoder refuses the pixels.
fn crop_png(image: &egui::ColorImage, rect: egui::Rect, ppp: f32) -> Option<Vec<u8>> {
    let [w, h] = image.size;
    let px = |v: f32, limit: usize| ((v * ppp).max(0.0) as usize).min(limit);
    let (x0, x1) = (px(rect.min.x, w), px(rect.max.x, w));
    let (y0, y1) = (px(rect.min.y, h), px(rect.max.y, h));
    if x1 <= x0 || y1 <= y0 || image.pixels.len() < w * h {
        return None;
    }
    let mut rgba = Vec::with_capacity((x1 - x0) * (y1 - y0) * 4);
    for y in y0..y1 {
        for p in &image.pixels[y * w + x0..y * w + x1] {
            rgba.extend_from_slice(&p.to_array());
        }
    }
    export::png_rgba((x1 - x0) as u32, (y1 - y0) as u32, &rgba).ok()
}

fn print_window(app: &mut GripApp, ctx: &Context) {
    let mut open = app.dialogs.show_print;
    egui::Window::new("Print sizing sheet").open(&mut open).default_width(460.0).show(ctx, |ui| {
        ui.horizontal(|ui| {
            ui.label("Paper");
            for (p, name) in [(PaperChoice::A4, "A4"), (PaperChoice::Letter, "Letter")] {
                if ui.radio(app.session.paper == p, name).clicked() {
                    app.push(Command::SetPaper(p));
                }
            }
        });
        ui.horizontal(|ui| {
            let label = ui.label("PDF path");
            ui.add(egui::TextEdit::singleline(&mut app.dialogs.print_path).desired_width(340.0)).labelled_by(label.id).on_hover_text("Where the sheet is written; by default next to the design file.");
        });
        let busy = app.dialogs.print_job.is_some();
        if ui
            .add_enabled(!busy, egui::Button::new("Write the sheet"))
            .on_hover_text("Lays out and writes the PDF in the background; the design stays editable meanwhile (the sheet shows the design as it was when you asked).")
            .clicked()
        {
            print_sheet(app, ctx);
        }
        if let Some(job) = &app.dialogs.print_job {
            ui.horizontal(|ui| {
                ui.spinner();
                ui.label(format!("Writing the sheet to {}…", job.path.display()));
            });
        }
        if app.map_view.sheet_options().map.is_some() {
            ui.label(RichText::new("The design map is open: the sheet adds a page with its map.").small());
        }
        ui.label(RichText::new("The sheet carries the same safety cautions; it is a design aid, not an approval.").small());
    });
    app.dialogs.show_print = open;
}

/// A sheet being laid out and written on a worker thread.
struct PrintJob {
    /// Where it goes.
    path: PathBuf,
    /// The outcome: `Ok` once written, or what went wrong in words.
    done: std::sync::mpsc::Receiver<Result<(), String>>,
}

/// Takes the outcome of a finished print job into the status line.
fn poll_print(app: &mut GripApp) {
    let Some(job) = &app.dialogs.print_job else {
        return;
    };
    let outcome = match job.done.try_recv() {
        Ok(outcome) => outcome,
        Err(std::sync::mpsc::TryRecvError::Empty) => return,
        Err(std::sync::mpsc::TryRecvError::Disconnected) => {
            Err("The sizing sheet could not be made: its worker stopped".to_string())
        }
    };
    let path = job.path.clone();
    app.dialogs.print_job = None;
    match outcome {
        Err(e) => app.fail(e),
        Ok(()) => {
            let opened = app.system_dialogs
                && std::process::Command::new("xdg-open")
                    .arg(&path)
                    .spawn()
                    .is_ok();
            app.say(format!(
                "Sizing sheet written to {}{}.",
                path.display(),
                if opened { " and opened" } else { "" }
            ));
        }
    }
}

/// Starts writing the sheet of the design as it is now on a worker thread; the outcome
/// reaches the status line through [`poll_print`].
fn print_sheet(app: &mut GripApp, ctx: &Context) {
    let path = PathBuf::from(app.dialogs.print_path.trim());
    let label = app.doc.file_label();
    // The bytes the sheet hashes: the saved file when it is up to date, else the design as it would be saved.
    let saved = match (&app.doc.path, app.doc.dirty) {
        (Some(p), false) => design::read_bytes(p).ok(),
        _ => None,
    };
    let bytes = match saved.map_or_else(
        || design::to_ron(&app.doc.design).map(String::into_bytes),
        Ok,
    ) {
        Ok(bytes) => bytes,
        Err(e) => {
            app.fail(format!("The sizing sheet could not be made: {e}"));
            return;
        }
    };
    let paper = match app.session.paper {
        PaperChoice::A4 => Paper::A4,
        PaperChoice::Letter => Paper::Letter,
    };
    // With the design map open, the sheet carries its page.
    let options = sheet::SheetOptions {
        units: app.session.units,
        ..app.map_view.sheet_options()
    };
    let design = app.doc.design.clone();
    let (tx, rx) = std::sync::mpsc::channel();
    let (to, ctx) = (path.clone(), ctx.clone());
    let spawned = std::thread::Builder::new()
        .name("bowgrip-sheet".to_string())
        .spawn(move || {
            let outcome = match sheet::render_with(&design, &label, &bytes, paper, None, &options) {
                Err(e) => Err(format!("The sizing sheet could not be made: {e}")),
                Ok(pdf) => crate::atomic::write(&to, &pdf)
                    .map_err(|e| format!("Could not write the sheet to {}: {e}", to.display())),
            };
            let _ = tx.send(outcome);
            ctx.request_repaint();
        });
    match spawned {
        Ok(_) => app.dialogs.print_job = Some(PrintJob { path, done: rx }),
        Err(e) => app.fail(format!(
            "The sizing sheet could not be made: no worker thread ({e})"
        )),
    }
}

#[cfg(test)]
mod svg_reference_tests {
    use super::{export, outputs, svg_references};

    /// The exported plots carry the sheet's reference lines, dashed: the operating stroke
    /// at the analysis' own value and the required holding force on the force plot; the
    /// tolerance ends on the stroke-against-bore plot; both allowables on the stress plot.
    #[test]
    fn exported_plots_carry_the_reference_lines() {
        let a = crate::analysis::analyse(&crate::design::Design::default()).expect("analyses");
        let op = a
            .nominal_operating_stroke_mm()
            .expect("an operating stroke");
        let svg = |title: &str, curves: Vec<outputs::Curve>| {
            let series: Vec<_> = curves.iter().map(outputs::Curve::to_svg).collect();
            let refs = svg_references(&a, title, &series);
            let names: Vec<String> = refs.iter().map(|r| r.name.clone()).collect();
            assert!(refs.iter().all(|r| r.dashed != r.shaded));
            (refs, names)
        };
        let (refs, names) = svg(
            "Forces against stroke, nominal bore",
            outputs::force_curves(&a),
        );
        assert_eq!(names, ["operating stroke", "load x safety factor"]);
        assert_eq!(refs[0].runs[0][0][0], op);
        assert_eq!(refs[1].runs[0][0][1], a.segment.required_holding_force_n());
        let (refs, names) = svg("Stroke against bore", outputs::window_curves(&a));
        assert_eq!(
            names,
            [
                "bore tolerance",
                "usable strokes",
                "operating stroke",
                "smallest bore",
                "largest bore"
            ]
        );
        // The band spans the tolerance; the usable area's outline runs along the lower
        // ends of the usable window and back along its upper ends (the same numbers the
        // app's plot and the sheet shade).
        let band = &refs[0].runs[0];
        assert_eq!(band[0][0], a.segment.bore_smallest_mm);
        assert_eq!(band[1][0], a.segment.bore_largest_mm);
        let window = a.usable_window_mm();
        let run = window.iter().find(|r| r.len() >= 2).expect("a usable run");
        let outline = &refs[1].runs[0];
        assert_eq!(outline.len(), 2 * run.len());
        assert_eq!(outline[0], [run[0][0], run[0][1]]);
        let last = run[run.len() - 1];
        assert_eq!(outline[run.len()], [last[0], last[2]]);
        let chart = export::svg_chart("t", "x", "y", &refs);
        assert_eq!(chart.matches("<polygon").count(), 1 + window.len());
        // Pale solid fills a quarter of the way from white: #6a6aa8 -> #dadae9.
        assert!(chart.contains(r##"<polygon fill="#dadae9""##));
        let (_, names) = svg("Peak stress against stroke", outputs::stress_curves(&a));
        assert!(names.contains(&"static allowable".to_string()));
        let chart = export::svg_chart("t", "x", "y", &refs);
        assert!(chart.contains("stroke-dasharray"));
    }
}
