//! Tridiagonal systems: Thomas' elimination (L.H. Thomas 1949; docs/physics.md §1.4) run from
//! both ends at once (the "twisted" or burn-at-both-ends variant).
//!
//! ```text
//! a_i x_{i−1} + b_i x_i + c_i x_{i+1} = d_i,   a_0 = c_{n−1} = 0,   p = ⌊(n−1)/2⌋
//! top, i = 0…p−1:     m_i = b_i − a_i c'_{i−1};  c'_i = c_i/m_i;  z_i = (d_i − a_i z_{i−1})/m_i
//! bottom, i = n−1…p+1: m_i = b_i − c_i a'_{i+1};  a'_i = a_i/m_i;  z_i = (d_i − c_i z_{i+1})/m_i
//! meeting row:        γ = b_p − a_p c'_{p−1} − c_p a'_{p+1};  x_p = (d_p − a_p z_{p−1} − c_p z_{p+1})/γ
//! outwards:           x_i = z_i − c'_i x_{i+1} (top),  x_i = z_i − a'_i x_{i−1} (bottom)
//! ```
//! The two halves are independent, so each sweep is two dependency chains of n/2 rows that
//! the processor overlaps: the elimination's division, on the chain, costs half of what
//! it does in the one-sided sweep. Stable without pivoting for diagonally dominant
//! matrices, which the θ-scheme always gives (the matrix is an M-matrix), as the one-sided
//! sweep is. [`Factored`] keeps the multipliers so a matrix that does not change between
//! steps is eliminated once and each step costs one pass of each sweep over the
//! right-hand side; [`Factored::factor_solve_symmetric`] eliminates and sweeps in the same pass.

use crate::error::SolverError;

/// A tridiagonal matrix after elimination from both ends, for repeated solves.
#[derive(Debug, Clone, Default)]
pub struct Factored {
    /// 1/m_i (1/γ at the meeting row).
    inv_pivot: Vec<f64>,
    /// Coupling to the neighbour eliminated before, over the pivot: a_i/m_i in the top half,
    /// c_i/m_i in the bottom half, a_p/γ at the meeting row. The forward sweep is then one
    /// multiply-add on its dependency chain.
    near: Vec<f64>,
    /// Back-substitution multiplier: c'_i in the top half, a'_i in the bottom half, c_p/γ
    /// at the meeting row.
    far: Vec<f64>,
}

/// Meeting row of the two sweeps for n unknowns (n ≥ 1).
fn meeting_row(n: usize) -> usize {
    (n - 1) / 2
}

/// 1/m, or the error naming the row when the pivot vanishes.
#[inline(always)]
fn inverse(m: f64, row: usize) -> Result<f64, SolverError> {
    if m == 0.0 || !m.is_finite() {
        return Err(SolverError::TridiagSingular { row });
    }
    Ok(1.0 / m)
}

impl Factored {
    /// Work memory for systems of size n.
    pub fn with_size(n: usize) -> Self {
        Factored {
            inv_pivot: vec![0.0; n],
            near: vec![0.0; n],
            far: vec![0.0; n],
        }
    }

    /// Eliminates the matrix (no allocation when the size matches the work memory).
    /// `lower[0]` and `upper[n−1]` are not used.
    pub fn factor(
        &mut self,
        lower: &[f64],
        diag: &[f64],
        upper: &[f64],
    ) -> Result<(), SolverError> {
        assert!(lower.len() == diag.len() && upper.len() == diag.len());
        self.eliminate::<false>(|i| lower[i], diag, |i| upper[i], &mut [])
    }

    /// Eliminates the symmetric matrix with diagonal `diag` and −`off[i]` coupling rows i
    /// and i + 1 (`off` has at least n − 1 entries; the form of a conductance matrix).
    pub fn factor_symmetric(&mut self, diag: &[f64], off: &[f64]) -> Result<(), SolverError> {
        let n = diag.len();
        let off = &off[..n.saturating_sub(1)];
        self.eliminate::<false>(|i| -off[i - 1], diag, |i| -off[i], &mut [])
    }

    /// [`Factored::factor_symmetric`] and the solve for `rhs` in the same pass: on return
    /// `rhs` holds x.
    pub fn factor_solve_symmetric(
        &mut self,
        diag: &[f64],
        off: &[f64],
        rhs: &mut [f64],
    ) -> Result<(), SolverError> {
        let n = diag.len();
        let off = &off[..n.saturating_sub(1)];
        self.eliminate::<true>(|i| -off[i - 1], diag, |i| -off[i], rhs)?;
        self.substitute(rhs);
        Ok(())
    }

    /// Elimination from both ends; with `SWEEP` the right-hand side is swept along (then
    /// `rhs` holds z, and x at the meeting row).
    #[inline(always)]
    fn eliminate<const SWEEP: bool>(
        &mut self,
        lower: impl Fn(usize) -> f64,
        diag: &[f64],
        upper: impl Fn(usize) -> f64,
        rhs: &mut [f64],
    ) -> Result<(), SolverError> {
        let n = diag.len();
        assert!(self.inv_pivot.len() == n);
        assert!(!SWEEP || rhs.len() == n);
        if n == 0 {
            return Ok(());
        }
        let (inv_pivot, near, far) = (&mut self.inv_pivot, &mut self.near, &mut self.far);
        let p = meeting_row(n);
        let bottom_rows = n - 1 - p;
        // Top row i = k (k < p) and bottom row j = n−1−k (k < bottom_rows, which is p or
        // p + 1) in the same iteration: two independent chains.
        let (mut c_prime, mut z_top) = (0.0, 0.0);
        let (mut a_prime, mut z_bottom) = (0.0, 0.0);
        for k in 0..bottom_rows {
            if k < p {
                let i = k;
                let a = if i == 0 { 0.0 } else { lower(i) };
                let inv = inverse(diag[i] - a * c_prime, i)?;
                inv_pivot[i] = inv;
                near[i] = a * inv;
                c_prime = upper(i) * inv;
                far[i] = c_prime;
                if SWEEP {
                    z_top = rhs[i] * inv - near[i] * z_top;
                    rhs[i] = z_top;
                }
            }
            let j = n - 1 - k;
            let c = if j == n - 1 { 0.0 } else { upper(j) };
            let inv = inverse(diag[j] - c * a_prime, j)?;
            inv_pivot[j] = inv;
            near[j] = c * inv;
            a_prime = lower(j) * inv;
            far[j] = a_prime;
            if SWEEP {
                z_bottom = rhs[j] * inv - near[j] * z_bottom;
                rhs[j] = z_bottom;
            }
        }
        let a = if p == 0 { 0.0 } else { lower(p) };
        let c = if p == n - 1 { 0.0 } else { upper(p) };
        let inv = inverse(diag[p] - a * c_prime - c * a_prime, p)?;
        inv_pivot[p] = inv;
        near[p] = a * inv;
        far[p] = c * inv;
        if SWEEP {
            rhs[p] = rhs[p] * inv - near[p] * z_top - far[p] * z_bottom;
        }
        Ok(())
    }

    /// Substitution outwards from the meeting row, whose x `rhs` already holds: the top
    /// rows p − 1…0 and the bottom rows p + 1…n − 1 as two chains in one loop (slices split
    /// at the meeting row, so the loop has no bounds checks).
    #[inline(always)]
    fn substitute(&self, rhs: &mut [f64]) {
        let n = rhs.len();
        let p = meeting_row(n);
        let far = &self.far[..n];
        let (top, rest) = rhs.split_at_mut(p);
        let (mid, bottom) = rest.split_at_mut(1);
        let (far_top, far_bottom) = (&far[..p], &far[p + 1..]);
        let (mut x_up, mut x_down) = (mid[0], mid[0]);
        // Equal lengths stated once, so the indexing below needs no checks.
        let m = top.len();
        let (far_top, xd, fd) = (&far_top[..m], &mut bottom[..m], &far_bottom[..m]);
        for k in 0..m {
            let i = m - 1 - k;
            x_up = top[i] - far_top[i] * x_up;
            top[i] = x_up;
            x_down = xd[k] - fd[k] * x_down;
            xd[k] = x_down;
        }
        // The bottom half has one row more when n is even.
        if bottom.len() > p {
            bottom[p] -= far_bottom[p] * x_down;
        }
    }

    /// Solves in place with the kept factors: on return `rhs` holds x.
    pub fn solve(&self, rhs: &mut [f64]) {
        let n = rhs.len();
        assert_eq!(n, self.inv_pivot.len());
        if n == 0 {
            return;
        }
        self.forward(rhs, None, 0);
        self.substitute(rhs);
    }

    /// Solves for the right-hand side d_i = `scale[i]` × `src[i]` for i ≥ `from` and d_i =
    /// `x[i]` below (rows set by the caller), building it within the forward sweep (one pass
    /// less over the vectors; the same bits as forming d and calling [`Factored::solve`]).
    /// On return `x` holds the solution.
    pub fn solve_scaled(&self, x: &mut [f64], scale: &[f64], src: &[f64], from: usize) {
        let n = x.len();
        assert_eq!(n, self.inv_pivot.len());
        let (scale, src) = (&scale[..n], &src[..n]);
        if n == 0 {
            return;
        }
        if from > meeting_row(n) {
            // A system so small that the given rows reach the bottom half: formed first.
            for ((x, &a), &b) in x[from.min(n)..]
                .iter_mut()
                .zip(&scale[from.min(n)..])
                .zip(&src[from.min(n)..])
            {
                *x = a * b;
            }
            return self.solve(x);
        }
        self.forward(x, Some((scale, src)), from);
        self.substitute(x);
    }

    /// Forward sweep from both ends (rows 0…p − 1 and n − 1…p + 1, two chains in one loop)
    /// and the meeting row: on return `rhs` holds z, and x_p at the meeting row. Row i of
    /// the right-hand side is `scale[i] src[i]` for i ≥ `from` when `scaled` is given
    /// (`from` ≤ p), `rhs[i]` otherwise.
    #[inline(always)]
    fn forward(&self, rhs: &mut [f64], scaled: Option<(&[f64], &[f64])>, from: usize) {
        let n = rhs.len();
        let p = meeting_row(n);
        let from = if scaled.is_some() { from } else { 0 };
        assert!(from <= p);
        let (inv, near, far) = (&self.inv_pivot[..n], &self.near[..n], &self.far[..n]);
        let (top, rest) = rhs.split_at_mut(p);
        let (mid, bottom) = rest.split_at_mut(1);
        let (mut z_top, mut z_bottom) = (0.0, 0.0);
        // Top rows below `from`: the caller's values, on the top chain alone.
        for ((r, &iv), &nr) in top[..from].iter_mut().zip(&inv[..from]).zip(&near[..from]) {
            z_top = *r * iv - nr * z_top;
            *r = z_top;
        }
        let (top, inv_t, near_t) = (&mut top[from..], &inv[from..p], &near[from..p]);
        let (inv_b, near_b) = (&inv[p + 1..], &near[p + 1..]);
        // The bottom chain's rows the top one has no partner for (one more when n is even,
        // and `from` more), alone first, from row n − 1 up.
        let extra = bottom.len() - top.len();
        let split = bottom.len() - extra;
        let (bottom, bottom_extra) = bottom.split_at_mut(split);
        let (inv_bx, near_bx) = (&inv_b[split..], &near_b[split..]);
        let (inv_b, near_b) = (&inv_b[..split], &near_b[..split]);
        match scaled {
            None => {
                for ((r, &iv), &nr) in bottom_extra.iter_mut().zip(inv_bx).zip(near_bx).rev() {
                    z_bottom = *r * iv - nr * z_bottom;
                    *r = z_bottom;
                }
                let m = top.len();
                let (it, nt) = (&inv_t[..m], &near_t[..m]);
                let (rb, ib, nb) = (&mut bottom[..m], &inv_b[..m], &near_b[..m]);
                for k in 0..m {
                    let j = m - 1 - k;
                    z_top = top[k] * it[k] - nt[k] * z_top;
                    top[k] = z_top;
                    z_bottom = rb[j] * ib[j] - nb[j] * z_bottom;
                    rb[j] = z_bottom;
                }
                mid[0] = mid[0] * inv[p] - near[p] * z_top - far[p] * z_bottom;
            }
            Some((scale, src)) => {
                let (sc_b, sr_b) = (&scale[p + 1..], &src[p + 1..]);
                let (sc_bx, sr_bx) = (&sc_b[split..], &sr_b[split..]);
                let (sc_b, sr_b) = (&sc_b[..split], &sr_b[..split]);
                let (sc_t, sr_t) = (&scale[from..p], &src[from..p]);
                let bx = bottom_extra.iter_mut().zip(inv_bx).zip(near_bx);
                for (((r, &iv), &nr), (&a, &c)) in bx.zip(sc_bx.iter().zip(sr_bx)).rev() {
                    z_bottom = a * c * iv - nr * z_bottom;
                    *r = z_bottom;
                }
                let m = top.len();
                let (it, nt, at, ct) = (&inv_t[..m], &near_t[..m], &sc_t[..m], &sr_t[..m]);
                let (rb, ib, nb) = (&mut bottom[..m], &inv_b[..m], &near_b[..m]);
                let (ab, cb) = (&sc_b[..m], &sr_b[..m]);
                for k in 0..m {
                    let j = m - 1 - k;
                    z_top = at[k] * ct[k] * it[k] - nt[k] * z_top;
                    top[k] = z_top;
                    z_bottom = ab[j] * cb[j] * ib[j] - nb[j] * z_bottom;
                    rb[j] = z_bottom;
                }
                mid[0] = scale[p] * src[p] * inv[p] - near[p] * z_top - far[p] * z_bottom;
            }
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
        // Odd and even sizes: the two sweeps meet at ⌊(n−1)/2⌋ and the bottom one has
        // one row more when n is even.
        for &n in &[1usize, 2, 3, 4, 5, 10, 57, 58] {
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
            let mut f = Factored::with_size(n);
            f.factor(&lower, &diag, &upper).unwrap();
            let mut x = rhs.clone();
            f.solve(&mut x);
            // The kept factors solve again.
            let mut y = rhs.clone();
            f.solve(&mut y);
            for i in 0..n {
                // Backward stable on a well-conditioned system: a few ulps × n.
                for (name, got) in [("solve", x[i]), ("solve again", y[i])] {
                    assert!(
                        (got - want[i]).abs() <= 1e-13 * (1.0 + want[i].abs()),
                        "{name}: n={n} i={i}: {got} vs {}",
                        want[i]
                    );
                }
            }
        }
    }

    #[test]
    fn symmetric_form_matches_the_general_one() {
        let mut seed = 0x1234_5678_9abc_def1_u64;
        for &n in &[1usize, 2, 3, 4, 9, 40, 41] {
            let off: Vec<f64> = (0..n).map(|_| 0.1 + rng(&mut seed)).collect();
            let diag: Vec<f64> = (0..n)
                .map(|i| {
                    let left = if i > 0 { off[i - 1] } else { 0.0 };
                    let right = if i + 1 < n { off[i] } else { 0.0 };
                    left + right + 1e-3 + rng(&mut seed)
                })
                .collect();
            let lower: Vec<f64> = (0..n)
                .map(|i| if i > 0 { -off[i - 1] } else { 0.0 })
                .collect();
            let upper: Vec<f64> = (0..n).map(|i| -off[i]).collect();
            let rhs: Vec<f64> = (0..n).map(|_| rng(&mut seed) - 0.5).collect();
            let (mut x, mut y, mut z) = (rhs.clone(), rhs.clone(), rhs.clone());
            let mut f = Factored::with_size(n);
            f.factor(&lower, &diag, &upper).unwrap();
            f.solve(&mut x);
            let mut g = Factored::with_size(n);
            g.factor_solve_symmetric(&diag, &off, &mut y).unwrap();
            let mut h = Factored::with_size(n);
            h.factor_symmetric(&diag, &off).unwrap();
            h.solve(&mut z);
            // The same operations in the same order: the same bits.
            assert_eq!(x, y, "n={n}");
            assert_eq!(x, z, "n={n}");
        }
    }

    #[test]
    fn scaled_right_hand_side_gives_the_bits_of_a_formed_one() {
        // The fused build of d_i = scale_i src_i in the forward sweep against forming d
        // first: the same products in the same order, so the same bits (odd and even sizes,
        // rows below `from` set by the caller).
        let mut seed = 0x0bad_cafe_1234_5678_u64;
        for &(n, from) in &[(1usize, 0usize), (2, 2), (3, 1), (8, 2), (57, 2), (58, 0)] {
            let off: Vec<f64> = (0..n).map(|_| 0.1 + rng(&mut seed)).collect();
            let diag: Vec<f64> = (0..n).map(|_| 2.5 + rng(&mut seed)).collect();
            let scale: Vec<f64> = (0..n).map(|_| 1e3 * rng(&mut seed)).collect();
            let src: Vec<f64> = (0..n).map(|_| rng(&mut seed) - 0.5).collect();
            let head: Vec<f64> = (0..n).map(|_| rng(&mut seed)).collect();
            let mut f = Factored::with_size(n);
            f.factor_symmetric(&diag, &off).unwrap();
            let mut want: Vec<f64> = (0..n)
                .map(|i| if i < from { head[i] } else { scale[i] * src[i] })
                .collect();
            f.solve(&mut want);
            let mut got: Vec<f64> = (0..n)
                .map(|i| if i < from { head[i] } else { f64::NAN })
                .collect();
            f.solve_scaled(&mut got, &scale, &src, from);
            let (w, g): (Vec<u64>, Vec<u64>) = (
                want.iter().map(|x| x.to_bits()).collect(),
                got.iter().map(|x| x.to_bits()).collect(),
            );
            assert_eq!(w, g, "n={n} from={from}");
        }
    }

    #[test]
    fn factor_names_the_zero_pivot() {
        // [[1, 1], [1, 1]] is singular; the bottom sweep eliminates row 1 and the meeting
        // row 0 is left with γ = 0.
        let mut f = Factored::with_size(2);
        let err = f.factor(&[0.0, 1.0], &[1.0, 1.0], &[1.0, 0.0]).unwrap_err();
        assert_eq!(err, SolverError::TridiagSingular { row: 0 });
        // A zero on the diagonal of the bottom row is met first in its own sweep.
        let mut f = Factored::with_size(3);
        let err = f
            .factor(&[0.0, 1.0, 1.0], &[4.0, 4.0, 0.0], &[1.0, 1.0, 0.0])
            .unwrap_err();
        assert_eq!(err, SolverError::TridiagSingular { row: 2 });
    }
}
