//! Command-line arguments (clap derive). Exit codes: 0 success, 1 runtime failure,
//! 2 bad input (usage, case file).

use clap::{Parser, Subcommand};
use std::path::PathBuf;

const AFTER_HELP: &str = "\
Exit codes: 0 success, 1 runtime failure, 2 bad input (usage, case file, an output that
exists without --force, a run over the size limits without --allow-large).
Sign convention: positive flow is outward, from the well into the formation; heads are
relative to the static water level.

CAUTION: results are estimates from a model with uncertain inputs. Development can
collapse a screen or casing, stick tools and damage the pack or formation. The judgement
of a licensed driller or engineer, the manufacturer's ratings and the local well
construction code govern.";

/// Simulates water-well development: oscillating radial flow through screen, filter pack,
/// wall cake, invaded zone and formation, and what reaches the borehole face.
#[derive(Debug, Parser)]
#[command(name = "boreflux", version, about, after_help = AFTER_HELP, propagate_version = true)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Simulate one case and write its results to HDF5.
    #[command(
        after_help = "Example:\n  boreflux run cases/municipal-sand-gravel.json -o out/municipal.h5 --csv"
    )]
    Run(RunArgs),
    /// Run many variants of one case in parallel and tabulate them, one row per scenario.
    #[command(after_help = SWEEP_HELP)]
    Sweep(SweepArgs),
    /// Join the tables of a sharded sweep (`sweep --shard`) into one.
    #[command(
        after_help = "Example:\n  boreflux merge out/part-1.h5 out/part-2.h5 out/part-3.h5 -o out/sweep"
    )]
    Merge(MergeArgs),
    /// Validate a case and print derived properties without simulating.
    #[command(
        after_help = "The run size printed is an upper estimate: the steps from the step settings \
(twice that under the adaptive scheme), the output from the storage choice. With \
\"envelopes\" storage the events are not known before the run, so every kind of event the \
case can raise is counted with all its output.event_windows windows (docs/formats.md, \
\"Run size\").\n\nExamples:\n  boreflux check cases/domestic-fine-sand-pvc.json\n  boreflux check cases/municipal-sand-gravel.json --annulus 60mm,80mm,100mm"
    )]
    Check(CheckArgs),
    /// Write a self-contained HTML report (SVG figures) from one or more result files.
    #[command(
        after_help = "Example:\n  boreflux report out/slow.h5 out/fast.h5 -o out/compare.html"
    )]
    Report(ReportArgs),
    /// Run the built-in verification against analytic and published solutions.
    #[command(after_help = "Example:\n  boreflux verify --json > verification.json")]
    Verify(VerifyArgs),
    /// Fit the well-loss coefficients B and C of a field step-drawdown test (CSV), with
    /// confidence intervals.
    #[command(after_help = STEPTEST_HELP)]
    Steptest(SteptestArgs),
    /// Fit free case parameters to a development log (drawdown readings), with intervals,
    /// correlation and what the records cannot constrain.
    #[command(after_help = CALIBRATE_HELP)]
    Calibrate(CalibrateArgs),
    /// Print a starter case file.
    #[command(
        after_help = "Examples:\n  boreflux new > my-case.json\n  boreflux new --scenario domestic-fine-sand-pvc > domestic.json\n  boreflux new --scenario irrigation-table -o wells/irrigation.json   # and the CSV it reads, beside it\n  boreflux new --list"
    )]
    New(NewArgs),
    /// Print the JSON Schema of the case file, or with --outputs the table of every output.
    #[command(
        after_help = "Examples:\n  boreflux schema > boreflux.schema.json\n  boreflux schema --outputs   # name, unit, description, how computed, where"
    )]
    Schema(SchemaArgs),
    /// Print shell completions.
    #[command(
        after_help = "Example:\n  boreflux completions bash > ~/.local/share/bash-completion/completions/boreflux"
    )]
    Completions {
        /// The shell.
        shell: clap_complete::Shell,
    },
}

/// Arguments of `run`.
#[derive(Debug, clap::Args)]
pub struct RunArgs {
    /// Case file (JSON).
    pub case: PathBuf,
    /// Output HDF5 file; written to a temporary file and renamed when complete.
    #[arg(short, long)]
    pub output: PathBuf,
    /// Also write the time series as CSV beside the HDF5 file (same name, .csv).
    #[arg(long)]
    pub csv: bool,
    /// Print the summary as JSON instead of a table.
    #[arg(long)]
    pub json: bool,
    /// No progress bar.
    #[arg(short, long)]
    pub quiet: bool,
    /// Store a head profile every N steps (0 = about 200 over the run).
    #[arg(long, default_value_t = 0)]
    pub snapshot_every: u64,
    /// Replace output files that already exist (without it an existing output is refused).
    #[arg(long)]
    pub force: bool,
    /// Run even when the up-front estimate is over the limits (5e8 cell-steps or 2 GB of
    /// output; `boreflux check` prints the estimate).
    #[arg(long)]
    pub allow_large: bool,
}

const SWEEP_HELP: &str = "\
VALUES is a list (10,20,30 or \"0.3 m,0.6 m\" or sinusoidal,trapezoidal) or a range:
A..B:N gives N values evenly spaced from A to B, A..B:N:log evenly spaced in log; A and B
may carry a unit (\"0.3 m..0.9 m:4\"). PATH is dot-separated keys into the case file, a
number indexing an array (drive.stages.1.drive.stroke). Several --vary make a Cartesian
product; the last one changes fastest. Every scenario is checked before any is run.

Examples:
  boreflux sweep cases/municipal-sand-gravel.json -o out/rate \\
      --vary drive.strokes_per_minute=10..40:4
  boreflux sweep cases/swab-deep.json -o out/swab \\
      --vary drive.stroke=\"2 m,4 m,6 m\" --vary drive.lift_rate=0.5,1,1.5
  boreflux sweep CASE --vary ... -o out/part-2 --shard 2/8
  boreflux merge out/part-*.h5 -o out/all

Sampled sweeps (uncertainty runs) draw N scenarios instead of a grid: --sample
PATH=DISTRIBUTION per input, with --samples N and --seed S (and --design lhs, the
default, or random). The sample is a function of (distributions, design, N, seed) only,
so shards of one sampled sweep merge to exactly the unsharded table. DISTRIBUTION is
  uniform(A, B)               loguniform(A, B)             triangular(MIN, MODE, MAX)
  normal(MEAN, SD)            lognormal(MEDIAN, SDLN)      (SDLN: sd of ln X, no unit)
normal and lognormal take bounds: normal(0.3 m, 0.1 m, min=0.05 m, max=0.6 m). The
numbers of one distribution share one unit. --sample-file reads the same from JSON:
  {\"design\": \"lhs\", \"samples\": 200, \"seed\": 7, \"inputs\": [
     {\"path\": \"pack.conductivity\", \"distribution\": \"lognormal(8e-3 m/s, 0.7)\"}]}

Examples:
  boreflux sweep cases/municipal-sand-gravel.json -o out/mc --samples 200 --seed 7 \\
      --sample \"pack.conductivity=lognormal(8e-3 m/s, 0.7, max=0.1 m/s)\" \\
      --sample \"drive.stroke=triangular(0.3 m, 0.6 m, 0.9 m)\"
  boreflux sweep CASE --sample-file mc.json -o out/mc-3 --shard 3/16";

/// Arguments of `sweep`.
#[derive(Debug, clap::Args)]
pub struct SweepArgs {
    /// Case file (JSON) every scenario starts from.
    pub case: PathBuf,
    /// A case-file value to vary, and its values (see below); repeat for a Cartesian product.
    #[arg(
        long = "vary",
        value_name = "PATH=VALUES",
        required_unless_present_any = ["sample", "sample_file"],
        conflicts_with_all = ["sample", "sample_file"]
    )]
    pub vary: Vec<String>,
    /// A case-file value to draw from a distribution (see below); repeat for more inputs.
    #[arg(long = "sample", value_name = "PATH=DISTRIBUTION")]
    pub sample: Vec<String>,
    /// A JSON file of sampled inputs (and optionally design, samples, seed; see below).
    #[arg(long, value_name = "FILE")]
    pub sample_file: Option<PathBuf>,
    /// Number of sampled scenarios.
    #[arg(long, value_name = "N")]
    pub samples: Option<usize>,
    /// Seed of the sample's generator (any whole number from 0 to 2^64 − 1).
    #[arg(long, value_name = "S")]
    pub seed: Option<u64>,
    /// How the sample is drawn: lhs (Latin hypercube) or random [default: lhs].
    #[arg(long, value_name = "DESIGN")]
    pub design: Option<String>,
    /// Output name: NAME.csv and NAME.h5 are written (a .csv or .h5 ending is dropped),
    /// each to a temporary file renamed when complete.
    #[arg(short, long, value_name = "NAME")]
    pub output: PathBuf,
    /// Run only shard K of N: the scenarios whose index modulo N is K − 1.
    #[arg(long, value_name = "K/N")]
    pub shard: Option<String>,
    /// Scenarios run at once [default: the number of processors].
    #[arg(short, long)]
    pub jobs: Option<usize>,
    /// No progress bar.
    #[arg(short, long)]
    pub quiet: bool,
    /// Replace output files that already exist (without it an existing output is refused).
    #[arg(long)]
    pub force: bool,
    /// Run even when the up-front estimate is over the limits (5e8 cell-steps or 2 GB of
    /// output; `boreflux check` prints the estimate).
    #[arg(long)]
    pub allow_large: bool,
}

/// Arguments of `merge`.
#[derive(Debug, clap::Args)]
pub struct MergeArgs {
    /// Tables (.h5) written by `boreflux sweep --shard`.
    #[arg(required = true)]
    pub inputs: Vec<PathBuf>,
    /// Output name: NAME.csv and NAME.h5 are written (a .csv or .h5 ending is dropped).
    #[arg(short, long, value_name = "NAME")]
    pub output: PathBuf,
    /// Write the table even when scenarios are missing (their rows are left out).
    #[arg(long)]
    pub partial: bool,
    /// Replace output files that already exist (without it an existing output is refused).
    #[arg(long)]
    pub force: bool,
}

/// Arguments of `check`.
#[derive(Debug, clap::Args)]
pub struct CheckArgs {
    /// Case file (JSON).
    pub case: PathBuf,
    /// Compare annulus widths (pack thickness), e.g. `60mm,80mm,100mm`: runs the case for
    /// each (at most 5 cycles) and prints face flux and cake work per cycle.
    #[arg(long, value_delimiter = ',')]
    pub annulus: Vec<String>,
    /// Print the derived properties as JSON.
    #[arg(long)]
    pub json: bool,
}

/// Arguments of `report`.
#[derive(Debug, clap::Args)]
pub struct ReportArgs {
    /// Result files written by `boreflux run`, or sweep tables written by `boreflux sweep`
    /// (one alone, or several grid sweeps varying the same first parameter, compared).
    #[arg(required = true)]
    pub inputs: Vec<PathBuf>,
    /// Output HTML file.
    #[arg(short, long)]
    pub output: PathBuf,
    /// Title of the report page (default: "Well development simulation report", or the
    /// sweep page's own heading).
    #[arg(long)]
    pub title: Option<String>,
    /// Replace output files that already exist (without it an existing output is refused).
    #[arg(long)]
    pub force: bool,
}

const STEPTEST_HELP: &str = "\
The file is CSV with units in the header, either one row per step or the readings of the
whole test (time from the start of pumping; a rate change takes effect at the last reading
at the old rate):
  rate_L/s,drawdown_m                 (Jacob: drawdown at the end of each step)
  time_min,rate_L/s,drawdown_m        (Hantush–Bierschenk by default)
Columns: time_<s|min|h|d>, rate_<m3/s|L/s|m3/h|gpm|...>, drawdown_<m|cm|mm|in|ft>; a bare
name is SI. Lines starting with # are comments. At least 3 steps are needed: 2 steps fix B
and C exactly and leave nothing to estimate their uncertainty from.
The fitted numbers are printed as the least-squares fit gives them; warnings (in the table,
the JSON's `warnings` and the HTML page) flag what the fit cannot vouch for: C or B below
zero, a step efficiency outside 0-100 %, repeated or falling rates, a --at time outside the
readings, and options that have no effect on the file given (docs/step-test.md §4a).

Examples:
  boreflux steptest cases/step-tests/demo-series.csv
  boreflux steptest cases/step-tests/demo-series.csv --json > steptest.json
  boreflux steptest cases/step-tests/demo-series.csv --at \"30 min\" --skip 0.4
  boreflux steptest cases/step-tests/demo-steps.csv -o out/steptest.html --force";

/// Arguments of `steptest`.
#[derive(Debug, clap::Args)]
pub struct SteptestArgs {
    /// Step-test file (CSV, units in the header; see below).
    pub input: PathBuf,
    /// Write a self-contained HTML page with the s/Q plot; written to a temporary file and
    /// renamed when complete.
    #[arg(short, long)]
    pub output: Option<PathBuf>,
    /// Replace the output file if it exists.
    #[arg(long)]
    pub force: bool,
    /// Print the result as JSON (SI units) instead of a table.
    #[arg(long)]
    pub json: bool,
    /// Analysis: auto = Hantush–Bierschenk for a time series, Jacob for one row per step.
    #[arg(long, value_enum, default_value = "auto")]
    pub method: crate::steptest::Method,
    /// Weights of the line s/Q = B + C Q: equal (every step alike), or drawdown (the
    /// measured drawdown has the same error at every step; weights Q²).
    #[arg(long, value_enum, default_value = "equal")]
    pub weights: WeightsArg,
    /// Confidence level of the intervals.
    #[arg(long, default_value_t = 0.95)]
    pub confidence: f64,
    /// Time series (Hantush–Bierschenk): fraction of each step left out of the series fit at
    /// its start; default 0.25 (an assumption; raise it when well-bore storage lasts
    /// longer). No effect on a file of one row per step or with --method jacob (a warning
    /// says so).
    #[arg(long, value_name = "FRACTION")]
    pub skip: Option<f64>,
    /// Time series (Hantush–Bierschenk): common pumping time the steps are corrected to; the
    /// unit is required ("60 min", "1.5 h", "900 s"). Default: the shortest step. A time
    /// outside the readings fitted is warned about. Without --case, no effect on a file of
    /// one row per step or with --method jacob (a warning says so); with --case it is the
    /// model's step duration there.
    #[arg(long, value_name = "TIME")]
    pub at: Option<String>,
    /// Also fit the power law s = B Q + C Q^n (Rorabaugh) to the same steps (4 or more).
    #[arg(long)]
    pub power: bool,
    /// A case file of the same well: its model's virtual step test at the field rates and
    /// step duration (as built and after the case's development run) is shown beside the
    /// field fit.
    #[arg(long, value_name = "CASE")]
    pub case: Option<PathBuf>,
}

/// Weighting of the step line (see `--weights`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum WeightsArg {
    /// Every step counts the same.
    Equal,
    /// Weights Q²: the same drawdown error at every step.
    Drawdown,
}

const CALIBRATE_HELP: &str = "\
The log is CSV with units in the header, one row per reading; a row's activity (pump,
develop, rest) and rate hold until the next row, and the last row is `end`:
  time_min,activity,rate_L/s,drawdown_m[,turbidity_NTU][,sand_mg/L]
The case's drive is the development device used on `develop` rows. Free parameters are
case paths with bounds in the case's units; conductivities, storages, strengths,
erodibilities and pressures are fitted on a log scale unless `:linear` is added.

Each value is shown in the case's unit and labelled: constrained, weakly constrained (the
interval spans more than a decade, or more than ±50 % on a linear scale), near bound (the
interval crosses a bound), at bound (within 1 % of the range of a bound: widen it if it is
not physical), not constrained (the log does not fix it) or not converged. Intervals that
cross a bound are kept and say so. --write-case keeps the case's key order, writes six
significant digits and records the calibration in the description.

Exit codes: 0 the fit converged; 1 it did not converge (the outputs are still written and
say so; raise --max-runs) or a model run failed; 2 bad input.

Example:
  boreflux calibrate cases/calibration/pilot-well.json cases/calibration/pilot-log.csv \\
    --free 'formation.conductivity=1e-5 m/s..1e-2 m/s' \\
    --free 'formation.specific_storage=1e-6 1/m..1e-3 1/m' \\
    --free 'cake.conductivity=1e-8 m/s..1e-4 m/s' \\
    -o out/calibration.html --write-case out/pilot-calibrated.json";

/// Arguments of `calibrate`.
#[derive(Debug, clap::Args)]
pub struct CalibrateArgs {
    /// Case file of the well; its drive is the development device of `develop` rows.
    pub case: PathBuf,
    /// Development log (CSV, units in the header; see below).
    pub log: PathBuf,
    /// A free parameter: PATH=LOW..HIGH[:log|:linear], e.g.
    /// 'formation.conductivity=1e-5 m/s..1e-2 m/s'. Repeat for each.
    #[arg(long = "free", value_name = "PATH=LOW..HIGH", required = true)]
    pub free: Vec<String>,
    /// Write a self-contained HTML page with the fit and its residuals.
    #[arg(short, long)]
    pub output: Option<PathBuf>,
    /// Write the calibrated case file (the input case with the fitted values).
    #[arg(long, value_name = "FILE")]
    pub write_case: Option<PathBuf>,
    /// Replace output files that exist.
    #[arg(long)]
    pub force: bool,
    /// Print the result as JSON (SI units) instead of a table.
    #[arg(long)]
    pub json: bool,
    /// Confidence level of the intervals.
    #[arg(long, default_value_t = 0.95)]
    pub confidence: f64,
    /// Field step test before development (one row per step: `rate_L/s,drawdown_m` or other
    /// units, the drawdown at the end of each step), compared with the model's step test on
    /// the well at the start of the log.
    #[arg(long, value_name = "CSV")]
    pub steps_before: Option<PathBuf>,
    /// Field step test after development, compared with the model's on the well at the end
    /// of the log.
    #[arg(long, value_name = "CSV")]
    pub steps_after: Option<PathBuf>,
    /// Step duration of the step tests, with a unit ("100 min"); default: the case's
    /// assessment.step_duration.
    #[arg(long, value_name = "TIME")]
    pub step_duration: Option<String>,
    /// Also compute profile intervals (each side: the others refitted with the parameter
    /// held, until the residual sum of squares reaches the F-test threshold); costs many
    /// more model runs. Where they differ from the Jacobian intervals, believe the profile.
    #[arg(long)]
    pub profile: bool,
    /// Threads for the model runs of the Jacobian (default: all cores).
    #[arg(long)]
    pub jobs: Option<usize>,
    /// Most model runs along the fit's path (the Jacobian's runs not counted).
    #[arg(long, default_value_t = 100)]
    pub max_runs: usize,
}

/// Arguments of `verify`.
#[derive(Debug, clap::Args)]
pub struct VerifyArgs {
    /// Print the results as JSON.
    #[arg(long)]
    pub json: bool,
}

/// Arguments of `new`.
#[derive(Debug, clap::Args)]
pub struct NewArgs {
    /// Shipped scenario to start from (see --list).
    #[arg(long, default_value = "municipal-sand-gravel")]
    pub scenario: String,
    /// List the scenarios.
    #[arg(long)]
    pub list: bool,
    /// Write the case to this file instead of printing it, with any file the scenario reads
    /// (a table drive's CSV) beside it under its own name.
    #[arg(short, long, value_name = "FILE")]
    pub output: Option<std::path::PathBuf>,
    /// Replace existing files.
    #[arg(long)]
    pub force: bool,
}

#[cfg(test)]
mod tests {
    use super::*;
    use clap::CommandFactory;

    #[test]
    fn cli_definition_is_consistent() {
        Cli::command().debug_assert();
    }
}

/// Arguments of `schema`.
#[derive(Debug, clap::Args)]
pub struct SchemaArgs {
    /// Print the output schema (every series, cycle value and summary figure a run writes)
    /// as Markdown tables instead of the case file's JSON Schema.
    #[arg(long)]
    pub outputs: bool,
}
