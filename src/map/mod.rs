//! The design map: two numeric inputs of a design on the axes, each over a range, and for
//! every design of the grid the verdict `check` gives it (the limiting check, that check's
//! margin, whether every check passes, and every check's margin for hover).
//!
//! An axis names a field by its dotted path in the design file (`strip.thickness_mm`,
//! `strip.count`, `duty.holding_force_n`, ...); the fields a map may vary are the rows of
//! [`design::limits`] present in the design ([`fields`]). A field is set generically: the
//! design goes through a `serde_json::Value` once, the two values are written at their
//! paths and the design is read back, so every cell is the design `check` would read from
//! a file with those two values. Whole-number fields (`strip.count`, `duty.cycles`) take
//! whole steps. Ranges are checked against `design::limits()` at the grid's corners, which
//! covers every bound of that table (each is linear in the axis values).
//!
//! Cells are evaluated in parallel (rayon), coarse to fine: first every 16th row and
//! column, then every 8th, and so on, so that a first picture of the whole plane exists
//! after a few hundred cells. [`MapSpec::compute`] reports progress between chunks and
//! stops when its cancel flag is raised. [`DesignMap::zero_line`] traces the line where the
//! smallest margin is zero (marching squares) and [`palette`] gives each check a colour.
//! The module does no I/O and knows nothing of the GUI or the PDF writer; `command` is the
//! `map` sub-command of the command line.

pub mod command;
mod contour;
pub mod palette;

use std::fmt;
use std::str::FromStr;
use std::sync::atomic::{AtomicBool, Ordering};

use rayon::prelude::*;
use serde_json::Value;

use crate::checks::{self, Check, MarginUnit};
use crate::design::{self, Design, DesignError, FieldLimit};
use crate::segment::Segment;

/// Most points on one axis.
pub const MAX_POINTS: usize = 200;

/// The strides of the coarse-to-fine levels, coarsest first; the last is every cell.
pub const LEVEL_STRIDES: [usize; 5] = [16, 8, 4, 2, 1];

/// Cells evaluated between two progress reports (and cancel checks).
const CHUNK: usize = 96;

/// What a check is known by in a map cell (the `id` that `check --json` prints).
pub type CheckKey = &'static str;

/// Which of the two axes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum AxisName {
    /// The horizontal axis (`--x`).
    X,
    /// The vertical axis (`--y`).
    Y,
}

impl fmt::Display for AxisName {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            AxisName::X => "x",
            AxisName::Y => "y",
        })
    }
}

/// Why a map could not be made.
#[derive(Debug, thiserror::Error)]
pub enum MapError {
    /// The axis text is not `FIELD:FROM:TO:N`, or one of its numbers is not a number.
    #[error("{text:?} is not FIELD:FROM:TO:N ({message})")]
    Syntax {
        /// The text as given.
        text: String,
        /// What is wrong with it.
        message: String,
    },
    /// The field is not one the map can vary in this design (unknown, or not present in
    /// it, such as a custom-material field on a design with a graded material).
    #[error(
        "{axis} axis: {field:?} is not a field this design's map can vary; allowed: {}",
        allowed.join(", ")
    )]
    UnknownField {
        /// Which axis named it.
        axis: AxisName,
        /// The field as given.
        field: String,
        /// The fields that can be varied, in the order of `design::limits()`.
        allowed: Vec<&'static str>,
    },
    /// Both axes name the same field.
    #[error("x and y both vary {field}; choose two different fields")]
    SameField {
        /// The field named twice.
        field: &'static str,
    },
    /// The number of points is outside what the axis allows.
    #[error("{axis} axis: {points} points is outside the allowed range: {allowed}")]
    Points {
        /// Which axis.
        axis: AxisName,
        /// The number asked for.
        points: usize,
        /// The allowed range in words.
        allowed: String,
    },
    /// The ends of an axis do not make a range for its field (not finite, not whole for a
    /// whole-number field, equal ends with several points).
    #[error("{axis} axis: {field} from {from} to {to}: {message}")]
    Range {
        /// Which axis.
        axis: AxisName,
        /// The field.
        field: &'static str,
        /// First value.
        from: f64,
        /// Last value.
        to: f64,
        /// What is wrong, with the allowed range.
        message: String,
    },
    /// A design of the grid is outside the plausible ranges of `design::limits()`.
    #[error("{at}: {source}")]
    OutOfRange {
        /// Which axis end or grid corner, in words.
        at: String,
        /// The design file's own message (field, value, allowed range).
        source: DesignError,
    },
    /// The design could not be rebuilt with a cell's values (a bug, not bad input).
    #[error("the design at {at} could not be built: {message}")]
    Rebuild {
        /// The cell, in words.
        at: String,
        /// What went wrong.
        message: String,
    },
    /// The cancel flag was raised before the map was finished.
    #[error("the map was cancelled")]
    Cancelled,
}

// ---------------------------------------------------------------------------------------
// Axes.

/// An axis as asked for: a field path, the first and last value and the number of points
/// (both ends included). Parsed from `FIELD:FROM:TO:N`; not yet checked against a design.
#[derive(Clone, Debug, PartialEq)]
pub struct AxisSpec {
    /// Dotted field path as in the design file.
    pub field: String,
    /// First value, in the field's unit.
    pub from: f64,
    /// Last value (included).
    pub to: f64,
    /// Number of points, 1 to [`MAX_POINTS`].
    pub points: usize,
}

impl FromStr for AxisSpec {
    type Err = MapError;

    fn from_str(text: &str) -> Result<AxisSpec, MapError> {
        let syntax = |message: String| MapError::Syntax {
            text: text.to_string(),
            message,
        };
        let parts: Vec<&str> = text.split(':').map(str::trim).collect();
        let [field, from, to, points] = parts[..] else {
            return Err(syntax(format!(
                "four parts separated by ':', found {}",
                parts.len()
            )));
        };
        if field.is_empty() {
            return Err(syntax("the field name is empty".to_string()));
        }
        let number = |what: &str, s: &str| {
            s.parse::<f64>()
                .map_err(|_| syntax(format!("{what} {s:?} is not a number")))
        };
        let points = points.parse::<usize>().map_err(|_| {
            syntax(format!(
                "N {points:?} is not a whole number from 1 to {MAX_POINTS}"
            ))
        })?;
        Ok(AxisSpec {
            field: field.to_string(),
            from: number("FROM", from)?,
            to: number("TO", to)?,
            points,
        })
    }
}

impl fmt::Display for AxisSpec {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{}:{}:{}:{}",
            self.field, self.from, self.to, self.points
        )
    }
}

impl AxisSpec {
    /// A useful span around the design's own value of `field`: half to one and a half
    /// times it (for a zero value, the lower part of the field's range), within the
    /// field's limits; whole-number fields get no more points than whole numbers in the
    /// span. `None` when the map cannot vary `field` in this design.
    pub fn around(base: &Design, field: &str, points: usize) -> Option<AxisSpec> {
        let row = fields(base).into_iter().find(|r| r.field == field)?;
        let json = design_json(base)?;
        let (value, whole) = read_number(&json, row.field)?;
        let max = row.max_for(base);
        let (mut from, mut to) = if value > 0.0 {
            (0.5 * value, 1.5 * value)
        } else {
            (row.min, row.min + 0.1 * (max - row.min))
        };
        // Keep clear of excluded ends by a hair of the span.
        let hair = 1e-6 * (to - from).abs().max(f64::MIN_POSITIVE);
        from = from.max(if row.min_excluded {
            row.min + hair
        } else {
            row.min
        });
        to = to.min(if row.max_excluded { max - hair } else { max });
        let mut points = points.clamp(1, MAX_POINTS);
        if whole {
            from = from.ceil();
            to = to.floor();
            points = points.min((to - from) as usize + 1);
        }
        if points < 2 || to <= from {
            return Some(AxisSpec {
                field: row.field.to_string(),
                from: value,
                to: value,
                points: 1,
            });
        }
        Some(AxisSpec {
            field: row.field.to_string(),
            from,
            to,
            points,
        })
    }
}

/// An axis checked against a design: its field's limit row, whether it takes whole
/// steps, and the values of its points.
#[derive(Clone, Debug, PartialEq)]
pub struct Axis {
    /// Dotted field path (a row of `design::limits()`).
    pub field: &'static str,
    /// Unit as printed after numbers; empty for pure numbers.
    pub unit: &'static str,
    /// One line saying what the field is.
    pub meaning: &'static str,
    /// Whether the field is a whole number (its points are whole numbers).
    pub whole: bool,
    /// The design's own value of the field (where the app marks the current design).
    pub current: f64,
    /// First value.
    pub from: f64,
    /// Last value (included).
    pub to: f64,
    /// The points, `from` first and `to` last, exactly.
    pub values: Vec<f64>,
}

impl Axis {
    /// Number of points.
    pub fn len(&self) -> usize {
        self.values.len()
    }

    /// Whether the axis has no points (never, for an axis made by [`MapSpec::new`]).
    pub fn is_empty(&self) -> bool {
        self.values.is_empty()
    }

    /// The field with its unit, for labels: `strip.thickness_mm (mm)`.
    pub fn label(&self) -> String {
        if self.unit.is_empty() {
            self.field.to_string()
        } else {
            format!("{} ({})", self.field, self.unit)
        }
    }
}

/// The `i`-th of `n` equally spaced values from `from` to `to`; both ends exact. Whole
/// axes round each point to the nearest whole number, so every step is a whole number.
fn spaced(from: f64, to: f64, i: usize, n: usize, whole: bool) -> f64 {
    if n <= 1 || i == 0 {
        return from;
    }
    if i + 1 >= n {
        return to;
    }
    let v = from + (to - from) * (i as f64 / (n - 1) as f64);
    if whole { v.round() } else { v }
}

/// The fields a map of `base` can vary: every row of `design::limits()` whose field the
/// design holds as a number (the actuator's and a custom material's fields depend on the
/// variant chosen), less the nominal bore diameter when a pipe size sets the bore.
pub fn fields(base: &Design) -> Vec<&'static FieldLimit> {
    let Some(json) = design_json(base) else {
        return Vec::new();
    };
    design::limits()
        .iter()
        .filter(|row| !(row.field == "bore.diameter_mm" && base.bore.pipe.is_some()))
        .filter(|row| read_number(&json, row.field).is_some())
        .collect()
}

// ---------------------------------------------------------------------------------------
// Setting a field by its dotted path.

fn design_json(design: &Design) -> Option<Value> {
    serde_json::to_value(design).ok()
}

/// An enum variant as serde writes it into JSON: an object with one key, the variant's
/// name (field names are snake case, variant names start with a capital).
fn variant_inner(map: &serde_json::Map<String, Value>) -> Option<&str> {
    let mut keys = map.keys();
    match (keys.next(), keys.next()) {
        (Some(k), None) if k.starts_with(|c: char| c.is_ascii_uppercase()) => Some(k.as_str()),
        _ => None,
    }
}

/// The value at a dotted path, looking through enum variants the way the file's dotted
/// names do (`actuator.lead_mm` is the `lead_mm` of `actuator: LeadScrew(...)`).
fn slot<'v>(value: &'v mut Value, path: &str) -> Option<&'v mut Value> {
    let mut here = value;
    for key in path.split('.') {
        here = child(here, key)?;
    }
    number_in(here)
}

fn child<'v>(value: &'v mut Value, key: &str) -> Option<&'v mut Value> {
    let map = value.as_object_mut()?;
    if map.contains_key(key) {
        return map.get_mut(key);
    }
    let variant = variant_inner(map)?.to_string();
    child(map.get_mut(&variant)?, key)
}

/// A number, or a newtype variant holding one (`Stroke(1.8)`).
fn number_in(value: &mut Value) -> Option<&mut Value> {
    if value.is_number() {
        return Some(value);
    }
    let map = value.as_object_mut()?;
    let variant = variant_inner(map)?.to_string();
    number_in(map.get_mut(&variant)?)
}

/// The number at `path` and whether it is a whole-number field.
fn read_number(json: &Value, path: &str) -> Option<(f64, bool)> {
    let mut copy = json.clone();
    let n = slot(&mut copy, path)?.as_number()?.clone();
    Some((n.as_f64()?, !n.is_f64()))
}

fn write_number(json: &mut Value, path: &str, value: f64, whole: bool) -> bool {
    let Some(place) = slot(json, path) else {
        return false;
    };
    *place = if whole {
        // Whole axes hold whole numbers within the field's limits (at least 0).
        Value::from(value as u64)
    } else {
        Value::from(value)
    };
    true
}

// ---------------------------------------------------------------------------------------
// The request.

/// A map request checked against its base design: the two axes and the base design in
/// the generic form its cells are built from.
#[derive(Clone, Debug)]
pub struct MapSpec {
    /// The design the map varies.
    pub base: Design,
    /// Horizontal axis.
    pub x: Axis,
    /// Vertical axis.
    pub y: Axis,
    json: Value,
}

impl MapSpec {
    /// Checks the two axes against `base`: known, distinct fields, 1 to [`MAX_POINTS`]
    /// points, whole ends and whole steps for whole-number fields, and every axis end and
    /// grid corner inside `design::limits()`.
    pub fn new(base: &Design, x: &AxisSpec, y: &AxisSpec) -> Result<MapSpec, MapError> {
        let json = design_json(base).ok_or_else(|| MapError::Rebuild {
            at: "the base design".to_string(),
            message: "it cannot be written as data".to_string(),
        })?;
        let allowed = fields(base);
        let x = axis(&json, &allowed, AxisName::X, x)?;
        let y = axis(&json, &allowed, AxisName::Y, y)?;
        if x.field == y.field {
            return Err(MapError::SameField { field: x.field });
        }
        let spec = MapSpec {
            base: base.clone(),
            x,
            y,
            json,
        };
        // Each axis alone at its ends, then the corners: every bound of the limits table
        // is linear in the values, so a grid whose corners pass passes everywhere.
        for (name, axis, other) in [
            (AxisName::X, &spec.x, &spec.y),
            (AxisName::Y, &spec.y, &spec.x),
        ] {
            for v in [axis.from, axis.to] {
                spec.validated(&[(axis, v), (other, other.current)])
                    .map_err(|source| MapError::OutOfRange {
                        at: format!("{name} axis {} = {v}", axis.field),
                        source,
                    })?;
            }
        }
        for xv in [spec.x.from, spec.x.to] {
            for yv in [spec.y.from, spec.y.to] {
                spec.validated(&[(&spec.x, xv), (&spec.y, yv)])
                    .map_err(|source| MapError::OutOfRange {
                        at: format!(
                            "grid corner {} = {xv}, {} = {yv}",
                            spec.x.field, spec.y.field
                        ),
                        source,
                    })?;
            }
        }
        Ok(spec)
    }

    /// Number of cells.
    pub fn cell_count(&self) -> usize {
        self.x.len() * self.y.len()
    }

    /// The design of cell `(ix, iy)`: the base design with the two axis values.
    pub fn design_at(&self, ix: usize, iy: usize) -> Result<Design, MapError> {
        let (Some(&xv), Some(&yv)) = (self.x.values.get(ix), self.y.values.get(iy)) else {
            return Err(MapError::Rebuild {
                at: format!("cell ({ix}, {iy})"),
                message: format!("the grid is {} x {}", self.x.len(), self.y.len()),
            });
        };
        self.build(&[(&self.x, xv), (&self.y, yv)])
            .map_err(|message| MapError::Rebuild {
                at: self.cell_words(xv, yv),
                message,
            })
    }

    fn cell_words(&self, xv: f64, yv: f64) -> String {
        format!("{} = {xv}, {} = {yv}", self.x.field, self.y.field)
    }

    fn build(&self, values: &[(&Axis, f64)]) -> Result<Design, String> {
        let mut json = self.json.clone();
        for (axis, v) in values {
            if !write_number(&mut json, axis.field, *v, axis.whole) {
                return Err(format!("{} has no place in the design", axis.field));
            }
        }
        serde_json::from_value(json).map_err(|e| e.to_string())
    }

    fn validated(&self, values: &[(&Axis, f64)]) -> Result<Design, DesignError> {
        let design = self.build(values).map_err(|message| DesignError::Invalid {
            field: values.first().map_or("", |v| v.0.field).to_string(),
            message,
        })?;
        design.validate()?;
        Ok(design)
    }

    fn evaluate(&self, ix: usize, iy: usize) -> Result<Cell, MapError> {
        let design = self.design_at(ix, iy)?;
        let (xv, yv) = (self.x.values[ix], self.y.values[iy]);
        let segment = Segment::new(&design).map_err(|e| MapError::OutOfRange {
            at: self.cell_words(xv, yv),
            source: match e {
                crate::segment::SegmentError::Design(d) => d,
                other => DesignError::Invalid {
                    field: String::new(),
                    message: other.to_string(),
                },
            },
        })?;
        Ok(Cell::from_checks(xv, yv, &checks::run(&segment)))
    }

    /// The whole map, in parallel, without progress reports or a way to stop it.
    pub fn compute_all(&self) -> Result<DesignMap, MapError> {
        self.compute(&AtomicBool::new(false), &mut |_| {})
    }

    /// The map, coarse to fine ([`LEVEL_STRIDES`]), in parallel over cells. `progress` is
    /// called on the calling thread after every chunk of cells with the map so far (a
    /// level complete gives every cell a computed representative, see
    /// [`DesignMap::shown`]). Raising `cancel` stops the run at the next chunk (or cell)
    /// with [`MapError::Cancelled`].
    pub fn compute(
        &self,
        cancel: &AtomicBool,
        progress: &mut dyn FnMut(&Progress<'_>),
    ) -> Result<DesignMap, MapError> {
        let (nx, ny) = (self.x.len(), self.y.len());
        let mut map = DesignMap {
            x: self.x.clone(),
            y: self.y.clone(),
            cells: vec![None; nx * ny],
            complete_stride: None,
        };
        let total = nx * ny;
        let mut done = 0;
        for (level, order) in level_orders(nx, ny) {
            for chunk in order.chunks(CHUNK) {
                if cancel.load(Ordering::Relaxed) {
                    return Err(MapError::Cancelled);
                }
                let results: Vec<Result<Cell, MapError>> = chunk
                    .par_iter()
                    .map(|&(ix, iy)| {
                        if cancel.load(Ordering::Relaxed) {
                            Err(MapError::Cancelled)
                        } else {
                            self.evaluate(ix, iy)
                        }
                    })
                    .collect();
                for (&(ix, iy), cell) in chunk.iter().zip(results) {
                    map.cells[iy * nx + ix] = Some(cell?);
                }
                done += chunk.len();
                if done == level_end(nx, ny, level) {
                    map.complete_stride = Some(level);
                }
                progress(&Progress {
                    done,
                    total,
                    map: &map,
                });
            }
        }
        Ok(map)
    }
}

/// Whether cell index `i` is on the sub-grid of stride `s`.
fn on(i: usize, s: usize) -> bool {
    i.is_multiple_of(s)
}

/// The levels in order, each with its stride and its new cells in row order: a level of
/// stride `s` holds the cells on the stride-`s` sub-grid not on a coarser one. Levels
/// coarser than the grid are skipped.
fn level_orders(nx: usize, ny: usize) -> Vec<(usize, Vec<(usize, usize)>)> {
    let largest = nx.max(ny);
    let strides: Vec<usize> = LEVEL_STRIDES
        .iter()
        .copied()
        .filter(|&s| s == 1 || s < largest)
        .collect();
    let mut out = Vec::new();
    for (k, &s) in strides.iter().enumerate() {
        let coarser = &strides[..k];
        let mut cells = Vec::new();
        for iy in (0..ny).step_by(s) {
            for ix in (0..nx).step_by(s) {
                if !coarser.iter().any(|&c| on(ix, c) && on(iy, c)) {
                    cells.push((ix, iy));
                }
            }
        }
        out.push((s, cells));
    }
    out
}

/// Number of cells done once the level of stride `s` is complete.
fn level_end(nx: usize, ny: usize, s: usize) -> usize {
    nx.div_ceil(s) * ny.div_ceil(s)
}

fn axis(
    json: &Value,
    allowed: &[&'static FieldLimit],
    name: AxisName,
    spec: &AxisSpec,
) -> Result<Axis, MapError> {
    let Some(row) = allowed.iter().find(|r| r.field == spec.field) else {
        return Err(MapError::UnknownField {
            axis: name,
            field: spec.field.clone(),
            allowed: allowed.iter().map(|r| r.field).collect(),
        });
    };
    let Some((current, whole)) = read_number(json, row.field) else {
        return Err(MapError::UnknownField {
            axis: name,
            field: spec.field.clone(),
            allowed: allowed.iter().map(|r| r.field).collect(),
        });
    };
    let (from, to, n) = (spec.from, spec.to, spec.points);
    let range = |message: String| MapError::Range {
        axis: name,
        field: row.field,
        from,
        to,
        message,
    };
    if !(from.is_finite() && to.is_finite()) {
        return Err(range("both ends must be finite numbers".to_string()));
    }
    if !(1..=MAX_POINTS).contains(&n) {
        return Err(MapError::Points {
            axis: name,
            points: n,
            allowed: format!("1 to {MAX_POINTS}"),
        });
    }
    if n == 1 && from != to {
        return Err(range(
            "one point needs FROM = TO (the single value)".to_string(),
        ));
    }
    if n > 1 && from == to {
        return Err(range(format!(
            "{n} points need FROM and TO to differ (one point takes N = 1)"
        )));
    }
    if whole {
        if from.fract() != 0.0 || to.fract() != 0.0 {
            return Err(range(format!(
                "{} is a whole number: both ends must be whole",
                row.field
            )));
        }
        let most = (to - from).abs() + 1.0;
        if n as f64 > most {
            return Err(MapError::Points {
                axis: name,
                points: n,
                allowed: format!(
                    "{} takes whole steps: at most {most} points from {from} to {to}",
                    row.field
                ),
            });
        }
    }
    Ok(Axis {
        field: row.field,
        unit: row.unit,
        meaning: row.meaning,
        whole,
        current,
        from,
        to,
        values: (0..n).map(|i| spaced(from, to, i, n, whole)).collect(),
    })
}

// ---------------------------------------------------------------------------------------
// Results.

/// One check of a cell: what hover shows.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct CellCheck {
    /// The check's id.
    pub id: CheckKey,
    /// What the check judges, in words.
    pub title: &'static str,
    /// Whether it passes.
    pub pass: bool,
    /// Its margin in its own unit; `None` where `check` gives none.
    pub margin: Option<f64>,
    /// The unit of the margin.
    pub unit: MarginUnit,
}

/// One design of the grid, as `check` judges it.
#[derive(Clone, Debug, PartialEq)]
pub struct Cell {
    /// The x-axis value.
    pub x: f64,
    /// The y-axis value.
    pub y: f64,
    /// The limiting check (`checks::limiting`), as `check --json` names it.
    pub limiting: Option<CheckKey>,
    /// The limiting check's margin.
    pub limiting_margin: Option<f64>,
    /// Whether every check passes.
    pub pass: bool,
    /// Every check in `check`'s order.
    pub checks: Vec<CellCheck>,
}

impl Cell {
    /// The cell of a design at `(x, y)` with the checks `list`.
    pub fn from_checks(x: f64, y: f64, list: &[Check]) -> Cell {
        let limiting = checks::limiting(list).map(|i| &list[i]);
        Cell {
            x,
            y,
            limiting: limiting.map(|c| c.id.as_str()),
            limiting_margin: limiting.and_then(|c| c.margin),
            pass: checks::all_pass(list),
            checks: list
                .iter()
                .map(|c| CellCheck {
                    id: c.id.as_str(),
                    title: c.title(),
                    pass: c.pass,
                    margin: c.margin,
                    unit: c.unit(),
                })
                .collect(),
        }
    }

    /// The smallest margin that decides the verdict: over every check when all pass,
    /// over the failing checks otherwise (`None` when none of those has a margin). Mixed
    /// units (mm and ratios) share their zero, which is all the zero line needs.
    pub fn smallest_margin(&self) -> Option<f64> {
        self.checks
            .iter()
            .filter(|c| self.pass || !c.pass)
            .filter_map(|c| c.margin)
            .min_by(f64::total_cmp)
    }
}

/// Progress of a running map.
pub struct Progress<'a> {
    /// Cells evaluated so far.
    pub done: usize,
    /// Cells in the grid.
    pub total: usize,
    /// The map so far.
    pub map: &'a DesignMap,
}

/// The grid of cells, row by row (`y` outer, `x` inner).
#[derive(Clone, Debug, PartialEq)]
pub struct DesignMap {
    /// Horizontal axis.
    pub x: Axis,
    /// Vertical axis.
    pub y: Axis,
    cells: Vec<Option<Cell>>,
    complete_stride: Option<usize>,
}

impl DesignMap {
    /// The evaluated cell at `(ix, iy)`, if it is done.
    pub fn cell(&self, ix: usize, iy: usize) -> Option<&Cell> {
        if ix >= self.x.len() {
            return None;
        }
        self.cells.get(iy * self.x.len() + ix)?.as_ref()
    }

    /// The cell to show at `(ix, iy)` while the map is being refined: the cell itself when
    /// done, else its representative on the finest complete level (the sub-grid cell at or
    /// below and left of it).
    pub fn shown(&self, ix: usize, iy: usize) -> Option<&Cell> {
        self.cell(ix, iy).or_else(|| {
            let s = self.complete_stride?;
            self.cell(ix - ix % s, iy - iy % s)
        })
    }

    /// The stride of the finest level complete so far (1 when the map is done).
    pub fn complete_stride(&self) -> Option<usize> {
        self.complete_stride
    }

    /// Whether every cell is evaluated.
    pub fn is_complete(&self) -> bool {
        self.complete_stride == Some(1)
    }

    /// The evaluated cells, row by row (`y` outer, `x` inner).
    pub fn cells(&self) -> impl Iterator<Item = &Cell> {
        self.cells.iter().flatten()
    }

    /// The line where the smallest margin is zero (the edge of the region where every
    /// check passes), as polylines in axis values, traced by marching squares on the
    /// finest complete level. Empty before the first level is complete.
    pub fn zero_line(&self) -> Vec<Vec<[f64; 2]>> {
        match self.complete_stride {
            Some(s) => contour::zero_line(self, s),
            None => Vec::new(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn axis_text_is_parsed_and_refused_with_the_reason() {
        let a: AxisSpec = "strip.thickness_mm:0.2:0.3:11"
            .parse()
            .unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(a.field, "strip.thickness_mm");
        assert_eq!((a.from, a.to, a.points), (0.2, 0.3, 11));
        assert!(
            "strip.count:2:9"
                .parse::<AxisSpec>()
                .is_err_and(|e| e.to_string().contains("four parts"))
        );
        assert!(
            "friction:a:1:3"
                .parse::<AxisSpec>()
                .is_err_and(|e| e.to_string().contains("FROM \"a\""))
        );
        assert!("friction:0.1:1:-3".parse::<AxisSpec>().is_err());
    }

    #[test]
    fn levels_cover_every_cell_once_coarse_first() {
        for (nx, ny) in [(1, 1), (1, 7), (17, 3), (200, 200), (33, 16)] {
            let levels = level_orders(nx, ny);
            let mut seen = vec![0u32; nx * ny];
            let mut done = 0;
            for (s, cells) in &levels {
                for &(ix, iy) in cells {
                    seen[iy * nx + ix] += 1;
                }
                done += cells.len();
                assert_eq!(done, level_end(nx, ny, *s), "{nx} x {ny}, stride {s}");
            }
            assert!(seen.iter().all(|&k| k == 1), "{nx} x {ny}");
            assert_eq!(levels.last().map(|l| l.0), Some(1));
        }
        // 200 x 200: the first level is every 16th row and column, 13 x 13 cells.
        assert_eq!(level_orders(200, 200)[0].1.len(), 169);
    }

    #[test]
    fn paths_look_through_enum_variants() {
        let design = Design::default();
        let Some(json) = design_json(&design) else {
            panic!("the demo design is data");
        };
        assert_eq!(read_number(&json, "actuator.lead_mm"), Some((1.0, false)));
        assert_eq!(read_number(&json, "strip.count"), Some((10.0, true)));
        assert_eq!(read_number(&json, "duty.cycles"), Some((10_000.0, true)));
        assert_eq!(read_number(&json, "actuator.max_force_n"), None);
        assert_eq!(read_number(&json, "strip.material"), None);
        assert_eq!(read_number(&json, "strip"), None);
    }
}
