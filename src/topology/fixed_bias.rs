//! `fixed-bias`: source grounded, gate held at a negative voltage by a
//! divider from the negative rail (R1 from ground to the tap, R2 from the tap
//! to VSS), the tap bypassed to ground and fed to the gate through RG, so
//! Zin = RG. Depletion types only; needs `vss < 0`.

use super::common::{
    cs_bypassed, cs_bypassed_gain, divider_tap, par, CapRole, Frame, NetlistInput, Rails,
    SignalContext, SmallSignal,
};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Fixed (negative-rail) gate bias.
pub struct FixedBias;

impl Topology for FixedBias {
    fn id(&self) -> &'static str {
        "fixed-bias"
    }
    fn summary(&self) -> &'static str {
        "common source, gate held by a divider from the negative rail through RG"
    }
    fn parts(&self) -> &'static [&'static str] {
        &["R1", "R2", "RG", "RD"]
    }
    fn roles(&self) -> &'static [Role] {
        &[Role::DivTop, Role::DivBottom, Role::Gate, Role::Drain]
    }
    fn families(&self) -> &'static [Family] {
        &[Family::NJfet, Family::NDepletionMosfet]
    }
    fn needs_vss(&self) -> bool {
        true
    }
    fn bias(&self, v: &[f64], rails: &Rails) -> BiasNetwork {
        BiasNetwork {
            gate: Gate::Fixed(divider_tap(v[0], v[1], 0.0, rails.vss_v)),
            source_rail_v: 0.0,
            rs_ohm: 0.0,
            drain_rail_v: rails.vdd_v,
            rd_ohm: v[3],
        }
    }
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        cs_bypassed(v[3], v[2], c)
    }
    fn gain(&self, v: &[f64], c: &SignalContext) -> f64 {
        cs_bypassed_gain(v[3], c)
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::common_source(v[2], 0.0, v[3]).with_gate_dc_ohm(v[2] + par(&[v[0], v[1]]))
    }
    fn resistor_volts(&self, v: &[f64], rails: &Rails, op: &OpPoint) -> Vec<f64> {
        vec![-op.vg_v, op.vg_v - rails.vss_v, 0.0, op.id_a * v[3]]
    }
    fn netlist(&self, v: &[f64], b: &NetlistInput) -> Netlist {
        let mut f = Frame::new(b);
        let (gb, g, d) = (f.net.node("gb"), f.net.node("g"), f.net.node("d"));
        f.net.resistor("R1", GROUND, gb, v[0]);
        let vss = f.vss;
        f.net.resistor("R2", gb, vss, v[1]);
        f.net.capacitor("C_G", gb, GROUND, b.caps.c_bypass_f);
        f.net.resistor("RG", gb, g, v[2]);
        f.net.resistor("RD", f.vdd, d, v[3]);
        f.fet(d, g, GROUND, b);
        f.drive(g, b);
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

    // Hand example (our own): VSS −10 V, R1 200 kΩ, R2 800 kΩ: tap at
    // −10·200k/1M = −2 V = VGS. JFET IDSS 8 mA, VP −4 V: ID = 8m·(1/2)² = 2 mA,
    // gm = 2 mS. VDD 16 V, RD 4 kΩ: VDS = 8 V. RL 4 kΩ: Av = −2m·2k = −4;
    // Zin = RG = 1 MΩ.
    #[test]
    fn hand_example() {
        check(
            &FixedBias,
            &[200e3, 800e3, 1e6, 4e3],
            (16.0, -10.0),
            jfet(8e-3, -4.0),
            4e3,
            Want {
                id: 2e-3,
                vgs: -2.0,
                vds: 8.0,
                av: -4.0,
                zin: 1e6,
                zout: 4e3,
            },
        );
    }
}
