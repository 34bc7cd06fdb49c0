//! Models of the reference problems.

use boreflux_solver::drive::Drive;
use boreflux_solver::model::*;

/// Homogeneous confined aquifer: pack and formation share K and Ss, no cake, no invaded
/// zone, no screen loss. `rw` is the screen radius; the "pack" is a ring of formation
/// material out to 2 rw so the grid still has its annulus cells.
pub fn homogeneous(k: f64, ss: f64, b: f64, rw: f64, drive: Drive, duration_s: f64) -> Model {
    let m = Medium::darcy(k, ss);
    Model {
        fluid: Fluid::WATER_20C,
        well: Well {
            screen_radius_m: rw,
            screen_length_m: b,
            open_area: 0.2,
            casing_radius_m: rw,
            linear_loss_s: 0.0,
            discharge_coefficient: None,
            storage_m2: 0.0,
            column_length_m: 0.0,
        },
        pack: Pack {
            outer_radius_m: 2.0 * rw,
            medium: m,
        },
        cake: None,
        invaded: None,
        formation: Formation {
            medium: m,
            outer_radius_m: None,
            outer_boundary: OuterBoundary::FixedHead,
        },
        drive,
        duration_s,
        numerics: Numerics::default(),
    }
}
