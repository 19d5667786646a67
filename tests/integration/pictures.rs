//! The bench pictures and the bill of materials: every SVG is rendered by a
//! real renderer (resvg) and must not come out blank, must carry its
//! labels, and is pinned by an insta file snapshot (tests/snapshots).
//!
//! The ink thresholds hold without any font installed (shapes alone), so a
//! machine without fonts still passes; a blank picture has none.
//!
//! With `GATEWRIGHT_PICTURES=DIR` set, each rendered picture is also saved as
//! a PNG in DIR for a person to look at.

use gatewright::analysis::{worst_case, Problem};
use gatewright::bench::bias::bias_window;
use gatewright::bench::bom::bom;
use gatewright::bench::caps::size;
use gatewright::bench::ratings::resistor_duty;
use gatewright::bench::response::{curve, netlist, Response};
use gatewright::catalog::ESeries;
use gatewright::device::{Device, Family, ParamRange, Params, Strength};
use gatewright::rank::Metrics;
use gatewright::report::bom::{bom_csv, HEADER};
use gatewright::report::svg::bias::bias_svg;
use gatewright::report::svg::response::response_svg;
use gatewright::report::svg::schematic::netlist_svg;
use gatewright::search::Design;
use gatewright::spec::{CatalogChoice, Limits, Parts, Polarity, Supply, Target, ValidSpec};
use gatewright::topology::{by_id, Caps, TOPOLOGIES};
use gatewright::units::format_value;
use resvg::{tiny_skia, usvg};
use std::sync::OnceLock;

/// A device of our own: IDSS 4–12 mA, VGS(off) −2 to −6 V (the window
/// example of REFERENCE §4.2), or an enhancement MOSFET.
fn device(family: Family) -> Device {
    let params = match family {
        Family::NEnhancementMosfet => Params::Enhancement {
            vth: ParamRange::between(1.5, 2.5),
            strength: Strength::K(ParamRange::between(0.4e-3, 0.6e-3)),
        },
        _ => Params::Depletion {
            idss: ParamRange::between(4e-3, 12e-3),
            vgs_off: ParamRange::between(-2.0, -6.0),
        },
    };
    Device {
        family,
        params,
        lambda: ParamRange::exact(0.0),
        vgs_max_v: if family == Family::NJfet {
            Some(0.0)
        } else {
            None
        },
        vgs_min_v: None,
        vds_max_v: Some(40.0),
        pd_max_w: Some(0.3),
        source: "test-class".into(),
    }
}

fn spec(family: Family, vdd: f64, vss: f64) -> ValidSpec {
    ValidSpec {
        name: "bench preamp".into(),
        target: Target {
            gain: 4.0,
            tolerance: 0.5,
            polarity: Polarity::Any,
        },
        supply: Supply {
            vdd_v: vdd,
            vss_v: vss,
            tolerance: 0.0,
        },
        rl_ohm: 10e3,
        zin_min_ohm: 100e3,
        source_resistance_ohm: 1e3,
        vds_min_v: 2.0,
        limits: Limits {
            id_max_a: Some(4e-3),
            ..Limits::default()
        },
        f_low_hz: Some(20.0),
        device: device(family),
        parts: Parts {
            catalog: CatalogChoice::Series(ESeries::E24),
            tolerance: Some(0.05),
            r_min_ohm: 10.0,
            r_max_ohm: 10e6,
        },
    }
}

/// A design of each topology with values of our own (the hand examples of
/// the topology modules), on a device of the family it suits.
fn case(
    id: &str,
) -> (
    Problem,
    &'static dyn gatewright::topology::Topology,
    Vec<f64>,
) {
    let t = by_id(id).unwrap_or_else(|| panic!("no topology {id}"));
    let (family, vdd, vss, values): (Family, f64, f64, Vec<f64>) = match id {
        "zero-bias" => (Family::NDepletionMosfet, 12.0, 0.0, vec![1e6, 1e3]),
        "self-bias" => (Family::NJfet, 15.0, 0.0, vec![1e6, 1e3, 3.3e3]),
        "self-bias-swamped" => (Family::NJfet, 15.0, 0.0, vec![1e6, 1e3, 3.3e3]),
        "divider" => (Family::NJfet, 16.0, 0.0, vec![2.2e6, 470e3, 2.4e3, 2.2e3]),
        "divider-swamped" => (Family::NJfet, 16.0, 0.0, vec![680e3, 100e3, 2e3, 3.9e3]),
        "divider-split" => (
            Family::NJfet,
            16.0,
            0.0,
            vec![680e3, 100e3, 470.0, 1.5e3, 3.9e3],
        ),
        "drain-feedback" => (Family::NEnhancementMosfet, 10.0, 0.0, vec![10e6, 3e3]),
        "follower-self" => (Family::NJfet, 15.0, 0.0, vec![1e6, 1e3]),
        "follower-divider" => (Family::NEnhancementMosfet, 12.0, 0.0, vec![1e6, 1e6, 2.2e3]),
        "common-gate" => (Family::NJfet, 16.0, 0.0, vec![680e3, 100e3, 2e3, 3.9e3]),
        "fixed-bias" => (Family::NJfet, 16.0, -10.0, vec![200e3, 800e3, 1e6, 3.9e3]),
        "current-source" => (Family::NEnhancementMosfet, 10.0, -10.0, vec![1e6, 3e3, 2e3]),
        other => panic!("no case for {other}"),
    };
    (Problem::new(&spec(family, vdd, vss)), t, values)
}

fn fonts() -> &'static usvg::Options<'static> {
    static OPTS: OnceLock<usvg::Options<'static>> = OnceLock::new();
    OPTS.get_or_init(|| {
        let mut o = usvg::Options::default();
        let db = o.fontdb_mut();
        db.load_system_fonts();
        // The generic `sans-serif` maps to a family that may not be
        // installed; point it at one that is.
        let family = db
            .faces()
            .flat_map(|f| f.families.iter().map(|(n, _)| n.clone()))
            .filter(|n| n.contains("Sans") && !n.contains("Mono"))
            .min();
        if let Some(f) = family {
            db.set_sans_serif_family(f);
        }
        o
    })
}

/// Renders the SVG with resvg, saves it when asked, and returns the number
/// of pixels that are not white.
pub(crate) fn render(svg: &str, name: &str) -> usize {
    let tree = usvg::Tree::from_str(svg, fonts()).unwrap_or_else(|e| panic!("{name}: {e}"));
    let size = tree.size().to_int_size();
    let mut pixmap = tiny_skia::Pixmap::new(size.width(), size.height())
        .unwrap_or_else(|| panic!("{name}: empty picture size"));
    resvg::render(&tree, tiny_skia::Transform::default(), &mut pixmap.as_mut());
    if let Ok(dir) = std::env::var("GATEWRIGHT_PICTURES") {
        let fail = |e: &dyn std::fmt::Display| panic!("{name}: cannot save in {dir}: {e}");
        std::fs::create_dir_all(&dir).unwrap_or_else(|e| fail(&e));
        pixmap
            .save_png(format!("{dir}/{name}.png"))
            .unwrap_or_else(|e| fail(&e));
        std::fs::write(format!("{dir}/{name}.svg"), svg).unwrap_or_else(|e| fail(&e));
    }
    // Every pixel must be opaque (white background), and enough of them
    // must be drawn on.
    assert!(
        pixmap.pixels().iter().all(|p| p.alpha() == 255),
        "{name}: background is not opaque"
    );
    pixmap
        .pixels()
        .iter()
        .filter(|p| p.red() < 200 || p.green() < 200 || p.blue() < 200)
        .count()
}

/// The text of every `<text>` element, trimmed (SVG collapses the
/// surrounding white space when it renders).
fn texts(svg: &str) -> Vec<String> {
    svg.split("<text")
        .skip(1)
        .filter_map(|chunk| {
            let body = chunk.split_once('>')?.1;
            Some(body.split_once("</text>")?.0.trim().to_string())
        })
        .collect()
}

fn has_text(svg: &str, want: &str) -> bool {
    texts(svg).iter().any(|t| t == want)
}

fn snapshot(name: &str, text: &str) {
    let mut settings = insta::Settings::clone_current();
    settings.set_snapshot_path("../snapshots");
    settings.set_prepend_module_to_snapshot(false);
    settings.bind(|| insta::assert_snapshot!(name, text));
}

#[test]
fn every_topology_schematic_renders_with_its_labels() {
    for t in TOPOLOGIES {
        let (p, t, values) = case(t.id());
        let caps: Vec<(String, f64)> = t
            .capacitors(&values)
            .iter()
            .map(|(d, _)| ((*d).to_string(), 4.7e-6))
            .collect();
        let net = netlist(
            &p,
            t,
            &values,
            p.nominal.law,
            Caps {
                c_in_f: 4.7e-6,
                c_out_f: 4.7e-6,
                c_bypass_f: 4.7e-6,
            },
        );
        let sized: Vec<&str> = caps.iter().map(|(d, _)| d.as_str()).collect();
        let subtitle = format!("{}: {}", t.id(), t.summary());
        let svg = netlist_svg(&net, "bench preamp", &subtitle, &sized);
        let inked = render(&svg, &format!("schematic-{}", t.id()));
        assert!(inked > 4000, "{}: only {inked} dark pixels", t.id());
        for (part, v) in t.parts().iter().zip(&values) {
            if *v > 0.0 {
                assert!(has_text(&svg, part), "{}: no {part}", t.id());
                let value = format!("{}Ω", format_value(*v));
                assert!(has_text(&svg, &value), "{}: no {value}", t.id());
            }
        }
        for (d, _) in &caps {
            assert!(has_text(&svg, d), "{}: no {d}", t.id());
        }
        for label in ["Q1", "RL", "10kΩ", "RSIG", "1kΩ", "VIN", "4.7uF"] {
            assert!(has_text(&svg, label), "{}: no {label}", t.id());
        }
        let vdd = format!("VDD +{} V", format_value(p.rails.vdd_v));
        assert!(has_text(&svg, &vdd), "{}: no {vdd}", t.id());
        if p.rails.vss_v < 0.0 {
            assert!(
                texts(&svg).iter().any(|s| s.starts_with("VSS")),
                "{}",
                t.id()
            );
        }
        snapshot(&format!("schematic-{}", t.id()), &svg);
    }
}

#[test]
fn bias_pictures_render_with_curves_axes_and_legend() {
    for id in [
        "self-bias",
        "divider-swamped",
        "drain-feedback",
        "current-source",
        "zero-bias",
    ] {
        let (p, t, values) = case(id);
        let tol = vec![0.05; values.len()];
        let worst = worst_case(&p, t, &values, &tol);
        let w = bias_window(&p, t, &values, &tol, Some((1.5e-3, 4e-3)), worst.id_max_a);
        let svg = bias_svg(&w, "bench preamp: bias");
        let inked = render(&svg, &format!("bias-{id}"));
        assert!(inked > 8000, "{id}: only {inked} dark pixels");
        let axis = if w.view.id_top_a < 1e-3 {
            "ID (µA)"
        } else {
            "ID (mA)"
        };
        for label in [
            "VGS (V)",
            axis,
            "allowed ID window",
            "bias line, nominal values",
        ] {
            assert!(has_text(&svg, label), "{id}: no {label}");
        }
        for c in &p.corners {
            assert!(has_text(&svg, &c.label), "{id}: no corner {}", c.label);
        }
        snapshot(&format!("bias-{id}"), &svg);
    }
}

/// |gain| of a mid-band gain `a` with one real low-frequency pole at `fp`
/// hertz (textbook first-order high-pass): a/sqrt(1 + (fp/f)²), at 60
/// points a decade from 2 Hz to 20 kHz.
fn one_pole(a: f64, fp: f64) -> Vec<(f64, f64)> {
    (0..=240)
        .map(|i| {
            let f = 2.0 * 10f64.powf(i as f64 / 60.0);
            (f, a / (1.0 + (fp / f).powi(2)).sqrt())
        })
        .collect()
}

// Mid-band gain 5 (20·log10 5 = 13.98 dB) with a pole at fp = 20 Hz: the
// curve is exactly 3 dB down at fp/sqrt(10^0.3 − 1) = 1.00238·fp = 20.05 Hz,
// printed as 20 Hz. Two device corners: gain 4 (12.0 dB), pole 15 Hz
// (15.04 Hz), and gain 6.3 (16.0 dB), pole 25 Hz (25.06 Hz, printed 25.1).
// Every curve has its entry.
#[test]
fn response_picture_draws_every_corner_with_its_three_db_point() {
    let r = Response {
        nominal: curve("nominal", one_pole(5.0, 20.0)),
        corners: vec![
            curve("idss=min", one_pole(4.0, 15.0)),
            curve("idss=max", one_pole(6.3, 25.0)),
        ],
        f_low_hz: 20.0,
        f_low_given: true,
    };
    let svg = response_svg(&r, "bench preamp: response");
    let inked = render(&svg, "response");
    assert!(inked > 4000, "only {inked} dark pixels");
    for label in [
        "frequency (Hz)",
        "gain (dB)",
        "nominal device",
        "mid-band 14 dB, −3 dB at 20 Hz",
        "idss=min",
        "mid-band 12 dB, −3 dB at 15 Hz",
        "idss=max",
        "mid-band 16 dB, −3 dB at 25.1 Hz",
        "f_low = 20 Hz",
    ] {
        assert!(has_text(&svg, label), "no {label}: {:?}", texts(&svg));
    }
    snapshot("response", &svg);
    // Without f_low the default corner is named as such.
    let r = Response {
        f_low_given: false,
        ..r
    };
    let svg = response_svg(&r, "bench preamp: response");
    assert!(has_text(&svg, "default corner 20 Hz"), "{:?}", texts(&svg));
    assert!(
        has_text(&svg, "no f_low given; capacitors sized for it"),
        "{:?}",
        texts(&svg)
    );
}

/// Self-bias current on the strongest curve (IDSS 12 mA, VGS(off) −6 V)
/// for a given RS, from Shockley's law ID = IDSS·(1 − RS·ID/|VP|)² by
/// bisection: an oracle independent of the topology code.
fn shockley_self_bias(rs: f64) -> f64 {
    let (mut lo, mut hi) = (0.0, 6.0 / rs);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if mid - 12e-3 * (1.0 - rs * mid / 6.0).powi(2) > 0.0 {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    lo
}

/// A ranked design of our own values, for the BOM.
fn design(p: &Problem, t: &'static dyn gatewright::topology::Topology, values: &[f64]) -> Design {
    let tolerances = vec![0.05; values.len()];
    let wc = worst_case(p, t, values, &tolerances);
    Design {
        topology: t,
        topology_index: 1,
        values: values.to_vec(),
        tolerances,
        worst: wc,
        metrics: Metrics::new(&p.spec, &wc, 3),
        score: 0.5,
    }
}

// Self bias, RS 1 kΩ, RD 3.3 kΩ, ±5 %, VDD 20 V. The worst current is on the
// strongest curve with RS at 950 Ω (3.10 mA); RD at 3465 Ω then dissipates
// 33.4 mW: twice that is 66.8 mW, past 1/16 W, so 1/10 W; its 10.7 V is
// under 80 % of the 1/10 W part's sqrt(0.1 W · 3.3 kΩ) = 18.2 V, so 0603
// (common practice, REFERENCE §6). RS's worst is 9.15 mW at 950 Ω: 1/16 W.
#[test]
fn bom_lists_every_part_with_ratings_and_reads_back_as_csv() {
    let p = Problem::new(&spec(Family::NJfet, 20.0, 0.0));
    let t = by_id("self-bias").unwrap();
    let d = design(&p, t, &[1e6, 1e3, 3.3e3]);
    let duty = resistor_duty(&p, t, &d.values, &d.tolerances);
    let plan = size(&p, t, &d.values, &d.tolerances, 20.0).unwrap();
    let b = bom(&p, &d, "E24", &duty, &plan, true).unwrap();
    let text = bom_csv(&b);
    assert!(text.is_ascii(), "{text}");
    assert_eq!(text.lines().next(), Some(HEADER));
    let mut reader = csv::Reader::from_reader(text.as_bytes());
    let header: Vec<String> = reader.headers().unwrap().iter().map(String::from).collect();
    assert_eq!(header.join(","), HEADER);
    let rows: Vec<Vec<String>> = reader
        .records()
        .map(|r| r.unwrap().iter().map(String::from).collect())
        .collect();
    let col = |name: &str| header.iter().position(|h| h == name).unwrap();
    let cell = |row: usize, name: &str| rows[row][col(name)].clone();
    let names: Vec<String> = rows.iter().map(|r| r[col("designators")].clone()).collect();
    assert_eq!(names, ["R1", "R2", "R3", "C1", "C2", "C3", "Q1"]);
    assert_eq!(cell(0, "roles"), "RG (gate return)");
    assert_eq!(cell(1, "roles"), "RS (source, bypassed)");
    assert_eq!(cell(2, "roles"), "RD (drain load)");
    let id = shockley_self_bias(950.0);
    let p_rd = id * id * 3465.0;
    assert!((duty[2].p_worst_w - p_rd).abs() < 1e-9 * p_rd);
    assert_eq!(cell(2, "value"), "3.3 kohm");
    assert_eq!(cell(2, "tolerance"), "5%");
    assert_eq!(cell(2, "power_rating"), "1/10 W");
    assert_eq!(cell(2, "worst_power"), format!("{} mW", fmt3(p_rd * 1e3)));
    assert_eq!(cell(2, "worst_voltage"), format!("{} V", fmt3(id * 3465.0)));
    assert_eq!(cell(2, "package"), "0603 SMD or larger");
    assert_eq!(cell(1, "power_rating"), "1/16 W");
    assert_eq!(cell(0, "power_rating"), "1/16 W");
    assert_eq!(cell(0, "qty"), "1");
    // Capacitors: 1.5 × 20 V = 30 V -> 35 V (common practice, from memory).
    assert_eq!(cell(3, "roles"), "C_IN (input coupling)");
    assert_eq!(cell(3, "voltage_rating"), "35 V");
    assert!(
        cell(3, "notes").contains("sized for f_low = 20 Hz"),
        "{text}"
    );
    // The bypass capacitor is an electrolytic from the source (VS > 0.1 V at
    // every corner) to ground: its positive side is the source.
    assert_eq!(cell(5, "part"), "aluminium electrolytic capacitor");
    assert!(cell(5, "notes").contains("+ side to the source"), "{text}");
    assert_eq!(cell(6, "value"), "n-channel JFET (n-jfet)");
    assert_eq!(cell(6, "series"), "test-class");
    assert_eq!(cell(6, "voltage_rating"), ">= 20 V");
    assert!(cell(6, "notes").contains("idss 4 mA to 12 mA"), "{text}");
    snapshot("bom-self-bias", &text);
}

// A divider of two equal resistors at equal duty (1 MΩ each from 12 V:
// 6 V and 36 µW apiece) is one line of quantity 2; without f_low every
// capacitor says it is sized for the default corner.
#[test]
fn equal_parts_share_a_line_and_the_default_corner_is_named() {
    let (p, t, values) = case("follower-divider");
    let d = design(&p, t, &values);
    let duty = resistor_duty(&p, t, &d.values, &d.tolerances);
    let plan = size(&p, t, &d.values, &d.tolerances, 20.0).unwrap();
    let b = bom(&p, &d, "E24", &duty, &plan, false).unwrap();
    let first = &b.lines[0];
    assert_eq!(first.designators, ["R1", "R2"]);
    assert_eq!(first.quantity(), 2);
    assert_eq!(
        first.roles,
        ["R1 (gate divider, upper)", "R2 (gate divider, lower)"]
    );
    assert_eq!(b.lines[1].designators, ["R3"]);
    let caps: Vec<_> = b
        .lines
        .iter()
        .filter(|l| l.designators[0].starts_with('C'))
        .collect();
    assert!(!caps.is_empty());
    for l in caps {
        assert!(
            l.notes.iter().any(|n| n
                == "sized for the default corner 20 Hz: the specification gives no [band] f_low"),
            "{:?}",
            l.notes
        );
    }
}

/// Three significant figures, as the BOM prints them.
fn fmt3(x: f64) -> String {
    gatewright::units::format_sig(x, 3)
}
