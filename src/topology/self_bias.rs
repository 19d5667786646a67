//! `self-bias`: common source, gate to ground through RG, source resistor RS
//! bypassed. VGS = −ID·RS.

use super::common::{
    cs_bypassed, cs_bypassed_gain, CapRole, Frame, NetlistInput, Rails, SignalContext, SmallSignal,
};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Self-biased common source with RS bypassed.
pub struct SelfBias;

impl Topology for SelfBias {
    fn id(&self) -> &'static str {
        "self-bias"
    }
    fn summary(&self) -> &'static str {
        "common source, self bias, RS bypassed"
    }
    fn parts(&self) -> &'static [&'static str] {
        &["RG", "RS", "RD"]
    }
    fn roles(&self) -> &'static [Role] {
        &[Role::Gate, Role::Source, Role::Drain]
    }
    fn families(&self) -> &'static [Family] {
        &[Family::NJfet, Family::NDepletionMosfet]
    }
    fn bias(&self, v: &[f64], rails: &Rails) -> BiasNetwork {
        BiasNetwork {
            gate: Gate::Fixed(0.0),
            source_rail_v: 0.0,
            rs_ohm: v[1],
            drain_rail_v: rails.vdd_v,
            rd_ohm: v[2],
        }
    }
    fn bypassed(&self) -> &'static [usize] {
        &[1]
    }
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        cs_bypassed(v[2], v[0], c)
    }
    fn gain(&self, v: &[f64], c: &SignalContext) -> f64 {
        cs_bypassed_gain(v[2], c)
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::common_source(v[0], 0.0, v[2])
    }
    fn resistor_volts(&self, v: &[f64], _rails: &Rails, op: &OpPoint) -> Vec<f64> {
        vec![0.0, op.id_a * v[1], op.id_a * v[2]]
    }
    fn netlist(&self, v: &[f64], b: &NetlistInput) -> Netlist {
        let mut f = Frame::new(b);
        let (g, s, d) = (f.net.node("g"), f.net.node("s"), f.net.node("d"));
        f.net.resistor("RG", g, GROUND, v[0]);
        f.net.resistor("RS", s, GROUND, v[1]);
        f.net.capacitor("C_S", s, GROUND, b.caps.c_bypass_f);
        f.net.resistor("RD", f.vdd, d, v[2]);
        f.fet(d, g, s, b);
        f.drive(g, b);
        f.load(d, b);
        f.net
    }
    fn capacitors(&self, _v: &[f64]) -> Vec<(&'static str, CapRole)> {
        vec![
            ("C_IN", CapRole::InputCoupling),
            ("C_OUT", CapRole::OutputCoupling),
            ("C_S", CapRole::SourceBypass),
        ]
    }
}

#[cfg(test)]
mod tests {
    use super::super::tests_support::{check, jfet, Want};
    use super::*;

    // Hand example (our own numbers, method of Boylestad & Nashelsky ch. 7):
    // JFET IDSS 8 mA, VP −4 V, RS 1 kΩ: VGS = −ID·1k and ID = 8m(1 + VGS/4)²
    // meet at VGS = −2 V, ID = 2 mA. VDD 15 V, RD 3.3 kΩ: VDS = 15 − 2m·4.3k
    // = 6.4 V. gm = 4 mS·(1 − 2/4) = 2 mS; RL 10 kΩ: Av = −2m·(3.3k∥10k)
    // = −2m·2481.2 = −4.9624.
    #[test]
    fn hand_example() {
        check(
            &SelfBias,
            &[1e6, 1e3, 3.3e3],
            (15.0, 0.0),
            jfet(8e-3, -4.0),
            10e3,
            Want {
                id: 2e-3,
                vgs: -2.0,
                vds: 6.4,
                av: -2e-3 * 3.3e3 * 10e3 / 13.3e3,
                zin: 1e6,
                zout: 3.3e3,
            },
        );
    }
}
