//! Free parameters of a calibration: `--free PATH=LOW..HIGH[:log|:linear]`.
//!
//! PATH is a case-file path (`formation.conductivity`, `drive.stages.1.drive.stroke`);
//! LOW and HIGH are quantities as in the case file (`1e-5 m/s`, `2 mm`) or bare SI numbers.
//! The start is the case's value. Default scale: log when the path names a conductivity,
//! a storage, a strength, an erodibility, a pressure or a shear, or is the lift-off median
//! (positive quantities spanning decades), linear otherwise. A fitted value is written
//! back in the unit the case wrote it in, to [`WRITTEN_DIGITS`] significant digits. Values
//! are shown in the case's unit; for a bare number in the case, in the unit of the bounds,
//! else in the SI display unit the case schema gives the path.

use crate::sweep::spec::{set_path, Segment};
use crate::units::{format_significant, parse_quantity, Quantity};
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
    /// Unit the values are shown in and how many of it make one SI unit (display value =
    /// SI value × factor); "" for a pure number.
    pub shown: (String, f64),
}

/// Significant digits of a fitted value written into the calibrated case: six digits round
/// by at most 5e-6 of the value, which is below the model's own time-stepping noise in a
/// calibration (about 1e-5 of the drawdown, docs/calibration.md §2) and far inside any
/// interval the fit reports, so the written case reproduces the fit (assumption: calibrate).
pub const WRITTEN_DIGITS: usize = 6;

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

/// A bound in SI, with its unit and SI factor when it has one.
fn to_si_with_unit(s: &str) -> Result<(f64, Option<(String, f64)>), String> {
    let (v, unit) = split_quantity(s)
        .ok_or_else(|| format!("\"{s}\" is not a number with an optional unit"))?;
    match unit {
        None => Ok((v, None)),
        Some(u) => factor(&u)
            .map(|f| (v * f, Some((u.clone(), f))))
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
    let (lower, lower_unit) = to_si_with_unit(lo).map_err(bad)?;
    let (upper, upper_unit) = to_si_with_unit(hi).map_err(bad)?;
    let param = FreeParameter {
        name: path.to_owned(),
        lower,
        upper,
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
    let shown = match unit
        .as_ref()
        .or(lower_unit.as_ref())
        .or(upper_unit.as_ref())
    {
        Some((u, f)) => (u.clone(), 1.0 / f),
        None => crate::report::input_units::si_display_of_path(path)
            .map_or_else(|| ("SI".to_owned(), 1.0), |(u, f)| (u.to_owned(), f)),
    };
    Ok(Free {
        param,
        segments: segs,
        unit,
        start,
        shown,
    })
}

impl Free {
    /// The value exactly, as the model runs take it: in the case's unit (shortest text
    /// that reads back to the same double), or a bare SI number.
    fn exact_value(&self, x_si: f64) -> Value {
        match &self.unit {
            None => serde_json::json!(x_si),
            Some((u, f)) => {
                // Scientific outside 1e-3 .. 1e6 so a conductivity does not come out as a
                // row of zeros.
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

    /// The value as it goes into the calibrated case file: [`WRITTEN_DIGITS`] significant
    /// digits, in the case's unit or as a bare SI number.
    pub fn case_value(&self, x_si: f64) -> Value {
        match &self.unit {
            None => {
                let text = format_significant(x_si, WRITTEN_DIGITS);
                serde_json::json!(text.parse::<f64>().unwrap_or(x_si))
            }
            Some((u, f)) => Value::String(format!(
                "{} {u}",
                format_significant(x_si / f, WRITTEN_DIGITS)
            )),
        }
    }

    /// Writes the value, exactly, into the case (for a model run).
    pub fn apply(&self, case: &mut Value, x_si: f64) -> Result<(), String> {
        set_path(case, &self.segments, self.exact_value(x_si))
            .map_err(|e| format!("{}: {e}", self.param.name))
    }

    /// The value in the unit it is shown in (`shown`).
    pub fn display(&self, x_si: f64) -> f64 {
        x_si * self.shown.1
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
        assert_eq!(f.shown.0, "m/s");
        // Written to six significant digits in the case's unit (1.4819381451479676e-9 is a
        // value of the kind the fit produces; its rounding by hand: 1.48194e-9).
        assert_eq!(
            f.case_value(1.4819381451479676e-9),
            serde_json::json!("1.48194e-9 m/s")
        );
        let mut c = case.clone();
        f.apply(&mut c, 2.5e-4).unwrap();
        assert_eq!(c["formation"]["conductivity"], "2.5e-4 m/s");
        let g = parse_free("cake.thickness=1 mm..10 mm", &case).unwrap();
        assert_eq!(g.param.scale, Scale::Linear);
        let back = to_si_with_unit(g.case_value(0.005).as_str().unwrap())
            .unwrap()
            .0;
        assert!((back - 0.005).abs() < 1e-17);
        let p = parse_free("formation.porosity=0.2..0.4:linear", &case).unwrap();
        assert_eq!(p.case_value(0.25), serde_json::json!(0.25));
        // A bare number with bare bounds: rounded to six digits by hand, unit from the
        // schema (a porosity is a pure number).
        assert_eq!(p.case_value(0.2512345678), serde_json::json!(0.251235));
        assert_eq!(p.shown, (String::new(), 1.0));
        // Bounds with a unit show a bare (SI) case value in that unit.
        let bare = serde_json::json!({"well": {"screen_length": 24}});
        let t = parse_free("well.screen_length=100 cm..4000 cm", &bare).unwrap();
        assert_eq!(t.shown.0, "cm");
        assert!((t.display(24.0) - 2400.0).abs() < 1e-9);
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
