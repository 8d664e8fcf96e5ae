//! The desktop app driven through its accessibility tree (egui_kittest, no GPU): inputs
//! change the design and the checks, files open and save through the typed path, the
//! unsaved-changes prompt and the recovery copy appear when they should.

use std::f64::consts::PI;
use std::path::Path;

use bowgrip::analysis;
use bowgrip::app::{GripApp, Recovery};
use bowgrip::checks::CheckId;
use bowgrip::design::{self, Design};
use egui::accesskit::Role;
use egui::{Key, Modifiers};
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;

fn harness(app: GripApp) -> Harness<'static, GripApp> {
    Harness::builder()
        .with_size([1500.0, 940.0])
        .build_ui_state(|ui, app: &mut GripApp| app.ui(ui), app)
}

fn check_pass(app: &GripApp, id: &str) -> bool {
    let a = app.analysis().unwrap_or_else(|| panic!("no analysis"));
    a.checks
        .iter()
        .find(|c| c.id.as_str() == id)
        .unwrap_or_else(|| panic!("no {id} check"))
        .pass
}

/// The app's cached results are those of `analysis::analyse` on the same design.
fn assert_matches_fresh_analysis(app: &GripApp) {
    let shown = app.analysis().unwrap_or_else(|| panic!("no analysis"));
    let fresh = analysis::analyse(app.design()).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(shown.segment.design, *app.design(), "analysis is stale");
    assert_eq!(shown.checks, fresh.checks);
    assert_eq!(shown.limiting, fresh.limiting);
}

#[test]
fn inputs_drive_the_checks() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    let d0 = h.state().design().clone();
    assert!(
        check_pass(h.state(), "hold"),
        "the demo design holds its load"
    );

    // A thinner strip: bending stiffness goes with t^3, so the contact force and the
    // holding force fall steeply and the holding check flips.
    h.get_by_role_and_label(Role::TextInput, "Thickness")
        .set_text_value_accesskit("0.15");
    h.run();
    assert_eq!(h.state().design().strip.thickness_mm, 0.15);
    assert_matches_fresh_analysis(h.state());
    assert!(!check_pass(h.state(), "hold"));
    assert!(
        h.query_by_label_contains("[FAIL] holds the required load")
            .is_some(),
        "the list shows the failure"
    );

    // A value outside the plausible range is refused in plain words with the range (the
    // file's, design::limits) and the value kept, on a line of its own that moves no
    // field; a valid value clears it.
    let field_x = |h: &Harness<'static, GripApp>| {
        h.get_by_role_and_label(Role::TextInput, "Thickness")
            .rect()
            .min
            .x
    };
    let before = field_x(&h);
    h.get_by_role_and_label(Role::TextInput, "Thickness")
        .set_text_value_accesskit("9");
    h.run();
    assert_eq!(h.state().design().strip.thickness_mm, 0.15);
    let said = "Thickness 9 mm is outside 0.02 to 5 mm; kept 0.15 mm";
    assert!(h.query_by_label_contains(said).is_some(), "{said}");
    assert_eq!(field_x(&h), before, "the message moved the fields");
    h.get_by_role_and_label(Role::TextInput, "Thickness")
        .set_text_value_accesskit("0.15");
    h.run();
    assert!(h.query_by_label_contains("is outside").is_none());

    // More strips through the slider. The hub check is plane geometry: adjacent strips
    // of width b on a circle of radius r clear each other when b <= 2 r tan(pi/N)
    // (the chord between neighbours; the project's contract states the same test).
    h.get_by_role_and_label(Role::Slider, "Strips")
        .set_value_accesskit(16.0);
    h.run();
    let d = h.state().design().clone();
    assert_eq!(d.strip.count, 16);
    assert_matches_fresh_analysis(h.state());
    let room = 2.0 * d.mount_radius_mm * (PI / 16.0).tan();
    assert_eq!(check_pass(h.state(), "hub"), d.strip.width_mm <= room);

    // A larger bore, typed: the relaxed-fit margin is bore - relaxed diameter - 1 mm,
    // with the strip corners at 2 sqrt((r_m + t/2)^2 + b^2/4) (the mechanics note's
    // outer diameter at zero crest height, plain geometry).
    h.get_by_role_and_label(Role::TextInput, "Bore diameter")
        .set_text_value_accesskit("74");
    h.run();
    let d = h.state().design().clone();
    assert_eq!(d.bore.diameter_mm, 74.0);
    assert_matches_fresh_analysis(h.state());
    let corners = 2.0
        * ((d.mount_radius_mm + 0.5 * d.strip.thickness_mm).powi(2)
            + 0.25 * d.strip.width_mm.powi(2))
        .sqrt();
    let relaxed = corners.max(d.end_plate_diameter_mm);
    let a = h
        .state()
        .analysis()
        .unwrap_or_else(|| panic!("no analysis"));
    let fit = a
        .checks
        .iter()
        .find(|c| c.id == CheckId::Fit)
        .and_then(|c| c.margin)
        .unwrap_or(f64::NAN);
    assert!(
        (fit - (74.0 - d.bore.minus_mm - relaxed - 1.0)).abs() < 1e-9,
        "fit margin {fit}"
    );

    // Undo walks back one edit at a time, to the start.
    for _ in 0..3 {
        h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
        h.run();
    }
    assert_eq!(*h.state().design(), d0);
    assert!(!h.state().is_dirty(), "back to the design as opened");
    assert_matches_fresh_analysis(h.state());
    let shown = h
        .get_by_role_and_label(Role::TextInput, "Thickness")
        .value();
    assert_eq!(
        shown,
        Some(d0.strip.thickness_mm.to_string()),
        "the field follows the undo"
    );
    // Redo brings the last edit back, by Ctrl+Y or Ctrl+Shift+Z.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Y);
    h.run();
    assert_eq!(h.state().design().strip.thickness_mm, 0.15);
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run();
    assert_eq!(*h.state().design(), d0);
    h.key_press_modifiers(Modifiers::COMMAND | Modifiers::SHIFT, Key::Z);
    h.run();
    assert_eq!(h.state().design().strip.thickness_mm, 0.15);
}

/// Ctrl+Q quits; with nothing unsaved it needs no question.
#[test]
fn ctrl_q_quits_a_saved_design() {
    let state = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    assert!(!h.state().is_quitting());
    h.key_press_modifiers(Modifiers::COMMAND, Key::Q);
    h.run();
    assert!(h.state().is_quitting());
}

fn open_through_the_window(h: &mut Harness<'static, GripApp>, path: &Path) {
    h.key_press_modifiers(Modifiers::COMMAND, Key::O);
    h.run();
    h.get_by_role_and_label(Role::TextInput, "Path")
        .set_text_value_accesskit(&path.display().to_string());
    h.run();
    h.get_by_role_and_label(Role::Button, "Open").click();
    h.run();
}

#[test]
fn files_open_save_and_guard_unsaved_work() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let state = dir.path().join("state");
    let good = dir.path().join("six.ron");
    let mut six = Design::default();
    six.strip.count = 6;
    design::save_atomic(&good, &six).unwrap_or_else(|e| panic!("{e}"));
    // Out of the plausible range: thickness 9 mm (allowed 0.02 to 5 mm).
    let bad = dir.path().join("bad.ron");
    let mut too_thick = Design::default();
    too_thick.strip.thickness_mm = 9.0;
    let text = design::to_ron(&too_thick).unwrap_or_else(|e| panic!("{e}"));
    std::fs::write(&bad, text).unwrap_or_else(|e| panic!("{e}"));

    let mut h = harness(GripApp::new(state.clone(), None));
    h.run();
    open_through_the_window(&mut h, &good);
    assert_eq!(*h.state().design(), six);
    assert_eq!(h.state().path(), Some(good.as_path()));

    // A file that does not load leaves the open design as it was, and says why.
    open_through_the_window(&mut h, &bad);
    assert_eq!(*h.state().design(), six);
    let status = h
        .state()
        .status()
        .map(|s| s.text.clone())
        .unwrap_or_default();
    assert!(
        status.contains("strip.thickness_mm") && status.contains("unchanged"),
        "{status}"
    );

    // Edit and save with Ctrl+S: the file holds what is on screen.
    h.get_by_role_and_label(Role::TextInput, "Thickness")
        .set_text_value_accesskit("0.3");
    h.run();
    assert!(h.state().is_dirty());
    h.key_press_modifiers(Modifiers::COMMAND, Key::S);
    h.run();
    assert!(!h.state().is_dirty());
    assert_eq!(
        design::load(&good).unwrap_or_else(|e| panic!("{e}")),
        *h.state().design()
    );

    // Unsaved changes: New asks first; Cancel keeps the work.
    h.get_by_role_and_label(Role::TextInput, "Thickness")
        .set_text_value_accesskit("0.35");
    h.run();
    h.key_press_modifiers(Modifiers::COMMAND, Key::N);
    h.run();
    assert!(h.state().is_asking_to_discard());
    h.get_by_role_and_label(Role::Button, "Cancel").click();
    h.run();
    assert!(!h.state().is_asking_to_discard());
    assert_eq!(h.state().design().strip.thickness_mm, 0.35);

    // Saving where it cannot be written keeps the design open and unsaved.
    let nowhere = dir.path().join("gone").join("x.ron");
    h.key_press_modifiers(Modifiers::COMMAND | Modifiers::SHIFT, Key::S);
    h.run();
    h.get_by_role_and_label(Role::TextInput, "Path")
        .set_text_value_accesskit(&nowhere.display().to_string());
    h.run();
    h.get_by_role_and_label(Role::Button, "Save").click();
    h.run();
    assert!(h.state().is_dirty());
    assert_eq!(h.state().path(), Some(good.as_path()));
    assert!(
        h.state()
            .status()
            .is_some_and(|s| s.is_error && s.text.contains("Not saved"))
    );

    // The recent list remembers the file for the next session.
    assert_eq!(h.state().session().recent.first(), Some(&good));
    assert!(h.state().title().contains("bowgrip") && h.state().title().contains("six.ron"));

    // Exports through the Tools menu, next to the design file. The CSV columns are the
    // contract's: the state names for the curve, the bore rows for the window.
    h.get_by_role_and_label(Role::Button, "Tools").click();
    h.run();
    h.get_by_role_and_label(Role::Button, "Export plots and tables…")
        .click();
    h.run();
    h.get_by_role_and_label(Role::Button, "Export all").click();
    h.run();
    let read = |ending: &str| {
        std::fs::read_to_string(dir.path().join(format!("six{ending}")))
            .unwrap_or_else(|e| panic!("{ending}: {e}"))
    };
    let window = read("-window.csv");
    assert_eq!(
        window.lines().next(),
        Some(
            "bore_mm,first_contact_stroke_mm,holding_stroke_mm,stress_limit_stroke_mm,line_contact_stroke_mm,limit_stroke_mm"
        )
    );
    assert_eq!(window.lines().count(), 1 + analysis::WINDOW_POINTS);
    let curve = read("-curve.csv");
    assert!(
        curve.starts_with("stroke_mm,phase,axial_force_per_strip_n,"),
        "{}",
        &curve[..80.min(curve.len())]
    );
    assert_eq!(curve.lines().count(), 1 + analysis::CURVE_POINTS);
    for svg in ["-window.svg", "-forces.svg", "-stress.svg"] {
        let text = read(svg);
        assert!(
            text.starts_with("<svg") && text.contains("<polyline"),
            "{svg}"
        );
    }

    // The sizing sheet: written next to the design as a PDF, or the reason is shown.
    h.get_by_role_and_label(Role::Button, "Tools")
        .click_accesskit();
    h.run();
    h.get_by_role_and_label(Role::Button, "Print sizing sheet…")
        .click();
    h.run();
    h.get_by_role_and_label(Role::Button, "Write the sheet")
        .click();
    // The sheet is laid out and written on a worker thread: frames go on meanwhile, and
    // its outcome reaches the status line when it is done.
    let asked = std::time::Instant::now();
    while !h.state().status().is_some_and(|s| {
        s.text.contains("Sizing sheet written") || s.text.contains("sheet could not")
    }) && asked.elapsed() < std::time::Duration::from_secs(300)
    {
        h.step();
        std::thread::sleep(std::time::Duration::from_millis(10));
    }
    h.run();
    let status = h
        .state()
        .status()
        .cloned()
        .unwrap_or_else(|| panic!("no status"));
    let pdf = dir.path().join("six.pdf");
    if status.is_error {
        assert!(
            status
                .text
                .starts_with("The sizing sheet could not be made"),
            "{}",
            status.text
        );
    } else {
        assert!(
            status.text.contains(&pdf.display().to_string()),
            "{}",
            status.text
        );
        let bytes = std::fs::read(&pdf).unwrap_or_else(|e| panic!("{e}"));
        assert!(
            bytes.starts_with(b"%PDF-"),
            "PDF header (ISO 32000-1, 7.5.2)"
        );
    }

    // Closing the window with unsaved changes asks first; discarding lets it close.
    h.input_mut()
        .viewports
        .entry(egui::ViewportId::ROOT)
        .or_default()
        .events
        .push(egui::ViewportEvent::Close);
    h.run();
    assert!(h.state().is_asking_to_discard() && !h.state().is_quitting());
    h.get_by_role_and_label(Role::Button, "Discard changes")
        .click();
    h.run();
    assert!(h.state().is_quitting());
    h.state_mut().on_close();
    drop(h);

    // The next start, without a file named, reopens the last one.
    let again = GripApp::new(state, None);
    assert_eq!(again.path(), Some(good.as_path()));
    assert!(
        !again.is_offering_recovery(),
        "a confirmed quit leaves no recovery copy"
    );
}

#[test]
fn recovery_copy_is_offered_after_a_crash() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let state = dir.path().to_path_buf();
    let edited = {
        let mut h = harness(GripApp::new(state.clone(), None));
        h.run();
        h.get_by_role_and_label(Role::TextInput, "Free length")
            .set_text_value_accesskit("80");
        h.run();
        assert!(h.state().is_dirty());
        h.state().design().clone()
        // Dropped without a clean close: as after a crash.
    };
    assert_eq!(
        Recovery::copies(&state).len(),
        1,
        "the unsaved work was copied"
    );
    let mut h = harness(GripApp::new(state.clone(), None));
    h.run();
    assert!(h.state().is_offering_recovery());
    assert_eq!(
        *h.state().design(),
        Design::default(),
        "nothing is applied before asking"
    );
    h.get_by_role_and_label(Role::Button, "Restore it").click();
    h.run();
    assert_eq!(*h.state().design(), edited);
    assert!(h.state().is_dirty(), "restored work still needs saving");
    assert_eq!(
        h.state().analysis().map(|a| &a.segment.design),
        Some(&edited)
    );
}

#[test]
fn an_actuator_travel_far_above_the_curves_is_named_in_the_heading() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    let a = h
        .state()
        .analysis()
        .unwrap_or_else(|| panic!("no analysis"));
    // The demo's screw gives far more travel than any stroke in its window: a line there
    // would squeeze the curves flat, so the plot's heading names it instead (the app
    // draws the line only within 1.4 times the highest curve).
    let top = a
        .window
        .iter()
        .flat_map(|r| {
            [
                r.first_contact_stroke_mm,
                r.holding_stroke_mm,
                r.stress_limit_stroke_mm,
                r.line_contact_stroke_mm,
                r.limit_stroke_mm,
            ]
        })
        .flatten()
        .fold(0.0, f64::max);
    let travel = a.segment.max_stroke_mm();
    assert!(travel > 1.4 * top, "travel {travel} mm, curves to {top} mm");
    let note = format!("actuator max travel {travel:.2} mm: above the plotted range");
    assert!(h.query_by_label_contains(&note).is_some(), "no {note:?}");

    // A travel within reach of the curves is drawn as a line, and the note goes.
    let lead_mm = match &h.state().design().actuator {
        design::Actuator::LeadScrew { lead_mm, .. } => *lead_mm,
        other => panic!("the demo drives a lead screw, not {other:?}"),
    };
    let turns = (120.0 * top / lead_mm).round() / 100.0;
    h.get_by_role_and_label(Role::TextInput, "Max turns")
        .set_text_value_accesskit(&turns.to_string());
    h.run();
    assert!(
        h.state()
            .analysis()
            .is_some_and(|a| a.segment.max_stroke_mm() < 1.4 * top)
    );
    assert!(
        h.query_by_label_contains("above the plotted range")
            .is_none()
    );
}

#[test]
fn a_bore_the_relaxed_strips_do_not_fit_says_so_in_every_panel() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    // A bore just below the relaxed diameter over the strips: the gap is negative, the
    // model has no state there (the project's contract: g <= 0 has no state).
    let d = h.state().design().clone();
    let corners = 2.0
        * ((d.mount_radius_mm + 0.5 * d.strip.thickness_mm).powi(2)
            + 0.25 * d.strip.width_mm.powi(2))
        .sqrt();
    let bore = (corners - 1.0).floor();
    h.get_by_role_and_label(Role::TextInput, "Bore diameter")
        .set_text_value_accesskit(&bore.to_string());
    h.run();
    assert_eq!(h.state().design().bore.diameter_mm, bore);
    assert!(h.state().analysis().is_some_and(|a| a.curve.is_empty()));
    // The force and stress cells say why they are empty instead of drawing empty axes.
    let why = "No curve: the relaxed segment does not fit the nominal bore";
    assert_eq!(h.query_all_by_label_contains(why).count(), 2);
    // No stored energy is claimed for strips that have no state; the caution stays.
    assert!(h.query_by_label_contains("store up to").is_none());
    assert!(
        h.query_by_label_contains("Caution: the strips store spring energy")
            .is_some()
    );
    assert!(h.query_by_label_contains("margin no margin").is_none());
}

#[test]
fn strips_that_swing_behind_the_plates_raise_a_geometry_caution() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    assert!(h.query_by_label_contains("Geometry caution").is_none());
    let d = crate::shared::wide_gap_design();
    let tmp = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let file = tmp.path().join("wide.ron");
    std::fs::write(&file, design::to_ron(&d).unwrap_or_else(|e| panic!("{e}")))
        .unwrap_or_else(|e| panic!("{e}"));
    open_through_the_window(&mut h, &file);
    assert_eq!(h.state().design().operating_stroke_mm, Some(27.0));
    assert!(h.query_by_label_contains("Geometry caution").is_some());
    // One line for each of the three bores.
    assert_eq!(
        h.query_all_by_label_contains("swings behind the plane of an end plate")
            .count(),
        3
    );
}

/// Issue 16, item 9: the status bar never shows "unsaved" beside "Saved". After Ctrl+S the
/// save is reported; the next edit withdraws that report while the unsaved mark shows.
#[test]
fn a_save_report_goes_with_the_next_edit() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let file = dir.path().join("design.ron");
    std::fs::write(
        &file,
        design::to_ron(&Design::default()).unwrap_or_else(|e| panic!("{e}")),
    )
    .unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(dir.path().join("state"), Some(file.clone())));
    h.run();
    h.get_by_role_and_label(Role::TextInput, "Thickness")
        .set_text_value_accesskit("0.26");
    h.run();
    h.key_press_modifiers(Modifiers::COMMAND, Key::S);
    h.run();
    assert!(!h.state().is_dirty());
    let saved = h.state().shown_status().map(|s| s.text.clone());
    assert!(
        saved.as_deref().is_some_and(|t| t.starts_with("Saved")),
        "{saved:?}"
    );
    h.get_by_role_and_label(Role::TextInput, "Thickness")
        .set_text_value_accesskit("0.27");
    h.run();
    assert!(h.state().is_dirty());
    assert!(h.query_by_label_contains("unsaved").is_some());
    assert!(
        h.state().shown_status().is_none() && h.query_by_label_contains("Saved ").is_none(),
        "a stale save report beside the unsaved mark"
    );
}

/// Issue 17: a design with a radial load shows the centred checks at once and the
/// load-sharing ones (here `top-strip` and `bend`) when the worker is done, equal to a fresh
/// full analysis; the per-strip table and the load-sharing inputs are there with their
/// labels.
#[test]
fn load_sharing_results_arrive_from_the_worker() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let file = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join("drain-crawler-horizontal-150mm.ron");
    let mut h = harness(GripApp::new(state.path().to_path_buf(), Some(file)));
    // One frame (the spinner repaints while the worker runs), then wait for it.
    h.step();
    h.state_mut().wait_for_load_sharing();
    h.run();
    assert_matches_fresh_analysis(h.state());
    let ids: Vec<CheckId> = h
        .state()
        .analysis()
        .unwrap_or_else(|| panic!("no analysis"))
        .checks
        .iter()
        .map(|c| c.id)
        .collect();
    assert!(ids.contains(&CheckId::TopStrip) && ids.contains(&CheckId::Bend));
    assert!(
        h.query_by_label_contains("Per strip, nominal bore, operating stroke")
            .is_some()
    );
    assert!(h.query_by_label_contains("contact, N").is_some());
    for label in [
        "Radial load",
        "Out of round",
        "Plate thickness",
        "Bend radius",
    ] {
        assert!(
            h.query_by_role_and_label(Role::TextInput, label).is_some(),
            "no {label} field"
        );
    }
    // An edit: the new radial load goes to the worker, and its checks follow.
    h.get_by_role_and_label(Role::TextInput, "Radial load")
        .set_text_value_accesskit("60");
    h.step();
    assert_eq!(h.state().design().duty.radial_load_n, 60.0);
    h.state_mut().wait_for_load_sharing();
    h.run();
    assert_matches_fresh_analysis(h.state());
}

/// The fitting helper runs off the UI thread (the window keeps drawing frames while it
/// searches), lands on a rounded value in the middle
/// of the passing range with its margins shown, and applies it as one undoable edit.
#[test]
fn the_fit_helper_searches_off_the_ui_thread_and_applies_one_edit() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    let before = h.state().design().clone();
    h.get_by_role_and_label(Role::Button, "Tools").click();
    h.run();
    h.get_by_role_and_label(Role::Button, "Fit one value…")
        .click();
    h.run();
    h.get_by_role_and_label(Role::RadioButton, "in the middle of the passing range")
        .click();
    h.get_by_role_and_label(Role::TextInput, "Round to")
        .set_text_value_accesskit("0.01");
    h.run();
    h.get_by_role_and_label(Role::Button, "Solve").click();
    // Frames go on while the worker searches; the answer arrives within a bounded number
    // of them (a count, not a time).
    let mut frames = 0;
    while h
        .query_by_label_contains("every check passes (they pass from")
        .is_none()
    {
        h.step();
        std::thread::sleep(std::time::Duration::from_millis(20));
        frames += 1;
        assert!(frames < 3000, "no answer from the fit");
    }
    assert!(h.query_by_label_contains("Margins at this value").is_some());
    h.get_by_role_and_label(Role::Button, "Apply").click();
    // The window resizes to its shorter content over a few frames.
    h.run_steps(10);
    let t = h.state().design().strip.thickness_mm;
    assert_ne!(t, before.strip.thickness_mm);
    assert!(
        ((t / 0.01).round() * 0.01 - t).abs() < 1e-12,
        "rounded to 0.01 mm: {t}"
    );
    let a = h
        .state()
        .analysis()
        .unwrap_or_else(|| panic!("no analysis"));
    assert!(
        a.checks.iter().all(|c| c.pass),
        "every check passes at {t} mm"
    );
    // One edit: one undo step restores the design.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(10);
    assert_eq!(*h.state().design(), before);
}

/// The verdict panel gives the usable stroke range as numbers.
#[test]
fn the_verdict_panel_gives_the_usable_stroke_range() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    let seg = bowgrip::segment::Segment::new(h.state().design()).unwrap_or_else(|e| panic!("{e}"));
    let (from, to) = seg
        .usable_stroke_across_tolerance()
        .range_mm()
        .unwrap_or_else(|| panic!("the demo has a usable range"));
    let line = format!("Usable stroke {from:.3} to {to:.3} mm across the bore tolerance");
    assert!(h.query_by_label_contains(&line).is_some(), "{line}");
}
