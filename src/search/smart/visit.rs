//! Single configurations: the drain-resistor run that passes the nominal
//! checks, then the screens and the exact check of each candidate; and the
//! closest-miss grid when no box survives.

use crate::analysis::{
    all_pass, corners_only, gain_window, margins, quick, worst_case_of, Problem, WorstCase, SLACK,
};
use crate::rank::Metrics;
use crate::search::smart::axis::{gate_voltage, Axis};
use crate::search::smart::blocks::{first_true, optimistic, rd_ratio, shift, smallest_reaching};
use crate::search::{Collector, Shelf};
use crate::topology::{Role, SignalContext};

/// The necessary checks at nominal values for a configuration whose last
/// free part is RD: RD-independent ones, and the |gain| reachable with the
/// largest RD the headroom allows.
fn rd_level_a(col: &mut Collector<'_>, v: &mut [f64], rd: usize, shelf: &Shelf) -> Option<Metrics> {
    let p: &Problem = col.p;
    let t = col.t;
    let rd0 = shelf.values[0];
    let r_max = shelf.values[shelf.values.len() - 1];
    v[rd] = rd0;
    col.effort.corner_checks += 1;
    let mut wc0 = WorstCase::empty();
    let mut cap = f64::INFINITY;
    for c in &p.corners {
        let q = quick(p, t, v, &c.law, &p.rails);
        wc0.add(&q, c.law.vto_v);
        let op = &q.eval.op;
        if op.id_a <= 0.0 {
            cap = f64::NEG_INFINITY;
            continue;
        }
        let need = p.spec.vds_min_v.max(op.vgs_v - c.law.vto_v);
        cap = cap.min(rd0 + (op.vds_v - need) / op.id_a);
    }
    if cap < rd0 * (1.0 - 1e-6) {
        col.miss.note(p, t, v, &wc0);
        return None;
    }
    if let Some(z) = p.spec.limits.zout_max_ohm {
        if wc0.zout_max_ohm > z * (1.0 + SLACK) {
            col.miss.note(p, t, v, &wc0);
            return None;
        }
    }
    v[rd] = cap.min(r_max);
    col.effort.corner_checks += 1;
    let wc1 = corners_only(p, t, v);
    let (lo, hi) = gain_window(&p.spec);
    let lambda_free = p.corners.iter().all(|c| c.law.lambda_per_v == 0.0);
    let spread_ok = !lambda_free || wc1.gain_abs_max * lo <= wc1.gain_abs_min * hi * (1.0 + SLACK);
    let need_ok = wc1.gain_abs_min >= lo * (1.0 - SLACK)
        && margins(p, t, &wc1)
            .iter()
            .all(|m| !matches!(m.which, 1 | 2 | 5 | 6 | 7 | 9 | 10) || m.pass);
    if !(spread_ok && need_ok) {
        col.miss.note(p, t, v, &wc1);
        return None;
    }
    // Optimistic metrics over every RD: the target gain exactly, the
    // RD-independent spread ratio (λ = 0) at the lowest allowed level, the
    // headroom of the smallest RD, the power of the largest.
    let g = p.spec.target.gain;
    let tol = shelf
        .tolerances
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min)
        .max(0.0);
    let mut ratio = if lambda_free && wc1.gain_abs_min > 0.0 {
        wc1.gain_abs_max / wc1.gain_abs_min
    } else {
        1.0
    };
    if lambda_free && tol > 0.0 {
        // Two tolerance extremes (all bias resistors toward more and toward
        // less current) bound the worst-case ratio from below; the RD
        // tolerance multiplies it.
        let mut up = v.to_vec();
        shift(&mut up, t.roles(), tol, true);
        let mut dn = v.to_vec();
        shift(&mut dn, t.roles(), tol, false);
        let big = p
            .corners
            .iter()
            .map(|c| quick(p, t, &up, &c.law, &p.rails).gain.abs())
            .fold(0.0, f64::max);
        let small = p
            .corners
            .iter()
            .map(|c| quick(p, t, &dn, &c.law, &p.rails).gain.abs())
            .fold(f64::INFINITY, f64::min);
        col.effort.corner_checks += 2;
        if small > 0.0 {
            ratio = ratio.max(big / small);
        }
        ratio *= rd_ratio(v[rd], p.spec.rl_ohm, tol);
        if ratio * lo > hi * (1.0 + SLACK) {
            col.miss.note(p, t, v, &wc1);
            return None;
        }
    }
    let parts = t.part_count(v);
    let _ = g;
    // Headroom bound: the smallest RD that reaches |gain| = lo at every
    // corner (λ = 0: the operating point does not move with RD).
    let mut headroom = wc0.vds_min_v;
    if lambda_free {
        let rd_now = v[rd];
        let ops: Vec<_> = p
            .corners
            .iter()
            .map(|c| {
                crate::topology::evaluate(
                    t,
                    v,
                    &p.rails,
                    &c.law,
                    p.spec.rl_ohm,
                    p.spec.source_resistance_ohm,
                )
            })
            .collect();
        let reach = |v: &mut [f64], x: f64| {
            v[rd] = x;
            ops.iter().all(|e| {
                let ctx = SignalContext {
                    gm_s: e.gm_s,
                    gds_s: e.gds_s,
                    rl_ohm: p.spec.rl_ohm,
                    rsig_ohm: p.spec.source_resistance_ohm,
                };
                t.small_signal(v, &ctx)
                    .gain_from_source(p.spec.source_resistance_ohm)
                    .abs()
                    >= lo * (1.0 - SLACK)
            })
        };
        let rd_need = smallest_reaching(rd0, cap.min(r_max), 16, 1e-5, |x| reach(v, x));
        headroom = ops
            .iter()
            .map(|e| e.op.vds_v - (rd_need - rd_now) * e.op.id_a)
            .fold(f64::INFINITY, f64::min);
        v[rd] = cap.min(r_max);
    }
    Some(optimistic(
        &p.spec,
        ratio,
        headroom - p.spec.vds_min_v,
        wc0.power_max_w.min(wc1.power_max_w),
        wc0.zin_min_ohm.max(wc1.zin_min_ohm) / p.spec.zin_min_ohm,
        parts,
    ))
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
    // Requirement indices (analysis::REQUIREMENTS) by the way they move
    // with RD: met from some RD up (zin via gm·ro, id, power, vds_max, pd),
    // or up to some RD (vds_min, saturation, zout).
    let lower_ok = |v: &mut [f64], i: usize, evals: &mut u64| {
        *evals += 1;
        v[k] = shelf.values[i];
        let wc = corners_only(p, t, v);
        wc.gain_abs_min >= lo * (1.0 - SLACK)
            && margins(p, t, &wc).iter().all(|m| match m.which {
                2 => m.pass,
                6 | 7 | 9 | 10 => feedback || m.pass,
                _ => true,
            })
    };
    let upper_ok = |v: &mut [f64], i: usize, evals: &mut u64| {
        *evals += 1;
        v[k] = shelf.values[i];
        let wc = corners_only(p, t, v);
        wc.gain_abs_max <= hi * (1.0 + SLACK)
            && margins(p, t, &wc).iter().all(|m| match m.which {
                8 => m.pass,
                3 | 4 => feedback || m.pass,
                _ => true,
            })
    };
    // The upper-type checks first: they include saturation, and only inside
    // the saturated run is |gain| monotone in RD (in triode it collapses).
    let last = first_true(n, |i| !upper_ok(v, i, &mut evals));
    let first = first_true(last, |i| lower_ok(v, i, &mut evals));
    col.effort.corner_checks += evals;
    first..last.max(first)
}

/// One bias configuration whose drain resistor the box bound already
/// narrowed to shelf indices `[w.0, w.1)`: each value there whose own
/// score bound (`scores`, when given) can still enter is checked at
/// nominal values, then screened and checked exactly.
pub(super) fn visit_window(
    col: &mut Collector<'_>,
    v: &mut [f64],
    k: usize,
    w: (usize, usize),
    scores: &[f64],
    shelf: &Shelf,
) {
    let p = col.p;
    let t = col.t;
    for i in w.0..w.1 {
        if scores.get(i - w.0).is_some_and(|&b| b < col.threshold()) {
            continue;
        }
        v[k] = shelf.values[i];
        col.effort.corner_checks += 1;
        // Nominal resistor values at every corner and supply extreme.
        let wc = worst_case_of(p, t, std::slice::from_ref(&v.to_vec()));
        if !all_pass(&margins(p, t, &wc)) {
            if col.designs.is_empty() {
                col.miss.note(p, t, v, &wc);
            }
            continue;
        }
        // Nominal-value metrics bound the worst-case ones.
        let parts = t.part_count(v);
        if !col.may_enter(&Metrics::new(&p.spec, &wc, parts)) {
            continue;
        }
        let tols = shelf.tolerances_for(v);
        col.exact(v, &tols);
    }
}

/// When the bounds ruled out every box, visit a coarse grid of single
/// configurations so the answer can name the requirement that bound the
/// topology and what came closest (none of them can be feasible).
pub(super) fn diagnose(
    col: &mut Collector<'_>,
    axes: &[Axis],
    ranges: &[(usize, usize)],
    v: &mut [f64],
    run_k: Option<usize>,
    shelf: &Shelf,
) {
    // A gate resistor that only sets Zin takes its largest value; the grid
    // spans the bias axes.
    let roles = col.t.roles();
    let gate = |a: &Axis| a.positions.iter().all(|&k| roles[k] == Role::Gate);
    let bias_axes = axes.iter().filter(|a| !gate(a)).count();
    let alone = bias_axes == 1;
    let per_axis = match bias_axes {
        0 => 1,
        1 => 64,
        2 => 16,
        _ => 6,
    };
    // The gate voltage of divider option `j` (the options are in VG order).
    let vg_of = |v: &mut [f64], a: &Axis, j: usize| {
        for (k, &pos) in a.positions.iter().enumerate() {
            v[pos] = a.option(j)[k];
        }
        gate_voltage(col.t, v, &col.p.rails)
    };
    let picks: Vec<Vec<usize>> = axes
        .iter()
        .zip(ranges)
        .map(|(a, &(s, e))| {
            if gate(a) {
                return vec![e - 1];
            }
            let n = e - s;
            let k = per_axis.min(n).max(1);
            // (On a grid of several axes a divider takes half its picks
            // each way; alone it takes all of them both ways.)
            let vg_picks = a.gate_axis && n > k && k > 1;
            let k_index = if vg_picks && !alone { k.div_ceil(2) } else { k };
            let mut at: Vec<usize> = (0..k_index).map(|i| s + i * n / k_index).collect();
            // Evenly spaced options are dense where the options are (a
            // divider's list crowds the gate voltages of its middle
            // ratios), so a divider is also taken at evenly spaced gate
            // voltages: the narrow window where a stage works can lie
            // where few options are.
            if vg_picks {
                let k = if alone { k } else { k / 2 };
                let (lo, hi) = (vg_of(v, a, s), vg_of(v, a, e - 1));
                for i in 0..k {
                    let want = lo + (hi - lo) * (i as f64 + 0.5) / k as f64;
                    let (mut l, mut r) = (s, e);
                    while l < r {
                        let m = l + (r - l) / 2;
                        if vg_of(v, a, m) < want {
                            l = m + 1;
                        } else {
                            r = m;
                        }
                    }
                    at.push(l.min(e - 1));
                }
                at.sort_unstable();
                at.dedup();
            }
            at
        })
        .collect();
    let mut idx = vec![0usize; axes.len()];
    // Each configuration's corner-to-corner |gain| ratio at the smallest
    // drain resistor (with λ = 0 it does not depend on RD while the device
    // is saturated), to centre the RD of the most promising few below.
    let mut ratios: Vec<(f64, Vec<f64>)> = Vec::new();
    loop {
        for ((a, p), &j) in axes.iter().zip(&picks).zip(&idx) {
            for (k, &pos) in a.positions.iter().enumerate() {
                v[pos] = a.option(p[j])[k];
            }
        }
        visit(col, v, run_k, false, shelf);
        if let Some(k) = run_k {
            v[k] = shelf.values[0];
            col.effort.corner_checks += 1;
            let wc = corners_only(col.p, col.t, v);
            if wc.gain_abs_min > 0.0 {
                ratios.push((wc.gain_abs_max / wc.gain_abs_min, v.to_vec()));
            }
        }
        let mut k = axes.len();
        loop {
            if k == 0 {
                if let Some(k) = run_k {
                    // (Ties keep the grid's order: a stable sort.)
                    ratios.sort_by(|a, b| a.0.total_cmp(&b.0));
                    for (_, values) in ratios.iter().take(CENTRED) {
                        v.copy_from_slice(values);
                        centred_miss(col, v, k, shelf);
                    }
                }
                return;
            }
            k -= 1;
            idx[k] += 1;
            if idx[k] < picks[k].len() {
                break;
            }
            idx[k] = 0;
        }
    }
}

/// Configurations of the closest-miss grid, those of the smallest |gain|
/// ratio, whose drain resistor is centred ([`centred_miss`]).
const CENTRED: usize = 16;

/// For the closest-miss answer: the drain resistor that centres the
/// configuration's |gain| range on the window (the first whose corner
/// minimum and maximum add up to at least the window's ends, by bisection:
/// the sum rises with RD while the device stays saturated) and the one
/// below it, each checked at every corner with nominal resistor values.
/// The run of RDs a visit examines is where the nominal checks pass, so
/// where none pass it may never come near the best placement of a wide
/// |gain| spread.
fn centred_miss(col: &mut Collector<'_>, v: &mut [f64], k: usize, shelf: &Shelf) {
    let p = col.p;
    let t = col.t;
    let (lo, hi) = gain_window(&p.spec);
    let mut at = |v: &mut [f64], i: usize| {
        v[k] = shelf.values[i];
        col.effort.corner_checks += 1;
        corners_only(p, t, v)
    };
    let (mut l, mut r) = (0, shelf.values.len());
    while l < r {
        let m = l + (r - l) / 2;
        let wc = at(v, m);
        if wc.gain_abs_min + wc.gain_abs_max < lo + hi {
            l = m + 1;
        } else {
            r = m;
        }
    }
    for i in [l.saturating_sub(1), l.min(shelf.values.len() - 1)] {
        let wc = at(v, i);
        col.miss.note(p, t, v, &wc);
    }
}

/// One bias configuration: necessary checks, the run, the exact checks.
pub(super) fn visit(
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
            let wc = corners_only(p, t, v);
            if !all_pass(&margins(p, t, &wc)) {
                col.miss.note(p, t, v, &wc);
                return;
            }
            // Nominal-value metrics bound the worst-case ones.
            let parts = t.part_count(v);
            if !col.may_enter(&Metrics::new(&p.spec, &wc, parts)) {
                return;
            }
            None
        }
        Some(k) => {
            if feedback {
                v[k] = shelf.values[shelf.values.len() - 1];
                col.effort.corner_checks += 1;
                let wc = corners_only(p, t, v);
                let (lo, _) = gain_window(&p.spec);
                let ok = wc.gain_abs_min >= lo * (1.0 - SLACK)
                    && margins(p, t, &wc)
                        .iter()
                        .all(|m| matches!(m.which, 0 | 8) || m.pass);
                if !ok {
                    col.miss.note(p, t, v, &wc);
                    return;
                }
            } else {
                match rd_level_a(col, v, k, shelf) {
                    Some(m) if col.may_enter(&m) => {}
                    _ => return,
                }
            }
            Some(run_range(col, v, k, feedback, shelf))
        }
    };
    match (range, run_k) {
        (Some(r), Some(k)) => {
            for i in r {
                v[k] = shelf.values[i];
                // Nominal-value metrics bound the worst-case ones.
                col.effort.corner_checks += 1;
                let wc = corners_only(p, t, v);
                let parts = t.part_count(v);
                if !col.may_enter(&Metrics::new(&p.spec, &wc, parts)) {
                    continue;
                }
                let tols = shelf.tolerances_for(v);
                col.exact(v, &tols);
            }
        }
        _ => {
            let tols = shelf.tolerances_for(v);
            col.exact(v, &tols);
        }
    }
}
