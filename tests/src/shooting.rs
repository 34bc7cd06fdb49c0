//! The periodic state by Newton–shooting (docs/numerics.md §Periodic state by shooting):
//! (1) its Newton–Krylov core on a scalar nonlinear periodic ODE against scipy
//! (tests/data/periodic_ode.json: brentq shooting on `solve_ivp`, rtol 1e-12); (2) the
//! whole method on a linear model against the harmonic method, which the `harmonic` group
//! checks against the analytic periodic solution. The shooting module itself cannot be
//! driven with a one-cell model (the grid puts at least 16 cells in the pack), hence the
//! scalar problem goes through `periodic::fixed_point`, the part that is generic.

use crate::models::homogeneous;
use crate::reference::{data, load, num, nums, source};
use crate::CheckResult;
use boreflux_solver::drive::{Drive, SineHead};
use boreflux_solver::harmonic;
use boreflux_solver::periodic::{fixed_point, shoot, Options, Settings};
use boreflux_solver::slow::SlowState;

const GROUP: &str = "shooting";

/// Classical RK4 over one period of x' = −a x|x| + b cos ωt + c in `steps` steps from x0;
/// `samples` gets x at every `steps / samples.len()`-th step from t = 0 (if not empty).
fn rk4(p: &serde_json::Value, x0: f64, steps: usize, samples: &mut [f64]) -> f64 {
    let (a, b, c, w) = (num(p, "/a"), num(p, "/b"), num(p, "/c"), num(p, "/omega"));
    let f = |t: f64, x: f64| -a * x * x.abs() + b * (w * t).cos() + c;
    let h = 2.0 * std::f64::consts::PI / w / steps as f64;
    let every = if samples.is_empty() {
        usize::MAX
    } else {
        steps / samples.len()
    };
    let mut x = x0;
    for k in 0..steps {
        if !samples.is_empty() && k % every == 0 {
            samples[k / every] = x;
        }
        let t = k as f64 * h;
        let k1 = f(t, x);
        let k2 = f(t + 0.5 * h, x + 0.5 * h * k1);
        let k3 = f(t + 0.5 * h, x + 0.5 * h * k2);
        let k4 = f(t + h, x + h * k3);
        x += h / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4);
    }
    x
}

/// The periodic solution at the reference's phases by shooting on RK4 with `steps` steps.
fn shot(p: &serde_json::Value, steps: usize, phases: usize) -> (Vec<f64>, usize) {
    let settings = Settings {
        tolerance: 1e-13,
        max_newton: 30,
        max_evaluations: 300,
        restart: 5,
    };
    let mut z = [0.0];
    let out = fixed_point(&mut z, &settings, |x: &[f64], o: &mut [f64]| {
        o[0] = rk4(p, x[0], steps, &mut []);
        Ok::<(), ()>(())
    })
    .expect("no error");
    let mut samples = vec![f64::NAN; phases];
    if out.converged {
        rk4(p, z[0], steps, &mut samples);
    }
    (samples, out.newton)
}

fn worst(a: &[f64], b: &[f64]) -> f64 {
    a.iter()
        .zip(b)
        .map(|(x, y)| (x - y).abs())
        .fold(f64::NAN, |m, d| if m.is_nan() || d > m { d } else { m })
}

/// The verification group `shooting`.
pub fn shooting() -> Vec<CheckResult> {
    let v = load(data::PERIODIC_ODE);
    let src = source(&v);
    let p = &v["params"];
    let want = nums(&v, "/x");
    let mut out = Vec::new();
    // (1) RK4 at 128, 256, 512 steps a period (coarse enough that the error is far above
    // round-off). Error at 512 steps against scipy ≤ 1.25 × its Richardson estimate
    // |x₂₅₆ − x₅₁₂|/15 for a fourth-order method, plus 1e-11 for the reference's own
    // tolerance (rtol 1e-12 on x ≤ 2) and the shooting's 1e-13.
    let runs: Vec<Vec<f64>> = [128, 256, 512]
        .iter()
        .map(|&n| shot(p, n, want.len()).0)
        .collect();
    let estimate = worst(&runs[1], &runs[2]) / 15.0;
    out.push(CheckResult::new(
        GROUP,
        "scalar x' = −a x|x| + b cos ωt + c: Newton–Krylov shooting on RK4 (512 steps), \
         x at 8 phases",
        &src,
        worst(&runs[2], &want),
        1.25 * estimate + 1e-11,
        "absolute",
    ));
    // RK4's observed order from the three runs (it must be 4 for the estimate to mean
    // anything); the reference's parameters keep x > 0, where x|x| = x² is smooth. Band
    // 3.5–4.5.
    let order = (worst(&runs[0], &runs[1]) / worst(&runs[1], &runs[2])).log2();
    out.push(CheckResult {
        group: GROUP,
        name: "scalar ODE: observed order of the shot periodic solution (RK4, 128–512 \
               steps)"
            .into(),
        source: "classical Runge–Kutta, fourth order (common knowledge, no source)".into(),
        error: order,
        tolerance: 4.0,
        metric: "order",
        passed: (3.5..=4.5).contains(&order),
    });
    // (2) A linear well under a sine head: the shooting's state at a cycle start against
    // the harmonic method's at phase 0, at 50, 100, 200 fixed TR-BDF2 steps a period. The
    // only difference is TR-BDF2's global error, second order (Bank et al. 1985): order
    // band 1.8–2.2; the error at 200 steps ≤ 1.25 × its Richardson estimate (1/3)|e₁₀₀ −
    // e₂₀₀| (the shooting tolerance 1e-11 of the 1 m drive is far below).
    let m = homogeneous(
        1e-4,
        1e-5,
        5.0,
        0.1,
        Drive::SineHead(SineHead {
            amplitude_m: 1.0,
            frequency_hz: 0.5,
            offset_m: 0.0,
            ramp_cycles: 0.0,
        }),
        10.0,
    );
    let sol = harmonic::solve(&m, 1).expect("harmonic method");
    let slow = SlowState::new(&m);
    let heads: Vec<Vec<f64>> = [50, 100, 200]
        .iter()
        .map(|&n| {
            let opts = Options {
                steps_per_cycle: n,
                tolerance: 1e-11,
                ..Options::for_model(&m)
            };
            shoot(&m, &slow, &opts)
                .map(|s| s.heads_m)
                .unwrap_or_default()
        })
        .collect();
    let exact: Vec<f64> = (0..heads[2].len()).map(|j| sol.head_m(j, 0.0)).collect();
    let errors: Vec<f64> = heads.iter().map(|h| worst(&h[1..], &exact[1..])).collect();
    let order = (errors[1] / errors[2]).log2();
    out.push(CheckResult {
        group: GROUP,
        name: "linear well, sine head: observed order of the shot periodic state (TR-BDF2, \
               100–200 steps a period)"
            .into(),
        source: "TR-BDF2 second order (Bank et al. 1985); the harmonic method".into(),
        error: order,
        tolerance: 2.0,
        metric: "order",
        passed: (1.8..=2.2).contains(&order),
    });
    out.push(CheckResult::new(
        GROUP,
        "linear well, sine head: shot periodic heads (200 steps a period) vs the harmonic \
         method",
        "the harmonic method (group `harmonic`), Richardson estimate of the time error",
        errors[2],
        1.25 * (errors[1] - errors[2]).abs() / 3.0,
        "absolute",
    ));
    out
}
