//! Actuation as built (issue 12): force-set and torque-limited drives, cord stretch and
//! snap-through, each check naming its source.

use std::path::{Path, PathBuf};

use bowgrip::actuation::{self, Drive, Unreached};
use bowgrip::checks::{self, CheckId};
use bowgrip::design::{self, Actuator, Design, Operating};
use bowgrip::segment::Segment;

fn sample(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-designs")
        .join(name)
}

fn load(name: &str) -> Design {
    let path = sample(name);
    design::load(&path).unwrap_or_else(|e| panic!("{}", e.in_file(&path)))
}

fn segment(d: &Design) -> Segment {
    Segment::new(d).unwrap_or_else(|e| panic!("{e}"))
}

const OLD_SAMPLES: [&str; 3] = [
    "riser-climber-2in-sch40.ron",
    "duct-anchor-150mm-stainless.ron",
    "drain-crawler-anchor-100mm.ron",
];

/// One check as printed before: id, pass, margin, stroke (mm).
type Before = (&'static str, bool, f64, f64);

/// `check --json` of the three samples as the program printed it before actuation existed
/// (id, pass, margin, stroke), taken from the outputs kept for the regression tool
/// (`../shared/baseline/baseline.json`, made at commit ac7c9db).
const BEFORE: [(&str, [Before; 8]); 3] = [
    (
        "drain-crawler-anchor-100mm.ron",
        [
            ("fit", true, 18.5, 0.0),
            ("reach", true, 60.50238732942436, 2.3294657423715033),
            ("hold", true, 0.23015637156388946, 3.2),
            ("static", false, -0.26647308189832597, 3.2),
            ("fatigue", false, -0.3899029360895788, 3.2),
            ("actuator", false, -0.7267128013665267, 3.2),
            ("stroke", true, 0.615381240988139, 3.2),
            ("hub", true, 19.48023074035522, 0.0),
        ],
    ),
    (
        "duct-anchor-150mm-stainless.ron",
        [
            ("fit", true, 22.5, 0.0),
            ("reach", true, 22.33549993888362, 2.664500061116381),
            ("hold", true, 0.3320491913227084, 3.8),
            ("static", true, 0.4831444191767049, 3.8),
            ("fatigue", true, 0.34654274415830444, 3.8),
            ("actuator", true, 0.5282459018316132, 3.8),
            ("stroke", true, 0.6647465339527958, 3.8),
            ("hub", true, 29.705627484771405, 0.0),
        ],
    ),
    (
        "riser-climber-2in-sch40.ron",
        [
            ("fit", true, 9.279999999999994, 0.0),
            ("reach", true, 3.924173856475396, 1.075826143524604),
            ("hold", true, 0.6082451659014432, 1.35),
            ("static", true, 1.127409714280848, 1.35),
            ("fatigue", true, 0.42039818976595056, 1.35),
            ("actuator", true, 1.4422710644062149, 1.35),
            ("stroke", true, 0.4715445162560976, 1.35),
            ("hub", true, 1.1820693123826622, 0.0),
        ],
    ),
];

/// Regression (the program's own outputs before this change): a rigid drive under
/// `Stroke` reproduces them, in either spelling of the operating point, with the eight
/// checks of before and no ninth.
#[test]
fn stroke_mode_with_a_rigid_drive_reproduces_the_outputs_before() {
    for (name, before) in BEFORE {
        let old = load(name);
        assert!(!old.uses_actuation(), "{name}");
        let Some(stroke) = old.operating_stroke_mm else {
            panic!("{name} spells the old field");
        };
        let mut new = old.clone();
        new.operating_stroke_mm = None;
        new.operating = Some(Operating::Stroke(stroke));
        new.validate().unwrap_or_else(|e| panic!("{name}: {e}"));
        let (seg_old, seg_new) = (segment(&old), segment(&new));
        let list = checks::run(&seg_old);
        assert_eq!(list, checks::run(&seg_new), "{name}");
        assert_eq!(list.len(), 8, "{name}");
        for ((id, pass, margin, at), c) in before.iter().zip(&list) {
            assert_eq!(c.id.as_str(), *id, "{name}");
            assert_eq!(c.pass, *pass, "{name} {id}");
            let m = c.margin.unwrap_or(f64::NAN);
            assert!(
                (m - margin).abs() <= 1e-9 * margin.abs().max(1.0),
                "{name} {id}: {m} vs {margin}"
            );
            assert_eq!(c.stroke_mm, Some(*at), "{name} {id}");
        }
        // The operating state is the state at the set stroke, bit for bit, and the actuator
        // travel is the stroke.
        for bore in [seg_old.bore_smallest_mm, seg_old.bore_largest_mm] {
            let path = seg_old.at_bore(bore).unwrap_or_else(|e| panic!("{e}"));
            let op = actuation::operating_state(&path);
            assert_eq!(op.state, path.state(stroke), "{name} {bore}");
            assert_eq!(op.stroke_mm, Some(stroke));
            assert_eq!(op.travel_mm, Some(stroke));
        }
    }
}

/// Springs in series (common practice): for a linear stand-in segment of stiffness `k_s`
/// (pull `k_s x stroke`) behind a cord of stiffness `k_c`, the actuator travels
/// `stroke + pull / k_c`, and the pair is one spring of `1/k = 1/k_c + 1/k_s`.
#[test]
fn a_compliant_drive_adds_its_stretch_like_springs_in_series() {
    let (k_s, k_c) = (250.0, 80.0);
    let drive = Drive {
        operating: Operating::Stroke(0.0),
        set_pull_n: None,
        stiffness_n_per_mm: Some(k_c),
    };
    let combined = 1.0 / (1.0 / k_c + 1.0 / k_s);
    for stroke in [0.1, 0.5, 1.0, 2.5, 7.0] {
        let pull = k_s * stroke;
        let travel = drive.travel_mm(stroke, pull);
        assert!((travel - (stroke + pull / k_c)).abs() <= 1e-12 * travel);
        // pull over travel: the series stiffness.
        assert!(
            (pull / travel - combined).abs() <= 1e-12 * combined,
            "{} vs {combined}",
            pull / travel
        );
    }
    // A rigid drive travels the stroke itself.
    let rigid = Drive {
        stiffness_n_per_mm: None,
        ..drive
    };
    assert_eq!(rigid.travel_mm(1.25, 400.0), 1.25);

    // The same law on the real segment, locally: d travel / d pull = 1/k_s + 1/k_c with
    // k_s the segment's own stiffness there (central differences, common practice).
    let mut d = load("riser-climber-2in-sch40.ron");
    d.actuator.set_stiffness_n_per_mm(Some(k_c));
    let seg = segment(&d);
    let path = seg
        .at_bore(seg.bore_nominal_mm)
        .unwrap_or_else(|e| panic!("{e}"));
    let stroke = 1.3;
    let h = 1e-4;
    let pull = |s: f64| actuation::pull_n(&path, s).unwrap_or(f64::NAN);
    let travel = |s: f64| actuation::travel_at_mm(&path, s);
    let k_seg = (pull(stroke + h) - pull(stroke - h)) / (2.0 * h);
    let k_pair = (pull(stroke + h) - pull(stroke - h)) / (travel(stroke + h) - travel(stroke - h));
    let expect = 1.0 / (1.0 / k_c + 1.0 / k_seg);
    assert!(k_seg > 0.0, "rising branch: {k_seg}");
    assert!(
        (k_pair - expect).abs() <= 1e-6 * expect,
        "{k_pair} vs {expect}"
    );
    // And the actuator's own position (screw turns) counts the travel.
    let state = path.state(stroke);
    let (Some(p), Some(reading)) = (state.actuator_force_n, state.actuator) else {
        panic!("a state at 1.3 mm");
    };
    let Actuator::LeadScrew { lead_mm, .. } = d.actuator else {
        panic!("the riser sample has a lead screw");
    };
    assert!((reading.position - (stroke + p / k_c) / lead_mm).abs() <= 1e-12 * reading.position);
}

/// A design whose pull peaks before the model's limit: a large gap, g/L = 0.34, where the
/// point-contact branch turns before line contact (mechanics note, section 4).
fn peaking_design() -> Design {
    let mut d = Design::default();
    d.bore.minus_mm = 0.0;
    d.bore.plus_mm = 0.0;
    let seg = segment(&d);
    d.bore.diameter_mm = seg.bore_for_gap_mm(0.34 * d.strip.free_length_mm);
    d.end_plate_diameter_mm = 0.0;
    d
}

/// Snap under displacement control through a spring (Bazant and Cedolin, Stability of
/// Structures, from memory): the segment jumps where `d travel / d stroke` falls to zero,
/// that is where its own stiffness equals `-k_c`. Checked on a design whose pull peaks,
/// against a finite-difference search of a fine sweep.
#[test]
fn a_compliant_drive_under_position_control_snaps_where_the_segment_stiffness_is_minus_k_c() {
    let d = peaking_design();
    let seg = segment(&d);
    let path = seg
        .at_bore(seg.bore_nominal_mm)
        .unwrap_or_else(|e| panic!("{e}"));
    let Some((peak, peak_pull)) = actuation::pull_peak(&path) else {
        panic!("the pull peaks at g/L 0.34");
    };
    let limit = path.limit_stroke_mm();
    assert!(peak < limit && peak_pull > 0.0);
    // A fine sweep from the peak to the limit, slopes by forward differences.
    const N: usize = 20_000;
    let step = (limit - peak) / N as f64;
    let strokes: Vec<f64> = (0..=N).map(|i| peak + step * i as f64).collect();
    let pulls: Vec<f64> = strokes
        .iter()
        .map(|&s| actuation::pull_n(&path, s).unwrap_or(f64::NAN))
        .collect();
    let slopes: Vec<f64> = pulls.windows(2).map(|w| (w[1] - w[0]) / step).collect();
    let steepest = slopes.iter().copied().fold(f64::INFINITY, f64::min);
    assert!(steepest < 0.0, "the pull falls past its peak: {steepest}");
    for share in [0.3, 0.6, 0.9] {
        let k_c = -share * steepest;
        let Some(i) = slopes.iter().position(|&s| s <= -k_c) else {
            panic!("the sweep finds the crossing for {share}");
        };
        let Some(flagged) = actuation::snap_stroke_mm(&path, k_c) else {
            panic!("a snap is flagged for k_c {k_c}");
        };
        assert!(
            flagged >= strokes[i] - 2.0 * step && flagged <= strokes[i + 1] + 2.0 * step,
            "share {share}: flagged {flagged}, sweep {}..{}",
            strokes[i],
            strokes[i + 1]
        );
        let own = actuation::segment_stiffness_n_per_mm(&path, flagged).unwrap_or(f64::NAN);
        assert!(
            (own + k_c).abs() <= 1e-3 * k_c,
            "share {share}: stiffness {own} vs {}",
            -k_c
        );
    }
    // A drive stiffer than the steepest fall never lets go.
    assert_eq!(actuation::snap_stroke_mm(&path, -2.0 * steepest), None);

    // The stable check says so: past the snap under position control it fails, short of
    // it it passes.
    let k_c = -0.6 * steepest;
    let Some(snap) = actuation::snap_stroke_mm(&path, k_c) else {
        panic!("a snap");
    };
    for (stroke, pass) in [(0.5 * (peak + snap), true), (0.5 * (snap + limit), false)] {
        let mut d = d.clone();
        d.operating_stroke_mm = Some(stroke);
        d.actuator.set_stiffness_n_per_mm(Some(k_c));
        let list = checks::run(&segment(&d));
        let Some(stable) = list.iter().find(|c| c.id == CheckId::Stable) else {
            panic!("a stable check with a compliant drive");
        };
        assert_eq!(stable.pass, pass, "{}", stable.reason);
        // Capacity over demand: the snap stroke over the operating stroke, minus one.
        let margin = stable.margin.unwrap_or(f64::NAN);
        assert!((margin - (snap / stroke - 1.0)).abs() <= 1e-9, "{margin}");
    }
}

/// The generic jump search on a softening stand-in with a known answer: pull
/// `k_s x - c x^2`, stiffness `k_s - 2 c x`, which equals `-k_c` at
/// `x = (k_s + k_c) / (2 c)` (Bazant and Cedolin, from memory; the algebra by hand).
#[test]
fn the_jump_search_finds_the_analytic_stroke_on_a_softening_stand_in() {
    let (k_s, c, k_c) = (300.0, 40.0, 90.0);
    let slope = |x: f64| Some(k_s - 2.0 * c * x);
    let peak = k_s / (2.0 * c);
    let Some(x) = actuation::first_jump(slope, peak, 20.0, k_c) else {
        panic!("the stand-in softens past -k_c before 20 mm");
    };
    let expect = (k_s + k_c) / (2.0 * c);
    assert!((x - expect).abs() <= 1e-12 * expect, "{x} vs {expect}");
    assert_eq!(actuation::first_jump(slope, peak, 4.0, k_c), None);
}

/// Under `Pull`, the stroke reported at each bore gives back the set pull to 1e-9 (the
/// definition of the force-set operating point, mechanics note).
#[test]
fn under_pull_the_operating_stroke_gives_back_the_set_pull() {
    for name in OLD_SAMPLES {
        let base = load(name);
        let seg = segment(&base);
        let (lo, hi) = (seg.bore_smallest_mm, seg.bore_largest_mm);
        // Set pulls between the strips' buckling load at rest and the pull at the limit
        // of the largest bore.
        let path = seg.at_bore(hi).unwrap_or_else(|e| panic!("{e}"));
        let rest = actuation::pull_n(&path, 0.0).unwrap_or(f64::NAN);
        let top = actuation::pull_n(&path, 0.98 * path.limit_stroke_mm()).unwrap_or(f64::NAN);
        for t in [0.05, 0.3, 0.6, 0.95] {
            let set = rest + t * (top - rest);
            let mut d = base.clone();
            d.set_operating(Operating::Pull(set));
            let seg = segment(&d);
            for i in 0..=10 {
                let bore = lo + (hi - lo) * i as f64 / 10.0;
                let path = seg.at_bore(bore).unwrap_or_else(|e| panic!("{e}"));
                let op = actuation::operating_state(&path);
                let Some(stroke) = op.stroke_mm else {
                    panic!("{name} {bore}: {:?}", op.unreached);
                };
                let back = path.state(stroke).actuator_force_n.unwrap_or(f64::NAN);
                assert!(
                    (back - set).abs() <= 1e-9 * set,
                    "{name} bore {bore}: {back} vs {set}"
                );
                // The first stroke: a little less pulls less.
                let before = actuation::pull_n(&path, 0.999 * stroke).unwrap_or(f64::NAN);
                assert!(before < set, "{name} bore {bore}");
            }
        }
    }
}

/// A torque maps to a pull through the screw, `F = 2 pi eff T / lead` (Shigley, Mechanical
/// Engineering Design, power screws, from memory), and through a spool, `F = T / r`.
#[test]
fn a_set_torque_pulls_through_the_screw_or_the_spool() {
    let d = load("water-main-tractor-torque-screw.ron");
    let Operating::Torque(t) = d.operating() else {
        panic!("the sample sets a torque");
    };
    let Actuator::LeadScrew {
        lead_mm,
        efficiency,
        ..
    } = d.actuator
    else {
        panic!("the sample has a lead screw");
    };
    let seg = segment(&d);
    let drive = Drive::of(&seg);
    let expect = 2.0 * std::f64::consts::PI * efficiency * t / (lead_mm * 1e-3);
    assert_eq!(drive.set_pull_n, Some(expect));
    let spool = Actuator::Spool {
        radius_mm: 8.0,
        max_torque_nm: 2.0,
        max_angle_deg: 720.0,
        stiffness_n_per_mm: None,
    };
    assert!((spool.pull_n_at(0.4) - 50.0).abs() <= 1e-12);
    // Every bore of the tolerance band reaches the set pull, each at its own stroke, and
    // the stroke grows with the bore.
    let mut last = 0.0;
    for i in 0..=8 {
        let bore =
            seg.bore_smallest_mm + (seg.bore_largest_mm - seg.bore_smallest_mm) * i as f64 / 8.0;
        let path = seg.at_bore(bore).unwrap_or_else(|e| panic!("{e}"));
        let op = actuation::operating_state(&path);
        let stroke = op.stroke_mm.unwrap_or(f64::NAN);
        assert!(stroke > last, "bore {bore}: {stroke}");
        last = stroke;
        let pull = op.state.actuator_force_n.unwrap_or(f64::NAN);
        assert!((pull - expect).abs() <= 1e-9 * expect);
        // Through the 400 N/mm tie rod the screw travels stroke + pull / k_c.
        let k = d.actuator.stiffness_n_per_mm().unwrap_or(f64::NAN);
        let travel = op.travel_mm.unwrap_or(f64::NAN);
        assert!((travel - (stroke + pull / k)).abs() <= 1e-12 * travel);
    }
    // The sample passes every check, the stable check included.
    let list = checks::run(&seg);
    assert!(checks::all_pass(&list), "{list:#?}");
    assert_eq!(list.last().map(|c| c.id), Some(CheckId::Stable));
}

/// Past a pull peak the segment snaps under force control (mechanics note): a set pull
/// above the peak is never reached, the bore is named, and the stable check fails; one
/// below it is reached on the rising branch.
#[test]
fn a_set_pull_above_the_peak_is_never_reached_and_is_unstable() {
    let d = peaking_design();
    let seg = segment(&d);
    let path = seg
        .at_bore(seg.bore_nominal_mm)
        .unwrap_or_else(|e| panic!("{e}"));
    let Some((peak_stroke, peak)) = actuation::pull_peak(&path) else {
        panic!("the pull peaks");
    };
    let mut above = d.clone();
    above.set_operating(Operating::Pull(1.01 * peak));
    let seg_above = segment(&above);
    let path = seg_above
        .at_bore(seg_above.bore_nominal_mm)
        .unwrap_or_else(|e| panic!("{e}"));
    let op = actuation::operating_state(&path);
    assert_eq!(op.stroke_mm, None);
    assert!(matches!(op.unreached, Some(Unreached::PastPeak { .. })));
    let list = checks::run(&seg_above);
    let Some(stable) = list.iter().find(|c| c.id == CheckId::Stable) else {
        panic!("a stable check under force control");
    };
    assert!(!stable.pass);
    assert!(stable.reason.contains("snaps through"), "{}", stable.reason);
    let Some(hold) = list.iter().find(|c| c.id == CheckId::Hold) else {
        panic!("a hold check");
    };
    assert!(
        !hold.pass && hold.reason.contains("never reached"),
        "{}",
        hold.reason
    );

    let mut below = d.clone();
    below.set_operating(Operating::Pull(0.99 * peak));
    let seg_below = segment(&below);
    let path = seg_below
        .at_bore(seg_below.bore_nominal_mm)
        .unwrap_or_else(|e| panic!("{e}"));
    let op = actuation::operating_state(&path);
    let Some(stroke) = op.stroke_mm else {
        panic!("reached below the peak");
    };
    assert!(stroke < peak_stroke);
    let s = actuation::stability(&path, &op);
    assert!(s.stable && s.snap_stroke_mm == Some(peak_stroke));
}

// ---------------------------------------------------------------- the design file

/// The old spelling loads as `Stroke`, the new ones load, and both at once is refused at
/// the place of `operating`, with what to do.
#[test]
fn the_operating_point_is_given_once() {
    let text = std::fs::read_to_string(sample("riser-climber-2in-sch40.ron"))
        .unwrap_or_else(|e| panic!("{e}"));
    let old = design::parse(&text).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(old.operating(), Operating::Stroke(1.35));
    let new = text.replace("operating_stroke_mm: 1.35,", "operating: Stroke(1.35),");
    let d = design::parse(&new).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(d.operating(), Operating::Stroke(1.35));
    let pull = text.replace("operating_stroke_mm: 1.35,", "operating: Pull(600.0),");
    assert_eq!(
        design::parse(&pull).map(|d| d.operating()).ok(),
        Some(Operating::Pull(600.0))
    );

    let both = text.replace(
        "operating_stroke_mm: 1.35,",
        "operating_stroke_mm: 1.35,\n    operating: Pull(600.0),",
    );
    let e = design::parse(&both)
        .err()
        .map(|e| e.to_string())
        .unwrap_or_default();
    let line = both
        .lines()
        .position(|l| l.contains("operating: Pull"))
        .map_or(0, |i| i + 1);
    assert!(
        e.starts_with(&format!("{line}:16: operating: ")) && e.contains("given twice"),
        "{e}"
    );
    // Neither: refused where the design ends.
    let neither = text.replace("operating_stroke_mm: 1.35,\n", "");
    let e = design::parse(&neither)
        .err()
        .map(|e| e.to_string())
        .unwrap_or_default();
    assert!(e.contains("operating point is missing"), "{e}");
    assert!(
        e.split(':')
            .next()
            .is_some_and(|l| l.parse::<usize>().is_ok()),
        "{e}"
    );
    // A torque needs something to turn.
    let direct = text
        .replace(
            "actuator: LeadScrew(lead_mm: 1.0, efficiency: 0.35, max_torque_nm: 1.0, max_turns: 5.0),",
            "actuator: Direct(max_force_n: 900.0, max_stroke_mm: 5.0),",
        )
        .replace("operating_stroke_mm: 1.35,", "operating: Torque(0.5),");
    let e = design::parse(&direct)
        .err()
        .map(|e| e.to_string())
        .unwrap_or_default();
    assert!(e.contains("Torque needs a spool or a lead screw"), "{e}");
    // Out of range: placed at the value, with the range and the unit.
    let huge = text.replace("operating_stroke_mm: 1.35,", "operating: Pull(2e9),");
    let e = design::parse(&huge)
        .err()
        .map(|e| e.to_string())
        .unwrap_or_default();
    assert!(
        e.contains(
            "operating.Pull = 2e9 N is outside the allowed range from 1e-6, less than 1e9 N"
        ),
        "{e}"
    );
    let soft = text.replace(
        "max_turns: 5.0)",
        "max_turns: 5.0, stiffness_n_per_mm: 0.0)",
    );
    let e = design::parse(&soft)
        .err()
        .map(|e| e.to_string())
        .unwrap_or_default();
    assert!(e.contains("actuator.stiffness_n_per_mm = 0 N/mm"), "{e}");
}

/// A file without `operating` writes exactly as before, and an edited torque sample is
/// saved in place with its comments.
#[test]
fn files_keep_their_spelling_when_saved() {
    for name in OLD_SAMPLES {
        let d = load(name);
        let text = design::to_ron(&d).unwrap_or_else(|e| panic!("{e}"));
        assert!(text.contains("    operating_stroke_mm: "), "{name}");
        assert!(!text.contains("operating:") && !text.contains("stiffness_n_per_mm"));
    }
    let path = sample("water-main-tractor-torque-screw.ron");
    let original = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{e}"));
    let mut d = design::parse(&original).unwrap_or_else(|e| panic!("{e}"));
    d.set_operating(Operating::Torque(1.1));
    d.actuator.set_stiffness_n_per_mm(Some(350.0));
    let plan = design::save_text(Some(&original), &d).unwrap_or_else(|e| panic!("{e}"));
    let design::SaveText::InPlace(saved) = plan else {
        panic!("not saved in place");
    };
    assert!(saved.contains("operating: Torque(1.1),"));
    assert!(saved.contains("stiffness_n_per_mm: 350.0,"));
    assert_eq!(saved.lines().count(), original.lines().count());
}

// ---------------------------------------------------------------- the command line

fn bowgrip(args: &[&str]) -> (Option<i32>, String, String) {
    let out = assert_cmd::Command::cargo_bin("bowgrip")
        .unwrap_or_else(|e| panic!("{e}"))
        .args(args)
        .output()
        .unwrap_or_else(|e| panic!("{e}"));
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn json(text: &str) -> serde_json::Value {
    serde_json::from_str(text).unwrap_or_else(|e| panic!("{e}: {text}"))
}

/// `point --json` (contract): `travel_mm` and `operating_mode` beside the state keys;
/// without `--stroke-mm` the operating state at the bore asked for.
#[test]
fn point_gives_the_operating_state_with_travel_and_mode() {
    let riser = sample("riser-climber-2in-sch40.ron");
    let riser = riser.to_str().unwrap_or_default();
    let (code, out, _) = bowgrip(&["point", riser, "--json"]);
    assert_eq!(code, Some(0));
    let v = json(&out);
    assert_eq!(v["stroke_mm"], 1.35);
    assert_eq!(v["travel_mm"], 1.35);
    assert_eq!(v["operating_mode"], "stroke");
    let (_, at, _) = bowgrip(&["point", riser, "--stroke-mm", "1.35", "--json"]);
    let at = json(&at);
    for (key, value) in at.as_object().into_iter().flatten() {
        assert_eq!(&v[key], value, "{key}");
    }

    let tractor = sample("water-main-tractor-torque-screw.ron");
    let tractor = tractor.to_str().unwrap_or_default();
    let d = load("water-main-tractor-torque-screw.ron");
    let seg = segment(&d);
    let set = Drive::of(&seg).set_pull_n.unwrap_or(f64::NAN);
    let k = d.actuator.stiffness_n_per_mm().unwrap_or(f64::NAN);
    for bore in ["99", "100.4", "102.5"] {
        let (code, out, err) = bowgrip(&["point", tractor, "--bore-mm", bore, "--json"]);
        assert_eq!(code, Some(0), "{err}");
        let v = json(&out);
        assert_eq!(v["operating_mode"], "torque");
        let (Some(stroke), Some(pull), Some(travel)) = (
            v["stroke_mm"].as_f64(),
            v["actuator_force_n"].as_f64(),
            v["travel_mm"].as_f64(),
        ) else {
            panic!("{out}");
        };
        assert!((pull - set).abs() <= 1e-9 * set, "{pull} vs {set}");
        assert!((travel - (stroke + pull / k)).abs() <= 1e-12 * travel);
        // The effort is the set torque.
        assert!((v["actuator"]["effort"].as_f64().unwrap_or(0.0) - 1.25).abs() < 1e-9);
    }
}

/// `check`, `bores` and `sweep` show the mode, the per-bore operating stroke and the
/// travel for a force-set design; the old samples print exactly the columns of before.
#[test]
fn check_bores_and_sweep_show_the_operating_point() {
    let tractor = sample("water-main-tractor-torque-screw.ron");
    let tractor = tractor.to_str().unwrap_or_default();
    let (code, out, _) = bowgrip(&["check", tractor, "--json"]);
    assert_eq!(code, Some(0), "{out}");
    let v = json(&out);
    assert_eq!(v["operating_mode"], "torque");
    let ids: Vec<&str> = v["checks"]
        .as_array()
        .into_iter()
        .flatten()
        .filter_map(|c| c["id"].as_str())
        .collect();
    assert_eq!(
        ids,
        [
            "fit", "reach", "hold", "static", "fatigue", "actuator", "stroke", "hub", "stable"
        ]
    );
    let cases = v["operating"].as_array().cloned().unwrap_or_default();
    assert_eq!(cases.len(), 3);
    let strokes: Vec<f64> = cases
        .iter()
        .filter_map(|c| c["stroke_mm"].as_f64())
        .collect();
    assert!(strokes.len() == 3 && strokes[0] < strokes[1] && strokes[1] < strokes[2]);
    // The hold check sits at the largest bore's operating stroke, the stroke check at the
    // smallest's.
    let at = |id: &str| {
        v["checks"]
            .as_array()
            .into_iter()
            .flatten()
            .find(|c| c["id"] == id)
            .and_then(|c| c["stroke_mm"].as_f64())
    };
    assert_eq!(at("hold"), Some(strokes[2]));
    assert_eq!(at("stroke"), Some(strokes[0]));

    let (_, out, _) = bowgrip(&["bores", tractor, "--csv", "--points", "5"]);
    let mut lines = out.lines();
    assert_eq!(
        lines.next(),
        Some(
            "bore_mm,first_contact_stroke_mm,holding_stroke_mm,stress_limit_stroke_mm,\
             line_contact_stroke_mm,limit_stroke_mm,operating_stroke_mm,travel_mm"
        )
    );
    let first: Vec<&str> = lines.next().unwrap_or_default().split(',').collect();
    assert_eq!(first[6].parse::<f64>().ok(), Some(strokes[0]));
    let (_, out, _) = bowgrip(&["sweep", tractor, "--csv", "--points", "3"]);
    assert!(
        out.lines()
            .next()
            .unwrap_or_default()
            .ends_with(",limit_reason,travel_mm")
    );
    let (_, out, _) = bowgrip(&["check", tractor]);
    assert!(out.contains("operating point: torque 1.25 N m"), "{out}");
    assert!(out.contains("stable    pass"), "{out}");

    // The samples of before: the columns and keys of before, nothing added.
    let riser = sample("riser-climber-2in-sch40.ron");
    let riser = riser.to_str().unwrap_or_default();
    let (_, out, _) = bowgrip(&["bores", riser, "--csv", "--points", "2"]);
    assert!(
        out.lines()
            .next()
            .unwrap_or_default()
            .ends_with(",limit_stroke_mm")
    );
    let (_, out, _) = bowgrip(&["sweep", riser, "--csv", "--points", "2"]);
    assert!(
        out.lines()
            .next()
            .unwrap_or_default()
            .ends_with(",limit_reason")
    );
    let (_, out, _) = bowgrip(&["check", riser, "--json"]);
    let v = json(&out);
    assert!(v.get("operating_mode").is_none() && v.get("operating").is_none());
    assert_eq!(v["checks"].as_array().map(Vec::len), Some(8));
}

/// Both spellings of the operating point at once: exit 2, one line naming the file, the
/// line and column of `operating`, and what to do.
#[test]
fn the_command_line_refuses_both_operating_fields_at_once() {
    let text = std::fs::read_to_string(sample("riser-climber-2in-sch40.ron"))
        .unwrap_or_else(|e| panic!("{e}"));
    let both = text.replace(
        "operating_stroke_mm: 1.35,",
        "operating_stroke_mm: 1.35,\n    operating: Pull(600.0),",
    );
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let file = dir.path().join("both.ron");
    std::fs::write(&file, both).unwrap_or_else(|e| panic!("{e}"));
    let f = file.to_str().unwrap_or_default();
    for args in [
        vec!["check", f],
        vec!["point", f, "--json"],
        vec!["bores", f, "--csv"],
    ] {
        let (code, out, err) = bowgrip(&args);
        assert_eq!(code, Some(2), "{args:?}");
        assert!(out.is_empty(), "{out}");
        assert_eq!(err.lines().count(), 1, "{err}");
        assert!(err.contains("both.ron:37:16: operating: "), "{err}");
        assert!(err.contains("given twice"), "{err}");
    }
}

// ---------------------------------------------------------------- the app

/// The app on a sample, in a tall window, after its first frame; the state folder lives
/// as long as the returned guard.
fn app_on(
    name: &str,
) -> (
    tempfile::TempDir,
    egui_kittest::Harness<'static, bowgrip::app::GripApp>,
) {
    let state = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let app = bowgrip::app::GripApp::new(state.path().to_path_buf(), Some(sample(name)));
    let mut h = egui_kittest::Harness::builder()
        .with_size([1500.0, 1400.0])
        .build_ui_state(|ui, app: &mut bowgrip::app::GripApp| app.ui(ui), app);
    h.run();
    (state, h)
}

/// The app's operating point is a mode choice (egui_kittest, through the accessibility
/// tree): switching from the sample's torque to a pull keeps the pull it set, to a stroke
/// keeps the nominal bore's operating stroke; each switch is one undo step.
#[test]
fn the_app_switches_the_operating_mode_and_undoes_it() {
    use egui::accesskit::Role;
    use egui::{Key, Modifiers};
    use egui_kittest::kittest::Queryable;

    let (_state, mut h) = app_on("water-main-tractor-torque-screw.ron");
    let d0 = h.state().design().clone();
    let seg = segment(&d0);
    let set = Drive::of(&seg).set_pull_n.unwrap_or(f64::NAN);
    h.get_by_role_and_label(Role::RadioButton, "Pull").click();
    h.run();
    let Operating::Pull(p) = h.state().design().operating() else {
        panic!("switched to a pull: {:?}", h.state().design().operating());
    };
    assert!((p - set).abs() <= 1e-9 * set, "{p} vs {set}");
    let shown = h.get_by_role_and_label(Role::TextInput, "Set pull").value();
    assert!(
        shown.as_deref().is_some_and(|v| v.starts_with("1178")),
        "{shown:?}"
    );
    let nominal = {
        let path = seg
            .at_bore(seg.bore_nominal_mm)
            .unwrap_or_else(|e| panic!("{e}"));
        actuation::operating_state(&path)
            .stroke_mm
            .unwrap_or(f64::NAN)
    };
    h.get_by_role_and_label(Role::RadioButton, "Stroke").click();
    h.run();
    let Operating::Stroke(s) = h.state().design().operating() else {
        panic!("switched to a stroke");
    };
    assert!((s - nominal).abs() <= 1e-6 * nominal, "{s} vs {nominal}");
    // Stroke mode keeps the file's new spelling.
    assert!(h.state().design().operating.is_some());
    for _ in 0..2 {
        h.key_press_modifiers(Modifiers::COMMAND, Key::Z);
        h.run();
    }
    assert_eq!(*h.state().design(), d0);
}

/// Under a set torque the stroke grows with the bore (a wider gap needs more stroke to reach
/// the same pull), and with it the peak stress, so the stress checks are judged at the end of
/// the tolerance that gives the smaller margin: here the largest bore (the sample's stress
/// is 792 MPa there against 648 MPa at the smallest). The margin is the one of the state
/// at that bore's own operating stroke (contract: static factor 0.75 Su / stress, Goodman
/// factor; margin = factor - 1).
#[test]
fn under_a_set_torque_stress_is_judged_where_it_is_highest() {
    let d = load("water-main-tractor-torque-screw.ron");
    let seg = segment(&d);
    let list = checks::run(&seg);
    let states: Vec<_> = [seg.bore_smallest_mm, seg.bore_largest_mm]
        .iter()
        .map(|&b| {
            let p = seg.at_bore(b).unwrap_or_else(|e| panic!("{e}"));
            (b, actuation::operating_state(&p).state)
        })
        .collect();
    let stress = |i: usize| states[i].1.max_stress_mpa.expect("a state");
    assert!(stress(1) > stress(0), "{} vs {}", stress(1), stress(0));
    for (id, factor) in [
        (CheckId::Static, states[1].1.static_safety_factor),
        (CheckId::Fatigue, states[1].1.fatigue_safety_factor),
    ] {
        let c = list.iter().find(|c| c.id == id).expect("the check");
        assert_eq!(c.bore_mm, Some(seg.bore_largest_mm), "{id:?}");
        let factor = factor.expect("a factor");
        let margin = c.margin.expect("a margin");
        assert!(
            (margin - (factor - 1.0)).abs() < 1e-12,
            "{id:?}: {margin} vs {factor}"
        );
        assert!(
            c.reason.contains("judged at the largest bore"),
            "{}",
            c.reason
        );
        // The title names the bore it was judged at, in every front end (they all print
        // `Check::title`, and the check JSON carries it).
        assert!(c.title().ends_with("at the largest bore"), "{}", c.title());
        let json = serde_json::to_value(c).expect("serialises");
        assert_eq!(json["title"], c.title());
    }
    // Under a fixed stroke the smallest bore stays where stress is judged (contract).
    let riser = segment(&load("riser-climber-2in-sch40.ron"));
    for c in checks::run(&riser) {
        if matches!(c.id, CheckId::Static | CheckId::Fatigue) {
            assert_eq!(c.bore_mm, Some(riser.bore_smallest_mm));
            assert!(c.title().ends_with("at the smallest bore"), "{}", c.title());
        }
    }
}

// ---------------------------------------------------------------- travel limits

/// The torque-screw sample with a screw of 2 turns: 4 mm of actuator travel, which its
/// drive's stretch uses up short of the model's limit.
const SHORT_SCREW: (&str, &str) = ("max_turns: 6.0", "max_turns: 2.0");

/// Springs in series (common practice): through a drive of stiffness `k_c` the actuator
/// travels `stroke + pull / k_c`, so its maximum is one of travel, and `sweep` (contract:
/// strokes from 0 to the smaller of the limit and the actuator's maximum) ends at the
/// stroke where the travel reaches it, in the curves and on the command line alike.
#[test]
fn a_compliant_sweep_ends_where_the_travel_reaches_the_actuator_maximum() {
    let name = "water-main-tractor-torque-screw.ron";
    let text = std::fs::read_to_string(sample(name)).unwrap_or_else(|e| panic!("{e}"));
    assert!(text.contains(SHORT_SCREW.0), "{name} has a 6-turn screw");
    let short = text.replace(SHORT_SCREW.0, SHORT_SCREW.1);
    let dir = tempfile::TempDir::new().unwrap_or_else(|e| panic!("{e}"));
    let file = dir.path().join("short-screw.ron");
    std::fs::write(&file, &short).unwrap_or_else(|e| panic!("{e}"));
    let d = design::load(&file).unwrap_or_else(|e| panic!("{}", e.in_file(&file)));
    let seg = segment(&d);
    let max = seg.max_stroke_mm();
    assert!((max - 4.0).abs() < 1e-12, "2 turns of a 2 mm lead: {max}");
    let path = seg
        .at_bore(seg.bore_nominal_mm)
        .unwrap_or_else(|e| panic!("{e}"));
    let sweep = path.sweep(50);
    let Some(last) = sweep.last() else {
        panic!("a sweep has points");
    };
    let end = last.stroke_mm;
    let travel = actuation::travel_at_mm(&path, end);
    assert!((travel - max).abs() <= 1e-9 * max, "{travel} vs {max}");
    // Short of the limit, and short of the maximum as a stroke (the drive stretches).
    assert!(end < path.limit_stroke_mm() && end < max, "{end}");
    assert_eq!(actuation::stroke_at_travel_mm(&path, max), Some(end));
    // Every stroke of the sweep stays within the actuator's travel.
    for s in &sweep {
        assert!(actuation::travel_at_mm(&path, s.stroke_mm) <= max * (1.0 + 1e-9));
    }
    // `sweep --csv` ends at the same stroke, and its travel column there is the maximum.
    let f = file.to_str().unwrap_or_default();
    let (code, out, err) = bowgrip(&["sweep", f, "--points", "50", "--csv"]);
    assert_eq!(code, Some(0), "{err}");
    let header: Vec<&str> = out.lines().next().unwrap_or_default().split(',').collect();
    let Some(row) = out.lines().last() else {
        panic!("rows: {out}");
    };
    let cells: Vec<&str> = row.split(',').collect();
    let col = |name: &str| {
        let i = header
            .iter()
            .position(|h| *h == name)
            .unwrap_or_else(|| panic!("column {name}"));
        cells[i]
            .parse::<f64>()
            .unwrap_or_else(|e| panic!("{name}: {e}"))
    };
    assert_eq!(col("stroke_mm"), end);
    assert!((col("travel_mm") - max).abs() <= 1e-9 * max);
    // The text says the maximum is of travel, and where it is reached.
    let (_, text_out, _) = bowgrip(&["sweep", f, "--points", "3"]);
    assert!(
        text_out.contains(&format!(
            "4.000 mm of travel, reached at {end:.3} mm of stroke"
        )),
        "{text_out}"
    );
    // A rigid drive keeps the maximum as a stroke: the sweep ends at it or at the limit.
    let mut rigid = d.clone();
    rigid.actuator.set_stiffness_n_per_mm(None);
    let seg = segment(&rigid);
    let path = seg
        .at_bore(seg.bore_nominal_mm)
        .unwrap_or_else(|e| panic!("{e}"));
    let end = path.sweep(50).last().map_or(f64::NAN, |s| s.stroke_mm);
    assert_eq!(end, path.limit_stroke_mm().min(4.0));
}

/// The stroke-against-bore window of a compliant design (springs in series, common
/// practice): at each bore the curve of the actuator's maximum travel is the stroke where
/// `stroke + pull / k_c` reaches it; a rigid design has no such curve.
#[test]
fn the_window_draws_the_maximum_travel_as_a_stroke_at_each_bore() {
    let mut d = load("water-main-tractor-torque-screw.ron");
    // A 2-turn screw: 4 mm of travel, used up short of the limit where the strips grip.
    let Actuator::LeadScrew { max_turns, .. } = &mut d.actuator else {
        panic!("the sample has a lead screw");
    };
    *max_turns = 2.0;
    let a = bowgrip::analysis::analyse(&d).unwrap_or_else(|e| panic!("{e}"));
    assert_eq!(a.travel_limit_window.len(), a.window.len());
    let max = a.segment.max_stroke_mm();
    let mut reached = 0;
    for (row, &(bore, stroke)) in a.window.iter().zip(&a.travel_limit_window) {
        assert_eq!(row.bore_mm, bore);
        let Some(s) = stroke else { continue };
        reached += 1;
        let path = a.segment.at_bore(bore).unwrap_or_else(|e| panic!("{e}"));
        let travel = actuation::travel_at_mm(&path, s);
        assert!((travel - max).abs() <= 1e-9 * max, "bore {bore}: {travel}");
    }
    assert!(reached > a.window.len() / 4, "reached at {reached} bores");
    let rigid = load("riser-climber-2in-sch40.ron");
    let a = bowgrip::analysis::analyse(&rigid).unwrap_or_else(|e| panic!("{e}"));
    assert!(a.travel_limit_window.is_empty());
}

/// The app's "As screw turns" row through a compliant drive (springs in series, common
/// practice): it shows the screw turns of the actuator travel, stroke + pull / k_c, at the
/// nominal bore, and a typed number of turns sets the first stroke whose travel is that
/// many leads; a number of turns never reached is refused with the allowed range, and the
/// design is kept.
#[test]
fn the_screw_turns_row_counts_the_travel_through_a_compliant_drive() {
    use egui::accesskit::Role;
    use egui_kittest::kittest::Queryable;

    let (_state, mut h) = app_on("water-main-tractor-torque-screw.ron");
    h.get_by_role_and_label(Role::RadioButton, "Stroke").click();
    h.run();
    let d = h.state().design().clone();
    let Operating::Stroke(stroke) = d.operating() else {
        panic!("switched to a stroke");
    };
    let Actuator::LeadScrew { lead_mm, .. } = d.actuator else {
        panic!("the sample has a lead screw");
    };
    let seg = segment(&d);
    let path = seg
        .at_bore(seg.bore_nominal_mm)
        .unwrap_or_else(|e| panic!("{e}"));
    let turns = actuation::travel_at_mm(&path, stroke) / lead_mm;
    assert!(
        turns > stroke / lead_mm + 0.5,
        "the tie rod stretches: {turns}"
    );
    let shown = h
        .get_by_role_and_label(Role::TextInput, "As screw turns")
        .value()
        .and_then(|v| v.parse::<f64>().ok())
        .unwrap_or(f64::NAN);
    assert!((shown - turns).abs() <= 1e-3 * turns, "{shown} vs {turns}");

    // 2.2 turns of a 2 mm lead: 4.4 mm of travel.
    h.get_by_role_and_label(Role::TextInput, "As screw turns")
        .set_text_value_accesskit("2.2");
    h.run();
    let Operating::Stroke(set) = h.state().design().operating() else {
        panic!("still a stroke");
    };
    let travel = actuation::travel_at_mm(&path, set);
    assert!((travel - 2.2 * lead_mm).abs() <= 1e-9 * travel, "{travel}");
    assert!(set < 2.2 * lead_mm);

    // 500 turns are never reached before the model's limit: refused, the design kept.
    let before = h.state().design().clone();
    h.get_by_role_and_label(Role::TextInput, "As screw turns")
        .set_text_value_accesskit("500");
    h.run();
    h.run();
    assert_eq!(*h.state().design(), before);
    assert!(
        h.query_by_label_contains("is never reached at the nominal bore")
            .is_some()
    );
}

/// The usable stroke across the tolerance (what `check` prints) through a compliant drive:
/// the actuator's maximum is of travel (springs in series, common practice), so the range
/// ends at the smallest bore where `stroke + pull / k_c` reaches it, short of the stress
/// limit there and well short of the maximum taken as a stroke.
#[test]
fn the_usable_stroke_ends_where_the_travel_reaches_the_maximum() {
    let mut d = load("water-main-tractor-torque-screw.ron");
    let Actuator::LeadScrew { max_turns, .. } = &mut d.actuator else {
        panic!("the sample has a lead screw");
    };
    *max_turns = 2.0;
    let seg = segment(&d);
    let path = seg
        .at_bore(seg.bore_smallest_mm)
        .unwrap_or_else(|e| panic!("{e}"));
    let Some(reach) = actuation::stroke_at_travel_mm(&path, seg.max_stroke_mm()) else {
        panic!("4 mm of travel is reached at the smallest bore");
    };
    let u = seg.usable_stroke_across_tolerance();
    assert_eq!(
        u.top,
        Some((reach, bowgrip::quantities::StrokeBound::ActuatorTravel))
    );
    assert!(reach < seg.max_stroke_mm());
    // A rigid drive keeps its maximum as a stroke.
    d.actuator.set_stiffness_n_per_mm(None);
    let seg = segment(&d);
    let top = seg.usable_stroke_across_tolerance().top.map(|t| t.0);
    assert!(top.is_some_and(|t| t > reach), "{top:?}");
}

/// Under a set torque each bore takes its own stroke, so a missing fixed-stroke window is
/// not a finding: the torque sample passes every check (the contract's checks, each at its
/// bore's own operating stroke), and its usable-stroke line says that the stroke follows the
/// bore and gives the fixed-stroke comparison, not drawn as a failure. The same design
/// under a fixed stroke reports the missing window as the finding it then is.
#[test]
fn under_a_set_torque_the_fixed_stroke_window_is_a_comparison() {
    let d = load("water-main-tractor-torque-screw.ron");
    let a = bowgrip::analysis::analyse(&d).unwrap_or_else(|e| panic!("{e}"));
    assert!(a.checks.iter().all(|c| c.pass));
    let u = a.usable_stroke().expect("both bores fit");
    assert!(u.range_mm().is_none());
    assert!(!u.is_problem());
    let words = u.describe();
    assert!(
        words.starts_with("under the set torque the stroke follows the bore"),
        "{words}"
    );
    assert!(
        words.contains("no usable stroke across the bore tolerance"),
        "{words}"
    );
    let mut fixed = d.clone();
    fixed.set_operating(Operating::Stroke(2.0));
    let a = bowgrip::analysis::analyse(&fixed).unwrap_or_else(|e| panic!("{e}"));
    let u = a.usable_stroke().expect("both bores fit");
    assert!(u.is_problem());
    assert!(
        u.describe().starts_with("no usable stroke"),
        "{}",
        u.describe()
    );
}
