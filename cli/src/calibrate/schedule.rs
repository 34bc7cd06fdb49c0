//! The model on the log's own schedule: each log row becomes a stage of a `schedule` drive
//! (pumping at the logged rate, the case's development device, or rest: pumping at zero),
//! so every reading time is a stage boundary the time stepper lands on. The modelled
//! drawdown at a reading is s = −h_w, the in-well head below the static level at that time
//! (at t = 0 the well is at rest: s = 0).

use super::record::{Activity, DevelopmentLog};
use super::steps::{modelled, FieldSteps};
use crate::case::{parse_case, LoadedCase};
use boreflux_solver::slow::SlowState;
use boreflux_solver::{run, Reporting, StepObserver, StepView};
use serde_json::{json, Value};
use std::path::Path;

/// Replaces the case's drive with the log's schedule. The case's own drive is the
/// development device; it must be one device, not a schedule, when the log develops.
pub fn scheduled_case(raw: &Value, log: &DevelopmentLog) -> Result<Value, String> {
    let device = raw.get("drive").cloned();
    let develops = log.rows.iter().any(|r| r.activity == Activity::Develop);
    if develops {
        match device.as_ref().and_then(|d| d.get("kind")).and_then(Value::as_str) {
            None => return Err("drive: the log has develop rows, and the case has no drive (its development device)".into()),
            Some("schedule") => {
                return Err("drive: the log has develop rows; the case's drive is their device and must be one device, not a schedule".into())
            }
            Some(_) => {}
        }
    }
    let stages: Vec<Value> = log
        .rows
        .windows(2)
        .map(|w| {
            let duration = format!("{} s", w[1].time_s - w[0].time_s);
            let drive = match w[0].activity {
                Activity::Develop => device.clone().unwrap_or(Value::Null),
                Activity::Pump => json!({"kind": "constant_rate", "pumping_rate": w[0].rate_m3_s}),
                Activity::Rest | Activity::End => {
                    json!({"kind": "constant_rate", "pumping_rate": 0.0})
                }
            };
            json!({"duration": duration, "drive": drive})
        })
        .collect();
    let mut case = raw.clone();
    let obj = case
        .as_object_mut()
        .ok_or("the case file is not a JSON object")?;
    obj.remove("duration");
    // The fit differentiates the model by finite differences: its time-stepping error
    // must sit well below a 1 % change of a parameter. Unless the case sets its own,
    // the adaptive steps are held to 1e-5 relative, 0.01 mm absolute (assumption:
    // calibrate; the defaults are 1e-3 and 1 mm).
    let numerics = obj.entry("numerics").or_insert_with(|| json!({}));
    if let Some(n) = numerics.as_object_mut() {
        if n.get("scheme").and_then(Value::as_str) != Some("theta") {
            n.entry("relative_tolerance").or_insert(json!(1e-5));
            n.entry("absolute_tolerance").or_insert(json!("0.01 mm"));
        }
    }
    obj.insert(
        "drive".into(),
        json!({"kind": "schedule", "stages": stages}),
    );
    Ok(case)
}

/// Records the in-well head at the reading times (exact at a landed step, else linear
/// between the steps around it). No allocation per step.
struct Readings<'a> {
    times: &'a [f64],
    heads: Vec<f64>,
    next: usize,
    prev: (f64, f64),
}

impl StepObserver for Readings<'_> {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        let (t0, h0) = self.prev;
        while self.next < self.times.len() && self.times[self.next] <= s.time_s * (1.0 + 1e-12) {
            let tk = self.times[self.next];
            self.heads[self.next] = if s.time_s > t0 {
                h0 + (s.well_head_m - h0) * ((tk - t0) / (s.time_s - t0)).clamp(0.0, 1.0)
            } else {
                s.well_head_m
            };
            self.next += 1;
        }
        self.prev = (s.time_s, s.well_head_m);
        true
    }
}

/// The modelled drawdown at `times` for a loaded (scheduled) case, and the well's slow
/// state at the end of the log.
pub fn modelled_drawdown(
    case: &LoadedCase,
    times: &[f64],
) -> Result<(Vec<f64>, SlowState), String> {
    let h0 = case.model.drive.initial_well_head_m();
    let mut obs = Readings {
        times,
        heads: vec![f64::NAN; times.len()],
        next: 0,
        prev: (0.0, h0),
    };
    while obs.next < times.len() && times[obs.next] <= 0.0 {
        obs.heads[obs.next] = h0;
        obs.next += 1;
    }
    let summary = run(&case.model, &mut obs, Reporting { every: 1 })
        .map_err(|e| format!("simulation failed: {e}"))?;
    if obs.heads.iter().any(|h| !h.is_finite()) {
        return Err("the run ended before the last reading".into());
    }
    Ok((obs.heads.iter().map(|h| -h).collect(), summary.final_state))
}

/// What the model gives for the records: the log's drawdowns, and the end-of-step
/// drawdowns of the step tests before and after (empty when not given).
#[derive(Debug, Clone, Default)]
pub struct Modelled {
    /// At the log's readings, m.
    pub log: Vec<f64>,
    /// Step test before development, m.
    pub before: Vec<f64>,
    /// Step test after development, m.
    pub after: Vec<f64>,
}

impl Modelled {
    /// All values in one vector: log, before, after.
    pub fn all(&self) -> Vec<f64> {
        let mut v = self.log.clone();
        v.extend(&self.before);
        v.extend(&self.after);
        v
    }
}

/// Builds the case from its JSON and runs it on the log, then the step tests on the well at
/// the start and at the end of the log.
pub fn evaluate_all(
    case_json: &Value,
    base_dir: &Path,
    times: &[f64],
    before: Option<&FieldSteps>,
    after: Option<&FieldSteps>,
) -> Result<Modelled, String> {
    let case =
        parse_case(&case_json.to_string(), base_dir).map_err(|e| format!("case not valid: {e}"))?;
    let (log, end) = modelled_drawdown(&case, times)?;
    let m = &case.model;
    let before = match before {
        Some(f) => modelled(m, &SlowState::new(m), f)?,
        None => Vec::new(),
    };
    let after = match after {
        Some(f) => modelled(m, &end, f)?,
        None => Vec::new(),
    };
    Ok(Modelled { log, before, after })
}

/// Builds the case from its JSON and runs it: modelled drawdown at `times`.
pub fn evaluate(case_json: &Value, base_dir: &Path, times: &[f64]) -> Result<Vec<f64>, String> {
    evaluate_all(case_json, base_dir, times, None, None).map(|m| m.log)
}
