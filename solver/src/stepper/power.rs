//! Power dissipated per zone by a head profile: at the θ-point heads for the step's energy
//! balance, and at the end-of-step heads for the power series.
//!
//! ```text
//! P_zone = Σ over faces of the zone Q_f Δh_f              m⁴/s (× ρg: W)
//! ```
//! A face whose segments all lie in one zone (the runs of `Discretization::pure_runs`)
//! adds Q Δh to that zone: C Δh² for a linear face, Q Δh with the batched face laws
//! otherwise. A face across two zones (screen, cake interface) splits Q Δh between its
//! segments (`Face::add_dissipation`).

use super::{Stepper, LANES};
use crate::grid::ZONE_COUNT;

/// The power per zone of the pure runs of linear faces at the end-of-step heads, formed by
/// the θ-scheme's stage in the same pass as the θ-point power (each face's conductance
/// loaded once), for [`Stepper::end_power`]. It stands for the heads of stage `stage` with
/// the well head `well_head`; anything else that moves the heads or the faces drops it
/// (`faces_changed`, `forget_history`), and `end_power` checks the stamp and the well
/// head (which the device's law or the column may set after the stage).
#[derive(Debug, Clone, Copy)]
pub(super) struct KeptEndPower {
    pub(super) stage: u64,
    pub(super) well_head: f64,
    pub(super) pure: [f64; ZONE_COUNT],
}

impl Stepper {
    /// Adds the power per zone of `heads` to `out`, m⁴/s. `faces` holds the flows and
    /// drops of every face at those heads (face n − 1 the outer one) when the face laws are
    /// nonlinear, and is None when every face is linear (C Δh² is used).
    pub(super) fn zone_power(
        &self,
        heads: &[f64],
        faces: Option<(&[f64], &[f64])>,
        out: &mut [f64; ZONE_COUNT],
    ) {
        match faces {
            Some((flows, drops)) => {
                for (run, zone) in &self.disc.pure_runs {
                    let mut lanes = [0.0f64; LANES];
                    let (q, dh) = (&flows[run.clone()], &drops[run.clone()]);
                    let (qc, dc) = (q.chunks_exact(LANES), dh.chunks_exact(LANES));
                    for (&q, &dh) in qc.remainder().iter().zip(dc.remainder()) {
                        lanes[0] += q * dh;
                    }
                    for (q, dh) in qc.zip(dc) {
                        for l in 0..LANES {
                            lanes[l] += q[l] * dh[l];
                        }
                    }
                    out[*zone as usize] += lanes.iter().sum::<f64>();
                }
            }
            None => self.linear_run_powers([heads], [out]),
        }
        self.mixed_power(heads, out);
    }

    /// Adds the C Δh² power of the pure runs of linear faces of each head profile
    /// `heads[k]` to `outs[k]`, all profiles in one pass over each run's faces
    /// (`kernels::linear_powers`, each sum the bits of its own pass).
    fn linear_run_powers<const K: usize>(
        &self,
        heads: [&[f64]; K],
        mut outs: [&mut [f64; ZONE_COUNT]; K],
    ) {
        let d = &self.disc;
        // Every profile has the n heads of the grid.
        let n = heads.first().map_or(0, |h| h.len());
        for (run, zone) in &d.pure_runs {
            let last = run.end.min(n - 1);
            // The outer face (to h = 0) when the run reaches it.
            let outer =
                |h: &[f64]| (run.end == n).then(|| d.conductance[n - 1] * h[n - 1] * h[n - 1]);
            let powers = super::kernels::linear_powers(
                &d.conductance[run.start..last],
                heads.map(|h| (&h[run.start..last], &h[run.start + 1..=last])),
                heads.map(outer),
            );
            for (out, p) in outs.iter_mut().zip(powers) {
                out[*zone as usize] += p;
            }
        }
    }

    /// Adds the power of the faces across two zones (`Discretization::mixed_faces`).
    fn mixed_power(&self, heads: &[f64], out: &mut [f64; ZONE_COUNT]) {
        let (d, n) = (&self.disc, heads.len());
        for &f in &d.mixed_faces {
            let dh = heads[f] - if f + 1 < n { heads[f + 1] } else { 0.0 };
            d.faces[f].add_dissipation(dh, out);
        }
    }

    /// [`Self::zone_power`] of the θ-point heads `y` when every face is linear, and the
    /// pure runs' power at the end-of-step heads `end` from the same pass (the bits of
    /// `zone_power(end, None, ..)`'s pure runs), returned for [`KeptEndPower`].
    pub(super) fn linear_zone_powers(
        &self,
        y: &[f64],
        end: &[f64],
        out: &mut [f64; ZONE_COUNT],
    ) -> [f64; ZONE_COUNT] {
        let mut pure = [0.0; ZONE_COUNT];
        self.linear_run_powers([y, end], [out, &mut pure]);
        self.mixed_power(y, out);
        pure
    }

    /// Power per zone at the end-of-step heads, m⁴/s (× ρg: W). Nonlinear faces are
    /// evaluated in one batched pass of the face laws; nothing is allocated.
    pub fn end_power(&mut self) -> [f64; ZONE_COUNT] {
        let n = self.h.len();
        let last = n - 1;
        // With column inertia the screen's losses are at the head inside the screen.
        let h0 = self.h[0];
        self.h[0] = self.screen_head();
        let nonlinear = !self.faces_linear;
        if nonlinear {
            crate::faces::flows(
                &self.h,
                &self.disc.r_lin[..last],
                &self.disc.r_nl[..last],
                &mut self.end_dh[..last],
                &mut self.end_q[..last],
                &mut self.end_g[..last],
            );
            self.end_dh[last] = self.h[last];
            self.end_q[last] = if self.disc.outer_open {
                crate::faces::quadratic_law(
                    self.disc.r_lin[last],
                    self.disc.r_nl[last],
                    self.h[last],
                )
                .0
            } else {
                0.0
            };
        }
        let kept = self.end_power_kept.filter(|k| {
            !nonlinear && k.stage == self.stages && k.well_head.to_bits() == self.h[0].to_bits()
        });
        let out = match kept {
            Some(k) => {
                let mut out = k.pure;
                self.mixed_power(&self.h, &mut out);
                out
            }
            None => {
                let mut out = [0.0; ZONE_COUNT];
                let faces = nonlinear.then_some((&self.end_q[..], &self.end_dh[..]));
                self.zone_power(&self.h, faces, &mut out);
                out
            }
        };
        self.h[0] = h0;
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::*;

    /// Pack, a patchy cake (its interface face spans two zones), an invaded zone and the
    /// formation to a fixed-head outer radius; Forchheimer terms and the screen entrance
    /// loss when `nonlinear`. Invented numbers.
    fn model(nonlinear: bool) -> Model {
        let mut m = crate::fixtures::layered_well();
        if nonlinear {
            crate::fixtures::make_nonlinear(&mut m);
        }
        m
    }

    /// A stepper on `m` with its cake as given.
    fn stepper(m: &Model) -> Stepper {
        let cake = m.cake.map(|c| crate::cake::CakeState {
            thickness_m: c.thickness_m,
            coverage: c.coverage,
        });
        Stepper::new(m, cake)
    }

    #[test]
    fn end_power_matches_the_face_by_face_sum() {
        for nonlinear in [false, true] {
            let m = model(nonlinear);
            let mut st = stepper(&m);
            for _ in 0..37 {
                st.step(&m, 0.01, 0.5).unwrap();
            }
            // Reference: every face on its own, split by segment (Face::add_dissipation).
            let h = st.heads().to_vec();
            let last = h.len() - 1;
            let mut want = [0.0; ZONE_COUNT];
            for j in 0..last {
                st.disc.faces[j].add_dissipation(h[j] - h[j + 1], &mut want);
            }
            st.disc.faces[last].add_dissipation(h[last], &mut want);
            let got = st.end_power();
            let total: f64 = want.iter().sum();
            assert!(total > 0.0);
            for z in 0..ZONE_COUNT {
                // Sums in another order, and Q Δh against the segment split: round-off.
                assert!(
                    (got[z] - want[z]).abs() <= 1e-12 * total,
                    "nonlinear {nonlinear}, zone {z}: {} vs {}",
                    got[z],
                    want[z]
                );
            }
        }
    }

    #[test]
    fn kept_end_power_is_the_bits_of_a_fresh_pass() {
        // The linear well under the θ-scheme: the stage keeps the pure runs' end power; the
        // same heads summed afresh (the kept value dropped) must give the same bits, with a
        // cake (a face across two zones) and without.
        for cake in [true, false] {
            let mut m = model(false);
            if !cake {
                m.cake = None;
            }
            let mut st = stepper(&m);
            for _ in 0..23 {
                st.step(&m, 0.01, 0.5).unwrap();
            }
            assert!(st.end_power_kept.is_some(), "cake {cake}: nothing kept");
            let kept = st.end_power();
            st.end_power_kept = None;
            let fresh = st.end_power();
            assert!(fresh.iter().sum::<f64>() > 0.0);
            assert_eq!(
                kept.map(f64::to_bits),
                fresh.map(f64::to_bits),
                "cake {cake}"
            );
        }
    }
}
