//! What the engineer takes to the bench: every number of one chosen design
//! that the bench files show, computed here once (capacitors sized and
//! confirmed, part duty and ratings, the bill of materials, the operating
//! point per device corner, the margins, the cautions, the bias window and
//! the response at every corner, the netlist) so that `report` only
//! formats.
//!
//! This module computes; it prints nothing and writes no file.

use crate::analysis::{assess, point, worst_case, Check, Problem, WorstCase};
use crate::bench::bias::{bias_window, BiasWindow};
use crate::bench::bom::{bom, Bom};
use crate::bench::caps::{size, CapPlan, CapsError, DEFAULT_F_LOW_HZ};
use crate::bench::deck::{deck, Deck};
use crate::bench::ratings::{cautions, resistor_duty, ResistorDuty};
use crate::bench::response::{response, Response};
use crate::bench::summary::{design_view, DesignView, PointView};
use crate::netlist::{Element, Netlist};
use crate::search::Design;
use crate::topology::{Caps, NetlistInput};
use crate::verify::SolveError;
use serde::Serialize;

/// Why the bench view could not be built.
#[derive(Debug, thiserror::Error)]
pub enum BenchError {
    /// Sizing the capacitors failed.
    #[error("sizing capacitors: {0}")]
    Caps(#[from] CapsError),
    /// The response sweep or a DC solve failed.
    #[error("nodal solver: {0}")]
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
    /// Capacitors sized for `f_low`, or for [`DEFAULT_F_LOW_HZ`] when the
    /// specification gives none.
    pub caps: CapPlan,
    /// True when the specification gives `f_low`.
    pub f_low_given: bool,
    /// Cautions, most serious first.
    pub cautions: Vec<String>,
    /// |gain| from the source EMF against frequency at the nominal device
    /// and at every corner.
    #[serde(skip)]
    pub response: Response,
    /// The bias window: curves, bias lines, operating points, the view.
    #[serde(skip)]
    pub bias: BiasWindow,
    /// The bill of materials.
    #[serde(skip)]
    pub bom: Bom,
    /// The nominal-device netlist with the sized capacitors.
    #[serde(skip)]
    pub netlist: Netlist,
    /// The SPICE deck: the nominal device, then every corner.
    #[serde(skip)]
    pub deck: Deck,
}

impl BenchView {
    /// Capacitor values for netlists, farads.
    pub fn cap_values(&self) -> Caps {
        self.caps.values()
    }

    /// Sized capacitors as `(designator, farads)`.
    pub fn cap_pairs(&self) -> Vec<(String, f64)> {
        self.caps.pairs()
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
    let (f_low_hz, f_low_given) = match p.spec.f_low_hz {
        Some(f) => (f, true),
        None => (DEFAULT_F_LOW_HZ, false),
    };
    let caps = size(p, t, &d.values, &d.tolerances, f_low_hz)?;
    let net = nominal_netlist(p, d, caps.values());
    let duty = resistor_duty(p, t, &d.values, &d.tolerances);
    let dev = &p.spec.device;
    let response = response(p, t, &d.values, caps.values(), f_low_hz, f_low_given)?;
    let window = p.spec.limits.id_max_a.map(|m| (0.0, m));
    let bias = bias_window(p, t, &d.values, &d.tolerances, window, d.worst.id_max_a);
    let mut bom = bom(p, d, series, &duty, &caps, f_low_given)?;
    if nominal_only {
        // Every line says so: a BOM travels on its own.
        for l in &mut bom.lines {
            l.notes
                .insert(0, crate::bench::summary::NOMINAL_ONLY.to_string());
        }
    }
    let deck = deck(p, d, rank, &p.spec.name, true, nominal_only)?;
    Ok(BenchView {
        name: p.spec.name.clone(),
        series: series.to_string(),
        design: design_view(p, rank, d),
        summary: t.summary().to_string(),
        connections: connections(&net, true),
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
        f_low_given,
        response,
        bias,
        bom,
        netlist: net,
        deck,
    })
}
