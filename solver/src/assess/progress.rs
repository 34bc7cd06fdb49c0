//! Development progress as the field sees it, cheaply: the specific capacity and efficiency
//! of the constant-rate test for the well in its current state, without re-running the test.
//!
//! Between the screen and the outer edge of the damage r_d the flow of a long test is
//! steady long before the reading (the pack and the damage zones hold little water), so
//! the well's drawdown is the undamaged well's drawdown plus the difference of the steady
//! losses over r_s … r_d at the design rate Q (docs/physics.md §25.3):
//!
//! ```text
//! s(t) ≈ s₀(t) + L(Q) − L₀(Q)
//! L(Q) = Σ_zones [ ln(r₂/r₁)/(2π b K) Q + β (1/r₁ − 1/r₂)/(2π b)² Q² ] + R_cake Q + screen
//! ```
//!
//! with s₀ the drawdown of the undamaged well (one virtual test per run) and L₀ the same
//! sum for it (formation K and β over r_b … r_d, no cake). The zone terms are the face
//! laws of the solver (`faces::half_cell`, Forchheimer integrated over the zone), so the
//! estimate and a full virtual test agree when the near-well flow is steady; the
//! `virtual_tests` verification checks that at the start and the end of a run.

use crate::faces::{half_cell, Face, Segment};
use crate::grid::Zone;
use crate::model::Model;
use crate::slow::SlowState;

/// Steady head loss between the well and the outer edge of the damage r_d of `model` at
/// withdrawal rate `q_m3_s`, m. Zones past the borehole wall use the invaded zone's medium,
/// or the formation's where there is none.
pub fn near_well_loss_m(model: &Model, r_d: f64, q_m3_s: f64) -> f64 {
    let w = &model.well;
    let b = w.screen_length_m;
    let rs = w.screen_radius_m;
    let rb = model.borehole_radius_m();
    let mut segs = [Segment {
        zone: Zone::Screen,
        r_lin: 0.0,
        r_nl: 0.0,
    }; 5];
    let mut n = 0;
    let mut push = |s: Segment| {
        segs[n] = s;
        n += 1;
    };
    let r_nl_screen = w.discharge_coefficient.map_or(0.0, |cd| {
        let a = 2.0 * std::f64::consts::PI * rs * b * w.open_area * cd;
        1.0 / (2.0 * crate::water::GRAVITY_M_S2 * a * a)
    });
    push(Segment {
        zone: Zone::Screen,
        r_lin: w.linear_loss_s / (2.0 * std::f64::consts::PI * rs * b),
        r_nl: r_nl_screen,
    });
    let p = &model.pack.medium;
    push(half_cell(
        Zone::Pack,
        rs,
        rb,
        b,
        p.conductivity_m_s,
        p.forchheimer_beta_s2_m2,
    ));
    if let Some(c) = &model.cake {
        let st = crate::system::CakeState {
            thickness_m: c.thickness_m,
            coverage: c.coverage,
        };
        push(Segment {
            zone: Zone::Cake,
            r_lin: crate::cake::interface_resistance(model, c, st),
            r_nl: 0.0,
        });
    }
    if r_d > rb {
        let r_inv = model.invaded_outer_radius_m().min(r_d);
        // The zone as it stands: ring by ring after fines left it (rings in series).
        let (k, beta) = model.invaded.as_ref().map_or(
            (
                model.formation.medium.conductivity_m_s,
                model.formation.medium.forchheimer_beta_s2_m2,
            ),
            |z| {
                let k = z.profile.as_ref().map_or(z.medium.conductivity_m_s, |p| {
                    p.equivalent_conductivity(rb, rb, r_inv)
                });
                (k, z.medium.forchheimer_beta_s2_m2)
            },
        );
        push(half_cell(Zone::Invaded, rb, r_inv, b, k, beta));
        if r_d > r_inv {
            let f = model.formation.medium;
            push(half_cell(
                Zone::Formation,
                r_inv,
                r_d,
                b,
                f.conductivity_m_s,
                f.forchheimer_beta_s2_m2,
            ));
        }
    }
    segs[..n]
        .iter()
        .map(|s| Face::segment_drop(s, q_m3_s))
        .sum()
}

/// Specific capacity and efficiency of the constant-rate test, estimated cheaply.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ProgressPoint {
    /// Estimated drawdown at the end of the constant-rate test, m.
    pub drawdown_m: f64,
    /// Specific capacity Q_d / s, m²/s.
    pub specific_capacity_m2_s: f64,
    /// Efficiency s₀ / s, –.
    pub efficiency: f64,
}

/// The near-well half of a progress estimate, which needs no virtual test: the steady loss
/// L(Q) of a state of the well and L₀(Q) of the undamaged well. `boreflux run` records L(Q)
/// while the undamaged well's test s₀ runs beside it, and forms the points afterwards with
/// [`LossGauge::point`] (the same arithmetic as [`ProgressBasis::point`], so the same bits).
#[derive(Debug, Clone, PartialEq)]
pub struct LossGauge {
    /// Design rate, m³/s.
    pub rate_m3_s: f64,
    /// Steady loss of the undamaged well over r_s … r_d at the design rate, m.
    pub undamaged_loss_m: f64,
    /// Outer edge of the damage r_d of the base model, m.
    pub r_d_m: f64,
    /// The base model without its drive and numerics (no heap data), from which each
    /// point's snapshot is taken: copying it allocates nothing, whatever the drive holds.
    light: Model,
}

impl LossGauge {
    /// The gauge for `base` at the design rate `rate_m3_s`.
    pub fn new(base: &Model, rate_m3_s: f64) -> LossGauge {
        let r_d = base.invaded_outer_radius_m();
        let clean = super::virtual_test::undamaged(base);
        let mut light = base.clone();
        light.drive = crate::drive::Drive::ConstantRate {
            pumping_rate_m3_s: rate_m3_s,
        };
        light.numerics = crate::model::Numerics::default();
        LossGauge {
            rate_m3_s,
            undamaged_loss_m: near_well_loss_m(&clean, r_d, rate_m3_s),
            r_d_m: r_d,
            light,
        }
    }

    /// The steady near-well loss L(Q) of the well of the gauge in state `slow`, m.
    /// Allocates nothing without invaded-zone fines; with them the snapshot copies the
    /// zone's ring profile (benches/assess.rs: about 0.15 µs without).
    pub fn loss_m(&self, slow: &SlowState) -> f64 {
        let snap = slow.snapshot_model(&self.light);
        near_well_loss_m(&snap, self.r_d_m, self.rate_m3_s)
    }

    /// The estimate s = s₀ + L − L₀ from the undamaged well's drawdown s₀ and a state's
    /// loss L from [`Self::loss_m`].
    pub fn point(&self, undamaged_drawdown_m: f64, loss_m: f64) -> ProgressPoint {
        let s = undamaged_drawdown_m + loss_m - self.undamaged_loss_m;
        ProgressPoint {
            drawdown_m: s,
            specific_capacity_m2_s: self.rate_m3_s / s,
            efficiency: undamaged_drawdown_m / s,
        }
    }
}

/// The undamaged well's test result a progress estimate is built on: computed once per
/// run (one virtual constant-rate test and the undamaged near-well loss).
#[derive(Debug, Clone, PartialEq)]
pub struct ProgressBasis {
    /// Drawdown of the undamaged well at the end of the constant-rate test, m.
    pub undamaged_drawdown_m: f64,
    /// The near-well losses.
    pub gauge: LossGauge,
}

impl ProgressBasis {
    /// The basis for `base` with the undamaged drawdown `s0` of the test at `rate_m3_s`.
    pub fn new(base: &Model, rate_m3_s: f64, undamaged_drawdown_m: f64) -> ProgressBasis {
        ProgressBasis {
            undamaged_drawdown_m,
            gauge: LossGauge::new(base, rate_m3_s),
        }
    }

    /// The estimate for the well of the basis in state `slow` (a slow state of the model the
    /// basis was built from); allocation as [`LossGauge::loss_m`].
    pub fn point(&self, slow: &SlowState) -> ProgressPoint {
        self.gauge
            .point(self.undamaged_drawdown_m, self.gauge.loss_m(slow))
    }
}
