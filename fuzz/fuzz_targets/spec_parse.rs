//! Any text through the specification parser: it must return a value or a
//! typed error, never panic, and an accepted specification must be sane.
#![no_main]

use gatewright::device::classes::{self, DeviceClass};
use libfuzzer_sys::fuzz_target;
use std::sync::OnceLock;

/// The built-in device classes, read once: `spec::parse` is
/// `parse_with(text, &classes::builtin()?)`, and the class file is fixed
/// input, so re-reading it per run only slows the fuzzer.
fn builtin() -> &'static [DeviceClass] {
    static CLASSES: OnceLock<Vec<DeviceClass>> = OnceLock::new();
    CLASSES.get_or_init(|| classes::builtin().unwrap_or_default())
}

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    match gatewright::spec::parse_with(text, builtin()) {
        Ok(s) => {
            // An accepted spec holds finite, ordered numbers (validate.rs rules).
            assert!(s.rl_ohm.is_finite() && s.rl_ohm > 0.0, "rl {}", s.rl_ohm);
            assert!(s.supply.vdd_v.is_finite() && s.supply.vss_v.is_finite());
            assert!(s.supply.vdd_v > s.supply.vss_v);
            assert!(s.parts.r_min_ohm > 0.0 && s.parts.r_min_ohm <= s.parts.r_max_ohm);
            assert!(s.parts.r_max_ohm.is_finite());
        }
        Err(e) => {
            let msg = e.to_string();
            assert!(!msg.is_empty());
        }
    }
});
