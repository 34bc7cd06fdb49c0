//! Runs that the Crank–Nicolson stepper lost to a Newton failure, rebuilt from the shipped
//! demo cases (invented data): the default scheme must finish them (a failed solve is retried
//! with shorter steps), and where the θ-scheme, which does not retry, still fails, that shows
//! the case still tests what it was made for.

use boreflux::case::parse_case;
use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::model::Scheme;
use boreflux_solver::{run, Reporting, SolverError};
use serde_json::{json, Value};
use std::path::Path;

fn case(name: &str) -> Value {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("../cases")
        .join(name);
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

fn model(v: &Value) -> boreflux_solver::Model {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    parse_case(&v.to_string(), &dir).unwrap().model
}

/// cases/swab-deep.json in a formation of 1e-9 m/s: Newton did not converge at t ≈ 92.6 s.
#[test]
fn deep_swab_in_a_sealed_formation_finishes() {
    let mut v = case("swab-deep.json");
    v["formation"]["conductivity"] = json!("1e-9 m/s");
    // The θ-scheme no longer loses this case either: since the column under the cups parts
    // at the vapour bound, the steps at that limit are backward Euler under both schemes.
    let m = model(&v);
    let s = run(&m, &mut NullObserver, Reporting::default()).unwrap();
    assert_eq!(s.end_time_s, m.duration_s);
    println!(
        "default: {} steps, {} retried solves, volume residual {:.1e}",
        s.steps, s.retried_solves, s.max_mass_residual
    );
}

/// A 1 m slug stage followed by the municipal case's surge-block stage: Newton failed at
/// t = 5e-5 s.
#[test]
fn slug_stage_then_surge_block_stage_finishes() {
    let mut v = case("municipal-sand-gravel.json");
    let block = v["drive"].clone();
    v["drive"] = json!({
        "kind": "schedule",
        "stages": [
            { "duration": "60 s", "drive": { "kind": "slug", "initial_head": "1 m" } },
            { "duration": "60 s", "drive": block }
        ]
    });
    v["duration"] = json!("120 s");
    v["numerics"] = json!({});
    let mut m = model(&v);
    let s = run(&m, &mut NullObserver, Reporting::default()).unwrap();
    assert_eq!(s.end_time_s, 120.0);
    println!(
        "default: {} steps, {} retried solves, {} rejected",
        s.steps, s.retried_solves, s.rejected_steps
    );
    m.numerics.scheme = Scheme::Theta;
    let e = run(&m, &mut NullObserver, Reporting::default());
    println!("theta: {e:?}");
    assert!(matches!(e, Err(SolverError::NewtonFailed { .. })), "{e:?}");
}
