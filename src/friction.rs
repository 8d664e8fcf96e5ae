//! Wall friction: a small table of typical static friction coefficients for a spring-steel
//! or stainless strip against common bore materials, each with its source.
//!
//! The table lives in `assets/friction_pairs.ron`, embedded at build time and parsed once.
//! The values are rough guides only: friction varies widely and should be measured.

use std::sync::OnceLock;

use serde::{Deserialize, Serialize};

/// The embedded friction table.
const FRICTION_RON: &str = include_str!("../assets/friction_pairs.ron");

/// One strip/bore pairing.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct FrictionPair {
    /// Kebab-case id, e.g. "steel-on-pvc".
    pub id: String,
    pub name: String,
    /// Static (breakaway) friction coefficient, dimensionless.
    pub static_coefficient: f64,
    pub source: String,
    pub note: String,
}

/// All pairs, in table order.
pub fn table() -> &'static [FrictionPair] {
    static TABLE: OnceLock<Vec<FrictionPair>> = OnceLock::new();
    TABLE.get_or_init(|| {
        ron::from_str(FRICTION_RON).expect(
            "embedded assets/friction_pairs.ron does not parse: a build defect, not user input",
        )
    })
}

/// The pair with this id, if any.
pub fn find(id: &str) -> Option<&'static FrictionPair> {
    let id = id.trim();
    table().iter().find(|p| p.id == id)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn embedded_table_parses() {
        let parsed: Vec<FrictionPair> = ron::from_str(FRICTION_RON).expect("parses");
        assert!((6..=10).contains(&parsed.len()), "{} rows", parsed.len());
        assert_eq!(table(), parsed.as_slice());
    }

    #[test]
    fn find_by_id() {
        assert_eq!(
            find("steel-on-hdpe").map(|p| p.id.as_str()),
            Some("steel-on-hdpe")
        );
        assert!(find("steel-on-ice").is_none());
    }
}
