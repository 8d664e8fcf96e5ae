//! The app's bench measurements (egui_kittest, no GPU): opening the sample bench file,
//! its residuals as the calibrate module computes them, a fit run from the dialog, its
//! application as one undoable edit, a dropped file, and a malformed file refused with
//! its line and column while nothing else changes.
//!
//! Sources: the residuals and the fitted factors are checked against `bowgrip::calibrate`
//! called directly on the same design and file (whose own checks against NIST's
//! reference datasets are in `calibration.rs`); undo restoring the design exactly is
//! common practice for an edit history.

use std::fs;
use std::path::PathBuf;

use bowgrip::app::{Command, GripApp};
use bowgrip::bench_data;
use bowgrip::calibrate::{self, Factor, Factors};
use bowgrip::design;
use egui::accesskit::Role;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn harness(app: GripApp) -> Harness<'static, GripApp> {
    Harness::builder()
        .with_size([1500.0, 940.0])
        .build_ui_state(|ui, app: &mut GripApp| app.ui(ui), app)
}

/// A temp folder holding a copy of the riser sample and its bench file; the app on it.
fn riser_app() -> (tempfile::TempDir, PathBuf, PathBuf, GripApp) {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let design = dir.path().join("riser.ron");
    let bench = dir.path().join("riser.bench.csv");
    let samples = root().join("sample-designs");
    fs::copy(samples.join("riser-climber-2in-sch40.ron"), &design).expect("copy design");
    fs::copy(samples.join("riser-climber-2in-sch40.bench.csv"), &bench).expect("copy bench");
    let state = dir.path().join("state");
    let app = GripApp::new(state, Some(design.clone()));
    (dir, design, bench, app)
}

fn label_shown(h: &Harness<'_, GripApp>, text: &str) -> bool {
    h.query_all_by_label_contains(text).next().is_some()
}

#[test]
fn open_fit_apply_and_undo() {
    let (_dir, design_path, bench_path, app) = riser_app();
    let mut h = harness(app);
    h.run();
    let before = h.state().design().clone();
    assert!(h.state_mut().open_measurements(&bench_path));
    h.run();
    assert!(
        !h.state().is_dirty(),
        "opening measurements changes no design"
    );
    assert!(label_shown(&h, "Bench measurements"));

    // The residuals shown are calibrate's own for the design as it stands.
    let data = bench_data::load(&bench_path).expect("bench file");
    let want = calibrate::residuals(&before, &data, &Factors::nominal(&before)).expect("residuals");
    let shown = h
        .state()
        .measured_residuals()
        .expect("residuals computed")
        .expect("residuals available")
        .to_vec();
    assert_eq!(shown, want);
    for q in &want {
        let s = q.summary();
        let unit = q.quantity.unit();
        assert!(
            label_shown(&h, &format!("{:.3} {unit}", s.rms)),
            "RMS of {} shown",
            q.quantity.column()
        );
        assert!(label_shown(
            &h,
            &format!("line {}, stroke {:.3} mm", s.max_line, s.max_stroke_mm)
        ));
    }

    // The calibrate dialog: tick two factors, fit, wait for the thread.
    h.get_by_label("Calibrate…").click();
    h.run();
    assert!(
        label_shown(&h, "Calibrate against the bench"),
        "the dialog opens"
    );
    h.get_by_role_and_label(Role::CheckBox, "modulus factor")
        .click();
    h.get_by_role_and_label(Role::CheckBox, "friction").click();
    h.run();
    h.get_by_role_and_label(Role::Button, "Fit").click();
    // One frame starts the fit; `run` would keep stepping while the spinner repaints, and
    // a slow machine can take more than the harness's step limit to fit.
    h.step();
    h.state_mut().wait_for_calibration();
    h.run();
    let fitted = h
        .state()
        .calibration_outcome()
        .expect("a finished fit")
        .unwrap_or_else(|e| panic!("{e}"))
        .clone();
    let direct = calibrate::calibrate(&before, &data, &[Factor::Modulus, Factor::Friction])
        .expect("direct fit");
    assert_eq!(
        fitted.fitted, direct.fitted,
        "the dialog runs calibrate as it is"
    );
    for f in &fitted.fitted {
        assert!(
            label_shown(&h, &format!("{:.5}", f.value)),
            "{} shown",
            f.factor
        );
        assert!(label_shown(&h, &format!("± {:.5}", f.standard_error)));
    }
    assert!(label_shown(&h, "Correlation"));

    // Apply: one edit, modulus factor into the calibration and friction into its field.
    h.get_by_role_and_label(Role::Button, "Apply to the design")
        .click();
    h.run();
    let after = h.state().design().clone();
    assert!(h.state().is_dirty());
    let modulus = fitted.fitted[0].value;
    let friction = fitted.fitted[1].value;
    assert_eq!(after.modulus_factor(), modulus);
    assert_eq!(after.friction, friction);
    assert_eq!(after.stroke_offset_mm(), 0.0);
    assert_eq!(after.strip.free_length_mm, before.strip.free_length_mm);
    // The residuals follow the applied design: those of the fit's own factors.
    let refreshed = h
        .state()
        .measured_residuals()
        .expect("computed")
        .expect("available")
        .to_vec();
    assert_eq!(
        refreshed,
        calibrate::residuals(&before, &data, &fitted.factors).expect("after")
    );

    // One undo takes the whole application back.
    h.state_mut().push(Command::Undo);
    h.run();
    assert_eq!(*h.state().design(), before);
    assert!(!h.state().is_dirty());
    h.state_mut().push(Command::Redo);
    h.run();
    assert_eq!(*h.state().design(), after);
    // The inputs say the design carries a calibration.
    assert!(label_shown(
        &h,
        &format!("modulus factor {modulus:.4} on E")
    ));

    // Saved in place: the file reads back with the calibration, its comments kept.
    h.state_mut().push(Command::Save);
    h.run();
    assert!(!h.state().is_asking_to_rewrite());
    assert!(!h.state().is_dirty());
    let text = fs::read_to_string(&design_path).expect("saved");
    assert!(text.contains("// Sample design (invented)") && text.contains("calibration: Some("));
    assert_eq!(design::load(&design_path).expect("saved file loads"), after);
}

#[test]
fn a_malformed_file_is_refused_where_it_is_wrong_and_nothing_changes() {
    let (dir, _design, bench_path, app) = riser_app();
    let mut h = harness(app);
    h.run();
    assert!(h.state_mut().open_measurements(&bench_path));
    h.run();
    let rows = h.state().measurements().map(|d| d.rows.len());
    let design = h.state().design().clone();
    let bad = dir.path().join("bad.csv");
    fs::write(&bad, "stroke_mm,actuator_force_n\n1.0,twelve\n").expect("write");
    assert!(!h.state_mut().open_measurements(&bad));
    h.run();
    let status = h.state().status().expect("a status").clone();
    assert!(status.is_error);
    // In words, with the line and column of the bad cell (line 2, column 5).
    assert!(
        status.text.contains("line 2, column 5") && status.text.contains("not a number"),
        "{}",
        status.text
    );
    assert!(
        status.text.contains("nothing was changed"),
        "{}",
        status.text
    );
    assert_eq!(h.state().measurements().map(|d| d.rows.len()), rows);
    assert_eq!(*h.state().design(), design);
    assert!(label_shown(&h, "line 2, column 5"));
}

/// A file dropped on the window, as a desktop integration hands it to egui.
#[derive(Debug)]
struct Dropped(PathBuf);

impl egui::DroppedFile for Dropped {
    fn path(&self) -> &std::path::Path {
        &self.0
    }

    fn bytes(&self) -> Result<Vec<u8>, String> {
        fs::read(&self.0).map_err(|e| e.to_string())
    }
}

#[test]
fn dropped_files_open_by_kind() {
    let (dir, design_path, bench_path, app) = riser_app();
    let mut h = harness(app);
    h.run();
    // A dropped .csv opens as measurements: through the window's own input, as a desktop
    // delivers a drop.
    h.input_mut()
        .dropped_files
        .push(std::sync::Arc::new(Dropped(bench_path.clone())));
    h.run();
    assert_eq!(h.state().measurements().map(|d| d.rows.len()), Some(16));
    // A dropped .ron with unsaved changes asks first (the unsaved-changes guard).
    let mut edited = h.state().design().clone();
    edited.friction = 0.3;
    h.state_mut()
        .push(Command::Edit(Box::new(edited), bowgrip::app::Gesture::Done));
    h.run();
    let other = dir.path().join("other.ron");
    fs::copy(&design_path, &other).expect("copy");
    h.state_mut().open_dropped(vec![other.clone()]);
    h.run();
    assert!(h.state().is_asking_to_discard());
    assert_eq!(h.state().design().friction, 0.3, "nothing opened yet");
    // Anything else is named and left.
    h.state_mut()
        .open_dropped(vec![dir.path().join("notes.txt")]);
    h.run();
    let status = h.state().status().expect("status");
    assert!(
        status.is_error && status.text.contains("notes.txt"),
        "{}",
        status.text
    );
}
