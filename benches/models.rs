//! The model the benchmarks share: a pack–formation well of exactly `cells` cells driven by
//! a 0.5 Hz sine head, linear (Darcy) or with Forchheimer terms and the screen entrance
//! loss. Invented numbers. Included by `step.rs` and `harmonic.rs` with `#[path]`.

use boreflux_solver::drive::{Drive, SineHead};
use boreflux_solver::model::*;

/// A pack–formation case with exactly `cells` cells, driven by a 0.5 Hz sine head.
pub fn model(cells: usize, nonlinear: bool) -> Model {
    let mut pack = Medium::darcy(5e-3, 1e-5);
    let mut formation = Medium::darcy(2e-4, 1e-5);
    if nonlinear {
        pack.forchheimer_beta_s2_m2 = 1.35e3;
        formation.forchheimer_beta_s2_m2 = 1.35e4;
    }
    Model {
        fluid: Fluid::WATER_20C,
        well: Well {
            screen_radius_m: 0.1,
            screen_length_m: 6.0,
            open_area: 0.12,
            casing_radius_m: 0.1,
            linear_loss_s: 0.0,
            discharge_coefficient: nonlinear.then_some(0.6),
            storage_m2: 0.0,
            column_length_m: 0.0,
        },
        pack: Pack {
            outer_radius_m: 0.2,
            medium: pack,
        },
        cake: None,
        invaded: None,
        formation: Formation {
            medium: formation,
            outer_radius_m: Some(60.0),
            outer_boundary: OuterBoundary::FixedHead,
        },
        drive: Drive::SineHead(SineHead {
            amplitude_m: 1.5,
            frequency_hz: 0.5,
            offset_m: 0.0,
            ramp_cycles: 0.0,
        }),
        duration_s: 20.0,
        numerics: Numerics {
            grid: GridSpec::Total(cells),
            time: TimeSpec::StepsPerCycle(200),
            ..Numerics::default()
        },
    }
}
