//! Forward analysis: one topology with given resistor values, evaluated at
//! every device corner and at every resistor-tolerance (and supply-tolerance)
//! extreme, then checked against the specification.
//!
//! This is the exact evaluation every other part of the tool relies on: the
//! search prunes with cheaper bounds, but no design is reported unless this
//! module finds it feasible.

use crate::device::{Corner, Device};
use crate::netlist::FetKind;
use crate::spec::{Polarity, ValidSpec};
use crate::topology::{evaluate, Evaluation, Rails, Topology};
use serde::Serialize;
use std::collections::BTreeMap;

/// Relative slack for inclusive bounds (DESIGN §2: about 1e-9, never more).
pub const SLACK: f64 = 1e-9;

/// Everything the evaluation needs from a specification, prepared once.
#[derive(Debug, Clone)]
pub struct Problem {
    /// The checked specification.
    pub spec: ValidSpec,
    /// Device corners (all 2^n min/max combinations).
    pub corners: Vec<Corner>,
    /// The nominal device.
    pub nominal: Corner,
    /// Nominal rails.
    pub rails: Rails,
    /// SPICE device kind of the family.
    pub kind: FetKind,
}

impl Problem {
    /// Prepare a problem from a checked specification.
    pub fn new(spec: &ValidSpec) -> Problem {
        let d: &Device = &spec.device;
        Problem {
            corners: d.corners(),
            nominal: d.nominal(),
            rails: Rails {
                vdd_v: spec.supply.vdd_v,
                vss_v: spec.supply.vss_v,
            },
            kind: if d.family.is_jfet() {
                FetKind::NJfet
            } else {
                FetKind::NMos
            },
            spec: spec.clone(),
        }
    }

    /// The netlist inputs at a device corner: the nominal rails, the load,
    /// the source resistance and mid-band (ideal short) capacitors.
    pub fn netlist_input(&self, corner: &Corner) -> crate::topology::NetlistInput {
        crate::topology::NetlistInput {
            law: corner.law,
            kind: self.kind,
            rails: self.rails,
            rl_ohm: self.spec.rl_ohm,
            rsig_ohm: self.spec.source_resistance_ohm,
            caps: crate::topology::Caps::MID_BAND,
        }
    }

    /// Supply-rail extremes: nominal only, or both ends of the supply
    /// tolerance (both rails move together in magnitude).
    pub fn rail_extremes(&self) -> Vec<Rails> {
        let t = self.spec.supply.tolerance;
        if t == 0.0 {
            return vec![self.rails];
        }
        let ends = [1.0 - t, 1.0 + t];
        let vss_ends: &[f64] = if self.rails.vss_v == 0.0 {
            &[1.0]
        } else {
            &ends
        };
        let mut out = Vec::with_capacity(4);
        for a in ends {
            for &b in vss_ends {
                out.push(Rails {
                    vdd_v: self.rails.vdd_v * a,
                    vss_v: self.rails.vss_v * b,
                });
            }
        }
        out
    }
}

/// One evaluated point: a device corner with a set of resistor values.
#[derive(Debug, Clone, Serialize)]
pub struct Point {
    /// Corner label (`nominal` or `idss=min vgs_off=max` …).
    pub label: String,
    /// Device parameters at the corner, SI units.
    pub params: BTreeMap<String, f64>,
    /// Operating point and small-signal results.
    pub eval: Evaluation,
    /// Gain from the signal source's EMF with the load, V/V, signed.
    pub gain: f64,
    /// Total DC power drawn from the supplies, watts.
    pub power_w: f64,
    /// Device dissipation ID·VDS, watts.
    pub pd_w: f64,
    /// DC voltage across each resistor, volts, in the topology's part order.
    pub resistor_v: Vec<f64>,
    /// Whether VGS respects the gate rating (JFET: junction not forward-biased).
    pub gate_ok: bool,
}

/// The numbers of one evaluation, without labels (the hot path).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Quick {
    /// Operating point and small-signal results.
    pub eval: Evaluation,
    /// Gain from the signal source's EMF with the load, V/V, signed.
    pub gain: f64,
    /// Total DC power drawn from the supplies, watts.
    pub power_w: f64,
    /// Device dissipation ID·VDS, watts.
    pub pd_w: f64,
    /// Whether VGS respects the gate rating.
    pub gate_ok: bool,
}

/// Evaluate one topology with one set of values at one device law and rails.
pub fn quick(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    law: &crate::device::SquareLaw,
    rails: &Rails,
) -> Quick {
    let eval = evaluate(
        t,
        values,
        rails,
        law,
        p.spec.rl_ohm,
        p.spec.source_resistance_ohm,
    );
    let pr: f64 = t
        .resistor_volts(values, rails, &eval.op)
        .iter()
        .zip(values)
        .filter(|(_, r)| **r > 0.0)
        .map(|(v, r)| v * v / r)
        .sum();
    let pd_w = eval.op.id_a * eval.op.vds_v;
    Quick {
        gain: eval.ss.gain_from_source(p.spec.source_resistance_ohm),
        power_w: pr + pd_w,
        pd_w,
        gate_ok: p.spec.device.gate_ok(eval.op.vgs_v),
        eval,
    }
}

/// Evaluate one topology at one device corner, with labels for output.
pub fn point(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    corner: &Corner,
    rails: &Rails,
) -> Point {
    let q = quick(p, t, values, &corner.law, rails);
    Point {
        label: corner.label.clone(),
        params: corner.params.clone(),
        resistor_v: t.resistor_volts(values, rails, &q.eval.op),
        eval: q.eval,
        gain: q.gain,
        power_w: q.power_w,
        pd_w: q.pd_w,
        gate_ok: q.gate_ok,
    }
}

/// Envelope of the results over every corner and tolerance extreme.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct WorstCase {
    /// Smallest |gain|, V/V.
    pub gain_abs_min: f64,
    /// Largest |gain|, V/V.
    pub gain_abs_max: f64,
    /// Sign of the gain (−1 inverting, +1 non-inverting; 0 if no gain).
    pub gain_sign: f64,
    /// Smallest input impedance, ohms.
    pub zin_min_ohm: f64,
    /// Largest output impedance, ohms.
    pub zout_max_ohm: f64,
    /// Smallest drain current, amps.
    pub id_min_a: f64,
    /// Largest drain current, amps.
    pub id_max_a: f64,
    /// Smallest VDS, volts.
    pub vds_min_v: f64,
    /// Largest VDS, volts.
    pub vds_max_v: f64,
    /// Smallest margin VDS − (VGS − vto) to the edge of saturation, volts.
    pub sat_margin_v: f64,
    /// Largest supply power, watts.
    pub power_max_w: f64,
    /// Largest device dissipation, watts.
    pub pd_max_w: f64,
    /// Smallest VGS, volts.
    pub vgs_min_v: f64,
    /// Largest VGS, volts.
    pub vgs_max_v: f64,
    /// True when every point is saturated.
    pub saturated: bool,
    /// True when every point has a valid gate bias.
    pub gate_ok: bool,
}

impl WorstCase {
    /// The envelope of no points (identity for [`WorstCase::add`]).
    pub fn empty() -> Self {
        WorstCase {
            gain_abs_min: f64::INFINITY,
            gain_abs_max: 0.0,
            gain_sign: 0.0,
            zin_min_ohm: f64::INFINITY,
            zout_max_ohm: 0.0,
            id_min_a: f64::INFINITY,
            id_max_a: 0.0,
            vds_min_v: f64::INFINITY,
            vds_max_v: f64::NEG_INFINITY,
            sat_margin_v: f64::INFINITY,
            power_max_w: 0.0,
            pd_max_w: 0.0,
            vgs_min_v: f64::INFINITY,
            vgs_max_v: f64::NEG_INFINITY,
            saturated: true,
            gate_ok: true,
        }
    }

    /// Widen the envelope by one point evaluated with threshold `vto_v`.
    pub fn add(&mut self, pt: &Quick, vto_v: f64) {
        let op = &pt.eval.op;
        let g = pt.gain.abs();
        self.gain_abs_min = self.gain_abs_min.min(g);
        self.gain_abs_max = self.gain_abs_max.max(g);
        if self.gain_sign == 0.0 && pt.gain != 0.0 {
            self.gain_sign = pt.gain.signum();
        }
        self.zin_min_ohm = self.zin_min_ohm.min(pt.eval.ss.zin_ohm);
        self.zout_max_ohm = self.zout_max_ohm.max(pt.eval.ss.zout_ohm);
        self.id_min_a = self.id_min_a.min(op.id_a);
        self.id_max_a = self.id_max_a.max(op.id_a);
        self.vds_min_v = self.vds_min_v.min(op.vds_v);
        self.vds_max_v = self.vds_max_v.max(op.vds_v);
        self.sat_margin_v = self.sat_margin_v.min(op.vds_v - (op.vgs_v - vto_v));
        self.power_max_w = self.power_max_w.max(pt.power_w);
        self.pd_max_w = self.pd_max_w.max(pt.pd_w);
        self.vgs_min_v = self.vgs_min_v.min(op.vgs_v);
        self.vgs_max_v = self.vgs_max_v.max(op.vgs_v);
        self.saturated &= op.saturated();
        self.gate_ok &= pt.gate_ok;
    }
}

/// Every resistor-tolerance extreme: each nonzero value at (1 − tol) or
/// (1 + tol). With all tolerances zero there is one, the nominal.
pub fn tolerance_extremes(values: &[f64], tolerances: &[f64]) -> Vec<Vec<f64>> {
    let idx: Vec<usize> = (0..values.len())
        .filter(|&i| values[i] > 0.0 && tolerances.get(i).copied().unwrap_or(0.0) > 0.0)
        .collect();
    let mut out = Vec::with_capacity(1 << idx.len());
    for mask in 0..(1usize << idx.len()) {
        let mut v = values.to_vec();
        for (bit, &i) in idx.iter().enumerate() {
            let t = tolerances[i];
            v[i] *= if mask & (1 << bit) != 0 {
                1.0 + t
            } else {
                1.0 - t
            };
        }
        out.push(v);
    }
    out
}

/// The worst case over every device corner, resistor-tolerance extreme and
/// supply extreme (extreme-value analysis).
pub fn worst_case(p: &Problem, t: &dyn Topology, values: &[f64], tolerances: &[f64]) -> WorstCase {
    worst_case_of(p, t, &tolerance_extremes(values, tolerances))
}

/// Two of the tolerance extremes that usually bound the worst case: every
/// resistor moved the way that raises the drain current and |gain| (the
/// divider tap up, source resistors down, drain and other resistors up),
/// and every resistor moved the other way. Any subset of the extremes
/// gives an envelope inside the full one, so a requirement that fails on
/// these two fails in [`worst_case`] too, and metrics from them are at
/// least as good as the full ones: a cheap screen before the full check.
pub fn lead_extremes(t: &dyn Topology, values: &[f64], tolerances: &[f64]) -> [Vec<f64>; 2] {
    use crate::topology::Role;
    let mut up = values.to_vec();
    let mut down = values.to_vec();
    for (i, r) in t.roles().iter().enumerate() {
        let tol = tolerances.get(i).copied().unwrap_or(0.0);
        let raise = !matches!(r, Role::DivTop | Role::Source);
        let (a, b) = if raise {
            (1.0 + tol, 1.0 - tol)
        } else {
            (1.0 - tol, 1.0 + tol)
        };
        up[i] *= a;
        down[i] *= b;
    }
    [up, down]
}

/// The worst case over the given resistor-value sets, every supply extreme
/// and every device corner.
pub fn worst_case_of(p: &Problem, t: &dyn Topology, sets: &[Vec<f64>]) -> WorstCase {
    let mut wc = WorstCase::empty();
    let rails = p.rail_extremes();
    for v in sets {
        for r in &rails {
            for c in &p.corners {
                wc.add(&quick(p, t, v, &c.law, r), c.law.vto_v);
            }
        }
    }
    wc
}

/// The worst case at nominal resistor values and rails, over device corners
/// only (a necessary condition for feasibility, cheaper than [`worst_case`]).
pub fn corners_only(p: &Problem, t: &dyn Topology, values: &[f64]) -> WorstCase {
    let mut wc = WorstCase::empty();
    for c in &p.corners {
        wc.add(&quick(p, t, values, &c.law, &p.rails), c.law.vto_v);
    }
    wc
}

/// One requirement, checked.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Check {
    /// Requirement id: `gain`, `polarity`, `zin_min`, `vds_min`,
    /// `saturation`, `gate_bias`, `id_max`, `power_max`, `zout_max`,
    /// `vds_max`, `pd_max`.
    pub name: &'static str,
    /// What is required, in words with numbers.
    pub required: String,
    /// What the design reaches, in words with numbers.
    pub achieved: String,
    /// Signed margin normalised to the requirement (>= 0 passes): a
    /// fraction of the target or limit, or of the supply span for voltages.
    pub margin: f64,
    /// True when the requirement holds (with the inclusive slack).
    pub pass: bool,
    /// What the margin is a fraction of, in words with the number ("the
    /// target |gain| 5", "the 24V supply span", "the limit").
    pub basis: String,
}

/// What requirement `which`'s normalised margin ([`margins`]) is a
/// fraction of, in words with the number.
fn margin_basis(s: &ValidSpec, which: usize) -> String {
    match REQUIREMENTS[which] {
        "gain" => format!(
            "the target |gain| {}",
            crate::units::format_plain(s.target.gain, 4)
        ),
        "polarity" => "holds (0) or not (-100 %)".to_string(),
        "zin_min" => "the minimum".to_string(),
        "vds_max" | "pd_max" => "the rating".to_string(),
        "vds_min" | "saturation" | "gate_bias" => format!(
            "the {} supply span",
            fmt(s.supply.vdd_v - s.supply.vss_v, "V")
        ),
        _ => "the limit".to_string(),
    }
}

fn fmt(v: f64, unit: &str) -> String {
    if unit.is_empty() {
        // A ratio (gain): plain digits, no SI prefix.
        return crate::units::format_plain(v, 4);
    }
    format!("{}{unit}", crate::units::format_sig(v, 4))
}

/// The gain window `[lo, hi]` of |gain|, V/V.
pub fn gain_window(spec: &ValidSpec) -> (f64, f64) {
    let g = spec.target.gain;
    (
        g * (1.0 - spec.target.tolerance),
        g * (1.0 + spec.target.tolerance),
    )
}

/// Requirement ids, in the order [`margins`] and [`assess`] report them.
pub const REQUIREMENTS: [&str; 11] = [
    "gain",
    "polarity",
    "zin_min",
    "vds_min",
    "saturation",
    "gate_bias",
    "id_max",
    "power_max",
    "zout_max",
    "vds_max",
    "pd_max",
];

/// Numeric margin of one requirement (no text), for the hot loops.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Margin {
    /// Index into [`REQUIREMENTS`].
    pub which: usize,
    /// Normalised margin (>= 0 passes), as in [`Check::margin`].
    pub margin: f64,
    /// True when the requirement holds (with the inclusive slack).
    pub pass: bool,
}

/// Every applicable requirement's margin, without building any text.
pub fn margins(p: &Problem, t: &dyn Topology, wc: &WorstCase) -> Vec<Margin> {
    let s = &p.spec;
    let span = s.supply.vdd_v - s.supply.vss_v;
    let (lo, hi) = gain_window(s);
    let g = s.target.gain;
    let mut out = Vec::with_capacity(11);
    let mut push = |which: usize, margin: f64, pass: bool| {
        out.push(Margin {
            which,
            margin,
            pass,
        })
    };
    push(
        0,
        ((wc.gain_abs_min - lo) / g).min((hi - wc.gain_abs_max) / g),
        wc.gain_abs_min >= lo * (1.0 - SLACK) && wc.gain_abs_max <= hi * (1.0 + SLACK),
    );
    let want_sign = match s.target.polarity {
        Polarity::Inverting => Some(false),
        Polarity::NonInverting => Some(true),
        Polarity::Any => None,
    };
    if let Some(ni) = want_sign {
        let ok = t.non_inverting() == ni;
        push(1, if ok { 0.0 } else { -1.0 }, ok);
    }
    push(
        2,
        wc.zin_min_ohm / s.zin_min_ohm - 1.0,
        wc.zin_min_ohm >= s.zin_min_ohm * (1.0 - SLACK),
    );
    push(
        3,
        (wc.vds_min_v - s.vds_min_v) / span,
        wc.vds_min_v >= s.vds_min_v - SLACK * span,
    );
    push(4, wc.sat_margin_v / span, wc.saturated && wc.id_min_a > 0.0);
    let d = &s.device;
    let gate_margin = {
        let hi = d.vgs_max_v.map_or(f64::INFINITY, |m| m - wc.vgs_max_v);
        let lo = d.vgs_min_v.map_or(f64::INFINITY, |m| wc.vgs_min_v - m);
        let m = hi.min(lo);
        if m.is_finite() {
            m / span
        } else {
            1.0
        }
    };
    push(5, gate_margin, wc.gate_ok);
    let limits = [
        (6, s.limits.id_max_a, wc.id_max_a),
        (7, s.limits.power_max_w, wc.power_max_w),
        (8, s.limits.zout_max_ohm, wc.zout_max_ohm),
        (9, d.vds_max_v, wc.vds_max_v),
        (10, d.pd_max_w, wc.pd_max_w),
    ];
    for (which, lim, got) in limits {
        if let Some(l) = lim {
            push(which, 1.0 - got / l, got <= l * (1.0 + SLACK));
        }
    }
    out
}

/// True when every margin passes.
pub fn all_pass(ms: &[Margin]) -> bool {
    ms.iter().all(|m| m.pass)
}

/// Check the worst case against every requirement of the specification,
/// with the words and numbers for people.
pub fn assess(p: &Problem, t: &dyn Topology, wc: &WorstCase) -> Vec<Check> {
    let s = &p.spec;
    let (lo, hi) = gain_window(s);
    let d = &s.device;
    margins(p, t, wc)
        .into_iter()
        .map(|m| {
            let (required, achieved) = match m.which {
                0 => (
                    format!("|gain| in {}..{}", fmt(lo, ""), fmt(hi, "")),
                    format!("{}..{}", fmt(wc.gain_abs_min, ""), fmt(wc.gain_abs_max, "")),
                ),
                1 => {
                    let want = if s.target.polarity == Polarity::Inverting {
                        "inverting"
                    } else {
                        "non-inverting"
                    };
                    let got = if t.non_inverting() {
                        "non-inverting"
                    } else {
                        "inverting"
                    };
                    (want.to_string(), got.to_string())
                }
                2 => (
                    format!("Zin >= {}", fmt(s.zin_min_ohm, "Ω")),
                    fmt(wc.zin_min_ohm, "Ω"),
                ),
                3 => (
                    format!("VDS >= {}", fmt(s.vds_min_v, "V")),
                    fmt(wc.vds_min_v, "V"),
                ),
                4 => (
                    "VDS >= VGS - VGS(off)/VT at every corner".to_string(),
                    if wc.id_min_a > 0.0 {
                        format!("worst margin {}", fmt(wc.sat_margin_v, "V"))
                    } else {
                        "cut off at some corner".to_string()
                    },
                ),
                5 => (
                    match (d.vgs_min_v, d.vgs_max_v) {
                        (Some(a), Some(b)) => format!("{} <= VGS <= {}", fmt(a, "V"), fmt(b, "V")),
                        (None, Some(b)) => format!("VGS <= {}", fmt(b, "V")),
                        (Some(a), None) => format!("VGS >= {}", fmt(a, "V")),
                        (None, None) => "no gate rating given".to_string(),
                    },
                    format!("VGS {}..{}", fmt(wc.vgs_min_v, "V"), fmt(wc.vgs_max_v, "V")),
                ),
                k => {
                    let (lim, got, unit) = match k {
                        6 => (s.limits.id_max_a, wc.id_max_a, "A"),
                        7 => (s.limits.power_max_w, wc.power_max_w, "W"),
                        8 => (s.limits.zout_max_ohm, wc.zout_max_ohm, "Ω"),
                        9 => (d.vds_max_v, wc.vds_max_v, "V"),
                        _ => (d.pd_max_w, wc.pd_max_w, "W"),
                    };
                    (
                        format!("<= {}", fmt(lim.unwrap_or(f64::NAN), unit)),
                        fmt(got, unit),
                    )
                }
            };
            Check {
                name: REQUIREMENTS[m.which],
                required,
                achieved,
                margin: m.margin,
                pass: m.pass,
                basis: margin_basis(s, m.which),
            }
        })
        .collect()
}

/// True when every check passes.
pub fn feasible(checks: &[Check]) -> bool {
    checks.iter().all(|c| c.pass)
}
