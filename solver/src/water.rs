//! Properties of liquid water at atmospheric pressure: density, dynamic viscosity, and the
//! conversion between intrinsic permeability and hydraulic conductivity.
//!
//! Everything the solver needs from the fluid is a [`Water`] value (density and viscosity);
//! [`Water::at_celsius`] builds one from a temperature. The closed forms here cover
//! 0–40 °C, the range of groundwater; outside it they are extrapolations (see each function).
//!
//! ```text
//! K = k ρ g / μ          k = K μ / (ρ g)
//! K: hydraulic conductivity [m/s], k: intrinsic permeability [m²],
//! ρ: density [kg/m³], μ: dynamic viscosity [Pa s], g: standard gravity [m/s²]
//! ```

/// Standard acceleration of gravity [m/s²] (conventional value, CGPM 1901).
pub const GRAVITY_M_S2: f64 = 9.806_65;

/// Lower end of the temperature range the water correlations were fitted on [°C].
pub const FIT_RANGE_MIN_C: f64 = 0.0;

/// Upper end of the temperature range the water correlations were fitted on [°C].
pub const FIT_RANGE_MAX_C: f64 = 40.0;

/// Coefficient a1 of the Tanaka et al. (2001) density formula [°C].
const TANAKA_A1_C: f64 = -3.983_035;
/// Coefficient a2 of the Tanaka et al. (2001) density formula [°C].
const TANAKA_A2_C: f64 = 301.797;
/// Coefficient a3 of the Tanaka et al. (2001) density formula [°C²].
const TANAKA_A3_C2: f64 = 522_528.9;
/// Coefficient a4 of the Tanaka et al. (2001) density formula [°C].
const TANAKA_A4_C: f64 = 69.348_81;
/// Coefficient a5 of the Tanaka et al. (2001) density formula: the maximum density [kg/m³].
const TANAKA_A5_KG_M3: f64 = 999.974_950;

/// Prefactor A of the Vogel-type viscosity fit [Pa s].
const VOGEL_A_PA_S: f64 = 4.002_173_28e-5;
/// Coefficient B of the Vogel-type viscosity fit [K].
const VOGEL_B_K: f64 = 421.191_020;
/// Coefficient C of the Vogel-type viscosity fit [K].
const VOGEL_C_K: f64 = 162.329_438;

/// Offset between the Celsius and the kelvin scale [K].
const CELSIUS_ZERO_K: f64 = 273.15;

/// Spacing of the viscosity table [°C].
const VISCOSITY_TABLE_STEP_C: f64 = 5.0;

/// Dynamic viscosity [Pa s] at 0, 5, …, 40 °C and 0.101325 MPa: IAPWS 2008 formulation
/// (Huber et al. 2009), as evaluated by the iapws Python package and tabulated, 6 significant
/// digits, in the project's physics reference (§5.3).
const VISCOSITY_TABLE_PA_S: [f64; 9] = [
    1.791_76e-3,
    1.518_17e-3,
    1.305_90e-3,
    1.137_57e-3,
    1.001_60e-3,
    0.890_022e-3,
    0.797_222e-3,
    0.719_126e-3,
    0.652_729e-3,
];

/// Density of air-free water at 0.101325 MPa [kg/m³] for a temperature in °C.
///
/// ```text
/// ρ = a5 [1 − (t + a1)² (t + a2) / (a3 (t + a4))]
/// a1 = −3.983035 °C, a2 = 301.797 °C, a3 = 522528.9 °C², a4 = 69.34881 °C,
/// a5 = 999.974950 kg/m³, t in °C
/// ```
///
/// Source: Tanaka, M., Girard, G., Davis, R., Peuto, A., Bignell, N., 2001, "Recommended
/// table for the density of water between 0 °C and 40 °C based on recent experimental
/// reports", Metrologia 38, 301–309. Checked against IAPWS-95: within 1.14e-3 kg/m³ over
/// 0–40 °C (largest at 40 °C). Outside 0–40 °C the formula is extrapolated and its accuracy is unknown.
pub fn density_kg_m3(temp_c: f64) -> f64 {
    let t = temp_c;
    let num = (t + TANAKA_A1_C).powi(2) * (t + TANAKA_A2_C);
    let den = TANAKA_A3_C2 * (t + TANAKA_A4_C);
    TANAKA_A5_KG_M3 * (1.0 - num / den)
}

/// Vogel-type fit of the dynamic viscosity of water at 0.101325 MPa [Pa s].
///
/// ```text
/// μ = A exp(B / (T − C)),   A = 4.00217328e-5 Pa s, B = 421.191020 K, C = 162.329438 K,
/// T = t + 273.15 in K
/// ```
///
/// A least-squares fit (scipy.optimize.curve_fit) to the IAPWS 2008 viscosity at 0, 5, …,
/// 40 °C; the fit is this project's, not a published formula. Maximum relative deviation
/// from IAPWS 2008 over 0–40 °C: 9.3e-4. Outside that range it is an extrapolation; the
/// Vogel form follows the steep rise of viscosity towards freezing and the slow fall above
/// 40 °C, but its error there has not been checked.
pub fn viscosity_vogel_pa_s(temp_c: f64) -> f64 {
    let t_k = temp_c + CELSIUS_ZERO_K;
    VOGEL_A_PA_S * (VOGEL_B_K / (t_k - VOGEL_C_K)).exp()
}

/// Dynamic viscosity of water at 0.101325 MPa [Pa s] for a temperature in °C.
///
/// Inside 0–40 °C: the IAPWS 2008 table at 5 °C steps, interpolated linearly in ln μ
/// relative to the Vogel fit ([`viscosity_vogel_pa_s`]):
///
/// ```text
/// ln μ(t) = ln μ_V(t) + interp_lin(t; t_j, ln(μ_j / μ_V(t_j)))
/// μ_j: tabulated IAPWS value at node t_j = 0, 5, …, 40 °C; μ_V: Vogel fit
/// ```
///
/// This returns the table value at every node. Between nodes, the curvature of ln μ is
/// carried by the Vogel fit, so only the small residual is interpolated. Plain linear
/// interpolation of ln μ on this 5 °C table is off by up to 2.1e-3 (relative) mid-interval
/// near 0 °C, more than the Vogel fit alone; the residual form stays within 2.6e-4 of
/// IAPWS 2008 over 0–40 °C (both measured against iapws.IAPWS95(T, P=0.101325).mu at
/// 0.25 °C steps).
///
/// Outside 0–40 °C the Vogel fit is used on its own (an extrapolation, see
/// [`viscosity_vogel_pa_s`]); at the range ends this steps by the fit's deviation there
/// (below 1e-3 relative).
pub fn viscosity_pa_s(temp_c: f64) -> f64 {
    if !(FIT_RANGE_MIN_C..=FIT_RANGE_MAX_C).contains(&temp_c) {
        return viscosity_vogel_pa_s(temp_c);
    }
    let last = VISCOSITY_TABLE_PA_S.len() - 1;
    let pos = (temp_c - FIT_RANGE_MIN_C) / VISCOSITY_TABLE_STEP_C;
    // Truncation is the intent: index of the node at or below temp_c, capped so that the
    // upper end (40 °C) uses the last interval.
    let j = (pos.floor() as usize).min(last - 1);
    let frac = pos - j as f64;
    let node_c = |i: usize| FIT_RANGE_MIN_C + VISCOSITY_TABLE_STEP_C * i as f64;
    let residual = |i: usize| (VISCOSITY_TABLE_PA_S[i] / viscosity_vogel_pa_s(node_c(i))).ln();
    let r = residual(j) + frac * (residual(j + 1) - residual(j));
    viscosity_vogel_pa_s(temp_c) * r.exp()
}

/// Standard atmospheric pressure at sea level, in Pa (ISO 2533 standard atmosphere; the
/// definition of the standard atmosphere, 101 325 Pa exactly).
pub const STANDARD_ATMOSPHERE_PA: f64 = 101_325.0;

/// Coefficients n1…n10 of the saturation-pressure equation of IAPWS-IF97 (region 4).
const IF97_SAT: [f64; 10] = [
    0.116_705_214_527_67e4,
    -0.724_213_167_032_06e6,
    -0.170_738_469_400_92e2,
    0.120_208_247_024_70e5,
    -0.323_255_503_223_33e7,
    0.149_151_086_135_30e2,
    -0.482_326_573_615_91e4,
    0.405_113_405_420_57e6,
    -0.238_555_575_678_49,
    0.650_175_348_447_98e3,
];

/// Vapour (saturation) pressure of water, in Pa at a temperature in °C.
///
/// ```text
/// ϑ = T + n9/(T − n10),  A = ϑ² + n1 ϑ + n2,  B = n3 ϑ² + n4 ϑ + n5,  C = n6 ϑ² + n7 ϑ + n8
/// p_sat = [2C / (−B + sqrt(B² − 4AC))]⁴  MPa,   T in K
/// ```
///
/// IAPWS, 2007, "Revised Release on the IAPWS Industrial Formulation 1997 for the
/// Thermodynamic Properties of Water and Steam" (IAPWS-IF97), region 4, eq. 30, valid from
/// 273.15 K to 647.096 K. Checked against `iapws.iapws97._PSat_T` and the IF97 verification
/// values (tests below).
pub fn vapour_pressure_pa(temp_c: f64) -> f64 {
    let n = &IF97_SAT;
    let t = temp_c + CELSIUS_ZERO_K;
    let th = t + n[8] / (t - n[9]);
    let a = th * th + n[0] * th + n[1];
    let b = n[2] * th * th + n[3] * th + n[4];
    let c = n[5] * th * th + n[6] * th + n[7];
    let x = 2.0 * c / (-b + (b * b - 4.0 * a * c).sqrt());
    x.powi(4) * 1e6
}

/// Density and dynamic viscosity of the pore water: everything the flow laws need.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Water {
    /// Density ρ [kg/m³].
    pub density_kg_m3: f64,
    /// Dynamic viscosity μ [Pa s].
    pub viscosity_pa_s: f64,
}

impl Water {
    /// Water at atmospheric pressure and the given temperature [°C], from
    /// [`density_kg_m3`] and [`viscosity_pa_s`].
    pub fn at_celsius(temp_c: f64) -> Self {
        Self {
            density_kg_m3: density_kg_m3(temp_c),
            viscosity_pa_s: viscosity_pa_s(temp_c),
        }
    }

    /// Kinematic viscosity ν = μ/ρ [m²/s].
    pub fn kinematic_viscosity(&self) -> f64 {
        self.viscosity_pa_s / self.density_kg_m3
    }

    /// Hydraulic conductivity [m/s] of a medium of intrinsic permeability `k_m2` \[m²\].
    ///
    /// ```text
    /// K = k ρ g / μ
    /// ```
    pub fn conductivity_from_permeability(&self, k_m2: f64) -> f64 {
        k_m2 * self.density_kg_m3 * GRAVITY_M_S2 / self.viscosity_pa_s
    }

    /// Intrinsic permeability \[m²\] of a medium of hydraulic conductivity `k_m_s` [m/s].
    ///
    /// ```text
    /// k = K μ / (ρ g)
    /// ```
    pub fn permeability_from_conductivity(&self, k_m_s: f64) -> f64 {
        k_m_s * self.viscosity_pa_s / (self.density_kg_m3 * GRAVITY_M_S2)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// 1 darcy \[m²\] (docs/physics.md §5.3, as printed there).
    const DARCY_M2: f64 = 9.869_233e-13;

    /// Rows (t, ρ, μ, ν, ρg/μ, K for 1 darcy) of the water table: IAPWS-95 density and
    /// IAPWS 2008 viscosity, values computed with iapws.IAPWS95(T=273.15+t, P=0.101325)
    /// (docs/physics.md §5.3).
    const IAPWS_ROWS: [(f64, f64, f64, f64, f64, f64); 3] = [
        (
            10.0,
            999.702_470,
            1.305_899_7e-3,
            1.306_288e-6,
            7.507_263e6,
            7.409_093e-6,
        ),
        (
            15.0,
            999.102_621,
            1.137_567_6e-3,
            1.138_589e-6,
            8.612_983e6,
            8.500_353e-6,
        ),
        (
            20.0,
            998.207_150,
            1.001_596_1e-3,
            1.003_395e-6,
            9.773_468e6,
            9.645_664e-6,
        ),
    ];

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs()
    }

    #[test]
    fn density_kg_m3_works() {
        // Tanaka et al. 2001 formula against IAPWS-95 values computed with iapws.IAPWS95
        // (docs/physics.md §5.3). Tolerance 2e-3 kg/m³: the formula's largest deviation from
        // IAPWS-95 over 0–40 °C is 1.14e-3 kg/m³, at 40 °C.
        for &(t, rho, ..) in &IAPWS_ROWS {
            let got = density_kg_m3(t);
            assert!((got - rho).abs() < 2e-3, "t = {t}: {got} vs {rho}");
        }
    }

    #[test]
    fn density_kg_m3_peaks_near_4_c() {
        // Tanaka et al. 2001: the formula's maximum is a5 = 999.974950 kg/m³ at t = −a1
        // = 3.983035 °C (docs/physics.md §5.3).
        assert!((density_kg_m3(3.983_035) - 999.974_950).abs() < 1e-9);
        assert!(density_kg_m3(3.0) < density_kg_m3(3.983_035));
        assert!(density_kg_m3(5.0) < density_kg_m3(3.983_035));
    }

    #[test]
    fn viscosity_pa_s_works_at_table_nodes() {
        // IAPWS 2008 viscosity computed with iapws.IAPWS95(T=273.15+t, P=0.101325).mu
        // (docs/physics.md §5.3, 8 digits). The interpolation table prints 6 digits, so each
        // node may differ from these by half a unit of its last digit: 5e-9 Pa s.
        for &(t, _, mu, ..) in &IAPWS_ROWS {
            let got = viscosity_pa_s(t);
            assert!((got - mu).abs() <= 5e-9, "t = {t}: {got} vs {mu}");
            assert!(rel(got, mu) < 5e-6, "t = {t}: {got} vs {mu}");
        }
    }

    #[test]
    fn viscosity_pa_s_works_between_nodes() {
        // IAPWS 2008 viscosity between the table nodes, computed with
        // iapws.IAPWS95(T=273.15+t, P=0.101325).mu (iapws 1.5.5). Tolerance 3e-4: the
        // measured maximum of the interpolation over 0–40 °C is 2.6e-4.
        let mid = [
            (2.5, 1.645_900_76e-3),
            (12.5, 1.217_069_29e-3),
            (37.5, 0.684_620_65e-3),
        ];
        for (t, mu) in mid {
            let got = viscosity_pa_s(t);
            assert!(rel(got, mu) < 3e-4, "t = {t}: {got} vs {mu}");
        }
    }

    #[test]
    fn viscosity_vogel_pa_s_works() {
        // Vogel-type fit against IAPWS values computed with iapws.IAPWS95 (docs/physics.md
        // §5.3); the fit's stated maximum relative deviation over 0–40 °C is 9.3e-4.
        for &(t, _, mu, ..) in &IAPWS_ROWS {
            let got = viscosity_vogel_pa_s(t);
            assert!(rel(got, mu) < 9.3e-4, "t = {t}: {got} vs {mu}");
        }
    }

    #[test]
    fn viscosity_pa_s_uses_vogel_fit_outside_range() {
        // Documented behaviour: outside 0–40 °C the Vogel fit is returned unchanged, and
        // it continues the table within the fit's 9.3e-4 (docs/physics.md §5.3) at the ends.
        assert_eq!(viscosity_pa_s(45.0), viscosity_vogel_pa_s(45.0));
        assert_eq!(viscosity_pa_s(-1.0), viscosity_vogel_pa_s(-1.0));
        let just_above = viscosity_pa_s(40.0 + 1e-9);
        assert!(rel(just_above, viscosity_pa_s(40.0)) < 9.3e-4);
        let just_below = viscosity_pa_s(-1e-9);
        assert!(rel(just_below, viscosity_pa_s(0.0)) < 9.3e-4);
    }

    #[test]
    fn water_at_celsius_works() {
        // ν, ρg/μ and K for 1 darcy from the §5.3 rows (computed with iapws.IAPWS95,
        // docs/physics.md §5.3). Tolerance 6e-6 relative: the viscosity nodes carry up to
        // 4.4e-6 relative rounding (6 digits) and the density formula 1.1e-6.
        for &(t, _, _, nu, rho_g_mu, k_darcy) in &IAPWS_ROWS {
            let w = Water::at_celsius(t);
            assert!(rel(w.kinematic_viscosity(), nu) < 6e-6, "t = {t}");
            assert!(
                rel(w.conductivity_from_permeability(1.0), rho_g_mu) < 6e-6,
                "t = {t}"
            );
            assert!(
                rel(w.conductivity_from_permeability(DARCY_M2), k_darcy) < 6e-6,
                "t = {t}"
            );
        }
    }

    #[test]
    fn water_conversions_work_with_table_properties() {
        // With ρ, μ exactly as printed, ν, ρg/μ and K for 1 darcy must match the printed
        // 7 digits (computed with iapws.IAPWS95, docs/physics.md §5.3): 1e-6 relative.
        for &(t, rho, mu, nu, rho_g_mu, k_darcy) in &IAPWS_ROWS {
            let w = Water {
                density_kg_m3: rho,
                viscosity_pa_s: mu,
            };
            assert!(rel(w.kinematic_viscosity(), nu) < 1e-6, "t = {t}");
            assert!(
                rel(w.conductivity_from_permeability(1.0), rho_g_mu) < 1e-6,
                "t = {t}"
            );
            assert!(
                rel(w.conductivity_from_permeability(DARCY_M2), k_darcy) < 1e-6,
                "t = {t}"
            );
            assert!(
                rel(w.permeability_from_conductivity(k_darcy), DARCY_M2) < 1e-6,
                "t = {t}"
            );
        }
    }

    #[test]
    fn permeability_round_trip_works() {
        // Algebraic identity k → K → k; tolerance a few ulps.
        let w = Water::at_celsius(12.0);
        for k in [1e-15, 2.7e-11, 3.3e-9] {
            let back = w.permeability_from_conductivity(w.conductivity_from_permeability(k));
            assert!(rel(back, k) < 1e-14);
        }
    }
    #[test]
    fn vapour_pressure_pa_works() {
        // IAPWS-IF97 computer-program verification values of the saturation-pressure
        // equation (IAPWS 2007, T = 300, 500, 600 K, 9 significant digits; from memory, and
        // reproduced by iapws.iapws97._PSat_T, iapws 1.5.5), and at groundwater
        // temperatures the values of iapws.iapws97._PSat_T (iapws 1.5.5). Tolerance 1e-8
        // relative: the printed digits.
        let rows = [
            (300.0, 0.353_658_941e-2),
            (500.0, 0.263_889_776e1),
            (600.0, 0.123_443_146e2),
            (283.15, 1.228_183_869_340_2e-3),
            (293.15, 2.339_214_766_776_9e-3),
        ];
        for (t_k, p_mpa) in rows {
            let got = vapour_pressure_pa(t_k - CELSIUS_ZERO_K);
            assert!(rel(got, p_mpa * 1e6) < 1e-8, "T = {t_k}: {got}");
        }
    }
}
