//! Small-signal AC analysis about a DC operating point.
//!
//! Each FET becomes its linearisation at the operating point, a VCCS `gm`
//! (VGS-controlled, drain to source) in parallel with `gds`; resistors stay;
//! voltage sources keep only their AC value. At a finite frequency a
//! capacitor is the admittance `jωC`. At mid-band every capacitor is an ideal
//! short: the nodes it joins are merged into one unknown, so mid-band results
//! are exact rather than the limit of a large capacitance.

use super::check::Groups;
use super::{AcSolution, DcSolution, Freq, SolveError};
use crate::netlist::{Element, Netlist, Node, GROUND};
use nalgebra::{DMatrix, DVector};
use num_complex::Complex64;

/// What drives one AC solve.
pub(crate) struct Drive<'a> {
    /// AC value of the voltage source at each element index, volts.
    pub source_v: &'a dyn Fn(usize, f64) -> f64,
    /// Element indices left out (e.g. the load when measuring Zout).
    pub skip: &'a [usize],
    /// A 1 A test current into this node.
    pub inject: Option<Node>,
}

/// The FET linearisations, checked against the netlist.
pub(crate) struct Linear {
    /// (element index, drain, gate, source, gm S, gds S).
    fets: Vec<(usize, Node, Node, Node, f64, f64)>,
}

impl Linear {
    pub(crate) fn new(net: &Netlist, dc: &DcSolution) -> Result<Linear, SolveError> {
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
        let mut fets = Vec::new();
        let mut ops = dc.fets.iter();
        for (i, e) in net.elements.iter().enumerate() {
            if let Element::Fet { name, d, g, s, .. } = e {
                let op = ops.next().filter(|op| op.name == *name).ok_or_else(|| {
                    SolveError::Mismatch {
                        what: format!("no operating point for FET `{name}`"),
                    }
                })?;
                fets.push((i, *d, *g, *s, op.gm_s, op.gds_s));
            }
        }
        if ops.next().is_some() {
            return Err(SolveError::Mismatch {
                what: "more FET operating points than FETs".to_string(),
            });
        }
        Ok(Linear { fets })
    }
}

/// Solve once. Mid-band merges capacitor-joined nodes; a voltage source
/// whose terminals end up merged is dropped (its AC current is undefined)
/// unless it is driven, which is an error.
pub(crate) fn solve(
    net: &Netlist,
    lin: &Linear,
    freq: Freq,
    drive: &Drive<'_>,
) -> Result<AcSolution, SolveError> {
    let omega = match freq {
        Freq::MidBand => None,
        Freq::Hz(f) if f.is_finite() && f > 0.0 => Some(2.0 * std::f64::consts::PI * f),
        Freq::Hz(f) => {
            return Err(SolveError::InvalidFrequency {
                field: "freq",
                value: f,
                rule: "must be finite and > 0",
            })
        }
    };
    let skipped = |i: usize| drive.skip.contains(&i);
    let mut groups = Groups::new(net.nodes.len());
    if omega.is_none() {
        for (i, e) in net.elements.iter().enumerate() {
            if let Element::Capacitor { a, b, .. } = e {
                if !skipped(i) {
                    groups.join(*a, *b);
                }
            }
        }
    }
    // Unknown index of each node (None: ground's group).
    let mut index_of_rep = vec![None; net.nodes.len()];
    let mut n_v = 0;
    let mut row_of = vec![None; net.nodes.len()];
    for (n, row) in row_of.iter_mut().enumerate() {
        let rep = groups.find(n);
        if rep == groups.find(GROUND) {
            continue;
        }
        if index_of_rep[rep].is_none() {
            index_of_rep[rep] = Some(n_v);
            n_v += 1;
        }
        *row = index_of_rep[rep];
    }
    // Voltage sources kept as unknown currents: (element, pos, neg, value).
    let mut kept = Vec::new();
    for (i, e) in net.elements.iter().enumerate() {
        if let Element::VoltageSource {
            name,
            pos,
            neg,
            ac_v,
            ..
        } = e
        {
            let value = (drive.source_v)(i, *ac_v);
            if row_of[*pos] == row_of[*neg] {
                if value != 0.0 {
                    return Err(SolveError::ShortedSource { name: name.clone() });
                }
                continue;
            }
            kept.push((i, *pos, *neg, value));
        }
    }
    let n = n_v + kept.len();
    let mut a = DMatrix::<Complex64>::zeros(n, n);
    let mut b = DVector::<Complex64>::zeros(n);
    let admit = |a: &mut DMatrix<Complex64>, p: Node, q: Node, y: Complex64| {
        let (rp, rq) = (row_of[p], row_of[q]);
        if rp == rq {
            // Both ends in one merged node (or both at ground): no current.
            return;
        }
        if let Some(r) = rp {
            a[(r, r)] += y;
        }
        if let Some(r) = rq {
            a[(r, r)] += y;
        }
        if let (Some(r), Some(c)) = (rp, rq) {
            a[(r, c)] -= y;
            a[(c, r)] -= y;
        }
    };
    for (i, e) in net.elements.iter().enumerate() {
        if skipped(i) {
            continue;
        }
        match e {
            Element::Resistor {
                a: p, b: q, ohms, ..
            } => {
                admit(&mut a, *p, *q, Complex64::new(1.0 / ohms, 0.0));
            }
            Element::Capacitor {
                a: p, b: q, farads, ..
            } => {
                if let Some(w) = omega {
                    admit(&mut a, *p, *q, Complex64::new(0.0, w * farads));
                }
            }
            Element::VoltageSource { .. } | Element::Fet { .. } => {}
        }
    }
    for &(_, d, g, s, gm, gds) in &lin.fets {
        let (rd, rg, rs) = (row_of[d], row_of[g], row_of[s]);
        for (row, sign) in [(rd, 1.0), (rs, -1.0)] {
            if let Some(r) = row {
                for (col, val) in [(rg, gm), (rd, gds), (rs, -(gm + gds))] {
                    if let Some(c) = col {
                        a[(r, c)] += Complex64::new(sign * val, 0.0);
                    }
                }
            }
        }
    }
    for (k, &(_, pos, neg, value)) in kept.iter().enumerate() {
        let row = n_v + k;
        for (node, sign) in [(pos, 1.0), (neg, -1.0)] {
            if let Some(r) = row_of[node] {
                a[(r, row)] += Complex64::new(sign, 0.0);
                a[(row, r)] += Complex64::new(sign, 0.0);
            }
        }
        b[row] = Complex64::new(value, 0.0);
    }
    if let Some(node) = drive.inject {
        if let Some(r) = row_of.get(node).copied().flatten() {
            b[r] += Complex64::new(1.0, 0.0);
        }
    }
    let x = solve_refined(a, &b).ok_or(SolveError::Singular { analysis: "AC" })?;
    let node_v = row_of
        .iter()
        .map(|r| r.map_or(Complex64::new(0.0, 0.0), |r| x[r]))
        .collect();
    let mut sources = Vec::new();
    for (i, e) in net.elements.iter().enumerate() {
        if let Element::VoltageSource { name, .. } = e {
            let current = kept.iter().position(|k| k.0 == i).map(|k| -x[n_v + k]);
            sources.push((name.clone(), current));
        }
    }
    Ok(AcSolution {
        freq,
        node_v,
        sources,
    })
}

/// LU with one step of iterative refinement; `None` when singular.
fn solve_refined(a: DMatrix<Complex64>, b: &DVector<Complex64>) -> Option<DVector<Complex64>> {
    let lu = a.clone().lu();
    let mut x = lu.solve(b)?;
    let r = b - &a * &x;
    if let Some(dx) = lu.solve(&r) {
        x += dx;
    }
    x.iter()
        .all(|v| v.re.is_finite() && v.im.is_finite())
        .then_some(x)
}
