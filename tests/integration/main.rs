//! Integration tests.

/// Bad specification files and arguments through the binary: exit 2,
/// pinned messages.
mod cli_errors;
/// IEC 60063 tables and catalog queries.
mod eseries;
/// Fuzz corpora and regressions replayed through the parsers.
mod fuzz_replay;
/// Exported decks run through ngspice and compared with the closed forms.
mod ngspice;
/// Schematic, bias window, frequency response and BOM outputs.
mod pictures;
/// Extreme but legal specifications: no NaN or infinity in any output.
mod robustness;
mod spec_errors;
/// Exit codes and streams of the binary.
mod streams;
mod verify_props;
