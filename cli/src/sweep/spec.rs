//! `--vary PATH=SPEC`: which case-file value a sweep changes, and the values it takes.
//!
//! ```text
//! PATH   dot-separated keys into the case file; a number indexes an array:
//!        drive.strokes_per_minute   pack.outer_radius   drive.stages.1.drive.stroke
//! SPEC   V1,V2,…        a list; each value a JSON number, a quantity with its unit
//!                       ("0.3 m", "25 gpm") or a word (sinusoidal)
//!        A..B:N         N values evenly spaced from A to B, both included
//!        A..B:N:log     N values evenly spaced in log(A)…log(B) (A and B of one sign)
//!                       A and B are numbers or quantities in the same unit
//! ```
//! Values are written into the case as numbers when they are bare numbers and as strings
//! otherwise, exactly as a user would type them into the file; the case loader then checks
//! them like any other value.

use serde_json::Value;
use std::fmt;

/// One key of a path: an object key or an array index.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Segment {
    /// Object key.
    Key(String),
    /// Array index.
    Index(usize),
}

/// A parsed `--vary` argument.
#[derive(Debug, Clone, PartialEq)]
pub struct Variable {
    /// The path as given, e.g. `drive.stroke`.
    pub path: String,
    /// The path's segments.
    pub segments: Vec<Segment>,
    /// The values, as they go into the case file.
    pub values: Vec<Value>,
}

/// A `--vary` argument that cannot be used, with the reason.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SpecError(pub String);

impl fmt::Display for SpecError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.0)
    }
}

impl std::error::Error for SpecError {}

/// What is wrong with one `--vary` path or value list (the caller adds `--vary PATH=…`).
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum VaryError {
    /// `PATH=` with no path.
    #[error("the path is empty")]
    EmptyPath,
    /// `a..b` with an empty key.
    #[error("empty key in path `{0}`")]
    EmptyKey(String),
    /// `PATH=` with no values.
    #[error("no values")]
    NoValues,
    /// `a,,b`.
    #[error("empty value in `{0}`")]
    EmptyValue(String),
    /// A range end that does not start with a number.
    #[error("`{0}` does not start with a number")]
    NotANumber(String),
    /// A range end that is not finite.
    #[error("`{0}` is not a finite number")]
    NotFinite(String),
    /// A range not written `A..B:N` or `A..B:N:log`.
    #[error("a range is A..B:N or A..B:N:log")]
    RangeUsage,
    /// A range option other than `log`.
    #[error("unknown range option `{0}`; a range is A..B:N or A..B:N:log")]
    RangeOption(String),
    /// Range ends in different units.
    #[error("both ends of a range need the same unit, got `{0}` and `{1}`")]
    RangeUnits(String, String),
    /// A count that is not a whole number.
    #[error("`{0}` is not a count of values; a range is A..B:N or A..B:N:log")]
    RangeCount(String),
    /// A count out of bounds.
    #[error("a range needs 2 to {MAX_VALUES} values, got {0}")]
    RangeSize(usize),
    /// A log range through or at zero.
    #[error("a log range needs two ends of one sign, neither zero")]
    LogRangeSign,
    /// A key below a value that is not an object.
    #[error("`{walked}` is not an object, cannot set `{key}`")]
    NotAnObject {
        /// The path walked so far.
        walked: String,
        /// The key to set.
        key: String,
    },
    /// An index below a value that is not an array.
    #[error("`{walked}` is not an array, cannot index [{index}]")]
    NotAnArray {
        /// The path walked so far.
        walked: String,
        /// The index.
        index: usize,
    },
    /// An index past the end of an array.
    #[error("`{walked}` has {len} entries, index {index} is out of range")]
    IndexOutOfRange {
        /// The path walked so far.
        walked: String,
        /// Entries in the array.
        len: usize,
        /// The index.
        index: usize,
    },
}

/// Largest number of values in one range, and of scenarios in one sweep.
pub const MAX_VALUES: usize = 100_000;

/// Parses `PATH=SPEC`.
pub fn parse_vary(arg: &str) -> Result<Variable, SpecError> {
    let err = |m: VaryError| SpecError(format!("--vary {arg}: {m}"));
    let (path, spec) = arg.split_once('=').ok_or_else(|| {
        SpecError(format!(
            "--vary {arg}: expected PATH=VALUES, e.g. drive.stroke=0.3m,0.6m"
        ))
    })?;
    let path = path.trim();
    let segments = parse_path(path).map_err(err)?;
    let values = parse_values(spec.trim()).map_err(err)?;
    Ok(Variable {
        path: path.to_owned(),
        segments,
        values,
    })
}

pub(crate) fn parse_path(path: &str) -> Result<Vec<Segment>, VaryError> {
    if path.is_empty() {
        return Err(VaryError::EmptyPath);
    }
    path.split('.')
        .map(|s| {
            let s = s.trim();
            if s.is_empty() {
                Err(VaryError::EmptyKey(path.to_owned()))
            } else if let Ok(i) = s.parse::<usize>() {
                Ok(Segment::Index(i))
            } else {
                Ok(Segment::Key(s.to_owned()))
            }
        })
        .collect()
}

fn parse_values(spec: &str) -> Result<Vec<Value>, VaryError> {
    if spec.is_empty() {
        return Err(VaryError::NoValues);
    }
    if let Some((a, rest)) = spec.split_once("..") {
        return parse_range(a.trim(), rest.trim());
    }
    spec.split(',')
        .map(|v| {
            let v = v.trim();
            if v.is_empty() {
                Err(VaryError::EmptyValue(spec.to_owned()))
            } else {
                Ok(scalar(v))
            }
        })
        .collect()
}

/// A bare number becomes a JSON number; `true`/`false` booleans; anything else a string.
fn scalar(v: &str) -> Value {
    match v {
        "true" => Value::Bool(true),
        "false" => Value::Bool(false),
        _ => v
            .parse::<f64>()
            .ok()
            .filter(|x| x.is_finite())
            .map_or_else(|| Value::String(v.to_owned()), number),
    }
}

/// A JSON number: an integer when the value is a whole number (so 30 stays `30`).
fn number(x: f64) -> Value {
    if x.fract() == 0.0 && x.abs() < 9.0e15 {
        Value::from(x as i64)
    } else {
        serde_json::Number::from_f64(x).map_or(Value::Null, Value::Number)
    }
}

/// Splits `0.3 m`, `0.3m` or `0.3` into the number and the unit text (possibly empty).
pub(crate) fn number_and_unit(text: &str) -> Result<(f64, String), VaryError> {
    let end = text
        .char_indices()
        .find(|&(i, c)| {
            !(c.is_ascii_digit()
                || c == '.'
                || c == '+'
                || c == '-'
                || ((c == 'e' || c == 'E')
                    && text[i + 1..]
                        .starts_with(|d: char| d.is_ascii_digit() || d == '-' || d == '+')))
        })
        .map_or(text.len(), |(i, _)| i);
    let x: f64 = text[..end]
        .parse()
        .map_err(|_| VaryError::NotANumber(text.to_owned()))?;
    if !x.is_finite() {
        return Err(VaryError::NotFinite(text.to_owned()));
    }
    Ok((x, text[end..].trim().to_owned()))
}

fn parse_range(a: &str, rest: &str) -> Result<Vec<Value>, VaryError> {
    let mut parts = rest.split(':');
    let b = parts.next().unwrap_or("").trim();
    let n = parts.next().ok_or(VaryError::RangeUsage)?.trim();
    let log = match parts.next().map(str::trim) {
        None => false,
        Some("log") => true,
        Some(other) => return Err(VaryError::RangeOption(other.to_owned())),
    };
    if parts.next().is_some() {
        return Err(VaryError::RangeUsage);
    }
    let (x0, u0) = number_and_unit(a)?;
    let (x1, u1) = number_and_unit(b)?;
    if u0 != u1 {
        return Err(VaryError::RangeUnits(u0, u1));
    }
    let n: usize = n.parse().map_err(|_| VaryError::RangeCount(n.to_owned()))?;
    if !(2..=MAX_VALUES).contains(&n) {
        return Err(VaryError::RangeSize(n));
    }
    if log && (x0 == 0.0 || x1 == 0.0 || (x0 < 0.0) != (x1 < 0.0)) {
        return Err(VaryError::LogRangeSign);
    }
    let at = |k: usize| {
        let f = k as f64 / (n - 1) as f64;
        let x = if k == 0 {
            x0
        } else if k == n - 1 {
            x1
        } else if log {
            x0.signum() * (x0.abs().ln() + f * (x1.abs().ln() - x0.abs().ln())).exp()
        } else {
            x0 + f * (x1 - x0)
        };
        // Twelve significant digits: 0.5, not 0.5000000000000001, in tables and files.
        format!("{x:.11e}").parse::<f64>().unwrap_or(x)
    };
    Ok((0..n)
        .map(|k| {
            let x = at(k);
            if u0.is_empty() {
                number(x)
            } else if x != 0.0 && (x.abs() < 1e-4 || x.abs() >= 1e9) {
                Value::String(format!("{x:e} {u0}"))
            } else {
                Value::String(format!("{x} {u0}"))
            }
        })
        .collect())
}

/// Writes `value` at `segments` in `case`, creating missing objects on the way. An array
/// index must exist; a key that is not one of the case file's is left for the case loader
/// to reject (with its suggestion of the key meant).
pub fn set_path(case: &mut Value, segments: &[Segment], value: Value) -> Result<(), VaryError> {
    let mut here = case;
    let mut walked = String::new();
    for (k, seg) in segments.iter().enumerate() {
        let last = k + 1 == segments.len();
        here = match seg {
            Segment::Key(key) => {
                if here.is_null() {
                    *here = Value::Object(Default::default());
                }
                let map = here.as_object_mut().ok_or_else(|| VaryError::NotAnObject {
                    walked: walked.clone(),
                    key: key.clone(),
                })?;
                if last {
                    map.insert(key.clone(), value);
                    return Ok(());
                }
                map.entry(key.clone()).or_insert(Value::Null)
            }
            Segment::Index(i) => {
                let items = here.as_array_mut().ok_or_else(|| VaryError::NotAnArray {
                    walked: walked.clone(),
                    index: *i,
                })?;
                let len = items.len();
                let slot = items
                    .get_mut(*i)
                    .ok_or_else(|| VaryError::IndexOutOfRange {
                        walked: walked.clone(),
                        len,
                        index: *i,
                    })?;
                if last {
                    *slot = value;
                    return Ok(());
                }
                slot
            }
        };
        if !walked.is_empty() {
            walked.push('.');
        }
        match seg {
            Segment::Key(key) => walked.push_str(key),
            Segment::Index(i) => walked.push_str(&i.to_string()),
        }
    }
    Err(VaryError::EmptyPath)
}

/// A drawn value as it goes into the case file: a bare number without a unit, otherwise
/// `"<x> <unit>"` with x in the shortest form that reads back to the same double
/// (exponent form below 1e-4 and from 1e9).
pub fn quantity(x: f64, unit: &str) -> Value {
    if unit.is_empty() {
        serde_json::Number::from_f64(x).map_or(Value::Null, Value::Number)
    } else if x != 0.0 && (x.abs() < 1e-4 || x.abs() >= 1e9) {
        Value::String(format!("{x:e} {unit}"))
    } else {
        Value::String(format!("{x} {unit}"))
    }
}

/// A value as text for tables: strings without quotes, numbers as JSON writes them.
pub fn label(v: &Value) -> String {
    match v {
        Value::String(s) => s.clone(),
        other => other.to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    fn values(arg: &str) -> Vec<Value> {
        parse_vary(arg).unwrap().values
    }

    #[test]
    fn lists_keep_numbers_quantities_and_words() {
        let v = parse_vary("drive.stages.1.drive.stroke=0.3 m, 0.6m ,0.9").unwrap();
        assert_eq!(v.path, "drive.stages.1.drive.stroke");
        assert_eq!(
            v.segments,
            [
                Segment::Key("drive".into()),
                Segment::Key("stages".into()),
                Segment::Index(1),
                Segment::Key("drive".into()),
                Segment::Key("stroke".into())
            ]
        );
        assert_eq!(v.values, [json!("0.3 m"), json!("0.6m"), json!(0.9)]);
        assert_eq!(
            values("drive.kinematics=sinusoidal,trapezoidal"),
            [json!("sinusoidal"), json!("trapezoidal")]
        );
    }

    #[test]
    fn ranges_are_even_in_value_or_in_log_and_keep_the_unit() {
        assert_eq!(
            values("drive.strokes_per_minute=10..40:4"),
            [json!(10), json!(20), json!(30), json!(40)]
        );
        // 0.3 + 0.2 k, printed to twelve significant digits.
        assert_eq!(
            values("pack.outer_radius=0.3 m..0.9 m:4"),
            [
                json!("0.3 m"),
                json!("0.5 m"),
                json!("0.7 m"),
                json!("0.9 m")
            ]
        );
        assert_eq!(
            values("cake.conductivity=1e-9 m/s..1e-7 m/s:3:log"),
            [json!("1e-9 m/s"), json!("1e-8 m/s"), json!("1e-7 m/s")]
        );
        assert_eq!(
            values("numerics.theta=1e-3..1e-1:3:log"),
            [json!(0.001), json!(0.01), json!(0.1)]
        );
    }

    #[test]
    fn bad_arguments_say_what_is_wrong() {
        let msg = |a: &str| parse_vary(a).unwrap_err().0;
        assert!(msg("drive.stroke").contains("PATH=VALUES"));
        assert!(msg("=1,2").contains("path is empty"));
        assert!(msg("drive..stroke=1").contains("empty key"));
        assert!(msg("drive.stroke=").contains("no values"));
        assert!(msg("drive.stroke=1,,2").contains("empty value"));
        assert!(msg("drive.stroke=1 m..2 ft:3").contains("same unit"));
        assert!(msg("drive.stroke=1..2:1").contains("2 to"));
        assert!(msg("drive.stroke=1..2").contains("A..B:N"));
        assert!(msg("drive.stroke=0..2:3:log").contains("one sign"));
        assert!(msg("drive.stroke=1..2:3:cubic").contains("unknown range option"));
        assert!(msg("drive.stroke=a..2:3").contains("does not start with a number"));
    }

    #[test]
    fn set_path_creates_objects_and_checks_arrays() {
        let mut case = json!({"drive": {"stages": [{"drive": {"stroke": 1}}]}});
        set_path(
            &mut case,
            &parse_path("numerics.theta").unwrap(),
            json!(1.0),
        )
        .unwrap();
        set_path(
            &mut case,
            &parse_path("drive.stages.0.drive.stroke").unwrap(),
            json!("2 m"),
        )
        .unwrap();
        assert_eq!(
            case,
            json!({"drive": {"stages": [{"drive": {"stroke": "2 m"}}]}, "numerics": {"theta": 1.0}})
        );
        let e = set_path(
            &mut case,
            &parse_path("drive.stages.3.drive").unwrap(),
            json!(1),
        );
        assert!(e
            .unwrap_err()
            .to_string()
            .contains("has 1 entries, index 3"));
        let e = set_path(
            &mut case,
            &parse_path("numerics.theta.x").unwrap(),
            json!(1),
        );
        assert!(e
            .unwrap_err()
            .to_string()
            .contains("`numerics.theta` is not an object"));
    }
}
