//! Numbers and units as the report shows them: SI first, the common US unit in brackets
//! where practitioners use one (m³/s and gpm, m and ft, Pa and psi).
//!
//! The run file holds SI base units only; every conversion to a display unit happens here.
//! US conversion factors are exact by definition (NIST SP 811, 2008 edition, Appendix B):
//!
//! ```text
//! 1 ft = 0.3048 m            1 in = 0.0254 m
//! 1 US gal = 3.785411784e-3 m³
//! 1 psi = 1 lbf/in² = 0.45359237 kg × 9.80665 m/s² / (0.0254 m)² ≈ 6894.757 Pa
//! ```

pub use crate::units::{FT_M, IN_M, PSI_PA, US_GAL_M3};
/// Seconds per day.
const DAY_S: f64 = 86_400.0;

/// One display unit: its label and how many of it make one SI base unit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Unit {
    /// Label, e.g. `"mm/s"`.
    pub label: &'static str,
    /// Display value = SI value × `per_si`.
    pub per_si: f64,
}

/// How a quantity is shown: an SI display unit and, optionally, a US unit in brackets.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Shown {
    /// The SI (or SI-prefixed) unit shown first.
    pub si: Unit,
    /// The unit in brackets, when practitioners use one.
    pub us: Option<Unit>,
    /// A count: a whole value is printed without decimals (`16`, not `16.0`).
    pub whole: bool,
}

const fn unit(label: &'static str, per_si: f64) -> Unit {
    Unit { label, per_si }
}

const fn shown(si: Unit, us: Option<Unit>) -> Shown {
    Shown {
        si,
        us,
        whole: false,
    }
}

/// Head and lengths of metres: m (ft).
pub const HEAD: Shown = shown(unit("m", 1.0), Some(unit("ft", 1.0 / FT_M)));
/// Small lengths (cake, grains, slots): mm (in).
pub const SMALL_LENGTH: Shown = shown(unit("mm", 1e3), Some(unit("in", 1.0 / IN_M)));
/// Volumetric flow: L/s (gpm, US gallons per minute).
pub const FLOW: Shown = shown(unit("L/s", 1e3), Some(unit("gpm", 60.0 / US_GAL_M3)));
/// Darcy flux through the borehole wall: mm/s (gpd/ft², US gallons per day per square foot).
pub const FLUX: Shown = shown(
    unit("mm/s", 1e3),
    Some(unit("gpd/ft²", DAY_S * FT_M * FT_M / US_GAL_M3)),
);
/// A velocity through the pores (pore, interstitial or settling velocity): mm/s (ft/min).
/// Not a loading rate: gpd/ft² is for a Darcy flux (a volume per area and time) only.
pub const PORE_VELOCITY: Shown = shown(unit("mm/s", 1e3), Some(unit("ft/min", 60.0 / FT_M)));
/// Screen slot (entrance) velocity: m/s (ft/s).
pub const SLOT_VELOCITY: Shown = shown(unit("m/s", 1.0), Some(unit("ft/s", 1.0 / FT_M)));
/// Differential pressure on the screen: kPa (psi).
pub const PRESSURE: Shown = shown(unit("kPa", 1e-3), Some(unit("psi", 1.0 / PSI_PA)));
/// Shear proxy: Pa.
pub const SHEAR: Shown = shown(unit("Pa", 1.0), None);
/// Energy: J.
pub const ENERGY: Shown = shown(unit("J", 1.0), None);
/// Specific capacity: L/s per m of drawdown (gpm/ft).
pub const SPECIFIC_CAPACITY: Shown = shown(
    unit("L/s/m", 1e3),
    Some(unit("gpm/ft", 60.0 / US_GAL_M3 * FT_M)),
);
/// Time: s.
pub const TIME: Shown = shown(unit("s", 1.0), None);
/// Hydraulic conductivity: m/s (ft/d).
pub const CONDUCTIVITY: Shown = shown(unit("m/s", 1.0), Some(unit("ft/d", DAY_S / FT_M)));
/// Specific storage: 1/m.
pub const SPECIFIC_STORAGE: Shown = shown(unit("1/m", 1.0), None);
/// Frequency: Hz (strokes per minute).
pub const FREQUENCY: Shown = shown(unit("Hz", 1.0), Some(unit("/min", 60.0)));
/// Area (well-bore storage): m² (ft²).
pub const AREA: Shown = shown(unit("m²", 1.0), Some(unit("ft²", 1.0 / (FT_M * FT_M))));
/// Cake erodibility: m/(s·Pa).
pub const ERODIBILITY: Shown = shown(unit("m/(s·Pa)", 1.0), None);
/// Forchheimer coefficient: s²/m².
pub const FORCHHEIMER_BETA: Shown = shown(unit("s²/m²", 1.0), None);
/// A dimensionless number.
pub const NUMBER: Shown = shown(unit("", 1.0), None);
/// A count: a dimensionless whole number.
pub const COUNT: Shown = Shown {
    whole: true,
    ..NUMBER
};
/// Density: kg/m³ (lb/ft³); 1 lb/ft³ = 0.453 592 37 kg / 0.3048³ m³ (exact definitions of lb and ft).
pub const DENSITY: Shown = shown(unit("kg/m³", 1.0), Some(unit("lb/ft³", 1.0 / 16.018_463)));
/// Per metre (a filtration coefficient).
pub const PER_METRE: Shown = shown(unit("1/m", 1.0), None);
/// Volume: m³ (US gal).
pub const VOLUME: Shown = shown(unit("m³", 1.0), Some(unit("gal", 1.0 / US_GAL_M3)));
/// Force: N (lbf); 1 lbf = 0.453 592 37 kg × 9.806 65 m/s² (exact definitions).
pub const FORCE: Shown = shown(unit("N", 1.0), Some(unit("lbf", 1.0 / 4.448_221_615)));

/// `value` with three significant digits: fixed notation from 0.001 to 10⁵, otherwise
/// `1.23×10⁻⁵` (HTML-safe text; [`crate::sigfig`]).
pub fn sig(value: f64) -> String {
    crate::sigfig::html(value, 3)
}

/// A whole number, e.g. a count of cells or steps.
pub fn count(value: f64) -> String {
    if value.is_finite() && value.fract() == 0.0 {
        format!("{value:.0}")
    } else {
        sig(value)
    }
}

/// `value` (SI) as a number in the SI display unit of `s`, without the unit: three
/// significant digits, or a whole number for a count.
pub fn number_in(value: f64, s: &Shown) -> String {
    if s.whole {
        count(value * s.si.per_si)
    } else {
        sig(value * s.si.per_si)
    }
}

/// `value` (SI) in the SI display unit with the US unit in brackets:
/// `1.20 mm/s (2540 gpd/ft²)`; a count as a whole number (`16`).
pub fn with_units(value: f64, s: &Shown) -> String {
    let mut out = join(number_in(value, s), s.si.label);
    if let Some(us) = s.us {
        out.push_str(&format!(" ({})", join(sig(value * us.per_si), us.label)));
    }
    out
}

/// Start and end values (SI) as `3.00 → 2.39 mm (0.118 → 0.0941 in)`.
pub fn change(start: f64, end: f64, s: &Shown) -> String {
    let pair = |u: &Unit| {
        join(
            format!("{} → {}", sig(start * u.per_si), sig(end * u.per_si)),
            u.label,
        )
    };
    let mut out = pair(&s.si);
    if let Some(us) = &s.us {
        out.push_str(&format!(" ({})", pair(us)));
    }
    out
}

/// A time in seconds, with minutes or hours in brackets when long: `300 s (5.00 min)`.
pub fn duration(seconds: f64) -> String {
    let base = format!("{} s", sig(seconds));
    if seconds.abs() >= 7_200.0 {
        format!("{base} ({} h)", sig(seconds / 3_600.0))
    } else if seconds.abs() >= 120.0 {
        format!("{base} ({} min)", sig(seconds / 60.0))
    } else {
        base
    }
}

/// Absolute temperature as `286 K (13.0 °C)`.
pub fn temperature(kelvin: f64) -> String {
    format!("{} K ({} °C)", sig(kelvin), sig(kelvin - 273.15))
}

/// How the report shows a quantity of the given SI unit (from the output schema), unless a
/// figure chooses a finer display (mm for the cake, m/s for slot velocities). The schema
/// tells a Darcy flux (shown with gpd/ft², a loading rate) from a velocity (ft/min), and a
/// count (a whole number) from a ratio, though each pair is written with one symbol.
pub fn shown_for(si: crate::output::schema::Unit) -> Shown {
    use crate::output::schema::Unit;
    match si {
        Unit::M => HEAD,
        Unit::S => TIME,
        Unit::VolumeFlux => FLUX,
        Unit::MPerS => PORE_VELOCITY,
        Unit::M2PerS => SPECIFIC_CAPACITY,
        Unit::M3PerS => FLOW,
        Unit::Pa => PRESSURE,
        Unit::W => shown(unit("W", 1.0), None),
        Unit::J => ENERGY,
        Unit::Kg => shown(unit("kg", 1.0), Some(unit("lb", 1.0 / crate::units::LB_KG))),
        Unit::SPerM2 => shown(unit("s/m²", 1.0), None),
        Unit::S2PerM5 => shown(unit("s²/m⁵", 1.0), None),
        Unit::Count => COUNT,
        Unit::One | Unit::OfSeries => NUMBER,
    }
}

fn join(number: String, label: &str) -> String {
    if label.is_empty() {
        number
    } else if label.starts_with('/') {
        format!("{number}{label}")
    } else {
        format!("{number} {label}")
    }
}

pub use crate::sigfig::superscript;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sig_works() {
        assert_eq!(sig(0.0), "0");
        assert_eq!(sig(1.0), "1.00");
        assert_eq!(sig(12.345), "12.3");
        assert_eq!(sig(-0.012345), "-0.0123");
        assert_eq!(sig(24_140.0), "24140");
        assert_eq!(sig(4.1662e-7), "4.17×10⁻⁷");
        assert_eq!(sig(3.2e12), "3.20×10¹²");
        assert_eq!(sig(f64::NAN), "n/a");
        assert_eq!(count(19_802.0), "19802");
    }

    #[test]
    fn conversions_match_definitions() {
        // NIST SP 811 (2008) Appendix B: 1 psi = 6.894 757 E+03 Pa (from memory).
        assert!((PSI_PA - 6_894.757).abs() < 1e-3);
        // Same appendix: 1 US gal/min = 6.309 020 E-05 m³/s (from memory).
        assert!((FLOW.us.unwrap().per_si - 1.0 / 6.309_020e-5).abs() < 0.01);
        assert_eq!(with_units(0.01, &FLOW), "10.0 L/s (159 gpm)");
        assert_eq!(with_units(1.5, &HEAD), "1.50 m (4.92 ft)");
        assert_eq!(
            change(3e-3, 2e-3, &SMALL_LENGTH),
            "3.00 → 2.00 mm (0.118 → 0.0787 in)"
        );
        assert_eq!(with_units(0.5, &FREQUENCY), "0.500 Hz (30.0/min)");
        assert_eq!(duration(300.0), "300 s (5.00 min)");
        assert_eq!(temperature(286.15), "286 K (13.0 °C)");
    }

    #[test]
    fn figures_are_shown_in_their_schema_unit() {
        use crate::output::schema::Figure;
        let of = |f: Figure| shown_for(f.entry().unit);
        assert_eq!(of(Figure::PeakOutwardFlux), FLUX);
        assert_eq!(of(Figure::PeakScreenFlow), FLOW);
        assert_eq!(of(Figure::SpecificCapacityEnd), SPECIFIC_CAPACITY);
        assert_eq!(of(Figure::Work(boreflux_solver::grid::Zone::Cake)), ENERGY);
        assert_eq!(of(Figure::OuterRadius), HEAD);
        assert_eq!(of(Figure::SkinEnd), NUMBER);
        // A velocity is not a loading rate: ft/min, never gpd/ft².
        assert_eq!(of(Figure::GrainCriticalVelocity), PORE_VELOCITY);
        assert_eq!(of(Figure::PeakWallInterstitialVelocity), PORE_VELOCITY);
        assert_eq!(of(Figure::PeakOutwardPoreVelocity), PORE_VELOCITY);
        assert_eq!(of(Figure::RmsFaceFlux), FLUX);
        assert_eq!(of(Figure::ColumnPartings), COUNT);
        assert_eq!(of(Figure::MaxNewtonIterations), COUNT);
    }

    #[test]
    fn counts_are_whole_and_velocities_in_feet_per_minute() {
        assert_eq!(with_units(16.0, &COUNT), "16");
        assert_eq!(with_units(16.0, &NUMBER), "16.0");
        assert_eq!(number_in(12.0, &COUNT), "12");
        // A count that is not whole (a mean) keeps its digits.
        assert_eq!(number_in(2.5, &COUNT), "2.50");
        // 0.0133 m/s × 60 s/min / 0.3048 m/ft = 2.618 ft/min (NIST SP 811, 2008,
        // Appendix B: 1 ft = 0.3048 m exactly).
        assert_eq!(
            with_units(0.0133, &PORE_VELOCITY),
            "13.3 mm/s (2.62 ft/min)"
        );
    }
}
