//! The JSON documents of `check --json` and `steptest --json` hold exactly the keys the
//! output schema lists (cli/src/output/schema/documents.rs, docs/formats.md): every key a
//! command prints is listed, and every listed key is printed by one of the runs here. The
//! source of truth checked against is the commands' own output.

mod common;

use boreflux::output::schema::{check_json, estimate, steptest_json, JsonKey, Shape};
use boreflux_solver::grid::Zone;
use common::{json_of, repo_dir};
use serde_json::Value;
use std::collections::BTreeSet;
use std::path::PathBuf;

fn repo(path: &str) -> PathBuf {
    repo_dir().join(path)
}

/// The dotted paths of a document, with `[]` for the elements of an array; the objects by
/// zone and the estimates are checked here and kept as one path.
fn paths(v: &Value, path: &str, keys: &[JsonKey], out: &mut BTreeSet<String>) {
    let shape = keys.iter().find(|k| k.path == path).map(|k| k.shape);
    match (v, shape) {
        (Value::Object(m), Some(Shape::PerZone)) => {
            let names: BTreeSet<&str> = m.keys().map(String::as_str).collect();
            let zones: BTreeSet<&str> = Zone::ALL.iter().map(|z| z.name()).collect();
            assert_eq!(names, zones, "{path}");
        }
        (Value::Object(m), Some(Shape::Estimate)) => {
            let names: BTreeSet<&str> = m.keys().map(String::as_str).collect();
            let listed: BTreeSet<&str> = estimate::ALL.iter().map(JsonKey::key).collect();
            assert_eq!(names, listed, "{path}");
        }
        (Value::Object(m), _) => {
            for (k, x) in m {
                let p = if path.is_empty() {
                    k.clone()
                } else {
                    format!("{path}.{k}")
                };
                out.insert(p.clone());
                paths(x, &p, keys, out);
            }
        }
        (Value::Array(items), _) => {
            for x in items {
                if x.is_object() {
                    paths(x, &format!("{path}[]"), keys, out);
                }
            }
        }
        _ => {}
    }
}

fn compare(keys: &[JsonKey], docs: &[Value]) {
    let mut seen = BTreeSet::new();
    for d in docs {
        let mut found = BTreeSet::new();
        paths(d, "", keys, &mut found);
        for p in &found {
            assert!(
                keys.iter().any(|k| k.path == *p),
                "printed but not in the schema: {p}"
            );
        }
        seen.extend(found);
    }
    for k in keys {
        assert!(
            seen.contains(k.path),
            "in the schema but never printed: {}",
            k.path
        );
    }
}

#[test]
fn check_json_prints_exactly_the_schema_keys() {
    // A linear (Darcy) well under a sine head, where `check` computes the periodic state.
    let linear = repo("cli/tests/data/linear-sine.json");
    let demo = repo("cases/municipal-sand-gravel.json");
    // A schedule: no periodic state (`periodic_state.not_applicable`).
    let staged = repo("cases/staged-development.json");
    let docs = [
        json_of(&["check", linear.to_str().unwrap(), "--json"]),
        json_of(&["check", staged.to_str().unwrap(), "--json"]),
        json_of(&[
            "check",
            demo.to_str().unwrap(),
            "--json",
            "--annulus",
            "0.05",
        ]),
    ];
    compare(check_json::ALL, &docs);
    // The standing cautions, word for word.
    for d in &docs {
        assert_eq!(d["cautions"], boreflux_solver::safety::CAUTION);
    }
}

#[test]
fn steptest_json_prints_exactly_the_schema_keys() {
    let series = repo("cases/step-tests/demo-series.csv");
    let steps = repo("cases/step-tests/demo-steps.csv");
    let case = repo("cases/municipal-sand-gravel.json");
    // Three steps: the power law has three unknowns and is not fitted (invented numbers).
    let dir = tempfile::tempdir().unwrap();
    let three = dir.path().join("three.csv");
    std::fs::write(&three, "rate_L/s,drawdown_m\n5,0.98\n10,2.05\n15,3.21\n").unwrap();
    // s/Q falling as Q rises: C < 0, so the warnings hold objects (invented numbers).
    let negative = dir.path().join("negative.csv");
    std::fs::write(&negative, "rate_L/s,drawdown_m\n5,0.98\n10,2.05\n15,2.6\n").unwrap();
    let docs = [
        json_of(&[
            "steptest",
            series.to_str().unwrap(),
            "--json",
            "--power",
            "--case",
            case.to_str().unwrap(),
        ]),
        json_of(&["steptest", steps.to_str().unwrap(), "--json"]),
        json_of(&["steptest", three.to_str().unwrap(), "--json", "--power"]),
        json_of(&["steptest", negative.to_str().unwrap(), "--json"]),
    ];
    compare(steptest_json::ALL, &docs);
}
