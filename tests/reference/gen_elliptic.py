#!/usr/bin/env python3
"""Reference values of Legendre's elliptic integrals for tests/suite/elliptic_reference.rs.

Writes elliptic_mpmath.csv next to this script with the header k,phi,K,E,F,Einc:
  K    = K(k)      complete integral of the first kind   (DLMF 19.2.8)
  E    = E(k)      complete integral of the second kind  (DLMF 19.2.8)
  F    = F(phi,k)  incomplete integral of the first kind (DLMF 19.2.4)
  Einc = E(phi,k)  incomplete integral of the second kind (DLMF 19.2.5)
k is the MODULUS. mpmath takes the PARAMETER m = k^2, so every call passes k*k.

The inputs are the exact binary values of the f64 numbers the Rust test parses: k and
phi are printed with repr() (shortest round-trip form) and mpmath evaluates at exactly
those binary values, so the test compares like with like. Working precision is 40
significant digits; outputs are printed with 20 significant digits.

Run:  python3 tests/reference/gen_elliptic.py   (needs mpmath; not run at test time)
"""
import math
import os

import mpmath

mpmath.mp.dps = 40

MODULI = [0.0, 1e-6, 0.001, 0.05] + [i / 10 for i in range(1, 10)] + [0.95, 0.99, 0.995, 0.999]
AMPLITUDES = [
    0.0, 1e-8, 0.1, 0.5, 1.0, math.pi / 4, math.pi / 2, 2.0, 3.0, math.pi, 4.0,
    3 * math.pi / 2, 5.0, 2 * math.pi, 7.5, -0.3, -1.2, -math.pi / 2, -2.5, -4.0,
]


def fmt(x):
    """20 significant digits; exact zero printed as 0."""
    if x == 0:
        return "0"
    return mpmath.nstr(x, 20, min_fixed=-5, max_fixed=5, strip_zeros=False)


def main():
    out = os.path.join(os.path.dirname(os.path.abspath(__file__)), "elliptic_mpmath.csv")
    rows = ["k,phi,K,E,F,Einc"]
    for k in MODULI:
        m = mpmath.mpf(k) * mpmath.mpf(k)  # parameter m = k^2 (exact in 40 digits)
        big_k = mpmath.ellipk(m)
        big_e = mpmath.ellipe(m)
        for phi in AMPLITUDES:
            p = mpmath.mpf(phi)
            f = mpmath.ellipf(p, m)
            e_inc = mpmath.ellipe(p, m)
            rows.append(",".join([repr(k), repr(phi), fmt(big_k), fmt(big_e), fmt(f), fmt(e_inc)]))
    with open(out, "w", newline="\n") as fh:
        fh.write("\n".join(rows) + "\n")
    print(f"wrote {len(rows) - 1} rows to {out}")


if __name__ == "__main__":
    main()
