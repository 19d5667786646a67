//! Integration tests.
mod spec_errors;
