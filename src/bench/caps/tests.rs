use super::*;
use crate::analysis::Problem;
use crate::catalog::ESeries;
use crate::spec::ValidSpec;
use crate::topology::by_id;

/// REFERENCE §5 quotes three significant figures: half a unit in the
/// third figure of the smallest mantissa (1.00) is 5e-3 relative.
const SIG3: f64 = 5e-3;

fn close(got: f64, want: f64, rel: f64) {
    assert!(
        (got - want).abs() <= rel * want.abs(),
        "got {got}, want {want}"
    );
}

/// A self-bias stage with Rsig 1 kΩ, RL 10 kΩ, λ = 0 and the given device
/// spread.
fn problem(idss: (f64, f64), vp: (f64, f64)) -> Problem {
    Problem::new(&ValidSpec {
        source_resistance_ohm: 1e3,
        f_low_hz: Some(20.0),
        ..crate::spec::jfet_test_spec(15.0, 0.0, idss, vp)
    })
}

// REFERENCE §5 check values at 20 Hz [computed from C = 1/(2π f R)]:
// Rsig 1 kΩ + Zin 1 MΩ -> 7.95 nF; RD 4.7 kΩ + RL 10 kΩ -> 0.541 µF;
// RS 1 kΩ ∥ 1/gm (gm 2 mS) = 333.3 Ω -> 23.9 µF; a decade lower (2 Hz)
// the coupling values become 79.5 nF and 5.41 µF.
#[test]
fn capacitance_matches_reference_check_values() {
    close(capacitance_for(20.0, 1e3 + 1e6), 7.95e-9, SIG3);
    close(capacitance_for(20.0, 4.7e3 + 10e3), 0.541e-6, SIG3);
    let req = par(&[1e3, source_resistance_ohm(2e-3, 0.0, 0.0)]);
    close(req, 1000.0 / 3.0, 1e-12);
    close(capacitance_for(20.0, req), 23.9e-6, SIG3);
    close(capacitance_for(2.0, 1e3 + 1e6), 79.5e-9, SIG3);
    close(capacitance_for(2.0, 4.7e3 + 10e3), 5.41e-6, SIG3);
}

// REFERENCE §5: with finite ro, the source sees (ro + Rp)/(1 + gm·ro);
// hand numbers: ro 50 kΩ, Rp 5 kΩ, gm 2 mS -> 55k/101 = 544.55 Ω.
#[test]
fn source_resistance_includes_ro() {
    close(
        source_resistance_ohm(2e-3, 1.0 / 50e3, 5e3),
        55e3 / 101.0,
        1e-12,
    );
    close(source_resistance_ohm(2e-3, 0.0, 5e3), 500.0, 1e-12);
}

// IEC 60063 E6 (1.0 1.5 2.2 3.3 4.7 6.8) and E12 (… 6.8 8.2): the next
// value up, an exact series value kept.
#[test]
fn snapping_goes_up_in_the_series() {
    close(snap_up(23.9e-6, ESeries::E6), 33e-6, 1e-12);
    close(snap_up(7.95e-9, ESeries::E12), 8.2e-9, 1e-12);
    close(snap_up(4.7e-6, ESeries::E6), 4.7e-6, 1e-12);
    close(snap_up(7.0e-6, ESeries::E6), 10e-6, 1e-12);
    close(next_up(4.7e-6, ESeries::E6), 6.8e-6, 1e-12);
    close(next_up(6.8e-6, ESeries::E6), 10e-6, 1e-12);
    // A film value that rounds past 1 µF becomes an E6 electrolytic.
    close(snap(0.9e-6), 1e-6, 1e-12);
}

// The REFERENCE §5 stage (IDSS 8 mA, VP −4 V, RS 1 kΩ: ID 2 mA, gm 2 mS,
// Boylestad & Nashelsky ch. 7), one device corner: the rule's unrounded
// values are the check values scaled by the pole placement, and the nodal
// solver's corner lands at or below 20 Hz but not far below it.
#[test]
fn self_bias_stage_uses_reference_resistances_and_meets_f_low() {
    let p = problem((8e-3, 8e-3), (-4.0, -4.0));
    let t = by_id("self-bias").unwrap();
    let plan = size(&p, t, &[1e6, 1e3, 4.7e3], &[0.0; 3], 20.0).unwrap();
    let get = |d: &str| plan.caps.iter().find(|c| c.designator == d).unwrap();
    close(plan.margin, 1.25, 1e-12);
    // Bypass dominant at 20/1.25 = 16 Hz: 23.9 µF · 1.25.
    close(get("C_S").exact_f, 23.9e-6 * 1.25, SIG3);
    close(get("C_S").farads, 33e-6, 1e-12);
    // Coupling a decade below: 79.5 nF and 5.41 µF.
    close(get("C_IN").exact_f, 79.5e-9, SIG3);
    close(get("C_IN").farads, 82e-9, 1e-12);
    close(get("C_OUT").exact_f, 5.41e-6, SIG3);
    close(get("C_OUT").farads, 6.8e-6, 1e-12);
    assert_eq!(plan.corners.len(), 1);
    let c = &plan.corners[0];
    assert!(c.pass);
    let f = c.low_caps_hz.unwrap();
    assert!(f <= 20.0 && f > 5.0, "corner {f} Hz");
    assert!(c.nominal_caps_hz.unwrap() < f);
}

// REFERENCE §4.2 window device (IDSS 4–12 mA, VGS(off) −2 to −6 V): every
// corner is confirmed, and the bypass is sized at the largest gm.
#[test]
fn every_device_corner_is_confirmed() {
    let p = problem((4e-3, 12e-3), (-2.0, -6.0));
    let t = by_id("self-bias").unwrap();
    let values = [1e6, 1e3, 2.2e3];
    let plan = size(&p, t, &values, &[0.05; 3], 20.0).unwrap();
    assert_eq!(plan.corners.len(), p.corners.len());
    assert!(plan.corners.iter().all(|c| c.pass));
    let gm_max = p
        .corners
        .iter()
        .map(|c| {
            crate::analysis::quick(&p, t, &values, &c.law, &p.rails)
                .eval
                .gm_s
        })
        .fold(0.0, f64::max);
    let cs = plan.caps.iter().find(|c| c.designator == "C_S").unwrap();
    // RS at its −5 % extreme is the smallest shunt.
    let req_nominal_rs = par(&[1e3, 1.0 / gm_max]);
    assert!(
        cs.r_ohm <= req_nominal_rs,
        "{} > {req_nominal_rs}",
        cs.r_ohm
    );
    assert!(plan.rule.contains("f_low/10"));
}

// A follower has no bypass: the coupling with the smaller resistance
// (the output, Zout + RL against Rsig + Zin) takes the dominant role.
#[test]
fn without_bypass_the_costlier_coupling_is_dominant() {
    let p = problem((8e-3, 8e-3), (-4.0, -4.0));
    let t = by_id("follower-self").unwrap();
    let plan = size(&p, t, &[1e6, 1e3], &[0.0; 2], 20.0).unwrap();
    close(plan.margin, 1.0 / 0.9, 1e-12);
    let out = plan.caps.iter().find(|c| c.designator == "C_OUT").unwrap();
    close(out.pole_hz, 18.0, 1e-12);
    assert!(plan.corners.iter().all(|c| c.pass));
}

#[test]
fn rejects_a_bad_frequency() {
    let p = problem((8e-3, 8e-3), (-4.0, -4.0));
    let t = by_id("self-bias").unwrap();
    let e = size(&p, t, &[1e6, 1e3, 4.7e3], &[0.0; 3], 0.0).unwrap_err();
    assert!(e.to_string().contains("`band.f_low` = 0"), "{e}");
}
