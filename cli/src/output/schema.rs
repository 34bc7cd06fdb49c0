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

mod documents;
mod file;

pub use documents::{check_json, estimate, steptest_json, JsonKey, Shape};
pub use file::{GridData, Group, RootAttr, SnapshotData};

use crate::summary::Headline;
use boreflux_solver::assess::figures::RunFigures;
use boreflux_solver::assess::{StepCoefficients, WellFigures};
use boreflux_solver::grid::{Zone, ZONE_COUNT};
use boreflux_solver::{CycleView, EventKind, JumpView, StepValues};

/// SI unit of an output, as written in the `units` attribute and the docs.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Unit {
    /// Metre.
    M,
    /// Second.
    S,
    /// Metre per second: a velocity (pore, interstitial, slot, settling velocity).
    MPerS,
    /// A volume flux (Darcy flux, discharge per unit area), m³/(m²·s): written `m/s` like a
    /// velocity, but a different quantity (the report shows it in a loading-rate unit).
    VolumeFlux,
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
    /// Dimensionless ratio.
    One,
    /// A count (steps, cycles, cells, iterations, partings): a whole number, written `1`.
    Count,
    /// The unit of the series it summarises (the envelopes).
    OfSeries,
}

impl Unit {
    /// The unit as written in files (`m3/s`, `1` for dimensionless).
    pub const fn symbol(self) -> &'static str {
        match self {
            Unit::M => "m",
            Unit::S => "s",
            Unit::MPerS | Unit::VolumeFlux => "m/s",
            Unit::M2PerS => "m2/s",
            Unit::M3PerS => "m3/s",
            Unit::Pa => "Pa",
            Unit::W => "W",
            Unit::J => "J",
            Unit::Kg => "kg",
            Unit::SPerM2 => "s/m2",
            Unit::S2PerM5 => "s2/m5",
            Unit::One | Unit::Count => "1",
            Unit::OfSeries => "of the series",
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
                Unit::VolumeFlux,
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
                Unit::Count,
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
    pub fn value(self, s: &StepValues) -> f64 {
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
                Unit::VolumeFlux,
                "largest outward face flux in the cycle",
                "maximum over the cycle's steps",
                Place::Wall,
            ),
            Cycle::PeakInwardFlux => s(
                "peak_inward_flux",
                Unit::VolumeFlux,
                "largest inward face flux in the cycle (magnitude)",
                "maximum over the cycle's steps",
                Place::Wall,
            ),
            Cycle::RmsFaceFlux => s(
                "rms_face_flux",
                Unit::VolumeFlux,
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
    Steps => "steps", Count, "accepted time steps", "count", Place::Model;
    Cycles => "cycles", Count, "complete drive cycles", "count", Place::Model;
    SkippedCycles => "skipped_cycles", Count, "drive cycles jumped over, not computed (numerics.multiscale; /jumps lists them)", "count", Place::Model;
    Cells => "cells", Count, "grid cells", "count", Place::Model;
    OuterRadius => "outer_radius_m", M, "outer radius of the model", "grid", Place::Model;
    EndTime => "end_time_s", S, "simulated time", "last step end", Place::Model;
    PeakOutwardFlux => "peak_outward_flux_m_s", VolumeFlux, "largest outward Darcy flux at the wall", "maximum over the steps", Place::Wall;
    PeakInwardFlux => "peak_inward_flux_m_s", VolumeFlux, "largest inward Darcy flux at the wall (magnitude)", "maximum over the steps", Place::Wall;
    PeakOutwardPoreVelocity => "peak_outward_pore_velocity_m_s", MPerS, "largest outward pore velocity at the wall", "peak flux / pack porosity", Place::Wall;
    PeakInwardPoreVelocity => "peak_inward_pore_velocity_m_s", MPerS, "largest inward pore velocity at the wall (magnitude)", "peak flux / pack porosity", Place::Wall;
    RmsFaceFlux => "rms_face_flux_m_s", VolumeFlux, "root-mean-square face flux over the run", "sqrt(Σ q² Δt / run time)", Place::Wall;
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
    CollapseMargin => "collapse_margin", One, "lower of the screen and casing margins, absent unless both are rated (an unrated screen may govern); below 1 is a warning", "rating / (safety factor × peak load)", Place::Well;
    ScreenCollapseMargin => "screen_collapse_margin", One, "screen collapse margin", "rating / (safety factor × peak load)", Place::Zone(Zone::Screen);
    CasingCollapseMargin => "casing_collapse_margin", One, "casing collapse margin", "rating / (safety factor × peak drawdown pressure)", Place::Well;
    ColumnPartings => "column_partings", Count, "times the water column under a sealed tool parted at the vapour bound", "count", Place::Well;
    PartedTime => "parted_time_s", S, "time the column spent parted", "sum over the steps", Place::Well;
    MaxMassResidual => "max_mass_residual", One, "largest per-step volume residual", "maximum over the steps", Place::Model;
    EnergyClosure => "energy_closure", One, "energy identity over the run, relative", "docs/numerics.md, balances", Place::Model;
    MaxNewtonIterations => "max_newton_iterations", Count, "most Newton iterations in one step", "maximum over the steps", Place::Model;
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

/// The value of a figure: a count (an integer in `run --json`) or a real number.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Num {
    /// A count (steps, cycles, cells, partings, iterations).
    Count(u64),
    /// A real number in the figure's SI unit.
    Real(f64),
}

impl Num {
    /// The value as a number.
    pub fn as_f64(self) -> f64 {
        match self {
            Num::Count(n) => n as f64,
            Num::Real(x) => x,
        }
    }
}

impl Figure {
    /// The figure of a run, read from the solver's result types (the one place each figure
    /// is computed); `None` where it was not computed (no rating, cake never halved, virtual
    /// tests failed, …).
    pub fn value(self, r: &RunFigures) -> Option<Num> {
        use Num::{Count, Real};
        let s = &r.summary;
        let (c, sand, co) = (&r.checks, &r.sand, &r.collapse);
        let before = |g: fn(&WellFigures) -> f64| r.before().map(g).map(Real);
        let after = |g: fn(&WellFigures) -> f64| r.after().map(g).map(Real);
        let step0 = |g: fn(&StepCoefficients) -> f64| r.step_before().map(g).map(Real);
        let step1 = |g: fn(&StepCoefficients) -> f64| r.step_after().map(g).map(Real);
        match self {
            Figure::Steps => Some(Count(s.steps)),
            Figure::Cycles => Some(Count(s.cycles)),
            Figure::SkippedCycles => Some(Count(s.skipped_cycles)),
            Figure::Cells => Some(Count(s.cells as u64)),
            Figure::OuterRadius => Some(Real(s.outer_radius_m)),
            Figure::EndTime => Some(Real(s.end_time_s)),
            Figure::PeakOutwardFlux => Some(Real(s.peak_outward_flux_m_s)),
            Figure::PeakInwardFlux => Some(Real(s.peak_inward_flux_m_s)),
            Figure::PeakOutwardPoreVelocity => Some(Real(r.peak_outward_pore_velocity_m_s())),
            Figure::PeakInwardPoreVelocity => Some(Real(r.peak_inward_pore_velocity_m_s())),
            Figure::RmsFaceFlux => Some(Real(s.rms_face_flux_m_s)),
            Figure::PeakScreenFlow => Some(Real(s.peak_screen_flow_m3_s)),
            Figure::PeakShear => Some(Real(s.peak_shear_pa)),
            Figure::Work(z) => Some(Real(s.work_j[z as usize])),
            Figure::CakeThicknessStart => Some(Real(s.cake_thickness_m.0)),
            Figure::CakeThicknessEnd => Some(Real(s.cake_thickness_m.1)),
            Figure::TimeToHalfCake => r.extremes.half_cake_s.map(Real),
            Figure::TimeTo90pctCake => r.extremes.tenth_cake_s.map(Real),
            Figure::CyclesToHalfCake => r.cycles_to_half_cake().map(Real),
            Figure::CyclesTo90pctCake => r.cycles_to_90pct_cake().map(Real),
            Figure::CakeRemovalTime => s.cake_removed_at_s.map(Real),
            Figure::PeakCakePressure => Some(Real(s.peak_cake_pressure_pa)),
            Figure::SkinPack => Some(Real(s.skin_parts.0.pack)),
            Figure::SkinCakeStart => Some(Real(s.skin_parts.0.cake)),
            Figure::SkinCakeEnd => Some(Real(s.skin_parts.1.cake)),
            Figure::SkinInvadedStart => Some(Real(s.skin_parts.0.invaded)),
            Figure::SkinInvadedEnd => Some(Real(s.skin_parts.1.invaded)),
            Figure::FinesInitial => Some(Real(s.fines_initial_kg)),
            Figure::FinesRemoved => Some(Real(s.fines_removed_kg)),
            Figure::FinesPushedOut => Some(Real(s.fines_pushed_out_kg)),
            Figure::PackFormationRatio => sand.retention.pack_ratio.map(Real),
            Figure::SlotPackRatio => sand.retention.slot_ratio.map(Real),
            Figure::GrainCriticalVelocity => sand.critical_velocity_m_s.map(Real),
            Figure::PeakWallInterstitialVelocity => Some(Real(sand.wall_velocity_m_s)),
            Figure::SkinStart => Some(Real(s.skin.0)),
            Figure::SkinEnd => Some(Real(s.skin.1)),
            Figure::EfficiencyStart => before(|f| f.efficiency),
            Figure::EfficiencyEnd => after(|f| f.efficiency),
            Figure::SpecificCapacityStart => before(|f| f.specific_capacity_m2_s),
            Figure::SpecificCapacityEnd => after(|f| f.specific_capacity_m2_s),
            Figure::DesignRate => Some(Real(r.plan.design_rate_m3_s)),
            Figure::TestDuration => Some(Real(r.plan.constant_duration_s)),
            Figure::StepDuration => Some(Real(r.plan.step_duration_s)),
            Figure::TestDrawdownStart => before(|f| f.drawdown_m),
            Figure::TestDrawdownEnd => after(|f| f.drawdown_m),
            Figure::TestDrawdownUndamaged => before(|f| f.undamaged_drawdown_m),
            Figure::StepBStart => step0(|c| c.b_s_m2),
            Figure::StepBEnd => step1(|c| c.b_s_m2),
            Figure::StepCStart => step0(|c| c.c_s2_m5),
            Figure::StepCEnd => step1(|c| c.c_s2_m5),
            Figure::NonlinearShareStart => step0(|c| c.nonlinear_share),
            Figure::NonlinearShareEnd => step1(|c| c.nonlinear_share),
            Figure::PeakSlotVelocity => Some(Real(c.peak_slot_velocity_m_s)),
            Figure::PeakGrainReynolds => c.peak_grain_reynolds.map(Real),
            Figure::PipingRatio => c.piping_ratio.map(Real),
            Figure::PeakCollapsePressure => Some(Real(c.peak_collapse_pressure_pa)),
            Figure::PeakScreenDifferential => Some(Real(c.peak_screen_differential_pa)),
            Figure::PeakInWellDrawdown => Some(Real(c.peak_in_well_drawdown_m)),
            Figure::PeakBurstPressure => Some(Real(c.peak_burst_pressure_pa)),
            Figure::CollapseRating => co.casing_rating_pa.map(Real),
            Figure::ScreenCollapseRating => co.screen_rating_pa.map(Real),
            Figure::CollapseMargin => co.margin().map(Real),
            Figure::ScreenCollapseMargin => co.screen_margin.map(Real),
            Figure::CasingCollapseMargin => co.casing_margin.map(Real),
            Figure::ColumnPartings => Some(Count(s.column_partings)),
            Figure::PartedTime => Some(Real(s.parted_time_s)),
            Figure::MaxMassResidual => Some(Real(s.max_mass_residual)),
            Figure::EnergyClosure => Some(Real(s.energy_closure)),
            Figure::MaxNewtonIterations => Some(Count(s.max_newton_iterations as u64)),
        }
    }
}

/// Every figure of a run's headline, in [`Figure::all`] order; `None` where the figure was
/// not computed or is not finite (what `/summary` leaves out and a sweep table shows as NaN).
pub fn figure_values(h: &Headline) -> Vec<(Figure, Option<f64>)> {
    Figure::all().into_iter().map(|f| (f, h.get(f))).collect()
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
    /// The case's notes: defaults and approximations the model used.
    Notes,
}

impl SummaryText {
    /// All, in file order.
    pub const ALL: [SummaryText; 5] = [
        SummaryText::Warnings,
        SummaryText::Cautions,
        SummaryText::EfficiencyDefinition,
        SummaryText::Assumptions,
        SummaryText::Notes,
    ];

    /// The attribute name.
    pub const fn name(self) -> &'static str {
        match self {
            SummaryText::Warnings => "warnings",
            SummaryText::Cautions => "cautions",
            SummaryText::EfficiencyDefinition => "efficiency_definition",
            SummaryText::Assumptions => "assumptions",
            SummaryText::Notes => "notes",
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
            SummaryText::Notes => {
                "the case's notes, one per line: the defaults and approximations the model used \
                 (assumed efficiencies and depths, the 1-D jet approximation, …), as `check` \
                 prints them, and a last line on how the collapse ratings were found"
            }
        }
    }

    /// The text attribute of this name.
    pub fn from_name(name: &str) -> Option<SummaryText> {
        Self::ALL.into_iter().find(|t| t.name() == name)
    }
}

/// A key of the document `run --json` prints (the headline of one run).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RunKey {
    /// The case title.
    Title,
    /// A headline figure, named as its `/summary` attribute (`null` when not computed).
    Figure(Figure),
    /// Work dissipated per zone, an array in zone order.
    WorkArray,
    /// The zone names, in the order of the work array.
    ZoneNames,
    /// How the collapse ratings were found.
    CollapseRatingBasis,
    /// A text of `/summary` (the warnings and assumptions as arrays of lines).
    Text(SummaryText),
}

impl RunKey {
    /// The key.
    pub fn name(self) -> String {
        match self {
            RunKey::Title => "title".to_owned(),
            RunKey::Figure(f) => f.name(),
            RunKey::WorkArray => "work_j".to_owned(),
            RunKey::ZoneNames => "zones".to_owned(),
            RunKey::CollapseRatingBasis => "collapse_rating_basis".to_owned(),
            RunKey::Text(t) => t.name().to_owned(),
        }
    }

    /// Its schema entry (figures: as in `/summary`).
    pub fn entry(self) -> Entry {
        let s = |n: &str, u, d: &str, c| entry(n.to_owned(), u, d.to_owned(), c, Place::Model);
        match self {
            RunKey::Title => s("title", Unit::One, "the case title (text)", "case file"),
            RunKey::Figure(f) => f.entry(),
            RunKey::WorkArray => s(
                "work_j",
                Unit::J,
                "work dissipated in each zone over the run, an array in the order of `zones`",
                "cumulative work at the end of the run",
            ),
            RunKey::ZoneNames => s(
                "zones",
                Unit::One,
                "the zone names, an array (text)",
                "fixed",
            ),
            RunKey::CollapseRatingBasis => s(
                "collapse_rating_basis",
                Unit::One,
                "how the collapse ratings were found (text; not in `/summary`)",
                "case inputs, docs/devices.md §6",
            ),
            RunKey::Text(t) => s(
                t.name(),
                Unit::One,
                &match t {
                    SummaryText::Warnings | SummaryText::Assumptions => {
                        format!("{} (an array of lines)", t.description())
                    }
                    SummaryText::Notes => t.description().to_owned(),
                    SummaryText::Cautions | SummaryText::EfficiencyDefinition => {
                        format!("{} (text)", t.description())
                    }
                },
                "as the `/summary` attribute",
            ),
        }
    }
}

/// The keys of `run --json`, in the order printed: the figures in [`Figure::all`] order
/// with the zone work as one array, and the texts where the document has always had them.
pub fn run_json_keys() -> Vec<RunKey> {
    let mut v = vec![RunKey::Title];
    for &f in Figure::SCALARS {
        v.push(RunKey::Figure(f));
        match f {
            Figure::PeakShear => v.extend([RunKey::WorkArray, RunKey::ZoneNames]),
            Figure::NonlinearShareEnd => {
                v.push(RunKey::Text(SummaryText::EfficiencyDefinition));
            }
            Figure::ScreenCollapseRating => v.push(RunKey::CollapseRatingBasis),
            _ => {}
        }
    }
    v.extend([
        RunKey::Text(SummaryText::Warnings),
        RunKey::Text(SummaryText::Cautions),
        RunKey::Text(SummaryText::Assumptions),
    ]);
    v
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
    pub const GROUP: &'static str = Group::Progress.name();

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

/// A key series of a sweep table (`/table/series/<name>`): one row per scenario, one
/// column per point of the common grid of run fractions k/[`SweepSeries::INTERVALS`],
/// k = 0…INTERVALS, so that a sampled sweep's report can draw bands across scenarios
/// (docs/sweeps.md).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SweepSeries {
    /// The common grid: the fraction of the run, k/INTERVALS (one row).
    RunFraction,
    /// Time of the reported step each point takes its values from.
    Time,
    /// Total skin of the well as it stands.
    Skin,
    /// Specific capacity of the virtual constant-rate test.
    SpecificCapacity,
    /// Efficiency against the undamaged well.
    Efficiency,
    /// Largest outward face flux of the cycles ending in the interval.
    PeakOutwardFlux,
    /// Largest inward face flux of the cycles ending in the interval.
    PeakInwardFlux,
}

impl SweepSeries {
    /// Intervals of the common grid (points: one more).
    pub const INTERVALS: usize = 50;

    /// All, in file order.
    pub const ALL: [SweepSeries; 7] = [
        SweepSeries::RunFraction,
        SweepSeries::Time,
        SweepSeries::Skin,
        SweepSeries::SpecificCapacity,
        SweepSeries::Efficiency,
        SweepSeries::PeakOutwardFlux,
        SweepSeries::PeakInwardFlux,
    ];

    /// The series with one row per scenario (all but the grid).
    pub const PER_SCENARIO: [SweepSeries; 6] = [
        SweepSeries::Time,
        SweepSeries::Skin,
        SweepSeries::SpecificCapacity,
        SweepSeries::Efficiency,
        SweepSeries::PeakOutwardFlux,
        SweepSeries::PeakInwardFlux,
    ];

    /// The group the series live in.
    pub const GROUP: &'static str = "table/series";

    /// Its schema entry; `name` is the path below `/table/series`.
    pub fn entry(self) -> Entry {
        let s = |n: &str, u, d: &str, c, p| entry(n.to_owned(), u, d.to_owned(), c, p);
        let at = "at the first reported step at or after each grid time (the start state at k = 0)";
        match self {
            SweepSeries::RunFraction => s(
                "run_fraction",
                Unit::One,
                "the common grid: fraction k/50 of the run, k = 0…50 (one row)",
                "k/50",
                Place::Model,
            ),
            SweepSeries::Time => s(
                "time",
                Unit::S,
                "time of the values at each grid point, per scenario (row) and point (column)",
                at,
                Place::Model,
            ),
            SweepSeries::Skin => s(
                "skin",
                Unit::One,
                "total skin of the well as it stands, per scenario and grid point",
                at,
                Place::Wall,
            ),
            SweepSeries::SpecificCapacity => s(
                "specific_capacity",
                Unit::M2PerS,
                "specific capacity of the virtual constant-rate test, per scenario and grid point; NaN when the virtual test failed",
                "as /progress/specific_capacity, docs/physics.md §25.3",
                Place::Model,
            ),
            SweepSeries::Efficiency => s(
                "efficiency",
                Unit::One,
                "efficiency against the undamaged well, per scenario and grid point; NaN when the virtual test failed",
                "as /progress/efficiency",
                Place::Model,
            ),
            SweepSeries::PeakOutwardFlux => s(
                "peak_outward_flux",
                Unit::VolumeFlux,
                "largest outward Darcy flux at the wall of the cycles ending in the interval before each grid point; NaN at k = 0 and where no cycle ended",
                "max of /cycles/peak_outward_flux",
                Place::Wall,
            ),
            SweepSeries::PeakInwardFlux => s(
                "peak_inward_flux",
                Unit::VolumeFlux,
                "largest inward Darcy flux at the wall of the cycles ending in the interval before each grid point; NaN at k = 0 and where no cycle ended",
                "max of /cycles/peak_inward_flux",
                Place::Wall,
            ),
        }
    }

    /// The HDF5 path, `/table/series/<name>`.
    pub fn path(self) -> String {
        format!("/{}/{}", Self::GROUP, self.entry().name)
    }
}

/// Statistic of a per-step series over one complete drive cycle, written under
/// `/envelopes/<stat>/<series>` when the case keeps envelopes (`output.store`). Every
/// per-step series but `time` has all three, in its own unit.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EnvelopeStat {
    /// Smallest value of the cycle's steps.
    Min,
    /// Largest value of the cycle's steps.
    Max,
    /// Root mean square over the cycle's time, trapezoidal rule on its steps.
    Rms,
}

/// Group of the envelopes' cycle times (`/envelopes/start_time`, `/envelopes/end_time`).
pub const ENVELOPES: &str = Group::Envelopes.name();

impl EnvelopeStat {
    /// The three statistics, in file order.
    pub const ALL: [EnvelopeStat; 3] = [EnvelopeStat::Min, EnvelopeStat::Max, EnvelopeStat::Rms];

    /// Name of its group under `/envelopes`.
    pub const fn name(self) -> &'static str {
        match self {
            EnvelopeStat::Min => "min",
            EnvelopeStat::Max => "max",
            EnvelopeStat::Rms => "rms",
        }
    }

    /// Its schema entry (the series' own unit).
    pub fn entry(self) -> Entry {
        let (d, c) = match self {
            EnvelopeStat::Min => (
                "smallest value of the series over the cycle",
                "minimum over the cycle's steps, both end points included",
            ),
            EnvelopeStat::Max => (
                "largest value of the series over the cycle",
                "maximum over the cycle's steps, both end points included",
            ),
            EnvelopeStat::Rms => (
                "root mean square of the series over the cycle",
                "sqrt(integral of x^2 dt / cycle time), trapezoidal rule on the steps",
            ),
        };
        entry(
            format!("{}/<series>", self.name()),
            Unit::OfSeries,
            d.to_owned(),
            c,
            Place::Model,
        )
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
    /// What limited the jump's length (a code).
    Bound,
}

impl JumpSeries {
    /// All, in file order.
    pub const ALL: [JumpSeries; 6] = [
        JumpSeries::FromTime,
        JumpSeries::ToTime,
        JumpSeries::FirstCycle,
        JumpSeries::Cycles,
        JumpSeries::ErrorEstimate,
        JumpSeries::Bound,
    ];

    /// The group the series live in.
    pub const GROUP: &'static str = Group::Jumps.name();

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
                Unit::Count,
                "number of the first cycle skipped, from 0 (no /cycles record for it)",
                "count",
            ),
            JumpSeries::Cycles => s(
                "cycles",
                Unit::Count,
                "cycles skipped",
                "largest K within the error and move bounds, docs/time-stepping.md",
            ),
            JumpSeries::ErrorEstimate => s(
                "error_estimate",
                Unit::One,
                "estimated error of the jump over the error allowed (at most 1)",
                "largest over the sampled values: K(K+1)/2 x change of the per-cycle change / (tolerance x scale); a held head: K x its per-cycle change / its step tolerance",
            ),
            JumpSeries::Bound => s(
                "bound",
                Unit::One,
                "what limited the jump's length: 0 error, 1 move, 2 toward-zero, 3 drive, 4 sync, 5 max, 6 event, 7 end",
                "the smallest of the bounds on K, docs/time-stepping.md",
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
            JumpSeries::Bound => f64::from(j.bound.code()),
        }
    }

    /// The HDF5 path, `/jumps/<name>`.
    pub fn path(self) -> String {
        format!("/{}/{}", Self::GROUP, self.entry().name)
    }
}
/// A series of the events group (`/events/<name>`, one value per event, in time order;
/// docs/formats.md "Events"). The kinds are [`EventKind::ALL`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EventSeries {
    /// Time of the step that raised it.
    Time,
    /// The cycle holding it.
    Cycle,
    /// Its kind, an index into `Kinds`.
    Kind,
    /// The names of the kinds.
    Kinds,
}

impl EventSeries {
    /// All, in file order.
    pub const ALL: [EventSeries; 4] = [
        EventSeries::Time,
        EventSeries::Cycle,
        EventSeries::Kind,
        EventSeries::Kinds,
    ];

    /// The group the series live in.
    pub const GROUP: &'static str = Group::Events.name();

    /// Its schema entry; `name` is the path below `/events`.
    pub fn entry(self) -> Entry {
        let s = |n: &str, u, d: &str, c| entry(n.to_owned(), u, d.to_owned(), c, Place::Model);
        match self {
            EventSeries::Time => s(
                "time",
                Unit::S,
                "time of the step that raised the event",
                "end of the step",
            ),
            EventSeries::Cycle => s(
                "cycle",
                Unit::Count,
                "number of the drive cycle holding the event, from 0 (0 for a drive without \
                 cycles; the step that ends a cycle belongs to it)",
                "count",
            ),
            EventSeries::Kind => s(
                "kind",
                Unit::One,
                "what happened: the index (from 0, unsigned byte) of its name in `kinds`",
                "a limit crossed upward, or a change the solver reports",
            ),
            EventSeries::Kinds => s(
                "kinds",
                Unit::One,
                "the names of the event kinds (text; the table below), in index order",
                "fixed list",
            ),
        }
    }

    /// The HDF5 path, `/events/<name>`.
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
        Unit::Count,
        "cycle number, from 0".to_owned(),
        "count",
        Place::Model,
    )];
    cycles.extend(Cycle::all().into_iter().map(Cycle::entry));
    table(&mut out, "Per cycle (`/cycles/<name>`):", "", cycles);
    let mut envelopes = vec![
        entry(
            "start_time".to_owned(),
            Unit::S,
            "start of the cycle".to_owned(),
            "time of the step that began it",
            Place::Model,
        ),
        entry(
            "end_time".to_owned(),
            Unit::S,
            "end of the cycle".to_owned(),
            "time of the step that ended it",
            Place::Model,
        ),
    ];
    envelopes.extend(EnvelopeStat::ALL.into_iter().map(EnvelopeStat::entry));
    table(
        &mut out,
        "Per-cycle envelopes (`/envelopes/<name>`, only when `output.store` keeps envelopes; \
         `<series>` is every per-step name but `time`, in that series' unit, one value per \
         complete cycle):",
        "",
        envelopes,
    );
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
        "Key series of a sweep table (`/table/series/<name>`; rows scenarios in table order, \
         columns the grid points; NaN rows for failed scenarios):",
        "",
        SweepSeries::ALL
            .into_iter()
            .map(SweepSeries::entry)
            .collect(),
    );
    table(
        &mut out,
        "Jumps over whole cycles (`/jumps/<name>`; only with `numerics.multiscale` \"auto\", \
         empty when no jump was taken):",
        "",
        JumpSeries::ALL.into_iter().map(JumpSeries::entry).collect(),
    );
    table(
        &mut out,
        "Events (`/events/<name>`; every run; `time`, `cycle` and `kind` one value per \
         event, empty when none was raised; docs/formats.md \"Events\"):",
        "",
        EventSeries::ALL
            .into_iter()
            .map(EventSeries::entry)
            .collect(),
    );
    out.push_str(
        "Event kinds (`/events/kinds`, in index order):\n\n| index | kind | meaning |\n| --- | --- | --- |\n",
    );
    for k in EventKind::ALL {
        out.push_str(&format!(
            "| {} | `{}` | {} |\n",
            k as u8,
            k.name(),
            k.description()
        ));
    }
    out.push('\n');
    out.push_str("Text attributes of `/summary`:\n\n| name | description |\n| --- | --- |\n");
    for t in SummaryText::ALL {
        out.push_str(&format!("| `{}` | {} |\n", t.name(), t.description()));
    }
    out.push('\n');
    file::markdown(&mut out, &|out, title, rows| table(out, title, "", rows));
    out.push_str(
        "Keys of `run --json`, in the order printed (figures as in `/summary`, `null` when not \
         computed):\n\n| key | unit | description |\n| --- | --- | --- |\n",
    );
    for k in run_json_keys() {
        let e = k.entry();
        out.push_str(&format!(
            "| `{}` | {} | {} |\n",
            k.name(),
            e.unit.symbol(),
            e.description
        ));
    }
    out.push('\n');
    documents::table(&mut out, "Keys of `check --json`:", check_json::ALL);
    documents::table(&mut out, "Keys of `steptest --json`:", steptest_json::ALL);
    documents::table(
        &mut out,
        "Keys of an estimate (`steptest --json`, shape \"estimate\"):",
        estimate::ALL,
    );
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

    /// A figure's schema unit says it is a count exactly when its value is one (the report
    /// prints counts as whole numbers from the unit), and every entry computed as a "count"
    /// has that unit.
    #[test]
    fn counts_have_the_count_unit() {
        let h = demo_headline();
        for f in Figure::all() {
            if let Some(v) = f.value(&h.figures) {
                assert_eq!(
                    matches!(v, Num::Count(_)),
                    f.entry().unit == Unit::Count,
                    "{}",
                    f.name()
                );
            }
        }
        let entries = Step::all()
            .into_iter()
            .map(Step::entry)
            .chain(Cycle::all().into_iter().map(Cycle::entry))
            .chain(Figure::all().into_iter().map(Figure::entry))
            .chain(JumpSeries::ALL.into_iter().map(JumpSeries::entry))
            .chain(EventSeries::ALL.into_iter().map(EventSeries::entry));
        for e in entries {
            if e.computed == "count" {
                assert_eq!(e.unit, Unit::Count, "{}", e.name);
            }
        }
        // Darcy fluxes and velocities share the symbol m/s but not the unit.
        assert_eq!(Step::FaceFlux.entry().unit, Unit::VolumeFlux);
        assert_eq!(Step::FacePoreVelocity.entry().unit, Unit::MPerS);
        assert_eq!(Figure::GrainCriticalVelocity.entry().unit, Unit::MPerS);
        assert_eq!(Unit::VolumeFlux.symbol(), Unit::MPerS.symbol());
        assert_eq!(Unit::Count.symbol(), Unit::One.symbol());
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
        let a = crate::summary::assessment(&case, &summary);
        crate::summary::headline(&case, &summary, &tracker, &a)
    }

    #[test]
    fn run_json_has_every_figure_once_in_the_key_order() {
        // The document `run --json` prints: its keys are those of run_json_keys in that order,
        // every figure is among them once, counts are integers and the zone work is the
        // summary's.
        let h = demo_headline();
        let text = serde_json::to_string(&h).unwrap();
        let keys: Vec<String> = run_json_keys().into_iter().map(RunKey::name).collect();
        let mut at = 0;
        for k in &keys {
            let quoted = format!("\"{k}\":");
            let found = text[at..].find(&quoted);
            assert!(found.is_some(), "key {k} missing or out of order");
            at += found.unwrap() + quoted.len();
        }
        assert!(unique(keys.iter().cloned()));
        let json: serde_json::Value = serde_json::from_str(&text).unwrap();
        assert_eq!(json.as_object().unwrap().len(), keys.len());
        for f in Figure::all() {
            let listed = match f {
                Figure::Work(_) => keys.contains(&RunKey::WorkArray.name()),
                _ => keys.contains(&f.name()),
            };
            assert!(listed, "{}", f.name());
        }
        assert_eq!(json["steps"].as_u64(), Some(h.figures.summary.steps));
        assert!(json["max_newton_iterations"].is_u64());
        let values = figure_values(&h);
        for (k, z) in Zone::ALL.into_iter().enumerate() {
            let w = values
                .iter()
                .find(|(f, _)| *f == Figure::Work(z))
                .unwrap()
                .1;
            assert_eq!(w, Some(h.figures.summary.work_j[k]), "{}", z.name());
            assert_eq!(json["work_j"][k].as_f64(), w);
            assert_eq!(json["zones"][k].as_str(), Some(z.name()));
        }
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
    fn the_jump_bound_codes_are_those_of_the_solver() {
        let d = JumpSeries::Bound.entry().description;
        for b in boreflux_solver::JumpBound::ALL {
            let named = format!("{} {}", b.code(), b.name());
            assert!(d.contains(&named), "{named} missing in {d}");
        }
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
