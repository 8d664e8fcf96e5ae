//! A mistyped sub-command is named as such instead of opening the app on a file of that name
//! (issue 16, item 8).

use assert_cmd::Command;

fn run(args: &[&str]) -> std::process::Output {
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    Command::cargo_bin("bowgrip")
        .unwrap_or_else(|e| panic!("{e}"))
        .current_dir(dir.path())
        .env_remove("DISPLAY")
        .env_remove("WAYLAND_DISPLAY")
        .args(args)
        .output()
        .unwrap_or_else(|e| panic!("{e}"))
}

#[test]
fn a_mistyped_sub_command_says_so_with_the_nearest_name() {
    let out = run(&["chek"]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(err.contains("'chek' is not a sub-command"), "{err}");
    assert!(err.contains("Did you mean 'check'?"), "{err}");
    assert!(!err.contains("window"), "the app was not opened: {err}");
    // A word far from every name still gets the list.
    let far = String::from_utf8_lossy(&run(&["frobnicate"]).stderr).to_string();
    assert!(far.contains("The sub-commands are point, sweep"), "{far}");
}

#[test]
fn the_no_display_message_has_no_source_path() {
    // A design file name (with its extension) still goes to the app, which cannot open a
    // window here: the one-line message names the cause without a dependency's source path.
    let out = run(&["missing.ron"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(!err.contains(".rs:"), "{err}");
}
