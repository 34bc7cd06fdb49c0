//! A free parameter: its bounds and the scale the fit works in.
//!
//! ```text
//! log scale:     u = ln x          (x > 0; conductivities, strengths, rates of a law)
//! linear scale:  u = x
//! ```
//!
//! The fit, its Jacobian and its intervals are in u; an interval in u maps back to x
//! through the inverse, so a log-scaled interval is multiplicative (x̂ ×/÷ e^{t·se}).

/// How a parameter is transformed for the fit.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Scale {
    /// u = x.
    Linear,
    /// u = ln x, for a positive quantity spanning decades.
    Log,
}

/// A free parameter with its bounds, in the parameter's own (SI) value.
#[derive(Debug, Clone, PartialEq)]
pub struct FreeParameter {
    /// Name for messages (the case path).
    pub name: String,
    /// Lower bound.
    pub lower: f64,
    /// Upper bound.
    pub upper: f64,
    /// Scale of the fit.
    pub scale: Scale,
}

impl FreeParameter {
    /// Checks the bounds: finite, lower < upper, positive on a log scale.
    pub fn validate(&self) -> Result<(), String> {
        if !(self.lower.is_finite() && self.upper.is_finite() && self.lower < self.upper) {
            return Err(format!(
                "{}: the bounds must be finite with lower < upper, got {} .. {}",
                self.name, self.lower, self.upper
            ));
        }
        if self.scale == Scale::Log && self.lower <= 0.0 {
            return Err(format!(
                "{}: a log-scaled parameter needs a positive lower bound, got {}",
                self.name, self.lower
            ));
        }
        Ok(())
    }

    /// x → u.
    pub fn to_fit(&self, x: f64) -> f64 {
        match self.scale {
            Scale::Linear => x,
            Scale::Log => x.ln(),
        }
    }

    /// u → x.
    pub fn from_fit(&self, u: f64) -> f64 {
        match self.scale {
            Scale::Linear => u,
            Scale::Log => u.exp(),
        }
    }

    /// The bounds in u.
    pub fn fit_bounds(&self) -> (f64, f64) {
        (self.to_fit(self.lower), self.to_fit(self.upper))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn log_scale_round_trips_and_bounds_are_checked() {
        let p = FreeParameter {
            name: "formation.conductivity".into(),
            lower: 1e-6,
            upper: 1e-2,
            scale: Scale::Log,
        };
        assert!(p.validate().is_ok());
        let x = 3.7e-4;
        assert!((p.from_fit(p.to_fit(x)) - x).abs() <= 1e-15 * x);
        let bad = FreeParameter {
            lower: 0.0,
            ..p.clone()
        };
        assert!(bad.validate().unwrap_err().contains("positive lower bound"));
        let swapped = FreeParameter {
            lower: 1e-2,
            upper: 1e-6,
            ..p
        };
        assert!(swapped.validate().unwrap_err().contains("lower < upper"));
    }
}
