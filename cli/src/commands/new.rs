//! `boreflux new`: print a shipped scenario as a starter case.

use super::{print_out, Failure};
use crate::args::NewArgs;
use crate::case::{scenario_companions, scenarios};

/// Prints the scenario (or the list of scenarios).
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
    for (scenario, file, _) in scenario_companions() {
        if *scenario == a.scenario {
            eprintln!(
                "note: this scenario reads `{file}`; copy it from cases/ beside your case file"
            );
        }
    }
    print_out(json)
}
