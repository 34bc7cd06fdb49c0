//! Jetting: water pumped through nozzles on a turning tool, with a volume balance.

use super::ramp;
use crate::error::SolverError;
use crate::water::GRAVITY_M_S2;
use std::f64::consts::PI;

/// A jetting tool turning in the screen, with simultaneous pumping, as seen by a
/// one-dimensional radial model.
///
/// Volume: the nozzles put `Q_j = n (π d²/4) v` into the well and a pump may take `Q_p`
/// out; the well's free surface and the screen take the difference. Pressure: the jet's
/// stagnation head `h_s = η v²/(2g)` acts only on the screen under the jets, a share
/// `f = n w² / (2π r_s L)` of it (n round jets of width w); the rest of the screen sees the
/// in-well head. A radial model has one screen face, so it carries the area-weighted head
///
/// ```text
/// H_face = H + e(t),   e = f h_s ρ(t)          (ρ: the start-up ramp, 0 → 1)
/// S_w dH/dt = Q_j ρ(t) − Q_p − Q_screen    ⇔    S_w dH_face/dt = Q_j ρ − Q_p + S_w de/dt − Q_screen
/// ```
///
/// The well node's head is H_face; `S_w de/dt` is not water but the shift between the two
/// heads, and the step's balance books it so (`offset`). The 1-D approximation: the local
/// push of the jet (a point of the screen sees h_s for the moment the jet passes it) is
/// averaged over the whole screen and circumference, so the flow through the footprint, the
/// gradients and the shear there are understated; the pulse a point feels is not
/// resolved. Only the volume the jets deliver and the mean excess head are carried.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct JetPulse {
    /// Nozzle exit velocity v, m/s.
    pub nozzle_velocity_m_s: f64,
    /// Nozzle diameter d, m.
    pub nozzle_diameter_m: f64,
    /// Number of nozzles n.
    pub nozzles: u32,
    /// Fraction η of the velocity head that reaches the screen, –.
    pub efficiency: f64,
    /// Time for one turn of the tool, s (the drive's period: one turn over n nozzles).
    pub rotation_period_s: f64,
    /// Width w of each jet where it meets the screen, m.
    pub jet_width_m: f64,
    /// Screen radius r_s, m.
    pub screen_radius_m: f64,
    /// Screen length L, m.
    pub screen_length_m: f64,
    /// Free-surface storage of the well S_w, m².
    pub well_storage_m2: f64,
    /// Pumping rate during jetting, m³/s (positive = withdrawal).
    pub pumping_rate_m3_s: f64,
    /// The jet (its velocity, flow and head) grows linearly from 0 over this many passes.
    pub ramp_cycles: f64,
}

impl JetPulse {
    /// Stagnation head of the jet at the screen, η v²/(2g), m.
    pub fn pulse_head_m(&self) -> f64 {
        self.efficiency * self.nozzle_velocity_m_s * self.nozzle_velocity_m_s / (2.0 * GRAVITY_M_S2)
    }

    /// Flow through all nozzles at full speed, m³/s.
    pub fn jet_flow_m3_s(&self) -> f64 {
        self.nozzles as f64 * 0.25 * PI * self.nozzle_diameter_m.powi(2) * self.nozzle_velocity_m_s
    }

    /// Share of the screen under the jets, n w²/(2π r_s L), at most 1.
    pub fn share(&self) -> f64 {
        (self.nozzles as f64 * self.jet_width_m * self.jet_width_m
            / (2.0 * PI * self.screen_radius_m * self.screen_length_m))
            .min(1.0)
    }

    /// Time between passes of a jet over one point, s.
    pub fn period_s(&self) -> f64 {
        self.rotation_period_s / self.nozzles as f64
    }

    fn ramp_at(&self, t: f64) -> (f64, f64) {
        let p = self.period_s();
        let r = ramp(t, p, self.ramp_cycles);
        let dr = if self.ramp_cycles > 0.0 && r < 1.0 {
            1.0 / (self.ramp_cycles * p)
        } else {
            0.0
        };
        (r, dr)
    }

    /// Excess of the area-weighted screen head over the in-well head at time t, m.
    pub fn offset_m(&self, t: f64) -> f64 {
        self.share() * self.pulse_head_m() * self.ramp_at(t).0
    }

    /// Water the device adds to the well (jets less pumping) and the offset flow S_w de/dt
    /// at time t, m³/s.
    pub fn flows(&self, t: f64) -> (f64, f64) {
        let (r, dr) = self.ramp_at(t);
        (
            r * self.jet_flow_m3_s() - self.pumping_rate_m3_s,
            self.well_storage_m2 * self.share() * self.pulse_head_m() * dr,
        )
    }

    pub(crate) fn events(&self, t: f64) -> Option<(f64, bool)> {
        let end = self.ramp_cycles * self.period_s();
        (self.ramp_cycles > 0.0 && end > t).then_some((end, false))
    }

    pub(crate) fn validate(&self) -> Result<(), SolverError> {
        for (f, v) in [
            ("drive.nozzle_velocity", self.nozzle_velocity_m_s),
            ("drive.nozzle_diameter", self.nozzle_diameter_m),
            ("drive.efficiency", self.efficiency),
            ("drive.rotation_period", self.rotation_period_s),
            ("drive.jet_width", self.jet_width_m),
        ] {
            if !(v.is_finite() && v > 0.0) {
                return Err(SolverError::invalid(
                    f,
                    format!("must be positive, got {v}"),
                ));
            }
        }
        if self.efficiency > 1.0 {
            return Err(SolverError::invalid(
                "drive.efficiency",
                format!("must not exceed 1, got {}", self.efficiency),
            ));
        }
        if self.nozzles == 0 {
            return Err(SolverError::invalid("drive.nozzles", "must be at least 1"));
        }
        if !(self.pumping_rate_m3_s.is_finite() && self.pumping_rate_m3_s >= 0.0) {
            return Err(SolverError::invalid(
                "drive.pumping_rate",
                format!("must be zero or positive, got {}", self.pumping_rate_m3_s),
            ));
        }
        if self.nozzles as f64 * self.jet_width_m >= 2.0 * PI * self.screen_radius_m {
            return Err(SolverError::invalid(
                "drive.jet_width",
                "the jets together are wider than the screen's circumference; reduce jet_width \
                 or the number of nozzles",
            ));
        }
        Ok(())
    }
}
