//! `follower-self`: common drain (source follower), gate to ground through
//! RG, RS to ground; output at the source.

use super::common::{follower, CapRole, Frame, NetlistInput, Rails, SignalContext, SmallSignal};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Self-biased source follower.
pub struct FollowerSelf;

impl Topology for FollowerSelf {
    fn id(&self) -> &'static str {
        "follower-self"
    }
    fn summary(&self) -> &'static str {
        "common drain, gate to ground through RG, RS to ground"
    }
    fn parts(&self) -> &'static [&'static str] {
        &["RG", "RS"]
    }
    fn roles(&self) -> &'static [Role] {
        &[Role::Gate, Role::Source]
    }
    fn families(&self) -> &'static [Family] {
        &[Family::NJfet, Family::NDepletionMosfet]
    }
    fn non_inverting(&self) -> bool {
        true
    }
    fn bias(&self, v: &[f64], rails: &Rails) -> BiasNetwork {
        BiasNetwork {
            gate: Gate::Fixed(0.0),
            source_rail_v: 0.0,
            rs_ohm: v[1],
            drain_rail_v: rails.vdd_v,
            rd_ohm: 0.0,
        }
    }
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        follower(v[1], v[0], c)
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::follower(v[0], v[1])
    }
    fn resistor_volts(&self, v: &[f64], _rails: &Rails, op: &OpPoint) -> Vec<f64> {
        vec![0.0, op.id_a * v[1]]
    }
    fn netlist(&self, v: &[f64], b: &NetlistInput) -> Netlist {
        let mut f = Frame::new(b);
        let (g, s) = (f.net.node("g"), f.net.node("s"));
        f.net.resistor("RG", g, GROUND, v[0]);
        f.net.resistor("RS", s, GROUND, v[1]);
        let vdd = f.vdd;
        f.fet(vdd, g, s, b);
        f.drive(g, b);
        f.load(s, b);
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
    use super::super::tests_support::{check, jfet, Want};
    use super::*;

    // Hand example (our own): JFET IDSS 8 mA, VP −4 V, RS 1 kΩ: ID = 2 mA,
    // VGS = −2 V, gm = 2 mS (as in self bias). VDD 15 V: VDS = 15 − 2 = 13 V.
    // RL 1 kΩ: R'' = 500 Ω, gm·R'' = 1, Av = 1/2 = 0.5;
    // Zout = 1k ∥ 1/gm = 1k ∥ 500 = 333.3 Ω.
    #[test]
    fn hand_example() {
        check(
            &FollowerSelf,
            &[1e6, 1e3],
            (15.0, 0.0),
            jfet(8e-3, -4.0),
            1e3,
            Want {
                id: 2e-3,
                vgs: -2.0,
                vds: 13.0,
                av: 0.5,
                zin: 1e6,
                zout: 1e3 / 3.0,
            },
        );
    }
}
