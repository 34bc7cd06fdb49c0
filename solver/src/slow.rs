//! The slowly changing state of the well: today the wall cake (thickness and coverage), later
//! other damage the development removes. It changes while the flow oscillates fast, so the
//! time loop advances it once per accepted step from that step's face quantities and asks
//! what kind of change it made:
//!
//! - [`Change::None`]: nothing to rebuild;
//! - [`Change::Smooth`]: the face laws are rebuilt, the step sequence goes on;
//! - [`Change::Jump`]: the face laws changed abruptly (the cake gone, a coverage jump, or the
//!   wall face's linear resistance moved by more than [`JUMP_FRACTION`] in one step); the
//!   time loop restarts with a small step and forgets its extrapolation history, as after a
//!   jump of the forcing (docs/time-stepping.md).
//!
//! The erosion law itself is in [`crate::cake`] and is unchanged by this module.

use crate::cake;
use crate::cake::CakeState;
use crate::diagnostics::FaceState;
use crate::model::{Cake, Model};

/// Relative change of the wall face's linear resistance in one step above which a change
/// counts as a jump (assumption: a tenth keeps the step's error estimate meaningful across
/// the change; calibrate against the verification group if it matters).
pub const JUMP_FRACTION: f64 = 0.1;

/// What an update of the slow state did.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Change {
    /// Nothing changed.
    None,
    /// The faces change a little: rebuild them.
    Smooth,
    /// The faces change abruptly: rebuild them and restart the step sequence.
    Jump,
}

/// The well's slow state and its history.
#[derive(Debug, Clone, PartialEq)]
pub struct SlowState {
    cake: Option<CakeState>,
    initial_cake_m: f64,
    skin: f64,
    initial_skin: f64,
}

impl SlowState {
    /// The state at t = 0 (the model's cake as built).
    pub fn new(model: &Model) -> SlowState {
        let cake = model.cake.map(|c| CakeState {
            thickness_m: c.thickness_m,
            coverage: c.coverage,
        });
        SlowState::with_cake(model, cake)
    }

    /// A state with the cake in `cake` (start and current), e.g. just after a sudden change.
    pub fn with_cake(model: &Model, cake: Option<CakeState>) -> SlowState {
        let skin = total_skin(model, cake);
        SlowState {
            cake,
            initial_cake_m: cake.map_or(0.0, |c| c.thickness_m),
            skin,
            initial_skin: skin,
        }
    }

    /// The cake state the face laws are built from.
    pub fn cake(&self) -> Option<CakeState> {
        self.cake
    }

    /// Cake thickness now and at the start, m.
    pub fn cake_thickness_m(&self) -> (f64, f64) {
        (
            self.initial_cake_m,
            self.cake.map_or(0.0, |c| c.thickness_m),
        )
    }

    /// Cake coverage now, –.
    pub fn cake_coverage(&self) -> f64 {
        self.cake.map_or(0.0, |c| c.coverage)
    }

    /// Total skin now and at the start, –.
    pub fn skin(&self) -> (f64, f64) {
        (self.initial_skin, self.skin)
    }

    /// The well as it stands now, as a model of its own: `base` with the cake (thickness,
    /// coverage) replaced by the current state, and no erosion law (the snapshot is for
    /// tests run on the well in this state, e.g. a virtual pumping test, which must not
    /// change it). Contract for every slow quantity added later (invaded-zone fines, …):
    /// the snapshot carries it, so a test on the snapshot sees exactly the damage the time
    /// loop's faces see at this moment.
    pub fn snapshot_model(&self, base: &Model) -> Model {
        let mut m = base.clone();
        m.cake = match (base.cake, self.cake) {
            (Some(c), Some(st)) if st.thickness_m > 0.0 && st.coverage > 0.0 => Some(Cake {
                thickness_m: st.thickness_m,
                coverage: st.coverage,
                erosion: None,
                ..c
            }),
            _ => None,
        };
        m
    }

    /// Advances over a step of `dt_s` that ended with `face` at the wall; `wall_r_lin` is
    /// the linear resistance of the wall face before the change, s/m².
    pub fn advance(
        &mut self,
        model: &Model,
        face: &FaceState,
        dt_s: f64,
        wall_r_lin: f64,
    ) -> Change {
        let (Some(c), Some(state)) = (&model.cake, self.cake.as_mut()) else {
            return Change::None;
        };
        let before = *state;
        if !cake::erode(c, state, face.shear_pa, face.flux_m_s, dt_s) {
            return Change::None;
        }
        let after = *state;
        self.skin = total_skin(model, Some(after));
        let dr = (cake::interface_resistance(model, c, before)
            - cake::interface_resistance(model, c, after))
        .abs();
        let gone = before.thickness_m > 0.0 && after.thickness_m <= 0.0;
        let coverage_jump = (before.coverage - after.coverage).abs() > JUMP_FRACTION;
        if gone || coverage_jump || dr.is_nan() || dr > JUMP_FRACTION * wall_r_lin {
            Change::Jump
        } else {
            Change::Smooth
        }
    }
}

/// Total skin referred to the formation with the cake in state `cake` (docs/physics.md §2.4).
pub fn total_skin(model: &Model, cake: Option<CakeState>) -> f64 {
    let kf = model.formation.medium.conductivity_m_s;
    let rs = model.well.screen_radius_m;
    let rb = model.borehole_radius_m();
    let mut s = crate::skin::hawkins_skin(kf, model.pack.medium.conductivity_m_s, rs, rb);
    if let Some(z) = &model.invaded {
        s += crate::skin::hawkins_skin(kf, z.medium.conductivity_m_s, rb, rb + z.thickness_m);
    }
    if let (Some(c), Some(st)) = (&model.cake, cake) {
        s += cake::skin(model, c, st);
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drive::{Drive, SineHead};
    use crate::model::*;

    /// A patchy cake over an invaded zone (invented numbers).
    fn model() -> Model {
        Model {
            fluid: Fluid::WATER_20C,
            well: Well {
                screen_radius_m: 0.1,
                screen_length_m: 6.0,
                open_area: 0.12,
                casing_radius_m: 0.1,
                linear_loss_s: 0.0,
                discharge_coefficient: None,
                storage_m2: 0.0,
            },
            pack: Pack {
                outer_radius_m: 0.2,
                medium: Medium::darcy(5e-3, 1e-5),
            },
            cake: Some(Cake {
                thickness_m: 2e-3,
                conductivity_m_s: 1e-6,
                coverage: 0.7,
                erosion: Some(Erosion {
                    critical_shear_pa: 0.0,
                    erodibility_m_s_pa: 1e-3,
                    inward_weight: 1.0,
                    outward_weight: 1.0,
                    coverage_exponent: 1.0,
                }),
            }),
            invaded: Some(Invaded {
                thickness_m: 0.05,
                medium: Medium::darcy(5e-5, 1e-5),
            }),
            formation: Formation {
                medium: Medium::darcy(2e-4, 1e-5),
                outer_radius_m: Some(30.0),
                outer_boundary: OuterBoundary::FixedHead,
            },
            drive: Drive::SineHead(SineHead {
                amplitude_m: 1.5,
                frequency_hz: 0.5,
                offset_m: 0.0,
                ramp_cycles: 0.0,
            }),
            duration_s: 2.0,
            numerics: Numerics::default(),
        }
    }

    #[test]
    fn the_snapshot_carries_the_current_damage_and_no_removal_law() {
        let base = model();
        let thinned = CakeState {
            thickness_m: 1.2e-3,
            coverage: 0.4,
        };
        let slow = SlowState::with_cake(&base, Some(thinned));
        let snap = slow.snapshot_model(&base);
        let c = snap.cake.expect("a cake remains");
        assert_eq!((c.thickness_m, c.coverage), (1.2e-3, 0.4));
        assert!(
            c.erosion.is_none(),
            "a test on the snapshot must not erode it"
        );
        // The snapshot, started afresh, has the skin the state has now.
        assert_eq!(SlowState::new(&snap).skin().1, slow.skin().1);
        // A cake that is gone is no cake in the snapshot.
        let gone = SlowState::with_cake(
            &base,
            Some(CakeState {
                thickness_m: 0.0,
                coverage: 0.0,
            }),
        );
        assert!(gone.snapshot_model(&base).cake.is_none());
    }
}
