//! Running a sweep: every scenario of the shard is built and checked first (and its size
//! against the run limits), then they run on a pool of scoped threads (each its own solver
//! run; nothing is shared but the job counter and the result slots), each with the same
//! solver and headline as `boreflux run`. A scenario's case is built again when it runs
//! and dropped after, so memory does not grow with the scenario count. A scenario that
//! fails or panics at run time keeps its row, with the reason in `status`; the others run.

use super::plan::{Plan, Shard};
use super::series::Recorder;
use super::spec::Segment;
use super::table::{figures, Row};
use crate::case::{parse_case, LoadedCase};
use crate::summary::{assessment_from, headline, Tracker};
use boreflux_solver::assess::progress::ProgressBasis;
use boreflux_solver::assess::{Baseline, TestPlan};
use boreflux_solver::model::Model;
use boreflux_solver::{run as simulate, CycleView, Reporting, StepObserver, StepView};
use serde_json::Value;
use std::collections::HashMap;
use std::path::Path;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::{Arc, Mutex};

/// Case-check failures listed before the rest are counted.
const LISTED_ERRORS: usize = 5;

/// One scenario, checked and ready to run (its case is built again when it runs).
#[derive(Debug)]
pub struct Prepared {
    /// Index in the whole sweep.
    pub scenario: usize,
    /// The varied values as written.
    pub labels: Vec<String>,
}

/// A finished scenario: its row (figures not yet in columns) and its figures by name.
pub type Outcome = (Row, Vec<(String, f64)>);

/// The tracker and the key series, stopping the run when `stop` says so.
struct Observer<'a> {
    tracker: Tracker,
    series: Recorder,
    stop: &'a (dyn Fn() -> bool + Sync),
}

impl StepObserver for Observer<'_> {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        self.series.on_step(s);
        !(self.stop)() && self.tracker.on_step(s)
    }

    fn on_cycle(&mut self, c: &CycleView) {
        self.series.on_cycle(c);
    }
}

/// The varied value in SI: where the resolved (SI) case holds a number at the path, that;
/// otherwise a bare number as given (a count such as strokes per minute, which the loader
/// stores under another key); NaN for words.
fn si_value(resolved: &Value, segments: &[Segment], given: &Value) -> f64 {
    let mut v = resolved;
    for s in segments {
        v = match s {
            Segment::Key(k) => &v[k.as_str()],
            Segment::Index(i) => &v[*i],
        };
    }
    v.as_f64().or_else(|| given.as_f64()).unwrap_or(f64::NAN)
}

/// Builds and checks every scenario of the shard, and (unless `allow_large`) its size
/// against the run limits of [`crate::cost`]. The error lists the first few bad
/// scenarios, each with its values and the case loader's message.
pub fn prepare(
    plan: &Plan,
    shard: Shard,
    base_dir: &Path,
    allow_large: bool,
) -> Result<Vec<Prepared>, String> {
    let total = plan.count().unwrap_or(0);
    let mut ready = Vec::new();
    let mut errors = Vec::new();
    for i in (0..total).filter(|&i| shard.holds(i)) {
        let labels = plan.labels(i);
        let text = plan.scenario(i).map_err(|e| e.to_string())?.to_string();
        let checked = parse_case(&text, base_dir)
            .map_err(|e| e.to_string())
            .and_then(|case| {
                // A sweep writes no series: only the computing counts.
                let mut cost = crate::cost::run_cost(&case, false, 0);
                cost.bytes = 0.0;
                crate::cost::refuse_large(&cost, allow_large).map_err(|e| e.to_string())
            });
        match checked {
            Ok(()) => ready.push(Prepared {
                scenario: i,
                labels,
            }),
            Err(e) => {
                let values: Vec<String> = plan
                    .variables
                    .iter()
                    .zip(&labels)
                    .map(|(v, l)| format!("{} = {l}", v.path))
                    .collect();
                errors.push(format!("scenario {i} ({}): {e}", values.join(", ")));
            }
        }
    }
    if errors.is_empty() {
        return Ok(ready);
    }
    let more = errors.len().saturating_sub(LISTED_ERRORS);
    let mut msg = errors
        .into_iter()
        .take(LISTED_ERRORS)
        .collect::<Vec<_>>()
        .join("\n  ");
    if more > 0 {
        msg.push_str(&format!("\n  … and {more} more"));
    }
    Err(format!(
        "some scenarios are not valid cases; nothing was run:\n  {msg}"
    ))
}

/// The text of a panic's payload.
fn panic_text(payload: &(dyn std::any::Any + Send)) -> String {
    payload
        .downcast_ref::<&str>()
        .map(|s| (*s).to_owned())
        .or_else(|| payload.downcast_ref::<String>().cloned())
        .unwrap_or_else(|| "unknown cause".to_owned())
}

/// The tests of the well as built, by [`Baseline::key`]: scenarios whose wells and test
/// plans are the same (a sweep of the drive alone) share one baseline, computed by the
/// first that needs it (two may compute it at once; both give the same bits).
#[derive(Default)]
struct Baselines(Mutex<HashMap<String, Arc<Baseline>>>);

impl Baselines {
    fn get(&self, model: &Model, plan: &TestPlan) -> Arc<Baseline> {
        let key = Baseline::key(model, plan);
        let lock = || {
            self.0
                .lock()
                .unwrap_or_else(std::sync::PoisonError::into_inner)
        };
        if let Some(b) = lock().get(&key) {
            return Arc::clone(b);
        }
        let made = Arc::new(Baseline::new(model, plan));
        Arc::clone(lock().entry(key).or_insert(made))
    }
}

/// Runs one scenario to its row; a panic inside becomes the row's status.
fn run_one(
    p: &Prepared,
    plan: &Plan,
    base_dir: &Path,
    baselines: &Baselines,
    stop: &(dyn Fn() -> bool + Sync),
) -> Outcome {
    let failed = |status: String| {
        let row = Row {
            scenario: p.scenario,
            labels: p.labels.clone(),
            si: vec![f64::NAN; plan.variables.len()],
            status,
            figures: Vec::new(),
            warnings: String::new(),
            series: Vec::new(),
        };
        (row, Vec::new())
    };
    let built = plan
        .scenario(p.scenario)
        .map_err(|e| e.to_string())
        .and_then(|v| parse_case(&v.to_string(), base_dir).map_err(|e| e.to_string()));
    let case = match built {
        Ok(c) => c,
        Err(e) => return failed(format!("case not valid: {e}")),
    };
    std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
        run_case(p, plan, &case, baselines, stop)
    }))
    .unwrap_or_else(|e| {
        failed(format!(
            "simulation failed: internal error: {}",
            panic_text(&*e)
        ))
    })
}

/// Runs a built scenario to its row.
fn run_case(
    p: &Prepared,
    plan: &Plan,
    case: &LoadedCase,
    baselines: &Baselines,
    stop: &(dyn Fn() -> bool + Sync),
) -> Outcome {
    let si = plan
        .variables
        .iter()
        .zip(plan.choice(p.scenario))
        .map(|(v, c)| si_value(&case.resolved, &v.segments, &v.values[c]))
        .collect();
    let mut row = Row {
        scenario: p.scenario,
        labels: p.labels.clone(),
        si,
        status: "ok".into(),
        figures: Vec::new(),
        warnings: String::new(),
        series: Vec::new(),
    };
    // The tests of the well as built, once: the undamaged well's (the basis of the progress
    // series) and the figures before, as in `boreflux run` (here on this thread: the
    // scenarios already run in parallel), shared by the scenarios with the same well.
    let model = &case.model;
    let baseline = baselines.get(model, &case.assessment);
    let basis = baseline
        .undamaged_drawdown_m
        .as_ref()
        .ok()
        .map(|&c| ProgressBasis::new(model, case.assessment.design_rate_m3_s, c));
    let mut obs = Observer {
        tracker: Tracker::new(model),
        series: Recorder::new(model, basis),
        stop,
    };
    let reporting = Reporting {
        every: case.output_every,
    };
    match simulate(&case.model, &mut obs, reporting) {
        Ok(summary) => {
            let a = assessment_from(case, &baseline, &summary);
            let h = headline(case, &summary, &obs.tracker, &a);
            row.warnings = h.warnings.join("\n");
            obs.series.finish(summary.end_time_s, &summary.final_state);
            row.series = obs.series.values;
            (row, figures(&h))
        }
        Err(e) => {
            row.status = format!("simulation failed: {e}");
            (row, Vec::new())
        }
    }
}

/// Runs the prepared scenarios on `jobs` threads (at least one), calling `done(scenario)`
/// as each finishes. None when `stop` turned true: the runs then end after their current
/// step and nothing is returned.
pub fn run_all(
    ready: &[Prepared],
    plan: &Plan,
    base_dir: &Path,
    jobs: usize,
    stop: &(dyn Fn() -> bool + Sync),
    done: &(dyn Fn(usize) + Sync),
) -> Option<Vec<Outcome>> {
    let next = AtomicUsize::new(0);
    let baselines = Baselines::default();
    let slots: Mutex<Vec<Option<Outcome>>> = Mutex::new(vec![None; ready.len()]);
    std::thread::scope(|scope| {
        for _ in 0..jobs.clamp(1, ready.len().max(1)) {
            scope.spawn(|| loop {
                let k = next.fetch_add(1, Ordering::SeqCst);
                if k >= ready.len() || stop() {
                    break;
                }
                let outcome = run_one(&ready[k], plan, base_dir, &baselines, stop);
                done(ready[k].scenario);
                slots
                    .lock()
                    .unwrap_or_else(std::sync::PoisonError::into_inner)[k] = Some(outcome);
            });
        }
    });
    if stop() {
        return None;
    }
    slots
        .into_inner()
        .unwrap_or_else(std::sync::PoisonError::into_inner)
        .into_iter()
        .collect()
}

/// Puts the outcomes into columns: the figure columns are those of the first scenario that
/// ran (every headline has the same fields); failed scenarios get NaN.
pub fn tabulate(outcomes: Vec<Outcome>) -> (Vec<String>, Vec<Row>) {
    let columns: Vec<String> = outcomes
        .iter()
        .find(|(_, f)| !f.is_empty())
        .map(|(_, f)| f.iter().map(|(n, _)| n.clone()).collect())
        .unwrap_or_default();
    let rows = outcomes
        .into_iter()
        .map(|(mut row, f)| {
            row.figures = if f.is_empty() {
                vec![f64::NAN; columns.len()]
            } else {
                f.into_iter().map(|(_, x)| x).collect()
            };
            row
        })
        .collect();
    (columns, rows)
}

#[cfg(test)]
mod tests {
    use super::super::spec::parse_vary;
    use super::*;
    use std::sync::atomic::AtomicBool;

    fn plan() -> Plan {
        let base = serde_json::json!({
            "well": {"screen_radius": 0.1, "screen_length": 6, "open_area": 0.12},
            "pack": {"outer_radius": 0.2, "porosity": 0.32, "conductivity": 8e-3},
            "formation": {"conductivity": 2e-4, "specific_storage": 1e-5},
            "drive": {"kind": "sine_head", "amplitude": 1.5, "frequency": 0.5},
            "duration": 4
        });
        Plan::new(base, vec![parse_vary("drive.amplitude=1,2,3").unwrap()]).unwrap()
    }

    #[test]
    fn a_panicking_scenario_keeps_its_row_and_the_others_run() {
        let plan = plan();
        let ready = prepare(&plan, Shard::WHOLE, Path::new("."), false).unwrap();
        assert_eq!(ready.len(), 3);
        // One thread, so the calls come in order: the first scenario's third step panics
        // (inside its run), once.
        let calls = AtomicUsize::new(0);
        let fired = AtomicBool::new(false);
        let stop = || {
            if calls.fetch_add(1, Ordering::SeqCst) == 4 && !fired.swap(true, Ordering::SeqCst) {
                panic!("injected failure");
            }
            false
        };
        let outcomes = run_all(&ready, &plan, Path::new("."), 1, &stop, &|_| {}).unwrap();
        let status: Vec<&str> = outcomes.iter().map(|(r, _)| r.status.as_str()).collect();
        assert_eq!(
            status,
            [
                "simulation failed: internal error: injected failure",
                "ok",
                "ok"
            ]
        );
        assert!(outcomes[0].1.is_empty() && !outcomes[1].1.is_empty());
    }

    #[test]
    fn scenarios_over_the_size_limit_are_refused_unless_allowed() {
        let mut plan = plan();
        plan.base["numerics"] = serde_json::json!({"time_step": 1e-6});
        plan.base["duration"] = serde_json::json!(1e4);
        let e = prepare(&plan, Shard::WHOLE, Path::new("."), false).unwrap_err();
        assert!(e.contains("too large") && e.contains("scenario 0"), "{e}");
        assert_eq!(
            prepare(&plan, Shard::WHOLE, Path::new("."), true)
                .unwrap()
                .len(),
            3
        );
    }
}
