//! Typed dimensional values of the case file and the JSON-valued "union" fields.
//!
//! A [`Q<K>`] holds the JSON value exactly as written (a number in SI, or a string
//! `"<number> <unit>"`); the marker `K` fixes which [`Quantity`] it is read as, so a
//! length can never be read with the conductivity table. Conversion to SI happens in
//! [`Q::si`], which prefixes unit errors with the field path. The JSON Schema of each
//! kind is "number or string" with a pattern and the accepted units in its description.

use super::error::CaseError;
use crate::units::{parse_head, parse_quantity, Quantity};
use schemars::{json_schema, JsonSchema, Schema, SchemaGenerator};
use serde::{Deserialize, Deserializer};
use serde_json::Value;
use std::borrow::Cow;
use std::marker::PhantomData;

/// Pattern of a quantity string in the schema: a decimal number, then an optional unit.
/// The unit itself is checked against the description's list by the loader.
pub const QUANTITY_PATTERN: &str =
    r"^\s*[+-]?([0-9]+\.?[0-9]*|\.[0-9]+)([eE][+-]?[0-9]+)?\s*(\S.*)?$";

/// The kind of a dimensional value: which unit table it is read with.
pub trait Kind {
    /// The unit table and SI unit.
    const Q: Quantity;
    /// Name of the kind in the JSON Schema definitions.
    const NAME: &'static str;
}

macro_rules! kinds {
    ($($(#[$doc:meta])* $name:ident => $q:expr;)*) => {
        $(
            $(#[$doc])*
            #[derive(Debug, Clone, Copy, PartialEq, Eq)]
            pub enum $name {}
            impl Kind for $name {
                const Q: Quantity = $q;
                const NAME: &'static str = stringify!($name);
            }
        )*

        /// Every kind as (name in the JSON Schema definitions, quantity), so that a reader of
        /// the schema (the report's input units) learns each input's SI unit from it.
        pub const KINDS: &[(&str, Quantity)] = &[$((stringify!($name), $q)),*];
    };
}

kinds! {
    /// Length or radius, m.
    Length => Quantity::Length;
    /// Time, s.
    Time => Quantity::Time;
    /// Frequency, Hz.
    Frequency => Quantity::Frequency;
    /// Hydraulic conductivity, m/s.
    Conductivity => Quantity::Conductivity;
    /// Volume rate, m³/s.
    FlowRate => Quantity::FlowRate;
    /// Pressure, Pa.
    Pressure => Quantity::Pressure;
    /// Head, m (a length, or a pressure converted with the case's water density).
    Head => Quantity::Head;
    /// Specific storage, 1/m.
    SpecificStorage => Quantity::SpecificStorage;
    /// Absolute temperature, K.
    Temperature => Quantity::Temperature;
    /// Area, m².
    Area => Quantity::Area;
    /// Pure number ("12 %" = 0.12).
    Fraction => Quantity::Dimensionless;
    /// Linear screen-loss coefficient, s.
    Seconds => Quantity::Coefficient { si_unit: "s" };
    /// Forchheimer coefficient, s²/m².
    Beta => Quantity::Coefficient { si_unit: "s2/m2" };
    /// Cake erodibility, m/(s·Pa).
    Erodibility => Quantity::Coefficient { si_unit: "m/s/Pa" };
    /// Force, N.
    Force => Quantity::Coefficient { si_unit: "N" };
    /// Velocity, m/s.
    Velocity => Quantity::Velocity;
    /// Rate coefficient per length of travel, 1/m.
    PerMetre => Quantity::Coefficient { si_unit: "1/m" };
    /// Density of solids, kg/m³.
    Density => Quantity::Coefficient { si_unit: "kg/m3" };
}

/// A dimensional value as written in the case file, read as kind `K`.
#[derive(Debug, Clone, PartialEq)]
pub struct Q<K> {
    /// The JSON value as written.
    pub value: Value,
    kind: PhantomData<K>,
}

impl<K: Kind> Q<K> {
    /// The value in SI units; errors name `field`.
    pub fn si(&self, field: &str) -> Result<f64, CaseError> {
        parse_quantity(&self.value, K::Q).map_err(|e| CaseError::new(field, e.to_string()))
    }
}

impl Q<Head> {
    /// The head in m, converting a pressure with the water density `rho_kg_m3`.
    pub fn head_si(&self, field: &str, rho_kg_m3: f64) -> Result<f64, CaseError> {
        parse_head(&self.value, rho_kg_m3).map_err(|e| CaseError::new(field, e.to_string()))
    }
}

impl<'de, K> Deserialize<'de> for Q<K> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        Ok(Q {
            value: Value::deserialize(d)?,
            kind: PhantomData,
        })
    }
}

/// Description of a quantity kind for the schema: SI unit and accepted units.
pub fn describe(q: Quantity) -> String {
    let si = match q.si_unit() {
        "" => "a plain number".to_owned(),
        u => format!("a number in {u}"),
    };
    let units = q.accepted_units().join(", ");
    let extra = match q {
        Quantity::Head => " A pressure is converted to head with the case's water density.",
        Quantity::Temperature => " A bare number is kelvin.",
        _ => "",
    };
    format!(
        "A {}: {si}, or a string \"<number> <unit>\" with unit one of: {units}.{extra}",
        q.noun()
    )
}

/// Schema of a quantity kind: number or pattern-checked string.
pub fn quantity_schema(q: Quantity) -> Schema {
    json_schema!({
        "description": describe(q),
        "anyOf": [
            { "type": "number" },
            { "type": "string", "pattern": QUANTITY_PATTERN }
        ]
    })
}

impl<K: Kind> JsonSchema for Q<K> {
    fn schema_name() -> Cow<'static, str> {
        Cow::Borrowed(K::NAME)
    }

    fn json_schema(_: &mut SchemaGenerator) -> Schema {
        quantity_schema(K::Q)
    }
}

/// A JSON field whose accepted shapes are not one Rust type ("auto" or a number, …): kept
/// as written and read by the converter, with a hand-written schema.
macro_rules! union_field {
    ($(#[$doc:meta])* $name:ident, $schema:expr) => {
        $(#[$doc])*
        #[derive(Debug, Clone, PartialEq)]
        pub struct $name(pub Value);

        impl<'de> Deserialize<'de> for $name {
            fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
                Ok($name(Value::deserialize(d)?))
            }
        }

        impl JsonSchema for $name {
            fn schema_name() -> Cow<'static, str> {
                Cow::Borrowed(stringify!($name))
            }

            fn json_schema(_: &mut SchemaGenerator) -> Schema {
                $schema
            }
        }
    };
}

fn auto_or(q: Quantity, what: &str) -> Schema {
    json_schema!({
        "description": format!("\"auto\", or {what}. {}", describe(q)),
        "anyOf": [
            { "const": "auto" },
            { "type": "number" },
            { "type": "string", "pattern": QUANTITY_PATTERN }
        ]
    })
}

union_field!(
    /// `duration`: a time, or `"<n> cycles"` of a periodic drive.
    DurationValue,
    json_schema!({
        "description": format!(
            "Simulated time. {} Periodic drives also accept \"<n> cycles\".",
            describe(Quantity::Time)
        ),
        "anyOf": [
            { "type": "number", "exclusiveMinimum": 0 },
            { "type": "string", "pattern": QUANTITY_PATTERN }
        ]
    })
);

union_field!(
    /// `formation.outer_radius`: `"auto"` or a length.
    OuterRadiusValue,
    auto_or(Quantity::Length, "a length")
);

union_field!(
    /// `numerics.cells`: `"auto"`, a total cell count, or `{"per_decade": n}`.
    CellsValue,
    json_schema!({
        "description": "Radial grid: \"auto\", a total number of cells (at least 10), or {\"per_decade\": n} cells per decade of radius in every zone.",
        "anyOf": [
            { "const": "auto" },
            { "type": "integer", "minimum": 10 },
            {
                "type": "object",
                "properties": { "per_decade": { "type": "number", "minimum": 1 } },
                "required": ["per_decade"],
                "additionalProperties": false
            }
        ]
    })
);

union_field!(
    /// `numerics.steps_per_cycle`: `"auto"` or an integer.
    StepsPerCycleValue,
    json_schema!({
        "description": "Time steps per period of a periodic drive: \"auto\" or an integer (at least 4).",
        "anyOf": [ { "const": "auto" }, { "type": "integer", "minimum": 4 } ]
    })
);

union_field!(
    /// `well.discharge_coefficient`: a number in (0, 1], or `"none"` for no entrance loss.
    DischargeCoefficientValue,
    json_schema!({
        "description": "Orifice discharge coefficient Cd of the screen entrance loss, in (0, 1] (default 0.6), or \"none\" to leave the entrance loss out.",
        "anyOf": [
            { "type": "number", "exclusiveMinimum": 0, "maximum": 1 },
            { "const": "none" }
        ]
    })
);

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn q_si_works_and_captures_errors() {
        let q: Q<Length> = serde_json::from_value(json!("4 in")).unwrap();
        // 4 in = 0.1016 m, exact by definition (NIST SP 811, Appendix B).
        assert!((q.si("well.screen_radius").unwrap() - 0.1016).abs() < 1e-16);
        let bad: Q<Conductivity> = serde_json::from_value(json!("3 m")).unwrap();
        let e = bad.si("pack.conductivity").unwrap_err();
        assert_eq!(e.field, "pack.conductivity");
        assert!(e.message.contains("\"m\" is a unit of length"), "{e}");
    }

    #[test]
    fn quantity_pattern_is_described() {
        let d = describe(Quantity::Length);
        assert_eq!(
            d,
            "A length: a number in m, or a string \"<number> <unit>\" with unit one of: m, cm, mm, in, ft."
        );
    }
}
