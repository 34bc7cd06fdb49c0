//! The checked physical model the solver runs: SI units, every field set.
//!
//! The command line parses a case file into these types; the solver never sees JSON.
//! [`Model::validate`] checks every range once, with errors that name the case-file path.

use crate::drive::Drive;
use crate::error::SolverError;

/// Water properties used to turn gradients into pressures, power and shear.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fluid {
    /// Density ρ, kg/m³.
    pub density_kg_m3: f64,
    /// Dynamic viscosity μ, Pa·s.
    pub viscosity_pa_s: f64,
}

impl Fluid {
    /// Water at 20 °C (IAPWS-95 density and IAPWS 2008 viscosity, docs/physics.md §5.3).
    pub const WATER_20C: Fluid = Fluid {
        density_kg_m3: 998.207_150,
        viscosity_pa_s: 1.001_596_1e-3,
    };
}

/// A porous medium: one zone's hydraulic properties.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Medium {
    /// Hydraulic conductivity K, m/s.
    pub conductivity_m_s: f64,
    /// Specific storage Ss, 1/m.
    pub specific_storage_per_m: f64,
    /// Porosity n, –.
    pub porosity: f64,
    /// Forchheimer coefficient β in `-dh/dr = q/K + β q|q|`, s²/m². Zero for Darcy flow.
    pub forchheimer_beta_s2_m2: f64,
    /// Representative grain diameter (d50), m, when known. Used by the shear proxy.
    pub grain_diameter_m: Option<f64>,
}

impl Medium {
    /// A Darcy medium with the given K and Ss and porosity 0.3 (the case file's default
    /// formation porosity; common practice, no source), no grain size.
    pub fn darcy(conductivity_m_s: f64, specific_storage_per_m: f64) -> Self {
        Medium {
            conductivity_m_s,
            specific_storage_per_m,
            porosity: 0.3,
            forchheimer_beta_s2_m2: 0.0,
            grain_diameter_m: None,
        }
    }

    /// Hydraulic diffusivity D = K/Ss, m²/s.
    pub fn diffusivity_m2_s(&self) -> f64 {
        self.conductivity_m_s / self.specific_storage_per_m
    }
}

/// The well: screen, casing and the losses at the screen.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Well {
    /// Screen outer radius r_s (inner radius of the pack), m.
    pub screen_radius_m: f64,
    /// Screen length = thickness b of the layer that takes the flow, m.
    pub screen_length_m: f64,
    /// Open-area fraction of the screen A_o, –.
    pub open_area: f64,
    /// Radius of the casing where the water level moves, m.
    pub casing_radius_m: f64,
    /// Linear screen loss: head drop = coefficient × Darcy flux at r_s, s.
    pub linear_loss_s: f64,
    /// Orifice discharge coefficient Cd for the quadratic entrance loss; `None` = no
    /// entrance loss.
    pub discharge_coefficient: Option<f64>,
    /// Well-bore storage C = dV/dH, m². π r_c² for a free surface; may be 0 for a
    /// rate-controlled well without storage.
    pub storage_m2: f64,
    /// Effective length of the water column from the static level to the screen, L_e, m
    /// (docs/physics.md §24): its mass L_e ρ A_c, A_c = π r_c², makes the head that
    /// accelerates it, (L_e/g) dv/dt. Under a tool at depth d the column below the tool
    /// is L_e − d. 0: no column inertia (the quasi-static well of earlier versions).
    pub column_length_m: f64,
}

impl Well {
    /// Free-surface well-bore storage π r_c², m².
    pub fn free_surface_storage(casing_radius_m: f64) -> f64 {
        std::f64::consts::PI * casing_radius_m * casing_radius_m
    }
}

/// Filter pack in the annulus r_s … r_b.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Pack {
    /// Borehole radius r_b (outer radius of the pack, where the cake sits), m.
    pub outer_radius_m: f64,
    /// Pack properties.
    pub medium: Medium,
}

/// Erosion law of the wall cake (see [`crate::cake`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Erosion {
    /// Critical shear τ_c below which the cake does not erode, Pa.
    pub critical_shear_pa: f64,
    /// Erodibility: thinning rate per Pa of excess shear, m/(s·Pa).
    pub erodibility_m_s_pa: f64,
    /// Weight on the shear while flow goes inward (toward the well), –.
    pub inward_weight: f64,
    /// Weight on the shear while flow goes outward, –.
    pub outward_weight: f64,
    /// Exponent m of the coverage law c = c₀ (δ/δ₀)^m: 0 keeps the coverage until the cake
    /// is gone, 1 lets patches detach in proportion to the thickness lost.
    pub coverage_exponent: f64,
}

/// Wall cake left by the drilling fluid on the borehole wall at r_b.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Cake {
    /// Thickness δ_c, m.
    pub thickness_m: f64,
    /// Conductivity K_c, m/s.
    pub conductivity_m_s: f64,
    /// Fraction of the borehole face the cake covers, (0, 1].
    pub coverage: f64,
    /// Erosion law; `None` keeps the cake as given.
    pub erosion: Option<Erosion>,
    /// Lift-off of patches under an inward pressure difference; `None`: no lift-off.
    pub lift_off: Option<LiftOff>,
}

/// Lift-off of cake patches (docs/physics.md §13a): a patch fails when the inward pressure
/// difference across the cake exceeds its strength; strengths are log-normal.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LiftOff {
    /// Median lift-off pressure of the patches, Pa.
    pub median_pa: f64,
    /// Spread: standard deviation of the natural log of the patch strengths, –. 0 = every
    /// patch has the median strength.
    pub spread: f64,
    /// Radius of an opened patch (a hole in the cake), m: sets the constriction resistance
    /// of the flow toward the holes ([`crate::cake::interface_resistance`]).
    pub patch_radius_m: f64,
    /// No more patches fail: the cake's coverage is already what development left, and the
    /// opened patches keep their hole geometry (a snapshot of the well for tests run on it,
    /// [`crate::slow::SlowState::snapshot_model`]). `false` in a case.
    pub frozen: bool,
}

/// Mud fines held in the invaded zone and their transport (docs/physics.md §13b).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fines {
    /// Deposited fines at the start, volume per bulk volume σ₀, –.
    pub deposit: f64,
    /// Critical interstitial velocity v_c below which deposited fines stay put, m/s.
    pub critical_velocity_m_s: f64,
    /// Entrainment coefficient α_e, 1/m.
    pub entrainment_per_m: f64,
    /// Deposition (filtration) coefficient α_d, 1/m.
    pub deposition_per_m: f64,
    /// Density of the fines' solids, kg/m³ (turns volumes into masses).
    pub grain_density_kg_m3: f64,
}

/// Conductivity of the invaded zone ring by ring, from r_b outward (the zone as it stands
/// after some development; see [`crate::slow::SlowState::snapshot_model`]).
#[derive(Debug, Clone, PartialEq)]
pub struct RingProfile {
    /// Outer radius of each ring, m, increasing; the last is r_d, the first ring starts at r_b.
    pub outer_radius_m: Vec<f64>,
    /// Conductivity of each ring, m/s.
    pub conductivity_m_s: Vec<f64>,
}

impl RingProfile {
    /// Equivalent conductivity of the radii r₁ < r₂ (inside the zone) for steady radial flow:
    /// the rings in series, ln(r₂/r₁)/K = Σ ln(r_out/r_in)/K_ring over the overlaps.
    pub fn equivalent_conductivity(&self, r_b: f64, r1: f64, r2: f64) -> f64 {
        let mut inner = r_b;
        let mut sum = 0.0;
        for (&ro, &k) in self.outer_radius_m.iter().zip(&self.conductivity_m_s) {
            let (a, b) = (inner.max(r1), ro.min(r2));
            if b > a {
                sum += (b / a).ln() / k;
            }
            inner = ro;
        }
        if sum > 0.0 {
            (r2 / r1).ln() / sum
        } else {
            *self.conductivity_m_s.last().unwrap_or(&f64::NAN)
        }
    }
}

/// Zone of reduced conductivity just outside the borehole wall.
#[derive(Debug, Clone, PartialEq)]
pub struct Invaded {
    /// Radial thickness r_d − r_b, m.
    pub thickness_m: f64,
    /// Properties of the invaded zone (its conductivity as drilled).
    pub medium: Medium,
    /// Mud fines that flow can carry out; `None`: the zone stays as given.
    pub fines: Option<Fines>,
    /// Conductivity ring by ring when the zone is no longer uniform (a snapshot after
    /// development); `None`: uniform `medium.conductivity_m_s`.
    pub profile: Option<RingProfile>,
}

/// Condition at the outer radius R.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum OuterBoundary {
    /// h(R) = 0.
    FixedHead,
    /// dh/dr = 0 at R.
    NoFlow,
}

/// The aquifer beyond the borehole (and beyond the invaded zone).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Formation {
    /// Formation properties.
    pub medium: Medium,
    /// Outer model radius R, m; `None` = choose automatically ([`crate::grid::auto_outer_radius`]).
    pub outer_radius_m: Option<f64>,
    /// Outer boundary condition.
    pub outer_boundary: OuterBoundary,
}

/// How the radial grid is sized.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum GridSpec {
    /// Default resolution (see [`crate::grid`]).
    Auto,
    /// About this many cells in all, shared by zone in proportion to ln(r_out/r_in).
    Total(usize),
    /// This many cells per decade of radius in every zone (with per-zone minimums).
    PerDecade(f64),
}

/// How time steps are chosen.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum TimeSpec {
    /// Periodic drives: `steps_per_cycle` steps per period; others: geometric steps.
    Auto,
    /// This many steps per period of the drive (periodic drives only).
    StepsPerCycle(usize),
    /// Geometric steps growing by 10^(1/n) from `first_step_s` (non-periodic drives).
    StepsPerDecade {
        /// Steps per decade of time.
        per_decade: f64,
        /// Length of the first step, s.
        first_step_s: f64,
    },
    /// Constant step, s.
    Fixed(f64),
}

/// Numerical settings.
#[derive(Debug, Clone, PartialEq)]
pub struct Numerics {
    /// Grid resolution.
    pub grid: GridSpec,
    /// Time-step choice.
    pub time: TimeSpec,
    /// θ of the θ-scheme: 0.5 = Crank–Nicolson, 1 = backward Euler.
    pub theta: f64,
    /// Number of full steps replaced by two backward-Euler half steps each after every
    /// discontinuity of the forcing (Rannacher 1984).
    pub startup_steps: usize,
    /// Relative residual at which the Newton iteration stops.
    pub newton_tolerance: f64,
    /// Maximum Newton iterations per step.
    pub newton_max_iterations: usize,
    /// Times the stepper must land on exactly (outputs, sampling), s.
    pub sync_times_s: Vec<f64>,
    /// Time integration scheme.
    pub scheme: Scheme,
    /// Cycle jumping over the slow state of a periodic drive (docs/time-stepping.md
    /// §Multiscale stepping).
    pub multiscale: Multiscale,
}

/// Cycle jumping (envelope following) for periodic drives (docs/time-stepping.md
/// §Multiscale stepping).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub enum Multiscale {
    /// Every cycle is stepped in full (the reference).
    #[default]
    Off,
    /// Jump over cycles while the sampled state changes smoothly from cycle to cycle.
    Auto {
        /// Extrapolation error allowed per jump, relative to each sampled quantity's scale, –.
        tolerance: f64,
    },
}

/// Default tolerance of `numerics.multiscale` (docs/time-stepping.md §Multiscale stepping).
pub const DEFAULT_MULTISCALE_TOLERANCE: f64 = 1e-4;

/// Time integration scheme (docs/time-stepping.md).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Scheme {
    /// L-stable TR-BDF2 with steps chosen from its local error estimate, bounded above by
    /// the nominal step of `time` (the default).
    TrBdf2 {
        /// Relative tolerance on heads, –.
        relative: f64,
        /// Absolute tolerance on heads, m.
        absolute_m: f64,
    },
    /// The θ-scheme with the nominal steps of `time` and backward-Euler start-up after jumps
    /// (`theta`, `startup_steps`).
    Theta,
}

/// Default relative tolerance of the adaptive scheme (docs/time-stepping.md §Defaults).
pub const DEFAULT_RELATIVE_TOLERANCE: f64 = 1e-3;
/// Default absolute tolerance of the adaptive scheme, m (docs/time-stepping.md §Defaults).
pub const DEFAULT_ABSOLUTE_TOLERANCE_M: f64 = 1e-3;

impl Default for Scheme {
    fn default() -> Self {
        Scheme::TrBdf2 {
            relative: DEFAULT_RELATIVE_TOLERANCE,
            absolute_m: DEFAULT_ABSOLUTE_TOLERANCE_M,
        }
    }
}

impl Default for Numerics {
    fn default() -> Self {
        Numerics {
            grid: GridSpec::Auto,
            time: TimeSpec::Auto,
            theta: 0.5,
            startup_steps: 2,
            newton_tolerance: 5e-11,
            newton_max_iterations: 30,
            sync_times_s: Vec::new(),
            scheme: Scheme::default(),
            multiscale: Multiscale::Off,
        }
    }
}

/// A complete, checked model in SI units.
#[derive(Debug, Clone, PartialEq)]
pub struct Model {
    /// Water properties.
    pub fluid: Fluid,
    /// Well and screen.
    pub well: Well,
    /// Filter pack.
    pub pack: Pack,
    /// Wall cake, if any.
    pub cake: Option<Cake>,
    /// Invaded zone, if any.
    pub invaded: Option<Invaded>,
    /// Formation.
    pub formation: Formation,
    /// What drives the flow.
    pub drive: Drive,
    /// Simulated duration, s.
    pub duration_s: f64,
    /// Numerical settings.
    pub numerics: Numerics,
}

/// Ok when `v` is positive and finite, else the error naming `field`.
pub(crate) fn positive(field: &str, v: f64) -> Result<(), SolverError> {
    if v.is_finite() && v > 0.0 {
        Ok(())
    } else {
        Err(SolverError::invalid(
            field,
            format!("must be a positive finite number, got {v}"),
        ))
    }
}

fn non_negative(field: &str, v: f64) -> Result<(), SolverError> {
    if v.is_finite() && v >= 0.0 {
        Ok(())
    } else {
        Err(SolverError::invalid(
            field,
            format!("must be zero or positive, got {v}"),
        ))
    }
}

fn fraction_open(field: &str, v: f64) -> Result<(), SolverError> {
    if v.is_finite() && v > 0.0 && v < 1.0 {
        Ok(())
    } else {
        Err(SolverError::invalid(
            field,
            format!("must be between 0 and 1 (exclusive), got {v}"),
        ))
    }
}

fn check_medium(zone: &str, m: &Medium) -> Result<(), SolverError> {
    positive(&format!("{zone}.conductivity"), m.conductivity_m_s)?;
    positive(
        &format!("{zone}.specific_storage"),
        m.specific_storage_per_m,
    )?;
    fraction_open(&format!("{zone}.porosity"), m.porosity)?;
    non_negative(
        &format!("{zone}.forchheimer_beta"),
        m.forchheimer_beta_s2_m2,
    )?;
    if let Some(d) = m.grain_diameter_m {
        positive(&format!("{zone}.d50"), d)?;
    }
    Ok(())
}

impl Model {
    /// Borehole radius r_b, m.
    pub fn borehole_radius_m(&self) -> f64 {
        self.pack.outer_radius_m
    }

    /// Outer radius of the invaded zone r_d (= r_b without one), m.
    pub fn invaded_outer_radius_m(&self) -> f64 {
        self.pack.outer_radius_m + self.invaded.as_ref().map_or(0.0, |z| z.thickness_m)
    }

    /// Checks every range once. Errors name the case-file path of the bad value.
    pub fn validate(&self) -> Result<(), SolverError> {
        positive("fluid.density", self.fluid.density_kg_m3)?;
        positive("fluid.viscosity", self.fluid.viscosity_pa_s)?;
        let w = &self.well;
        positive("well.screen_radius", w.screen_radius_m)?;
        positive("well.screen_length", w.screen_length_m)?;
        if !(w.open_area.is_finite() && w.open_area > 0.0 && w.open_area <= 1.0) {
            return Err(SolverError::invalid(
                "well.open_area",
                format!("must be in (0, 1], got {}", w.open_area),
            ));
        }
        positive("well.casing_radius", w.casing_radius_m)?;
        non_negative("well.screen_loss", w.linear_loss_s)?;
        non_negative("well.storage", w.storage_m2)?;
        non_negative("well.column_length", w.column_length_m)?;
        if let Some(cd) = w.discharge_coefficient {
            if !(cd.is_finite() && cd > 0.0 && cd <= 1.0) {
                return Err(SolverError::invalid(
                    "well.discharge_coefficient",
                    format!("must be in (0, 1], got {cd}"),
                ));
            }
        }
        positive("pack.outer_radius", self.pack.outer_radius_m)?;
        if self.pack.outer_radius_m <= w.screen_radius_m {
            return Err(SolverError::invalid(
                "pack.outer_radius",
                format!(
                    "must be larger than well.screen_radius ({} m), got {} m",
                    w.screen_radius_m, self.pack.outer_radius_m
                ),
            ));
        }
        check_medium("pack", &self.pack.medium)?;
        if let Some(c) = &self.cake {
            positive("cake.thickness", c.thickness_m)?;
            positive("cake.conductivity", c.conductivity_m_s)?;
            let annulus = self.pack.outer_radius_m - w.screen_radius_m;
            if c.thickness_m >= annulus {
                return Err(SolverError::invalid(
                    "cake.thickness",
                    format!(
                        "must be thinner than the annulus ({annulus} m), got {} m",
                        c.thickness_m
                    ),
                ));
            }
            if !(c.coverage.is_finite() && c.coverage > 0.0 && c.coverage <= 1.0) {
                return Err(SolverError::invalid(
                    "cake.coverage",
                    format!("must be in (0, 1], got {}", c.coverage),
                ));
            }
            if let Some(l) = &c.lift_off {
                positive("cake.lift_off.median", l.median_pa)?;
                non_negative("cake.lift_off.spread", l.spread)?;
                positive("cake.lift_off.patch_radius", l.patch_radius_m)?;
            }
            if let Some(e) = &c.erosion {
                non_negative("cake.erosion.critical_shear", e.critical_shear_pa)?;
                non_negative("cake.erosion.erodibility", e.erodibility_m_s_pa)?;
                non_negative("cake.erosion.inward_weight", e.inward_weight)?;
                non_negative("cake.erosion.outward_weight", e.outward_weight)?;
                non_negative("cake.erosion.coverage_exponent", e.coverage_exponent)?;
            }
        }
        if let Some(z) = &self.invaded {
            positive("invaded.thickness", z.thickness_m)?;
            check_medium("invaded", &z.medium)?;
            if let Some(f) = &z.fines {
                fraction_open("invaded.fines.deposit", f.deposit)?;
                if f.deposit >= z.medium.porosity {
                    return Err(SolverError::invalid(
                        "invaded.fines.deposit",
                        format!(
                            "must be below the zone's porosity ({}), got {}",
                            z.medium.porosity, f.deposit
                        ),
                    ));
                }
                non_negative("invaded.fines.critical_velocity", f.critical_velocity_m_s)?;
                non_negative("invaded.fines.entrainment", f.entrainment_per_m)?;
                non_negative("invaded.fines.deposition", f.deposition_per_m)?;
                positive("invaded.fines.grain_density", f.grain_density_kg_m3)?;
            }
            if let Some(p) = &z.profile {
                let ok = !p.outer_radius_m.is_empty()
                    && p.outer_radius_m.len() == p.conductivity_m_s.len()
                    && p.conductivity_m_s.iter().all(|k| k.is_finite() && *k > 0.0)
                    && p.outer_radius_m.windows(2).all(|w| w[1] > w[0])
                    && p.outer_radius_m[0] > self.pack.outer_radius_m;
                if !ok {
                    return Err(SolverError::invalid(
                        "invaded.profile",
                        "needs increasing ring radii beyond the wall and a positive \
                         conductivity for each ring",
                    ));
                }
            }
        }
        check_medium("formation", &self.formation.medium)?;
        if let Some(r) = self.formation.outer_radius_m {
            positive("formation.outer_radius", r)?;
            let inner = self.invaded_outer_radius_m();
            if r <= inner * 1.01 {
                return Err(SolverError::invalid(
                    "formation.outer_radius",
                    format!(
                        "must be well beyond the borehole and invaded zone ({inner} m), got {r} m"
                    ),
                ));
            }
        }
        positive("duration", self.duration_s)?;
        self.drive.validate()?;
        let n = &self.numerics;
        if !(n.theta.is_finite() && (0.5..=1.0).contains(&n.theta)) {
            return Err(SolverError::invalid(
                "numerics.theta",
                format!(
                    "must be in [0.5, 1] for an unconditionally stable scheme, got {}",
                    n.theta
                ),
            ));
        }
        if let Scheme::TrBdf2 {
            relative,
            absolute_m,
        } = n.scheme
        {
            if !(relative.is_finite() && relative > 0.0 && relative < 1.0) {
                return Err(SolverError::invalid(
                    "numerics.relative_tolerance",
                    format!("must be in (0, 1), got {relative}"),
                ));
            }
            positive("numerics.absolute_tolerance", absolute_m)?;
        }
        match n.grid {
            GridSpec::Total(c) if c < 10 => {
                return Err(SolverError::invalid(
                    "numerics.cells",
                    format!("must be at least 10, got {c}"),
                ))
            }
            GridSpec::PerDecade(d) if !(d.is_finite() && d >= 1.0) => {
                return Err(SolverError::invalid(
                    "numerics.cells_per_decade",
                    format!("must be at least 1, got {d}"),
                ))
            }
            _ => {}
        }
        match n.time {
            TimeSpec::StepsPerCycle(s) if s < 4 => {
                return Err(SolverError::invalid(
                    "numerics.steps_per_cycle",
                    format!("must be at least 4, got {s}"),
                ))
            }
            TimeSpec::StepsPerDecade {
                per_decade,
                first_step_s,
            } => {
                positive("numerics.steps_per_decade", per_decade)?;
                positive("numerics.first_step", first_step_s)?;
            }
            TimeSpec::Fixed(dt) => {
                positive("numerics.time_step", dt)?;
                if dt > self.duration_s {
                    return Err(SolverError::invalid(
                        "duration",
                        format!(
                            "is shorter than one time step ({dt} s), got {} s",
                            self.duration_s
                        ),
                    ));
                }
            }
            _ => {}
        }
        if let Some(p) = self.drive.period_s() {
            let spc = match n.time {
                TimeSpec::StepsPerCycle(s) => s as f64,
                _ => 1.0,
            };
            if self.duration_s < p / spc {
                return Err(SolverError::invalid(
                    "duration",
                    format!(
                        "is shorter than one time step ({} s), got {} s",
                        p / spc,
                        self.duration_s
                    ),
                ));
            }
        }
        positive("numerics.newton_tolerance", n.newton_tolerance)?;
        crate::limits::check(self)
    }
}
