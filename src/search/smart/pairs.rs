//! The divider pairs of a shelf: every (R_top, R_bottom), or the largest
//! placement of each ratio, with a Zin floor; built once per search run.

use crate::analysis::SLACK;
use crate::search::Shelf;
use std::sync::{Arc, OnceLock};

/// Divider pairs (R_top, R_bottom): all shelf pairs, or with `dominance`
/// only the largest placement of each ratio. With `zin_floor` > 0 pairs
/// whose parallel resistance is below it are dropped.
pub(super) fn divider_pairs(shelf: &Shelf, zin_floor: f64, dominance: bool) -> Vec<(f64, f64)> {
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
    // Every candidate: a member without a tenfold (indices into `vals`).
    let partners: Vec<&[usize]> = tenfold
        .iter()
        .map(|&ten| if ten { &tops[..] } else { &every[..] })
        .collect();
    let packing = Packing::new(&logs);
    if packing.bits() <= u64::BITS {
        packing.picks::<u64>(vals, &logs, &partners, kept)
    } else {
        packing.picks::<u128>(vals, &logs, &partners, kept)
    }
}

/// How a candidate pair becomes one integer: its ratio key (biased to be
/// non-negative), then R1's index from the largest down, then R2's index
/// from the smallest up. Sorting the integers (by radix) orders the keys
/// and puts each key's pick, its largest R1 (the smallest R2 on a tie),
/// first. The keys run in R2/R1 order, which is also nearly the
/// gate-voltage order the caller sorts by next.
pub(super) struct Packing {
    /// Values on the shelf part the pairs are taken from.
    n: u64,
    /// Bits of one index.
    index_bits: u32,
    /// Added to every key: more than the largest |key|.
    bias: i64,
}

/// The unsigned integers a candidate is packed into: `u64` where its bits
/// fit (every E-series shelf of up to 8,191 values), else `u128`.
pub(super) trait Word:
    radsort::Key
    + Copy
    + PartialEq
    + From<u64>
    + std::ops::Shl<u32, Output = Self>
    + std::ops::Shr<u32, Output = Self>
    + std::ops::BitOr<Output = Self>
{
    /// The low 64 bits.
    fn low(self) -> u64;
}

impl Word for u64 {
    fn low(self) -> u64 {
        self
    }
}

impl Word for u128 {
    fn low(self) -> u64 {
        self as u64
    }
}

impl Packing {
    /// The packing for values with the given natural logarithms
    /// (ascending).
    pub(super) fn new(logs: &[f64]) -> Packing {
        let n = logs.len() as u64;
        let reach = logs.last().zip(logs.first()).map_or(0.0, |(a, b)| a - b);
        Packing {
            n,
            index_bits: u64::BITS - n.leading_zeros(),
            bias: (reach * 1e9).ceil() as i64 + 1,
        }
    }

    /// Bits of a packed candidate.
    pub(super) fn bits(&self) -> u32 {
        let keys = 2 * self.bias as u64;
        u64::BITS - keys.leading_zeros() + 2 * self.index_bits
    }

    /// The pick of each key among the candidate pairs (R1 = `vals[i]`,
    /// R2 = `vals[j]` for every `j` of `partners[i]` that `kept(i, j)`),
    /// in key order, each packed as `K` (wide enough for
    /// [`Packing::bits`]); `logs` are the values' natural logarithms.
    pub(super) fn picks<K: Word>(
        &self,
        vals: &[f64],
        logs: &[f64],
        partners: &[&[usize]],
        kept: impl Fn(usize, usize) -> bool,
    ) -> Vec<(f64, f64)> {
        let b = self.index_bits;
        let mut packed: Vec<K> = Vec::with_capacity(partners.iter().map(|p| p.len()).sum());
        for (i, list) in partners.iter().enumerate() {
            let top = K::from(self.n - 1 - i as u64) << b;
            for &j in list.iter() {
                if kept(i, j) {
                    let key = ratio_key(logs[j] - logs[i]) + self.bias;
                    packed.push((K::from(key as u64) << (2 * b)) | top | K::from(j as u64));
                }
            }
        }
        radsort::sort(&mut packed);
        let mask = (1u64 << b) - 1;
        packed
            .chunk_by(|x, y| (*x >> (2 * b)) == (*y >> (2 * b)))
            .map(|same| {
                let x = same[0];
                let i = (self.n - 1 - ((x >> b).low() & mask)) as usize;
                (vals[i], vals[(x.low() & mask) as usize])
            })
            .collect()
    }
}

/// The key of a ratio from ln(R2/R1): the logarithm in units of 1e-9,
/// rounded half away from zero (as `f64::round`, without its library
/// call: the truncation and the remainder are exact below 2^52).
fn ratio_key(ln_ratio: f64) -> i64 {
    let x = ln_ratio * 1e9;
    let whole = x as i64;
    let rest = x - whole as f64;
    whole + i64::from(rest >= 0.5) - i64::from(rest <= -0.5)
}

/// The divider pairs of one search run, kept per (Zin floor, dominance):
/// several topologies use the same list, and on a long shelf building it
/// takes milliseconds. Each list is in the order of the divider ratio
/// R2/(R1 + R2) (with dominance that of the ratio's key, the same but for
/// ratios within 1e-9 of each other), so that the gate-voltage sort of
/// each topology, which moves with the ratio, runs over nearly sorted
/// input.
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
    pub(super) fn pairs(&self, shelf: &Shelf, zin_floor: f64, dominance: bool) -> PairList {
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
            // (With dominance the list comes in key order already: one pair
            // per key, the keys ascending in R2/R1.)
            if !dominance {
                let ratio = |&(r1, r2): &(f64, f64)| r2 / (r1 + r2);
                pairs.sort_unstable_by(|x, y| {
                    ratio(x).total_cmp(&ratio(y)).then(x.0.total_cmp(&y.0))
                });
            }
            Arc::new(pairs)
        });
        Arc::clone(list)
    }
}
