//! The vapour bound under a sealed tool (surge block, swab cups on the upstroke).
//!
//! Water cannot be pulled below its vapour pressure. Under a tool at depth d below the
//! static level, with the atmosphere p_atm on the static level, the absolute pressure just
//! below the tool is `p_atm + ρ g (d + H)` for an in-well head H (relative to static), so
//!
//! ```text
//! H ≥ H_min = −(p_atm − p_v)/(ρ g) − d
//! ```
//!
//! When the tool pulls harder than the formation, the leakage and the screen can supply,
//! the column parts: a vapour gap of volume V opens under the tool, the head stays at the
//! bound while V > 0, and the tool's displacement goes into the gap instead of pulling on
//! the water. On the return stroke the tool first closes the gap (still at the bound) and
//! only then pushes water again. The gap is a state carried from step to step.
//!
//! In the well row the gap appears as a volume source `Q_v` (m³/s, added to the well node):
//!
//! ```text
//! H_b = H_min + δ,  k = 2 Q_max / δ                          (δ = 1 mm, Q_max: the tool's
//!                                                              largest possible pull)
//! no gap (V = 0):  Q_v = k max(H_b − H, 0)                    vapour forms only at the bound
//! gap (V > 0):     Q_v = max(k (H_b − H), −V/Δt)              the gap may also close, but
//!                                                              not beyond its volume in a step
//! V ← V + Δt Q_v(H_θ)
//! ```
//!
//! The steep linear law holds H within δ of the bound: at the largest pull Q_max the head
//! is H_b − Q_max/k = H_min + δ/2, so it never goes below H_min. The law falls with H, so
//! the well row stays strictly increasing and its bracketed root is unique. The cavitation
//! itself (bubble dynamics, degassing of dissolved air, which starts above the vapour
//! pressure) is not modelled; a real column parts at or before this bound.

use crate::water::{vapour_pressure_pa, GRAVITY_M_S2};

/// Height above the vapour bound at which vapour starts to form in the model, m (δ of
/// docs/devices.md §1; a numerical choice, assumption: small against any head of interest,
/// large against round-off).
pub const VAPOUR_MARGIN_M: f64 = 1e-3;

/// Net head of the atmosphere over the vapour pressure, (p_atm − p_v)/(ρ g), m: how far the
/// head under a tool at the static level can be pulled below static.
pub fn net_atmospheric_head_m(atmospheric_pa: f64, temp_c: f64, density_kg_m3: f64) -> f64 {
    (atmospheric_pa - vapour_pressure_pa(temp_c)) / (density_kg_m3 * GRAVITY_M_S2)
}

/// Vapour gap under a sealed tool, carried from step to step.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct VapourState {
    /// Volume of the vapour gap, m³ (0 while the column is whole).
    pub gap_m3: f64,
    /// Fastest closing rate allowed in the current step, −V/Δt, m³/s (≤ 0).
    pub min_rate_m3_s: f64,
}

/// Vapour source `Q_v` (m³/s, into the well node) at in-well head `h` for a tool whose bound
/// is `h_min` and whose largest pull is `q_max` (m³/s), and its derivative in h (m²/s).
pub fn vapour_flow(h: f64, h_min: f64, q_max: f64, state: VapourState) -> (f64, f64) {
    super::VapourAt::new(h_min, q_max, state).flow(h)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn vapour_flow_holds_the_head_between_the_bound_and_the_margin() {
        // At the largest pull the head is H_min + δ/2 (module doc, by construction). The
        // head difference carries the round-off of |H| ε over δ/2: about 5e-12 relative.
        let (h_min, q_max) = (-12.0, 0.02);
        let h = h_min + 0.5 * VAPOUR_MARGIN_M;
        let (q, dq) = vapour_flow(h, h_min, q_max, VapourState::default());
        assert!((q - q_max).abs() <= 1e-11 * q_max, "{q}");
        assert!(dq < 0.0);
        // Above the margin and without a gap, nothing forms.
        let (q, dq) = vapour_flow(h_min + 0.1, h_min, q_max, VapourState::default());
        assert_eq!((q, dq), (0.0, 0.0));
        // With a gap, the flow may turn negative (condensing) down to −V/Δt.
        let st = VapourState {
            gap_m3: 1e-3,
            min_rate_m3_s: -1e-3 / 0.01,
        };
        let (q, dq) = vapour_flow(h_min + 5.0, h_min, q_max, st);
        assert_eq!((q, dq), (-0.1, 0.0));
    }

    #[test]
    fn net_atmospheric_head_works() {
        // Standard atmosphere (ISO 2533) less the IAPWS-IF97 vapour pressure at 14 °C,
        // over ρ g with ρ = 999.2473831909008 (iapws.IAPWS95 at 14 °C): 10.176886906 m,
        // from tests/data/devices.json (vapour_bound: h_min + depth). The Tanaka density
        // differs from IAPWS-95 by up to 1.1e-3 kg/m³: 2e-6 relative.
        let want = 13.176_886_906_340_036 - 3.0;
        let got = net_atmospheric_head_m(101_325.0, 14.0, crate::water::density_kg_m3(14.0));
        assert!((got / want - 1.0).abs() < 2e-6, "{got}");
    }
}
