//! How far a running search has come, for a progress display. The search
//! only counts here; the caller reads the counts from another thread and
//! draws (the library prints nothing).

use std::sync::atomic::{AtomicU64, Ordering};

/// Work done and work in all, in the search's own units (for the
/// exhaustive search, combinations of resistor values). Shared between
/// the search's threads and a thread that displays it.
#[derive(Debug, Default)]
pub struct Progress {
    done: AtomicU64,
    total: AtomicU64,
}

impl Progress {
    /// Nothing done, nothing known yet.
    pub fn new() -> Progress {
        Progress::default()
    }

    /// Units done so far.
    pub fn done(&self) -> u64 {
        self.done.load(Ordering::Relaxed)
    }

    /// Units in all (0 until the search knows).
    pub fn total(&self) -> u64 {
        self.total.load(Ordering::Relaxed)
    }

    pub(crate) fn set_total(&self, units: u64) {
        self.total.store(units, Ordering::Relaxed);
    }

    pub(crate) fn add(&self, units: u64) {
        self.done.fetch_add(units, Ordering::Relaxed);
    }
}
