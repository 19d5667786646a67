//! The bias window as plain data, for the bias picture (Boylestad &
//! Nashelsky ch. 7, the min/max-curve method of REFERENCE §4.2):
//!
//! - the device's transfer curve ID(VGS) at every device corner, in
//!   saturation, `ID = k·(VGS − vto)²·(1 + λ·VDS)` with VDS at that corner's
//!   operating point (λ = 0 gives Shockley's / Shichman–Hodges' curve),
//!   sampled inside the view and cut exactly where it leaves the top;
//! - the bias line of the design at nominal values, `VGS = VG − ID·RS`
//!   measured from the source rail (drain feedback: `VGS = VDD − ID·RD`),
//!   and the distinct bias lines at every resistor-tolerance extreme;
//! - the operating point at each corner with nominal values;
//! - the allowed drain-current window, when given;
//! - the view: the part of the (VGS, ID) plane worth drawing. Its current
//!   range is set by the operating points, over every corner and tolerance
//!   extreme, not by the window: a 5 mA `id_max` must not squeeze 100 µA
//!   operating points into the bottom of the picture. The window sets the
//!   range only when its top is close to the operating points (within
//!   [`WINDOW_REACH`] of the largest current).
//!
//! Everything is in SI units (volts, amps, ohms).

use crate::analysis::{tolerance_extremes, Problem};
use crate::device::{Region, SquareLaw};
use crate::topology::{Gate, Topology};

/// Samples along each transfer curve inside the view.
pub const CURVE_SAMPLES: usize = 160;

/// Headroom above the largest operating current, as a factor of it.
pub const TOP_MARGIN: f64 = 1.3;

/// The allowed-current window sets the top of the view only when its upper
/// edge is at most this many times the largest operating current.
pub const WINDOW_REACH: f64 = 2.5;

/// A bias line `VGS = vg_v − ID·r_ohm`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BiasLine {
    /// VGS at ID = 0, volts.
    pub vg_v: f64,
    /// Slope, ohms (the source resistance seen by the gate loop).
    pub r_ohm: f64,
}

impl BiasLine {
    /// Its visible part, from ID = 0 (or the right edge) to the top (or the
    /// left edge): two (VGS volts, ID amps) points, or none.
    pub fn points(&self, view: &View) -> Vec<(f64, f64)> {
        let (x0, x1) = view.vgs_v;
        if self.r_ohm <= 0.0 {
            if self.vg_v >= x0 && self.vg_v <= x1 {
                return vec![(self.vg_v, 0.0), (self.vg_v, view.id_top_a)];
            }
            return Vec::new();
        }
        let id_at = |vgs: f64| (self.vg_v - vgs) / self.r_ohm;
        let lo = id_at(x1).max(0.0);
        let hi = id_at(x0).min(view.id_top_a);
        if lo >= hi {
            return Vec::new();
        }
        [lo, hi]
            .iter()
            .map(|&id| (self.vg_v - id * self.r_ohm, id))
            .collect()
    }
}

/// The operating point drawn on a curve.
#[derive(Debug, Clone, PartialEq)]
pub struct BiasPoint {
    /// Gate–source voltage, volts.
    pub vgs_v: f64,
    /// Drain current, amps.
    pub id_a: f64,
    /// True in saturation; out of it the point is off its drawn
    /// (saturation) curve.
    pub saturated: bool,
    /// The region in words when not saturated: `triode`, `cut off`.
    pub off_curve: Option<&'static str>,
}

/// One device corner as drawn.
#[derive(Debug, Clone, PartialEq)]
pub struct BiasCorner {
    /// Corner label.
    pub label: String,
    /// The transfer curve inside the view, (VGS volts, ID amps), in order
    /// of VGS.
    pub curve: Vec<(f64, f64)>,
    /// Where the nominal bias line meets it.
    pub op: BiasPoint,
}

/// The part of the plane to draw.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct View {
    /// VGS from, to, volts.
    pub vgs_v: (f64, f64),
    /// ID from 0 to this, amps.
    pub id_top_a: f64,
}

/// Everything the bias picture shows.
#[derive(Debug, Clone, PartialEq)]
pub struct BiasWindow {
    /// Every device corner.
    pub corners: Vec<BiasCorner>,
    /// The bias line at nominal values.
    pub nominal: BiasLine,
    /// The distinct bias lines at the resistor-tolerance extremes.
    pub extremes: Vec<BiasLine>,
    /// Allowed drain current (low, high), amps, when given.
    pub window: Option<(f64, f64)>,
    /// The view.
    pub view: View,
    /// The largest drain current over every corner and tolerance extreme,
    /// amps (what the view is sized to show).
    pub id_worst_a: f64,
}

fn line_of(t: &dyn Topology, values: &[f64], p: &Problem) -> BiasLine {
    let net = t.bias(values, &p.rails);
    match net.gate {
        Gate::Fixed(vg) => BiasLine {
            vg_v: vg - net.source_rail_v,
            r_ohm: net.rs_ohm,
        },
        Gate::FromDrain => BiasLine {
            vg_v: net.drain_rail_v - net.source_rail_v,
            r_ohm: net.rd_ohm + net.rs_ohm,
        },
    }
}

/// Saturation current at `vgs` for the law at `vds`, amps.
fn sat_id(law: &SquareLaw, vgs: f64, vds: f64) -> f64 {
    let vov = (vgs - law.vto_v).max(0.0);
    law.k_a_per_v2 * vov * vov * (1.0 + law.lambda_per_v * vds.max(0.0))
}

/// The curve from the left edge (or cut-off) to the right end `x_end` (or
/// where it leaves the top, found exactly).
fn curve(law: &SquareLaw, vds: f64, x0: f64, x_end: f64, top: f64) -> Vec<(f64, f64)> {
    let scale = law.k_a_per_v2 * (1.0 + law.lambda_per_v * vds.max(0.0));
    let start = x0.max(law.vto_v);
    if start >= x_end || scale <= 0.0 {
        return Vec::new();
    }
    let exit = (law.vto_v + (top / scale).sqrt()).min(x_end);
    let mut pts = Vec::with_capacity(CURVE_SAMPLES + 2);
    if start > x0 {
        pts.push((x0, 0.0));
    }
    for i in 0..=CURVE_SAMPLES {
        let vgs = start + (exit - start) * i as f64 / CURVE_SAMPLES as f64;
        pts.push((vgs, sat_id(law, vgs, vds).min(top)));
    }
    pts
}

/// The bias window of a design: `values` in ohms and `tolerances`
/// (relative) in the topology's part order; `window` the allowed drain
/// current (low, high) in amps; `id_worst_a` the largest drain current of
/// the worst-case analysis.
pub fn bias_window(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    tolerances: &[f64],
    window: Option<(f64, f64)>,
    id_worst_a: f64,
) -> BiasWindow {
    let net = t.bias(values, &p.rails);
    let ops: Vec<_> = p.corners.iter().map(|c| net.solve(&c.law)).collect();
    let nominal = line_of(t, values, p);
    let mut extremes: Vec<BiasLine> = Vec::new();
    for v in tolerance_extremes(values, tolerances) {
        let l = line_of(t, &v, p);
        let same = |m: &BiasLine| {
            (m.vg_v - l.vg_v).abs() <= 1e-9 * l.vg_v.abs().max(1.0)
                && (m.r_ohm - l.r_ohm).abs() <= 1e-9 * l.r_ohm.abs().max(1.0)
        };
        if !same(&nominal) && !extremes.iter().any(same) {
            extremes.push(l);
        }
    }
    let laws = || p.corners.iter().map(|c| c.law);
    let vto_min = laws().map(|l| l.vto_v).fold(f64::INFINITY, f64::min);
    let vto_max = laws().map(|l| l.vto_v).fold(f64::NEG_INFINITY, f64::max);
    let vgs_min = ops.iter().map(|o| o.vgs_v).fold(f64::INFINITY, f64::min);
    let vgs_max = ops
        .iter()
        .map(|o| o.vgs_v)
        .fold(f64::NEG_INFINITY, f64::max);
    let id_op = ops.iter().map(|o| o.id_a).fold(0.0, f64::max);
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
    let vgs_v = if enhancement {
        (lo, hi + 0.3 * span)
    } else {
        (lo - 0.08 * span, hi + 0.12 * span)
    };
    let id_worst_a = if id_worst_a.is_finite() {
        id_worst_a.max(id_op)
    } else {
        id_op
    };
    let mut top = TOP_MARGIN * id_worst_a;
    if let Some((_, w_hi)) = window {
        if w_hi > 0.0 && w_hi <= WINDOW_REACH * id_worst_a {
            top = top.max(1.1 * w_hi);
        }
    }
    if !(top.is_finite() && top > 0.0) {
        top = window.map_or(1e-3, |w| 1.1 * w.1).max(1e-9);
    }
    let view = View {
        vgs_v,
        id_top_a: top,
    };
    // A JFET's curve ends at VGS = 0: beyond it the gate junction conducts.
    let x_end = if p.spec.device.family.is_jfet() {
        vgs_v.1.min(0.0)
    } else {
        vgs_v.1
    };
    let corners = p
        .corners
        .iter()
        .zip(&ops)
        .map(|(c, op)| BiasCorner {
            label: c.label.clone(),
            curve: curve(&c.law, op.vds_v, vgs_v.0, x_end, top),
            op: BiasPoint {
                vgs_v: op.vgs_v,
                id_a: op.id_a,
                saturated: op.saturated(),
                off_curve: match op.region {
                    Region::Saturation => None,
                    Region::Triode => Some("triode"),
                    Region::Cutoff => Some("cut off"),
                },
            },
        })
        .collect();
    BiasWindow {
        corners,
        nominal,
        extremes,
        window,
        view,
        id_worst_a,
    }
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
        let w = bias_window(
            &p,
            t,
            &[r1, r2, 2486.1, 3e3],
            &[0.0; 4],
            Some((1.5e-3, 2.5e-3)),
            2.5e-3,
        );
        assert!((w.nominal.vg_v - 2.9539).abs() < 1e-9);
        assert_eq!(w.nominal.r_ohm, 2486.1);
        assert!(w.extremes.is_empty());
        let ids: Vec<f64> = w.corners.iter().map(|c| c.op.id_a).collect();
        let lo = ids.iter().copied().fold(f64::INFINITY, f64::min);
        let hi = ids.iter().copied().fold(0.0, f64::max);
        assert!((lo - 1.5e-3).abs() < 2e-7, "{lo}");
        assert!((hi - 2.5e-3).abs() < 2e-7, "{hi}");
        for (c, corner) in w.corners.iter().zip(&p.corners) {
            // On its own curve and on the bias line.
            let on_curve = sat_id(&corner.law, c.op.vgs_v, 0.0) - c.op.id_a;
            assert!(on_curve.abs() < 1e-12, "{}", c.label);
            let on_line = w.nominal.vg_v - c.op.id_a * w.nominal.r_ohm - c.op.vgs_v;
            assert!(on_line.abs() < 1e-9, "{}", c.label);
        }
        // The view spans the most negative VGS(off) and 0 V, and the
        // window (its top is within reach of the operating points).
        assert!(w.view.vgs_v.0 < -6.0 && w.view.vgs_v.1 > 0.0);
        assert!(w.view.id_top_a >= 1.1 * 2.5e-3);
    }

    // Resistor tolerance moves the divider's VG and RS. R1 and R2 both low
    // or both high keep the ratio, so the four (R1, R2) pairs give three gate
    // voltages, each with RS low or high (RD plays no part in the line): six
    // distinct dashed lines, none of them the nominal one.
    #[test]
    fn tolerance_extremes_give_distinct_lines() {
        let p = problem();
        let t = by_id("divider-swamped").unwrap();
        let w = bias_window(&p, t, &[1e6, 150e3, 2.4e3, 3e3], &[0.05; 4], None, 3e-3);
        assert_eq!(w.extremes.len(), 6);
    }

    // Operating points of 40 to 130 µA with an allowed window up to 5 mA:
    // the view is sized by the points (the window is far above), so none
    // sits in the bottom 15 % of the picture (with the window's scale they
    // would all be in its bottom 3 %).
    #[test]
    fn the_view_zooms_to_the_operating_points_not_a_far_window() {
        let p = problem();
        let t = by_id("self-bias").unwrap();
        // Self bias with RS 47 kΩ: ID ≈ |VGS(off)|/RS, 40 to 130 µA.
        let w = bias_window(
            &p,
            t,
            &[1e6, 47e3, 10e3],
            &[0.01; 3],
            Some((0.0, 5e-3)),
            0.0,
        );
        let id_max = w.corners.iter().map(|c| c.op.id_a).fold(0.0, f64::max);
        assert!(
            id_max < 150e-6 && id_max > 0.7 * w.view.id_top_a,
            "{id_max}"
        );
        assert!((w.view.id_top_a - TOP_MARGIN * w.id_worst_a).abs() < 1e-15);
        assert!(w.id_worst_a >= id_max);
        for c in &w.corners {
            assert!(
                c.op.id_a > 0.15 * w.view.id_top_a,
                "{}: {}",
                c.label,
                c.op.id_a
            );
        }
        // Every curve point is on its corner's law and inside the view.
        for (c, corner) in w.corners.iter().zip(&p.corners) {
            assert!(c.curve.len() > CURVE_SAMPLES);
            for &(v, id) in &c.curve {
                assert!(id <= w.view.id_top_a * (1.0 + 1e-12));
                assert!(v >= w.view.vgs_v.0 && v <= 0.0);
                let law = sat_id(&corner.law, v, 0.0);
                assert!((law.min(w.view.id_top_a) - id).abs() <= 1e-12 * law.max(1e-9));
            }
            // It reaches the top exactly.
            let last = c.curve.last().unwrap();
            assert!((last.1 - w.view.id_top_a).abs() < 1e-15, "{}", c.label);
        }
    }
}
