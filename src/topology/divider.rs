//! `divider`: common source, gate biased by R1/R2 from VDD, RS bypassed. For
//! an enhancement MOSFET RS may be 0 Ω (source grounded).

use super::common::{
    cs_bypassed, cs_bypassed_gain, divider_tap, par, CapRole, Frame, NetlistInput, Rails,
    SignalContext, SmallSignal,
};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Divider-biased common source with RS bypassed.
pub struct Divider;

impl Topology for Divider {
    fn id(&self) -> &'static str {
        "divider"
    }
    fn summary(&self) -> &'static str {
        "common source, voltage-divider gate bias, RS bypassed"
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
    fn may_be_zero(&self, index: usize, family: Family) -> bool {
        index == 2 && family == Family::NEnhancementMosfet
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
    fn bypassed(&self) -> &'static [usize] {
        &[2]
    }
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        cs_bypassed(v[3], par(&[v[0], v[1]]), c)
    }
    fn gain(&self, v: &[f64], c: &SignalContext) -> f64 {
        cs_bypassed_gain(v[3], c)
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::common_source(par(&[v[0], v[1]]), 0.0, v[3])
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
        let (g, d) = (f.net.node("g"), f.net.node("d"));
        f.net.resistor("R1", f.vdd, g, v[0]);
        f.net.resistor("R2", g, GROUND, v[1]);
        let s = if v[2] > 0.0 {
            let s = f.net.node("s");
            f.net.resistor("RS", s, GROUND, v[2]);
            f.net.capacitor("C_S", s, GROUND, b.caps.c_bypass_f);
            s
        } else {
            GROUND
        };
        f.net.resistor("RD", f.vdd, d, v[3]);
        f.fet(d, g, s, b);
        f.drive(g, b);
        f.load(d, b);
        f.net
    }
    fn capacitors(&self, v: &[f64]) -> Vec<(&'static str, CapRole)> {
        let mut c = vec![
            ("C_IN", CapRole::InputCoupling),
            ("C_OUT", CapRole::OutputCoupling),
        ];
        if v[2] > 0.0 {
            c.push(("C_S", CapRole::SourceBypass));
        }
        c
    }
}

#[cfg(test)]
mod tests {
    use super::super::tests_support::{check, enhancement, jfet, Want};
    use super::*;

    // Hand example (our own): enhancement MOSFET VT 2 V, K 1 mA/V², source
    // grounded (RS = 0). VDD 12 V, R1 1 MΩ, R2 250 kΩ: VG = VGS = 12·0.25/1.25
    // = 2.4 V; ID = 1m·0.4² = 0.16 mA (Shichman–Hodges); gm = 2·sqrt(K·ID)
    // = 0.8 mS. RD 20 kΩ: VDS = 12 − 3.2 = 8.8 V. RL 20 kΩ: Av = −0.8m·10k = −8.
    // Zin = 1M∥250k = 200 kΩ.
    #[test]
    fn hand_example_grounded_source() {
        check(
            &Divider,
            &[1e6, 250e3, 0.0, 20e3],
            (12.0, 0.0),
            enhancement(2.0, 1e-3),
            20e3,
            Want {
                id: 0.16e-3,
                vgs: 2.4,
                vds: 8.8,
                av: -8.0,
                zin: 200e3,
                zout: 20e3,
            },
        );
    }

    // REFERENCE §4.6 (ngspice-confirmed there): VDD 16, 2.1 MΩ/270 kΩ,
    // RS 1.5 kΩ, IDSS 8 mA, VP −4 V -> VGS −1.8017 V, ID 2.4163 mA, gm 2.1983 mS.
    #[test]
    fn reference_divider_point() {
        let rails = Rails {
            vdd_v: 16.0,
            vss_v: 0.0,
        };
        let v = [2.1e6, 270e3, 1.5e3, 2e3];
        let law = jfet(8e-3, -4.0);
        let op = Divider.bias(&v, &rails).solve(&law);
        assert!((op.vg_v - 1.82279).abs() < 1e-5);
        assert!((op.vgs_v + 1.80168).abs() < 1e-5);
        assert!((law.gm(op.vgs_v, op.vds_v) - 2.1983e-3).abs() < 1e-7);
    }
}
