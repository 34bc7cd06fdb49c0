//! The calibrated case file (`--write-case`): the input case as the user wrote it — its keys
//! in the file's order — with only the free values replaced (to
//! [`super::free::WRITTEN_DIGITS`] significant digits, in the case's unit), a line added to
//! its `description` recording the calibration, and its `title` marked.
//!
//! The file's order is kept by reading it into [`Node`], whose objects are lists of
//! key–value pairs. (serde_json's own map sorts its keys; its `preserve_order` feature would
//! change that for every JSON document the workspace writes, so it stays off.)

use super::free::Free;
use crate::sweep::spec::Segment;
use serde::de::{Deserialize, Deserializer, MapAccess, SeqAccess, Visitor};
use serde::ser::{Serialize, SerializeMap, SerializeSeq, Serializer};
use serde_json::Value;
use std::fmt;

/// A JSON value whose objects keep the order of their keys.
#[derive(Debug, Clone, PartialEq)]
pub enum Node {
    /// An object, keys in the order read.
    Object(Vec<(String, Node)>),
    /// An array.
    Array(Vec<Node>),
    /// A string, number, boolean or null.
    Leaf(Value),
}

impl<'de> Deserialize<'de> for Node {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Node, D::Error> {
        d.deserialize_any(NodeVisitor)
    }
}

struct NodeVisitor;

impl<'de> Visitor<'de> for NodeVisitor {
    type Value = Node;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("any JSON value")
    }
    fn visit_bool<E>(self, v: bool) -> Result<Node, E> {
        Ok(Node::Leaf(Value::Bool(v)))
    }
    fn visit_i64<E>(self, v: i64) -> Result<Node, E> {
        Ok(Node::Leaf(Value::Number(v.into())))
    }
    fn visit_u64<E>(self, v: u64) -> Result<Node, E> {
        Ok(Node::Leaf(Value::Number(v.into())))
    }
    fn visit_f64<E: serde::de::Error>(self, v: f64) -> Result<Node, E> {
        serde_json::Number::from_f64(v)
            .map(|n| Node::Leaf(Value::Number(n)))
            .ok_or_else(|| E::custom("number out of range"))
    }
    fn visit_str<E>(self, v: &str) -> Result<Node, E> {
        Ok(Node::Leaf(Value::String(v.to_owned())))
    }
    fn visit_unit<E>(self) -> Result<Node, E> {
        Ok(Node::Leaf(Value::Null))
    }
    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<Node, A::Error> {
        let mut out = Vec::new();
        while let Some(v) = seq.next_element()? {
            out.push(v);
        }
        Ok(Node::Array(out))
    }
    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<Node, A::Error> {
        let mut out = Vec::new();
        while let Some((k, v)) = map.next_entry::<String, Node>()? {
            out.push((k, v));
        }
        Ok(Node::Object(out))
    }
}

impl Serialize for Node {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        match self {
            Node::Object(items) => {
                let mut m = s.serialize_map(Some(items.len()))?;
                for (k, v) in items {
                    m.serialize_entry(k, v)?;
                }
                m.end()
            }
            Node::Array(items) => {
                let mut q = s.serialize_seq(Some(items.len()))?;
                for v in items {
                    q.serialize_element(v)?;
                }
                q.end()
            }
            Node::Leaf(v) => v.serialize(s),
        }
    }
}

impl Node {
    fn get_mut(&mut self, key: &str) -> Option<&mut Node> {
        match self {
            Node::Object(items) => items.iter_mut().find(|(k, _)| k == key).map(|(_, v)| v),
            _ => None,
        }
    }

    /// Replaces the value at an existing path.
    fn replace(&mut self, segments: &[Segment], value: Value) -> Result<(), String> {
        let mut here = self;
        for seg in segments {
            here = match (seg, here) {
                (Segment::Key(k), n) => n.get_mut(k),
                (Segment::Index(i), Node::Array(items)) => items.get_mut(*i),
                _ => None,
            }
            .ok_or("no such path in the case file")?;
        }
        *here = Node::Leaf(value);
        Ok(())
    }
}

/// What the written case records of its calibration.
#[derive(Debug, Clone)]
pub struct Provenance<'a> {
    /// The log's file name.
    pub log_name: &'a str,
    /// Whether the fit converged.
    pub converged: bool,
    /// Accepted iterations.
    pub iterations: usize,
}

/// The line added to the description: the log, the free parameters with their bounds, and
/// whether the fit converged (no date, so the same calibration writes the same file).
pub fn calibration_line(free: &[Free], p: &Provenance) -> String {
    let params = free
        .iter()
        .map(|f| {
            let (unit, per_si) = (&f.shown.0, f.shown.1);
            let b = |x: f64| crate::units::format_significant(x * per_si, 4);
            let unit = if unit.is_empty() {
                String::new()
            } else {
                format!(" {unit}")
            };
            format!(
                "{} ({} .. {}{unit})",
                f.param.name,
                b(f.param.lower),
                b(f.param.upper)
            )
        })
        .collect::<Vec<_>>()
        .join(", ");
    let outcome = if p.converged {
        format!(
            "the fit converged after {} iterations; the values at those paths are the fitted ones",
            p.iterations
        )
    } else {
        format!(
            "the fit did NOT converge (stopped after {} iterations); the values at those paths \
             are where it stopped, not a calibration",
            p.iterations
        )
    };
    format!(
        "Calibrated by boreflux calibrate to the log {}, free: {params}; {outcome}. Text \
         before this line describes the case before the calibration.",
        p.log_name
    )
}

/// The calibrated case file's text: `case_text` (the case as read, already checked) with
/// each free value set to `values_si`, the calibration line appended to the description
/// (a description is added after the title when the case has none) and the title marked.
pub fn calibrated_case(
    case_text: &str,
    free: &[Free],
    values_si: &[f64],
    p: &Provenance,
) -> Result<String, String> {
    let text = case_text.strip_prefix('\u{feff}').unwrap_or(case_text);
    let mut root: Node = serde_json::from_str(text).map_err(|e| e.to_string())?;
    for (f, &x) in free.iter().zip(values_si) {
        root.replace(&f.segments, f.case_value(x))
            .map_err(|e| format!("{}: {e}", f.param.name))?;
    }
    let line = calibration_line(free, p);
    let Node::Object(items) = &mut root else {
        return Err("the case file is not a JSON object".into());
    };
    let mark = if p.converged {
        format!(" (calibrated to {})", p.log_name)
    } else {
        format!(" (calibration to {} not converged)", p.log_name)
    };
    if let Some((_, Node::Leaf(Value::String(t)))) = items.iter_mut().find(|(k, _)| k == "title") {
        t.push_str(&mark);
    }
    match items.iter_mut().find(|(k, _)| k == "description") {
        Some((_, Node::Leaf(Value::String(d)))) => {
            if !d.is_empty() {
                d.push('\n');
            }
            d.push_str(&line);
        }
        Some(_) => return Err("description: not a string".into()),
        None => {
            let at = items
                .iter()
                .position(|(k, _)| k == "title")
                .map_or(0, |i| i + 1);
            items.insert(at, ("description".into(), Node::Leaf(Value::String(line))));
        }
    }
    let mut out = serde_json::to_string_pretty(&root).map_err(|e| e.to_string())?;
    out.push('\n');
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::calibrate::free::parse_free;

    #[test]
    fn key_order_is_kept_and_only_the_free_values_change() {
        let text = r#"{"title": "t", "zeta": {"b": 1, "a": [2, {"y": 3.5, "x": null}]},
                       "formation": {"porosity": 0.3, "conductivity": "4e-4 m/s"}}"#;
        let raw: Value = serde_json::from_str(text).unwrap();
        let f = parse_free("formation.conductivity=1e-5 m/s..1e-2 m/s", &raw).unwrap();
        let p = Provenance {
            log_name: "log.csv",
            converged: true,
            iterations: 3,
        };
        let out = calibrated_case(text, &[f], &[2.345678912e-4], &p).unwrap();
        let keys: Vec<usize> = ["\"title\"", "\"description\"", "\"zeta\"", "\"b\"", "\"a\""]
            .iter()
            .map(|k| out.find(k).unwrap())
            .collect();
        assert!(keys.windows(2).all(|w| w[0] < w[1]), "{out}");
        assert!(out.find("\"y\"").unwrap() < out.find("\"x\"").unwrap());
        assert!(out.find("\"porosity\"").unwrap() < out.find("\"conductivity\"").unwrap());
        let v: Value = serde_json::from_str(&out).unwrap();
        // 2.345678912e-4 to six significant digits, by hand: 2.34568e-4.
        assert_eq!(v["formation"]["conductivity"], "2.34568e-4 m/s");
        assert_eq!(v["zeta"]["a"][1]["y"], 3.5);
        assert_eq!(v["title"], "t (calibrated to log.csv)");
        let d = v["description"].as_str().unwrap();
        assert!(d.contains("log.csv") && d.contains("formation.conductivity (1e-5 .. 0.01 m/s)"));
        assert!(d.contains("converged after 3 iterations"), "{d}");
    }
}
