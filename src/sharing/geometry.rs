//! Cross-section geometry of load sharing: the elliptical bore, the outward travel of a
//! strip's outer-face edges to the wall (the per-strip gap), the rest support's clearance
//! and its boundary, and the distance from a point to the ellipse. Plain millimetres, `y`
//! up and `z` to the right; a direction at clock angle `theta` (from the top, clockwise)
//! is `(cos theta, sin theta)`.

/// The bore in the cross-section: an ellipse with semi-axis `a_y` along `y` and `a_z`
/// along `z`, centred at the origin.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Ellipse {
    pub a_y: f64,
    pub a_z: f64,
}

impl Ellipse {
    /// Least outward travel `h` from `c` along the unit vector `u` to the wall: the
    /// positive root of `q(c + h u) = 1`, `q(p) = (p_y/a_y)^2 + (p_z/a_z)^2`. Zero or
    /// negative when `c` is on or outside the wall.
    pub fn travel(&self, c: [f64; 2], u: [f64; 2]) -> f64 {
        let (iy, iz) = (1.0 / (self.a_y * self.a_y), 1.0 / (self.a_z * self.a_z));
        let a = u[0] * u[0] * iy + u[1] * u[1] * iz;
        let b = c[0] * u[0] * iy + c[1] * u[1] * iz;
        let cc = c[0] * c[0] * iy + c[1] * c[1] * iz - 1.0;
        let disc = (b * b - a * cc).max(0.0).sqrt();
        // The form without cancellation for each sign of b.
        if b > 0.0 {
            -cc / (b + disc)
        } else {
            (disc - b) / a
        }
    }

    /// Smallest radius of curvature of the wall, mm (`min^2 / max` of the semi-axes).
    pub fn min_curvature_radius(&self) -> f64 {
        let (lo, hi) = (self.a_y.min(self.a_z), self.a_y.max(self.a_z));
        lo * lo / hi
    }

    /// How far a circle of radius `r`, centred at the origin, can move along `y` (either
    /// way, by symmetry) before it touches the wall, mm. Negative when it does not fit.
    /// With `f(c) = (a^2 - b^2) c^2 - 2 a y c + y^2 + b^2` the squared distance from
    /// `(y, 0)` to the wall point at `cos t = c` (`a = a_y`, `b = a_z`): vertex contact
    /// unless `a > b` and the minimum of `f` lies inside `|c| < 1`, where two points touch.
    pub fn clearance_y(&self, r: f64) -> f64 {
        let (a, b) = (self.a_y, self.a_z);
        let vertex = a - r;
        if a <= b || a * vertex >= a * a - b * b {
            vertex
        } else {
            ((a * a - b * b) * (1.0 - r * r / (b * b))).max(0.0).sqrt()
        }
    }

    /// The centre of a circle of radius `r` touching the wall where its outward normal is
    /// `(cos phi, sin phi)`: `p(phi) - r n(phi)`. A boundary of the rest support's reach
    /// while `r <= min_curvature_radius()`.
    pub fn inner_parallel(&self, phi: f64, r: f64) -> [f64; 2] {
        let (s, c) = phi.sin_cos();
        let (ay2, az2) = (self.a_y * self.a_y, self.a_z * self.a_z);
        let lam = 1.0 / (ay2 * c * c + az2 * s * s).sqrt();
        [ay2 * lam * c - r * c, az2 * lam * s - r * s]
    }

    /// (Kept for the tests: an independent check of the reach's boundary.)
    /// Distance from a point inside the ellipse to its wall, mm (Eberly, "Distance from a
    /// point to an ellipse", by bisection on the Lagrange parameter; 200 steps at most).
    #[cfg(test)]
    pub fn distance_inside(&self, p: [f64; 2]) -> f64 {
        // Put the larger semi-axis first, the point in the first quadrant.
        let (e0, e1, y0, y1) = if self.a_y >= self.a_z {
            (self.a_y, self.a_z, p[0].abs(), p[1].abs())
        } else {
            (self.a_z, self.a_y, p[1].abs(), p[0].abs())
        };
        if y1 > 0.0 {
            if y0 > 0.0 {
                let g = |s: f64| {
                    let r0 = e0 * y0 / (s + e0 * e0);
                    let r1 = e1 * y1 / (s + e1 * e1);
                    r0 * r0 + r1 * r1 - 1.0
                };
                let mut lo = -e1 * e1 + e1 * y1;
                let mut hi = -e1 * e1 + (e0 * e0 * y0 * y0 + e1 * e1 * y1 * y1).sqrt();
                for _ in 0..200 {
                    let mid = 0.5 * (lo + hi);
                    if mid <= lo || mid >= hi {
                        break;
                    }
                    if g(mid) > 0.0 { lo = mid } else { hi = mid }
                }
                let s = 0.5 * (lo + hi);
                let x0 = e0 * e0 * y0 / (s + e0 * e0);
                let x1 = e1 * e1 * y1 / (s + e1 * e1);
                ((x0 - y0).powi(2) + (x1 - y1).powi(2)).sqrt()
            } else {
                (e1 - y1).abs()
            }
        } else if y0 < (e0 * e0 - e1 * e1) / e0 {
            let x0 = e0 * e0 * y0 / (e0 * e0 - e1 * e1);
            let x1 = e1 * (1.0 - (x0 / e0).powi(2)).max(0.0).sqrt();
            ((x0 - y0).powi(2) + x1 * x1).sqrt()
        } else {
            (e0 - y0).abs()
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn round_travel_is_the_edge_contact_gap() {
        // Mechanics note: centred in a round bore the gap is sqrt(R^2 - b^2/4) - t/2 - r_m.
        let e = Ellipse {
            a_y: 50.0,
            a_z: 50.0,
        };
        let (rho0, half_b) = (38.3, 6.0);
        let th: f64 = 0.7;
        let (u, v) = ([th.cos(), th.sin()], [-th.sin(), th.cos()]);
        let c = [rho0 * u[0] + half_b * v[0], rho0 * u[1] + half_b * v[1]];
        let hand = (2500.0_f64 - 36.0).sqrt() - rho0;
        assert!((e.travel(c, u) - hand).abs() < 1e-12);
    }

    #[test]
    fn clearance_matches_distance() {
        // Self-consistency of two independent constructions (plane geometry, common
        // practice): at the clearance the circle's centre is exactly r from the wall.
        for (ay, az, r) in [(50.5, 49.5, 40.0), (49.5, 50.5, 40.0), (52.0, 48.0, 47.5)] {
            let e = Ellipse { a_y: ay, a_z: az };
            let c = e.clearance_y(r);
            let d = e.distance_inside([-c, 0.0]);
            assert!((d - r).abs() < 1e-9, "{ay} {az} {r}: {d}");
        }
    }

    #[test]
    fn inner_parallel_is_r_from_the_wall() {
        // The centre of a touching circle lies r from the wall (plane geometry).
        let e = Ellipse {
            a_y: 50.5,
            a_z: 49.5,
        };
        for phi in [0.0, 0.4, 2.0, 3.1] {
            let d = e.inner_parallel(phi, 40.0);
            assert!((e.distance_inside(d) - 40.0).abs() < 1e-9);
        }
    }
}
