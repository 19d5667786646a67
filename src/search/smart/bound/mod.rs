//! The box bound, in steps: (1) the box's value ranges at its extreme
//! points (`ranges`: every case's current, gm, VGS, VS and, with λ > 0,
//! gds and the fold grid; Zin and its slices), (2) each requirement's
//! prune on those ranges (`prune`: the gate rating, the current and power
//! limits, the headroom with the largest drain resistor it leaves, Zin
//! and Zout where the gain pieces give them), (3) the gain and the
//! drain-resistor scan (`scan`): the score bound the box waits in the
//! queue with, or `None` when no point of the box can be feasible.

mod prune;
mod ranges;
mod scan;

use crate::analysis::Problem;
use crate::device::SquareLaw;
use crate::rank::Scorer;
use crate::search::smart::axis::Axis;
use crate::search::smart::blocks::Bound;
use crate::topology::{Rails, Role, Topology};
use ranges::PerCase;
use scan::Envelope;

use crate::search::smart::blocks::FOLDS;

/// One device corner at one supply extreme: every bound is taken over
/// these, each of which the full check evaluates.
pub(super) struct Case {
    pub(super) law: SquareLaw,
    pub(super) rails: Rails,
    /// Drain rail minus source rail of the bias network, volts (the
    /// supply power is the drain current times it).
    pub(super) power_span: f64,
}

impl Case {
    /// Supply span, volts.
    pub(super) fn span(&self) -> f64 {
        self.rails.vdd_v - self.rails.vss_v
    }
}

pub(super) struct Bounds<'a> {
    /// Device corners × supply extremes.
    pub(super) cases: Vec<Case>,
    /// The shelf, ohms ascending (the drain resistor's choices).
    pub(super) rd_values: &'a [f64],
    /// The score's constants (the box bound is a score bound).
    pub(super) scorer: Scorer,
    pub(super) parts_floor: usize,
    /// Role of each position.
    pub(super) roles: &'static [Role],
    /// Smallest resistor tolerance on the shelf (the safe shift for bounds).
    pub(super) tol: f64,
    /// Largest resistor tolerance on the shelf.
    pub(super) tol_max: f64,
    pub(super) p: &'a Problem,
    pub(super) t: &'static dyn Topology,
    pub(super) rd: Option<usize>,
    pub(super) r_min: f64,
    pub(super) r_max: f64,
    pub(super) lambda_free: bool,
    /// The source axes whose resistors enter the gain (not bypassed).
    pub(super) src_axes: Vec<usize>,
    /// λ > 0: the points of the fold grid, at most [`FOLDS`].
    pub(super) folds: usize,
}

/// Scratch space of [`Bounds::bound`], one per thread that bounds boxes
/// (reused by every bound: a bound allocates nothing).
#[derive(Default)]
pub(super) struct Scratch {
    /// Per case, the figures of [`PerCase`].
    work: Vec<PerCase>,
    /// λ > 0 scan: per case, the envelopes of [`Envelope`].
    envelopes: Vec<Envelope>,
    /// λ > 0 scan: per case and fold, the gds ceiling of the strong side
    /// and floor of the weak side, siemens.
    fold_gds: Vec<[(f64, f64); FOLDS]>,
    /// The values of every position, ohms (the box's own are set by the
    /// bound).
    pub(super) v: Vec<f64>,
    /// The headroom lines of the drain-resistor scan: (VDS at RD = 0,
    /// volts; its fall per ohm of RD(1 + t), amps).
    pub(super) lines: Vec<(f64, f64)>,
}

impl Bounds<'_> {
    /// [`Bounds::bound`] with `v` (ohms, every position) copied into the
    /// scratch space first.
    pub(super) fn bound_with(
        &self,
        scratch: &mut Scratch,
        v: &[f64],
        axes: &[Axis],
        ranges: &[(usize, usize)],
    ) -> Option<Bound> {
        scratch.v.clear();
        scratch.v.extend_from_slice(v);
        self.bound(scratch, axes, ranges)
    }

    /// Optimistic metrics for every point of the box (each at least as good
    /// as any feasible point in it can reach), or `None` when no point of the
    /// box can be feasible. The values outside the box are those of
    /// `scratch.v` (ohms, every position).
    pub(super) fn bound(
        &self,
        scratch: &mut Scratch,
        axes: &[Axis],
        ranges: &[(usize, usize)],
    ) -> Option<Bound> {
        let Scratch {
            work,
            envelopes,
            fold_gds,
            v,
            lines,
        } = scratch;
        let v = &mut v[..];
        // 1. The box's value ranges at its extreme points (a point whose
        //    figures already break a requirement ends the bound there).
        let w = self.case_ranges(work, v, axes, ranges)?;
        // 2. The prunes on those ranges: the headroom and the largest drain
        //    resistor it leaves, the power.
        let room = self.room(w)?;
        let zin = self.zin_ranges(v, axes, ranges);
        // 3. The gain and the drain-resistor scan.
        self.gain_scan(
            scan::Space {
                w,
                envelopes,
                fold_gds,
                lines,
                v,
            },
            axes,
            ranges,
            &room,
            &zin,
        )
    }

    /// With λ > 0 there is no proportionality, but the drain resistor is
    /// still scanned, with gm and gds at their extremes.
    fn lambda_scan(&self) -> bool {
        let s = &self.p.spec;
        !self.lambda_free
            && self.rd.is_some()
            && (s.source_resistance_ohm == 0.0 || !self.t.input_at_source())
    }
}
