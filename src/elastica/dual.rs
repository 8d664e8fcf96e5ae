//! Forward-mode dual numbers with two partials (`D`), so that every Newton step of the solver
//! has its exact Jacobian, and the complete and incomplete elliptic integrals of dual
//! arguments: their `k` derivatives come from `crate::elliptic` (DLMF 19.4), their `phi`
//! derivatives from the integrands.

use crate::elliptic;

#[derive(Clone, Copy, Debug)]
pub(super) struct D {
    pub(super) v: f64,
    pub(super) d: [f64; 2],
}

impl D {
    pub(super) fn c(v: f64) -> D {
        D { v, d: [0.0, 0.0] }
    }
    pub(super) fn var(v: f64, i: usize) -> D {
        let mut d = [0.0, 0.0];
        d[i] = 1.0;
        D { v, d }
    }
    pub(super) fn chain(self, v: f64, dv: f64) -> D {
        D {
            v,
            d: [self.d[0] * dv, self.d[1] * dv],
        }
    }
    pub(super) fn sqrt(self) -> D {
        let r = self.v.sqrt();
        self.chain(r, 0.5 / r)
    }
    pub(super) fn sq(self) -> D {
        self * self
    }
}

impl std::ops::Add for D {
    type Output = D;
    fn add(self, o: D) -> D {
        D {
            v: self.v + o.v,
            d: [self.d[0] + o.d[0], self.d[1] + o.d[1]],
        }
    }
}

impl std::ops::Sub for D {
    type Output = D;
    fn sub(self, o: D) -> D {
        D {
            v: self.v - o.v,
            d: [self.d[0] - o.d[0], self.d[1] - o.d[1]],
        }
    }
}

impl std::ops::Mul for D {
    type Output = D;
    fn mul(self, o: D) -> D {
        D {
            v: self.v * o.v,
            d: [
                self.d[0] * o.v + self.v * o.d[0],
                self.d[1] * o.v + self.v * o.d[1],
            ],
        }
    }
}

impl std::ops::Div for D {
    type Output = D;
    fn div(self, o: D) -> D {
        let q = self.v / o.v;
        D {
            v: q,
            d: [
                (self.d[0] - q * o.d[0]) / o.v,
                (self.d[1] - q * o.d[1]) / o.v,
            ],
        }
    }
}

impl std::ops::Mul<D> for f64 {
    type Output = D;
    fn mul(self, o: D) -> D {
        D {
            v: self * o.v,
            d: [self * o.d[0], self * o.d[1]],
        }
    }
}

impl std::ops::Sub<D> for f64 {
    type Output = D;
    fn sub(self, o: D) -> D {
        D {
            v: self - o.v,
            d: [-o.d[0], -o.d[1]],
        }
    }
}

/// Complete integrals `(K, E)` of a dual modulus (AGM only; cheaper than `complete_d`).
pub(super) fn complete_ke_d(k: D) -> (D, D) {
    let ke = elliptic::complete(k.v);
    let (dk, de) = elliptic::complete_dk(k.v, ke);
    (k.chain(ke.0, dk), k.chain(ke.1, de))
}

/// Complete integrals `(K, E, D)` of a dual modulus, `D = (K - E) / k^2`.
pub(super) fn complete_d(k: D) -> (D, D, D) {
    let ked = elliptic::complete3(k.v);
    let (dk, de) = elliptic::complete_dk(k.v, (ked.0, ked.1));
    let dd = elliptic::complete_d_dk(k.v, ked);
    (k.chain(ked.0, dk), k.chain(ked.1, de), k.chain(ked.2, dd))
}

/// Incomplete integrals `(F, E, D)` at `|phi| <= pi/2` of a dual phase and modulus, with
/// `sin phi` and `cos phi` as duals (one trigonometric evaluation for all of them).
pub(super) fn incomplete_d(phi: D, k: D) -> ((D, D, D), (D, D)) {
    let set = elliptic::incomplete_set(phi.v, k.v);
    let (s, delta) = (set.sin, set.delta);
    let mix = |v: f64, by_phi: f64, by_k: f64| D {
        v,
        d: [
            phi.d[0] * by_phi + k.d[0] * by_k,
            phi.d[1] * by_phi + k.d[1] * by_k,
        ],
    };
    let (f, e, d) = set.fed;
    let (fk, ek, dk) = set.fed_dk;
    (
        (
            mix(f, 1.0 / delta, fk),
            mix(e, delta, ek),
            mix(d, s * s / delta, dk),
        ),
        (phi.chain(s, set.cos), phi.chain(set.cos, -s)),
    )
}
