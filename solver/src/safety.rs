//! Practical checks reported as warnings: collapse of thermoplastic casing and screen,
//! piping and heave, pack-to-formation filter ratios, and screen entrance velocity and loss.
//!
//! Nothing here decides whether a well or a development plan is safe. The functions compute
//! the textbook indicators so that the tool can print them beside the simulated loads,
//! always together with [`CAUTION`]. Limits appear only where a documented rule exists, and
//! are exposed as constants so that reports can quote them.

use crate::water::GRAVITY_M_S2;

/// Cautions shown with every result that touches well integrity.
pub const CAUTION: &str = "Well development can collapse a screen or casing (thermoplastic \
pipe above all), stick or sand-lock tools, and damage the filter pack or the formation. These \
figures are model estimates built on uncertain inputs; they are meant to inform, not to \
replace, the judgement of a licensed driller or engineer. The manufacturer's ratings for the \
screen and casing and the local well construction code take precedence over anything computed \
here. Start gently and increase effort only while the well responds well.";

/// Young's modulus of PVC well casing \[Pa\]: about 2.76 GPa (400,000 psi). Typical value,
/// from memory — verify against the manufacturer; it falls noticeably with temperature.
pub const PVC_YOUNGS_MODULUS_PA: f64 = 2.758e9;

/// Poisson's ratio of PVC [-]: about 0.38. Typical value, from memory — verify.
pub const PVC_POISSON_RATIO: f64 = 0.38;

/// Safety factor commonly applied to the elastic collapse pressure [-]: the upper end of
/// the 1.5–2 usually quoted (common practice, no source).
pub const DEFAULT_COLLAPSE_SAFETY_FACTOR: f64 = 2.0;

/// Filter retention rule: D15(pack)/D85(formation) at most 4 (some use 5). Terzaghi-type
/// filter rule, Terzaghi & Peck 1948 and agency manuals (from memory — verify).
pub const RETENTION_RATIO_MAX: f64 = 4.0;

/// Filter permeability rule: D15(pack)/D15(formation) at least 4 (some use 5).
/// Terzaghi-type filter rule, Terzaghi & Peck 1948 and agency manuals (from memory —
/// verify).
pub const PERMEABILITY_RATIO_MIN: f64 = 4.0;

/// Lower end of the usual pack-to-aquifer ratio D50(pack)/D50(formation) for water wells
/// (common practice in water-well handbooks, e.g. Driscoll 1986; from memory — verify).
pub const PACK_AQUIFER_RATIO_TYPICAL_MIN: f64 = 4.0;

/// Upper end of the usual pack-to-aquifer ratio D50(pack)/D50(formation) for water wells
/// (common practice in water-well handbooks, e.g. Driscoll 1986; from memory — verify).
pub const PACK_AQUIFER_RATIO_TYPICAL_MAX: f64 = 6.0;

/// Pack-to-aquifer ratio up to which some practice goes for coarser or less uniform
/// formations (common practice; from memory — verify).
pub const PACK_AQUIFER_RATIO_COARSE_MAX: f64 = 9.0;

/// Usual upper limit of the pack's uniformity coefficient d60/d10 (common practice in
/// water-well handbooks; from memory — verify).
pub const PACK_UNIFORMITY_MAX: f64 = 2.5;

/// Rule-of-thumb maximum screen entrance velocity [m/s]: 0.1 ft/s. Common practice, no
/// source (widely quoted in water-well texts; its physical basis has been questioned).
/// Exceeding it is a warning, not a failure.
pub const ENTRANCE_VELOCITY_RULE_M_S: f64 = 0.030_48;

/// Elastic collapse pressure of a long thin ring under uniform external pressure \[Pa\].
///
/// ```text
/// Pc = 2 E / (1 − ν²) · (1 / (DR − 1))³
/// E: Young's modulus [Pa], ν: Poisson's ratio [-],
/// DR = outside diameter / wall thickness [-]  (t/D_m = 1/(DR − 1), D_m = D − t)
/// ```
///
/// Timoshenko & Gere 1961, "Theory of Elastic Stability": ring buckling 3 E I / R_m³ with
/// I = t³/12 and the plane-strain modulus E/(1 − ν²). Thermoplastic well-casing collapse
/// tables are, from memory, built on this formula (verify). Pc has no safety factor and
/// assumes round, unslotted pipe at the temperature of E; out-of-roundness, slots and heat
/// (grout hydration) lower the real capacity. The manufacturer's rating governs.
pub fn thin_ring_collapse_pa(youngs_modulus_pa: f64, poisson: f64, dimension_ratio: f64) -> f64 {
    let t_over_dm = 1.0 / (dimension_ratio - 1.0);
    2.0 * youngs_modulus_pa / (1.0 - poisson * poisson) * t_over_dm.powi(3)
}

/// Collapse pressure at which the wall first yields \[Pa\] (thick-wall, Lamé).
///
/// ```text
/// P_y = 2 σ_y (DR − 1) / DR²
/// σ_y: yield strength [Pa], DR = outside diameter / wall thickness [-]
/// ```
///
/// The hoop stress at the bore of a thick ring under external pressure p is
/// `2 p b² / (b² − a²)` (Lamé); setting it to σ_y with a/b = 1 − 2/DR gives the formula. It is
/// the "yield-strength collapse pressure" of API Bulletin 5C3 (1994) and ISO/TR 10400 for
/// casing (from memory — verify). Stocky, strong pipe (steel at low DR) yields before it
/// buckles; [`collapse_pressure_pa`] takes the lower of the two limits.
pub fn yield_collapse_pa(yield_strength_pa: f64, dimension_ratio: f64) -> f64 {
    2.0 * yield_strength_pa * (dimension_ratio - 1.0) / (dimension_ratio * dimension_ratio)
}

/// Elastic constants and strength of a pipe material for the collapse check.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PipeMaterial {
    /// Young's modulus E \[Pa\].
    pub youngs_modulus_pa: f64,
    /// Poisson's ratio ν [-].
    pub poisson: f64,
    /// Yield (or, for thermoplastics, minimum tensile) strength σ_y \[Pa\].
    pub yield_strength_pa: f64,
    /// Thermoplastic: E and σ_y fall with temperature ([`pvc_temperature_factor`]).
    pub thermoplastic: bool,
}

/// Carbon-steel well casing: E = 207 GPa (30e6 psi), ν = 0.30, σ_y = 241 MPa (35 ksi, the
/// minimum yield of ASTM A53 / A106 grade B pipe). Handbook values, from memory — verify
/// against the mill certificate.
pub const STEEL: PipeMaterial = PipeMaterial {
    youngs_modulus_pa: 207e9,
    poisson: 0.30,
    yield_strength_pa: 241.3e6,
    thermoplastic: false,
};

/// Austenitic stainless steel (type 304): E = 193 GPa (28e6 psi), ν = 0.29, σ_y = 207 MPa
/// (30 ksi, the minimum yield of ASTM A312 TP304). Handbook values, from memory — verify.
pub const STAINLESS: PipeMaterial = PipeMaterial {
    youngs_modulus_pa: 193e9,
    poisson: 0.29,
    yield_strength_pa: 206.8e6,
    thermoplastic: false,
};

/// PVC well casing at 23 °C (73 °F): E = 2.758 GPa (400,000 psi), ν = 0.38, strength 48.3 MPa
/// (7,000 psi, the minimum tensile strength of PVC cell class 12454, ASTM D1784). From
/// memory — verify against the manufacturer.
pub const PVC: PipeMaterial = PipeMaterial {
    youngs_modulus_pa: PVC_YOUNGS_MODULUS_PA,
    poisson: PVC_POISSON_RATIO,
    yield_strength_pa: 48.26e6,
    thermoplastic: true,
};

/// The names of the built-in pipe materials (`well.material`), in the order listed to users.
pub const MATERIAL_NAMES: [&str; 3] = ["pvc", "steel", "stainless"];

/// The built-in pipe material of a lower-case name of [`MATERIAL_NAMES`].
pub fn builtin_material(name: &str) -> Option<PipeMaterial> {
    match name {
        "pvc" => Some(PVC),
        "steel" => Some(STEEL),
        "stainless" => Some(STAINLESS),
        _ => None,
    }
}

/// Temperatures \[°C\] (73, 80, 90, …, 140 °F) and factors of the usual PVC temperature
/// derating table for pressure and strength (manufacturers' and plastics-pipe literature;
/// from memory — verify). Below 23 °C the factor is 1.
const PVC_DERATING: [(f64, f64); 8] = [
    (22.78, 1.00),
    (26.67, 0.88),
    (32.22, 0.75),
    (37.78, 0.62),
    (43.33, 0.50),
    (48.89, 0.40),
    (54.44, 0.30),
    (60.00, 0.22),
];

/// Factor on PVC's modulus and strength at a pipe temperature \[°C\], linear between the
/// rows of the derating table, 1 below 23 °C; above 60 °C PVC casing is out of its range and
/// the last factor is held (a warning is the caller's).
pub fn pvc_temperature_factor(temp_c: f64) -> f64 {
    let t = &PVC_DERATING;
    if temp_c <= t[0].0 {
        return 1.0;
    }
    for w in t.windows(2) {
        if temp_c <= w[1].0 {
            let f = (temp_c - w[0].0) / (w[1].0 - w[0].0);
            return w[0].1 + f * (w[1].1 - w[0].1);
        }
    }
    t[t.len() - 1].1
}

/// Which limit governs a computed collapse pressure.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CollapseLimits {
    /// Elastic (thin-ring buckling) pressure \[Pa\].
    pub elastic_pa: f64,
    /// First-yield pressure \[Pa\].
    pub yield_pa: f64,
    /// Temperature factor applied to both (1 for metals).
    pub temperature_factor: f64,
}

impl CollapseLimits {
    /// The lower of the two limits \[Pa\].
    pub fn governing_pa(&self) -> f64 {
        self.elastic_pa.min(self.yield_pa)
    }
}

/// Collapse pressure of round, unslotted pipe \[Pa\]: the lower of the elastic
/// ([`thin_ring_collapse_pa`]) and the yield ([`yield_collapse_pa`]) limit, both scaled for
/// a thermoplastic by [`pvc_temperature_factor`] at the pipe temperature. The transition
/// region where the two interact (plastic collapse) is lower than both in practice for
/// intermediate DR; the manufacturer's rating governs.
pub fn collapse_pressure_pa(m: &PipeMaterial, dimension_ratio: f64, temp_c: f64) -> CollapseLimits {
    let factor = if m.thermoplastic {
        pvc_temperature_factor(temp_c)
    } else {
        1.0
    };
    CollapseLimits {
        elastic_pa: factor * thin_ring_collapse_pa(m.youngs_modulus_pa, m.poisson, dimension_ratio),
        yield_pa: factor * yield_collapse_pa(m.yield_strength_pa, dimension_ratio),
        temperature_factor: factor,
    }
}

/// Collapse check of one load case: allowable pressure against the peak differential.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CollapseMargin {
    /// Allowable differential pressure, rating / safety factor \[Pa\].
    pub allowable_pa: f64,
    /// Allowable over peak differential [-]; above 1 the peak is below the allowable.
    pub ratio: f64,
    /// `true` when `ratio >= 1`. Not a statement that the screen is safe: see [`CAUTION`].
    pub ok: bool,
}

/// Compare the peak inward differential pressure with a rating divided by a safety factor.
///
/// ```text
/// allowable = P_rated / SF
/// ratio     = allowable / |Δp_peak|      (∞ when Δp_peak = 0)
/// ok        = ratio ≥ 1
/// ```
///
/// `rated_or_computed_pa` is the manufacturer's collapse rating, or a computed value such as
/// [`thin_ring_collapse_pa`] already derated for slots and temperature by the caller.
/// `peak_differential_pa` is the largest |h_outside − h_inside| ρ g across the screen during
/// the run. Use [`DEFAULT_COLLAPSE_SAFETY_FACTOR`] when no other is given.
pub fn collapse_margin(
    rated_or_computed_pa: f64,
    peak_differential_pa: f64,
    safety_factor: f64,
) -> CollapseMargin {
    let allowable_pa = rated_or_computed_pa / safety_factor;
    let ratio = allowable_pa / peak_differential_pa.abs();
    CollapseMargin {
        allowable_pa,
        ratio,
        ok: ratio >= 1.0,
    }
}

/// Void ratio e = n / (1 − n) [-] from porosity n [-].
pub fn void_ratio(porosity: f64) -> f64 {
    porosity / (1.0 - porosity)
}

/// Terzaghi's critical (heave) gradient [-].
///
/// ```text
/// i_c = (Gs − 1) / (1 + e) = (Gs − 1)(1 − n)
/// Gs: grain specific gravity [-], n: porosity [-], e: void ratio [-]
/// ```
///
/// Terzaghi 1943, "Theoretical Soil Mechanics"; Terzaghi & Peck 1948. The criterion is for
/// upward seepage against gravity; for horizontal radial flow at the borehole wall the
/// ratio i/i_c is only an indicator of grain mobilisation. Quoted safety factors are 1.5
/// to 4 (from memory — verify).
pub fn terzaghi_critical_gradient(gs: f64, porosity: f64) -> f64 {
    (gs - 1.0) * (1.0 - porosity)
}

/// Filter retention ratio D15(pack)/D85(formation) [-]; compare with
/// [`RETENTION_RATIO_MAX`].
pub fn retention_ratio(d15_pack_m: f64, d85_formation_m: f64) -> f64 {
    d15_pack_m / d85_formation_m
}

/// Filter permeability ratio D15(pack)/D15(formation) [-]; compare with
/// [`PERMEABILITY_RATIO_MIN`].
pub fn permeability_ratio(d15_pack_m: f64, d15_formation_m: f64) -> f64 {
    d15_pack_m / d15_formation_m
}

/// Pack-to-aquifer ratio D50(pack)/D50(formation) [-]; compare with
/// [`PACK_AQUIFER_RATIO_TYPICAL_MIN`]–[`PACK_AQUIFER_RATIO_TYPICAL_MAX`] (up to
/// [`PACK_AQUIFER_RATIO_COARSE_MAX`] for coarse or less uniform formations).
pub fn pack_aquifer_ratio(d50_pack_m: f64, d50_formation_m: f64) -> f64 {
    d50_pack_m / d50_formation_m
}

/// Mean velocity through the screen openings [m/s], signed like the flow.
///
/// ```text
/// v_slot = Q / (2π r_s L A_o)
/// Q: flow through the screen [m³/s], r_s: screen radius [m], L: screen length [m],
/// A_o: open-area fraction [-]
/// ```
///
/// Pack grains block part of the open area; designers often take about half the nominal
/// open area as effective (common practice, no source). Compare |v_slot| with
/// [`ENTRANCE_VELOCITY_RULE_M_S`].
pub fn slot_velocity_m_s(
    q_m3_s: f64,
    screen_radius_m: f64,
    screen_length_m: f64,
    open_area: f64,
) -> f64 {
    q_m3_s / (2.0 * std::f64::consts::PI * screen_radius_m * screen_length_m * open_area)
}

/// Screen entrance loss treated as an orifice \[m\], signed like the flow.
///
/// ```text
/// Δh_screen = sign(Q) (v_slot / Cd)² / (2 g)
/// Cd: discharge coefficient [-], g = 9.80665 m/s²
/// ```
///
/// The orifice equation of fluid mechanics, applied to the whole screen: an engineering
/// idealisation. Typical Cd is about 0.6 for sharp-edged slots and 0.8–0.9 for rounded or
/// V-shaped wire-wrap slots (from memory — verify).
pub fn orifice_screen_loss_m(
    q_m3_s: f64,
    screen_radius_m: f64,
    screen_length_m: f64,
    open_area: f64,
    discharge_coefficient: f64,
) -> f64 {
    let v = slot_velocity_m_s(q_m3_s, screen_radius_m, screen_length_m, open_area);
    let v_cd = v / discharge_coefficient;
    v_cd * v_cd.abs() / (2.0 * GRAVITY_M_S2)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::water::Water;

    /// Pascal per psi: 0.45359237 kg × 9.80665 m/s² / (0.0254 m)², exact by definition
    /// (international pound and inch, 1959).
    const PA_PER_PSI: f64 = 0.453_592_37 * 9.806_65 / (0.0254 * 0.0254);

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs()
    }

    #[test]
    fn thin_ring_collapse_pa_works() {
        // Timoshenko & Gere ring formula, E = 2.758e9 Pa, ν = 0.38; values computed with
        // numpy (docs/physics.md §9a). Printed to 3 decimals: half a unit = 5e-4 in kPa, psi
        // and m of water (water at 20 °C as printed in docs/physics.md §5.3).
        let water_20c = Water {
            density_kg_m3: 998.207_150,
            viscosity_pa_s: 1.001_596_1e-3,
        };
        let rows = [
            (13.5, 3_300.832, 478.745, 337.196),
            (17.0, 1_573.959, 228.284, 160.787),
            (21.0, 805.867, 116.881, 82.323),
            (26.0, 412.604, 59.843, 42.149),
            (32.5, 206.263, 29.916, 21.071),
        ];
        for (dr, kpa, psi, m_water) in rows {
            let pc = thin_ring_collapse_pa(PVC_YOUNGS_MODULUS_PA, PVC_POISSON_RATIO, dr);
            assert!((pc / 1e3 - kpa).abs() <= 5e-4, "DR {dr}: {pc}");
            assert!((pc / PA_PER_PSI - psi).abs() <= 5e-4, "DR {dr}: {pc}");
            let head = pc / (water_20c.density_kg_m3 * GRAVITY_M_S2);
            assert!((head - m_water).abs() <= 5e-4, "DR {dr}: {head}");
        }
    }

    #[test]
    fn thin_ring_collapse_pa_scales_with_modulus() {
        // With E = 2.41 GPa the values scale by 0.8738 (4 decimals) and DR 21 gives
        // 704.184 kPa (computed with numpy, docs/physics.md §9a).
        let low = thin_ring_collapse_pa(2.41e9, PVC_POISSON_RATIO, 21.0);
        let base = thin_ring_collapse_pa(PVC_YOUNGS_MODULUS_PA, PVC_POISSON_RATIO, 21.0);
        assert!((low / base - 0.8738).abs() <= 5e-5);
        assert!((low / 1e3 - 704.184).abs() <= 5e-4);
    }

    #[test]
    fn pvc_temperature_factor_follows_its_table() {
        // The PVC derating table (73–140 °F; from memory — verify): its nodes, linear between
        // them (plain arithmetic: halfway from 0.75 to 0.62 is 0.685), 1 below 73 °F and the
        // last factor held above 140 °F.
        assert_eq!(pvc_temperature_factor(10.0), 1.0);
        assert_eq!(pvc_temperature_factor(22.78), 1.0);
        assert!((pvc_temperature_factor(32.22) - 0.75).abs() < 1e-12);
        assert!((pvc_temperature_factor(0.5 * (32.22 + 37.78)) - 0.685).abs() < 1e-12);
        assert_eq!(pvc_temperature_factor(70.0), 0.22);
        // A thermoplastic's two limits both scale; a metal's do not.
        let warm = collapse_pressure_pa(&PVC, 21.0, 32.22);
        let cold = collapse_pressure_pa(&PVC, 21.0, 15.0);
        assert!((warm.elastic_pa / cold.elastic_pa - 0.75).abs() < 1e-12);
        assert!((warm.yield_pa / cold.yield_pa - 0.75).abs() < 1e-12);
        assert_eq!(
            collapse_pressure_pa(&STEEL, 20.0, 50.0).temperature_factor,
            1.0
        );
    }

    #[test]
    fn collapse_margin_works() {
        // DR 21 rating 805.867 kPa (docs/physics.md §9a) with SF 2 (common practice, no source)
        // gives 402.9335 kPa allowable; ratios by plain arithmetic.
        let rating = 805_867.0;
        let m = collapse_margin(rating, 400e3, DEFAULT_COLLAPSE_SAFETY_FACTOR);
        assert!(rel(m.allowable_pa, 402_933.5) < 1e-15);
        assert!(rel(m.ratio, 402_933.5 / 400e3) < 1e-15);
        assert!(m.ok);
        let m = collapse_margin(rating, -410e3, DEFAULT_COLLAPSE_SAFETY_FACTOR);
        assert!(rel(m.ratio, 402_933.5 / 410e3) < 1e-15);
        assert!(!m.ok);
        let idle = collapse_margin(rating, 0.0, 1.5);
        assert!(idle.ratio.is_infinite() && idle.ok);
    }

    #[test]
    fn terzaghi_critical_gradient_works() {
        // Terzaghi 1943 critical gradient; (Gs, n, e, i_c) computed (docs/physics.md §9b),
        // printed to 6 decimals: half a unit = 5e-7.
        let rows = [
            (2.65, 0.35, 0.538_462, 1.072_500),
            (2.65, 0.40, 0.666_667, 0.990_000),
            (2.65, 0.45, 0.818_182, 0.907_500),
            (2.70, 0.40, 0.666_667, 1.020_000),
        ];
        for (gs, n, e, i_c) in rows {
            assert!((void_ratio(n) - e).abs() <= 5e-7, "n = {n}");
            let got = terzaghi_critical_gradient(gs, n);
            assert!((got - i_c).abs() <= 5e-7, "Gs = {gs}, n = {n}");
            // Void-ratio form (Gs − 1)/(1 + e) of the same formula.
            assert!((got - (gs - 1.0) / (1.0 + void_ratio(n))).abs() < 1e-15);
        }
    }

    #[test]
    fn filter_ratios_work() {
        // Ratios by plain arithmetic on illustrative sizes; limits from docs/physics.md §9c.
        assert!(rel(retention_ratio(1.2e-3, 0.3e-3), 4.0) < 1e-15);
        assert!(retention_ratio(1.2e-3, 0.3e-3) <= RETENTION_RATIO_MAX);
        assert!(rel(permeability_ratio(1.0e-3, 0.2e-3), 5.0) < 1e-15);
        assert!(permeability_ratio(1.0e-3, 0.2e-3) >= PERMEABILITY_RATIO_MIN);
        let pack_aquifer = pack_aquifer_ratio(1.7e-3, 0.34e-3);
        assert!(rel(pack_aquifer, 5.0) < 1e-15);
        let typical = PACK_AQUIFER_RATIO_TYPICAL_MIN..=PACK_AQUIFER_RATIO_TYPICAL_MAX;
        assert!(typical.contains(&pack_aquifer));
        assert!(!typical.contains(&pack_aquifer_ratio(2.4e-3, 0.3e-3)));
    }

    #[test]
    fn screen_entrance_works() {
        // Orifice equation; r_s = 0.1 m, L = 10 m; rows (Q, A_o, Cd, v_slot, Δh) computed
        // with numpy (docs/physics.md §3). 7 printed digits: 1e-6 relative.
        let rows = [
            (0.01, 0.10, 0.6, 1.591_549e-2, 3.587_460e-5),
            (0.05, 0.10, 0.6, 7.957_747e-2, 8.968_650e-4),
            (0.05, 0.03, 0.6, 2.652_582e-1, 9.965_167e-3),
            (0.05, 0.30, 0.8, 2.652_582e-2, 5.605_407e-5),
        ];
        for (q, a_o, cd, v, dh) in rows {
            assert!(
                rel(slot_velocity_m_s(q, 0.1, 10.0, a_o), v) < 1e-6,
                "Q={q}, A_o={a_o}"
            );
            assert!(rel(orifice_screen_loss_m(q, 0.1, 10.0, a_o, cd), dh) < 1e-6);
            // The loss follows the flow direction (docs/physics.md §3).
            assert_eq!(
                orifice_screen_loss_m(-q, 0.1, 10.0, a_o, cd),
                -orifice_screen_loss_m(q, 0.1, 10.0, a_o, cd)
            );
        }
        // Q = 1.884956e-2 m³/s reaches 0.03 m/s at A_o = 0.10 (computed, docs/physics.md §3).
        assert!(rel(slot_velocity_m_s(1.884_956e-2, 0.1, 10.0, 0.10), 0.03) < 1e-6);
    }

    #[test]
    fn entrance_velocity_rule_is_a_tenth_of_a_foot_per_second() {
        // 0.1 ft/s with the international foot 0.3048 m (exact by definition, 1959).
        assert!(rel(ENTRANCE_VELOCITY_RULE_M_S, 0.1 * 0.3048) < 1e-15);
    }

    #[test]
    fn caution_defers_to_ratings_codes_and_licensed_practice() {
        // Project rule: cautions must defer to manufacturer ratings, local codes and
        // licensed practice.
        for needle in ["manufacturer", "code", "licensed", "collapse"] {
            assert!(CAUTION.contains(needle), "missing {needle}");
        }
    }
}
