//! A device frozen at one instant: every part of its law that depends on time alone (the
//! stroke velocity with its `sin` and ramp, the swab's phase and cup depth, the vapour
//! bound, the orifice and stiffness constants) computed once, so that the well row's root
//! finder, which evaluates the law many times at one time with different in-well heads,
//! computes only what depends on the head. [`crate::drive::Drive::device_flow`] is this
//! evaluated once: the two give the same bits.

use super::pump::PumpBackwash;
use super::vapour::{VapourState, VAPOUR_MARGIN_M};
use super::{orifice_coefficient, orifice_flow_k, SurgeBlock, Swab};
use crate::drive::DeviceFlow;
use std::f64::consts::PI;

/// The vapour law of a sealed tool at one instant (`vapour::vapour_flow`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct VapourAt {
    /// Vapour bound, m (−∞ while the tool does not seal).
    h_min: f64,
    /// Stiffness 2 Q_max/δ, m²/s.
    k: f64,
    /// Lowest rate: −V/Δt while a gap is open, else 0, m³/s.
    floor: f64,
}

impl VapourAt {
    /// The law for a bound `h_min` and largest pull `q_max` with the gap `state`.
    pub fn new(h_min: f64, q_max: f64, state: VapourState) -> Self {
        VapourAt {
            h_min,
            k: 2.0 * q_max.max(f64::MIN_POSITIVE) / VAPOUR_MARGIN_M,
            floor: if state.gap_m3 > 0.0 {
                state.min_rate_m3_s
            } else {
                0.0
            },
        }
    }

    /// Vapour source at head `h`, m³/s, and its derivative in h, m²/s.
    #[inline]
    pub fn flow(&self, h: f64) -> (f64, f64) {
        if !self.h_min.is_finite() {
            return (0.0, 0.0);
        }
        let q = self.k * (self.h_min + VAPOUR_MARGIN_M - h);
        if q > self.floor {
            (q, -self.k)
        } else {
            (self.floor, 0.0)
        }
    }
}

/// A surge block at one instant ([`SurgeBlock::flows`] and its vapour law).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SurgeAt {
    /// Displacement of the stroke, −A_block v(t), m³/s.
    displacement: f64,
    /// Whether the thrust bound can act (finite bound and a downstroke).
    stall: bool,
    /// Stiffness of the thrust bound, m²/s.
    stall_k: f64,
    /// Head at which the block starts to lag, m.
    stall_head: f64,
    /// Orifice constant of the clearance, m³/s per sqrt(m).
    gap_k: f64,
    /// Orifice constant of the flap valves (None for a solid block).
    valve_k: Option<f64>,
    vapour: VapourAt,
}

impl SurgeAt {
    /// The block `b` at time `t` with the vapour gap `state`.
    pub fn new(b: &SurgeBlock, t: f64, state: VapourState) -> Self {
        let a_block = PI * b.block_radius_m * b.block_radius_m;
        let a_gap = PI * (b.casing_radius_m.powi(2) - b.block_radius_m.powi(2));
        let displacement = -a_block * b.velocity_m_s(t);
        let max_pull = b.max_pull_m3_s();
        let cd = b.discharge_coefficient;
        SurgeAt {
            displacement,
            stall: b.max_push_head_m.is_finite() && displacement > 0.0,
            stall_k: 2.0 * max_pull.max(f64::MIN_POSITIVE) / VAPOUR_MARGIN_M,
            stall_head: b.max_push_head_m - VAPOUR_MARGIN_M,
            gap_k: orifice_coefficient(cd * a_gap),
            valve_k: (b.valve_area_m2 > 0.0).then(|| orifice_coefficient(cd * b.valve_area_m2)),
            vapour: VapourAt::new(b.min_head_m(), max_pull, state),
        }
    }

    /// Lag behind the stroke at the thrust bound ([`SurgeBlock::stall_flow`]).
    #[inline]
    fn stall_flow(&self, h: f64) -> (f64, f64) {
        if !self.stall {
            return (0.0, 0.0);
        }
        let q = -self.stall_k * (h - self.stall_head);
        if q >= 0.0 {
            (0.0, 0.0)
        } else if q <= -self.displacement {
            (-self.displacement, 0.0)
        } else {
            (q, -self.stall_k)
        }
    }

    /// Displacement, bypass and d(bypass)/dH at head `h` ([`SurgeBlock::flows`]).
    #[inline]
    pub fn flows(&self, h: f64) -> (f64, f64, f64) {
        let (q_stall, d_stall) = self.stall_flow(h);
        let displacement = self.displacement + q_stall;
        let (q_gap, dq_gap) = orifice_flow_k(self.gap_k, -h);
        let mut bypass = q_gap;
        let mut d_bypass = -dq_gap + d_stall;
        if let Some(k) = self.valve_k {
            if h > 0.0 {
                let (q_v, dq_v) = orifice_flow_k(k, h);
                bypass -= q_v;
                d_bypass -= dq_v;
            }
        }
        (displacement, bypass, d_bypass)
    }

    #[inline]
    fn device_flow(&self, h: f64) -> DeviceFlow {
        let (q, bypass, d) = self.flows(h);
        let (qv, dv) = self.vapour.flow(h);
        DeviceFlow {
            displacement_m3_s: q,
            bypass_m3_s: bypass + qv,
            vapour_m3_s: qv,
            d_dh_m2_s: d + dv,
            offset_m3_s: 0.0,
        }
    }
}

/// A drive's device at one instant, ready to be evaluated at many in-well heads.
#[derive(Debug, Clone, Copy)]
pub enum DeviceAt<'a> {
    /// A flow that does not depend on the head (a pumping rate, a jet pulse, nothing).
    Fixed(DeviceFlow),
    /// A surge block.
    Surge(SurgeAt),
    /// Swab cups: their displacement and vapour law.
    Swab {
        /// Displacement of the cups, m³/s.
        displacement: f64,
        /// Their vapour law.
        vapour: VapourAt,
    },
    /// A pump-and-backwash cycle (its phase is cheap; its pump curve depends on the head).
    Pump {
        /// The pump.
        pump: &'a PumpBackwash,
        /// Time since its stage began, s.
        t: f64,
    },
}

impl DeviceAt<'_> {
    /// The swab `s` at time `t` (since its stage began) with the vapour gap `state`.
    pub fn swab(s: &Swab, t: f64, state: VapourState) -> Self {
        DeviceAt::Swab {
            displacement: s.displacement(t),
            vapour: VapourAt::new(s.min_head_m(t), s.max_pull_m3_s(), state),
        }
    }

    /// Volume rates the device adds to the well node at in-well head `h`.
    #[inline]
    pub fn flow(&self, h: f64) -> DeviceFlow {
        match self {
            DeviceAt::Fixed(f) => *f,
            DeviceAt::Surge(s) => s.device_flow(h),
            DeviceAt::Swab {
                displacement,
                vapour,
            } => {
                let (qv, dv) = vapour.flow(h);
                DeviceFlow {
                    displacement_m3_s: *displacement,
                    bypass_m3_s: qv,
                    vapour_m3_s: qv,
                    d_dh_m2_s: dv,
                    offset_m3_s: 0.0,
                }
            }
            DeviceAt::Pump { pump, t } => {
                let (q, d) = pump.flows(*t, h);
                DeviceFlow {
                    displacement_m3_s: q,
                    d_dh_m2_s: d,
                    ..DeviceFlow::default()
                }
            }
        }
    }
}
