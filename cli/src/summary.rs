//! Headline figures of a run: what the summary table, `--json`, the HDF5 `/summary` group
//! and the report show. Derived from the solver's run summary, the case and a tracker of
//! per-step extremes; pure computation, no I/O.

use crate::case::LoadedCase;
use crate::units::{FT_M, PSI_PA, US_GAL_M3};
use boreflux_solver::grid::{Zone, ZONE_COUNT};
use boreflux_solver::model::Model;
use boreflux_solver::safety::{self, ENTRANCE_VELOCITY_RULE_M_S};
use boreflux_solver::skin::{efficiency, thiem_specific_capacity};
use boreflux_solver::water::GRAVITY_M_S2;
use boreflux_solver::{RunSummary, StepObserver, StepView};
use serde::Serialize;

/// Grain Reynolds number above which Darcy's law is doubtful (docs/physics.md §4.4, Bear 1972;
/// from memory — verify).
pub const REYNOLDS_SOFT_LIMIT: f64 = 1.0;
/// Grain Reynolds number above which the warning is strong.
pub const REYNOLDS_HARD_LIMIT: f64 = 10.0;

/// Definition of the efficiency reported (docs/physics.md §2.4).
pub const EFFICIENCY_DEFINITION: &str = "steady-state efficiency E = ln(R/r_s) / (ln(R/r_s) + s), \
ideal formation drawdown over actual drawdown at the screen, screen losses excluded; R is the \
model's outer radius (Thiem with Hawkins skin)";

/// A number shown with N significant digits: fixed notation between 1e-3 and 1e5,
/// scientific outside ([`crate::sigfig`]).
pub struct G(pub f64, pub usize);

impl std::fmt::Display for G {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&crate::sigfig::text(self.0, self.1))
    }
}

/// Per-step extremes the solver summary does not keep.
#[derive(Debug, Clone, Default)]
pub struct Tracker {
    cake0: f64,
    /// First time the cake was down to half its thickness, s.
    pub half_cake_s: Option<f64>,
    /// First time the cake was down to a tenth of its thickness, s.
    pub tenth_cake_s: Option<f64>,
    /// Largest |face gradient| on the formation side.
    pub peak_face_gradient: f64,
    /// Largest direction-weighted shear (what the erosion law compares with τ_c), Pa.
    pub peak_weighted_shear_pa: f64,
    weights: Option<(f64, f64)>,
}

impl Tracker {
    /// A tracker for the case's cake.
    pub fn new(model: &Model) -> Self {
        Tracker {
            cake0: model.cake.map_or(0.0, |c| c.thickness_m),
            weights: model
                .cake
                .and_then(|c| c.erosion)
                .map(|e| (e.inward_weight, e.outward_weight)),
            ..Default::default()
        }
    }
}

impl StepObserver for Tracker {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        if self.cake0 > 0.0 {
            if self.half_cake_s.is_none() && s.cake_thickness_m <= 0.5 * self.cake0 {
                self.half_cake_s = Some(s.time_s);
            }
            if self.tenth_cake_s.is_none() && s.cake_thickness_m <= 0.1 * self.cake0 {
                self.tenth_cake_s = Some(s.time_s);
            }
        }
        self.peak_face_gradient = self.peak_face_gradient.max(s.face_gradient.abs());
        if let Some((w_in, w_out)) = self.weights {
            let w = if s.face_flux_m_s < 0.0 { w_in } else { w_out };
            self.peak_weighted_shear_pa = self.peak_weighted_shear_pa.max(w * s.shear_proxy_pa);
        }
        true
    }
}

/// Headline figures of one run (SI units, named in the field).
#[derive(Debug, Clone, Serialize)]
pub struct Headline {
    /// Case title.
    pub title: String,
    /// Steps taken.
    pub steps: u64,
    /// Complete cycles.
    pub cycles: u64,
    /// Grid cells.
    pub cells: usize,
    /// Outer radius, m.
    pub outer_radius_m: f64,
    /// End time, s.
    pub end_time_s: f64,
    /// Largest outward face flux, m/s.
    pub peak_outward_flux_m_s: f64,
    /// Largest inward face flux, m/s.
    pub peak_inward_flux_m_s: f64,
    /// Largest outward pore velocity at the wall, m/s.
    pub peak_outward_pore_velocity_m_s: f64,
    /// Largest inward pore velocity at the wall, m/s.
    pub peak_inward_pore_velocity_m_s: f64,
    /// RMS face flux, m/s.
    pub rms_face_flux_m_s: f64,
    /// Largest flow through the screen (magnitude), m³/s.
    pub peak_screen_flow_m3_s: f64,
    /// Largest shear proxy at the wall, Pa.
    pub peak_shear_pa: f64,
    /// Work dissipated per zone, J.
    pub work_j: [f64; ZONE_COUNT],
    /// Zone names in the order of `work_j`.
    pub zones: [&'static str; ZONE_COUNT],
    /// Cake thickness at start and end, m.
    pub cake_thickness_start_m: f64,
    /// Cake thickness at the end, m.
    pub cake_thickness_end_m: f64,
    /// Time until half the cake was gone, s.
    pub time_to_half_cake_s: Option<f64>,
    /// Time until 90 % of the cake was gone, s.
    pub time_to_90pct_cake_s: Option<f64>,
    /// Cycles of a periodic drive until half the cake was gone.
    pub cycles_to_half_cake: Option<f64>,
    /// Cycles of a periodic drive until 90 % of the cake was gone.
    pub cycles_to_90pct_cake: Option<f64>,
    /// Skin at the start.
    pub skin_start: f64,
    /// Skin at the end.
    pub skin_end: f64,
    /// Efficiency at the start (see `efficiency_definition`).
    pub efficiency_start: f64,
    /// Efficiency at the end.
    pub efficiency_end: f64,
    /// Predicted specific capacity at the start, m²/s.
    pub specific_capacity_start_m2_s: f64,
    /// Predicted specific capacity at the end, m²/s.
    pub specific_capacity_end_m2_s: f64,
    /// Definition of the efficiency.
    pub efficiency_definition: &'static str,
    /// Largest slot velocity, m/s.
    pub peak_slot_velocity_m_s: f64,
    /// Largest grain Reynolds number at the wall (pack side, pack d50), when d50 is known.
    pub peak_grain_reynolds: Option<f64>,
    /// Largest gradient on the formation side of the wall over Terzaghi's critical gradient.
    pub piping_ratio: Option<f64>,
    /// Largest collapse load, Pa: the larger of the differential across the screen and the
    /// in-well drawdown against static formation pressure.
    pub peak_collapse_pressure_pa: f64,
    /// Largest differential pushing the screen inward (pack side over inside), Pa.
    pub peak_screen_differential_pa: f64,
    /// Largest in-well drawdown below the static level, m.
    pub peak_in_well_drawdown_m: f64,
    /// Largest differential pressure pushing the screen outward, Pa.
    pub peak_burst_pressure_pa: f64,
    /// Rated or computed collapse pressure of the blank casing, Pa.
    pub collapse_rating_pa: Option<f64>,
    /// Rated (or explicitly derated) collapse pressure of the screen, Pa.
    pub screen_collapse_rating_pa: Option<f64>,
    /// How the collapse ratings were found.
    pub collapse_rating_basis: String,
    /// The lower of the screen and casing margins; below 1 is a warning.
    pub collapse_margin: Option<f64>,
    /// Screen rating / (safety factor × peak load on the screen).
    pub screen_collapse_margin: Option<f64>,
    /// Casing rating / (safety factor × peak in-well drawdown pressure).
    pub casing_collapse_margin: Option<f64>,
    /// Times the water column under a sealed tool parted at the vapour bound.
    pub column_partings: u64,
    /// Time the column spent parted, s.
    pub parted_time_s: f64,
    /// Largest per-step volume residual.
    pub max_mass_residual: f64,
    /// Energy identity over the run.
    pub energy_closure: f64,
    /// Most Newton iterations in a step.
    pub max_newton_iterations: usize,
    /// Warnings.
    pub warnings: Vec<String>,
}

/// Collapse ratings of the blank casing and of the screen, and how they were found.
#[derive(Debug, Clone, PartialEq)]
pub struct CollapseRatings {
    /// Blank pipe (casing): the manufacturer's rating, or the lower of elastic buckling and
    /// first yield from the dimension ratio and the material, Pa.
    pub casing_pa: Option<f64>,
    /// Screen: its manufacturer's rating, or the casing value × `slot_derating`, or the
    /// casing's manufacturer rating, Pa.
    pub screen_pa: Option<f64>,
    /// Computed limits when the casing value is computed.
    pub limits: Option<safety::CollapseLimits>,
    /// One line on how the ratings were found (for `check` and the report).
    pub how: String,
}

/// Material constants for the collapse check: the built-in ones for pvc, steel and
/// stainless, each replaced by the case's value where given.
fn pipe_material(s: &crate::case::SafetyInputs) -> Option<safety::PipeMaterial> {
    let base = match s.material.as_deref() {
        Some("pvc") => Some(safety::PVC),
        Some("steel") => Some(safety::STEEL),
        Some("stainless") => Some(safety::STAINLESS),
        _ => None,
    };
    Some(safety::PipeMaterial {
        youngs_modulus_pa: s.youngs_modulus_pa.or(base.map(|b| b.youngs_modulus_pa))?,
        poisson: s.poisson_ratio.or(base.map(|b| b.poisson))?,
        yield_strength_pa: s.yield_strength_pa.or(base.map(|b| b.yield_strength_pa))?,
        thermoplastic: base.is_some_and(|b| b.thermoplastic),
    })
}

/// Collapse ratings of casing and screen (docs/devices.md, collapse): the manufacturer's
/// ratings when given, otherwise the lower of the elastic (thin-ring) and yield (Lamé)
/// limits at the pipe temperature `temp_c` (thermoplastics derated above 23 °C); a slotted
/// screen gets a computed value only with an explicit `slot_derating`.
pub fn collapse_ratings(s: &crate::case::SafetyInputs, temp_c: f64) -> CollapseRatings {
    let mut limits = None;
    let mut how = Vec::new();
    let casing = match s.collapse_rating_pa {
        Some(r) => {
            how.push("casing: manufacturer's rating as given".to_owned());
            Some(r)
        }
        None => match (s.dimension_ratio, pipe_material(s)) {
            (Some(dr), Some(m)) => {
                let l = safety::collapse_pressure_pa(&m, dr, temp_c);
                how.push(format!(
                    "casing: lower of elastic buckling {} kPa (thin ring) and first yield {} kPa \
                     (Lamé) at DR {dr}{}; no safety factor in it",
                    G(l.elastic_pa / 1e3, 4),
                    G(l.yield_pa / 1e3, 4),
                    if m.thermoplastic {
                        format!(
                            ", thermoplastic derated ×{} at {} °C",
                            G(l.temperature_factor, 3),
                            G(temp_c, 3)
                        )
                    } else {
                        String::new()
                    }
                ));
                limits = Some(l);
                Some(l.governing_pa())
            }
            _ => None,
        },
    };
    let screen = match (s.screen_collapse_rating_pa, s.slot_derating) {
        (Some(r), _) => {
            how.push("screen: manufacturer's screen rating as given".to_owned());
            Some(r)
        }
        (None, Some(f)) => {
            how.push(format!("screen: casing value × slot_derating {f}"));
            casing.map(|c| c * f)
        }
        (None, None) if s.collapse_rating_pa.is_some() => {
            how.push("screen: the given collapse_rating (no separate screen rating)".to_owned());
            casing
        }
        (None, None) => {
            if casing.is_some() {
                how.push(
                    "screen: no rating computed: slotted or wire-wrap screen is weaker than \
                     blank pipe by an amount only its maker can state; enter \
                     well.screen_collapse_rating (or an explicit well.slot_derating)"
                        .to_owned(),
                );
            }
            None
        }
    };
    CollapseRatings {
        casing_pa: casing,
        screen_pa: screen,
        limits,
        how: how.join("; "),
    }
}

/// Pipe temperature of a case for the collapse check, °C: the water temperature (grout
/// heat of hydration can make the pipe warmer; give a lower rating then).
pub fn pipe_temperature_c(case: &LoadedCase) -> f64 {
    case.resolved
        .pointer("/fluid/temperature")
        .and_then(serde_json::Value::as_f64)
        .map_or(15.0, |t_k| t_k - 273.15)
}

/// The remedy for a collapse load, naming what drives it: the device and, when the water
/// column parted, the vapour-bound suction (set by the tool's depth, not its speed).
fn collapse_cause(drive: &boreflux_solver::Drive, s: &RunSummary) -> String {
    use boreflux_solver::Drive;
    let kinds = |d: &Drive| -> Vec<&'static str> {
        match d {
            Drive::SurgeBlock(_) => vec!["surge block"],
            Drive::Swab(_) => vec!["swab"],
            Drive::PumpBackwash(_) | Drive::ConstantRate { .. } | Drive::Table(_) => {
                vec!["pump"]
            }
            Drive::JetPulse(_) => vec!["jet"],
            Drive::Schedule(st) => st
                .iter()
                .flat_map(|x| match &x.drive {
                    Drive::SurgeBlock(_) => Some("surge block"),
                    Drive::Swab(_) => Some("swab"),
                    Drive::PumpBackwash(_) | Drive::ConstantRate { .. } => Some("pump"),
                    Drive::JetPulse(_) => Some("jet"),
                    Drive::SineHead(_)
                    | Drive::Slug { .. }
                    | Drive::Table(_)
                    | Drive::Schedule(_) => None,
                })
                .collect(),
            Drive::SineHead(_) | Drive::Slug { .. } => vec![],
        }
    };
    let mut k = kinds(drive);
    k.dedup();
    let mut parts = Vec::new();
    if s.column_partings > 0 {
        parts.push(
            "the water column under the tool parted at the vapour limit, so the load is set by \
             the tool's depth below the static level, not by its speed: work the tool \
             shallower, or use a vented block or a smaller stroke so the formation keeps up"
                .to_owned(),
        );
    }
    for kind in k {
        parts.push(match kind {
            "surge block" => "surge block: reduce the stroke or stroke rate, vent the block, \
                              and establish free flow through the screen first"
                .to_owned(),
            "swab" => "swab: lift more slowly; sealed cups pull the column below them down \
                       to the vapour limit, which deeper cups make larger"
                .to_owned(),
            "pump" => "pump: pump at a lower rate or set the intake shallower (the level \
                       cannot fall below the intake)"
                .to_owned(),
            _ => "jet: lower the nozzle velocity or the pump rate".to_owned(),
        });
    }
    if parts.is_empty() {
        "reduce the drive".to_owned()
    } else {
        parts.join("; ")
    }
}

/// Warnings of pump-and-backwash drives: a broken suction (the level reached the intake)
/// and a back-flow too small to reverse the flow at the wall. Each names its driver; a
/// deeper intake is suggested only when no collapse risk was found.
fn pump_warnings(
    drive: &boreflux_solver::Drive,
    s: &RunSummary,
    collapse_risk: bool,
) -> Vec<String> {
    use boreflux_solver::Drive;
    let pumps: Vec<_> = match drive {
        Drive::PumpBackwash(p) => vec![*p],
        Drive::Schedule(st) => st
            .iter()
            .filter_map(|x| match &x.drive {
                Drive::PumpBackwash(p) => Some(*p),
                Drive::SineHead(_)
                | Drive::ConstantRate { .. }
                | Drive::Slug { .. }
                | Drive::Table(_)
                | Drive::SurgeBlock(_)
                | Drive::Swab(_)
                | Drive::JetPulse(_)
                | Drive::Schedule(_) => None,
            })
            .collect(),
        Drive::SineHead(_)
        | Drive::ConstantRate { .. }
        | Drive::Slug { .. }
        | Drive::Table(_)
        | Drive::SurgeBlock(_)
        | Drive::Swab(_)
        | Drive::JetPulse(_) => vec![],
    };
    let mut out = Vec::new();
    for p in pumps {
        if p.suction_broken(s.well_head_range_m.0) {
            out.push(format!(
                "the pump broke suction: the level reached its intake {:.1} m below the static \
                 level, so the drawdown was capped there and the pump delivered only what the \
                 formation supplied; pump at a lower rate{}",
                p.intake_depth_m,
                if collapse_risk {
                    ""
                } else {
                    " (or, where the screen and casing ratings allow the deeper drawdown, set \
                     the intake deeper)"
                }
            ));
        }
    }
    // Only when pump-and-backwash is the whole drive: a schedule's other stages may
    // reverse the flow on their own.
    if matches!(drive, Drive::PumpBackwash(_)) && s.peak_outward_flux_m_s <= 0.0 {
        out.push(
            "the back-flow never reversed the flow at the borehole wall: the water draining \
             back at each stop was less than the formation's inflow while the well recovered, \
             so this pump-and-backwash worked one way only (development needs flow both ways); \
             a longer riser column, a faster drain or a shorter on-time gives more back-flow"
                .to_owned(),
        );
    }
    out
}

/// Computes the headline figures and the warnings.
pub fn headline(case: &LoadedCase, s: &RunSummary, t: &Tracker) -> Headline {
    let m = &case.model;
    let rho_g = m.fluid.density_kg_m3 * GRAVITY_M_S2;
    let rs = m.well.screen_radius_m;
    let b = m.well.screen_length_m;
    let r_out = s.outer_radius_m;
    let transmissivity = m.formation.medium.conductivity_m_s * b;
    let n_pack = m.pack.medium.porosity;
    let mut warnings = case.warnings.clone();
    warnings.extend(s.warnings.iter().cloned());
    let slot = s.peak_screen_flow_m3_s / (2.0 * std::f64::consts::PI * rs * b * m.well.open_area);
    if slot > ENTRANCE_VELOCITY_RULE_M_S {
        warnings.push(format!(
            "peak slot velocity {slot:.3} m/s exceeds the common 0.03 m/s (0.1 ft/s) rule of thumb; a rule of thumb, not a limit"
        ));
    }
    let peak_q = s.peak_outward_flux_m_s.max(s.peak_inward_flux_m_s);
    let reynolds = m
        .pack
        .medium
        .grain_diameter_m
        .map(|d| m.fluid.density_kg_m3 * peak_q * d / m.fluid.viscosity_pa_s);
    if let Some(re) = reynolds {
        if re > REYNOLDS_HARD_LIMIT {
            warnings.push(format!("grain Reynolds number at the wall reaches {re:.1} (> 10): flow is well outside the Darcy range; non-Darcy losses dominate"));
        } else if re > REYNOLDS_SOFT_LIMIT {
            warnings.push(format!("grain Reynolds number at the wall reaches {re:.2} (> 1): Darcy's law is doubtful there"));
        }
    }
    let outer = m.invaded.map_or(m.formation.medium, |z| z.medium);
    let piping = (t.peak_face_gradient > 0.0).then(|| {
        t.peak_face_gradient
            / safety::terzaghi_critical_gradient(
                case.safety.formation_specific_gravity,
                outer.porosity,
            )
    });
    if let Some(p) = piping.filter(|&p| p > 1.0) {
        warnings.push(format!("gradient at the borehole wall reaches {p:.2} × Terzaghi's critical gradient: grains there may be mobilised (an indicator for horizontal flow, not a heave criterion)"));
    }
    // Collapse load: the larger of the differential across the screen (pack side over
    // inside) and the in-well drawdown below static, which loads the blank casing against
    // the formation's undisturbed pore pressure.
    let drawdown_m = (-s.well_head_range_m.0).max(0.0);
    let collapse_pa = s.peak_collapse_head_m.max(drawdown_m) * rho_g;
    let sf = case.safety.safety_factor;
    let ratings = collapse_ratings(&case.safety, pipe_temperature_c(case));
    let screen_pa = collapse_pa;
    let casing_pa = drawdown_m * rho_g;
    let margin_of = |r: Option<f64>, load: f64| r.filter(|_| load > 0.0).map(|r| r / (sf * load));
    let casing_margin = margin_of(ratings.casing_pa, casing_pa);
    let screen_margin = margin_of(ratings.screen_pa, screen_pa);
    let margin = match (casing_margin, screen_margin) {
        (Some(a), Some(b)) => Some(a.min(b)),
        (a, b) => a.or(b),
    };
    let cause = collapse_cause(&m.drive, s);
    for (what, r, load, mg) in [
        ("screen", ratings.screen_pa, screen_pa, screen_margin),
        ("blank casing", ratings.casing_pa, casing_pa, casing_margin),
    ] {
        if let (Some(r), Some(mg)) = (r, mg) {
            if mg < 1.0 {
                warnings.push(format!(
                    "COLLAPSE RISK ({what}): peak inward differential pressure {:.0} kPa exceeds \
                     its collapse rating {:.0} kPa divided by the safety factor {sf}; {cause}; \
                     check the manufacturer's rating and the local well code",
                    load / 1e3,
                    r / 1e3
                ));
            }
        }
    }
    if ratings.screen_pa.is_none() && ratings.casing_pa.is_some() && screen_pa > 0.0 {
        warnings.push(format!(
            "the screen has no collapse rating (peak load on it {:.0} kPa): enter the \
             manufacturer's screen rating as well.screen_collapse_rating; slotted screen is \
             weaker than the blank casing's computed {:.0} kPa",
            screen_pa / 1e3,
            ratings.casing_pa.unwrap_or(0.0) / 1e3
        ));
    }
    let collapse_risk = warnings.iter().any(|w| w.starts_with("COLLAPSE RISK"));
    warnings.extend(pump_warnings(&m.drive, s, collapse_risk));
    if let Some(c) = &m.cake {
        if let Some(e) = &c.erosion {
            if s.cake_thickness_m.1 >= s.cake_thickness_m.0 {
                warnings.push(format!("the cake was not eroded: the largest direction-weighted shear {} Pa stayed below the critical shear {} Pa (shortfall {} Pa)", G(t.peak_weighted_shear_pa, 3), G(e.critical_shear_pa, 3), G(e.critical_shear_pa - t.peak_weighted_shear_pa, 3)));
            }
        }
    }
    // A step's volume residual counts against the balance only beyond its own round-off (the
    // ε g |h| floors of its face flows, at which Newton accepts a step behind a sealing cake).
    if s.max_mass_excess > 1e-8 || s.energy_closure > 1e-6 {
        warnings.push(format!("numerical balance is poor (volume residual beyond round-off {:.1e}, energy closure {:.1e}); the time step may be too long: compare with a run at half the step", s.max_mass_excess, s.energy_closure));
    }
    Headline {
        title: case.title.clone(),
        steps: s.steps,
        cycles: s.cycles,
        cells: s.cells,
        outer_radius_m: r_out,
        end_time_s: s.end_time_s,
        peak_outward_flux_m_s: s.peak_outward_flux_m_s,
        peak_inward_flux_m_s: s.peak_inward_flux_m_s,
        peak_outward_pore_velocity_m_s: s.peak_outward_flux_m_s / n_pack,
        peak_inward_pore_velocity_m_s: s.peak_inward_flux_m_s / n_pack,
        rms_face_flux_m_s: s.rms_face_flux_m_s,
        peak_screen_flow_m3_s: s.peak_screen_flow_m3_s,
        peak_shear_pa: s.peak_shear_pa,
        work_j: s.work_j,
        zones: Zone::ALL.map(Zone::name),
        cake_thickness_start_m: s.cake_thickness_m.0,
        cake_thickness_end_m: s.cake_thickness_m.1,
        time_to_half_cake_s: t.half_cake_s,
        time_to_90pct_cake_s: t.tenth_cake_s,
        cycles_to_half_cake: t.half_cake_s.zip(m.drive.period_s()).map(|(x, p)| x / p),
        cycles_to_90pct_cake: t.tenth_cake_s.zip(m.drive.period_s()).map(|(x, p)| x / p),
        skin_start: s.skin.0,
        skin_end: s.skin.1,
        efficiency_start: efficiency(r_out, rs, s.skin.0),
        efficiency_end: efficiency(r_out, rs, s.skin.1),
        specific_capacity_start_m2_s: thiem_specific_capacity(transmissivity, r_out, rs, s.skin.0),
        specific_capacity_end_m2_s: thiem_specific_capacity(transmissivity, r_out, rs, s.skin.1),
        efficiency_definition: EFFICIENCY_DEFINITION,
        peak_slot_velocity_m_s: slot,
        peak_grain_reynolds: reynolds,
        piping_ratio: piping,
        peak_collapse_pressure_pa: collapse_pa,
        peak_screen_differential_pa: s.peak_collapse_head_m * rho_g,
        peak_in_well_drawdown_m: drawdown_m,
        peak_burst_pressure_pa: s.peak_burst_head_m * rho_g,
        collapse_rating_pa: ratings.casing_pa,
        screen_collapse_rating_pa: ratings.screen_pa,
        collapse_rating_basis: ratings.how,
        collapse_margin: margin,
        screen_collapse_margin: screen_margin,
        casing_collapse_margin: casing_margin,
        column_partings: s.column_partings,
        parted_time_s: s.parted_time_s,
        max_mass_residual: s.max_mass_residual,
        energy_closure: s.energy_closure,
        max_newton_iterations: s.max_newton_iterations,
        warnings,
    }
}

fn fmt_opt(v: Option<f64>, unit: &str) -> String {
    v.map_or("—".to_string(), |x| format!("{} {unit}", G(x, 4)))
}

/// The summary table printed by `run`.
pub fn table(h: &Headline) -> String {
    let gpm = 60.0 / US_GAL_M3; // US gal/min per m³/s
    let mut t = String::new();
    let mut row = |k: &str, v: String| t.push_str(&format!("  {k:<44} {v}\n"));
    row(
        "steps / cycles / cells",
        format!("{} / {} / {}", h.steps, h.cycles, h.cells),
    );
    row("simulated time", format!("{} s", G(h.end_time_s, 4)));
    row(
        "peak face flux out / in",
        format!(
            "{:.4e} / {:.4e} m/s",
            h.peak_outward_flux_m_s, h.peak_inward_flux_m_s
        ),
    );
    row(
        "peak pore velocity out / in",
        format!(
            "{:.4e} / {:.4e} m/s",
            h.peak_outward_pore_velocity_m_s, h.peak_inward_pore_velocity_m_s
        ),
    );
    row("RMS face flux", format!("{:.4e} m/s", h.rms_face_flux_m_s));
    row(
        "peak shear proxy at the wall",
        format!("{} Pa", G(h.peak_shear_pa, 4)),
    );
    for (z, w) in h.zones.iter().zip(h.work_j) {
        row(&format!("work dissipated, {z}"), format!("{} J", G(w, 4)));
    }
    row(
        "cake thickness start → end",
        format!(
            "{} → {} mm",
            G(h.cake_thickness_start_m * 1e3, 4),
            G(h.cake_thickness_end_m * 1e3, 4)
        ),
    );
    row(
        "time to remove 50 % / 90 % of the cake",
        format!(
            "{} / {}{}",
            fmt_opt(h.time_to_half_cake_s, "s"),
            fmt_opt(h.time_to_90pct_cake_s, "s"),
            match (h.cycles_to_half_cake, h.cycles_to_90pct_cake) {
                (Some(a), Some(b)) => format!(" ({} / {} cycles)", G(a, 3), G(b, 3)),
                (Some(a), None) => format!(" ({} cycles / —)", G(a, 3)),
                _ => String::new(),
            }
        ),
    );
    row(
        "skin start → end",
        format!("{} → {}", G(h.skin_start, 4), G(h.skin_end, 4)),
    );
    row(
        "efficiency start → end (steady, see report)",
        format!(
            "{:.1} % → {:.1} %",
            100.0 * h.efficiency_start,
            100.0 * h.efficiency_end
        ),
    );
    row(
        "specific capacity start → end",
        format!(
            "{} → {} L/s/m ({} → {} gpm/ft)",
            G(h.specific_capacity_start_m2_s * 1e3, 4),
            G(h.specific_capacity_end_m2_s * 1e3, 4),
            G(h.specific_capacity_start_m2_s * gpm * FT_M, 3),
            G(h.specific_capacity_end_m2_s * gpm * FT_M, 3)
        ),
    );
    row(
        "peak slot velocity (rule of thumb 0.03 m/s)",
        format!("{} m/s", G(h.peak_slot_velocity_m_s, 4)),
    );
    row(
        "peak grain Reynolds number (pack d50)",
        h.peak_grain_reynolds
            .map_or("— (no d50)".into(), |r| format!("{}", G(r, 3))),
    );
    row(
        "wall gradient / critical gradient",
        h.piping_ratio
            .map_or("—".into(), |r| format!("{}", G(r, 3))),
    );
    row(
        "peak collapse load (screen or casing)",
        format!(
            "{} kPa ({} psi)",
            G(h.peak_collapse_pressure_pa / 1e3, 4),
            G(h.peak_collapse_pressure_pa / PSI_PA, 3)
        ),
    );
    let rating = |r: Option<f64>, m: Option<f64>| match (r, m) {
        (Some(r), Some(m)) => format!("{} kPa / {m:.2}", G(r / 1e3, 4)),
        (Some(r), None) => format!("{} kPa / —", G(r / 1e3, 4)),
        _ => "—".to_owned(),
    };
    row(
        "collapse rating / margin, blank casing",
        match h.collapse_rating_pa {
            Some(_) => rating(h.collapse_rating_pa, h.casing_collapse_margin),
            None => "— (give well.material and dimension_ratio, or collapse_rating)".into(),
        },
    );
    row(
        "collapse rating / margin, screen",
        match h.screen_collapse_rating_pa {
            Some(_) => rating(h.screen_collapse_rating_pa, h.screen_collapse_margin),
            None => "— (give well.screen_collapse_rating, the maker's rating)".into(),
        },
    );
    row(
        "column partings at the vapour bound / time",
        format!("{} / {} s", h.column_partings, G(h.parted_time_s, 4)),
    );
    row(
        "volume residual / energy closure",
        format!("{:.1e} / {:.1e}", h.max_mass_residual, h.energy_closure),
    );
    row(
        "most Newton iterations in a step",
        format!("{}", h.max_newton_iterations),
    );
    if !h.warnings.is_empty() {
        t.push_str("\nWarnings:\n");
        for w in &h.warnings {
            t.push_str(&format!("  - {w}\n"));
        }
    }
    t
}
