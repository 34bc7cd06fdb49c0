//! Lift-off of wall-cake patches (docs/physics.md §13a).
//!
//! A patch fails when the inward pressure difference across the cake, ΔP = ρ g Δh_cake with
//! Δh_cake the head drop across the cake's interface resistance while the flow goes toward
//! the well, exceeds its lift-off pressure. The strengths of the patches are log-normal
//! with median P_m and spread s (standard deviation of ln P). Failure is irreversible, so
//! the covered fraction follows the largest inward ΔP so far:
//!
//! ```text
//! c = c₀ (1 − F(P_peak)),    F(P) = Φ((ln P − ln P_m)/s)     (s > 0)
//!                            F(P) = 1 if P ≥ P_m, else 0      (s = 0, one strength)
//! ```
//! Φ is the standard normal distribution function, here from the complementary error
//! function of Abramowitz & Stegun (1964) 7.1.26 (absolute error of erf below 1.5e-7).

use crate::model::LiftOff;

/// Standard normal distribution function Φ(z), absolute error below 1e-7
/// (Abramowitz & Stegun 1964, 7.1.26, through Φ(z) = erfc(−z/√2)/2).
pub fn normal_cdf(z: f64) -> f64 {
    let x = z.abs() / std::f64::consts::SQRT_2;
    let t = 1.0 / (1.0 + 0.327_591_1 * x);
    let poly = t
        * (0.254_829_592
            + t * (-0.284_496_736
                + t * (1.421_413_741 + t * (-1.453_152_027 + t * 1.061_405_429))));
    let erfc = poly * (-x * x).exp();
    if z >= 0.0 {
        1.0 - 0.5 * erfc
    } else {
        0.5 * erfc
    }
}

/// Fraction of the patches that have failed once the inward pressure difference reached
/// `peak_pa`, –.
pub fn failed_fraction(l: &LiftOff, peak_pa: f64) -> f64 {
    if peak_pa.is_nan() || peak_pa <= 0.0 {
        return 0.0;
    }
    if l.spread == 0.0 {
        return if peak_pa >= l.median_pa { 1.0 } else { 0.0 };
    }
    normal_cdf((peak_pa / l.median_pa).ln() / l.spread)
}

/// Inward pressure difference across the cake, Pa (≥ 0): ρ g times the head drop across the
/// cake's interface resistance `r_cake` (s/m²) for the wall flow `q_wall` (m³/s, outward
/// positive), counted only while the flow goes toward the well.
pub fn inward_pressure_pa(rho_g: f64, r_cake: f64, q_wall: f64) -> f64 {
    (-q_wall * r_cake * rho_g).max(0.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_strength_fails_exactly_at_the_median() {
        let l = LiftOff {
            median_pa: 5000.0,
            spread: 0.0,
            patch_radius_m: 5e-3,
            frozen: false,
        };
        assert_eq!(failed_fraction(&l, 4999.999), 0.0);
        assert_eq!(failed_fraction(&l, 5000.0), 1.0);
        assert_eq!(failed_fraction(&l, 0.0), 0.0);
    }

    #[test]
    fn normal_cdf_matches_known_values() {
        // Φ(0) = 1/2 exactly; Φ(1) = 0.841344746068543, Φ(−2) = 0.022750131948179 (scipy
        // 1.x, scipy.stats.norm.cdf); tolerance from the A&S 7.1.26 error bound.
        assert!((normal_cdf(0.0) - 0.5).abs() < 1e-7);
        assert!((normal_cdf(1.0) - 0.841_344_746_068_543).abs() < 1e-7);
        assert!((normal_cdf(-2.0) - 0.022_750_131_948_179).abs() < 1e-7);
    }

    #[test]
    fn only_inward_flow_loads_the_cake() {
        assert_eq!(inward_pressure_pa(9800.0, 1e3, 1e-3), 0.0);
        assert!((inward_pressure_pa(9800.0, 1e3, -1e-3) - 9800.0).abs() < 1e-9);
    }
}
