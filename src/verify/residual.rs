//! KCL check of a DC solution, element by element, without the matrix: the
//! sum of the currents leaving each node through its resistors, sources and
//! FET terminals (capacitors carry none at DC).

use super::fet::eval;
use super::{DcSolution, SolveError};
use crate::netlist::{Element, Netlist};

/// Net current leaving each node, amps, by node index (ground included),
/// from the solution's node voltages and source currents, with each FET's
/// current recomputed from its terminal voltages.
pub fn kcl_residuals(net: &Netlist, dc: &DcSolution) -> Result<Vec<f64>, SolveError> {
    super::check::validate(net)?;
    if dc.node_v.len() != net.nodes.len() {
        return Err(SolveError::Mismatch {
            what: format!(
                "{} node voltages for {} nodes",
                dc.node_v.len(),
                net.nodes.len()
            ),
        });
    }
    let v = &dc.node_v;
    let mut out = vec![0.0; net.nodes.len()];
    let mut sources = dc.sources.iter();
    for e in &net.elements {
        match e {
            Element::Resistor { a, b, ohms, .. } => {
                let i = (v[*a] - v[*b]) / ohms;
                out[*a] += i;
                out[*b] -= i;
            }
            Element::Capacitor { .. } => {}
            Element::VoltageSource { name, pos, neg, .. } => {
                let op = sources.next().filter(|s| s.name == *name).ok_or_else(|| {
                    SolveError::Mismatch {
                        what: format!("no current for source `{name}`"),
                    }
                })?;
                // The source delivers current out of `pos` into the circuit.
                out[*pos] -= op.delivered_a;
                out[*neg] += op.delivered_a;
            }
            Element::Fet { d, g, s, law, .. } => {
                let id = eval(law, v[*g] - v[*s], v[*d] - v[*s]).id_a;
                out[*d] += id;
                out[*s] -= id;
            }
        }
    }
    Ok(out)
}
