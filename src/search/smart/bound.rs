//! The box bound: at the box's extreme points, every corner's current,
//! gm and headroom, and from them the requirements a box must break to be
//! dropped and the score bound it waits in the queue with.

use super::*;

/// The bound of one box.
pub(super) struct Bound {
    /// The score of optimistic metrics (no point of the box does better on
    /// any of them): no point of the box scores higher.
    pub(super) score: f64,
    /// For a single configuration whose drain resistor was scanned: shelf
    /// indices `[first, last)` of the drain resistors that can work.
    pub(super) rd_window: Option<(usize, usize)>,
    /// For a single configuration: the score bound of each drain resistor
    /// in the window (empty otherwise).
    pub(super) rd_scores: Vec<f64>,
}

/// One device corner at one supply extreme: every bound is taken over
/// these, each of which the full check evaluates.
pub(super) struct Case {
    pub(super) law: SquareLaw,
    pub(super) rails: Rails,
    /// Drain rail minus source rail of the bias network, volts (the
    /// supply power is the drain current times it).
    pub(super) power_span: f64,
}

/// The per-case figures of one box bound (scratch space reused by every
/// bound): drain current floor, gm at both current extremes and at the
/// tolerance-shifted extremes, source voltage and overdrive floors.
#[derive(Debug, Clone, Copy, Default)]
struct PerCase {
    id_lo: f64,
    g_lo: f64,
    g_hi: f64,
    vs_lo: f64,
    vov_lo: f64,
    g_lo_up: f64,
    g_hi_dn: f64,
    /// Drain current floor at the current-raising tolerance extreme.
    id_up: f64,
    /// Ceiling and floor of gds over the box's tolerance extremes,
    /// siemens (λ > 0 only).
    gds_hi: f64,
    gds_lo: f64,
    /// λ > 0 only: `g_lo_up` and `g_hi_dn` with k folded at each VDS of
    /// the fold grid (vds_min to the span in even steps), the
    /// current ceiling and floor over every tolerance extreme (those of
    /// the gds bounds), and the ceiling of VS over them.
    g_lo_up_at: [f64; FOLDS],
    g_hi_dn_at: [f64; FOLDS],
    /// λ > 0 only, drain resistances, ohms: with RD at most
    /// `strong_rd[j]` VDS stays at or above the j-th VDS of the fold grid
    /// (the strong side's fold is at least j); with RD at least
    /// `weak_rd[j]` VDS stays at or below it (the weak side's fold is at
    /// most j).
    strong_rd: [f64; FOLDS],
    weak_rd: [f64; FOLDS],
    /// λ > 0 only, shelf indices of the drain resistor: `strong_from[j]`
    /// is the first whose strong-side fold is at most j, `weak_to[j]` the
    /// first whose weak-side fold is below j (both folds fall as RD
    /// rises).
    strong_from: [usize; FOLDS],
    weak_to: [usize; FOLDS],
    id_ceiling: f64,
    id_floor: f64,
    vs_ceiling: f64,
    vs_floor: f64,
    /// Floors of VS and of ID at the two tolerance extremes P and P' of
    /// the headroom bound.
    vs_at: [f64; 2],
    id_at: [f64; 2],
}

impl PerCase {
    /// λ > 0: the shelf indices whose strong-side fold is `j`, cut at
    /// index `capped` (the fold falls as RD rises: one run per fold).
    fn strong_run(&self, j: usize, capped: usize) -> std::ops::Range<usize> {
        let end = if j == 0 {
            usize::MAX
        } else {
            self.strong_from[j - 1]
        };
        self.strong_from[j]..end.min(capped)
    }

    /// λ > 0: the shelf indices whose weak-side fold is `j` of `n`, cut
    /// at index `capped`.
    fn weak_run(&self, j: usize, n: usize, capped: usize) -> std::ops::Range<usize> {
        let start = if j + 1 == n { 0 } else { self.weak_to[j + 1] };
        start..self.weak_to[j].min(capped)
    }
}

impl Case {
    /// Supply span, volts.
    pub(super) fn span(&self) -> f64 {
        self.rails.vdd_v - self.rails.vss_v
    }
}

pub(super) struct Bounds<'a> {
    /// Device corners × supply extremes.
    pub(super) cases: Vec<Case>,
    /// The shelf, ohms ascending (the drain resistor's choices).
    pub(super) rd_values: &'a [f64],
    /// The score's constants (the box bound is a score bound).
    pub(super) scorer: Scorer,
    pub(super) parts_floor: usize,
    /// Role of each position.
    pub(super) roles: &'static [Role],
    /// Smallest resistor tolerance on the shelf (the safe shift for bounds).
    pub(super) tol: f64,
    /// Largest resistor tolerance on the shelf.
    pub(super) tol_max: f64,
    pub(super) p: &'a Problem,
    pub(super) t: &'static dyn Topology,
    pub(super) rd: Option<usize>,
    pub(super) r_min: f64,
    pub(super) r_max: f64,
    pub(super) lambda_free: bool,
    /// The source axes whose resistors enter the gain (not bypassed).
    pub(super) src_axes: Vec<usize>,
    /// λ > 0: the points of the fold grid, at most [`FOLDS`].
    pub(super) folds: usize,
}

/// Scratch space of [`Bounds::bound`], one per thread that bounds boxes
/// (reused by every bound: a bound allocates nothing).
#[derive(Default)]
pub(super) struct Scratch {
    /// Per case, the figures of [`PerCase`].
    work: Vec<PerCase>,
    /// λ > 0 scan: per case, the envelopes of [`Envelope`].
    envelopes: Vec<Envelope>,
    /// λ > 0 scan: per case and fold, the gds ceiling of the strong side
    /// and floor of the weak side, siemens.
    fold_gds: Vec<[(f64, f64); FOLDS]>,
    /// The values of every position, ohms (the box's own are set by the
    /// bound).
    pub(super) v: Vec<f64>,
    /// The headroom lines of the drain-resistor scan: (VDS at RD = 0,
    /// volts; its fall per ohm of RD(1 + t), amps).
    pub(super) lines: Vec<(f64, f64)>,
}

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
struct Envelope {
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
    fn unknown() -> Envelope {
        Envelope {
            strong: [f64::NAN; FOLDS],
            weak: [f64::NAN; FOLDS],
            strong_known: 0,
            weak_known: usize::MAX,
        }
    }

    /// `strong[a]`, taking the missing entries up to it from `fold_min`
    /// (a fold's smallest strong bound).
    fn strong_to(&mut self, a: usize, mut fold_min: impl FnMut(usize) -> f64) -> f64 {
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
    fn weak_from(&mut self, b: usize, n: usize, mut fold_max: impl FnMut(usize) -> f64) -> f64 {
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

/// Saturation current, VGS, VS and gm at a point with the drain far above
/// everything (RD = 0 and a drain-fed gate fixed at the drain rail), for a
/// folded law: the current at every saturated point.
fn bias_at(t: &dyn Topology, v: &[f64], rails: &Rails, law: &SquareLaw) -> (f64, f64, f64, f64) {
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

impl Bounds<'_> {
    /// λ > 0: the VDS floor of every point with drain resistor `rd`,
    /// VDD − VS ceiling − RD(1 + t)·ID ceiling, at least vds_min; volts.
    fn vds_lo(&self, c: &PerCase, case: &Case, rd: f64) -> f64 {
        (case.rails.vdd_v - c.vs_ceiling - rd * (1.0 + self.tol_max) * c.id_ceiling)
            .max(self.p.spec.vds_min_v)
    }

    /// λ > 0: the VDS ceiling of every point with drain resistor `rd`,
    /// VDD − VS floor − RD(1 − t)·ID floor, at most the span; volts.
    fn vds_hi(&self, c: &PerCase, case: &Case, rd: f64) -> f64 {
        (case.rails.vdd_v - c.vs_floor - rd * (1.0 - self.tol_max) * c.id_floor).min(case.span())
    }

    /// λ > 0: the fold of the strong side with drain resistor `rd`: the
    /// last VDS of the fold grid at or below the VDS floor that RD leaves,
    /// VDD − VS ceiling − RD(1 + t)·ID ceiling (it falls as RD rises).
    fn fold_lo(&self, c: &PerCase, rd: f64) -> usize {
        // (`strong_rd` falls with j: the count of the leading j ≥ 1 with
        // RD up to it, by bisection.)
        c.strong_rd[1..self.folds].partition_point(|&x| rd <= x)
    }

    /// λ > 0: the fold of the weak side with drain resistor `rd`: the
    /// first VDS of the fold grid at or above the VDS ceiling that RD
    /// leaves, VDD − VS floor − RD(1 − t)·ID floor (it falls as RD rises).
    fn fold_hi(&self, c: &PerCase, rd: f64) -> usize {
        // (`weak_rd` falls with j: the first j with RD at least it, by
        // bisection; the top fold where there is none.)
        c.weak_rd[..self.folds - 1].partition_point(|&x| rd < x)
    }

    /// [`Bounds::bound`] with `v` (ohms, every position) copied into the
    /// scratch space first.
    pub(super) fn bound_with(
        &self,
        scratch: &mut Scratch,
        v: &[f64],
        axes: &[Axis],
        ranges: &[(usize, usize)],
    ) -> Option<Bound> {
        scratch.v.clear();
        scratch.v.extend_from_slice(v);
        self.bound(scratch, axes, ranges)
    }

    /// Optimistic metrics for every point of the box (each at least as good
    /// as any feasible point in it can reach), or `None` when no point of the
    /// box can be feasible. The values outside the box are those of
    /// `scratch.v` (ohms, every position).
    pub(super) fn bound(
        &self,
        scratch: &mut Scratch,
        axes: &[Axis],
        ranges: &[(usize, usize)],
    ) -> Option<Bound> {
        let Scratch {
            work,
            envelopes,
            fold_gds,
            v,
            lines,
        } = scratch;
        let v = &mut v[..];
        let p = self.p;
        let t = self.t;
        let s = &p.spec;
        let (lo, hi) = gain_window(s);
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
        let span = s.supply.vdd_v - s.supply.vss_v;
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
            if s.device
                .vgs_max_v
                .is_some_and(|m| vgs > m + SLACK * m.abs().max(1.0))
            {
                return None;
            }
            if s.limits.id_max_a.is_some_and(|m| id > m * (1.0 + SLACK)) {
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
            if id <= 0.0 {
                return None;
            }
            // The highest VGS: the most current with the smallest k.
            let vgs = if c.law.lambda_per_v == 0.0 {
                vgs_here
            } else {
                bias_at(t, v, &c.rails, &folded(&c.law, vds_floor)).1
            };
            if s.device
                .vgs_min_v
                .is_some_and(|m| vgs < m - SLACK * m.abs().max(1.0))
            {
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
        // With λ > 0 there is no proportionality, but the drain resistor is
        // still scanned, with gm and gds at their extremes (below).
        let lambda_scan = !self.lambda_free
            && self.rd.is_some()
            && (s.source_resistance_ohm == 0.0 || !t.input_at_source());
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
        // Headroom: VDS = VDD − VS − RD·ID must reach max(vds_min, vov).
        let mut rd_cap = f64::INFINITY;
        for i in 0..n {
            let room = cases[i].rails.vdd_v - w[i].vs_lo - vds_floor.max(w[i].vov_lo);
            if room < -SLACK * span {
                return None;
            }
            if w[i].id_lo > 0.0 {
                rd_cap = rd_cap.min(room.max(0.0) / w[i].id_lo);
            }
            // At both tolerance extremes P and P' VDS must still reach
            // vds_min.
            for j in 0..2 {
                let room = cases[i].rails.vdd_v - w[i].vs_at[j] - vds_floor + SLACK * span;
                if room < 0.0 {
                    return None;
                }
                if w[i].id_at[j] > 0.0 {
                    rd_cap = rd_cap.min(room / ((1.0 + self.tol) * w[i].id_at[j]));
                }
            }
        }
        if self.rd.is_some() && rd_cap < self.r_min * (1.0 - 1e-9) {
            return None;
        }
        let rd_floor = if self.rd.is_some() { self.r_min } else { 0.0 };
        let mut headroom_ub = f64::INFINITY;
        // The worst-case power is at least the power of any one corner, so
        // the largest of the per-corner current floors bounds it.
        let mut power_lb: f64 = 0.0;
        for i in 0..n {
            headroom_ub =
                headroom_ub.min(cases[i].rails.vdd_v - w[i].vs_lo - rd_floor * w[i].id_lo);
            // The current-raising tolerance extreme is a point of every
            // candidate's envelope.
            power_lb = power_lb.max(w[i].id_up * cases[i].power_span);
        }
        if s.limits
            .power_max_w
            .is_some_and(|m| power_lb > m * (1.0 + SLACK))
        {
            return None;
        }
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
        let slices = &slices[..n_slices];
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
