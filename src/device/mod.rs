//! FET device models: the square law, its regions, and the datasheet spread
//! turned into device corners.
//!
//! Every n-channel family reduces to one large-signal law with three numbers
//! (`vto` V, `k` A/V², `lambda` 1/V), the same law SPICE uses (JFET `BETA = k`;
//! level-1 MOSFET `KP = 2k` with W = L):
//!
//! - saturation, `0 < vov <= vds`: `ID = k·vov²·(1 + λ·VDS)`;
//! - triode, `0 <= vds < vov`: `ID = k·vds·(2·vov − vds)·(1 + λ·VDS)`;
//! - cut-off, `vov <= 0`: `ID = 0`;
//!
//! with `vov = VGS − vto`. For a JFET or depletion MOSFET `vto = VGS(off)` and
//! `k = IDSS / VGS(off)²`, which is Shockley's `ID = IDSS·(1 − VGS/VGS(off))²`
//! rearranged; for an enhancement MOSFET `vto = VT` and `k = K` of
//! Shichman–Hodges `ID = K·(VGS − VT)²`.
//!
//! This module must not know about circuits or topologies.

pub mod classes;
pub mod input;
pub mod temperature;

pub use input::{DeviceInput, ParamError};

use serde::Serialize;
use std::collections::BTreeMap;

/// The device family. n-channel only for now; p-channel is the mirror image.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Family {
    /// n-channel junction FET.
    NJfet,
    /// n-channel depletion-mode MOSFET.
    NDepletionMosfet,
    /// n-channel enhancement-mode MOSFET.
    NEnhancementMosfet,
}

impl Family {
    /// Every family, in a fixed order.
    pub const ALL: [Family; 3] = [
        Family::NJfet,
        Family::NDepletionMosfet,
        Family::NEnhancementMosfet,
    ];

    /// The spelling used in specification files and outputs.
    pub fn id(self) -> &'static str {
        match self {
            Family::NJfet => "n-jfet",
            Family::NDepletionMosfet => "n-depletion-mosfet",
            Family::NEnhancementMosfet => "n-enhancement-mosfet",
        }
    }

    /// Parse the spelling of [`Family::id`].
    pub fn from_id(s: &str) -> Option<Family> {
        Family::ALL.into_iter().find(|f| f.id() == s)
    }

    /// True for the JFET and the depletion MOSFET (conducting at VGS = 0).
    pub fn is_depletion_type(self) -> bool {
        !matches!(self, Family::NEnhancementMosfet)
    }

    /// True when the model is a SPICE JFET (`J` card) rather than a MOSFET.
    pub fn is_jfet(self) -> bool {
        matches!(self, Family::NJfet)
    }
}

/// Operating region of the square law.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Region {
    /// No channel: `VGS <= vto`.
    Cutoff,
    /// Ohmic region: `VDS < VGS − vto`.
    Triode,
    /// Pinched off, the amplifying region: `VDS >= VGS − vto`.
    Saturation,
}

/// One device as the square law sees it.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SquareLaw {
    /// Threshold: VGS(off) for depletion types, VT for enhancement, volts.
    pub vto_v: f64,
    /// Transconductance parameter k, A/V² (JFET: IDSS/VGS(off)²).
    pub k_a_per_v2: f64,
    /// Channel-length modulation, 1/V (0 = ideal current source).
    pub lambda_per_v: f64,
}

impl SquareLaw {
    /// Overdrive `VGS − vto`, volts.
    pub fn vov(&self, vgs_v: f64) -> f64 {
        vgs_v - self.vto_v
    }

    /// Region at the given terminal voltages (VDS >= 0 assumed for triode).
    pub fn region(&self, vgs_v: f64, vds_v: f64) -> Region {
        let vov = self.vov(vgs_v);
        if vov <= 0.0 {
            Region::Cutoff
        } else if vds_v >= vov {
            Region::Saturation
        } else {
            Region::Triode
        }
    }

    /// Drain current, amps, positive into the drain. Defined for every VDS:
    /// below zero the triode expression continues (current reverses), which
    /// keeps the function increasing in both VGS and VDS for root finding.
    pub fn id(&self, vgs_v: f64, vds_v: f64) -> f64 {
        let vov = self.vov(vgs_v);
        if vov <= 0.0 {
            return 0.0;
        }
        let clm = 1.0 + self.lambda_per_v * vds_v;
        if vds_v >= vov {
            self.k_a_per_v2 * vov * vov * clm
        } else {
            self.k_a_per_v2 * vds_v * (2.0 * vov - vds_v) * clm
        }
    }

    /// Small-signal transconductance ∂ID/∂VGS, siemens.
    pub fn gm(&self, vgs_v: f64, vds_v: f64) -> f64 {
        let vov = self.vov(vgs_v);
        if vov <= 0.0 {
            return 0.0;
        }
        let clm = 1.0 + self.lambda_per_v * vds_v;
        if vds_v >= vov {
            2.0 * self.k_a_per_v2 * vov * clm
        } else {
            2.0 * self.k_a_per_v2 * vds_v * clm
        }
    }

    /// Small-signal output conductance ∂ID/∂VDS, siemens. In saturation this
    /// is `λ·k·vov²` (= λ·ID0, ngspice's form; ro = (1 + λ·VDS)/(λ·ID)).
    pub fn gds(&self, vgs_v: f64, vds_v: f64) -> f64 {
        let vov = self.vov(vgs_v);
        if vov <= 0.0 {
            return 0.0;
        }
        let lam = self.lambda_per_v;
        if vds_v >= vov {
            lam * self.k_a_per_v2 * vov * vov
        } else {
            let clm = 1.0 + lam * vds_v;
            self.k_a_per_v2 * (2.0 * (vov - vds_v) * clm + lam * vds_v * (2.0 * vov - vds_v))
        }
    }

    /// IDSS-equivalent `k·vto²`, amps (meaningful for depletion types).
    pub fn idss(&self) -> f64 {
        self.k_a_per_v2 * self.vto_v * self.vto_v
    }
}

/// A datasheet parameter: min and max, with an optional typical value.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ParamRange {
    /// Smallest value, in the parameter's unit.
    pub min: f64,
    /// Typical value when the datasheet gives one.
    pub typ: Option<f64>,
    /// Largest value.
    pub max: f64,
}

impl ParamRange {
    /// An exact value (no spread).
    pub fn exact(v: f64) -> Self {
        ParamRange {
            min: v,
            typ: Some(v),
            max: v,
        }
    }

    /// A range given in either order, without a typical value.
    pub fn between(a: f64, b: f64) -> Self {
        ParamRange {
            min: a.min(b),
            typ: None,
            max: a.max(b),
        }
    }

    /// The nominal value: typ, else the midpoint.
    pub fn nominal(&self) -> f64 {
        self.typ.unwrap_or(0.5 * (self.min + self.max))
    }

    /// True when min and max differ.
    pub fn has_spread(&self) -> bool {
        self.min != self.max
    }

    /// True when the nominal is a midpoint rather than a datasheet typ.
    pub fn nominal_is_midpoint(&self) -> bool {
        self.typ.is_none() && self.has_spread()
    }
}

/// How an enhancement device's strength is stated.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Strength {
    /// K directly, A/V².
    K(ParamRange),
    /// One datasheet point: ID(on) amps at VGS(on) volts; K = ID(on)/(VGS(on) − VT)².
    OnPoint {
        /// ID(on), amps.
        id_on: ParamRange,
        /// VGS(on), volts.
        vgs_on: f64,
    },
}

/// The device's large-signal parameters, each with its spread.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Params {
    /// JFET or depletion MOSFET.
    Depletion {
        /// IDSS, amps (> 0).
        idss: ParamRange,
        /// VGS(off), volts (< 0 for n-channel).
        vgs_off: ParamRange,
    },
    /// Enhancement MOSFET.
    Enhancement {
        /// VT, volts (> 0 for n-channel).
        vth: ParamRange,
        /// K or an ID(on)@VGS(on) point.
        strength: Strength,
    },
}

/// A checked device: family, parameter ranges and ratings.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Device {
    /// Family.
    pub family: Family,
    /// Large-signal parameters with their spread.
    pub params: Params,
    /// Channel-length modulation range, 1/V; exact 0 when not given.
    pub lambda: ParamRange,
    /// Highest allowed VGS, volts. A JFET defaults to 0 V (its gate junction
    /// must not conduct); a MOSFET has no default (`None`: not checked).
    pub vgs_max_v: Option<f64>,
    /// Most negative allowed VGS, volts (MOSFETs: −vgs_max when only vgs_max
    /// is given). `None`: not checked.
    pub vgs_min_v: Option<f64>,
    /// Drain–source voltage rating, volts.
    pub vds_max_v: Option<f64>,
    /// Dissipation rating, watts.
    pub pd_max_w: Option<f64>,
    /// Where the values came from (a class id from the catalog, or "spec").
    pub source: String,
}

/// One combination of the device parameters at their min/max (or nominal).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Corner {
    /// Short label such as `idss=min vgs_off=max` or `nominal`.
    pub label: String,
    /// The datasheet parameters at this corner, in SI units, by name.
    pub params: BTreeMap<String, f64>,
    /// The square law at this corner.
    pub law: SquareLaw,
}

/// Which end of a range a corner takes.
#[derive(Clone, Copy)]
enum Pick {
    Min,
    Max,
    Nominal,
}

impl Pick {
    fn of(self, r: &ParamRange) -> f64 {
        match self {
            Pick::Min => r.min,
            Pick::Max => r.max,
            Pick::Nominal => r.nominal(),
        }
    }
    fn word(self) -> &'static str {
        match self {
            Pick::Min => "min",
            Pick::Max => "max",
            Pick::Nominal => "nom",
        }
    }
}

impl Device {
    /// The named parameter ranges, in the order used for corner labels.
    fn named_ranges(&self) -> Vec<(&'static str, ParamRange)> {
        let mut v = match &self.params {
            Params::Depletion { idss, vgs_off } => vec![("idss", *idss), ("vgs_off", *vgs_off)],
            Params::Enhancement { vth, strength } => match strength {
                Strength::K(k) => vec![("vth", *vth), ("k", *k)],
                Strength::OnPoint { id_on, .. } => vec![("vth", *vth), ("id_on", *id_on)],
            },
        };
        if self.lambda.has_spread() || self.lambda.nominal() != 0.0 {
            v.push(("lambda", self.lambda));
        }
        v
    }

    fn corner_from(&self, picks: &[(&'static str, ParamRange, Pick)], label: String) -> Corner {
        let get = |name: &str| {
            picks
                .iter()
                .find(|(n, _, _)| *n == name)
                .map(|(_, r, p)| p.of(r))
        };
        let lambda = get("lambda").unwrap_or(0.0);
        let mut params = BTreeMap::new();
        for (n, r, p) in picks {
            params.insert((*n).to_string(), p.of(r));
        }
        let law = match &self.params {
            Params::Depletion { .. } => {
                let idss = get("idss").unwrap_or(0.0);
                let vp = get("vgs_off").unwrap_or(-1.0);
                SquareLaw {
                    vto_v: vp,
                    k_a_per_v2: idss / (vp * vp),
                    lambda_per_v: lambda,
                }
            }
            Params::Enhancement { strength, .. } => {
                let vt = get("vth").unwrap_or(0.0);
                let k = match strength {
                    Strength::K(_) => get("k").unwrap_or(0.0),
                    Strength::OnPoint { vgs_on, .. } => {
                        let id_on = get("id_on").unwrap_or(0.0);
                        let ov = vgs_on - vt;
                        id_on / (ov * ov)
                    }
                };
                params.insert("k".to_string(), k);
                SquareLaw {
                    vto_v: vt,
                    k_a_per_v2: k,
                    lambda_per_v: lambda,
                }
            }
        };
        Corner { label, params, law }
    }

    /// The nominal device: every parameter at its typ, else its midpoint.
    pub fn nominal(&self) -> Corner {
        let picks: Vec<_> = self
            .named_ranges()
            .into_iter()
            .map(|(n, r)| (n, r, Pick::Nominal))
            .collect();
        self.corner_from(&picks, "nominal".to_string())
    }

    /// All 2^n min/max combinations of the parameters that have a spread
    /// (those without spread stay at their value). A device with no spread
    /// has one corner, the nominal.
    pub fn corners(&self) -> Vec<Corner> {
        let ranges = self.named_ranges();
        let spread: Vec<usize> = (0..ranges.len())
            .filter(|&i| ranges[i].1.has_spread())
            .collect();
        if spread.is_empty() {
            return vec![self.nominal()];
        }
        let mut out = Vec::with_capacity(1 << spread.len());
        for mask in 0..(1u32 << spread.len()) {
            let mut picks = Vec::with_capacity(ranges.len());
            let mut words = Vec::new();
            for (i, (n, r)) in ranges.iter().enumerate() {
                let pick = match spread.iter().position(|&s| s == i) {
                    Some(bit) if mask & (1 << bit) != 0 => Pick::Max,
                    Some(_) => Pick::Min,
                    None => Pick::Nominal,
                };
                if r.has_spread() {
                    words.push(format!("{n}={}", pick.word()));
                }
                picks.push((*n, *r, pick));
            }
            out.push(self.corner_from(&picks, words.join(" ")));
        }
        out
    }

    /// True when the nominal of some parameter is a midpoint, not a typ.
    pub fn nominal_is_midpoint(&self) -> bool {
        self.named_ranges()
            .iter()
            .any(|(_, r)| r.nominal_is_midpoint())
    }

    /// Whether VGS respects the gate rating (for a JFET: the gate junction
    /// stays off, VGS <= vgs_max, default 0 V).
    pub fn gate_ok(&self, vgs_v: f64) -> bool {
        const SLACK: f64 = 1e-9;
        let hi = self
            .vgs_max_v
            .is_none_or(|m| vgs_v <= m + SLACK * m.abs().max(1.0));
        let lo = self
            .vgs_min_v
            .is_none_or(|m| vgs_v >= m - SLACK * m.abs().max(1.0));
        hi && lo
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn jfet(idss: (f64, f64), vp: (f64, f64)) -> Device {
        Device {
            family: Family::NJfet,
            params: Params::Depletion {
                idss: ParamRange::between(idss.0, idss.1),
                vgs_off: ParamRange::between(vp.0, vp.1),
            },
            lambda: ParamRange::exact(0.0),
            vgs_max_v: Some(0.0),
            vgs_min_v: None,
            vds_max_v: None,
            pd_max_w: None,
            source: "test".into(),
        }
    }

    // Shockley (1952) square law, as in Boylestad & Nashelsky ch. 6:
    // ID = IDSS (1 - VGS/VP)^2, gm0 = 2 IDSS/|VP|.
    #[test]
    fn shockley_law_and_gm0() {
        let law = SquareLaw {
            vto_v: -4.0,
            k_a_per_v2: 8e-3 / 16.0,
            lambda_per_v: 0.0,
        };
        // VGS = -2: ID = 8 mA * (1 - 0.5)^2 = 2 mA.
        assert!((law.id(-2.0, 10.0) - 2e-3).abs() < 1e-15);
        // gm0 = 2*8m/4 = 4 mS; gm(-2) = gm0 (1 - 0.5) = 2 mS.
        assert!((law.gm(0.0, 10.0) - 4e-3).abs() < 1e-15);
        assert!((law.gm(-2.0, 10.0) - 2e-3).abs() < 1e-15);
        assert_eq!(law.region(-4.5, 5.0), Region::Cutoff);
        assert_eq!(law.region(-2.0, 1.0), Region::Triode);
        assert_eq!(law.region(-2.0, 2.0), Region::Saturation);
    }

    // Shichman–Hodges (1968): gm = 2 sqrt(K ID).
    #[test]
    fn shichman_hodges_gm_identity() {
        let law = SquareLaw {
            vto_v: 2.0,
            k_a_per_v2: 0.5e-3,
            lambda_per_v: 0.0,
        };
        for vgs in [2.5, 3.0, 4.7] {
            let id = law.id(vgs, 20.0);
            let want = 2.0 * (law.k_a_per_v2 * id).sqrt();
            assert!((law.gm(vgs, 20.0) - want).abs() < 1e-15 * want.max(1.0));
        }
    }

    // ngspice JFET/MOS1 load code: gds = lambda * ID0 in saturation.
    #[test]
    fn gds_is_lambda_times_id0() {
        let law = SquareLaw {
            vto_v: -4.0,
            k_a_per_v2: 5e-4,
            lambda_per_v: 0.02,
        };
        let id0 = 5e-4 * 4.0; // vov = 2 V
        assert!((law.gds(-2.0, 3.354) - 0.02 * id0).abs() < 1e-15);
    }

    #[test]
    fn derivatives_match_finite_differences_in_every_region() {
        let law = SquareLaw {
            vto_v: 1.5,
            k_a_per_v2: 2e-3,
            lambda_per_v: 0.03,
        };
        for (vgs, vds) in [(3.0, 5.0), (3.0, 0.7), (4.0, 2.4)] {
            let h = 1e-6;
            let gm = (law.id(vgs + h, vds) - law.id(vgs - h, vds)) / (2.0 * h);
            let gds = (law.id(vgs, vds + h) - law.id(vgs, vds - h)) / (2.0 * h);
            assert!((gm - law.gm(vgs, vds)).abs() < 1e-8);
            assert!((gds - law.gds(vgs, vds)).abs() < 1e-8);
        }
    }

    #[test]
    fn two_ranged_parameters_give_four_corners() {
        let d = jfet((3e-3, 9e-3), (-3.5, -1.0));
        let c = d.corners();
        assert_eq!(c.len(), 4);
        assert_eq!(c[0].label, "idss=min vgs_off=min");
        assert_eq!(c[0].params["idss"], 3e-3);
        assert_eq!(c[0].params["vgs_off"], -3.5);
        assert_eq!(c[3].label, "idss=max vgs_off=max");
        // Nominal is the midpoint when no typ is given.
        let n = d.nominal();
        assert_eq!(n.params["idss"], 6e-3);
        assert!(d.nominal_is_midpoint());
    }

    #[test]
    fn scalar_device_has_one_corner_the_nominal() {
        let d = jfet((8e-3, 8e-3), (-4.0, -4.0));
        let c = d.corners();
        assert_eq!(c.len(), 1);
        assert_eq!(c[0].label, "nominal");
        assert!((c[0].law.k_a_per_v2 - 5e-4).abs() < 1e-18);
    }

    #[test]
    fn k_from_on_point() {
        // REFERENCE check: ID(on) 6 mA at 8 V with VT 3 V gives K = 0.24 mA/V^2.
        let d = Device {
            family: Family::NEnhancementMosfet,
            params: Params::Enhancement {
                vth: ParamRange::exact(3.0),
                strength: Strength::OnPoint {
                    id_on: ParamRange::exact(6e-3),
                    vgs_on: 8.0,
                },
            },
            lambda: ParamRange::exact(0.0),
            vgs_max_v: None,
            vgs_min_v: None,
            vds_max_v: None,
            pd_max_w: None,
            source: "test".into(),
        };
        assert!((d.nominal().law.k_a_per_v2 - 0.24e-3).abs() < 1e-15);
    }

    #[test]
    fn jfet_gate_must_not_forward_bias() {
        let d = jfet((3e-3, 9e-3), (-3.5, -1.0));
        assert!(d.gate_ok(-0.5));
        assert!(d.gate_ok(0.0));
        assert!(!d.gate_ok(0.01));
    }
}
