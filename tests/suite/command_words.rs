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

/// `bowgrip completions SHELL` prints a script naming every sub-command; the bash one is
/// valid bash (`bash -n`, the shell's own syntax check) and registers itself with `complete`.
#[test]
fn completion_scripts_name_every_sub_command() {
    for shell in ["bash", "zsh", "fish"] {
        let out = run(&["completions", shell]);
        assert!(
            out.status.success(),
            "{shell}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        let script = String::from_utf8_lossy(&out.stdout).to_string();
        for name in [
            "point", "sweep", "bores", "check", "sheet", "compare", "map",
        ] {
            assert!(script.contains(name), "{shell} script lacks {name}");
        }
        if shell == "bash" {
            assert!(script.contains("complete -F _bowgrip"), "{script}");
            let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
            let file = dir.path().join("bowgrip.bash");
            std::fs::write(&file, &script).unwrap_or_else(|e| panic!("{e}"));
            let check = std::process::Command::new("bash")
                .arg("-n")
                .arg(&file)
                .output()
                .unwrap_or_else(|e| panic!("bash: {e}"));
            assert!(
                check.status.success(),
                "{}",
                String::from_utf8_lossy(&check.stderr)
            );
        }
    }
    // An unknown shell is refused with the allowed values.
    let bad = run(&["completions", "tcsh"]);
    assert_eq!(bad.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&bad.stderr).contains("bash"));
}

/// `bores` without a range runs over the design's own tolerance band: the riser sample is
/// NPS 2 Schedule 40 (OD 60.3 mm, wall 3.91 mm, ASME B36.10M: bore 52.48 mm) with -0.2/+0.4
/// mm, so 21 bores from 52.28 to 52.88 mm (issue 16, item 8).
#[test]
fn bores_defaults_to_the_design_tolerance_band() {
    let sample = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join("riser-climber-2in-sch40.ron");
    let sample = sample.to_str().expect("utf-8 path");
    let out = run(&["bores", sample, "--csv"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8_lossy(&out.stdout).to_string();
    let bores: Vec<f64> = text
        .lines()
        .skip(1)
        .map(|l| {
            l.split(',')
                .next()
                .and_then(|c| c.parse().ok())
                .expect("a bore")
        })
        .collect();
    assert_eq!(bores.len(), 21);
    assert!(
        (bores[0] - 52.28).abs() < 1e-9 && (bores[20] - 52.88).abs() < 1e-9,
        "{bores:?}"
    );
    // One end given: the other still comes from the design.
    let out = run(&[
        "bores",
        sample,
        "--from-mm",
        "52.0",
        "--points",
        "3",
        "--csv",
    ]);
    let text = String::from_utf8_lossy(&out.stdout).to_string();
    let last: f64 = text
        .lines()
        .last()
        .and_then(|l| l.split(',').next())
        .and_then(|c| c.parse().ok())
        .expect("a bore");
    assert!((last - 52.88).abs() < 1e-9, "{text}");
}

/// `point` at a stroke past the actuator's maximum (the riser sample's lead screw: 5 turns
/// of a 1 mm lead, 5 mm) says so on stderr, while stdout keeps the state (issue 16, item 8).
#[test]
fn point_flags_a_stroke_past_the_actuator_travel() {
    let sample = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join("riser-climber-2in-sch40.ron");
    let sample = sample.to_str().expect("utf-8 path");
    let past = run(&["point", sample, "--stroke-mm", "5.5", "--json"]);
    assert!(past.status.success());
    let err = String::from_utf8_lossy(&past.stderr);
    assert!(
        err.contains("past the actuator's maximum stroke of 5 mm"),
        "{err}"
    );
    assert!(serde_json::from_slice::<serde_json::Value>(&past.stdout).is_ok());
    let within = run(&["point", sample, "--stroke-mm", "1.35", "--json"]);
    assert!(
        within.stderr.is_empty(),
        "{}",
        String::from_utf8_lossy(&within.stderr)
    );
}

/// Through a compliant drive the actuator's maximum is of travel: the torque-screw sample
/// cut to 2 turns of its 2 mm lead (4 mm of travel) with its 400 N/mm drive. At 2 mm of
/// stroke the strips pull so hard that the travel is about 5 mm (stroke + pull / stiffness,
/// springs in series): `point` says the actuator cannot reach it, though the stroke itself
/// is short of 4 mm; at 1 mm it says nothing.
#[test]
fn point_flags_a_stroke_whose_travel_is_past_the_actuator() {
    let sample = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join("water-main-tractor-torque-screw.ron");
    let text = std::fs::read_to_string(&sample).expect("the sample");
    assert!(text.contains("max_turns: 6.0"));
    let dir = tempfile::tempdir().expect("a temporary folder");
    let file = dir.path().join("two-turns.ron");
    std::fs::write(&file, text.replace("max_turns: 6.0", "max_turns: 2.0")).expect("written");
    let file = file.to_str().expect("utf-8 path");
    let past = run(&["point", file, "--stroke-mm", "2", "--json"]);
    assert!(past.status.success());
    let v: serde_json::Value = serde_json::from_slice(&past.stdout).expect("JSON");
    let travel = v["travel_mm"].as_f64().expect("a travel");
    assert!(travel > 4.0, "{travel}");
    let err = String::from_utf8_lossy(&past.stderr);
    assert!(
        err.contains(
            "of actuator travel through the drive's stretch, past the actuator's maximum of 4 mm"
        ),
        "{err}"
    );
    let within = run(&["point", file, "--stroke-mm", "1", "--json"]);
    assert!(
        within.stderr.is_empty(),
        "{}",
        String::from_utf8_lossy(&within.stderr)
    );
}
