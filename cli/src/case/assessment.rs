//! The case's `assessment` section: what the virtual pumping tests of the well pump and for
//! how long (docs/formats.md, `assessment`; docs/physics.md §25). Every key is optional.
//!
//! Defaults (docs/practice.md §4):
//! - `design_rate`: the rate that makes the screen entrance velocity 0.03 m/s,
//!   Q = 0.03 · 2π r_s b A_o, the classic design rule for screen capacity (docs/practice.md
//!   §2; a rule of thumb, not a limit). It depends on the well only, never on the drive, so
//!   the same well gets the same figures whatever developed it; when the drive pumps, `check`
//!   names the drive's rate so the user can test at it instead.
//! - `duration` of the constant-rate test: 24 h (6–24 h or more is usual, docs/practice.md §4).
//! - `step_fractions`: ½, ¾, 1 and 1½ of the design rate, `step_duration` 2 h (one of the two
//!   step-test layouts of docs/practice.md §4).

use super::error::CaseError;
use super::quantity::{FlowRate, Time, Q};
use boreflux_solver::assess::TestPlan;
use boreflux_solver::devices::PumpLaw;
use boreflux_solver::drive::{Drive, TableQuantity};
use boreflux_solver::Model;
use schemars::JsonSchema;
use serde::Deserialize;
use serde_json::{json, Value};

/// Screen entrance velocity of the classic design rule, m/s (docs/practice.md §2).
pub const DESIGN_ENTRANCE_VELOCITY_M_S: f64 = 0.03;
/// Default duration of the constant-rate test, s (docs/practice.md §4: 6–24 h or more).
pub const DEFAULT_DURATION_S: f64 = 86_400.0;
/// Default step rates as fractions of the design rate (docs/practice.md §4).
pub const DEFAULT_STEP_FRACTIONS: [f64; 4] = [0.5, 0.75, 1.0, 1.5];
/// Default step duration, s (docs/practice.md §4: about 2 h steps).
pub const DEFAULT_STEP_DURATION_S: f64 = 7_200.0;

/// Virtual pumping tests of the well before and after development [all automatic].
#[derive(Debug, Default, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawAssessment {
    /// Design pumping rate of the tests [the rate of a 0.03 m/s screen entrance velocity,
    /// 0.03 · 2π r_s b A_o].
    pub design_rate: Option<Q<FlowRate>>,
    /// Duration of the constant-rate test; specific capacity and efficiency are read at its
    /// end [24 h].
    pub duration: Option<Q<Time>>,
    /// Step-test rates as fractions of the design rate, at least three, increasing
    /// [0.5, 0.75, 1, 1.5].
    pub step_fractions: Option<Vec<f64>>,
    /// Duration of each step of the step test [2 h].
    pub step_duration: Option<Q<Time>>,
}

/// Largest pumping rate of a drive, m³/s, when it pumps.
pub fn drive_pumping_rate(drive: &Drive) -> Option<f64> {
    match drive {
        Drive::ConstantRate { pumping_rate_m3_s } => Some(*pumping_rate_m3_s),
        Drive::PumpBackwash(p) => Some(match &p.pump {
            PumpLaw::ConstantRate(q) => *q,
            PumpLaw::Quadratic { .. } | PumpLaw::Table(_) => p.pump_rate(0.0).0,
        }),
        Drive::Table(t) if t.quantity == TableQuantity::PumpingRate => {
            t.values.iter().copied().reduce(f64::max)
        }
        Drive::Schedule(stages) => stages
            .iter()
            .filter_map(|s| drive_pumping_rate(&s.drive))
            .reduce(f64::max),
        Drive::SineHead(_)
        | Drive::Slug { .. }
        | Drive::Table(_)
        | Drive::SurgeBlock(_)
        | Drive::Swab(_)
        | Drive::JetPulse(_) => None,
    }
    .filter(|q| q.is_finite() && *q > 0.0)
}

/// The test plan of a case, a note saying where the design rate comes from, and the
/// resolved section.
pub fn plan(
    raw: Option<&RawAssessment>,
    model: &Model,
) -> Result<(TestPlan, String, Value), CaseError> {
    let empty = RawAssessment::default();
    let r = raw.unwrap_or(&empty);
    let (q, how) = match &r.design_rate {
        Some(q) => (
            q.si("assessment.design_rate")?,
            "assessment.design_rate as given".to_owned(),
        ),
        None => {
            let w = &model.well;
            let q = DESIGN_ENTRANCE_VELOCITY_M_S
                * 2.0
                * std::f64::consts::PI
                * w.screen_radius_m
                * w.screen_length_m
                * w.open_area;
            let pumped = drive_pumping_rate(&model.drive).map_or(String::new(), |p| {
                format!(
                    "; the drive pumps at up to {:.4} L/s: set assessment.design_rate to \
                     test at that rate",
                    p * 1e3
                )
            });
            (
                q,
                format!("the rate of a 0.03 m/s screen entrance velocity (default){pumped}"),
            )
        }
    };
    let plan = TestPlan {
        design_rate_m3_s: q,
        constant_duration_s: r
            .duration
            .as_ref()
            .map(|d| d.si("assessment.duration"))
            .transpose()?
            .unwrap_or(DEFAULT_DURATION_S),
        step_fractions: r
            .step_fractions
            .clone()
            .unwrap_or_else(|| DEFAULT_STEP_FRACTIONS.to_vec()),
        step_duration_s: r
            .step_duration
            .as_ref()
            .map(|d| d.si("assessment.step_duration"))
            .transpose()?
            .unwrap_or(DEFAULT_STEP_DURATION_S),
    };
    plan.validate().map_err(CaseError::from)?;
    let resolved = json!({
        "design_rate": plan.design_rate_m3_s,
        "duration": plan.constant_duration_s,
        "step_fractions": plan.step_fractions,
        "step_duration": plan.step_duration_s,
    });
    Ok((plan, how, resolved))
}
