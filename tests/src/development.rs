//! Checks of the development physics: non-Darcy flow, screen entrance loss, grain-size
//! estimates, cake skin and erosion, energy with nonlinear losses, annulus width.

use crate::checks::{set_a, steady, Recorder};
use crate::models::homogeneous;
use crate::reference::{data, load, num, source};
use crate::CheckResult;
use boreflux_solver::drive::{Drive, SineHead, TableDrive, TableQuantity};
use boreflux_solver::faces::Face;
use boreflux_solver::media;
use boreflux_solver::model::{Cake, Erosion, Medium, Model, OuterBoundary, TimeSpec};
use boreflux_solver::skin::hawkins_skin;
use boreflux_solver::water::{Water, GRAVITY_M_S2};
use boreflux_solver::{run, Reporting};
use std::f64::consts::PI;

fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

/// A constant in-well head, m (a one-row table).
fn constant_head(h: f64) -> Drive {
    Drive::Table(TableDrive {
        times_s: vec![0.0, 1.0],
        values: vec![h, h],
        quantity: TableQuantity::Head,
        repeat: false,
    })
}

/// Steady radial Forchheimer flow at constant rate (docs/physics.md §4.3).
pub fn forchheimer() -> Vec<CheckResult> {
    let v = load(data::FORCHHEIMER);
    let src = source(&v);
    let mut out = Vec::new();
    for case in v["cases"].as_array().unwrap() {
        let p = |k: &str| num(case, &format!("/params/{k}"));
        let (r1, r2) = (p("r1"), p("r2"));
        let mut model = homogeneous(
            p("K"),
            1e-5,
            p("b"),
            r1,
            Drive::ConstantRate {
                pumping_rate_m3_s: p("Q"),
            },
            1.0,
        );
        model.pack.outer_radius_m = (r1 * r2).sqrt();
        model.pack.medium.forchheimer_beta_s2_m2 = p("beta");
        model.formation.medium.forchheimer_beta_s2_m2 = p("beta");
        model.formation.outer_radius_m = Some(r2);
        let st = steady(&model);
        let drop = -st.heads()[0];
        // The face laws integrate the Forchheimer law exactly over each half cell, so the
        // steady drop is exact up to the Newton tolerance (docs/physics.md §11: 1e-8).
        out.push(CheckResult::new(
            "development",
            format!(
                "steady Forchheimer head drop: {}",
                case["name"].as_str().unwrap_or("")
            ),
            &src,
            rel(drop, num(case, "/expected/total")),
            1e-8,
            "relative",
        ));
    }
    out
}

/// Ergun, Kozeny–Carman and Hazen estimates against the reference script.
pub fn grain_size() -> Vec<CheckResult> {
    let v = load(include_str!("../data/grain_size.json"));
    let src = source(&v);
    let water = Water {
        density_kg_m3: num(&v, "/params/rho_20"),
        viscosity_pa_s: num(&v, "/params/mu_20"),
    };
    let mut worst_ergun: f64 = 0.0;
    let mut worst_kc: f64 = 0.0;
    for row in v["ergun_kozeny_carman"].as_array().unwrap() {
        let (d, n) = (row["d"].as_f64().unwrap(), row["n"].as_f64().unwrap());
        worst_ergun = worst_ergun
            .max(rel(
                media::ergun_conductivity(d, n, &water),
                row["K_ergun"].as_f64().unwrap(),
            ))
            .max(rel(
                media::ergun_permeability(d, n),
                row["k_ergun"].as_f64().unwrap(),
            ))
            .max(rel(
                media::ergun_beta(d, n),
                row["beta_ergun"].as_f64().unwrap(),
            ));
        worst_kc = worst_kc.max(rel(
            media::kozeny_carman_conductivity(d, n, 1.0, &water),
            row["K_kozeny_carman"].as_f64().unwrap(),
        ));
    }
    let mut worst_hazen: f64 = 0.0;
    for row in v["hazen"].as_array().unwrap() {
        let d10 = row["d10_mm"].as_f64().unwrap() * 1e-3;
        worst_hazen = worst_hazen.max(rel(
            media::hazen_conductivity(d10, row["C"].as_f64().unwrap()),
            row["K"].as_f64().unwrap(),
        ));
    }
    // Issue #4: 1e-9 relative (same formula, round-off only).
    vec![
        CheckResult::new(
            "development",
            "Ergun K, k and β (worst of 4 rows)",
            &src,
            worst_ergun,
            1e-9,
            "relative",
        ),
        CheckResult::new(
            "development",
            "Kozeny–Carman K (worst of 4 rows)",
            &src,
            worst_kc,
            1e-9,
            "relative",
        ),
        CheckResult::new(
            "development",
            "Hazen K at C = 40, 100, 150 (worst)",
            &src,
            worst_hazen,
            1e-9,
            "relative",
        ),
    ]
}

/// The solver's steady cake head jump, as a skin, against Hawkins' ring formula.
pub fn cake_skin() -> Vec<CheckResult> {
    let v = load(data::THIEM);
    let mut model = set_a(&v);
    // A tight, thin cake: Hawkins' (K_f/K_c − 1) ln(r_b/(r_b − δ)) tends to K_f δ/(K_c r_b)
    // as δ/r_b → 0 and K_c/K_f → 0 (docs/physics.md §2.3); here both are below 3e-4.
    let (delta, kc) = (1e-4, 1e-9);
    model.cake = Some(Cake {
        thickness_m: delta,
        conductivity_m_s: kc,
        coverage: 1.0,
        erosion: None,
        lift_off: None,
    });
    let st = steady(&model);
    let h = st.heads();
    let kb = st.disc.grid.borehole_face;
    let face = &st.disc.faces[kb];
    let (q, _) = face.flow(h[kb] - h[kb + 1]);
    let jump = Face::segment_drop(&face.segments()[1], q);
    let kf = model.formation.medium.conductivity_m_s;
    let skin = 2.0 * PI * kf * model.well.screen_length_m * jump / q;
    let rb = model.pack.outer_radius_m;
    let want = hawkins_skin(kf, kc, rb - delta, rb);
    vec![CheckResult::new(
        "development",
        "thin-cake skin from the steady head jump vs Hawkins (1956)",
        "Hawkins, M.F. Jr., 1956, Trans. AIME 207, 356-357 (docs/physics.md §2.2-2.3)",
        rel(skin, want),
        1e-3, // issue #4: 0.1 %
        "relative",
    )]
}

/// Steady screen entrance loss against the orifice formula.
pub fn screen_loss() -> Vec<CheckResult> {
    let v = load(data::ORIFICE);
    let src = source(&v);
    let mut worst: f64 = 0.0;
    for row in v["rows"].as_array().unwrap() {
        let p = |k: &str| row[k].as_f64().unwrap();
        let mut model = homogeneous(
            1e-3,
            1e-5,
            p("L"),
            p("r_s"),
            Drive::ConstantRate {
                pumping_rate_m3_s: -p("Q"),
            },
            1.0,
        );
        model.well.open_area = p("A_o");
        model.well.discharge_coefficient = Some(p("Cd"));
        model.formation.outer_radius_m = Some(100.0);
        let st = steady(&model);
        let f = &st.disc.faces[0];
        let h = st.heads();
        let (q, _) = f.flow(h[0] - h[1]);
        let loss = Face::segment_drop(&f.segments()[0], q);
        worst = worst.max(rel(loss, p("dh_screen")));
    }
    // Issue #4: 0.1 %; the loss is integrated exactly, so only the Newton tolerance remains.
    vec![CheckResult::new(
        "development",
        "steady screen entrance loss (4 rows, worst)",
        &src,
        worst,
        1e-3,
        "relative",
    )]
}

/// Cake thinning under a constant head against the closed form of `solver::cake`.
pub fn erosion() -> Vec<CheckResult> {
    let water = Water::at_celsius(20.0);
    let b = 5.0;
    let (rs, rb) = (0.1, 0.2);
    let (kp, kc, delta0) = (5e-3, 1e-7, 2e-3);
    let h0 = 2.0;
    let erosion = Erosion {
        critical_shear_pa: 0.005,
        erodibility_m_s_pa: 2e-5,
        inward_weight: 1.0,
        outward_weight: 0.7,
        coverage_exponent: 0.0,
    };
    let mut model = homogeneous(1e-2, 1e-9, b, rs, constant_head(h0), 1.0);
    model.fluid = boreflux_solver::model::Fluid {
        density_kg_m3: water.density_kg_m3,
        viscosity_pa_s: water.viscosity_pa_s,
    };
    model.pack.outer_radius_m = rb;
    model.pack.medium = Medium {
        grain_diameter_m: Some(1.5e-3),
        porosity: 0.33,
        ..Medium::darcy(kp, 1e-9)
    };
    model.formation.outer_radius_m = Some(2.0);
    model.cake = Some(Cake {
        thickness_m: delta0,
        conductivity_m_s: kc,
        coverage: 1.0,
        erosion: Some(erosion),
        lift_off: None,
    });
    // Closed form (solver::cake docs): quasi-steady, outward flow, so w = outward_weight.
    let two_pi_b = 2.0 * PI * b;
    let r0 = ((rb / rs).ln() / kp + (2.0 / rb).ln() / 1e-2) / two_pi_b;
    let a = 1.0 / (two_pi_b * rb * kc);
    let r_h = 0.33 * 1.5e-3 / (6.0 * (1.0 - 0.33));
    let k_tau = water.density_kg_m3 * GRAVITY_M_S2 * r_h / (kp * two_pi_b * rb);
    let bb = erosion.outward_weight * k_tau * h0;
    let (tc, e) = (erosion.critical_shear_pa, erosion.erodibility_m_s_pa);
    let u0 = r0 + a * delta0;
    let t_of = |delta: f64| {
        let u = r0 + a * delta;
        ((u - u0) / tc + bb / (tc * tc) * ((bb - tc * u) / (bb - tc * u0)).ln()) / (a * e)
    };
    let t_half = t_of(0.5 * delta0);
    model.duration_s = t_half;
    // Explicit erosion update once per step: first order, so steps of t/4000 keep the
    // time-integration error near 1e-4.
    model.numerics.time = TimeSpec::Fixed(t_half / 4000.0);
    model.numerics.sync_times_s = vec![t_half];
    let sum = run(&model, &mut Recorder::at(&[]), Reporting::default()).expect("run");
    let src = "closed form t(δ) derived in solver::cake (separable ODE); quasi-steady check";
    vec![CheckResult::new(
        "development",
        "cake thickness at the closed-form half-life",
        src,
        rel(sum.cake_thickness_m.1, 0.5 * delta0),
        5e-3,
        "relative",
    )]
}

fn forchheimer_sine(b: f64) -> Model {
    let v = load(data::THIEM);
    let mut model = set_a(&v);
    let water = Water::at_celsius(20.0);
    let d = 2e-3;
    model.pack.medium = Medium {
        grain_diameter_m: Some(d),
        porosity: 0.35,
        forchheimer_beta_s2_m2: media::ergun_beta(d, 0.35),
        ..Medium::darcy(media::ergun_conductivity(d, 0.35, &water), 1e-5)
    };
    model.formation.medium.forchheimer_beta_s2_m2 = media::ergun_beta(3e-4, 0.3);
    model.well.discharge_coefficient = Some(0.6);
    model.well.open_area = 0.05;
    model.well.screen_length_m = b;
    model.drive = Drive::SineHead(SineHead {
        amplitude_m: 3.0,
        frequency_hz: 0.5,
        offset_m: 0.0,
        ramp_cycles: 2.0,
    });
    model.duration_s = 20.0;
    model.formation.outer_radius_m = None;
    model
}

/// Energy identity and volume balance with Forchheimer and entrance losses on.
pub fn nonlinear_energy() -> Vec<CheckResult> {
    let model = forchheimer_sine(2.0);
    let sum = run(&model, &mut Recorder::at(&[]), Reporting::default()).expect("run");
    let src = "discrete identities of the θ-stages in midpoint form (solver::stepper, TR-BDF2 by default; docs/physics.md §1.5, §7.3)";
    vec![
        CheckResult::new(
            "development",
            "energy identity over the run, Forchheimer + screen loss",
            src,
            sum.energy_closure,
            1e-6,
            "relative",
        ),
        CheckResult::new(
            "development",
            "largest per-step volume residual, Forchheimer + screen loss",
            src,
            sum.max_mass_residual,
            1e-10,
            "relative",
        ),
        CheckResult::new(
            "development",
            "largest Newton iteration count in a step (issue #4: ≤ 8)",
            src,
            sum.max_newton_iterations as f64,
            8.0,
            "count",
        ),
    ]
}

/// Dissipation density in the pack, W/m³, for a steady head difference across the pack,
/// from the solver (formation and cake conductive or not as given).
fn pack_energy_density(rs: f64, width: f64, cake: Option<Cake>, kf: f64) -> f64 {
    let mut model = homogeneous(kf, 1e-5, 1.0, rs, constant_head(1.0), 1.0);
    model.pack.outer_radius_m = rs + width;
    model.pack.medium = Medium::darcy(1e-3, 1e-5);
    model.cake = cake;
    model.formation.outer_radius_m = Some(2.0 * (rs + width));
    model.formation.outer_boundary = OuterBoundary::FixedHead;
    let st = steady(&model);
    let h = st.heads();
    let mut p = [0.0; 5];
    for (f, face) in st.disc.faces.iter().enumerate().take(h.len() - 1) {
        face.add_dissipation(h[f] - h[f + 1], &mut p);
    }
    let rb = rs + width;
    p[1] * 1000.0 * GRAVITY_M_S2 / (PI * (rb * rb - rs * rs))
}

/// Annulus width: the planar 1/L² limit and how far a radial, cake-controlled case departs.
pub fn annulus() -> Vec<CheckResult> {
    let src =
        "limit check: planar Darcy column, energy density ∝ 1/L² (common practice, no source)";
    // All resistance in the pack (formation 1e6 × more conductive) and r_s ≫ annulus: the
    // radial model should approach the planar ratio (80/100)² = 0.64; the radial terms
    // differ from it by O(w/r_s) = 1e-3.
    let big = 100.0;
    let ratio =
        pack_energy_density(big, 0.1, None, 1e3) / pack_energy_density(big, 0.08, None, 1e3);
    let planar = CheckResult::new(
        "development",
        format!("annulus 80 → 100 mm, r_s = {big} m, pack-controlled: ratio {ratio:.5} vs 0.64"),
        src,
        rel(ratio, 0.64),
        3e-3,
        "relative",
    );
    // Real screen radius, still pack-controlled: the radial formula (the formation, 1e6 ×
    // more conductive, adds ~1e-6 of the resistance, hence the 1e-5 tolerance)
    // P/V = 2 ρ g K ΔH² / (ln(r_b/r_s)(r_b² − r_s²)) gives the ratio exactly.
    let radial = |w: f64| 1.0 / ((1.0 + w / 0.1).ln() * ((0.1 + w).powi(2) - 0.01));
    let ratio_r =
        pack_energy_density(0.1, 0.1, None, 1e3) / pack_energy_density(0.1, 0.08, None, 1e3);
    let want_r = radial(0.1) / radial(0.08);
    let radial_check = CheckResult::new("development", format!("annulus 80 → 100 mm, r_s = 0.1 m, pack-controlled: ratio {ratio_r:.4} (radial formula {want_r:.4})"), "steady radial Darcy flow (Thiem 1906), derived", rel(ratio_r, want_r), 1e-5, "relative");
    // Cake-controlled: the flow is set by the cake, so widening the annulus barely changes
    // the flux; the pack's energy density then falls with its volume, not as 1/L².
    let cake = Some(Cake {
        thickness_m: 2e-3,
        conductivity_m_s: 1e-8,
        coverage: 1.0,
        erosion: None,
        lift_off: None,
    });
    let ratio_c =
        pack_energy_density(0.1, 0.1, cake, 1e-4) / pack_energy_density(0.1, 0.08, cake, 1e-4);
    let mut departs = CheckResult::new(
        "development",
        format!("annulus 80 → 100 mm, cake-controlled: ratio {ratio_c:.4}, departs from 0.64"),
        src,
        (ratio_c - 0.64).abs(),
        0.05,
        "absolute",
    );
    // This one passes when the cake-controlled case departs from the planar limit by more
    // than 0.05 (it is a demonstration that the hand rule does not hold there).
    departs.passed = departs.error > departs.tolerance;
    vec![planar, radial_check, departs]
}
