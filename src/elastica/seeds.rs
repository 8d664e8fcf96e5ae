//! Seed tables built once per process: the point-contact branch over gaps and strokes
//! (`BranchTable`) and the first-contact and line-onset moduli against the gap
//! (`ModulusTable`), both interpolated by 4-point Lagrange, plus the fitted branch formulas
//! used beyond the tables. A failed entry stays NaN, is counted, and gives no seed; a unit test
//! holds that every entry of both tables solves.

use std::f64::consts::FRAC_PI_2;

use super::*;

/// The point-contact branch tabulated once per process, as seeds for the two-equation
/// Newton solve: over gaps `0 ..= G_MAX` and `w = sqrt(t)`, where `t` is the stroke's
/// fraction of the way from first contact to line-contact onset, it holds
/// `u = phi0 / (-pi/2)` and `k / k1` (`k1`: first-contact modulus). Both vary smoothly
/// (`u` about 3.3 t near first contact, the gap entering as g^2), so 4-point Lagrange
/// interpolation in each direction gives seeds within about 1e-4, which saves a Newton
/// step against a fitted formula. Clamped and hinged strips share the geometry, so one
/// table serves both. Built by this solver itself, marching each gap from first contact;
/// an entry it cannot solve stays NaN and is counted in `failed` (a unit test holds that
/// none fails), and a seed that would use it is `None` (the caller's fitted seed).
pub(super) struct BranchTable {
    pub(super) u: Vec<f64>,
    pub(super) ratio: Vec<f64>,
    /// Contact force over its value at line-contact onset (rises from 0 to 1 along `w`).
    pub(super) contact: Vec<f64>,
    /// Entries the build could not solve (read by the unit test that holds it at zero).
    #[cfg_attr(not(test), allow(dead_code))]
    pub(super) failed: usize,
}

impl BranchTable {
    const G_MAX: f64 = 0.3;
    const GAPS: usize = 33;
    const WS: usize = 31;

    pub(super) fn build() -> BranchTable {
        let mut u = vec![f64::NAN; Self::GAPS * Self::WS];
        let mut ratio = vec![f64::NAN; Self::GAPS * Self::WS];
        let mut contact = vec![f64::NAN; Self::GAPS * Self::WS];
        let mut failed = 0;
        for i in 0..Self::GAPS {
            // The first row stands for the small-gap limit (g^2 = 1e-8 of the scale).
            let gap = (Self::G_MAX * i as f64 / (Self::GAPS - 1) as f64).max(1e-4);
            let Ok(path) = Path::new(Ends::Clamped, gap) else {
                failed += Self::WS;
                continue;
            };
            let (Some((k1, d1)), Some((ks, ds))) = (path.first_contact, path.line_onset) else {
                failed += Self::WS;
                continue;
            };
            let row = i * Self::WS;
            let f_onset = line_d(D::c(ks), gap).contact.v;
            let fitted = |t: f64| fitted_point_seed(fitted_u_of_stroke(t), k1, ks);
            let mut prev: [(f64, f64); 2] = [(k1, 0.0), (k1, 0.0)];
            for j in 0..Self::WS {
                let w = j as f64 / (Self::WS - 1) as f64;
                let solved = if j == 0 {
                    Some((k1, 0.0))
                } else if j == Self::WS - 1 {
                    Some((ks, -FRAC_PI_2))
                } else {
                    let t = w * w;
                    // Extrapolate from the two previous columns (the first from the formula).
                    let guess = if j == 1 {
                        fitted(t)
                    } else {
                        (2.0 * prev[1].0 - prev[0].0, 2.0 * prev[1].1 - prev[0].1)
                    };
                    let goal = PointGoal::Stroke(d1 + t * (ds - d1));
                    path.solve_point(goal, guess)
                        .or_else(|| path.solve_point(goal, fitted(t)))
                        .or_else(|| path.march_point(goal, d1 + t * (ds - d1)))
                };
                let Some((k, phi0)) = solved else {
                    failed += 1;
                    // The next guess extrapolates from the fitted formula instead.
                    prev = [prev[1], fitted(w * w)];
                    continue;
                };
                u[row + j] = phi0 / -FRAC_PI_2;
                ratio[row + j] = k / k1;
                contact[row + j] = match j {
                    0 => 0.0,
                    _ if j == Self::WS - 1 => 1.0,
                    _ => point_d(D::c(k), D::c(phi0)).contact.v / f_onset,
                };
                prev = [prev[1], (k, phi0)];
            }
        }
        BranchTable {
            u,
            ratio,
            contact,
            failed,
        }
    }

    /// Seed `(u, k / k1)` where the contact force is the fraction `r` of its value at
    /// line-contact onset, `None` beyond the table: the contact column, interpolated to
    /// the gap, is inverted for `w` (it rises along the branch), then [`BranchTable::seed`].
    pub(super) fn seed_for_contact(&self, gap: f64, r: f64) -> Option<(f64, f64)> {
        if !(gap > 0.0 && gap <= Self::G_MAX && (0.0..=1.0).contains(&r)) {
            return None;
        }
        let x = gap / Self::G_MAX * (Self::GAPS - 1) as f64;
        let (i0, wx) = lagrange4(x, Self::GAPS);
        // The contact column at this gap, node by node.
        let column = |j: usize| -> f64 {
            wx.iter()
                .enumerate()
                .map(|(a, wa)| wa * self.contact[(i0 + a) * Self::WS + j])
                .sum()
        };
        // Nodes around r by bisection (0 at the first node, 1 at the last) ...
        let (mut a, mut b) = (0, Self::WS - 1);
        while b - a > 1 {
            let m = (a + b) / 2;
            if column(m) < r {
                a = m;
            } else {
                b = m;
            }
        }
        // ... then the local cubic through four nodes, inverted by roots' Brent method.
        let j0 = a.saturating_sub(1).min(Self::WS - 4);
        let c: [f64; 4] = std::array::from_fn(|m| column(j0 + m));
        if !c.iter().all(|v| v.is_finite()) {
            return None;
        }
        let at = |y: f64| -> f64 {
            let w = lagrange4_weights(y - j0 as f64);
            (0..4).map(|m| w[m] * c[m]).sum::<f64>() - r
        };
        let mut brent = BrentSettled { y_scale: 1.0 };
        let y = brent_query(roots::find_root_brent(a as f64, b as f64, at, &mut brent))
            .ok()
            .unwrap_or(a as f64);
        let w = y.clamp(a as f64, b as f64) / (Self::WS - 1) as f64;
        self.seed(gap, w * w)
    }

    /// Seed `(u, k / k1)` at gap `gap` and stroke fraction `t`, `None` beyond the table.
    pub(super) fn seed(&self, gap: f64, t: f64) -> Option<(f64, f64)> {
        if !(gap > 0.0 && gap <= Self::G_MAX && (0.0..=1.0).contains(&t)) {
            return None;
        }
        let x = gap / Self::G_MAX * (Self::GAPS - 1) as f64;
        let y = t.sqrt() * (Self::WS - 1) as f64;
        let (i0, wx) = lagrange4(x, Self::GAPS);
        let (j0, wy) = lagrange4(y, Self::WS);
        let mut out = (0.0, 0.0);
        for (a, wa) in wx.iter().enumerate() {
            let row = (i0 + a) * Self::WS + j0;
            for (b, wb) in wy.iter().enumerate() {
                out.0 += wa * wb * self.u[row + b];
                out.1 += wa * wb * self.ratio[row + b];
            }
        }
        (out.0.is_finite() && out.1.is_finite()).then_some(out)
    }
}

/// The fitted point-contact branch, for seeds beyond the branch table: `u = phi0 / (-pi/2)`
/// at the stroke fraction `t` from first contact to line onset is close to `1 - (1-t)^2`.
pub(super) fn fitted_u_of_stroke(t: f64) -> f64 {
    1.0 - (1.0 - t) * (1.0 - t)
}

/// The fitted dip of the modulus along the point branch, `(k - ks)/(k1 - ks) =
/// (1-u)^3 - 0.68 u (1-u)` (fitted to solved branches from g/L = 0.05 to 0.2), as the seed
/// `(k, phi0)` at `u = phi0 / (-pi/2)` between the end moduli `k1` and `ks`.
pub(super) fn fitted_point_seed(u: f64, k1: f64, ks: f64) -> (f64, f64) {
    let f = (1.0 - u).powi(3) - 0.68 * u * (1.0 - u);
    (ks + (k1 - ks) * f, -FRAC_PI_2 * u)
}

/// First index and weights of 4-point Lagrange interpolation at `x` on the grid `0..n`.
pub(super) fn lagrange4(x: f64, n: usize) -> (usize, [f64; 4]) {
    let i0 = (x.floor() as isize - 1).clamp(0, n as isize - 4) as usize;
    (i0, lagrange4_weights(x - i0 as f64))
}

/// Weights of the cubic through the nodes 0, 1, 2, 3 at `x`.
pub(super) fn lagrange4_weights(x: f64) -> [f64; 4] {
    let (a, b, c, d) = (x, x - 1.0, x - 2.0, x - 3.0);
    [
        -b * c * d / 6.0,
        a * c * d / 2.0,
        -a * b * d / 2.0,
        a * b * c / 6.0,
    ]
}

pub(super) fn branch_table() -> &'static BranchTable {
    use std::sync::OnceLock;
    static TABLE: OnceLock<BranchTable> = OnceLock::new();
    TABLE.get_or_init(BranchTable::build)
}

/// First-contact and line-onset moduli against the gap, solved once per process at 65
/// gaps each and interpolated (4-point Lagrange) as Newton seeds: within about 1e-9, so
/// that one evaluation usually settles a path's set-up, where the series seeds lose
/// digits at large gaps. The ranges stop short of the folds (the highest crest near
/// g/L 0.40, the line-contact fold at 0.32), where the moduli turn with a square root.
pub(super) struct ModulusTable {
    pub(super) first_contact: Vec<f64>,
    pub(super) line_onset: Vec<f64>,
}

impl ModulusTable {
    const POINTS: usize = 65;
    const FIRST_CONTACT_MAX: f64 = 0.36;
    const LINE_ONSET_MAX: f64 = 0.30;

    pub(super) fn build() -> ModulusTable {
        let column =
            |g_max: f64, series: fn(f64) -> f64, solve: fn(f64, f64) -> Option<(f64, f64)>| {
                (0..Self::POINTS)
                    .map(|i| {
                        let gap = g_max * i as f64 / (Self::POINTS - 1) as f64;
                        if i == 0 {
                            return 0.0;
                        }
                        solve(gap, series(gap)).map_or(f64::NAN, |(k, _)| k)
                    })
                    .collect()
            };
        ModulusTable {
            first_contact: column(
                Self::FIRST_CONTACT_MAX,
                first_contact_series,
                solve_first_contact,
            ),
            line_onset: column(Self::LINE_ONSET_MAX, line_onset_series, solve_line_onset),
        }
    }

    pub(super) fn at(values: &[f64], g_max: f64, gap: f64) -> Option<f64> {
        if !(gap > 0.0 && gap <= g_max) {
            return None;
        }
        let (i0, w) = lagrange4(gap / g_max * (Self::POINTS - 1) as f64, Self::POINTS);
        let k: f64 = (0..4).map(|m| w[m] * values[i0 + m]).sum();
        k.is_finite().then_some(k)
    }

    pub(super) fn first_contact(&self, gap: f64) -> Option<f64> {
        Self::at(&self.first_contact, Self::FIRST_CONTACT_MAX, gap)
    }

    pub(super) fn line_onset(&self, gap: f64) -> Option<f64> {
        Self::at(&self.line_onset, Self::LINE_ONSET_MAX, gap)
    }
}

pub(super) fn modulus_table() -> &'static ModulusTable {
    use std::sync::OnceLock;
    static TABLE: OnceLock<ModulusTable> = OnceLock::new();
    TABLE.get_or_init(ModulusTable::build)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The seed tables built once per process solve every entry: a failed build fails
    /// here rather than hiding behind a fitted or series seed.
    #[test]
    fn seed_tables_build_without_failures() {
        let branch = BranchTable::build();
        assert_eq!(branch.failed, 0, "branch-table entries not solved");
        assert!(
            branch
                .u
                .iter()
                .chain(&branch.ratio)
                .chain(&branch.contact)
                .all(|v| v.is_finite())
        );
        let moduli = ModulusTable::build();
        for (name, column) in [
            ("first contact", &moduli.first_contact),
            ("line onset", &moduli.line_onset),
        ] {
            assert!(
                column.iter().all(|k| k.is_finite()),
                "{name}: a modulus-table entry did not solve"
            );
        }
    }

    /// The tabulated seeds lie within 1.5e-4 of the solved branch between the table's nodes
    /// (in `u = phi0 / (-pi/2)` and relative `k`), across gaps and strokes.
    #[test]
    fn branch_table_seeds_are_close() {
        let (mut worst_u, mut worst_k) = (0.0_f64, 0.0_f64);
        for i in 0..47 {
            let gap = 0.002 + 0.296 * i as f64 / 46.0;
            let path = Path::new(Ends::Clamped, gap).unwrap();
            let (k1, d1) = path.first_contact.unwrap();
            let (_, ds) = path.line_onset.unwrap();
            for j in 1..40 {
                let t = j as f64 / 40.0;
                let s = path.state(d1 + t * (ds - d1));
                let (u, ratio) = branch_table().seed(gap, t).unwrap();
                worst_u = worst_u.max((u - s.phi0 / -FRAC_PI_2).abs());
                worst_k = worst_k.max((ratio * k1 / s.k - 1.0).abs());
            }
        }
        assert!(
            worst_u < 1.5e-4 && worst_k < 1.5e-4,
            "u {worst_u:e}, k {worst_k:e}"
        );
        // Seeds by contact-force fraction, against the solved state at that force.
        let (mut worst_u, mut worst_k) = (0.0_f64, 0.0_f64);
        for i in 0..23 {
            let gap = 0.004 + 0.29 * i as f64 / 22.0;
            let path = Path::new(Ends::Clamped, gap).unwrap();
            let (k1, _) = path.first_contact.unwrap();
            let (ks, _) = path.line_onset.unwrap();
            let f_onset = line_d(D::c(ks), gap).contact.v;
            for j in 1..20 {
                let r = j as f64 / 20.0;
                let stroke = path.stroke_for_contact(r * f_onset).ok().unwrap();
                let s = path.state(stroke);
                let (u, ratio) = branch_table().seed_for_contact(gap, r).unwrap();
                worst_u = worst_u.max((u - s.phi0 / -FRAC_PI_2).abs());
                worst_k = worst_k.max((ratio * k1 / s.k - 1.0).abs());
            }
        }
        assert!(
            worst_u < 1.5e-4 && worst_k < 1.5e-4,
            "by contact: u {worst_u:e}, k {worst_k:e}"
        );
        assert!(branch_table().seed(0.31, 0.5).is_none());
    }

    /// The modulus seeds lie within 1e-7 (relative) of the solved moduli between the
    /// table's nodes up to g/L = 0.2, and within 2e-5 up to the table's ends, where the
    /// moduli steepen towards their folds.
    #[test]
    fn modulus_table_seeds_are_close() {
        let table = modulus_table();
        let (mut worst1, mut worst_s) = (0.0_f64, 0.0_f64);
        let (mut small1, mut small_s) = (0.0_f64, 0.0_f64);
        for i in 1..400 {
            let gap = 0.36 * i as f64 / 400.0 + 1e-4;
            if let Some(seed) = table.first_contact(gap) {
                let (k1, _) = solve_first_contact(gap, first_contact_series(gap)).unwrap();
                worst1 = worst1.max((seed / k1 - 1.0).abs());
                if gap <= 0.2 {
                    small1 = small1.max((seed / k1 - 1.0).abs());
                }
            }
            if let Some(seed) = table.line_onset(gap) {
                let (ks, _) = solve_line_onset(gap, line_onset_series(gap)).unwrap();
                worst_s = worst_s.max((seed / ks - 1.0).abs());
                if gap <= 0.2 {
                    small_s = small_s.max((seed / ks - 1.0).abs());
                }
            }
        }
        assert!(small1 < 1e-7 && small_s < 1e-7, "{small1:e} {small_s:e}");
        assert!(worst1 < 2e-5 && worst_s < 2e-5, "{worst1:e} {worst_s:e}");
        assert!(table.first_contact(0.37).is_none() && table.line_onset(0.31).is_none());
    }
}
