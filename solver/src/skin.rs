//! Skin factors of the near-well zones, well efficiency and specific capacity, and the
//! step-drawdown analysis.
//!
//! A skin factor s (dimensionless) expresses the extra steady head loss of a near-well zone
//! as `Δh = Q s / (2π T)`, with T = K_f b the formation transmissivity. All skins here are
//! referred to the formation conductivity K_f and the screen radius r_w, so they add
//! ([`composite_skin`]). Positive skin is damage; negative skin (e.g. a pack more
//! conductive than the formation) is improvement.
//!
//! ```text
//! zones from the axis:  screen r_w | pack | cake at r_b | invaded zone | r_d | formation → R
//! ```

use std::f64::consts::PI;

/// Skin of a ring r_inner..r_outer of conductivity `k_zone` that replaces formation of
/// conductivity `k_formation` (Hawkins 1956) [-].
///
/// ```text
/// s = (K_f / K_s − 1) ln(r_outer / r_inner)
/// ```
///
/// Hawkins, M.F. Jr., 1956, "A note on the skin effect", Trans. AIME 207, 356–357 (from
/// memory — verify). The ring's steady head loss Q ln(r_o/r_i)/(2π b K_s) minus that of
/// formation in the same place, written as Q s/(2π K_f b).
pub fn hawkins_skin(k_formation: f64, k_zone: f64, r_inner: f64, r_outer: f64) -> f64 {
    (k_formation / k_zone - 1.0) * (r_outer / r_inner).ln()
}

/// Skin of a thin wall cake treated as an interface resistance at r_b [-].
///
/// ```text
/// s_c = (K_f / K_c) δ_c / r_b
/// δ_c: cake thickness [m], K_c: cake conductivity [m/s], r_b: borehole radius [m]
/// ```
///
/// From the cake head jump Δh_c = Q δ_c/(2π r_b b K_c) set equal to Q s_c/(2π K_f b). The
/// Hawkins formula for a ring r_b − δ_c..r_b tends to (K_f/K_c − 1) δ_c/r_b as δ_c → 0,
/// which equals s_c when K_c ≪ K_f.
pub fn thin_cake_skin(k_formation: f64, k_cake: f64, thickness: f64, r_b: f64) -> f64 {
    k_formation * thickness / (k_cake * r_b)
}

/// Skin of a cake that covers only the fraction `coverage` (0..=1) of the borehole wall [-].
///
/// Model: the wall layer of thickness δ_c is two sets of patches side by side. Covered
/// patches hold cake (K_c). Uncovered patches hold the material the cake would otherwise
/// displace, of conductivity `k_displaced` (the pack, or the formation); they add no
/// resistance beyond what the cake-free well has. Flow crosses the layer normally, so the
/// patches conduct in parallel and their conductances per unit area, K/δ_c, are weighted by
/// area:
///
/// ```text
/// K_eff = f K_c + (1 − f) K_o                     (area-weighted conductance × δ_c)
/// excess resistance per unit wall area:  δ_c / K_eff − δ_c / K_o        [s]
/// ΔR = that / (2π r_b b),   s = 2π K_f b ΔR
/// s_c,eff = (K_f δ_c / r_b) (1/K_eff − 1/K_o)
/// f: coverage [-], K_o: displaced-material conductivity [m/s]
/// ```
///
/// Limits: f = 0 gives 0. f = 1 gives (K_f/K_c − K_f/K_o) δ_c/r_b, the strict form for a
/// cake sitting in material of conductivity K_o; it differs from [`thin_cake_skin`] by the
/// relative amount K_c/K_o (negligible for a real cake). With K_c ≪ K_o,
/// `s_c,eff ≈ s_c · f K_c / (f K_c + (1 − f) K_o)`, so a few percent of open wall already
/// removes most of the cake skin.
///
/// The parallel-patch model ignores the resistance of flow converging laterally towards the
/// openings, which depends on their size and spacing. It is therefore a lower bound on the
/// skin of a patchy cake; the fully covered value [`thin_cake_skin`] is the upper bound.
pub fn patchy_cake_skin(
    k_formation: f64,
    k_cake: f64,
    k_displaced: f64,
    thickness: f64,
    r_b: f64,
    coverage: f64,
) -> f64 {
    let f = coverage;
    let k_eff = f * k_cake + (1.0 - f) * k_displaced;
    k_formation * thickness / r_b * (1.0 / k_eff - 1.0 / k_displaced)
}

/// Radii and conductivities of the near-well zones, for [`composite_skin`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SkinZones {
    /// Screen outer radius r_w, inner edge of the pack \[m\].
    pub screen_radius_m: f64,
    /// Borehole radius r_b, pack/formation boundary where the cake sits \[m\].
    pub borehole_radius_m: f64,
    /// Outer radius r_d of the invaded zone \[m\]; equal to r_b when there is none.
    pub invaded_radius_m: f64,
    /// Pack conductivity K_p [m/s].
    pub pack_conductivity_m_s: f64,
    /// Cake thickness δ_c \[m\]; 0 when there is no cake.
    pub cake_thickness_m: f64,
    /// Cake conductivity K_c [m/s] (unused when the thickness is 0).
    pub cake_conductivity_m_s: f64,
    /// Invaded-zone conductivity K_d [m/s] (unused when r_d = r_b).
    pub invaded_conductivity_m_s: f64,
    /// Formation conductivity K_f [m/s]; all skins refer to it.
    pub formation_conductivity_m_s: f64,
}

/// Skin of each near-well zone and their sum [-].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SkinBreakdown {
    /// Pack skin, (K_f/K_p − 1) ln(r_b/r_w): negative for a pack more conductive than the
    /// formation.
    pub pack: f64,
    /// Cake skin K_f δ_c/(K_c r_b), fully covering cake.
    pub cake: f64,
    /// Invaded-zone skin (K_f/K_d − 1) ln(r_d/r_b).
    pub invaded: f64,
    /// Sum of the three.
    pub total: f64,
}

/// Composite skin of pack, cake and invaded zone, all referred to K_f and r_w [-].
///
/// ```text
/// s_pack = (K_f/K_p − 1) ln(r_b/r_w)
/// s_cake = K_f δ_c / (K_c r_b)
/// s_inv  = (K_f/K_d − 1) ln(r_d/r_b)
/// s_tot  = s_pack + s_cake + s_inv
/// ```
///
/// The zones are in series, so their steady resistances add; each is written relative to
/// formation in the same place (Hawkins 1956; thin cake as [`thin_cake_skin`]). For a
/// partly covering cake, replace `cake` by [`patchy_cake_skin`] and add up again.
pub fn composite_skin(zones: &SkinZones) -> SkinBreakdown {
    let k_f = zones.formation_conductivity_m_s;
    let r_b = zones.borehole_radius_m;
    let pack = hawkins_skin(k_f, zones.pack_conductivity_m_s, zones.screen_radius_m, r_b);
    let cake = if zones.cake_thickness_m > 0.0 {
        thin_cake_skin(
            k_f,
            zones.cake_conductivity_m_s,
            zones.cake_thickness_m,
            r_b,
        )
    } else {
        0.0
    };
    let invaded = if zones.invaded_radius_m > r_b {
        hawkins_skin(
            k_f,
            zones.invaded_conductivity_m_s,
            r_b,
            zones.invaded_radius_m,
        )
    } else {
        0.0
    };
    SkinBreakdown {
        pack,
        cake,
        invaded,
        total: pack + cake + invaded,
    }
}

/// Steady-state well efficiency [-]: ideal formation drawdown over the actual drawdown at
/// the well face, screen losses excluded.
///
/// ```text
/// E = ln(R/r_w) / (ln(R/r_w) + s_tot)
/// R: outer (radius-of-influence) radius [m], r_w: screen radius [m], s_tot: total skin [-]
/// ```
///
/// This is the definition the tool reports. Others are in use, e.g. the step-test ratio
/// B Q / s_w of [`jacob_efficiency`]; say which one a report shows.
pub fn efficiency(r_outer: f64, rw: f64, s_total: f64) -> f64 {
    let ideal = (r_outer / rw).ln();
    ideal / (ideal + s_total)
}

/// Effective well radius r_w e^(−s) \[m\]: the radius of a skin-free well with the same
/// steady drawdown.
pub fn effective_radius(rw: f64, s_total: f64) -> f64 {
    rw * (-s_total).exp()
}

/// Steady (Thiem) specific capacity Q/s_w [m²/s] of a well with skin.
///
/// ```text
/// Q / s_w = 2π T / (ln(R/r_w) + s)
/// T: transmissivity [m²/s], R: outer radius [m], r_w: screen radius [m], s: skin [-]
/// ```
///
/// Thiem 1906 (from memory — verify), with the skin head loss Q s/(2π T) added.
pub fn thiem_specific_capacity(transmissivity: f64, r_outer: f64, rw: f64, skin: f64) -> f64 {
    2.0 * PI * transmissivity / ((r_outer / rw).ln() + skin)
}

/// Least-squares fit of a step-drawdown test, s_w = B Q + C Q², as the straight line
/// s_w/Q = B + C Q (Jacob 1947).
///
/// ```text
/// x_j = Q_j,  y_j = s_j / Q_j
/// C = Σ (x − x̄)(y − ȳ) / Σ (x − x̄)²,   B = ȳ − C x̄
/// B [s/m²]: aquifer loss plus linear (laminar) well loss; C [s²/m⁵]: non-linear loss
/// ```
///
/// Jacob, C.E., 1947, "Drawdown test to determine effective radius of artesian well",
/// Trans. ASCE 112 (pages from memory — verify). `q` are the step rates [m³/s], `s` the
/// drawdowns \[m\] at equal step durations. Returns `(B, C)`, or `None` when the slices
/// differ in length, a rate is zero, or fewer than two distinct rates are given. For
/// standard errors, intervals and steps not at equilibrium see [`crate::steptest`].
pub fn step_drawdown_fit(q: &[f64], s: &[f64]) -> Option<(f64, f64)> {
    if q.len() != s.len() || q.contains(&0.0) {
        return None;
    }
    let n = q.len() as f64;
    let x_mean = q.iter().sum::<f64>() / n;
    let y_mean = q.iter().zip(s).map(|(x, y)| y / x).sum::<f64>() / n;
    let (sxy, sxx) = q.iter().zip(s).fold((0.0, 0.0), |(sxy, sxx), (x, y)| {
        let dx = x - x_mean;
        (sxy + dx * (y / x - y_mean), sxx + dx * dx)
    });
    if sxx.is_nan() || sxx == 0.0 {
        return None;
    }
    let c = sxy / sxx;
    Some((y_mean - c * x_mean, c))
}

/// Step-test efficiency B Q / s_w = B Q / (B Q + C Q²) [-] at rate `q` (Jacob 1947;
/// Bierschenk 1963/64).
///
/// B includes the aquifer loss and every laminar skin (cake, invaded zone), so this ratio
/// overstates the efficiency when the damage is laminar. It is not the same quantity as
/// [`efficiency`].
pub fn jacob_efficiency(b: f64, c: f64, q: f64) -> f64 {
    b / (b + c * q)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Parameter set A (docs/physics.md §8a, invented verification case).
    const SET_A: SkinZones = SkinZones {
        screen_radius_m: 0.1,
        borehole_radius_m: 0.2,
        invaded_radius_m: 0.5,
        pack_conductivity_m_s: 5e-3,
        cake_thickness_m: 2e-3,
        cake_conductivity_m_s: 1e-6,
        invaded_conductivity_m_s: 5e-5,
        formation_conductivity_m_s: 1e-4,
    };
    /// Set A: screened thickness b \[m\] and outer radius R \[m\] (docs/physics.md §8a).
    const SET_A_B_M: f64 = 10.0;
    const SET_A_R_M: f64 = 200.0;

    /// Values printed to 6 decimals: half a unit of the last place.
    const SIX_DECIMALS: f64 = 5e-7;

    #[test]
    fn composite_skin_works_for_set_a() {
        // Set A skins, computed with numpy (docs/physics.md §2.4).
        let s = composite_skin(&SET_A);
        assert!((s.pack - -0.679_284).abs() <= SIX_DECIMALS, "{}", s.pack);
        assert!((s.cake - 1.000_000).abs() <= SIX_DECIMALS, "{}", s.cake);
        assert!(
            (s.invaded - 0.916_291).abs() <= SIX_DECIMALS,
            "{}",
            s.invaded
        );
        assert!((s.total - 1.237_006).abs() <= SIX_DECIMALS, "{}", s.total);
    }

    #[test]
    fn efficiency_and_effective_radius_work_for_set_a() {
        // E = 0.860034 and rw_eff = 0.029025 m for set A, computed with numpy
        // (docs/physics.md §2.4).
        let s = composite_skin(&SET_A).total;
        let e = efficiency(SET_A_R_M, SET_A.screen_radius_m, s);
        assert!((e - 0.860_034).abs() <= SIX_DECIMALS, "{e}");
        let r_eff = effective_radius(SET_A.screen_radius_m, s);
        assert!((r_eff - 0.029_025).abs() <= SIX_DECIMALS, "{r_eff}");
        // No skin: efficiency 1 and the screen radius itself (definition).
        assert_eq!(efficiency(SET_A_R_M, 0.1, 0.0), 1.0);
        assert_eq!(effective_radius(0.1, 0.0), 0.1);
    }

    #[test]
    fn thiem_specific_capacity_works_for_set_a() {
        // Set A steady drawdowns at Q = 0.01 m³/s: 14.065969 m with all zones and
        // 12.097212 m for the formation alone, computed with numpy.log (docs/physics.md §8a);
        // 6 printed decimals. T = K_f b.
        let q = 0.01;
        let t = SET_A.formation_conductivity_m_s * SET_A_B_M;
        let s = composite_skin(&SET_A).total;
        let with_skin = q / thiem_specific_capacity(t, SET_A_R_M, 0.1, s);
        assert!(
            (with_skin - 14.065_969).abs() <= SIX_DECIMALS,
            "{with_skin}"
        );
        let ideal = q / thiem_specific_capacity(t, SET_A_R_M, 0.1, 0.0);
        assert!((ideal - 12.097_212).abs() <= SIX_DECIMALS, "{ideal}");
    }

    #[test]
    fn composite_skin_zones_can_be_absent() {
        // No cake (δ = 0) and no invaded zone (r_d = r_b): only the pack term remains,
        // whatever the unused conductivities are (documented behaviour).
        let zones = SkinZones {
            cake_thickness_m: 0.0,
            cake_conductivity_m_s: 0.0,
            invaded_radius_m: 0.2,
            invaded_conductivity_m_s: 0.0,
            ..SET_A
        };
        let s = composite_skin(&zones);
        assert_eq!((s.cake, s.invaded), (0.0, 0.0));
        assert_eq!(s.total, s.pack);
    }

    #[test]
    fn cake_interface_vs_ring_works() {
        // δ = 2 mm, r_b = 0.2 m, b = 10 m, K_c = 1e-6 m/s: interface resistance
        // R_c = 1.591549e+02 s/m² and ring resistance 1.599561e+02 s/m², 0.50 % higher;
        // computed with numpy.log (docs/physics.md §2.1). Resistance = skin/(2π K_f b) for the
        // skin, plus the formation's own ln(r_b/(r_b − δ))/(2π K_f b) for the ring, which
        // Hawkins writes relative to formation. 7 printed digits: 1e-6 relative.
        let (k_f, k_c, delta, r_b, b) = (1e-4, 1e-6, 2e-3, 0.2, 10.0);
        let per_skin = 1.0 / (2.0 * PI * k_f * b);
        let r_interface = thin_cake_skin(k_f, k_c, delta, r_b) * per_skin;
        assert!(
            (r_interface / 1.591_549e2 - 1.0).abs() < 1e-6,
            "{r_interface}"
        );
        let r_inner = r_b - delta;
        let ring_skin = hawkins_skin(k_f, k_c, r_inner, r_b);
        let r_ring = (ring_skin + (r_b / r_inner).ln()) * per_skin;
        assert!((r_ring / 1.599_561e2 - 1.0).abs() < 1e-6, "{r_ring}");
        assert!((r_ring / r_interface - 1.0 - 0.0050).abs() < 5e-5);
    }

    #[test]
    fn hawkins_skin_tends_to_thin_cake_skin() {
        // Derived in docs/physics.md §2.3: for a ring r_b − δ..r_b, Hawkins → (K_f/K_c − 1) δ/r_b
        // as δ → 0. The relative gap to s_c is K_c/K_f plus about δ/(2 r_b) from the ln.
        let (k_f, k_c, r_b) = (1e-4, 1e-8, 0.2);
        for delta in [1e-3, 1e-4, 1e-5] {
            let ring = hawkins_skin(k_f, k_c, r_b - delta, r_b);
            let s_c = thin_cake_skin(k_f, k_c, delta, r_b);
            let gap = (ring / s_c - 1.0).abs();
            assert!(gap < k_c / k_f + delta / r_b, "δ = {delta}: gap {gap}");
        }
    }

    #[test]
    fn hawkins_skin_sign_follows_contrast() {
        // Hawkins 1956 (docs/physics.md §2.2): damage (K_s < K_f) gives s > 0, a more
        // conductive ring s < 0, an equal ring exactly 0.
        assert!(hawkins_skin(1e-4, 1e-5, 0.1, 0.2) > 0.0);
        assert!(hawkins_skin(1e-4, 1e-2, 0.1, 0.2) < 0.0);
        assert_eq!(hawkins_skin(1e-4, 1e-4, 0.1, 0.2), 0.0);
    }

    #[test]
    fn patchy_cake_skin_limits_work() {
        // Derived limits (see the function doc): f = 1 gives the strict form
        // (K_f/K_c − K_f/K_o) δ/r_b of docs/physics.md §2.3, i.e. s_c (1 − K_c/K_o); f = 0 gives 0.
        // Set A cake on a set A pack (docs/physics.md §8a).
        let (k_f, k_c, k_p, delta, r_b) = (1e-4, 1e-6, 5e-3, 2e-3, 0.2);
        let s_c = thin_cake_skin(k_f, k_c, delta, r_b);
        let full = patchy_cake_skin(k_f, k_c, k_p, delta, r_b, 1.0);
        let strict = (k_f / k_c - k_f / k_p) * delta / r_b;
        assert!((full / strict - 1.0).abs() < 1e-14);
        assert!((full / s_c - (1.0 - k_c / k_p)).abs() < 1e-13);
        assert_eq!(patchy_cake_skin(k_f, k_c, k_p, delta, r_b, 0.0), 0.0);
        // f → 0: the skin vanishes linearly; to first order in f,
        // s ≈ f (K_f δ/r_b)(K_o − K_c)/K_o² (expansion of 1/K_eff).
        let small = patchy_cake_skin(k_f, k_c, k_p, delta, r_b, 1e-9);
        let first_order = 1e-9 * k_f * delta / r_b * (k_p - k_c) / (k_p * k_p);
        assert!((small / first_order - 1.0).abs() < 1e-6);
        // Monotone between the limits.
        let mut prev = 0.0;
        for i in 1..=10 {
            let s = patchy_cake_skin(k_f, k_c, k_p, delta, r_b, f64::from(i) / 10.0);
            assert!(s > prev);
            prev = s;
        }
    }

    #[test]
    fn patchy_cake_skin_matches_its_approximation() {
        // Derived (function doc): with K_c ≪ K_o, s_eff ≈ s_c f K_c/(f K_c + (1 − f) K_o).
        // Algebra gives exact/approximation = 1 − K_c/K_o for every f; round-off only.
        let (k_f, k_c, k_o, delta, r_b) = (1e-4, 1e-7, 1e-3, 2e-3, 0.2);
        let s_c = thin_cake_skin(k_f, k_c, delta, r_b);
        for f in [0.5, 0.9, 0.99, 0.999] {
            let approx = s_c * f * k_c / (f * k_c + (1.0 - f) * k_o);
            let got = patchy_cake_skin(k_f, k_c, k_o, delta, r_b, f);
            assert!((got / approx - (1.0 - k_c / k_o)).abs() < 1e-12, "f = {f}");
        }
    }

    #[test]
    fn step_drawdown_fit_works() {
        // Synthetic step test B = 100 s/m², C = 2000 s²/m⁵; numpy.linalg.lstsq of s/Q
        // against Q returns [100, 2000] exactly (docs/physics.md §9d). Tolerance: round-off of
        // the s/Q quotients, 1e-9 relative.
        let q = [0.005, 0.010, 0.015, 0.020];
        let s = [0.55, 1.20, 1.95, 2.80];
        let (b, c) = step_drawdown_fit(&q, &s).unwrap();
        assert!((b / 100.0 - 1.0).abs() < 1e-9, "{b}");
        assert!((c / 2000.0 - 1.0).abs() < 1e-9, "{c}");
        // Efficiency B Q / s_w per step, printed to 6 decimals (docs/physics.md §9d).
        let e = [0.909_091, 0.833_333, 0.769_231, 0.714_286];
        for (&qi, ei) in q.iter().zip(e) {
            assert!(
                (jacob_efficiency(b, c, qi) - ei).abs() <= SIX_DECIMALS,
                "Q = {qi}"
            );
        }
    }

    #[test]
    fn step_drawdown_fit_fails_on_invalid_input() {
        assert_eq!(step_drawdown_fit(&[0.01, 0.02], &[1.0]), None);
        assert_eq!(step_drawdown_fit(&[0.01, 0.01], &[1.0, 1.1]), None);
        assert_eq!(step_drawdown_fit(&[0.01], &[1.0]), None);
        assert_eq!(step_drawdown_fit(&[], &[]), None);
        assert_eq!(step_drawdown_fit(&[0.0, 0.01], &[0.0, 1.0]), None);
    }
}
