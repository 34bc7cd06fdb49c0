//! Restarted GMRES (Saad & Schultz 1986, SIAM J. Sci. Stat. Comput. 7(3), from memory —
//! verify) for `A x = b` with `A` given only as a product `v ↦ A v`: Arnoldi with modified
//! Gram–Schmidt, the small least-squares problem kept triangular by Givens rotations, so the
//! residual norm of every iterate is known without forming it (Kelley 1995, "Iterative
//! Methods for Linear and Nonlinear Equations", SIAM, ch. 3, from memory — verify).
//!
//! All work arrays are allocated once in [`Gmres::new`]; a solve allocates nothing.

/// Work space of restarted GMRES(m) for systems of size n.
#[derive(Debug, Clone)]
pub struct Gmres {
    n: usize,
    m: usize,
    /// Krylov basis, (m + 1) vectors of length n, row after row.
    basis: Vec<f64>,
    /// Hessenberg matrix, column k at k (m + 1) (rotated in place to upper triangular).
    hess: Vec<f64>,
    /// Givens cosines and sines.
    cs: Vec<f64>,
    sn: Vec<f64>,
    /// Right-hand side of the small problem (‖r₀‖ e₁ rotated).
    g: Vec<f64>,
    /// Solution of the small problem.
    y: Vec<f64>,
    /// A v.
    av: Vec<f64>,
}

/// How a solve ended.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GmresOutcome {
    /// Products A v taken.
    pub products: usize,
    /// ‖b − A x‖₂ / ‖b‖₂ at the end (as GMRES tracks it).
    pub relative_residual: f64,
}

impl Gmres {
    /// Work space for size `n` and restart length `m` (≥ 1).
    pub fn new(n: usize, m: usize) -> Gmres {
        let m = m.max(1);
        Gmres {
            n,
            m,
            basis: vec![0.0; (m + 1) * n],
            hess: vec![0.0; m * (m + 1)],
            cs: vec![0.0; m],
            sn: vec![0.0; m],
            g: vec![0.0; m + 1],
            y: vec![0.0; m],
            av: vec![0.0; n],
        }
    }

    /// Solves A x = b from x = 0 until ‖b − A x‖₂ ≤ `rtol` ‖b‖₂ or `max_products` products
    /// of A have been taken. `apply(v, out)` sets out = A v; its error ends the solve.
    pub fn solve<E>(
        &mut self,
        b: &[f64],
        x: &mut [f64],
        rtol: f64,
        max_products: usize,
        mut apply: impl FnMut(&[f64], &mut [f64]) -> Result<(), E>,
    ) -> Result<GmresOutcome, E> {
        let (n, m) = (self.n, self.m);
        x.fill(0.0);
        let b_norm = norm(b);
        if b_norm == 0.0 {
            return Ok(GmresOutcome {
                products: 0,
                relative_residual: 0.0,
            });
        }
        let mut products = 0;
        let mut residual = b_norm;
        // r₀ = b − A x (x = 0 at the first cycle).
        let mut first = true;
        while products < max_products {
            if first {
                self.basis[..n].copy_from_slice(b);
                first = false;
            } else {
                apply(x, &mut self.av)?;
                products += 1;
                combine(&mut self.basis[..n], b, -1.0, &self.av);
            }
            let beta = norm(&self.basis[..n]);
            residual = beta;
            if beta <= rtol * b_norm || products >= max_products {
                break;
            }
            for v in &mut self.basis[..n] {
                *v /= beta;
            }
            self.g.fill(0.0);
            self.g[0] = beta;
            let mut k_done = 0;
            for k in 0..m {
                if products >= max_products {
                    break;
                }
                let (head, tail) = self.basis.split_at_mut((k + 1) * n);
                let vk = &head[k * n..];
                apply(vk, &mut self.av)?;
                products += 1;
                let w = &mut tail[..n];
                w.copy_from_slice(&self.av);
                let col = &mut self.hess[k * (m + 1)..(k + 1) * (m + 1)];
                for (i, hik) in col.iter_mut().enumerate().take(k + 1) {
                    let vi = &head[i * n..(i + 1) * n];
                    let d = dot(w, vi);
                    *hik = d;
                    for (wj, vj) in w.iter_mut().zip(vi) {
                        *wj -= d * vj;
                    }
                }
                let hn = norm(w);
                col[k + 1] = hn;
                if hn > 0.0 {
                    for wj in w.iter_mut() {
                        *wj /= hn;
                    }
                }
                // Earlier rotations on the new column, then the one that zeroes h_{k+1,k}.
                for i in 0..k {
                    let t = self.cs[i] * col[i] + self.sn[i] * col[i + 1];
                    col[i + 1] = -self.sn[i] * col[i] + self.cs[i] * col[i + 1];
                    col[i] = t;
                }
                let r = col[k].hypot(col[k + 1]);
                let (c, s) = if r == 0.0 {
                    (1.0, 0.0)
                } else {
                    (col[k] / r, col[k + 1] / r)
                };
                self.cs[k] = c;
                self.sn[k] = s;
                col[k] = r;
                col[k + 1] = 0.0;
                self.g[k + 1] = -s * self.g[k];
                self.g[k] *= c;
                k_done = k + 1;
                residual = self.g[k + 1].abs();
                if residual <= rtol * b_norm || hn == 0.0 {
                    break;
                }
            }
            // Back substitution for y and x += V y.
            for i in (0..k_done).rev() {
                let mut s = self.g[i];
                for j in i + 1..k_done {
                    s -= self.hess[j * (m + 1) + i] * self.y[j];
                }
                let d = self.hess[i * (m + 1) + i];
                self.y[i] = if d == 0.0 { 0.0 } else { s / d };
            }
            for (j, &yj) in self.y.iter().enumerate().take(k_done) {
                let vj = &self.basis[j * n..(j + 1) * n];
                for (xi, vi) in x.iter_mut().zip(vj) {
                    *xi += yj * vi;
                }
            }
            if residual <= rtol * b_norm {
                break;
            }
        }
        Ok(GmresOutcome {
            products,
            relative_residual: residual / b_norm,
        })
    }
}

/// out = a + s b.
pub fn combine(out: &mut [f64], a: &[f64], s: f64, b: &[f64]) {
    for ((o, x), y) in out.iter_mut().zip(a).zip(b) {
        *o = x + s * y;
    }
}

/// Euclidean norm.
pub fn norm(v: &[f64]) -> f64 {
    dot(v, v).sqrt()
}

/// Dot product.
pub fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A tridiagonal nonsymmetric matrix applied to v.
    fn apply(v: &[f64], out: &mut [f64]) -> Result<(), ()> {
        let n = v.len();
        for i in 0..n {
            let mut s = 4.0 * v[i];
            if i > 0 {
                s -= 1.0 * v[i - 1];
            }
            if i + 1 < n {
                s -= 2.0 * v[i + 1];
            }
            out[i] = s;
        }
        Ok(())
    }

    #[test]
    fn solves_a_nonsymmetric_system_to_its_tolerance_with_restarts() {
        // Manufactured: x* known, b = A x*; the true residual is checked, not GMRES's own.
        let n = 40;
        let want: Vec<f64> = (0..n).map(|i| (i as f64 * 0.3).sin() + 0.1).collect();
        let mut b = vec![0.0; n];
        apply(&want, &mut b).unwrap();
        for m in [5, 40] {
            let mut g = Gmres::new(n, m);
            let mut x = vec![0.0; n];
            let out = g.solve(&b, &mut x, 1e-12, 1000, apply).unwrap();
            let mut r = vec![0.0; n];
            apply(&x, &mut r).unwrap();
            let res: f64 = r
                .iter()
                .zip(&b)
                .map(|(a, c)| (a - c).powi(2))
                .sum::<f64>()
                .sqrt();
            assert!(res <= 1.1e-12 * norm(&b), "m = {m}: {res}");
            assert!(out.relative_residual <= 1e-12);
            let err = x
                .iter()
                .zip(&want)
                .map(|(a, c)| (a - c).abs())
                .fold(0.0, f64::max);
            assert!(err < 1e-10, "m = {m}: {err}");
        }
    }

    #[test]
    fn full_gmres_is_exact_in_n_steps() {
        // In exact arithmetic GMRES without restart ends in at most n products (Saad &
        // Schultz 1986); a 6 × 6 system to round-off.
        let n = 6;
        let b: Vec<f64> = (0..n).map(|i| 1.0 + i as f64).collect();
        let mut g = Gmres::new(n, n);
        let mut x = vec![0.0; n];
        let out = g.solve(&b, &mut x, 1e-14, 100, apply).unwrap();
        assert!(out.products <= n + 1, "{}", out.products);
    }
}
