//! `divider-split`: common source, gate biased by R1/R2, source resistance
//! split into RS1 (unbypassed, sets the gain) and RS2 (bypassed); the bias
//! sees RS1 + RS2.

use super::common::{
    cs_degenerated, cs_degenerated_gain, divider_tap, par, CapRole, Frame, NetlistInput, Rails,
    SignalContext, SmallSignal,
};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Divider-biased common source with a partly bypassed source resistor.
pub struct DividerSplit;

impl Topology for DividerSplit {
    fn id(&self) -> &'static str {
        "divider-split"
    }
    fn summary(&self) -> &'static str {
        "common source, voltage-divider gate bias, RS1 unbypassed + RS2 bypassed"
    }
    fn parts(&self) -> &'static [&'static str] {
        &["R1", "R2", "RS1", "RS2", "RD"]
    }
    fn roles(&self) -> &'static [Role] {
        &[
            Role::DivTop,
            Role::DivBottom,
            Role::Source,
            Role::Source,
            Role::Drain,
        ]
    }
    fn families(&self) -> &'static [Family] {
        &Family::ALL
    }
    fn bias(&self, v: &[f64], rails: &Rails) -> BiasNetwork {
        BiasNetwork {
            gate: Gate::Fixed(divider_tap(v[0], v[1], rails.vdd_v, 0.0)),
            source_rail_v: 0.0,
            rs_ohm: v[2] + v[3],
            drain_rail_v: rails.vdd_v,
            rd_ohm: v[4],
        }
    }
    fn bypassed(&self) -> &'static [usize] {
        &[3]
    }
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        cs_degenerated(v[4], v[2], par(&[v[0], v[1]]), c)
    }
    fn gain(&self, v: &[f64], c: &SignalContext) -> f64 {
        cs_degenerated_gain(v[4], v[2], c)
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::common_source(par(&[v[0], v[1]]), v[2], v[4])
    }
    fn resistor_volts(&self, v: &[f64], rails: &Rails, op: &OpPoint) -> Vec<f64> {
        vec![
            rails.vdd_v - op.vg_v,
            op.vg_v,
            op.id_a * v[2],
            op.id_a * v[3],
            op.id_a * v[4],
        ]
    }
    fn netlist(&self, v: &[f64], b: &NetlistInput) -> Netlist {
        let mut f = Frame::new(b);
        let (g, s, sx, d) = (
            f.net.node("g"),
            f.net.node("s"),
            f.net.node("sx"),
            f.net.node("d"),
        );
        f.net.resistor("R1", f.vdd, g, v[0]);
        f.net.resistor("R2", g, GROUND, v[1]);
        f.net.resistor("RS1", s, sx, v[2]);
        f.net.resistor("RS2", sx, GROUND, v[3]);
        f.net.capacitor("C_S", sx, GROUND, b.caps.c_bypass_f);
        f.net.resistor("RD", f.vdd, d, v[4]);
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

    // Same bias as the divider-swamped hand example (RS1 + RS2 = 2 kΩ gives
    // ID 2 mA, VGS −2 V, gm 2 mS, VDS 4 V with RD 4 kΩ), with RS1 = 500 Ω
    // unbypassed: Av = −2m·2k/(1 + 2m·500) = −2 (RL 4 kΩ).
    #[test]
    fn hand_example() {
        check(
            &DividerSplit,
            &[700e3, 100e3, 500.0, 1.5e3, 4e3],
            (16.0, 0.0),
            jfet(8e-3, -4.0),
            4e3,
            Want {
                id: 2e-3,
                vgs: -2.0,
                vds: 4.0,
                av: -2.0,
                zin: 87.5e3,
                zout: 4e3,
            },
        );
    }
}
