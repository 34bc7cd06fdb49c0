//! Thomas algorithm for tridiagonal systems (L.H. Thomas 1949; PHYSICS.md §1.4).
//!
//! ```text
//! a_i x_{i−1} + b_i x_i + c_i x_{i+1} = d_i,   a_0 = c_{n−1} = 0
//! forward:  m_i = b_i − a_i c'_{i−1};  c'_i = c_i/m_i;  d'_i = (d_i − a_i d'_{i−1})/m_i
//! backward: x_{n−1} = d'_{n−1};  x_i = d'_i − c'_i x_{i+1}
//! ```
//! Stable without pivoting for diagonally dominant matrices, which the θ-scheme always
//! gives (the matrix is an M-matrix). [`Factored`] keeps the forward sweep's multipliers so
//! a matrix that does not change between steps is eliminated once and each step costs two
//! sweeps over the right-hand side.

use crate::error::SolverError;

/// Solves the system in place: on return `rhs` holds x. `scratch` holds c'. All slices have
/// length n; `lower[0]` and `upper[n-1]` are not used.
pub fn solve(
    lower: &[f64],
    diag: &[f64],
    upper: &[f64],
    rhs: &mut [f64],
    scratch: &mut [f64],
) -> Result<(), SolverError> {
    let n = diag.len();
    assert!(lower.len() == n && upper.len() == n && rhs.len() == n && scratch.len() == n);
    if n == 0 {
        return Ok(());
    }
    let (mut c_prev, mut d_prev) = (0.0, 0.0);
    for i in 0..n {
        let a = if i == 0 { 0.0 } else { lower[i] };
        let m = diag[i] - a * c_prev;
        if m == 0.0 || !m.is_finite() {
            return Err(SolverError::TridiagSingular { row: i });
        }
        let inv = 1.0 / m;
        c_prev = upper[i] * inv;
        d_prev = (rhs[i] - a * d_prev) * inv;
        scratch[i] = c_prev;
        rhs[i] = d_prev;
    }
    for i in (0..n - 1).rev() {
        rhs[i] -= scratch[i] * rhs[i + 1];
    }
    Ok(())
}

/// A tridiagonal matrix after the forward sweep, for repeated solves.
#[derive(Debug, Clone, Default)]
pub struct Factored {
    /// a_i / m_i: the forward sweep is d'_i = d_i/m_i − (a_i/m_i) d'_{i−1}, one multiply-add
    /// on the dependency chain.
    lower_scaled: Vec<f64>,
    inv_pivot: Vec<f64>,
    upper_prime: Vec<f64>,
}

impl Factored {
    /// Work memory for systems of size n.
    pub fn with_size(n: usize) -> Self {
        Factored {
            lower_scaled: vec![0.0; n],
            inv_pivot: vec![0.0; n],
            upper_prime: vec![0.0; n],
        }
    }

    /// Eliminates the matrix (no allocation when the size matches the work memory).
    pub fn factor(
        &mut self,
        lower: &[f64],
        diag: &[f64],
        upper: &[f64],
    ) -> Result<(), SolverError> {
        let n = diag.len();
        assert!(lower.len() == n && upper.len() == n && self.inv_pivot.len() == n);
        let mut prev_up = 0.0;
        for i in 0..n {
            let a = if i == 0 { 0.0 } else { lower[i] };
            let m = diag[i] - a * prev_up;
            if m == 0.0 || !m.is_finite() {
                return Err(SolverError::TridiagSingular { row: i });
            }
            let inv = 1.0 / m;
            self.lower_scaled[i] = a * inv;
            self.inv_pivot[i] = inv;
            prev_up = upper[i] * inv;
            self.upper_prime[i] = prev_up;
        }
        Ok(())
    }

    /// Solves in place: on return `rhs` holds x.
    #[inline]
    pub fn solve(&self, rhs: &mut [f64]) {
        let n = rhs.len();
        assert_eq!(n, self.inv_pivot.len());
        let mut prev = 0.0;
        for ((d, &a), &inv) in rhs.iter_mut().zip(&self.lower_scaled).zip(&self.inv_pivot) {
            prev = *d * inv - a * prev;
            *d = prev;
        }
        let mut next = 0.0;
        for (x, &cp) in rhs.iter_mut().zip(&self.upper_prime).rev() {
            next = *x - cp * next;
            *x = next;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Small seeded generator (xorshift64*), so the test needs no extra crate.
    fn rng(seed: &mut u64) -> f64 {
        *seed ^= *seed >> 12;
        *seed ^= *seed << 25;
        *seed ^= *seed >> 27;
        (seed.wrapping_mul(0x2545_f491_4f6c_dd1d) >> 11) as f64 / (1u64 << 53) as f64
    }

    /// Dense Gaussian elimination with partial pivoting, the reference.
    fn dense_solve(mut a: Vec<Vec<f64>>, mut b: Vec<f64>) -> Vec<f64> {
        let n = b.len();
        for k in 0..n {
            let p = (k..n)
                .max_by(|&i, &j| a[i][k].abs().total_cmp(&a[j][k].abs()))
                .unwrap();
            a.swap(k, p);
            b.swap(k, p);
            for i in k + 1..n {
                let f = a[i][k] / a[k][k];
                let pivot_row = a[k].clone();
                for (x, p) in a[i][k..].iter_mut().zip(&pivot_row[k..]) {
                    *x -= f * p;
                }
                b[i] -= f * b[k];
            }
        }
        let mut x = vec![0.0; n];
        for i in (0..n).rev() {
            let s: f64 = (i + 1..n).map(|j| a[i][j] * x[j]).sum();
            x[i] = (b[i] - s) / a[i][i];
        }
        x
    }

    #[test]
    fn solve_matches_dense_on_random_dominant_systems() {
        let mut seed = 0x9e37_79b9_7f4a_7c15_u64;
        for &n in &[1usize, 2, 3, 10, 57] {
            let lower: Vec<f64> = (0..n)
                .map(|i| if i == 0 { 0.0 } else { -rng(&mut seed) })
                .collect();
            let upper: Vec<f64> = (0..n)
                .map(|i| if i + 1 == n { 0.0 } else { -rng(&mut seed) })
                .collect();
            let diag: Vec<f64> = (0..n)
                .map(|i| lower[i].abs() + upper[i].abs() + 0.1 + rng(&mut seed))
                .collect();
            let rhs: Vec<f64> = (0..n).map(|_| rng(&mut seed) - 0.5).collect();
            let mut dense = vec![vec![0.0; n]; n];
            for i in 0..n {
                dense[i][i] = diag[i];
                if i > 0 {
                    dense[i][i - 1] = lower[i];
                }
                if i + 1 < n {
                    dense[i][i + 1] = upper[i];
                }
            }
            let want = dense_solve(dense, rhs.clone());
            let mut x = rhs.clone();
            let mut scratch = vec![0.0; n];
            solve(&lower, &diag, &upper, &mut x, &mut scratch).unwrap();
            let mut f = Factored::with_size(n);
            f.factor(&lower, &diag, &upper).unwrap();
            let mut y = rhs.clone();
            f.solve(&mut y);
            for i in 0..n {
                // Both are backward stable on a well-conditioned system: a few ulps × n.
                assert!(
                    (x[i] - want[i]).abs() <= 1e-13 * (1.0 + want[i].abs()),
                    "n={n} i={i}"
                );
                assert!(
                    (y[i] - want[i]).abs() <= 1e-13 * (1.0 + want[i].abs()),
                    "n={n} i={i}"
                );
            }
        }
    }

    #[test]
    fn solve_captures_zero_pivot() {
        let mut rhs = [1.0, 1.0];
        let mut s = [0.0; 2];
        let err = solve(&[0.0, 1.0], &[1.0, 1.0], &[1.0, 0.0], &mut rhs, &mut s).unwrap_err();
        assert_eq!(err, SolverError::TridiagSingular { row: 1 });
    }
}
