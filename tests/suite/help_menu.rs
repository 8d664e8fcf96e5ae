//! The Help menu (issue 16, item 9 and item 11): the version and model summary, the safety
//! cautions, and the third-party licence notice built into the program.

use bowgrip::app::GripApp;
use egui::accesskit::Role;
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable;

#[test]
fn help_menu_shows_version_cautions_and_licences() {
    let state = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let mut h = Harness::builder()
        .with_size([1280.0, 720.0])
        .build_ui_state(
            |ui, app: &mut GripApp| app.ui(ui),
            GripApp::new(state.path().to_path_buf(), None),
        );
    h.run();
    h.get_by_role_and_label(Role::Button, "Help").click();
    h.run();
    h.get_by_role_and_label(Role::Button, "About bowgrip")
        .click();
    h.run();
    let version = format!("bowgrip {}", env!("CARGO_PKG_VERSION"));
    assert!(
        h.query_by_label(&version).is_some(),
        "no {version:?} heading"
    );
    h.get_by_role_and_label(Role::Button, "Help").click();
    h.run();
    h.get_by_role_and_label(Role::Button, "Third-party licences")
        .click();
    h.run();
    // The notice's first lines are in view: its heading and table header.
    assert!(h.query_by_label("# Third-party notices").is_some());
    assert!(
        h.query_by_label("| crate | version | licence | repository | texts |")
            .is_some()
    );
}
