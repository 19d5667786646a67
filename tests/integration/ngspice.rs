//! Cross-check against ngspice: every topology's exported deck is run with
//! `ngspice -b`, and its operating point and 1 kHz gain are compared with the
//! closed forms. ngspice is an independent implementation of the same
//! published laws (Shockley 1952 via the SPICE JFET, Shichman–Hodges 1968 via
//! MOSFET level 1), so agreement checks both the closed forms and the export
//! (node order, scale factors, model mapping).
//!
//! Without ngspice the tests print a SKIP notice and pass, except under
//! `CI=true`, where a missing ngspice is a failure.

use crate::util::{get, loud, ngspice_or_skip, rel, run_ngspice, spice_op, TOLERANCE};
use gatewright::device::{Device, Family, ParamRange, Params, Strength};
use gatewright::netlist::{FetKind, GROUND};
use gatewright::report::spice::{netlist_to_spice, spice_number};
use gatewright::topology::{by_id, evaluate, Caps, NetlistInput, Rails, TOPOLOGIES};

/// Test device classes, our own invention, each with two ranged parameters
/// (four corners).
pub(crate) fn device(family: Family, lambda: f64) -> Device {
    let params = match family {
        Family::NJfet => Params::Depletion {
            idss: ParamRange::between(6e-3, 10e-3),
            vgs_off: ParamRange::between(-3.0, -5.0),
        },
        Family::NDepletionMosfet => Params::Depletion {
            idss: ParamRange::between(3e-3, 5e-3),
            vgs_off: ParamRange::between(-1.5, -2.5),
        },
        Family::NEnhancementMosfet => Params::Enhancement {
            vth: ParamRange::between(1.5, 2.5),
            strength: Strength::K(ParamRange::between(0.4e-3, 0.6e-3)),
        },
    };
    Device {
        family,
        params,
        lambda: ParamRange::exact(lambda),
        vgs_max_v: None,
        vgs_min_v: None,
        vds_max_v: None,
        pd_max_w: None,
        source: "test".into(),
    }
}

/// One hand-picked design: every corner of its device saturates, and a JFET
/// keeps VGS <= 0 (its gate junction off, so ngspice's gate diodes carry
/// only leakage).
pub(crate) struct Case {
    pub(crate) topology: &'static str,
    pub(crate) family: Family,
    pub(crate) values: &'static [f64],
    pub(crate) vdd_v: f64,
    pub(crate) vss_v: f64,
    pub(crate) rl_ohm: f64,
    pub(crate) rsig_ohm: f64,
    pub(crate) lambda_per_v: f64,
}

const J: Family = Family::NJfet;
const D: Family = Family::NDepletionMosfet;
const E: Family = Family::NEnhancementMosfet;

#[rustfmt::skip]
pub(crate) const CASES: &[Case] = &[
    Case { topology: "zero-bias", family: D, values: &[1e6, 1.5e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.01 },
    Case { topology: "self-bias", family: J, values: &[1e6, 1e3, 2.2e3], vdd_v: 15.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 10e3, lambda_per_v: 0.0 },
    Case { topology: "self-bias", family: D, values: &[1e6, 470.0, 2.2e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.02 },
    Case { topology: "self-bias-swamped", family: J, values: &[1e6, 1.5e3, 2.2e3], vdd_v: 15.0, vss_v: 0.0, rl_ohm: 22e3, rsig_ohm: 600.0, lambda_per_v: 0.01 },
    Case { topology: "self-bias-swamped", family: D, values: &[2.2e6, 680.0, 2.7e3], vdd_v: 15.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.0 },
    Case { topology: "divider", family: J, values: &[2.2e6, 270e3, 2.2e3, 2.2e3], vdd_v: 16.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 1e3, lambda_per_v: 0.0 },
    Case { topology: "divider", family: D, values: &[1e6, 220e3, 1e3, 1.5e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.01 },
    Case { topology: "divider", family: E, values: &[1e6, 330e3, 0.0, 4.7e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 1e3, lambda_per_v: 0.02 },
    Case { topology: "divider-swamped", family: J, values: &[700e3, 100e3, 2e3, 2.2e3], vdd_v: 16.0, vss_v: 0.0, rl_ohm: 4.7e3, rsig_ohm: 0.0, lambda_per_v: 0.01 },
    Case { topology: "divider-swamped", family: D, values: &[1e6, 150e3, 1e3, 1.5e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 600.0, lambda_per_v: 0.0 },
    Case { topology: "divider-swamped", family: E, values: &[1e6, 470e3, 1e3, 2.2e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.02 },
    Case { topology: "divider-split", family: J, values: &[2.2e6, 270e3, 470.0, 1.8e3, 2.2e3], vdd_v: 16.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.02 },
    Case { topology: "divider-split", family: D, values: &[1e6, 220e3, 330.0, 680.0, 1.5e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 10e3, lambda_per_v: 0.0 },
    Case { topology: "divider-split", family: E, values: &[1e6, 470e3, 330.0, 680.0, 2.2e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.01 },
    Case { topology: "drain-feedback", family: E, values: &[10e6, 3e3], vdd_v: 10.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 1e3, lambda_per_v: 0.01 },
    Case { topology: "follower-self", family: J, values: &[1e6, 1e3], vdd_v: 15.0, vss_v: 0.0, rl_ohm: 1e3, rsig_ohm: 0.0, lambda_per_v: 0.02 },
    Case { topology: "follower-self", family: D, values: &[1e6, 470.0], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 2.2e3, rsig_ohm: 10e3, lambda_per_v: 0.0 },
    Case { topology: "follower-divider", family: J, values: &[1e6, 100e3, 2.2e3], vdd_v: 15.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.0 },
    Case { topology: "follower-divider", family: D, values: &[1e6, 1e6, 2.2e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 600.0, lambda_per_v: 0.01 },
    Case { topology: "follower-divider", family: E, values: &[1e6, 1e6, 1e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 1e3, rsig_ohm: 0.0, lambda_per_v: 0.02 },
    Case { topology: "common-gate", family: J, values: &[700e3, 100e3, 2e3, 2.2e3], vdd_v: 16.0, vss_v: 0.0, rl_ohm: 4.7e3, rsig_ohm: 50.0, lambda_per_v: 0.0 },
    Case { topology: "common-gate", family: D, values: &[1e6, 150e3, 1e3, 1.5e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 50.0, lambda_per_v: 0.01 },
    Case { topology: "common-gate", family: E, values: &[1e6, 470e3, 1e3, 2.2e3], vdd_v: 12.0, vss_v: 0.0, rl_ohm: 10e3, rsig_ohm: 50.0, lambda_per_v: 0.02 },
    Case { topology: "fixed-bias", family: J, values: &[200e3, 800e3, 1e6, 2.2e3], vdd_v: 16.0, vss_v: -10.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.01 },
    Case { topology: "fixed-bias", family: D, values: &[100e3, 900e3, 1e6, 1.5e3], vdd_v: 12.0, vss_v: -10.0, rl_ohm: 10e3, rsig_ohm: 1e3, lambda_per_v: 0.0 },
    Case { topology: "current-source", family: J, values: &[1e6, 4.7e3, 2.2e3], vdd_v: 15.0, vss_v: -15.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.02 },
    Case { topology: "current-source", family: D, values: &[1e6, 4.7e3, 2.2e3], vdd_v: 15.0, vss_v: -15.0, rl_ohm: 10e3, rsig_ohm: 600.0, lambda_per_v: 0.0 },
    Case { topology: "current-source", family: E, values: &[1e6, 4.7e3, 2.2e3], vdd_v: 15.0, vss_v: -15.0, rl_ohm: 10e3, rsig_ohm: 0.0, lambda_per_v: 0.01 },
];

#[test]
fn every_topology_and_family_has_a_cross_check_case() {
    for t in TOPOLOGIES {
        for f in t.families() {
            assert!(
                CASES.iter().any(|c| c.topology == t.id() && c.family == *f),
                "no ngspice case for {} with {}",
                t.id(),
                f.id()
            );
        }
    }
}

// ngspice-39 (Debian package) against the closed forms: ID, VDS and |gain| at
// 1 kHz agree within 0.5 % at every device corner of every case.
#[test]
fn closed_forms_agree_with_ngspice_at_every_corner() {
    if !ngspice_or_skip("closed_forms_agree_with_ngspice_at_every_corner") {
        return;
    }
    let mut worst = [
        (0.0_f64, String::new()),
        (0.0, String::new()),
        (0.0, String::new()),
    ];
    let mut runs = 0;
    for case in CASES {
        let t = by_id(case.topology).unwrap();
        assert!(
            t.supports(case.family),
            "{} {}",
            case.topology,
            case.family.id()
        );
        let dev = device(case.family, case.lambda_per_v);
        let corners = dev.corners();
        assert_eq!(corners.len(), 4);
        let rails = Rails {
            vdd_v: case.vdd_v,
            vss_v: case.vss_v,
        };
        let input = NetlistInput {
            law: corners[0].law,
            kind: if case.family.is_jfet() {
                FetKind::NJfet
            } else {
                FetKind::NMos
            },
            rails,
            rl_ohm: case.rl_ohm,
            rsig_ohm: case.rsig_ohm,
            caps: Caps::MID_BAND,
        };
        let stem = format!("{}-{}", case.topology, case.family.id());
        for (k, corner) in corners.iter().enumerate() {
            let file = format!("{stem}-corner{k}");
            let ctx = format!("{file} ({})", corner.label);
            let e = evaluate(
                t,
                case.values,
                &rails,
                &corner.law,
                case.rl_ohm,
                case.rsig_ohm,
            );
            // Preconditions of a meaningful case.
            assert!(e.op.saturated(), "{ctx}: not saturated: {:?}", e.op);
            if case.family.is_jfet() {
                assert!(e.op.vgs_v <= 0.0, "{ctx}: JFET gate forward: {:?}", e.op);
            }
            let net = t.netlist(
                case.values,
                &NetlistInput {
                    law: corner.law,
                    ..input
                },
            );
            let deck = netlist_to_spice(&net, &format!("{stem} corner {k}"), &[]);
            let op = spice_op(&net, &deck, &file, &ctx);
            runs += 1;
            let (id, vds, gain) = (op.id_a, op.vds_v, op.gain);
            let want_gain = e.ss.gain_from_source(case.rsig_ohm).abs();
            let got = [
                (rel(id, e.op.id_a), "ID", id, e.op.id_a),
                (rel(vds, e.op.vds_v), "VDS", vds, e.op.vds_v),
                (rel(gain, want_gain), "|gain|", gain, want_gain),
            ];
            for (i, (r, what, ng, ours)) in got.iter().enumerate() {
                assert!(
                    *r <= TOLERANCE,
                    "{ctx}: {what} ngspice {ng:e} vs closed form {ours:e} (rel {r:e})\n{}",
                    deck
                );
                if *r >= worst[i].0 {
                    worst[i] = (
                        *r,
                        format!("{what}: {r:.3e} at {ctx} (ngspice {ng:e}, closed form {ours:e})"),
                    );
                }
            }
        }
    }
    let mut summary =
        format!("ngspice cross-check: {runs} runs; largest relative disagreement per quantity:");
    for (_, line) in &worst {
        summary.push_str(&format!("\n  {line}"));
    }
    loud(&summary);
}

// ngspice manual, "scale factors", read by ngspice itself: a number written
// by `spice_number` (MEG for mega, m for milli) is the value ngspice uses.
#[test]
fn ngspice_reads_numbers_as_written() {
    if !ngspice_or_skip("ngspice_reads_numbers_as_written") {
        return;
    }
    let values = [
        2.2e6,
        10e6,
        1.5e-3,
        4.7e3,
        470.0,
        0.1,
        3.3e-6,
        1e9,
        2.44897959183673e-4,
        1.0 / 3.0,
    ];
    let mut deck = String::from("scale factor check\nV1 a 0 DC 1\n");
    let mut print = String::from("print");
    for (i, v) in values.iter().enumerate() {
        deck.push_str(&format!("R{i} a 0 {}\n", spice_number(*v)));
        print.push_str(&format!(" @r{i}[resistance]"));
    }
    deck.push_str(&format!(
        ".control\nset numdgt=15\nop\n{print}\nquit 0\n.endc\n.end\n"
    ));
    let printed = run_ngspice(&deck, "scale-factors");
    for (i, v) in values.iter().enumerate() {
        let got = get(&printed, &format!("@r{i}[resistance]"), "scale factors");
        assert!(rel(got, *v) < 1e-12, "{} read as {got:e}", spice_number(*v));
    }
}

// A deck with a FET but no output node still runs cleanly (no AC print).
#[test]
fn deck_without_output_runs_cleanly() {
    if !ngspice_or_skip("deck_without_output_runs_cleanly") {
        return;
    }
    let t = by_id("self-bias").unwrap();
    let corner = device(Family::NJfet, 0.0).nominal();
    let input = NetlistInput {
        law: corner.law,
        kind: FetKind::NJfet,
        rails: Rails {
            vdd_v: 15.0,
            vss_v: 0.0,
        },
        rl_ohm: 10e3,
        rsig_ohm: 0.0,
        caps: Caps::MID_BAND,
    };
    let mut net = t.netlist(&[1e6, 1e3, 2.2e3], &input);
    net.output = GROUND;
    let printed = run_ngspice(&netlist_to_spice(&net, "no output", &[]), "no-output");
    // Shockley: the self-bias point solves ID = IDSS (1 - ID RS / |VP|)^2.
    let id = get(&printed, "@jq1[id]", "no output");
    let e = evaluate(t, &[1e6, 1e3, 2.2e3], &input.rails, &corner.law, 10e3, 0.0);
    assert!(rel(id, e.op.id_a) < TOLERANCE);
    assert!(!printed.keys().any(|k| k.starts_with("vm(")));
}
