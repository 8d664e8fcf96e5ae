//! Why a design could not be loaded, saved or accepted ([`DesignError`]), and how its
//! messages print numbers and ranges: one way everywhere, with magnitudes kept readable
//! ([`show_number`]: no 300-digit expansions of `1e-300`).

use std::io;
use std::path::{Path, PathBuf};

use super::limits::limit;
use super::types::FORMAT_VERSION;
use crate::atomic::WriteError;

/// Why a design could not be loaded, saved or accepted.
#[derive(Debug, thiserror::Error)]
pub enum DesignError {
    /// The file could not be read (reported with the path and the system's reason).
    #[error("cannot read {}: {source}", path.display())]
    Io {
        path: PathBuf,
        source: std::io::Error,
    },
    /// The file could not be written; the old file, if any, is untouched.
    #[error(transparent)]
    Write(#[from] WriteError),
    /// The path names something other than a regular file (a folder, a FIFO, a device).
    #[error("cannot read {}: it is {what}, not a design file", path.display())]
    NotAFile { path: PathBuf, what: &'static str },
    /// The file is larger than any design file (read no further than the limit).
    #[error(
        "cannot read {}: {} is larger than a design file may be (at most {max_bytes} bytes)",
        path.display(),
        size_text(*bytes, *max_bytes)
    )]
    TooLarge {
        path: PathBuf,
        /// The size found (at least `max_bytes + 1` when only that much was read).
        bytes: u64,
        max_bytes: u64,
    },
    /// The text is not a well-formed design: RON syntax, an unknown or missing field, a
    /// wrong type, text that is not UTF-8, brackets nested too deep.
    #[error("{line}:{column}: {message}")]
    Syntax {
        line: usize,
        column: usize,
        message: String,
    },
    /// A number outside its plausible range (NaN and infinities included).
    #[error("{}", out_of_range_text(field, *value, *min, *max, *line, *column))]
    OutOfRange {
        field: String,
        value: f64,
        min: f64,
        max: f64,
        line: Option<usize>,
        column: Option<usize>,
    },
    /// A `format` number this version does not know.
    #[error("format = {found} is not supported; this version reads format {FORMAT_VERSION}")]
    UnknownFormat { found: u32 },
    /// A material grade id missing from the material table.
    #[error("strip.material: unknown grade {id:?}; known grades: {}", known.join(", "))]
    UnknownGrade { id: String, known: Vec<String> },
    /// A pipe size missing from the pipe table.
    #[error("bore.pipe: no pipe of NPS {nps:?} schedule {schedule:?} in the pipe table")]
    UnknownPipe { nps: String, schedule: String },
    /// Values that are each in range but do not make sense together, or a text field
    /// that must not be empty.
    #[error("{field}: {message}")]
    Invalid { field: String, message: String },
    /// The design could not be turned into RON text (nothing is written).
    #[error("cannot write this design as RON: {message}")]
    Unwritable { message: String },
    /// Another error, at the position in the text where the offending value is written.
    #[error("{line}:{column}: {error}")]
    Positioned {
        line: usize,
        column: usize,
        error: Box<DesignError>,
    },
}

impl DesignError {
    /// The message prefixed with the file name, in the `FILE:LINE:COLUMN: message` form
    /// when the position is known, else `FILE: message`.
    pub fn in_file(&self, path: &Path) -> String {
        match self {
            // Already name their file.
            DesignError::Io { .. }
            | DesignError::Write(_)
            | DesignError::NotAFile { .. }
            | DesignError::TooLarge { .. } => self.to_string(),
            _ if self.position().is_some() => format!("{}:{self}", path.display()),
            _ => format!("{}: {self}", path.display()),
        }
    }

    /// `(line, column)` in the design text, 1-based, when known.
    pub fn position(&self) -> Option<(usize, usize)> {
        match self {
            DesignError::Syntax { line, column, .. }
            | DesignError::Positioned { line, column, .. } => Some((*line, *column)),
            DesignError::OutOfRange {
                line: Some(line),
                column: Some(column),
                ..
            } => Some((*line, *column)),
            _ => None,
        }
    }

    /// The error without its position wrapper: what to match on.
    pub fn kind(&self) -> &DesignError {
        match self {
            DesignError::Positioned { error, .. } => error.kind(),
            other => other,
        }
    }

    /// The dotted field path this error is about, when it is about one field.
    pub(crate) fn field(&self) -> Option<&str> {
        match self {
            DesignError::OutOfRange { field, .. } | DesignError::Invalid { field, .. } => {
                Some(field)
            }
            DesignError::UnknownFormat { .. } => Some("format"),
            DesignError::UnknownGrade { .. } => Some("strip.material"),
            DesignError::UnknownPipe { .. } => Some("bore.pipe"),
            _ => None,
        }
    }
}

/// A number as messages print it: the shortest text that reads back to the same value
/// for ordinary magnitudes (`0.02`, `14.65`, `250000`), and the exponent form past them
/// (`1e6`, `6.5e19`, `1e-300`), so that no message holds hundreds of digits.
pub fn show_number(v: f64) -> String {
    let magnitude = v.abs();
    if v == 0.0 || !v.is_finite() || (1e-4..1e6).contains(&magnitude) {
        // `-0` prints as `0`.
        if v == 0.0 {
            "0".to_string()
        } else {
            format!("{v}")
        }
    } else {
        format!("{v:e}")
    }
}

fn size_text(bytes: u64, max_bytes: u64) -> String {
    if bytes > max_bytes.saturating_add(1) {
        format!("its size, {bytes} bytes,")
    } else {
        "it".to_string()
    }
}

fn out_of_range_text(
    field: &str,
    value: f64,
    min: f64,
    max: f64,
    line: Option<usize>,
    column: Option<usize>,
) -> String {
    let row = limit(field);
    let unit = row.map_or("", |l| l.unit);
    let range = match row {
        Some(row) => row.range_text(max),
        None => format!("{} to {}", show_number(min), with_unit(max, unit)),
    };
    let position = match (line, column) {
        (Some(line), Some(column)) => format!("{line}:{column}: "),
        _ => String::new(),
    };
    if value.is_finite() {
        format!(
            "{position}{field} = {} is outside the allowed range {range}",
            with_unit(value, unit)
        )
    } else {
        format!("{position}{field} = {value} is not a finite number; the allowed range is {range}")
    }
}

/// `v` and its unit, e.g. `0.02 mm`, or the bare number for pure numbers.
pub(crate) fn with_unit(v: f64, unit: &str) -> String {
    if unit.is_empty() {
        show_number(v)
    } else {
        format!("{} {unit}", show_number(v))
    }
}

/// An I/O error while reading `path`.
pub(crate) fn read_error(path: &Path, source: io::Error) -> DesignError {
    DesignError::Io {
        path: path.to_path_buf(),
        source,
    }
}
