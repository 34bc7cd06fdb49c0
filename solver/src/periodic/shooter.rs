//! One period of the frozen well at fixed steps from a chosen state: the period map Φ of
//! the shooting (parent module), its warm-up and scales, and the figures of a cycle.

use super::{CycleFigures, Options, PeriodicError};
use crate::error::SolverError;
use crate::model::{Model, Scheme};
use crate::slow::SlowState;
use crate::stepper::{Stepper, Tolerances};
use std::f64::consts::PI;

/// One period at fixed steps from a chosen state.
pub(super) struct Shooter<'a> {
    pub(super) model: &'a Model,
    /// The stepper at the cycle start (clock, device state) every period restarts from.
    pub(super) base: Stepper,
    pub(super) work: Stepper,
    pub(super) dt: f64,
    pub(super) steps: usize,
    pub(super) tol: Tolerances,
    /// θ when the case asks for the θ-scheme; None: TR-BDF2.
    pub(super) theta: Option<f64>,
    /// Scale of each unknown (heads, then the column flow).
    pub(super) scale: Vec<f64>,
    /// Unscaled state work array.
    pub(super) x: Vec<f64>,
    pub(super) cycles: usize,
    /// Largest |head| anywhere over the cycles stepped with figures, m.
    pub(super) peak_head: f64,
}

/// Length of the state vector: the heads and the column flow.
pub(super) fn state_len(st: &Stepper) -> usize {
    st.heads().len() + 1
}

pub(super) fn read_state(st: &Stepper, out: &mut [f64]) {
    let n = st.heads().len();
    out[..n].copy_from_slice(st.heads());
    out[n] = st.column_flow().unwrap_or(0.0);
}

impl<'a> Shooter<'a> {
    /// Steps `model` (already frozen) from rest through its ramp and `warmup` plain cycles.
    pub(super) fn new(model: &'a Model, opts: &Options) -> Result<Shooter<'a>, PeriodicError> {
        if opts.steps_per_cycle == 0 || opts.restart == 0 || opts.max_cycles == 0 {
            return Err(PeriodicError::Settings(
                "steps per cycle, restart length and the cycle cap must be at least 1",
            ));
        }
        if opts.tolerance.is_nan() || opts.tolerance <= 0.0 {
            return Err(PeriodicError::Settings("the tolerance must be positive"));
        }
        let drive = &model.drive;
        let (period, from) = match (drive.period_s(), drive.repeats_from_s()) {
            (Some(p), Some(f)) => (p, f),
            _ => {
                return Err(PeriodicError::NotPeriodic {
                    drive: drive_name(drive),
                })
            }
        };
        let ramp_cycles = (from / period - 1e-9).ceil().max(0.0) as usize;
        let warmup = ramp_cycles + opts.warmup_cycles;
        let start_s = warmup as f64 * period;
        // The drive must still be periodic over the cycle after the warm-up.
        let last = start_s + period * (1.0 - 1e-9);
        if drive.period_at(last).is_none() {
            let mut stop = start_s;
            while stop > 0.0 && drive.period_at(stop - 0.5 * period).is_none() {
                stop -= period;
            }
            return Err(PeriodicError::Stops {
                stop_s: stop,
                start_s,
            });
        }
        let slow = SlowState::new(model);
        let base = Stepper::new(model, slow.cake());
        let (tol, theta) = match model.numerics.scheme {
            Scheme::TrBdf2 {
                relative,
                absolute_m,
            } => (
                Tolerances {
                    relative,
                    absolute_m,
                },
                None,
            ),
            Scheme::Theta => (
                Tolerances {
                    relative: 1.0,
                    absolute_m: 1.0,
                },
                Some(model.numerics.theta),
            ),
        };
        let n = state_len(&base);
        let mut s = Shooter {
            model,
            work: base.clone(),
            base,
            dt: period / opts.steps_per_cycle as f64,
            steps: opts.steps_per_cycle,
            tol,
            theta,
            scale: vec![1.0; n],
            x: vec![0.0; n],
            cycles: 0,
            peak_head: 0.0,
        };
        for _ in 0..warmup {
            s.cycle(None)?;
        }
        // One more plain cycle sets the scales.
        let mut fig = CycleFigures::default();
        s.base.clone_from(&s.work);
        s.cycle(Some(&mut fig))?;
        // The scales: the largest |head| anywhere and the largest |screen flow| over that
        // cycle; 1 for a well at rest.
        let head_scale = if s.peak_head > 0.0 { s.peak_head } else { 1.0 };
        let q = fig.peak_screen_flow_m3_s;
        let q_scale = if q > 0.0 { q } else { 1.0 };
        for v in &mut s.scale[..n - 1] {
            *v = head_scale;
        }
        s.scale[n - 1] = q_scale;
        // The cycle start the state belongs to is the end of that cycle.
        s.base.clone_from(&s.work);
        Ok(s)
    }

    /// Steps one period on `work` at the fixed step sequence, keeping the cycle's figures
    /// when asked.
    pub(super) fn cycle(
        &mut self,
        mut fig: Option<&mut CycleFigures>,
    ) -> Result<(), PeriodicError> {
        let m = self.model;
        let t0 = self.work.time_s;
        let wall = self.work.disc.grid.borehole_face;
        let area = 2.0 * PI * m.borehole_radius_m() * m.well.screen_length_m;
        if let Some(f) = fig.as_deref_mut() {
            *f = CycleFigures {
                well_head_range_m: (f64::INFINITY, f64::NEG_INFINITY),
                ..CycleFigures::default()
            };
        }
        for k in 1..=self.steps {
            // Fixed step ends, computed from the cycle start (no drift of the clock).
            let t_end = t0 + self.dt * k as f64;
            let dt = t_end - self.work.time_s;
            self.step(dt)?;
            if let Some(f) = fig.as_deref_mut() {
                let st = &self.work;
                let h = st.heads();
                let q0 = st.screen_flow();
                let qw = st.disc.faces[wall].flow(h[wall] - h[wall + 1]).0;
                f.peak_screen_flow_m3_s = f.peak_screen_flow_m3_s.max(q0.abs());
                f.peak_wall_face_flux_m_s = f.peak_wall_face_flux_m_s.max(qw.abs() / area);
                let b = &st.balance;
                for (d, e) in f.mean_dissipation_m4_s.iter_mut().zip(&b.dissipated) {
                    *d += e;
                }
                f.mean_power_in_m4_s += b.energy_in;
                let (lo, hi) = f.well_head_range_m;
                f.well_head_range_m = (lo.min(h[0]), hi.max(h[0]));
                self.peak_head = self.peak_head.max(max_abs(h));
            }
        }
        if let Some(f) = fig {
            let p = self.dt * self.steps as f64;
            for d in &mut f.mean_dissipation_m4_s {
                *d /= p;
            }
            f.mean_power_in_m4_s /= p;
        }
        self.cycles += 1;
        Ok(())
    }

    /// One step of length `dt`; a failed solve is retried as 2, 4, … 16 equal sub-steps
    /// (deterministic, so Φ stays a function of the state).
    fn step(&mut self, dt: f64) -> Result<(), PeriodicError> {
        let mut parts = 1usize;
        loop {
            let t_end = self.work.time_s + dt;
            let mut r = Ok(());
            for i in 1..=parts {
                let h = if i == parts {
                    t_end - self.work.time_s
                } else {
                    dt / parts as f64
                };
                r = self.one(h);
                if r.is_err() {
                    break;
                }
            }
            match r {
                Ok(()) => return Ok(()),
                Err(e) if parts >= 16 => return Err(e.into()),
                Err(_) => parts *= 2,
            }
        }
    }

    fn one(&mut self, dt: f64) -> Result<(), SolverError> {
        match self.theta {
            None => self
                .work
                .step_adaptive(self.model, dt, self.tol)
                .map(|_| ()),
            Some(theta) => self.work.step(self.model, dt, theta),
        }
    }

    /// Φ in scaled units: `out` = Φ(s z)/s.
    pub(super) fn phi(&mut self, z: &[f64], out: &mut [f64]) -> Result<(), PeriodicError> {
        let n = z.len();
        for ((x, v), s) in self.x.iter_mut().zip(z).zip(&self.scale) {
            *x = v * s;
        }
        self.work
            .restart_from(&self.base, &self.x[..n - 1], self.x[n - 1]);
        self.cycle(None)?;
        read_state(&self.work, &mut self.x);
        for ((o, x), s) in out.iter_mut().zip(&self.x).zip(&self.scale) {
            *o = x / s;
        }
        Ok(())
    }

    /// The scaled state of `base`.
    pub(super) fn start(&self) -> Vec<f64> {
        let mut z = vec![0.0; state_len(&self.base)];
        read_state(&self.base, &mut z);
        for (v, s) in z.iter_mut().zip(&self.scale) {
            *v /= s;
        }
        z
    }
}

/// What a drive is, for [`PeriodicError::NotPeriodic`].
pub(super) fn drive_name(drive: &crate::drive::Drive) -> &'static str {
    use crate::drive::Drive;
    match drive {
        Drive::ConstantRate { .. } => "a constant pumping rate",
        Drive::Slug { .. } => "a slug",
        Drive::Table(_) => "a table that does not repeat",
        Drive::Schedule(_) => "a schedule of stages",
        Drive::SineHead(_) => "a sine head",
        Drive::SurgeBlock(_) => "a surge block",
        Drive::Swab(_) => "a swab",
        Drive::PumpBackwash(_) => "pump-and-backwash",
        Drive::JetPulse(_) => "jet pulses",
    }
}

pub(super) fn max_abs(v: &[f64]) -> f64 {
    v.iter().fold(0.0f64, |a, x| a.max(x.abs()))
}
