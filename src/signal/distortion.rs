//! Harmonic distortion of the square law at a given output peak.
//!
//! In saturation the device current is
//! `i = k·(vov + v)²·(1 + λ·(VDS + w))` in the signal increments `v` (gate–
//! source) and `w` (drain–source). Its linear part `gm·v + gds·w` belongs to
//! the stage's linear network; what is left is
//! `a20·v² + a11·v·w + a21·v²·w` with `a20 = k·(1 + λ·VDS)` (= gm/(2·Vov)),
//! `a11 = 2·k·vov·λ` and `a21 = k·λ`. Driving the stage so the output
//! fundamental has peak `V̂out` gives the fundamental increments `V1`, `W1`;
//! the second-order current `i2 = a20·V1²/2 + a11·V1·W1/2`, injected where
//! the device sits, gives the output's second harmonic and the increments
//! `V2`, `W2`; the third-order current `i3 = a20·V1·V2 + a11·(V1·W2 +
//! V2·W1)/2 + a21·V1²·W1/4` gives the third (Volterra series to third
//! order, as ngspice's `.disto` computes it).
//!
//! For λ = 0 this is the closed form (REFERENCE-NEXT §3.2; Sedra & Smith
//! for the plain common source, `HD2 = V̂gs/(4·Vov)`): with the loop gain
//! `T = gm·Zf` of the local feedback (unbypassed source resistance, a
//! follower's RS∥RL, a common gate's source-side resistance, drain
//! feedback's RF share),
//! `HD2 = V̂gs/(4·Vov·(1 + T))` and `HD3 = T·V̂gs²/(8·Vov²·(1 + T)²)`.

use super::network::{Injection, Stage, D, G, S};
use crate::device::SquareLaw;
use crate::topology::OpPoint;
use serde::Serialize;

/// Harmonic ratios at one output peak.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Harmonics {
    /// Second harmonic over the fundamental at the output, fraction.
    pub hd2: f64,
    /// Third harmonic over the fundamental at the output, fraction.
    pub hd3: f64,
    /// Gate–source signal peak, volts.
    pub vgs_peak_v: f64,
    /// Loop gain `T = gm·Zf` of the local feedback.
    pub loop_gain: f64,
}

/// The harmonics of `stage` at operating point `op` of a device with law
/// `law`, driven to an output fundamental peak of `out_peak_v` volts. A
/// device that is off or out of saturation gives infinite ratios.
pub fn harmonics(stage: &Stage, law: &SquareLaw, op: &OpPoint, out_peak_v: f64) -> Harmonics {
    let gm = law.gm(op.vgs_v, op.vds_v);
    let gds = law.gds(op.vgs_v, op.vds_v);
    let vov = law.vov(op.vgs_v);
    let off = Harmonics {
        hd2: f64::INFINITY,
        hd3: f64::INFINITY,
        vgs_peak_v: f64::INFINITY,
        loop_gain: 0.0,
    };
    if gm <= 0.0 || vov <= 0.0 || !op.saturated() {
        return off;
    }
    let gain = stage.gain(gm, gds);
    if gain == 0.0 {
        return off;
    }
    let k = law.k_a_per_v2;
    let lam = law.lambda_per_v;
    let a20 = k * (1.0 + lam * op.vds_v);
    let a11 = 2.0 * k * vov * lam;
    let a21 = k * lam;
    let at = |u: f64, inj: f64| {
        let v = stage.solve(
            gm,
            gds,
            u,
            &[Injection {
                from: D,
                to: S,
                amps: inj,
            }],
        );
        (v[G] - v[S], v[D] - v[S], stage.out(&v))
    };
    let u = out_peak_v.abs() / gain.abs();
    let (v1, w1, _) = at(u, 0.0);
    let i2 = 0.5 * (a20 * v1 * v1 + a11 * v1 * w1);
    let (v2, w2, out2) = at(0.0, i2);
    let i3 = a20 * v1 * v2 + 0.5 * a11 * (v1 * w2 + v2 * w1) + 0.25 * a21 * v1 * v1 * w1;
    let (_, _, out3) = at(0.0, i3);
    // Loop gain of the local feedback: the gate–source voltage one amp of
    // device current makes (EMF at zero, no gm), times gm.
    let (vf, _, _) = {
        let v = stage.solve(
            0.0,
            gds,
            0.0,
            &[Injection {
                from: D,
                to: S,
                amps: 1.0,
            }],
        );
        (v[G] - v[S], 0.0, 0.0)
    };
    let p = out_peak_v.abs();
    if p == 0.0 {
        return Harmonics {
            hd2: 0.0,
            hd3: 0.0,
            vgs_peak_v: 0.0,
            loop_gain: -gm * vf,
        };
    }
    Harmonics {
        hd2: out2.abs() / p,
        hd3: out3.abs() / p,
        vgs_peak_v: v1.abs(),
        loop_gain: -gm * vf,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::device::Region;
    use crate::topology::SignalPath;

    fn close(got: f64, want: f64, rel: f64, what: &str) {
        assert!(
            (got - want).abs() <= rel * want.abs(),
            "{what}: got {got:e}, want {want:e}"
        );
    }

    /// JFET VTO −4 V, BETA 0.5 mA/V² (IDSS 8 mA) at VGS −2 V: ID 2 mA,
    /// gm 2 mS, Vov 2 V, saturated.
    fn law(lambda: f64) -> SquareLaw {
        SquareLaw {
            vto_v: -4.0,
            k_a_per_v2: 5e-4,
            lambda_per_v: lambda,
        }
    }

    fn op(l: &SquareLaw, vds: f64) -> OpPoint {
        OpPoint {
            vg_v: 0.0,
            vs_v: 2.0,
            vd_v: 2.0 + vds,
            vgs_v: -2.0,
            vds_v: vds,
            id_a: l.id(-2.0, vds),
            region: Region::Saturation,
        }
    }

    // REFERENCE-NEXT §3.3 (JFET VTO −4 V, BETA 0.5 mA/V², ID 2 mA, gm 2 mS,
    // Vov 2 V, 0.1 V at the gate): series HD2 1.25 % for the plain common
    // source with RD 2.2 kΩ (Sedra & Smith's V̂/(4·Vov); ngspice `.four`
    // 1.24999 %), 0.1388889 % with RS 1 kΩ unbypassed (`.disto` the same,
    // HD3 7.716e-6), 0.1573881 % for a follower RS 1 kΩ ∥ RL 10 kΩ
    // (`.four` 0.157416 %).
    #[test]
    fn reference_values() {
        let l = law(0.0);
        let o = op(&l, 8.0);
        let gm = 2e-3;
        // Plain CS: output peak = gm·RD·0.1 V.
        let cs = Stage {
            path: SignalPath::common_source(1e6, 0.0, 2.2e3),
            rsig_ohm: 0.0,
            rl_ohm: f64::INFINITY,
        };
        let h = harmonics(&cs, &l, &o, gm * 2.2e3 * 0.1);
        close(h.hd2, 0.0125, 1e-12, "CS HD2");
        assert!(h.hd3 < 1e-15, "{}", h.hd3);
        // Output-referred form: Vout/(8·ID·Rp) = 0.44/(8·2m·2.2k).
        close(h.hd2, 0.44 / (8.0 * 2e-3 * 2.2e3), 1e-12, "output form");
        // Degenerated: gain 2.2k·2m/(1 + 2) = 1.4667, output 0.14667 V.
        let dg = Stage {
            path: SignalPath::common_source(1e6, 1e3, 2.2e3),
            ..cs
        };
        let h = harmonics(&dg, &l, &o, 0.1 * 4.4 / 3.0);
        close(h.hd2, 1.388889e-3, 1e-6, "degenerated HD2");
        close(h.hd3, 7.716e-6, 1e-4, "degenerated HD3");
        close(h.loop_gain, 2.0, 1e-12, "T");
        close(h.vgs_peak_v, 0.1 / 3.0, 1e-12, "vgs peak");
        // ngspice `.disto` amplitudes: h2 = 2.037037e-4, h3 = 1.131687e-6 at
        // a1 = 1.466667.
        close(h.hd2, 2.037037e-4 / (1.466667 * 0.1), 1e-5, ".disto HD2");
        close(h.hd3, 1.131687e-6 / (1.466667 * 0.1), 1e-5, ".disto HD3");
        // Follower into RL 10 kΩ: R = 909.09 Ω, gain 0.645161.
        let fo = Stage {
            path: SignalPath::follower(1e6, 1e3),
            rsig_ohm: 0.0,
            rl_ohm: 10e3,
        };
        let r = 1e3 * 10e3 / 11e3;
        let av = gm * r / (1.0 + gm * r);
        let h = harmonics(&fo, &l, &o, 0.1 * av);
        close(h.hd2, 1.573881e-3, 1e-6, "follower HD2");
        close(h.hd2, 1.57416e-3, 2e-4, "follower .four");
        close(
            h.hd3,
            9.010e-6,
            0.01,
            "follower HD3 (exact Fourier 9.010e-6)",
        );
    }

    // The closed forms with the loop gain T hold at λ = 0 for every stage
    // whose output carries only the device current (drain feedback also
    // passes the input through RF, so its fundamental is not gm·V̂gs·Zt):
    // HD2 = V̂gs/(4·Vov·(1 + T)), HD3 = T·V̂gs²/(8·Vov²·(1 + T)²).
    #[test]
    fn closed_forms_with_loop_gain() {
        let l = law(0.0);
        let o = op(&l, 8.0);
        for (path, rsig) in [
            (SignalPath::common_source(1e6, 470.0, 4.7e3), 600.0),
            (SignalPath::follower(1e6, 2.2e3), 10e3),
            (SignalPath::common_gate(1e6, 1e3, 4.7e3), 50.0),
        ] {
            let stage = Stage {
                path,
                rsig_ohm: rsig,
                rl_ohm: 22e3,
            };
            let h = harmonics(&stage, &l, &o, 0.3);
            let (v, t) = (h.vgs_peak_v, h.loop_gain);
            close(h.hd2, v / (4.0 * 2.0 * (1.0 + t)), 1e-9, "HD2");
            if t > 1e-9 {
                close(
                    h.hd3,
                    t * v * v / (8.0 * 4.0 * (1.0 + t).powi(2)),
                    1e-9,
                    "HD3",
                );
            }
        }
    }

    // A follower and a degenerated common source with the same R have the
    // same HD2 for the same input (REFERENCE-NEXT §3.2, computed).
    #[test]
    fn follower_equals_degenerated_source_for_the_same_input() {
        let l = SquareLaw {
            vto_v: 1.0,
            k_a_per_v2: 1e-3,
            lambda_per_v: 0.0,
        };
        let o = OpPoint {
            vg_v: 5.0,
            vs_v: 2.5,
            vd_v: 12.0,
            vgs_v: 2.5,
            vds_v: 9.5,
            id_a: l.id(2.5, 9.5),
            region: Region::Saturation,
        };
        let gm = l.gm(2.5, 9.5);
        let fo = Stage {
            path: SignalPath::follower(1e6, 2.2e3),
            rsig_ohm: 0.0,
            rl_ohm: f64::INFINITY,
        };
        let cs = Stage {
            path: SignalPath::common_source(1e6, 2.2e3, 10e3),
            rsig_ohm: 0.0,
            rl_ohm: f64::INFINITY,
        };
        let t = gm * 2.2e3;
        let vin = 0.3;
        let a = harmonics(&fo, &l, &o, vin * t / (1.0 + t));
        let b = harmonics(&cs, &l, &o, vin * gm * 10e3 / (1.0 + t));
        close(a.hd2, b.hd2, 1e-12, "HD2");
        close(
            a.hd2,
            vin / (4.0 * 1.5 * (1.0 + t) * (1.0 + t)),
            1e-12,
            "input form",
        );
    }
}
