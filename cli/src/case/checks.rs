//! Range checks on converted values, with messages that name the bad value and unit.
//!
//! Most ranges are checked once by `Model::validate`; these are for values the loader
//! uses itself before the model exists (porosity in an estimate, a period for "cycles"),
//! and for values the model does not carry.

use super::error::CaseError;

/// `v > 0`.
pub fn positive(field: &str, v: f64, unit: &str) -> Result<f64, CaseError> {
    if v > 0.0 {
        Ok(v)
    } else {
        Err(CaseError::new(
            field,
            format!("must be positive, got {}", show(v, unit)),
        ))
    }
}

/// `v ≥ 0`.
pub fn non_negative(field: &str, v: f64, unit: &str) -> Result<f64, CaseError> {
    if v >= 0.0 {
        Ok(v)
    } else {
        Err(CaseError::new(
            field,
            format!("must be zero or positive, got {}", show(v, unit)),
        ))
    }
}

/// `0 < v < 1` (porosity), with a hint when the value looks like a percentage.
pub fn open_fraction(field: &str, v: f64) -> Result<f64, CaseError> {
    if v > 0.0 && v < 1.0 {
        Ok(v)
    } else {
        Err(CaseError::new(
            field,
            format!("must be between 0 and 1, got {v}{}", percent_hint(v)),
        ))
    }
}

/// `0 < v ≤ 1` (open area, coverage), with a hint when the value looks like a percentage.
pub fn fraction(field: &str, v: f64) -> Result<f64, CaseError> {
    if v > 0.0 && v <= 1.0 {
        Ok(v)
    } else {
        Err(CaseError::new(
            field,
            format!("must be in (0, 1], got {v}{}", percent_hint(v)),
        ))
    }
}

fn percent_hint(v: f64) -> String {
    if (2.0..=100.0).contains(&v) {
        format!(" (a fraction; for a percentage write \"{v} %\")")
    } else {
        String::new()
    }
}

fn show(v: f64, unit: &str) -> String {
    if unit.is_empty() {
        format!("{v}")
    } else {
        format!("{v} {unit}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn checks_capture_errors() {
        assert_eq!(
            positive("pack.conductivity", -0.001, "m/s")
                .unwrap_err()
                .to_string(),
            "pack.conductivity: must be positive, got -0.001 m/s"
        );
        assert_eq!(
            open_fraction("pack.porosity", 1.3).unwrap_err().to_string(),
            "pack.porosity: must be between 0 and 1, got 1.3"
        );
        assert_eq!(
            fraction("well.open_area", 30.0).unwrap_err().message,
            "must be in (0, 1], got 30 (a fraction; for a percentage write \"30 %\")"
        );
        assert!(fraction("well.open_area", 1.0).is_ok());
        assert!(open_fraction("pack.porosity", 1.0).is_err());
        assert!(non_negative("well.screen_loss", 0.0, "s").is_ok());
    }
}
