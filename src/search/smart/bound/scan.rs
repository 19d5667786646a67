//! Step 3 of the box bound: the gain and the drain-resistor scan. |gain|
//! is bounded at the source points (or extremes) of the box and each Zin
//! slice; where the drain resistor is scanned (`scan_rd`), the gain
//! error, spread and headroom are bounded together for each shelf value,
//! and the box's score bound is the best over the window.

use super::prune::Room;
use super::ranges::{PerCase, ZinRanges};
use super::Bounds;
use crate::analysis::{gain_window, SLACK};
use crate::rank::Metrics;
use crate::search::smart::axis::Axis;
use crate::search::smart::blocks::{
    add_lowest, best_of, gain_terms, optimistic, par2, rd_ratio, scan_rd, smallest_reaching,
    source_point, Bound, Proportional, Sides, FOLDS, MAX_SOURCES, SOURCE_POINTS,
};
use crate::topology::SignalContext;

/// λ > 0, one case of one cell: across the folds of the fold grid the
/// gain bounds can step down as RD rises (a lower fold, a smaller gm
/// bound). `strong[j]` is the smallest strong-side bound over the RDs of
/// folds 0..=j, `weak[j]` the largest weak-side bound over those of folds
/// j.. (each fold's RDs form one run, inside which the bound rises), so
/// that the bounds taken with them rise with RD. Each is taken when first
/// needed: the strong side fills from fold 0 up (`strong[..strong_known]`
/// are taken), the weak side from the top fold down (`weak[weak_known..]`
/// are taken, `usize::MAX` for none), so a value already taken is read
/// without walking the folds below or above it.
#[derive(Debug, Clone, Copy)]
pub(super) struct Envelope {
    pub(super) strong: [f64; FOLDS],
    pub(super) weak: [f64; FOLDS],
    strong_known: usize,
    weak_known: usize,
}

impl Default for Envelope {
    fn default() -> Envelope {
        Envelope::unknown()
    }
}

impl Envelope {
    /// No value taken yet.
    pub(super) fn unknown() -> Envelope {
        Envelope {
            strong: [f64::NAN; FOLDS],
            weak: [f64::NAN; FOLDS],
            strong_known: 0,
            weak_known: usize::MAX,
        }
    }

    /// `strong[a]`, taking the missing entries up to it from `fold_min`
    /// (a fold's smallest strong bound).
    pub(super) fn strong_to(&mut self, a: usize, mut fold_min: impl FnMut(usize) -> f64) -> f64 {
        if a < self.strong_known {
            return self.strong[a];
        }
        let mut m = match self.strong_known {
            0 => f64::INFINITY,
            k => self.strong[k - 1],
        };
        for j in self.strong_known..=a {
            // (`min` keeps the non-NaN side: a taken value is never NaN.)
            m = m.min(fold_min(j));
            self.strong[j] = m;
        }
        self.strong_known = a + 1;
        m
    }

    /// `weak[b]`, taking the missing entries from the top fold (of `n`)
    /// down to it from `fold_max` (a fold's largest weak bound).
    pub(super) fn weak_from(
        &mut self,
        b: usize,
        n: usize,
        mut fold_max: impl FnMut(usize) -> f64,
    ) -> f64 {
        let known = self.weak_known.min(n);
        if b >= known {
            return self.weak[b];
        }
        let mut m = if known < n { self.weak[known] } else { 0.0f64 };
        for j in (b..known).rev() {
            m = m.max(fold_max(j));
            self.weak[j] = m;
        }
        self.weak_known = b;
        m
    }
}

/// The scratch space the scan works in.
pub(super) struct Space<'a> {
    /// Per case, the box's figures.
    pub(super) w: &'a [PerCase],
    /// Per case, the envelopes of [`Envelope`].
    pub(super) envelopes: &'a mut Vec<Envelope>,
    /// Per case and fold, the gds ceiling of the strong side and floor of
    /// the weak side, siemens.
    pub(super) fold_gds: &'a mut Vec<[(f64, f64); FOLDS]>,
    /// The headroom lines of the scan.
    pub(super) lines: &'a mut Vec<(f64, f64)>,
    /// The values of every position, ohms.
    pub(super) v: &'a mut [f64],
}

impl Bounds<'_> {
    /// The score bound of the box from its gain and drain-resistor scan,
    /// or `None` when no point can reach the gain window (or the Zin or
    /// Zout the gain pieces give).
    pub(super) fn gain_scan(
        &self,
        space: Space<'_>,
        axes: &[Axis],
        ranges: &[(usize, usize)],
        room: &Room,
        zin: &ZinRanges,
    ) -> Option<Bound> {
        let Space {
            w,
            envelopes,
            fold_gds,
            lines,
            v,
        } = space;
        let p = self.p;
        let t = self.t;
        let s = &p.spec;
        let (lo, hi) = gain_window(s);
        let cases = &self.cases;
        let n = cases.len();
        let lambda_scan = self.lambda_scan();
        let Room {
            rd_cap,
            mut headroom_ub,
            power_lb,
        } = *room;
        let zin_ratio = zin.zin_ratio;
        let slices = &zin.slices[..zin.count];
        // Gain bounds: |gain| rises with gm and RD and is monotone in each
        // source resistor, so the extremes of the source axes bound it.
        // (A bypassed source resistor never enters the gain: no extremes.)
        let src_axes = &self.src_axes;
        // A point of the source axes: one option index per axis (fixed
        // arrays: a bound allocates nothing).
        let mut extremes = [[0usize; MAX_SOURCES]; 1 << MAX_SOURCES];
        let n_ext = 1usize << src_axes.len();
        for (combo, e) in extremes.iter_mut().enumerate().take(n_ext) {
            for (bit, &ai) in src_axes.iter().enumerate() {
                let r = ranges[ai];
                e[bit] = if combo & (1 << bit) != 0 {
                    r.1 - 1
                } else {
                    r.0
                };
            }
        }
        let extremes = &extremes[..n_ext];
        // The values of point `pick` of the source axes (times `mult`) and
        // RD `rd` set in `v`, and the small-signal context with gm and gds.
        let at = |v: &mut [f64], gm: f64, gds: f64, rd: f64, pick: &[usize], mult: f64| {
            for (&ai, &j) in src_axes.iter().zip(pick) {
                for (k, &pos) in axes[ai].positions.iter().enumerate() {
                    v[pos] = axes[ai].option(j)[k] * mult;
                }
            }
            if let Some(k) = self.rd {
                v[k] = rd;
            }
            SignalContext {
                gm_s: gm,
                gds_s: gds,
                rl_ohm: s.rl_ohm,
                rsig_ohm: s.source_resistance_ohm,
            }
        };
        // (|av|, Zin, Zout) there.
        let signal_at = |v: &mut [f64], gm: f64, gds: f64, rd: f64, pick: &[usize], mult: f64| {
            let ctx = at(v, gm, gds, rd, pick, mult);
            let ss = t.small_signal(v, &ctx);
            (ss.av.abs(), ss.zin_ohm, ss.zout_ohm)
        };
        // |av| alone there (most bounds ask for nothing else).
        let gain_at_g = |v: &mut [f64], gm: f64, gds: f64, rd: f64, pick: &[usize], mult: f64| {
            let ctx = at(v, gm, gds, rd, pick, mult);
            t.gain(v, &ctx).abs()
        };
        let gain_at_m = |v: &mut [f64], gm: f64, rd: f64, pick: &[usize], mult: f64| {
            gain_at_g(v, gm, 0.0, rd, pick, mult)
        };
        let gain_at =
            |v: &mut [f64], gm: f64, rd: f64, pick: &[usize]| gain_at_m(v, gm, rd, pick, 1.0);
        // The strong and the weak side of the gain move opposite ways along
        // a source axis inside the gain, so taking each at its own extreme
        // of the box is loose by a whole step of the axis. Where the box
        // holds few such points, each is bounded on its own (every
        // candidate has one of them), and the bound is the best of those.
        let points: usize = src_axes
            .iter()
            .map(|&ai| ranges[ai].1 - ranges[ai].0)
            .product();
        let mut each = [[0usize; MAX_SOURCES]; SOURCE_POINTS];
        let n_each = if points > 1 && points <= SOURCE_POINTS {
            for (i, pt) in each.iter_mut().enumerate().take(points) {
                *pt = source_point(src_axes.iter().map(|&ai| ranges[ai]), i);
            }
            points
        } else {
            0
        };
        // The groups: each point alone, or one group of the extremes.
        let each = &each;
        let groups = || {
            (0..n_each.max(1)).map(move |i| {
                if n_each > 0 {
                    &each[i..i + 1]
                } else {
                    extremes
                }
            })
        };
        let rd_best = rd_cap.min(self.r_max);
        // With λ = 0 (gds = 0) and no source resistance inside the gain,
        // |av| is proportional to RD∥RL at a fixed gm (common source and
        // common gate alike): then the drain resistor can be scanned over
        // the shelf below (`scan_rd`). Checked here rather than assumed.
        let rl = s.rl_ohm;
        // (Without a drain resistor, a follower, the gain bounds below also
        // hold with λ > 0, gds taken at its extremes.)
        let spread_free = (self.lambda_free || self.rd.is_none())
            && (s.source_resistance_ohm == 0.0 || !t.input_at_source());
        // Where Zout is RD itself at gds = 0 it is RD∥(something at least
        // 1/gds) otherwise, so at the current-raising extreme Zout is at
        // least RD(1 + t)∥(1/gds ceiling) (that ceiling is 0 with λ = 0):
        // zout_max caps RD there, RD(1 + t) <= zout_max/(1 − zout_max·gds).
        let mut zout_cap = f64::INFINITY;
        if let (Some(zm), Some(_)) = (s.limits.zout_max_ohm, self.rd) {
            let r0 = self.r_min;
            let z = signal_at(v, w[0].g_hi_dn, 0.0, r0, &extremes[0], 1.0).2;
            if ((z / r0) - 1.0).abs() < 1e-12 {
                let zm = zm * (1.0 + SLACK);
                for c in w.iter() {
                    if zm * c.gds_hi < 1.0 {
                        zout_cap = zout_cap.min(zm / (1.0 - zm * c.gds_hi) / (1.0 + self.tol));
                    }
                }
            }
        }
        let scan = spread_free && self.rd.is_some() && w[0].g_hi_dn > 0.0 && {
            let r0 = self.r_min;
            let a = gain_at_m(v, w[0].g_hi_dn, r0, &extremes[0], 1.0);
            let b = gain_at_m(v, w[0].g_hi_dn, 2.0 * r0, &extremes[0], 1.0);
            a > 0.0 && ((b / a) / (par2(2.0 * r0, rl) / par2(r0, rl)) - 1.0).abs() < 1e-9
        };
        let scanned = scan || lambda_scan;
        // The level at the largest RD (the scan's window implies it) and
        // the Zin of a common-gate input.
        let need_zin = t.input_at_source();
        let mut min_ub = f64::INFINITY;
        let mut zin_ub_min = f64::INFINITY;
        if !scanned || need_zin {
            for c in w.iter() {
                let mut ub: f64 = 0.0;
                let mut zin_ub: f64 = 0.0;
                for cmb in extremes {
                    if !scanned {
                        ub = ub.max(gain_at(v, c.g_hi, rd_best, cmb));
                    }
                    if need_zin && self.lambda_free {
                        zin_ub = zin_ub.max(signal_at(v, c.g_lo, 0.0, rd_best, cmb, 1.0).1);
                    } else if need_zin {
                        // With gds > 0 Zin rises with RD∥RL too (RD up at
                        // most its cap times 1 + t) and is monotone in gds:
                        // both ends of its range.
                        let rd_up = rd_best * (1.0 + self.tol_max);
                        for gds in [c.gds_lo, c.gds_hi] {
                            zin_ub = zin_ub.max(signal_at(v, c.g_lo, gds, rd_up, cmb, 1.0).1);
                        }
                    }
                }
                if !scanned {
                    min_ub = min_ub.min(ub);
                }
                zin_ub_min = zin_ub_min.min(zin_ub);
            }
        }
        if !scanned && min_ub < lo * (1.0 - SLACK) {
            return None;
        }
        // The smallest RD that can reach |gain| = lo at every corner (gain
        // rises with RD): the headroom cannot exceed what that RD leaves.
        if self.rd.is_some() && !scanned {
            let reach = |v: &mut [f64], rd: f64| {
                (0..n).all(|i| {
                    extremes
                        .iter()
                        .any(|cmb| gain_at(v, w[i].g_hi, rd, cmb) >= lo * (1.0 - SLACK))
                })
            };
            let rd_need = smallest_reaching(self.r_min, rd_best, 12, 1e-4, |x| reach(v, x));
            for i in 0..n {
                headroom_ub =
                    headroom_ub.min(cases[i].rails.vdd_v - w[i].vs_lo - rd_need * w[i].id_lo);
            }
        }
        if need_zin && zin_ub_min < s.zin_min_ohm * (1.0 - SLACK) {
            return None;
        }
        // Spread (λ = 0): the ratio of |gain| between corners does not depend
        // on RD, so a lower bound of max/min above hi/lo rules the box out.
        let mut ratio = 1.0;
        // The level: no point reaches above `min_ub` at its weakest corner.
        let g_target = s.target.gain;
        let mut level_error = ((g_target - min_ub) / g_target).max(0.0);
        let mut at_rd: Option<Bound> = None;
        // A single configuration keeps the bound of each RD, so the visit
        // can skip those that cannot be kept.
        let single = ranges.iter().all(|r| r.1 - r.0 == 1);
        // The headroom of the scan below: VDS at the tolerance extremes P
        // and P' is VDD − VS − RD(1 + t)·ID per case and point, a line
        // (a, b) = (VDD − VS, ID) in RD(1 + t). A line that starts no lower
        // and falls no faster than another is never the lowest for RD ≥ 0
        // (rounding keeps both orders), so only the others are kept.
        lines.clear();
        for (c, case) in w.iter().zip(cases) {
            for j in 0..2 {
                add_lowest(lines, (case.rails.vdd_v - c.vs_at[j], c.id_at[j]));
            }
        }
        let lines = &*lines;
        // The optimistic metrics with drain resistor `x` and the given
        // gain error and spread bounds: the least VDS over those lines, the
        // power and Zin of the box.
        let rd_metrics = |x: f64, err: f64, spread: f64, zin_ratio: f64| {
            let mut m = optimistic(s, 1.0, 0.0, power_lb, 1.0, self.parts_floor);
            m.gain_error = err;
            m.gain_spread = spread;
            let rd_up = x * (1.0 + self.tol);
            // (Plain comparisons: this runs for every RD of every scan.)
            let mut room = f64::INFINITY;
            for &(a, b) in lines {
                let x = a - rd_up * b;
                if x < room {
                    room = x;
                }
            }
            m.headroom_v = room - s.vds_min_v;
            m.zin_ratio = zin_ratio;
            m
        };
        // A follower's Zout = RS ∥ 1/(gm + gds) falls with gm and gds and
        // rises with RS. At the current-lowering tolerance extreme of every
        // candidate gm and gds are at most their box ceilings and RS is
        // moved up, so Zout there is at least its value with those ceilings
        // and the box's smallest RS: above zout_max at any case, no
        // candidate passes.
        if let (Some(zm), None, false) = (s.limits.zout_max_ohm, self.rd, t.input_at_source()) {
            for c in w.iter() {
                let gds = if self.lambda_free { 0.0 } else { c.gds_hi };
                let z = extremes
                    .iter()
                    .map(|cmb| signal_at(v, c.g_hi_dn, gds, 0.0, cmb, 1.0 + self.tol).2)
                    .fold(f64::INFINITY, f64::min);
                if z > zm * (1.0 + SLACK) {
                    return None;
                }
            }
        }
        // The bound where RD is not scanned: optimistic metrics from the
        // corner-to-corner |gain| ratio, a floor of the gain error and the
        // Zin ratio.
        let unscanned = |ratio: f64, level: f64, zin_ratio: f64| {
            let mut m = optimistic(
                s,
                ratio,
                headroom_ub - s.vds_min_v,
                power_lb,
                zin_ratio,
                self.parts_floor,
            );
            m.gain_error = m.gain_error.max(level);
            m
        };
        let bound_of = |m: Metrics| Bound {
            score: self.scorer.score(&m),
            rd_window: None,
            rd_scores: Vec::new(),
        };
        // Each source point (group) with each Zin slice.
        let cells = || groups().flat_map(|g| slices.iter().map(move |sl| (g, sl)));
        if spread_free {
            let rd_ref = self.r_min;
            let rd_part = if self.rd.is_some() {
                rd_ratio(rd_best, s.rl_ohm, self.tol)
            } else {
                1.0
            };
            // Over the groups: the smallest ratio and level error, the best
            // RD bound (a group no point of which can work drops out).
            let (mut ratio_min, mut level_min) = (f64::INFINITY, f64::INFINITY);
            let mut any = false;
            // A follower (no drain resistor) has its |gain| bounds fixed by
            // the bias alone: the error and spread follow from them
            // directly, group by group.
            let mut follower: Option<Bound> = None;
            // With λ = 0 |gain| at given resistors depends on the case only
            // through gm and rises with it, so the strongest case's floor is
            // the gain at the largest gm floor and the weakest case's ceiling
            // the gain at the smallest gm ceiling (the same values as taking
            // every case, for two evaluations instead of two per case).
            let g_strong = w.iter().map(|c| c.g_lo_up).fold(0.0f64, f64::max);
            let g_weak = w.iter().map(|c| c.g_hi_dn).fold(f64::INFINITY, f64::min);
            for (group, &(share_lo, share_hi, zin_ratio)) in cells() {
                let mut max_lb: f64 = 0.0;
                let mut min_ub2 = f64::INFINITY;
                if self.lambda_free {
                    let (dn, up) = (1.0 - self.tol, 1.0 + self.tol);
                    let (mut lb, mut ub) = (f64::INFINITY, 0.0f64);
                    for cmb in group {
                        lb = lb.min(gain_at_m(v, g_strong, rd_ref, cmb, dn));
                        ub = ub.max(gain_at_m(v, g_weak, rd_ref, cmb, up));
                    }
                    max_lb = lb * share_lo;
                    min_ub2 = ub * share_hi;
                }
                for c in w.iter().filter(|_| !self.lambda_free) {
                    let (mut lb_i, mut ub_i) = (f64::INFINITY, 0.0f64);
                    for cmb in group {
                        let (dn, up) = (1.0 - self.tol, 1.0 + self.tol);
                        // |gain| is monotone in gds: both ends of its range.
                        for gds in [c.gds_lo, c.gds_hi] {
                            lb_i = lb_i.min(gain_at_g(v, c.g_lo_up, gds, rd_ref, cmb, dn));
                            ub_i = ub_i.max(gain_at_g(v, c.g_hi_dn, gds, rd_ref, cmb, up));
                        }
                    }
                    // With a source resistance the gain from the EMF is av
                    // times Zin/(Zin + Rsig), which lies between the shares
                    // above.
                    max_lb = max_lb.max(lb_i * share_lo);
                    min_ub2 = min_ub2.min(ub_i * share_hi);
                }
                if max_lb * lo * rd_part > hi * min_ub2 * (1.0 + SLACK) {
                    continue;
                }
                // ... and every point reaches at least `max_lb` at its
                // strongest.
                let level_g = level_error.max((max_lb - g_target) / g_target);
                if self.rd.is_none() && max_lb > hi * (1.0 + SLACK) {
                    continue;
                }
                if scan {
                    let unit = par2(rd_ref, rl);
                    let model = Proportional {
                        strong: max_lb / unit,
                        weak: min_ub2 / unit,
                        tol: self.tol,
                        rl,
                    };
                    match scan_rd(
                        self.rd_values,
                        (lo, hi),
                        g_target,
                        rd_cap.min(zout_cap),
                        single,
                        |x, _| model.gains(x),
                        |x, err, spread| rd_metrics(x, err.max(level_g), spread, zin_ratio),
                        &self.scorer,
                    ) {
                        Some(b) => at_rd = best_of(at_rd, b),
                        None => continue,
                    }
                }
                any = true;
                let ratio_g = if min_ub2 > 0.0 {
                    (max_lb / min_ub2).max(1.0) * rd_part
                } else {
                    1.0
                };
                ratio_min = ratio_min.min(ratio_g);
                level_min = level_min.min(level_g);
                if self.rd.is_none() {
                    let (err, spread) = gain_terms(max_lb, min_ub2, g_target);
                    let mut m = unscanned(ratio_g, level_g.max(err), zin_ratio);
                    m.gain_spread = m.gain_spread.max(spread);
                    follower = best_of(follower, bound_of(m));
                }
            }
            if !any {
                return None;
            }
            if follower.is_some() {
                return follower;
            }
            ratio = ratio_min;
            level_error = level_min;
        }
        if lambda_scan {
            // λ > 0: the operating point moves with RD, but gm stays
            // between its floor (k folded at vds_min) and its ceiling (k
            // folded at the span), gds between its floor and ceiling, and
            // |gain| rises with gm and RD and falls with gds. So for every
            // candidate the current-raising tolerance extreme reaches at
            // least the gain with (gm floor, gds ceiling) and the other
            // extreme at most the gain with (gm ceiling, gds floor).
            let tol = self.tol;
            // A common-source stage loses |gain| to gds; elsewhere both
            // ends of the gds range are taken.
            let both_gds = t.input_at_source();
            let rds = self.rd_values;
            // The scan asks for RDs up to its cap only: the folds' runs
            // are cut there.
            let cap = rd_cap.min(zout_cap);
            let capped = rds.partition_point(|&x| x <= cap * (1.0 + 1e-9));
            // gds per fold: on the strong side its ceiling at the fold's
            // largest RD (VDS's floor falls, gds's ceiling rises with RD),
            // on the weak side its floor at the fold's smallest RD.
            fold_gds.clear();
            fold_gds.extend(w.iter().zip(cases).map(|(c, case)| {
                let l = case.law.lambda_per_v;
                let mut out = [(c.gds_hi, c.gds_lo); FOLDS];
                for (j, o) in out.iter_mut().enumerate().take(self.folds) {
                    if let Some(k) = c.strong_run(j, capped).last() {
                        let vds = self.vds_lo(c, case, rds[k]);
                        o.0 = (l * c.id_ceiling / (1.0 + l * vds)).min(c.gds_hi);
                    }
                    if let Some(k) = c.weak_run(j, self.folds, capped).next() {
                        let vds = self.vds_hi(c, case, rds[k]);
                        o.1 = (l * c.id_floor / (1.0 + l * vds)).max(c.gds_lo);
                    }
                }
                out
            }));
            // One case's bounds with RD `x` inside fold `a` (strong side)
            // or `b` (weak side): with that RD every point's VDS lies in
            // [VDD − VS ceiling − RD(1+t)·ID ceiling, VDD − VS floor −
            // RD(1−t)·ID floor], so gm lies between the gm bounds of the
            // grid folds just outside it, and gds within the fold's gds
            // bounds above. Both are taken per fold, not per RD, so each
            // bound rises with RD inside a fold (|gain| rises with RD at
            // fixed gm and gds).
            let fold_gds = &*fold_gds;
            let strong_at =
                |v: &mut [f64], i: usize, x: f64, a: usize, group: &[[usize; MAX_SOURCES]]| {
                    let c = &w[i];
                    let g_floor = c.g_lo_up_at[a];
                    let gds_hi = fold_gds[i][a].0;
                    let x_up = x * (1.0 + tol);
                    let mut lb = f64::INFINITY;
                    for cmb in group {
                        let mut up = gain_at_g(v, g_floor, gds_hi, x_up, cmb, 1.0 - tol);
                        if both_gds {
                            // |gain| is monotone in gds (a ratio of linear
                            // terms) but its direction is not known here.
                            up = up.min(gain_at_g(v, g_floor, c.gds_lo, x_up, cmb, 1.0 - tol));
                        }
                        lb = lb.min(up);
                    }
                    lb
                };
            let weak_at =
                |v: &mut [f64], i: usize, x: f64, b: usize, group: &[[usize; MAX_SOURCES]]| {
                    let c = &w[i];
                    let g_ceiling = c.g_hi_dn_at[b];
                    let gds_lo = fold_gds[i][b].1;
                    let x_dn = x * (1.0 - tol);
                    let mut ub = 0.0f64;
                    for cmb in group {
                        let mut dn = gain_at_g(v, g_ceiling, gds_lo, x_dn, cmb, 1.0 + tol);
                        if both_gds {
                            dn = dn.max(gain_at_g(v, g_ceiling, c.gds_hi, x_dn, cmb, 1.0 + tol));
                        }
                        ub = ub.max(dn);
                    }
                    ub
                };
            envelopes.resize(n, Envelope::default());
            for (group, &(share_lo, share_hi, zin_ratio)) in cells() {
                envelopes.fill(Envelope::unknown());
                // Fold `a`'s smallest strong bound is at its first RD, fold
                // `b`'s largest weak bound at its last (∞ and 0 for a fold
                // with no RD up to the cap).
                let fold_min = |v: &mut [f64], i: usize, a: usize| {
                    w[i].strong_run(a, capped)
                        .next()
                        .map_or(f64::INFINITY, |k| strong_at(v, i, rds[k], a, group))
                };
                let fold_max = |v: &mut [f64], i: usize, b: usize| {
                    w[i].weak_run(b, self.folds, capped)
                        .last()
                        .map_or(0.0, |k| weak_at(v, i, rds[k], b, group))
                };
                // Every candidate with RD `x`: the strong side reaches at
                // least the smallest strong bound over the RDs from x up to
                // the cap, the weak side at most the largest weak bound
                // over the RDs up to x (both then rise with RD, as the scan
                // needs). The folds' extremes are taken when first needed.
                let envelopes = &mut *envelopes;
                // (A side not asked for stays NaN; the envelopes are
                // caches, so the order they fill in does not matter.)
                let mut gains = |x: f64, sides: Sides| {
                    let (mut strong, mut weak) = (f64::NAN, f64::NAN);
                    if sides.strong() {
                        strong = 0.0;
                        for (i, c) in w.iter().enumerate() {
                            let a = self.fold_lo(c, x);
                            let mut lb = strong_at(v, i, x, a, group);
                            if a > 0 {
                                lb = lb.min(envelopes[i].strong_to(a - 1, |j| fold_min(v, i, j)));
                            }
                            strong = strong.max(lb * share_lo);
                        }
                    }
                    if sides.weak() {
                        weak = f64::INFINITY;
                        for (i, c) in w.iter().enumerate() {
                            let b = self.fold_hi(c, x);
                            let mut ub = weak_at(v, i, x, b, group);
                            if b + 1 < self.folds {
                                ub = ub.max(
                                    envelopes[i]
                                        .weak_from(b + 1, self.folds, |j| fold_max(v, i, j)),
                                );
                            }
                            weak = weak.min(ub * share_hi);
                        }
                    }
                    (strong, weak)
                };
                if let Some(b) = scan_rd(
                    self.rd_values,
                    (lo, hi),
                    g_target,
                    rd_cap.min(zout_cap),
                    single,
                    &mut gains,
                    |x, err, spread| rd_metrics(x, err, spread, zin_ratio),
                    &self.scorer,
                ) {
                    at_rd = best_of(at_rd, b);
                }
            }
            // No group has a drain resistor that can work.
            at_rd.as_ref()?;
        }
        if at_rd.is_some() {
            return at_rd;
        }
        Some(bound_of(unscanned(ratio, level_error, zin_ratio)))
    }
}

#[cfg(test)]
mod envelope_tests {
    use super::*;

    // The envelope is, by its definition, the minimum over folds 0..=a and
    // the maximum over folds b.. of the folds' values. The reference
    // recomputes each from scratch; each fold's value must be asked for
    // once only, whatever order the lookups come in.
    #[test]
    fn envelope_reads_taken_values_and_asks_each_fold_once() {
        let n = 9;
        let strong_in = [5.0, 7.0, 3.0, 4.0, 1.0, 6.0, 2.0, 8.0, 0.5];
        let weak_in = [0.2, 0.9, 0.4, 0.3, 0.8, 0.1, 0.6, 0.7, 0.5];
        let mut e = Envelope::unknown();
        let (mut asked_s, mut asked_w) = (vec![0; n], vec![0; n]);
        for &(a, b) in &[(2, 6), (0, 8), (5, 3), (3, 7), (8, 0), (4, 4)] {
            let s = e.strong_to(a, |j| {
                asked_s[j] += 1;
                strong_in[j]
            });
            let w = e.weak_from(b, n, |j| {
                asked_w[j] += 1;
                weak_in[j]
            });
            let s_ref = strong_in[..=a]
                .iter()
                .copied()
                .fold(f64::INFINITY, f64::min);
            let w_ref = weak_in[b..].iter().copied().fold(0.0, f64::max);
            assert_eq!(s, s_ref, "strong_to({a})");
            assert_eq!(w, w_ref, "weak_from({b})");
        }
        assert_eq!(asked_s, vec![1; n]);
        assert_eq!(asked_w, vec![1; n]);
    }
}
