//! Axis ticks: "nice" linear steps (1, 2, 2.5, 5 × 10ᵏ) with labels carrying just enough
//! decimals, and decade ticks for logarithmic axes.
//!
//! ```text
//! step = min { n·10ᵏ : n ∈ {1, 2, 2.5, 5}, n·10ᵏ ≥ (hi − lo)/5 }
//! ```

use super::format::superscript;

/// How values map onto an axis.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Scale {
    /// Linear.
    #[default]
    Linear,
    /// Base-10 logarithmic; values ≤ 0 are not drawn.
    Log,
}

/// One tick: position (display units), whether it is major, and its label.
#[derive(Debug, Clone, PartialEq)]
pub struct Tick {
    /// Position, display units.
    pub value: f64,
    /// Major (labelled decade or step) or minor.
    pub major: bool,
    /// Label, when drawn.
    pub label: Option<String>,
}

/// Axis range (in axis coordinates: log10 for a log axis) and ticks. `pad` widens a
/// linear range to whole tick steps (used for y; x keeps the data range).
pub fn ticks_for(scale: Scale, (lo, hi): (f64, f64), pad: bool) -> (f64, f64, Vec<Tick>) {
    match scale {
        Scale::Linear => {
            let (mut lo, mut hi) = (lo, hi);
            if hi - lo <= f64::EPSILON * lo.abs().max(hi.abs()).max(1e-300) {
                let d = if lo == 0.0 { 1.0 } else { 0.05 * lo.abs() };
                lo -= d;
                hi += d;
            }
            if !pad && lo > 0.0 && lo < 0.05 * (hi - lo) {
                // A time axis starting one step after zero starts at zero.
                lo = 0.0;
            }
            // Divided first, so that ±1e308 does not overflow to an infinite span.
            let step = nice_step(hi / 5.0 - lo / 5.0);
            if pad {
                lo = (lo / step).floor() * step;
                hi = (hi / step).ceil() * step;
            }
            let values = multiples(lo, hi, step);
            let labels = linear_labels(&values, step);
            let ticks = values
                .into_iter()
                .zip(labels)
                .map(|(value, l)| Tick {
                    value,
                    major: true,
                    label: Some(l),
                })
                .collect();
            (lo, hi, ticks)
        }
        Scale::Log => {
            let (mut a, mut b) = (lo.log10(), hi.log10());
            if pad {
                a = a.floor();
                b = b.ceil();
            }
            if b - a < 1e-9 {
                a -= 0.5;
                b += 0.5;
            }
            let decades = b - a;
            let mut ticks = Vec::new();
            for k in (a.floor() as i32)..=(b.ceil() as i32) {
                // Minor ticks only where there is room for them.
                let minors = if decades <= 5.0 { 9 } else { 1 };
                for m in 1..=minors {
                    let value = f64::from(m) * 10f64.powi(k);
                    let t = value.log10();
                    if t < a - 1e-9 || t > b + 1e-9 {
                        continue;
                    }
                    let labelled = m == 1 || (decades <= 2.5 && (m == 2 || m == 5));
                    ticks.push(Tick {
                        value,
                        major: m == 1,
                        label: labelled.then(|| log_label(value, k)),
                    });
                }
            }
            (a, b, ticks)
        }
    }
}

/// 1, 2, 2.5 or 5 × 10ᵏ, the smallest not below `raw`.
pub fn nice_step(raw: f64) -> f64 {
    if !(raw > 0.0 && raw.is_finite()) {
        return 1.0;
    }
    let mag = 10f64.powf(raw.log10().floor());
    let f = raw / mag;
    let nice = [1.0, 2.0, 2.5, 5.0, 10.0]
        .into_iter()
        .find(|&n| f <= n * (1.0 + 1e-9))
        .unwrap_or(10.0);
    nice * mag
}

/// Multiples of `step` within [lo, hi].
/// At most [`MAX_TICKS`] of them: a range that is not finite, or absurdly many steps wide
/// (values near ±1e308 in a crafted file), gives none instead of a huge allocation.
pub fn multiples(lo: f64, hi: f64, step: f64) -> Vec<f64> {
    let first = (lo / step - 1e-9).ceil();
    let last = (hi / step + 1e-9).floor();
    if !(first.is_finite() && last.is_finite() && last - first <= MAX_TICKS as f64) {
        return Vec::new();
    }
    (first as i64..=last as i64)
        .map(|k| k as f64 * step)
        .collect()
}

/// Most ticks on one axis.
pub const MAX_TICKS: usize = 1000;

/// Labels for evenly spaced linear ticks: fixed notation with just enough decimals for
/// `step`, or scientific when the values are very large or very small.
pub fn linear_labels(values: &[f64], step: f64) -> Vec<String> {
    let m = values.iter().fold(0.0_f64, |a, v| a.max(v.abs()));
    if m >= 1e5 || (m > 0.0 && m < 1e-3) {
        let digits = (m.log10().floor() - step.log10().floor()).clamp(0.0, 4.0) as usize;
        return values
            .iter()
            .map(|&v| {
                if v.abs() < step * 1e-6 {
                    "0".to_owned()
                } else {
                    let s = format!("{v:.digits$e}");
                    let (mant, exp) = s.split_once('e').expect("exponent format");
                    format!("{}×10{}", mant.replace('-', "−"), superscript(exp))
                }
            })
            .collect();
    }
    let decimals = (0..=8)
        .find(|&d| {
            let scaled = step * 10f64.powi(d);
            (scaled - scaled.round()).abs() < 1e-6 * scaled.max(1.0)
        })
        .unwrap_or(8) as usize;
    values
        .iter()
        .map(|&v| {
            let v = if v.abs() < step * 1e-6 { 0.0 } else { v };
            format!("{v:.decimals$}").replace('-', "−")
        })
        .collect()
}

fn log_label(value: f64, k: i32) -> String {
    if (-2..=3).contains(&k) {
        let decimals = (-k).max(0) as usize;
        format!("{value:.decimals$}")
    } else {
        let m = (value / 10f64.powi(k)).round();
        let exp = superscript(&k.to_string());
        if m == 1.0 {
            format!("10{exp}")
        } else {
            format!("{m}×10{exp}")
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nice_steps_and_labels_work() {
        assert_eq!(nice_step(0.23), 0.25);
        assert_eq!(nice_step(3.0), 5.0);
        assert_eq!(nice_step(1.0), 1.0);
        assert_eq!(multiples(-0.1, 1.1, 0.5), vec![0.0, 0.5, 1.0]);
        assert!(multiples(-1e308, 1e308, 1e-300).is_empty());
        assert!(multiples(0.0, f64::INFINITY, 1.0).is_empty());
        let (lo, hi, t) = ticks_for(Scale::Linear, (-1e308, 1e308), true);
        assert!(
            lo.is_finite() && hi.is_finite() && !t.is_empty(),
            "{lo} {hi}"
        );
        assert_eq!(linear_labels(&[0.0, 2.5, 5.0], 2.5), ["0.0", "2.5", "5.0"]);
        assert_eq!(linear_labels(&[-1.0, 0.0, 1.0], 1.0), ["−1", "0", "1"]);
        assert_eq!(
            linear_labels(&[-2e-5, 0.0, 2e-5], 2e-5),
            ["−2×10⁻⁵", "0", "2×10⁻⁵"]
        );
        assert_eq!(log_label(0.1, -1), "0.1");
        assert_eq!(log_label(1e-5, -5), "10⁻⁵");
        assert_eq!(log_label(1e4, 4), "10⁴");
        assert_eq!(log_label(1e-3, -3), "10⁻³");
    }

    #[test]
    fn log_axis_has_decade_ticks() {
        let (a, b, ticks) = ticks_for(Scale::Log, (0.1, 50.0), true);
        assert_eq!((a, b), (-1.0, 2.0));
        let labelled: Vec<_> = ticks.iter().filter_map(|t| t.label.clone()).collect();
        assert_eq!(labelled, ["0.1", "1", "10", "100"]);
        assert_eq!(ticks.len(), 28);
    }
}
