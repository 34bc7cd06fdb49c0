//! `--sample PATH=DISTRIBUTION`: the distribution one input is drawn from, and its
//! quantile function (inverse CDF), through which a uniform draw u in (0, 1) becomes a
//! value. docs/sweeps.md §Distributions states each formula.
//!
//! ```text
//! uniform(A, B)                 A + u (B − A)
//! loguniform(A, B)              0 < A < B; exp(ln A + u (ln B − ln A))
//! normal(MEAN, SD)              MEAN + SD Φ⁻¹(u)
//! lognormal(MEDIAN, SDLN)       MEDIAN exp(SDLN Φ⁻¹(u)); SDLN, the standard deviation
//!                               of ln X, has no unit
//! triangular(MIN, MODE, MAX)    the inverse of the piecewise-quadratic CDF
//! normal and lognormal take truncation bounds: normal(0.3 m, 0.1 m, min=0.05 m),
//! lognormal(1e-4 m/s, 1.2, min=1e-6 m/s, max=1e-2 m/s); the draw is then
//! Φ⁻¹(Φ(a) + u (Φ(b) − Φ(a))) with a, b the standardised bounds.
//! ```
//! Every number may carry a unit ("0.3 m"); the numbers of one distribution share one
//! unit (the log-normal's SDLN has none), and the drawn value is written into the case with
//! that unit, for the case loader to convert and check like any typed value.

use super::normal;
use super::spec::{number_and_unit, VaryError};
use std::fmt;

/// A distribution's shape and parameters (in the unit of [`Distribution::unit`]).
#[derive(Debug, Clone, PartialEq)]
pub enum Shape {
    /// Uniform on [a, b].
    Uniform { a: f64, b: f64 },
    /// Log-uniform on [a, b], 0 < a < b.
    LogUniform { a: f64, b: f64 },
    /// Normal, optionally truncated to [lo, hi].
    Normal {
        mean: f64,
        sd: f64,
        lo: f64,
        hi: f64,
    },
    /// Log-normal: ln X normal with mean ln(median) and standard deviation `sdln`,
    /// optionally truncated to [lo, hi] (0 ≤ lo).
    LogNormal {
        median: f64,
        sdln: f64,
        lo: f64,
        hi: f64,
    },
    /// Triangular on [a, b] with mode c.
    Triangular { a: f64, c: f64, b: f64 },
}

/// A parsed distribution: the shape and the unit its numbers are in.
#[derive(Debug, Clone, PartialEq)]
pub struct Distribution {
    /// Shape and parameters.
    pub shape: Shape,
    /// The unit text shared by the numbers ("" for a bare number).
    pub unit: String,
    /// The distribution as written (trimmed), kept with the table.
    pub text: String,
}

/// What is wrong with a distribution.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum DistError {
    /// Not `NAME(ARGS)`.
    #[error("expected a distribution such as uniform(0.3 m, 0.9 m); {KNOWN}")]
    Usage,
    /// An unknown name.
    #[error("unknown distribution `{0}`; {KNOWN}")]
    Unknown(String),
    /// Wrong number of positional numbers.
    #[error("{name} takes {want}, got {got} number{}", if *got == 1 { "" } else { "s" })]
    Arity {
        /// The distribution.
        name: &'static str,
        /// The parameters it takes.
        want: &'static str,
        /// How many were given.
        got: usize,
    },
    /// A number that does not parse.
    #[error("{0}")]
    Number(VaryError),
    /// Numbers in different units.
    #[error("the numbers of one distribution need one unit, got `{0}` and `{1}`")]
    Units(String, String),
    /// A unit on a number that has none.
    #[error("the log-normal's SDLN (standard deviation of ln X) has no unit, got `{0}`")]
    SdlnUnit(String),
    /// A keyword other than min/max, or one on a distribution without bounds.
    #[error("`{0}`: only normal and lognormal take min= and max=")]
    Keyword(String),
    /// Parameters out of their domain.
    #[error("{0}")]
    Domain(String),
}

const KNOWN: &str = "known: uniform(A, B), loguniform(A, B), normal(MEAN, SD[, min=…][, max=…]), \
                     lognormal(MEDIAN, SDLN[, min=…][, max=…]), triangular(MIN, MODE, MAX)";

impl fmt::Display for Distribution {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.text)
    }
}

/// Parses `NAME(ARGS)`.
pub fn parse(text: &str) -> Result<Distribution, DistError> {
    let text = text.trim();
    let (name, rest) = text.split_once('(').ok_or(DistError::Usage)?;
    let args = rest.trim_end().strip_suffix(')').ok_or(DistError::Usage)?;
    let name = name.trim().to_ascii_lowercase();
    let mut unit: Option<String> = None;
    let mut same_unit = |u: String| -> Result<(), DistError> {
        match &unit {
            Some(v) if *v != u => Err(DistError::Units(v.clone(), u)),
            _ => {
                unit = Some(u);
                Ok(())
            }
        }
    };
    let mut nums = Vec::new();
    let mut bounds = (f64::NEG_INFINITY, f64::INFINITY);
    let mut keywords = Vec::new();
    for (k, arg) in args.split(',').map(str::trim).enumerate() {
        if arg.is_empty() {
            return Err(DistError::Usage);
        }
        if let Some((key, v)) = arg.split_once('=') {
            let (x, u) = number_and_unit(v.trim()).map_err(DistError::Number)?;
            same_unit(u)?;
            match key.trim() {
                "min" => bounds.0 = x,
                "max" => bounds.1 = x,
                _ => return Err(DistError::Keyword(arg.to_owned())),
            }
            keywords.push(arg.to_owned());
            continue;
        }
        let (x, u) = number_and_unit(arg).map_err(DistError::Number)?;
        if name == "lognormal" && k == 1 {
            if !u.is_empty() {
                return Err(DistError::SdlnUnit(arg.to_owned()));
            }
        } else {
            same_unit(u)?;
        }
        nums.push(x);
    }
    let arity = |name: &'static str, want: &'static str, n: usize| -> Result<(), DistError> {
        if nums.len() == n {
            Ok(())
        } else {
            Err(DistError::Arity {
                name,
                want,
                got: nums.len(),
            })
        }
    };
    let bounded = matches!(name.as_str(), "normal" | "lognormal");
    if let (false, Some(k)) = (bounded, keywords.first()) {
        return Err(DistError::Keyword(k.clone()));
    }
    let dom = |m: &str| Err(DistError::Domain(m.to_owned()));
    let (lo, hi) = bounds;
    if lo >= hi {
        return dom("min must be below max");
    }
    let shape = match name.as_str() {
        "uniform" => {
            arity("uniform", "two numbers (A, B)", 2)?;
            if nums[0] >= nums[1] {
                return dom("uniform(A, B) needs A < B");
            }
            Shape::Uniform {
                a: nums[0],
                b: nums[1],
            }
        }
        "loguniform" => {
            arity("loguniform", "two numbers (A, B)", 2)?;
            if !(0.0 < nums[0] && nums[0] < nums[1]) {
                return dom("loguniform(A, B) needs 0 < A < B");
            }
            Shape::LogUniform {
                a: nums[0],
                b: nums[1],
            }
        }
        "normal" => {
            arity("normal", "two numbers (MEAN, SD)", 2)?;
            if nums[1] <= 0.0 {
                return dom("normal(MEAN, SD) needs SD > 0");
            }
            Shape::Normal {
                mean: nums[0],
                sd: nums[1],
                lo,
                hi,
            }
        }
        "lognormal" => {
            arity("lognormal", "two numbers (MEDIAN, SDLN)", 2)?;
            if nums[0] <= 0.0 || nums[1] <= 0.0 {
                return dom("lognormal(MEDIAN, SDLN) needs MEDIAN > 0 and SDLN > 0");
            }
            if hi <= 0.0 {
                return dom("a log-normal value is positive: max must be above 0");
            }
            Shape::LogNormal {
                median: nums[0],
                sdln: nums[1],
                lo: lo.max(0.0),
                hi,
            }
        }
        "triangular" => {
            arity("triangular", "three numbers (MIN, MODE, MAX)", 3)?;
            let (a, c, b) = (nums[0], nums[1], nums[2]);
            if !(a <= c && c <= b && a < b) {
                return dom("triangular(MIN, MODE, MAX) needs MIN ≤ MODE ≤ MAX and MIN < MAX");
            }
            Shape::Triangular { a, c, b }
        }
        _ => return Err(DistError::Unknown(name)),
    };
    let d = Distribution {
        shape,
        unit: unit.unwrap_or_default(),
        text: text.to_owned(),
    };
    // Truncation that leaves (almost) no probability cannot be sampled accurately.
    if let Some(mass) = d.truncated_mass() {
        if mass < 1e-12 {
            return dom("min and max leave no probability between them");
        }
    }
    Ok(d)
}

/// Φ of the standardised bounds (a, b) of a truncated normal or log-normal.
fn standard_bounds(shape: &Shape) -> Option<(f64, f64)> {
    match *shape {
        Shape::Normal { mean, sd, lo, hi } => Some(((lo - mean) / sd, (hi - mean) / sd)),
        Shape::LogNormal {
            median,
            sdln,
            lo,
            hi,
        } => Some((
            (lo.ln() - median.ln()) / sdln,
            (hi.ln() - median.ln()) / sdln,
        )),
        _ => None,
    }
}

/// A standard normal truncated to [a, b], at probability u. Away from the mean the
/// computation runs in the tail that keeps relative accuracy: for a > 0 through the
/// upper tail Φ(−z), mirroring the lower-tail form.
fn truncated_standard(u: f64, a: f64, b: f64) -> f64 {
    if a == f64::NEG_INFINITY && b == f64::INFINITY {
        return normal::quantile(u);
    }
    if a > 0.0 {
        let (pa, pb) = (normal::cdf(-a), normal::cdf(-b));
        return -normal::quantile(pa - u * (pa - pb));
    }
    let (pa, pb) = (normal::cdf(a), normal::cdf(b));
    normal::quantile(pa + u * (pb - pa)).clamp(a, b)
}

impl Distribution {
    /// The probability the untruncated distribution puts between the bounds (None when
    /// it takes no bounds).
    pub fn truncated_mass(&self) -> Option<f64> {
        let (a, b) = standard_bounds(&self.shape)?;
        Some(if a > 0.0 {
            normal::cdf(-a) - normal::cdf(-b)
        } else {
            normal::cdf(b) - normal::cdf(a)
        })
    }

    /// The value at probability u in (0, 1): the quantile function.
    pub fn quantile(&self, u: f64) -> f64 {
        match self.shape {
            Shape::Uniform { a, b } => a + u * (b - a),
            Shape::LogUniform { a, b } => (a.ln() + u * (b.ln() - a.ln())).exp(),
            Shape::Normal { mean, sd, lo, hi } => {
                let (za, zb) = standard_bounds(&self.shape).unwrap_or_default();
                (mean + sd * truncated_standard(u, za, zb)).clamp(lo, hi)
            }
            Shape::LogNormal {
                median,
                sdln,
                lo,
                hi,
            } => {
                let (za, zb) = standard_bounds(&self.shape).unwrap_or_default();
                (median * (sdln * truncated_standard(u, za, zb)).exp()).clamp(lo, hi)
            }
            Shape::Triangular { a, c, b } => {
                let fc = (c - a) / (b - a);
                if u < fc {
                    a + (u * (b - a) * (c - a)).sqrt()
                } else {
                    b - ((1.0 - u) * (b - a) * (b - c)).sqrt()
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn distributions_parse_with_units_and_bounds() {
        let d = parse("normal(0.3 m, 0.05 m, min=0.1 m)").unwrap();
        assert_eq!(d.unit, "m");
        assert_eq!(
            d.shape,
            Shape::Normal {
                mean: 0.3,
                sd: 0.05,
                lo: 0.1,
                hi: f64::INFINITY
            }
        );
        let d = parse(" LogNormal(1e-4 m/s, 1.2, max=1e-2 m/s) ").unwrap();
        assert_eq!(d.unit, "m/s");
        assert_eq!(d.text, "LogNormal(1e-4 m/s, 1.2, max=1e-2 m/s)");
        assert_eq!(
            parse("triangular(10, 20, 40)").unwrap().shape,
            Shape::Triangular {
                a: 10.0,
                c: 20.0,
                b: 40.0
            }
        );
    }

    #[test]
    fn bad_distributions_say_what_is_wrong() {
        let msg = |t: &str| parse(t).unwrap_err().to_string();
        assert!(msg("uniform 1,2").contains("expected a distribution"));
        assert!(msg("gamma(1, 2)").contains("unknown distribution `gamma`"));
        assert!(msg("uniform(1)").contains("uniform takes two numbers"));
        assert!(msg("uniform(2, 1)").contains("A < B"));
        assert!(msg("loguniform(0, 1)").contains("0 < A < B"));
        assert!(msg("normal(1 m, 2 ft)").contains("one unit"));
        assert!(msg("normal(1, 0)").contains("SD > 0"));
        assert!(msg("lognormal(1 m, 0.5 m)").contains("has no unit"));
        assert!(msg("uniform(1, 2, min=0)").contains("only normal and lognormal"));
        assert!(msg("normal(0, 1, lo=0)").contains("only normal and lognormal"));
        assert!(msg("normal(0, 1, min=2, max=1)").contains("min must be below max"));
        assert!(msg("normal(0, 1, min=40)").contains("no probability"));
        assert!(msg("triangular(1, 5, 3)").contains("MODE"));
        assert!(msg("uniform(a, 2)").contains("does not start with a number"));
    }

    #[test]
    fn quantiles_meet_the_bounds_and_the_closed_forms() {
        // Closed forms (common practice, no source): the uniform's median is the midpoint,
        // the log-uniform's the geometric mean, the triangular's CDF at the mode is
        // (c − a)/(b − a).
        let u = parse("uniform(2, 6)").unwrap();
        assert_eq!(u.quantile(0.5), 4.0);
        let l = parse("loguniform(1e-6, 1e-2)").unwrap();
        assert!((l.quantile(0.5) / 1e-4 - 1.0).abs() < 1e-12);
        let t = parse("triangular(0, 1, 4)").unwrap();
        assert!((t.quantile(0.25) - 1.0).abs() < 1e-15);
        // A truncated normal never leaves its bounds, even at the ends of (0, 1).
        let n = parse("normal(0.3, 0.2, min=0.01, max=0.5)").unwrap();
        for u in [1e-17, 1e-9, 0.5, 1.0 - 1e-12] {
            let x = n.quantile(u);
            assert!((0.01..=0.5).contains(&x), "{u} -> {x}");
        }
        // Both bounds far in the upper tail: the mirrored form keeps the draws apart.
        let far = parse("normal(0, 1, min=5, max=6)").unwrap();
        let (a, b) = (far.quantile(0.1), far.quantile(0.9));
        assert!(5.0 < a && a < b && b < 6.0, "{a} {b}");
    }
}
