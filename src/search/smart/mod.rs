//! The default search: branch and bound on monotone bounds, then exact
//! checks.
//!
//! 1. The bias variables (the gate divider, as a list of pairs sorted by the
//!    gate voltage they give, and each source resistor, sorted ascending)
//!    span an index box. Along every axis the drain current moves one known
//!    way (up with VG, down with RS) and so do VGS, VS and gm (proved by
//!    implicit differentiation of the bias equation; see DEVELOPERS.md), so
//!    solves at the box's extreme points bound every corner's current, gm
//!    and source voltage over the whole box, at every device corner and
//!    supply extreme, with the floors and ceilings taken at resistor
//!    tolerance extremes that lie in every candidate's envelope. The bound
//!    also scans the drain resistor over the shelf (with λ = 0 |gain| is
//!    proportional to RD∥RL; with λ > 0 gm and gds are taken at their
//!    extremes over the VDS range each RD leaves, per fold of a VDS grid,
//!    with envelopes across folds so that the bounds rise with RD), so the
//!    gain error, spread and headroom are bounded together for each
//!    standard RD. Few
//!    source-resistor points inside the gain, and slices of a wide Zin
//!    range where a source resistance makes the level depend on it, are
//!    bounded one by one inside the box.
//!    A box whose bounds break a requirement, or whose score bound is below
//!    the entry threshold, is dropped; the others wait in a queue, best
//!    bound first, and are split until single configurations.
//! 2. Gate resistors that only set Zin are chosen last by rule (with a
//!    source resistance, which makes Zin enter the gain, they are a box
//!    axis that the bias does not see); divider
//!    pairs with the same ratio are reduced to the largest placement (same
//!    bias, more Zin, less current) unless a source resistance makes Zin
//!    enter the gain.
//! 3. A single configuration takes the RD window of its bound (or, where
//!    the RD is not scanned, the run of RD values that passes the nominal
//!    checks, found by two binary searches inside the saturated range).
//! 4. Each RD there is checked at nominal resistor values, screened at two
//!    tolerance extremes, and checked exactly over all corners, tolerance
//!    and supply extremes; only that full check decides what is reported.
//!
//! The exhaustive search is the proof: the property test compares them.

use crate::analysis::{Problem, SLACK};
use crate::rank::Scorer;
use crate::search::aid::Crew;
use crate::search::exhaustive::choices;
use crate::search::{Collector, Shelf};
use crate::topology::Role;
use std::sync::Arc;

mod axis;
mod blocks;
mod bound;
mod branch;
mod pairs;
#[cfg(test)]
mod tests;
mod visit;

use axis::{gate_voltage, Axis, Ranged, ZinTable};
use blocks::{fold_points, par2, tolerance_span};
use bound::{Bounds, Case, Scratch};
use branch::{branch, Closing, Help, Node, MAX_AXES};
use pairs::divider_pairs;
pub(crate) use pairs::PairCache;
use visit::{diagnose, visit};

/// Gate resistors that only set Zin: the smallest value whose worst case
/// gives full Zin credit in the score (10 × zin_min), else the largest.
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
    let feedback = pos(Role::Feedback).is_some();
    let run_k = pos(Role::Feedback).or_else(|| pos(Role::Drain));
    let gates: Vec<usize> = (0..roles.len())
        .filter(|&i| roles[i] == Role::Gate)
        .collect();
    let gate_free = rsig == 0.0;
    let r_max = shelf.values[shelf.values.len() - 1];
    let (t_min, t_max) = tolerance_span(shelf);
    let mut v = vec![0.0; roles.len()];
    for &g in &gates {
        v[g] = if gate_free {
            gate_choice(p, shelf)
        } else {
            r_max
        };
    }
    // Box axes.
    let mut axes: Vec<Axis> = Vec::new();
    if let (Some(a), Some(b)) = (pos(Role::DivTop), pos(Role::DivBottom)) {
        let zin_from_divider = gates.is_empty() && !t.input_at_source();
        let floor = if zin_from_divider {
            p.spec.zin_min_ohm
        } else {
            0.0
        };
        // The largest placement of a ratio dominates the others only where
        // its parts are no looser: on a shelf of one tolerance (a stock
        // list of several keeps every pair).
        let one_tolerance = t_min == t_max;
        let dominance = !(zin_from_divider && rsig > 0.0) && one_tolerance;
        let list = match col.pairs {
            Some(cache) => cache.pairs(shelf, floor, dominance),
            None => Arc::new(divider_pairs(shelf, floor, dominance)),
        };
        let mut pairs: Vec<(f64, f64, f64)> = list
            .iter()
            .map(|&(r1, r2)| {
                v[a] = r1;
                v[b] = r2;
                (gate_voltage(t, &v, &p.rails), r1, r2)
            })
            .collect();
        // (VG, R1) orders the pairs totally: R1 and VG fix R2.
        pairs.sort_unstable_by(|x, y| x.0.total_cmp(&y.0).then(x.1.total_cmp(&y.1)));
        let floor_v = 0.01 * p.spec.supply.vdd_v.abs().max(1e-3);
        // (Every VG at or below 0 V has the same measure: on a divider
        // that feeds a negative gate, the whole list; a long list when the
        // divider does not set Zin.)
        let scale: Vec<f64> = pairs.iter().map(|x| x.0.max(0.0) + floor_v).collect();
        let options: Vec<f64> = pairs.iter().flat_map(|&(_, r1, r2)| [r1, r2]).collect();
        let zin = zin_from_divider.then(|| {
            let table = |a: f64, b: f64| {
                Ranged::new(
                    pairs
                        .iter()
                        .map(|&(_, r1, r2)| par2(r1 * a, r2 * b))
                        .collect(),
                )
            };
            ZinTable {
                nominal: table(1.0, 1.0),
                up: table(1.0 - t_max, 1.0 + t_min),
                down: table(1.0 + t_max, 1.0 - t_min),
            }
        });
        axes.push(Axis {
            positions: vec![a, b],
            options,
            zin,
            gate_axis: true,
            scale,
        });
    }
    for (i, r) in roles.iter().enumerate() {
        if *r == Role::Source {
            let opts = choices(t, i, p, shelf);
            let r0 = shelf.values[0];
            axes.push(Axis {
                positions: vec![i],
                scale: opts.iter().map(|x| x + r0).collect(),
                options: opts,
                gate_axis: false,
                zin: None,
            });
        }
    }
    // Gate resistors when a source resistance makes Zin enter the gain (only
    // through Zin/(Zin + Rsig): the bias does not see them). Their scale
    // stops at ten times zin_min, where the Zin term of the score is full,
    // so above it they are split last (only the share, a fraction of a per
    // cent with a 600 Ω source and 100 kΩ, still moves).
    if !gate_free {
        for &g in &gates {
            let opts: Vec<f64> = shelf
                .values
                .iter()
                .copied()
                .filter(|&x| {
                    x * (1.0 - shelf.tolerance_of(x)) >= p.spec.zin_min_ohm * (1.0 - SLACK)
                })
                .collect();
            let zin = (!t.input_at_source()).then(|| ZinTable {
                nominal: Ranged::new(opts.clone()),
                up: Ranged::new(opts.iter().map(|x| x * (1.0 - t_max)).collect()),
                down: Ranged::new(opts.iter().map(|x| x * (1.0 + t_max)).collect()),
            });
            let full = 10.0 * p.spec.zin_min_ohm;
            axes.push(Axis {
                positions: vec![g],
                scale: opts.iter().map(|x| x.min(full)).collect(),
                options: opts,
                gate_axis: false,
                zin,
            });
        }
    }
    // Outer (not boxed) choices: RD in drain feedback.
    let mut outer: Vec<(usize, Vec<f64>)> = Vec::new();
    for (i, r) in roles.iter().enumerate() {
        if *r == Role::Drain && feedback {
            outer.push((i, shelf.values.clone()));
        }
    }
    if axes.iter().any(|a| a.options.is_empty()) || outer.iter().any(|o| o.1.is_empty()) {
        return;
    }
    let zero_able = (0..roles.len())
        .filter(|&i| t.may_be_zero(i, p.spec.device.family))
        .count();
    let parts_floor =
        roles.len() - zero_able + t.capacitors(&vec![1.0; roles.len()]).len() - zero_able;
    let bounds = Bounds {
        cases: p
            .rail_extremes()
            .into_iter()
            .flat_map(|rails| {
                let net = t.bias(&v, &rails);
                let power_span = net.drain_rail_v - net.source_rail_v;
                p.corners.iter().map(move |c| Case {
                    law: c.law,
                    rails,
                    power_span,
                })
            })
            .collect(),
        rd_values: &shelf.values,
        scorer: Scorer::new(&p.spec, col.prefer),
        parts_floor,
        roles,
        tol: t_min,
        tol_max: t_max,
        p,
        t,
        rd: if feedback { None } else { run_k },
        r_min: shelf.values[0],
        r_max,
        lambda_free: p.corners.iter().all(|c| c.law.lambda_per_v == 0.0),
        src_axes: (0..axes.len())
            .filter(|&i| {
                !axes[i].gate_axis
                    && axes[i]
                        .positions
                        .iter()
                        .any(|&k| roles[k] == Role::Source && !t.bypassed().contains(&k))
            })
            .collect(),
        folds: fold_points(col.fold_points, shelf.values.len()),
    };
    let mut oidx = vec![0usize; outer.len()];
    let crew = Crew::new();
    std::thread::scope(|sc| {
        let _close = Closing(&crew);
        let mut help = Help {
            scope: sc,
            crew: &crew,
            spare: col.spare,
            thread: None,
        };
        loop {
            for ((pos, opts), &j) in outer.iter().zip(&oidx) {
                v[*pos] = opts[j];
            }
            let ranges: Vec<(usize, usize)> = axes.iter().map(|a| (0, a.len())).collect();
            if feedback {
                // Drain feedback has no box: RD is an outer choice.
                col.effort.configurations += 1;
                visit(col, &mut v, run_k, feedback, shelf);
            } else {
                col.effort.corner_checks += 1;
                let root = if axes.is_empty() {
                    Some((f64::INFINITY, None, Vec::new()))
                } else {
                    bounds
                        .bound_with(&mut Scratch::default(), &v, &axes, &ranges)
                        .map(|bd| (bd.score, bd.rd_window, bd.rd_scores))
                };
                if let Some((score, rd_window, rd_scores)) = root {
                    let mut whole = [(0, 0); MAX_AXES];
                    whole[..ranges.len()].copy_from_slice(&ranges);
                    let root = Node {
                        ranges: whole,
                        rd_window,
                        rd_scores,
                    };
                    branch(col, &bounds, &axes, (score, root), &mut v, shelf, &mut help);
                }
            }
            let mut k = outer.len();
            loop {
                if k == 0 {
                    // No design: the answer names the closest miss. The bounds
                    // skip most near misses, so a coarse grid of configurations
                    // (at the largest outer values) is always examined too.
                    if col.designs.is_empty() && !feedback {
                        for (pos, opts) in &outer {
                            v[*pos] = opts[opts.len() - 1];
                        }
                        let ranges: Vec<(usize, usize)> =
                            axes.iter().map(|a| (0, a.len())).collect();
                        diagnose(col, &axes, &ranges, &mut v, run_k, shelf);
                    }
                    return;
                }
                k -= 1;
                oidx[k] += 1;
                if oidx[k] < outer[k].1.len() {
                    break;
                }
                oidx[k] = 0;
            }
        }
    });
}
