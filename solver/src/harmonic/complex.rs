//! Complex numbers and complex tridiagonal elimination for the harmonic method.
//!
//! Only what the harmonic solve needs: arithmetic, conjugate, modulus, the unit phasor
//! e^{iθ}, and Thomas' elimination (L.H. Thomas 1949; docs/physics.md §1.4) carried over to
//! complex arithmetic, one-sided:
//!
//! ```text
//! a_i x_{i−1} + b_i x_i + c_i x_{i+1} = d_i,        a_0 = c_{n−1} = 0
//! m_0 = b_0,              c'_0 = c_0/m_0,  z_0 = d_0/m_0
//! m_i = b_i − a_i c'_{i−1},  c'_i = c_i/m_i,  z_i = (d_i − a_i z_{i−1})/m_i    (i = 1 … n−1)
//! x_{n−1} = z_{n−1},      x_i = z_i − c'_i x_{i+1}                          (i = n−2 … 0)
//! ```
//! No pivoting is needed when the matrix is diagonally dominant in modulus with the first
//! row strictly so: then |c'_i| < 1 and |m_i| > |c_i| ≥ 0 by induction, as in the real case.
//! The harmonic matrix `i ω S + A` is such a matrix: its diagonal `A_jj + i ω S_j` has
//! modulus at least `A_jj = Σ|A_jk|` (k ≠ j), strictly so in the first cell, which is
//! coupled to the prescribed well head.

use crate::error::SolverError;
use std::ops::{Add, AddAssign, Div, Mul, Neg, Sub};

/// A complex number re + i·im.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Complex {
    /// Real part.
    pub re: f64,
    /// Imaginary part.
    pub im: f64,
}

impl Complex {
    /// 0.
    pub const ZERO: Complex = Complex { re: 0.0, im: 0.0 };

    /// re + i·im.
    pub const fn new(re: f64, im: f64) -> Complex {
        Complex { re, im }
    }

    /// The real number x.
    pub const fn real(x: f64) -> Complex {
        Complex { re: x, im: 0.0 }
    }

    /// e^{iθ} = cos θ + i sin θ.
    pub fn cis(theta: f64) -> Complex {
        let (s, c) = theta.sin_cos();
        Complex { re: c, im: s }
    }

    /// Complex conjugate re − i·im.
    pub fn conj(self) -> Complex {
        Complex {
            re: self.re,
            im: -self.im,
        }
    }

    /// |z|² = re² + im².
    pub fn norm_sqr(self) -> f64 {
        self.re * self.re + self.im * self.im
    }

    /// Modulus |z| (without overflow of the squares).
    pub fn abs(self) -> f64 {
        self.re.hypot(self.im)
    }

    /// Argument arg z in (−π, π].
    pub fn arg(self) -> f64 {
        self.im.atan2(self.re)
    }
}

impl Add for Complex {
    type Output = Complex;
    fn add(self, o: Complex) -> Complex {
        Complex::new(self.re + o.re, self.im + o.im)
    }
}

impl AddAssign for Complex {
    fn add_assign(&mut self, o: Complex) {
        self.re += o.re;
        self.im += o.im;
    }
}

impl Sub for Complex {
    type Output = Complex;
    fn sub(self, o: Complex) -> Complex {
        Complex::new(self.re - o.re, self.im - o.im)
    }
}

impl Neg for Complex {
    type Output = Complex;
    fn neg(self) -> Complex {
        Complex::new(-self.re, -self.im)
    }
}

impl Mul for Complex {
    type Output = Complex;
    fn mul(self, o: Complex) -> Complex {
        Complex::new(
            self.re * o.re - self.im * o.im,
            self.re * o.im + self.im * o.re,
        )
    }
}

impl Mul<f64> for Complex {
    type Output = Complex;
    fn mul(self, x: f64) -> Complex {
        Complex::new(self.re * x, self.im * x)
    }
}

impl Div for Complex {
    type Output = Complex;
    /// Smith's division (Smith 1962, CACM 5(8), from memory): scales by the larger part of
    /// the divisor so no intermediate overflows or underflows needlessly.
    fn div(self, o: Complex) -> Complex {
        if o.re.abs() >= o.im.abs() {
            let r = o.im / o.re;
            let d = o.re + o.im * r;
            Complex::new((self.re + self.im * r) / d, (self.im - self.re * r) / d)
        } else {
            let r = o.re / o.im;
            let d = o.re * r + o.im;
            Complex::new((self.re * r + self.im) / d, (self.im * r - self.re) / d)
        }
    }
}

/// Solves the complex tridiagonal system by Thomas' elimination (module doc), in place:
/// on return `rhs` holds x. `lower[0]` and `upper[n−1]` are not used; `work` (length n)
/// receives the multipliers c'_i. Allocates nothing. Fails, naming the row, when a pivot
/// vanishes or is not finite (not for the diagonally dominant matrices of the module doc).
pub fn solve_tridiagonal(
    lower: &[Complex],
    diag: &[Complex],
    upper: &[Complex],
    rhs: &mut [Complex],
    work: &mut [Complex],
) -> Result<(), SolverError> {
    let n = diag.len();
    assert!(
        lower.len() == n && upper.len() == n && rhs.len() == n && work.len() == n,
        "tridiagonal system: all slices need length {n}"
    );
    let pivot = |m: Complex, row: usize| {
        if m.norm_sqr() == 0.0 || !(m.re.is_finite() && m.im.is_finite()) {
            Err(SolverError::TridiagSingular { row })
        } else {
            Ok(m)
        }
    };
    if n == 0 {
        return Ok(());
    }
    let mut m = pivot(diag[0], 0)?;
    work[0] = upper[0] / m;
    rhs[0] = rhs[0] / m;
    for i in 1..n {
        m = pivot(diag[i] - lower[i] * work[i - 1], i)?;
        work[i] = upper[i] / m;
        rhs[i] = (rhs[i] - lower[i] * rhs[i - 1]) / m;
    }
    for i in (0..n - 1).rev() {
        rhs[i] = rhs[i] - work[i] * rhs[i + 1];
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Seeded xorshift numbers in [−1, 1).
    fn random(seed: &mut u64) -> f64 {
        *seed ^= *seed << 13;
        *seed ^= *seed >> 7;
        *seed ^= *seed << 17;
        2.0 * ((*seed >> 11) as f64 / (1u64 << 53) as f64) - 1.0
    }

    /// Dense Gaussian elimination with partial pivoting (the reference solve).
    fn dense_solve(mut a: Vec<Vec<Complex>>, mut b: Vec<Complex>) -> Vec<Complex> {
        let n = b.len();
        for col in 0..n {
            let p = (col..n)
                .max_by(|&i, &j| a[i][col].abs().total_cmp(&a[j][col].abs()))
                .unwrap();
            a.swap(col, p);
            b.swap(col, p);
            let (top, bottom) = a.split_at_mut(col + 1);
            let pivot_row = &top[col];
            for (i, r) in bottom.iter_mut().enumerate() {
                let f = r[col] / pivot_row[col];
                for (x, &v) in r[col..].iter_mut().zip(&pivot_row[col..]) {
                    *x = *x - f * v;
                }
                b[col + 1 + i] = b[col + 1 + i] - f * b[col];
            }
        }
        let mut x = vec![Complex::ZERO; n];
        for row in (0..n).rev() {
            let mut s = b[row];
            for (&v, &xk) in a[row][row + 1..].iter().zip(&x[row + 1..]) {
                s = s - v * xk;
            }
            x[row] = s / a[row][row];
        }
        x
    }

    #[test]
    fn arithmetic_works() {
        let (a, b) = (Complex::new(3.0, -2.0), Complex::new(-1.5, 4.0));
        assert_eq!(a * b, Complex::new(3.5, 15.0));
        // Division both ways round (|re| ≥ |im| and |re| < |im| of the divisor).
        for d in [b, Complex::new(4.0, -1.5)] {
            let q = a / d;
            assert!((q * d - a).abs() <= 4.0 * f64::EPSILON * a.abs());
        }
        assert_eq!(a.conj(), Complex::new(3.0, 2.0));
        assert_eq!(a.norm_sqr(), 13.0);
        let z = Complex::cis(0.3);
        assert!((z.abs() - 1.0).abs() <= f64::EPSILON && (z.arg() - 0.3).abs() <= 1e-15);
    }

    #[test]
    fn solve_tridiagonal_matches_a_dense_solve() {
        // Seeded random systems of several sizes: diagonally dominant ones like the
        // harmonic matrix, and general ones (still nonsingular, pivots away from zero).
        let mut seed = 0x9e37_79b9_7f4a_7c15_u64;
        for (n, dominant) in [(1, true), (2, true), (7, true), (40, true), (9, false)] {
            let c = |s: &mut u64| Complex::new(random(s), random(s));
            let lower: Vec<Complex> = (0..n).map(|_| c(&mut seed)).collect();
            let upper: Vec<Complex> = (0..n).map(|_| c(&mut seed)).collect();
            let diag: Vec<Complex> = (0..n)
                .map(|i| {
                    let d = c(&mut seed);
                    if dominant {
                        d * 0.5 + Complex::real(lower[i].abs() + upper[i].abs() + 0.1)
                    } else {
                        d + Complex::real(2.0)
                    }
                })
                .collect();
            let b: Vec<Complex> = (0..n).map(|_| c(&mut seed)).collect();
            let mut dense = vec![vec![Complex::ZERO; n]; n];
            for i in 0..n {
                dense[i][i] = diag[i];
                if i > 0 {
                    dense[i][i - 1] = lower[i];
                }
                if i + 1 < n {
                    dense[i][i + 1] = upper[i];
                }
            }
            let want = dense_solve(dense, b.clone());
            let mut x = b;
            let mut work = vec![Complex::ZERO; n];
            solve_tridiagonal(&lower, &diag, &upper, &mut x, &mut work).unwrap();
            let scale = want.iter().map(|v| v.abs()).fold(0.0, f64::max);
            for (i, (got, w)) in x.iter().zip(&want).enumerate() {
                // Both are backward stable here; their difference is a few ε × size.
                assert!(
                    (*got - *w).abs() <= 1e-13 * scale,
                    "n = {n}, row {i}: {got:?} vs {w:?}"
                );
            }
        }
    }

    #[test]
    fn solve_tridiagonal_captures_errors() {
        let z = [Complex::ZERO; 2];
        let mut rhs = [Complex::real(1.0); 2];
        let mut work = [Complex::ZERO; 2];
        let diag = [Complex::real(1.0), Complex::ZERO];
        let e = solve_tridiagonal(&z, &diag, &z, &mut rhs, &mut work).unwrap_err();
        assert_eq!(
            e.to_string(),
            "tridiagonal solve failed: zero pivot at row 1"
        );
    }
}
