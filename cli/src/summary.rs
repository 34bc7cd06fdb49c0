//! Headline figures of a run: what the summary table, `--json`, the HDF5 `/summary` group
//! and the report show. Derived from the solver's run summary, the case and a tracker of
//! per-step extremes; pure computation, no I/O.

use crate::case::LoadedCase;
use crate::output::schema::{run_json_keys, Figure, Num, RunKey, SummaryText};
use crate::units::{FT_M, PSI_PA, US_GAL_M3};
use boreflux_solver::assess::figures::RunFigures;
use boreflux_solver::assess::{self, Assessment, Baseline};
use boreflux_solver::damage::sand;
use boreflux_solver::grid::Zone;
use boreflux_solver::safety::{self, CAUTION, ENTRANCE_VELOCITY_RULE_M_S};
use boreflux_solver::RunSummary;
use boreflux_solver::SolverError;
use serde::ser::{Serialize, SerializeMap, Serializer};

/// Grain Reynolds number above which Darcy's law is doubtful (docs/physics.md §4.4, Bear 1972;
/// from memory — verify).
pub const REYNOLDS_SOFT_LIMIT: f64 = 1.0;
/// Grain Reynolds number above which the warning is strong (the upper end of the 1–10 range
/// where departures from Darcy's law begin, docs/physics.md §4.4, Bear 1972; from memory —
/// verify).
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

/// Per-step extremes the solver summary does not keep: the solver's observer.
pub use boreflux_solver::assess::figures::Extremes as Tracker;

/// Headline of one run: the solver's figures ([`RunFigures`], read through the output
/// schema's [`Figure`] accessors) with the texts the command line words. `run --json`
/// serializes it in the order of [`run_json_keys`].
#[derive(Debug, Clone)]
pub struct Headline {
    /// Case title.
    pub title: String,
    /// The run's figures, as the solver computed them.
    pub figures: RunFigures,
    /// How the collapse ratings were found.
    pub collapse_rating_basis: String,
    /// What the case lacks for a casing rating (None: the casing has one).
    pub casing_rating_missing: Option<String>,
    /// Warnings.
    pub warnings: Vec<String>,
    /// The damage-removal constants used, with their documented ranges and provenance, widest
    /// range first (docs/physics.md §13–§13b).
    pub assumptions: Vec<String>,
    /// The case's notes: defaults and approximations the model used (`/summary` only).
    pub notes: Vec<String>,
}

impl Headline {
    /// A figure of the run; `None` where it was not computed or is not finite.
    pub fn get(&self, f: Figure) -> Option<f64> {
        f.value(&self.figures)
            .map(Num::as_f64)
            .filter(|x| x.is_finite())
    }
}

impl Serialize for Headline {
    fn serialize<S: Serializer>(&self, ser: S) -> Result<S::Ok, S::Error> {
        let keys = run_json_keys();
        let mut m = ser.serialize_map(Some(keys.len()))?;
        for key in keys {
            let name = key.name();
            match key {
                RunKey::Title => m.serialize_entry(&name, &self.title)?,
                RunKey::Figure(f) => match f.value(&self.figures) {
                    Some(Num::Count(n)) => m.serialize_entry(&name, &n)?,
                    Some(Num::Real(x)) => m.serialize_entry(&name, &x)?,
                    None => m.serialize_entry(&name, &None::<f64>)?,
                },
                RunKey::WorkArray => m.serialize_entry(&name, &self.figures.summary.work_j)?,
                RunKey::ZoneNames => m.serialize_entry(&name, &Zone::ALL.map(Zone::name))?,
                RunKey::CollapseRatingBasis => {
                    m.serialize_entry(&name, &self.collapse_rating_basis)?
                }
                RunKey::Text(SummaryText::Warnings) => m.serialize_entry(&name, &self.warnings)?,
                RunKey::Text(SummaryText::Assumptions) => {
                    m.serialize_entry(&name, &self.assumptions)?
                }
                RunKey::Text(SummaryText::EfficiencyDefinition) => {
                    m.serialize_entry(&name, EFFICIENCY_DEFINITION)?
                }
                RunKey::Text(SummaryText::Cautions) => m.serialize_entry(&name, CAUTION)?,
                RunKey::Text(SummaryText::Notes) => m.serialize_entry(&name, &self.notes)?,
            }
        }
        m.end()
    }
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
    /// What the case lacks for a casing rating, naming the fields (None: it has one).
    pub casing_missing: Option<String>,
}

/// What `s` lacks for a computed casing rating, naming the case-file fields to give.
fn casing_rating_hint(s: &crate::case::SafetyInputs) -> String {
    let builtin = s.material.as_deref().and_then(safety::builtin_material);
    // What is missing of the material's constants and the dimension ratio; a built-in
    // material has its constants.
    let mut missing: Vec<&str> = Vec::new();
    if builtin.is_none() {
        for (given, name) in [
            (s.youngs_modulus_pa.is_some(), "well.youngs_modulus"),
            (s.poisson_ratio.is_some(), "well.poisson_ratio"),
            (s.yield_strength_pa.is_some(), "well.yield_strength"),
        ] {
            if !given {
                missing.push(name);
            }
        }
    }
    if s.dimension_ratio.is_none() {
        missing.push("well.dimension_ratio");
    }
    let what = match (s.material.as_deref(), builtin) {
        (None, _) if missing.len() == 4 => {
            return "give well.material and well.dimension_ratio, or well.collapse_rating"
                .to_owned();
        }
        (None, _) => "no well.material".to_owned(),
        (Some(m), Some(_)) => format!("well.material is {m}"),
        (Some(m), None) => format!(
            "well.material \"{m}\" is not built in ({})",
            safety::MATERIAL_NAMES.join(", ")
        ),
    };
    let list = match missing.as_slice() {
        [] => String::new(),
        [one] => (*one).to_owned(),
        [init @ .., last] => format!("{} and {last}", init.join(", ")),
    };
    format!("{what}: give {list}, or well.collapse_rating")
}

/// Material constants for the collapse check: the built-in ones for pvc, steel and
/// stainless, each replaced by the case's value where given.
fn pipe_material(s: &crate::case::SafetyInputs) -> Option<safety::PipeMaterial> {
    let base = s.material.as_deref().and_then(safety::builtin_material);
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
    let casing_missing = casing.is_none().then(|| casing_rating_hint(s));
    if let Some(hint) = &casing_missing {
        how.insert(0, format!("casing: no rating ({hint})"));
    }
    CollapseRatings {
        casing_pa: casing,
        screen_pa: screen,
        limits,
        how: how.join("; "),
        casing_missing,
    }
}

/// The limits the run's warnings (and its events, `output/events.rs`) compare with: the
/// grain Reynolds number's soft limit and the case's collapse ratings and safety factor.
pub fn watch_limits(case: &LoadedCase) -> boreflux_solver::assess::watch::Limits {
    let ratings = collapse_ratings(&case.safety, pipe_temperature_c(case));
    boreflux_solver::assess::watch::Limits {
        grain_reynolds: REYNOLDS_SOFT_LIMIT,
        screen_rating_pa: ratings.screen_pa,
        casing_rating_pa: ratings.casing_pa,
        safety_factor: case.safety.safety_factor,
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
    let pumps = drive.stage_drives().filter_map(|d| {
        if let Drive::PumpBackwash(p) = d {
            Some(*p)
        } else {
            None
        }
    });
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
/// the end, against the undamaged well (`assess::assess`). [`assessment_from`] gives the
/// same figures with the tests that depend on the case alone done before or beside the run.
pub fn assessment(case: &LoadedCase, s: &RunSummary) -> Result<Assessment, SolverError> {
    assess::assess(&case.model, &s.final_state, &case.assessment)
}

/// As [`assessment`], from the `baseline` of the case (`assess::Baseline`: the undamaged
/// well's test and the figures as built), so only the end state's tests run here, and
/// none when its well is the one as built.
pub fn assessment_from(
    case: &LoadedCase,
    baseline: &Baseline,
    s: &RunSummary,
) -> Result<Assessment, SolverError> {
    baseline.assess(&case.model, &s.final_state, &case.assessment)
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
    let sf = case.safety.safety_factor;
    let ratings = collapse_ratings(&case.safety, pipe_temperature_c(case));
    let r = RunFigures::new(
        m,
        s.clone(),
        t.clone(),
        case.assessment.clone(),
        a.as_ref().ok().copied(),
        &gradation(case),
        case.safety.formation_specific_gravity,
        (ratings.casing_pa, ratings.screen_pa),
        sf,
    );
    let mut warnings = case.warnings.clone();
    warnings.extend(s.warnings.iter().cloned());
    match a {
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
        }
        Err(e) => {
            warnings.push(format!(
                "the virtual pumping tests failed, so no specific capacity or efficiency is \
                 shown: {e}"
            ));
        }
    }
    let checks = &r.checks;
    let slot = checks.peak_slot_velocity_m_s;
    if slot > ENTRANCE_VELOCITY_RULE_M_S {
        warnings.push(format!(
            "peak slot velocity {slot:.3} m/s exceeds the common 0.03 m/s (0.1 ft/s) rule of thumb; a rule of thumb, not a limit"
        ));
    }
    if let Some(re) = checks.peak_grain_reynolds {
        if re > REYNOLDS_HARD_LIMIT {
            warnings.push(format!("grain Reynolds number at the wall reaches {re:.1} (> 10): flow is well outside the Darcy range; non-Darcy losses dominate"));
        } else if re > REYNOLDS_SOFT_LIMIT {
            warnings.push(format!("grain Reynolds number at the wall reaches {re:.2} (> 1): Darcy's law is doubtful there"));
        }
    }
    // The wall gradient over Terzaghi's critical gradient stays a figure; it is no warning (it
    // exceeded 1 in every shipped case): the sand indicators below warn where a published
    // criterion is exceeded.
    warnings.extend(sand_warnings(&r.sand));
    let c = &r.collapse;
    let screen_pa = checks.peak_collapse_pressure_pa;
    let casing_pa = checks.casing_load_pa;
    let cause = collapse_cause(&m.drive, s);
    for (what, rating, load, mg) in [
        ("screen", c.screen_rating_pa, screen_pa, c.screen_margin),
        (
            "blank casing",
            c.casing_rating_pa,
            casing_pa,
            c.casing_margin,
        ),
    ] {
        if let (Some(rating), Some(mg)) = (rating, mg) {
            if mg < 1.0 {
                warnings.push(format!(
                    "COLLAPSE RISK ({what}): peak inward differential pressure {:.0} kPa exceeds \
                     its collapse rating {:.0} kPa divided by the safety factor {sf}; {cause}; \
                     check the manufacturer's rating and the local well code",
                    load / 1e3,
                    rating / 1e3
                ));
            }
        }
    }
    if c.screen_rating_pa.is_none() && c.casing_rating_pa.is_some() && screen_pa > 0.0 {
        warnings.push(format!(
            "the screen has no collapse rating (peak load on it {:.0} kPa): enter the \
             manufacturer's screen rating as well.screen_collapse_rating; slotted screen is \
             weaker than the blank casing's computed {:.0} kPa",
            screen_pa / 1e3,
            c.casing_rating_pa.unwrap_or(0.0) / 1e3
        ));
    }
    // A pumping test at the design rate loads the blank casing with its drawdown too, and
    // cannot draw the level below what the drive's own tool or intake shows is there.
    if let Some(f) = r.before() {
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
        if let Some(mg) = assess::checks::collapse_margin(c.casing_rating_pa, sf, load) {
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
        figures: r,
        collapse_rating_basis: ratings.how,
        casing_rating_missing: ratings.casing_missing,
        notes: case.notes.clone(),
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

fn resolved_size(case: &LoadedCase, section: &str, key: &str) -> Option<f64> {
    case.resolved
        .get(section)
        .and_then(|s| s.get(key))
        .and_then(serde_json::Value::as_f64)
        .filter(|d| *d > 0.0)
}

/// The grain sizes and slot of a case for the sand indicators (docs/physics.md §9c).
pub fn gradation(case: &LoadedCase) -> sand::Gradation {
    let m = &case.model;
    sand::Gradation {
        pack_d10: resolved_size(case, "pack", "d10"),
        pack_d15: None,
        pack_d50: m.pack.medium.grain_diameter_m,
        formation_d50: m.formation.medium.grain_diameter_m,
        formation_d85: None,
        slot_width: resolved_size(case, "well", "slot_width"),
    }
}

/// The warnings of the sand indicators, only where a criterion is exceeded
/// (docs/physics.md §9c, §9e).
pub fn sand_warnings(sand: &sand::Indicators) -> Vec<String> {
    let retention = &sand.retention;
    let mut warnings = Vec::new();
    if retention.formation_unretained {
        let ratio = retention
            .pack_ratio
            .map_or(String::new(), |r| format!("{}", G(r, 3)));
        let flow = match sand.critical_velocity_m_s {
            Some(w) if sand.grains_move() => format!(
                "; the inward interstitial velocity at the wall ({} m/s) exceeds the settling \
                 velocity of formation grains ({} m/s), so the flow can carry them into it",
                G(sand.wall_velocity_m_s, 3),
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
    warnings
}

fn fmt_opt(v: Option<f64>, unit: &str) -> String {
    v.map_or("—".to_string(), |x| format!("{} {unit}", G(x, 4)))
}

/// The summary table printed by `run`.
pub fn table(h: &Headline) -> String {
    let gpm = 60.0 / US_GAL_M3; // US gal/min per m³/s
    let r = &h.figures;
    let s = &r.summary;
    let (c, sand) = (&r.checks, &r.sand);
    let f = |x: Figure| x.value(r).map(Num::as_f64);
    let mut t = String::new();
    let mut row = |k: &str, v: String| t.push_str(&format!("  {k:<44} {v}\n"));
    row(
        "steps / cycles / cells",
        if s.skipped_cycles > 0 {
            format!(
                "{} / {} ({} jumped over, not computed) / {}",
                s.steps, s.cycles, s.skipped_cycles, s.cells
            )
        } else if s.cycles == 0 {
            format!(
                "{} / 0 (no complete drive cycle: the drive has no single period, or the run is \
                 shorter than one) / {}",
                s.steps, s.cells
            )
        } else {
            format!("{} / {} / {}", s.steps, s.cycles, s.cells)
        },
    );
    row("simulated time", format!("{} s", G(s.end_time_s, 4)));
    row(
        "peak face flux out / in",
        format!(
            "{:.4e} / {:.4e} m/s",
            s.peak_outward_flux_m_s, s.peak_inward_flux_m_s
        ),
    );
    row(
        "peak pore velocity out / in",
        format!(
            "{:.4e} / {:.4e} m/s",
            r.peak_outward_pore_velocity_m_s(),
            r.peak_inward_pore_velocity_m_s()
        ),
    );
    row("RMS face flux", format!("{:.4e} m/s", s.rms_face_flux_m_s));
    row(
        "peak shear proxy at the wall",
        format!("{} Pa", G(s.peak_shear_pa, 4)),
    );
    for (z, w) in Zone::ALL.map(Zone::name).iter().zip(s.work_j) {
        row(&format!("work dissipated, {z}"), format!("{} J", G(w, 4)));
    }
    row(
        "cake thickness start → end",
        format!(
            "{} → {} mm",
            G(s.cake_thickness_m.0 * 1e3, 4),
            G(s.cake_thickness_m.1 * 1e3, 4)
        ),
    );
    row(
        "time to erode 50 % / 90 % of the cake thickness",
        format!(
            "{} / {}{}",
            fmt_opt(r.extremes.half_cake_s, "s"),
            fmt_opt(r.extremes.tenth_cake_s, "s"),
            match (r.cycles_to_half_cake(), r.cycles_to_90pct_cake()) {
                (Some(a), Some(b)) => format!(" ({} / {} cycles)", G(a, 3), G(b, 3)),
                (Some(a), None) => format!(" ({} cycles / —)", G(a, 3)),
                _ => String::new(),
            }
        ),
    );
    row(
        "cake removal time (cake skin down to a tenth)",
        fmt_opt(s.cake_removed_at_s, "s"),
    );
    row(
        "skin start → end",
        format!("{} → {}", G(s.skin.0, 4), G(s.skin.1, 4)),
    );
    row(
        "  of which pack / cake / invaded",
        format!(
            "{} / {} → {} / {} → {}",
            G(s.skin_parts.0.pack, 3),
            G(s.skin_parts.0.cake, 3),
            G(s.skin_parts.1.cake, 3),
            G(s.skin_parts.0.invaded, 3),
            G(s.skin_parts.1.invaded, 3)
        ),
    );
    row(
        "peak inward pressure across the cake",
        format!("{} kPa", G(s.peak_cake_pressure_pa / 1e3, 4)),
    );
    if s.fines_initial_kg > 0.0 {
        row(
            "invaded-zone fines removed / pushed out / at start",
            format!(
                "{} / {} / {} kg",
                G(s.fines_removed_kg, 4),
                G(s.fines_pushed_out_kg, 4),
                G(s.fines_initial_kg, 4)
            ),
        );
    }
    row(
        "virtual tests: design rate / test / steps",
        format!(
            "{} L/s ({} gpm) / {} h / {} h each",
            G(r.plan.design_rate_m3_s * 1e3, 4),
            G(r.plan.design_rate_m3_s * gpm, 4),
            G(r.plan.constant_duration_s / 3600.0, 4),
            G(r.plan.step_duration_s / 3600.0, 4)
        ),
    );
    let pair = |a: Option<f64>, b: Option<f64>, f: &dyn Fn(f64) -> String| match (a, b) {
        (Some(a), Some(b)) => format!("{} → {}", f(a), f(b)),
        _ => "— (virtual tests failed, see warnings)".to_owned(),
    };
    row(
        "efficiency start → end (virtual test)",
        pair(f(Figure::EfficiencyStart), f(Figure::EfficiencyEnd), &|x| {
            format!("{:.1} %", 100.0 * x)
        }),
    );
    row(
        "specific capacity start → end",
        pair(
            f(Figure::SpecificCapacityStart),
            f(Figure::SpecificCapacityEnd),
            &|x| format!("{} L/s/m ({} gpm/ft)", G(x * 1e3, 4), G(x * gpm * FT_M, 3)),
        ),
    );
    row(
        "step test B start → end",
        pair(f(Figure::StepBStart), f(Figure::StepBEnd), &|x| {
            format!("{} s/m²", G(x, 4))
        }),
    );
    row(
        "step test C start → end",
        pair(f(Figure::StepCStart), f(Figure::StepCEnd), &|x| {
            format!("{} s²/m⁵", G(x, 4))
        }),
    );
    row(
        "nonlinear share at the design rate",
        pair(
            f(Figure::NonlinearShareStart),
            f(Figure::NonlinearShareEnd),
            &|x| format!("{} %", G(100.0 * x, 3)),
        ),
    );
    row(
        "peak slot velocity (rule of thumb 0.03 m/s)",
        format!("{} m/s", G(c.peak_slot_velocity_m_s, 4)),
    );
    row(
        "peak grain Reynolds number (pack d50)",
        c.peak_grain_reynolds
            .map_or("— (no d50)".into(), |r| format!("{}", G(r, 3))),
    );
    row(
        "D50 pack/formation (4–6, up to 9) · slot/pack D10",
        format!(
            "{} · {}",
            sand.retention
                .pack_ratio
                .map_or("—".into(), |r| format!("{}", G(r, 3))),
            sand.retention
                .slot_ratio
                .map_or("—".into(), |r| format!("{}", G(r, 3)))
        ),
    );
    row(
        "wall interstitial velocity / grain settling velocity",
        match sand.critical_velocity_m_s {
            Some(w) => format!("{} / {} m/s", G(sand.wall_velocity_m_s, 3), G(w, 3)),
            None => "— (no formation d50)".into(),
        },
    );
    row(
        "wall gradient ÷ critical gradient (a ratio)",
        c.piping_ratio.map_or("—".into(), |r| {
            format!("{} (a figure, not a warning)", G(r, 3))
        }),
    );
    row(
        "peak collapse load (screen or casing)",
        format!(
            "{} kPa ({} psi)",
            G(c.peak_collapse_pressure_pa / 1e3, 4),
            G(c.peak_collapse_pressure_pa / PSI_PA, 3)
        ),
    );
    let rating = |rt: Option<f64>, m: Option<f64>| match (rt, m) {
        (Some(r), Some(m)) => format!("{} kPa / {m:.2}", G(r / 1e3, 4)),
        (Some(r), None) => format!("{} kPa / —", G(r / 1e3, 4)),
        _ => "—".to_owned(),
    };
    row(
        "collapse rating / margin, blank casing",
        match r.collapse.casing_rating_pa {
            Some(_) => rating(r.collapse.casing_rating_pa, r.collapse.casing_margin),
            None => format!(
                "— ({})",
                h.casing_rating_missing.as_deref().unwrap_or(
                    "give well.material and well.dimension_ratio, or well.collapse_rating"
                )
            ),
        },
    );
    row(
        "collapse rating / margin, screen",
        match r.collapse.screen_rating_pa {
            Some(_) => rating(r.collapse.screen_rating_pa, r.collapse.screen_margin),
            None => "— (give well.screen_collapse_rating, the maker's rating)".into(),
        },
    );
    row(
        "column partings at the vapour bound / time",
        format!("{} / {} s", s.column_partings, G(s.parted_time_s, 4)),
    );
    row(
        "volume residual / energy closure",
        format!("{:.1e} / {:.1e}", s.max_mass_residual, s.energy_closure),
    );
    row(
        "most Newton iterations in a step",
        format!("{}", s.max_newton_iterations),
    );
    if !h.warnings.is_empty() {
        t.push_str("\nWarnings:\n");
        for w in &h.warnings {
            t.push_str(&format!("  - {w}\n"));
        }
    }
    t
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::case::SafetyInputs;

    fn inputs(material: Option<&str>, dr: Option<f64>) -> SafetyInputs {
        SafetyInputs {
            collapse_rating_pa: None,
            material: material.map(str::to_owned),
            dimension_ratio: dr,
            screen_collapse_rating_pa: None,
            slot_derating: None,
            yield_strength_pa: None,
            youngs_modulus_pa: None,
            poisson_ratio: None,
            safety_factor: 2.0,
            formation_specific_gravity: 2.65,
        }
    }

    #[test]
    fn a_missing_casing_rating_names_what_the_case_lacks() {
        // Each combination of what was given gets a hint naming only what is missing (the
        // row of `run`'s table, `check`'s collapse line and `/summary`'s basis).
        let hint = |m, dr| {
            collapse_ratings(&inputs(m, dr), 20.0)
                .casing_missing
                .unwrap()
        };
        assert_eq!(
            hint(None, None),
            "give well.material and well.dimension_ratio, or well.collapse_rating"
        );
        assert_eq!(
            hint(None, Some(21.0)),
            "no well.material: give well.youngs_modulus, well.poisson_ratio and \
             well.yield_strength, or well.collapse_rating"
        );
        assert_eq!(
            hint(Some("pvc"), None),
            "well.material is pvc: give well.dimension_ratio, or well.collapse_rating"
        );
        assert_eq!(
            hint(Some("fibreglass"), Some(21.0)),
            "well.material \"fibreglass\" is not built in (pvc, steel, stainless): give \
             well.youngs_modulus, well.poisson_ratio and well.yield_strength, or \
             well.collapse_rating"
        );
        let mut given = inputs(Some("fibreglass"), None);
        given.youngs_modulus_pa = Some(20e9);
        given.poisson_ratio = Some(0.3);
        assert_eq!(
            collapse_ratings(&given, 20.0).casing_missing.unwrap(),
            "well.material \"fibreglass\" is not built in (pvc, steel, stainless): give \
             well.yield_strength and well.dimension_ratio, or well.collapse_rating"
        );
        // A built-in material with its dimension ratio has a rating, and no hint.
        let r = collapse_ratings(&inputs(Some("steel"), Some(20.0)), 20.0);
        assert!(r.casing_pa.is_some() && r.casing_missing.is_none());
        assert!(!r.how.contains("casing: no rating"));
        assert!(collapse_ratings(&inputs(None, None), 20.0)
            .how
            .starts_with("casing: no rating (give well.material"));
    }
}
