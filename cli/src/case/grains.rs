//! Grain sizes to flow parameters: the pack's conductivity when it is not given, and the
//! Forchheimer β of pack and formation from Ergun. The formulas live in
//! [`boreflux_solver::media`]; this file chooses which to use, checks the inputs and
//! writes the notes that say what was chosen and why.

use super::error::CaseError;
use super::raw::GrainShapeName;
use crate::units::{format_si, Quantity};
use boreflux_solver::media::{
    ergun_beta, ergun_conductivity, estimate_pack_conductivity, hazen_conductivity,
    hazen_validity_note, kozeny_carman_conductivity, Gradation, GrainShape,
    HAZEN_DEFAULT_COEFFICIENT,
};
use boreflux_solver::water::Water;

/// A given conductivity differing from the grain-size estimate by more than this factor
/// gets a warning. Grain-size estimates are good to a factor of about two at best
/// (media.rs), so three leaves room for that before suspecting a unit or gradation slip.
pub const ESTIMATE_MISMATCH_FACTOR: f64 = 3.0;

/// Grain sizes of a medium, m.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Grains {
    /// d10, m.
    pub d10: Option<f64>,
    /// d50, m.
    pub d50: Option<f64>,
    /// d60, m.
    pub d60: Option<f64>,
}

/// Conductivity chosen for the pack, with what the user should see about it.
#[derive(Debug, Clone, PartialEq)]
pub struct PackConductivity {
    /// K, m/s.
    pub conductivity_m_s: f64,
    /// Derivations.
    pub notes: Vec<String>,
    /// Doubts.
    pub warnings: Vec<String>,
}

/// Grain shape from `sphericity` or `grain_shape` (at most one); spheres by default.
pub fn grain_shape(
    zone: &str,
    sphericity: Option<f64>,
    name: Option<GrainShapeName>,
) -> Result<GrainShape, CaseError> {
    match (sphericity, name) {
        (Some(_), Some(_)) => Err(CaseError::new(
            format!("{zone}.grain_shape"),
            "give either sphericity or grain_shape, not both",
        )),
        (Some(psi), None) => {
            if psi > 0.0 && psi <= 1.0 {
                Ok(GrainShape::Custom(psi))
            } else {
                Err(CaseError::new(
                    format!("{zone}.sphericity"),
                    format!("must be in (0, 1], got {psi}"),
                ))
            }
        }
        (None, Some(n)) => Ok(match n {
            GrainShapeName::Spheres => GrainShape::Spheres,
            GrainShapeName::RoundedBeads => GrainShape::RoundedBeads,
            GrainShapeName::SubroundedSand => GrainShape::SubroundedSand,
            GrainShapeName::SubangularSand => GrainShape::SubangularSand,
            GrainShapeName::AngularCrushed => GrainShape::AngularCrushed,
        }),
        (None, None) => Ok(GrainShape::Spheres),
    }
}

/// Checks that grain sizes are positive and ordered d10 ≤ d50 ≤ d60.
pub fn check_grains(zone: &str, g: &Grains) -> Result<(), CaseError> {
    for (key, d) in [("d10", g.d10), ("d50", g.d50), ("d60", g.d60)] {
        if let Some(d) = d {
            if d <= 0.0 {
                return Err(CaseError::new(
                    format!("{zone}.{key}"),
                    format!("must be positive, got {d} m"),
                ));
            }
            boreflux_solver::limits::GRAIN_DIAMETER
                .check(&format!("{zone}.{key}"), d)
                .map_err(CaseError::from)?;
        }
    }
    let pairs = [
        ("d50", g.d50, "d10", g.d10),
        ("d60", g.d60, "d50", g.d50),
        ("d60", g.d60, "d10", g.d10),
    ];
    for (big, b, small, s) in pairs {
        if let (Some(b), Some(s)) = (b, s) {
            if b < s {
                return Err(CaseError::new(
                    format!("{zone}.{big}"),
                    format!(
                        "must not be smaller than {small} ({}), got {}",
                        format_si(s, Quantity::Length),
                        format_si(b, Quantity::Length)
                    ),
                ));
            }
        }
    }
    Ok(())
}

/// One estimate: chosen K, the reason, and the side-by-side line.
struct Estimate {
    chosen: f64,
    basis: String,
    side_by_side: String,
    hazen_note: Option<&'static str>,
}

fn estimate(g: &Grains, porosity: f64, shape: GrainShape, water: &Water) -> Option<Estimate> {
    let psi = shape.sphericity();
    let mm = |d: f64| d * 1e3;
    match (g.d10, g.d50) {
        (Some(d10), Some(d50)) => {
            let e = estimate_pack_conductivity(
                &Gradation {
                    d10_m: d10,
                    d50_m: d50,
                    d60_m: g.d60,
                },
                porosity,
                shape,
                water,
            );
            Some(Estimate {
                chosen: e.chosen,
                basis: format!("{} ({} mm)", e.basis, mm(e.diameter_m)),
                side_by_side: format!(
                    "Kozeny-Carman {:.3e}, Ergun viscous term {:.3e}, Hazen (d10, C = {}) {:.3e} m/s",
                    e.kozeny_carman, e.ergun, HAZEN_DEFAULT_COEFFICIENT, e.hazen
                ),
                hazen_note: e.hazen_note,
            })
        }
        (None, Some(d50)) => {
            let kc = kozeny_carman_conductivity(d50, porosity, psi, water);
            let er = ergun_conductivity(shape.effective_diameter(d50), porosity, water);
            Some(Estimate {
                chosen: kc,
                basis: format!(
                    "only d50 given: Kozeny-Carman on d50 ({} mm); sorting unknown, so this \
                     is high if the pack is poorly sorted",
                    mm(d50)
                ),
                side_by_side: format!(
                    "Kozeny-Carman {kc:.3e}, Ergun viscous term {er:.3e} m/s (Hazen needs d10)"
                ),
                hazen_note: None,
            })
        }
        (Some(d10), None) => {
            let kc = kozeny_carman_conductivity(d10, porosity, psi, water);
            let er = ergun_conductivity(shape.effective_diameter(d10), porosity, water);
            let hz = hazen_conductivity(d10, HAZEN_DEFAULT_COEFFICIENT);
            let cu = g.d60.map(|d60| d60 / d10);
            Some(Estimate {
                chosen: kc,
                basis: format!(
                    "no d50: Kozeny-Carman on d10 ({} mm), the lower estimate",
                    mm(d10)
                ),
                side_by_side: format!(
                    "Kozeny-Carman {kc:.3e}, Ergun viscous term {er:.3e}, Hazen (d10, C = {}) \
                     {hz:.3e} m/s",
                    HAZEN_DEFAULT_COEFFICIENT
                ),
                hazen_note: hazen_validity_note(d10, cu),
            })
        }
        (None, None) => None,
    }
}

/// The pack's conductivity: the given value, else the grain-size estimate.
pub fn pack_conductivity(
    given: Option<f64>,
    grains: &Grains,
    porosity: f64,
    shape: GrainShape,
    water: &Water,
) -> Result<PackConductivity, CaseError> {
    let est = estimate(grains, porosity, shape, water);
    let shape_text = format!("sphericity {}", shape.sphericity());
    let mut notes = Vec::new();
    let mut warnings = Vec::new();
    let k = match (given, est) {
        (None, None) => {
            return Err(CaseError::new(
                "pack.conductivity",
                "give a conductivity or grain sizes (d10, or d50)",
            ))
        }
        (None, Some(e)) => {
            notes.push(format!(
                "pack conductivity estimated from the gradation: {:.3e} m/s; {}; porosity \
                 {porosity}, {shape_text}",
                e.chosen, e.basis
            ));
            notes.push(format!(
                "pack conductivity estimates side by side: {}",
                e.side_by_side
            ));
            if let Some(h) = e.hazen_note {
                notes.push(format!("pack: {h}"));
            }
            notes.push(
                "pack: grain-size estimates are good to a factor of about two at best; a \
                 measured conductivity overrides them"
                    .to_owned(),
            );
            e.chosen
        }
        (Some(k), e) => {
            notes.push(format!("pack conductivity as given: {k:.3e} m/s"));
            if let Some(e) = e {
                notes.push(format!(
                    "pack: the gradation would give {:.3e} m/s ({}); {}",
                    e.chosen, e.basis, e.side_by_side
                ));
                let ratio = (k / e.chosen).max(e.chosen / k);
                if ratio > ESTIMATE_MISMATCH_FACTOR {
                    warnings.push(format!(
                        "pack.conductivity: the given {k:.3e} m/s differs from the \
                         grain-size estimate {:.3e} m/s by a factor of {ratio:.1}; check the \
                         units and the gradation",
                        e.chosen
                    ));
                }
            }
            k
        }
    };
    Ok(PackConductivity {
        conductivity_m_s: k,
        notes,
        warnings,
    })
}

/// Forchheimer β of a zone: the given value, else Ergun on ψ·d50, else 0 (Darcy), with a
/// note saying which.
pub fn forchheimer_beta(
    zone: &str,
    given: Option<f64>,
    d50: Option<f64>,
    porosity: f64,
    shape: GrainShape,
) -> (f64, String) {
    match (given, d50) {
        (Some(b), _) => (
            b,
            format!("{zone} Forchheimer beta as given: {b:.4e} s2/m2"),
        ),
        (None, Some(d)) => {
            let b = ergun_beta(shape.effective_diameter(d), porosity);
            (
                b,
                format!(
                    "{zone} Forchheimer beta from Ergun: {b:.4e} s2/m2 (d50 {} mm, porosity \
                     {porosity}, sphericity {})",
                    d * 1e3,
                    shape.sphericity()
                ),
            )
        }
        (None, None) => (
            0.0,
            format!("{zone}: no d50 and no forchheimer_beta, so Darcy flow (beta = 0)"),
        ),
    }
}
