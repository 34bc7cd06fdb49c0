//! Damage removal: the laws by which development changes the well's slow state
//! (docs/physics.md §13, §13a, §13b, §9c–§9e).
//!
//! - [`liftoff`]: cake patches fail when the inward pressure difference across the cake
//!   exceeds their strength (log-normal strengths; coverage follows the peak so far);
//! - the optional shear erosion of what remains is in [`crate::cake`];
//! - [`fines`]: entrainment and deposition of mud fines in the invaded zone, carried by the
//!   radial flow, and the zone's conductivity as fines leave;
//! - [`sand`]: pack and slot retention criteria and a critical velocity of formation grains
//!   at the wall (indicators for sand production).
//!
//! Every function here is pure; [`crate::slow::SlowState`] holds the state and calls them
//! once per accepted step.

pub mod fines;
pub mod liftoff;
pub mod sand;

use crate::model::Model;

/// A constant of a removal law as the model uses it, with its documented range.
#[derive(Debug, Clone, PartialEq)]
pub struct Assumption {
    /// Case-file path.
    pub path: &'static str,
    /// Value used, SI.
    pub value: f64,
    /// Documented range, SI (low, high).
    pub range: (f64, f64),
    /// Unit of the value and range.
    pub unit: &'static str,
    /// Provenance of the range.
    pub provenance: &'static str,
}

impl Assumption {
    /// Decades spanned by the documented range.
    pub fn decades(&self) -> f64 {
        (self.range.1 / self.range.0).log10()
    }
}

/// The removal-law constants the model uses, widest documented range first: a prior ranking
/// of which parameters dominate the uncertainty of removal times and final skin
/// (docs/physics.md §13, §13a, §13b), not a sensitivity computed on the case.
pub fn assumptions(model: &Model) -> Vec<Assumption> {
    const MEMORY: &str = "from memory — verify; calibrate";
    const CALIBRATE: &str = "assumption: calibrate";
    let mut v = Vec::new();
    if let Some(c) = &model.cake {
        if let Some(l) = &c.lift_off {
            v.push(Assumption {
                path: "cake.lift_off.median",
                value: l.median_pa,
                range: (1e3, 1e5),
                unit: "Pa",
                provenance: MEMORY,
            });
            v.push(Assumption {
                path: "cake.lift_off.spread",
                value: l.spread,
                range: (0.3, 1.5),
                unit: "",
                provenance: CALIBRATE,
            });
            v.push(Assumption {
                path: "cake.lift_off.patch_radius",
                value: l.patch_radius_m,
                range: (1e-3, 2.5e-2),
                unit: "m",
                provenance: CALIBRATE,
            });
        }
        if let Some(e) = &c.erosion {
            v.push(Assumption {
                path: "cake.erosion.critical_shear",
                value: e.critical_shear_pa,
                range: (0.05, 2.0),
                unit: "Pa",
                provenance: MEMORY,
            });
            v.push(Assumption {
                path: "cake.erosion.erodibility",
                value: e.erodibility_m_s_pa,
                range: (1e-8, 1e-6),
                unit: "m/(s Pa)",
                provenance: MEMORY,
            });
        }
    }
    if let Some(f) = model.invaded.as_ref().and_then(|z| z.fines) {
        v.push(Assumption {
            path: "invaded.fines.deposit",
            value: f.deposit,
            range: (0.002, 0.05),
            unit: "",
            provenance: MEMORY,
        });
        v.push(Assumption {
            path: "invaded.fines.critical_velocity",
            value: f.critical_velocity_m_s,
            range: (1e-5, 1e-2),
            unit: "m/s",
            provenance: MEMORY,
        });
        v.push(Assumption {
            path: "invaded.fines.entrainment",
            value: f.entrainment_per_m,
            range: (1.0, 1e3),
            unit: "1/m",
            provenance: MEMORY,
        });
        v.push(Assumption {
            path: "invaded.fines.deposition",
            value: f.deposition_per_m,
            range: (1.0, 1e3),
            unit: "1/m",
            provenance: MEMORY,
        });
    }
    v.sort_by(|a, b| b.decades().total_cmp(&a.decades()));
    v
}
