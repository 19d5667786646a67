//! The axes of the search box: each one's options in bound order, with
//! the range tables that give a box's Zin extremes in a few steps.

use crate::topology::{Gate, Rails, Topology};

/// One axis of the box: the positions it sets and its options, sorted so
/// that a higher index means a higher gate voltage (`gate_axis`) or a
/// larger source resistance.
pub(super) struct Axis {
    pub(super) positions: Vec<usize>,
    /// The options' values, `positions.len()` per option, one after
    /// another (one allocation for the whole axis).
    pub(super) options: Vec<f64>,
    pub(super) gate_axis: bool,
    /// A positive measure of each option (of the gate voltage, or of the
    /// resistance), ascending: the box is split along the axis whose range
    /// spans the largest ratio of it (the widest logarithmic range), not
    /// the most options.
    pub(super) scale: Vec<f64>,
    /// For a divider that sets Zin: its Zin tables (range extremes for the
    /// Zin bounds of a box).
    pub(super) zin: Option<ZinTable>,
}

/// Values with their (min, max) over blocks of [`BLOCK`]: the extremes
/// over any index range in a few steps.
pub(super) struct Ranged {
    pub(super) v: Vec<f64>,
    pub(super) blocks: Vec<(f64, f64)>,
}

impl Ranged {
    pub(super) fn new(v: Vec<f64>) -> Ranged {
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
    pub(super) fn range(&self, s: usize, e: usize) -> (f64, f64) {
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
pub(super) struct ZinTable {
    pub(super) nominal: Ranged,
    pub(super) up: Ranged,
    pub(super) down: Ranged,
}

/// Block length of the range-maximum table.
const BLOCK: usize = 64;

impl Axis {
    /// Number of options.
    pub(super) fn len(&self) -> usize {
        self.options.len() / self.positions.len()
    }

    /// The values of option `j`, one per position, ohms.
    pub(super) fn option(&self, j: usize) -> &[f64] {
        let w = self.positions.len();
        &self.options[j * w..(j + 1) * w]
    }

    /// Smallest and largest nominal Zin over the options `s..e` (None when
    /// Zin is not set here).
    pub(super) fn zin_range(&self, s: usize, e: usize) -> Option<(f64, f64)> {
        Some(self.zin.as_ref()?.nominal.range(s, e))
    }

    /// Option `i`'s Zin: nominal, its floor at the tap-up extreme and its
    /// ceiling at the tap-down extreme (the axis must set Zin).
    pub(super) fn zin_at(&self, i: usize) -> (f64, f64, f64) {
        self.zin.as_ref().map_or((0.0, 0.0, f64::INFINITY), |z| {
            (z.nominal.v[i], z.up.v[i], z.down.v[i])
        })
    }

    /// Over the options `s..e`: the smallest Zin at the tap-up extreme and
    /// the largest at the tap-down extreme.
    pub(super) fn zin_tilted(&self, s: usize, e: usize) -> Option<(f64, f64)> {
        let z = self.zin.as_ref()?;
        Some((z.up.range(s, e).0, z.down.range(s, e).1))
    }
}

/// The gate voltage the divider in `v` (ohms, every position) sets at
/// `rails`, volts: the order of the divider axis (0 V for a drain-fed
/// gate, which no divider sets).
pub(super) fn gate_voltage(t: &dyn Topology, v: &[f64], rails: &Rails) -> f64 {
    match t.bias(v, rails).gate {
        Gate::Fixed(x) => x,
        Gate::FromDrain => 0.0,
    }
}
