//! Integration tests.

/// Top designs of every example: closed form vs solver vs ngspice; `verify`.
mod crosscheck;
/// `design --pick N --out DIR`: the bench files written by the binary.
mod bench_outputs;
/// IEC 60063 tables and catalog queries.
mod eseries;
/// Exported decks run through ngspice and compared with the closed forms.
mod ngspice;
/// Schematic, bias window, frequency response and BOM outputs.
mod pictures;
/// The default search against the exhaustive reference.
mod search_props;
mod spec_errors;
/// Shared helpers (ngspice runs).
mod util;
mod verify_props;
