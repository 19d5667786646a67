//! Integration tests.
#![allow(clippy::expect_used, clippy::unwrap_used)]

/// `design --pick N --out DIR`: the bench files written by the binary.
mod bench_outputs;
/// Bad specification files and arguments through the binary: exit 2,
/// pinned messages.
mod cli_errors;
/// Specification from standard input, shell completions, manual pages.
mod conventions;
/// Top designs of every example: closed form vs solver vs ngspice; `verify`.
mod crosscheck;
/// IEC 60063 tables and catalog queries.
mod eseries;
/// Fuzz corpora and regressions replayed through the parsers.
mod fuzz_replay;
/// Every JSON output against the strict schemas in `schema/`.
mod json_schema;
/// The module layering of DEVELOPERS.md, read from the sources.
mod layering;
/// Exported decks run through ngspice and compared with the closed forms.
mod ngspice;
/// Schematic, bias window, frequency response and BOM outputs.
mod pictures;
/// Random valid specifications through the default pipeline (10,000 cases).
mod pipeline_props;
/// The random-specification generator shared by the property tests.
mod random_spec;
/// Extreme but legal specifications: no NaN or infinity in any output.
mod robustness;
/// The default search against the exhaustive reference.
mod search_props;
/// Output swing, temperature, noise and distortion against ngspice.
mod signal_ngspice;
mod spec_errors;
/// The CLI's `--format spice` output of every example through ngspice.
mod spice_cli;
/// Exit codes and streams of the binary.
mod streams;
/// Shared helpers (ngspice runs).
mod util;
mod verify_props;
