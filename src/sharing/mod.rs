//! Load sharing between the strips: a radial load on the hub (the segment's weight in a
//! horizontal line), an out-of-round bore and unequal strips. The hub moves off the bore's
//! centre until the strips' contact forces, each strip solved by the strip model at its own
//! gap, balance the load; the relaxed rim (the larger of the end plates and the relaxed
//! strips) rests on the wall and carries what the strips do not. Gives the hub offset, the
//! per-strip states, the segment totals, the bore-level strokes (first strip touches, the
//! strips lift the hub off its rest, last strip touches, the first strip's limit) and the
//! governing case over clocking and the bore's major axis. The model is the mechanics
//! note's section "Load sharing".
//!
//! Units: millimetres, newtons, MPa at the API, as the names say; the strip solver
//! underneath is nondimensional (`crate::elastica`). Cross-section plane: `y` up, `z` to the
//! right looking along the bore; a strip at clock angle `theta` (clockwise from the top)
//! points along `(cos theta, sin theta)`. With no load, a round bore and equal strips the
//! results are the centred model's ([`crate::segment::BorePath`]) exactly.

pub mod checks;
mod entry;
mod geometry;
mod near;
mod solve;

pub use near::{NEAR_ITER, NearCounts, NearPlan};

pub use entry::{
    BoreCases, CaseChoice, CheckInputs, LoadedPoint, STRIP_COLUMNS, SharingChecks, StripRow,
    bend_passage, checks_at, checks_with, design_uses_sharing, loaded_point, loading_of,
    offset_exaggeration, strip_rows, strips_csv, wall_travel_mm,
};

use std::cell::OnceCell;
use std::f64::consts::PI;

use serde::{Deserialize, Serialize};

use crate::elastica::{LimitReason, Path, Phase, StripState};
use crate::segment::{BorePath, Segment, SegmentError, SegmentState};

use geometry::Ellipse;

/// Which diameter of an out-of-round bore lies along the load (vertical).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
pub enum MajorAxis {
    /// The largest diameter is vertical, along the load.
    #[default]
    Vertical,
    /// The largest diameter is horizontal, across the load.
    Horizontal,
}

/// What sits on the load line at the bottom (clock 180 degrees).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
pub enum Clocking {
    /// A strip.
    #[default]
    Strip,
    /// The middle of the gap between two strips.
    Gap,
}

impl MajorAxis {
    /// Machine name (`vertical`, `horizontal`).
    pub fn name(self) -> &'static str {
        match self {
            MajorAxis::Vertical => "vertical",
            MajorAxis::Horizontal => "horizontal",
        }
    }
}

impl Clocking {
    /// Machine name (`strip`, `gap`).
    pub fn name(self) -> &'static str {
        match self {
            Clocking::Strip => "strip",
            Clocking::Gap => "gap",
        }
    }
}

/// One strip's deviation from the nominal strip, added to the nominal values, mm.
#[derive(Clone, Copy, Debug, Default, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct StripDeviation {
    /// Added to the nominal thickness, mm.
    pub thickness_mm: f64,
    /// Added to the nominal width, mm.
    pub width_mm: f64,
    /// Added to the nominal free length, mm.
    pub free_length_mm: f64,
}

/// What loads the segment and how the bore and the strips depart from the ideal.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Loading {
    /// Radial load on the hub, acting straight down, N (0 to 1e7).
    pub radial_load_n: f64,
    /// Out-of-roundness, largest minus smallest diameter, mm (0 to a tenth of the bore).
    pub out_of_round_mm: f64,
    /// Which diameter is the largest.
    pub major_axis: MajorAxis,
    /// What sits on the load line at the bottom.
    pub clocking: Clocking,
    /// Per-strip deviations in order of clock angle from the top; empty: equal strips.
    /// When given, one per strip.
    pub deviations: Vec<StripDeviation>,
}

/// Largest radial load accepted, N.
pub const MAX_RADIAL_LOAD_N: f64 = 1e7;

/// Why a loaded state could not be found.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum SolveFailure {
    /// The hub-offset iteration did not settle within its bound.
    #[error(
        "the hub-offset solve did not settle within {iterations} iterations at stroke {stroke_mm} mm"
    )]
    IterationLimit {
        /// Stroke, mm.
        stroke_mm: f64,
        /// The bound that was reached.
        iterations: usize,
    },
    /// The nested roots (unequal strips) closed in on an offset where the force balance
    /// jumps without crossing zero short of any strip's limit (not seen in the tests; kept
    /// so that such a point is reported, never passed off as a state).
    #[error(
        "the hub-offset solve for unequal strips stalled at stroke {stroke_mm} mm with {residual_n:.3e} N out of balance"
    )]
    Stalled {
        /// Stroke, mm.
        stroke_mm: f64,
        /// Size of the force balance's residual there, N.
        residual_n: f64,
    },
    /// A strip's force came out not finite.
    #[error("strip {strip} gave a force that is not a finite number at stroke {stroke_mm} mm")]
    NotFinite {
        /// Strip index in clock order.
        strip: usize,
        /// Stroke, mm.
        stroke_mm: f64,
    },
    /// No rest position balances the load tangentially on the rest support.
    #[error("no rest position on the bore wall balances the load at stroke {stroke_mm} mm")]
    NoRestBalance {
        /// Stroke, mm.
        stroke_mm: f64,
    },
    /// The bore is so out of round for this rim that the rim would touch the wall at two
    /// points off the load line; unequal strips are not modelled there.
    #[error(
        "the relaxed rim (radius {rim_mm:.3} mm) is larger than the bore's least radius of curvature ({curvature_mm:.3} mm); unequal strips need a rounder bore or a smaller rim"
    )]
    RimTooLargeForOvality {
        /// Rim radius, mm.
        rim_mm: f64,
        /// Least radius of curvature of the wall, mm.
        curvature_mm: f64,
    },
}

/// Why load sharing could not be set up or solved.
#[derive(Debug, thiserror::Error)]
pub enum SharingError {
    /// The segment or the bore is not acceptable (see [`SegmentError`]).
    #[error(transparent)]
    Segment(#[from] SegmentError),
    /// An input is out of its range.
    #[error("{what} = {value} is not valid ({allowed})")]
    BadInput {
        /// Which input.
        what: &'static str,
        /// The value given.
        value: f64,
        /// The allowed range in words.
        allowed: String,
    },
    /// The deviation list does not have one entry per strip.
    #[error("strip deviations: {given} given for {strips} strips (give one per strip, or none)")]
    DeviationCount {
        /// Entries given.
        given: usize,
        /// Strips in the design.
        strips: usize,
    },
    /// The relaxed rim does not fit the out-of-round bore.
    #[error(
        "the relaxed rim ({rim_mm:.3} mm across) does not fit the out-of-round bore (least diameter {least_mm:.3} mm)"
    )]
    RimDoesNotFit {
        /// Rim diameter, mm.
        rim_mm: f64,
        /// Least bore diameter, mm.
        least_mm: f64,
    },
    /// The solve failed (see [`SolveFailure`]).
    #[error(transparent)]
    Solve(#[from] SolveFailure),
}

/// One strip at a loaded state.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct StripResult {
    /// Clock angle from the top, clockwise, degrees in `[0, 360)`.
    pub clock_deg: f64,
    /// Gap from the relaxed strip to the wall at this hub offset (edge contact), mm.
    pub gap_mm: f64,
    /// The strip's phase (`free`, `point-contact` or `line-contact` in files).
    pub phase: Phase,
    /// Wall contact force, N.
    pub contact_force_n: f64,
    /// Axial compression, N.
    pub axial_force_n: f64,
    /// Peak stress, bending plus axial, MPa.
    pub max_stress_mpa: f64,
    /// Static factor of safety `0.75 Su / max_stress`.
    pub static_safety_factor: f64,
    /// Goodman factor of safety for zero-to-peak cycles.
    pub fatigue_safety_factor: f64,
    /// Crest height above the relaxed strip, mm.
    pub crest_height_mm: f64,
    /// Flat run on the wall, mm.
    pub flat_length_mm: f64,
    /// Strain energy, J.
    pub strain_energy_j: f64,
}

/// Segment totals at a loaded state.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Totals {
    /// Pull on the end plates, `sum P_i`, N.
    pub actuator_force_n: f64,
    /// Radial force on the wall, `sum F_i`, N.
    pub radial_force_n: f64,
    /// Holding force along the bore, `mu sum F_i`, N.
    pub holding_force_n: f64,
    /// The worst strip's peak stress, MPa.
    pub max_stress_mpa: f64,
    /// The least static factor of safety over the strips.
    pub static_safety_factor: f64,
    /// The least fatigue factor of safety over the strips.
    pub fatigue_safety_factor: f64,
    /// Mean axial force per strip, N.
    pub mean_axial_force_per_strip_n: f64,
    /// Mean contact force per strip, N.
    pub mean_contact_force_per_strip_n: f64,
    /// Reaction of the rest support on the hub `[y, z]`, N (zero when the strips carry the load).
    pub support_reaction_n: [f64; 2],
    /// Strips touching the wall with a state (point or line contact).
    pub strips_in_contact: usize,
    /// Strips past their own limit while the hub rests on its rim: they have left the wall
    /// (their flat run buckled away) and carry nothing; the rim carries the load. Their
    /// axial force and stress are not modelled, so the totals that need them are NaN.
    pub strips_off_wall: usize,
    /// Index (clock order) of the strip with the highest stress (an off-wall strip, whose
    /// stress is unknown, when there is one).
    pub worst_strip: usize,
    /// Strain energy in all strips, J.
    pub strain_energy_j: f64,
}

/// The segment at one loaded state.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SharedState {
    /// End-plate travel, mm.
    pub stroke_mm: f64,
    /// Hub offset from the bore's centre `[y, z]`, mm (a weight gives `y < 0`).
    pub hub_offset_mm: [f64; 2],
    /// Whether the hub rests on the wall (the rest support carries part of the load).
    pub on_support: bool,
    /// Whether some strip is past its own limit (then the forces are not a state).
    pub beyond_limit: bool,
    /// The strips in order of clock angle from the top (empty beyond the limit).
    pub strips: Vec<StripResult>,
    /// The totals (zero beyond the limit).
    pub totals: Totals,
    /// Force balance of the hub, `sum F_i u_i - W - S`, N (`[y, z]`).
    pub residual_n: [f64; 2],
    /// Strip-force evaluations the solve used.
    pub evaluations: usize,
}

/// The bore-level strokes of a loaded bore.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct BoreStrokes {
    /// Stroke at which the first strip touches, mm (`None`: out of reach).
    pub first_strip_contact_stroke_mm: Option<f64>,
    /// Stroke at which the strips lift the hub off its rest (they carry all the load), mm;
    /// with no load, the first strip's contact.
    pub lift_off_stroke_mm: Option<f64>,
    /// Stroke at which the last strip touches, mm (`None`: not before the limit).
    pub last_strip_contact_stroke_mm: Option<f64>,
    /// Where the model stops: the first strip reaches its own limit, mm.
    pub limit_stroke_mm: f64,
    /// Which strip (clock order) reaches its limit first.
    pub limit_strip: usize,
    /// Why that strip's model stops.
    pub limit_reason: LimitReason,
}

/// A nominal or deviated strip resolved into SI, with its dimensional weights.
#[derive(Clone, Debug, PartialEq)]
struct StripClass {
    length_mm: f64,
    width_mm: f64,
    thickness_mm: f64,
    /// Mount radius plus half the thickness: the outer face's radius at rest, mm.
    face_mm: f64,
    /// `B / L^2`, N.
    force_unit_n: f64,
    /// `B / L`, J.
    energy_unit_j: f64,
    /// MPa per unit of nondimensional curvature.
    stress_per_kappa: f64,
    /// MPa per unit of nondimensional axial force.
    stress_per_axial: f64,
}

/// Where a strip sits.
#[derive(Clone, Copy, Debug, PartialEq)]
struct StripPlace {
    clock_rad: f64,
    u: [f64; 2],
    v: [f64; 2],
    /// The same direction mirrored to `z >= 0` (exactly), for symmetric cases.
    u_fold: [f64; 2],
    v_fold: [f64; 2],
    class: usize,
}

/// The segment in one bore under a [`Loading`]: the setting for states and strokes.
#[derive(Debug)]
pub struct LoadedBore<'a> {
    segment: &'a Segment,
    bore_mm: f64,
    loading: Loading,
    bore: Ellipse,
    rim_radius_mm: f64,
    classes: Vec<StripClass>,
    places: Vec<StripPlace>,
    /// Equal strips and a layout symmetric about the load line: the offset stays on it.
    symmetric: bool,
    /// Rest clearance along `-y` and `+y`, mm (symmetric cases).
    clearance_y_mm: f64,
    /// No load, round bore, equal strips: the centred model answers.
    centred: Option<BorePath<'a>>,
    strokes: OnceCell<Result<BoreStrokes, SolveFailure>>,
}

impl Segment {
    /// The segment in a bore of `bore_mm` under `loading`.
    pub fn loaded_at_bore(
        &self,
        bore_mm: f64,
        loading: &Loading,
    ) -> Result<LoadedBore<'_>, SharingError> {
        LoadedBore::new(self, bore_mm, loading)
    }
}

fn check_range(what: &'static str, value: f64, lo: f64, hi: f64) -> Result<(), SharingError> {
    if value.is_finite() && (lo..=hi).contains(&value) {
        Ok(())
    } else {
        Err(SharingError::BadInput {
            what,
            value,
            allowed: format!("{lo} to {hi}"),
        })
    }
}

impl<'a> LoadedBore<'a> {
    fn new(
        segment: &'a Segment,
        bore_mm: f64,
        loading: &Loading,
    ) -> Result<LoadedBore<'a>, SharingError> {
        // The centred set-up validates the bore and the clearance first.
        let centred_path = segment.at_bore(bore_mm)?;
        check_range(
            "duty.radial_load_n",
            loading.radial_load_n,
            0.0,
            MAX_RADIAL_LOAD_N,
        )?;
        check_range(
            "bore.out_of_round_mm",
            loading.out_of_round_mm,
            0.0,
            0.1 * bore_mm,
        )?;
        let design = &segment.design;
        let n = design.strip.count as usize;
        let nominal = &design.strip;
        if !loading.deviations.is_empty() && loading.deviations.len() != n {
            return Err(SharingError::DeviationCount {
                given: loading.deviations.len(),
                strips: n,
            });
        }
        let class_of = |dev: &StripDeviation| -> Result<StripClass, SharingError> {
            let t = nominal.thickness_mm + dev.thickness_mm;
            let b = nominal.width_mm + dev.width_mm;
            let l = nominal.free_length_mm + dev.free_length_mm;
            for (what, value, base) in [
                ("strip deviation thickness_mm", t, nominal.thickness_mm),
                ("strip deviation width_mm", b, nominal.width_mm),
                ("strip deviation free_length_mm", l, nominal.free_length_mm),
            ] {
                if !(value.is_finite() && value > 0.0) {
                    return Err(SharingError::BadInput {
                        what,
                        value: value - base,
                        allowed: format!("a finite number of mm above -{base}"),
                    });
                }
            }
            let (t_m, b_m, l_m) = (t * 1e-3, b * 1e-3, l * 1e-3);
            let bending = segment.modulus_pa * b_m * t_m.powi(3) / 12.0;
            let force_unit_n = bending / (l_m * l_m);
            Ok(StripClass {
                length_mm: l,
                width_mm: b,
                thickness_mm: t,
                face_mm: design.mount_radius_mm + 0.5 * t,
                force_unit_n,
                energy_unit_j: bending / l_m,
                stress_per_kappa: segment.modulus_pa * t_m / (2.0 * l_m) * 1e-6,
                stress_per_axial: force_unit_n / (b_m * t_m) * 1e-6,
            })
        };
        let equal = loading
            .deviations
            .iter()
            .all(|d| *d == StripDeviation::default());
        let classes: Vec<StripClass> = if equal {
            vec![class_of(&StripDeviation::default())?]
        } else {
            loading
                .deviations
                .iter()
                .map(class_of)
                .collect::<Result<_, _>>()?
        };
        // Strip i at theta_0 + 2 pi i / N; its offset from the bottom in units of 2 pi / N is
        // s_i = i + c - N/2 with c = 0 or 1/2 (exact in binary), so mirror pairs fold exactly.
        let half_n = 0.5 * n as f64;
        let strip_on_line = half_n.fract() == 0.0;
        let c = match (loading.clocking, strip_on_line) {
            (Clocking::Strip, true) | (Clocking::Gap, false) => 0.0,
            _ => 0.5,
        };
        let step = 2.0 * PI / n as f64;
        let places = (0..n)
            .map(|i| {
                let s = i as f64 + c - half_n;
                let clock_rad = PI + step * s;
                let fold = PI - step * s.abs();
                let (sf, cf) = fold.sin_cos();
                let sign = if s < 0.0 { 1.0 } else { -1.0 };
                StripPlace {
                    clock_rad,
                    u: [cf, sign * sf],
                    v: [-sign * sf, cf],
                    u_fold: [cf, sf],
                    v_fold: [-sf, cf],
                    class: if equal { 0 } else { i },
                }
            })
            .collect();
        let (major, minor) = (
            0.5 * (bore_mm + 0.5 * loading.out_of_round_mm),
            0.5 * (bore_mm - 0.5 * loading.out_of_round_mm),
        );
        let bore = match loading.major_axis {
            MajorAxis::Vertical => Ellipse {
                a_y: major,
                a_z: minor,
            },
            MajorAxis::Horizontal => Ellipse {
                a_y: minor,
                a_z: major,
            },
        };
        let rim_radius_mm = classes
            .iter()
            .map(|k| (k.face_mm * k.face_mm + 0.25 * k.width_mm * k.width_mm).sqrt())
            .fold(0.5 * design.end_plate_diameter_mm, f64::max);
        if rim_radius_mm >= minor {
            return Err(SharingError::RimDoesNotFit {
                rim_mm: 2.0 * rim_radius_mm,
                least_mm: 2.0 * minor,
            });
        }
        let centred = (loading.radial_load_n == 0.0 && loading.out_of_round_mm == 0.0 && equal)
            .then_some(centred_path);
        Ok(LoadedBore {
            segment,
            bore_mm,
            loading: loading.clone(),
            clearance_y_mm: bore.clearance_y(rim_radius_mm),
            bore,
            rim_radius_mm,
            classes,
            places,
            symmetric: equal,
            centred,
            strokes: OnceCell::new(),
        })
    }

    /// Bore diameter (nominal of the ellipse), mm.
    pub fn bore_mm(&self) -> f64 {
        self.bore_mm
    }

    /// The loading this bore was set up with.
    pub fn loading(&self) -> &Loading {
        &self.loading
    }

    /// Radius of the relaxed rim (the larger of the end plates and the relaxed strips), mm.
    pub fn rim_radius_mm(&self) -> f64 {
        self.rim_radius_mm
    }

    /// Clock angles of the strips from the top, degrees, in order.
    pub fn clock_deg(&self) -> Vec<f64> {
        self.places.iter().map(|p| clock_deg(p.clock_rad)).collect()
    }

    /// Whether the centred model answers (no load, round bore, equal strips).
    pub fn is_centred(&self) -> bool {
        self.centred.is_some()
    }

    /// Gap of every strip at hub offset `offset_mm` `[y, z]`, mm, in clock order: the
    /// least outward travel of its outer-face edges to the wall.
    pub fn gaps_mm(&self, offset_mm: [f64; 2]) -> Vec<f64> {
        (0..self.places.len())
            .map(|i| self.gap_mm(i, offset_mm, false))
            .collect()
    }

    fn gap_mm(&self, i: usize, d: [f64; 2], folded: bool) -> f64 {
        let p = &self.places[i];
        let k = &self.classes[p.class];
        let (u, v) = if folded {
            (p.u_fold, p.v_fold)
        } else {
            (p.u, p.v)
        };
        let hb = 0.5 * k.width_mm;
        let edge = |sign: f64| {
            let c = [
                d[0] + k.face_mm * u[0] + sign * hb * v[0],
                d[1] + k.face_mm * u[1] + sign * hb * v[1],
            ];
            self.bore.travel(c, u)
        };
        edge(1.0).min(edge(-1.0))
    }

    /// The loaded state at `stroke_mm`. Centred cases come from the centred model.
    ///
    /// Past the segment's limit (the first stroke at which any strip reaches its own limit,
    /// [`BoreStrokes::limit_stroke_mm`]) the state is beyond the limit, even where the solver
    /// would find a balance again further on: a hub resting on its support can press its
    /// lowest strips past their limit before they lift it, and a balance found at a larger
    /// stroke lies on a branch the model does not reach.
    pub fn state(&self, stroke_mm: f64) -> Result<SharedState, SharingError> {
        check_stroke(stroke_mm)?;
        match &self.centred {
            Some(path) => Ok(self.centred_state(path, stroke_mm)),
            None => {
                let st = self.solve(stroke_mm)?;
                let limit = self.strokes()?.limit_stroke_mm;
                // The limit is the valid end of a bracket 1e-10 wide: a stroke that rounds
                // onto it is at the limit, not past it.
                if st.beyond_limit || stroke_mm <= limit * (1.0 + 1e-9) {
                    Ok(st)
                } else {
                    Ok(self.beyond(stroke_mm, st.hub_offset_mm, st.evaluations))
                }
            }
        }
    }

    /// The loaded state at `stroke_mm` by the general solver, even where the centred model
    /// would answer (for checking one against the other).
    pub fn solve_state(&self, stroke_mm: f64) -> Result<SharedState, SharingError> {
        check_stroke(stroke_mm)?;
        Ok(self.solve(stroke_mm)?)
    }

    fn centred_state(&self, path: &BorePath<'_>, stroke_mm: f64) -> SharedState {
        let s = path.state(stroke_mm);
        let n = self.places.len();
        let beyond = !s.phase.has_state();
        let strip = StripResult {
            clock_deg: 0.0,
            gap_mm: s.gap_mm,
            phase: s.phase,
            contact_force_n: s.contact_force_per_strip_n.unwrap_or(f64::NAN),
            axial_force_n: s.axial_force_per_strip_n.unwrap_or(f64::NAN),
            max_stress_mpa: s.max_stress_mpa.unwrap_or(f64::NAN),
            static_safety_factor: s.static_safety_factor.unwrap_or(f64::NAN),
            fatigue_safety_factor: s.fatigue_safety_factor.unwrap_or(f64::NAN),
            crest_height_mm: s.crest_height_mm.unwrap_or(f64::NAN),
            flat_length_mm: s.flat_length_mm.unwrap_or(f64::NAN),
            strain_energy_j: s.strain_energy_j.map_or(f64::NAN, |e| e / n as f64),
        };
        let strips: Vec<StripResult> = if beyond {
            Vec::new()
        } else {
            self.places
                .iter()
                .map(|p| StripResult {
                    clock_deg: clock_deg(p.clock_rad),
                    ..strip.clone()
                })
                .collect()
        };
        let in_contact = s.contact_force_per_strip_n.is_some_and(|f| f > 0.0);
        let totals = Totals {
            actuator_force_n: s.actuator_force_n.unwrap_or(0.0),
            radial_force_n: s.radial_force_n.unwrap_or(0.0),
            holding_force_n: s.holding_force_n.unwrap_or(0.0),
            max_stress_mpa: s.max_stress_mpa.unwrap_or(0.0),
            static_safety_factor: s.static_safety_factor.unwrap_or(f64::INFINITY),
            fatigue_safety_factor: s.fatigue_safety_factor.unwrap_or(f64::INFINITY),
            mean_axial_force_per_strip_n: s.axial_force_per_strip_n.unwrap_or(0.0),
            mean_contact_force_per_strip_n: s.contact_force_per_strip_n.unwrap_or(0.0),
            support_reaction_n: [0.0, 0.0],
            strips_in_contact: if in_contact && !beyond { n } else { 0 },
            strips_off_wall: 0,
            worst_strip: 0,
            strain_energy_j: s.strain_energy_j.unwrap_or(0.0),
        };
        SharedState {
            stroke_mm,
            hub_offset_mm: [0.0, 0.0],
            on_support: false,
            beyond_limit: beyond,
            strips,
            totals,
            residual_n: [0.0, 0.0],
            evaluations: 0,
        }
    }

    /// Builds the per-strip results and totals from solved strip states. A strip state
    /// past its limit is a strip that has left the wall while the hub rests on its rim (the
    /// solver only passes such states together with a support reaction): no contact force,
    /// and its axial force, stress and shape are unknown (NaN), as are the totals that need
    /// them.
    fn assemble(
        &self,
        stroke_mm: f64,
        d: [f64; 2],
        strips: &[(f64, StripState)],
        support: [f64; 2],
        evaluations: usize,
    ) -> SharedState {
        let seg = self.segment;
        let su = seg.material.tensile_strength_mpa;
        let mu = seg.design.friction;
        let mut results = Vec::with_capacity(strips.len());
        let mut force = [0.0, 0.0];
        for (i, (gap_mm, s)) in strips.iter().enumerate() {
            let p = &self.places[i];
            let k = &self.classes[p.class];
            let off_wall = !s.phase.has_state();
            let stress = k.stress_per_kappa * s.kappa_max + k.stress_per_axial * s.axial;
            let contact = if off_wall {
                0.0
            } else {
                s.contact * k.force_unit_n
            };
            force[0] += contact * p.u[0];
            force[1] += contact * p.u[1];
            results.push(StripResult {
                clock_deg: clock_deg(p.clock_rad),
                gap_mm: *gap_mm,
                phase: if off_wall {
                    Phase::BeyondLimit
                } else {
                    s.phase
                },
                contact_force_n: contact,
                axial_force_n: s.axial * k.force_unit_n,
                max_stress_mpa: stress,
                static_safety_factor: seg.static_allowable_mpa / stress,
                fatigue_safety_factor: 2.0 / (stress * (1.0 / seg.fatigue_strength_mpa + 1.0 / su)),
                crest_height_mm: s.crest_height * k.length_mm,
                flat_length_mm: s.flat_length * k.length_mm,
                strain_energy_j: s.energy * k.energy_unit_j,
            });
        }
        let n = results.len() as f64;
        let off_wall = results
            .iter()
            .filter(|r| r.phase == Phase::BeyondLimit)
            .count();
        let sum = |f: fn(&StripResult) -> f64| results.iter().map(f).sum::<f64>();
        // An off-wall strip's stress is unknown: it is the worst until shown otherwise.
        let worst_strip = (0..results.len())
            .max_by(|&a, &b| {
                let key = |r: &StripResult| {
                    if r.phase == Phase::BeyondLimit {
                        f64::INFINITY
                    } else {
                        r.max_stress_mpa
                    }
                };
                key(&results[a]).total_cmp(&key(&results[b]))
            })
            .unwrap_or(0);
        let radial = sum(|r| r.contact_force_n);
        let axial = sum(|r| r.axial_force_n);
        let min_of =
            |f: fn(&StripResult) -> f64| results.iter().map(f).fold(f64::INFINITY, f64::min);
        let known = |v: f64| if off_wall > 0 { f64::NAN } else { v };
        let totals = Totals {
            actuator_force_n: axial,
            radial_force_n: radial,
            holding_force_n: mu * radial,
            max_stress_mpa: known(results.get(worst_strip).map_or(0.0, |r| r.max_stress_mpa)),
            static_safety_factor: known(min_of(|r| r.static_safety_factor)),
            fatigue_safety_factor: known(min_of(|r| r.fatigue_safety_factor)),
            mean_axial_force_per_strip_n: axial / n,
            mean_contact_force_per_strip_n: radial / n,
            support_reaction_n: support,
            strips_in_contact: results
                .iter()
                .filter(|r| matches!(r.phase, Phase::PointContact | Phase::LineContact))
                .count(),
            strips_off_wall: off_wall,
            worst_strip,
            strain_energy_j: sum(|r| r.strain_energy_j),
        };
        let w = self.loading.radial_load_n;
        SharedState {
            stroke_mm,
            hub_offset_mm: d,
            on_support: support != [0.0, 0.0],
            beyond_limit: false,
            strips: results,
            totals,
            residual_n: [force[0] + w - support[0], force[1] - support[1]],
            evaluations,
        }
    }

    /// The bore-level strokes (found on first use and kept).
    pub fn strokes(&self) -> Result<BoreStrokes, SharingError> {
        self.strokes
            .get_or_init(|| match &self.centred {
                Some(path) => Ok(BoreStrokes {
                    first_strip_contact_stroke_mm: path.first_contact_stroke_mm(),
                    lift_off_stroke_mm: path.first_contact_stroke_mm(),
                    last_strip_contact_stroke_mm: path.first_contact_stroke_mm(),
                    limit_stroke_mm: path.limit_stroke_mm(),
                    limit_strip: 0,
                    limit_reason: path.limit_reason(),
                }),
                None => self.find_strokes(),
            })
            .clone()
            .map_err(SharingError::from)
    }

    /// The state in the centred model's terms: per-strip quantities become means over the
    /// strips, the peak stress and the factors the worst strip's, the diameter, crest and
    /// flat run the largest, the gap the least. Bore-level strokes come from
    /// [`LoadedBore::strokes`]. Centred cases give the centred model's state exactly.
    pub fn segment_state(&self, stroke_mm: f64) -> Result<SegmentState, SharingError> {
        if let Some(path) = &self.centred {
            check_stroke(stroke_mm)?;
            return Ok(path.state(stroke_mm));
        }
        let st = self.state(stroke_mm)?;
        let strokes = self.strokes()?;
        Ok(self.segment_state_of(&st, &strokes))
    }

    /// [`LoadedBore::segment_state`] of a state already solved (not of a centred case), with
    /// the bore-level strokes to report.
    pub(crate) fn segment_state_of(&self, st: &SharedState, strokes: &BoreStrokes) -> SegmentState {
        let stroke_mm = st.stroke_mm;
        let seg = self.segment;
        let ok = !st.beyond_limit;
        let some = |v: f64| ok.then_some(v);
        let max_of =
            |f: fn(&StripResult) -> f64| st.strips.iter().map(f).fold(f64::NEG_INFINITY, f64::max);
        let d = st.hub_offset_mm;
        let outer = (0..st.strips.len())
            .map(|i| {
                let p = &self.places[i];
                let k = &self.classes[p.class];
                let r = k.face_mm + st.strips[i].crest_height_mm;
                let centre = [d[0] + r * p.u[0], d[1] + r * p.u[1]];
                2.0 * (centre[0].hypot(centre[1]).powi(2) + 0.25 * k.width_mm * k.width_mm).sqrt()
            })
            .fold(f64::NEG_INFINITY, f64::max);
        let t = &st.totals;
        // Strips off the wall (past their limit while the hub rests on its rim): the pull,
        // the stress and the energy need their unknown states.
        let known = |v: f64| (ok && t.strips_off_wall == 0).then_some(v);
        let phase = if !ok {
            Phase::BeyondLimit
        } else {
            st.strips
                .iter()
                .map(|s| s.phase)
                .max_by_key(|p| match p {
                    Phase::LineContact => 2,
                    Phase::PointContact => 1,
                    _ => 0,
                })
                .unwrap_or(Phase::Free)
        };
        SegmentState {
            stroke_mm,
            phase,
            axial_force_per_strip_n: known(t.mean_axial_force_per_strip_n),
            contact_force_per_strip_n: some(t.mean_contact_force_per_strip_n),
            actuator_force_n: known(t.actuator_force_n),
            radial_force_n: some(t.radial_force_n),
            holding_force_n: some(t.holding_force_n),
            outer_diameter_mm: some(outer),
            flat_length_mm: some(max_of(|s| s.flat_length_mm)),
            max_stress_mpa: known(t.max_stress_mpa),
            first_contact_stroke_mm: strokes.first_strip_contact_stroke_mm,
            line_contact_stroke_mm: self.line_contact_stroke_mm(d),
            bore_mm: self.bore_mm,
            gap_mm: self.gaps_mm(d).into_iter().fold(f64::INFINITY, f64::min),
            limit_stroke_mm: strokes.limit_stroke_mm,
            limit_reason: strokes.limit_reason,
            crest_height_mm: some(max_of(|s| s.crest_height_mm)),
            static_safety_factor: known(t.static_safety_factor),
            fatigue_safety_factor: known(t.fatigue_safety_factor),
            strain_energy_j: known(t.strain_energy_j),
            actuator: known(t.actuator_force_n).map(|f| seg.actuator_reading(stroke_mm, f)),
            reason: if !ok {
                Some(format!(
                    "beyond the model's limit at {:.3} mm: strip at {:.0} deg: {}",
                    strokes.limit_stroke_mm,
                    clock_deg(self.places[strokes.limit_strip].clock_rad),
                    strokes.limit_reason.describe()
                ))
            } else if t.strips_off_wall > 0 {
                Some(off_wall_reason(st))
            } else {
                None
            },
        }
    }

    /// The least line-contact onset stroke over the strips at hub offset `d`, mm.
    fn line_contact_stroke_mm(&self, d: [f64; 2]) -> Option<f64> {
        (0..self.places.len())
            .filter_map(|i| {
                let k = &self.classes[self.places[i].class];
                let g = self.gap_mm(i, d, false);
                let path = Path::new(self.segment.design.strip.ends, g / k.length_mm).ok()?;
                path.line_contact_stroke().map(|s| s * k.length_mm)
            })
            .min_by(f64::total_cmp)
    }
}

fn check_stroke(stroke_mm: f64) -> Result<(), SharingError> {
    if stroke_mm.is_finite() && stroke_mm >= 0.0 {
        Ok(())
    } else {
        Err(SharingError::BadInput {
            what: "stroke_mm",
            value: stroke_mm,
            allowed: "a finite number of mm >= 0".into(),
        })
    }
}

/// Why a state with strips off the wall has no pull or stress: which strips, in words.
pub fn off_wall_reason(st: &SharedState) -> String {
    let clocks: Vec<String> = st
        .strips
        .iter()
        .filter(|s| s.phase == Phase::BeyondLimit)
        .map(|s| format!("{:.0}", s.clock_deg))
        .collect();
    format!(
        "the hub rests on its rim and the strip{} at {} deg {} past {} own limit: off the wall (the rim carries the load); {} axial force and stress are not modelled",
        if clocks.len() == 1 { "" } else { "s" },
        clocks.join(", "),
        if clocks.len() == 1 { "is" } else { "are" },
        if clocks.len() == 1 { "its" } else { "their" },
        if clocks.len() == 1 { "its" } else { "their" },
    )
}

/// Clock angle in degrees in `[0, 360)`.
fn clock_deg(rad: f64) -> f64 {
    rad.to_degrees().rem_euclid(360.0)
}

/// What a governing case is judged on.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum Judge {
    /// The highest worst-strip stress (the smallest static and fatigue margins): judged at
    /// the smallest bore.
    HighestStress,
    /// The least holding force: judged at the largest bore.
    LeastHolding,
    /// The most strips free (then the least holding): for the top-strip check.
    FewestInContact,
}

/// The governing case over clocking and major axis.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Governing {
    /// Clocking of the governing case.
    pub clocking: Clocking,
    /// Major axis of the governing case.
    pub major_axis: MajorAxis,
    /// Its state.
    pub state: SharedState,
    /// One line saying which case governs and why.
    pub reason: String,
}

/// The cases judged: both clockings (one when there is no load in a round bore, where
/// they are the same segment turned), and both major axes when the bore is out of round.
pub fn cases(loading: &Loading) -> Vec<(Clocking, MajorAxis)> {
    // With no load in a round bore no direction is singled out: turning the strips by half
    // a pitch gives the same segment, so one clocking is the whole story.
    if loading.radial_load_n == 0.0 && loading.out_of_round_mm == 0.0 {
        return vec![(Clocking::Strip, MajorAxis::Vertical)];
    }
    let axes: &[MajorAxis] = if loading.out_of_round_mm > 0.0 {
        &[MajorAxis::Vertical, MajorAxis::Horizontal]
    } else {
        &[MajorAxis::Vertical]
    };
    [Clocking::Strip, Clocking::Gap]
        .into_iter()
        .flat_map(|c| axes.iter().map(move |&a| (c, a)))
        .collect()
}

/// The worse of the cases (see [`cases`]) at one bore and stroke, by `judge`. The loading's
/// own clocking and major axis are ignored. A state beyond the limit governs any that is not.
pub fn governing(
    segment: &Segment,
    loading: &Loading,
    bore_mm: f64,
    stroke_mm: f64,
    judge: Judge,
) -> Result<Governing, SharingError> {
    governing_of(segment, loading, &cases(loading), bore_mm, stroke_mm, judge)
}

/// The worse of the given cases (not empty) by `judge`.
fn governing_of(
    segment: &Segment,
    loading: &Loading,
    cases: &[(Clocking, MajorAxis)],
    bore_mm: f64,
    stroke_mm: f64,
    judge: Judge,
) -> Result<Governing, SharingError> {
    let bores = set_up_cases(segment, loading, cases, bore_mm)?;
    governing_among(&bores, stroke_mm, judge).map(|(g, _)| g)
}

/// Each case set up at `bore_mm`: the loading with the case's clocking and major axis.
pub(crate) fn set_up_cases<'a>(
    segment: &'a Segment,
    loading: &Loading,
    cases: &[(Clocking, MajorAxis)],
    bore_mm: f64,
) -> Result<Vec<(Clocking, MajorAxis, LoadedBore<'a>)>, SharingError> {
    cases
        .iter()
        .map(|&(clocking, major_axis)| {
            let case = Loading {
                clocking,
                major_axis,
                ..loading.clone()
            };
            Ok((
                clocking,
                major_axis,
                segment.loaded_at_bore(bore_mm, &case)?,
            ))
        })
        .collect()
}

/// The worse of the set-up cases (not empty) by `judge`, with its index.
pub(crate) fn governing_among(
    bores: &[(Clocking, MajorAxis, LoadedBore<'_>)],
    stroke_mm: f64,
    judge: Judge,
) -> Result<(Governing, usize), SharingError> {
    let states = bores
        .iter()
        .map(|(clocking, major_axis, loaded)| {
            Ok((*clocking, *major_axis, loaded.state(stroke_mm)?))
        })
        .collect::<Result<Vec<_>, SharingError>>()?;
    govern(states, judge)
}

/// The worse of the cases' states (not empty) by `judge`, with its index: the rule of
/// [`governing_among`] on states already solved.
pub(crate) fn govern(
    states: Vec<(Clocking, MajorAxis, SharedState)>,
    judge: Judge,
) -> Result<(Governing, usize), SharingError> {
    let mut best: Option<(Clocking, MajorAxis, SharedState)> = None;
    let mut best_index = 0;
    for (index, (clocking, major_axis, st)) in states.into_iter().enumerate() {
        let worse = match &best {
            None => true,
            Some((_, _, b)) => match (st.beyond_limit, b.beyond_limit) {
                (true, false) => true,
                (false, true) | (true, true) => false,
                (false, false) => match judge {
                    // A strip off the wall has an unknown stress: it governs.
                    Judge::HighestStress => {
                        match (st.totals.strips_off_wall, b.totals.strips_off_wall) {
                            (0, 0) => st.totals.max_stress_mpa > b.totals.max_stress_mpa,
                            (_, 0) => true,
                            _ => false,
                        }
                    }
                    Judge::LeastHolding => st.totals.holding_force_n < b.totals.holding_force_n,
                    Judge::FewestInContact => {
                        (st.totals.strips_in_contact, -st.totals.holding_force_n)
                            < (b.totals.strips_in_contact, -b.totals.holding_force_n)
                    }
                },
            },
        };
        if worse {
            best = Some((clocking, major_axis, st));
            best_index = index;
        }
    }
    let Some((clocking, major_axis, state)) = best else {
        return Err(SharingError::BadInput {
            what: "cases",
            value: 0.0,
            allowed: "at least one clocking and major axis".into(),
        });
    };
    let what = match judge {
        Judge::HighestStress if state.totals.strips_off_wall > 0 => format!(
            "a strip off the wall, {} of {}",
            state.totals.strips_off_wall,
            state.strips.len()
        ),
        Judge::HighestStress => format!(
            "highest worst-strip stress, {:.1} MPa",
            state.totals.max_stress_mpa
        ),
        Judge::LeastHolding => {
            format!("least holding force, {:.1} N", state.totals.holding_force_n)
        }
        Judge::FewestInContact => format!(
            "fewest strips touching, {} of {}",
            state.totals.strips_in_contact,
            state.strips.len()
        ),
    };
    let reason = format!(
        "governing case: {} on the load line, major axis {} ({what}{})",
        match clocking {
            Clocking::Strip => "a strip",
            Clocking::Gap => "a gap",
        },
        major_axis.name(),
        if state.beyond_limit {
            "; beyond the limit"
        } else {
            ""
        }
    );
    Ok((
        Governing {
            clocking,
            major_axis,
            state,
            reason,
        },
        best_index,
    ))
}
