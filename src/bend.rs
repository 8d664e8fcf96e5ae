//! Passing a pipe bend when relaxed: the plane-geometry rule for a rigid body (the relaxed
//! segment's rim, of diameter `d_r` and length `l_r`) in an elbow of centreline radius
//! `R_b` and bore `D`. The body passes while its outer corners fit under the outer wall with
//! its inner side on the inner wall at mid-length:
//! `(l_r/2)^2 + (R_b - D/2 + d_r)^2 <= (R_b + D/2)^2` (plane geometry, common practice).
//! Butt-weld elbow radii follow ASME B16.9: long radius `1.5 x NPS`, short radius
//! `1.0 x NPS`, NPS in inches (from memory). Pure geometry: no I/O, no GUI.

use serde::{Deserialize, Serialize};

/// Millimetres per inch (exact by definition).
const MM_PER_INCH: f64 = 25.4;

/// The bend a segment must pass.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub enum Bend {
    /// Long-radius butt-weld elbow, centreline radius `1.5 x NPS` (ASME B16.9, from memory).
    LongRadius,
    /// Short-radius butt-weld elbow, centreline radius `1.0 x NPS` (ASME B16.9, from memory).
    ShortRadius,
    /// Any bend, by its centreline radius in mm.
    RadiusMm(f64),
}

/// Why a bend could not be judged.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum BendError {
    /// An elbow by NPS was asked for but the bore names no pipe size.
    #[error(
        "bore.bend: a {which} elbow needs the pipe size (bore.pipe with an NPS); give the bend as RadiusMm(r) instead"
    )]
    NoPipeSize {
        /// `long-radius` or `short-radius`.
        which: &'static str,
    },
    /// The NPS text is not a size in inches such as `2`, `1/2` or `1-1/4`.
    #[error("bore.pipe: NPS {nps:?} is not a size in inches (e.g. \"2\", \"1/2\", \"1-1/4\")")]
    BadNps {
        /// The text given.
        nps: String,
    },
    /// A length is not a finite positive number, or the bend is tighter than the pipe.
    #[error("{what} = {value} is not valid ({allowed})")]
    BadValue {
        /// Which quantity.
        what: &'static str,
        /// The value given.
        value: f64,
        /// The allowed range in words.
        allowed: String,
    },
}

/// The verdict of the passage rule.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct BendPassage {
    /// Whether the relaxed rim passes the bend.
    pub passes: bool,
    /// Largest rim diameter that passes minus the actual one, mm (positive: slack;
    /// negative: how much smaller the rim must be).
    pub margin_mm: f64,
    /// Centreline radius of the bend used, mm.
    pub centreline_radius_mm: f64,
    /// Largest rim diameter that passes at this rigid length, mm.
    pub largest_rim_diameter_mm: f64,
    /// One line saying what was compared.
    pub reason: String,
}

/// NPS text in inches: `"2"`, `"1/2"`, `"1-1/4"`, `"1 1/4"`, `"2.5"`.
pub fn nps_inches(nps: &str) -> Result<f64, BendError> {
    let bad = || BendError::BadNps {
        nps: nps.to_string(),
    };
    let text = nps.trim().replace(' ', "-");
    let fraction = |s: &str| -> Option<f64> {
        match s.split_once('/') {
            Some((n, d)) => {
                let (n, d) = (n.parse::<f64>().ok()?, d.parse::<f64>().ok()?);
                (d > 0.0).then(|| n / d)
            }
            None => s.parse::<f64>().ok(),
        }
    };
    let value = match text.split_once('-') {
        Some((whole, frac)) if !frac.contains('-') => {
            Some(whole.parse::<f64>().map_err(|_| bad())? + fraction(frac).ok_or_else(bad)?)
        }
        Some(_) => None,
        None => fraction(&text),
    };
    match value {
        Some(v) if v.is_finite() && v > 0.0 => Ok(v),
        _ => Err(bad()),
    }
}

impl Bend {
    /// Centreline radius in mm; `nps` is the pipe's nominal size text when known.
    pub fn centreline_radius_mm(self, nps: Option<&str>) -> Result<f64, BendError> {
        let by_nps = |factor: f64, which: &'static str| -> Result<f64, BendError> {
            let nps = nps.ok_or(BendError::NoPipeSize { which })?;
            Ok(factor * nps_inches(nps)? * MM_PER_INCH)
        };
        match self {
            Bend::LongRadius => by_nps(1.5, "long-radius"),
            Bend::ShortRadius => by_nps(1.0, "short-radius"),
            Bend::RadiusMm(r) if r.is_finite() && r > 0.0 => Ok(r),
            Bend::RadiusMm(r) => Err(BendError::BadValue {
                what: "bore.bend radius_mm",
                value: r,
                allowed: "a positive number of mm".into(),
            }),
        }
    }

    /// Short name for tables.
    pub fn name(self) -> String {
        match self {
            Bend::LongRadius => "long-radius elbow (1.5 x NPS)".into(),
            Bend::ShortRadius => "short-radius elbow (1.0 x NPS)".into(),
            Bend::RadiusMm(r) => format!("bend of {r} mm centreline radius"),
        }
    }
}

/// The largest rigid-body diameter that passes a bend of centreline radius `radius_mm` in a
/// bore `bore_mm` at rigid length `length_mm`, mm (may be negative: nothing that long
/// passes).
pub fn largest_diameter_mm(radius_mm: f64, bore_mm: f64, length_mm: f64) -> f64 {
    let outer = radius_mm + 0.5 * bore_mm;
    let half = 0.5 * length_mm;
    let reach = (outer * outer - half * half).max(0.0).sqrt();
    reach - (radius_mm - 0.5 * bore_mm)
}

/// Judges the passage rule for a rim of diameter `rim_diameter_mm` and rigid length
/// `rigid_length_mm` (free length plus the plates' thickness) through `bend` in a bore of
/// `bore_mm`.
pub fn passage(
    bend: Bend,
    nps: Option<&str>,
    bore_mm: f64,
    rim_diameter_mm: f64,
    rigid_length_mm: f64,
) -> Result<BendPassage, BendError> {
    for (what, value) in [
        ("bore_mm", bore_mm),
        ("rim_diameter_mm", rim_diameter_mm),
        ("rigid_length_mm", rigid_length_mm),
    ] {
        if !(value.is_finite() && value > 0.0) {
            return Err(BendError::BadValue {
                what,
                value,
                allowed: "a positive number of mm".into(),
            });
        }
    }
    let radius_mm = bend.centreline_radius_mm(nps)?;
    if radius_mm < 0.5 * bore_mm {
        return Err(BendError::BadValue {
            what: "bore.bend centreline radius_mm",
            value: radius_mm,
            allowed: format!("at least half the bore, {} mm", 0.5 * bore_mm),
        });
    }
    let largest = largest_diameter_mm(radius_mm, bore_mm, rigid_length_mm);
    let margin_mm = largest - rim_diameter_mm;
    let passes = margin_mm >= 0.0;
    let reason = if passes {
        format!(
            "a rigid {rigid_length_mm:.1} mm long body of up to {largest:.2} mm passes the {} ({radius_mm:.1} mm) in a {bore_mm:.2} mm bore; the relaxed rim is {rim_diameter_mm:.2} mm",
            bend.name()
        )
    } else {
        format!(
            "the relaxed rim ({rim_diameter_mm:.2} mm, {rigid_length_mm:.1} mm long) jams in the {} ({radius_mm:.1} mm) of a {bore_mm:.2} mm bore: at most {largest:.2} mm passes",
            bend.name()
        )
    };
    Ok(BendPassage {
        passes,
        margin_mm,
        centreline_radius_mm: radius_mm,
        largest_rim_diameter_mm: largest,
        reason,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nps_text() {
        // NPS designations as written in ASME B36.10M (common practice spellings).
        assert_eq!(nps_inches("2"), Ok(2.0));
        assert_eq!(nps_inches("1/2"), Ok(0.5));
        assert_eq!(nps_inches("1-1/4"), Ok(1.25));
        assert_eq!(nps_inches("1 1/2"), Ok(1.5));
        assert!(nps_inches("two").is_err());
        assert!(nps_inches("1/0").is_err());
        assert!(nps_inches("-2").is_err());
    }

    #[test]
    fn rule_is_tight_at_its_largest_diameter() {
        // Plane geometry: at the largest diameter the corners sit exactly on the outer wall.
        let (r, d, l) = (150.0, 102.3, 160.0);
        let dr = largest_diameter_mm(r, d, l);
        let lhs = (l / 2.0).powi(2) + (r - d / 2.0 + dr).powi(2);
        assert!((lhs - (r + d / 2.0).powi(2)).abs() < 1e-9);
    }
}
