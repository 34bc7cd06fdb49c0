//! `boreflux new`: print a shipped scenario as a starter case, or write it (`-o`) with the
//! files it reads beside it, under the overwrite policy of every command (`outputs.rs`).

use super::outputs::check_output;
use super::{print_out, Failure};
use crate::args::NewArgs;
use crate::case::{scenario_companions, scenarios};
use crate::output::TempTarget;
use std::path::Path;

/// Prints the scenario (or the list of scenarios), or writes it with its companions.
pub fn new(a: &NewArgs) -> Result<(), Failure> {
    if a.list {
        let mut text = String::new();
        for (name, json) in scenarios() {
            let v: serde_json::Value =
                serde_json::from_str(json).map_err(|e| Failure::Runtime(e.into()))?;
            text += &format!("{name:<28} {}\n", v["title"].as_str().unwrap_or(""));
        }
        return print_out(&text);
    }
    let Some((_, json)) = scenarios().iter().find(|(n, _)| *n == a.scenario) else {
        let names: Vec<&str> = scenarios().iter().map(|(n, _)| *n).collect();
        return Err(Failure::Input(anyhow::anyhow!(
            "unknown scenario `{}`; available: {}",
            a.scenario,
            names.join(", ")
        )));
    };
    let companions: Vec<(&str, &str)> = scenario_companions()
        .iter()
        .filter(|(scenario, _, _)| *scenario == a.scenario)
        .map(|&(_, file, text)| (file, text))
        .collect();
    let Some(output) = &a.output else {
        for (file, _) in &companions {
            eprintln!(
                "note: this scenario reads `{file}`; `boreflux new --scenario {} -o <case.json>` \
                 writes it beside the case",
                a.scenario
            );
        }
        return print_out(json);
    };
    // The case and its companions, each checked before any is written, then each written
    // whole (temporary file and rename), so a refusal leaves nothing behind.
    let dir = output.parent().unwrap_or(Path::new(""));
    let mut files = vec![(output.clone(), "-o/--output", *json)];
    for (file, text) in &companions {
        files.push((dir.join(file), "the scenario's companion file", *text));
    }
    for (path, flag, _) in &files {
        check_output(path, flag, a.force).map_err(Failure::Input)?;
    }
    for (path, _, text) in &files {
        let mut target = TempTarget::new(path).map_err(|e| Failure::Runtime(e.into()))?;
        std::fs::write(target.tmp(), text)
            .map_err(|e| Failure::Runtime(anyhow::anyhow!("writing {}: {e}", path.display())))?;
        target.commit().map_err(|e| Failure::Runtime(e.into()))?;
    }
    let written: Vec<String> = files
        .iter()
        .map(|(p, _, _)| p.display().to_string())
        .collect();
    eprintln!("written: {}", written.join(", "));
    Ok(())
}
