//! Granular media: conductivity and inertial coefficient from grain size, the Forchheimer
//! flow law, the grain Reynolds number and the pore-scale shear-stress proxy.
//!
//! These helpers turn a filter-pack or formation description (grain sizes, porosity, grain
//! shape) into the parameters the flow model uses: hydraulic conductivity K [m/s] and the
//! Forchheimer coefficient β [s²/m²]. They also supply the diagnostics evaluated at the
//! borehole face (grain Reynolds number, shear proxy). All diameters are in metres; a
//! "diameter" is an equivalent-sphere diameter unless stated otherwise.
//!
//! Grain shape enters through the sphericity ψ (surface of the equal-volume sphere over the
//! grain's surface). A less spherical grain has more surface per volume, as a sphere of
//! diameter ψ·d would. The functions that take a plain diameter therefore accept the
//! effective diameter `ψ d` ([`GrainShape::effective_diameter`]) to account for shape.
//! This is the same substitution Ergun and Carman make for non-spherical particles.

use crate::water::{Water, GRAVITY_M_S2};

/// Kozeny–Carman constant for spheres: Kozeny constant 5 times (specific surface 6/d)²,
/// i.e. 5 × 36 (Carman 1937).
pub const KOZENY_CARMAN_CONSTANT: f64 = 180.0;

/// Ergun (1952) viscous-term constant.
pub const ERGUN_VISCOUS_CONSTANT: f64 = 150.0;

/// Ergun (1952) inertial-term constant.
pub const ERGUN_INERTIAL_CONSTANT: f64 = 1.75;

/// Default Hazen coefficient C [1/(cm s)] in K[cm/s] = C d10\[cm\]² (Hazen 1892/1911; the
/// usual mid value of a quoted 40–150 range, from memory — verify).
pub const HAZEN_DEFAULT_COEFFICIENT: f64 = 100.0;

/// Smallest d10 \[m\] of Hazen's stated validity range, 0.1 mm (from memory — verify).
pub const HAZEN_D10_MIN_M: f64 = 0.1e-3;

/// Largest d10 \[m\] of Hazen's stated validity range, 3 mm (from memory — verify).
pub const HAZEN_D10_MAX_M: f64 = 3.0e-3;

/// Uniformity coefficient d60/d10 at and above which Hazen's formula is outside its stated
/// validity (from memory — verify).
pub const HAZEN_UNIFORMITY_LIMIT: f64 = 5.0;

/// Uniformity coefficient d60/d10 up to which a medium is treated as well sorted by
/// [`estimate_pack_conductivity`]. It is the usual upper limit for a filter pack
/// (common practice in water-well handbooks; from memory — verify).
pub const WELL_SORTED_UNIFORMITY_MAX: f64 = 2.5;

/// Hazen's coefficient converts d10 in cm to K in cm/s; in SI, K [m/s] = 1e-4 C d10[mm]²,
/// i.e. K [m/s] = 1e2 C d10\[m\]².
const HAZEN_SI_FACTOR: f64 = 1e2;

/// Named grain-shape classes, each standing for a typical sphericity ψ, or a custom value.
///
/// Sphericity = surface area of the sphere of equal volume / surface area of the grain
/// (Wadell). The class values are typical figures from memory — verify against a grain-shape
/// chart or a measurement before relying on them. Only [`GrainShape::Spheres`] is exact.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum GrainShape {
    /// Perfect spheres: ψ = 1 by definition.
    Spheres,
    /// Manufactured rounded beads (glass or ceramic): ψ ≈ 0.95 (from memory — verify).
    RoundedBeads,
    /// Well-worn, subrounded natural sand: ψ ≈ 0.83 (from memory — verify).
    SubroundedSand,
    /// Subangular natural sand: ψ ≈ 0.73 (from memory — verify).
    SubangularSand,
    /// Angular crushed rock or glass: ψ ≈ 0.65 (from memory — verify).
    AngularCrushed,
    /// A measured or assumed sphericity, 0 < ψ ≤ 1.
    Custom(f64),
}

impl GrainShape {
    /// Sphericity ψ (dimensionless, 0 < ψ ≤ 1) of this class.
    pub fn sphericity(self) -> f64 {
        match self {
            Self::Spheres => 1.0,
            Self::RoundedBeads => 0.95,
            Self::SubroundedSand => 0.83,
            Self::SubangularSand => 0.73,
            Self::AngularCrushed => 0.65,
            Self::Custom(psi) => psi,
        }
    }

    /// Effective diameter ψ·d \[m\] of grains of equivalent-sphere diameter `d_m`.
    ///
    /// ```text
    /// d_eff = ψ d
    /// ```
    ///
    /// For a sphere the specific surface is 6/d; a grain of sphericity ψ has 6/(ψ d). Flow
    /// laws built on specific surface (Kozeny–Carman, Ergun) treat the grain like a sphere
    /// of diameter ψ d.
    pub fn effective_diameter(self, d_m: f64) -> f64 {
        self.sphericity() * d_m
    }
}

/// Characteristic grain sizes of a sieve curve (diameters by mass percent finer) \[m\].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Gradation {
    /// d10: 10 % of the mass is finer \[m\].
    pub d10_m: f64,
    /// d50: median grain size \[m\].
    pub d50_m: f64,
    /// d60: 60 % of the mass is finer \[m\]; `None` when not known.
    pub d60_m: Option<f64>,
}

impl Gradation {
    /// Uniformity coefficient Cu = d60/d10 (dimensionless); `None` when d60 is unknown.
    pub fn uniformity_coefficient(&self) -> Option<f64> {
        self.d60_m.map(|d60| d60 / self.d10_m)
    }
}

/// Intrinsic permeability by Kozeny–Carman \[m²\].
///
/// ```text
/// k = (ψ d)² n³ / (180 (1 − n)²)
/// d: equivalent-sphere diameter [m], n: porosity [-], ψ: sphericity [-]
/// ```
///
/// Kozeny 1927; Carman 1937 (citations from memory — verify). The sphericity scales the
/// effective diameter (see [`GrainShape::effective_diameter`]); pass ψ = 1 for spheres.
pub fn kozeny_carman_permeability(d_m: f64, porosity: f64, sphericity: f64) -> f64 {
    let d_eff = sphericity * d_m;
    let n = porosity;
    d_eff * d_eff * n.powi(3) / (KOZENY_CARMAN_CONSTANT * (1.0 - n).powi(2))
}

/// Hydraulic conductivity by Kozeny–Carman [m/s]: [`kozeny_carman_permeability`] times
/// ρ g/μ of `water`.
pub fn kozeny_carman_conductivity(d_m: f64, porosity: f64, sphericity: f64, water: &Water) -> f64 {
    water.conductivity_from_permeability(kozeny_carman_permeability(d_m, porosity, sphericity))
}

/// Hydraulic conductivity by Hazen [m/s] from d10 \[m\] and the coefficient C [1/(cm s)].
///
/// ```text
/// K [cm/s] = C (d10 [cm])²      ⇔      K [m/s] = 100 C (d10 [m])²
/// ```
///
/// Hazen 1892/1911 (details from memory — verify). C is about 40–150, lower for poorly
/// sorted fine sand, higher for clean, well-sorted coarse sand;
/// [`HAZEN_DEFAULT_COEFFICIENT`] is 100. An order-of-magnitude estimate; check the range
/// with [`hazen_validity_note`].
pub fn hazen_conductivity(d10_m: f64, coefficient: f64) -> f64 {
    HAZEN_SI_FACTOR * coefficient * d10_m * d10_m
}

/// A note when Hazen's formula is used outside its stated validity (0.1 mm < d10 < 3 mm
/// and Cu = d60/d10 < 5), or `None` when inside it. An unknown `uniformity` is not
/// checked.
pub fn hazen_validity_note(d10_m: f64, uniformity: Option<f64>) -> Option<&'static str> {
    if !(HAZEN_D10_MIN_M..=HAZEN_D10_MAX_M).contains(&d10_m) {
        Some("Hazen estimate outside its stated range: d10 is not within 0.1-3 mm")
    } else if uniformity.is_some_and(|cu| cu >= HAZEN_UNIFORMITY_LIMIT) {
        Some("Hazen estimate outside its stated range: uniformity coefficient d60/d10 >= 5")
    } else {
        None
    }
}

/// Intrinsic permeability from Ergun's viscous term \[m²\].
///
/// ```text
/// k = n³ d² / (150 (1 − n)²)
/// ```
///
/// Ergun, S., 1952, "Fluid flow through packed columns", Chem. Eng. Prog. 48(2), 89–94.
/// For non-spherical grains pass d = ψ d ([`GrainShape::effective_diameter`]).
pub fn ergun_permeability(d_m: f64, porosity: f64) -> f64 {
    let n = porosity;
    n.powi(3) * d_m * d_m / (ERGUN_VISCOUS_CONSTANT * (1.0 - n).powi(2))
}

/// Hydraulic conductivity from Ergun's viscous term [m/s].
///
/// ```text
/// K = ρ g n³ d² / (150 μ (1 − n)²)
/// ```
///
/// Ergun 1952, pressure form divided by ρ g. For non-spherical grains pass d = ψ d.
pub fn ergun_conductivity(d_m: f64, porosity: f64, water: &Water) -> f64 {
    water.conductivity_from_permeability(ergun_permeability(d_m, porosity))
}

/// Forchheimer coefficient from Ergun's inertial term, head form [s²/m²].
///
/// ```text
/// β = 1.75 (1 − n) / (g n³ d)
/// ```
///
/// Ergun 1952, inertial term 1.75 ρ (1 − n) q² / (n³ d) divided by ρ g. For non-spherical
/// grains pass d = ψ d, which is Ergun's own sphericity correction (the inertial term has
/// ψ d in its denominator).
pub fn ergun_beta(d_m: f64, porosity: f64) -> f64 {
    let n = porosity;
    ERGUN_INERTIAL_CONSTANT * (1.0 - n) / (GRAVITY_M_S2 * n.powi(3) * d_m)
}

/// Hydraulic gradient i = −dh/dr [-] that drives the Darcy flux `q_m_s` under the
/// Forchheimer law.
///
/// ```text
/// i = q/K + β q |q|
/// q: Darcy flux [m/s], K: conductivity [m/s], β: Forchheimer coefficient [s²/m²]
/// ```
///
/// Forchheimer, P., 1901, "Wasserbewegung durch Boden", Z. Ver. Dtsch. Ing. 45 (from
/// memory — verify). β = 0 gives Darcy's law.
pub fn forchheimer_gradient(q_m_s: f64, k_m_s: f64, beta_s2_m2: f64) -> f64 {
    q_m_s / k_m_s + beta_s2_m2 * q_m_s * q_m_s.abs()
}

/// Darcy flux [m/s] driven by the gradient `gradient` = −dh/dr [-] under the Forchheimer
/// law: the inverse of [`forchheimer_gradient`].
///
/// ```text
/// q = 2 i / (1/K + √(1/K² + 4 β |i|))
/// ```
///
/// This root form avoids the cancellation of the textbook quadratic formula when the
/// inertial term is small, and reduces to q = K i for β = 0. The sign of q follows i.
pub fn forchheimer_flux_from_gradient(gradient: f64, k_m_s: f64, beta_s2_m2: f64) -> f64 {
    let inv_k = 1.0 / k_m_s;
    2.0 * gradient / (inv_k + (inv_k * inv_k + 4.0 * beta_s2_m2 * gradient.abs()).sqrt())
}

/// Grain Reynolds number Re = ρ |q| d / μ [-], built on the Darcy flux (not the pore
/// velocity).
///
/// The caller chooses d (d50 or d10) and should say which. Darcy's law is usually taken
/// as valid up to Re ≈ 1–10 (Bear 1972; the bound depends on the author — from memory,
/// verify).
pub fn grain_reynolds(q_m_s: f64, d_m: f64, water: &Water) -> f64 {
    water.density_kg_m3 * q_m_s.abs() * d_m / water.viscosity_pa_s
}

/// Hydraulic radius of a packing of spheres \[m\]: pore volume over wetted grain surface.
///
/// ```text
/// R_h = n d / (6 (1 − n))
/// ```
///
/// Kozeny's capillary model: pore volume n per unit bulk volume, grain surface
/// (1 − n) 6/d. For non-spherical grains pass d = ψ d.
pub fn hydraulic_radius(d_m: f64, porosity: f64) -> f64 {
    porosity * d_m / (6.0 * (1.0 - porosity))
}

/// Mean shear stress of the pore water on the grains \[Pa\] for the local gradient
/// `gradient` = |dh/dr| [-].
///
/// ```text
/// τ = ρ g i R_h = ρ g i n d / (6 (1 − n))
/// ```
///
/// Force balance on the pore water of a unit bulk volume: driving force n ρ g i against
/// wall friction τ (1 − n) 6/d. Use the actual gradient (with the Forchheimer term when
/// present), so inertial drag is included. A bulk mean: local wall stresses at pore throats
/// are higher, and any threshold for cake erosion or fines mobilisation must be calibrated.
pub fn shear_proxy_pa(gradient: f64, d_m: f64, porosity: f64, water: &Water) -> f64 {
    water.density_kg_m3 * GRAVITY_M_S2 * gradient.abs() * hydraulic_radius(d_m, porosity)
}

/// Alternative shear scale \[Pa\]: τ' = μ |q| / √k, with √k as the pore length scale.
///
/// ```text
/// τ' = μ |q| / √k
/// q: Darcy flux [m/s], k: intrinsic permeability [m²]
/// ```
///
/// A dimensional scaling with an undetermined O(1) prefactor, and it misses inertial drag.
/// With Kozeny–Carman k and Darcy flow, [`shear_proxy_pa`] = √(5/n) τ'. Report it, if at
/// all, as a secondary number.
pub fn shear_proxy_alt(q_m_s: f64, k_m2: f64, water: &Water) -> f64 {
    water.viscosity_pa_s * q_m_s.abs() / k_m2.sqrt()
}

/// Conductivity estimates for a granular pack, and the one chosen with the reason.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ConductivityEstimate {
    /// Kozeny–Carman conductivity on the chosen diameter, shape applied [m/s].
    pub kozeny_carman: f64,
    /// Hazen conductivity on d10 with C = [`HAZEN_DEFAULT_COEFFICIENT`] [m/s].
    pub hazen: f64,
    /// Note when the Hazen estimate is outside its stated validity.
    pub hazen_note: Option<&'static str>,
    /// Ergun (viscous term) conductivity on the chosen diameter, shape applied [m/s].
    pub ergun: f64,
    /// The value to use [m/s]: equal to `kozeny_carman`.
    pub chosen: f64,
    /// Grain diameter the chosen estimate is built on, before the shape factor \[m\].
    pub diameter_m: f64,
    /// Uniformity coefficient d60/d10 used in the choice, when known.
    pub uniformity: Option<f64>,
    /// Why this diameter was chosen.
    pub basis: &'static str,
}

/// Estimate the hydraulic conductivity of a granular pack from its gradation.
///
/// Rule (this module's choice):
///
/// ```text
/// Cu = d60/d10
/// Cu ≤ 2.5 (well sorted):      K = K_KC(ψ d50)
/// Cu > 2.5 (poorly sorted):    K = K_KC(ψ d10)
/// Cu unknown (no d60):         K = K_KC(ψ d10)
/// K_KC(d) = (d² n³ / (180 (1 − n)²)) ρ g / μ
/// ```
///
/// Why: Kozeny–Carman rests on the specific surface of the grains. In a well-sorted medium
/// d10 and d50 are close and the median is the representative size. In a poorly sorted one
/// the fines fill the pores of the coarse frame and carry most of the surface, so the fine
/// fraction governs; d10 is Hazen's "effective size" for that reason. With d60 unknown,
/// sorting cannot be judged and the lower (d10) estimate is kept. The 2.5 threshold is the
/// usual uniformity limit for filter packs ([`WELL_SORTED_UNIFORMITY_MAX`]).
///
/// Hazen (on d10, C = 100) and Ergun (150 instead of 180, on the chosen diameter) are
/// returned for comparison. Ergun's viscous term gives 180/150 = 1.2 times the
/// Kozeny–Carman value. All are estimates, good to a factor of about two at best; a
/// measured K overrides them.
pub fn estimate_pack_conductivity(
    gradation: &Gradation,
    porosity: f64,
    shape: GrainShape,
    water: &Water,
) -> ConductivityEstimate {
    let uniformity = gradation.uniformity_coefficient();
    let (diameter_m, basis) = match uniformity {
        Some(cu) if cu <= WELL_SORTED_UNIFORMITY_MAX => (
            gradation.d50_m,
            "well sorted (d60/d10 <= 2.5): Kozeny-Carman on the median size d50",
        ),
        Some(_) => (
            gradation.d10_m,
            "poorly sorted (d60/d10 > 2.5): governed by the fine fraction, Kozeny-Carman on d10",
        ),
        None => (
            gradation.d10_m,
            "sorting unknown (no d60): Kozeny-Carman on d10, the lower estimate",
        ),
    };
    let psi = shape.sphericity();
    let kozeny_carman = kozeny_carman_conductivity(diameter_m, porosity, psi, water);
    let ergun = ergun_conductivity(shape.effective_diameter(diameter_m), porosity, water);
    ConductivityEstimate {
        kozeny_carman,
        hazen: hazen_conductivity(gradation.d10_m, HAZEN_DEFAULT_COEFFICIENT),
        hazen_note: hazen_validity_note(gradation.d10_m, uniformity),
        ergun,
        chosen: kozeny_carman,
        diameter_m,
        uniformity,
        basis,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Water at 20 °C as printed in docs/physics.md §4.2/§5.3 (computed there with iapws.IAPWS95).
    const WATER_20C: Water = Water {
        density_kg_m3: 998.207_150,
        viscosity_pa_s: 1.001_596_1e-3,
    };

    /// Rows (d, n, K_Ergun, k_Ergun, β, K_KC) of the Ergun table; Ergun 1952 and
    /// Kozeny–Carman formulas, values computed with numpy (docs/physics.md §4.2).
    const ERGUN_ROWS: [(f64, f64, f64, f64, f64, f64); 4] = [
        (
            2e-3,
            0.35,
            2.644_812e-2,
            2.706_114e-9,
            1.352_685e3,
            2.204_010e-2,
        ),
        (
            1e-3,
            0.35,
            6.612_031e-3,
            6.765_286e-10,
            2.705_370e3,
            5.510_026e-3,
        ),
        (
            2e-4,
            0.35,
            2.644_812e-4,
            2.706_114e-11,
            1.352_685e4,
            2.204_010e-4,
        ),
        (
            2e-3,
            0.30,
            1.436_101e-2,
            1.469_388e-9,
            2.313_245e3,
            1.196_751e-2,
        ),
    ];

    /// 7 printed significant digits: half a unit of the last digit is at most 5e-7
    /// relative.
    const SEVEN_DIGITS: f64 = 1e-6;

    fn rel(a: f64, b: f64) -> f64 {
        (a - b).abs() / b.abs()
    }

    #[test]
    fn ergun_coefficients_work() {
        // Ergun 1952 formula; values computed with numpy (docs/physics.md §4.2).
        for &(d, n, k_cond, k_perm, beta, _) in &ERGUN_ROWS {
            assert!(
                rel(ergun_conductivity(d, n, &WATER_20C), k_cond) < SEVEN_DIGITS,
                "d={d}"
            );
            assert!(
                rel(ergun_permeability(d, n), k_perm) < SEVEN_DIGITS,
                "d={d}"
            );
            assert!(rel(ergun_beta(d, n), beta) < SEVEN_DIGITS, "d={d}");
        }
    }

    #[test]
    fn kozeny_carman_conductivity_works() {
        // Kozeny–Carman with constant 180; values computed with numpy (docs/physics.md §4.2).
        for &(d, n, .., k_kc) in &ERGUN_ROWS {
            let got = kozeny_carman_conductivity(d, n, 1.0, &WATER_20C);
            assert!(rel(got, k_kc) < SEVEN_DIGITS, "d={d}");
        }
        // k for d = 0.2 mm, n = 0.35; computed (docs/physics.md §5.2).
        assert!(rel(kozeny_carman_permeability(2e-4, 0.35, 1.0), 2.255_095e-11) < SEVEN_DIGITS);
    }

    #[test]
    fn sphericity_scales_the_diameter() {
        // Documented convention: ψ enters as d_eff = ψ d, so KC with (d, ψ) equals KC with
        // (ψ d, 1). Checked against the 2 mm row of docs/physics.md §4.2 (computed with numpy):
        // ψ = 0.5 on 2 mm must equal the 1 mm row.
        let got = kozeny_carman_conductivity(2e-3, 0.35, 0.5, &WATER_20C);
        assert!(rel(got, 5.510_026e-3) < SEVEN_DIGITS);
        let shape = GrainShape::Custom(0.5);
        assert!(
            rel(
                ergun_beta(shape.effective_diameter(2e-3), 0.35),
                2.705_370e3
            ) < SEVEN_DIGITS
        );
        assert_eq!(GrainShape::Spheres.effective_diameter(1.3e-3), 1.3e-3);
    }

    #[test]
    fn grain_shape_classes_are_ordered() {
        // The classes run from round to angular, so sphericity must fall along the list
        // and stay in (0, 1] (definition of sphericity).
        let classes = [
            GrainShape::Spheres,
            GrainShape::RoundedBeads,
            GrainShape::SubroundedSand,
            GrainShape::SubangularSand,
            GrainShape::AngularCrushed,
        ];
        for pair in classes.windows(2) {
            assert!(pair[0].sphericity() > pair[1].sphericity());
        }
        for c in classes {
            assert!(c.sphericity() > 0.0 && c.sphericity() <= 1.0);
        }
    }

    #[test]
    fn ergun_to_kozeny_carman_ratio_is_180_over_150() {
        // Same n³d²/(1−n)² structure, constants 150 (Ergun 1952) and 180 (Carman 1937):
        // the ratio is exactly 1.2 (docs/physics.md §5.2).
        let ratio = ergun_conductivity(7e-4, 0.31, &WATER_20C)
            / kozeny_carman_conductivity(7e-4, 0.31, 1.0, &WATER_20C);
        assert!((ratio - 1.2).abs() < 1e-14);
    }

    #[test]
    fn hazen_conductivity_works() {
        // Hazen formula; values computed (docs/physics.md §5.1), K in m/s for C = 40, 100, 150.
        let rows = [
            (0.1e-3, [4.0e-5, 1.0e-4, 1.5e-4]),
            (0.2e-3, [1.6e-4, 4.0e-4, 6.0e-4]),
            (0.5e-3, [1.0e-3, 2.5e-3, 3.75e-3]),
        ];
        for (d10, ks) in rows {
            for (c, k) in [40.0, 100.0, 150.0].into_iter().zip(ks) {
                assert!(
                    rel(hazen_conductivity(d10, c), k) < 1e-12,
                    "d10={d10}, C={c}"
                );
            }
        }
    }

    #[test]
    fn hazen_validity_note_works() {
        // Stated validity 0.1 mm < d10 < 3 mm, Cu < 5 (docs/physics.md §5.1, from memory).
        assert_eq!(hazen_validity_note(0.2e-3, Some(2.0)), None);
        assert_eq!(hazen_validity_note(0.2e-3, None), None);
        assert!(hazen_validity_note(0.05e-3, Some(2.0))
            .unwrap()
            .contains("d10"));
        assert!(hazen_validity_note(4e-3, Some(2.0))
            .unwrap()
            .contains("d10"));
        assert!(hazen_validity_note(0.2e-3, Some(5.0))
            .unwrap()
            .contains("uniformity"));
    }

    #[test]
    fn forchheimer_flux_from_gradient_works() {
        // Stable root; check value computed (docs/physics.md §4.1) from the printed K and β.
        // 10 printed digits: tolerance 1e-9 relative.
        let (k, beta, i) = (2.644_812e-2, 1_352.685, 0.1);
        let q = forchheimer_flux_from_gradient(i, k, beta);
        assert!(rel(q, 2.433_031_095e-3) < 1e-9);
        // Inversion: q/K + β q² returns 0.1 (computed, docs/physics.md §4.1); round-off only.
        assert!(rel(forchheimer_gradient(q, k, beta), i) < 1e-13);
        // The sign follows the gradient (odd function).
        assert_eq!(forchheimer_flux_from_gradient(-i, k, beta), -q);
        assert!(rel(forchheimer_gradient(-q, k, beta), -i) < 1e-13);
    }

    #[test]
    fn forchheimer_reduces_to_darcy() {
        // β = 0 is Darcy's law q = K i exactly; with tiny β·K·q the root form must not
        // lose digits to cancellation (round-off only).
        assert!(rel(forchheimer_flux_from_gradient(0.3, 1e-4, 0.0), 3e-5) < 1e-15);
        let q = forchheimer_flux_from_gradient(1e-3, 1e-5, 1e-3);
        assert!(rel(q, 1e-8) < 1e-12);
    }

    #[test]
    fn viscous_and_inertial_terms_balance_at_derived_reynolds() {
        // Viscous and inertial Ergun terms are equal at q = 1/(K β), where
        // Re = 150 (1 − n)/1.75 = 55.71 for n = 0.35 (derived, docs/physics.md §4.2).
        let (d, n) = (2e-3, 0.35);
        let k = ergun_conductivity(d, n, &WATER_20C);
        let q = 1.0 / (k * ergun_beta(d, n));
        let re = grain_reynolds(q, d, &WATER_20C);
        assert!(rel(re, 150.0 * (1.0 - n) / 1.75) < 1e-13);
        assert!((re - 55.71).abs() < 5e-3);
    }

    #[test]
    fn grain_reynolds_works() {
        // Q = 0.01 m³/s, b = 10 m, r = 0.1 m, d = 2 mm, 20 °C: Re = 3.172329 (computed,
        // docs/physics.md §4.4). 7 printed digits.
        let q = 0.01 / (2.0 * std::f64::consts::PI * 0.1 * 10.0);
        assert!(rel(q, 1.591_549e-3) < SEVEN_DIGITS);
        assert!(rel(grain_reynolds(q, 2e-3, &WATER_20C), 3.172_329) < SEVEN_DIGITS);
        assert_eq!(
            grain_reynolds(-q, 2e-3, &WATER_20C),
            grain_reynolds(q, 2e-3, &WATER_20C)
        );
    }

    #[test]
    fn shear_proxies_work() {
        // Rows (d, q, i, R_h, τ_Rh, μq/√k) for n = 0.35, water at 20 °C, KC permeability;
        // computed with numpy (docs/physics.md §6.2). τ_Rh prints 7 digits (the 7.971888 row).
        let n = 0.35;
        let rows = [
            (
                2e-4,
                1e-3,
                4.537_184,
                1.794_872e-5,
                7.971_888e-1,
                2.109_163e-1,
            ),
            (
                2e-3,
                1e-3,
                4.537_184e-2,
                1.794_872e-4,
                7.971_888e-2,
                2.109_163e-2,
            ),
            (2e-4, 1e-2, 4.537_184e1, 1.794_872e-5, 7.971_888, 2.109_163),
        ];
        for (d, q, i, r_h, tau, tau_alt) in rows {
            let k_cond = kozeny_carman_conductivity(d, n, 1.0, &WATER_20C);
            let grad = forchheimer_gradient(q, k_cond, 0.0);
            assert!(rel(grad, i) < SEVEN_DIGITS, "d={d}, q={q}");
            assert!(rel(hydraulic_radius(d, n), r_h) < SEVEN_DIGITS, "d={d}");
            let got = shear_proxy_pa(grad, d, n, &WATER_20C);
            assert!(rel(got, tau) < SEVEN_DIGITS, "d={d}, q={q}");
            let k = kozeny_carman_permeability(d, n, 1.0);
            let got_alt = shear_proxy_alt(q, k, &WATER_20C);
            assert!(rel(got_alt, tau_alt) < SEVEN_DIGITS, "d={d}, q={q}");
            // Ratio √(5/n) = 3.779645 for n = 0.35 (computed, docs/physics.md §6.2).
            assert!(rel(got / got_alt, 3.779_645) < SEVEN_DIGITS);
        }
    }

    #[test]
    fn estimate_pack_conductivity_well_sorted() {
        // Cu = 1.75 ≤ 2.5: KC on d50 = 2 mm, spheres, n = 0.35 → 2.204010e-2 m/s
        // (KC column, computed with numpy, docs/physics.md §4.2); Ergun K 2.644812e-2 (same row);
        // Hazen on d10 = 1.2 mm with C = 100 → 1e-4 × 100 × 1.2² = 1.44e-2 m/s (Hazen SI
        // form, docs/physics.md §5.1; plain arithmetic).
        let g = Gradation {
            d10_m: 1.2e-3,
            d50_m: 2e-3,
            d60_m: Some(2.1e-3),
        };
        let e = estimate_pack_conductivity(&g, 0.35, GrainShape::Spheres, &WATER_20C);
        assert!(rel(e.chosen, 2.204_010e-2) < SEVEN_DIGITS);
        assert_eq!(e.chosen, e.kozeny_carman);
        assert!(rel(e.ergun, 2.644_812e-2) < SEVEN_DIGITS);
        assert!(rel(e.hazen, 1.44e-2) < 1e-12);
        assert_eq!(e.hazen_note, None);
        assert_eq!(e.diameter_m, 2e-3);
        assert!(e.basis.starts_with("well sorted"));
        assert!(rel(e.uniformity.unwrap(), 1.75) < 1e-15);
    }

    #[test]
    fn estimate_pack_conductivity_poorly_sorted() {
        // Cu = 3.5 > 2.5: KC on d10 = 0.2 mm, spheres, n = 0.35 → 2.204010e-4 m/s
        // (computed with numpy, docs/physics.md §4.2); Hazen 4.0e-4 m/s for C = 100
        // (computed, docs/physics.md §5.1).
        let g = Gradation {
            d10_m: 2e-4,
            d50_m: 6e-4,
            d60_m: Some(7e-4),
        };
        let e = estimate_pack_conductivity(&g, 0.35, GrainShape::Spheres, &WATER_20C);
        assert!(rel(e.chosen, 2.204_010e-4) < SEVEN_DIGITS);
        assert!(rel(e.hazen, 4.0e-4) < 1e-12);
        assert_eq!(e.diameter_m, 2e-4);
        assert!(e.basis.starts_with("poorly sorted"));
        // Cu ≥ 5 is outside Hazen's stated range (docs/physics.md §5.1).
        let wide = Gradation {
            d60_m: Some(1.2e-3),
            ..g
        };
        let e = estimate_pack_conductivity(&wide, 0.35, GrainShape::Spheres, &WATER_20C);
        assert!(e.hazen_note.is_some());
    }

    #[test]
    fn estimate_pack_conductivity_without_d60_and_with_shape() {
        // No d60: d10 is used (documented rule). Shape ψ = 0.5 on d10 = 2 mm equals the
        // 1 mm sphere row: KC 5.510026e-3, Ergun 6.612031e-3 m/s (computed with numpy,
        // docs/physics.md §4.2).
        let g = Gradation {
            d10_m: 2e-3,
            d50_m: 3e-3,
            d60_m: None,
        };
        let e = estimate_pack_conductivity(&g, 0.35, GrainShape::Custom(0.5), &WATER_20C);
        assert!(rel(e.chosen, 5.510_026e-3) < SEVEN_DIGITS);
        assert!(rel(e.ergun, 6.612_031e-3) < SEVEN_DIGITS);
        assert_eq!(e.uniformity, None);
        assert!(e.basis.starts_with("sorting unknown"));
    }
}
