//! Verification of the boreflux solver against analytic and published solutions.
//!
//! Each check runs the solver on a reference problem and compares with values computed by
//! `tests/reference/generate.py` (scipy, mpmath) and stored in `tests/data/*.json`; every
//! JSON file names the published solution and the library calls that produced it. The
//! same checks run under `cargo test` (`tests/tests/verification.rs`) and from the binary
//! (`boreflux verify`).

pub mod checks;
pub mod damage;
pub mod development;
pub mod drives;
pub mod fit;
pub mod harmonic;
pub mod inertia;
pub mod models;
pub mod reference;
pub mod shooting;
pub mod stepping;
pub mod virtual_tests;

/// Outcome of one comparison.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct CheckResult {
    /// Short identifier of the check group, e.g. `theis`.
    pub group: &'static str,
    /// What was compared.
    pub name: String,
    /// Where the reference value comes from.
    pub source: String,
    /// Error found (in the unit given by `metric`).
    pub error: f64,
    /// Largest acceptable error.
    pub tolerance: f64,
    /// How the error is measured (`relative`, `absolute`, `degrees`, `order`).
    pub metric: &'static str,
    /// `error <= tolerance` (or, for an order, inside the accepted band).
    pub passed: bool,
}

impl CheckResult {
    /// A result that passes when `error <= tolerance`.
    pub fn new(
        group: &'static str,
        name: impl Into<String>,
        source: impl Into<String>,
        error: f64,
        tolerance: f64,
        metric: &'static str,
    ) -> Self {
        CheckResult {
            group,
            name: name.into(),
            source: source.into(),
            error,
            tolerance,
            metric,
            passed: error.is_finite() && error <= tolerance,
        }
    }
}

/// A named group of checks.
pub struct Group {
    /// Identifier, e.g. `thiem`.
    pub id: &'static str,
    /// What the group verifies.
    pub title: &'static str,
    /// Runs the group.
    pub run: fn() -> Vec<CheckResult>,
}

/// Every verification group, cheapest first.
pub fn groups() -> Vec<Group> {
    checks::all()
}

/// Runs every group.
pub fn run_all() -> Vec<CheckResult> {
    groups().iter().flat_map(|g| (g.run)()).collect()
}
