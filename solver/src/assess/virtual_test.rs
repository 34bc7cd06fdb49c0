//! Virtual pumping tests on a model: the same tests a driller runs on the finished well, run
//! on the model of the well as it stands (docs/physics.md §25).
//!
//! A test gets its own domain and grid, sized for the test and not for the development
//! drive: the outer radius lies beyond the radius the test's drawdown reaches,
//!
//! ```text
//! R = max(10 r_d, r_d + 8 √(D t_test)),   D = K/Ss of the formation
//! ```
//!
//! so the Theis argument at R is u = R² S / (4 T t) ≥ 16 and the fixed head there is not felt
//! (W(16) ≈ 7e−9 of the drawdown's scale; the `virtual_tests` verification doubles R and
//! sees no change). The grid, the time steps and the tolerances are the test's own
//! ([`TEST_CELLS_PER_DECADE`], [`TEST_RELATIVE_TOLERANCE`], [`TEST_ABSOLUTE_TOLERANCE_M`]), so
//! the same well gives the same figures whatever drive developed it.

use crate::diagnostics::{StepObserver, StepView};
use crate::drive::{stages, Drive};
use crate::error::SolverError;
use crate::model::{GridSpec, Model, Numerics, OuterBoundary, Scheme, TimeSpec};
use crate::run::{run, Reporting};
use crate::steptest::Sample;

/// Cells per decade of radius in every zone of a test's grid (assumption: the Theis and
/// Papadopulos–Cooper checks of the `virtual_tests` group pass within 0.5 % with it;
/// docs/verification.md).
pub const TEST_CELLS_PER_DECADE: f64 = 40.0;
/// Relative head tolerance of a test's adaptive steps (assumption: a hundredth of the
/// development runs' default, so a fitted C is not blurred by step error).
pub const TEST_RELATIVE_TOLERANCE: f64 = 1e-5;
/// Absolute head tolerance of a test's adaptive steps, m (assumption, as above).
pub const TEST_ABSOLUTE_TOLERANCE_M: f64 = 1e-6;

/// Outer radius of the domain of a test lasting `duration_s`, m (module documentation).
pub fn test_outer_radius_m(model: &Model, duration_s: f64) -> f64 {
    let r_d = model.invaded_outer_radius_m();
    let d = model.formation.medium.diffusivity_m2_s();
    (10.0 * r_d).max(r_d + crate::grid::REACH_FACTOR * (d * duration_s).sqrt())
}

/// The well of `model` set up for a test driven by `drive` over `duration_s`: its own outer
/// radius (fixed head there), grid, steps and tolerances; landing on `readings_s`.
pub fn test_model(model: &Model, drive: Drive, duration_s: f64, readings_s: &[f64]) -> Model {
    let mut m = model.clone();
    m.drive = drive;
    m.duration_s = duration_s;
    m.formation.outer_radius_m = Some(test_outer_radius_m(model, duration_s));
    m.formation.outer_boundary = OuterBoundary::FixedHead;
    // Nothing of the development run's numerics is kept: the same well gets the same test.
    m.numerics = Numerics {
        grid: GridSpec::PerDecade(TEST_CELLS_PER_DECADE),
        time: TimeSpec::Auto,
        scheme: Scheme::TrBdf2 {
            relative: TEST_RELATIVE_TOLERANCE,
            absolute_m: TEST_ABSOLUTE_TOLERANCE_M,
        },
        sync_times_s: readings_s.to_vec(),
        ..Numerics::default()
    };
    m
}

/// The same well with no damage: no cake, no invaded zone (its radius given back to the
/// formation); screen and pack kept. Efficiency is measured against it.
pub fn undamaged(model: &Model) -> Model {
    let mut m = model.clone();
    m.cake = None;
    m.invaded = None;
    m
}

/// Records the drawdown (−head in the well) at the requested times.
struct Readings<'a> {
    times_s: &'a [f64],
    next: usize,
    drawdown_m: Vec<f64>,
}

impl StepObserver for Readings<'_> {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        while let Some(&t) = self.times_s.get(self.next) {
            let eps = 1e-9 * t.max(1.0);
            if s.time_s < t - eps {
                break;
            }
            // The clock lands on every reading (sync time); a reading it passed would be a
            // bug of the clock, and is recorded at the step that passed it.
            self.drawdown_m.push(-s.well_head_m);
            self.next += 1;
        }
        true
    }
}

fn checked_times(field: &str, times_s: &[f64]) -> Result<(), SolverError> {
    let ok = !times_s.is_empty()
        && times_s.iter().all(|t| t.is_finite() && *t > 0.0)
        && times_s.windows(2).all(|w| w[0] < w[1]);
    if ok {
        Ok(())
    } else {
        Err(SolverError::invalid(
            field,
            "must be positive, finite and increasing, at least one".to_owned(),
        ))
    }
}

/// Runs `test` (a model from [`test_model`]) and returns the drawdown in the well at each
/// of `times_s` (increasing, each a sync time of `test`), m.
pub fn drawdowns(test: &Model, times_s: &[f64]) -> Result<Vec<f64>, SolverError> {
    let mut rec = Readings {
        times_s,
        next: 0,
        drawdown_m: Vec::with_capacity(times_s.len()),
    };
    run(test, &mut rec, Reporting { every: u64::MAX })?;
    if rec.drawdown_m.len() != times_s.len() {
        return Err(SolverError::invalid(
            "assessment",
            format!(
                "the virtual test ended with {} of {} readings",
                rec.drawdown_m.len(),
                times_s.len()
            ),
        ));
    }
    Ok(rec.drawdown_m)
}

/// Constant-rate test at `rate_m3_s` (withdrawal, > 0) on the well of `model`: the drawdown
/// in the well at each of `times_s` (increasing; the test lasts until the last), m.
pub fn constant_rate(
    model: &Model,
    rate_m3_s: f64,
    times_s: &[f64],
) -> Result<Vec<f64>, SolverError> {
    checked_times("assessment.readings", times_s)?;
    if !(rate_m3_s.is_finite() && rate_m3_s > 0.0) {
        return Err(SolverError::invalid(
            "assessment.design_rate",
            format!("must be a positive pumping rate, got {rate_m3_s} m³/s"),
        ));
    }
    let end = *times_s.last().expect("checked non-empty");
    let drive = Drive::ConstantRate {
        pumping_rate_m3_s: rate_m3_s,
    };
    drawdowns(&test_model(model, drive, end, times_s), times_s)
}

/// Readings taken per step of a virtual step test, spaced evenly in log time after the
/// step's start (assumption: enough for the Hantush–Bierschenk series fit, which skips the
/// first quarter of each step).
pub const READINGS_PER_STEP: usize = 24;

/// Step-drawdown test: the rates `rates_m3_s` (increasing, withdrawal) pumped one after the
/// other without recovery, each for `step_duration_s`; the readings of the well's drawdown,
/// [`READINGS_PER_STEP`] per step, as a time series for the analyses of
/// [`crate::steptest`].
pub fn step_test(
    model: &Model,
    rates_m3_s: &[f64],
    step_duration_s: f64,
) -> Result<Vec<Sample>, SolverError> {
    if rates_m3_s.len() < 3
        || !rates_m3_s.iter().all(|q| q.is_finite() && *q > 0.0)
        || !rates_m3_s.windows(2).all(|w| w[0] < w[1])
    {
        return Err(SolverError::invalid(
            "assessment.step_fractions",
            "a step test needs at least three positive, increasing rates".to_owned(),
        ));
    }
    if !(step_duration_s.is_finite() && step_duration_s > 0.0) {
        return Err(SolverError::invalid(
            "assessment.step_duration",
            format!("must be a positive duration, got {step_duration_s} s"),
        ));
    }
    let n = rates_m3_s.len();
    let drive = Drive::Schedule(stages(
        rates_m3_s
            .iter()
            .map(|&q| {
                (
                    Drive::ConstantRate {
                        pumping_rate_m3_s: q,
                    },
                    step_duration_s,
                )
            })
            .collect(),
    ));
    // Readings at step_duration × 10^(−3 (1 − j/k)), j = 1..=k, after each step's start: three
    // decades up to the step's end.
    let mut times = Vec::with_capacity(n * READINGS_PER_STEP);
    let mut rates = Vec::with_capacity(n * READINGS_PER_STEP);
    for (i, &q) in rates_m3_s.iter().enumerate() {
        let start = i as f64 * step_duration_s;
        for j in 1..=READINGS_PER_STEP {
            let f = 10f64.powf(-3.0 * (1.0 - j as f64 / READINGS_PER_STEP as f64));
            times.push(if j == READINGS_PER_STEP {
                (i + 1) as f64 * step_duration_s
            } else {
                start + f * step_duration_s
            });
            rates.push(q);
        }
    }
    let end = n as f64 * step_duration_s;
    let s = drawdowns(&test_model(model, drive, end, &times), &times)?;
    Ok(times
        .iter()
        .zip(&rates)
        .zip(&s)
        .map(|((&t, &q), &d)| Sample {
            time_s: t,
            rate_m3_s: q,
            drawdown_m: d,
        })
        .collect())
}
