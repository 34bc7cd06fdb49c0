//! `boreflux verify`: the verification set of the `boreflux-verify` crate, run from the
//! binary, printed as a table of errors with sources.
//!
//! Each result is labelled with the id of the group that produced it
//! (`boreflux_verify::groups()`), in the JSON output and in the table's `group` column.

use super::{print_out, Failure};
use crate::args::VerifyArgs;
use boreflux_verify::CheckResult;

/// Runs every check; exit 1 when one fails.
pub fn verify(a: &VerifyArgs) -> Result<(), Failure> {
    let mut results = Vec::new();
    for g in boreflux_verify::groups() {
        if !a.json {
            eprintln!("running {} …", g.title);
        }
        results.extend(
            (g.run)()
                .into_iter()
                .map(|r| CheckResult { group: g.id, ..r }),
        );
    }
    let failed = results.iter().filter(|r| !r.passed).count();
    let text = if a.json {
        serde_json::to_string_pretty(&results).map_err(|e| Failure::Runtime(e.into()))? + "\n"
    } else {
        let width = results
            .iter()
            .map(|r| r.group.chars().count())
            .chain(["group".len()])
            .max()
            .unwrap_or(0);
        let mut t = format!(
            "{:<6} {:<width$} {:<70} {:>10} {:>10}  {:<9} source\n",
            "result", "group", "check", "error", "tolerance", "metric"
        );
        for r in &results {
            t += &format!(
                "{:<6} {:<width$} {:<70} {:>10.3e} {:>10.1e}  {:<9} {}\n",
                if r.passed { "pass" } else { "FAIL" },
                r.group,
                r.name,
                r.error,
                r.tolerance,
                r.metric,
                r.source.chars().take(90).collect::<String>()
            );
        }
        t + &format!("\n{} passed, {} failed\n", results.len() - failed, failed)
    };
    print_out(&text)?;
    if failed > 0 {
        return Err(Failure::Runtime(anyhow::anyhow!(
            "{failed} verification checks failed"
        )));
    }
    Ok(())
}
