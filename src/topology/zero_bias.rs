//! `zero-bias`: common source with the gate returned to ground through RG
//! and the source grounded, so VGS = 0 and ID = IDSS (depletion MOSFET only:
//! a JFET's gate would sit at the edge of conduction with no margin).

use super::common::{
    cs_bypassed, cs_bypassed_gain, CapRole, Frame, NetlistInput, Rails, SignalContext, SmallSignal,
};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Zero-bias common source.
pub struct ZeroBias;

impl Topology for ZeroBias {
    fn id(&self) -> &'static str {
        "zero-bias"
    }
    fn summary(&self) -> &'static str {
        "common source, gate to ground through RG, source grounded (VGS = 0)"
    }
    fn parts(&self) -> &'static [&'static str] {
        &["RG", "RD"]
    }
    fn roles(&self) -> &'static [Role] {
        &[Role::Gate, Role::Drain]
    }
    fn families(&self) -> &'static [Family] {
        &[Family::NDepletionMosfet]
    }
    fn bias(&self, v: &[f64], rails: &Rails) -> BiasNetwork {
        BiasNetwork {
            gate: Gate::Fixed(0.0),
            source_rail_v: 0.0,
            rs_ohm: 0.0,
            drain_rail_v: rails.vdd_v,
            rd_ohm: v[1],
        }
    }
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        cs_bypassed(v[1], v[0], c)
    }
    fn gain(&self, v: &[f64], c: &SignalContext) -> f64 {
        cs_bypassed_gain(v[1], c)
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::common_source(v[0], 0.0, v[1])
    }
    fn resistor_volts(&self, v: &[f64], _rails: &Rails, op: &OpPoint) -> Vec<f64> {
        vec![0.0, op.id_a * v[1]]
    }
    fn netlist(&self, v: &[f64], b: &NetlistInput) -> Netlist {
        let mut f = Frame::new(b);
        let (g, d) = (f.net.node("g"), f.net.node("d"));
        f.net.resistor("RG", g, GROUND, v[0]);
        f.net.resistor("RD", f.vdd, d, v[1]);
        f.fet(d, g, GROUND, b);
        f.drive(g, b);
        f.load(d, b);
        f.net
    }
    fn capacitors(&self, _v: &[f64]) -> Vec<(&'static str, CapRole)> {
        vec![
            ("C_IN", CapRole::InputCoupling),
            ("C_OUT", CapRole::OutputCoupling),
        ]
    }
}

#[cfg(test)]
mod tests {
    use super::super::tests_support::{check, depletion, Want};
    use super::*;

    // Hand example (our own): depletion MOSFET IDSS 4 mA, VGS(off) −2 V
    // (k = 1 mA/V²), VDD 12 V, RD 2 kΩ, RG 1 MΩ, RL 10 kΩ.
    // VGS = 0 ⇒ ID = IDSS = 4 mA; VDS = 12 − 4m·2k = 4 V >= vov = 2 V (saturated).
    // gm = gm0 = 2·IDSS/|VP| = 4 mS (Shockley); Av = −4m·(2k∥10k) = −6.6667.
    #[test]
    fn hand_example() {
        check(
            &ZeroBias,
            &[1e6, 2e3],
            (12.0, 0.0),
            depletion(4e-3, -2.0),
            10e3,
            Want {
                id: 4e-3,
                vgs: 0.0,
                vds: 4.0,
                av: -4e-3 * 2e3 * 10e3 / 12e3,
                zin: 1e6,
                zout: 2e3,
            },
        );
    }
}
