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
