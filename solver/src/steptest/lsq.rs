//! Small dense linear least squares with the coefficient covariance, for a handful of
//! unknowns: columns scaled to unit length, modified Gram–Schmidt QR with one
//! re-orthogonalisation pass, back substitution.
//!
//! ```text
//! min ‖y − X β‖²,  X = Q R,  β = R⁻¹ Qᵀ y,  (XᵀX)⁻¹ = R⁻¹ R⁻ᵀ
//! ```
//!
//! Gram–Schmidt applied twice gives columns orthogonal to working precision (Björck, Å.,
//! 1996, "Numerical Methods for Least Squares Problems", SIAM, §2.4 — from memory, verify).

/// A least-squares solution.
pub struct Solution {
    /// Coefficients β.
    pub coef: Vec<f64>,
    /// (XᵀX)⁻¹, row-major k × k; multiply by σ̂² for the covariance of β.
    pub xtx_inv: Vec<f64>,
    /// Residual sum of squares ‖y − X β‖².
    pub rss: f64,
}

/// Solves min ‖y − X β‖² for the columns `cols` of X (each of y's length). Returns `None`
/// when a column is (numerically) a combination of the others: relative pivot below 1e-10.
pub fn solve(cols: &[Vec<f64>], y: &[f64]) -> Option<Solution> {
    let k = cols.len();
    let m = y.len();
    let scale: Vec<f64> = cols
        .iter()
        .map(|c| c.iter().map(|v| v * v).sum::<f64>().sqrt())
        .collect();
    if scale.iter().any(|&s| !(s > 0.0 && s.is_finite())) {
        return None;
    }
    let mut q: Vec<Vec<f64>> = cols
        .iter()
        .zip(&scale)
        .map(|(c, s)| c.iter().map(|v| v / s).collect())
        .collect();
    let mut r = vec![0.0; k * k];
    for j in 0..k {
        let (done, rest) = q.split_at_mut(j);
        let qj = &mut rest[0];
        for _pass in 0..2 {
            for (i, qi) in done.iter().enumerate() {
                let d: f64 = qi.iter().zip(qj.iter()).map(|(a, b)| a * b).sum();
                r[i * k + j] += d;
                for (a, b) in qj.iter_mut().zip(qi) {
                    *a -= d * b;
                }
            }
        }
        let norm = qj.iter().map(|v| v * v).sum::<f64>().sqrt();
        if norm.is_nan() || norm <= 1e-10 {
            return None;
        }
        r[j * k + j] = norm;
        for v in &mut q[j] {
            *v /= norm;
        }
    }
    // β' = R⁻¹ Qᵀ y for the scaled columns; β = β' / scale.
    let qty: Vec<f64> = q
        .iter()
        .map(|c| c.iter().zip(y).map(|(a, b)| a * b).sum())
        .collect();
    let mut beta = vec![0.0; k];
    for i in (0..k).rev() {
        let s: f64 = (i + 1..k).map(|j| r[i * k + j] * beta[j]).sum();
        beta[i] = (qty[i] - s) / r[i * k + i];
    }
    // R⁻¹ (upper triangular), then (XᵀX)⁻¹ = D⁻¹ R⁻¹ R⁻ᵀ D⁻¹ with D = diag(scale).
    let mut rinv = vec![0.0; k * k];
    for c in 0..k {
        rinv[c * k + c] = 1.0 / r[c * k + c];
        for i in (0..c).rev() {
            let s: f64 = (i + 1..=c).map(|j| r[i * k + j] * rinv[j * k + c]).sum();
            rinv[i * k + c] = -s / r[i * k + i];
        }
    }
    let mut xtx_inv = vec![0.0; k * k];
    for a in 0..k {
        for b in 0..k {
            let s: f64 = (0..k).map(|j| rinv[a * k + j] * rinv[b * k + j]).sum();
            xtx_inv[a * k + b] = s / (scale[a] * scale[b]);
        }
    }
    let coef: Vec<f64> = beta.iter().zip(&scale).map(|(b, s)| b / s).collect();
    let rss = (0..m)
        .map(|p| {
            let fit: f64 = (0..k).map(|j| cols[j][p] * coef[j]).sum();
            (y[p] - fit).powi(2)
        })
        .sum();
    Some(Solution { coef, xtx_inv, rss })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Line through (0,1), (1,3), (2,4): by hand, slope 1.5, intercept 7/6, RSS 1/6,
    /// (XᵀX)⁻¹ = [[5/6, −1/2], [−1/2, 1/2]] (normal equations [[3, 3], [3, 5]]).
    #[test]
    fn steptest_lsq_small_line_by_hand() {
        let sol = solve(
            &[vec![1.0, 1.0, 1.0], vec![0.0, 1.0, 2.0]],
            &[1.0, 3.0, 4.0],
        )
        .unwrap();
        assert!((sol.coef[0] - 7.0 / 6.0).abs() < 1e-14);
        assert!((sol.coef[1] - 1.5).abs() < 1e-14);
        assert!((sol.rss - 1.0 / 6.0).abs() < 1e-14);
        let want = [5.0 / 6.0, -0.5, -0.5, 0.5];
        for (a, b) in sol.xtx_inv.iter().zip(want) {
            assert!((a - b).abs() < 1e-14, "{a} {b}");
        }
        assert!(solve(
            &[vec![1.0, 2.0, 3.0], vec![2.0, 4.0, 6.0]],
            &[1.0, 2.0, 3.0]
        )
        .is_none());
    }
}
