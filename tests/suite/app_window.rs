//! The window as a desktop program keeps it (issue 16, item 9): its place and size are
//! remembered in the platform's state folder and the next start opens there.

use bowgrip::app::GripApp;
use egui_kittest::Harness;

/// A harness at `size` points whose frames report the window's outer and inner rectangles,
/// as eframe does on a desktop.
fn run_at(app: GripApp, size: [f32; 2], at: [f32; 2]) -> GripApp {
    let mut h = Harness::builder().with_size(size).build_ui_state(
        |ui, app: &mut GripApp| {
            app.ui(ui);
            app.note_window_place(ui.ctx());
        },
        app,
    );
    let inner = egui::Rect::from_min_size(egui::pos2(at[0], at[1] + 30.0), size.into());
    let outer = egui::Rect::from_min_max(egui::pos2(at[0], at[1]), inner.max);
    let input = h.input_mut();
    let id = input.viewport_id;
    let v = input.viewports.entry(id).or_default();
    v.inner_rect = Some(inner);
    v.outer_rect = Some(outer);
    h.run();
    h.into_state()
}

#[test]
fn the_window_opens_where_it_was_closed() {
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let first = GripApp::new(state.path().to_path_buf(), None);
    // A first start has no stored place: the default size, placed by the system.
    let v = first.initial_viewport();
    assert_eq!(v.inner_size, Some(egui::vec2(1500.0, 940.0)));
    assert_eq!(v.position, None);

    let mut closed = run_at(first, [1280.0, 720.0], [64.0, 48.0]);
    closed.on_close();

    let again = GripApp::new(state.path().to_path_buf(), None);
    let v = again.initial_viewport();
    assert_eq!(v.inner_size, Some(egui::vec2(1280.0, 720.0)));
    assert_eq!(v.position, Some(egui::pos2(64.0, 48.0)));
    assert!(v.title.as_deref().is_some_and(|t| t.contains("bowgrip")));
}
