//! `boreflux sweep`: every scenario of a `--vary` product (or of one shard of it) is built
//! from the case file and checked before any runs; then they run in parallel, each with the
//! same solver and headline as `boreflux run`, and the table is written (CSV and HDF5,
//! through temporary files). A scenario that fails at run time keeps its row, with the
//! reason in `status`, and makes the command exit 1 once the table is written. Ctrl-C stops
//! every run after its current step and writes nothing.

use super::interrupt::{catch_interrupts, interrupted, INTERRUPTED_MESSAGE};
use super::outputs::check_output;
use super::run::refuse_overwriting_inputs;
use super::{print_out, Failure};
use crate::args::SweepArgs;
use crate::sweep::exec::{prepare, run_all, tabulate};
use crate::sweep::plan::{Plan, Shard};
use crate::sweep::sampled::{sampled_plan, SampleArgs};
use crate::sweep::spec::parse_vary;
use crate::sweep::table::Table;
use anyhow::anyhow;
use boreflux_solver::safety::CAUTION;
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};
use serde_json::Value;
use std::path::{Path, PathBuf};

/// `NAME.csv`/`NAME.h5` → `NAME`.
pub(super) fn output_stem(output: &Path) -> PathBuf {
    match output.extension().and_then(|e| e.to_str()) {
        Some("csv" | "h5") => output.with_extension(""),
        _ => output.to_path_buf(),
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

/// A short text table of the key figures, one line per scenario.
pub(super) fn overview(t: &Table) -> String {
    use crate::output::schema::Figure;
    let key = [
        (Figure::PeakOutwardFlux, "peak flux out"),
        (Figure::PeakInwardFlux, "peak flux in"),
        (Figure::PeakShear, "peak shear"),
        (Figure::CakeThicknessEnd, "cake end"),
        (Figure::SkinEnd, "skin end"),
        (Figure::PeakCollapsePressure, "collapse load"),
    ];
    let cols: Vec<(usize, String)> = key
        .iter()
        .filter_map(|(figure, head)| {
            let e = figure.entry();
            let head = match e.unit.symbol() {
                "1" => (*head).to_owned(),
                unit => format!("{head} {unit}"),
            };
            t.figures
                .iter()
                .position(|f| *f == e.name)
                .map(|i| (i, head))
        })
        .collect();
    let mut lines = vec![{
        let mut h = vec!["scenario".to_owned()];
        h.extend(t.paths.iter().cloned());
        h.extend(cols.iter().map(|(_, head)| head.clone()));
        h.push("status".into());
        h.join(" | ")
    }];
    for r in &t.rows {
        let mut f = vec![r.scenario.to_string()];
        f.extend(r.labels.iter().map(|l| short_label(l)));
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

/// A scenario's value as the overview shows it: a number drawn by a sampled sweep (all
/// seventeen digits, as the table keeps it) to four significant digits, its unit kept; a
/// value as written in the case or on the command line unchanged.
fn short_label(label: &str) -> String {
    let (number, unit) = label.split_once(' ').unwrap_or((label, ""));
    match number.parse::<f64>() {
        Ok(x) if x.is_finite() && number.trim_start_matches('-').len() > 8 => {
            let short = crate::summary::G(x, 4).to_string();
            if unit.is_empty() {
                short
            } else {
                format!("{short} {unit}")
            }
        }
        _ => label.to_owned(),
    }
}

/// The plan: a grid of `--vary` values or a sample (`--sample`, `--sample-file`).
fn plan(a: &SweepArgs, base: &Value) -> Result<Plan, Failure> {
    if a.vary.is_empty() {
        let file = match &a.sample_file {
            Some(p) => Some((
                p.display().to_string(),
                crate::case::read_limited(p, crate::case::MAX_CASE_BYTES, "sample file")
                    .map_err(|e| Failure::with_code(e.exit_code(), e))?,
            )),
            None => None,
        };
        let args = SampleArgs {
            sample: &a.sample,
            file: file.as_ref().map(|(n, t)| (n.as_str(), t.clone())),
            samples: a.samples,
            seed: a.seed,
            design: a.design.as_deref(),
        };
        return sampled_plan(base.clone(), &args).map_err(|e| Failure::Input(e.into()));
    }
    if let Some(flag) = [
        (a.samples.is_some(), "--samples"),
        (a.seed.is_some(), "--seed"),
        (a.design.is_some(), "--design"),
    ]
    .into_iter()
    .find_map(|(given, flag)| given.then_some(flag))
    {
        return Err(Failure::Input(anyhow!(
            "{flag} belongs to a sampled sweep (--sample); a --vary sweep runs every value"
        )));
    }
    let variables = a
        .vary
        .iter()
        .map(|v| parse_vary(v))
        .collect::<Result<Vec<_>, _>>()
        .map_err(|e| Failure::Input(e.into()))?;
    Plan::new(base.clone(), variables).map_err(|e| Failure::Input(e.into()))
}

/// Runs the command.
pub fn sweep(a: &SweepArgs) -> Result<(), Failure> {
    let text = crate::case::read_limited(&a.case, crate::case::MAX_CASE_BYTES, "case file")
        .map_err(|e| Failure::with_code(e.exit_code(), e))?;
    let base: Value = crate::case::read_case_json(&text)
        .map_err(|e| Failure::Input(anyhow!("{}: {e}", a.case.display())))?;
    let plan = plan(a, &base)?;
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
    for p in [stem.with_extension("csv"), stem.with_extension("h5")] {
        check_output(&p, "-o/--output", a.force).map_err(Failure::Input)?;
    }
    let base_dir = a
        .case
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let total = plan.count().unwrap_or(0);
    let ready =
        prepare(&plan, shard, base_dir, a.allow_large).map_err(|e| Failure::Input(anyhow!(e)))?;
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
    let done = |scenario: usize| {
        bar.set_message(format!("last: scenario {scenario}"));
        bar.inc(1);
    };
    let outcomes = run_all(&ready, &plan, base_dir, jobs, &interrupted, &done);
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
        sampling_json: plan.sampling.as_ref().map(|s| s.definition().to_string()),
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

#[cfg(test)]
mod tests {
    use super::short_label;

    #[test]
    fn drawn_values_are_shortened_for_the_overview_only() {
        // A drawn value (17 digits) to 4 significant digits with its unit; values as a user
        // writes them unchanged.
        assert_eq!(short_label("0.008495429147274403 m/s"), "0.008495 m/s");
        assert_eq!(short_label("0.4622840763720729 m"), "0.4623 m");
        assert_eq!(short_label("-12.345678901 m"), "-12.35 m");
        assert_eq!(short_label("0.5 m"), "0.5 m");
        assert_eq!(short_label("20"), "20");
        assert_eq!(short_label("pvc"), "pvc");
        assert_eq!(short_label("1e-8 m/s"), "1e-8 m/s");
    }
}
