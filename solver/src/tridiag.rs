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
//! The linear path's repeated solve ([`Factored::solve_scaled`]) runs both chains in the two
//! lanes of one vector, four rows per link (`tridiag/chains.rs`).

use crate::error::SolverError;

mod chains;
use chains::Chains;

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
    /// The multipliers laid out for [`Factored::solve_scaled`]'s two-lane sweeps.
    chains: Chains,
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
            chains: Chains::with_size(n),
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
        self.forward(rhs);
        self.substitute(rhs);
    }

    /// Keeps the row scale of [`Factored::solve_scaled`]'s right-hand side, `scale[i]`, for
    /// rows `from` on, and g_i = `scale[i]`/m_i, and lays the multipliers out for its two-lane
    /// sweeps; call it after each factorization (which forgets them).
    pub fn keep_scale(&mut self, scale: &[f64], from: usize) {
        let n = self.inv_pivot.len();
        let scale = &scale[..n];
        self.scale.copy_from_slice(scale);
        for ((g, &s), &iv) in self.gain_pivot.iter_mut().zip(scale).zip(&self.inv_pivot) {
            *g = s * iv;
        }
        // Only the two-lane sweeps need the layout: formed here, not with every factorization
        // (Newton's and the error filter's factors are swept one row at a time).
        if n > 0 && from <= meeting_row(n) {
            let p = meeting_row(n);
            self.chains
                .lay_out(p, from, &self.near, &self.far, &self.gain_pivot);
        } else {
            self.chains.set_formed(from);
        }
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

    /// Solves for the right-hand side d_i = scale_i × `src[i]` for i ≥ `from` (the scale and
    /// the row given to [`Factored::keep_scale`]) and d_i = `x[i]` below (rows set by the
    /// caller), building it within the forward sweep; both sweeps run the two chains in the
    /// two lanes of a vector, four rows per link (`tridiag/chains.rs`: equal to forming d and
    /// calling [`Factored::solve`] up to round-off). On return `x` holds the solution.
    ///
    /// # Panics
    /// When no scale was kept since the last factorization.
    pub fn solve_scaled(&mut self, x: &mut [f64], src: &[f64]) {
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
        let from = self.chains.from();
        let p = meeting_row(n);
        if from > p {
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
        let (inv, near, far, gain) = (
            &self.inv_pivot[..n],
            &self.near[..n],
            &self.far[..n],
            &self.gain_pivot[..n],
        );
        // Top rows below `from`: the caller's values, on the top chain alone.
        let mut z_top = 0.0;
        for ((r, &iv), &nr) in x[..from].iter_mut().zip(&inv[..from]).zip(&near[..from]) {
            z_top = *r * iv - nr * z_top;
            *r = z_top;
        }
        // The bottom chain's rows the top one has no partner for (one more when n is even,
        // and `from` more), alone first, from row n − 1 up.
        let first_pair = p + 1 + (p - from);
        let mut z_bottom = 0.0;
        for i in (first_pair..n).rev() {
            z_bottom = gain[i] * src[i] - near[i] * z_bottom;
            x[i] = z_bottom;
        }
        let [z_top, z_bottom] = self.chains.forward(src, p, [z_top, z_bottom]);
        x[p] = gain[p] * src[p] - near[p] * z_top - far[p] * z_bottom;
        let x_down = self.chains.substitute(x, p);
        // The bottom half has one row more when n is even.
        if n - 1 - p > p {
            x[2 * p + 1] -= far[2 * p + 1] * x_down;
        }
    }

    /// Forward sweep from both ends (rows 0…p − 1 and n − 1…p + 1, two chains in one loop)
    /// and the meeting row: on return `rhs` holds z, and x_p at the meeting row.
    #[inline(always)]
    fn forward(&self, rhs: &mut [f64]) {
        let n = rhs.len();
        let p = meeting_row(n);
        let (inv, near, far) = (&self.inv_pivot[..n], &self.near[..n], &self.far[..n]);
        let (top, rest) = rhs.split_at_mut(p);
        let (mid, bottom) = rest.split_at_mut(1);
        let (mut z_top, mut z_bottom) = (0.0, 0.0);
        let (inv_t, near_t) = (&inv[..p], &near[..p]);
        let (inv_b, near_b) = (&inv[p + 1..], &near[p + 1..]);
        // The bottom chain's row the top one has no partner for (n even), alone first.
        let extra = bottom.len() - top.len();
        let split = bottom.len() - extra;
        let (bottom, bottom_extra) = bottom.split_at_mut(split);
        let (inv_bx, near_bx) = (&inv_b[split..], &near_b[split..]);
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

    /// A random diagonally dominant symmetric system (−`off` couples rows i and i + 1) for
    /// [`Factored::solve_scaled`] with rows below `from` set by the caller (`head`), and its
    /// blocked two-lane solution `got`.
    struct ScaledCase {
        off: Vec<f64>,
        diag: Vec<f64>,
        scale: Vec<f64>,
        src: Vec<f64>,
        head: Vec<f64>,
        f: Factored,
        got: Vec<f64>,
    }

    fn scaled_case(n: usize, from: usize, seed: &mut u64) -> ScaledCase {
        let off: Vec<f64> = (0..n).map(|_| 0.1 + rng(seed)).collect();
        let diag: Vec<f64> = (0..n).map(|_| 2.5 + rng(seed)).collect();
        let scale: Vec<f64> = (0..n).map(|_| 1e3 * rng(seed)).collect();
        let src: Vec<f64> = (0..n).map(|_| rng(seed) - 0.5).collect();
        let head: Vec<f64> = (0..n).map(|_| rng(seed)).collect();
        let mut f = Factored::with_size(n);
        f.factor_symmetric(&diag, &off).unwrap();
        f.keep_scale(&scale, from);
        let mut got: Vec<f64> = (0..n)
            .map(|i| if i < from { head[i] } else { f64::NAN })
            .collect();
        f.solve_scaled(&mut got, &src);
        ScaledCase {
            off,
            diag,
            scale,
            src,
            head,
            f,
            got,
        }
    }

    /// Asserts that `got` solves (`lower`, `diag`, `upper`) x = `d` with a residual within
    /// 8e-14 and lies within 1e-14 of the one-row solution `want`, both relative to the
    /// largest |d|: a few ulps of the largest term, the matrix being diagonally dominant so
    /// that both sweeps are backward stable.
    fn assert_round_off(
        (lower, diag, upper): (&[f64], &[f64], &[f64]),
        d: &[f64],
        got: &[f64],
        want: &[f64],
        what: &str,
    ) {
        let n = d.len();
        let big = d.iter().fold(0.0f64, |a, v| a.max(v.abs()));
        for i in 0..n {
            let mut r = diag[i] * got[i] - d[i];
            if i > 0 {
                r += lower[i] * got[i - 1];
            }
            if i + 1 < n {
                r += upper[i] * got[i + 1];
            }
            assert!(r.abs() <= 1e-14 * 8.0 * big, "{what} row {i}: residual {r}");
            assert!(
                (got[i] - want[i]).abs() <= 1e-14 * big,
                "{what} row {i}: {} vs {}",
                got[i],
                want[i]
            );
        }
    }

    #[test]
    fn scaled_right_hand_side_matches_a_formed_one() {
        // The fused build of d_i = scale_i src_i in the forward sweep, with the two-lane
        // blocked recurrences, against forming d first and the one-row sweeps: round-off
        // apart (odd and even sizes, chain lengths with 0–3 rows past the last whole block,
        // rows below `from` set by the caller).
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
            let c = scaled_case(n, from, &mut seed);
            let d: Vec<f64> = (0..n)
                .map(|i| {
                    if i < from {
                        c.head[i]
                    } else {
                        c.scale[i] * c.src[i]
                    }
                })
                .collect();
            let mut want = d.clone();
            c.f.solve(&mut want);
            let lower: Vec<f64> = (0..n)
                .map(|i| if i > 0 { -c.off[i - 1] } else { 0.0 })
                .collect();
            let upper: Vec<f64> = c.off.iter().map(|o| -o).collect();
            assert_round_off(
                (&lower, &c.diag, &upper),
                &d,
                &c.got,
                &want,
                &format!("n={n} from={from}"),
            );
        }
    }

    /// One chain of [`Factored::solve_scaled`]'s sweeps in scalar arithmetic: rows `rows` in
    /// the order visited, v_k = d_k − ℓ_k v_{k−1} from `v`, four rows per link as
    /// `tridiag/chains.rs` states it (a_j off the chain, μ_j the block's multiplier), the
    /// rows past the last whole block one at a time. Returns the last value.
    fn blocked_chain(
        x: &mut [f64],
        rows: &[usize],
        d: impl Fn(usize) -> f64,
        l: &[f64],
        mut v: f64,
    ) -> f64 {
        let full = rows.len() / 4 * 4;
        for b in rows[..full].chunks(4) {
            let mut a = [0.0; 4];
            a[0] = d(b[0]);
            let mut mu = [l[b[0]], 0.0, 0.0, 0.0];
            for j in 1..4 {
                a[j] = d(b[j]) - l[b[j]] * a[j - 1];
                mu[j] = -l[b[j]] * mu[j - 1];
            }
            let before = v;
            for j in 0..4 {
                v = a[j] - mu[j] * before;
                x[b[j]] = v;
            }
        }
        for &r in &rows[full..] {
            v = d(r) - l[r] * v;
            x[r] = v;
        }
        v
    }

    #[test]
    fn two_lane_sweeps_are_the_scalar_blocked_recurrence_bit_for_bit() {
        // The vector lanes do the scalar recurrence's operations in the same order (no fused
        // multiply-add, no lane mixing): the same bits as this scalar form, on every
        // size's split into whole blocks and rows left over.
        let mut seed = 0x5eed_0fb1_0c00_u64;
        for &(n, from) in &[
            (9usize, 1usize),
            (10, 2),
            (57, 2),
            (58, 0),
            (300, 2),
            (301, 2),
        ] {
            let ScaledCase {
                src, head, f, got, ..
            } = scaled_case(n, from, &mut seed);
            let p = meeting_row(n);
            let m = p - from;
            let (inv, near, far, gain) = (&f.inv_pivot, &f.near, &f.far, &f.gain_pivot);
            let mut want = got.clone();
            let mut z_top = 0.0;
            for i in 0..from {
                z_top = head[i] * inv[i] - near[i] * z_top;
                want[i] = z_top;
            }
            let mut z_bottom = 0.0;
            for i in (p + 1 + m..n).rev() {
                z_bottom = gain[i] * src[i] - near[i] * z_bottom;
                want[i] = z_bottom;
            }
            let d = |i: usize| gain[i] * src[i];
            let top: Vec<usize> = (from..p).collect();
            let bottom: Vec<usize> = (p + 1..p + 1 + m).rev().collect();
            let z_top = blocked_chain(&mut want, &top, d, near, z_top);
            let z_bottom = blocked_chain(&mut want, &bottom, d, near, z_bottom);
            want[p] = gain[p] * src[p] - near[p] * z_top - far[p] * z_bottom;
            let z = want.clone();
            let x_p = want[p];
            let top: Vec<usize> = (0..p).rev().collect();
            let bottom: Vec<usize> = (p + 1..2 * p + 1).collect();
            blocked_chain(&mut want, &top, |i| z[i], far, x_p);
            let x_down = blocked_chain(&mut want, &bottom, |i| z[i], far, x_p);
            if n - 1 - p > p {
                want[2 * p + 1] -= far[2 * p + 1] * x_down;
            }
            let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
            assert_eq!(bits(&got), bits(&want), "n={n} from={from}");
        }
    }

    /// Checks: on a matrix of the kind the linear path solves — the Crank–Nicolson matrix of
    /// `benches/reference/sine_60m_numpy.py`, built the same way (300 log-graded cells, a
    /// 0.1–0.2 m pack of K 5e-3 m/s outside a 0.1 m screen, formation of K 2e-4 m/s to 60 m,
    /// Ss 1e-5 1/m, 6 m screen, Δt 0.01 s, the well row a fixed head) — the forward
    /// multipliers exceed 1 where the conductance drops at the pack's outer edge, and the
    /// blocked two-lane solution still agrees with the one-row sweeps to round-off (the same
    /// bounds as the random systems above). Invented right-hand side (a decaying ripple).
    #[test]
    fn blocked_sweeps_hold_where_the_multipliers_exceed_one() {
        let (cells, n_pack) = (300usize, 16usize);
        let (rs, rp, ro, b) = (0.1f64, 0.2f64, 60.0f64, 6.0f64);
        let mut faces: Vec<f64> = (0..=n_pack)
            .map(|i| rs * (rp / rs).powf(i as f64 / n_pack as f64))
            .collect();
        let rest = (cells - n_pack) as f64;
        faces.extend((1..=cells - n_pack).map(|i| rp * (ro / rp).powf(i as f64 / rest)));
        let k = |i: usize| if i < n_pack { 5e-3 } else { 2e-4 };
        let rc: Vec<f64> = (0..cells)
            .map(|i| (faces[i] * faces[i + 1]).sqrt())
            .collect();
        let two_pi_b = 2.0 * std::f64::consts::PI * b;
        // Face conductances: 2πb over the sum of the half-cell resistances ln(r/r')/K.
        let mut g = vec![two_pi_b * k(0) / (rc[0] / faces[0]).ln()];
        g.extend((1..cells).map(|i| {
            two_pi_b / ((faces[i] / rc[i - 1]).ln() / k(i - 1) + (rc[i] / faces[i]).ln() / k(i))
        }));
        g.push(two_pi_b * k(cells - 1) / (faces[cells] / rc[cells - 1]).ln());
        let tdt = 0.5 * 0.01;
        let n = cells + 1;
        let storage =
            |j: usize| 1e-5 * std::f64::consts::PI * (faces[j].powi(2) - faces[j - 1].powi(2)) * b;
        let mut diag = vec![1.0; n];
        let (mut lower, mut upper) = (vec![0.0; n], vec![0.0; n]);
        for j in 1..n {
            diag[j] = storage(j) / tdt + g[j - 1] + g[j];
            lower[j] = -g[j - 1];
            if j + 1 < n {
                upper[j] = -g[j];
            }
        }
        let scale: Vec<f64> = (0..n)
            .map(|j| if j == 0 { 0.0 } else { storage(j) / tdt })
            .collect();
        let mut f = Factored::with_size(n);
        f.factor(&lower, &diag, &upper).unwrap();
        f.keep_scale(&scale, 2);
        let largest = f.near.iter().fold(0.0f64, |a, v| a.max(v.abs()));
        assert!(largest > 2.0, "the regime under test: max |ℓ| = {largest}");
        let src: Vec<f64> = (0..n)
            .map(|i| 1.5 * (-(i as f64) / 40.0).exp() * (0.3 * i as f64).cos())
            .collect();
        let d: Vec<f64> = (0..n)
            .map(|i| if i == 0 { 1.2 } else { scale[i] * src[i] })
            .collect();
        let mut got = vec![f64::NAN; n];
        got[..2].copy_from_slice(&d[..2]);
        f.solve_scaled(&mut got, &src);
        let mut want = d.clone();
        f.solve(&mut want);
        assert_round_off((&lower, &diag, &upper), &d, &got, &want, "reference matrix");
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
