//! The specification: what the engineer asks for.
//!
//! `parse` turns TOML text into a [`ValidSpec`], in which every number is
//! checked, finite and in SI units. Raw serde structures live in `raw`;
//! nothing outside this module sees them.
//!
//! This module does no file I/O: text comes in, a checked value goes out.
//!
//! Defaults when a key is absent: `name` "", `polarity` any, `vss` 0 V,
//! supply `tolerance` 0, `source_resistance` 0 Ω, limits and `f_low` none,
//! `[parts] series` E24 with its customary tolerance (`tolerance` → `None`),
//! `range` 10 Ω–10 MΩ, `lambda` 0, a JFET's `vgs_max` 0 V. Required:
//! `[target] gain` (or `gain_db`) and `tolerance`, `[supply] vdd`,
//! `[load] rl`, `[input] zin_min`, `[headroom] vds_min`, and `[device]`
//! with `family` and its parameters or `class`. The sanity bounds are the
//! `MAX_*`/`MIN_*` constants re-exported here.

mod device_spec;
pub mod error;
mod fields;
mod raw;
mod validate;

pub use error::SpecError;
pub use validate::{
    DEFAULT_R_RANGE_OHM, DEFAULT_SERIES, F_LOW_MAX_HZ, I_MAX_A, K_MAX_A_PER_V2, MAX_GAIN, MIN_GAIN,
    P_MAX_W, R_MAX_OHM, R_MIN_OHM, V_MAX_V,
};

use crate::catalog::ESeries;
use crate::device::classes::{self, DeviceClass};
use crate::device::Device;
use serde::Serialize;

/// Parse and check a specification, with `class = "…"` looked up in the
/// built-in device classes (`catalogs/devices.toml`).
///
/// ```
/// let text = r#"
/// [target]
/// gain = 0.8
/// tolerance = 0.2
/// [supply]
/// vdd = 12
/// [load]
/// rl = "10k"
/// [input]
/// zin_min = "1M"
/// [headroom]
/// vds_min = 2
/// [device]
/// class = "n-jfet-low-idss"
/// "#;
/// let spec = gatewright::spec::parse(text).unwrap();
/// assert_eq!(spec.rl_ohm, 10e3);
/// assert_eq!(spec.parts.r_max_ohm, 10e6); // default range 10 Ω–10 MΩ
/// ```
pub fn parse(text: &str) -> Result<ValidSpec, SpecError> {
    let classes = classes::builtin().map_err(|e| SpecError::Classes(e.to_string()))?;
    parse_with(text, &classes)
}

/// As [`parse`], with the device classes given by the caller (for example a
/// user's own class file read with [`classes::parse`]).
pub fn parse_with(text: &str, classes: &[DeviceClass]) -> Result<ValidSpec, SpecError> {
    validate::validate(text, classes)
}

/// Sign of the mid-band gain the engineer wants.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Polarity {
    /// Output inverted with respect to the input (common source).
    Inverting,
    /// Output in phase (follower, common gate).
    NonInverting,
    /// Either sign.
    Any,
}

/// Mid-band gain requirement.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Target {
    /// Magnitude of the mid-band voltage gain, V/V, > 0.
    pub gain: f64,
    /// Relative tolerance: |gain| within gain·(1 ± tolerance); in (0, 1).
    pub tolerance: f64,
    /// Required sign.
    pub polarity: Polarity,
}

/// Supply rails.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Supply {
    /// Positive rail, volts, > 0.
    pub vdd_v: f64,
    /// Negative rail, volts, <= 0 (0 = single supply).
    pub vss_v: f64,
    /// Relative tolerance of both rails, in [0, 1) (0 = exact).
    pub tolerance: f64,
}

/// Which resistor values may be used.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum CatalogChoice {
    /// An IEC 60063 series.
    Series(ESeries),
    /// A stock-list TOML file, path as written in the spec (relative to the
    /// spec file's folder).
    StockFile(String),
}

/// Resistor choice and tolerance.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Parts {
    /// The catalog to draw values from.
    pub catalog: CatalogChoice,
    /// Relative tolerance of every resistor, in [0, 1); 0 = ideal. `None`
    /// means the series' customary tolerance (or each stock entry's own).
    pub tolerance: Option<f64>,
    /// Smallest allowed resistance, ohms.
    pub r_min_ohm: f64,
    /// Largest allowed resistance, ohms.
    pub r_max_ohm: f64,
}

/// Optional limits.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct Limits {
    /// Largest quiescent drain current at any corner, amps.
    pub id_max_a: Option<f64>,
    /// Largest supply power at any corner, watts.
    pub power_max_w: Option<f64>,
    /// Largest output impedance at any corner, ohms.
    pub zout_max_ohm: Option<f64>,
}

/// A checked specification: every field finite and within its rule.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ValidSpec {
    /// Free-text name of the design problem.
    pub name: String,
    /// Gain requirement.
    pub target: Target,
    /// Supply rails.
    pub supply: Supply,
    /// Load resistance, ohms, AC-coupled to the output.
    pub rl_ohm: f64,
    /// Minimum input impedance, ohms.
    pub zin_min_ohm: f64,
    /// Signal source resistance, ohms (0 when not given).
    pub source_resistance_ohm: f64,
    /// Minimum drain–source voltage at every corner, volts (saturation is
    /// checked separately).
    pub vds_min_v: f64,
    /// Optional limits.
    pub limits: Limits,
    /// Low-frequency −3 dB corner, hertz, when capacitors are to be sized.
    pub f_low_hz: Option<f64>,
    /// The device with its spread and ratings.
    pub device: Device,
    /// Resistor choice.
    pub parts: Parts,
}

/// A JFET self-bias problem for unit tests in other modules: gain 5 ± 50 %,
/// RL 10 kΩ, zin_min 100 kΩ, vds_min 1 V, ideal E24 parts over 10 Ω–10 MΩ,
/// and the given rails and device spread. Tests change fields as needed.
#[cfg(test)]
pub(crate) fn jfet_test_spec(
    vdd_v: f64,
    vss_v: f64,
    idss: (f64, f64),
    vgs_off: (f64, f64),
) -> ValidSpec {
    use crate::device::{Family, ParamRange, Params};
    ValidSpec {
        name: "unit check".into(),
        target: Target {
            gain: 5.0,
            tolerance: 0.5,
            polarity: Polarity::Any,
        },
        supply: Supply {
            vdd_v,
            vss_v,
            tolerance: 0.0,
        },
        rl_ohm: 10e3,
        zin_min_ohm: 1e5,
        source_resistance_ohm: 0.0,
        vds_min_v: 1.0,
        limits: Limits::default(),
        f_low_hz: None,
        device: Device {
            family: Family::NJfet,
            params: Params::Depletion {
                idss: ParamRange::between(idss.0, idss.1),
                vgs_off: ParamRange::between(vgs_off.0, vgs_off.1),
            },
            lambda: ParamRange::exact(0.0),
            vgs_max_v: Some(0.0),
            vgs_min_v: None,
            vds_max_v: None,
            pd_max_w: None,
            source: "spec".into(),
        },
        parts: Parts {
            catalog: CatalogChoice::Series(ESeries::E24),
            tolerance: Some(0.0),
            r_min_ohm: 10.0,
            r_max_ohm: 10e6,
        },
    }
}
