#![allow(missing_docs, clippy::expect_used)]
//! The full search on the shipped examples (worst case), on E24 as shipped
//! and on E96 over 1 Ω–10 MΩ, plus one independent nodal solve.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use gatewright::catalog::{Catalog, ESeries};
use gatewright::search::{self, Options, Shelf};
use gatewright::spec::CatalogChoice;
use gatewright::spec::ValidSpec;

fn load(name: &str) -> ValidSpec {
    let path = format!("{}/examples/{name}.toml", env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(&path).expect("example");
    gatewright::spec::parse(&text).expect("valid example")
}

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

fn bench(c: &mut Criterion) {
    let mut g = c.benchmark_group("design");
    g.sample_size(10);
    for name in [
        "piezo-buffer",
        "cable-driver",
        "battery-stage",
        "line-gain",
        "dual-rail",
        "high-voltage-dmos",
    ] {
        let spec = load(name);
        let sh = shelf(&spec, None, None);
        g.bench_function(format!("{name}/{}", sh.name), |b| {
            b.iter(|| {
                search::run(black_box(&spec), black_box(&sh), &Options::default()).expect("search")
            })
        });
    }
    for name in [
        "piezo-buffer",
        "cable-driver",
        "battery-stage",
        "line-gain",
        "dual-rail",
        "high-voltage-dmos",
    ] {
        let spec = load(name);
        let sh = shelf(&spec, Some(ESeries::E96), Some((1.0, 10e6)));
        g.bench_function(format!("{name}/E96-1R-10M"), |b| {
            b.iter(|| {
                search::run(black_box(&spec), black_box(&sh), &Options::default()).expect("search")
            })
        });
    }
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
