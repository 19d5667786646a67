//! What can go wrong in a nodal solve. Every failure is reported; the solver
//! never returns an answer it has not checked.

use thiserror::Error;

/// A nodal-analysis failure.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum SolveError {
    /// An element value is out of range.
    #[error("`{element}`.{field} = {value}: {rule}")]
    InvalidElement {
        /// Designator of the element.
        element: String,
        /// Field name, e.g. `ohms`.
        field: &'static str,
        /// The offending value, in the field's unit.
        value: f64,
        /// The rule it breaks.
        rule: &'static str,
    },
    /// An element (or the netlist's input/output) names a node that does not
    /// exist.
    #[error("`{element}`.{field} = node {node}: the netlist has only {nodes} nodes")]
    InvalidNode {
        /// Designator of the element, or `netlist`.
        element: String,
        /// Terminal name, e.g. `a`, `d`, `output`.
        field: &'static str,
        /// The offending node index.
        node: usize,
        /// How many nodes the netlist has.
        nodes: usize,
    },
    /// A node has no path to ground in the given analysis.
    #[error("node `{node}` has no {analysis} path to ground")]
    FloatingNode {
        /// Node name.
        node: String,
        /// `DC` or `AC`.
        analysis: &'static str,
    },
    /// The linear system is singular (e.g. two voltage sources in parallel).
    #[error("the {analysis} nodal matrix is singular (voltage-source loop or floating part)")]
    Singular {
        /// Which analysis.
        analysis: &'static str,
    },
    /// The DC solve did not converge by any method tried.
    #[error(
        "DC operating point did not converge ({methods}; {iterations} Newton iterations): \
         worst KCL residual {worst_residual_a:e} A, last update {worst_update_v:e} V"
    )]
    NoConvergence {
        /// The methods tried, in order.
        methods: String,
        /// Newton iterations spent in all.
        iterations: usize,
        /// Largest residual at the last iterate, amps (or volts on a source
        /// row).
        worst_residual_a: f64,
        /// Largest node-voltage update at the last iterate, volts.
        worst_update_v: f64,
    },
    /// The named source is not in the netlist.
    #[error("no voltage source named `{name}` in the netlist")]
    MissingSource {
        /// The name looked for.
        name: String,
    },
    /// A driven source has both terminals shorted together by capacitors at
    /// mid-band.
    #[error("source `{name}` is shorted by capacitors at mid-band")]
    ShortedSource {
        /// Designator.
        name: String,
    },
    /// The DC solution handed to an AC analysis belongs to another netlist.
    #[error("the DC solution does not fit this netlist: {what}")]
    Mismatch {
        /// What differs.
        what: String,
    },
    /// A frequency argument is out of range.
    #[error("`{field}` = {value} Hz: {rule}")]
    InvalidFrequency {
        /// Argument name.
        field: &'static str,
        /// The value, hertz (or points per decade).
        value: f64,
        /// The rule it breaks.
        rule: &'static str,
    },
    /// The mid-band gain is zero, so no −3 dB point is defined.
    #[error("the mid-band gain is zero: no -3 dB corner is defined")]
    NoMidBandGain,
}
