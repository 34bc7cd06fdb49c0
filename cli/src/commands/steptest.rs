//! `boreflux steptest`: read a step-test CSV, fit B and C, print a table or JSON, and
//! optionally write an HTML page (temporary file, renamed when complete).

use super::outputs::{check_output, refuse_inputs};
use super::{print_out, Failure};
use crate::args::{SteptestArgs, WeightsArg};
use crate::output::TempTarget;
use crate::steptest::{analyse, read, text, Options};
use crate::units::{parse_with_unit, Quantity};
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
    if let Some(f) = a.skip {
        if !(0.0..1.0).contains(&f) {
            return Err(Failure::Input(anyhow!(
                "--skip {f} must be a fraction of the step in [0, 1), e.g. 0.25"
            )));
        }
    }
    let reference_time_s = match &a.at {
        None => None,
        Some(t) => {
            // The unit is required: a plain "30" would be read in seconds.
            let v = parse_with_unit(t, Quantity::Time, "60 min")
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
        model_comparison: a.case.is_some(),
    };
    let outcome = analyse(&data, &opts).map_err(|e| input(&e))?;
    let model = match &a.case {
        None => None,
        Some(path) => {
            let case = crate::case::load_case(path)
                .map_err(|e| Failure::Input(anyhow!("{}: {e}", path.display())))?;
            // The field test's step duration: the common time of Hantush–Bierschenk, or the
            // case's assessment.step_duration when the file has one row per step.
            let duration = outcome
                .series
                .as_ref()
                .map(|h| h.reference_time_s)
                .or(reference_time_s)
                .unwrap_or(case.assessment.step_duration_s);
            let rates: Vec<f64> = outcome.figures.iter().map(|f| f.rate_m3_s).collect();
            Some(
                crate::steptest::model::model_steps(&case, &rates, duration)
                    .map_err(|e| Failure::Runtime(anyhow!("{}: {e}", path.display())))?,
            )
        }
    };

    if let Some(out) = &a.output {
        let source = a.input.file_name().map_or_else(
            || a.input.display().to_string(),
            |n| n.to_string_lossy().into_owned(),
        );
        let mut page = crate::report::steptest::page(&outcome, &source);
        if let Some(m) = &model {
            let block = crate::report::steptest::model_section(&crate::steptest::model::text(m));
            if let Some(at) = page.rfind("</body>") {
                page.insert_str(at, &block);
            }
        }
        let runtime = |e: String| Failure::Runtime(anyhow!("{}: {e}", out.display()));
        let mut target = TempTarget::new(out).map_err(|e| runtime(e.to_string()))?;
        std::fs::write(target.tmp(), page.as_bytes()).map_err(|e| runtime(e.to_string()))?;
        target.commit().map_err(|e| runtime(e.to_string()))?;
        eprintln!("step-test page written to {}", out.display());
    }
    if a.json {
        let mut v = text::to_json(&outcome);
        if let Some(m) = &model {
            v[crate::output::schema::steptest_json::MODEL.key()] =
                crate::steptest::model::to_json(m);
        }
        let s = serde_json::to_string_pretty(&v).map_err(|e| Failure::Runtime(e.into()))?;
        print_out(&(s + "\n"))
    } else {
        let extra = model
            .as_ref()
            .map_or(String::new(), crate::steptest::model::text);
        print_out(&(text::table(&outcome) + &extra))
    }
}
