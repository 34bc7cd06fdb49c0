//! The run checks of [`super::checks`] watched step by step: the moments a limit that
//! gives a warning at the end of the run is first crossed (docs/formats.md, "Events").
//! The formulas are those of [`super::checks::run_checks`], applied to each step's values
//! instead of the run's peaks, so a run whose peak crosses a limit has at least one event
//! of that kind.

use super::checks::{grain_reynolds, slot_velocity_m_s};
use crate::diagnostics::{Edge, EventKind, EventSet, StepValues};
use crate::model::Model;
use crate::safety::ENTRANCE_VELOCITY_RULE_M_S;
use crate::water::GRAVITY_M_S2;

/// The limits the run's warnings compare its peaks with.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Limits {
    /// Grain Reynolds number above which Darcy's law is doubtful.
    pub grain_reynolds: f64,
    /// Collapse rating of the screen, Pa, if known.
    pub screen_rating_pa: Option<f64>,
    /// Collapse rating of the blank casing, Pa, if known.
    pub casing_rating_pa: Option<f64>,
    /// Safety factor on the collapse ratings.
    pub safety_factor: f64,
}

/// Watches each step of a run against [`Limits`]; raises an event when a limit is crossed
/// upward (a limit held over many steps is one event).
#[derive(Debug, Clone)]
pub struct LimitWatch {
    model: Model,
    limits: Limits,
    slot: Edge,
    reynolds: Edge,
    collapse: Edge,
}

impl LimitWatch {
    /// A watch of runs of `model`.
    pub fn new(model: &Model, limits: Limits) -> Self {
        LimitWatch {
            model: model.clone(),
            limits,
            slot: Edge::default(),
            reynolds: Edge::default(),
            collapse: Edge::default(),
        }
    }

    /// The limits crossed upward at this step.
    pub fn check(&mut self, v: &StepValues) -> EventSet {
        let m = &self.model;
        let l = &self.limits;
        let mut out = EventSet::EMPTY;
        let slot = slot_velocity_m_s(m, v.screen_flow_m3_s) > ENTRANCE_VELOCITY_RULE_M_S;
        if self.slot.rises(slot) {
            out.insert(EventKind::SlotVelocity);
        }
        let re = grain_reynolds(m, v.face_flux_m_s).is_some_and(|re| re > l.grain_reynolds);
        if self.reynolds.rises(re) {
            out.insert(EventKind::GrainReynolds);
        }
        // The loads of `run_checks`: the screen carries the larger of its differential and
        // the in-well drawdown, the blank casing the drawdown.
        let rho_g = m.fluid.density_kg_m3 * GRAVITY_M_S2;
        let drawdown_pa = (-v.well_head_m).max(0.0) * rho_g;
        let screen_pa = (v.screen_outer_head_m - v.screen_inner_head_m).max(0.0) * rho_g;
        let over = |rating: Option<f64>, load: f64| {
            rating.is_some_and(|r| load > 0.0 && r / (l.safety_factor * load) < 1.0)
        };
        let collapse = over(l.screen_rating_pa, screen_pa.max(drawdown_pa))
            || over(l.casing_rating_pa, drawdown_pa);
        if self.collapse.rises(collapse) {
            out.insert(EventKind::CollapseLoad);
        }
        out
    }
}
