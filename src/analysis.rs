//! Everything the app, the sizing sheet and the `check` command show for one design,
//! computed in one pass: the checks, the force-stroke curve at the nominal bore, the
//! stroke-against-bore window, the states at the smallest, nominal and largest bore, and
//! the strip shape at the operating stroke; and what the front ends draw from them (the
//! usable stroke window, the shape the side view draws, the end view's strip outlines,
//! the largest stored energy), so that no front end works them out for itself. No I/O
//! and no GUI types.

use serde::Serialize;

use crate::actuation;
use crate::checks::{self, Check};
use crate::quantities::UsableStroke;
use crate::segment::{BoreRow, Segment, SegmentError, SegmentState};

/// Points on the force-stroke curve (app and sheet).
pub const CURVE_POINTS: usize = 400;
/// Bores across the stroke-against-bore window (app and sheet).
pub const WINDOW_POINTS: usize = 200;

/// The three bores a design is judged at.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub enum BoreCase {
    /// Nominal minus tolerance.
    Smallest,
    /// Nominal.
    Nominal,
    /// Nominal plus tolerance.
    Largest,
}

impl BoreCase {
    /// The three cases in order.
    pub const ALL: [BoreCase; 3] = [BoreCase::Smallest, BoreCase::Nominal, BoreCase::Largest];

    /// Label for tables.
    pub fn label(self) -> &'static str {
        match self {
            BoreCase::Smallest => "smallest",
            BoreCase::Nominal => "nominal",
            BoreCase::Largest => "largest",
        }
    }
}

/// Results at one of the three bores.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct BoreResult {
    /// Which bore.
    pub case: BoreCase,
    /// Bore diameter, mm.
    pub bore_mm: f64,
    /// The state at the operating stroke, or why there is none (the relaxed segment does
    /// not fit this bore).
    pub operating: Result<SegmentState, String>,
    /// The inverse queries at this bore.
    pub row: BoreRow,
}

impl BoreResult {
    /// The state at the operating stroke when the model has one there: `None` when the
    /// relaxed segment does not fit this bore, the stroke is past the model's limit or
    /// the solve failed.
    pub fn in_model(&self) -> Option<&SegmentState> {
        self.operating.as_ref().ok().filter(|s| s.phase.has_state())
    }
}

/// The strip shape the side view draws, in mm `(x, r)`.
#[derive(Clone, Debug, PartialEq)]
pub enum SideShape<'a> {
    /// The centreline at the operating stroke in the nominal bore.
    Operating(&'a [[f64; 2]]),
    /// No state there (the operating stroke is past the model's limit, a failed solve, or
    /// the relaxed segment does not fit the nominal bore): the strip straight at the mount
    /// radius over its free length, so the reader sees the design as built (and any
    /// interference), and no shape the model did not solve at that stroke passes for it.
    Relaxed([[f64; 2]; 2]),
}

impl SideShape<'_> {
    /// The points to draw.
    pub fn points(&self) -> &[[f64; 2]] {
        match self {
            SideShape::Operating(p) => p,
            SideShape::Relaxed(p) => p,
        }
    }

    /// Whether this is the state at the operating stroke.
    pub fn is_operating(&self) -> bool {
        matches!(self, SideShape::Operating(_))
    }
}

/// The end view: the plate and the strip outlines at the plates and at the crest, in mm
/// with `y` up (see [`Segment::end_view_strips_mm`]).
#[derive(Clone, Debug, PartialEq)]
pub struct EndView {
    /// End-plate radius drawn, mm ([`Segment::drawn_plate_radius_mm`]).
    pub plate_radius_mm: f64,
    /// The strips where they leave the plates (centrelines at the mount radius).
    pub at_plates: Vec<[[f64; 2]; 4]>,
    /// The crest height and the strips at the crest of the operating state in the nominal
    /// bore; `None` when there is no state there.
    pub at_crest: Option<(f64, Vec<[[f64; 2]; 4]>)>,
}

/// One design, analysed.
#[derive(Clone, Debug)]
pub struct Analysis {
    /// The resolved segment.
    pub segment: Segment,
    /// Every check in order.
    pub checks: Vec<Check>,
    /// Index into `checks` of the limiting check.
    pub limiting: Option<usize>,
    /// Smallest, nominal and largest bore.
    pub bores: Vec<BoreResult>,
    /// Force-stroke curve at the nominal bore (empty if the segment does not fit it).
    pub curve: Vec<SegmentState>,
    /// Stroke-against-bore rows across the window.
    pub window: Vec<BoreRow>,
    /// Window range, mm.
    pub window_mm: (f64, f64),
    /// Strip centreline at the operating stroke in the nominal bore, `(x, r)` in mm.
    pub shape_mm: Vec<[f64; 2]>,
    /// Geometry cautions ([`checks::geometry_cautions`]): where the strips at the operating
    /// stroke swing behind a plate or cross themselves. Usually empty.
    pub cautions: Vec<String>,
    /// Under force control, the operating stroke and actuator travel at each bore of the
    /// window, mm (`None` where the set pull is never reached); empty under displacement
    /// control, where the stroke is the same at every bore.
    pub operating_window: Vec<actuation::WindowPoint>,
    /// Through a compliant drive, the stroke at which the actuator travel reaches its
    /// maximum at each bore of the window, `(bore, stroke)` in mm (`None` where it is not
    /// reached before the model's limit); empty for a rigid drive.
    pub travel_limit_window: Vec<(f64, Option<f64>)>,
}

impl Analysis {
    /// The results at one of the three bores.
    pub fn bore(&self, case: BoreCase) -> Option<&BoreResult> {
        self.bores.iter().find(|b| b.case == case)
    }

    /// The state at the operating stroke in the nominal bore, when the model has one.
    pub fn nominal_state(&self) -> Option<&SegmentState> {
        self.bore(BoreCase::Nominal).and_then(BoreResult::in_model)
    }

    /// The largest strain energy stored in all strips at the operating stroke over the
    /// three bores, J (`None`: no state at any of them).
    pub fn max_strain_energy_j(&self) -> Option<f64> {
        self.bores
            .iter()
            .filter_map(BoreResult::in_model)
            .filter_map(|s| s.strain_energy_j)
            .reduce(f64::max)
    }

    /// The shape the side view draws (see [`SideShape`]).
    pub fn side_shape(&self) -> SideShape<'_> {
        if self.shape_mm.is_empty() {
            let d = &self.segment.design;
            let r = d.mount_radius_mm;
            SideShape::Relaxed([[0.0, r], [d.strip.free_length_mm, r]])
        } else {
            SideShape::Operating(&self.shape_mm)
        }
    }

    /// The end view (see [`EndView`]).
    pub fn end_view(&self) -> EndView {
        let seg = &self.segment;
        let r_m = seg.design.mount_radius_mm;
        EndView {
            plate_radius_mm: seg.drawn_plate_radius_mm(),
            at_plates: seg.end_view_strips_mm(r_m),
            at_crest: self
                .nominal_state()
                .and_then(|s| s.crest_height_mm)
                .map(|h| (h, seg.end_view_strips_mm(r_m + h))),
        }
    }

    /// The strokes usable at every bore of the tolerance band
    /// ([`Segment::usable_stroke`] from the smallest and the largest bore's rows).
    pub fn usable_stroke(&self) -> Option<UsableStroke> {
        let small = self.bore(BoreCase::Smallest)?;
        let large = self.bore(BoreCase::Largest)?;
        Some(self.segment.usable_stroke(&small.row, &large.row))
    }

    /// The usable stroke window across the bore window ([`Segment::usable_strokes_mm`]
    /// at each bore), as runs of consecutive bores: `[bore, from, to]` in mm. A bore
    /// without usable strokes ends a run.
    pub fn usable_window_mm(&self) -> Vec<Vec<[f64; 3]>> {
        let mut runs: Vec<Vec<[f64; 3]>> = vec![Vec::new()];
        for (i, r) in self.window.iter().enumerate() {
            // Through a compliant drive the actuator's maximum is of travel: the strokes end
            // where the travel reaches it ([`Analysis::travel_limit_window`]).
            let travel_top = self.travel_limit_window.get(i).and_then(|w| w.1);
            let usable = self
                .segment
                .usable_strokes_mm(r)
                .map(|(lo, hi)| (lo, travel_top.map_or(hi, |t| hi.min(t))))
                .filter(|(lo, hi)| lo < hi);
            match usable {
                Some((lo, hi)) => runs
                    .last_mut()
                    .map_or((), |run| run.push([r.bore_mm, lo, hi])),
                None if runs.last().is_some_and(|run| !run.is_empty()) => runs.push(Vec::new()),
                None => {}
            }
        }
        runs.retain(|run| !run.is_empty());
        runs
    }
}

/// The bore window around the design's tolerance band: wide enough to show the band and
/// the reach of the strips, mm.
pub fn window_range_mm(seg: &Segment) -> (f64, f64) {
    let band = (seg.bore_largest_mm - seg.bore_smallest_mm).max(0.02 * seg.bore_nominal_mm);
    let lo = (seg.bore_smallest_mm - 1.5 * band)
        .max(seg.relaxed_diameter_mm().min(seg.bore_smallest_mm) * 0.98);
    let hi = seg.bore_largest_mm + 1.5 * band;
    (lo, hi.max(lo + 1e-3))
}

/// Analyses a design.
pub fn analyse(design: &crate::design::Design) -> Result<Analysis, SegmentError> {
    analyse_with(design, checks::run)
}

/// Analyses a design with the centred checks only (fast; the app adds the load-sharing
/// checks from a worker, see `crate::sharing::checks`).
pub fn analyse_centred(design: &crate::design::Design) -> Result<Analysis, SegmentError> {
    analyse_with(design, checks::run_centred)
}

fn analyse_with(
    design: &crate::design::Design,
    run: fn(&Segment) -> Vec<Check>,
) -> Result<Analysis, SegmentError> {
    let segment = Segment::new(design)?;
    let checks = run(&segment);
    let cautions = checks::geometry_cautions(&segment);
    let limiting = checks::limiting(&checks);
    let bores = BoreCase::ALL
        .iter()
        .map(|&case| {
            let bore_mm = match case {
                BoreCase::Smallest => segment.bore_smallest_mm,
                BoreCase::Nominal => segment.bore_nominal_mm,
                BoreCase::Largest => segment.bore_largest_mm,
            };
            let path = segment.at_bore(bore_mm);
            BoreResult {
                case,
                bore_mm,
                operating: path
                    .as_ref()
                    .map_err(|e| e.to_string())
                    .and_then(actuation::operating_result),
                row: path
                    .map(|p| p.row())
                    .unwrap_or_else(|_| segment.bore_row(bore_mm)),
            }
        })
        .collect();
    let (curve, shape_mm) = match segment.at_bore(segment.bore_nominal_mm) {
        Ok(p) => (
            p.sweep(CURVE_POINTS),
            actuation::operating_stroke_mm(&p)
                .map(|op| p.shape_mm(op, 48))
                .unwrap_or_default(),
        ),
        Err(_) => (Vec::new(), Vec::new()),
    };
    let window_mm = window_range_mm(&segment);
    let window = (0..WINDOW_POINTS)
        .map(|i| {
            let t = i as f64 / (WINDOW_POINTS - 1) as f64;
            segment.bore_row(window_mm.0 + t * (window_mm.1 - window_mm.0))
        })
        .collect();
    let operating_window = actuation::window(&segment, window_mm, WINDOW_POINTS);
    let travel_limit_window = actuation::travel_limit_window(&segment, window_mm, WINDOW_POINTS);
    Ok(Analysis {
        segment,
        checks,
        limiting,
        bores,
        curve,
        window,
        window_mm,
        shape_mm,
        cautions,
        operating_window,
        travel_limit_window,
    })
}
