//! The divider pairs of a shelf: every (R_top, R_bottom), or the largest
//! placement of each ratio, with a Zin floor; built once per search run.

use super::*;

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
            let ratio = |&(r1, r2): &(f64, f64)| r2 / (r1 + r2);
            pairs.sort_unstable_by(|x, y| ratio(x).total_cmp(&ratio(y)).then(x.0.total_cmp(&y.0)));
            Arc::new(pairs)
        });
        Arc::clone(list)
    }
}
