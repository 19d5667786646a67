//! The pieces the box bound is built from: the tolerance moves of the bias
//! resistors, the |gain| model of the drain resistor, the RD scan, the VDS
//! fold grid and the source-resistor points.

use crate::analysis::{gain_window, SLACK};
use crate::device::SquareLaw;
use crate::rank::{Metrics, Scorer};
use crate::search::Shelf;
use crate::topology::Role;

/// The smallest and the largest resistor tolerance on the shelf.
pub(super) fn tolerance_span(shelf: &Shelf) -> (f64, f64) {
    let t = &shelf.tolerances;
    (
        t.iter().copied().fold(f64::INFINITY, f64::min).max(0.0),
        t.iter().copied().fold(0.0, f64::max),
    )
}

/// The square law with λ folded into k at a given VDS (λ then 0): with
/// VDS inside `[vds_lo, vds_hi]` the true current lies between the two.
pub(super) fn folded(law: &SquareLaw, vds_v: f64) -> SquareLaw {
    SquareLaw {
        vto_v: law.vto_v,
        k_a_per_v2: law.k_a_per_v2 * (1.0 + law.lambda_per_v * vds_v.max(0.0)),
        lambda_per_v: 0.0,
    }
}

/// Move the bias resistors: the divider tap up by `tap` (R_top times
/// 1 − tap, R_bottom times 1 + tap; a negative `tap` moves it down) and
/// every source resistor times `src`.
pub(super) fn tilt(v: &mut [f64], roles: &[Role], tap: f64, src: f64) {
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
pub(super) fn shift(v: &mut [f64], roles: &[Role], tol: f64, up: bool) {
    if up {
        tilt(v, roles, tol, 1.0 - tol);
    } else {
        tilt(v, roles, -tol, 1.0 + tol);
    }
}

/// Lower bound of the |gain| ratio that the RD tolerance alone adds, for
/// any RD up to `rd_max`: `R'(RD(1+t)) / R'(RD(1−t))` with `R' = RD∥RL`
/// falls as RD grows.
pub(super) fn rd_ratio(rd_max: f64, rl: f64, tol: f64) -> f64 {
    if !rd_max.is_finite() {
        return 1.0;
    }
    par2(rd_max * (1.0 + tol), rl) / par2(rd_max * (1.0 - tol), rl)
}

/// Optimistic metrics from a lower bound of the corner-to-corner |gain|
/// ratio: the worst-corner gain error is at least (ρ − 1)/(ρ + 1) (the best
/// placement of the window) and the spread at least (ρ − 1)·lo/gain.
pub(super) fn optimistic(
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
pub(super) fn par2(a: f64, b: f64) -> f64 {
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
pub(super) struct Proportional {
    pub(super) strong: f64,
    pub(super) weak: f64,
    pub(super) tol: f64,
    pub(super) rl: f64,
}

impl Proportional {
    /// (some point's |gain| is at least, some point's at most), V/V.
    pub(super) fn gains(&self, rd: f64) -> (f64, f64) {
        (
            self.strong * par2(rd * (1.0 + self.tol), self.rl),
            self.weak * par2(rd * (1.0 - self.tol), self.rl),
        )
    }
}

/// Lower bounds of the worst-corner gain error and of the gain spread from
/// the two |gain| bounds of [`scan_rd`], fractions of the target `g`.
pub(super) fn gain_terms(strong: f64, weak: f64, g: f64) -> (f64, f64) {
    (
        ((strong - g).max(g - weak)).max(0.0) / g,
        (strong - weak).max(0.0) / g,
    )
}

/// Which of the two |gain| bounds a scan needs at one RD (the searches
/// for the window's ends need one each).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Sides {
    /// Both bounds.
    Both,
    /// The bound every candidate reaches at least (the other may be NaN).
    Strong,
    /// The bound some point reaches at most (the other may be NaN).
    Weak,
}

impl Sides {
    /// The strong bound is asked for.
    pub(super) fn strong(self) -> bool {
        self != Sides::Weak
    }

    /// The weak bound is asked for.
    pub(super) fn weak(self) -> bool {
        self != Sides::Strong
    }
}

/// The drain resistor scanned over the shelf for one box. `gains(RD,
/// sides)` gives (a |gain| some point of every candidate reaches at
/// least, one some point reaches at most), both rising with RD, or the
/// one `sides` asks for; `metrics(RD, error,
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
pub(super) fn scan_rd(
    values: &[f64],
    (lo, hi): (f64, f64),
    g: f64,
    rd_cap: f64,
    single: bool,
    mut gains: impl FnMut(f64, Sides) -> (f64, f64),
    mut metrics: impl FnMut(f64, f64, f64) -> Metrics,
    scorer: &Scorer,
) -> Option<Bound> {
    // (Only RDs up to the cap are probed: `gains` need not hold above.)
    let capped = values.partition_point(|&x| x <= rd_cap * (1.0 + 1e-9));
    let first = first_true(capped, |j| {
        gains(values[j], Sides::Weak).1 >= lo * (1.0 - SLACK)
    });
    let above = |strong: f64| strong > hi * (1.0 + SLACK);
    // A box needs no window (only a single configuration's is used): its
    // scan stops where the strong side first passes `hi`, the window's end.
    let window = if single {
        let last = first_true(capped, |j| above(gains(values[j], Sides::Strong).0));
        Some((first.min(last), last))
    } else {
        None
    };
    let mut best: Option<f64> = None;
    let mut rd_scores = Vec::new();
    let mut fixed = None;
    let end = window.map_or(capped, |w| w.1);
    for &x in &values[window.map_or(first, |w| w.0)..end] {
        let (strong, weak) = gains(x, Sides::Both);
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
pub(super) const SOURCE_POINTS: usize = 16;

/// Slices of a box's Zin range bounded on their own where a source
/// resistance makes Zin enter the gain.
pub(super) const ZIN_SLICES: usize = 6;

/// Divider pairs up to which a box bounds each pair's Zin on its own there
/// (at least [`ZIN_SLICES`]).
pub(super) const ZIN_POINTS: usize = 16;

/// Most VDS points (vds_min to the span, even steps) at which λ > 0
/// bounds fold k, so the gm bounds of each drain resistor can use the VDS
/// range that resistor leaves. A search uses one point per
/// [`SHELF_PER_FOLD`] shelf values, from 8 to this many: a fold's gm and
/// gds bounds hold over all of its drain resistors, so a long shelf
/// (E96 over 1 Ω–10 MΩ: 673 values) needs finer folds, while each point
/// costs two solves per case in every bound. (Measured on the examples
/// with λ = 0.02: on E24 shelves 8 points were fastest; on E96 over
/// 1 Ω–10 MΩ 16–32 points took 2–3× fewer bounds and half the time of 8.)
pub(super) const FOLDS: usize = 24;

/// Shelf values per point of the fold grid (see [`FOLDS`]).
const SHELF_PER_FOLD: usize = 32;

/// The points of the fold grid: `set` taken into 2..=[`FOLDS`], or else
/// one per [`SHELF_PER_FOLD`] of the shelf's `values`, 8 to [`FOLDS`].
pub(super) fn fold_points(set: Option<usize>, values: usize) -> usize {
    match set {
        Some(n) => n.clamp(2, FOLDS),
        None => (values / SHELF_PER_FOLD).clamp(8, FOLDS),
    }
}

/// The `j`-th VDS of a fold grid of `n` points, volts: vds_min to the
/// span in even steps.
pub(super) fn fold_vds(j: usize, n: usize, vds_min: f64, span: f64) -> f64 {
    vds_min + j as f64 / (n - 1) as f64 * (span - vds_min)
}

/// Most source resistors of any topology (a unit test checks the registry).
pub(super) const MAX_SOURCES: usize = 2;

/// The `i`-th combination of the options of the source axes with index
/// ranges `ranges` (mixed radix, the first axis fastest).
pub(super) fn source_point(
    ranges: impl Iterator<Item = (usize, usize)>,
    i: usize,
) -> [usize; MAX_SOURCES] {
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
pub(super) fn best_of(acc: Option<Bound>, b: Bound) -> Option<Bound> {
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
pub(super) fn add_lowest(lines: &mut Vec<(f64, f64)>, (a, b): (f64, f64)) {
    if lines.iter().any(|&(a2, b2)| a2 <= a && b2 >= b) {
        return;
    }
    lines.retain(|&(a2, b2)| !(a <= a2 && b >= b2));
    lines.push((a, b));
}

/// A lower bound, ohms, of the smallest resistance in `[lo, hi]` at which
/// `reach` (false → true as the resistance rises) holds: `lo` when it holds
/// there, else bisection in ln R for at most `steps` halvings or until the
/// bracket is narrower than `width` (in ln R). The lower end is returned,
/// so the answer never overshoots.
pub(super) fn smallest_reaching(
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
pub(super) fn first_true(n: usize, mut pred: impl FnMut(usize) -> bool) -> usize {
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
