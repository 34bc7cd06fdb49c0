//! Reference data embedded at compile time from `tests/data/*.json`.

use serde_json::Value;

/// Parses one embedded reference file.
pub fn load(text: &str) -> Value {
    serde_json::from_str(text).expect("embedded reference JSON is valid")
}

/// Number at a JSON pointer (`/params/T`), panicking with the path if missing.
pub fn num(v: &Value, pointer: &str) -> f64 {
    v.pointer(pointer)
        .and_then(Value::as_f64)
        .unwrap_or_else(|| panic!("reference value {pointer} missing"))
}

/// Array of numbers at a JSON pointer.
pub fn nums(v: &Value, pointer: &str) -> Vec<f64> {
    v.pointer(pointer)
        .and_then(Value::as_array)
        .unwrap_or_else(|| panic!("reference array {pointer} missing"))
        .iter()
        .map(|x| x.as_f64().expect("number"))
        .collect()
}

/// The `source` string of a reference file.
pub fn source(v: &Value) -> String {
    v.get("source")
        .and_then(Value::as_str)
        .unwrap_or("")
        .to_string()
}

/// Reference files.
pub mod data {
    /// Steady composite Thiem solution, set A.
    pub const THIEM: &str = include_str!("../data/thiem_composite.json");
    /// Theis (1935) and the finite-radius solution.
    pub const THEIS: &str = include_str!("../data/theis.json");
    /// Periodic well-face head (K0/K1 solution).
    pub const PERIODIC: &str = include_str!("../data/periodic.json");
    /// Cooper–Bredehoeft–Papadopulos (1967) slug test.
    pub const SLUG: &str = include_str!("../data/slug_cbp.json");
    /// Papadopulos–Cooper (1967) / Agarwal et al. (1970) storage and skin.
    pub const STORAGE_SKIN: &str = include_str!("../data/papadopulos_cooper.json");
    /// Steady radial Forchheimer flow.
    pub const FORCHHEIMER: &str = include_str!("../data/forchheimer_steady.json");
    /// Screen orifice loss.
    pub const ORIFICE: &str = include_str!("../data/screen_orifice.json");
    /// Collapse limits of pipe and the vapour bound of a sealed tool.
    pub const DEVICES: &str = include_str!("../data/devices.json");
    /// Slug test with an inertial water column (Kipp 1985; Butler & Zhan 2004).
    pub const INERTIA: &str = include_str!("../data/inertia.json");
    /// Virtual pumping tests: Theis with skin, Papadopulos–Cooper, step-test C.
    pub const VIRTUAL_TESTS: &str = include_str!("../data/virtual_tests.json");
    /// Periodic solution of a scalar nonlinear ODE (scipy shooting).
    pub const PERIODIC_ODE: &str = include_str!("../data/periodic_ode.json");
}
