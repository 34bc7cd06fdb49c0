//! Random valid case files for the random-case harness: a tiny seeded generator
//! (splitmix64) and one case builder per drive kind. Every value is drawn from a range of
//! common practice (no source: wide ranges of ordinary water wells and development tools,
//! well inside the input limits), durations are a few cycles so that a few hundred cases
//! run in seconds.

use serde_json::{json, Value};

/// splitmix64 (Steele, Lea and Flood, "Fast splittable pseudorandom number generators",
/// OOPSLA 2014): a 64-bit state, one add and three xor-shift-multiplies per number.
pub struct Rng(u64);

impl Rng {
    pub fn new(seed: u64) -> Self {
        Rng(seed)
    }

    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }

    /// Uniform in [0, 1).
    pub fn unit(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }

    /// Uniform in [a, b).
    pub fn uniform(&mut self, a: f64, b: f64) -> f64 {
        a + (b - a) * self.unit()
    }

    /// Log-uniform in [a, b) (a, b > 0).
    pub fn log_uniform(&mut self, a: f64, b: f64) -> f64 {
        (a.ln() + (b.ln() - a.ln()) * self.unit()).exp()
    }

    /// Integer in [a, b].
    pub fn int(&mut self, a: u64, b: u64) -> u64 {
        a + self.next_u64() % (b - a + 1)
    }

    pub fn chance(&mut self, p: f64) -> bool {
        self.unit() < p
    }
}

/// The drive kinds the harness covers.
pub const KINDS: [&str; 9] = [
    "sine_head",
    "constant_rate",
    "slug",
    "table",
    "surge_block",
    "swab",
    "pump_backwash",
    "jet_pulse",
    "schedule",
];

/// A drive of `kind` and its duration (a JSON value: seconds or "n cycles").
fn drive(rng: &mut Rng, kind: &str, screen_radius: f64, casing_radius: f64) -> (Value, Value) {
    match kind {
        "sine_head" => (
            json!({"kind": "sine_head", "amplitude": rng.log_uniform(0.1, 5.0),
                   "frequency": rng.log_uniform(0.05, 1.0), "ramp_cycles": rng.uniform(0.0, 1.0)}),
            json!(format!("{} cycles", rng.int(2, 4))),
        ),
        "constant_rate" => (
            json!({"kind": "constant_rate", "pumping_rate": format!("{} L/s", rng.log_uniform(0.5, 20.0))}),
            json!(rng.uniform(60.0, 600.0)),
        ),
        "slug" => {
            let h = rng.log_uniform(0.2, 3.0) * if rng.chance(0.5) { 1.0 } else { -1.0 };
            (
                json!({"kind": "slug", "initial_head": h}),
                json!(rng.uniform(60.0, 600.0)),
            )
        }
        "table" => {
            let n = rng.int(3, 10);
            let mut t = 0.0;
            let mut points = vec![json!([0.0, rng.uniform(-2.0, 2.0)])];
            for _ in 1..n {
                t += rng.uniform(2.0, 10.0);
                points.push(json!([t, rng.uniform(-2.0, 2.0)]));
                if rng.chance(0.2) {
                    points.push(json!([t, rng.uniform(-2.0, 2.0)]));
                }
            }
            let repeat = rng.chance(0.5);
            let duration = if repeat {
                json!(format!("{} cycles", rng.int(2, 3)))
            } else {
                json!(t * 1.5)
            };
            (
                json!({"kind": "table", "quantity": "head", "repeat": repeat, "points": points}),
                duration,
            )
        }
        "surge_block" => {
            let spm = rng.uniform(10.0, 40.0);
            let mut d = json!({"kind": "surge_block", "stroke": rng.uniform(0.3, 1.5),
                               "strokes_per_minute": spm, "ramp_cycles": rng.uniform(0.0, 2.0),
                               "depth": rng.uniform(2.0, 40.0)});
            if rng.chance(0.3) {
                d["kinematics"] = json!("trapezoidal");
                d["reversal_time"] = json!(rng.uniform(0.05, 0.3) * 30.0 / spm);
            }
            if rng.chance(0.3) {
                let area = std::f64::consts::PI * casing_radius * casing_radius;
                d["valve_area"] = json!(rng.uniform(0.01, 0.2) * area);
            }
            (d, json!(format!("{} cycles", rng.int(2, 4))))
        }
        "swab" => (
            json!({"kind": "swab", "lift_rate": rng.uniform(0.3, 1.5), "stroke": rng.uniform(2.0, 8.0),
                   "lowering_time": rng.uniform(5.0, 20.0), "submergence": rng.uniform(2.0, 20.0),
                   "strokes": rng.int(0, 3)}),
            json!(format!("{} cycles", rng.int(2, 3))),
        ),
        "pump_backwash" => {
            let rate = rng.log_uniform(2.0, 30.0);
            let mut d = json!({"kind": "pump_backwash",
                   "on_time": rng.uniform(30.0, 180.0), "off_time": rng.uniform(30.0, 120.0),
                   "intake_depth": rng.uniform(5.0, 40.0), "cycles": rng.int(0, 2)});
            if rng.chance(0.5) {
                d["pumping_rate"] = json!(format!("{rate} L/s"));
            } else {
                // A curve whose rated point lies on the drawn rate.
                let rated_head = rng.uniform(10.0, 60.0);
                d["pump_curve"] = json!({"shutoff_head": format!("{} m", rated_head * rng.uniform(1.2, 1.6)),
                                         "rated_rate": format!("{rate} L/s"),
                                         "rated_head": format!("{rated_head} m")});
                d["discharge_height"] = json!(rng.uniform(0.0, 5.0));
            }
            if rng.chance(0.5) {
                d["backflow_volume"] = json!(rng.uniform(0.05, 0.5));
            } else {
                d["riser_radius"] = json!(rng.uniform(0.025, 0.06));
            }
            (d, json!(format!("{} cycles", rng.int(1, 2))))
        }
        "jet_pulse" => {
            let nozzles = rng.int(1, 4);
            // Narrower than the spacing of the nozzles along the circumference.
            let spacing = 2.0 * std::f64::consts::PI * screen_radius / nozzles as f64;
            let mut d = json!({"kind": "jet_pulse", "nozzle_velocity": rng.uniform(20.0, 80.0),
                   "nozzle_diameter": rng.uniform(0.003, 0.01),
                   "rotation_period": rng.uniform(5.0, 30.0), "nozzles": nozzles,
                   "jet_width": rng.uniform(0.005, 0.02).min(0.3 * spacing)});
            if rng.chance(0.5) {
                d["pumping_rate"] = json!(format!("{} L/s", rng.log_uniform(1.0, 10.0)));
            }
            (d, json!(format!("{} cycles", rng.int(1, 2))))
        }
        "schedule" => {
            let n = rng.int(2, 3);
            let stages: Vec<Value> = (0..n)
                .map(|_| {
                    let kind = ["sine_head", "surge_block", "constant_rate", "slug"]
                        [rng.int(0, 3) as usize];
                    let (d, _) = drive(rng, kind, screen_radius, casing_radius);
                    json!({"duration": rng.uniform(10.0, 60.0), "drive": d})
                })
                .collect();
            (json!({"kind": "schedule", "stages": stages}), Value::Null)
        }
        other => panic!("unknown kind {other}"),
    }
}

/// A random valid case with a drive of `kind`.
pub fn case(rng: &mut Rng, kind: &str) -> Value {
    let rs = rng.log_uniform(0.05, 0.3);
    let rb = rs * rng.uniform(1.2, 2.5);
    let rc = rs * rng.uniform(0.85, 1.0);
    let mut c = json!({
        "title": format!("random {kind}"),
        "well": {"screen_radius": rs, "screen_length": rng.uniform(2.0, 30.0),
                 "open_area": rng.uniform(0.05, 0.4), "casing_radius": rc},
        "pack": {"outer_radius": rb, "porosity": rng.uniform(0.25, 0.4),
                 "conductivity": rng.log_uniform(1e-4, 1e-2),
                 "specific_storage": rng.log_uniform(1e-6, 1e-4)},
        "formation": {"conductivity": rng.log_uniform(1e-7, 1e-3),
                      "specific_storage": rng.log_uniform(1e-6, 1e-3),
                      "porosity": rng.uniform(0.2, 0.4)},
    });
    if rng.chance(0.5) {
        let mut cake = json!({"thickness": rng.uniform(5e-4, 5e-3),
                              "conductivity": rng.log_uniform(1e-10, 1e-6)});
        if rng.chance(0.5) {
            cake["erosion"] = json!({"critical_shear": rng.log_uniform(1e-5, 1.0),
                                     "erodibility": rng.log_uniform(1e-6, 1e-3),
                                     "inward_weight": 1, "outward_weight": rng.uniform(0.0, 1.0),
                                     "coverage_exponent": rng.uniform(0.0, 1.0)});
        }
        c["cake"] = cake;
    }
    if rng.chance(0.5) {
        c["invaded"] = json!({"thickness": rng.uniform(0.01, 0.2),
                              "conductivity_ratio": rng.uniform(0.05, 0.5)});
    }
    let (d, duration) = drive(rng, kind, rs, rc);
    c["drive"] = d;
    if !duration.is_null() {
        c["duration"] = duration;
    }
    c
}
