//! Step tests before and after development as further records: a field step-drawdown test
//! (one row per step, `crate::steptest::read`) against the model's virtual step test at the
//! same rates and step duration, pumped continuously from rest (docs/physics.md §25), on
//! the well as it stands at the start of the log (before) and at its end (after). The
//! compared figure is the drawdown at the end of each step.

use crate::steptest::read::{parse, StepData};
use boreflux_solver::assess::virtual_test::{step_test, READINGS_PER_STEP};
use boreflux_solver::slow::SlowState;
use boreflux_solver::Model;

/// A field step test: rates (increasing), the drawdown at the end of each step, the step
/// duration.
#[derive(Debug, Clone, PartialEq)]
pub struct FieldSteps {
    /// Rates, m³/s.
    pub rates_m3_s: Vec<f64>,
    /// Drawdown at the end of each step, m.
    pub drawdown_m: Vec<f64>,
    /// Step duration, s.
    pub step_duration_s: f64,
}

/// Reads a one-row-per-step file (`rate_<unit>,drawdown_<unit>`).
pub fn read_steps(text: &str, step_duration_s: f64) -> Result<FieldSteps, String> {
    match parse(text).map_err(|e| e.to_string())? {
        StepData::Steps { steps, .. } => {
            let rates: Vec<f64> = steps.iter().map(|s| s.rate_m3_s).collect();
            if rates.len() < 3 || !rates.windows(2).all(|w| w[0] < w[1]) || rates[0] <= 0.0 {
                return Err("a step test needs at least three positive, increasing rates".into());
            }
            Ok(FieldSteps {
                rates_m3_s: rates,
                drawdown_m: steps.iter().map(|s| s.drawdown_m).collect(),
                step_duration_s,
            })
        }
        StepData::Series { .. } => Err(
            "a time series: give one row per step (rate_<unit>,drawdown_<unit>, the drawdown \
             at the end of each step)"
                .into(),
        ),
    }
}

/// The model's drawdown at the end of each step, on the well `slow` of `model`.
pub fn modelled(model: &Model, slow: &SlowState, f: &FieldSteps) -> Result<Vec<f64>, String> {
    let well = slow.snapshot_model(model);
    let samples = step_test(&well, &f.rates_m3_s, f.step_duration_s)
        .map_err(|e| format!("virtual step test: {e}"))?;
    Ok((1..=f.rates_m3_s.len())
        .map(|k| samples[k * READINGS_PER_STEP - 1].drawdown_m)
        .collect())
}
