//! The slowly changing state of the well: the wall cake (thickness, coverage, the peak
//! inward pressure difference it has seen) and the fines of the invaded zone. It changes
//! while the flow oscillates fast, so the time loop advances it once per accepted step from
//! that step's face quantities and heads and asks what kind of change it made:
//!
//! - [`Change::None`]: nothing to rebuild;
//! - [`Change::Smooth`]: the face laws are rebuilt, the step sequence goes on;
//! - [`Change::Jump`]: the face laws changed abruptly (the cake gone, a coverage jump, the
//!   wall face's linear resistance or an invaded cell's conductivity moved by more than
//!   [`JUMP_FRACTION`] in one step); the time loop restarts with a small step and forgets
//!   its extrapolation history, as after a jump of the forcing (docs/time-stepping.md).
//!
//! The laws are in [`crate::damage`] (lift-off, fines) and [`crate::cake`] (erosion).

use crate::cake;
use crate::cake::CakeState;
use crate::damage::fines::FinesState;
use crate::diagnostics::FaceState;
use crate::grid::Grid;
use crate::model::{Cake, Invaded, LiftOff, Model, RingProfile};
use crate::system::Discretization;

/// Relative change of the wall face's linear resistance (or of an invaded cell's
/// conductivity) in one step above which a change counts as a jump (assumption: a tenth
/// keeps the step's error estimate meaningful across the change; calibrate against the
/// verification group if it matters).
pub const JUMP_FRACTION: f64 = 0.1;

/// Relative change of an invaded cell's conductivity since the faces were last built above
/// which they are rebuilt. Measured: a coarser threshold (1e-3) rebuilds every few steps,
/// and each rebuild jolts the wall flux, which the oscillation watch then reports as a
/// two-step ringing in the swab and jetting demos; at 1e-6 the faces follow the fines every
/// step while they move and stay put once they stop (assumption otherwise).
pub const REBUILD_FRACTION: f64 = 1e-6;

/// Cake skin, as a fraction of its value at the start, at or below which the cake counts as
/// removed (common practice, no source: a tenth of the cake's skin is within the scatter of
/// any field estimate).
pub const REMOVED_FRACTION: f64 = 0.1;

/// Fractions of the starting cake thickness whose first crossing the run's figures time
/// (half and a tenth of the cake left); a jump over cycles never crosses one
/// ([`SlowState::set_sample`]).
pub const THICKNESS_MARKS: [f64; 2] = [0.5, 0.1];

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

/// Skin split by zone (docs/physics.md §2.4), referred to the formation conductivity.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct SkinParts {
    /// Filter pack (Hawkins), –.
    pub pack: f64,
    /// Wall cake, –.
    pub cake: f64,
    /// Invaded zone, –.
    pub invaded: f64,
}

impl SkinParts {
    /// Total skin, –.
    pub fn total(&self) -> f64 {
        self.pack + self.cake + self.invaded
    }
}

/// The well's slow state and its history.
#[derive(Debug, Clone, PartialEq)]
pub struct SlowState {
    cake: Option<CakeState>,
    initial_cake_m: f64,
    lift_peak_pa: f64,
    fines: Option<FinesState>,
    /// Conductivity of each invaded cell the faces were last built with, m/s.
    k_applied: Vec<f64>,
    /// Face flows of the invaded cells (work array), m³/s.
    flows: Vec<f64>,
    skin: SkinParts,
    initial_skin: SkinParts,
    cake_removed_at_s: Option<f64>,
}

impl SlowState {
    /// The state at t = 0 (the model's cake and invaded zone as built).
    pub fn new(model: &Model) -> SlowState {
        let cake = model.cake.map(|c| CakeState {
            thickness_m: c.thickness_m,
            coverage: c.coverage,
        });
        SlowState::with_cake(model, cake)
    }

    /// A state with the cake in `cake` (start and current), e.g. just after a sudden change.
    pub fn with_cake(model: &Model, cake: Option<CakeState>) -> SlowState {
        let fines = model.invaded.as_ref().and_then(|z| z.fines).and_then(|_| {
            let g = Grid::build(model);
            let (a, b) = (g.borehole_face, g.invaded_face);
            FinesState::new(model, a, &g.r_face[a..=b])
        });
        let k_applied = fines
            .as_ref()
            .map_or_else(Vec::new, |f| f.conductivity().to_vec());
        let flows = vec![0.0; k_applied.len() + usize::from(!k_applied.is_empty())];
        let mut s = SlowState {
            cake,
            initial_cake_m: cake.map_or(0.0, |c| c.thickness_m),
            lift_peak_pa: 0.0,
            fines,
            k_applied,
            flows,
            skin: SkinParts::default(),
            initial_skin: SkinParts::default(),
            cake_removed_at_s: None,
        };
        s.skin = s.skin_parts(model);
        s.initial_skin = s.skin;
        s
    }

    /// The cake state the face laws are built from.
    pub fn cake(&self) -> Option<CakeState> {
        self.cake
    }

    /// Cake thickness at the start and now, m.
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

    /// Largest inward pressure difference across the cake so far, Pa.
    pub fn lift_peak_pa(&self) -> f64 {
        self.lift_peak_pa
    }

    /// Total skin at the start and now, –.
    pub fn skin(&self) -> (f64, f64) {
        (self.initial_skin.total(), self.skin.total())
    }

    /// Skin by zone at the start and now.
    pub fn skin_parts_now(&self) -> (SkinParts, SkinParts) {
        (self.initial_skin, self.skin)
    }

    /// First time the cake's skin fell to [`REMOVED_FRACTION`] of its start, s.
    pub fn cake_removed_at_s(&self) -> Option<f64> {
        self.cake_removed_at_s
    }

    /// The invaded zone's fines, when the model has them.
    pub fn fines(&self) -> Option<&FinesState> {
        self.fines.as_ref()
    }

    /// Fines removed across the wall so far, kg (0 without fines).
    pub fn fines_removed_kg(&self) -> f64 {
        self.fines.as_ref().map_or(0.0, FinesState::removed_kg)
    }

    /// The invaded cells the faces should use: (grid index of the first, conductivities).
    pub fn invaded_conductivity(&self) -> Option<(usize, &[f64])> {
        self.fines
            .as_ref()
            .map(|f| (f.first_cell, self.k_applied.as_slice()))
    }

    /// The well as it stands now, as a model of its own: `base` with the cake (thickness,
    /// coverage) replaced by the current state and the invaded zone by its conductivity ring
    /// by ring as the faces use it now, and no removal law (no erosion, lift-off or fines
    /// transport: the snapshot is for tests run on the well in this state, e.g. a virtual
    /// pumping test, which must not change it). Contract for every slow quantity: the
    /// snapshot carries it, so a test on the snapshot sees exactly the damage the time
    /// loop's faces see at this moment.
    pub fn snapshot_model(&self, base: &Model) -> Model {
        let mut m = base.clone();
        m.cake = match (base.cake, self.cake) {
            (Some(c), Some(st)) if st.thickness_m > 0.0 && st.coverage > 0.0 => Some(Cake {
                thickness_m: st.thickness_m,
                coverage: st.coverage,
                erosion: None,
                // The opened patches keep their hole geometry (the resistance the run's
                // faces had); no more of them fail.
                lift_off: c.lift_off.map(|l| LiftOff { frozen: true, ..l }),
                ..c
            }),
            _ => None,
        };
        m.invaded = base.invaded.as_ref().map(|z| Invaded {
            fines: None,
            profile: match &self.fines {
                Some(f) => Some(RingProfile {
                    outer_radius_m: f.faces_m()[1..].to_vec(),
                    conductivity_m_s: self.k_applied.clone(),
                }),
                None => z.profile.clone(),
            },
            ..z.clone()
        });
        m
    }

    /// Advances over a step of `dt_s` that ended at `time_s` with `face` at the wall and the
    /// end-of-step `heads` on the faces of `disc` (the faces the step was taken with).
    pub fn advance(
        &mut self,
        model: &Model,
        face: &FaceState,
        time_s: f64,
        dt_s: f64,
        disc: &Discretization,
        heads: &[f64],
    ) -> Change {
        let wall_r_lin = disc.faces[disc.grid.borehole_face].r_lin();
        let cake_change = self.advance_cake(model, face, dt_s, wall_r_lin);
        let fines_change = self.advance_fines(disc, heads, dt_s);
        let change = match (cake_change, fines_change) {
            (Change::Jump, _) | (_, Change::Jump) => Change::Jump,
            (Change::None, Change::None) => Change::None,
            _ => Change::Smooth,
        };
        if change != Change::None {
            self.skin = self.skin_parts(model);
            if self.cake_removed_at_s.is_none()
                && self.initial_skin.cake > 0.0
                && self.skin.cake <= REMOVED_FRACTION * self.initial_skin.cake
            {
                self.cake_removed_at_s = Some(time_s);
            }
        }
        change
    }

    /// Number of values [`SlowState::sample`] writes.
    pub fn sample_len(&self) -> usize {
        1 + self.fines.as_ref().map_or(0, FinesState::sample_len)
    }

    /// The state the removal laws integrate, as one vector for cycle jumping
    /// (`run/multiscale.rs`): the cake thickness, then the fines
    /// ([`FinesState::sample`]); `scale` gets each value's natural size (the starting cake
    /// thickness, the fines' own scales). The coverage follows from the thickness and the
    /// lift-off peak, and the applied conductivities and the skin from these, so they are not
    /// sampled.
    pub fn sample(&self, out: &mut [f64], scale: &mut [f64]) {
        out[0] = self.cake.map_or(0.0, |c| c.thickness_m);
        scale[0] = if self.initial_cake_m > 0.0 {
            self.initial_cake_m
        } else {
            1.0
        };
        if let Some(f) = &self.fines {
            f.sample(&mut out[1..], &mut scale[1..]);
        }
    }

    /// Sets the state from a vector laid out as [`SlowState::sample`] writes it, keeping the
    /// lift-off peak (a jump never raises it): the coverage, the applied conductivities and
    /// the skin follow. Returns false when the new state lies across an event the full
    /// steps must find themselves — the cake gone, or its skin down to the removal mark
    /// ([`REMOVED_FRACTION`]) or its thickness down to one of [`THICKNESS_MARKS`] for the
    /// first time — or is not finite; the caller then puts
    /// the state back.
    pub fn set_sample(&mut self, model: &Model, x: &[f64]) -> bool {
        let mut ok = x[0].is_finite();
        if let (Some(c), Some(st)) = (&model.cake, self.cake.as_mut()) {
            if st.thickness_m > 0.0 {
                ok &= x[0] > 0.0;
                // The marks the run reports the time of (half and a tenth of the cake gone)
                // are found by full steps.
                let d0 = self.initial_cake_m;
                ok &= !THICKNESS_MARKS
                    .iter()
                    .any(|m| st.thickness_m > m * d0 && x[0] <= m * d0);
                st.thickness_m = x[0].max(0.0);
                st.coverage = cake::coverage(c, st.thickness_m, self.lift_peak_pa);
                ok &= st.coverage > 0.0;
            }
        }
        if let Some(f) = self.fines.as_mut() {
            ok &= f.set_sample(&x[1..]);
            self.k_applied.copy_from_slice(f.conductivity());
        }
        self.skin = self.skin_parts(model);
        ok &= self.skin.total().is_finite();
        if self.cake_removed_at_s.is_none()
            && self.initial_skin.cake > 0.0
            && self.skin.cake <= REMOVED_FRACTION * self.initial_skin.cake
        {
            ok = false;
        }
        ok
    }

    fn advance_cake(&mut self, model: &Model, face: &FaceState, dt_s: f64, wall_r: f64) -> Change {
        let (Some(c), Some(state)) = (&model.cake, self.cake.as_mut()) else {
            return Change::None;
        };
        let before = *state;
        if before.thickness_m <= 0.0 {
            return Change::None;
        }
        // The pressure across the cake the step's faces carried (face_state); kept for the
        // summary with or without a lift-off law.
        self.lift_peak_pa = self.lift_peak_pa.max(face.cake_pressure_pa);
        cake::erode(c, state, face.shear_pa, face.flux_m_s, dt_s);
        state.coverage = cake::coverage(c, state.thickness_m, self.lift_peak_pa);
        if state.coverage <= 0.0 {
            *state = CakeState {
                thickness_m: 0.0,
                coverage: 0.0,
            };
        }
        let after = *state;
        if after == before {
            return Change::None;
        }
        let dr = (cake::interface_resistance(model, c, before)
            - cake::interface_resistance(model, c, after))
        .abs();
        let gone = after.thickness_m <= 0.0;
        let coverage_jump = (before.coverage - after.coverage).abs() > JUMP_FRACTION;
        if gone || coverage_jump || dr.is_nan() || dr > JUMP_FRACTION * wall_r {
            Change::Jump
        } else {
            Change::Smooth
        }
    }

    fn advance_fines(&mut self, disc: &Discretization, heads: &[f64], dt_s: f64) -> Change {
        let Some(f) = self.fines.as_mut() else {
            return Change::None;
        };
        let first = f.first_cell;
        for (i, q) in self.flows.iter_mut().enumerate() {
            let j = first + i;
            *q = disc.faces[j].flow(heads[j] - heads[j + 1]).0;
        }
        f.advance(&self.flows, dt_s);
        let worst = f
            .conductivity()
            .iter()
            .zip(&self.k_applied)
            .map(|(k, a)| ((k - a) / a).abs())
            .fold(0.0, f64::max);
        if worst <= REBUILD_FRACTION {
            return Change::None;
        }
        self.k_applied.copy_from_slice(f.conductivity());
        if worst > JUMP_FRACTION {
            Change::Jump
        } else {
            Change::Smooth
        }
    }

    fn skin_parts(&self, model: &Model) -> SkinParts {
        let kf = model.formation.medium.conductivity_m_s;
        let rs = model.well.screen_radius_m;
        let rb = model.borehole_radius_m();
        let pack = crate::skin::hawkins_skin(kf, model.pack.medium.conductivity_m_s, rs, rb);
        let cake = match (&model.cake, self.cake) {
            (Some(c), Some(st)) if st.thickness_m > 0.0 => cake::skin(model, c, st),
            _ => 0.0,
        };
        let invaded = match (&self.fines, &model.invaded) {
            (Some(f), _) => rings_skin(kf, f.faces_m(), &self.k_applied),
            (None, Some(z)) => invaded_skin(model, z),
            (None, None) => 0.0,
        };
        SkinParts {
            pack,
            cake,
            invaded,
        }
    }
}

/// Skin of rings with faces `r_face` and conductivities `k` in series, referred to `kf`
/// (Hawkins 1956 summed ring by ring, docs/physics.md §2.2).
fn rings_skin(kf: f64, r_face: &[f64], k: &[f64]) -> f64 {
    r_face
        .windows(2)
        .zip(k)
        .map(|(w, &ki)| (kf / ki - 1.0) * (w[1] / w[0]).ln())
        .sum()
}

/// Skin of an invaded zone as given (uniform, or ring by ring).
fn invaded_skin(model: &Model, z: &Invaded) -> f64 {
    let kf = model.formation.medium.conductivity_m_s;
    let rb = model.borehole_radius_m();
    match &z.profile {
        Some(p) => {
            let mut faces = Vec::with_capacity(p.outer_radius_m.len() + 1);
            faces.push(rb);
            faces.extend_from_slice(&p.outer_radius_m);
            rings_skin(kf, &faces, &p.conductivity_m_s)
        }
        None => crate::skin::hawkins_skin(kf, z.medium.conductivity_m_s, rb, rb + z.thickness_m),
    }
}

/// Total skin referred to the formation with the cake in state `cake` and the invaded zone
/// as given (docs/physics.md §2.4).
pub fn total_skin(model: &Model, cake: Option<CakeState>) -> f64 {
    let kf = model.formation.medium.conductivity_m_s;
    let rs = model.well.screen_radius_m;
    let rb = model.borehole_radius_m();
    let mut s = crate::skin::hawkins_skin(kf, model.pack.medium.conductivity_m_s, rs, rb);
    if let Some(z) = &model.invaded {
        s += invaded_skin(model, z);
    }
    if let (Some(c), Some(st)) = (&model.cake, cake) {
        s += cake::skin(model, c, st);
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::fixtures;
    use crate::model::*;

    /// A patchy cake over an invaded zone (invented numbers): the layered demo well with
    /// an erosion law on its cake.
    fn model() -> Model {
        let mut m = fixtures::layered_well();
        m.cake = m.cake.map(|c| Cake {
            erosion: Some(fixtures::erosion(1e-3, 1.0)),
            ..c
        });
        m
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

    #[test]
    fn the_snapshot_carries_the_invaded_zone_as_the_faces_see_it() {
        let mut base = model();
        base.cake = None;
        if let Some(z) = base.invaded.as_mut() {
            z.fines = Some(Fines {
                deposit: 0.01,
                critical_velocity_m_s: 1e-5,
                entrainment_per_m: 100.0,
                deposition_per_m: 10.0,
                grain_density_kg_m3: 2650.0,
            });
        }
        let mut slow = SlowState::new(&base);
        let disc = Discretization::new(&base, None);
        // Heads rising outward: steady inward flow that entrains fines (invented numbers).
        let heads: Vec<f64> = (0..disc.unknowns())
            .map(|i| {
                if i == 0 {
                    -2.0
                } else {
                    -2.0 + (disc.grid.r_center[i - 1] / 0.1).ln()
                }
            })
            .collect();
        let face = crate::diagnostics::FaceState {
            screen_flow_m3_s: 0.0,
            screen_outer_head_m: 0.0,
            wall_flow_m3_s: 0.0,
            flux_m_s: 0.0,
            gradient: 0.0,
            shear_pa: 0.0,
            cake_pressure_pa: 0.0,
        };
        let mut changed = false;
        for k in 0..50 {
            changed |= slow.advance(&base, &face, k as f64, 1.0, &disc, &heads) != Change::None;
        }
        assert!(changed && slow.fines_removed_kg() > 0.0, "fines moved");
        let snap = slow.snapshot_model(&base);
        let z = snap.invaded.as_ref().expect("invaded zone");
        assert!(
            z.fines.is_none(),
            "a test on the snapshot must not move fines"
        );
        let (first, k) = slow.invaded_conductivity().expect("fines state");
        let d2 = Discretization::new(&snap, None);
        for (i, &ki) in k.iter().enumerate() {
            let got = d2.media[first + i].conductivity_m_s;
            assert!((got - ki).abs() <= 1e-14 * ki, "cell {i}: {got} vs {ki}");
        }
        assert!(k[0] > base.invaded.as_ref().unwrap().medium.conductivity_m_s);
        let s_snap = SlowState::new(&snap).skin().1;
        assert!((s_snap - slow.skin().1).abs() <= 1e-12 * slow.skin().1.abs().max(1.0));
    }
}
