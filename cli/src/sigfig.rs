//! The one significant-digit formatter of the command line, the text tables and the reports.
//!
//! A value is rounded once, to `n` significant digits, by the standard library's
//! correctly rounded scientific formatting (round half to even on the exact binary value);
//! the exponent is read after that rounding, so a carry that adds a digit (9.996 → 10.0 at
//! three digits) moves to the next power of ten instead of showing an extra digit. Values
//! whose rounded magnitude lies in [10⁻³, 10⁵) are written in fixed notation with `n`
//! significant digits (trailing zeros kept: they are significant; a large number shows all
//! its integer digits, 12345 at three digits); others in scientific notation. Zero is `0`.

/// How the result is written: plain text (`1.23e-5`, `NaN`, `inf`) or HTML text
/// (`1.23×10⁻⁵`, `n/a`, `∞`, with a true minus sign for −∞).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Style {
    /// Terminal and CSV-like text.
    Text,
    /// Report pages.
    Html,
}

/// `x` to `n` significant digits (at least 1) in `style` (module doc).
pub fn format(x: f64, n: usize, style: Style) -> String {
    let n = n.max(1);
    if !x.is_finite() {
        return match (style, x.is_nan(), x > 0.0) {
            (Style::Text, true, _) => "NaN".to_owned(),
            (Style::Text, false, true) => "inf".to_owned(),
            (Style::Text, false, false) => "-inf".to_owned(),
            (Style::Html, true, _) => "n/a".to_owned(),
            (Style::Html, false, true) => "∞".to_owned(),
            (Style::Html, false, false) => "−∞".to_owned(),
        };
    }
    if x == 0.0 {
        return "0".to_owned();
    }
    let scientific = format!("{x:.prec$e}", prec = n - 1);
    let (mantissa, exp) = scientific
        .split_once('e')
        .expect("exponent format has an e");
    let exp: i32 = exp.parse().expect("exponent is an integer");
    if (-3..5).contains(&exp) {
        let decimals = (n as i32 - 1 - exp).max(0) as usize;
        format!("{x:.decimals$}")
    } else {
        match style {
            Style::Text => scientific,
            Style::Html => format!("{mantissa}×10{}", superscript(&exp.to_string())),
        }
    }
}

/// `x` to `n` significant digits as plain text.
pub fn text(x: f64, n: usize) -> String {
    format(x, n, Style::Text)
}

/// `x` to `n` significant digits as HTML text.
pub fn html(x: f64, n: usize) -> String {
    format(x, n, Style::Html)
}

/// An exponent as superscript digits: `-5` → `⁻⁵` (a leading `+` is dropped; other
/// characters are kept).
pub fn superscript(exp: &str) -> String {
    exp.trim_start_matches('+')
        .chars()
        .map(|c| match c {
            '-' => '⁻',
            '0' => '⁰',
            '1' => '¹',
            '2' => '²',
            '3' => '³',
            '4' => '⁴',
            '5' => '⁵',
            '6' => '⁶',
            '7' => '⁷',
            '8' => '⁸',
            '9' => '⁹',
            other => other,
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    // Expected strings are rounding by hand to n significant digits (common practice, no
    // source), except where a comment names the binary value.

    #[test]
    fn a_carry_moves_to_the_next_power_of_ten() {
        assert_eq!(text(9.996, 3), "10.0");
        assert_eq!(text(9.996, 4), "9.996");
        assert_eq!(text(9.9996, 4), "10.00");
        assert_eq!(text(99_999.0, 3), "1.00e5");
        assert_eq!(html(99_999.0, 3), "1.00×10⁵");
        assert_eq!(text(0.000_999_9, 2), "0.0010");
        assert_eq!(text(999.96, 4), "1000");
    }

    #[test]
    fn fixed_between_a_thousandth_and_a_hundred_thousand() {
        assert_eq!(text(0.001, 3), "0.00100");
        assert_eq!(text(0.000_999, 3), "9.99e-4");
        assert_eq!(html(0.000_999, 3), "9.99×10⁻⁴");
        assert_eq!(text(12_345.0, 3), "12345");
        assert_eq!(text(1.5, 3), "1.50");
        assert_eq!(text(123.456, 4), "123.5");
    }

    #[test]
    fn negatives_zero_and_non_finite() {
        assert_eq!(text(-9.996, 3), "-10.0");
        assert_eq!(text(-1.234e-7, 3), "-1.23e-7");
        assert_eq!(html(-1.234e-7, 3), "-1.23×10⁻⁷");
        assert_eq!(text(0.0, 3), "0");
        assert_eq!(text(-0.0, 3), "0");
        assert_eq!(text(f64::NAN, 3), "NaN");
        assert_eq!(text(f64::INFINITY, 3), "inf");
        assert_eq!(text(f64::NEG_INFINITY, 3), "-inf");
        assert_eq!(html(f64::NAN, 3), "n/a");
        assert_eq!(html(f64::INFINITY, 3), "∞");
        assert_eq!(html(f64::NEG_INFINITY, 3), "−∞");
    }

    #[test]
    fn half_way_cases_follow_the_binary_value() {
        // 0.125 is exact in binary: a true tie, rounded to even.
        assert_eq!(text(0.125, 2), "0.12");
        // 2.675 is 2.67499999999999982236431605997495353221893310546875 in binary
        // (Python's decimal.Decimal(2.675)), so it rounds down.
        assert_eq!(text(2.675, 3), "2.67");
        assert_eq!(text(1.0, 1), "1");
        assert_eq!(text(1.0, 0), "1");
    }
}
