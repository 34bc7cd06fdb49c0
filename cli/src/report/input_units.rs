//! The unit of a case input in the report's Inputs table, from the case file's JSON Schema:
//! the loader's own types name each input's quantity (`FlowRate`, `Pressure`, …), so an input
//! the table has no rule for is shown in its unit instead of as a bare SI number.

use std::collections::BTreeMap;
use std::sync::OnceLock;

use crate::units::Quantity;

use serde_json::{Map, Value};

use super::format::{
    Shown, AREA, CONDUCTIVITY, DENSITY, ERODIBILITY, FLOW, FORCE, FORCHHEIMER_BETA, FREQUENCY,
    NUMBER, PER_METRE, PRESSURE, SLOT_VELOCITY, SPECIFIC_STORAGE, VOLUME,
};

/// What the case schema says of one input: how it is shown and, for a quantity, the
/// quantity kind (whose SI unit a bare number in the case is read in).
#[derive(Debug, Clone, Copy, PartialEq)]
struct Known {
    unit: InputUnit,
    quantity: Option<Quantity>,
}

/// How an input is shown.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum InputUnit {
    /// In a fixed unit.
    Fixed(Shown),
    /// A length: mm below 0.1 m, else m.
    Length,
    /// A duration.
    Time,
    /// A temperature (K and °C).
    Temperature,
    /// A whole number.
    Count,
}

/// The display of a quantity type of the case schema (`$defs` name); `None` for a type that
/// is no quantity (an object, a name).
fn quantity(name: &str) -> Option<InputUnit> {
    use InputUnit::*;
    Some(match name {
        "Length" | "Head" => Length,
        "Time" | "Seconds" | "DurationValue" => Time,
        "Temperature" => Temperature,
        "CellsValue" | "StepsPerCycleValue" => Count,
        "FlowRate" => Fixed(FLOW),
        "Pressure" => Fixed(PRESSURE),
        "Velocity" => Fixed(SLOT_VELOCITY),
        "Area" => Fixed(AREA),
        "Volume" => Fixed(VOLUME),
        "Force" => Fixed(FORCE),
        "Density" => Fixed(DENSITY),
        "PerMetre" => Fixed(PER_METRE),
        "Fraction" | "DischargeCoefficientValue" => Fixed(NUMBER),
        "Conductivity" => Fixed(CONDUCTIVITY),
        "SpecificStorage" => Fixed(SPECIFIC_STORAGE),
        "Frequency" => Fixed(FREQUENCY),
        "Erodibility" => Fixed(ERODIBILITY),
        "Beta" => Fixed(FORCHHEIMER_BETA),
        _ => return None,
    })
}

/// Nesting deeper than any case (schedule stages hold drives) is not followed.
const MAX_DEPTH: usize = 8;

fn walk(
    defs: &Map<String, Value>,
    node: &Value,
    prefix: &str,
    depth: usize,
    out: &mut BTreeMap<String, Known>,
) {
    if depth > MAX_DEPTH {
        return;
    }
    if let Some(props) = node.get("properties").and_then(Value::as_object) {
        for (k, v) in props {
            let path = if prefix.is_empty() {
                k.clone()
            } else {
                format!("{prefix}.{k}")
            };
            property(defs, v, &path, depth + 1, out);
        }
    }
    for key in ["oneOf", "anyOf", "allOf"] {
        for v in node
            .get(key)
            .and_then(Value::as_array)
            .into_iter()
            .flatten()
        {
            walk(defs, v, prefix, depth + 1, out);
        }
    }
    // The elements of a list (schedule stages) under the list's own path: a path into a
    // list names the element by its index, which [`of_path`] drops.
    if let Some(items) = node.get("items").filter(|i| i.is_object()) {
        property(defs, items, prefix, depth + 1, out);
    }
}

fn property(
    defs: &Map<String, Value>,
    v: &Value,
    path: &str,
    depth: usize,
    out: &mut BTreeMap<String, Known>,
) {
    let alternatives = std::iter::once(v).chain(
        v.get("anyOf")
            .and_then(Value::as_array)
            .into_iter()
            .flatten(),
    );
    for alt in alternatives {
        if let Some(name) = alt
            .get("$ref")
            .and_then(Value::as_str)
            .and_then(|r| r.strip_prefix("#/$defs/"))
        {
            match quantity(name) {
                Some(unit) => {
                    let quantity = crate::case::QUANTITY_KINDS
                        .iter()
                        .find(|(n, _)| *n == name)
                        .map(|(_, q)| *q)
                        .or(match name {
                            // `duration`: a time (or a number of cycles, written with the word).
                            "DurationValue" => Some(Quantity::Time),
                            _ => None,
                        });
                    out.entry(path.to_owned())
                        .or_insert(Known { unit, quantity });
                }
                None => {
                    if let Some(d) = defs.get(name) {
                        walk(defs, d, path, depth, out);
                    }
                }
            }
        }
        // A bare number the loader takes without a unit is a pure number: every input
        // with a unit has a quantity type above.
        let is = |ty: &str| match alt.get("type") {
            Some(Value::String(t)) => t == ty,
            Some(Value::Array(ts)) => ts.iter().any(|t| t == ty),
            _ => false,
        };
        let plain = |unit| Known {
            unit,
            quantity: None,
        };
        if is("integer") {
            out.entry(path.to_owned())
                .or_insert(plain(InputUnit::Count));
        } else if is("number") {
            out.entry(path.to_owned())
                .or_insert(plain(InputUnit::Fixed(NUMBER)));
        }
    }
    walk(defs, v, path, depth, out);
}

/// The unit of every input path of the case schema (`assessment.design_rate` → flow rate).
fn table() -> &'static BTreeMap<String, Known> {
    static TABLE: OnceLock<BTreeMap<String, Known>> = OnceLock::new();
    TABLE.get_or_init(|| {
        let schema = crate::case::schema();
        let mut out = BTreeMap::new();
        if let Some(defs) = schema.get("$defs").and_then(Value::as_object) {
            walk(defs, &schema, "", 0, &mut out);
        }
        out
    })
}

/// What the schema says of the input at `path`; an index into a list (`drive.stages.1.…`)
/// is dropped, as the list's elements are listed under the list's path.
fn known(path: &str) -> Option<Known> {
    let key: Vec<&str> = path
        .split('.')
        .filter(|seg| seg.is_empty() || !seg.bytes().all(|b| b.is_ascii_digit()))
        .collect();
    table().get(&key.join(".")).copied()
}

/// The unit of the input at `path` (dotted, as in the Inputs table), from the case schema.
pub fn of_path(path: &str) -> Option<InputUnit> {
    known(path).map(|k| k.unit)
}

/// The SI unit in which the case reads a bare number at `path` (`"m/s"` for
/// `drive.lift_rate`, written for display: `m³/s`, `kg/m³`), or `None` where the input is
/// a pure number or no quantity (`drive.strokes_per_minute`, `drive.kind`).
pub fn si_unit_of_path(path: &str) -> Option<String> {
    let u = known(path)?.quantity?.si_unit();
    (!u.is_empty()).then(|| pretty_unit(u))
}

/// A unit as the case files write it (`m3/s`, `s2/m2`, `m/s/Pa`) as the report shows it
/// (`m³/s`, `s²/m²`, `m/(s·Pa)`).
fn pretty_unit(u: &str) -> String {
    if u == "m/s/Pa" {
        return "m/(s·Pa)".to_owned();
    }
    u.replace('2', "²").replace('3', "³")
}

/// The SI display unit of the input at `path` and how many of it make one SI base unit
/// (`("kPa", 1e-3)` for a pressure, `("", 1.0)` for a pure number), from the case schema;
/// `None` when the schema has no quantity there.
pub(crate) fn si_display_of_path(path: &str) -> Option<(&'static str, f64)> {
    Some(match of_path(path)? {
        InputUnit::Fixed(s) => (s.si.label, s.si.per_si),
        InputUnit::Length => ("m", 1.0),
        InputUnit::Time => ("s", 1.0),
        InputUnit::Temperature => ("K", 1.0),
        InputUnit::Count => ("", 1.0),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The SI unit of a bare number comes from the case schema's quantity type, also inside
    /// a schedule's stages; pure numbers and words have none.
    #[test]
    fn si_units_of_paths() {
        assert_eq!(si_unit_of_path("drive.lift_rate").as_deref(), Some("m/s"));
        assert_eq!(si_unit_of_path("drive.stroke").as_deref(), Some("m"));
        assert_eq!(si_unit_of_path("duration").as_deref(), Some("s"));
        assert_eq!(
            si_unit_of_path("assessment.design_rate").as_deref(),
            Some("m³/s")
        );
        assert_eq!(
            si_unit_of_path("drive.stages.1.drive.stroke").as_deref(),
            Some("m")
        );
        assert_eq!(si_unit_of_path("drive.strokes_per_minute"), None);
        assert_eq!(si_unit_of_path("pack.porosity"), None);
        assert_eq!(si_unit_of_path("drive.kind"), None);
        assert_eq!(si_unit_of_path("no.such.path"), None);
        assert_eq!(pretty_unit("kg/m3"), "kg/m³");
        assert_eq!(pretty_unit("s2/m2"), "s²/m²");
    }
}
