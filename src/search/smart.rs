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

use super::aid::{Crew, Spare};
use super::exhaustive::choices;
use super::{Collector, Shelf};
use crate::analysis::{
    all_pass, corners_only, gain_window, margins, quick, worst_case_of, Problem, WorstCase, SLACK,
};
use crate::device::SquareLaw;
use crate::rank::{Metrics, Scorer};
use crate::topology::{Gate, Rails, Role, SignalContext, Topology};
use std::sync::{Arc, OnceLock};

/// Divider pairs (R_top, R_bottom): all shelf pairs, or with `dominance`
/// only the largest placement of each ratio. With `zin_floor` > 0 pairs
/// whose parallel resistance is below it are dropped.
fn divider_pairs(shelf: &Shelf, zin_floor: f64, dominance: bool) -> Vec<(f64, f64)> {
    let all = &shelf.values;
    // R1∥R2 lies below both R1 and R2, so a pair that reaches the floor
    // has both values at or above it: the values below it are skipped.
    let first = all.partition_point(|&r| r < zin_floor * (1.0 - SLACK));
    let vals = &all[first..];
    // The ratio's key: ln(R2/R1) to 1e-9, from a table of logarithms.
    let logs: Vec<f64> = vals.iter().map(|r| r.ln()).collect();
    // A pair whose two values are both on the shelf ten times larger too
    // has that placement above it (the same ratio, exactly): the largest
    // placement of a ratio has a member without a tenfold on the shelf, so
    // only those pairs need the map.
    let tenfold: Vec<bool> = vals
        .iter()
        .map(|&r| {
            let x = 10.0 * r;
            let i = all.partition_point(|&v| v < x * (1.0 - 1e-12));
            i < all.len() && (all[i] / x - 1.0).abs() < 1e-12
        })
        .collect();
    // The values without a tenfold (indices into `vals`).
    let tops: Vec<usize> = (0..vals.len()).filter(|&j| !tenfold[j]).collect();
    let every: Vec<usize> = (0..vals.len()).collect();
    let kept = |i: usize, j: usize| {
        zin_floor <= 0.0 || vals[i] * vals[j] / (vals[i] + vals[j]) >= zin_floor * (1.0 - SLACK)
    };
    if !dominance {
        let mut out = Vec::new();
        for i in 0..vals.len() {
            out.extend(
                (0..vals.len())
                    .filter(|&j| kept(i, j))
                    .map(|j| (vals[i], vals[j])),
            );
        }
        return out;
    }
    // (ratio key, R1, R2) of every candidate (a member without a tenfold),
    // then the largest R1 of each key (the first in ascending R2 on a tie:
    // the pick does not depend on the order within a key).
    let mut keyed: Vec<(i64, f64, f64)> = Vec::new();
    for i in 0..vals.len() {
        let partners = if tenfold[i] { &tops } else { &every };
        keyed.extend(
            partners
                .iter()
                .filter(|&&j| kept(i, j))
                .map(|&j| (((logs[j] - logs[i]) * 1e9).round() as i64, vals[i], vals[j])),
        );
    }
    // Sorted by key alone (the R2/R1 order, which is also nearly the
    // gate-voltage order the caller sorts by next), by radix: the keys are
    // integers.
    radsort::sort_by_key(&mut keyed, |x| x.0);
    keyed
        .chunk_by(|a, b| a.0 == b.0)
        .map(|same| {
            let best = same.iter().fold(same[0], |b, x| {
                if x.1 > b.1 || (x.1 == b.1 && x.2 < b.2) {
                    *x
                } else {
                    b
                }
            });
            (best.1, best.2)
        })
        .collect()
}

/// The divider pairs of one search run, kept per (Zin floor, dominance):
/// several topologies use the same list, and on a long shelf building it
/// takes milliseconds. Each list is sorted by the divider ratio
/// R2/(R1 + R2), then R1, so that the gate-voltage sort of each topology,
/// which moves with the ratio, runs over nearly sorted input.
#[derive(Default)]
pub(crate) struct PairCache {
    lists: std::sync::Mutex<Vec<(PairKey, Arc<OnceLock<PairList>>)>>,
}

/// Divider pairs (R_top, R_bottom), ohms.
type PairList = Arc<Vec<(f64, f64)>>;

/// The Zin floor's bits and the dominance flag of a pair list.
type PairKey = (u64, bool);

impl PairCache {
    /// The pairs of `shelf` for `zin_floor` (ohms) and `dominance`, built
    /// on first use (see [`divider_pairs`]).
    fn pairs(&self, shelf: &Shelf, zin_floor: f64, dominance: bool) -> PairList {
        let key = (zin_floor.to_bits(), dominance);
        let slot = {
            let mut lists = self.lists.lock().unwrap_or_else(|e| e.into_inner());
            match lists.iter().find(|(k, _)| *k == key) {
                Some((_, slot)) => Arc::clone(slot),
                None => {
                    let slot = Arc::new(OnceLock::new());
                    lists.push((key, Arc::clone(&slot)));
                    slot
                }
            }
        };
        // Built outside the lock: another list can be built meanwhile.
        let list = slot.get_or_init(|| {
            let mut pairs = divider_pairs(shelf, zin_floor, dominance);
            let ratio = |&(r1, r2): &(f64, f64)| r2 / (r1 + r2);
            pairs.sort_unstable_by(|x, y| ratio(x).total_cmp(&ratio(y)).then(x.0.total_cmp(&y.0)));
            Arc::new(pairs)
        });
        Arc::clone(list)
    }
}

/// One axis of the box: the positions it sets and its options, sorted so
/// that a higher index means a higher gate voltage (`gate_axis`) or a
/// larger source resistance.
struct Axis {
    positions: Vec<usize>,
    /// The options' values, `positions.len()` per option, one after
    /// another (one allocation for the whole axis).
    options: Vec<f64>,
    gate_axis: bool,
    /// A logarithmic measure of each option (of the gate voltage, or of
    /// the resistance), ascending: the box is split along the axis whose
    /// range spans the most of it, not the most options.
    scale: Vec<f64>,
    /// For a divider that sets Zin: its Zin tables (range extremes for the
    /// Zin bounds of a box).
    zin: Option<ZinTable>,
}

/// Values with their (min, max) over blocks of [`BLOCK`]: the extremes
/// over any index range in a few steps.
struct Ranged {
    v: Vec<f64>,
    blocks: Vec<(f64, f64)>,
}

impl Ranged {
    fn new(v: Vec<f64>) -> Ranged {
        let blocks = v
            .chunks(BLOCK)
            .map(|c| {
                c.iter()
                    .fold((f64::INFINITY, 0.0f64), |(l, h), &x| (l.min(x), h.max(x)))
            })
            .collect();
        Ranged { v, blocks }
    }

    /// Smallest and largest value over indices `s..e` (the values are
    /// finite: plain comparisons).
    fn range(&self, s: usize, e: usize) -> (f64, f64) {
        let take = |(lo, hi): (f64, f64), (a, b): (f64, f64)| {
            (if a < lo { a } else { lo }, if b > hi { b } else { hi })
        };
        let each = |r: (f64, f64), v: &[f64]| v.iter().fold(r, |r, &x| take(r, (x, x)));
        let empty = (f64::INFINITY, 0.0f64);
        // Whole blocks `b0..b1` inside the range, single values around them.
        let (b0, b1) = (s.div_ceil(BLOCK), e / BLOCK);
        if b0 >= b1 {
            return each(empty, &self.v[s..e]);
        }
        let r = each(empty, &self.v[s..b0 * BLOCK]);
        let r = self.blocks[b0..b1].iter().fold(r, |r, &b| take(r, b));
        each(r, &self.v[b1 * BLOCK..e])
    }
}

/// The Zin of each divider option: nominal (R1∥R2); at the tap-up
/// tolerance extreme its floor, R1(1 − t_max)∥R2(1 + t_min); at the
/// tap-down extreme its ceiling, R1(1 + t_max)∥R2(1 − t_min) (Zin rises
/// with each resistor, and each part's tolerance lies in [t_min, t_max]).
struct ZinTable {
    nominal: Ranged,
    up: Ranged,
    down: Ranged,
}

/// Block length of the range-maximum table.
const BLOCK: usize = 64;

impl Axis {
    /// Number of options.
    fn len(&self) -> usize {
        self.options.len() / self.positions.len()
    }

    /// The values of option `j`, one per position, ohms.
    fn option(&self, j: usize) -> &[f64] {
        let w = self.positions.len();
        &self.options[j * w..(j + 1) * w]
    }

    /// Smallest and largest nominal Zin over the options `s..e` (None when
    /// Zin is not set here).
    fn zin_range(&self, s: usize, e: usize) -> Option<(f64, f64)> {
        Some(self.zin.as_ref()?.nominal.range(s, e))
    }

    /// Option `i`'s Zin: nominal, its floor at the tap-up extreme and its
    /// ceiling at the tap-down extreme (the axis must set Zin).
    fn zin_at(&self, i: usize) -> (f64, f64, f64) {
        self.zin.as_ref().map_or((0.0, 0.0, f64::INFINITY), |z| {
            (z.nominal.v[i], z.up.v[i], z.down.v[i])
        })
    }

    /// Over the options `s..e`: the smallest Zin at the tap-up extreme and
    /// the largest at the tap-down extreme.
    fn zin_tilted(&self, s: usize, e: usize) -> Option<(f64, f64)> {
        let z = self.zin.as_ref()?;
        Some((z.up.range(s, e).0, z.down.range(s, e).1))
    }
}

/// The smallest and the largest resistor tolerance on the shelf.
fn tolerance_span(shelf: &Shelf) -> (f64, f64) {
    let t = &shelf.tolerances;
    (
        t.iter().copied().fold(f64::INFINITY, f64::min).max(0.0),
        t.iter().copied().fold(0.0, f64::max),
    )
}

/// The square law with λ folded into k at a given VDS (λ then 0): with
/// VDS inside `[vds_lo, vds_hi]` the true current lies between the two.
fn folded(law: &SquareLaw, vds_v: f64) -> SquareLaw {
    SquareLaw {
        vto_v: law.vto_v,
        k_a_per_v2: law.k_a_per_v2 * (1.0 + law.lambda_per_v * vds_v.max(0.0)),
        lambda_per_v: 0.0,
    }
}

/// Move the bias resistors: the divider tap up by `tap` (R_top times
/// 1 − tap, R_bottom times 1 + tap; a negative `tap` moves it down) and
/// every source resistor times `src`.
fn tilt(v: &mut [f64], roles: &[Role], tap: f64, src: f64) {
    for (x, r) in v.iter_mut().zip(roles) {
        match r {
            Role::DivTop => *x *= 1.0 - tap,
            Role::DivBottom => *x *= 1.0 + tap,
            Role::Source => *x *= src,
            _ => {}
        }
    }
}

/// Move every bias resistor to the tolerance extreme that raises (`up`) or
/// lowers the drain current: the divider tap up or down, the source
/// resistors down or up.
fn shift(v: &mut [f64], roles: &[Role], tol: f64, up: bool) {
    if up {
        tilt(v, roles, tol, 1.0 - tol);
    } else {
        tilt(v, roles, -tol, 1.0 + tol);
    }
}

/// Lower bound of the |gain| ratio that the RD tolerance alone adds, for
/// any RD up to `rd_max`: `R'(RD(1+t)) / R'(RD(1−t))` with `R' = RD∥RL`
/// falls as RD grows.
fn rd_ratio(rd_max: f64, rl: f64, tol: f64) -> f64 {
    let par = |a: f64, b: f64| a * b / (a + b);
    if !rd_max.is_finite() {
        return 1.0;
    }
    par(rd_max * (1.0 + tol), rl) / par(rd_max * (1.0 - tol), rl)
}

/// Optimistic metrics from a lower bound of the corner-to-corner |gain|
/// ratio: the worst-corner gain error is at least (ρ − 1)/(ρ + 1) (the best
/// placement of the window) and the spread at least (ρ − 1)·lo/gain.
fn optimistic(
    s: &crate::spec::ValidSpec,
    ratio: f64,
    headroom_v: f64,
    power_w: f64,
    zin_ratio: f64,
    parts: usize,
) -> Metrics {
    let (lo, _) = gain_window(s);
    Metrics {
        gain_error: (ratio - 1.0) / (ratio + 1.0),
        gain_spread: (ratio - 1.0) * lo / s.target.gain,
        headroom_v,
        id_max_a: 0.0,
        power_w,
        zin_ratio,
        parts,
    }
}

/// `a ∥ b`, ohms (an infinite `b` leaves `a`).
fn par2(a: f64, b: f64) -> f64 {
    if b.is_infinite() {
        a
    } else {
        a * b / (a + b)
    }
}

/// The |gain| model of one box for λ = 0, where |gain| = A·(RD∥RL) with
/// A fixed by the bias: `strong` is a lower bound of the largest A over
/// the corners and the current-raising tolerance extreme, `weak` an upper
/// bound of the smallest A at the other extreme, both for every point of
/// the box. With RD at its own tolerance extremes every candidate then has
/// a point with |gain| at least `strong·R'(RD(1+t))` and one with at most
/// `weak·R'(RD(1−t))`.
struct Proportional {
    strong: f64,
    weak: f64,
    tol: f64,
    rl: f64,
}

impl Proportional {
    /// (some point's |gain| is at least, some point's at most), V/V.
    fn gains(&self, rd: f64) -> (f64, f64) {
        (
            self.strong * par2(rd * (1.0 + self.tol), self.rl),
            self.weak * par2(rd * (1.0 - self.tol), self.rl),
        )
    }
}

/// Lower bounds of the worst-corner gain error and of the gain spread from
/// the two |gain| bounds of [`scan_rd`], fractions of the target `g`.
fn gain_terms(strong: f64, weak: f64, g: f64) -> (f64, f64) {
    (
        ((strong - g).max(g - weak)).max(0.0) / g,
        (strong - weak).max(0.0) / g,
    )
}

/// The drain resistor scanned over the shelf for one box. `gains(RD)`
/// gives (a |gain| some point of every candidate reaches at least, one
/// some point reaches at most), both rising with RD; `metrics(RD, error,
/// spread)` the optimistic metrics with that RD. The window is the run of
/// shelf values that can keep every point inside `[lo, hi]` with RD at
/// most `rd_cap` (`gains` is only asked for RDs up to it). For a single
/// configuration the window and every RD's score bound in it are kept;
/// otherwise the scan stops past the bottom of the error's V (the strong
/// side binds), where a larger RD only worsens error, spread and
/// headroom, or at the window's end. `None` when no RD can work. The
/// metrics' power, Zin and parts must not depend on RD: their part of the
/// score is taken once.
#[allow(clippy::too_many_arguments)]
fn scan_rd(
    values: &[f64],
    (lo, hi): (f64, f64),
    g: f64,
    rd_cap: f64,
    single: bool,
    mut gains: impl FnMut(f64) -> (f64, f64),
    mut metrics: impl FnMut(f64, f64, f64) -> Metrics,
    scorer: &Scorer,
) -> Option<Bound> {
    // (Only RDs up to the cap are probed: `gains` need not hold above.)
    let capped = values.partition_point(|&x| x <= rd_cap * (1.0 + 1e-9));
    let first = first_true(capped, |j| gains(values[j]).1 >= lo * (1.0 - SLACK));
    let above = |strong: f64| strong > hi * (1.0 + SLACK);
    // A box needs no window (only a single configuration's is used): its
    // scan stops where the strong side first passes `hi`, the window's end.
    let window = if single {
        let last = first_true(capped, |j| above(gains(values[j]).0));
        Some((first.min(last), last))
    } else {
        None
    };
    let mut best: Option<f64> = None;
    let mut rd_scores = Vec::new();
    let mut fixed = None;
    let end = window.map_or(capped, |w| w.1);
    for &x in &values[window.map_or(first, |w| w.0)..end] {
        let (strong, weak) = gains(x);
        if !single && above(strong) {
            break;
        }
        let (err, spread) = gain_terms(strong, weak, g);
        let m = metrics(x, err, spread);
        let sc = scorer.gain_and_room(&m) + *fixed.get_or_insert_with(|| scorer.fixed(&m));
        if single {
            rd_scores.push(sc);
        }
        if best.is_none_or(|b| sc > b) {
            best = Some(sc);
        }
        if !single && strong - g >= g - weak {
            break;
        }
    }
    best.map(|score| Bound {
        score,
        rd_window: window,
        rd_scores,
    })
}

/// Source points (combinations of the options of the source axes inside
/// the gain) up to which a box bounds each on its own.
const SOURCE_POINTS: usize = 16;

/// Slices of a box's Zin range bounded on their own where a source
/// resistance makes Zin enter the gain.
const ZIN_SLICES: usize = 6;

/// Divider pairs up to which a box bounds each pair's Zin on its own there
/// (at least [`ZIN_SLICES`]).
const ZIN_POINTS: usize = 16;

/// Most VDS points (vds_min to the span, even steps) at which λ > 0
/// bounds fold k, so the gm bounds of each drain resistor can use the VDS
/// range that resistor leaves. A search uses one point per
/// [`SHELF_PER_FOLD`] shelf values, from 8 to this many: a fold's gm and
/// gds bounds hold over all of its drain resistors, so a long shelf
/// (E96 over 1 Ω–10 MΩ: 673 values) needs finer folds, while each point
/// costs two solves per case in every bound. (Measured on the examples
/// with λ = 0.02: on E24 shelves 8 points were fastest; on E96 over
/// 1 Ω–10 MΩ 16–32 points took 2–3× fewer bounds and half the time of 8.)
const FOLDS: usize = 24;

/// Shelf values per point of the fold grid (see [`FOLDS`]).
const SHELF_PER_FOLD: usize = 32;

/// The points of the fold grid: `set` taken into 2..=[`FOLDS`], or else
/// one per [`SHELF_PER_FOLD`] of the shelf's `values`, 8 to [`FOLDS`].
fn fold_points(set: Option<usize>, values: usize) -> usize {
    match set {
        Some(n) => n.clamp(2, FOLDS),
        None => (values / SHELF_PER_FOLD).clamp(8, FOLDS),
    }
}

/// The `j`-th VDS of a fold grid of `n` points, volts: vds_min to the
/// span in even steps.
fn fold_vds(j: usize, n: usize, vds_min: f64, span: f64) -> f64 {
    vds_min + j as f64 / (n - 1) as f64 * (span - vds_min)
}

/// Most source resistors of any topology (a unit test checks the registry).
const MAX_SOURCES: usize = 2;

/// The `i`-th combination of the options of the source axes with index
/// ranges `ranges` (mixed radix, the first axis fastest).
fn source_point(ranges: impl Iterator<Item = (usize, usize)>, i: usize) -> [usize; MAX_SOURCES] {
    let mut pt = [0usize; MAX_SOURCES];
    let mut rest = i;
    for (slot, r) in ranges.enumerate() {
        pt[slot] = r.0 + rest % (r.1 - r.0);
        rest /= r.1 - r.0;
    }
    pt
}

/// The better of two bounds of parts of one box: the higher score, the
/// drain resistor window spanning both. (A single configuration has one
/// part, so its per-RD scores are never merged.)
fn best_of(acc: Option<Bound>, b: Bound) -> Option<Bound> {
    let Some(a) = acc else {
        return Some(b);
    };
    let window = match (a.rd_window, b.rd_window) {
        (Some(x), Some(y)) => Some((x.0.min(y.0), x.1.max(y.1))),
        (x, y) => x.or(y),
    };
    let mut keep = if b.score > a.score { b } else { a };
    keep.rd_window = window;
    Some(keep)
}

/// Adds the line `a − b·x` (for x ≥ 0) to `lines` unless one there starts
/// no higher and falls no slower (it is then never above the new one, also
/// after rounding: rounded products and differences keep both orders), and
/// drops those the new one is never above. The least value over `lines` at
/// any x ≥ 0 is then that over every line added, to the bit.
fn add_lowest(lines: &mut Vec<(f64, f64)>, (a, b): (f64, f64)) {
    if lines.iter().any(|&(a2, b2)| a2 <= a && b2 >= b) {
        return;
    }
    lines.retain(|&(a2, b2)| !(a <= a2 && b >= b2));
    lines.push((a, b));
}

/// The bound of one box.
struct Bound {
    /// The score of optimistic metrics (no point of the box does better on
    /// any of them): no point of the box scores higher.
    score: f64,
    /// For a single configuration whose drain resistor was scanned: shelf
    /// indices `[first, last)` of the drain resistors that can work.
    rd_window: Option<(usize, usize)>,
    /// For a single configuration: the score bound of each drain resistor
    /// in the window (empty otherwise).
    rd_scores: Vec<f64>,
}

/// One device corner at one supply extreme: every bound is taken over
/// these, each of which the full check evaluates.
struct Case {
    law: SquareLaw,
    rails: Rails,
    /// Drain rail minus source rail of the bias network, volts (the
    /// supply power is the drain current times it).
    power_span: f64,
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
    fn span(&self) -> f64 {
        self.rails.vdd_v - self.rails.vss_v
    }
}

struct Bounds<'a> {
    /// Device corners × supply extremes.
    cases: Vec<Case>,
    /// The shelf, ohms ascending (the drain resistor's choices).
    rd_values: &'a [f64],
    /// The score's constants (the box bound is a score bound).
    scorer: Scorer,
    parts_floor: usize,
    /// Role of each position.
    roles: &'static [Role],
    /// Smallest resistor tolerance on the shelf (the safe shift for bounds).
    tol: f64,
    /// Largest resistor tolerance on the shelf.
    tol_max: f64,
    p: &'a Problem,
    t: &'static dyn Topology,
    rd: Option<usize>,
    r_min: f64,
    r_max: f64,
    lambda_free: bool,
    /// The source axes whose resistors enter the gain (not bypassed).
    src_axes: Vec<usize>,
    /// λ > 0: the points of the fold grid, at most [`FOLDS`].
    folds: usize,
}

/// Scratch space of [`Bounds::bound`], one per thread that bounds boxes
/// (reused by every bound: a bound allocates nothing).
#[derive(Default)]
struct Scratch {
    /// Per case, the figures of [`PerCase`].
    work: Vec<PerCase>,
    /// λ > 0 scan: per case, the envelopes of [`Envelope`].
    envelopes: Vec<Envelope>,
    /// λ > 0 scan: per case and fold, the gds ceiling of the strong side
    /// and floor of the weak side, siemens.
    fold_gds: Vec<[(f64, f64); FOLDS]>,
    /// The values of every position, ohms (the box's own are set by the
    /// bound).
    v: Vec<f64>,
    /// The headroom lines of the drain-resistor scan: (VDS at RD = 0,
    /// volts; its fall per ohm of RD(1 + t), amps).
    lines: Vec<(f64, f64)>,
}

/// λ > 0, one case of one cell: across the folds of the fold grid the
/// gain bounds can step down as RD rises (a lower fold, a smaller gm
/// bound). `strong[j]` is the smallest strong-side bound over the RDs of
/// folds 0..=j, `weak[j]` the largest weak-side bound over those of folds
/// j.. (each fold's RDs form one run, inside which the bound rises), so
/// that the bounds taken with them rise with RD. NaN marks a value not
/// taken yet: each is taken when first needed.
#[derive(Debug, Clone, Copy, Default)]
struct Envelope {
    strong: [f64; FOLDS],
    weak: [f64; FOLDS],
}

impl Envelope {
    /// No value taken yet.
    fn unknown() -> Envelope {
        Envelope {
            strong: [f64::NAN; FOLDS],
            weak: [f64::NAN; FOLDS],
        }
    }

    /// `strong[a]`, taking the missing entries up to it from `fold_min`
    /// (a fold's smallest strong bound).
    fn strong_to(&mut self, a: usize, mut fold_min: impl FnMut(usize) -> f64) -> f64 {
        let mut m = f64::INFINITY;
        for (j, slot) in self.strong.iter_mut().enumerate().take(a + 1) {
            if slot.is_nan() {
                *slot = m.min(fold_min(j));
            }
            m = *slot;
        }
        m
    }

    /// `weak[b]`, taking the missing entries from the top fold (of `n`)
    /// down to it from `fold_max` (a fold's largest weak bound).
    fn weak_from(&mut self, b: usize, n: usize, mut fold_max: impl FnMut(usize) -> f64) -> f64 {
        let mut m = 0.0f64;
        for j in (b..n).rev() {
            if self.weak[j].is_nan() {
                self.weak[j] = m.max(fold_max(j));
            }
            m = self.weak[j];
        }
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
        (1..self.folds)
            .take_while(|&j| rd <= c.strong_rd[j])
            .count()
    }

    /// λ > 0: the fold of the weak side with drain resistor `rd`: the
    /// first VDS of the fold grid at or above the VDS ceiling that RD
    /// leaves, VDD − VS floor − RD(1 − t)·ID floor (it falls as RD rises).
    fn fold_hi(&self, c: &PerCase, rd: f64) -> usize {
        (0..self.folds - 1)
            .find(|&j| rd >= c.weak_rd[j])
            .unwrap_or(self.folds - 1)
    }

    /// [`Bounds::bound`] with `v` (ohms, every position) copied into the
    /// scratch space first.
    fn bound_with(
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
    fn bound(
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
        let gain_at_g = |v: &mut [f64], gm: f64, gds: f64, rd: f64, pick: &[usize], mult: f64| {
            for (&ai, &j) in src_axes.iter().zip(pick) {
                for (k, &pos) in axes[ai].positions.iter().enumerate() {
                    v[pos] = axes[ai].option(j)[k] * mult;
                }
            }
            if let Some(k) = self.rd {
                v[k] = rd;
            }
            let ctx = SignalContext {
                gm_s: gm,
                gds_s: gds,
                rl_ohm: s.rl_ohm,
                rsig_ohm: s.source_resistance_ohm,
            };
            let ss = t.small_signal(v, &ctx);
            (ss.av.abs(), ss.zin_ohm, ss.zout_ohm)
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
            let z = gain_at_m(v, w[0].g_hi_dn, r0, &extremes[0], 1.0).2;
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
            let a = gain_at_m(v, w[0].g_hi_dn, r0, &extremes[0], 1.0).0;
            let b = gain_at_m(v, w[0].g_hi_dn, 2.0 * r0, &extremes[0], 1.0).0;
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
                        ub = ub.max(gain_at(v, c.g_hi, rd_best, cmb).0);
                    }
                    if need_zin && self.lambda_free {
                        zin_ub = zin_ub.max(gain_at(v, c.g_lo, rd_best, cmb).1);
                    } else if need_zin {
                        // With gds > 0 Zin rises with RD∥RL too (RD up at
                        // most its cap times 1 + t) and is monotone in gds:
                        // both ends of its range.
                        let rd_up = rd_best * (1.0 + self.tol_max);
                        for gds in [c.gds_lo, c.gds_hi] {
                            zin_ub = zin_ub.max(gain_at_g(v, c.g_lo, gds, rd_up, cmb, 1.0).1);
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
                        .any(|cmb| gain_at(v, w[i].g_hi, rd, cmb).0 >= lo * (1.0 - SLACK))
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
                    .map(|cmb| gain_at_g(v, c.g_hi_dn, gds, 0.0, cmb, 1.0 + self.tol).2)
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
                        lb = lb.min(gain_at_m(v, g_strong, rd_ref, cmb, dn).0);
                        ub = ub.max(gain_at_m(v, g_weak, rd_ref, cmb, up).0);
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
                            lb_i = lb_i.min(gain_at_g(v, c.g_lo_up, gds, rd_ref, cmb, dn).0);
                            ub_i = ub_i.max(gain_at_g(v, c.g_hi_dn, gds, rd_ref, cmb, up).0);
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
                        |x| model.gains(x),
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
                        let mut up = gain_at_g(v, g_floor, gds_hi, x_up, cmb, 1.0 - tol).0;
                        if both_gds {
                            // |gain| is monotone in gds (a ratio of linear
                            // terms) but its direction is not known here.
                            up = up.min(gain_at_g(v, g_floor, c.gds_lo, x_up, cmb, 1.0 - tol).0);
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
                        let mut dn = gain_at_g(v, g_ceiling, gds_lo, x_dn, cmb, 1.0 + tol).0;
                        if both_gds {
                            dn = dn.max(gain_at_g(v, g_ceiling, c.gds_hi, x_dn, cmb, 1.0 + tol).0);
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
                let mut gains = |x: f64| {
                    let (mut strong, mut weak) = (0.0f64, f64::INFINITY);
                    for (i, c) in w.iter().enumerate() {
                        let (a, b) = (self.fold_lo(c, x), self.fold_hi(c, x));
                        let mut lb = strong_at(v, i, x, a, group);
                        if a > 0 {
                            lb = lb.min(envelopes[i].strong_to(a - 1, |j| fold_min(v, i, j)));
                        }
                        let mut ub = weak_at(v, i, x, b, group);
                        if b + 1 < self.folds {
                            ub = ub.max(
                                envelopes[i].weak_from(b + 1, self.folds, |j| fold_max(v, i, j)),
                            );
                        }
                        strong = strong.max(lb * share_lo);
                        weak = weak.min(ub * share_hi);
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

/// A lower bound, ohms, of the smallest resistance in `[lo, hi]` at which
/// `reach` (false → true as the resistance rises) holds: `lo` when it holds
/// there, else bisection in ln R for at most `steps` halvings or until the
/// bracket is narrower than `width` (in ln R). The lower end is returned,
/// so the answer never overshoots.
fn smallest_reaching(
    lo: f64,
    hi: f64,
    steps: usize,
    width: f64,
    mut reach: impl FnMut(f64) -> bool,
) -> f64 {
    let (mut a, mut b) = (lo.ln(), hi.ln());
    if reach(lo) {
        return lo;
    }
    for _ in 0..steps {
        if b - a < width {
            break;
        }
        let m = 0.5 * (a + b);
        if reach(m.exp()) {
            b = m;
        } else {
            a = m;
        }
    }
    a.exp()
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
        let dominance = !(zin_from_divider && rsig > 0.0);
        let list = match col.pairs {
            Some(cache) => cache.pairs(shelf, floor, dominance),
            None => Arc::new(divider_pairs(shelf, floor, dominance)),
        };
        let mut pairs: Vec<(f64, f64, f64)> = list
            .iter()
            .map(|&(r1, r2)| {
                v[a] = r1;
                v[b] = r2;
                let vg = match t.bias(&v, &p.rails).gate {
                    Gate::Fixed(x) => x,
                    Gate::FromDrain => 0.0,
                };
                (vg, r1, r2)
            })
            .collect();
        // (VG, R1) orders the pairs totally: R1 and VG fix R2.
        pairs.sort_unstable_by(|x, y| x.0.total_cmp(&y.0).then(x.1.total_cmp(&y.1)));
        let floor_v = 0.01 * p.spec.supply.vdd_v.abs().max(1e-3);
        // (Every VG at or below 0 V has the same measure: on a divider
        // that feeds a negative gate, the whole list; a long list when the
        // divider does not set Zin.)
        let floor_ln = floor_v.ln();
        let scale: Vec<f64> = pairs
            .iter()
            .map(|x| {
                if x.0 > 0.0 {
                    (x.0 + floor_v).ln()
                } else {
                    floor_ln
                }
            })
            .collect();
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
                scale: opts.iter().map(|x| (x + r0).ln()).collect(),
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
                scale: opts.iter().map(|x| x.min(full).ln()).collect(),
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

/// Most axes a box has: the divider, the source resistors and a gate
/// resistor (no topology has all three; see the test).
const MAX_AXES: usize = 1 + MAX_SOURCES;

/// A box waiting in the branch-and-bound queue.
struct Node {
    /// Index range `[start, end)` on each axis (the first `axes.len()`
    /// are used; a fixed array, so a box allocates nothing).
    ranges: [(usize, usize); MAX_AXES],
    /// A single configuration's drain resistor window, when the bound
    /// scanned it.
    rd_window: Option<(usize, usize)>,
    /// Score bound of each drain resistor in the window (single
    /// configurations only).
    rd_scores: Vec<f64>,
}

/// A queue entry: the box's score bound, its order of creation and its
/// slot in the queue's arena (the heap moves these 24 bytes, not boxes).
struct Queued {
    /// Score of the box's optimistic metrics.
    score: f64,
    /// Order of creation (ties go to the older box: deterministic).
    seq: u64,
    slot: usize,
}

impl PartialEq for Queued {
    fn eq(&self, o: &Self) -> bool {
        self.cmp(o) == std::cmp::Ordering::Equal
    }
}
impl Eq for Queued {}
impl PartialOrd for Queued {
    fn partial_cmp(&self, o: &Self) -> Option<std::cmp::Ordering> {
        Some(self.cmp(o))
    }
}
impl Ord for Queued {
    fn cmp(&self, o: &Self) -> std::cmp::Ordering {
        self.score.total_cmp(&o.score).then(o.seq.cmp(&self.seq))
    }
}

/// The boxes of the queue, best bound first, in slots reused once taken.
struct Queue {
    heap: std::collections::BinaryHeap<Queued>,
    slots: Vec<Node>,
    free: Vec<usize>,
    seq: u64,
}

impl Queue {
    fn new() -> Queue {
        Queue {
            heap: std::collections::BinaryHeap::new(),
            slots: Vec::new(),
            free: Vec::new(),
            seq: 0,
        }
    }

    fn push(&mut self, score: f64, node: Node) {
        let slot = match self.free.pop() {
            Some(i) => {
                self.slots[i] = node;
                i
            }
            None => {
                self.slots.push(node);
                self.slots.len() - 1
            }
        };
        self.heap.push(Queued {
            score,
            seq: self.seq,
            slot,
        });
        self.seq += 1;
    }

    /// The best box and its score bound; its slot is free again.
    fn pop(&mut self) -> Option<(f64, Node)> {
        let q = self.heap.pop()?;
        self.free.push(q.slot);
        let node = std::mem::replace(
            &mut self.slots[q.slot],
            Node {
                ranges: [(0, 0); MAX_AXES],
                rd_window: None,
                rd_scores: Vec::new(),
            },
        );
        Some((q.score, node))
    }
}

/// Branch and bound over the box, best bound first: the box with the
/// highest score bound is split next, so good designs come early and raise
/// the entry threshold, and the search ends when the best waiting bound is
/// below it (no box left can hold a design that would be kept).
fn branch<'env>(
    col: &mut Collector<'_>,
    b: &'env Bounds<'_>,
    axes: &'env [Axis],
    root: (f64, Node),
    v: &mut [f64],
    shelf: &Shelf,
    help: &mut Help<'_, 'env>,
) {
    // The box holds every part but the drain resistor (drain feedback,
    // which has no box, never branches).
    let run_k = b.rd;
    let n_axes = axes.len();
    let mut queue = Queue::new();
    queue.push(root.0, root.1);
    let mut space = Scratch::default();
    // The axis to split a box along: the one whose range spans the widest
    // logarithmic range (None for a single configuration).
    let widest = |ranges: &[(usize, usize)]| {
        (0..ranges.len())
            .filter(|&i| ranges[i].1 - ranges[i].0 > 1)
            .max_by(|&i, &j| {
                let w = |k: usize| axes[k].scale[ranges[k].1 - 1] - axes[k].scale[ranges[k].0];
                w(i).total_cmp(&w(j))
                    .then((ranges[i].1 - ranges[i].0).cmp(&(ranges[j].1 - ranges[j].0)))
                    .then(j.cmp(&i))
            })
    };
    let mut batch: Vec<Node> = Vec::with_capacity(BATCH);
    let mut popped = 0usize;
    let mut halves: Vec<[(usize, usize); MAX_AXES]> = Vec::with_capacity(2 * BATCH);
    loop {
        // The best boxes waiting, up to BATCH of them, while they can beat
        // the threshold.
        batch.clear();
        let size = (popped / GROWTH).clamp(1, BATCH);
        while batch.len() < size {
            match queue.pop() {
                Some((score, node)) if score >= col.threshold() => batch.push(node),
                _ => break,
            }
        }
        popped += batch.len();
        if batch.is_empty() {
            return;
        }
        // Both halves of every box to split, bounded together (by two
        // threads when a helper is free; the results are the same).
        halves.clear();
        for node in &batch {
            if let Some(i) = widest(&node.ranges[..n_axes]) {
                let (s, e) = node.ranges[i];
                let mid = s + (e - s) / 2;
                for half in [(s, mid), (mid, e)] {
                    let mut r = node.ranges;
                    r[i] = half;
                    halves.push(r);
                }
            }
        }
        let bounded: Vec<Option<Bound>> = match help.crew(b, axes, n_axes, halves.len()) {
            Some(crew) => crew.run(&v.to_vec(), &halves, |v, r| {
                b.bound_with(&mut space, v, axes, &r[..n_axes])
            }),
            None => halves
                .iter()
                .map(|r| b.bound_with(&mut space, v, axes, &r[..n_axes]))
                .collect(),
        };
        // In the order popped: single configurations are visited (which
        // may raise the threshold), the halves that can still beat it wait.
        let mut bounded = halves.iter().zip(bounded);
        for node in batch.drain(..) {
            let ranges = &node.ranges[..n_axes];
            if widest(ranges).is_some() {
                for (r, bd) in bounded.by_ref().take(2) {
                    col.effort.corner_checks += 1;
                    let Some(bd) = bd else {
                        continue;
                    };
                    let score = bd.score;
                    if score >= col.threshold() {
                        queue.push(
                            score,
                            Node {
                                ranges: *r,
                                rd_window: bd.rd_window,
                                rd_scores: bd.rd_scores,
                            },
                        );
                    }
                }
                continue;
            }
            for (a, r) in axes.iter().zip(ranges) {
                for (k, &pos) in a.positions.iter().enumerate() {
                    v[pos] = a.option(r.0)[k];
                }
            }
            col.effort.configurations += 1;
            match (node.rd_window, run_k) {
                (Some(w), Some(k)) => visit_window(col, v, k, w, &node.rd_scores, shelf),
                _ => visit(col, v, run_k, false, shelf),
            }
        }
    }
}

/// Boxes taken from the queue at a time: their halves are bounded
/// together, shared with a helper thread where one is free. Taking up to
/// 32 at a time, not one, costs a few bounds more (a box taken before a
/// design raised the threshold): under 1 % on the examples' own shelves,
/// 9 % on cable-driver over E96.
const BATCH: usize = 32;

/// The batch grows from one box by one per this many boxes taken, so a
/// short search stays nearly one box at a time.
const GROWTH: usize = 16;

/// A batch with fewer halves to bound than this is bounded here alone (a
/// hand-over costs more than it saves there).
const SHARE_FROM: usize = 8;

/// Closes the crew when the search ends, however it ends, so that the
/// helper leaves and its thread can be joined.
struct Closing<'a, C, J, R>(&'a Crew<C, J, R>);

impl<C, J, R> Drop for Closing<'_, C, J, R> {
    fn drop(&mut self) {
        self.0.close();
    }
}

/// The context and job of a shared bound: the values of every position
/// (ohms) and a box's index ranges.
type BoundCrew = Crew<Vec<f64>, [(usize, usize); MAX_AXES], Option<Bound>>;

/// The helper of one topology's search ([`super::aid`]), claimed from a
/// spare core when a batch is large enough to share.
struct Help<'scope, 'env> {
    scope: &'scope std::thread::Scope<'scope, 'env>,
    crew: &'env BoundCrew,
    spare: Option<&'env Spare>,
    thread: Option<std::thread::ScopedJoinHandle<'scope, ()>>,
}

impl<'env> Help<'_, 'env> {
    /// The crew to share a batch of `jobs` bounds with, when a helper runs
    /// or a spare core lets one start.
    fn crew(
        &mut self,
        b: &'env Bounds<'_>,
        axes: &'env [Axis],
        n_axes: usize,
        jobs: usize,
    ) -> Option<&'env BoundCrew> {
        if jobs < SHARE_FROM {
            return None;
        }
        if self.thread.is_none() {
            let spare = self.spare?;
            if !spare.claim() {
                return None;
            }
            let crew = self.crew;
            let started = std::thread::Builder::new().spawn_scoped(self.scope, move || {
                let mut space = Scratch::default();
                crew.serve(|v: &Vec<f64>, r: &[(usize, usize); MAX_AXES]| {
                    b.bound_with(&mut space, v, axes, &r[..n_axes])
                });
                // The core is free again for another search.
                spare.add();
            });
            match started {
                Ok(h) => self.thread = Some(h),
                Err(_) => {
                    spare.add();
                    self.spare = None;
                    return None;
                }
            }
        }
        Some(self.crew)
    }
}

/// One bias configuration whose drain resistor the box bound already
/// narrowed to shelf indices `[w.0, w.1)`: each value there whose own
/// score bound (`scores`, when given) can still enter is checked at
/// nominal values, then screened and checked exactly.
fn visit_window(
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
fn diagnose(
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
    let per_axis = match axes.iter().filter(|a| !gate(a)).count() {
        0 => 1,
        1 => 64,
        2 => 16,
        _ => 6,
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
            (0..k).map(|i| s + i * n / k).collect()
        })
        .collect();
    let mut idx = vec![0usize; axes.len()];
    loop {
        for ((a, p), &j) in axes.iter().zip(&picks).zip(&idx) {
            for (k, &pos) in a.positions.iter().enumerate() {
                v[pos] = a.option(p[j])[k];
            }
        }
        visit(col, v, run_k, false, shelf);
        let mut k = axes.len();
        loop {
            if k == 0 {
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::topology::TOPOLOGIES;

    // The box bound keeps source points in fixed arrays of MAX_SOURCES.
    #[test]
    fn no_topology_has_more_source_resistors_than_the_bound_holds() {
        for t in TOPOLOGIES {
            let n = t.roles().iter().filter(|r| **r == Role::Source).count();
            assert!(n <= MAX_SOURCES, "{}: {n} source resistors", t.id());
        }
    }

    #[test]
    fn fold_grid_follows_the_shelf_length_within_its_bounds() {
        // E24 over 10 Ω–22 MΩ (153 values), E96 over 1 Ω–10 MΩ (673).
        assert_eq!(fold_points(None, 153), 8);
        assert_eq!(fold_points(None, 673), 21);
        assert_eq!(fold_points(None, 100_000), FOLDS);
        assert_eq!(fold_points(Some(1), 673), 2);
        assert_eq!(fold_points(Some(12), 13), 12);
        assert_eq!(fold_points(Some(100), 13), FOLDS);
    }

    // A box holds the divider, the source resistors and the gate resistors
    // (when a source resistance makes Zin enter the gain) in fixed arrays
    // of MAX_AXES.
    #[test]
    fn no_topology_has_more_box_axes_than_a_node_holds() {
        for t in TOPOLOGIES {
            let roles = t.roles();
            let divider = usize::from(roles.contains(&Role::DivTop));
            let others = roles
                .iter()
                .filter(|r| matches!(r, Role::Source | Role::Gate))
                .count();
            assert!(divider + others <= MAX_AXES, "{}: {roles:?}", t.id());
        }
    }

    // The run's pair cache builds each list once and gives the same pairs
    // as `divider_pairs`, sorted by the ratio R2/(R1 + R2).
    #[test]
    fn the_pair_cache_builds_each_list_once() {
        use crate::catalog::{Catalog, ESeries};
        let cat = Catalog::from_series(ESeries::E12, Some(0.05), 1e3, 1e6).unwrap();
        let shelf = Shelf::new(&cat, Some(0.05), 1e3, 1e6);
        let cache = PairCache::default();
        let a = cache.pairs(&shelf, 10e3, true);
        assert!(Arc::ptr_eq(&a, &cache.pairs(&shelf, 10e3, true)));
        let b = cache.pairs(&shelf, 10e3, false);
        assert!(!Arc::ptr_eq(&a, &b) && b.len() > a.len());
        for (list, dominance) in [(&a, true), (&b, false)] {
            let mut want = divider_pairs(&shelf, 10e3, dominance);
            let mut got = list.to_vec();
            let by_values =
                |x: &(f64, f64), y: &(f64, f64)| x.0.total_cmp(&y.0).then(x.1.total_cmp(&y.1));
            want.sort_by(by_values);
            got.sort_by(by_values);
            assert_eq!(got, want);
            let ratio = |&(r1, r2): &(f64, f64)| r2 / (r1 + r2);
            assert!(list.windows(2).all(|w| ratio(&w[0]) <= ratio(&w[1])));
        }
    }

    // The source points of a box enumerate every combination once: with
    // widths 3 and 2 there are 6, each (axis 0, axis 1) pair exactly once.
    #[test]
    fn the_kept_headroom_lines_give_the_same_least_value() {
        // The least of a − b·x over all lines against over those kept, at
        // x from 0 up, for pseudo-random lines (a 64-bit LCG, Knuth's
        // MMIX constants), some with equal starts or slopes.
        let mut state = 0x2545_f491_4f6c_dd1du64;
        let mut next = || {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            (state >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut dropped = 0;
        for _ in 0..200 {
            let all: Vec<(f64, f64)> = (0..16)
                .map(|_| {
                    let a = (next() * 8.0).round() * 1.5 + next() * 1e-3;
                    let b = (next() * 4.0).round() * 1e-4;
                    (a, b)
                })
                .collect();
            let mut kept = Vec::new();
            for &l in &all {
                add_lowest(&mut kept, l);
            }
            dropped += all.len() - kept.len();
            let least = |ls: &[(f64, f64)], x: f64| {
                ls.iter()
                    .map(|&(a, b)| a - x * b)
                    .fold(f64::INFINITY, f64::min)
            };
            for x in [0.0, 1.0, 1e3, 4.7e4, 1e5, 1e6, 1e7] {
                assert_eq!(
                    least(&all, x).to_bits(),
                    least(&kept, x).to_bits(),
                    "x = {x}"
                );
            }
        }
        // The filter did drop lines (the check above is not vacuous).
        assert!(dropped > 200, "dropped {dropped}");
    }

    #[test]
    fn source_points_cover_each_combination_once() {
        let ranges = [(4usize, 7usize), (10, 12)];
        let mut seen = Vec::new();
        for i in 0..6 {
            let pt = source_point(ranges.iter().copied(), i);
            seen.push((pt[0], pt[1]));
        }
        seen.sort();
        seen.dedup();
        assert_eq!(seen.len(), 6);
        assert!(seen
            .iter()
            .all(|&(a, b)| (4..7).contains(&a) && (10..12).contains(&b)));
    }
}
