//! The segment: N identical strips on a hub between two end plates, in a bore. Turns a
//! [`Design`] into SI quantities once (material, stiffness model, allowables, actuator
//! mapping), and gives dimensional states, sweeps and inverse queries at any bore.
//!
//! Units: the public API speaks millimetres, newtons, N m, MPa and degrees, as the field
//! names say. Inside, the strip solver works nondimensionally (`crate::elastica`); this
//! module is the one place that converts.

use serde::Serialize;

use crate::design::{Design, DesignError, MaterialChoice, Stiffness};
use crate::elastica::{
    self, LimitReason, Overlap, Path, PathError, Phase, StripState, StrokeQuery,
};
use crate::material::{self, Material};

/// Why a segment or a state could not be formed.
#[derive(Debug, thiserror::Error)]
pub enum SegmentError {
    /// The design itself is not acceptable (see [`DesignError`]).
    #[error(transparent)]
    Design(#[from] DesignError),
    /// The relaxed segment does not fit this bore: the strip edges already touch or cut
    /// the wall, so the model has no state (gap `g <= 0`).
    #[error(
        "the relaxed strips do not fit a {bore_mm} mm bore: the gap to the wall is {gap_mm:.4} mm (it must be > 0)"
    )]
    NoClearance {
        /// Bore diameter asked for.
        bore_mm: f64,
        /// Gap from the relaxed strip centreline to the wall (edge contact), negative or zero.
        gap_mm: f64,
    },
    /// A stroke or bore given to a query is not a finite number or is negative.
    #[error("{what} = {value} is not a valid value ({allowed})")]
    BadQuery {
        /// Which quantity.
        what: &'static str,
        /// The value given.
        value: f64,
        /// The allowed range in words.
        allowed: &'static str,
    },
}

/// Which bending modulus the model used, and why.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub enum StiffnessUsed {
    /// `E' = E` (narrow strip, beam theory).
    Beam,
    /// `E' = E / (1 - nu^2)` (wide strip, plate in cylindrical bending).
    Plate,
}

impl StiffnessUsed {
    /// Short name for tables.
    pub fn name(self) -> &'static str {
        match self {
            StiffnessUsed::Beam => "beam (E' = E)",
            StiffnessUsed::Plate => "plate (E' = E/(1-nu^2))",
        }
    }
}

/// How the actuator's position and effort read at a state.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct ActuatorReading {
    /// Position in the actuator's own unit (mm of pull, degrees of spool, screw turns).
    pub position: f64,
    /// Unit of `position`.
    pub position_unit: &'static str,
    /// Effort in the actuator's own unit (N of pull, N m of torque).
    pub effort: f64,
    /// Unit of `effort`.
    pub effort_unit: &'static str,
}

/// The strip geometry and material resolved into SI, with the derived constants.
#[derive(Clone, Debug, PartialEq)]
pub struct Segment {
    /// The design this segment was made from.
    pub design: Design,
    /// Material data (library grade or custom entry).
    pub material: Material,
    /// Bending modulus choice actually used.
    pub stiffness_used: StiffnessUsed,
    /// One line saying why that stiffness model was used.
    pub stiffness_reason: String,
    /// Effective modulus `E'` in Pa.
    pub modulus_pa: f64,
    /// Bending stiffness `B = E' b t^3 / 12` in N m^2.
    pub bending_stiffness_nm2: f64,
    /// Smallest, nominal and largest bore within tolerance, mm.
    pub bore_smallest_mm: f64,
    /// Nominal bore, mm.
    pub bore_nominal_mm: f64,
    /// Largest bore, mm.
    pub bore_largest_mm: f64,
    /// Static allowable stress `0.75 Su`, MPa (common practice for statically loaded flat springs).
    pub static_allowable_mpa: f64,
    /// Fatigue strength at the design's cycle count, MPa (Shigley S-N approximation).
    pub fatigue_strength_mpa: f64,
    /// Peak stress at which the Goodman factor of safety is 1 for zero-to-peak cycles, MPa.
    pub fatigue_allowable_mpa: f64,
}

/// State of the segment at one bore and stroke. The first twelve fields are the names the
/// outside checks read; `None` prints as JSON `null` and an empty CSV cell.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SegmentState {
    /// End-plate travel, mm.
    pub stroke_mm: f64,
    /// `free`, `point-contact`, `line-contact`, `beyond-limit` or `solve-failed` in files.
    pub phase: Phase,
    /// Axial compression per strip, N.
    pub axial_force_per_strip_n: Option<f64>,
    /// Wall contact force per strip, N.
    pub contact_force_per_strip_n: Option<f64>,
    /// Pull the actuator applies to the plates, `N P`, N.
    pub actuator_force_n: Option<f64>,
    /// Total radial force on the wall, `N F`, N.
    pub radial_force_n: Option<f64>,
    /// Axial holding force by friction, `mu N F`, N.
    pub holding_force_n: Option<f64>,
    /// Diameter over the strips (edge corners) at the crest, mm.
    pub outer_diameter_mm: Option<f64>,
    /// Length of the flat run on the wall, mm.
    pub flat_length_mm: Option<f64>,
    /// Peak stress, bending plus axial, MPa.
    pub max_stress_mpa: Option<f64>,
    /// Stroke at first contact in this bore, mm (`None`: the bore is out of reach).
    pub first_contact_stroke_mm: Option<f64>,
    /// Stroke at the onset of line contact in this bore, mm (`None`: never on this path).
    pub line_contact_stroke_mm: Option<f64>,
    /// Bore diameter, mm.
    pub bore_mm: f64,
    /// Gap from the relaxed strip to the wall (edge contact), mm.
    pub gap_mm: f64,
    /// Where the model stops in this bore, mm.
    pub limit_stroke_mm: f64,
    /// Why the model stops there.
    pub limit_reason: LimitReason,
    /// Crest height above the relaxed strip, mm.
    pub crest_height_mm: Option<f64>,
    /// Static factor of safety `0.75 Su / max_stress`.
    pub static_safety_factor: Option<f64>,
    /// Goodman factor of safety for zero-to-peak cycles.
    pub fatigue_safety_factor: Option<f64>,
    /// Strain energy stored in all strips, J.
    pub strain_energy_j: Option<f64>,
    /// Actuator position and effort in its own units.
    pub actuator: Option<ActuatorReading>,
    /// Why the state is missing, when `phase` is `beyond-limit` or `solve-failed`.
    pub reason: Option<String>,
}

/// The stroke-against-bore row for one bore (the `bores` table).
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct BoreRow {
    /// Bore diameter, mm.
    pub bore_mm: f64,
    /// Stroke at first contact, mm.
    pub first_contact_stroke_mm: Option<f64>,
    /// Least stroke at which `mu N F >= holding force x safety factor`, mm.
    pub holding_stroke_mm: Option<f64>,
    /// Least stroke at which the static or fatigue factor of safety falls to 1, mm.
    pub stress_limit_stroke_mm: Option<f64>,
    /// Stroke at the onset of line contact, mm.
    pub line_contact_stroke_mm: Option<f64>,
    /// Stroke where the model stops, mm.
    pub limit_stroke_mm: Option<f64>,
}

/// The fixed outside names of a state, in order: the columns every curve CSV starts with.
pub const STATE_COLUMNS: [&str; 12] = [
    "stroke_mm",
    "phase",
    "axial_force_per_strip_n",
    "contact_force_per_strip_n",
    "actuator_force_n",
    "radial_force_n",
    "holding_force_n",
    "outer_diameter_mm",
    "flat_length_mm",
    "max_stress_mpa",
    "first_contact_stroke_mm",
    "line_contact_stroke_mm",
];

/// The columns of a stroke-against-bore row, in order.
pub const BORE_ROW_COLUMNS: [&str; 6] = [
    "bore_mm",
    "first_contact_stroke_mm",
    "holding_stroke_mm",
    "stress_limit_stroke_mm",
    "line_contact_stroke_mm",
    "limit_stroke_mm",
];

/// A CSV cell: Rust's default `f64` formatting (shortest round trip), empty for `None`.
pub fn csv_cell(v: Option<f64>) -> String {
    v.map(|x| x.to_string()).unwrap_or_default()
}

impl SegmentState {
    /// The cells of [`STATE_COLUMNS`] for this state.
    pub fn csv_cells(&self) -> [String; 12] {
        [
            self.stroke_mm.to_string(),
            self.phase.to_string(),
            csv_cell(self.axial_force_per_strip_n),
            csv_cell(self.contact_force_per_strip_n),
            csv_cell(self.actuator_force_n),
            csv_cell(self.radial_force_n),
            csv_cell(self.holding_force_n),
            csv_cell(self.outer_diameter_mm),
            csv_cell(self.flat_length_mm),
            csv_cell(self.max_stress_mpa),
            csv_cell(self.first_contact_stroke_mm),
            csv_cell(self.line_contact_stroke_mm),
        ]
    }
}

impl BoreRow {
    /// The row as one CSV line of [`BORE_ROW_COLUMNS`] (no line end).
    pub fn csv_line(&self) -> String {
        [
            self.bore_mm.to_string(),
            csv_cell(self.first_contact_stroke_mm),
            csv_cell(self.holding_stroke_mm),
            csv_cell(self.stress_limit_stroke_mm),
            csv_cell(self.line_contact_stroke_mm),
            csv_cell(self.limit_stroke_mm),
        ]
        .join(",")
    }
}

/// Fraction of tensile strength allowed for static stress (common practice for statically
/// loaded flat springs; docs/contract.md fixes it).
pub const STATIC_FRACTION: f64 = 0.75;

/// Below this width-to-thickness ratio `Auto` uses beam stiffness (common practice).
pub const PLATE_RATIO: f64 = 10.0;

/// Fatigue strength at `cycles` by the Shigley S-N approximation: `0.9 Su` at 10^3 cycles,
/// `Se` at 10^6 and beyond, log-log between (Shigley, Mechanical Engineering Design,
/// section 6-7). Below 10^3 cycles the 10^3 value is used.
pub fn fatigue_strength_mpa(tensile_mpa: f64, endurance_mpa: f64, cycles: f64) -> f64 {
    let s3 = 0.9 * tensile_mpa;
    if cycles >= 1e6 {
        endurance_mpa
    } else if cycles <= 1e3 {
        s3
    } else {
        let t = (cycles.log10() - 3.0) / 3.0;
        (s3.ln() + t * (endurance_mpa.ln() - s3.ln())).exp()
    }
}

impl Segment {
    /// Resolves a design: validates it, looks up the material and the pipe, picks the
    /// stiffness model and computes the allowables.
    pub fn new(design: &Design) -> Result<Segment, SegmentError> {
        design.validate()?;
        let strip = &design.strip;
        let material = match &strip.material {
            MaterialChoice::Grade(id) => {
                material::find(id)
                    .cloned()
                    .ok_or_else(|| DesignError::UnknownGrade {
                        id: id.clone(),
                        known: material::ids().into_iter().map(String::from).collect(),
                    })?
            }
            MaterialChoice::Custom {
                name,
                youngs_modulus_gpa,
                poisson_ratio,
                tensile_strength_mpa,
                yield_strength_mpa,
                endurance_limit_mpa,
            } => material::custom(
                name,
                *youngs_modulus_gpa,
                *poisson_ratio,
                *tensile_strength_mpa,
                *yield_strength_mpa,
                *endurance_limit_mpa,
            ),
        };
        let ratio = strip.width_mm / strip.thickness_mm;
        let (stiffness_used, stiffness_reason) = match strip.stiffness {
            Stiffness::Beam => (StiffnessUsed::Beam, "beam chosen in the design".to_string()),
            Stiffness::Plate => (
                StiffnessUsed::Plate,
                "plate chosen in the design".to_string(),
            ),
            Stiffness::Auto if ratio >= PLATE_RATIO => (
                StiffnessUsed::Plate,
                format!("automatic: width/thickness = {ratio:.1} >= {PLATE_RATIO} (wide strip)"),
            ),
            Stiffness::Auto => (
                StiffnessUsed::Beam,
                format!("automatic: width/thickness = {ratio:.1} < {PLATE_RATIO} (narrow strip)"),
            ),
        };
        let e = material.youngs_modulus_gpa * 1e9;
        let nu = material.poisson_ratio;
        let modulus_pa = match stiffness_used {
            StiffnessUsed::Beam => e,
            StiffnessUsed::Plate => e / (1.0 - nu * nu),
        };
        // A bench calibration's factor on E (and so on E'); without one, untouched.
        let modulus_pa = match design.calibration {
            Some(c) => modulus_pa * c.modulus_factor,
            None => modulus_pa,
        };
        let b = strip.width_mm * 1e-3;
        let t = strip.thickness_mm * 1e-3;
        let bending_stiffness_nm2 = modulus_pa * b * t.powi(3) / 12.0;
        let su = material.tensile_strength_mpa;
        let fatigue_strength =
            fatigue_strength_mpa(su, material.endurance_limit_mpa, design.duty.cycles as f64);
        // n_f = 1 / (sa/Sf + sm/Su) with sa = sm = s/2  =>  s at n_f = 1 is 2 / (1/Sf + 1/Su).
        let fatigue_allowable_mpa = 2.0 / (1.0 / fatigue_strength + 1.0 / su);
        Ok(Segment {
            design: design.clone(),
            bore_smallest_mm: design.bore.smallest_mm()?,
            bore_nominal_mm: design.bore.nominal_mm()?,
            bore_largest_mm: design.bore.largest_mm()?,
            material,
            stiffness_used,
            stiffness_reason,
            modulus_pa,
            bending_stiffness_nm2,
            static_allowable_mpa: STATIC_FRACTION * su,
            fatigue_strength_mpa: fatigue_strength,
            fatigue_allowable_mpa,
        })
    }

    fn length_m(&self) -> f64 {
        self.design.strip.free_length_mm * 1e-3
    }

    /// Number of strips.
    pub fn count(&self) -> f64 {
        f64::from(self.design.strip.count)
    }

    /// Force unit of the nondimensional solver, `B / L^2`, in N.
    fn force_unit_n(&self) -> f64 {
        self.bending_stiffness_nm2 / self.length_m().powi(2)
    }

    /// Gap from the relaxed strip centreline to the wall for edge contact, mm:
    /// `g = sqrt(R^2 - b^2/4) - t/2 - r_m` (NaN when the strip is wider than the bore).
    pub fn gap_mm(&self, bore_mm: f64) -> f64 {
        let r = 0.5 * bore_mm;
        let s = &self.design.strip;
        (r * r - 0.25 * s.width_mm * s.width_mm).sqrt()
            - 0.5 * s.thickness_mm
            - self.design.mount_radius_mm
    }

    /// Diameter over the strip corners at crest height `h`, mm:
    /// `2 sqrt((r_m + h + t/2)^2 + b^2/4)`.
    pub fn outer_diameter_mm(&self, crest_height_mm: f64) -> f64 {
        let s = &self.design.strip;
        let r = self.design.mount_radius_mm + crest_height_mm + 0.5 * s.thickness_mm;
        2.0 * (r * r + 0.25 * s.width_mm * s.width_mm).sqrt()
    }

    /// The largest diameter of the relaxed segment: end plates or strips, mm.
    pub fn relaxed_diameter_mm(&self) -> f64 {
        self.outer_diameter_mm(0.0)
            .max(self.design.end_plate_diameter_mm)
    }

    /// Largest bore any stroke can reach (free crest peaks near 0.40 L), mm.
    pub fn largest_reachable_bore_mm(&self) -> f64 {
        self.bore_for_gap_mm(elastica::max_reachable_gap() * self.design.strip.free_length_mm)
    }

    /// Bore whose gap is `gap_mm` (inverse of [`Segment::gap_mm`]), mm.
    pub fn bore_for_gap_mm(&self, gap_mm: f64) -> f64 {
        let s = &self.design.strip;
        let r = gap_mm + 0.5 * s.thickness_mm + self.design.mount_radius_mm;
        2.0 * (r * r + 0.25 * s.width_mm * s.width_mm).sqrt()
    }

    /// Largest bore the strips touch within `stroke_mm` (free crest height at that
    /// stroke), mm.
    pub fn largest_bore_at_stroke_mm(&self, stroke_mm: f64) -> f64 {
        let l = self.design.strip.free_length_mm;
        let free =
            Path::new(self.design.strip.ends, 1.0).map(|p| p.state((stroke_mm / l).min(0.999)));
        match free {
            Ok(s) if s.phase == Phase::Free => self.bore_for_gap_mm(s.crest_height * l),
            _ => self.largest_reachable_bore_mm(),
        }
    }

    /// The actuator's maximum stroke, mm.
    pub fn max_stroke_mm(&self) -> f64 {
        self.design.actuator.max_stroke_mm()
    }

    /// The largest pull on the plates the actuator can give, N.
    pub fn max_pull_n(&self) -> f64 {
        self.design.actuator.max_pull_n()
    }

    /// Actuator position and effort for a stroke and plate pull. The position counts the
    /// actuator's travel, `stroke + pull / stiffness` through a compliant drive (the
    /// stroke itself when the drive is rigid).
    pub fn actuator_reading(&self, stroke_mm: f64, pull_n: f64) -> ActuatorReading {
        let travel_mm = match self.design.actuator.stiffness_n_per_mm() {
            Some(k) => stroke_mm + pull_n / k,
            None => stroke_mm,
        };
        self.design.actuator.reading(travel_mm, pull_n)
    }

    /// The actuator's rating in its own effort unit (N or N m).
    pub fn actuator_effort_rating(&self) -> f64 {
        self.design.actuator.effort_rating()
    }

    /// Contact force per strip that gives the required holding force times the safety
    /// factor, N.
    pub fn required_contact_per_strip_n(&self) -> f64 {
        let d = &self.design;
        self.required_holding_force_n() / (d.friction * self.count())
    }

    /// Peak stress that makes the static or the fatigue factor of safety 1, MPa.
    pub fn stress_allowable_mpa(&self) -> f64 {
        self.static_allowable_mpa.min(self.fatigue_allowable_mpa)
    }

    /// Sets up the path at a bore.
    pub fn at_bore(&self, bore_mm: f64) -> Result<BorePath<'_>, SegmentError> {
        if !(bore_mm.is_finite() && bore_mm > 0.0) {
            return Err(SegmentError::BadQuery {
                what: "bore_mm",
                value: bore_mm,
                allowed: "a positive number of mm",
            });
        }
        let gap_mm = self.gap_mm(bore_mm);
        let l = self.design.strip.free_length_mm;
        match Path::new(self.design.strip.ends, gap_mm / l) {
            Ok(path) => Ok(BorePath {
                segment: self,
                bore_mm,
                gap_mm,
                path,
            }),
            Err(PathError::NoClearance { .. }) => {
                Err(SegmentError::NoClearance { bore_mm, gap_mm })
            }
            Err(PathError::NotFinite) => Err(SegmentError::BadQuery {
                what: "bore_mm",
                value: bore_mm,
                allowed: "a bore whose gap to the strips is a finite number of mm",
            }),
        }
    }

    /// The stroke-against-bore row at one bore: every cell `None` when the relaxed segment
    /// does not fit.
    pub fn bore_row(&self, bore_mm: f64) -> BoreRow {
        match self.at_bore(bore_mm) {
            Ok(p) => p.row(),
            Err(_) => BoreRow {
                bore_mm,
                first_contact_stroke_mm: None,
                holding_stroke_mm: None,
                stress_limit_stroke_mm: None,
                line_contact_stroke_mm: None,
                limit_stroke_mm: None,
            },
        }
    }
}

/// The segment at one bore: its path, states and inverse queries in millimetres.
#[derive(Clone, Debug)]
pub struct BorePath<'a> {
    segment: &'a Segment,
    bore_mm: f64,
    gap_mm: f64,
    path: Path,
}

impl BorePath<'_> {
    fn l_mm(&self) -> f64 {
        self.segment.design.strip.free_length_mm
    }

    /// Bore diameter, mm.
    pub fn bore_mm(&self) -> f64 {
        self.bore_mm
    }

    /// Gap to the wall, mm.
    pub fn gap_mm(&self) -> f64 {
        self.gap_mm
    }

    /// The segment this path belongs to.
    pub fn segment(&self) -> &Segment {
        self.segment
    }

    /// Strip free length, mm.
    pub fn free_length_mm(&self) -> f64 {
        self.l_mm()
    }

    /// The nondimensional path underneath.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Stroke at first contact, mm.
    pub fn first_contact_stroke_mm(&self) -> Option<f64> {
        self.path.first_contact_stroke().map(|d| d * self.l_mm())
    }

    /// Stroke at line-contact onset, mm.
    pub fn line_contact_stroke_mm(&self) -> Option<f64> {
        self.path.line_contact_stroke().map(|d| d * self.l_mm())
    }

    /// Stroke where the model stops, mm.
    pub fn limit_stroke_mm(&self) -> f64 {
        self.path.limit().stroke * self.l_mm()
    }

    /// Why the model stops.
    pub fn limit_reason(&self) -> LimitReason {
        self.path.limit().reason
    }

    /// Stroke where the axial force per strip peaks before the limit (past it the actuator
    /// sees negative stiffness), mm; `None` when it rises all the way.
    pub fn axial_peak_stroke_mm(&self) -> Option<f64> {
        self.path.peaks().axial.map(|d| d * self.l_mm())
    }

    /// Stroke where the contact force peaks before the limit (past it more stroke loosens
    /// the grip), mm; `None` when it rises all the way.
    pub fn contact_peak_stroke_mm(&self) -> Option<f64> {
        self.path.peaks().contact.map(|d| d * self.l_mm())
    }

    /// Least stroke reaching the required holding force x safety factor, mm (or why there
    /// is none: not reached before the limit, or a failure of the solver).
    pub fn holding_stroke_mm(&self) -> StrokeQuery {
        let f_nd = self.segment.required_contact_per_strip_n() / self.segment.force_unit_n();
        self.path.stroke_for_contact(f_nd).map(|d| d * self.l_mm())
    }

    /// Least stroke at which the static or fatigue factor of safety falls to 1, mm (or why
    /// there is none).
    pub fn stress_limit_stroke_mm(&self) -> StrokeQuery {
        let (wk, wp) = self.stress_weights_mpa();
        self.path
            .stroke_for_linear(wk, wp, self.segment.stress_allowable_mpa())
            .map(|d| d * self.l_mm())
    }

    /// Weights that turn nondimensional `(kappa_max, axial)` into MPa:
    /// `sigma = E' t kappa / (2 L) + P B / (L^2 b t)`.
    fn stress_weights_mpa(&self) -> (f64, f64) {
        let s = self.segment;
        let l = s.length_m();
        let t = s.design.strip.thickness_mm * 1e-3;
        let b = s.design.strip.width_mm * 1e-3;
        let wk = s.modulus_pa * t / (2.0 * l) * 1e-6;
        let wp = s.force_unit_n() / (b * t) * 1e-6;
        (wk, wp)
    }

    /// The stroke-against-bore row.
    pub fn row(&self) -> BoreRow {
        BoreRow {
            bore_mm: self.bore_mm,
            first_contact_stroke_mm: self.first_contact_stroke_mm(),
            holding_stroke_mm: self.holding_stroke_mm().ok(),
            stress_limit_stroke_mm: self.stress_limit_stroke_mm().ok(),
            line_contact_stroke_mm: self.line_contact_stroke_mm(),
            limit_stroke_mm: Some(self.limit_stroke_mm()),
        }
    }

    /// The nondimensional strip state at a stroke in mm.
    pub fn strip_state(&self, stroke_mm: f64) -> StripState {
        self.path.state(stroke_mm / self.l_mm())
    }

    /// The segment state at a stroke in mm.
    pub fn state(&self, stroke_mm: f64) -> SegmentState {
        let seg = self.segment;
        let s = self.strip_state(stroke_mm);
        let l_mm = self.l_mm();
        let unit_n = seg.force_unit_n();
        let n = seg.count();
        let ok = s.phase.has_state();
        let some = |v: f64| ok.then_some(v);
        let axial = s.axial * unit_n;
        let contact = s.contact * unit_n;
        let (wk, wp) = self.stress_weights_mpa();
        let stress = wk * s.kappa_max + wp * s.axial;
        let su = seg.material.tensile_strength_mpa;
        let fatigue_fos = 2.0 / (stress * (1.0 / seg.fatigue_strength_mpa + 1.0 / su));
        let reason = (!ok).then(|| {
            if stroke_mm < 0.0 || !stroke_mm.is_finite() {
                "stroke must be a finite number >= 0".to_string()
            } else if s.phase == Phase::SolveFailed {
                format!(
                    "the solver failed to find the {} state at {stroke_mm:.3} mm (short of the model's limit at {:.3} mm): no state is reported",
                    self.path.phase_at(s.stroke).name().replace('-', " "),
                    self.limit_stroke_mm(),
                )
            } else {
                format!(
                    "beyond the model's limit at {:.3} mm: {}",
                    self.limit_stroke_mm(),
                    self.limit_reason().describe()
                )
            }
        });
        SegmentState {
            stroke_mm,
            phase: s.phase,
            axial_force_per_strip_n: some(axial),
            contact_force_per_strip_n: some(contact),
            actuator_force_n: some(n * axial),
            radial_force_n: some(n * contact),
            holding_force_n: some(seg.design.friction * n * contact),
            outer_diameter_mm: some(seg.outer_diameter_mm(s.crest_height * l_mm)),
            flat_length_mm: some(s.flat_length * l_mm),
            max_stress_mpa: some(stress),
            first_contact_stroke_mm: self.first_contact_stroke_mm(),
            line_contact_stroke_mm: self.line_contact_stroke_mm(),
            bore_mm: self.bore_mm,
            gap_mm: self.gap_mm,
            limit_stroke_mm: self.limit_stroke_mm(),
            limit_reason: self.limit_reason(),
            crest_height_mm: some(s.crest_height * l_mm),
            static_safety_factor: some(seg.static_allowable_mpa / stress),
            fatigue_safety_factor: some(fatigue_fos),
            strain_energy_j: some(n * s.energy * seg.bending_stiffness_nm2 / seg.length_m()),
            actuator: ok.then(|| seg.actuator_reading(stroke_mm, n * axial)),
            reason,
        }
    }

    /// The force-stroke curve: `points` strokes from 0 to the smaller of the limit and the
    /// actuator's maximum stroke (through a compliant drive, the stroke where the travel
    /// reaches that maximum), inclusive.
    pub fn sweep(&self, points: usize) -> Vec<SegmentState> {
        let end = crate::actuation::sweep_end_mm(self);
        let points = points.max(2);
        (0..points)
            .map(|i| self.state(end * (i as f64 / (points - 1) as f64)))
            .collect()
    }

    /// Where the strip, at `stroke_mm`, leaves the room between the plates: the least
    /// stroke (mm) from which it does so, and how. `None` when it does not.
    pub fn overlap_mm(&self, stroke_mm: f64) -> Option<(f64, Overlap)> {
        let l = self.l_mm();
        self.path
            .overlap_onset(stroke_mm / l)
            .map(|(onset, kind)| (onset * l, kind))
    }

    /// The strip centreline at a stroke: `(axial position, radius)` pairs in mm from the
    /// first end plate, for drawing. Empty beyond the limit.
    pub fn shape_mm(&self, stroke_mm: f64, per_span: usize) -> Vec<[f64; 2]> {
        let l = self.l_mm();
        let r_m = self.segment.design.mount_radius_mm;
        self.path
            .shape(stroke_mm / l, per_span)
            .into_iter()
            .map(|[x, y]| [x * l, r_m + y * l])
            .collect()
    }
}
