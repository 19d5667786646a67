//! Integration tests.

mod eseries;
