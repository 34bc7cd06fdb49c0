//! Pump-and-backwash surging: a pump with a head–flow curve, an intake that breaks suction,
//! and a riser that drains back through the pump when it stops.

use super::{orifice_flow, ramp};
use crate::error::SolverError;
use crate::water::GRAVITY_M_S2;

/// Height of the band above the pump intake over which the pumped rate falls to zero as
/// the level reaches the intake (the pump breaks suction), m. A numerical choice: the level
/// rests within this band of the intake while the pump runs dry.
pub const SUCTION_BAND_M: f64 = 0.05;

/// What the pump delivers while it runs.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum PumpLaw {
    /// A constant rate, m³/s (positive = withdrawal), whatever the lift.
    ConstantRate(f64),
    /// A head–flow curve `H_p = H₀ − a Q²`: shut-off head H₀ (m) and a (s²/m⁵). The pump
    /// lifts from the well level H to the discharge at z_d above static, so it runs at
    /// `Q = sqrt((H₀ − z_d + H)/a)` (0 when the curve cannot reach the discharge).
    Quadratic {
        /// Shut-off head H₀, m.
        shutoff_head_m: f64,
        /// Curve coefficient a, s²/m⁵.
        coefficient_s2_m5: f64,
    },
}

/// Where the back-flow comes from when the pump stops.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Backflow {
    /// A given volume, drained exponentially with the drain time τ: `Q_b = (V/τ) e^{−t/τ}`.
    Volume(f64),
    /// The water standing in the riser (inside area A_r, m²), full up to the discharge when
    /// the pump stops, drains into the well through the pump. Its level falls toward the
    /// well level with the drain time τ: `Q_b = (A_r/τ)(z_d − H) e^{−t/τ}`, which moves
    /// the riser's contents above the well level, A_r (z_d − H), when H holds still.
    Riser(f64),
}

/// Pump-and-backwash surging: pump for an on-time, stop, and let the water standing in the
/// pump column drain back into the well, pushing water outward; repeat.
///
/// ```text
/// Q_dev = −Q_pump(H) φ(H)                             on,  φ = clamp((H + d_i)/w, 0, 1)
/// Q_dev = Q_b(t, H)                                    off (see [`Backflow`])
/// ```
/// d_i is the intake depth below static and w = [`SUCTION_BAND_M`]: the level cannot be
/// drawn below the intake; there the pump breaks suction and delivers only what flows in.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PumpBackwash {
    /// What the pump delivers while on.
    pub pump: PumpLaw,
    /// Pump running time per cycle, s.
    pub on_time_s: f64,
    /// Pump stopped time per cycle, s.
    pub off_time_s: f64,
    /// Depth of the pump intake below the static level, m.
    pub intake_depth_m: f64,
    /// Height of the discharge above the static level, m.
    pub discharge_height_m: f64,
    /// The back-flow at each stop.
    pub backflow: Backflow,
    /// Time constant of the drain-back, s.
    pub drain_time_s: f64,
    /// Number of cycles (0 = for the whole run).
    pub cycles: u32,
    /// The pumping rate (and so the back-flow) grows linearly from 0 over this many cycles.
    pub ramp_cycles: f64,
}

impl PumpBackwash {
    /// Cycle length, s.
    pub fn period_s(&self) -> f64 {
        self.on_time_s + self.off_time_s
    }

    /// Pumped rate (positive = withdrawal) at in-well head H before the suction break,
    /// m³/s, and its derivative in H.
    pub fn pump_rate(&self, h: f64) -> (f64, f64) {
        match self.pump {
            PumpLaw::ConstantRate(q) => (q, 0.0),
            PumpLaw::Quadratic {
                shutoff_head_m,
                coefficient_s2_m5,
            } => {
                let avail = shutoff_head_m - self.discharge_height_m + h;
                if avail <= 0.0 {
                    return (0.0, 0.0);
                }
                // sqrt(avail/a), rounded off like an orifice near zero: orifice_flow gives
                // Cd A sqrt(2g Δ) with Cd A = 1/sqrt(2 g a).
                let cd_area = 1.0 / (2.0 * GRAVITY_M_S2 * coefficient_s2_m5).sqrt();
                orifice_flow(cd_area, avail)
            }
        }
    }

    /// Device flow at time t and in-well head H, m³/s (positive outward), and d/dH.
    pub fn flows(&self, t: f64, h: f64) -> (f64, f64) {
        let p = self.period_s();
        // Phases closed on the left (a backward-Euler step ending on a switch sees the
        // phase it spans).
        let eps = 1e-9 * p;
        let n = ((t - eps) / p).floor().max(0.0);
        if self.cycles > 0 && n >= self.cycles as f64 {
            return (0.0, 0.0);
        }
        let tl = t - n * p;
        // The ramp is held over each cycle (evaluated at its start), so a stop drains back
        // what that cycle pumped up.
        let scale = ramp(n * p + p, p, self.ramp_cycles);
        if tl <= self.on_time_s + eps {
            let (q, dq) = self.pump_rate(h);
            let x = (h + self.intake_depth_m) / SUCTION_BAND_M;
            let (phi, dphi) = if x >= 1.0 {
                (1.0, 0.0)
            } else if x <= 0.0 {
                (0.0, 0.0)
            } else {
                (x, 1.0 / SUCTION_BAND_M)
            };
            (-scale * q * phi, -scale * (dq * phi + q * dphi))
        } else {
            let tau = self.drain_time_s;
            let decay = (-(tl - self.on_time_s) / tau).exp() / tau;
            match self.backflow {
                Backflow::Volume(v) => (scale * v * decay, 0.0),
                Backflow::Riser(area) => {
                    let head = (self.discharge_height_m - h).max(0.0);
                    let d = if head > 0.0 {
                        -scale * area * decay
                    } else {
                        0.0
                    };
                    (scale * area * head * decay, d)
                }
            }
        }
    }

    /// True when the pump's rate depends on the well level (a curve, or a finite intake).
    pub fn is_head_dependent(&self) -> bool {
        !matches!(self.pump, PumpLaw::ConstantRate(_))
            || self.intake_depth_m.is_finite()
            || matches!(self.backflow, Backflow::Riser(_))
    }

    /// True while the pump runs at time t (phases closed on the left, as in [`Self::flows`]).
    pub fn is_on(&self, t: f64) -> bool {
        let p = self.period_s();
        let eps = 1e-9 * p;
        let n = ((t - eps) / p).floor().max(0.0);
        (self.cycles == 0 || n < self.cycles as f64) && t - n * p <= self.on_time_s + eps
    }

    /// True when the level is within the suction band of the intake (the pump runs dry).
    pub fn suction_broken(&self, h: f64) -> bool {
        h < -self.intake_depth_m + SUCTION_BAND_M
    }

    pub(crate) fn events(&self, t: f64) -> Option<(f64, bool)> {
        let p = self.period_s();
        let n = (t / p).floor();
        if self.cycles > 0 && n >= self.cycles as f64 {
            return None;
        }
        let tl = t - n * p;
        let eps = 1e-12 * p;
        Some(if tl < self.on_time_s - eps {
            (n * p + self.on_time_s, true)
        } else {
            ((n + 1.0) * p, true)
        })
    }

    pub(crate) fn validate(&self) -> Result<(), SolverError> {
        let rate_field = "drive.pumping_rate";
        match self.pump {
            PumpLaw::ConstantRate(q) => pos(rate_field, q)?,
            PumpLaw::Quadratic {
                shutoff_head_m,
                coefficient_s2_m5,
            } => {
                pos("drive.pump_curve.shutoff_head", shutoff_head_m)?;
                pos("drive.pump_curve", coefficient_s2_m5)?;
            }
        }
        for (f, v) in [
            ("drive.on_time", self.on_time_s),
            ("drive.off_time", self.off_time_s),
            ("drive.drain_time", self.drain_time_s),
        ] {
            pos(f, v)?;
        }
        if self.intake_depth_m.is_nan() || self.intake_depth_m <= 0.0 {
            return Err(SolverError::invalid(
                "drive.intake_depth",
                format!(
                    "must be positive (below the static level), got {}",
                    self.intake_depth_m
                ),
            ));
        }
        if !(self.discharge_height_m.is_finite() && self.discharge_height_m >= 0.0) {
            return Err(SolverError::invalid(
                "drive.discharge_height",
                format!("must be zero or positive, got {}", self.discharge_height_m),
            ));
        }
        match self.backflow {
            Backflow::Volume(v) if !(v.is_finite() && v >= 0.0) => Err(SolverError::invalid(
                "drive.backflow_volume",
                format!("must be zero or positive, got {v}"),
            )),
            Backflow::Riser(a) if !(a.is_finite() && a > 0.0) => Err(SolverError::invalid(
                "drive.riser_radius",
                format!("must give a positive riser area, got {a} m2"),
            )),
            _ => Ok(()),
        }
    }
}

fn pos(field: &str, v: f64) -> Result<(), SolverError> {
    if v.is_finite() && v > 0.0 {
        Ok(())
    } else {
        Err(SolverError::invalid(
            field,
            format!("must be positive, got {v}"),
        ))
    }
}
