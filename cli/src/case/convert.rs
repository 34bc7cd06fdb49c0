//! From the raw case to the checked solver model: fluid first (its density turns pressures
//! into heads), then the zones from the formation inward (the pack and the invaded zone
//! default to the formation's storage), then drive, duration and numerics, and finally
//! `Model::validate`, whose field paths are mapped to the case-file keys.

use super::drives::{parse_drive, run_duration, stepping_period, DriveContext};
use super::error::CaseError;
use super::numerics::{numerics, resolved as resolved_numerics};
use super::raw::{RawCase, RawNumerics};
use super::zones::{cake, formation, invaded, pack, well};
use super::{LoadedCase, Log};
use crate::units::{format_si, Quantity};
use boreflux_solver::grid::auto_outer_radius;
use boreflux_solver::model::{Fluid, Multiscale, TimeSpec};
use boreflux_solver::run::default_first_step;
use boreflux_solver::water::{Water, FIT_RANGE_MAX_C, FIT_RANGE_MIN_C};
use boreflux_solver::Model;
use serde_json::{json, Map, Value};
use std::path::Path;

/// Water temperature when the case gives none: 15 °C, in K (docs/formats.md default).
pub const DEFAULT_TEMPERATURE_K: f64 = 288.15;
/// Offset between kelvin and degrees Celsius, K.
const CELSIUS_ZERO_K: f64 = 273.15;

/// Converts a raw case into a checked model; `base_dir` resolves drive files.
pub fn convert(raw: RawCase, base_dir: &Path) -> Result<LoadedCase, CaseError> {
    for (field, text) in [("title", &raw.title), ("description", &raw.description)] {
        if text.as_deref().is_some_and(|t| t.contains('\0')) {
            return Err(CaseError::new(
                field,
                "contains a NUL character (\\u0000), which result files cannot store; remove it",
            ));
        }
    }
    let mut log = Log::default();
    let (fluid, water, fluid_json) = fluid(&raw, &mut log)?;
    let (well, mut safety, well_json) = well(&raw.well, &mut log)?;
    let mut formation_log = Log::default();
    let (formation, gs, formation_json) = formation(&raw.formation, &mut formation_log)?;
    safety.formation_specific_gravity = gs;
    let (pack, pack_json) = pack(&raw.pack, &water, &formation.medium, &mut log)?;
    let cake = raw.cake.as_ref().map(|c| cake(c, &mut log)).transpose()?;
    let invaded = raw
        .invaded
        .as_ref()
        .map(|z| invaded(z, &formation.medium, &mut log))
        .transpose()?;
    log.append(formation_log);
    let ctx = DriveContext {
        base_dir,
        density_kg_m3: fluid.density_kg_m3,
        temperature_c: fluid_json["temperature"]
            .as_f64()
            .unwrap_or(DEFAULT_TEMPERATURE_K)
            - CELSIUS_ZERO_K,
        well: &well,
    };
    let drive = parse_drive(raw.drive.clone(), &ctx)?;
    for n in &drive.notes {
        log.note(n.clone());
    }
    let mut well = well;
    let mut well_json = well_json;
    column_length(&raw.well, &mut well, &drive.drive, &mut well_json, &mut log)?;
    let duration_s = run_duration(raw.duration.as_ref(), &drive.drive)?;
    let raw_numerics = raw.numerics.unwrap_or_default();
    let num = numerics(&raw_numerics, stepping_period(&drive.drive))?;
    let mut model = Model {
        fluid,
        well,
        pack,
        cake: cake.as_ref().map(|c| c.0),
        invaded: invaded.as_ref().map(|z| z.0.clone()),
        formation,
        drive: drive.drive,
        duration_s,
        numerics: num.numerics,
    };
    if num.needs_default_first_step {
        let first = default_first_step(&model);
        if let TimeSpec::StepsPerDecade { first_step_s, .. } = &mut model.numerics.time {
            *first_step_s = first;
        }
    }
    model
        .validate()
        .map_err(|e| rate_key_as_written(CaseError::from(e), &raw.drive))?;
    time_notes(&model, &raw_numerics, &mut log);
    let (assessment, rate_source, assessment_json) =
        super::assessment::plan(raw.assessment.as_ref(), &model)?;
    log.note(format!(
        "virtual tests: design rate {} L/s, {rate_source}; constant rate for {} h; steps \
         at {:?} of it, {} h each",
        crate::summary::G(assessment.design_rate_m3_s * 1e3, 4),
        crate::summary::G(assessment.constant_duration_s / 3600.0, 4),
        assessment.step_fractions,
        crate::summary::G(assessment.step_duration_s / 3600.0, 4),
    ));

    let mut resolved = Map::new();
    resolved.insert(
        "title".to_owned(),
        json!(raw.title.clone().unwrap_or_default()),
    );
    resolved.insert(
        "description".to_owned(),
        json!(raw.description.clone().unwrap_or_default()),
    );
    resolved.insert("fluid".to_owned(), fluid_json);
    resolved.insert("well".to_owned(), well_json);
    resolved.insert("pack".to_owned(), pack_json);
    if let Some((_, c)) = cake {
        resolved.insert("cake".to_owned(), c);
    }
    if let Some((_, z)) = invaded {
        resolved.insert("invaded".to_owned(), z);
    }
    resolved.insert("formation".to_owned(), formation_json);
    resolved.insert("drive".to_owned(), Value::Object(drive.resolved));
    resolved.insert("duration".to_owned(), json!(duration_s));
    resolved.insert(
        "numerics".to_owned(),
        resolved_numerics(&model.numerics, num.output_every),
    );
    resolved.insert("assessment".to_owned(), assessment_json);
    let (storage, output_json) = super::output::storage(raw.output.as_ref(), &model)?;
    resolved.insert("output".to_owned(), output_json);
    Ok(LoadedCase {
        model,
        title: raw.title.unwrap_or_default(),
        description: raw.description.unwrap_or_default(),
        resolved: Value::Object(resolved),
        safety,
        output_every: num.output_every,
        storage,
        assessment,
        notes: log.notes,
        warnings: log.warnings,
    })
}

/// The water column above the screen (docs/physics.md §24): its length D from the case or
/// the deepest tool, and the effective length the solver uses,
/// `L_e = D + (r_c/r_s)² b/2` (the column plus half the screen's water moving at the
/// screen's mean speed; Kipp 1985, Water Resour. Res. 21(9), cited from memory — verify).
fn column_length(
    raw: &super::raw::RawWell,
    well: &mut boreflux_solver::model::Well,
    drive: &boreflux_solver::drive::Drive,
    well_json: &mut Value,
    log: &mut Log,
) -> Result<(), CaseError> {
    let field = "well.column_length";
    let given = raw
        .column_length
        .as_ref()
        .map(|q| q.si(field))
        .transpose()?;
    let d = match given {
        Some(d) if !(d.is_finite() && d >= 0.0) => {
            return Err(CaseError::new(
                field,
                format!("must be zero or positive (a depth below the static level), got {d} m"),
            ))
        }
        Some(d) => d,
        None => {
            let d = drive.deepest_tool_m();
            log.note(format!(
                "well.column_length not given: {d} m, the deepest tool's depth (assumption: measure the depth of the screen's top below the static water level)"
            ));
            d
        }
    };
    let ratio = well.casing_radius_m / well.screen_radius_m;
    let le = d + ratio * ratio * well.screen_length_m / 2.0;
    well.column_length_m = le;
    log.note(format!(
        "water column: {d} m above the screen, effective length {le:.3} m with half the screen's water (column inertia, natural period 2 pi sqrt(L/g) = {:.2} s for the whole column)",
        2.0 * std::f64::consts::PI * (le / boreflux_solver::water::GRAVITY_M_S2).sqrt()
    ));
    if let Value::Object(m) = well_json {
        m.insert("column_length".to_owned(), json!(d));
    }
    Ok(())
}

fn fluid(raw: &RawCase, log: &mut Log) -> Result<(Fluid, Water, Value), CaseError> {
    let field = "fluid.temperature";
    let t_k = match raw.fluid.as_ref().and_then(|f| f.temperature.as_ref()) {
        Some(q) => q.si(field)?,
        None => DEFAULT_TEMPERATURE_K,
    };
    let t_c = t_k - CELSIUS_ZERO_K;
    if !(0.0..100.0).contains(&t_c) {
        return Err(CaseError::new(
            field,
            format!(
                "must be liquid water, between 0 and 100 degC, got {} K ({t_c:.2} degC); \
                 a bare number is kelvin, write e.g. \"12 degC\"",
                // To the micro-kelvin: the degC → K sum's round-off is not shown.
                (t_k * 1e6).round() / 1e6
            ),
        ));
    }
    if !(FIT_RANGE_MIN_C..=FIT_RANGE_MAX_C).contains(&t_c) {
        log.warn(format!(
            "fluid.temperature {t_c:.2} degC is outside 0-40 degC, where the water density \
             and viscosity formulas were fitted; they are extrapolated"
        ));
    }
    let water = Water::at_celsius(t_c);
    log.note(format!(
        "water at {t_c:.2} degC: density {:.3} kg/m3, viscosity {:.5e} Pa s",
        water.density_kg_m3, water.viscosity_pa_s
    ));
    let fluid = Fluid {
        density_kg_m3: water.density_kg_m3,
        viscosity_pa_s: water.viscosity_pa_s,
    };
    Ok((fluid, water, json!({ "temperature": t_k })))
}

fn time_notes(model: &Model, raw: &RawNumerics, log: &mut Log) {
    let si = format_si;
    match model.formation.outer_radius_m {
        Some(r) => log.note(format!(
            "outer radius as given: {}",
            si(r, Quantity::Length)
        )),
        None => log.note(format!(
            "outer radius (auto, from the drive's penetration depth in the formation): {}",
            si(auto_outer_radius(model), Quantity::Length)
        )),
    }
    let d = model.duration_s;
    let default = match raw.steps_per_cycle.as_ref().map(|v| &v.0) {
        None => ", the default",
        Some(Value::String(s)) if s == "auto" => ", the default",
        _ => "",
    };
    match (model.numerics.time, model.drive.period_s()) {
        (TimeSpec::StepsPerCycle(n), Some(p)) => log.note(format!(
            "time step: {} ({n} steps per cycle{default}); {} cycles in {}",
            si(p / n as f64, Quantity::Time),
            si(d / p, Quantity::Dimensionless),
            si(d, Quantity::Time)
        )),
        (
            TimeSpec::StepsPerDecade {
                per_decade,
                first_step_s,
            },
            _,
        ) => log.note(format!(
            "time steps: geometric, {per_decade} per decade from {} to {}",
            si(first_step_s, Quantity::Time),
            si(d, Quantity::Time)
        )),
        (TimeSpec::Fixed(dt), _) => log.note(format!(
            "time step: fixed {}, about {} steps in {}",
            si(dt, Quantity::Time),
            (d / dt).ceil(),
            si(d, Quantity::Time)
        )),
        _ => {}
    }
    if let Multiscale::Auto { tolerance } = model.numerics.multiscale {
        log.note(format!(
            "cycle jumping (numerics.multiscale): auto, tolerance {tolerance:e}{}; cycles are \
             jumped over where the state changes smoothly (\"off\" steps every cycle)",
            if raw.multiscale.is_none() {
                ", the default"
            } else {
                ""
            }
        ));
    }
}

/// A drive's rate is checked as `frequency` in Hz; when the case gave `strokes_per_minute`
/// or `period` instead, the error names the key the user wrote.
fn rate_key_as_written(mut e: CaseError, drive: &Map<String, Value>) -> CaseError {
    let Some(prefix) = e.field.strip_suffix(".frequency") else {
        return e;
    };
    // "drive" or "drive.stages[k].drive": find that object in the case as written.
    let object = match prefix.strip_prefix("drive.stages[") {
        None if prefix == "drive" => Some(drive),
        None => None,
        Some(rest) => rest
            .split_once(']')
            .and_then(|(k, _)| k.parse::<usize>().ok())
            .and_then(|k| drive.get("stages")?.get(k)?.get("drive")?.as_object()),
    };
    let Some(object) = object.filter(|o| !o.contains_key("frequency")) else {
        return e;
    };
    for (key, how) in [
        ("strokes_per_minute", "strokes_per_minute / 60"),
        ("period", "1 / period"),
    ] {
        if object.contains_key(key) {
            e.field = format!("{prefix}.{key}");
            e.message = format!("as a frequency ({how}) {}", e.message);
            break;
        }
    }
    e
}
