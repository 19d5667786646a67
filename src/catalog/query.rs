//! Neighbour queries on a sorted catalog, all by binary search.
//!
//! Bounds are inclusive with the relative slack [`RELATIVE_SLACK`], so a
//! target computed as 4699.999999999 Ω still finds the 4.7 kΩ part.

use std::ops::Range;

use super::{Catalog, Part, RELATIVE_SLACK};

impl Catalog {
    /// Number of values, dimensionless.
    pub fn len(&self) -> usize {
        self.parts.len()
    }

    /// True when the catalog holds no value.
    pub fn is_empty(&self) -> bool {
        self.parts.is_empty()
    }

    /// The relative tolerance to assume for a resistance someone chose by
    /// hand (`analyze --values`): `fixed` when the specification sets one
    /// for every part, else that of the catalog's part of this value (within
    /// 1e-9 relative), else the widest in the catalog (the conservative
    /// choice). A 0 Ω wire has none.
    pub fn tolerance_for(&self, ohms: f64, fixed: Option<f64>) -> f64 {
        if ohms == 0.0 {
            return 0.0;
        }
        if let Some(t) = fixed {
            return t;
        }
        self.parts
            .iter()
            .find(|p| (p.ohms - ohms).abs() <= 1e-9 * ohms)
            .map(|p| p.tolerance)
            .unwrap_or_else(|| self.parts.iter().map(|p| p.tolerance).fold(0.0, f64::max))
    }

    /// The largest part whose resistance is at most `x_ohm` (ohms), or `None`
    /// when every part is larger or `x_ohm` is NaN.
    pub fn below(&self, x_ohm: f64) -> Option<Part> {
        let limit = x_ohm * (1.0 + RELATIVE_SLACK);
        let idx = self.parts.partition_point(|p| p.ohms <= limit);
        idx.checked_sub(1).and_then(|i| self.parts.get(i)).copied()
    }

    /// The smallest part whose resistance is at least `x_ohm` (ohms), or
    /// `None` when every part is smaller or `x_ohm` is NaN.
    pub fn above(&self, x_ohm: f64) -> Option<Part> {
        if x_ohm.is_nan() {
            return None;
        }
        let limit = x_ohm * (1.0 - RELATIVE_SLACK);
        let idx = self.parts.partition_point(|p| p.ohms < limit);
        self.parts.get(idx).copied()
    }

    /// The part nearest to `x_ohm` (ohms) on a logarithmic scale, i.e. the
    /// one with the smallest `|ln(part / x)|`; only the two neighbours of
    /// `x_ohm` can win, whichever decade they sit in (9.6 kΩ snaps to 10 kΩ
    /// in E24). An exact tie goes to the lower part. `None` when the catalog
    /// is empty or `x_ohm` is not a finite positive number.
    pub fn nearest(&self, x_ohm: f64) -> Option<Part> {
        if !(x_ohm.is_finite() && x_ohm > 0.0) {
            return None;
        }
        let distance = |p: &Part| (p.ohms / x_ohm).ln().abs();
        match (self.below(x_ohm), self.above(x_ohm)) {
            (Some(b), Some(a)) => Some(if distance(&a) < distance(&b) { a } else { b }),
            (b, a) => b.or(a),
        }
    }

    /// Indices into [`Catalog::parts`] of the values within
    /// `[lo_ohm, hi_ohm]` (ohms, inclusive). Empty when nothing lies inside,
    /// when `lo_ohm > hi_ohm` or when either bound is NaN.
    pub fn range_indices(&self, lo_ohm: f64, hi_ohm: f64) -> Range<usize> {
        let lo = lo_ohm * (1.0 - RELATIVE_SLACK);
        let hi = hi_ohm * (1.0 + RELATIVE_SLACK);
        let start = self.parts.partition_point(|p| p.ohms < lo);
        let end = self.parts.partition_point(|p| p.ohms <= hi);
        if lo_ohm.is_nan() || hi_ohm.is_nan() || end < start {
            start..start
        } else {
            start..end
        }
    }
}

#[cfg(test)]
mod tests {

    // A stock list of 1 % and 5 % parts: a listed value takes its own
    // tolerance, an unlisted one the widest (5 %), a wire none, and the
    // specification's tolerance overrides all but the wire.
    #[test]
    fn tolerance_for_a_hand_picked_value() {
        let c = Catalog {
            name: "stock".into(),
            parts: vec![
                Part {
                    ohms: 1e3,
                    tolerance: 0.01,
                    power_w: None,
                },
                Part {
                    ohms: 4.7e3,
                    tolerance: 0.05,
                    power_w: None,
                },
            ],
        };
        assert_eq!(c.tolerance_for(1e3, None), 0.01);
        assert_eq!(c.tolerance_for(2.2e3, None), 0.05);
        assert_eq!(c.tolerance_for(0.0, None), 0.0);
        assert_eq!(c.tolerance_for(2.2e3, Some(0.02)), 0.02);
        assert_eq!(c.tolerance_for(0.0, Some(0.02)), 0.0);
    }
    use super::*;
    use crate::catalog::ESeries;

    fn e24() -> Catalog {
        Catalog::from_series(ESeries::E24, None, 1.0, 1e7).unwrap()
    }

    // Neighbours in E24 (IEC 60063 Table 1): ... 8.2k 9.1k | 10k 11k ...
    #[test]
    fn below_and_above_cross_decades() {
        let c = e24();
        assert_eq!(c.below(9_999.0).unwrap().ohms, 9_100.0);
        assert_eq!(c.above(9_200.0).unwrap().ohms, 10_000.0);
        assert_eq!(c.below(10_000.0).unwrap().ohms, 10_000.0);
        assert_eq!(c.above(10_000.0).unwrap().ohms, 10_000.0);
        // Arithmetic noise around a member still finds the member.
        assert_eq!(c.below(4_700.0 * (1.0 - 1e-12)).unwrap().ohms, 4_700.0);
        assert_eq!(c.above(4_700.0 * (1.0 + 1e-12)).unwrap().ohms, 4_700.0);
    }

    #[test]
    fn edges_give_none() {
        let c = e24();
        assert!(c.below(0.5).is_none());
        assert!(c.above(2e7).is_none());
        assert_eq!(c.above(0.5).unwrap().ohms, 1.0);
        assert_eq!(c.below(2e7).unwrap().ohms, 1e7);
        assert!(c.below(f64::NAN).is_none());
        assert!(c.above(f64::NAN).is_none());
        assert!(c.nearest(0.0).is_none());
        assert!(c.nearest(-5.0).is_none());
        assert!(c.nearest(f64::INFINITY).is_none());
        assert_eq!(c.nearest(1e9).unwrap().ohms, 1e7);
    }

    // REFERENCE §1.5 rule: compare |ln(c/x)| and look across the decade.
    #[test]
    fn nearest_is_logarithmic_and_crosses_decades() {
        let c = e24();
        // 9.6k: ln(10/9.6) = 0.0408 < ln(9.6/9.1) = 0.0535.
        assert_eq!(c.nearest(9_600.0).unwrap().ohms, 10_000.0);
        // 1.04k: ln(1.04) = 0.0392 < ln(1.1/1.04) = 0.0561.
        assert_eq!(c.nearest(1_040.0).unwrap().ohms, 1_000.0);
        // 9.5k: arithmetic midpoint of 9.1k..10k is 9.55k but the geometric
        // one is sqrt(91e6) = 9539 Ω, so 9.55k goes up while 9.5k stays.
        assert_eq!(c.nearest(9_500.0).unwrap().ohms, 9_100.0);
        assert_eq!(c.nearest(9_545.0).unwrap().ohms, 10_000.0);
    }

    #[test]
    fn range_indices_are_inclusive() {
        let c = e24();
        let r = c.range_indices(1_000.0, 2_000.0);
        let got: Vec<f64> = c.parts[r].iter().map(|p| p.ohms).collect();
        // IEC 60063 E24, 1.0 to 2.0 inclusive.
        assert_eq!(
            got,
            [1000.0, 1100.0, 1200.0, 1300.0, 1500.0, 1600.0, 1800.0, 2000.0]
        );
        assert!(c.range_indices(2_000.0, 1_000.0).is_empty());
        assert!(c.range_indices(1_400.0, 1_450.0).is_empty());
        assert!(c.range_indices(f64::NAN, 1e3).is_empty());
    }
}
