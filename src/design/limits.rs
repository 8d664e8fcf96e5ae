//! The plausible range of every numeric field of a design ([`limits`]), one table that
//! [`Design::validate`], the app's sliders and every error message read, and the
//! validation itself. Refused are only values that are malformed or outside these
//! ranges; a design that merely fails a check is valid here. The title's length and the
//! file's size and nesting depth have their limits here too.

use super::error::{DesignError, show_number};
use super::types::{Actuator, Design, FORMAT_VERSION, MaterialChoice, Operating};

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

    /// The range in words that say which ends are allowed, with the unit: `0.02 to 5 mm`,
    /// `more than 0, up to 1`, `from 1e-6, less than 1e9 N`. `max` is the upper bound in
    /// force ([`FieldLimit::max_for`]). Every message and the app's tooltips print it so.
    pub fn range_text(&self, max: f64) -> String {
        let (lo, hi) = (show_number(self.min), show_number(max));
        let range = match (self.min_excluded, self.max_excluded) {
            (false, false) => format!("{lo} to {hi}"),
            (true, false) => format!("more than {lo}, up to {hi}"),
            (false, true) => format!("from {lo}, less than {hi}"),
            (true, true) => format!("more than {lo} and less than {hi}"),
        };
        if self.unit.is_empty() {
            range
        } else {
            format!("{range} {}", self.unit)
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

/// Actuator ratings: from a millionth (smaller ratings only give results without sense,
/// such as an infinite spool angle) to below a billion.
const fn rating(field: &'static str, unit: &'static str, meaning: &'static str) -> FieldLimit {
    FieldLimit {
        max_excluded: true,
        ..closed(field, MIN_RATING, 1e9, unit, meaning)
    }
}

/// The smallest actuator rating a design may give.
const MIN_RATING: f64 = 1e-6;

/// Longest title, in characters (the sheet prints it on one line, shortened to fit).
pub const MAX_TITLE_CHARS: usize = 200;

/// Largest design file, bytes: a design is a few kilobytes; anything far larger is not one.
pub const MAX_FILE_BYTES: u64 = 1 << 20;

/// Deepest bracket nesting a design file may have: a design needs five levels.
pub const MAX_NESTING: usize = 64;

const TOLERANCE_SHARE_OF_BORE: f64 = 0.25;

/// Out-of-roundness up to a tenth of the nominal bore.
const OUT_OF_ROUND_SHARE_OF_BORE: f64 = 0.1;

static LIMITS: [FieldLimit; 38] = [
    closed(
        "title",
        0.0,
        MAX_TITLE_CHARS as f64,
        "characters",
        "free text naming the design",
    ),
    // From three: two strips, opposite each other, never meet on the hub, and the
    // clearance check's room 2 r tan(pi / N) has no finite value for them.
    closed(
        "strip.count",
        3.0,
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
    FieldLimit {
        max_relative: Some((LimitBasis::NominalBore, OUT_OF_ROUND_SHARE_OF_BORE)),
        ..closed(
            "bore.out_of_round_mm",
            0.0,
            500.0,
            "mm",
            "out-of-roundness: largest minus smallest bore diameter",
        )
    },
    // From 1 mm: the passage rule also refuses a bend tighter than the pipe itself.
    closed(
        "bore.bend",
        1.0,
        1e5,
        "mm",
        "centreline radius of the bend the relaxed segment must pass",
    ),
    closed(
        "end_plate_thickness_mm",
        0.0,
        1000.0,
        "mm",
        "thickness of each end plate (rigid length = free length + both plates)",
    ),
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
    // From 0.01: a lead screw below one per cent does not turn; smaller values only
    // give torques without sense (5e-324 needs an infinite torque).
    closed(
        "actuator.efficiency",
        0.01,
        1.0,
        "",
        "lead screw efficiency",
    ),
    rating(
        "actuator.max_turns",
        "turns",
        "largest number of screw turns",
    ),
    rating(
        "actuator.stiffness_n_per_mm",
        "N/mm",
        "series stiffness of the cord or drive (absent: rigid)",
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
    FieldLimit {
        max_relative: Some((LimitBasis::FreeLength, 1.0)),
        ..closed(
            "operating.Stroke",
            0.0,
            2000.0,
            "mm",
            "end-plate travel when holding (displacement control)",
        )
    },
    rating(
        "operating.Pull",
        "N",
        "set pull on the end plates (force control)",
    ),
    rating(
        "operating.Torque",
        "N m",
        "set torque at the spool or screw (force control)",
    ),
    closed("duty.holding_force_n", 0.0, 1e7, "N", "axial force to hold"),
    closed(
        "duty.radial_load_n",
        0.0,
        1e7,
        "N",
        "radial load the strips carry, acting straight down",
    ),
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
    // The range a calibration fit may end in (`calibrate::bounds`): a prototype five
    // times stiffer or softer than its material says is another design, not a correction.
    closed(
        "calibration.modulus_factor",
        0.2,
        5.0,
        "",
        "factor on Young's modulus, fitted to bench measurements",
    ),
    closed(
        "calibration.stroke_offset_mm",
        -100.0,
        100.0,
        "mm",
        "added to a measured stroke to give the model's stroke",
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

impl Design {
    /// Every numeric field paired with its path in the file; the actuator and material
    /// fields present depend on the variant chosen.
    pub(crate) fn numeric_fields(&self) -> Vec<(&'static str, f64)> {
        let mut fields = vec![
            ("title", self.title.chars().count() as f64),
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
            ("bore.out_of_round_mm", self.bore.out_of_round_mm),
        ]);
        if let Some(crate::bend::Bend::RadiusMm(r)) = self.bore.bend {
            fields.push(("bore.bend", r));
        }
        fields.extend([
            ("end_plate_thickness_mm", self.end_plate_thickness_mm),
            ("friction", self.friction),
        ]);
        match &self.actuator {
            Actuator::Direct {
                max_force_n,
                max_stroke_mm,
                ..
            } => fields.extend([
                ("actuator.max_force_n", *max_force_n),
                ("actuator.max_stroke_mm", *max_stroke_mm),
            ]),
            Actuator::Spool {
                radius_mm,
                max_torque_nm,
                max_angle_deg,
                ..
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
                ..
            } => fields.extend([
                ("actuator.lead_mm", *lead_mm),
                ("actuator.efficiency", *efficiency),
                ("actuator.max_torque_nm", *max_torque_nm),
                ("actuator.max_turns", *max_turns),
            ]),
        }
        if let Some(k) = self.actuator.stiffness_n_per_mm() {
            fields.push(("actuator.stiffness_n_per_mm", k));
        }
        if let Some(s) = self.operating_stroke_mm {
            fields.push(("operating_stroke_mm", s));
        }
        if let Some(op) = self.operating {
            fields.push((op.field(), op.value()));
        }
        fields.extend([
            ("duty.holding_force_n", self.duty.holding_force_n),
            ("duty.radial_load_n", self.duty.radial_load_n),
            ("duty.safety_factor", self.duty.safety_factor),
            // Exact for every count up to 2^53, far beyond the 1e12 limit.
            ("duty.cycles", self.duty.cycles as f64),
        ]);
        if let Some(c) = &self.calibration {
            fields.extend([
                ("calibration.modulus_factor", c.modulus_factor),
                ("calibration.stroke_offset_mm", c.stroke_offset_mm),
            ]);
        }
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
        self.validate_operating()?;
        for (field, value) in self.numeric_fields() {
            let Some(row) = limit(field) else { continue };
            if !row.admits(value, row.max_for(self)) {
                return Err(out_of_range(field, value, Some(row), self));
            }
        }
        if let Some(scatter) = &self.scatter {
            scatter.validate().map_err(scatter_error)?;
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
                                "{} MPa exceeds the tensile strength {} MPa; it must not be larger",
                                show_number(*strength),
                                show_number(*tensile_strength_mpa)
                            ),
                        });
                    }
                }
            }
        }
        Ok(())
    }
}

/// A refused scatter value as the design file names it (`scatter.thickness_mm`; the two
/// ends of the friction range are placed at `scatter.friction`).
fn scatter_error(e: crate::scatter::ScatterError) -> DesignError {
    match e {
        crate::scatter::ScatterError::OutOfRange {
            field,
            value,
            allowed,
        } => {
            let (path, end) = match field.split_once('.') {
                Some((path, end)) => (path, format!(" ({end})")),
                None => (field, String::new()),
            };
            DesignError::Invalid {
                field: format!("scatter.{path}"),
                message: format!(
                    "{}{end} is outside the allowed range: {allowed}",
                    show_number(value)
                ),
            }
        }
        other => DesignError::Invalid {
            field: "scatter".to_string(),
            message: other.to_string(),
        },
    }
}

impl Design {
    /// The operating point is given once (`operating`, or the older
    /// `operating_stroke_mm`), and a torque has a spool or screw to act through.
    fn validate_operating(&self) -> Result<(), DesignError> {
        let invalid = |message: &str| {
            Err(DesignError::Invalid {
                field: "operating".to_string(),
                message: message.to_string(),
            })
        };
        match (self.operating, self.operating_stroke_mm) {
            (Some(_), Some(_)) => invalid(
                "the operating point is given twice, here and as operating_stroke_mm; keep one \
                 (operating_stroke_mm: S means operating: Stroke(S))",
            ),
            (None, None) => invalid(
                "the operating point is missing: give operating: Stroke(mm), Pull(n) or \
                 Torque(nm) (or the older operating_stroke_mm)",
            ),
            (Some(Operating::Torque(_)), _) if matches!(self.actuator, Actuator::Direct { .. }) => {
                invalid(
                    "Torque needs a spool or a lead screw to act through; a Direct actuator \
                     takes Stroke(mm) or Pull(n)",
                )
            }
            _ => Ok(()),
        }
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

pub(crate) fn pipe_inside_diameter_mm(nps: &str, schedule: &str) -> Option<f64> {
    crate::pipe::find(nps, schedule).map(|p| p.inside_diameter_mm())
}
#[cfg(test)]
mod tests {
    use super::*;

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
        let Some(stroke) = limit("operating.Stroke") else {
            panic!("no stroke row");
        };
        assert_eq!(stroke.max_for(&design), design.strip.free_length_mm);
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
            stiffness_n_per_mm: Some(1.0),
        };
        design.operating = Some(Operating::Pull(1.0));
        design.bore.bend = Some(crate::bend::Bend::RadiusMm(100.0));
        design.calibration = Some(crate::design::Calibration::default());
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
            stiffness_n_per_mm: None,
        };
        design.operating = Some(Operating::Stroke(1.0));
        seen.extend(design.numeric_fields().iter().map(|f| f.0));
        design.operating = Some(Operating::Torque(1.0));
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
        let ok: crate::design::Duty =
            ron::from_str("(holding_force_n: 1.0, safety_factor: 1.0, cycles: 1e6)")
                .unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(ok.cycles, 1_000_000);
        assert!(
            ron::from_str::<crate::design::Duty>(
                "(holding_force_n: 1.0, safety_factor: 1.0, cycles: 1.5)"
            )
            .is_err()
        );
        assert!(
            ron::from_str::<crate::design::Duty>(
                "(holding_force_n: 1.0, safety_factor: 1.0, cycles: -3)"
            )
            .is_err()
        );
    }
}
