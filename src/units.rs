//! Display units: the one conversion layer between the SI-based values every module
//! computes with (mm, N, MPa, N m, N/mm, J) and what a user chose to read, millimetre /
//! newton / megapascal (the default) or inch / pound-force / ksi. The design file, the
//! solver and JSON stay in SI always; only what is shown (and what a user types into a
//! display field) passes through here. No factor appears anywhere else.
//!
//! The factors are the exact definitions of NIST Special Publication 811 (2008 edition),
//! Appendix B: 1 in = 25.4 mm exactly, 1 lbf = 4.4482216152605 N exactly; the ksi and the
//! pound-force inch are derived from those two, never typed as rounded constants.

use serde::{Deserialize, Serialize};

/// Millimetres in one inch (exact by definition; NIST SP 811, Appendix B).
pub const MM_PER_IN: f64 = 25.4;

/// Newtons in one pound-force (exact by definition; NIST SP 811, Appendix B).
pub const N_PER_LBF: f64 = 4.4482216152605;

/// Megapascals in one ksi (1000 lbf/in^2), derived from the two exact factors: N/mm^2 is
/// MPa, so `1000 * N_PER_LBF / MM_PER_IN^2` (about 6.894757).
pub const MPA_PER_KSI: f64 = 1000.0 * N_PER_LBF / (MM_PER_IN * MM_PER_IN);

/// Newton metres in one pound-force inch, derived: `N_PER_LBF * MM_PER_IN / 1000` (about
/// 0.1129848). Also joules in one inch pound-force, for energies.
pub const NM_PER_LBF_IN: f64 = N_PER_LBF * MM_PER_IN / 1000.0;

/// Newtons per millimetre in one pound-force per inch, derived (about 0.1751268).
pub const N_PER_MM_PER_LBF_PER_IN: f64 = N_PER_LBF / MM_PER_IN;

/// Which units numbers are shown in. Stored in the app's session state and chosen with
/// `--units` on the command line; never in a design file.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub enum UnitSystem {
    /// Millimetre, newton, megapascal, newton metre (what every output showed before the
    /// choice existed, unchanged byte for byte).
    #[default]
    Metric,
    /// Inch, pound-force, ksi, pound-force inch.
    Inch,
}

/// The kinds of dimensioned quantity a front end shows. Percentages, angles, friction
/// coefficients, cycles and counts have no kind: they read the same in either system.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Quantity {
    /// A length: bore, stroke, diameter, gap, margin of a geometry check (mm or in).
    Length,
    /// A thin length, the strip's thickness (mm or in; four decimals in inches).
    Thickness,
    /// A force (N or lbf).
    Force,
    /// A stress or strength, or the elastic modulus in MPa (MPa or ksi).
    Stress,
    /// A torque (N m or lbf in).
    Torque,
    /// A stiffness or a force per length (N/mm or lbf/in).
    Stiffness,
    /// An energy (J or in lbf).
    Energy,
}

impl Quantity {
    /// The kind of a value the metric display labels with `unit` (`mm`, `N`, `MPa`,
    /// `N m`, `N/mm`, `J`); `None` for any other label (degrees, turns, per cent, none).
    pub fn of_metric_unit(unit: &str) -> Option<Quantity> {
        PROSE_UNITS
            .iter()
            .find(|(u, _)| *u == unit)
            .map(|(_, q)| *q)
    }

    /// How many SI display units (mm, N, MPa, N m, N/mm, J) one displayed unit holds.
    pub fn factor(self, system: UnitSystem) -> f64 {
        match system {
            UnitSystem::Metric => 1.0,
            UnitSystem::Inch => match self {
                Quantity::Length | Quantity::Thickness => MM_PER_IN,
                Quantity::Force => N_PER_LBF,
                Quantity::Stress => MPA_PER_KSI,
                Quantity::Torque | Quantity::Energy => NM_PER_LBF_IN,
                Quantity::Stiffness => N_PER_MM_PER_LBF_PER_IN,
            },
        }
    }

    /// The unit's label as printed after a number.
    pub fn unit(self, system: UnitSystem) -> &'static str {
        match (system, self) {
            (UnitSystem::Metric, Quantity::Length | Quantity::Thickness) => "mm",
            (UnitSystem::Metric, Quantity::Force) => "N",
            (UnitSystem::Metric, Quantity::Stress) => "MPa",
            (UnitSystem::Metric, Quantity::Torque) => "N m",
            (UnitSystem::Metric, Quantity::Stiffness) => "N/mm",
            (UnitSystem::Metric, Quantity::Energy) => "J",
            (UnitSystem::Inch, Quantity::Length | Quantity::Thickness) => "in",
            (UnitSystem::Inch, Quantity::Force) => "lbf",
            (UnitSystem::Inch, Quantity::Stress) => "ksi",
            (UnitSystem::Inch, Quantity::Torque) => "lbf in",
            (UnitSystem::Inch, Quantity::Stiffness) => "lbf/in",
            (UnitSystem::Inch, Quantity::Energy) => "in lbf",
        }
    }

    /// The unit's suffix in CSV column names (`stroke_in`, `max_stress_ksi`).
    pub fn column_suffix(self, system: UnitSystem) -> &'static str {
        match (system, self) {
            (UnitSystem::Metric, Quantity::Length | Quantity::Thickness) => "mm",
            (UnitSystem::Metric, Quantity::Force) => "n",
            (UnitSystem::Metric, Quantity::Stress) => "mpa",
            (UnitSystem::Metric, Quantity::Torque) => "nm",
            (UnitSystem::Metric, Quantity::Stiffness) => "n_per_mm",
            (UnitSystem::Metric, Quantity::Energy) => "j",
            (UnitSystem::Inch, Quantity::Length | Quantity::Thickness) => "in",
            (UnitSystem::Inch, Quantity::Force) => "lbf",
            (UnitSystem::Inch, Quantity::Stress) => "ksi",
            (UnitSystem::Inch, Quantity::Torque) => "lbf_in",
            (UnitSystem::Inch, Quantity::Stiffness) => "lbf_per_in",
            (UnitSystem::Inch, Quantity::Energy) => "in_lbf",
        }
    }

    /// Decimals in `system` for a value the metric display shows with `metric` decimals:
    /// the metric count itself in millimetres; in inches the thickness always shows four
    /// (0.0100 in), a stress one more than in MPa (a ksi is almost seven MPa), everything
    /// else as many as in metric (an inch is 25 mm, but lengths shown to 3 decimals of an
    /// inch still resolve 0.025 mm, finer than a strip is made).
    pub fn decimals(self, system: UnitSystem, metric: usize) -> usize {
        match system {
            UnitSystem::Metric => metric,
            UnitSystem::Inch => match self {
                Quantity::Thickness => 4,
                Quantity::Stress => metric + 1,
                _ => metric,
            },
        }
    }
}

impl UnitSystem {
    /// Both systems, in menu order.
    pub const ALL: [UnitSystem; 2] = [UnitSystem::Metric, UnitSystem::Inch];

    /// The system's three main units in words, for a menu or a heading.
    pub fn name(self) -> &'static str {
        match self {
            UnitSystem::Metric => "mm, N, MPa",
            UnitSystem::Inch => "in, lbf, ksi",
        }
    }

    /// The command line's spelling (`--units mm|in`).
    pub fn cli_name(self) -> &'static str {
        match self {
            UnitSystem::Metric => "mm",
            UnitSystem::Inch => "in",
        }
    }

    /// The length unit as a word in a sentence: `mm` or `inches` ("strokes in inches").
    pub fn length_words(self) -> &'static str {
        match self {
            UnitSystem::Metric => "mm",
            UnitSystem::Inch => "inches",
        }
    }

    /// Whether this is the metric default (whose output is unchanged).
    pub fn is_metric(self) -> bool {
        self == UnitSystem::Metric
    }

    /// An SI value (mm, N, MPa, ...) in this system's unit.
    pub fn to_display(self, q: Quantity, si: f64) -> f64 {
        match self {
            UnitSystem::Metric => si,
            UnitSystem::Inch => si / q.factor(self),
        }
    }

    /// A value in this system's unit back in SI (mm, N, MPa, ...).
    pub fn from_display(self, q: Quantity, shown: f64) -> f64 {
        match self {
            UnitSystem::Metric => shown,
            UnitSystem::Inch => shown * q.factor(self),
        }
    }

    /// The unit label of `q` in this system.
    pub fn unit(self, q: Quantity) -> &'static str {
        q.unit(self)
    }

    /// Decimals for `q`, given the metric display's count.
    pub fn decimals(self, q: Quantity, metric: usize) -> usize {
        q.decimals(self, metric)
    }

    /// An SI value as a bare number in this system, with the decimals `decimals(q, metric)`
    /// (`0.250` in metric, `0.0098` in inches for a thickness).
    pub fn number(self, q: Quantity, si: f64, metric: usize) -> String {
        let d = self.decimals(q, metric);
        format!("{:.d$}", self.to_display(q, si))
    }

    /// An SI value with its unit (`0.250 mm`, `0.0098 in`).
    pub fn format(self, q: Quantity, si: f64, metric: usize) -> String {
        format!("{} {}", self.number(q, si, metric), self.unit(q))
    }

    /// An optional SI value as a bare number, `missing` where there is none (or it is not
    /// finite).
    pub fn number_or(self, q: Quantity, si: Option<f64>, metric: usize, missing: &str) -> String {
        match si.filter(|v| v.is_finite()) {
            Some(v) => self.number(q, v, metric),
            None => missing.to_string(),
        }
    }

    /// A CSV column name in this system: the metric name with its unit suffix swapped
    /// (`stroke_mm` -> `stroke_in`, `max_stress_mpa` -> `max_stress_ksi`) and the kind of
    /// quantity its cells hold; `None` for a column without a unit (phase, reason, degrees,
    /// factors of safety), which stays as it is.
    pub fn column(self, metric_name: &str) -> Option<(String, Quantity)> {
        // Longest suffixes first: `_n_per_mm` before `_mm`.
        const SUFFIXES: [(&str, Quantity); 6] = [
            ("_n_per_mm", Quantity::Stiffness),
            ("_mm", Quantity::Length),
            ("_mpa", Quantity::Stress),
            ("_nm", Quantity::Torque),
            ("_n", Quantity::Force),
            ("_j", Quantity::Energy),
        ];
        let (stem, q) = SUFFIXES
            .iter()
            .find_map(|(s, q)| metric_name.strip_suffix(s).map(|stem| (stem, *q)))?;
        Some((format!("{stem}_{}", q.column_suffix(self)), q))
    }

    /// A CSV header (comma-separated metric column names) and the kind of each column, in
    /// this system. In metric the header is returned unchanged.
    pub fn csv_header(self, metric_header: &str) -> (String, Vec<Option<Quantity>>) {
        let mut names = Vec::new();
        let mut kinds = Vec::new();
        for name in metric_header.split(',') {
            match self.column(name) {
                Some((shown, q)) => {
                    names.push(shown);
                    kinds.push(Some(q));
                }
                None => {
                    names.push(name.to_string());
                    kinds.push(None);
                }
            }
        }
        if self.is_metric() {
            return (metric_header.to_string(), kinds);
        }
        (names.join(","), kinds)
    }

    /// A CSV text (a header line, then rows, each ended by a line break) in this system:
    /// column names and dimensioned cells converted, everything else as it was. In metric
    /// the text is returned unchanged.
    pub fn csv_text(self, text: &str) -> String {
        if self.is_metric() {
            return text.to_string();
        }
        let mut lines = text.lines();
        let Some(header) = lines.next() else {
            return String::new();
        };
        let (header, kinds) = self.csv_header(header);
        let mut out = header;
        out.push('\n');
        for line in lines {
            out.push_str(&self.csv_row(&kinds, line));
            out.push('\n');
        }
        out
    }

    /// A CSV row of metric cells in this system: numeric cells of a dimensioned column
    /// converted (full round-trip precision), all other cells as they were. In metric the
    /// row is returned unchanged. Cells are split at commas, so quoted text cells must sit
    /// in columns without a unit.
    pub fn csv_row(self, kinds: &[Option<Quantity>], row: &str) -> String {
        if self.is_metric() {
            return row.to_string();
        }
        let mut cells = Vec::new();
        let mut rest = row;
        let mut i = 0;
        loop {
            // A quoted cell (RFC 4180) is taken whole, commas and doubled quotes included.
            let (cell, next) = if rest.starts_with('"') {
                let mut end = 1;
                let bytes = rest.as_bytes();
                while end < bytes.len() {
                    if bytes[end] == b'"' {
                        if bytes.get(end + 1) == Some(&b'"') {
                            end += 2;
                            continue;
                        }
                        break;
                    }
                    end += 1;
                }
                let close = (end + 1).min(rest.len());
                (&rest[..close], rest[close..].strip_prefix(','))
            } else {
                match rest.find(',') {
                    Some(k) => (&rest[..k], Some(&rest[k + 1..])),
                    None => (rest, None),
                }
            };
            let converted = match (kinds.get(i).copied().flatten(), cell.parse::<f64>()) {
                (Some(q), Ok(v)) if v.is_finite() => self.to_display(q, v).to_string(),
                _ => cell.to_string(),
            };
            cells.push(converted);
            i += 1;
            match next {
                Some(n) => rest = n,
                None => break,
            }
        }
        cells.join(",")
    }
}

/// The metric units [`UnitSystem::prose`] recognises after a number, longest first (so
/// `N m` and `N/mm` are not read as `N`), with their kinds.
const PROSE_UNITS: [(&str, Quantity); 6] = [
    ("N/mm", Quantity::Stiffness),
    ("N m", Quantity::Torque),
    ("MPa", Quantity::Stress),
    ("mm", Quantity::Length),
    ("N", Quantity::Force),
    ("J", Quantity::Energy),
];

impl UnitSystem {
    /// An axis title ending in its metric unit in brackets (`stroke (mm)`, `force (N)`)
    /// in this system (`stroke (in)`), with the kind of quantity on the axis; `None` for a
    /// title without one of the units (left as it is).
    pub fn axis_label(self, label: &str) -> (String, Option<Quantity>) {
        for (u, q) in PROSE_UNITS {
            if let Some(stem) = label.strip_suffix(&format!("({u})")) {
                return (format!("{stem}({})", self.unit(q)), Some(q));
            }
        }
        (label.to_string(), None)
    }

    /// A sentence written in millimetres, newtons and MPa (a check's reason, the usable
    /// stroke in words) in this system: every number directly followed by a space and one
    /// of mm, N, MPa, N m, N/mm or J (as a whole word) is converted and relabelled, keeping
    /// its sign and showing as many decimals as it had (one more for a length or a stress,
    /// whose inch units are coarser; at least 3 for a length, 2 for a torque, 1 otherwise). Everything else (percentages, degrees, counts,
    /// factors) is left as written. In metric the text is returned unchanged.
    pub fn prose(self, text: &str) -> String {
        if self.is_metric() {
            return text.to_string();
        }
        let bytes = text.as_bytes();
        let mut out = String::with_capacity(text.len() + 16);
        let mut i = 0;
        let mut copied = 0;
        while i < bytes.len() {
            // A number starts at a digit not preceded by a letter, digit, '.' or '_', nor by
            // the sign of an exponent (`2e-5`: the `5` is not a number of its own).
            let in_exponent = i >= 3
                && b"+-".contains(&bytes[i - 1])
                && b"eE".contains(&bytes[i - 2])
                && bytes[i - 3].is_ascii_digit();
            let starts = bytes[i].is_ascii_digit()
                && !in_exponent
                && (i == 0
                    || !(bytes[i - 1].is_ascii_alphanumeric() || b"._".contains(&bytes[i - 1])));
            if !starts {
                i += 1;
                continue;
            }
            let mut j = i;
            while j < bytes.len() && bytes[j].is_ascii_digit() {
                j += 1;
            }
            if j + 1 < bytes.len() && bytes[j] == b'.' && bytes[j + 1].is_ascii_digit() {
                j += 1;
                while j < bytes.len() && bytes[j].is_ascii_digit() {
                    j += 1;
                }
            }
            // An exponent belongs to the number (`2e-5 mm` is two hundred-thousandths).
            if j + 1 < bytes.len() && b"eE".contains(&bytes[j]) {
                let sign = usize::from(b"+-".contains(&bytes[j + 1]));
                if j + 1 + sign < bytes.len() && bytes[j + 1 + sign].is_ascii_digit() {
                    j += 1 + sign;
                    while j < bytes.len() && bytes[j].is_ascii_digit() {
                        j += 1;
                    }
                }
            }
            let mantissa = text[i..j].split(['e', 'E']).next().unwrap_or("");
            let decimals = mantissa.find('.').map_or(0, |d| mantissa.len() - d - 1);
            let unit = text[j..].strip_prefix(' ').and_then(|rest| {
                PROSE_UNITS.iter().find(|(u, _)| {
                    rest.starts_with(u)
                        && !rest[u.len()..]
                            .chars()
                            .next()
                            .is_some_and(|c| c.is_alphanumeric() || c == '/' || c == '_')
                })
            });
            // `N` before ` mm` is a compound (`N mm²`), not a force; `... mm in the file`
            // is a design file's own value, kept as written.
            let unit = unit.filter(|(u, _)| {
                let after = &text[j + 1 + u.len()..];
                let compound = *u == "N" && after.starts_with(" mm");
                !(compound || after.starts_with(" in the file"))
            });
            let (Some((u, q)), Ok(v)) = (unit, text[i..j].parse::<f64>()) else {
                i = j;
                continue;
            };
            let extra = usize::from(matches!(q, Quantity::Length | Quantity::Stress));
            // Short numbers (`1.8 mm`, `300 N`) still get a sensible resolution.
            let least = match q {
                Quantity::Length | Quantity::Thickness => 3,
                Quantity::Torque => 2,
                _ => 1,
            };
            // ... and at least two significant figures when small (0.01 mm is 0.00039 in).
            let shown = self.to_display(*q, v);
            let significant = if shown != 0.0 && shown.abs() < 1.0 {
                (1.0 - shown.abs().log10().floor()) as usize
            } else {
                0
            };
            let d = (decimals + extra).max(least).max(significant.min(8));
            out.push_str(&text[copied..i]);
            out.push_str(&format!("{shown:.d$} {}", self.unit(*q)));
            i = j + 1 + u.len();
            copied = i;
        }
        out.push_str(&text[copied..]);
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Relative difference within a few units in the last place.
    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= 4.0 * f64::EPSILON * a.abs().max(b.abs())
    }

    #[test]
    fn factors_are_the_definitions() {
        // NIST SP 811 (2008), Appendix B.8: inch to metre 2.54 E-02 exactly.
        assert_eq!(Quantity::Length.factor(UnitSystem::Inch), 25.4);
        assert_eq!(Quantity::Thickness.factor(UnitSystem::Inch), 25.4);
        // NIST SP 811 (2008), Appendix B.8: pound-force to newton 4.448 222 E+00; the
        // exact value 4.4482216152605 N follows from 0.45359237 kg x 9.80665 m/s^2 (B.8
        // footnotes the avoirdupois pound and standard gravity as exact).
        assert_eq!(Quantity::Force.factor(UnitSystem::Inch), 4.4482216152605);
        // NIST SP 811 (2008), Appendix B.8: kip per square inch (ksi) to pascal
        // 6.894 757 E+06, i.e. 6.894757 MPa.
        assert!(close(MPA_PER_KSI, 6.894757293168361));
        assert!((MPA_PER_KSI - 6.894757).abs() < 5e-7);
        // NIST SP 811 (2008), Appendix B.8: pound-force inch to newton meter
        // 1.129 848 E-01.
        assert!(close(NM_PER_LBF_IN, 0.1129848290276167));
        assert!((NM_PER_LBF_IN - 0.1129848).abs() < 5e-8);
        // NIST SP 811 (2008), Appendix B.8: pound-force per inch to newton per meter
        // 1.751 268 E+02, i.e. 0.1751268 N/mm.
        assert!((N_PER_MM_PER_LBF_PER_IN - 0.1751268).abs() < 5e-8);
        // NIST SP 811 (2008), Appendix B.8: inch pound-force (energy) is the same product
        // as the torque, 1.129 848 E-01 J.
        assert_eq!(
            Quantity::Energy.factor(UnitSystem::Inch),
            Quantity::Torque.factor(UnitSystem::Inch)
        );
        for q in [
            Quantity::Length,
            Quantity::Thickness,
            Quantity::Force,
            Quantity::Stress,
            Quantity::Torque,
            Quantity::Stiffness,
            Quantity::Energy,
        ] {
            // Metric is the SI display unit itself (common practice: no conversion).
            assert_eq!(q.factor(UnitSystem::Metric), 1.0);
        }
    }

    #[test]
    fn round_trips_to_within_an_ulp_or_two() {
        // Multiplying back by the exact factor undoes the division to rounding (IEEE 754
        // correctly rounded operations, common practice).
        for q in [
            Quantity::Length,
            Quantity::Force,
            Quantity::Stress,
            Quantity::Torque,
            Quantity::Stiffness,
        ] {
            for si in [0.25, 1.0, 3.9, 77.92, 1234.5678, 1e-6, 1e6] {
                let back = UnitSystem::Inch.from_display(q, UnitSystem::Inch.to_display(q, si));
                assert!(close(back, si), "{q:?} {si} -> {back}");
                assert_eq!(UnitSystem::Metric.to_display(q, si), si);
            }
        }
    }

    #[test]
    fn thickness_shows_four_decimals_in_inches() {
        // The example: 0.254 mm is 0.0100 in (25.4 mm per inch, NIST SP 811 B.8).
        assert_eq!(
            UnitSystem::Inch.format(Quantity::Thickness, 0.254, 3),
            "0.0100 in"
        );
        // 0.25 mm / 25.4 = 0.009843 in (NIST SP 811 B.8 factor).
        assert_eq!(
            UnitSystem::Inch.number(Quantity::Thickness, 0.25, 3),
            "0.0098"
        );
        // Metric keeps the caller's decimals (today's output).
        assert_eq!(
            UnitSystem::Metric.format(Quantity::Thickness, 0.25, 3),
            "0.250 mm"
        );
        // 1000 MPa = 145.04 ksi (NIST SP 811 B.8: 1 ksi = 6.894757 MPa).
        assert_eq!(
            UnitSystem::Inch.format(Quantity::Stress, 1000.0, 1),
            "145.04 ksi"
        );
        // 100 N = 22.481 lbf (NIST SP 811 B.8: 1 lbf = 4.448222 N).
        assert_eq!(
            UnitSystem::Inch.format(Quantity::Force, 100.0, 3),
            "22.481 lbf"
        );
        // 1 N m = 8.851 lbf in (NIST SP 811 B.8: 1 lbf in = 0.1129848 N m).
        assert_eq!(
            UnitSystem::Inch.format(Quantity::Torque, 1.0, 3),
            "8.851 lbf in"
        );
    }

    #[test]
    fn csv_columns_take_the_unit_in_their_names() {
        let header = "stroke_mm,phase,axial_force_per_strip_n,max_stress_mpa,clock_deg,\
                      stiffness_n_per_mm,torque_nm";
        let (metric, _) = UnitSystem::Metric.csv_header(header);
        assert_eq!(metric, header);
        let (inch, kinds) = UnitSystem::Inch.csv_header(header);
        assert_eq!(
            inch,
            "stroke_in,phase,axial_force_per_strip_lbf,max_stress_ksi,clock_deg,\
             stiffness_lbf_per_in,torque_lbf_in"
        );
        // 25.4 mm is 1 in, 4.4482216152605 N is 1 lbf, 6.894757293168361 MPa is 1 ksi
        // (NIST SP 811 B.8).
        let row = UnitSystem::Inch.csv_row(
            &kinds,
            &format!("25.4,free,4.4482216152605,{MPA_PER_KSI},12.5,,"),
        );
        assert_eq!(row, "1,free,1,1,12.5,,");
        // Quoted text keeps its commas (RFC 4180).
        let (_, kinds) = UnitSystem::Inch.csv_header("id,reason,bore_mm");
        assert_eq!(
            UnitSystem::Inch.csv_row(&kinds, "hold,\"a, \"\"b\"\"\",50.8"),
            "hold,\"a, \"\"b\"\"\",2"
        );
    }

    #[test]
    fn axis_titles_take_the_unit() {
        assert_eq!(
            UnitSystem::Inch.axis_label("stroke (mm)"),
            ("stroke (in)".to_string(), Some(Quantity::Length))
        );
        assert_eq!(
            UnitSystem::Inch.axis_label("torque (N m)"),
            ("torque (lbf in)".to_string(), Some(Quantity::Torque))
        );
        assert_eq!(
            UnitSystem::Metric.axis_label("stress (MPa)"),
            ("stress (MPa)".to_string(), Some(Quantity::Stress))
        );
        assert_eq!(UnitSystem::Inch.axis_label("cycles").1, None);
    }

    #[test]
    fn prose_numbers_follow_the_units() {
        let text = "holding force 369.05 N (line-contact) vs 150.00 N x safety factor 2.00; \
                    peak 1462.1 MPa at 100 000 cycles; needs 21.955 N m; gap +0.125 mm, \
                    2 r tan(pi/N) = 31.48 mm for 8 strips, 12.5 % and 30 deg, 1000 N/mm, \
                    +/-0.01 mm, stroke_mm 3 mmHg, 1234 N mm², 0.25 mm in the file";
        assert_eq!(UnitSystem::Metric.prose(text), text);
        // 369.05 N / 4.4482216152605 = 82.966 lbf; 1462.1 MPa / 6.894757 = 212.06 ksi;
        // 21.955 N m / 0.1129848 = 194.32 lbf in; 0.125 mm / 25.4 = 0.0049 in;
        // 31.48 mm / 25.4 = 1.239 in; 1000 N/mm / 0.1751268 = 5710 lbf/in
        // (factors: NIST SP 811 (2008), Appendix B).
        assert_eq!(
            UnitSystem::Inch.prose(text),
            "holding force 82.97 lbf (line-contact) vs 33.72 lbf x safety factor 2.00; \
             peak 212.06 ksi at 100 000 cycles; needs 194.318 lbf in; gap +0.0049 in, \
             2 r tan(pi/N) = 1.239 in for 8 strips, 12.5 % and 30 deg, 5710.1 lbf/in, \
             +/-0.00039 in, stroke_mm 3 mmHg, 1234 N mm², 0.25 mm in the file"
        );
    }

    #[test]
    fn prose_reads_an_exponent_as_part_of_its_number() {
        // 2e-5 mm / 25.4 = 7.874e-7 in (NIST SP 811 (2008), Appendix B): the whole number
        // converts, not the exponent's "5 mm"; a bare exponent without a unit stays.
        let text = "within 1e-7 on ratios and 2e-5 mm on strokes; 2.5E+1 N";
        assert_eq!(
            UnitSystem::Inch.prose(text),
            "within 1e-7 on ratios and 0.00000079 in on strokes; 5.6 lbf"
        );
    }
}
