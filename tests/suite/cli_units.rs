//! `--units`: inch output of the command line against the metric output, the metric
//! output unchanged, and `--json` refused with inches.
//!
//! The conversion factors are the exact definitions of NIST Special Publication 811
//! (2008), Appendix B: 1 in = 25.4 mm, 1 lbf = 4.4482216152605 N, and the ksi derived
//! from them (1000 lbf / in^2 = 6.894757293168361 MPa). They are typed here again, apart
//! from `bowgrip::units`, so that a wrong constant there fails these tests.

use assert_cmd::Command;
use bowgrip::design::{self, Design};
use tempfile::TempDir;

/// NIST SP 811 (2008), Appendix B: inch to millimetre, exact.
const MM_PER_IN: f64 = 25.4;
/// NIST SP 811 (2008), Appendix B: pound-force to newton (exact, from 0.45359237 kg and
/// 9.80665 m/s^2).
const N_PER_LBF: f64 = 4.4482216152605;
/// NIST SP 811 (2008), Appendix B: ksi to MPa, 6.894757 (here to full precision,
/// 1000 x 4.4482216152605 / 25.4^2).
const MPA_PER_KSI: f64 = 6.894757293168361;

fn run(args: &[&str]) -> (Option<i32>, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_bowgrip"))
        .args(args)
        .output()
        .expect("run bowgrip");
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn demo_file(dir: &TempDir) -> String {
    let path = dir.path().join("demo.ron");
    std::fs::write(&path, design::to_ron(&Design::default()).expect("RON")).expect("write");
    path.to_str().expect("utf-8 path").to_string()
}

/// The factor that takes an inch-system column back to its metric one, from the metric
/// column's unit suffix (the project's CSV naming: `_mm`, `_n`, `_mpa`).
fn factor(metric_column: &str) -> f64 {
    if metric_column.ends_with("_mm") {
        MM_PER_IN
    } else if metric_column.ends_with("_mpa") {
        MPA_PER_KSI
    } else if metric_column.ends_with("_n") {
        N_PER_LBF
    } else {
        1.0
    }
}

/// Every cell of the inch CSV times its factor gives the metric cell (to 1e-12 relative:
/// both print full precision, so only the division's rounding separates them), and the
/// inch column names carry the inch units.
fn same_table_in_inches(metric: &str, inch: &str, renamed: &[(&str, &str)]) {
    let m: Vec<Vec<&str>> = metric.lines().map(|l| l.split(',').collect()).collect();
    let i: Vec<Vec<&str>> = inch.lines().map(|l| l.split(',').collect()).collect();
    assert_eq!(m.len(), i.len());
    assert!(m.len() > 2, "{metric}");
    for (from, to) in renamed {
        let k = m[0].iter().position(|c| c == from).expect("metric column");
        assert_eq!(i[0][k], *to, "column {from}");
    }
    for (rm, ri) in m[1..].iter().zip(&i[1..]) {
        assert_eq!(rm.len(), ri.len());
        for ((col, a), b) in m[0].iter().zip(rm).zip(ri) {
            match (a.parse::<f64>(), b.parse::<f64>()) {
                (Ok(a), Ok(b)) => {
                    let back = b * factor(col);
                    assert!(
                        (back - a).abs() <= 1e-12 * a.abs().max(1e-300),
                        "{col}: {b} x {} = {back} vs {a}",
                        factor(col)
                    );
                }
                _ => assert_eq!(a, b, "{col}"),
            }
        }
    }
}

#[test]
fn sweep_and_bores_csv_in_inches_are_the_metric_values_converted() {
    let dir = tempfile::tempdir().expect("tempdir");
    let f = demo_file(&dir);
    let (code, metric, _) = run(&["sweep", &f, "--points", "9", "--csv"]);
    assert_eq!(code, Some(0));
    let (code, inch, err) = run(&["sweep", &f, "--points", "9", "--csv", "--units", "in"]);
    assert_eq!(code, Some(0), "{err}");
    same_table_in_inches(
        &metric,
        &inch,
        &[
            ("stroke_mm", "stroke_in"),
            ("axial_force_per_strip_n", "axial_force_per_strip_lbf"),
            ("max_stress_mpa", "max_stress_ksi"),
            ("static_safety_factor", "static_safety_factor"),
        ],
    );
    let (_, metric, _) = run(&["bores", &f, "--points", "5", "--csv"]);
    // Before the sub-command as well as after it.
    let (code, inch, err) = run(&["--units", "in", "bores", &f, "--points", "5", "--csv"]);
    assert_eq!(code, Some(0), "{err}");
    same_table_in_inches(&metric, &inch, &[("bore_mm", "bore_in")]);
    let (_, metric, _) = run(&["point", &f, "--csv"]);
    let (_, inch, _) = run(&["point", &f, "--csv", "--units=in"]);
    same_table_in_inches(&metric, &inch, &[("gap_mm", "gap_in")]);
}

#[test]
fn metric_is_the_output_without_the_option_byte_for_byte() {
    // The contract: existing outputs do not change.
    let dir = tempfile::tempdir().expect("tempdir");
    let f = demo_file(&dir);
    for args in [
        vec!["point", &f],
        vec!["point", &f, "--json"],
        vec!["sweep", &f, "--points", "5"],
        vec!["sweep", &f, "--points", "5", "--csv"],
        vec!["bores", &f, "--points", "5"],
        vec!["check", &f],
        vec!["check", &f, "--csv"],
    ] {
        let plain = run(&args);
        let mut with = args.clone();
        with.extend(["--units", "mm"]);
        assert_eq!(plain, run(&with), "{args:?}");
    }
}

#[test]
fn tables_in_inches_say_inches() {
    let dir = tempfile::tempdir().expect("tempdir");
    let f = demo_file(&dir);
    let (code, text, _) = run(&["point", &f, "--units", "in", "--stroke-mm", "3"]);
    assert_eq!(code, Some(0));
    // The demo's nominal bore in inches: its metric row divided by 25.4 (NIST SP 811,
    // Appendix B), printed to the same 3 decimals.
    let (_, metric, _) = run(&["point", &f, "--stroke-mm", "3"]);
    let bore_mm: f64 = metric
        .lines()
        .find(|l| l.starts_with("bore"))
        .and_then(|l| l.split_whitespace().rev().nth(1))
        .and_then(|v| v.parse().ok())
        .expect("bore row");
    let bore_line = text
        .lines()
        .find(|l| l.starts_with("bore"))
        .expect("bore row");
    assert!(
        bore_line.ends_with(&format!("{:.3} in", bore_mm / MM_PER_IN)),
        "{bore_line}"
    );
    assert!(text.contains(" lbf\n") && text.contains(" ksi\n"), "{text}");
    assert!(
        !text.contains(" mm\n") && !text.contains(" MPa\n"),
        "{text}"
    );
    let (code, text, _) = run(&["check", &f, "--units", "in"]);
    assert!(code == Some(0) || code == Some(1));
    // Every margin of a length check is in inches; no number is left in mm or MPa (the
    // first line is the design's own title, as the user wrote it).
    assert!(text.contains(" in  "), "{text}");
    for unit in [" mm", " MPa", " N "] {
        let hit = text
            .lines()
            .skip(1)
            .find(|l| l.contains(unit) && !l.starts_with("Caution"));
        assert!(hit.is_none(), "{unit}: {hit:?}");
    }
}

#[test]
fn json_with_inches_is_refused_with_the_reason() {
    let dir = tempfile::tempdir().expect("tempdir");
    let f = demo_file(&dir);
    for sub in ["point", "sweep", "bores", "check"] {
        let (code, out, err) = run(&[sub, &f, "--json", "--units", "in"]);
        // Bad input: exit 2 and one line on stderr (the contract).
        assert_eq!(code, Some(2), "{sub}");
        assert!(out.is_empty());
        assert_eq!(err.lines().count(), 1, "{err}");
        assert!(err.contains("JSON") && err.contains("--csv"), "{err}");
    }
    // Sub-commands that keep the file's own units refuse inches too, in one line.
    let (code, _, err) = run(&[
        "map",
        &f,
        "--x",
        "strip.thickness_mm:0.2:0.3:2",
        "--y",
        "strip.width_mm:10:12:2",
        "--csv",
        "--units",
        "in",
    ]);
    assert_eq!(code, Some(2));
    assert_eq!(err.lines().count(), 1, "{err}");
    // Shell completions offer the option (clap_complete reads the command definition).
    let (_, bash, _) = run(&["completions", "bash"]);
    assert!(bash.contains("--units"));
}

/// `scatter --units in` prints its tables in inches: every clearance or stroke margin is the
/// metric one over 25.4 (NIST SP 811, Appendix B) to the printed digits, ratio margins
/// unchanged; with `--json` or `--csv` it is refused (exit 2), since those keep the file's
/// units. A small equal-strip scatter keeps the run short.
#[test]
fn scatter_tables_follow_the_inch_choice() {
    let dir = TempDir::new().expect("temp dir");
    let d = Design {
        scatter: Some(bowgrip::scatter::ScatterSpec {
            modulus_percent: 3.0,
            samples: 50,
            ..Default::default()
        }),
        ..Design::default()
    };
    let path = dir.path().join("scatter.ron");
    std::fs::write(&path, design::to_ron(&d).expect("RON")).expect("write");
    let file = path.to_str().expect("utf-8 path");
    let (code_mm, mm, _) = run(&["scatter", file]);
    let (code_in, inch, err) = run(&["scatter", file, "--units", "in"]);
    assert_eq!((code_mm, code_in), (Some(0), Some(0)), "{err}");
    let row = |text: &str, id: &str| -> Vec<String> {
        text.lines()
            .find(|l| l.starts_with(&format!("{id} ")))
            .unwrap_or_else(|| panic!("no {id} row in {text}"))
            .split_whitespace()
            .map(str::to_string)
            .collect()
    };
    // `fit  0  0 % [0 %, 7.1 %]  +12.700 mm ...`: the nominal margin follows the interval.
    let nominal = |cells: &[String], unit: &str| -> f64 {
        let k = cells.iter().position(|c| c == unit).expect("a unit cell");
        cells[k - 1].parse().expect("a number")
    };
    let (fit_mm, fit_in) = (row(&mm, "fit"), row(&inch, "fit"));
    let (a, b) = (nominal(&fit_mm, "mm"), nominal(&fit_in, "in"));
    assert!((b - a / MM_PER_IN).abs() <= 0.5e-4, "{a} mm vs {b} in");
    assert_eq!(row(&mm, "hold")[..6], row(&inch, "hold")[..6]);
    assert!(inch.contains("clearance or stroke in inches"), "{inch}");
    assert!(!inch.contains(" mm "), "{inch}");
    for flag in ["--json", "--csv"] {
        let (code, out, err) = run(&["scatter", file, "--units", "in", flag]);
        assert_eq!(code, Some(2), "{flag}: {out}");
        assert!(err.contains("keep the design file's units"), "{err}");
    }
}
