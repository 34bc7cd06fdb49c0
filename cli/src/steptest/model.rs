//! The model's virtual step test beside a field test (`boreflux steptest --case`): the
//! case's well, as built and after the case's development run, pumped at the field test's
//! rates for the field test's step duration, fitted the same way as the virtual tests of a
//! run (docs/physics.md §25.2).

use crate::case::LoadedCase;
use crate::output::schema::steptest_json as K;
use boreflux_solver::assess::{self, StepCoefficients, TestPlan};
use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::slow::SlowState;
use boreflux_solver::SolverError;
use boreflux_solver::{run, Reporting};
use serde_json::{json, Value};

/// B and C of the model before and after development.
#[derive(Debug, Clone)]
pub struct ModelSteps {
    /// Title of the case.
    pub title: String,
    /// Step rates, m³/s.
    pub rates_m3_s: Vec<f64>,
    /// Step duration, s.
    pub step_duration_s: f64,
    /// The well as built.
    pub before: Option<StepCoefficients>,
    /// The well at the end of the case's development run.
    pub after: Option<StepCoefficients>,
}

/// Why the model's side of a step-test comparison could not be computed.
#[derive(Debug, Clone, PartialEq)]
pub enum ModelStepsError {
    /// The field rates do not make a valid virtual step test.
    Plan(SolverError),
    /// The case's development run failed.
    Development(SolverError),
    /// A virtual step test failed.
    StepTest(SolverError),
}

impl std::fmt::Display for ModelStepsError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ModelStepsError::Plan(e) => write!(
                f,
                "the field rates cannot be pumped as a virtual step test: {e}"
            ),
            ModelStepsError::Development(e) => {
                write!(f, "the case's development run failed: {e}")
            }
            ModelStepsError::StepTest(e) => write!(f, "the virtual step test failed: {e}"),
        }
    }
}

impl std::error::Error for ModelStepsError {}

/// Runs the case's development and the virtual step tests at `rates_m3_s` (increasing)
/// for `step_duration_s` each. Errors are the solver's, worded for the user.
pub fn model_steps(
    case: &LoadedCase,
    rates_m3_s: &[f64],
    step_duration_s: f64,
) -> Result<ModelSteps, ModelStepsError> {
    let q_max = rates_m3_s.iter().copied().fold(0.0, f64::max);
    let plan = TestPlan {
        design_rate_m3_s: q_max,
        constant_duration_s: step_duration_s,
        step_fractions: rates_m3_s.iter().map(|q| q / q_max).collect(),
        step_duration_s,
    };
    plan.validate().map_err(ModelStepsError::Plan)?;
    let m = &case.model;
    let developed = run(m, &mut NullObserver, Reporting { every: u64::MAX })
        .map_err(ModelStepsError::Development)?;
    let coeffs = |slow: &SlowState| {
        assess::step_coefficients(&slow.snapshot_model(m), &plan).map_err(ModelStepsError::StepTest)
    };
    Ok(ModelSteps {
        title: case.title.clone(),
        rates_m3_s: rates_m3_s.to_vec(),
        step_duration_s,
        before: coeffs(&SlowState::new(m))?,
        after: coeffs(&developed.final_state)?,
    })
}

fn coeff_json(c: &Option<StepCoefficients>) -> Value {
    match c {
        Some(c) => json!({(K::AS_BUILT_B.key()): c.b_s_m2, (K::AS_BUILT_C.key()): c.c_s2_m5}),
        None => Value::Null,
    }
}

/// JSON of the model's figures.
pub fn to_json(m: &ModelSteps) -> Value {
    json!({
        (K::CASE_TITLE.key()): m.title,
        (K::MODEL_RATES.key()): m.rates_m3_s,
        (K::MODEL_STEP_DURATION.key()): m.step_duration_s,
        (K::AS_BUILT.key()): coeff_json(&m.before),
        (K::DEVELOPED.key()): coeff_json(&m.after),
    })
}

/// Lines for the printed table.
pub fn text(m: &ModelSteps) -> String {
    let line = |label: &str, c: &Option<StepCoefficients>| match c {
        Some(c) => format!(
            "  {label:<30} B = {} s/m², C = {} s²/m⁵\n",
            super::text::sig(c.b_s_m2),
            super::text::sig(c.c_s2_m5)
        ),
        None => format!("  {label:<30} (the line could not be fitted)\n"),
    };
    let mut s = format!(
        "\nModel of the case{}: virtual step test at the same rates, {} min per step, each \
         rate from rest (docs/physics.md §25.2)\n",
        if m.title.is_empty() {
            String::new()
        } else {
            format!(" \"{}\"", m.title)
        },
        super::text::sig(m.step_duration_s / 60.0)
    );
    s += &line("well as built", &m.before);
    s += &line("after the case's development", &m.after);
    s += "  A model with uncertain inputs: where it and the field disagree, the field test \
          describes the well.\n";
    s
}
