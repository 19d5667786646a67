//! `current-source`: dual-supply source bias. The gate returns to ground
//! through RG and the source to the negative rail through RS (bypassed), so
//! a large VSS makes ID ≈ (−VSS − VGS)/RS nearly independent of the device.
//! Needs `vss < 0`.

use super::common::{
    cs_bypassed, cs_bypassed_gain, CapRole, Frame, NetlistInput, Rails, SignalContext, SmallSignal,
};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Common source with dual-supply source bias.
pub struct CurrentSource;

impl Topology for CurrentSource {
    fn id(&self) -> &'static str {
        "current-source"
    }
    fn summary(&self) -> &'static str {
        "common source, source returned to the negative rail through RS (bypassed)"
    }
    fn parts(&self) -> &'static [&'static str] {
        &["RG", "RS", "RD"]
    }
    fn roles(&self) -> &'static [Role] {
        &[Role::Gate, Role::Source, Role::Drain]
    }
    fn families(&self) -> &'static [Family] {
        &Family::ALL
    }
    fn needs_vss(&self) -> bool {
        true
    }
    fn bias(&self, v: &[f64], rails: &Rails) -> BiasNetwork {
        BiasNetwork {
            gate: Gate::Fixed(0.0),
            source_rail_v: rails.vss_v,
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
        let vss = f.vss;
        f.net.resistor("RS", s, vss, v[1]);
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
    use super::super::tests_support::{check, enhancement, Want};
    use super::*;

    // Hand example (our own): enhancement VT 2 V, K 0.5 mA/V², VSS −10 V,
    // RS 3 kΩ: VGS = 10 − 3k·ID, ID = 0.5m(8 − 3k·ID)² ⇔ 4500 ID² − 25 ID
    // + 0.032 = 0, roots (25 ± 7)/9000; the larger would make VGS < VT, so
    // ID = 2 mA, VGS = 4 V, VS = −4 V. VDD 10 V, RD 2 kΩ: VD = 6 V, VDS = 10 V.
    // gm = 2 mS; RL 2 kΩ: Av = −2m·1k = −2.
    #[test]
    fn hand_example() {
        check(
            &CurrentSource,
            &[1e6, 3e3, 2e3],
            (10.0, -10.0),
            enhancement(2.0, 0.5e-3),
            2e3,
            Want {
                id: 2e-3,
                vgs: 4.0,
                vds: 10.0,
                av: -2.0,
                zin: 1e6,
                zout: 2e3,
            },
        );
    }
}
