//! The default search against the exhaustive reference on random
//! specifications (E12, restricted decades): the best scores agree, and
//! every design the default search reports is feasible under the full
//! worst-case evaluation.

use gatewright::analysis::{all_pass, margins, worst_case, Problem};
use gatewright::catalog::{Catalog, ESeries};
use gatewright::device::{Device, Family, ParamRange, Params, Strength};
use gatewright::search::{self, Method, Options, Shelf};
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

/// E12 over one decade (13 values with both ends), so the exhaustive search
/// over five-resistor topologies stays fast.
fn shelf(spec: &ValidSpec) -> Shelf {
    let cat = Catalog::from_series(
        ESeries::E12,
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

#[test]
fn default_search_matches_exhaustive_best_score() {
    let cases: u32 = std::env::var("GATEWRIGHT_SEARCH_CASES")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(300);
    let mut runner = TestRunner::new(Config {
        cases,
        failure_persistence: None,
        ..Config::default()
    });
    let feasible = std::cell::Cell::new(0u32);
    let smart_evals = std::cell::Cell::new(0u64);
    let exh_evals = std::cell::Cell::new(0f64);
    runner
        .run(&case(), |c| {
            let spec = &c.spec;
            let shelf = shelf(spec);
            let opts = Options {
                top: 3,
                per_topology: 3,
                ..Options::default()
            };
            let fast = search::run(spec, &shelf, &opts).expect("search");
            let slow = search::run(
                spec,
                &shelf,
                &Options {
                    method: Method::Exhaustive,
                    ..opts
                },
            )
            .expect("exhaustive");
            smart_evals
                .set(smart_evals.get() + fast.effort.corner_checks + fast.effort.exact_checks);
            exh_evals.set(exh_evals.get() + fast.effort.exhaustive_combinations);
            let best = |o: &search::Outcome| o.designs.first().map(|d| d.score);
            prop_assert_eq!(
                best(&fast).is_some(),
                best(&slow).is_some(),
                "feasibility differs: fast {:?} slow {:?}",
                fast.designs.first(),
                slow.designs.first()
            );
            if let (Some(a), Some(b)) = (best(&fast), best(&slow)) {
                feasible.set(feasible.get() + 1);
                prop_assert!(
                    (a - b).abs() <= 1e-12,
                    "best score: fast {a} ({:?}) exhaustive {b} ({:?})",
                    fast.designs[0],
                    slow.designs[0]
                );
            }
            // Every reported design is feasible under the full evaluation.
            let p = Problem::new(spec);
            for d in &fast.designs {
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
        "search equivalence: {cases} specifications, {} with a feasible design; default search did {} evaluations against {:.3e} exhaustive combinations",
        feasible.get(),
        smart_evals.get(),
        exh_evals.get()
    );
    assert!(
        feasible.get() >= cases / 10,
        "too few feasible cases ({}) to mean anything",
        feasible.get()
    );
}
