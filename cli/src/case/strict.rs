//! Reading case-file JSON strictly: a key written twice in one object is an error naming
//! its path (`pack.porosity: key written twice …`) instead of the last one silently
//! winning; a UTF-8 byte-order mark at the start is accepted; the case must be an object.

use super::error::CaseError;
use serde::de::{DeserializeSeed, Error as _, MapAccess, SeqAccess, Visitor};
use serde_json::{Map, Number, Value};
use std::cell::RefCell;
use std::fmt;

/// Parses `text` as JSON (an optional byte-order mark first), refusing duplicate keys.
pub fn read_json(text: &str) -> Result<Value, CaseError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let duplicate = RefCell::new(None);
    let mut de = serde_json::Deserializer::from_str(text);
    let value = Strict {
        path: String::new(),
        duplicate: &duplicate,
    }
    .deserialize(&mut de)
    .and_then(|v| de.end().map(|_| v));
    match (value, duplicate.into_inner()) {
        (_, Some(path)) => Err(CaseError::new(
            path,
            "key written twice in the same object; keep one (with duplicates a reader would \
             silently take one of them)",
        )),
        (Err(e), None) => Err(CaseError::syntax(&e)),
        (Ok(v), None) => Ok(v),
    }
}

/// Like [`read_json`], and the value must be an object (a case file).
pub fn read_case_json(text: &str) -> Result<Value, CaseError> {
    let v = read_json(text)?;
    let kind = match &v {
        Value::Object(_) => return Ok(v),
        Value::Array(_) => "an array",
        Value::String(_) => "a string",
        Value::Number(_) => "a number",
        Value::Bool(_) => "true or false",
        Value::Null => "null",
    };
    Err(CaseError::new(
        "",
        format!(
            "a case file is one JSON object {{ \"well\": …, \"drive\": …, … }}; this file \
             holds {kind}"
        ),
    ))
}

struct Strict<'a> {
    path: String,
    duplicate: &'a RefCell<Option<String>>,
}

impl<'de> DeserializeSeed<'de> for Strict<'_> {
    type Value = Value;
    fn deserialize<D: serde::Deserializer<'de>>(self, d: D) -> Result<Value, D::Error> {
        d.deserialize_any(self)
    }
}

impl<'de> Visitor<'de> for Strict<'_> {
    type Value = Value;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("any JSON value")
    }
    fn visit_bool<E>(self, v: bool) -> Result<Value, E> {
        Ok(Value::Bool(v))
    }
    fn visit_i64<E>(self, v: i64) -> Result<Value, E> {
        Ok(Value::Number(v.into()))
    }
    fn visit_u64<E>(self, v: u64) -> Result<Value, E> {
        Ok(Value::Number(v.into()))
    }
    fn visit_f64<E: serde::de::Error>(self, v: f64) -> Result<Value, E> {
        Number::from_f64(v)
            .map(Value::Number)
            .ok_or_else(|| E::custom("number out of range"))
    }
    fn visit_str<E>(self, v: &str) -> Result<Value, E> {
        Ok(Value::String(v.to_owned()))
    }
    fn visit_string<E>(self, v: String) -> Result<Value, E> {
        Ok(Value::String(v))
    }
    fn visit_unit<E>(self) -> Result<Value, E> {
        Ok(Value::Null)
    }
    fn visit_none<E>(self) -> Result<Value, E> {
        Ok(Value::Null)
    }
    fn visit_some<D: serde::Deserializer<'de>>(self, d: D) -> Result<Value, D::Error> {
        self.deserialize(d)
    }
    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Value, A::Error> {
        let mut out = Vec::new();
        while let Some(v) = seq.next_element_seed(Strict {
            path: format!("{}.{}", self.path, out.len()),
            duplicate: self.duplicate,
        })? {
            out.push(v);
        }
        Ok(Value::Array(out))
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Value, A::Error> {
        let mut out = Map::new();
        while let Some(key) = map.next_key::<String>()? {
            let path = if self.path.is_empty() {
                key.clone()
            } else {
                format!("{}.{key}", self.path)
            };
            if out.contains_key(&key) {
                *self.duplicate.borrow_mut() = Some(path);
                return Err(A::Error::custom("duplicate key"));
            }
            let v = map.next_value_seed(Strict {
                path,
                duplicate: self.duplicate,
            })?;
            out.insert(key, v);
        }
        Ok(Value::Object(out))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn duplicates_are_named_by_path() {
        let e = read_json(r#"{"pack": {"porosity": 1.3, "porosity": 0.33}}"#).unwrap_err();
        assert_eq!(e.field, "pack.porosity");
        let e = read_json(r#"{"drive": {}, "x": [{"a": 1, "a": 2}], "drive": {}}"#).unwrap_err();
        assert_eq!(e.field, "x.0.a");
        let e = read_json(r#"{"drive": {"kind": "slug"}, "drive": {}}"#).unwrap_err();
        assert_eq!(e.field, "drive");
    }

    #[test]
    fn bom_accepted_and_values_as_serde_json() {
        let text = "\u{feff}{\"a\": [1, -2, 2.5e-3, \"x\", null, true]}";
        assert_eq!(
            read_json(text).unwrap(),
            serde_json::from_str::<Value>(&text[3..]).unwrap()
        );
        assert!(read_json("{} x").is_err());
        let e = read_case_json("[1, 2]").unwrap_err();
        assert!(e.message.contains("holds an array"), "{e}");
    }
}
