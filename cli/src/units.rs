//! Units of the case file: turns `"4 in"`, `"25 gpm"` or a bare SI number into SI.
//!
//! Every dimensional value in a case file is either a JSON number, taken as SI base units,
//! or a string `"<number> <unit>"` (the space may be left out: `"0.5mm"`, `"1e-4m/s"`).
//! Each [`Quantity`] has a small table of accepted units with their factor to SI; the
//! parser looks the unit up in that table only, so `"3 m"` for a conductivity is an error
//! that says what was expected. The case loader prefixes errors with the field path:
//!
//! ```text
//! well.screen_radius: unknown unit "inn" for a length; accepted: m, cm, mm, in, ft
//! ```
//!
//! Conversion factors are exact by definition unless noted (NIST SP 811, 2008 edition,
//! Appendix B: 1 in = 0.0254 m, 1 ft = 0.3048 m, 1 US gal = 231 in³ = 3.785411784e-3 m³,
//! 1 lbf = 0.45359237 kg × 9.80665 m/s², 1 bar = 1e5 Pa). Head from a pressure uses the
//! water density of the case:
//!
//! ```text
//! h = p / (ρ g)        h [m], p [Pa], ρ [kg/m³], g = 9.80665 m/s² (standard gravity, exact)
//! ```

use serde_json::Value;

pub use boreflux_solver::water::GRAVITY_M_S2;

/// Water density [kg/m³] used for head ↔ pressure when the case gives none: water at
/// 20 °C and 0.101325 MPa is 998.207 kg/m³ (Tanaka et al. 2001, Metrologia 38, 301–309).
pub const DEFAULT_WATER_DENSITY_KG_M3: f64 = 998.2;

/// Metres per inch (exact by definition, NIST SP 811).
pub const IN_M: f64 = 0.0254;
/// Metres per foot (exact by definition, NIST SP 811).
pub const FT_M: f64 = 0.3048;
/// Cubic metres per US gallon (231 in³, exact by definition, NIST SP 811).
pub const US_GAL_M3: f64 = 3.785_411_784e-3;
/// Kilograms per avoirdupois pound (exact by definition, NIST SP 811).
pub const LB_KG: f64 = 0.453_592_37;
const LBF_N: f64 = LB_KG * GRAVITY_M_S2;
/// Pascals per psi (pound-force per square inch, exact by definition, NIST SP 811).
pub const PSI_PA: f64 = LBF_N / (IN_M * IN_M);
const MIN_S: f64 = 60.0;
const HOUR_S: f64 = 3_600.0;
const DAY_S: f64 = 86_400.0;
const CELSIUS_ZERO_K: f64 = 273.15;

/// The physical kind of a case-file value, which fixes its SI unit and accepted units.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Quantity {
    /// Length or radius, in m.
    Length,
    /// Time or duration, in s.
    Time,
    /// Frequency, stroke or rotation rate, in Hz.
    Frequency,
    /// Hydraulic conductivity, in m/s.
    Conductivity,
    /// Volumetric flow rate, in m³/s.
    FlowRate,
    /// Pressure, in Pa.
    Pressure,
    /// Hydraulic head, in m; a pressure is converted with ρ g (see [`parse_head`]).
    Head,
    /// Specific storage, in 1/m.
    SpecificStorage,
    /// Absolute temperature, in K; a bare number is kelvin.
    Temperature,
    /// Velocity, in m/s.
    Velocity,
    /// Area, in m².
    Area,
    /// Volume, in m³.
    Volume,
    /// Pure number; `"12 %"` is accepted as 0.12.
    Dimensionless,
    /// A coefficient without a unit table: a bare number, or a string in exactly `si_unit`.
    Coefficient {
        /// The SI unit written after the number, e.g. `"s"` or `"s2/m2"`.
        si_unit: &'static str,
    },
}

/// Why a case-file value could not be read as a quantity. Reads well after a field path
/// and a colon, e.g. `drive.frequency: unknown unit "hz" for a frequency …`.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum UnitError {
    /// Neither a JSON number nor a string of a number and a unit.
    #[error("expected a number or \"<number> <unit>\", got {got}")]
    NotAQuantity {
        /// The offending value as written.
        got: String,
    },
    /// NaN or infinite.
    #[error("expected a finite number, got {got}")]
    NotFinite {
        /// The offending value as written.
        got: String,
    },
    /// A unit that no table knows.
    #[error("unknown unit \"{unit}\" for {expected}{hint}; accepted: {accepted}")]
    UnknownUnit {
        /// The unit as written.
        unit: String,
        /// What was expected, with its article ("a length").
        expected: String,
        /// `" (did you mean \"Hz\"?)"` when only the letter case differs, else empty.
        hint: String,
        /// The accepted units, comma separated.
        accepted: String,
    },
    /// A known unit of another kind (a length given for a conductivity).
    #[error("\"{unit}\" is a unit of {kinds}, but {expected} is expected; accepted: {accepted}")]
    WrongKind {
        /// The unit as written.
        unit: String,
        /// The kinds the unit belongs to ("length", "conductivity or velocity").
        kinds: String,
        /// What was expected, with its article.
        expected: String,
        /// The accepted units, comma separated.
        accepted: String,
    },
    /// A plain number where the unit must be written (a command-line option whose bare
    /// number would otherwise be read in SI, see [`parse_with_unit`]).
    #[error("{got} has no unit; write {expected} with its unit, e.g. \"{example}\" (accepted: {accepted})")]
    MissingUnit {
        /// The value as written.
        got: String,
        /// What was expected, with its article.
        expected: String,
        /// An example with a unit.
        example: &'static str,
        /// The accepted units, comma separated.
        accepted: String,
    },
    /// A temperature below 0 K.
    #[error("temperature is below absolute zero: {got} (a bare number is kelvin)")]
    BelowAbsoluteZero {
        /// The offending value as written.
        got: String,
    },
    /// A water density that is not a positive finite number.
    #[error("water density must be positive and finite, got {rho_kg_m3} kg/m3")]
    BadDensity {
        /// The density passed in [kg/m³].
        rho_kg_m3: f64,
    },
}

/// How one unit converts to SI.
#[derive(Debug, Clone, Copy)]
enum Conv {
    /// SI = factor × value.
    Factor(f64),
    /// SI = factor × value + offset (temperatures).
    Affine { factor: f64, offset: f64 },
    /// A pressure given where a head is expected: head = value × pa_per_unit / (ρ g).
    PressureAsHead { pa_per_unit: f64 },
}

/// One accepted unit: its spellings (the first is shown in messages) and conversion.
struct UnitDef {
    names: &'static [&'static str],
    conv: Conv,
}

const fn u(names: &'static [&'static str], factor: f64) -> UnitDef {
    UnitDef {
        names,
        conv: Conv::Factor(factor),
    }
}

const fn p_head(names: &'static [&'static str], pa_per_unit: f64) -> UnitDef {
    UnitDef {
        names,
        conv: Conv::PressureAsHead { pa_per_unit },
    }
}

static LENGTH: &[UnitDef] = &[
    u(&["m"], 1.0),
    u(&["cm"], 1e-2),
    u(&["mm"], 1e-3),
    u(&["in", "inch", "inches"], IN_M),
    u(&["ft", "feet", "foot"], FT_M),
];

static TIME: &[UnitDef] = &[
    u(&["s", "sec"], 1.0),
    u(&["min"], MIN_S),
    u(&["h", "hr", "hour", "hours"], HOUR_S),
    u(&["d", "day", "days"], DAY_S),
];

static FREQUENCY: &[UnitDef] = &[
    u(&["Hz"], 1.0),
    u(&["1/s"], 1.0),
    u(&["1/min"], 1.0 / MIN_S),
    u(&["strokes/min"], 1.0 / MIN_S),
    u(&["spm"], 1.0 / MIN_S),
    u(&["rpm"], 1.0 / MIN_S),
];

static CONDUCTIVITY: &[UnitDef] = &[
    u(&["m/s"], 1.0),
    u(&["cm/s"], 1e-2),
    u(&["m/d"], 1.0 / DAY_S),
    u(&["ft/d"], FT_M / DAY_S),
    u(&["gpd/ft2"], US_GAL_M3 / DAY_S / (FT_M * FT_M)),
];

static FLOW_RATE: &[UnitDef] = &[
    u(&["m3/s"], 1.0),
    u(&["L/s", "l/s"], 1e-3),
    u(&["m3/h"], 1.0 / HOUR_S),
    u(&["gpm"], US_GAL_M3 / MIN_S),
    u(&["L/min", "l/min"], 1e-3 / MIN_S),
];

static PRESSURE: &[UnitDef] = &[
    u(&["Pa"], 1.0),
    u(&["kPa"], 1e3),
    u(&["MPa"], 1e6),
    u(&["psi"], PSI_PA),
    u(&["bar"], 1e5),
];

static HEAD: &[UnitDef] = &[
    u(&["m"], 1.0),
    u(&["cm"], 1e-2),
    u(&["mm"], 1e-3),
    u(&["ft", "feet", "foot"], FT_M),
    u(&["in", "inch", "inches"], IN_M),
    p_head(&["Pa"], 1.0),
    p_head(&["kPa"], 1e3),
    p_head(&["MPa"], 1e6),
    p_head(&["psi"], PSI_PA),
    p_head(&["bar"], 1e5),
];

static SPECIFIC_STORAGE: &[UnitDef] = &[u(&["1/m"], 1.0), u(&["1/ft"], 1.0 / FT_M)];

static TEMPERATURE: &[UnitDef] = &[
    UnitDef {
        names: &["degC", "°C"],
        conv: Conv::Affine {
            factor: 1.0,
            offset: CELSIUS_ZERO_K,
        },
    },
    UnitDef {
        names: &["degF", "°F"],
        // K = (F − 32) × 5/9 + 273.15
        conv: Conv::Affine {
            factor: 5.0 / 9.0,
            offset: CELSIUS_ZERO_K - 32.0 * 5.0 / 9.0,
        },
    },
    u(&["K"], 1.0),
];

static VELOCITY: &[UnitDef] = &[
    u(&["m/s"], 1.0),
    u(&["ft/s"], FT_M),
    u(&["m/min"], 1.0 / MIN_S),
    u(&["ft/min"], FT_M / MIN_S),
];

static AREA: &[UnitDef] = &[
    u(&["m2"], 1.0),
    u(&["cm2"], 1e-4),
    u(&["in2"], IN_M * IN_M),
    u(&["ft2"], FT_M * FT_M),
];

static VOLUME: &[UnitDef] = &[
    u(&["m3"], 1.0),
    u(&["L", "l"], 1e-3),
    u(&["gal"], US_GAL_M3),
];

static DIMENSIONLESS: &[UnitDef] = &[u(&["%"], 1e-2)];

/// Quantities searched, in this order, to name the kind of a unit given for the wrong one.
/// `Head` is left out: its units are those of length and pressure.
const KINDS: &[Quantity] = &[
    Quantity::Length,
    Quantity::Time,
    Quantity::Frequency,
    Quantity::Conductivity,
    Quantity::Velocity,
    Quantity::FlowRate,
    Quantity::Pressure,
    Quantity::SpecificStorage,
    Quantity::Temperature,
    Quantity::Area,
    Quantity::Volume,
    Quantity::Dimensionless,
];

impl Quantity {
    /// The SI unit values of this quantity are returned in (empty for dimensionless).
    pub fn si_unit(self) -> &'static str {
        match self {
            Quantity::Length | Quantity::Head => "m",
            Quantity::Time => "s",
            Quantity::Frequency => "Hz",
            Quantity::Conductivity | Quantity::Velocity => "m/s",
            Quantity::FlowRate => "m3/s",
            Quantity::Pressure => "Pa",
            Quantity::SpecificStorage => "1/m",
            Quantity::Temperature => "K",
            Quantity::Area => "m2",
            Quantity::Volume => "m3",
            Quantity::Dimensionless => "",
            Quantity::Coefficient { si_unit } => si_unit,
        }
    }

    /// Name of the kind, as used in messages ("conductivity").
    pub fn noun(self) -> &'static str {
        match self {
            Quantity::Length => "length",
            Quantity::Time => "time",
            Quantity::Frequency => "frequency",
            Quantity::Conductivity => "conductivity",
            Quantity::FlowRate => "flow rate",
            Quantity::Pressure => "pressure",
            Quantity::Head => "head",
            Quantity::SpecificStorage => "specific storage",
            Quantity::Temperature => "temperature",
            Quantity::Velocity => "velocity",
            Quantity::Area => "area",
            Quantity::Volume => "volume",
            Quantity::Dimensionless => "dimensionless number",
            Quantity::Coefficient { .. } => "coefficient",
        }
    }

    /// What is expected, with its article: "a length", "an area", "a coefficient in s".
    fn expected(self) -> String {
        match self {
            Quantity::Area => "an area".to_owned(),
            Quantity::Coefficient { si_unit } => format!("a coefficient in {si_unit}"),
            q => format!("a {}", q.noun()),
        }
    }

    fn table(self) -> &'static [UnitDef] {
        match self {
            Quantity::Length => LENGTH,
            Quantity::Time => TIME,
            Quantity::Frequency => FREQUENCY,
            Quantity::Conductivity => CONDUCTIVITY,
            Quantity::FlowRate => FLOW_RATE,
            Quantity::Pressure => PRESSURE,
            Quantity::Head => HEAD,
            Quantity::SpecificStorage => SPECIFIC_STORAGE,
            Quantity::Temperature => TEMPERATURE,
            Quantity::Velocity => VELOCITY,
            Quantity::Area => AREA,
            Quantity::Volume => VOLUME,
            Quantity::Dimensionless => DIMENSIONLESS,
            Quantity::Coefficient { .. } => &[],
        }
    }

    /// The units accepted for this quantity (one spelling each), e.g. for a schema or help.
    pub fn accepted_units(self) -> Vec<&'static str> {
        match self {
            Quantity::Coefficient { si_unit } => vec![si_unit],
            q => q.table().iter().map(|d| d.names[0]).collect(),
        }
    }

    fn find(self, unit: &str) -> Option<Conv> {
        match self {
            Quantity::Coefficient { si_unit } => (unit == si_unit).then_some(Conv::Factor(1.0)),
            q => q
                .table()
                .iter()
                .find(|d| d.names.contains(&unit))
                .map(|d| d.conv),
        }
    }

    /// A spelling of this quantity's units that equals `unit` but for letter case.
    fn case_insensitive_match(self, unit: &str) -> Option<&'static str> {
        let mut names: Vec<&'static str> = match self {
            Quantity::Coefficient { si_unit } => vec![si_unit],
            q => q
                .table()
                .iter()
                .flat_map(|d| d.names.iter().copied())
                .collect(),
        };
        names.retain(|n| n.eq_ignore_ascii_case(unit));
        names.first().copied()
    }
}

/// Reads a case-file value as `q` in SI units. Heads given as pressures use
/// [`DEFAULT_WATER_DENSITY_KG_M3`]; call [`parse_head`] to pass the case's density.
///
/// Accepts a JSON number (SI; kelvin for temperatures) or a string `"<number> <unit>"`,
/// with or without the space, in plain or scientific notation (`"1e-4 m/s"`).
pub fn parse_quantity(value: &Value, q: Quantity) -> Result<f64, UnitError> {
    parse_with_density(value, q, DEFAULT_WATER_DENSITY_KG_M3)
}

/// Reads a command-line value as `q` in SI units, like [`parse_quantity`] on the string,
/// except that the unit is required: a plain number is refused with
/// [`UnitError::MissingUnit`], which shows `example`. For options whose plain number a user
/// could read in more than one unit (is `--at 30` seconds or minutes?).
pub fn parse_with_unit(text: &str, q: Quantity, example: &'static str) -> Result<f64, UnitError> {
    let s = text.trim();
    let split = number_prefix_len(s);
    if split > 0 && split == s.len() {
        return Err(UnitError::MissingUnit {
            got: shown(&Value::String(text.to_owned())),
            expected: q.expected(),
            example,
            accepted: q.accepted_units().join(", "),
        });
    }
    parse_quantity(&Value::String(text.to_owned()), q)
}

/// Reads a head (m): a length, or a pressure converted with the water density `rho_kg_m3`.
///
/// ```text
/// h = p / (ρ g)        h [m], p [Pa], ρ [kg/m³], g = 9.80665 m/s²
/// ```
pub fn parse_head(value: &Value, rho_kg_m3: f64) -> Result<f64, UnitError> {
    if !(rho_kg_m3.is_finite() && rho_kg_m3 > 0.0) {
        return Err(UnitError::BadDensity { rho_kg_m3 });
    }
    parse_with_density(value, Quantity::Head, rho_kg_m3)
}

fn parse_with_density(value: &Value, q: Quantity, rho_kg_m3: f64) -> Result<f64, UnitError> {
    let si = match value {
        Value::Number(n) => {
            // serde_json numbers are finite; as_f64 is None only for arbitrary precision.
            n.as_f64()
                .ok_or_else(|| UnitError::NotAQuantity { got: shown(value) })?
        }
        Value::String(s) => parse_str(s, q, rho_kg_m3)?,
        _ => return Err(UnitError::NotAQuantity { got: shown(value) }),
    };
    if !si.is_finite() {
        return Err(UnitError::NotFinite { got: shown(value) });
    }
    if q == Quantity::Temperature && si < 0.0 {
        return Err(UnitError::BelowAbsoluteZero { got: shown(value) });
    }
    Ok(si)
}

fn parse_str(text: &str, q: Quantity, rho_kg_m3: f64) -> Result<f64, UnitError> {
    let s = text.trim();
    let split = number_prefix_len(s);
    let got = || shown(&Value::String(text.to_owned()));
    let not_quantity = || UnitError::NotAQuantity { got: got() };
    if split == 0 {
        return Err(not_quantity());
    }
    let number: f64 = s[..split].parse().map_err(|_| not_quantity())?;
    if !number.is_finite() {
        return Err(UnitError::NotFinite { got: got() });
    }
    let unit = s[split..].trim();
    if unit.is_empty() {
        return Ok(number);
    }
    let conv = q.find(unit).ok_or_else(|| unit_error(unit, q))?;
    Ok(match conv {
        Conv::Factor(f) => number * f,
        Conv::Affine { factor, offset } => number * factor + offset,
        Conv::PressureAsHead { pa_per_unit } => number * pa_per_unit / (rho_kg_m3 * GRAVITY_M_S2),
    })
}

/// Length of the decimal number at the start of `s`: sign, digits, point, digits, and an
/// exponent only when digits follow it (so `"2e-4m/s"` splits after `2e-4`).
fn number_prefix_len(s: &str) -> usize {
    let b = s.as_bytes();
    let digits = |mut i: usize| {
        while i < b.len() && b[i].is_ascii_digit() {
            i += 1;
        }
        i
    };
    let mut i = 0;
    if i < b.len() && (b[i] == b'+' || b[i] == b'-') {
        i += 1;
    }
    let int_end = digits(i);
    let mut end = int_end;
    let mut frac_digits = 0;
    if end < b.len() && b[end] == b'.' {
        let frac_end = digits(end + 1);
        frac_digits = frac_end - (end + 1);
        end = frac_end;
    }
    if int_end == i && frac_digits == 0 {
        return 0;
    }
    if end < b.len() && (b[end] == b'e' || b[end] == b'E') {
        let mut j = end + 1;
        if j < b.len() && (b[j] == b'+' || b[j] == b'-') {
            j += 1;
        }
        let exp_end = digits(j);
        if exp_end > j {
            end = exp_end;
        }
    }
    end
}

fn unit_error(unit: &str, q: Quantity) -> UnitError {
    let accepted = q.accepted_units().join(", ");
    let kinds: Vec<&str> = KINDS
        .iter()
        .filter(|k| k.find(unit).is_some())
        .map(|k| k.noun())
        .collect();
    if !kinds.is_empty() {
        return UnitError::WrongKind {
            unit: unit.to_owned(),
            kinds: kinds.join(" or "),
            expected: q.expected(),
            accepted,
        };
    }
    let hint = q
        .case_insensitive_match(unit)
        .map(|m| format!(" (did you mean \"{m}\"?)"))
        .unwrap_or_default();
    UnitError::UnknownUnit {
        unit: unit.to_owned(),
        expected: q.expected(),
        hint,
        accepted,
    }
}

/// A value as the user wrote it, for messages; long values are cut.
fn shown(value: &Value) -> String {
    const MAX_CHARS: usize = 60;
    let s = value.to_string();
    if s.chars().count() > MAX_CHARS {
        let cut: String = s.chars().take(MAX_CHARS).collect();
        format!("{cut}…")
    } else {
        s
    }
}

/// Formats an SI value of `q` for display, to 4 significant digits: `"0.1 m"`,
/// `"2e-4 m/s"`, `"288.1 K"`, `"0.32"` (no unit for dimensionless).
pub fn format_si(value: f64, q: Quantity) -> String {
    let number = format_significant(value, 4);
    match q.si_unit() {
        "" => number,
        unit => format!("{number} {unit}"),
    }
}

/// `value` to `digits` significant digits, plain between 1e-3 and 1e5 (where the integer
/// part is kept whole, so 12345 stays 12345), else scientific; no trailing zeros.
pub fn format_significant(value: f64, digits: usize) -> String {
    if value == 0.0 || !value.is_finite() {
        return format!("{value}");
    }
    let digits = digits.max(1);
    // Round first, so that 99999.9 is seen as 1.000e5.
    let sci = format!("{:.*e}", digits - 1, value);
    let (mantissa, exp) = sci
        .split_once('e')
        .expect("LowerExp always writes an exponent");
    let exp: i32 = exp.parse().expect("LowerExp exponent is an integer");
    if (-3..5).contains(&exp) {
        let decimals = (digits as i32 - 1 - exp).max(0) as usize;
        trim_zeros(&format!("{value:.decimals$}")).to_owned()
    } else {
        format!("{}e{exp}", trim_zeros(mantissa))
    }
}

fn trim_zeros(s: &str) -> &str {
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.')
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    /// Conversions multiply exact decimal constants; each f64 operation rounds by at most
    /// half an ulp (1.1e-16), and no conversion chains more than a handful of them.
    const REL_TOL: f64 = 1e-15;

    fn close(got: f64, want: f64) -> bool {
        (got - want).abs() <= REL_TOL * want.abs().max(f64::MIN_POSITIVE)
    }

    /// (quantity, input, expected SI value, source of the expected value).
    /// Expected values were worked out with exact fractions from the definitions named.
    const NIST: &str = "exact by definition (NIST SP 811, Appendix B)";
    const SI: &str = "exact by definition (SI prefixes / SI base unit)";
    const TIME_DEF: &str = "exact by definition (1 min = 60 s, 1 h = 3600 s, 1 d = 86400 s)";
    #[rustfmt::skip]
    fn cases() -> Vec<(Quantity, &'static str, f64, &'static str)> {
        use Quantity::*;
        vec![
            (Length, "2 m", 2.0, SI),
            (Length, "250 cm", 2.5, SI),
            (Length, "0.5 mm", 5e-4, SI),
            (Length, "4 in", 0.1016, NIST),
            (Length, "1 inch", 0.0254, NIST),
            (Length, "2 inches", 0.0508, NIST),
            (Length, "10 ft", 3.048, NIST),
            (Length, "3 feet", 0.9144, NIST),
            (Length, "1 foot", 0.3048, NIST),
            (Time, "30 s", 30.0, SI),
            (Time, "5 sec", 5.0, SI),
            (Time, "30 min", 1800.0, TIME_DEF),
            (Time, "2 h", 7200.0, TIME_DEF),
            (Time, "1.5 hr", 5400.0, TIME_DEF),
            (Time, "1 hour", 3600.0, TIME_DEF),
            (Time, "3 hours", 10800.0, TIME_DEF),
            (Time, "1 d", 86400.0, TIME_DEF),
            (Time, "1 day", 86400.0, TIME_DEF),
            (Time, "2 days", 172800.0, TIME_DEF),
            (Frequency, "0.5 Hz", 0.5, SI),
            (Frequency, "2 1/s", 2.0, SI),
            (Frequency, "30 1/min", 0.5, TIME_DEF),
            (Frequency, "30 strokes/min", 0.5, TIME_DEF),
            (Frequency, "45 spm", 0.75, TIME_DEF),
            (Frequency, "90 rpm", 1.5, TIME_DEF),
            (Conductivity, "1e-4 m/s", 1e-4, SI),
            (Conductivity, "0.01 cm/s", 1e-4, SI),
            (Conductivity, "86.4 m/d", 1e-3, TIME_DEF),
            (Conductivity, "1 ft/d", 3.527777777777778e-6, NIST),
            (Conductivity, "1 gpd/ft2", 4.7159529320987654e-7, NIST),
            (FlowRate, "0.02 m3/s", 0.02, SI),
            (FlowRate, "5 L/s", 5e-3, SI),
            (FlowRate, "5 l/s", 5e-3, SI),
            (FlowRate, "36 m3/h", 0.01, TIME_DEF),
            (FlowRate, "1 gpm", 6.30901964e-5, NIST),
            (FlowRate, "60 L/min", 1e-3, TIME_DEF),
            (FlowRate, "60 l/min", 1e-3, TIME_DEF),
            (Pressure, "100 Pa", 100.0, SI),
            (Pressure, "2.5 kPa", 2500.0, SI),
            (Pressure, "1.2 MPa", 1.2e6, SI),
            (Pressure, "1 psi", 6894.757293168362, NIST),
            (Pressure, "2 bar", 2e5, NIST),
            (Head, "1.5 m", 1.5, SI),
            (Head, "20 cm", 0.2, SI),
            (Head, "15 mm", 0.015, SI),
            (Head, "10 ft", 3.048, NIST),
            (Head, "2 feet", 0.6096, NIST),
            (Head, "1 foot", 0.3048, NIST),
            (Head, "6 in", 0.1524, NIST),
            (Head, "1 inch", 0.0254, NIST),
            (Head, "3 inches", 0.0762, NIST),
            // p / (998.2 kg/m³ × 9.80665 m/s²), psi and bar exact by NIST SP 811.
            (Head, "998.2 Pa", 1.0 / 9.80665, NIST),
            (Head, "1 kPa", 0.10215550119995274, NIST),
            (Head, "0.001 MPa", 0.10215550119995274, NIST),
            (Head, "1 psi", 0.7043373869356434, NIST),
            (Head, "1 bar", 10.215550119995275, NIST),
            (SpecificStorage, "1e-5 1/m", 1e-5, SI),
            (SpecificStorage, "1 1/ft", 3.2808398950131235, NIST),
            (Temperature, "12 degC", 285.15, "exact by definition (ITS-90: T/K = t/°C + 273.15)"),
            (Temperature, "20 °C", 293.15, "exact by definition (ITS-90: T/K = t/°C + 273.15)"),
            (Temperature, "68 degF", 293.15, NIST),
            (Temperature, "-40 °F", 233.15, NIST),
            (Temperature, "300 K", 300.0, SI),
            (Velocity, "0.3 m/s", 0.3, SI),
            (Velocity, "1 ft/s", 0.3048, NIST),
            (Velocity, "6 m/min", 0.1, TIME_DEF),
            (Velocity, "1 ft/min", 0.00508, NIST),
            (Area, "0.5 m2", 0.5, SI),
            (Area, "10 cm2", 1e-3, SI),
            (Area, "1 in2", 6.4516e-4, NIST),
            (Area, "1 ft2", 0.09290304, NIST),
            (Volume, "2 m3", 2.0, SI),
            (Volume, "500 L", 0.5, SI),
            (Volume, "500 l", 0.5, SI),
            (Volume, "2.5 gal", 0.00946352946, NIST),
            (Dimensionless, "12 %", 0.12, "exact by definition (1 % = 0.01)"),
            (Coefficient { si_unit: "s" }, "40 s", 40.0, SI),
        ]
    }

    #[test]
    fn parse_quantity_works_for_every_unit() {
        for (q, input, want, source) in cases() {
            let got = parse_quantity(&json!(input), q).unwrap();
            assert!(
                close(got, want),
                "{input} as {q:?}: got {got}, want {want} ({source})"
            );
        }
    }

    #[test]
    fn every_table_unit_has_a_conversion_test() {
        let cases = cases();
        for &q in KINDS.iter().chain(&[Quantity::Head]) {
            for name in q.table().iter().flat_map(|d| d.names.iter()) {
                let tested = cases.iter().any(|(cq, input, _, _)| {
                    *cq == q && input.split_once(' ').map(|(_, u)| u) == Some(*name)
                });
                assert!(tested, "no test case for unit {name:?} of {q:?}");
            }
        }
    }

    #[test]
    fn psi_matches_nist_table() {
        // NIST SP 811 Appendix B.8: pound-force per square inch = 6.894 757 E+03 Pa (7 digits).
        let pa = parse_quantity(&json!("1 psi"), Quantity::Pressure).unwrap();
        assert!((pa / 6.894_757e3 - 1.0).abs() < 1e-7);
    }

    #[test]
    fn psi_as_feet_of_water_matches_rule_of_thumb() {
        // "1 psi ≈ 2.31 ft of water" at ρ ≈ 1000 kg/m³: common practice, no source.
        let m = parse_head(&json!("1 psi"), 1000.0).unwrap();
        assert!((m / 0.3048 - 2.31).abs() < 0.005, "{}", m / 0.3048);
    }

    #[test]
    fn parse_head_uses_given_density() {
        // 9806.65 Pa / (1000 kg/m³ × 9.80665 m/s²) = 1 m, exact by definition.
        let m = parse_head(&json!("9806.65 Pa"), 1000.0).unwrap();
        assert!(close(m, 1.0), "{m}");
        // Lengths ignore the density.
        assert_eq!(parse_head(&json!("2 m"), 1000.0).unwrap(), 2.0);
    }

    #[test]
    fn parse_head_rejects_bad_density() {
        for rho in [0.0, -1.0, f64::NAN, f64::INFINITY] {
            assert!(matches!(
                parse_head(&json!("1 psi"), rho),
                Err(UnitError::BadDensity { .. })
            ));
        }
    }

    #[test]
    fn bare_numbers_are_si() {
        assert_eq!(parse_quantity(&json!(0.1), Quantity::Length).unwrap(), 0.1);
        assert_eq!(
            parse_quantity(&json!(285), Quantity::Temperature).unwrap(),
            285.0
        );
        assert_eq!(
            parse_quantity(&json!("0.32"), Quantity::Dimensionless).unwrap(),
            0.32
        );
        assert_eq!(
            parse_quantity(&json!("1e-5"), Quantity::SpecificStorage).unwrap(),
            1e-5
        );
        assert_eq!(
            parse_quantity(&json!(3), Quantity::Coefficient { si_unit: "s" }).unwrap(),
            3.0
        );
    }

    /// Conversion factors exact by definition (1 min = 60 s, 1 h = 3600 s; NIST SP 811).
    #[test]
    fn parse_with_unit_requires_the_unit() {
        let t = Quantity::Time;
        assert_eq!(parse_with_unit("30 min", t, "60 min").unwrap(), 1800.0);
        assert_eq!(parse_with_unit(" 2h", t, "60 min").unwrap(), 7200.0);
        assert_eq!(parse_with_unit("45 s", t, "60 min").unwrap(), 45.0);
        for bare in ["30", " 30 ", "1e3", "0.5"] {
            let e = parse_with_unit(bare, t, "60 min").unwrap_err();
            assert!(matches!(e, UnitError::MissingUnit { .. }), "{bare}: {e:?}");
            let m = e.to_string();
            assert!(
                m.contains("has no unit") && m.contains("\"60 min\"") && m.contains("min, h"),
                "{m}"
            );
        }
        // Other errors are those of parse_quantity.
        assert!(matches!(
            parse_with_unit("30 m", t, "60 min"),
            Err(UnitError::WrongKind { .. })
        ));
        assert!(matches!(
            parse_with_unit("min", t, "60 min"),
            Err(UnitError::NotAQuantity { .. })
        ));
    }

    #[test]
    fn number_forms_are_accepted() {
        let q = Quantity::Conductivity;
        for (input, want) in [
            ("1e-4 m/s", 1e-4),
            ("1E-4 m/s", 1e-4),
            ("1e-4m/s", 1e-4),
            ("2.5e+1cm/s", 0.25),
            ("  .5   m/s ", 0.5),
            ("5. m/s", 5.0),
            ("+3 m/s", 3.0),
        ] {
            let got = parse_quantity(&json!(input), q).unwrap();
            assert!(close(got, want), "{input}: {got}");
        }
        assert_eq!(
            parse_quantity(&json!("-1.5 m"), Quantity::Head).unwrap(),
            -1.5
        );
        assert!(close(
            parse_quantity(&json!("4in"), Quantity::Length).unwrap(),
            0.1016
        ));
        assert!(close(
            parse_quantity(&json!("1psi"), Quantity::Pressure).unwrap(),
            6894.757293168362
        ));
    }

    #[test]
    fn parse_quantity_captures_errors() {
        let err = |v: Value, q| parse_quantity(&v, q).unwrap_err().to_string();
        assert_eq!(
            err(json!("2e-4 m/ss"), Quantity::Conductivity),
            "unknown unit \"m/ss\" for a conductivity; accepted: m/s, cm/s, m/d, ft/d, gpd/ft2"
        );
        assert_eq!(
            err(json!("3 m"), Quantity::Conductivity),
            "\"m\" is a unit of length, but a conductivity is expected; \
             accepted: m/s, cm/s, m/d, ft/d, gpd/ft2"
        );
        assert_eq!(
            err(json!("3 m/s"), Quantity::Length),
            "\"m/s\" is a unit of conductivity or velocity, but a length is expected; \
             accepted: m, cm, mm, in, ft"
        );
        assert_eq!(
            err(json!("0.5 hz"), Quantity::Frequency),
            "unknown unit \"hz\" for a frequency (did you mean \"Hz\"?); \
             accepted: Hz, 1/s, 1/min, strokes/min, spm, rpm"
        );
        assert_eq!(
            err(json!("3 m"), Quantity::Area),
            "\"m\" is a unit of length, but an area is expected; accepted: m2, cm2, in2, ft2"
        );
        assert_eq!(
            err(json!("3 min"), Quantity::Coefficient { si_unit: "s" }),
            "\"min\" is a unit of time, but a coefficient in s is expected; accepted: s"
        );
        assert_eq!(
            err(json!("abc"), Quantity::Length),
            "expected a number or \"<number> <unit>\", got \"abc\""
        );
        assert_eq!(
            err(json!(true), Quantity::Length),
            "expected a number or \"<number> <unit>\", got true"
        );
        assert_eq!(
            err(json!(null), Quantity::Length),
            "expected a number or \"<number> <unit>\", got null"
        );
        assert_eq!(
            err(json!({"value": 1}), Quantity::Length),
            "expected a number or \"<number> <unit>\", got {\"value\":1}"
        );
        assert_eq!(
            err(json!("-5 K"), Quantity::Temperature),
            "temperature is below absolute zero: \"-5 K\" (a bare number is kelvin)"
        );
        assert_eq!(
            err(json!(-300), Quantity::Temperature),
            "temperature is below absolute zero: -300 (a bare number is kelvin)"
        );
        assert_eq!(
            err(json!("1e999 m"), Quantity::Length),
            "expected a finite number, got \"1e999 m\""
        );
    }

    #[test]
    fn non_numbers_are_rejected() {
        for input in [
            "", " ", "m", "NaN m", "nan", "inf m", "infinity", "-inf", ".", "-", "e5 m",
        ] {
            let e = parse_quantity(&json!(input), Quantity::Length).unwrap_err();
            assert!(
                matches!(e, UnitError::NotAQuantity { .. }),
                "{input:?}: {e}"
            );
        }
        // A number then junk is read as a unit and rejected as unknown.
        for input in ["1,000 m", "3 m m", "2 x"] {
            let e = parse_quantity(&json!(input), Quantity::Length).unwrap_err();
            assert!(matches!(e, UnitError::UnknownUnit { .. }), "{input:?}: {e}");
        }
    }

    #[test]
    fn long_values_are_cut_in_messages() {
        let long = "x".repeat(200);
        let msg = parse_quantity(&json!(long), Quantity::Length)
            .unwrap_err()
            .to_string();
        assert!(msg.len() < 120 && msg.ends_with('…'), "{msg}");
    }

    #[test]
    fn format_si_works() {
        assert_eq!(format_si(0.1, Quantity::Length), "0.1 m");
        assert_eq!(format_si(2e-4, Quantity::Conductivity), "2e-4 m/s");
        assert_eq!(
            format_si(1.23456e-5, Quantity::SpecificStorage),
            "1.235e-5 1/m"
        );
        assert_eq!(format_si(285.15, Quantity::Temperature), "285.1 K");
        assert_eq!(format_si(0.32, Quantity::Dimensionless), "0.32");
        assert_eq!(format_si(99999.9, Quantity::Pressure), "1e5 Pa");
        assert_eq!(format_si(12345.0, Quantity::Pressure), "12345 Pa");
        assert_eq!(format_si(0.001, Quantity::FlowRate), "0.001 m3/s");
        assert_eq!(format_si(-1.5, Quantity::Head), "-1.5 m");
        assert_eq!(format_si(0.0, Quantity::Area), "0 m2");
        assert_eq!(
            format_si(40.0, Quantity::Coefficient { si_unit: "s" }),
            "40 s"
        );
    }

    #[test]
    fn accepted_units_lists_one_spelling_each() {
        assert_eq!(
            Quantity::Frequency.accepted_units(),
            ["Hz", "1/s", "1/min", "strokes/min", "spm", "rpm"]
        );
        assert_eq!(
            Quantity::Head.accepted_units(),
            ["m", "cm", "mm", "ft", "in", "Pa", "kPa", "MPa", "psi", "bar"]
        );
        assert_eq!(Quantity::Dimensionless.accepted_units(), ["%"]);
    }
}
