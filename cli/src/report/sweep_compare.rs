//! The page comparing two or more grid sweep tables that vary the same first parameter:
//! one chart per key figure against that parameter with one line per table (and per
//! combination of its other varied values), then each table's scenarios one after
//! another. Every number is read from the tables.

use std::fmt::Write;
use std::path::PathBuf;

use super::escape::esc;
use super::run_letter;
use super::sweep::{
    cautions, charts, finish, has_warnings, open, shard_note, table, varied_items, warning_items,
};
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

/// The whole comparison page for `tables` (file as given, table), already checked to be
/// grid sweeps with the same first varied path, under `title` when given.
pub fn page(tables: &[(PathBuf, Table)], title: Option<&str>) -> String {
    let names: Vec<String> = tables
        .iter()
        .enumerate()
        .map(|(i, (p, _))| legend_name(i, p))
        .collect();
    let mut h = String::new();
    let head_title = title.map_or_else(
        || format!("Sweep comparison: {}", names.join("; ")),
        str::to_owned,
    );
    open(
        &mut h,
        &head_title,
        title.unwrap_or("Well development sweep comparison"),
    );
    let _ = writeln!(
        h,
        "<p class=\"lead\">{} sweep tables compared against <code>{}</code>; every number and \
         figure below is read from the tables. Built by boreflux {}.</p>\n<ul>",
        tables.len(),
        esc(tables[0].1.paths.first().map_or("", String::as_str)),
        env!("CARGO_PKG_VERSION"),
    );
    for (name, (path, t)) in names.iter().zip(tables) {
        let _ = writeln!(
            h,
            "<li>{}: {} scenarios of <code>{}</code>{} (file <code>{}</code>)</li>",
            esc(name),
            t.rows.len(),
            esc(&t.case_file),
            shard_note(t),
            esc(&path.display().to_string()),
        );
    }
    h.push_str("</ul>\n");
    cautions(&mut h);
    if tables.iter().any(|(_, t)| has_warnings(t)) {
        h.push_str("<section class=\"warnings\">\n<h2>Warnings</h2>\n<ul>\n");
        for (name, (_, t)) in names.iter().zip(tables) {
            warning_items(&mut h, t, &format!("{}, ", esc(name)));
        }
        h.push_str("</ul>\n</section>\n");
    }
    h.push_str("<h2>What was varied</h2>\n");
    for (name, (_, t)) in names.iter().zip(tables) {
        let _ = writeln!(h, "<h3>{}</h3>\n<ul>", esc(name));
        varied_items(&mut h, t);
        h.push_str("</ul>\n");
    }
    let named: Vec<(Option<String>, &Table)> = names
        .iter()
        .zip(tables)
        .map(|(n, (_, t))| (Some(n.clone()), t))
        .collect();
    charts(&mut h, &named);
    for (name, (_, t)) in names.iter().zip(tables) {
        table(&mut h, t, &format!("Scenarios of {name}"));
    }
    for (name, (_, t)) in names.iter().zip(tables) {
        finish(&mut h, t, &format!("Case file {name} started from"));
    }
    h.push_str("</body>\n</html>\n");
    h
}
