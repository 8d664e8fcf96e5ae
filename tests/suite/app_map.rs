//! The design map window (issue #15) driven through egui_kittest: opened from the Tools
//! menu, its map (computed off the UI thread) is the `map` module's map of the design on
//! show, a click on a cell moves the design there as one undoable edit, and the map is
//! made again for the moved design.

use std::time::Duration;

use bowgrip::app::GripApp;
use bowgrip::map::{AxisSpec, MapSpec};
use egui::{Event, Key, Modifiers, PointerButton};
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;

fn harness(app: GripApp) -> Harness<'static, GripApp> {
    Harness::builder()
        .with_size([1500.0, 940.0])
        .build_ui_state(|ui, app: &mut GripApp| app.ui(ui), app)
}

/// Steps frames until the map on show is complete for the design on show. A bound on the
/// number of frames keeps a broken worker from hanging the suite; no time is asserted.
fn wait_for_map(h: &mut Harness<'static, GripApp>) {
    for _ in 0..6000 {
        h.step();
        let app = h.state();
        if let Some(e) = app.map_view().error() {
            panic!("the map was refused: {e}");
        }
        if app.map_view().is_complete_for(app.design()) {
            h.run();
            return;
        }
        std::thread::sleep(Duration::from_millis(10));
    }
    panic!("the map never completed");
}

fn axis(text: &str) -> AxisSpec {
    text.parse().unwrap_or_else(|e| panic!("{text}: {e}"))
}

#[test]
fn a_click_on_the_map_moves_the_design_and_undo_restores_it() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    h.get_by_label("Tools").click();
    h.run();
    h.get_by_label("Design map…").click();
    // The default map now runs on its worker, which asks for repaints as pictures come:
    // a few frames, not a settled UI, are what this step needs.
    h.run_steps(3);
    assert!(h.state().map_view().open, "the Tools menu opens the map");
    // The window opens on axes around the design's own values.
    let (x0, y0) = h
        .state()
        .map_view()
        .axes()
        .cloned()
        .unwrap_or_else(|| panic!("no axes"));
    let demo = h.state().design().clone();
    assert_eq!(x0.field, "strip.thickness_mm");
    assert!(x0.from < demo.strip.thickness_mm && demo.strip.thickness_mm < x0.to);
    assert!(y0.from < demo.strip.free_length_mm && demo.strip.free_length_mm < y0.to);

    // A small grid, so a debug build finishes it quickly.
    let (x, y) = (
        axis("strip.thickness_mm:0.2:0.3:5"),
        axis("strip.free_length_mm:80:100:5"),
    );
    h.state_mut().map_view_mut().set_axes(x.clone(), y.clone());
    wait_for_map(&mut h);
    let d0 = h.state().design().clone();
    assert_eq!(d0, demo, "opening the map changes nothing");
    // The window shows what the map module computes for this design (whose cells the
    // map tests hold equal to `check`, the project's contract).
    let want = MapSpec::new(&d0, &x, &y)
        .and_then(|s| s.compute_all())
        .unwrap_or_else(|e| panic!("{e}"));
    let shown = h
        .state()
        .map_view()
        .map()
        .cloned()
        .unwrap_or_else(|| panic!("no map"));
    assert_eq!(
        shown.cells().collect::<Vec<_>>(),
        want.cells().collect::<Vec<_>>()
    );
    assert!(
        h.query_by_label_contains("25 designs, every one checked")
            .is_some(),
        "the progress bar says the map is done"
    );
    assert!(
        h.query_by_label("hold").is_some(),
        "the legend names the checks"
    );

    // Click the cell at thickness index 1, free length index 3.
    let pos = h
        .state()
        .map_view()
        .cell_screen_pos(1, 3)
        .unwrap_or_else(|| panic!("the cell was not drawn"));
    h.event(Event::PointerMoved(pos));
    for pressed in [true, false] {
        h.event(Event::PointerButton {
            pos,
            button: PointerButton::Primary,
            pressed,
            modifiers: Modifiers::NONE,
        });
    }
    // The move starts a new map, whose worker asks for repaints: frames, not a settled UI.
    h.run_steps(2);
    let moved = h.state().design().clone();
    let mut expected = d0.clone();
    expected.strip.thickness_mm = shown.x.values[1];
    expected.strip.free_length_mm = shown.y.values[3];
    assert_eq!(
        moved, expected,
        "only the two axis fields moved, to the cell's values"
    );
    assert!(h.state().is_dirty());

    // The map is made again for the moved design, which it marks.
    wait_for_map(&mut h);
    let again = h
        .state()
        .map_view()
        .map()
        .cloned()
        .unwrap_or_else(|| panic!("no map"));
    assert_eq!(again.x.current, moved.strip.thickness_mm);
    assert_eq!(again.y.current, moved.strip.free_length_mm);

    // One undo step restores the design.
    h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
    h.run_steps(2);
    assert_eq!(*h.state().design(), d0);
    assert!(!h.state().is_dirty());
}

#[test]
fn an_axis_whose_field_goes_returns_to_a_default_field() {
    // A map over the lead screw's lead: when the design changes to a direct pull, that
    // field is gone, and the axis goes back to a default field instead of leaving the
    // window empty (the fields a map can vary are the design's own, issue #15).
    use bowgrip::app::{Command, Gesture};
    use bowgrip::design::Actuator;
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let mut h = harness(GripApp::new(state.path().to_path_buf(), None));
    h.run();
    h.state_mut().map_view_mut().open = true;
    h.state_mut().map_view_mut().set_axes(
        axis("actuator.lead_mm:0.5:2:4"),
        axis("strip.thickness_mm:0.2:0.3:3"),
    );
    wait_for_map(&mut h);
    let mut d = h.state().design().clone();
    d.actuator = Actuator::Direct {
        max_force_n: 2000.0,
        max_stroke_mm: 8.0,
        stiffness_n_per_mm: None,
    };
    h.state_mut()
        .push(Command::Edit(Box::new(d), Gesture::Done));
    h.run_steps(2);
    let (x, y) = h
        .state()
        .map_view()
        .axes()
        .cloned()
        .unwrap_or_else(|| panic!("no axes"));
    assert_eq!(y.field, "strip.thickness_mm", "the field still there stays");
    assert_eq!(
        x.field, "strip.free_length_mm",
        "the lost one takes a default"
    );
    assert!(h.state().map_view().error().is_none());
    wait_for_map(&mut h);
}
