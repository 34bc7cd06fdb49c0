//! `boreflux calibrate`: read the case and the log, fit the free parameters, print a table
//! or JSON, and optionally write the HTML page and the calibrated case (temporary files,
//! renamed when complete). A fit that did not converge writes its outputs, which say so,
//! and exits 1.

use super::outputs::{check_output, refuse_inputs};
use super::{print_out, Failure};
use crate::args::CalibrateArgs;
use crate::calibrate::fit::{base_dir, Problem};
use crate::calibrate::steps::{self, FieldSteps};
use crate::calibrate::written::{calibrated_case, Provenance};
use crate::calibrate::{free, record, text};
use crate::case::{read_case_json, read_limited, MAX_CASE_BYTES};
use crate::output::TempTarget;
use crate::units::Quantity;
use anyhow::anyhow;
use boreflux_solver::calibrate::LmOptions;
use std::path::Path;

fn write_file(path: &Path, bytes: &[u8]) -> Result<(), Failure> {
    let runtime = |e: String| Failure::Runtime(anyhow!("{}: {e}", path.display()));
    let mut target = TempTarget::new(path).map_err(|e| runtime(e.to_string()))?;
    std::fs::write(target.tmp(), bytes).map_err(|e| runtime(e.to_string()))?;
    target.commit().map_err(|e| runtime(e.to_string()))
}

/// Runs the command.
pub fn calibrate(a: &CalibrateArgs) -> Result<(), Failure> {
    let mut inputs = vec![a.case.clone(), a.log.clone()];
    inputs.extend(a.steps_before.iter().chain(&a.steps_after).cloned());
    for (out, flag) in [(&a.output, "-o"), (&a.write_case, "--write-case")] {
        if let Some(out) = out {
            refuse_inputs(&[(out, flag)], &inputs).map_err(Failure::Input)?;
            check_output(out, flag, a.force).map_err(Failure::Input)?;
        }
    }
    if !(a.confidence > 0.0 && a.confidence < 1.0) {
        return Err(Failure::Input(anyhow!(
            "--confidence {} must be between 0 and 1 (e.g. 0.95)",
            a.confidence
        )));
    }
    let case_text = read_limited(&a.case, MAX_CASE_BYTES, "case file")
        .map_err(|e| Failure::Input(anyhow!("{e}")))?;
    let raw = read_case_json(&case_text)
        .map_err(|e| Failure::Input(anyhow!("{}: {e}", a.case.display())))?;
    // The case must load as it stands (errors name its fields) before anything is fitted.
    let loaded = crate::case::parse_case(&case_text, &base_dir(&a.case))
        .map_err(|e| Failure::Input(anyhow!("{}: {e}", a.case.display())))?;
    let step_duration_s = match &a.step_duration {
        None => loaded.assessment.step_duration_s,
        Some(t) => {
            // A unit is required, as for `steptest --at`: is "100" seconds or minutes?
            let v = crate::units::parse_with_unit(t, Quantity::Time, "100 min")
                .map_err(|e| Failure::Input(anyhow!("--step-duration: {e}")))?;
            if !(v > 0.0 && v.is_finite()) {
                return Err(Failure::Input(anyhow!(
                    "--step-duration: {t} must be a time above zero"
                )));
            }
            v
        }
    };
    let read_steps = |p: &Option<std::path::PathBuf>| -> Result<Option<FieldSteps>, Failure> {
        let Some(p) = p else { return Ok(None) };
        let text = read_limited(p, MAX_CASE_BYTES, "step-test file")
            .map_err(|e| Failure::Input(anyhow!("{e}")))?;
        steps::read_steps(&text, step_duration_s)
            .map(Some)
            .map_err(|e| Failure::Input(anyhow!("{}: {e}", p.display())))
    };
    let steps_before = read_steps(&a.steps_before)?;
    let steps_after = read_steps(&a.steps_after)?;
    let log_text = read_limited(&a.log, MAX_CASE_BYTES, "development log")
        .map_err(|e| Failure::Input(anyhow!("{e}")))?;
    let log = record::parse(&log_text)
        .map_err(|e| Failure::Input(anyhow!("{}: {e}", a.log.display())))?;
    let free = a
        .free
        .iter()
        .map(|f| free::parse_free(f, &raw))
        .collect::<Result<Vec<_>, _>>()
        .map_err(|e| Failure::Input(anyhow!(e)))?;
    let threads = a.jobs.unwrap_or_else(|| {
        std::thread::available_parallelism().map_or(1, std::num::NonZeroUsize::get)
    });
    let problem = Problem {
        raw_case: raw,
        base_dir: base_dir(&a.case),
        log,
        free,
        steps_before,
        steps_after,
        threads,
        confidence: a.confidence,
        options: LmOptions {
            max_evaluations: a.max_runs,
            ..LmOptions::default()
        },
        profile: a.profile,
    };
    let cal = problem
        .solve()
        .map_err(|e| Failure::Runtime(anyhow!("calibration: {e}")))?;
    let source = a.log.file_name().map_or_else(
        || a.log.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    );
    if let Some(out) = &a.output {
        let page = crate::report::calibration::page(&cal, &problem.log, &source, a.confidence);
        write_file(out, page.as_bytes())?;
        eprintln!("calibration page written to {}", out.display());
    }
    if let Some(out) = &a.write_case {
        let provenance = Provenance {
            log_name: &source,
            converged: cal.converged(),
            iterations: cal.iterations,
        };
        let s = calibrated_case(&case_text, &problem.free, &cal.values_si, &provenance)
            .map_err(|e| Failure::Runtime(anyhow!("--write-case: {e}")))?;
        write_file(out, s.as_bytes())?;
        eprintln!("calibrated case written to {}", out.display());
    }
    if a.json {
        let s = serde_json::to_string_pretty(&text::to_json(&cal, a.confidence))
            .map_err(|e| Failure::Runtime(e.into()))?;
        print_out(&(s + "\n"))?;
    } else {
        print_out(&text::table(&cal, a.confidence))?;
    }
    if cal.converged() {
        Ok(())
    } else {
        Err(Failure::Runtime(anyhow!(
            "calibration: the fit did not converge ({}); the outputs are written and say so, \
             but they are not a calibration",
            text::termination_text(&cal)
        )))
    }
}
