//! `boreflux steptest`: the step-test file, the choice of method, and the printed and
//! JSON results. The analysis itself is `boreflux_solver::steptest`.

pub mod model;
pub mod read;
pub mod text;

use boreflux_solver::steptest::checks::{self, Concern};
use boreflux_solver::steptest::hantush::{self, HantushAnalysis, SeriesOptions};
use boreflux_solver::steptest::jacob::{self, LineFit};
use boreflux_solver::steptest::rorabaugh::{self, PowerFit};
use boreflux_solver::steptest::series;
use boreflux_solver::steptest::{Step, StepFigures, StepTestError, Weighting};
use read::StepData;

/// Which analysis to run.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Method {
    /// Hantush–Bierschenk for a time series, Jacob for one row per step.
    Auto,
    /// Jacob's line through the drawdown at the end of each step, as measured.
    Jacob,
    /// Hantush–Bierschenk: steps corrected to a common elapsed time (needs a time series).
    Hantush,
}

/// Options of the analysis, in SI.
#[derive(Debug, Clone, Copy)]
pub struct Options {
    /// Method.
    pub method: Method,
    /// Weighting of the step line.
    pub weighting: Weighting,
    /// Confidence level of the intervals.
    pub confidence: f64,
    /// Early fraction of each step left out of the series fit (`--skip`); `None`: the
    /// solver's default ([`SeriesOptions::default`]).
    pub skip_fraction: Option<f64>,
    /// Common elapsed time, s (`--at`); `None`: the shortest step.
    pub reference_time_s: Option<f64>,
    /// Also fit s = B Q + C Qⁿ (Rorabaugh).
    pub power: bool,
    /// A model is pumped beside the field test (`--case`): `--at` then also sets its step
    /// duration, so it has an effect on a file of one row per step too.
    pub model_comparison: bool,
}

/// A warning shown beside the fit: in the table, the JSON and the HTML page.
#[derive(Debug, Clone, PartialEq)]
pub struct Warning {
    /// Short stable name (`negative_c`, `option_without_effect`, …).
    pub kind: &'static str,
    /// The text, with units.
    pub message: String,
}

/// The result of either method, in the form the outputs need.
#[derive(Debug, Clone)]
pub struct Outcome {
    /// `"jacob"` or `"hantush-bierschenk"`.
    pub method: &'static str,
    /// The step line s/Q = B + C Q.
    pub fit: LineFit,
    /// Per-step figures (drawdowns as fitted: corrected for Hantush–Bierschenk).
    pub figures: Vec<StepFigures>,
    /// Measured drawdown at the end of each step, m.
    pub measured_m: Vec<f64>,
    /// The series fit, for Hantush–Bierschenk.
    pub series: Option<HantushAnalysis>,
    /// The power-law fit when asked for: the fit, or why it could not be made.
    pub power: Option<Result<PowerFit, StepTestError>>,
    /// What the fit cannot vouch for and options without effect; empty for a sound test.
    pub warnings: Vec<Warning>,
}

impl Outcome {
    fn warn(mut self, concerns: &[Concern]) -> Self {
        self.warnings.extend(concerns.iter().map(|c| Warning {
            kind: c.kind(),
            message: text::concern(c),
        }));
        self
    }

    fn with_power(mut self, asked: bool) -> Self {
        if asked {
            let steps: Vec<Step> = self
                .figures
                .iter()
                .map(|g| Step {
                    rate_m3_s: g.rate_m3_s,
                    drawdown_m: g.drawdown_m,
                })
                .collect();
            let power = rorabaugh::fit_power(&steps, self.fit.confidence);
            if let Ok(p) = &power {
                self = self.warn(&checks::power_concerns(p));
            }
            self.power = Some(power);
        }
        self
    }
}

/// Why a step test could not be analysed; bad input (exit 2).
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum AnalysisError {
    /// The fit failed; `line` is the file line of the step or reading at fault, if any.
    #[error("{}{source}", line.map(|l| format!("line {l}: ")).unwrap_or_default())]
    Fit {
        /// File line, from 1.
        line: Option<usize>,
        /// The fit's error.
        source: StepTestError,
    },
    /// Hantush–Bierschenk asked of a file of one row per step.
    #[error(
        "the Hantush–Bierschenk method needs the time series (a time_<unit> column); this \
         file has one row per step"
    )]
    HantushNeedsSeries,
}

/// The options given that the analysis of `data` by `opts.method` does not use: `--skip`
/// and `--at` act on the time series of Hantush–Bierschenk only, except that `--at` also
/// sets the model's step duration with `--case`.
fn unused_options(data: &StepData, opts: &Options) -> Vec<Warning> {
    let why = match (data, opts.method) {
        (StepData::Steps { .. }, _) => {
            "on a file of one row per step (the drawdowns are used as read)"
        }
        (StepData::Series { .. }, Method::Jacob) => {
            "with --method jacob (the last reading of each step is used as read)"
        }
        (StepData::Series { .. }, Method::Auto | Method::Hantush) => return Vec::new(),
    };
    let mut out = Vec::new();
    if let Some(f) = opts.skip_fraction {
        out.push(Warning {
            kind: "option_without_effect",
            message: format!(
                "--skip {f} has no effect {why}: it leaves the early readings of each step out \
                 of the Hantush–Bierschenk fit of a time series."
            ),
        });
    }
    if let (Some(t), false) = (opts.reference_time_s, opts.model_comparison) {
        out.push(Warning {
            kind: "option_without_effect",
            message: format!(
                "--at {} min has no effect {why}: it sets the common time of the \
                 Hantush–Bierschenk correction of a time series (and, with --case, the model's \
                 step duration).",
                text::sig(t / 60.0)
            ),
        });
    }
    out
}

/// Runs the analysis. Errors are bad input (exit 2); they name the file line where a step
/// or reading is at fault. The warnings of the outcome list the options given that have no
/// effect, then the solver's concerns (`boreflux_solver::steptest::checks`).
pub fn analyse(data: &StepData, opts: &Options) -> Result<Outcome, AnalysisError> {
    let mut outcome = fit(data, opts)?;
    let mut warnings = unused_options(data, opts);
    warnings.append(&mut outcome.warnings);
    outcome.warnings = warnings;
    Ok(outcome)
}

fn fit(data: &StepData, opts: &Options) -> Result<Outcome, AnalysisError> {
    let locate = |e: StepTestError| -> AnalysisError {
        let row = match &e {
            StepTestError::BadStep { step, .. } if matches!(data, StepData::Steps { .. }) => {
                Some(*step)
            }
            StepTestError::BadSample { row, .. } => Some(*row),
            _ => None,
        };
        AnalysisError::Fit {
            line: row.and_then(|r| data.line_of(r)),
            source: e,
        }
    };
    // The Jacob line through end-of-step drawdowns.
    let jacob_line = |steps: &[_]| -> Result<Outcome, AnalysisError> {
        let a = jacob::fit_steps(steps, opts.weighting, opts.confidence).map_err(locate)?;
        Ok(Outcome {
            method: "jacob",
            measured_m: steps.iter().map(|s| s.drawdown_m).collect(),
            fit: a.fit,
            figures: a.figures,
            series: None,
            power: None,
            warnings: Vec::new(),
        }
        .warn(&a.concerns)
        .with_power(opts.power))
    };
    match (data, opts.method) {
        (StepData::Steps { .. }, Method::Hantush) => Err(AnalysisError::HantushNeedsSeries),
        (StepData::Steps { steps, .. }, _) => jacob_line(steps),
        (StepData::Series { samples, .. }, Method::Jacob) => {
            let spans = series::split_steps(samples).map_err(locate)?;
            jacob_line(&series::end_of_step(samples, &spans))
        }
        (StepData::Series { samples, .. }, Method::Auto | Method::Hantush) => {
            let defaults = SeriesOptions::default();
            let o = SeriesOptions {
                weighting: opts.weighting,
                confidence: opts.confidence,
                skip_fraction: opts.skip_fraction.unwrap_or(defaults.skip_fraction),
                reference_time_s: opts.reference_time_s,
            };
            let a = hantush::fit_series(samples, &o).map_err(locate)?;
            let concerns = a.concerns.clone();
            Ok(Outcome {
                method: "hantush-bierschenk",
                measured_m: a.measured.iter().map(|s| s.drawdown_m).collect(),
                fit: a.corrected.fit.clone(),
                figures: a.corrected.figures.clone(),
                series: Some(a),
                power: None,
                warnings: Vec::new(),
            }
            .warn(&concerns)
            .with_power(opts.power))
        }
    }
}
