//! `boreflux sweep`: every scenario of a `--vary` product (or of one shard of it) is built
//! from the case file and checked before any runs; then they run in parallel, each with the
//! same solver and headline as `boreflux run`, and the table is written (CSV and HDF5,
//! through temporary files). A scenario that fails at run time keeps its row, with the
//! reason in `status`, and makes the command exit 1 once the table is written. Ctrl-C stops
//! every run after its current step and writes nothing.

use super::interrupt::{catch_interrupts, interrupted, INTERRUPTED_MESSAGE};
use super::run::refuse_overwriting_inputs;
use super::{print_out, Failure};
use crate::args::SweepArgs;
use crate::case::{parse_case, LoadedCase};
use crate::summary::{headline, Headline, Tracker};
use crate::sweep::plan::{Plan, Shard};
use crate::sweep::spec::{parse_vary, Segment};
use crate::sweep::table::{figures, Row, Table};
use anyhow::anyhow;
use boreflux_solver::safety::CAUTION;
use boreflux_solver::{run as simulate, Reporting, StepObserver, StepView};
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use serde_json::Value;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Mutex;

/// Case-check failures listed before the rest are counted.
const LISTED_ERRORS: usize = 5;

/// The tracker, stopping the run on Ctrl-C.
struct Observer(Tracker);

impl StepObserver for Observer {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        !interrupted() && self.0.on_step(s)
    }
}

/// `NAME.csv`/`NAME.h5` → `NAME`.
pub(super) fn output_stem(output: &Path) -> PathBuf {
    match output.extension().and_then(|e| e.to_str()) {
        Some("csv" | "h5") => output.with_extension(""),
        _ => output.to_path_buf(),
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

/// One scenario, checked and ready to run.
struct Prepared {
    scenario: usize,
    labels: Vec<String>,
    case: LoadedCase,
}

/// What a worker brings back: the row without its figure columns, and the figures.
type Outcome = (Row, Vec<(String, f64)>);

fn run_one(p: &Prepared, plan: &Plan) -> Outcome {
    let si = plan
        .variables
        .iter()
        .zip(plan.choice(p.scenario))
        .map(|(v, c)| si_value(&p.case.resolved, &v.segments, &v.values[c]))
        .collect();
    let mut row = Row {
        scenario: p.scenario,
        labels: p.labels.clone(),
        si,
        status: "ok".into(),
        figures: Vec::new(),
        warnings: String::new(),
    };
    let mut obs = Observer(Tracker::new(&p.case.model));
    let reporting = Reporting {
        every: p.case.output_every,
    };
    match simulate(&p.case.model, &mut obs, reporting) {
        Ok(summary) => {
            let h: Headline = headline(&p.case, &summary, &obs.0);
            row.warnings = h.warnings.join("\n");
            (row, figures(&h))
        }
        Err(e) => {
            row.status = format!("simulation failed: {e}");
            (row, Vec::new())
        }
    }
}

fn progress_bar(quiet: bool, n: usize) -> ProgressBar {
    let bar = ProgressBar::new(n as u64);
    if quiet {
        bar.set_draw_target(ProgressDrawTarget::hidden());
    }
    bar.set_style(
        ProgressStyle::with_template(
            "{spinner} scenarios {pos}/{len} [{bar:30}] {msg} elapsed {elapsed_precise}, eta {eta}",
        )
        .expect("valid template")
        .progress_chars("=> "),
    );
    bar
}

/// Builds and checks every scenario of the shard; bad input names the scenario, its values
/// and the case loader's message.
fn prepare(plan: &Plan, shard: Shard, base_dir: &Path) -> Result<Vec<Prepared>, Failure> {
    let total = plan.count().unwrap_or(0);
    let mut ready = Vec::new();
    let mut errors = Vec::new();
    for i in (0..total).filter(|&i| shard.holds(i)) {
        let labels = plan.labels(i);
        let described = || {
            let values: Vec<String> = plan
                .variables
                .iter()
                .zip(&labels)
                .map(|(v, l)| format!("{} = {l}", v.path))
                .collect();
            format!("scenario {i} ({})", values.join(", "))
        };
        let text = plan
            .scenario(i)
            .map_err(|e| Failure::Input(anyhow!("{e}")))?
            .to_string();
        match parse_case(&text, base_dir) {
            Ok(case) => ready.push(Prepared {
                scenario: i,
                labels,
                case,
            }),
            Err(e) => errors.push(format!("{}: {e}", described())),
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
    Err(Failure::Input(anyhow!(
        "some scenarios are not valid cases; nothing was run:\n  {msg}"
    )))
}

/// Runs the prepared scenarios on `jobs` threads; None when interrupted.
fn run_all(
    ready: &[Prepared],
    plan: &Plan,
    jobs: usize,
    bar: &ProgressBar,
) -> Option<Vec<Outcome>> {
    let next = AtomicUsize::new(0);
    let done: Mutex<Vec<Option<Outcome>>> = Mutex::new(vec![None; ready.len()]);
    std::thread::scope(|scope| {
        for _ in 0..jobs.clamp(1, ready.len().max(1)) {
            scope.spawn(|| loop {
                let k = next.fetch_add(1, Ordering::SeqCst);
                if k >= ready.len() || interrupted() {
                    break;
                }
                let outcome = run_one(&ready[k], plan);
                bar.set_message(format!("last: scenario {}", ready[k].scenario));
                bar.inc(1);
                done.lock().expect("no worker panics holding the lock")[k] = Some(outcome);
            });
        }
    });
    if interrupted() {
        return None;
    }
    done.into_inner()
        .expect("no worker panicked holding the lock")
        .into_iter()
        .collect()
}

/// Puts the outcomes into a table: the figure columns are those of the first scenario that
/// ran (every headline has the same fields); failed scenarios get NaN.
pub(super) fn tabulate(outcomes: Vec<Outcome>) -> (Vec<String>, Vec<Row>) {
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

/// A short text table of the key figures, one line per scenario.
pub(super) fn overview(t: &Table) -> String {
    let key = [
        ("peak_outward_flux_m_s", "peak flux out m/s"),
        ("peak_inward_flux_m_s", "peak flux in m/s"),
        ("peak_shear_pa", "peak shear Pa"),
        ("cake_thickness_end_m", "cake end m"),
        ("skin_end", "skin end"),
        ("peak_collapse_pressure_pa", "collapse load Pa"),
    ];
    let cols: Vec<(usize, &str)> = key
        .iter()
        .filter_map(|(name, head)| t.figures.iter().position(|f| f == name).map(|i| (i, *head)))
        .collect();
    let mut lines = vec![{
        let mut h = vec!["scenario".to_owned()];
        h.extend(t.paths.iter().cloned());
        h.extend(cols.iter().map(|(_, head)| head.to_string()));
        h.push("status".into());
        h.join(" | ")
    }];
    for r in &t.rows {
        let mut f = vec![r.scenario.to_string()];
        f.extend(r.labels.iter().cloned());
        f.extend(cols.iter().map(|&(i, _)| {
            let x = r.figures[i];
            if x.is_nan() {
                "—".to_owned()
            } else {
                format!("{}", crate::summary::G(x, 4))
            }
        }));
        let warned = r.warnings.lines().count();
        f.push(match (r.status.as_str(), warned) {
            ("ok", 0) => "ok".into(),
            ("ok", n) => format!("ok, {n} warning{}", if n == 1 { "" } else { "s" }),
            (s, _) => s.to_owned(),
        });
        lines.push(f.join(" | "));
    }
    lines.join("\n") + "\n"
}

/// Runs the command.
pub fn sweep(a: &SweepArgs) -> Result<(), Failure> {
    let text = std::fs::read_to_string(&a.case)
        .map_err(|e| Failure::Input(anyhow!("cannot read case file {}: {e}", a.case.display())))?;
    let base: Value = serde_json::from_str(&text)
        .map_err(|e| Failure::Input(anyhow!("{}: invalid JSON: {e}", a.case.display())))?;
    let variables = a
        .vary
        .iter()
        .map(|v| parse_vary(v))
        .collect::<Result<Vec<_>, _>>()
        .map_err(|e| Failure::Input(e.into()))?;
    let plan = Plan::new(base.clone(), variables).map_err(|e| Failure::Input(e.into()))?;
    let shard = match &a.shard {
        Some(s) => Shard::parse(s).map_err(|e| Failure::Input(e.into()))?,
        None => Shard::WHOLE,
    };
    if a.jobs == Some(0) {
        return Err(Failure::Input(anyhow!("--jobs must be at least 1")));
    }
    let stem = output_stem(&a.output);
    refuse_overwriting_inputs(
        &a.case,
        &stem.with_extension("h5"),
        Some(&stem.with_extension("csv")),
    )
    .map_err(Failure::Input)?;
    if let Some(dir) = stem
        .parent()
        .filter(|d| !d.as_os_str().is_empty() && !d.is_dir())
    {
        return Err(Failure::Input(anyhow!(
            "the output folder {} does not exist; create it or choose another -o/--output",
            dir.display()
        )));
    }
    let base_dir = a
        .case
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let total = plan.count().unwrap_or(0);
    let ready = prepare(&plan, shard, base_dir)?;
    if ready.is_empty() {
        return Err(Failure::Input(anyhow!(
            "shard {shard} holds no scenario of the {total}; use at most {total} shards"
        )));
    }
    let jobs = a.jobs.unwrap_or_else(|| {
        std::thread::available_parallelism().map_or(1, std::num::NonZeroUsize::get)
    });
    catch_interrupts();
    let started = std::time::Instant::now();
    let bar = progress_bar(a.quiet, ready.len());
    let outcomes = run_all(&ready, &plan, jobs, &bar);
    bar.finish_and_clear();
    let Some(outcomes) = outcomes else {
        return Err(Failure::Runtime(anyhow!(INTERRUPTED_MESSAGE)));
    };
    let (columns, rows) = tabulate(outcomes);
    let failed = rows.iter().filter(|r| r.status != "ok").count();
    let table = Table {
        case_file: a.case.display().to_string(),
        base_case_json: base.to_string(),
        vary_json: plan.definition().to_string(),
        total,
        shard: shard.to_string(),
        paths: plan.variables.iter().map(|v| v.path.clone()).collect(),
        figures: columns,
        rows,
    };
    let (csv, h5) = table
        .write(&stem)
        .map_err(|e| Failure::Runtime(anyhow!("writing the table: {e:#}")))?;
    let head = format!(
        "sweep of {}: {} scenario{}{} in {:.1} s on {} thread{}\n  results: {}, {}\n\n",
        a.case.display(),
        table.rows.len(),
        if table.rows.len() == 1 { "" } else { "s" },
        if shard == Shard::WHOLE {
            String::new()
        } else {
            format!(" (shard {shard} of {total})")
        },
        started.elapsed().as_secs_f64(),
        jobs.min(table.rows.len()),
        if jobs.min(table.rows.len()) == 1 {
            ""
        } else {
            "s"
        },
        csv.display(),
        h5.display(),
    );
    print_out(&(head + &overview(&table) + "\nCaution: " + CAUTION + "\n"))?;
    if failed > 0 {
        return Err(Failure::Runtime(anyhow!(
            "{failed} of {} scenarios failed; their rows in the table say why",
            table.rows.len()
        )));
    }
    Ok(())
}
