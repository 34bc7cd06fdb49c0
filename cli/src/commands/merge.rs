//! `boreflux merge`: joins the tables of a sharded sweep. The shards must come from one
//! sweep (same case file contents, same `--vary`, same figure columns), hold no scenario
//! twice and, unless `--partial`, together hold every scenario.

use super::outputs::{check_output, refuse_inputs};
use super::sweep::{output_stem, overview};
use super::{print_out, Failure};
use crate::args::MergeArgs;
use crate::sweep::table::Table;
use anyhow::anyhow;
use boreflux_solver::safety::CAUTION;
use std::collections::BTreeMap;

/// Scenario numbers listed when some are missing.
const LISTED_MISSING: usize = 10;

/// Runs the command.
pub fn merge(a: &MergeArgs) -> Result<(), Failure> {
    let mut tables = Vec::new();
    for p in &a.inputs {
        let t = Table::read(p).map_err(|e| {
            Failure::with_code(
                e.exit_code(),
                ReadFailure {
                    path: p.to_path_buf(),
                    source: e,
                },
            )
        })?;
        tables.push((p, t));
    }
    let (first_path, first) = &tables[0];
    for (p, t) in &tables[1..] {
        let differs = if t.base_case_json != first.base_case_json {
            Some("case file")
        } else if t.vary_json != first.vary_json {
            Some("--vary values or --sample distributions")
        } else if t.sampling_json != first.sampling_json {
            Some("sample design, count or seed")
        } else if t.total != first.total {
            Some("scenario count")
        } else if t.figures != first.figures {
            Some("figure columns (written by another boreflux version?)")
        } else {
            None
        };
        if let Some(what) = differs {
            return Err(Failure::Input(anyhow!(
                "{} and {} come from different sweeps: their {what} differ",
                first_path.display(),
                p.display()
            )));
        }
    }
    let mut rows = BTreeMap::new();
    let mut origin = BTreeMap::new();
    for (p, t) in &tables {
        for r in &t.rows {
            if let Some(q) = origin.insert(r.scenario, *p) {
                return Err(Failure::Input(anyhow!(
                    "scenario {} is in both {} and {}",
                    r.scenario,
                    q.display(),
                    p.display()
                )));
            }
            rows.insert(r.scenario, r.clone());
        }
    }
    let missing: Vec<usize> = (0..first.total).filter(|i| !rows.contains_key(i)).collect();
    if !missing.is_empty() && !a.partial {
        let listed: Vec<String> = missing
            .iter()
            .take(LISTED_MISSING)
            .map(usize::to_string)
            .collect();
        return Err(Failure::Input(anyhow!(
            "{} of {} scenarios are missing (scenario {}{}); merge every shard, or pass \
             --partial to write the table without them",
            missing.len(),
            first.total,
            listed.join(", "),
            if missing.len() > LISTED_MISSING {
                ", …"
            } else {
                ""
            }
        )));
    }
    let merged = Table {
        shard: if missing.is_empty() {
            "merged".into()
        } else {
            format!("merged, {} of {} scenarios", rows.len(), first.total)
        },
        rows: rows.into_values().collect(),
        ..first.clone()
    };
    let stem = output_stem(&a.output);
    for p in [stem.with_extension("csv"), stem.with_extension("h5")] {
        refuse_inputs(&[(&p, "-o/--output")], &a.inputs).map_err(Failure::Input)?;
        check_output(&p, "-o/--output", a.force).map_err(Failure::Input)?;
    }
    let (csv, h5) = merged
        .write(&stem)
        .map_err(|e| Failure::Runtime(anyhow!("writing the table: {e:#}")))?;
    let failed = merged.rows.iter().filter(|r| r.status != "ok").count();
    print_out(&format!(
        "merged {} tables: {} of {} scenarios{}\n  results: {}, {}\n\n{}\nCaution: {CAUTION}\n",
        tables.len(),
        merged.rows.len(),
        merged.total,
        if failed > 0 {
            format!(", {failed} failed")
        } else {
            String::new()
        },
        csv.display(),
        h5.display(),
        overview(&merged)
    ))
}

/// A table that could not be read, with its path.
#[derive(Debug, thiserror::Error)]
#[error("{}: {source}", path.display())]
struct ReadFailure {
    path: std::path::PathBuf,
    #[source]
    source: crate::read_error::ReadError,
}
