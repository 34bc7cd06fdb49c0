//! Development devices: surge block, swab, pump-and-backwash and jetting pulses.
//!
//! Each device either adds a volume rate to the well node (flow control, with the well's
//! storage) or prescribes the in-well head (the jet). Positive flow is outward (well →
//! formation). The models are deliberately simple, one-dimensional idealisations; each
//! states its assumptions. A tool that seals the column below it (surge block, swab cups on
//! the upstroke) cannot pull the water below its vapour pressure: see [`vapour`].

pub mod frozen;
pub mod jet;
pub mod pump;
pub mod vapour;

pub use frozen::{DeviceAt, SurgeAt, VapourAt};
pub use jet::JetPulse;
pub use pump::{Backflow, PumpBackwash, PumpLaw, PumpTable, MAX_PUMP_POINTS, SUCTION_BAND_M};

pub use vapour::{net_atmospheric_head_m, vapour_flow, VapourState, VAPOUR_MARGIN_M};

use crate::error::SolverError;
use crate::water::GRAVITY_M_S2;
use std::f64::consts::PI;

/// Head difference below which the orifice laws are rounded off, m: below it the leakage
/// turns smoothly linear in Δh (keeps dQ/dΔh finite and Newton well behaved); above it the
/// law differs from the square root by a relative ε/(2|Δh|).
const ORIFICE_ROUNDING_M: f64 = 1e-4;

/// Orifice flow `Cd A sign(Δ) sqrt(2g|Δ|)` from the side with the higher head, rounded off
/// below 1e−6 m of head, m³/s; and its derivative with respect to Δ, m²/s.
pub fn orifice_flow(cd_area_m2: f64, dh_m: f64) -> (f64, f64) {
    orifice_flow_k(orifice_coefficient(cd_area_m2), dh_m)
}

/// The orifice constant `k = Cd A sqrt(2g)` of [`orifice_flow`], m³/s per sqrt(m).
pub fn orifice_coefficient(cd_area_m2: f64) -> f64 {
    cd_area_m2 * (2.0 * GRAVITY_M_S2).sqrt()
}

/// [`orifice_flow`] from its constant `k` ([`orifice_coefficient`]).
#[inline]
pub fn orifice_flow_k(k: f64, dh_m: f64) -> (f64, f64) {
    let root = (dh_m.abs() + ORIFICE_ROUNDING_M).sqrt();
    let q = k * dh_m / root;
    // d/dΔ [Δ (|Δ|+ε)^{-1/2}] = (|Δ|/2 + ε) (|Δ|+ε)^{-3/2}
    let dq = k * (0.5 * dh_m.abs() + ORIFICE_ROUNDING_M) / (root * root * root);
    (q, dq)
}

/// Amplitude factor of a ramp over the first `ramp_cycles` periods (linear from 0 to 1).
pub(crate) fn ramp(t: f64, period: f64, ramp_cycles: f64) -> f64 {
    if ramp_cycles > 0.0 {
        (t / (ramp_cycles * period)).min(1.0)
    } else {
        1.0
    }
}

/// How a surge block moves over a stroke.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Kinematics {
    /// Velocity π f s sin(2πft): the block starts at the bottom of its stroke.
    Sinusoidal,
    /// Constant speed with linear reversals of the given duration, s.
    Trapezoidal {
        /// Time to reverse at each end of the stroke, s.
        reversal_s: f64,
    },
}

/// A surge block moving in the casing above the screen.
///
/// Water below the block is a sealed volume whose head H is the well node. The block's
/// displacement `−A_block v` (v > 0 upward) is balanced by flow through the screen, by
/// leakage past the block through the annular clearance and, for a vented block, through
/// flap valves that open only when the head below exceeds the head above. The elastic
/// storage of the sealed water (π r_c² L c_w ρ g, about 1e−6 m² for 10 m of 0.2 m casing)
/// is negligible beside these flows, so the balance is algebraic and H is solved with the
/// aquifer at every step. The head above the block is the static level (0):
///
/// ```text
/// 0 = −A_block v(t) + Cd A_gap s(0 − H) sqrt(2g|H|) − [H > 0] Cd A_valve sqrt(2gH)
///     + Q_v − Q_screen
/// A_block = π r_block²,  A_gap = π (r_c² − r_block²)
/// ```
///
/// Q_v is the vapour gap that opens when H reaches the vapour bound at the block's depth
/// ([`vapour`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SurgeBlock {
    /// Radius of the block (discs), m.
    pub block_radius_m: f64,
    /// Inside radius of the casing where the block works, m.
    pub casing_radius_m: f64,
    /// Stroke length (peak to peak), m.
    pub stroke_m: f64,
    /// Strokes (full up-and-down cycles) per second, Hz.
    pub frequency_hz: f64,
    /// Kinematics of the stroke.
    pub kinematics: Kinematics,
    /// Discharge coefficient of the clearance and valves, –.
    pub discharge_coefficient: f64,
    /// Open area of the flap valves of a vented block, m² (0 for a solid block).
    pub valve_area_m2: f64,
    /// The stroke grows linearly from 0 over this many cycles.
    pub ramp_cycles: f64,
    /// Depth of the block below the static level, m (sets the vapour bound).
    pub depth_m: f64,
    /// (p_atm − p_v)/(ρ g), m ([`net_atmospheric_head_m`]); infinite: no vapour bound.
    pub net_atmospheric_head_m: f64,
    /// Highest head the block can push under it on the downstroke, m: its largest thrust
    /// over ρ g A_block (the block's and the string's weight in water, plus any pull-down);
    /// infinite: no bound (the block follows its stroke whatever the head).
    pub max_push_head_m: f64,
}

impl SurgeBlock {
    /// Highest in-well head the block can push, m (+∞: no bound).
    pub fn max_head_m(&self) -> f64 {
        self.max_push_head_m
    }

    /// Flow by which the block falls behind its stroke when the head under it reaches the
    /// thrust bound, m³/s (≤ 0, at most the downstroke's displacement `displacement` > 0),
    /// and its derivative in H. The steep linear law of the vapour bound, mirrored: the
    /// head stays within [`VAPOUR_MARGIN_M`] below the bound (devices.md §2).
    pub fn stall_flow(&self, h: f64, displacement: f64) -> (f64, f64) {
        if !self.max_push_head_m.is_finite() || displacement <= 0.0 {
            return (0.0, 0.0);
        }
        let k = 2.0 * self.max_pull_m3_s().max(f64::MIN_POSITIVE) / VAPOUR_MARGIN_M;
        let q = -k * (h - (self.max_push_head_m - VAPOUR_MARGIN_M));
        if q >= 0.0 {
            (0.0, 0.0)
        } else if q <= -displacement {
            (-displacement, 0.0)
        } else {
            (q, -k)
        }
    }
    /// Lowest in-well head the water under the block can have, m: the vapour bound.
    pub fn min_head_m(&self) -> f64 {
        -(self.net_atmospheric_head_m + self.depth_m)
    }

    /// Largest rate at which the block can pull water, m³/s: its peak displacement plus the
    /// clearance leakage at the vapour bound (sets the stiffness of the vapour law).
    pub fn max_pull_m3_s(&self) -> f64 {
        let a_block = PI * self.block_radius_m * self.block_radius_m;
        let a_gap = PI * (self.casing_radius_m.powi(2) - self.block_radius_m.powi(2));
        let v = match self.kinematics {
            Kinematics::Sinusoidal => PI * self.frequency_hz * self.stroke_m,
            Kinematics::Trapezoidal { reversal_s } => {
                self.stroke_m / (0.5 / self.frequency_hz - 0.5 * reversal_s)
            }
        };
        let h = self.min_head_m().abs();
        let leak = if h.is_finite() {
            self.discharge_coefficient * a_gap * (2.0 * GRAVITY_M_S2 * h).sqrt()
        } else {
            0.0
        };
        a_block * v + leak
    }

    /// Block velocity at time t, m/s, positive upward. The block starts at rest at the
    /// bottom of its stroke: sinusoidal `v = π f s sin(2πft)`; trapezoidal: speed
    /// `V = s/(P/2 − t_r/2)` with linear reversals taking t_r from +V to −V.
    pub fn velocity_m_s(&self, t: f64) -> f64 {
        let p = 1.0 / self.frequency_hz;
        let scale = ramp(t, p, self.ramp_cycles);
        let v = match self.kinematics {
            Kinematics::Sinusoidal => {
                PI * self.frequency_hz * self.stroke_m * (2.0 * PI * self.frequency_hz * t).sin()
            }
            Kinematics::Trapezoidal { reversal_s } => {
                let half = 0.5 * p;
                let speed = self.stroke_m / (half - 0.5 * reversal_s);
                let tau = t.rem_euclid(p);
                let ramp_to = |x: f64| (2.0 * x / reversal_s).min(1.0);
                if tau < half {
                    speed * ramp_to(tau).min(ramp_to(half - tau))
                } else {
                    -speed * ramp_to(tau - half).min(ramp_to(p - tau))
                }
            }
        };
        scale * v
    }

    /// Displacement flow, bypass flow and d(bypass)/dH at time t and head below H.
    pub fn flows(&self, t: f64, h: f64) -> (f64, f64, f64) {
        SurgeAt::new(self, t, VapourState::default()).flows(h)
    }

    pub(crate) fn validate(&self) -> Result<(), SolverError> {
        let pos = |f: &str, v: f64| {
            if v.is_finite() && v > 0.0 {
                Ok(())
            } else {
                Err(SolverError::invalid(
                    f,
                    format!("must be positive, got {v}"),
                ))
            }
        };
        pos("drive.block_radius", self.block_radius_m)?;
        pos("drive.stroke", self.stroke_m)?;
        pos("drive.frequency", self.frequency_hz)?;
        pos("drive.discharge_coefficient", self.discharge_coefficient)?;
        if self.block_radius_m > self.casing_radius_m {
            return Err(SolverError::invalid(
                "drive.block_radius",
                format!(
                    "must not exceed the casing radius ({} m), got {} m",
                    self.casing_radius_m, self.block_radius_m
                ),
            ));
        }
        if !(self.valve_area_m2.is_finite() && self.valve_area_m2 >= 0.0) {
            return Err(SolverError::invalid(
                "drive.valve_area",
                format!("must be zero or positive, got {}", self.valve_area_m2),
            ));
        }
        depth_and_atmosphere(self.depth_m, self.net_atmospheric_head_m)?;
        if self.max_push_head_m.is_nan() || self.max_push_head_m <= VAPOUR_MARGIN_M {
            return Err(SolverError::invalid(
                "drive.max_thrust",
                format!(
                    "must give a positive head under the block, got {} m",
                    self.max_push_head_m
                ),
            ));
        }
        if let Kinematics::Trapezoidal { reversal_s } = self.kinematics {
            if !(reversal_s > 0.0 && reversal_s < 0.5 / self.frequency_hz) {
                return Err(SolverError::invalid(
                    "drive.reversal_time",
                    format!("must be positive and shorter than half a stroke period ({} s), got {reversal_s} s", 0.5 / self.frequency_hz),
                ));
            }
        }
        Ok(())
    }
}

/// Checks a tool's depth below the static level and its net atmospheric head.
fn depth_and_atmosphere(depth_m: f64, net_atm_m: f64) -> Result<(), SolverError> {
    if !(depth_m.is_finite() && depth_m >= 0.0) {
        return Err(SolverError::invalid(
            "drive.depth",
            format!("must be zero or positive (below the static level), got {depth_m} m"),
        ));
    }
    if net_atm_m.is_nan() || net_atm_m <= 0.0 {
        return Err(SolverError::invalid(
            "drive.atmospheric_pressure",
            format!(
                "must exceed the vapour pressure of the water (net head {net_atm_m} m); check \
                 the pressure and fluid.temperature"
            ),
        ));
    }
    Ok(())
}

/// A swab: cups lifted at a steady rate over a stroke, then lowered freely.
///
/// On the upstroke the cups seal the casing: the water above them is lifted and discharged
/// (it leaves the well), and the water below them is a sealed column like the one under a
/// surge block, with no free-surface storage. The cups' displacement `A_cup U` must be met
/// by flow through the screen; when the formation cannot supply it, the head under the cups
/// falls to the vapour bound at their depth (which rises with them, `d(τ) = d₀ − U τ`) and
/// the column parts ([`vapour`]). On the downstroke the cups let water past: the well is
/// one free surface again, drawn down by the volume of any vapour gap (`H = −V/S_w`: the
/// water lifted out and not replaced), and recovers.
///
/// ```text
/// lifting:  0 = −A_cup U + Q_v − Q_screen             (sealed below the cups)
/// lowering: S_w dH/dt = −Q_screen                      (free surface)
/// ```
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Swab {
    /// Radius of the swab cups (≈ casing inside radius), m.
    pub cup_radius_m: f64,
    /// Lifting speed U, m/s.
    pub lift_rate_m_s: f64,
    /// Stroke length, m.
    pub stroke_m: f64,
    /// Time to lower the swab again, s.
    pub lowering_time_s: f64,
    /// Depth of the cups below the static level at the start of the stroke, m.
    pub submergence_m: f64,
    /// Number of strokes; after them the well recovers (0 = strokes for the whole run).
    pub strokes: u32,
    /// The lifting speed grows linearly from 0 over this many strokes.
    pub ramp_cycles: f64,
    /// (p_atm − p_v)/(ρ g), m ([`net_atmospheric_head_m`]); infinite: no vapour bound.
    pub net_atmospheric_head_m: f64,
}

impl Swab {
    /// Length of one stroke cycle (lift + lower), s.
    pub fn period_s(&self) -> f64 {
        self.stroke_m / self.lift_rate_m_s + self.lowering_time_s
    }

    /// Time into the current lift, s, or `None` while the swab is lowered or done. The
    /// phases are closed on the left of each instant (a lift includes its end, a stroke
    /// starts just after its start time), so a backward-Euler step that ends on a phase
    /// change sees the phase it spans.
    fn lift_time(&self, t: f64) -> Option<f64> {
        let p = self.period_s();
        let lift = self.stroke_m / self.lift_rate_m_s;
        let eps = 1e-9 * p;
        let n = ((t - eps) / p).floor().max(0.0);
        let tl = t - n * p;
        ((self.strokes == 0 || n < self.strokes as f64) && tl > 0.0 && tl <= lift + eps)
            .then_some(tl.min(lift))
    }

    /// True while the cups are rising and seal the column below them.
    pub fn lifting(&self, t: f64) -> bool {
        self.lift_time(t).is_some()
    }

    /// Depth of the cups below the static level at time t while they rise and seal, m
    /// (`d(τ) = d₀ − U τ`); None while they do not seal.
    pub fn cup_depth_m(&self, t: f64) -> Option<f64> {
        self.lift_time(t)
            .map(|tl| (self.submergence_m - self.lift_rate_m_s * tl).max(0.0))
    }

    /// Vapour bound under the cups at time t, m (−∞ while they do not seal).
    pub fn min_head_m(&self, t: f64) -> f64 {
        match self.cup_depth_m(t) {
            Some(depth) => -(self.net_atmospheric_head_m + depth),
            None => f64::NEG_INFINITY,
        }
    }

    /// Cups' displacement (negative while lifting), m³/s.
    pub fn displacement(&self, t: f64) -> f64 {
        if !self.lifting(t) {
            return 0.0;
        }
        let a = PI * self.cup_radius_m * self.cup_radius_m;
        -a * self.lift_rate_m_s * ramp(t, self.period_s(), self.ramp_cycles)
    }

    /// Largest rate at which the cups pull, m³/s.
    pub fn max_pull_m3_s(&self) -> f64 {
        PI * self.cup_radius_m * self.cup_radius_m * self.lift_rate_m_s
    }

    pub(crate) fn events(&self, t: f64) -> Option<(f64, bool)> {
        let p = self.period_s();
        let lift = self.stroke_m / self.lift_rate_m_s;
        let n = (t / p).floor();
        if self.strokes > 0 && n >= self.strokes as f64 {
            return None;
        }
        let tl = t - n * p;
        let eps = 1e-12 * p;
        Some(if tl < lift - eps {
            (n * p + lift, true)
        } else {
            ((n + 1.0) * p, true)
        })
    }

    pub(crate) fn validate(&self) -> Result<(), SolverError> {
        for (f, v) in [
            ("drive.cup_radius", self.cup_radius_m),
            ("drive.lift_rate", self.lift_rate_m_s),
            ("drive.stroke", self.stroke_m),
            ("drive.submergence", self.submergence_m),
        ] {
            if !(v.is_finite() && v > 0.0) {
                return Err(SolverError::invalid(
                    f,
                    format!("must be positive, got {v}"),
                ));
            }
        }
        if !(self.lowering_time_s.is_finite() && self.lowering_time_s >= 0.0) {
            return Err(SolverError::invalid(
                "drive.lowering_time",
                format!("must be zero or positive, got {}", self.lowering_time_s),
            ));
        }
        depth_and_atmosphere(self.submergence_m, self.net_atmospheric_head_m)
    }
}
