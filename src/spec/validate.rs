//! From the raw TOML tree to a [`ValidSpec`]: known keys, numbers, units and
//! every rule, each failure worded with the dotted field, the value and the
//! line.

use super::error::SpecError;
use super::fields::{closest, Num, Section};
use super::raw::{parse_document, Entry, Node};
use super::{CatalogChoice, Limits, Parts, Polarity, Supply, Target, ValidSpec};
use crate::catalog::ESeries;
use crate::device::classes::DeviceClass;
use crate::units::{format_value, Quantity};

/// Largest gain magnitude accepted, V/V (80 dB): beyond what one discrete
/// stage delivers, so a larger figure is a slip of the pen.
pub const MAX_GAIN: f64 = 1e4;
/// Smallest gain magnitude accepted, V/V (−60 dB).
pub const MIN_GAIN: f64 = 1e-3;
/// Smallest resistance accepted anywhere, ohms (1 mΩ).
pub const R_MIN_OHM: f64 = 1e-3;
/// Largest resistance accepted anywhere, ohms (1 TΩ).
pub const R_MAX_OHM: f64 = 1e12;
/// Largest voltage magnitude accepted (rails, device voltages), volts (10 kV).
pub const V_MAX_V: f64 = 1e4;
/// Largest current accepted (limits, IDSS, ID(on)), amps.
pub const I_MAX_A: f64 = 100.0;
/// Largest power accepted (limits, ratings), watts (1 MW = 10 kV · 100 A).
pub const P_MAX_W: f64 = 1e6;
/// Largest transconductance parameter K accepted, A/V².
pub const K_MAX_A_PER_V2: f64 = 1e3;
/// Highest low-frequency corner accepted, hertz (1 MHz).
pub const F_LOW_MAX_HZ: f64 = 1e6;
/// Resistor range when `[parts] range` is absent, ohms (10 Ω to 10 MΩ).
pub const DEFAULT_R_RANGE_OHM: (f64, f64) = (10.0, 10e6);
/// Series used when `[parts] series` is absent.
pub const DEFAULT_SERIES: ESeries = ESeries::E24;

/// Known keys of each table; `""` is the top level.
pub(crate) const SECTIONS: &[(&str, &[&str])] = &[
    (
        "",
        &[
            "name", "target", "supply", "load", "input", "headroom", "limits", "band", "device",
            "parts",
        ],
    ),
    ("target", &["gain", "gain_db", "tolerance", "polarity"]),
    ("supply", &["vdd", "vss", "tolerance"]),
    ("load", &["rl"]),
    ("input", &["zin_min", "source_resistance"]),
    ("headroom", &["vds_min"]),
    ("limits", &["id_max", "power_max", "zout_max"]),
    ("band", &["f_low"]),
    (
        "device",
        &[
            "family", "class", "idss", "vgs_off", "vth", "k", "id_on", "vgs_on", "lambda",
            "vgs_max", "vds_max", "pd_max",
        ],
    ),
    ("parts", &["series", "tolerance", "range"]),
];

/// The quantity of each numeric key, by dotted path: the unit its text may
/// carry (`load.rl = "47kV"` is refused). The device's keys take
/// `device::input::quantity`; an inline range table
/// (`device.idss = { min = .. }`) takes its parameter's.
pub(crate) const QUANTITIES: &[(&str, Quantity)] = &[
    ("target.gain", Quantity::Gain),
    ("target.gain_db", Quantity::Decibels),
    ("target.tolerance", Quantity::Ratio),
    ("supply.vdd", Quantity::Voltage),
    ("supply.vss", Quantity::Voltage),
    ("supply.tolerance", Quantity::Ratio),
    ("load.rl", Quantity::Resistance),
    ("input.zin_min", Quantity::Resistance),
    ("input.source_resistance", Quantity::Resistance),
    ("headroom.vds_min", Quantity::Voltage),
    ("limits.id_max", Quantity::Current),
    ("limits.power_max", Quantity::Power),
    ("limits.zout_max", Quantity::Resistance),
    ("band.f_low", Quantity::Frequency),
    ("parts.tolerance", Quantity::Ratio),
    ("parts.range", Quantity::Resistance),
];

const POLARITIES: [&str; 3] = ["inverting", "non-inverting", "any"];

/// Parse and check a specification against the given device classes.
pub(crate) fn validate(text: &str, classes: &[DeviceClass]) -> Result<ValidSpec, SpecError> {
    let entries = parse_document(text)?;
    let root = Section::root(&entries);
    root.check_keys()?;
    let name = match root.get("name") {
        None => String::new(),
        Some(e) => match &e.value {
            Node::Str(s) => s.clone(),
            _ => return Err(root.invalid(e, "must be a string (a free-text name)")),
        },
    };
    let target = target(&root.required_section(
        "target",
        "the gain requirement: `gain` (V/V) and `tolerance`",
    )?)?;
    let supply =
        supply(&root.required_section("supply", "the rails: `vdd` (V), optionally `vss`")?)?;
    let load = root.required_section("load", "the load: `rl` (ohms)")?;
    let rl_ohm = resistance(&load.required_num("rl", "the load resistance, ohms")?)?;
    let input = root.required_section("input", "the input requirement: `zin_min` (ohms)")?;
    let zin = input.required_num("zin_min", "the minimum input impedance, ohms")?;
    let zin_min_ohm = resistance(&zin)?;
    let source_resistance_ohm = match input.num("source_resistance")? {
        None => 0.0,
        Some(n) => {
            n.check(n.v >= 0.0, "must be at least 0 Ω")?;
            n.check(n.v <= R_MAX_OHM, "must be at most 1 TΩ (1e12 Ω)")?;
            n.v
        }
    };
    let headroom = root.required_section("headroom", "the headroom: `vds_min` (V)")?;
    let vds = headroom.required_num(
        "vds_min",
        "the minimum drain–source voltage at every corner, volts",
    )?;
    vds.check(
        vds.v >= 0.0,
        "must be at least 0 V (saturation is checked separately)",
    )?;
    let span = supply.vdd_v - supply.vss_v;
    vds.check(
        vds.v < span,
        &format!(
            "must be less than the supply span vdd − vss = {} V",
            format_value(span)
        ),
    )?;
    let limits = match root.section("limits")? {
        None => Limits::default(),
        Some(s) => limits(&s)?,
    };
    let f_low_hz = match root.section("band")? {
        None => None,
        Some(s) => match s.num("f_low")? {
            None => None,
            Some(n) => {
                n.check(n.v > 0.0, "must be greater than 0 Hz")?;
                n.check(n.v <= F_LOW_MAX_HZ, "must be at most 1 MHz (1e6 Hz)")?;
                Some(n.v)
            }
        },
    };
    let dev = root.required_section(
        "device",
        "the device: `family` with its parameters, or `class`",
    )?;
    let device = super::device_spec::device(&dev, classes)?;
    let parts = match root.section("parts")? {
        None => Parts {
            catalog: CatalogChoice::Series(DEFAULT_SERIES),
            tolerance: None,
            r_min_ohm: DEFAULT_R_RANGE_OHM.0,
            r_max_ohm: DEFAULT_R_RANGE_OHM.1,
        },
        Some(s) => parts(&s)?,
    };
    zin.check(
        zin_min_ohm <= parts.r_max_ohm,
        &format!(
            "must not exceed the largest resistor `parts.range` allows ({} Ω): no bias \
             network made of those parts can reach it",
            format_value(parts.r_max_ohm)
        ),
    )?;
    Ok(ValidSpec {
        name,
        target,
        supply,
        rl_ohm,
        zin_min_ohm,
        source_resistance_ohm,
        vds_min_v: vds.v,
        limits,
        f_low_hz,
        device,
        parts,
    })
}

/// A resistance: > 0 and within the modelled range.
fn resistance(n: &Num) -> Result<f64, SpecError> {
    n.check(n.v > 0.0, "must be greater than 0 Ω")?;
    n.check(
        (R_MIN_OHM..=R_MAX_OHM).contains(&n.v),
        "must be between 1 mΩ and 1 TΩ (1e-3 to 1e12 Ω), the range gatewright models",
    )?;
    Ok(n.v)
}

fn target(s: &Section) -> Result<Target, SpecError> {
    let gain = match (s.num("gain")?, s.num("gain_db")?) {
        (Some(g), Some(db)) => {
            return Err(SpecError::Conflict {
                first: g.field.clone(),
                first_line: g.entry.line,
                second: db.field.clone(),
                second_line: db.entry.line,
                rule: "give exactly one of them".to_string(),
            })
        }
        (Some(g), None) => {
            g.check(
                g.v > 0.0,
                "must be greater than 0 (the gain is a magnitude; `polarity` sets the sign)",
            )?;
            g.check(
                (MIN_GAIN..=MAX_GAIN).contains(&g.v),
                "must be between 0.001 and 10000 (−60 to 80 dB), the range one stage covers",
            )?;
            g.v
        }
        (None, Some(db)) => {
            db.check(
                (-60.0..=80.0).contains(&db.v),
                "must be between -60 and 80 dB (gain 0.001 to 10000)",
            )?;
            10f64.powf(db.v / 20.0)
        }
        (None, None) => {
            return Err(s.missing("gain", "give `gain` (V/V) or `gain_db` (dB)"));
        }
    };
    let tol = s.required_num(
        "tolerance",
        "the relative gain tolerance, e.g. 0.1 for ±10 %",
    )?;
    tol.check(
        tol.v > 0.0 && tol.v < 1.0,
        "must be greater than 0 and less than 1 (|gain| must lie within gain·(1 ± tolerance))",
    )?;
    let polarity = match s.string("polarity")? {
        None => Polarity::Any,
        Some((p, e)) => match p.as_str() {
            "inverting" => Polarity::Inverting,
            "non-inverting" => Polarity::NonInverting,
            "any" => Polarity::Any,
            other => {
                let mut rule = "must be \"inverting\", \"non-inverting\" or \"any\"".to_string();
                if let Some(c) = closest(other, &POLARITIES) {
                    rule.push_str(&format!(" (did you mean \"{c}\"?)"));
                }
                return Err(s.invalid(e, &rule));
            }
        },
    };
    Ok(Target {
        gain,
        tolerance: tol.v,
        polarity,
    })
}

fn supply(s: &Section) -> Result<Supply, SpecError> {
    let vdd = s.required_num("vdd", "the positive rail, volts")?;
    vdd.check(vdd.v > 0.0, "must be greater than 0 V (the positive rail)")?;
    vdd.check(vdd.v <= V_MAX_V, "must be at most 10 kV (1e4 V)")?;
    let vss_v = match s.num("vss")? {
        None => 0.0,
        Some(n) => {
            n.check(
                n.v <= 0.0,
                "must be at most 0 V (the negative rail; 0 for a single supply)",
            )?;
            n.check(n.v >= -V_MAX_V, "must be at least -10 kV (-1e4 V)")?;
            n.v
        }
    };
    let tolerance = match s.num("tolerance")? {
        None => 0.0,
        Some(n) => {
            n.check(
                (0.0..1.0).contains(&n.v),
                "must be at least 0 and less than 1 (relative tolerance of both rails)",
            )?;
            n.v
        }
    };
    Ok(Supply {
        vdd_v: vdd.v,
        vss_v,
        tolerance,
    })
}

fn limits(s: &Section) -> Result<Limits, SpecError> {
    let id_max_a = s
        .num("id_max")?
        .map(|n| {
            n.check(n.v > 0.0, "must be greater than 0 A")?;
            n.check(n.v <= I_MAX_A, "must be at most 100 A")?;
            Ok(n.v)
        })
        .transpose()?;
    let power_max_w = s
        .num("power_max")?
        .map(|n| {
            n.check(n.v > 0.0, "must be greater than 0 W")?;
            n.check(n.v <= P_MAX_W, "must be at most 1 MW (1e6 W)")?;
            Ok(n.v)
        })
        .transpose()?;
    let zout_max_ohm = s.num("zout_max")?.map(|n| resistance(&n)).transpose()?;
    Ok(Limits {
        id_max_a,
        power_max_w,
        zout_max_ohm,
    })
}

fn parts(s: &Section) -> Result<Parts, SpecError> {
    let catalog = match s.string("series")? {
        None => CatalogChoice::Series(DEFAULT_SERIES),
        Some((name, e)) => {
            if name.to_ascii_lowercase().ends_with(".toml") {
                CatalogChoice::StockFile(name)
            } else if let Some(series) = ESeries::from_name(&name) {
                CatalogChoice::Series(series)
            } else {
                let names: Vec<&str> = ESeries::ALL.iter().map(|e| e.name()).collect();
                let mut rule = format!(
                    "must be an E-series name ({}) or a stock-list file ending in .toml",
                    names.join(", ")
                );
                if let Some(c) = closest(&name.to_ascii_uppercase(), &names) {
                    rule.push_str(&format!(" (did you mean \"{c}\"?)"));
                }
                return Err(s.invalid(e, &rule));
            }
        }
    };
    let tolerance = s
        .num("tolerance")?
        .map(|n| {
            n.check(
                (0.0..1.0).contains(&n.v),
                "must be at least 0 and less than 1 (0 means ideal parts)",
            )?;
            Ok(n.v)
        })
        .transpose()?;
    let (r_min_ohm, r_max_ohm) = match s.get("range") {
        None => DEFAULT_R_RANGE_OHM,
        Some(e) => range_pair(s, e)?,
    };
    Ok(Parts {
        catalog,
        tolerance,
        r_min_ohm,
        r_max_ohm,
    })
}

/// `[parts] range`: two resistances in either order.
fn range_pair(s: &Section, e: &Entry) -> Result<(f64, f64), SpecError> {
    let rule = "must be a two-element array [min, max] of resistances (either order)";
    let Node::Array(items) = &e.value else {
        return Err(s.invalid(e, rule));
    };
    let [a, b] = items.as_slice() else {
        return Err(s.invalid(e, rule));
    };
    let mut vals = [0.0; 2];
    for (slot, item) in vals.iter_mut().zip([a, b]) {
        let v = super::fields::number_of(item, s.quantity(&e.key)).map_err(|r| s.invalid(e, &r))?;
        let n = Num {
            v,
            field: s.field(&e.key),
            entry: e,
        };
        *slot = resistance(&n)?;
    }
    Ok((vals[0].min(vals[1]), vals[0].max(vals[1])))
}
