//! Random valid specifications for the property tests: device strength
//! scaled to the resistor decade so that currents and gains are sensible,
//! and a mix of families, rails, targets and tolerances. A quarter of the
//! devices are exact (no spread: one corner, where many designs may be
//! feasible) and a quarter of the gain windows are tight (±2–7 %).
//!
//! The tail benchmark (`benches/random_specs.rs`) draws from the same
//! generator and widens the shelf.

use gatewright::catalog::ESeries;
use gatewright::device::{Device, Family, ParamRange, Params, Strength};
use gatewright::spec::{CatalogChoice, Limits, Parts, Polarity, Supply, Target, ValidSpec};
use proptest::prelude::*;

/// A device of `family` with parameters a..a·sa and b..b·sb (VT or
/// |VGS(off)|, volts; K or IDSS); a factor of 1 gives an exact value.
pub(crate) fn device(family: Family, a: f64, b: f64, sa: f64, sb: f64) -> Device {
    let range = |x: f64, s: f64| {
        if s == 1.0 {
            ParamRange::exact(x)
        } else {
            ParamRange::between(x, x * s)
        }
    };
    let params = match family {
        Family::NEnhancementMosfet => Params::Enhancement {
            vth: range(a, sa),
            strength: Strength::K(range(b, sb)),
        },
        _ => Params::Depletion {
            idss: range(b, sb),
            vgs_off: range(-a, sa),
        },
    };
    Device {
        family,
        params,
        lambda: ParamRange::exact(0.0),
        vgs_max_v: if family == Family::NJfet {
            Some(0.0)
        } else {
            None
        },
        vgs_min_v: None,
        vds_max_v: None,
        pd_max_w: None,
        source: "spec".to_string(),
    }
}

#[derive(Debug, Clone)]
pub(crate) struct Case {
    pub(crate) spec: ValidSpec,
}

pub(crate) fn case() -> impl Strategy<Value = Case> {
    (
        0usize..3,
        (0.6f64..3.0, 1.0f64..1.6),
        (0.3f64..3.0, 1.0f64..2.0),
        (6.0f64..30.0, prop_oneof![Just(0.0), -15.0f64..-3.0]),
        (prop_oneof![0.3f64..0.95, 1.5f64..12.0], 0.15f64..0.45),
        (2.0f64..4.0, 0.0f64..0.9, 0.0f64..2.5),
        (0usize..3, prop_oneof![Just(0.0), Just(0.02), Just(0.1)]),
        // Supply tolerance, source resistance, one limit, λ.
        (0usize..3, 0usize..3, 0usize..4, 0usize..3),
        // An exact device (no spread), a tight gain window.
        (0usize..4, 0usize..4),
    )
        .prop_map(
            |(
                fam,
                (a, sa),
                (bm, sb),
                (vdd, vss),
                (gain, tol),
                (decade, zin_frac, vds_min),
                (polar, rtol),
                (stol, rsig, limit, lambda),
                (exact, tight),
            )| {
                let family = Family::ALL[fam];
                // Device strength scaled to the decade so currents are sensible.
                let r_lo = 10f64.powf(decade.floor());
                let b = match family {
                    Family::NEnhancementMosfet => bm * 1e-3 * (1e3 / r_lo),
                    _ => bm * 1e-3 * (1e3 / r_lo).sqrt(),
                };
                let span = vdd - vss;
                // One optional limit, scaled to the device like the rest:
                // b is IDSS, or K·(1 V)² for the enhancement family.
                let limits = match limit {
                    1 => Limits {
                        id_max_a: Some(0.5 * b),
                        ..Limits::default()
                    },
                    2 => Limits {
                        power_max_w: Some(0.5 * b * span),
                        ..Limits::default()
                    },
                    3 => Limits {
                        zout_max_ohm: Some(3.0 * r_lo),
                        ..Limits::default()
                    },
                    _ => Limits::default(),
                };
                let (sa, sb) = if exact == 0 { (1.0, 1.0) } else { (sa, sb) };
                let tol = if tight == 0 { 0.15 * tol } else { tol };
                let mut device = device(family, a, b, sa, sb);
                if lambda == 2 {
                    device.lambda = ParamRange::exact(0.01);
                }
                let spec = ValidSpec {
                    name: "random".to_string(),
                    target: Target {
                        gain,
                        tolerance: tol,
                        polarity: [Polarity::Any, Polarity::Inverting, Polarity::NonInverting]
                            [polar],
                    },
                    supply: Supply {
                        vdd_v: vdd,
                        vss_v: vss,
                        tolerance: [0.0, 0.05, 0.1][stol],
                    },
                    rl_ohm: r_lo * 5.0,
                    zin_min_ohm: r_lo * 10f64.powf(zin_frac),
                    source_resistance_ohm: [0.0, 0.0, 0.5 * r_lo][rsig],
                    vds_min_v: vds_min,
                    limits,
                    f_low_hz: None,
                    device,
                    parts: Parts {
                        catalog: CatalogChoice::Series(ESeries::E12),
                        tolerance: Some(rtol),
                        r_min_ohm: r_lo,
                        r_max_ohm: r_lo * 10.0,
                    },
                };
                Case { spec }
            },
        )
}
