//! What the front ends call for load sharing: from a segment built from its design, the
//! governing loaded state at a bore and stroke (both clockings and, for an out-of-round
//! bore, both major-axis orientations; the worse governs and the answer says which), the
//! per-strip rows, the bore-level strokes, and the inputs of the checks that load sharing
//! changes or adds (holding over the strips in contact, the worst strip's stress, whether
//! the top strip touches, passing the bend). Mechanics only: no GUI, PDF or file code.

use serde::Serialize;

use crate::bend::{self, BendError, BendPassage};
use crate::design::Design;
use crate::elastica::Phase;
use crate::segment::{Segment, SegmentState};

use super::{
    BoreStrokes, Clocking, Judge, LoadedBore, Loading, MajorAxis, SharedState, SharingError,
};

/// The loading a design file asks for: its radial load and out-of-roundness, equal strips
/// (the clocking and major axis are chosen per case).
pub fn loading_of(design: &Design) -> Loading {
    Loading {
        radial_load_n: design.duty.radial_load_n,
        out_of_round_mm: design.bore.out_of_round_mm,
        ..Loading::default()
    }
}

/// Whether the design uses any load-sharing field (a radial load, an out-of-round bore or
/// a bend): then the front ends add the per-strip outputs and the new checks. A design
/// without them keeps today's outputs exactly.
pub fn design_uses_sharing(design: &Design) -> bool {
    design.duty.radial_load_n > 0.0
        || design.bore.out_of_round_mm > 0.0
        || design.bore.bend.is_some()
}

/// Which case to evaluate: a fixed clocking and/or major axis, or (`None`) the worse of
/// both.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct CaseChoice {
    /// `Some`: only this clocking (`--clocking strip|gap`); `None`: both, the worse governs.
    pub clocking: Option<Clocking>,
    /// `Some`: only this orientation (`--major-axis vertical|horizontal`); `None`: both
    /// when the bore is out of round.
    pub major_axis: Option<MajorAxis>,
}

/// One strip at a loaded state, as the contract names its keys.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct StripRow {
    /// Clock angle from the top, clockwise, degrees in `[0, 360)`.
    pub clock_deg: f64,
    /// Gap from the relaxed strip to the wall at this hub offset (edge contact), mm.
    pub gap_mm: f64,
    /// Phase (`free`, `point-contact`, `line-contact`).
    pub phase: Phase,
    /// Wall contact force, N.
    pub contact_force_n: f64,
    /// Axial compression, N.
    pub axial_force_n: f64,
    /// Peak stress, bending plus axial, MPa.
    pub max_stress_mpa: f64,
}

/// The columns of the `strips` CSV (`point --csv`), in order: the contract's names.
pub const STRIP_COLUMNS: [&str; 6] = [
    "clock_deg",
    "gap_mm",
    "phase",
    "contact_force_n",
    "axial_force_n",
    "max_stress_mpa",
];

/// The `strips` CSV: a header of [`STRIP_COLUMNS`], then one row per strip in order of
/// clock angle from the top. Numbers print with full round-trip precision; a quantity the
/// model does not give (a strip off the wall has no axial force or stress) is an empty cell.
/// Beyond the limit there are no strip rows, only the header.
pub fn strips_csv(rows: &[StripRow]) -> String {
    let cell = |v: f64| {
        if v.is_finite() {
            v.to_string()
        } else {
            String::new()
        }
    };
    let mut out = STRIP_COLUMNS.join(",");
    out.push('\n');
    for r in rows {
        out.push_str(&format!(
            "{},{},{},{},{},{}\n",
            cell(r.clock_deg),
            cell(r.gap_mm),
            r.phase,
            cell(r.contact_force_n),
            cell(r.axial_force_n),
            cell(r.max_stress_mpa)
        ));
    }
    out
}

/// The per-strip rows of a loaded state.
pub fn strip_rows(st: &SharedState) -> Vec<StripRow> {
    st.strips
        .iter()
        .map(|s| StripRow {
            clock_deg: s.clock_deg,
            gap_mm: s.gap_mm,
            phase: s.phase,
            contact_force_n: s.contact_force_n,
            axial_force_n: s.axial_force_n,
            max_stress_mpa: s.max_stress_mpa,
        })
        .collect()
}

/// What the checks read from a loaded state.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct CheckInputs {
    /// Holding force: friction times the sum of the contact forces of the strips in
    /// contact, N.
    pub holding_force_n: f64,
    /// The worst strip's peak stress, MPa.
    pub worst_strip_stress_mpa: f64,
    /// The worst strip's clock angle, degrees.
    pub worst_strip_clock_deg: f64,
    /// The least static factor of safety over the strips.
    pub static_safety_factor: f64,
    /// The least fatigue factor of safety over the strips.
    pub fatigue_safety_factor: f64,
    /// Strips touching the wall.
    pub strips_in_contact: usize,
    /// Strips in all.
    pub strips: usize,
    /// Whether the top strip (both, when a gap is at the top) touches the wall.
    pub top_strip_touches: bool,
    /// Whether the hub still rests on its rim (the strips do not carry all the load).
    pub on_support: bool,
    /// Strips off the wall (past their own limit while the hub rests): their stress is not
    /// modelled, so the stress checks cannot pass.
    pub strips_off_wall: usize,
}

/// The governing loaded state at one bore and stroke.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct LoadedPoint {
    /// Bore diameter (nominal of the ellipse), mm.
    pub bore_mm: f64,
    /// End-plate travel, mm.
    pub stroke_mm: f64,
    /// The clocking of the case reported.
    pub clocking: Clocking,
    /// The major axis of the case reported.
    pub major_axis: MajorAxis,
    /// One line saying which case governs and why.
    pub governing: String,
    /// Hub offset from the bore's centre `[y, z]`, mm (`y` up: a weight gives `y < 0`).
    pub hub_offset_mm: [f64; 2],
    /// Whether a strip is past its own limit (then no strip rows and no check inputs).
    pub beyond_limit: bool,
    /// One row per strip in order of clock angle from the top (empty beyond the limit).
    pub strips: Vec<StripRow>,
    /// Stroke at which the first strip touches, mm (`None`: out of reach).
    pub first_strip_contact_stroke_mm: Option<f64>,
    /// Stroke at which the strips lift the hub off its rest, mm.
    pub lift_off_stroke_mm: Option<f64>,
    /// Stroke at which the last strip touches, mm (`None`: not before the limit).
    pub last_strip_contact_stroke_mm: Option<f64>,
    /// Where the model stops: the first strip reaches its own limit, mm.
    pub limit_stroke_mm: f64,
    /// The check inputs (`None` beyond the limit).
    pub checks: Option<CheckInputs>,
    /// The state in the centred model's terms (means over the strips, the worst strip's
    /// stress): what the existing keys and columns show.
    #[serde(skip)]
    pub segment_state: SegmentState,
}

/// The check inputs of a state that is not beyond the limit.
fn check_inputs(st: &SharedState) -> Option<CheckInputs> {
    if st.beyond_limit || st.strips.is_empty() {
        return None;
    }
    // The top strip: the largest cos(clock) (two of them when a gap is at the top).
    let top = st
        .strips
        .iter()
        .map(|s| s.clock_deg.to_radians().cos())
        .fold(f64::NEG_INFINITY, f64::max);
    let top_strip_touches = st
        .strips
        .iter()
        .filter(|s| s.clock_deg.to_radians().cos() >= top - 1e-9)
        .all(|s| matches!(s.phase, Phase::PointContact | Phase::LineContact));
    let t = &st.totals;
    Some(CheckInputs {
        holding_force_n: t.holding_force_n,
        worst_strip_stress_mpa: t.max_stress_mpa,
        worst_strip_clock_deg: st.strips[t.worst_strip].clock_deg,
        static_safety_factor: t.static_safety_factor,
        fatigue_safety_factor: t.fatigue_safety_factor,
        strips_in_contact: t.strips_in_contact,
        strips: st.strips.len(),
        top_strip_touches,
        on_support: st.on_support,
        strips_off_wall: t.strips_off_wall,
    })
}

/// The cases judged at one bore (both clockings, and both major axes of an out-of-round
/// bore, or those a [`CaseChoice`] leaves open), each set up once so that its bore-level
/// strokes are found once however many strokes and judges ask. Public for callers that
/// evaluate many designs or strokes (the scatter, the map).
#[derive(Debug)]
pub struct BoreCases<'a> {
    bore_mm: f64,
    cases: Vec<(Clocking, MajorAxis, LoadedBore<'a>)>,
}

impl<'a> BoreCases<'a> {
    /// The design's loading (radial load, out-of-roundness, equal strips) at `bore_mm`,
    /// the cases `choice` leaves open.
    pub fn new(
        segment: &'a Segment,
        bore_mm: f64,
        choice: CaseChoice,
    ) -> Result<BoreCases<'a>, SharingError> {
        Self::with_loading(segment, &loading_of(&segment.design), bore_mm, choice)
    }

    /// As [`BoreCases::new`] with any loading, e.g. unequal strips (its own clocking and
    /// major axis are replaced by each case's).
    pub fn with_loading(
        segment: &'a Segment,
        loading: &Loading,
        bore_mm: f64,
        choice: CaseChoice,
    ) -> Result<BoreCases<'a>, SharingError> {
        let mut cases: Vec<(Clocking, MajorAxis)> = super::cases(loading)
            .into_iter()
            .filter(|(c, a)| {
                choice.clocking.is_none_or(|x| x == *c) && choice.major_axis.is_none_or(|x| x == *a)
            })
            .collect();
        if cases.is_empty() {
            // A major axis asked for on a round bore: the orientation does not matter.
            cases.push((
                choice.clocking.unwrap_or(Clocking::Strip),
                choice.major_axis.unwrap_or(MajorAxis::Vertical),
            ));
        }
        let cases = super::set_up_cases(segment, loading, &cases, bore_mm)?;
        Ok(BoreCases { bore_mm, cases })
    }

    /// Bore diameter, mm.
    pub fn bore_mm(&self) -> f64 {
        self.bore_mm
    }

    /// Each case: its clocking, major axis and loaded bore.
    pub fn each(&self) -> impl Iterator<Item = (Clocking, MajorAxis, &LoadedBore<'a>)> {
        self.cases.iter().map(|(c, a, l)| (*c, *a, l))
    }

    /// The governing loaded state at `stroke_mm` by `judge` (the worse case governs; a
    /// state beyond the limit governs any that is not), with its case's strokes.
    pub fn point(&self, stroke_mm: f64, judge: Judge) -> Result<LoadedPoint, SharingError> {
        let (gov, index) = super::governing_among(&self.cases, stroke_mm, judge)?;
        let loaded = &self.cases[index].2;
        let strokes: BoreStrokes = loaded.strokes()?;
        let segment_state = loaded.segment_state(stroke_mm)?;
        Ok(self.point_of(stroke_mm, gov, &strokes, segment_state))
    }

    /// [`BoreCases::point`] from states and strokes found elsewhere (one of each per case,
    /// in the order of [`BoreCases::each`]), e.g. near a nominal design's: the same rule
    /// picks the governing case and the same fields are filled.
    pub(crate) fn point_from(
        &self,
        stroke_mm: f64,
        judge: Judge,
        states: &[SharedState],
        strokes: &[BoreStrokes],
    ) -> Result<LoadedPoint, SharingError> {
        let list = self
            .cases
            .iter()
            .zip(states)
            .map(|((c, a, _), st)| (*c, *a, st.clone()))
            .collect();
        let (gov, index) = super::govern(list, judge)?;
        let loaded = &self.cases[index].2;
        let strokes = strokes[index];
        let segment_state = if loaded.is_centred() {
            loaded.segment_state(stroke_mm)?
        } else {
            loaded.segment_state_of(&gov.state, &strokes)
        };
        Ok(self.point_of(stroke_mm, gov, &strokes, segment_state))
    }

    fn point_of(
        &self,
        stroke_mm: f64,
        gov: super::Governing,
        strokes: &BoreStrokes,
        segment_state: SegmentState,
    ) -> LoadedPoint {
        let st = gov.state;
        LoadedPoint {
            bore_mm: self.bore_mm,
            stroke_mm,
            clocking: gov.clocking,
            major_axis: gov.major_axis,
            governing: gov.reason,
            hub_offset_mm: st.hub_offset_mm,
            beyond_limit: st.beyond_limit,
            strips: strip_rows(&st),
            first_strip_contact_stroke_mm: strokes.first_strip_contact_stroke_mm,
            lift_off_stroke_mm: strokes.lift_off_stroke_mm,
            last_strip_contact_stroke_mm: strokes.last_strip_contact_stroke_mm,
            limit_stroke_mm: strokes.limit_stroke_mm,
            checks: check_inputs(&st),
            segment_state,
        }
    }
}

/// The governing loaded state of the segment's design at `bore_mm` and `stroke_mm`: the
/// design's radial load and out-of-roundness, the cases `choice` leaves open judged by
/// `judge` (the worse governs; a state beyond the limit governs any that is not). For
/// `point`, `Judge::HighestStress`; the checks pass their own judge (see [`checks_at`]).
/// To ask several strokes or judges at one bore, set up [`BoreCases`] once.
pub fn loaded_point(
    segment: &Segment,
    bore_mm: f64,
    stroke_mm: f64,
    choice: CaseChoice,
    judge: Judge,
) -> Result<LoadedPoint, SharingError> {
    BoreCases::new(segment, bore_mm, choice)?.point(stroke_mm, judge)
}

/// The load-sharing check inputs of a design at its operating stroke, each at its own bore
/// and judged by its own worst case.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SharingChecks {
    /// At the smallest bore, the case with the highest worst-strip stress (static,
    /// fatigue and limit are judged on it).
    pub stress: LoadedPoint,
    /// At the largest bore, the case with the least holding force (holding and reach: the
    /// strips must lift the hub off its rest within the actuator's stroke).
    pub holding: LoadedPoint,
    /// At the largest bore, the case with the fewest strips touching (the top-strip check).
    pub top_strip: LoadedPoint,
    /// The bend passage when the design gives a bend (`None`: no bend check).
    #[serde(skip)]
    pub bend: Option<Result<BendPassage, BendError>>,
}

/// The inputs of the load-sharing checks at `stroke_mm` (the operating stroke).
pub fn checks_at(segment: &Segment, stroke_mm: f64) -> Result<SharingChecks, SharingError> {
    let all = CaseChoice::default();
    let small = BoreCases::new(segment, segment.bore_smallest_mm, all)?;
    let large = BoreCases::new(segment, segment.bore_largest_mm, all)?;
    checks_with(segment, &small, &large, stroke_mm, stroke_mm)
}

/// [`checks_at`] on cases already set up at the smallest and the largest bore, each at its
/// own operating stroke (they differ under a set pull or torque).
pub fn checks_with(
    segment: &Segment,
    small: &BoreCases<'_>,
    large: &BoreCases<'_>,
    small_stroke_mm: f64,
    large_stroke_mm: f64,
) -> Result<SharingChecks, SharingError> {
    Ok(SharingChecks {
        stress: small.point(small_stroke_mm, Judge::HighestStress)?,
        holding: large.point(large_stroke_mm, Judge::LeastHolding)?,
        top_strip: large.point(large_stroke_mm, Judge::FewestInContact)?,
        bend: bend_passage(segment),
    })
}

/// The bend rule for the design's bend, if it gives one: the relaxed rim (the larger of
/// the plates and the relaxed strips) of rigid length free length plus both plates, in the
/// smallest bore.
pub fn bend_passage(segment: &Segment) -> Option<Result<BendPassage, BendError>> {
    let d = &segment.design;
    let bend = d.bore.bend?;
    let nps = d.bore.pipe.as_ref().map(|p| p.nps.as_str());
    let rigid_mm = d.strip.free_length_mm + 2.0 * d.end_plate_thickness_mm;
    Some(bend::passage(
        bend,
        nps,
        segment.bore_smallest_mm,
        segment.relaxed_diameter_mm(),
        rigid_mm,
    ))
}

/// How many times a drawing shows the hub's offset larger than it is, so that it can be
/// seen: 1, 2, 5, 10, 20, 50, ... the least that draws it at 6 % of the bore's radius or
/// more (1 when there is no offset).
pub fn offset_exaggeration(offset_mm: f64, radius_mm: f64) -> f64 {
    if !(offset_mm > 0.0 && radius_mm > 0.0) {
        return 1.0;
    }
    let want = 0.06 * radius_mm / offset_mm;
    let mut k = 1.0;
    for step in [2.0, 2.5, 2.0].iter().cycle().take(60) {
        if k >= want {
            break;
        }
        k *= step;
    }
    k
}

/// The least outward travel from `c` (`[y, z]`, mm) along the unit vector `u` to the wall
/// of an elliptical bore with semi-axes `a_y` (vertical) and `a_z`, mm: where a drawing puts
/// a strip that touches the wall.
pub fn wall_travel_mm(c: [f64; 2], u: [f64; 2], a_y: f64, a_z: f64) -> f64 {
    super::geometry::Ellipse { a_y, a_z }.travel(c, u)
}
