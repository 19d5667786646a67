//! `common-gate`: gate held at AC ground by a bypassed R1/R2 divider, signal
//! into the source (through the coupling capacitor), output at the drain.

use super::common::{
    divider_tap, par, CapRole, Frame, NetlistInput, Rails, SignalContext, SmallSignal,
};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Common-gate stage.
pub struct CommonGate;

impl Topology for CommonGate {
    fn id(&self) -> &'static str {
        "common-gate"
    }
    fn summary(&self) -> &'static str {
        "common gate, gate bypassed at the R1/R2 divider, input at the source"
    }
    fn parts(&self) -> &'static [&'static str] {
        &["R1", "R2", "RS", "RD"]
    }
    fn roles(&self) -> &'static [Role] {
        &[Role::DivTop, Role::DivBottom, Role::Source, Role::Drain]
    }
    fn families(&self) -> &'static [Family] {
        &Family::ALL
    }
    fn non_inverting(&self) -> bool {
        true
    }
    fn input_at_source(&self) -> bool {
        true
    }
    fn bias(&self, v: &[f64], rails: &Rails) -> BiasNetwork {
        BiasNetwork {
            gate: Gate::Fixed(divider_tap(v[0], v[1], rails.vdd_v, 0.0)),
            source_rail_v: 0.0,
            rs_ohm: v[2],
            drain_rail_v: rails.vdd_v,
            rd_ohm: v[3],
        }
    }
    /// With `Rp = RD∥RL`: `Av = (gm + gds)·Rp/(1 + Rp·gds)`,
    /// `Zin = RS ∥ (1 + Rp·gds)/(gm + gds)` (= RS ∥ (ro + Rp)/(1 + gm·ro)), and
    /// `Zout = RD ∥ (ro·(1 + gm·Rsrc) + Rsrc)` with `Rsrc = RS∥Rsig`
    /// (KCL at source and drain with the gate at AC ground).
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        let (rs, rd) = (v[2], v[3]);
        let rp = par(&[rd, c.rl_ohm]);
        let g = c.gm_s + c.gds_s;
        let rsrc = if c.rsig_ohm > 0.0 {
            par(&[rs, c.rsig_ohm])
        } else {
            0.0
        };
        let r_drain = if c.gds_s > 0.0 {
            (1.0 + c.gm_s * rsrc) / c.gds_s + rsrc
        } else {
            f64::INFINITY
        };
        SmallSignal {
            av: g * rp / (1.0 + rp * c.gds_s),
            zin_ohm: par(&[rs, (1.0 + rp * c.gds_s) / g]),
            zout_ohm: par(&[rd, r_drain]),
        }
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::common_gate(par(&[v[0], v[1]]), v[2], v[3])
    }
    fn resistor_volts(&self, v: &[f64], rails: &Rails, op: &OpPoint) -> Vec<f64> {
        vec![
            rails.vdd_v - op.vg_v,
            op.vg_v,
            op.id_a * v[2],
            op.id_a * v[3],
        ]
    }
    fn netlist(&self, v: &[f64], b: &NetlistInput) -> Netlist {
        let mut f = Frame::new(b);
        let (g, s, d) = (f.net.node("g"), f.net.node("s"), f.net.node("d"));
        f.net.resistor("R1", f.vdd, g, v[0]);
        f.net.resistor("R2", g, GROUND, v[1]);
        f.net.capacitor("C_G", g, GROUND, b.caps.c_bypass_f);
        f.net.resistor("RS", s, GROUND, v[2]);
        f.net.resistor("RD", f.vdd, d, v[3]);
        f.fet(d, g, s, b);
        f.drive(s, b);
        f.load(d, b);
        f.net
    }
    fn capacitors(&self, _v: &[f64]) -> Vec<(&'static str, CapRole)> {
        vec![
            ("C_IN", CapRole::InputCoupling),
            ("C_OUT", CapRole::OutputCoupling),
            ("C_G", CapRole::GateBypass),
        ]
    }
}

#[cfg(test)]
mod tests {
    use super::super::tests_support::{check, jfet, Want};
    use super::*;

    // Hand example (our own): the divider-swamped bias (JFET IDSS 8 mA,
    // VP −4 V, VDD 16 V, R1 700 kΩ, R2 100 kΩ, RS 2 kΩ) gives ID = 2 mA,
    // gm = 2 mS; RD 4 kΩ: VDS = 4 V. RL 4 kΩ: Av = +gm·Rp = 2m·2k = 4
    // (non-inverting); Zin = RS ∥ 1/gm = 2k ∥ 500 = 400 Ω; Zout = RD = 4 kΩ.
    #[test]
    fn hand_example() {
        check(
            &CommonGate,
            &[700e3, 100e3, 2e3, 4e3],
            (16.0, 0.0),
            jfet(8e-3, -4.0),
            4e3,
            Want {
                id: 2e-3,
                vgs: -2.0,
                vds: 4.0,
                av: 4.0,
                zin: 400.0,
                zout: 4e3,
            },
        );
    }
}
