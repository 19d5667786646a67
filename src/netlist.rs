//! A neutral circuit description: nodes, resistors, capacitors, independent
//! sources and FETs. Every topology builds one from its values; the
//! independent solver (`verify`), the SPICE export and the schematic picture
//! read nothing else.
//!
//! Node 0 is ground. This module holds data only: no analysis.

use crate::device::SquareLaw;
use serde::Serialize;

/// Index of a node; 0 is ground.
pub type Node = usize;

/// Ground.
pub const GROUND: Node = 0;

/// Whether a FET is written as a SPICE JFET (`J`) or a level-1 MOSFET (`M`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum FetKind {
    /// n-channel JFET (SPICE `NJF`, `BETA = k`).
    NJfet,
    /// n-channel MOSFET, level 1 (SPICE `NMOS`, `KP = 2k`, W = L).
    NMos,
}

/// One circuit element.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "type", rename_all = "kebab-case")]
pub enum Element {
    /// A resistor, ohms (> 0; a zero-ohm link is written as a wire by the
    /// topology, never as a resistor).
    Resistor {
        /// Designator, e.g. `RD`.
        name: String,
        /// First terminal.
        a: Node,
        /// Second terminal.
        b: Node,
        /// Resistance, ohms.
        ohms: f64,
    },
    /// A capacitor, farads: open at DC.
    Capacitor {
        /// Designator, e.g. `C_IN`.
        name: String,
        /// First terminal.
        a: Node,
        /// Second terminal.
        b: Node,
        /// Capacitance, farads.
        farads: f64,
    },
    /// An independent voltage source from `neg` to `pos`.
    VoltageSource {
        /// Designator, e.g. `VDD`.
        name: String,
        /// Positive terminal.
        pos: Node,
        /// Negative terminal.
        neg: Node,
        /// DC value, volts.
        dc_v: f64,
        /// AC magnitude, volts (0 for supplies, 1 for the signal source).
        ac_v: f64,
    },
    /// A three-terminal n-channel FET following [`SquareLaw`]; the body is
    /// tied to the source. The gate draws no current.
    Fet {
        /// Designator, e.g. `Q1`.
        name: String,
        /// SPICE model kind.
        kind: FetKind,
        /// Drain node.
        d: Node,
        /// Gate node.
        g: Node,
        /// Source node.
        s: Node,
        /// Large-signal law at this corner.
        law: SquareLaw,
    },
}

impl Element {
    /// The designator.
    pub fn name(&self) -> &str {
        match self {
            Element::Resistor { name, .. }
            | Element::Capacitor { name, .. }
            | Element::VoltageSource { name, .. }
            | Element::Fet { name, .. } => name,
        }
    }
}

/// A circuit ready for analysis or export.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Netlist {
    /// Node names by index; index 0 is `0` (ground).
    pub nodes: Vec<String>,
    /// Elements in a fixed order.
    pub elements: Vec<Element>,
    /// The node the signal source drives (through `C_IN` when present).
    pub input: Node,
    /// The output node across the load.
    pub output: Node,
    /// Name of the AC signal source element.
    pub signal_source: String,
}

impl Netlist {
    /// An empty netlist with only the ground node.
    pub fn new() -> Self {
        Netlist {
            nodes: vec!["0".to_string()],
            elements: Vec::new(),
            input: GROUND,
            output: GROUND,
            signal_source: String::new(),
        }
    }

    /// Add a named node and return its index.
    pub fn node(&mut self, name: &str) -> Node {
        if let Some(i) = self.nodes.iter().position(|n| n == name) {
            return i;
        }
        self.nodes.push(name.to_string());
        self.nodes.len() - 1
    }

    /// Add a resistor.
    pub fn resistor(&mut self, name: &str, a: Node, b: Node, ohms: f64) {
        self.elements.push(Element::Resistor {
            name: name.to_string(),
            a,
            b,
            ohms,
        });
    }

    /// Add a capacitor.
    pub fn capacitor(&mut self, name: &str, a: Node, b: Node, farads: f64) {
        self.elements.push(Element::Capacitor {
            name: name.to_string(),
            a,
            b,
            farads,
        });
    }

    /// Add a voltage source.
    pub fn vsource(&mut self, name: &str, pos: Node, neg: Node, dc_v: f64, ac_v: f64) {
        self.elements.push(Element::VoltageSource {
            name: name.to_string(),
            pos,
            neg,
            dc_v,
            ac_v,
        });
    }

    /// Add a FET.
    pub fn fet(&mut self, name: &str, kind: FetKind, d: Node, g: Node, s: Node, law: SquareLaw) {
        self.elements.push(Element::Fet {
            name: name.to_string(),
            kind,
            d,
            g,
            s,
            law,
        });
    }

    /// Index of a node by name.
    pub fn find_node(&self, name: &str) -> Option<Node> {
        self.nodes.iter().position(|n| n == name)
    }
}

impl Default for Netlist {
    fn default() -> Self {
        Netlist::new()
    }
}
