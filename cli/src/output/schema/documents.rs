//! The JSON documents the commands print: `check --json` and `steptest --json` (the
//! document of `run --json` is the headline, [`super::run_json_keys`]). Each key has its
//! dotted path (`zones[].zone` for a key of the objects in an array), unit, shape and
//! meaning here; the commands spell a key only through these constants, and a test runs
//! the commands and compares their documents with these tables.

/// The shape of a key's value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shape {
    /// A number (or `null` where not computed).
    Number,
    /// A text.
    Text,
    /// `true` or `false`.
    Flag,
    /// An array; its objects' keys are listed as `<path>[].<key>`.
    Array,
    /// An object; its keys are listed as `<path>.<key>`.
    Object,
    /// An object with one number per zone, keyed by the zone names.
    PerZone,
    /// A fitted value with its uncertainty: an object with the keys of [`estimate`].
    Estimate,
}

impl Shape {
    /// Text for the docs table.
    pub const fn text(self) -> &'static str {
        match self {
            Shape::Number => "number",
            Shape::Text => "text",
            Shape::Flag => "true/false",
            Shape::Array => "array",
            Shape::Object => "object",
            Shape::PerZone => "object by zone",
            Shape::Estimate => "estimate",
        }
    }
}

/// One key of a JSON document.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct JsonKey {
    /// Dotted path from the document's root.
    pub path: &'static str,
    /// SI unit ("" for a text, flag, object or pure number).
    pub unit: &'static str,
    /// Shape of the value.
    pub shape: Shape,
    /// What it holds.
    pub description: &'static str,
}

impl JsonKey {
    /// The key itself: the last segment of the path.
    pub fn key(&self) -> &'static str {
        let last = self.path.rsplit('.').next().unwrap_or(self.path);
        last.strip_suffix("[]").unwrap_or(last)
    }
}

/// Defines a module of [`JsonKey`] constants and `ALL`, in document order.
macro_rules! json_document {
    ($(#[$doc:meta])* $module:ident {
        $($name:ident => $path:literal, $unit:literal, $shape:ident, $desc:literal;)*
    }) => {
        $(#[$doc])*
        pub mod $module {
            use super::{JsonKey, Shape};
            $(
                #[doc = $desc]
                pub const $name: JsonKey = JsonKey {
                    path: $path,
                    unit: $unit,
                    shape: Shape::$shape,
                    description: $desc,
                };
            )*
            /// Every key, in the order of the docs.
            pub const ALL: &[JsonKey] = &[$($name),*];
        }
    };
}

json_document! {
    /// The keys of an estimate (a fitted value with its uncertainty).
    estimate {
        VALUE => "value", "", Number, "the estimate, in the unit given";
        STD_ERROR => "std_error", "", Number, "its standard error";
        LOWER => "lower", "", Number, "lower end of the confidence interval";
        UPPER => "upper", "", Number, "upper end of the confidence interval";
        UNIT => "unit", "", Text, "the unit of the four numbers";
    }
}

json_document! {
    /// `boreflux check --json`.
    check_json {
        PERIODIC_STATE => "periodic_state", "", Object, "the periodic steady state of the well as it stands (cake and fines frozen) under a periodic drive: by the harmonic method for a linear case, else by Newton–shooting on one period; or why it does not apply";
        PERIODIC_METHOD => "periodic_state.method", "", Text, "`harmonic` (linear case, no time stepping) or `shooting` (Newton–Krylov on one period of fixed time steps)";
        PERIOD => "periodic_state.period_s", "s", Number, "period of the drive";
        PEAK_SCREEN_FLOW => "periodic_state.peak_screen_flow_m3_s", "m3/s", Number, "largest screen flow over the period";
        PEAK_WALL_FACE_FLUX => "periodic_state.peak_wall_face_flux_m_s", "m/s", Number, "largest Darcy flux at the borehole wall over the period";
        MEAN_POWER => "periodic_state.mean_power_w", "W", PerZone, "mean power dissipated in each zone over the period";
        SHOOTING_STEPS => "periodic_state.steps_per_cycle", "", Number, "shooting: fixed time steps per period";
        SHOOTING_NEWTON => "periodic_state.newton_iterations", "", Number, "shooting: Newton iterations";
        SHOOTING_PERIODS => "periodic_state.periods_stepped", "", Number, "shooting: periods time-stepped in all (start-up ramp, warm-up, every evaluation of the period map, the final period)";
        SHOOTING_DEFECT => "periodic_state.defect", "", Number, "shooting: the periodicity defect, largest change of a head over one period relative to the largest head (the column flow relative to its largest)";
        NOT_APPLICABLE => "periodic_state.not_applicable", "", Text, "why the periodic state was not computed (in place of the keys above)";
        TITLE => "title", "", Text, "the case title";
        ZONES => "zones", "", Array, "the zones that hold cells, inner to outer";
        ZONE => "zones[].zone", "", Text, "zone name";
        INNER_RADIUS => "zones[].inner_radius_m", "m", Number, "inner radius of the zone";
        ZONE_OUTER_RADIUS => "zones[].outer_radius_m", "m", Number, "outer radius of the zone";
        CONDUCTIVITY => "zones[].conductivity_m_s", "m/s", Number, "hydraulic conductivity";
        DIFFUSIVITY => "zones[].diffusivity_m2_s", "m2/s", Number, "hydraulic diffusivity K/S_s";
        PENETRATION_DEPTH => "zones[].penetration_depth_m", "m", Number, "penetration depth of the drive's slowest period (null without a period)";
        RESISTANCE => "resistance_s_m2", "s/m2", PerZone, "resistance of each zone to steady radial flow at vanishing flow";
        SKIN => "skin", "", Object, "skin referred to the formation (Hawkins) at the start";
        SKIN_PACK => "skin.pack", "1", Number, "skin of the pack";
        SKIN_CAKE => "skin.cake", "1", Number, "skin of the cake";
        SKIN_INVADED => "skin.invaded", "1", Number, "skin of the invaded zone";
        SKIN_TOTAL => "skin.total", "1", Number, "total skin";
        CELLS => "cells", "1", Number, "grid cells";
        OUTER_RADIUS => "outer_radius_m", "m", Number, "outer radius of the model";
        TIME_STEP => "time_step", "", Text, "the time-step rule in words";
        COST => "cost", "", Object, "the run-size estimate";
        STEPS_AT_MOST => "cost.steps_at_most", "1", Number, "upper bound of the step count";
        CELL_STEPS => "cost.cell_steps", "1", Number, "cells × steps";
        ESTIMATED_SECONDS => "cost.estimated_seconds", "s", Number, "estimated computing time";
        ESTIMATED_OUTPUT_BYTES => "cost.estimated_output_bytes", "B", Number, "estimated size of the run file";
        OVER_LIMITS => "cost.over_limits", "", Flag, "whether `run` refuses the case without --allow-large";
        ANNULUS => "annulus", "", Array, "one object per `--annulus` width (empty without it)";
        WIDTH => "annulus[].width_m", "m", Number, "pack width";
        ANNULUS_PEAK_FLUX => "annulus[].peak_face_flux_m_s", "m/s", Number, "largest Darcy flux at the wall";
        CAKE_WORK => "annulus[].cake_work_per_cycle_j", "J", Number, "work dissipated in the cake per cycle";
        PACK_WORK => "annulus[].pack_work_per_cycle_j", "J", Number, "work dissipated in the pack per cycle";
        NOTES => "notes", "", Array, "notes on the defaults used (texts)";
        WARNINGS => "warnings", "", Array, "warnings about the case (texts)";
        CAUTIONS => "cautions", "", Text, "the standing cautions (collapse, stuck tools, formation damage; the maker's ratings and local codes govern)";
        DAMAGE_CONSTANTS => "damage_constants", "", Array, "the damage-removal constants used, widest documented range first";
        CONSTANT_PATH => "damage_constants[].path", "", Text, "case-file path of the constant";
        CONSTANT_VALUE => "damage_constants[].value", "", Number, "its value, in the unit given";
        CONSTANT_RANGE => "damage_constants[].range", "", Array, "documented range [low, high]";
        CONSTANT_UNIT => "damage_constants[].unit", "", Text, "unit of value and range";
        CONSTANT_DECADES => "damage_constants[].decades", "1", Number, "width of the range in decades";
        CONSTANT_PROVENANCE => "damage_constants[].provenance", "", Text, "where the value comes from";
    }
}

json_document! {
    /// `boreflux steptest --json` (docs/step-test.md).
    steptest_json {
        METHOD => "method", "", Text, "the method used (jacob or hantush)";
        WEIGHTING => "weighting", "", Text, "weights of the fit";
        CONFIDENCE => "confidence", "1", Number, "confidence level of the intervals";
        DOF => "dof", "1", Number, "degrees of freedom of the fit";
        T_QUANTILE => "t_quantile", "1", Number, "Student's t quantile of the intervals";
        B => "B", "s/m2", Estimate, "linear loss coefficient B";
        C => "C", "s2/m5", Estimate, "nonlinear loss coefficient C";
        COV_BC => "cov_BC_s3_m7", "s3/m7", Number, "covariance of B and C";
        RESIDUAL_STD => "residual_std", "s/m2", Number, "residual standard deviation of s/Q at unit weight";
        EFFICIENCY_DEFINITION => "efficiency_definition", "", Text, "how the step efficiency is defined";
        WARNINGS => "warnings", "", Array, "what the fit cannot vouch for and options without effect (empty when none; docs/step-test.md §4a)";
        WARNING_KIND => "warnings[].kind", "", Text, "negative_c, negative_b, efficiency_out_of_range, repeated_rate, rate_decreases, reference_time_outside_data, negative_power_c or option_without_effect";
        WARNING_MESSAGE => "warnings[].message", "", Text, "the warning as printed, with units";
        STEPS => "steps", "", Array, "one object per step";
        RATE => "steps[].rate_m3_s", "m3/s", Number, "pumping rate";
        MEASURED_DRAWDOWN => "steps[].measured_drawdown_m", "m", Number, "drawdown read";
        FITTED_DRAWDOWN => "steps[].fitted_drawdown_m", "m", Number, "B Q + C Q²";
        DRAWDOWN_PER_RATE => "steps[].drawdown_per_rate_s_m2", "s/m2", Number, "fitted s/Q";
        SPECIFIC_CAPACITY => "steps[].specific_capacity_m2_s", "m2/s", Number, "Q over the fitted drawdown";
        LINEAR_LOSS => "steps[].linear_loss_m", "m", Number, "B Q";
        NONLINEAR_LOSS => "steps[].nonlinear_loss_m", "m", Number, "C Q²";
        RESIDUAL => "steps[].residual_m", "m", Number, "measured − fitted drawdown";
        LINEAR_SHARE => "steps[].linear_share", "1", Number, "B Q / (B Q + C Q²)";
        NONLINEAR_SHARE => "steps[].nonlinear_share", "1", Number, "C Q² / (B Q + C Q²)";
        EFFICIENCY => "steps[].efficiency", "1", Number, "step efficiency, the linear share";
        EFFICIENCY_STD_ERROR => "steps[].efficiency_std_error", "1", Number, "its standard error";
        POWER => "power", "", Object, "with --power: the power-law fit s = B Q + C Qⁿ";
        POWER_ERROR => "power.error", "", Text, "why the power law was not fitted (in place of the keys below)";
        POWER_LAW => "power.law", "", Text, "the law fitted";
        POWER_DOF => "power.dof", "1", Number, "degrees of freedom";
        POWER_RESIDUAL_STD => "power.residual_std_m", "m", Number, "residual standard deviation of the drawdown";
        POWER_N => "power.n", "", Estimate, "exponent n";
        POWER_B => "power.B", "s/m2", Estimate, "linear coefficient B";
        POWER_C => "power.C", "s^n/m^(3n-1)", Estimate, "coefficient C of Qⁿ";
        SERIES => "series", "", Object, "with the hantush method: the fit of the time series";
        REFERENCE_TIME => "series.reference_time_s", "s", Number, "time the coefficients are referred to";
        READINGS_USED => "series.readings_used", "1", Number, "readings in the fit";
        SERIES_DOF => "series.dof", "1", Number, "degrees of freedom";
        SERIES_RESIDUAL_STD => "series.residual_std_m", "m", Number, "residual standard deviation of the drawdown";
        SERIES_A => "series.a", "s/m2", Estimate, "intercept a of the superposed lines";
        SERIES_B => "series.b", "s/m2 per log10 cycle", Estimate, "slope b per log cycle of time";
        SERIES_C => "series.C", "s2/m5", Estimate, "nonlinear coefficient C";
        B_AT_REFERENCE => "series.B_at_reference", "s/m2", Estimate, "B at the reference time";
        TRANSMISSIVITY => "series.transmissivity_m2_s", "m2/s", Number, "transmissivity ln 10 / (4π b) (Cooper–Jacob)";
        MODEL => "model", "", Object, "with --case: the case's model pumped at the same rates";
        CASE_TITLE => "model.case_title", "", Text, "the case title";
        MODEL_RATES => "model.rates_m3_s", "m3/s", Array, "the rates pumped";
        MODEL_STEP_DURATION => "model.step_duration_s", "s", Number, "duration of each step";
        AS_BUILT => "model.as_built", "", Object, "B and C of the well as built (null when not fitted)";
        AS_BUILT_B => "model.as_built.B_s_m2", "s/m2", Number, "B";
        AS_BUILT_C => "model.as_built.C_s2_m5", "s2/m5", Number, "C";
        DEVELOPED => "model.after_development", "", Object, "B and C after the case's development run (null when not fitted)";
        DEVELOPED_B => "model.after_development.B_s_m2", "s/m2", Number, "B";
        DEVELOPED_C => "model.after_development.C_s2_m5", "s2/m5", Number, "C";
    }
}

/// The Markdown table of one document's keys.
pub fn table(out: &mut String, title: &str, keys: &[JsonKey]) {
    out.push_str(&format!(
        "{title}\n\n| key | unit | shape | description |\n| --- | --- | --- | --- |\n"
    ));
    for k in keys {
        out.push_str(&format!(
            "| `{}` | {} | {} | {} |\n",
            k.path,
            if k.unit.is_empty() { "–" } else { k.unit },
            k.shape.text(),
            k.description
        ));
    }
    out.push('\n');
}
