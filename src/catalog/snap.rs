//! Snapping an ideal resistance to a catalog, and choosing divider pairs.
//!
//! A divider here is R1 from the input (or supply) node to the output and R2
//! from the output to ground, so its unloaded output fraction is
//! `ratio = R2 / (R1 + R2)`: the lower resistor over the total.

use std::cmp::{Ordering, Reverse};
use std::collections::BinaryHeap;

use serde::Serialize;

use super::{Catalog, CatalogError, RELATIVE_SLACK};

/// Where an ideal resistance falls in a catalog.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SnapResult {
    /// The ideal resistance asked for, ohms.
    #[serde(rename = "value")]
    pub value_ohm: f64,
    /// Name of the catalog (`E24`, or the stock list's name).
    pub series: String,
    /// Largest catalog value at most the ideal, ohms; `None` below the catalog.
    #[serde(rename = "below")]
    pub below_ohm: Option<f64>,
    /// Smallest catalog value at least the ideal, ohms; `None` above the catalog.
    #[serde(rename = "above")]
    pub above_ohm: Option<f64>,
    /// Catalog value nearest on a log scale, ohms (see [`Catalog::nearest`]).
    #[serde(rename = "nearest")]
    pub nearest_ohm: f64,
    /// Relative error of the nearest value, `(nearest - value) / value`,
    /// dimensionless (0.02 = 2 % high).
    pub error: f64,
}

/// Snap `value_ohm` (ohms) to `cat`: the neighbours below and above, the
/// nearest value and its relative error.
///
/// Errors when `value_ohm` is not a finite resistance above 0 ohms or the
/// catalog is empty.
///
/// ```
/// use gatewright::catalog::{snap::snap_value, Catalog, ESeries};
/// let e24 = Catalog::from_series(ESeries::E24, None, 10.0, 10e6)?;
/// let s = snap_value(&e24, 9_600.0)?;
/// assert_eq!((s.below_ohm, s.nearest_ohm), (Some(9_100.0), 10e3));
/// # Ok::<(), gatewright::catalog::CatalogError>(())
/// ```
pub fn snap_value(cat: &Catalog, value_ohm: f64) -> Result<SnapResult, CatalogError> {
    check_positive("value_ohm", value_ohm)?;
    let nearest = cat.nearest(value_ohm).ok_or_else(|| empty(cat))?;
    Ok(SnapResult {
        value_ohm,
        series: cat.name.clone(),
        below_ohm: cat.below(value_ohm).map(|p| p.ohms),
        above_ohm: cat.above(value_ohm).map(|p| p.ohms),
        nearest_ohm: nearest.ohms,
        error: (nearest.ohms - value_ohm) / value_ohm,
    })
}

/// A divider made of two catalog values.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RatioPair {
    /// Upper resistor, input (or supply) node to output, ohms.
    #[serde(rename = "r1")]
    pub r1_ohm: f64,
    /// Lower resistor, output to ground, ohms.
    #[serde(rename = "r2")]
    pub r2_ohm: f64,
    /// `r1 + r2`, ohms.
    #[serde(rename = "total")]
    pub total_ohm: f64,
    /// Achieved output fraction `r2 / (r1 + r2)`, dimensionless.
    pub ratio: f64,
    /// Relative ratio error, `(ratio - wanted) / wanted`, dimensionless.
    pub error: f64,
}

/// The best divider pairs from `cat` for the output fraction
/// `ratio = R2 / (R1 + R2)` (dimensionless, strictly between 0 and 1), with
/// `R1 + R2` within `[total_min_ohm, total_max_ohm]` (ohms, inclusive with
/// [`RELATIVE_SLACK`]). At most `max_results` pairs, ordered by `|error|`,
/// then by total (smaller first), then by R2. Pairs whose errors agree to
/// 1e-12 count as equally good, so floating-point noise does not reorder
/// exact ratios such as 1k/2k and 1.1k/2.2k.
///
/// For each R2 the ratio error is monotone in R1, so the best R1 values sit
/// either side of the ideal `R2 · (1 − ratio) / ratio` and are found by
/// binary search; a heap merges the per-R2 runs, so the cost is about
/// `(n + max_results) · log n` for `n` catalog values.
///
/// Errors when `ratio` is not in (0, 1), a bound is not a finite resistance
/// above 0 ohms, or `total_min_ohm > total_max_ohm`.
pub fn ratio_pairs(
    cat: &Catalog,
    ratio: f64,
    total_min_ohm: f64,
    total_max_ohm: f64,
    max_results: usize,
) -> Result<Vec<RatioPair>, CatalogError> {
    if !(ratio > 0.0 && ratio < 1.0) {
        return Err(CatalogError::invalid(
            "ratio",
            ratio,
            "must lie strictly between 0 and 1 (R2 over R1 + R2)",
        ));
    }
    check_positive("total_min_ohm", total_min_ohm)?;
    check_positive("total_max_ohm", total_max_ohm)?;
    if total_min_ohm > total_max_ohm {
        return Err(CatalogError::invalid(
            "total_max_ohm",
            total_max_ohm,
            &format!("must be at least `total_min_ohm` ({total_min_ohm} ohms)"),
        ));
    }
    let values: Vec<f64> = cat.parts.iter().map(|p| p.ohms).collect();
    let lo = total_min_ohm * (1.0 - RELATIVE_SLACK);
    let hi = total_max_ohm * (1.0 + RELATIVE_SLACK);

    let mut cursors = Vec::new();
    let mut heap = BinaryHeap::new();
    for &r2 in values.iter().take_while(|&&r2| r2 < hi) {
        let start = values.partition_point(|&r1| r1 + r2 < lo);
        let end = values.partition_point(|&r1| r1 + r2 <= hi);
        if start >= end {
            continue;
        }
        let ideal = r2 * (1.0 - ratio) / ratio;
        let split = values
            .get(start..end)
            .map_or(0, |s| s.partition_point(|&r1| r1 < ideal));
        let cursor = Cursor {
            r2,
            start,
            end,
            left: start + split,
            right: start + split,
        };
        if let Some(c) = cursor.peek(&values, ratio) {
            heap.push(Reverse(HeapEntry {
                cand: c,
                cursor: cursors.len(),
            }));
        }
        cursors.push(cursor);
    }

    let mut out = Vec::with_capacity(max_results.min(heap.len()));
    while out.len() < max_results {
        let Some(Reverse(entry)) = heap.pop() else {
            break;
        };
        out.push(entry.cand.pair.clone());
        if let Some(cursor) = cursors.get_mut(entry.cursor) {
            cursor.advance(entry.cand.left_side);
            if let Some(c) = cursor.peek(&values, ratio) {
                heap.push(Reverse(HeapEntry {
                    cand: c,
                    cursor: entry.cursor,
                }));
            }
        }
    }
    Ok(out)
}

fn check_positive(field: &str, v: f64) -> Result<(), CatalogError> {
    if v.is_finite() && v > 0.0 {
        Ok(())
    } else {
        Err(CatalogError::invalid(
            field,
            v,
            "must be a finite resistance greater than 0 ohms",
        ))
    }
}

fn empty(cat: &Catalog) -> CatalogError {
    CatalogError::invalid(
        "catalog",
        format!("`{}`", cat.name),
        "holds no values to snap to",
    )
}

/// The R1 candidates for one R2, walked outwards from the ideal R1: indices
/// `[start, left)` lie below it, `[right, end)` above.
struct Cursor {
    r2: f64,
    start: usize,
    end: usize,
    left: usize,
    right: usize,
}

struct Candidate {
    pair: RatioPair,
    /// Ranking key: `|error|` quantised to 1e-12.
    key: f64,
    left_side: bool,
}

impl Cursor {
    fn candidate(
        &self,
        values: &[f64],
        i: usize,
        ratio: f64,
        left_side: bool,
    ) -> Option<Candidate> {
        let r1 = *values.get(i)?;
        let total = r1 + self.r2;
        let achieved = self.r2 / total;
        let error = (achieved - ratio) / ratio;
        Some(Candidate {
            pair: RatioPair {
                r1_ohm: r1,
                r2_ohm: self.r2,
                total_ohm: total,
                ratio: achieved,
                error,
            },
            key: (error.abs() * 1e12).round(),
            left_side,
        })
    }

    /// The better of the next candidate on each side.
    fn peek(&self, values: &[f64], ratio: f64) -> Option<Candidate> {
        let left = (self.left > self.start)
            .then(|| self.candidate(values, self.left - 1, ratio, true))
            .flatten();
        let right = (self.right < self.end)
            .then(|| self.candidate(values, self.right, ratio, false))
            .flatten();
        match (left, right) {
            (Some(l), Some(r)) => Some(if rank(&r, &l) == Ordering::Less { r } else { l }),
            (l, r) => l.or(r),
        }
    }

    fn advance(&mut self, left_side: bool) {
        if left_side {
            self.left -= 1;
        } else {
            self.right += 1;
        }
    }
}

fn rank(a: &Candidate, b: &Candidate) -> Ordering {
    a.key
        .total_cmp(&b.key)
        .then(a.pair.total_ohm.total_cmp(&b.pair.total_ohm))
        .then(a.pair.r2_ohm.total_cmp(&b.pair.r2_ohm))
}

struct HeapEntry {
    cand: Candidate,
    cursor: usize,
}

impl Ord for HeapEntry {
    fn cmp(&self, other: &Self) -> Ordering {
        rank(&self.cand, &other.cand).then(self.cursor.cmp(&other.cursor))
    }
}

impl PartialOrd for HeapEntry {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl PartialEq for HeapEntry {
    fn eq(&self, other: &Self) -> bool {
        self.cmp(other) == Ordering::Equal
    }
}

impl Eq for HeapEntry {}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::catalog::ESeries;

    fn series(s: ESeries, lo: f64, hi: f64) -> Catalog {
        Catalog::from_series(s, None, lo, hi).unwrap()
    }

    // IEC 60063 E24: 9.1k and 10k surround 9.6k; nearest in log space is 10k.
    #[test]
    fn snap_reports_neighbours_and_relative_error() {
        let c = series(ESeries::E24, 10.0, 1e6);
        let s = snap_value(&c, 9_600.0).unwrap();
        assert_eq!(s.below_ohm, Some(9_100.0));
        assert_eq!(s.above_ohm, Some(10_000.0));
        assert_eq!(s.nearest_ohm, 10_000.0);
        assert!((s.error - 400.0 / 9_600.0).abs() < 1e-15);
        let json = serde_json::to_value(&s).unwrap();
        let mut keys: Vec<&str> = json
            .as_object()
            .unwrap()
            .keys()
            .map(|k| k.as_str())
            .collect();
        keys.sort_unstable();
        assert_eq!(
            keys,
            ["above", "below", "error", "nearest", "series", "value"]
        );
        assert_eq!(json["series"], "E24");
        assert_eq!(json["value"], 9_600.0);
    }

    #[test]
    fn snap_at_catalog_edges_has_null_neighbour() {
        let c = series(ESeries::E12, 10.0, 1e6);
        let s = snap_value(&c, 2e6).unwrap();
        assert_eq!(
            (s.below_ohm, s.above_ohm, s.nearest_ohm),
            (Some(1e6), None, 1e6)
        );
        assert!((s.error - (-0.5)).abs() < 1e-15);
        let json = serde_json::to_value(&s).unwrap();
        assert!(json["above"].is_null());
        let s = snap_value(&c, 5.0).unwrap();
        assert_eq!((s.below_ohm, s.above_ohm), (None, Some(10.0)));
        // A member snaps to itself with zero error.
        let s = snap_value(&c, 4_700.0).unwrap();
        assert_eq!(
            (s.below_ohm, s.above_ohm, s.nearest_ohm, s.error),
            (Some(4_700.0), Some(4_700.0), 4_700.0, 0.0)
        );
    }

    #[test]
    fn snap_rejects_bad_values_and_empty_catalogs() {
        let c = series(ESeries::E12, 10.0, 1e6);
        assert_eq!(
            snap_value(&c, -1.0).unwrap_err().to_string(),
            "`value_ohm` = -1: must be a finite resistance greater than 0 ohms"
        );
        assert!(snap_value(&c, f64::NAN).is_err());
        let empty = Catalog {
            name: "none".into(),
            parts: vec![],
        };
        assert_eq!(
            snap_value(&empty, 1e3).unwrap_err().to_string(),
            "`catalog` = `none`: holds no values to snap to"
        );
    }

    // Hand example from the IEC 60063 E24 table: ratio 1/3 needs R1 = 2·R2.
    // Members x with 2x also a member: 1.0/2.0, 1.1/2.2, 1.2/2.4, 1.5/3.0,
    // 1.8/3.6, 5.6/11, 7.5/15 (per decade). With totals 3k..10k only the
    // first five fit (3k, 3.3k, 3.6k, 4.5k, 5.4k); 5.6k/11k and 560/1.1k do not.
    #[test]
    fn ratio_pairs_hand_example_exact_thirds() {
        let c = series(ESeries::E24, 1.0, 1e7);
        let got = ratio_pairs(&c, 1.0 / 3.0, 3e3, 10e3, 5).unwrap();
        let pairs: Vec<(f64, f64)> = got.iter().map(|p| (p.r1_ohm, p.r2_ohm)).collect();
        assert_eq!(
            pairs,
            [
                (2000.0, 1000.0),
                (2200.0, 1100.0),
                (2400.0, 1200.0),
                (3000.0, 1500.0),
                (3600.0, 1800.0)
            ]
        );
        for p in &got {
            assert!(p.error.abs() < 1e-12);
            assert_eq!(p.total_ohm, p.r1_ohm + p.r2_ohm);
        }
        // The sixth pair is the best inexact one and must be inexact.
        let six = ratio_pairs(&c, 1.0 / 3.0, 3e3, 10e3, 6).unwrap();
        assert!(six[5].error.abs() > 1e-6);
    }

    // Hand example: ratio 0.5 wants R1 = R2; E12 totals 2k..5k inclusive give
    // 1k/1k, 1.2k/1.2k, 1.5k/1.5k, 1.8k/1.8k, 2.2k/2.2k (4.4k); 2.7k/2.7k is 5.4k.
    #[test]
    fn ratio_pairs_hand_example_halves() {
        let c = series(ESeries::E12, 1.0, 1e7);
        let got = ratio_pairs(&c, 0.5, 2e3, 5e3, 100).unwrap();
        let exact: Vec<f64> = got
            .iter()
            .take_while(|p| p.error == 0.0)
            .map(|p| p.r2_ohm)
            .collect();
        assert_eq!(exact, [1000.0, 1200.0, 1500.0, 1800.0, 2200.0]);
        assert!(got.iter().all(|p| p.total_ohm >= 2e3 && p.total_ohm <= 5e3));
    }

    // Independent oracle: every pair of an E12 catalog, ranked by brute force.
    #[test]
    fn ratio_pairs_agree_with_exhaustive_search() {
        let c = series(ESeries::E12, 10.0, 1e5);
        for (ratio, lo, hi) in [(0.2, 1e3, 50e3), (0.731, 100.0, 2e3), (0.05, 10.0, 1e5)] {
            let mut all = Vec::new();
            for r1 in &c.parts {
                for r2 in &c.parts {
                    let total = r1.ohms + r2.ohms;
                    if total >= lo && total <= hi {
                        let achieved = r2.ohms / total;
                        all.push(((achieved - ratio) / ratio, total, r2.ohms, r1.ohms));
                    }
                }
            }
            all.sort_by(|a, b| {
                a.0.abs()
                    .total_cmp(&b.0.abs())
                    .then(a.1.total_cmp(&b.1))
                    .then(a.2.total_cmp(&b.2))
            });
            let got = ratio_pairs(&c, ratio, lo, hi, 40).unwrap();
            assert_eq!(got.len(), 40);
            for (g, w) in got.iter().zip(&all) {
                assert!((g.error.abs() - w.0.abs()).abs() < 1e-12, "{ratio}");
                assert_eq!((g.r1_ohm, g.r2_ohm), (w.3, w.2), "{ratio}");
            }
            let n = all.len();
            assert_eq!(ratio_pairs(&c, ratio, lo, hi, usize::MAX).unwrap().len(), n);
        }
    }

    #[test]
    fn ratio_pairs_reject_bad_inputs() {
        let c = series(ESeries::E12, 10.0, 1e5);
        let e = |r, lo, hi| ratio_pairs(&c, r, lo, hi, 3).unwrap_err().to_string();
        assert_eq!(
            e(1.0, 1e3, 1e4),
            "`ratio` = 1: must lie strictly between 0 and 1 (R2 over R1 + R2)"
        );
        assert!(e(f64::NAN, 1e3, 1e4).starts_with("`ratio` = NaN"));
        assert_eq!(
            e(0.5, 0.0, 1e4),
            "`total_min_ohm` = 0: must be a finite resistance greater than 0 ohms"
        );
        assert_eq!(
            e(0.5, 1e4, 1e3),
            "`total_max_ohm` = 1000: must be at least `total_min_ohm` (10000 ohms)"
        );
        assert!(ratio_pairs(&c, 0.5, 1e3, 1e4, 0).unwrap().is_empty());
        // No pair can reach a total below twice the smallest value.
        assert!(ratio_pairs(&c, 0.5, 1.0, 15.0, 5).unwrap().is_empty());
    }
}
