//! The default search: necessary-condition pruning plus monotone structure.
//!
//! 1. Bias configurations (divider pair, source resistors, and RD where it
//!    moves the bias) are enumerated; gate resistors that only set Zin are
//!    chosen last by rule, and divider pairs with the same ratio are reduced
//!    to the largest placement (same bias, more Zin, less current) unless a
//!    source resistance makes Zin enter the gain.
//! 2. Each configuration is checked at nominal resistor values over the
//!    device corners with the best RD the headroom allows (a necessary
//!    condition, since |gain| rises and VDS falls with RD).
//! 3. The feasible RD (or RF) values form one contiguous run of the sorted
//!    shelf: two binary searches find it.
//! 4. Every value in the run is checked exactly over all corners and
//!    tolerance extremes.
//!
//! The exhaustive search is the proof: the property test compares them.

use super::exhaustive::choices;
use super::{Collector, Shelf};
use crate::analysis::{
    assess, corners_only, feasible, gain_window, point, Problem, WorstCase, SLACK,
};
use crate::topology::Role;
use std::collections::HashMap;

/// One enumerated dimension: the positions it sets and its options.
struct Dim {
    positions: Vec<usize>,
    options: Vec<Vec<f64>>,
}

/// Divider pairs (R_top, R_bottom): all shelf pairs, or with `dominance`
/// only the largest placement of each ratio. With `zin_floor` > 0 pairs
/// whose parallel resistance is below it are dropped.
fn divider_pairs(shelf: &Shelf, zin_floor: f64, dominance: bool) -> Vec<Vec<f64>> {
    let vals = &shelf.values;
    let mut out: Vec<(f64, f64)> = Vec::new();
    let mut best: HashMap<i64, (f64, f64)> = HashMap::new();
    for &r1 in vals {
        for &r2 in vals {
            if zin_floor > 0.0 && r1 * r2 / (r1 + r2) < zin_floor * (1.0 - SLACK) {
                continue;
            }
            if dominance {
                let key = ((r2 / r1).ln() * 1e9).round() as i64;
                let e = best.entry(key).or_insert((r1, r2));
                if r1 > e.0 {
                    *e = (r1, r2);
                }
            } else {
                out.push((r1, r2));
            }
        }
    }
    if dominance {
        out.extend(best.into_values());
    }
    out.sort_by(|a, b| {
        (a.1 / (a.0 + a.1))
            .total_cmp(&(b.1 / (b.0 + b.1)))
            .then(a.0.total_cmp(&b.0))
    });
    out.into_iter().map(|(a, b)| vec![a, b]).collect()
}

/// The necessary checks at nominal values, RD-independent or monotone the
/// right way, for a configuration whose last free part is RD.
fn rd_level_a(col: &mut Collector<'_>, v: &mut [f64], rd: usize, shelf: &Shelf) -> bool {
    let p: &Problem = col.p;
    let t = col.t;
    let rd0 = shelf.values[0];
    let r_max = shelf.values[shelf.values.len() - 1];
    v[rd] = rd0;
    col.effort.corner_checks += 1;
    let mut wc0 = WorstCase::empty();
    let mut cap = f64::INFINITY;
    for c in &p.corners {
        let pt = point(p, t, v, c, &p.rails);
        wc0.add(&pt, c.law.vto_v);
        let op = &pt.eval.op;
        if op.id_a <= 0.0 {
            cap = f64::NEG_INFINITY;
            continue;
        }
        let need = p.spec.vds_min_v.max(op.vgs_v - c.law.vto_v);
        cap = cap.min(rd0 + (op.vds_v - need) / op.id_a);
    }
    let checks0 = assess(p, t, &wc0);
    if cap < rd0 * (1.0 - 1e-6) {
        col.miss.note(&checks0);
        return false;
    }
    if let Some(z) = p.spec.limits.zout_max_ohm {
        if wc0.zout_max_ohm > z * (1.0 + SLACK) {
            col.miss.note(&checks0);
            return false;
        }
    }
    v[rd] = cap.min(r_max);
    col.effort.corner_checks += 1;
    let wc1 = corners_only(p, t, v);
    let checks1 = assess(p, t, &wc1);
    let (lo, hi) = gain_window(&p.spec);
    let lambda_free = p.corners.iter().all(|c| c.law.lambda_per_v == 0.0);
    let spread_ok = !lambda_free || wc1.gain_abs_max * lo <= wc1.gain_abs_min * hi * (1.0 + SLACK);
    let need_ok = checks1.iter().all(|c| match c.name {
        "gain" => wc1.gain_abs_min >= lo * (1.0 - SLACK),
        "gate_bias" | "id_max" | "power_max" | "zin_min" | "vds_max" | "pd_max" | "polarity" => {
            c.pass
        }
        _ => true,
    });
    if !(spread_ok && need_ok) {
        col.miss.note(&checks1);
        return false;
    }
    true
}

/// First index in `0..n` where `pred` turns true (pred monotone false → true).
fn first_true(n: usize, mut pred: impl FnMut(usize) -> bool) -> usize {
    let (mut lo, mut hi) = (0, n);
    while lo < hi {
        let mid = (lo + hi) / 2;
        if pred(mid) {
            hi = mid;
        } else {
            lo = mid + 1;
        }
    }
    lo
}

/// The run of shelf indices for the last free part (RD or RF) that passes
/// the nominal-value checks: lower-type checks hold from some value up,
/// upper-type checks up to some value.
fn run_range(
    col: &mut Collector<'_>,
    v: &mut [f64],
    k: usize,
    feedback: bool,
    shelf: &Shelf,
) -> std::ops::Range<usize> {
    let p = col.p;
    let t = col.t;
    let (lo, hi) = gain_window(&p.spec);
    let n = shelf.values.len();
    let mut evals = 0u64;
    let mut eval = |i: usize, v: &mut [f64]| {
        evals += 1;
        v[k] = shelf.values[i];
        let wc = corners_only(p, t, v);
        let checks = assess(p, t, &wc);
        (wc, checks)
    };
    let lower_ok = |wc: &WorstCase, checks: &[crate::analysis::Check]| {
        wc.gain_abs_min >= lo * (1.0 - SLACK)
            && checks.iter().all(|c| match c.name {
                "zin_min" => c.pass,
                "id_max" | "power_max" | "vds_max" | "pd_max" => feedback || c.pass,
                _ => true,
            })
    };
    let upper_ok = |wc: &WorstCase, checks: &[crate::analysis::Check]| {
        wc.gain_abs_max <= hi * (1.0 + SLACK)
            && checks.iter().all(|c| match c.name {
                "zout_max" => c.pass,
                "vds_min" | "saturation" => feedback || c.pass,
                _ => true,
            })
    };
    let first = first_true(n, |i| {
        let (wc, ch) = eval(i, v);
        lower_ok(&wc, &ch)
    });
    let last = first_true(n, |i| {
        let (wc, ch) = eval(i, v);
        !upper_ok(&wc, &ch)
    });
    col.effort.corner_checks += evals;
    first..last.max(first)
}

/// Gate resistors that only set Zin: the smallest value whose worst case
/// gives full Zin credit (10 × zin_min), else the largest on the shelf.
fn gate_choice(p: &Problem, shelf: &Shelf) -> f64 {
    let want = 10.0 * p.spec.zin_min_ohm * (1.0 - SLACK);
    shelf
        .values
        .iter()
        .zip(&shelf.tolerances)
        .find(|(v, t)| *v * (1.0 - *t) >= want)
        .map(|(v, _)| *v)
        .unwrap_or(shelf.values[shelf.values.len() - 1])
}

/// Search one topology.
pub(crate) fn search(col: &mut Collector<'_>, shelf: &Shelf) {
    let p = col.p;
    let t = col.t;
    let roles = t.roles();
    let rsig = p.spec.source_resistance_ohm;
    let pos = |r: Role| roles.iter().position(|x| *x == r);
    let run_k = pos(Role::Feedback).or_else(|| pos(Role::Drain));
    let feedback = pos(Role::Feedback).is_some();
    let gates: Vec<usize> = (0..roles.len())
        .filter(|&i| roles[i] == Role::Gate)
        .collect();
    let gate_free = rsig == 0.0;
    let mut dims: Vec<Dim> = Vec::new();
    if let (Some(a), Some(b)) = (pos(Role::DivTop), pos(Role::DivBottom)) {
        let zin_from_divider = gates.is_empty() && !t.input_at_source();
        let floor = if zin_from_divider {
            p.spec.zin_min_ohm
        } else {
            0.0
        };
        let dominance = !(zin_from_divider && rsig > 0.0);
        dims.push(Dim {
            positions: vec![a, b],
            options: divider_pairs(shelf, floor, dominance),
        });
    }
    for (i, r) in roles.iter().enumerate() {
        let enumerate = match r {
            Role::Source => true,
            Role::Drain => feedback,
            Role::Gate => !gate_free,
            _ => false,
        };
        if enumerate {
            let mut opts: Vec<Vec<f64>> = choices(t, i, p, shelf)
                .into_iter()
                .map(|x| vec![x])
                .collect();
            if *r == Role::Gate {
                opts.retain(|o| {
                    o[0] * (1.0 - shelf.tolerance_of(o[0])) >= p.spec.zin_min_ohm * (1.0 - SLACK)
                });
            }
            dims.push(Dim {
                positions: vec![i],
                options: opts,
            });
        }
    }
    if dims.iter().any(|d| d.options.is_empty()) {
        return;
    }
    let placeholder_gate = gate_choice(p, shelf);
    let r_max = shelf.values[shelf.values.len() - 1];
    let mut v = vec![0.0; roles.len()];
    for &g in &gates {
        v[g] = if gate_free { placeholder_gate } else { r_max };
    }
    let mut idx = vec![0usize; dims.len()];
    loop {
        for (d, &j) in dims.iter().zip(&idx) {
            for (k, &pos) in d.positions.iter().enumerate() {
                v[pos] = d.options[j][k];
            }
        }
        col.effort.configurations += 1;
        visit(col, &mut v, run_k, feedback, shelf);
        // Odometer.
        let mut k = dims.len();
        loop {
            if k == 0 {
                return;
            }
            k -= 1;
            idx[k] += 1;
            if idx[k] < dims[k].options.len() {
                break;
            }
            idx[k] = 0;
        }
    }
}

/// One bias configuration: necessary checks, the run, the exact checks.
fn visit(
    col: &mut Collector<'_>,
    v: &mut [f64],
    run_k: Option<usize>,
    feedback: bool,
    shelf: &Shelf,
) {
    let p = col.p;
    let t = col.t;
    let range = match run_k {
        None => {
            col.effort.corner_checks += 1;
            let checks = assess(p, t, &corners_only(p, t, v));
            if !feasible(&checks) {
                col.miss.note(&checks);
                return;
            }
            None
        }
        Some(k) => {
            if feedback {
                v[k] = shelf.values[shelf.values.len() - 1];
                col.effort.corner_checks += 1;
                let checks = assess(p, t, &corners_only(p, t, v));
                let (lo, _) = gain_window(&p.spec);
                let wc = corners_only(p, t, v);
                let ok = wc.gain_abs_min >= lo * (1.0 - SLACK)
                    && checks
                        .iter()
                        .all(|c| c.name == "gain" || c.name == "zout_max" || c.pass);
                if !ok {
                    col.miss.note(&checks);
                    return;
                }
            } else if !rd_level_a(col, v, k, shelf) {
                return;
            }
            Some(run_range(col, v, k, feedback, shelf))
        }
    };
    let tol = |v: &[f64]| {
        v.iter()
            .map(|&x| shelf.tolerance_of(x))
            .collect::<Vec<f64>>()
    };
    match (range, run_k) {
        (Some(r), Some(k)) => {
            for i in r {
                v[k] = shelf.values[i];
                let tols = tol(v);
                col.exact(v, &tols);
            }
        }
        _ => {
            let tols = tol(v);
            col.exact(v, &tols);
        }
    }
}
