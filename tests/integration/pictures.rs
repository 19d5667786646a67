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
use gatewright::bench::ratings::resistor_duty;
use gatewright::catalog::ESeries;
use gatewright::device::{Device, Family, ParamRange, Params, Strength};
use gatewright::rank::Metrics;
use gatewright::report::bom::{bom_csv, bom_rows, HEADER};
use gatewright::report::svg::bias::bias_svg;
use gatewright::report::svg::response::response_svg;
use gatewright::report::svg::schematic::schematic_svg;
use gatewright::search::Design;
use gatewright::spec::{CatalogChoice, Limits, Parts, Polarity, Supply, Target, ValidSpec};
use gatewright::topology::{by_id, TOPOLOGIES};
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
        let svg = schematic_svg(&p, t, &values, &caps, "bench preamp");
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
        let svg = bias_svg(
            &p,
            t,
            &values,
            &tol,
            Some((1.5e-3, 4e-3)),
            "bench preamp: bias",
        );
        let inked = render(&svg, &format!("bias-{id}"));
        assert!(inked > 8000, "{id}: only {inked} dark pixels");
        for label in [
            "VGS (V)",
            "ID (mA)",
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

// A mid-band gain of 5 with one real low-frequency pole at 20 Hz (textbook
// first-order high-pass): |H| = 5/sqrt(1 + (20/f)²). 20·log10(5) = 13.98 dB,
// so the −3 dB line is at 10.98 dB and the sweep crosses it at
// 20/sqrt(10^0.3 − 1) = 19.96 Hz, printed as 20 Hz.
#[test]
fn response_picture_marks_the_three_db_line_and_corner() {
    // 50 points a decade keep the interpolation error below 0.5 %.
    let pts: Vec<(f64, f64)> = (0..=200)
        .map(|i| {
            let f = 10f64.powf(i as f64 / 50.0);
            (f, 5.0 / (1.0 + (20.0 / f).powi(2)).sqrt())
        })
        .collect();
    let svg = response_svg(&pts, Some(20.0), "bench preamp: response");
    let inked = render(&svg, "response");
    assert!(inked > 4000, "only {inked} dark pixels");
    for label in [
        "frequency (Hz)",
        "gain (dB)",
        "−3 dB: 11 dB",
        "gain, mid-band 14 dB",
        "design corner f_L = 20 Hz",
        "−3 dB point of the sweep: 20 Hz",
    ] {
        assert!(has_text(&svg, label), "no {label}: {:?}", texts(&svg));
    }
    snapshot("response", &svg);
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

// Self bias, RS 1 kΩ, RD 3.3 kΩ, ±5 %, VDD 20 V. The worst current is on the
// strongest curve with RS at 950 Ω (3.10 mA); RD at 3465 Ω then dissipates
// 33.4 mW: twice that is 66.8 mW, past 1/16 W, so 1/10 W (common practice,
// REFERENCE §6). RS's worst is 9.15 mW at 950 Ω: 1/16 W.
#[test]
fn bom_lists_every_part_with_ratings_and_reads_back_as_csv() {
    let p = Problem::new(&spec(Family::NJfet, 20.0, 0.0));
    let t = by_id("self-bias").unwrap();
    let values = vec![1e6, 1e3, 3.3e3];
    let tolerances = vec![0.05; 3];
    let wc = worst_case(&p, t, &values, &tolerances);
    let design = Design {
        topology: t,
        topology_index: 1,
        values: values.clone(),
        tolerances,
        worst: wc,
        metrics: Metrics::new(&p.spec, &wc, 3),
        score: 0.5,
    };
    let duty = resistor_duty(&p, t, &values, &design.tolerances);
    let caps: Vec<(String, f64)> = vec![
        ("C_IN".into(), 100e-9),
        ("C_OUT".into(), 2.2e-6),
        ("C_S".into(), 47e-6),
    ];
    let text = bom_csv(&bom_rows(&p, &design, "E24", &duty, &caps));
    assert_eq!(text.lines().next(), Some(HEADER));
    let mut reader = csv::Reader::from_reader(text.as_bytes());
    let header: Vec<String> = reader.headers().unwrap().iter().map(String::from).collect();
    assert_eq!(
        header,
        [
            "designator",
            "value",
            "series",
            "tolerance",
            "rating",
            "quantity",
            "notes"
        ]
    );
    let rows: Vec<Vec<String>> = reader
        .records()
        .map(|r| r.unwrap().iter().map(String::from).collect())
        .collect();
    let names: Vec<&str> = rows.iter().map(|r| r[0].as_str()).collect();
    assert_eq!(names, ["RG", "RS", "RD", "C_IN", "C_OUT", "C_S", "Q1"]);
    let id = shockley_self_bias(950.0);
    let p_rd = id * id * 3465.0;
    assert!((duty[2].p_worst_w - p_rd).abs() < 1e-9 * p_rd);
    assert_eq!(rows[2][1..6], ["3.3kΩ", "E24", "±5%", "1/10 W", "1"]);
    assert_eq!(
        rows[2][6],
        format!(
            "worst {} mW at {} V DC",
            fmt3(p_rd * 1e3),
            fmt3(id * 3465.0)
        )
    );
    assert_eq!(rows[1][4], "1/16 W");
    assert_eq!(rows[0][4], "1/16 W");
    // Capacitors: 1.5 × 20 V = 30 V -> 35 V (common practice, from memory).
    assert_eq!(rows[3][1..5], ["100nF", "", "", "35 V"]);
    assert_eq!(rows[5][1], "47uF");
    assert_eq!(rows[6][1], "n-channel JFET (n-jfet)");
    assert_eq!(rows[6][2], "test-class");
    assert_eq!(rows[6][4], "VDS >= 20 V");
    snapshot("bom-self-bias", &text);
}

/// Three significant figures, as the BOM prints them.
fn fmt3(x: f64) -> String {
    gatewright::units::format_sig(x, 3)
}
