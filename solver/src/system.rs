//! The discrete system: storage of every unknown and the flow law of every face.
//!
//! Unknown 0 is the in-well head, unknowns 1..=N the cells. Face j (0 ≤ j < N) joins unknown
//! j to unknown j + 1; face N joins the last cell to the outer boundary (h = 0), and is not
//! used with a no-flow boundary.
//!
//! ```text
//! storage of cell i:  S_i = Ss_i π b (r_{i+1/2}² − r_{i−1/2}²)       m²   (docs/physics.md §1.2)
//! storage of the well: C = π r_c² (free surface) or as given          m²
//! ```

use crate::faces::{half_cell, Face, Segment};
use crate::grid::{Grid, Zone};
use crate::model::{Medium, Model, OuterBoundary};
use crate::water::GRAVITY_M_S2;

/// The cake's state is defined in [`crate::cake`]; re-exported for the users of the face laws.
pub use crate::cake::CakeState;
use std::f64::consts::PI;

/// Grid, storage and face laws of a model.
#[derive(Debug, Clone)]
pub struct Discretization {
    /// The radial grid.
    pub grid: Grid,
    /// Storage capacity of each unknown, m² (index 0 = well).
    pub storage: Vec<f64>,
    /// Flow law of each face (N + 1 faces).
    pub faces: Vec<Face>,
    /// Whether face N (to the outer boundary) carries flow.
    pub outer_open: bool,
    /// Medium of each cell.
    pub media: Vec<Medium>,
    /// Conductance of each face at Δh = 0, m²/s (the face law for linear faces).
    pub conductance: Vec<f64>,
    /// Linear resistance of each face, s/m² (for batched flow evaluation).
    pub r_lin: Vec<f64>,
    /// Quadratic resistance of each face, s²/m⁵.
    pub r_nl: Vec<f64>,
    /// Runs of consecutive faces whose segments all lie in one zone (their dissipation is
    /// C Δh² when linear), and the faces that straddle zones.
    pub pure_runs: Vec<(std::ops::Range<usize>, Zone)>,
    /// Faces whose segments lie in more than one zone.
    pub mixed_faces: Vec<usize>,
    /// The cake state the faces were built with.
    built_cake: Option<CakeState>,
    /// Whether every face law is linear (kept with the faces).
    all_linear: bool,
}

fn medium_of(model: &Model, zone: Zone) -> Medium {
    match zone {
        Zone::Pack => model.pack.medium,
        Zone::Invaded => model
            .invaded
            .as_ref()
            .map_or(model.formation.medium, |z| z.medium),
        _ => model.formation.medium,
    }
}

impl Discretization {
    /// Builds the discrete system of a validated model with the cake in `cake` state.
    pub fn new(model: &Model, cake: Option<CakeState>) -> Discretization {
        let grid = Grid::build(model);
        let n = grid.cells();
        let b = model.well.screen_length_m;
        let mut media: Vec<Medium> = grid.zone.iter().map(|&z| medium_of(model, z)).collect();
        // An invaded zone given ring by ring (a snapshot after development): each cell takes
        // the rings' equivalent conductivity over its own radii.
        if let Some(p) = model.invaded.as_ref().and_then(|z| z.profile.as_ref()) {
            let rb = model.borehole_radius_m();
            let cells = grid.borehole_face..grid.invaded_face;
            for (m, w) in media[cells.clone()]
                .iter_mut()
                .zip(grid.r_face[cells.start..=cells.end].windows(2))
            {
                m.conductivity_m_s = p.equivalent_conductivity(rb, w[0], w[1]);
            }
        }
        let mut storage = Vec::with_capacity(n + 1);
        storage.push(model.well.storage_m2);
        for (c, m) in media.iter().enumerate() {
            let (r1, r2) = (grid.r_face[c], grid.r_face[c + 1]);
            storage.push(m.specific_storage_per_m * PI * b * (r2 * r2 - r1 * r1));
        }
        let mut d = Discretization {
            grid,
            storage,
            faces: Vec::with_capacity(n + 1),
            outer_open: model.formation.outer_boundary == OuterBoundary::FixedHead,
            media,
            conductance: Vec::with_capacity(n + 1),
            r_lin: Vec::with_capacity(n + 1),
            r_nl: Vec::with_capacity(n + 1),
            pure_runs: Vec::new(),
            mixed_faces: Vec::new(),
            built_cake: None,
            all_linear: false,
        };
        d.rebuild_faces(model, cake);
        d
    }

    /// Sets the conductivity of the cells `first..first + k.len()` (the invaded zone as the
    /// fines leave); call [`Discretization::rebuild_faces`] next. Allocates nothing.
    pub fn set_conductivity(&mut self, first: usize, k: &[f64]) {
        for (m, &ki) in self.media[first..first + k.len()].iter_mut().zip(k) {
            m.conductivity_m_s = ki;
        }
    }

    /// Recomputes the face laws (after the cake changed). Allocates nothing once built.
    pub fn rebuild_faces(&mut self, model: &Model, cake: Option<CakeState>) {
        let n = self.grid.cells();
        self.faces.clear();
        for j in 0..=n {
            let face = self.face(model, cake, j);
            self.faces.push(face);
        }
        self.built_cake = cake;
        self.r_lin.clear();
        self.r_lin.extend(self.faces.iter().map(Face::r_lin));
        self.r_nl.clear();
        self.r_nl.extend(self.faces.iter().map(Face::r_nl));
        self.conductance.clear();
        self.conductance
            .extend(self.faces.iter().map(Face::conductance));
        self.classify_faces();
        self.all_linear = self.faces.iter().all(Face::is_linear);
    }

    /// The slow state's new values applied face by face: the conductivities `k` of the
    /// cells `first..first + k.len()` (the invaded zone as the fines leave) and the cake's
    /// state. Only the faces of cells whose conductivity changed, and the cake's face when
    /// the cake changed, are recomputed (by the code of [`Discretization::rebuild_faces`],
    /// so with its bits). Returns whether any face law changed; when none did, what was
    /// built from the faces (factorizations, slopes) still holds. Allocates nothing.
    pub fn update_slow(
        &mut self,
        model: &Model,
        cake: Option<CakeState>,
        invaded: Option<(usize, &[f64])>,
    ) -> bool {
        // Cells whose conductivity changed: lo..hi.
        let (mut lo, mut hi) = (usize::MAX, 0);
        if let Some((first, k)) = invaded {
            for (c, (m, &ki)) in self.media[first..first + k.len()]
                .iter_mut()
                .zip(k)
                .enumerate()
            {
                if m.conductivity_m_s.to_bits() != ki.to_bits() {
                    m.conductivity_m_s = ki;
                    lo = lo.min(first + c);
                    hi = hi.max(first + c + 1);
                }
            }
        }
        let mut changed = false;
        let mut restructured = false;
        let mut redo = |d: &mut Discretization, j: usize| {
            let face = d.face(model, cake, j);
            if face != d.faces[j] {
                restructured |= face.segments().len() != d.faces[j].segments().len()
                    || face
                        .segments()
                        .iter()
                        .zip(d.faces[j].segments())
                        .any(|(a, b)| a.zone != b.zone);
                d.faces[j] = face;
                d.r_lin[j] = face.r_lin();
                d.r_nl[j] = face.r_nl();
                d.conductance[j] = face.conductance();
                changed = true;
            }
        };
        // Cell c lies between faces c and c + 1.
        if lo < hi {
            for j in lo..=hi {
                redo(self, j);
            }
        }
        if cake != self.built_cake {
            let j = self.grid.borehole_face;
            if !(lo..=hi).contains(&j) || lo >= hi {
                redo(self, j);
            }
            self.built_cake = cake;
        }
        if restructured {
            self.classify_faces();
        }
        if changed {
            self.all_linear = self.faces.iter().all(Face::is_linear);
        }
        changed
    }

    /// The law of face j (0: the screen and the first half cell; N: the last half cell to the
    /// outer radius) for the media as they stand and the cake in state `cake`.
    fn face(&self, model: &Model, cake: Option<CakeState>, j: usize) -> Face {
        let (g, media) = (&self.grid, &self.media);
        let n = g.cells();
        let b = model.well.screen_length_m;
        let half = |c: usize, r1: f64, r2: f64| {
            let m = &media[c];
            half_cell(
                g.zone[c],
                r1,
                r2,
                b,
                m.conductivity_m_s,
                m.forchheimer_beta_s2_m2,
            )
        };
        if j == 0 {
            // Face 0: screen, then the inner half of the first pack cell.
            let w = &model.well;
            let rs = w.screen_radius_m;
            let r_nl_screen = w.discharge_coefficient.map_or(0.0, |cd| {
                let a = 2.0 * PI * rs * w.screen_length_m * w.open_area * cd;
                1.0 / (2.0 * GRAVITY_M_S2 * a * a)
            });
            let screen = Segment {
                zone: Zone::Screen,
                r_lin: w.linear_loss_s / (2.0 * PI * rs * b),
                r_nl: r_nl_screen,
            };
            return Face::new(&[screen, half(0, rs, g.r_center[0])]);
        }
        if j == n {
            return Face::new(&[half(n - 1, g.r_center[n - 1], g.outer_radius_m())]);
        }
        let rf = g.r_face[j];
        let left = half(j - 1, g.r_center[j - 1], rf);
        let right = half(j, rf, g.r_center[j]);
        match (cake, &model.cake) {
            (Some(st), Some(c)) if j == g.borehole_face && st.thickness_m > 0.0 => {
                let seg = Segment {
                    zone: Zone::Cake,
                    r_lin: crate::cake::interface_resistance(model, c, st),
                    r_nl: 0.0,
                };
                Face::new(&[left, seg, right])
            }
            _ => Face::new(&[left, right]),
        }
    }

    fn classify_faces(&mut self) {
        self.pure_runs.clear();
        self.mixed_faces.clear();
        let used = if self.outer_open {
            self.faces.len()
        } else {
            self.faces.len() - 1
        };
        for (f, face) in self.faces.iter().enumerate().take(used) {
            let segs = face.segments();
            let zone = segs[0].zone;
            if segs.iter().any(|s| s.zone != zone) {
                self.mixed_faces.push(f);
                continue;
            }
            match self.pure_runs.last_mut() {
                Some((run, z)) if *z == zone && run.end == f => run.end = f + 1,
                _ => self.pure_runs.push((f..f + 1, zone)),
            }
        }
    }

    /// Number of unknowns (N + 1).
    pub fn unknowns(&self) -> usize {
        self.storage.len()
    }

    /// True when every face law is linear.
    pub fn is_linear(&self) -> bool {
        self.all_linear
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::*;

    /// A pack, a cake, an invaded zone with Forchheimer terms and the formation; invented
    /// numbers.
    fn model() -> Model {
        let mut m = crate::fixtures::layered_well();
        crate::fixtures::make_nonlinear(&mut m);
        m
    }

    /// Everything derived from the faces, bit for bit.
    fn same(a: &Discretization, b: &Discretization) -> bool {
        let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
        a.faces == b.faces
            && bits(&a.r_lin) == bits(&b.r_lin)
            && bits(&a.r_nl) == bits(&b.r_nl)
            && bits(&a.conductance) == bits(&b.conductance)
            && a.pure_runs == b.pure_runs
            && a.mixed_faces == b.mixed_faces
            && a.is_linear() == b.is_linear()
    }

    #[test]
    fn face_by_face_update_equals_a_full_rebuild() {
        let m = model();
        let cake = |t: f64| {
            Some(CakeState {
                thickness_m: t,
                coverage: 0.7,
            })
        };
        let mut inc = Discretization::new(&m, cake(2e-3));
        let invaded = inc.grid.borehole_face..inc.grid.invaded_face;
        assert!(invaded.len() >= 3, "the test needs several invaded cells");
        let mut k: Vec<f64> = invaded
            .clone()
            .map(|c| inc.media[c].conductivity_m_s)
            .collect();
        // Nothing new: nothing changes.
        assert!(!inc.update_slow(&m, cake(2e-3), Some((invaded.start, &k))));
        // The cake thinner, then gone (its face loses a segment and becomes a pure one),
        // with some invaded cells cleaner each time; then the invaded cells alone.
        for (t, cells) in [(1e-3, 0..2), (0.0, 1..3), (0.0, 0..1)] {
            for c in cells {
                k[c] *= 1.5;
            }
            assert!(inc.update_slow(&m, cake(t), Some((invaded.start, &k))));
            let mut full = Discretization::new(&m, cake(2e-3));
            full.set_conductivity(invaded.start, &k);
            full.rebuild_faces(&m, cake(t));
            assert!(same(&inc, &full), "cake {t}");
            assert!(!inc.update_slow(&m, cake(t), Some((invaded.start, &k))));
        }
    }
}
