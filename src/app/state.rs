//! What the app keeps between runs, outside any design file: the session (recent files,
//! the last file open, theme and paper choice) and the recovery copies of unsaved work.
//!
//! Both live in the platform's own state folder, never the working folder
//! ([`default_state_dir`]). Every file there is written by the one atomic writer
//! ([`crate::atomic::write`]: synced, renamed, folder synced). Paths are stored absolute
//! and resolved, so a start from another folder opens the same files.
//!
//! Recovery: each running app owns one [`Slot`], a copy file named after the process and
//! a lock file it holds locked for as long as it runs. A copy whose lock nobody holds was
//! left by an instance that is gone ([`orphans`]); it is offered (and held locked while
//! offered, so no second instance offers it too) and stays on disk until the user
//! restores or discards it. Quitting, opening a file or deciding later never removes it.

use std::fs;
use std::io;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

use serde::{Deserialize, Serialize};

use crate::design::{self, Design};

/// Environment variable that overrides the state directory (tests use a temporary one).
pub const STATE_DIR_VAR: &str = "BOWGRIP_STATE_DIR";

/// How many recent files the session remembers.
pub const RECENT_MAX: usize = 8;

const SESSION_FILE: &str = "session.ron";
/// Name start of every recovery copy; the copy of an earlier version was `recovery.ron`.
const RECOVERY_PREFIX: &str = "recovery";

/// The state directory: `$BOWGRIP_STATE_DIR` when set; else the platform's folder for
/// application state (`$XDG_STATE_HOME/bowgrip` or `~/.local/state/bowgrip` on Linux and
/// other Unix systems, `~/Library/Application Support/bowgrip` on macOS,
/// `%LOCALAPPDATA%\bowgrip` on Windows); else a `bowgrip` folder in the system's
/// temporary folder. Never the working folder.
pub fn default_state_dir() -> PathBuf {
    let from_env = |name: &str| {
        std::env::var_os(name)
            .filter(|v| !v.is_empty())
            .map(PathBuf::from)
            .filter(|p| p.is_absolute())
    };
    if let Some(dir) = std::env::var_os(STATE_DIR_VAR).filter(|v| !v.is_empty()) {
        return absolute(Path::new(&dir));
    }
    let platform = if cfg!(windows) {
        from_env("LOCALAPPDATA").map(|d| d.join("bowgrip"))
    } else if cfg!(target_os = "macos") {
        from_env("HOME").map(|h| h.join("Library/Application Support/bowgrip"))
    } else {
        from_env("XDG_STATE_HOME")
            .map(|x| x.join("bowgrip"))
            .or_else(|| from_env("HOME").map(|h| h.join(".local/state/bowgrip")))
    };
    platform.unwrap_or_else(|| std::env::temp_dir().join("bowgrip"))
}

/// `path` made absolute and resolved (links followed, `..` removed) when it exists; made
/// absolute against the working folder when it does not (yet).
pub fn absolute(path: &Path) -> PathBuf {
    fs::canonicalize(path)
        .or_else(|_| std::path::absolute(path))
        .unwrap_or_else(|_| path.to_path_buf())
}

/// Light, dark, or whatever the system says.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
pub enum ThemeChoice {
    /// Follow the desktop's preference.
    #[default]
    System,
    /// Always light.
    Light,
    /// Always dark.
    Dark,
}

impl ThemeChoice {
    /// All choices in menu order.
    pub const ALL: [ThemeChoice; 3] = [ThemeChoice::System, ThemeChoice::Light, ThemeChoice::Dark];

    /// Menu label.
    pub fn label(self) -> &'static str {
        match self {
            ThemeChoice::System => "Follow the system",
            ThemeChoice::Light => "Light",
            ThemeChoice::Dark => "Dark",
        }
    }
}

/// Paper for the sizing sheet, as persisted.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
pub enum PaperChoice {
    /// ISO A4.
    #[default]
    A4,
    /// US Letter.
    Letter,
}

/// The persisted session. Unknown or missing fields fall back to defaults so older files
/// still load.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Session {
    /// Most recent first, at most [`RECENT_MAX`]; absolute paths.
    pub recent: Vec<PathBuf>,
    /// The design file open when the app last closed (absolute).
    pub last_file: Option<PathBuf>,
    /// Theme choice.
    pub theme: ThemeChoice,
    /// Paper for the sizing sheet.
    pub paper: PaperChoice,
    /// Units the app shows numbers in (and prints the sheet in); the design file stays SI.
    pub units: crate::units::UnitSystem,
    /// Where the window was and how large, when the app last closed.
    pub window: Option<WindowPlace>,
}

/// The window's outer position and inner size, in logical points (as egui gives them).
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct WindowPlace {
    pub x: f32,
    pub y: f32,
    pub width: f32,
    pub height: f32,
}

impl WindowPlace {
    /// Smallest inner size the app opens at, points.
    pub const MIN_SIZE: [f32; 2] = [900.0, 600.0];

    /// The place when it is plausible for a desktop: finite numbers, a size from the
    /// minimum to 16,000 points, a position within 16,000 points of the origin (a window
    /// stored on a screen that has since gone is then still partly placed by the system).
    /// `None` otherwise, and the app opens at its default size.
    pub fn plausible(self) -> Option<WindowPlace> {
        let WindowPlace {
            x,
            y,
            width,
            height,
        } = self;
        let finite = [x, y, width, height].iter().all(|v| v.is_finite());
        let sized = (Self::MIN_SIZE[0]..=16_000.0).contains(&width)
            && (Self::MIN_SIZE[1]..=16_000.0).contains(&height);
        let placed = x.abs() <= 16_000.0 && y.abs() <= 16_000.0;
        (finite && sized && placed).then_some(self)
    }
}

impl Session {
    /// Reads the session from `dir`; a missing or unreadable file gives the default (the
    /// session is a convenience, never a reason to refuse to start). Relative paths that
    /// an earlier version stored are dropped: they named files of another working folder.
    pub fn load(dir: &Path) -> Session {
        let mut s: Session = fs::read_to_string(dir.join(SESSION_FILE))
            .ok()
            .and_then(|text| ron::from_str(&text).ok())
            .unwrap_or_default();
        s.recent.retain(|p| p.is_absolute());
        s.last_file = s.last_file.filter(|p| p.is_absolute());
        s
    }

    /// Writes the session to `dir`.
    pub fn store(&self, dir: &Path) -> io::Result<()> {
        write_state(&dir.join(SESSION_FILE), &to_pretty(self)?)
    }

    /// Puts `path` (made absolute and resolved) first in the recent list.
    pub fn remember(&mut self, path: &Path) {
        let path = absolute(path);
        self.recent.retain(|p| *p != path);
        self.recent.insert(0, path.clone());
        self.recent.truncate(RECENT_MAX);
        self.last_file = Some(path);
    }
}

/// The recovery copy of unsaved work, as stored.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Recovery {
    /// The file the work belongs to (absolute), if it had one.
    pub source: Option<PathBuf>,
    /// The design as RON text (as [`design::to_ron`] writes it).
    pub design_ron: String,
}

impl Recovery {
    /// Every recovery copy in `dir`, live or not.
    pub fn copies(dir: &Path) -> Vec<PathBuf> {
        let mut found: Vec<PathBuf> = fs::read_dir(dir)
            .map(|entries| {
                entries
                    .filter_map(|e| e.ok().map(|e| e.path()))
                    .filter(|p| is_copy_name(p))
                    .collect()
            })
            .unwrap_or_default();
        found.sort();
        found
    }
}

fn is_copy_name(path: &Path) -> bool {
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned());
    name.is_some_and(|n| n.starts_with(RECOVERY_PREFIX) && n.ends_with(".ron"))
}

fn lock_path(copy: &Path) -> PathBuf {
    copy.with_extension("lock")
}

/// Opens (creating) the lock file and tries to lock it without waiting: `Ok(Some)` when
/// locked now, `Ok(None)` when another holder has it.
fn try_lock(path: &Path) -> io::Result<Option<fs::File>> {
    let file = fs::OpenOptions::new()
        .create(true)
        .truncate(false)
        .write(true)
        .open(path)?;
    match file.try_lock() {
        Ok(()) => Ok(Some(file)),
        Err(fs::TryLockError::WouldBlock) => Ok(None),
        Err(fs::TryLockError::Error(e)) => Err(e),
    }
}

static SLOT_COUNTER: AtomicU64 = AtomicU64::new(0);

/// This instance's own recovery copy: the file it writes and the lock that marks it live.
/// Dropping the slot (a crash ends the process) releases the lock; the copy stays.
#[derive(Debug)]
pub struct Slot {
    copy: PathBuf,
    _lock: fs::File,
}

impl Slot {
    /// Claims a fresh slot in `dir` (creating the folder): named after the process id and
    /// a counter, locked for as long as the slot lives.
    pub fn claim(dir: &Path) -> io::Result<Slot> {
        fs::create_dir_all(dir)?;
        for _ in 0..64 {
            let copy = dir.join(format!(
                "{RECOVERY_PREFIX}-{}-{}.ron",
                std::process::id(),
                SLOT_COUNTER.fetch_add(1, Ordering::Relaxed)
            ));
            if copy.exists() {
                continue;
            }
            if let Some(lock) = try_lock(&lock_path(&copy))? {
                return Ok(Slot { copy, _lock: lock });
            }
        }
        Err(io::Error::other("no free recovery file name"))
    }

    /// The copy file this slot writes.
    pub fn path(&self) -> &Path {
        &self.copy
    }

    /// Writes the recovery copy for `design`, belonging to `source`.
    pub fn store(&self, source: Option<&Path>, design: &Design) -> io::Result<()> {
        let rec = Recovery {
            source: source.map(absolute),
            design_ron: design::to_ron(design).map_err(|e| io::Error::other(e.to_string()))?,
        };
        write_state(&self.copy, &to_pretty(&rec)?)
    }

    /// Removes this slot's copy (after a save, a discard, a clean quit).
    pub fn clear(&self) {
        // Nothing to do when it is already gone.
        let _ = fs::remove_file(&self.copy);
    }

    /// Removes the copy and the lock file: the instance ends cleanly.
    pub fn close(self) {
        self.clear();
        let _ = fs::remove_file(lock_path(&self.copy));
    }
}

/// A recovery copy left by an instance that is gone, held locked while it is offered.
#[derive(Debug)]
pub struct Orphan {
    /// The copy file.
    pub path: PathBuf,
    /// What it holds.
    pub record: Recovery,
    /// The design in it.
    pub design: Design,
    _lock: fs::File,
}

impl Orphan {
    /// Removes the copy (restored or discarded): the only way a copy goes.
    pub fn remove(self) {
        let _ = fs::remove_file(&self.path);
        let _ = fs::remove_file(lock_path(&self.path));
    }

    /// Lets the copy go unanswered: it stays on disk for the next start.
    pub fn release(self) {}
}

/// The copies in `dir` that no running instance holds, newest first, each locked for the
/// caller; an unreadable copy comes as a message naming it (and stays on disk). Lock
/// files of gone instances without a copy are tidied away.
pub fn orphans(dir: &Path) -> Vec<Result<Orphan, String>> {
    let mut copies: Vec<(std::time::SystemTime, PathBuf)> = Recovery::copies(dir)
        .into_iter()
        .map(|p| {
            let when = fs::metadata(&p)
                .and_then(|m| m.modified())
                .unwrap_or(std::time::UNIX_EPOCH);
            (when, p)
        })
        .collect();
    copies.sort_by_key(|c| std::cmp::Reverse(c.0));
    let mut found = Vec::new();
    for (_, path) in copies {
        let lock = match try_lock(&lock_path(&path)) {
            Ok(Some(lock)) => lock,
            // Live: its instance is running.
            Ok(None) => continue,
            Err(e) => {
                found.push(Err(format!("{}: {e}", path.display())));
                continue;
            }
        };
        let read = fs::read_to_string(&path)
            .map_err(|e| e.to_string())
            .and_then(|text| ron::from_str::<Recovery>(&text).map_err(|e| e.to_string()))
            .and_then(|record| {
                design::parse(&record.design_ron)
                    .map(|d| (record, d))
                    .map_err(|e| e.to_string())
            });
        found.push(match read {
            Ok((record, design)) => Ok(Orphan {
                path,
                record,
                design,
                _lock: lock,
            }),
            Err(why) => Err(format!("{}: {why}", path.display())),
        });
    }
    tidy_locks(dir);
    found
}

/// Removes lock files that have no copy and no holder.
fn tidy_locks(dir: &Path) {
    let Ok(entries) = fs::read_dir(dir) else {
        return;
    };
    for path in entries.filter_map(|e| e.ok().map(|e| e.path())) {
        let name = path.file_name().map(|n| n.to_string_lossy().into_owned());
        let is_lock = name.is_some_and(|n| n.starts_with(RECOVERY_PREFIX) && n.ends_with(".lock"));
        if is_lock
            && !path.with_extension("ron").exists()
            && let Ok(Some(_held)) = try_lock(&path)
        {
            let _ = fs::remove_file(&path);
        }
    }
}

fn to_pretty<T: Serialize>(value: &T) -> io::Result<String> {
    ron::ser::to_string_pretty(value, ron::ser::PrettyConfig::new())
        .map_err(|e| io::Error::other(e.to_string()))
}

/// Writes a state file through the atomic writer, creating the folder when needed.
fn write_state(path: &Path, text: &str) -> io::Result<()> {
    if let Some(dir) = path.parent().filter(|d| !d.as_os_str().is_empty()) {
        fs::create_dir_all(dir)?;
    }
    crate::atomic::write(path, text.as_bytes()).map_err(|e| io::Error::other(e.to_string()))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The window's place survives a store and load; a session file of an earlier version
    /// (no window) still loads; an implausible place is not used.
    #[test]
    fn window_place_round_trips_and_implausible_ones_are_dropped() {
        let dir = tempfile::tempdir().expect("temp dir");
        let place = WindowPlace {
            x: 40.0,
            y: 30.0,
            width: 1280.0,
            height: 720.0,
        };
        let s = Session {
            window: Some(place),
            ..Session::default()
        };
        s.store(dir.path()).expect("stores");
        assert_eq!(Session::load(dir.path()).window, Some(place));
        fs::write(dir.path().join(SESSION_FILE), "(recent: [], theme: Dark)").expect("writes");
        let old = Session::load(dir.path());
        assert_eq!((old.window, old.theme), (None, ThemeChoice::Dark));
        assert_eq!(place.plausible(), Some(place));
        for bad in [
            WindowPlace {
                width: 200.0,
                ..place
            },
            WindowPlace {
                height: f32::NAN,
                ..place
            },
            WindowPlace { x: 1e9, ..place },
        ] {
            assert_eq!(bad.plausible(), None, "{bad:?}");
        }
    }

    #[test]
    fn recent_list_is_most_recent_first_without_repeats() {
        let mut s = Session::default();
        for name in ["/a", "/b", "/a", "/c"] {
            s.remember(Path::new(name));
        }
        let names: Vec<_> = s.recent.iter().map(|p| p.display().to_string()).collect();
        assert_eq!(names, ["/c", "/a", "/b"]);
        assert_eq!(s.last_file.as_deref(), Some(Path::new("/c")));
        for i in 0..20 {
            s.remember(Path::new(&format!("/f{i}")));
        }
        assert_eq!(s.recent.len(), RECENT_MAX);
    }

    #[test]
    fn remembered_paths_are_absolute() {
        // Issue 11, item 2: a relative path named another file from another folder.
        let mut s = Session::default();
        s.remember(Path::new("some/design.ron"));
        let stored = s.last_file.unwrap_or_default();
        assert!(stored.is_absolute(), "{}", stored.display());
        assert!(stored.ends_with("some/design.ron"));
    }

    #[test]
    fn old_relative_session_entries_are_dropped() {
        let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        fs::write(
            dir.path().join(SESSION_FILE),
            "(recent: [\"rel.ron\", \"/abs.ron\"], last_file: Some(\"rel.ron\"))",
        )
        .unwrap_or_else(|e| panic!("{e}"));
        let s = Session::load(dir.path());
        assert_eq!(s.recent, [PathBuf::from("/abs.ron")]);
        assert_eq!(s.last_file, None);
    }

    #[test]
    fn state_never_defaults_to_the_working_folder() {
        // Issue 11, item 6 (settings in the platform's own folder).
        let dir = default_state_dir();
        assert!(dir.is_absolute(), "{}", dir.display());
    }

    #[test]
    fn session_round_trips() {
        let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        let mut s = Session::default();
        s.remember(Path::new("/x/y.ron"));
        s.theme = ThemeChoice::Dark;
        s.store(dir.path()).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(Session::load(dir.path()), s);
    }

    #[test]
    fn a_live_copy_is_not_offered_and_a_dead_one_is_until_answered() {
        // Issue 11, items 1 and 3.
        let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        let mut d = Design::default();
        d.strip.count = 5;
        let live = Slot::claim(dir.path()).unwrap_or_else(|e| panic!("{e}"));
        live.store(Some(Path::new("/x/y.ron")), &d)
            .unwrap_or_else(|e| panic!("{e}"));
        assert!(orphans(dir.path()).is_empty(), "a running instance's copy");
        // The instance dies: its lock goes, its copy stays and is offered.
        let copy = live.path().to_path_buf();
        drop(live);
        let mut found = orphans(dir.path());
        assert_eq!(found.len(), 1);
        let Some(Ok(orphan)) = found.pop() else {
            panic!("no usable orphan")
        };
        assert_eq!(orphan.design, d);
        assert_eq!(orphan.record.source.as_deref(), Some(Path::new("/x/y.ron")));
        // While it is offered here, no other instance offers it.
        assert!(orphans(dir.path()).is_empty());
        // Deciding later keeps it for the next start, twice over.
        orphan.release();
        for _ in 0..2 {
            let again = orphans(dir.path());
            assert_eq!(again.len(), 1);
        }
        assert!(copy.is_file());
        // Discarding removes it.
        if let Some(Ok(orphan)) = orphans(dir.path()).pop() {
            orphan.remove();
        }
        assert!(!copy.exists());
        assert!(Recovery::copies(dir.path()).is_empty());
    }
}
