//! The `duration` and `numerics` sections: simulated time, grid and time-step choice.
//!
//! Time steps are resolved here so that the model and the resolved case say exactly what
//! will run: a periodic drive gets `steps_per_cycle` (auto = the solver's default), any
//! other drive geometric steps (`steps_per_decade`, `first_step`, defaults from the
//! solver), unless a fixed `time_step` is given. Under the default adaptive scheme these
//! nominal steps are the upper bound of every step (docs/time-stepping.md).

use super::error::CaseError;
use super::quantity::{DurationValue, Kind, Time};
use super::raw::{MethodName, MultiscaleName, RawNumerics, SchemeName};
use crate::units::parse_quantity;
use boreflux_solver::model::{
    GridSpec, Multiscale, Numerics, Scheme, TimeSpec, DEFAULT_ABSOLUTE_TOLERANCE_M,
    DEFAULT_MULTISCALE_TOLERANCE, DEFAULT_RELATIVE_TOLERANCE,
};
use boreflux_solver::run::{DEFAULT_STEPS_PER_CYCLE, DEFAULT_STEPS_PER_DECADE};
use serde_json::{json, Map, Value};

/// Default backward-Euler start-up steps (docs/formats.md default).
pub const DEFAULT_STARTUP_STEPS: u64 = 2;
/// Default θ: Crank–Nicolson.
pub const DEFAULT_THETA: f64 = 0.5;

/// The drive kinds that have a period (the solver's `Drive::period_s` is `Some`), as the
/// case file names them; a table only when it repeats. A test parses every kind of
/// [`super::drives::DRIVE_KINDS`] and checks this list against the parsed drive's period.
const PERIODIC_KINDS: &[&str] = &[
    "sine_head",
    "surge_block",
    "swab",
    "pump_backwash",
    "jet_pulse",
    "table with repeat",
];

/// [`PERIODIC_KINDS`] as a phrase: `a, b, or c`.
fn periodic_kinds() -> String {
    match PERIODIC_KINDS.split_last() {
        Some((last, [])) => (*last).to_owned(),
        Some((last, rest)) => format!("{}, or {last}", rest.join(", ")),
        None => String::new(),
    }
}

/// Simulated time in s: a time, or `"<n> cycles"` of the drive's period.
pub fn duration(v: &DurationValue, period_s: Option<f64>) -> Result<f64, CaseError> {
    let field = "duration";
    let cycles = match &v.0 {
        Value::String(s) => {
            let t = s.trim();
            t.strip_suffix("cycles")
                .or_else(|| t.strip_suffix("cycle"))
                .map(|n| (n.trim().to_owned(), s.clone()))
        }
        _ => None,
    };
    let seconds = match cycles {
        Some((n, written)) => {
            let n: f64 = n
                .parse()
                .ok()
                .filter(|x: &f64| x.is_finite())
                .ok_or_else(|| {
                    CaseError::new(
                        field,
                        format!("expected \"<number> cycles\", got \"{written}\""),
                    )
                })?;
            let p = period_s.ok_or_else(|| {
                CaseError::new(
                    field,
                    format!(
                        "\"{written}\" needs a periodic drive ({}), and this drive has no \
                         period; give a time instead (a schedule may leave `duration` out: \
                         its stages set it)",
                        periodic_kinds()
                    ),
                )
            })?;
            n * p
        }
        None => parse_quantity(&v.0, Time::Q).map_err(|e| CaseError::new(field, e.to_string()))?,
    };
    if seconds <= 0.0 {
        return Err(CaseError::new(
            field,
            format!("must be positive, got {seconds} s"),
        ));
    }
    Ok(seconds)
}

/// Numerics as read, before the default first step (which needs the model) is known.
#[derive(Debug, Clone, PartialEq)]
pub struct NumericsOut {
    /// Settings for the model.
    pub numerics: Numerics,
    /// Geometric steps with the solver's default first step still to fill in.
    pub needs_default_first_step: bool,
    /// Report every n-th step.
    pub output_every: u64,
}

/// Reads `numerics` for a drive with period `period_s` (None: not periodic).
pub fn numerics(raw: &RawNumerics, period_s: Option<f64>) -> Result<NumericsOut, CaseError> {
    if raw.method == Some(MethodName::Harmonic) {
        return Err(CaseError::new(
            "numerics.method",
            "\"harmonic\" is not available for a run, which always steps in time; use \"time\" \
             (`boreflux check` prints the periodic steady state of a linear case by the harmonic \
             method)",
        ));
    }
    let grid = cells(raw.cells.as_ref().map(|c| &c.0))?;
    let spc = steps_per_cycle(raw.steps_per_cycle.as_ref().map(|c| &c.0))?;
    let time_step = raw
        .time_step
        .as_ref()
        .map(|q| q.si("numerics.time_step"))
        .transpose()?;
    let first_step = raw
        .first_step
        .as_ref()
        .map(|q| q.si("numerics.first_step"))
        .transpose()?;
    let geometric = raw.steps_per_decade.is_some() || first_step.is_some();
    let mut needs_default_first_step = false;
    let time = match (time_step, spc, period_s) {
        (Some(_), Some(_), _) => {
            return Err(conflict("numerics.time_step", "steps_per_cycle"));
        }
        (Some(_), None, _) if geometric => {
            return Err(conflict(
                "numerics.time_step",
                "steps_per_decade/first_step",
            ));
        }
        (Some(dt), None, _) => TimeSpec::Fixed(dt),
        (None, _, Some(_)) if geometric => {
            let key = if raw.steps_per_decade.is_some() {
                "numerics.steps_per_decade"
            } else {
                "numerics.first_step"
            };
            return Err(CaseError::new(
                key,
                "is for drives that are not periodic; use steps_per_cycle or time_step",
            ));
        }
        (None, spc, Some(_)) => TimeSpec::StepsPerCycle(spc.unwrap_or(DEFAULT_STEPS_PER_CYCLE)),
        (None, Some(n), None) => {
            return Err(CaseError::new(
                "numerics.steps_per_cycle",
                format!(
                    "is for periodic drives, got {n}; this drive is not periodic: use \
                     steps_per_decade and first_step, or time_step"
                ),
            ))
        }
        (None, None, None) => {
            needs_default_first_step = first_step.is_none();
            TimeSpec::StepsPerDecade {
                per_decade: raw.steps_per_decade.unwrap_or(DEFAULT_STEPS_PER_DECADE),
                first_step_s: first_step.unwrap_or(0.0),
            }
        }
    };
    let startup = raw.startup_steps.unwrap_or(DEFAULT_STARTUP_STEPS);
    let output_every = raw.output_every.unwrap_or(1);
    if output_every == 0 {
        return Err(CaseError::new(
            "numerics.output_every",
            "must be at least 1, got 0",
        ));
    }
    let scheme = match raw.scheme.unwrap_or(SchemeName::TrBdf2) {
        SchemeName::Theta => {
            for (given, key) in [
                (
                    raw.relative_tolerance.is_some(),
                    "numerics.relative_tolerance",
                ),
                (
                    raw.absolute_tolerance.is_some(),
                    "numerics.absolute_tolerance",
                ),
            ] {
                if given {
                    return Err(CaseError::new(
                        key,
                        "is for the adaptive scheme \"tr-bdf2\", not for \"theta\"",
                    ));
                }
            }
            Scheme::Theta
        }
        SchemeName::TrBdf2 => {
            for (given, key) in [
                (raw.theta.is_some(), "numerics.theta"),
                (raw.startup_steps.is_some(), "numerics.startup_steps"),
            ] {
                if given {
                    return Err(CaseError::new(
                        key,
                        "is for the θ-scheme: set numerics.scheme to \"theta\" to use it (the \
                         default scheme \"tr-bdf2\" has no θ and needs no start-up steps)",
                    ));
                }
            }
            Scheme::TrBdf2 {
                relative: raw.relative_tolerance.unwrap_or(DEFAULT_RELATIVE_TOLERANCE),
                absolute_m: raw
                    .absolute_tolerance
                    .as_ref()
                    .map(|q| q.si("numerics.absolute_tolerance"))
                    .transpose()?
                    .unwrap_or(DEFAULT_ABSOLUTE_TOLERANCE_M),
            }
        }
    };
    let multiscale = multiscale(raw, period_s)?;
    Ok(NumericsOut {
        numerics: Numerics {
            multiscale,
            scheme,
            grid,
            time,
            theta: raw.theta.unwrap_or(DEFAULT_THETA),
            startup_steps: usize::try_from(startup).map_err(|_| {
                CaseError::new(
                    "numerics.startup_steps",
                    format!("is too large, got {startup}"),
                )
            })?,
            ..Numerics::default()
        },
        needs_default_first_step,
        output_every,
    })
}

/// Largest `numerics.multiscale_tolerance` accepted: beyond a percent per jump the
/// figures drift away from full stepping (docs/time-stepping.md §Multiscale stepping).
pub const MAX_MULTISCALE_TOLERANCE: f64 = 1e-2;

fn multiscale(raw: &RawNumerics, period_s: Option<f64>) -> Result<Multiscale, CaseError> {
    // Default: "auto" for a periodic drive (the accuracy target is met on every shipped
    // case, docs/time-stepping.md §Multiscale stepping), "off" otherwise.
    let default = if period_s.is_some() {
        MultiscaleName::Auto
    } else {
        MultiscaleName::Off
    };
    match raw.multiscale.unwrap_or(default) {
        MultiscaleName::Off => {
            if raw.multiscale_tolerance.is_some() {
                return Err(CaseError::new(
                    "numerics.multiscale_tolerance",
                    "is for numerics.multiscale = \"auto\"; multiscale is off",
                ));
            }
            Ok(Multiscale::Off)
        }
        MultiscaleName::Auto => {
            if period_s.is_none() {
                return Err(CaseError::new(
                    "numerics.multiscale",
                    format!(
                        "\"auto\" jumps over whole cycles and needs a periodic drive ({});                          this drive has no period",
                        periodic_kinds()
                    ),
                ));
            }
            let tolerance = raw
                .multiscale_tolerance
                .unwrap_or(DEFAULT_MULTISCALE_TOLERANCE);
            if !(tolerance > 0.0 && tolerance <= MAX_MULTISCALE_TOLERANCE) {
                return Err(CaseError::new(
                    "numerics.multiscale_tolerance",
                    format!("must be in (0, {MAX_MULTISCALE_TOLERANCE}], got {tolerance}"),
                ));
            }
            Ok(Multiscale::Auto { tolerance })
        }
    }
}

fn conflict(field: &str, other: &str) -> CaseError {
    CaseError::new(field, format!("give either time_step or {other}, not both"))
}

fn cells(v: Option<&Value>) -> Result<GridSpec, CaseError> {
    let bad = |v: &Value| {
        CaseError::new(
            "numerics.cells",
            format!("expected \"auto\", a whole number of cells or {{\"per_decade\": n}}, got {v}"),
        )
    };
    match v {
        None => Ok(GridSpec::Auto),
        Some(Value::String(s)) if s == "auto" => Ok(GridSpec::Auto),
        Some(v @ Value::Number(n)) => n
            .as_u64()
            .and_then(|c| usize::try_from(c).ok())
            .map(GridSpec::Total)
            .ok_or_else(|| bad(v)),
        Some(v @ Value::Object(m)) => {
            if let Some(k) = m.keys().find(|k| k.as_str() != "per_decade") {
                return Err(CaseError::new(
                    format!("numerics.cells.{k}"),
                    format!(
                        "unknown key `{k}`; {}",
                        super::hints::suggestion(k, &["per_decade"])
                    ),
                ));
            }
            match m.get("per_decade").and_then(Value::as_f64) {
                Some(d) => Ok(GridSpec::PerDecade(d)),
                None => Err(bad(v)),
            }
        }
        Some(v) => Err(bad(v)),
    }
}

fn steps_per_cycle(v: Option<&Value>) -> Result<Option<usize>, CaseError> {
    match v {
        None => Ok(None),
        Some(Value::String(s)) if s == "auto" => Ok(None),
        Some(v) => v
            .as_u64()
            .and_then(|c| usize::try_from(c).ok())
            .map(Some)
            .ok_or_else(|| {
                CaseError::new(
                    "numerics.steps_per_cycle",
                    format!("expected \"auto\" or a whole number, got {v}"),
                )
            }),
    }
}

/// The resolved `numerics` section.
pub fn resolved(n: &Numerics, output_every: u64) -> Value {
    let mut m = Map::new();
    m.insert("method".to_owned(), json!("time"));
    m.insert(
        "cells".to_owned(),
        match n.grid {
            GridSpec::Auto => json!("auto"),
            GridSpec::Total(c) => json!(c),
            GridSpec::PerDecade(d) => json!({ "per_decade": d }),
        },
    );
    match n.time {
        TimeSpec::Auto => {}
        TimeSpec::StepsPerCycle(s) => {
            m.insert("steps_per_cycle".to_owned(), json!(s));
        }
        TimeSpec::StepsPerDecade {
            per_decade,
            first_step_s,
        } => {
            m.insert("steps_per_decade".to_owned(), json!(per_decade));
            m.insert("first_step".to_owned(), json!(first_step_s));
        }
        TimeSpec::Fixed(dt) => {
            m.insert("time_step".to_owned(), json!(dt));
        }
    }
    match n.scheme {
        Scheme::TrBdf2 {
            relative,
            absolute_m,
        } => {
            m.insert("scheme".to_owned(), json!("tr-bdf2"));
            m.insert("relative_tolerance".to_owned(), json!(relative));
            m.insert("absolute_tolerance".to_owned(), json!(absolute_m));
        }
        Scheme::Theta => {
            m.insert("scheme".to_owned(), json!("theta"));
            m.insert("theta".to_owned(), json!(n.theta));
            m.insert("startup_steps".to_owned(), json!(n.startup_steps));
        }
    }
    match n.multiscale {
        Multiscale::Off => {
            m.insert("multiscale".to_owned(), json!("off"));
        }
        Multiscale::Auto { tolerance } => {
            m.insert("multiscale".to_owned(), json!("auto"));
            m.insert("multiscale_tolerance".to_owned(), json!(tolerance));
        }
    }
    m.insert("output_every".to_owned(), json!(output_every));
    Value::Object(m)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::case::drives::DRIVE_KINDS;
    use crate::case::{parse_case, scenarios};
    use std::path::Path;

    /// Keys of one small valid drive of every kind but `schedule` (whose period is that of
    /// its stages), each with the name it has in [`PERIODIC_KINDS`] when periodic.
    fn samples() -> Vec<(&'static str, Value)> {
        vec![
            (
                "sine_head",
                json!({ "kind": "sine_head", "amplitude": "1 m", "frequency": "0.1 Hz" }),
            ),
            (
                "constant_rate",
                json!({ "kind": "constant_rate", "pumping_rate": "2 L/s" }),
            ),
            ("slug", json!({ "kind": "slug", "initial_head": "1 m" })),
            (
                "table",
                json!({ "kind": "table", "points": [[0, 0], [10, 1]], "quantity": "head" }),
            ),
            (
                "table with repeat",
                json!({ "kind": "table", "points": [[0, 0], [10, 1]], "quantity": "head",
                        "repeat": true }),
            ),
            (
                "surge_block",
                json!({ "kind": "surge_block", "stroke": "0.5 m", "strokes_per_minute": 10 }),
            ),
            (
                "swab",
                json!({ "kind": "swab", "lift_rate": "1 m/s", "stroke": "5 m",
                        "lowering_time": "5 s", "submergence": "20 m" }),
            ),
            (
                "pump_backwash",
                json!({ "kind": "pump_backwash", "pumping_rate": "10 L/s", "on_time": "60 s",
                        "off_time": "30 s", "backflow_volume": "0.1 m3",
                        "intake_depth": "10 m" }),
            ),
            (
                "jet_pulse",
                json!({ "kind": "jet_pulse", "nozzle_velocity": "30 m/s", "rotation_period": "10 s",
                        "nozzle_diameter": "8 mm" }),
            ),
        ]
    }

    /// The default demo case with `drive` replaced, run for a plain time.
    fn period_of(drive: &Value) -> Option<f64> {
        let mut case: Value = serde_json::from_str(scenarios()[0].1).unwrap();
        case["drive"] = drive.clone();
        case["duration"] = json!("10 min");
        case.as_object_mut().unwrap().remove("numerics");
        let loaded = parse_case(&case.to_string(), Path::new("."))
            .unwrap_or_else(|e| panic!("sample {drive}: {e}"));
        loaded.model.drive.period_s()
    }

    #[test]
    fn periodic_kinds_are_those_with_a_period() {
        let samples = samples();
        for k in DRIVE_KINDS.iter().filter(|k| k.name != "schedule") {
            assert!(
                samples.iter().any(|(_, d)| d["kind"] == k.name),
                "drive kind {} has no sample here: add one",
                k.name
            );
        }
        for (label, drive) in &samples {
            assert_eq!(
                period_of(drive).is_some(),
                PERIODIC_KINDS.contains(label),
                "{label}: period of the parsed drive vs PERIODIC_KINDS"
            );
        }
    }

    #[test]
    fn cycles_without_a_period_names_every_periodic_kind() {
        let e = duration(&DurationValue(json!("10 cycles")), None).unwrap_err();
        assert_eq!(e.field, "duration");
        assert!(
            e.message
                .starts_with("\"10 cycles\" needs a periodic drive ("),
            "{e}"
        );
        for k in PERIODIC_KINDS {
            assert!(e.message.contains(k), "{k} missing: {e}");
        }
        // 10 cycles of a 3 s period: 30 s (arithmetic).
        assert_eq!(
            duration(&DurationValue(json!("10 cycles")), Some(3.0)).unwrap(),
            30.0
        );
    }

    #[test]
    fn multiscale_defaults_and_errors_name_the_field() {
        let raw = |m: Option<MultiscaleName>, tol: Option<f64>| RawNumerics {
            multiscale: m,
            multiscale_tolerance: tol,
            ..RawNumerics::default()
        };
        let ms = |r: &RawNumerics, p| numerics(r, p).map(|n| n.numerics.multiscale);
        assert_eq!(
            ms(&raw(None, None), Some(3.0)).unwrap(),
            Multiscale::Auto {
                tolerance: DEFAULT_MULTISCALE_TOLERANCE
            }
        );
        assert_eq!(ms(&raw(None, None), None).unwrap(), Multiscale::Off);
        assert_eq!(
            ms(&raw(Some(MultiscaleName::Off), None), Some(3.0)).unwrap(),
            Multiscale::Off
        );
        let field = |r: &RawNumerics, p| numerics(r, p).unwrap_err().to_string();
        assert!(
            field(&raw(Some(MultiscaleName::Auto), None), None).starts_with("numerics.multiscale:")
        );
        for bad in [0.0, -1e-4, 0.5, f64::NAN] {
            assert!(field(&raw(None, Some(bad)), Some(3.0))
                .starts_with("numerics.multiscale_tolerance:"));
        }
        assert!(
            field(&raw(Some(MultiscaleName::Off), Some(1e-3)), Some(3.0))
                .starts_with("numerics.multiscale_tolerance:")
        );
    }
}
