//! Round axis values for every plot the program draws (the app's plots, the SVG export
//! and the sheet's plots): steps of 1, 2 or 5 times a power of ten, the ticks they put on
//! a range, and the decimals a tick label needs. No GUI and no PDF types.

/// The smallest of 1, 2, 5 times a power of ten that is at least `min`, with its leading
/// digit (1, 2 or 5). `min` must be finite and above zero.
pub fn nice_step(min: f64) -> (f64, f64) {
    let p = 10f64.powf(min.log10().floor());
    [1.0, 2.0, 5.0, 10.0]
        .into_iter()
        .map(|m| if m == 10.0 { (m * p, 1.0) } else { (m * p, m) })
        .find(|(s, _)| *s >= min)
        .unwrap_or((10.0 * p, 1.0))
}

/// The decimals a label needs to show a multiple of `step` exactly (0 to 6).
pub fn decimals(step: f64) -> usize {
    (0..6)
        .find(|&d| {
            let s = step * 10f64.powi(d);
            (s - s.round()).abs() < 1e-6 * s.max(1.0)
        })
        .unwrap_or(6) as usize
}

/// Round tick positions covering `[lo, hi]`, about `target` of them (the largest 1-2-5
/// step that still gives at least `target - 1` intervals), and the decimals their labels
/// need. An empty or non-finite range gives the one tick `lo`.
pub fn ticks(lo: f64, hi: f64, target: usize) -> (Vec<f64>, usize) {
    let span = hi - lo;
    if !(span.is_finite() && span > 0.0) {
        return (vec![lo], 3);
    }
    let want = (target.max(2) - 1) as f64;
    let mag = 10f64.powf((span / want).log10().floor());
    let step = [5.0, 2.0, 1.0]
        .iter()
        .map(|f| f * mag)
        .find(|s| span / s >= want)
        .unwrap_or(mag);
    let first = (lo / step).ceil() * step;
    let mut out = Vec::new();
    let mut i = 0.0;
    while first + i * step <= hi + 1e-9 * span {
        out.push(first + i * step);
        i += 1.0;
    }
    (out, decimals(step))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn steps_follow_one_two_five() {
        // The 1-2-5 series of round steps (common practice for chart axes).
        assert_eq!(nice_step(0.7), (1.0, 1.0));
        assert_eq!(nice_step(1.0), (1.0, 1.0));
        assert_eq!(nice_step(1.2), (2.0, 2.0));
        assert_eq!(nice_step(3.0), (5.0, 5.0));
        assert_eq!(nice_step(6.0), (10.0, 1.0));
        let (s, lead) = nice_step(0.042);
        assert!((s - 0.05).abs() < 1e-15 && lead == 5.0, "{s} {lead}");
    }

    #[test]
    fn labels_carry_the_decimals_of_their_step() {
        assert_eq!(decimals(0.5), 1);
        assert_eq!(decimals(200.0), 0);
        assert_eq!(decimals(0.05), 2);
        assert_eq!(decimals(1.0), 0);
    }

    #[test]
    fn ticks_cover_the_range_on_round_values() {
        // 0 to 10 in about 6 ticks: step 2 (1-2-5 series, common practice).
        let (t, d) = ticks(0.0, 10.0, 6);
        assert_eq!(t, vec![0.0, 2.0, 4.0, 6.0, 8.0, 10.0]);
        assert_eq!(d, 0);
        let (t, d) = ticks(49.3, 50.1, 5);
        assert_eq!(d, 1);
        assert!((t[0] - 49.4).abs() < 1e-9 && t.len() == 4, "{t:?}");
        assert_eq!(ticks(1.0, 1.0, 5), (vec![1.0], 3));
        let (t, d) = ticks(69.1, 70.9, 6);
        assert_eq!(d, 1);
        assert!(t.first().is_some_and(|v| *v >= 69.1) && t.last().is_some_and(|v| *v <= 70.9));
        assert!(t.len() >= 4 && t.len() <= 10, "{t:?}");
        for v in &t {
            assert!(((v * 10.0).round() - v * 10.0).abs() < 1e-6);
        }
        let (t, d) = ticks(0.0, 1000.0, 5);
        assert_eq!((t.len(), d), (6, 0));
    }
}
