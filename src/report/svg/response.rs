//! The frequency response of a design: gain in dB against log frequency
//! from sweep points, with the −3 dB line (3 dB below the largest gain of
//! the sweep, taken as the mid-band gain) and the low-frequency corner
//! marked: the design corner `f_low_hz` when given (dashed vertical), and
//! the sweep's own −3 dB crossing on the low side (a dot), found by linear
//! interpolation of dB against log f between the two points around it.
//!
//! Points with a frequency or gain that is not finite and positive are left
//! out; with fewer than two left the picture says so.

use super::fallback;
use crate::units::format_sig;
use plotters::coord::Shift;
use plotters::prelude::*;

const WIDTH: u32 = 820;
const HEIGHT: u32 = 500;

/// `20·log10(g)`, dB.
fn db(g: f64) -> f64 {
    20.0 * g.log10()
}

/// The frequency where the sweep first rises through `level_db` from the
/// low-frequency side, hertz (log-linear interpolation), if it does.
pub fn low_crossing(points: &[(f64, f64)], level_db: f64) -> Option<f64> {
    points.windows(2).find_map(|w| {
        let ((f0, g0), (f1, g1)) = (w[0], w[1]);
        let (d0, d1) = (db(g0), db(g1));
        if d0 < level_db && d1 >= level_db {
            let u = (level_db - d0) / (d1 - d0);
            Some(10f64.powf(f0.log10() + u * (f1.log10() - f0.log10())))
        } else {
            None
        }
    })
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
    crate::bench::ratings::with_unit(f, "Hz")
}

/// The response picture as SVG text. `points` are (frequency Hz, |gain|
/// V/V) in any order; `f_low_hz` is the design's low-frequency corner.
pub fn response_svg(points: &[(f64, f64)], f_low_hz: Option<f64>, title: &str) -> String {
    let mut pts: Vec<(f64, f64)> = points
        .iter()
        .copied()
        .filter(|&(f, g)| f.is_finite() && f > 0.0 && g.is_finite() && g > 0.0)
        .collect();
    pts.sort_by(|a, b| a.0.total_cmp(&b.0));
    pts.dedup_by(|a, b| a.0 == b.0);
    if pts.len() < 2 {
        return fallback(WIDTH, HEIGHT, title, "no sweep points to draw");
    }
    let mut out = String::new();
    let result = {
        let root = SVGBackend::with_string(&mut out, (WIDTH, HEIGHT)).into_drawing_area();
        draw(&root, &pts, f_low_hz, title).and_then(|()| root.present().map_err(|e| e.to_string()))
    };
    match result {
        Ok(()) => out,
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
    pts: &[(f64, f64)],
    f_low_hz: Option<f64>,
    title: &str,
) -> Result<(), String> {
    let e = |e: DrawingAreaErrorKind<_>| e.to_string();
    root.fill(&WHITE).map_err(e)?;
    let (f0, f1) = match (pts.first(), pts.last()) {
        (Some(a), Some(b)) => (a.0, b.0),
        _ => return Err("no points".to_string()),
    };
    let dbs: Vec<f64> = pts.iter().map(|p| db(p.1)).collect();
    let top = dbs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let bottom = dbs.iter().copied().fold(f64::INFINITY, f64::min);
    let level = top - 3.0;
    let y0 = (bottom.min(level) - 3.0).floor();
    let y1 = (top + 3.0).ceil().max(y0 + 6.0);
    let mut chart = ChartBuilder::on(root)
        .caption(crate::report::printable(title), ("sans-serif", 18))
        .margin(18)
        .x_label_area_size(44)
        .y_label_area_size(56)
        .build_cartesian_2d((f0..f1).log_scale(), y0..y1)
        .map_err(e)?;
    chart
        .configure_mesh()
        .x_desc("frequency (Hz)")
        .y_desc("gain (dB)")
        .x_label_formatter(&|f| format_sig(*f, 3))
        .label_style(("sans-serif", 13))
        .axis_desc_style(("sans-serif", 14))
        .max_light_lines(1)
        .light_line_style(RGBColor(240, 240, 240))
        .bold_line_style(RGBColor(210, 210, 210))
        .draw()
        .map_err(e)?;
    let red = RGBColor(213, 94, 0);
    let blue = RGBColor(0, 114, 178);
    chart
        .draw_series(DashedLineSeries::new(
            [(f0, level), (f1, level)],
            8,
            5,
            red.stroke_width(1),
        ))
        .map_err(e)?
        .label(format!("−3 dB: {} dB", decibels(level)))
        .legend(move |(x, y)| PathElement::new([(x, y), (x + 24, y)], red.stroke_width(1)));
    chart
        .draw_series(LineSeries::new(
            pts.iter().zip(&dbs).map(|(p, d)| (p.0, *d)),
            blue.stroke_width(2),
        ))
        .map_err(e)?
        .label(format!("gain, mid-band {} dB", decibels(top)))
        .legend(move |(x, y)| PathElement::new([(x, y), (x + 24, y)], blue.stroke_width(2)));
    if let Some(f) = f_low_hz.filter(|f| f.is_finite() && *f >= f0 && *f <= f1) {
        chart
            .draw_series(DashedLineSeries::new(
                [(f, y0), (f, y1)],
                4,
                4,
                BLACK.stroke_width(1),
            ))
            .map_err(e)?
            .label(format!("design corner f_L = {}", hertz(f)))
            .legend(|(x, y)| PathElement::new([(x, y), (x + 24, y)], BLACK.stroke_width(1)));
    }
    if let Some(fc) = low_crossing(pts, level) {
        chart
            .draw_series([
                Circle::new((fc, level), 5, red.filled()),
                Circle::new((fc, level), 5, BLACK.stroke_width(1)),
            ])
            .map_err(e)?
            .label(format!("−3 dB point of the sweep: {}", hertz(fc)))
            .legend(move |(x, y)| Circle::new((x + 12, y), 5, red.filled()));
    }
    chart
        .configure_series_labels()
        .position(SeriesLabelPosition::LowerRight)
        .background_style(WHITE.mix(0.9))
        .border_style(BLACK.mix(0.4))
        .label_font(("sans-serif", 13))
        .draw()
        .map_err(e)
}

#[cfg(test)]
mod tests {
    use super::*;

    // A single real pole at 20 Hz: |H| = 1/sqrt(1 + (fp/f)²) is 3.0103 dB
    // down at f = fp (textbook first-order high-pass). Sampled on a fine log
    // grid, the interpolated crossing of −3 dB lies just above fp.
    #[test]
    fn low_crossing_of_a_first_order_high_pass() {
        let fp = 20.0;
        let pts: Vec<(f64, f64)> = (0..=400)
            .map(|i| {
                let f = 10f64.powf(i as f64 / 100.0);
                (f, 1.0 / (1.0 + (fp / f).powi(2)).sqrt())
            })
            .collect();
        // Exact −3 dB (not −3.0103): 1 + (fp/f)² = 10^0.3.
        let want = fp / (10f64.powf(0.3) - 1.0).sqrt();
        let got = low_crossing(&pts, -3.0).unwrap();
        assert!((got - want).abs() < 1e-3 * want, "{got} vs {want}");
        assert!(low_crossing(&pts, 1.0).is_none());
    }

    #[test]
    fn too_few_points_give_a_notice_not_a_panic() {
        let svg = response_svg(&[(f64::NAN, 1.0), (10.0, -1.0), (100.0, 2.0)], None, "x");
        assert!(svg.contains("no sweep points to draw"));
    }
}
