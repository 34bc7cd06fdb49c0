//! The figures of one run, in one place: the run summary, the extremes an observer keeps,
//! the virtual tests, the screen and pack checks, the sand indicators and the collapse
//! margins. Each figure has one home, a field of one of these solver types or a method
//! here; the command line's output schema reads them through accessors, so a library user
//! gets the same numbers as `boreflux run` (docs/physics.md §22, §25). No I/O.

use super::checks::{collapse_margin, RunChecks};
use super::{Assessment, StepCoefficients, TestPlan, WellFigures};
use crate::damage::sand;
use crate::diagnostics::{StepObserver, StepView};
use crate::model::Model;
use crate::run::RunSummary;

/// Per-step extremes that the run summary does not keep (an observer of the run).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Extremes {
    cake0: f64,
    /// First time the cake was down to half its thickness, s.
    pub half_cake_s: Option<f64>,
    /// First time the cake was down to a tenth of its thickness, s.
    pub tenth_cake_s: Option<f64>,
    /// Largest |face gradient| on the formation side.
    pub peak_face_gradient: f64,
    /// Largest direction-weighted shear (what the erosion law compares with τ_c), Pa.
    pub peak_weighted_shear_pa: f64,
    weights: Option<(f64, f64)>,
}

impl Extremes {
    /// An observer for a run of `model` (its cake and erosion weights).
    pub fn new(model: &Model) -> Self {
        Extremes {
            cake0: model.cake.map_or(0.0, |c| c.thickness_m),
            weights: model
                .cake
                .and_then(|c| c.erosion)
                .map(|e| (e.inward_weight, e.outward_weight)),
            ..Default::default()
        }
    }
}

impl StepObserver for Extremes {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        if self.cake0 > 0.0 {
            if self.half_cake_s.is_none() && s.cake_thickness_m <= 0.5 * self.cake0 {
                self.half_cake_s = Some(s.time_s);
            }
            if self.tenth_cake_s.is_none() && s.cake_thickness_m <= 0.1 * self.cake0 {
                self.tenth_cake_s = Some(s.time_s);
            }
        }
        self.peak_face_gradient = self.peak_face_gradient.max(s.face_gradient.abs());
        if let Some((w_in, w_out)) = self.weights {
            let w = if s.face_flux_m_s < 0.0 { w_in } else { w_out };
            self.peak_weighted_shear_pa = self.peak_weighted_shear_pa.max(w * s.shear_proxy_pa);
        }
        true
    }
}

/// Collapse ratings of the blank casing and of the screen, with the margins of the run's
/// loads against them (docs/devices.md §6).
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Collapse {
    /// Rated or computed collapse pressure of the blank casing, Pa.
    pub casing_rating_pa: Option<f64>,
    /// Rated (or explicitly derated) collapse pressure of the screen, Pa.
    pub screen_rating_pa: Option<f64>,
    /// Casing rating / (safety factor × peak in-well drawdown pressure).
    pub casing_margin: Option<f64>,
    /// Screen rating / (safety factor × peak collapse load).
    pub screen_margin: Option<f64>,
}

impl Collapse {
    /// The margins of the loads of `checks` against the ratings, with `safety_factor`.
    pub fn new(
        casing_rating_pa: Option<f64>,
        screen_rating_pa: Option<f64>,
        safety_factor: f64,
        checks: &RunChecks,
    ) -> Self {
        Collapse {
            casing_rating_pa,
            screen_rating_pa,
            casing_margin: collapse_margin(casing_rating_pa, safety_factor, checks.casing_load_pa),
            screen_margin: collapse_margin(
                screen_rating_pa,
                safety_factor,
                checks.peak_collapse_pressure_pa,
            ),
        }
    }

    /// The lower of the screen and casing margins; below 1 is a warning. None unless both
    /// are rated: an unrated screen (slotted or wire-wrap pipe is weaker than the blank
    /// casing by an amount only its maker can state) may govern, so the casing's margin
    /// alone is not the well's. A rated element without load (margin None: infinite) leaves
    /// the other's.
    pub fn margin(&self) -> Option<f64> {
        if self.casing_rating_pa.is_none() || self.screen_rating_pa.is_none() {
            return None;
        }
        match (self.casing_margin, self.screen_margin) {
            (Some(a), Some(b)) => Some(a.min(b)),
            (a, b) => a.or(b),
        }
    }
}

/// Everything the figures of one run are read from.
#[derive(Debug, Clone, PartialEq)]
pub struct RunFigures {
    /// The solver's summary of the run.
    pub summary: RunSummary,
    /// Extremes seen by an [`Extremes`] observer during the run.
    pub extremes: Extremes,
    /// What the virtual tests pumped.
    pub plan: TestPlan,
    /// The virtual tests before and after; none when they failed.
    pub assessment: Option<Assessment>,
    /// Screen, pack and casing checks.
    pub checks: RunChecks,
    /// Sand indicators.
    pub sand: sand::Indicators,
    /// Collapse ratings and margins.
    pub collapse: Collapse,
    /// Porosity of the pack (pore velocity at the wall), –.
    pub pack_porosity: f64,
    /// Period of a periodic drive, s.
    pub period_s: Option<f64>,
}

impl RunFigures {
    /// The figures of a run of `model` that ended with `summary`, observed by `extremes`:
    /// the checks use the grains' `specific_gravity`, the sand indicators the gradation `g`,
    /// the collapse margins the ratings and the `safety_factor`.
    #[allow(clippy::too_many_arguments)]
    pub fn new(
        model: &Model,
        summary: RunSummary,
        extremes: Extremes,
        plan: TestPlan,
        assessment: Option<Assessment>,
        g: &sand::Gradation,
        specific_gravity: f64,
        ratings_pa: (Option<f64>, Option<f64>),
        safety_factor: f64,
    ) -> Self {
        let checks = super::checks::run_checks(
            model,
            &summary,
            extremes.peak_face_gradient,
            specific_gravity,
        );
        let sand = sand::indicators(model, g, specific_gravity, summary.peak_inward_flux_m_s);
        let collapse = Collapse::new(ratings_pa.0, ratings_pa.1, safety_factor, &checks);
        RunFigures {
            summary,
            extremes,
            plan,
            assessment,
            checks,
            sand,
            collapse,
            pack_porosity: model.pack.medium.porosity,
            period_s: model.drive.period_s(),
        }
    }

    /// Largest outward pore velocity at the wall (flux over pack porosity), m/s.
    pub fn peak_outward_pore_velocity_m_s(&self) -> f64 {
        self.summary.peak_outward_flux_m_s / self.pack_porosity
    }

    /// Largest inward pore velocity at the wall (magnitude), m/s.
    pub fn peak_inward_pore_velocity_m_s(&self) -> f64 {
        self.summary.peak_inward_flux_m_s / self.pack_porosity
    }

    /// Cycles of a periodic drive until half the cake was gone.
    pub fn cycles_to_half_cake(&self) -> Option<f64> {
        self.extremes
            .half_cake_s
            .zip(self.period_s)
            .map(|(x, p)| x / p)
    }

    /// Cycles of a periodic drive until 90 % of the cake was gone.
    pub fn cycles_to_90pct_cake(&self) -> Option<f64> {
        self.extremes
            .tenth_cake_s
            .zip(self.period_s)
            .map(|(x, p)| x / p)
    }

    /// The virtual tests of the well at the start.
    pub fn before(&self) -> Option<&WellFigures> {
        self.assessment.as_ref().map(|a| &a.before)
    }

    /// The virtual tests of the well at the end.
    pub fn after(&self) -> Option<&WellFigures> {
        self.assessment.as_ref().map(|a| &a.after)
    }

    /// The step-test coefficients of the well at the start.
    pub fn step_before(&self) -> Option<&StepCoefficients> {
        self.before().and_then(|f| f.step.as_ref())
    }

    /// The step-test coefficients of the well at the end.
    pub fn step_after(&self) -> Option<&StepCoefficients> {
        self.after().and_then(|f| f.step.as_ref())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn checks(screen_load_pa: f64, casing_load_pa: f64) -> RunChecks {
        RunChecks {
            peak_slot_velocity_m_s: 0.0,
            peak_grain_reynolds: None,
            piping_ratio: None,
            peak_collapse_pressure_pa: screen_load_pa,
            peak_screen_differential_pa: screen_load_pa,
            peak_in_well_drawdown_m: 0.0,
            casing_load_pa,
            peak_burst_pressure_pa: 0.0,
        }
    }

    /// Definition (docs/devices.md §6): margin = rating / (safety factor × load), each pipe
    /// against its own load, and the governing margin the lower of the two.
    #[test]
    fn the_governing_margin_is_the_lower_of_screen_and_casing() {
        let c = Collapse::new(Some(400e3), Some(100e3), 2.0, &checks(25e3, 50e3));
        assert_eq!(c.casing_margin, Some(4.0));
        assert_eq!(c.screen_margin, Some(2.0));
        assert_eq!(c.margin(), Some(2.0));
        // An unrated screen may govern: no governing margin, though the casing's stands.
        let only_casing = Collapse::new(Some(400e3), None, 2.0, &checks(25e3, 50e3));
        assert_eq!(only_casing.casing_margin, Some(4.0));
        assert_eq!(only_casing.margin(), None);
        // Both rated, the screen without load: the casing's margin governs.
        let unloaded = Collapse::new(Some(400e3), Some(100e3), 2.0, &checks(0.0, 50e3));
        assert_eq!(unloaded.screen_margin, None);
        assert_eq!(unloaded.margin(), Some(4.0));
        let none = Collapse::new(None, None, 2.0, &checks(25e3, 50e3));
        assert_eq!(none.margin(), None);
    }
}
