//! IEC 60063 E-series.

use serde::Serialize;

/// An IEC 60063 preferred-number series.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
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
