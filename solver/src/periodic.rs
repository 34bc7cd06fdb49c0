//! The periodic flow of a well as it stands, for nonlinear losses, by Newton–shooting on one
//! period of the drive (docs/numerics.md §Periodic state by shooting).
//!
//! The slow state (cake, invaded-zone fines) is frozen ([`SlowState::snapshot_model`]): what
//! is sought is the flow cycle the drive settles into on the well as it is now. The unknown
//! is the state the time step carries over a cycle end, x = (heads of the well node and the
//! cells, the water column's flow when it has inertia); Φ(x) is that state after one period
//! stepped from x with the project's own stepper
//! ([`crate::stepper::Stepper::step_adaptive`], TR-BDF2, or the θ-scheme when the case asks
//! for it) at a fixed step sequence Δt = P/n, so that Φ is a smooth function of x. The
//! periodic state solves
//!
//! ```text
//! F(x) = Φ(x) − x = 0
//! ```
//! by Newton's method (shooting: Aprille & Trick 1972, Proc. IEEE 60(1), "Steady-state
//! analysis of nonlinear circuits with periodic inputs", from memory — verify), each Newton
//! system F'(x) d = −F(x) solved by restarted GMRES (`periodic/gmres.rs`) without forming
//! F': F'(x) v ≈ (Φ(x + εv) − Φ(x))/ε − v, one period stepped per product (Newton–Krylov,
//! forward-difference products, Eisenstat–Walker forcing terms and an Armijo line search
//! as in Kelley 2003, "Solving Nonlinear Equations with Newton's Method", SIAM, ch. 3,
//! from memory — verify).
//!
//! Scaling: heads are measured against the largest |head| over a cycle of the warm-up
//! (a head scale H, m), the column flow against its largest |flow| (m³/s); the defect is
//! the max norm of F in those units, and the iteration stops when it is below the
//! tolerance. Plain cycling (x ← Φ(x)) reaches the same state too, at the rate of the
//! slowest decaying mode of the formation (e^{−P λ_min} per cycle, λ_min ~ K/(S R²) for
//! the outer radius R): [`plain_cycles`] measures how many cycles it needs.
//!
//! Work: allocation happens in setup only (the steppers, the GMRES basis); each period is
//! stepped with no allocation.

mod gmres;
mod newton;
mod shooter;

pub use gmres::{Gmres, GmresOutcome};
pub use newton::{fixed_point, Outcome, Settings};

use crate::error::SolverError;
use crate::grid::ZONE_COUNT;
use crate::model::{Model, TimeSpec};
use crate::run::DEFAULT_STEPS_PER_CYCLE;
use crate::slow::SlowState;
use shooter::{state_len, Shooter};

/// Default stopping tolerance on the scaled defect ‖Φ(x) − x‖∞, –. Φ itself is computed to
/// the Newton tolerance of the steps (5e-11 relative by default), so a defect much below
/// about 1e-9 is round-off of Φ, not of the method.
pub const DEFAULT_TOLERANCE: f64 = 1e-8;

/// Settings of the shooting method.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Options {
    /// Fixed steps per period.
    pub steps_per_cycle: usize,
    /// Plain cycles stepped after the drive's start-up ramp before shooting starts.
    pub warmup_cycles: usize,
    /// Stop when ‖Φ(x) − x‖∞ in scaled units is at most this, –.
    pub tolerance: f64,
    /// Most Newton iterations.
    pub max_newton: usize,
    /// Most periods integrated in all (warm-up, Φ and its products, the last cycle's
    /// figures): a cap on the work.
    pub max_cycles: usize,
    /// Restart length of GMRES.
    pub restart: usize,
}

impl Options {
    /// The defaults for a model: its steps per cycle (`numerics.steps_per_cycle`, else
    /// the run's default), 3 warm-up cycles, [`DEFAULT_TOLERANCE`], 20 Newton iterations,
    /// 400 periods, GMRES(40).
    pub fn for_model(model: &Model) -> Options {
        let steps_per_cycle = match (model.numerics.time, model.drive.period_s()) {
            (TimeSpec::StepsPerCycle(n), _) => n,
            (TimeSpec::Fixed(dt), Some(p)) => ((p / dt).round() as usize).max(1),
            _ => DEFAULT_STEPS_PER_CYCLE,
        };
        Options {
            steps_per_cycle,
            warmup_cycles: 3,
            tolerance: DEFAULT_TOLERANCE,
            max_newton: 20,
            max_cycles: 400,
            restart: 40,
        }
    }
}

/// Why the periodic state could not be computed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum PeriodicError {
    /// The drive has no period, or does not repeat from cycle to cycle (a schedule).
    #[error(
        "the periodic state needs a drive that repeats from cycle to cycle; the drive is {drive}"
    )]
    NotPeriodic {
        /// What the drive is.
        drive: &'static str,
    },
    /// The drive stops (its strokes or cycles done) before a cycle after the warm-up.
    #[error(
        "the drive stops at {stop_s} s, before the cycle the periodic state would start at \
         ({start_s} s after the start-up ramp and the warm-up cycles)"
    )]
    Stops {
        /// When the drive's periodic part ends, s.
        stop_s: f64,
        /// Where the shooting cycle would start, s.
        start_s: f64,
    },
    /// The iteration did not reach the tolerance within its budget.
    #[error(
        "the periodic state did not converge: defect {defect:.3e} after {newton} Newton \
         iterations and {cycles} periods stepped (tolerance {tolerance:.1e})"
    )]
    NotConverged {
        /// Scaled defect reached, –.
        defect: f64,
        /// Tolerance asked for, –.
        tolerance: f64,
        /// Newton iterations taken.
        newton: usize,
        /// Periods stepped.
        cycles: usize,
    },
    /// A settings value is out of range.
    #[error("periodic state: {0}")]
    Settings(&'static str),
    /// A step failed.
    #[error(transparent)]
    Solver(#[from] SolverError),
}

/// Figures of one period of the periodic state, from the fixed steps' ends.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct CycleFigures {
    /// Largest |screen flow| over the period, m³/s.
    pub peak_screen_flow_m3_s: f64,
    /// Largest |flow| across the borehole wall face over the period per unit wall area
    /// (2π r_b L), m/s.
    pub peak_wall_face_flux_m_s: f64,
    /// Mean dissipation per zone over the period, m⁴/s (× ρg: W).
    pub mean_dissipation_m4_s: [f64; ZONE_COUNT],
    /// Mean power into the aquifer at the screen over the period, m⁴/s (× ρg: W).
    pub mean_power_in_m4_s: f64,
    /// Largest and smallest well head over the period, m.
    pub well_head_range_m: (f64, f64),
}

/// The periodic state found by shooting.
#[derive(Debug, Clone, PartialEq)]
pub struct PeriodicState {
    /// Period of the drive, s.
    pub period_s: f64,
    /// Time of the cycle start the state belongs to, s (a whole number of periods).
    pub start_s: f64,
    /// Steps per period.
    pub steps_per_cycle: usize,
    /// Heads at the cycle start (index 0 = well), m.
    pub heads_m: Vec<f64>,
    /// The column's flow at the cycle start when it is a state, m³/s.
    pub column_flow_m3_s: Option<f64>,
    /// Scaled defect ‖Φ(x) − x‖∞ at the end, –.
    pub defect: f64,
    /// Scaled defect after the warm-up and after each Newton iteration, –.
    pub history: Vec<f64>,
    /// Newton iterations taken.
    pub newton_iterations: usize,
    /// Jacobian–vector products taken by GMRES (one period each).
    pub krylov_products: usize,
    /// Periods stepped in all: warm-up, every Φ, the figures' cycle.
    pub cycles: usize,
    /// Of which the warm-up (start-up ramp and plain cycles).
    pub warmup_cycles: usize,
    /// Head scale of the defect, m.
    pub head_scale_m: f64,
    /// Figures of the periodic cycle.
    pub figures: CycleFigures,
}

/// Plain cycling from the same warm start (see [`plain_cycles`]).
#[derive(Debug, Clone, PartialEq)]
pub struct PlainCycling {
    /// Scaled defect ‖Φ(x_k) − x_k‖∞ of each cycle after the warm-up, –.
    pub defects: Vec<f64>,
    /// Cycles after the warm-up until the defect was at most the tolerance (None: not
    /// within the cap).
    pub cycles_to_tolerance: Option<usize>,
    /// Periods stepped in the warm-up.
    pub warmup_cycles: usize,
    /// The state reached at the last cycle start (heads, m).
    pub heads_m: Vec<f64>,
}

/// The frozen model: `base` as it stands in `slow`, with no removal law.
fn frozen(base: &Model, slow: &SlowState) -> Model {
    slow.snapshot_model(base)
}

/// The periodic state of the well `base` as it stands in `slow` (cake and fines frozen)
/// under its drive, by Newton–Krylov shooting on one period (module doc).
pub fn shoot(
    base: &Model,
    slow: &SlowState,
    opts: &Options,
) -> Result<PeriodicState, PeriodicError> {
    let model = frozen(base, slow);
    let mut sh = Shooter::new(&model, opts)?;
    let warmup_cycles = sh.cycles;
    let n = state_len(&sh.base);
    let mut z = sh.start();
    let settings = newton::Settings {
        tolerance: opts.tolerance,
        max_newton: opts.max_newton,
        // The warm-up and the figures' cycle count against the cap too.
        max_evaluations: opts.max_cycles.saturating_sub(warmup_cycles + 1),
        restart: opts.restart,
    };
    let out = newton::fixed_point(&mut z, &settings, |x: &[f64], o: &mut [f64]| sh.phi(x, o))?;
    if !out.converged {
        return Err(PeriodicError::NotConverged {
            defect: out.defect,
            tolerance: opts.tolerance,
            newton: out.newton,
            cycles: sh.cycles,
        });
    }
    // The figures of the periodic cycle, stepped once more from the state found.
    let mut fig = CycleFigures::default();
    for ((x, v), s) in sh.x.iter_mut().zip(&z).zip(&sh.scale) {
        *x = v * s;
    }
    let x = sh.x.clone();
    sh.work.restart_from(&sh.base, &x[..n - 1], x[n - 1]);
    sh.cycle(Some(&mut fig))?;
    Ok(PeriodicState {
        period_s: sh.dt * sh.steps as f64,
        start_s: sh.base.time_s,
        steps_per_cycle: sh.steps,
        heads_m: x[..n - 1].to_vec(),
        column_flow_m3_s: sh.base.column_flow().map(|_| x[n - 1]),
        defect: out.defect,
        history: out.history,
        newton_iterations: out.newton,
        krylov_products: out.products,
        cycles: sh.cycles,
        warmup_cycles,
        head_scale_m: sh.scale[0],
        figures: fig,
    })
}

/// Plain cycling x ← Φ(x) from the same warm start as [`shoot`], at most `max_cycles`
/// cycles after the warm-up, stopping at the tolerance: how many periods the slowest mode
/// makes plain time stepping take.
pub fn plain_cycles(
    base: &Model,
    slow: &SlowState,
    opts: &Options,
    max_cycles: usize,
) -> Result<PlainCycling, PeriodicError> {
    let model = frozen(base, slow);
    let mut sh = Shooter::new(&model, opts)?;
    let warmup_cycles = sh.cycles;
    let n = state_len(&sh.base);
    let mut z = sh.start();
    let mut next = vec![0.0; n];
    let mut defects = Vec::new();
    let mut cycles_to_tolerance = None;
    for k in 0..max_cycles {
        sh.phi(&z, &mut next)?;
        let d = z.iter().zip(&next).fold(0.0f64, |a, (x, y)| {
            let e = (x - y).abs();
            // NaN stays NaN (`f64::max` would drop it).
            if e.is_nan() || a.is_nan() {
                f64::NAN
            } else {
                a.max(e)
            }
        });
        defects.push(d);
        std::mem::swap(&mut z, &mut next);
        if !d.is_finite() {
            break;
        }
        if d <= opts.tolerance {
            cycles_to_tolerance = Some(k + 1);
            break;
        }
    }
    Ok(PlainCycling {
        defects,
        cycles_to_tolerance,
        warmup_cycles,
        heads_m: z[..n - 1]
            .iter()
            .zip(&sh.scale)
            .map(|(v, s)| v * s)
            .collect(),
    })
}
