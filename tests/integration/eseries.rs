//! E-series catalogs checked against the IEC 60063 tables.
//!
//! The tables below are typed from IEC 60063 (Table 1, two significant
//! digits; Table 2, three digits) independently of `src/catalog/series.rs`
//! and `catalogs/eseries.toml`, as integers of 2 or 3 digits (47 = 4.7).

use gatewright::catalog::{Catalog, ESeries};

// IEC 60063 Table 1.
const IEC_E6: [u32; 6] = [10, 15, 22, 33, 47, 68];
const IEC_E12: [u32; 12] = [10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82];
const IEC_E24: [u32; 24] = [
    10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91,
];

// IEC 60063 Table 2.
const IEC_E48: [u32; 48] = [
    100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169, 178, 187, 196, 205, 215, 226, 237,
    249, 261, 274, 287, 301, 316, 332, 348, 365, 383, 402, 422, 442, 464, 487, 511, 536, 562, 590,
    619, 649, 681, 715, 750, 787, 825, 866, 909, 953,
];
const IEC_E96: [u32; 96] = [
    100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154,
    158, 162, 165, 169, 174, 178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243,
    249, 255, 261, 267, 274, 280, 287, 294, 301, 309, 316, 324, 332, 340, 348, 357, 365, 374, 383,
    392, 402, 412, 422, 432, 442, 453, 464, 475, 487, 499, 511, 523, 536, 549, 562, 576, 590, 604,
    619, 634, 649, 665, 681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953,
    976,
];
const IEC_E192: [u32; 192] = [
    100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114, 115, 117, 118, 120, 121, 123, 124,
    126, 127, 129, 130, 132, 133, 135, 137, 138, 140, 142, 143, 145, 147, 149, 150, 152, 154, 156,
    158, 160, 162, 164, 165, 167, 169, 172, 174, 176, 178, 180, 182, 184, 187, 189, 191, 193, 196,
    198, 200, 203, 205, 208, 210, 213, 215, 218, 221, 223, 226, 229, 232, 234, 237, 240, 243, 246,
    249, 252, 255, 258, 261, 264, 267, 271, 274, 277, 280, 284, 287, 291, 294, 298, 301, 305, 309,
    312, 316, 320, 324, 328, 332, 336, 340, 344, 348, 352, 357, 361, 365, 370, 374, 379, 383, 388,
    392, 397, 402, 407, 412, 417, 422, 427, 432, 437, 442, 448, 453, 459, 464, 470, 475, 481, 487,
    493, 499, 505, 511, 517, 523, 530, 536, 542, 549, 556, 562, 569, 576, 583, 590, 597, 604, 612,
    619, 626, 634, 642, 649, 657, 665, 673, 681, 690, 698, 706, 715, 723, 732, 741, 750, 759, 768,
    777, 787, 796, 806, 816, 825, 835, 845, 856, 866, 876, 887, 898, 909, 920, 931, 942, 953, 965,
    976, 988,
];

fn iec_table(s: ESeries) -> &'static [u32] {
    match s {
        ESeries::E6 => &IEC_E6,
        ESeries::E12 => &IEC_E12,
        ESeries::E24 => &IEC_E24,
        ESeries::E48 => &IEC_E48,
        ESeries::E96 => &IEC_E96,
        ESeries::E192 => &IEC_E192,
    }
}

/// `digits · 10^exp` through decimal text, which Rust parses with correct
/// rounding: the reference for "4.7k is exactly 4700.0".
fn decimal(digits: u32, exp: i32) -> f64 {
    // NaN on a (never expected) parse failure makes every comparison fail.
    format!("{digits}e{exp}").parse().unwrap_or(f64::NAN)
}

// IEC 60063 Tables 1 and 2, value for value.
#[test]
fn every_decade_matches_iec_60063() {
    for s in ESeries::ALL {
        let want = iec_table(s);
        assert_eq!(s.decade_digits(), want, "{} digits", s.name());
        let shift = s.significant_digits() as i32 - 1;
        let mantissas: Vec<f64> = want.iter().map(|&d| decimal(d, -shift)).collect();
        assert_eq!(s.decade(), mantissas.as_slice(), "{} mantissas", s.name());
    }
}

// IEC 60063: N values per decade for series EN.
#[test]
fn counts_per_decade() {
    for (s, n) in [
        (ESeries::E6, 6),
        (ESeries::E12, 12),
        (ESeries::E24, 24),
        (ESeries::E48, 48),
        (ESeries::E96, 96),
        (ESeries::E192, 192),
    ] {
        assert_eq!(s.decade().len(), n, "{}", s.name());
        assert_eq!(s.per_decade(), n, "{}", s.name());
        // One decade [1k, 10k) of a catalog holds exactly N values.
        let c = Catalog::from_series(s, None, 1e3, 9.999e3).unwrap();
        assert_eq!(c.parts.len(), n, "{}", s.name());
    }
    // Six decades and the closing 10M: 6 · 24 + 1.
    let c = Catalog::from_series(ESeries::E24, None, 10.0, 10e6).unwrap();
    assert_eq!(c.parts.len(), 145);
}

// IEC 60063 structure: each series is every second member of the next finer
// one within its family (E6 ⊂ E12 ⊂ E24; E48 ⊂ E96 ⊂ E192).
#[test]
fn coarser_series_are_every_second_member() {
    for (coarse, fine) in [
        (ESeries::E6, ESeries::E12),
        (ESeries::E12, ESeries::E24),
        (ESeries::E48, ESeries::E96),
        (ESeries::E96, ESeries::E192),
    ] {
        let c = coarse.decade();
        let f = fine.decade();
        for (i, v) in c.iter().enumerate() {
            assert_eq!(
                *v,
                f[2 * i],
                "{}[{i}] vs {}[{}]",
                coarse.name(),
                fine.name(),
                2 * i
            );
        }
    }
}

/// Indices where the series differs from `10^(i/N)` rounded half-up to the
/// series' significant digits.
fn departures_from_formula(s: ESeries) -> Vec<usize> {
    let n = s.per_decade() as f64;
    let scale = 10f64.powi(s.significant_digits() as i32 - 1);
    s.decade_digits()
        .iter()
        .enumerate()
        .filter(|(i, &d)| {
            let formula = (10f64.powf(*i as f64 / n) * scale).round() as u32;
            formula != d
        })
        .map(|(i, _)| i)
        .collect()
}

// IEC 60063 values vs the formula 10^(i/N): the standard's E24 keeps
// 2.7 3.0 3.3 3.6 3.9 4.3 4.7 (i = 10..16) and 8.2 (i = 22); E192 has 9.20
// at i = 185 (formula 9.19). E12 and E6 inherit the E24 departures at their
// members 2.7 3.3 3.9 4.7 8.2 and 3.3 4.7. E48 and E96 have none.
#[test]
fn departures_from_the_formula_are_exactly_the_listed_ones() {
    assert_eq!(departures_from_formula(ESeries::E6), [3, 4]);
    assert_eq!(departures_from_formula(ESeries::E12), [5, 6, 7, 8, 11]);
    assert_eq!(
        departures_from_formula(ESeries::E24),
        [10, 11, 12, 13, 14, 15, 16, 22]
    );
    assert!(departures_from_formula(ESeries::E48).is_empty());
    assert!(departures_from_formula(ESeries::E96).is_empty());
    assert_eq!(departures_from_formula(ESeries::E192), [185]);
    assert_eq!(ESeries::E192.decade_digits()[185], 920);
}

// Every catalog value is the exact decimal mantissa · 10^k (IEC 60063
// values repeat in every decade), from milliohms to gigaohms.
#[test]
fn catalog_values_are_exact_decimals_in_every_decade() {
    for s in ESeries::ALL {
        let c = Catalog::from_series(s, None, 1e-3, 1e9).unwrap();
        let shift = s.significant_digits() as i32 - 1;
        let mut want = Vec::new();
        for k in -3..9 {
            for &d in iec_table(s) {
                want.push(decimal(d, k - shift));
            }
        }
        want.push(1e9);
        let got: Vec<f64> = c.parts.iter().map(|p| p.ohms).collect();
        assert_eq!(got, want, "{}", s.name());
        assert!(c.parts.iter().all(|p| p.tolerance == s.tolerance()));
    }
}

// Neighbours across a decade boundary, E24 and E96 (IEC 60063 tables);
// nearest compares |ln(c/x)| (REFERENCE §1.5 rule).
#[test]
fn queries_cross_decade_boundaries() {
    let e24 = Catalog::from_series(ESeries::E24, None, 10.0, 1e6).unwrap();
    assert_eq!(e24.nearest(9_600.0).unwrap().ohms, 10e3);
    assert_eq!(e24.below(9_600.0).unwrap().ohms, 9.1e3);
    assert_eq!(e24.above(9_600.0).unwrap().ohms, 10e3);
    assert_eq!(e24.nearest(1_040.0).unwrap().ohms, 1e3);
    assert_eq!(e24.below(999.0).unwrap().ohms, 910.0);
    assert_eq!(e24.above(91.5).unwrap().ohms, 100.0);

    let e96 = Catalog::from_series(ESeries::E96, None, 10.0, 1e6).unwrap();
    // ln(10/9.9) = 0.0101 < ln(9.9/9.76) = 0.0142.
    assert_eq!(e96.nearest(9_900.0).unwrap().ohms, 10e3);
    assert_eq!(e96.below(9_900.0).unwrap().ohms, 9.76e3);
    // 1.01k lies between 1.00k and 1.02k: ln(1.02/1.01) = 0.00985 is less
    // than ln(1.01/1.00) = 0.00995, so the upper neighbour wins.
    assert_eq!(e96.nearest(1_010.0).unwrap().ohms, 1.02e3);
    let r = e96.range_indices(9.5e3, 10.5e3);
    let got: Vec<f64> = e96.parts[r].iter().map(|p| p.ohms).collect();
    assert_eq!(got, [9.53e3, 9.76e3, 10e3, 10.2e3, 10.5e3]);
}
