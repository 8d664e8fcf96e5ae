//! The `scatter` sub-command: `bowgrip scatter FILE [--samples N] [--seed S]
//! [--json|--csv]`. Reads the design's `scatter` section (a file without one is refused
//! with the syntax to add), runs it, and prints the contract's JSON object, a CSV with one
//! row per check, or tables for people. The same file, samples and seed give the same
//! bytes.

use std::fmt::Write as _;
use std::io::Write;
use std::path::PathBuf;

use anyhow::{anyhow, bail};
use clap::Args;

use super::{DistributionKind, ScatterReport, Tolerance};
use crate::checks::MarginUnit;
use crate::design::{self, Design};
use crate::segment::csv_cell;
use crate::units::UnitSystem;

/// The CSV header: one row per check.
pub const CSV_COLUMNS: &str = "id,unit,failures,samples,probability_of_failure,wilson_95_low,wilson_95_high,margin_nominal,margin_p01,margin_p50,margin_p99,margin_sd_monte_carlo,margin_sd_propagation,margin_worst_case";

/// Arguments of `scatter`.
#[derive(Debug, Args)]
pub struct ScatterArgs {
    /// Design file (.ron) with a `scatter` section.
    pub file: PathBuf,
    /// Monte Carlo samples, 1 to 1,000,000 [default: the file's, else 10,000].
    #[arg(long, value_name = "N")]
    pub samples: Option<u64>,
    /// Seed of the random draws [default: the file's, else 1].
    #[arg(long, value_name = "S")]
    pub seed: Option<u64>,
    /// Print one JSON object instead of tables.
    #[arg(long, conflicts_with = "csv")]
    pub json: bool,
    /// Print CSV, one row per check, instead of tables.
    #[arg(long)]
    pub csv: bool,
}

/// Runs `scatter`: loads the design, applies the options and prints the report; the
/// tables in `units` (JSON and CSV keep the file's units, so the caller refuses inches
/// with them).
pub fn run(a: &ScatterArgs, units: UnitSystem, out: &mut impl Write) -> anyhow::Result<()> {
    let file = a.file.display();
    let design = design::load(&a.file).map_err(|e| anyhow!(e.in_file(&a.file)))?;
    let Some(mut spec) = design.scatter.clone() else {
        bail!(
            "{file}: the design has no scatter section; add one such as `scatter: Some((thickness_mm: 0.01, friction: (0.2, 0.4)))` (tolerances plus or minus, mm; modulus_percent in percent)"
        );
    };
    if let Some(n) = a.samples {
        spec.samples = n;
    }
    if let Some(s) = a.seed {
        spec.seed = s;
    }
    let report = super::run(&design, &spec).map_err(|e| anyhow!("{file}: {e}"))?;
    if a.json {
        writeln!(out, "{}", report.to_json())?;
    } else if a.csv {
        write!(out, "{}", csv(&report))?;
    } else {
        write!(out, "{}", units.prose(&tables(&design, &report, units)))?;
    }
    Ok(())
}

/// One row per check, the columns of [`CSV_COLUMNS`].
pub fn csv(r: &ScatterReport) -> String {
    let mut t = String::new();
    let _ = writeln!(t, "{CSV_COLUMNS}");
    for (c, w) in r.checks.iter().zip(&r.worst_case) {
        let _ = writeln!(
            t,
            "{},{},{},{},{},{},{},{},{},{},{},{},{},{}",
            c.id,
            c.unit.label(),
            c.failures,
            r.samples,
            c.probability_of_failure,
            c.wilson_95[0],
            c.wilson_95[1],
            csv_cell(c.centre.margin),
            csv_cell(c.margin_p01),
            csv_cell(c.margin_p50),
            csv_cell(c.margin_p99),
            csv_cell(c.margin_sd_monte_carlo),
            csv_cell(c.margin_sd_propagation),
            csv_cell(w.outcome.margin),
        );
    }
    t
}

/// A margin with its unit, as the checks write it (`+0.125 mm`, `+42.0 %`), `-` for none.
pub fn margin_text(m: Option<f64>, unit: MarginUnit) -> String {
    m.and_then(|m| unit.margin_text(m))
        .unwrap_or_else(|| "-".to_string())
}

/// A standard deviation of a margin with its unit: `0.0123 mm`, `2.13 %`.
pub fn sd_text(v: Option<f64>, unit: MarginUnit) -> String {
    match (v, unit) {
        (None, _) => "-".to_string(),
        (Some(s), MarginUnit::Mm) => format!("{s:.4} mm"),
        (Some(s), MarginUnit::Ratio) => format!("{:.2} %", 100.0 * s),
    }
}

/// A probability in percent with enough digits for small ones.
pub fn percent(p: f64) -> String {
    let pc = 100.0 * p;
    // Below what four decimals show (a Wilson bound of zero failures computes to ~1e-17).
    if pc < 5e-5 {
        "0 %".to_string()
    } else if pc < 0.1 {
        format!("{pc:.4} %")
    } else {
        format!("{pc:.2} %")
    }
}

/// A tolerance in words with its unit, as the file gives it: `thickness_mm +/-0.01 mm`.
pub fn tolerance_words(spec: &super::ScatterSpec, t: Tolerance) -> Option<String> {
    let words = match t {
        Tolerance::Thickness if spec.thickness_mm > 0.0 => {
            format!("strip thickness +/-{} mm, each strip", spec.thickness_mm)
        }
        Tolerance::Width if spec.width_mm > 0.0 => {
            format!("strip width +/-{} mm, each strip", spec.width_mm)
        }
        Tolerance::FreeLength if spec.free_length_mm > 0.0 => {
            format!("free length +/-{} mm, each strip", spec.free_length_mm)
        }
        Tolerance::MountRadius if spec.mount_radius_mm > 0.0 => {
            format!("mount radius +/-{} mm", spec.mount_radius_mm)
        }
        Tolerance::Modulus if spec.modulus_percent > 0.0 => {
            format!("Young's modulus +/-{} %", spec.modulus_percent)
        }
        Tolerance::Friction => {
            let (lo, hi) = spec.friction?;
            format!("friction {lo} to {hi}")
        }
        _ => return None,
    };
    Some(words)
}

/// How the tolerances are read, in words.
pub fn distribution_words(d: DistributionKind) -> &'static str {
    match d {
        DistributionKind::Normal3Sigma => "normal, the tolerance at three standard deviations",
        DistributionKind::Uniform => "uniform over the tolerance",
    }
}

/// The tables for people: what was drawn, per check the probability of failing and the
/// margins, the worst-case corner, and the sensitivities largest first.
fn tables(design: &Design, r: &ScatterReport, units: UnitSystem) -> String {
    let mut t = String::new();
    if !design.title.is_empty() {
        let _ = writeln!(t, "{}", design.title);
    }
    let _ = writeln!(
        t,
        "{} samples, seed {}; tolerances read as {}; the model: {}",
        r.samples,
        r.seed,
        distribution_words(r.distribution),
        super::shared::MODEL_WORDS
    );
    if let Some(spec) = &design.scatter {
        let drawn: Vec<String> = Tolerance::ALL
            .iter()
            .filter_map(|&tol| tolerance_words(spec, tol))
            .collect();
        let _ = writeln!(
            t,
            "drawn: {}",
            if drawn.is_empty() {
                "nothing (every tolerance is zero)".to_string()
            } else {
                drawn.join("; ")
            }
        );
    }
    let _ = writeln!(t);
    let _ = writeln!(
        t,
        "{:<9} {:>8} {:>24} {:>11} {:>11} {:>11} {:>11} {:>9} {:>9} {:>11}",
        "check",
        "failures",
        "P(fail) [95 % Wilson]",
        "nominal",
        "margin p01",
        "p50",
        "p99",
        "sd MC",
        "sd prop.",
        "worst case"
    );
    for (c, w) in r.checks.iter().zip(&r.worst_case) {
        let sd = |v: Option<f64>| sd_text(v, c.unit);
        let _ = writeln!(
            t,
            "{:<9} {:>8} {:>24} {:>11} {:>11} {:>11} {:>11} {:>9} {:>9} {:>11}",
            c.id,
            c.failures,
            format!(
                "{} [{}, {}]",
                percent(c.probability_of_failure),
                percent(c.wilson_95[0]),
                percent(c.wilson_95[1])
            ),
            margin_text(c.centre.margin, c.unit),
            margin_text(c.margin_p01, c.unit),
            margin_text(c.margin_p50, c.unit),
            margin_text(c.margin_p99, c.unit),
            sd(c.margin_sd_monte_carlo),
            sd(c.margin_sd_propagation),
            margin_text(w.outcome.margin, c.unit),
        );
    }
    let _ = writeln!(
        t,
        "margins: clearance or stroke in {}, or capacity over demand minus one in per cent; sd in the margin's unit (MC: Monte Carlo, JCGM 101; prop.: law of propagation, JCGM 100)",
        if units.is_metric() { "mm" } else { "inches" }
    );
    let _ = writeln!(t);
    let _ = writeln!(
        t,
        "sensitivities (each tolerance alone at the ends of its range, every strip together), largest effect first:"
    );
    for c in &r.checks {
        for s in sensitivities_of(r, c.id) {
            let _ = writeln!(
                t,
                "  {:<9} {:<16} low end {:>11}  high end {:>11}",
                s.id,
                s.input,
                margin_text(s.margin_low, c.unit),
                margin_text(s.margin_high, c.unit)
            );
        }
    }
    let _ = writeln!(t, "{}", crate::cli::CAUTION);
    t
}

/// How far an input alone moves a check's margin from its centre value: the larger of
/// its two ends (`0` when a margin is missing).
pub fn effect(r: &ScatterReport, s: &super::Sensitivity) -> f64 {
    let centre = r
        .checks
        .iter()
        .find(|c| c.id == s.id)
        .and_then(|c| c.centre.margin);
    match (s.margin_low, s.margin_high, centre) {
        (Some(lo), Some(hi), Some(c)) => (lo - c).abs().max((hi - c).abs()),
        _ => 0.0,
    }
}

/// The sensitivities of check `id` that move its margin, largest effect first (ties in
/// the file's order).
pub fn sensitivities_of<'r>(r: &'r ScatterReport, id: &str) -> Vec<&'r super::Sensitivity> {
    let mut out: Vec<&super::Sensitivity> = r
        .sensitivities
        .iter()
        .filter(|s| s.id == id && effect(r, s) > 0.0)
        .collect();
    out.sort_by(|a, b| effect(r, b).total_cmp(&effect(r, a)));
    out
}
