//! Any text through the stock-list parser: a sorted catalog of finite,
//! positive values or a typed error, never a panic.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    match gatewright::catalog::stock::parse(text) {
        Ok(cat) => {
            assert!(!cat.parts.is_empty());
            for w in cat.parts.windows(2) {
                if let [a, b] = w {
                    assert!(
                        a.ohms < b.ohms,
                        "not strictly ascending: {} {}",
                        a.ohms,
                        b.ohms
                    );
                }
            }
            for p in &cat.parts {
                assert!(p.ohms.is_finite() && p.ohms > 0.0);
                assert!((0.0..1.0).contains(&p.tolerance));
            }
        }
        Err(e) => {
            let _ = e.to_string();
        }
    }
});
