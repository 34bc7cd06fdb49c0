//! The screen, pack and casing checks of a run, computed from its summary: slot velocity,
//! grain Reynolds number, the wall gradient against Terzaghi's critical gradient, and the
//! collapse and burst loads with their margins (docs/physics.md §22, docs/devices.md §6).
//! The command line formats them and words the warnings; a library user gets the same
//! numbers from here.

use crate::grid::ZONE_COUNT;
use crate::model::Model;
use crate::run::RunSummary;
use crate::safety;
use crate::system::Discretization;
use crate::water::GRAVITY_M_S2;

/// Checks of one run (SI).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RunChecks {
    /// Largest slot velocity |Q_screen| / (2π r_s b A_o), m/s (compare with
    /// [`safety::ENTRANCE_VELOCITY_RULE_M_S`], a rule of thumb).
    pub peak_slot_velocity_m_s: f64,
    /// Largest grain Reynolds number ρ q d50 / μ at the wall (pack d50, larger of the peak
    /// fluxes), when the pack's d50 is known.
    pub peak_grain_reynolds: Option<f64>,
    /// Largest gradient on the formation side of the wall over Terzaghi's critical gradient
    /// (grains of the invaded zone, or the formation), when a gradient was seen.
    pub piping_ratio: Option<f64>,
    /// Largest collapse load, Pa: the larger of the differential across the screen (pack
    /// side over inside) and the in-well drawdown below static (which loads blank casing
    /// against the formation's undisturbed pore pressure), times ρ g.
    pub peak_collapse_pressure_pa: f64,
    /// Largest differential pushing the screen inward, Pa.
    pub peak_screen_differential_pa: f64,
    /// Largest in-well drawdown below the static level, m.
    pub peak_in_well_drawdown_m: f64,
    /// Load on the blank casing: the in-well drawdown times ρ g, Pa.
    pub casing_load_pa: f64,
    /// Largest differential pushing the screen outward, Pa.
    pub peak_burst_pressure_pa: f64,
}

/// The checks of a run of `model` that ended with `s`; `peak_face_gradient` is the largest
/// |gradient| on the formation side of the wall seen during the run (the run summary does
/// not keep it), `specific_gravity` that of the formation's grains.
pub fn run_checks(
    model: &Model,
    s: &RunSummary,
    peak_face_gradient: f64,
    specific_gravity: f64,
) -> RunChecks {
    let rho_g = model.fluid.density_kg_m3 * GRAVITY_M_S2;
    let slot = slot_velocity_m_s(model, s.peak_screen_flow_m3_s);
    let peak_q = s.peak_outward_flux_m_s.max(s.peak_inward_flux_m_s);
    let reynolds = grain_reynolds(model, peak_q);
    let outer = model
        .invaded
        .as_ref()
        .map_or(model.formation.medium, |z| z.medium);
    let piping = (peak_face_gradient > 0.0).then(|| {
        peak_face_gradient / safety::terzaghi_critical_gradient(specific_gravity, outer.porosity)
    });
    let drawdown_m = (-s.well_head_range_m.0).max(0.0);
    RunChecks {
        peak_slot_velocity_m_s: slot,
        peak_grain_reynolds: reynolds,
        piping_ratio: piping,
        peak_collapse_pressure_pa: s.peak_collapse_head_m.max(drawdown_m) * rho_g,
        peak_screen_differential_pa: s.peak_collapse_head_m * rho_g,
        peak_in_well_drawdown_m: drawdown_m,
        casing_load_pa: drawdown_m * rho_g,
        peak_burst_pressure_pa: s.peak_burst_head_m * rho_g,
    }
}

/// Slot velocity |Q| / (2π r_s b A_o) of the screen flow Q, m/s.
pub fn slot_velocity_m_s(model: &Model, screen_flow_m3_s: f64) -> f64 {
    let w = &model.well;
    screen_flow_m3_s.abs()
        / (2.0 * std::f64::consts::PI * w.screen_radius_m * w.screen_length_m * w.open_area)
}

/// Grain Reynolds number ρ |q| d50 / μ of the wall flux q (pack d50), when d50 is known.
pub fn grain_reynolds(model: &Model, flux_m_s: f64) -> Option<f64> {
    model
        .pack
        .medium
        .grain_diameter_m
        .map(|d| model.fluid.density_kg_m3 * flux_m_s.abs() * d / model.fluid.viscosity_pa_s)
}

/// Collapse margin rating / (safety factor × load); none without a rating or a load.
pub fn collapse_margin(rating_pa: Option<f64>, safety_factor: f64, load_pa: f64) -> Option<f64> {
    rating_pa
        .filter(|_| load_pa > 0.0)
        .map(|r| r / (safety_factor * load_pa))
}

/// Resistance of each zone to steady radial flow at vanishing flow, s/m² (index by
/// [`crate::grid::Zone`]): the linear resistances of the faces' segments, summed by zone.
pub fn zone_resistances(d: &Discretization) -> [f64; ZONE_COUNT] {
    let mut r = [0.0; ZONE_COUNT];
    let used = if d.outer_open {
        d.faces.len()
    } else {
        d.faces.len() - 1
    };
    for f in &d.faces[..used] {
        for s in f.segments() {
            r[s.zone as usize] += s.r_lin;
        }
    }
    r
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drive::Drive;
    use crate::fixtures;
    use crate::grid::Zone;
    use crate::model::*;

    /// Thiem's ring resistance ln(r₂/r₁)/(2π b K) (docs/physics.md §8a): the zone sums of
    /// a Darcy pack and formation match it to round-off.
    #[test]
    fn zone_resistances_are_the_thiem_ring_resistances() {
        let mut m = fixtures::demo_well();
        m.well.screen_length_m = 10.0;
        m.well.open_area = 0.1;
        m.formation.medium = Medium::darcy(1e-4, 1e-5);
        m.formation.outer_radius_m = Some(200.0);
        m.drive = Drive::ConstantRate {
            pumping_rate_m3_s: 0.01,
        };
        m.duration_s = 10.0;
        let r = zone_resistances(&Discretization::new(&m, None));
        let ring = |a: f64, b: f64, k: f64| (b / a).ln() / (2.0 * std::f64::consts::PI * 10.0 * k);
        let rel = |a: f64, b: f64| (a - b).abs() / b;
        assert!(rel(r[Zone::Pack as usize], ring(0.1, 0.2, 5e-3)) < 1e-12);
        assert!(rel(r[Zone::Formation as usize], ring(0.2, 200.0, 1e-4)) < 1e-12);
        assert_eq!(r[Zone::Cake as usize], 0.0);
    }

    #[test]
    fn a_margin_needs_a_rating_and_a_load() {
        assert_eq!(collapse_margin(Some(200e3), 2.0, 50e3), Some(2.0));
        assert_eq!(collapse_margin(None, 2.0, 50e3), None);
        assert_eq!(collapse_margin(Some(200e3), 2.0, 0.0), None);
    }
}
