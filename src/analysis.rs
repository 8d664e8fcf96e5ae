//! Everything the app, the sizing sheet and the `check` command show for one design,
//! computed in one pass: the checks, the force-stroke curve at the nominal bore, the
//! stroke-against-bore window, the states at the smallest, nominal and largest bore, and
//! the strip shape at the operating stroke. No I/O and no GUI types.

use serde::Serialize;

use crate::actuation;
use crate::checks::{self, Check};
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
    let segment = Segment::new(design)?;
    let checks = checks::run(&segment);
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
