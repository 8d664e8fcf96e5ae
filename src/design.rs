//! The design file: one versioned RON document holding everything a designer enters
//! for one bowed-strip segment (strips, hub, bore, friction, actuator, duty).
//!
//! This module owns the file's types, their plausible ranges ([`limits`]), loading with
//! messages that say what is wrong, where (`line:column` and the field path) and what
//! range is allowed, and atomic saving. It refuses only malformed input and values
//! outside the plausible ranges; a design that merely fails a check (does not fit, holds
//! too little, is over-stressed) loads, and the checks judge it. Every length in the file
//! is in millimetres, and every field name carries its unit.

use std::fmt;
use std::fs;
use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

use serde::{Deserialize, Deserializer, Serialize};

/// The only `format` number this version of the program reads and writes.
pub const FORMAT_VERSION: u32 = 1;

/// One segment design, as stored in a `.ron` file.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Design {
    /// File format version; must equal [`FORMAT_VERSION`].
    pub format: u32,
    /// Free text naming the design.
    #[serde(default)]
    pub title: String,
    /// The ring of spring strips.
    pub strip: Strip,
    /// Radius of the strip centreline at the end plates.
    pub mount_radius_mm: f64,
    /// Outside diameter of the end plates; 0 when there are none to speak of.
    pub end_plate_diameter_mm: f64,
    /// The bore the segment grips.
    pub bore: Bore,
    /// Static friction coefficient between strip and wall.
    pub friction: f64,
    /// What draws the end plates together.
    pub actuator: Actuator,
    /// End-plate travel at which the segment is meant to hold.
    pub operating_stroke_mm: f64,
    /// The load to hold and how often.
    pub duty: Duty,
}

/// The strips: all identical, straight at rest.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Strip {
    /// Number of strips around the hub.
    pub count: u32,
    /// Length between the end-plate clamps (or hinges).
    pub free_length_mm: f64,
    /// Width of one strip, tangential to the hub.
    pub width_mm: f64,
    /// Thickness of one strip, radial.
    pub thickness_mm: f64,
    /// Strip material: a grade from the built-in table or custom data.
    pub material: MaterialChoice,
    /// End fixity at the plates.
    #[serde(default)]
    pub ends: Ends,
    /// Which bending modulus to use.
    #[serde(default)]
    pub stiffness: Stiffness,
}

/// Strip material.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum MaterialChoice {
    /// A grade id from the built-in material table, e.g. `"ss301-full-hard"`.
    Grade(String),
    /// Data the designer supplies.
    Custom {
        name: String,
        youngs_modulus_gpa: f64,
        poisson_ratio: f64,
        tensile_strength_mpa: f64,
        yield_strength_mpa: f64,
        endurance_limit_mpa: f64,
    },
}

pub use crate::elastica::Ends;

/// Bending modulus choice: `Beam` uses `E`, `Plate` uses `E / (1 - nu^2)`, `Auto` picks
/// `Plate` when the width is at least ten thicknesses.
#[derive(Default, Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum Stiffness {
    /// `Plate` when `width >= 10 * thickness`, else `Beam`.
    #[default]
    Auto,
    /// Narrow strip: `E' = E`.
    Beam,
    /// Wide strip: `E' = E / (1 - nu^2)`.
    Plate,
}

/// The bore: a diameter with tolerances, or a pipe size from the table.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Bore {
    /// Nominal bore diameter; ignored when `pipe` is given.
    #[serde(default)]
    pub diameter_mm: f64,
    /// How far below nominal the bore may be.
    #[serde(default)]
    pub minus_mm: f64,
    /// How far above nominal the bore may be.
    #[serde(default)]
    pub plus_mm: f64,
    /// A pipe size; when given, the nominal bore is its inside diameter.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub pipe: Option<PipeRef>,
}

/// A pipe size by nominal pipe size and schedule, e.g. `(nps: "2", schedule: "40")`.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PipeRef {
    pub nps: String,
    pub schedule: String,
}

/// What draws the end plates together, with its ratings.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub enum Actuator {
    /// A straight pull on the plates.
    Direct {
        max_force_n: f64,
        max_stroke_mm: f64,
    },
    /// A cord wound on a spool.
    Spool {
        radius_mm: f64,
        max_torque_nm: f64,
        max_angle_deg: f64,
    },
    /// A lead screw turning against a nut.
    LeadScrew {
        lead_mm: f64,
        efficiency: f64,
        max_torque_nm: f64,
        max_turns: f64,
    },
}

/// The load to hold.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Duty {
    /// Axial force the segment must hold in the bore.
    pub holding_force_n: f64,
    /// Factor applied to the holding force (and judged against by the checks).
    pub safety_factor: f64,
    /// Number of grip-release cycles over the life. A whole number; the file may also
    /// write it as an integral float such as `1e6`.
    #[serde(deserialize_with = "cycles_from_number")]
    pub cycles: u64,
}

impl Default for Design {
    /// An invented demo to start from: ten stainless strips anchoring in a 70 mm bore,
    /// drawn together by a small lead screw. By a small-gap estimate it passes every
    /// check with some 40 % to spare; the solver and checks have the last word.
    fn default() -> Self {
        Design {
            format: FORMAT_VERSION,
            title: "Demo: ten-strip anchor for a 70 mm bore".to_string(),
            strip: Strip {
                count: 10,
                free_length_mm: 90.0,
                width_mm: 12.0,
                thickness_mm: 0.25,
                material: MaterialChoice::Grade("ss301-full-hard".to_string()),
                ends: Ends::Clamped,
                stiffness: Stiffness::Auto,
            },
            mount_radius_mm: 27.0,
            end_plate_diameter_mm: 56.0,
            bore: Bore {
                diameter_mm: 70.0,
                minus_mm: 0.3,
                plus_mm: 0.3,
                pipe: None,
            },
            friction: 0.3,
            actuator: Actuator::LeadScrew {
                lead_mm: 1.0,
                efficiency: 0.3,
                max_torque_nm: 0.8,
                max_turns: 8.0,
            },
            operating_stroke_mm: 1.8,
            duty: Duty {
                holding_force_n: 20.0,
                safety_factor: 2.0,
                cycles: 10_000,
            },
        }
    }
}

/// Why a design could not be loaded, saved or accepted.
#[derive(Debug, thiserror::Error)]
pub enum DesignError {
    /// The file could not be read or written (reported with the path and the system's reason).
    #[error("cannot {} {}: {source}", io_verb(source), path.display())]
    Io {
        path: PathBuf,
        source: std::io::Error,
    },
    /// The text is not a well-formed design: RON syntax, an unknown or missing field, a
    /// wrong type; the position is ron's.
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
}

impl DesignError {
    /// The message prefixed with the file name, in the `FILE:LINE:COLUMN: message` form
    /// when the position is known, else `FILE: message`.
    pub fn in_file(&self, path: &Path) -> String {
        match self {
            // Already names its file.
            DesignError::Io { .. } => self.to_string(),
            _ if self.position().is_some() => format!("{}:{self}", path.display()),
            _ => format!("{}: {self}", path.display()),
        }
    }

    /// `(line, column)` in the design text, 1-based, when known.
    pub fn position(&self) -> Option<(usize, usize)> {
        match self {
            DesignError::Syntax { line, column, .. } => Some((*line, *column)),
            DesignError::OutOfRange {
                line: Some(line),
                column: Some(column),
                ..
            } => Some((*line, *column)),
            _ => None,
        }
    }
}

/// Marks an I/O error that happened while saving, so the message says "write".
#[derive(Debug)]
struct WriteFailure(io::Error);

impl fmt::Display for WriteFailure {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        self.0.fmt(f)
    }
}

impl std::error::Error for WriteFailure {}

fn io_verb(source: &io::Error) -> &'static str {
    match source.get_ref() {
        Some(inner) if inner.is::<WriteFailure>() => "write",
        _ => "read",
    }
}

fn write_error(path: &Path, source: io::Error) -> DesignError {
    DesignError::Io {
        path: path.to_path_buf(),
        source: io::Error::new(source.kind(), WriteFailure(source)),
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
    let limit = limit(field);
    let unit = limit.map_or("", |l| l.unit);
    let spaced = |v: f64| {
        if unit.is_empty() {
            format!("{v}")
        } else {
            format!("{v} {unit}")
        }
    };
    let mut range = format!("{min} to {}", spaced(max));
    let excluded: Vec<String> = [
        (limit.is_some_and(|l| l.min_excluded), min),
        (limit.is_some_and(|l| l.max_excluded), max),
    ]
    .iter()
    .filter(|(excluded, _)| *excluded)
    .map(|(_, v)| format!("{v}"))
    .collect();
    if !excluded.is_empty() {
        range.push_str(&format!(" ({} excluded)", excluded.join(" and ")));
    }
    let position = match (line, column) {
        (Some(line), Some(column)) => format!("{line}:{column}: "),
        _ => String::new(),
    };
    if value.is_finite() {
        format!(
            "{position}{field} = {} is outside the allowed range {range}",
            spaced(value)
        )
    } else {
        format!("{position}{field} = {value} is not a finite number; the allowed range is {range}")
    }
}

/// What a limit's upper bound is also tied to, besides its fixed maximum.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum LimitBasis {
    /// The nominal bore diameter (pipe inside diameter when a pipe is given).
    NominalBore,
    /// The strip free length.
    FreeLength,
}

/// The plausible range of one numeric field: used by [`Design::validate`], the GUI's
/// sliders and the error texts.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FieldLimit {
    /// Field path as in the file, e.g. `strip.thickness_mm`.
    pub field: &'static str,
    pub min: f64,
    pub max: f64,
    /// `min` itself is not allowed (the value must be above it).
    pub min_excluded: bool,
    /// `max` itself is not allowed (the value must be below it).
    pub max_excluded: bool,
    /// When set, the upper bound is also `factor * basis` (the smaller bound holds).
    pub max_relative: Option<(LimitBasis, f64)>,
    /// Unit as printed after numbers; empty for pure numbers.
    pub unit: &'static str,
    /// One line saying what the field is.
    pub meaning: &'static str,
}

impl FieldLimit {
    /// The upper bound in force for this design (fixed maximum or relative one).
    /// When the basis is not available (unknown pipe) the fixed maximum is used.
    pub fn max_for(&self, design: &Design) -> f64 {
        let basis = match self.max_relative {
            None => return self.max,
            Some((LimitBasis::NominalBore, factor)) => {
                design.bore.nominal_mm().ok().map(|d| factor * d)
            }
            Some((LimitBasis::FreeLength, factor)) => Some(factor * design.strip.free_length_mm),
        };
        match basis {
            Some(b) if b.is_finite() => b.min(self.max),
            _ => self.max,
        }
    }

    /// Whether `value` lies in `[min, max]`, honouring the excluded ends.
    pub fn admits(&self, value: f64, max: f64) -> bool {
        let above = if self.min_excluded {
            value > self.min
        } else {
            value >= self.min
        };
        let below = if self.max_excluded {
            value < max
        } else {
            value <= max
        };
        value.is_finite() && above && below
    }
}

const fn closed(
    field: &'static str,
    min: f64,
    max: f64,
    unit: &'static str,
    meaning: &'static str,
) -> FieldLimit {
    FieldLimit {
        field,
        min,
        max,
        min_excluded: false,
        max_excluded: false,
        max_relative: None,
        unit,
        meaning,
    }
}

/// Actuator ratings: above zero, below a billion.
const fn rating(field: &'static str, unit: &'static str, meaning: &'static str) -> FieldLimit {
    FieldLimit {
        min_excluded: true,
        max_excluded: true,
        ..closed(field, 0.0, 1e9, unit, meaning)
    }
}

const TOLERANCE_SHARE_OF_BORE: f64 = 0.25;

static LIMITS: [FieldLimit; 27] = [
    closed(
        "strip.count",
        2.0,
        64.0,
        "",
        "number of strips around the hub",
    ),
    closed(
        "strip.free_length_mm",
        5.0,
        2000.0,
        "mm",
        "strip length between the end plates",
    ),
    closed("strip.width_mm", 0.2, 200.0, "mm", "strip width"),
    closed("strip.thickness_mm", 0.02, 5.0, "mm", "strip thickness"),
    closed(
        "strip.material.youngs_modulus_gpa",
        10.0,
        500.0,
        "GPa",
        "Young's modulus",
    ),
    closed(
        "strip.material.poisson_ratio",
        0.0,
        0.5,
        "",
        "Poisson's ratio",
    ),
    closed(
        "strip.material.tensile_strength_mpa",
        1.0,
        5000.0,
        "MPa",
        "ultimate tensile strength",
    ),
    closed(
        "strip.material.yield_strength_mpa",
        1.0,
        5000.0,
        "MPa",
        "yield strength",
    ),
    closed(
        "strip.material.endurance_limit_mpa",
        1.0,
        5000.0,
        "MPa",
        "endurance strength at 10^6 cycles and beyond",
    ),
    closed(
        "mount_radius_mm",
        0.5,
        2000.0,
        "mm",
        "radius of the strip centreline at the end plates",
    ),
    closed(
        "end_plate_diameter_mm",
        0.0,
        5000.0,
        "mm",
        "end-plate outside diameter (0: none)",
    ),
    closed(
        "bore.diameter_mm",
        2.0,
        5000.0,
        "mm",
        "nominal bore diameter",
    ),
    FieldLimit {
        max_relative: Some((LimitBasis::NominalBore, TOLERANCE_SHARE_OF_BORE)),
        ..closed(
            "bore.minus_mm",
            0.0,
            1250.0,
            "mm",
            "how far below nominal the bore may be",
        )
    },
    FieldLimit {
        max_relative: Some((LimitBasis::NominalBore, TOLERANCE_SHARE_OF_BORE)),
        ..closed(
            "bore.plus_mm",
            0.0,
            1250.0,
            "mm",
            "how far above nominal the bore may be",
        )
    },
    closed(
        "friction",
        0.01,
        2.0,
        "",
        "static friction coefficient, strip on wall",
    ),
    rating(
        "actuator.max_force_n",
        "N",
        "largest pull the actuator delivers",
    ),
    rating(
        "actuator.max_stroke_mm",
        "mm",
        "longest travel the actuator delivers",
    ),
    rating("actuator.radius_mm", "mm", "spool radius at the cord"),
    rating(
        "actuator.max_torque_nm",
        "N m",
        "largest torque the actuator delivers",
    ),
    rating("actuator.max_angle_deg", "deg", "largest spool rotation"),
    rating("actuator.lead_mm", "mm", "lead screw advance per turn"),
    FieldLimit {
        min_excluded: true,
        ..closed("actuator.efficiency", 0.0, 1.0, "", "lead screw efficiency")
    },
    rating(
        "actuator.max_turns",
        "turns",
        "largest number of screw turns",
    ),
    FieldLimit {
        max_relative: Some((LimitBasis::FreeLength, 1.0)),
        ..closed(
            "operating_stroke_mm",
            0.0,
            2000.0,
            "mm",
            "end-plate travel when holding",
        )
    },
    closed("duty.holding_force_n", 0.0, 1e7, "N", "axial force to hold"),
    closed(
        "duty.safety_factor",
        1.0,
        100.0,
        "",
        "factor on the holding force",
    ),
    closed(
        "duty.cycles",
        1.0,
        1e12,
        "",
        "grip-release cycles over the life",
    ),
];

/// The table of plausible ranges, one row per numeric field (the operating stroke is
/// also bounded by the free length, the tolerances by a quarter of the nominal bore).
pub fn limits() -> &'static [FieldLimit] {
    &LIMITS
}

/// The limit row for a field path, if the field has one.
pub fn limit(field: &str) -> Option<&'static FieldLimit> {
    limits().iter().find(|l| l.field == field)
}

impl Bore {
    /// Nominal bore: the pipe's inside diameter (OD - 2 x nominal wall) when a pipe is
    /// given, else `diameter_mm`.
    pub fn nominal_mm(&self) -> Result<f64, DesignError> {
        match &self.pipe {
            None => Ok(self.diameter_mm),
            Some(pipe) => pipe_inside_diameter_mm(&pipe.nps, &pipe.schedule).ok_or_else(|| {
                DesignError::UnknownPipe {
                    nps: pipe.nps.clone(),
                    schedule: pipe.schedule.clone(),
                }
            }),
        }
    }

    /// The smallest bore within tolerance: nominal minus `minus_mm`.
    pub fn smallest_mm(&self) -> Result<f64, DesignError> {
        Ok(self.nominal_mm()? - self.minus_mm)
    }

    /// The largest bore within tolerance: nominal plus `plus_mm`.
    pub fn largest_mm(&self) -> Result<f64, DesignError> {
        Ok(self.nominal_mm()? + self.plus_mm)
    }
}

impl Design {
    /// Every numeric field paired with its path in the file; the actuator and material
    /// fields present depend on the variant chosen.
    fn numeric_fields(&self) -> Vec<(&'static str, f64)> {
        let mut fields = vec![
            ("strip.count", f64::from(self.strip.count)),
            ("strip.free_length_mm", self.strip.free_length_mm),
            ("strip.width_mm", self.strip.width_mm),
            ("strip.thickness_mm", self.strip.thickness_mm),
        ];
        if let MaterialChoice::Custom {
            youngs_modulus_gpa,
            poisson_ratio,
            tensile_strength_mpa,
            yield_strength_mpa,
            endurance_limit_mpa,
            ..
        } = &self.strip.material
        {
            fields.extend([
                ("strip.material.youngs_modulus_gpa", *youngs_modulus_gpa),
                ("strip.material.poisson_ratio", *poisson_ratio),
                ("strip.material.tensile_strength_mpa", *tensile_strength_mpa),
                ("strip.material.yield_strength_mpa", *yield_strength_mpa),
                ("strip.material.endurance_limit_mpa", *endurance_limit_mpa),
            ]);
        }
        fields.extend([
            ("mount_radius_mm", self.mount_radius_mm),
            ("end_plate_diameter_mm", self.end_plate_diameter_mm),
        ]);
        if self.bore.pipe.is_none() {
            fields.push(("bore.diameter_mm", self.bore.diameter_mm));
        }
        fields.extend([
            ("bore.minus_mm", self.bore.minus_mm),
            ("bore.plus_mm", self.bore.plus_mm),
            ("friction", self.friction),
        ]);
        match &self.actuator {
            Actuator::Direct {
                max_force_n,
                max_stroke_mm,
            } => fields.extend([
                ("actuator.max_force_n", *max_force_n),
                ("actuator.max_stroke_mm", *max_stroke_mm),
            ]),
            Actuator::Spool {
                radius_mm,
                max_torque_nm,
                max_angle_deg,
            } => fields.extend([
                ("actuator.radius_mm", *radius_mm),
                ("actuator.max_torque_nm", *max_torque_nm),
                ("actuator.max_angle_deg", *max_angle_deg),
            ]),
            Actuator::LeadScrew {
                lead_mm,
                efficiency,
                max_torque_nm,
                max_turns,
            } => fields.extend([
                ("actuator.lead_mm", *lead_mm),
                ("actuator.efficiency", *efficiency),
                ("actuator.max_torque_nm", *max_torque_nm),
                ("actuator.max_turns", *max_turns),
            ]),
        }
        fields.extend([
            ("operating_stroke_mm", self.operating_stroke_mm),
            ("duty.holding_force_n", self.duty.holding_force_n),
            ("duty.safety_factor", self.duty.safety_factor),
            // Exact for every count up to 2^53, far beyond the 1e12 limit.
            ("duty.cycles", self.duty.cycles as f64),
        ]);
        fields
    }

    /// Refuses what is malformed or outside the plausible ranges of [`limits`]: an
    /// unknown format, NaN or infinities, out-of-range sizes and counts, an unknown grade
    /// or pipe. A design that only fails a check passes here. Errors carry no position;
    /// [`parse`] adds it.
    pub fn validate(&self) -> Result<(), DesignError> {
        if self.format != FORMAT_VERSION {
            return Err(DesignError::UnknownFormat { found: self.format });
        }
        // With a pipe given, `diameter_mm` is ignored, but it must still be a number.
        if self.bore.pipe.is_some() && !self.bore.diameter_mm.is_finite() {
            let row = limit("bore.diameter_mm");
            return Err(out_of_range(
                "bore.diameter_mm",
                self.bore.diameter_mm,
                row,
                self,
            ));
        }
        // Check the bore first: the tolerance limits depend on it.
        if let Some(pipe) = &self.bore.pipe
            && pipe_inside_diameter_mm(&pipe.nps, &pipe.schedule).is_none()
        {
            return Err(DesignError::UnknownPipe {
                nps: pipe.nps.clone(),
                schedule: pipe.schedule.clone(),
            });
        }
        for (field, value) in self.numeric_fields() {
            let Some(row) = limit(field) else { continue };
            if !row.admits(value, row.max_for(self)) {
                return Err(out_of_range(field, value, Some(row), self));
            }
        }
        match &self.strip.material {
            MaterialChoice::Grade(id) => {
                if !grade_exists(id) {
                    return Err(DesignError::UnknownGrade {
                        id: id.clone(),
                        known: grade_ids(),
                    });
                }
            }
            MaterialChoice::Custom {
                name,
                tensile_strength_mpa,
                yield_strength_mpa,
                endurance_limit_mpa,
                ..
            } => {
                if name.trim().is_empty() {
                    return Err(DesignError::Invalid {
                        field: "strip.material.name".to_string(),
                        message: "a custom material needs a name (it is printed on the sheet)"
                            .to_string(),
                    });
                }
                for (field, strength) in [
                    ("strip.material.yield_strength_mpa", yield_strength_mpa),
                    ("strip.material.endurance_limit_mpa", endurance_limit_mpa),
                ] {
                    if strength > tensile_strength_mpa {
                        return Err(DesignError::Invalid {
                            field: field.to_string(),
                            message: format!(
                                "{strength} MPa exceeds the tensile strength \
                                 {tensile_strength_mpa} MPa; it must not be larger"
                            ),
                        });
                    }
                }
            }
        }
        Ok(())
    }
}

fn out_of_range(field: &str, value: f64, row: Option<&FieldLimit>, design: &Design) -> DesignError {
    DesignError::OutOfRange {
        field: field.to_string(),
        value,
        min: row.map_or(f64::NAN, |r| r.min),
        max: row.map_or(f64::NAN, |r| r.max_for(design)),
        line: None,
        column: None,
    }
}

fn ron_options() -> ron::Options {
    ron::Options::default().with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
}

/// Parses and validates a design text. Range errors carry the line and column of the
/// offending value.
pub fn parse(text: &str) -> Result<Design, DesignError> {
    // A file of another format may have fields this version does not know: say so
    // before ron complains about them.
    if let Some(found) = declared_format(text)
        && found != FORMAT_VERSION
    {
        return Err(DesignError::UnknownFormat { found });
    }
    let design: Design = ron_options().from_str(text).map_err(|e| {
        // ron's span starts at the offending token (for a missing field: at the closing
        // parenthesis), which is where an editor should put the cursor.
        DesignError::Syntax {
            line: e.span.start.line,
            column: e.span.start.col,
            message: e.code.to_string(),
        }
    })?;
    match design.validate() {
        Ok(()) => Ok(design),
        Err(DesignError::OutOfRange {
            field,
            value,
            min,
            max,
            ..
        }) => {
            let position = locate(text, &field);
            Err(DesignError::OutOfRange {
                field,
                value,
                min,
                max,
                line: position.map(|p| p.0),
                column: position.map(|p| p.1),
            })
        }
        Err(other) => Err(other),
    }
}

/// Reads and parses a design file.
pub fn load(path: &Path) -> Result<Design, DesignError> {
    let text = fs::read_to_string(path).map_err(|source| DesignError::Io {
        path: path.to_path_buf(),
        source,
    })?;
    parse(&text)
}

/// The design as pretty RON: fields in declaration order, four-space indent, the
/// top-level struct named `Design`. Parsing the result gives back an equal design.
pub fn to_ron(design: &Design) -> String {
    let config = ron::ser::PrettyConfig::new()
        .indentor("    ")
        .new_line("\n")
        .struct_names(false);
    match ron::ser::to_string_pretty(design, config) {
        Ok(body) => format!("Design{body}\n"),
        // Serialising plain structs of numbers and strings into a String cannot fail;
        // this arm only keeps the function total.
        Err(e) => format!("// cannot write this design as RON: {e}\n"),
    }
}

static TEMP_COUNTER: AtomicU64 = AtomicU64::new(0);

/// Writes the design to `path` without ever leaving a half-written file: a temporary
/// file in the same directory is written, flushed to disk and renamed over the target.
/// On any failure the temporary file is removed and the old file is untouched. The
/// design is written as given (a design that does not validate is still saved, so no
/// edit is lost); callers that want only valid files call [`Design::validate`] first.
pub fn save_atomic(path: &Path, design: &Design) -> Result<(), DesignError> {
    let text = to_ron(design);
    let file_name = path
        .file_name()
        .ok_or_else(|| {
            write_error(
                path,
                io::Error::new(io::ErrorKind::InvalidInput, "the path names no file"),
            )
        })?
        .to_string_lossy()
        .into_owned();
    let dir = match path.parent() {
        Some(parent) if !parent.as_os_str().is_empty() => parent.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let temp = dir.join(format!(
        ".{file_name}.{}-{}.tmp",
        std::process::id(),
        TEMP_COUNTER.fetch_add(1, Ordering::Relaxed)
    ));
    let written = write_then_rename(&temp, path, &text);
    if written.is_err() {
        // The temporary file may not exist (creation failed); nothing else to undo.
        let _ = fs::remove_file(&temp);
    }
    written.map_err(|e| write_error(path, e))?;
    // Make the rename itself durable. Not every platform can open a directory; the
    // data is already safe on disk, so a failure here is not reported.
    #[cfg(unix)]
    if let Ok(d) = fs::File::open(&dir) {
        let _ = d.sync_all();
    }
    Ok(())
}

fn write_then_rename(temp: &Path, target: &Path, text: &str) -> io::Result<()> {
    let mut file = fs::OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(temp)?;
    // Keep the permissions of the file being replaced.
    if let Ok(meta) = fs::metadata(target)
        && meta.is_file()
    {
        file.set_permissions(meta.permissions())?;
    }
    file.write_all(text.as_bytes())?;
    file.sync_all()?;
    drop(file);
    fs::rename(temp, target)
}

fn cycles_from_number<'de, D: Deserializer<'de>>(deserializer: D) -> Result<u64, D::Error> {
    struct Cycles;
    impl serde::de::Visitor<'_> for Cycles {
        type Value = u64;
        fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
            f.write_str("a whole number of cycles, e.g. 100000 or 1e6")
        }
        fn visit_u64<E: serde::de::Error>(self, v: u64) -> Result<u64, E> {
            Ok(v)
        }
        fn visit_i64<E: serde::de::Error>(self, v: i64) -> Result<u64, E> {
            u64::try_from(v).map_err(|_| {
                E::custom(format!(
                    "duty.cycles = {v} is outside the allowed range 1 to 1e12"
                ))
            })
        }
        fn visit_f64<E: serde::de::Error>(self, v: f64) -> Result<u64, E> {
            // 2^64 as f64; anything at or above it does not fit.
            if v.is_finite() && v >= 0.0 && v.fract() == 0.0 && v < 18_446_744_073_709_551_616.0 {
                Ok(v as u64)
            } else {
                Err(E::custom(format!(
                    "duty.cycles = {v} is not a whole number in the allowed range 1 to 1e12"
                )))
            }
        }
    }
    deserializer.deserialize_any(Cycles)
}

// ---------------------------------------------------------------------------------------
// Finding a field's position in the text.

/// 1-based `(line, column)` of the value of the field at `path` (e.g.
/// `strip.material.poisson_ratio`), or `None` when the text does not spell it out.
pub fn locate(text: &str, path: &str) -> Option<(usize, usize)> {
    field_positions(text)
        .into_iter()
        .find(|(p, _)| p == path)
        .map(|(_, pos)| pos)
}

#[derive(Debug, PartialEq)]
enum Token {
    Ident(String),
    Colon,
    Comma,
    Open,
    Close,
    /// Any other value: number, string, char.
    Other,
}

/// Splits RON text into the few token kinds the locator needs, each with its 1-based
/// position. Comments are skipped; strings and chars become `Other`.
fn tokens(text: &str) -> Vec<(Token, (usize, usize))> {
    let chars: Vec<char> = text.chars().collect();
    let mut out = Vec::new();
    let (mut i, mut line, mut col) = (0usize, 1usize, 1usize);
    // Moves past `n` chars, keeping line and column.
    let advance = |i: &mut usize, line: &mut usize, col: &mut usize, n: usize| {
        for _ in 0..n {
            if *i < chars.len() {
                if chars[*i] == '\n' {
                    *line += 1;
                    *col = 1;
                } else {
                    *col += 1;
                }
                *i += 1;
            }
        }
    };
    while i < chars.len() {
        let c = chars[i];
        let here = (line, col);
        let next = chars.get(i + 1).copied();
        if c.is_whitespace() {
            advance(&mut i, &mut line, &mut col, 1);
        } else if c == '/' && next == Some('/') {
            while i < chars.len() && chars[i] != '\n' {
                advance(&mut i, &mut line, &mut col, 1);
            }
        } else if c == '/' && next == Some('*') {
            let mut depth = 0usize;
            while i < chars.len() {
                if chars[i] == '/' && chars.get(i + 1) == Some(&'*') {
                    depth += 1;
                    advance(&mut i, &mut line, &mut col, 2);
                } else if chars[i] == '*' && chars.get(i + 1) == Some(&'/') {
                    depth -= 1;
                    advance(&mut i, &mut line, &mut col, 2);
                    if depth == 0 {
                        break;
                    }
                } else {
                    advance(&mut i, &mut line, &mut col, 1);
                }
            }
        } else if c == '"' || c == '\'' {
            advance(&mut i, &mut line, &mut col, 1);
            while i < chars.len() && chars[i] != c {
                let step = if chars[i] == '\\' { 2 } else { 1 };
                advance(&mut i, &mut line, &mut col, step);
            }
            advance(&mut i, &mut line, &mut col, 1);
            out.push((Token::Other, here));
        } else if (c == 'r' || c == 'b')
            && matches!(next, Some('"') | Some('#'))
            && raw_string_len(&chars[i..]).is_some()
        {
            let n = raw_string_len(&chars[i..]).unwrap_or(1);
            advance(&mut i, &mut line, &mut col, n);
            out.push((Token::Other, here));
        } else if c.is_alphabetic() || c == '_' {
            let start = i;
            while i < chars.len()
                && (chars[i].is_alphanumeric() || chars[i] == '_' || chars[i] == '#')
            {
                advance(&mut i, &mut line, &mut col, 1);
            }
            let word: String = chars[start..i].iter().collect();
            let word = word.strip_prefix("r#").map(str::to_string).unwrap_or(word);
            out.push((Token::Ident(word), here));
        } else {
            let token = match c {
                ':' => Token::Colon,
                ',' => Token::Comma,
                '(' | '[' | '{' => Token::Open,
                ')' | ']' | '}' => Token::Close,
                _ => Token::Other,
            };
            // Numbers and other runs stay one `Other` per char; the locator only needs
            // to know that a value started.
            advance(&mut i, &mut line, &mut col, 1);
            out.push((token, here));
        }
    }
    out
}

/// Length in chars of a raw (or byte, or raw byte) string at the start of `chars`:
/// `r"..."`, `r#"..."#`, `b"..."`, `br#"..."#`.
fn raw_string_len(chars: &[char]) -> Option<usize> {
    let mut i = 0;
    if chars.get(i) == Some(&'b') {
        i += 1;
    }
    let raw = chars.get(i) == Some(&'r');
    if raw {
        i += 1;
    }
    let hashes = chars[i..].iter().take_while(|&&c| c == '#').count();
    if !raw && hashes > 0 {
        return None;
    }
    i += hashes;
    if chars.get(i) != Some(&'"') {
        return None;
    }
    i += 1;
    while i < chars.len() {
        if chars[i] == '\\' && !raw {
            i += 2;
            continue;
        }
        if chars[i] == '"'
            && chars[i + 1..]
                .iter()
                .take(hashes)
                .filter(|&&c| c == '#')
                .count()
                == hashes
        {
            return Some(i + 1 + hashes);
        }
        i += 1;
    }
    None
}

/// The top-level `format` number as written, when it is a plain unsigned integer.
fn declared_format(text: &str) -> Option<u32> {
    let (line, column) = locate(text, "format")?;
    let digits: String = text
        .lines()
        .nth(line - 1)?
        .chars()
        .skip(column - 1)
        .take_while(|c| c.is_ascii_digit() || *c == '_')
        .filter(|c| *c != '_')
        .collect();
    digits.parse().ok()
}

/// Every `name: value` pair in the text, as (dotted path, position of the value). A
/// bracket opened right after `name:` (possibly after a variant name such as `Custom` or
/// `Some`) nests the path under `name`.
fn field_positions(text: &str) -> Vec<(String, (usize, usize))> {
    let toks = tokens(text);
    let mut found = Vec::new();
    let mut stack: Vec<Option<String>> = Vec::new();
    let mut pending: Option<String> = None;
    let mut k = 0;
    while k < toks.len() {
        match &toks[k].0 {
            Token::Ident(name) if toks.get(k + 1).map(|t| &t.0) == Some(&Token::Colon) => {
                let mut path: Vec<&str> = stack.iter().flatten().map(String::as_str).collect();
                path.push(name);
                let value_at = toks.get(k + 2).map_or(toks[k + 1].1, |t| t.1);
                found.push((path.join("."), value_at));
                pending = Some(name.clone());
                k += 2;
                continue;
            }
            Token::Open => stack.push(pending.take()),
            Token::Close => {
                stack.pop();
                pending = None;
            }
            Token::Comma => pending = None,
            Token::Ident(_) | Token::Colon | Token::Other => {}
        }
        k += 1;
    }
    found
}

// ---------------------------------------------------------------------------------------
// The material and pipe tables (owned by `material` and `pipe`).

fn grade_exists(id: &str) -> bool {
    crate::material::find(id).is_some()
}

fn grade_ids() -> Vec<String> {
    crate::material::ids()
        .into_iter()
        .map(str::to_string)
        .collect()
}

fn pipe_inside_diameter_mm(nps: &str, schedule: &str) -> Option<f64> {
    crate::pipe::find(nps, schedule).map(|p| p.inside_diameter_mm())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn locator_follows_nesting() {
        let text = "Design(\n  strip: (count: 6, material: Custom(name: \"a, b\", poisson_ratio: 0.3)),\n  bore: (pipe: Some((nps: \"2\", schedule: \"40\"))),\n)";
        assert_eq!(locate(text, "strip.count"), Some((2, 18)));
        assert_eq!(locate(text, "strip.material.poisson_ratio"), Some((2, 67)));
        assert_eq!(locate(text, "bore.pipe.schedule"), Some((3, 42)));
        assert_eq!(locate(text, "count"), None);
        assert_eq!(locate(text, "bore.pipe"), Some((3, 16)));
    }

    #[test]
    fn locator_skips_comments_and_strings() {
        let text = "Design( // friction: 9\n /* nested /* friction: 8 */ */ title: \"friction: 7\",\n friction: 0.3)";
        assert_eq!(locate(text, "friction"), Some((3, 12)));
        assert_eq!(locate(text, "title"), Some((2, 40)));
    }

    #[test]
    fn declared_format_is_read_before_parsing() {
        assert_eq!(declared_format("Design(\n  format: 12,\n)"), Some(12));
        assert_eq!(declared_format("(format:1_0)"), Some(10));
        assert_eq!(declared_format("(strip: (format: 3))"), None);
        assert_eq!(declared_format("(format: \"1\")"), None);
    }

    #[test]
    fn raw_strings_are_one_token() {
        let chars: Vec<char> = "r#\"a\"b\"#, x".chars().collect();
        assert_eq!(raw_string_len(&chars), Some(8));
        let chars: Vec<char> = "b\"q\\\"\" rest".chars().collect();
        assert_eq!(raw_string_len(&chars), Some(6));
        let chars: Vec<char> = "r#name".chars().collect();
        assert_eq!(raw_string_len(&chars), None);
    }

    #[test]
    fn excluded_ends_are_refused() {
        let Some(efficiency) = limit("actuator.efficiency") else {
            panic!("no efficiency row");
        };
        assert!(!efficiency.admits(0.0, 1.0));
        assert!(efficiency.admits(1.0, 1.0));
        assert!(!efficiency.admits(f64::NAN, 1.0));
        let Some(force) = limit("actuator.max_force_n") else {
            panic!("no force row");
        };
        assert!(!force.admits(1e9, force.max));
        assert!(force.admits(1e-3, force.max));
    }

    #[test]
    fn tolerance_bound_follows_the_bore() {
        let design = Design::default();
        let Some(minus) = limit("bore.minus_mm") else {
            panic!("no tolerance row");
        };
        assert_eq!(minus.max_for(&design), 0.25 * design.bore.diameter_mm);
        let Some(stroke) = limit("operating_stroke_mm") else {
            panic!("no stroke row");
        };
        assert_eq!(stroke.max_for(&design), design.strip.free_length_mm);
    }

    #[test]
    fn every_numeric_field_has_a_limit() {
        let mut design = Design::default();
        let mut seen: Vec<&str> = design.numeric_fields().iter().map(|f| f.0).collect();
        design.actuator = Actuator::Spool {
            radius_mm: 1.0,
            max_torque_nm: 1.0,
            max_angle_deg: 1.0,
        };
        design.strip.material = MaterialChoice::Custom {
            name: "x".into(),
            youngs_modulus_gpa: 1.0,
            poisson_ratio: 0.3,
            tensile_strength_mpa: 1.0,
            yield_strength_mpa: 1.0,
            endurance_limit_mpa: 1.0,
        };
        seen.extend(design.numeric_fields().iter().map(|f| f.0));
        design.actuator = Actuator::Direct {
            max_force_n: 1.0,
            max_stroke_mm: 1.0,
        };
        seen.extend(design.numeric_fields().iter().map(|f| f.0));
        for field in &seen {
            assert!(limit(field).is_some(), "{field} has no limit row");
        }
        for row in limits() {
            assert!(seen.contains(&row.field), "{} is never checked", row.field);
        }
    }

    #[test]
    fn cycles_accept_integral_floats_only() {
        let ok: Duty = ron::from_str("(holding_force_n: 1.0, safety_factor: 1.0, cycles: 1e6)")
            .unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(ok.cycles, 1_000_000);
        assert!(
            ron::from_str::<Duty>("(holding_force_n: 1.0, safety_factor: 1.0, cycles: 1.5)")
                .is_err()
        );
        assert!(
            ron::from_str::<Duty>("(holding_force_n: 1.0, safety_factor: 1.0, cycles: -3)")
                .is_err()
        );
    }

    #[test]
    fn write_errors_say_write() {
        let e = write_error(
            Path::new("x.ron"),
            io::Error::new(io::ErrorKind::NotFound, "gone"),
        );
        assert_eq!(e.to_string(), "cannot write x.ron: gone");
        let e = DesignError::Io {
            path: "y.ron".into(),
            source: io::Error::new(io::ErrorKind::NotFound, "gone"),
        };
        assert_eq!(e.to_string(), "cannot read y.ron: gone");
        assert_eq!(e.in_file(Path::new("y.ron")), "cannot read y.ron: gone");
    }
}
