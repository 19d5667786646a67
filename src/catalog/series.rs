//! IEC 60063 E-series.

use serde::Serialize;

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
}
