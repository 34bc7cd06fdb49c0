//! Forward-difference Jacobian of a residual vector, its columns evaluated on scoped
//! threads (each column one model evaluation; nothing shared but the job counter).
//!
//! ```text
//! J_ij ≈ (r_i(u + h_j e_j) − r_i(u)) / h_j,   h_j given per parameter, signed away from
//! the upper bound when u_j + h_j would leave the box
//! ```
//!
//! The steps are in the fit's (transformed) coordinates. With a model whose output carries
//! relative noise ε from adaptive time stepping, the error of a column is about
//! ε/h + h·|r''|/2; the caller chooses h for its model's ε.

use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Mutex;

/// Columns of the Jacobian at `u` (residuals `r0` there), or `None` when a perturbed
/// evaluation failed. `eval` must be callable from several threads at once.
pub fn forward_jacobian<F>(
    eval: &F,
    u: &[f64],
    r0: &[f64],
    bounds: &[(f64, f64)],
    step: &[f64],
    threads: usize,
) -> Option<Vec<Vec<f64>>>
where
    F: Fn(&[f64]) -> Option<Vec<f64>> + Sync,
{
    let n = u.len();
    let steps: Vec<f64> = (0..n)
        .map(|j| {
            let h = step[j];
            if u[j] + h > bounds[j].1 {
                -h
            } else {
                h
            }
        })
        .collect();
    let slots: Mutex<Vec<Option<Vec<f64>>>> = Mutex::new(vec![None; n]);
    let next = AtomicUsize::new(0);
    let work = || loop {
        let j = next.fetch_add(1, Ordering::Relaxed);
        if j >= n {
            break;
        }
        let mut up = u.to_vec();
        up[j] += steps[j];
        let col = eval(&up).filter(|r| r.len() == r0.len()).map(|r| {
            r.iter()
                .zip(r0)
                .map(|(a, b)| (a - b) / steps[j])
                .collect::<Vec<f64>>()
        });
        slots.lock().unwrap_or_else(|e| e.into_inner())[j] = col;
    };
    let threads = threads.clamp(1, n.max(1));
    std::thread::scope(|s| {
        for _ in 1..threads {
            s.spawn(work);
        }
        work();
    });
    slots
        .into_inner()
        .unwrap_or_else(|e| e.into_inner())
        .into_iter()
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn forward_differences_match_the_analytic_jacobian_on_two_threads() {
        // r_i = a·exp(−b t_i): ∂r/∂a = exp(−b t), ∂r/∂b = −a t exp(−b t) (calculus).
        let t = [0.0, 0.5, 1.0, 2.0];
        let f = |u: &[f64]| Some(t.iter().map(|t| u[0] * (-u[1] * t).exp()).collect());
        let u = [2.0, 0.7];
        let r0 = f(&u).unwrap();
        let bounds = [(0.0, 10.0), (0.0, 0.7005)];
        let j = forward_jacobian(&f, &u, &r0, &bounds, &[1e-6; 2], 2).unwrap();
        for (i, t) in t.iter().enumerate() {
            let e = (-u[1] * t).exp();
            assert!((j[0][i] - e).abs() < 1e-6);
            assert!((j[1][i] + u[0] * t * e).abs() < 1e-5);
        }
        // A failed evaluation fails the Jacobian.
        let g = |u: &[f64]| if u[1] > 0.7 { None } else { f(u) };
        assert!(
            forward_jacobian(&g, &u, &r0, &[(0.0, 10.0), (0.0, 10.0)], &[1e-6; 2], 2).is_none()
        );
    }
}
