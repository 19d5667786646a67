//! Step 1 of the box bound: the box's value ranges. At the box's extreme
//! points (the gate axes low and the source axes high for the least
//! current, and so on; see DEVELOPERS.md), every case's drain current, gm,
//! VGS and VS, with the tolerance shifts every candidate's envelope holds;
//! with λ > 0 also gds, the VS range and the fold grid of the
//! drain-resistor scan; and the box's Zin range with its slices.

use super::{prune, Bounds, Case};
use crate::device::SquareLaw;
use crate::search::smart::axis::Axis;
use crate::search::smart::blocks::{fold_vds, folded, shift, tilt, FOLDS, ZIN_POINTS, ZIN_SLICES};
use crate::topology::{Gate, Rails, Role, Topology};

/// The per-case figures of one box bound (scratch space reused by every
/// bound): drain current floor, gm at both current extremes and at the
/// tolerance-shifted extremes, source voltage and overdrive floors.
#[derive(Debug, Clone, Copy, Default)]
pub(super) struct PerCase {
    pub(super) id_lo: f64,
    pub(super) g_lo: f64,
    pub(super) g_hi: f64,
    pub(super) vs_lo: f64,
    pub(super) vov_lo: f64,
    pub(super) g_lo_up: f64,
    pub(super) g_hi_dn: f64,
    /// Drain current floor at the current-raising tolerance extreme.
    pub(super) id_up: f64,
    /// Ceiling and floor of gds over the box's tolerance extremes,
    /// siemens (λ > 0 only).
    pub(super) gds_hi: f64,
    pub(super) gds_lo: f64,
    /// λ > 0 only: `g_lo_up` and `g_hi_dn` with k folded at each VDS of
    /// the fold grid (vds_min to the span in even steps), the
    /// current ceiling and floor over every tolerance extreme (those of
    /// the gds bounds), and the ceiling of VS over them.
    pub(super) g_lo_up_at: [f64; FOLDS],
    pub(super) g_hi_dn_at: [f64; FOLDS],
    /// λ > 0 only, drain resistances, ohms: with RD at most
    /// `strong_rd[j]` VDS stays at or above the j-th VDS of the fold grid
    /// (the strong side's fold is at least j); with RD at least
    /// `weak_rd[j]` VDS stays at or below it (the weak side's fold is at
    /// most j).
    pub(super) strong_rd: [f64; FOLDS],
    pub(super) weak_rd: [f64; FOLDS],
    /// λ > 0 only, shelf indices of the drain resistor: `strong_from[j]`
    /// is the first whose strong-side fold is at most j, `weak_to[j]` the
    /// first whose weak-side fold is below j (both folds fall as RD
    /// rises).
    pub(super) strong_from: [usize; FOLDS],
    pub(super) weak_to: [usize; FOLDS],
    pub(super) id_ceiling: f64,
    pub(super) id_floor: f64,
    pub(super) vs_ceiling: f64,
    pub(super) vs_floor: f64,
    /// Floors of VS and of ID at the two tolerance extremes P and P' of
    /// the headroom bound.
    pub(super) vs_at: [f64; 2],
    pub(super) id_at: [f64; 2],
}

impl PerCase {
    /// λ > 0: the shelf indices whose strong-side fold is `j`, cut at
    /// index `capped` (the fold falls as RD rises: one run per fold).
    pub(super) fn strong_run(&self, j: usize, capped: usize) -> std::ops::Range<usize> {
        let end = if j == 0 {
            usize::MAX
        } else {
            self.strong_from[j - 1]
        };
        self.strong_from[j]..end.min(capped)
    }

    /// λ > 0: the shelf indices whose weak-side fold is `j` of `n`, cut
    /// at index `capped`.
    pub(super) fn weak_run(&self, j: usize, n: usize, capped: usize) -> std::ops::Range<usize> {
        let start = if j + 1 == n { 0 } else { self.weak_to[j + 1] };
        start..self.weak_to[j].min(capped)
    }
}

/// Saturation current, VGS, VS and gm at a point with the drain far above
/// everything (RD = 0 and a drain-fed gate fixed at the drain rail), for a
/// folded law: the current at every saturated point.
pub(super) fn bias_at(
    t: &dyn Topology,
    v: &[f64],
    rails: &Rails,
    law: &SquareLaw,
) -> (f64, f64, f64, f64) {
    let mut net = t.bias(v, rails);
    net.rd_ohm = 0.0;
    if let Gate::FromDrain = net.gate {
        net.gate = Gate::Fixed(net.drain_rail_v);
    }
    let (id, vgs, vs) = net.saturation(law);
    let vov = vgs - law.vto_v;
    let gm = if vov > 0.0 {
        2.0 * law.k_a_per_v2 * vov
    } else {
        0.0
    };
    (id, vgs, vs, gm)
}

/// The box's Zin figures: the Zin ratio of the whole box and the slices of
/// its Zin range (share floor, share ceiling, Zin ratio), each bounded on
/// its own where a source resistance makes Zin enter the gain.
pub(super) struct ZinRanges {
    /// Worst-case Zin over zin_min, at most (∞ where nothing sets Zin).
    pub(super) zin_ratio: f64,
    /// (share floor, share ceiling, Zin ratio) of each slice; the first
    /// `count` are used.
    pub(super) slices: [(f64, f64, f64); ZIN_POINTS],
    /// Slices in use.
    pub(super) count: usize,
}

impl Bounds<'_> {
    /// λ > 0: the VDS floor of every point with drain resistor `rd`,
    /// VDD − VS ceiling − RD(1 + t)·ID ceiling, at least vds_min; volts.
    pub(super) fn vds_lo(&self, c: &PerCase, case: &Case, rd: f64) -> f64 {
        (case.rails.vdd_v - c.vs_ceiling - rd * (1.0 + self.tol_max) * c.id_ceiling)
            .max(self.p.spec.vds_min_v)
    }

    /// λ > 0: the VDS ceiling of every point with drain resistor `rd`,
    /// VDD − VS floor − RD(1 − t)·ID floor, at most the span; volts.
    pub(super) fn vds_hi(&self, c: &PerCase, case: &Case, rd: f64) -> f64 {
        (case.rails.vdd_v - c.vs_floor - rd * (1.0 - self.tol_max) * c.id_floor).min(case.span())
    }

    /// λ > 0: the fold of the strong side with drain resistor `rd`: the
    /// last VDS of the fold grid at or below the VDS floor that RD leaves,
    /// VDD − VS ceiling − RD(1 + t)·ID ceiling (it falls as RD rises).
    pub(super) fn fold_lo(&self, c: &PerCase, rd: f64) -> usize {
        // (`strong_rd` falls with j: the count of the leading j ≥ 1 with
        // RD up to it, by bisection.)
        c.strong_rd[1..self.folds].partition_point(|&x| rd <= x)
    }

    /// λ > 0: the fold of the weak side with drain resistor `rd`: the
    /// first VDS of the fold grid at or above the VDS ceiling that RD
    /// leaves, VDD − VS floor − RD(1 − t)·ID floor (it falls as RD rises).
    pub(super) fn fold_hi(&self, c: &PerCase, rd: f64) -> usize {
        // (`weak_rd` falls with j: the first j with RD at least it, by
        // bisection; the top fold where there is none.)
        c.weak_rd[..self.folds - 1].partition_point(|&x| rd < x)
    }

    /// The per-case figures of the box (written into `work`), or `None`
    /// when one of them already breaks a requirement (the gate rating, the
    /// current limit, a device off at the box's most current).
    pub(super) fn case_ranges<'w>(
        &self,
        work: &'w mut Vec<PerCase>,
        v: &mut [f64],
        axes: &[Axis],
        ranges: &[(usize, usize)],
    ) -> Option<&'w mut [PerCase]> {
        let p = self.p;
        let t = self.t;
        let s = &p.spec;
        // Extreme points: current-low = gate axes low, source axes high.
        let set = |v: &mut [f64], pick: &dyn Fn(&Axis, (usize, usize)) -> usize| {
            for (a, r) in axes.iter().zip(ranges) {
                let j = pick(a, *r);
                for (k, &pos) in a.positions.iter().enumerate() {
                    v[pos] = a.option(j)[k];
                }
            }
        };
        let low_id = |a: &Axis, r: (usize, usize)| if a.gate_axis { r.0 } else { r.1 - 1 };
        let high_id = |a: &Axis, r: (usize, usize)| if a.gate_axis { r.1 - 1 } else { r.0 };
        let low_vs = |_: &Axis, r: (usize, usize)| r.0;
        let vds_floor = s.vds_min_v;
        let cases = &self.cases;
        let n = cases.len();
        // Every figure a bound reads it writes first (the λ > 0 ones only
        // where λ > 0, which holds for the whole search), so the space is
        // cleared only when its size changes, not for every bound.
        if work.len() != n {
            work.clear();
            work.resize(n, PerCase::default());
        }
        let w = &mut work[..];
        set(v, &low_id);
        for (i, c) in cases.iter().enumerate() {
            let law = folded(&c.law, vds_floor);
            let (id, vgs_here, _, gm) = bias_at(t, v, &c.rails, &law);
            // The lowest VGS of the box: the least current with the largest
            // k (λ folded at the widest VDS), since more k draws more
            // current through the source resistors and lowers VGS.
            let vgs = if c.law.lambda_per_v == 0.0 {
                vgs_here
            } else {
                bias_at(t, v, &c.rails, &folded(&c.law, c.span())).1
            };
            if prune::gate_over_rating(s, vgs) || prune::current_over_limit(s, id) {
                return None;
            }
            w[i].id_lo = id;
            w[i].g_lo = gm;
            w[i].vov_lo = (vgs - c.law.vto_v).max(0.0);
        }
        set(v, &high_id);
        for (i, c) in cases.iter().enumerate() {
            let law = folded(&c.law, c.span());
            let (id, vgs_here, _, gm) = bias_at(t, v, &c.rails, &law);
            if prune::off(id) {
                return None;
            }
            // The highest VGS: the most current with the smallest k.
            let vgs = if c.law.lambda_per_v == 0.0 {
                vgs_here
            } else {
                bias_at(t, v, &c.rails, &folded(&c.law, vds_floor)).1
            };
            if prune::gate_under_rating(s, vgs) {
                return None;
            }
            w[i].g_hi = gm;
        }
        // Tolerance-shifted extremes for the spread bound.
        set(v, &low_id);
        shift(v, self.roles, self.tol, true);
        for (i, c) in cases.iter().enumerate() {
            let (id, _, _, gm) = bias_at(t, v, &c.rails, &folded(&c.law, vds_floor));
            w[i].id_up = id;
            w[i].g_lo_up = gm;
        }
        set(v, &high_id);
        shift(v, self.roles, self.tol, false);
        for (i, c) in cases.iter().enumerate() {
            w[i].g_hi_dn = bias_at(t, v, &c.rails, &folded(&c.law, c.span())).3;
        }
        let lambda_scan = self.lambda_scan();
        if !self.lambda_free {
            // gds = λ·ID/(1 + λ·VDS) (ngspice's λ·ID0) with VDS between
            // vds_min and the span, and ID at most the current of the box's
            // high point moved by the largest tolerance toward more current
            // (k folded at the span), at least that of the low point moved
            // the other way (k folded at vds_min).
            set(v, &high_id);
            shift(v, self.roles, self.tol_max, true);
            for (i, c) in cases.iter().enumerate() {
                let id = bias_at(t, v, &c.rails, &folded(&c.law, c.span())).0;
                let l = c.law.lambda_per_v;
                w[i].id_ceiling = id.max(0.0);
                w[i].gds_hi = l * id.max(0.0) / (1.0 + l * vds_floor);
            }
            set(v, &low_id);
            shift(v, self.roles, self.tol_max, false);
            for (i, c) in cases.iter().enumerate() {
                let id = bias_at(t, v, &c.rails, &folded(&c.law, vds_floor)).0;
                let l = c.law.lambda_per_v;
                w[i].id_floor = id.max(0.0);
                w[i].gds_lo = l * id.max(0.0) / (1.0 + l * c.span());
            }
            // VS rises with the tap, with each source resistor and with k:
            // its ceiling is at the gate axes high, the sources high, the
            // tap up and the sources up by the largest tolerance, k folded
            // at the span.
            set(v, &|_: &Axis, r: (usize, usize)| r.1 - 1);
            tilt(v, self.roles, self.tol_max, 1.0 + self.tol_max);
            for (i, c) in cases.iter().enumerate() {
                w[i].vs_ceiling = bias_at(t, v, &c.rails, &folded(&c.law, c.span())).2;
            }
            // ... and its floor at the other corner, the other way.
            set(v, &low_vs);
            tilt(v, self.roles, -self.tol_max, 1.0 - self.tol_max);
            for (i, c) in cases.iter().enumerate() {
                w[i].vs_floor = bias_at(t, v, &c.rails, &folded(&c.law, vds_floor)).2;
            }
            // The fold grid serves the drain-resistor scan only (not a
            // follower, nor a common gate with a source resistance).
            if lambda_scan {
                let nf = self.folds;
                // gm at the two tolerance-shifted points of the spread bound,
                // k folded at each VDS of the grid (the ends are those above).
                set(v, &low_id);
                shift(v, self.roles, self.tol, true);
                for (i, c) in cases.iter().enumerate() {
                    w[i].g_lo_up_at[0] = w[i].g_lo_up;
                    for j in 1..nf {
                        let at = fold_vds(j, nf, vds_floor, c.span());
                        w[i].g_lo_up_at[j] = bias_at(t, v, &c.rails, &folded(&c.law, at)).3;
                    }
                }
                set(v, &high_id);
                shift(v, self.roles, self.tol, false);
                for (i, c) in cases.iter().enumerate() {
                    w[i].g_hi_dn_at[nf - 1] = w[i].g_hi_dn;
                    for j in 0..nf - 1 {
                        let at = fold_vds(j, nf, vds_floor, c.span());
                        w[i].g_hi_dn_at[j] = bias_at(t, v, &c.rails, &folded(&c.law, at)).3;
                    }
                }
                // The RDs at which VDS's floor and ceiling cross the fold grid,
                // and where each fold's run of shelf values starts and ends.
                let rds = self.rd_values;
                // (RD = room / per-ohm drop, ±∞ where no current drops it.)
                let rd_for = |room: f64, drop: f64| {
                    if drop > 0.0 {
                        room / drop
                    } else if room >= 0.0 {
                        f64::INFINITY
                    } else {
                        f64::NEG_INFINITY
                    }
                };
                for (c, case) in w.iter_mut().zip(cases) {
                    for j in 0..nf {
                        let vds = fold_vds(j, nf, vds_floor, case.span());
                        c.strong_rd[j] = if j == 0 {
                            f64::INFINITY
                        } else {
                            rd_for(
                                case.rails.vdd_v - c.vs_ceiling - vds,
                                (1.0 + self.tol_max) * c.id_ceiling,
                            )
                        };
                        c.weak_rd[j] = if j + 1 == nf {
                            f64::NEG_INFINITY
                        } else {
                            rd_for(
                                case.rails.vdd_v - c.vs_floor - vds,
                                (1.0 - self.tol_max) * c.id_floor,
                            )
                        };
                    }
                    for j in 0..nf {
                        c.strong_from[j] = if j + 1 == nf {
                            0
                        } else {
                            rds.partition_point(|&x| x <= c.strong_rd[j + 1])
                        };
                        c.weak_to[j] = if j == 0 {
                            rds.len()
                        } else {
                            rds.partition_point(|&x| x < c.weak_rd[j - 1])
                        };
                    }
                }
            }
        }
        set(v, &low_vs);
        for (i, c) in cases.iter().enumerate() {
            let law = folded(&c.law, vds_floor);
            w[i].vs_lo = bias_at(t, v, &c.rails, &law).2;
        }
        // Two tolerance extremes of every candidate, both with the divider
        // tap up and RD up: P with the source resistors down (the most
        // current) and P' with them up (the most source voltage per amp).
        // At each, floors of VS and ID over the box: VS rises with VG and
        // with each source resistor, ID rises with VG and falls with them,
        // and the tap moved by the smallest tolerance is at most where any
        // candidate's tap goes.
        let tilted = |v: &mut [f64], pick: &dyn Fn(&Axis, (usize, usize)) -> usize, src: f64| {
            set(v, pick);
            tilt(v, self.roles, self.tol, src);
        };
        let points = [
            (1.0 - self.tol_max, 1.0 - self.tol),
            (1.0 + self.tol, 1.0 + self.tol_max),
        ];
        for (j, &(vs_src, id_src)) in points.iter().enumerate() {
            tilted(v, &low_vs, vs_src);
            for (i, c) in cases.iter().enumerate() {
                w[i].vs_at[j] = bias_at(t, v, &c.rails, &folded(&c.law, vds_floor)).2;
            }
            if j == 0 {
                // The point of `id_up` (the same shift).
                for c in w.iter_mut() {
                    c.id_at[0] = c.id_up;
                }
                continue;
            }
            tilted(v, &low_id, id_src);
            for (i, c) in cases.iter().enumerate() {
                w[i].id_at[j] = bias_at(t, v, &c.rails, &folded(&c.law, vds_floor)).0;
            }
        }
        Some(w)
    }

    /// The box's Zin range where the divider or a gate resistor sets Zin,
    /// its Zin ratio and the slices of it.
    pub(super) fn zin_ranges(
        &self,
        v: &[f64],
        axes: &[Axis],
        ranges: &[(usize, usize)],
    ) -> ZinRanges {
        let s = &self.p.spec;
        let t = self.t;
        // The nominal Zin range of the box where the divider (Zin = R1∥R2)
        // or a gate resistor (Zin = RG: a box axis with a source
        // resistance, else fixed for the whole box) sets it.
        let zin_nominal = axes
            .iter()
            .zip(ranges)
            .find_map(|(a, r)| a.zin_range(r.0, r.1))
            .or_else(|| {
                if t.input_at_source() {
                    return None;
                }
                let rg = self
                    .roles
                    .iter()
                    .zip(v.iter())
                    .filter(|(r, _)| **r == Role::Gate)
                    .map(|(_, &rg)| rg)
                    .fold(f64::INFINITY, f64::min);
                rg.is_finite().then_some((rg, rg))
            });
        // Every resistor at its low extreme is a point of every candidate's
        // envelope: the worst-case Zin is at most the largest times (1 − t).
        let zin_ratio =
            zin_nominal.map_or(f64::INFINITY, |z| z.1 * (1.0 - self.tol) / s.zin_min_ohm);
        // The share of the source EMF that reaches the gate, Zin/(Zin +
        // Rsig), at any tolerance extreme of any candidate: at least with
        // Zin at its floor (a feasible candidate's is at least zin_min),
        // at most with Zin at its ceiling.
        let rsig = s.source_resistance_ohm;
        let share = |z: f64| if rsig > 0.0 { z / (z + rsig) } else { 1.0 };
        // Where the divider sets Zin its tables give the Zin at the very
        // extremes the gain bounds use (tap up for the strong side, tap
        // down for the weak): the tighter of the two bounds is kept.
        let tilted = axes
            .iter()
            .zip(ranges)
            .find_map(|(a, r)| a.zin_tilted(r.0, r.1))
            .unwrap_or((0.0, f64::INFINITY));
        let share_floor = |z: f64| share(z.max(tilted.0).max(s.zin_min_ohm));
        let share_ceiling = |z: f64| share(z.min(tilted.1));
        let (share_lo, share_hi) = match zin_nominal {
            Some((lo, hi)) => (
                share_floor(lo * (1.0 - self.tol_max)),
                share_ceiling(hi * (1.0 + self.tol_max)),
            ),
            None => (share(s.zin_min_ohm), 1.0),
        };
        // Slices of the box's Zin range (geometric): with a source
        // resistance the share moves the gain level, and a box that mixes
        // small and large Zin would otherwise pair the level of one with
        // the Zin of the other. Each slice bounds the candidates whose
        // nominal Zin lies in it (every candidate lies in one): share and
        // Zin ratio from the slice's ends, as above for the whole box.
        let mut slices = [(share_lo, share_hi, zin_ratio); ZIN_POINTS];
        // As many slices as the share's range spans steps of a tenth of
        // the gain tolerance (none where it hardly moves the level); a
        // divider range of at most ZIN_POINTS pairs is taken pair by pair,
        // each with its own Zin at those extremes.
        let step = 1.0 + 0.1 * s.target.tolerance;
        let spread = share_hi / share_lo;
        let wanted = if spread > step {
            (spread.ln() / step.ln()).ceil() as usize
        } else {
            1
        };
        let divider = axes
            .iter()
            .zip(ranges)
            .find(|(a, _)| a.zin.is_some())
            .map(|(a, r)| (a, *r));
        let n_slices = match (zin_nominal, divider) {
            (_, Some((a, r)))
                if rsig > 0.0 && wanted > 1 && r.1 - r.0 > 1 && r.1 - r.0 <= ZIN_POINTS =>
            {
                for (sl, i) in slices.iter_mut().zip(r.0..r.1) {
                    let (z, z_up, z_dn) = a.zin_at(i);
                    *sl = (
                        share(z_up.max(s.zin_min_ohm)),
                        share(z_dn),
                        z * (1.0 - self.tol) / s.zin_min_ohm,
                    );
                }
                r.1 - r.0
            }
            (Some((lo, hi)), _) if rsig > 0.0 && hi > lo * (1.0 + 1e-9) && wanted > 1 => {
                let n = wanted.min(ZIN_SLICES);
                let end = |j: usize| {
                    if j == n {
                        hi
                    } else {
                        lo * (hi / lo).powf(j as f64 / n as f64)
                    }
                };
                for (j, sl) in slices.iter_mut().enumerate().take(n) {
                    let (a, b) = (end(j), end(j + 1));
                    *sl = (
                        share_floor(a * (1.0 - self.tol_max)),
                        share_ceiling(b * (1.0 + self.tol_max)),
                        b * (1.0 - self.tol) / s.zin_min_ohm,
                    );
                }
                n
            }
            _ => 1,
        };
        ZinRanges {
            zin_ratio,
            slices,
            count: n_slices,
        }
    }
}
