//! Tools stroked in the casing: the `surge_block` and `swab` drive kinds.
//!
//! Both read the casing radius from `well.casing_radius` (the inside radius where the
//! tool works), take their keys in user units and resolve them to the solver's
//! [`SurgeBlock`] and [`Swab`] in SI. The solver's assumptions are stated on those types;
//! the notes here repeat the ones a user should see in `check`.

use super::{into_map, read_keys, DriveContext, ParsedDrive};
use crate::case::checks::{non_negative, positive};
use crate::case::error::CaseError;
use crate::case::quantity::Pressure;
use crate::case::quantity::{Area, Force, Frequency, Kind, Length, Time, Q};
use crate::summary::G;
use crate::units::{format_si, Quantity};
use boreflux_solver::devices::{net_atmospheric_head_m, Kinematics, SurgeBlock, Swab};
use boreflux_solver::water::{vapour_pressure_pa, GRAVITY_M_S2, STANDARD_ATMOSPHERE_PA};
use boreflux_solver::Drive;
use schemars::JsonSchema;
use serde::Deserialize;
use serde_json::{json, Map, Value};
use std::f64::consts::PI;

/// Velocity, m/s (lift rate, nozzle velocity).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Velocity {}

impl Kind for Velocity {
    const Q: Quantity = Quantity::Velocity;
    const NAME: &'static str = "Velocity";
}

/// Volume, m³ (back-flow volume).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Volume {}

impl Kind for Volume {
    const Q: Quantity = Quantity::Volume;
    const NAME: &'static str = "Volume";
}

/// Radial clearance between a surge block's discs and the casing when the case gives no
/// `block_radius`, m: 1.5 mm. The discs of a surge block are cut to about the casing's inside
/// diameter (docs/practice.md §1.2, common practice) and the water leaks past their rim; how
/// much depends on wear and fit. Assumption: measure it in the field. (The block's body,
/// about 25 mm smaller than the casing, does not set the leak while the discs seal.)
pub const DEFAULT_DISC_CLEARANCE_M: f64 = 0.0015;
/// Depth of a surge block below the static level when the case gives none, m. Assumption:
/// give the depth; the vapour bound of the suction under the block, and with it the
/// largest collapse load, grows with it.
pub const DEFAULT_BLOCK_DEPTH_M: f64 = 5.0;
/// Discharge coefficient of the clearance and valves when the case gives none: a
/// sharp-edged orifice (from memory, the value used for the screen slots too).
pub const DEFAULT_BLOCK_DISCHARGE_COEFFICIENT: f64 = 0.6;
/// Seconds per minute, for strokes per minute.
const MINUTE_S: f64 = 60.0;

/// How the block moves over a stroke.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum KinematicsName {
    /// Block speed varies as a sine, from rest at the bottom of the stroke.
    Sinusoidal,
    /// Constant speed with linear reversals of `reversal_time` at each end.
    Trapezoidal,
}

/// Keys of `surge_block`.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct SurgeBlockKeys {
    /// Radius of the block where water leaks past it, i.e. of its discs [well.casing_radius
    /// − 1.5 mm: discs cut to about the casing's inside diameter; an assumption, measure the
    /// clearance in the field].
    pub block_radius: Option<Q<Length>>,
    /// Depth of the block below the static water level [5 m, an assumption: give it]. The
    /// suction under the block cannot pull the water below its vapour pressure there.
    pub depth: Option<Q<Length>>,
    /// Atmospheric pressure on the water in the well [101325 Pa, the standard atmosphere at
    /// sea level; give the local value at altitude].
    pub atmospheric_pressure: Option<Q<Pressure>>,
    /// Stroke length, bottom to top.
    pub stroke: Q<Length>,
    /// Strokes (full up-and-down cycles) per unit time: Hz, strokes/min, spm, …; or give
    /// `strokes_per_minute`.
    pub frequency: Option<Q<Frequency>>,
    /// Strokes per minute as a plain number, instead of `frequency`.
    pub strokes_per_minute: Option<f64>,
    /// How the block moves: "sinusoidal" or "trapezoidal" [sinusoidal].
    pub kinematics: Option<KinematicsName>,
    /// Time to reverse at each end of the stroke; required for, and only for,
    /// "trapezoidal". Shorter than half a stroke period.
    pub reversal_time: Option<Q<Time>>,
    /// Discharge coefficient of the clearance and the valves, in (0, 1] [0.6].
    pub discharge_coefficient: Option<f64>,
    /// Open area of the flap valves of a vented block, which open when the water below
    /// pushes up [0 = solid block].
    pub valve_area: Option<Q<Area>>,
    /// Largest downward thrust on the block on the downstroke, in N ("12 kN" is not read;
    /// write 12000): the weight in water of the block and its string (a block on a cable),
    /// plus any pull-down of the rig. The head under the block cannot exceed it over
    /// ρ g × block area; the block lags its stroke instead [none: the block follows its
    /// stroke whatever the head, and the run reports the thrust that needed].
    pub max_thrust: Option<Q<Force>>,
    /// The stroke grows linearly from 0 over this many cycles [0].
    pub ramp_cycles: Option<f64>,
}

/// Stroke rate in Hz from `frequency` or `strokes_per_minute` (exactly one).
fn stroke_rate(
    frequency: &Option<Q<Frequency>>,
    per_minute: Option<f64>,
) -> Result<f64, CaseError> {
    match (frequency, per_minute) {
        (Some(f), None) => positive("drive.frequency", f.si("drive.frequency")?, "Hz"),
        (None, Some(n)) => Ok(positive("drive.strokes_per_minute", n, "")? / MINUTE_S),
        (Some(_), Some(_)) => Err(CaseError::new(
            "drive.strokes_per_minute",
            "give either frequency or strokes_per_minute, not both",
        )),
        (None, None) => Err(CaseError::new(
            "drive.frequency",
            "required key is missing (or give `strokes_per_minute`)",
        )),
    }
}

/// A number of ramp cycles: zero or positive, 0 when not given.
pub(super) fn ramp_cycles(v: Option<f64>) -> Result<f64, CaseError> {
    non_negative("drive.ramp_cycles", v.unwrap_or(0.0), "")
}

/// `drive.atmospheric_pressure` in Pa [standard atmosphere].
fn atmospheric_pa(q: &Option<Q<Pressure>>) -> Result<f64, CaseError> {
    match q {
        Some(q) => positive(
            "drive.atmospheric_pressure",
            q.si("drive.atmospheric_pressure")?,
            "Pa",
        ),
        None => Ok(STANDARD_ATMOSPHERE_PA),
    }
}

/// A sealed tool's depth below the static level (`drive.depth`, default
/// [`DEFAULT_BLOCK_DEPTH_M`]) and the net atmospheric head over the vapour pressure at the
/// water temperature, m; notes the defaults and the vapour pressure.
fn tool_depth(
    ctx: &DriveContext<'_>,
    depth: &Option<Q<Length>>,
    atmosphere: &Option<Q<Pressure>>,
    notes: &mut Vec<String>,
) -> Result<(f64, f64), CaseError> {
    let depth_m = match depth {
        Some(q) => non_negative("drive.depth", q.si("drive.depth")?, "m")?,
        None => {
            notes.push(format!(
                "surge block depth not given: {} below the static level, an assumption: give \
                 drive.depth (the suction limit and the largest collapse load grow with it)",
                format_si(DEFAULT_BLOCK_DEPTH_M, Quantity::Length)
            ));
            DEFAULT_BLOCK_DEPTH_M
        }
    };
    Ok((depth_m, vapour_limit(ctx, atmosphere, notes)?))
}

/// Net head of the atmosphere over the vapour pressure, m, with a note of both pressures.
fn vapour_limit(
    ctx: &DriveContext<'_>,
    atmosphere: &Option<Q<Pressure>>,
    notes: &mut Vec<String>,
) -> Result<f64, CaseError> {
    let p_atm = atmospheric_pa(atmosphere)?;
    let p_v = vapour_pressure_pa(ctx.temperature_c);
    if p_atm <= p_v {
        return Err(CaseError::new(
            "drive.atmospheric_pressure",
            format!("must exceed the vapour pressure of the water ({p_v:.0} Pa), got {p_atm} Pa"),
        ));
    }
    let net = net_atmospheric_head_m(p_atm, ctx.temperature_c, ctx.density_kg_m3);
    notes.push(format!(
        "vapour bound: atmospheric pressure {}{} less the vapour pressure {} at {:.1} degC \
         (IAPWS-IF97) = {} of water above the tool's depth",
        format_si(p_atm, Quantity::Pressure),
        if atmosphere.is_none() {
            " (standard atmosphere at sea level; give drive.atmospheric_pressure at altitude)"
        } else {
            ""
        },
        format_si(p_v, Quantity::Pressure),
        ctx.temperature_c,
        format_si(net, Quantity::Head)
    ));
    Ok(net)
}

/// Parser of the `surge_block` drive (registered in [`super::DRIVE_KINDS`]).
pub fn surge_block(
    map: Map<String, Value>,
    ctx: &DriveContext<'_>,
) -> Result<ParsedDrive, CaseError> {
    let k: SurgeBlockKeys = read_keys(map)?;
    let rc = ctx.well.casing_radius_m;
    let mut notes = Vec::new();
    let block_radius_m = match &k.block_radius {
        Some(q) => positive("drive.block_radius", q.si("drive.block_radius")?, "m")?,
        None => {
            let r = rc - DEFAULT_DISC_CLEARANCE_M;
            if r <= 0.0 {
                return Err(CaseError::new(
                    "drive.block_radius",
                    format!(
                        "required key is missing: the default (well.casing_radius − 1.5 mm) \
                         is not positive for a casing radius of {rc} m"
                    ),
                ));
            }
            notes.push(format!(
                "surge block radius not given: casing radius − 1.5 mm = {} (discs cut to about \
                 the casing's inside diameter; the clearance is an assumption: measure it in \
                 the field, it sets the leakage past the block and so the suction)",
                format_si(r, Quantity::Length)
            ));
            r
        }
    };
    let (depth_m, net_atm_m) = tool_depth(ctx, &k.depth, &k.atmospheric_pressure, &mut notes)?;
    let stroke_m = positive("drive.stroke", k.stroke.si("drive.stroke")?, "m")?;
    let frequency_hz = stroke_rate(&k.frequency, k.strokes_per_minute)?;
    let kinematics =
        match (
            k.kinematics.unwrap_or(KinematicsName::Sinusoidal),
            &k.reversal_time,
        ) {
            (KinematicsName::Sinusoidal, None) => Kinematics::Sinusoidal,
            (KinematicsName::Sinusoidal, Some(_)) => return Err(CaseError::new(
                "drive.reversal_time",
                "is for kinematics \"trapezoidal\" only; a sinusoidal stroke reverses smoothly \
                 (remove reversal_time or set kinematics to \"trapezoidal\")",
            )),
            (KinematicsName::Trapezoidal, Some(q)) => Kinematics::Trapezoidal {
                reversal_s: positive("drive.reversal_time", q.si("drive.reversal_time")?, "s")?,
            },
            (KinematicsName::Trapezoidal, None) => {
                return Err(CaseError::new(
                    "drive.reversal_time",
                    "required key is missing for kinematics \"trapezoidal\"",
                ))
            }
        };
    let cd = k
        .discharge_coefficient
        .unwrap_or(DEFAULT_BLOCK_DISCHARGE_COEFFICIENT);
    if !(cd > 0.0 && cd <= 1.0) {
        return Err(CaseError::new(
            "drive.discharge_coefficient",
            format!("must be in (0, 1], got {cd}"),
        ));
    }
    let valve_area_m2 = match &k.valve_area {
        Some(q) => non_negative("drive.valve_area", q.si("drive.valve_area")?, "m2")?,
        None => 0.0,
    };
    let a_block = PI * block_radius_m * block_radius_m;
    let max_thrust_n = k
        .max_thrust
        .as_ref()
        .map(|q| positive("drive.max_thrust", q.si("drive.max_thrust")?, "N"))
        .transpose()?;
    let max_push_head_m = max_thrust_n.map_or(f64::INFINITY, |f| {
        f / (ctx.density_kg_m3 * GRAVITY_M_S2 * a_block)
    });
    let block = SurgeBlock {
        max_push_head_m,
        block_radius_m,
        casing_radius_m: rc,
        stroke_m,
        frequency_hz,
        kinematics,
        discharge_coefficient: cd,
        valve_area_m2,
        ramp_cycles: ramp_cycles(k.ramp_cycles)?,
        depth_m,
        net_atmospheric_head_m: net_atm_m,
    };
    let period = 1.0 / frequency_hz;
    let (motion, peak_speed, reversal) = match kinematics {
        Kinematics::Sinusoidal => ("sinusoidal".to_owned(), PI * frequency_hz * stroke_m, None),
        Kinematics::Trapezoidal { reversal_s } => (
            format!(
                "trapezoidal, reversals of {}",
                format_si(reversal_s, Quantity::Time)
            ),
            stroke_m / (0.5 * period - 0.5 * reversal_s),
            Some(reversal_s),
        ),
    };
    let a_gap = PI * (rc * rc - block_radius_m * block_radius_m);
    notes.insert(
        0,
        format!(
            "drive: {} surge block, stroke {}, {} strokes/min (period {}), {motion}, ramp over \
             {} cycles",
            if valve_area_m2 > 0.0 {
                "vented"
            } else {
                "solid"
            },
            format_si(stroke_m, Quantity::Length),
            format_si(frequency_hz * MINUTE_S, Quantity::Dimensionless),
            format_si(period, Quantity::Time),
            block.ramp_cycles
        ),
    );
    notes.push(format!(
        "surge block: radius {} in a casing of radius {}: clearance area {}, valve area {}, \
         discharge coefficient {cd}; peak block speed {} displaces up to {}",
        format_si(block_radius_m, Quantity::Length),
        format_si(rc, Quantity::Length),
        format_si(a_gap.max(0.0), Quantity::Area),
        format_si(valve_area_m2, Quantity::Area),
        format_si(peak_speed, Quantity::Velocity),
        format_si(a_block * peak_speed, Quantity::FlowRate),
    ));
    notes.push(
        "surge block: the water below the block is sealed, so the in-well head follows from \
         the balance of displacement, leakage past the block, valves and screen flow (no \
         free-surface storage); the head above the block is the static level"
            .to_owned(),
    );
    notes.push(format!(
        "surge block: vapour bound {} (the water under the block parts from it there)",
        format_si(block.min_head_m(), Quantity::Head)
    ));
    notes.push(match max_thrust_n {
        Some(f) => format!(
            "surge block: downstroke thrust at most {} N, so the head under the block stays \
             below {} (the block lags its stroke there)",
            G(f, 4),
            format_si(max_push_head_m, Quantity::Head)
        ),
        None => "surge block: drive.max_thrust not given: the block follows its stroke \
                 whatever the head under it (a block on a cable pushes only with its and the \
                 string's weight in water; give it to bound the downstroke)"
            .to_owned(),
    });
    let mut resolved = into_map(json!({
        "block_radius": block_radius_m,
        "stroke": stroke_m,
        "frequency": frequency_hz,
        "kinematics": match kinematics {
            Kinematics::Sinusoidal => "sinusoidal",
            Kinematics::Trapezoidal { .. } => "trapezoidal",
        },
        "discharge_coefficient": cd,
        "valve_area": valve_area_m2,
        "ramp_cycles": block.ramp_cycles,
        "depth": depth_m,
        "atmospheric_pressure": atmospheric_pa(&k.atmospheric_pressure)?,
    }));
    if let Some(f) = max_thrust_n {
        resolved.insert("max_thrust".to_owned(), json!(f));
    }
    if let Some(r) = reversal {
        resolved.insert("reversal_time".to_owned(), json!(r));
    }
    Ok(ParsedDrive {
        drive: Drive::SurgeBlock(block),
        resolved,
        notes,
    })
}

/// Keys of `swab`.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct SwabKeys {
    /// Radius of the swab cups; not larger than the casing radius [well.casing_radius].
    pub cup_radius: Option<Q<Length>>,
    /// Lifting speed of the swab (a velocity: "1 m/s", "3 ft/s", "60 m/min").
    pub lift_rate: Q<Velocity>,
    /// Length of each lift.
    pub stroke: Q<Length>,
    /// Time to lower the swab again after each lift.
    pub lowering_time: Q<Time>,
    /// Depth of the swab cups below the static level at the start of each lift. The cups
    /// seal the column below them while rising; its head cannot fall below the vapour
    /// bound at their depth.
    pub submergence: Q<Length>,
    /// Atmospheric pressure on the water in the well [101325 Pa, the standard atmosphere at
    /// sea level; give the local value at altitude].
    pub atmospheric_pressure: Option<Q<Pressure>>,
    /// Number of strokes, after which the well recovers [0 = strokes for the whole run].
    pub strokes: Option<u32>,
    /// The lifting speed grows linearly from 0 over this many strokes [0].
    pub ramp_cycles: Option<f64>,
}

/// Parser of the `swab` drive (registered in [`super::DRIVE_KINDS`]).
pub fn swab(map: Map<String, Value>, ctx: &DriveContext<'_>) -> Result<ParsedDrive, CaseError> {
    let k: SwabKeys = read_keys(map)?;
    let rc = ctx.well.casing_radius_m;
    let cup_radius_m = match &k.cup_radius {
        Some(q) => positive("drive.cup_radius", q.si("drive.cup_radius")?, "m")?,
        None => rc,
    };
    if cup_radius_m > rc {
        return Err(CaseError::new(
            "drive.cup_radius",
            format!("must not exceed well.casing_radius ({rc} m), got {cup_radius_m} m"),
        ));
    }
    let s = Swab {
        cup_radius_m,
        lift_rate_m_s: positive("drive.lift_rate", k.lift_rate.si("drive.lift_rate")?, "m/s")?,
        stroke_m: positive("drive.stroke", k.stroke.si("drive.stroke")?, "m")?,
        lowering_time_s: non_negative(
            "drive.lowering_time",
            k.lowering_time.si("drive.lowering_time")?,
            "s",
        )?,
        submergence_m: positive(
            "drive.submergence",
            k.submergence.si("drive.submergence")?,
            "m",
        )?,
        strokes: k.strokes.unwrap_or(0),
        ramp_cycles: ramp_cycles(k.ramp_cycles)?,
        net_atmospheric_head_m: 0.0,
    };
    let mut vapour_notes = Vec::new();
    let s = Swab {
        net_atmospheric_head_m: vapour_limit(ctx, &k.atmospheric_pressure, &mut vapour_notes)?,
        ..s
    };
    let a_cup = PI * cup_radius_m * cup_radius_m;
    let lift_s = s.stroke_m / s.lift_rate_m_s;
    let mut notes =
        vec![format!(
        "drive: swab, cups of radius {}{}, lifted {} at {} ({} per lift) then lowered in {}: a \
         stroke every {}, {}, ramp over {} strokes",
        format_si(cup_radius_m, Quantity::Length),
        if k.cup_radius.is_none() { " (the casing radius)" } else { "" },
        format_si(s.stroke_m, Quantity::Length),
        format_si(s.lift_rate_m_s, Quantity::Velocity),
        format_si(lift_s, Quantity::Time),
        format_si(s.lowering_time_s, Quantity::Time),
        format_si(s.period_s(), Quantity::Time),
        match s.strokes {
            0 => "for the whole run".to_owned(),
            n => format!("{n} strokes, then recovery"),
        },
        s.ramp_cycles
    )];
    notes.push(format!(
        "swab: the cups seal the casing while rising, lifting {} out of the well; the water \
         below them is sealed and must come through the screen; its head cannot fall below \
         the vapour bound {} at the start of a lift (rising with the cups), where the column \
         parts and the run warns; while the swab is lowered the well is one free surface",
        format_si(a_cup * s.lift_rate_m_s, Quantity::FlowRate),
        format_si(
            -(s.net_atmospheric_head_m + s.submergence_m),
            Quantity::Head
        ),
    ));
    notes.extend(vapour_notes);
    Ok(ParsedDrive {
        resolved: into_map(json!({
            "cup_radius": s.cup_radius_m,
            "lift_rate": s.lift_rate_m_s,
            "stroke": s.stroke_m,
            "lowering_time": s.lowering_time_s,
            "submergence": s.submergence_m,
            "strokes": s.strokes,
            "ramp_cycles": s.ramp_cycles,
            "atmospheric_pressure": atmospheric_pa(&k.atmospheric_pressure)?,
        })),
        drive: Drive::Swab(s),
        notes,
    })
}
