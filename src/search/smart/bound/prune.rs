//! Step 2 of the box bound: the requirements' prunes on the box's value
//! ranges. Each is a necessary condition: a box that breaks one holds no
//! feasible point.

use super::ranges::PerCase;
use super::Bounds;
use crate::analysis::SLACK;
use crate::spec::ValidSpec;

/// gate_bias: the box's lowest VGS (over every case) is above the rating.
pub(super) fn gate_over_rating(s: &ValidSpec, vgs: f64) -> bool {
    s.device
        .vgs_max_v
        .is_some_and(|m| vgs > m + SLACK * m.abs().max(1.0))
}

/// gate_bias: the box's highest VGS is below the negative rating.
pub(super) fn gate_under_rating(s: &ValidSpec, vgs: f64) -> bool {
    s.device
        .vgs_min_v
        .is_some_and(|m| vgs < m - SLACK * m.abs().max(1.0))
}

/// id_max: the box's least current at some case is above the limit.
pub(super) fn current_over_limit(s: &ValidSpec, id: f64) -> bool {
    s.limits.id_max_a.is_some_and(|m| id > m * (1.0 + SLACK))
}

/// saturation: the box's most current at some case is none (cut off).
pub(super) fn off(id: f64) -> bool {
    id <= 0.0
}

/// What the headroom and power prunes leave: the largest drain resistor
/// the headroom allows, the headroom bound, the power floor.
#[derive(Debug, Clone, Copy)]
pub(super) struct Room {
    /// Largest RD (ohms) with which every point keeps its headroom.
    pub(super) rd_cap: f64,
    /// Upper bound of the worst-case VDS, volts.
    pub(super) headroom_ub: f64,
    /// Lower bound of the worst-case supply power, watts.
    pub(super) power_lb: f64,
}

impl Bounds<'_> {
    /// vds_min and saturation (VDS = VDD − VS − RD·ID must reach
    /// max(vds_min, vov) at every case), then power_max; `None` when the
    /// box breaks one.
    pub(super) fn room(&self, w: &[PerCase]) -> Option<Room> {
        let s = &self.p.spec;
        let span = s.supply.vdd_v - s.supply.vss_v;
        let vds_floor = s.vds_min_v;
        let cases = &self.cases;
        let n = cases.len();
        // Headroom: VDS = VDD − VS − RD·ID must reach max(vds_min, vov).
        let mut rd_cap = f64::INFINITY;
        for i in 0..n {
            let room = cases[i].rails.vdd_v - w[i].vs_lo - vds_floor.max(w[i].vov_lo);
            if room < -SLACK * span {
                return None;
            }
            if w[i].id_lo > 0.0 {
                rd_cap = rd_cap.min(room.max(0.0) / w[i].id_lo);
            }
            // At both tolerance extremes P and P' VDS must still reach
            // vds_min.
            for j in 0..2 {
                let room = cases[i].rails.vdd_v - w[i].vs_at[j] - vds_floor + SLACK * span;
                if room < 0.0 {
                    return None;
                }
                if w[i].id_at[j] > 0.0 {
                    rd_cap = rd_cap.min(room / ((1.0 + self.tol) * w[i].id_at[j]));
                }
            }
        }
        if self.rd.is_some() && rd_cap < self.r_min * (1.0 - 1e-9) {
            return None;
        }
        let rd_floor = if self.rd.is_some() { self.r_min } else { 0.0 };
        let mut headroom_ub = f64::INFINITY;
        // The worst-case power is at least the power of any one corner, so
        // the largest of the per-corner current floors bounds it.
        let mut power_lb: f64 = 0.0;
        for i in 0..n {
            headroom_ub =
                headroom_ub.min(cases[i].rails.vdd_v - w[i].vs_lo - rd_floor * w[i].id_lo);
            // The current-raising tolerance extreme is a point of every
            // candidate's envelope.
            power_lb = power_lb.max(w[i].id_up * cases[i].power_span);
        }
        if s.limits
            .power_max_w
            .is_some_and(|m| power_lb > m * (1.0 + SLACK))
        {
            return None;
        }
        Some(Room {
            rd_cap,
            headroom_ub,
            power_lb,
        })
    }
}
