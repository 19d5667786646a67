//! `follower-divider`: common drain with the gate biased by R1/R2 from VDD.

use super::common::{
    divider_tap, follower, par, CapRole, Frame, NetlistInput, Rails, SignalContext, SmallSignal,
};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Divider-biased source follower.
pub struct FollowerDivider;

impl Topology for FollowerDivider {
    fn id(&self) -> &'static str {
        "follower-divider"
    }
    fn summary(&self) -> &'static str {
        "common drain, voltage-divider gate bias"
    }
    fn parts(&self) -> &'static [&'static str] {
        &["R1", "R2", "RS"]
    }
    fn roles(&self) -> &'static [Role] {
        &[Role::DivTop, Role::DivBottom, Role::Source]
    }
    fn families(&self) -> &'static [Family] {
        &Family::ALL
    }
    fn non_inverting(&self) -> bool {
        true
    }
    fn bias(&self, v: &[f64], rails: &Rails) -> BiasNetwork {
        BiasNetwork {
            gate: Gate::Fixed(divider_tap(v[0], v[1], rails.vdd_v, 0.0)),
            source_rail_v: 0.0,
            rs_ohm: v[2],
            drain_rail_v: rails.vdd_v,
            rd_ohm: 0.0,
        }
    }
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        follower(v[2], par(&[v[0], v[1]]), c)
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::follower(par(&[v[0], v[1]]), v[2])
    }
    fn resistor_volts(&self, v: &[f64], rails: &Rails, op: &OpPoint) -> Vec<f64> {
        vec![rails.vdd_v - op.vg_v, op.vg_v, op.id_a * v[2]]
    }
    fn netlist(&self, v: &[f64], b: &NetlistInput) -> Netlist {
        let mut f = Frame::new(b);
        let (g, s) = (f.net.node("g"), f.net.node("s"));
        f.net.resistor("R1", f.vdd, g, v[0]);
        f.net.resistor("R2", g, GROUND, v[1]);
        f.net.resistor("RS", s, GROUND, v[2]);
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
    use super::super::tests_support::{check, enhancement, Want};
    use super::*;

    // Hand example (our own): enhancement VT 2 V, K 0.5 mA/V²; VDD 12 V,
    // R1 = R2 = 1 MΩ: VG = 6 V. RS 1 kΩ: ID = 0.5m(4 − 1k·ID)²
    // ⇔ 500 ID² − 5 ID + 0.008 = 0, roots (5 ± 3)/1000; 8 mA would need
    // VGS = −2 V < VT, so ID = 2 mA, VGS = 4 V, VS = 2 V, VDS = 10 V, gm = 2 mS.
    // RL 1 kΩ: Av = 0.5; Zin = 500 kΩ; Zout = 1k ∥ 500 = 333.3 Ω.
    #[test]
    fn hand_example() {
        check(
            &FollowerDivider,
            &[1e6, 1e6, 1e3],
            (12.0, 0.0),
            enhancement(2.0, 0.5e-3),
            1e3,
            Want {
                id: 2e-3,
                vgs: 4.0,
                vds: 10.0,
                av: 0.5,
                zin: 500e3,
                zout: 1e3 / 3.0,
            },
        );
    }
}
