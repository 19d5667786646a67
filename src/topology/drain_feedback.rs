//! `drain-feedback`: enhancement MOSFET with RF from drain to gate. No DC
//! current flows in RF, so VGS = VDS and the device is always saturated;
//! the signal sees RF as a Miller feedback resistor.

use super::common::{par, CapRole, Frame, NetlistInput, Rails, SignalContext, SmallSignal};
use super::{BiasNetwork, Gate, OpPoint, Role, SignalPath, Topology};
use crate::device::Family;
use crate::netlist::{Netlist, GROUND};

/// Drain-feedback biased common source.
pub struct DrainFeedback;

impl Topology for DrainFeedback {
    fn id(&self) -> &'static str {
        "drain-feedback"
    }
    fn summary(&self) -> &'static str {
        "common source, RF from drain to gate (VGS = VDS)"
    }
    fn parts(&self) -> &'static [&'static str] {
        &["RF", "RD"]
    }
    fn roles(&self) -> &'static [Role] {
        &[Role::Feedback, Role::Drain]
    }
    fn families(&self) -> &'static [Family] {
        &[Family::NEnhancementMosfet]
    }
    fn bias(&self, v: &[f64], rails: &Rails) -> BiasNetwork {
        BiasNetwork {
            gate: Gate::FromDrain,
            source_rail_v: 0.0,
            rs_ohm: 0.0,
            drain_rail_v: rails.vdd_v,
            rd_ohm: v[1],
        }
    }
    /// With `Rq = RD∥RL∥ro`: `Av = −(gm − 1/RF)·(RF∥Rq)`, `Zin = RF/(1 − Av)`
    /// (Miller; Boylestad & Nashelsky, E-MOSFET drain feedback), and with the
    /// source resistance Rsig at the gate,
    /// `Zout = 1 / (1/RD + gds + 1/(RF + Rsig) + gm·Rsig/(RF + Rsig))`
    /// (test voltage at the drain, gate at vx·Rsig/(RF + Rsig)).
    fn small_signal(&self, v: &[f64], c: &SignalContext) -> SmallSignal {
        let (rf, rd) = (v[0], v[1]);
        let rq = par(&[
            rd,
            c.rl_ohm,
            if c.gds_s > 0.0 {
                1.0 / c.gds_s
            } else {
                f64::INFINITY
            },
        ]);
        let av = -(c.gm_s - 1.0 / rf) * par(&[rf, rq]);
        let rloop = rf + c.rsig_ohm;
        SmallSignal {
            av,
            zin_ohm: rf / (1.0 - av),
            zout_ohm: 1.0 / (1.0 / rd + c.gds_s + 1.0 / rloop + c.gm_s * c.rsig_ohm / rloop),
        }
    }
    fn signal_path(&self, v: &[f64]) -> SignalPath {
        SignalPath::drain_feedback(v[0], v[1])
    }
    fn resistor_volts(&self, v: &[f64], _rails: &Rails, op: &OpPoint) -> Vec<f64> {
        vec![0.0, op.id_a * v[1]]
    }
    fn netlist(&self, v: &[f64], b: &NetlistInput) -> Netlist {
        let mut f = Frame::new(b);
        let (g, d) = (f.net.node("g"), f.net.node("d"));
        f.net.resistor("RF", d, g, v[0]);
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
    use super::super::tests_support::{check, enhancement, Want};
    use super::*;

    // Hand example (our own): VT 2 V, K 0.5 mA/V², VDD 10 V, RD 3 kΩ.
    // VGS = VDS = 10 − 3k·ID and ID = 0.5m(VGS − 2)²: VGS = 4 V gives ID = 2 mA
    // and 10 − 6 = 4 V, so that is the point. gm = 2·0.5m·2 = 2 mS.
    // RF 10 MΩ, RL 3 kΩ: Rq = 1.5 kΩ, Av = −(2m − 0.1µ)·(10M∥1.5k) = −2.99940,
    // Zin = 10M/(1 + 2.99940) = 2.50037 MΩ (Miller), Zout = 3k∥10M.
    #[test]
    fn hand_example() {
        let av = -(2e-3 - 1e-7) * (1e7 * 1.5e3 / (1e7 + 1.5e3));
        check(
            &DrainFeedback,
            &[10e6, 3e3],
            (10.0, 0.0),
            enhancement(2.0, 0.5e-3),
            3e3,
            Want {
                id: 2e-3,
                vgs: 4.0,
                vds: 4.0,
                av,
                zin: 10e6 / (1.0 - av),
                zout: 1.0 / (1.0 / 3e3 + 1e-7),
            },
        );
        assert!((av + 2.999_40).abs() < 1e-5);
    }
}
