//! What the engineer takes to the bench: every number of one chosen design
//! that the bench report prints, computed here once (capacitors sized and
//! confirmed, part duty and ratings, the operating point per device corner,
//! the margins, the cautions, the response sweep) so that
//! `report::text::bench` only formats.
//!
//! This module computes; it prints nothing and writes no file.

use crate::analysis::{assess, point, worst_case, Check, Problem, WorstCase};
use crate::bench::caps::{size, CapPlan, CapsError};
use crate::bench::ratings::{cautions, resistor_duty, ResistorDuty};
use crate::bench::summary::{design_view, DesignView, PointView};
use crate::netlist::{Element, Netlist};
use crate::search::Design;
use crate::topology::{Caps, NetlistInput};
use crate::verify::{self, SolveError};
use serde::Serialize;

/// Sweep span when no `f_low` is given, hertz.
pub const DEFAULT_SWEEP_HZ: (f64, f64) = (1.0, 1e6);

/// Top of the response sweep when `f_low` is given, hertz.
pub const SWEEP_TOP_HZ: f64 = 100e3;

/// Points per decade of the response sweep.
pub const SWEEP_PPD: usize = 40;

/// Why the bench view could not be built.
#[derive(Debug, thiserror::Error)]
pub enum BenchError {
    /// Sizing the capacitors failed.
    #[error("sizing capacitors: {0}")]
    Caps(#[from] CapsError),
    /// The response sweep failed.
    #[error("response sweep at the nominal device: {0}")]
    Sweep(#[from] SolveError),
}

/// What a netlist element is, with its value in SI units.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum PartKind {
    /// A resistor, ohms.
    Resistor {
        /// Resistance, ohms.
        ohms: f64,
    },
    /// A capacitor, farads; `sized` is false for a mid-band placeholder.
    Capacitor {
        /// Capacitance, farads.
        farads: f64,
        /// True when sized for `f_low`.
        sized: bool,
    },
    /// A voltage source, volts.
    Source {
        /// DC value, volts.
        dc_v: f64,
        /// AC magnitude, volts.
        ac_v: f64,
    },
    /// The FET.
    Fet,
}

/// One part and the nodes it connects (the schematic as a connection
/// list).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Connection {
    /// Designator.
    pub part: String,
    /// Kind and value.
    pub kind: PartKind,
    /// `(terminal, node name)` pairs: `a`/`b` for two-terminal parts
    /// (`+`/`-` for sources), `D`/`G`/`S` for the FET.
    pub pins: Vec<(String, String)>,
}

/// The FET's duty against its ratings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct FetDuty {
    /// Largest dissipation ID·VDS over corners and extremes, watts.
    pub pd_worst_w: f64,
    /// Rated dissipation, watts, when given.
    pub pd_max_w: Option<f64>,
    /// Largest VDS in operation, volts.
    pub vds_worst_v: f64,
    /// Rated VDS, volts, when given.
    pub vds_max_v: Option<f64>,
}

/// Everything the bench report prints about one design.
#[derive(Debug, Clone, Serialize)]
pub struct BenchView {
    /// Specification name.
    pub name: String,
    /// Resistor shelf name.
    pub series: String,
    /// The ranked view (values, gain span, impedances).
    pub design: DesignView,
    /// One-line topology description.
    pub summary: String,
    /// Parts and their nodes, nominal device, sized capacitors.
    pub connections: Vec<Connection>,
    /// Worst duty of each resistor.
    #[serde(skip)]
    pub duty: Vec<ResistorDuty>,
    /// The FET against its ratings.
    pub fet: FetDuty,
    /// Nominal device, nominal values.
    pub nominal: PointView,
    /// Every device corner, nominal values.
    pub corners: Vec<PointView>,
    /// Requirement margins on the worst case (in nominal mode, at the
    /// nominal device and nominal values only).
    pub checks: Vec<Check>,
    /// True when the design was checked at nominal values only
    /// (`design --nominal`).
    pub nominal_only: bool,
    /// Nominal mode only: the requirement margins over the device's whole
    /// datasheet spread and the supply extremes, with the design's
    /// resistors at their nominal values (empty in worst-case mode).
    pub spread_checks: Vec<Check>,
    /// Capacitors sized for `f_low` (None when the spec gives no `f_low`).
    pub caps: Option<CapPlan>,
    /// Cautions, most serious first.
    pub cautions: Vec<String>,
    /// |gain| from the source EMF against frequency at the nominal
    /// device: (hertz, V/V).
    #[serde(skip)]
    pub response: Vec<(f64, f64)>,
}

impl BenchView {
    /// Capacitor values for netlists, farads (placeholders when not sized).
    pub fn cap_values(&self) -> Caps {
        self.caps.as_ref().map_or(Caps::MID_BAND, CapPlan::values)
    }

    /// Sized capacitors as `(designator, farads)` (empty when not sized).
    pub fn cap_pairs(&self) -> Vec<(String, f64)> {
        self.caps.as_ref().map_or_else(Vec::new, CapPlan::pairs)
    }
}

/// The cautions that follow from the specification alone (the supply
/// against the SELV and ELV limits, the supply against the FET's VDS
/// rating), for the design table.
pub fn spec_cautions(p: &Problem) -> Vec<String> {
    cautions(p, &WorstCase::empty(), &[])
}

/// The nominal-device netlist of a design with the given capacitors.
pub fn nominal_netlist(p: &Problem, d: &Design, caps: Caps) -> Netlist {
    let input = NetlistInput {
        law: p.nominal.law,
        kind: p.kind,
        rails: p.rails,
        rl_ohm: p.spec.rl_ohm,
        rsig_ohm: p.spec.source_resistance_ohm,
        caps,
    };
    d.topology.netlist(&d.values, &input)
}

fn connections(net: &Netlist, sized: bool) -> Vec<Connection> {
    let name = |n: usize| net.nodes.get(n).cloned().unwrap_or_else(|| n.to_string());
    let pin = |t: &str, n: usize| (t.to_string(), name(n));
    net.elements
        .iter()
        .map(|e| {
            let (kind, pins) = match e {
                Element::Resistor { a, b, ohms, .. } => (
                    PartKind::Resistor { ohms: *ohms },
                    vec![pin("a", *a), pin("b", *b)],
                ),
                Element::Capacitor { a, b, farads, .. } => (
                    PartKind::Capacitor {
                        farads: *farads,
                        sized,
                    },
                    vec![pin("a", *a), pin("b", *b)],
                ),
                Element::VoltageSource {
                    pos,
                    neg,
                    dc_v,
                    ac_v,
                    ..
                } => (
                    PartKind::Source {
                        dc_v: *dc_v,
                        ac_v: *ac_v,
                    },
                    vec![pin("+", *pos), pin("-", *neg)],
                ),
                Element::Fet { d, g, s, .. } => (
                    PartKind::Fet,
                    vec![pin("D", *d), pin("G", *g), pin("S", *s)],
                ),
            };
            Connection {
                part: e.name().to_string(),
                kind,
                pins,
            }
        })
        .collect()
}

/// |gain| against frequency at the nominal device with the given
/// capacitors: from `0.1·f_low` to 100 kHz, or 1 Hz to 1 MHz without
/// `f_low`. Returns (hertz, V/V).
pub fn response(
    p: &Problem,
    d: &Design,
    caps: Caps,
    f_low_hz: Option<f64>,
) -> Result<Vec<(f64, f64)>, SolveError> {
    let (f0, f1) = match f_low_hz {
        Some(f) if f * 0.1 < SWEEP_TOP_HZ => (f * 0.1, SWEEP_TOP_HZ),
        Some(f) => (f * 0.1, f * 1e3),
        None => DEFAULT_SWEEP_HZ,
    };
    let net = nominal_netlist(p, d, caps);
    let dc = verify::dc(&net)?;
    Ok(verify::sweep(&net, &dc, f0, f1, SWEEP_PPD)?
        .into_iter()
        .map(|(f, g)| (f, g.norm()))
        .collect())
}

/// Build the bench view of design `d` ranked `rank` (1-based), from the
/// full-spread problem `p` and the resistor shelf's name; `nominal_only`
/// when the search checked nominal values only.
pub fn bench_view(
    p: &Problem,
    series: &str,
    rank: usize,
    d: &Design,
    nominal_only: bool,
) -> Result<BenchView, BenchError> {
    let t = d.topology;
    let caps = match p.spec.f_low_hz {
        Some(f) => Some(size(p, t, &d.values, &d.tolerances, f)?),
        None => None,
    };
    let cap_values = caps.as_ref().map_or(Caps::MID_BAND, CapPlan::values);
    let net = nominal_netlist(p, d, cap_values);
    let duty = resistor_duty(p, t, &d.values, &d.tolerances);
    let dev = &p.spec.device;
    let response = response(p, d, cap_values, p.spec.f_low_hz)?;
    Ok(BenchView {
        name: p.spec.name.clone(),
        series: series.to_string(),
        design: design_view(p, rank, d),
        summary: t.summary().to_string(),
        connections: connections(&net, caps.is_some()),
        fet: FetDuty {
            pd_worst_w: d.worst.pd_max_w,
            pd_max_w: dev.pd_max_w,
            vds_worst_v: d.worst.vds_max_v,
            vds_max_v: dev.vds_max_v,
        },
        nominal: PointView::new(&point(p, t, &d.values, &p.nominal, &p.rails)),
        corners: p
            .corners
            .iter()
            .map(|c| PointView::new(&point(p, t, &d.values, c, &p.rails)))
            .collect(),
        checks: assess(p, t, &d.worst),
        nominal_only,
        spread_checks: if nominal_only {
            assess(p, t, &worst_case(p, t, &d.values, &d.tolerances))
        } else {
            Vec::new()
        },
        cautions: cautions(p, &d.worst, &duty),
        duty,
        caps,
        response,
    })
}
