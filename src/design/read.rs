//! Reading a design: [`load`] refuses what is not a regular file or is larger than
//! [`MAX_FILE_BYTES`] before reading it (and reads at most one byte past the limit);
//! [`parse`] skips a UTF-8 byte-order mark, refuses nesting deeper than [`MAX_NESTING`]
//! in one linear pass before the parser or the position finder runs, parses, validates
//! against [`super::limits`], and puts `line:column` on every refusal it can place.

use std::fs;
use std::io::Read;
use std::path::Path;

use super::error::{DesignError, read_error};
use super::limits::{MAX_FILE_BYTES, MAX_NESTING};
use super::positions::{
    declared_format, entry_at, locate, offset_of, string_across_lines, too_deep, top_level_end,
};
use super::types::{Design, FORMAT_VERSION};

pub(crate) fn ron_options() -> ron::Options {
    ron::Options::default().with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
}

/// Fields whose values are whole numbers (the parser reads them as integers).
const WHOLE_FIELDS: [&str; 2] = ["format", "strip.count"];

/// Parses and validates a design text. Every refusal that belongs to a place in the text
/// carries its line and column.
pub fn parse(text: &str) -> Result<Design, DesignError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    // Linear and before anything else: the parser and the position finder would spend
    // time and memory on deep nesting before refusing it.
    let (deep, unclosed) = too_deep(text, MAX_NESTING);
    if let Some((line, column)) = deep {
        return Err(DesignError::Syntax {
            line,
            column,
            message: format!(
                "brackets nested deeper than {MAX_NESTING} levels; a design needs no more than five"
            ),
        });
    }
    if let Some(open) = unclosed {
        // A string that runs over a line end before it is where the quote is missing;
        // the one left open at the end only inherited the shift.
        let at = offset_of(text, open.line, open.column);
        if let Some((line, column)) = string_across_lines(text, at) {
            return Err(DesignError::Syntax {
                line,
                column,
                message: "this string runs over the end of its line: its closing quote is missing"
                    .to_string(),
            });
        }
        return Err(DesignError::Syntax {
            line: open.line,
            column: open.column,
            message: format!("this {} is never closed", open.what),
        });
    }
    // A file of another format may have fields this version does not know: say so
    // before ron complains about them.
    if let Some(found) = declared_format(text)
        && found != FORMAT_VERSION
    {
        return Err(at_field(text, DesignError::UnknownFormat { found }));
    }
    let design: Design = ron_options()
        .from_str(text)
        .map_err(|e| syntax_error(text, &e))?;
    match design.validate() {
        Ok(()) => Ok(design),
        Err(DesignError::OutOfRange {
            field,
            value,
            min,
            max,
            ..
        }) => {
            // `operating.Pull` is the value inside `operating: Pull(...)`.
            let position = locate(text, &field).or_else(|| {
                field
                    .rsplit_once('.')
                    .and_then(|(parent, _)| locate(text, parent))
            });
            Err(DesignError::OutOfRange {
                field,
                value,
                min,
                max,
                line: position.map(|p| p.0),
                column: position.map(|p| p.1),
            })
        }
        Err(other) => Err(at_field(text, other)),
    }
}

/// `error` at the position of the field it is about, when the text spells it out.
fn at_field(text: &str, error: DesignError) -> DesignError {
    // A field that is missing altogether (the operating point) is placed where the
    // design ends, as the parser places a missing field.
    let position = error
        .field()
        .and_then(|f| locate(text, f))
        .or_else(|| (error.field() == Some("operating")).then(|| top_level_end(text))?);
    match position {
        Some((line, column)) => DesignError::Positioned {
            line,
            column,
            error: Box::new(error),
        },
        None => error,
    }
}

/// ron's error, with the message made plain where ron's would mislead: a number that
/// is not whole where a whole number is expected, a number with a unit or other text
/// stuck to it, a string whose closing quote is missing (ron notices only lines later).
fn syntax_error(text: &str, e: &ron::error::SpannedError) -> DesignError {
    // ron's span starts at the offending token (for a missing field: at the closing
    // parenthesis), which is where an editor should put the cursor.
    let (line, column) = (e.span.start.line, e.span.start.col);
    let offset = offset_of(text, line, column);
    if let Some(entry) = entry_at(text, offset).filter(|e| e.leaf) {
        let written = &text[entry.value.clone()];
        let numeric = written
            .bytes()
            .next()
            .is_some_and(|b| b.is_ascii_digit() || b == b'-' || b == b'+' || b == b'.');
        let plain = written.replace('_', "").parse::<f64>().is_ok();
        // One token only: a value running into the next line is a missing comma.
        let numeric = numeric && !written.contains(char::is_whitespace);
        let message = if numeric && WHOLE_FIELDS.contains(&entry.path.as_str()) {
            Some(format!(
                "{} = {written}: a whole number is expected, written without a decimal point or exponent",
                entry.path
            ))
        } else if numeric && !plain {
            Some(format!(
                "{} = {written}: a plain number is expected, without a unit or other text (the unit is in the field's name)",
                entry.path
            ))
        } else {
            None
        };
        if let Some(message) = message {
            return DesignError::Syntax {
                line: entry.line,
                column: entry.column,
                message,
            };
        }
    }
    if let Some((line, column)) = string_across_lines(text, offset) {
        return DesignError::Syntax {
            line,
            column,
            message: format!(
                "this string runs over the end of its line: its closing quote is missing ({} further on)",
                e.code
            ),
        };
    }
    DesignError::Syntax {
        line,
        column,
        message: e.code.to_string(),
    }
}

/// What a path that is not a regular file names, for the message.
fn what_it_is(meta: &fs::Metadata) -> &'static str {
    let kind = meta.file_type();
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileTypeExt;
        if kind.is_fifo() {
            return "a named pipe (FIFO)";
        }
        if kind.is_char_device() || kind.is_block_device() {
            return "a device";
        }
        if kind.is_socket() {
            return "a socket";
        }
    }
    if kind.is_dir() {
        "a folder"
    } else {
        "not a regular file"
    }
}

/// The text of a design file: refused unless it is a regular file of at most
/// [`MAX_FILE_BYTES`], never reading more than one byte past that limit.
pub fn read_text(path: &Path) -> Result<String, DesignError> {
    decode(read_bytes(path)?)
}

/// The bytes of a design file as text; bytes that are not UTF-8 are refused at their
/// line and column.
pub fn decode(bytes: Vec<u8>) -> Result<String, DesignError> {
    String::from_utf8(bytes).map_err(|e| {
        let valid = e.utf8_error().valid_up_to();
        let text = String::from_utf8_lossy(&e.as_bytes()[..valid]);
        let line = text.matches('\n').count() + 1;
        let column = text.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
        DesignError::Syntax {
            line,
            column,
            message: "the file is not UTF-8 text (a design file is plain text)".to_string(),
        }
    })
}

/// The bytes of a design file, with the same refusals as [`read_text`].
pub fn read_bytes(path: &Path) -> Result<Vec<u8>, DesignError> {
    // `metadata` follows links and opens nothing, so a FIFO never blocks here.
    let meta = fs::metadata(path).map_err(|e| read_error(path, e))?;
    if !meta.is_file() {
        return Err(DesignError::NotAFile {
            path: path.to_path_buf(),
            what: what_it_is(&meta),
        });
    }
    let too_large = |bytes| DesignError::TooLarge {
        path: path.to_path_buf(),
        bytes,
        max_bytes: MAX_FILE_BYTES,
    };
    if meta.len() > MAX_FILE_BYTES {
        return Err(too_large(meta.len()));
    }
    let file = fs::File::open(path).map_err(|e| read_error(path, e))?;
    // The file may have been swapped or grown since: read no more than the limit + 1.
    let mut bytes = Vec::with_capacity(meta.len() as usize);
    file.take(MAX_FILE_BYTES + 1)
        .read_to_end(&mut bytes)
        .map_err(|e| read_error(path, e))?;
    if bytes.len() as u64 > MAX_FILE_BYTES {
        return Err(too_large(bytes.len() as u64));
    }
    Ok(bytes)
}

/// Reads and parses a design file.
pub fn load(path: &Path) -> Result<Design, DesignError> {
    parse(&read_text(path)?)
}
