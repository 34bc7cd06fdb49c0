//! Physically sensible ranges of every input, checked once by [`crate::Model::validate`].
//!
//! These ranges do not judge a design: they refuse values no water well can have (a
//! typo, a wrong unit, 1e308), before they turn into a grid that does not fit in memory, a
//! run that never ends or an overflow. Each bound is deliberately wide — an order of
//! magnitude or more beyond the largest values met in practice — and carries its
//! provenance. Messages give the range and the reason:
//!
//! ```text
//! well.screen_length: must be between 0.01 m and 2000 m (screened lengths of water wells), got 1e308 m
//! ```

use crate::devices::{Backflow, JetPulse, PumpBackwash, PumpLaw, SurgeBlock, Swab};
use crate::drive::{Drive, TableQuantity};
use crate::error::SolverError;
use crate::model::{GridSpec, Medium, Model, TimeSpec};

/// One range: bounds, unit for the message, and why.
#[derive(Debug, Clone, Copy)]
pub struct Range {
    /// Smallest accepted value.
    pub min: f64,
    /// Largest accepted value.
    pub max: f64,
    /// Unit shown in the message ("" for none).
    pub unit: &'static str,
    /// Why this range, shown in the message.
    pub why: &'static str,
}

impl Range {
    /// Checks `v` (finite and within [min, max]).
    pub fn check(&self, field: &str, v: f64) -> Result<(), SolverError> {
        if v.is_finite() && v >= self.min && v <= self.max {
            return Ok(());
        }
        let u = |x: f64| {
            if self.unit.is_empty() {
                show(x)
            } else {
                format!("{} {}", show(x), self.unit)
            }
        };
        Err(SolverError::invalid(
            field,
            format!(
                "must be between {} and {} ({}), got {}",
                u(self.min),
                u(self.max),
                self.why,
                u(v)
            ),
        ))
    }

    /// Checks |v| against the range (for signed values such as heads and rates).
    pub fn check_abs(&self, field: &str, v: f64) -> Result<(), SolverError> {
        if v.is_finite() && v.abs() <= self.max {
            return Ok(());
        }
        Err(SolverError::invalid(
            field,
            format!(
                "must be at most {} {} in magnitude ({}), got {} {}",
                show(self.max),
                self.unit,
                self.why,
                show(v),
                self.unit
            ),
        ))
    }
}

/// A number as a person reads it: plain in 1e-4 … 1e6, otherwise in scientific notation.
pub fn show(x: f64) -> String {
    if x != 0.0 && x.is_finite() && !(1e-4..1e6).contains(&x.abs()) {
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

const fn r(min: f64, max: f64, unit: &'static str, why: &'static str) -> Range {
    Range {
        min,
        max,
        unit,
        why,
    }
}

/// Radii of screen, casing and borehole. Assumption (common practice, no source): water
/// wells are drilled from about 50 mm to about 1.5 m in diameter; 5 mm to 5 m leaves a wide
/// margin either side.
pub const RADIUS: Range = r(0.005, 5.0, "m", "radii of water wells and boreholes");
/// Screen length. Assumption: screened sections of water wells are up to a few hundred
/// metres; 2000 m exceeds the deepest aquifers tapped for water.
pub const SCREEN_LENGTH: Range = r(0.01, 2000.0, "m", "screened lengths of water wells");
/// Thickness of the invaded zone. Assumption: drilling-fluid invasion reaches centimetres
/// to a few metres; 100 m is far beyond it.
pub const INVADED_THICKNESS: Range = r(1e-4, 100.0, "m", "depth of drilling-fluid invasion");
/// Cake thickness. Assumption: filter cakes are a fraction of a millimetre to a few
/// centimetres thick.
pub const CAKE_THICKNESS: Range = r(1e-6, 0.5, "m", "thickness of a wall cake");
/// Outer model radius when given. Assumption: a radial model of one well beyond 100 km no
/// longer describes one aquifer.
pub const OUTER_RADIUS: Range = r(0.01, 1e5, "m", "radius of influence of one well");
/// Hydraulic conductivity of any zone. Common practice, no source: intact clay and rock
/// reach 1e-13 m/s, open gravel and karst about 1 m/s.
pub const CONDUCTIVITY: Range = r(1e-15, 10.0, "m/s", "conductivities of earth materials");
/// Specific storage. Common practice, no source: 1e-7 to 1e-2 1/m from rock to soft clay.
pub const SPECIFIC_STORAGE: Range = r(1e-10, 1.0, "1/m", "specific storage of earth materials");
/// Forchheimer β. Assumption: β = 1/(K v_c) with K ≥ 1e-7 m/s and onset velocities
/// ≥ 1e-5 m/s stays below 1e12 s²/m².
pub const FORCHHEIMER_BETA: Range = r(
    0.0,
    1e12,
    "s2/m2",
    "inertial loss coefficients of porous media",
);
/// Grain diameter (d50). Assumption: clay particles to boulders.
pub const GRAIN_DIAMETER: Range = r(1e-7, 1.0, "m", "grain sizes, clay to boulders");
/// Linear screen loss coefficient (head drop per Darcy flux). Assumption: 1e9 s makes a
/// 1 mm/s flux lose 1000 km of head.
pub const SCREEN_LOSS: Range = r(0.0, 1e9, "s", "linear screen loss coefficients");
/// Well-bore storage. Follows from [`RADIUS`]: π (5 m)² ≈ 79 m².
pub const WELL_STORAGE: Range = r(
    0.0,
    100.0,
    "m2",
    "free-surface area of a well of at most 5 m radius",
);
/// Duration of a run. Assumption: development and test pumping last hours to weeks; three
/// years (1e8 s) is far beyond.
pub const DURATION: Range = r(
    1e-3,
    1e8,
    "s",
    "development and test pumping last hours to weeks",
);
/// Time steps and first steps. Assumption: below 1 µs nothing in the well changes.
pub const TIME_STEP: Range = r(1e-6, 1e8, "s", "time steps from 1 us up to the longest run");
/// Frequencies of periodic drives. Common practice, no source: surge blocks and swabs work
/// at up to about 1 Hz; 10 Hz is far beyond anything a rig can stroke, and 1e-7 Hz is a
/// period longer than the longest run.
pub const FREQUENCY: Range = r(1e-7, 10.0, "Hz", "strokes of a rig: at most 600 a minute");
/// Frequency of a prescribed sine head. Assumption: a laboratory or test head may be
/// faster than a rig; 100 Hz.
pub const SINE_FREQUENCY: Range = r(
    1e-7,
    100.0,
    "Hz",
    "frequencies a well's water column can follow",
);
/// Heads (amplitude, offset, slug, table heads), magnitude. Assumption: the deepest water
/// wells hold a few hundred metres of water above the pump.
pub const HEAD: Range = r(0.0, 2000.0, "m", "heads in water wells");
/// Pumping rates, magnitude. Assumption: the largest water wells yield about 0.5 m³/s.
pub const PUMPING_RATE: Range = r(0.0, 5.0, "m3/s", "yields of water wells");
/// Surge-block stroke. Common practice, no source: 0.3 to 1.5 m; 10 m is far beyond.
pub const SURGE_STROKE: Range = r(1e-3, 10.0, "m", "surge-block strokes are about 1 m");
/// Discharge coefficient of an orifice or clearance: at most 1 by definition.
pub const DISCHARGE_COEFFICIENT: Range = r(1e-3, 1.0, "", "discharge coefficients are at most 1");
/// Swab stroke and submergence. Assumption: bounded by the depth of a water well.
pub const SWAB_LENGTH: Range = r(1e-3, 2000.0, "m", "depths of water wells");
/// Swab lifting speed. Assumption: a winch line runs at up to a few m/s; 100 m/s leaves
/// room for limit cases.
pub const LIFT_RATE: Range = r(1e-4, 100.0, "m/s", "line speeds of a winch");
/// Durations of device phases (lowering, on, off, drain, rotation). Assumption.
pub const PHASE_TIME: Range = r(1e-3, 1e7, "s", "device phases from a millisecond to months");
/// Back-flow volume of a pump column. Assumption: a 2000 m column of 0.3 m pipe holds
/// about 140 m³.
pub const BACKFLOW_VOLUME: Range = r(0.0, 1000.0, "m3", "volumes of pump columns");
/// Nozzle exit velocity. Assumption: jetting tools run at 30 to 100 m/s; 300 m/s is about
/// the speed of a 450 bar water jet.
pub const NOZZLE_VELOCITY: Range = r(1e-3, 300.0, "m/s", "nozzle velocities of jetting tools");
/// Nozzle diameter. Assumption: jetting nozzles are a few millimetres across; 0.1 mm to
/// 0.2 m leaves a wide margin either side.
pub const NOZZLE_DIAMETER: Range = r(1e-4, 0.2, "m", "nozzle diameters of jetting tools");
/// Jet width at the screen. Assumption: at least 0.1 mm — a narrower jet would need
/// sub-microsecond steps to resolve its pass; at most 5 m.
pub const JET_WIDTH: Range = r(1e-4, 5.0, "m", "jet widths at the screen");
/// Ramp length in cycles. Assumption.
pub const RAMP_CYCLES: Range = r(0.0, 1e6, "", "a ramp of at most a million cycles");
/// Cycles or strokes of a drive. Assumption.
pub const COUNT: Range = r(0.0, 1e7, "", "at most ten million cycles");
/// Nozzles on a jetting tool. Assumption.
pub const NOZZLES: Range = r(1.0, 64.0, "", "nozzles on a jetting ring");
/// Cake erosion: critical shear. Assumption: cohesive cakes fail at well under 1000 Pa.
pub const CRITICAL_SHEAR: Range = r(0.0, 1e4, "Pa", "critical shear stresses of cakes");
/// Cake erosion: erodibility. Assumption.
pub const ERODIBILITY: Range = r(0.0, 1.0, "m/(s Pa)", "erodibilities of cakes");
/// Cake erosion: weights and exponent. Assumption.
pub const WEIGHT: Range = r(0.0, 100.0, "", "dimensionless weights of the erosion law");
/// Lift-off pressure of cake patches (median). Documented range 1 kPa to 100 kPa for the
/// pressure that opens a water-based mud cake under back-flow (from memory — verify;
/// assumption: calibrate); the accepted range is wider.
pub const LIFT_OFF_PRESSURE: Range = r(1.0, 1e7, "Pa", "lift-off pressures of wall cakes");
/// Spread (σ of ln strength) of patch strengths. Documented range 0.3 to 1.5 (assumption:
/// calibrate); accepted 0 (one strength) to 5.
pub const LIFT_OFF_SPREAD: Range = r(0.0, 5.0, "", "spreads of ln patch strength");
/// Radius of an opened cake patch. Documented range 1 mm to 25 mm (assumption: calibrate);
/// accepted 10 µm to 1 m.
pub const PATCH_RADIUS: Range = r(1e-5, 1.0, "m", "radii of opened cake patches");
/// Deposited mud fines, volume per bulk volume. Documented range 0.002 to 0.05 (from memory —
/// verify: a few per cent of the bulk fills a sand's pores enough to cut K tenfold).
pub const FINES_DEPOSIT: Range = r(1e-6, 0.5, "", "volume fractions of deposited fines");
/// Critical interstitial velocity of fines mobilisation. Documented range 1e-5 to 1e-2 m/s
/// (from memory — verify; strongly dependent on salinity and pH).
pub const FINES_CRITICAL_VELOCITY: Range = r(0.0, 1.0, "m/s", "critical interstitial velocities");
/// Entrainment and deposition coefficients of the fines rate law. Documented range 1 to
/// 1000 1/m (from memory — verify; assumption: calibrate).
pub const FINES_RATE_COEFFICIENT: Range =
    r(0.0, 1e6, "1/m", "rate coefficients of fines transport");
/// Density of fines' solids. Common practice, no source: quartz 2650, clays 2600 to 2800.
pub const GRAIN_DENSITY: Range = r(1000.0, 8000.0, "kg/m3", "densities of mineral solids");
/// Slot width of a screen. Common practice, no source: slots are about 0.25 to 5 mm.
pub const SLOT_WIDTH: Range = r(1e-5, 0.05, "m", "slot widths of well screens");
/// Collapse rating. Assumption: ratings of well screens and casings reach tens of MPa;
/// 1 GPa is far beyond.
pub const COLLAPSE_RATING: Range = r(1e3, 1e9, "Pa", "collapse ratings of screens and casings");
/// Young's modulus of the pipe. Common practice, no source: thermoplastics about 2.5 GPa,
/// steel about 200 GPa.
pub const YOUNGS_MODULUS: Range = r(1e7, 1e12, "Pa", "Young's moduli of pipe materials");
/// Dimension ratio (outside diameter / wall). Assumption: above 2 for a pipe with a bore,
/// and pipes thinner than 1/1000 of their diameter are not made.
pub const DIMENSION_RATIO: Range = r(
    2.0,
    1000.0,
    "",
    "outside diameter over wall thickness of pipes",
);
/// Safety factor of the collapse check. Assumption.
pub const SAFETY_FACTOR: Range = r(1.0, 100.0, "", "safety factors");
/// Specific gravity of grains. Common practice, no source: quartz 2.65, heavy minerals
/// up to about 5.
pub const SPECIFIC_GRAVITY: Range = r(1.0, 8.0, "", "specific gravities of mineral grains");

/// Total cells of the grid. Assumption: a radial finite-volume model converges with a few
/// hundred cells; 100 000 leaves room for convergence studies and keeps memory small.
pub const MAX_CELLS: f64 = 100_000.0;
/// Cells per decade. Follows from [`MAX_CELLS`] over at least 10 decades.
pub const CELLS_PER_DECADE: Range = r(1.0, 10_000.0, "", "cells per decade of radius");
/// Steps per cycle. Assumption: 1e6 steps per cycle resolves any feature of a cycle.
pub const STEPS_PER_CYCLE: Range = r(4.0, 1e6, "", "steps per cycle");
/// Steps per decade of time. Assumption.
pub const STEPS_PER_DECADE: Range = r(0.1, 1e5, "", "steps per decade of time");
/// Start-up steps after a jump. Assumption.
pub const STARTUP_STEPS: Range = r(0.0, 100.0, "", "start-up steps after a jump");
/// Newton tolerance. Assumption: below 1e-15 round-off dominates; above 1e-2 the result is
/// not converged.
pub const NEWTON_TOLERANCE: Range = r(1e-15, 1e-2, "", "relative residual of the Newton iteration");
/// Newton iterations. Assumption.
pub const NEWTON_ITERATIONS: Range = r(1.0, 1000.0, "", "Newton iterations per step");

fn medium(zone: &str, m: &Medium) -> Result<(), SolverError> {
    CONDUCTIVITY.check(&format!("{zone}.conductivity"), m.conductivity_m_s)?;
    SPECIFIC_STORAGE.check(
        &format!("{zone}.specific_storage"),
        m.specific_storage_per_m,
    )?;
    FORCHHEIMER_BETA.check(
        &format!("{zone}.forchheimer_beta"),
        m.forchheimer_beta_s2_m2,
    )?;
    if let Some(d) = m.grain_diameter_m {
        GRAIN_DIAMETER.check(&format!("{zone}.d50"), d)?;
    }
    Ok(())
}

/// Checks every input of `model` against its range and the geometry that cannot exist.
/// Called by [`Model::validate`] after the basic sign checks.
pub fn check(model: &Model) -> Result<(), SolverError> {
    let w = &model.well;
    RADIUS.check("well.screen_radius", w.screen_radius_m)?;
    RADIUS.check("well.casing_radius", w.casing_radius_m)?;
    SCREEN_LENGTH.check("well.screen_length", w.screen_length_m)?;
    SCREEN_LOSS.check("well.screen_loss", w.linear_loss_s)?;
    WELL_STORAGE.check("well.storage", w.storage_m2)?;
    RADIUS.check("pack.outer_radius", model.pack.outer_radius_m)?;
    let rb = model.pack.outer_radius_m;
    if w.casing_radius_m >= rb {
        return Err(SolverError::invalid(
            "well.casing_radius",
            format!(
                "must be smaller than the borehole radius pack.outer_radius ({rb} m): the \
                 casing sits inside the borehole, got {} m",
                w.casing_radius_m
            ),
        ));
    }
    medium("pack", &model.pack.medium)?;
    if let Some(c) = &model.cake {
        CAKE_THICKNESS.check("cake.thickness", c.thickness_m)?;
        CONDUCTIVITY.check("cake.conductivity", c.conductivity_m_s)?;
        if let Some(l) = &c.lift_off {
            LIFT_OFF_PRESSURE.check("cake.lift_off.median", l.median_pa)?;
            LIFT_OFF_SPREAD.check("cake.lift_off.spread", l.spread)?;
            PATCH_RADIUS.check("cake.lift_off.patch_radius", l.patch_radius_m)?;
        }
        if let Some(e) = &c.erosion {
            CRITICAL_SHEAR.check("cake.erosion.critical_shear", e.critical_shear_pa)?;
            ERODIBILITY.check("cake.erosion.erodibility", e.erodibility_m_s_pa)?;
            WEIGHT.check("cake.erosion.inward_weight", e.inward_weight)?;
            WEIGHT.check("cake.erosion.outward_weight", e.outward_weight)?;
            WEIGHT.check("cake.erosion.coverage_exponent", e.coverage_exponent)?;
        }
    }
    if let Some(z) = &model.invaded {
        INVADED_THICKNESS.check("invaded.thickness", z.thickness_m)?;
        medium("invaded", &z.medium)?;
        if let Some(f) = &z.fines {
            FINES_DEPOSIT.check("invaded.fines.deposit", f.deposit)?;
            FINES_CRITICAL_VELOCITY
                .check("invaded.fines.critical_velocity", f.critical_velocity_m_s)?;
            FINES_RATE_COEFFICIENT.check("invaded.fines.entrainment", f.entrainment_per_m)?;
            FINES_RATE_COEFFICIENT.check("invaded.fines.deposition", f.deposition_per_m)?;
            GRAIN_DENSITY.check("invaded.fines.grain_density", f.grain_density_kg_m3)?;
        }
    }
    medium("formation", &model.formation.medium)?;
    if let Some(r) = model.formation.outer_radius_m {
        OUTER_RADIUS.check("formation.outer_radius", r)?;
    }
    DURATION.check("duration", model.duration_s)?;
    drive(&model.drive, w.casing_radius_m)?;
    numerics(model)
}

fn numerics(model: &Model) -> Result<(), SolverError> {
    let n = &model.numerics;
    match n.grid {
        GridSpec::Total(c) if c as f64 > MAX_CELLS => {
            return Err(SolverError::invalid(
                "numerics.cells",
                format!(
                    "must be at most {MAX_CELLS} (a radial model converges with a few hundred \
                     cells), got {c}"
                ),
            ))
        }
        GridSpec::PerDecade(d) => CELLS_PER_DECADE.check("numerics.cells_per_decade", d)?,
        _ => {}
    }
    let cells = crate::grid::planned_cells(model);
    if !(cells.is_finite() && cells <= MAX_CELLS) {
        return Err(SolverError::invalid(
            "numerics.cells",
            format!(
                "the grid would have {cells:.3e} cells, more than {MAX_CELLS} (a radial model \
                 converges with a few hundred cells); lower numerics.cells or the outer radius"
            ),
        ));
    }
    let outer = crate::grid::Grid::outer_radius(model);
    if !outer.is_finite() {
        return Err(SolverError::invalid(
            "formation.outer_radius",
            format!("the automatic outer radius is not finite ({outer}); give one"),
        ));
    }
    match n.time {
        TimeSpec::StepsPerCycle(s) => {
            STEPS_PER_CYCLE.check("numerics.steps_per_cycle", s as f64)?
        }
        TimeSpec::StepsPerDecade {
            per_decade,
            first_step_s,
        } => {
            STEPS_PER_DECADE.check("numerics.steps_per_decade", per_decade)?;
            TIME_STEP.check("numerics.first_step", first_step_s)?;
        }
        TimeSpec::Fixed(dt) => TIME_STEP.check("numerics.time_step", dt)?,
        TimeSpec::Auto => {}
    }
    STARTUP_STEPS.check("numerics.startup_steps", n.startup_steps as f64)?;
    NEWTON_TOLERANCE.check("numerics.newton_tolerance", n.newton_tolerance)?;
    NEWTON_ITERATIONS.check(
        "numerics.newton_max_iterations",
        n.newton_max_iterations as f64,
    )
}

fn drive(d: &Drive, casing_radius_m: f64) -> Result<(), SolverError> {
    match d {
        Drive::SineHead(s) => {
            HEAD.check_abs("drive.amplitude", s.amplitude_m)?;
            HEAD.check_abs("drive.offset", s.offset_m)?;
            SINE_FREQUENCY.check("drive.frequency", s.frequency_hz)?;
            RAMP_CYCLES.check("drive.ramp_cycles", s.ramp_cycles)
        }
        Drive::ConstantRate { pumping_rate_m3_s } => {
            PUMPING_RATE.check_abs("drive.pumping_rate", *pumping_rate_m3_s)
        }
        Drive::Slug { initial_head_m } => HEAD.check_abs("drive.initial_head", *initial_head_m),
        Drive::Table(t) => {
            let (range, what) = match t.quantity {
                TableQuantity::Head => (HEAD, "head"),
                TableQuantity::PumpingRate => (PUMPING_RATE, "pumping rate"),
            };
            for (i, v) in t.values.iter().enumerate() {
                range
                    .check_abs(&format!("drive.file row {}", i + 1), *v)
                    .map_err(|e| match e {
                        SolverError::InvalidInput { field, reason } => {
                            SolverError::invalid(field, format!("{what} {reason}"))
                        }
                        e => e,
                    })?;
            }
            let last = t.times_s.last().copied().unwrap_or(0.0);
            DURATION.check("drive.file", last).map_err(|_| {
                SolverError::invalid(
                    "drive.file",
                    format!(
                        "the table must span between {} s and {} s ({}), got {} s",
                        show(DURATION.min),
                        show(DURATION.max),
                        DURATION.why,
                        show(last)
                    ),
                )
            })
        }
        Drive::SurgeBlock(b) => surge_block(b, casing_radius_m),
        Drive::Swab(s) => swab(s),
        Drive::PumpBackwash(p) => pump_backwash(p),
        Drive::JetPulse(j) => jet(j),
        Drive::Schedule(stages) => {
            for (k, s) in stages.iter().enumerate() {
                DURATION
                    .check(&format!("drive.stages[{k}].duration"), s.duration_s)
                    .and_then(|_| drive(&s.drive, casing_radius_m))
                    .map_err(|e| match e {
                        SolverError::InvalidInput { field, reason } => SolverError::InvalidInput {
                            field: if field.starts_with("drive.stages[") {
                                field
                            } else {
                                field.replacen("drive", &format!("drive.stages[{k}].drive"), 1)
                            },
                            reason,
                        },
                        e => e,
                    })?;
            }
            Ok(())
        }
    }
}

fn surge_block(b: &SurgeBlock, casing_radius_m: f64) -> Result<(), SolverError> {
    SURGE_STROKE.check("drive.stroke", b.stroke_m)?;
    FREQUENCY.check("drive.frequency", b.frequency_hz)?;
    RADIUS.check("drive.block_radius", b.block_radius_m)?;
    DISCHARGE_COEFFICIENT.check("drive.discharge_coefficient", b.discharge_coefficient)?;
    RAMP_CYCLES.check("drive.ramp_cycles", b.ramp_cycles)?;
    let casing_area = std::f64::consts::PI * casing_radius_m * casing_radius_m;
    if !(b.valve_area_m2.is_finite() && b.valve_area_m2 < casing_area) {
        return Err(SolverError::invalid(
            "drive.valve_area",
            format!(
                "must be smaller than the casing's cross-section ({casing_area:.6} m2, from \
                 well.casing_radius): the valves sit in the block, got {} m2",
                b.valve_area_m2
            ),
        ));
    }
    Ok(())
}

fn swab(s: &Swab) -> Result<(), SolverError> {
    SWAB_LENGTH.check("drive.stroke", s.stroke_m)?;
    SWAB_LENGTH.check("drive.submergence", s.submergence_m)?;
    LIFT_RATE.check("drive.lift_rate", s.lift_rate_m_s)?;
    PHASE_TIME.check("drive.lowering_time", s.lowering_time_s)?;
    RADIUS.check("drive.cup_radius", s.cup_radius_m)?;
    COUNT.check("drive.strokes", s.strokes as f64)?;
    RAMP_CYCLES.check("drive.ramp_cycles", s.ramp_cycles)
}

fn pump_backwash(p: &PumpBackwash) -> Result<(), SolverError> {
    match p.pump {
        PumpLaw::ConstantRate(q) => PUMPING_RATE.check_abs("drive.pumping_rate", q)?,
        PumpLaw::Quadratic { shutoff_head_m, .. } => {
            HEAD.check("drive.pump_curve.shutoff_head", shutoff_head_m)?
        }
        PumpLaw::Table(t) => HEAD.check("drive.pump_curve.points", t.shutoff_head_m())?,
    }
    SWAB_LENGTH.check("drive.intake_depth", p.intake_depth_m)?;
    HEAD.check("drive.discharge_height", p.discharge_height_m)?;
    PHASE_TIME.check("drive.on_time", p.on_time_s)?;
    PHASE_TIME.check("drive.off_time", p.off_time_s)?;
    PHASE_TIME.check("drive.drain_time", p.drain_time_s)?;
    match p.backflow {
        Backflow::Volume(v) => BACKFLOW_VOLUME.check("drive.backflow_volume", v)?,
        Backflow::Riser(a) => {
            RADIUS.check("drive.riser_radius", (a / std::f64::consts::PI).sqrt())?
        }
    }
    COUNT.check("drive.cycles", p.cycles as f64)?;
    RAMP_CYCLES.check("drive.ramp_cycles", p.ramp_cycles)
}

fn jet(j: &JetPulse) -> Result<(), SolverError> {
    NOZZLE_VELOCITY.check("drive.nozzle_velocity", j.nozzle_velocity_m_s)?;
    NOZZLE_DIAMETER.check("drive.nozzle_diameter", j.nozzle_diameter_m)?;
    PUMPING_RATE.check_abs("drive.pumping_rate", j.pumping_rate_m3_s)?;
    PHASE_TIME.check("drive.rotation_period", j.rotation_period_s)?;
    NOZZLES.check("drive.nozzles", j.nozzles as f64)?;
    JET_WIDTH.check("drive.jet_width", j.jet_width_m)?;
    RAMP_CYCLES.check("drive.ramp_cycles", j.ramp_cycles)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn range_message_names_range_and_reason() {
        let e = SCREEN_LENGTH
            .check("well.screen_length", 1e308)
            .unwrap_err();
        assert_eq!(
            e.to_string(),
            "well.screen_length: must be between 0.01 m and 2000 m (screened lengths of \
             water wells), got 1e308 m"
        );
        assert!(SCREEN_LENGTH.check("x", f64::NAN).is_err());
        assert!(SCREEN_LENGTH.check("x", 2000.0).is_ok());
        assert!(HEAD.check_abs("x", -2000.0).is_ok());
        assert!(HEAD.check_abs("x", -2000.1).is_err());
        assert!(HEAD.check_abs("x", f64::INFINITY).is_err());
    }
}
