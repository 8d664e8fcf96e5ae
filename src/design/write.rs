//! Writing a design: [`to_ron`] (the whole design as pretty RON), [`edit_in_place`] (the
//! text of a file that was opened, with only the changed values replaced, so its
//! comments and layout stay), [`save_text`] (which of the two a save writes) and the
//! saves themselves through the one atomic writer ([`crate::atomic`]).

use std::collections::BTreeMap;
use std::path::Path;

use super::error::DesignError;
use super::positions::{Entry, entries};
use super::read::parse;
use super::types::Design;

/// The design as pretty RON: fields in declaration order, four-space indent, the
/// top-level struct named `Design`. Parsing the result gives back an equal design. An
/// error (never seen for these plain structs) is returned rather than a text that a save
/// would write over the user's file.
pub fn to_ron(design: &Design) -> Result<String, DesignError> {
    let config = ron::ser::PrettyConfig::new()
        .indentor("    ")
        .new_line("\n")
        .struct_names(false);
    ron::ser::to_string_pretty(design, config)
        .map(|body| format!("Design{body}\n"))
        .map_err(|e| DesignError::Unwritable {
            message: e.to_string(),
        })
}

/// Why a change could not be placed in the original text: the save writes the whole
/// design instead, and the file's comments and layout go.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Rewrite {
    /// One line for the user, e.g. "strip.ends is not written in the file".
    pub why: String,
}

/// What a save writes.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum SaveText {
    /// The original text with the changed values replaced: comments and layout kept.
    InPlace(String),
    /// The whole design written afresh ([`to_ron`]); `why` says why when there was an
    /// original whose comments and layout now go, `None` for a new file.
    Whole { text: String, why: Option<Rewrite> },
}

impl SaveText {
    /// The text to write.
    pub fn text(&self) -> &str {
        match self {
            SaveText::InPlace(text) | SaveText::Whole { text, .. } => text,
        }
    }

    /// Whether comments or layout of the original are lost by this save: a whole
    /// rewrite of an original that was not already exactly what [`to_ron`] writes.
    pub fn loses_layout(&self) -> bool {
        matches!(self, SaveText::Whole { why: Some(_), .. })
    }
}

/// What saving `design` over a file whose text was `original` writes: the original with
/// the changed values replaced when every change has a place there, else the whole design.
pub fn save_text(original: Option<&str>, design: &Design) -> Result<SaveText, DesignError> {
    let design = &with_pipe_bore(design);
    let whole = to_ron(design)?;
    let Some(original) = original else {
        return Ok(SaveText::Whole {
            text: whole,
            why: None,
        });
    };
    match edit_in_place(original, design).or_else(|e| {
        // A file that leaves `bore.diameter_mm` out beside its pipe size keeps it out.
        let mut kept = design.clone();
        kept.bore.diameter_mm = parse(original.strip_prefix('\u{feff}').unwrap_or(original))
            .ok()
            .filter(|before| before.bore.pipe.is_some() && design.bore.pipe.is_some())
            .ok_or_else(|| e.clone())?
            .bore
            .diameter_mm;
        edit_in_place(original, &kept).map_err(|_| e)
    }) {
        Ok(text) => Ok(SaveText::InPlace(text)),
        // Nothing to lose when the original is what a rewrite writes anyway.
        Err(_) if original.strip_prefix('\u{feff}').unwrap_or(original) == whole => {
            Ok(SaveText::InPlace(whole))
        }
        Err(why) => Ok(SaveText::Whole {
            text: whole,
            why: Some(why),
        }),
    }
}

/// `design` with `bore.diameter_mm` set to the bore its pipe size gives, when it names a
/// known one: the field is ignored then, and a saved file should not show a stale value
/// (such as the demo's 70 mm beside a pipe whose bore is 77.92 mm).
fn with_pipe_bore(design: &Design) -> Design {
    let mut design = design.clone();
    if design.bore.pipe.is_some()
        && let Ok(bore_mm) = design.bore.nominal_mm()
    {
        design.bore.diameter_mm = bore_mm;
    }
    design
}

/// Leaf values of a text written by [`to_ron`], by path, and the shape around them (every
/// path with whether it is a leaf, and the variant name of each nested value).
struct Shape {
    leaves: BTreeMap<String, String>,
    outline: Vec<(String, bool, String)>,
}

fn shape(text: &str) -> Shape {
    let mut leaves = BTreeMap::new();
    let mut outline = Vec::new();
    for Entry {
        path, value, leaf, ..
    } in entries(text)
    {
        let written = &text[value];
        let variant = if leaf {
            String::new()
        } else {
            written.split('(').next().unwrap_or("").trim().to_string()
        };
        if leaf {
            leaves.insert(path.clone(), written.to_string());
        }
        outline.push((path, leaf, variant));
    }
    Shape { leaves, outline }
}

/// `original` with every value that differs between the design it holds and `design`
/// replaced in place, so comments, order and layout stay; an optional top-level field the
/// file lacks (`calibration`) is added after its last field. Refused (with the reason)
/// when the original does not parse, when the change is structural (another actuator or
/// material variant, a pipe added or removed), when a changed value is not written in the
/// original (a default left out), or when the edited text would not read back as `design`.
pub fn edit_in_place(original: &str, design: &Design) -> Result<String, Rewrite> {
    let rewrite = |why: String| Rewrite { why };
    let text = original.strip_prefix('\u{feff}').unwrap_or(original);
    let bom = &original[..original.len() - text.len()];
    let before =
        parse(text).map_err(|e| rewrite(format!("the file as opened does not load ({e})")))?;
    let old = shape(&to_ron(&before).map_err(|e| rewrite(e.to_string()))?);
    let whole = to_ron(design).map_err(|e| rewrite(e.to_string()))?;
    let new = shape(&whole);
    // Optional top-level fields the design has and the file does not: added at its end.
    let added: Vec<&str> = INSERTABLE
        .into_iter()
        .filter(|k| new.has(k) && !old.has(k))
        .collect();
    let outline: Vec<_> = new
        .outline
        .iter()
        .filter(|(p, ..)| !added.iter().any(|k| under(p, k)))
        .cloned()
        .collect();
    if old.outline != outline {
        return Err(rewrite(
            "the change is to the design's structure (another actuator, material or bore kind)"
                .to_string(),
        ));
    }
    let written: BTreeMap<String, Entry> = entries(text)
        .into_iter()
        .filter(|e| e.leaf)
        .map(|e| (e.path.clone(), e))
        .collect();
    let mut edits: Vec<(std::ops::Range<usize>, &str)> = Vec::new();
    for (path, value) in &new.leaves {
        if old.leaves.get(path) == Some(value) || added.iter().any(|k| under(path, k)) {
            continue;
        }
        let Some(entry) = written.get(path) else {
            return Err(rewrite(format!("{path} is not written in the file")));
        };
        edits.push((entry.value.clone(), value));
    }
    let insertion = appended(text, &whole, &added).map_err(rewrite)?;
    if let Some((at, insert)) = &insertion {
        edits.push((*at..*at, insert.as_str()));
    }
    edits.sort_by_key(|(span, _)| std::cmp::Reverse(span.start));
    let mut edited = text.to_string();
    for (span, value) in edits {
        edited.replace_range(span, value);
    }
    match parse(&edited) {
        Ok(back) if back == *design => Ok(format!("{bom}{edited}")),
        _ => Err(rewrite(
            "the edited text would not read back as the design".to_string(),
        )),
    }
}

/// Optional top-level fields that a save adds at the end of a file that lacks them, so the
/// file's comments and layout stay.
const INSERTABLE: [&str; 1] = ["calibration"];

/// Whether `path` is `key` or lies under it.
fn under(path: &str, key: &str) -> bool {
    path == key
        || path
            .strip_prefix(key)
            .is_some_and(|rest| rest.starts_with('.'))
}

impl Shape {
    fn has(&self, key: &str) -> bool {
        self.outline.iter().any(|(p, ..)| p == key)
    }
}

/// Where and what to insert in `text` so it also holds the top-level fields `added`, as
/// `whole` (the design written afresh) spells them: after the file's last top-level
/// entry (and its comma, or with one), one line each. `None` when nothing is added.
fn appended(text: &str, whole: &str, added: &[&str]) -> Result<Option<(usize, String)>, String> {
    if added.is_empty() {
        return Ok(None);
    }
    let last = entries(text)
        .into_iter()
        .filter(|e| !e.path.contains('.'))
        .max_by_key(|e| e.value.end)
        .ok_or_else(|| "the file has no field to add after".to_string())?;
    let fresh = entries(whole);
    let mut lines = String::new();
    for key in added {
        let entry = fresh
            .iter()
            .find(|e| e.path == *key)
            .ok_or_else(|| format!("{key} could not be written"))?;
        lines.push_str(&format!("\n    {key}: {},", &whole[entry.value.clone()]));
    }
    let rest = &text[last.value.end..];
    let gap = rest.len() - rest.trim_start().len();
    Ok(Some(if rest.trim_start().starts_with(',') {
        (last.value.end + gap + 1, lines)
    } else {
        (last.value.end, format!(",{lines}"))
    }))
}

/// Writes the design to `path` through the atomic writer ([`crate::atomic::write`]):
/// the whole design as [`to_ron`] writes it. The design is written as given (one that
/// does not validate is still saved, so no edit is lost); callers that want only valid
/// files call [`Design::validate`] first.
pub fn save_atomic(path: &Path, design: &Design) -> Result<(), DesignError> {
    let text = to_ron(design)?;
    crate::atomic::write(path, text.as_bytes())?;
    Ok(())
}
