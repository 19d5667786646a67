//! Integration tests.

/// `design --pick N --out DIR`: the bench files written by the binary.
mod bench_outputs;
/// IEC 60063 tables and catalog queries.
mod eseries;
/// Exported decks run through ngspice and compared with the closed forms.
mod ngspice;
/// Schematic, bias window, frequency response and BOM outputs.
mod pictures;
mod spec_errors;
mod verify_props;
