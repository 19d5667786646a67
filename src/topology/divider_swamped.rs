//! `divider-swamped`: common source, gate biased by R1/R2, RS unbypassed.

use super::common::{
    cs_degenerated, cs_degenerated_gain, divider_tap, par, CapRole, Frame, NetlistInput, Rails,
    SignalContext, SmallSignal,
};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Divider-biased common source with RS unbypassed.
pub struct DividerSwamped;

impl Topology for DividerSwamped {
    fn id(&self) -> &'static str {
        "divider-swamped"
    }
    fn summary(&self) -> &'static str {
        "common source, voltage-divider gate bias, RS unbypassed"
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
    fn bias(&self, v: &[f64], rails: &Rails) -> BiasNetwork {
        BiasNetwork {
            gate: Gate::Fixed(divider_tap(v[0], v[1], rails.vdd_v, 0.0)),
            source_rail_v: 0.0,
            rs_ohm: v[2],
            drain_rail_v: rails.vdd_v,
            rd_ohm: v[3],
        }
    }
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        cs_degenerated(v[3], v[2], par(&[v[0], v[1]]), c)
    }
    fn gain(&self, v: &[f64], c: &SignalContext) -> f64 {
        cs_degenerated_gain(v[3], v[2], c)
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::common_source(par(&[v[0], v[1]]), v[2], v[3])
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
        f.net.resistor("RS", s, GROUND, v[2]);
        f.net.resistor("RD", f.vdd, d, v[3]);
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

    // Hand example (our own): JFET IDSS 8 mA, VP −4 V (k = 0.5 mA/V²).
    // VDD 16 V, R1 700 kΩ, R2 100 kΩ: VG = 2 V. RS 2 kΩ: VGS = 2 − 2k·ID;
    // with u = VG − VP = 6, ID = k(6 − 2000·ID)² ⇔ 2000 ID² − 13 ID + 0.018 = 0,
    // roots (13 ± 5)/4000 = 2 mA or 4.5 mA; 4.5 mA would put VGS at −7 V, below
    // VP, so ID = 2 mA, VGS = −2 V, gm = 2 mS. RD 4 kΩ: VDS = 16 − 2m·6k = 4 V.
    // RL 4 kΩ (Rp = 2 kΩ): Av = −2m·2k/(1 + 2m·2k) = −0.8. Zin = 87.5 kΩ.
    #[test]
    fn hand_example() {
        check(
            &DividerSwamped,
            &[700e3, 100e3, 2e3, 4e3],
            (16.0, 0.0),
            jfet(8e-3, -4.0),
            4e3,
            Want {
                id: 2e-3,
                vgs: -2.0,
                vds: 4.0,
                av: -0.8,
                zin: 87.5e3,
                zout: 4e3,
            },
        );
    }
}
