//! Strip materials: the library of spring-strip grades (stiffness, strengths, endurance
//! strength, each value with its source) and user-entered custom grades.
//!
//! The library lives in `assets/materials.ron`, is embedded in the binary at build time and
//! parsed once, on first use. Units are SI: GPa for the modulus, MPa for strengths.

use std::sync::OnceLock;

use serde::{Deserialize, Serialize};

/// The embedded grade table.
const MATERIALS_RON: &str = include_str!("../assets/materials.ron");

/// Source string given to every value of a [`custom`] material.
pub const USER_ENTRY: &str = "user entry";

/// One strip grade.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Material {
    /// Kebab-case id used in design files, e.g. `Grade("ss301-full-hard")`.
    pub id: String,
    /// Human name, e.g. "AISI 301 stainless strip, full hard".
    pub name: String,
    pub youngs_modulus_gpa: f64,
    pub poisson_ratio: f64,
    pub tensile_strength_mpa: f64,
    pub yield_strength_mpa: f64,
    /// Fully reversed endurance strength at 10^6 cycles and beyond.
    pub endurance_limit_mpa: f64,
    /// Where each value comes from, in full: the standard or handbook, and "from memory"
    /// where a value is recalled and not checked against a page. Kept in the data file.
    pub sources: MaterialSources,
    /// What the app and the sheet print beside each value: the kind of value (typical
    /// minimum of a standard, typical value, estimate) and what to confirm it against.
    pub basis: MaterialSources,
    pub note: String,
}

/// Where each value of a [`Material`] comes from.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct MaterialSources {
    pub modulus: String,
    pub poisson: String,
    pub tensile: String,
    pub yield_strength: String,
    pub endurance: String,
}

/// All library grades, in table order.
pub fn library() -> &'static [Material] {
    static LIBRARY: OnceLock<Vec<Material>> = OnceLock::new();
    LIBRARY.get_or_init(|| {
        ron::from_str(MATERIALS_RON)
            .expect("embedded assets/materials.ron does not parse: a build defect, not user input")
    })
}

/// The library grade with this id, if any.
pub fn find(id: &str) -> Option<&'static Material> {
    let id = id.trim();
    library().iter().find(|m| m.id == id)
}

/// The ids of all library grades, in table order.
pub fn ids() -> Vec<&'static str> {
    library().iter().map(|m| m.id.as_str()).collect()
}

/// A material entered by the user. Every source reads [`USER_ENTRY`]; the values are taken
/// as given (range checks belong to the design loader).
pub fn custom(
    name: &str,
    youngs_modulus_gpa: f64,
    poisson_ratio: f64,
    tensile_strength_mpa: f64,
    yield_strength_mpa: f64,
    endurance_limit_mpa: f64,
) -> Material {
    let source = || USER_ENTRY.to_string();
    Material {
        id: "custom".to_string(),
        name: name.to_string(),
        youngs_modulus_gpa,
        poisson_ratio,
        tensile_strength_mpa,
        yield_strength_mpa,
        endurance_limit_mpa,
        sources: MaterialSources {
            modulus: source(),
            poisson: source(),
            tensile: source(),
            yield_strength: source(),
            endurance: source(),
        },
        basis: MaterialSources {
            modulus: source(),
            poisson: source(),
            tensile: source(),
            yield_strength: source(),
            endurance: source(),
        },
        note: "Values entered by the user.".to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn embedded_table_parses_and_is_not_empty() {
        let parsed: Vec<Material> = ron::from_str(MATERIALS_RON).expect("materials.ron parses");
        assert!(parsed.len() >= 5, "{} grades", parsed.len());
        assert_eq!(library(), parsed.as_slice());
    }

    /// What the app and the sheet print reads as a checker expects: never "from memory",
    /// and every strength says what to confirm it against.
    #[test]
    fn printed_basis_says_what_to_confirm() {
        for m in library() {
            let b = &m.basis;
            for (what, text) in [
                ("modulus", &b.modulus),
                ("poisson", &b.poisson),
                ("tensile", &b.tensile),
                ("yield", &b.yield_strength),
                ("endurance", &b.endurance),
            ] {
                assert!(!text.is_empty(), "{} {what}: empty", m.id);
                assert!(!text.contains("memory"), "{} {what}: {text}", m.id);
            }
            for text in [&b.tensile, &b.yield_strength, &b.endurance] {
                assert!(text.contains("confirm"), "{}: {text}", m.id);
            }
        }
    }

    #[test]
    fn find_trims_and_rejects_unknown_ids() {
        assert_eq!(
            find(" ss301-full-hard ").map(|m| m.id.as_str()),
            Some("ss301-full-hard")
        );
        assert!(find("ss301-extra-hard").is_none());
    }

    #[test]
    fn custom_marks_every_source_as_user_entry() {
        let m = custom("my strip", 200.0, 0.3, 1500.0, 1300.0, 500.0);
        assert_eq!(m.name, "my strip");
        assert_eq!(m.tensile_strength_mpa, 1500.0);
        for s in [&m.sources, &m.basis] {
            for source in [
                &s.modulus,
                &s.poisson,
                &s.tensile,
                &s.yield_strength,
                &s.endurance,
            ] {
                assert_eq!(source, USER_ENTRY);
            }
        }
    }
}
