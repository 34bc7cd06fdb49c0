//! Newton's initial guess: the θ-point heads extrapolated from the last few steps.
//!
//! The unknown of a step is the θ-point head y (parent module). Its values at the last
//! [`ORDER`]` + 1` steps are kept as the newest value and the changes between them, and
//! the polynomial through them (Lagrange interpolation on the θ-point times, any step
//! lengths) is evaluated at the θ-point time of the new step. With the stored changes
//! `d_i = y^{n−i} − y^{n−i−1}` and τ_k the θ-point times relative to the newest one:
//!
//! ```text
//! p(τ) = y^n + Σ_i c_i d_i,   c_i = −Σ_{k>i} w_k
//! w_k = Π_{m≠k} (τ − τ_m)/(τ_k − τ_m),   τ_0 = 0 > τ_1 > τ_2 > …
//! ```
//! (w_k are the Lagrange weights; Σ w_k = 1 turns the sum of values into a sum of
//! changes). With one change this is the linear extrapolation `c_0 = τ/(−τ_1)`.
//!
//! The θ-point heads are extrapolated rather than the end-of-step heads because
//! Crank–Nicolson leaves stiff cells (near the well, where the screen and pack conduct well)
//! with a slowly decaying sawtooth in h; y, the mean of consecutive h, does not carry it,
//! and a polynomial through a sawtooth multiplies it by 2^K. A smooth periodic drive then
//! starts Newton within O((ωΔt)^{K+1}) of the solution. Across a jump of the forcing the
//! old trend predicts nothing, so the run loop calls [`Predictor::forget`] there and the
//! order builds up again.

/// Number of previous changes extrapolated (cubic).
pub const ORDER: usize = 3;

/// The newest θ-point heads, the changes between the previous ones and their times.
#[derive(Debug, Clone)]
pub struct Predictor {
    /// Newest θ-point heads, m.
    newest: Vec<f64>,
    /// Time of `newest`, s (None: no history).
    newest_time: Option<f64>,
    /// Ring of changes, m; `changes[(head + i) % ORDER]` is d_i.
    changes: [Vec<f64>; ORDER],
    /// Time between the two θ-points of each change, s (matches `changes`).
    gaps: [f64; ORDER],
    head: usize,
    /// How many changes of the ring are valid.
    len: usize,
}

impl Predictor {
    /// Empty history for `n` unknowns.
    pub fn new(n: usize) -> Self {
        Predictor {
            newest: vec![0.0; n],
            newest_time: None,
            changes: std::array::from_fn(|_| vec![0.0; n]),
            gaps: [0.0; ORDER],
            head: 0,
            len: 0,
        }
    }

    /// Drops the history (after a jump of the forcing).
    pub fn forget(&mut self) {
        self.newest_time = None;
        self.len = 0;
    }

    /// Records the θ-point heads `y` of a step, reached at time `t`.
    pub fn push(&mut self, y: &[f64], t: f64) {
        if let Some(t_prev) = self.newest_time {
            self.head = (self.head + ORDER - 1) % ORDER;
            for ((d, last), &v) in self.changes[self.head]
                .iter_mut()
                .zip(self.newest.iter_mut())
                .zip(y)
            {
                *d = v - *last;
                *last = v;
            }
            self.gaps[self.head] = t - t_prev;
            self.len = (self.len + 1).min(ORDER);
        } else {
            self.newest.copy_from_slice(y);
        }
        self.newest_time = Some(t);
    }

    /// Coefficients c_i of the stored changes at time `t` (module doc) and their count.
    fn coefficients(&self, t: f64, t_newest: f64) -> ([f64; ORDER], usize) {
        let k = self.len;
        let tau_new = t - t_newest;
        let mut tau = [0.0; ORDER + 1];
        for i in 0..k {
            tau[i + 1] = tau[i] - self.gaps[(self.head + i) % ORDER];
        }
        let mut w = [0.0; ORDER + 1];
        for (j, wj) in w.iter_mut().enumerate().take(k + 1) {
            *wj = (0..=k)
                .filter(|&m| m != j)
                .map(|m| (tau_new - tau[m]) / (tau[j] - tau[m]))
                .product();
        }
        let mut c = [0.0; ORDER];
        for i in 0..k {
            c[i] = -w[i + 1..=k].iter().sum::<f64>();
        }
        (c, k)
    }

    /// Writes the guess for the θ-point heads at time `t` into `y`; without history, the
    /// current heads `h`.
    pub fn guess(&self, h: &[f64], t: f64, y: &mut [f64]) {
        let Some(t_newest) = self.newest_time else {
            y.copy_from_slice(h);
            return;
        };
        let (c, k) = self.coefficients(t, t_newest);
        let d = |i: usize| &self.changes[(self.head + i) % ORDER];
        let base = &self.newest;
        match k {
            0 => y.copy_from_slice(base),
            1 => {
                for ((y, &b), &d0) in y.iter_mut().zip(base).zip(d(0)) {
                    *y = b + c[0] * d0;
                }
            }
            2 => {
                for (((y, &b), &d0), &d1) in y.iter_mut().zip(base).zip(d(0)).zip(d(1)) {
                    *y = b + c[0] * d0 + c[1] * d1;
                }
            }
            _ => {
                for ((((y, &b), &d0), &d1), &d2) in
                    y.iter_mut().zip(base).zip(d(0)).zip(d(1)).zip(d(2))
                {
                    *y = b + c[0] * d0 + c[1] * d1 + c[2] * d2;
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Feeds samples of `f` at the given times and returns the guess at `t_next`.
    fn extrapolate(f: impl Fn(f64) -> f64, times: &[f64], t_next: f64) -> f64 {
        let mut p = Predictor::new(1);
        for &t in times {
            p.push(&[f(t)], t);
        }
        let mut y = [f64::NAN];
        p.guess(&[f64::NAN], t_next, &mut y);
        y[0]
    }

    #[test]
    fn extrapolation_is_exact_for_polynomials_of_its_order() {
        // Lagrange interpolation through K+1 points reproduces polynomials of degree K
        // exactly (common knowledge, no source); irregular times test the variable-step
        // weights.
        let times = [0.0, 0.3, 0.45, 1.0, 1.2];
        let cubic = |t: f64| 2.0 - t + 0.5 * t * t - 0.75 * t * t * t;
        let y = extrapolate(cubic, &times, 1.35);
        assert!((y - cubic(1.35)).abs() <= 1e-13, "{y} vs {}", cubic(1.35));
        // With three values the guess is the quadratic through them.
        let quad = |t: f64| 1.0 + 3.0 * t - 4.0 * t * t;
        let y = extrapolate(quad, &times[2..], 1.5);
        assert!((y - quad(1.5)).abs() <= 1e-13);
        // A cubic is not reproduced from three values: the extrapolation is of order 2.
        let y = extrapolate(cubic, &times[2..], 1.5);
        assert!((y - cubic(1.5)).abs() > 1e-3);
    }

    #[test]
    fn forget_falls_back_to_the_current_heads_then_builds_up() {
        let mut p = Predictor::new(2);
        p.push(&[0.0, 1.0], 0.05);
        p.push(&[0.2, 0.5], 0.15);
        let mut y = [0.0; 2];
        // Linear: c_0 = τ/(−τ_1) = 0.2/0.1 = 2, y = y^n + 2 d_0.
        p.guess(&[9.0, 9.0], 0.35, &mut y);
        assert!(
            (y[0] - 0.6).abs() < 1e-15 && (y[1] + 0.5).abs() < 1e-15,
            "{y:?}"
        );
        p.forget();
        p.guess(&[9.0, 8.0], 0.35, &mut y);
        assert_eq!(y, [9.0, 8.0]);
        // One value after the jump: that value, whatever the time.
        p.push(&[1.0, 2.0], 0.4);
        p.guess(&[9.0, 8.0], 0.5, &mut y);
        assert_eq!(y, [1.0, 2.0]);
    }
}
