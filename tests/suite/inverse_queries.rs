//! The inverse queries against the forward solution: the stroke each query returns, fed
//! back to `Path::state`, must give the asked-for value. A property of the model itself
//! (no outside source): the forward states are the ones held to the mpmath reference in
//! `elastica_reference`. Includes paths found by this test where the measure is not
//! monotonic: the contact force peaking inside line contact (g/L about 0.24, 0.31) and the
//! stress measure dipping after first contact (g/L about 0.17).

use bowgrip::design::Ends;
use bowgrip::elastica::{Path, Phase, StripState};

/// A small deterministic generator (xorshift64), so the cases are the same on every run.
struct Cases(u64);

impl Cases {
    fn next(&mut self) -> f64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// The contact force never falls before the limit or its flagged peak, and the contact
/// inverse query lands on the asked-for force.
fn check_contact(ends: Ends, gap: f64, fraction: f64) {
    let path = Path::new(ends, gap).unwrap();
    let limit = path.limit().stroke;
    let stop = path.peaks().contact.unwrap_or(limit).min(limit);
    let mut last = 0.0;
    for i in 0..=48 {
        let s = limit * i as f64 / 48.0;
        let st = path.state(s);
        assert_ne!(
            st.phase,
            Phase::BeyondLimit,
            "{ends:?} g/L {gap}: stroke {s}"
        );
        if s <= stop {
            assert!(
                st.contact >= last * (1.0 - 1e-9),
                "{ends:?} g/L {gap}: contact falls at stroke {s} ({} < {last}) before the flagged peak {stop}",
                st.contact
            );
            last = st.contact;
        }
    }
    if path.first_contact_stroke().is_none() {
        return;
    }
    let target = path.state(stop).contact * fraction;
    let found = path.stroke_for_contact(target);
    let s = found
        .ok()
        .unwrap_or_else(|| panic!("{ends:?} g/L {gap}: contact {target}: {found:?}"));
    let got = path.state(s).contact;
    assert!(
        ((got - target) / target).abs() < 1e-9,
        "{ends:?} g/L {gap}: asked {target}, stroke {s} gives {got}"
    );
}

/// The stress-like inverse `kappa + w P` lands on the asked-for value, or (where the measure
/// is not monotonic) on a stroke where it is reached.
fn check_linear(ends: Ends, gap: f64, w: f64, fraction: f64) {
    let path = Path::new(ends, gap).unwrap();
    let m = |st: &StripState| st.kappa_max + w * st.axial;
    let (m0, m_end) = (m(&path.state(0.0)), m(&path.state(path.limit().stroke)));
    let target = m0 + (m_end - m0) * fraction;
    let found = path.stroke_for_linear(1.0, w, target);
    let s = found
        .ok()
        .unwrap_or_else(|| panic!("{ends:?} g/L {gap} w {w}: value {target}: {found:?}"));
    let got = m(&path.state(s));
    assert!(
        ((got - target) / target).abs() < 1e-9,
        "{ends:?} g/L {gap} w {w}: asked {target}, stroke {s} gives {got}"
    );
}

#[test]
fn paths_found_by_this_test() {
    // Contact force peaks inside line contact and is lower at the limit.
    check_contact(Ends::Hinged, 0.235_874_306_382_695_66, 0.836);
    // Contact force peaks just short of the limit (last scan sample largest).
    check_contact(Ends::Clamped, 0.310_756_893_093_638_4, 0.9);
    // The measure dips after first contact; the point solve must stay on the branch.
    check_linear(Ends::Hinged, 0.174_610_171_266_856_43, 0.01, 0.3);
}

#[test]
fn inverse_queries_land_on_their_values() {
    let mut cases = Cases(0x9e37_79b9_7f4a_7c15);
    for case in 0..600 {
        let ends = if case % 2 == 0 {
            Ends::Clamped
        } else {
            Ends::Hinged
        };
        let gap = if cases.next() < 0.3 {
            10f64.powf(-6.0 + 5.0 * cases.next())
        } else {
            1e-5 + 0.39 * cases.next()
        };
        check_contact(ends, gap, 0.02 + 0.96 * cases.next());
        check_linear(ends, gap, 0.05 * cases.next(), 0.02 + 0.9 * cases.next());
    }
}
