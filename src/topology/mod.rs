//! Amplifier topologies: their parts, their DC bias network, their mid-band
//! small-signal results, and the netlist they build.
//!
//! Every topology reduces its DC problem to one [`BiasNetwork`]: a gate
//! voltage (fixed by a divider, or equal to the drain voltage for drain
//! feedback), a source returned to a rail through a resistance, and a drain
//! fed from a rail through a resistance. The gate draws no current, so that
//! is exact, and one solver ([`BiasNetwork::solve`]) serves all of them.
//!
//! Adding a topology means one new file here and one line in [`TOPOLOGIES`].
//!
//! This module must not know about searching, ranking or printing.

mod common;
mod common_gate;
mod current_source;
mod divider;
mod divider_split;
mod divider_swamped;
mod drain_feedback;
mod fixed_bias;
mod follower_divider;
mod follower_self;
mod path;
mod self_bias;
mod self_bias_swamped;
mod zero_bias;

pub use common::{Caps, Rails, SmallSignal};
pub use path::{SignalPath, Terminal};

use crate::device::{Family, Region, SquareLaw};
use crate::netlist::Netlist;
use serde::Serialize;

/// Every topology, in the order used for tie-breaks and listings.
pub static TOPOLOGIES: &[&dyn Topology] = &[
    &zero_bias::ZeroBias,
    &self_bias::SelfBias,
    &self_bias_swamped::SelfBiasSwamped,
    &divider::Divider,
    &divider_swamped::DividerSwamped,
    &divider_split::DividerSplit,
    &drain_feedback::DrainFeedback,
    &follower_self::FollowerSelf,
    &follower_divider::FollowerDivider,
    &common_gate::CommonGate,
    &fixed_bias::FixedBias,
    &current_source::CurrentSource,
];

/// Look a topology up by its id.
pub fn by_id(id: &str) -> Option<&'static dyn Topology> {
    TOPOLOGIES.iter().copied().find(|t| t.id() == id)
}

/// The ids of every topology, for error messages.
pub fn ids() -> Vec<&'static str> {
    TOPOLOGIES.iter().map(|t| t.id()).collect()
}

/// How the gate voltage is set at DC.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Gate {
    /// A fixed gate voltage, volts (divider Thevenin voltage, or 0 V).
    Fixed(f64),
    /// The gate follows the drain (drain feedback; no DC current in RF).
    FromDrain,
}

/// The DC problem every topology reduces to.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BiasNetwork {
    /// Gate voltage rule.
    pub gate: Gate,
    /// Rail the source resistance returns to, volts.
    pub source_rail_v: f64,
    /// Total DC source resistance, ohms (0 = source on the rail).
    pub rs_ohm: f64,
    /// Rail the drain resistance is fed from, volts.
    pub drain_rail_v: f64,
    /// DC drain resistance, ohms (0 = drain on the rail).
    pub rd_ohm: f64,
}

/// The DC operating point.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct OpPoint {
    /// Gate voltage to ground, volts.
    pub vg_v: f64,
    /// Source voltage to ground, volts.
    pub vs_v: f64,
    /// Drain voltage to ground, volts.
    pub vd_v: f64,
    /// Gate–source voltage, volts.
    pub vgs_v: f64,
    /// Drain–source voltage, volts.
    pub vds_v: f64,
    /// Drain current, amps, positive into the drain.
    pub id_a: f64,
    /// Operating region.
    pub region: Region,
}

impl OpPoint {
    /// True in saturation (the only region in which the stage amplifies as
    /// designed).
    pub fn saturated(&self) -> bool {
        self.region == Region::Saturation
    }
}

impl BiasNetwork {
    /// `VGS = a − b·ID` and `VDS = c − d·ID` along the bias line.
    fn line(&self) -> (f64, f64, f64, f64) {
        let c = self.drain_rail_v - self.source_rail_v;
        let d = self.rd_ohm + self.rs_ohm;
        match self.gate {
            Gate::Fixed(vg) => (vg - self.source_rail_v, self.rs_ohm, c, d),
            Gate::FromDrain => (c, d, c, d),
        }
    }

    /// Drain current, VGS and VS, amps and volts, at the saturation root of
    /// a λ = 0 law (`law.lambda_per_v` is ignored): the operating point
    /// wherever the drain sits high enough to keep the device saturated.
    /// The same root as [`BiasNetwork::solve`] takes in saturation.
    pub fn saturation(&self, law: &SquareLaw) -> (f64, f64, f64) {
        let (a, b, _, _) = self.line();
        let k = law.k_a_per_v2;
        let u = a - law.vto_v;
        let id = if u <= 0.0 || k <= 0.0 {
            0.0
        } else {
            saturation_root(k, u, b)
        };
        (id, a - b * id, self.source_rail_v + self.rs_ohm * id)
    }

    /// The operating point for the given device.
    ///
    /// With λ = 0 this is the closed form: along the bias line both the
    /// saturation law and the triode law are quadratics in ID. The physical
    /// root is the one whose VGS keeps the channel on and whose region agrees
    /// with the law used. `F(ID) = ID − f(VGS(ID), VDS(ID))` is strictly
    /// increasing (the device current falls as ID rises along every bias
    /// line here), so the root is unique.
    ///
    /// With λ > 0 the equation is cubic; it is solved by Newton's method
    /// inside a bracket that always holds the unique root, to full
    /// precision.
    pub fn solve(&self, law: &SquareLaw) -> OpPoint {
        let (a, b, c, d) = self.line();
        let k = law.k_a_per_v2;
        let u = a - law.vto_v; // overdrive at ID = 0
        let id = if u <= 0.0 || k <= 0.0 {
            0.0
        } else if law.lambda_per_v == 0.0 {
            closed_form(k, u, b, c, d)
        } else {
            newton_bracketed(law, a, b, c, d, closed_form(k, u, b, c, d))
        };
        let vgs = a - b * id;
        let vds = c - d * id;
        let (vs, vd) = (
            self.source_rail_v + self.rs_ohm * id,
            self.drain_rail_v - self.rd_ohm * id,
        );
        let vg = match self.gate {
            Gate::Fixed(v) => v,
            Gate::FromDrain => vd,
        };
        OpPoint {
            vg_v: vg,
            vs_v: vs,
            vd_v: vd,
            vgs_v: vgs,
            vds_v: vds,
            id_a: id,
            region: law.region(vgs, vds),
        }
    }
}

/// Smaller root of `A x² − B x + C = 0` (A, B, C >= 0 as used here), in the
/// cancellation-free form `2C / (B + sqrt(B² − 4AC))`.
fn small_root(a2: f64, b1: f64, c0: f64) -> f64 {
    let disc = (b1 * b1 - 4.0 * a2 * c0).max(0.0);
    let den = b1 + disc.sqrt();
    if den == 0.0 {
        0.0
    } else {
        2.0 * c0 / den
    }
}

/// The saturation root along `VGS = vto + u − b·ID` (λ = 0), amps:
/// ID = k (u − b ID)²  ⇔  k b² ID² − (2kub + 1) ID + k u² = 0. The physical
/// root keeps u − b·ID >= 0, which is the smaller one; with b = 0 the law
/// is explicit.
fn saturation_root(k: f64, u: f64, b: f64) -> f64 {
    if b == 0.0 {
        k * u * u
    } else {
        small_root(k * b * b, 2.0 * k * u * b + 1.0, k * u * u)
    }
}

/// λ = 0 operating current along `VGS = vto + u − b·ID`, `VDS = c − d·ID`.
fn closed_form(k: f64, u: f64, b: f64, c: f64, d: f64) -> f64 {
    let id_sat = saturation_root(k, u, b);
    let vov = u - b * id_sat;
    let vds = c - d * id_sat;
    if vds >= vov {
        return id_sat;
    }
    // Triode: ID = k·VDS·(2·vov − VDS) with VDS = c − d·ID, vov = u − b·ID:
    // ID = k (c − d ID)(e − g ID), e = 2u − c, g = 2b − d, i.e.
    // k d g ID² − (k c g + k d e + 1) ID + k c e = 0.
    let e = 2.0 * u - c;
    let g = 2.0 * b - d;
    let qa = k * d * g;
    let qb = -(k * c * g + k * d * e + 1.0);
    let qc = k * c * e;
    let residual = |i: f64| {
        let vds = c - d * i;
        let vov = u - b * i;
        i - k * vds * (2.0 * vov - vds)
    };
    let upper = if d > 0.0 { c / d } else { f64::INFINITY };
    let mut best: Option<f64> = None;
    for r in quadratic_roots(qa, qb, qc) {
        let (vds, vov) = (c - d * r, u - b * r);
        let consistent =
            r >= -1e-18 && r <= upper * (1.0 + 1e-12) && vov > 0.0 && vds <= vov * (1.0 + 1e-12);
        if consistent && best.is_none_or(|b0| residual(r).abs() < residual(b0).abs()) {
            best = Some(r.max(0.0));
        }
    }
    best.unwrap_or_else(|| {
        // Only reachable through rounding at a region boundary: fall back to
        // the bracketed solve of the exact law.
        let law = SquareLaw {
            vto_v: 0.0,
            k_a_per_v2: k,
            lambda_per_v: 0.0,
        };
        newton_bracketed(&law, u, b, c, d, id_sat.min(upper))
    })
}

/// Real roots of `qa x² + qb x + qc = 0` (stable formulas; linear when qa = 0).
fn quadratic_roots(qa: f64, qb: f64, qc: f64) -> Vec<f64> {
    if qa == 0.0 {
        return if qb == 0.0 { vec![] } else { vec![-qc / qb] };
    }
    let disc = qb * qb - 4.0 * qa * qc;
    if disc < 0.0 {
        return vec![];
    }
    let q = -0.5 * (qb + qb.signum() * disc.sqrt());
    let mut v = vec![q / qa];
    if q != 0.0 {
        v.push(qc / q);
    }
    v
}

/// Unique root of `F(ID) = ID − law.id(a − b·ID, c − d·ID)` on
/// `[0, min(law.id(a, c), c/d)]`, by Newton steps kept inside a shrinking
/// bracket. The bound `c/d` keeps VDS >= 0: below zero the law's triode
/// continuation times `(1 + λ·VDS)` is no longer monotonic, and F has
/// spurious roots there (e.g. VDS ≈ −300 V for a strongly driven divider
/// stage with λ = 0.01). At `c/d` the device current is 0, so F > 0.
fn newton_bracketed(law: &SquareLaw, a: f64, b: f64, c: f64, d: f64, start: f64) -> f64 {
    let f = |i: f64| i - law.id(a - b * i, c - d * i);
    let df = |i: f64| 1.0 + b * law.gm(a - b * i, c - d * i) + d * law.gds(a - b * i, c - d * i);
    let mut lo = 0.0;
    let mut hi = law.id(a, c);
    if d > 0.0 {
        hi = hi.min(c / d);
    }
    if hi <= 0.0 {
        return 0.0;
    }
    let mut x = start.clamp(lo, hi);
    for _ in 0..200 {
        let fx = f(x);
        if fx == 0.0 {
            return x;
        }
        if fx > 0.0 {
            hi = x;
        } else {
            lo = x;
        }
        let step = fx / df(x);
        let mut next = x - step;
        if !(next > lo && next < hi) {
            next = 0.5 * (lo + hi);
        }
        if (next - x).abs() <= 1e-16 * x.abs().max(1e-30) || hi - lo <= 4.0 * f64::EPSILON * hi {
            return next;
        }
        x = next;
    }
    x
}

/// What a resistor does in its topology; the search enumerates each role
/// in its own way.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Role {
    /// Gate return resistor: carries no DC current and sets only Zin.
    Gate,
    /// Upper divider resistor (from the more positive rail to the tap).
    DivTop,
    /// Lower divider resistor (from the tap to ground or the negative rail).
    DivBottom,
    /// In the DC source path (RS, RS1, RS2).
    Source,
    /// Drain load RD: does not move the bias when λ = 0 and saturated.
    Drain,
    /// Drain-to-gate feedback resistor RF.
    Feedback,
}

/// One amplifier topology. Values are passed as a slice in the order of
/// [`Topology::parts`], in ohms.
pub trait Topology: Sync {
    /// Stable kebab-case id used in every output.
    fn id(&self) -> &'static str;
    /// One line describing the configuration.
    fn summary(&self) -> &'static str;
    /// Designators of its resistors, in a fixed order.
    fn parts(&self) -> &'static [&'static str];
    /// Role of each resistor, in [`Topology::parts`] order.
    fn roles(&self) -> &'static [Role];
    /// Device families it works with.
    fn families(&self) -> &'static [Family];
    /// True when it needs a negative rail (`vss < 0`).
    fn needs_vss(&self) -> bool {
        false
    }
    /// True when the output is in phase with the input.
    fn non_inverting(&self) -> bool {
        false
    }
    /// True when the signal enters at the source (common gate), so the gate
    /// divider plays no part in Zin.
    fn input_at_source(&self) -> bool {
        false
    }
    /// Indices of the resistors a mid-band bypass capacitor shorts: they
    /// set the bias only and never enter [`Topology::small_signal`].
    fn bypassed(&self) -> &'static [usize] {
        &[]
    }
    /// Whether the resistor at `index` may be 0 Ω (a wire) for this family.
    fn may_be_zero(&self, _index: usize, _family: Family) -> bool {
        false
    }
    /// The DC reduction.
    fn bias(&self, values: &[f64], rails: &Rails) -> BiasNetwork;
    /// Mid-band small-signal results at an operating point.
    fn small_signal(&self, values: &[f64], ctx: &common::SignalContext) -> SmallSignal;
    /// The mid-band voltage gain alone, V/V, signed: the same value as
    /// [`Topology::small_signal`]'s `av`, to the bit, without Zin and Zout
    /// (the search's bounds ask for it millions of times).
    fn gain(&self, values: &[f64], ctx: &common::SignalContext) -> f64 {
        self.small_signal(values, ctx).av
    }
    /// The mid-band signal path: which terminals carry the signal and the
    /// resistances it sees (for output swing, noise and distortion).
    fn signal_path(&self, values: &[f64]) -> SignalPath;
    /// DC voltage across each resistor at the operating point, volts, in
    /// [`Topology::parts`] order (for dissipation).
    fn resistor_volts(&self, values: &[f64], rails: &Rails, op: &OpPoint) -> Vec<f64>;
    /// The circuit as a netlist, with the signal source and the load.
    fn netlist(&self, values: &[f64], build: &common::NetlistInput) -> Netlist;
    /// The capacitors it uses, as (designator, role) pairs.
    fn capacitors(&self, values: &[f64]) -> Vec<(&'static str, common::CapRole)>;

    /// Parts on the board with these values: the resistors that are not
    /// wires (0 Ω) plus the capacitors.
    fn part_count(&self, values: &[f64]) -> usize {
        values.iter().filter(|v| **v > 0.0).count() + self.capacitors(values).len()
    }
    /// Index of a designator in [`Topology::parts`].
    fn index_of(&self, part: &str) -> Option<usize> {
        self.parts().iter().position(|p| *p == part)
    }
    /// True when the family is supported.
    fn supports(&self, family: Family) -> bool {
        self.families().contains(&family)
    }
}

pub use common::{CapRole, NetlistInput, SignalContext};

#[cfg(test)]
mod tests {
    use super::*;

    // Common practice (a bypass capacitor is a short at mid-band): the
    // small-signal results do not move when a bypassed resistor does.
    #[test]
    fn bypassed_resistors_never_enter_the_small_signal() {
        for t in TOPOLOGIES {
            for &i in t.bypassed() {
                for (gm, rsig) in [(1e-3, 0.0), (7e-3, 600.0), (0.2, 50e3)] {
                    let ctx = common::SignalContext {
                        gm_s: gm,
                        gds_s: 1e-5,
                        rl_ohm: 10e3,
                        rsig_ohm: rsig,
                    };
                    let mut v: Vec<f64> = (0..t.parts().len())
                        .map(|k| 1e3 * (1.7 + k as f64))
                        .collect();
                    let a = t.small_signal(&v, &ctx);
                    v[i] *= 37.0;
                    let b = t.small_signal(&v, &ctx);
                    assert_eq!(a, b, "{} part {}", t.id(), t.parts()[i]);
                }
            }
        }
    }

    // The gain alone is the small-signal gain, to the bit, for every
    // topology, with and without gds and a source resistance (the search's
    // bounds use one, the full checks the other).
    #[test]
    fn gain_alone_is_the_small_signal_gain() {
        for t in TOPOLOGIES {
            for (gm, gds, rsig) in [(1e-3, 0.0, 0.0), (7e-3, 1e-5, 600.0), (0.2, 3e-4, 50e3)] {
                let ctx = common::SignalContext {
                    gm_s: gm,
                    gds_s: gds,
                    rl_ohm: 10e3,
                    rsig_ohm: rsig,
                };
                for scale in [1.0, 0.01, 330.0] {
                    let v: Vec<f64> = (0..t.parts().len())
                        .map(|k| scale * 1e3 * (1.3 + 2.1 * k as f64))
                        .collect();
                    let full = t.small_signal(&v, &ctx).av;
                    let alone = t.gain(&v, &ctx);
                    assert_eq!(full.to_bits(), alone.to_bits(), "{} {full} {alone}", t.id());
                }
            }
        }
    }

    fn law(vto: f64, k: f64, lambda: f64) -> SquareLaw {
        SquareLaw {
            vto_v: vto,
            k_a_per_v2: k,
            lambda_per_v: lambda,
        }
    }

    // REFERENCE check (Boylestad & Nashelsky ch. 7 self-bias method):
    // IDSS 8 mA, VP -4 V, RS 1 kΩ gives VGS = -2 V, ID = 2 mA.
    #[test]
    fn self_bias_reference_point() {
        let net = BiasNetwork {
            gate: Gate::Fixed(0.0),
            source_rail_v: 0.0,
            rs_ohm: 1000.0,
            drain_rail_v: 15.0,
            rd_ohm: 2000.0,
        };
        let op = net.solve(&law(-4.0, 8e-3 / 16.0, 0.0));
        assert!((op.id_a - 2e-3).abs() < 1e-15);
        assert!((op.vgs_v + 2.0).abs() < 1e-12);
        assert!((op.vds_v - 9.0).abs() < 1e-12);
        assert!(op.saturated());
        // The saturation-only root gives the same point (the search's box
        // bound uses it).
        let (id, vgs, vs) = net.saturation(&law(-4.0, 8e-3 / 16.0, 0.0));
        assert!((id - 2e-3).abs() < 1e-15);
        assert!((vgs + 2.0).abs() < 1e-12);
        assert!((vs - 2.0).abs() < 1e-12);
    }

    // Divider check from Boylestad-style worked example (values of our own,
    // REFERENCE §4.6, confirmed there with ngspice): VDD 16 V, 2.1 MΩ/270 kΩ,
    // RS 1.5 kΩ, IDSS 8 mA, VP -4 V -> VGS = -1.8017 V, ID = 2.4163 mA.
    #[test]
    fn divider_reference_point() {
        let vg = 16.0 * 270e3 / (2.1e6 + 270e3);
        let net = BiasNetwork {
            gate: Gate::Fixed(vg),
            source_rail_v: 0.0,
            rs_ohm: 1500.0,
            drain_rail_v: 16.0,
            rd_ohm: 2000.0,
        };
        let op = net.solve(&law(-4.0, 5e-4, 0.0));
        assert!((op.vgs_v + 1.80168).abs() < 2e-5, "{}", op.vgs_v);
        assert!((op.id_a - 2.4163e-3).abs() < 1e-7);
    }

    // REFERENCE §4.6 (ngspice-confirmed): drain feedback, VT 3 V,
    // K 0.24 mA/V², RD 2 kΩ, VDD 12 V -> VGS = VDS = 6.412 V, ID = 2.794 mA.
    #[test]
    fn drain_feedback_reference_point() {
        let net = BiasNetwork {
            gate: Gate::FromDrain,
            source_rail_v: 0.0,
            rs_ohm: 0.0,
            drain_rail_v: 12.0,
            rd_ohm: 2000.0,
        };
        let op = net.solve(&law(3.0, 0.24e-3, 0.0));
        assert!((op.vgs_v - 6.41199).abs() < 1e-5);
        assert!((op.id_a - 2.7940e-3).abs() < 1e-7);
        assert_eq!(op.vgs_v, op.vds_v);
    }

    #[test]
    fn cut_off_gives_zero_current() {
        let net = BiasNetwork {
            gate: Gate::Fixed(-5.0),
            source_rail_v: 0.0,
            rs_ohm: 100.0,
            drain_rail_v: 10.0,
            rd_ohm: 1000.0,
        };
        let op = net.solve(&law(-4.0, 5e-4, 0.0));
        assert_eq!(op.id_a, 0.0);
        assert_eq!(op.region, Region::Cutoff);
        assert!(!op.saturated());
    }

    #[test]
    fn triode_is_reported_with_the_true_current() {
        // Zero bias, IDSS 8 mA, huge RD: the device cannot pinch off.
        let net = BiasNetwork {
            gate: Gate::Fixed(0.0),
            source_rail_v: 0.0,
            rs_ohm: 0.0,
            drain_rail_v: 10.0,
            rd_ohm: 10e3,
        };
        let l = law(-4.0, 5e-4, 0.0);
        let op = net.solve(&l);
        assert_eq!(op.region, Region::Triode);
        // KCL at the drain: (10 − VDS)/RD = ID(VGS = 0, VDS).
        let kcl = (10.0 - op.vds_v) / 10e3 - l.id(0.0, op.vds_v);
        assert!(kcl.abs() < 1e-15, "{kcl}");
        assert!(op.vds_v > 0.0 && op.vds_v < 4.0);
    }

    // Found by the verify property test: a divider stage driven hard into
    // triode with λ > 0 used to return a root at VDS ≈ −298 V (ID 0.331 A);
    // the nodal solver's answer is ID = 39.88 mA at VDS = 4.95 V.
    #[test]
    fn lambda_triode_root_keeps_vds_non_negative() {
        let l = law(
            -3.935520168645144,
            9.18817770710383e-5,
            0.010338515931683015,
        );
        let vdd = 46.47763798526103;
        let (r1, r2) = (10520.413873617323, 471025.7309806593);
        let net = BiasNetwork {
            gate: Gate::Fixed(vdd * r2 / (r1 + r2)),
            source_rail_v: 0.0,
            rs_ohm: 131.68353963260512,
            drain_rail_v: vdd,
            rd_ohm: 909.6213111044086,
        };
        let op = net.solve(&l);
        assert!(op.vds_v >= 0.0, "VDS {}", op.vds_v);
        assert_eq!(op.region, Region::Triode);
        let kcl = op.id_a - l.id(op.vgs_v, op.vds_v);
        assert!(kcl.abs() < 1e-15, "{kcl}");
        assert!((op.id_a - 0.039876643878).abs() < 1e-11, "{}", op.id_a);
    }

    #[test]
    fn lambda_solution_satisfies_kcl() {
        // REFERENCE §2.4 (ngspice-39): self bias RS 1k, β 5e-4, VTO -4, λ 0.02,
        // with RD chosen so VDS ≈ 3.354 V gives ID = 2.0431 mA.
        let l = law(-4.0, 5e-4, 0.02);
        let net = BiasNetwork {
            gate: Gate::Fixed(0.0),
            source_rail_v: 0.0,
            rs_ohm: 1000.0,
            drain_rail_v: 12.0,
            rd_ohm: 3232.0,
        };
        let op = net.solve(&l);
        let kcl = op.id_a - l.id(op.vgs_v, op.vds_v);
        assert!(kcl.abs() < 1e-17, "{kcl}");
        assert!((op.vgs_v + op.id_a * 1000.0).abs() < 1e-12);
    }
}

/// The operating point and mid-band results of one topology with one set of
/// values and one device law.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Evaluation {
    /// DC operating point.
    pub op: OpPoint,
    /// Transconductance at the operating point, siemens.
    pub gm_s: f64,
    /// Output conductance at the operating point, siemens.
    pub gds_s: f64,
    /// Mid-band results.
    pub ss: SmallSignal,
}

/// Solve the DC point and the mid-band results.
pub fn evaluate(
    t: &dyn Topology,
    values: &[f64],
    rails: &Rails,
    law: &SquareLaw,
    rl_ohm: f64,
    rsig_ohm: f64,
) -> Evaluation {
    let op = t.bias(values, rails).solve(law);
    let gm_s = law.gm(op.vgs_v, op.vds_v);
    let gds_s = law.gds(op.vgs_v, op.vds_v);
    let ctx = SignalContext {
        gm_s,
        gds_s,
        rl_ohm,
        rsig_ohm,
    };
    Evaluation {
        op,
        gm_s,
        gds_s,
        ss: t.small_signal(values, &ctx),
    }
}

#[cfg(test)]
pub(crate) mod tests_support {
    use super::*;

    pub(crate) fn jfet(idss: f64, vp: f64) -> SquareLaw {
        SquareLaw {
            vto_v: vp,
            k_a_per_v2: idss / (vp * vp),
            lambda_per_v: 0.0,
        }
    }
    pub(crate) use jfet as depletion;

    pub(crate) fn enhancement(vt: f64, k: f64) -> SquareLaw {
        SquareLaw {
            vto_v: vt,
            k_a_per_v2: k,
            lambda_per_v: 0.0,
        }
    }

    pub(crate) struct Want {
        pub id: f64,
        pub vgs: f64,
        pub vds: f64,
        pub av: f64,
        pub zin: f64,
        pub zout: f64,
    }

    fn close(got: f64, want: f64, what: &str) {
        let tol = 1e-9 * want.abs().max(1e-3);
        assert!((got - want).abs() <= tol, "{what}: got {got}, want {want}");
    }

    pub(crate) fn check(
        t: &dyn Topology,
        v: &[f64],
        rails: (f64, f64),
        law: SquareLaw,
        rl: f64,
        w: Want,
    ) {
        let rails = Rails {
            vdd_v: rails.0,
            vss_v: rails.1,
        };
        let e = evaluate(t, v, &rails, &law, rl, 0.0);
        close(e.op.id_a, w.id, "ID");
        close(e.op.vgs_v, w.vgs, "VGS");
        close(e.op.vds_v, w.vds, "VDS");
        assert!(e.op.saturated(), "not saturated");
        close(e.ss.av, w.av, "Av");
        close(e.ss.zin_ohm, w.zin, "Zin");
        close(e.ss.zout_ohm, w.zout, "Zout");
        assert_eq!(t.resistor_volts(v, &rails, &e.op).len(), t.parts().len());
    }
}
