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
    /// Products of consecutive `near` along each chain, for the paired forward sweep of
    /// [`Factored::solve_scaled`]: near_i near_{i−1} in the top half (i ≥ 1), near_i near_{i+1}
    /// in the bottom half (i ≤ n − 2), 0 elsewhere.
    near_pair: Vec<f64>,
    /// Products of consecutive `far` along each chain, for the paired substitution:
    /// far_i far_{i+1} in the top half (i ≤ p − 2), far_i far_{i−1} in the bottom half
    /// (i ≥ p + 2), 0 elsewhere.
    far_pair: Vec<f64>,
    /// Row scale of [`Factored::solve_scaled`]'s right-hand side ([`Factored::keep_scale`]).
    scale: Vec<f64>,
    /// scale_i/m_i (scale_p/γ at the meeting row).
    gain_pivot: Vec<f64>,
    /// Whether `scale` and `gain_pivot` belong to the current factors.
    scale_kept: bool,
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
            near_pair: vec![0.0; n],
            far_pair: vec![0.0; n],
            scale: vec![0.0; n],
            gain_pivot: vec![0.0; n],
            scale_kept: false,
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
        self.scale_kept = false;
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

    /// The products of consecutive multipliers along each chain (`near_pair`, `far_pair`)
    /// for the paired sweeps of [`Factored::solve_scaled`].
    fn pair_products(&mut self) {
        let n = self.near.len();
        let p = meeting_row(n);
        let (near, far) = (&self.near, &self.far);
        let (np, fp) = (&mut self.near_pair, &mut self.far_pair);
        np.fill(0.0);
        fp.fill(0.0);
        for i in 1..p {
            np[i] = near[i] * near[i - 1];
        }
        for i in p + 1..n.saturating_sub(1) {
            np[i] = near[i] * near[i + 1];
        }
        for i in 0..p.saturating_sub(1) {
            fp[i] = far[i] * far[i + 1];
        }
        for i in p + 2..n {
            fp[i] = far[i] * far[i - 1];
        }
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

    /// [`Factored::substitute`] two rows at a time: with x_{i+1} known, the top chain's next
    /// two rows are x_i = z_i − c'_i x_{i+1} and x_{i−1} = (z_{i−1} − c'_{i−1} z_i) +
    /// c'_{i−1} c'_i x_{i+1}, so the chain (the dependency from one x to the next) has one
    /// multiply-add per two rows; the bottom chain likewise. Equal to the one-row
    /// substitution up to round-off.
    #[inline(always)]
    fn substitute_paired(&self, rhs: &mut [f64]) {
        let n = rhs.len();
        let p = meeting_row(n);
        let (far, far_pair) = (&self.far[..n], &self.far_pair[..n]);
        let (top, rest) = rhs.split_at_mut(p);
        let (mid, bottom) = rest.split_at_mut(1);
        let (mut x_up, mut x_down) = (mid[0], mid[0]);
        let m = top.len();
        let (ft, pt) = (&far[..m], &far_pair[..m]);
        let (xd, fd, pd) = (
            &mut bottom[..m],
            &far[p + 1..][..m],
            &far_pair[p + 1..][..m],
        );
        // Pairs of rows by exact chunks (no index arithmetic or bounds checks in the
        // loop): the top chain's pairs from row m − 1 down (chunk [i − 1, i]), the bottom
        // chain's from row p + 1 up (chunk [k, k + 1]).
        let top_pairs = top[..m]
            .rchunks_exact_mut(2)
            .zip(ft.rchunks_exact(2).zip(pt.rchunks_exact(2)));
        let bottom_pairs = xd
            .chunks_exact_mut(2)
            .zip(fd.chunks_exact(2).zip(pd.chunks_exact(2)));
        for ((t, (ft, pt)), (b, (fd, pd))) in top_pairs.zip(bottom_pairs) {
            let (z0, z1) = (t[1], t[0]);
            t[1] = z0 - ft[1] * x_up;
            x_up = (z1 - ft[0] * z0) + pt[0] * x_up;
            t[0] = x_up;
            let (w0, w1) = (b[0], b[1]);
            b[0] = w0 - fd[0] * x_down;
            x_down = (w1 - fd[1] * w0) + pd[1] * x_down;
            b[1] = x_down;
        }
        if m % 2 == 1 {
            // The last row of each chain alone (m odd): top row 0, bottom row p + m.
            top[0] -= ft[0] * x_up;
            let k = m - 1;
            x_down = xd[k] - fd[k] * x_down;
            xd[k] = x_down;
        }
        // The bottom half has one row more when n is even.
        if bottom.len() > p {
            bottom[p] -= far[p + 1..][p] * x_down;
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

    /// Keeps the row scale of [`Factored::solve_scaled`]'s right-hand side, `scale[i]`, and
    /// g_i = `scale[i]`/m_i, and forms the pair products of the paired sweeps; call it after
    /// each factorization (which forgets them).
    pub fn keep_scale(&mut self, scale: &[f64]) {
        let n = self.inv_pivot.len();
        let scale = &scale[..n];
        self.scale.copy_from_slice(scale);
        for ((g, &s), &iv) in self.gain_pivot.iter_mut().zip(scale).zip(&self.inv_pivot) {
            *g = s * iv;
        }
        // Only the paired sweeps need the pair products: formed here, not with every
        // factorization (Newton's and the error filter's factors are swept one row at a time).
        self.pair_products();
        self.scale_kept = true;
    }

    /// The row scale kept by [`Factored::keep_scale`] for these factors.
    ///
    /// # Panics
    /// When no scale was kept since the last factorization.
    pub fn kept_scale(&self) -> &[f64] {
        assert!(
            self.scale_kept,
            "kept_scale: no scale kept for these factors"
        );
        &self.scale
    }

    /// Solves for the right-hand side d_i = scale_i × `src[i]` for i ≥ `from` (the scale
    /// given to [`Factored::keep_scale`]) and d_i = `x[i]` below (rows set by the caller),
    /// building it within the forward sweep, both sweeps two rows at a time (paired
    /// recurrences: equal to forming d and calling [`Factored::solve`] up to round-off).
    /// On return `x` holds the solution.
    ///
    /// # Panics
    /// When no scale was kept since the last factorization.
    pub fn solve_scaled(&self, x: &mut [f64], src: &[f64], from: usize) {
        let n = x.len();
        assert_eq!(n, self.inv_pivot.len());
        assert!(
            self.scale_kept,
            "solve_scaled: no scale kept for these factors"
        );
        let src = &src[..n];
        if n == 0 {
            return;
        }
        if from > meeting_row(n) {
            // A system so small that the given rows reach the bottom half: formed first.
            for ((x, &a), &b) in x[from.min(n)..]
                .iter_mut()
                .zip(&self.scale[from.min(n)..])
                .zip(&src[from.min(n)..])
            {
                *x = a * b;
            }
            return self.solve(x);
        }
        self.forward(x, Some(src), from);
        self.substitute_paired(x);
    }

    /// Forward sweep from both ends (rows 0…p − 1 and n − 1…p + 1, two chains in one loop)
    /// and the meeting row: on return `rhs` holds z, and x_p at the meeting row. Row i of
    /// the right-hand side is `scale[i] src[i]` for i ≥ `from` when `scaled` is given
    /// (`from` ≤ p), `rhs[i]` otherwise.
    #[inline(always)]
    fn forward(&self, rhs: &mut [f64], scaled: Option<&[f64]>, from: usize) {
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
            Some(src) => {
                // d_i/m_i = g_i src_i with the kept g_i = scale_i/m_i.
                let gain = &self.gain_pivot[..n];
                let (g_b, sr_b) = (&gain[p + 1..], &src[p + 1..]);
                let (g_bx, sr_bx) = (&g_b[split..], &sr_b[split..]);
                let (g_b, sr_b) = (&g_b[..split], &sr_b[..split]);
                let (g_t, sr_t) = (&gain[from..p], &src[from..p]);
                let bx = bottom_extra.iter_mut().zip(near_bx);
                for ((r, &nr), (&g, &c)) in bx.zip(g_bx.iter().zip(sr_bx)).rev() {
                    z_bottom = g * c - nr * z_bottom;
                    *r = z_bottom;
                }
                let m = top.len();
                let (nt, gt, ct) = (&near_t[..m], &g_t[..m], &sr_t[..m]);
                let (rb, nb) = (&mut bottom[..m], &near_b[..m]);
                let (gb, cb) = (&g_b[..m], &sr_b[..m]);
                // Two rows of each chain at a time: with d'_i = d_i/m_i,
                // z_{i+1} = (d'_{i+1} − near_{i+1} d'_i) + near_{i+1} near_i z_{i−1}, so the
                // chain has one multiply-add per two rows (the pairs' products are kept).
                let pt = &self.near_pair[from..p][..m];
                let pb = &self.near_pair[p + 1..][..split][..m];
                // Pairs of rows by exact chunks (no index arithmetic or bounds checks in
                // the loop): the top chain's from row `from` down (chunk [k, k + 1]), the
                // bottom chain's from row p + m up (chunk [j − 1, j]).
                let top_pairs = top
                    .chunks_exact_mut(2)
                    .zip(nt.chunks_exact(2).zip(pt.chunks_exact(2)))
                    .zip(gt.chunks_exact(2).zip(ct.chunks_exact(2)));
                let bottom_pairs = rb
                    .rchunks_exact_mut(2)
                    .zip(nb.rchunks_exact(2).zip(pb.rchunks_exact(2)))
                    .zip(gb.rchunks_exact(2).zip(cb.rchunks_exact(2)));
                for (((t, (nt, pt)), (gt, ct)), ((b, (nb, pb)), (gb, cb))) in
                    top_pairs.zip(bottom_pairs)
                {
                    let (d0, d1) = (gt[0] * ct[0], gt[1] * ct[1]);
                    t[0] = d0 - nt[0] * z_top;
                    z_top = (d1 - nt[1] * d0) + pt[1] * z_top;
                    t[1] = z_top;
                    let (e0, e1) = (gb[1] * cb[1], gb[0] * cb[0]);
                    b[1] = e0 - nb[1] * z_bottom;
                    z_bottom = (e1 - nb[0] * e0) + pb[0] * z_bottom;
                    b[0] = z_bottom;
                }
                if m % 2 == 1 {
                    // The last row of each chain alone (m odd): top row p − 1, bottom row
                    // p + 1.
                    let k = m - 1;
                    z_top = gt[k] * ct[k] - nt[k] * z_top;
                    top[k] = z_top;
                    z_bottom = gb[0] * cb[0] - nb[0] * z_bottom;
                    rb[0] = z_bottom;
                }
                mid[0] = gain[p] * src[p] - near[p] * z_top - far[p] * z_bottom;
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
    fn scaled_right_hand_side_matches_a_formed_one() {
        // The fused build of d_i = scale_i src_i in the forward sweep, with the paired
        // recurrences, against forming d first and the one-row sweeps: round-off apart (odd
        // and even sizes and chain lengths, rows below `from` set by the caller).
        let mut seed = 0x0bad_cafe_1234_5678_u64;
        let cases = [
            (1usize, 0usize),
            (2, 2),
            (3, 1),
            (4, 0),
            (5, 1),
            (6, 2),
            (7, 0),
            (8, 2),
            (9, 1),
            (57, 2),
            (58, 0),
            (300, 2),
            (301, 2),
        ];
        for &(n, from) in &cases {
            let off: Vec<f64> = (0..n).map(|_| 0.1 + rng(&mut seed)).collect();
            let diag: Vec<f64> = (0..n).map(|_| 2.5 + rng(&mut seed)).collect();
            let scale: Vec<f64> = (0..n).map(|_| 1e3 * rng(&mut seed)).collect();
            let src: Vec<f64> = (0..n).map(|_| rng(&mut seed) - 0.5).collect();
            let head: Vec<f64> = (0..n).map(|_| rng(&mut seed)).collect();
            let mut f = Factored::with_size(n);
            f.factor_symmetric(&diag, &off).unwrap();
            f.keep_scale(&scale);
            let d: Vec<f64> = (0..n)
                .map(|i| if i < from { head[i] } else { scale[i] * src[i] })
                .collect();
            let mut want = d.clone();
            f.solve(&mut want);
            let mut got: Vec<f64> = (0..n)
                .map(|i| if i < from { head[i] } else { f64::NAN })
                .collect();
            f.solve_scaled(&mut got, &src, from);
            // The residual of the paired solution against the matrix, and its distance from
            // the one-row solution: both a few ulps of the largest term (the matrix is
            // diagonally dominant, so both sweeps are backward stable).
            let big = d.iter().fold(0.0f64, |a, v| a.max(v.abs()));
            for i in 0..n {
                let mut r = diag[i] * got[i] - d[i];
                if i > 0 {
                    r -= off[i - 1] * got[i - 1];
                }
                if i + 1 < n {
                    r -= off[i] * got[i + 1];
                }
                assert!(
                    r.abs() <= 1e-14 * 8.0 * big,
                    "n={n} from={from} row {i}: {r}"
                );
                assert!(
                    (got[i] - want[i]).abs() <= 1e-14 * big,
                    "n={n} from={from} row {i}: {} vs {}",
                    got[i],
                    want[i]
                );
            }
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
