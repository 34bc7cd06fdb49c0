//! What a fitted value may be called, from the fit's end state, its identifiability, its
//! place in the bounds and the width of its interval (fit coordinates; docs/calibration.md §5).
//!
//! ```text
//! not converged   the fit stopped early (evaluations used up, or stalled): the value is
//!                 where it stopped, its interval is not valid
//! at bound        |û − bound| ≤ AT_BOUND_SHARE · (u_hi − u_lo): the optimum may lie beyond
//!                 the bound; the interval, if any, is not reliable
//! not constrained the records do not fix it (stats::Identifiability), no interval
//! near bound      the interval û ± h reaches past a bound: the records cannot tell the value
//!                 from the bound; the interval is not reliable
//! wide            log scale: the interval spans more than WIDE_DECADES decades;
//!                 linear scale: its half-width is more than WIDE_SHARE of |x̂|
//! constrained     none of the above
//! ```
//!
//! The first that applies is the label. Whether an interval crosses a bound and whether the
//! value is at a bound are kept beside the label, so a report can add them to any label.

use super::param::Scale;
use super::stats::Identifiability;

/// Share of the allowed range (fit coordinates) within which a fitted value counts as at its
/// bound: 1 % (assumption: calibrate; 0.115 in ln x, i.e. 0.05 decades, for a five-decade
/// range).
pub const AT_BOUND_SHARE: f64 = 0.01;

/// Widest interval of a log-scaled parameter still called constrained without
/// qualification: one decade from end to end, a factor of 10 (assumption: calibrate).
pub const WIDE_DECADES: f64 = 1.0;

/// Widest interval of a linearly scaled parameter still called constrained without
/// qualification: a half-width of 50 % of the fitted value (assumption: calibrate).
pub const WIDE_SHARE: f64 = 0.5;

/// One side of the allowed range.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Bound {
    /// The lower bound.
    Lower,
    /// The upper bound.
    Upper,
}

impl Bound {
    /// "lower" or "upper".
    pub fn word(self) -> &'static str {
        match self {
            Bound::Lower => "lower",
            Bound::Upper => "upper",
        }
    }
}

/// The label of a fitted value, in order of precedence (module doc).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Label {
    /// The fit did not converge.
    NotConverged,
    /// The fitted value is at a bound.
    AtBound,
    /// The records do not constrain it (see the identifiability).
    NotConstrained,
    /// The interval reaches past a bound.
    NearBound,
    /// The interval is wider than WIDE_DECADES / WIDE_SHARE.
    Wide,
    /// Constrained.
    Constrained,
}

impl Label {
    /// A short word for tables and JSON.
    pub fn word(self) -> &'static str {
        match self {
            Label::NotConverged => "not converged",
            Label::NotConstrained => "not constrained",
            Label::AtBound => "at bound",
            Label::NearBound => "near bound",
            Label::Wide => "weakly constrained",
            Label::Constrained => "constrained",
        }
    }
}

/// The verdict on one fitted value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Verdict {
    /// The label.
    pub label: Label,
    /// The bound the value is at, if any (within AT_BOUND_SHARE of the range).
    pub at_bound: Option<Bound>,
    /// Whether the interval reaches below the lower bound and above the upper.
    pub crosses: (bool, bool),
    /// Width of the interval: decades (log scale) or half-width over |x̂| (linear); None
    /// without an interval.
    pub width: Option<f64>,
    /// Whether the interval may be read as an interval of the parameter: false when the fit
    /// did not converge, and when the value is at or near a bound.
    pub interval_valid: bool,
}

/// The verdict on a value fitted at `u` (fit coordinates) within `bounds`, with interval
/// half-width `half_width` (None: no interval), on `scale`, its identifiability `status`,
/// in a fit that `converged` or not.
pub fn assess(
    converged: bool,
    status: Identifiability,
    u: f64,
    half_width: Option<f64>,
    bounds: (f64, f64),
    scale: Scale,
) -> Verdict {
    let (lo, hi) = bounds;
    let near = AT_BOUND_SHARE * (hi - lo);
    let at_bound = if u - lo <= near {
        Some(Bound::Lower)
    } else if hi - u <= near {
        Some(Bound::Upper)
    } else {
        None
    };
    let crosses = half_width.map_or((false, false), |h| (u - h < lo, u + h > hi));
    let width = half_width.map(|h| match scale {
        Scale::Log => 2.0 * h / std::f64::consts::LN_10,
        Scale::Linear => h / u.abs(),
    });
    let wide = width.is_some_and(|w| match scale {
        Scale::Log => w > WIDE_DECADES,
        // A NaN or infinite width (a value of zero) counts as wide.
        Scale::Linear => w.is_nan() || w > WIDE_SHARE,
    });
    let label = if !converged {
        Label::NotConverged
    } else if at_bound.is_some() {
        Label::AtBound
    } else if !status.constrained() {
        Label::NotConstrained
    } else if crosses.0 || crosses.1 {
        Label::NearBound
    } else if wide {
        Label::Wide
    } else {
        Label::Constrained
    };
    Verdict {
        label,
        at_bound,
        crosses,
        width,
        interval_valid: half_width.is_some() && matches!(label, Label::Wide | Label::Constrained),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const LN10: f64 = std::f64::consts::LN_10;

    /// Bounds 1e-9 .. 1e-4 in ln x (a five-decade range).
    fn five_decades() -> (f64, f64) {
        (1e-9_f64.ln(), 1e-4_f64.ln())
    }

    #[test]
    fn labels_follow_the_documented_precedence() {
        let b = five_decades();
        let ok = Identifiability::Constrained;
        // A value two decades inside with a half-decade interval: constrained.
        let mid = 1e-6_f64.ln();
        let v = assess(true, ok, mid, Some(0.25 * LN10), b, Scale::Log);
        assert_eq!(v.label, Label::Constrained);
        assert!(v.interval_valid);
        assert!((v.width.unwrap() - 0.5).abs() < 1e-12);
        // The same with a fit that did not converge: not converged, interval not valid.
        let v = assess(false, ok, mid, Some(0.25 * LN10), b, Scale::Log);
        assert_eq!(v.label, Label::NotConverged);
        assert!(!v.interval_valid);
        // 0.17 decades above the lower bound with an interval reaching 2 decades below it:
        // not at the bound (0.17 > 0.05 decades) but near it; the interval spans 4 decades.
        let u = 1e-9_f64.ln() + 0.17 * LN10;
        let v = assess(true, ok, u, Some(2.0 * LN10), b, Scale::Log);
        assert_eq!(v.label, Label::NearBound);
        assert_eq!(v.at_bound, None);
        assert_eq!(v.crosses, (true, false));
        assert!((v.width.unwrap() - 4.0).abs() < 1e-12);
        assert!(!v.interval_valid);
        // 0.04 decades below the upper bound: at the bound (1 % of five decades = 0.05).
        let u = 1e-4_f64.ln() - 0.04 * LN10;
        let v = assess(true, ok, u, Some(0.01), b, Scale::Log);
        assert_eq!(v.label, Label::AtBound);
        assert_eq!(v.at_bound, Some(Bound::Upper));
        // Inside, a 1.5-decade interval that stays within the bounds: weakly constrained.
        let v = assess(true, ok, mid, Some(0.75 * LN10), b, Scale::Log);
        assert_eq!(v.label, Label::Wide);
        assert!(v.interval_valid);
        // At a bound wins over not constrained by the records (at a bound the
        // linearisation says nothing of the records); inside, not constrained is the label.
        let v = assess(true, Identifiability::Flat, b.0, None, b, Scale::Log);
        assert_eq!(v.label, Label::AtBound);
        assert_eq!(v.at_bound, Some(Bound::Lower));
        assert!(!v.interval_valid);
        let v = assess(true, Identifiability::Flat, mid, None, b, Scale::Log);
        assert_eq!(v.label, Label::NotConstrained);
        assert_eq!(v.at_bound, None);
        assert!(!v.interval_valid);
    }

    #[test]
    fn linear_width_is_relative_to_the_value() {
        let b = (0.0, 40.0);
        let ok = Identifiability::Constrained;
        // 24 ± 3.3: 14 % of the value, constrained.
        let v = assess(true, ok, 24.0, Some(3.3), b, Scale::Linear);
        assert_eq!(v.label, Label::Constrained);
        assert!((v.width.unwrap() - 3.3 / 24.0).abs() < 1e-15);
        // 10 ± 6: 60 % of the value, weakly constrained.
        let v = assess(true, ok, 10.0, Some(6.0), b, Scale::Linear);
        assert_eq!(v.label, Label::Wide);
        // A value of zero has no relative width: weakly constrained, not constrained.
        let v = assess(true, ok, 0.0, Some(0.1), (-1.0, 1.0), Scale::Linear);
        assert_eq!(v.label, Label::Wide);
    }
}
