//! The desktop app: one window where a designer edits a segment design and sees, live,
//! the stroke-against-bore window, the force-stroke curve, the strip at the operating
//! stroke to scale, and the checks. A thin front end over [`crate::analysis`].
//!
//! Structure: [`GripApp`] holds the open document (design, file, undo history) and the
//! cached [`Analysis`]; panels draw from it and record [`Command`]s; after drawing,
//! [`GripApp::apply`] is the one place that changes the document, marks it dirty, pushes
//! undo steps and re-analyses (once per change, never per frame). [`GripApp::ui`] serves
//! both eframe and the kittest tests.

mod dialogs;
pub mod export;
pub mod fit;
mod inputs;
mod outputs;
pub mod state;

use std::path::{Path, PathBuf};

use crate::analysis::{self, Analysis};
use crate::design::{self, Design};

pub use state::{Recovery, Session, ThemeChoice};

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
    path: Option<PathBuf>,
    dirty: bool,
    /// The design as last opened or saved; `None` when it is not on disk (restored work).
    saved: Option<Design>,
    undo: Vec<Design>,
    redo: Vec<Design>,
    /// The design before the ongoing gesture began.
    gesture_start: Option<Design>,
}

impl Document {
    fn new(design: Design, path: Option<PathBuf>) -> Document {
        Document {
            saved: Some(design.clone()),
            design,
            path,
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
    /// Recovery copy found at start, waiting for an answer.
    recovery_offer: Option<(Recovery, Design)>,
    /// Unsaved-changes prompt.
    guard: Option<Pending>,
    quit_confirmed: bool,
    system_dialogs: bool,
    last_recovery_write_s: Option<f64>,
    sent_title: String,
    applied_theme: Option<ThemeChoice>,
    /// When the operating stroke is past the model's limit: a stroke just short of it and
    /// the strip shape there, so the side view still shows something.
    fallback_shape: Option<(f64, Vec<[f64; 2]>)>,
    /// Where the three plots were drawn last frame (stroke-bore, force, stress), for PNG export.
    plot_rects: [Option<egui::Rect>; 3],
    inputs: inputs::InputsPanel,
    dialogs: dialogs::Dialogs,
}

impl GripApp {
    /// The app with its state in `state_dir`, on `file` when given (else on the last
    /// session's file, else on the built-in demo). A file that does not load leaves the
    /// demo open with the reason in the status line. A recovery copy left by a crash is
    /// offered, not applied.
    pub fn new(state_dir: PathBuf, file: Option<PathBuf>) -> GripApp {
        let session = Session::load(&state_dir);
        let (recovery_offer, unreadable) = match Recovery::find(&state_dir) {
            Some(Ok(found)) => (Some(found), None),
            Some(Err(why)) => (None, Some(why)),
            None => (None, None),
        };
        let mut app = GripApp {
            doc: Document::new(Design::default(), None),
            analysis: None,
            analysis_error: None,
            state_dir,
            session,
            status: None,
            commands: Vec::new(),
            recovery_offer,
            guard: None,
            quit_confirmed: false,
            system_dialogs: false,
            last_recovery_write_s: None,
            sent_title: String::new(),
            applied_theme: None,
            fallback_shape: None,
            plot_rects: [None; 3],
            inputs: inputs::InputsPanel::default(),
            dialogs: dialogs::Dialogs::default(),
        };
        let start = file.or_else(|| app.session.last_file.clone().filter(|p| p.is_file()));
        if let Some(path) = start {
            app.open_now(&path);
        }
        if let Some(why) = unreadable {
            app.fail(format!(
                "A recovery copy was found but cannot be used (it stays on disk): {why}"
            ));
        }
        app.reanalyse();
        app
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

    /// The session as it stands.
    pub fn session(&self) -> &Session {
        &self.session
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
        if self.applied_theme != Some(self.session.theme) {
            ctx.set_theme(match self.session.theme {
                ThemeChoice::System => egui::ThemePreference::System,
                ThemeChoice::Light => egui::ThemePreference::Light,
                ThemeChoice::Dark => egui::ThemePreference::Dark,
            });
            self.applied_theme = Some(self.session.theme);
        }
        self.shortcuts(&ctx);
        self.close_guard(&ctx);
        dialogs::menu_bar(self, ui);
        dialogs::status_bar(self, ui);
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
        // Most specific first: Ctrl+Shift+S before Ctrl+S.
        let table: [(KeyboardShortcut, Action); 6] = [
            (KeyboardShortcut::new(shift, Key::S), |a| {
                a.dialogs.open_save_as(a.doc.path.as_deref())
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
                    self.save_now(&path);
                    false
                }
                None => {
                    self.dialogs.open_save_as(None);
                    false
                }
            },
            Command::SaveAs(path) => {
                self.save_now(&path);
                false
            }
            Command::SaveThen(path, pending) => {
                self.guard = None;
                self.save_now(&path);
                !self.doc.dirty && self.carry_out(pending)
            }
            Command::Restore => match self.recovery_offer.take() {
                Some((rec, design)) => {
                    self.doc = Document::new(design, rec.source.clone());
                    self.doc.saved = None;
                    self.doc.dirty = true;
                    self.say(format!(
                        "Restored unsaved work{}; save it to keep it.",
                        rec.source
                            .map(|p| format!(" on {}", p.display()))
                            .unwrap_or_default()
                    ));
                    true
                }
                None => false,
            },
            Command::DropRecovery => {
                self.recovery_offer = None;
                Recovery::clear(&self.state_dir);
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
                self.doc = Document::new(Design::default(), None);
                self.inputs = inputs::InputsPanel::default();
                Recovery::clear(&self.state_dir);
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

    /// Loads `path`; on failure the open design stays as it was and the status says why.
    fn open_now(&mut self, path: &Path) -> bool {
        match design::load(path) {
            Ok(design) => {
                self.doc = Document::new(design, Some(path.to_path_buf()));
                self.inputs = inputs::InputsPanel::default();
                self.session.remember(path);
                self.store_session();
                Recovery::clear(&self.state_dir);
                self.say(format!("Opened {}.", path.display()));
                true
            }
            Err(e) => {
                self.fail(format!(
                    "Could not open the file; the design on screen is unchanged. {}",
                    e.in_file(path)
                ));
                false
            }
        }
    }

    /// Saves to `path`; on failure the design stays open and unsaved, and the status says why.
    fn save_now(&mut self, path: &Path) {
        match design::save_atomic(path, &self.doc.design) {
            Ok(()) => {
                self.doc.path = Some(path.to_path_buf());
                self.doc.saved = Some(self.doc.design.clone());
                self.doc.dirty = false;
                self.session.remember(path);
                self.store_session();
                Recovery::clear(&self.state_dir);
                self.say(format!("Saved {}.", path.display()));
            }
            Err(e) => self.fail(format!(
                "Not saved; the design is still open with its changes. {e}"
            )),
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
        if let Err(e) = Recovery::store(&self.state_dir, self.doc.path.as_deref(), &self.doc.design)
        {
            self.fail(format!(
                "Could not write the recovery copy in {}: {e}",
                self.state_dir.display()
            ));
        }
    }

    /// Called when the app closes normally: keeps the session and, when nothing is
    /// unsaved, removes the recovery copy.
    pub fn on_close(&mut self) {
        self.store_session();
        if !self.doc.dirty || self.quit_confirmed {
            Recovery::clear(&self.state_dir);
        }
    }

    fn reanalyse(&mut self) {
        match analysis::analyse(&self.doc.design) {
            Ok(a) => {
                self.fallback_shape = None;
                if a.shape_mm.is_empty()
                    && let Ok(p) = a.segment.at_bore(a.segment.bore_nominal_mm)
                {
                    let s = 0.995 * p.limit_stroke_mm();
                    self.fallback_shape = Some((s, p.shape_mm(s, 48)));
                }
                self.analysis = Some(a);
                self.analysis_error = None;
            }
            Err(e) => self.analysis_error = Some(e.to_string()),
        }
    }

    fn say(&mut self, text: String) {
        self.status = Some(Status {
            text,
            is_error: false,
        });
    }

    fn fail(&mut self, text: String) {
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
        if self.0.dialogs.quit_requested {
            self.0.dialogs.quit_requested = false;
            ui.ctx().send_viewport_cmd(egui::ViewportCommand::Close);
        }
    }

    fn on_exit(&mut self, _gl: Option<&eframe::glow::Context>) {
        self.0.on_close();
    }
}

/// Opens the app on `file`, or on the last session's file, or on the built-in demo.
pub fn run(file: Option<PathBuf>) -> anyhow::Result<()> {
    let app = GripApp::new(state::default_state_dir(), file).with_system_dialogs(true);
    let title = app.title();
    let options = eframe::NativeOptions {
        viewport: egui::ViewportBuilder::default()
            .with_title(title)
            .with_inner_size([1500.0, 940.0])
            .with_min_inner_size([900.0, 600.0]),
        ..Default::default()
    };
    eframe::run_native(
        "bowgrip",
        options,
        Box::new(move |_cc| Ok(Box::new(EframeApp(app)))),
    )
    .map_err(|e| anyhow::anyhow!("the window could not be opened: {e}"))
}
