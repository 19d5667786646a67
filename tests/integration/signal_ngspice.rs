//! Output swing, temperature, noise and distortion against ngspice-39 (the
//! Debian package), on every topology and family of the operating-point
//! cross-check (`ngspice::CASES`), at the nominal device:
//!
//! - swing: a transient at 0.95× the tool's symmetric output peak stays
//!   saturated, on and (JFET) with its gate off; at 1.15× one of these
//!   fails;
//! - temperature: the gain at −40 °C and 85 °C (`.options temp=`; a `.temp`
//!   list would fall back to 27 °C) agrees with the tool's law at that
//!   temperature (JFET through VTOTC/BETATCE/TNOM on the model card; the
//!   level-1 MOSFET has no such parameters, so its VTO and KP are written
//!   per temperature);
//! - noise: `.noise` inoise at 1 kHz within 1 % of the tool's
//!   input-referred density (the load made noiseless, as the tool counts
//!   it the next stage's);
//! - distortion: `.four` on a transient within 15 % of the tool's HD2
//!   wherever it is above 0.1 %.
//!
//! Without ngspice the tests print a SKIP notice and pass, except under
//! `CI=true`.

use crate::ngspice::{device, CASES};
use crate::util::{loud, ngspice_or_skip, rel, run_ngspice};
use gatewright::device::temperature::{kelvin, TempCoeffs};
use gatewright::device::{Corner, Family};
use gatewright::netlist::{Element, FetKind, Netlist, GROUND};
use gatewright::report::spice::{designator, netlist_to_spice, spice_number};
use gatewright::signal::distortion::harmonics;
use gatewright::signal::noise::{noise, Conditions};
use gatewright::signal::swing::{emf_for_output, swing, Limit};
use gatewright::signal::Stage;
use gatewright::topology::{by_id, evaluate, Caps, Evaluation, NetlistInput, Rails, Topology};

/// One case at its nominal device, evaluated by the tool.
struct Built {
    name: String,
    t: &'static dyn Topology,
    values: &'static [f64],
    corner: Corner,
    family: Family,
    input: NetlistInput,
    eval: Evaluation,
    stage: Stage,
}

fn built() -> Vec<Built> {
    CASES
        .iter()
        .map(|c| {
            let t = by_id(c.topology).unwrap();
            let corner = device(c.family, c.lambda_per_v).nominal();
            let rails = Rails {
                vdd_v: c.vdd_v,
                vss_v: c.vss_v,
            };
            let input = NetlistInput {
                law: corner.law,
                kind: if c.family.is_jfet() {
                    FetKind::NJfet
                } else {
                    FetKind::NMos
                },
                rails,
                rl_ohm: c.rl_ohm,
                rsig_ohm: c.rsig_ohm,
                caps: Caps::MID_BAND,
            };
            let eval = evaluate(t, c.values, &rails, &corner.law, c.rl_ohm, c.rsig_ohm);
            Built {
                name: format!("{}-{}", c.topology, c.family.id()),
                t,
                values: c.values,
                family: c.family,
                input,
                stage: Stage {
                    path: t.signal_path(c.values),
                    rsig_ohm: c.rsig_ohm,
                    rl_ohm: c.rl_ohm,
                },
                eval,
                corner,
            }
        })
        .collect()
}

/// The deck's circuit lines (everything before the analysis cards).
fn circuit(net: &Netlist, title: &str) -> String {
    let deck = netlist_to_spice(net, title, &[]);
    let cut = deck.find("\n.op\n").expect("analysis cards");
    deck[..=cut].to_string()
}

/// The FET's designator and terminal voltage expressions.
fn fet(net: &Netlist) -> (String, String, String, String) {
    let v = |n: usize| {
        if n == GROUND {
            "0".to_string()
        } else {
            format!("v({})", net.nodes[n])
        }
    };
    net.elements
        .iter()
        .find_map(|e| match e {
            Element::Fet { d, g, s, .. } => Some((designator(e), v(*d), v(*g), v(*s))),
            _ => None,
        })
        .expect("a FET")
}

fn replace_line(deck: &str, starts: &str, with: &str) -> String {
    let mut found = false;
    let out: Vec<String> = deck
        .lines()
        .map(|l| {
            if l.starts_with(starts) {
                found = true;
                with.to_string()
            } else {
                l.to_string()
            }
        })
        .collect();
    assert!(found, "no line starting `{starts}` in\n{deck}");
    out.join("\n") + "\n"
}

/// Capacitors for transient decks: 1 mF is a short at 1 kHz for every
/// resistance here (0.16 Ω) and holds its operating-point charge over the
/// few milliseconds run (time constants of seconds); ngspice's step control
/// crawls (nanosecond steps) with the 1 F of the mid-band decks.
const TRANSIENT_CAPS: Caps = Caps {
    c_in_f: 1e-3,
    c_out_f: 1e-3,
    c_bypass_f: 1e-3,
};

/// The netlist of a transient deck.
fn transient_net(b: &Built) -> Netlist {
    b.t.netlist(
        b.values,
        &NetlistInput {
            caps: TRANSIENT_CAPS,
            ..b.input
        },
    )
}

/// The transient's worst margins at an EMF amplitude: min(VDS − VGS + VTO)
/// (V), min ID (A), max VGS (V).
fn transient(b: &Built, amplitude_v: f64, tag: &str) -> (f64, f64, f64) {
    let net = transient_net(b);
    let (des, d, g, s) = fet(&net);
    let deck = circuit(&net, &format!("{} swing {tag}", b.name));
    let deck = replace_line(
        &deck,
        "VIN ",
        &format!(
            "VIN sig 0 DC 0 AC 1 SIN(0 {} 1k)",
            spice_number(amplitude_v)
        ),
    );
    let vto = spice_number(b.corner.law.vto_v);
    let id = format!("@{}[id]", des.to_ascii_lowercase());
    let deck = format!(
        "{deck}.options temp=25 tnom=25\n.control\nsave all {id}\ntran 1u 2m 0 1u\n\
         let margin = {d}-{s}-({g}-{s}-({vto}))\nlet vgs = {g}-{s}\nlet idv = {id}\n\
         meas tran mmin MIN margin\nmeas tran imin MIN idv\nmeas tran gmax MAX vgs\nprint mmin imin gmax\n\
         quit 0\n.endc\n.end\n"
    );
    let got = run_ngspice(&deck, &format!("{}-swing-{tag}", b.name));
    let g = |k: &str| {
        *got.get(k)
            .unwrap_or_else(|| panic!("{}: no `{k}` in {got:?}\n{deck}", b.name))
    };
    (g("mmin"), g("imin"), g("gmax"))
}

// ngspice-39 transients against the tool's output swing (REFERENCE-NEXT
// §4.3 method: ideal shorts as 1 F capacitors charged at the operating
// point): at 0.95× the symmetric peak every margin holds, at 1.15× one
// fails.
#[test]
fn swing_edges_hold_in_ngspice_transients() {
    if !ngspice_or_skip("swing_edges_hold_in_ngspice_transients") {
        return;
    }
    let mut lines = Vec::new();
    for b in built() {
        let vgs_max = b.family.is_jfet().then_some(0.0);
        let sw = swing(&b.stage, &b.corner.law, &b.eval.op, vgs_max);
        assert!(sw.peak_v > 0.0, "{}: no swing", b.name);
        let law = &b.corner.law;
        let op = &b.eval.op;
        // Inside: an EMF whose output stays within 0.95× the peak on both
        // sides.
        let sign_rise = sw.rising.out_v.signum();
        let inside = [sign_rise, -sign_rise]
            .iter()
            .map(|s| {
                emf_for_output(&b.stage, law, op, s * 0.95 * sw.peak_v)
                    .expect("inside the swing")
                    .abs()
            })
            .fold(f64::INFINITY, f64::min);
        // Outside: past 1.15× the peak on the binding side (continuing the
        // law past its edge; a cut-off side cannot get there at all, so
        // 1.15× its edge's EMF).
        let edge = sw.binding();
        let outside = match edge.limit {
            Limit::Cutoff => 1.15 * edge.emf_v.abs(),
            _ => emf_for_output(&b.stage, law, op, 1.15 * edge.out_v)
                .expect("law continues")
                .abs(),
        };
        let id_floor = 1e-4 * op.id_a;
        let (m_in, i_in, g_in) = transient(&b, inside, "in");
        let gate_in_ok = vgs_max.is_none_or(|m| g_in <= m + 1e-6);
        assert!(
            m_in >= -1e-6 && i_in > id_floor && gate_in_ok,
            "{}: at 0.95× ({} V EMF) margin {m_in} V, min ID {i_in} A, max VGS {g_in} V",
            b.name,
            inside
        );
        let (m_out, i_out, g_out) = transient(&b, outside, "out");
        let gate_out_fails = vgs_max.is_some_and(|m| g_out > m);
        assert!(
            m_out < 0.0 || i_out < id_floor || gate_out_fails,
            "{}: at 1.15× ({} V EMF, {} edge) nothing fails: margin {m_out} V, min ID \
             {i_out} A, max VGS {g_out} V",
            b.name,
            outside,
            edge.limit.word()
        );
        lines.push(format!(
            "  {:<34} peak {:.4} V ({}), 0.95x margin {:.3} V, 1.15x margin {:.3} V",
            b.name,
            sw.peak_v,
            edge.limit.word(),
            m_in,
            m_out
        ));
    }
    loud(&format!("ngspice swing checks:\n{}", lines.join("\n")));
}

/// |gain| at 1 kHz of `deck_circuit` at `temp_c` (ngspice `.options temp`).
fn gain_at(deck_circuit: &str, out: &str, temp_c: f64, name: &str) -> f64 {
    let deck = format!(
        "{deck_circuit}.options temp={temp_c} tnom=25\n.control\nset numdgt=12\nop\n\
         ac lin 1 1k 1k\nprint vm({out})\nquit 0\n.endc\n.end\n"
    );
    let got = run_ngspice(&deck, name);
    *got.get(&format!("vm({out})"))
        .unwrap_or_else(|| panic!("{name}: {got:?}\n{deck}"))
}

// ngspice-39 at −40 °C and 85 °C (`.options temp=`, TNOM 25 °C): the gain
// of every case agrees with the tool's closed form at the law the
// temperature coefficients give, within 0.5 % (the operating-point
// cross-check's tolerance). The JFET deck carries VTOTC and BETATCE (ngspice
// jfettemp.c: VTO + VTOTC·ΔT, BETA·1.01^(BETATCE·ΔT)); a MOSFET deck is
// written with that temperature's VTO and KP.
#[test]
fn gain_over_temperature_matches_ngspice() {
    if !ngspice_or_skip("gain_over_temperature_matches_ngspice") {
        return;
    }
    let mut worst = (0.0_f64, String::new());
    for b in built() {
        let coeffs = TempCoeffs::default_for(b.family);
        for t_c in [-40.0, 85.0] {
            let law = coeffs.law_at(&b.corner.law, t_c);
            let e = evaluate(
                b.t,
                b.values,
                &b.input.rails,
                &law,
                b.input.rl_ohm,
                b.input.rsig_ohm,
            );
            assert!(e.op.saturated(), "{} at {t_c} °C: {:?}", b.name, e.op);
            let want = e.ss.gain_from_source(b.input.rsig_ohm).abs();
            let (net, deck_law) = if b.family.is_jfet() {
                (b.t.netlist(b.values, &b.input), b.corner.law)
            } else {
                (b.t.netlist(b.values, &NetlistInput { law, ..b.input }), law)
            };
            let mut deck = circuit(&net, &format!("{} at {t_c} C", b.name));
            if b.family.is_jfet() {
                let lam = if deck_law.lambda_per_v != 0.0 {
                    format!(" LAMBDA={}", spice_number(deck_law.lambda_per_v))
                } else {
                    String::new()
                };
                deck = replace_line(
                    &deck,
                    ".model",
                    &format!(
                        ".model JQ1_LAW NJF(VTO={} BETA={}{lam} VTOTC={} BETATCE={} TNOM=25)",
                        spice_number(deck_law.vto_v),
                        spice_number(deck_law.k_a_per_v2),
                        spice_number(coeffs.vto_v_per_c),
                        coeffs.betatce().unwrap()
                    ),
                );
            }
            let out = net.nodes[net.output].clone();
            // The MOSFET deck already holds the law at t_c: run it at TNOM.
            let run_c = if b.family.is_jfet() { t_c } else { 25.0 };
            let got = gain_at(&deck, &out, run_c, &format!("{}-t{t_c}", b.name));
            let r = rel(got, want);
            assert!(
                r <= 5e-3,
                "{} at {t_c} °C: ngspice |gain| {got} vs {want}\n{deck}",
                b.name
            );
            if r >= worst.0 {
                worst = (r, format!("{} at {t_c} °C", b.name));
            }
        }
    }
    loud(&format!(
        "ngspice gain over temperature: largest relative disagreement {:.2e} ({})",
        worst.0, worst.1
    ));
}

// ngspice-39 `.noise` (inoise_spectrum at 1 kHz, 25 °C, TNOM 25 °C) against
// the tool's input-referred density, within 1 %. The load is written as a
// noiseless conductance (a G element), since the tool leaves the next
// stage's resistor out.
#[test]
fn noise_density_matches_ngspice() {
    if !ngspice_or_skip("noise_density_matches_ngspice") {
        return;
    }
    let mut worst = (0.0_f64, String::new());
    for b in built() {
        let net = b.t.netlist(b.values, &b.input);
        let deck = circuit(&net, &format!("{} noise", b.name));
        let deck = replace_line(
            &deck,
            "RL ",
            &format!("GRL out 0 out 0 {}", spice_number(1.0 / b.input.rl_ohm)),
        );
        let out = net.nodes[net.output].clone();
        let deck = format!(
            "{deck}.options temp=25 tnom=25\n.control\nset numdgt=12\n\
             noise v({out}) VIN lin 2 1k 2k\nsetplot noise1\nlet n = inoise_spectrum[0]\n\
             print n\nquit 0\n.endc\n.end\n"
        );
        let got = run_ngspice(&deck, &format!("{}-noise", b.name));
        let ng = *got
            .get("n")
            .unwrap_or_else(|| panic!("{}: {got:?}\n{deck}", b.name));
        let ours = noise(
            &b.stage,
            b.eval.gm_s,
            b.eval.gds_s,
            &Conditions {
                t_k: kelvin(25.0),
                gate_current_a: 0.0,
                flicker_corner_hz: None,
                f_hz: 1e3,
            },
        );
        let r = rel(ours.density_v_per_rthz, ng);
        assert!(
            r <= 0.01,
            "{}: tool {:e} V/√Hz, ngspice {ng:e}\n{deck}",
            b.name,
            ours.density_v_per_rthz
        );
        if r >= worst.0 {
            worst = (r, b.name.clone());
        }
    }
    loud(&format!(
        "ngspice noise: largest relative disagreement {:.2e} ({})",
        worst.0, worst.1
    ));
}

// ngspice-39 `.four` (last period of a 1 kHz transient, TMAX ≤ period/1000)
// against the tool's HD2 at half the symmetric output peak, within 15 %
// where the tool's HD2 is above 0.1 %.
#[test]
fn second_harmonic_matches_ngspice_fourier() {
    if !ngspice_or_skip("second_harmonic_matches_ngspice_fourier") {
        return;
    }
    let mut lines = Vec::new();
    let mut compared = 0;
    for b in built() {
        let vgs_max = b.family.is_jfet().then_some(0.0);
        let sw = swing(&b.stage, &b.corner.law, &b.eval.op, vgs_max);
        let gain = b.eval.ss.gain_from_source(b.input.rsig_ohm).abs();
        let out_peak = 0.5 * sw.peak_v;
        let amplitude = out_peak / gain;
        let h = harmonics(&b.stage, &b.corner.law, &b.eval.op, out_peak);
        let net = transient_net(&b);
        let deck = circuit(&net, &format!("{} four", b.name));
        let deck = replace_line(
            &deck,
            "VIN ",
            &format!("VIN sig 0 DC 0 AC 1 SIN(0 {} 1k)", spice_number(amplitude)),
        );
        let out = net.nodes[net.output].clone();
        let deck = format!(
            "{deck}.options temp=25 tnom=25 reltol=1e-6\n.control\nset numdgt=12\n\
             tran 1u 4m 0 1u\nlinearize v({out})\nfourier 1k v({out})\n\
             let h1 = fourier11[1][1]\nlet h2 = fourier11[1][2]\nprint h1 h2\n\
             quit 0\n.endc\n.end\n"
        );
        let got = run_ngspice(&deck, &format!("{}-four", b.name));
        let (h1, h2) = match (got.get("h1"), got.get("h2")) {
            (Some(a), Some(c)) => (*a, *c),
            _ => panic!("{}: {got:?}\n{deck}", b.name),
        };
        let ng = h2 / h1;
        let r = rel(h.hd2, ng);
        if h.hd2 > 1e-3 {
            compared += 1;
            assert!(
                r <= 0.15,
                "{}: tool HD2 {:.4} %, ngspice {:.4} %\n{deck}",
                b.name,
                100.0 * h.hd2,
                100.0 * ng
            );
        }
        lines.push(format!(
            "  {:<34} at {:.3} V out: tool {:.4} %, ngspice {:.4} % (rel {:.3})",
            b.name,
            out_peak,
            100.0 * h.hd2,
            100.0 * ng,
            r
        ));
    }
    assert!(compared >= 10, "only {compared} cases above 0.1 %");
    loud(&format!("ngspice .four checks:\n{}", lines.join("\n")));
}
