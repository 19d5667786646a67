//! IEC 60063 E-series.
//!
//! One decade of each series is hard-coded below exactly as IEC 60063
//! tabulates it (Table 1: two significant digits for E6, E12 and E24; Table 2:
//! three digits for E48, E96 and E192). The same tables are written out as
//! data in `catalogs/eseries.toml` for readers; a test keeps the two equal.
//!
//! The tables are not generated from the formula `10^(i/N)`: the standard
//! departs from it at E24 indices 10–16 and 22 (and so at the E12/E6 members
//! among them) and at E192 index 185 (920, not 919).

use serde::Serialize;

use super::{Catalog, CatalogError, Part, RELATIVE_SLACK};

const E6_DECADE: [f64; 6] = [1.0, 1.5, 2.2, 3.3, 4.7, 6.8];

const E12_DECADE: [f64; 12] = [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2];

const E24_DECADE: [f64; 24] = [
    1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6,
    6.2, 6.8, 7.5, 8.2, 9.1,
];

const E48_DECADE: [f64; 48] = [
    1.00, 1.05, 1.10, 1.15, 1.21, 1.27, 1.33, 1.40, 1.47, 1.54, 1.62, 1.69, 1.78, 1.87, 1.96, 2.05,
    2.15, 2.26, 2.37, 2.49, 2.61, 2.74, 2.87, 3.01, 3.16, 3.32, 3.48, 3.65, 3.83, 4.02, 4.22, 4.42,
    4.64, 4.87, 5.11, 5.36, 5.62, 5.90, 6.19, 6.49, 6.81, 7.15, 7.50, 7.87, 8.25, 8.66, 9.09, 9.53,
];

const E96_DECADE: [f64; 96] = [
    1.00, 1.02, 1.05, 1.07, 1.10, 1.13, 1.15, 1.18, 1.21, 1.24, 1.27, 1.30, 1.33, 1.37, 1.40, 1.43,
    1.47, 1.50, 1.54, 1.58, 1.62, 1.65, 1.69, 1.74, 1.78, 1.82, 1.87, 1.91, 1.96, 2.00, 2.05, 2.10,
    2.15, 2.21, 2.26, 2.32, 2.37, 2.43, 2.49, 2.55, 2.61, 2.67, 2.74, 2.80, 2.87, 2.94, 3.01, 3.09,
    3.16, 3.24, 3.32, 3.40, 3.48, 3.57, 3.65, 3.74, 3.83, 3.92, 4.02, 4.12, 4.22, 4.32, 4.42, 4.53,
    4.64, 4.75, 4.87, 4.99, 5.11, 5.23, 5.36, 5.49, 5.62, 5.76, 5.90, 6.04, 6.19, 6.34, 6.49, 6.65,
    6.81, 6.98, 7.15, 7.32, 7.50, 7.68, 7.87, 8.06, 8.25, 8.45, 8.66, 8.87, 9.09, 9.31, 9.53, 9.76,
];

const E192_DECADE: [f64; 192] = [
    1.00, 1.01, 1.02, 1.04, 1.05, 1.06, 1.07, 1.09, 1.10, 1.11, 1.13, 1.14, 1.15, 1.17, 1.18, 1.20,
    1.21, 1.23, 1.24, 1.26, 1.27, 1.29, 1.30, 1.32, 1.33, 1.35, 1.37, 1.38, 1.40, 1.42, 1.43, 1.45,
    1.47, 1.49, 1.50, 1.52, 1.54, 1.56, 1.58, 1.60, 1.62, 1.64, 1.65, 1.67, 1.69, 1.72, 1.74, 1.76,
    1.78, 1.80, 1.82, 1.84, 1.87, 1.89, 1.91, 1.93, 1.96, 1.98, 2.00, 2.03, 2.05, 2.08, 2.10, 2.13,
    2.15, 2.18, 2.21, 2.23, 2.26, 2.29, 2.32, 2.34, 2.37, 2.40, 2.43, 2.46, 2.49, 2.52, 2.55, 2.58,
    2.61, 2.64, 2.67, 2.71, 2.74, 2.77, 2.80, 2.84, 2.87, 2.91, 2.94, 2.98, 3.01, 3.05, 3.09, 3.12,
    3.16, 3.20, 3.24, 3.28, 3.32, 3.36, 3.40, 3.44, 3.48, 3.52, 3.57, 3.61, 3.65, 3.70, 3.74, 3.79,
    3.83, 3.88, 3.92, 3.97, 4.02, 4.07, 4.12, 4.17, 4.22, 4.27, 4.32, 4.37, 4.42, 4.48, 4.53, 4.59,
    4.64, 4.70, 4.75, 4.81, 4.87, 4.93, 4.99, 5.05, 5.11, 5.17, 5.23, 5.30, 5.36, 5.42, 5.49, 5.56,
    5.62, 5.69, 5.76, 5.83, 5.90, 5.97, 6.04, 6.12, 6.19, 6.26, 6.34, 6.42, 6.49, 6.57, 6.65, 6.73,
    6.81, 6.90, 6.98, 7.06, 7.15, 7.23, 7.32, 7.41, 7.50, 7.59, 7.68, 7.77, 7.87, 7.96, 8.06, 8.16,
    8.25, 8.35, 8.45, 8.56, 8.66, 8.76, 8.87, 8.98, 9.09, 9.20, 9.31, 9.42, 9.53, 9.65, 9.76, 9.88,
];

/// An IEC 60063 preferred-number series.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
pub enum ESeries {
    /// E6, ±20 %.
    E6,
    /// E12, ±10 %.
    E12,
    /// E24, ±5 %.
    E24,
    /// E48, ±2 %.
    E48,
    /// E96, ±1 %.
    E96,
    /// E192, ±0.5 %.
    E192,
}

impl ESeries {
    /// Every series, coarse to fine.
    pub const ALL: [ESeries; 6] = [
        ESeries::E6,
        ESeries::E12,
        ESeries::E24,
        ESeries::E48,
        ESeries::E96,
        ESeries::E192,
    ];

    /// The name as written (`E24`).
    pub fn name(self) -> &'static str {
        match self {
            ESeries::E6 => "E6",
            ESeries::E12 => "E12",
            ESeries::E24 => "E24",
            ESeries::E48 => "E48",
            ESeries::E96 => "E96",
            ESeries::E192 => "E192",
        }
    }

    /// Parse a name, case-insensitive (`e24`, `E24`).
    pub fn from_name(s: &str) -> Option<ESeries> {
        ESeries::ALL
            .into_iter()
            .find(|e| e.name().eq_ignore_ascii_case(s.trim()))
    }

    /// Values per decade.
    pub fn per_decade(self) -> usize {
        match self {
            ESeries::E6 => 6,
            ESeries::E12 => 12,
            ESeries::E24 => 24,
            ESeries::E48 => 48,
            ESeries::E96 => 96,
            ESeries::E192 => 192,
        }
    }

    /// The customary tolerance that goes with the series (IEC 60063 pairing;
    /// E192 is also sold tighter).
    pub fn tolerance(self) -> f64 {
        match self {
            ESeries::E6 => 0.20,
            ESeries::E12 => 0.10,
            ESeries::E24 => 0.05,
            ESeries::E48 => 0.02,
            ESeries::E96 => 0.01,
            ESeries::E192 => 0.005,
        }
    }

    /// Significant digits of every member: 2 for E6, E12 and E24, 3 for
    /// E48, E96 and E192 (IEC 60063 Tables 1 and 2).
    pub fn significant_digits(self) -> u32 {
        match self {
            ESeries::E6 | ESeries::E12 | ESeries::E24 => 2,
            ESeries::E48 | ESeries::E96 | ESeries::E192 => 3,
        }
    }

    /// One decade of the series as dimensionless mantissas in `[1, 10)`,
    /// ascending, exactly as IEC 60063 tabulates them (`4.7`, `1.05`).
    /// Multiply by `10^k` for resistances in ohms.
    pub fn decade(self) -> &'static [f64] {
        match self {
            ESeries::E6 => &E6_DECADE,
            ESeries::E12 => &E12_DECADE,
            ESeries::E24 => &E24_DECADE,
            ESeries::E48 => &E48_DECADE,
            ESeries::E96 => &E96_DECADE,
            ESeries::E192 => &E192_DECADE,
        }
    }

    /// One decade as integers of [`ESeries::significant_digits`] digits
    /// (`47` for 4.7 in E24, `105` for 1.05 in E48), dimensionless. Integer
    /// mantissas let callers build `mantissa · 10^k` ohms without rounding
    /// noise.
    pub fn decade_digits(self) -> Vec<u32> {
        let scale = f64::from(10u32.pow(self.significant_digits() - 1));
        self.decade()
            .iter()
            // The tables hold at most three digits, so the product is within
            // one ulp of an integer and rounding recovers it exactly.
            .map(|m| (m * scale).round() as u32)
            .collect()
    }
}

/// `10^n` as an `f64`; exact for `n <= 22`, where every power of ten is
/// representable, so `47 · 10^2` is exactly 4700.
fn pow10(n: u32) -> f64 {
    if n <= 22 {
        (0..n).fold(1.0, |p, _| p * 10.0)
    } else {
        10f64.powi(n as i32)
    }
}

/// `digits · 10^exp` with one rounding step, so the result is the `f64`
/// nearest to the decimal value (the same number the literal `4.7e3` gives).
fn scaled(digits: u32, exp: i32) -> f64 {
    let d = f64::from(digits);
    if exp >= 0 {
        d * pow10(exp.unsigned_abs())
    } else {
        d / pow10(exp.unsigned_abs())
    }
}

impl Catalog {
    /// Every member of `series` from `r_min_ohm` to `r_max_ohm` (ohms,
    /// inclusive with [`RELATIVE_SLACK`]), across as many decades as the
    /// range spans. Each value is the tabulated mantissa times a power of
    /// ten with a single rounding, so 4.7 kΩ is exactly `4700.0`.
    ///
    /// `tolerance` (relative, in `[0, 1)`; 0 means ideal parts) defaults to
    /// [`ESeries::tolerance`]. No power rating is set. The catalog is named
    /// after the series (`E24`).
    ///
    /// Errors when a bound is not a finite positive number of ohms, when
    /// `r_min_ohm > r_max_ohm`, when the tolerance is outside `[0, 1)`, or
    /// when no member lies in the range.
    pub fn from_series(
        series: ESeries,
        tolerance: Option<f64>,
        r_min_ohm: f64,
        r_max_ohm: f64,
    ) -> Result<Catalog, CatalogError> {
        for (field, v) in [("r_min_ohm", r_min_ohm), ("r_max_ohm", r_max_ohm)] {
            if !(v.is_finite() && v > 0.0) {
                return Err(CatalogError::invalid(
                    field,
                    v,
                    "must be a finite resistance greater than 0 ohms",
                ));
            }
        }
        if r_min_ohm > r_max_ohm {
            return Err(CatalogError::invalid(
                "r_max_ohm",
                r_max_ohm,
                &format!("must be at least `r_min_ohm` ({r_min_ohm} ohms)"),
            ));
        }
        let tol = tolerance.unwrap_or(series.tolerance());
        if !(0.0..1.0).contains(&tol) {
            return Err(CatalogError::invalid(
                "tolerance",
                tol,
                "must be a fraction in [0, 1), e.g. 0.05 for ±5 %",
            ));
        }
        let lo = r_min_ohm * (1.0 - RELATIVE_SLACK);
        let hi = r_max_ohm * (1.0 + RELATIVE_SLACK);
        let shift = series.significant_digits() as i32 - 1;
        // One decade either side of the rounded logarithms covers any
        // off-by-one in log10 near exact powers of ten; the filter trims.
        let k_lo = lo.log10().floor() as i32 - 1;
        let k_hi = hi.log10().floor() as i32 + 1;
        let digits = series.decade_digits();
        let parts: Vec<Part> = (k_lo..=k_hi)
            .flat_map(|k| digits.iter().map(move |&d| scaled(d, k - shift)))
            .filter(|&ohms| ohms >= lo && ohms <= hi)
            .map(|ohms| Part {
                ohms,
                tolerance: tol,
                power_w: None,
            })
            .collect();
        if parts.is_empty() {
            return Err(CatalogError::invalid(
                "r_max_ohm",
                r_max_ohm,
                &format!(
                    "no {} value lies between `r_min_ohm` ({r_min_ohm} ohms) and `r_max_ohm`; widen the range",
                    series.name()
                ),
            ));
        }
        Ok(Catalog {
            name: series.name().to_string(),
            parts,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// `catalogs/eseries.toml` as the program reads it.
    #[derive(serde::Deserialize)]
    #[serde(deny_unknown_fields)]
    struct DataSeries {
        digits: u32,
        tolerance: f64,
        mantissas: Vec<u32>,
    }

    // The data file documents the same IEC 60063 tables the code carries.
    #[test]
    fn data_file_matches_built_in_tables() {
        let text = include_str!("../../catalogs/eseries.toml");
        let data: std::collections::BTreeMap<String, DataSeries> = toml::from_str(text).unwrap();
        assert_eq!(data.len(), ESeries::ALL.len());
        for s in ESeries::ALL {
            let d = &data[s.name()];
            assert_eq!(d.digits, s.significant_digits(), "{}", s.name());
            assert_eq!(d.tolerance, s.tolerance(), "{}", s.name());
            assert_eq!(d.mantissas, s.decade_digits(), "{}", s.name());
        }
    }

    // IEC 60063: series sizes N = 6, 12, 24, 48, 96, 192 per decade.
    #[test]
    fn decades_hold_per_decade_values_in_one_to_ten() {
        for s in ESeries::ALL {
            let d = s.decade();
            assert_eq!(d.len(), s.per_decade(), "{}", s.name());
            assert!(d.windows(2).all(|w| w[0] < w[1]), "{}", s.name());
            assert!(d.iter().all(|&m| (1.0..10.0).contains(&m)), "{}", s.name());
        }
    }

    #[test]
    fn values_are_clean_decimals() {
        let c = Catalog::from_series(ESeries::E24, None, 0.1, 1e7).unwrap();
        let has = |v: f64| c.parts.iter().any(|p| p.ohms == v);
        // Exact equality on purpose: each must be the f64 of the literal.
        for v in [
            4.7e3, 0.47, 4.7, 47.0, 470.0, 47e3, 470e3, 4.7e6, 0.1, 9.1e6,
        ] {
            assert!(has(v), "{v}");
        }
        let c = Catalog::from_series(ESeries::E192, None, 0.1, 1e7).unwrap();
        for v in [0.92, 9.2e3, 1.01e3, 9.88e6] {
            assert!(c.parts.iter().any(|p| p.ohms == v), "{v}");
        }
    }

    #[test]
    fn range_is_inclusive_and_spans_decades() {
        let c = Catalog::from_series(ESeries::E6, Some(0.1), 100.0, 10e3).unwrap();
        let got: Vec<f64> = c.parts.iter().map(|p| p.ohms).collect();
        // IEC 60063 E6: 1.0 1.5 2.2 3.3 4.7 6.8 per decade.
        assert_eq!(
            got,
            [
                100.0, 150.0, 220.0, 330.0, 470.0, 680.0, 1e3, 1.5e3, 2.2e3, 3.3e3, 4.7e3, 6.8e3,
                10e3
            ]
        );
        assert!(c
            .parts
            .iter()
            .all(|p| p.tolerance == 0.1 && p.power_w.is_none()));
        assert_eq!(c.name, "E6");
        let noisy = 1e3 * (1.0 + 1e-12);
        let c = Catalog::from_series(ESeries::E12, None, noisy, noisy).unwrap();
        assert_eq!(c.parts.len(), 1);
        assert_eq!(c.parts[0].tolerance, 0.10);
    }

    #[test]
    fn rejects_bad_ranges_and_tolerances() {
        let err = |t, lo, hi| {
            Catalog::from_series(ESeries::E24, t, lo, hi)
                .unwrap_err()
                .to_string()
        };
        assert_eq!(
            err(None, 0.0, 1e3),
            "`r_min_ohm` = 0: must be a finite resistance greater than 0 ohms"
        );
        assert_eq!(
            err(None, 10.0, f64::INFINITY),
            "`r_max_ohm` = inf: must be a finite resistance greater than 0 ohms"
        );
        assert_eq!(
            err(None, 1e4, 1e3),
            "`r_max_ohm` = 1000: must be at least `r_min_ohm` (10000 ohms)"
        );
        assert_eq!(
            err(Some(1.0), 10.0, 1e3),
            "`tolerance` = 1: must be a fraction in [0, 1), e.g. 0.05 for ±5 %"
        );
        assert!(err(Some(f64::NAN), 10.0, 1e3).starts_with("`tolerance` = NaN"));
        assert_eq!(
            err(None, 4.5e3, 4.6e3),
            "`r_max_ohm` = 4600: no E24 value lies between `r_min_ohm` (4500 ohms) and `r_max_ohm`; widen the range"
        );
    }
}
