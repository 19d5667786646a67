//! Command-line interface: parse, dispatch, print. No engineering here.

use std::process::ExitCode;

/// Entry point of the binary.
pub fn main() -> ExitCode {
    ExitCode::SUCCESS
}
