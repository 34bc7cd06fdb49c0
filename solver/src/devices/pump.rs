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
// The tabulated curve is kept inline (a few hundred bytes): the law stays `Copy` and is read
// in the time loop without a pointer to follow; a drive is built once per run.
#[allow(clippy::large_enum_variant)]
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
    /// A head–flow curve through measured points (see [`PumpTable`]).
    Table(PumpTable),
}

/// Most points of a tabulated pump curve (a maker's curve is read at a handful).
pub const MAX_PUMP_POINTS: usize = 16;

/// A pump curve through points (Q_i, H_i), Q from 0 (the shut-off head) upward and H
/// falling, read as the rate for a lift, Q(L), by monotone piecewise-cubic Hermite
/// interpolation (Fritsch & Carlson 1980, SIAM J. Numer. Anal. 17(2); the slopes are the
/// weighted harmonic means of the secants, with the three-point end formula limited to keep
/// the sign, as in scipy.interpolate.PchipInterpolator; cited from memory — verify). The
/// interpolant is monotone between the points, so the rate falls as the lift grows. Above
/// the shut-off head the pump delivers nothing; below the last point's head (past the last
/// rate given) the rate is held at that rate: the curve is not extrapolated.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PumpTable {
    len: usize,
    /// Lifts, increasing (the points' heads, last point first), m.
    lift_m: [f64; MAX_PUMP_POINTS],
    /// Rates at those lifts, decreasing to 0 at the shut-off head, m³/s.
    rate_m3_s: [f64; MAX_PUMP_POINTS],
    /// dQ/dL at each point, m²/s.
    slope_m2_s: [f64; MAX_PUMP_POINTS],
}

impl PumpTable {
    /// The curve through `points` = [(Q, H)] (m³/s, m). Errors name
    /// `drive.pump_curve.points`: at least 2 and at most [`MAX_PUMP_POINTS`] points, the
    /// first at Q = 0, rates increasing, heads decreasing, all finite.
    pub fn new(points: &[(f64, f64)]) -> Result<PumpTable, SolverError> {
        let field = "drive.pump_curve.points";
        let bad = |m: String| Err(SolverError::invalid(field, m));
        let n = points.len();
        if !(2..=MAX_PUMP_POINTS).contains(&n) {
            return bad(format!("needs 2 to {MAX_PUMP_POINTS} points, got {n}"));
        }
        if points
            .iter()
            .any(|(q, h)| !(q.is_finite() && h.is_finite()))
        {
            return bad("every rate and head must be a finite number".into());
        }
        if points[0].0 != 0.0 {
            return bad(format!(
                "the first point must be the shut-off head at zero rate, got rate {} m3/s",
                points[0].0
            ));
        }
        for (i, w) in points.windows(2).enumerate() {
            if w[1].0 <= w[0].0 {
                return bad(format!(
                    "rates must increase from point to point: point {} has {} m3/s after {}                      m3/s",
                    i + 2,
                    w[1].0,
                    w[0].0
                ));
            }
            if w[1].1 >= w[0].1 {
                return bad(format!(
                    "heads must fall as the rate grows: point {} has {} m after {} m",
                    i + 2,
                    w[1].1,
                    w[0].1
                ));
            }
        }
        if points[n - 1].1 <= 0.0 {
            return bad(format!(
                "heads must be positive (a pump lifts), got {} m at the last point",
                points[n - 1].1
            ));
        }
        let mut t = PumpTable {
            len: n,
            lift_m: [0.0; MAX_PUMP_POINTS],
            rate_m3_s: [0.0; MAX_PUMP_POINTS],
            slope_m2_s: [0.0; MAX_PUMP_POINTS],
        };
        for (k, &(q, h)) in points.iter().rev().enumerate() {
            t.lift_m[k] = h;
            t.rate_m3_s[k] = q;
        }
        pchip_slopes(&t.lift_m[..n], &t.rate_m3_s[..n], &mut t.slope_m2_s[..n]);
        Ok(t)
    }

    /// Shut-off head, m.
    pub fn shutoff_head_m(&self) -> f64 {
        self.lift_m[self.len - 1]
    }

    /// Rate for a lift L (m), m³/s, and dQ/dL, m²/s.
    pub fn rate(&self, lift: f64) -> (f64, f64) {
        let n = self.len;
        let (x, y, d) = (
            &self.lift_m[..n],
            &self.rate_m3_s[..n],
            &self.slope_m2_s[..n],
        );
        if lift >= x[n - 1] {
            return (0.0, 0.0);
        }
        if lift < x[0] {
            return (y[0], 0.0);
        }
        let k = x.partition_point(|&xi| xi <= lift).clamp(1, n - 1) - 1;
        let h = x[k + 1] - x[k];
        let t = (lift - x[k]) / h;
        let (t2, t3) = (t * t, t * t * t);
        let q = (2.0 * t3 - 3.0 * t2 + 1.0) * y[k]
            + (t3 - 2.0 * t2 + t) * h * d[k]
            + (-2.0 * t3 + 3.0 * t2) * y[k + 1]
            + (t3 - t2) * h * d[k + 1];
        let dq = (6.0 * t2 - 6.0 * t) * (y[k] - y[k + 1]) / h
            + (3.0 * t2 - 4.0 * t + 1.0) * d[k]
            + (3.0 * t2 - 2.0 * t) * d[k + 1];
        (q, dq)
    }
}

/// Slopes of the monotone cubic Hermite interpolant through (x, y), x increasing
/// ([`PumpTable`]): interior points the weighted harmonic mean of the neighbouring secants
/// (0 where they differ in sign or one is 0), ends the three-point formula, set to 0 if its
/// sign differs from the end secant's and limited to 3 × that secant when the secants
/// change sign; two points: the secant.
fn pchip_slopes(x: &[f64], y: &[f64], d: &mut [f64]) {
    let n = x.len();
    let h = |k: usize| x[k + 1] - x[k];
    let m = |k: usize| (y[k + 1] - y[k]) / h(k);
    if n == 2 {
        d[0] = m(0);
        d[1] = m(0);
        return;
    }
    for (k, dk) in d.iter_mut().enumerate().take(n - 1).skip(1) {
        let (m0, m1) = (m(k - 1), m(k));
        *dk = if m0 * m1 <= 0.0 {
            0.0
        } else {
            let (w1, w2) = (2.0 * h(k) + h(k - 1), h(k) + 2.0 * h(k - 1));
            (w1 + w2) / (w1 / m0 + w2 / m1)
        };
    }
    let edge = |h0: f64, h1: f64, m0: f64, m1: f64| {
        let d = ((2.0 * h0 + h1) * m0 - h0 * m1) / (h0 + h1);
        if d.signum() != m0.signum() || m0 == 0.0 {
            0.0
        } else if m0.signum() != m1.signum() && d.abs() > 3.0 * m0.abs() {
            3.0 * m0
        } else {
            d
        }
    };
    d[0] = edge(h(0), h(1), m(0), m(1));
    d[n - 1] = edge(h(n - 2), h(n - 3), m(n - 2), m(n - 3));
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
            PumpLaw::Table(t) => {
                // Lift L = z_d − H: dQ/dH = −dQ/dL.
                let (q, dq) = t.rate(self.discharge_height_m - h);
                (q, -dq)
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
            PumpLaw::Table(t) => pos("drive.pump_curve.points", t.shutoff_head_m())?,
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

#[cfg(test)]
mod tests {
    use super::*;

    /// An invented curve (test input only), the one of tests/data/devices.json.
    const POINTS: [(f64, f64); 6] = [
        (0.0, 40.0),
        (0.004, 39.0),
        (0.008, 36.5),
        (0.012, 32.0),
        (0.016, 25.5),
        (0.020, 17.0),
    ];

    #[test]
    fn the_curve_passes_through_its_points_and_falls_between_them() {
        // Interpolation and monotonicity are the interpolant's defining properties (no
        // outside value needed).
        let t = PumpTable::new(&POINTS).unwrap();
        for &(q, h) in &POINTS {
            assert!(
                (t.rate(h).0 - q).abs() <= 1e-15,
                "{h}: {} vs {q}",
                t.rate(h).0
            );
        }
        let mut last = f64::INFINITY;
        for i in 0..=2400 {
            let lift = 16.0 + 25.0 * i as f64 / 2400.0;
            let (q, dq) = t.rate(lift);
            assert!(
                q <= last && dq <= 0.0,
                "lift {lift}: {q} after {last}, slope {dq}"
            );
            last = q;
        }
        assert_eq!(t.rate(45.0), (0.0, 0.0));
        assert_eq!(t.rate(10.0), (0.02, 0.0));
    }

    #[test]
    fn a_curve_out_of_order_is_refused_naming_the_field() {
        let cases: [&[(f64, f64)]; 5] = [
            &[(0.0, 40.0)],
            &[(0.001, 40.0), (0.004, 30.0)],
            &[(0.0, 40.0), (0.004, 39.0), (0.003, 35.0)],
            &[(0.0, 40.0), (0.004, 39.0), (0.008, 39.5)],
            &[(0.0, 40.0), (0.004, f64::NAN)],
        ];
        for pts in cases {
            let e = PumpTable::new(pts).unwrap_err().to_string();
            assert!(e.contains("drive.pump_curve.points"), "{e}");
        }
    }
}
