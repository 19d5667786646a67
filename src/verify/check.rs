//! Netlist checks before any matrix is built: every node index exists, every
//! value is finite and in range, and every node has a path to ground. After
//! [`validate`] has passed, node indices may be used to index vectors.

use super::SolveError;
use crate::netlist::{Element, Netlist, Node, GROUND};

fn node_ok(net: &Netlist, element: &str, field: &'static str, n: Node) -> Result<(), SolveError> {
    if n < net.nodes.len() {
        Ok(())
    } else {
        Err(SolveError::InvalidNode {
            element: element.to_string(),
            field,
            node: n,
            nodes: net.nodes.len(),
        })
    }
}

fn value_ok(
    element: &str,
    field: &'static str,
    value: f64,
    ok: bool,
    rule: &'static str,
) -> Result<(), SolveError> {
    if ok && value.is_finite() {
        Ok(())
    } else {
        Err(SolveError::InvalidElement {
            element: element.to_string(),
            field,
            value,
            rule,
        })
    }
}

/// Check node indices and element values.
pub(crate) fn validate(net: &Netlist) -> Result<(), SolveError> {
    if net.nodes.is_empty() {
        return Err(SolveError::InvalidNode {
            element: "netlist".to_string(),
            field: "nodes",
            node: 0,
            nodes: 0,
        });
    }
    node_ok(net, "netlist", "input", net.input)?;
    node_ok(net, "netlist", "output", net.output)?;
    for e in &net.elements {
        let name = e.name();
        match e {
            Element::Resistor { a, b, ohms, .. } => {
                node_ok(net, name, "a", *a)?;
                node_ok(net, name, "b", *b)?;
                value_ok(name, "ohms", *ohms, *ohms > 0.0, "must be finite and > 0")?;
            }
            Element::Capacitor { a, b, farads, .. } => {
                node_ok(net, name, "a", *a)?;
                node_ok(net, name, "b", *b)?;
                value_ok(
                    name,
                    "farads",
                    *farads,
                    *farads > 0.0,
                    "must be finite and > 0",
                )?;
            }
            Element::VoltageSource {
                pos,
                neg,
                dc_v,
                ac_v,
                ..
            } => {
                node_ok(net, name, "pos", *pos)?;
                node_ok(net, name, "neg", *neg)?;
                value_ok(name, "dc_v", *dc_v, true, "must be finite")?;
                value_ok(name, "ac_v", *ac_v, true, "must be finite")?;
            }
            Element::Fet { d, g, s, law, .. } => {
                node_ok(net, name, "d", *d)?;
                node_ok(net, name, "g", *g)?;
                node_ok(net, name, "s", *s)?;
                value_ok(name, "law.vto_v", law.vto_v, true, "must be finite")?;
                let k = law.k_a_per_v2;
                value_ok(
                    name,
                    "law.k_a_per_v2",
                    k,
                    k >= 0.0,
                    "must be finite and >= 0",
                )?;
                let lam = law.lambda_per_v;
                value_ok(
                    name,
                    "law.lambda_per_v",
                    lam,
                    lam >= 0.0,
                    "must be finite and >= 0",
                )?;
            }
        }
    }
    Ok(())
}

/// Union–find over node indices.
pub(crate) struct Groups {
    parent: Vec<usize>,
}

impl Groups {
    pub(crate) fn new(n: usize) -> Self {
        Groups {
            parent: (0..n).collect(),
        }
    }

    pub(crate) fn find(&mut self, mut x: usize) -> usize {
        while self.parent[x] != x {
            let up = self.parent[self.parent[x]];
            self.parent[x] = up;
            x = up;
        }
        x
    }

    pub(crate) fn join(&mut self, a: usize, b: usize) {
        let (ra, rb) = (self.find(a), self.find(b));
        // Ground stays its own representative so it is easy to spot.
        if ra != rb {
            if rb == GROUND {
                self.parent[ra] = rb;
            } else {
                self.parent[rb] = ra;
            }
        }
    }
}

/// Fail with the first node that no conducting element ties to ground. At
/// DC the conductors are resistors, sources and FET channels; `with_caps`
/// adds capacitors (AC at a finite frequency, or mid-band).
pub(crate) fn connected(net: &Netlist, with_caps: bool) -> Result<(), SolveError> {
    let mut g = Groups::new(net.nodes.len());
    for e in &net.elements {
        match e {
            Element::Resistor { a, b, .. } => g.join(*a, *b),
            Element::Capacitor { a, b, .. } if with_caps => g.join(*a, *b),
            Element::Capacitor { .. } => {}
            Element::VoltageSource { pos, neg, .. } => g.join(*pos, *neg),
            Element::Fet { d, s, .. } => g.join(*d, *s),
        }
    }
    for (i, name) in net.nodes.iter().enumerate() {
        if g.find(i) != g.find(GROUND) {
            return Err(SolveError::FloatingNode {
                node: name.clone(),
                analysis: if with_caps { "AC" } else { "DC" },
            });
        }
    }
    Ok(())
}
