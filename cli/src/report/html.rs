//! The page of one or more runs: the cautions box, warnings, model assumptions, run
//! descriptions, the headline table, inline SVG figures, cycle logs and inputs, filled
//! into templates/run.html (which escapes every text). No scripts, external styles or
//! fonts; the page prints on paper as it shows on screen.

use askama::Template;
use boreflux_solver::safety::CAUTION;

use super::figures::{figures, run_style};
use super::page::{render, svg, CompareTable, Figure, TableRow};
use super::read::Run;
use super::tables::{CycleLog, CycleRow};
use super::{headline, run_letter, run_title, tables};

/// The page of one or more runs (templates/run.html).
#[derive(Template)]
#[template(path = "run.html")]
struct RunPage {
    head_title: String,
    heading: String,
    version: &'static str,
    full_head: bool,
    caution: &'static str,
    bases: Option<Bases>,
    recorded_cautions: Vec<(String, String)>,
    warning_total: usize,
    runs: Vec<RunView>,
    any_notes: bool,
    any_assumptions: bool,
    any_cycle_log: bool,
    headline: CompareTable,
    efficiency_definitions: Vec<String>,
    figures: Vec<Figure>,
    inputs: CompareTable,
    other_values: Option<CompareTable>,
}

/// Case inputs listed by name in the notice on runs compared on different bases; the rest
/// are counted ("and 4 more") and all are in the Inputs table.
const BASES_LISTED: usize = 10;

/// The notice above a comparison whose runs differ in case inputs.
struct Bases {
    /// The first [`BASES_LISTED`] differing input paths.
    listed: Vec<String>,
    /// How many more differ.
    more: usize,
}

impl Bases {
    /// The notice for `runs`, or `None` for one run or runs with the same inputs.
    fn of(runs: &[Run]) -> Option<Self> {
        let mut listed = tables::differing_inputs(runs);
        if runs.len() < 2 || listed.is_empty() {
            return None;
        }
        let more = listed.len().saturating_sub(BASES_LISTED);
        listed.truncate(BASES_LISTED);
        Some(Bases { listed, more })
    }
}

/// What the page shows of one run.
struct RunView {
    letter: String,
    title: String,
    description: Option<String>,
    file: String,
    case_file: String,
    tool_version: String,
    created_utc: String,
    warnings: Vec<String>,
    notes: Vec<String>,
    assumptions: Vec<String>,
    color: &'static str,
    dash: &'static str,
    cycle_log: Option<CycleLog>,
}

/// The whole page for the runs (already read), under `title` when given (else the default
/// heading, and the run titles in the browser's title).
pub fn page(runs: &[Run], title: Option<&str>) -> String {
    let titles: Vec<String> = runs.iter().map(run_title).collect();
    let head_title = match title {
        Some(t) => t.to_owned(),
        None => format!("Well development report: {}", titles.join("; ")),
    };
    let recorded_cautions = runs
        .iter()
        .enumerate()
        .filter_map(|(i, run)| {
            let c = run.summary.cautions.as_deref()?;
            (c.trim() != CAUTION.trim() && !c.trim().is_empty())
                .then(|| (run_letter(i), c.to_owned()))
        })
        .collect();
    let or_dash = |v: &Option<String>| v.clone().unwrap_or_else(|| "—".to_owned());
    let views: Vec<RunView> = runs
        .iter()
        .zip(titles)
        .enumerate()
        .map(|(i, (run, title))| {
            let m = &run.meta;
            let style = run_style(i);
            RunView {
                letter: run_letter(i),
                title,
                description: m.description.clone().filter(|d| !d.trim().is_empty()),
                file: run.path.display().to_string(),
                case_file: or_dash(&m.case_file),
                tool_version: or_dash(&m.tool_version),
                created_utc: or_dash(&m.created_utc),
                warnings: run.summary.warnings.clone(),
                notes: run.summary.notes.clone(),
                assumptions: run.summary.assumptions.clone(),
                color: style.color,
                dash: style.dash,
                cycle_log: tables::cycle_log(run),
            }
        })
        .collect();
    let (headline, used) = headline::headline(runs);
    let mut efficiency_definitions: Vec<String> = runs
        .iter()
        .filter_map(|r| r.summary.efficiency_definition.clone())
        .collect();
    efficiency_definitions.dedup();
    for d in &mut efficiency_definitions {
        d.truncate(d.trim_end_matches('.').len());
    }
    let figures = figures(runs)
        .into_iter()
        .enumerate()
        .map(|(k, f)| Figure {
            number: k + 1,
            title: f.title,
            caption: Some(f.caption),
            svgs: f.svgs.into_iter().map(svg).collect(),
        })
        .collect();
    render(&RunPage {
        head_title,
        heading: title
            .unwrap_or("Well development simulation report")
            .to_owned(),
        version: env!("CARGO_PKG_VERSION"),
        full_head: true,
        caution: CAUTION,
        bases: Bases::of(runs),
        recorded_cautions,
        warning_total: runs.iter().map(|r| r.summary.warnings.len()).sum(),
        any_notes: runs.iter().any(|r| !r.summary.notes.is_empty()),
        any_assumptions: runs.iter().any(|r| !r.summary.assumptions.is_empty()),
        any_cycle_log: views.iter().any(|v| v.cycle_log.is_some()),
        runs: views,
        headline,
        efficiency_definitions,
        figures,
        inputs: tables::inputs(runs),
        other_values: headline::other_values(runs, &used),
    })
}
