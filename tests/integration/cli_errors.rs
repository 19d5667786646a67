//! The command line against bad input: each malformed or nonsensical
//! specification is written to a temporary folder and run through
//! `gatewright design FILE`. Every case must exit 2, print nothing on stdout
//! and one line on stderr that names the field, the value and the rule; the
//! line is pinned exactly (the wording is part of the interface). Bad
//! arguments to `analyze` and `snap` are pinned the same way.
//!
//! The physical rules behind the device cases are the n-channel sign
//! conventions (VGS(off) < 0 for a JFET, VT > 0 for an enhancement MOSFET;
//! Boylestad & Nashelsky, chs. 6–7). The magnitude bounds are the tool's
//! own sanity limits in `src/spec/validate.rs` (common practice).

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

/// A valid specification (the same as the library-level error tests');
/// the line numbers in the messages below refer to it.
pub(crate) const BASE: &str = r#"name = "base"
[target]
gain = 4.0
tolerance = 0.2
polarity = "inverting"
[supply]
vdd = 15.0
vss = 0.0
[load]
rl = "10k"
[input]
zin_min = "1M"
[headroom]
vds_min = 2.0
[device]
family = "n-jfet"
idss = ["2m", "6m"]
vgs_off = ["-1", "-3"]
[parts]
series = "E24"
"#;

/// BASE with the first `old` replaced by `new`.
fn with(old: &str, new: &str) -> String {
    assert!(BASE.contains(old), "no {old:?} in BASE");
    BASE.replacen(old, new, 1)
}

/// The specification file's content.
enum Spec {
    Text(String),
    /// Bytes that are not UTF-8 text.
    NotUtf8,
}

struct Case {
    what: &'static str,
    spec: Spec,
    /// Further files beside the specification (stock lists).
    files: &'static [(&'static str, &'static str)],
    /// The stderr line after `error: `, with the folder written as `DIR`.
    want: &'static str,
}

/// A fresh, empty folder under the system temporary folder.
// Test helper outside a #[test] fn: a failure to make it must fail loudly.
#[allow(clippy::unwrap_used)]
pub(crate) fn temp_dir(tag: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("gatewright-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// Run the binary with `args`.
#[allow(clippy::unwrap_used)]
pub(crate) fn run(args: &[&str], cwd: &Path) -> Output {
    Command::new(env!("CARGO_BIN_EXE_gatewright"))
        .args(args)
        .current_dir(cwd)
        .env("NO_COLOR", "1")
        .output()
        .unwrap()
}

/// Exit 2, empty stdout, stderr exactly `error: {want}` (one line) once
/// `dir` is written as `DIR`.
fn assert_refused(what: &str, out: &Output, dir: &Path, want: &str) {
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr).replace(&dir.display().to_string(), "DIR");
    assert_eq!(
        out.status.code(),
        Some(2),
        "{what}: exit code; stderr {stderr}"
    );
    assert!(stdout.is_empty(), "{what}: stdout not empty: {stdout}");
    assert_eq!(stderr.trim_end(), format!("error: {want}"), "{what}");
    assert!(!stderr.contains("panicked"), "{what}: {stderr}");
}

fn spec_cases() -> Vec<Case> {
    vec![
        Case {
            what: "syntax: unclosed table header",
            spec: Spec::Text(with("[load]", "[load")),
            files: &[],
            want: "in `DIR/spec.toml`: TOML syntax error at line 9, column 6: invalid table header; expected `.`, `]`",
        },
        Case {
            what: "syntax: key without value",
            spec: Spec::Text(with("gain = 4.0", "gain =")),
            files: &[],
            want: "in `DIR/spec.toml`: TOML syntax error at line 3, column 7: invalid string; expected `\"`, `'`",
        },
        Case {
            what: "syntax: unterminated string",
            spec: Spec::Text(with("rl = \"10k\"", "rl = \"10k")),
            files: &[],
            want: "in `DIR/spec.toml`: TOML syntax error at line 10, column 10: invalid basic string",
        },
        Case {
            // TOML 1.0 (toml.io): a bare `10k` is no value; the hint names
            // the fix.
            what: "syntax: suffix value not quoted",
            spec: Spec::Text(with("rl = \"10k\"", "rl = 10k")),
            files: &[],
            want: "in `DIR/spec.toml`: TOML syntax error at line 10, column 8: expected newline, `#`; a value with a prefix letter is a string in TOML: write \"10k\"",
        },
        Case {
            what: "syntax: key given twice",
            spec: Spec::Text(with("gain = 4.0", "gain = 4.0\ngain = 5.0")),
            files: &[],
            want: "in `DIR/spec.toml`: TOML syntax error at line 4, column 1: duplicate key `gain` in table `target`",
        },
        Case {
            what: "syntax: prose instead of TOML",
            spec: Spec::Text("this is not a specification\n".to_string()),
            files: &[],
            want: "in `DIR/spec.toml`: TOML syntax error at line 1, column 6: expected `.`, `=`",
        },
        Case {
            what: "syntax: empty file",
            spec: Spec::Text("".to_string()),
            files: &[],
            want: "in `DIR/spec.toml`: `target` is required: a `[target]` section with the gain requirement: `gain` (V/V) and `tolerance`",
        },
        Case {
            what: "syntax: not UTF-8",
            spec: Spec::NotUtf8,
            files: &[],
            want: "reading `DIR/spec.toml`: the specification is not UTF-8 text (invalid at byte offset 8)",
        },
        Case {
            what: "type: gain as words",
            spec: Spec::Text(with("gain = 4.0", "gain = \"four\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `target.gain` = \"four\" (line 3): not a number (no digits); write a number or engineering notation such as \"4k7\", \"2.2M\", \"100n\"",
        },
        Case {
            what: "type: vdd boolean",
            spec: Spec::Text(with("vdd = 15.0", "vdd = true")),
            files: &[],
            want: "in `DIR/spec.toml`: `supply.vdd` = true (line 7): must be a number or an engineering string such as \"4k7\", not a boolean",
        },
        Case {
            what: "type: rl array of three",
            spec: Spec::Text(with("rl = \"10k\"", "rl = [1, 2, 3]")),
            files: &[],
            want: "in `DIR/spec.toml`: `load.rl` = [1, 2, 3] (line 10): must be a number or an engineering string such as \"4k7\", not an array",
        },
        Case {
            what: "type: family a number",
            spec: Spec::Text(with("family = \"n-jfet\"", "family = 3")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.family` = 3 (line 16): must be a string, not a number",
        },
        Case {
            what: "type: polarity a number",
            spec: Spec::Text(with("polarity = \"inverting\"", "polarity = 1")),
            files: &[],
            want: "in `DIR/spec.toml`: `target.polarity` = 1 (line 5): must be a string, not a number",
        },
        Case {
            what: "type: name a number",
            spec: Spec::Text(with("name = \"base\"", "name = 5")),
            files: &[],
            want: "in `DIR/spec.toml`: `name` = 5 (line 1): must be a string (a free-text name)",
        },
        Case {
            what: "type: target a number",
            spec: Spec::Text(BASE.replace("[target]\ngain = 4.0\ntolerance = 0.2\npolarity = \"inverting\"\n", "target = 5\n")),
            files: &[],
            want: "in `DIR/spec.toml`: `target` = 5 (line 2): must be a table (a `[target]` section)",
        },
        Case {
            what: "type: vds_min a date",
            spec: Spec::Text(with("vds_min = 2.0", "vds_min = 2024-01-01")),
            files: &[],
            want: "in `DIR/spec.toml`: TOML syntax error at line 14, column 11: a date-time is not a value any key of a specification takes",
        },
        Case {
            what: "unknown key: misspelt gain",
            spec: Spec::Text(with("gain = 4.0", "gian = 4.0")),
            files: &[],
            want: "in `DIR/spec.toml`: unknown key `target.gian` (line 3): did you mean `gain`?",
        },
        Case {
            what: "unknown key: extra table",
            spec: Spec::Text(format!("{BASE}{}", "[extras]\nfoo = 1\n")),
            files: &[],
            want: "in `DIR/spec.toml`: unknown key `extras` (line 21): the top level takes `name`, `target`, `supply`, `load`, `input`, `headroom`, `limits`, `band`, `device`, `parts`",
        },
        Case {
            what: "unknown key: misspelt device key",
            spec: Spec::Text(with("idss = [\"2m\", \"6m\"]", "idsss = [\"2m\", \"6m\"]")),
            files: &[],
            want: "in `DIR/spec.toml`: unknown key `device.idsss` (line 17): did you mean `idss`?",
        },
        Case {
            what: "missing: no target table",
            spec: Spec::Text(BASE.replace("[target]\ngain = 4.0\ntolerance = 0.2\npolarity = \"inverting\"\n", "")),
            files: &[],
            want: "in `DIR/spec.toml`: `target` is required: a `[target]` section with the gain requirement: `gain` (V/V) and `tolerance`",
        },
        Case {
            what: "missing: no rl",
            spec: Spec::Text(with("rl = \"10k\"", "")),
            files: &[],
            want: "in `DIR/spec.toml`: `load.rl` is required (section at line 9): the load resistance, ohms",
        },
        Case {
            what: "resistance: rl zero",
            spec: Spec::Text(with("rl = \"10k\"", "rl = 0")),
            files: &[],
            want: "in `DIR/spec.toml`: `load.rl` = 0 (line 10): must be greater than 0 Ω",
        },
        Case {
            what: "resistance: rl negative",
            spec: Spec::Text(with("rl = \"10k\"", "rl = \"-10k\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `load.rl` = \"-10k\" (line 10): must be greater than 0 Ω",
        },
        Case {
            what: "resistance: zin_min zero",
            spec: Spec::Text(with("zin_min = \"1M\"", "zin_min = 0")),
            files: &[],
            want: "in `DIR/spec.toml`: `input.zin_min` = 0 (line 12): must be greater than 0 Ω",
        },
        Case {
            what: "resistance: range starts at zero",
            spec: Spec::Text(with("series = \"E24\"", "series = \"E24\"\nrange = [\"0\", \"1M\"]")),
            files: &[],
            want: "in `DIR/spec.toml`: `parts.range` = [\"0\", \"1M\"] (line 21): must be greater than 0 Ω",
        },
        Case {
            what: "resistance: source resistance negative",
            spec: Spec::Text(with("zin_min = \"1M\"", "zin_min = \"1M\"\nsource_resistance = -1")),
            files: &[],
            want: "in `DIR/spec.toml`: `input.source_resistance` = -1 (line 13): must be at least 0 Ω",
        },
        Case {
            what: "non-finite: vdd nan",
            spec: Spec::Text(with("vdd = 15.0", "vdd = nan")),
            files: &[],
            want: "in `DIR/spec.toml`: `supply.vdd` = nan (line 7): must be a finite number (NaN and infinity are not values)",
        },
        Case {
            what: "non-finite: gain inf",
            spec: Spec::Text(with("gain = 4.0", "gain = inf")),
            files: &[],
            want: "in `DIR/spec.toml`: `target.gain` = inf (line 3): must be a finite number (NaN and infinity are not values)",
        },
        Case {
            what: "non-finite: rl text inf",
            spec: Spec::Text(with("rl = \"10k\"", "rl = \"inf\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `load.rl` = \"inf\" (line 10): not a number (no digits); write a number or engineering notation such as \"4k7\", \"2.2M\", \"100n\"",
        },
        Case {
            what: "non-finite: vds_min -inf",
            spec: Spec::Text(with("vds_min = 2.0", "vds_min = -inf")),
            files: &[],
            want: "in `DIR/spec.toml`: `headroom.vds_min` = -inf (line 14): must be a finite number (NaN and infinity are not values)",
        },
        Case {
            what: "non-finite: idss nan in range",
            spec: Spec::Text(with("idss = [\"2m\", \"6m\"]", "idss = [nan, \"6m\"]")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.idss` = [nan, \"6m\"] (line 17): must be a finite number (NaN and infinity are not values)",
        },
        Case {
            what: "tolerance: gain tolerance 1",
            spec: Spec::Text(with("tolerance = 0.2", "tolerance = 1.0")),
            files: &[],
            want: "in `DIR/spec.toml`: `target.tolerance` = 1.0 (line 4): must be greater than 0 and less than 1 (|gain| must lie within gain·(1 ± tolerance))",
        },
        Case {
            what: "tolerance: supply tolerance 1.5",
            spec: Spec::Text(with("vss = 0.0", "vss = 0.0\ntolerance = 1.5")),
            files: &[],
            want: "in `DIR/spec.toml`: `supply.tolerance` = 1.5 (line 9): must be at least 0 and less than 1 (relative tolerance of both rails)",
        },
        Case {
            what: "tolerance: parts tolerance 1",
            spec: Spec::Text(with("series = \"E24\"", "series = \"E24\"\ntolerance = 1")),
            files: &[],
            want: "in `DIR/spec.toml`: `parts.tolerance` = 1 (line 21): must be at least 0 and less than 1 (0 means ideal parts)",
        },
        Case {
            what: "tolerance: parts tolerance negative",
            spec: Spec::Text(with("series = \"E24\"", "series = \"E24\"\ntolerance = -0.05")),
            files: &[],
            want: "in `DIR/spec.toml`: `parts.tolerance` = -0.05 (line 21): must be at least 0 and less than 1 (0 means ideal parts)",
        },
        Case {
            what: "headroom: vds_min equal to vdd",
            spec: Spec::Text(with("vds_min = 2.0", "vds_min = 15")),
            files: &[],
            want: "in `DIR/spec.toml`: `headroom.vds_min` = 15 (line 14): must be less than the supply span vdd − vss = 15 V",
        },
        Case {
            what: "headroom: vds_min above vdd",
            spec: Spec::Text(with("vds_min = 2.0", "vds_min = 20")),
            files: &[],
            want: "in `DIR/spec.toml`: `headroom.vds_min` = 20 (line 14): must be less than the supply span vdd − vss = 15 V",
        },
        Case {
            what: "headroom: vds_min negative",
            spec: Spec::Text(with("vds_min = 2.0", "vds_min = -1")),
            files: &[],
            want: "in `DIR/spec.toml`: `headroom.vds_min` = -1 (line 14): must be at least 0 V (saturation is checked separately)",
        },
        Case {
            what: "zin: above every resistor in range",
            spec: Spec::Text(with("zin_min = \"1M\"", "zin_min = \"100M\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `input.zin_min` = \"100M\" (line 12): must not exceed the largest resistor `parts.range` allows (10M Ω): no bias network made of those parts can reach it",
        },
        Case {
            what: "zin: above a narrow range",
            spec: Spec::Text(with("series = \"E24\"", "series = \"E24\"\nrange = [\"10\", \"470k\"]")),
            files: &[],
            want: "in `DIR/spec.toml`: `input.zin_min` = \"1M\" (line 12): must not exceed the largest resistor `parts.range` allows (470k Ω): no bias network made of those parts can reach it",
        },
        Case {
            what: "stock: empty file",
            spec: Spec::Text(with("series = \"E24\"", "series = \"stock.toml\"")),
            files: &[("stock.toml", "")],
            want: "in stock list `DIR/stock.toml`: `part` = (none): a stock list needs at least one [[part]] with a `value`",
        },
        Case {
            what: "stock: no parts, only a name",
            spec: Spec::Text(with("series = \"E24\"", "series = \"stock.toml\"")),
            files: &[("stock.toml", "name = \"drawer\"\ntolerance = 0.05\n")],
            want: "in stock list `DIR/stock.toml`: `part` = (none): a stock list needs at least one [[part]] with a `value`",
        },
        Case {
            what: "stock: negative value",
            spec: Spec::Text(with("series = \"E24\"", "series = \"stock.toml\"")),
            files: &[("stock.toml", "tolerance = 0.05\n[[part]]\nvalue = \"-4k7\"\n")],
            want: "in stock list `DIR/stock.toml`: line 3: `part[1].value` = \"-4k7\": must be a finite number greater than 0 ohms",
        },
        Case {
            what: "stock: syntax error",
            spec: Spec::Text(with("series = \"E24\"", "series = \"stock.toml\"")),
            files: &[("stock.toml", "[[part]\nvalue = 1\n")],
            want: "in stock list `DIR/stock.toml`: line 1, column 7: invalid table header; expected `.`, `]]`",
        },
        Case {
            what: "stock: file missing",
            spec: Spec::Text(with("series = \"E24\"", "series = \"missing-stock.toml\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `parts.series` = \"missing-stock.toml\": reading `DIR/missing-stock.toml`: No such file or directory (os error 2)",
        },
        Case {
            what: "stock: part without tolerance",
            spec: Spec::Text(with("series = \"E24\"", "series = \"stock.toml\"")),
            files: &[("stock.toml", "[[part]]\nvalue = \"4k7\"\n")],
            want: "in stock list `DIR/stock.toml`: line 2: `part[1].tolerance` = (missing): give the part a `tolerance` or set a top-level `tolerance` default",
        },
        Case {
            what: "device: idss min above max",
            spec: Spec::Text(with("idss = [\"2m\", \"6m\"]", "idss = { min = \"6m\", max = \"2m\" }")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.idss` = { min = \"6m\", max = \"2m\" } (line 17): `min` (6m) must not exceed `max` (2m)",
        },
        Case {
            what: "device: typ outside min..max",
            spec: Spec::Text(with("idss = [\"2m\", \"6m\"]", "idss = { min = \"2m\", typ = \"9m\", max = \"6m\" }")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.idss` = { min = \"2m\", typ = \"9m\", max = \"6m\" } (line 17): `typ` (9m) must lie between `min` (2m) and `max` (6m)",
        },
        Case {
            what: "device: enhancement VT below 0",
            spec: Spec::Text(with("family = \"n-jfet\"\nidss = [\"2m\", \"6m\"]\nvgs_off = [\"-1\", \"-3\"]", "family = \"n-enhancement-mosfet\"\nvth = [\"-1\", \"2.5\"]\nk = [\"2m\", \"8m\"]")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.vth` = [\"-1\", \"2.5\"] (line 17): must be greater than 0 V (an n-channel enhancement MOSFET's threshold is positive; a negative threshold means a depletion device: family = \"n-depletion-mosfet\" with `idss` and `vgs_off`)",
        },
        Case {
            what: "device: JFET VGS(off) above 0",
            spec: Spec::Text(with("vgs_off = [\"-1\", \"-3\"]", "vgs_off = [\"1\", \"3\"]")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.vgs_off` = [\"1\", \"3\"] (line 18): must be less than 0 V (an n-channel JFET's VGS(off) is negative)",
        },
        Case {
            what: "device: unknown family",
            spec: Spec::Text(with("family = \"n-jfet\"", "family = \"p-valve\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.family` = \"p-valve\" (line 16): must be one of \"n-jfet\", \"n-depletion-mosfet\", \"n-enhancement-mosfet\"",
        },
        Case {
            what: "device: unknown class",
            spec: Spec::Text(with("family = \"n-jfet\"\nidss = [\"2m\", \"6m\"]\nvgs_off = [\"-1\", \"-3\"]", "class = \"no-such-class\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.class` = \"no-such-class\" (line 16): is not a known device class; the classes are \"n-jfet-ultra-low-idss\", \"n-jfet-low-idss\", \"n-jfet-mid-idss\", \"n-jfet-high-idss\", \"n-jfet-very-high-idss\", \"n-enhancement-small-signal-60v\", \"n-depletion-dmos-low-current-hv\"",
        },
        Case {
            what: "device: idss zero",
            spec: Spec::Text(with("idss = [\"2m\", \"6m\"]", "idss = [0, \"6m\"]")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.idss` = [0, \"6m\"] (line 17): must be greater than 0 A (IDSS is the drain current at VGS = 0)",
        },
        Case {
            what: "device: lambda negative",
            spec: Spec::Text(with("family = \"n-jfet\"\nidss = [\"2m\", \"6m\"]\nvgs_off = [\"-1\", \"-3\"]", "family = \"n-jfet\"\nidss = [\"2m\", \"6m\"]\nvgs_off = [\"-1\", \"-3\"]\nlambda = -0.01")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.lambda` = -0.01 (line 19): must be at least 0 /V and less than 1 /V (channel-length modulation)",
        },
        Case {
            what: "magnitude: rl 1e30",
            spec: Spec::Text(with("rl = \"10k\"", "rl = 1e30")),
            files: &[],
            want: "in `DIR/spec.toml`: `load.rl` = 1e30 (line 10): must be between 1 mΩ and 1 TΩ (1e-3 to 1e12 Ω), the range gatewright models",
        },
        Case {
            what: "magnitude: vdd 1e30",
            spec: Spec::Text(with("vdd = 15.0", "vdd = 1e30")),
            files: &[],
            want: "in `DIR/spec.toml`: `supply.vdd` = 1e30 (line 7): must be at most 10 kV (1e4 V)",
        },
        Case {
            what: "magnitude: gain 1e30",
            spec: Spec::Text(with("gain = 4.0", "gain = 1e30")),
            files: &[],
            want: "in `DIR/spec.toml`: `target.gain` = 1e30 (line 3): must be between 0.001 and 10000 (−60 to 80 dB), the range one stage covers",
        },
        Case {
            what: "magnitude: id_max 1e30",
            spec: Spec::Text(format!("{BASE}{}", "[limits]\nid_max = 1e30\n")),
            files: &[],
            want: "in `DIR/spec.toml`: `limits.id_max` = 1e30 (line 22): must be at most 100 A",
        },
        Case {
            what: "magnitude: f_low 1e30",
            spec: Spec::Text(format!("{BASE}{}", "[band]\nf_low = 1e30\n")),
            files: &[],
            want: "in `DIR/spec.toml`: `band.f_low` = 1e30 (line 22): must be at most 1 MHz (1e6 Hz)",
        },
        Case {
            what: "magnitude: idss 1e30",
            spec: Spec::Text(with("idss = [\"2m\", \"6m\"]", "idss = [\"2m\", 1e30]")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.idss` = [\"2m\", 1e30] (line 17): must be at most 100 A in magnitude",
        },
        Case {
            what: "rails: vss above 0",
            spec: Spec::Text(with("vss = 0.0", "vss = 5")),
            files: &[],
            want: "in `DIR/spec.toml`: `supply.vss` = 5 (line 8): must be at most 0 V (the negative rail; 0 for a single supply)",
        },
        Case {
            what: "rails: vdd zero",
            spec: Spec::Text(with("vdd = 15.0", "vdd = 0")),
            files: &[],
            want: "in `DIR/spec.toml`: `supply.vdd` = 0 (line 7): must be greater than 0 V (the positive rail)",
        },
        Case {
            what: "parts: unknown series",
            spec: Spec::Text(with("series = \"E24\"", "series = \"E7\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `parts.series` = \"E7\" (line 20): must be an E-series name (E6, E12, E24, E48, E96, E192) or a stock-list file ending in .toml (did you mean \"E6\"?)",
        },
        Case {
            what: "parts: range of one value",
            spec: Spec::Text(with("series = \"E24\"", "series = \"E24\"\nrange = [\"1k\"]")),
            files: &[],
            want: "in `DIR/spec.toml`: `parts.range` = [\"1k\"] (line 21): must be a two-element array [min, max] of resistances (either order)",
        },
        Case {
            what: "target: polarity unknown",
            spec: Spec::Text(with("polarity = \"inverting\"", "polarity = \"sideways\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `target.polarity` = \"sideways\" (line 5): must be \"inverting\", \"non-inverting\" or \"any\"",
        },
        Case {
            what: "target: gain and gain_db both",
            spec: Spec::Text(with("gain = 4.0", "gain = 4.0\ngain_db = 12")),
            files: &[],
            want: "in `DIR/spec.toml`: `target.gain` (line 3) and `target.gain_db` (line 4): give exactly one of them",
        },
        Case {
            what: "target: gain zero",
            spec: Spec::Text(with("gain = 4.0", "gain = 0")),
            files: &[],
            want: "in `DIR/spec.toml`: `target.gain` = 0 (line 3): must be greater than 0 (the gain is a magnitude; `polarity` sets the sign)",
        },
        Case {
            what: "value: a voltage unit on a resistance",
            spec: Spec::Text(with("rl = \"10k\"", "rl = \"47kV\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `load.rl` = \"47kV\" (line 10): a resistance takes Ω (or ohm) or no unit",
        },
        Case {
            what: "value: a voltage unit on a current",
            spec: Spec::Text(with("idss = [\"2m\", \"6m\"]", "idss = [\"2m\", \"5mV\"]")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.idss` = [\"2m\", \"5mV\"] (line 17): a current takes A or no unit",
        },
        Case {
            what: "value: a unit in a range table",
            spec: Spec::Text(with("idss = [\"2m\", \"6m\"]", "idss = { min = \"2mA\", max = \"6mW\" }")),
            files: &[],
            want: "in `DIR/spec.toml`: `device.idss.max` = \"6mW\" (line 17): a current takes A or no unit",
        },
        Case {
            what: "value: exponent and scale letter",
            spec: Spec::Text(with("zin_min = \"1M\"", "zin_min = \"1e3k\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `input.zin_min` = \"1e3k\" (line 12): not a number (an exponent and a scale letter together; write one of them (1e6 or 1M)); write a number or engineering notation such as \"4k7\", \"2.2M\", \"100n\"",
        },
        Case {
            what: "value: garbage engineering text",
            spec: Spec::Text(with("rl = \"10k\"", "rl = \"10kk\"")),
            files: &[],
            want: "in `DIR/spec.toml`: `load.rl` = \"10kk\" (line 10): not a number (more than one scale letter); write a number or engineering notation such as \"4k7\", \"2.2M\", \"100n\"",
        },
    ]
}

#[test]
#[allow(clippy::unwrap_used)]
fn bad_specifications_exit_2_with_the_pinned_message() {
    let cases = spec_cases();
    assert!(cases.len() >= 40, "{} cases", cases.len());
    let root = temp_dir("cli-errors");
    let mut failures = Vec::new();
    for (i, c) in cases.iter().enumerate() {
        let dir = root.join(format!("c{i}"));
        std::fs::create_dir_all(&dir).unwrap();
        let path = dir.join("spec.toml");
        match &c.spec {
            Spec::Text(t) => std::fs::write(&path, t).unwrap(),
            Spec::NotUtf8 => std::fs::write(&path, b"name = \"\xff\xfe\"\n").unwrap(),
        }
        for (name, text) in c.files {
            std::fs::write(dir.join(name), text).unwrap();
        }
        let out = run(&["design", path.to_str().unwrap()], &dir);
        // Collect every mismatch so one run shows them all.
        if let Err(e) = std::panic::catch_unwind(|| assert_refused(c.what, &out, &dir, c.want)) {
            failures.push(format!("{}: {:?}", c.what, e.downcast_ref::<String>()));
        }
    }
    let _ = std::fs::remove_dir_all(&root);
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
#[allow(clippy::unwrap_used)]
fn unreadable_spec_paths_exit_2() {
    let dir = temp_dir("cli-paths");
    let missing = dir.join("no-such-spec.toml");
    let out = run(&["design", missing.to_str().unwrap()], &dir);
    assert_refused(
        "nonexistent path",
        &out,
        &dir,
        "reading `DIR/no-such-spec.toml`: No such file or directory (os error 2)",
    );
    let sub = dir.join("a-folder");
    std::fs::create_dir_all(&sub).unwrap();
    let out = run(&["design", sub.to_str().unwrap()], &dir);
    assert_refused(
        "directory as spec",
        &out,
        &dir,
        "reading `DIR/a-folder`: Is a directory (os error 21)",
    );
    let _ = std::fs::remove_dir_all(&dir);
}

/// Input files are read up to 64 MiB (README, "The specification file"):
/// a larger file is refused by its size, a device that never ends is read
/// up to the limit only, and a pipe under it is read as usual.
#[test]
#[allow(clippy::unwrap_used)]
fn oversized_and_endless_inputs_are_refused_naming_the_limit() {
    let dir = temp_dir("cli-limits");
    // A sparse file: 65 MiB long, no disk used.
    let big = dir.join("big.toml");
    std::fs::File::create(&big)
        .unwrap()
        .set_len(65 << 20)
        .unwrap();
    let out = run(&["design", big.to_str().unwrap()], &dir);
    assert_refused(
        "oversized spec",
        &out,
        &dir,
        "`DIR/big.toml`: the specification is 65 MiB, over the limit of 64 MiB for an input file",
    );
    std::fs::write(
        dir.join("spec.toml"),
        with("series = \"E24\"", "series = \"big.toml\""),
    )
    .unwrap();
    let out = run(&["design", "spec.toml"], &dir);
    assert_refused(
        "oversized stock list",
        &out,
        &dir,
        "in `spec.toml`: `parts.series` = \"big.toml\": `big.toml`: the stock list is 65 MiB, over the limit of 64 MiB for an input file",
    );
    let out = run(&["design", "/dev/zero"], &dir);
    assert_refused(
        "endless device",
        &out,
        &dir,
        "`/dev/zero`: the specification runs past the limit of 64 MiB for an input file (read as a stream, from a pipe or device)",
    );
    // A pipe (as a shell's `<(...)` gives) under the limit is read.
    let mut child = Command::new(env!("CARGO_BIN_EXE_gatewright"))
        .args(["design", "/dev/stdin", "--format", "json"])
        .current_dir(&dir)
        .stdin(std::process::Stdio::piped())
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    {
        use std::io::Write;
        let mut stdin = child.stdin.take().unwrap();
        stdin.write_all(BASE.as_bytes()).unwrap();
    }
    let out = child.wait_with_output().unwrap();
    // BASE has no feasible design (exit 1): an answer, not an error.
    assert_eq!(
        out.status.code(),
        Some(1),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(String::from_utf8_lossy(&out.stdout).contains("\"base\""));
    let _ = std::fs::remove_dir_all(&dir);
}

/// (what, arguments after the binary, exact message after `error: `).
/// `spec.toml` is BASE, in the working folder.
const ARG_CASES: &[(&str, &[&str], &str)] = &[
    (
        "analyze: unknown topology",
        &["analyze", "spec.toml", "--topology", "nonsense", "--values", "RD=1k"],
        "`--topology` = nonsense: unknown; expected one of zero-bias, self-bias, self-bias-swamped, divider, divider-swamped, divider-split, drain-feedback, follower-self, follower-divider, common-gate, fixed-bias, current-source",
    ),
    (
        "values: missing part",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG=1M,RS=1k"],
        "`--values`: missing RD (a self-bias needs RG, RS, RD)",
    ),
    (
        "values: unknown designator",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG=1M,RS=1k,RD=3k,RX=3"],
        "`--values`: `RX` is not a part of self-bias; its parts are RG, RS, RD",
    ),
    (
        "values: RS = 0 in self-bias",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG=1M,RS=0,RD=3k"],
        "`--values` RS = 0: RS of self-bias may not be 0 Ω (a wire); it must be between 1 mΩ and 1 TΩ",
    ),
    (
        "values: garbage number",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG=1M,RS=abc,RD=3k"],
        "`--values` RS: `abc` is not a value in engineering notation (no digits); expected e.g. 4k7, 2.2M, 100n, 10meg or 1.5e3",
    ),
    (
        "values: two scale letters",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG=1M,RS=4k7k,RD=3k"],
        "`--values` RS: `4k7k` is not a value in engineering notation (more than one scale letter); expected e.g. 4k7, 2.2M, 100n, 10meg or 1.5e3",
    ),
    (
        "values: part given twice",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG=1M,RS=1k,RD=3k,RD=4k"],
        "`--values`: RD is given twice",
    ),
    (
        "values: no equals sign",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG,RS=1k,RD=3k"],
        "`--values`: `RG` is not DESIGNATOR=VALUE (e.g. RD=6.8k)",
    ),
    (
        "values: absurd magnitude",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG=1e30,RS=1k,RD=3k"],
        "`--values` RG = 1e30: must be between 1 mΩ and 1 TΩ",
    ),
    (
        "values: negative",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG=1M,RS=-1k,RD=3k"],
        "`--values` RS = -1k: must be between 1 mΩ and 1 TΩ",
    ),
    (
        "analyze: csv format",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG=1M,RS=1k,RD=3k", "--format", "csv"],
        "`--format csv` is for `design`; use table, json or spice with `analyze`",
    ),
    (
        "analyze: dual-rail topology on a single supply",
        &["analyze", "spec.toml", "--topology", "current-source", "--values", "RG=1M,RS=1k,RD=3k"],
        "`--topology` = current-source: needs a negative rail; set `supply.vss` below 0 V",
    ),
    (
        "snap: garbage value",
        &["snap", "4kx7"],
        "VALUE `4kx7`: `4kx7` is not a value in engineering notation (more than one scale letter); expected e.g. 4k7, 2.2M, 100n, 10meg or 1.5e3",
    ),
    (
        "snap: nan",
        &["snap", "nan"],
        "VALUE `nan`: `nan` is not a value in engineering notation (no digits); expected e.g. 4k7, 2.2M, 100n, 10meg or 1.5e3",
    ),
    (
        "snap: zero",
        &["snap", "0"],
        "VALUE `0` = 0: a resistance must be greater than 0",
    ),
    (
        "snap: 1e300",
        &["snap", "1e300"],
        "VALUE `1e300`: must be between 1 mΩ and 1 TΩ (1e-3 to 1e12 Ω), the range gatewright models",
    ),
    (
        "snap: 1e-300",
        &["snap", "1e-300"],
        "VALUE `1e-300`: must be between 1 mΩ and 1 TΩ (1e-3 to 1e12 Ω), the range gatewright models",
    ),
    (
        "snap: 50 TΩ",
        &["snap", "5e13"],
        "VALUE `5e13`: must be between 1 mΩ and 1 TΩ (1e-3 to 1e12 Ω), the range gatewright models",
    ),
    (
        "snap: unknown series",
        &["snap", "1k", "--series", "E7"],
        "`--series` = E7: expected one of E6, E12, E24, E48, E96, E192",
    ),
    (
        "snap: ratio without total",
        &["snap", "--ratio", "0.5"],
        "`--ratio` needs `--total MIN..MAX` (the allowed R1 + R2, ohms)",
    ),
    (
        "snap: garbage ratio",
        &["snap", "--ratio", "abc", "--total", "1k..10k"],
        "`--ratio`: `abc` is not a value in engineering notation (no digits); expected e.g. 4k7, 2.2M, 100n, 10meg or 1.5e3",
    ),
    (
        "snap: total not a span",
        &["snap", "--ratio", "0.5", "--total", "10k"],
        "`--total`: `10k` is not MIN..MAX with two dots between the ends (e.g. 100k..1M)",
    ),
    (
        "snap: total with three dots",
        &["snap", "--ratio", "0.5", "--total", "100k...1M"],
        "`--total`: `100k...1M` is not MIN..MAX with two dots between the ends (e.g. 100k..1M)",
    ),
    (
        "snap: total with a voltage",
        &["snap", "--ratio", "0.5", "--total", "1k..10kV"],
        "`--total`: `10kV`: a resistance takes Ω (or ohm) or no unit",
    ),
    (
        "snap: a value with a current unit",
        &["snap", "4k7A"],
        "VALUE `4k7A`: `4k7A`: a resistance takes Ω (or ohm) or no unit",
    ),
    (
        "snap: spice format",
        &["snap", "4k7", "--format", "spice"],
        "`--format` for `snap` is table or json",
    ),
    (
        "snap: csv format",
        &["snap", "--ratio", "0.5", "--total", "1k..10k", "--format", "csv"],
        "`--format` for `snap` is table or json",
    ),
    (
        "values: a voltage unit",
        &["analyze", "spec.toml", "--topology", "self-bias", "--values", "RG=1M,RS=1kV,RD=3k"],
        "`--values` RS: `1kV`: a resistance takes Ω (or ohm) or no unit",
    ),
    (
        "snap: total from zero",
        &["snap", "--ratio", "0.5", "--total", "0..10k"],
        "`--total`: `0..10k`: both ends must be greater than 0",
    ),
    (
        "snap: total to 1e300",
        &["snap", "--ratio", "0.5", "--total", "1..1e300"],
        "`--total`: `1..1e300`: both ends must be between 1 mΩ and 1 TΩ (1e-3 to 1e12 Ω), the range gatewright models",
    ),
    (
        "snap: ratio above 1",
        &["snap", "--ratio", "1.5", "--total", "1k..10k"],
        "`--ratio` = 1.5: must lie between 1e-6 and 1 − 1e-6 (R2 over R1 + R2; a finer tap is beyond what resistor tolerances resolve)",
    ),
    (
        "snap: ratio 1e-300",
        &["snap", "--ratio", "1e-300", "--total", "1k..10k"],
        "`--ratio` = 1e-300: must lie between 1e-6 and 1 − 1e-6 (R2 over R1 + R2; a finer tap is beyond what resistor tolerances resolve)",
    ),
    (
        "snap: nothing to snap",
        &["snap"],
        "`snap` needs at least one VALUE (e.g. `gatewright snap 4k7 --series E96`) or `--ratio R --total MIN..MAX`",
    ),
];

#[test]
#[allow(clippy::unwrap_used)]
fn bad_arguments_exit_2_with_the_pinned_message() {
    let dir = temp_dir("cli-args");
    std::fs::write(dir.join("spec.toml"), BASE).unwrap();
    for (what, args, want) in ARG_CASES {
        let out = run(args, &dir);
        assert_refused(what, &out, &dir, want);
    }
    let _ = std::fs::remove_dir_all(&dir);
}
