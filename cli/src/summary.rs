//! Headline figures of a run: what the summary table, `--json`, the HDF5 `/summary` group
//! and the report show. Derived from the solver's run summary, the case and a tracker of
//! per-step extremes; pure computation, no I/O.

use crate::case::LoadedCase;
use crate::units::{FT_M, PSI_PA, US_GAL_M3};
use boreflux_solver::assess::{self, Assessment, WellFigures};
use boreflux_solver::damage::sand;
use boreflux_solver::grid::{Zone, ZONE_COUNT};
use boreflux_solver::model::Model;
use boreflux_solver::safety::{self, ENTRANCE_VELOCITY_RULE_M_S};
use boreflux_solver::slow::SlowState;
use boreflux_solver::SolverError;
use boreflux_solver::{RunSummary, StepObserver, StepView};
use serde::Serialize;

/// Grain Reynolds number above which Darcy's law is doubtful (docs/physics.md §4.4, Bear 1972;
/// from memory — verify).
pub const REYNOLDS_SOFT_LIMIT: f64 = 1.0;
/// Grain Reynolds number above which the warning is strong.
pub const REYNOLDS_HARD_LIMIT: f64 = 10.0;

/// Definition of the efficiency reported (docs/physics.md §25).
pub const EFFICIENCY_DEFINITION: &str = "efficiency E = s0 / s: the drawdown of the same well \
with no damage (no cake, no invaded zone; screen and pack kept) over the drawdown of the well \
as it stands, both read at the end of the virtual constant-rate test at the design rate \
(assessment section); above 100 % only for a negative skin. Specific capacity Q/s from the \
same test";

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
    /// Cycles jumped over, not computed (`numerics.multiscale`).
    pub skipped_cycles: u64,
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
    /// Time until the cake's skin was down to a tenth of its start (lift-off and erosion),
    /// s: the cake removal time.
    pub cake_removal_time_s: Option<f64>,
    /// Largest inward pressure difference across the cake, Pa.
    pub peak_cake_pressure_pa: f64,
    /// Skin of the pack (start; it does not change).
    pub skin_pack: f64,
    /// Skin of the cake at the start.
    pub skin_cake_start: f64,
    /// Skin of the cake at the end.
    pub skin_cake_end: f64,
    /// Skin of the invaded zone at the start.
    pub skin_invaded_start: f64,
    /// Skin of the invaded zone at the end.
    pub skin_invaded_end: f64,
    /// Mud fines in the invaded zone at the start, kg.
    pub fines_initial_kg: f64,
    /// Mud fines carried across the wall toward the well, kg (what shows as turbidity).
    pub fines_removed_kg: f64,
    /// Mud fines pushed beyond the invaded zone into the formation, kg.
    pub fines_pushed_out_kg: f64,
    /// D50(pack)/D50(formation), when both are known (docs/physics.md §9c).
    pub pack_formation_ratio: Option<f64>,
    /// Slot width over the pack D10 (or D50 without D10), when known.
    pub slot_pack_ratio: Option<f64>,
    /// Settling velocity of a formation D50 grain, the critical interstitial velocity at the
    /// wall (docs/physics.md §9e), m/s.
    pub grain_critical_velocity_m_s: Option<f64>,
    /// Largest inward interstitial velocity on the formation side of the wall, m/s.
    pub peak_wall_interstitial_velocity_m_s: f64,
    /// Skin at the start.
    pub skin_start: f64,
    /// Skin at the end.
    pub skin_end: f64,
    /// Efficiency at the start (see `efficiency_definition`); none when the virtual tests
    /// failed (a warning says why).
    pub efficiency_start: Option<f64>,
    /// Efficiency at the end.
    pub efficiency_end: Option<f64>,
    /// Specific capacity of the virtual constant-rate test at the start, m²/s.
    pub specific_capacity_start_m2_s: Option<f64>,
    /// Specific capacity of the virtual constant-rate test at the end, m²/s.
    pub specific_capacity_end_m2_s: Option<f64>,
    /// Design rate of the virtual tests, m³/s.
    pub design_rate_m3_s: f64,
    /// Duration of the virtual constant-rate test, s.
    pub test_duration_s: f64,
    /// Duration of each step of the virtual step test, s.
    pub step_duration_s: f64,
    /// Drawdown at the end of the constant-rate test at the start, m.
    pub test_drawdown_start_m: Option<f64>,
    /// Drawdown at the end of the constant-rate test at the end, m.
    pub test_drawdown_end_m: Option<f64>,
    /// Drawdown of the same test on the undamaged well, m.
    pub test_drawdown_undamaged_m: Option<f64>,
    /// Step-test B at the start (one step's duration), s/m².
    pub step_b_start_s_m2: Option<f64>,
    /// Step-test B at the end, s/m².
    pub step_b_end_s_m2: Option<f64>,
    /// Step-test C at the start, s²/m⁵.
    pub step_c_start_s2_m5: Option<f64>,
    /// Step-test C at the end, s²/m⁵.
    pub step_c_end_s2_m5: Option<f64>,
    /// Nonlinear share C Q/(B + C Q) of the step-test drawdown at the design rate, start.
    pub nonlinear_share_start: Option<f64>,
    /// Nonlinear share at the end.
    pub nonlinear_share_end: Option<f64>,
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
    /// The damage-removal constants used, with their documented ranges and provenance, widest
    /// range first (docs/physics.md §13–§13b).
    pub assumptions: Vec<String>,
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

/// The virtual tests of a run (docs/physics.md §25): the well at t = 0 and as it stands at
/// the end, against the undamaged well; `undamaged_drawdown_m` when already computed (for
/// the progress series), else it is computed here.
pub fn assessment(
    case: &LoadedCase,
    undamaged_drawdown_m: Option<f64>,
    s: &RunSummary,
) -> Result<Assessment, SolverError> {
    let (m, plan) = (&case.model, &case.assessment);
    let clean = match undamaged_drawdown_m {
        Some(c) => c,
        None => assess::undamaged_drawdown_m(m, plan)?,
    };
    Ok(Assessment {
        before: assess::figures_with(m, &SlowState::new(m), plan, clean)?,
        after: assess::figures_with(m, &s.final_state, plan, clean)?,
    })
}

/// The deepest level below static the drive shows to exist in the well: a pump intake or a
/// surge block's depth, with what it is.
fn deepest_known_depth_m(drive: &boreflux_solver::Drive) -> Option<(&'static str, f64)> {
    use boreflux_solver::Drive;
    match drive {
        Drive::PumpBackwash(p) => Some(("pump intake", p.intake_depth_m)),
        Drive::SurgeBlock(b) => Some(("surge block", b.depth_m)),
        Drive::Schedule(stages) => stages
            .iter()
            .filter_map(|s| deepest_known_depth_m(&s.drive))
            .max_by(|a, b| a.1.total_cmp(&b.1)),
        Drive::SineHead(_)
        | Drive::ConstantRate { .. }
        | Drive::Slug { .. }
        | Drive::Table(_)
        | Drive::Swab(_)
        | Drive::JetPulse(_) => None,
    }
}

/// Computes the headline figures and the warnings; `a` is the run's [`assessment`].
pub fn headline(
    case: &LoadedCase,
    s: &RunSummary,
    t: &Tracker,
    a: &Result<Assessment, SolverError>,
) -> Headline {
    let m = &case.model;
    let r_out = s.outer_radius_m;
    let n_pack = m.pack.medium.porosity;
    let mut warnings = case.warnings.clone();
    warnings.extend(s.warnings.iter().cloned());
    let (before, after): (Option<&WellFigures>, Option<&WellFigures>) = match a {
        Ok(a) => {
            for (when, f) in [("at the start", &a.before), ("at the end", &a.after)] {
                if f.negative_skin {
                    warnings.push(format!(
                        "efficiency {when} is {:.1} % (above 100 %): the damage zones conduct \
                         better than the formation (a negative skin), so the well draws down \
                         less than the same well without them",
                        100.0 * f.efficiency
                    ));
                }
                if f.step.is_none() {
                    warnings.push(format!(
                        "the virtual step test {when} could not be fitted (B and C not shown)"
                    ));
                }
            }
            (Some(&a.before), Some(&a.after))
        }
        Err(e) => {
            warnings.push(format!(
                "the virtual pumping tests failed, so no specific capacity or efficiency is \
                 shown: {e}"
            ));
            (None, None)
        }
    };
    let fig = |f: Option<&WellFigures>, g: &dyn Fn(&WellFigures) -> f64| f.map(g);
    let step = |f: Option<&WellFigures>, g: &dyn Fn(&assess::StepCoefficients) -> f64| {
        f.and_then(|f| f.step.as_ref()).map(g)
    };
    let plan = &case.assessment;
    let checks = assess::checks::run_checks(
        m,
        s,
        t.peak_face_gradient,
        case.safety.formation_specific_gravity,
    );
    let slot = checks.peak_slot_velocity_m_s;
    if slot > ENTRANCE_VELOCITY_RULE_M_S {
        warnings.push(format!(
            "peak slot velocity {slot:.3} m/s exceeds the common 0.03 m/s (0.1 ft/s) rule of thumb; a rule of thumb, not a limit"
        ));
    }
    let reynolds = checks.peak_grain_reynolds;
    if let Some(re) = reynolds {
        if re > REYNOLDS_HARD_LIMIT {
            warnings.push(format!("grain Reynolds number at the wall reaches {re:.1} (> 10): flow is well outside the Darcy range; non-Darcy losses dominate"));
        } else if re > REYNOLDS_SOFT_LIMIT {
            warnings.push(format!("grain Reynolds number at the wall reaches {re:.2} (> 1): Darcy's law is doubtful there"));
        }
    }
    // The wall gradient over Terzaghi's critical gradient stays a figure; it is no warning (it
    // exceeded 1 in every shipped case): the sand indicators below warn where a published
    // criterion is exceeded.
    let piping = checks.piping_ratio;
    let sand = sand_indicators(case, s);
    warnings.extend(sand.warnings.iter().cloned());
    let drawdown_m = checks.peak_in_well_drawdown_m;
    let collapse_pa = checks.peak_collapse_pressure_pa;
    let sf = case.safety.safety_factor;
    let ratings = collapse_ratings(&case.safety, pipe_temperature_c(case));
    let screen_pa = collapse_pa;
    let casing_pa = checks.casing_load_pa;
    let casing_margin = assess::checks::collapse_margin(ratings.casing_pa, sf, casing_pa);
    let screen_margin = assess::checks::collapse_margin(ratings.screen_pa, sf, screen_pa);
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
    // A pumping test at the design rate loads the blank casing with its drawdown too, and
    // cannot draw the level below what the drive's own tool or intake shows is there.
    if let Some(f) = before {
        if let Some((what, depth)) =
            deepest_known_depth_m(&m.drive).filter(|&(_, d)| f.drawdown_m > d)
        {
            warnings.push(format!(
                "the virtual constant-rate test at the design rate {} L/s draws the well down \
                 {} m, below the {what} {} m under the static level: the model's confined \
                 layer keeps the screen submerged, a real well may not; the figures hold only \
                 if that much drawdown is available; otherwise give a lower \
                 assessment.design_rate",
                G(case.assessment.design_rate_m3_s * 1e3, 4),
                G(f.drawdown_m, 4),
                G(depth, 4)
            ));
        }
        let load = f.drawdown_m * m.fluid.density_kg_m3 * boreflux_solver::water::GRAVITY_M_S2;
        if let Some(mg) = assess::checks::collapse_margin(ratings.casing_pa, sf, load) {
            if mg < 1.0 {
                warnings.push(format!(
                    "the virtual constant-rate test at the design rate {} L/s draws the well down \
                     {} m, a collapse load of {} kPa on the blank casing above its rating over \
                     the safety factor {sf}: a real test at this rate could collapse it, and a \
                     pump cannot lift from below its intake; test at a lower \
                     assessment.design_rate and check the manufacturer's rating and the local \
                     well code",
                    G(case.assessment.design_rate_m3_s * 1e3, 4),
                    G(f.drawdown_m, 4),
                    G(load / 1e3, 4)
                ));
            }
        }
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
        skipped_cycles: s.skipped_cycles,
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
        cake_removal_time_s: s.cake_removed_at_s,
        peak_cake_pressure_pa: s.peak_cake_pressure_pa,
        skin_pack: s.skin_parts.0.pack,
        skin_cake_start: s.skin_parts.0.cake,
        skin_cake_end: s.skin_parts.1.cake,
        skin_invaded_start: s.skin_parts.0.invaded,
        skin_invaded_end: s.skin_parts.1.invaded,
        fines_initial_kg: s.fines_initial_kg,
        fines_removed_kg: s.fines_removed_kg,
        fines_pushed_out_kg: s.fines_pushed_out_kg,
        pack_formation_ratio: sand.retention.pack_ratio,
        slot_pack_ratio: sand.retention.slot_ratio,
        grain_critical_velocity_m_s: sand.critical_velocity_m_s,
        peak_wall_interstitial_velocity_m_s: sand.wall_velocity_m_s,
        skin_start: s.skin.0,
        skin_end: s.skin.1,
        efficiency_start: fig(before, &|f| f.efficiency),
        efficiency_end: fig(after, &|f| f.efficiency),
        specific_capacity_start_m2_s: fig(before, &|f| f.specific_capacity_m2_s),
        specific_capacity_end_m2_s: fig(after, &|f| f.specific_capacity_m2_s),
        design_rate_m3_s: plan.design_rate_m3_s,
        test_duration_s: plan.constant_duration_s,
        step_duration_s: plan.step_duration_s,
        test_drawdown_start_m: fig(before, &|f| f.drawdown_m),
        test_drawdown_end_m: fig(after, &|f| f.drawdown_m),
        test_drawdown_undamaged_m: fig(before, &|f| f.undamaged_drawdown_m),
        step_b_start_s_m2: step(before, &|c| c.b_s_m2),
        step_b_end_s_m2: step(after, &|c| c.b_s_m2),
        step_c_start_s2_m5: step(before, &|c| c.c_s2_m5),
        step_c_end_s2_m5: step(after, &|c| c.c_s2_m5),
        nonlinear_share_start: step(before, &|c| c.nonlinear_share),
        nonlinear_share_end: step(after, &|c| c.nonlinear_share),
        efficiency_definition: EFFICIENCY_DEFINITION,
        peak_slot_velocity_m_s: slot,
        peak_grain_reynolds: reynolds,
        piping_ratio: piping,
        peak_collapse_pressure_pa: collapse_pa,
        peak_screen_differential_pa: checks.peak_screen_differential_pa,
        peak_in_well_drawdown_m: drawdown_m,
        peak_burst_pressure_pa: checks.peak_burst_pressure_pa,
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
        assumptions: boreflux_solver::damage::assumptions(m)
            .iter()
            .map(|p| {
                format!(
                    "{} = {} {} (documented range {}–{}, {:.1} decades; {})",
                    p.path,
                    G(p.value, 3),
                    p.unit,
                    G(p.range.0, 2),
                    G(p.range.1, 2),
                    p.decades(),
                    p.provenance
                )
            })
            .collect(),
    }
}

/// The sand-production and pack-stability indicators of a run (docs/physics.md §9c, §9e).
pub struct SandIndicators {
    /// Retention criteria.
    pub retention: sand::Retention,
    /// Settling velocity of a formation D50 grain, m/s.
    pub critical_velocity_m_s: Option<f64>,
    /// Largest inward interstitial velocity on the formation side of the wall, m/s.
    pub wall_velocity_m_s: f64,
    /// Warnings, only where a criterion is exceeded.
    pub warnings: Vec<String>,
}

fn resolved_size(case: &LoadedCase, section: &str, key: &str) -> Option<f64> {
    case.resolved
        .get(section)
        .and_then(|s| s.get(key))
        .and_then(serde_json::Value::as_f64)
        .filter(|d| *d > 0.0)
}

/// Evaluates the retention criteria from the case's grain sizes and slot, and the critical
/// velocity of formation grains at the wall against the run's peak inward flux.
pub fn sand_indicators(case: &LoadedCase, s: &RunSummary) -> SandIndicators {
    let m = &case.model;
    let g = sand::Gradation {
        pack_d10: resolved_size(case, "pack", "d10"),
        pack_d15: None,
        pack_d50: m.pack.medium.grain_diameter_m,
        formation_d50: m.formation.medium.grain_diameter_m,
        formation_d85: None,
        slot_width: resolved_size(case, "well", "slot_width"),
    };
    let retention = sand::retention(&g);
    let outer = m.invaded.as_ref().map_or(m.formation.medium, |z| z.medium);
    let wall_velocity_m_s = s.peak_inward_flux_m_s / outer.porosity;
    let rho = m.fluid.density_kg_m3;
    let rho_s = case.safety.formation_specific_gravity * rho;
    let critical_velocity_m_s = g
        .formation_d50
        .map(|d| sand::settling_velocity_m_s(d, rho_s, rho, m.fluid.viscosity_pa_s));
    let moving = critical_velocity_m_s.is_some_and(|w| wall_velocity_m_s > w);
    let mut warnings = Vec::new();
    if retention.formation_unretained {
        let ratio = retention
            .pack_ratio
            .map_or(String::new(), |r| format!("{}", G(r, 3)));
        let flow = match critical_velocity_m_s {
            Some(w) if moving => format!(
                "; the inward interstitial velocity at the wall ({} m/s) exceeds the settling \
                 velocity of formation grains ({} m/s), so the flow can carry them into it",
                G(wall_velocity_m_s, 3),
                G(w, 3)
            ),
            _ => String::new(),
        };
        warnings.push(format!(
            "SAND: the pack may not retain the formation (D50 pack/formation {ratio} above \
             the coarse-formation limit {}){flow}; expect sand in the discharge and check the \
             pack design against the local code and a sieve analysis",
            safety::PACK_AQUIFER_RATIO_COARSE_MAX
        ));
    }
    if retention.pack_unretained {
        let against = if retention.slot_against_d10 {
            "D10"
        } else {
            "D50"
        };
        warnings.push(format!(
            "SAND: the screen slot is wider than the pack's {against} (ratio {}): the slot \
             may pass pack grains (the usual design retains about 90 % of the pack); the pack \
             can settle and the well can pump sand",
            G(retention.slot_ratio.unwrap_or(f64::NAN), 3)
        ));
    }
    SandIndicators {
        retention,
        critical_velocity_m_s,
        wall_velocity_m_s,
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
        if h.skipped_cycles > 0 {
            format!(
                "{} / {} ({} jumped over, not computed) / {}",
                h.steps, h.cycles, h.skipped_cycles, h.cells
            )
        } else {
            format!("{} / {} / {}", h.steps, h.cycles, h.cells)
        },
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
        "time to erode 50 % / 90 % of the cake thickness",
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
        "cake removal time (cake skin down to a tenth)",
        fmt_opt(h.cake_removal_time_s, "s"),
    );
    row(
        "skin start → end",
        format!("{} → {}", G(h.skin_start, 4), G(h.skin_end, 4)),
    );
    row(
        "  of which pack / cake / invaded",
        format!(
            "{} / {} → {} / {} → {}",
            G(h.skin_pack, 3),
            G(h.skin_cake_start, 3),
            G(h.skin_cake_end, 3),
            G(h.skin_invaded_start, 3),
            G(h.skin_invaded_end, 3)
        ),
    );
    row(
        "peak inward pressure across the cake",
        format!("{} kPa", G(h.peak_cake_pressure_pa / 1e3, 4)),
    );
    if h.fines_initial_kg > 0.0 {
        row(
            "invaded-zone fines removed / pushed out / at start",
            format!(
                "{} / {} / {} kg",
                G(h.fines_removed_kg, 4),
                G(h.fines_pushed_out_kg, 4),
                G(h.fines_initial_kg, 4)
            ),
        );
    }
    row(
        "virtual tests: design rate / test / steps",
        format!(
            "{} L/s ({} gpm) / {} h / {} h each",
            G(h.design_rate_m3_s * 1e3, 4),
            G(h.design_rate_m3_s * gpm, 4),
            G(h.test_duration_s / 3600.0, 4),
            G(h.step_duration_s / 3600.0, 4)
        ),
    );
    let pair = |a: Option<f64>, b: Option<f64>, f: &dyn Fn(f64) -> String| match (a, b) {
        (Some(a), Some(b)) => format!("{} → {}", f(a), f(b)),
        _ => "— (virtual tests failed, see warnings)".to_owned(),
    };
    row(
        "efficiency start → end (virtual test)",
        pair(h.efficiency_start, h.efficiency_end, &|x| {
            format!("{:.1} %", 100.0 * x)
        }),
    );
    row(
        "specific capacity start → end",
        pair(
            h.specific_capacity_start_m2_s,
            h.specific_capacity_end_m2_s,
            &|x| format!("{} L/s/m ({} gpm/ft)", G(x * 1e3, 4), G(x * gpm * FT_M, 3)),
        ),
    );
    row(
        "step test B start → end",
        pair(h.step_b_start_s_m2, h.step_b_end_s_m2, &|x| {
            format!("{} s/m²", G(x, 4))
        }),
    );
    row(
        "step test C start → end",
        pair(h.step_c_start_s2_m5, h.step_c_end_s2_m5, &|x| {
            format!("{} s²/m⁵", G(x, 4))
        }),
    );
    row(
        "nonlinear share at the design rate",
        pair(h.nonlinear_share_start, h.nonlinear_share_end, &|x| {
            format!("{} %", G(100.0 * x, 3))
        }),
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
        "D50 pack/formation (4–6, up to 9) · slot/pack D10",
        format!(
            "{} · {}",
            h.pack_formation_ratio
                .map_or("—".into(), |r| format!("{}", G(r, 3))),
            h.slot_pack_ratio
                .map_or("—".into(), |r| format!("{}", G(r, 3)))
        ),
    );
    row(
        "wall interstitial velocity / grain settling velocity",
        match h.grain_critical_velocity_m_s {
            Some(w) => format!(
                "{} / {} m/s",
                G(h.peak_wall_interstitial_velocity_m_s, 3),
                G(w, 3)
            ),
            None => "— (no formation d50)".into(),
        },
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
