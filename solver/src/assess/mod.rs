//! Assessment of the well as a driller and a consultant see it: the figures of virtual
//! pumping tests on the model (specific capacity, efficiency, step-test coefficients B and C)
//! before and after development (docs/physics.md §25). No I/O.
//!
//! - [`virtual_test`]: constant-rate and step-drawdown tests on a model, each on a domain and
//!   grid of its own.
//! - [`assess`]: the figures of one state of the well (a [`SlowState`] on its base model),
//!   against the same tests on the well with no damage.
//! - [`progress`]: the same figures during the run, cheaply, from the near-well losses of
//!   the current state.

pub mod checks;
pub mod figures;
pub mod progress;
pub mod virtual_test;
pub mod watch;

use crate::error::SolverError;
use crate::model::Model;
use crate::slow::SlowState;
use crate::steptest::jacob::fit_steps;
use crate::steptest::{Estimate, Step, Weighting};

/// What the virtual tests pump and for how long (the case's `assessment` section).
#[derive(Debug, Clone, PartialEq)]
pub struct TestPlan {
    /// Design pumping rate Q_d, m³/s (withdrawal, > 0).
    pub design_rate_m3_s: f64,
    /// Duration of the constant-rate test: the specific capacity is read at its end, s.
    pub constant_duration_s: f64,
    /// Rates of the step test as fractions of the design rate, increasing.
    pub step_fractions: Vec<f64>,
    /// Duration of each step, s.
    pub step_duration_s: f64,
}

impl TestPlan {
    /// Checks the plan; errors name the case-file path.
    pub fn validate(&self) -> Result<(), SolverError> {
        let pos = crate::model::positive;
        pos("assessment.design_rate", self.design_rate_m3_s)?;
        pos("assessment.duration", self.constant_duration_s)?;
        pos("assessment.step_duration", self.step_duration_s)?;
        let f = &self.step_fractions;
        if f.len() < 3
            || !f.iter().all(|x| x.is_finite() && *x > 0.0)
            || !f.windows(2).all(|w| w[0] < w[1])
        {
            return Err(SolverError::invalid(
                "assessment.step_fractions",
                format!("needs at least three positive, increasing fractions, got {f:?}"),
            ));
        }
        Ok(())
    }

    /// The step rates, m³/s.
    pub fn step_rates_m3_s(&self) -> Vec<f64> {
        self.step_fractions
            .iter()
            .map(|f| f * self.design_rate_m3_s)
            .collect()
    }
}

/// Step-test coefficients of a virtual step test (Jacob's line, docs/step-test.md).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StepCoefficients {
    /// B after one step's duration of pumping, s/m².
    pub b_s_m2: f64,
    /// C, s²/m⁵.
    pub c_s2_m5: f64,
    /// C with its standard error from the fit: the readings are exact, so the error says
    /// how far the model's losses depart from B Q + C Q² (e.g. Forchheimer loss in cells
    /// still filling at the reading, or a screen orifice law).
    pub c_estimate: Estimate,
    /// Share of the linear loss B Q_d / (B Q_d + C Q_d²) at the design rate, –.
    pub linear_share: f64,
    /// Share of the nonlinear loss C Q_d² / (B Q_d + C Q_d²) at the design rate, –.
    pub nonlinear_share: f64,
}

/// The figures of one state of the well.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct WellFigures {
    /// Drawdown at the end of the constant-rate test, m.
    pub drawdown_m: f64,
    /// Drawdown of the same test on the well with no damage, m.
    pub undamaged_drawdown_m: f64,
    /// Specific capacity Q_d / s at the end of the constant-rate test, m²/s.
    pub specific_capacity_m2_s: f64,
    /// Efficiency s(no damage) / s(this state), –. Above 1 only when the damage zones
    /// conduct better than the formation (a negative skin): see [`Self::negative_skin`].
    pub efficiency: f64,
    /// Whether the efficiency exceeds 1 because of a negative skin.
    pub negative_skin: bool,
    /// Step-test coefficients, when the step test ran and could be fitted.
    pub step: Option<StepCoefficients>,
}

/// The assessment of a run: the figures before (t = 0) and after (the state at the end).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Assessment {
    /// The well at t = 0.
    pub before: WellFigures,
    /// The well at the end of the run.
    pub after: WellFigures,
}

/// Figures of the well `base` in the state `slow` (its snapshot), given the drawdown of the
/// undamaged well in the same constant-rate test (it does not change during a run).
pub fn figures_with(
    base: &Model,
    slow: &SlowState,
    plan: &TestPlan,
    undamaged_drawdown_m: f64,
) -> Result<WellFigures, SolverError> {
    figures_of(&slow.snapshot_model(base), plan, undamaged_drawdown_m, None)
}

/// Figures of the well `snap` as it stands (a snapshot model); `known_drawdown_m` is the
/// drawdown of its constant-rate test when that test already ran on an equal model (a test
/// is a pure function of its model, so the value is the one it would give again).
fn figures_of(
    snap: &Model,
    plan: &TestPlan,
    undamaged_drawdown_m: f64,
    known_drawdown_m: Option<f64>,
) -> Result<WellFigures, SolverError> {
    let q = plan.design_rate_m3_s;
    let s = match known_drawdown_m {
        Some(s) => s,
        None => virtual_test::constant_rate(snap, q, &[plan.constant_duration_s])?[0],
    };
    let efficiency = undamaged_drawdown_m / s;
    let step = step_coefficients(snap, plan)?;
    Ok(WellFigures {
        drawdown_m: s,
        undamaged_drawdown_m,
        specific_capacity_m2_s: q / s,
        efficiency,
        negative_skin: efficiency > 1.0,
        step,
    })
}

/// B and C of the plan's step test on `model` (the well as it stands): each step rate pumped
/// from rest for one step's duration (a test of its own), and Jacob's line through s/Q
/// against Q (docs/physics.md §25.2). The linear part of the model (formation, well-bore
/// storage, laminar skins) is proportional to the rate whatever the time, so B is B(Δt) at
/// the step duration and C is the nonlinear loss exactly where the near-well flow is
/// steady: what the Hantush–Bierschenk correction of a continuous field test estimates,
/// without its Cooper–Jacob approximation. `None` when the line cannot be fitted.
pub fn step_coefficients(
    model: &Model,
    plan: &TestPlan,
) -> Result<Option<StepCoefficients>, SolverError> {
    let mut steps = Vec::with_capacity(plan.step_fractions.len());
    for q in plan.step_rates_m3_s() {
        let s = virtual_test::constant_rate(model, q, &[plan.step_duration_s])?[0];
        steps.push(Step {
            rate_m3_s: q,
            drawdown_m: s,
        });
    }
    let q = plan.design_rate_m3_s;
    Ok(fit_steps(&steps, Weighting::Drawdown, 0.95).ok().map(|a| {
        let (b, c) = (a.fit.b.value, a.fit.c.value);
        let lin = b * q;
        let non = c * q * q;
        StepCoefficients {
            b_s_m2: b,
            c_s2_m5: c,
            c_estimate: a.fit.c,
            linear_share: lin / (lin + non),
            nonlinear_share: non / (lin + non),
        }
    }))
}

/// Drawdown of the undamaged well of `base` at the end of the plan's constant-rate test, m.
pub fn undamaged_drawdown_m(base: &Model, plan: &TestPlan) -> Result<f64, SolverError> {
    let clean = virtual_test::undamaged(&SlowState::new(base).snapshot_model(base));
    constant_rate_at_end(&clean, plan)
}

fn constant_rate_at_end(model: &Model, plan: &TestPlan) -> Result<f64, SolverError> {
    Ok(virtual_test::constant_rate(model, plan.design_rate_m3_s, &[plan.constant_duration_s])?[0])
}

/// The half of an assessment that depends on the case alone: the undamaged well's test and
/// the figures of the well as built (t = 0). It can be computed before the run, or beside
/// it on another thread (`boreflux run` does), and [`Baseline::assess`] completes the
/// assessment from the run's end state.
///
/// Tests that would run again on an equal model are not run again: a virtual test is a
/// pure function of its model, rate and duration (same bits every time), so the undamaged
/// well's drawdown is taken over when the well as built has no damage zones, and the
/// figures of the end state are those of the start when its snapshot is the same model.
/// The results are the same bits as [`undamaged_drawdown_m`] and [`figures_with`] give.
#[derive(Debug, Clone, PartialEq)]
pub struct Baseline {
    /// Drawdown of the undamaged well at the end of the constant-rate test, m.
    pub undamaged_drawdown_m: Result<f64, SolverError>,
    /// The figures of the well as built; the undamaged test's error when that failed.
    pub before: Result<WellFigures, SolverError>,
    /// [`test_key`] of the well as built.
    built: String,
    /// [`test_key`] of the undamaged well the efficiency is measured against.
    clean: String,
}

/// What a virtual test reads of a model, written out with every number's shortest
/// round-trip digits (`{:?}`), so two models with the same key give the same bits in every
/// test (a derived `==` would call 0.0 and −0.0 equal). The drive, the duration and the
/// numerics are left out: [`virtual_test::test_model`] replaces them.
fn test_key(m: &Model) -> String {
    let Model {
        fluid,
        well,
        pack,
        cake,
        invaded,
        formation,
        drive: _,
        duration_s: _,
        numerics: _,
    } = m;
    format!("{fluid:?}|{well:?}|{pack:?}|{cake:?}|{invaded:?}|{formation:?}")
}

impl Baseline {
    /// Everything [`Baseline::new`] reads of `base` and `plan`: two cases with the same key
    /// get the same baseline, bit for bit (a sweep that varies the drive alone computes it
    /// once).
    pub fn key(base: &Model, plan: &TestPlan) -> String {
        let built = SlowState::new(base).snapshot_model(base);
        format!("{}|{plan:?}", test_key(&built))
    }

    /// Runs the tests of the well `base` as built (its initial slow state).
    pub fn new(base: &Model, plan: &TestPlan) -> Baseline {
        let built = SlowState::new(base).snapshot_model(base);
        let clean = virtual_test::undamaged(&built);
        let (built_key, clean_key) = (test_key(&built), test_key(&clean));
        let undamaged = constant_rate_at_end(&clean, plan);
        let before = match &undamaged {
            Ok(c) => figures_of(&built, plan, *c, (built_key == clean_key).then_some(*c)),
            Err(e) => Err(e.clone()),
        };
        Baseline {
            undamaged_drawdown_m: undamaged,
            before,
            built: built_key,
            clean: clean_key,
        }
    }

    /// The assessment of a run of `base` (the model the baseline was built from) that ended
    /// in the state `end`: the undamaged test's error first, then the as-built figures',
    /// then the end state's.
    pub fn assess(
        &self,
        base: &Model,
        end: &SlowState,
        plan: &TestPlan,
    ) -> Result<Assessment, SolverError> {
        let clean = self.undamaged_drawdown_m.clone()?;
        let before = self.before.clone()?;
        let snap = end.snapshot_model(base);
        let key = test_key(&snap);
        let after = if key == self.built {
            before
        } else {
            let known = (key == self.clean).then_some(clean);
            figures_of(&snap, plan, clean, known)?
        };
        Ok(Assessment { before, after })
    }
}

/// The assessment of a run of `base` that ended in the state `end`.
pub fn assess(base: &Model, end: &SlowState, plan: &TestPlan) -> Result<Assessment, SolverError> {
    plan.validate()?;
    Baseline::new(base, plan).assess(base, end, plan)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::drive::Drive;
    use crate::fixtures;
    use crate::model::*;

    /// A small well with an invaded ring of conductivity `k_invaded` (invented numbers).
    fn well(k_invaded: Option<f64>) -> Model {
        let mut m = fixtures::demo_well();
        m.well.screen_length_m = 5.0;
        m.well.open_area = 0.1;
        m.well.storage_m2 = Well::free_surface_storage(0.1);
        m.pack.medium = Medium::darcy(2e-3, 1e-5);
        m.invaded = k_invaded.map(|k| fixtures::invaded(0.1, k));
        m.formation.outer_radius_m = None;
        m.drive = Drive::ConstantRate {
            pumping_rate_m3_s: 0.0,
        };
        m.duration_s = 1.0;
        m
    }

    fn plan() -> TestPlan {
        TestPlan {
            design_rate_m3_s: 2e-3,
            constant_duration_s: 3600.0,
            step_fractions: vec![0.5, 0.75, 1.0],
            step_duration_s: 600.0,
        }
    }

    /// Definition (docs/physics.md §25.1): a well with no damage is its own undamaged well.
    #[test]
    fn a_clean_well_has_an_efficiency_of_exactly_one() {
        let m = well(None);
        let a = assess(&m, &SlowState::new(&m), &plan()).unwrap();
        assert_eq!(a.before.efficiency, 1.0);
        assert!(!a.before.negative_skin);
    }

    /// A ring four times more conductive than the formation has Hawkins skin
    /// (1/4 − 1) ln(0.3/0.2) < 0 (docs/physics.md §2.4): the efficiency exceeds one and
    /// says why; a ring a quarter as conductive lowers it.
    #[test]
    fn only_a_negative_skin_lifts_the_efficiency_above_one() {
        let better = well(Some(8e-4));
        let a = assess(&better, &SlowState::new(&better), &plan()).unwrap();
        assert!(a.before.efficiency > 1.0 && a.before.negative_skin);
        let worse = well(Some(5e-5));
        let a = assess(&worse, &SlowState::new(&worse), &plan()).unwrap();
        assert!(a.before.efficiency < 1.0 && !a.before.negative_skin);
    }

    /// The tests one by one, as the assessment ran them before there was a baseline.
    fn one_by_one(m: &Model, end: &SlowState, plan: &TestPlan) -> Assessment {
        let clean = undamaged_drawdown_m(m, plan).unwrap();
        Assessment {
            before: figures_with(m, &SlowState::new(m), plan, clean).unwrap(),
            after: figures_with(m, end, plan, clean).unwrap(),
        }
    }

    /// The baseline (tests that would run twice on the same model run once) gives the same
    /// bits as every test run one by one (`{:?}` prints each number's shortest round-trip
    /// digits): a well with no damage (its undamaged test is its own, and the end state is
    /// the start), a damaged one ending as built, and a cake half washed off, once with no
    /// cake left at all (the end state is then the undamaged well). Source: the same
    /// program's tests run one by one.
    #[test]
    fn the_baseline_gives_the_bits_of_the_tests_run_one_by_one() {
        let p = plan();
        let clean = well(None);
        let ring = well(Some(5e-5));
        let mut caked = well(None);
        caked.cake = Some(fixtures::cake(2e-3, 1e-7, 1.0));
        let half = SlowState::with_cake(
            &caked,
            Some(crate::cake::CakeState {
                thickness_m: 1e-3,
                coverage: 1.0,
            }),
        );
        let gone = SlowState::with_cake(&caked, None);
        for (m, end) in [
            (&clean, SlowState::new(&clean)),
            (&ring, SlowState::new(&ring)),
            (&caked, half),
            (&caked, gone),
        ] {
            let b = Baseline::new(m, &p);
            let got = b.assess(m, &end, &p).unwrap();
            let want = one_by_one(m, &end, &p);
            assert_eq!(format!("{got:?}"), format!("{want:?}"));
        }
        // The half-washed cake's end figures are its own, not the start's.
        let b = Baseline::new(&caked, &p);
        let half = SlowState::with_cake(
            &caked,
            Some(crate::cake::CakeState {
                thickness_m: 1e-3,
                coverage: 1.0,
            }),
        );
        let a = b.assess(&caked, &half, &p).unwrap();
        assert!(a.after.efficiency > a.before.efficiency, "{a:?}");
    }

    /// A baseline's key leaves out what the tests replace (the drive) and holds the well
    /// and the plan.
    #[test]
    fn baseline_keys_hold_the_well_and_the_plan() {
        let p = plan();
        let m = well(Some(5e-5));
        let mut driven = m.clone();
        driven.drive = fixtures::sine_head(1.0, 0.25, 0.0);
        assert_eq!(Baseline::key(&m, &p), Baseline::key(&driven, &p));
        let mut other = m.clone();
        other.pack.medium.conductivity_m_s *= 1.5;
        assert_ne!(Baseline::key(&m, &p), Baseline::key(&other, &p));
        let longer = TestPlan {
            constant_duration_s: 2.0 * p.constant_duration_s,
            ..p.clone()
        };
        assert_ne!(Baseline::key(&m, &p), Baseline::key(&m, &longer));
    }

    /// Models equal under `==` but not bit for bit (0.0 and −0.0) get different test keys;
    /// the drive, duration and numerics, which a test replaces, do not count.
    #[test]
    fn test_keys_tell_bits_apart_and_ignore_what_a_test_replaces() {
        let m = well(Some(5e-5));
        let mut other = m.clone();
        other.drive = fixtures::sine_head(1.0, 0.5, 0.0);
        other.duration_s = 99.0;
        other.numerics.sync_times_s = vec![1.0];
        assert_eq!(test_key(&m), test_key(&other));
        let mut a = m.clone();
        let mut b = m.clone();
        a.pack.medium.forchheimer_beta_s2_m2 = 0.0;
        b.pack.medium.forchheimer_beta_s2_m2 = -0.0;
        assert!(a == b);
        assert_ne!(test_key(&a), test_key(&b));
    }

    #[test]
    fn a_bad_plan_names_its_field() {
        let mut p = plan();
        p.step_fractions = vec![1.0, 0.5, 0.75];
        let e = p.validate().unwrap_err().to_string();
        assert!(e.starts_with("assessment.step_fractions"), "{e}");
        let mut p = plan();
        p.design_rate_m3_s = -1.0;
        assert!(p
            .validate()
            .unwrap_err()
            .to_string()
            .starts_with("assessment.design_rate"));
    }
}
