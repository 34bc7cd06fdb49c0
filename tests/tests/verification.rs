//! Runs every verification group and fails on any check outside its tolerance.

use boreflux_verify::{groups, CheckResult};

fn assert_group(id: &str) {
    let g = groups()
        .into_iter()
        .find(|g| g.id == id)
        .expect("group exists");
    let results: Vec<CheckResult> = (g.run)();
    assert!(!results.is_empty(), "group {id} compared nothing");
    for r in &results {
        eprintln!(
            "{:>9} {:<60} error {:.3e} (tol {:.1e} {})",
            if r.passed { "ok" } else { "FAIL" },
            r.name,
            r.error,
            r.tolerance,
            r.metric
        );
    }
    let failed: Vec<_> = results.iter().filter(|r| !r.passed).collect();
    assert!(
        failed.is_empty(),
        "{} checks failed in {id}: {failed:#?}",
        failed.len()
    );
}

#[test]
fn thiem_steady_composite() {
    assert_group("thiem");
}

#[test]
fn harmonic_method_periodic_state() {
    assert_group("harmonic");
}

#[test]
fn periodic_state_by_shooting() {
    assert_group("shooting");
}

#[test]
fn theis_constant_rate() {
    assert_group("theis");
}

#[test]
fn periodic_head_amplitude_and_phase() {
    assert_group("periodic");
}

#[test]
fn slug_cooper_bredehoeft_papadopulos() {
    assert_group("slug");
}

#[test]
fn pumping_with_wellbore_storage_and_skin() {
    assert_group("storage");
}

#[test]
fn mass_and_energy_balance() {
    assert_group("balance");
}

#[test]
fn time_stepping_second_order() {
    assert_group("order");
}

#[test]
fn steady_forchheimer() {
    assert_group("forchheimer");
}

#[test]
fn grain_size_estimates() {
    assert_group("grain");
}

#[test]
fn thin_cake_skin_hawkins() {
    assert_group("cake_skin");
}

#[test]
fn screen_entrance_loss() {
    assert_group("screen");
}

#[test]
fn cake_erosion_closed_form() {
    assert_group("erosion");
}

#[test]
fn cake_lift_off_distribution_and_threshold() {
    assert_group("lift_off");
}

#[test]
fn invaded_zone_fines_closed_form_and_conservation() {
    assert_group("fines");
}

#[test]
fn damage_removal_is_monotonic() {
    assert_group("damage_monotonic");
}

#[test]
fn retention_criteria_at_published_limits() {
    assert_group("retention");
}

#[test]
fn energy_identity_with_nonlinear_losses() {
    assert_group("nonlinear_energy");
}

#[test]
fn annulus_width_limit() {
    assert_group("annulus");
}

#[test]
fn drives_volume_balance() {
    assert_group("drives_volume");
}

#[test]
fn surge_block_limits() {
    assert_group("surge_limits");
}

#[test]
fn swab_stroke_and_recovery() {
    assert_group("swab");
}

#[test]
fn schedule_pumping_stage() {
    assert_group("schedule");
}

#[test]
fn collapse_pressure() {
    assert_group("collapse");
}

#[test]
fn pump_curve_and_suction_break() {
    assert_group("pump");
}

#[test]
fn jet_volume_balance() {
    assert_group("jet");
}

#[test]
fn vapour_bound_and_column_parting() {
    assert_group("vapour");
}

#[test]
fn conductance_jump_against_laplace_solution() {
    assert_group("conductance_jump");
}

#[test]
fn slug_with_an_inertial_column() {
    assert_group("inertia");
}

#[test]
fn virtual_pumping_and_step_tests() {
    assert_group("virtual_tests");
}
