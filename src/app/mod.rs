//! The desktop app: one window where a designer edits a segment design and sees, live,
//! the stroke-against-bore window, the force-stroke curve, the strip at the operating
//! stroke to scale, and the checks. A thin front end over [`crate::analysis`].
//!
//! Structure: [`GripApp`] holds the open document (design, file, undo history) and the
//! cached [`Analysis`]; panels draw from it and record [`Command`]s; after drawing,
//! [`GripApp::apply`] is the one place that changes the document, marks it dirty, pushes
//! undo steps and re-analyses (once per change, never per frame). [`GripApp::ui`] serves
//! both eframe and the kittest tests.

mod bench;
mod dialogs;
mod drive;
pub mod export;
mod help;
mod inputs;
pub mod map_view;
mod outputs;
pub mod scatter_view;
pub mod state;
pub mod strips;

use std::path::{Path, PathBuf};

use crate::analysis::{self, Analysis};
use crate::design::{self, Design};

pub use state::{Orphan, Recovery, Session, Slot, ThemeChoice};

thread_local! {
    /// The units the app shows numbers in, set from the session at the start of every
    /// frame (the app draws on one thread), so every panel and window reads one choice.
    static UNITS: std::cell::Cell<crate::units::UnitSystem> =
        const { std::cell::Cell::new(crate::units::UnitSystem::Metric) };
}

/// The units the app shows numbers in.
pub fn units() -> crate::units::UnitSystem {
    UNITS.with(std::cell::Cell::get)
}

fn set_units(units: crate::units::UnitSystem) {
    UNITS.with(|u| u.set(units));
}

/// Seconds between recovery writes while the design has unsaved changes.
pub const AUTOSAVE_SECONDS: f64 = 3.0;
/// Undo steps kept.
const UNDO_DEPTH: usize = 200;

/// Whether an edit is part of an ongoing gesture (a slider drag, typing) or complete.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Gesture {
    /// More of the same gesture follows; one undo step covers it all.
    Ongoing,
    /// The edit is complete.
    Done,
}

/// Something the user asked for; applied after drawing by [`GripApp::apply`].
#[derive(Clone, Debug)]
pub enum Command {
    /// Replace the design (an input changed).
    Edit(Box<Design>, Gesture),
    /// The ongoing gesture ended (drag released, field left).
    EndGesture,
    Undo,
    Redo,
    /// Start a new design (asks first when there are unsaved changes).
    New,
    /// Open a file (asks first when there are unsaved changes).
    Open(PathBuf),
    /// Save to the current file, or ask for a path when there is none.
    Save,
    /// Save to this path and make it the current file.
    SaveAs(PathBuf),
    /// Save to this path and, only if that worked, carry out the held-back action.
    SaveThen(PathBuf, Pending),
    /// Quit (asks first when there are unsaved changes).
    Quit,
    /// Carry out an action the unsaved-changes prompt held back, discarding the changes.
    Discard(Pending),
    /// Take the recovery copy offered at start.
    Restore,
    /// Drop the recovery copy offered at start.
    DropRecovery,
    /// Answer the recovery offer later: the copy stays on disk for the next start.
    RecoveryLater,
    /// Save to this path writing the whole design (the file's comments and layout go),
    /// after the user agreed to that; then carry out the held-back action, if any.
    SaveRewriting(PathBuf, Option<Pending>),
    /// Open the safety cautions window.
    ShowCautions,
    /// Use this colour theme (kept in the session).
    SetTheme(ThemeChoice),
    /// Print sheets on this paper (kept in the session).
    SetPaper(state::PaperChoice),
    /// Show numbers in these units (kept in the session; not a design edit).
    SetUnits(crate::units::UnitSystem),
    /// Show this on the status line.
    Report(Status),
    /// Close the unsaved-changes or the rewrite prompt without acting.
    CancelPrompt,
}

/// An action held back by the unsaved-changes prompt.
#[derive(Clone, Debug, PartialEq)]
pub enum Pending {
    New,
    Open(PathBuf),
    Quit,
}

/// A message for the status line.
#[derive(Clone, Debug, PartialEq)]
pub struct Status {
    /// The text.
    pub text: String,
    /// Whether it reports a failure.
    pub is_error: bool,
}

/// The open design and its history.
#[derive(Clone, Debug)]
struct Document {
    design: Design,
    /// The file, absolute and resolved.
    path: Option<PathBuf>,
    /// The file's text as last opened or saved: a save edits its values in place, so the
    /// file's comments and layout stay.
    text: Option<String>,
    dirty: bool,
    /// The design as last opened or saved; `None` when it is not on disk (restored work).
    saved: Option<Design>,
    undo: Vec<Design>,
    redo: Vec<Design>,
    /// The design before the ongoing gesture began.
    gesture_start: Option<Design>,
}

impl Document {
    fn new(design: Design, path: Option<PathBuf>, text: Option<String>) -> Document {
        Document {
            saved: Some(design.clone()),
            design,
            path,
            text,
            dirty: false,
            undo: Vec::new(),
            redo: Vec::new(),
            gesture_start: None,
        }
    }

    /// Unsaved when the design differs from what was last opened or saved.
    fn refresh_dirty(&mut self) {
        self.dirty = self.saved.as_ref() != Some(&self.design);
    }

    fn push_undo(&mut self, before: Design) {
        if before != self.design {
            self.undo.push(before);
            if self.undo.len() > UNDO_DEPTH {
                self.undo.remove(0);
            }
            self.redo.clear();
        }
    }

    fn file_label(&self) -> String {
        self.path.as_deref().and_then(Path::file_name).map_or_else(
            || "untitled".to_string(),
            |n| n.to_string_lossy().into_owned(),
        )
    }
}

/// The app. Create with [`GripApp::new`]; draw with [`GripApp::ui`].
pub struct GripApp {
    doc: Document,
    /// Analysis of the last design that validated.
    analysis: Option<Analysis>,
    /// Why the current design could not be analysed (the last good analysis stays shown).
    analysis_error: Option<String>,
    state_dir: PathBuf,
    session: Session,
    status: Option<Status>,
    commands: Vec<Command>,
    /// This instance's recovery copy (none when the state folder cannot hold one).
    slot: Option<Slot>,
    /// A copy left by an instance that is gone, waiting for an answer (held locked).
    recovery_offer: Option<Orphan>,
    /// A save that would rewrite the whole file, waiting for the user's yes: the path,
    /// why the values cannot be edited in place, and the action held back behind it.
    rewrite_prompt: Option<(PathBuf, String, Option<Pending>)>,
    /// Unsaved-changes prompt.
    guard: Option<Pending>,
    quit_confirmed: bool,
    /// The status line reports a save: it goes as soon as the design differs from the
    /// saved one, so "unsaved" never stands beside "Saved".
    status_is_save: bool,
    system_dialogs: bool,
    last_recovery_write_s: Option<f64>,
    sent_title: String,
    applied_theme: Option<ThemeChoice>,
    /// Where the three plots were drawn last frame (stroke-bore, force, stress), for PNG export.
    plot_rects: [Option<egui::Rect>; 3],
    inputs: inputs::InputsPanel,
    dialogs: dialogs::Dialogs,
    /// Load sharing, computed on a worker thread.
    sharing: strips::SharingWork,
    map_view: map_view::MapView,
    scatter_view: scatter_view::ScatterView,
    /// Bench measurements and the calibration fit.
    bench: bench::BenchPanel,
}

impl GripApp {
    /// The app with its state in `state_dir`, on `file` when given (else on the last
    /// session's file, else on the built-in demo). A file that does not load leaves the
    /// demo open with the reason in the status line. A recovery copy left by a crash is
    /// offered, not applied.
    pub fn new(state_dir: PathBuf, file: Option<PathBuf>) -> GripApp {
        let session = Session::load(&state_dir);
        // Our own slot first, so no other instance takes our copy for a dead one's.
        let slot = Slot::claim(&state_dir);
        let mut unreadable = Vec::new();
        let mut recovery_offer = None;
        for found in state::orphans(&state_dir) {
            match found {
                // One at a time; the others stay on disk (unlocked) for the next start.
                Ok(orphan) if recovery_offer.is_none() => recovery_offer = Some(orphan),
                Ok(other) => other.release(),
                Err(why) => unreadable.push(why),
            }
        }
        let mut app = GripApp {
            doc: Document::new(Design::default(), None, None),
            analysis: None,
            analysis_error: None,
            state_dir,
            session,
            status: None,
            commands: Vec::new(),
            slot: None,
            recovery_offer,
            rewrite_prompt: None,
            guard: None,
            quit_confirmed: false,
            status_is_save: false,
            system_dialogs: false,
            last_recovery_write_s: None,
            sent_title: String::new(),
            applied_theme: None,
            plot_rects: [None; 3],
            inputs: inputs::InputsPanel::default(),
            dialogs: dialogs::Dialogs::default(),
            sharing: strips::SharingWork::default(),
            map_view: map_view::MapView::default(),
            scatter_view: scatter_view::ScatterView::default(),
            bench: bench::BenchPanel::default(),
        };
        let start = file.or_else(|| app.session.last_file.clone().filter(|p| p.is_file()));
        if let Some(path) = start {
            app.open_now(&path);
        }
        match slot {
            Ok(slot) => app.slot = Some(slot),
            Err(e) => app.fail(format!(
                "No recovery copy can be kept in {}: {e}",
                app.state_dir.display()
            )),
        }
        if !unreadable.is_empty() {
            app.fail(format!(
                "A recovery copy was found but cannot be used (it stays on disk): {}",
                unreadable.join("; ")
            ));
        }
        app.reanalyse();
        app
    }

    /// Blocks until the load-sharing results of the shown design are in (the app itself
    /// never waits: it shows the centred results and takes these when they arrive). For
    /// tests.
    pub fn wait_for_load_sharing(&mut self) {
        strips::wait(self);
    }

    /// Lets Open and Save As try the desktop's file dialog first (the typed path field
    /// is always there as well). Off by default, so tests never block on a dialog.
    pub fn with_system_dialogs(mut self, on: bool) -> GripApp {
        self.system_dialogs = on;
        self
    }

    /// The design being edited.
    pub fn design(&self) -> &Design {
        &self.doc.design
    }

    /// The analysis on show (of the last design that validated).
    pub fn analysis(&self) -> Option<&Analysis> {
        self.analysis.as_ref()
    }

    /// Why the design as edited could not be analysed, if it could not.
    pub fn analysis_error(&self) -> Option<&str> {
        self.analysis_error.as_deref()
    }

    /// The design file, if any.
    pub fn path(&self) -> Option<&Path> {
        self.doc.path.as_deref()
    }

    /// Whether there are unsaved changes.
    pub fn is_dirty(&self) -> bool {
        self.doc.dirty
    }

    /// The status line's message as shown: a save report is withdrawn once the design has
    /// changed again.
    pub fn shown_status(&self) -> Option<&Status> {
        self.status
            .as_ref()
            .filter(|_| !(self.status_is_save && self.doc.dirty))
    }

    /// The status line's message.
    pub fn status(&self) -> Option<&Status> {
        self.status.as_ref()
    }

    /// Whether the unsaved-changes prompt is up.
    pub fn is_asking_to_discard(&self) -> bool {
        self.guard.is_some()
    }

    /// Whether quitting was confirmed (the window closes next).
    pub fn is_quitting(&self) -> bool {
        self.quit_confirmed
    }

    /// Whether a recovery copy is being offered.
    pub fn is_offering_recovery(&self) -> bool {
        self.recovery_offer.is_some()
    }

    /// The file the offered recovery copy belongs to, if it had one.
    pub fn recovery_source(&self) -> Option<&Path> {
        self.recovery_offer
            .as_ref()
            .and_then(|o| o.record.source.as_deref())
    }

    /// Whether the app is asking before a save that rewrites the whole file.
    pub fn is_asking_to_rewrite(&self) -> bool {
        self.rewrite_prompt.is_some()
    }

    /// This instance's recovery copy file, if it keeps one.
    pub fn recovery_path(&self) -> Option<&Path> {
        self.slot.as_ref().map(Slot::path)
    }

    /// The session as it stands.
    pub fn session(&self) -> &Session {
        &self.session
    }

    /// The design map window (open it with `map_view_mut().open = true`).
    pub fn map_view(&self) -> &map_view::MapView {
        &self.map_view
    }

    /// The design map window, to open it or set its axes.
    pub fn map_view_mut(&mut self) -> &mut map_view::MapView {
        &mut self.map_view
    }

    /// The scatter window (open it with `scatter_view_mut().open = true`).
    pub fn scatter_view(&self) -> &scatter_view::ScatterView {
        &self.scatter_view
    }

    /// The scatter window, to open it.
    pub fn scatter_view_mut(&mut self) -> &mut scatter_view::ScatterView {
        &mut self.scatter_view
    }

    /// Where the three plots were drawn in the last frame (stroke against bore, forces,
    /// stress), points; `None` before the first frame.
    pub fn plot_rects(&self) -> [Option<egui::Rect>; 3] {
        self.plot_rects
    }

    /// The state directory.
    pub fn state_dir(&self) -> &Path {
        &self.state_dir
    }

    /// Records a command to apply after this frame (or now, from tests: call
    /// [`GripApp::apply`] afterwards).
    pub fn push(&mut self, command: Command) {
        self.commands.push(command);
    }

    /// The window title: program, file, and a mark when there are unsaved changes.
    pub fn title(&self) -> String {
        let mark = if self.doc.dirty { " (unsaved)" } else { "" };
        format!("bowgrip: {}{mark}", self.doc.file_label())
    }

    /// Draws everything and applies what the user asked for.
    pub fn ui(&mut self, ui: &mut egui::Ui) {
        let ctx = ui.ctx().clone();
        set_units(self.session.units);
        if self.applied_theme != Some(self.session.theme) {
            ctx.set_theme(match self.session.theme {
                ThemeChoice::System => egui::ThemePreference::System,
                ThemeChoice::Light => egui::ThemePreference::Light,
                ThemeChoice::Dark => egui::ThemePreference::Dark,
            });
            self.applied_theme = Some(self.session.theme);
        }
        strips::poll_ui(self, &ctx);
        self.shortcuts(&ctx);
        self.close_guard(&ctx);
        dialogs::menu_bar_ui(self, ui);
        dialogs::status_bar_ui(self, ui);
        egui::Panel::left("inputs")
            .resizable(true)
            .default_size(390.0)
            .min_size(300.0)
            .show(ui, |ui| {
                let cmds = self.inputs.ui(ui, &self.doc.design, self.analysis.as_ref());
                self.commands.extend(cmds);
            });
        egui::Panel::right("verdict")
            .resizable(true)
            .default_size(330.0)
            .min_size(240.0)
            .show(ui, |ui| outputs::verdict_ui(self, ui));
        egui::CentralPanel::default().show(ui, |ui| outputs::results_ui(self, ui));
        dialogs::windows(self, &ctx);
        map_view::window(self, &ctx);
        scatter_view::window(self, &ctx);
        bench::windows(self, &ctx);
        bench::take_dropped(self, &ctx);
        self.apply();
        self.autosave(&ctx);
        let title = self.title();
        if title != self.sent_title {
            ctx.send_viewport_cmd(egui::ViewportCommand::Title(title.clone()));
            self.sent_title = title;
        }
    }

    fn shortcuts(&mut self, ctx: &egui::Context) {
        type Action = fn(&mut GripApp);
        use egui::{Key, KeyboardShortcut, Modifiers};
        let shift = Modifiers::COMMAND | Modifiers::SHIFT;
        // Most specific first: Ctrl+Shift+S before Ctrl+S, Ctrl+Shift+Z before Ctrl+Z.
        let table: [(KeyboardShortcut, Action); 8] = [
            (KeyboardShortcut::new(shift, Key::S), |a| {
                a.dialogs.open_save_as(a.doc.path.as_deref())
            }),
            (KeyboardShortcut::new(shift, Key::Z), |a| {
                a.push(Command::Redo)
            }),
            (KeyboardShortcut::new(Modifiers::COMMAND, Key::Q), |a| {
                a.push(Command::Quit)
            }),
            (KeyboardShortcut::new(Modifiers::COMMAND, Key::S), |a| {
                a.push(Command::Save)
            }),
            (KeyboardShortcut::new(Modifiers::COMMAND, Key::N), |a| {
                a.push(Command::New)
            }),
            (KeyboardShortcut::new(Modifiers::COMMAND, Key::O), |a| {
                a.dialogs.open_open(a.doc.path.as_deref())
            }),
            (KeyboardShortcut::new(Modifiers::COMMAND, Key::Z), |a| {
                a.push(Command::Undo)
            }),
            (KeyboardShortcut::new(Modifiers::COMMAND, Key::Y), |a| {
                a.push(Command::Redo)
            }),
        ];
        for (shortcut, action) in table {
            if ctx.input_mut(|i| i.consume_shortcut(&shortcut)) {
                action(self);
            }
        }
    }

    fn close_guard(&mut self, ctx: &egui::Context) {
        if ctx.input(|i| i.viewport().close_requested()) && !self.quit_confirmed && self.doc.dirty {
            ctx.send_viewport_cmd(egui::ViewportCommand::CancelClose);
            self.guard = Some(Pending::Quit);
        }
    }

    /// Applies the recorded commands: the one place that changes the document.
    pub fn apply(&mut self) {
        let commands = std::mem::take(&mut self.commands);
        let mut changed = false;
        for command in commands {
            changed |= self.apply_one(command);
        }
        if changed {
            self.reanalyse();
        }
    }

    fn apply_one(&mut self, command: Command) -> bool {
        match command {
            Command::Edit(design, gesture) => {
                if *design == self.doc.design && gesture == Gesture::Ongoing {
                    return false;
                }
                let before = self
                    .doc
                    .gesture_start
                    .take()
                    .unwrap_or_else(|| self.doc.design.clone());
                let changed = *design != self.doc.design;
                self.doc.design = *design;
                match gesture {
                    Gesture::Ongoing => self.doc.gesture_start = Some(before),
                    Gesture::Done => self.doc.push_undo(before),
                }
                self.doc.refresh_dirty();
                changed
            }
            Command::EndGesture => {
                if let Some(before) = self.doc.gesture_start.take() {
                    self.doc.push_undo(before);
                }
                false
            }
            Command::Undo => self.step_history(true),
            Command::Redo => self.step_history(false),
            Command::New => self.guarded(Pending::New),
            Command::Open(path) => self.guarded(Pending::Open(path)),
            Command::Quit => self.guarded(Pending::Quit),
            Command::Discard(pending) => {
                self.guard = None;
                self.carry_out(pending)
            }
            Command::Save => match self.doc.path.clone() {
                Some(path) => {
                    self.save_now(&path, None);
                    false
                }
                None => {
                    self.dialogs.open_save_as(None);
                    false
                }
            },
            Command::SaveAs(path) => {
                self.save_now(&path, None);
                false
            }
            Command::SaveThen(path, pending) => {
                self.guard = None;
                self.save_now(&path, Some(pending.clone()));
                !self.doc.dirty && self.carry_out(pending)
            }
            Command::SaveRewriting(path, pending) => {
                self.rewrite_prompt = None;
                self.write_design(&path, None);
                match pending {
                    Some(p) if !self.doc.dirty => self.carry_out(p),
                    _ => false,
                }
            }
            Command::Restore => match self.recovery_offer.take() {
                Some(orphan) => self.restore(orphan),
                None => false,
            },
            Command::DropRecovery => {
                if let Some(orphan) = self.recovery_offer.take() {
                    orphan.remove();
                }
                false
            }
            Command::ShowCautions => {
                self.dialogs.show_cautions = true;
                false
            }
            Command::SetTheme(theme) => {
                self.session.theme = theme;
                self.store_session();
                false
            }
            Command::SetPaper(paper) => {
                self.session.paper = paper;
                false
            }
            Command::SetUnits(units) => {
                self.session.units = units;
                set_units(units);
                // Typed and refused entries were in the other units.
                self.inputs.forget_entries();
                self.store_session();
                false
            }
            Command::Report(status) => {
                self.status = Some(status);
                false
            }
            Command::CancelPrompt => {
                self.guard = None;
                self.rewrite_prompt = None;
                false
            }
            Command::RecoveryLater => {
                if let Some(orphan) = self.recovery_offer.take() {
                    let kept = orphan.path.display().to_string();
                    orphan.release();
                    self.say(format!(
                        "The recovery copy stays on disk ({kept}); it is offered again at the next start."
                    ));
                }
                false
            }
        }
    }

    fn step_history(&mut self, back: bool) -> bool {
        // A gesture still open is closed first so it can be undone as a whole.
        if let Some(before) = self.doc.gesture_start.take() {
            self.doc.push_undo(before);
        }
        let (from, to) = if back {
            (&mut self.doc.undo, &mut self.doc.redo)
        } else {
            (&mut self.doc.redo, &mut self.doc.undo)
        };
        match from.pop() {
            Some(design) => {
                to.push(std::mem::replace(&mut self.doc.design, design));
                self.doc.refresh_dirty();
                self.inputs.forget_entries();
                true
            }
            None => false,
        }
    }

    fn guarded(&mut self, pending: Pending) -> bool {
        if self.doc.dirty && !(pending == Pending::Quit && self.quit_confirmed) {
            self.guard = Some(pending);
            false
        } else {
            self.carry_out(pending)
        }
    }

    fn carry_out(&mut self, pending: Pending) -> bool {
        match pending {
            Pending::New => {
                self.doc = Document::new(Design::default(), None, None);
                self.inputs = inputs::InputsPanel::default();
                self.clear_own_copy();
                self.say("New design (the built-in demo).".to_string());
                true
            }
            Pending::Open(path) => self.open_now(&path),
            Pending::Quit => {
                self.quit_confirmed = true;
                self.dialogs.quit_requested = true;
                false
            }
        }
    }

    /// Takes the work in a dead instance's copy into the document, on the file the copy
    /// came from; the copy goes only once this instance's own copy holds the work.
    fn restore(&mut self, orphan: Orphan) -> bool {
        let source = orphan.record.source.clone();
        let text = source.as_deref().and_then(|p| design::read_text(p).ok());
        self.doc = Document::new(orphan.design.clone(), source.clone(), text);
        self.doc.saved = None;
        self.doc.dirty = true;
        self.inputs = inputs::InputsPanel::default();
        let kept = self.slot.as_ref().map(|slot| {
            slot.store(self.doc.path.as_deref(), &self.doc.design)
                .map_err(|e| e.to_string())
        });
        let target = source.map_or_else(
            || "an untitled design (Save As chooses its file)".to_string(),
            |p| p.display().to_string(),
        );
        match kept {
            Some(Ok(())) => {
                orphan.remove();
                self.say(format!(
                    "Restored unsaved work on {target}; save it to keep it."
                ));
            }
            Some(Err(e)) => {
                orphan.release();
                self.fail(format!(
                    "Restored unsaved work on {target}; the old recovery copy stays on disk, as this one could not be written: {e}"
                ));
            }
            None => {
                orphan.release();
                self.say(format!(
                    "Restored unsaved work on {target}; the recovery copy stays on disk until it is saved."
                ));
            }
        }
        true
    }

    /// Loads `path`; on failure the open design stays as it was and the status says why.
    fn open_now(&mut self, path: &Path) -> bool {
        let path = state::absolute(path);
        let loaded =
            design::read_text(&path).and_then(|text| design::parse(&text).map(|d| (d, text)));
        match loaded {
            Ok((design, text)) => {
                self.doc = Document::new(design, Some(path.clone()), Some(text));
                self.inputs = inputs::InputsPanel::default();
                self.session.remember(&path);
                self.store_session();
                self.clear_own_copy();
                self.say(format!("Opened {}.", path.display()));
                true
            }
            Err(e) => {
                self.fail(format!(
                    "Could not open the file; the design on screen is unchanged. {}",
                    e.in_file(&path)
                ));
                false
            }
        }
    }

    /// Saves to `path`, editing the values in place in the file's text when it was opened
    /// from one. When that is not possible and the file's comments or layout would go,
    /// asks first (the held-back action `then` follows a yes). On failure the design stays
    /// open and unsaved, and the status says why.
    fn save_now(&mut self, path: &Path, then: Option<Pending>) {
        match design::save_text(self.doc.text.as_deref(), &self.doc.design) {
            Ok(plan) if plan.loses_layout() => {
                let why = match plan {
                    design::SaveText::Whole { why: Some(w), .. } => w.why,
                    _ => String::new(),
                };
                self.rewrite_prompt = Some((path.to_path_buf(), why, then));
            }
            Ok(plan) => self.write_design(path, Some(plan)),
            Err(e) => self.fail(format!(
                "Not saved; the design is still open with its changes. {e}"
            )),
        }
    }

    /// Writes the design to `path`: the planned text, or the whole design when `None`.
    fn write_design(&mut self, path: &Path, plan: Option<design::SaveText>) {
        let text = match plan {
            Some(plan) => Ok(plan.text().to_string()),
            None => design::to_ron(&self.doc.design),
        };
        let written = text.and_then(|text| {
            crate::atomic::write(path, text.as_bytes())
                .map(|()| text)
                .map_err(design::DesignError::from)
        });
        match written {
            Ok(text) => {
                let path = state::absolute(path);
                self.doc.path = Some(path.clone());
                self.doc.text = Some(text);
                self.doc.saved = Some(self.doc.design.clone());
                self.doc.dirty = false;
                self.session.remember(&path);
                self.store_session();
                self.clear_own_copy();
                self.say(format!("Saved {}.", path.display()));
                self.status_is_save = true;
            }
            Err(e) => self.fail(format!(
                "Not saved; the design is still open with its changes. {e}"
            )),
        }
    }

    /// Removes this instance's recovery copy (its work is saved or was discarded).
    fn clear_own_copy(&self) {
        if let Some(slot) = &self.slot {
            slot.clear();
        }
    }

    fn store_session(&mut self) {
        if let Err(e) = self.session.store(&self.state_dir) {
            self.fail(format!(
                "Could not write the session in {}: {e}",
                self.state_dir.display()
            ));
        }
    }

    /// Writes the recovery copy when there are unsaved changes and enough time has passed.
    fn autosave(&mut self, ctx: &egui::Context) {
        if !self.doc.dirty {
            return;
        }
        let now = ctx.input(|i| i.time);
        let due = self
            .last_recovery_write_s
            .is_none_or(|t| now - t >= AUTOSAVE_SECONDS);
        if due {
            self.write_recovery();
            self.last_recovery_write_s = Some(now);
        }
        ctx.request_repaint_after(std::time::Duration::from_secs_f64(AUTOSAVE_SECONDS));
    }

    /// Writes the recovery copy of the design now.
    pub fn write_recovery(&mut self) {
        let Some(slot) = &self.slot else { return };
        if let Err(e) = slot.store(self.doc.path.as_deref(), &self.doc.design) {
            self.fail(format!(
                "Could not write the recovery copy in {}: {e}",
                self.state_dir.display()
            ));
        }
    }

    /// Keeps the window's current place in the session (in memory; it is written with the
    /// session when the app closes), so the next start opens where this one was.
    pub fn note_window_place(&mut self, ctx: &egui::Context) {
        let (outer, inner) = ctx.input(|i| (i.viewport().outer_rect, i.viewport().inner_rect));
        let (Some(outer), Some(inner)) = (outer, inner) else {
            return;
        };
        let place = state::WindowPlace {
            x: outer.min.x,
            y: outer.min.y,
            width: inner.width(),
            height: inner.height(),
        };
        if place.plausible().is_some() {
            self.session.window = Some(place);
        }
    }

    /// The window to open: the last session's place when it is plausible, else the default
    /// size, placed by the system.
    pub fn initial_viewport(&self) -> egui::ViewportBuilder {
        let builder = egui::ViewportBuilder::default()
            .with_title(self.title())
            .with_min_inner_size(state::WindowPlace::MIN_SIZE)
            .with_app_id(APP_ID)
            .with_icon(std::sync::Arc::new(window_icon()));
        match self.session.window.and_then(state::WindowPlace::plausible) {
            Some(p) => builder
                .with_inner_size([p.width, p.height])
                .with_position([p.x, p.y]),
            None => builder.with_inner_size([1500.0, 940.0]),
        }
    }

    /// Called when the app closes normally: keeps the session and, when nothing is
    /// unsaved (or the user chose to discard it), removes this instance's own recovery
    /// copy. A dead instance's copy that was not answered stays for the next start.
    pub fn on_close(&mut self) {
        self.store_session();
        if let Some(orphan) = self.recovery_offer.take() {
            orphan.release();
        }
        if (!self.doc.dirty || self.quit_confirmed)
            && let Some(slot) = self.slot.take()
        {
            slot.close();
        }
    }

    fn reanalyse(&mut self) {
        match analysis::analyse_centred(&self.doc.design) {
            Ok(a) => {
                self.analysis = Some(a);
                self.analysis_error = None;
                strips::after_analysis(self);
            }
            Err(e) => self.analysis_error = Some(e.to_string()),
        }
        self.bench.refresh(&self.doc.design);
    }

    fn say(&mut self, text: String) {
        self.status_is_save = false;
        self.status = Some(Status {
            text,
            is_error: false,
        });
    }

    fn fail(&mut self, text: String) {
        self.status_is_save = false;
        self.status = Some(Status {
            text,
            is_error: true,
        });
    }
}

struct EframeApp(GripApp);

impl eframe::App for EframeApp {
    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
        self.0.ui(ui);
        self.0.note_window_place(ui.ctx());
        if self.0.dialogs.quit_requested {
            self.0.dialogs.quit_requested = false;
            ui.ctx().send_viewport_cmd(egui::ViewportCommand::Close);
        }
    }

    fn on_exit(&mut self, _gl: Option<&eframe::glow::Context>) {
        self.0.on_close();
    }
}

/// The desktop application id (Wayland app id, X11 WM_CLASS), matching a desktop entry
/// named `bowgrip.desktop`.
pub const APP_ID: &str = "bowgrip";

/// Side of the window icon, pixels.
const ICON_PX: u32 = 64;

/// The window icon, drawn here rather than shipped as an image: a grey pipe wall in section,
/// eight orange strip crests pressing on it, and the hub in the middle.
pub fn window_icon() -> egui::IconData {
    let n = ICON_PX as usize;
    let centre = (ICON_PX as f32 - 1.0) / 2.0;
    let mut rgba = vec![0u8; n * n * 4];
    let crests: Vec<[f32; 2]> = (0..8)
        .map(|i| {
            let a = std::f32::consts::TAU * i as f32 / 8.0;
            [centre + 20.0 * a.cos(), centre + 20.0 * a.sin()]
        })
        .collect();
    for y in 0..n {
        for x in 0..n {
            let (dx, dy) = (x as f32 - centre, y as f32 - centre);
            let r = dx.hypot(dy);
            let near_crest = crests
                .iter()
                .any(|c| (x as f32 - c[0]).hypot(y as f32 - c[1]) <= 5.0);
            let colour = if (25.0..=30.0).contains(&r) {
                Some([120, 126, 134])
            } else if near_crest {
                Some([230, 159, 0])
            } else if r <= 9.0 {
                Some([86, 180, 233])
            } else {
                None
            };
            if let Some([red, green, blue]) = colour {
                let at = 4 * (y * n + x);
                rgba[at..at + 4].copy_from_slice(&[red, green, blue, 255]);
            }
        }
    }
    egui::IconData {
        rgba,
        width: ICON_PX,
        height: ICON_PX,
    }
}

/// Opens the app on `file`, or on the last session's file, or on the built-in demo.
pub fn run(file: Option<PathBuf>) -> anyhow::Result<()> {
    let app = GripApp::new(state::default_state_dir(), file).with_system_dialogs(true);
    let options = eframe::NativeOptions {
        viewport: app.initial_viewport(),
        ..Default::default()
    };
    eframe::run_native(
        "bowgrip",
        options,
        Box::new(move |_cc| Ok(Box::new(EframeApp(app)))),
    )
    .map_err(|e| {
        anyhow::anyhow!(
            "the window could not be opened: {}",
            without_source_paths(&e.to_string())
        )
    })
}

/// `message` without the dependency source locations some windowing errors carry
/// (" at /home/.../winit-0.30/src/platform_impl/linux/mod.rs:765"): they mean nothing
/// to a user. Every " at PATH.rs:LINE" (with an optional ":COLUMN") is dropped.
fn without_source_paths(message: &str) -> String {
    let mut out = String::with_capacity(message.len());
    let mut rest = message;
    while let Some(i) = rest.find(" at ") {
        let after = &rest[i + 4..];
        let end = after
            .find(|c: char| c.is_whitespace())
            .unwrap_or(after.len());
        let word = after[..end].trim_end_matches([':', ',', '.']);
        let is_source = word.split(".rs:").nth(1).is_some_and(|tail| {
            !tail.is_empty() && tail.chars().all(|c| c.is_ascii_digit() || c == ':')
        });
        if is_source {
            out.push_str(&rest[..i]);
            // Keep the punctuation that followed the location.
            let punct_len = after[..end].len() - word.len();
            rest = &after[end - punct_len..];
        } else {
            out.push_str(&rest[..i + 4]);
            rest = after;
        }
    }
    out.push_str(rest);
    out
}

#[cfg(test)]
mod source_path_tests {
    use super::{ICON_PX, window_icon, without_source_paths};

    /// The icon is a full square RGBA image with both the wall and the crests drawn and a
    /// transparent background.
    #[test]
    fn the_window_icon_is_drawn() {
        let icon = window_icon();
        assert_eq!((icon.width, icon.height), (ICON_PX, ICON_PX));
        assert_eq!(icon.rgba.len(), (4 * ICON_PX * ICON_PX) as usize);
        let pixels: Vec<&[u8]> = icon.rgba.chunks(4).collect();
        assert_eq!(pixels[0][3], 0, "corner transparent");
        assert!(pixels.iter().any(|p| p == &[230, 159, 0, 255]), "crests");
        assert!(pixels.iter().any(|p| p == &[120, 126, 134, 255]), "wall");
    }

    /// The message winit gives without a display (as printed on this machine's CI).
    #[test]
    fn dependency_source_locations_are_dropped() {
        let raw = "winit EventLoopError: os error at /root/.cargo/registry/src/index.crates.io-1949cf8c6b5b557f/winit-0.30.13/src/platform_impl/linux/mod.rs:765: neither WAYLAND_DISPLAY nor WAYLAND_SOCKET nor DISPLAY is set.";
        assert_eq!(
            without_source_paths(raw),
            "winit EventLoopError: os error: neither WAYLAND_DISPLAY nor WAYLAND_SOCKET nor DISPLAY is set."
        );
        // Words after " at " that are not source locations stay.
        let plain = "no state at 3.2 mm at the largest bore";
        assert_eq!(without_source_paths(plain), plain);
    }
}
