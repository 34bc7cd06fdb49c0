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
//! Lift-off of patches (the main mechanism under inward flow) is in
//! [`crate::damage::liftoff`]; the coverage combines both ([`coverage`]).
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
//! with τ the mean wall shear of the pore channels on the pack side of the wall (Pa; the
//! force balance of Kozeny's capillary picture, τ = ρ g |i| R_h, docs/physics.md §6.1), τ_c the critical shear (Pa) and E the
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
///
/// Without a lift-off law: the area-weighted parallel layer above. With one, the opened
/// patches are holes of radius a in the cake; the flow converges toward them from the
/// formation side and spreads from them into the pack, a constriction resistance per hole of
/// ψ(ε)/(4 K a) on each side (a disc on a half-space, ψ = 1 for an isolated hole; for holes
/// in a regular pattern ψ(ε) = (1 − ε)^1.5 with ε the hole radius over the radius of the
/// wall area each hole drains, ε = √(1 − c); Cooper, Mikic & Yovanovich 1969, from memory —
/// verify). With N = (1 − c) A/(π a²) holes on the wall area A = 2π r_b b:
/// ```text
/// G_cake = c A K_c / δ
/// R_open = δ/((1 − c) A K_p) + ψ π a (1/K_out + 1/K_p) / (4 (1 − c) A)
/// R_i    = 1 / (G_cake + 1/R_open)
/// ```
/// K_out is the conductivity just outside the wall as given (invaded zone, or formation).
/// For c → 0 this is δ/(A K_p), the parallel layer's limit; for c → 1 the cake alone. A
/// small opened fraction therefore no longer short-circuits a tight cake at once.
pub fn interface_resistance(model: &Model, cake: &Cake, st: CakeState) -> f64 {
    let rb = model.borehole_radius_m();
    let b = model.well.screen_length_m;
    let kp = model.pack.medium.conductivity_m_s;
    let Some(l) = cake.lift_off else {
        let k = st.coverage * cake.conductivity_m_s + (1.0 - st.coverage) * kp;
        return st.thickness_m / (2.0 * PI * rb * b * k);
    };
    let area = 2.0 * PI * rb * b;
    let g_cake = st.coverage * area * cake.conductivity_m_s / st.thickness_m;
    let open = 1.0 - st.coverage;
    if open <= 0.0 {
        return 1.0 / g_cake;
    }
    let k_out = model
        .invaded
        .as_ref()
        .map_or(model.formation.medium.conductivity_m_s, |z| {
            z.medium.conductivity_m_s
        });
    let psi = (1.0 - open.sqrt()).powf(1.5);
    let r_open = st.thickness_m / (open * area * kp)
        + psi * PI * l.patch_radius_m * (1.0 / k_out + 1.0 / kp) / (4.0 * open * area);
    1.0 / (g_cake + 1.0 / r_open)
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

/// Thins the cake over `dt_s` by erosion; returns true when it changed. The coverage is
/// set by [`coverage`].
pub fn erode(cake: &Cake, st: &mut CakeState, shear_pa: f64, flux_m_s: f64, dt_s: f64) -> bool {
    let rate = erosion_rate(cake, shear_pa, flux_m_s);
    if rate <= 0.0 || st.thickness_m <= 0.0 {
        return false;
    }
    st.thickness_m = (st.thickness_m - rate * dt_s).max(0.0);
    true
}

/// Covered fraction for thickness `thickness_m` after the inward pressure difference has
/// reached `lift_peak_pa`: c = c₀ (δ/δ₀)^m (1 − F(P_peak)) (erosion, docs/physics.md §13;
/// lift-off, §13a). Zero once the cake is gone.
pub fn coverage(cake: &Cake, thickness_m: f64, lift_peak_pa: f64) -> f64 {
    if thickness_m <= 0.0 {
        return 0.0;
    }
    let m = cake.erosion.map_or(0.0, |e| e.coverage_exponent);
    let thinning = if m == 0.0 {
        1.0
    } else {
        (thickness_m / cake.thickness_m).powf(m)
    };
    let intact = cake.lift_off.filter(|l| !l.frozen).map_or(1.0, |l| {
        1.0 - crate::damage::liftoff::failed_fraction(&l, lift_peak_pa)
    });
    cake.coverage * thinning * intact
}
