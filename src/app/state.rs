//! What the app keeps between runs, outside any design file: the session (recent files,
//! the last file open, theme and paper choice) and the recovery copy of unsaved work.
//!
//! Both live in the state directory: `$BOWGRIP_STATE_DIR` when set, else
//! `$XDG_STATE_HOME/bowgrip`, else `~/.local/state/bowgrip`. Files there are written
//! atomically (temporary file, then rename) so a crash mid-write cannot corrupt them.

use std::fs;
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use crate::design::{self, Design};

/// Environment variable that overrides the state directory (tests use a temporary one).
pub const STATE_DIR_VAR: &str = "BOWGRIP_STATE_DIR";

/// How many recent files the session remembers.
pub const RECENT_MAX: usize = 8;

const SESSION_FILE: &str = "session.ron";
const RECOVERY_FILE: &str = "recovery.ron";

/// The state directory: `$BOWGRIP_STATE_DIR`, `$XDG_STATE_HOME/bowgrip` or
/// `~/.local/state/bowgrip`; the working directory's `.bowgrip-state` when none is known.
pub fn default_state_dir() -> PathBuf {
    let from_env = |name: &str| {
        std::env::var_os(name)
            .filter(|v| !v.is_empty())
            .map(PathBuf::from)
    };
    if let Some(dir) = from_env(STATE_DIR_VAR) {
        return dir;
    }
    if let Some(xdg) = from_env("XDG_STATE_HOME") {
        return xdg.join("bowgrip");
    }
    if let Some(home) = from_env("HOME") {
        return home.join(".local").join("state").join("bowgrip");
    }
    PathBuf::from(".bowgrip-state")
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
    /// Most recent first, at most [`RECENT_MAX`].
    pub recent: Vec<PathBuf>,
    /// The design file open when the app last closed.
    pub last_file: Option<PathBuf>,
    /// Theme choice.
    pub theme: ThemeChoice,
    /// Paper for the sizing sheet.
    pub paper: PaperChoice,
}

impl Session {
    /// Reads the session from `dir`; a missing or unreadable file gives the default (the
    /// session is a convenience, never a reason to refuse to start).
    pub fn load(dir: &Path) -> Session {
        fs::read_to_string(dir.join(SESSION_FILE))
            .ok()
            .and_then(|text| ron::from_str(&text).ok())
            .unwrap_or_default()
    }

    /// Writes the session to `dir`.
    pub fn store(&self, dir: &Path) -> std::io::Result<()> {
        write_atomic(&dir.join(SESSION_FILE), &to_pretty(self)?)
    }

    /// Puts `path` first in the recent list.
    pub fn remember(&mut self, path: &Path) {
        self.recent.retain(|p| p != path);
        self.recent.insert(0, path.to_path_buf());
        self.recent.truncate(RECENT_MAX);
        self.last_file = Some(path.to_path_buf());
    }
}

/// The recovery copy of unsaved work.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Recovery {
    /// The file the work belongs to, if it had one.
    pub source: Option<PathBuf>,
    /// The design as RON text (as [`design::to_ron`] writes it).
    pub design_ron: String,
}

impl Recovery {
    /// Path of the recovery file in `dir`.
    pub fn path(dir: &Path) -> PathBuf {
        dir.join(RECOVERY_FILE)
    }

    /// Writes the recovery copy for `design` into `dir`.
    pub fn store(dir: &Path, source: Option<&Path>, design: &Design) -> std::io::Result<()> {
        let rec = Recovery {
            source: source.map(Path::to_path_buf),
            design_ron: design::to_ron(design),
        };
        write_atomic(&Recovery::path(dir), &to_pretty(&rec)?)
    }

    /// The recovery copy in `dir`, if one is there: the record and its design, or a
    /// message saying why it cannot be used.
    pub fn find(dir: &Path) -> Option<Result<(Recovery, Design), String>> {
        let path = Recovery::path(dir);
        let text = fs::read_to_string(&path).ok()?;
        Some(
            ron::from_str::<Recovery>(&text)
                .map_err(|e| format!("{}: {e}", path.display()))
                .and_then(|rec| {
                    design::parse(&rec.design_ron)
                        .map(|d| (rec, d))
                        .map_err(|e| format!("{}: {e}", path.display()))
                }),
        )
    }

    /// Removes the recovery copy (after a save, a clean quit or a discard).
    pub fn clear(dir: &Path) {
        // Nothing to do when it is already gone.
        let _ = fs::remove_file(Recovery::path(dir));
    }
}

fn to_pretty<T: Serialize>(value: &T) -> std::io::Result<String> {
    ron::ser::to_string_pretty(value, ron::ser::PrettyConfig::new())
        .map_err(|e| std::io::Error::other(e.to_string()))
}

/// Writes `text` to `path` via a temporary file in the same directory and a rename,
/// creating the directory when needed.
pub fn write_atomic(path: &Path, text: &str) -> std::io::Result<()> {
    if let Some(dir) = path.parent().filter(|d| !d.as_os_str().is_empty()) {
        fs::create_dir_all(dir)?;
    }
    let mut temp = path.as_os_str().to_owned();
    temp.push(format!(".{}.tmp", std::process::id()));
    let temp = PathBuf::from(temp);
    let result = fs::write(&temp, text).and_then(|()| fs::rename(&temp, path));
    if result.is_err() {
        let _ = fs::remove_file(&temp);
    }
    result
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recent_list_is_most_recent_first_without_repeats() {
        let mut s = Session::default();
        for name in ["a", "b", "a", "c"] {
            s.remember(Path::new(name));
        }
        let names: Vec<_> = s.recent.iter().map(|p| p.display().to_string()).collect();
        assert_eq!(names, ["c", "a", "b"]);
        assert_eq!(s.last_file.as_deref(), Some(Path::new("c")));
        for i in 0..20 {
            s.remember(Path::new(&format!("f{i}")));
        }
        assert_eq!(s.recent.len(), RECENT_MAX);
    }

    #[test]
    fn session_and_recovery_round_trip() {
        let dir = std::env::temp_dir().join(format!("bowgrip-state-test-{}", std::process::id()));
        let mut s = Session::default();
        s.remember(Path::new("/x/y.ron"));
        s.theme = ThemeChoice::Dark;
        s.store(&dir).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(Session::load(&dir), s);
        let mut d = Design::default();
        d.strip.count = 5;
        Recovery::store(&dir, Some(Path::new("/x/y.ron")), &d).unwrap_or_else(|e| panic!("{e}"));
        match Recovery::find(&dir) {
            Some(Ok((rec, got))) => {
                assert_eq!(got, d);
                assert_eq!(rec.source.as_deref(), Some(Path::new("/x/y.ron")));
            }
            other => panic!("{other:?}"),
        }
        Recovery::clear(&dir);
        assert!(Recovery::find(&dir).is_none());
        let _ = fs::remove_dir_all(&dir);
    }
}
