//! The frequency response of a design, drawn from the bench stage's
//! [`Response`]: gain in dB against log frequency at every device corner
//! (one colour each, the colours of the bias picture) and at the nominal
//! device (black), each with its low −3 dB point (a dot), and the corner
//! the capacitors were sized for (dashed vertical). The legend, in a panel
//! right of the plot, names each curve with its mid-band gain and −3 dB
//! point, and says whether the corner is the specification's `f_low` or
//! the default one.
//!
//! Points with a frequency or gain that is not finite and positive are left
//! out; a curve with fewer than two left is not drawn, and with no curve
//! the picture says so. This module only draws.

use super::{colour, fallback, px, shown_at, spx};
use crate::bench::response::{Curve, Response};
use crate::units::{format_sig, with_unit};
use plotters::coord::Shift;
use plotters::prelude::*;

const WIDTH: u32 = 940;
const HEIGHT: u32 = 520;
const PLOT_WIDTH: u32 = 640;

/// `20·log10(g)`, dB.
fn db(g: f64) -> f64 {
    20.0 * g.log10()
}

/// Decibels to three significant figures and never with an SI prefix
/// (`11`, `-0.67`, not `-672m`).
fn decibels(x: f64) -> String {
    if x.abs() >= 1.0 {
        format_sig(x, 3)
    } else {
        format!("{x:.2}")
    }
}

fn hertz(f: f64) -> String {
    with_unit(f, "Hz")
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

/// The drawable points of a curve, in dB.
fn drawable(c: &Curve) -> Vec<(f64, f64)> {
    let mut pts: Vec<(f64, f64)> = c
        .points
        .iter()
        .copied()
        .filter(|&(f, g)| f.is_finite() && f > 0.0 && g.is_finite() && g > 0.0)
        .map(|(f, g)| (f, db(g)))
        .collect();
    pts.sort_by(|a, b| a.0.total_cmp(&b.0));
    pts.dedup_by(|a, b| a.0 == b.0);
    pts
}

/// A curve as drawn: its colour, whether it is the nominal device's, the
/// curve, and its drawable points in dB.
type Drawn<'a> = (RGBColor, bool, &'a Curve, Vec<(f64, f64)>);

/// The response picture as SVG text.
pub fn response_svg(r: &Response, title: &str) -> String {
    let mut curves: Vec<Drawn> = r
        .corners
        .iter()
        .enumerate()
        .map(|(i, c)| (rgb(i), false, c, drawable(c)))
        .collect();
    curves.push((BLACK, true, &r.nominal, drawable(&r.nominal)));
    curves.retain(|c| c.3.len() >= 2);
    if curves.is_empty() {
        return fallback(WIDTH, HEIGHT, title, "no sweep points to draw");
    }
    let mut out = String::new();
    let result = {
        let root = SVGBackend::with_string(&mut out, (px(WIDTH), px(HEIGHT))).into_drawing_area();
        draw(&root, r, &curves, title).and_then(|()| root.present().map_err(|e| e.to_string()))
    };
    match result {
        Ok(()) => shown_at(out, WIDTH, HEIGHT),
        Err(e) => fallback(
            WIDTH,
            HEIGHT,
            title,
            &format!("response picture not drawn: {e}"),
        ),
    }
}

fn draw(
    root: &DrawingArea<SVGBackend, Shift>,
    r: &Response,
    curves: &[Drawn],
    title: &str,
) -> Result<(), String> {
    let e = |e: DrawingAreaErrorKind<_>| e.to_string();
    root.fill(&WHITE).map_err(e)?;
    let (plot, legend) = root.split_horizontally(px(PLOT_WIDTH));
    let all = || curves.iter().flat_map(|c| c.3.iter());
    let f0 = all().map(|p| p.0).fold(f64::INFINITY, f64::min);
    let f1 = all().map(|p| p.0).fold(f64::NEG_INFINITY, f64::max);
    let top = all().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
    let bottom = all().map(|p| p.1).fold(f64::INFINITY, f64::min);
    let y0 = (bottom - 2.0).floor();
    let y1 = (top + 2.0).ceil().max(y0 + 6.0);
    let mut chart = ChartBuilder::on(&plot)
        .caption(crate::report::printable(title), ("sans-serif", px(18)))
        .margin(px(16))
        .x_label_area_size(px(44))
        .y_label_area_size(px(56))
        .build_cartesian_2d((f0..f1).log_scale(), y0..y1)
        .map_err(e)?;
    chart
        .configure_mesh()
        .x_desc("frequency (Hz)")
        .y_desc("gain (dB)")
        .x_label_formatter(&|f| format_sig(*f, 3))
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
    let f = r.f_low_hz;
    if f.is_finite() && f >= f0 && f <= f1 {
        chart
            .draw_series(DashedLineSeries::new(
                [(f, y0), (f, y1)],
                px(4),
                px(4),
                BLACK.mix(0.6).stroke_width(px(1)),
            ))
            .map_err(e)?;
    }
    for (colour, nominal, c, pts) in curves {
        let width = if *nominal { 3 } else { 2 };
        chart
            .draw_series(LineSeries::new(
                pts.iter().copied(),
                colour.stroke_width(px(width)),
            ))
            .map_err(e)?;
        if let Some(fc) = c.low_3db_hz.filter(|fc| *fc >= f0 && *fc <= f1) {
            let at = (fc, db(c.mid_band) - 3.0);
            chart
                .draw_series([
                    Circle::new(at, spx(4), colour.filled()),
                    Circle::new(at, spx(4), BLACK.stroke_width(px(1))),
                ])
                .map_err(e)?;
        }
    }
    draw_legend(&legend, r, curves).map_err(e)
}

fn draw_legend(
    area: &DrawingArea<SVGBackend, Shift>,
    r: &Response,
    curves: &[Drawn],
) -> Result<(), DrawingAreaErrorKind<std::io::Error>> {
    let text = ("sans-serif", px(13)).into_font();
    let small = ("sans-serif", px(12))
        .into_font()
        .color(&RGBColor(60, 60, 60));
    let x = spx(10);
    let mut y = spx(50);
    area.draw(&Text::new(
        "gain from the source EMF",
        (x, y),
        text.clone().style(FontStyle::Bold),
    ))?;
    y += spx(22);
    for (colour, nominal, c, _) in curves {
        let width = if *nominal { 3 } else { 2 };
        area.draw(&PathElement::new(
            [(x, y), (x + spx(26), y)],
            colour.stroke_width(px(width)),
        ))?;
        let label = if *nominal {
            "nominal device".to_string()
        } else {
            c.label.clone()
        };
        area.draw(&Text::new(label, (x + spx(34), y - spx(7)), text.clone()))?;
        let corner = c.low_3db_hz.map_or_else(
            || "no −3 dB point in the sweep".to_string(),
            |f| format!("−3 dB at {}", hertz(f)),
        );
        area.draw(&Text::new(
            format!("mid-band {} dB, {corner}", decibels(db(c.mid_band))),
            (x + spx(34), y + spx(8)),
            small.clone(),
        ))?;
        y += spx(38);
    }
    area.draw(&Circle::new((x + spx(13), y), spx(4), WHITE.filled()))?;
    area.draw(&Circle::new(
        (x + spx(13), y),
        spx(4),
        BLACK.stroke_width(px(1)),
    ))?;
    area.draw(&Text::new(
        "−3 dB point, 3 dB below its mid-band",
        (x + spx(34), y - spx(7)),
        text.clone(),
    ))?;
    y += spx(30);
    for k in 0..3 {
        let y0 = y - spx(10) + spx(8) * k;
        area.draw(&PathElement::new(
            [(x + spx(13), y0), (x + spx(13), y0 + spx(4))],
            BLACK.mix(0.6).stroke_width(px(1)),
        ))?;
    }
    let (what, why) = if r.f_low_given {
        (
            format!("f_low = {}", hertz(r.f_low_hz)),
            "the capacitors are sized for it".to_string(),
        )
    } else {
        (
            format!("default corner {}", hertz(r.f_low_hz)),
            "no f_low given; capacitors sized for it".to_string(),
        )
    };
    area.draw(&Text::new(what, (x + spx(34), y - spx(7)), text))?;
    area.draw(&Text::new(why, (x + spx(34), y + spx(8)), small))?;
    Ok(())
}
