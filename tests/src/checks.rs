//! The verification groups. Tolerances and their reasons are stated beside each check.

use crate::fit::sin_cos;
use crate::models::homogeneous;
use crate::reference::{data, load, num, nums, source};
use crate::{CheckResult, Group};
use boreflux_solver::cake::CakeState;
use boreflux_solver::drive::{Drive, SineHead};
use boreflux_solver::model::{Cake, GridSpec, Invaded, Medium, Model, TimeSpec, Well};
use boreflux_solver::stepper::Stepper;
use boreflux_solver::{run, Reporting, StepObserver, StepView};
use std::f64::consts::PI;

/// Every group, cheapest first.
pub fn all() -> Vec<Group> {
    vec![
        Group {
            id: "thiem",
            title: "Steady composite Thiem: pack | cake | invaded | formation",
            run: thiem,
        },
        Group {
            id: "theis",
            title: "Theis (1935) constant-rate drawdown",
            run: theis,
        },
        Group {
            id: "periodic",
            title: "Periodic well-face head (K0/K1 solution)",
            run: periodic,
        },
        Group {
            id: "harmonic",
            title: "Harmonic method vs the periodic well-face head solution",
            run: crate::harmonic::analytic_periodic,
        },
        Group {
            id: "shooting",
            title: "Periodic state by Newton–shooting: scalar ODE (scipy) and the harmonic method",
            run: crate::shooting::shooting,
        },
        Group {
            id: "slug",
            title: "Cooper–Bredehoeft–Papadopulos (1967) slug test",
            run: slug,
        },
        Group {
            id: "storage",
            title: "Papadopulos–Cooper (1967) pumping with well-bore storage",
            run: storage,
        },
        Group {
            id: "balance",
            title: "Mass and energy balance",
            run: balance,
        },
        Group {
            id: "order",
            title: "Second-order convergence of the time stepping",
            run: order,
        },
        Group {
            id: "forchheimer",
            title: "Steady radial Forchheimer flow",
            run: crate::development::forchheimer,
        },
        Group {
            id: "grain",
            title: "Ergun, Kozeny–Carman and Hazen estimates",
            run: crate::development::grain_size,
        },
        Group {
            id: "cake_skin",
            title: "Thin-cake skin vs Hawkins (1956)",
            run: crate::development::cake_skin,
        },
        Group {
            id: "screen",
            title: "Screen entrance (orifice) loss",
            run: crate::development::screen_loss,
        },
        Group {
            id: "erosion",
            title: "Cake erosion vs closed form",
            run: crate::development::erosion,
        },
        Group {
            id: "lift_off",
            title: "Cake lift-off: log-normal strengths (scipy) and the one-strength threshold",
            run: crate::damage::lift_off,
        },
        Group {
            id: "fines",
            title: "Invaded-zone fines: closed form at constant velocity, conservation",
            run: crate::damage::fines,
        },
        Group {
            id: "damage_monotonic",
            title: "Damage removal: stronger loading, tighter cake",
            run: crate::damage::monotonic,
        },
        Group {
            id: "retention",
            title: "Pack and slot retention criteria at their published limits",
            run: crate::damage::retention,
        },
        Group {
            id: "nonlinear_energy",
            title: "Energy identity with nonlinear losses",
            run: crate::development::nonlinear_energy,
        },
        Group {
            id: "drives_volume",
            title: "Volume balance of the development drives",
            run: crate::drives::volume_balance,
        },
        Group {
            id: "surge_limits",
            title: "Surge block: flow-controlled and sealed-formation limits",
            run: crate::drives::surge_limits,
        },
        Group {
            id: "swab",
            title: "Swab stroke and recovery vs slug solution",
            run: crate::drives::swab_recovery,
        },
        Group {
            id: "schedule",
            title: "Pumping stage of a schedule vs Papadopulos–Cooper",
            run: crate::drives::pumping_stage,
        },
        Group {
            id: "collapse",
            title: "Collapse pressure: thin-ring buckling and first yield",
            run: crate::drives::collapse,
        },
        Group {
            id: "pump",
            title: "Pump curve and suction break at steady state",
            run: crate::drives::pump_curve,
        },
        Group {
            id: "jet",
            title: "Jetting: nozzle flow, stagnation pressure and the well's volume balance",
            run: crate::drives::jet_balance,
        },
        Group {
            id: "vapour",
            title: "Vapour bound and column parting under a sealed surge block",
            run: crate::drives::vapour_bound,
        },
        Group {
            id: "inertia",
            title: "Slug test with an inertial water column (Kipp 1985 / Butler–Zhan 2004)",
            run: crate::inertia::slug_with_inertia,
        },
        Group {
            id: "conductance_jump",
            title: "Sudden removal of a cake under a constant well head (Laplace solution)",
            run: crate::stepping::conductance_jump,
        },
        Group {
            id: "annulus",
            title: "Annulus width: planar limit and radial departure",
            run: crate::development::annulus,
        },
        Group {
            id: "virtual_tests",
            title: "Virtual pumping and step tests vs Theis with skin, Papadopulos–Cooper, \
                    analytic nonlinear loss",
            run: crate::virtual_tests::virtual_tests,
        },
    ]
}

/// Records well head, screen flow and heads at chosen radii at every step.
#[derive(Default)]
pub struct Recorder {
    /// Radii at which heads are sampled, m.
    pub radii: Vec<f64>,
    /// Times, s.
    pub time: Vec<f64>,
    /// In-well heads, m.
    pub well_head: Vec<f64>,
    /// Screen flows, m³/s.
    pub screen_flow: Vec<f64>,
    /// Heads at `radii`, one vector per radius, m.
    pub heads: Vec<Vec<f64>>,
    /// Largest per-step mass residual seen.
    pub max_mass_residual: f64,
}

impl Recorder {
    /// A recorder sampling heads at `radii`.
    pub fn at(radii: &[f64]) -> Self {
        Recorder {
            radii: radii.to_vec(),
            heads: vec![Vec::new(); radii.len()],
            ..Default::default()
        }
    }

    /// Index of the sample at time t (exact landing), if any.
    pub fn index_of(&self, t: f64) -> Option<usize> {
        self.time
            .iter()
            .position(|&x| (x - t).abs() <= 1e-9 * t.max(1e-9))
    }
}

impl StepObserver for Recorder {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        self.time.push(s.time_s);
        self.well_head.push(s.well_head_m);
        self.screen_flow.push(s.screen_flow_m3_s);
        for (k, &r) in self.radii.iter().enumerate() {
            self.heads[k].push(s.grid.interpolate(s.heads, r));
        }
        self.max_mass_residual = self.max_mass_residual.max(s.mass_residual);
        true
    }
}

/// Parameter set A of docs/physics.md §8a as a model (constant-rate pumping).
pub fn set_a(v: &serde_json::Value) -> Model {
    let p = |k: &str| num(v, &format!("/params/{k}"));
    let mut m = homogeneous(
        p("K_formation"),
        1e-5,
        p("b"),
        p("rw"),
        Drive::ConstantRate {
            pumping_rate_m3_s: -p("Q"),
        },
        1.0,
    );
    m.pack.outer_radius_m = p("rb");
    m.pack.medium = Medium::darcy(p("K_pack"), 1e-5);
    m.cake = Some(Cake {
        thickness_m: p("cake_thickness"),
        conductivity_m_s: p("K_cake"),
        coverage: 1.0,
        erosion: None,
        lift_off: None,
    });
    m.invaded = Some(Invaded {
        thickness_m: p("rd") - p("rb"),
        medium: Medium::darcy(p("K_invaded"), 1e-5),
        fines: None,
        profile: None,
    });
    m.formation.outer_radius_m = Some(p("R"));
    m
}

/// Steady state of a model under its drive.
pub fn steady(model: &Model) -> Stepper {
    let cake = model.cake.map(|c| CakeState {
        thickness_m: c.thickness_m,
        coverage: c.coverage,
    });
    let mut st = Stepper::new(model, cake);
    st.solve_steady(model).expect("steady solve");
    st
}

/// Steady flow through zones in series: exact for the log-radial conductances at any grid.
fn thiem() -> Vec<CheckResult> {
    let v = load(data::THIEM);
    let src = source(&v);
    let model = set_a(&v);
    let st = steady(&model);
    let h = st.heads();
    let g = &st.disc.grid;
    let kb = g.borehole_face;
    let (q_wall, _) = st.disc.faces[kb].flow(h[kb] - h[kb + 1]);
    let segs = st.disc.faces[kb].segments();
    let drop = |i: usize| boreflux_solver::faces::Face::segment_drop(&segs[i], q_wall);
    let rb_pack = h[kb] - drop(0);
    let rb_form = h[kb + 1] + drop(2);
    let kd = g.invaded_face;
    let (q_d, _) = st.disc.faces[kd].flow(h[kd] - h[kd + 1]);
    let rd = h[kd + 1]
        + boreflux_solver::faces::Face::segment_drop(&st.disc.faces[kd].segments()[1], q_d);
    let q_face = q_wall / (2.0 * PI * g.r_face[kb] * model.well.screen_length_m);
    // Round-off of a 100-cell tridiagonal solve is ~1e-13; 1e-9 is docs/physics.md §11's bound.
    let tol = 1e-9;
    let rel = |a: f64, b: f64| ((a - b) / b).abs();
    vec![
        CheckResult::new(
            "thiem",
            "head drop at the well",
            &src,
            rel(h[0], num(&v, "/expected/head/rw")),
            tol,
            "relative",
        ),
        CheckResult::new(
            "thiem",
            "head at r_b, pack side",
            &src,
            rel(rb_pack, num(&v, "/expected/head/rb_pack_side")),
            tol,
            "relative",
        ),
        CheckResult::new(
            "thiem",
            "head at r_b, formation side",
            &src,
            rel(rb_form, num(&v, "/expected/head/rb_formation_side")),
            tol,
            "relative",
        ),
        CheckResult::new(
            "thiem",
            "head at r_d",
            &src,
            rel(rd, num(&v, "/expected/head/rd")),
            tol,
            "relative",
        ),
        CheckResult::new(
            "thiem",
            "Darcy flux at r_b",
            &src,
            rel(q_face, num(&v, "/expected/face_flux_rb")),
            tol,
            "relative",
        ),
    ]
}

/// Constant rate without well storage at the default grid and steps.
fn theis() -> Vec<CheckResult> {
    let v = load(data::THEIS);
    let src = source(&v);
    let points = v["points"].as_array().expect("points");
    let times: Vec<f64> = points.iter().map(|p| p["t"].as_f64().unwrap()).collect();
    let radii: Vec<f64> = points.iter().map(|p| p["r"].as_f64().unwrap()).collect();
    let t_end = times.iter().cloned().fold(0.0, f64::max);
    let mut model = homogeneous(
        num(&v, "/params/K"),
        num(&v, "/params/Ss"),
        num(&v, "/params/b"),
        num(&v, "/params/rw"),
        Drive::ConstantRate {
            pumping_rate_m3_s: -num(&v, "/params/Q"),
        },
        t_end,
    );
    model.numerics.sync_times_s = times.clone();
    let mut rec = Recorder::at(&radii);
    run(&model, &mut rec, Reporting::default()).expect("run");
    points
        .iter()
        .enumerate()
        .map(|(k, p)| {
            let i = rec.index_of(times[k]).expect("landed on the sample time");
            let s_model = -rec.heads[k][i];
            let want = p["s_theis"].as_f64().unwrap();
            // Issue #2 acceptance: 0.5 %; docs/physics.md §1.6 observed ~1e-3 at this resolution.
            CheckResult::new(
                "theis",
                format!(
                    "drawdown at r = {} m, u = {:.1e}",
                    radii[k],
                    p["u"].as_f64().unwrap()
                ),
                &src,
                ((s_model - want) / want).abs(),
                5e-3,
                "relative",
            )
        })
        .collect()
}

/// Fits the last full period of a sine-head run; returns (fitted head sin/cos at each radius,
/// fitted screen flow sin/cos).
fn periodic_fit(model: &Model, radii: &[f64], period: f64) -> (Vec<(f64, f64)>, (f64, f64)) {
    let mut rec = Recorder::at(radii);
    run(model, &mut rec, Reporting::default()).expect("run");
    let t_end = model.duration_s;
    let start = rec
        .time
        .iter()
        .position(|&t| t > t_end - period + 1e-9 * period)
        .unwrap();
    let w = 2.0 * PI / period;
    let times = &rec.time[start..];
    let heads = radii
        .iter()
        .enumerate()
        .map(|(k, _)| sin_cos(times, &rec.heads[k][start..], w))
        .collect();
    (heads, sin_cos(times, &rec.screen_flow[start..], w))
}

/// The `periodic` group's model: a homogeneous aquifer of the reference's T and S (b = 10 m)
/// with well-face head H0 sin(2πt/P), for `cycles` periods.
pub(crate) fn sine_model(v: &serde_json::Value, period: f64, cycles: f64) -> Model {
    let (t, s) = (num(v, "/params/T"), num(v, "/params/S"));
    let b = 10.0;
    let drive = Drive::SineHead(SineHead {
        amplitude_m: num(v, "/params/H0"),
        frequency_hz: 1.0 / period,
        offset_m: 0.0,
        ramp_cycles: 0.0,
    });
    homogeneous(
        t / b,
        s / b,
        b,
        num(v, "/params/rw"),
        drive,
        cycles * period,
    )
}

/// Amplitude and phase of head and face flow at the default grid and steps.
fn periodic() -> Vec<CheckResult> {
    let v = load(data::PERIODIC);
    let src = source(&v);
    let mut out = Vec::new();
    for case in v["cases"].as_array().unwrap() {
        let period = case["period"].as_f64().unwrap();
        let radii = nums(case, "/radii");
        let amp = nums(case, "/amplitude_ratio");
        let lag = nums(case, "/phase_lag_rad");
        let model = sine_model(&v, period, 12.0);
        let (heads, (qs, qc)) = periodic_fit(&model, &radii, period);
        for (k, &r) in radii.iter().enumerate() {
            let (s, c) = heads[k];
            // h = |A| sin(ωt − φ) = |A| cos φ sin ωt − |A| sin φ cos ωt.
            let a = s.hypot(c);
            let mut phi = (-c).atan2(s);
            while phi < lag[k] - PI {
                phi += 2.0 * PI;
            }
            // Issue #2 acceptance: 0.5 % amplitude, 0.5° phase.
            out.push(CheckResult::new(
                "periodic",
                format!("P = {period} s: head amplitude at r = {r} m"),
                &src,
                (a / amp[k] - 1.0).abs(),
                5e-3,
                "relative",
            ));
            out.push(CheckResult::new(
                "periodic",
                format!("P = {period} s: head phase at r = {r} m"),
                &src,
                (phi - lag[k]).abs().to_degrees(),
                0.5,
                "degrees",
            ));
        }
        // Q(t) = Im(Q̂ e^{iωt}) = Re Q̂ sin ωt + Im Q̂ cos ωt.
        let (qr, qi) = (
            case["q_hat_re"].as_f64().unwrap(),
            case["q_hat_im"].as_f64().unwrap(),
        );
        out.push(CheckResult::new(
            "periodic",
            format!("P = {period} s: face flow amplitude"),
            &src,
            (qs.hypot(qc) / qr.hypot(qi) - 1.0).abs(),
            5e-3,
            "relative",
        ));
        out.push(CheckResult::new(
            "periodic",
            format!("P = {period} s: face flow phase"),
            &src,
            (qc.atan2(qs) - qi.atan2(qr)).abs().to_degrees(),
            0.5,
            "degrees",
        ));
    }
    out
}

/// Slug recovery under well-bore storage.
fn slug() -> Vec<CheckResult> {
    let v = load(data::SLUG);
    let src = source(&v);
    let (rw, b, k) = (0.1, 10.0, 1e-4);
    let t_m = k * b;
    let mut out = Vec::new();
    for case in v["cases"].as_array().unwrap() {
        let alpha = case["alpha"].as_f64().unwrap();
        let betas = nums(case, "/beta");
        let want = nums(case, "/h_over_h0");
        // alpha = rw² S / rc² with rc = rw, so S = alpha; beta = T t / rc².
        let times: Vec<f64> = betas.iter().map(|bb| bb * rw * rw / t_m).collect();
        let mut model = homogeneous(
            k,
            alpha / b,
            b,
            rw,
            Drive::Slug {
                initial_head_m: 1.0,
            },
            *times.last().unwrap(),
        );
        model.well.storage_m2 = Well::free_surface_storage(rw);
        model.numerics.sync_times_s = times.clone();
        let mut rec = Recorder::at(&[]);
        run(&model, &mut rec, Reporting::default()).expect("run");
        let worst = times
            .iter()
            .zip(&want)
            .map(|(&t, &w)| (rec.well_head[rec.index_of(t).unwrap()] - w).abs())
            .fold(0.0, f64::max);
        // docs/physics.md §11: 2e-4 absolute in H/H0 for this scheme (issue #2 accepts 5e-3).
        out.push(CheckResult::new(
            "slug",
            format!("H/H0, alpha = {alpha:e}, worst of {} times", times.len()),
            &src,
            worst,
            2e-4,
            "absolute",
        ));
    }
    out
}

/// Constant-rate pumping with well-bore storage (and skin realised as a cake).
fn storage() -> Vec<CheckResult> {
    let v = load(data::STORAGE_SKIN);
    let src = source(&v);
    let (rw, b, k, ss) = (0.1, 10.0, 1e-4, 1e-5);
    let (t_m, s) = (k * b, ss * b);
    let q = 0.01;
    let mut out = Vec::new();
    for case in v["cases"].as_array().unwrap() {
        let cd = case["C_D"].as_f64().unwrap();
        let skin = case["skin"].as_f64().unwrap();
        if cd == 0.0 {
            continue; // the no-storage case is the Theis group's finite-radius problem
        }
        let tds = nums(case, "/tD");
        let want = nums(case, "/pwD");
        let times: Vec<f64> = tds.iter().map(|td| td * s * rw * rw / t_m).collect();
        let mut model = homogeneous(
            k,
            ss,
            b,
            rw,
            Drive::ConstantRate {
                pumping_rate_m3_s: q,
            },
            *times.last().unwrap(),
        );
        // C_D = rc²/(2 S rw²).
        let rc = (cd * 2.0 * s * rw * rw).sqrt();
        model.well.casing_radius_m = rc;
        model.well.storage_m2 = Well::free_surface_storage(rc);
        if skin > 0.0 {
            // A thin cake just outside the screen: s = K_f δ/(K_c r_b) (docs/physics.md §2.3).
            let rb = 1.05 * rw;
            model.pack.outer_radius_m = rb;
            let delta = 1e-4;
            model.cake = Some(Cake {
                thickness_m: delta,
                conductivity_m_s: k * delta / (skin * rb),
                coverage: 1.0,
                erosion: None,
                lift_off: None,
            });
        }
        model.numerics.sync_times_s = times.clone();
        let mut rec = Recorder::at(&[]);
        run(&model, &mut rec, Reporting::default()).expect("run");
        // Intermediate and late times (issue #2). Before tD ≈ 1e3 the cake standing in for
        // the skin sits at 1.05 rw, not at rw, and its ring of storage shows.
        let worst = worst_pwd_error(&rec, &times, &tds, &want, t_m / q);
        // docs/physics.md §11: 2e-3 relative for storage plus skin (issue #2 accepts 1 %).
        out.push(CheckResult::new(
            "storage",
            format!("pwD, C_D = {cd}, skin = {skin}, tD ≥ 1e3"),
            &src,
            worst,
            2e-3,
            "relative",
        ));
    }
    out
}

/// Largest relative error of the dimensionless well drawdown pwD = −H 2πT/Q against `want`,
/// over the sample times whose tD is at least 1e3. `t_over_q` is T/Q, 1/m.
pub fn worst_pwd_error(
    rec: &Recorder,
    times: &[f64],
    tds: &[f64],
    want: &[f64],
    t_over_q: f64,
) -> f64 {
    times
        .iter()
        .zip(tds)
        .zip(want)
        .filter(|((_, &td), _)| td >= 1e3)
        .map(|((&t, _), &w)| {
            let pwd = -rec.well_head[rec.index_of(t).unwrap()] * 2.0 * PI * t_over_q;
            ((pwd - w) / w).abs()
        })
        .fold(0.0, f64::max)
}

/// Per-step mass balance and run energy identity on a composite case with a cake.
fn balance() -> Vec<CheckResult> {
    let v = load(data::THIEM);
    let mut model = set_a(&v);
    model.drive = Drive::SineHead(SineHead {
        amplitude_m: 1.5,
        frequency_hz: 0.5,
        offset_m: 0.0,
        ramp_cycles: 2.0,
    });
    model.duration_s = 20.0;
    model.formation.outer_radius_m = None;
    let mut rec = Recorder::at(&[]);
    let sum = run(&model, &mut rec, Reporting::default()).expect("run");
    let src = "discrete identities of the θ-stages of the step (TR-BDF2 by default; docs/physics.md §1.5, §7.3, docs/time-stepping.md)";
    vec![
        // Issue #2: every step closes to 1e-10; round-off of the sums is ~1e-14.
        CheckResult::new(
            "balance",
            "largest per-step volume residual, composite sine case",
            src,
            sum.max_mass_residual,
            1e-10,
            "relative",
        ),
        // Issue #2: the energy identity over a run closes to 1e-6.
        CheckResult::new(
            "balance",
            "energy identity over the run, composite sine case",
            src,
            sum.energy_closure,
            1e-6,
            "relative",
        ),
    ]
}

/// Error of the fitted face flow for the P = 2 s case at a given resolution.
fn periodic_error(v: &serde_json::Value, cells_per_decade: f64, steps_per_cycle: usize) -> f64 {
    let case = &v["cases"][0];
    let period = case["period"].as_f64().unwrap();
    let mut model = sine_model(v, period, 12.0);
    model.numerics.grid = GridSpec::PerDecade(cells_per_decade);
    model.numerics.time = TimeSpec::StepsPerCycle(steps_per_cycle);
    model.pack.outer_radius_m = 0.2;
    let (_, (qs, qc)) = periodic_fit(&model, &[], period);
    let (qr, qi) = (
        case["q_hat_re"].as_f64().unwrap(),
        case["q_hat_im"].as_f64().unwrap(),
    );
    (qs - qr).hypot(qc - qi) / qr.hypot(qi)
}

/// Halving Δr and Δt together divides the error by four.
fn order() -> Vec<CheckResult> {
    let v = load(data::PERIODIC);
    let src = source(&v);
    let e1 = periodic_error(&v, 8.0, 25);
    let e2 = periodic_error(&v, 16.0, 50);
    let p = (e1 / e2).log2();
    let mut r = CheckResult::new(
        "order",
        format!("observed order, face flow, P = 2 s (errors {e1:.2e} → {e2:.2e})"),
        &src,
        p,
        2.2,
        "order",
    );
    // Issue #2 acceptance band for second order: 1.8 ≤ p ≤ 2.2.
    r.passed = (1.8..=2.2).contains(&p);
    vec![r]
}
