//! Output swing: the largest symmetric output peak before the FET leaves
//! saturation (triode), cuts off, or drives its gate beyond `vgs_max` (a
//! JFET's gate junction conducting).
//!
//! Along the AC load line every node moves linearly with the EMF `u` and
//! the device current change `Δ` (the stage's [`Stage`] network without the
//! FET's small-signal terms). The device law closes the loop: for a drain
//! current `IDQ + Δ` the overdrive must be `vov` with
//! `IDQ + Δ = k·vov²·(1 + λ·vds)`, which fixes `u`. So each edge is a
//! root in one variable, `Δ`:
//!
//! - triode: `vds − vov = 0` (common source: `VDQ − Δ·rac − VSQ − Δ·RS1 =
//!   vov(IDQ + Δ)`, where the overdrive rises with the current, hence the
//!   solve);
//! - cut-off: `Δ = −IDQ`;
//! - gate: `vto + vov = vgs_max`.
//!
//! For a common gate the triode edge is exactly `VDQ − (VG − vto)`, for a
//! follower the cut-off edge `IDQ·(RS∥RL)`; both fall out of the same
//! solve. The symmetric peak is the smaller of the two directions'
//! output excursions.

use super::network::{Injection, Nodes, Stage, D, G, S};
use crate::device::SquareLaw;
use crate::topology::OpPoint;
use serde::Serialize;

/// What ends the swing in one direction.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Limit {
    /// The FET leaves saturation (VDS = VGS − vto).
    Triode,
    /// The drain current reaches zero.
    Cutoff,
    /// VGS reaches the gate rating (a JFET's junction starts to conduct).
    Gate,
    /// The operating point itself is outside saturation or the rating.
    Bias,
}

impl Limit {
    /// A word for tables and reports.
    pub fn word(self) -> &'static str {
        match self {
            Limit::Triode => "triode",
            Limit::Cutoff => "cut-off",
            Limit::Gate => "gate",
            Limit::Bias => "bias",
        }
    }
}

/// One end of the swing.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Edge {
    /// Output excursion at the edge, volts, signed (AC part at the load).
    pub out_v: f64,
    /// EMF at the edge, volts (the input peak that reaches it).
    pub emf_v: f64,
    /// Drain current change at the edge, amps.
    pub delta_a: f64,
    /// What ends it.
    pub limit: Limit,
}

/// Output swing of one evaluated point.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Swing {
    /// Largest symmetric output peak, volts (the smaller of the two edges'
    /// magnitudes).
    pub peak_v: f64,
    /// Edge with the drain current rising.
    pub rising: Edge,
    /// Edge with the drain current falling.
    pub falling: Edge,
}

impl Swing {
    /// The edge that sets [`Swing::peak_v`].
    pub fn binding(&self) -> &Edge {
        if self.rising.out_v.abs() <= self.falling.out_v.abs() {
            &self.rising
        } else {
            &self.falling
        }
    }
}

/// Where the stage stands at one current change, with its margins.
#[derive(Debug, Clone, Copy)]
struct State {
    out_v: f64,
    emf_v: f64,
    triode_v: f64,
    gate_v: f64,
}

/// The large-signal excursion of one operating point.
struct LoadLine {
    law: SquareLaw,
    id_q: f64,
    vov_q: f64,
    vds_q: f64,
    /// Node responses to 1 V of EMF and to 1 A of device current.
    per_u: Nodes,
    per_delta: Nodes,
    out_node: usize,
    vgs_max_v: Option<f64>,
}

impl LoadLine {
    /// The state at drain current `IDQ + delta` (delta >= −IDQ).
    fn at(&self, delta: f64) -> State {
        let i = (self.id_q + delta).max(0.0);
        let a_u = self.per_u[G] - self.per_u[S];
        let a_d = self.per_delta[G] - self.per_delta[S];
        let c_u = self.per_u[D] - self.per_u[S];
        let c_d = self.per_delta[D] - self.per_delta[S];
        // u = (vov − vov_q − a_d·Δ)/a_u, so vds = A + B·vov.
        let b = c_u / a_u;
        let a = self.vds_q + c_d * delta - b * (self.vov_q + a_d * delta);
        let vov = overdrive(&self.law, i, a, b);
        let u = (vov - self.vov_q - a_d * delta) / a_u;
        let vds = a + b * vov;
        State {
            out_v: self.per_u[self.out_node] * u + self.per_delta[self.out_node] * delta,
            emf_v: u,
            triode_v: vds - vov,
            gate_v: self
                .vgs_max_v
                .map_or(f64::INFINITY, |m| m - (self.law.vto_v + vov)),
        }
    }

    fn margin(s: &State) -> f64 {
        s.triode_v.min(s.gate_v)
    }

    fn edge(&self, delta: f64, cutoff: bool) -> Edge {
        let s = self.at(delta);
        let limit = if cutoff {
            Limit::Cutoff
        } else if s.gate_v <= s.triode_v {
            Limit::Gate
        } else {
            Limit::Triode
        };
        Edge {
            out_v: s.out_v,
            emf_v: s.emf_v,
            delta_a: delta,
            limit,
        }
    }

    /// The first `Δ` from 0 towards `end` where a margin reaches zero, by
    /// bisection (the margins fall monotonically along each direction of
    /// the load line for these stages).
    fn root(&self, end: f64) -> f64 {
        let (mut ok, mut bad) = (0.0_f64, end);
        for _ in 0..200 {
            let mid = 0.5 * (ok + bad);
            if mid == ok || mid == bad {
                break;
            }
            if Self::margin(&self.at(mid)) >= 0.0 {
                ok = mid;
            } else {
                bad = mid;
            }
        }
        ok
    }
}

/// The overdrive `vov >= 0` with `k·vov²·(1 + λ·(a + b·vov)) = i`.
fn overdrive(law: &SquareLaw, i: f64, a: f64, b: f64) -> f64 {
    let k = law.k_a_per_v2;
    if i <= 0.0 || k <= 0.0 {
        return 0.0;
    }
    let lam = law.lambda_per_v;
    let mut v = (i / (k * (1.0 + lam * a).max(1e-3))).sqrt();
    if lam == 0.0 {
        return v;
    }
    for _ in 0..50 {
        let clm = 1.0 + lam * (a + b * v);
        let f = k * v * v * clm - i;
        let df = k * (2.0 * v * clm + v * v * lam * b);
        if df == 0.0 {
            break;
        }
        let next = (v - f / df).max(0.5 * v);
        if (next - v).abs() <= 1e-15 * v {
            return next;
        }
        v = next;
    }
    v
}

fn load_line(stage: &Stage, law: &SquareLaw, op: &OpPoint, vgs_max_v: Option<f64>) -> LoadLine {
    let unit = Injection {
        from: D,
        to: S,
        amps: 1.0,
    };
    LoadLine {
        law: *law,
        id_q: op.id_a,
        vov_q: law.vov(op.vgs_v),
        vds_q: op.vds_v,
        per_u: stage.solve(0.0, 0.0, 1.0, &[]),
        per_delta: stage.solve(0.0, 0.0, 0.0, &[unit]),
        out_node: stage.output_node(),
        vgs_max_v,
    }
}

/// The EMF, volts, that takes the output of `stage` at `op` to `out_v`
/// (signed, the AC part) along the square law, saturation assumed
/// throughout (the law is continued past the triode and gate edges).
/// `None` when the output cannot get there before the current reaches
/// zero.
pub fn emf_for_output(stage: &Stage, law: &SquareLaw, op: &OpPoint, out_v: f64) -> Option<f64> {
    let line = load_line(stage, law, op, None);
    if out_v == 0.0 {
        return Some(0.0);
    }
    // The output moves one way with Δ: find the direction that reaches out_v.
    let rising = line.at(op.id_a.max(1e-12) * 1e-6).out_v;
    let toward = if (rising > 0.0) == (out_v > 0.0) {
        1.0
    } else {
        -1.0
    };
    let (mut near, mut far) = (
        0.0_f64,
        if toward > 0.0 {
            op.id_a.max(1e-9)
        } else {
            -op.id_a
        },
    );
    if toward > 0.0 {
        let mut grow = 0;
        while line.at(far).out_v.abs() < out_v.abs() && grow < 200 {
            far *= 2.0;
            grow += 1;
        }
    } else if line.at(far).out_v.abs() < out_v.abs() {
        return None;
    }
    for _ in 0..200 {
        let mid = 0.5 * (near + far);
        if mid == near || mid == far {
            break;
        }
        if line.at(mid).out_v.abs() < out_v.abs() {
            near = mid;
        } else {
            far = mid;
        }
    }
    Some(line.at(0.5 * (near + far)).emf_v)
}

/// The output swing of `stage` at operating point `op` of a device with
/// law `law` (the same law that gave `op`), with the gate rating
/// `vgs_max_v` (a JFET's default 0 V; `None` when no rating applies).
pub fn swing(stage: &Stage, law: &SquareLaw, op: &OpPoint, vgs_max_v: Option<f64>) -> Swing {
    let line = load_line(stage, law, op, vgs_max_v);
    let bias = Edge {
        out_v: 0.0,
        emf_v: 0.0,
        delta_a: 0.0,
        limit: Limit::Bias,
    };
    let q = line.at(0.0);
    if op.id_a <= 0.0 || LoadLine::margin(&q) < 0.0 {
        return Swing {
            peak_v: 0.0,
            rising: bias,
            falling: bias,
        };
    }
    // Falling current: cut-off unless a margin runs out first.
    let falling = if LoadLine::margin(&line.at(-op.id_a)) >= 0.0 {
        line.edge(-op.id_a, true)
    } else {
        line.edge(line.root(-op.id_a), false)
    };
    // Rising current: double the step until a margin runs out (the drain
    // or source node runs into its rail, so one always does).
    let mut end = op.id_a.max(1e-9);
    let mut grow = 0;
    while LoadLine::margin(&line.at(end)) >= 0.0 && grow < 200 {
        end *= 2.0;
        grow += 1;
    }
    let rising = line.edge(line.root(end), false);
    Swing {
        peak_v: rising.out_v.abs().min(falling.out_v.abs()),
        rising,
        falling,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::topology::{by_id, evaluate, Rails, SignalPath};

    fn jfet(idss: f64, vp: f64) -> SquareLaw {
        SquareLaw {
            vto_v: vp,
            k_a_per_v2: idss / (vp * vp),
            lambda_per_v: 0.0,
        }
    }

    fn close(got: f64, want: f64, tol: f64, what: &str) {
        assert!((got - want).abs() <= tol, "{what}: got {got}, want {want}");
    }

    /// The REFERENCE-NEXT §4.3 stage: IDSS 8 mA, VP −4 V, self bias RS 1 kΩ
    /// (IDQ 2 mA, VGS −2 V, VS 2 V), VDD 15 V, RD 4.7 kΩ, RL 10 kΩ.
    fn reference(topology: &str, values: &[f64]) -> Swing {
        let t = by_id(topology).unwrap();
        let law = jfet(8e-3, -4.0);
        let e = evaluate(
            t,
            values,
            &Rails {
                vdd_v: 15.0,
                vss_v: 0.0,
            },
            &law,
            10e3,
            0.0,
        );
        let stage = Stage {
            path: t.signal_path(values),
            rsig_ohm: 0.0,
            rl_ohm: 10e3,
        };
        swing(&stage, &law, &e.op, Some(0.0))
    }

    // REFERENCE-NEXT §4.3 (computed there and confirmed by ngspice-39
    // transients): bypassed CS down 1.39290 V (triode, ΔI 0.4356509 mA,
    // input +0.20710 V), up 6.39456 V (cut-off, input −2 V).
    #[test]
    fn bypassed_common_source() {
        let s = reference("self-bias", &[1e6, 1e3, 4.7e3]);
        close(s.peak_v, 1.39290, 1e-5, "peak");
        assert_eq!(s.rising.limit, Limit::Triode);
        close(s.rising.delta_a, 0.4356509e-3, 1e-10, "ΔI");
        close(s.rising.emf_v, 0.20710, 1e-5, "input at triode");
        close(s.falling.out_v, 6.39456, 1e-5, "up");
        assert_eq!(s.falling.limit, Limit::Cutoff);
        close(s.falling.emf_v, -2.0, 1e-9, "input at cut-off");
    }

    // The EMF for a given output follows the same load line: the triode
    // edge's output needs the edge's EMF, and the cut-off side cannot go
    // past IDQ·rac.
    #[test]
    fn emf_for_an_output() {
        let t = by_id("self-bias").unwrap();
        let law = jfet(8e-3, -4.0);
        let v = [1e6, 1e3, 4.7e3];
        let e = evaluate(
            t,
            &v,
            &Rails {
                vdd_v: 15.0,
                vss_v: 0.0,
            },
            &law,
            10e3,
            0.0,
        );
        let stage = Stage {
            path: t.signal_path(&v),
            rsig_ohm: 0.0,
            rl_ohm: 10e3,
        };
        let s = swing(&stage, &law, &e.op, Some(0.0));
        let at = |out: f64| emf_for_output(&stage, &law, &e.op, out);
        close(
            at(s.rising.out_v).unwrap(),
            s.rising.emf_v,
            1e-9,
            "triode edge",
        );
        close(
            at(0.5 * s.falling.out_v).unwrap(),
            2f64.sqrt() - 2.0,
            1e-9,
            "half cut-off",
        );
        assert_eq!(at(1.01 * s.falling.out_v), None);
        assert!(at(2.0 * s.rising.out_v).unwrap() > s.rising.emf_v);
    }

    // Unbypassed: 1.09366 V (triode, ΔI 0.3420591 mA, input +0.50634 V),
    // cut-off 6.39456 V at −4 V in.
    #[test]
    fn degenerated_common_source() {
        let s = reference("self-bias-swamped", &[1e6, 1e3, 4.7e3]);
        close(s.peak_v, 1.09366, 1e-5, "peak");
        close(s.rising.delta_a, 0.3420591e-3, 1e-10, "ΔI");
        close(s.rising.emf_v, 0.50634, 1e-5, "input");
        close(s.falling.emf_v, -4.0, 1e-9, "input at cut-off");
    }

    // Common gate (gate at AC ground at 0 V): triode exactly at
    // VDQ − (VG − VP) = 5.6 − 4 = 1.6 V, cut-off 6.39456 V; source drive
    // −0.236258 V at the triode edge.
    #[test]
    fn common_gate_edge_is_exact() {
        let t = by_id("common-gate").unwrap();
        let law = jfet(8e-3, -4.0);
        // R2 = 0 would be a wire; a tap of 1 µV gives VG ≈ 0.
        let values = [15e9, 1.0, 1e3, 4.7e3];
        let e = evaluate(
            t,
            &values,
            &Rails {
                vdd_v: 15.0,
                vss_v: 0.0,
            },
            &law,
            10e3,
            0.0,
        );
        let stage = Stage {
            path: SignalPath::common_gate(1.0, 1e3, 4.7e3),
            rsig_ohm: 0.0,
            rl_ohm: 10e3,
        };
        let s = swing(&stage, &law, &e.op, Some(0.0));
        close(s.peak_v, e.op.vd_v - e.op.vg_v - 4.0, 1e-9, "peak");
        close(s.peak_v, 1.6, 1e-6, "1.6 V");
        close(s.rising.emf_v, -0.236258, 1e-6, "drive");
        close(s.falling.out_v, 6.39456, 1e-5, "cut-off");
    }

    // Follower RS 1 kΩ, RL 10 kΩ: cut-off at IDQ·(RS∥RL) = 1.81818 V (gate
    // −3.81818 V); up to 5.45455 V where vGS = 0 (iD = IDSS).
    #[test]
    fn follower_edges() {
        let s = reference("follower-self", &[1e6, 1e3]);
        close(s.peak_v, 1.81818, 1e-5, "peak");
        assert_eq!(s.falling.limit, Limit::Cutoff);
        close(s.falling.emf_v, -3.81818, 1e-5, "gate at cut-off");
        close(s.rising.out_v, 5.45455, 1e-5, "up");
        assert_eq!(s.rising.limit, Limit::Gate);
    }

    // REFERENCE-NEXT §4.3 worst-corner table (computed): the same bypassed
    // CS with RD 2.2 kΩ at three devices; the guaranteed peak 1.80328 V is
    // set by the low-current corner. The table's triode figure for the
    // first device (7.21312 V, i.e. ΔI = 4 mA) does not satisfy its own
    // §4.2 equation 11.8 − Δ·1803.279 = 2·√((1 mA + Δ)/4 mA); the root is
    // Δ = 5.166558 mA, 9.31674 V, which ngspice-39 confirms (transient at
    // 1.48331 V input peak: min v(d) 3.482789 V = 12.8 − 9.31721 V, margin
    // −0.5 mV at the rounded drive).
    #[test]
    fn worst_corner_table() {
        for (idss, vp, down, up, peak) in [
            (4e-3, -2.0, 9.31674, 1.80328, 1.80328),
            (8e-3, -4.0, 5.43356, 3.60656, 3.60656),
            (12e-3, -6.0, 1.91030, 5.40984, 1.91030),
        ] {
            let t = by_id("self-bias").unwrap();
            let law = jfet(idss, vp);
            let v = [1e6, 1e3, 2.2e3];
            let e = evaluate(
                t,
                &v,
                &Rails {
                    vdd_v: 15.0,
                    vss_v: 0.0,
                },
                &law,
                10e3,
                0.0,
            );
            let stage = Stage {
                path: t.signal_path(&v),
                rsig_ohm: 0.0,
                rl_ohm: 10e3,
            };
            // The table counts triode and cut-off only: no gate rating.
            let s = swing(&stage, &law, &e.op, None);
            close(s.rising.out_v.abs(), down, 1e-5, "down (triode)");
            close(s.falling.out_v, up, 1e-5, "up (cut-off)");
            close(s.peak_v, peak, 1e-5, "peak");
            // With the JFET's gate rating of 0 V, the low-VP device reaches
            // vGS = 0 (iD = IDSS) before triode: (IDSS − IDQ)·rac.
            let g = swing(&stage, &law, &e.op, Some(0.0));
            let rac = 2.2e3 * 10e3 / 12.2e3;
            let gate_edge = (idss - e.op.id_a) * rac;
            if gate_edge < down {
                assert_eq!(g.rising.limit, Limit::Gate);
                close(g.rising.out_v.abs(), gate_edge, 1e-6, "gate edge");
            } else {
                assert_eq!(g.rising.limit, Limit::Triode);
            }
            close(g.peak_v, peak, 1e-5, "peak with the gate rating");
        }
    }

    // A point outside saturation swings nothing.
    #[test]
    fn triode_bias_has_no_swing() {
        let t = by_id("zero-bias").unwrap();
        let law = jfet(8e-3, -4.0);
        let v = [1e6, 10e3];
        let e = evaluate(
            t,
            &v,
            &Rails {
                vdd_v: 10.0,
                vss_v: 0.0,
            },
            &law,
            10e3,
            0.0,
        );
        let stage = Stage {
            path: t.signal_path(&v),
            rsig_ohm: 0.0,
            rl_ohm: 10e3,
        };
        let s = swing(&stage, &law, &e.op, None);
        assert_eq!(s.peak_v, 0.0);
        assert_eq!(s.rising.limit, Limit::Bias);
    }

    // With λ > 0 the edge still has vds = vov and the law holds there
    // (ngspice level-1/JFET form ID = k·vov²·(1 + λ·VDS)).
    #[test]
    fn lambda_edge_satisfies_the_law() {
        let t = by_id("self-bias").unwrap();
        let law = SquareLaw {
            vto_v: -4.0,
            k_a_per_v2: 5e-4,
            lambda_per_v: 0.02,
        };
        let v = [1e6, 1e3, 4.7e3];
        let rails = Rails {
            vdd_v: 15.0,
            vss_v: 0.0,
        };
        let e = evaluate(t, &v, &rails, &law, 10e3, 0.0);
        let stage = Stage {
            path: t.signal_path(&v),
            rsig_ohm: 0.0,
            rl_ohm: 10e3,
        };
        let s = swing(&stage, &law, &e.op, Some(0.0));
        // At the triode edge: the drain at VDQ + out, the source at VSQ
        // (bypassed), the gate at the EMF; the law must give IDQ + Δ.
        let edge = s.rising;
        let vd = e.op.vd_v + edge.out_v;
        let vgs = e.op.vgs_v + edge.emf_v;
        let vds = vd - e.op.vs_v;
        close(vds, law.vov(vgs), 1e-9, "at the triode edge");
        close(law.id(vgs, vds), e.op.id_a + edge.delta_a, 1e-12, "law");
    }
}
