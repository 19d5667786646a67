#![allow(missing_docs, clippy::expect_used)]
//! The full search on the shipped examples (worst case), on E24 as shipped
//! and on E96 over 1 Ω–10 MΩ; and the JFET examples with λ = 0.02 /V.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use gatewright::catalog::{Catalog, ESeries};
use gatewright::search::{self, Options, Shelf};
use gatewright::spec::CatalogChoice;
use gatewright::spec::ValidSpec;

fn load(name: &str) -> ValidSpec {
    gatewright::spec::parse(&example_text(name)).expect("valid example")
}

fn example_text(name: &str) -> String {
    let path = format!("{}/examples/{name}.toml", env!("CARGO_MANIFEST_DIR"));
    std::fs::read_to_string(&path).expect("example")
}

/// An example with channel-length modulation λ = 0.02 /V added to its
/// device (the search's slower path: the operating point moves with RD).
fn load_with_lambda(name: &str) -> ValidSpec {
    let text = example_text(name);
    assert!(text.contains("[device]\n"), "{name} has no [device] table");
    let text = text.replacen("[device]\n", "[device]\nlambda = 0.02\n", 1);
    gatewright::spec::parse(&text).expect("valid example with lambda")
}

/// The JFET examples the λ > 0 variant runs on.
const LAMBDA_EXAMPLES: [&str; 3] = ["battery-stage", "line-gain", "dual-rail"];

fn shelf(spec: &ValidSpec, series: Option<ESeries>, range: Option<(f64, f64)>) -> Shelf {
    let (lo, hi) = range.unwrap_or((spec.parts.r_min_ohm, spec.parts.r_max_ohm));
    let s = match (series, &spec.parts.catalog) {
        (Some(s), _) => s,
        (None, CatalogChoice::Series(s)) => *s,
        (None, _) => ESeries::E24,
    };
    let cat = Catalog::from_series(s, spec.parts.tolerance, lo, hi).expect("catalog");
    Shelf::new(&cat, spec.parts.tolerance, lo, hi)
}

/// The shipped examples.
const EXAMPLES: [&str; 6] = [
    "piezo-buffer",
    "cable-driver",
    "battery-stage",
    "line-gain",
    "dual-rail",
    "high-voltage-dmos",
];

fn bench(c: &mut Criterion) {
    let mut g = c.benchmark_group("design");
    g.sample_size(10);
    // Each example on its own shelf, then on E96 over 1 Ω–10 MΩ.
    for e96 in [false, true] {
        for name in EXAMPLES {
            let spec = load(name);
            let sh = if e96 {
                shelf(&spec, Some(ESeries::E96), Some((1.0, 10e6)))
            } else {
                shelf(&spec, None, None)
            };
            let label = if e96 { "E96-1R-10M" } else { sh.name.as_str() };
            g.bench_function(format!("{name}/{label}"), |b| {
                b.iter(|| {
                    search::run(black_box(&spec), black_box(&sh), &Options::default())
                        .expect("search")
                })
            });
        }
    }
    // λ = 0.02 on the examples' own shelves.
    for name in LAMBDA_EXAMPLES {
        let spec = load_with_lambda(name);
        let sh = shelf(&spec, None, None);
        g.bench_function(format!("{name}-lambda/{}", sh.name), |b| {
            b.iter(|| {
                search::run(black_box(&spec), black_box(&sh), &Options::default()).expect("search")
            })
        });
    }
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
