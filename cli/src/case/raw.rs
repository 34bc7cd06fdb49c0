//! The case file as written: serde structs with user units and optional keys.
//!
//! Every struct denies unknown keys, so a misspelt key is an error with a hint rather
//! than a silently ignored value. Dimensional values stay as written ([`Q`]) until
//! [`super::convert`] reads them into SI. The doc comments here are the descriptions of
//! the JSON Schema (`boreflux schema`); defaults are given in brackets.

use super::quantity::{
    Area, Beta, CellsValue, Conductivity, Density, DischargeCoefficientValue, DurationValue,
    Erodibility, Fraction, Length, OuterRadiusValue, PerMetre, Pressure, Seconds, SpecificStorage,
    StepsPerCycleValue, Temperature, Time, Velocity, Q,
};
use schemars::JsonSchema;
use serde::Deserialize;
use serde_json::{Map, Value};

/// A boreflux case: one well, its zones, the drive and the run settings. Every
/// dimensional value is a number in SI base units or a string "<number> <unit>".
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(title = "boreflux case file")]
pub struct RawCase {
    /// Optional URI of this schema, for editors; ignored by the loader.
    #[serde(rename = "$schema")]
    #[allow(dead_code)] // accepted so that editors can point at the schema; never read
    pub schema: Option<String>,
    /// Short name of the case, shown in reports.
    pub title: Option<String>,
    /// Free text: where the numbers come from, what the case is for.
    pub description: Option<String>,
    /// Pore water [water at 15 degC].
    pub fluid: Option<RawFluid>,
    /// Well, screen and casing.
    pub well: RawWell,
    /// Filter pack in the annulus between screen and borehole wall.
    pub pack: RawPack,
    /// Wall cake left by the drilling fluid on the borehole wall [none].
    pub cake: Option<RawCake>,
    /// Zone of reduced conductivity just outside the borehole wall [none].
    pub invaded: Option<RawInvaded>,
    /// The aquifer.
    pub formation: RawFormation,
    /// What drives the flow; `kind` selects the drive and its keys.
    #[schemars(schema_with = "super::drives::drive_schema")]
    pub drive: Map<String, Value>,
    /// Simulated time [for a schedule: the sum of its stages; required for every other
    /// drive].
    pub duration: Option<DurationValue>,
    /// Numerical settings [all automatic].
    pub numerics: Option<RawNumerics>,
    /// Virtual pumping tests of the well before and after development [all automatic].
    pub assessment: Option<super::assessment::RawAssessment>,
    /// What the result file keeps of the per-step series [all automatic].
    pub output: Option<super::output::RawOutput>,
}

/// Pore water.
#[derive(Debug, Default, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawFluid {
    /// Water temperature [15 degC]; a bare number is kelvin. Sets density and viscosity.
    pub temperature: Option<Q<Temperature>>,
}

/// Well, screen and casing, with the optional inputs of the collapse check.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawWell {
    /// Screen outer radius (inner radius of the pack).
    pub screen_radius: Q<Length>,
    /// Screen length = thickness of the layer that takes the flow.
    pub screen_length: Q<Length>,
    /// Open-area fraction of the screen, in (0, 1] ("30 %" is accepted). The entrance
    /// loss uses it as the effective open area: give the area left open by the pack
    /// grains (often taken as about half the nominal value).
    pub open_area: Q<Fraction>,
    /// Radius of the casing in which the water level moves [screen_radius].
    pub casing_radius: Option<Q<Length>>,
    /// Slot width (reported only).
    pub slot_width: Option<Q<Length>>,
    /// Linear screen loss: head drop = coefficient × Darcy flux at the screen, in s [0].
    pub screen_loss: Option<Q<Seconds>>,
    /// Orifice discharge coefficient of the entrance loss [0.6]; "none" leaves it out.
    pub discharge_coefficient: Option<DischargeCoefficientValue>,
    /// Well-bore storage dV/dH as an area [π casing_radius²].
    pub storage: Option<Q<Area>>,
    /// Length of the water column above the screen: depth of the screen's top below the
    /// static water level [the deepest tool's depth: block, swab cups or pump intake; 0
    /// without a tool]. Its mass (with half the screen's water) resists the column's
    /// acceleration; "0 m" and a screen of no length would give the quasi-static well.
    pub column_length: Option<Q<Length>>,
    /// Screen and casing material for the collapse check: "pvc", "steel", "stainless" or
    /// another name.
    pub material: Option<String>,
    /// Dimension ratio DR = outside diameter / wall thickness (e.g. 21 for SDR 21).
    pub dimension_ratio: Option<f64>,
    /// Manufacturer's collapse rating of the casing (a pressure); overrides the computed
    /// estimate (the lower of elastic buckling and first yield). Also used for the screen
    /// when `screen_collapse_rating` and `slot_derating` are not given.
    pub collapse_rating: Option<Q<Pressure>>,
    /// Manufacturer's collapse rating of the screen (a pressure). Slotted or wire-wrap
    /// screen is weaker than blank pipe of the same DR.
    pub screen_collapse_rating: Option<Q<Pressure>>,
    /// Factor in (0, 1] on the computed pipe collapse pressure for the screen (slotting
    /// weakens it); with no screen rating and no factor the screen gets no computed rating.
    pub slot_derating: Option<f64>,
    /// Yield strength of the pipe material (a pressure) [steel 241 MPa, stainless 207 MPa,
    /// PVC 48 MPa; handbook values, verify].
    pub yield_strength: Option<Q<Pressure>>,
    /// Young's modulus of the pipe material (a pressure).
    pub youngs_modulus: Option<Q<Pressure>>,
    /// Poisson's ratio of the pipe material.
    pub poisson_ratio: Option<f64>,
    /// Safety factor applied to the collapse pressure [2].
    pub safety_factor: Option<f64>,
}

/// Named grain-shape classes (typical sphericities; verify against a measurement).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum GrainShapeName {
    /// Perfect spheres, ψ = 1.
    Spheres,
    /// Manufactured rounded beads, ψ ≈ 0.95.
    RoundedBeads,
    /// Well-worn subrounded natural sand, ψ ≈ 0.83.
    SubroundedSand,
    /// Subangular natural sand, ψ ≈ 0.73.
    SubangularSand,
    /// Angular crushed rock or glass, ψ ≈ 0.65.
    AngularCrushed,
}

/// Filter pack.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawPack {
    /// Borehole radius: outer radius of the pack, where the cake sits.
    pub outer_radius: Q<Length>,
    /// Porosity, in (0, 1).
    pub porosity: Q<Fraction>,
    /// Hydraulic conductivity; when left out it is estimated from the grain sizes.
    pub conductivity: Option<Q<Conductivity>>,
    /// Specific storage [the formation's].
    pub specific_storage: Option<Q<SpecificStorage>>,
    /// Grain size d10 (10 % finer by mass).
    pub d10: Option<Q<Length>>,
    /// Median grain size d50.
    pub d50: Option<Q<Length>>,
    /// Grain size d60 (60 % finer by mass).
    pub d60: Option<Q<Length>>,
    /// Grain sphericity ψ in (0, 1] [1]; or give `grain_shape`.
    pub sphericity: Option<f64>,
    /// Named grain-shape class instead of `sphericity`.
    pub grain_shape: Option<GrainShapeName>,
    /// Forchheimer coefficient β in s²/m² [Ergun's, from d50 and porosity; 0 without d50].
    pub forchheimer_beta: Option<Q<Beta>>,
}

/// Erosion law of the wall cake (an assumption of the model; calibrate before use).
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawErosion {
    /// Critical shear below which the cake does not erode (a pressure).
    pub critical_shear: Q<Pressure>,
    /// Thinning rate per pascal of excess shear, in m/(s·Pa) (write "m/s/Pa").
    pub erodibility: Q<Erodibility>,
    /// Weight on the shear while flow goes toward the well [1].
    pub inward_weight: Option<f64>,
    /// Weight on the shear while flow goes into the formation [0.5].
    pub outward_weight: Option<f64>,
    /// Exponent m of the coverage law c = c0 (δ/δ0)^m [0]: 0 keeps the cake covering the
    /// wall until it is gone, 1 lets patches detach in proportion to the thickness lost.
    pub coverage_exponent: Option<f64>,
}

/// Lift-off of cake patches under an inward pressure difference (docs/physics.md §13a).
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawLiftOff {
    /// Median lift-off pressure of the patches [10 kPa, mid-range of 1–100 kPa].
    pub median: Option<Q<Pressure>>,
    /// Spread of the patch strengths: standard deviation of ln(strength) [0.9]; 0 = every
    /// patch has the median strength.
    pub spread: Option<f64>,
    /// Radius of an opened patch (a hole in the cake) [5 mm, middle of 1–25 mm].
    pub patch_radius: Option<Q<Length>>,
}

/// Mud fines in the invaded zone that flow can carry out (docs/physics.md §13b).
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawFines {
    /// Deposited fines at the start, volume per bulk volume [1 %].
    pub deposit: Option<Q<Fraction>>,
    /// Critical interstitial velocity of mobilisation [0.3 mm/s].
    pub critical_velocity: Option<Q<Velocity>>,
    /// Entrainment coefficient, 1/m [30].
    pub entrainment: Option<Q<PerMetre>>,
    /// Deposition (filtration) coefficient, 1/m [30].
    pub deposition: Option<Q<PerMetre>>,
    /// Density of the fines' solids, kg/m3 [2650].
    pub grain_density: Option<Q<Density>>,
}

/// Wall cake.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawCake {
    /// Cake thickness; must be thinner than the annulus.
    pub thickness: Q<Length>,
    /// Cake conductivity.
    pub conductivity: Q<Conductivity>,
    /// Fraction of the borehole wall the cake covers, in (0, 1] [1].
    pub coverage: Option<Q<Fraction>>,
    /// Erosion law [none: the cake stays as given].
    pub erosion: Option<RawErosion>,
    /// Lift-off of patches under inward flow [none].
    pub lift_off: Option<RawLiftOff>,
}

/// Invaded zone: give exactly one of `conductivity_ratio` and `conductivity`.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawInvaded {
    /// Radial thickness beyond the borehole wall.
    pub thickness: Q<Length>,
    /// Conductivity as a fraction of the formation's.
    pub conductivity_ratio: Option<Q<Fraction>>,
    /// Conductivity.
    pub conductivity: Option<Q<Conductivity>>,
    /// Specific storage [the formation's].
    pub specific_storage: Option<Q<SpecificStorage>>,
    /// Mud fines that flow can carry out [none: the zone stays as given].
    pub fines: Option<RawFines>,
}

/// Outer boundary condition of the model.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum OuterBoundaryName {
    /// Head fixed at the static level.
    FixedHead,
    /// No flow across the outer radius.
    NoFlow,
}

/// The aquifer.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawFormation {
    /// Hydraulic conductivity.
    pub conductivity: Q<Conductivity>,
    /// Specific storage.
    pub specific_storage: Q<SpecificStorage>,
    /// Outer radius of the model ["auto": from the penetration depth of the drive].
    pub outer_radius: Option<OuterRadiusValue>,
    /// Condition at the outer radius [fixed_head].
    pub outer_boundary: Option<OuterBoundaryName>,
    /// Porosity, in (0, 1) [0.3].
    pub porosity: Option<Q<Fraction>>,
    /// Median grain size d50 (shear proxy, Ergun's β).
    pub d50: Option<Q<Length>>,
    /// Forchheimer coefficient β in s²/m² [Ergun's, from d50 and porosity; 0 without d50].
    pub forchheimer_beta: Option<Q<Beta>>,
    /// Grain specific gravity, for the piping and heave indicators [2.65].
    pub specific_gravity: Option<f64>,
}

/// Solution method.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum MethodName {
    /// Time stepping (TR-BDF2 with adaptive steps by default, or the θ-scheme).
    Time,
    /// Periodic steady state by harmonics (not for runs: `boreflux check` prints it for
    /// linear cases).
    Harmonic,
}

/// Numerical settings.
#[derive(Debug, Default, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawNumerics {
    /// Solution method [time].
    pub method: Option<MethodName>,
    /// Radial grid [auto].
    pub cells: Option<CellsValue>,
    /// Time steps per period of a periodic drive [auto = 200].
    pub steps_per_cycle: Option<StepsPerCycleValue>,
    /// θ of the θ-scheme (scheme "theta" only), in [0.5, 1]: 0.5 = Crank–Nicolson [0.5].
    pub theta: Option<f64>,
    /// Steps replaced by backward-Euler half steps after every jump of the forcing (scheme
    /// "theta" only) [2].
    pub startup_steps: Option<u64>,
    /// Fixed time step, instead of steps_per_cycle or steps_per_decade.
    pub time_step: Option<Q<Time>>,
    /// Geometric time steps per decade of time, for drives that are not periodic [40].
    pub steps_per_decade: Option<f64>,
    /// First step of the geometric steps [1e-8 of the duration, at least 1e-5 s].
    pub first_step: Option<Q<Time>>,
    /// Write every n-th step to the output [1].
    pub output_every: Option<u64>,
    /// Time integration: "tr-bdf2" (L-stable, adaptive steps, at most the nominal step) or
    /// "theta" (θ-scheme with the nominal steps) [tr-bdf2].
    pub scheme: Option<SchemeName>,
    /// Relative tolerance of the adaptive steps on heads [1e-3].
    pub relative_tolerance: Option<f64>,
    /// Absolute tolerance of the adaptive steps on heads [1 mm].
    pub absolute_tolerance: Option<Q<Length>>,
    /// Cycle jumping over the slow state of a periodic drive: "off" (every cycle stepped)
    /// or "auto" (jump over cycles while the state changes smoothly) [auto for a periodic
    /// drive, off otherwise].
    pub multiscale: Option<MultiscaleName>,
    /// Extrapolation error allowed per jump, relative to each sampled quantity's scale
    /// (multiscale "auto" only), in (0, 0.01] [1e-4].
    pub multiscale_tolerance: Option<f64>,
}

/// Cycle jumping.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
pub enum MultiscaleName {
    /// Every cycle is stepped in full.
    #[serde(rename = "off")]
    Off,
    /// Jump over cycles while the sampled state changes smoothly.
    #[serde(rename = "auto")]
    Auto,
}

/// Time integration scheme.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
pub enum SchemeName {
    /// TR-BDF2, L-stable, steps from its local error estimate.
    #[serde(rename = "tr-bdf2")]
    TrBdf2,
    /// θ-scheme (`theta`, `startup_steps`) with the nominal steps.
    #[serde(rename = "theta")]
    Theta,
}
