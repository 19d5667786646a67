//! Independent verification of a design: the closed forms (`analysis`,
//! `topology`) against the nodal solver (`verify`) at every device corner,
//! nominal resistor values and nominal rails, mid-band.
//!
//! Compared at each corner: ID, VGS, VDS (the first FET of the netlist),
//! the gain from the source EMF (signed, V/V), Zin and Zout. Two values
//! agree when `|solver − closed| / max(|closed|, floor) <= REL_TOL`; the
//! absolute floor (see [`Quantity::floor`]) keeps a quantity that is
//! about 0 (a cut-off device's ID and gain) from turning rounding noise into
//! a huge relative figure. The solver's complex mid-band results are
//! compared whole, so a non-zero imaginary part is a disagreement too.
//!
//! A solver failure (no convergence, a singular matrix) is a disagreement:
//! a design the independent check cannot confirm is never shown.
//!
//! This module prints nothing.

use crate::analysis::{quick, Problem};
use crate::device::Corner;
use crate::search::Outcome;
use crate::topology::Topology;
use crate::verify::{self, Freq, SolveError};
use num_complex::Complex64;
use serde::Serialize;
use thiserror::Error;

/// Largest relative disagreement accepted between the closed form and the
/// solver (DESIGN: closed forms and solver agree to 1e-6).
pub const REL_TOL: f64 = 1e-6;

/// A compared quantity.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Quantity {
    /// Drain current, amps, positive into the drain.
    Id,
    /// Gate–source voltage, volts.
    Vgs,
    /// Drain–source voltage, volts.
    Vds,
    /// Mid-band gain from the signal source's EMF with the load, V/V, signed.
    Gain,
    /// Input impedance, ohms.
    Zin,
    /// Output impedance, ohms.
    Zout,
}

impl Quantity {
    /// Every quantity, in report order.
    pub const ALL: [Quantity; 6] = [
        Quantity::Id,
        Quantity::Vgs,
        Quantity::Vds,
        Quantity::Gain,
        Quantity::Zin,
        Quantity::Zout,
    ];

    /// Name for people (`ID`, `VGS`, `VDS`, `gain`, `Zin`, `Zout`).
    pub fn name(self) -> &'static str {
        match self {
            Quantity::Id => "ID",
            Quantity::Vgs => "VGS",
            Quantity::Vds => "VDS",
            Quantity::Gain => "gain",
            Quantity::Zin => "Zin",
            Quantity::Zout => "Zout",
        }
    }

    /// SI unit symbol (empty for the gain, V/V).
    pub fn unit(self) -> &'static str {
        match self {
            Quantity::Id => "A",
            Quantity::Vgs | Quantity::Vds => "V",
            Quantity::Gain => "",
            Quantity::Zin | Quantity::Zout => "Ω",
        }
    }

    /// Absolute floor of the relative measure, in the quantity's unit: 1 pA
    /// for ID, 1 µV for VGS and VDS, 1e-6 V/V for the gain, 1 µΩ for the
    /// impedances. So below the floor the test is absolute: 1e-18 A,
    /// 1e-12 V, 1e-12 V/V, 1e-12 Ω (common practice: far below anything a
    /// bench resolves). The voltage and gain floors sit well above f64
    /// rounding of rail-sized terms: VDS = (VDD − VSS) − (RD + RS)·ID loses
    /// every digit but the last few when VDS is nanovolts (RD = 1 TΩ, deep
    /// triode), where the closed form and the solver then differ by ~1e-14
    /// V, which is rounding, not disagreement.
    pub fn floor(self) -> f64 {
        match self {
            Quantity::Id => 1e-12,
            Quantity::Vgs | Quantity::Vds | Quantity::Gain => 1e-6,
            Quantity::Zin | Quantity::Zout => 1e-6,
        }
    }

    fn index(self) -> usize {
        match self {
            Quantity::Id => 0,
            Quantity::Vgs => 1,
            Quantity::Vds => 2,
            Quantity::Gain => 3,
            Quantity::Zin => 4,
            Quantity::Zout => 5,
        }
    }
}

/// Relative disagreement of a solver value from a closed-form value (see
/// the [module documentation](self)); infinite when exactly one is not
/// finite or either is NaN, 0 when both are the same infinity.
pub fn relative(q: Quantity, closed: f64, solver: Complex64) -> f64 {
    if !closed.is_finite() || !solver.re.is_finite() || !solver.im.is_finite() {
        return if closed == solver.re && solver.im == 0.0 {
            0.0
        } else {
            f64::INFINITY
        };
    }
    (solver - closed).norm() / closed.abs().max(q.floor())
}

/// One quantity at one corner.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Comparison {
    /// What is compared.
    pub quantity: Quantity,
    /// Closed-form value, in the quantity's SI unit.
    pub closed_form: f64,
    /// Solver value (real part), in the quantity's SI unit.
    pub solver: f64,
    /// Imaginary part of the solver value (0 at mid-band), same unit.
    pub solver_im: f64,
    /// Relative disagreement (see [`relative`]).
    pub relative: f64,
    /// True when `relative <= REL_TOL`.
    pub agrees: bool,
}

/// Every comparison at one device corner.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CornerCheck {
    /// Corner label (`idss=min vgs_off=max` …).
    pub corner: String,
    /// The six comparisons in [`Quantity::ALL`] order; empty when the solver
    /// failed.
    pub rows: Vec<Comparison>,
    /// The solver's error message when it gave no answer.
    pub solver_error: Option<String>,
}

impl CornerCheck {
    /// True when the solver answered and every quantity agrees.
    pub fn agrees(&self) -> bool {
        self.solver_error.is_none() && self.rows.iter().all(|r| r.agrees)
    }
}

/// The largest relative disagreement of one quantity over the corners.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Largest {
    /// The quantity.
    pub quantity: Quantity,
    /// Largest relative disagreement (dimensionless).
    pub relative: f64,
    /// The corner where it occurs.
    pub corner: String,
}

/// A design the solver confirms at every corner.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CrossCheck {
    /// Per corner, in `Problem::corners` order.
    pub corners: Vec<CornerCheck>,
    /// Largest relative disagreement per quantity, in [`Quantity::ALL`] order.
    pub largest: Vec<Largest>,
}

/// Why the solver does not confirm a design.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum Disagreement {
    /// A quantity differs by more than [`REL_TOL`].
    #[error(
        "{} at corner `{corner}`: closed form {closed_form:e} {unit}, solver {solver:e} {unit} \
         (relative {relative:.2e} > {REL_TOL:e})",
        quantity.name(),
        unit = quantity.unit()
    )]
    Value {
        /// The quantity.
        quantity: Quantity,
        /// Corner label.
        corner: String,
        /// Closed-form value, SI unit of the quantity.
        closed_form: f64,
        /// Solver value (real part), SI unit of the quantity.
        solver: f64,
        /// Relative disagreement.
        relative: f64,
    },
    /// The solver gave no answer at a corner.
    #[error("corner `{corner}`: the solver failed: {error}")]
    Solver {
        /// Corner label.
        corner: String,
        /// What went wrong.
        error: SolveError,
    },
    /// The netlist has no FET to read the operating point from.
    #[error("corner `{corner}`: the netlist has no FET")]
    NoFet {
        /// Corner label.
        corner: String,
    },
}

/// Closed form against solver at one corner.
fn at_corner(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
    corner: &Corner,
) -> Result<Vec<Comparison>, Disagreement> {
    let label = || corner.label.clone();
    let closed = quick(p, t, values, &corner.law, &p.rails);
    let net = t.netlist(values, &p.netlist_input(corner));
    // Newton starts from the closed form's current (the nodal solve must
    // still meet KCL at every node on its own; the start saves iterations).
    let opts = verify::DcOptions {
        fet_currents_a: Some(vec![closed.eval.op.id_a]),
        ..verify::DcOptions::default()
    };
    let solved = verify::dc_with(&net, &opts)
        .and_then(|dc| verify::small_signal(&net, &dc, Freq::MidBand).map(|m| (dc, m)));
    let (dc, m) = solved.map_err(|error| Disagreement::Solver {
        corner: label(),
        error,
    })?;
    let fet = dc
        .fets
        .first()
        .ok_or_else(|| Disagreement::NoFet { corner: label() })?;
    let op = &closed.eval.op;
    let real = |x: f64| Complex64::new(x, 0.0);
    let pairs = [
        (Quantity::Id, op.id_a, real(fet.id_a)),
        (Quantity::Vgs, op.vgs_v, real(fet.vgs_v)),
        (Quantity::Vds, op.vds_v, real(fet.vds_v)),
        (Quantity::Gain, closed.gain, m.gain),
        (Quantity::Zin, closed.eval.ss.zin_ohm, m.zin_ohm),
        (Quantity::Zout, closed.eval.ss.zout_ohm, m.zout_ohm),
    ];
    Ok(pairs
        .into_iter()
        .map(|(quantity, closed_form, s)| {
            let relative = relative(quantity, closed_form, s);
            Comparison {
                quantity,
                closed_form,
                solver: s.re,
                solver_im: s.im,
                relative,
                agrees: relative <= REL_TOL,
            }
        })
        .collect())
}

/// Every comparison at every corner of `p.corners`, whatever the outcome
/// (for showing); [`crosscheck`] turns this into a verdict.
pub fn compare(p: &Problem, t: &dyn Topology, values: &[f64]) -> Vec<CornerCheck> {
    p.corners
        .iter()
        .map(|c| match at_corner(p, t, values, c) {
            Ok(rows) => CornerCheck {
                corner: c.label.clone(),
                rows,
                solver_error: None,
            },
            Err(e) => CornerCheck {
                corner: c.label.clone(),
                rows: Vec::new(),
                solver_error: Some(e.to_string()),
            },
        })
        .collect()
}

/// Largest relative disagreement per quantity over the corners.
pub fn largest(corners: &[CornerCheck]) -> Vec<Largest> {
    let mut out: Vec<Largest> = Quantity::ALL
        .iter()
        .map(|&quantity| Largest {
            quantity,
            relative: 0.0,
            corner: String::new(),
        })
        .collect();
    for c in corners {
        for r in &c.rows {
            if let Some(l) = out.get_mut(r.quantity.index()) {
                // A NaN counts as the largest.
                if l.corner.is_empty() || r.relative.is_nan() || r.relative > l.relative {
                    l.relative = r.relative;
                    l.corner = c.corner.clone();
                }
            }
        }
    }
    out
}

/// Check a design (values in the topology's part order, ohms) at every
/// device corner of `p`, nominal resistor values and rails: the first
/// disagreement (corner order, then [`Quantity::ALL`] order) or the
/// solver's first failure is the error.
pub fn crosscheck(
    p: &Problem,
    t: &dyn Topology,
    values: &[f64],
) -> Result<CrossCheck, Disagreement> {
    let mut corners = Vec::with_capacity(p.corners.len());
    for c in &p.corners {
        let rows = at_corner(p, t, values, c)?;
        if let Some(r) = rows.iter().find(|r| !r.agrees) {
            return Err(Disagreement::Value {
                quantity: r.quantity,
                corner: c.label.clone(),
                closed_form: r.closed_form,
                solver: r.solver,
                relative: r.relative,
            });
        }
        corners.push(CornerCheck {
            corner: c.label.clone(),
            rows,
            solver_error: None,
        });
    }
    let largest = largest(&corners);
    Ok(CrossCheck { corners, largest })
}

/// The whole comparison of one design, for showing (`gatewright verify`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Verification {
    /// Topology id.
    pub topology: String,
    /// Designator → ohms (0 = a wire).
    pub values: std::collections::BTreeMap<String, f64>,
    /// The relative tolerance applied ([`REL_TOL`]).
    pub tolerance: f64,
    /// True when the solver answered at every corner and every quantity
    /// agrees.
    pub agrees: bool,
    /// Per corner, in `Problem::corners` order.
    pub corners: Vec<CornerCheck>,
    /// Largest relative disagreement per quantity, in [`Quantity::ALL`] order.
    pub largest: Vec<Largest>,
}

/// Compare a design at every corner and gather the view (never fails; a
/// solver failure shows in [`CornerCheck::solver_error`]).
pub fn verification(p: &Problem, t: &dyn Topology, values: &[f64]) -> Verification {
    let corners = compare(p, t, values);
    Verification {
        topology: t.id().to_string(),
        values: crate::bench::summary::value_map(t, values),
        tolerance: REL_TOL,
        agrees: corners.iter().all(CornerCheck::agrees),
        largest: largest(&corners),
        corners,
    }
}

/// `RD=6.8k RS=1k …` in the topology's part order, for messages.
fn values_text(t: &dyn Topology, values: &[f64]) -> String {
    t.parts()
        .iter()
        .zip(values)
        .map(|(p, v)| format!("{p}={}", crate::units::format_value(*v)))
        .collect::<Vec<_>>()
        .join(" ")
}

/// Re-check every design of `outcome` with [`crosscheck`] against `p`
/// (normally the full-spread problem), drop those the solver does not
/// confirm, and return one warning per dropped design (without a
/// `warning:` prefix), naming its former rank, topology, values and the
/// disagreement. The remaining designs keep their order, so their ranks
/// (positions) close up.
pub fn retain_verified(p: &Problem, outcome: &mut Outcome) -> Vec<String> {
    let mut warnings = Vec::new();
    let mut rank = 0;
    outcome.designs.retain(|d| {
        rank += 1;
        match crosscheck(p, d.topology, &d.values) {
            Ok(_) => true,
            Err(e) => {
                let what = match &e {
                    Disagreement::Value { .. } => format!("the nodal solver disagrees on {e}"),
                    _ => format!("the nodal solver cannot confirm it: {e}"),
                };
                warnings.push(format!(
                    "dropped design {rank} ({} {}): {what}",
                    d.topology.id(),
                    values_text(d.topology, &d.values)
                ));
                false
            }
        }
    });
    warnings
}

#[cfg(test)]
mod tests;
