//! Mud fines in the invaded zone: entrainment, deposition, transport by the radial flow,
//! and the zone's conductivity as they leave (docs/physics.md §13b).
//!
//! Rate law of the Gruesbeck & Collins (1982) kind (first-order entrainment above a critical
//! velocity, deposition in proportion to the fines flux, the filtration coefficient of
//! deep-bed filtration), per bulk volume, with σ the deposited fines (volume per bulk
//! volume), c the mobile fines (volume per volume of pore water), u the Darcy flux and
//! v = |u|/n the interstitial speed:
//!
//! ```text
//! ∂σ/∂t      = −α_e (v − v_c)₊ σ + α_d |u| c
//! ∂(n c)/∂t  = −(1/r) ∂(r u c)/∂r + α_e (v − v_c)₊ σ − α_d |u| c
//! K(σ)       = K_f / (1 + β σ),     β = (K_f/K_d − 1)/σ₀   (formation-damage coefficient)
//! ```
//! K_d is the zone's conductivity as drilled (with σ₀ in place), so K(σ₀) = K_d and
//! K(0) = K_f. Mobile fines do not change K (an assumption of this model).
//!
//! Numerics (docs/numerics.md §Fines): per accepted step of length Δt, with the step's
//! end-of-step face flows held fixed, (1) the exchange between σ and n c in each cell is
//! integrated exactly (a linear 2×2 system whose sum is constant), then (2) the mobile
//! fines are moved by implicit first-order upwind finite volumes (an M-matrix: positive,
//! unconditionally stable). Fines crossing the wall inward are *removed* (they reach the
//! pack and the well); fines crossing the zone's outer edge outward are *pushed out*; water
//! entering from the pack or the formation carries no fines. In-place + removed + pushed out
//! equals the initial volume to round-off.

use crate::model::{Fines, Model};
use std::f64::consts::PI;

/// State of the fines in the cells of the invaded zone.
#[derive(Debug, Clone, PartialEq)]
pub struct FinesState {
    /// Grid index of the first invaded cell.
    pub first_cell: usize,
    params: Fines,
    porosity: f64,
    length_m: f64,
    k_formation: f64,
    beta: f64,
    r_face: Vec<f64>,
    volume: Vec<f64>,
    sigma: Vec<f64>,
    conc: Vec<f64>,
    k: Vec<f64>,
    initial_m3: f64,
    removed_m3: f64,
    pushed_m3: f64,
    // Work arrays of the transport solve (sized once).
    lower: Vec<f64>,
    diag: Vec<f64>,
    upper: Vec<f64>,
    rhs: Vec<f64>,
}

impl FinesState {
    /// The state at t = 0 for the invaded cells of `model`'s grid, whose faces are
    /// `r_face` (cell i spans `r_face[i]..r_face[i+1]`); `first_cell` is the grid index of
    /// the first one. `None` without an invaded zone with fines.
    pub fn new(model: &Model, first_cell: usize, r_face: &[f64]) -> Option<FinesState> {
        let z = model.invaded.as_ref()?;
        let f = z.fines?;
        Some(FinesState::from_rings(
            f,
            first_cell,
            r_face,
            model.well.screen_length_m,
            z.medium.porosity,
            z.medium.conductivity_m_s,
            model.formation.medium.conductivity_m_s,
        ))
    }

    /// The state at t = 0 for rings with faces `r_face` (m), layer thickness `length_m`,
    /// porosity, drilled conductivity `k_drilled` and formation conductivity `k_formation`.
    pub fn from_rings(
        params: Fines,
        first_cell: usize,
        r_face: &[f64],
        length_m: f64,
        porosity: f64,
        k_drilled: f64,
        k_formation: f64,
    ) -> FinesState {
        let m = r_face.len() - 1;
        let volume: Vec<f64> = r_face
            .windows(2)
            .map(|w| PI * length_m * (w[1] * w[1] - w[0] * w[0]))
            .collect();
        // A zone no less conductive than the formation has nothing to recover.
        let k_formation = k_formation.max(k_drilled);
        let beta = (k_formation / k_drilled - 1.0) / params.deposit;
        let initial_m3 = volume.iter().sum::<f64>() * params.deposit;
        let mut s = FinesState {
            first_cell,
            params,
            porosity,
            length_m,
            k_formation,
            beta,
            r_face: r_face.to_vec(),
            volume,
            sigma: vec![params.deposit; m],
            conc: vec![0.0; m],
            k: vec![0.0; m],
            initial_m3,
            removed_m3: 0.0,
            pushed_m3: 0.0,
            lower: vec![0.0; m],
            diag: vec![0.0; m],
            upper: vec![0.0; m],
            rhs: vec![0.0; m],
        };
        s.update_conductivity();
        s
    }

    /// Number of cells.
    pub fn cells(&self) -> usize {
        self.sigma.len()
    }

    /// Conductivity of each cell now, m/s.
    pub fn conductivity(&self) -> &[f64] {
        &self.k
    }

    /// Deposited fines of each cell, volume per bulk volume.
    pub fn deposited(&self) -> &[f64] {
        &self.sigma
    }

    /// Face radii of the cells, m.
    pub fn faces_m(&self) -> &[f64] {
        &self.r_face
    }

    /// Fines in the zone (deposited and mobile), m³ of solids.
    pub fn in_place_m3(&self) -> f64 {
        let n = self.porosity;
        self.volume
            .iter()
            .zip(self.sigma.iter().zip(&self.conc))
            .map(|(v, (s, c))| v * (s + n * c))
            .sum()
    }

    /// Fines at the start, m³ of solids.
    pub fn initial_m3(&self) -> f64 {
        self.initial_m3
    }

    /// Fines carried inward across the wall so far, m³ of solids.
    pub fn removed_m3(&self) -> f64 {
        self.removed_m3
    }

    /// Fines carried outward beyond the zone so far, m³ of solids.
    pub fn pushed_out_m3(&self) -> f64 {
        self.pushed_m3
    }

    /// Density of the fines' solids, kg/m³.
    pub fn grain_density(&self) -> f64 {
        self.params.grain_density_kg_m3
    }

    /// Fines removed so far, kg.
    pub fn removed_kg(&self) -> f64 {
        self.removed_m3 * self.params.grain_density_kg_m3
    }

    /// Conductivity for deposited fines σ, m/s.
    pub fn conductivity_of(&self, sigma: f64) -> f64 {
        self.k_formation / (1.0 + self.beta * sigma)
    }

    fn update_conductivity(&mut self) {
        for (k, &s) in self.k.iter_mut().zip(&self.sigma) {
            *k = self.k_formation / (1.0 + self.beta * s);
        }
    }

    /// Advances over `dt_s` with the face flows `q` (m³/s, outward positive) at the cell
    /// faces, held fixed over the step (`q.len()` = cells + 1). Allocates nothing.
    pub fn advance(&mut self, q: &[f64], dt_s: f64) {
        let m = self.cells();
        debug_assert_eq!(q.len(), m + 1);
        let n = self.porosity;
        let p = self.params;
        let two_pi_b = 2.0 * PI * self.length_m;
        // (1) Exchange, exact for fixed velocity.
        for i in 0..m {
            let u = 0.5 * (q[i].abs() / self.r_face[i] + q[i + 1].abs() / self.r_face[i + 1])
                / two_pi_b;
            let v = u / n;
            let a = p.entrainment_per_m * (v - p.critical_velocity_m_s).max(0.0);
            let d = p.deposition_per_m * u / n; // rate on n c: α_d |u| c = (α_d |u|/n)(n c)
            let rate = a + d;
            if rate <= 0.0 {
                continue;
            }
            let x = self.sigma[i];
            let total = x + n * self.conc[i];
            let eq = d * total / rate;
            let x1 = eq + (x - eq) * (-rate * dt_s).exp();
            self.sigma[i] = x1;
            self.conc[i] = (total - x1).max(0.0) / n;
        }
        // (2) Implicit upwind transport of the mobile fines: n V (c' − c)/Δt + F_out − F_in = 0.
        for i in 0..m {
            let (qi, qo) = (q[i], q[i + 1]);
            self.diag[i] = n * self.volume[i] + dt_s * (qo.max(0.0) - qi.min(0.0));
            self.lower[i] = -dt_s * qi.max(0.0);
            self.upper[i] = dt_s * qo.min(0.0);
            self.rhs[i] = n * self.volume[i] * self.conc[i];
        }
        // Boundary faces bring clean water: drop the couplings to outside.
        self.lower[0] = 0.0;
        self.upper[m - 1] = 0.0;
        // Thomas elimination (diagonally dominant M-matrix, no pivoting needed).
        for i in 1..m {
            let w = self.lower[i] / self.diag[i - 1];
            self.diag[i] -= w * self.upper[i - 1];
            self.rhs[i] -= w * self.rhs[i - 1];
        }
        self.conc[m - 1] = self.rhs[m - 1] / self.diag[m - 1];
        for i in (0..m - 1).rev() {
            self.conc[i] = (self.rhs[i] - self.upper[i] * self.conc[i + 1]) / self.diag[i];
        }
        self.removed_m3 += dt_s * (-q[0]).max(0.0) * self.conc[0];
        self.pushed_m3 += dt_s * q[m].max(0.0) * self.conc[m - 1];
        self.update_conductivity();
    }

    /// Number of values [`FinesState::sample`] writes: σ and c of every cell, the removed
    /// and the pushed-out volume.
    pub fn sample_len(&self) -> usize {
        2 * self.cells() + 2
    }

    /// Writes the state as one vector (σ…, c…, removed, pushed out) into `out`, and the
    /// scale of each value (σ₀, σ₀/n, and the initial volume) into `scale`.
    pub fn sample(&self, out: &mut [f64], scale: &mut [f64]) {
        let m = self.cells();
        out[..m].copy_from_slice(&self.sigma);
        out[m..2 * m].copy_from_slice(&self.conc);
        out[2 * m] = self.removed_m3;
        out[2 * m + 1] = self.pushed_m3;
        scale[..m].fill(self.params.deposit);
        scale[m..2 * m].fill(self.params.deposit / self.porosity);
        scale[2 * m..2 * m + 2].fill(self.initial_m3);
    }

    /// Sets the state from a vector laid out as [`FinesState::sample`] writes it; negative
    /// amounts are set to zero. Returns false (and changes nothing) when a value is not
    /// finite.
    pub fn set_sample(&mut self, x: &[f64]) -> bool {
        let m = self.cells();
        if x[..self.sample_len()].iter().any(|v| !v.is_finite()) {
            return false;
        }
        for (s, &v) in self.sigma.iter_mut().zip(&x[..m]) {
            *s = v.max(0.0);
        }
        for (c, &v) in self.conc.iter_mut().zip(&x[m..2 * m]) {
            *c = v.max(0.0);
        }
        self.removed_m3 = x[2 * m].max(0.0);
        self.pushed_m3 = x[2 * m + 1].max(0.0);
        self.update_conductivity();
        true
    }

    /// Sets every cell to the given deposited fines and no mobile fines (for tests).
    pub fn set_deposited(&mut self, sigma: f64) {
        self.sigma.iter_mut().for_each(|s| *s = sigma);
        self.conc.iter_mut().for_each(|c| *c = 0.0);
        self.update_conductivity();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn state(entrain: f64, deposit: f64) -> FinesState {
        let faces: Vec<f64> = (0..=20).map(|i| 0.1 * 1.05f64.powi(i)).collect();
        FinesState::from_rings(
            Fines {
                deposit: 0.02,
                critical_velocity_m_s: 1e-4,
                entrainment_per_m: entrain,
                deposition_per_m: deposit,
                grain_density_kg_m3: 2650.0,
            },
            3,
            &faces,
            5.0,
            0.3,
            1e-5,
            1e-4,
        )
    }

    #[test]
    fn the_drilled_zone_has_its_drilled_conductivity_and_clean_is_the_formation() {
        let s = state(10.0, 10.0);
        for &k in s.conductivity() {
            assert!((k - 1e-5).abs() < 1e-5 * 1e-14);
        }
        assert!((s.conductivity_of(0.0) - 1e-4).abs() < 1e-18);
    }

    #[test]
    fn mass_is_conserved_through_changing_flows() {
        let mut s = state(30.0, 20.0);
        let mut q = vec![0.0; s.cells() + 1];
        for step in 0..2000 {
            let sign = if (step / 50) % 2 == 0 { -1.0 } else { 0.6 };
            for (j, qj) in q.iter_mut().enumerate() {
                *qj = sign * 0.02 * (1.0 + 1e-3 * j as f64);
            }
            s.advance(&q, 0.05);
            let sum = s.in_place_m3() + s.removed_m3() + s.pushed_out_m3();
            assert!(
                (sum - s.initial_m3()).abs() <= 1e-13 * s.initial_m3(),
                "step {step}: {sum} vs {}",
                s.initial_m3()
            );
        }
        assert!(s.removed_m3() > 0.0 && s.pushed_out_m3() > 0.0);
    }

    #[test]
    fn below_the_critical_velocity_nothing_moves() {
        let mut s = state(30.0, 20.0);
        let q = vec![-1e-6; s.cells() + 1];
        s.advance(&q, 100.0);
        assert_eq!(s.removed_m3(), 0.0);
        assert!(s.deposited().iter().all(|&x| x == 0.02));
    }
}
