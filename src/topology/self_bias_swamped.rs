//! `self-bias-swamped`: common source, self bias, RS left unbypassed so the
//! gain depends less on gm (local series feedback).

use super::common::{
    cs_degenerated, cs_degenerated_gain, CapRole, Frame, NetlistInput, Rails, SignalContext,
    SmallSignal,
};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Self-biased common source with RS unbypassed.
pub struct SelfBiasSwamped;

impl Topology for SelfBiasSwamped {
    fn id(&self) -> &'static str {
        "self-bias-swamped"
    }
    fn summary(&self) -> &'static str {
        "common source, self bias, RS unbypassed"
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
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        cs_degenerated(v[2], v[1], v[0], c)
    }
    fn gain(&self, v: &[f64], c: &SignalContext) -> f64 {
        cs_degenerated_gain(v[2], v[1], c)
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::common_source(v[0], v[1], v[2])
    }
    fn resistor_volts(&self, v: &[f64], _rails: &Rails, op: &OpPoint) -> Vec<f64> {
        vec![0.0, op.id_a * v[1], op.id_a * v[2]]
    }
    fn netlist(&self, v: &[f64], b: &NetlistInput) -> Netlist {
        let mut f = Frame::new(b);
        let (g, s, d) = (f.net.node("g"), f.net.node("s"), f.net.node("d"));
        f.net.resistor("RG", g, GROUND, v[0]);
        f.net.resistor("RS", s, GROUND, v[1]);
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
        ]
    }
}

#[cfg(test)]
mod tests {
    use super::super::tests_support::{check, jfet, Want};
    use super::*;

    // Same bias as the self-bias hand example (ID 2 mA, gm 2 mS, VDS 6.4 V),
    // now unbypassed: Av = −gm·Rp/(1 + gm·RS) = −2m·2481.2/(1 + 2) = −1.6541
    // (Boylestad & Nashelsky eq. 8.26 with ro → ∞).
    #[test]
    fn hand_example() {
        check(
            &SelfBiasSwamped,
            &[1e6, 1e3, 3.3e3],
            (15.0, 0.0),
            jfet(8e-3, -4.0),
            10e3,
            Want {
                id: 2e-3,
                vgs: -2.0,
                vds: 6.4,
                av: -2e-3 * (3.3e3 * 10e3 / 13.3e3) / 3.0,
                zin: 1e6,
                zout: 3.3e3,
            },
        );
    }
}
