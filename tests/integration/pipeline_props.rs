//! Random valid specifications through the whole default pipeline: every
//! reported design is feasible under the full worst-case evaluation and is
//! confirmed by the independent nodal solver at every device corner; nothing
//! panics; two runs give byte-identical output.

use gatewright::analysis::{all_pass, margins, worst_case, Problem};
use gatewright::catalog::{Catalog, ESeries};
use gatewright::device::{Device, Family, ParamRange, Params, Strength};
use gatewright::search::{self, Options, Shelf};
use gatewright::spec::{CatalogChoice, Limits, Parts, Polarity, Supply, Target, ValidSpec};
use proptest::prelude::*;
use proptest::test_runner::{Config, TestRunner};

fn device(family: Family, a: f64, b: f64, sa: f64, sb: f64) -> Device {
    let params = match family {
        Family::NEnhancementMosfet => Params::Enhancement {
            vth: ParamRange::between(a, a * sa),
            strength: Strength::K(ParamRange::between(b, b * sb)),
        },
        _ => Params::Depletion {
            idss: ParamRange::between(b, b * sb),
            vgs_off: ParamRange::between(-a, -a * sa),
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
struct Case {
    spec: ValidSpec,
}

fn case() -> impl Strategy<Value = Case> {
    (
        0usize..3,
        (0.6f64..3.0, 1.0f64..1.6),
        (0.3f64..3.0, 1.0f64..2.0),
        (6.0f64..30.0, prop_oneof![Just(0.0), -15.0f64..-3.0]),
        (prop_oneof![0.3f64..0.95, 1.5f64..12.0], 0.15f64..0.45),
        (2.0f64..4.0, 0.0f64..0.9, 0.0f64..2.5),
        (0usize..3, prop_oneof![Just(0.0), Just(0.02), Just(0.1)]),
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
            )| {
                let family = Family::ALL[fam];
                // Device strength scaled to the decade so currents are sensible.
                let r_lo = 10f64.powf(decade.floor());
                let b = match family {
                    Family::NEnhancementMosfet => bm * 1e-3 * (1e3 / r_lo),
                    _ => bm * 1e-3 * (1e3 / r_lo).sqrt(),
                };
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
                        tolerance: 0.0,
                    },
                    rl_ohm: r_lo * 5.0,
                    zin_min_ohm: r_lo * 10f64.powf(zin_frac),
                    source_resistance_ohm: 0.0,
                    vds_min_v: vds_min,
                    limits: Limits::default(),
                    f_low_hz: None,
                    device: device(family, a, b, sa, sb),
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

fn shelf(spec: &ValidSpec, series: ESeries) -> Shelf {
    let cat = Catalog::from_series(
        series,
        spec.parts.tolerance,
        spec.parts.r_min_ohm,
        spec.parts.r_max_ohm,
    )
    .expect("catalog");
    Shelf::new(
        &cat,
        spec.parts.tolerance,
        spec.parts.r_min_ohm,
        spec.parts.r_max_ohm,
    )
}

fn output(spec: &ValidSpec, shelf: &Shelf) -> (String, Vec<String>, search::Outcome) {
    let full = Problem::new(spec);
    let mut outcome = search::run(
        spec,
        shelf,
        &Options {
            top: 5,
            per_topology: 5,
            ..Options::default()
        },
    )
    .expect("search");
    let warnings = gatewright::crosscheck::retain_verified(&full, &mut outcome);
    let view = gatewright::summary::design_report(&full, &shelf.name, &outcome, Vec::new());
    let json = serde_json::to_string(&view).expect("json");
    let table = gatewright::report::table::design(&view);
    let csv = gatewright::report::csv::designs(&view);
    (format!("{json}\n{table}\n{csv}"), warnings, outcome)
}

#[test]
fn random_specifications_give_verified_deterministic_designs() {
    let cases: u32 = std::env::var("GATEWRIGHT_PIPELINE_CASES")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(10_000);
    let mut runner = TestRunner::new(Config {
        cases,
        failure_persistence: None,
        ..Config::default()
    });
    let designs = std::cell::Cell::new(0usize);
    let feasible = std::cell::Cell::new(0usize);
    runner
        .run(&(case(), 0usize..2), |(c, which)| {
            let spec = &c.spec;
            let shelf = shelf(spec, [ESeries::E6, ESeries::E12][which]);
            // Every design shown has passed the nodal solver at every corner
            // (retain_verified drops and reports any it does not confirm).
            let (first, warnings, outcome) = output(spec, &shelf);
            prop_assert!(
                warnings.is_empty(),
                "the nodal solver dropped designs: {warnings:?}"
            );
            let (second, _, _) = output(spec, &shelf);
            prop_assert_eq!(&first, &second, "two runs differ");
            // serde_json writes a non-finite number as null; the table would
            // print NaN or inf (the word "infeasible" aside).
            let words = first.replace("infeasible", "");
            prop_assert!(
                !words.contains("NaN") && !words.contains("inf") && !words.contains("null"),
                "NaN or inf in the output"
            );
            let p = Problem::new(spec);
            if !outcome.designs.is_empty() {
                feasible.set(feasible.get() + 1);
            }
            for d in &outcome.designs {
                designs.set(designs.get() + 1);
                let wc = worst_case(&p, d.topology, &d.values, &d.tolerances);
                prop_assert!(
                    all_pass(&margins(&p, d.topology, &wc)),
                    "reported design infeasible: {:?}",
                    d
                );
            }
            Ok(())
        })
        .unwrap();
    eprintln!(
        "pipeline property: {cases} random specifications, {} with designs, {} designs verified",
        feasible.get(),
        designs.get()
    );
    assert!(feasible.get() as u32 >= cases / 10);
}
