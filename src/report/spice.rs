//! SPICE netlist export that ngspice runs unchanged in batch mode
//! (`ngspice -b FILE`).
//!
//! The file holds, in order: the title line, `*` comment lines, one card per
//! element, one `.model` card per FET, the analyses `.op` and
//! `.ac dec 10 1 100k` (for interactive use with `run`), a `.control` block
//! that prints the operating point and the gain at 1 kHz and then quits with
//! status 0, and `.end`. In batch mode ngspice runs the `.control` block
//! instead of the dot analyses.
//!
//! Designators keep the names of the netlist (`RD`, `RS`, `R1`, `C_IN`,
//! `VDD`, `VIN`), since SPICE reads an element's type from its first letter
//! only. A name whose first letter does not give the right type gets that
//! letter in front: a FET `Q1` becomes `JQ1` as a JFET and `MQ1` as a MOSFET
//! (see [`designator`]). Characters SPICE does not allow in names become `_`.
//!
//! Device models (REFERENCE §2.5, ngspice manual: JFET and MOSFET level 1):
//! a JFET is `NJF` with `VTO = vto`, `BETA = k` (= IDSS/VTO²); a MOSFET is
//! `NMOS LEVEL=1` with `VTO = vto`, `KP = 2k` and `W = L`, its body tied to
//! its source. `LAMBDA` is written only when it is not zero.
//!
//! Numbers use SPICE scale factors (see [`spice_number`]): mega is `MEG`,
//! because to SPICE `M` is milli.
//!
//! This module formats; it does no file I/O and no circuit analysis.

use crate::bench::deck::{Deck, DeckCorner};
use crate::netlist::{Element, FetKind, Netlist, Node, GROUND};
use std::fmt::Write as _;

/// Frequency at which the `.control` block prints the output magnitude,
/// hertz.
pub const GAIN_FREQUENCY_HZ: f64 = 1e3;

/// Channel length and width written on every MOSFET card, metres (W = L, so
/// `KP = 2k` gives the square law's `k`).
pub const MOS_L_W_M: f64 = 1e-6;

/// SPICE scale factors from 1e-15 to 1e12 (ngspice manual, "scale factors":
/// T, G, Meg, K, m, u, n, p, f; case does not matter to ngspice).
const SCALES: [(i32, &str); 10] = [
    (12, "T"),
    (9, "G"),
    (6, "MEG"),
    (3, "k"),
    (0, ""),
    (-3, "m"),
    (-6, "u"),
    (-9, "n"),
    (-12, "p"),
    (-15, "f"),
];

/// Write a number, in the value's own SI unit, for a SPICE card: the shortest
/// decimal that reads back as exactly the same `f64`, with a scale factor
/// (`4.7k`, `2.2MEG`, `100n`, `1.5m`, `-4`, `0`).
///
/// Mega is written `MEG` and milli `m`: SPICE ignores case, so `M` would be
/// milli. Magnitudes outside 1e-15 ..< 1e15 are written in scientific
/// notation (`1e-18`). Non-finite values are written as `NaN` or `inf`,
/// which ngspice rejects; the netlists built by topologies hold none.
///
/// ```
/// use gatewright::report::spice::spice_number;
/// assert_eq!(spice_number(4700.0), "4.7k");
/// assert_eq!(spice_number(2.2e6), "2.2MEG");
/// assert_eq!(spice_number(1e-7), "100n");
/// ```
pub fn spice_number(v: f64) -> String {
    if v == 0.0 {
        return "0".to_string();
    }
    if !v.is_finite() {
        return format!("{v}");
    }
    // Rust's `{:e}` is the shortest text that reads back as the same f64;
    // moving the decimal point keeps it exact.
    let sci = format!("{:e}", v.abs());
    let Some((mantissa, exp)) = sci.split_once('e') else {
        return format!("{v:e}");
    };
    let Ok(exp) = exp.parse::<i32>() else {
        return format!("{v:e}");
    };
    let sign = if v < 0.0 { "-" } else { "" };
    let Some(&(scale_exp, suffix)) = SCALES.iter().find(|(s, _)| exp >= *s) else {
        return format!("{sign}{sci}");
    };
    if exp >= 15 {
        return format!("{sign}{sci}");
    }
    let digits: String = mantissa.chars().filter(|c| *c != '.').collect();
    // Digits before the decimal point after scaling: 1, 2 or 3.
    let int_len = usize::try_from(exp - scale_exp + 1).unwrap_or(1);
    let body = if digits.len() <= int_len {
        format!("{digits:0<int_len$}")
    } else {
        format!("{}.{}", &digits[..int_len], &digits[int_len..])
    };
    format!("{sign}{body}{suffix}")
}

/// The letter that gives an element its type in SPICE.
fn type_letter(e: &Element) -> char {
    match e {
        Element::Resistor { .. } => 'R',
        Element::Capacitor { .. } => 'C',
        Element::VoltageSource { .. } => 'V',
        Element::Fet {
            kind: FetKind::NJfet,
            ..
        } => 'J',
        Element::Fet {
            kind: FetKind::NMos,
            ..
        } => 'M',
    }
}

/// Keep letters, digits and `_`; anything else becomes `_`.
fn sanitize(name: &str) -> String {
    name.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || c == '_' {
                c
            } else {
                '_'
            }
        })
        .collect()
}

/// The SPICE designator of an element: its netlist name when the first
/// letter already gives its type (`RD`, `C_IN`, `VDD`), else that letter in
/// front (`Q1` → `JQ1` for a JFET, `MQ1` for a MOSFET). Characters other
/// than ASCII letters, digits and `_` become `_`.
pub fn designator(e: &Element) -> String {
    let letter = type_letter(e);
    let name = sanitize(e.name());
    let keeps = name
        .chars()
        .next()
        .is_some_and(|c| c.to_ascii_uppercase() == letter);
    if keeps {
        name
    } else {
        format!("{letter}{name}")
    }
}

/// The name of a FET's `.model` card.
fn model_name(designator: &str) -> String {
    format!("{designator}_LAW")
}

/// The SPICE name of a node: `0` for ground, else its sanitised name (or
/// `n<index>` when it has none).
fn node_name(net: &Netlist, n: Node) -> String {
    if n == GROUND {
        return "0".to_string();
    }
    match net.nodes.get(n).map(|s| sanitize(s)) {
        Some(s) if !s.is_empty() => s,
        _ => format!("n{n}"),
    }
}

/// One line of free text, safe for a title or a comment card.
fn one_line(text: &str) -> String {
    super::printable(&text.replace(['\r', '\n'], " ")).into_owned()
}

/// The SPICE model parameters of a square law (REFERENCE §2.5): `VTO`,
/// then `BETA = k` (JFET) or `KP = 2k` (level-1 MOSFET, W = L), then
/// `LAMBDA` when it is not zero.
fn model_params(kind: FetKind, vto_v: f64, k_a_per_v2: f64, lambda_per_v: f64) -> Vec<String> {
    let mut p = vec![format!("VTO={}", spice_number(vto_v))];
    match kind {
        FetKind::NJfet => p.push(format!("BETA={}", spice_number(k_a_per_v2))),
        FetKind::NMos => p.push(format!("KP={}", spice_number(2.0 * k_a_per_v2))),
    }
    if lambda_per_v != 0.0 {
        p.push(format!("LAMBDA={}", spice_number(lambda_per_v)));
    }
    p
}

/// The `.model` card of a FET.
fn model_card(name: &str, kind: FetKind, params: &[String]) -> String {
    match kind {
        FetKind::NJfet => format!(".model {name} NJF({})", params.join(" ")),
        FetKind::NMos => format!(".model {name} NMOS(LEVEL=1 {})", params.join(" ")),
    }
}

/// The netlist as a SPICE deck that `ngspice -b` runs to completion with
/// exit status 0.
///
/// `title` becomes the first line and each of `comments` a `*` line (line
/// breaks in either become spaces). The `.control` block prints every
/// non-ground node voltage (volts) and each FET's drain current
/// (`@jq1[id]`, amps, positive into the drain) at the operating point, then
/// `vm(<output>)` at [`GAIN_FREQUENCY_HZ`]: with the signal source at 1 V AC
/// that is the magnitude of the gain from the source EMF, V/V.
pub fn netlist_to_spice(net: &Netlist, title: &str, comments: &[String]) -> String {
    write_deck(net, title, comments, &[], GAIN_FREQUENCY_HZ)
}

/// A design's deck (see [`crate::bench::deck`]): as [`netlist_to_spice`],
/// with |gain| printed at `d.gain_hz`, and after the nominal device each of
/// `d.corners` in turn: an `echo` line `corner N: LABEL`, one `altermod`
/// per model parameter (ngspice-39 applied only one parameter of an
/// `altermod` line that gave several), then the same prints. The whole deck
/// runs unchanged with `ngspice -b`.
pub fn deck(d: &Deck) -> String {
    write_deck(&d.netlist, &d.title, &d.comments, &d.corners, d.gain_hz)
}

fn write_deck(
    net: &Netlist,
    title: &str,
    comments: &[String],
    corners: &[DeckCorner],
    gain_hz: f64,
) -> String {
    let mut out = String::new();
    let title = one_line(title);
    let _ = writeln!(
        out,
        "{}",
        if title.trim().is_empty() {
            "gatewright stage"
        } else {
            title.as_str()
        }
    );
    for c in comments {
        for line in c.lines() {
            let _ = writeln!(out, "* {}", super::printable(line));
        }
    }
    let mut models = Vec::new();
    // (model name, kind) of each FET, for the corners' altermod lines.
    let mut fets: Vec<(String, FetKind)> = Vec::new();
    let mut currents = Vec::new();
    for e in &net.elements {
        let des = designator(e);
        let n = |x: Node| node_name(net, x);
        let _ = match e {
            Element::Resistor { a, b, ohms, .. } => {
                writeln!(out, "{des} {} {} {}", n(*a), n(*b), spice_number(*ohms))
            }
            Element::Capacitor { a, b, farads, .. } => {
                writeln!(out, "{des} {} {} {}", n(*a), n(*b), spice_number(*farads))
            }
            Element::VoltageSource {
                pos,
                neg,
                dc_v,
                ac_v,
                ..
            } => writeln!(
                out,
                "{des} {} {} DC {} AC {}",
                n(*pos),
                n(*neg),
                spice_number(*dc_v),
                spice_number(*ac_v)
            ),
            Element::Fet {
                kind, d, g, s, law, ..
            } => {
                let model = model_name(&des);
                let params = model_params(*kind, law.vto_v, law.k_a_per_v2, law.lambda_per_v);
                models.push(model_card(&model, *kind, &params));
                fets.push((model.clone(), *kind));
                currents.push(format!("@{}[id]", des.to_ascii_lowercase()));
                match kind {
                    FetKind::NJfet => {
                        writeln!(out, "{des} {} {} {} {model}", n(*d), n(*g), n(*s))
                    }
                    FetKind::NMos => {
                        let lw = spice_number(MOS_L_W_M);
                        writeln!(
                            out,
                            "{des} {} {} {} {} {model} L={lw} W={lw}",
                            n(*d),
                            n(*g),
                            n(*s),
                            n(*s)
                        )
                    }
                }
            }
        };
    }
    for m in &models {
        let _ = writeln!(out, "{m}");
    }
    out.push_str(".op\n.ac dec 10 1 100k\n.control\nset numdgt=12\n");
    let voltages: Vec<String> = (1..net.nodes.len())
        .map(|i| format!("v({})", node_name(net, i)))
        .collect();
    let prints = |out: &mut String| {
        out.push_str("op\n");
        if !voltages.is_empty() {
            let _ = writeln!(out, "print {}", voltages.join(" "));
        }
        for c in &currents {
            let _ = writeln!(out, "print {c}");
        }
        if net.output != GROUND {
            let f = spice_number(gain_hz);
            let _ = writeln!(out, "ac lin 1 {f} {f}");
            let _ = writeln!(out, "print vm({})", node_name(net, net.output));
        }
    };
    prints(&mut out);
    for (i, c) in corners.iter().enumerate() {
        let _ = writeln!(out, "echo corner {i}: {}", one_line(&c.label));
        for (model, kind) in &fets {
            let mut params = model_params(*kind, c.law.vto_v, c.law.k_a_per_v2, c.law.lambda_per_v);
            // LAMBDA is set even when the corner's is 0, so the nominal
            // model's value never carries over.
            if c.law.lambda_per_v == 0.0 {
                params.push("LAMBDA=0".to_string());
            }
            for p in params {
                let _ = writeln!(out, "altermod {model} {}", p.to_ascii_lowercase());
            }
        }
        prints(&mut out);
    }
    out.push_str("quit 0\n.endc\n.end\n");
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::device::SquareLaw;
    use crate::topology::{by_id, Caps, NetlistInput, Rails};

    /// Reads a SPICE number by the ngspice manual's table of scale factors
    /// (T 1e12, G 1e9, Meg 1e6, K 1e3, mil 25.4e-6, m 1e-3, u 1e-6, n 1e-9,
    /// p 1e-12, f 1e-15; letters in any case), built as a decimal exponent so
    /// the reading is exact.
    fn read_spice(text: &str) -> f64 {
        let lower = text.to_ascii_lowercase();
        let (num, exp) = if let Some(n) = lower.strip_suffix("meg") {
            (n, 6)
        } else if let Some(n) = lower.strip_suffix("mil") {
            return n.parse::<f64>().unwrap() * 25.4e-6;
        } else {
            let last = lower.chars().last().unwrap();
            let exp = match last {
                't' => 12,
                'g' => 9,
                'k' => 3,
                'm' => -3,
                'u' => -6,
                'n' => -9,
                'p' => -12,
                'f' => -15,
                _ => 0,
            };
            if exp == 0 {
                return lower.parse().unwrap();
            } else {
                (&lower[..lower.len() - 1], exp)
            }
        };
        format!("{num}e{exp}").parse().unwrap()
    }

    // ngspice manual, "scale factors": MEG is 1e6 and M (any case) is milli,
    // so mega must never be written as a bare M.
    #[test]
    fn mega_is_meg_and_never_m() {
        assert_eq!(spice_number(2.2e6), "2.2MEG");
        assert_eq!(spice_number(1e6), "1MEG");
        assert_eq!(spice_number(10e6), "10MEG");
        assert_eq!(spice_number(470e6), "470MEG");
        for v in [1e6, 2.2e6, 3.3e7, 999e6, 1.5e-3] {
            let s = spice_number(v);
            assert!(!s.ends_with('M'), "{s}");
            assert_eq!(read_spice(&s), v, "{s}");
        }
    }

    // ngspice manual, "scale factors": m is 1e-3, u 1e-6, n 1e-9, p 1e-12,
    // f 1e-15, k 1e3, G 1e9, T 1e12.
    #[test]
    fn scale_factors_follow_the_ngspice_manual() {
        let cases = [
            (1.5e-3, "1.5m"),
            (0.02, "20m"),
            (4.7e-6, "4.7u"),
            (5e-4, "500u"),
            (1e-7, "100n"),
            (22e-12, "22p"),
            (1e-15, "1f"),
            (4700.0, "4.7k"),
            (1000.0, "1k"),
            (999.0, "999"),
            (3.3e9, "3.3G"),
            (1e12, "1T"),
            (15.0, "15"),
            (-4.0, "-4"),
            (-2.5e-3, "-2.5m"),
            (0.0, "0"),
            (1.0, "1"),
        ];
        for (v, want) in cases {
            assert_eq!(spice_number(v), want, "{v}");
            assert_eq!(read_spice(want), v, "{want}");
        }
    }

    #[test]
    fn out_of_range_values_use_scientific_notation() {
        assert_eq!(spice_number(1e-18), "1e-18");
        assert_eq!(spice_number(2.5e15), "2.5e15");
        assert_eq!(read_spice(&spice_number(-7.25e-19)), -7.25e-19);
    }

    // Exact round trip: every f64 reads back bit for bit through the
    // manual's scale factors, including values with no short decimal form.
    #[test]
    fn every_value_reads_back_exactly() {
        let mut x = 0.123_456_789_f64;
        let mut values = vec![
            1.0 / 3.0,
            std::f64::consts::PI * 1e4,
            8e-3 / 16.0,
            2.0 * 0.24e-3,
            1.0 / (2.0 * std::f64::consts::PI * 20.0 * 1e6),
            9.99999999e5,
            1e3 - 1e-9,
        ];
        for _ in 0..2000 {
            // A fixed pseudo-random walk over 30 decades.
            x = (x * 9301.0 + 0.4929).fract();
            values.push((x - 0.5).signum() * 10f64.powf(-15.0 + 30.0 * x));
        }
        for v in values {
            let s = spice_number(v);
            assert_eq!(read_spice(&s), v, "{v:e} written as {s}");
        }
    }

    fn self_bias_deck(kind: FetKind, lambda: f64) -> String {
        let t = by_id("self-bias").unwrap();
        let input = NetlistInput {
            law: SquareLaw {
                vto_v: -4.0,
                k_a_per_v2: 5e-4,
                lambda_per_v: lambda,
            },
            kind,
            rails: Rails {
                vdd_v: 15.0,
                vss_v: 0.0,
            },
            rl_ohm: 10e3,
            rsig_ohm: 0.0,
            caps: Caps::MID_BAND,
        };
        let net = t.netlist(&[2.2e6, 1e3, 3.3e3], &input);
        netlist_to_spice(&net, "self bias\ncheck", &["first\nsecond".to_string()])
    }

    // ngspice manual, JFET and MOSFET instance and model cards: J d g s
    // model; M d g s b model L= W=; NJF(VTO BETA LAMBDA), NMOS(LEVEL=1 VTO
    // KP LAMBDA). REFERENCE §2.5: BETA = k, KP = 2k with W = L.
    #[test]
    fn jfet_deck_has_the_cards_ngspice_expects() {
        let deck = self_bias_deck(FetKind::NJfet, 0.0);
        let lines: Vec<&str> = deck.lines().collect();
        assert_eq!(lines[0], "self bias check");
        assert_eq!(lines[1], "* first");
        assert_eq!(lines[2], "* second");
        assert!(lines.contains(&"RG g 0 2.2MEG"), "{deck}");
        assert!(lines.contains(&"VDD vdd 0 DC 15 AC 0"), "{deck}");
        assert!(lines.contains(&"VIN sig 0 DC 0 AC 1"), "{deck}");
        assert!(lines.contains(&"C_IN sig g 1"), "{deck}");
        assert!(lines.contains(&"JQ1 d g s JQ1_LAW"), "{deck}");
        assert!(
            lines.contains(&".model JQ1_LAW NJF(VTO=-4 BETA=500u)"),
            "{deck}"
        );
        assert!(lines.contains(&"print @jq1[id]"), "{deck}");
        assert!(lines.contains(&"print vm(out)"), "{deck}");
        assert_eq!(lines.last(), Some(&".end"));
        assert!(!deck.contains("LAMBDA"), "LAMBDA only when nonzero");
    }

    #[test]
    fn mosfet_deck_uses_level_one_with_kp_twice_k() {
        let deck = self_bias_deck(FetKind::NMos, 0.02);
        let lines: Vec<&str> = deck.lines().collect();
        assert!(lines.contains(&"MQ1 d g s s MQ1_LAW L=1u W=1u"), "{deck}");
        assert!(
            lines.contains(&".model MQ1_LAW NMOS(LEVEL=1 VTO=-4 KP=1m LAMBDA=20m)"),
            "{deck}"
        );
        assert!(lines.contains(&"print @mq1[id]"), "{deck}");
    }

    #[test]
    fn designators_get_the_type_letter_only_when_missing() {
        let law = SquareLaw {
            vto_v: 1.0,
            k_a_per_v2: 1e-3,
            lambda_per_v: 0.0,
        };
        let fet = |name: &str, kind| Element::Fet {
            name: name.to_string(),
            kind,
            d: 1,
            g: 2,
            s: 0,
            law,
        };
        assert_eq!(designator(&fet("Q1", FetKind::NJfet)), "JQ1");
        assert_eq!(designator(&fet("Q1", FetKind::NMos)), "MQ1");
        assert_eq!(designator(&fet("J2", FetKind::NJfet)), "J2");
        let r = Element::Resistor {
            name: "RS 1".to_string(),
            a: 1,
            b: 0,
            ohms: 1.0,
        };
        assert_eq!(designator(&r), "RS_1");
        let c = Element::Capacitor {
            name: "BYPASS".to_string(),
            a: 1,
            b: 0,
            farads: 1.0,
        };
        assert_eq!(designator(&c), "CBYPASS");
    }

    // The corner loop: an echo line per corner, then one altermod per
    // model parameter with the corner's law (BETA = k for a JFET), then the
    // prints again; LAMBDA is reset to 0 where the corner has none.
    #[test]
    fn a_deck_runs_every_corner_after_the_nominal_device() {
        let t = by_id("self-bias").unwrap();
        let law = |vto: f64, lambda: f64| crate::device::SquareLaw {
            vto_v: vto,
            k_a_per_v2: 5e-4,
            lambda_per_v: lambda,
        };
        let input = NetlistInput {
            law: law(-4.0, 0.01),
            kind: FetKind::NJfet,
            rails: Rails {
                vdd_v: 15.0,
                vss_v: 0.0,
            },
            rl_ohm: 10e3,
            rsig_ohm: 0.0,
            caps: Caps::MID_BAND,
        };
        let d = Deck {
            title: "demo".into(),
            comments: vec!["a note".into()],
            netlist: t.netlist(&[1e6, 1e3, 3.3e3], &input),
            corners: vec![
                DeckCorner {
                    label: "vgs_off=min".into(),
                    law: law(-5.0, 0.0),
                },
                DeckCorner {
                    label: "vgs_off=max".into(),
                    law: law(-3.0, 0.02),
                },
            ],
            gain_hz: 20e3,
        };
        let text = deck(&d);
        assert!(text.starts_with("demo\n* a note\n"));
        assert!(text.contains(".model JQ1_LAW NJF(VTO=-4 BETA=500u LAMBDA=10m)"));
        let want = "echo corner 0: vgs_off=min\naltermod JQ1_LAW vto=-5\naltermod JQ1_LAW beta=500u\naltermod JQ1_LAW lambda=0\nop\n";
        assert!(text.contains(want), "{text}");
        assert!(text.contains("altermod JQ1_LAW vto=-3\naltermod JQ1_LAW beta=500u\naltermod JQ1_LAW lambda=20m\nop\n"), "{text}");
        assert_eq!(text.matches("ac lin 1 20k 20k\n").count(), 3);
        assert_eq!(text.matches("print vm(out)\n").count(), 3);
        assert!(text.ends_with("quit 0\n.endc\n.end\n"));
    }
}
