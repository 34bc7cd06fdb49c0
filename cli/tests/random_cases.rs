//! Random-case harness: a few hundred random valid cases of every drive kind, drawn from
//! ranges of common practice (see `random_cases/gen.rs`), each loaded and run through the
//! library. Asserts that every case loads and runs, and that no reported value is NaN or
//! infinite; prints (with `--nocapture`) each failure and the share of runs whose summary
//! warns of a poor numerical balance (target under 2 %).
//!
//! ```sh
//! cargo test --release -p boreflux --test random_cases -- --nocapture
//! BOREFLUX_RANDOM_SEED=7 BOREFLUX_RANDOM_PER_KIND=100 cargo test --release -p boreflux --test random_cases -- --nocapture
//! ```

#[path = "random_cases/gen.rs"]
mod gen;

use boreflux::case::parse_case;
use boreflux::summary::{assessment, headline, Tracker};
use boreflux_solver::{run, CycleView, Reporting, StepObserver, StepView};
use std::path::Path;

/// The tracker, and the first non-finite value seen.
struct Watch {
    tracker: Tracker,
    bad: Option<String>,
}

impl StepObserver for Watch {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        if self.bad.is_none() {
            let named = [
                ("time", s.time_s),
                ("dt", s.dt_s),
                ("well_head", s.well_head_m),
                ("screen_outer_head", s.screen_outer_head_m),
                ("screen_flow", s.screen_flow_m3_s),
                ("face_flux", s.face_flux_m_s),
                ("face_pore_velocity", s.face_pore_velocity_m_s),
                ("face_gradient", s.face_gradient),
                ("shear_proxy", s.shear_proxy_pa),
                ("cake_thickness", s.cake_thickness_m),
                ("cake_coverage", s.cake_coverage),
                ("skin", s.skin),
                ("mass_residual", s.mass_residual),
                ("energy_residual", s.energy_residual),
            ];
            let zones = s.power_w.iter().chain(&s.work_j);
            if let Some((n, v)) = named.iter().find(|(_, v)| !v.is_finite()) {
                self.bad = Some(format!("{n} = {v} at t = {} s", s.time_s));
            } else if zones.clone().any(|v| !v.is_finite()) {
                self.bad = Some(format!(
                    "zone power or work not finite at t = {} s",
                    s.time_s
                ));
            }
        }
        self.tracker.on_step(s)
    }

    fn on_cycle(&mut self, c: &CycleView) {
        self.tracker.on_cycle(c);
    }
}

fn env_u64(name: &str, default: u64) -> u64 {
    std::env::var(name)
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(default)
}

#[test]
fn random_valid_cases_run_cleanly() {
    let seed = env_u64("BOREFLUX_RANDOM_SEED", 20_261_203);
    let per_kind = env_u64("BOREFLUX_RANDOM_PER_KIND", 100);
    let (mut runs, mut failures, mut non_finite, mut balance) = (0u32, 0u32, 0u32, 0u32);
    let mut by_kind = Vec::new();
    for (k, kind) in gen::KINDS.into_iter().enumerate() {
        // One stream per kind: the cases of a kind do not change with the count of others.
        let mut rng = gen::Rng::new(seed.wrapping_add(0x1000_0000 * k as u64));
        let (mut k_fail, mut k_bal) = (0u32, 0u32);
        let (started, mut slowest) = (std::time::Instant::now(), (0.0f64, 0u64));
        for i in 0..per_kind {
            let one = std::time::Instant::now();
            let case = gen::case(&mut rng, kind);
            let text = case.to_string();
            runs += 1;
            let loaded = match parse_case(&text, Path::new(".")) {
                Ok(c) => c,
                Err(e) => {
                    failures += 1;
                    k_fail += 1;
                    eprintln!("FAIL {kind} #{i}: not accepted: {e}\n  case: {text}");
                    continue;
                }
            };
            let mut watch = Watch {
                tracker: Tracker::new(&loaded.model),
                bad: None,
            };
            let reporting = Reporting {
                every: loaded.output_every,
            };
            let result = run(&loaded.model, &mut watch, reporting);
            let secs = one.elapsed().as_secs_f64();
            if secs > slowest.0 {
                slowest = (secs, i);
            }
            if secs > 2.0 {
                eprintln!("SLOW {kind} #{i}: {secs:.1} s\n  case: {text}");
            }
            match result {
                Ok(summary) => {
                    if let Some(b) = watch.bad {
                        non_finite += 1;
                        k_fail += 1;
                        eprintln!("NON-FINITE {kind} #{i}: {b}\n  case: {text}");
                    }
                    let a = assessment(&loaded, &summary);
                    if let Err(e) = &a {
                        failures += 1;
                        k_fail += 1;
                        eprintln!("VIRTUAL TESTS FAILED {kind} #{i}: {e}\n  case: {text}");
                    }
                    let h = headline(&loaded, &summary, &watch.tracker, &a);
                    if h.warnings.iter().any(|w| w.contains("numerical balance")) {
                        balance += 1;
                        k_bal += 1;
                    }
                }
                Err(e) => {
                    failures += 1;
                    k_fail += 1;
                    eprintln!("FAIL {kind} #{i}: {e}\n  case: {text}");
                }
            }
        }
        // Wall times are information for the reader, not asserted (a shared machine).
        by_kind.push(format!(
            "{kind}: {k_fail} failed, {k_bal} balance warnings, {:.1} s (slowest #{}: {:.2} s)",
            started.elapsed().as_secs_f64(),
            slowest.1,
            slowest.0
        ));
    }
    eprintln!(
        "random cases (seed {seed}): {runs} runs, {failures} failures, {non_finite} with \
         non-finite values, {balance} ({:.1} %) with a balance warning (target under 2 %)\n  {}",
        100.0 * balance as f64 / runs as f64,
        by_kind.join("\n  ")
    );
    assert_eq!(failures, 0, "runs that failed (see above)");
    assert_eq!(non_finite, 0, "runs with non-finite values (see above)");
}
