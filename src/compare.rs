//! The `compare` sub-command: bench measurements against the model of a design, and
//! optionally the fit of correction factors. Owns its arguments, the table for people and
//! the JSON object (`fitted`, `correlation`, `residuals`, as the project's contract fixes
//! them). The numbers come from `crate::calibrate`; `crate::cli` only dispatches here.

use std::fmt::Write as _;
use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::anyhow;
use clap::Args;
use serde_json::{Map, Value, json};

use crate::bench_data::{self, BenchData};
use crate::calibrate::{self, Calibration, Factor, Factors, QuantityResiduals};
use crate::design::{self, Design};
use crate::segment::{Segment, SegmentError};

/// Arguments of `compare`.
#[derive(Debug, Args)]
pub struct CompareArgs {
    /// Design file (.ron).
    pub file: PathBuf,
    /// Measurement file (CSV): `stroke_mm` and any of `outer_diameter_mm`,
    /// `actuator_force_n`, `slip_force_n`, `bore_mm`.
    #[arg(long, value_name = "DATA.csv")]
    pub measured: PathBuf,
    /// Factors to fit, comma-separated: any of modulus, offset, length, friction.
    #[arg(long, value_name = "FACTORS", value_parser = fit_list)]
    pub fit: Option<FitList>,
    /// Print one JSON object instead of a table.
    #[arg(long, conflicts_with = "csv")]
    pub json: bool,
    /// Print one CSV row per measured value instead of a table: quantity, line, stroke_mm,
    /// bore_mm, measured, model, residual (the model after the fit when --fit is given).
    #[arg(long)]
    pub csv: bool,
}

/// Columns of `compare --csv`, in order.
pub const CSV_COLUMNS: [&str; 7] = [
    "quantity",
    "line",
    "stroke_mm",
    "bore_mm",
    "measured",
    "model",
    "residual",
];

/// The factors named by `--fit`, each once.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct FitList(pub Vec<Factor>);

pub fn fit_list(text: &str) -> Result<FitList, String> {
    let allowed = "a comma-separated list of modulus, offset, length, friction";
    let mut out = Vec::new();
    for name in text.split(',').map(str::trim) {
        let Some(f) = Factor::from_option_name(name) else {
            return Err(format!("{name:?} is not a factor; expected {allowed}"));
        };
        if out.contains(&f) {
            return Err(format!("{name:?} is listed twice; expected {allowed}"));
        }
        out.push(f);
    }
    Ok(FitList(out))
}

/// Runs `compare`: prints the residuals (after the fit when `--fit` is given).
pub fn run(a: &CompareArgs, out: &mut impl Write) -> anyhow::Result<()> {
    let design = design::load(&a.file).map_err(|e| anyhow!(e.in_file(&a.file)))?;
    Segment::new(&design).map_err(|e| match e {
        SegmentError::Design(d) => anyhow!(d.in_file(&a.file)),
        other => anyhow!("{}: {other}", a.file.display()),
    })?;
    let data = bench_data::load(&a.measured).map_err(|e| anyhow!(e.in_file(&a.measured)))?;
    let in_data = |e: calibrate::CalibrationError| anyhow!("{}: {e}", a.measured.display());
    let nominal = Factors::nominal(&design);
    let before = calibrate::residuals(&design, &data, &nominal).map_err(in_data)?;
    let fit = match &a.fit {
        Some(list) => Some(calibrate::calibrate(&design, &data, &list.0).map_err(in_data)?),
        None => None,
    };
    let after = match &fit {
        Some(c) => Some(calibrate::residuals(&design, &data, &c.factors).map_err(in_data)?),
        None => None,
    };
    if a.json {
        let v = to_json(&before, fit.as_ref(), after.as_deref());
        serde_json::to_writer(&mut *out, &v)?;
        writeln!(out)?;
    } else if a.csv {
        writeln!(out, "{}", CSV_COLUMNS.join(","))?;
        for q in after.as_deref().unwrap_or(&before) {
            for r in &q.points {
                writeln!(
                    out,
                    "{},{},{},{},{},{},{}",
                    q.quantity.column(),
                    r.line,
                    r.stroke_mm,
                    r.bore_mm,
                    r.measured,
                    r.predicted,
                    r.residual()
                )?;
            }
        }
    } else {
        let text = table(
            &design,
            &a.measured,
            &data,
            &before,
            fit.as_ref(),
            after.as_deref(),
        );
        write!(out, "{text}")?;
    }
    Ok(())
}

fn residuals_json(all: &[QuantityResiduals]) -> Value {
    let mut m = Map::new();
    for q in all {
        let s = q.summary();
        m.insert(
            q.quantity.column().to_string(),
            json!({
                "rms": s.rms,
                "max": s.max,
                "points": s.points,
                "max_signed": s.max_signed,
                "max_line": s.max_line,
                "max_stroke_mm": s.max_stroke_mm,
            }),
        );
    }
    Value::Object(m)
}

/// The JSON object: `fitted` (empty without `--fit`), `correlation` (in the order
/// modulus, offset, length, friction, of the fitted factors), `residuals` (after the fit
/// when fitting), and beside them `correlation_order`, `residuals_nominal` and `factors`.
fn to_json(
    before: &[QuantityResiduals],
    fit: Option<&Calibration>,
    after: Option<&[QuantityResiduals]>,
) -> Value {
    let mut fitted = Map::new();
    let mut order = Vec::new();
    let mut correlation = Value::Array(Vec::new());
    let mut factors = Value::Null;
    if let Some(c) = fit {
        for f in &c.fitted {
            fitted.insert(
                f.factor.key().to_string(),
                json!({"value": f.value, "standard_error": f.standard_error}),
            );
            order.push(f.factor.key());
        }
        correlation = json!(c.correlation);
        factors = json!(c.factors);
    }
    json!({
        "fitted": fitted,
        "correlation": correlation,
        "correlation_order": order,
        "residuals": residuals_json(after.unwrap_or(before)),
        "residuals_nominal": residuals_json(before),
        "factors": factors,
    })
}

fn residual_rows(text: &mut String, all: &[QuantityResiduals]) {
    let _ = writeln!(
        text,
        "  {:<20} {:>6} {:>12} {:>12}  where (line, stroke)",
        "quantity", "points", "rms", "largest"
    );
    for q in all {
        let s = q.summary();
        let unit = q.quantity.unit();
        let _ = writeln!(
            text,
            "  {:<20} {:>6} {:>9.4} {:<2} {:>+9.4} {:<2}  line {}, {:.3} mm",
            q.quantity.column(),
            s.points,
            s.rms,
            unit,
            s.max_signed,
            unit,
            s.max_line,
            s.max_stroke_mm
        );
    }
}

fn table(
    design: &Design,
    measured: &Path,
    data: &BenchData,
    before: &[QuantityResiduals],
    fit: Option<&Calibration>,
    after: Option<&[QuantityResiduals]>,
) -> String {
    let mut t = String::new();
    let title = if design.title.is_empty() {
        "(untitled design)"
    } else {
        &design.title
    };
    let _ = writeln!(t, "{title}");
    let _ = writeln!(
        t,
        "Measured: {} ({} rows)",
        measured.display(),
        data.rows.len()
    );
    if let Some(c) = design.calibration {
        let _ = writeln!(
            t,
            "The design's calibration: modulus factor {}, stroke offset {} mm (model stroke = measured stroke + offset)",
            c.modulus_factor, c.stroke_offset_mm
        );
    }
    let _ = writeln!(t);
    let _ = writeln!(
        t,
        "Residuals, measured - model, with the design as it stands:"
    );
    residual_rows(&mut t, before);
    if let (Some(c), Some(after)) = (fit, after) {
        let _ = writeln!(t);
        let _ = writeln!(t, "Fitted factors (value, standard error):");
        for f in &c.fitted {
            let _ = writeln!(
                t,
                "  {:<20} {:>14.6} +/- {:.6}",
                f.factor.key(),
                f.value,
                f.standard_error
            );
        }
        if c.fitted.len() > 1 {
            let _ = writeln!(t);
            let _ = writeln!(t, "Correlation:");
            let _ = write!(t, "  {:<20}", "");
            for f in &c.fitted {
                let _ = write!(t, " {:>17}", f.factor.key());
            }
            let _ = writeln!(t);
            for (f, row) in c.fitted.iter().zip(&c.correlation) {
                let _ = write!(t, "  {:<20}", f.factor.key());
                for r in row {
                    let _ = write!(t, " {r:>17.3}");
                }
                let _ = writeln!(t);
            }
        }
        let _ = writeln!(t);
        let _ = writeln!(t, "Residuals with the fitted factors:");
        residual_rows(&mut t, after);
    }
    let _ = writeln!(t);
    let _ = writeln!(
        t,
        "Fitted factors describe this prototype on this bench; check them against a second test before relying on them."
    );
    let _ = writeln!(t, "{}", crate::cli::CAUTION);
    t
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fit_list_names_what_is_allowed() {
        assert_eq!(
            fit_list("modulus, friction"),
            Ok(FitList(vec![Factor::Modulus, Factor::Friction]))
        );
        let bad = fit_list("modulus,stiffness").unwrap_err();
        assert!(
            bad.contains("\"stiffness\"") && bad.contains("offset"),
            "{bad}"
        );
        assert!(fit_list("offset,offset").unwrap_err().contains("twice"));
    }
}
