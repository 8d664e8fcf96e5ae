//! Pipe sizes: outside diameter and nominal wall of ASME B36.10M wrought steel pipe for
//! NPS 1/2 to 12 in schedules 10, 40 and 80, each row with its source.
//!
//! The table lives in `assets/pipe_sizes.ron`, embedded at build time and parsed once. A
//! design's bore from a pipe size is `OD - 2 x nominal wall`; mill tolerances on wall and
//! ovality are not in the table.

use std::sync::OnceLock;

use serde::{Deserialize, Serialize};

/// The embedded pipe table, rows in size order.
const PIPE_RON: &str = include_str!("../assets/pipe_sizes.ron");

/// One size and schedule.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct PipeSize {
    /// Nominal pipe size as printed, e.g. "2" or "1-1/2".
    pub nps: String,
    /// Schedule number, e.g. "40".
    pub schedule: String,
    pub outside_diameter_mm: f64,
    /// Nominal wall thickness.
    pub wall_mm: f64,
    pub source: String,
}

impl PipeSize {
    /// Nominal inside diameter, `OD - 2 x wall`.
    pub fn inside_diameter_mm(&self) -> f64 {
        self.outside_diameter_mm - 2.0 * self.wall_mm
    }
}

/// All rows, in size order, schedules ascending within a size.
pub fn table() -> &'static [PipeSize] {
    static TABLE: OnceLock<Vec<PipeSize>> = OnceLock::new();
    TABLE.get_or_init(|| {
        ron::from_str(PIPE_RON)
            .expect("embedded assets/pipe_sizes.ron does not parse: a build defect, not user input")
    })
}

/// Canonical form of a typed NPS: trimmed, and "1 1/2" written as "1-1/2".
fn normalize_nps(nps: &str) -> String {
    nps.split_whitespace().collect::<Vec<_>>().join("-")
}

/// The row for this size and schedule. `nps` must match the table's spelling after
/// trimming, except that a space may stand for the hyphen ("1 1/2" finds "1-1/2").
pub fn find(nps: &str, schedule: &str) -> Option<&'static PipeSize> {
    let nps = normalize_nps(nps);
    let schedule = schedule.trim();
    table()
        .iter()
        .find(|p| p.nps == nps && p.schedule == schedule)
}

/// Every nominal size once, smallest first.
pub fn nps_list() -> Vec<&'static str> {
    let mut list: Vec<&'static str> = Vec::new();
    for p in table() {
        if list.last() != Some(&p.nps.as_str()) {
            list.push(p.nps.as_str());
        }
    }
    list
}

/// The schedules the table holds for this size (same matching as [`find`]); empty for an
/// unknown size.
pub fn schedules_for(nps: &str) -> Vec<&'static str> {
    let nps = normalize_nps(nps);
    table()
        .iter()
        .filter(|p| p.nps == nps)
        .map(|p| p.schedule.as_str())
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn embedded_table_parses() {
        let parsed: Vec<PipeSize> = ron::from_str(PIPE_RON).expect("pipe_sizes.ron parses");
        assert_eq!(parsed.len(), 15 * 3);
        assert_eq!(table(), parsed.as_slice());
    }

    #[test]
    fn rows_are_in_size_order() {
        // nps_list() relies on grouping by size with OD rising.
        for pair in table().windows(2) {
            let (a, b) = (&pair[0], &pair[1]);
            if a.nps == b.nps {
                assert_eq!(a.outside_diameter_mm, b.outside_diameter_mm, "{}", a.nps);
                assert!(
                    a.wall_mm < b.wall_mm,
                    "NPS {} walls rise with schedule",
                    a.nps
                );
            } else {
                assert!(
                    a.outside_diameter_mm < b.outside_diameter_mm,
                    "{} before {}",
                    a.nps,
                    b.nps
                );
            }
        }
    }

    #[test]
    fn space_stands_for_hyphen() {
        assert_eq!(normalize_nps(" 1 1/2 "), "1-1/2");
        assert_eq!(find("1 1/2", " 40"), find("1-1/2", "40"));
        assert!(find("1-1/2", "40").is_some());
        assert_eq!(schedules_for("2 1/2"), vec!["10", "40", "80"]);
        assert!(find("2", "160").is_none());
        assert!(schedules_for("7").is_empty());
    }
}
