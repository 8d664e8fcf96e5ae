//! The one way this program writes a file: [`write`]. The bytes go to a new temporary
//! file in the target's own folder (created exclusively, so no other writer shares it),
//! which takes the permissions of the file it replaces, is synced to disk and renamed
//! over the target; the folder is synced after the rename. A reader never sees half a
//! file, and a failure at any step leaves the old file as it was.
//!
//! A symbolic link is followed: its target is written and the link stays. A read-only
//! file is refused (even for a user whom the system would let write it), and so is a
//! target that is not a regular file.

use std::fs;
use std::io::{self, Write as _};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

/// Why a file could not be written. The old file, if any, is untouched in every case.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    /// The file exists and is marked read-only.
    #[error(
        "cannot write {}: the file is read-only; nothing was changed (save under another name, or make the file writable first)",
        path.display()
    )]
    ReadOnly { path: PathBuf },
    /// The path names a folder or something else that is not a regular file.
    #[error("cannot write {}: it is {what}, not a file", path.display())]
    NotAFile { path: PathBuf, what: &'static str },
    /// The path names no file (it ends in `..` or is empty).
    #[error("cannot write {}: the path names no file", path.display())]
    NoFileName { path: PathBuf },
    /// The system refused a step (reported with the path and its reason).
    #[error("cannot write {}: {source}", path.display())]
    Io { path: PathBuf, source: io::Error },
}

impl WriteError {
    /// The path the write was for.
    pub fn path(&self) -> &Path {
        match self {
            WriteError::ReadOnly { path }
            | WriteError::NotAFile { path, .. }
            | WriteError::NoFileName { path }
            | WriteError::Io { path, .. } => path,
        }
    }
}

/// How many links [`resolve`] follows before giving up (as the system's own limit).
const MAX_LINKS: usize = 40;

static TEMP_COUNTER: AtomicU64 = AtomicU64::new(0);

/// The file a write to `path` lands in: `path` itself, or the end of its chain of
/// symbolic links (relative links resolved against the link's folder). A link to a file
/// not yet there resolves to where that file would be.
pub fn resolve(path: &Path) -> io::Result<PathBuf> {
    let mut at = path.to_path_buf();
    for _ in 0..MAX_LINKS {
        match fs::symlink_metadata(&at) {
            Ok(meta) if meta.file_type().is_symlink() => {
                let target = fs::read_link(&at)?;
                at = if target.is_absolute() {
                    target
                } else {
                    at.parent().unwrap_or(Path::new("")).join(target)
                };
            }
            _ => return Ok(at),
        }
    }
    Err(io::Error::other(format!(
        "more than {MAX_LINKS} symbolic links in a row"
    )))
}

/// Writes `bytes` to `path` atomically (see the module notes).
pub fn write(path: &Path, bytes: &[u8]) -> Result<(), WriteError> {
    let io_error = |source| WriteError::Io {
        path: path.to_path_buf(),
        source,
    };
    let target = resolve(path).map_err(io_error)?;
    let permissions = match fs::metadata(&target) {
        Ok(meta) if meta.is_file() => {
            if meta.permissions().readonly() {
                return Err(WriteError::ReadOnly {
                    path: path.to_path_buf(),
                });
            }
            Some(meta.permissions())
        }
        Ok(meta) => {
            return Err(WriteError::NotAFile {
                path: path.to_path_buf(),
                what: if meta.is_dir() {
                    "a folder"
                } else {
                    "not a regular file"
                },
            });
        }
        Err(e) if e.kind() == io::ErrorKind::NotFound => None,
        Err(e) => return Err(io_error(e)),
    };
    let Some(name) = target.file_name().map(|n| n.to_string_lossy().into_owned()) else {
        return Err(WriteError::NoFileName {
            path: path.to_path_buf(),
        });
    };
    let dir = match target.parent() {
        Some(parent) if !parent.as_os_str().is_empty() => parent.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let (temp, mut file) = create_temp(&dir, &name).map_err(io_error)?;
    let written = (|| {
        if let Some(p) = permissions {
            file.set_permissions(p)?;
        }
        file.write_all(bytes)?;
        file.sync_all()?;
        drop(file);
        fs::rename(&temp, &target)
    })();
    if let Err(e) = written {
        // Nothing else to undo: the target was never touched.
        let _ = fs::remove_file(&temp);
        return Err(io_error(e));
    }
    // Make the rename itself durable. The data is already in place under its name, so a
    // platform that cannot open or sync a folder gets no error for it.
    #[cfg(unix)]
    if let Ok(d) = fs::File::open(&dir) {
        let _ = d.sync_all();
    }
    Ok(())
}

/// A new, exclusively created temporary file in `dir` named after `name`.
fn create_temp(dir: &Path, name: &str) -> io::Result<(PathBuf, fs::File)> {
    let mut last = None;
    for _ in 0..16 {
        let temp = dir.join(format!(
            ".{name}.{}-{}.tmp",
            std::process::id(),
            TEMP_COUNTER.fetch_add(1, Ordering::Relaxed)
        ));
        match fs::OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&temp)
        {
            Ok(file) => return Ok((temp, file)),
            Err(e) if e.kind() == io::ErrorKind::AlreadyExists => last = Some(e),
            Err(e) => return Err(e),
        }
    }
    Err(last.unwrap_or_else(|| io::Error::other("no free temporary file name")))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn names(dir: &Path) -> Vec<String> {
        let mut names: Vec<String> = fs::read_dir(dir)
            .map(|r| {
                r.filter_map(|e| e.ok().map(|e| e.file_name().to_string_lossy().into_owned()))
                    .collect()
            })
            .unwrap_or_default();
        names.sort();
        names
    }

    #[test]
    fn writes_replace_and_leave_no_temporary_file() {
        let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        let path = dir.path().join("a.txt");
        write(&path, b"one").unwrap_or_else(|e| panic!("{e}"));
        write(&path, b"two").unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(fs::read(&path).ok().as_deref(), Some(&b"two"[..]));
        assert_eq!(names(dir.path()), ["a.txt"]);
    }

    #[cfg(unix)]
    #[test]
    fn permissions_are_kept_and_links_followed() {
        use std::os::unix::fs::{PermissionsExt, symlink};
        let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        let real = dir.path().join("real.txt");
        fs::write(&real, "old").unwrap_or_else(|e| panic!("{e}"));
        fs::set_permissions(&real, fs::Permissions::from_mode(0o640))
            .unwrap_or_else(|e| panic!("{e}"));
        let link = dir.path().join("link.txt");
        symlink("real.txt", &link).unwrap_or_else(|e| panic!("{e}"));
        write(&link, b"new").unwrap_or_else(|e| panic!("{e}"));
        // The link is still a link, and its target holds the new bytes with its mode.
        let meta = fs::symlink_metadata(&link).unwrap_or_else(|e| panic!("{e}"));
        assert!(meta.file_type().is_symlink());
        assert_eq!(fs::read_to_string(&real).ok().as_deref(), Some("new"));
        let mode = fs::metadata(&real)
            .map(|m| m.permissions().mode() & 0o777)
            .ok();
        assert_eq!(mode, Some(0o640));
    }

    #[test]
    fn read_only_files_and_folders_are_refused_untouched() {
        let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        let path = dir.path().join("locked.txt");
        fs::write(&path, "keep").unwrap_or_else(|e| panic!("{e}"));
        let mut perms = fs::metadata(&path)
            .unwrap_or_else(|e| panic!("{e}"))
            .permissions();
        perms.set_readonly(true);
        fs::set_permissions(&path, perms).unwrap_or_else(|e| panic!("{e}"));
        let e = write(&path, b"lost");
        assert!(matches!(e, Err(WriteError::ReadOnly { .. })), "{e:?}");
        assert!(
            e.is_err_and(|e| e.to_string().contains("read-only")),
            "the message says why"
        );
        assert_eq!(fs::read_to_string(&path).ok().as_deref(), Some("keep"));
        let e = write(dir.path(), b"x");
        assert!(matches!(e, Err(WriteError::NotAFile { .. })), "{e:?}");
        assert_eq!(names(dir.path()), ["locked.txt"]);
    }
}
