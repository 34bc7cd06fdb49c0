//! The key series of one scenario on the sweep's common grid (`/table/series`, schema
//! [`SweepSeries`]): at the run fractions k/K, k = 0…K, the time, skin, specific capacity
//! and efficiency of the first reported step at or after k·T/K (less 1e-9 T for round-off;
//! the start state at k = 0),
//! and the largest outward and inward face flux of the cycles that end in the interval
//! ((k−1)·T/K, k·T/K]. Fixed-size buffers allocated before the run; nothing grows in
//! the time loop.

use crate::output::schema::SweepSeries;
use boreflux_solver::assess::progress::ProgressBasis;
use boreflux_solver::slow::SlowState;
use boreflux_solver::{CycleView, Model, StepView};

/// Points of the grid.
pub const POINTS: usize = SweepSeries::INTERVALS + 1;

/// The common grid, k/K.
pub fn run_fraction() -> Vec<f64> {
    (0..POINTS)
        .map(|k| k as f64 / SweepSeries::INTERVALS as f64)
        .collect()
}

/// Records one scenario's key series.
pub struct Recorder {
    basis: Option<ProgressBasis>,
    duration_s: f64,
    next: usize,
    /// One vector of [`POINTS`] per entry of [`SweepSeries::PER_SCENARIO`].
    pub values: Vec<Vec<f64>>,
}

fn slot(s: SweepSeries) -> usize {
    SweepSeries::PER_SCENARIO
        .iter()
        .position(|&x| x == s)
        .unwrap_or(0)
}

impl Recorder {
    /// A recorder for `model`, with the progress basis when the undamaged test ran; the
    /// start state is recorded at k = 0.
    pub fn new(model: &Model, basis: Option<ProgressBasis>) -> Recorder {
        let mut r = Recorder {
            basis,
            duration_s: model.duration_s,
            next: 0,
            values: vec![vec![f64::NAN; POINTS]; SweepSeries::PER_SCENARIO.len()],
        };
        r.record(0.0, &SlowState::new(model));
        r
    }

    /// Grid time k, less 1e-9 of the run: a step meant to end on it but short of it by
    /// round-off (7.199999999999932 for 7.2) counts as reaching it.
    fn grid_time(&self, k: usize) -> f64 {
        self.duration_s * (k as f64 / SweepSeries::INTERVALS as f64 - 1e-9)
    }

    fn record(&mut self, time_s: f64, slow: &SlowState) {
        let k = self.next;
        if k >= POINTS {
            return;
        }
        self.values[slot(SweepSeries::Time)][k] = time_s;
        self.values[slot(SweepSeries::Skin)][k] = slow.skin().1;
        if let Some(b) = &self.basis {
            let p = b.point(slow);
            self.values[slot(SweepSeries::SpecificCapacity)][k] = p.specific_capacity_m2_s;
            self.values[slot(SweepSeries::Efficiency)][k] = p.efficiency;
        }
        self.next += 1;
    }

    /// After each reported step.
    pub fn on_step(&mut self, s: &StepView<'_>) {
        while self.next < POINTS && s.time_s >= self.grid_time(self.next) {
            self.record(s.time_s, s.slow);
        }
    }

    /// At the end of each cycle.
    pub fn on_cycle(&mut self, c: &CycleView) {
        let k = ((c.end_s / self.duration_s) * SweepSeries::INTERVALS as f64).ceil();
        let k = (k.max(1.0) as usize).min(POINTS - 1);
        for (s, v) in [
            (SweepSeries::PeakOutwardFlux, c.peak_outward_flux_m_s),
            (SweepSeries::PeakInwardFlux, c.peak_inward_flux_m_s),
        ] {
            let x = &mut self.values[slot(s)][k];
            *x = x.max(v);
        }
    }

    /// At the end of the run: grid points not reached (a run that ended at its last
    /// reported step a little before T) take the final state.
    pub fn finish(&mut self, end_time_s: f64, final_state: &SlowState) {
        while self.next < POINTS {
            self.record(end_time_s, final_state);
        }
    }
}
