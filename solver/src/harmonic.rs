//! The harmonic method: the periodic steady state of a linear (Darcy) model computed
//! directly, one complex tridiagonal solve per harmonic of the drive, no time stepping.
//!
//! The semi-discrete system of [`crate::system`] (docs/physics.md §1.2) for the cells j = 1…N,
//! with the in-well head h_w(t) prescribed, is linear when every face is (no Forchheimer,
//! no screen orifice loss, no cake erosion). Expanding heads and drive in harmonics of the
//! drive's period P (Fourier series; `harmonic/fourier.rs` has the drive's coefficients):
//!
//! ```text
//! S dh/dt = −A h + c₀ h_w(t) e₁                       S: storage, m²; A: conductances, m²/s
//! h_j(t) = Re Σ_{k=0}^{K} Ĥ_{k,j} e^{iω_k t},   ω_k = 2πk/P                          m
//! (i ω_k S + A) Ĥ_k = c₀ Ĥ_{k,w} e₁           one complex tridiagonal solve per k
//! ```
//! k = 0 is the steady solve under the mean well head. `A` couples neighbours through the
//! face conductances c_f (m²/s, [`crate::faces::Face::conductance`]); the last face
//! leads to h = 0 at R when the outer boundary is a fixed head and is absent when it is
//! closed. Substituting the expansion into the ODE and matching the coefficients of
//! e^{iω_k t} gives the system above; the solution is the state the time stepper tends to
//! after its start-up transient has died away.
//!
//! Face flow, positive outward (well → formation), and its amplitudes:
//!
//! ```text
//! Q_f(t) = c_f (h_f − h_{f+1}),  Q̂_{k,f} = c_f ΔĤ_{k,f},  ΔĤ_{k,f} = Ĥ_{k,f} − Ĥ_{k,f+1}    m³/s
//! ```
//! (h_{N+1} = 0 at a fixed-head outer boundary; Q_N = 0 at a closed one.)
//!
//! Period-mean power (derived here). For k, l ≥ 1 the mean over a period of
//! Re(a e^{iω_k t}) Re(b e^{iω_l t}) is ½ Re(a b̄) when k = l and 0 otherwise, and the mean
//! term multiplies only itself (Parseval). A linear face has Q = c Δh, so
//!
//! ```text
//! ⟨Q_f Δh_f⟩ = c_f ⟨Δh_f²⟩ = c_f (ΔĤ_{0,f}² + ½ Σ_{k≥1} |ΔĤ_{k,f}|²)       m⁴/s (× ρg: W)
//! ⟨h_w Q₀⟩   = Ĥ_{0,w} Q̂_{0,0} + ½ Σ_{k≥1} Re(Ĥ_{k,w} conj Q̂_{k,0})          power in
//! ```
//! The segments of a face (screen, half cells, cake) carry the same Q, so segment s
//! dissipates R_s Q² = (R_s/R_f) c_f Δh²; its mean is the same fraction of the face's mean,
//! which [`crate::faces::Face::add_dissipation`] (the stepper's zone split) gives when
//! called at the face's RMS drop, its power being quadratic in Δh for a linear face.
//!
//! Energy identity (derived here; docs/physics.md §7.3 in discrete form): multiplying cell row
//! j of harmonic k by conj Ĥ_{k,j} and summing over the cells gives
//! `Σ_f c_f |ΔĤ_{k,f}|² + i ω_k Σ_j S_j |Ĥ_{k,j}|² = Ĥ_{k,w}^* Q̂_{k,0}`: the storage term is
//! imaginary (elastic energy returns to its value after each period), so the mean power
//! in equals the mean dissipation summed over the zones, exactly for the discrete system.
//! No power crosses R (h = 0 there, or Q = 0).

mod complex;
mod fourier;

pub use complex::{solve_tridiagonal, Complex};

use crate::cake::CakeState;
use crate::error::SolverError;
use crate::grid::{Zone, ZONE_COUNT};
use crate::model::Model;
use crate::system::Discretization;
use std::f64::consts::PI;

/// Why a model cannot be solved by the harmonic method.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum HarmonicError {
    /// A zone has a Forchheimer (quadratic) term, so the face laws are nonlinear.
    #[error(
        "the harmonic method needs linear (Darcy) flow: the {zone} has a Forchheimer \
         coefficient of {beta_s2_m2} s²/m²; use time stepping"
    )]
    Forchheimer {
        /// Zone name (`pack`, `invaded`, `formation`).
        zone: &'static str,
        /// Its Forchheimer coefficient β, s²/m².
        beta_s2_m2: f64,
    },
    /// The screen has an orifice (quadratic) entrance loss.
    #[error(
        "the harmonic method needs linear losses: the screen has an orifice entrance loss \
         (discharge coefficient {discharge_coefficient}); use time stepping"
    )]
    ScreenOrifice {
        /// The screen's discharge coefficient Cd.
        discharge_coefficient: f64,
    },
    /// The wall cake erodes, so the face laws change during the run.
    #[error(
        "the harmonic method needs face laws that do not change: the wall cake erodes \
         (erodibility {erodibility_m_s_pa} m/(s·Pa)); use time stepping"
    )]
    CakeErosion {
        /// The cake's erodibility, m/(s·Pa).
        erodibility_m_s_pa: f64,
    },
    /// Cake lift-off or fines transport change the face laws during the run.
    #[error(
        "the harmonic method needs face laws that do not change: {what} changes the well \
         during the run; use time stepping"
    )]
    DamageRemoval {
        /// The mechanism (`cake.lift_off`, `invaded.fines`).
        what: &'static str,
    },
    /// A face law is nonlinear for another reason.
    #[error("the harmonic method needs linear face laws: face {face} is nonlinear")]
    NonlinearFace {
        /// Index of the face.
        face: usize,
    },
    /// The drive does not prescribe a periodic well head.
    #[error(
        "the harmonic method needs a periodic prescribed well head (a sine head, or a head \
         table that repeats); the drive is {drive}"
    )]
    NotPeriodicHead {
        /// What the drive is.
        drive: &'static str,
    },
    /// A sine head with a ramp has no periodic steady state from the start.
    #[error(
        "the harmonic method computes the periodic steady state directly, with no start-up: \
         a sine head with a ramp ({ramp_cycles} cycles) is refused; set the ramp to 0 cycles"
    )]
    Ramp {
        /// The ramp asked for, cycles.
        ramp_cycles: f64,
    },
    /// Zero harmonics were asked for.
    #[error("the harmonic method needs at least one harmonic, got 0")]
    NoHarmonics,
    /// The model is invalid or a solve failed.
    #[error(transparent)]
    Solver(#[from] SolverError),
}

/// The periodic steady state: complex amplitudes of every unknown for every harmonic.
#[derive(Debug, Clone)]
pub struct PeriodicSolution {
    /// The discrete system solved (grid, storage, face laws).
    pub disc: Discretization,
    period_s: f64,
    /// Ĥ_{k,j} at `k * unknowns + j` (k = 0…K, j = 0…N; j = 0 is the well), m.
    amplitudes: Vec<Complex>,
}

/// Well head and screen flow sampled over one period (see [`PeriodicSolution::series`]).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct PeriodSeries {
    /// Sample times t_i = i P / M, i = 0…M−1, s.
    pub time_s: Vec<f64>,
    /// In-well head, m.
    pub well_head_m: Vec<f64>,
    /// Flow through the screen (face 0), m³/s, positive outward.
    pub screen_flow_m3_s: Vec<f64>,
}

/// Refuses models whose face laws are nonlinear or change in time, naming the reason.
fn check_linear(model: &Model, disc: &Discretization) -> Result<(), HarmonicError> {
    let mut media = vec![(Zone::Pack, model.pack.medium)];
    if let Some(z) = &model.invaded {
        media.push((Zone::Invaded, z.medium));
    }
    media.push((Zone::Formation, model.formation.medium));
    if let Some((zone, m)) = media.iter().find(|(_, m)| m.forchheimer_beta_s2_m2 != 0.0) {
        return Err(HarmonicError::Forchheimer {
            zone: zone.name(),
            beta_s2_m2: m.forchheimer_beta_s2_m2,
        });
    }
    if let Some(cd) = model.well.discharge_coefficient {
        return Err(HarmonicError::ScreenOrifice {
            discharge_coefficient: cd,
        });
    }
    if let Some(e) = model.cake.and_then(|c| c.erosion) {
        if e.erodibility_m_s_pa > 0.0 {
            return Err(HarmonicError::CakeErosion {
                erodibility_m_s_pa: e.erodibility_m_s_pa,
            });
        }
    }
    if model.cake.is_some_and(|c| c.lift_off.is_some()) {
        return Err(HarmonicError::DamageRemoval {
            what: "cake.lift_off",
        });
    }
    if model.invaded.as_ref().is_some_and(|z| z.fines.is_some()) {
        return Err(HarmonicError::DamageRemoval {
            what: "invaded.fines",
        });
    }
    match disc.faces.iter().position(|f| !f.is_linear()) {
        Some(face) => Err(HarmonicError::NonlinearFace { face }),
        None => Ok(()),
    }
}

/// Computes the periodic steady state of a linear model under a periodic prescribed well
/// head, with the drive's mean and its first `harmonics` harmonics (a sine head has one,
/// whatever is asked; a repeated head table has as many as asked, its Fourier series
/// truncated there). Checks the model first; refuses nonlinear models and drives that are
/// not a periodic prescribed head ([`HarmonicError`]).
pub fn solve(model: &Model, harmonics: usize) -> Result<PeriodicSolution, HarmonicError> {
    model.validate()?;
    if harmonics == 0 {
        return Err(HarmonicError::NoHarmonics);
    }
    let cake = model.cake.map(|c| CakeState {
        thickness_m: c.thickness_m,
        coverage: c.coverage,
    });
    let disc = Discretization::new(model, cake);
    check_linear(model, &disc)?;
    let (period_s, well) = fourier::head_coefficients(&model.drive, harmonics)?;
    let n = disc.unknowns();
    let cells = n - 1;
    let c = &disc.conductance;
    // Cell rows (index i = cell i + 1): A's diagonal and its off-diagonals −c_f.
    let mut a_diag = vec![0.0; cells];
    let mut lower = vec![Complex::ZERO; cells];
    let mut upper = vec![Complex::ZERO; cells];
    for i in 0..cells {
        let outer = if i + 1 < cells {
            upper[i] = Complex::real(-c[i + 1]);
            c[i + 1]
        } else if disc.outer_open {
            c[cells]
        } else {
            0.0
        };
        if i > 0 {
            lower[i] = Complex::real(-c[i]);
        }
        a_diag[i] = c[i] + outer;
    }
    let mut diag = vec![Complex::ZERO; cells];
    let mut work = vec![Complex::ZERO; cells];
    let mut amplitudes = vec![Complex::ZERO; well.len() * n];
    let omega = 2.0 * PI / period_s;
    for (k, (h, &hw)) in amplitudes.chunks_exact_mut(n).zip(&well).enumerate() {
        let wk = k as f64 * omega;
        for ((d, &a), &s) in diag.iter_mut().zip(&a_diag).zip(&disc.storage[1..]) {
            *d = Complex::new(a, wk * s);
        }
        h[0] = hw;
        h[1] = hw * c[0];
        solve_tridiagonal(&lower, &diag, &upper, &mut h[1..], &mut work)?;
    }
    Ok(PeriodicSolution {
        disc,
        period_s,
        amplitudes,
    })
}

impl PeriodicSolution {
    /// Period P of the drive, s.
    pub fn period_s(&self) -> f64 {
        self.period_s
    }

    /// Highest harmonic K kept.
    pub fn harmonics(&self) -> usize {
        self.amplitudes.len() / self.disc.unknowns() - 1
    }

    /// Complex amplitudes Ĥ_{k,j} of harmonic k (0 = the mean) at every unknown j
    /// (0 = well, 1…N = cells), m: h_j(t) = Re Σ_k Ĥ_{k,j} e^{i 2πk t/P}.
    pub fn amplitudes(&self, k: usize) -> &[Complex] {
        let n = self.disc.unknowns();
        &self.amplitudes[k * n..(k + 1) * n]
    }

    /// Complex amplitude of the head drop across face f (0…N) for harmonic k, m:
    /// Ĥ_{k,f} − Ĥ_{k,f+1}, with 0 beyond a fixed-head outer boundary and 0 across a
    /// closed one (no flow there).
    pub fn drop_amplitude(&self, f: usize, k: usize) -> Complex {
        let h = self.amplitudes(k);
        let last = h.len() - 1;
        assert!(f <= last, "face {f} out of range 0..={last}");
        if f < last {
            h[f] - h[f + 1]
        } else if self.disc.outer_open {
            h[last]
        } else {
            Complex::ZERO
        }
    }

    /// Complex amplitude of the flow through face f for harmonic k, m³/s, positive outward.
    pub fn flow_amplitude(&self, f: usize, k: usize) -> Complex {
        self.drop_amplitude(f, k) * self.disc.conductance[f]
    }

    /// Re Σ_k a_k e^{i k ω t} for amplitudes `a(k)`.
    fn synthesize(&self, t: f64, a: impl Fn(usize) -> Complex) -> f64 {
        let z = Complex::cis(2.0 * PI * t / self.period_s);
        let mut phasor = Complex::real(1.0);
        let mut sum = 0.0;
        for k in 0..=self.harmonics() {
            sum += (a(k) * phasor).re;
            phasor = phasor * z;
        }
        sum
    }

    /// Head at unknown j (0 = well, 1…N = cells) at time t, m.
    pub fn head_m(&self, j: usize, t: f64) -> f64 {
        let n = self.disc.unknowns();
        assert!(j < n, "unknown {j} out of range 0..{n}");
        self.synthesize(t, |k| self.amplitudes[k * n + j])
    }

    /// Flow through face f (0 = screen … N = outer boundary) at time t, m³/s, positive
    /// outward: conductance × head drop.
    pub fn face_flow_m3_s(&self, f: usize, t: f64) -> f64 {
        self.synthesize(t, |k| self.flow_amplitude(f, k))
    }

    /// Period-mean power into the aquifer through the screen, ⟨h_w Q₀⟩, m⁴/s (× ρg: W).
    pub fn mean_power_in_m4_s(&self) -> f64 {
        let weight = |k: usize| if k == 0 { 1.0 } else { 0.5 };
        (0..=self.harmonics())
            .map(|k| weight(k) * (self.amplitudes(k)[0] * self.flow_amplitude(0, k).conj()).re)
            .sum()
    }

    /// Period-mean power dissipated in each zone (indexed by [`Zone`]), m⁴/s (× ρg: W):
    /// c_f ⟨Δh_f²⟩ per face, split among its segments as the stepper does (module doc).
    pub fn mean_dissipation_m4_s(&self) -> [f64; ZONE_COUNT] {
        let mut out = [0.0; ZONE_COUNT];
        let faces = &self.disc.faces;
        let used = if self.disc.outer_open {
            faces.len()
        } else {
            faces.len() - 1
        };
        for (f, face) in faces.iter().enumerate().take(used) {
            let mean_square: f64 = (0..=self.harmonics())
                .map(|k| {
                    let w = if k == 0 { 1.0 } else { 0.5 };
                    w * self.drop_amplitude(f, k).norm_sqr()
                })
                .sum();
            face.add_dissipation(mean_square.sqrt(), &mut out);
        }
        out
    }

    /// Well head and screen flow at `samples` equally spaced times over one period,
    /// starting at t = 0. Allocates the three output vectors once; nothing per sample.
    pub fn series(&self, samples: usize) -> PeriodSeries {
        let mut out = PeriodSeries {
            time_s: Vec::with_capacity(samples),
            well_head_m: Vec::with_capacity(samples),
            screen_flow_m3_s: Vec::with_capacity(samples),
        };
        let n = self.disc.unknowns();
        let c0 = self.disc.conductance[0];
        for i in 0..samples {
            let t = self.period_s * i as f64 / samples as f64;
            let z = Complex::cis(2.0 * PI * i as f64 / samples as f64);
            let mut phasor = Complex::real(1.0);
            let (mut hw, mut q) = (0.0, 0.0);
            for h in self.amplitudes.chunks_exact(n) {
                hw += (h[0] * phasor).re;
                q += ((h[0] - h[1]) * phasor).re * c0;
                phasor = phasor * z;
            }
            out.time_s.push(t);
            out.well_head_m.push(hw);
            out.screen_flow_m3_s.push(q);
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drive::{Drive, TableDrive, TableQuantity};
    use crate::fixtures;
    use crate::model::*;
    use crate::stepper::Stepper;

    /// Screen with a linear loss, pack, cake, invaded zone and formation out to a fixed
    /// head at `outer_radius_m`: every zone carries dissipation, and faces 0 and the wall
    /// face mix zones. Values are invented for the tests.
    fn composite(drive: Drive, outer_radius_m: f64, cells: usize) -> Model {
        let mut m = fixtures::demo_well();
        m.well.linear_loss_s = 50.0;
        m.cake = Some(fixtures::cake(0.004, 2e-6, 1.0));
        m.invaded = Some(fixtures::invaded(0.1, 5e-5));
        m.formation.outer_radius_m = Some(outer_radius_m);
        m.drive = drive;
        m.duration_s = 100.0;
        m.numerics.grid = GridSpec::Total(cells);
        m
    }

    fn sine(amplitude_m: f64, period_s: f64, offset_m: f64) -> Drive {
        fixtures::sine_head(amplitude_m, 1.0 / period_s, offset_m)
    }

    /// Runs the stepper from rest (two steps as backward-Euler halves, as the run loop
    /// starts, then Crank–Nicolson) for `cycles` periods of `steps` steps and returns the
    /// mean and the first-harmonic amplitude of every unknown over the last period
    /// (discrete Fourier sums, exact for the sampled sinusoid a linear scheme settles to).
    fn crank_nicolson(model: &Model, steps: usize, cycles: usize) -> (Vec<f64>, Vec<Complex>) {
        let period = model.drive.period_s().unwrap();
        let dt = period / steps as f64;
        let mut st = Stepper::new(model, cake_state(model));
        for _ in 0..4 {
            st.step(model, 0.5 * dt, 1.0).unwrap();
        }
        let n = st.disc.unknowns();
        let (mut mean, mut amp) = (vec![0.0; n], vec![Complex::ZERO; n]);
        let total = steps * cycles;
        for s in 3..=total {
            st.step(model, dt, 0.5).unwrap();
            if s > total - steps {
                let phasor = Complex::cis(-2.0 * PI * s as f64 / steps as f64);
                for ((m, a), &h) in mean.iter_mut().zip(&mut amp).zip(st.heads()) {
                    *m += h / steps as f64;
                    *a += phasor * (2.0 * h / steps as f64);
                }
            }
        }
        (mean, amp)
    }

    /// The cake as the run loop and [`solve`] build it.
    fn cake_state(model: &Model) -> Option<CakeState> {
        model.cake.map(|c| CakeState {
            thickness_m: c.thickness_m,
            coverage: c.coverage,
        })
    }

    /// Index of the cell node nearest radius r.
    fn node_at(disc: &Discretization, r: f64) -> usize {
        let rc = &disc.grid.r_center;
        1 + (0..rc.len())
            .min_by(|&a, &b| (rc[a] / r).ln().abs().total_cmp(&(rc[b] / r).ln().abs()))
            .unwrap()
    }

    #[test]
    fn mean_term_is_the_steady_solve() {
        // The stepper's steady solve under a constant head equal to the sine's offset: its
        // 1e30 s backward-Euler step leaves S/Δt ≤ 1e-30 m²/s beside conductances
        // ≥ 1e-3 m²/s, so the two differ by round-off only.
        let m = composite(sine(1.0, 2.0, 0.7), 10.0, 60);
        let sol = solve(&m, 1).unwrap();
        let mut constant = m.clone();
        constant.drive = Drive::Table(TableDrive {
            times_s: vec![0.0, 1.0],
            values: vec![0.7, 0.7],
            quantity: TableQuantity::Head,
            repeat: false,
        });
        let mut st = Stepper::new(&constant, cake_state(&m));
        st.solve_steady(&constant).unwrap();
        for (j, (a, &h)) in sol.amplitudes(0).iter().zip(st.heads()).enumerate() {
            assert!(
                (a.re - h).abs() <= 1e-13 && a.im == 0.0,
                "node {j}: {a:?} vs {h}"
            );
        }
    }

    #[test]
    fn one_harmonic_matches_crank_nicolson_at_second_order() {
        // R = 10 m keeps the start-up transient short: the slowest mode decays like
        // exp(−D (2.4/R)² t), D = 20 m²/s, i.e. by e^{−69} over the 30 periods of 2 s run.
        // What remains is Crank–Nicolson's time error, O(Δt²): the coarse run sets the
        // tolerance of the fine one, error(80) ≤ 1.1 error(40)/4. The next terms are
        // small: the frequency error's is (ωΔt)²/10 ≈ 0.25 % of the leading one at 40 steps
        // per period, the response's curvature in ω adds about the frequency error itself,
        // 2e-3 relative (see below).
        let m = composite(sine(1.0, 2.0, 0.3), 10.0, 80);
        let sol = solve(&m, 1).unwrap();
        let nodes: Vec<usize> = [0.15, 0.5, 2.0, 5.0]
            .iter()
            .map(|&r| node_at(&sol.disc, r))
            .collect();
        let c0 = sol.disc.conductance[0];
        let h = sol.amplitudes(1);
        // The compared quantities: heads at the nodes, then the screen flow.
        let want: Vec<Complex> = nodes
            .iter()
            .map(|&j| h[j])
            .chain([(h[0] - h[1]) * c0])
            .collect();
        let errors = |steps: usize| {
            let (mean, amp) = crank_nicolson(&m, steps, 30);
            // The mean of the periodic state is the steady state under the mean head
            // exactly (the scheme at zero frequency): transient and round-off only.
            for (j, (a, b)) in mean.iter().zip(sol.amplitudes(0)).enumerate() {
                assert!((a - b.re).abs() <= 1e-10 * 0.3, "mean at {j}: {a} vs {b:?}");
            }
            let got: Vec<Complex> = nodes
                .iter()
                .map(|&j| amp[j])
                .chain([(amp[0] - amp[1]) * c0])
                .collect();
            got.iter()
                .zip(&want)
                .map(|(g, w)| {
                    let complex = (*g - *w).abs() / w.abs();
                    let amplitude = (g.abs() / w.abs() - 1.0).abs();
                    let phase = (*g / *w).arg().abs();
                    (complex, amplitude, phase)
                })
                .collect::<Vec<_>>()
        };
        let (coarse, fine) = (errors(40), errors(80));
        for (i, (c, f)) in coarse.iter().zip(&fine).enumerate() {
            let order = (c.0 / f.0).log2();
            assert!((1.9..=2.1).contains(&order), "quantity {i}: order {order}");
            let tol = 1.1 * c.0 / 4.0;
            assert!(
                f.1 <= tol && f.2 <= tol,
                "quantity {i}: {f:?} vs tolerance {tol:e}"
            );
            // At 40 steps per period the frequency is off by (ωΔt)²/12 = 2e-3 relative
            // (see the next test); amplitude and phase move by that times
            // |d ln Ĥ/d ln ω| ≲ r/δ ≈ 1.4 at r = 5 m (δ = 3.6 m in the formation), so
            // ≲ 3e-3; bound 5e-3.
            assert!(c.0 <= 5e-3, "quantity {i}: {c:?}");
        }
    }

    #[test]
    fn crank_nicolson_settles_to_the_harmonic_state_at_the_warped_frequency() {
        // Crank–Nicolson maps e^{iωt} to the frequency ω' = (2/Δt) tan(ωΔt/2) (its
        // z-transform is the bilinear transform; derived: put h^n = Ĥ z^n, z = e^{iωΔt},
        // into the step, (z−1)/(z+1) = i tan(ωΔt/2)). So its periodic state is exactly the
        // harmonic solution at ω': equal to round-off once the transient (e^{−69}, see
        // above) has gone. 1e-10 relative leaves room for 2400 steps of round-off.
        let (period, steps) = (2.0, 40);
        let m = composite(sine(1.0, period, 0.0), 10.0, 80);
        let (_, amp) = crank_nicolson(&m, steps, 30);
        let dt = period / steps as f64;
        let omega = 2.0 * PI / period;
        let warped = 2.0 / dt * (0.5 * omega * dt).tan();
        let mw = composite(sine(1.0, 2.0 * PI / warped, 0.0), 10.0, 80);
        let sol = solve(&mw, 1).unwrap();
        let scale = sol
            .amplitudes(1)
            .iter()
            .map(|a| a.abs())
            .fold(0.0, f64::max);
        for (j, (a, b)) in amp.iter().zip(sol.amplitudes(1)).enumerate() {
            assert!((*a - *b).abs() <= 1e-10 * scale, "node {j}: {a:?} vs {b:?}");
        }
    }

    fn square_table(period: f64) -> Drive {
        Drive::Table(TableDrive {
            times_s: vec![0.0, 0.1 * period, 0.5 * period, 0.5 * period, period],
            values: vec![0.2, 1.0, 1.0, -0.6, -0.6],
            quantity: TableQuantity::Head,
            repeat: true,
        })
    }

    /// Σ_k w_k Σ_j |Ĥ_{k,j}| (|M_k| |Ĥ_k|)_j over the cells, M_k = iω_k S + A with the well
    /// coupling: the size of the terms the energy identity sums, m⁴/s.
    fn identity_scale(sol: &PeriodicSolution) -> f64 {
        let (c, s) = (&sol.disc.conductance, &sol.disc.storage);
        let omega = 2.0 * PI / sol.period_s();
        (0..=sol.harmonics())
            .map(|k| {
                let h = sol.amplitudes(k);
                let w = if k == 0 { 1.0 } else { 0.5 };
                let n = h.len();
                let sum: f64 = (1..n)
                    .map(|j| {
                        let next = if j + 1 < n { h[j + 1].abs() } else { 0.0 };
                        let row = (c[j - 1] + c[j] + k as f64 * omega * s[j]) * h[j].abs()
                            + c[j - 1] * h[j - 1].abs()
                            + c[j] * next;
                        h[j].abs() * row
                    })
                    .sum();
                w * sum
            })
            .sum()
    }

    #[test]
    fn mean_power_in_equals_dissipation_by_zone() {
        // Exact for the discrete system (module doc), so only round-off separates the two.
        // The elimination of a diagonally dominant tridiagonal matrix is backward stable:
        // the computed Ĥ solves (M + δM) Ĥ = b with |δM| ≤ a few ε |M| (Higham, Accuracy
        // and Stability of Numerical Algorithms, 2nd ed., §9.5, from memory), so the
        // identity is off by at most ~ε Σ |Ĥ| |M| |Ĥ|, which is far above the power itself
        // where large conductances carry small drops (the pack). Bound: 16 ε × that sum.
        for (drive, k) in [(sine(1.5, 2.0, 0.4), 1), (square_table(4.0), 25)] {
            let m = composite(drive, 30.0, 200);
            let sol = solve(&m, k).unwrap();
            let p = sol.mean_dissipation_m4_s();
            let total: f64 = p.iter().sum();
            let power_in = sol.mean_power_in_m4_s();
            assert!(p.iter().all(|&z| z > 0.0), "every zone dissipates: {p:?}");
            let tol = 16.0 * f64::EPSILON * identity_scale(&sol);
            assert!(
                (power_in - total).abs() <= tol,
                "power in {power_in} vs dissipated {total}, tolerance {tol:e}"
            );
        }
    }

    #[test]
    fn series_and_pointwise_values_agree_with_the_drive() {
        let m = composite(sine(1.5, 2.0, 0.4), 10.0, 60);
        let sol = solve(&m, 3).unwrap();
        assert_eq!((sol.harmonics(), sol.period_s()), (1, 2.0));
        let s = sol.series(16);
        assert_eq!(s.time_s.len(), 16);
        for i in 0..16 {
            let t = s.time_s[i];
            assert_eq!(t, 2.0 * i as f64 / 16.0);
            // The well head is the drive's, to round-off of sin/cos.
            assert!((s.well_head_m[i] - m.drive.head_m(t)).abs() <= 1e-14);
            assert!((sol.head_m(0, t) - s.well_head_m[i]).abs() <= 1e-14);
            let q = sol.face_flow_m3_s(0, t);
            assert!((q - s.screen_flow_m3_s[i]).abs() <= 1e-14 * sol.flow_amplitude(0, 1).abs());
            // Flow is conductance × drop, positive outward.
            let drop = sol.head_m(0, t) - sol.head_m(1, t);
            assert!((q - sol.disc.conductance[0] * drop).abs() <= 1e-12 * q.abs().max(1e-6));
        }
        // The last face leads to h = 0 at R.
        let n = sol.disc.unknowns();
        let q_out = sol.face_flow_m3_s(n - 1, 0.3);
        assert!((q_out - sol.disc.conductance[n - 1] * sol.head_m(n - 1, 0.3)).abs() < 1e-18);
    }

    #[test]
    fn closed_outer_boundary_carries_no_flow() {
        let mut m = composite(square_table(4.0), 30.0, 100);
        m.formation.outer_boundary = OuterBoundary::NoFlow;
        let sol = solve(&m, 5).unwrap();
        let n = sol.disc.unknowns();
        assert_eq!(sol.face_flow_m3_s(n - 1, 1.0), 0.0);
        // With no outlet the mean head is the mean well head everywhere.
        let mean_well = sol.amplitudes(0)[0].re;
        for a in sol.amplitudes(0) {
            assert!((a.re - mean_well).abs() <= 1e-12);
        }
    }

    #[test]
    fn solve_captures_errors() {
        let base = composite(sine(1.0, 2.0, 0.0), 10.0, 60);
        let message = |m: &Model| solve(m, 1).unwrap_err().to_string();
        let mut m = base.clone();
        m.formation.medium.forchheimer_beta_s2_m2 = 1.35e4;
        assert_eq!(
            message(&m),
            "the harmonic method needs linear (Darcy) flow: the formation has a Forchheimer \
             coefficient of 13500 s²/m²; use time stepping"
        );
        let mut m = base.clone();
        m.well.discharge_coefficient = Some(0.6);
        assert_eq!(
            message(&m),
            "the harmonic method needs linear losses: the screen has an orifice entrance loss \
             (discharge coefficient 0.6); use time stepping"
        );
        let mut m = base.clone();
        m.cake.as_mut().unwrap().erosion = Some(Erosion {
            critical_shear_pa: 1.0,
            erodibility_m_s_pa: 1e-7,
            inward_weight: 1.0,
            outward_weight: 1.0,
            coverage_exponent: 0.0,
        });
        assert_eq!(
            message(&m),
            "the harmonic method needs face laws that do not change: the wall cake erodes \
             (erodibility 0.0000001 m/(s·Pa)); use time stepping"
        );
        let mut m = base.clone();
        m.drive = Drive::ConstantRate {
            pumping_rate_m3_s: 0.01,
        };
        assert_eq!(
            message(&m),
            "the harmonic method needs a periodic prescribed well head (a sine head, or a head \
             table that repeats); the drive is a constant pumping rate"
        );
        assert_eq!(
            solve(&base, 0).unwrap_err().to_string(),
            "the harmonic method needs at least one harmonic, got 0"
        );
        let mut m = base;
        m.pack.outer_radius_m = 0.05;
        assert!(matches!(
            solve(&m, 1),
            Err(HarmonicError::Solver(SolverError::InvalidInput { .. }))
        ));
    }
}
