//! Reading a JSON value into the case structs with an error type of our own, so that an
//! unknown key, a missing key or an unknown value reaches [`super::CaseError`] as data (the
//! word and the accepted names) rather than as serde's message text.
//!
//! [`ValueDeserializer`] is a deserializer over a [`serde_json::Value`] generic in nothing
//! but its error, [`StructError`]; serde reports unknown fields and variants through
//! `de::Error::unknown_field` / `unknown_variant` / `missing_field`, which `StructError`
//! keeps as variants.

use serde::de::value::{MapDeserializer, SeqDeserializer, StringDeserializer};
use serde::de::{self, IntoDeserializer, Visitor};
use serde::forward_to_deserialize_any;
use serde_json::Value;
use std::fmt;

/// A structural error found while reading a JSON value into a type.
#[derive(Debug, Clone, PartialEq)]
pub enum StructError {
    /// A key the type does not have.
    UnknownField {
        /// The key written.
        field: String,
        /// The keys the type has.
        expected: &'static [&'static str],
    },
    /// A required key is absent.
    MissingField(&'static str),
    /// A value that names no variant of the type.
    UnknownVariant {
        /// The value written.
        variant: String,
        /// The accepted values.
        expected: &'static [&'static str],
    },
    /// Anything else (wrong type, a value out of a type's range), as serde words it.
    Other(String),
}

impl fmt::Display for StructError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let list = |names: &[&str]| {
            names
                .iter()
                .map(|n| format!("`{n}`"))
                .collect::<Vec<_>>()
                .join(", ")
        };
        match self {
            StructError::UnknownField { field, expected } => {
                write!(
                    f,
                    "unknown field `{field}`, expected one of {}",
                    list(expected)
                )
            }
            StructError::MissingField(field) => write!(f, "missing field `{field}`"),
            StructError::UnknownVariant { variant, expected } => write!(
                f,
                "unknown variant `{variant}`, expected one of {}",
                list(expected)
            ),
            StructError::Other(m) => f.write_str(m),
        }
    }
}

impl std::error::Error for StructError {}

impl de::Error for StructError {
    fn custom<T: fmt::Display>(msg: T) -> Self {
        StructError::Other(msg.to_string())
    }

    fn unknown_field(field: &str, expected: &'static [&'static str]) -> Self {
        StructError::UnknownField {
            field: field.to_owned(),
            expected,
        }
    }

    fn missing_field(field: &'static str) -> Self {
        StructError::MissingField(field)
    }

    fn unknown_variant(variant: &str, expected: &'static [&'static str]) -> Self {
        StructError::UnknownVariant {
            variant: variant.to_owned(),
            expected,
        }
    }
}

/// A deserializer over a JSON value whose error is [`StructError`].
pub struct ValueDeserializer(pub Value);

impl<'de> IntoDeserializer<'de, StructError> for ValueDeserializer {
    type Deserializer = Self;

    fn into_deserializer(self) -> Self {
        self
    }
}

impl<'de> de::Deserializer<'de> for ValueDeserializer {
    type Error = StructError;

    fn deserialize_any<V: Visitor<'de>>(self, visitor: V) -> Result<V::Value, StructError> {
        match self.0 {
            Value::Null => visitor.visit_unit(),
            Value::Bool(b) => visitor.visit_bool(b),
            Value::Number(n) => {
                if let Some(u) = n.as_u64() {
                    visitor.visit_u64(u)
                } else if let Some(i) = n.as_i64() {
                    visitor.visit_i64(i)
                } else {
                    visitor.visit_f64(n.as_f64().unwrap_or(f64::NAN))
                }
            }
            Value::String(s) => visitor.visit_string(s),
            Value::Array(items) => {
                let mut seq = SeqDeserializer::new(items.into_iter().map(ValueDeserializer));
                let v = visitor.visit_seq(&mut seq)?;
                seq.end()?;
                Ok(v)
            }
            Value::Object(map) => {
                let mut m = MapDeserializer::new(map.into_iter().map(|(k, v)| {
                    (
                        StringDeserializer::<StructError>::new(k),
                        ValueDeserializer(v),
                    )
                }));
                let v = visitor.visit_map(&mut m)?;
                m.end()?;
                Ok(v)
            }
        }
    }

    fn deserialize_option<V: Visitor<'de>>(self, visitor: V) -> Result<V::Value, StructError> {
        match self.0 {
            Value::Null => visitor.visit_none(),
            other => visitor.visit_some(ValueDeserializer(other)),
        }
    }

    fn deserialize_newtype_struct<V: Visitor<'de>>(
        self,
        _name: &'static str,
        visitor: V,
    ) -> Result<V::Value, StructError> {
        visitor.visit_newtype_struct(self)
    }

    fn deserialize_enum<V: Visitor<'de>>(
        self,
        _name: &'static str,
        _variants: &'static [&'static str],
        visitor: V,
    ) -> Result<V::Value, StructError> {
        match self.0 {
            // A unit variant written as its name.
            Value::String(s) => visitor.visit_enum(StringDeserializer::<StructError>::new(s)),
            other => ValueDeserializer(other).deserialize_any(visitor),
        }
    }

    forward_to_deserialize_any! {
        bool i8 i16 i32 i64 i128 u8 u16 u32 u64 u128 f32 f64 char str string
        bytes byte_buf unit unit_struct seq tuple tuple_struct map struct identifier
        ignored_any
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde::Deserialize;
    use serde_json::json;

    #[derive(Debug, Deserialize, PartialEq)]
    #[serde(deny_unknown_fields)]
    struct Keys {
        porosity: f64,
        #[serde(default)]
        kind: Option<Kind>,
    }

    #[derive(Debug, Deserialize, PartialEq)]
    #[serde(rename_all = "snake_case")]
    enum Kind {
        Head,
        PumpingRate,
    }

    fn read(v: Value) -> Result<Keys, StructError> {
        Keys::deserialize(ValueDeserializer(v))
    }

    #[test]
    fn unknown_and_missing_keys_and_values_arrive_as_data() {
        assert_eq!(
            read(json!({"porosity": 0.3, "porsity": 1})).unwrap_err(),
            StructError::UnknownField {
                field: "porsity".into(),
                expected: &["porosity", "kind"],
            }
        );
        assert_eq!(
            read(json!({})).unwrap_err(),
            StructError::MissingField("porosity")
        );
        assert_eq!(
            read(json!({"porosity": 0.3, "kind": "hed"})).unwrap_err(),
            StructError::UnknownVariant {
                variant: "hed".into(),
                expected: &["head", "pumping_rate"],
            }
        );
        assert_eq!(
            read(json!({"porosity": 0.3, "kind": "pumping_rate"})).unwrap(),
            Keys {
                porosity: 0.3,
                kind: Some(Kind::PumpingRate)
            }
        );
        assert_eq!(
            read(json!({"porosity": 3, "kind": null})).unwrap(),
            Keys {
                porosity: 3.0,
                kind: None
            }
        );
        assert!(matches!(
            read(json!({"porosity": "x"})).unwrap_err(),
            StructError::Other(m) if m.starts_with("invalid type: string \"x\", expected f64")
        ));
    }
}
