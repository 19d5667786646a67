//! The `gatewright` command; everything lives in the library's `cli` module.

fn main() -> std::process::ExitCode {
    gatewright::cli::main()
}
