//! Serializable views of analysis and search results: every number the
//! outputs print, computed here once so that the exporters only format.
//!
//! NOTE: the JSON keys below are a stable contract (README "Output"); a
//! renamed field is a breaking change for scripts.

use crate::analysis::{assess, feasible, point, worst_case, Point, Problem, WorstCase};
use crate::device::Region;

/// A requirement check, as the views carry it (from `analysis`).
pub use crate::analysis::Check;
use crate::search::{Design, Effort, Outcome, Rejection};
use crate::topology::Topology;
use serde::Serialize;
use std::collections::BTreeMap;

/// One evaluated point, flattened for output. Quantities in SI units.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PointView {
    /// Corner label.
    pub label: String,
    /// Device parameters at this corner.
    pub params: BTreeMap<String, f64>,
    /// Drain current, amps.
    pub id_a: f64,
    /// Gate–source voltage, volts.
    pub vgs_v: f64,
    /// Drain–source voltage, volts.
    pub vds_v: f64,
    /// Gate voltage, volts.
    pub vg_v: f64,
    /// Source voltage, volts.
    pub vs_v: f64,
    /// Drain voltage, volts.
    pub vd_v: f64,
    /// Transconductance, siemens.
    pub gm_s: f64,
    /// Mid-band gain from the source EMF with the load, V/V, signed.
    pub gain: f64,
    /// Input impedance, ohms.
    pub zin_ohm: f64,
    /// Output impedance, ohms.
    pub zout_ohm: f64,
    /// True in saturation.
    pub saturated: bool,
    /// Operating region.
    pub region: crate::device::Region,
    /// Gate bias within the rating.
    pub gate_ok: bool,
    /// Supply power, watts.
    pub power_w: f64,
    /// Device dissipation, watts.
    pub pd_w: f64,
}

impl PointView {
    /// The region in words when the device is not saturated: `triode`,
    /// `cut off`.
    pub fn off_saturation(&self) -> Option<&'static str> {
        match self.region {
            Region::Saturation => None,
            Region::Triode => Some("triode"),
            Region::Cutoff => Some("cut off"),
        }
    }

    /// Flatten a point.
    pub fn new(pt: &Point) -> PointView {
        let op = &pt.eval.op;
        PointView {
            label: pt.label.clone(),
            params: pt.params.clone(),
            id_a: op.id_a,
            vgs_v: op.vgs_v,
            vds_v: op.vds_v,
            vg_v: op.vg_v,
            vs_v: op.vs_v,
            vd_v: op.vd_v,
            gm_s: pt.eval.gm_s,
            gain: pt.gain,
            zin_ohm: pt.eval.ss.zin_ohm,
            zout_ohm: pt.eval.ss.zout_ohm,
            saturated: op.saturated(),
            region: op.region,
            gate_ok: pt.gate_ok,
            power_w: pt.power_w,
            pd_w: pt.pd_w,
        }
    }
}

/// Designator → ohms, in a stable (sorted) order.
pub fn value_map(t: &dyn Topology, values: &[f64]) -> BTreeMap<String, f64> {
    t.parts()
        .iter()
        .map(|p| p.to_string())
        .zip(values.iter().copied())
        .collect()
}

/// The result of `analyze`.
#[derive(Debug, Clone, Serialize)]
pub struct AnalysisView {
    /// Topology id.
    pub topology: String,
    /// One-line description.
    pub summary: String,
    /// Designator → ohms.
    pub values: BTreeMap<String, f64>,
    /// Designator → relative tolerance used for the worst case.
    pub tolerances: BTreeMap<String, f64>,
    /// Nominal device, nominal values.
    pub nominal: PointView,
    /// Every device corner, nominal resistor values.
    pub corners: Vec<PointView>,
    /// Envelope over corners and tolerance extremes.
    pub worst_case: WorstCase,
    /// Requirement checks on the worst case.
    pub checks: Vec<Check>,
    /// True when every requirement holds.
    pub meets_spec: bool,
    /// True when a nominal device parameter is a midpoint (no typ given).
    pub nominal_is_midpoint: bool,
}

/// Analyse one topology with given values.
pub fn analysis(p: &Problem, t: &dyn Topology, values: &[f64], tolerances: &[f64]) -> AnalysisView {
    let nominal = point(p, t, values, &p.nominal, &p.rails);
    let corners = p
        .corners
        .iter()
        .map(|c| PointView::new(&point(p, t, values, c, &p.rails)))
        .collect();
    let wc = worst_case(p, t, values, tolerances);
    let checks = assess(p, t, &wc);
    AnalysisView {
        topology: t.id().to_string(),
        summary: t.summary().to_string(),
        values: value_map(t, values),
        tolerances: value_map(t, tolerances),
        nominal: PointView::new(&nominal),
        corners,
        worst_case: wc,
        meets_spec: feasible(&checks),
        checks,
        nominal_is_midpoint: p.spec.device.nominal_is_midpoint(),
    }
}

/// A quantity's minimum, nominal and maximum.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Span {
    /// Smallest over corners and tolerance extremes.
    pub min: f64,
    /// Nominal device, nominal values.
    pub nominal: f64,
    /// Largest over corners and tolerance extremes.
    pub max: f64,
}

/// One ranked design for output.
#[derive(Debug, Clone, Serialize)]
pub struct DesignView {
    /// 1-based rank.
    pub rank: usize,
    /// Topology id.
    pub topology: String,
    /// Designator → ohms (0 = a wire, e.g. a grounded source).
    pub values: BTreeMap<String, f64>,
    /// Designator → relative tolerance.
    pub tolerances: BTreeMap<String, f64>,
    /// Signed mid-band gain, V/V.
    pub gain: Span,
    /// Worst (smallest) input impedance, ohms.
    pub zin_ohm: f64,
    /// Worst (largest) output impedance, ohms.
    pub zout_ohm: f64,
    /// Drain current, amps.
    pub id_a: Span,
    /// Drain–source voltage, volts.
    pub vds_v: Span,
    /// Worst supply power, watts.
    pub power_w: f64,
    /// Resistors plus capacitors.
    pub parts: usize,
    /// Score, 0 to 1 (higher is better).
    pub score: f64,
    /// The trade-off metrics behind the score.
    pub metrics: crate::rank::Metrics,
    /// Part order of the topology (for printing values in order).
    #[serde(skip)]
    pub part_order: Vec<String>,
}

/// A design's view (needs the full-spread problem for the nominal point).
pub fn design_view(p: &Problem, rank: usize, d: &Design) -> DesignView {
    let t = d.topology;
    let nom = point(p, t, &d.values, &p.nominal, &p.rails);
    let w = &d.worst;
    let sign = if w.gain_sign < 0.0 { -1.0 } else { 1.0 };
    let (gmin, gmax) = if sign < 0.0 {
        (-w.gain_abs_max, -w.gain_abs_min)
    } else {
        (w.gain_abs_min, w.gain_abs_max)
    };
    DesignView {
        rank,
        topology: t.id().to_string(),
        values: value_map(t, &d.values),
        tolerances: value_map(t, &d.tolerances),
        gain: Span {
            min: gmin,
            nominal: nom.gain,
            max: gmax,
        },
        zin_ohm: w.zin_min_ohm,
        zout_ohm: w.zout_max_ohm,
        id_a: Span {
            min: w.id_min_a,
            nominal: nom.eval.op.id_a,
            max: w.id_max_a,
        },
        vds_v: Span {
            min: w.vds_min_v,
            nominal: nom.eval.op.vds_v,
            max: w.vds_max_v,
        },
        power_w: w.power_max_w,
        parts: d.metrics.parts,
        score: d.score,
        metrics: d.metrics,
        part_order: t.parts().iter().map(|s| s.to_string()).collect(),
    }
}

/// What every output of a nominal-mode run says (table, JSON, the bench
/// files): its designs were checked at the nominal device and nominal
/// resistor values only.
pub const NOMINAL_ONLY: &str = "nominal only, not worst case";

/// The sentence a nominal-mode output carries after [`NOMINAL_ONLY`].
pub const NOMINAL_ONLY_WHY: &str = "checked at the nominal device and nominal resistor values only; not guaranteed across the datasheet spread or resistor tolerances";

/// The result of `design`.
#[derive(Debug, Clone, Serialize)]
pub struct DesignReport {
    /// Specification name.
    pub name: String,
    /// `worst-case` or `nominal`.
    pub mode: String,
    /// Nominal mode only: "nominal only, not worst case: …" (absent in
    /// worst-case mode).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub mode_note: Option<String>,
    /// Resistor shelf name.
    pub series: String,
    /// Ranked feasible designs.
    pub designs: Vec<DesignView>,
    /// One entry per topology that gave no design.
    pub infeasible: Vec<Rejection>,
    /// Cautions that apply to the specification.
    pub cautions: Vec<String>,
    /// Work done by the search.
    pub effort: Effort,
}

/// Build the report view of a search outcome.
pub fn design_report(
    full: &Problem,
    shelf_name: &str,
    out: &Outcome,
    cautions: Vec<String>,
) -> DesignReport {
    DesignReport {
        name: full.spec.name.clone(),
        mode: if out.nominal_only {
            "nominal"
        } else {
            "worst-case"
        }
        .to_string(),
        mode_note: out
            .nominal_only
            .then(|| format!("{NOMINAL_ONLY}: {NOMINAL_ONLY_WHY}")),
        series: shelf_name.to_string(),
        designs: out
            .designs
            .iter()
            .enumerate()
            .map(|(i, d)| design_view(full, i + 1, d))
            .collect(),
        infeasible: out.rejected.clone(),
        cautions,
        effort: out.effort,
    }
}
