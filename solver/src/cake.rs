//! The wall cake: its interface resistance, its skin and its erosion.
//!
//! Interface (docs/physics.md §2.1): a layer of thickness δ on the wall r_b, storage neglected.
//! A patchy cake covers a fraction c of the wall; the uncovered fraction conducts through a
//! layer of the same thickness as pack material. The interface conductance is the
//! area-weighted sum of the two paths:
//!
//! ```text
//! C_i = 2π r_b b (c K_c + (1−c) K_p) / δ        m²/s
//! R_i = 1 / C_i                                  s/m²
//! s_cake = 2π K_f b R_i = K_f δ / (r_b (c K_c + (1−c) K_p))      (c = 1: docs/physics.md §2.3)
//! ```
//! The model has no lateral (convergence) resistance toward the holes in the cake, so a
//! small uncovered fraction already short-circuits a tight cake; treat results for
//! coverage below 1 as a lower bound on the cake's effect.
//!
//! Erosion law (an assumption of this model, calibrate before use):
//! ```text
//! dδ/dt = −E · max(0, w τ − τ_c)       w = w_in for inward flow, w_out for outward flow
//! c     = c₀ (δ/δ₀)^m                  m = 0: coverage kept until the cake is gone;
//!                                      m = 1: patches detach in proportion to the thickness lost
//! ```
//! With m > 0 the first patches to open short-circuit a tight cake at once (see above).
//!
//! Closed form used by the verification (derived here): when the cake controls a
//! quasi-steady flow under a constant head H₀ with other resistance R₀, coverage 1 and
//! m = 0, then Q = H₀/(R₀ + aδ), a = 1/(2π r_b b K_c), τ = k_τ Q with
//! k_τ = ρ g R_h/(2π r_b b K_p), and with u = R₀ + aδ, B = w k_τ H₀:
//! ```text
//! t(δ) = (1/(aE)) [ (u − u₀)/τ_c + (B/τ_c²) ln((B − τ_c u)/(B − τ_c u₀)) ]    (τ_c > 0)
//! t(δ) = (u₀² − u²) / (2 a E B)                                          (τ_c = 0)
//! ```
//! with τ the pack-side shear proxy at the wall (Pa), τ_c the critical shear (Pa) and E the
//! erodibility (m/(s·Pa)). It is integrated explicitly once per time step.

use crate::model::{Cake, Model};
use std::f64::consts::PI;

/// Current state of the wall cake (it may erode during a run).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CakeState {
    /// Thickness δ_c, m.
    pub thickness_m: f64,
    /// Covered fraction of the borehole face, –.
    pub coverage: f64,
}

/// Interface resistance of the cake in state `st`, s/m².
pub fn interface_resistance(model: &Model, cake: &Cake, st: CakeState) -> f64 {
    let rb = model.borehole_radius_m();
    let b = model.well.screen_length_m;
    let k = st.coverage * cake.conductivity_m_s
        + (1.0 - st.coverage) * model.pack.medium.conductivity_m_s;
    st.thickness_m / (2.0 * PI * rb * b * k)
}

/// Skin of the cake in state `st`, referred to the formation conductivity.
pub fn skin(model: &Model, cake: &Cake, st: CakeState) -> f64 {
    2.0 * PI
        * model.formation.medium.conductivity_m_s
        * model.well.screen_length_m
        * interface_resistance(model, cake, st)
}

/// Thinning rate of the cake for shear `shear_pa` and face flux `flux_m_s` (sign gives the
/// direction), m/s (≥ 0).
pub fn erosion_rate(cake: &Cake, shear_pa: f64, flux_m_s: f64) -> f64 {
    match &cake.erosion {
        None => 0.0,
        Some(e) => {
            let w = if flux_m_s < 0.0 {
                e.inward_weight
            } else {
                e.outward_weight
            };
            e.erodibility_m_s_pa * (w * shear_pa - e.critical_shear_pa).max(0.0)
        }
    }
}

/// Advances the cake over `dt_s`; returns true when it changed.
pub fn erode(cake: &Cake, st: &mut CakeState, shear_pa: f64, flux_m_s: f64, dt_s: f64) -> bool {
    let rate = erosion_rate(cake, shear_pa, flux_m_s);
    if rate <= 0.0 || st.thickness_m <= 0.0 {
        return false;
    }
    st.thickness_m = (st.thickness_m - rate * dt_s).max(0.0);
    let m = cake.erosion.map_or(0.0, |e| e.coverage_exponent);
    st.coverage = if st.thickness_m > 0.0 {
        cake.coverage * (st.thickness_m / cake.thickness_m).powf(m)
    } else {
        0.0
    };
    true
}
