//! The frequency response of a design as plain data: |gain| from the source
//! EMF against frequency at the nominal device and at every device corner,
//! with the sized capacitors, from the independent nodal solver (`verify`),
//! and each curve's mid-band gain and low −3 dB point.
//!
//! The −3 dB point is where the sweep first rises through 3 dB below the
//! curve's largest gain (its mid-band gain; the model has no upper band
//! edge), by linear interpolation of dB against log f between the two
//! points around it.

use crate::analysis::Problem;
use crate::netlist::Netlist;
use crate::topology::{Caps, NetlistInput, Topology};
use crate::verify::{self, SolveError};

/// Points per decade of the sweep: at 60 the polyline's largest departure
/// from a one-pole curve near its corner is below 0.01 dB, far below what a
/// picture shows (no kinks).
pub const SWEEP_PPD: usize = 60;

/// The sweep runs from `f_low / SWEEP_BELOW` to `f_low · SWEEP_ABOVE`
/// (dimensionless): a decade under the corner, and up to where every pole
/// and zero of the coupling and bypass capacitors is far below.
pub const SWEEP_BELOW: f64 = 10.0;

/// See [`SWEEP_BELOW`].
pub const SWEEP_ABOVE: f64 = 1e3;

/// One curve of the response.
#[derive(Debug, Clone, PartialEq)]
pub struct Curve {
    /// `nominal` or the device corner's label.
    pub label: String,
    /// (hertz, |gain| V/V), in order of frequency.
    pub points: Vec<(f64, f64)>,
    /// Largest |gain| of the sweep, V/V (the mid-band gain).
    pub mid_band: f64,
    /// Where the curve rises through 3 dB below `mid_band`, hertz; `None`
    /// when it is above that level over the whole sweep.
    pub low_3db_hz: Option<f64>,
}

/// The response of one design.
#[derive(Debug, Clone, PartialEq)]
pub struct Response {
    /// At the nominal device.
    pub nominal: Curve,
    /// At every device corner, in the problem's corner order.
    pub corners: Vec<Curve>,
    /// The corner the capacitors were sized for, hertz.
    pub f_low_hz: f64,
    /// True when the specification gave it; false for the default corner.
    pub f_low_given: bool,
}

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

/// A curve from sweep points: its mid-band gain and −3 dB point.
pub fn curve(label: &str, points: Vec<(f64, f64)>) -> Curve {
    let mid_band = points.iter().map(|p| p.1).fold(0.0, f64::max);
    let low_3db_hz = if mid_band > 0.0 {
        low_crossing(&points, db(mid_band) - 3.0)
    } else {
        None
    };
    Curve {
        label: label.to_string(),
        points,
        mid_band,
        low_3db_hz,
    }
}

/// The stage's netlist at one device law with the given capacitors.
pub fn netlist(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    law: crate::device::SquareLaw,
    caps: Caps,
) -> Netlist {
    let input = NetlistInput {
        law,
        kind: p.kind,
        rails: p.rails,
        rl_ohm: p.spec.rl_ohm,
        rsig_ohm: p.spec.source_resistance_ohm,
        caps,
    };
    t.netlist(values, &input)
}

fn sweep(net: &Netlist, f0: f64, f1: f64) -> Result<Vec<(f64, f64)>, SolveError> {
    let dc = verify::dc(net)?;
    Ok(verify::sweep(net, &dc, f0, f1, SWEEP_PPD)?
        .into_iter()
        .map(|(f, g)| (f, g.norm()))
        .collect())
}

/// The response of `values` (ohms, the topology's part order) with
/// capacitors `caps` sized for `f_low_hz` (`given` false when that is the
/// default corner), at the nominal device and at every corner.
pub fn response(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    caps: Caps,
    f_low_hz: f64,
    given: bool,
) -> Result<Response, SolveError> {
    let (f0, f1) = (f_low_hz / SWEEP_BELOW, f_low_hz * SWEEP_ABOVE);
    let at = |label: &str, law| -> Result<Curve, SolveError> {
        Ok(curve(
            label,
            sweep(&netlist(p, t, values, law, caps), f0, f1)?,
        ))
    };
    Ok(Response {
        nominal: at("nominal", p.nominal.law)?,
        corners: p
            .corners
            .iter()
            .map(|c| at(&c.label, c.law))
            .collect::<Result<_, _>>()?,
        f_low_hz,
        f_low_given: given,
    })
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
        let c = curve("x", pts);
        assert!((c.mid_band - 1.0).abs() < 1e-5);
        // 3 dB below the sweep's top (1.0 within 1e-5): the same point.
        assert!((c.low_3db_hz.unwrap() - want).abs() < 2e-3 * want);
    }

    // At SWEEP_PPD points a decade a one-pole curve drawn as a polyline in
    // dB against log f departs from the curve by under 0.01 dB between
    // samples (checked at every midpoint, in log f, over four decades).
    #[test]
    fn the_sweep_is_fine_enough_to_draw_without_kinks() {
        let h = |f: f64| db(1.0 / (1.0 + (20.0 / f).powi(2)).sqrt());
        let step = 1.0 / SWEEP_PPD as f64;
        let mut worst: f64 = 0.0;
        for i in 0..(4 * SWEEP_PPD) {
            let (a, b) = (i as f64 * step, (i + 1) as f64 * step);
            let (fa, fb, fm) = (10f64.powf(a), 10f64.powf(b), 10f64.powf(0.5 * (a + b)));
            let chord = 0.5 * (h(fa) + h(fb));
            worst = worst.max((chord - h(fm)).abs());
        }
        assert!(worst < 0.01, "{worst} dB");
    }
}
