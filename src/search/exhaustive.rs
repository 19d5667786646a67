//! The reference search: every combination of shelf values for every part.
//!
//! Each combination is first checked at nominal resistor values over the
//! device corners (a necessary condition: a feasible design must pass at
//! the nominal point too), and only then over every tolerance extreme, so
//! the result is exactly that of evaluating everything in full.

use super::{structural, Collector, Shelf};
use crate::analysis::{all_pass, corners_only, margins, Problem};
use crate::topology::{Topology, TOPOLOGIES};

/// Candidate values of part `i` of `t`: the shelf, plus 0 Ω where allowed.
pub(crate) fn choices(t: &dyn Topology, i: usize, p: &Problem, shelf: &Shelf) -> Vec<f64> {
    let mut v = Vec::with_capacity(shelf.values.len() + 1);
    if t.may_be_zero(i, p.spec.device.family) {
        v.push(0.0);
    }
    v.extend_from_slice(&shelf.values);
    v
}

/// Combinations (before corners and tolerance extremes) over every
/// topology the device and rails allow.
pub fn combinations(p: &Problem, shelf: &Shelf) -> f64 {
    TOPOLOGIES
        .iter()
        .filter(|t| structural(p, **t).is_none())
        .map(|t| {
            (0..t.parts().len())
                .map(|i| choices(*t, i, p, shelf).len() as f64)
                .product::<f64>()
        })
        .sum()
}

/// Evaluate every combination for one topology.
pub(crate) fn search(col: &mut Collector<'_>, shelf: &Shelf) {
    let t = col.t;
    let lists: Vec<Vec<f64>> = (0..t.parts().len())
        .map(|i| choices(t, i, col.p, shelf))
        .collect();
    if lists.iter().any(|l| l.is_empty()) {
        return;
    }
    let mut idx = vec![0usize; lists.len()];
    let mut values: Vec<f64> = lists.iter().map(|l| l[0]).collect();
    loop {
        col.effort.configurations += 1;
        col.effort.corner_checks += 1;
        let wc = corners_only(col.p, t, &values);
        if all_pass(&margins(col.p, t, &wc)) {
            let tols = shelf.tolerances_for(&values);
            col.exact(&values, &tols);
        } else {
            col.miss.note(col.p, t, &values, &wc);
        }
        // Odometer step, last part fastest.
        let mut k = lists.len();
        loop {
            if k == 0 {
                return;
            }
            k -= 1;
            idx[k] += 1;
            if idx[k] < lists[k].len() {
                values[k] = lists[k][idx[k]];
                break;
            }
            idx[k] = 0;
            values[k] = lists[k][0];
        }
    }
}
