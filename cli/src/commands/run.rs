//! `boreflux run`: load, simulate with progress, stream results to HDF5 (and CSV), then
//! write the summary and print it. Nothing partial is left under the output name.
//!
//! Two guards keep the user's files safe. Before any output is created, the output names
//! are compared with the case file and every file the case reads (a table drive's `file`,
//! also inside schedule stages): a run never writes over its own input (exit 2). While the
//! run goes, Ctrl-C (SIGINT) or SIGTERM stops it after the current step; the writers are
//! then dropped unfinished, which deletes their temporary files, and the run fails with
//! exit 1 (docs/formats.md: 0 success, 1 runtime failure, 2 bad input).

use super::interrupt::{catch_interrupts, interrupted, INTERRUPTED_MESSAGE};
use super::outputs::{check_output, same_file_key};
use super::{print_out, Failure};
use crate::args::RunArgs;
use crate::case::Storage;
use crate::case::{load_case, LoadedCase};
use crate::output::envelope::EnvelopePlan;
use crate::output::events::EventPlan;
use crate::output::relay::{relay, Consumer, Fed, Made};
use crate::output::schema::{
    figure_values, GridData, Group, JumpSeries, ProgressSeries, RootAttr, SummaryText,
};
use crate::output::sink::{ResultSink, Snapshots};
use crate::summary::{assessment_from, headline, table, watch_limits, Headline, Tracker};
use anyhow::{anyhow, Context};
use boreflux_solver::assess::progress::{LossGauge, ProgressPoint};
use boreflux_solver::assess::Baseline;
use boreflux_solver::drive::Drive;
use boreflux_solver::grid::Grid;
use boreflux_solver::model::{Model, Multiscale};
use boreflux_solver::safety::CAUTION;
use boreflux_solver::slow::SlowState;
use boreflux_solver::system::Discretization;
use boreflux_solver::{
    run as simulate, CycleView, JumpView, Reporting, SolverError, StepObserver, StepView,
};
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use serde_json::Value;
use std::path::{Path, PathBuf};

/// Steps between progress-bar updates.
const PROGRESS_EVERY: u64 = 256;

/// Points of the development-progress series (docs/formats.md, `/progress`).
const PROGRESS_POINTS: usize = 100;

/// Specific capacity and efficiency during the run, from the cheap estimate of
/// `assess::progress` at evenly spaced times (the first report at or after each). The
/// near-well losses are recorded while the undamaged well's test runs beside the run; the
/// points are formed from both afterwards.
struct Progress {
    gauge: LossGauge,
    next_s: f64,
    every_s: f64,
    time_s: Vec<f64>,
    loss_m: Vec<f64>,
    points: Vec<ProgressPoint>,
}

impl Progress {
    fn record(&mut self, time_s: f64, slow: &SlowState) {
        self.time_s.push(time_s);
        self.loss_m.push(self.gauge.loss_m(slow));
    }

    /// The points from the undamaged well's drawdown; none when its test failed.
    fn finish(&mut self, undamaged_drawdown_m: Option<f64>) {
        match undamaged_drawdown_m {
            Some(s0) => {
                let g = &self.gauge;
                self.points = self.loss_m.iter().map(|&l| g.point(s0, l)).collect();
            }
            None => self.time_s.clear(),
        }
    }

    fn on_step(&mut self, s: &StepView<'_>) {
        if s.time_s >= self.next_s {
            self.record(s.time_s, s.slow);
            while self.next_s <= s.time_s {
                self.next_s += self.every_s;
            }
        }
    }
}

/// Everything the run observes, in one observer, on the solver's thread: Ctrl-C, the
/// extremes, the progress points (they read the slow state) and the bar; the output goes
/// to `out`, the sink itself or the relay to its thread.
struct Observers<'a, O: ?Sized> {
    out: &'a mut O,
    tracker: &'a mut Tracker,
    progress: &'a mut Progress,
    bar: &'a ProgressBar,
    duration_s: f64,
    /// Jumps over whole cycles (`numerics.multiscale`).
    jumps: &'a mut Vec<JumpView>,
}

impl<O: StepObserver + ?Sized> StepObserver for Observers<'_, O> {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        if interrupted() {
            return false;
        }
        self.tracker.on_step(s);
        self.progress.on_step(s);
        if s.step % PROGRESS_EVERY == 0 {
            self.bar
                .set_position((1000.0 * s.time_s / self.duration_s) as u64);
        }
        self.out.on_step(s)
    }

    fn on_cycle(&mut self, c: &CycleView) {
        if !self.bar.is_hidden() {
            self.bar.set_message(format!("cycle {}", c.index + 1));
        }
        self.out.on_cycle(c);
    }

    fn on_jump(&mut self, j: &JumpView) {
        self.jumps.push(*j);
        self.out.on_jump(j);
    }
}

fn progress_bar(quiet: bool) -> ProgressBar {
    let bar = ProgressBar::new(1000);
    if quiet {
        bar.set_draw_target(ProgressDrawTarget::hidden());
    }
    bar.set_style(
        ProgressStyle::with_template("{spinner} simulated {percent:>3}% [{bar:30}] {msg} elapsed {elapsed_precise}, eta {eta}")
            .expect("valid template")
            .progress_chars("=> "),
    );
    bar
}

/// Everything the output file is opened with, owned, so that the output thread can open it
/// while the run starts (`output/relay.rs`, [`Made`]): the sink's layout and the file's
/// metadata (root attributes and grid).
struct SinkPlan {
    path: PathBuf,
    csv: Option<PathBuf>,
    cells: usize,
    snapshot_every: u64,
    envelopes: Option<EnvelopePlan>,
    events: EventPlan,
    root: Vec<(RootAttr, String)>,
    grid: Vec<(GridData, Vec<f64>)>,
}

/// Why the output could not be opened.
enum OpenError {
    /// The file could not be created (a bad output path: an input error).
    Create(crate::output::OutputError),
    /// Its metadata could not be written.
    Metadata(crate::output::OutputError),
}

impl SinkPlan {
    fn new(
        case: &LoadedCase,
        args: &RunArgs,
        grid: &Grid,
        csv: Option<PathBuf>,
        snapshot_every: u64,
    ) -> SinkPlan {
        let cells = grid.cells();
        let root = RootAttr::ALL
            .into_iter()
            .map(|attr| {
                let value = match attr {
                    RootAttr::ToolVersion => env!("CARGO_PKG_VERSION").to_owned(),
                    RootAttr::CreatedUtc => {
                        humantime::format_rfc3339_seconds(std::time::SystemTime::now()).to_string()
                    }
                    RootAttr::Title => case.title.clone(),
                    RootAttr::Description => case.description.clone(),
                    RootAttr::CaseJson => case.resolved.to_string(),
                    RootAttr::CaseFile => args.case.display().to_string(),
                };
                (attr, value)
            })
            .collect();
        let grid_data = GridData::ALL
            .into_iter()
            .map(|data| {
                let values: Vec<f64> = match data {
                    GridData::RCenter => grid.r_center.clone(),
                    GridData::RFace => grid.r_face.clone(),
                    GridData::Zone => grid.zone.iter().map(|&z| z as u8 as f64).collect(),
                };
                (data, values)
            })
            .collect();
        SinkPlan {
            path: args.output.clone(),
            csv,
            cells,
            snapshot_every,
            envelopes: envelope_plan(case),
            events: event_plan(case),
            root,
            grid: grid_data,
        }
    }

    /// Creates the file and writes its metadata.
    fn open(self) -> Result<ResultSink, OpenError> {
        let mut sink = ResultSink::create(
            &self.path,
            self.csv.as_deref(),
            self.cells,
            self.snapshot_every,
            self.envelopes,
            self.events,
        )
        .map_err(OpenError::Create)?;
        let w = sink.writer();
        for (attr, value) in &self.root {
            w.set_root_attr_str(attr.name(), value)
                .map_err(OpenError::Metadata)?;
        }
        for (data, values) in &self.grid {
            let e = data.entry();
            w.write_vector(&data.path(), values, e.unit.symbol(), &e.description)
                .map_err(OpenError::Metadata)?;
        }
        Ok(sink)
    }
}

impl OpenError {
    fn failure(self, output: &Path) -> Failure {
        match self {
            OpenError::Create(e) => {
                Failure::Input(anyhow!("cannot write output {}: {e}", output.display()))
            }
            OpenError::Metadata(e) => Failure::Runtime(e.into()),
        }
    }
}

fn write_summary(sink: &mut ResultSink, h: &Headline) -> Result<(), crate::output::OutputError> {
    let w = sink.writer();
    let summary = Group::Summary.path();
    w.group(&summary)?;
    // A figure that was not computed is left out (the report shows a dash).
    let figures: Vec<(String, f64)> = figure_values(h)
        .into_iter()
        .filter_map(|(figure, value)| value.map(|x| (figure.name(), x)))
        .collect();
    w.set_attrs_f64(&summary, &figures)?;
    for text in SummaryText::ALL {
        let value = match text {
            SummaryText::Warnings => h.warnings.join("\n"),
            SummaryText::Cautions => CAUTION.to_owned(),
            SummaryText::EfficiencyDefinition => crate::summary::EFFICIENCY_DEFINITION.to_owned(),
            SummaryText::Assumptions => h.assumptions.join("\n"),
            // The case's notes, then how the collapse ratings were found (the line `check`
            // prints), so that a report can trace the ratings it shows.
            SummaryText::Notes => h
                .notes
                .iter()
                .cloned()
                .chain(std::iter::once(format!(
                    "collapse ratings: {}",
                    h.collapse_rating_basis
                )))
                .collect::<Vec<_>>()
                .join("\n"),
        };
        w.set_attr_str(&summary, text.name(), &value)?;
    }
    Ok(())
}

/// Writes the `/progress` group: specific capacity and efficiency during the run
/// (docs/formats.md). Nothing when the virtual tests failed.
fn write_progress(sink: &mut ResultSink, p: &Progress) -> Result<(), crate::output::OutputError> {
    if p.points.is_empty() {
        return Ok(());
    }
    let w = sink.writer();
    w.group(&Group::Progress.path())?;
    for series in ProgressSeries::ALL {
        let values: Vec<f64> = match series {
            ProgressSeries::Time => p.time_s.clone(),
            ProgressSeries::SpecificCapacity => {
                p.points.iter().map(|x| x.specific_capacity_m2_s).collect()
            }
            ProgressSeries::Efficiency => p.points.iter().map(|x| x.efficiency).collect(),
        };
        let e = series.entry();
        w.write_vector(&series.path(), &values, e.unit.symbol(), &e.description)?;
    }
    Ok(())
}

/// Writes the `/jumps` group (docs/formats.md) when the case jumps over cycles.
fn write_jumps(
    sink: &mut ResultSink,
    model: &Model,
    jumps: &[JumpView],
) -> Result<(), crate::output::OutputError> {
    if model.numerics.multiscale == Multiscale::Off {
        return Ok(());
    }
    let w = sink.writer();
    w.group(&format!("/{}", JumpSeries::GROUP))?;
    for series in JumpSeries::ALL {
        let values: Vec<f64> = jumps.iter().map(|j| series.value(j)).collect();
        let e = series.entry();
        w.write_vector(&series.path(), &values, e.unit.symbol(), &e.description)?;
    }
    Ok(())
}

/// How the run's output is fed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Feed {
    /// On the solver's thread.
    Direct,
    /// On a thread of its own (`output/relay.rs`).
    Relay,
}

impl Feed {
    /// The relay when the machine has a second core; on one core it would only add the
    /// copies and the switches between the threads.
    fn for_machine() -> Feed {
        if cores() >= 2 {
            Feed::Relay
        } else {
            Feed::Direct
        }
    }
}

/// Runs the command.
pub fn run(a: &RunArgs) -> Result<(), Failure> {
    print_out(&run_fed(a, Feed::for_machine())?)
}

/// Runs the command with the output fed as `feed` says; returns what it prints.
fn run_fed(a: &RunArgs, feed: Feed) -> Result<String, Failure> {
    let case =
        load_case(&a.case).map_err(|e| Failure::Input(anyhow!("{}: {e}", a.case.display())))?;
    let model = &case.model;
    let grid = Discretization::new(model, None).grid;
    let snapshot_every = if a.snapshot_every > 0 {
        a.snapshot_every
    } else {
        // About 200 profiles: the step count's upper bound is close for the usual cases.
        boreflux_solver::cost::estimate(model)
            .steps
            .min(u64::MAX as f64) as u64
            / 200
            + 1
    };
    let csv_path = a.csv.then(|| a.output.with_extension("csv"));
    refuse_overwriting_inputs(&a.case, &a.output, csv_path.as_deref()).map_err(Failure::Input)?;
    check_output(&a.output, "-o/--output", a.force).map_err(Failure::Input)?;
    if let Some(csv) = &csv_path {
        check_output(csv, "--csv", a.force).map_err(Failure::Input)?;
    }
    let cost = crate::cost::run_cost(&case, a.csv, a.snapshot_every);
    crate::cost::refuse_large(&cost, a.allow_large).map_err(Failure::Input)?;
    catch_interrupts();
    let plan = SinkPlan::new(&case, a, &grid, csv_path.clone(), snapshot_every);
    // With the relay the output thread opens the file while the run starts; fed directly,
    // it is opened here.
    let output = match feed {
        Feed::Direct => Made::Ready(plan.open().map_err(|e| e.failure(&a.output))?),
        Feed::Relay => Made::later(move || plan.open(), Snapshots::every(snapshot_every)),
    };
    let mut tracker = Tracker::new(model);
    let bar = progress_bar(a.quiet);
    let points = PROGRESS_POINTS + 2;
    let mut progress = Progress {
        gauge: LossGauge::new(model, case.assessment.design_rate_m3_s),
        next_s: model.duration_s / PROGRESS_POINTS as f64,
        every_s: model.duration_s / PROGRESS_POINTS as f64,
        time_s: Vec::with_capacity(points),
        loss_m: Vec::with_capacity(points),
        points: Vec::new(),
    };
    progress.record(0.0, &SlowState::new(model));
    let started = std::time::Instant::now();
    let mut jumps = Vec::new();
    let step = || {
        let mut time_loop = |out: &mut dyn StepObserver| {
            let mut obs = Observers {
                out,
                jumps: &mut jumps,
                tracker: &mut tracker,
                progress: &mut progress,
                bar: &bar,
                duration_s: model.duration_s,
            };
            simulate(
                model,
                &mut obs,
                Reporting {
                    // Envelopes see every step; `numerics.output_every` thins steps only.
                    every: match case.storage {
                        Storage::Steps => case.output_every,
                        Storage::Envelopes { .. } => 1,
                    },
                },
            )
        };
        // The series are written out (`Consumer::end`: the last chunks, the datasets
        // shorter than a chunk) while the tests below, and with the relay those of the well
        // at the end, still run.
        match output {
            Made::Ready(mut sink) => {
                let result = time_loop(&mut sink);
                if result.is_ok() && !interrupted() {
                    sink.end();
                }
                (result, Fed::ready(Made::Ready(sink)))
            }
            pending => relay(pending, |r| {
                let result = time_loop(r);
                if result.is_ok() && !interrupted() {
                    r.complete();
                }
                result
            }),
        }
    };
    let ((result, fed), baseline) = beside(step, || Baseline::new(model, &case.assessment));
    bar.finish_and_clear();
    if interrupted() {
        // Returning drops the unfinished sink (`Fed` waits for its thread), which deletes
        // both temporary files.
        return Err(Failure::Runtime(anyhow!(INTERRUPTED_MESSAGE)));
    }
    let writing = |e: &dyn std::fmt::Display| {
        Failure::Runtime(anyhow!("writing {}: {e}", a.output.display()))
    };
    // The sink back from the output thread, or why it failed: not opened, or a write.
    let take_back = |fed: Fed<Made<ResultSink, OpenError>>| -> Result<ResultSink, Failure> {
        let made = fed.join().map_err(|e| writing(&e))?;
        let mut sink = made.into_result().map_err(|e| match e {
            Some(e) => e.failure(&a.output),
            None => writing(&"the output was never opened"),
        })?;
        match sink.error.take() {
            Some(e) => Err(writing(&e)),
            None => Ok(sink),
        }
    };
    // A failed write or a failed run is reported at once; else the sink is taken back only
    // after the tests of the well at the end, which run while it writes.
    let fed = if result.is_err() || fed.failed() {
        Fed::ready(Made::Ready(take_back(fed)?))
    } else {
        fed
    };
    let summary = result.map_err(|e| match e {
        SolverError::InvalidInput { .. } => Failure::Input(anyhow!("{}: {e}", a.case.display())),
        e => Failure::Runtime(anyhow!("simulation failed: {e}")),
    })?;
    if progress.time_s.last() != Some(&summary.end_time_s) {
        progress.record(summary.end_time_s, &summary.final_state);
    }
    progress.finish(baseline.undamaged_drawdown_m.as_ref().ok().copied());
    let assessed = assessment_from(&case, &baseline, &summary);
    let mut sink = take_back(fed)?;
    let h = headline(&case, &summary, &tracker, &assessed);
    write_summary(&mut sink, &h).map_err(|e| Failure::Runtime(e.into()))?;
    write_progress(&mut sink, &progress).map_err(|e| Failure::Runtime(e.into()))?;
    write_jumps(&mut sink, model, &jumps).map_err(|e| Failure::Runtime(e.into()))?;
    if interrupted() {
        return Err(Failure::Runtime(anyhow!(INTERRUPTED_MESSAGE)));
    }
    sink.finish()
        .with_context(|| format!("finishing {}", a.output.display()))
        .map_err(Failure::Runtime)?;
    let elapsed = started.elapsed().as_secs_f64();
    if a.json {
        let text = serde_json::to_string_pretty(&h).map_err(|e| Failure::Runtime(e.into()))?;
        Ok(text + "\n")
    } else {
        let head = format!(
            "{}\n  results: {}{} ({:.2} s wall time)\n\n",
            if case.title.is_empty() {
                "boreflux run"
            } else {
                &case.title
            },
            a.output.display(),
            csv_path
                .map(|p| format!(", {}", p.display()))
                .unwrap_or_default(),
            elapsed
        );
        Ok(head + &table(&h) + "\nCaution: " + CAUTION + "\n")
    }
}

/// Runs `main` and `side` at once, `side` on a scoped thread when the machine has a second
/// core, else one after the other; both results come back.
fn beside<A, B: Send>(main: impl FnOnce() -> A, side: impl FnOnce() -> B + Send) -> (A, B) {
    if cores() < 2 {
        let b = side();
        return (main(), b);
    }
    std::thread::scope(|scope| {
        let handle = scope.spawn(side);
        let a = main();
        let b = handle
            .join()
            .unwrap_or_else(|panic| std::panic::resume_unwind(panic));
        (a, b)
    })
}

/// The cores the process may use.
fn cores() -> usize {
    std::thread::available_parallelism().map_or(1, std::num::NonZeroUsize::get)
}

/// Refuses output names that are the case file or a file the case reads, before anything
/// is created: `--csv` next to `-o table.h5` would otherwise replace `table.csv`. Also
/// refuses `-o x.csv --csv`, where both writers would share one file.
pub(super) fn refuse_overwriting_inputs(
    case: &Path,
    output: &Path,
    csv: Option<&Path>,
) -> Result<(), anyhow::Error> {
    let base = case
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let text = crate::case::read_limited(case, crate::case::MAX_CASE_BYTES, "case file")
        .map_err(|e| anyhow!("{e}"))?;
    let value: Value =
        crate::case::read_json(&text).map_err(|e| anyhow!("{}: {e}", case.display()))?;
    let mut inputs = vec![(case.to_path_buf(), "the case file itself".to_owned())];
    let mut files = Vec::new();
    if let Some(drive) = value.get("drive") {
        drive_files(drive, &mut files);
    }
    inputs.extend(files.into_iter().map(|f| {
        let what = format!("a file the case reads (drive file \"{f}\")");
        (base.join(f), what)
    }));
    let outputs = [
        (
            Some(output),
            "-o/--output",
            "is",
            "choose another name with -o/--output",
        ),
        (
            csv,
            "--csv",
            "would write",
            "choose another -o/--output name (the CSV takes its name, with .csv) or leave out \
             --csv",
        ),
    ];
    if let Some(csv) = csv.filter(|c| same_file_key(c) == same_file_key(output)) {
        return Err(anyhow!(
            "--csv would write {}, the same file as -o/--output; give -o/--output a name that \
             does not end in .csv (the CSV takes it, with .csv). Nothing was written",
            csv.display()
        ));
    }
    for (path, flag, verb, advice) in outputs {
        let Some(path) = path else { continue };
        let key = same_file_key(path);
        if let Some((_, what)) = inputs.iter().find(|(p, _)| same_file_key(p) == key) {
            return Err(anyhow!(
                "{flag} {verb} {}, which is {what}; {advice}. Nothing was written",
                path.display()
            ));
        }
    }
    Ok(())
}

/// Every string value of a `file` key in the `drive` section, at any depth (schedule
/// stages hold drives of their own).
fn drive_files(v: &Value, out: &mut Vec<String>) {
    match v {
        Value::Object(map) => {
            for (k, x) in map {
                match (k.as_str(), x) {
                    ("file", Value::String(f)) => out.push(f.clone()),
                    _ => drive_files(x, out),
                }
            }
        }
        Value::Array(items) => items.iter().for_each(|x| drive_files(x, out)),
        _ => {}
    }
}

/// Where an "envelopes" run keeps every step (docs/formats.md, "Storage choice"); None when
/// the case keeps every step.
fn envelope_plan(case: &LoadedCase) -> Option<EnvelopePlan> {
    let Storage::Envelopes {
        period_s,
        detail_cycles,
        event_windows,
    } = case.storage
    else {
        return None;
    };
    Some(EnvelopePlan {
        detail_cycles,
        detail_from_s: case.model.duration_s - detail_cycles as f64 * period_s,
        event_windows,
    })
}

/// What marks the run's events (docs/formats.md, "Events"): the limits of the warnings of
/// `summary::headline` and the stage starts.
fn event_plan(case: &LoadedCase) -> EventPlan {
    let model = &case.model;
    let stage_starts_s = match &model.drive {
        Drive::Schedule(stages) => stages
            .iter()
            .map(|s| s.start_s)
            .filter(|&t| t > 0.0)
            .collect(),
        _ => Vec::new(),
    };
    EventPlan {
        model: model.clone(),
        limits: watch_limits(case),
        stage_starts_s,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::output::relay::BATCH_MESSAGES;
    use hdf5::types::{TypeDescriptor, VarLenUnicode};
    use std::path::PathBuf;

    /// The shipped municipal case (invented demo data) made 20 min long with envelopes:
    /// cycles, cycle jumps, events and detail windows in one run.
    fn long_municipal(dir: &Path) -> PathBuf {
        let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("..");
        let text = std::fs::read_to_string(root.join("cases/municipal-sand-gravel.json")).unwrap();
        let mut case: Value = serde_json::from_str(&text).unwrap();
        case["duration"] = Value::from("20 min");
        case["output"] = serde_json::json!({ "store": "envelopes" });
        let path = dir.join("municipal-20min.json");
        std::fs::write(&path, case.to_string()).unwrap();
        path
    }

    fn args(case: &Path, output: PathBuf) -> RunArgs {
        RunArgs {
            case: case.to_path_buf(),
            output,
            csv: true,
            json: false,
            quiet: true,
            snapshot_every: 7,
            force: false,
            allow_large: false,
        }
    }

    /// Every dataset of a result file by path: its shape and its values' bits (text as
    /// bytes); the root attribute of the creation time left out.
    fn datasets(path: &Path) -> BTreeMap<String, (Vec<usize>, Vec<u64>)> {
        fn walk(g: &hdf5::Group, at: &str, out: &mut BTreeMap<String, (Vec<usize>, Vec<u64>)>) {
            for name in g.member_names().unwrap() {
                let path = format!("{at}/{name}");
                if let Ok(ds) = g.dataset(&name) {
                    let bits: Vec<u64> = match ds.dtype().unwrap().to_descriptor().unwrap() {
                        TypeDescriptor::Float(_) => ds
                            .read_raw::<f64>()
                            .unwrap()
                            .iter()
                            .map(|x| x.to_bits())
                            .collect(),
                        TypeDescriptor::Unsigned(_) => ds.read_raw::<u64>().unwrap(),
                        TypeDescriptor::VarLenUnicode => ds
                            .read_raw::<VarLenUnicode>()
                            .unwrap()
                            .iter()
                            .flat_map(|s| s.as_str().bytes().map(u64::from).chain([0]))
                            .collect(),
                        other => panic!("{path}: type {other:?} not compared"),
                    };
                    out.insert(path, (ds.shape(), bits));
                } else {
                    walk(&g.group(&name).unwrap(), &path, out);
                }
            }
        }
        let file = hdf5::File::open(path).unwrap();
        let mut out = BTreeMap::new();
        walk(&file, "", &mut out);
        out
    }

    use std::collections::BTreeMap;

    /// Checks: the output fed through the relay (its own thread) and fed directly (on the
    /// solver's thread) are the same, dataset by dataset and bit for bit, and the CSV byte
    /// for byte, on a run with cycles, cycle jumps, events, envelopes with detail windows
    /// and a snapshot every 7 steps (thousands of heads rows, over 30 batches).
    #[test]
    fn the_relay_writes_what_direct_feeding_writes() {
        let dir = tempfile::tempdir().unwrap();
        let case = long_municipal(dir.path());
        let (direct, relayed) = (dir.path().join("direct.h5"), dir.path().join("relay.h5"));
        run_fed(&args(&case, direct.clone()), Feed::Direct).unwrap();
        run_fed(&args(&case, relayed.clone()), Feed::Relay).unwrap();
        let (a, b) = (datasets(&direct), datasets(&relayed));
        for group in [
            "/series/time",
            "/cycles/index",
            "/events/time",
            "/jumps/from_time",
        ] {
            assert!(a[group].0[0] > 10, "{group}: {:?} values", a[group].0);
        }
        assert!(a["/snapshots/head"].0[0] > 30 * BATCH_MESSAGES / 7);
        assert!(a.keys().any(|k| k.starts_with("/envelopes/")));
        assert_eq!(a.keys().collect::<Vec<_>>(), b.keys().collect::<Vec<_>>());
        for (path, value) in &a {
            assert!(value == &b[path], "{path} differs");
        }
        let csv = |p: &Path| std::fs::read(p.with_extension("csv")).unwrap();
        assert!(csv(&direct) == csv(&relayed), "the CSV files differ");
    }

    /// Checks: a sink that fails at the first step (a snapshot row one value short) stops
    /// the run through the relay within a few batches of its 31 000 steps, comes back with
    /// its error, and, dropped as `run` drops it, leaves no file behind; fed directly, it
    /// stops the run at that step.
    #[test]
    fn a_sink_error_stops_the_run_and_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let case_dir = tempfile::tempdir().unwrap();
        let case = load_case(&long_municipal(case_dir.path())).unwrap();
        let model = &case.model;
        let cells = Discretization::new(model, None).grid.cells();
        let out = dir.path().join("out.h5");
        let bad_sink = || {
            ResultSink::create(
                &out,
                Some(&out.with_extension("csv")),
                cells + 1,
                1,
                envelope_plan(&case),
                event_plan(&case),
            )
            .unwrap()
        };
        let sink = bad_sink();
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 2);
        let (result, fed) = relay(sink, |r| simulate(model, r, Reporting { every: 1 }));
        let summary = result.unwrap();
        assert!(summary.stopped_early);
        assert!(
            summary.steps < 8 * BATCH_MESSAGES as u64,
            "stopped at step {}",
            summary.steps
        );
        assert!(fed.failed());
        let sink = fed.join().expect("no panic");
        let e = sink.error.as_ref().expect("the sink's error");
        assert!(e.to_string().contains("/snapshots/head"), "{e}");
        drop(sink);
        let left: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
        assert!(left.is_empty(), "left behind: {left:?}");
        // Fed directly (one core): the run stops at the failing step.
        let mut sink = bad_sink();
        let summary = simulate(model, &mut sink, Reporting { every: 1 }).unwrap();
        assert!(
            summary.stopped_early && summary.steps == 1,
            "{}",
            summary.steps
        );
        let fed = Fed::ready(sink);
        assert!(fed.failed());
        drop(fed);
        let left: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
        assert!(left.is_empty(), "left behind: {left:?}");
    }
}
