//! Well, pack, cake, invaded zone and formation: raw sections to solver types in SI, each
//! with its resolved JSON (every default filled) and the notes worth showing.

use super::checks::{fraction, non_negative, open_fraction, positive};
use super::error::CaseError;
use super::grains::{check_grains, forchheimer_beta, grain_shape, pack_conductivity, Grains};
use super::quantity::{Kind, Length, PerMetre, Q};
use super::raw::{
    OuterBoundaryName, RawCake, RawFines, RawFormation, RawInvaded, RawLiftOff, RawPack, RawWell,
};
use super::{Log, SafetyInputs};
use crate::units::parse_quantity;
use boreflux_solver::media::GrainShape;
use boreflux_solver::model::{
    Cake, Erosion, Fines, Formation, Invaded, LiftOff, Medium, OuterBoundary, Pack, Well,
};
use boreflux_solver::water::Water;
use boreflux_solver::{limits, safety};
use serde_json::{json, Value};

/// Orifice discharge coefficient used when the case gives none: sharp-edged slots
/// (docs/physics.md §3, typical value from memory — verify).
pub const DEFAULT_DISCHARGE_COEFFICIENT: f64 = 0.6;
/// Formation porosity when the case gives none (docs/formats.md default; common practice, no
/// source: clean sands and gravels lie around 0.25–0.40).
pub const DEFAULT_FORMATION_POROSITY: f64 = 0.3;
/// Grain specific gravity of quartz sand when the case gives none (common practice, no
/// source).
pub const DEFAULT_SPECIFIC_GRAVITY: f64 = 2.65;
/// Safety factor on the collapse pressure when the case gives none (docs/formats.md; the
/// upper end of the 1.5–2 usually quoted, common practice, no source).
pub const DEFAULT_SAFETY_FACTOR: f64 = 2.0;
/// Median lift-off pressure when `cake.lift_off` gives none, Pa: the geometric middle of the
/// documented 1–100 kPa (from memory — verify; assumption: calibrate), not tuned to any case.
pub const DEFAULT_LIFT_OFF_MEDIAN_PA: f64 = 1e4;
/// Spread of ln(patch strength) when none is given: the middle of the documented 0.3–1.5
/// (assumption: calibrate).
pub const DEFAULT_LIFT_OFF_SPREAD: f64 = 0.9;
/// Radius of an opened cake patch when none is given, m: about the geometric middle of the
/// documented 1–25 mm (assumption: calibrate).
pub const DEFAULT_PATCH_RADIUS_M: f64 = 5e-3;
/// Deposited fines when `invaded.fines` gives none: about the geometric middle of the
/// documented 0.002–0.05 (from memory — verify).
pub const DEFAULT_FINES_DEPOSIT: f64 = 0.01;
/// Critical interstitial velocity when none is given, m/s: about the geometric middle of the
/// documented 1e-5–1e-2 m/s (from memory — verify).
pub const DEFAULT_FINES_CRITICAL_VELOCITY: f64 = 3e-4;
/// Entrainment and deposition coefficients when none are given, 1/m: about the geometric
/// middle of the documented 1–1000 1/m (from memory — verify; assumption: calibrate).
pub const DEFAULT_FINES_RATE: f64 = 30.0;
/// Density of the fines' solids when none is given, kg/m³ (common practice, no source: quartz
/// and most clay minerals 2600–2800).
pub const DEFAULT_FINES_GRAIN_DENSITY: f64 = 2650.0;

/// Weight on the shear during inward flow when the case gives none (docs/physics.md §13,
/// erosion law; assumption: calibrate).
pub const DEFAULT_INWARD_WEIGHT: f64 = 1.0;
/// Weight on the shear during outward flow when the case gives none (docs/physics.md §13,
/// erosion law; assumption: calibrate — outward flow presses the cake onto the wall).
pub const DEFAULT_OUTWARD_WEIGHT: f64 = 0.5;
/// Coverage-law exponent when the case gives none: 0, the cake keeps covering the wall
/// until it is gone. With m > 0 the first openings short-circuit a tight cake at once
/// (solver cake.rs), so 0 is the choice that does not overstate development.
pub const DEFAULT_COVERAGE_EXPONENT: f64 = 0.0;

fn opt<K: Kind>(q: &Option<Q<K>>, field: &str) -> Result<Option<f64>, CaseError> {
    q.as_ref().map(|q| q.si(field)).transpose()
}

/// The formation, its resolved keys and its grain specific gravity.
pub fn formation(r: &RawFormation, log: &mut Log) -> Result<(Formation, f64, Value), CaseError> {
    let k = positive(
        "formation.conductivity",
        r.conductivity.si("formation.conductivity")?,
        "m/s",
    )?;
    let ss = positive(
        "formation.specific_storage",
        r.specific_storage.si("formation.specific_storage")?,
        "1/m",
    )?;
    let n = match &r.porosity {
        Some(q) => open_fraction("formation.porosity", q.si("formation.porosity")?)?,
        None => DEFAULT_FORMATION_POROSITY,
    };
    let d50 = opt(&r.d50, "formation.d50")?;
    check_grains(
        "formation",
        &Grains {
            d50,
            ..Grains::default()
        },
    )?;
    let beta_given = opt(&r.forchheimer_beta, "formation.forchheimer_beta")?
        .map(|b| non_negative("formation.forchheimer_beta", b, "s2/m2"))
        .transpose()?;
    let (beta, note) = forchheimer_beta("formation", beta_given, d50, n, GrainShape::Spheres);
    log.note(note);
    let outer_radius_m = match r.outer_radius.as_ref().map(|v| &v.0) {
        None => None,
        Some(Value::String(s)) if s == "auto" => None,
        Some(v) => Some(
            parse_quantity(v, Length::Q)
                .map_err(|e| CaseError::new("formation.outer_radius", e.to_string()))?,
        ),
    };
    let gs = r.specific_gravity.unwrap_or(DEFAULT_SPECIFIC_GRAVITY);
    if gs <= 1.0 {
        return Err(CaseError::new(
            "formation.specific_gravity",
            format!("must be greater than 1 (grains heavier than water), got {gs}"),
        ));
    }
    ranged("formation.specific_gravity", gs, limits::SPECIFIC_GRAVITY)?;
    let boundary = match r.outer_boundary.unwrap_or(OuterBoundaryName::FixedHead) {
        OuterBoundaryName::FixedHead => OuterBoundary::FixedHead,
        OuterBoundaryName::NoFlow => OuterBoundary::NoFlow,
    };
    let resolved = json!({
        "conductivity": k,
        "specific_storage": ss,
        "outer_radius": outer_radius_m.map_or(json!("auto"), |r| json!(r)),
        "outer_boundary": match boundary {
            OuterBoundary::FixedHead => "fixed_head",
            OuterBoundary::NoFlow => "no_flow",
        },
        "porosity": n,
        "d50": d50,
        "forchheimer_beta": beta,
        "specific_gravity": gs,
    });
    let formation = Formation {
        medium: Medium {
            conductivity_m_s: k,
            specific_storage_per_m: ss,
            porosity: n,
            forchheimer_beta_s2_m2: beta,
            grain_diameter_m: d50,
        },
        outer_radius_m,
        outer_boundary: boundary,
    };
    Ok((formation, gs, drop_nulls(resolved)))
}

/// `v` checked against a range of `limits` (finite, within bounds; the message gives the
/// range and why).
fn ranged(field: &str, v: f64, range: limits::Range) -> Result<f64, CaseError> {
    range.check(field, v).map(|_| v).map_err(CaseError::from)
}

/// The well, the collapse-check inputs and the resolved keys.
pub fn well(r: &RawWell, log: &mut Log) -> Result<(Well, SafetyInputs, Value), CaseError> {
    // Lengths checked here so that the message shows the unit (the model's own check,
    // `Model::validate`, has only the number).
    let rs = positive(
        "well.screen_radius",
        r.screen_radius.si("well.screen_radius")?,
        "m",
    )?;
    let length = positive(
        "well.screen_length",
        r.screen_length.si("well.screen_length")?,
        "m",
    )?;
    let open_area = fraction("well.open_area", r.open_area.si("well.open_area")?)?;
    let rc = opt(&r.casing_radius, "well.casing_radius")?.unwrap_or(rs);
    let slot = opt(&r.slot_width, "well.slot_width")?
        .map(|w| ranged("well.slot_width", w, limits::SLOT_WIDTH))
        .transpose()?;
    let linear = opt(&r.screen_loss, "well.screen_loss")?.unwrap_or(0.0);
    let cd = match r.discharge_coefficient.as_ref().map(|v| &v.0) {
        None => Some(DEFAULT_DISCHARGE_COEFFICIENT),
        Some(Value::String(s)) if s == "none" => None,
        Some(Value::Number(n)) => n.as_f64(),
        Some(other) => {
            return Err(CaseError::new(
                "well.discharge_coefficient",
                format!("expected a number in (0, 1] or \"none\", got {other}"),
            ))
        }
    };
    let storage = match opt(&r.storage, "well.storage")? {
        Some(s) => s,
        None => {
            let s = Well::free_surface_storage(rc);
            log.note(format!(
                "well-bore storage: pi x casing_radius^2 = {s:.4e} m2 (free water surface)"
            ));
            s
        }
    };
    match cd {
        Some(cd) => log.note(format!(
            "screen entrance loss: orifice law with discharge coefficient {cd} on open area \
             {open_area}; open_area should be the effective open area (the part the pack \
             grains leave open)"
        )),
        None => log.note("screen entrance loss: off (discharge_coefficient \"none\")"),
    }
    let safety = safety_inputs(r)?;
    if safety.material.as_deref() == Some("pvc")
        && safety.dimension_ratio.is_none()
        && safety.collapse_rating_pa.is_none()
    {
        log.warn(
            "well.material is pvc but neither dimension_ratio nor collapse_rating is given; \
             the collapse check cannot be made",
        );
    }
    if let Some(m) = safety.material.as_deref() {
        if safety::builtin_material(m).is_none() {
            log.warn(format!(
                "well.material \"{m}\" has no built-in properties; give collapse_rating, or \
                 youngs_modulus, poisson_ratio and yield_strength, for the collapse check"
            ));
        }
    }
    let well = Well {
        screen_radius_m: rs,
        screen_length_m: length,
        open_area,
        casing_radius_m: rc,
        linear_loss_s: linear,
        discharge_coefficient: cd,
        storage_m2: storage,
        column_length_m: 0.0,
    };
    let resolved = json!({
        "screen_radius": rs,
        "screen_length": length,
        "open_area": open_area,
        "casing_radius": rc,
        "slot_width": slot,
        "screen_loss": linear,
        "discharge_coefficient": cd.map_or(json!("none"), |c| json!(c)),
        "storage": storage,
        "material": safety.material,
        "dimension_ratio": safety.dimension_ratio,
        "collapse_rating": safety.collapse_rating_pa,
        "screen_collapse_rating": safety.screen_collapse_rating_pa,
        "slot_derating": safety.slot_derating,
        "yield_strength": safety.yield_strength_pa,
        "youngs_modulus": safety.youngs_modulus_pa,
        "poisson_ratio": safety.poisson_ratio,
        "safety_factor": safety.safety_factor,
    });
    Ok((well, safety, drop_nulls(resolved)))
}

fn safety_inputs(r: &RawWell) -> Result<SafetyInputs, CaseError> {
    let material = r.material.as_ref().map(|m| m.trim().to_lowercase());
    if material.as_deref() == Some("") {
        return Err(CaseError::new("well.material", "must not be empty"));
    }
    // A name one or two letters from a built-in material is a misspelling, not a material
    // of the user's own, unless the case gives what the collapse check needs without it:
    // accepted, it would switch the check (and PVC's temperature derating) off.
    if let Some(m) = material.as_deref() {
        let own = r.collapse_rating.is_some()
            || (r.youngs_modulus.is_some() && r.poisson_ratio.is_some());
        if safety::builtin_material(m).is_none() && !own {
            if let Some(near) = super::hints::closest(m, &safety::MATERIAL_NAMES) {
                return Err(CaseError::new(
                    "well.material",
                    format!(
                        "unknown material \"{m}\": did you mean `{near}`? (built in: {}; \
                         another material needs collapse_rating, or youngs_modulus, \
                         poisson_ratio and yield_strength)",
                        safety::MATERIAL_NAMES.join(", ")
                    ),
                ));
            }
        }
    }
    if let Some(dr) = r.dimension_ratio {
        if dr <= 2.0 {
            return Err(CaseError::new(
                "well.dimension_ratio",
                format!("must be greater than 2 (outside diameter / wall thickness), got {dr}"),
            ));
        }
    }
    if let Some(dr) = r.dimension_ratio {
        ranged("well.dimension_ratio", dr, limits::DIMENSION_RATIO)?;
    }
    let collapse = opt(&r.collapse_rating, "well.collapse_rating")?
        .map(|p| ranged("well.collapse_rating", p, limits::COLLAPSE_RATING))
        .transpose()?;
    let screen_rating = opt(&r.screen_collapse_rating, "well.screen_collapse_rating")?
        .map(|p| positive("well.screen_collapse_rating", p, "Pa"))
        .transpose()?;
    let yield_strength = opt(&r.yield_strength, "well.yield_strength")?
        .map(|p| positive("well.yield_strength", p, "Pa"))
        .transpose()?;
    if let Some(f) = r.slot_derating {
        if !(f > 0.0 && f <= 1.0) {
            return Err(CaseError::new(
                "well.slot_derating",
                format!("must be in (0, 1], got {f}"),
            ));
        }
    }
    let e = opt(&r.youngs_modulus, "well.youngs_modulus")?
        .map(|p| ranged("well.youngs_modulus", p, limits::YOUNGS_MODULUS))
        .transpose()?;
    if let Some(nu) = r.poisson_ratio {
        if !(nu > 0.0 && nu < 0.5) {
            return Err(CaseError::new(
                "well.poisson_ratio",
                format!("must be between 0 and 0.5, got {nu}"),
            ));
        }
    }
    let sf = r.safety_factor.unwrap_or(DEFAULT_SAFETY_FACTOR);
    if sf < 1.0 {
        return Err(CaseError::new(
            "well.safety_factor",
            format!("must be at least 1, got {sf}"),
        ));
    }
    ranged("well.safety_factor", sf, limits::SAFETY_FACTOR)?;
    Ok(SafetyInputs {
        collapse_rating_pa: collapse,
        screen_collapse_rating_pa: screen_rating,
        slot_derating: r.slot_derating,
        yield_strength_pa: yield_strength,
        material,
        dimension_ratio: r.dimension_ratio,
        youngs_modulus_pa: e,
        poisson_ratio: r.poisson_ratio,
        safety_factor: sf,
        formation_specific_gravity: DEFAULT_SPECIFIC_GRAVITY,
    })
}

/// The filter pack; `formation` supplies the default specific storage.
pub fn pack(
    r: &RawPack,
    water: &Water,
    formation: &Medium,
    log: &mut Log,
) -> Result<(Pack, Value), CaseError> {
    let rb = positive(
        "pack.outer_radius",
        r.outer_radius.si("pack.outer_radius")?,
        "m",
    )?;
    let n = open_fraction("pack.porosity", r.porosity.si("pack.porosity")?)?;
    let grains = Grains {
        d10: opt(&r.d10, "pack.d10")?,
        d50: opt(&r.d50, "pack.d50")?,
        d60: opt(&r.d60, "pack.d60")?,
    };
    check_grains("pack", &grains)?;
    let shape = grain_shape("pack", r.sphericity, r.grain_shape)?;
    let given_k = opt(&r.conductivity, "pack.conductivity")?
        .map(|k| positive("pack.conductivity", k, "m/s"))
        .transpose()?;
    let k = pack_conductivity(given_k, &grains, n, shape, water)?;
    for s in k.notes {
        log.note(s);
    }
    for s in k.warnings {
        log.warn(s);
    }
    let ss = match opt(&r.specific_storage, "pack.specific_storage")? {
        Some(s) => s,
        None => formation.specific_storage_per_m,
    };
    let beta_given = opt(&r.forchheimer_beta, "pack.forchheimer_beta")?
        .map(|b| non_negative("pack.forchheimer_beta", b, "s2/m2"))
        .transpose()?;
    let (beta, note) = forchheimer_beta("pack", beta_given, grains.d50, n, shape);
    log.note(note);
    if k.conductivity_m_s < formation.conductivity_m_s {
        log.warn(format!(
            "pack conductivity {:.3e} m/s is below the formation's {:.3e} m/s: the pack \
             itself throttles the well",
            k.conductivity_m_s, formation.conductivity_m_s
        ));
    }
    let resolved = json!({
        "outer_radius": rb,
        "porosity": n,
        "conductivity": k.conductivity_m_s,
        "specific_storage": ss,
        "d10": grains.d10,
        "d50": grains.d50,
        "d60": grains.d60,
        "sphericity": shape.sphericity(),
        "forchheimer_beta": beta,
    });
    let pack = Pack {
        outer_radius_m: rb,
        medium: Medium {
            conductivity_m_s: k.conductivity_m_s,
            specific_storage_per_m: ss,
            porosity: n,
            forchheimer_beta_s2_m2: beta,
            grain_diameter_m: grains.d50,
        },
    };
    Ok((pack, drop_nulls(resolved)))
}

/// The wall cake, if any.
pub fn cake(r: &RawCake, log: &mut Log) -> Result<(Cake, Value), CaseError> {
    let thickness = positive("cake.thickness", r.thickness.si("cake.thickness")?, "m")?;
    let k = r.conductivity.si("cake.conductivity")?;
    let coverage = match &r.coverage {
        Some(q) => q.si("cake.coverage")?,
        None => 1.0,
    };
    let erosion = match &r.erosion {
        None => None,
        Some(e) => {
            log.note(
                "cake erosion law: its critical shear and erodibility are model assumptions; \
                 calibrate them before relying on cake removal times",
            );
            Some(Erosion {
                critical_shear_pa: e.critical_shear.si("cake.erosion.critical_shear")?,
                erodibility_m_s_pa: e.erodibility.si("cake.erosion.erodibility")?,
                inward_weight: e.inward_weight.unwrap_or(DEFAULT_INWARD_WEIGHT),
                outward_weight: e.outward_weight.unwrap_or(DEFAULT_OUTWARD_WEIGHT),
                coverage_exponent: e.coverage_exponent.unwrap_or(DEFAULT_COVERAGE_EXPONENT),
            })
        }
    };
    let lift_off = match &r.lift_off {
        None => None,
        Some(l) => Some(lift_off(l, log)?),
    };
    let resolved = json!({
        "thickness": thickness,
        "conductivity": k,
        "coverage": coverage,
        "lift_off": lift_off.map(|l| json!({
            "median": l.median_pa,
            "spread": l.spread,
            "patch_radius": l.patch_radius_m,
        })),
        "erosion": erosion.map(|e| json!({
            "critical_shear": e.critical_shear_pa,
            "erodibility": e.erodibility_m_s_pa,
            "inward_weight": e.inward_weight,
            "outward_weight": e.outward_weight,
            "coverage_exponent": e.coverage_exponent,
        })),
    });
    let cake = Cake {
        thickness_m: thickness,
        conductivity_m_s: k,
        coverage,
        erosion,
        lift_off,
    };
    Ok((cake, drop_nulls(resolved)))
}

fn lift_off(l: &RawLiftOff, log: &mut Log) -> Result<LiftOff, CaseError> {
    let median_pa = match &l.median {
        Some(q) => positive("cake.lift_off.median", q.si("cake.lift_off.median")?, "Pa")?,
        None => DEFAULT_LIFT_OFF_MEDIAN_PA,
    };
    let spread = match l.spread {
        Some(s) => non_negative("cake.lift_off.spread", s, "")?,
        None => DEFAULT_LIFT_OFF_SPREAD,
    };
    let patch_radius_m = match &l.patch_radius {
        Some(q) => positive(
            "cake.lift_off.patch_radius",
            q.si("cake.lift_off.patch_radius")?,
            "m",
        )?,
        None => DEFAULT_PATCH_RADIUS_M,
    };
    log.note(format!(
        "cake lift-off: patches fail when the inward pressure difference across the cake \
         exceeds their strength, log-normal with median {median_pa:.3e} Pa and spread {spread} \
         (documented ranges 1-100 kPa and 0.3-1.5, from memory - verify; calibrate); opened \
         patches are holes of radius {patch_radius_m} m (1-25 mm, assumption: calibrate)"
    ));
    Ok(LiftOff {
        median_pa,
        spread,
        patch_radius_m,
        frozen: false,
    })
}

fn fines(f: &RawFines, log: &mut Log) -> Result<Fines, CaseError> {
    let deposit = match &f.deposit {
        Some(q) => open_fraction("invaded.fines.deposit", q.si("invaded.fines.deposit")?)?,
        None => DEFAULT_FINES_DEPOSIT,
    };
    let critical_velocity_m_s = match &f.critical_velocity {
        Some(q) => non_negative(
            "invaded.fines.critical_velocity",
            q.si("invaded.fines.critical_velocity")?,
            "m/s",
        )?,
        None => DEFAULT_FINES_CRITICAL_VELOCITY,
    };
    let rate = |q: &Option<Q<PerMetre>>, field: &str| -> Result<f64, CaseError> {
        match q {
            Some(q) => non_negative(field, q.si(field)?, "1/m"),
            None => Ok(DEFAULT_FINES_RATE),
        }
    };
    let entrainment_per_m = rate(&f.entrainment, "invaded.fines.entrainment")?;
    let deposition_per_m = rate(&f.deposition, "invaded.fines.deposition")?;
    let grain_density_kg_m3 = match &f.grain_density {
        Some(q) => positive(
            "invaded.fines.grain_density",
            q.si("invaded.fines.grain_density")?,
            "kg/m3",
        )?,
        None => DEFAULT_FINES_GRAIN_DENSITY,
    };
    log.note(format!(
        "invaded-zone fines: {deposit} of the bulk at the start, mobilised above an \
         interstitial velocity of {critical_velocity_m_s:.2e} m/s, entrainment \
         {entrainment_per_m} 1/m, deposition {deposition_per_m} 1/m (documented ranges \
         0.002-0.05, 1e-5-1e-2 m/s and 1-1000 1/m, from memory - verify; calibrate)"
    ));
    Ok(Fines {
        deposit,
        critical_velocity_m_s,
        entrainment_per_m,
        deposition_per_m,
        grain_density_kg_m3,
    })
}

/// The invaded zone; porosity, d50 and Forchheimer β are the formation's.
pub fn invaded(
    r: &RawInvaded,
    formation: &Medium,
    log: &mut Log,
) -> Result<(Invaded, Value), CaseError> {
    let thickness = r.thickness.si("invaded.thickness")?;
    let kf = formation.conductivity_m_s;
    let k = match (&r.conductivity_ratio, &r.conductivity) {
        (Some(ratio), None) => {
            let x = positive(
                "invaded.conductivity_ratio",
                ratio.si("invaded.conductivity_ratio")?,
                "",
            )?;
            if x > 1.0 {
                log.warn(format!(
                    "invaded.conductivity_ratio {x} is above 1: the invaded zone is more \
                     conductive than the formation"
                ));
            }
            x * kf
        }
        (None, Some(k)) => k.si("invaded.conductivity")?,
        (Some(_), Some(_)) => {
            return Err(CaseError::new(
                "invaded.conductivity",
                "give either conductivity or conductivity_ratio, not both",
            ))
        }
        (None, None) => {
            return Err(CaseError::new(
                "invaded.conductivity_ratio",
                "required key is missing (give conductivity_ratio or conductivity)",
            ))
        }
    };
    let ss = match &r.specific_storage {
        Some(q) => q.si("invaded.specific_storage")?,
        None => formation.specific_storage_per_m,
    };
    log.note(format!(
        "invaded zone: conductivity {k:.3e} m/s ({:.3} x formation); porosity, d50 and \
         Forchheimer beta taken from the formation",
        k / kf
    ));
    let fines = match &r.fines {
        None => None,
        Some(f) => Some(fines(f, log)?),
    };
    let resolved = json!({
        "thickness": thickness,
        "conductivity": k,
        "specific_storage": ss,
        "fines": fines.map(|f| json!({
            "deposit": f.deposit,
            "critical_velocity": f.critical_velocity_m_s,
            "entrainment": f.entrainment_per_m,
            "deposition": f.deposition_per_m,
            "grain_density": f.grain_density_kg_m3,
        })),
    });
    let invaded = Invaded {
        thickness_m: thickness,
        medium: Medium {
            conductivity_m_s: k,
            specific_storage_per_m: ss,
            ..*formation
        },
        fines,
        profile: None,
    };
    Ok((invaded, drop_nulls(resolved)))
}

/// Removes keys whose value is null, so the resolved case stays loadable.
pub fn drop_nulls(v: Value) -> Value {
    match v {
        Value::Object(m) => Value::Object(
            m.into_iter()
                .filter(|(_, v)| !v.is_null())
                .map(|(k, v)| (k, drop_nulls(v)))
                .collect(),
        ),
        other => other,
    }
}
