//! The statistics of a scatter run, free of the mechanics: the Wilson score interval for a
//! failure probability, percentiles of a margin, the sample standard deviation, and a
//! histogram. Margins arrive as `f64` with the two kinds of missing margin folded in:
//! `-inf` for a failing check without a margin (no state there), `+inf` for a passing one
//! (nothing to judge against).

/// The standard normal quantile at 0.975, for two-sided 95 % intervals
/// (`Phi^-1(0.975)`, to double precision).
pub const Z_95: f64 = 1.959_963_984_540_054;

/// The Wilson score interval for a binomial proportion, `failures` in `n` trials, at the
/// normal quantile `z` (E. B. Wilson, "Probable inference, the law of succession, and
/// statistical inference", JASA 22 (1927) 209-212):
/// `(p + z^2/2n -+ z sqrt(p(1-p)/n + z^2/4n^2)) / (1 + z^2/n)` with `p = failures / n`.
/// `[0, 1]` when `n` is 0. The ends are clamped to `[0, 1]` against rounding.
pub fn wilson_interval(failures: u64, n: u64, z: f64) -> [f64; 2] {
    if n == 0 {
        return [0.0, 1.0];
    }
    let n = n as f64;
    let p = failures as f64 / n;
    let z2 = z * z;
    let denom = 1.0 + z2 / n;
    let centre = p + z2 / (2.0 * n);
    let half = z * (p * (1.0 - p) / n + z2 / (4.0 * n * n)).sqrt();
    [
        ((centre - half) / denom).clamp(0.0, 1.0),
        ((centre + half) / denom).clamp(0.0, 1.0),
    ]
}

/// The `q`-quantile (`0 <= q <= 1`) of values already sorted ascending, by linear
/// interpolation between order statistics: `x[h] + (h - floor h)(x[h+1] - x[h])` with
/// `h = (n - 1) q` (definition 7 of R. J. Hyndman and Y. Fan, "Sample quantiles in
/// statistical packages", The American Statistician 50 (1996) 361-365). Where a neighbour
/// is infinite the nearer order statistic is taken (the lower one at a tie). `None` for
/// no values.
pub fn quantile_sorted(sorted: &[f64], q: f64) -> Option<f64> {
    let n = sorted.len();
    if n == 0 {
        return None;
    }
    let h = (n - 1) as f64 * q.clamp(0.0, 1.0);
    let lo = (h.floor() as usize).min(n - 1);
    let hi = (lo + 1).min(n - 1);
    let w = h - lo as f64;
    let (a, b) = (sorted[lo], sorted[hi]);
    Some(if w == 0.0 || a == b {
        a
    } else if a.is_finite() && b.is_finite() {
        a + w * (b - a)
    } else if w <= 0.5 {
        a
    } else {
        b
    })
}

/// The sample standard deviation (divisor `n - 1`), two-pass, exactly 0 for equal values; `None` for fewer than two
/// values or when any value is not finite.
pub fn sample_sd(values: &[f64]) -> Option<f64> {
    if values.len() < 2 || values.iter().any(|v| !v.is_finite()) {
        return None;
    }
    // Two passes on the values shifted by the first, so that equal values give exactly 0.
    let n = values.len() as f64;
    let shift = values[0];
    let mean = values.iter().map(|v| v - shift).sum::<f64>() / n;
    let ss: f64 = values
        .iter()
        .map(|v| (v - shift - mean) * (v - shift - mean))
        .sum();
    Some((ss / (n - 1.0)).sqrt())
}

/// Counts of values in equal bins from the least to the greatest finite value.
#[derive(Clone, Debug, PartialEq)]
pub struct Histogram {
    /// Left edge of the first bin.
    pub lo: f64,
    /// Right edge of the last bin (equal to `lo` when every finite value is the same).
    pub hi: f64,
    /// Counts per bin, left to right; the last bin includes its right edge.
    pub counts: Vec<u64>,
    /// Values at `-inf`: failing without a margin.
    pub failing_without_margin: u64,
    /// Values at `+inf`: passing without a margin.
    pub passing_without_margin: u64,
}

impl Histogram {
    /// Bins `values` into `bins` equal bins (at least one) over their finite range.
    pub fn new(values: &[f64], bins: usize) -> Histogram {
        let bins = bins.max(1);
        let finite = values.iter().copied().filter(|v| v.is_finite());
        let (lo, hi) = finite.fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
            (lo.min(v), hi.max(v))
        });
        let mut out = Histogram {
            lo: if lo.is_finite() { lo } else { 0.0 },
            hi: if hi.is_finite() { hi } else { 0.0 },
            counts: vec![0; if lo < hi { bins } else { 1 }],
            failing_without_margin: 0,
            passing_without_margin: 0,
        };
        let width = (out.hi - out.lo) / out.counts.len() as f64;
        let last = out.counts.len() - 1;
        for &v in values {
            if v == f64::NEG_INFINITY {
                out.failing_without_margin += 1;
            } else if v == f64::INFINITY {
                out.passing_without_margin += 1;
            } else if v.is_finite() {
                let i = if width > 0.0 {
                    (((v - out.lo) / width) as usize).min(last)
                } else {
                    0
                };
                out.counts[i] += 1;
            }
        }
        out
    }

    /// The edges of bin `i`.
    pub fn bin_edges(&self, i: usize) -> (f64, f64) {
        let width = (self.hi - self.lo) / self.counts.len().max(1) as f64;
        (self.lo + width * i as f64, self.lo + width * (i + 1) as f64)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn quantile_type_7_by_hand() {
        // Hyndman and Fan definition 7, worked by hand: for 1, 2, 3, 4 the median is at
        // h = 1.5, i.e. 2.5; the 0.1-quantile at h = 0.3, i.e. 1.3.
        let x = [1.0, 2.0, 3.0, 4.0];
        assert_eq!(quantile_sorted(&x, 0.5), Some(2.5));
        assert!((quantile_sorted(&x, 0.1).unwrap_or(f64::NAN) - 1.3).abs() < 1e-15);
        assert_eq!(quantile_sorted(&x, 0.0), Some(1.0));
        assert_eq!(quantile_sorted(&x, 1.0), Some(4.0));
        assert_eq!(quantile_sorted(&[], 0.5), None);
        // An infinite neighbour: the nearer order statistic.
        let y = [f64::NEG_INFINITY, 1.0];
        assert_eq!(quantile_sorted(&y, 0.25), Some(f64::NEG_INFINITY));
        assert_eq!(quantile_sorted(&y, 0.75), Some(1.0));
    }

    #[test]
    fn sd_by_hand() {
        // 2, 4, 4, 4, 5, 5, 7, 9: mean 5, squared deviations sum to 32, so the sample
        // variance is 32/7 (worked by hand).
        let x = [2.0, 4.0, 4.0, 4.0, 5.0, 5.0, 7.0, 9.0];
        let sd = sample_sd(&x).unwrap_or(f64::NAN);
        assert!((sd - (32.0_f64 / 7.0).sqrt()).abs() < 1e-14);
        assert_eq!(sample_sd(&[1.0]), None);
        assert_eq!(sample_sd(&[1.0, f64::INFINITY]), None);
    }

    #[test]
    fn histogram_counts_every_value() {
        // Common practice: every value lands in exactly one bin or one of the two
        // no-margin counts; the maximum sits in the last bin.
        let v = [0.0, 0.5, 1.0, 1.0, f64::NEG_INFINITY, f64::INFINITY, 0.25];
        let h = Histogram::new(&v, 4);
        assert_eq!(h.counts, vec![1, 1, 1, 2]);
        assert_eq!(h.failing_without_margin, 1);
        assert_eq!(h.passing_without_margin, 1);
        assert_eq!(h.bin_edges(1), (0.25, 0.5));
        let flat = Histogram::new(&[2.0, 2.0], 10);
        assert_eq!(flat.counts, vec![2]);
    }
}
