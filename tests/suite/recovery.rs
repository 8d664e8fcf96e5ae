//! The app's recovery of unsaved work across crashes, driven through its commands without
//! a window (issue 11, items 1 to 3): a copy lives until restored or discarded, belongs to
//! one instance, is offered only when that instance is gone, and goes back to its file.

use std::fs;
use std::path::{Path, PathBuf};

use bowgrip::app::{Command, Gesture, GripApp, Recovery};
use bowgrip::design::{self, Design};

/// A design file in `dir` and the state folder beside it.
fn setup(dir: &Path) -> (PathBuf, PathBuf) {
    let file = dir.join("anchor.ron");
    design::save_atomic(&file, &Design::default()).unwrap_or_else(|e| panic!("{e}"));
    (file, dir.join("state"))
}

/// An app on `file` with one unsaved edit, its recovery copy written.
fn edited_app(state: &Path, file: &Path) -> (GripApp, Design) {
    let mut app = GripApp::new(state.to_path_buf(), Some(file.to_path_buf()));
    let mut d = app.design().clone();
    d.strip.free_length_mm = 84.0;
    app.push(Command::Edit(Box::new(d.clone()), Gesture::Done));
    app.apply();
    assert!(app.is_dirty());
    app.write_recovery();
    (app, d)
}

fn canonical(path: &Path) -> PathBuf {
    fs::canonicalize(path).unwrap_or_else(|e| panic!("{e}"))
}

#[test]
fn the_copy_survives_two_crashes_in_a_row_and_restores_into_its_file() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let (file, state) = setup(dir.path());
    let (app, edited) = edited_app(&state, &file);
    drop(app); // first crash: no on_close

    // The next start opens the same file from the command line; that must not clear the
    // copy, and it is offered with the file it belongs to.
    let second = GripApp::new(state.clone(), Some(file.clone()));
    assert!(second.is_offering_recovery());
    assert_eq!(second.recovery_source(), Some(canonical(&file).as_path()));
    drop(second); // second crash, before answering

    let mut third = GripApp::new(state.clone(), None);
    assert!(
        third.is_offering_recovery(),
        "the copy outlived two crashes"
    );
    third.push(Command::Restore);
    third.apply();
    assert_eq!(*third.design(), edited);
    assert_eq!(third.path(), Some(canonical(&file).as_path()));
    assert!(third.is_dirty());
    let status = third.status().map(|s| s.text.clone()).unwrap_or_default();
    assert!(
        status.contains(&canonical(&file).display().to_string()),
        "the status names the file: {status}"
    );
    // The old copy is gone only because this instance now holds the work.
    let copies = Recovery::copies(&state);
    assert_eq!(copies.len(), 1, "{copies:?}");
    assert_eq!(Some(copies[0].as_path()), third.recovery_path());
    // Saving writes the design the copy came from, and clears the copy.
    third.push(Command::Save);
    third.apply();
    assert_eq!(design::load(&file).ok(), Some(edited));
    assert!(Recovery::copies(&state).is_empty());
}

#[test]
fn deciding_later_keeps_the_copy_through_quitting() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let (file, state) = setup(dir.path());
    let (app, edited) = edited_app(&state, &file);
    drop(app);

    let mut later = GripApp::new(state.clone(), None);
    assert!(later.is_offering_recovery());
    later.push(Command::RecoveryLater);
    later.apply();
    assert!(!later.is_offering_recovery());
    later.push(Command::Quit);
    later.apply();
    later.on_close();
    drop(later);

    let mut next = GripApp::new(state.clone(), None);
    assert!(next.is_offering_recovery(), "the copy is offered again");
    next.push(Command::DropRecovery);
    next.apply();
    assert!(!next.is_offering_recovery());
    assert_ne!(*next.design(), edited, "discarding applies nothing");
    next.on_close();
    drop(next);
    assert!(Recovery::copies(&state).is_empty(), "discarded for good");
    assert!(!GripApp::new(state, None).is_offering_recovery());
}

#[test]
fn a_running_instance_copy_is_never_offered_to_another() {
    let dir = tempfile::tempdir().unwrap_or_else(|e| panic!("{e}"));
    let (file, state) = setup(dir.path());
    let (mut first, edited) = edited_app(&state, &file);
    let mut second = GripApp::new(state.clone(), Some(file.clone()));
    assert!(
        !second.is_offering_recovery(),
        "the first instance is alive"
    );
    // The second one's clean quit leaves the first one's copy alone.
    second.on_close();
    drop(second);
    let copies = Recovery::copies(&state);
    assert_eq!(copies.len(), 1);
    assert_eq!(Some(copies[0].as_path()), first.recovery_path());
    // Both copies of two crashed instances are kept; one is offered at a time.
    let (other, _) = edited_app(&state, &file);
    drop(other);
    first.write_recovery();
    drop(first);
    let mut next = GripApp::new(state.clone(), None);
    assert!(next.is_offering_recovery());
    next.push(Command::Restore);
    next.apply();
    next.on_close();
    assert!(
        GripApp::new(state, None).is_offering_recovery(),
        "the other copy waits"
    );
    let _ = edited;
}
