//! Number, unit and date formatting for the sheet, in one place so every page prints a
//! quantity the same way: lengths and strokes in mm to 3 decimals, forces to 4
//! significant figures, stresses in MPa to 1 decimal, factors and ratios to 3 decimals,
//! angles to 1 decimal. A missing value prints as an en dash with the reason nearby.
//!
//! The sheet prints in one unit system, chosen per sheet ([`use_units`] holds it while a
//! sheet is laid out): these functions convert lengths, forces, stresses and torques
//! through `crate::units`, and every text placed on a page passes through [`shown`], which
//! converts what a sentence says in mm, N or MPa. In inches a length shows 4 decimals.

use std::cell::Cell;

use crate::units::{Quantity, UnitSystem};

thread_local! {
    /// The units of the sheet being laid out on this thread.
    static UNITS: Cell<UnitSystem> = const { Cell::new(UnitSystem::Metric) };
}

/// Restores the previous units when dropped.
pub struct UnitsGuard(UnitSystem);

impl Drop for UnitsGuard {
    fn drop(&mut self) {
        UNITS.with(|u| u.set(self.0));
    }
}

/// Lays out in `units` until the guard is dropped.
pub fn use_units(units: UnitSystem) -> UnitsGuard {
    UnitsGuard(UNITS.with(|u| u.replace(units)))
}

/// The units of the sheet being laid out.
pub fn units() -> UnitSystem {
    UNITS.with(Cell::get)
}

/// A text as placed on the sheet: in metric as written, in inches with every number given
/// in mm, N, MPa or N m converted ([`UnitSystem::prose`]).
pub fn shown(text: &str) -> String {
    units().prose(text)
}

/// A value of a design-file field shown on the inputs: in metric as `shown`; in inches
/// with the file's own number beside it, `0.0098 in (0.25 mm in the file)`, so a reviewer
/// can trace it to the file.
pub fn from_file(si: f64, metric_unit: &str, shown: String) -> String {
    if units().is_metric() {
        shown
    } else {
        format!(
            "{shown} ({} {metric_unit} in the file)",
            crate::design::show_number(si)
        )
    }
}

/// Decimals for a length: 3 in mm, 4 in inches.
fn length_decimals() -> usize {
    if units().is_metric() { 3 } else { 4 }
}

/// What prints for a quantity that does not exist (out of reach, no state).
pub const NONE: &str = "–";

/// A length: millimetres to 3 decimals (`12.345 mm`), or inches to 4 (`0.4860 in`).
pub fn mm(v: f64) -> String {
    let u = units();
    format!(
        "{} {}",
        fixed(u.to_display(Quantity::Length, v), length_decimals()),
        u.unit(Quantity::Length)
    )
}

/// A length value of a design-file field ([`mm`], with the file's value in inches).
pub fn file_mm(v: f64) -> String {
    from_file(v, "mm", mm(v))
}

/// An optional length.
pub fn mm_opt(v: Option<f64>) -> String {
    v.filter(|v| v.is_finite())
        .map_or_else(|| NONE.to_string(), mm)
}

/// `v` to `decimals` places, with a true minus sign and no "-0.000".
pub fn fixed(v: f64, decimals: usize) -> String {
    if !v.is_finite() {
        return NONE.to_string();
    }
    let s = format!("{v:.decimals$}");
    let zero = s
        .trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.');
    if zero {
        s.trim_start_matches('-').to_string()
    } else {
        s.replace('-', "−")
    }
}

/// `v` to `sig` significant figures, fixed notation (no exponent) for everyday
/// magnitudes, `1.234e+7` style beyond them.
pub fn sig(v: f64, sig: usize) -> String {
    if !v.is_finite() {
        return NONE.to_string();
    }
    if v == 0.0 {
        return "0".to_string();
    }
    let mag = v.abs().log10().floor() as i32;
    if !(-4..9).contains(&mag) {
        return format!("{v:.prec$e}", prec = sig.saturating_sub(1)).replace('-', "−");
    }
    let decimals = (sig as i32 - 1 - mag).max(0) as usize;
    // Rounding can carry into a new digit (9.9996 -> 10.000); re-derive the places then.
    let rounded: f64 = format!("{v:.decimals$}").parse().unwrap_or(v);
    let mag2 = if rounded == 0.0 {
        mag
    } else {
        rounded.abs().log10().floor() as i32
    };
    let decimals = (sig as i32 - 1 - mag2).max(0) as usize;
    fixed(v, decimals)
}

/// Force in newtons (or pound-force), 4 significant figures.
pub fn newton(v: f64) -> String {
    let u = units();
    format!(
        "{} {}",
        sig(u.to_display(Quantity::Force, v), 4),
        u.unit(Quantity::Force)
    )
}

/// A force value of a design-file field ([`newton`], with the file's value in inches).
pub fn file_newton(v: f64) -> String {
    from_file(v, "N", newton(v))
}

/// Stress in MPa, 1 decimal (or ksi, 2 decimals).
pub fn mpa(v: f64) -> String {
    let u = units();
    format!(
        "{} {}",
        fixed(
            u.to_display(Quantity::Stress, v),
            u.decimals(Quantity::Stress, 1)
        ),
        u.unit(Quantity::Stress)
    )
}

/// A bending stiffness given in N mm², 4 significant figures: `9124 N mm²`, or in inches
/// `3.180 lbf in²` (a force times a length squared, through `crate::units`).
pub fn bending_stiffness(n_mm2: f64) -> String {
    let u = units();
    if u.is_metric() {
        return format!("{} N mm²", sig(n_mm2, 4));
    }
    let per = u.from_display(Quantity::Force, 1.0) * u.from_display(Quantity::Length, 1.0).powi(2);
    format!("{} lbf in²", sig(n_mm2 / per, 4))
}

/// A factor or ratio, 3 decimals.
pub fn factor(v: f64) -> String {
    fixed(v, 3)
}

/// A quantity in an actuator's own unit (mm, deg, turns, N, N m), 4 significant figures.
pub fn in_unit(v: f64, unit: &str) -> String {
    match unit {
        "mm" => mm(v),
        "deg" => format!("{}°", fixed(v, 1)),
        "N" => newton(v),
        "N m" => format!(
            "{} {}",
            sig(units().to_display(Quantity::Torque, v), 4),
            units().unit(Quantity::Torque)
        ),
        "N/mm" => format!(
            "{} {}",
            sig(units().to_display(Quantity::Stiffness, v), 4),
            units().unit(Quantity::Stiffness)
        ),
        _ => format!("{} {unit}", sig(v, 4)),
    }
}

/// A whole count with thin grouping: `1 000 000`.
pub fn count(n: u64) -> String {
    crate::checks::grouped_count(n)
}

/// Proleptic Gregorian date `(year, month, day)` of a day count since 1970-01-01.
/// The civil-from-days algorithm in eras of 400 years (146 097 days), written out here
/// so the sheet needs no date library.
pub fn civil_from_days(days: i64) -> (i64, u32, u32) {
    let z = days + 719_468; // days since 0000-03-01
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097); // day of era, 0..=146096
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365; // year of era, 0..=399
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100); // day of year from March 1, 0..=365
    let mp = (5 * doy + 2) / 153; // month from March, 0..=11
    let day = (doy - (153 * mp + 2) / 5 + 1) as u32;
    let month = if mp < 10 { mp + 3 } else { mp - 9 } as u32;
    let year = 400 * era + yoe + i64::from(month <= 2);
    (year, month, day)
}

/// UTC date and time `YYYY-MM-DD HH:MM UTC` of seconds since the Unix epoch.
pub fn utc_stamp(unix_seconds: i64) -> String {
    let days = unix_seconds.div_euclid(86_400);
    let secs = unix_seconds.rem_euclid(86_400);
    let (y, m, d) = civil_from_days(days);
    format!(
        "{y:04}-{m:02}-{d:02} {:02}:{:02} UTC",
        secs / 3600,
        (secs % 3600) / 60
    )
}

/// Now, as [`utc_stamp`] prints it (the epoch if the clock is before 1970).
pub fn now_utc() -> String {
    let secs = std::time::SystemTime::now()
        .duration_since(std::time::UNIX_EPOCH)
        .map_or(0, |d| i64::try_from(d.as_secs()).unwrap_or(0));
    utc_stamp(secs)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_figures_and_fixed_places() {
        assert_eq!(sig(1234.5678, 4), "1235");
        assert_eq!(sig(12.345678, 4), "12.35");
        assert_eq!(sig(0.00123456, 4), "0.001235");
        assert_eq!(sig(9.99996, 4), "10.00");
        assert_eq!(sig(-1.23456, 3), "−1.23");
        assert_eq!(fixed(-0.0001, 3), "0.000");
        assert_eq!(mm(2.5), "2.500 mm");
        assert_eq!(count(1_000_000), "1 000 000");
        assert_eq!(count(999), "999");
    }

    #[test]
    fn civil_dates_match_known_calendar_days() {
        // Day numbers of well-known dates (Unix epoch arithmetic; the leap-day rules of the
        // Gregorian calendar, 1582 bull "Inter gravissimas": every 4th year except
        // centuries not divisible by 400).
        assert_eq!(civil_from_days(0), (1970, 1, 1));
        assert_eq!(civil_from_days(-1), (1969, 12, 31));
        assert_eq!(civil_from_days(10_956), (1999, 12, 31));
        assert_eq!(civil_from_days(11_016), (2000, 2, 29)); // 2000 is a leap year
        assert_eq!(civil_from_days(47_540), (2100, 2, 28));
        assert_eq!(civil_from_days(47_541), (2100, 3, 1)); // 2100 is not
        // 2024-03-01: 54 years, 13 of them leap (1972..=2020 and 2024's Feb 29) -> 19783.
        assert_eq!(civil_from_days(19_783), (2024, 3, 1));
        assert_eq!(utc_stamp(1_700_000_000), "2023-11-14 22:13 UTC");
    }
}
