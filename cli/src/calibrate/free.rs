//! Free parameters of a calibration: `--free PATH=LOW..HIGH[:log|:linear]`.
//!
//! PATH is a case-file path (`formation.conductivity`, `drive.stages.1.drive.stroke`);
//! LOW and HIGH are quantities as in the case file (`1e-5 m/s`, `2 mm`) or bare SI numbers.
//! The start is the case's value. Default scale: log when the path names a conductivity,
//! a storage, a strength, an erodibility, a pressure or a shear, or is the lift-off median
//! (positive quantities spanning decades), linear otherwise. A fitted value is written back in the unit the case wrote
//! it in.

use crate::sweep::spec::{set_path, Segment};
use crate::units::{parse_quantity, Quantity};
use boreflux_solver::calibrate::{FreeParameter, Scale};
use serde_json::Value;

/// A free parameter with where it lives in the case.
#[derive(Debug, Clone)]
pub struct Free {
    /// Bounds and scale (SI).
    pub param: FreeParameter,
    /// Path segments.
    pub segments: Vec<Segment>,
    /// Unit the case wrote the value in, with its SI factor (None: a bare SI number).
    pub unit: Option<(String, f64)>,
    /// The case's value, SI.
    pub start: f64,
}

/// Quantities tried, in order, to read a unit; the first that accepts it gives its factor.
const KINDS: [Quantity; 11] = [
    Quantity::Conductivity,
    Quantity::Length,
    Quantity::Time,
    Quantity::Frequency,
    Quantity::FlowRate,
    Quantity::Pressure,
    Quantity::SpecificStorage,
    Quantity::Area,
    Quantity::Volume,
    Quantity::Temperature,
    Quantity::Dimensionless,
];

/// Splits "4e-4 m/s" into (4e-4, Some("m/s")), "0.3" into (0.3, None).
fn split_quantity(s: &str) -> Option<(f64, Option<String>)> {
    let s = s.trim();
    let end = s
        .char_indices()
        .find(|&(i, c)| {
            !(c.is_ascii_digit()
                || c == '.'
                || c == '-'
                || c == '+'
                || ((c == 'e' || c == 'E')
                    && i > 0
                    && s[i + 1..]
                        .starts_with(|d: char| d.is_ascii_digit() || d == '-' || d == '+')))
        })
        .map_or(s.len(), |(i, _)| i);
    let v: f64 = s[..end].parse().ok()?;
    let unit = s[end..].trim();
    Some((v, (!unit.is_empty()).then(|| unit.to_owned())))
}

/// SI factor of a unit: the first quantity kind that accepts it.
fn factor(unit: &str) -> Option<f64> {
    KINDS
        .iter()
        .find_map(|&q| parse_quantity(&Value::String(format!("1 {unit}")), q).ok())
}

fn to_si(s: &str) -> Result<f64, String> {
    let (v, unit) = split_quantity(s)
        .ok_or_else(|| format!("\"{s}\" is not a number with an optional unit"))?;
    match unit {
        None => Ok(v),
        Some(u) => factor(&u)
            .map(|f| v * f)
            .ok_or_else(|| format!("unknown unit \"{u}\" in \"{s}\"")),
    }
}

fn segments(path: &str) -> Result<Vec<Segment>, String> {
    path.split('.')
        .map(|k| {
            if k.is_empty() {
                Err(format!("empty key in path `{path}`"))
            } else {
                Ok(k.parse::<usize>()
                    .map_or_else(|_| Segment::Key(k.to_owned()), Segment::Index))
            }
        })
        .collect()
}

fn lookup<'a>(v: &'a Value, segs: &[Segment]) -> Option<&'a Value> {
    segs.iter().try_fold(v, |v, s| match s {
        Segment::Key(k) => v.get(k.as_str()),
        Segment::Index(i) => v.get(*i),
    })
}

fn default_scale(path: &str) -> Scale {
    let last = path.rsplit('.').next().unwrap_or(path);
    let logs = [
        "conductivity",
        "storage",
        "strength",
        "erodibility",
        "pressure",
        "shear",
    ];
    if logs.iter().any(|w| last.contains(w)) {
        Scale::Log
    } else {
        Scale::Linear
    }
}

/// Parses one `--free` argument against the raw case (for the start value and its unit).
pub fn parse_free(arg: &str, raw_case: &Value) -> Result<Free, String> {
    let bad = |m: String| format!("--free {arg}: {m}");
    let (path, rest) = arg.split_once('=').ok_or_else(|| {
        bad("expected PATH=LOW..HIGH, e.g. formation.conductivity=1e-5 m/s..1e-3 m/s".into())
    })?;
    let path = path.trim();
    let (range, scale) = match rest.rsplit_once(':') {
        Some((r, "log")) => (r, Scale::Log),
        Some((r, "linear")) => (r, Scale::Linear),
        _ => (rest, default_scale(path)),
    };
    let (lo, hi) = range
        .split_once("..")
        .ok_or_else(|| bad("the bounds are LOW..HIGH".into()))?;
    let segs = segments(path).map_err(bad)?;
    let param = FreeParameter {
        name: path.to_owned(),
        lower: to_si(lo).map_err(bad)?,
        upper: to_si(hi).map_err(bad)?,
        scale,
    };
    param.validate().map_err(bad)?;
    let here = lookup(raw_case, &segs).ok_or_else(|| {
        bad(format!(
            "the case has no value at {path}; write a start value there"
        ))
    })?;
    let (start, unit) = match here {
        Value::Number(n) => (n.as_f64().unwrap_or(f64::NAN), None),
        Value::String(s) => {
            let (v, unit) = split_quantity(s)
                .ok_or_else(|| bad(format!("the case's value \"{s}\" is not a number")))?;
            match unit {
                None => (v, None),
                Some(u) => {
                    let f = factor(&u)
                        .ok_or_else(|| bad(format!("unknown unit \"{u}\" in the case")))?;
                    (v * f, Some((u, f)))
                }
            }
        }
        _ => return Err(bad(format!("the case's value at {path} is not a number"))),
    };
    if !(start >= param.lower && start <= param.upper) {
        return Err(bad(format!(
            "the case's value {start} (SI) is outside the bounds {} .. {}",
            param.lower, param.upper
        )));
    }
    Ok(Free {
        param,
        segments: segs,
        unit,
        start,
    })
}

impl Free {
    /// The value as it goes into the case file: in the case's unit, or a bare SI number.
    pub fn case_value(&self, x_si: f64) -> Value {
        match &self.unit {
            None => serde_json::json!(x_si),
            Some((u, f)) => {
                // Shortest text that reads back to the same double; scientific outside
                // 1e-3 .. 1e6 so a conductivity does not come out as a row of zeros.
                let v = x_si / f;
                let a = v.abs();
                let text = if a == 0.0 || (1e-3..1e6).contains(&a) {
                    format!("{v}")
                } else {
                    format!("{v:e}")
                };
                Value::String(format!("{text} {u}"))
            }
        }
    }

    /// Writes the value into the case.
    pub fn apply(&self, case: &mut Value, x_si: f64) -> Result<(), String> {
        set_path(case, &self.segments, self.case_value(x_si))
            .map_err(|e| format!("{}: {e}", self.param.name))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bounds_in_units_start_from_the_case_and_values_go_back_in_its_unit() {
        let case = serde_json::json!({"formation": {"conductivity": "4e-4 m/s", "porosity": 0.3},
                                      "cake": {"thickness": "3 mm"}});
        let f = parse_free("formation.conductivity=1e-5 m/s..100 m/d", &case).unwrap();
        assert_eq!(f.param.scale, Scale::Log);
        assert!((f.param.upper - 100.0 / 86_400.0).abs() < 1e-15);
        assert!((f.start - 4e-4).abs() < 1e-18);
        let mut c = case.clone();
        f.apply(&mut c, 2.5e-4).unwrap();
        assert_eq!(c["formation"]["conductivity"], "2.5e-4 m/s");
        let g = parse_free("cake.thickness=1 mm..10 mm", &case).unwrap();
        assert_eq!(g.param.scale, Scale::Linear);
        let back = to_si(g.case_value(0.005).as_str().unwrap()).unwrap();
        assert!((back - 0.005).abs() < 1e-17);
        let p = parse_free("formation.porosity=0.2..0.4:linear", &case).unwrap();
        assert_eq!(p.case_value(0.25), serde_json::json!(0.25));
        assert!(parse_free("formation.porosity=0.31..0.4", &case)
            .unwrap_err()
            .contains("outside the bounds"));
        assert!(parse_free("formation.porosity=0.2..0.4:log", &case).is_ok());
        assert!(parse_free("well.nothing=1..2", &case)
            .unwrap_err()
            .contains("no value at well.nothing"));
        assert!(
            parse_free("formation.conductivity=1e-5 furlong/s..1", &case)
                .unwrap_err()
                .contains("unknown unit")
        );
    }
}
