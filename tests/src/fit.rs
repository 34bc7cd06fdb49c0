//! Least-squares fit of a sinusoid over whole periods of uniformly spaced samples.

/// Fits `x(t) ≈ c + s sin ωt + k cos ωt` to samples over an integer number of periods
/// (uniform spacing, so the basis is orthogonal and the fit is the discrete Fourier
/// coefficient). Returns (s, k).
pub fn sin_cos(times: &[f64], values: &[f64], omega: f64) -> (f64, f64) {
    let n = times.len() as f64;
    let mean = values.iter().sum::<f64>() / n;
    let (mut s, mut k) = (0.0, 0.0);
    for (&t, &x) in times.iter().zip(values) {
        s += (x - mean) * (omega * t).sin();
        k += (x - mean) * (omega * t).cos();
    }
    (2.0 * s / n, 2.0 * k / n)
}
