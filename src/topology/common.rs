//! Pieces every topology shares: rails, the small-signal context and result,
//! the mid-band formulas of the three basic stages, and netlist framing
//! (supplies, signal source, load).
//!
//! The formulas are the exact ones (ro included, with the load), as in
//! Boylestad & Nashelsky ch. 8 and Sedra & Smith ch. 4; each is written once
//! here and called by the topologies that use it.

use crate::device::SquareLaw;
use crate::netlist::{FetKind, Netlist, Node, GROUND};
use serde::Serialize;

/// Supply rails, volts.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Rails {
    /// Positive rail, volts.
    pub vdd_v: f64,
    /// Negative rail, volts (0 for a single supply).
    pub vss_v: f64,
}

/// What the small-signal formulas need besides the resistor values.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SignalContext {
    /// Transconductance at the operating point, siemens.
    pub gm_s: f64,
    /// Output conductance at the operating point, siemens (1/ro; 0 = ideal).
    pub gds_s: f64,
    /// Load, ohms (AC-coupled).
    pub rl_ohm: f64,
    /// Signal source resistance, ohms (0 = ideal source).
    pub rsig_ohm: f64,
}

/// Mid-band small-signal results.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SmallSignal {
    /// Voltage gain from the stage's input terminal to the loaded output,
    /// V/V, signed (negative = inverting).
    pub av: f64,
    /// Input impedance at the input terminal, ohms.
    pub zin_ohm: f64,
    /// Output impedance seen by the load, ohms, with the signal source
    /// (its resistance) connected and its EMF at zero.
    pub zout_ohm: f64,
}

impl SmallSignal {
    /// Gain from the signal source's EMF: `av · Zin / (Zin + Rsig)`, V/V.
    pub fn gain_from_source(&self, rsig_ohm: f64) -> f64 {
        if rsig_ohm == 0.0 {
            // Exactly av: Zin/(Zin + 0) would round differently per Zin.
            return self.av;
        }
        self.av * self.zin_ohm / (self.zin_ohm + rsig_ohm)
    }
}

/// Parallel combination of resistances, ohms; `f64::INFINITY` is an open.
pub fn par(rs: &[f64]) -> f64 {
    let g: f64 = rs.iter().map(|r| 1.0 / r).sum();
    1.0 / g
}

/// Unloaded divider voltage, volts: `R_top` from `v_top` to the tap,
/// `R_bottom` from the tap to `v_bottom`.
pub fn divider_tap(r_top: f64, r_bottom: f64, v_top: f64, v_bottom: f64) -> f64 {
    v_bottom + (v_top - v_bottom) * r_bottom / (r_top + r_bottom)
}

/// 1/gds as a resistance, infinite when gds = 0.
fn ro(gds_s: f64) -> f64 {
    if gds_s > 0.0 {
        1.0 / gds_s
    } else {
        f64::INFINITY
    }
}

/// Common source, source at AC ground: `Av = −gm·(RD∥RL∥ro)`,
/// `Zout = RD∥ro` (Boylestad & Nashelsky, ch. 8, bypassed self bias).
pub fn cs_bypassed(rd: f64, zin: f64, c: &SignalContext) -> SmallSignal {
    SmallSignal {
        av: cs_bypassed_gain(rd, c),
        zin_ohm: zin,
        zout_ohm: par(&[rd, ro(c.gds_s)]),
    }
}

/// The gain of [`cs_bypassed`] alone, V/V.
pub fn cs_bypassed_gain(rd: f64, c: &SignalContext) -> f64 {
    -c.gm_s * par(&[rd, c.rl_ohm, ro(c.gds_s)])
}

/// The gain of [`cs_degenerated`] alone, V/V.
pub fn cs_degenerated_gain(rd: f64, rs: f64, c: &SignalContext) -> f64 {
    let rp = par(&[rd, c.rl_ohm]);
    -c.gm_s * rp / (1.0 + c.gm_s * rs + (rp + rs) * c.gds_s)
}

/// Common source with an unbypassed source resistance `rs`:
/// `Av = −gm·Rp / (1 + gm·RS + (Rp + RS)/ro)` with `Rp = RD∥RL`, and
/// `Zout = RD ∥ (ro·(1 + gm·RS) + RS)` (Boylestad & Nashelsky eq. 8.25–8.26).
pub fn cs_degenerated(rd: f64, rs: f64, zin: f64, c: &SignalContext) -> SmallSignal {
    let av = cs_degenerated_gain(rd, rs, c);
    let r_drain = if c.gds_s > 0.0 {
        (1.0 + c.gm_s * rs) / c.gds_s + rs
    } else {
        f64::INFINITY
    };
    SmallSignal {
        av,
        zin_ohm: zin,
        zout_ohm: par(&[rd, r_drain]),
    }
}

/// Source follower: `Av = gm·R'' / (1 + gm·R'')` with `R'' = RS∥RL∥ro`,
/// `Zout = RS ∥ ro ∥ 1/gm` (Boylestad & Nashelsky ch. 8, common drain).
pub fn follower(rs: f64, zin: f64, c: &SignalContext) -> SmallSignal {
    let r = par(&[rs, c.rl_ohm, ro(c.gds_s)]);
    SmallSignal {
        av: c.gm_s * r / (1.0 + c.gm_s * r),
        zin_ohm: zin,
        zout_ohm: 1.0 / (1.0 / rs + c.gds_s + c.gm_s),
    }
}

/// Roles of the capacitors a topology uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum CapRole {
    /// Input coupling, from the signal source to the input terminal.
    InputCoupling,
    /// Output coupling, from the output terminal to the load.
    OutputCoupling,
    /// Bypass from the source (or the lower source resistor) to ground.
    SourceBypass,
    /// Bypass from the gate bias node to ground.
    GateBypass,
}

/// Capacitor values for a netlist, farads. Mid-band analyses treat every
/// capacitor as a short; these values matter only for frequency sweeps.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Caps {
    /// Input coupling, farads.
    pub c_in_f: f64,
    /// Output coupling, farads.
    pub c_out_f: f64,
    /// Source or gate bypass, farads.
    pub c_bypass_f: f64,
}

impl Caps {
    /// Values large enough to be short circuits at 1 kHz for every
    /// resistance the tool allows (placeholders until capacitors are sized).
    pub const MID_BAND: Caps = Caps {
        c_in_f: 1.0,
        c_out_f: 1.0,
        c_bypass_f: 1.0,
    };
}

/// Everything a topology needs to build its netlist.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct NetlistInput {
    /// Device law at the corner.
    pub law: SquareLaw,
    /// SPICE device kind.
    pub kind: FetKind,
    /// Supply rails.
    pub rails: Rails,
    /// Load, ohms.
    pub rl_ohm: f64,
    /// Signal source resistance, ohms.
    pub rsig_ohm: f64,
    /// Capacitor values.
    pub caps: Caps,
}

/// A netlist with its supply nodes in place: `vdd` always, `vss` when the
/// negative rail is below 0 V (else ground).
pub(crate) struct Frame {
    pub net: Netlist,
    pub vdd: Node,
    pub vss: Node,
}

impl Frame {
    pub(crate) fn new(b: &NetlistInput) -> Frame {
        let mut net = Netlist::new();
        let vdd = net.node("vdd");
        net.vsource("VDD", vdd, GROUND, b.rails.vdd_v, 0.0);
        let vss = if b.rails.vss_v < 0.0 {
            let n = net.node("vss");
            net.vsource("VSS", n, GROUND, b.rails.vss_v, 0.0);
            n
        } else {
            GROUND
        };
        Frame { net, vdd, vss }
    }

    /// The signal source (1 V AC) with its resistance, coupled into `input`.
    pub(crate) fn drive(&mut self, input: Node, b: &NetlistInput) {
        let emf = self.net.node("sig");
        self.net.vsource("VIN", emf, GROUND, 0.0, 1.0);
        let after = if b.rsig_ohm > 0.0 {
            let n = self.net.node("src");
            self.net.resistor("RSIG", emf, n, b.rsig_ohm);
            n
        } else {
            emf
        };
        self.net.capacitor("C_IN", after, input, b.caps.c_in_f);
        self.net.input = input;
        self.net.signal_source = "VIN".to_string();
    }

    /// The output coupling capacitor and the load.
    pub(crate) fn load(&mut self, terminal: Node, b: &NetlistInput) {
        let out = self.net.node("out");
        self.net.capacitor("C_OUT", terminal, out, b.caps.c_out_f);
        self.net.resistor("RL", out, GROUND, b.rl_ohm);
        self.net.output = out;
    }

    /// The FET.
    pub(crate) fn fet(&mut self, d: Node, g: Node, s: Node, b: &NetlistInput) {
        self.net.fet("Q1", b.kind, d, g, s, b.law);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ctx(gm: f64, rl: f64) -> SignalContext {
        SignalContext {
            gm_s: gm,
            gds_s: 0.0,
            rl_ohm: rl,
            rsig_ohm: 0.0,
        }
    }

    // REFERENCE §3.2 (ngspice-confirmed there): gm 2 mS, RD 4.7 kΩ, RS 1 kΩ,
    // no load -> |Av| = 4.7/1.5 = 3.1333.
    #[test]
    fn degenerated_gain_check_value() {
        let s = cs_degenerated(4700.0, 1000.0, 1e6, &ctx(2e-3, f64::INFINITY));
        assert!((s.av + 9.4 / 3.0).abs() < 1e-12);
        assert_eq!(s.zout_ohm, 4700.0);
    }

    // REFERENCE §3.4: follower gm 2 mS, RS 1 kΩ, RL 10 kΩ -> Av = 0.64516,
    // Zout = 1k ∥ 500 Ω = 333.3 Ω.
    #[test]
    fn follower_check_values() {
        let s = follower(1000.0, 1e6, &ctx(2e-3, 10e3));
        // R'' = 1k ∥ 10k = 909.09; gm R'' = 1.81818; Av = 1.81818/2.81818.
        assert!((s.av - 0.645_161_290_3).abs() < 1e-9);
        assert!((s.zout_ohm - 1000.0 / 3.0).abs() < 1e-9);
    }

    #[test]
    fn bypassed_gain_includes_ro() {
        // REFERENCE §3.1 (ngspice-confirmed there): gm·(RD∥ro) = 8.3173 for the
        // λ = 0.02 case; here the hand form with made-up numbers:
        // gm 2 mS, RD 10k, ro 40k, RL 40k: R' = 10k∥40k∥40k = 6666.7 Ω.
        let c = SignalContext {
            gm_s: 2e-3,
            gds_s: 1.0 / 40e3,
            rl_ohm: 40e3,
            rsig_ohm: 0.0,
        };
        let s = cs_bypassed(10e3, 1e6, &c);
        assert!((s.av + 2e-3 * 20e3 / 3.0).abs() < 1e-9);
        assert!((s.zout_ohm - 8e3).abs() < 1e-9);
    }
}
