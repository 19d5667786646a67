//! Coupling and bypass capacitor sizing for a low-frequency corner, then a
//! confirmation by the independent nodal solver at every device corner.
//!
//! # The rule (REFERENCE §5)
//!
//! - The bypass capacitor (source bypass `C_S`, or gate bypass `C_G`) sees a
//!   small resistance, so it is the costly one: its pole is the dominant,
//!   highest one, placed at `f_low / M`. The source bypass sees
//!   `Req = RS ∥ (ro + Rp)/(1 + gm·ro)` (≈ `RS ∥ 1/gm`), `Rp = RD ∥ RL`,
//!   taken at the point with the largest gm (smallest `Req`). For a split
//!   source resistor the bypassed `RS2` sees `RS2 ∥ (RS1 + that)`. The gate
//!   bypass sees the divider, `R1 ∥ R2` (with `RG + Rsig` in parallel when a
//!   gate resistor leads from the bypassed node to the input).
//! - Each coupling pole is a decade below, at `f_low / 10`, with its
//!   worst-case (smallest) resistance: input `Rsig + Zin_min`, output
//!   `Zout_min + RL`.
//! - Without a bypass, the coupling capacitor with the smaller resistance
//!   (the costlier one) takes the dominant role at `f_low / M` and the other
//!   sits a decade below.
//! - The margin factor `M = 1 / (1 − n/10)`, where `n` is the number of
//!   poles a decade below (so 1.25 with two, 1.11 with one), makes the
//!   short-circuit time-constant estimate `f_L ≈ Σ f_pole` (REFERENCE §5)
//!   come out exactly at `f_low`. That sum over-estimates the true corner
//!   for real poles, and the bypass zero lowers it further, so the rule
//!   errs on the safe side (common practice: place corners below the band
//!   edge).
//! - Values are snapped UP: 1 µF and above are aluminium electrolytics in
//!   E6 values (±20 %), below 1 µF film capacitors in E12 values (±10 %)
//!   (common practice; tolerances from memory).
//!
//! # The confirmation
//!
//! At every device corner the stage's netlist with the sized capacitors,
//! each at the low end of its tolerance, is solved (DC, then an AC sweep)
//! and its −3 dB corner found with `verify::corner_low`. If any corner lies
//! above `f_low`, every capacitor moves up to its next series value and the
//! check runs again.
//!
//! This module computes; it prints nothing.

use crate::analysis::{quick, tolerance_extremes, Problem};
use crate::catalog::ESeries;
use crate::topology::{CapRole, Caps, NetlistInput, Topology};
use crate::units::round_sig;
use crate::verify::{self, LowCorner, SolveError};
use serde::Serialize;
use std::f64::consts::PI;

/// The corner capacitors are sized for when the specification gives no
/// `[band] f_low`, hertz: the low edge of the audio band, 20 Hz (common
/// practice). Every output that uses it says so.
pub const DEFAULT_F_LOW_HZ: f64 = 20.0;

/// How far below `f_low` each non-dominant (coupling) pole sits,
/// dimensionless: a decade (REFERENCE §5, "a decade below" in simple
/// practice).
pub const COUPLING_DECADE: f64 = 10.0;

/// Capacitance from which an electrolytic is chosen, farads (common
/// practice: film capacitors above 1 µF are bulky).
pub const ELECTROLYTIC_FROM_F: f64 = 1e-6;

/// Tolerance of an aluminium electrolytic, relative (from memory: the usual
/// ±20 % grade).
pub const ELECTROLYTIC_TOLERANCE: f64 = 0.2;

/// Tolerance of a film capacitor, relative (from memory: the usual ±10 %
/// grade).
pub const FILM_TOLERANCE: f64 = 0.1;

/// Most scale-up rounds before giving up.
pub const MAX_ROUNDS: usize = 12;

/// Points per decade of the confirming sweep.
const SWEEP_PPD: usize = 20;

/// The confirming sweep runs from `f_low / SWEEP_SPAN` to
/// `f_low · SWEEP_SPAN`, hertz.
const SWEEP_SPAN: f64 = 1e3;

/// Relative slack on the pass test (as `analysis::SLACK`).
const SLACK: f64 = 1e-9;

/// Why capacitors could not be sized.
#[derive(Debug, thiserror::Error)]
pub enum CapsError {
    /// The corner frequency is not usable.
    #[error("`band.f_low` = {value} Hz: must be finite and > 0")]
    InvalidFrequency {
        /// The value given, hertz.
        value: f64,
    },
    /// A resistance the rule needs is not finite and positive.
    #[error("{designator}: the resistance it sees is {value} Ω; must be finite and > 0")]
    BadResistance {
        /// Capacitor designator.
        designator: String,
        /// The resistance, ohms.
        value: f64,
    },
    /// The nodal solver failed at a corner.
    #[error("confirming the corner at device corner `{corner}`: {source}")]
    Solve {
        /// Device corner label.
        corner: String,
        /// The solver's error.
        source: SolveError,
    },
    /// Scaling up did not bring every corner to `f_low`.
    #[error(
        "`band.f_low` = {f_low_hz} Hz: after {rounds} scale-ups the −3 dB corner at device \
         corner `{corner}` is still {found_hz} Hz"
    )]
    NotMet {
        /// Target, hertz.
        f_low_hz: f64,
        /// Rounds tried.
        rounds: usize,
        /// Worst corner label.
        corner: String,
        /// Its −3 dB frequency, hertz.
        found_hz: f64,
    },
}

/// One sized capacitor.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SizedCap {
    /// Designator, e.g. `C_IN`.
    pub designator: String,
    /// What it does.
    pub role: CapRole,
    /// Value to fit, farads (a series value).
    pub farads: f64,
    /// Unrounded value the rule asked for, farads.
    pub exact_f: f64,
    /// Resistance the rule used, ohms (the worst case).
    pub r_ohm: f64,
    /// Pole frequency the rule placed it at, hertz.
    pub pole_hz: f64,
    /// `E6` or `E12`.
    pub series: &'static str,
    /// `electrolytic` or `film`.
    pub dielectric: &'static str,
    /// Relative tolerance assumed for the check.
    pub tolerance: f64,
}

/// The −3 dB corner the nodal solver finds at one device corner.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CornerSweep {
    /// Device corner label.
    pub label: String,
    /// −3 dB frequency with the nominal capacitor values, hertz; `None`
    /// when below the sweep's start (`f_low / 1000`).
    pub nominal_caps_hz: Option<f64>,
    /// −3 dB frequency with every capacitor at the low end of its
    /// tolerance, hertz (the pass test); `None` as above.
    pub low_caps_hz: Option<f64>,
    /// True when `low_caps_hz` is at or below `f_low`.
    pub pass: bool,
}

/// The sized capacitors, the rule, and the confirmation.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CapPlan {
    /// Target low-frequency corner, hertz.
    pub f_low_hz: f64,
    /// The margin factor M of the dominant pole, dimensionless.
    pub margin: f64,
    /// Capacitors in the topology's order.
    pub caps: Vec<SizedCap>,
    /// How many scale-up rounds the confirmation needed (0 = none).
    pub rounds: usize,
    /// The −3 dB corner per device corner.
    pub corners: Vec<CornerSweep>,
    /// The rule in words, with its numbers.
    pub rule: String,
}

impl SizedCap {
    /// What it does, in words: `input coupling`, `source bypass`.
    pub fn role_words(&self) -> &'static str {
        role_words(self.role)
    }
}

impl CapPlan {
    /// The values as a [`Caps`] for a netlist, farads (absent roles keep the
    /// mid-band placeholder, which the topology does not use).
    pub fn values(&self) -> Caps {
        caps_at(&self.caps, 0.0)
    }

    /// `(designator, farads)` pairs for the BOM and the schematic.
    pub fn pairs(&self) -> Vec<(String, f64)> {
        self.caps
            .iter()
            .map(|c| (c.designator.clone(), c.farads))
            .collect()
    }
}

/// What a capacitor does, in words: `input coupling`, `source bypass`.
pub fn role_words(r: CapRole) -> &'static str {
    match r {
        CapRole::InputCoupling => "input coupling",
        CapRole::OutputCoupling => "output coupling",
        CapRole::SourceBypass => "source bypass",
        CapRole::GateBypass => "gate bypass",
    }
}

/// `C = 1 / (2π·f·R)`, farads, for a pole at `f_hz` hertz seen through
/// `r_ohm` ohms (REFERENCE §5).
pub fn capacitance_for(f_hz: f64, r_ohm: f64) -> f64 {
    1.0 / (2.0 * PI * f_hz * r_ohm)
}

/// Resistance looking into the source of a FET, ohms:
/// `(ro + Rp)/(1 + gm·ro)` written with `gds = 1/ro` as
/// `(1 + Rp·gds)/(gm + gds)`, which is `1/gm` for `gds = 0` (REFERENCE §5).
/// `gm_s`, `gds_s` in siemens, `rp_ohm` the drain's AC load in ohms.
pub fn source_resistance_ohm(gm_s: f64, gds_s: f64, rp_ohm: f64) -> f64 {
    (1.0 + rp_ohm * gds_s) / (gm_s + gds_s)
}

/// The smallest series value at or above `c_f` farads (relative slack
/// 1e-9), in `series`.
pub fn snap_up(c_f: f64, series: ESeries) -> f64 {
    let k = c_f.log10().floor() as i32;
    for exp in [k - 1, k, k + 1] {
        let scale = 10f64.powi(exp);
        if let Some(m) = series
            .decade()
            .iter()
            .find(|&&m| m * scale >= c_f * (1.0 - SLACK))
        {
            // Series mantissas have at most three figures: rounding to them
            // removes the noise of `m · 10^k` (18.000000000000002n).
            return round_sig(m * scale, 3);
        }
    }
    10f64.powi(k + 1)
}

/// The next series value strictly above `c_f` farads.
pub fn next_up(c_f: f64, series: ESeries) -> f64 {
    snap_up(c_f * (1.0 + 1e-6), series)
}

/// Parallel combination, ohms (`f64::INFINITY` is an open).
fn par(rs: &[f64]) -> f64 {
    1.0 / rs.iter().map(|r| 1.0 / r).sum::<f64>()
}

/// E6 electrolytic from 1 µF, E12 film below: (series, its name,
/// dielectric, tolerance).
fn kind(c_f: f64) -> (ESeries, &'static str, &'static str, f64) {
    if c_f >= ELECTROLYTIC_FROM_F * (1.0 - SLACK) {
        (ESeries::E6, "E6", "electrolytic", ELECTROLYTIC_TOLERANCE)
    } else {
        (ESeries::E12, "E12", "film", FILM_TOLERANCE)
    }
}

/// Snap up in the series its size calls for (a value that crosses 1 µF on
/// the way up is snapped again in E6).
fn snap(c_f: f64) -> f64 {
    let (s, ..) = kind(c_f);
    let v = snap_up(c_f, s);
    let (s2, ..) = kind(v);
    if s2 == s {
        v
    } else {
        snap_up(v, s2)
    }
}

fn step_up(c_f: f64) -> f64 {
    let (s, ..) = kind(c_f);
    snap(next_up(c_f, s))
}

/// Every capacitor at `1 − k·tolerance` of its value (k = 0: nominal,
/// k = 1: the low end).
fn caps_at(caps: &[SizedCap], k: f64) -> Caps {
    let mut c = Caps::MID_BAND;
    for s in caps {
        let f = s.farads * (1.0 - k * s.tolerance);
        match s.role {
            CapRole::InputCoupling => c.c_in_f = f,
            CapRole::OutputCoupling => c.c_out_f = f,
            CapRole::SourceBypass | CapRole::GateBypass => c.c_bypass_f = f,
        }
    }
    c
}

/// Worst-case (smallest) resistance each capacitor sees, ohms, over every
/// device corner, resistor-tolerance extreme and supply extreme.
fn worst_resistances(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    tolerances: &[f64],
    roles: &[(&'static str, CapRole)],
) -> Vec<f64> {
    let rsig = p.spec.source_resistance_ohm;
    let rl = p.spec.rl_ohm;
    let at = |v: &[f64], name: &str| t.index_of(name).and_then(|i| v.get(i).copied());
    let mut out = vec![f64::INFINITY; roles.len()];
    for v in tolerance_extremes(values, tolerances) {
        for rails in p.rail_extremes() {
            for c in &p.corners {
                let q = quick(p, t, &v, &c.law, &rails);
                let (gm, gds) = (q.eval.gm_s, q.eval.gds_s);
                for (slot, (_, role)) in out.iter_mut().zip(roles) {
                    let r = match role {
                        CapRole::InputCoupling => rsig + q.eval.ss.zin_ohm,
                        CapRole::OutputCoupling => q.eval.ss.zout_ohm + rl,
                        CapRole::SourceBypass => {
                            let rd = at(&v, "RD").unwrap_or(f64::INFINITY);
                            let rp = par(&[rd, rl]);
                            let up = source_resistance_ohm(gm, gds, rp);
                            match (at(&v, "RS2"), at(&v, "RS1")) {
                                (Some(rs2), Some(rs1)) => par(&[rs2, rs1 + up]),
                                _ => par(&[at(&v, "RS").unwrap_or(f64::INFINITY), up]),
                            }
                        }
                        CapRole::GateBypass => {
                            let r1 = at(&v, "R1").unwrap_or(f64::INFINITY);
                            let r2 = at(&v, "R2").unwrap_or(f64::INFINITY);
                            match at(&v, "RG") {
                                Some(rg) => par(&[r1, r2, rg + rsig]),
                                None => par(&[r1, r2]),
                            }
                        }
                    };
                    *slot = slot.min(r);
                }
            }
        }
    }
    out
}

/// Size the capacitors of a design for `f_low_hz` and confirm the corner at
/// every device corner (see the [module documentation](self) for the rule).
/// `values` in ohms and `tolerances` (relative) in the topology's part
/// order.
pub fn size(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    tolerances: &[f64],
    f_low_hz: f64,
) -> Result<CapPlan, CapsError> {
    if !(f_low_hz.is_finite() && f_low_hz > 0.0) {
        return Err(CapsError::InvalidFrequency { value: f_low_hz });
    }
    let roles = t.capacitors(values);
    let rs = worst_resistances(p, t, values, tolerances, &roles);
    for ((name, _), &r) in roles.iter().zip(&rs) {
        if !(r.is_finite() && r > 0.0) {
            return Err(CapsError::BadResistance {
                designator: (*name).to_string(),
                value: r,
            });
        }
    }
    let bypass = roles
        .iter()
        .position(|(_, r)| matches!(r, CapRole::SourceBypass | CapRole::GateBypass));
    // Without a bypass, the coupling capacitor with the smaller resistance
    // (the larger capacitor) is dominant.
    let dominant = bypass.or_else(|| {
        rs.iter()
            .enumerate()
            .min_by(|a, b| a.1.total_cmp(b.1))
            .map(|(i, _)| i)
    });
    let others = roles.len().saturating_sub(1) as f64;
    let margin = 1.0 / (1.0 - others / COUPLING_DECADE);
    let mut caps: Vec<SizedCap> = roles
        .iter()
        .zip(&rs)
        .enumerate()
        .map(|(i, ((name, role), &r))| {
            let pole_hz = if Some(i) == dominant {
                f_low_hz / margin
            } else {
                f_low_hz / COUPLING_DECADE
            };
            let exact_f = capacitance_for(pole_hz, r);
            let farads = snap(exact_f);
            let (_, series, dielectric, tolerance) = kind(farads);
            SizedCap {
                designator: (*name).to_string(),
                role: *role,
                farads,
                exact_f,
                r_ohm: r,
                pole_hz,
                series,
                dielectric,
                tolerance,
            }
        })
        .collect();
    let mut rounds = 0;
    loop {
        let corners = confirm(p, t, values, &caps, f_low_hz)?;
        let worst = corners
            .iter()
            .filter(|c| !c.pass)
            .max_by(|a, b| {
                a.low_caps_hz
                    .unwrap_or(0.0)
                    .total_cmp(&b.low_caps_hz.unwrap_or(0.0))
            })
            .cloned();
        match worst {
            None => {
                let rule = rule_text(f_low_hz, margin, &caps, dominant, rounds);
                return Ok(CapPlan {
                    f_low_hz,
                    margin,
                    caps,
                    rounds,
                    corners,
                    rule,
                });
            }
            Some(w) if rounds >= MAX_ROUNDS => {
                return Err(CapsError::NotMet {
                    f_low_hz,
                    rounds,
                    corner: w.label,
                    found_hz: w.low_caps_hz.unwrap_or(0.0),
                })
            }
            Some(_) => {
                rounds += 1;
                for c in &mut caps {
                    c.farads = step_up(c.farads);
                    let (_, series, dielectric, tolerance) = kind(c.farads);
                    c.series = series;
                    c.dielectric = dielectric;
                    c.tolerance = tolerance;
                }
            }
        }
    }
}

/// The −3 dB corner at every device corner, nominal and low capacitors.
fn confirm(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    caps: &[SizedCap],
    f_low_hz: f64,
) -> Result<Vec<CornerSweep>, CapsError> {
    let (f0, f1) = (f_low_hz / SWEEP_SPAN, f_low_hz * SWEEP_SPAN);
    p.corners
        .iter()
        .map(|c| {
            let err = |source| CapsError::Solve {
                corner: c.label.clone(),
                source,
            };
            let corner_at = |caps: Caps| -> Result<Option<f64>, CapsError> {
                let input = NetlistInput {
                    law: c.law,
                    kind: p.kind,
                    rails: p.rails,
                    rl_ohm: p.spec.rl_ohm,
                    rsig_ohm: p.spec.source_resistance_ohm,
                    caps,
                };
                let net = t.netlist(values, &input);
                let dc = verify::dc(&net).map_err(err)?;
                Ok(
                    match verify::corner_low(&net, &dc, f0, f1, SWEEP_PPD).map_err(err)? {
                        LowCorner::BelowRange => None,
                        LowCorner::At(f) => Some(f),
                        LowCorner::AboveRange => Some(f1),
                    },
                )
            };
            let nominal_caps_hz = corner_at(caps_at(caps, 0.0))?;
            let low_caps_hz = corner_at(caps_at(caps, 1.0))?;
            Ok(CornerSweep {
                label: c.label.clone(),
                nominal_caps_hz,
                pass: low_caps_hz.is_none_or(|f| f <= f_low_hz * (1.0 + SLACK)),
                low_caps_hz,
            })
        })
        .collect()
}

fn rule_text(
    f_low_hz: f64,
    margin: f64,
    caps: &[SizedCap],
    dominant: Option<usize>,
    rounds: usize,
) -> String {
    use crate::units::with_unit;
    let dom = dominant
        .and_then(|i| caps.get(i))
        .map_or("none".to_string(), |c| c.designator.clone());
    let mut s = format!(
        "Target f_low = {}. Dominant pole {dom} at f_low/M = {} (M = {:.3} = 1/(1 - n/10), n = {} \
         poles a decade below, so the short-circuit time-constant sum of the poles equals \
         f_low); the others at f_low/10 = {}. Bypass resistance Req = RS || (ro + Rp)/(1 + gm*ro) \
         at the largest gm; coupling resistances Rsig + Zin_min and Zout_min + RL. Values snapped \
         up: >= 1 uF electrolytic E6 (±20 %), below film E12 (±10 %). Confirmed by the nodal \
         solver at every device corner with every capacitor at the low end of its tolerance.",
        with_unit(f_low_hz, "Hz"),
        with_unit(f_low_hz / margin, "Hz"),
        margin,
        caps.len().saturating_sub(1),
        with_unit(f_low_hz / COUPLING_DECADE, "Hz"),
    );
    if rounds > 0 {
        s.push_str(&format!(
            " The first values missed at some corner; every capacitor was moved up {rounds} \
             series step(s)."
        ));
    }
    s
}

#[cfg(test)]
mod tests;
