//! Harmonic distortion of the square law at a given output peak.
//!
//! The device's signal current is `i = gm·v + (gm/(2·Vov))·v²` in the
//! gate–source voltage `v` (exact for the square law in saturation;
//! `gm·Vov = 2·ID`). The rest of the stage is linear: the device current
//! reaches the output through a transimpedance `Zt`, and feeds back onto
//! its own gate–source voltage through `Zf` (the unbypassed source
//! resistance of a common source; RS∥RL of a follower; the source
//! resistance of a common gate with Rsig; RF's share of the drain swing
//! for drain feedback). With the loop gain `T = gm·Zf`, series reversion
//! gives (REFERENCE-NEXT §3.2; Sedra & Smith for `T = 0`, whose exercise
//! shows `HD2 = V̂gs/(4·Vov)` for the plain common source):
//!
//! - `HD2 = V̂gs/(4·Vov·(1 + T))`, with `V̂gs = V̂out/(gm·Zt)` the gate–source
//!   peak: for a common source `V̂out/(8·ID·Rp·(1 + T))`, i.e.
//!   `V̂in/(4·Vov·(1 + T)²)` at the gate;
//! - `HD3 ≈ T·V̂gs²/(8·Vov²·(1 + T)²)`, created by the feedback (zero at
//!   `T = 0`; the square law has no cubic term).
//!
//! `ro` is kept as a linear resistor of the network; λ's own curvature is
//! left out (an estimate, as the HD3 figure is).

use super::network::{Injection, Stage, D, G, S};
use serde::Serialize;

/// Harmonic ratios at one output peak.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Harmonics {
    /// Second harmonic over the fundamental at the output, fraction.
    pub hd2: f64,
    /// Third harmonic over the fundamental (estimate), fraction.
    pub hd3: f64,
    /// Gate–source signal peak, volts.
    pub vgs_peak_v: f64,
    /// Loop gain `T = gm·Zf` of the local feedback.
    pub loop_gain: f64,
}

/// The harmonics of `stage` driven to an output peak of `out_peak_v` volts,
/// at FET conductances `gm_s`, `gds_s` (siemens) and overdrive `vov_v`.
/// A device that is off (no gm or overdrive) gives infinite ratios.
pub fn harmonics(stage: &Stage, gm_s: f64, gds_s: f64, vov_v: f64, out_peak_v: f64) -> Harmonics {
    if gm_s <= 0.0 || vov_v <= 0.0 {
        return Harmonics {
            hd2: f64::INFINITY,
            hd3: f64::INFINITY,
            vgs_peak_v: f64::INFINITY,
            loop_gain: 0.0,
        };
    }
    // One amp of (vgs-driven) device current, EMF at zero.
    let v = stage.solve(
        0.0,
        gds_s,
        0.0,
        &[Injection {
            from: D,
            to: S,
            amps: 1.0,
        }],
    );
    let zt = stage.out(&v).abs();
    let zf = -(v[G] - v[S]);
    let t = gm_s * zf;
    let vgs_peak_v = out_peak_v.abs() / (gm_s * zt);
    Harmonics {
        hd2: vgs_peak_v / (4.0 * vov_v * (1.0 + t)),
        hd3: t * vgs_peak_v * vgs_peak_v / (8.0 * vov_v * vov_v * (1.0 + t) * (1.0 + t)),
        vgs_peak_v,
        loop_gain: t,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::topology::SignalPath;

    fn close(got: f64, want: f64, rel: f64, what: &str) {
        assert!(
            (got - want).abs() <= rel * want.abs(),
            "{what}: got {got:e}, want {want:e}"
        );
    }

    // REFERENCE-NEXT §3.3 (JFET VTO −4 V, BETA 0.5 mA/V², ID 2 mA, gm 2 mS,
    // Vov 2 V, 0.1 V at the gate): series HD2 1.25 % for the plain common
    // source with RD 2.2 kΩ (Sedra & Smith's V̂/(4·Vov); ngspice `.four`
    // 1.24999 %), 0.1388889 % with RS 1 kΩ unbypassed (`.disto` the same,
    // HD3 7.716e-6), 0.1573881 % for a follower RS 1 kΩ ∥ RL 10 kΩ
    // (`.four` 0.157416 %).
    #[test]
    fn reference_values() {
        let gm = 2e-3;
        // Plain CS: output peak = gm·RD·0.1 V.
        let cs = Stage {
            path: SignalPath::common_source(1e6, 0.0, 2.2e3),
            rsig_ohm: 0.0,
            rl_ohm: f64::INFINITY,
        };
        let h = harmonics(&cs, gm, 0.0, 2.0, gm * 2.2e3 * 0.1);
        close(h.hd2, 0.0125, 1e-12, "CS HD2");
        assert_eq!(h.hd3, 0.0);
        // Output-referred form: Vout/(8·ID·Rp) = 0.44/(8·2m·2.2k).
        close(h.hd2, 0.44 / (8.0 * 2e-3 * 2.2e3), 1e-12, "output form");
        // Degenerated: gain 2.2k·2m/(1 + 2) = 1.4667, output 0.14667 V.
        let dg = Stage {
            path: SignalPath::common_source(1e6, 1e3, 2.2e3),
            ..cs
        };
        let h = harmonics(&dg, gm, 0.0, 2.0, 0.1 * 4.4 / 3.0);
        close(h.hd2, 1.388889e-3, 1e-6, "degenerated HD2");
        close(h.hd3, 7.716e-6, 1e-4, "degenerated HD3");
        close(h.loop_gain, 2.0, 1e-12, "T");
        // ngspice `.disto` amplitudes: h2 = 2.037037e-4 at a1 = 1.466667.
        close(h.hd2, 2.037037e-4 / (1.466667 * 0.1), 1e-5, ".disto");
        // Follower into RL 10 kΩ: R = 909.09 Ω, gain 0.645161.
        let fo = Stage {
            path: SignalPath::follower(1e6, 1e3),
            rsig_ohm: 0.0,
            rl_ohm: 10e3,
        };
        let r = 1e3 * 10e3 / 11e3;
        let av = gm * r / (1.0 + gm * r);
        let h = harmonics(&fo, gm, 0.0, 2.0, 0.1 * av);
        close(h.hd2, 1.573881e-3, 1e-6, "follower HD2");
        close(h.hd2, 1.57416e-3, 2e-4, "follower .four");
        close(
            h.hd3,
            9.010e-6,
            0.01,
            "follower HD3 (exact Fourier 9.010e-6)",
        );
    }

    // A follower and a degenerated common source with the same R have the
    // same HD2 for the same input (REFERENCE-NEXT §3.2, computed).
    #[test]
    fn follower_equals_degenerated_source_for_the_same_input() {
        let gm = 3e-3;
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
        let a = harmonics(&fo, gm, 0.0, 1.5, vin * t / (1.0 + t));
        let b = harmonics(&cs, gm, 0.0, 1.5, vin * gm * 10e3 / (1.0 + t));
        close(a.hd2, b.hd2, 1e-12, "HD2");
        close(
            a.hd2,
            vin / (4.0 * 1.5 * (1.0 + t) * (1.0 + t)),
            1e-12,
            "input form",
        );
    }
}
