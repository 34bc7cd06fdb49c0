//! Wells the tests and benchmarks share: the unit tests of this crate, its integration
//! tests (`solver/tests/`), the benchmarks (`benches/`) and the verification groups
//! (`tests/src/`) build their models here, so one well has one definition. Hidden from the
//! documentation and not part of the solver's API; it changes with the tests that use it.
//!
//! Every number in this module is invented (demo wells), not from a source, except where a
//! function says otherwise. A test that needs another well starts from one of these and
//! changes the fields it is about, so what it varies stands in the test.

use crate::drive::{Drive, SineHead};
use crate::model::*;

/// Specific storage of every medium here, 1e-5 1/m (invented, a typical confined sand).
const SS_PER_M: f64 = 1e-5;

/// A 0.1 m screen 6 m long with 12 % open area in a 0.1 m casing: no linear loss, no
/// entrance loss, no well storage, no water column.
pub fn screen() -> Well {
    Well {
        screen_radius_m: 0.1,
        screen_length_m: 6.0,
        open_area: 0.12,
        casing_radius_m: 0.1,
        linear_loss_s: 0.0,
        discharge_coefficient: None,
        storage_m2: 0.0,
        column_length_m: 0.0,
    }
}

/// A screen of radius `screen_radius_m` and length `screen_length_m` under a casing of
/// `casing_radius_m`, with the entrance loss of a 0.6 discharge coefficient and the storage
/// of a free surface in the casing.
pub fn cased_screen(
    screen_radius_m: f64,
    screen_length_m: f64,
    open_area: f64,
    casing_radius_m: f64,
) -> Well {
    Well {
        screen_radius_m,
        screen_length_m,
        open_area,
        casing_radius_m,
        linear_loss_s: 0.0,
        discharge_coefficient: Some(0.6),
        storage_m2: Well::free_surface_storage(casing_radius_m),
        column_length_m: 0.0,
    }
}

/// A sine head from rest (no ramp).
pub fn sine_head(amplitude_m: f64, frequency_hz: f64, offset_m: f64) -> Drive {
    Drive::SineHead(SineHead {
        amplitude_m,
        frequency_hz,
        offset_m,
        ramp_cycles: 0.0,
    })
}

/// The demo well: [`screen`] in a 0.2 m pack of 5e-3 m/s and a formation of 2e-4 m/s out
/// to a fixed head at 30 m, Darcy media, no cake and no invaded zone, driven by a 1.5 m
/// sine head at 0.5 Hz for 2 s with the default numerics.
pub fn demo_well() -> Model {
    Model {
        fluid: Fluid::WATER_20C,
        well: screen(),
        pack: Pack {
            outer_radius_m: 0.2,
            medium: Medium::darcy(5e-3, SS_PER_M),
        },
        cake: None,
        invaded: None,
        formation: Formation {
            medium: Medium::darcy(2e-4, SS_PER_M),
            outer_radius_m: Some(30.0),
            outer_boundary: OuterBoundary::FixedHead,
        },
        drive: sine_head(1.5, 0.5, 0.0),
        duration_s: 2.0,
        numerics: Numerics::default(),
    }
}

/// A cake of `thickness_m` and `conductivity_m_s` over the share `coverage` of the wall,
/// with no removal law.
pub fn cake(thickness_m: f64, conductivity_m_s: f64, coverage: f64) -> Cake {
    Cake {
        thickness_m,
        conductivity_m_s,
        coverage,
        erosion: None,
        lift_off: None,
    }
}

/// An erosion law with no critical shear, inward and outward flow weighted alike, of
/// erodibility `erodibility_m_s_pa` and coverage exponent `coverage_exponent`.
pub fn erosion(erodibility_m_s_pa: f64, coverage_exponent: f64) -> Erosion {
    Erosion {
        critical_shear_pa: 0.0,
        erodibility_m_s_pa,
        inward_weight: 1.0,
        outward_weight: 1.0,
        coverage_exponent,
    }
}

/// An invaded zone of `thickness_m` and `conductivity_m_s`, uniform, with no fines law.
pub fn invaded(thickness_m: f64, conductivity_m_s: f64) -> Invaded {
    Invaded {
        thickness_m,
        medium: Medium::darcy(conductivity_m_s, SS_PER_M),
        fines: None,
        profile: None,
    }
}

/// The demo well behind a patchy cake (2 mm of 1e-6 m/s over 70 % of the wall, so the
/// interface face spans two zones) and a 5 cm invaded zone of 5e-5 m/s; no removal law.
pub fn layered_well() -> Model {
    Model {
        cake: Some(cake(2e-3, 1e-6, 0.7)),
        invaded: Some(invaded(0.05, 5e-5)),
        ..demo_well()
    }
}

/// Gives `m` Forchheimer terms (β = 1.35e3 s²/m² in the pack, 2e4 in an invaded zone,
/// 1.35e4 in the formation) and the screen entrance loss of a 0.6 discharge coefficient.
pub fn make_nonlinear(m: &mut Model) {
    m.well.discharge_coefficient = Some(0.6);
    m.pack.medium.forchheimer_beta_s2_m2 = 1.35e3;
    if let Some(inv) = m.invaded.as_mut() {
        inv.medium.forchheimer_beta_s2_m2 = 2e4;
    }
    m.formation.medium.forchheimer_beta_s2_m2 = 1.35e4;
}

/// The benchmarks' well: the demo well's pack and formation (to 60 m) with exactly
/// `cells` cells, 20 s of the 0.5 Hz sine head at 200 steps per cycle; linear (Darcy) or,
/// when `nonlinear`, with [`make_nonlinear`].
pub fn bench_well(cells: usize, nonlinear: bool) -> Model {
    let mut m = demo_well();
    m.formation.outer_radius_m = Some(60.0);
    m.duration_s = 20.0;
    m.numerics.grid = GridSpec::Total(cells);
    m.numerics.time = TimeSpec::StepsPerCycle(200);
    if nonlinear {
        make_nonlinear(&mut m);
    }
    m
}
