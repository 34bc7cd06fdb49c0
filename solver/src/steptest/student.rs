//! Student's t distribution for integer degrees of freedom: the distribution function by
//! its finite trigonometric series, and the quantile by bisection on it.
//!
//! ```text
//! θ = atan(t / √ν),  c = cos²θ,  A(t|ν) = P(|T| ≤ t)
//! ν odd:  A = (2/π) [θ + sinθ cosθ (1 + (2/3) c + (2·4)/(3·5) c² + … )]   ((ν−1)/2 terms)
//! ν even: A = sinθ (1 + (1/2) c + (1·3)/(2·4) c² + … )                     (ν/2 terms)
//! F(t) = (1 + A(|t|)) / 2 for t ≥ 0,  F(−t) = 1 − F(t)
//! ```
//!
//! Abramowitz, M. and Stegun, I.A. (eds.), 1964, "Handbook of Mathematical Functions",
//! NBS Applied Mathematics Series 55, formulas 26.7.3 and 26.7.4 (from memory — verify;
//! the values are checked against `scipy.stats.t` in the tests). The series is exact for
//! integer ν, which is all a least-squares fit needs (ν = observations − parameters).

use std::f64::consts::PI;

/// A(t|ν) = P(|T| ≤ t) for t ≥ 0 and integer ν ≥ 1.
fn central_probability(t: f64, dof: u32) -> f64 {
    let nu = f64::from(dof);
    let theta = (t / nu.sqrt()).atan();
    let (sin, cos) = theta.sin_cos();
    let c = cos * cos;
    if dof % 2 == 1 {
        // Terms b_0 = 1, b_k = b_{k−1} c (2k)/(2k + 1), k = 1 … (ν − 3)/2.
        let mut sum = 0.0;
        if dof >= 3 {
            let mut term = 1.0;
            sum = 1.0;
            for k in 1..=((dof - 3) / 2) {
                let k = f64::from(k);
                term *= c * (2.0 * k) / (2.0 * k + 1.0);
                sum += term;
            }
        }
        (2.0 / PI) * (theta + sin * cos * sum)
    } else {
        // Terms a_0 = 1, a_k = a_{k−1} c (2k − 1)/(2k), k = 1 … (ν − 2)/2.
        let mut term = 1.0;
        let mut sum = 1.0;
        for k in 1..=((dof - 2) / 2) {
            let k = f64::from(k);
            term *= c * (2.0 * k - 1.0) / (2.0 * k);
            sum += term;
        }
        sin * sum
    }
}

/// Distribution function F(t) = P(T ≤ t) of Student's t with `dof` ≥ 1 degrees of freedom.
pub fn cdf(t: f64, dof: u32) -> f64 {
    assert!(dof >= 1, "Student t needs at least one degree of freedom");
    let a = central_probability(t.abs(), dof);
    if t >= 0.0 {
        0.5 + 0.5 * a
    } else {
        0.5 - 0.5 * a
    }
}

/// Quantile t_p with P(T ≤ t_p) = p, for 0 < p < 1 and `dof` ≥ 1.
///
/// Bisection on the monotone A(t|ν) = 2p − 1 (for p ≥ ½; symmetric below), continued until
/// the bracket no longer shrinks, so the result is as accurate as the series (about 1e-15
/// relative for the two-sided 95 % point; see the tests).
pub fn quantile(p: f64, dof: u32) -> f64 {
    assert!(
        p > 0.0 && p < 1.0,
        "quantile probability {p} outside (0, 1)"
    );
    assert!(dof >= 1, "Student t needs at least one degree of freedom");
    if p < 0.5 {
        return -quantile(1.0 - p, dof);
    }
    let target = 2.0 * p - 1.0;
    if target == 0.0 {
        return 0.0;
    }
    let mut lo = 0.0_f64;
    let mut hi = 1.0_f64;
    while central_probability(hi, dof) < target {
        lo = hi;
        hi *= 2.0;
        if hi > 1e300 {
            return f64::INFINITY;
        }
    }
    loop {
        let mid = 0.5 * (lo + hi);
        if mid <= lo || mid >= hi {
            return mid;
        }
        if central_probability(mid, dof) < target {
            lo = mid;
        } else {
            hi = mid;
        }
    }
}

/// Two-sided quantile for a confidence level, e.g. `two_sided(0.95, ν)` = t_{0.975, ν}.
pub fn two_sided(confidence: f64, dof: u32) -> f64 {
    quantile(0.5 + 0.5 * confidence, dof)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rel(a: f64, b: f64) -> f64 {
        ((a - b) / b).abs()
    }

    /// Two-sided 95 % and one-sided 95 % points: `scipy.stats.t.ppf(0.975, nu)` and
    /// `scipy.stats.t.ppf(0.95, nu)` (scipy 1.17.1). Tolerance 1e-12 relative: the series
    /// has a few ulps of round-off per term, and bisection resolves to the last bit.
    #[test]
    fn steptest_student_quantiles_match_scipy() {
        let table: [(u32, f64, f64); 9] = [
            (1, 12.706204736174694, 6.313751514675037),
            (2, 4.302652729749462, 2.9199855803537242),
            (3, 3.1824463052837078, 2.3533634348018233),
            (4, 2.7764451051977934, 2.1318467863266495),
            (5, 2.5705818356363146, 2.0150483733330233),
            (7, 2.364624251592784, 1.8945786050900062),
            (10, 2.228138851986274, 1.8124611228116756),
            (30, 2.0422724563012378, 1.697260886593957),
            (100, 1.9839715185235518, 1.6602343260853392),
        ];
        for (nu, q975, q95) in table {
            assert!(
                rel(quantile(0.975, nu), q975) < 1e-12,
                "nu {nu}: {}",
                quantile(0.975, nu)
            );
            assert!(rel(two_sided(0.95, nu), q975) < 1e-12, "nu {nu}");
            assert!(
                rel(quantile(0.95, nu), q95) < 1e-12,
                "nu {nu}: {}",
                quantile(0.95, nu)
            );
            assert!(rel(quantile(0.025, nu), -q975) < 1e-12, "nu {nu}");
        }
    }

    /// Many degrees of freedom (a long time series): `scipy.stats.t.ppf(0.975, 1000)` =
    /// 1.9623390808264083 and `scipy.stats.t.ppf(0.975, 100000)` = 1.9599877075346095
    /// (scipy 1.17.1). The series then has ν/2 terms whose round-off adds up; tolerance
    /// 1e-10 relative.
    #[test]
    fn steptest_student_quantiles_many_dof() {
        assert!(
            rel(quantile(0.975, 1000), 1.9623390808264083) < 1e-10,
            "{}",
            quantile(0.975, 1000)
        );
        let q = quantile(0.975, 100_000);
        assert!(rel(q, 1.9599877075346095) < 1e-10, "{q}");
    }

    /// `scipy.stats.t.cdf(1.5, nu)` (scipy 1.17.1); 0.896 for ν = 4 is exact
    /// (F = ½ + ½ · 1.5/√6.25 · (1 + ½ · 4/6.25) = 0.896).
    #[test]
    fn steptest_student_cdf_matches_scipy() {
        let table: [(u32, f64); 9] = [
            (1, 0.8128329581890011),
            (2, 0.8638034375544994),
            (3, 0.8847080673775886),
            (4, 0.896),
            (5, 0.9030481598787634),
            (7, 0.911350756505015),
            (10, 0.9177463367772799),
            (30, 0.927967035435677),
            (100, 0.9316174709376556),
        ];
        for (nu, f) in table {
            assert!(rel(cdf(1.5, nu), f) < 1e-13, "nu {nu}: {}", cdf(1.5, nu));
            assert!(rel(cdf(-1.5, nu), 1.0 - f) < 1e-12, "nu {nu}");
        }
        assert_eq!(cdf(0.0, 3), 0.5);
        assert_eq!(quantile(0.5, 3), 0.0);
    }
}
