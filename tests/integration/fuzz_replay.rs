//! Every input the fuzzers kept (`fuzz/corpus/<target>/`) and every crash
//! they found (`fuzz/regressions/<target>/`) replayed through its parser:
//! each must give a value or a typed error, never a panic, so a fixed crash
//! stays fixed without cargo-fuzz installed. Also the `fuzz_*` property
//! tests over arbitrary strings, `#[ignore]`d because they are long
//! (`cargo test --release -- --ignored fuzz_`).

use gatewright::catalog::stock;
use gatewright::spec;
use gatewright::units::{format_value, parse_value};
use proptest::prelude::*;
use std::path::Path;

/// The fuzz targets, each with the parser it drives (the same three as
/// `fuzz/fuzz_targets/`).
type Target = (&'static str, fn(&str));

const TARGETS: [Target; 3] = [
    ("spec_parse", |t| {
        let _ = spec::parse(t).map_err(|e| e.to_string());
    }),
    ("value_parse", |t| {
        if let Ok(v) = parse_value(t) {
            assert!(v.is_finite(), "{t:?} -> {v}");
            // As the fuzz target: an accepted value prints without NaN or
            // inf (fuzz/regressions/value_parse/subnormal-formats-as-nan).
            let shown = format_value(v);
            assert!(
                !shown.contains("NaN") && !shown.contains("inf"),
                "{t:?} -> {shown}"
            );
        }
    }),
    ("stock_parse", |t| {
        let _ = stock::parse(t).map_err(|e| e.to_string());
    }),
];

/// Every file under `fuzz/<kind>/<target>/`, as (name, bytes).
// Test helper outside a #[test] fn: unreadable folders must fail loudly.
#[allow(clippy::unwrap_used)]
fn inputs(kind: &str, target: &str) -> Vec<(String, Vec<u8>)> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("fuzz")
        .join(kind)
        .join(target);
    let Ok(entries) = std::fs::read_dir(&dir) else {
        return Vec::new();
    };
    let mut out: Vec<(String, Vec<u8>)> = entries
        .map(|e| e.unwrap().path())
        .filter(|p| p.is_file())
        .map(|p| (p.display().to_string(), std::fs::read(&p).unwrap()))
        .collect();
    out.sort();
    out
}

#[test]
fn corpora_and_regressions_replay_without_panic() {
    for (target, parse) in TARGETS {
        let corpus = inputs("corpus", target);
        // The seeds alone are dozens of files; an empty folder means the
        // corpus went missing.
        assert!(corpus.len() >= 5, "{target}: {} corpus files", corpus.len());
        for (name, bytes) in corpus.iter().chain(&inputs("regressions", target)) {
            // libFuzzer hands the targets bytes; they skip what is not UTF-8.
            if let Ok(text) = std::str::from_utf8(bytes) {
                let r = std::panic::catch_unwind(|| parse(text));
                assert!(r.is_ok(), "{target}: {name} panicked");
            }
        }
    }
}

/// Text shaped like a specification: known tables and keys with random
/// values, so the search reaches the validator rather than stopping at TOML
/// syntax.
fn spec_like() -> impl Strategy<Value = String> {
    let key = prop::sample::select(vec![
        "[target]",
        "[supply]",
        "[load]",
        "[input]",
        "[headroom]",
        "[limits]",
        "[band]",
        "[device]",
        "[parts]",
        "gain",
        "gain_db",
        "tolerance",
        "polarity",
        "vdd",
        "vss",
        "rl",
        "zin_min",
        "vds_min",
        "id_max",
        "f_low",
        "family",
        "class",
        "idss",
        "vgs_off",
        "vth",
        "k",
        "lambda",
        "series",
        "range",
    ]);
    let value = prop_oneof![
        any::<f64>().prop_map(|v| format!("{v:?}")),
        "\"[-+]?[0-9]{0,4}[.]?[0-9]{0,3}[fpnumkKMGTR]?[0-9]{0,2}\"",
        Just("\"n-jfet\"".to_string()),
        Just("\"n-enhancement-mosfet\"".to_string()),
        Just("[\"1m\", \"5m\"]".to_string()),
        Just("{ min = 1, max = 0 }".to_string()),
        "\\PC{0,8}",
    ];
    prop::collection::vec((key, value), 0..24).prop_map(|kv| {
        kv.into_iter()
            .map(|(k, v)| {
                if k.starts_with('[') {
                    format!("{k}\n")
                } else {
                    format!("{k} = {v}\n")
                }
            })
            .collect()
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(20_000))]

    /// Arbitrary text and spec-shaped text through the spec parser.
    #[test]
    #[ignore = "long; run with --release -- --ignored fuzz_"]
    fn fuzz_spec_parse(text in prop_oneof!["\\PC{0,400}", spec_like()]) {
        (TARGETS[0].1)(&text);
    }

    /// Arbitrary and number-like text through the value parser.
    #[test]
    #[ignore = "long; run with --release -- --ignored fuzz_"]
    fn fuzz_value_parse(text in prop_oneof![
        "\\PC{0,24}",
        "[-+ ]?[0-9.eE+-]{0,12}[fpnuµmkKMGTRr]?[0-9]{0,3}(meg|MEG|ohm|Ω|V|A)?",
    ]) {
        (TARGETS[1].1)(&text);
    }

    /// Arbitrary text and stock-list-shaped text through the stock parser.
    #[test]
    #[ignore = "long; run with --release -- --ignored fuzz_"]
    fn fuzz_stock_parse(
        text in "\\PC{0,200}",
        parts in prop::collection::vec(("[-0-9.eEkMR]{1,6}", any::<f64>()), 0..12),
    ) {
        (TARGETS[2].1)(&text);
        let list: String = parts
            .iter()
            .map(|(v, t)| format!("[[part]]\nvalue = \"{v}\"\ntolerance = {t:?}\n"))
            .collect();
        (TARGETS[2].1)(&list);
    }
}
