//! Drives powered by a pump: the `pump_backwash` and `jet_pulse` drive kinds.
//!
//! Keys in user units resolve to the solver's [`PumpBackwash`] and [`JetPulse`] in SI.
//! The back-flow volume of pump-and-backwash is given directly or as the water standing in
//! the pump column (riser radius and length); the jet's screen radius comes from
//! `well.screen_radius`. Assumed values (drain time, jet efficiency) are noted as such.

use super::devices::{Velocity, Volume};
use super::{into_map, read_keys, DriveContext, ParsedDrive};
use crate::case::checks::{non_negative, positive};
use crate::case::error::CaseError;
use crate::case::quantity::{FlowRate, Length, Time, Q};
use crate::summary::G;
use crate::units::{format_si, Quantity};
use boreflux_solver::devices::{Backflow, JetPulse, PumpBackwash, PumpLaw, PumpTable};
use boreflux_solver::water::GRAVITY_M_S2;
use boreflux_solver::Drive;
use schemars::JsonSchema;
use serde::Deserialize;
use serde_json::{json, Map, Value};
use std::f64::consts::PI;

/// Time constant of the drain-back when the case gives none, s. An assumption with no
/// source: it depends on the pump, the column and any foot valve; time it in the field.
pub const DEFAULT_DRAIN_TIME_S: f64 = 5.0;
/// Fraction of the nozzle velocity head that reaches the screen when the case gives none.
/// An assumption with no source (the jet spreads and slows over its standoff).
pub const DEFAULT_JET_EFFICIENCY: f64 = 0.5;
/// Nozzles on the jetting tool when the case gives none (2 or 4 are usual, docs/practice.md
/// §1.8).
pub const DEFAULT_NOZZLES: u32 = 2;
/// Width of the jet where it meets the screen when the case gives none, m: about a
/// 7–10 mm nozzle held within 13 mm of the screen (docs/practice.md §1.8), spread a little.
pub const DEFAULT_JET_WIDTH_M: f64 = 0.010;

/// A pump's head–flow curve: a quadratic through its shut-off head and one rated point
/// (`shutoff_head`, `rated_rate`, `rated_head`), or the maker's curve read at points
/// (`points`), one of the two.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct PumpCurveKeys {
    /// Head at zero flow (shut-off head).
    pub shutoff_head: Option<Q<Length>>,
    /// Rate at the rated point.
    pub rated_rate: Option<Q<FlowRate>>,
    /// Head at the rated point, below the shut-off head.
    pub rated_head: Option<Q<Length>>,
    /// Points of the curve `[[rate_m3_s, head_m], …]` in SI, from the shut-off head at
    /// rate 0, rates increasing and heads falling (2 to 16 points); read by monotone
    /// cubic interpolation, the rate held beyond the last point.
    pub points: Option<Vec<[f64; 2]>>,
}

/// Keys of `pump_backwash`: the pump as a constant `pumping_rate` or a `pump_curve`; the
/// back-flow as `backflow_volume`, or as the riser's contents (`riser_radius`).
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct PumpBackwashKeys {
    /// Constant pumping rate while the pump runs, positive = withdrawal; or give
    /// `pump_curve`.
    pub pumping_rate: Option<Q<FlowRate>>,
    /// Head–flow curve of the pump (H = H0 − a Q² through the shut-off head and a rated
    /// point): the rate then falls as the well is drawn down; or give `pumping_rate`.
    pub pump_curve: Option<PumpCurveKeys>,
    /// Pump running time per cycle.
    pub on_time: Q<Time>,
    /// Pump stopped time per cycle.
    pub off_time: Q<Time>,
    /// Depth of the pump intake below the static level: the pump breaks suction when the
    /// level reaches it.
    pub intake_depth: Q<Length>,
    /// Height of the discharge above the static level (the pump lifts to it; the riser is
    /// full up to it when the pump stops) [0 m, an assumption: give it].
    pub discharge_height: Option<Q<Length>>,
    /// Volume that drains back at each stop; or give `riser_radius`.
    pub backflow_volume: Option<Q<Volume>>,
    /// Inside radius of the pump column: at each stop its contents above the well level
    /// drain back into the well.
    pub riser_radius: Option<Q<Length>>,
    /// Time constant of the drain-back [5 s, an assumption: time it in the field].
    pub drain_time: Option<Q<Time>>,
    /// Number of cycles, after which the well recovers [0 = cycles for the whole run].
    pub cycles: Option<u32>,
    /// The pumping rate grows linearly from 0 over this many cycles, a gentle start [0].
    pub ramp_cycles: Option<f64>,
}

/// The back-flow and how it was found.
fn backflow(k: &PumpBackwashKeys) -> Result<(Backflow, Option<String>), CaseError> {
    match (&k.backflow_volume, &k.riser_radius) {
        (Some(v), None) => Ok((
            Backflow::Volume(non_negative(
                "drive.backflow_volume",
                v.si("drive.backflow_volume")?,
                "m3",
            )?),
            None,
        )),
        (None, Some(r)) => {
            let r = positive("drive.riser_radius", r.si("drive.riser_radius")?, "m")?;
            let a = PI * r * r;
            Ok((
                Backflow::Riser(a),
                Some(format!(
                    "back-flow from the riser: inside area pi x ({})^2 = {}; at each stop its \
                     contents above the well level, area x (discharge height - well head), \
                     drain back",
                    format_si(r, Quantity::Length),
                    format_si(a, Quantity::Area),
                )),
            ))
        }
        (Some(_), Some(_)) => Err(CaseError::new(
            "drive.backflow_volume",
            "give either backflow_volume or riser_radius, not both",
        )),
        (None, None) => Err(CaseError::new(
            "drive.backflow_volume",
            "required key is missing (or give riser_radius)",
        )),
    }
}

/// The pump law and a note describing it.
fn pump_law(k: &PumpBackwashKeys) -> Result<(PumpLaw, String), CaseError> {
    match (&k.pumping_rate, &k.pump_curve) {
        (Some(q), None) => {
            let q = positive("drive.pumping_rate", q.si("drive.pumping_rate")?, "m3/s")?;
            Ok((
                PumpLaw::ConstantRate(q),
                format!(
                    "pumping {} whatever the lift (until the level reaches the intake)",
                    format_si(q, Quantity::FlowRate)
                ),
            ))
        }
        (None, Some(c)) if c.points.is_some() => {
            if c.shutoff_head.is_some() || c.rated_rate.is_some() || c.rated_head.is_some() {
                return Err(CaseError::new(
                    "drive.pump_curve.points",
                    "give either points or shutoff_head, rated_rate and rated_head, not both",
                ));
            }
            let pts: Vec<(f64, f64)> = c
                .points
                .as_ref()
                .expect("points were given")
                .iter()
                .map(|p| (p[0], p[1]))
                .collect();
            let table = PumpTable::new(&pts).map_err(CaseError::from)?;
            Ok((
                PumpLaw::Table(table),
                format!(
                    "pump curve through {} points (shut-off head {}), monotone cubic between \
                     them, the rate held beyond the last ({} at {}): the rate falls as the \
                     lift from the well level to the discharge grows",
                    pts.len(),
                    format_si(table.shutoff_head_m(), Quantity::Head),
                    format_si(pts[pts.len() - 1].0, Quantity::FlowRate),
                    format_si(pts[pts.len() - 1].1, Quantity::Head),
                ),
            ))
        }
        (None, Some(c)) => {
            let need = |v: &Option<Q<Length>>, f: &str| {
                v.as_ref()
                    .ok_or_else(|| CaseError::new(f, "required key is missing (or give points)"))
                    .and_then(|q| q.si(f))
            };
            let h0 = positive(
                "drive.pump_curve.shutoff_head",
                need(&c.shutoff_head, "drive.pump_curve.shutoff_head")?,
                "m",
            )?;
            let qr = positive(
                "drive.pump_curve.rated_rate",
                c.rated_rate
                    .as_ref()
                    .ok_or_else(|| {
                        CaseError::new(
                            "drive.pump_curve.rated_rate",
                            "required key is missing (or give points)",
                        )
                    })?
                    .si("drive.pump_curve.rated_rate")?,
                "m3/s",
            )?;
            let hr = non_negative(
                "drive.pump_curve.rated_head",
                need(&c.rated_head, "drive.pump_curve.rated_head")?,
                "m",
            )?;
            if hr >= h0 {
                return Err(CaseError::new(
                    "drive.pump_curve.rated_head",
                    format!("must be below the shut-off head ({h0} m), got {hr} m"),
                ));
            }
            let a = (h0 - hr) / (qr * qr);
            Ok((
                PumpLaw::Quadratic {
                    shutoff_head_m: h0,
                    coefficient_s2_m5: a,
                },
                format!(
                    "pump curve H = {} - {} s2/m5 x Q^2 (through the shut-off head and {} at \
                     {}): the rate falls as the lift from the well level to the discharge grows",
                    format_si(h0, Quantity::Head),
                    G(a, 4),
                    format_si(hr, Quantity::Head),
                    format_si(qr, Quantity::FlowRate),
                ),
            ))
        }
        (Some(_), Some(_)) => Err(CaseError::new(
            "drive.pump_curve",
            "give either pumping_rate or pump_curve, not both",
        )),
        (None, None) => Err(CaseError::new(
            "drive.pumping_rate",
            "required key is missing (or give pump_curve)",
        )),
    }
}

/// Parser of the `pump_backwash` drive (registered in [`super::DRIVE_KINDS`]).
pub fn pump_backwash(
    map: Map<String, Value>,
    _ctx: &DriveContext<'_>,
) -> Result<ParsedDrive, CaseError> {
    let k: PumpBackwashKeys = read_keys(map)?;
    let (backflow, riser_note) = backflow(&k)?;
    let (pump, pump_note) = pump_law(&k)?;
    let mut notes = Vec::new();
    let drain_time_s = match &k.drain_time {
        Some(q) => positive("drive.drain_time", q.si("drive.drain_time")?, "s")?,
        None => {
            notes.push(format!(
                "drain time not given: {}, an assumption with no source; the drain-back rate \
                 depends on the pump and column, time it in the field",
                format_si(DEFAULT_DRAIN_TIME_S, Quantity::Time)
            ));
            DEFAULT_DRAIN_TIME_S
        }
    };
    let discharge_height_m = match &k.discharge_height {
        Some(q) => non_negative(
            "drive.discharge_height",
            q.si("drive.discharge_height")?,
            "m",
        )?,
        None => {
            notes.push(
                "discharge height not given: 0 m (the discharge at the static level), an \
                 assumption: give drive.discharge_height (it sets the lift on a pump curve and \
                 the riser's contents)"
                    .to_owned(),
            );
            0.0
        }
    };
    let p = PumpBackwash {
        pump,
        on_time_s: positive("drive.on_time", k.on_time.si("drive.on_time")?, "s")?,
        off_time_s: positive("drive.off_time", k.off_time.si("drive.off_time")?, "s")?,
        intake_depth_m: positive(
            "drive.intake_depth",
            k.intake_depth.si("drive.intake_depth")?,
            "m",
        )?,
        discharge_height_m,
        backflow,
        drain_time_s,
        cycles: k.cycles.unwrap_or(0),
        ramp_cycles: non_negative_ramp(k.ramp_cycles)?,
    };
    let drained = 1.0 - (-p.off_time_s / p.drain_time_s).exp();
    notes.insert(
        0,
        format!(
            "drive: pump and backwash, {pump_note}; on for {}, stopped for {} (a cycle every \
             {}, {}); intake {} below the static level (the pump breaks suction there), \
             discharge {} above it; the back-flow drains with time constant {}, {:.1} % of it \
             before the pump restarts",
            format_si(p.on_time_s, Quantity::Time),
            format_si(p.off_time_s, Quantity::Time),
            format_si(p.period_s(), Quantity::Time),
            match p.cycles {
                0 => "for the whole run".to_owned(),
                n => format!("{n} cycles, then recovery"),
            },
            format_si(p.intake_depth_m, Quantity::Length),
            format_si(p.discharge_height_m, Quantity::Length),
            format_si(p.drain_time_s, Quantity::Time),
            100.0 * drained
        ),
    );
    notes.extend(riser_note);
    notes.push(
        "pump and backwash: letting the column drain back through the pump is forbidden by \
         some specifications; never restart a pump while its shaft still turns backwards, and \
         follow the pump maker's limits on starts per hour"
            .to_owned(),
    );
    let mut resolved = into_map(json!({
        "on_time": p.on_time_s,
        "off_time": p.off_time_s,
        "intake_depth": p.intake_depth_m,
        "discharge_height": p.discharge_height_m,
        "drain_time": p.drain_time_s,
        "cycles": p.cycles,
        "ramp_cycles": p.ramp_cycles,
    }));
    match p.pump {
        PumpLaw::ConstantRate(q) => {
            resolved.insert("pumping_rate".to_owned(), json!(q));
        }
        PumpLaw::Quadratic { .. } => {
            let c = k.pump_curve.as_ref().expect("a curve was read");
            let si = |v: &Option<Q<Length>>, f: &str| v.as_ref().map(|q| q.si(f)).transpose();
            resolved.insert(
                "pump_curve".to_owned(),
                json!({
                    "shutoff_head": si(&c.shutoff_head, "drive.pump_curve.shutoff_head")?,
                    "rated_rate": c.rated_rate.as_ref().map(|q| q.si("drive.pump_curve.rated_rate")).transpose()?,
                    "rated_head": si(&c.rated_head, "drive.pump_curve.rated_head")?,
                }),
            );
        }
        PumpLaw::Table(_) => {
            let c = k.pump_curve.as_ref().expect("a curve was read");
            resolved.insert("pump_curve".to_owned(), json!({ "points": c.points }));
        }
    }
    match p.backflow {
        Backflow::Volume(v) => {
            resolved.insert("backflow_volume".to_owned(), json!(v));
        }
        Backflow::Riser(_) => {
            let r = k.riser_radius.as_ref().expect("a riser was read");
            resolved.insert(
                "riser_radius".to_owned(),
                json!(r.si("drive.riser_radius")?),
            );
        }
    }
    Ok(ParsedDrive {
        resolved,
        drive: Drive::PumpBackwash(p),
        notes,
    })
}

/// Keys of `jet_pulse`: the jet as `nozzle_velocity` or as the pump's `jet_rate` through
/// the nozzles (exactly one), with the nozzles' number and diameter.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct JetPulseKeys {
    /// Nozzle exit velocity (a velocity: "45 m/s", "150 ft/s"); or give `jet_rate`.
    pub nozzle_velocity: Option<Q<Velocity>>,
    /// Rate the jetting pump sends through all nozzles; or give `nozzle_velocity`.
    pub jet_rate: Option<Q<FlowRate>>,
    /// Inside diameter of each nozzle (7–10 mm is usual).
    pub nozzle_diameter: Q<Length>,
    /// Fraction of the velocity head that reaches the screen, in (0, 1] [0.5, an
    /// assumption with no source: calibrate it].
    pub efficiency: Option<f64>,
    /// Time for one turn of the jetting tool.
    pub rotation_period: Q<Time>,
    /// Number of nozzles on the ring, at least 1 [2].
    pub nozzles: Option<u32>,
    /// Width of the jet where it meets the screen [10 mm].
    pub jet_width: Option<Q<Length>>,
    /// Rate pumped out of the well while jetting, positive = withdrawal [0].
    pub pumping_rate: Option<Q<FlowRate>>,
    /// The jet grows linearly from 0 over this many passes, a gentle start [0].
    pub ramp_cycles: Option<f64>,
}

/// Parser of the `jet_pulse` drive (registered in [`super::DRIVE_KINDS`]).
pub fn jet_pulse(
    map: Map<String, Value>,
    ctx: &DriveContext<'_>,
) -> Result<ParsedDrive, CaseError> {
    let k: JetPulseKeys = read_keys(map)?;
    let mut notes = Vec::new();
    let efficiency = match k.efficiency {
        Some(e) => e,
        None => {
            notes.push(format!(
                "jet efficiency not given: {DEFAULT_JET_EFFICIENCY}, an assumption with no \
                 source (the share of the nozzle's velocity head that reaches the screen); \
                 calibrate it"
            ));
            DEFAULT_JET_EFFICIENCY
        }
    };
    if !(efficiency > 0.0 && efficiency <= 1.0) {
        return Err(CaseError::new(
            "drive.efficiency",
            format!("must be in (0, 1], got {efficiency}"),
        ));
    }
    let nozzles = k.nozzles.unwrap_or(DEFAULT_NOZZLES);
    if nozzles == 0 {
        return Err(CaseError::new("drive.nozzles", "must be at least 1, got 0"));
    }
    let d = positive(
        "drive.nozzle_diameter",
        k.nozzle_diameter.si("drive.nozzle_diameter")?,
        "m",
    )?;
    let area = nozzles as f64 * 0.25 * PI * d * d;
    let velocity = match (&k.nozzle_velocity, &k.jet_rate) {
        (Some(v), None) => positive(
            "drive.nozzle_velocity",
            v.si("drive.nozzle_velocity")?,
            "m/s",
        )?,
        (None, Some(q)) => positive("drive.jet_rate", q.si("drive.jet_rate")?, "m3/s")? / area,
        (Some(_), Some(_)) => {
            return Err(CaseError::new(
                "drive.jet_rate",
                "give either nozzle_velocity or jet_rate, not both",
            ))
        }
        (None, None) => {
            return Err(CaseError::new(
                "drive.nozzle_velocity",
                "required key is missing (or give jet_rate)",
            ))
        }
    };
    let j = JetPulse {
        nozzle_velocity_m_s: velocity,
        nozzle_diameter_m: d,
        nozzles,
        efficiency,
        rotation_period_s: positive(
            "drive.rotation_period",
            k.rotation_period.si("drive.rotation_period")?,
            "s",
        )?,
        jet_width_m: match &k.jet_width {
            Some(q) => positive("drive.jet_width", q.si("drive.jet_width")?, "m")?,
            None => DEFAULT_JET_WIDTH_M,
        },
        screen_radius_m: ctx.well.screen_radius_m,
        screen_length_m: ctx.well.screen_length_m,
        well_storage_m2: ctx.well.storage_m2,
        pumping_rate_m3_s: match &k.pumping_rate {
            Some(q) => non_negative("drive.pumping_rate", q.si("drive.pumping_rate")?, "m3/s")?,
            None => 0.0,
        },
        ramp_cycles: non_negative_ramp(k.ramp_cycles)?,
    };
    let head = j.pulse_head_m();
    let q_j = j.jet_flow_m3_s();
    notes.insert(
        0,
        format!(
            "drive: jetting, {} nozzles of {} at {} deliver {} into the well{}; stagnation \
             head at the screen eta v^2/(2g) = {} ({}) on the {:.3} % of the screen under the \
             jets (width {}), so the screen's area-weighted head is {} above the in-well \
             head; one turn every {}",
            j.nozzles,
            format_si(d, Quantity::Length),
            format_si(j.nozzle_velocity_m_s, Quantity::Velocity),
            format_si(q_j, Quantity::FlowRate),
            if j.pumping_rate_m3_s > 0.0 {
                format!(
                    " while {} is pumped out",
                    format_si(j.pumping_rate_m3_s, Quantity::FlowRate)
                )
            } else {
                String::new()
            },
            format_si(head, Quantity::Head),
            format_si(head * ctx.density_kg_m3 * GRAVITY_M_S2, Quantity::Pressure),
            100.0 * j.share(),
            format_si(j.jet_width_m, Quantity::Length),
            format_si(j.share() * head, Quantity::Head),
            format_si(j.rotation_period_s, Quantity::Time),
        ),
    );
    if j.pumping_rate_m3_s < 1.15 * q_j {
        notes.push(format!(
            "jetting: the well is pumped at {} against {} of jet flow; specifications ask for \
             pumping at 115 % or more of the jet flow (docs/practice.md §1.8) so that the jetted \
             water and fines leave the well instead of the formation taking them",
            format_si(j.pumping_rate_m3_s, Quantity::FlowRate),
            format_si(q_j, Quantity::FlowRate)
        ));
    }
    notes.push(
        "jet_pulse: a one-dimensional radial model carries the jets' volume and their \
         area-weighted excess head only; the push at the jet itself (the full stagnation head \
         on the footprint as the jet passes) is averaged over the screen, so flow, gradient \
         and shear at the footprint are understated"
            .to_owned(),
    );
    notes.push(
        "jet_pulse: high-pressure jetting lines can injure; a jet held on one spot can cut a \
         screen (thermoplastic above all) or wash out the pack; follow the specification, the \
         pump and screen makers and site safety rules"
            .to_owned(),
    );
    Ok(ParsedDrive {
        resolved: into_map(json!({
            "nozzle_velocity": j.nozzle_velocity_m_s,
            "nozzle_diameter": j.nozzle_diameter_m,
            "efficiency": j.efficiency,
            "rotation_period": j.rotation_period_s,
            "nozzles": j.nozzles,
            "jet_width": j.jet_width_m,
            "pumping_rate": j.pumping_rate_m3_s,
            "ramp_cycles": j.ramp_cycles,
        })),
        drive: Drive::JetPulse(j),
        notes,
    })
}

/// `drive.ramp_cycles` [0]: zero or positive.
fn non_negative_ramp(v: Option<f64>) -> Result<f64, CaseError> {
    match v {
        None => Ok(0.0),
        Some(x) if x.is_finite() && x >= 0.0 => Ok(x),
        Some(x) => Err(CaseError::new(
            "drive.ramp_cycles",
            format!("must be zero or positive, got {x}"),
        )),
    }
}
