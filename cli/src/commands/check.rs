//! `boreflux check`: validate a case and print what the model derives from it, without
//! simulating — zone geometry, resistance of each zone and its share, skins, diffusivity
//! and penetration depth, grid and step — and, on request, how face flux and cake work
//! change with the annulus width (each width is simulated).

use super::{print_out, Failure};
use crate::args::CheckArgs;
use crate::case::{load_case, LoadedCase};
use crate::output::schema::check_json as K;
use crate::summary::G;
use anyhow::anyhow;
use boreflux_solver::cake::CakeState;
use boreflux_solver::grid::Zone;
use boreflux_solver::harmonic;
use boreflux_solver::model::Medium;
use boreflux_solver::periodic;
use boreflux_solver::run::{default_first_step, total_skin, DEFAULT_STEPS_PER_CYCLE};
use boreflux_solver::safety::CAUTION;
use boreflux_solver::slow::SlowState;
use boreflux_solver::system::Discretization;
use boreflux_solver::{run, Model, Reporting};
use serde_json::json;
use std::f64::consts::PI;

fn penetration_depth(m: &Medium, period: f64) -> f64 {
    (m.diffusivity_m2_s() * period / PI).sqrt()
}

/// Peak face flux and cake work per cycle for the model with the pack outer radius set to
/// r_s + width, over at most 5 cycles.
fn annulus_run(model: &Model, width: f64) -> Result<(f64, f64, f64), Failure> {
    let mut m = model.clone();
    let period = m
        .drive
        .period_s()
        .ok_or_else(|| Failure::Input(anyhow!("--annulus needs a periodic drive")))?;
    let delta = m.pack.outer_radius_m - m.well.screen_radius_m;
    m.pack.outer_radius_m = m.well.screen_radius_m + width;
    let cycles = (m.duration_s / period).floor().clamp(1.0, 5.0);
    m.duration_s = cycles * period;
    if let Some(c) = m.cake.as_mut() {
        c.erosion = None; // same cake in every variant
        c.lift_off = None;
    }
    if let Some(z) = m.invaded.as_mut() {
        z.fines = None; // same invaded zone in every variant
    }
    m.validate().map_err(|e| {
        Failure::Input(anyhow!(
            "annulus width {:.0} mm (was {:.0} mm): {e}",
            width * 1e3,
            delta * 1e3
        ))
    })?;
    let s = run(
        &m,
        &mut boreflux_solver::diagnostics::NullObserver,
        Reporting::default(),
    )
    .map_err(|e| Failure::Runtime(e.into()))?;
    let peak = s.peak_outward_flux_m_s.max(s.peak_inward_flux_m_s);
    Ok((
        peak,
        s.work_j[Zone::Cake as usize] / cycles,
        s.work_j[Zone::Pack as usize] / cycles,
    ))
}

fn parse_width(text: &str) -> Result<f64, Failure> {
    crate::units::parse_quantity(
        &serde_json::Value::String(text.trim().to_string()),
        crate::units::Quantity::Length,
    )
    .map_err(|e| Failure::Input(anyhow!("--annulus: {text}: {e}")))
}

/// Samples per period when the periodic state's peaks are read off.
const PERIODIC_SAMPLES: usize = 256;

/// Harmonics of a repeating head table kept by the harmonic method in `check`.
const PERIODIC_HARMONICS: usize = 32;

/// Most periods `check` time-steps for the periodic state by shooting (warm-up included).
const SHOOTING_MAX_PERIODS: usize = 200;

/// Most cell-steps `check` spends on the shooting: about 2 s at the 0.35 µs a cell-step
/// measured on the shipped swab case (1.24 M cell-steps in 0.42 s, 2026-12-04).
const SHOOTING_MAX_CELL_STEPS: usize = 5_000_000;

/// Fewest periods worth starting the shooting with (a ramp, the warm-up, a few Newton
/// iterations).
const SHOOTING_MIN_PERIODS: usize = 20;

/// The periodic steady state of the well as it stands (cake and fines frozen): by the
/// harmonic method for a linear case under a periodic prescribed head, else by Newton–shooting
/// on one period (`boreflux_solver::periodic`); period, peak screen flow and wall face flux
/// over a period, mean power per zone (and the shooting's work and defect); or why neither
/// applies.
fn periodic_state(m: &Model, cells: usize) -> Result<serde_json::Value, String> {
    let rho_g = m.fluid.density_kg_m3 * boreflux_solver::water::GRAVITY_M_S2;
    let area = 2.0 * PI * m.borehole_radius_m() * m.well.screen_length_m;
    let per_zone = |power: [f64; boreflux_solver::grid::ZONE_COUNT]| {
        Zone::ALL
            .iter()
            .map(|z| (z.name().to_string(), json!(rho_g * power[*z as usize])))
            .collect::<serde_json::Map<_, _>>()
    };
    let why_harmonic = match harmonic::solve(m, PERIODIC_HARMONICS) {
        Ok(sol) => {
            let p = sol.period_s();
            let wall = sol.disc.grid.borehole_face;
            let peak = |f: usize| {
                (0..PERIODIC_SAMPLES)
                    .map(|i| {
                        sol.face_flow_m3_s(f, p * i as f64 / PERIODIC_SAMPLES as f64)
                            .abs()
                    })
                    .fold(0.0, f64::max)
            };
            return Ok(json!({
                (K::PERIODIC_METHOD.key()): "harmonic",
                (K::PERIOD.key()): p,
                (K::PEAK_SCREEN_FLOW.key()): peak(0),
                (K::PEAK_WALL_FACE_FLUX.key()): peak(wall) / area,
                (K::MEAN_POWER.key()): per_zone(sol.mean_dissipation_m4_s()),
            }));
        }
        Err(why) => why,
    };
    // The work is capped (`Options::max_cycles`) so that `check` stays quick: at most
    // SHOOTING_MAX_PERIODS periods and SHOOTING_MAX_CELL_STEPS cell-steps in all.
    let base = periodic::Options::for_model(m);
    let per_period = (cells * base.steps_per_cycle).max(1);
    let opts = periodic::Options {
        max_cycles: SHOOTING_MAX_PERIODS.min(SHOOTING_MAX_CELL_STEPS / per_period),
        ..base
    };
    if opts.max_cycles < SHOOTING_MIN_PERIODS {
        return Err(format!(
            "harmonic method: {why_harmonic}; shooting: not run by `check`, one period is \
             {per_period} cell-steps ({cells} cells × {} steps) and `check` steps at most \
             {SHOOTING_MAX_CELL_STEPS} cell-steps",
            base.steps_per_cycle
        ));
    }
    match periodic::shoot(m, &SlowState::new(m), &opts) {
        Ok(s) => Ok(json!({
            (K::PERIODIC_METHOD.key()): "shooting",
            (K::PERIOD.key()): s.period_s,
            (K::PEAK_SCREEN_FLOW.key()): s.figures.peak_screen_flow_m3_s,
            (K::PEAK_WALL_FACE_FLUX.key()): s.figures.peak_wall_face_flux_m_s,
            (K::MEAN_POWER.key()): per_zone(s.figures.mean_dissipation_m4_s),
            (K::SHOOTING_STEPS.key()): s.steps_per_cycle,
            (K::SHOOTING_NEWTON.key()): s.newton_iterations,
            (K::SHOOTING_PERIODS.key()): s.cycles,
            (K::SHOOTING_DEFECT.key()): s.defect,
        })),
        Err(why) => Err(format!("harmonic method: {why_harmonic}; shooting: {why}")),
    }
}

/// Runs the command.
pub fn check(a: &CheckArgs) -> Result<(), Failure> {
    let case: LoadedCase =
        load_case(&a.case).map_err(|e| Failure::Input(anyhow!("{}: {e}", a.case.display())))?;
    let m = &case.model;
    let cake = m.cake.map(|c| CakeState {
        thickness_m: c.thickness_m,
        coverage: c.coverage,
    });
    let d = Discretization::new(m, cake);
    let g = &d.grid;
    let res = boreflux_solver::assess::checks::zone_resistances(&d);
    let total: f64 = res.iter().sum();
    let period = m.drive.slowest_period_s();
    let rs = m.well.screen_radius_m;
    let rb = m.borehole_radius_m();
    let rd = m.invaded_outer_radius_m();
    let kf = m.formation.medium.conductivity_m_s;
    let skin_pack = boreflux_solver::skin::hawkins_skin(kf, m.pack.medium.conductivity_m_s, rs, rb);
    let skin_inv = m.invaded.as_ref().map_or(0.0, |z| {
        boreflux_solver::skin::hawkins_skin(kf, z.medium.conductivity_m_s, rb, rd)
    });
    let skin_total = total_skin(m, cake);
    let step = match (m.numerics.time, period) {
        (boreflux_solver::model::TimeSpec::Fixed(dt), _) => format!("fixed {} s", G(dt, 4)),
        (boreflux_solver::model::TimeSpec::StepsPerCycle(n), Some(p)) => {
            format!("{n} per cycle ({} s)", G(p / n as f64, 4))
        }
        (_, Some(p)) => format!(
            "{DEFAULT_STEPS_PER_CYCLE} per cycle ({} s)",
            G(p / DEFAULT_STEPS_PER_CYCLE as f64, 4)
        ),
        _ => format!("geometric, first {} s", G(default_first_step(m), 3)),
    };
    let mut zones = vec![("pack", rs, rb, Some(m.pack.medium))];
    if let Some(z) = &m.invaded {
        zones.push(("invaded", rb, rd, Some(z.medium)));
    }
    zones.push((
        "formation",
        rd,
        g.outer_radius_m(),
        Some(m.formation.medium),
    ));
    let mut widths = Vec::new();
    for w in &a.annulus {
        let width = parse_width(w)?;
        let (q, wc, wp) = annulus_run(m, width)?;
        widths.push((width, q, wc, wp));
    }
    let periodic = periodic_state(m, g.cells());
    let cost = crate::cost::run_cost(&case, false, 0);
    if a.json {
        let v = json!({
            (K::PERIODIC_STATE.key()): match &periodic {
                Ok(v) => v.clone(),
                Err(why) => json!({(K::NOT_APPLICABLE.key()): why.to_string()}),
            },
            (K::TITLE.key()): case.title,
            (K::ZONES.key()): zones.iter().map(|(n, r1, r2, med)| json!({(K::ZONE.key()): n, (K::INNER_RADIUS.key()): r1, (K::ZONE_OUTER_RADIUS.key()): r2,
                (K::CONDUCTIVITY.key()): med.map(|x| x.conductivity_m_s), (K::DIFFUSIVITY.key()): med.map(|x| x.diffusivity_m2_s()),
                (K::PENETRATION_DEPTH.key()): period.and_then(|p| med.map(|x| penetration_depth(&x, p)))})).collect::<Vec<_>>(),
            (K::RESISTANCE.key()): Zone::ALL.iter().map(|z| (z.name().to_string(), json!(res[*z as usize]))).collect::<serde_json::Map<_, _>>(),
            (K::SKIN.key()): {(K::SKIN_PACK.key()): skin_pack, (K::SKIN_CAKE.key()): skin_total - skin_pack - skin_inv, (K::SKIN_INVADED.key()): skin_inv, (K::SKIN_TOTAL.key()): skin_total},
            (K::CELLS.key()): g.cells(), (K::OUTER_RADIUS.key()): g.outer_radius_m(), (K::TIME_STEP.key()): step,
            (K::COST.key()): {(K::STEPS_AT_MOST.key()): cost.steps, (K::CELL_STEPS.key()): cost.cell_steps, (K::ESTIMATED_SECONDS.key()): cost.seconds,
                (K::ESTIMATED_OUTPUT_BYTES.key()): cost.bytes, (K::OVER_LIMITS.key()): crate::cost::refuse_large(&cost, false).is_err()},
            (K::ANNULUS.key()): widths.iter().map(|(w, q, wc, wp)| json!({(K::WIDTH.key()): w, (K::ANNULUS_PEAK_FLUX.key()): q, (K::CAKE_WORK.key()): wc, (K::PACK_WORK.key()): wp})).collect::<Vec<_>>(),
            (K::NOTES.key()): case.notes, (K::WARNINGS.key()): case.warnings, (K::CAUTIONS.key()): CAUTION,
            (K::DAMAGE_CONSTANTS.key()): boreflux_solver::damage::assumptions(m).iter().map(|p| json!({
                (K::CONSTANT_PATH.key()): p.path, (K::CONSTANT_VALUE.key()): p.value, (K::CONSTANT_RANGE.key()): [p.range.0, p.range.1],
                (K::CONSTANT_UNIT.key()): p.unit, (K::CONSTANT_DECADES.key()): p.decades(), (K::CONSTANT_PROVENANCE.key()): p.provenance})).collect::<Vec<_>>(),
        });
        return print_out(
            &(serde_json::to_string_pretty(&v).map_err(|e| Failure::Runtime(e.into()))? + "\n"),
        );
    }
    let mut t = format!(
        "{}\n",
        if case.title.is_empty() {
            a.case.display().to_string()
        } else {
            case.title.clone()
        }
    );
    t += "\nZones (radius from the well axis):\n";
    for (n, r1, r2, med) in &zones {
        let med = med.expect("medium");
        t += &format!(
            "  {n:<10} {:>8.4} → {:<10.4} m  thickness {:>8.4} m  K {:.3e} m/s  D {:.3e} m²/s{}\n",
            r1,
            r2,
            r2 - r1,
            med.conductivity_m_s,
            med.diffusivity_m2_s(),
            period
                .map(|p| format!("  penetration depth {:.3} m", penetration_depth(&med, p)))
                .unwrap_or_default()
        );
    }
    if let Some(c) = &m.cake {
        t += &format!(
            "  cake       {:.3} mm at r_b = {rb:.4} m, K {:.3e} m/s, coverage {:.2}\n",
            c.thickness_m * 1e3,
            c.conductivity_m_s,
            c.coverage
        );
    }
    t += "\nResistance to steady radial flow (Darcy part) and share of the total:\n";
    for z in Zone::ALL {
        let r = res[z as usize];
        if r > 0.0 {
            t += &format!(
                "  {:<10} {:>12.4e} s/m²  {:>6.2} %\n",
                z.name(),
                r,
                100.0 * r / total
            );
        }
    }
    let controls = Zone::ALL
        .iter()
        .max_by(|x, y| res[**x as usize].total_cmp(&res[**y as usize]))
        .map(|z| z.name())
        .unwrap_or("");
    t += &format!("  → the {controls} controls the flow\n");
    t += &format!("\nSkin (Hawkins, referred to the formation): pack {skin_pack:.3}, cake {:.3}, invaded {skin_inv:.3}, total {skin_total:.3}\n", skin_total - skin_pack - skin_inv);
    t += &format!(
        "\nGrid: {} cells, outer radius {} m ({}); time step: {step}\n",
        g.cells(),
        G(g.outer_radius_m(), 4),
        if m.formation.outer_radius_m.is_some() {
            "given"
        } else {
            "automatic"
        }
    );
    t += &format!("Run size: {}", crate::cost::describe(&cost));
    t += &match crate::cost::refuse_large(&cost, false) {
        Ok(()) => " (HDF5 only; --csv adds more)\n".to_owned(),
        Err(_) => format!(
            "\n  over the limits of {:.0e} cell-steps or {}: `boreflux run` needs \
             --allow-large\n",
            crate::cost::MAX_CELL_STEPS,
            crate::cost::show_bytes(crate::cost::MAX_OUTPUT_BYTES)
        ),
    };
    if let Some(kept) = crate::cost::describe_kept(&cost) {
        t += &format!("  Output size: {kept}\n");
    }
    match &periodic {
        Ok(v) => {
            let num = |k: &crate::output::schema::JsonKey| v[k.key()].as_f64().unwrap_or(f64::NAN);
            t += &match v[K::PERIODIC_METHOD.key()].as_str() {
                Some("shooting") => format!(
                    "\nPeriodic steady state of the well as it stands (cake and fines frozen; \
                     Newton–shooting on one period of {} fixed steps: {} Newton iterations, \
                     {} periods stepped, defect {:.1e}):\n  ",
                    num(&K::SHOOTING_STEPS),
                    num(&K::SHOOTING_NEWTON),
                    num(&K::SHOOTING_PERIODS),
                    num(&K::SHOOTING_DEFECT),
                ),
                _ => "\nPeriodic steady state (harmonic method, no time stepping):\n  ".to_owned(),
            };
            t += &format!(
                "period {} s, peak screen flow {} m³/s, peak face flux at the wall {} m/s; mean power",
                G(num(&K::PERIOD), 4),
                G(num(&K::PEAK_SCREEN_FLOW), 4),
                G(num(&K::PEAK_WALL_FACE_FLUX), 4),
            );
            for z in Zone::ALL {
                let w = v[K::MEAN_POWER.key()][z.name()].as_f64().unwrap_or(0.0);
                if w > 0.0 {
                    t += &format!(" {} {} W", z.name(), G(w, 3));
                }
            }
            t += "\n";
        }
        Err(why) => t += &format!("\nPeriodic steady state: not for this case ({why})\n"),
    }
    if !widths.is_empty() {
        t += "\nAnnulus width (simulated, cake erosion, lift-off and fines off, ≤ 5 cycles):\n  width (mm)   peak face flux (m/s)   cake work/cycle (J)   pack work/cycle (J)\n";
        for (w, q, wc, wp) in &widths {
            t += &format!(
                "  {:>10.1}   {:>20.4e}   {:>19.4e}   {:>19.4e}\n",
                w * 1e3,
                q,
                wc,
                wp
            );
        }
    }
    let sf = case.safety.safety_factor;
    let rho_g = m.fluid.density_kg_m3 * boreflux_solver::water::GRAVITY_M_S2;
    let ratings =
        crate::summary::collapse_ratings(&case.safety, crate::summary::pipe_temperature_c(&case));
    t += &match (ratings.casing_pa, ratings.screen_pa) {
        (None, None) => format!("\nCollapse: no rating ({}; for the screen well.screen_collapse_rating); check the manufacturer's rating before surging.\n", ratings.casing_missing.as_deref().unwrap_or("give well.collapse_rating")),
        (c, sc) => format!(
            "\nCollapse: blank casing {}, screen {} ({}); with safety factor {sf} `run` compares them with the peak loads.\n",
            c.map_or("—".to_owned(), |r| format!("{} kPa (allowable {} kPa = {} m of water)", G(r / 1e3, 4), G(r / sf / 1e3, 4), G(r / sf / rho_g, 4))),
            sc.map_or("—".to_owned(), |r| format!("{} kPa (allowable {} kPa)", G(r / 1e3, 4), G(r / sf / 1e3, 4))),
            ratings.how
        ),
    };
    let assumed = boreflux_solver::damage::assumptions(m);
    if !assumed.is_empty() {
        t += "\nDamage-removal constants, widest documented range first (these dominate the \
              uncertainty of removal times and final skin; a prior ranking from the ranges, \
              not a sensitivity run):\n";
        for p in &assumed {
            t += &format!(
                "  {:34} {:>10} {:8} range {} – {} ({:.1} decades; {})\n",
                p.path,
                format!("{}", G(p.value, 3)),
                p.unit,
                G(p.range.0, 2),
                G(p.range.1, 2),
                p.decades(),
                p.provenance
            );
        }
    }
    if !case.notes.is_empty() {
        t += "\nNotes:\n";
        for n in &case.notes {
            t += &format!("  - {n}\n");
        }
    }
    if !case.warnings.is_empty() {
        t += "\nWarnings:\n";
        for w in &case.warnings {
            t += &format!("  - {w}\n");
        }
    }
    t += &format!("\nCaution: {CAUTION}\n");
    print_out(&t)
}
