//! The bias picture an engineer draws by hand (Boylestad & Nashelsky ch. 7,
//! the min/max-curve method of REFERENCE §4.2), drawn from the bench
//! stage's [`BiasWindow`]:
//!
//! - the transfer curve at every device corner, one colour each;
//! - the bias line at nominal values, solid black, and the bias lines at
//!   every resistor-tolerance extreme, dashed grey;
//! - the operating point at each corner, a filled dot in the corner's
//!   colour (hollow, and marked "triode" or "cut off" in the legend, when
//!   the device is out of saturation there and so off its drawn curve);
//! - the allowed drain-current window as a shaded band when it lies in the
//!   view; when it reaches far above, the legend says so instead.
//!
//! The current axis is in µA when the view's top is below 1 mA, else in
//! mA. The legend sits in a panel to the right of the plot so it never
//! hides a curve. Coordinates come from plotters' SVG backend in whole
//! pixels, so the text is deterministic. This module only draws.

use super::{colour, fallback, px, shown_at, spx};
use crate::bench::bias::{BiasLine, BiasWindow};
use crate::units::with_unit;
use plotters::coord::Shift;
use plotters::prelude::*;

const WIDTH: u32 = 920;
const HEIGHT: u32 = 560;
const PLOT_WIDTH: u32 = 640;

/// The current axis: its scale from amps and its label.
struct Axis {
    per_amp: f64,
    label: &'static str,
}

impl Axis {
    fn of(top_a: f64) -> Axis {
        if top_a < 1e-3 {
            Axis {
                per_amp: 1e6,
                label: "ID (µA)",
            }
        } else {
            Axis {
                per_amp: 1e3,
                label: "ID (mA)",
            }
        }
    }
}

/// The bias picture as SVG text.
pub fn bias_svg(w: &BiasWindow, title: &str) -> String {
    let mut out = String::new();
    let result = {
        let root = SVGBackend::with_string(&mut out, (px(WIDTH), px(HEIGHT))).into_drawing_area();
        draw(&root, w, title).and_then(|()| root.present().map_err(|e| e.to_string()))
    };
    match result {
        Ok(()) => shown_at(out, WIDTH, HEIGHT),
        Err(e) => fallback(
            WIDTH,
            HEIGHT,
            title,
            &format!("bias picture not drawn: {e}"),
        ),
    }
}

/// A tick label without needless decimals: `160`, `2.5`, `-5`.
fn tick(v: f64) -> String {
    let t = format!("{:.2}", v);
    let t = t.trim_end_matches('0').trim_end_matches('.');
    if t == "-0" {
        "0".to_string()
    } else {
        t.to_string()
    }
}

fn rgb(i: usize) -> RGBColor {
    let (r, g, b) = colour(i);
    RGBColor(r, g, b)
}

/// A value with its unit and SI prefix, with µ for micro.
fn si(x: f64, unit: &str) -> String {
    let t = with_unit(x, unit);
    match t.strip_suffix(&format!("u{unit}")) {
        Some(head) => format!("{head}µ{unit}"),
        None => t,
    }
}

const GREEN: RGBColor = RGBColor(0, 158, 115);
const GREY: RGBColor = RGBColor(120, 120, 120);

/// True when the window's band is drawn (its top inside the view).
fn band_shown(w: &BiasWindow) -> Option<(f64, f64)> {
    w.window
        .filter(|&(lo, hi)| hi > lo && lo < w.view.id_top_a && hi <= w.view.id_top_a * 1.5)
}

fn draw(root: &DrawingArea<SVGBackend, Shift>, w: &BiasWindow, title: &str) -> Result<(), String> {
    let e = |e: DrawingAreaErrorKind<_>| e.to_string();
    root.fill(&WHITE).map_err(e)?;
    let (plot, legend) = root.split_horizontally(px(PLOT_WIDTH));
    let axis = Axis::of(w.view.id_top_a);
    let s = axis.per_amp;
    let y_top = w.view.id_top_a * s;
    let (x0, x1) = w.view.vgs_v;
    let mut chart = ChartBuilder::on(&plot)
        .caption(crate::report::printable(title), ("sans-serif", px(18)))
        .margin(px(16))
        .x_label_area_size(px(44))
        .y_label_area_size(px(56))
        .build_cartesian_2d(x0..x1, 0.0..y_top)
        .map_err(e)?;
    chart
        .configure_mesh()
        .x_desc("VGS (V)")
        .y_desc(axis.label)
        .label_style(("sans-serif", px(13)))
        .axis_desc_style(("sans-serif", px(14)))
        .max_light_lines(1)
        .light_line_style(RGBColor(240, 240, 240).stroke_width(px(1)))
        .bold_line_style(RGBColor(210, 210, 210).stroke_width(px(1)))
        .axis_style(BLACK.stroke_width(px(1)))
        .set_all_tick_mark_size(px(5))
        .y_label_formatter(&|v| tick(*v))
        .draw()
        .map_err(e)?;
    if let Some((lo, hi)) = band_shown(w) {
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(x0, lo * s), (x1, hi.min(w.view.id_top_a) * s)],
                GREEN.mix(0.15).filled(),
            )))
            .map_err(e)?;
    }
    if x0 < 0.0 && x1 > 0.0 {
        chart
            .draw_series(LineSeries::new(
                [(0.0, 0.0), (0.0, y_top)],
                BLACK.mix(0.5).stroke_width(px(1)),
            ))
            .map_err(e)?;
    }
    for (i, c) in w.corners.iter().enumerate() {
        chart
            .draw_series(LineSeries::new(
                c.curve.iter().map(|&(v, id)| (v, id * s)),
                rgb(i).stroke_width(px(2)),
            ))
            .map_err(e)?;
    }
    let scaled = |l: &BiasLine| -> Vec<(f64, f64)> {
        l.points(&w.view)
            .into_iter()
            .map(|(v, id)| (v, id * s))
            .collect()
    };
    for l in &w.extremes {
        chart
            .draw_series(DashedLineSeries::new(
                scaled(l),
                px(6),
                px(4),
                GREY.stroke_width(px(1)),
            ))
            .map_err(e)?;
    }
    chart
        .draw_series(LineSeries::new(
            scaled(&w.nominal),
            BLACK.stroke_width(px(2)),
        ))
        .map_err(e)?;
    for (i, c) in w.corners.iter().enumerate() {
        let at = (c.op.vgs_v, c.op.id_a * s);
        let fill = if c.op.saturated {
            rgb(i).filled()
        } else {
            WHITE.filled()
        };
        chart
            .draw_series([
                Circle::new(at, spx(5), fill),
                Circle::new(at, spx(5), rgb(i).stroke_width(px(2))),
            ])
            .map_err(e)?;
    }
    draw_legend(&legend, w).map_err(e)
}

fn draw_legend(
    area: &DrawingArea<SVGBackend, Shift>,
    w: &BiasWindow,
) -> Result<(), DrawingAreaErrorKind<std::io::Error>> {
    let text = ("sans-serif", px(13)).into_font();
    let small = ("sans-serif", px(12))
        .into_font()
        .color(&RGBColor(60, 60, 60));
    let mut y = spx(50);
    let x = spx(10);
    area.draw(&Text::new(
        "device corners",
        (x, y),
        text.clone().style(FontStyle::Bold),
    ))?;
    y += spx(22);
    for (i, c) in w.corners.iter().enumerate() {
        area.draw(&PathElement::new(
            [(x, y), (x + spx(26), y)],
            rgb(i).stroke_width(px(2)),
        ))?;
        area.draw(&Circle::new((x + spx(13), y), spx(4), rgb(i).filled()))?;
        area.draw(&Text::new(
            c.label.clone(),
            (x + spx(34), y - spx(7)),
            text.clone(),
        ))?;
        let region = c.op.off_curve.map_or(String::new(), |r| format!(" ({r})"));
        let op = format!(
            "VGS {}, ID {}{region}",
            si(c.op.vgs_v, "V"),
            si(c.op.id_a, "A")
        );
        area.draw(&Text::new(op, (x + spx(34), y + spx(8)), small.clone()))?;
        y += spx(38);
    }
    y += spx(6);
    area.draw(&PathElement::new(
        [(x, y), (x + spx(26), y)],
        BLACK.stroke_width(px(2)),
    ))?;
    let l = w.nominal;
    let eq = if l.r_ohm > 0.0 {
        format!("VGS = {} − ID·{}", si(l.vg_v, "V"), si(l.r_ohm, "Ω"))
    } else {
        format!("VGS = {}", si(l.vg_v, "V"))
    };
    area.draw(&Text::new(
        "bias line, nominal values",
        (x + spx(34), y - spx(7)),
        text.clone(),
    ))?;
    area.draw(&Text::new(eq, (x + spx(34), y + spx(8)), small.clone()))?;
    y += spx(38);
    if !w.extremes.is_empty() {
        for k in 0..3 {
            let x0 = x + spx(10) * k;
            area.draw(&PathElement::new(
                [(x0, y), (x0 + spx(6), y)],
                GREY.stroke_width(px(1)),
            ))?;
        }
        area.draw(&Text::new(
            "bias lines at resistor",
            (x + spx(34), y - spx(7)),
            text.clone(),
        ))?;
        area.draw(&Text::new(
            "tolerance extremes",
            (x + spx(34), y + spx(8)),
            text.clone(),
        ))?;
        y += spx(38);
    }
    if let Some((lo, hi)) = w.window {
        let range = if lo > 0.0 {
            format!("{} to {}", si(lo, "A"), si(hi, "A"))
        } else {
            format!("up to {}", si(hi, "A"))
        };
        if band_shown(w).is_some() {
            area.draw(&Rectangle::new(
                [(x, y - spx(7)), (x + spx(26), y + spx(7))],
                GREEN.mix(0.15).filled(),
            ))?;
            area.draw(&Text::new(
                "allowed ID window",
                (x + spx(34), y - spx(7)),
                text.clone(),
            ))?;
            area.draw(&Text::new(range, (x + spx(34), y + spx(8)), small.clone()))?;
        } else {
            area.draw(&Text::new(
                "allowed ID window",
                (x + spx(34), y - spx(7)),
                text.clone(),
            ))?;
            area.draw(&Text::new(
                format!("{range}: reaches far above this view"),
                (x + spx(34), y + spx(8)),
                small.clone(),
            ))?;
        }
        y += spx(38);
    }
    area.draw(&Text::new(
        format!(
            "highest ID, every corner and tolerance: {}",
            si(w.id_worst_a, "A")
        ),
        (x, y),
        small,
    ))?;
    Ok(())
}
