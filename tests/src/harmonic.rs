//! The harmonic method against the analytic periodic steady state (docs/physics.md §8c).
//!
//! The same reference data, radii and periods as the `periodic` group, but solved by
//! `boreflux_solver::harmonic` (one complex tridiagonal solve, no time stepping), so the
//! only error left is the spatial discretization's.
//!
//! Tolerance: that spatial error, estimated for each compared quantity z by Richardson
//! extrapolation from the same problem on a grid twice as fine in ln r. For a second-order
//! scheme z_Δ = z + C Δ² + O(Δ⁴), so
//!
//! ```text
//! |z_Δ − z| ≈ (4/3) |z_Δ − z_{Δ/2}|       (Richardson extrapolation, 1911; from memory)
//! tolerance = 1.25 × (4/3) |z_Δ − z_{Δ/2}| / |z_ref|
//! ```
//! Heads (over the well head, at r) and the face flow (over the well head) are compared as
//! complex numbers, so no component's error can vanish by chance; the amplitude's relative
//! error and the phase error in radians are each at most the complex relative error to
//! first order. The mean power is real and compared as it is. The 25 %
//! covers the O(Δ⁴) terms, (|a| r Δ ln r)² ≈ 5 % at the farthest radius of the P = 2 s
//! case (a = sqrt(iωS/T), docs/physics.md §8c), and the interpolation point sitting at another
//! place in its cell on the finer grid. A last check asks that the error itself falls by
//! four when Δ ln r is halved, so the estimate rests on an observed second order.
//!
//! Grids: 30 cells per decade of radius everywhere (the default formation resolution) and
//! 60; the ring of formation material around the screen is taken out to 1 m so both grids
//! hold whole decades there (the aquifer is homogeneous, so this changes nothing else).

use crate::reference::{data, load, num, nums, source};
use crate::CheckResult;
use boreflux_solver::harmonic::{self, Complex, PeriodicSolution};
use boreflux_solver::model::{GridSpec, Model};

/// The `periodic` group's model (`checks::sine_model`) for 12 periods
/// with the automatic outer radius, at `per_decade` cells per decade of radius.
fn sine_model(v: &serde_json::Value, period: f64, per_decade: f64) -> Model {
    let mut m = crate::checks::sine_model(v, period, 12.0);
    m.numerics.grid = GridSpec::PerDecade(per_decade);
    m.pack.outer_radius_m = 1.0;
    m
}

/// Complex head amplitude at radius r over the well head's (linear in ln r between nodes,
/// as the time-stepping checks sample the grid).
fn head_ratio(sol: &PeriodicSolution, r: f64) -> Complex {
    let h = sol.amplitudes(1);
    let re: Vec<f64> = h[1..].iter().map(|a| a.re).collect();
    let im: Vec<f64> = h[1..].iter().map(|a| a.im).collect();
    let g = &sol.disc.grid;
    Complex::new(g.interpolate(&re, r), g.interpolate(&im, r)) / h[0]
}

/// Screen flow amplitude per unit well-head amplitude, m²/s (the reference's q_hat per m).
fn flow_ratio(sol: &PeriodicSolution) -> Complex {
    sol.flow_amplitude(0, 1) / sol.amplitudes(1)[0]
}

/// Tolerance from the spatial error estimate (module doc).
fn richardson(coarse: Complex, fine: Complex, want: Complex) -> f64 {
    1.25 * (4.0 / 3.0) * (coarse - fine).abs() / want.abs()
}

/// Upper bounds on the estimated tolerances: those of the time-stepping `periodic` group
/// (5e-3 relative amplitude, 0.5°), so this check is never looser than that one whatever
/// the fine grid gives.
const AMPLITUDE_CAP: f64 = 5e-3;
/// See [`AMPLITUDE_CAP`].
const PHASE_CAP_DEG: f64 = 0.5;

/// Cells per decade of the checked grid and of the grid twice as fine.
const COARSE: f64 = 30.0;
const FINE: f64 = 60.0;

/// One comparison of a complex quantity: amplitude (relative) and phase (degrees) of
/// `coarse` against `want`, each with the Richardson tolerance of the module doc.
fn amplitude_and_phase(
    what: &str,
    src: &str,
    coarse: Complex,
    fine: Complex,
    want: Complex,
) -> [CheckResult; 2] {
    let tol = richardson(coarse, fine, want).min(AMPLITUDE_CAP);
    [
        CheckResult::new(
            "harmonic",
            format!("{what} amplitude"),
            src,
            (coarse.abs() / want.abs() - 1.0).abs(),
            tol,
            "relative",
        ),
        CheckResult::new(
            "harmonic",
            format!("{what} phase"),
            src,
            (coarse / want).arg().abs().to_degrees(),
            tol.to_degrees().min(PHASE_CAP_DEG),
            "degrees",
        ),
    ]
}

/// Head amplitude and phase at the reference radii, face flow and mean power of the
/// harmonic solution, with tolerances from the spatial discretization (module doc); the
/// observed order of the face-flow error.
pub fn analytic_periodic() -> Vec<CheckResult> {
    let v = load(data::PERIODIC);
    let src = source(&v);
    let rho_g = num(&v, "/params/rho") * num(&v, "/params/g");
    let h0 = num(&v, "/params/H0");
    let mut out = Vec::new();
    let mut flow_errors = None;
    for case in v["cases"].as_array().unwrap() {
        let period = case["period"].as_f64().unwrap();
        let radii = nums(case, "/radii");
        let amp = nums(case, "/amplitude_ratio");
        let lag = nums(case, "/phase_lag_rad");
        let [coarse, fine] = [COARSE, FINE]
            .map(|pd| harmonic::solve(&sine_model(&v, period, pd), 1).expect("harmonic solve"));
        for (k, &r) in radii.iter().enumerate() {
            // Reference ratio amplitude · e^{−i lag}.
            let want = Complex::new(amp[k] * lag[k].cos(), -amp[k] * lag[k].sin());
            out.extend(amplitude_and_phase(
                &format!("P = {period} s: head at r = {r} m,"),
                &src,
                head_ratio(&coarse, r),
                head_ratio(&fine, r),
                want,
            ));
        }
        let want = Complex::new(num(case, "/q_hat_re"), num(case, "/q_hat_im"));
        let (qc, qf) = (flow_ratio(&coarse), flow_ratio(&fine));
        out.extend(amplitude_and_phase(
            &format!("P = {period} s: face flow"),
            &src,
            qc,
            qf,
            want,
        ));
        if flow_errors.is_none() {
            let rel = |q: Complex| (q - want).abs() / want.abs();
            flow_errors = Some((period, rel(qc), rel(qf)));
        }
        // Mean power for H0 = 1 m: all of it is dissipated (no power crosses R).
        let power = |s: &PeriodicSolution| {
            rho_g * s.mean_dissipation_m4_s().iter().sum::<f64>() / (h0 * h0)
        };
        let (pc, pf) = (power(&coarse), power(&fine));
        let want = num(case, "/mean_power_w");
        out.push(CheckResult::new(
            "harmonic",
            format!("P = {period} s: mean power dissipated"),
            &src,
            (pc / want - 1.0).abs(),
            (1.25 * (4.0 / 3.0) * (pc - pf).abs() / want).min(AMPLITUDE_CAP),
            "relative",
        ));
    }
    let (period, e1, e2) = flow_errors.expect("at least one case");
    let p = (e1 / e2).log2();
    let mut r = CheckResult::new(
        "harmonic",
        format!("observed spatial order, face flow, P = {period} s (errors {e1:.2e} → {e2:.2e})"),
        &src,
        p,
        2.2,
        "order",
    );
    // Same band as the `order` group's: second order, 1.8 ≤ p ≤ 2.2.
    r.passed = (1.8..=2.2).contains(&p);
    out.push(r);
    out
}
