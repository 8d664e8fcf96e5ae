//! Root finding, one family with iteration bounds everywhere. One-unknown solves whose bracket
//! end signs the physics gives use `newton_signed` (Newton kept inside the bracket, bisection
//! when a step leaves it); inverse queries, where a measure's crossing is bracketed but its
//! seed may be poor, use the `roots` crate's Newton-Raphson and fall back to its Brent method
//! (`inverse_query`, `brent_query`). `golden_max` finds the peak of a unimodal measure, and
//! `Carried` extends a by-product of a Newton solve to its root.

use super::*;

/// Iteration bound of every Newton solve here.
pub(super) const MAX_NEWTON: usize = 60;

/// Safeguarded Newton on `[lo, hi]` when the signs at the ends are already known
/// (`rising`: negative at `lo`, positive at `hi`). Once a Newton step is below
/// `sqrt(tol)`, quadratic convergence puts the next iterate within `tol`, so it stops there.
pub(super) fn newton_signed(
    mut lo: f64,
    mut hi: f64,
    rising: bool,
    x0: f64,
    tol: f64,
    mut f: impl FnMut(f64) -> (f64, f64),
) -> Option<f64> {
    let mut x = x0.clamp(lo, hi);
    let quadratic = tol.sqrt();
    for _ in 0..MAX_NEWTON {
        let (fx, dfx) = f(x);
        if fx == 0.0 {
            return Some(x);
        }
        if !fx.is_finite() {
            return None;
        }
        if (fx > 0.0) == rising {
            hi = x;
        } else {
            lo = x;
        }
        let newton = x - fx / dfx;
        let scale = 1.0 + x.abs();
        let next = if newton > lo && newton < hi && newton.is_finite() {
            // Relative to x itself: small moduli (small gaps) need their own digits.
            if (newton - x).abs() <= quadratic * x.abs() {
                return Some(newton);
            }
            newton
        } else {
            0.5 * (lo + hi)
        };
        if (next - x).abs() <= tol * scale || hi - lo <= tol * scale {
            return Some(next);
        }
        x = next;
    }
    Some(x)
}

/// When the `roots` crate's Newton-Raphson is done: a step below `sqrt(1e-15) |x|` leaves
/// the next iterate within rounding (convergence is quadratic), and a residual within
/// `1e-15` of the target's size is a root. Leaving the bracket ends the search at once.
pub(super) struct NewtonSettled<'a> {
    pub(super) y_scale: f64,
    pub(super) left_bracket: &'a std::cell::Cell<bool>,
}

impl roots::Convergency<f64> for NewtonSettled<'_> {
    fn is_root_found(&mut self, y: f64) -> bool {
        y.abs() <= 1e-15 * self.y_scale
    }
    fn is_converged(&mut self, x1: f64, x2: f64) -> bool {
        (x1 - x2).abs() <= 3e-8 * x1.abs().max(x2.abs())
    }
    fn is_iteration_limit_reached(&mut self, iter: usize) -> bool {
        iter >= MAX_NEWTON || self.left_bracket.get()
    }
}

impl roots::Convergency<f64> for BrentSettled {
    fn is_root_found(&mut self, y: f64) -> bool {
        y.abs() <= 1e-15 * self.y_scale
    }
    fn is_converged(&mut self, x1: f64, x2: f64) -> bool {
        (x1 - x2).abs() <= 1e-15 * (1.0 + x1.abs().max(x2.abs()))
    }
    fn is_iteration_limit_reached(&mut self, iter: usize) -> bool {
        iter >= MAX_NEWTON
    }
}

/// Brent's method converges only superlinearly, so it runs to rounding in `x`.
pub(super) struct BrentSettled {
    pub(super) y_scale: f64,
}

/// An inverse query `f(x) = 0` on `[lo, hi]`, where `f` (value and exact derivative) changes
/// sign across the bracket: Newton-Raphson from `seed` with the `roots` crate, and its
/// Brent method on the bracket if Newton leaves it or does not settle. `y_scale` is the
/// size of the target value, for the residual test. `Found` holds the root in `x`.
pub(super) fn inverse_query(
    lo: f64,
    hi: f64,
    seed: f64,
    y_scale: f64,
    f: impl Fn(f64) -> (f64, f64),
) -> StrokeQuery {
    let left_bracket = std::cell::Cell::new(false);
    // roots asks for the value and then the derivative at the same x: evaluate once.
    let last = std::cell::Cell::new((f64::NAN, f64::NAN, f64::NAN));
    let eval = |x: f64| {
        let (lx, v, d) = last.get();
        if lx == x {
            return (v, d);
        }
        if !(x >= lo && x <= hi) {
            left_bracket.set(true);
            return (f64::NAN, f64::NAN);
        }
        let (v, d) = f(x);
        last.set((x, v, d));
        (v, d)
    };
    let y_scale = y_scale.abs().max(f64::MIN_POSITIVE);
    let mut newton = NewtonSettled {
        y_scale,
        left_bracket: &left_bracket,
    };
    let found = roots::find_root_newton_raphson(
        seed.clamp(lo, hi),
        |x| eval(x).0,
        |x| eval(x).1,
        &mut newton,
    );
    if let Ok(x) = found
        && x >= lo
        && x <= hi
        && !left_bracket.get()
    {
        return StrokeQuery::Found(x);
    }
    let mut brent = BrentSettled { y_scale };
    brent_query(roots::find_root_brent(lo, hi, |x| f(x).0, &mut brent))
}

/// The outcome of a Brent search as a query's answer: no sign change across the bracket
/// is a lost bracket, anything else that finds no finite root a failed solve.
pub(super) fn brent_query(found: Result<f64, roots::SearchError>) -> StrokeQuery {
    match found {
        Ok(x) if x.is_finite() => StrokeQuery::Found(x),
        Err(roots::SearchError::NoBracketing) => StrokeQuery::BracketLost,
        _ => StrokeQuery::SolveFailed,
    }
}

/// Golden-section search for the maximum of a unimodal `f` on `[lo, hi]`.
pub(super) fn golden_max(mut lo: f64, mut hi: f64, f: impl Fn(f64) -> f64) -> f64 {
    let ratio = 0.5 * (5.0_f64.sqrt() - 1.0);
    let mut x1 = hi - ratio * (hi - lo);
    let mut x2 = lo + ratio * (hi - lo);
    let (mut f1, mut f2) = (f(x1), f(x2));
    for _ in 0..100 {
        if hi - lo <= 1e-12 * (1.0 + hi.abs()) {
            break;
        }
        if f1 < f2 {
            lo = x1;
            x1 = x2;
            f1 = f2;
            x2 = lo + ratio * (hi - lo);
            f2 = f(x2);
        } else {
            hi = x2;
            x2 = x1;
            f2 = f1;
            x1 = hi - ratio * (hi - lo);
            f1 = f(x1);
        }
    }
    0.5 * (lo + hi)
}

/// A by-product of a Newton solve carried to its root: the value and slope of a second
/// quantity at the last point the solve evaluated, extended linearly to the root. The
/// solves stop once a step is below `sqrt(1e-15)` relative, so the neglected quadratic
/// term is at rounding level; further away, `at` declines and the caller evaluates.
#[derive(Clone, Copy, Debug)]
pub(super) struct Carried {
    pub(super) x: f64,
    pub(super) v: f64,
    pub(super) dv: f64,
}

impl Carried {
    pub(super) const NONE: Carried = Carried {
        x: f64::NAN,
        v: f64::NAN,
        dv: f64::NAN,
    };

    pub(super) fn record(&mut self, x: f64, q: D) {
        *self = Carried {
            x,
            v: q.v,
            dv: q.d[0],
        };
    }

    pub(super) fn at(self, x: f64) -> Option<f64> {
        let h = x - self.x;
        (h.abs() <= 1e-7 * x.abs() && self.v.is_finite() && self.dv.is_finite())
            .then_some(self.v + self.dv * h)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Newton-Raphson from a poor seed on `atan` overshoots out of the bracket (it diverges
    /// from |x - root| > 1.39); the query must then fall back to Brent on the bracket.
    #[test]
    fn inverse_query_falls_back_to_brent_when_newton_leaves_the_bracket() {
        let f = |x: f64| ((x - 0.25).atan(), 1.0 / (1.0 + (x - 0.25).powi(2)));
        let root = inverse_query(-5.0, 5.0, -2.0, 1.0, f).ok().unwrap();
        assert!((root - 0.25).abs() < 1e-14, "{root}");
        // From a good seed Newton itself settles, to rounding.
        let root = inverse_query(-5.0, 5.0, 0.5, 1.0, f).ok().unwrap();
        assert!((root - 0.25).abs() < 1e-15, "{root}");
        // No sign change: the bracket is lost, and said so.
        assert_eq!(
            inverse_query(1.0, 5.0, 2.0, 1.0, f),
            StrokeQuery::BracketLost
        );
    }
}
