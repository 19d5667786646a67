//! Frequency sweeps of the gain from the signal source's EMF, and the
//! low-frequency −3 dB corner relative to mid-band.

use super::ac::Linear;
use super::measure::gain;
use super::{DcSolution, Freq, LowCorner, SolveError};
use crate::netlist::Netlist;
use num_complex::Complex64;

/// Most points per decade a sweep accepts.
const MAX_POINTS_PER_DECADE: usize = 1000;
/// Widest sweep, decades.
const MAX_DECADES: f64 = 24.0;

fn check_range(
    f_start_hz: f64,
    f_stop_hz: f64,
    points_per_decade: usize,
) -> Result<(), SolveError> {
    if !(f_start_hz.is_finite() && f_start_hz > 0.0) {
        return Err(SolveError::InvalidFrequency {
            field: "f_start_hz",
            value: f_start_hz,
            rule: "must be finite and > 0",
        });
    }
    if !(f_stop_hz.is_finite() && f_stop_hz > f_start_hz) {
        return Err(SolveError::InvalidFrequency {
            field: "f_stop_hz",
            value: f_stop_hz,
            rule: "must be finite and above f_start_hz",
        });
    }
    if (f_stop_hz / f_start_hz).log10() > MAX_DECADES {
        return Err(SolveError::InvalidFrequency {
            field: "f_stop_hz",
            value: f_stop_hz,
            rule: "must be at most 24 decades above f_start_hz",
        });
    }
    if points_per_decade == 0 || points_per_decade > MAX_POINTS_PER_DECADE {
        return Err(SolveError::InvalidFrequency {
            field: "points_per_decade",
            value: points_per_decade as f64,
            rule: "must be between 1 and 1000",
        });
    }
    Ok(())
}

/// Log-spaced frequencies from start to stop inclusive, hertz.
fn grid(f_start_hz: f64, f_stop_hz: f64, points_per_decade: usize) -> Vec<f64> {
    let decades = (f_stop_hz / f_start_hz).log10();
    let steps = ((decades * points_per_decade as f64).ceil() as usize).max(1);
    (0..=steps)
        .map(|i| {
            if i == steps {
                f_stop_hz
            } else {
                f_start_hz * 10f64.powf(decades * i as f64 / steps as f64)
            }
        })
        .collect()
}

/// Gain from the signal EMF to the output (load connected), V/V complex, at
/// log-spaced frequencies from `f_start_hz` to `f_stop_hz` inclusive with
/// `points_per_decade` steps per decade. Returns `(frequency Hz, gain)`.
pub fn sweep(
    net: &Netlist,
    dc: &DcSolution,
    f_start_hz: f64,
    f_stop_hz: f64,
    points_per_decade: usize,
) -> Result<Vec<(f64, Complex64)>, SolveError> {
    check_range(f_start_hz, f_stop_hz, points_per_decade)?;
    let lin = Linear::new(net, dc)?;
    grid(f_start_hz, f_stop_hz, points_per_decade)
        .into_iter()
        .map(|f| Ok((f, gain(net, &lin, Freq::Hz(f))?)))
        .collect()
}

/// The low −3 dB corner: the frequency, hertz, at which |gain| falls to the
/// mid-band |gain|/√2. The sweep is scanned from `f_stop_hz` downwards for
/// the first point below the target; the crossing is then bisected in
/// log-frequency between that point and the one above it to a relative
/// width of 1e-12.
pub fn corner_low(
    net: &Netlist,
    dc: &DcSolution,
    f_start_hz: f64,
    f_stop_hz: f64,
    points_per_decade: usize,
) -> Result<LowCorner, SolveError> {
    check_range(f_start_hz, f_stop_hz, points_per_decade)?;
    let lin = Linear::new(net, dc)?;
    let mid = gain(net, &lin, Freq::MidBand)?.norm();
    if mid == 0.0 || !mid.is_finite() {
        return Err(SolveError::NoMidBandGain);
    }
    let target = mid / std::f64::consts::SQRT_2;
    let freqs = grid(f_start_hz, f_stop_hz, points_per_decade);
    let mut above = None;
    for &f in freqs.iter().rev() {
        if gain(net, &lin, Freq::Hz(f))?.norm() < target {
            let Some(hi) = above else {
                return Ok(LowCorner::AboveRange);
            };
            let (mut lo, mut hi) = (f.ln(), f64::ln(hi));
            while hi - lo > 1e-12 {
                let m = 0.5 * (lo + hi);
                if gain(net, &lin, Freq::Hz(m.exp()))?.norm() < target {
                    lo = m;
                } else {
                    hi = m;
                }
            }
            return Ok(LowCorner::At((0.5 * (lo + hi)).exp()));
        }
        above = Some(f);
    }
    Ok(LowCorner::BelowRange)
}
