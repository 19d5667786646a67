//! Resistor catalogs: the IEC 60063 E-series and in-house stock lists.
//!
//! A catalog is a sorted list of resistor values (ohms) with a tolerance and
//! an optional power rating per value. It answers neighbour queries (the
//! value below, above and nearest to a target) by binary search, and
//! [`snap`] builds snapping and divider-ratio answers on top of them.
//!
//! This module parses text handed to it; it does no file I/O.

pub mod error;
mod query;
pub mod series;
pub mod snap;
pub mod stock;

pub use error::CatalogError;
pub use series::ESeries;

use serde::Serialize;

/// Relative slack applied to every inclusive bound and to the neighbour
/// queries, dimensionless: a value within `1e-9 · x` of `x` counts as equal
/// to it, so arithmetic noise never pushes 4.7 kΩ out of `[4.7 kΩ, …]`.
pub const RELATIVE_SLACK: f64 = 1e-9;

/// One value a catalog can supply.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Part {
    /// Resistance, ohms.
    pub ohms: f64,
    /// Relative tolerance (0.05 = ±5 %).
    pub tolerance: f64,
    /// Power rating, watts, when the stock list gives one.
    pub power_w: Option<f64>,
}

/// A sorted set of available resistor values.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Catalog {
    /// Name for outputs: `E24`, or the stock list's name.
    pub name: String,
    /// Parts sorted by ascending resistance, no duplicates.
    pub parts: Vec<Part>,
}
