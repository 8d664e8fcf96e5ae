//! Derived quantities the front ends show, each computed here once so the command line,
//! the app and the sheet print the same number: the required holding force, the usable
//! stroke window at a bore and across the bore tolerance (with what bounds it), the
//! end-plate radius the views draw, the strip outlines of the end view, the actuator's
//! conversions between plate travel and its own position and effort, and the table of
//! state fields (label, unit, decimals) the state tables read. No I/O and no GUI or PDF
//! types.

use std::f64::consts::{PI, TAU};

use crate::design::Actuator;
use crate::segment::{ActuatorReading, BoreRow, Segment, SegmentState};
use crate::units::{Quantity, UnitSystem};

impl Segment {
    /// The holding force the design asks for: the load to hold times the safety factor, N.
    pub fn required_holding_force_n(&self) -> f64 {
        let duty = &self.design.duty;
        duty.holding_force_n * duty.safety_factor
    }

    /// The highest usable stroke at one bore and what sets it, mm: the first of the
    /// stress limit, the model's limit and the actuator's maximum travel. `None` when the
    /// relaxed segment does not fit the bore.
    fn stroke_top_mm(&self, row: &BoreRow) -> Option<(f64, StrokeBound)> {
        self.stroke_top_below_mm(row, self.max_stroke_mm())
    }

    /// [`Segment::stroke_top_mm`] with the actuator's top given as a stroke, mm.
    fn stroke_top_below_mm(&self, row: &BoreRow, actuator_mm: f64) -> Option<(f64, StrokeBound)> {
        let limit = row.limit_stroke_mm?;
        let mut top = (actuator_mm, StrokeBound::ActuatorTravel);
        for (v, bound) in [
            (Some(limit), StrokeBound::Limit),
            (row.stress_limit_stroke_mm, StrokeBound::Stress),
        ] {
            if let Some(v) = v.filter(|v| *v <= top.0) {
                top = (v, bound);
            }
        }
        Some(top)
    }

    /// The usable strokes at one bore, `(from, to)` in mm: from where the load times the
    /// safety factor is held up to the first of the stress limit, the model's limit and
    /// the actuator's maximum travel. `None` where no stroke both holds and stays within
    /// those (or the bore is out of reach, or the relaxed segment does not fit it).
    pub fn usable_strokes_mm(&self, row: &BoreRow) -> Option<(f64, f64)> {
        let (top, _) = self.stroke_top_mm(row)?;
        row.holding_stroke_mm.filter(|h| *h < top).map(|h| (h, top))
    }

    /// The strokes usable at every bore of the tolerance band, from the rows at the
    /// smallest and the largest bore: holding is hardest at the largest bore (the strips
    /// travel furthest to the wall), stress and the model's limit come first at the
    /// smallest, as the checks judge them. The actuator's force rating is judged by its
    /// own check and does not bound this range.
    pub fn usable_stroke(&self, smallest: &BoreRow, largest: &BoreRow) -> UsableStroke {
        UsableStroke {
            smallest_bore_mm: smallest.bore_mm,
            largest_bore_mm: largest.bore_mm,
            holding_mm: largest.holding_stroke_mm,
            largest_fits: largest.limit_stroke_mm.is_some(),
            force_set: match self.design.operating() {
                crate::design::Operating::Stroke(_) => None,
                crate::design::Operating::Pull(_) => Some("pull"),
                crate::design::Operating::Torque(_) => Some("torque"),
            },
            top: match self.design.actuator.stiffness_n_per_mm() {
                None => self.stroke_top_mm(smallest),
                // Through a compliant drive the maximum is of travel: the strokes end where
                // the travel at the smallest bore (the most pull at a stroke) reaches it.
                Some(_) => self.stroke_top_below_mm(
                    smallest,
                    self.at_bore(smallest.bore_mm)
                        .ok()
                        .and_then(|p| {
                            crate::actuation::stroke_at_travel_mm(&p, self.max_stroke_mm())
                        })
                        .unwrap_or(f64::INFINITY),
                ),
            },
        }
    }

    /// [`Segment::usable_stroke`] at the design's smallest and largest bore.
    pub fn usable_stroke_across_tolerance(&self) -> UsableStroke {
        self.usable_stroke(
            &self.bore_row(self.bore_smallest_mm),
            &self.bore_row(self.bore_largest_mm),
        )
    }

    /// The end-plate radius the side and end views draw, mm: the plate's own, or, where
    /// the design gives no plate size (0), the mount radius, where the strips are clamped.
    pub fn drawn_plate_radius_mm(&self) -> f64 {
        let d = &self.design;
        if d.end_plate_diameter_mm > 0.0 {
            0.5 * d.end_plate_diameter_mm
        } else {
            d.mount_radius_mm
        }
    }

    /// The ring of strips seen along the axis with their centrelines at `radius_mm` from
    /// the axis: one `b x t` rectangle per strip (tangential width, radial thickness), its
    /// four corners `(x, y)` in mm with `y` up, the first strip at the top and the rest
    /// clockwise.
    pub fn end_view_strips_mm(&self, radius_mm: f64) -> Vec<[[f64; 2]; 4]> {
        let s = &self.design.strip;
        let n = s.count.max(1);
        let (hb, ht) = (0.5 * s.width_mm, 0.5 * s.thickness_mm);
        (0..n)
            .map(|i| {
                let th = 0.5 * PI - TAU * f64::from(i) / f64::from(n);
                let (sn, cs) = th.sin_cos();
                let corner = |u: f64, v: f64| {
                    let r = radius_mm + v;
                    [r * cs + u * sn, r * sn - u * cs]
                };
                [
                    corner(-hb, -ht),
                    corner(hb, -ht),
                    corner(hb, ht),
                    corner(-hb, ht),
                ]
            })
            .collect()
    }
}

/// What sets the top of the usable stroke range.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum StrokeBound {
    /// The static or the fatigue factor of safety falls to 1.
    Stress,
    /// The model's limit (see the limit reason).
    Limit,
    /// The actuator's maximum travel.
    ActuatorTravel,
}

impl StrokeBound {
    /// In words, as a sentence goes on after "up to".
    pub fn describe(self) -> &'static str {
        match self {
            StrokeBound::Stress => "the stress limit",
            StrokeBound::Limit => "the model's limit",
            StrokeBound::ActuatorTravel => "the actuator's maximum travel",
        }
    }

    /// In words with the bore it is judged at (the actuator's travel is the same at any).
    fn at(self, smallest_bore_mm: f64) -> String {
        match self {
            StrokeBound::ActuatorTravel => self.describe().to_string(),
            _ => format!(
                "{} at the smallest bore ({smallest_bore_mm:.3} mm)",
                self.describe()
            ),
        }
    }
}

/// The strokes usable across the bore tolerance ([`Segment::usable_stroke`]).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct UsableStroke {
    /// Smallest bore, mm.
    pub smallest_bore_mm: f64,
    /// Largest bore, mm.
    pub largest_bore_mm: f64,
    /// Least stroke holding the required load at the largest bore, mm (`None`: not held
    /// before the model's limit there, or out of reach).
    pub holding_mm: Option<f64>,
    /// Whether the relaxed segment fits the largest bore (it has states there).
    pub largest_fits: bool,
    /// The top of the range at the smallest bore and what sets it (`None`: the relaxed
    /// segment does not fit the smallest bore).
    pub top: Option<(f64, StrokeBound)>,
    /// What the actuator sets when it is not the stroke (`"pull"`, `"torque"`): then the
    /// stroke follows the bore, and a stroke usable at every bore is only a comparison.
    pub force_set: Option<&'static str>,
}

impl UsableStroke {
    /// `(from, to)` in mm when some stroke is usable at every bore of the band.
    pub fn range_mm(&self) -> Option<(f64, f64)> {
        let (top, _) = self.top?;
        self.holding_mm.filter(|h| *h < top).map(|h| (h, top))
    }

    /// Whether the missing range is a finding: under a fixed stroke it is (no stroke
    /// serves every bore); under a set pull or torque each bore takes its own stroke, and
    /// the checks judge those.
    pub fn is_problem(&self) -> bool {
        self.range_mm().is_none() && self.force_set.is_none()
    }

    /// One line in words: the range, its width and what bounds each end, or plainly that
    /// there is none and why. Under a set pull or torque the line says that the stroke
    /// follows the bore and the fixed-stroke range is a comparison only.
    pub fn describe(&self) -> String {
        let fixed = self.describe_fixed();
        match self.force_set {
            None => fixed,
            Some(kind) => format!(
                "under the set {kind} the stroke follows the bore and each bore is judged at its own (see the operating point per bore); for comparison, at one fixed stroke: {fixed}"
            ),
        }
    }

    fn describe_fixed(&self) -> String {
        let small = self.smallest_bore_mm;
        let large = self.largest_bore_mm;
        match (self.range_mm(), self.top, self.holding_mm) {
            (Some((from, to)), Some((_, bound)), _) => format!(
                "usable stroke {from:.3} to {to:.3} mm across the bore tolerance ({:.3} mm): from where the required load is held at the largest bore ({large:.3} mm) up to {}",
                to - from,
                bound.at(small),
            ),
            (_, None, _) => format!(
                "no usable stroke across the bore tolerance: the relaxed strips do not fit the smallest bore ({small:.3} mm)"
            ),
            (_, _, None) if !self.largest_fits => format!(
                "no usable stroke across the bore tolerance: the relaxed strips do not fit the largest bore ({large:.3} mm)"
            ),
            (_, _, None) => format!(
                "no usable stroke across the bore tolerance: the required load is not held at the largest bore ({large:.3} mm) before the model's limit there"
            ),
            (None, Some((top, bound)), Some(hold)) => format!(
                "no usable stroke across the bore tolerance: holding the required load at the largest bore ({large:.3} mm) takes {hold:.3} mm of stroke, but {} comes at {top:.3} mm",
                bound.at(small),
            ),
        }
    }
}

impl ActuatorReading {
    /// Effort and position in words: `12.345 N m at 45.600 deg`.
    pub fn describe(&self) -> String {
        format!(
            "{:.3} {} at {:.3} {}",
            self.effort, self.effort_unit, self.position, self.position_unit
        )
    }
}

/// The actuator's conversions between plate travel and pull and its own position and
/// effort: spool angle `stroke / radius`, torque `pull x radius`; screw turns `stroke /
/// lead`, torque `pull x lead / (2 pi x efficiency)`.
impl Actuator {
    /// Position and effort in the actuator's own units (mm of pull and N; spool degrees
    /// and N m; screw turns and N m) at a plate travel and pull.
    pub fn reading(&self, stroke_mm: f64, pull_n: f64) -> ActuatorReading {
        match *self {
            Actuator::Direct { .. } => ActuatorReading {
                position: stroke_mm,
                position_unit: "mm",
                effort: pull_n,
                effort_unit: "N",
            },
            Actuator::Spool { radius_mm, .. } => ActuatorReading {
                position: (stroke_mm / radius_mm).to_degrees(),
                position_unit: "deg",
                effort: pull_n * radius_mm * 1e-3,
                effort_unit: "N m",
            },
            Actuator::LeadScrew {
                lead_mm,
                efficiency,
                ..
            } => ActuatorReading {
                position: stroke_mm / lead_mm,
                position_unit: "turns",
                effort: pull_n * lead_mm * 1e-3 / (2.0 * PI * efficiency),
                effort_unit: "N m",
            },
        }
    }

    /// The plate travel at a position in the actuator's own unit, mm (the inverse of
    /// [`Actuator::reading`]'s position).
    pub fn stroke_mm_at(&self, position: f64) -> f64 {
        match *self {
            Actuator::Direct { .. } => position,
            Actuator::Spool { radius_mm, .. } => position.to_radians() * radius_mm,
            Actuator::LeadScrew { lead_mm, .. } => position * lead_mm,
        }
    }

    /// The plate pull at an effort in the actuator's own unit, N (the inverse of
    /// [`Actuator::reading`]'s effort).
    pub fn pull_n_at(&self, effort: f64) -> f64 {
        effort / self.reading(0.0, 1.0).effort
    }

    /// The actuator's maximum plate travel, mm.
    pub fn max_stroke_mm(&self) -> f64 {
        match *self {
            Actuator::Direct { max_stroke_mm, .. } => max_stroke_mm,
            Actuator::Spool { max_angle_deg, .. } => self.stroke_mm_at(max_angle_deg),
            Actuator::LeadScrew { max_turns, .. } => self.stroke_mm_at(max_turns),
        }
    }

    /// The rating in the actuator's own effort unit (N or N m).
    pub fn effort_rating(&self) -> f64 {
        match *self {
            Actuator::Direct { max_force_n, .. } => max_force_n,
            Actuator::Spool { max_torque_nm, .. } | Actuator::LeadScrew { max_torque_nm, .. } => {
                max_torque_nm
            }
        }
    }

    /// The largest plate pull the actuator gives, N.
    pub fn max_pull_n(&self) -> f64 {
        self.pull_n_at(self.effort_rating())
    }

    /// This actuator with its geometry (spool radius; screw lead and efficiency) kept and
    /// its ratings set to give `pull_n` of plate pull over `stroke_mm` of plate travel.
    pub fn rated_for(&self, pull_n: f64, stroke_mm: f64) -> Actuator {
        let reading = self.reading(stroke_mm, pull_n);
        let mut out = self.clone();
        match &mut out {
            Actuator::Direct {
                max_force_n,
                max_stroke_mm,
                ..
            } => {
                *max_force_n = pull_n;
                *max_stroke_mm = stroke_mm;
            }
            Actuator::Spool {
                max_torque_nm,
                max_angle_deg,
                ..
            } => {
                *max_torque_nm = reading.effort;
                *max_angle_deg = reading.position;
            }
            Actuator::LeadScrew {
                max_torque_nm,
                max_turns,
                ..
            } => {
                *max_torque_nm = reading.effort;
                *max_turns = reading.position;
            }
        }
        out
    }
}

/// One quantity of a [`SegmentState`] as the state tables show it (the command line's
/// `point` table, the app's state table, the sheet's results table).
#[derive(Clone, Copy, Debug)]
pub struct StateField {
    /// The quantity's name in JSON and CSV (beside `segment::STATE_COLUMNS`).
    pub key: &'static str,
    /// Label in the command line's and the app's tables.
    pub label: &'static str,
    /// Label on the sizing sheet, with the symbol its model section uses.
    pub sheet_label: &'static str,
    /// Unit printed after the value in millimetres-newtons-MPa; empty for a pure number.
    pub unit: &'static str,
    /// The kind of quantity, for the display units (`None`: a pure number).
    pub quantity: Option<Quantity>,
    /// Decimals in the command line's and the app's tables (the sheet formats by unit).
    pub decimals: usize,
    /// One line saying what it is (the app's hover text).
    pub meaning: &'static str,
    /// The value in a state (`None`: it does not exist there).
    pub get: fn(&SegmentState) -> Option<f64>,
}

/// The numeric quantities of a state at its stroke, in the order every state table
/// shows them.
pub const STATE_FIELDS: [StateField; 11] = [
    StateField {
        key: "axial_force_per_strip_n",
        label: "axial force per strip",
        sheet_label: "Axial force per strip P",
        unit: "N",
        quantity: Some(Quantity::Force),
        decimals: 3,
        meaning: "compression in each strip",
        get: |s| s.axial_force_per_strip_n,
    },
    StateField {
        key: "contact_force_per_strip_n",
        label: "contact force per strip",
        sheet_label: "Contact force per strip F",
        unit: "N",
        quantity: Some(Quantity::Force),
        decimals: 3,
        meaning: "wall force of each strip",
        get: |s| s.contact_force_per_strip_n,
    },
    StateField {
        key: "actuator_force_n",
        label: "actuator pull",
        sheet_label: "Actuator pull N P",
        unit: "N",
        quantity: Some(Quantity::Force),
        decimals: 3,
        meaning: "pull on the end plates, N x axial force per strip",
        get: |s| s.actuator_force_n,
    },
    StateField {
        key: "radial_force_n",
        label: "radial force",
        sheet_label: "Radial force on the wall N F",
        unit: "N",
        quantity: Some(Quantity::Force),
        decimals: 3,
        meaning: "total force of all strips on the wall",
        get: |s| s.radial_force_n,
    },
    StateField {
        key: "holding_force_n",
        label: "holding force",
        sheet_label: "Holding force μ N F",
        unit: "N",
        quantity: Some(Quantity::Force),
        decimals: 3,
        meaning: "friction x radial force: the axial load the segment holds",
        get: |s| s.holding_force_n,
    },
    StateField {
        key: "outer_diameter_mm",
        label: "outer diameter",
        sheet_label: "Diameter over the strips",
        unit: "mm",
        quantity: Some(Quantity::Length),
        decimals: 3,
        meaning: "diameter over the strip corners at the crest",
        get: |s| s.outer_diameter_mm,
    },
    StateField {
        key: "flat_length_mm",
        label: "flat run on the wall",
        sheet_label: "Flat run on the wall",
        unit: "mm",
        quantity: Some(Quantity::Length),
        decimals: 3,
        meaning: "length of strip lying on the wall",
        get: |s| s.flat_length_mm,
    },
    StateField {
        key: "max_stress_mpa",
        label: "peak stress",
        sheet_label: "Peak stress σ",
        unit: "MPa",
        quantity: Some(Quantity::Stress),
        decimals: 1,
        meaning: "bending plus axial stress at the peak curvature",
        get: |s| s.max_stress_mpa,
    },
    StateField {
        key: "static_safety_factor",
        label: "static factor of safety",
        sheet_label: "Static factor of safety",
        unit: "",
        quantity: None,
        decimals: 3,
        meaning: "0.75 x tensile strength / peak stress",
        get: |s| s.static_safety_factor,
    },
    StateField {
        key: "fatigue_safety_factor",
        label: "fatigue factor of safety",
        sheet_label: "Fatigue factor of safety (Goodman)",
        unit: "",
        quantity: None,
        decimals: 3,
        meaning: "Goodman, zero-to-peak cycles",
        get: |s| s.fatigue_safety_factor,
    },
    StateField {
        key: "strain_energy_j",
        label: "stored energy",
        sheet_label: "Stored strain energy, all strips",
        unit: "J",
        quantity: Some(Quantity::Energy),
        decimals: 4,
        meaning: "strain energy in all strips",
        get: |s| s.strain_energy_j,
    },
];

impl StateField {
    /// The value in `s` to the field's decimals (no unit), or `none` where it does not
    /// exist.
    pub fn number(&self, s: &SegmentState, none: &str) -> String {
        (self.get)(s).map_or_else(
            || none.to_string(),
            |v| format!("{v:.prec$}", prec = self.decimals),
        )
    }

    /// The unit label in `units` (empty for a pure number).
    pub fn unit_in(&self, units: UnitSystem) -> &'static str {
        self.quantity.map_or(self.unit, |q| units.unit(q))
    }

    /// The value in `s` in `units` (no unit), or `none` where it does not exist; in metric
    /// exactly [`StateField::number`].
    pub fn number_in(&self, s: &SegmentState, none: &str, units: UnitSystem) -> String {
        match self.quantity {
            Some(q) if !units.is_metric() => units.number_or(q, (self.get)(s), self.decimals, none),
            _ => self.number(s, none),
        }
    }

    /// The value in `s` to the field's decimals with its unit, or `none` where it does
    /// not exist.
    pub fn text(&self, s: &SegmentState, none: &str) -> String {
        match (self.get)(s) {
            Some(_) if !self.unit.is_empty() => format!("{} {}", self.number(s, none), self.unit),
            _ => self.number(s, none),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design::Design;

    #[test]
    fn actuator_conversions_invert() {
        // Spool: angle = stroke / radius (radians), torque = pull x radius; screw: turns =
        // stroke / lead, torque = pull x lead / (2 pi eta) (the power balance of an ideal
        // screw with efficiency eta, Shigley's power-screw relation).
        let spool = Actuator::Spool {
            radius_mm: 5.0,
            max_torque_nm: 1.0,
            max_angle_deg: 360.0,
            stiffness_n_per_mm: None,
        };
        let r = spool.reading(10.0, 200.0);
        assert!((r.position - (2.0f64).to_degrees()).abs() < 1e-12);
        assert!((r.effort - 1.0).abs() < 1e-12);
        assert!((spool.stroke_mm_at(r.position) - 10.0).abs() < 1e-12);
        assert!((spool.max_pull_n() - 200.0).abs() < 1e-9);
        assert!((spool.max_stroke_mm() - 10.0 * PI).abs() < 1e-12);
        let screw = Actuator::LeadScrew {
            lead_mm: 2.0,
            efficiency: 0.5,
            max_torque_nm: 1.0,
            max_turns: 10.0,
            stiffness_n_per_mm: None,
        };
        let r = screw.reading(6.0, 1000.0 * PI / 2.0);
        assert!((r.position - 3.0).abs() < 1e-12 && (r.effort - 1.0).abs() < 1e-12);
        let rated = screw.rated_for(400.0, 12.0);
        assert!((rated.max_pull_n() - 400.0).abs() < 1e-9);
        assert!((rated.max_stroke_mm() - 12.0).abs() < 1e-12);
    }

    #[test]
    fn end_view_puts_the_first_strip_on_top() {
        let seg = Segment::new(&Design::default()).unwrap_or_else(|e| panic!("{e}"));
        let rings = seg.end_view_strips_mm(10.0);
        assert_eq!(rings.len(), seg.design.strip.count as usize);
        let centre = |q: &[[f64; 2]; 4]| {
            let x = q.iter().map(|p| p[0]).sum::<f64>() / 4.0;
            let y = q.iter().map(|p| p[1]).sum::<f64>() / 4.0;
            (x, y)
        };
        let (x, y) = centre(&rings[0]);
        assert!(x.abs() < 1e-12 && (y - 10.0).abs() < 1e-12, "{x} {y}");
        // The second is clockwise from the top: to the right.
        assert!(centre(&rings[1]).0 > 0.0);
    }

    #[test]
    fn usable_range_is_where_the_band_checks_pass() {
        // Inside the range the holding, stress and stroke checks pass at once; just
        // outside one of them fails (the range is their intersection, as docs/contract.md
        // judges each check at its own bore).
        use crate::checks::{self, CheckId};
        let d = Design::default();
        let seg = Segment::new(&d).unwrap_or_else(|e| panic!("{e}"));
        let u = seg.usable_stroke_across_tolerance();
        let (from, to) = u.range_mm().unwrap_or_else(|| panic!("{}", u.describe()));
        let passes = |stroke: f64| {
            let mut d = d.clone();
            d.operating_stroke_mm = Some(stroke);
            let seg = Segment::new(&d).unwrap_or_else(|e| panic!("{e}"));
            checks::run(&seg)
                .iter()
                .filter(|c| {
                    [
                        CheckId::Hold,
                        CheckId::Static,
                        CheckId::Fatigue,
                        CheckId::Stroke,
                    ]
                    .contains(&c.id)
                })
                .all(|c| c.pass)
        };
        let w = to - from;
        assert!(passes(from + 0.01 * w) && passes(0.5 * (from + to)) && passes(to - 0.01 * w));
        assert!(!passes(from - 0.01 * w) && !passes(to + 0.01 * w));
        assert!(
            u.describe().starts_with("usable stroke"),
            "{}",
            u.describe()
        );
    }
}
