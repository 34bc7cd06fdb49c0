//! Sand production and pack stability indicators (docs/physics.md §9c, §9e).
//!
//! Three criteria, each reported only where it is exceeded:
//!
//! 1. **Pack against formation.** D50(pack)/D50(formation) within 4–6 (up to 9 for coarse or
//!    less uniform formations) is the usual water-well pack design (Driscoll 1986,
//!    *Groundwater and Wells*, from memory — verify); above the upper limit formation sand can
//!    pass the pack. Where both D15(pack) and D85(formation) are known, Terzaghi's retention
//!    rule D15(pack)/D85(formation) ≤ 4 (Terzaghi & Peck 1948; some use 5) is used as well.
//! 2. **Slot against pack.** A slot that retains about 90 % of the pack is the common design:
//!    slot width ≤ D10 of the pack (Driscoll 1986, from memory — verify). Without D10, a slot
//!    wider than D50 passes over half the pack.
//! 3. **Moving formation grains at the wall.** The interstitial speed at which water carries a
//!    formation grain is taken as the grain's settling velocity (Ferguson & Church 2004,
//!    J. Sediment. Res. 74(6), 933–937, natural sand with sieve diameters: C₁ = 18, C₂ = 1.0;
//!    from memory — verify):
//!
//! ```text
//! w = R g d² / (C₁ ν + sqrt(0.75 C₂ R g d³)),      R = (ρ_s − ρ)/ρ
//! ```
//! Its small-grain limit is Stokes' law w = R g d²/(18 ν). At the wall the inward
//! interstitial speed above w moves formation grains toward the pack; that is the
//! development the driller wants where the pack retains them (criterion 1 met), and sand
//! production where it does not. It is therefore a warning only together with 1.

use crate::safety::{
    PACK_AQUIFER_RATIO_COARSE_MAX, PACK_AQUIFER_RATIO_TYPICAL_MAX, RETENTION_RATIO_MAX,
};
use crate::water::GRAVITY_M_S2;

/// Ferguson & Church (2004) constant C₁ for natural grains with sieve diameters (from
/// memory — verify).
pub const SETTLING_C1: f64 = 18.0;
/// Ferguson & Church (2004) constant C₂ for natural grains with sieve diameters (from
/// memory — verify; 0.4 for smooth spheres, 1.2 for very angular grains).
pub const SETTLING_C2: f64 = 1.0;

/// Settling velocity of a grain of sieve diameter `d_m` and solid density `rho_s` in water of
/// density `rho` and dynamic viscosity `mu`, m/s (Ferguson & Church 2004).
pub fn settling_velocity_m_s(d_m: f64, rho_s: f64, rho: f64, mu: f64) -> f64 {
    let r = (rho_s - rho) / rho;
    let nu = mu / rho;
    let g = GRAVITY_M_S2;
    r * g * d_m * d_m / (SETTLING_C1 * nu + (0.75 * SETTLING_C2 * r * g * d_m.powi(3)).sqrt())
}

/// Grain sizes and slot known for a well (each may be missing), m.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Gradation {
    /// Pack D10.
    pub pack_d10: Option<f64>,
    /// Pack D15.
    pub pack_d15: Option<f64>,
    /// Pack D50.
    pub pack_d50: Option<f64>,
    /// Formation D50.
    pub formation_d50: Option<f64>,
    /// Formation D85.
    pub formation_d85: Option<f64>,
    /// Screen slot width.
    pub slot_width: Option<f64>,
}

/// The criteria evaluated for a gradation, with the verdict of each.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Retention {
    /// D50(pack)/D50(formation).
    pub pack_ratio: Option<f64>,
    /// D15(pack)/D85(formation).
    pub retention_ratio: Option<f64>,
    /// Slot width over the pack size it should retain (D10, else D50).
    pub slot_ratio: Option<f64>,
    /// Whether the slot ratio is against D10 (true) or D50 (false).
    pub slot_against_d10: bool,
    /// The pack may let formation sand through (a criterion exceeded).
    pub formation_unretained: bool,
    /// The slot may let pack through.
    pub pack_unretained: bool,
}

/// Evaluates the retention criteria where the sizes are known.
pub fn retention(g: &Gradation) -> Retention {
    let pack_ratio = g
        .pack_d50
        .zip(g.formation_d50)
        .map(|(p, f)| crate::safety::pack_aquifer_ratio(p, f));
    let retention_ratio = g
        .pack_d15
        .zip(g.formation_d85)
        .map(|(p, f)| crate::safety::retention_ratio(p, f));
    let (slot_ratio, slot_against_d10) = match (g.slot_width, g.pack_d10, g.pack_d50) {
        (Some(s), Some(d10), _) => (Some(s / d10), true),
        (Some(s), None, Some(d50)) => (Some(s / d50), false),
        _ => (None, false),
    };
    // Without D15/D85 the pack ratio's coarse limit decides; with them Terzaghi's rule.
    let formation_unretained = match retention_ratio {
        Some(r) => r > RETENTION_RATIO_MAX,
        None => pack_ratio.is_some_and(|r| r > PACK_AQUIFER_RATIO_COARSE_MAX),
    };
    Retention {
        pack_ratio,
        retention_ratio,
        slot_ratio,
        slot_against_d10,
        formation_unretained,
        pack_unretained: slot_ratio.is_some_and(|r| r > 1.0),
    }
}

/// The sand indicators of a run: the retention criteria of its gradation and the speed of
/// formation grains at the wall against their settling velocity (criteria 1–3 above).
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Indicators {
    /// Retention criteria.
    pub retention: Retention,
    /// Settling velocity of a formation D50 grain, the critical interstitial velocity at the
    /// wall, m/s; none without the formation D50.
    pub critical_velocity_m_s: Option<f64>,
    /// Largest inward interstitial velocity on the formation side of the wall, m/s.
    pub wall_velocity_m_s: f64,
}

impl Indicators {
    /// Whether the flow at the wall is fast enough to carry formation D50 grains.
    pub fn grains_move(&self) -> bool {
        self.critical_velocity_m_s
            .is_some_and(|w| self.wall_velocity_m_s > w)
    }
}

/// The indicators of a run of `model` whose largest inward Darcy flux at the wall was
/// `peak_inward_flux_m_s`, for grains of specific gravity `specific_gravity`: the
/// interstitial velocity uses the porosity of the invaded zone, or of the formation.
pub fn indicators(
    model: &crate::model::Model,
    g: &Gradation,
    specific_gravity: f64,
    peak_inward_flux_m_s: f64,
) -> Indicators {
    let outer = model
        .invaded
        .as_ref()
        .map_or(model.formation.medium, |z| z.medium);
    let rho = model.fluid.density_kg_m3;
    let rho_s = specific_gravity * rho;
    Indicators {
        retention: retention(g),
        critical_velocity_m_s: g
            .formation_d50
            .map(|d| settling_velocity_m_s(d, rho_s, rho, model.fluid.viscosity_pa_s)),
        wall_velocity_m_s: peak_inward_flux_m_s / outer.porosity,
    }
}

/// True when the pack ratio is above the usual design range but within the coarse
/// formation allowance (a note, not a warning).
pub fn pack_ratio_above_typical(r: &Retention) -> bool {
    r.pack_ratio
        .is_some_and(|p| p > PACK_AQUIFER_RATIO_TYPICAL_MAX && p <= PACK_AQUIFER_RATIO_COARSE_MAX)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn settling_velocity_tends_to_stokes_for_small_grains() {
        // Stokes (1851): w = R g d²/(18 ν); the Ferguson–Church form differs by the
        // factor 1/(1 + sqrt(0.75 C₂ R g d³)/(18 ν)), about 5.5e-4 short of 1 for a 2 µm quartz grain.
        let (rho, mu, rs) = (998.2, 1.0016e-3, 2650.0);
        let d = 2e-6;
        let stokes = (rs - rho) / rho * GRAVITY_M_S2 * d * d / (18.0 * mu / rho);
        let w = settling_velocity_m_s(d, rs, rho, mu);
        assert!(w < stokes && (stokes - w) / stokes < 1e-3);
    }

    #[test]
    fn criteria_fire_only_where_exceeded() {
        // Limits: D50 ratio 4–6 (9 coarse), Driscoll 1986; D15/D85 ≤ 4, Terzaghi & Peck 1948;
        // slot ≤ pack D10 (90 % retained), Driscoll 1986 (all from memory — verify).
        let ok = retention(&Gradation {
            pack_d10: Some(1.3e-3),
            pack_d50: Some(1.7e-3),
            formation_d50: Some(0.34e-3),
            slot_width: Some(1.0e-3),
            ..Gradation::default()
        });
        assert!(!ok.formation_unretained && !ok.pack_unretained);
        let coarse = retention(&Gradation {
            pack_d50: Some(2.0e-3),
            formation_d50: Some(0.2e-3),
            ..Gradation::default()
        });
        assert!(coarse.formation_unretained, "ratio 10 > 9");
        let terzaghi = retention(&Gradation {
            pack_d15: Some(1.2e-3),
            pack_d50: Some(2.0e-3),
            formation_d50: Some(0.2e-3),
            formation_d85: Some(0.3e-3),
            ..Gradation::default()
        });
        assert!(
            !terzaghi.formation_unretained,
            "D15/D85 = 4 meets Terzaghi's rule"
        );
        let wide_slot = retention(&Gradation {
            pack_d50: Some(0.6e-3),
            slot_width: Some(0.75e-3),
            ..Gradation::default()
        });
        assert!(wide_slot.pack_unretained && !wide_slot.slot_against_d10);
    }
}
