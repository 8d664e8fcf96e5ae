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

/// Issue 16, item 2: at 1280 x 720 and at 1680 x 1050 every plot lies inside the window
/// and left of the checks column (long headings are shortened, never widen their cell).
#[test]
fn every_plot_fits_beside_the_checks_at_two_window_sizes() {
    use egui::accesskit::Role;
    use egui_kittest::kittest::Queryable;
    let riser = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs/riser-climber-2in-sch40.ron");
    for size in [[1280.0, 720.0], [1680.0, 1050.0]] {
        let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
        let app = GripApp::new(state.path().to_path_buf(), Some(riser.clone()));
        let mut h = Harness::builder()
            .with_size(size)
            .build_ui_state(|ui, app: &mut GripApp| app.ui(ui), app);
        h.run();
        let checks_left = h
            .get_by_role_and_label(Role::Label, "Every check passes")
            .rect()
            .min
            .x;
        for (i, r) in h.state().plot_rects().iter().enumerate() {
            let r = r.unwrap_or_else(|| panic!("plot {i} not drawn at {size:?}"));
            assert!(r.width() > 150.0 && r.height() > 100.0, "plot {i}: {r:?}");
            assert!(
                r.max.x <= checks_left && r.max.y <= size[1],
                "plot {i} at {r:?} runs under the checks (from x = {checks_left}) at {size:?}"
            );
        }
    }
}

/// Issue 16, item 2: a long title typed into the design keeps the input panel's width (the
/// plots do not move).
#[test]
fn a_long_title_keeps_the_panels_in_place() {
    use egui::accesskit::Role;
    use egui_kittest::kittest::Queryable;
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let app = GripApp::new(state.path().to_path_buf(), None);
    let mut h = Harness::builder()
        .with_size([1280.0, 720.0])
        .build_ui_state(|ui, app: &mut GripApp| app.ui(ui), app);
    h.run();
    let before = h.state().plot_rects()[0].expect("window plot");
    h.get_by_role_and_label(Role::TextInput, "Title")
        .set_text_value_accesskit(&"A very long design title, ".repeat(7));
    h.run();
    h.run();
    let after = h.state().plot_rects()[0].expect("window plot");
    assert_eq!(h.state().design().title.len(), 26 * 7);
    assert_eq!(before.min.x, after.min.x, "{before:?} -> {after:?}");
}

/// Issue 16, item 1: the operating-stroke slider spans the strokes this design can use
/// (0 to the smaller of the actuator's maximum and the largest model limit of the three
/// bores), not the whole free length: on the riser sample that is under 2 mm of a 110 mm
/// strip, so a pixel of a 150 px slider is about a hundredth of a millimetre.
#[test]
fn the_stroke_slider_spans_the_usable_strokes() {
    use egui::accesskit::Role;
    use egui_kittest::kittest::{NodeT, Queryable};
    let riser = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs/riser-climber-2in-sch40.ron");
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let app = GripApp::new(state.path().to_path_buf(), Some(riser));
    let mut h = Harness::builder()
        .with_size([1680.0, 1050.0])
        .build_ui_state(|ui, app: &mut GripApp| app.ui(ui), app);
    h.run();
    let a = h.state().analysis().expect("an analysis");
    let limit = a
        .bores
        .iter()
        .filter_map(|b| b.row.limit_stroke_mm)
        .fold(0.0, f64::max);
    let expect = limit.min(a.segment.max_stroke_mm());
    assert!(expect < 0.05 * h.state().design().strip.free_length_mm);
    let slider = h.get_by_role_and_label(Role::Slider, "Operating stroke");
    let node = slider.accesskit_node();
    assert_eq!(node.min_numeric_value(), Some(0.0));
    assert_eq!(node.max_numeric_value(), Some(expect));
}

/// Issue 16, item 1: the operating stroke can be dragged on the force plot. The cursor
/// turns into a horizontal resize over the dashed line; dragging it 40 px to the right
/// raises the stroke, and one undo takes the whole drag back.
#[test]
fn the_operating_stroke_line_drags_on_the_force_plot() {
    let riser = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs/riser-climber-2in-sch40.ron");
    let state = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let app = GripApp::new(state.path().to_path_buf(), Some(riser));
    let mut h = Harness::builder()
        .with_size([1680.0, 1050.0])
        .build_ui_state(|ui, app: &mut GripApp| app.ui(ui), app);
    h.run();
    let before = h.state().design().operating();
    let plot = h.state().plot_rects()[1].expect("force plot");
    let y = plot.center().y;
    // Find the line by the cursor it shows.
    let mut line_x = None;
    let mut x = plot.left() + 40.0;
    while x < plot.right() - 10.0 {
        h.hover_at(egui::pos2(x, y));
        h.run();
        if h.output().platform_output.cursor_icon == egui::CursorIcon::ResizeHorizontal {
            line_x = Some(x);
            break;
        }
        x += 3.0;
    }
    let x = line_x.expect("the operating-stroke line shows a resize cursor");
    h.drag_at(egui::pos2(x, y));
    h.run();
    for step in 1..=4 {
        h.hover_at(egui::pos2(x + 10.0 * step as f32, y));
        h.run();
    }
    h.drop_at(egui::pos2(x + 40.0, y));
    h.run();
    let after = h.state().design().operating();
    let (bowgrip::design::Operating::Stroke(s0), bowgrip::design::Operating::Stroke(s1)) =
        (before, after)
    else {
        panic!("{before:?} -> {after:?}");
    };
    assert!(s1 > s0 + 0.05, "{s0} -> {s1}");
    h.key_press_modifiers(egui::Modifiers::COMMAND, egui::Key::Z);
    h.run();
    assert_eq!(
        h.state().design().operating(),
        before,
        "one undo takes the drag back"
    );
}
