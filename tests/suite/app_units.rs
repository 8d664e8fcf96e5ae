//! The app's display units (View > Units): the inputs show and take inches, the design
//! keeps millimetres, switching back without an edit changes nothing, and the choice is
//! kept in the session, not in the design. Factors: NIST SP 811 (2008), Appendix B
//! (1 in = 25.4 mm exactly; 1 lbf = 4.4482216152605 N).

use bowgrip::app::{GripApp, Session};
use bowgrip::units::UnitSystem;
use egui::accesskit::Role;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;

fn harness(app: GripApp) -> Harness<'static, GripApp> {
    Harness::builder()
        .with_size([1500.0, 940.0])
        .build_ui_state(|ui, app: &mut GripApp| app.ui(ui), app)
}

fn choose(h: &mut Harness<'static, GripApp>, label: &str) {
    h.get_by_role_and_label(Role::Button, "View").click();
    h.run();
    h.get_by_role_and_label(Role::RadioButton, label).click();
    h.run();
}

fn thickness_field(h: &Harness<'static, GripApp>) -> Option<String> {
    h.get_by_role_and_label(Role::TextInput, "Thickness")
        .value()
}

#[test]
fn inches_show_and_take_inches_and_the_design_stays_in_millimetres() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    let d0 = h.state().design().clone();
    // The demo strip is 0.25 mm thick (the built-in demo, README's sample).
    assert_eq!(d0.strip.thickness_mm, 0.25);
    assert_eq!(thickness_field(&h), Some("0.25".to_string()));

    choose(&mut h, "Units: in, lbf, ksi");
    assert_eq!(h.state().session().units, UnitSystem::Inch);
    // 0.25 mm / 25.4 = 0.00984 in, shown to four decimals (NIST SP 811 Appendix B).
    assert_eq!(thickness_field(&h), Some("0.0098".to_string()));
    // Only displaying does not write: the design is untouched and nothing is unsaved.
    assert_eq!(*h.state().design(), d0);
    assert!(!h.state().is_dirty());
    // The margins of length checks and the state table read in inches, forces in lbf.
    // (The panel's labels: e.g. "margin +0.4567 in" and "... 12.345 lbf".)
    assert!(h.query_all_by_label_contains(" in").count() > 3);
    assert!(h.query_all_by_label_contains(" lbf").count() > 3);
    assert!(h.query_all_by_label_contains(" MPa").next().is_none());
    let metric: Vec<String> = h
        .query_all_by_label_contains(" mm")
        .map(|n| format!("{n:?}"))
        .collect();
    assert!(metric.is_empty(), "{metric:?}");
    assert!(h.query_all_by_label_contains("margin +").next().is_some());

    // A typed inch value lands in the design in millimetres: 0.0100 in = 0.254 mm
    // (25.4 mm per inch, exact, NIST SP 811 Appendix B).
    h.get_by_role_and_label(Role::TextInput, "Thickness")
        .set_text_value_accesskit("0.0100");
    h.run();
    let t = h.state().design().strip.thickness_mm;
    assert!((t - 0.254).abs() < 1e-12, "{t}");
    // A refused entry says so in inches (the allowed range 0.02 to 5 mm of
    // design::limits(), divided by 25.4).
    h.get_by_role_and_label(Role::TextInput, "Thickness")
        .set_text_value_accesskit("0.3");
    h.run();
    assert!((h.state().design().strip.thickness_mm - 0.254).abs() < 1e-12);
    let said = "Thickness 0.3000 in is outside 0.0008 to 0.1969 in; kept 0.0100 in";
    assert!(h.query_by_label_contains(said).is_some(), "{said}");

    // Back to millimetres without an edit: the design is what the inch edit made it.
    let edited = h.state().design().clone();
    choose(&mut h, "Units: mm, N, MPa");
    assert_eq!(*h.state().design(), edited);
    assert_eq!(thickness_field(&h), Some("0.254".to_string()));

    // Switching units is not an edit: one undo takes back the thickness, not the units.
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    h.run();
    assert_eq!(*h.state().design(), d0);
    assert_eq!(h.state().session().units, UnitSystem::Metric);
}

/// The design map's range fields show inches over the axis's own millimetres.
#[test]
fn the_design_map_ranges_read_in_inches() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    choose(&mut h, "Units: in, lbf, ksi");
    h.get_by_label("Tools").click();
    h.run();
    h.get_by_label("Design map…").click();
    h.run_steps(3);
    let (x, _) = h
        .state()
        .map_view()
        .axes()
        .cloned()
        .unwrap_or_else(|| panic!("no axes"));
    assert_eq!(x.field, "strip.thickness_mm");
    // The first thickness of the range in inches (25.4 mm per inch, NIST SP 811).
    let want = x.from / 25.4;
    let shown: Vec<String> = h
        .query_all_by_role(Role::SpinButton)
        .filter_map(|n| n.value())
        .collect();
    let read = shown.iter().find_map(|v| {
        v.strip_prefix("from ")?
            .strip_suffix(" in")?
            .parse::<f64>()
            .ok()
    });
    // Shown to about five significant figures.
    assert!(
        read.is_some_and(|r| (r / want - 1.0).abs() < 1e-4),
        "{want} in {shown:?}"
    );
    // The axes stay in the file's field units: only the display changed.
    assert!(x.from > 0.01 && x.from < 1.0, "{}", x.from);
}

/// The exports follow the display: CSV columns named in inches with the values divided by
/// 25.4 (NIST SP 811, Appendix B), SVG axes titled in inches.
#[test]
fn exports_in_inches() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let out = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    choose(&mut h, "Units: in, lbf, ksi");
    h.get_by_role_and_label(Role::Button, "Tools").click();
    h.run();
    h.get_by_role_and_label(Role::Button, "Export plots and tables…")
        .click();
    h.run();
    let base = out.path().join("demo");
    h.get_by_role_and_label(Role::TextInput, "Files start with")
        .set_text_value_accesskit(base.to_str().unwrap_or_else(|| panic!("utf-8 path")));
    h.run();
    h.get_by_role_and_label(Role::Button, "Export all").click();
    h.run();
    let read = |ending: &str| {
        std::fs::read_to_string(out.path().join(format!("demo{ending}")))
            .unwrap_or_else(|e| panic!("{ending}: {e}"))
    };
    let window = read("-window.csv");
    assert_eq!(
        window.lines().next(),
        Some(
            "bore_in,first_contact_stroke_in,holding_stroke_in,stress_limit_stroke_in,line_contact_stroke_in,limit_stroke_in"
        )
    );
    let a = h
        .state()
        .analysis()
        .unwrap_or_else(|| panic!("no analysis"));
    let first: Vec<f64> = window
        .lines()
        .nth(1)
        .unwrap_or_else(|| panic!("no rows"))
        .split(',')
        .map(|c| c.parse().unwrap_or(f64::NAN))
        .collect();
    let bore_mm = a.window[0].bore_mm;
    assert!((first[0] * 25.4 / bore_mm - 1.0).abs() < 1e-12, "{first:?}");
    let curve = read("-curve.csv");
    assert!(
        curve.starts_with("stroke_in,phase,axial_force_per_strip_lbf,"),
        "{}",
        &curve[..80.min(curve.len())]
    );
    assert!(read("-forces.svg").contains("force, lbf"));
    assert!(read("-stress.svg").contains("stress, ksi"));
    assert!(read("-window.svg").contains("stroke, in"));
}

#[test]
fn the_choice_is_kept_in_the_session() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    {
        let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
        h.run();
        choose(&mut h, "Units: in, lbf, ksi");
    }
    // The session file holds it; a new start shows inches at once.
    assert_eq!(Session::load(state.path()).units, UnitSystem::Inch);
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    assert_eq!(thickness_field(&h), Some("0.0098".to_string()));
    // The design file never carries the choice (it is not a field of the design).
    let ron = bowgrip::design::to_ron(h.state().design()).unwrap_or_else(|e| panic!("{e}"));
    assert!(!ron.contains("Inch") && !ron.contains("units"));
}
