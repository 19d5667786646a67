//! Input-referred white noise and the noise figure of a stage.
//!
//! Every generator is a current between two nodes of the stage network
//! (one-sided spectral densities, A²/Hz):
//!
//! - each resistor the signal sees, thermal `4kT/R`: the source resistance
//!   (between the input terminal and the EMF), the gate resistor or divider
//!   R1∥R2 (gate to AC ground: two resistors at one temperature are noise
//!   equivalent to their parallel value), the unbypassed source resistance,
//!   RD, a feedback resistor RF. The load is the next stage's and is not
//!   counted;
//! - the channel, `4kT·γ·gm` from drain to source with `γ = 2/3` (long
//!   channel in saturation: Razavi, *Design of Analog CMOS Integrated
//!   Circuits*, ch. 7; ngspice's JFET and level-1 MOSFET use exactly
//!   `4kT·(2/3)·gm`). `ro` is no resistor and adds none;
//! - a JFET's gate leakage, shot noise `2q·IG` from the gate to AC ground
//!   (a MOSFET's gate current noise is neglected, as is customary);
//! - optionally 1/f noise of the channel above its white level by
//!   `fc/f` (`fc` the device's flicker corner).
//!
//! The output density is the sum of each generator's density times the
//! square of its transfer to the output; divided by the gain from the EMF
//! it is the density referred to the source, which includes the source
//! resistance's own `4kT·Rsig` (what ngspice's `.noise` calls `inoise`).
//!
//! Noise factor (IEEE definition, reference temperature T0 = 290 K): the
//! source resistance at T0, the amplifier at its own temperature:
//! `F = 1 + (en² − 4kT·Rsig)/(4k·T0·Rsig)`.

use super::network::{Stage, D, G, GND, S};
use serde::Serialize;

/// Boltzmann constant, J/K (SI, exact).
pub const BOLTZMANN_J_PER_K: f64 = 1.380649e-23;
/// Elementary charge, C (SI, exact).
pub const ELECTRON_C: f64 = 1.602176634e-19;
/// Reference temperature of the noise figure, kelvin (IEEE: 290 K).
pub const T0_K: f64 = 290.0;
/// Channel thermal-noise coefficient of a long-channel FET in saturation.
pub const GAMMA: f64 = 2.0 / 3.0;

/// The conditions of one noise evaluation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Conditions {
    /// Temperature of every resistor and the device, kelvin.
    pub t_k: f64,
    /// Gate current whose shot noise counts, amps (0 for none).
    pub gate_current_a: f64,
    /// The channel's 1/f corner, hertz (`None`: white only).
    pub flicker_corner_hz: Option<f64>,
    /// Frequency of the density, hertz.
    pub f_hz: f64,
}

/// Noise of one evaluated point, referred to the signal source's EMF.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Noise {
    /// Density at the conditions' frequency, V/√Hz.
    pub density_v_per_rthz: f64,
    /// White density (every generator but 1/f), V²/Hz.
    pub white_v2_per_hz: f64,
    /// The channel's white part alone, V²/Hz (what the 1/f corner scales).
    pub channel_v2_per_hz: f64,
    /// The source resistance's own part, `4kT·Rsig`, V²/Hz.
    pub source_v2_per_hz: f64,
    /// The channel's 1/f corner, hertz.
    pub flicker_corner_hz: Option<f64>,
    /// Source resistance, ohms.
    pub rsig_ohm: f64,
}

impl Noise {
    /// Noise factor F at the source resistance (source at T0 = 290 K);
    /// `None` without a source resistance.
    pub fn factor(&self) -> Option<f64> {
        if self.rsig_ohm <= 0.0 {
            return None;
        }
        let own = self.density_v_per_rthz.powi(2) - self.source_v2_per_hz;
        Some(1.0 + own / (4.0 * BOLTZMANN_J_PER_K * T0_K * self.rsig_ohm))
    }

    /// Noise figure, dB: `10·log10(F)`.
    pub fn figure_db(&self) -> Option<f64> {
        self.factor().map(|f| 10.0 * f.log10())
    }

    /// RMS noise over `f_lo..f_hi` hertz, volts: the white density over the
    /// band plus the channel's 1/f part, `∫ S·fc/f df = S·fc·ln(f_hi/f_lo)`
    /// (mid-band response, the coupling capacitors' roll-off not counted).
    pub fn rms_v(&self, f_lo_hz: f64, f_hi_hz: f64) -> f64 {
        let white = self.white_v2_per_hz * (f_hi_hz - f_lo_hz);
        let flicker = self.flicker_corner_hz.map_or(0.0, |fc| {
            self.channel_v2_per_hz * fc * (f_hi_hz / f_lo_hz).ln()
        });
        (white + flicker).sqrt()
    }
}

/// The noise of `stage` with FET conductances `gm_s`, `gds_s` (siemens).
pub fn noise(stage: &Stage, gm_s: f64, gds_s: f64, c: &Conditions) -> Noise {
    let four_kt = 4.0 * BOLTZMANN_J_PER_K * c.t_k;
    let gain = stage.gain(gm_s, gds_s);
    let p = &stage.path;
    let input = stage.input_node();
    let refer = |from: usize, to: usize, psd: f64| {
        if psd == 0.0 {
            return 0.0;
        }
        let h = stage.transfer(gm_s, gds_s, from, to) / gain;
        psd * h * h
    };
    let thermal = |r: f64| {
        if r.is_finite() && r > 0.0 {
            four_kt / r
        } else {
            0.0
        }
    };
    let source = refer(GND, input, thermal(stage.rsig_ohm));
    let channel = refer(D, S, four_kt * GAMMA * gm_s);
    let mut white = source + channel;
    if p.gate_ohm > 0.0 {
        white += refer(GND, G, thermal(p.gate_ohm));
        white += refer(GND, G, 2.0 * ELECTRON_C * c.gate_current_a);
    }
    if p.source_ohm > 0.0 {
        white += refer(GND, S, thermal(p.source_ohm));
    }
    if p.drain_ohm > 0.0 {
        white += refer(GND, D, thermal(p.drain_ohm));
    }
    white += refer(D, G, thermal(p.feedback_ohm));
    let flicker = c.flicker_corner_hz.map_or(0.0, |fc| channel * fc / c.f_hz);
    Noise {
        density_v_per_rthz: (white + flicker).sqrt(),
        white_v2_per_hz: white,
        channel_v2_per_hz: channel,
        source_v2_per_hz: source,
        flicker_corner_hz: c.flicker_corner_hz,
        rsig_ohm: stage.rsig_ohm,
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

    fn at(t_k: f64) -> Conditions {
        Conditions {
            t_k,
            gate_current_a: 0.0,
            flicker_corner_hz: None,
            f_hz: 1e3,
        }
    }

    /// REFERENCE-NEXT §2.5 circuit: Rsig, RG 1 MΩ, gm 2 mS, RS 1 kΩ
    /// (unbypassed or not), RD 4.7 kΩ, output at the drain, no load.
    fn cs(rsig: f64, rs: f64) -> Stage {
        Stage {
            path: SignalPath::common_source(1e6, rs, 4.7e3),
            rsig_ohm: rsig,
            rl_ohm: f64::INFINITY,
        }
    }

    // REFERENCE-NEXT §2.5 (ngspice-39 `.noise`, inoise at 1 kHz, 27 °C =
    // 300.15 K; the noise factor with the source at T0 = 290 K equals the
    // same-temperature ratio at T0, computed from the 290 K row):
    // Rsig 10 kΩ unbypassed 14.07334 nV/√Hz; bypassed 13.18917; Rsig 1 kΩ
    // 4.797137; Rsig 100 kΩ 42.79159.
    #[test]
    fn common_source_matches_ngspice() {
        for (rsig, rs, want) in [
            (10e3, 1e3, 14.07334e-9),
            (10e3, 0.0, 13.18917e-9),
            (1e3, 0.0, 4.797137e-9),
            (100e3, 0.0, 42.79159e-9),
        ] {
            let n = noise(&cs(rsig, rs), 2e-3, 0.0, &at(300.15));
            close(
                n.density_v_per_rthz,
                want,
                2e-6,
                &format!("Rsig {rsig} RS {rs}"),
            );
        }
        // At 290 K (`.options temp=16.85`) the bypassed 10 kΩ case prints
        // 12.96424 nV/√Hz and F = 1.04943 (NF 0.2095 dB).
        let n = noise(&cs(10e3, 0.0), 2e-3, 0.0, &at(290.0));
        close(n.density_v_per_rthz, 12.96424e-9, 2e-6, "290 K");
        close(n.factor().unwrap(), 1.04943, 1e-5, "F");
        close(n.figure_db().unwrap(), 0.2095, 1e-3, "NF");
        // Unbypassed at 290 K: F 1.19485, NF 0.7731 dB (same-temperature
        // ratio of the 300.15 K row).
        let n = noise(&cs(10e3, 1e3), 2e-3, 0.0, &at(290.0));
        close(n.factor().unwrap(), 1.19485, 1e-5, "F unbypassed");
        close(n.figure_db().unwrap(), 0.7731, 1e-3, "NF unbypassed");
        // No source resistance, no figure.
        assert_eq!(noise(&cs(0.0, 0.0), 2e-3, 0.0, &at(290.0)).factor(), None);
    }

    // Razavi eq. 7.47 (amplifier-only density of a bypassed CS, referred
    // to the gate): en² = 4kT·(γ/gm + 1/(gm²·RD)): 2.5312 nV/√Hz at gm 2 mS,
    // RD 4.7 kΩ, 300.15 K (REFERENCE-NEXT §2.5).
    #[test]
    fn razavi_bypassed_form() {
        let stage = Stage {
            path: SignalPath {
                gate_ohm: f64::INFINITY,
                gate_dc_ohm: f64::INFINITY,
                ..SignalPath::common_source(1.0, 0.0, 4.7e3)
            },
            rsig_ohm: 0.0,
            rl_ohm: f64::INFINITY,
        };
        let n = noise(&stage, 2e-3, 0.0, &at(300.15));
        let four_kt = 4.0 * BOLTZMANN_J_PER_K * 300.15;
        let want = (four_kt * (GAMMA / 2e-3 + 1.0 / (4e-6 * 4.7e3))).sqrt();
        close(n.density_v_per_rthz, want, 1e-12, "Razavi 7.47");
        close(want, 2.5312e-9, 1e-4, "value");
    }

    // REFERENCE-NEXT §2.5 follower, gate driven directly, RS 1 kΩ, no load:
    // ngspice-39 inoise 3.109561 nV/√Hz = √(4kT(γ/gm + 1/(gm²·RS))).
    #[test]
    fn follower_matches_ngspice() {
        let stage = Stage {
            path: SignalPath::follower(1e6, 1e3),
            rsig_ohm: 0.0,
            rl_ohm: f64::INFINITY,
        };
        let n = noise(&stage, 2e-3, 0.0, &at(300.15));
        close(n.density_v_per_rthz, 3.109561e-9, 2e-6, "follower");
    }

    // Gate shot noise 2q·IG: 1 nA is 17.90 fA/√Hz (REFERENCE-NEXT §2.1); with
    // Rsig 1 MΩ at the gate of the bypassed stage (no gate resistor: a
    // reverse-biased diode of IS 1 nA from the gate to a positive source
    // carries the leakage), ngspice-39 prints inoise 130.0235 nV/√Hz against
    // 130.0112 by hand (the diode also carries GMIN·10 V).
    #[test]
    fn gate_shot_noise() {
        close(
            (2.0 * ELECTRON_C * 1e-9_f64).sqrt(),
            17.90e-15,
            1e-3,
            "2qIG",
        );
        let mut stage = cs(1e6, 0.0);
        stage.path.gate_ohm = f64::INFINITY;
        let c = Conditions {
            gate_current_a: 1e-9,
            ..at(300.15)
        };
        let n = noise(&stage, 2e-3, 0.0, &c);
        close(n.density_v_per_rthz, 130.0112e-9, 1e-5, "by hand");
        close(n.density_v_per_rthz, 130.0235e-9, 2e-4, "ngspice");
    }

    // 1/f: the corner fc = KF·ID^AF/(4kT·γ·gm) of KF 1e-18, AF 1, ID 2 mA,
    // gm 2 mS is 90.4919 Hz at 300.15 K (REFERENCE-NEXT §2.5); at fc/10 the
    // channel term is √10 larger in ngspice-39 (6.987277e-08 against
    // 2.209571e-08 V/√Hz at the output). Band integration of a white
    // density: density·√(f_hi − f_lo): 14.07334 nV/√Hz over 20 Hz–20 kHz
    // is 1.989275 µV (ngspice inoise_total).
    #[test]
    fn flicker_and_band() {
        let kt4 = 4.0 * BOLTZMANN_J_PER_K * 300.15;
        close(1e-18 * 2e-3 / (kt4 * GAMMA * 2e-3), 90.4919, 1e-5, "fc");
        let c = Conditions {
            flicker_corner_hz: Some(90.4919),
            f_hz: 9.04919,
            ..at(300.15)
        };
        let stage = cs(10e3, 1e3);
        let w = noise(&stage, 2e-3, 0.0, &at(300.15));
        let f = noise(&stage, 2e-3, 0.0, &c);
        let added = f.density_v_per_rthz.powi(2) - w.density_v_per_rthz.powi(2);
        close(added, 10.0 * w.channel_v2_per_hz, 1e-9, "1/f at fc/10");
        close(w.rms_v(20.0, 20e3), 1.989275e-6, 2e-6, "band");
        // With a corner the band adds S_ch·fc·ln(f_hi/f_lo).
        let want =
            (w.white_v2_per_hz * 19980.0 + w.channel_v2_per_hz * 90.4919 * 1000f64.ln()).sqrt();
        close(f.rms_v(20.0, 20e3), want, 1e-12, "band with 1/f");
    }
}
