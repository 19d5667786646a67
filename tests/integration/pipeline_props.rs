//! Random valid specifications through the whole default pipeline: every
//! reported design is feasible under the full worst-case evaluation and is
//! confirmed by the independent nodal solver at every device corner; nothing
//! panics; two runs give byte-identical output.

use gatewright::analysis::{all_pass, margins, worst_case, Problem};
use gatewright::catalog::{Catalog, ESeries};
use gatewright::search::{self, Options, Shelf};
use gatewright::spec::ValidSpec;

use super::random_spec::case;
use proptest::prelude::*;
use proptest::test_runner::{Config, TestRunner};

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
    let warnings = gatewright::bench::crosscheck::retain_verified(&full, &mut outcome);
    let view = gatewright::bench::summary::design_report(&full, &shelf.name, &outcome, Vec::new());
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
