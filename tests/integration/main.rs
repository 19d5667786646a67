//! Integration tests.

/// Exported decks run through ngspice and compared with the closed forms.
mod ngspice;
