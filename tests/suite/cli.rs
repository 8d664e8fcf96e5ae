//! The `bowgrip` binary run for real: exit codes, one-line errors on stderr, data only on
//! stdout, the JSON and CSV shapes, and a closed pipe.
//!
//! What each output must look like is fixed by the command-line issue and the project's
//! contract (exit 2 for bad input, one JSON object with the twelve state keys, the `bores`
//! columns, empty cells for missing values); the comments name the rule each test holds.
//! Numeric references are named where they are used.

use std::f64::consts::PI;
use std::io::{BufRead, BufReader};
use std::path::{Path, PathBuf};
use std::process::{Command as StdCommand, Stdio};

use assert_cmd::Command;
use bowgrip::design::{self, Actuator, Design, MaterialChoice, Stiffness};
use tempfile::TempDir;

/// The twelve state names the outside checks read, in the `sweep` column order.
const STATE_KEYS: [&str; 12] = [
    "stroke_mm",
    "phase",
    "axial_force_per_strip_n",
    "contact_force_per_strip_n",
    "actuator_force_n",
    "radial_force_n",
    "holding_force_n",
    "outer_diameter_mm",
    "flat_length_mm",
    "max_stress_mpa",
    "first_contact_stroke_mm",
    "line_contact_stroke_mm",
];

const BORES_COLUMNS: &str = "bore_mm,first_contact_stroke_mm,holding_stroke_mm,\
stress_limit_stroke_mm,line_contact_stroke_mm,limit_stroke_mm";

fn bowgrip() -> Command {
    Command::new(env!("CARGO_BIN_EXE_bowgrip"))
}

/// A scratch directory with design files in it.
struct Scratch {
    dir: TempDir,
}

impl Scratch {
    fn new() -> Scratch {
        Scratch {
            dir: tempfile::tempdir().expect("temporary directory"),
        }
    }

    fn write(&self, name: &str, text: &str) -> PathBuf {
        let path = self.dir.path().join(name);
        std::fs::write(&path, text).expect("write design file");
        path
    }

    fn design(&self, name: &str, design: &Design) -> PathBuf {
        self.write(name, &design::to_ron(design).expect("writes RON"))
    }
}

/// What a finished run printed.
struct Run {
    code: Option<i32>,
    stdout: String,
    stderr: String,
}

fn run(args: &[&str]) -> Run {
    let out = bowgrip().args(args).output().expect("run bowgrip");
    Run {
        code: out.status.code(),
        stdout: String::from_utf8_lossy(&out.stdout).into_owned(),
        stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
    }
}

fn s(p: &Path) -> &str {
    p.to_str().expect("utf-8 temp path")
}

/// Bad input: exit 2, exactly one line on stderr, nothing on stdout (issue: "Exit 2 with
/// ONE line on stderr on bad input"; "stdout for data, stderr for messages").
fn assert_refused(args: &[&str], expect_in_message: &[&str]) -> String {
    let r = run(args);
    assert_eq!(r.code, Some(2), "{args:?}: stderr {:?}", r.stderr);
    assert!(r.stdout.is_empty(), "{args:?}: stdout {:?}", r.stdout);
    assert_eq!(
        r.stderr.lines().count(),
        1,
        "{args:?}: stderr {:?}",
        r.stderr
    );
    assert!(!r.stderr.contains("panicked"), "{}", r.stderr);
    for needle in expect_in_message {
        assert!(
            r.stderr.contains(needle),
            "{args:?}: {:?} lacks {needle:?}",
            r.stderr
        );
    }
    r.stderr
}

fn json(text: &str) -> serde_json::Value {
    serde_json::from_str(text).unwrap_or_else(|e| panic!("not one JSON value ({e}): {text}"))
}

fn num(v: &serde_json::Value, key: &str) -> f64 {
    v[key]
        .as_f64()
        .unwrap_or_else(|| panic!("{key} is not a number in {v}"))
}

/// Smallest bore of the default design that the relaxed strips do not fit (gap <= 0):
/// well under the 12 mm wide strips on a 28 mm mount radius.
const NO_FIT_BORE_MM: &str = "50";

#[test]
fn design_file_errors_exit_2_with_one_line() {
    let tmp = Scratch::new();
    let missing = tmp.dir.path().join("absent.ron");
    assert_refused(&["point", s(&missing), "--stroke-mm", "1"], &["absent.ron"]);
    assert_refused(&["check", s(&missing)], &["absent.ron"]);

    // Malformed RON: the message carries FILE:LINE:COLUMN (issue: DesignError with the file
    // name). The stray comma is on line 3.
    let bad = tmp.write(
        "bad.ron",
        "Design(\n    format: 1,\n    strip: (count: 8,,\n",
    );
    let msg = assert_refused(&["point", s(&bad), "--stroke-mm", "1"], &["bad.ron:3:"]);
    let after = msg.split("bad.ron:3:").nth(1).unwrap_or("");
    assert!(
        after.chars().next().is_some_and(|c| c.is_ascii_digit()),
        "no column in {msg:?}"
    );

    // Out of range: what, where (line:column) and the allowed range.
    let mut thick = Design::default();
    thick.strip.thickness_mm = 9.0;
    let thick = tmp.design("thick.ron", &thick);
    assert_refused(
        &["check", s(&thick)],
        &[
            "thick.ron:",
            "strip.thickness_mm",
            "allowed range",
            "0.02",
            "5",
        ],
    );

    // Unknown grade.
    let mut grade = Design::default();
    grade.strip.material = MaterialChoice::Grade("no-such-steel".to_string());
    let grade = tmp.design("grade.ron", &grade);
    assert_refused(
        &["sweep", s(&grade), "--csv"],
        &["grade.ron", "no-such-steel", "ss301-full-hard"],
    );
    assert_refused(
        &[
            "bores",
            s(&grade),
            "--from-mm",
            "60",
            "--to-mm",
            "70",
            "--points",
            "3",
        ],
        &["no-such-steel"],
    );
}

#[test]
fn a_bore_the_relaxed_segment_does_not_fit_stops_point_and_sweep() {
    // Contract: gap <= 0 has no state, so point and sweep exit 2 with that reason.
    let tmp = Scratch::new();
    let file = tmp.design("d.ron", &Design::default());
    let f = s(&file);
    assert_refused(
        &[
            "point",
            f,
            "--stroke-mm",
            "1",
            "--bore-mm",
            NO_FIT_BORE_MM,
            "--json",
        ],
        &["do not fit", "50 mm"],
    );
    assert_refused(
        &["sweep", f, "--bore-mm", NO_FIT_BORE_MM, "--csv"],
        &["do not fit"],
    );
    assert_refused(&["sweep", f, "--bore-mm", NO_FIT_BORE_MM], &["do not fit"]);
}

#[test]
fn an_unreachable_bore_still_runs() {
    // Contract: a bore out of reach loads and runs; point exits 0 and the bore-level keys
    // are null where no first or line contact exists.
    let tmp = Scratch::new();
    let file = tmp.design("d.ron", &Design::default());
    let r = run(&[
        "point",
        s(&file),
        "--stroke-mm",
        "1",
        "--bore-mm",
        "200",
        "--json",
    ]);
    assert_eq!(r.code, Some(0), "{}", r.stderr);
    let v = json(&r.stdout);
    assert_eq!(v["phase"], "free");
    assert!(v["first_contact_stroke_mm"].is_null());
    assert!(v["line_contact_stroke_mm"].is_null());
}

#[test]
fn bad_numbers_on_the_command_line_exit_2() {
    let tmp = Scratch::new();
    let file = tmp.design("d.ron", &Design::default());
    let f = s(&file);
    // Issue: NaN, a negative stroke and --points 1 are refused with what, where and the
    // allowed range.
    assert_refused(
        &["point", f, "--stroke-mm", "NaN"],
        &["--stroke-mm", "NaN", ">= 0"],
    );
    assert_refused(
        &["point", f, "--stroke-mm", "-1"],
        &["--stroke-mm", "-1", ">= 0"],
    );
    assert_refused(
        &["point", f, "--stroke-mm", "inf"],
        &["--stroke-mm", "finite"],
    );
    assert_refused(
        &["point", f, "--stroke-mm", "two"],
        &["--stroke-mm", "not a number"],
    );
    assert_refused(
        &["point", f, "--stroke-mm", "1", "--bore-mm", "-70"],
        &["--bore-mm", "> 0"],
    );
    assert_refused(&["sweep", f, "--points", "1"], &["--points", "from 2"]);
    assert_refused(
        &[
            "bores",
            f,
            "--from-mm",
            "60",
            "--to-mm",
            "70",
            "--points",
            "1",
            "--csv",
        ],
        &["--points", "from 2"],
    );
    assert_refused(
        &[
            "bores",
            f,
            "--from-mm",
            "NaN",
            "--to-mm",
            "70",
            "--points",
            "5",
        ],
        &["--from-mm", "NaN", "> 0"],
    );
    assert_refused(&["sheet", f, "-o", "x.pdf", "--paper", "a3"], &["--paper"]);
}

#[test]
fn point_json_has_the_state_keys_and_the_phase_rules() {
    let tmp = Scratch::new();
    let file = tmp.design("d.ron", &Design::default());
    let f = s(&file);

    // Free phase (well before first contact): contact, radial, holding and flat are 0.0
    // (contract, `point --json`).
    let r = run(&["point", f, "--stroke-mm", "0.1", "--json"]);
    assert_eq!(r.code, Some(0), "{}", r.stderr);
    assert_eq!(r.stdout.lines().count(), 1, "one JSON object: {}", r.stdout);
    let v = json(&r.stdout);
    for key in STATE_KEYS {
        assert!(v.get(key).is_some(), "missing {key} in {v}");
    }
    assert_eq!(v["phase"], "free");
    for key in [
        "contact_force_per_strip_n",
        "radial_force_n",
        "holding_force_n",
        "flat_length_mm",
    ] {
        assert_eq!(num(&v, key), 0.0, "{key}");
    }
    assert!(num(&v, "axial_force_per_strip_n") > 0.0);
    let first = num(&v, "first_contact_stroke_mm");
    let line = num(&v, "line_contact_stroke_mm");
    assert!(0.1 < first && first < line, "first {first}, line {line}");

    // Beyond the limit: force and stress keys null, bore-level keys still numbers.
    let r = run(&["point", f, "--stroke-mm", "80", "--json"]);
    assert_eq!(r.code, Some(0), "{}", r.stderr);
    let v = json(&r.stdout);
    assert_eq!(v["phase"], "beyond-limit");
    for key in &STATE_KEYS[2..10] {
        assert!(v[*key].is_null(), "{key} should be null: {v}");
    }
    assert_eq!(num(&v, "first_contact_stroke_mm"), first);
    assert_eq!(num(&v, "line_contact_stroke_mm"), line);
    assert!(
        v["reason"].as_str().is_some_and(|r| r.contains("limit")),
        "{v}"
    );

    // Without --json: a table with units.
    let r = run(&["point", f, "--stroke-mm", "0.1"]);
    assert_eq!(r.code, Some(0));
    assert!(r.stdout.contains("phase") && r.stdout.contains(" N") && r.stdout.contains("MPa"));
}

/// A flat strip in plate bending with data given in the test: 200 GPa, nu 0.3.
fn plate_strip_design() -> Design {
    let mut d = Design::default();
    d.strip.material = MaterialChoice::Custom {
        name: "test steel".to_string(),
        youngs_modulus_gpa: 200.0,
        poisson_ratio: 0.3,
        tensile_strength_mpa: 1500.0,
        yield_strength_mpa: 1200.0,
        endurance_limit_mpa: 600.0,
    };
    d.strip.stiffness = Stiffness::Plate;
    d
}

#[test]
fn sweep_csv_header_rows_and_the_euler_load_at_rest() {
    let tmp = Scratch::new();
    let d = plate_strip_design();
    let file = tmp.design("d.ron", &d);
    let f = s(&file);
    let r = run(&["sweep", f, "--points", "7", "--csv"]);
    assert_eq!(r.code, Some(0), "{}", r.stderr);
    let lines: Vec<&str> = r.stdout.lines().collect();
    assert_eq!(lines.len(), 1 + 7, "header and seven rows");
    let header: Vec<&str> = lines[0].split(',').collect();
    assert_eq!(
        &header[..12],
        &STATE_KEYS[..],
        "the twelve names first, in order"
    );
    let cols = header.len();
    for row in &lines[1..] {
        assert_eq!(row.split(',').count(), cols, "{row}");
    }
    let first: Vec<&str> = lines[1].split(',').collect();
    assert_eq!(first[0], "0");
    assert_eq!(first[1], "free");

    // At rest the strip carries the clamped Euler load 4 pi^2 B / L^2 (Timoshenko & Gere,
    // Theory of Elastic Stability, 1961, chapter 2), with B = E b t^3 / (12 (1 - nu^2)).
    let (b, t, l) = (
        d.strip.width_mm * 1e-3,
        d.strip.thickness_mm * 1e-3,
        d.strip.free_length_mm * 1e-3,
    );
    let bending = 200e9 / (1.0 - 0.09) * b * t.powi(3) / 12.0;
    let euler_n = 4.0 * PI * PI * bending / (l * l);
    let axial: f64 = first[2].parse().expect("axial force cell");
    assert!((axial / euler_n - 1.0).abs() < 1e-9, "{axial} vs {euler_n}");

    // Full precision: the CSV cell is the same f64 as the JSON number of `point`.
    let r = run(&["point", f, "--stroke-mm", "0", "--json"]);
    assert_eq!(num(&json(&r.stdout), "axial_force_per_strip_n"), axial);

    // The last row is at the end of the sweep: the smaller of the model's limit and the
    // actuator's maximum stroke (issue: strokes 0 ..= min(limit, actuator max stroke)).
    let last: Vec<&str> = lines[7].split(',').collect();
    let last_stroke: f64 = last[0].parse().expect("stroke cell");
    let limit_col = header
        .iter()
        .position(|h| *h == "limit_stroke_mm")
        .expect("limit column");
    let limit: f64 = last[limit_col].parse().expect("limit cell");
    let Actuator::LeadScrew {
        lead_mm, max_turns, ..
    } = d.actuator
    else {
        panic!("the default design uses a lead screw");
    };
    assert_eq!(last_stroke, limit.min(lead_mm * max_turns));

    // Default point count and the human table.
    let r = run(&["sweep", f, "--csv"]);
    assert_eq!(r.stdout.lines().count(), 1 + 200);
    let r = run(&["sweep", f, "--points", "3"]);
    assert_eq!(r.code, Some(0));
    assert!(r.stdout.contains("stroke") && r.stdout.contains("MPa"));
}

#[test]
fn bores_csv_columns_rows_and_empty_cells() {
    let tmp = Scratch::new();
    let file = tmp.design("d.ron", &Design::default());
    let r = run(&[
        "bores",
        s(&file),
        "--from-mm",
        NO_FIT_BORE_MM,
        "--to-mm",
        "80",
        "--points",
        "4",
        "--csv",
    ]);
    assert_eq!(r.code, Some(0), "{}", r.stderr);
    let lines: Vec<&str> = r.stdout.lines().collect();
    assert_eq!(lines[0], BORES_COLUMNS);
    assert_eq!(lines.len(), 1 + 4);
    // 50, 60, 70, 80 mm: ends exact, equally spaced.
    let bores: Vec<f64> = lines[1..]
        .iter()
        .map(|l| {
            l.split(',')
                .next()
                .unwrap_or("")
                .parse()
                .expect("bore cell")
        })
        .collect();
    assert_eq!(bores, [50.0, 60.0, 70.0, 80.0]);
    // The relaxed segment does not fit 50 mm: every stroke cell empty.
    assert_eq!(lines[1], "50,,,,,");
    // At the 70 mm nominal bore every quantity exists and in order of stroke.
    let cells: Vec<f64> = lines[3]
        .split(',')
        .map(|c| c.parse().expect("cell"))
        .collect();
    assert_eq!(cells.len(), 6);
    assert!(
        cells[1] < cells[4] && cells[4] < cells[5],
        "first < line < limit: {cells:?}"
    );
    let r = run(&[
        "bores",
        s(&file),
        "--from-mm",
        "69",
        "--to-mm",
        "71",
        "--points",
        "3",
    ]);
    assert_eq!(r.code, Some(0));
    assert!(r.stdout.contains("bore mm"));
}

#[test]
fn check_exit_status_follows_the_verdict() {
    let tmp = Scratch::new();
    // The built-in default design passes every check.
    let good = tmp.design("good.ron", &Design::default());
    let r = run(&["check", s(&good)]);
    assert_eq!(r.code, Some(0), "{}", r.stdout);
    assert!(r.stdout.contains("fit") && r.stdout.contains("hold"));

    let r = run(&["check", s(&good), "--json"]);
    assert_eq!(r.code, Some(0));
    let v = json(&r.stdout);
    assert_eq!(v["pass"], true);
    let checks = v["checks"].as_array().expect("checks array");
    assert_eq!(checks.len(), 8);
    for c in checks {
        assert!(c["margin"].as_f64().is_some_and(|m| m >= 0.0), "{c}");
        assert!(c["reason"].as_str().is_some_and(|r| !r.is_empty()), "{c}");
    }

    assert_eq!(v["geometry_cautions"].as_array().map(Vec::len), Some(0));

    // Holding far more than the strips can: fails `hold`, exit 1, still a report.
    let mut heavy = Design::default();
    heavy.duty.holding_force_n = 5000.0;
    let heavy = tmp.design("heavy.ron", &heavy);
    let r = run(&["check", s(&heavy), "--json"]);
    assert_eq!(r.code, Some(1), "{}", r.stderr);
    let v = json(&r.stdout);
    assert_eq!(v["pass"], false);
    let hold = v["checks"]
        .as_array()
        .and_then(|a| a.iter().find(|c| c["id"] == "hold"))
        .expect("hold check");
    assert_eq!(hold["pass"], false);

    // Plates larger than the bore: the fit check fails (contract: `check` reports fit
    // failed, exit 1), not an input error.
    let fat = Design {
        end_plate_diameter_mm: 75.0,
        mount_radius_mm: 36.0,
        ..Design::default()
    };
    let fat = tmp.design("fat.ron", &fat);
    let r = run(&["check", s(&fat)]);
    assert_eq!(r.code, Some(1), "{}", r.stderr);
    assert!(
        r.stdout
            .lines()
            .any(|l| l.starts_with("fit") && l.contains("FAIL")),
        "{}",
        r.stdout
    );
}

#[test]
fn the_sheet_never_overwrites_the_design_file() {
    // Project rule: nothing the user made is ever lost.
    let tmp = Scratch::new();
    let file = tmp.design("d.ron", &Design::default());
    let before = std::fs::read(&file).expect("read design");
    assert_refused(&["sheet", s(&file), "-o", s(&file)], &["design file"]);
    assert_eq!(std::fs::read(&file).expect("read design"), before);
}

#[test]
fn the_sheet_is_written_whole_and_its_place_reported() {
    // Issue: the PDF bytes are written atomically (temporary file and rename) and stderr
    // says where they went. A PDF file begins with "%PDF-" (ISO 32000-1, 7.5.2).
    let tmp = Scratch::new();
    let file = tmp.design("d.ron", &Design::default());
    let pdf = tmp.dir.path().join("sheet.pdf");
    let r = run(&["sheet", s(&file), "-o", s(&pdf), "--paper", "letter"]);
    assert_eq!(r.code, Some(0), "{}", r.stderr);
    assert!(r.stdout.is_empty());
    assert!(r.stderr.contains("sheet.pdf"), "{}", r.stderr);
    let bytes = std::fs::read(&pdf).expect("sheet written");
    assert!(bytes.starts_with(b"%PDF-"));
    let mut names: Vec<String> = std::fs::read_dir(tmp.dir.path())
        .expect("list scratch dir")
        .filter_map(Result::ok)
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .collect();
    names.sort();
    assert_eq!(
        names,
        ["d.ron", "sheet.pdf"],
        "no temporary file left behind"
    );
    let missing_dir = tmp.dir.path().join("no-such-dir").join("x.pdf");
    assert_refused(&["sheet", s(&file), "-o", s(&missing_dir)], &["x.pdf"]);
}

#[test]
fn a_closed_pipe_is_reported_as_a_failed_write_to_stdout() {
    // Issue: `bowgrip bores ... | head -1` must not panic. A million bores also shows
    // that --points 1000000 is accepted. Issue 11, item 11: the output did not all
    // arrive, so the run fails (status 2) with one line naming stdout.
    let tmp = Scratch::new();
    let file = tmp.design("d.ron", &Design::default());
    let mut child = StdCommand::new(env!("CARGO_BIN_EXE_bowgrip"))
        .args([
            "bores",
            s(&file),
            "--from-mm",
            "60",
            "--to-mm",
            "80",
            "--points",
            "1000000",
            "--csv",
        ])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("spawn bowgrip");
    let stdout = child.stdout.take().expect("piped stdout");
    let mut reader = BufReader::new(stdout);
    let mut header = String::new();
    reader.read_line(&mut header).expect("read one line");
    assert_eq!(header.trim_end(), BORES_COLUMNS);
    drop(reader);
    let out = child.wait_with_output().expect("wait for bowgrip");
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(
        stderr.starts_with("bowgrip: cannot write the results to stdout")
            && stderr.lines().count() == 1,
        "stderr: {stderr}"
    );
    assert_eq!(out.status.code(), Some(2));
}

/// What a sample design's header says `check` will do: its `// Expected:` line begins with
/// "passes" or "fails".
fn expected_verdict(text: &str) -> Option<bool> {
    let line = text
        .lines()
        .take_while(|l| l.trim_start().starts_with("//") || l.trim().is_empty())
        .find_map(|l| {
            l.trim_start()
                .trim_start_matches('/')
                .trim()
                .strip_prefix("Expected:")
        })?
        .trim()
        .to_lowercase();
    if line.starts_with("passes") {
        Some(true)
    } else if line.starts_with("fails") {
        Some(false)
    } else {
        None
    }
}

#[test]
fn sample_designs_behave_as_their_headers_say() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-designs");
    let mut files: Vec<PathBuf> = std::fs::read_dir(&dir)
        .map(|rd| rd.filter_map(Result::ok).map(|e| e.path()).collect())
        .unwrap_or_default();
    files.retain(|p| p.extension().is_some_and(|e| e == "ron"));
    files.sort();
    let (mut passing, mut failing) = (0, 0);
    for file in &files {
        let text = std::fs::read_to_string(file).expect("read sample");
        let expect = expected_verdict(&text)
            .unwrap_or_else(|| panic!("{}: the header states no verdict", file.display()));
        let r = run(&["check", s(file)]);
        let want = if expect { 0 } else { 1 };
        assert_eq!(
            r.code,
            Some(want),
            "{}:\n{}{}",
            file.display(),
            r.stdout,
            r.stderr
        );
        if expect {
            passing += 1;
        } else {
            failing += 1;
            assert!(r.stdout.contains("FAIL"), "{}", r.stdout);
        }
    }
    assert!(
        passing >= 1 && failing >= 1,
        "{passing} passing, {failing} failing samples in {}",
        dir.display()
    );
}

#[test]
fn check_prints_geometry_cautions_for_strips_that_leave_the_plates() {
    let d = crate::shared::wide_gap_design();
    let tmp = Scratch::new();
    let f = tmp.design("wide.ron", &d);
    let r = run(&["check", s(&f)]);
    assert!(
        r.stdout
            .lines()
            .any(|l| l.starts_with("geometry caution:") && l.contains("behind the plane")),
        "{}",
        r.stdout
    );
    let r = run(&["check", s(&f), "--json"]);
    let v = json(&r.stdout);
    let cautions = v["geometry_cautions"].as_array().expect("cautions array");
    assert!(!cautions.is_empty(), "{v}");
}

/// `check` gives the usable stroke range across the bore tolerance as
/// numbers (text and an added JSON key), and says plainly when there is none. The range's
/// ends are the solver's inverse queries at the band's ends, checked against the forward
/// solution in `inverse_queries`; here the command line must print what the library gives
/// and the checks must agree with it at the operating stroke.
#[test]
fn check_gives_the_usable_stroke_range() {
    let tmp = Scratch::new();
    let d = Design::default();
    let seg = bowgrip::segment::Segment::new(&d).expect("segment");
    let (from, to) = seg
        .usable_stroke_across_tolerance()
        .range_mm()
        .expect("the demo has a usable range");
    // The demo passes every check, so its operating stroke lies inside the range.
    let op = d.operating_stroke_mm.expect("the demo sets a stroke");
    assert!(from <= op && op <= to);
    let good = tmp.design("good.ron", &d);
    let r = run(&["check", s(&good), "--json"]);
    let v = json(&r.stdout);
    // serde_json's default float reading may be one unit in the last place off.
    let close = |key: &str, want: f64| {
        v["usable_stroke_mm"][key]
            .as_f64()
            .is_some_and(|x| (x - want).abs() <= 1e-12 * want)
    };
    assert!(close("from", from) && close("to", to), "{}", r.stdout);
    let r = run(&["check", s(&good)]);
    let line = format!(
        "usable stroke {from:.3} to {to:.3} mm across the bore tolerance ({:.3} mm)",
        to - from
    );
    assert!(r.stdout.contains(&line), "{line}\n{}", r.stdout);

    // An operating stroke below the range fails the holding check, and still no range
    // once the load is beyond the strips: `null` and a plain sentence.
    let mut heavy = Design::default();
    heavy.duty.holding_force_n = 5000.0;
    let heavy = tmp.design("heavy.ron", &heavy);
    let r = run(&["check", s(&heavy), "--json"]);
    assert!(
        json(&r.stdout)["usable_stroke_mm"].is_null(),
        "{}",
        r.stdout
    );
    let r = run(&["check", s(&heavy)]);
    assert!(
        r.stdout
            .contains("no usable stroke across the bore tolerance: "),
        "{}",
        r.stdout
    );
}

/// Issue 16, item 8: `--json` and `--csv` on every command that prints data. The JSON of
/// `sweep` and `bores` is the CSV's table as objects keyed by its column names (the
/// contract's columns; numbers as numbers, empty cells as null), and `check --csv` has
/// one row per check with the same verdicts and margins as `check --json`.
#[test]
fn sweep_bores_and_check_print_both_json_and_csv() {
    let dir = Scratch::new();
    let f = dir.design("demo.ron", &Design::default());
    let f = s(&f);
    for args in [
        vec!["sweep", f, "--points", "40"],
        vec![
            "bores",
            f,
            "--from-mm",
            "60",
            "--to-mm",
            "80",
            "--points",
            "21",
        ],
    ] {
        let csv = run(&[args.as_slice(), &["--csv"]].concat());
        let js = run(&[args.as_slice(), &["--json"]].concat());
        assert_eq!((csv.code, js.code), (Some(0), Some(0)), "{args:?}");
        let mut lines = csv.stdout.lines();
        let header: Vec<&str> = lines.next().expect("header").split(',').collect();
        let rows: Vec<Vec<&str>> = lines.map(|l| l.split(',').collect()).collect();
        let doc = json(&js.stdout);
        let objects = doc.as_array().expect("an array");
        assert_eq!(objects.len(), rows.len(), "{args:?}");
        assert!(rows.len() >= 21);
        for (o, row) in objects.iter().zip(&rows) {
            let o = o.as_object().expect("an object");
            assert_eq!(o.keys().count(), header.len());
            for (name, cell) in header.iter().zip(row) {
                let v = &o[*name];
                match cell.parse::<f64>() {
                    _ if cell.is_empty() => assert!(v.is_null(), "{name}: {v}"),
                    // The JSON carries the CSV's digits verbatim; serde_json's default
                    // float parser may land one unit in the last place away, so the value is
                    // compared to that and the text itself is looked up.
                    Ok(x) => {
                        let y = v.as_f64().unwrap_or(f64::NAN);
                        assert!((y - x).abs() <= 2.0 * f64::EPSILON * x.abs(), "{name}");
                        assert!(js.stdout.contains(&format!("\"{name}\":{cell}")), "{name}");
                    }
                    Err(_) => assert_eq!(v.as_str(), Some(*cell), "{name}"),
                }
            }
        }
    }
    let both = run(&["sweep", f, "--csv", "--json"]);
    assert_eq!(both.code, Some(2), "{}", both.stderr);

    let js = json(&run(&["check", f, "--json"]).stdout);
    let csv = run(&["check", f, "--csv"]);
    let mut lines = csv.stdout.lines();
    assert_eq!(
        lines.next(),
        Some("id,pass,margin,unit,bore_mm,stroke_mm,reason")
    );
    let rows: Vec<&str> = lines.collect();
    let checks = js["checks"].as_array().expect("checks");
    assert_eq!(rows.len(), checks.len());
    for (row, c) in rows.iter().zip(checks) {
        let cells: Vec<&str> = row.splitn(7, ',').collect();
        assert_eq!(cells[0], c["id"].as_str().expect("id"));
        assert_eq!(cells[1], c["pass"].to_string());
        match c["margin"].as_f64() {
            // Within one unit in the last place: serde_json's default parser is not
            // always correctly rounded.
            Some(m) => {
                let x = cells[2].parse::<f64>().unwrap_or(f64::NAN);
                assert!((x - m).abs() <= 2.0 * f64::EPSILON * m.abs(), "{x} vs {m}");
            }
            None => assert_eq!(cells[2], ""),
        }
    }
}

/// Issue 16, item 8: `compare --csv` gives one row per measured value; per quantity its
/// rows match `compare --json` (the number of points, and the root mean square of the
/// residual column, sqrt(sum r^2 / n), equals the reported `rms`), with and without a fit.
#[test]
fn compare_prints_one_csv_row_per_measured_value() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-designs");
    let design = root.join("riser-climber-2in-sch40.ron");
    let bench = root.join("riser-climber-2in-sch40.bench.csv");
    for fit in [None, Some("modulus,offset")] {
        let mut args = vec!["compare", s(&design), "--measured", s(&bench)];
        if let Some(f) = fit {
            args.extend(["--fit", f]);
        }
        let csv = run(&[args.as_slice(), &["--csv"]].concat());
        let js = json(&run(&[args.as_slice(), &["--json"]].concat()).stdout);
        assert_eq!(csv.code, Some(0), "{}", csv.stderr);
        let mut lines = csv.stdout.lines();
        assert_eq!(
            lines.next(),
            Some("quantity,line,stroke_mm,bore_mm,measured,model,residual")
        );
        let rows: Vec<Vec<&str>> = lines.map(|l| l.split(',').collect()).collect();
        let residuals = js["residuals"].as_object().expect("residuals");
        let mut total = 0;
        for (column, summary) in residuals {
            let r: Vec<f64> = rows
                .iter()
                .filter(|row| row[0] == column)
                .map(|row| row[6].parse().expect("a number"))
                .collect();
            let points = summary["points"].as_u64().expect("points") as usize;
            assert_eq!(r.len(), points, "{column}");
            let rms = (r.iter().map(|x| x * x).sum::<f64>() / r.len() as f64).sqrt();
            let want = num(summary, "rms");
            assert!(
                (rms - want).abs() <= 1e-12 * want,
                "{column}: {rms} vs {want}"
            );
            total += points;
        }
        assert_eq!(total, rows.len());
    }
}
