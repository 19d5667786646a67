//! The specification parser against good and bad files: every example
//! parses, and each bad specification is refused with its exact message
//! (the messages are part of the interface: field, value, rule, line).

use gatewright::catalog::ESeries;
use gatewright::device::{Family, ParamRange, Params, Strength};
use gatewright::spec::{parse, CatalogChoice, Polarity};
use proptest::prelude::*;

/// A valid specification; the line numbers below refer to it.
const BASE: &str = r#"name = "base"
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

/// BASE with the line `old` replaced by `new` (which may span lines).
fn with(old: &str, new: &str) -> String {
    let lines: Vec<&str> = BASE.lines().collect();
    assert!(lines.contains(&old), "no line {old:?} in BASE");
    let mut out = String::new();
    for l in lines {
        out.push_str(if l == old { new } else { l });
        out.push('\n');
    }
    out
}

const ENH: &str = "family = \"n-enhancement-mosfet\"\nvth = [\"1\", \"2.5\"]\nk = [\"2m\", \"8m\"]";

// Test helper outside a #[test] fn: a missing examples folder should fail loudly.
#[allow(clippy::unwrap_used)]
fn examples() -> Vec<(String, String)> {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/examples");
    let mut out = Vec::new();
    for entry in std::fs::read_dir(dir).unwrap() {
        let path = entry.unwrap().path();
        if path.extension().is_some_and(|e| e == "toml") {
            let text = std::fs::read_to_string(&path).unwrap();
            out.push((path.display().to_string(), text));
        }
    }
    out.sort();
    out
}

#[test]
fn base_specification_is_valid() {
    let s = parse(BASE).unwrap();
    assert_eq!(s.name, "base");
    assert_eq!(s.target.polarity, Polarity::Inverting);
    assert_eq!(s.device.source, "spec");
}

#[test]
fn every_example_parses() {
    let ex = examples();
    assert!(ex.len() >= 5, "{} examples", ex.len());
    for (path, text) in &ex {
        let s = parse(text).unwrap_or_else(|e| panic!("{path}: {e}"));
        assert!(!s.name.is_empty(), "{path}");
    }
}

#[test]
fn examples_readme_lists_every_example() {
    let readme =
        std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/examples/README.md"))
            .unwrap();
    for (path, _) in examples() {
        let file = path.rsplit('/').next().unwrap();
        assert!(readme.contains(file), "README does not list {file}");
    }
}

#[test]
fn engineering_strings_are_read_as_values() {
    // Engineering notation as written on schematics (common practice):
    // 4k7 = 4.7 kΩ, 2M2 = 2.2 MΩ, 10meg = 10 MΩ, 100n = 100e-9.
    let text = with("rl = \"10k\"", "rl = \"4k7\"")
        .replace(
            "zin_min = \"1M\"",
            "zin_min = \"2M2\"\nsource_resistance = \"1k5\"",
        )
        .replace(
            "series = \"E24\"",
            "series = \"E24\"\nrange = [\"4R7\", \"10meg\"]",
        );
    let s = parse(&text).unwrap();
    assert_eq!(s.rl_ohm, 4700.0);
    assert!((s.zin_min_ohm - 2.2e6).abs() < 1e-6);
    assert_eq!(s.source_resistance_ohm, 1500.0);
    assert_eq!((s.parts.r_min_ohm, s.parts.r_max_ohm), (4.7, 10e6));
    let Params::Depletion { idss, .. } = s.device.params else {
        panic!()
    };
    assert!((idss.min - 2e-3).abs() < 1e-18 && (idss.max - 6e-3).abs() < 1e-18);
}

#[test]
fn two_element_arrays_are_ranges_in_either_order() {
    let fwd = parse(BASE).unwrap();
    let rev = parse(&with(
        "vgs_off = [\"-1\", \"-3\"]",
        "vgs_off = [\"-3\", \"-1\"]",
    ))
    .unwrap();
    assert_eq!(fwd.device, rev.device);
    let Params::Depletion { vgs_off, .. } = rev.device.params else {
        panic!()
    };
    assert_eq!((vgs_off.min, vgs_off.max, vgs_off.typ), (-3.0, -1.0, None));
    // [parts] range too.
    let r = parse(&with("series = \"E24\"", "range = [\"1M\", \"100\"]")).unwrap();
    assert_eq!((r.parts.r_min_ohm, r.parts.r_max_ohm), (100.0, 1e6));
}

#[test]
fn defaults_fill_what_is_absent() {
    let text = BASE
        .replace("polarity = \"inverting\"\n", "")
        .replace("vss = 0.0\n", "")
        .replace("[parts]\nseries = \"E24\"\n", "");
    let s = parse(&text).unwrap();
    assert_eq!(s.target.polarity, Polarity::Any);
    assert_eq!((s.supply.vss_v, s.supply.tolerance), (0.0, 0.0));
    assert_eq!(s.parts.catalog, CatalogChoice::Series(ESeries::E24));
    assert_eq!(s.parts.tolerance, None);
    assert_eq!((s.parts.r_min_ohm, s.parts.r_max_ohm), (10.0, 10e6));
    assert_eq!(s.source_resistance_ohm, 0.0);
    assert_eq!(s.device.lambda, ParamRange::exact(0.0));
    // JFET gate junction must not conduct: default VGS max 0 V (Boylestad &
    // Nashelsky ch. 6, n-channel JFET operates with VGS <= 0).
    assert_eq!(s.device.vgs_max_v, Some(0.0));
    assert_eq!(s.limits.id_max_a, None);
    assert_eq!(s.f_low_hz, None);
}

#[test]
fn gain_db_is_twenty_log10() {
    // 20 dB = 10 V/V: the voltage-ratio decibel, 20·log10 (textbook identity).
    let s = parse(&with("gain = 4.0", "gain_db = 20")).unwrap();
    assert!((s.target.gain - 10.0).abs() < 1e-12);
}

#[test]
fn stock_file_and_other_series_are_recognised() {
    let s = parse(&with("series = \"E24\"", "series = \"stock/bench.toml\"")).unwrap();
    assert_eq!(
        s.parts.catalog,
        CatalogChoice::StockFile("stock/bench.toml".into())
    );
    let s = parse(&with("series = \"E24\"", "series = \"e96\"\ntolerance = 0")).unwrap();
    assert_eq!(s.parts.catalog, CatalogChoice::Series(ESeries::E96));
    assert_eq!(s.parts.tolerance, Some(0.0));
}

#[test]
fn enhancement_device_by_k_or_on_point() {
    let text = BASE
        .replace(
            "family = \"n-jfet\"\nidss = [\"2m\", \"6m\"]\nvgs_off = [\"-1\", \"-3\"]",
            ENH,
        )
        .replace("[device]", "[device]\nvgs_max = 20");
    let s = parse(&text).unwrap();
    assert_eq!(s.device.family, Family::NEnhancementMosfet);
    assert_eq!(
        (s.device.vgs_max_v, s.device.vgs_min_v),
        (Some(20.0), Some(-20.0))
    );
    // Boylestad & Nashelsky (E-MOSFET): K = ID(on)/(VGS(on) − VT)²; here the
    // on-point is carried and converted per corner by the device model.
    let text = BASE.replace(
        "family = \"n-jfet\"\nidss = [\"2m\", \"6m\"]\nvgs_off = [\"-1\", \"-3\"]",
        "family = \"n-enhancement-mosfet\"\nvth = 3\nid_on = \"6m\"\nvgs_on = 8",
    );
    let s = parse(&text).unwrap();
    let Params::Enhancement { strength, .. } = &s.device.params else {
        panic!()
    };
    assert!(matches!(strength, Strength::OnPoint { vgs_on, .. } if *vgs_on == 8.0));
    assert!((s.device.nominal().law.k_a_per_v2 - 0.24e-3).abs() < 1e-15);
}

#[test]
fn class_values_may_be_overridden() {
    let text = BASE.replace(
        "family = \"n-jfet\"\nidss = [\"2m\", \"6m\"]\nvgs_off = [\"-1\", \"-3\"]",
        "class = \"n-jfet-low-idss\"\nidss = { min = \"2m\", typ = \"3m\", max = \"4m\" }",
    );
    let s = parse(&text).unwrap();
    assert_eq!(s.device.source, "n-jfet-low-idss");
    let Params::Depletion { idss, vgs_off } = s.device.params else {
        panic!()
    };
    assert_eq!((idss.min, idss.typ, idss.max), (2e-3, Some(3e-3), 4e-3));
    // VGS(off) still the class's (REFERENCE §8.1 low-IDSS class: −0.5 to −3 V).
    assert_eq!((vgs_off.min, vgs_off.max), (-3.0, -0.5));
}

/// (what, specification text, exact error message).
///
/// The wording is our own interface and is pinned exactly. The physical
/// rules behind the device cases are the n-channel sign conventions
/// (VGS(off) < 0 for JFET and depletion MOSFET, VT > 0 for enhancement) and
/// K = ID(on)/(VGS(on) − VT)², which needs VGS(on) > VT (Boylestad &
/// Nashelsky, chs. 6–7). The magnitude bounds (gain 1e-3..1e4, 1 mΩ..1 TΩ,
/// 10 kV, 100 A, 1 MHz) are the tool's own sanity limits (common practice).
fn bad_cases() -> Vec<(&'static str, String, &'static str)> {
    let dev3 = "family = \"n-jfet\"\nidss = [\"2m\", \"6m\"]\nvgs_off = [\"-1\", \"-3\"]";
    vec![
        ("gain negative", with("gain = 4.0", "gain = -3"), "`target.gain` = -3 (line 3): must be greater than 0 (the gain is a magnitude; `polarity` sets the sign)"),
        ("gain zero", with("gain = 4.0", "gain = 0"), "`target.gain` = 0 (line 3): must be greater than 0 (the gain is a magnitude; `polarity` sets the sign)"),
        ("gain NaN", with("gain = 4.0", "gain = nan"), "`target.gain` = nan (line 3): must be a finite number (NaN and infinity are not values)"),
        ("gain infinite", with("gain = 4.0", "gain = inf"), "`target.gain` = inf (line 3): must be a finite number (NaN and infinity are not values)"),
        ("gain NaN as text", with("gain = 4.0", "gain = \"nan\""), "`target.gain` = \"nan\" (line 3): not a number (no digits); write a number or engineering notation such as \"4k7\", \"2.2M\", \"100n\""),
        ("gain not a number", with("gain = 4.0", "gain = \"4x7\""), "`target.gain` = \"4x7\" (line 3): not a number (unknown scale letter `x`); write a number or engineering notation such as \"4k7\", \"2.2M\", \"100n\""),
        ("gain boolean", with("gain = 4.0", "gain = true"), "`target.gain` = true (line 3): must be a number or an engineering string such as \"4k7\", not a boolean"),
        ("gain 1e30", with("gain = 4.0", "gain = 1e30"), "`target.gain` = 1e30 (line 3): must be between 0.001 and 10000 (−60 to 80 dB), the range one stage covers"),
        ("gain and gain_db", with("gain = 4.0", "gain = 4.0\ngain_db = 12"), "`target.gain` (line 3) and `target.gain_db` (line 4): give exactly one of them"),
        ("no gain", with("gain = 4.0", ""), "`target.gain` is required (section at line 2): give `gain` (V/V) or `gain_db` (dB)"),
        ("gain_db too high", with("gain = 4.0", "gain_db = 120"), "`target.gain_db` = 120 (line 3): must be between -60 and 80 dB (gain 0.001 to 10000)"),
        ("target tolerance zero", with("tolerance = 0.2", "tolerance = 0"), "`target.tolerance` = 0 (line 4): must be greater than 0 and less than 1 (|gain| must lie within gain·(1 ± tolerance))"),
        ("target tolerance one", with("tolerance = 0.2", "tolerance = 1.0"), "`target.tolerance` = 1.0 (line 4): must be greater than 0 and less than 1 (|gain| must lie within gain·(1 ± tolerance))"),
        ("target tolerance missing", with("tolerance = 0.2", ""), "`target.tolerance` is required (section at line 2): the relative gain tolerance, e.g. 0.1 for ±10 %"),
        ("polarity misspelt", with("polarity = \"inverting\"", "polarity = \"noninverting\""), "`target.polarity` = \"noninverting\" (line 5): must be \"inverting\", \"non-inverting\" or \"any\" (did you mean \"non-inverting\"?)"),
        ("vdd zero", with("vdd = 15.0", "vdd = 0"), "`supply.vdd` = 0 (line 7): must be greater than 0 V (the positive rail)"),
        ("vdd negative", with("vdd = 15.0", "vdd = -5"), "`supply.vdd` = -5 (line 7): must be greater than 0 V (the positive rail)"),
        ("vdd 1e30", with("vdd = 15.0", "vdd = 1e30"), "`supply.vdd` = 1e30 (line 7): must be at most 10 kV (1e4 V)"),
        ("vss positive", with("vss = 0.0", "vss = 5"), "`supply.vss` = 5 (line 8): must be at most 0 V (the negative rail; 0 for a single supply)"),
        ("supply tolerance one", with("vss = 0.0", "vss = 0.0\ntolerance = 1"), "`supply.tolerance` = 1 (line 9): must be at least 0 and less than 1 (relative tolerance of both rails)"),
        ("supply tolerance negative", with("vss = 0.0", "vss = 0.0\ntolerance = -0.1"), "`supply.tolerance` = -0.1 (line 9): must be at least 0 and less than 1 (relative tolerance of both rails)"),
        ("rl zero", with("rl = \"10k\"", "rl = 0"), "`load.rl` = 0 (line 10): must be greater than 0 Ω"),
        ("rl negative text", with("rl = \"10k\"", "rl = \"-10k\""), "`load.rl` = \"-10k\" (line 10): must be greater than 0 Ω"),
        ("rl 1e30", with("rl = \"10k\"", "rl = 1e30"), "`load.rl` = 1e30 (line 10): must be between 1 mΩ and 1 TΩ (1e-3 to 1e12 Ω), the range gatewright models"),
        ("rl missing", with("rl = \"10k\"", ""), "`load.rl` is required (section at line 9): the load resistance, ohms"),
        ("zin_min zero", with("zin_min = \"1M\"", "zin_min = 0"), "`input.zin_min` = 0 (line 12): must be greater than 0 Ω"),
        ("zin_min above parts range", with("zin_min = \"1M\"", "zin_min = \"20M\""), "`input.zin_min` = \"20M\" (line 12): must not exceed the largest resistor `parts.range` allows (10M Ω): no bias network made of those parts can reach it"),
        ("source resistance negative", with("zin_min = \"1M\"", "zin_min = \"1M\"\nsource_resistance = -1"), "`input.source_resistance` = -1 (line 13): must be at least 0 Ω"),
        ("vds_min negative", with("vds_min = 2.0", "vds_min = -1"), "`headroom.vds_min` = -1 (line 14): must be at least 0 V (saturation is checked separately)"),
        ("vds_min equal to vdd", with("vds_min = 2.0", "vds_min = 15"), "`headroom.vds_min` = 15 (line 14): must be less than the supply span vdd − vss = 15 V"),
        ("vds_min above span with vss", with("vss = 0.0", "vss = -5").replace("vds_min = 2.0", "vds_min = 21"), "`headroom.vds_min` = 21 (line 14): must be less than the supply span vdd − vss = 20 V"),
        ("unknown key misspelt", with("gain = 4.0", "gian = 4.0"), "unknown key `target.gian` (line 3): did you mean `gain`?"),
        ("key in the wrong section", with("tolerance = 0.2", "tolerance = 0.2\nvdd = 12"), "unknown key `target.vdd` (line 5): `vdd` belongs in `[supply]`"),
        ("unknown section misspelt", with("[supply]", "[suply]"), "unknown key `suply` (line 6): did you mean `supply`?"),
        ("unknown key far from any", with("rl = \"10k\"", "rl = \"10k\"\ncolour = \"red\""), "unknown key `load.colour` (line 11): `load` takes `rl`"),
        ("unknown top-level key", format!("nmae = \"x\"\n{BASE}"), "unknown key `nmae` (line 1): did you mean `name`?"),
        ("unknown family", with("family = \"n-jfet\"", "family = \"p-jfet\""), "`device.family` = \"p-jfet\" (line 16): must be one of \"n-jfet\", \"n-depletion-mosfet\", \"n-enhancement-mosfet\" (did you mean \"n-jfet\"?)"),
        ("unknown family far", with("family = \"n-jfet\"", "family = \"bipolar\""), "`device.family` = \"bipolar\" (line 16): must be one of \"n-jfet\", \"n-depletion-mosfet\", \"n-enhancement-mosfet\""),
        ("min above max", with("idss = [\"2m\", \"6m\"]", "idss = { min = \"6m\", max = \"2m\" }"), "`device.idss` = { min = \"6m\", max = \"2m\" } (line 17): `min` (6m) must not exceed `max` (2m)"),
        ("typ outside range", with("idss = [\"2m\", \"6m\"]", "idss = { min = \"2m\", typ = \"8m\", max = \"6m\" }"), "`device.idss` = { min = \"2m\", typ = \"8m\", max = \"6m\" } (line 17): `typ` (8m) must lie between `min` (2m) and `max` (6m)"),
        ("range table key misspelt", with("idss = [\"2m\", \"6m\"]", "idss = { min = \"2m\", mx = \"6m\" }"), "unknown key `device.idss.mx` (line 17): did you mean `max`?"),
        ("range table without max", with("idss = [\"2m\", \"6m\"]", "idss = { min = \"2m\" }"), "`device.idss.max` is required (section at line 17): a { min, typ, max } range needs `min` and `max`"),
        ("range of three", with("idss = [\"2m\", \"6m\"]", "idss = [\"2m\", \"4m\", \"6m\"]"), "`device.idss` = [\"2m\", \"4m\", \"6m\"] (line 17): a range must have exactly two elements; give a number, a two-element [min, max] array (either order) or a { min, typ, max } table"),
        ("idss negative", with("idss = [\"2m\", \"6m\"]", "idss = [\"-2m\", \"6m\"]"), "`device.idss` = [\"-2m\", \"6m\"] (line 17): must be greater than 0 A (IDSS is the drain current at VGS = 0)"),
        ("idss 1e30", with("idss = [\"2m\", \"6m\"]", "idss = 1e30"), "`device.idss` = 1e30 (line 17): must be at most 100 A in magnitude"),
        ("JFET VGS(off) positive", with("vgs_off = [\"-1\", \"-3\"]", "vgs_off = 2"), "`device.vgs_off` = 2 (line 18): must be less than 0 V (an n-channel JFET's VGS(off) is negative)"),
        ("JFET given a threshold", with("vgs_off = [\"-1\", \"-3\"]", "vgs_off = [\"-1\", \"-3\"]\nvth = 2"), "`device.vth` = 2 (line 19): is not a parameter of an n-jfet; a depletion-type device takes `idss` and `vgs_off`"),
        ("JFET without VGS(off)", with("vgs_off = [\"-1\", \"-3\"]", ""), "`device.vgs_off` is required (section at line 15): an n-jfet needs VGS(off), the gate-source cut-off voltage (volts, negative)"),
        ("enhancement VT negative", BASE.replace(dev3, ENH).replace("vth = [\"1\", \"2.5\"]", "vth = [\"-1\", \"2.5\"]"), "`device.vth` = [\"-1\", \"2.5\"] (line 17): must be greater than 0 V (an n-channel enhancement MOSFET's threshold is positive; a negative threshold means a depletion device: family = \"n-depletion-mosfet\" with `idss` and `vgs_off`)"),
        ("enhancement without K", BASE.replace(dev3, ENH).replace("k = [\"2m\", \"8m\"]\n", ""), "`device.k` is required (section at line 15): an n-enhancement-mosfet needs its strength: `k` (A/V²) or `id_on` (A) with `vgs_on` (V)"),
        ("enhancement K and on-point", BASE.replace(dev3, ENH).replace("k = [\"2m\", \"8m\"]", "k = \"2m\"\nid_on = \"6m\"\nvgs_on = 8"), "`device.k` = \"2m\" (line 18): give either `k` or `id_on` with `vgs_on`, not both"),
        ("VGS(on) not above VT", BASE.replace(dev3, ENH).replace("k = [\"2m\", \"8m\"]", "id_on = \"6m\"\nvgs_on = 2"), "`device.vgs_on` = 2 (line 19): must be greater than every `vth` value (largest 2.5 V): K = ID(on)/(VGS(on) − VT)² needs VGS(on) > VT"),
        ("MOSFET gate rating negative", BASE.replace(dev3, ENH).replace("[device]", "[device]\nvgs_max = -20"), "`device.vgs_max` = -20 (line 16): must be greater than 0 V (a MOSFET's gate rating is a magnitude, applied as ±vgs_max)"),
        ("lambda too large", with("vgs_off = [\"-1\", \"-3\"]", "vgs_off = [\"-1\", \"-3\"]\nlambda = 1.5"), "`device.lambda` = 1.5 (line 19): must be at least 0 /V and less than 1 /V (channel-length modulation)"),
        ("unknown class", with("family = \"n-jfet\"", "class = \"n-jfet-low\""), "`device.class` = \"n-jfet-low\" (line 16): is not a known device class; the classes are \"n-jfet-ultra-low-idss\", \"n-jfet-low-idss\", \"n-jfet-mid-idss\", \"n-jfet-high-idss\", \"n-jfet-very-high-idss\", \"n-enhancement-small-signal-60v\", \"n-depletion-dmos-low-current-hv\""),
        ("class and family disagree", with("family = \"n-jfet\"", "family = \"n-jfet\"\nclass = \"n-enhancement-small-signal-60v\""), "`device.class` (line 17) and `device.family` (line 16): class `n-enhancement-small-signal-60v` is an n-enhancement-mosfet, not an n-jfet; drop `family` or pick a class of that family"),
        ("no family or class", BASE.replace(dev3, "vds_max = 30"), "`device.family` is required (section at line 15): give `family` (\"n-jfet\", \"n-depletion-mosfet\", \"n-enhancement-mosfet\") with its parameters, or `class` (one of \"n-jfet-ultra-low-idss\", \"n-jfet-low-idss\", \"n-jfet-mid-idss\", \"n-jfet-high-idss\", \"n-jfet-very-high-idss\", \"n-enhancement-small-signal-60v\", \"n-depletion-dmos-low-current-hv\")"),
        ("id_max zero", format!("{BASE}[limits]\nid_max = 0\n"), "`limits.id_max` = 0 (line 22): must be greater than 0 A"),
        ("power_max negative", format!("{BASE}[limits]\npower_max = \"-1m\"\n"), "`limits.power_max` = \"-1m\" (line 22): must be greater than 0 W"),
        ("zout_max 1e30", format!("{BASE}[limits]\nzout_max = 1e30\n"), "`limits.zout_max` = 1e30 (line 22): must be between 1 mΩ and 1 TΩ (1e-3 to 1e12 Ω), the range gatewright models"),
        ("f_low zero", format!("{BASE}[band]\nf_low = 0\n"), "`band.f_low` = 0 (line 22): must be greater than 0 Hz"),
        ("f_low too high", format!("{BASE}[band]\nf_low = \"10meg\"\n"), "`band.f_low` = \"10meg\" (line 22): must be at most 1 MHz (1e6 Hz)"),
        ("series unknown", with("series = \"E24\"", "series = \"E25\""), "`parts.series` = \"E25\" (line 20): must be an E-series name (E6, E12, E24, E48, E96, E192) or a stock-list file ending in .toml (did you mean \"E24\"?)"),
        ("parts tolerance one", with("series = \"E24\"", "series = \"E24\"\ntolerance = 1"), "`parts.tolerance` = 1 (line 21): must be at least 0 and less than 1 (0 means ideal parts)"),
        ("parts range zero", with("series = \"E24\"", "series = \"E24\"\nrange = [\"10\", 0]"), "`parts.range` = [\"10\", 0] (line 21): must be greater than 0 Ω"),
        ("parts range one element", with("series = \"E24\"", "series = \"E24\"\nrange = [\"10\"]"), "`parts.range` = [\"10\"] (line 21): must be a two-element array [min, max] of resistances (either order)"),
        ("syntax error", with("gain = 4.0", "gain = = 4.0"), "TOML syntax error at line 3, column 8: invalid string; expected `\"`, `'`"),
        ("unclosed string", with("rl = \"10k\"", "rl = \"10k"), "TOML syntax error at line 10, column 10: invalid basic string"),
        ("duplicate key", with("gain = 4.0", "gain = 4.0\ngain = 5.0"), "TOML syntax error at line 4, column 1: duplicate key `gain` in table `target`"),
        ("section not a table", format!("load = 3\n{}", BASE.replace("[load]\nrl = \"10k\"\n", "")), "`load` = 3 (line 1): must be a table (a `[load]` section)"),
        ("missing section", BASE.replace("[load]\nrl = \"10k\"\n", ""), "`load` is required: a `[load]` section with the load: `rl` (ohms)"),
        ("date-time value", with("vdd = 15.0", "vdd = 2024-01-01"), "TOML syntax error at line 7, column 7: a date-time is not a value any key of a specification takes"),
        ("name not a string", with("name = \"base\"", "name = 7"), "`name` = 7 (line 1): must be a string (a free-text name)"),
    ]
}

#[test]
fn bad_specifications_are_refused_with_exact_messages() {
    let cases = bad_cases();
    assert!(cases.len() >= 40);
    let mut failures = Vec::new();
    for (what, text, want) in &cases {
        match parse(text) {
            Ok(_) => failures.push(format!("{what}: accepted")),
            Err(e) => {
                if e.to_string() != *want {
                    failures.push(format!("(\"{what}\", {:?}),", e.to_string()));
                }
            }
        }
    }
    assert!(failures.is_empty(), "\n{}", failures.join("\n"));
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    #[test]
    fn parse_never_panics_on_arbitrary_text(text in "\\PC{0,200}") {
        let _ = parse(&text);
    }

    #[test]
    fn parse_never_panics_on_toml_like_text(
        text in "(\\[[a-z]{1,8}\\]\n|[a-z_]{1,8} = (-?[0-9.e]{1,6}|\"[0-9a-zA-Z.-]{0,6}\"|\\[[0-9\", -]{0,12}\\]|\\{ ?[a-z]{1,3} = [0-9]{1,3} ?\\}|nan|inf|true)\n){0,20}"
    ) {
        let _ = parse(&text);
    }

    #[test]
    fn parse_never_panics_on_mutated_examples(
        pick in 0usize..64,
        at in 0usize..4000,
        cut in 0usize..12,
        insert in "\\PC{0,6}",
    ) {
        let ex = examples();
        let (_, text) = &ex[pick % ex.len()];
        let mut chars: Vec<char> = text.chars().collect();
        let at = at % (chars.len() + 1);
        let end = (at + cut).min(chars.len());
        chars.splice(at..end, insert.chars());
        let mutated: String = chars.into_iter().collect();
        if let Err(e) = parse(&mutated) {
            // Every refusal is worded; none is empty.
            prop_assert!(!e.to_string().is_empty());
        }
    }
}
