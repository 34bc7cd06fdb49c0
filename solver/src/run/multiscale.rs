//! Cycle jumping over the slow state of a periodic drive (`numerics.multiscale = auto`,
//! docs/time-stepping.md §Multiscale stepping).
//!
//! Envelope following in the manner of Petzold (1981, "An efficient numerical method for
//! highly oscillatory ordinary differential equations", SIAM J. Numer. Anal. 18(3),
//! 455–479; from memory — verify): the state is sampled once per drive cycle, at the cycle
//! ends the time loop lands on; the samples x₀, x₁, x₂ of the last three computed cycle
//! ends give the per-cycle change d = x₂ − x₁ and its change c = x₂ − 2x₁ + x₀. Where the
//! sampled state changes smoothly the run jumps K cycles at once,
//!
//! ```text
//! x(n+K) ≈ x₂ + K d          error ≈ K(K+1)/2 |c|   (the neglected curvature)
//! ```
//!
//! with K the largest whole number for which, for every sampled value i,
//!
//! ```text
//! K(K+1)/2 |cᵢ| ≤ tol · scaleᵢ            (estimated extrapolation error)
//!   or, heads only, K |dᵢ| ≤ Eᵢ           (the head is held, see below)
//! K |dᵢ|        ≤ MAX_MOVE · scaleᵢ       (slow values only: how far one jump moves them)
//! K |dᵢ|        ≤ xᵢ                      (an amount falling toward zero, unless within tol)
//! K             ≤ MAX_JUMP_CYCLES
//! ```
//!
//! and then steps [`SAMPLED_CYCLES`] full cycles again to refresh d and c. The sampled
//! state is the heads of the well and the cells (one scale for all: the largest head
//! magnitude plus [`HEAD_FLOOR_M`]) and the slow state (`SlowState::sample`: cake
//! thickness, fines per cell, fines removed and pushed out, each with its own scale). The
//! water column's flow and the device's phase are those of the cycle end and are kept.
//!
//! A head whose change decays (|cᵢ| ≥ [`HOLD_DECAY`] |dᵢ|) and whose whole move over the
//! jump K |dᵢ| stays within Eᵢ = max(atol + rtol |hᵢ|,
//! tol · scale) — what the adaptive steps themselves resolve — is held, not extrapolated:
//! its cycle-end changes are then the decay of the previous jump's disturbance (measured on
//! the municipal demo), and carrying them on over K cycles would only disturb the next
//! cycles again. Which bound set K is reported ([`JumpBound`]).
//!
//! A jump is never taken across an event the full steps must find: it needs the drive to
//! repeat exactly (after its ramp, within one schedule stage — schedules are not jumped —
//! and before a swab's or pump's last stroke), no new lift-off peak (the peak inward
//! pressure across the cake did not change over the sampled cycles), no column parting, no
//! abrupt change of the slow state and no forcing jump in the sampled cycles, no sync time
//! inside the jump, [`SAMPLED_CYCLES`] cycles left to compute after it, and the
//! extrapolated slow state on the same side of the cake's removal mark and with the cake
//! still there (else K is halved until it is, or no jump).
//!
//! The run's running totals (work, energy, volumes, the RMS flux integral, time at the
//! block's thrust bound) grow over the skipped cycles by K times the last computed cycle's
//! increment; peaks are taken over computed cycles only (under a smooth change the
//! skipped cycles' peaks lie between those of the cycles either side); steps and Newton
//! iterations count computed steps only.

use super::RunSummary;
use crate::diagnostics::{JumpBound, JumpView};
use crate::grid::ZONE_COUNT;
use crate::model::{Model, Multiscale, Scheme};
use crate::slow::SlowState;
use crate::stepper::Stepper;

/// Computed cycles whose end states a jump is extrapolated from (three: the change and the
/// change of the change). After every jump this many full cycles are stepped again.
pub const SAMPLED_CYCLES: usize = 3;
/// Fewest cycles worth a jump.
pub const MIN_JUMP_CYCLES: u64 = 2;
/// Most cycles in one jump (assumption: bounds the time between refreshes of the cycle
/// even where the sampled state stands still; calibrate if it matters).
pub const MAX_JUMP_CYCLES: u64 = 500;
/// Largest move of a slow value in one jump, as a fraction of its scale (assumption: a
/// twentieth keeps the face laws close to those the last cycles were computed with).
pub const MAX_MOVE: f64 = 0.05;
/// Smallest ratio |c|/|d| of a head's change of change to its change at which the change
/// counts as decaying (the relaxation of a disturbance, q = d₂/d₁ ≤ 0.9) rather than a
/// steady trend, so that the head may be held over a jump (assumption: measured on the
/// pump-and-backwash demo over 200 cycles, holding steady trends as well moved the peak
/// collapse load by 4.4e-3 of full stepping; calibrate if it matters).
pub const HOLD_DECAY: f64 = 0.1;
/// Added to the largest head magnitude to form the heads' scale, m (the default absolute
/// head tolerance of the adaptive steps).
pub const HEAD_FLOOR_M: f64 = crate::model::DEFAULT_ABSOLUTE_TOLERANCE_M;

/// Running totals of a run that grow every cycle.
const TOTALS: usize = ZONE_COUNT + 11;

/// The run's running totals as one vector (see [`add_totals`]).
pub(super) fn totals(summary: &RunSummary, sum_q2_dt: f64, stalled_s: f64) -> [f64; TOTALS] {
    let mut t = [0.0; TOTALS];
    t[..ZONE_COUNT].copy_from_slice(&summary.work_j);
    t[ZONE_COUNT..].copy_from_slice(&[
        summary.energy_in_j,
        summary.storage_energy_j,
        summary.numerical_dissipation_j,
        summary.device_volume_m3,
        summary.gross_device_volume_m3,
        summary.bypass_volume_m3,
        summary.screen_volume_m3,
        summary.well_storage_change_m3,
        sum_q2_dt,
        stalled_s,
        0.0,
    ]);
    t
}

/// Adds `k` times `per_cycle` to the running totals.
fn add_totals(
    summary: &mut RunSummary,
    sum_q2_dt: &mut f64,
    stalled_s: &mut f64,
    per_cycle: &[f64; TOTALS],
    k: f64,
) {
    for (w, d) in summary.work_j.iter_mut().zip(&per_cycle[..ZONE_COUNT]) {
        *w += k * d;
    }
    let d = &per_cycle[ZONE_COUNT..];
    summary.energy_in_j += k * d[0];
    summary.storage_energy_j += k * d[1];
    summary.numerical_dissipation_j += k * d[2];
    summary.device_volume_m3 += k * d[3];
    summary.gross_device_volume_m3 += k * d[4];
    summary.bypass_volume_m3 += k * d[5];
    summary.screen_volume_m3 += k * d[6];
    summary.well_storage_change_m3 += k * d[7];
    *sum_q2_dt += k * d[8];
    *stalled_s += k * d[9];
}

/// One sampled cycle end.
#[derive(Debug, Clone)]
struct Sample {
    /// Heads (well, cells), then the slow state, m and SI.
    x: Vec<f64>,
    totals: [f64; TOTALS],
    lift_peak_pa: f64,
    partings: u64,
}

/// Samples the run at cycle ends and decides and makes the jumps.
#[derive(Debug)]
pub(super) struct CycleJumper {
    tolerance: f64,
    /// The adaptive steps' tolerance on heads (relative, absolute m); zeros for the
    /// θ-scheme, whose steps have no error control.
    step_tolerance: (f64, f64),
    period_s: f64,
    repeats_from_s: f64,
    heads: usize,
    samples: [Sample; SAMPLED_CYCLES],
    /// Index of the newest sample in `samples`.
    newest: usize,
    /// Samples taken since the last reset (capped at [`SAMPLED_CYCLES`]).
    count: usize,
    /// Scales of the slow values (work array).
    scale: Vec<f64>,
    /// Extrapolated state (work array).
    trial: Vec<f64>,
    /// Per-cycle change extrapolated, per sampled value (work array).
    rate: Vec<f64>,
    /// Change of the change over the tolerance's scale, per sampled value (work array).
    curvature: Vec<f64>,
    /// Move within which a head is held rather than extrapolated, m; 0 for the slow
    /// values (work array).
    hold_within: Vec<f64>,
    /// Head changes of a jump (work array), m.
    dh: Vec<f64>,
}

/// What a jump did.
pub(super) struct Jumped {
    pub view: JumpView,
}

impl CycleJumper {
    /// A jumper for `model`, or None when the case does not ask for one or its drive does
    /// not repeat exactly (schedules, tables without a period, steady and slug drives).
    pub(super) fn new(model: &Model, st: &Stepper, slow: &SlowState) -> Option<CycleJumper> {
        let Multiscale::Auto { tolerance } = model.numerics.multiscale else {
            return None;
        };
        let period_s = model.drive.period_s()?;
        let repeats_from_s = model.drive.repeats_from_s()?;
        let heads = st.heads().len();
        let len = heads + slow.sample_len();
        let sample = Sample {
            x: vec![0.0; len],
            totals: [0.0; TOTALS],
            lift_peak_pa: 0.0,
            partings: 0,
        };
        let step_tolerance = match model.numerics.scheme {
            Scheme::TrBdf2 {
                relative,
                absolute_m,
            } => (relative, absolute_m),
            Scheme::Theta => (0.0, 0.0),
        };
        Some(CycleJumper {
            tolerance,
            step_tolerance,
            period_s,
            repeats_from_s,
            heads,
            samples: std::array::from_fn(|_| sample.clone()),
            newest: 0,
            count: 0,
            scale: vec![0.0; slow.sample_len()],
            trial: vec![0.0; len],
            rate: vec![0.0; len],
            curvature: vec![0.0; len],
            hold_within: vec![0.0; len],
            dh: vec![0.0; heads],
        })
    }

    /// Forgets the samples: after an abrupt change (a jump of the forcing or of the slow
    /// state) the cycles before it say nothing about the trend after it.
    pub(super) fn reset(&mut self) {
        self.count = 0;
    }

    /// At the end of a computed cycle: samples the state and, when the last
    /// [`SAMPLED_CYCLES`] cycles allow it, jumps over whole cycles, moving the stepper's
    /// clock and heads, the slow state and the running totals.
    #[allow(clippy::too_many_arguments)]
    pub(super) fn at_cycle_end(
        &mut self,
        model: &Model,
        st: &mut Stepper,
        slow: &mut SlowState,
        summary: &mut RunSummary,
        sum_q2_dt: &mut f64,
        stalled_s: &mut f64,
        cycle_index: u64,
    ) -> Option<Jumped> {
        let t = st.time_s;
        let p = self.period_s;
        let eps = 1e-9 * p;
        if t < self.repeats_from_s - eps {
            return None;
        }
        // Sample.
        self.newest = (self.newest + 1) % SAMPLED_CYCLES;
        {
            let s = &mut self.samples[self.newest];
            s.x[..self.heads].copy_from_slice(st.heads());
            slow.sample(&mut s.x[self.heads..], &mut self.scale);
            s.totals = totals(summary, *sum_q2_dt, *stalled_s);
            s.lift_peak_pa = slow.lift_peak_pa();
            s.partings = st.column_parting().0;
        }
        self.count = (self.count + 1).min(SAMPLED_CYCLES);
        if self.count < SAMPLED_CYCLES {
            return None;
        }
        let i2 = self.newest;
        let i1 = (i2 + SAMPLED_CYCLES - 1) % SAMPLED_CYCLES;
        let i0 = (i2 + SAMPLED_CYCLES - 2) % SAMPLED_CYCLES;
        let (s0, s1, s2) = (&self.samples[i0], &self.samples[i1], &self.samples[i2]);
        // Events the full steps must see.
        if s0.lift_peak_pa != s2.lift_peak_pa || s0.partings != s2.partings {
            return None;
        }
        // The largest K the drive and the run's end allow.
        let left = ((model.duration_s - t) / p + 1e-9).floor() as i64 - SAMPLED_CYCLES as i64;
        let left = left.max(0) as u64;
        let (mut k_max, mut bound) = if left < MAX_JUMP_CYCLES {
            (left, JumpBound::End)
        } else {
            (MAX_JUMP_CYCLES, JumpBound::MaxCycles)
        };
        if let Some(ts) = model
            .numerics
            .sync_times_s
            .iter()
            .copied()
            .filter(|&ts| ts > t + eps)
            .reduce(f64::min)
        {
            let before = (((ts - t) / p - 1e-9).ceil() as i64 - 1).max(0) as u64;
            if before < k_max {
                (k_max, bound) = (before, JumpBound::Sync);
            }
        }
        // Error and move bounds.
        let head_scale = s2.x[..self.heads]
            .iter()
            .fold(0.0f64, |m, h| m.max(h.abs()))
            + HEAD_FLOOR_M;
        let mut k = k_max as f64;
        for i in 0..s2.x.len() {
            let (slow_value, scale) = if i < self.heads {
                (false, head_scale)
            } else {
                (true, self.scale[i - self.heads])
            };
            let d = s2.x[i] - s1.x[i];
            let c = s2.x[i] - 2.0 * s1.x[i] + s0.x[i];
            if !(d.is_finite() && c.is_finite()) {
                return None;
            }
            // A head whose change decays (its change of change at least HOLD_DECAY of
            // its change) and whose whole move over the jump stays within what its own
            // steps resolve (the adaptive steps' tolerance atol + rtol |h|, or the
            // multiscale tolerance if larger) is held: full stepping does not know it
            // better, and the cycles computed after the jump relax it (the flow is
            // dissipative). Measured on the municipal demo: after cycle ~1 000 the heads'
            // cycle-end changes (~5e-7 m/cycle) are the decay of the previous jump's own
            // head move; extrapolating them held jumps to ~30 cycles. A steady trend (a
            // drawdown cone deepening like ln t: |c| = |d|/n at cycle n) is extrapolated.
            let hold = if slow_value || c.abs() < HOLD_DECAY * d.abs() {
                0.0
            } else {
                (self.step_tolerance.1 + self.step_tolerance.0 * s2.x[i].abs())
                    .max(self.tolerance * scale)
            };
            self.hold_within[i] = hold;
            // A value that moves less than the tolerance per cycle and whose change changes
            // as much as itself has no trend: it is the scatter of the steps, held rather
            // than extrapolated (extrapolating it would multiply the scatter by K).
            if d.abs() <= self.tolerance * scale && c.abs() >= 0.5 * d.abs() {
                self.rate[i] = 0.0;
                self.curvature[i] = 0.0;
                continue;
            }
            self.rate[i] = d;
            self.curvature[i] = c.abs() / (self.tolerance * scale);
            let mut limit = |ki: f64, b: JumpBound| {
                if ki < k {
                    (k, bound) = (ki, b);
                }
            };
            let k_hold = if hold > 0.0 {
                (hold / d.abs()).floor()
            } else {
                0.0
            };
            if c != 0.0 {
                let r = self.tolerance * scale / c.abs();
                let k_error = (((1.0 + 8.0 * r).sqrt() - 1.0) / 2.0).floor();
                limit(k_error.max(k_hold), JumpBound::Error);
            }
            if slow_value && d != 0.0 {
                limit((MAX_MOVE * scale / d.abs()).floor(), JumpBound::Move);
                // An amount falling toward zero (fines, the cake) is not carried past it
                // unless what is left is within the tolerance.
                let x = s2.x[i];
                if d < 0.0 && x > self.tolerance * scale {
                    limit((x / -d).floor(), JumpBound::TowardZero);
                }
            }
        }
        let mut k = k as u64;
        // The drive must still repeat over the jump and the cycles refreshed after it
        // (a swab's or a pump's last stroke).
        while k >= MIN_JUMP_CYCLES {
            let last = t + (k as f64 + SAMPLED_CYCLES as f64 - 0.5) * p;
            if model.drive.period_at(last) == Some(p)
                && model.drive.stage_index_at(last) == model.drive.stage_index_at(t)
            {
                break;
            }
            k /= 2;
            bound = JumpBound::Drive;
        }
        // The slow state must stay on this side of the cake's events.
        let slow_part = self.heads..s2.x.len();
        let tried = k >= MIN_JUMP_CYCLES;
        while k >= MIN_JUMP_CYCLES {
            for i in slow_part.clone() {
                self.trial[i] = s2.x[i] + k as f64 * self.rate[i];
            }
            if slow.set_sample(model, &self.trial[slow_part.clone()]) {
                break;
            }
            k /= 2;
            bound = JumpBound::Event;
        }
        if k < MIN_JUMP_CYCLES {
            if tried {
                // Put the state back as it was sampled.
                slow.set_sample(model, &s2.x[slow_part]);
                st.set_slow(model, slow);
            }
            return None;
        }
        let kf = k as f64;
        let mut error = 0.0f64;
        for i in 0..self.heads {
            let (r, hold) = (self.rate[i], self.hold_within[i]);
            if r != 0.0 && kf * r.abs() <= hold {
                self.dh[i] = 0.0;
                error = error.max(kf * r.abs() / hold);
            } else {
                self.dh[i] = kf * r;
                error = error.max(0.5 * kf * (kf + 1.0) * self.curvature[i]);
            }
        }
        for &c in &self.curvature[self.heads..] {
            error = error.max(0.5 * kf * (kf + 1.0) * c);
        }
        let mut per_cycle = [0.0; TOTALS];
        for (d, (a, b)) in per_cycle.iter_mut().zip(s2.totals.iter().zip(&s1.totals)) {
            *d = a - b;
        }
        let to_s = t + kf * p;
        st.jump(to_s - t, &self.dh);
        st.time_s = to_s;
        st.set_slow(model, slow);
        add_totals(summary, sum_q2_dt, stalled_s, &per_cycle, kf);
        summary.cycles += k;
        summary.skipped_cycles += k;
        summary.jumps += 1;
        self.count = 0;
        Some(Jumped {
            view: JumpView {
                from_s: t,
                to_s,
                first_cycle: cycle_index,
                cycles: k,
                error_estimate: error,
                bound,
            },
        })
    }
}
