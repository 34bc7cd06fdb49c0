//! The output schema: every quantity boreflux writes, with its name, unit, description, how
//! it is computed and which part of the well it describes. The HDF5 and CSV writers, the
//! `/summary` attributes, the report reader, the report's headline and sweep pages, the
//! sweep table and `boreflux schema --outputs` all take names and units from here; no other
//! file spells an output name. docs/formats.md lists the same table (a test compares them).
//!
//! Three kinds of output, each an enum so that a new one is a compile error wherever it must
//! be handled:
//! - [`Step`]: one value per accepted step, `/series/<name>` and a CSV column;
//! - [`Cycle`]: one value per complete drive cycle, `/cycles/<name>`;
//! - [`Figure`]: one value per run, a `/summary` attribute and a sweep-table column.
//!
//! Zone-resolved quantities carry their [`Zone`]: a new zone gets its own names, never
//! another zone's values.

use crate::summary::Headline;
use boreflux_solver::grid::{Zone, ZONE_COUNT};
use boreflux_solver::{CycleView, JumpView, StepView};
use serde_json::Value;

/// SI unit of an output, as written in the `units` attribute and the docs.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Unit {
    /// Metre.
    M,
    /// Second.
    S,
    /// Metre per second.
    MPerS,
    /// Square metre per second (specific capacity).
    M2PerS,
    /// Cubic metre per second.
    M3PerS,
    /// Pascal.
    Pa,
    /// Watt.
    W,
    /// Joule.
    J,
    /// Kilogram.
    Kg,
    /// Second per square metre (step-test B).
    SPerM2,
    /// Second squared per metre to the fifth (step-test C).
    S2PerM5,
    /// Dimensionless ratio or count.
    One,
}

impl Unit {
    /// The unit as written in files (`m3/s`, `1` for dimensionless).
    pub const fn symbol(self) -> &'static str {
        match self {
            Unit::M => "m",
            Unit::S => "s",
            Unit::MPerS => "m/s",
            Unit::M2PerS => "m2/s",
            Unit::M3PerS => "m3/s",
            Unit::Pa => "Pa",
            Unit::W => "W",
            Unit::J => "J",
            Unit::Kg => "kg",
            Unit::SPerM2 => "s/m2",
            Unit::S2PerM5 => "s2/m5",
            Unit::One => "1",
        }
    }
}

/// Which part of the well a quantity describes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Place {
    /// The well (in-well head, the screen's flow).
    Well,
    /// The borehole wall r_b (face flux, gradient, shear, cake).
    Wall,
    /// One zone of the model.
    Zone(Zone),
    /// The whole model or run (time, skin, balances, counts).
    Model,
}

impl Place {
    /// Text for the docs table.
    pub fn text(self) -> &'static str {
        match self {
            Place::Well => "well",
            Place::Wall => "borehole wall",
            Place::Zone(z) => z.name(),
            Place::Model => "whole model",
        }
    }
}

/// One entry of the schema.
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// Name inside its group (`face_flux`, `power/pack`, `work_cake_j`).
    pub name: String,
    /// SI unit.
    pub unit: Unit,
    /// What it is.
    pub description: String,
    /// How it is computed (docs/physics.md and docs/numerics.md give the formulas).
    pub computed: &'static str,
    /// Which part of the well.
    pub place: Place,
}

fn entry(
    name: String,
    unit: Unit,
    description: String,
    computed: &'static str,
    place: Place,
) -> Entry {
    Entry {
        name,
        unit,
        description,
        computed,
        place,
    }
}

/// A per-step series.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Step {
    /// Time at the end of the step.
    Time,
    /// In-well head.
    WellHead,
    /// Head on the pack side of the screen.
    ScreenOuterHead,
    /// Flow through the screen.
    ScreenFlow,
    /// Darcy flux at the wall.
    FaceFlux,
    /// Pore velocity at the wall.
    FacePoreVelocity,
    /// Head gradient on the formation side of the wall.
    FaceGradient,
    /// Shear proxy on the pack side of the wall.
    ShearProxy,
    /// Cake thickness.
    CakeThickness,
    /// Cake coverage.
    CakeCoverage,
    /// Total skin.
    Skin,
    /// Inward pressure difference across the cake.
    CakePressure,
    /// Mud fines carried out of the invaded zone so far.
    FinesRemoved,
    /// Step volume residual.
    MassResidual,
    /// Step energy residual.
    EnergyResidual,
    /// Newton iterations of the step.
    NewtonIterations,
    /// Power dissipated in a zone.
    Power(Zone),
    /// Cumulative work dissipated in a zone.
    Work(Zone),
}

impl Step {
    /// The quantities that are not resolved by zone, in file and CSV order.
    pub const SCALARS: [Step; 16] = [
        Step::Time,
        Step::WellHead,
        Step::ScreenOuterHead,
        Step::ScreenFlow,
        Step::FaceFlux,
        Step::FacePoreVelocity,
        Step::FaceGradient,
        Step::ShearProxy,
        Step::CakeThickness,
        Step::CakeCoverage,
        Step::Skin,
        Step::CakePressure,
        Step::FinesRemoved,
        Step::MassResidual,
        Step::EnergyResidual,
        Step::NewtonIterations,
    ];

    /// Every series: the scalars, then power and work of each zone (the CSV column order).
    pub fn all() -> Vec<Step> {
        let mut v = Step::SCALARS.to_vec();
        for z in Zone::ALL {
            v.push(Step::Power(z));
            v.push(Step::Work(z));
        }
        v
    }

    /// Its schema entry; `name` is the path below `/series`.
    pub fn entry(self) -> Entry {
        use Place::{Model, Wall, Well};
        let s = |n: &str, u, d: &str, c, p| entry(n.to_owned(), u, d.to_owned(), c, p);
        match self {
            Step::Time => s(
                "time",
                Unit::S,
                "time at the end of the step",
                "accepted step ends",
                Model,
            ),
            Step::WellHead => s(
                "well_head",
                Unit::M,
                "in-well head relative to the static level",
                "solved well node",
                Well,
            ),
            Step::ScreenOuterHead => s(
                "screen_outer_head",
                Unit::M,
                "head on the pack side of the screen",
                "well head − head loss across the screen",
                Place::Zone(Zone::Screen),
            ),
            Step::ScreenFlow => s(
                "screen_flow",
                Unit::M3PerS,
                "flow through the screen, positive outward",
                "screen face law at the step's heads",
                Place::Zone(Zone::Screen),
            ),
            Step::FaceFlux => s(
                "face_flux",
                Unit::MPerS,
                "Darcy flux at the borehole wall r_b, positive outward",
                "q_b = Q_b / (2π r_b b), docs/physics.md §6",
                Wall,
            ),
            Step::FacePoreVelocity => s(
                "face_pore_velocity",
                Unit::MPerS,
                "pore velocity at the borehole wall (flux / pack porosity)",
                "v_b = q_b / n_pack",
                Wall,
            ),
            Step::FaceGradient => s(
                "face_gradient",
                Unit::One,
                "head gradient -dh/dr on the formation side of the wall",
                "i_b = q_b/K + β q_b·abs(q_b) with the formation-side K, β",
                Wall,
            ),
            Step::ShearProxy => s(
                "shear_proxy",
                Unit::Pa,
                "pore-scale shear proxy rho g i R_h on the pack side of the wall",
                "τ = ρ g abs(i_p) R_h, pack K, β and hydraulic radius, docs/physics.md §7",
                Wall,
            ),
            Step::CakeThickness => s(
                "cake_thickness",
                Unit::M,
                "wall-cake thickness",
                "slow state after the step's erosion",
                Place::Zone(Zone::Cake),
            ),
            Step::CakeCoverage => s(
                "cake_coverage",
                Unit::One,
                "fraction of the wall covered by cake",
                "slow state after the step's erosion",
                Place::Zone(Zone::Cake),
            ),
            Step::Skin => s(
                "skin",
                Unit::One,
                "total skin referred to the formation (Hawkins)",
                "Hawkins skin of pack, cake and invaded zone",
                Model,
            ),
            Step::CakePressure => s(
                "cake_pressure",
                Unit::Pa,
                "inward pressure difference across the wall cake (0 for outward flow)",
                "ρ g × head drop across the cake face while flow goes inward, docs/physics.md §13a",
                Place::Zone(Zone::Cake),
            ),
            Step::FinesRemoved => s(
                "fines_removed",
                Unit::Kg,
                "mud fines carried from the invaded zone across the wall so far",
                "fines transport in the invaded zone, docs/physics.md §13b",
                Place::Zone(Zone::Invaded),
            ),
            Step::MassResidual => s(
                "mass_residual",
                Unit::One,
                "relative volume-balance residual of the step",
                "step volume balance, docs/numerics.md",
                Model,
            ),
            Step::EnergyResidual => s(
                "energy_residual",
                Unit::One,
                "relative energy-balance residual of the step",
                "step energy balance, docs/numerics.md",
                Model,
            ),
            Step::NewtonIterations => s(
                "newton_iterations",
                Unit::One,
                "Newton iterations of the step",
                "count",
                Model,
            ),
            Step::Power(z) => entry(
                format!("power/{}", z.name()),
                Unit::W,
                format!("power dissipated in the {}", z.name()),
                "P = ρ g Σ Q·Δh over the zone's segments",
                Place::Zone(z),
            ),
            Step::Work(z) => entry(
                format!("work/{}", z.name()),
                Unit::J,
                format!("cumulative work dissipated in the {}", z.name()),
                "time integral of the zone's power",
                Place::Zone(z),
            ),
        }
    }

    /// The CSV column name (the HDF5 path with `_` for `/`).
    pub fn csv_name(self) -> String {
        self.entry().name.replace('/', "_")
    }

    /// The value of this quantity in a step.
    pub fn value(self, s: &StepView<'_>) -> f64 {
        match self {
            Step::Time => s.time_s,
            Step::WellHead => s.well_head_m,
            Step::ScreenOuterHead => s.screen_outer_head_m,
            Step::ScreenFlow => s.screen_flow_m3_s,
            Step::FaceFlux => s.face_flux_m_s,
            Step::FacePoreVelocity => s.face_pore_velocity_m_s,
            Step::FaceGradient => s.face_gradient,
            Step::ShearProxy => s.shear_proxy_pa,
            Step::CakeThickness => s.cake_thickness_m,
            Step::CakeCoverage => s.cake_coverage,
            Step::Skin => s.skin,
            Step::CakePressure => s.cake_pressure_pa,
            Step::FinesRemoved => s.fines_removed_kg,
            Step::MassResidual => s.mass_residual,
            Step::EnergyResidual => s.energy_residual,
            Step::NewtonIterations => s.newton_iterations as f64,
            Step::Power(z) => s.power_w[z as usize],
            Step::Work(z) => s.work_j[z as usize],
        }
    }
}

/// A per-cycle value (`/cycles/<name>`; the cycle number `index` is written beside them).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Cycle {
    /// Cycle start.
    StartTime,
    /// Cycle end.
    EndTime,
    /// Largest outward face flux.
    PeakOutwardFlux,
    /// Largest inward face flux.
    PeakInwardFlux,
    /// RMS face flux.
    RmsFaceFlux,
    /// Largest shear proxy.
    PeakShear,
    /// Cake removed.
    CakeRemoved,
    /// Work dissipated in a zone during the cycle.
    Work(Zone),
}

/// The cycle number dataset, `/cycles/<CYCLE_INDEX>`: counts from 0 (the report shows it
/// from 1).
pub const CYCLE_INDEX: &str = "index";

impl Cycle {
    /// Every per-cycle value, in file order.
    pub fn all() -> Vec<Cycle> {
        let mut v = vec![
            Cycle::StartTime,
            Cycle::EndTime,
            Cycle::PeakOutwardFlux,
            Cycle::PeakInwardFlux,
            Cycle::RmsFaceFlux,
            Cycle::PeakShear,
            Cycle::CakeRemoved,
        ];
        v.extend(Zone::ALL.map(Cycle::Work));
        v
    }

    /// Its schema entry; `name` is the path below `/cycles`.
    pub fn entry(self) -> Entry {
        let s = |n: &str, u, d: &str, c, p| entry(n.to_owned(), u, d.to_owned(), c, p);
        match self {
            Cycle::StartTime => s(
                "start_time",
                Unit::S,
                "start of the cycle",
                "drive period boundaries",
                Place::Model,
            ),
            Cycle::EndTime => s(
                "end_time",
                Unit::S,
                "end of the cycle",
                "drive period boundaries",
                Place::Model,
            ),
            Cycle::PeakOutwardFlux => s(
                "peak_outward_flux",
                Unit::MPerS,
                "largest outward face flux in the cycle",
                "maximum over the cycle's steps",
                Place::Wall,
            ),
            Cycle::PeakInwardFlux => s(
                "peak_inward_flux",
                Unit::MPerS,
                "largest inward face flux in the cycle (magnitude)",
                "maximum over the cycle's steps",
                Place::Wall,
            ),
            Cycle::RmsFaceFlux => s(
                "rms_face_flux",
                Unit::MPerS,
                "root-mean-square face flux over the cycle",
                "sqrt(Σ q² Δt / cycle length)",
                Place::Wall,
            ),
            Cycle::PeakShear => s(
                "peak_shear",
                Unit::Pa,
                "largest shear proxy in the cycle",
                "maximum over the cycle's steps",
                Place::Wall,
            ),
            Cycle::CakeRemoved => s(
                "cake_removed",
                Unit::M,
                "cake thickness removed in the cycle",
                "thickness at the cycle's start − at its end",
                Place::Zone(Zone::Cake),
            ),
            Cycle::Work(z) => entry(
                format!("work_{}", z.name()),
                Unit::J,
                format!("work dissipated in the {} during the cycle", z.name()),
                "difference of the cumulative work",
                Place::Zone(z),
            ),
        }
    }

    /// The value of this quantity in a cycle.
    pub fn value(self, c: &CycleView) -> f64 {
        match self {
            Cycle::StartTime => c.start_s,
            Cycle::EndTime => c.end_s,
            Cycle::PeakOutwardFlux => c.peak_outward_flux_m_s,
            Cycle::PeakInwardFlux => c.peak_inward_flux_m_s,
            Cycle::RmsFaceFlux => c.rms_face_flux_m_s,
            Cycle::PeakShear => c.peak_shear_pa,
            Cycle::CakeRemoved => c.cake_removed_m,
            Cycle::Work(z) => c.work_j[z as usize],
        }
    }
}

/// Defines [`Figure`] from one list: variant, `/summary` name, unit, description, how
/// computed, place. The names are those of the headline's fields (a test checks it).
macro_rules! figures {
    ($($variant:ident => $name:literal, $unit:ident, $desc:literal, $how:literal, $place:expr;)*) => {
        /// A headline figure of a run: a `/summary` attribute and a sweep-table column.
        #[derive(Debug, Clone, Copy, PartialEq, Eq)]
        pub enum Figure {
            $(
                #[doc = $desc]
                $variant,
            )*
            /// Work dissipated in a zone over the run, `work_<zone>_j`.
            Work(Zone),
        }

        impl Figure {
            const SCALARS: &'static [Figure] = &[$(Figure::$variant),*];

            /// Its schema entry; `name` is the `/summary` attribute.
            pub fn entry(self) -> Entry {
                match self {
                    $(Figure::$variant => entry(
                        $name.to_owned(),
                        Unit::$unit,
                        $desc.to_owned(),
                        $how,
                        $place,
                    ),)*
                    Figure::Work(z) => entry(
                        format!("work_{}_j", z.name()),
                        Unit::J,
                        format!("work dissipated in the {} over the run", z.name()),
                        "cumulative work at the end of the run",
                        Place::Zone(z),
                    ),
                }
            }
        }
    };
}

figures! {
    Steps => "steps", One, "accepted time steps", "count", Place::Model;
    Cycles => "cycles", One, "complete drive cycles", "count", Place::Model;
    SkippedCycles => "skipped_cycles", One, "drive cycles jumped over, not computed (numerics.multiscale; /jumps lists them)", "count", Place::Model;
    Cells => "cells", One, "grid cells", "count", Place::Model;
    OuterRadius => "outer_radius_m", M, "outer radius of the model", "grid", Place::Model;
    EndTime => "end_time_s", S, "simulated time", "last step end", Place::Model;
    PeakOutwardFlux => "peak_outward_flux_m_s", MPerS, "largest outward Darcy flux at the wall", "maximum over the steps", Place::Wall;
    PeakInwardFlux => "peak_inward_flux_m_s", MPerS, "largest inward Darcy flux at the wall (magnitude)", "maximum over the steps", Place::Wall;
    PeakOutwardPoreVelocity => "peak_outward_pore_velocity_m_s", MPerS, "largest outward pore velocity at the wall", "peak flux / pack porosity", Place::Wall;
    PeakInwardPoreVelocity => "peak_inward_pore_velocity_m_s", MPerS, "largest inward pore velocity at the wall (magnitude)", "peak flux / pack porosity", Place::Wall;
    RmsFaceFlux => "rms_face_flux_m_s", MPerS, "root-mean-square face flux over the run", "sqrt(Σ q² Δt / run time)", Place::Wall;
    PeakScreenFlow => "peak_screen_flow_m3_s", M3PerS, "largest flow through the screen (magnitude)", "maximum over the steps", Place::Zone(Zone::Screen);
    PeakShear => "peak_shear_pa", Pa, "largest shear proxy at the wall", "maximum over the steps", Place::Wall;
    CakeThicknessStart => "cake_thickness_start_m", M, "cake thickness at the start", "case", Place::Zone(Zone::Cake);
    CakeThicknessEnd => "cake_thickness_end_m", M, "cake thickness at the end", "slow state at the end", Place::Zone(Zone::Cake);
    TimeToHalfCake => "time_to_half_cake_s", S, "time until half the cake was gone (absent: not reached)", "first step at or below half", Place::Zone(Zone::Cake);
    TimeTo90pctCake => "time_to_90pct_cake_s", S, "time until 90 % of the cake was gone (absent: not reached)", "first step at or below a tenth", Place::Zone(Zone::Cake);
    CyclesToHalfCake => "cycles_to_half_cake", One, "drive cycles until half the cake was gone (periodic drives)", "time / period", Place::Zone(Zone::Cake);
    CyclesTo90pctCake => "cycles_to_90pct_cake", One, "drive cycles until 90 % of the cake was gone (periodic drives)", "time / period", Place::Zone(Zone::Cake);
    CakeRemovalTime => "cake_removal_time_s", S, "time until the cake's skin was down to a tenth of its start (absent: not reached)", "first step at or below a tenth, lift-off and erosion, docs/physics.md §13a", Place::Zone(Zone::Cake);
    PeakCakePressure => "peak_cake_pressure_pa", Pa, "largest inward pressure difference across the cake", "maximum over the steps, docs/physics.md §13a", Place::Zone(Zone::Cake);
    SkinPack => "skin_pack", One, "skin of the pack (it does not change)", "Hawkins skin, docs/physics.md §2", Place::Zone(Zone::Pack);
    SkinCakeStart => "skin_cake_start", One, "skin of the cake at the start", "docs/physics.md §2.3, §13a", Place::Zone(Zone::Cake);
    SkinCakeEnd => "skin_cake_end", One, "skin of the cake at the end", "docs/physics.md §2.3, §13a", Place::Zone(Zone::Cake);
    SkinInvadedStart => "skin_invaded_start", One, "skin of the invaded zone at the start", "Hawkins skin, ring by ring, docs/physics.md §13b", Place::Zone(Zone::Invaded);
    SkinInvadedEnd => "skin_invaded_end", One, "skin of the invaded zone at the end", "Hawkins skin, ring by ring, docs/physics.md §13b", Place::Zone(Zone::Invaded);
    FinesInitial => "fines_initial_kg", Kg, "mud fines in the invaded zone at the start", "deposit × zone volume × grain density", Place::Zone(Zone::Invaded);
    FinesRemoved => "fines_removed_kg", Kg, "mud fines carried across the wall toward the well (what shows as turbidity)", "fines transport, docs/physics.md §13b", Place::Zone(Zone::Invaded);
    FinesPushedOut => "fines_pushed_out_kg", Kg, "mud fines pushed beyond the invaded zone into the formation", "fines transport, docs/physics.md §13b", Place::Zone(Zone::Invaded);
    PackFormationRatio => "pack_formation_ratio", One, "D50 of the pack over D50 of the formation (absent: not known)", "docs/physics.md §9c", Place::Zone(Zone::Pack);
    SlotPackRatio => "slot_pack_ratio", One, "slot width over the pack D10 (or D50) (absent: not known)", "docs/physics.md §9c", Place::Zone(Zone::Screen);
    GrainCriticalVelocity => "grain_critical_velocity_m_s", MPerS, "critical interstitial velocity for a formation D50 grain at the wall (absent: no formation D50)", "settling velocity, docs/physics.md §9e", Place::Wall;
    PeakWallInterstitialVelocity => "peak_wall_interstitial_velocity_m_s", MPerS, "largest inward interstitial velocity on the formation side of the wall", "maximum over the steps, docs/physics.md §9e", Place::Wall;
    SkinStart => "skin_start", One, "total skin at the start", "Hawkins skin, docs/physics.md §2", Place::Model;
    SkinEnd => "skin_end", One, "total skin at the end", "Hawkins skin, docs/physics.md §2", Place::Model;
    EfficiencyStart => "efficiency_start", One, "well efficiency at the start, as a fraction (see efficiency_definition; absent: virtual tests failed)", "undamaged drawdown / drawdown of the virtual constant-rate test, docs/physics.md §25", Place::Model;
    EfficiencyEnd => "efficiency_end", One, "well efficiency at the end, as a fraction (absent: virtual tests failed)", "undamaged drawdown / drawdown of the virtual constant-rate test, docs/physics.md §25", Place::Model;
    SpecificCapacityStart => "specific_capacity_start_m2_s", M2PerS, "specific capacity at the start (absent: virtual tests failed)", "design rate / drawdown of the virtual constant-rate test, docs/physics.md §25", Place::Model;
    SpecificCapacityEnd => "specific_capacity_end_m2_s", M2PerS, "specific capacity at the end (absent: virtual tests failed)", "design rate / drawdown of the virtual constant-rate test, docs/physics.md §25", Place::Model;
    DesignRate => "design_rate_m3_s", M3PerS, "design pumping rate of the virtual tests", "assessment section or default, docs/physics.md §25", Place::Well;
    TestDuration => "test_duration_s", S, "duration of the virtual constant-rate test", "assessment section or default", Place::Well;
    StepDuration => "step_duration_s", S, "duration of each step of the virtual step test", "assessment section or default", Place::Well;
    TestDrawdownStart => "test_drawdown_start_m", M, "drawdown at the end of the virtual constant-rate test, well at the start", "virtual test, docs/physics.md §25", Place::Well;
    TestDrawdownEnd => "test_drawdown_end_m", M, "drawdown at the end of the virtual constant-rate test, well at the end", "virtual test, docs/physics.md §25", Place::Well;
    TestDrawdownUndamaged => "test_drawdown_undamaged_m", M, "drawdown of the same test on the undamaged well", "virtual test without cake and invaded zone, docs/physics.md §25", Place::Well;
    StepBStart => "step_b_start_s_m2", SPerM2, "step-test B at the start (one step's duration)", "Jacob's line through the virtual step test, docs/physics.md §25.2", Place::Well;
    StepBEnd => "step_b_end_s_m2", SPerM2, "step-test B at the end", "Jacob's line through the virtual step test, docs/physics.md §25.2", Place::Well;
    StepCStart => "step_c_start_s2_m5", S2PerM5, "step-test C at the start", "Jacob's line through the virtual step test, docs/physics.md §25.2", Place::Well;
    StepCEnd => "step_c_end_s2_m5", S2PerM5, "step-test C at the end", "Jacob's line through the virtual step test, docs/physics.md §25.2", Place::Well;
    NonlinearShareStart => "nonlinear_share_start", One, "nonlinear share C Q/(B + C Q) at the design rate, start", "from B and C", Place::Well;
    NonlinearShareEnd => "nonlinear_share_end", One, "nonlinear share at the design rate, end", "from B and C", Place::Well;
    PeakSlotVelocity => "peak_slot_velocity_m_s", MPerS, "largest screen entrance (slot) velocity", "peak screen flow / open area", Place::Zone(Zone::Screen);
    PeakGrainReynolds => "peak_grain_reynolds", One, "largest grain Reynolds number at the wall, pack side (absent without pack d50)", "ρ |q| d50 / μ", Place::Zone(Zone::Pack);
    PipingRatio => "piping_ratio", One, "largest formation-side wall gradient over the critical gradient", "peak gradient / Terzaghi's critical gradient", Place::Wall;
    PeakCollapsePressure => "peak_collapse_pressure_pa", Pa, "largest collapse load: the larger of the differential across the screen and the in-well drawdown", "maximum over the steps", Place::Zone(Zone::Screen);
    PeakScreenDifferential => "peak_screen_differential_pa", Pa, "largest inward differential across the screen", "ρ g (pack-side head − well head)", Place::Zone(Zone::Screen);
    PeakInWellDrawdown => "peak_in_well_drawdown_m", M, "largest in-well drawdown below the static level", "maximum of −well head", Place::Well;
    PeakBurstPressure => "peak_burst_pressure_pa", Pa, "largest outward differential across the screen", "ρ g (well head − pack-side head)", Place::Zone(Zone::Screen);
    CollapseRating => "collapse_rating_pa", Pa, "collapse rating of the blank casing (absent: not given)", "maker's rating, or lower of elastic and yield limits", Place::Well;
    ScreenCollapseRating => "screen_collapse_rating_pa", Pa, "collapse rating of the screen (absent: not given)", "maker's rating or explicit derating", Place::Zone(Zone::Screen);
    CollapseMargin => "collapse_margin", One, "lower of the screen and casing margins; below 1 is a warning", "rating / (safety factor × peak load)", Place::Well;
    ScreenCollapseMargin => "screen_collapse_margin", One, "screen collapse margin", "rating / (safety factor × peak load)", Place::Zone(Zone::Screen);
    CasingCollapseMargin => "casing_collapse_margin", One, "casing collapse margin", "rating / (safety factor × peak drawdown pressure)", Place::Well;
    ColumnPartings => "column_partings", One, "times the water column under a sealed tool parted at the vapour bound", "count", Place::Well;
    PartedTime => "parted_time_s", S, "time the column spent parted", "sum over the steps", Place::Well;
    MaxMassResidual => "max_mass_residual", One, "largest per-step volume residual", "maximum over the steps", Place::Model;
    EnergyClosure => "energy_closure", One, "energy identity over the run, relative", "docs/numerics.md, balances", Place::Model;
    MaxNewtonIterations => "max_newton_iterations", One, "most Newton iterations in one step", "maximum over the steps", Place::Model;
}

impl Figure {
    /// Every figure in `/summary` and sweep-table order: the scalars, with each zone's work
    /// after the shear.
    pub fn all() -> Vec<Figure> {
        let mut v = Vec::with_capacity(Self::SCALARS.len() + ZONE_COUNT);
        for &f in Self::SCALARS {
            v.push(f);
            if f == Figure::PeakShear {
                v.extend(Zone::ALL.map(Figure::Work));
            }
        }
        v
    }

    /// The `/summary` attribute name.
    pub fn name(self) -> String {
        self.entry().name
    }

    /// The figure of a `/summary` attribute or sweep column name.
    pub fn from_name(name: &str) -> Option<Figure> {
        Self::all().into_iter().find(|f| f.entry().name == name)
    }
}

/// Every figure of a run's headline, in [`Figure::all`] order; `None` where the figure was
/// not computed (no rating, cake never halved, …).
pub fn figure_values(h: &Headline) -> Vec<(Figure, Option<f64>)> {
    let json = serde_json::to_value(h).unwrap_or(Value::Null);
    Figure::all()
        .into_iter()
        .map(|f| {
            let v = match f {
                Figure::Work(z) => h
                    .zones
                    .iter()
                    .position(|n| *n == z.name())
                    .map(|k| h.work_j[k]),
                _ => json.get(f.name()).and_then(Value::as_f64),
            };
            (f, v)
        })
        .collect()
}

/// Text attributes of `/summary`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SummaryText {
    /// The run's warnings, one per line.
    Warnings,
    /// The standing cautions.
    Cautions,
    /// The definition of the efficiency figures.
    EfficiencyDefinition,
    /// The model's assumptions (damage constants with range and provenance).
    Assumptions,
}

impl SummaryText {
    /// All, in file order.
    pub const ALL: [SummaryText; 4] = [
        SummaryText::Warnings,
        SummaryText::Cautions,
        SummaryText::EfficiencyDefinition,
        SummaryText::Assumptions,
    ];

    /// The attribute name.
    pub const fn name(self) -> &'static str {
        match self {
            SummaryText::Warnings => "warnings",
            SummaryText::Cautions => "cautions",
            SummaryText::EfficiencyDefinition => "efficiency_definition",
            SummaryText::Assumptions => "assumptions",
        }
    }

    /// What it holds.
    pub const fn description(self) -> &'static str {
        match self {
            SummaryText::Warnings => "the run's warnings, one per line",
            SummaryText::Cautions => "the standing safety cautions",
            SummaryText::EfficiencyDefinition => "how the efficiency figures are defined",
            SummaryText::Assumptions => {
                "the model's assumptions, one per line: each damage-removal constant with its \
                 documented range and provenance (empty without damage-removal laws)"
            }
        }
    }

    /// The text attribute of this name.
    pub fn from_name(name: &str) -> Option<SummaryText> {
        Self::ALL.into_iter().find(|t| t.name() == name)
    }
}

/// A series of the development-progress group (`/progress/<name>`): the well's virtual
/// constant-rate test estimated at times during the run (docs/physics.md §25.3).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ProgressSeries {
    /// Time of the estimate.
    Time,
    /// Specific capacity of the well as it stands.
    SpecificCapacity,
    /// Efficiency against the undamaged well.
    Efficiency,
}

impl ProgressSeries {
    /// All, in file order.
    pub const ALL: [ProgressSeries; 3] = [
        ProgressSeries::Time,
        ProgressSeries::SpecificCapacity,
        ProgressSeries::Efficiency,
    ];

    /// The group the series live in.
    pub const GROUP: &'static str = "progress";

    /// Its schema entry; `name` is the path below `/progress`.
    pub fn entry(self) -> Entry {
        let s = |n: &str, u, d: &str, c| entry(n.to_owned(), u, d.to_owned(), c, Place::Model);
        match self {
            ProgressSeries::Time => s(
                "time",
                Unit::S,
                "time of the estimate",
                "evenly spaced over the run",
            ),
            ProgressSeries::SpecificCapacity => s(
                "specific_capacity",
                Unit::M2PerS,
                "specific capacity of the virtual constant-rate test for the well as it stands",
                "undamaged test drawdown + near-well steady losses, docs/physics.md §25.3",
            ),
            ProgressSeries::Efficiency => s(
                "efficiency",
                Unit::One,
                "efficiency s0/s of the same estimate against the undamaged well",
                "undamaged drawdown / estimated drawdown",
            ),
        }
    }

    /// The HDF5 path, `/progress/<name>`.
    pub fn path(self) -> String {
        format!("/{}/{}", Self::GROUP, self.entry().name)
    }
}

/// A series of the jumps group (`/jumps/<name>`, one value per jump over whole cycles,
/// `numerics.multiscale = "auto"`; docs/time-stepping.md §Multiscale stepping). The cycles
/// a jump skips have no `/cycles` record and no step: the state at `to_time` is
/// extrapolated from the last computed cycles.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum JumpSeries {
    /// Start of the jump.
    FromTime,
    /// End of the jump.
    ToTime,
    /// First cycle skipped.
    FirstCycle,
    /// Cycles skipped.
    Cycles,
    /// Estimated extrapolation error over the tolerance.
    ErrorEstimate,
}

impl JumpSeries {
    /// All, in file order.
    pub const ALL: [JumpSeries; 5] = [
        JumpSeries::FromTime,
        JumpSeries::ToTime,
        JumpSeries::FirstCycle,
        JumpSeries::Cycles,
        JumpSeries::ErrorEstimate,
    ];

    /// The group the series live in.
    pub const GROUP: &'static str = "jumps";

    /// Its schema entry; `name` is the path below `/jumps`.
    pub fn entry(self) -> Entry {
        let s = |n: &str, u, d: &str, c| entry(n.to_owned(), u, d.to_owned(), c, Place::Model);
        match self {
            JumpSeries::FromTime => s(
                "from_time",
                Unit::S,
                "start of the jump: end of the last computed cycle",
                "a drive period boundary",
            ),
            JumpSeries::ToTime => s(
                "to_time",
                Unit::S,
                "end of the jump; nothing between from_time and to_time was computed",
                "from_time + cycles x period",
            ),
            JumpSeries::FirstCycle => s(
                "first_cycle",
                Unit::One,
                "number of the first cycle skipped, from 0 (no /cycles record for it)",
                "count",
            ),
            JumpSeries::Cycles => s(
                "cycles",
                Unit::One,
                "cycles skipped",
                "largest K within the error and move bounds, docs/time-stepping.md",
            ),
            JumpSeries::ErrorEstimate => s(
                "error_estimate",
                Unit::One,
                "estimated extrapolation error of the jump over the tolerance (at most 1)",
                "K(K+1)/2 x change of the per-cycle change / (tolerance x scale)",
            ),
        }
    }

    /// The value of this series for a jump.
    pub fn value(self, j: &JumpView) -> f64 {
        match self {
            JumpSeries::FromTime => j.from_s,
            JumpSeries::ToTime => j.to_s,
            JumpSeries::FirstCycle => j.first_cycle as f64,
            JumpSeries::Cycles => j.cycles as f64,
            JumpSeries::ErrorEstimate => j.error_estimate,
        }
    }

    /// The HDF5 path, `/jumps/<name>`.
    pub fn path(self) -> String {
        format!("/{}/{}", Self::GROUP, self.entry().name)
    }
}

/// The schema as the Markdown tables of docs/formats.md ("Output schema"), which
/// `boreflux schema --outputs` prints and a test compares with the docs.
pub fn markdown() -> String {
    let mut out = String::new();
    let table = |out: &mut String, title: &str, prefix: &str, rows: Vec<Entry>| {
        out.push_str(&format!(
            "{title}\n\n| name | unit | description | how computed | where |\n| --- | --- | --- | --- | --- |\n"
        ));
        for e in rows {
            out.push_str(&format!(
                "| `{prefix}{}` | {} | {} | {} | {} |\n",
                e.name,
                e.unit.symbol(),
                e.description,
                e.computed,
                e.place.text()
            ));
        }
        out.push('\n');
    };
    table(
        &mut out,
        "Per step (`/series/<name>`; CSV column `<name>` with `/` as `_`):",
        "",
        Step::all().into_iter().map(Step::entry).collect(),
    );
    let mut cycles = vec![entry(
        CYCLE_INDEX.to_owned(),
        Unit::One,
        "cycle number, from 0".to_owned(),
        "count",
        Place::Model,
    )];
    cycles.extend(Cycle::all().into_iter().map(Cycle::entry));
    table(&mut out, "Per cycle (`/cycles/<name>`):", "", cycles);
    table(
        &mut out,
        "Per run (`/summary` attributes and sweep-table columns; absent when not computed, \
         an empty cell or NaN in a sweep table):",
        "",
        Figure::all().into_iter().map(Figure::entry).collect(),
    );
    table(
        &mut out,
        "Development progress (`/progress/<name>`; absent when the virtual tests failed):",
        "",
        ProgressSeries::ALL
            .into_iter()
            .map(ProgressSeries::entry)
            .collect(),
    );
    table(
        &mut out,
        "Jumps over whole cycles (`/jumps/<name>`; only with `numerics.multiscale` \"auto\", \
         empty when no jump was taken):",
        "",
        JumpSeries::ALL.into_iter().map(JumpSeries::entry).collect(),
    );
    out.push_str("Text attributes of `/summary`:\n\n| name | description |\n| --- | --- |\n");
    for t in SummaryText::ALL {
        out.push_str(&format!("| `{}` | {} |\n", t.name(), t.description()));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::collections::BTreeSet;

    fn unique(names: impl Iterator<Item = String>) -> bool {
        let v: Vec<String> = names.collect();
        v.iter().collect::<BTreeSet<_>>().len() == v.len()
    }

    #[test]
    fn names_are_unique_within_each_group() {
        assert!(unique(Step::all().into_iter().map(|s| s.entry().name)));
        assert!(unique(Step::all().into_iter().map(Step::csv_name)));
        assert!(unique(
            Cycle::all()
                .into_iter()
                .map(|c| c.entry().name)
                .chain([CYCLE_INDEX.to_owned()])
        ));
        assert!(unique(Figure::all().into_iter().map(Figure::name)));
    }

    #[test]
    fn every_zone_has_its_own_outputs() {
        for z in Zone::ALL {
            assert!(Step::all().contains(&Step::Power(z)));
            assert!(Step::all().contains(&Step::Work(z)));
            assert!(Cycle::all().contains(&Cycle::Work(z)));
            assert!(Figure::all().contains(&Figure::Work(z)));
            assert_eq!(
                Figure::from_name(&format!("work_{}_j", z.name())),
                Some(Figure::Work(z))
            );
        }
    }

    /// The headline of the shipped demo case, run in full.
    fn demo_headline() -> Headline {
        let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
        let case = crate::case::load_case(&dir.join("municipal-sand-gravel.json")).unwrap();
        let mut tracker = crate::summary::Tracker::new(&case.model);
        let summary = boreflux_solver::run::run(
            &case.model,
            &mut tracker,
            boreflux_solver::run::Reporting {
                every: case.output_every,
            },
        )
        .unwrap();
        let a = crate::summary::assessment(&case, None, &summary);
        crate::summary::headline(&case, &summary, &tracker, &a)
    }

    #[test]
    fn every_numeric_headline_field_is_a_figure_and_back() {
        // A figure added to the headline without a schema entry (or the reverse) fails here,
        // instead of being dropped from /summary and the sweep table.
        let h = demo_headline();
        let json = serde_json::to_value(&h).unwrap();
        let numeric: BTreeSet<String> = json
            .as_object()
            .unwrap()
            .iter()
            .filter(|(k, v)| (v.is_number() || v.is_null()) && k.as_str() != "work_j")
            .map(|(k, _)| k.clone())
            .collect();
        let scalars: BTreeSet<String> = Figure::all()
            .into_iter()
            .filter(|f| !matches!(f, Figure::Work(_)))
            .map(Figure::name)
            .collect();
        assert_eq!(numeric, scalars);
        let values = figure_values(&h);
        for (k, z) in Zone::ALL.into_iter().enumerate() {
            let w = values
                .iter()
                .find(|(f, _)| *f == Figure::Work(z))
                .unwrap()
                .1;
            assert_eq!(w, Some(h.work_j[k]), "{}", z.name());
        }
        let steps = values.iter().find(|(f, _)| *f == Figure::Steps).unwrap().1;
        assert_eq!(steps, Some(h.steps as f64));
    }

    #[test]
    fn docs_formats_lists_exactly_the_schema() {
        let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/formats.md");
        let text = std::fs::read_to_string(path).unwrap();
        let (_, rest) = text.split_once("<!-- output-schema:start -->\n").unwrap();
        let (listed, _) = rest.split_once("<!-- output-schema:end -->").unwrap();
        assert_eq!(
            listed,
            markdown(),
            "docs/formats.md is out of step with the output schema: paste the output of \
             `boreflux schema --outputs` between its markers"
        );
    }

    #[test]
    fn from_name_inverts_name() {
        for f in Figure::all() {
            assert_eq!(Figure::from_name(&f.name()), Some(f));
        }
        assert_eq!(Figure::from_name("no_such_figure"), None);
        for t in SummaryText::ALL {
            assert_eq!(SummaryText::from_name(t.name()), Some(t));
        }
    }
}
