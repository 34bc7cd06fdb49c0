//! Summary statistics of a sampled sweep's results, as its report states them
//! (docs/sweeps.md §Report).
//!
//! * Percentile: numpy's default (`numpy.percentile`, method "linear"; definition 7 of
//!   R. J. Hyndman & Y. Fan, "Sample quantiles in statistical packages", The American
//!   Statistician 50(4), 361–365, 1996): for sorted x₀ ≤ … ≤ x_{n−1} and q in [0, 100],
//!   h = (n − 1) q/100 and P = x_⌊h⌋ + (h − ⌊h⌋)(x_⌊h⌋+1 − x_⌊h⌋).
//! * Wilson score interval for a proportion k/n (E. B. Wilson, "Probable inference, the
//!   law of succession, and statistical inference", JASA 22(158), 209–212, 1927):
//!   centre (p̂ + z²/2n)/(1 + z²/n), half-width z/(1 + z²/n) √(p̂(1 − p̂)/n + z²/4n²),
//!   z = Φ⁻¹(1 − α/2). Unlike p̂ ± z√(p̂(1−p̂)/n) it stays inside [0, 1] and is not empty
//!   at k = 0 or k = n.

use super::normal;

/// The q-th percentile (0 ≤ q ≤ 100) of `sorted` (ascending, no NaN); NaN when empty.
pub fn percentile(sorted: &[f64], q: f64) -> f64 {
    let n = sorted.len();
    if n == 0 {
        return f64::NAN;
    }
    let h = (n - 1) as f64 * q.clamp(0.0, 100.0) / 100.0;
    let lo = h.floor() as usize;
    let hi = (lo + 1).min(n - 1);
    sorted[lo] + (h - lo as f64) * (sorted[hi] - sorted[lo])
}

/// The finite values of `values`, sorted ascending.
pub fn sorted_finite(values: impl IntoIterator<Item = f64>) -> Vec<f64> {
    let mut v: Vec<f64> = values.into_iter().filter(|x| x.is_finite()).collect();
    v.sort_by(f64::total_cmp);
    v
}

/// The Wilson score interval (low, high) of k successes in n trials at two-sided
/// confidence `level` (e.g. 0.95); None when n = 0.
pub fn wilson(k: usize, n: usize, level: f64) -> Option<(f64, f64)> {
    if n == 0 || k > n {
        return None;
    }
    let z = normal::quantile(0.5 + level / 2.0);
    let (nf, p) = (n as f64, k as f64 / n as f64);
    let z2 = z * z;
    let centre = (p + z2 / (2.0 * nf)) / (1.0 + z2 / nf);
    let half = z / (1.0 + z2 / nf) * (p * (1.0 - p) / nf + z2 / (4.0 * nf * nf)).sqrt();
    // At k = 0 (k = n) the lower (upper) end is exactly 0 (1) in the closed form; say so
    // rather than keep the round-off.
    let lo = if k == 0 {
        0.0
    } else {
        (centre - half).max(0.0)
    };
    let hi = if k == n {
        1.0
    } else {
        (centre + half).min(1.0)
    };
    Some((lo, hi))
}
