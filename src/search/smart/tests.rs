//! Unit tests of the default search's pieces.

use crate::analysis::SLACK;
use crate::search::smart::blocks::{add_lowest, fold_points, source_point, FOLDS, MAX_SOURCES};
use crate::search::smart::branch::MAX_AXES;
use crate::search::smart::pairs::{divider_pairs, Packing, PairCache};
use crate::search::Shelf;
use crate::topology::{Role, TOPOLOGIES};
use std::sync::Arc;

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

// The largest placement of each ratio, against every pair of the shelf
// grouped by the ratio's key (ln(R2/R1) in units of 1e-9, `f64::round`):
// per key the largest R1, the smallest R2 on a tie, in key order. Over
// E24 and E96 (IEC 60063) shelves, with and without a Zin floor, and a
// stock list of uneven values (with same-ratio pairs that are not tenfolds
// of each other: 1.5k/1k and 3.3k/2.2k).
#[test]
fn divider_pairs_keep_the_largest_placement_of_every_ratio() {
    use crate::catalog::{Catalog, ESeries};
    use std::collections::BTreeMap;
    let reference = |shelf: &Shelf, floor: f64| {
        let mut best: BTreeMap<i64, (f64, f64)> = BTreeMap::new();
        for &r1 in &shelf.values {
            for &r2 in &shelf.values {
                if floor > 0.0 && r1 * r2 / (r1 + r2) < floor * (1.0 - SLACK) {
                    continue;
                }
                let key = ((r2.ln() - r1.ln()) * 1e9).round() as i64;
                let slot = best.entry(key).or_insert((r1, r2));
                if r1 > slot.0 || (r1 == slot.0 && r2 < slot.1) {
                    *slot = (r1, r2);
                }
            }
        }
        best.into_values().collect::<Vec<_>>()
    };
    let series = |s: ESeries, lo: f64, hi: f64| {
        let cat = Catalog::from_series(s, Some(0.01), lo, hi).unwrap();
        Shelf::new(&cat, Some(0.01), lo, hi)
    };
    let stock = Shelf {
        name: "stock".into(),
        values: vec![
            100.0, 220.0, 470.0, 1e3, 1.5e3, 2.2e3, 3.3e3, 4.7e3, 6.8e3, 15e3, 22e3, 47e3, 100e3,
        ],
        tolerances: vec![0.05; 13],
    };
    let cases = [
        (series(ESeries::E24, 10.0, 1e6), 0.0),
        (series(ESeries::E24, 10.0, 1e6), 47e3),
        (series(ESeries::E96, 1.0, 10e6), 0.0),
        (series(ESeries::E96, 1.0, 10e6), 1e6),
        (stock, 0.0),
    ];
    for (shelf, floor) in &cases {
        let want = reference(shelf, *floor);
        let got = divider_pairs(shelf, *floor, true);
        assert_eq!(got.len(), want.len(), "{} floor {floor}", shelf.name);
        assert_eq!(got, want, "{} floor {floor}", shelf.name);
    }
    // The stock list's 1.5k/1k and 3.3k/2.2k share a key: one pair is kept.
    let got = divider_pairs(&cases[4].0, 0.0, true);
    assert!(got.contains(&(2.2e3, 3.3e3)) && !got.contains(&(1e3, 1.5e3)));
    // The wide packing gives the same picks as the narrow one.
    let vals = &cases[3].0.values;
    let logs: Vec<f64> = vals.iter().map(|r| r.ln()).collect();
    let every: Vec<usize> = (0..vals.len()).collect();
    let partners = vec![&every[..]; vals.len()];
    let packing = Packing::new(&logs);
    assert!(packing.bits() <= 64);
    let narrow = packing.picks::<u64>(vals, &logs, &partners, |_, _| true);
    let wide = packing.picks::<u128>(vals, &logs, &partners, |_, _| true);
    assert_eq!(narrow, wide);
}
