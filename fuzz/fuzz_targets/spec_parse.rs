//! Any text through the specification parser: it must return a value or a
//! typed error, never panic, and an accepted specification must be sane.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    match gatewright::spec::parse(text) {
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
