//! The design file's types: one versioned document holding everything a designer enters
//! for one bowed-strip segment (strips, hub, bore, friction, actuator, duty), with the
//! built-in demo as its default. Every length is in millimetres and every field name
//! carries its unit.

use std::fmt;

use serde::{Deserialize, Deserializer, Serialize, Serializer};

use super::error::{DesignError, show_number};
use super::limits::pipe_inside_diameter_mm;

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
    /// End-plate travel at which the segment is meant to hold: the older spelling of
    /// `operating: Stroke(mm)`. A file gives this or `operating`, not both; read the
    /// operating point through [`Design::operating`].
    #[serde(
        default,
        skip_serializing_if = "Option::is_none",
        serialize_with = "plain_some"
    )]
    pub operating_stroke_mm: Option<f64>,
    /// How the actuator sets the operating point: a stroke, a pull or a torque (`None`:
    /// the file gives `operating_stroke_mm` instead).
    #[serde(
        default,
        skip_serializing_if = "Option::is_none",
        serialize_with = "plain_some"
    )]
    pub operating: Option<Operating>,
    /// The load to hold and how often.
    pub duty: Duty,
    /// Thickness of each end plate, mm: with the free length, the rigid length that must
    /// pass a bend (0: thin plates).
    #[serde(default, skip_serializing_if = "is_zero")]
    pub end_plate_thickness_mm: f64,
    /// The shop's tolerances for the scatter run (`None`: no scatter section; nominal
    /// results never depend on it).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub scatter: Option<crate::scatter::ScatterSpec>,
    /// Correction factors fitted to bench measurements of a built prototype (`None`: the
    /// model as it stands). Written only when present.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub calibration: Option<Calibration>,
}

/// Correction factors from bench measurements, each optional (left out: no correction).
/// The modulus factor multiplies Young's modulus `E` (so `E'`, the bending stiffness,
/// every force and the bending stress scale with it). The stroke offset relates the
/// bench's stroke readings to the model: the model's stroke is the measured stroke plus
/// the offset. It applies wherever measured strokes meet the model (`compare`, the app's
/// bench overlay, the sheet's bench page); the design's own strokes (operating stroke,
/// actuator travel, every stroke reported) stay model strokes, counted from straight
/// strips. A fitted effective free length and a fitted friction have no field here:
/// applying them edits `strip.free_length_mm` and `friction`.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Calibration {
    /// Multiplies Young's modulus (1: the material's value).
    #[serde(default = "one", skip_serializing_if = "is_one")]
    pub modulus_factor: f64,
    /// Added to a measured stroke to give the model's stroke, mm (0: none).
    #[serde(default, skip_serializing_if = "is_zero")]
    pub stroke_offset_mm: f64,
}

impl Default for Calibration {
    /// No correction: modulus factor 1, no stroke offset.
    fn default() -> Self {
        Calibration {
            modulus_factor: 1.0,
            stroke_offset_mm: 0.0,
        }
    }
}

impl Design {
    /// The modulus factor in force: the calibration's, else 1.
    pub fn modulus_factor(&self) -> f64 {
        self.calibration.map_or(1.0, |c| c.modulus_factor)
    }

    /// The stroke offset in force, mm: the calibration's, else 0.
    pub fn stroke_offset_mm(&self) -> f64 {
        self.calibration.map_or(0.0, |c| c.stroke_offset_mm)
    }
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
    /// Out-of-roundness, largest minus smallest diameter, mm (0: round). Load sharing
    /// judges the major axis both along and across the load.
    #[serde(default, skip_serializing_if = "is_zero")]
    pub out_of_round_mm: f64,
    /// A bend the relaxed segment must pass (`None`: no bend check).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub bend: Option<crate::bend::Bend>,
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
        /// Series stiffness of the cord or drive, N/mm (`None`: rigid).
        #[serde(
            default,
            skip_serializing_if = "Option::is_none",
            serialize_with = "plain_some"
        )]
        stiffness_n_per_mm: Option<f64>,
    },
    /// A cord wound on a spool.
    Spool {
        radius_mm: f64,
        max_torque_nm: f64,
        max_angle_deg: f64,
        /// Series stiffness of the cord, N/mm (`None`: rigid).
        #[serde(
            default,
            skip_serializing_if = "Option::is_none",
            serialize_with = "plain_some"
        )]
        stiffness_n_per_mm: Option<f64>,
    },
    /// A lead screw turning against a nut.
    LeadScrew {
        lead_mm: f64,
        efficiency: f64,
        max_torque_nm: f64,
        max_turns: f64,
        /// Series stiffness of the screw, nut and rods, N/mm (`None`: rigid).
        #[serde(
            default,
            skip_serializing_if = "Option::is_none",
            serialize_with = "plain_some"
        )]
        stiffness_n_per_mm: Option<f64>,
    },
}

/// How the actuator sets the operating point (`operating` in the file).
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub enum Operating {
    /// Displacement control: a fixed end-plate stroke, mm.
    Stroke(f64),
    /// Force control: a set pull on the end plates, N (a spring, a pressure, a
    /// force-limited drive).
    Pull(f64),
    /// Force control through the spool or screw: a set torque, N m (a torque-limited
    /// motor).
    Torque(f64),
}

impl Operating {
    /// The mode's name as `point --json` prints it: `stroke`, `pull` or `torque`.
    pub fn mode_name(self) -> &'static str {
        match self {
            Operating::Stroke(_) => "stroke",
            Operating::Pull(_) => "pull",
            Operating::Torque(_) => "torque",
        }
    }

    /// The value as set, in the mode's unit.
    pub fn value(self) -> f64 {
        match self {
            Operating::Stroke(v) | Operating::Pull(v) | Operating::Torque(v) => v,
        }
    }

    /// The unit of [`Operating::value`]: `mm`, `N` or `N m`.
    pub fn unit(self) -> &'static str {
        match self {
            Operating::Stroke(_) => "mm",
            Operating::Pull(_) => "N",
            Operating::Torque(_) => "N m",
        }
    }

    /// The dotted name of the value in [`super::limits`]: `operating.Stroke`, ...
    pub fn field(self) -> &'static str {
        match self {
            Operating::Stroke(_) => "operating.Stroke",
            Operating::Pull(_) => "operating.Pull",
            Operating::Torque(_) => "operating.Torque",
        }
    }
}

impl Actuator {
    /// Series stiffness of the cord or drive, N/mm (`None`: rigid).
    pub fn stiffness_n_per_mm(&self) -> Option<f64> {
        match self {
            Actuator::Direct {
                stiffness_n_per_mm, ..
            }
            | Actuator::Spool {
                stiffness_n_per_mm, ..
            }
            | Actuator::LeadScrew {
                stiffness_n_per_mm, ..
            } => *stiffness_n_per_mm,
        }
    }

    /// Sets (or, with `None`, removes) the series stiffness.
    pub fn set_stiffness_n_per_mm(&mut self, value: Option<f64>) {
        match self {
            Actuator::Direct {
                stiffness_n_per_mm, ..
            }
            | Actuator::Spool {
                stiffness_n_per_mm, ..
            }
            | Actuator::LeadScrew {
                stiffness_n_per_mm, ..
            } => *stiffness_n_per_mm = value,
        }
    }
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
    /// Radial load the segment carries through its strips, acting straight down, N
    /// (0: none, the hub stays centred).
    #[serde(default, skip_serializing_if = "is_zero")]
    pub radial_load_n: f64,
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
                out_of_round_mm: 0.0,
                bend: None,
            },
            friction: 0.3,
            actuator: Actuator::LeadScrew {
                lead_mm: 1.0,
                efficiency: 0.3,
                max_torque_nm: 0.8,
                max_turns: 8.0,
                stiffness_n_per_mm: None,
            },
            operating_stroke_mm: Some(1.8),
            operating: None,
            duty: Duty {
                holding_force_n: 20.0,
                safety_factor: 2.0,
                cycles: 10_000,
                radial_load_n: 0.0,
            },
            end_plate_thickness_mm: 0.0,
            scatter: None,
            calibration: None,
        }
    }
}

impl Design {
    /// The operating point: `operating` when the file gives it, else the older
    /// `operating_stroke_mm` as a stroke (a design that gives neither does not validate;
    /// it reads as a zero stroke here).
    pub fn operating(&self) -> Operating {
        self.operating
            .unwrap_or(Operating::Stroke(self.operating_stroke_mm.unwrap_or(0.0)))
    }

    /// Sets the operating point in the spelling the design already uses: a stroke stays
    /// `operating_stroke_mm` where the design writes it so; anything else is `operating`.
    pub fn set_operating(&mut self, operating: Operating) {
        match operating {
            Operating::Stroke(s) if self.operating.is_none() => self.operating_stroke_mm = Some(s),
            other => {
                self.operating = Some(other);
                self.operating_stroke_mm = None;
            }
        }
    }

    /// Whether the design asks for more than today's rigid, fixed-stroke actuation: a set
    /// pull or torque, or a drive stiffness. Without it every result is as before.
    pub fn uses_actuation(&self) -> bool {
        !matches!(self.operating(), Operating::Stroke(_))
            || self.actuator.stiffness_n_per_mm().is_some()
    }
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

/// An optional value written without `Some(...)`, as a file spells it (the reader takes
/// the bare value as present).
fn plain_some<T: Serialize, S: Serializer>(value: &Option<T>, s: S) -> Result<S::Ok, S::Error> {
    match value {
        Some(v) => v.serialize(s),
        None => s.serialize_none(),
    }
}

/// Whether an optional number is at its default (left out of written files).
fn is_zero(v: &f64) -> bool {
    *v == 0.0
}

fn one() -> f64 {
    1.0
}

/// Whether a factor is at its default of 1 (left out of written files).
fn is_one(v: &f64) -> bool {
    *v == 1.0
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
            u64::try_from(v).map_err(|_| E::custom(cycles_out_of_range(v as f64)))
        }
        fn visit_f64<E: serde::de::Error>(self, v: f64) -> Result<u64, E> {
            if !v.is_finite() {
                return Err(E::custom(format!(
                    "duty.cycles = {v} is not a finite number; the allowed range is {}",
                    cycles_range()
                )));
            }
            if v.fract() != 0.0 {
                return Err(E::custom(format!(
                    "duty.cycles = {} is not a whole number; a whole number of cycles is expected, in the range {}",
                    show_number(v),
                    cycles_range()
                )));
            }
            // Whole, but past what a count can hold: out of range, not "not whole". The
            // range check against the table happens in `validate`; this only keeps the
            // conversion exact (2^53 is far past the table's upper bound).
            if !(0.0..=9_007_199_254_740_992.0).contains(&v) {
                return Err(E::custom(cycles_out_of_range(v)));
            }
            Ok(v as u64)
        }
    }
    deserializer.deserialize_any(Cycles)
}

fn cycles_range() -> String {
    crate::design::limit("duty.cycles").map_or_else(String::new, |l| l.range_text(l.max))
}

fn cycles_out_of_range(v: f64) -> String {
    format!(
        "duty.cycles = {} is outside the allowed range {}",
        show_number(v),
        cycles_range()
    )
}
