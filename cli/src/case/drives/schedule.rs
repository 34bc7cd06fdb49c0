//! The `schedule` drive: stages of other drives run back to back, the state carried over;
//! and the two settings a schedule changes for the whole run: its duration and the
//! period the time steps are counted in.
//!
//! Each stage is `{ "duration": <time or "<n> cycles">, "drive": { "kind": …, … } }`.
//! A stage's drive is read by the same parsers as a top-level drive and checked by the
//! solver at once, and every error is moved under the stage's path
//! (`drive.stages[2].drive.stroke`). Stages cannot nest.

use super::{into_map, parse_kind, read_keys, DriveContext, ParsedDrive};
use crate::case::checks::positive;
use crate::case::error::CaseError;
use crate::case::numerics::duration;
use crate::case::quantity::DurationValue;
use crate::units::{format_si, parse_quantity, Quantity};
use boreflux_solver::drive::Stage;
use boreflux_solver::Drive;
use schemars::JsonSchema;
use serde::Deserialize;
use serde_json::{json, Map, Value};

/// Value of `drive.kind` for a schedule.
pub const KIND: &str = "schedule";

/// Relative difference below which a given total duration equals the sum of the stages
/// (a few roundings of unit conversions and the sum, far above 1e-16 each).
const DURATION_MATCH: f64 = 1e-9;

/// Keys of `schedule`.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct ScheduleKeys {
    /// The stages in order, at least one; each starts from the state the previous one
    /// left. The top-level `duration` may be left out: it is the sum of the stages.
    pub stages: Vec<StageKeys>,
}

/// One stage of a schedule.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct StageKeys {
    /// Length of the stage: a time, or "<n> cycles" of the stage's periodic drive.
    pub duration: DurationValue,
    /// The drive of this stage, with its `kind`: any kind except schedule.
    #[schemars(schema_with = "super::stage_drive_schema")]
    pub drive: Map<String, Value>,
}

/// Moves an error about `drive…` under `prefix` (`drive.stages[2].drive`).
fn under(prefix: &str, e: CaseError) -> CaseError {
    let field = match e.field.strip_prefix("drive") {
        Some(rest) if rest.is_empty() || rest.starts_with('.') => format!("{prefix}{rest}"),
        _ => e.field,
    };
    CaseError {
        field,
        message: e.message,
    }
}

/// Length of a stage in s: a time, or `"<n> cycles"` of the stage drive's period.
fn stage_duration(v: &Value, period_s: Option<f64>, field: &str) -> Result<f64, CaseError> {
    let cycles = match v {
        Value::String(s) => {
            let t = s.trim();
            t.strip_suffix("cycles")
                .or_else(|| t.strip_suffix("cycle"))
                .map(str::trim)
        }
        _ => None,
    };
    let seconds = match cycles {
        Some(n) => {
            let n: f64 = n
                .parse()
                .ok()
                .filter(|x: &f64| x.is_finite())
                .ok_or_else(|| {
                    CaseError::new(field, format!("expected \"<number> cycles\", got {v}"))
                })?;
            let p = period_s.ok_or_else(|| {
                CaseError::new(
                    field,
                    format!("{v} needs a periodic drive in this stage; give a time instead"),
                )
            })?;
            n * p
        }
        None => {
            parse_quantity(v, Quantity::Time).map_err(|e| CaseError::new(field, e.to_string()))?
        }
    };
    positive(field, seconds, "s")
}

/// Parser of the `schedule` drive (registered in [`super::DRIVE_KINDS`]).
pub fn schedule(map: Map<String, Value>, ctx: &DriveContext<'_>) -> Result<ParsedDrive, CaseError> {
    let k: ScheduleKeys = read_keys(map)?;
    if k.stages.is_empty() {
        return Err(CaseError::new(
            "drive.stages",
            "needs at least one stage, got none",
        ));
    }
    let mut stages = Vec::with_capacity(k.stages.len());
    let mut resolved = Vec::with_capacity(k.stages.len());
    let mut stage_notes = Vec::new();
    let mut start = 0.0;
    for (i, s) in k.stages.into_iter().enumerate() {
        let at = format!("drive.stages[{i}]");
        let inner = format!("{at}.drive");
        if s.drive.get("kind").and_then(Value::as_str) == Some(KIND) {
            return Err(CaseError::new(
                format!("{inner}.kind"),
                "stages cannot nest: a stage's drive cannot be a schedule; list its stages in \
                 this schedule instead",
            ));
        }
        let parsed = parse_kind(s.drive, ctx).map_err(|e| under(&inner, e))?;
        parsed
            .drive
            .validate()
            .map_err(|e| under(&inner, e.into()))?;
        let duration_s = stage_duration(
            &s.duration.0,
            parsed.drive.period_s(),
            &format!("{at}.duration"),
        )?;
        let end = start + duration_s;
        for n in parsed.notes {
            stage_notes.push(format!(
                "stages[{i}], {} to {}: {n}",
                format_si(start, Quantity::Time),
                format_si(end, Quantity::Time)
            ));
        }
        resolved.push(json!({ "duration": duration_s, "drive": parsed.resolved }));
        stages.push(Stage {
            drive: parsed.drive,
            duration_s,
            start_s: start,
        });
        start = end;
    }
    let mut notes = vec![format!(
        "drive: schedule of {} stages, {} in all; each stage starts from the state the last one \
         left; periodic stages take steps_per_cycle steps per cycle of their own period, the \
         others geometric steps from the start of the stage",
        stages.len(),
        format_si(start, Quantity::Time)
    )];
    notes.extend(stage_notes);
    Ok(ParsedDrive {
        drive: Drive::Schedule(stages),
        resolved: into_map(json!({ "stages": resolved })),
        notes,
    })
}

/// Simulated time in s. A schedule lasts as long as its stages: `duration` may be left
/// out, and when given must equal their sum. Every other drive needs `duration`.
pub fn run_duration(given: Option<&DurationValue>, drive: &Drive) -> Result<f64, CaseError> {
    match (drive, given) {
        (Drive::Schedule(stages), given) => {
            let total: f64 = stages.iter().map(|s| s.duration_s).sum();
            if let Some(v) = given {
                let d = duration(v, drive.period_s())?;
                if (d - total).abs() > DURATION_MATCH * total {
                    return Err(CaseError::new(
                        "duration",
                        format!(
                            "must equal the sum of the stage durations ({total} s) for a \
                             schedule, or be left out; got {d} s"
                        ),
                    ));
                }
            }
            Ok(total)
        }
        (_, Some(v)) => duration(v, drive.period_s()),
        (_, None) => Err(CaseError::new(
            "duration",
            "required key is missing (only a schedule may leave it out: its stages set it)",
        )),
    }
}

/// The period the numerics settings are read against (`None`: the drive is not periodic
/// and gets geometric steps). A schedule with any periodic stage counts as periodic, so
/// that `steps_per_cycle` applies to each periodic stage with that stage's own period;
/// the solver steps the other stages geometrically.
pub fn stepping_period(drive: &Drive) -> Option<f64> {
    match drive {
        Drive::Schedule(_) => drive.slowest_period_s(),
        d => d.period_s(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn under_works() {
        let e = under(
            "drive.stages[2].drive",
            CaseError::new("drive.stroke", "must be positive"),
        );
        assert_eq!(e.field, "drive.stages[2].drive.stroke");
        assert_eq!(under("p", CaseError::new("drive", "x")).field, "p");
        assert_eq!(under("p", CaseError::new("", "x")).field, "");
        assert_eq!(under("p", CaseError::new("driver", "x")).field, "driver");
    }

    #[test]
    fn stage_duration_works_and_captures_errors() {
        assert_eq!(stage_duration(&json!("2 min"), None, "d").unwrap(), 120.0);
        assert_eq!(
            stage_duration(&json!("5 cycles"), Some(3.0), "d").unwrap(),
            15.0
        );
        let e = stage_duration(&json!("5 cycles"), None, "d").unwrap_err();
        assert!(e.message.contains("needs a periodic drive"), "{e}");
        let e = stage_duration(&json!(-1), None, "d").unwrap_err();
        assert_eq!(e.message, "must be positive, got -1 s");
        let e = stage_duration(&json!("x cycles"), Some(1.0), "d").unwrap_err();
        assert!(e.message.contains("<number> cycles"), "{e}");
    }
}
