//! The page comparing two or more grid sweep tables that vary the same first parameter:
//! one chart per key figure against that parameter with one line per table (and per
//! combination of its other varied values), then each table's scenarios one after
//! another, filled into templates/sweep-compare.html. Every number is read from the tables.

use std::path::PathBuf;

use askama::Template;
use boreflux_solver::safety::CAUTION;

use super::page::render;
use super::run_letter;
use super::sweep::{charts, table_view, Charts, PerLine, TableView};
use crate::sweep::table::Table;

/// Legend name of table `i`: `A: file name`, shortened to fit a legend row.
pub(super) fn legend_name(i: usize, path: &std::path::Path) -> String {
    const MAX_CHARS: usize = 48;
    let file = path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    );
    let short: String = if file.chars().count() > MAX_CHARS {
        file.chars().take(MAX_CHARS - 1).chain(['…']).collect()
    } else {
        file
    };
    format!("{}: {short}", run_letter(i))
}

/// What the comparison page shows of one table.
pub(super) struct Compared {
    /// Legend name, `A: file name`.
    pub(super) name: String,
    /// The table's file as given.
    pub(super) file: String,
    /// The name and a comma, before each of its warnings.
    pub(super) prefix: String,
    /// Heading of its base case.
    pub(super) case_heading: String,
    pub(super) table: TableView,
}

/// The comparison page (templates/sweep-compare.html).
#[derive(Template)]
#[template(path = "sweep-compare.html")]
struct ComparePage<'a> {
    head_title: String,
    heading: &'a str,
    version: &'static str,
    full_head: bool,
    caution: &'static str,
    x_path: &'a str,
    tables: Vec<Compared>,
    any_warnings: bool,
    charts: Charts,
}

/// The whole comparison page for `tables` (file as given, table), already checked to be
/// grid sweeps with the same first varied path, under `title` when given.
pub fn page(tables: &[(PathBuf, Table)], title: Option<&str>) -> String {
    let names: Vec<String> = tables
        .iter()
        .enumerate()
        .map(|(i, (p, _))| legend_name(i, p))
        .collect();
    let head_title = title.map_or_else(
        || format!("Sweep comparison: {}", names.join("; ")),
        str::to_owned,
    );
    let named: Vec<(Option<String>, &Table)> = names
        .iter()
        .zip(tables)
        .map(|(n, (_, t))| (Some(n.clone()), t))
        .collect();
    let compared: Vec<Compared> = names
        .iter()
        .zip(tables)
        .map(|(name, (path, t))| Compared {
            name: name.clone(),
            file: path.display().to_string(),
            prefix: format!("{name}, "),
            case_heading: format!("Case file {name} started from"),
            table: table_view(t, &format!("Scenarios of {name}")),
        })
        .collect();
    render(&ComparePage {
        head_title,
        heading: title.unwrap_or("Well development sweep comparison"),
        version: env!("CARGO_PKG_VERSION"),
        full_head: true,
        caution: CAUTION,
        x_path: tables[0].1.paths.first().map_or("", String::as_str),
        any_warnings: compared.iter().any(|c| !c.table.warnings.is_empty()),
        tables: compared,
        charts: charts(&named),
    })
}
