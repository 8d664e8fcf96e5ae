//! The strip solver against an independent high-precision solution of the same model:
//! `tests/reference/gen_elastica.py` solves the strip model (set out in
//! `tests/reference/README.md`) with mpmath at 40 digits (mpmath, PyPI; its own derivation
//! of the hinged case). Paths: first contact,
//! line-contact onset, limit and axial-force peak; states: forces, geometry, curvature and
//! energy at strokes inside every phase.

use bowgrip::design::Ends;
use bowgrip::elastica::{LimitReason, Path, Phase};

const PATHS: &str = include_str!("../reference/elastica_paths_mpmath.csv");
const STATES: &str = include_str!("../reference/elastica_mpmath.csv");

fn rows(text: &str) -> impl Iterator<Item = Vec<&str>> {
    text.lines()
        .skip(1)
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
        .map(|l| l.split(',').collect())
}

fn ends(name: &str) -> Ends {
    match name {
        "clamped" => Ends::Clamped,
        "hinged" => Ends::Hinged,
        other => panic!("unknown end condition {other} in the reference file"),
    }
}

fn num(s: &str) -> Option<f64> {
    (!s.is_empty()).then(|| s.parse().expect("reference numbers parse"))
}

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol * b.abs().max(1e-300) || (a - b).abs() < 1e-15
}

#[test]
fn paths_match_mpmath() {
    let mut n = 0;
    for r in rows(PATHS) {
        let (e, g) = (ends(r[0]), num(r[1]).expect("gap"));
        let path = Path::new(e, g).expect("positive gap");
        let fc = path.first_contact_stroke().expect("reachable");
        assert!(
            close(fc, num(r[2]).expect("first contact"), 1e-11),
            "{r:?}: first contact {fc}"
        );
        match (path.line_contact_stroke(), num(r[3])) {
            (Some(a), Some(b)) => assert!(close(a, b, 1e-11), "{r:?}: onset {a}"),
            (None, None) => {}
            other => panic!("{r:?}: line-contact onset differs: {other:?}"),
        }
        let lim = path.limit();
        assert!(
            close(lim.stroke, num(r[4]).expect("limit"), 1e-10),
            "{r:?}: limit {lim:?}"
        );
        let reason = match r[5] {
            "buckling" => LimitReason::FlatRunBuckling,
            "axial" => LimitReason::AxialForceVanishes,
            "reopen" => LimitReason::FlatRunCloses,
            "chord" => LimitReason::ChordClosed,
            other => panic!("unknown reason {other}"),
        };
        assert_eq!(lim.reason, reason, "{r:?}");
        // A peak is flat: its location is found to about the square root of precision.
        match (path.peaks().axial, num(r[6])) {
            (Some(a), Some(b)) => assert!((a - b).abs() < 1e-6, "{r:?}: axial peak {a}"),
            (None, None) => {}
            other => panic!("{r:?}: axial peak differs: {other:?}"),
        }
        n += 1;
    }
    assert_eq!(n, 18, "all reference paths were checked");
}

#[test]
fn states_match_mpmath() {
    let mut n = 0;
    for r in rows(STATES) {
        let (e, g, d) = (
            ends(r[0]),
            num(r[1]).expect("gap"),
            num(r[2]).expect("stroke"),
        );
        let s = Path::new(e, g).expect("positive gap").state(d);
        let phase = match r[3] {
            "free" => Phase::Free,
            "point-contact" => Phase::PointContact,
            "line-contact" => Phase::LineContact,
            other => panic!("unknown phase {other}"),
        };
        assert_eq!(s.phase, phase, "{r:?}");
        let tol = 1e-9;
        let want = |i: usize| num(r[i]).expect("value");
        assert!(close(s.axial, want(4), tol), "{r:?}: axial {}", s.axial);
        // Contact force is judged on the scale of the axial force (it starts from zero).
        assert!(
            (s.contact - want(5)).abs() <= tol * want(4).abs(),
            "{r:?}: contact {}",
            s.contact
        );
        assert!(
            close(s.crest_height, want(6), tol),
            "{r:?}: crest {}",
            s.crest_height
        );
        assert!(
            (s.flat_length - want(7)).abs() <= tol,
            "{r:?}: flat {}",
            s.flat_length
        );
        assert!(
            close(s.kappa_max, want(8), tol),
            "{r:?}: curvature {}",
            s.kappa_max
        );
        assert!(close(s.energy, want(9), tol), "{r:?}: energy {}", s.energy);
        n += 1;
    }
    assert!(n >= 100, "only {n} reference states");
}

#[test]
fn largest_reachable_gap_matches_mpmath() {
    // `# g_max_over_l=...` in the paths file: max over k of k / K(k).
    let line = PATHS
        .lines()
        .find(|l| l.starts_with("# g_max_over_l="))
        .expect("g_max line");
    let g: f64 = line
        .trim_start_matches("# g_max_over_l=")
        .parse()
        .expect("number");
    assert!(close(bowgrip::elastica::max_reachable_gap(), g, 1e-13));
}
