//! The bias picture an engineer draws by hand (Boylestad & Nashelsky ch. 7,
//! the min/max-curve method of REFERENCE §4.2):
//!
//! - the device's transfer curve ID(VGS) at every device corner, in
//!   saturation, `ID = k·(VGS − vto)²·(1 + λ·VDS)` with VDS at that corner's
//!   operating point (λ = 0 gives Shockley's / Shichman–Hodges' curve);
//! - the bias line of the design at nominal values, `VGS = VG − ID·RS`
//!   measured from the source rail (drain feedback: `VGS = VDD − ID·RD`), solid
//!   black, and the bias lines at every resistor-tolerance extreme, dashed
//!   grey (nominal rails);
//! - the operating point at each corner with nominal values, a filled dot
//!   in the corner's colour, where its curve meets the bias line (hollow,
//!   and marked "triode" or "cut off" in the legend, when the device is out
//!   of saturation there and so off its drawn curve);
//! - the allowed drain-current window, when given, as a shaded band across
//!   the plot (for example from `id_max` and the lowest current the gain
//!   needs).
//!
//! The legend sits in a panel to the right of the plot so it never hides a
//! curve. Coordinates come from plotters' SVG backend in whole pixels, so the
//! text is deterministic.

use super::{colour, fallback};
use crate::analysis::{tolerance_extremes, Problem};
use crate::bench::ratings::with_unit;
use crate::device::{Region, SquareLaw};
use crate::topology::{Gate, OpPoint, Topology};
use plotters::coord::Shift;
use plotters::prelude::*;

const WIDTH: u32 = 920;
const HEIGHT: u32 = 560;
const PLOT_WIDTH: u32 = 640;
/// Samples along each transfer curve.
const SAMPLES: usize = 240;

/// One device corner as drawn.
struct CornerCurve {
    label: String,
    law: SquareLaw,
    op: OpPoint,
}

/// A bias line `VGS = a − b·ID`, volts and ohms.
#[derive(Clone, Copy, PartialEq)]
struct Line {
    a_v: f64,
    b_ohm: f64,
}

/// Everything the picture shows, in SI units.
struct BiasData {
    corners: Vec<CornerCurve>,
    nominal: Line,
    extremes: Vec<Line>,
    window: Option<(f64, f64)>,
    /// Highest VGS a curve is drawn to, volts (0 V for a JFET, whose gate
    /// junction conducts beyond it; the right edge otherwise).
    vgs_end_v: f64,
    x: (f64, f64),
    y_max_a: f64,
}

fn line_of(t: &dyn Topology, values: &[f64], p: &Problem) -> Line {
    let net = t.bias(values, &p.rails);
    match net.gate {
        Gate::Fixed(vg) => Line {
            a_v: vg - net.source_rail_v,
            b_ohm: net.rs_ohm,
        },
        Gate::FromDrain => Line {
            a_v: net.drain_rail_v - net.source_rail_v,
            b_ohm: net.rd_ohm + net.rs_ohm,
        },
    }
}

/// Saturation current at `vgs` for the corner, amps.
fn sat_id(law: &SquareLaw, vgs: f64, vds: f64) -> f64 {
    let vov = (vgs - law.vto_v).max(0.0);
    law.k_a_per_v2 * vov * vov * (1.0 + law.lambda_per_v * vds.max(0.0))
}

fn data(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    tolerances: &[f64],
    window: Option<(f64, f64)>,
) -> BiasData {
    let net = t.bias(values, &p.rails);
    let corners: Vec<CornerCurve> = p
        .corners
        .iter()
        .map(|c| CornerCurve {
            label: c.label.clone(),
            law: c.law,
            op: net.solve(&c.law),
        })
        .collect();
    let nominal = line_of(t, values, p);
    let mut extremes: Vec<Line> = Vec::new();
    for v in tolerance_extremes(values, tolerances) {
        let l = line_of(t, &v, p);
        let same = |m: &Line| {
            (m.a_v - l.a_v).abs() <= 1e-9 * l.a_v.abs().max(1.0)
                && (m.b_ohm - l.b_ohm).abs() <= 1e-9 * l.b_ohm.abs().max(1.0)
        };
        if !same(&nominal) && !extremes.iter().any(same) {
            extremes.push(l);
        }
    }
    let fold = |f: fn(f64, f64) -> f64, init: f64, g: &dyn Fn(&CornerCurve) -> f64| {
        corners.iter().map(g).fold(init, f)
    };
    let vto_min = fold(f64::min, f64::INFINITY, &|c| c.law.vto_v);
    let vto_max = fold(f64::max, f64::NEG_INFINITY, &|c| c.law.vto_v);
    let vgs_min = fold(f64::min, f64::INFINITY, &|c| c.op.vgs_v);
    let vgs_max = fold(f64::max, f64::NEG_INFINITY, &|c| c.op.vgs_v);
    let id_max = fold(f64::max, 0.0, &|c| c.op.id_a);
    let enhancement = vto_min > 0.0;
    let (mut lo, mut hi) = if enhancement {
        (0.0, vgs_max.max(vto_max))
    } else {
        (vto_min.min(vgs_min), vgs_max.max(0.0))
    };
    if !(lo.is_finite() && hi.is_finite()) {
        (lo, hi) = (-1.0, 1.0);
    }
    let span = (hi - lo).max(0.5);
    let x = if enhancement {
        (lo, hi + 0.3 * span)
    } else {
        (lo - 0.08 * span, hi + 0.12 * span)
    };
    let m = id_max.max(window.map_or(0.0, |w| w.1)).max(1e-6);
    let top_of_curves = corners
        .iter()
        .map(|c| sat_id(&c.law, x.1, c.op.vds_v))
        .fold(0.0, f64::max);
    let y_max_a = top_of_curves.min(1.8 * m).max(1.3 * m) * 1.05;
    let vgs_end_v = if p.spec.device.family.is_jfet() {
        x.1.min(0.0)
    } else {
        x.1
    };
    BiasData {
        corners,
        nominal,
        extremes,
        window,
        vgs_end_v,
        x,
        y_max_a,
    }
}

/// The bias picture of a design as SVG text: transfer curves at every
/// device corner of `p`, the bias lines at nominal `values` (ohms) and at
/// every `tolerances` extreme (relative), the operating points, and the
/// allowed drain-current window `id_window` = (low, high) in amps as a
/// shaded band when given. VGS in volts on x, ID in milliamps on y.
pub fn bias_svg(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    tolerances: &[f64],
    id_window: Option<(f64, f64)>,
    title: &str,
) -> String {
    let d = data(p, t, values, tolerances, id_window);
    let mut out = String::new();
    let result = {
        let root = SVGBackend::with_string(&mut out, (WIDTH, HEIGHT)).into_drawing_area();
        draw(&root, &d, title).and_then(|()| root.present().map_err(|e| e.to_string()))
    };
    match result {
        Ok(()) => out,
        Err(e) => fallback(
            WIDTH,
            HEIGHT,
            title,
            &format!("bias picture not drawn: {e}"),
        ),
    }
}

fn rgb(i: usize) -> RGBColor {
    let (r, g, b) = colour(i);
    RGBColor(r, g, b)
}

fn volts(v: f64) -> String {
    with_unit(v, "V")
}

/// A current with its own SI prefix (`17.4 uA`, `2.1 mA`): a fixed "mA"
/// would print `17.4m mA` for microamps.
fn milliamps(a: f64) -> String {
    with_unit(a, "A")
}

fn draw(root: &DrawingArea<SVGBackend, Shift>, d: &BiasData, title: &str) -> Result<(), String> {
    let e = |e: DrawingAreaErrorKind<_>| e.to_string();
    root.fill(&WHITE).map_err(e)?;
    let (plot, legend) = root.split_horizontally(PLOT_WIDTH);
    let y_top = d.y_max_a * 1e3;
    let mut chart = ChartBuilder::on(&plot)
        .caption(crate::report::printable(title), ("sans-serif", 18))
        .margin(16)
        .x_label_area_size(44)
        .y_label_area_size(56)
        .build_cartesian_2d(d.x.0..d.x.1, 0.0..y_top)
        .map_err(e)?;
    chart
        .configure_mesh()
        .x_desc("VGS (V)")
        .y_desc("ID (mA)")
        .label_style(("sans-serif", 13))
        .axis_desc_style(("sans-serif", 14))
        .max_light_lines(1)
        .light_line_style(RGBColor(240, 240, 240))
        .bold_line_style(RGBColor(210, 210, 210))
        .draw()
        .map_err(e)?;
    if let Some((lo, hi)) = d.window {
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(d.x.0, lo * 1e3), (d.x.1, hi.min(d.y_max_a) * 1e3)],
                RGBColor(0, 158, 115).mix(0.15).filled(),
            )))
            .map_err(e)?;
    }
    if d.x.0 < 0.0 && d.x.1 > 0.0 {
        chart
            .draw_series(LineSeries::new([(0.0, 0.0), (0.0, y_top)], BLACK.mix(0.5)))
            .map_err(e)?;
    }
    for (i, c) in d.corners.iter().enumerate() {
        chart
            .draw_series(LineSeries::new(curve(c, d), rgb(i).stroke_width(2)))
            .map_err(e)?;
    }
    for l in &d.extremes {
        let pts = line_points(*l, d);
        chart
            .draw_series(DashedLineSeries::new(
                pts,
                6,
                4,
                RGBColor(120, 120, 120).stroke_width(1),
            ))
            .map_err(e)?;
    }
    chart
        .draw_series(LineSeries::new(
            line_points(d.nominal, d),
            BLACK.stroke_width(2),
        ))
        .map_err(e)?;
    for (i, c) in d.corners.iter().enumerate() {
        let at = (c.op.vgs_v, c.op.id_a * 1e3);
        // Out of saturation the point is off its saturation curve: hollow.
        let fill = if c.op.saturated() {
            rgb(i).filled()
        } else {
            WHITE.filled()
        };
        chart
            .draw_series([
                Circle::new(at, 5, fill),
                Circle::new(at, 5, rgb(i).stroke_width(2)),
            ])
            .map_err(e)?;
    }
    draw_legend(&legend, d).map_err(e)
}

/// Points of a corner's curve from the left edge to where it leaves the top.
fn curve(c: &CornerCurve, d: &BiasData) -> Vec<(f64, f64)> {
    let (x0, x1) = (d.x.0, d.vgs_end_v);
    let mut pts = Vec::with_capacity(SAMPLES + 2);
    let start = x0.max(c.law.vto_v);
    if start > x0 {
        pts.push((x0, 0.0));
    }
    for i in 0..=SAMPLES {
        let vgs = start + (x1 - start) * i as f64 / SAMPLES as f64;
        let id = sat_id(&c.law, vgs, c.op.vds_v);
        if id > d.y_max_a {
            // Exact crossing of the top edge.
            let scale = c.law.k_a_per_v2 * (1.0 + c.law.lambda_per_v * c.op.vds_v.max(0.0));
            if scale > 0.0 {
                pts.push((c.law.vto_v + (d.y_max_a / scale).sqrt(), d.y_max_a * 1e3));
            }
            break;
        }
        pts.push((vgs, id * 1e3));
    }
    pts
}

/// The visible part of a bias line, ID from 0 to the top of the plot.
fn line_points(l: Line, d: &BiasData) -> Vec<(f64, f64)> {
    let (x0, x1) = d.x;
    if l.b_ohm <= 0.0 {
        if l.a_v >= x0 && l.a_v <= x1 {
            return vec![(l.a_v, 0.0), (l.a_v, d.y_max_a * 1e3)];
        }
        return Vec::new();
    }
    let id_at = |vgs: f64| (l.a_v - vgs) / l.b_ohm;
    let lo = id_at(x1).max(0.0);
    let hi = id_at(x0).min(d.y_max_a);
    if lo >= hi {
        return Vec::new();
    }
    [lo, hi]
        .iter()
        .map(|&id| (l.a_v - id * l.b_ohm, id * 1e3))
        .collect()
}

fn draw_legend(
    area: &DrawingArea<SVGBackend, Shift>,
    d: &BiasData,
) -> Result<(), DrawingAreaErrorKind<std::io::Error>> {
    let text = ("sans-serif", 13).into_font();
    let small = ("sans-serif", 12).into_font().color(&RGBColor(60, 60, 60));
    let mut y = 50;
    let x = 10;
    area.draw(&Text::new(
        "device corners",
        (x, y),
        text.clone().style(FontStyle::Bold),
    ))?;
    y += 22;
    for (i, c) in d.corners.iter().enumerate() {
        area.draw(&PathElement::new(
            [(x, y), (x + 26, y)],
            rgb(i).stroke_width(2),
        ))?;
        area.draw(&Circle::new((x + 13, y), 4, rgb(i).filled()))?;
        area.draw(&Text::new(c.label.clone(), (x + 34, y - 7), text.clone()))?;
        let region = match c.op.region {
            Region::Saturation => "",
            Region::Triode => " (triode)",
            Region::Cutoff => " (cut off)",
        };
        let op = format!(
            "VGS {}, ID {}{region}",
            volts(c.op.vgs_v),
            milliamps(c.op.id_a)
        );
        area.draw(&Text::new(op, (x + 34, y + 8), small.clone()))?;
        y += 38;
    }
    y += 6;
    area.draw(&PathElement::new(
        [(x, y), (x + 26, y)],
        BLACK.stroke_width(2),
    ))?;
    let l = d.nominal;
    let eq = if l.b_ohm > 0.0 {
        format!("VGS = {} − ID·{}", volts(l.a_v), with_unit(l.b_ohm, "Ω"))
    } else {
        format!("VGS = {}", volts(l.a_v))
    };
    area.draw(&Text::new(
        "bias line, nominal values",
        (x + 34, y - 7),
        text.clone(),
    ))?;
    area.draw(&Text::new(eq, (x + 34, y + 8), small.clone()))?;
    y += 38;
    if !d.extremes.is_empty() {
        for k in 0..3 {
            let x0 = x + 10 * k;
            area.draw(&PathElement::new(
                [(x0, y), (x0 + 6, y)],
                RGBColor(120, 120, 120).stroke_width(1),
            ))?;
        }
        area.draw(&Text::new(
            "bias lines at resistor",
            (x + 34, y - 7),
            text.clone(),
        ))?;
        area.draw(&Text::new(
            "tolerance extremes",
            (x + 34, y + 8),
            text.clone(),
        ))?;
        y += 38;
    }
    if let Some((lo, hi)) = d.window {
        area.draw(&Rectangle::new(
            [(x, y - 7), (x + 26, y + 7)],
            RGBColor(0, 158, 115).mix(0.15).filled(),
        ))?;
        area.draw(&Text::new(
            "allowed ID window",
            (x + 34, y - 7),
            text.clone(),
        ))?;
        let range = format!("{} to {}", milliamps(lo), milliamps(hi));
        area.draw(&Text::new(range, (x + 34, y + 8), small))?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::topology::by_id;

    fn problem() -> Problem {
        let mut spec = crate::spec::jfet_test_spec(20.0, 0.0, (4e-3, 12e-3), (-2.0, -6.0));
        spec.target.gain = 2.0;
        spec.parts.tolerance = None;
        Problem::new(&spec)
    }

    // REFERENCE §4.2 [computed]: with VG = 2.9539 V and RS = 2486.1 Ω the
    // bias line meets the min curve (4 mA, −2 V) at 1.500 mA and the max
    // curve (12 mA, −6 V) at 2.500 mA. With R1/R2 setting VG from 20 V:
    // R2/(R1 + R2) = 2.9539/20.
    #[test]
    fn window_design_points_lie_on_curve_and_line() {
        let p = problem();
        let t = by_id("divider-swamped").unwrap();
        let r2 = 100e3;
        let r1 = r2 * (20.0 / 2.953_9 - 1.0);
        let d = data(
            &p,
            t,
            &[r1, r2, 2486.1, 3e3],
            &[0.0; 4],
            Some((1.5e-3, 2.5e-3)),
        );
        assert!((d.nominal.a_v - 2.9539).abs() < 1e-9);
        assert_eq!(d.nominal.b_ohm, 2486.1);
        assert!(d.extremes.is_empty());
        let ids: Vec<f64> = d.corners.iter().map(|c| c.op.id_a).collect();
        let lo = ids.iter().copied().fold(f64::INFINITY, f64::min);
        let hi = ids.iter().copied().fold(0.0, f64::max);
        assert!((lo - 1.5e-3).abs() < 2e-7, "{lo}");
        assert!((hi - 2.5e-3).abs() < 2e-7, "{hi}");
        for c in &d.corners {
            // On its own curve and on the bias line.
            let on_curve = sat_id(&c.law, c.op.vgs_v, c.op.vds_v) - c.op.id_a;
            assert!(on_curve.abs() < 1e-12, "{}", c.label);
            let on_line = d.nominal.a_v - c.op.id_a * d.nominal.b_ohm - c.op.vgs_v;
            assert!(on_line.abs() < 1e-9, "{}", c.label);
        }
        // The plot spans the most negative VGS(off) and 0 V, and the window.
        assert!(d.x.0 < -6.0 && d.x.1 > 0.0);
        assert!(d.y_max_a > 2.5e-3);
    }

    // Resistor tolerance moves the divider's VG and RS. R1 and R2 both low
    // or both high keep the ratio, so the four (R1, R2) pairs give three gate
    // voltages, each with RS low or high (RD plays no part in the line): six
    // distinct dashed lines, none of them the nominal one.
    #[test]
    fn tolerance_extremes_give_distinct_dashed_lines() {
        let p = problem();
        let t = by_id("divider-swamped").unwrap();
        let d = data(&p, t, &[1e6, 150e3, 2.4e3, 3e3], &[0.05; 4], None);
        assert_eq!(d.extremes.len(), 6);
    }
}
