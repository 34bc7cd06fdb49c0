//! `boreflux steptest`: read a step-test CSV, fit B and C, print a table or JSON, and
//! optionally write an HTML page (temporary file, renamed when complete).

use super::outputs::{check_output, refuse_inputs};
use super::{print_out, Failure};
use crate::args::{SteptestArgs, WeightsArg};
use crate::output::TempTarget;
use crate::steptest::{analyse, read, text, Options};
use crate::units::{parse_quantity, Quantity};
use anyhow::anyhow;
use boreflux_solver::steptest::Weighting;

/// Runs the command.
pub fn steptest(a: &SteptestArgs) -> Result<(), Failure> {
    let input =
        |msg: &dyn std::fmt::Display| Failure::Input(anyhow!("{}: {msg}", a.input.display()));
    if let Some(out) = &a.output {
        // The overwrite policy every writing command follows.
        refuse_inputs(&[(out, "-o")], std::slice::from_ref(&a.input)).map_err(Failure::Input)?;
        check_output(out, "-o", a.force).map_err(Failure::Input)?;
    }
    if !(a.confidence > 0.0 && a.confidence < 1.0) {
        return Err(Failure::Input(anyhow!(
            "--confidence {} must be between 0 and 1 (e.g. 0.95)",
            a.confidence
        )));
    }
    if !(0.0..1.0).contains(&a.skip) {
        return Err(Failure::Input(anyhow!(
            "--skip {} must be in [0, 1)",
            a.skip
        )));
    }
    let reference_time_s = match &a.at {
        None => None,
        Some(t) => {
            let v = parse_quantity(&serde_json::Value::String(t.clone()), Quantity::Time)
                .map_err(|e| Failure::Input(anyhow!("--at: {e}")))?;
            if v.is_nan() || v <= 0.0 {
                return Err(Failure::Input(anyhow!(
                    "--at: {t} must be a time above zero"
                )));
            }
            Some(v)
        }
    };
    let text_in = std::fs::read_to_string(&a.input)
        .map_err(|e| Failure::Input(anyhow!("cannot read {}: {e}", a.input.display())))?;
    let data = read::parse(&text_in).map_err(|e| input(&e))?;
    let opts = Options {
        method: a.method,
        weighting: match a.weights {
            WeightsArg::Equal => Weighting::Equal,
            WeightsArg::Drawdown => Weighting::Drawdown,
        },
        confidence: a.confidence,
        skip_fraction: a.skip,
        reference_time_s,
        power: a.power,
    };
    let outcome = analyse(&data, &opts).map_err(|e| input(&e))?;

    if let Some(out) = &a.output {
        let source = a.input.file_name().map_or_else(
            || a.input.display().to_string(),
            |n| n.to_string_lossy().into_owned(),
        );
        let page = crate::report::steptest::page(&outcome, &source);
        let runtime = |e: String| Failure::Runtime(anyhow!("{}: {e}", out.display()));
        let mut target = TempTarget::new(out).map_err(|e| runtime(e.to_string()))?;
        std::fs::write(target.tmp(), page.as_bytes()).map_err(|e| runtime(e.to_string()))?;
        target.commit().map_err(|e| runtime(e.to_string()))?;
        eprintln!("step-test page written to {}", out.display());
    }
    if a.json {
        let v = text::to_json(&outcome);
        let s = serde_json::to_string_pretty(&v).map_err(|e| Failure::Runtime(e.into()))?;
        print_out(&(s + "\n"))
    } else {
        print_out(&text::table(&outcome))
    }
}
