//! The `drive` section: one parser per drive kind, found by name in [`DRIVE_KINDS`].
//!
//! Adding a drive kind: write a key struct (serde + schemars, `deny_unknown_fields`,
//! without `kind`), a parse function `fn(Map, &DriveContext) -> Result<ParsedDrive, _>`
//! that reads it into a [`Drive`] and its resolved SI keys, and one row of
//! [`DRIVE_KINDS`]. The schema, the "unknown kind" message and the stages of a `schedule`
//! pick it up from the table. Every parsed drive is checked by the solver's
//! `Drive::validate` at once, so its errors name the key where it was written (inside a
//! schedule: `drive.stages[2].drive.stroke`).
//!
//! The development devices live in [`devices`] (surge block and swab, tools in the
//! casing) and [`pumped`] (pump-and-backwash, jet pulses). The staged drive is in
//! [`schedule`], which also settles the run's duration (a schedule's is the sum of its
//! stages) and the period the numerics settings are read against.

mod devices;
mod pumped;
mod schedule;
mod table;

pub use schedule::{run_duration, stepping_period};

use super::error::CaseError;
use super::hints::suggestion;
use super::quantity::{FlowRate, Frequency, Head, Time, Q};
use crate::units::{format_si, Quantity};
use boreflux_solver::drive::SineHead;
use boreflux_solver::model::Well;
use boreflux_solver::Drive;
use schemars::{JsonSchema, Schema, SchemaGenerator};
use serde::de::DeserializeOwned;
use serde::Deserialize;
use serde_json::{json, Map, Value};
use std::path::Path;

/// What a drive parser needs besides its own keys.
#[derive(Debug, Clone, Copy)]
pub struct DriveContext<'a> {
    /// Folder of the case file; drive files are relative to it.
    pub base_dir: &'a Path,
    /// Water density of the case, kg/m³, for heads given as pressures.
    pub density_kg_m3: f64,
    /// Water temperature of the case, °C (vapour pressure under sealed tools).
    pub temperature_c: f64,
    /// The well as converted (casing radius for tools in the casing, screen radius for
    /// jets, well-bore storage).
    pub well: &'a Well,
}

/// A drive read from the case file.
#[derive(Debug, Clone, PartialEq)]
pub struct ParsedDrive {
    /// The solver's drive, SI.
    pub drive: Drive,
    /// The drive's keys in SI with every default filled (without `kind`).
    pub resolved: Map<String, Value>,
    /// Derivations worth showing (period, table size).
    pub notes: Vec<String>,
}

/// Reads the keys of one drive kind.
pub type ParseFn = fn(Map<String, Value>, &DriveContext<'_>) -> Result<ParsedDrive, CaseError>;

/// One drive kind of the case file.
pub struct DriveKind {
    /// Value of `drive.kind`.
    pub name: &'static str,
    /// One-line description for the schema.
    pub about: &'static str,
    /// Parser of its keys.
    pub parse: ParseFn,
    /// Schema of its keys (without `kind`).
    pub schema: fn(&mut SchemaGenerator) -> Schema,
}

/// Every drive kind the case file accepts.
pub const DRIVE_KINDS: &[DriveKind] = &[
    DriveKind {
        name: "sine_head",
        about: "Sinusoidal in-well head h = offset + A sin(2π f t), from rest.",
        parse: sine_head,
        schema: SineHeadKeys::json_schema,
    },
    DriveKind {
        name: "constant_rate",
        about: "Constant pumping rate from t = 0, with well-bore storage.",
        parse: constant_rate,
        schema: ConstantRateKeys::json_schema,
    },
    DriveKind {
        name: "slug",
        about: "Well level changed at t = 0, then recovery with no pumping.",
        parse: slug,
        schema: SlugKeys::json_schema,
    },
    DriveKind {
        name: "table",
        about: "Tabulated head or pumping rate, linear between points, optionally repeated.",
        parse: table::table,
        schema: table::TableKeys::json_schema,
    },
    DriveKind {
        name: "surge_block",
        about: "Surge block stroking in the casing above the screen: the sealed water below \
                it is pushed out and drawn in through the screen, less what leaks past the \
                block and, for a vented block, through its valves.",
        parse: devices::surge_block,
        schema: devices::SurgeBlockKeys::json_schema,
    },
    DriveKind {
        name: "swab",
        about: "Swab cups lifted through a stroke at a steady rate, then lowered: water is \
                lifted out of the well and the formation answers.",
        parse: devices::swab,
        schema: devices::SwabKeys::json_schema,
    },
    DriveKind {
        name: "pump_backwash",
        about: "Pump-and-backwash surging: pump for an on-time, stop, and let the water in \
                the pump column drain back into the well.",
        parse: pumped::pump_backwash,
        schema: pumped::PumpBackwashKeys::json_schema,
    },
    DriveKind {
        name: "jet_pulse",
        about: "Rotating horizontal jet, as a train of in-well head pulses (a one-dimensional \
                approximation of a jet).",
        parse: pumped::jet_pulse,
        schema: pumped::JetPulseKeys::json_schema,
    },
    DriveKind {
        name: "schedule",
        about: "Stages of other drives run back to back, the state carried over.",
        parse: schedule::schedule,
        schema: schedule::ScheduleKeys::json_schema,
    },
];

/// Names of the drive kinds, comma separated.
pub fn kind_names() -> String {
    DRIVE_KINDS
        .iter()
        .map(|k| k.name)
        .collect::<Vec<_>>()
        .join(", ")
}

/// Reads the `drive` section: dispatches on `kind`, then checks the drive with the solver.
pub fn parse_drive(
    map: Map<String, Value>,
    ctx: &DriveContext<'_>,
) -> Result<ParsedDrive, CaseError> {
    let parsed = parse_kind(map, ctx)?;
    parsed.drive.validate()?;
    Ok(parsed)
}

/// Finds the kind named by `kind` and runs its parser; `kind` is put back into the
/// resolved keys. Errors name `drive.…` (a schedule moves them under its stage).
fn parse_kind(
    mut map: Map<String, Value>,
    ctx: &DriveContext<'_>,
) -> Result<ParsedDrive, CaseError> {
    let names: Vec<&str> = DRIVE_KINDS.iter().map(|k| k.name).collect();
    let kind = match map.remove("kind") {
        Some(Value::String(s)) => s,
        Some(other) => {
            return Err(CaseError::new(
                "drive.kind",
                format!("expected one of {}, got {other}", kind_names()),
            ))
        }
        None => {
            return Err(CaseError::new(
                "drive.kind",
                format!("required key is missing; one of {}", kind_names()),
            ))
        }
    };
    let Some(k) = DRIVE_KINDS.iter().find(|k| k.name == kind) else {
        let hint = match suggestion(&kind, &names) {
            s if s.starts_with("did you mean") => format!("{s} "),
            _ => String::new(),
        };
        return Err(CaseError::new(
            "drive.kind",
            format!(
                "unknown drive kind \"{kind}\"; {hint}available kinds: {}",
                kind_names()
            ),
        ));
    };
    let mut parsed = (k.parse)(map, ctx)?;
    parsed
        .resolved
        .insert("kind".to_owned(), Value::String(kind.clone()));
    Ok(parsed)
}

/// Reads a drive's keys into its key struct; errors carry the `drive.` path and a
/// "did you mean" hint for unknown keys.
pub fn read_keys<T: DeserializeOwned>(map: Map<String, Value>) -> Result<T, CaseError> {
    serde_path_to_error::deserialize(super::structured::ValueDeserializer(Value::Object(map)))
        .map_err(|e| CaseError::structure(e, "drive"))
}

/// One `oneOf` alternative per kind, each with its `kind` constant; `nested` leaves out
/// the kinds a schedule stage cannot use.
fn kind_alternatives(generator: &mut SchemaGenerator, nested: bool) -> Vec<Value> {
    DRIVE_KINDS
        .iter()
        .filter(|k| !(nested && k.name == schedule::KIND))
        .map(|k| {
            let mut s = (k.schema)(generator);
            let obj = s.ensure_object();
            obj.insert("description".to_owned(), json!(k.about));
            let props = obj
                .entry("properties")
                .or_insert_with(|| json!({}))
                .as_object_mut()
                .expect("properties is an object");
            props.insert("kind".to_owned(), json!({ "const": k.name }));
            let required = obj
                .entry("required")
                .or_insert_with(|| json!([]))
                .as_array_mut()
                .expect("required is an array");
            required.insert(0, json!("kind"));
            s.to_value()
        })
        .collect()
}

fn one_of(description: String, alternatives: Vec<Value>) -> Schema {
    let mut schema = Schema::default();
    let obj = schema.ensure_object();
    obj.insert("description".to_owned(), json!(description));
    obj.insert("type".to_owned(), json!("object"));
    obj.insert("oneOf".to_owned(), Value::Array(alternatives));
    schema
}

/// JSON Schema of `drive`: one alternative per kind, each with its `kind` constant.
pub fn drive_schema(generator: &mut SchemaGenerator) -> Schema {
    let alternatives = kind_alternatives(generator, false);
    one_of(
        format!("The drive; `kind` is one of: {}.", kind_names()),
        alternatives,
    )
}

/// JSON Schema of the drive of a schedule stage: any kind but `schedule`.
pub fn stage_drive_schema(generator: &mut SchemaGenerator) -> Schema {
    let alternatives = kind_alternatives(generator, true);
    one_of(
        "The drive of this stage: any drive kind except schedule (stages cannot nest).".to_owned(),
        alternatives,
    )
}

/// Keys of `sine_head`.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct SineHeadKeys {
    /// Head amplitude A (a length, or a pressure converted with the water density).
    pub amplitude: Q<Head>,
    /// Frequency f (Hz, 1/min, strokes/min, …); or give `period`.
    pub frequency: Option<Q<Frequency>>,
    /// Period 1/f, instead of `frequency`.
    pub period: Option<Q<Time>>,
    /// Mean in-well head [0].
    pub offset: Option<Q<Head>>,
    /// The amplitude grows linearly from 0 over this many cycles [0].
    pub ramp_cycles: Option<f64>,
}

fn sine_head(map: Map<String, Value>, ctx: &DriveContext<'_>) -> Result<ParsedDrive, CaseError> {
    let k: SineHeadKeys = read_keys(map)?;
    let rho = ctx.density_kg_m3;
    let frequency_hz = match (&k.frequency, &k.period) {
        (Some(f), None) => {
            let f_hz = f.si("drive.frequency")?;
            if f_hz <= 0.0 {
                return Err(CaseError::new(
                    "drive.frequency",
                    format!("must be positive, got {f_hz} Hz"),
                ));
            }
            f_hz
        }
        (None, Some(p)) => {
            let p_s = p.si("drive.period")?;
            if p_s <= 0.0 {
                return Err(CaseError::new(
                    "drive.period",
                    format!("must be positive, got {p_s} s"),
                ));
            }
            1.0 / p_s
        }
        (Some(_), Some(_)) => {
            return Err(CaseError::new(
                "drive.period",
                "give either frequency or period, not both",
            ))
        }
        (None, None) => {
            return Err(CaseError::new(
                "drive.frequency",
                "required key is missing (or give `period`)",
            ))
        }
    };
    let s = SineHead {
        amplitude_m: k.amplitude.head_si("drive.amplitude", rho)?,
        frequency_hz,
        offset_m: match &k.offset {
            Some(o) => o.head_si("drive.offset", rho)?,
            None => 0.0,
        },
        ramp_cycles: k.ramp_cycles.unwrap_or(0.0),
    };
    let resolved = json!({
        "amplitude": s.amplitude_m,
        "frequency": s.frequency_hz,
        "offset": s.offset_m,
        "ramp_cycles": s.ramp_cycles,
    });
    Ok(ParsedDrive {
        notes: vec![format!(
            "drive: sine head, amplitude {}, frequency {} (period {}), offset {}, ramp {} cycles",
            format_si(s.amplitude_m, Quantity::Head),
            format_si(s.frequency_hz, Quantity::Frequency),
            format_si(1.0 / s.frequency_hz, Quantity::Time),
            format_si(s.offset_m, Quantity::Head),
            s.ramp_cycles
        )],
        drive: Drive::SineHead(s),
        resolved: into_map(resolved),
    })
}

/// Keys of `constant_rate`.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct ConstantRateKeys {
    /// Pumping rate, positive = withdrawal from the well.
    pub pumping_rate: Q<FlowRate>,
}

fn constant_rate(
    map: Map<String, Value>,
    _ctx: &DriveContext<'_>,
) -> Result<ParsedDrive, CaseError> {
    let k: ConstantRateKeys = read_keys(map)?;
    let q = k.pumping_rate.si("drive.pumping_rate")?;
    Ok(ParsedDrive {
        drive: Drive::ConstantRate {
            pumping_rate_m3_s: q,
        },
        resolved: into_map(json!({ "pumping_rate": q })),
        notes: vec![format!(
            "drive: constant pumping rate {}",
            format_si(q, Quantity::FlowRate)
        )],
    })
}

/// Keys of `slug`.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct SlugKeys {
    /// In-well head at t = 0 (a length, or a pressure converted with the water density).
    pub initial_head: Q<Head>,
}

fn slug(map: Map<String, Value>, ctx: &DriveContext<'_>) -> Result<ParsedDrive, CaseError> {
    let k: SlugKeys = read_keys(map)?;
    let h = k
        .initial_head
        .head_si("drive.initial_head", ctx.density_kg_m3)?;
    Ok(ParsedDrive {
        drive: Drive::Slug { initial_head_m: h },
        resolved: into_map(json!({ "initial_head": h })),
        notes: vec![format!(
            "drive: slug, initial in-well head {}",
            format_si(h, Quantity::Head)
        )],
    })
}

/// The object inside a `json!({…})` literal.
pub fn into_map(v: Value) -> Map<String, Value> {
    match v {
        Value::Object(m) => m,
        _ => Map::new(),
    }
}
