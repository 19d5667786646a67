//! Hand-solved netlists, built here element by element (not from the
//! topologies), each checked against a value worked out independently.

use super::*;
use crate::device::SquareLaw;
use crate::netlist::{FetKind, GROUND};

fn jfet(idss: f64, vp: f64) -> SquareLaw {
    SquareLaw {
        vto_v: vp,
        k_a_per_v2: idss / (vp * vp),
        lambda_per_v: 0.0,
    }
}

fn close(got: f64, want: f64, tol: f64, what: &str) {
    assert!((got - want).abs() <= tol, "{what}: got {got}, want {want}");
}

fn assert_kcl(net: &Netlist, dc: &DcSolution) {
    for (n, r) in kcl_residuals(net, dc).unwrap().iter().enumerate() {
        assert!(r.abs() < 1e-9, "KCL at node `{}`: {r:e} A", net.nodes[n]);
    }
}

/// Self bias: RG to ground, RS to ground, RD from VDD; signal into the gate,
/// output coupled to RL.
fn self_bias(law: SquareLaw, vdd: f64, rd: f64, rs: f64, rl: f64) -> Netlist {
    let mut n = Netlist::new();
    let (vdd_n, g, s, d, sig, out) = (
        n.node("vdd"),
        n.node("g"),
        n.node("s"),
        n.node("d"),
        n.node("sig"),
        n.node("out"),
    );
    n.vsource("VDD", vdd_n, GROUND, vdd, 0.0);
    n.resistor("RG", g, GROUND, 1e6);
    n.resistor("RS", s, GROUND, rs);
    n.capacitor("C_S", s, GROUND, 100e-6);
    n.resistor("RD", vdd_n, d, rd);
    n.fet("Q1", FetKind::NJfet, d, g, s, law);
    n.vsource("VIN", sig, GROUND, 0.0, 1.0);
    n.capacitor("C_IN", sig, g, 1e-6);
    n.capacitor("C_OUT", d, out, 10e-6);
    n.resistor("RL", out, GROUND, rl);
    n.input = g;
    n.output = out;
    n.signal_source = "VIN".into();
    n
}

// Voltage-divider rule (Kirchhoff/Ohm): 10 V across 1 kΩ + 3 kΩ gives 7.5 V
// at the tap and 2.5 mA from the source.
#[test]
fn resistor_divider() {
    let mut n = Netlist::new();
    let (top, tap) = (n.node("top"), n.node("tap"));
    n.vsource("V1", top, GROUND, 10.0, 0.0);
    n.resistor("RA", top, tap, 1e3);
    n.resistor("RB", tap, GROUND, 3e3);
    let dc = dc(&n).unwrap();
    close(dc.node_v[tap], 7.5, 1e-12, "tap");
    close(dc.source_current("V1").unwrap(), 2.5e-3, 1e-15, "I(V1)");
    assert_kcl(&n, &dc);
}

// REFERENCE §4.6 (Boylestad & Nashelsky ch. 7 self bias, ngspice-confirmed):
// IDSS 8 mA, VP −4 V, RS 1 kΩ → VGS = −2 V, ID = 2 mA; VDS = 15 − 2 mA·3 kΩ.
#[test]
fn jfet_self_bias_reference_point() {
    let n = self_bias(jfet(8e-3, -4.0), 15.0, 2e3, 1e3, 10e3);
    let dc = dc(&n).unwrap();
    let q = dc.fet("Q1").unwrap();
    close(q.vgs_v, -2.0, 1e-12, "VGS");
    close(q.id_a, 2e-3, 1e-15, "ID");
    close(q.vds_v, 9.0, 1e-11, "VDS");
    close(q.gm_s, 2e-3, 1e-15, "gm"); // REFERENCE §4.6: 2.000 mS (ngspice)
    assert_eq!(q.region, Region::Saturation);
    close(dc.source_current("VDD").unwrap(), 2e-3, 1e-15, "I(VDD)");
    assert_kcl(&n, &dc);
}

// REFERENCE §4.6 (ngspice-39): drain feedback, VT 3 V, K 0.24 mA/V², RD 2 kΩ,
// RF 10 MΩ, VDD 12 V → VGS = VDS = 6.41199 V, ID = 2.7940 mA. Also the hand
// solution of VDD − K(V − VT)²·RD = V (quadratic formula).
#[test]
fn drain_feedback_reference_point() {
    let law = SquareLaw {
        vto_v: 3.0,
        k_a_per_v2: 0.24e-3,
        lambda_per_v: 0.0,
    };
    let mut n = Netlist::new();
    let (vdd, g, d) = (n.node("vdd"), n.node("g"), n.node("d"));
    n.vsource("VDD", vdd, GROUND, 12.0, 0.0);
    n.resistor("RD", vdd, d, 2e3);
    n.resistor("RF", d, g, 10e6);
    n.fet("Q1", FetKind::NMos, d, g, GROUND, law);
    let dc = dc(&n).unwrap();
    let q = dc.fet("Q1").unwrap();
    // K·RD·x² + x − (VDD − VT) = 0 with x = V − VT.
    let (a, c): (f64, f64) = (0.24e-3 * 2e3, 12.0 - 3.0);
    let x = (-1.0 + (1.0 + 4.0 * a * c).sqrt()) / (2.0 * a);
    close(q.vgs_v, 3.0 + x, 1e-12, "VGS (hand)");
    close(q.vgs_v, 6.41199, 1e-5, "VGS (ngspice)");
    close(q.vds_v, q.vgs_v, 1e-12, "VDS = VGS");
    close(q.id_a, 2.7940e-3, 1e-7, "ID (ngspice)");
    close(q.gm_s, 1.638e-3, 1e-6, "gm"); // REFERENCE §4.6: 1.638 mS
    assert_kcl(&n, &dc);
}

// REFERENCE §4.6 (ngspice-39): divider 2.1 MΩ/270 kΩ from 16 V, RS 1.5 kΩ,
// IDSS 8 mA, VP −4 V → VG = 1.82279 V, VGS = −1.80168 V, ID = 2.4163 mA.
#[test]
fn jfet_divider_reference_point() {
    let mut n = Netlist::new();
    let (vdd, g, s, d) = (n.node("vdd"), n.node("g"), n.node("s"), n.node("d"));
    n.vsource("VDD", vdd, GROUND, 16.0, 0.0);
    n.resistor("R1", vdd, g, 2.1e6);
    n.resistor("R2", g, GROUND, 270e3);
    n.resistor("RS", s, GROUND, 1.5e3);
    n.resistor("RD", vdd, d, 2e3);
    n.fet("Q1", FetKind::NJfet, d, g, s, jfet(8e-3, -4.0));
    let dc = dc(&n).unwrap();
    let q = dc.fet("Q1").unwrap();
    close(dc.node_v[g], 1.82279, 1e-5, "VG");
    close(q.vgs_v, -1.80168, 1e-5, "VGS");
    close(q.id_a, 2.4163e-3, 1e-7, "ID");
    close(q.gm_s, 2.1983e-3, 1e-7, "gm");
    assert_kcl(&n, &dc);
}

// Triode by hand: VGS = 0, IDSS 8 mA, VP −4 V, RD 10 kΩ from 10 V. KCL at
// the drain, (10 − V)/10k = k·V·(8 − V) with k = 0.5 mA/V², gives
// 5V² − 41V + 10 = 0 (Shichman–Hodges triode law).
#[test]
fn triode_operating_point() {
    let mut n = Netlist::new();
    let (vdd, d) = (n.node("vdd"), n.node("d"));
    n.vsource("VDD", vdd, GROUND, 10.0, 0.0);
    n.resistor("RD", vdd, d, 10e3);
    n.fet("Q1", FetKind::NJfet, d, GROUND, GROUND, jfet(8e-3, -4.0));
    let dc = dc(&n).unwrap();
    let q = dc.fet("Q1").unwrap();
    let v = (41.0 - (41.0f64 * 41.0 - 200.0).sqrt()) / 10.0;
    close(q.vds_v, v, 1e-12, "VDS");
    close(q.id_a, (10.0 - v) / 10e3, 1e-15, "ID");
    assert_eq!(q.region, Region::Triode);
    assert_kcl(&n, &dc);
}

// Cut-off: the gate held at −5 V by a divider from −10 V, below VP = −4 V, so
// no channel (Shockley: ID = 0 for VGS <= VP) and the drain sits at VDD.
#[test]
fn cut_off_operating_point() {
    let mut n = Netlist::new();
    let (vdd, vss, g, d) = (n.node("vdd"), n.node("vss"), n.node("g"), n.node("d"));
    n.vsource("VDD", vdd, GROUND, 12.0, 0.0);
    n.vsource("VSS", vss, GROUND, -10.0, 0.0);
    n.resistor("R1", g, GROUND, 1e6);
    n.resistor("R2", g, vss, 1e6);
    n.resistor("RD", vdd, d, 4.7e3);
    n.fet("Q1", FetKind::NJfet, d, g, GROUND, jfet(8e-3, -4.0));
    let dc = dc(&n).unwrap();
    let q = dc.fet("Q1").unwrap();
    assert_eq!(q.region, Region::Cutoff);
    assert_eq!(q.id_a, 0.0);
    close(q.vds_v, 12.0, 1e-12, "VDS");
    close(q.vgs_v, -5.0, 1e-12, "VGS");
    assert_kcl(&n, &dc);
}

// A symmetric channel: wiring the same device with drain and source
// exchanged gives the same node voltages (SPICE's JFET/MOS1 convention).
#[test]
fn reversed_device_gives_the_same_circuit() {
    let build = |reversed: bool| {
        let mut n = Netlist::new();
        let (vdd, d, s) = (n.node("vdd"), n.node("d"), n.node("s"));
        n.vsource("VDD", vdd, GROUND, 5.0, 0.0);
        n.resistor("RD", vdd, d, 1e3);
        n.resistor("RS", s, GROUND, 470.0);
        let (x, y) = if reversed { (s, d) } else { (d, s) };
        n.fet("Q1", FetKind::NJfet, x, GROUND, y, jfet(10e-3, -3.0));
        n
    };
    let (a, b) = (dc(&build(false)).unwrap(), dc(&build(true)).unwrap());
    for (va, vb) in a.node_v.iter().zip(&b.node_v) {
        close(*va, *vb, 1e-12, "node voltage");
    }
    let (qa, qb) = (a.fet("Q1").unwrap(), b.fet("Q1").unwrap());
    close(qa.id_a, -qb.id_a, 1e-15, "ID reverses");
    assert!(qb.vds_v < 0.0);
    assert_kcl(&build(true), &b);
}

// Every continuation method reaches the same operating point as plain
// Newton (REFERENCE §4.6 self-bias values).
#[test]
fn continuation_methods_agree_with_newton() {
    let n = self_bias(jfet(8e-3, -4.0), 15.0, 2e3, 1e3, 10e3);
    for method in [DcMethod::SourceStepping, DcMethod::GminStepping] {
        let opts = DcOptions {
            methods: vec![method],
            ..DcOptions::default()
        };
        let dc = dc_with(&n, &opts).unwrap();
        assert_eq!(dc.method, method);
        let q = dc.fet("Q1").unwrap();
        close(q.vgs_v, -2.0, 1e-12, method.id());
        close(q.id_a, 2e-3, 1e-15, method.id());
    }
}

// A guess of the FET current moves Newton's start, not its answer: from
// the right current (2 mA, REFERENCE §4.6 self-bias values) it confirms
// the point at once, from wrong ones (off by −90 % to +400 %, and the
// wrong sign) it still reaches the same point.
#[test]
fn a_current_guess_moves_the_start_not_the_answer() {
    let n = self_bias(jfet(8e-3, -4.0), 15.0, 2e3, 1e3, 10e3);
    let plain = dc(&n).unwrap();
    for guess in [2e-3, 0.2e-3, 10e-3, -2e-3, 0.0] {
        let opts = DcOptions {
            fet_currents_a: Some(vec![guess]),
            ..DcOptions::default()
        };
        let dc = dc_with(&n, &opts).unwrap();
        let q = dc.fet("Q1").unwrap();
        let what = format!("guess {guess} A");
        close(q.vgs_v, -2.0, 1e-12, &what);
        close(q.id_a, 2e-3, 1e-15, &what);
        if guess == 2e-3 {
            assert!(
                dc.iterations < plain.iterations && dc.iterations <= 2,
                "{} iterations from the right current, {} from the usual start",
                dc.iterations,
                plain.iterations
            );
        }
    }
}

#[test]
fn too_few_iterations_is_an_error_not_an_answer() {
    let n = self_bias(jfet(8e-3, -4.0), 15.0, 2e3, 1e3, 10e3);
    let opts = DcOptions {
        max_iterations: 2,
        methods: vec![DcMethod::Newton],
        ..DcOptions::default()
    };
    match dc_with(&n, &opts) {
        Err(SolveError::NoConvergence { methods, .. }) => assert_eq!(methods, "newton"),
        other => panic!("expected NoConvergence, got {other:?}"),
    }
}

#[test]
fn floating_node_is_named() {
    let mut n = Netlist::new();
    let (a, b) = (n.node("a"), n.node("island"));
    n.vsource("V1", a, GROUND, 1.0, 0.0);
    n.resistor("R1", a, GROUND, 1e3);
    n.capacitor("C1", a, b, 1e-6);
    let err = dc(&n).unwrap_err();
    assert_eq!(err.to_string(), "node `island` has no DC path to ground");
}

#[test]
fn parallel_sources_are_singular() {
    let mut n = Netlist::new();
    let a = n.node("a");
    n.vsource("V1", a, GROUND, 1.0, 0.0);
    n.vsource("V2", a, GROUND, 2.0, 0.0);
    assert_eq!(dc(&n).unwrap_err(), SolveError::Singular { analysis: "DC" });
}

#[test]
fn bad_values_name_the_element_field_and_rule() {
    let mut n = Netlist::new();
    let a = n.node("a");
    n.vsource("V1", a, GROUND, 1.0, 0.0);
    n.resistor("R7", a, GROUND, -5.0);
    assert_eq!(
        dc(&n).unwrap_err().to_string(),
        "`R7`.ohms = -5: must be finite and > 0"
    );
    let mut n = Netlist::new();
    n.resistor("R8", 0, 3, 1e3);
    assert_eq!(
        dc(&n).unwrap_err().to_string(),
        "`R8`.b = node 3: the netlist has only 1 nodes"
    );
}

// Boylestad & Nashelsky ch. 8 (bypassed self bias, REFERENCE §3.1):
// Av = −gm·(RD∥RL) with gm = 2 mS at the §4.6 point, Zin = RG, Zout = RD.
#[test]
fn mid_band_common_source_by_hand() {
    let n = self_bias(jfet(8e-3, -4.0), 15.0, 2e3, 1e3, 10e3);
    let dc = dc(&n).unwrap();
    let m = small_signal(&n, &dc, Freq::MidBand).unwrap();
    let rp = 2e3 * 10e3 / 12e3;
    close(m.gain.re, -2e-3 * rp, 1e-12, "gain");
    close(m.zin_ohm.re, 1e6, 1e-6, "Zin");
    close(m.zout_ohm.re, 2e3, 1e-9, "Zout");
    assert_eq!((m.gain.im, m.zin_ohm.im, m.zout_ohm.im), (0.0, 0.0, 0.0));
}

/// VIN → C → R to ground: a first-order high-pass.
fn rc_high_pass(r: f64, c: f64) -> Netlist {
    let mut n = Netlist::new();
    let (sig, out) = (n.node("sig"), n.node("out"));
    n.vsource("VIN", sig, GROUND, 0.0, 1.0);
    n.capacitor("C1", sig, out, c);
    n.resistor("RL", out, GROUND, r);
    n.input = sig;
    n.output = out;
    n.signal_source = "VIN".into();
    n
}

// First-order RC high-pass (any circuits text): H = jωRC/(1 + jωRC), −3 dB
// at f = 1/(2πRC); Zout with the EMF shorted is 1/(jωC).
#[test]
fn rc_high_pass_response_and_corner() {
    let (r, c) = (10e3, 100e-9);
    let n = rc_high_pass(r, c);
    let dc = dc(&n).unwrap();
    let fc = 1.0 / (2.0 * std::f64::consts::PI * r * c);
    for f in [fc / 10.0, fc, 3.0 * fc] {
        let m = small_signal(&n, &dc, Freq::Hz(f)).unwrap();
        let wrc = Complex64::new(0.0, 2.0 * std::f64::consts::PI * f * r * c);
        let want = wrc / (1.0 + wrc);
        assert!(
            (m.gain - want).norm() < 1e-12,
            "{f} Hz: {} vs {want}",
            m.gain
        );
        let zc = 1.0 / Complex64::new(0.0, 2.0 * std::f64::consts::PI * f * c);
        assert!((m.zout_ohm - zc).norm() < 1e-9 * zc.norm());
    }
    let points = sweep(&n, &dc, 1.0, 1e5, 10).unwrap();
    assert_eq!(points.len(), 51);
    assert!((points[0].0 - 1.0).abs() < 1e-12 && (points[50].0 - 1e5).abs() < 1e-7);
    match corner_low(&n, &dc, 1.0, 1e5, 10).unwrap() {
        LowCorner::At(f) => close(f, fc, 1e-9 * fc, "corner"),
        other => panic!("{other:?}"),
    }
    // fc ≈ 159 Hz: below a 1 kHz–100 kHz sweep, above a 1–100 Hz one.
    assert_eq!(
        corner_low(&n, &dc, 1e3, 1e5, 10).unwrap(),
        LowCorner::BelowRange
    );
    assert_eq!(
        corner_low(&n, &dc, 1.0, 100.0, 10).unwrap(),
        LowCorner::AboveRange
    );
}

// Bypass network (REFERENCE §5): the source-bypass pole sits at
// (gm + 1/RS)/CS with ro → ∞, and the zero at 1/(RS·CS); with coupling
// capacitors far larger the gain is mid-band times (ωz + jω)/(ωp + jω)
// (the CS gain −gm·Rp/(1 + gm·ZS) with ZS = RS∥1/(jωCS), computed).
#[test]
fn source_bypass_pole_and_zero() {
    let mut n = self_bias(jfet(8e-3, -4.0), 15.0, 2e3, 1e3, 10e3);
    for e in &mut n.elements {
        if let crate::netlist::Element::Capacitor { name, farads, .. } = e {
            *farads = if name == "C_S" { 10e-6 } else { 1.0 };
        }
    }
    let dc = dc(&n).unwrap();
    let mid = small_signal(&n, &dc, Freq::MidBand).unwrap().gain;
    let (wz, wp) = (1.0 / (1e3 * 10e-6), (2e-3 + 1e-3) / 10e-6);
    for f in [5.0, 47.7, 200.0] {
        let w = 2.0 * std::f64::consts::PI * f;
        let shape = Complex64::new(wz, w) / Complex64::new(wp, w);
        let g = small_signal(&n, &dc, Freq::Hz(f)).unwrap().gain;
        // The 1 F coupling capacitors move the result by ~1e-9 relative.
        assert!(
            (g - mid * shape).norm() < 1e-6 * mid.norm(),
            "{f}: {g} vs {}",
            mid * shape
        );
    }
}

#[test]
fn bad_frequencies_are_rejected() {
    let n = rc_high_pass(1e3, 1e-6);
    let dc = dc(&n).unwrap();
    assert!(matches!(
        small_signal(&n, &dc, Freq::Hz(-1.0)),
        Err(SolveError::InvalidFrequency { .. })
    ));
    assert!(matches!(
        sweep(&n, &dc, 10.0, 1.0, 10),
        Err(SolveError::InvalidFrequency {
            field: "f_stop_hz",
            ..
        })
    ));
    assert!(matches!(
        sweep(&n, &dc, 1.0, 10.0, 0),
        Err(SolveError::InvalidFrequency {
            field: "points_per_decade",
            ..
        })
    ));
}

#[test]
fn ac_with_a_foreign_dc_solution_is_refused() {
    let a = rc_high_pass(1e3, 1e-6);
    let b = self_bias(jfet(8e-3, -4.0), 15.0, 2e3, 1e3, 10e3);
    let dc_a = dc(&a).unwrap();
    assert!(matches!(
        ac(&b, &dc_a, Freq::MidBand),
        Err(SolveError::Mismatch { .. })
    ));
}
