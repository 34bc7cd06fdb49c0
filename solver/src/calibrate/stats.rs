//! Uncertainty of a least-squares fit from its Jacobian at the optimum (fit coordinates).
//!
//! ```text
//! σ̂² = SSR / (m − p)                       p = parameters the records constrain
//! Cov(û) ≈ σ̂² (JᵀJ)⁻¹                      (linearisation; Bates & Watts 1988,
//!                                            "Nonlinear Regression Analysis and Its
//!                                            Applications", Wiley, ch. 2 — from memory)
//! interval  û_j ± t_{(1+c)/2, m−p} · se_j   (Student t)
//! corr_jk = Cov_jk / (se_j se_k)
//! ```
//!
//! Identifiability (docs/calibration.md): a parameter is *not constrained by these
//! records* when moving it across its whole allowed range changes the modelled records by
//! less than the noise, ‖J_j‖·(h_j − l_j) < σ̂ (its Jacobian column is ~0); the others'
//! covariance is then taken with it held. A parameter whose interval is wider than its
//! allowed range is reported the same way, without an interval. When the remaining
//! columns are linearly dependent the records constrain only a combination of them,
//! and no parameter of that set gets an interval.

use crate::steptest::{lsq, student};

/// What the records say about one parameter.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Identifiability {
    /// The records constrain it: an interval is given.
    Constrained,
    /// Its Jacobian column is ~0: moving it across its range does not change the records.
    NoEffect,
    /// Its interval would be wider than its allowed range.
    Flat,
    /// Only a combination with other parameters is constrained (JᵀJ singular).
    Confounded,
    /// Too few records for the parameters (m ≤ p).
    TooFewRecords,
}

impl Identifiability {
    /// Whether an interval is given.
    pub fn constrained(self) -> bool {
        self == Identifiability::Constrained
    }

    /// Words for the user.
    pub fn describe(self) -> &'static str {
        match self {
            Identifiability::Constrained => "constrained",
            Identifiability::NoEffect => {
                "not constrained by these records: changing it across its range does not change \
                 the modelled records beyond the noise"
            }
            Identifiability::Flat => {
                "not constrained by these records: its interval is wider than its allowed range"
            }
            Identifiability::Confounded => {
                "not separately constrained: the records fix only a combination of it with \
                 other free parameters"
            }
            Identifiability::TooFewRecords => "not constrained: too few records",
        }
    }
}

/// Intervals and correlation of a fit, fit coordinates.
#[derive(Debug, Clone)]
pub struct Uncertainty {
    /// Residual standard deviation σ̂.
    pub sigma: f64,
    /// Degrees of freedom m − p.
    pub dof: usize,
    /// Student t quantile used.
    pub t: f64,
    /// Standard error of each parameter (None when not constrained).
    pub std_error: Vec<Option<f64>>,
    /// Half-width of the interval, t·se (None when not constrained).
    pub half_width: Vec<Option<f64>>,
    /// Correlation matrix, row-major p × p over all parameters (None where not defined).
    pub correlation: Vec<Vec<Option<f64>>>,
    /// Identifiability of each parameter.
    pub status: Vec<Identifiability>,
}

/// The uncertainty at the optimum from the Jacobian columns `jac`, the residual sum of
/// squares `ssr`, the bounds (fit coordinates) and the confidence level (0.95).
pub fn uncertainty(
    jac: &[Vec<f64>],
    ssr: f64,
    bounds: &[(f64, f64)],
    confidence: f64,
) -> Uncertainty {
    let n = jac.len();
    let m = jac.first().map_or(0, Vec::len);
    let norms: Vec<f64> = jac
        .iter()
        .map(|c| c.iter().map(|v| v * v).sum::<f64>().sqrt())
        .collect();
    let mut status = vec![Identifiability::Constrained; n];
    // σ̂ from the parameters that act; a no-effect column is decided against the σ̂ of the
    // full count first (conservative: a larger σ̂ calls more columns ineffective).
    let sigma_all = if m > n {
        (ssr / (m - n) as f64).sqrt()
    } else {
        f64::NAN
    };
    for j in 0..n {
        let range = bounds[j].1 - bounds[j].0;
        let effect = norms[j] * range;
        if sigma_all.is_finite() && (effect.is_nan() || effect < sigma_all) {
            status[j] = Identifiability::NoEffect;
        }
    }
    let active: Vec<usize> = (0..n).filter(|&j| status[j].constrained()).collect();
    let p = active.len();
    let mut out = Uncertainty {
        sigma: f64::NAN,
        dof: m.saturating_sub(p),
        t: f64::NAN,
        std_error: vec![None; n],
        half_width: vec![None; n],
        correlation: vec![vec![None; n]; n],
        status,
    };
    if m <= p || m <= n && p == n {
        for s in &mut out.status {
            if s.constrained() {
                *s = Identifiability::TooFewRecords;
            }
        }
        return out;
    }
    out.sigma = (ssr / (m - p) as f64).sqrt();
    out.t = student::two_sided(confidence, (m - p) as u32);
    if p == 0 {
        return out;
    }
    let cols: Vec<Vec<f64>> = active.iter().map(|&j| jac[j].clone()).collect();
    let zeros = vec![0.0; m];
    let Some(sol) = lsq::solve(&cols, &zeros) else {
        for &j in &active {
            out.status[j] = Identifiability::Confounded;
        }
        return out;
    };
    let s2 = out.sigma * out.sigma;
    for (a, &j) in active.iter().enumerate() {
        let se = (s2 * sol.xtx_inv[a * p + a]).sqrt();
        let range = bounds[j].1 - bounds[j].0;
        // The interval û ± t·se is wider than the whole allowed range.
        if 2.0 * out.t * se > range {
            out.status[j] = Identifiability::Flat;
            continue;
        }
        out.std_error[j] = Some(se);
        out.half_width[j] = Some(out.t * se);
    }
    for (a, &j) in active.iter().enumerate() {
        for (b, &k) in active.iter().enumerate() {
            let c =
                sol.xtx_inv[a * p + b] / (sol.xtx_inv[a * p + a] * sol.xtx_inv[b * p + b]).sqrt();
            out.correlation[j][k] = Some(c);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_zero_column_is_not_given_an_interval() {
        // r = a + b·x with a third parameter that does nothing.
        let x = [0.0, 1.0, 2.0, 3.0, 4.0];
        let jac = vec![vec![1.0; 5], x.to_vec(), vec![0.0; 5]];
        let b = [(-10.0, 10.0); 3];
        let u = uncertainty(&jac, 0.3, &b, 0.95);
        assert_eq!(u.status[2], Identifiability::NoEffect);
        assert!(u.half_width[2].is_none());
        assert!(u.status[0].constrained() && u.status[1].constrained());
        // Straight line, σ̂² = 0.3/3: se(b) = σ̂/√Σ(x−x̄)² = √0.1/√10 = 0.1 (textbook
        // formula for the slope's standard error).
        assert!((u.std_error[1].unwrap() - 0.1).abs() < 1e-12);
        // t_{0.975,3} = 3.182446305284263 (scipy.stats.t.ppf(0.975, 3)).
        assert!((u.t - 3.182446305284263).abs() < 1e-9);
        // Two identical columns: only their sum is constrained.
        let twin = vec![x.to_vec(), x.to_vec()];
        let u = uncertainty(&twin, 0.3, &[(-10.0, 10.0); 2], 0.95);
        assert!(u.status.iter().all(|s| *s == Identifiability::Confounded));
        // A tiny but non-zero column whose interval spans more than the range: Flat.
        let weak = vec![vec![1.0; 5], vec![1e-3, 0.0, -1e-3, 0.0, 2e-3]];
        let u = uncertainty(&weak, 0.3, &[(-10.0, 10.0), (0.0, 300.0)], 0.95);
        assert_eq!(u.status[1], Identifiability::Flat);
    }
}
