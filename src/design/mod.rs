//! The design file: one versioned RON document holding everything a designer enters
//! for one bowed-strip segment (strips, hub, bore, friction, actuator, duty).
//!
//! The rooms: `types` (the file's types and the demo default), `limits` (the plausible
//! ranges, [`limits`], and validation), `read` (bounded loading and parsing with
//! positioned messages), `write` (RON text, edits in place that keep a file's comments,
//! atomic saves), `positions` (the scanner that finds each value in the text) and
//! `error` ([`DesignError`] and how messages print numbers). It refuses only malformed
//! input and values outside the plausible ranges; a design that merely fails a check
//! (does not fit, holds too little, is over-stressed) loads, and the checks judge it.
//! Every length in the file is in millimetres, and every field name carries its unit.

mod error;
mod limits;
mod positions;
mod read;
mod types;
mod write;

pub use error::{DesignError, show_number};
pub use limits::{
    FieldLimit, LimitBasis, MAX_FILE_BYTES, MAX_NESTING, MAX_TITLE_CHARS, limit, limits,
};
pub use positions::locate;
pub use read::{decode, load, parse, read_bytes, read_text};
pub use types::{
    Actuator, Bore, Calibration, Design, Duty, Ends, FORMAT_VERSION, MaterialChoice, Operating,
    PipeRef, Stiffness, Strip,
};
pub use write::{Rewrite, SaveText, edit_in_place, save_atomic, save_text, to_ron};
