//! Ranking: the trade-off metrics of a feasible design, its score, the
//! Pareto filter and a total, deterministic order.
//!
//! Score (higher is better, 0 to 1) is a weighted mean of six terms, each
//! in [0, 1]:
//!
//! | term | formula | meaning |
//! |---|---|---|
//! | accuracy | 1 − gain_error / tolerance | worst-corner distance from the target gain |
//! | spread | 1 − (max − min)|gain| / (2·tolerance·gain) | how much of the window the spread uses |
//! | headroom | min(1, (VDS_min − vds_min) / (0.25·supply span)) | spare drain–source voltage |
//! | power | 1 / (1 + P / P_ref), P_ref = power_max or span·1 mA | supply power |
//! | zin | min(1, log10(Zin / zin_min)) | input-impedance margin, full credit at 10× |
//! | parts | clamp((9 − parts) / 5, 0, 1) | resistors plus capacitors |
//!
//! Default weights: accuracy 2, spread 2, headroom 1, power 1, zin 1,
//! parts 1. `--prefer` multiplies one group by 4: `accurate` (accuracy),
//! `robust` (spread and headroom), `low-power` (power), `few-parts` (parts).
//! The scale constants (25 % of the span, 1 mA, 10×) are common-practice
//! normalisations, chosen so that no single term dominates by default.

use crate::analysis::WorstCase;
use crate::spec::ValidSpec;
use serde::Serialize;
use std::cmp::Ordering;

/// What the user wants favoured.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Prefer {
    /// The default balance.
    #[default]
    Balanced,
    /// Small gain spread and ample headroom.
    Robust,
    /// Low supply power.
    LowPower,
    /// Few parts.
    FewParts,
    /// Gain closest to the target at the worst corner.
    Accurate,
}

/// Trade-off metrics of one feasible design (worst case).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Metrics {
    /// Largest relative distance of |gain| from the target, fraction.
    pub gain_error: f64,
    /// (max − min)|gain| / target, fraction.
    pub gain_spread: f64,
    /// Smallest VDS minus vds_min, volts.
    pub headroom_v: f64,
    /// Largest drain current, amps.
    pub id_max_a: f64,
    /// Largest supply power, watts.
    pub power_w: f64,
    /// Smallest Zin over zin_min, ratio.
    pub zin_ratio: f64,
    /// Resistors (nonzero) plus capacitors.
    pub parts: usize,
}

impl Metrics {
    /// Metrics from a worst case.
    pub fn new(spec: &ValidSpec, wc: &WorstCase, parts: usize) -> Metrics {
        let g = spec.target.gain;
        Metrics {
            gain_error: ((wc.gain_abs_min - g).abs().max((wc.gain_abs_max - g).abs())) / g,
            gain_spread: (wc.gain_abs_max - wc.gain_abs_min) / g,
            headroom_v: wc.vds_min_v - spec.vds_min_v,
            id_max_a: wc.id_max_a,
            power_w: wc.power_max_w,
            zin_ratio: wc.zin_min_ohm / spec.zin_min_ohm,
            parts,
        }
    }

    /// True when `self` is at least as good as `o` everywhere and better
    /// somewhere.
    pub fn dominates(&self, o: &Metrics) -> bool {
        let le = [
            self.gain_error <= o.gain_error,
            self.gain_spread <= o.gain_spread,
            self.headroom_v >= o.headroom_v,
            self.id_max_a <= o.id_max_a,
            self.power_w <= o.power_w,
            self.zin_ratio >= o.zin_ratio,
            self.parts <= o.parts,
        ];
        let lt = [
            self.gain_error < o.gain_error,
            self.gain_spread < o.gain_spread,
            self.headroom_v > o.headroom_v,
            self.id_max_a < o.id_max_a,
            self.power_w < o.power_w,
            self.zin_ratio > o.zin_ratio,
            self.parts < o.parts,
        ];
        le.iter().all(|&b| b) && lt.iter().any(|&b| b)
    }
}

/// The score of a design, 0 (worst) to 1 (best).
pub fn score(spec: &ValidSpec, m: &Metrics, prefer: Prefer) -> f64 {
    Scorer::new(spec, prefer).score(m)
}

/// The score's constants for one specification and preference, taken
/// once: the search scores millions of bounds with the same ones.
#[derive(Debug, Clone, Copy)]
pub struct Scorer {
    /// 1 / gain tolerance.
    inv_tol: f64,
    /// 1 / (25 % of the supply span), per volt.
    inv_room: f64,
    /// 1 / reference power, per watt.
    inv_p_ref: f64,
    /// Term weights over their sum.
    w: [f64; 6],
}

impl Scorer {
    /// The constants of `spec` with `prefer`'s weights.
    pub fn new(spec: &ValidSpec, prefer: Prefer) -> Scorer {
        let span = spec.supply.vdd_v - spec.supply.vss_v;
        let mut w = [2.0, 2.0, 1.0, 1.0, 1.0, 1.0];
        match prefer {
            Prefer::Balanced => {}
            Prefer::Accurate => w[0] *= 4.0,
            Prefer::Robust => {
                w[1] *= 4.0;
                w[2] *= 4.0;
            }
            Prefer::LowPower => w[3] *= 4.0,
            Prefer::FewParts => w[5] *= 4.0,
        }
        let total: f64 = w.iter().sum();
        Scorer {
            inv_tol: 1.0 / spec.target.tolerance,
            inv_room: 1.0 / (0.25 * span),
            inv_p_ref: 1.0 / spec.limits.power_max_w.unwrap_or(span * 1e-3),
            w: w.map(|x| x / total),
        }
    }

    /// The score of metrics `m`, 0 (worst) to 1 (best).
    pub fn score(&self, m: &Metrics) -> f64 {
        self.gain_and_room(m) + self.fixed(m)
    }

    /// The weighted accuracy, spread and headroom terms (the part of the
    /// score a drain resistor moves).
    pub fn gain_and_room(&self, m: &Metrics) -> f64 {
        let w = &self.w;
        w[0] * unit(1.0 - m.gain_error * self.inv_tol)
            + w[1] * unit(1.0 - 0.5 * m.gain_spread * self.inv_tol)
            + w[2] * unit(m.headroom_v * self.inv_room)
    }

    /// The weighted power, Zin and parts terms.
    pub fn fixed(&self, m: &Metrics) -> f64 {
        let w = &self.w;
        // (log10 is 1 at 10 and 0 at 1: the clamp needs no logarithm
        // outside.)
        let zin = if m.zin_ratio >= 10.0 {
            1.0
        } else if m.zin_ratio <= 1.0 {
            0.0
        } else {
            m.zin_ratio.log10()
        };
        w[3] * unit(1.0 / (1.0 + m.power_w * self.inv_p_ref))
            + w[4] * zin
            + w[5] * unit((9.0 - m.parts as f64) / 5.0)
    }
}

/// `x` clamped to [0, 1].
fn unit(x: f64) -> f64 {
    x.clamp(0.0, 1.0)
}

/// Total order: higher score first, then topology order, then values
/// (ascending, designator by designator).
pub fn order(a: (f64, usize, &[f64]), b: (f64, usize, &[f64])) -> Ordering {
    b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)).then_with(|| {
        for (x, y) in a.2.iter().zip(b.2) {
            let o = x.total_cmp(y);
            if o != Ordering::Equal {
                return o;
            }
        }
        a.2.len().cmp(&b.2.len())
    })
}

/// Indices of the Pareto-optimal entries.
pub fn pareto(ms: &[Metrics]) -> Vec<usize> {
    (0..ms.len())
        .filter(|&i| !ms.iter().any(|o| o.dominates(&ms[i])))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn m(err: f64, power: f64) -> Metrics {
        Metrics {
            gain_error: err,
            gain_spread: 0.1,
            headroom_v: 1.0,
            id_max_a: 1e-3,
            power_w: power,
            zin_ratio: 2.0,
            parts: 5,
        }
    }

    /// A stage of our own: gain 5 ± 30 %, VDD 24 V, no power limit (the
    /// reference power is then span × 1 mA = 24 mW).
    fn spec() -> ValidSpec {
        crate::spec::parse(
            "name = 'score check'\n\
             [target]\ngain = 5.0\ntolerance = 0.3\n\
             [supply]\nvdd = 24.0\n\
             [load]\nrl = '47k'\n\
             [input]\nzin_min = '100k'\n\
             [headroom]\nvds_min = 3.0\n\
             [device]\nfamily = 'n-jfet'\nidss = ['2m', '6m']\nvgs_off = ['-1', '-3']\n\
             [parts]\nseries = 'E24'\n",
        )
        .unwrap()
    }

    // The score table in the module comment, by hand: accuracy 1 − 0.15/0.3
    // = 0.5, spread 1 − 0.3/0.6 = 0.5, headroom 3/(0.25·24) = 0.5, power
    // 1/(1 + 12/24) = 2/3, zin log10(√10) = 0.5, parts (9 − 7)/5 = 0.4.
    #[test]
    fn score_is_the_weighted_mean_of_the_documented_terms() {
        let s = spec();
        let m = Metrics {
            gain_error: 0.15,
            gain_spread: 0.3,
            headroom_v: 3.0,
            id_max_a: 1e-3,
            power_w: 0.012,
            zin_ratio: 10f64.sqrt(),
            parts: 7,
        };
        let terms = [0.5, 0.5, 0.5, 2.0 / 3.0, 0.5, 0.4];
        let mean = |w: [f64; 6]| {
            terms.iter().zip(w).map(|(t, w)| t * w).sum::<f64>() / w.iter().sum::<f64>()
        };
        let cases = [
            (Prefer::Balanced, [2.0, 2.0, 1.0, 1.0, 1.0, 1.0]),
            (Prefer::Robust, [2.0, 8.0, 4.0, 1.0, 1.0, 1.0]),
            (Prefer::Accurate, [8.0, 2.0, 1.0, 1.0, 1.0, 1.0]),
            (Prefer::LowPower, [2.0, 2.0, 1.0, 4.0, 1.0, 1.0]),
            (Prefer::FewParts, [2.0, 2.0, 1.0, 1.0, 1.0, 4.0]),
        ];
        for (prefer, w) in cases {
            let got = score(&s, &m, prefer);
            assert!(
                (got - mean(w)).abs() < 1e-12,
                "{prefer:?}: {got} vs {}",
                mean(w)
            );
        }
        // Balanced by hand: (1 + 1 + 0.5 + 2/3 + 0.5 + 0.4)/8 = 0.508333…
        assert!((score(&s, &m, Prefer::Balanced) - 3.05 / 6.0).abs() < 1e-12);
        // Each term is clamped to [0, 1]: an error beyond the tolerance and
        // a headroom beyond a quarter of the span add nothing and all.
        let edge = Metrics {
            gain_error: 0.6,
            gain_spread: 0.0,
            headroom_v: 12.0,
            zin_ratio: 20.0,
            parts: 9,
            ..m
        };
        let want = (0.0 + 2.0 + 1.0 + 2.0 / 3.0 + 1.0 + 0.0) / 8.0;
        assert!((score(&s, &edge, Prefer::Balanced) - want).abs() < 1e-12);
        // The two parts the search scores apart add up to the score.
        let sc = Scorer::new(&s, Prefer::Robust);
        assert_eq!(sc.score(&m), sc.gain_and_room(&m) + sc.fixed(&m));
    }

    #[test]
    fn pareto_keeps_trade_offs_and_drops_dominated() {
        let ms = [m(0.05, 0.01), m(0.02, 0.02), m(0.06, 0.02)];
        assert_eq!(pareto(&ms), vec![0, 1]);
    }

    #[test]
    fn order_breaks_ties_by_topology_then_values() {
        let a = [1.0, 2.0];
        let b = [1.0, 3.0];
        assert_eq!(order((0.5, 1, &a), (0.5, 1, &b)), Ordering::Less);
        assert_eq!(order((0.5, 2, &a), (0.5, 1, &b)), Ordering::Greater);
        assert_eq!(order((0.6, 2, &b), (0.5, 1, &a)), Ordering::Less);
    }
}
